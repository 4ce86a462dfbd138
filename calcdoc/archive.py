"""results.json, manifest.json, and re-running an archived package: verify and diff."""

from __future__ import annotations

import hashlib
import json
import platform
import shutil
import tempfile
from importlib import metadata
from pathlib import Path

from calcdoc import __version__

__all__ = ["results_document", "manifest_document", "sha256", "verify", "diff", "dumps",
           "FORMAT_VERSION", "LIBRARIES"]

FORMAT_VERSION = 1
LIBRARIES = ("numpy", "scipy", "pint", "jinja2", "markdown", "pyyaml", "weasyprint",
             "matplotlib", "ziamath", "latex2mathml", "nh3")
RELATIVE_TOLERANCE = 1e-9


def dumps(document) -> str:
    """Return JSON text in calcdoc's fixed layout (sorted keys off: the contract's order)."""
    return json.dumps(document, indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def results_document(package) -> dict:
    """Return results.json as FORMAT.md defines it: coherent SI values at full precision."""
    project = package.project
    sheets = []
    for sheet in package.sheets:
        blocks = []
        for block in sheet.blocks:
            out = block.output
            results = {}
            for name, r in out.results.items():
                results[name] = {"si": r.value, "si_unit": r.spec.unit, "display": r.display}
            entry = {
                "id": block.id, "kind": block.kind.name, "title": block.spec.title,
                "results": results,
                "checks": [{"result": c.result, "relation": c.relation, "value_si": c.value_si,
                            "limit_si": c.limit_si, "margin_si": c.margin_si,
                            "utilisation": c.utilisation, "passed": c.passed,
                            "source": c.source, **({"note": c.note} if c.note else {})}
                           for c in block.checks],
                "series": {name: {"x_si": s.x, "x_unit": s.x_unit, "y_si": s.y,
                                  "si_unit": s.y_unit, "label": s.label}
                           for name, s in out.series.items()},
                "warnings": [{"message": w["message"], "source": w["source"]}
                             for w in out.warnings],
            }
            if out.absent:
                entry["not_reached"] = dict(out.absent)
            if out.simulated_until is not None:
                entry["simulated_until"] = out.simulated_until
            blocks.append(entry)
        sheets.append({"id": sheet.id, "title": sheet.spec.title, "blocks": blocks})
    return {"format_version": FORMAT_VERSION, "calcdoc_version": __version__,
            "project": {"number": project.number, "title": project.title,
                        "revision": project.revision.rev},
            "sheets": sheets}


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


def _archived_inputs(path: Path, into: Path) -> dict:
    """Copy the archived inputs of a build folder or a PDF into ``into``; return results.json."""
    if path.is_dir():
        shutil.copytree(path / "inputs", into, dirs_exist_ok=True)
        return json.loads((path / "results.json").read_text(encoding="utf-8"))
    from pypdf import PdfReader
    reader = PdfReader(str(path))
    recorded = None
    for name, contents in reader.attachments.items():
        data = contents[0]
        if name == "results.json":
            recorded = json.loads(data.decode("utf-8"))
            continue
        target = into / name
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(data)
    if recorded is None:
        raise ValueError(f"{path}: no results.json attached (not a calcdoc package)")
    return recorded


def verify(path: Path) -> list[str]:
    """Re-evaluate the archived inputs of a build or PDF; return the differences found."""
    from calcdoc.evaluate import evaluate_project
    from calcdoc.project import load_project
    with tempfile.TemporaryDirectory(prefix="calcdoc-verify-") as tmp:
        root = Path(tmp) / "project"
        root.mkdir()
        recorded = _archived_inputs(path, root)
        package = evaluate_project(load_project(root))
        fresh = results_document(package)
    lines = compare_results(recorded, fresh)
    if recorded.get("calcdoc_version") != __version__:
        lines.insert(0, f"note: recorded with calcdoc {recorded.get('calcdoc_version')}, "
                        f"verified with {__version__}")
        if len(lines) == 1:
            return []
    return lines


def diff(old: Path, new: Path) -> list[str]:
    """Return what changed between two build folders: input files, results and checks."""
    lines = []
    old_manifest = json.loads((old / "manifest.json").read_text(encoding="utf-8"))
    new_manifest = json.loads((new / "manifest.json").read_text(encoding="utf-8"))
    oi, ni = old_manifest["inputs"], new_manifest["inputs"]
    for name in sorted(set(oi) | set(ni)):
        if name not in oi:
            lines.append(f"+ input {name}")
        elif name not in ni:
            lines.append(f"- input {name}")
        elif oi[name] != ni[name]:
            lines.append(f"~ input {name} changed")
    old_results = json.loads((old / "results.json").read_text(encoding="utf-8"))
    new_results = json.loads((new / "results.json").read_text(encoding="utf-8"))
    if old_results["project"].get("revision") != new_results["project"].get("revision"):
        lines.append(f"~ revision: {old_results['project'].get('revision')} → "
                     f"{new_results['project'].get('revision')}")
    lines.extend(compare_results(old_results, new_results))
    return lines
