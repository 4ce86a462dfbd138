"""The build cache: what a build typeset and drew for each sheet, and the PDF it made, kept in a
folder beside the output folder so that the next build redoes only what changed.

Layout of ``<out>.cache/`` (beside ``<out>``, never inside it: the output folder is replaced
whole by each build)::

    sheets/<key>.json   the answers (formulas typeset, figures drawn) one sheet's view used
    pdf/<key>.pdf       a PDF, with a one-line JSON header before its bytes
    parts/<key>.pdf     one part of the PDF typeset alone (calcdoc/render/parts.py) ...
    parts/<key>.json    ... and what its pages hold: page count, anchors, links, outline
    parts/<guess>.json  the page of each anchor in the last PDF (the contents' numbers to try)

A sheet's key is the SHA-256 of the sheet's file, its resolved inputs (values from other
sheets and from materials included), the project's number settings and the *salt*: calcdoc's
version, its templates, the rendering code and the versions of the libraries that typeset and
draw. A PDF's key is the SHA-256 of the print document, the stylesheet, the attachments, the
revision date and the salt. Nothing is unpickled: every entry is JSON or bytes, carries its key,
its salt and the SHA-256 of its content, and is ignored unless all three match. An answer is
a pure function of the text or data it is keyed by (:mod:`calcdoc.render.memo`), so a stale or
missing entry only costs time; a warm build writes the same bytes as a cold one.
"""

from __future__ import annotations

import hashlib
import json
import os
import tempfile
from functools import lru_cache
from importlib import metadata
from pathlib import Path

from calcdoc import __version__
from calcdoc.render.memo import data_digest

__all__ = ["BuildCache", "cache_folder", "salt"]

FORMAT = 1
_LIBRARIES = ("latex2mathml", "ziamath", "ziafont", "matplotlib", "weasyprint", "pydyf",
              "numpy")


def cache_folder(out: Path) -> Path:
    """Return the cache folder of an output folder: ``build/x`` → ``build/x.cache``."""
    out = Path(out).resolve()  # "." has no name: the cache would land inside the output
    return out.parent / f"{out.name}.cache"


@lru_cache(maxsize=1)
def salt() -> str:
    """Return the digest of everything besides its inputs that an entry depends on."""
    h = hashlib.sha256(f"calcdoc {__version__} cache {FORMAT}\n".encode())
    for name in _LIBRARIES:
        try:
            h.update(f"{name} {metadata.version(name)}\n".encode())
        except metadata.PackageNotFoundError:
            h.update(f"{name} -\n".encode())
    from calcdoc.render.html import TEMPLATES
    package = Path(__file__).resolve().parent
    files = sorted(TEMPLATES.rglob("*")) + sorted((package / "render").glob("*.py"))
    for path in files:
        if path.is_file():
            h.update(path.name.encode() + b"\0" + path.read_bytes() + b"\0")
    return h.hexdigest()


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


class BuildCache:
    """Read and write one cache folder; every failure to read is a miss, to write is ignored."""

    def __init__(self, folder: Path):
        self.folder = Path(folder)
        self.salt = salt()
        self.used: set[Path] = set()
        self.kept: set[str] = set()

    # ------------------------------------------------------------------------------ keys

    def sheet_key(self, package, sheet) -> str:
        """The key of a sheet's answers: its file, its resolved inputs and what they come from."""
        project = package.project
        materials = {}
        inputs = []
        for block in sheet.blocks:
            inputs.append([block.key, block.kind.name, block.inputs])
            for record in block.inputs:
                if record.origin == "material":
                    materials[record.si] = project.materials.get(record.si)
        try:
            text = project.files.read(sheet.spec.relpath)
        except OSError:
            text = b""
        parts = [self.salt, project.precision, project.units, sheet.spec.relpath, _sha(text)]
        digest = data_digest(*parts, inputs, sorted(materials.items(), key=lambda i: str(i[0])))
        # inputs of a shape the digest does not know: the file alone (a stale entry only
        # costs time; its answers are keyed by their own inputs)
        return digest or data_digest(*parts)

    def pdf_key(self, html: str, css: bytes, attachments: list[tuple[str, bytes]],
                revision_date: str, digest_seed: str, in_parts: bool = False) -> str:
        h = hashlib.sha256(self.salt.encode())
        for part in (html.encode(), css, revision_date.encode(), digest_seed.encode(),
                     b"parts" if in_parts else b"one document"):
            h.update(_sha(part).encode())
        for name, data in attachments:
            h.update(_sha(name.encode()).encode() + _sha(data).encode())
        return h.hexdigest()

    def part_key(self, html: str, css: bytes) -> str:
        """The key of one part of the PDF typeset alone: its HTML and the stylesheet."""
        h = hashlib.sha256(self.salt.encode())
        h.update(_sha(html.encode()).encode() + _sha(css).encode())
        return h.hexdigest()

    # ------------------------------------------------------------------------------ entries

    def _path(self, kind: str, key: str, suffix: str) -> Path:
        return self.folder / kind / f"{key}{suffix}"

    def _read(self, kind: str, key: str, suffix: str) -> bytes | None:
        """Return an entry's content when its header names this key and salt and its digest
        holds; None otherwise (missing, corrupted, from another version or another cache)."""
        path = self._path(kind, key, suffix)
        try:
            raw = path.read_bytes()
            header_line, _, content = raw.partition(b"\n")
            header = json.loads(header_line)
            ok = (isinstance(header, dict) and header.get("format") == FORMAT
                  and header.get("key") == key and header.get("salt") == self.salt
                  and header.get("sha256") == _sha(content))
        except (OSError, ValueError, UnicodeDecodeError):
            return None
        if not ok:
            return None
        self.used.add(path)
        return content

    def _write(self, kind: str, key: str, suffix: str, content: bytes) -> None:
        path = self._path(kind, key, suffix)
        header = json.dumps({"format": FORMAT, "key": key, "salt": self.salt,
                             "sha256": _sha(content)}).encode()
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(prefix=".entry-", dir=path.parent)
            with os.fdopen(fd, "wb") as handle:
                handle.write(header + b"\n" + content)
            os.replace(tmp, path)
            self.used.add(path)
        except OSError:
            pass  # a cache that cannot be written costs the next build time, nothing else

    def load_sheet(self, key: str) -> dict | None:
        content = self._read("sheets", key, ".json")
        if content is None:
            return None
        try:
            answers = json.loads(content)
        except ValueError:
            return None
        if not isinstance(answers, dict) or not all(
                isinstance(v, dict) for v in answers.values()):
            return None
        return answers

    def store_sheet(self, key: str, answers: dict) -> None:
        self._write("sheets", key, ".json",
                    json.dumps(answers, ensure_ascii=False, sort_keys=True).encode("utf-8"))

    def load_pdf(self, key: str) -> bytes | None:
        return self._read("pdf", key, ".pdf")

    def store_pdf(self, key: str, data: bytes) -> None:
        self._write("pdf", key, ".pdf", data)

    def load_part(self, key: str) -> tuple[dict, bytes] | None:
        """Return a part's layout (JSON data; the caller checks its shape) and its PDF."""
        layout, pdf = self._read("parts", key, ".json"), self._read("parts", key, ".pdf")
        if layout is None or pdf is None:
            return None
        try:
            data = json.loads(layout)
        except ValueError:
            return None
        return (data, pdf) if isinstance(data, dict) else None

    def store_part(self, key: str, layout: dict, pdf: bytes) -> None:
        self._write("parts", key, ".pdf", pdf)
        self._write("parts", key, ".json",
                    json.dumps(layout, ensure_ascii=False, sort_keys=True).encode("utf-8"))

    def keep(self, kind: str) -> None:
        """Keep every entry of ``kind`` at :meth:`prune` (the whole PDF came from the cache:
        the parts it was joined from stay for the next build that changes one)."""
        self.kept.add(kind)

    _GUESS = hashlib.sha256(b"calcdoc: the page of each anchor in the last PDF").hexdigest()

    def page_guess(self) -> dict[str, int] | None:
        """Return the page of each anchor in the last PDF typeset in parts, or None."""
        content = self._read("parts", self._GUESS, ".json")
        try:
            data = json.loads(content) if content is not None else None
        except ValueError:
            return None
        ok = isinstance(data, dict) and all(
            isinstance(k, str) and type(v) is int and v > 0 for k, v in data.items())
        return data if ok else None

    def store_page_guess(self, page_of: dict[str, int]) -> None:
        self._write("parts", self._GUESS, ".json",
                    json.dumps(page_of, ensure_ascii=False, sort_keys=True).encode("utf-8"))

    def prune(self) -> None:
        """Remove the entries this build did not use: the cache holds one build's worth."""
        for kind in ("sheets", "pdf", "parts"):
            if kind in self.kept:
                continue
            folder = self.folder / kind
            if not folder.is_dir():
                continue
            for path in folder.iterdir():
                if path not in self.used and path.is_file():
                    try:
                        path.unlink()
                    except OSError:
                        pass
