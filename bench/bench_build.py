"""Time builds of the demo and of generated projects; print ratios measured in this one run.

Every build runs in a fresh Python process (its own memory peak, nothing kept between builds
but the build cache on disk). Reported:

1. the demo: cold full build, warm full rebuild with nothing changed, warm full rebuild after one
   sheet changed (EW1's PIR board thickened, which HG1 refers to), the same for HTML only;
2. generated projects of SIZES sheets (copies of the demo's sheets with new ids, references
   renamed, each copy's layer thicknesses shifted so that its numbers differ, to 216 sheets):
   `calcdoc check` (load and evaluate), cold HTML-only build, time per sheet, peak memory; and
   for the 100-sheet project a warm HTML rebuild after one sheet changed;
3. full builds (with the PDF) of FULL_SIZES sheets: time per sheet and per page.

Generated projects live in a temporary folder and are removed. No targets are enforced here or in
tests (a shared machine is noisy): the ratios are the result. Run:

    .venv/bin/python bench/bench_build.py [--sizes 50,100,200] [--full-sizes 50,100,200]
                                          [--huge] [--skip-demo] [--jobs N]

``--huge`` adds a 1000-sheet HTML-only build.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import platform
import re
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "projects" / "cold-store"
JOBS = 1  # processes typesetting the PDF's parts (--jobs; default: the cores available)

# One build in a process of its own; prints JSON: seconds, stage timings, peak memory.
CHILD = r"""
import json, resource, sys, time
args = json.loads(sys.argv[1])
t = time.perf_counter()
if args["what"] == "check":
    from calcdoc.project import read_project
    from calcdoc.evaluate import evaluate_project
    project, errors = read_project(args["project"])
    evaluate_project(project, errors, None)
    timings = {}
else:
    from calcdoc.build import build
    report = build(args["project"], args["out"], pdf=args["pdf"], cache=args["cache"],
                   jobs=args["jobs"])
    timings = report.timings
pages = 0
if args.get("pdf"):
    from pypdf import PdfReader
    pages = len(PdfReader(args["out"] + "/package.pdf").pages)
# the largest process: this one, or a worker typesetting a part of the PDF
peak = max(resource.getrusage(who).ru_maxrss for who in (resource.RUSAGE_SELF,
                                                         resource.RUSAGE_CHILDREN))
print(json.dumps({"seconds": time.perf_counter() - t, "timings": timings, "pages": pages,
                  "peak_mb": peak / 1024}))
"""


def child(script: str, argv: list[str], what: str, cwd: Path | None = None) -> dict:
    """Run ``script`` in a fresh Python process; return the JSON of its last line of output."""
    env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    done = subprocess.run([sys.executable, "-c", script, *argv], capture_output=True, text=True,
                          env=env, cwd=str(cwd) if cwd else None)
    if done.returncode != 0:
        raise SystemExit(f"{what} failed:\n{done.stderr[-3000:]}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def run(what: str, project: Path, out: Path | None = None, pdf: bool = False,
        cache: bool = True) -> dict:
    args = {"what": what, "project": str(project), "out": str(out) if out else None,
            "pdf": pdf, "cache": cache, "jobs": JOBS}
    return child(CHILD, [json.dumps(args)], f"{what} of {project}", cwd=project.parent)


def demo_sheets() -> list[tuple[str, str]]:
    """The demo's sheets in package order: (file name, text)."""
    text = (DEMO / "project.yaml").read_text(encoding="utf-8")
    names = re.findall(r"^\s+- (sheets/[\w.-]+\.yaml)\s*$", text, flags=re.M)
    return [(Path(n).name, (DEMO / n).read_text(encoding="utf-8")) for n in names]


def generate(folder: Path, count: int) -> Path:
    """Write a project of ``count`` sheets: copies of the demo's sheets, in its order (a sheet
    comes after those it refers to), each copy with new ids and its references renamed."""
    sheets = demo_sheets()
    ids = [re.search(r"^id:\s*(\S+)", t, flags=re.M).group(1) for _, t in sheets]
    pattern = re.compile(r"\b(" + "|".join(map(re.escape, ids)) + r")\b")
    (folder / "sheets").mkdir(parents=True)
    listed = []
    for n in range(count):
        copy, index = divmod(n, len(sheets))
        name, text = sheets[index]
        text = pattern.sub(lambda m: f"{m.group(1)}G{copy}", text)
        if copy:  # numbers of their own (to 24 copies, 216 sheets): layers 1 to 24 mm thicker,
            # so that a copy's formulas are typeset afresh, not found in the memo
            text = re.sub(r"(thickness:\s*)(\d+(?:\.\d+)?)(\s*mm)",
                          lambda m: f"{m.group(1)}{float(m.group(2)) + 1 + (copy - 1) % 24:g}"
                                    f"{m.group(3)}", text)
        target = f"sheets/g{copy}-{name}"
        (folder / target).write_text(text, encoding="utf-8")
        listed.append(target)
    project = (DEMO / "project.yaml").read_text(encoding="utf-8")
    head, rest = project.split("  sheets:\n", 1)
    rest = rest[rest.index("revisions:"):]
    (folder / "project.yaml").write_text(
        head + "  sheets:\n" + "".join(f"    - {s}\n" for s in listed) + rest, encoding="utf-8")
    return folder


def change_first_sheet(project: Path) -> None:
    """Thicken the first EW1 copy's PIR board (the one-sheet change of a warm rebuild)."""
    path = sorted((project / "sheets").glob("g0-ew1.yaml"))[0]
    text = path.read_text(encoding="utf-8")
    path.write_text(re.sub(r"(PIR cavity board, thickness: )(\d+)", lambda m: m.group(1)
                           + str(int(m.group(2)) + 10), text, count=1), encoding="utf-8")


# WeasyPrint alone on the build's own print document (package.html beside package.pdf): the
# yardstick of the PDF stage (issue: the PDF stage at most 0.8 x this).
WEASYPRINT_ALONE = r"""
import json, sys, time
import weasyprint
out, target = sys.argv[1], sys.argv[2]
t = time.perf_counter()
weasyprint.HTML(filename=out + "/package.html", base_url=out + "/").write_pdf(target)
print(json.dumps({"seconds": time.perf_counter() - t}))
"""


def weasyprint_alone(out: Path, target: Path) -> float:
    return child(WEASYPRINT_ALONE, [str(out), str(target)],
                 f"WeasyPrint alone on {out}/package.html")["seconds"]


def line(label: str, seconds: float, extra: str = "") -> None:
    print(f"  {label:<44} {seconds:8.2f} s  {extra}")


def bench_demo(tmp: Path) -> dict:
    print(f"demo ({len(demo_sheets())} sheets), full builds with the PDF")
    project = tmp / "demo"
    shutil.copytree(DEMO, project)
    out = tmp / "demo-out"
    cold = run("build", project, out, pdf=True)
    line("cold full build", cold["seconds"], f"({cold['pages']} pages, "
         f"pdf stage {cold['timings'].get('pdf', 0):.1f} s)")
    alone = weasyprint_alone(out, tmp / "weasyprint-alone.pdf")
    line("WeasyPrint alone on the build's package.html", alone)
    same = run("build", project, out, pdf=True)
    line("warm full rebuild, nothing changed", same["seconds"])
    ew1 = project / "sheets" / "ew1.yaml"
    ew1.write_text(ew1.read_text(encoding="utf-8").replace(
        "PIR cavity board, thickness: 50 mm", "PIR cavity board, thickness: 60 mm"),
        encoding="utf-8")
    one = run("build", project, out, pdf=True)
    line("warm full rebuild, one sheet changed", one["seconds"])
    html_cold = run("build", project, tmp / "demo-html", pdf=False)
    ew1.write_text(ew1.read_text(encoding="utf-8").replace(
        "PIR cavity board, thickness: 60 mm", "PIR cavity board, thickness: 70 mm"),
        encoding="utf-8")
    html_one = run("build", project, tmp / "demo-html", pdf=False)
    line("cold HTML-only build", html_cold["seconds"])
    line("warm HTML-only rebuild, one sheet changed", html_one["seconds"])
    return {"full_cold": cold["seconds"], "full_same": same["seconds"],
            "pdf_stage": cold["timings"].get("pdf", 0.0), "weasyprint_alone": alone,
            "full_one": one["seconds"], "html_cold": html_cold["seconds"],
            "html_one": html_one["seconds"]}


def bench_scale(tmp: Path, sizes: list[int]) -> dict:
    print("generated projects, HTML-only builds (cold: no cache)")
    rows = {}
    for n in sizes:
        project = generate(tmp / f"p{n}", n)
        check = run("check", project)
        cold = run("build", project, tmp / f"p{n}-out", pdf=False)
        rows[n] = {"check": check["seconds"], "html": cold["seconds"],
                   "peak_mb": cold["peak_mb"], "check_peak_mb": check["peak_mb"]}
        line(f"{n} sheets: check", check["seconds"], f"peak {check['peak_mb']:.0f} MB")
        line(f"{n} sheets: cold HTML build", cold["seconds"],
             f"{cold['seconds'] / n:.3f} s per sheet, peak {cold['peak_mb']:.0f} MB")
        if n == 100 or (100 not in sizes and n == sizes[0]):
            change_first_sheet(project)
            warm = run("build", project, tmp / f"p{n}-out", pdf=False)
            rows[n]["html_one"] = warm["seconds"]
            line(f"{n} sheets: warm HTML rebuild, one sheet changed", warm["seconds"],
                 f"peak {warm['peak_mb']:.0f} MB")
        shutil.rmtree(tmp / f"p{n}-out", ignore_errors=True)
    return rows


def bench_full(tmp: Path, sizes: list[int]) -> dict:
    print("generated projects, full builds with the PDF (cold: no cache)")
    rows = {}
    for n in sizes:
        project = tmp / f"p{n}" if (tmp / f"p{n}").is_dir() else generate(tmp / f"p{n}", n)
        full = run("build", project, tmp / f"f{n}-out", pdf=True, cache=False)
        rows[n] = {"full": full["seconds"], "pages": full["pages"], "peak_mb": full["peak_mb"],
                   "pdf": full["timings"].get("pdf", 0.0)}
        line(f"{n} sheets: cold full build", full["seconds"],
             f"{full['seconds'] / n:.2f} s per sheet, {full['pages']} pages, "
             f"peak {full['peak_mb']:.0f} MB")
        shutil.rmtree(tmp / f"f{n}-out", ignore_errors=True)
    return rows


def ratios(demo: dict | None, scale: dict, full: dict) -> None:
    print("ratios (this run)")

    def show(label: str, value: float) -> None:
        print(f"  {label:<64} {value:6.2f}")

    if demo:
        show("demo: PDF stage of the cold build / WeasyPrint alone on package.html",
             demo["pdf_stage"] / demo["weasyprint_alone"])
        show("demo: cold full build - cold HTML build / WeasyPrint alone",
             (demo["full_cold"] - demo["html_cold"]) / demo["weasyprint_alone"])
        show("demo: warm full rebuild, one sheet changed / cold full build",
             demo["full_one"] / demo["full_cold"])
        show("demo: warm full rebuild, nothing changed / cold full build",
             demo["full_same"] / demo["full_cold"])
        show("demo: warm HTML rebuild, one sheet changed / cold HTML build",
             demo["html_one"] / demo["html_cold"])
    for n, row in scale.items():
        if "html_one" in row:
            show(f"{n} sheets: warm HTML rebuild, one sheet changed / cold HTML build",
                 row["html_one"] / row["html"])
        show(f"{n} sheets: cold HTML build / check", row["html"] / row["check"])
    sizes = sorted(scale)
    for a, b in zip(sizes, sizes[1:]):
        show(f"HTML build {b} / {a} sheets (linear: {b / a:.1f})",
             scale[b]["html"] / scale[a]["html"])
        show(f"HTML time per sheet {b} / {a} sheets (flat: 1.0)",
             (scale[b]["html"] / b) / (scale[a]["html"] / a))
        show(f"HTML peak memory {b} / {a} sheets", scale[b]["peak_mb"] / scale[a]["peak_mb"])
    if len(sizes) > 2:  # the smallest to the largest (the 200 / 50, at most 4.4)
        a, b = sizes[0], sizes[-1]
        show(f"HTML build {b} / {a} sheets (linear: {b / a:.1f})",
             scale[b]["html"] / scale[a]["html"])
    fsizes = sorted(full)
    for a, b in zip(fsizes, fsizes[1:]):
        show(f"full build {b} / {a} sheets (linear: {b / a:.1f})", full[b]["full"] / full[a]["full"])
        show(f"full time per sheet {b} / {a} sheets (flat: 1.0)",
             (full[b]["full"] / b) / (full[a]["full"] / a))
        show(f"full peak memory {b} / {a} sheets", full[b]["peak_mb"] / full[a]["peak_mb"])


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--sizes", default="50,100,200",
                        help="sheet counts of the HTML-only builds (default 50,100,200)")
    parser.add_argument("--full-sizes", default="50,100,200",
                        help="sheet counts of the full builds (default 50,100,200; '' none)")
    parser.add_argument("--huge", action="store_true", help="add a 1000-sheet HTML build")
    parser.add_argument("--skip-demo", action="store_true")
    parser.add_argument("--jobs", type=int, default=len(os.sched_getaffinity(0)),
                        help="processes typesetting the PDF's parts, as `calcdoc build --jobs` "
                             "(default: the cores available, as calcdoc build)")
    args = parser.parse_args()
    global JOBS
    JOBS = args.jobs
    sizes = [int(s) for s in args.sizes.split(",") if s] + ([1000] if args.huge else [])
    full_sizes = [int(s) for s in args.full_sizes.split(",") if s]
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python "
          f"{platform.python_version()}; PDF typeset on {JOBS} processes; load average "
          f"{os.getloadavg()[0]:.1f} "
          f"(a shared machine: compare ratios, not seconds)")
    # timed as installed: calcdoc's modules compiled beforehand, as pip does for a wheel (an
    # editable install is not, and with PYTHONDONTWRITEBYTECODE every build would compile them)
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(ROOT / "calcdoc")], check=True)
    started = time.perf_counter()
    with tempfile.TemporaryDirectory(prefix="calcdoc-bench-") as folder:
        tmp = Path(folder)
        demo = None if args.skip_demo else bench_demo(tmp)
        scale = bench_scale(tmp, sizes) if sizes else {}
        full = bench_full(tmp, full_sizes) if full_sizes else {}
    ratios(demo, scale, full)
    print(f"bench time {math.ceil(time.perf_counter() - started)} s")


if __name__ == "__main__":
    main()
