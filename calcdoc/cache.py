"""The build cache: what each block computed, what a build typeset and drew for each sheet, and the
PDF it made, kept in a folder beside the output folder so that the next build redoes only what
changed.

Layout of ``<out>.cache/`` (beside ``<out>``, never inside it: the output folder is replaced
whole by each build)::

    blocks/<key>.json   what one block's compute wrote (results, steps, figures: calcdoc/stored.py)
    printed/<key>.json  that block's steps as printed (numbers to the figures that re-do them)
    sheets/<key>.json   the answers (formulas typeset, figures drawn) one sheet's view used
    pdf/<key>.pdf       a PDF, with a one-line JSON header before its bytes
    parts/<key>.pdf     one part of the PDF typeset alone (calcdoc/render/parts.py) ...
    parts/<key>.json    ... and what its pages hold: page count, anchors, links, outline
    parts/<guess>.json  the page of each anchor in the last PDF (the contents' numbers to try)

A sheet's key is the SHA-256 of the sheet's file, its resolved inputs (values from other
sheets and from materials included), the project's number settings and the *salt*: calcdoc's
version, its templates, the rendering code and the versions of the libraries that typeset and
draw. A PDF's key is the SHA-256 of the print document, the stylesheet, the attachments, the
revision date and the salt. A block's key is the SHA-256 of the block as written, the values
its inputs resolved to, the project's materials and named values, the keys of the blocks it
refers to and the *evaluation salt*: every file of the calcdoc package and the versions of the
libraries that compute.

Nothing is unpickled: every entry is JSON or bytes, carries its key, its salt, the SHA-256 of
its content and a message authentication code (HMAC-SHA-256) made with this user's own secret
(``$XDG_CACHE_HOME/calcdoc/cache-secret``, ``~/.cache`` by default, readable by the user
only), and is ignored unless all four hold: a cache folder copied from someone else, or written
by hand, is a cache of misses, never of answers. An answer is a pure function of the text or data
it is keyed by (:mod:`calcdoc.render.memo`), so a stale or missing entry only costs time; a warm
build writes the same bytes as a cold one. A ``--final`` build evaluates every block afresh.
"""

from __future__ import annotations

import hashlib
import hmac
import json
import os
import secrets
import tempfile
from functools import lru_cache
from importlib import metadata
from pathlib import Path

from calcdoc import __version__
from calcdoc.render.memo import data_digest

__all__ = ["BuildCache", "cache_folder", "salt"]

FORMAT = 2
_LIBRARIES = ("latex2mathml", "ziamath", "ziafont", "matplotlib", "weasyprint", "pydyf",
              "numpy")
_COMPUTING = ("numpy", "scipy", "pint")


def cache_folder(out: Path) -> Path:
    """Return the cache folder of an output folder: ``build/x`` → ``build/x.cache``."""
    out = Path(out).resolve()  # "." has no name: the cache would land inside the output
    return out.parent / f"{out.name}.cache"


def _digest_of(what: str, libraries: tuple, files: list[Path], root: Path) -> str:
    """The SHA-256 of calcdoc's version, the versions of ``libraries`` and ``files`` (each by
    its path under ``root`` and its bytes)."""
    h = hashlib.sha256(f"calcdoc {__version__} {what} {FORMAT}\n".encode())
    for name in libraries:
        try:
            h.update(f"{name} {metadata.version(name)}\n".encode())
        except metadata.PackageNotFoundError:
            h.update(f"{name} -\n".encode())
    for path in files:
        if path.is_file() and "__pycache__" not in path.parts and path.suffix != ".pyc":
            name = path.relative_to(root) if path.is_relative_to(root) else path.name
            h.update(str(name).encode() + b"\0" + path.read_bytes() + b"\0")
    return h.hexdigest()


@lru_cache(maxsize=1)
def salt() -> str:
    """Return the digest of everything besides its inputs that a view's entry depends on: the
    templates, the rendering code and the libraries that typeset and draw."""
    from calcdoc.render.html import TEMPLATES
    package = Path(__file__).resolve().parent
    files = sorted(TEMPLATES.rglob("*")) + sorted((package / "render").glob("*.py"))
    return _digest_of("cache", _LIBRARIES, files, package)


@lru_cache(maxsize=1)
def evaluation_salt() -> str:
    """Return the digest of what a block's answer depends on besides its inputs: every file of
    the calcdoc package (kinds, physics, libraries of materials and sections) and the versions
    of the libraries that compute."""
    package = Path(__file__).resolve().parent
    return _digest_of("evaluation", _COMPUTING, sorted(package.rglob("*")), package)


def secret_file() -> Path:
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return Path(base) / "calcdoc" / "cache-secret"


def _secret(make: bool) -> bytes | None:
    """Return this user's secret for the cache's authentication codes; ``make`` makes it when
    there is none (mode 0600: the first build that writes the cache). None when it can be
    neither read nor made (the cache is then not used)."""
    path = secret_file()
    try:
        data = path.read_bytes()
        if len(data) >= 32:
            return data
    except OSError:
        pass
    if not make:
        return None
    try:
        path.parent.mkdir(parents=True, exist_ok=True, mode=0o700)
        fd, tmp = tempfile.mkstemp(prefix=".secret-", dir=path.parent)
        with os.fdopen(fd, "wb") as handle:  # mkstemp makes it 0600
            handle.write(secrets.token_hex(32).encode())
        try:
            os.link(tmp, path)  # never replaces a secret another build made meanwhile
        except FileExistsError:
            pass
        finally:
            os.unlink(tmp)
        data = path.read_bytes()
        return data if len(data) >= 32 else None
    except OSError:
        return None


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


class BuildCache:
    """Read and write one cache folder; every failure to read is a miss, to write is ignored."""

    def __init__(self, folder: Path):
        self.folder = Path(folder)
        self.salt = salt()
        self.secret = _secret(make=False)  # made by the first write, not by a failed build
        self.pending_blocks: dict[str, dict] = {}  # block entries to write if the build succeeds
        self.restored_blocks: list[str] = []  # blocks whose compute the cache gave back
        self.block_keys: dict[str, str | None] = {}  # block → its key, as evaluation made it
        self.computed_blocks: list[str] = []  # blocks computed (then kept where they could be)
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

    def block_key(self, spec, records, library: str, refers_to: list, precision,
                  units) -> str | None:
        """The key of what one block's compute wrote: the block as written (its kind, inputs,
        display units), what its inputs resolved to (``records``), the digest of the project's
        materials and named values (``library``), the keys of the blocks it refers to
        (``refers_to``, in order), the project's number settings and the evaluation salt; None
        when part of it has no canonical form (the block is then computed every time)."""
        from dataclasses import replace

        from calcdoc.located import plain
        if library is None or None in refers_to:
            return None
        written = plain(spec.inputs) if spec.inputs is not None else None
        where_free = [replace(r, loc=None) for r in records]  # compute never reads where
        return data_digest(evaluation_salt(), spec.key, spec.kind, written,
                           sorted(spec.display.items()), where_free, library, refers_to,
                           precision, units)

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

    def _mac(self, kind: str, key: str, digest: str) -> str:
        message = json.dumps([FORMAT, kind, key, self.salt, digest]).encode()
        return hmac.new(self.secret, message, hashlib.sha256).hexdigest()

    def _read(self, kind: str, key: str, suffix: str) -> bytes | None:
        """Return an entry's content when its header names this key and salt, its digest
        holds and its authentication code is this user's; None otherwise (missing, corrupted,
        from another version, another cache or another hand)."""
        if self.secret is None:
            return None
        path = self._path(kind, key, suffix)
        try:
            raw = path.read_bytes()
            header_line, _, content = raw.partition(b"\n")
            header = json.loads(header_line)
            digest = _sha(content)
            ok = (isinstance(header, dict) and header.get("format") == FORMAT
                  and header.get("key") == key and header.get("salt") == self.salt
                  and header.get("sha256") == digest
                  and isinstance(header.get("mac"), str)
                  and hmac.compare_digest(header["mac"], self._mac(kind, key, digest)))
        except (OSError, ValueError, UnicodeDecodeError):
            return None
        if not ok:
            return None
        self.used.add(path)
        return content

    def _write(self, kind: str, key: str, suffix: str, content: bytes) -> None:
        if self.secret is None:
            self.secret = _secret(make=True)
        if self.secret is None:
            return
        path = self._path(kind, key, suffix)
        digest = _sha(content)
        header = json.dumps({"format": FORMAT, "key": key, "salt": self.salt, "sha256": digest,
                             "mac": self._mac(kind, key, digest)}).encode()
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
        answers = self.load_json("sheets", key)
        if not isinstance(answers, dict) or not all(
                isinstance(v, dict) for v in answers.values()):
            return None
        return answers

    def store_sheet(self, key: str, answers: dict) -> None:
        self.store_json("sheets", key, answers)

    def load_json(self, kind: str, key: str):
        """Return the JSON data of an entry, or None; the caller checks its shape (``blocks``:
        what a block's compute wrote, by :func:`calcdoc.stored.restore_output`; ``printed``:
        its steps as printed, by :func:`calcdoc.stored.restore_printed`)."""
        content = self._read(kind, key, ".json")
        try:
            return json.loads(content) if content is not None else None
        except ValueError:
            return None

    def store_json(self, kind: str, key: str, data, sort_keys: bool = True) -> None:
        """Write JSON data (``sort_keys`` False: mappings in their order, as views need)."""
        self._write(kind, key, ".json",
                    json.dumps(data, ensure_ascii=False, sort_keys=sort_keys).encode("utf-8"))

    def printed_key(self, block_key: str, sig: int, system: str) -> str:
        """The key of a block's steps as printed: the block's key, the significant figures and
        the unit system, and the view's salt."""
        return data_digest(self.salt, block_key, sig, system)

    def load_page(self, key: str) -> str | None:
        content = self._read("pages", key, ".html")
        try:
            return content.decode("utf-8") if content is not None else None
        except UnicodeDecodeError:
            return None

    def store_page(self, key: str, text: str) -> None:
        self._write("pages", key, ".html", text.encode("utf-8"))

    def load_pdf(self, key: str) -> bytes | None:
        return self._read("pdf", key, ".pdf")

    def store_pdf(self, key: str, data: bytes) -> None:
        self._write("pdf", key, ".pdf", data)

    def load_part(self, key: str) -> tuple[dict, bytes] | None:
        """Return a part's layout (JSON data; the caller checks its shape) and its PDF."""
        data, pdf = self.load_json("parts", key), self._read("parts", key, ".pdf")
        return (data, pdf) if isinstance(data, dict) and pdf is not None else None

    def store_part(self, key: str, layout: dict, pdf: bytes) -> None:
        self._write("parts", key, ".pdf", pdf)
        self.store_json("parts", key, layout)

    def keep(self, kind: str) -> None:
        """Keep every entry of ``kind`` at :meth:`prune` (the whole PDF came from the cache:
        the parts it was joined from stay for the next build that changes one)."""
        self.kept.add(kind)

    _GUESS = hashlib.sha256(b"calcdoc: the page of each anchor in the last PDF").hexdigest()

    def page_guess(self) -> dict[str, int] | None:
        """Return the page of each anchor in the last PDF typeset in parts, or None."""
        data = self.load_json("parts", self._GUESS)
        ok = isinstance(data, dict) and all(
            isinstance(k, str) and type(v) is int and v > 0 for k, v in data.items())
        return data if ok else None

    def store_page_guess(self, page_of: dict[str, int]) -> None:
        self.store_json("parts", self._GUESS, page_of)

    def prune(self) -> None:
        """Remove the entries this build did not use: the cache holds one build's worth."""
        for kind in ("blocks", "printed", "sheets", "views-site", "views-pdf", "pages", "pdf",
                     "parts"):
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
