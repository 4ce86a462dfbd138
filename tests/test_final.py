"""`calcdoc build --final`: a package is issued as final only when it is fit to sign.

The rule (docs/format.md, Command line) is the trade's sign-off practice: the current revision has an
approver, every sheet is checked at that revision by someone other than its preparer (common
practice: a calculation is never checked by its author), every check passes and no review comment
is open. A refusal exits 1, lists every reason at once and writes nothing.
"""

from __future__ import annotations

import textwrap
from pathlib import Path

import pytest

from calcdoc.cli import main

PROJECT = """\
project: {{number: "T-101", title: Test store, client: Test client, site: Test site,
           organisation: Test engineers}}
package: {{number: TP-9, title: Test package}}
revisions:
  - {{rev: P1, date: 2026-11-10, purpose: For review, by: AE, checked: BC, approved: ""}}
  - {{rev: C1, date: 2026-12-01, purpose: For construction, by: AE, checked: BC,
     approved: "{approver}"}}
"""

# A worked formula whose numbers anyone can check by hand: 0.25 W/(m²·K) × 100 m² × 20 K = 500 W.
SHEET = """\
id: {id}
title: Wall {id} heat loss
signoff:
  prepared: {{by: {prepared}, date: 2026-11-20, rev: C1}}
{checked}
blocks:
  - id: loss
    kind: formula
    title: Fabric heat loss
    given:
      U: {{value: 0.25 W/(m^2*K), source: Wall type schedule (example)}}
      A: {{value: 100 m^2, source: Drawing A-101 (example)}}
      dT: {{value: 20 K, assumption: Design difference for the sizing (example)}}
    steps:
      - {{name: Q, expr: "U * A * dT", unit: W, label: Heat loss}}
    checks:
      - {{result: Q, at_most: {limit}, source: Plant allowance (example)}}
"""


def write(root: Path, approver: str, sheets: list[dict], review: str | None = None) -> Path:
    """Write a project folder: ``sheets`` give id, prepared, checked line and check limit."""
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT.format(approver=approver))
    for s in sheets:
        (root / "sheets" / f"{s['id'].lower()}.yaml").write_text(SHEET.format(**s))
    if review is not None:
        (root / "review.yaml").write_text(textwrap.dedent(review))
    return root


def checked(by: str, rev: str = "C1") -> str:
    return f"  checked: {{by: {by}, date: 2026-11-24, rev: {rev}}}"


def good_sheet(sheet_id: str) -> dict:
    return {"id": sheet_id, "prepared": "A. Engineer", "checked": checked("B. Checker"),
            "limit": "600 W"}


def test_final_refuses_listing_every_reason_and_writes_nothing(tmp_path, capsys):
    project = write(tmp_path / "proj", approver="", sheets=[
        good_sheet("W1"),
        # checked at an earlier revision than the current one
        {"id": "W2", "prepared": "A. Engineer", "checked": checked("B. Checker", rev="P1"),
         "limit": "600 W"},
        # checked by its own preparer (written differently: same person)
        {"id": "W3", "prepared": "A. Engineer", "checked": checked("a engineer"),
         "limit": "600 W"},
        # never checked
        {"id": "W4", "prepared": "A. Engineer", "checked": "", "limit": "600 W"},
        # 500 W against a 400 W allowance: the check fails
        {"id": "W5", "prepared": "A. Engineer", "checked": checked("B. Checker"),
         "limit": "400 W"},
    ], review="""\
        reviewer: R. Reviewer
        comments:
          - {on: W1.loss, by: RR, date: 2026-11-26, text: Confirm the wall area, status: open,
             response: ""}
          - {on: W2, by: RR, date: 2026-11-26, text: Typo in title, status: closed,
             response: Fixed}
        """)
    out = tmp_path / "out"
    code = main(["build", str(project), "--out", str(out), "--no-pdf", "--final"])
    err = capsys.readouterr().err
    assert code == 1
    assert "--final refused" in err
    reasons = [line.strip()[2:] for line in err.splitlines() if line.strip().startswith("- ")]
    assert len(reasons) == 6, err
    assert any("revision C1 has no approver" in r for r in reasons)
    assert any("sheet W2 is checked at revision P1, not at the current revision C1" in r
               for r in reasons)
    assert any("sheet W3 is checked by its preparer" in r for r in reasons)
    assert any("sheet W4 is not checked" in r for r in reasons)
    assert any("check W5.loss.Q fails" in r and "400 W" in r for r in reasons)
    assert any("review comment C1 on W1.loss is open" in r and "Confirm the wall area" in r
               for r in reasons)
    assert not any("W2" in r and "Typo" in r for r in reasons), "a closed comment is no reason"
    assert not out.exists(), "a refused --final build writes nothing"


def test_final_builds_when_approved_checked_passing_and_no_comment_open(tmp_path, capsys):
    project = write(tmp_path / "proj", approver="C. Approver",
                    sheets=[good_sheet("W1"), good_sheet("W2")], review="""\
        reviewer: R. Reviewer
        comments:
          - {on: W1.loss, by: RR, date: 2026-11-26, text: Confirm the wall area,
             status: answered, response: Checked against A-101}
          - {on: W2, by: RR, date: 2026-11-26, text: Typo in title, status: closed,
             response: Fixed}
        """)
    out = tmp_path / "out"
    code = main(["build", str(project), "--out", str(out), "--no-pdf", "--final"])
    assert code == 0, capsys.readouterr().err
    index = (out / "index.html").read_text(encoding="utf-8")
    assert "PRELIMINARY" not in index
    assert "approved by C. Approver at revision C1" in index


def test_without_final_an_unapproved_package_builds_marked_preliminary(tmp_path, capsys):
    project = write(tmp_path / "proj", approver="", sheets=[good_sheet("W1")])
    out = tmp_path / "out"
    code = main(["build", str(project), "--out", str(out), "--no-pdf"])
    assert code == 0, capsys.readouterr().err
    assert "PRELIMINARY — NOT FOR CONSTRUCTION" in (out / "index.html").read_text("utf-8")


@pytest.mark.parametrize("approver", ["", "   "])
def test_final_treats_a_blank_approver_as_none(tmp_path, capsys, approver):
    project = write(tmp_path / "proj", approver=approver, sheets=[good_sheet("W1")])
    code = main(["build", str(project), "--out", str(tmp_path / "out"), "--no-pdf",
                 "--final"])
    err = capsys.readouterr().err
    assert code == 1
    assert "revision C1 has no approver" in err


def test_same_person_written_two_ways__same_state_on_site_pdf_and_final(tmp_path, capsys):
    # 'A. Engineer' prepared and 'a engineer' checked: one person (common practice: initials,
    # case and stops do not make a second checker). The site, the PDF's view and --final all
    # take the state from calcdoc.render.status, so they say the same.
    from calcdoc.evaluate import evaluate_folder
    from calcdoc.render.html import package_view
    project = write(tmp_path / "proj", approver="C. Approver", sheets=[
        {"id": "W3", "prepared": "A. Engineer", "checked": checked("a engineer"),
         "limit": "600 W"}])
    package = evaluate_folder(project)
    site, pdf = package_view(package, "site"), package_view(package, "pdf")
    assert site["sheets"][0]["signoff_state"] == "checked by its preparer"
    assert pdf["sheets"][0]["signoff_state"] == "checked by its preparer"
    assert not site["sheets"][0]["signed_off"] and not pdf["sheets"][0]["signed_off"]
    out = tmp_path / "out"
    assert main(["build", str(project), "--out", str(out), "--no-pdf"]) == 0
    assert "checked by its preparer" in (out / "index.html").read_text("utf-8")
    code = main(["build", str(project), "--out", str(tmp_path / "final"), "--no-pdf", "--final"])
    assert code == 1
    assert "sheet W3 is checked by its preparer (a engineer)" in capsys.readouterr().err


WALL_SHEET = """\
id: W9
title: Wall W9 transmittance
signoff:
  prepared: {by: A. Engineer, date: 2026-11-20, rev: C1}
  checked: {by: B. Checker, date: 2026-11-24, rev: C1}
blocks:
  - id: wall
    kind: layered_wall
    title: Wall U-value
    inputs:
      layers:
        - {name: Insulation, thickness: 100 mm, material: mineral_wool, source: Detail 1 (example)}
      inside_temperature: {value: 20 degC, source: Brief (example)}
      outside_temperature: {value: -3 degC, assumption: Winter design value (example)}
"""

CONFIRMED = """\
confirmations:
  - {value: materials.mineral_wool.conductivity, by: B. Checker, date: 2026-11-30,
     against: "Manufacturer's declaration of performance DoP-123 (example)"}
  - {value: "ISO 13788:2012 R_si 0.25", by: B. Checker, date: 2026-11-30,
     against: "ISO 13788:2012 as printed"}
  - {value: "ISO 6946:2017 6.7.1", by: B. Checker, date: 2026-11-30,
     against: "ISO 6946:2017 as printed"}
  - {value: "ISO 6946:2017 Annex F", by: B. Checker, date: 2026-11-30,
     against: "ISO 6946:2017 as printed"}
"""


def test_final_refuses_an_unconfirmed_library_value_and_accepts_it_once_confirmed(tmp_path,
                                                                                  capsys):
    # A library value recalled rather than read from its printed source may not go into an
    # issued package unnamed: --final lists it; the project confirms it against a document.
    root = tmp_path / "proj"
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT.format(approver="C. Approver"))
    (root / "sheets" / "w9.yaml").write_text(WALL_SHEET)
    assert main(["build", str(root), "--out", str(tmp_path / "out"), "--no-pdf", "--final"]) == 1
    err = capsys.readouterr().err
    assert ("value materials.mineral_wool.conductivity (Mineral wool batt: conductivity) is not "
            "confirmed against its printed source (Typical declared value of EN 13162 mineral "
            "wool batts): confirm it in project.yaml confirmations, or give the project's own "
            "value with its source") in err
    assert "value ISO 13788:2012 R_si 0.25 (R_si = 0.25 m²·K/W for surface humidity and mould)" \
        in err
    assert not (tmp_path / "out").exists()
    (root / "project.yaml").write_text(PROJECT.format(approver="C. Approver") + CONFIRMED)
    assert main(["build", str(root), "--out", str(tmp_path / "out"), "--no-pdf", "--final"]) == 0
    import html
    index = html.unescape((tmp_path / "out" / "index.html").read_text("utf-8"))
    section = index[index.index('id="values-to-confirm"'):index.index('id="references"')]
    assert "Every library value used is confirmed" in section
    assert "Manufacturer's declaration of performance DoP-123 (example)" in section


def test_a_confirmation_of_a_value_not_used_is_a_located_error(tmp_path, capsys):
    root = tmp_path / "proj"
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT.format(approver="") + CONFIRMED.replace(
        "materials.mineral_wool.conductivity", "materials.mineral_wol.conductivity"))
    (root / "sheets" / "w9.yaml").write_text(WALL_SHEET)
    assert main(["check", str(root)]) == 2
    err = capsys.readouterr().err
    assert "proj/project.yaml:9:5: error: confirmations.value: confirms a value the package " \
           "does not use or that needs no confirmation" in err
    assert "hint: did you mean 'materials.mineral_wool.conductivity'?" in err


def test_final_refuses_an_input_without_source_and_signatures_out_of_order(tmp_path, capsys):
    # An issued package states where every number comes from, or that it is the engineer's
    # own assumption; and a sheet is not checked before it was prepared (common practice).
    sheet = SHEET.format(id="W1", prepared="A. Engineer",
                         checked="  checked: {by: B. Checker, date: 2026-11-19, rev: C1}",
                         limit="600 W").replace(
        "U: {value: 0.25 W/(m^2*K), source: Wall type schedule (example)}",
        "U: 0.25 W/(m^2*K)")
    root = tmp_path / "proj"
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT.format(approver="C. Approver"))
    (root / "sheets" / "w1.yaml").write_text(sheet)
    assert main(["build", str(root), "--out", str(tmp_path / "out"), "--no-pdf", "--final"]) == 1
    reasons = [line.strip()[2:] for line in capsys.readouterr().err.splitlines()
               if line.strip().startswith("- ")]
    assert reasons == [
        "sheet W1 is checked (2026-11-19) before it was prepared (2026-11-20)",
        "sheet W1: input W1.loss.given.U (0.25 W/(m^2*K)) has no source: write {value, source},"
        " or {value, assumption} for the engineer's own assumption "
        "(proj/sheets/w1.yaml:11:10)"]
    assert not (tmp_path / "out").exists()


def test_an_assumption_is_printed_as_one(tmp_path, capsys):
    root = write(tmp_path / "proj", approver="", sheets=[good_sheet("W1")])
    assert main(["build", str(root), "--out", str(tmp_path / "out"), "--no-pdf"]) == 0
    page = (tmp_path / "out" / "sheet-W1.html").read_text("utf-8")
    assert "Assumption: Design difference for the sizing (example)" in page
