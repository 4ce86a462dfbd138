"""The build: load → evaluate → (final gate) → render site → render PDF → write, in that order.

Everything is written into a temporary folder beside the output folder and swapped in only when
the whole build succeeded. An existing output folder is replaced only when it is empty or carries
calcdoc's marker from an earlier build.
"""

from __future__ import annotations

import os
import shutil
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path

from calcdoc.archive import dumps, manifest_document, results_document
from calcdoc.errors import FinalRefused, InputError, InputErrors, Location
from calcdoc.evaluate import evaluate_project
from calcdoc.model import Package
from calcdoc.project import load_project
from calcdoc.render.html import TEMPLATES, package_view, render_package_html, render_site

__all__ = ["build", "final_refusals", "MARKER", "BuildReport", "check_output_folder"]

MARKER = ".calcdoc-build"


@dataclass
class BuildReport:
    out_dir: Path
    package: Package
    timings: dict[str, float] = field(default_factory=dict)
    files: list[str] = field(default_factory=list)


def _same_person(a: str, b: str) -> bool:
    """Return whether two signatures name the same person ('A. Engineer' = 'a engineer')."""
    def norm(name: str) -> str:
        return "".join(ch for ch in name.casefold() if ch.isalnum())
    return bool(norm(a)) and norm(a) == norm(b)


def final_refusals(package: Package) -> list[str]:
    """Return every reason the package may not be issued as final (empty: it may).

    Final means: the current revision has an approver, every sheet is checked at the current
    revision by someone other than its preparer, every check passes and no review comment is
    open (FORMAT.md, Command line)."""
    project = package.project
    rev = project.revision
    reasons = []
    if not rev.approved.strip():
        reasons.append(f"revision {rev.rev} has no approver (project.yaml revisions: "
                       f"approved is empty)")
    for sheet in package.sheets:
        sign = sheet.spec.signoff
        checked, prepared = sign.get("checked"), sign.get("prepared")
        if prepared is None:
            reasons.append(f"sheet {sheet.id} has no preparer (signoff.prepared)")
        if checked is None:
            reasons.append(f"sheet {sheet.id} is not checked (signoff.checked)")
        else:
            if checked.rev != rev.rev:
                reasons.append(f"sheet {sheet.id} is checked at revision {checked.rev}, "
                               f"not at the current revision {rev.rev}")
            if prepared is not None and _same_person(prepared.by, checked.by):
                reasons.append(f"sheet {sheet.id} is checked by its preparer ({checked.by})")
        for block in sheet.blocks:
            for c in block.checks:
                if not c.passed:
                    relation = "at most" if c.relation == "at_most" else "at least"
                    reasons.append(f"check {block.key}.{c.result} fails: {c.value_display}, "
                                   f"required {relation} {c.limit_display}")
    for n, c in enumerate(project.comments, start=1):
        if c.status == "open":
            reasons.append(f"review comment C{n} on {c.on} is open ({c.loc}): {c.text}")
    return reasons


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
          final: bool = False) -> BuildReport:
    """Build the package; raise InputErrors (bad input) or FinalRefused (--final refused)."""
    timings: dict[str, float] = {}
    t0 = time.perf_counter()
    project_dir = Path(project_dir)
    out = Path(out_dir) if out_dir else Path("build") / project_dir.resolve().name
    check_output_folder(out)

    project = load_project(project_dir)
    timings["load"] = time.perf_counter() - t0
    t = time.perf_counter()
    package = evaluate_project(project)
    timings["evaluate"] = time.perf_counter() - t
    if final:
        reasons = final_refusals(package)
        if reasons:
            raise FinalRefused(reasons)

    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{out.name}.building-", dir=out.parent))
    try:
        t = time.perf_counter()
        inputs = _input_files(project)
        for name, data in inputs.items():
            target = tmp / "inputs" / name
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        results_text = dumps(results_document(package))
        (tmp / "results.json").write_text(results_text, encoding="utf-8")
        render_site(package_view(package, "site"), tmp)
        timings["html"] = time.perf_counter() - t
        if pdf:
            t = time.perf_counter()
            from calcdoc.render.pdf import write_pdf  # WeasyPrint loads only when a PDF is made
            work = tmp / "assets"
            (work / "style.css").write_text((TEMPLATES / "style.css").read_text("utf-8"), "utf-8")
            html = render_package_html(package_view(package, "pdf"))
            attachments = sorted(inputs.items()) + [("results.json", results_text.encode())]
            write_pdf(html, work, tmp / "package.pdf", attachments, project.revision.date,
                      digest_seed=results_text)
            timings["pdf"] = time.perf_counter() - t
        (tmp / MARKER).write_text("calcdoc build folder: calcdoc may replace it on rebuild\n")
        outputs = {str(p.relative_to(tmp)): p.read_bytes() for p in sorted(tmp.rglob("*"))
                   if p.is_file() and p.name != MARKER}
        (tmp / "manifest.json").write_text(dumps(manifest_document(inputs, outputs)),
                                           encoding="utf-8")
        os.chmod(tmp, 0o755)
        _swap_in(tmp, out)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    timings["total"] = time.perf_counter() - t0
    files = sorted(str(p.relative_to(out)) for p in out.rglob("*") if p.is_file())
    return BuildReport(out, package, timings, files)


def _input_files(project) -> dict[str, bytes]:
    root = project.root.resolve()
    return {str(p.resolve().relative_to(root)): p.read_bytes() for p in project.input_files}


def _swap_in(tmp: Path, out: Path) -> None:
    if out.exists():
        old = out.with_name(f".{out.name}.old-{os.getpid()}")
        os.replace(out, old)
        os.replace(tmp, out)
        shutil.rmtree(old, ignore_errors=True)
    else:
        os.replace(tmp, out)
