"""Time the demo package's stages: load, evaluate, HTML, PDF; print the figures.

Targets (not enforced by tests): HTML should feel instant (well under 1 s after start-up), the PDF
a few seconds. Run: .venv/bin/python bench/bench_build.py [PROJECT]
"""

from __future__ import annotations

import resource
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


def main() -> None:
    project = Path(sys.argv[1]) if len(sys.argv) > 1 else ROOT / "projects" / "cold-store"
    t = time.perf_counter()
    from calcdoc.build import build  # noqa: E402  (import time is part of what a user waits for)
    from calcdoc.evaluate import evaluate_project
    from calcdoc.project import load_project
    import_time = time.perf_counter() - t

    t = time.perf_counter()
    loaded = load_project(project)
    load_time = time.perf_counter() - t
    t = time.perf_counter()
    evaluate_project(loaded)
    eval_time = time.perf_counter() - t

    with tempfile.TemporaryDirectory() as tmp:
        html = build(project, Path(tmp) / "html", pdf=False)
        full = build(project, Path(tmp) / "full", pdf=True)
        pages = 0
        try:
            from pypdf import PdfReader
            pages = len(PdfReader(str(Path(tmp) / "full" / "package.pdf")).pages)
        except ImportError:
            pass
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"project: {project}")
    print(f"import calcdoc          {import_time:7.3f} s")
    print(f"load                    {load_time:7.3f} s")
    print(f"evaluate                {eval_time:7.3f} s")
    print(f"build --no-pdf (total)  {html.timings['total']:7.3f} s  "
          f"(html {html.timings['html']:.3f} s)")
    print(f"build with PDF (total)  {full.timings['total']:7.3f} s  "
          f"(pdf {full.timings['pdf']:.3f} s, {pages} pages, "
          f"{full.timings['pdf'] / max(pages, 1):.3f} s per page)")
    print(f"peak memory             {peak_mb:7.0f} MB")


if __name__ == "__main__":
    main()
