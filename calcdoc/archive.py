"""results.json, manifest.json, and re-running an archived package: verify and diff."""

from __future__ import annotations

import hashlib
import io
import json
import logging
import platform
import struct
import zlib
from dataclasses import dataclass, field
from importlib import metadata
from pathlib import Path

from calcdoc import __version__
from calcdoc.errors import InputError, InputErrors, Location
from calcdoc.sources import safe_name

__all__ = ["results_document", "manifest_document", "sha256", "verify", "diff", "dumps",
           "FORMAT_VERSION", "LIBRARIES", "open_archive", "Archive", "pdf_attachments",
           "results_problem", "manifest_problem"]

FORMAT_VERSION = 2
LIBRARIES = ("numpy", "scipy", "pint", "jinja2", "markdown", "pyyaml", "weasyprint",
             "matplotlib", "ziamath", "latex2mathml", "nh3")
RELATIVE_TOLERANCE = 1e-9


def dumps(document) -> str:
    """Return JSON text in calcdoc's fixed layout (sorted keys off: the contract's order)."""
    return json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def results_document(package) -> dict:
    """Return results.json (format 2, docs/results-json.md): coherent SI values at full
    precision, and every step as printed in the package."""
    from calcdoc.render.printed import fill, print_value
    project = package.project
    sig, system = project.precision, project.units
    sheets = []
    for sheet in package.sheets:
        blocks = []
        for block in sheet.blocks:
            out = block.output
            results = {}
            for name, r in out.results.items():
                value = out.value_of(name)
                if isinstance(r.value, list):
                    shown = ", ".join(print_value(value, sig, system, index=i).text
                                      for i in range(len(r.value)))
                else:
                    shown = print_value(value, sig, system).text
                results[name] = {"si": r.value, "si_unit": r.spec.unit, "display": shown}
            entry = {
                "id": block.id, "kind": block.kind.name, "title": block.spec.title,
                "results": results,
                "checks": [{"result": c.result, "relation": c.relation, "value_si": c.value_si,
                            "limit_si": c.limit_si, "margin_si": c.margin_si,
                            "utilisation": c.utilisation, "passed": c.passed,
                            "source": str(c.source or ""),
                            **({"note": fill(c.note, sig, system)} if c.note else {})}
                           for c in block.checks],
                "series": {name: {"x_si": s.x, "x_unit": s.x_unit, "y_si": s.y,
                                  "si_unit": s.y_unit, "label": s.label}
                           for name, s in out.series.items()},
                "warnings": [{"message": fill(w["text"], sig, system),
                              "source": str(w["source"] or "")}
                             for w in out.warnings],
                "steps": [s.record() for s in block.printed_steps(sig, system)],
            }
            if out.absent:
                entry["not_reached"] = {k: fill(v, sig, system) for k, v in out.absent.items()}
            if out.simulated_until is not None:
                entry["simulated_until"] = out.simulated_until
            blocks.append(entry)
        sheets.append({"id": sheet.id, "title": sheet.spec.title, "blocks": blocks})
    doc = {"format_version": FORMAT_VERSION, "calcdoc_version": __version__,
           "project": {"number": project.number, "title": project.title,
                       "revision": project.revision.rev},
           "sheets": sheets}
    if package.partial:  # build --sheet: these sheets only, not the package as issued
        doc["partial"] = True
    return doc


def _version(name: str) -> str:
    try:
        return metadata.version(name)
    except metadata.PackageNotFoundError:
        return "not installed"


def manifest_document(inputs: dict[str, bytes], outputs: dict[str, bytes]) -> dict:
    """Return manifest.json: versions, SHA-256 of every input and output, a package digest."""
    input_hashes = {name: sha256(data) for name, data in sorted(inputs.items())}
    digest = sha256("".join(f"{name}\0{h}\n" for name, h in input_hashes.items()).encode())
    return {"format_version": FORMAT_VERSION,
            "tool": {"name": "calcdoc", "version": __version__,
                     "python": platform.python_version()},
            "libraries": {name: _version(name) for name in LIBRARIES},
            "inputs": input_hashes,
            "outputs": {name: sha256(data) for name, data in sorted(outputs.items())},
            "package_digest": digest}


# ----------------------------------------------------------------------------- verify / diff


def _flatten(results: dict) -> dict[str, object]:
    """Return {'SHEET.block.result': si} and {'SHEET.block.check:RESULT': passed} entries."""
    flat: dict[str, object] = {}
    for sheet in results.get("sheets", []):
        for block in sheet.get("blocks", []):
            key = f"{sheet['id']}.{block['id']}"
            for name, r in block.get("results", {}).items():
                flat[f"{key}.{name}"] = r.get("si")
            for name, why in block.get("not_reached", {}).items():
                flat[f"{key}.{name}"] = f"not reached ({why})"
            for c in block.get("checks", []):
                flat[f"{key}.check[{c['result']} {c['relation']}]"] = \
                    "passed" if c["passed"] else "FAILED"
    return flat


def _same(a, b) -> bool:
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_same(x, y) for x, y in zip(a, b))
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return abs(a - b) <= RELATIVE_TOLERANCE * max(abs(a), abs(b), 1e-300)
    return a == b


def compare_results(old: dict, new: dict) -> list[str]:
    """Return lines naming every result or check that differs between two results.json."""
    a, b = _flatten(old), _flatten(new)
    lines = []
    for key in sorted(set(a) | set(b)):
        if key not in a:
            lines.append(f"+ {key}: {b[key]}")
        elif key not in b:
            lines.append(f"- {key}: {a[key]}")
        elif not _same(a[key], b[key]):
            lines.append(f"~ {key}: {a[key]} → {b[key]}")
    return lines


# ----------------------------------------------------------------------------- reading archives
#
# A build folder or a PDF handed to verify or diff is written by a stranger. Nothing in it is
# trusted: sizes are bounded, JSON is checked for shape before use, attachment names must be
# plain relative names (no '..', no absolute path, no backslash, no duplicate), and the inputs
# are evaluated from memory: verify and diff write nothing anywhere.

MAX_ARCHIVE_BYTES = 512 * 1024 * 1024
"""Largest PDF or single file read from an archive."""

MAX_JSON_BYTES = 64 * 1024 * 1024
"""Largest results.json or manifest.json read."""

MAX_ATTACHMENTS = 2000


@dataclass
class Archive:
    """What a build folder or a PDF holds: its input files, results and, for a folder, the
    manifest with what checking its digests found."""

    label: str
    inputs: dict[str, bytes]
    results: dict
    manifest: dict | None = None
    integrity: list[str] = field(default_factory=list)


def _refuse(label: str, what: str, expected: str, got: str) -> InputErrors:
    return InputErrors([InputError(Location(label), "", what, expected, got)])


def _read_bounded(path: Path, limit: int, label: str) -> bytes:
    try:
        if path.is_symlink() or not path.is_file():
            raise _refuse(label, "not a regular file", "a file", "a link, a folder or nothing")
        size = path.stat().st_size
        if size > limit:
            raise _refuse(label, "file too large", f"at most {limit // (1024 * 1024)} MiB",
                          f"{size // (1024 * 1024)} MiB")
        return path.read_bytes()
    except OSError as exc:
        raise _refuse(label, "cannot read the file", "a readable file",
                      exc.strerror or type(exc).__name__) from None


def _json(data: bytes, label: str) -> object:
    try:
        return json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, ValueError, RecursionError) as exc:
        raise _refuse(label, "not JSON", "a JSON document written by calcdoc",
                      type(exc).__name__) from None


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def results_problem(doc) -> str | None:
    """Return why ``doc`` is not a results.json of the contract, or None when it is one."""
    if not isinstance(doc, dict):
        return f"a {type(doc).__name__} at the top"
    if not _is_number(doc.get("format_version")):
        return "no format_version"
    if not isinstance(doc.get("project"), dict) or not isinstance(doc.get("sheets"), list):
        return "no project or no list of sheets"
    for sheet in doc["sheets"]:
        if not isinstance(sheet, dict) or not isinstance(sheet.get("id"), str) or \
                not isinstance(sheet.get("blocks"), list):
            return "a sheet without an id or a list of blocks"
        for block in sheet["blocks"]:
            if not isinstance(block, dict) or not isinstance(block.get("id"), str):
                return f"a block without an id in sheet {sheet['id']!r}"
            results = block.get("results", {})
            if not isinstance(results, dict):
                return f"results of {sheet['id']}.{block['id']} not a mapping"
            for name, r in results.items():
                si = r.get("si") if isinstance(r, dict) else None
                if not (_is_number(si) or isinstance(si, list) and all(map(_is_number, si))):
                    return f"result {sheet['id']}.{block['id']}.{name} without a number"
            checks = block.get("checks", [])
            if not isinstance(checks, list) or not all(
                    isinstance(c, dict) and isinstance(c.get("result"), str)
                    and isinstance(c.get("relation"), str) and isinstance(c.get("passed"), bool)
                    for c in checks):
                return f"checks of {sheet['id']}.{block['id']} not as written by calcdoc"
            absent = block.get("not_reached", {})
            if not isinstance(absent, dict):
                return f"not_reached of {sheet['id']}.{block['id']} not a mapping"
    return None


def manifest_problem(doc) -> str | None:
    """Return why ``doc`` is not a manifest.json written by calcdoc, or None."""
    if not isinstance(doc, dict):
        return f"a {type(doc).__name__} at the top"
    for part in ("inputs", "outputs"):
        entries = doc.get(part)
        if not isinstance(entries, dict) or not all(
                isinstance(k, str) and isinstance(v, str) and len(v) == 64
                for k, v in entries.items()):
            return f"no mapping of {part} to SHA-256 digests"
    if not isinstance(doc.get("tool"), dict):
        return "no tool versions"
    return None


def _checked_results(data: bytes, label: str) -> dict:
    doc = _json(data, label)
    problem = results_problem(doc)
    if problem:
        raise _refuse(label, "not a calcdoc results.json", "the results contract of docs/format.md",
                      problem)
    return doc


def open_archive(path: Path) -> Archive:
    """Read a build folder or a PDF as a stranger's file; raise InputErrors when it is not a
    readable calcdoc package (exit status 2)."""
    label = str(path)
    if path.is_dir():
        return _open_folder(path, label)
    if not path.exists():
        raise _refuse(label, "not found", "a build folder or a PDF", "nothing at that path")
    return _open_pdf(_read_bounded(path, MAX_ARCHIVE_BYTES, label), label)


def _open_folder(folder: Path, label: str) -> Archive:
    manifest_path = folder / "manifest.json"
    if not manifest_path.exists():
        raise _refuse(f"{label}/manifest.json", "not a calcdoc build folder",
                      "a folder with manifest.json", "no manifest.json")
    manifest = _json(_read_bounded(manifest_path, MAX_JSON_BYTES, f"{label}/manifest.json"),
                     f"{label}/manifest.json")
    problem = manifest_problem(manifest)
    if problem:
        raise _refuse(f"{label}/manifest.json", "not a calcdoc manifest",
                      "manifest.json as calcdoc writes it", problem)
    integrity: list[str] = []
    files: dict[str, bytes] = {}
    listed = {f"inputs/{n}": h for n, h in manifest["inputs"].items()}
    listed.update(manifest["outputs"])
    for name, expected in sorted(listed.items()):
        why = safe_name(name)
        if why:
            raise _refuse(f"{label}/manifest.json", "a file name outside the build folder",
                          "names inside the folder", f"{name!r} ({why})")
        path = folder / name
        if not path.exists() and not path.is_symlink():
            integrity.append(f"missing: {name} (listed in manifest.json)")
            continue
        try:
            data = _read_bounded(path, MAX_ARCHIVE_BYTES, f"{label}/{name}")
        except InputErrors:
            integrity.append(f"unreadable: {name} (a link, a folder or too large)")
            continue
        files[name] = data
        if sha256(data) != expected:
            integrity.append(f"changed: {name} (its SHA-256 differs from manifest.json)")
    for path in sorted(folder.rglob("*")):
        name = path.relative_to(folder).as_posix()
        if path.is_dir() and not path.is_symlink():
            continue
        if name not in listed and name not in ("manifest.json", _MARKER):
            integrity.append(f"unlisted: {name} (not in manifest.json)")
    if "results.json" not in files:
        raise _refuse(f"{label}/results.json", "not a calcdoc build folder",
                      "a folder with results.json", "no readable results.json")
    results = _checked_results(files["results.json"], f"{label}/results.json")
    inputs = {n[len("inputs/"):]: d for n, d in files.items() if n.startswith("inputs/")}
    if "package.pdf" in files:
        integrity.extend(_pdf_matches_folder(files["package.pdf"], inputs,
                                             files["results.json"], label))
    return Archive(label, inputs, results, manifest, integrity)


_MARKER = ".calcdoc-build"


def _pdf_matches_folder(pdf: bytes, inputs: dict, results: bytes, label: str) -> list[str]:
    """The PDF's attachments must be the folder's inputs and results.json, byte for byte."""
    try:
        attached = pdf_attachments(pdf, f"{label}/package.pdf")
    except InputErrors:
        return ["unreadable: package.pdf (its attachments cannot be read)"]
    lines = []
    expected = dict(inputs, **{"results.json": results})
    for name in sorted(set(attached) | set(expected)):
        if name not in attached:
            lines.append(f"package.pdf: {name} is not attached")
        elif name not in expected:
            lines.append(f"package.pdf: attached {name} is not in the folder")
        elif attached[name] != expected[name]:
            lines.append(f"package.pdf: attached {name} differs from the folder's copy")
    return lines


def pdf_attachments(data: bytes, label: str) -> dict[str, bytes]:
    """Return a PDF's attached files by name, read in memory; refuse unsafe or duplicate
    names and anything that is not a readable PDF (InputErrors)."""
    from pypdf import PdfReader
    from pypdf.errors import PyPdfError

    if not data.startswith(b"%PDF-"):
        raise _refuse(label, "not a PDF", "a PDF package written by calcdoc",
                      "a file that does not start with %PDF-" if data else "an empty file")
    logging.getLogger("pypdf").setLevel(logging.CRITICAL)  # its warnings are not ours to print
    try:
        reader = PdfReader(io.BytesIO(data), strict=False)
        found = reader.attachments
        names = list(found.keys())
        if len(names) > MAX_ATTACHMENTS:
            raise _refuse(label, "too many attachments", f"at most {MAX_ATTACHMENTS}",
                          str(len(names)))
        attached: dict[str, bytes] = {}
        problems = []
        for name in names:
            contents = found[name]
            why = safe_name(name) if isinstance(name, str) else "not text"
            if why:
                problems.append(f"{name!r} ({why})")
                continue
            if len(contents) != 1:
                problems.append(f"{name!r} (attached {len(contents)} times)")
                continue
            if len(contents[0]) > MAX_JSON_BYTES:
                problems.append(f"{name!r} (larger than {MAX_JSON_BYTES // (1024 * 1024)} MiB)")
                continue
            attached[name] = bytes(contents[0])
    except InputErrors:
        raise
    except (PyPdfError, ValueError, KeyError, TypeError, AttributeError, IndexError,
            AssertionError, RecursionError, OverflowError, UnicodeError, zlib.error,
            struct.error, NotImplementedError) as exc:
        raise _refuse(label, "not a readable PDF", "a PDF package written by calcdoc",
                      f"{type(exc).__name__}: {str(exc)[:80]}") from None
    if problems:
        raise _refuse(label, "attachments with unsafe or duplicate names refused",
                      "plain relative names, each once", "; ".join(problems[:5]))
    return attached


def _open_pdf(data: bytes, label: str) -> Archive:
    attached = pdf_attachments(data, label)
    if "results.json" not in attached:
        raise _refuse(label, "not a calcdoc package", "a PDF with results.json attached",
                      "no results.json attached")
    results = _checked_results(attached.pop("results.json"), f"{label}[results.json]")
    return Archive(label, attached, results)


def archive_package(archive: Archive):
    """Return the evaluated package of an archive's inputs, evaluated from memory."""
    from calcdoc.evaluate import evaluate_folder
    from calcdoc.sources import MemoryFiles
    return evaluate_folder(MemoryFiles(archive.inputs, archive.label))


def evaluate_archive(archive: Archive):
    """Return the fresh results.json of an archive's inputs, evaluated from memory."""
    return results_document(archive_package(archive))


def verify(path: Path, notes: list[str] | None = None) -> list[str]:
    """Check a build folder's digests and re-evaluate the archived inputs of a build or PDF;
    return every difference found (empty: it holds). Raise InputErrors for a file that is not
    a readable calcdoc package. ``notes``, when given, receives what is information rather than
    a difference: who signed a signed PDF, and what each signature covers."""
    archive = open_archive(path)
    fresh = evaluate_archive(archive)
    lines = list(archive.integrity)
    if not path.is_dir():  # a signed PDF: its signatures too (calcdoc/seal.py)
        from calcdoc.seal import check_seal
        seal = check_seal(path)
        lines.extend(seal.differences)
        if notes is not None:
            notes.extend(seal.notes)
    differences = compare_results(archive.results, fresh)
    recorded_version = archive.results.get("calcdoc_version")
    if recorded_version != __version__ and differences:
        lines.append(f"note: recorded with calcdoc {recorded_version}, verified with "
                     f"{__version__}; the differences below may come from the versions")
    lines.extend(differences)
    return lines


def diff(old: Path, new: Path):
    """Return what changed between two builds (folders or PDFs), as a revision note
    (:class:`calcdoc.changes.Changes`): both are re-evaluated from their archived inputs."""
    from calcdoc.changes import compare_packages
    return compare_packages(archive_package(open_archive(old)),
                            archive_package(open_archive(new)))
