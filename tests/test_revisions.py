"""Revision notes and revision marks: what changed between two issues, as an engineer writes it.

`calcdoc diff` drafts the note from two builds (folders or PDFs); `build --previous` marks in the
new package every input, result and check that changed, with the current revision in the
margin, and lists the changes under the current revision on the cover. Common practice on
drawings and calculation packages: a revision is identified where it changed and nowhere else.
"""

from __future__ import annotations

import json
import re

from calcdoc.cli import main
from conftest import write_project

PROJECT = """\
project: {number: "T-301", title: Test store, organisation: Test engineers}
package: {number: TP-3, title: Test package}
revisions:
  - {rev: P1, date: 2026-11-10, purpose: For review}
"""

# 0.25 W/(m²·K) × 100 m² × 20 K = 500 W; with 150 m², 750 W (hand calculation)
SHEET = """\
id: F1
title: Fabric loss
blocks:
  - id: loss
    kind: formula
    given:
      U: {value: 0.25 W/(m^2*K), source: Wall type schedule (example)}
      A: {value: 100 m^2, source: Drawing A-101 (example)}
      dT: {value: 20 K, source: Design temperatures (example)}
    steps:
      - {name: Q, expr: "U * A * dT", unit: W, label: Fabric loss}
    checks:
      - {result: Q, at_most: 600 W, source: Heater capacity (example)}
"""


def two_revisions(tmp_path, pdf: bool = False):
    root = write_project(tmp_path / "proj", {"f1": SHEET}, PROJECT)
    flags = [] if pdf else ["--no-pdf"]
    assert main(["build", "proj", "--out", "p1", *flags]) == 0
    (root / "sheets" / "f1.yaml").write_text(SHEET.replace("100 m^2", "150 m^2"))
    (root / "project.yaml").write_text(PROJECT + "  - {rev: P2, date: 2026-12-01, purpose: "
                                                 "Larger wall}\n")
    return root


def test_build_previous_marks_what_changed_and_only_that(tmp_path, capsys):
    two_revisions(tmp_path)
    assert main(["build", "proj", "--out", "p2", "--no-pdf", "--previous", "p1"]) == 0
    page = (tmp_path / "p2" / "sheet-F1.html").read_text("utf-8")
    marked = re.findall(r'<tr class="[^"]*changed[^"]*">\s*<td><span class="rev-mark">P2</span>'
                        r'([^<]*)', page)
    assert [m.strip() for m in marked] == ["A"], "the wall area changed; U and dT did not"
    assert re.search(r'class="name[^"]* changed" id="F1.loss.Q"><span class="rev-mark">P2',
                     page), "the result it changes is marked"
    assert re.search(r'<tr id="F1.loss.Q.check" class="failed changed">', page), \
        "the check that now fails is marked"
    index = (tmp_path / "p2" / "index.html").read_text("utf-8")
    assert "Changes in P2</strong> since P1" in index
    assert "F1.loss A: 100 m^2 → 150 m^2" in index
    assert "F1.loss.Q: 500 W → 750 W (+50 %)" in index
    assert "check F1.loss.Q at most 600 W: passed → FAILS" in index


def test_diff_of_two_pdfs_drafts_the_revision_note(tmp_path, capsys):
    two_revisions(tmp_path, pdf=True)
    assert main(["build", "proj", "--out", "p2"]) == 0
    capsys.readouterr()
    assert main(["diff", "p1/package.pdf", "p2/package.pdf"]) == 1
    assert capsys.readouterr().out.splitlines() == [
        "Revision P1 → P2", "Inputs", "  F1.loss A: 100 m^2 → 150 m^2",
        "Results", "  F1.loss.Q: 500 W → 750 W (+50 %)",
        "Checks", "  check F1.loss.Q at most 600 W: passed → FAILS"]
    assert main(["diff", "p1", "p2", "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert (doc["old_revision"], doc["new_revision"]) == ("P1", "P2")
    assert [c["key"] for c in doc["inputs"]] == ["F1.loss.given.A"]
