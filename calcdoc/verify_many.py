"""``calcdoc verify`` over many packages: an archive re-verified as independent tasks.

Each package (a build folder or a PDF) is verified by :func:`verify_package`, a plain function
of a path that returns a plain record, so that it runs the same in this process, on a local
process pool (the default, one task per package) or on a Dask distributed cluster
(``--scheduler ADDRESS``; the workers must see the same paths, as on a shared file system).
A package is read as a stranger's file by :func:`calcdoc.archive.verify`: attachments in
memory, inputs evaluated from memory, nothing written anywhere.

A folder that is not itself a build folder is searched for packages: every folder holding a
manifest.json (not searched further: its own files belong to it) and every ``*.pdf`` outside
one. Hidden entries (a name starting with a dot, such as a build's temporary folder) are
skipped; a link met inside a folder is not followed but listed as refused (a path given on
the command line is followed, as the single-package verify follows it).
"""

from __future__ import annotations

import gc
import os
import signal
import socket
import sys
import time
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from pathlib import Path

from calcdoc.errors import InputError, InputErrors, Location

__all__ = ["PackageRecord", "Found", "find_packages", "verify_package", "verify_packages",
           "is_single_package", "holds_packages", "link_record", "STATUSES"]

STATUSES = ("verified", "differs", "refused")
"""What became of a package: it holds; a difference was found; it was not verified, with the
reason: not a readable calcdoc package (what the single-package verify refuses with exit status
2), a link not followed, or calcdoc failed on it (a defect, or the worker process died)."""


@dataclass
class PackageRecord:
    """One package's verification: its path as shown, what became of it and why."""

    path: str
    status: str
    differences: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    reason: str = ""
    seconds: float = 0.0

    def record(self) -> dict:
        return {"path": self.path, "status": self.status, "differences": self.differences,
                "notes": self.notes, "reason": self.reason, "seconds": round(self.seconds, 3)}


def is_single_package(path: Path) -> bool:
    """True when ``path`` is one package for verify (a file, a build folder, or nothing)."""
    return not path.is_dir() or (path / "manifest.json").exists()


@dataclass
class Found:
    """The packages under the paths given, and the links met on the way (not followed)."""

    packages: list[str] = field(default_factory=list)
    links: list[str] = field(default_factory=list)


def find_packages(paths: list[str]) -> Found:
    """Return the packages under ``paths`` in order, each once (by its resolved path); raise
    InputErrors for a path that does not exist or a folder with no package under it. A path
    given is followed even when it is a link; a link met inside a folder is not."""
    found = Found()
    seen: set[str] = set()
    errors: list[InputError] = []

    def add(shown: str) -> None:
        key = os.path.realpath(shown)
        if key not in seen:
            seen.add(key)
            found.packages.append(shown)

    for given in paths:
        path = Path(given)
        if not path.exists() and not path.is_symlink():
            errors.append(InputError(Location(given), "", "not found",
                                     "a build folder, a PDF or a folder holding them",
                                     "nothing at that path"))
        elif is_single_package(path):
            add(given)
        else:
            inside = list(_walk(path))
            if not inside:
                errors.append(InputError(
                    Location(given), "", "no calcdoc package in this folder",
                    "build folders (with manifest.json) or PDFs under it",
                    "none (hidden entries are skipped)"))
            for shown, is_link in inside:
                if is_link:
                    found.links.append(shown)
                else:
                    add(shown)
    if errors:
        raise InputErrors(errors)
    return found


def holds_packages(folder: Path) -> bool:
    """True when a folder that is not a build folder holds a package (or a link) somewhere."""
    return next(_walk(folder), None) is not None


def _walk(folder: Path):
    """Yield (path joined to ``folder``, is a link) for the packages under it, in name order."""
    try:
        entries = sorted(os.scandir(folder), key=lambda e: e.name)
    except OSError:
        yield str(folder), False  # verify says why it cannot be read
        return
    for entry in entries:
        if entry.name.startswith("."):
            continue
        shown = os.path.join(str(folder), entry.name)
        if entry.is_symlink():
            if entry.name.lower().endswith(".pdf") or os.path.isdir(shown):
                yield shown, True  # listed as refused, never followed
        elif entry.is_dir():
            if os.path.exists(os.path.join(shown, "manifest.json")):
                yield shown, False
            else:
                yield from _walk(Path(shown))
        elif entry.name.lower().endswith(".pdf"):
            yield shown, False


def verify_package(path: str) -> dict:
    """Return the record of one package's verification as plain data (a task for a pool)."""
    from calcdoc.archive import verify
    from calcdoc.errors import render
    start = time.perf_counter()
    notes: list[str] = []
    try:
        differences = verify(Path(path), notes=notes)
    except InputErrors as errs:
        record = PackageRecord(path, "refused",
                               reason="\n".join(render(e) for e in errs.errors))
    except InputError as err:
        record = PackageRecord(path, "refused", reason=render(err))
    except RecursionError as exc:
        record = PackageRecord(path, "refused", reason=f"{path}: error: nested too deeply "
                               f"to read (expected a package written by calcdoc, got "
                               f"{type(exc).__name__})")
    except Exception as exc:  # noqa: BLE001 - a defect of calcdoc on this package, not a crash
        record = PackageRecord(path, "refused", reason=f"internal error: {type(exc).__name__}: "
                                                    f"{str(exc)[:200]}")
    else:
        record = PackageRecord(path, "differs" if differences else "verified", differences,
                               notes)
    record.seconds = time.perf_counter() - start
    return record.record()


def link_record(path: str) -> PackageRecord:
    """The record of a link met inside a searched folder: not followed, so not verified."""
    return PackageRecord(path, "refused", reason=f"{path}: error: a link inside a searched "
                         f"folder is not followed (expected a build folder or a PDF, got a "
                         f"link)")


def _quiet_worker() -> None:
    """A worker leaves Ctrl-C to the parent, which ends the pool: no traceback per worker."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def verify_packages(paths: list[str], jobs: int = 1, scheduler: str | None = None,
                    on_done=None) -> list[PackageRecord]:
    """Verify every package of ``paths`` (as found by :func:`find_packages`) and return their
    records in the order given. ``jobs`` > 1: on a local process pool of that many workers;
    ``scheduler``: on the Dask distributed cluster at that address. ``on_done(count, total)``
    is called after each package (for a progress display)."""
    if scheduler:
        records = _on_cluster(paths, scheduler, on_done)
    elif jobs <= 1 or len(paths) <= 1:
        records = {}
        for path in paths:
            records[path] = verify_package(path)
            if on_done:
                on_done(len(records), len(paths))
    else:
        records = _on_pool(paths, jobs, on_done)
    return [PackageRecord(**{k: v for k, v in records[p].items()}) for p in paths]


def _on_pool(paths: list[str], jobs: int, on_done) -> dict[str, dict]:
    import multiprocessing
    # forkserver: workers start from a clean process, not a copy of this one and its threads
    method = "forkserver" if "forkserver" in multiprocessing.get_all_start_methods() else None
    context = multiprocessing.get_context(method)
    records: dict[str, dict] = {}
    pool = ProcessPoolExecutor(max_workers=min(jobs, len(paths)), mp_context=context,
                               initializer=_quiet_worker)
    try:
        futures = {pool.submit(verify_package, path): path for path in paths}
        for future in as_completed(futures):
            path = futures[future]
            try:
                records[path] = future.result()
            except BrokenProcessPool:
                records[path] = PackageRecord(
                    path, "refused", reason="internal error: the worker process verifying it "
                                         "ended abruptly (out of memory?)").record()
            if on_done:
                on_done(len(records), len(paths))
    finally:
        pool.shutdown(wait=True, cancel_futures=True)
    return records


def _on_cluster(paths: list[str], address: str, on_done) -> dict[str, dict]:
    try:
        from distributed import Client, as_completed as completed_on_cluster
    except ImportError:
        raise InputErrors([InputError(Location("--scheduler"), "", "Dask distributed is not "
                                      "installed", "the distributed package (pip install "
                                      "'calcdoc[distributed]')", "no module named distributed")]
                          ) from None
    client = _connect(Client, address)
    records: dict[str, dict] = {}
    try:
        # absolute paths: a worker may run in another folder (or on another machine that
        # mounts the archive at the same place)
        futures = {client.submit(verify_package, os.path.abspath(path), pure=False): path
                   for path in paths}
        for future in completed_on_cluster(list(futures), loop=client.loop):
            path = futures[future]
            try:
                record = future.result()
            except Exception as exc:  # noqa: BLE001 - a worker lost or killed
                record = PackageRecord(path, "refused", reason=f"internal error: the cluster "
                                       f"could not verify it: {type(exc).__name__}: "
                                       f"{str(exc)[:120]}").record()
            record["path"] = path  # the messages name the path as given, as on the pool
            record["reason"] = record["reason"].replace(os.path.abspath(path), path)
            records[path] = record
            if on_done:
                on_done(len(records), len(paths))
    finally:
        client.close()
    return records


def _unreachable(address: str, why: str) -> InputErrors:
    return InputErrors([InputError(Location("--scheduler"), "", "cannot reach the scheduler",
                                   "a running Dask scheduler at this address",
                                   f"{address!r}: {why}")])


def _connect(client_class, address: str):
    """Return a client of the scheduler at ``address``; raise InputErrors (exit status 2) when
    there is none there. A TCP address is tried first with a plain connection: a refused or
    silent port fails in seconds, where the client would wait, then spend twice its timeout
    closing itself and print a traceback on the way."""
    from distributed.comm.addressing import parse_address, parse_host_port
    try:
        scheme, location = parse_address(address)
        if scheme in ("tcp", "tls"):
            host, port = parse_host_port(location)
            socket.create_connection((host, port), timeout=3).close()
    except (OSError, ValueError, TypeError) as exc:
        raise _unreachable(address, str(exc)[:120] or type(exc).__name__) from None
    hook = sys.unraisablehook
    sys.unraisablehook = lambda unraisable: None  # a half-made client complains as it goes
    try:
        try:
            return client_class(address, timeout="10s", set_as_default=False)
        except (OSError, TimeoutError, ValueError) as exc:
            why = str(exc)[:120] or type(exc).__name__
        gc.collect()
    finally:
        sys.unraisablehook = hook
    raise _unreachable(address, why)
