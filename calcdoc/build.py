"""The build: load → evaluate → (final gate) → render site → render PDF → write, in that order.

Everything is written into a temporary folder beside the output folder and swapped in only when
the whole build succeeded. An existing output folder is replaced only when it is empty or carries
calcdoc's marker from an earlier build.
"""

from __future__ import annotations

import ctypes
import errno
import hashlib
import os
import re
import shutil
import socket
import sys
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

from calcdoc.archive import dumps, manifest_document, results_document
from calcdoc.cache import BuildCache, cache_folder
from calcdoc.errors import FinalRefused, InputError, InputErrors, Location
from calcdoc.evaluate import evaluate_project
from calcdoc.model import Package
from calcdoc.progress import current
from calcdoc.project import read_project
from calcdoc.render import status
from calcdoc.render.html import (Drawings, package_view, render_package_html,
                                 render_site)
from calcdoc.render.memo import MEMO, data_digest
from calcdoc.render.parts import plan_parts
from calcdoc.render.printed import print_check

__all__ = ["build", "final_refusals", "MARKER", "BuildReport", "check_output_folder", "swap_in",
           "remove_dead_temporaries"]

MARKER = ".calcdoc-build"


@dataclass
class BuildReport:
    out_dir: Path
    package: Package
    timings: dict[str, float] = field(default_factory=dict)
    files: list[str] = field(default_factory=list)
    computed: list[str] = field(default_factory=list)  # blocks whose compute ran
    restored: list[str] = field(default_factory=list)  # blocks the cache gave back
    views_kept: list[str] = field(default_factory=list)  # sheets whose views it gave back
    pages_kept: list[str] = field(default_factory=list)  # sheets whose site page it gave back


def final_refusals(package: Package) -> list[str]:
    """Return every reason the package may not be issued as final (empty: it may); the rule
    is :func:`calcdoc.render.status.final_refusals`, the one the site and the PDF show."""
    sig, system = package.project.precision, package.project.units

    def words(check) -> str:
        shown = print_check(check, sig, system)
        relation = "at most" if check.relation == "at_most" else "at least"
        return f"{shown.value}, required {relation} {shown.limit}"

    return status.final_refusals(package, words)


def check_output_folder(out_dir: Path) -> None:
    """Refuse (InputErrors) to replace a folder that calcdoc did not build."""
    if out_dir.exists() and not out_dir.is_dir():
        raise InputErrors([InputError(Location(str(out_dir)), "--out",
                                      "the output path is a file", "a folder", "a file")])
    if out_dir.is_dir() and any(out_dir.iterdir()) and not (out_dir / MARKER).is_file():
        count = sum(1 for _ in out_dir.iterdir())
        raise InputErrors([InputError(
            Location(str(out_dir)), "--out", "refusing to replace a folder calcdoc did not build",
            "an empty folder or an earlier calcdoc build", f"a folder with {count} entries "
            f"and no {MARKER} marker")])


def build(project_dir: str | Path, out_dir: str | Path | None = None, pdf: bool = True,
          final: bool = False, previous: str | Path | None = None,
          sheets: list[str] | None = None, cache: bool = True,
          jobs: int = 1) -> BuildReport:
    """Build the package; raise InputErrors (bad input) or FinalRefused (--final refused).

    ``previous`` is the build (folder or PDF) of the previous issued revision: every input,
    result and check changed since then is marked with the current revision in the margin,
    and the changes are listed under the current revision on the cover. ``sheets`` builds
    only those sheets (and evaluates what they refer to): a partial package, marked so, in a
    fraction of the time (default output folder build/<project>-<SHEET>/). ``cache`` keeps
    what was typeset and drawn for each sheet, and the PDF, in ``<out>.cache/`` beside the
    output folder (:mod:`calcdoc.cache`), so that a rebuild typesets only what changed;
    ``cache=False`` neither reads nor writes it. ``jobs`` > 1 draws the figures and typesets the
    PDF's parts (cover and contents, each sheet, the appendices) on that many processes, and
    joins the parts (:mod:`calcdoc.render.parts`)."""
    timings: dict[str, float] = {}
    t0 = time.perf_counter()
    project_dir = Path(project_dir)
    name = project_dir.resolve().name + ("-" + "-".join(sheets) if sheets else "")
    out = Path(out_dir) if out_dir else Path("build") / name
    check_output_folder(out)

    current().show(f"load: reading {project_dir}", force=True)
    project, errors = read_project(project_dir)
    timings["load"] = time.perf_counter() - t0
    if project is None:
        raise InputErrors(errors)
    t = time.perf_counter()
    store = BuildCache(cache_folder(out)) if cache else None
    # a package to be issued is evaluated afresh, block by block, whatever the cache holds
    package = evaluate_project(project, errors, set(sheets) if sheets else None,
                               store=None if final else store)
    timings["evaluate"] = time.perf_counter() - t
    if final:
        reasons = final_refusals(package)
        if reasons:
            raise FinalRefused(reasons)
    MEMO.clear()  # answers of an earlier build in this process are not this build's
    sheet_keys, loaded = {}, {}
    printed = _seed_printed(store, package) if store is not None else {}
    if store is not None:
        for sheet in package.sheets:
            key = sheet_keys[sheet.id] = store.sheet_key(package, sheet)
            answers = loaded[sheet.id] = store.load_sheet(key)
            if answers:
                MEMO.seed(answers)
    changes = None
    if previous is not None:
        from calcdoc.archive import archive_package, open_archive
        from calcdoc.changes import compare_packages
        changes = compare_packages(archive_package(open_archive(Path(previous))), package)

    try:
        out.parent.mkdir(parents=True, exist_ok=True)
        remove_dead_temporaries(out)
        tmp = Path(tempfile.mkdtemp(prefix=_temporary_prefix(out), dir=out.parent))
    except OSError as exc:
        raise _write_error(out, exc) from None
    try:
        t = time.perf_counter()
        current().show("site: typesetting the sheets and writing the pages", force=True)
        inputs = _input_files(project)
        for name, data in inputs.items():
            target = tmp / "inputs" / name
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        results_text = dumps(results_document(package))
        (tmp / "results.json").write_text(results_text, encoding="utf-8")
        drawings = Drawings(project.precision, project.units)
        kept_views = KeptViews(store, sheet_keys, loaded) if store is not None else None
        kept_pages = KeptPages(store, kept_views) if store is not None else None
        with drawings.drawing_ahead(package, jobs) as ahead:
            if ahead:
                current().show(f"site: drawing {ahead} figures on {jobs} processes while the "
                               "sheets are typeset", force=True)
            render_site(package_view(package, "site", drawings, changes, kept_views), tmp,
                        kept_pages)
        timings["html"] = time.perf_counter() - t
        if pdf:
            t = time.perf_counter()
            current().show("PDF: typesetting the package", force=True)
            # WeasyPrint loads only when a PDF is made
            from calcdoc.render.pdf import in_parts, write_pdf
            # the print document beside the PDF: what WeasyPrint renders, with the site's
            # stylesheet (assets/style.css), for a reviewer or a benchmark to render again
            print_view = package_view(package, "pdf", drawings, changes, kept_views)
            html = render_package_html(print_view)
            (tmp / "package.html").write_text(html, encoding="utf-8")
            attachments = sorted(inputs.items()) + [("results.json", results_text.encode())]
            parts = plan_parts(print_view)
            pdf_key = cached = None
            if store is not None:
                pdf_key = store.pdf_key(html, (tmp / "assets" / "style.css").read_bytes(),
                                        attachments, project.revision.date, results_text,
                                        in_parts(jobs, parts))
                cached = store.load_pdf(pdf_key)
            if cached is not None:
                (tmp / "package.pdf").write_bytes(cached)
                store.keep("parts")
            else:
                write_pdf(html, tmp, tmp / "package.pdf", attachments, project.revision.date,
                          digest_seed=results_text, jobs=jobs,
                          render_part=lambda part, page_of: render_package_html(
                              print_view, part, page_of),
                          parts=parts, store=store)
                if store is not None:
                    store.store_pdf(pdf_key, (tmp / "package.pdf").read_bytes())
            timings["pdf"] = time.perf_counter() - t
        (tmp / MARKER).write_text("calcdoc build folder: calcdoc may replace it on rebuild\n")
        outputs = {str(p.relative_to(tmp)): p.read_bytes() for p in sorted(tmp.rglob("*"))
                   if p.is_file() and p.name != MARKER}
        (tmp / "manifest.json").write_text(dumps(manifest_document(inputs, outputs)),
                                           encoding="utf-8")
        os.chmod(tmp, 0o755)
        swap_in(tmp, out)
    except OSError as exc:
        shutil.rmtree(tmp, ignore_errors=True)
        raise _write_error(out, exc) from None
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    if store is not None:  # the build succeeded: what it made is kept for the next
        for key, data in store.pending_blocks.items():
            store.store_json("blocks", key, data)
        _keep_printed(store, package, printed)
        for (kind, key), data in kept_views.pending.items():
            store.store_json(kind, key, data, sort_keys=False)
        for key, text in kept_pages.pending.items():
            store.store_page(key, text)
        for sheet_id, key in sheet_keys.items():
            if MEMO.used.get(sheet_id, {}) != (loaded.get(sheet_id) or {}):
                store.store_sheet(key, MEMO.used.get(sheet_id, {}))
        if not pdf:  # a build without the PDF leaves the PDF's entries for the next that has it
            store.keep("views-pdf")
            store.keep("pdf")
            store.keep("parts")
        store.prune()
    timings["total"] = time.perf_counter() - t0
    files = sorted(str(p.relative_to(out)) for p in out.rglob("*") if p.is_file())
    computed, restored = (store.computed_blocks, store.restored_blocks) if store else ([], [])
    views_kept = list(dict.fromkeys(kept_views.restored)) if store is not None else []
    pages_kept = list(kept_pages.restored) if store is not None else []
    return BuildReport(out, package, timings, files, list(computed), list(restored), views_kept,
                       pages_kept)


class KeptViews:
    """The views of each sheet's blocks (formatted numbers, typeset steps, figures, as the
    templates take them) kept in the build cache, for :func:`calcdoc.render.html.package_view`:
    a sheet whose file, resolved inputs, blocks' keys (and so what each refers to) and context
    (target, citation numbers so far, review comments on it, revision) are as before gets its
    views back instead of building them; those built are kept once the build has succeeded."""

    def __init__(self, store: BuildCache, sheet_keys: dict[str, str],
                 loaded: dict[str, dict | None]):
        self.store, self.sheet_keys, self.loaded = store, sheet_keys, loaded
        self.pending: dict[tuple[str, str], dict] = {}  # (kind, key): written on success
        self.restored: list[str] = []  # sheets whose views came back (site and PDF)
        self.keys: dict[tuple[str, str], str] = {}  # (target, sheet) → its views' key

    def key(self, sheet, context: list) -> str | None:
        """The key of a sheet's blocks' views; ``context[0]`` is the target."""
        block_keys = [self.store.block_keys.get(b.key) for b in sheet.blocks]
        sheet_key = self.sheet_keys.get(sheet.id)
        if sheet_key is None or None in block_keys:
            return None
        key = data_digest(self.store.salt, sheet_key, block_keys, context)
        if key is not None:
            self.keys[context[0], sheet.id] = key
        return key

    def load(self, key: str, sheet_id: str, target: str) -> tuple[list, dict] | None:
        from calcdoc.stored import Unstorable, restore_view
        try:
            blocks, cited = restore_view(self.store.load_json(f"views-{target}", key))
        except Unstorable:  # missing (None) or not of that form
            return None
        # the sheet's typeset answers are kept as they were (its views are not built to note
        # them again)
        used = MEMO.used.setdefault(sheet_id, {})
        for space, entries in (self.loaded.get(sheet_id) or {}).items():
            used.setdefault(space, {}).update(entries)
        self.restored.append(sheet_id)
        return blocks, cited

    def keep(self, key: str, target: str, blocks: list, cited: dict) -> None:
        from calcdoc.stored import encode_view
        data = encode_view(blocks, cited)
        if data is not None:
            self.pending[f"views-{target}", key] = data


class KeptPages:
    """Each sheet's site page kept in the build cache, for
    :func:`calcdoc.render.html.render_site`: under the key of its blocks' views and all else the
    page shows (its sheet's entries, the sidebar, its neighbours, the package entries of
    ``SHEET_PAGE_VIEW``); written once the build has succeeded."""

    def __init__(self, store: BuildCache, views: KeptViews):
        self.store, self.views = store, views
        self.pending: dict[str, str] = {}
        self.restored: list[str] = []

    def key(self, sheet_id: str, seen: list) -> str | None:
        views = self.views.keys.get(("site", sheet_id))
        return data_digest(self.store.salt, views, seen) if views is not None else None

    def load(self, key: str, sheet_id: str) -> str | None:
        text = self.store.load_page(key)
        if text is not None:
            self.restored.append(sheet_id)
        return text

    def keep(self, key: str, text: str) -> None:
        self.pending[key] = text


def _seed_printed(store: BuildCache, package: Package) -> dict[str, str]:
    """Give each block that has a key its steps as printed, when the cache has them; return the
    printed key of each block that has a key and was not given them, for :func:`_keep_printed`."""
    from calcdoc.stored import Unstorable, restore_printed
    sig, system = package.project.precision, package.project.units
    missing = {}
    for sheet in package.sheets:
        for block in sheet.blocks:
            block_key = store.block_keys.get(block.key)
            if block_key is None:
                continue
            key = store.printed_key(block_key, sig, system)
            try:
                steps = restore_printed(store.load_json("printed", key))
            except Unstorable:  # missing (None) or not of that form
                steps = None
            if steps is not None and len(steps) == len(block.output.steps):
                block.__dict__.setdefault("_printed", {})[sig, system] = steps
            else:
                missing[block.key] = key
    return missing


def _keep_printed(store: BuildCache, package: Package, missing: dict[str, str]) -> None:
    """Keep the steps as printed of each block the cache did not give them to."""
    from calcdoc.stored import encode_printed
    sig, system = package.project.precision, package.project.units
    for sheet in package.sheets:
        for block in sheet.blocks:
            steps = block.__dict__.get("_printed", {}).get((sig, system))
            data = encode_printed(steps) if block.key in missing and steps is not None else None
            if data is not None:
                store.store_json("printed", missing[block.key], data)


def _write_error(out: Path, exc: OSError) -> InputErrors:
    """An output folder that cannot be written (read-only, full disk, a file in the way)."""
    reason = exc.strerror or type(exc).__name__
    where = exc.filename or out
    return InputErrors([InputError(Location(str(out)), "--out", "cannot write the output folder",
                                   "a writable folder with free space",
                                   f"{reason}: {where}")])


def _input_files(project) -> dict[str, bytes]:
    return {name: project.files.read(name) for name in project.input_files}


# ----------------------------------------------------------------------------- the swap

_AT_FDCWD = -100
_RENAME_EXCHANGE = 2


def _exchange(a: Path, b: Path) -> bool:
    """Swap two folders in one step (Linux renameat2 RENAME_EXCHANGE); False if unsupported."""
    if not sys.platform.startswith("linux"):
        return False
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p,
                          ctypes.c_uint]
    if renameat2(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.ENOSYS, errno.EINVAL, errno.EOPNOTSUPP):
        return False  # the file system cannot exchange: fall back
    raise OSError(err, os.strerror(err), str(b))


def swap_in(tmp: Path, out: Path) -> None:
    """Put the finished build ``tmp`` in place of ``out``; there is always an output folder.

    On Linux the two folders are exchanged in one atomic step and the old one (now at ``tmp``)
    is removed; elsewhere the old folder is first renamed aside, which leaves a moment without
    one."""
    if not out.exists():
        os.replace(tmp, out)
        return
    if _exchange(tmp, out):
        shutil.rmtree(tmp, ignore_errors=True)
        return
    old = Path(tempfile.mkdtemp(prefix=_temporary_prefix(out, "old"), dir=out.parent))
    os.replace(out, old / "build")
    os.replace(tmp, out)
    shutil.rmtree(old, ignore_errors=True)


# ----------------------------------------------------------------------------- stale folders


def _boot_id() -> str:
    try:
        return Path("/proc/sys/kernel/random/boot_id").read_text().strip().replace("-", "")[:8]
    except OSError:
        return ""


def _start_time(pid: int) -> str:
    """Return a process's start time in clock ticks since boot, or '' when it does not run."""
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return ""
    return stat.rsplit(")", 1)[1].split()[19]


def _host() -> str:
    return hashlib.sha256(socket.gethostname().encode()).hexdigest()[:8]


def _temporary_prefix(out: Path, what: str = "building") -> str:
    """The name of a temporary folder says who made it: host, boot, process and its start, so
    that a later build can prove a leftover one dead (the process is gone)."""
    pid = os.getpid()
    return f".{out.name}.{what}-{_host()}{_boot_id() or 'x' * 8}-{pid}-{_start_time(pid)}-"


_TEMPORARY = re.compile(r"^\.(?P<name>.+)\.(building|old)-(?P<host>[0-9a-f]{8})"
                        r"(?P<boot>[0-9a-fx]{8})-(?P<pid>\d+)-(?P<start>\d*)-[^/]+$")


def remove_dead_temporaries(out: Path) -> list[Path]:
    """Remove temporary folders of earlier builds of ``out`` whose process is provably gone.

    Provably: made on this host (same host name), and either before the last boot or by a
    process that no longer runs with the recorded start time. Anything else is left alone."""
    removed = []
    boot, host = _boot_id(), _host()
    if not boot or not out.parent.is_dir():
        return removed
    for entry in out.parent.iterdir():
        match = _TEMPORARY.match(entry.name)
        if not match or match["name"] != out.name or match["host"] != host:
            continue
        dead = match["boot"] != boot or _start_time(int(match["pid"])) != match["start"]
        if dead and entry.is_dir() and not entry.is_symlink():
            shutil.rmtree(entry, ignore_errors=True)
            removed.append(entry)
    return removed
