"""The files of one project, read from a folder on disk or from an archive held in memory.

The loader never opens a path itself: it asks a :class:`ProjectFiles` for a file by its name
inside the project (``sheets/ew1.yaml``). That is where containment is enforced — a name that
climbs out of the project (``../x.yaml``), an absolute name, or a symbolic link that resolves
outside the folder is refused before a byte is read — and where files are labelled for messages:
as the user can open them from the current directory, or as ``package.pdf[sheets/ew1.yaml]``
for a file attached to a PDF.
"""

from __future__ import annotations

import os
import posixpath
from pathlib import Path

from calcdoc.errors import CalcdocError

__all__ = ["ProjectFiles", "DiskFiles", "MemoryFiles", "FileProblem", "MAX_FILE_BYTES",
           "safe_name"]

MAX_FILE_BYTES = 1024 * 1024
"""Largest input file read (1 MiB): a sheet of hundreds of blocks is a few tens of kilobytes."""


class FileProblem(CalcdocError, OSError):
    """A file that cannot be read: ``what`` and ``expected``/``got`` for the message."""

    def __init__(self, what: str, expected: str, got: str):
        self.what, self.expected, self.got = what, expected, got
        super().__init__(what)


def safe_name(name: str) -> str | None:
    """Return why ``name`` cannot name a file inside a project, or None when it can.

    A name is a relative POSIX path of plain components: no absolute path, no drive, no
    backslash, no ``..`` or ``.`` component, no empty component, no control character."""
    if not isinstance(name, str) or not name:
        return "an empty name"
    if any(ord(ch) < 32 or ch == "\x7f" for ch in name):
        return "a control character in the name"
    if "\\" in name:
        return "a backslash in the name"
    if name.startswith("/") or (len(name) > 1 and name[1] == ":"):
        return "an absolute path"
    parts = name.split("/")
    if any(part in ("", ".", "..") for part in parts):
        return "'..', '.' or an empty part in the path"
    if len(name) > 255:
        return "a name longer than 255 characters"
    return None


class ProjectFiles:
    """Read access to the files of one project by their names inside it."""

    def label(self, name: str) -> str:
        """Return the file's path as messages print it."""
        raise NotImplementedError

    def read(self, name: str) -> bytes:
        """Return the file's bytes; raise FileNotFoundError or :class:`FileProblem`."""
        raise NotImplementedError

    def exists(self, name: str) -> bool:
        raise NotImplementedError

    def check(self, name: str) -> None:
        """Raise :class:`FileProblem` when ``name`` cannot be a file inside the project."""
        problem = safe_name(name)
        if problem:
            raise FileProblem("a file outside the project folder", "a path inside the project "
                              "folder", f"{name!r} ({problem})")

    def sheet_names(self) -> list[str]:
        """Return ``sheets/*.yaml`` sorted: the default sheet list."""
        raise NotImplementedError

    def read_text(self, name: str) -> str:
        data = self.read(name)
        try:
            return data.decode("utf-8")
        except UnicodeDecodeError as exc:
            raise FileProblem("not UTF-8 text", "UTF-8 text", str(exc.reason)) from None


class DiskFiles(ProjectFiles):
    """A project folder on disk."""

    def __init__(self, root: str | Path):
        self.root = Path(root)
        self._resolved = self.root.resolve()
        cwd = Path.cwd().resolve()
        # Messages name files as the user can open them: relative to the current directory when
        # the project is under it, otherwise as the project folder was typed.
        if self._resolved == cwd or cwd in self._resolved.parents:
            self._prefix = os.path.relpath(self._resolved, cwd)
        else:
            self._prefix = str(self.root)

    def label(self, name: str) -> str:
        return posixpath.normpath(posixpath.join(self._prefix.replace(os.sep, "/"), name))

    def check(self, name: str) -> None:
        self._path(name)

    def _path(self, name: str) -> Path:
        super().check(name)
        path = self.root / name
        resolved = path.resolve()
        if self._resolved not in resolved.parents:
            raise FileProblem("a file outside the project folder", "a file inside the project "
                              "folder", f"{name!r} (a link to a file outside it)")
        return path

    def exists(self, name: str) -> bool:
        try:
            return self._path(name).is_file()
        except (FileProblem, OSError):
            return False

    def read(self, name: str) -> bytes:
        path = self._path(name)
        try:
            size = path.stat().st_size
        except FileNotFoundError:
            raise
        except OSError as exc:
            raise FileProblem("cannot read the file", "a readable file",
                              exc.strerror or type(exc).__name__) from None
        if not path.is_file():
            raise FileProblem("not a file", "a file", "a folder or a device")
        if size > MAX_FILE_BYTES:
            raise FileProblem("file too large", f"at most {MAX_FILE_BYTES // 1024} KiB",
                              f"{size // 1024} KiB")
        try:
            return path.read_bytes()
        except OSError as exc:
            raise FileProblem("cannot read the file", "a readable file",
                              exc.strerror or type(exc).__name__) from None

    def sheet_names(self) -> list[str]:
        folder = self.root / "sheets"
        if not folder.is_dir():
            return []
        return sorted(f"sheets/{p.name}" for p in folder.glob("*.yaml"))


class MemoryFiles(ProjectFiles):
    """A project held in memory, e.g. the inputs attached to a PDF; nothing touches the disk."""

    def __init__(self, files: dict[str, bytes], label_prefix: str):
        self.files = dict(files)
        self.prefix = label_prefix

    def label(self, name: str) -> str:
        return f"{self.prefix}[{name}]"

    def exists(self, name: str) -> bool:
        return name in self.files

    def read(self, name: str) -> bytes:
        self.check(name)
        if name not in self.files:
            raise FileNotFoundError(name)
        data = self.files[name]
        if len(data) > MAX_FILE_BYTES:
            raise FileProblem("file too large", f"at most {MAX_FILE_BYTES // 1024} KiB",
                              f"{len(data) // 1024} KiB")
        return data

    def sheet_names(self) -> list[str]:
        return sorted(n for n in self.files
                      if n.startswith("sheets/") and n.count("/") == 1 and n.endswith(".yaml"))
