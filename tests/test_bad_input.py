"""Bad input: a located message asserted word for word, exit status 2, nothing written."""

import textwrap

import pytest

from calcdoc.cli import main
from conftest import PROJECT_YAML, write_project

FORMULA_SHEET = """\
id: F1
title: Formula sheet
blocks:
  - id: load
    kind: formula
    title: Heat loss
    given:
      U: 0.3 W/(m^2*K)
      A: 10 m^2
      dT: 20 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: W}
"""


def run_build(tmp_path, capsys, sheets, project_yaml=PROJECT_YAML, extra=None):
    root = write_project(tmp_path / "proj", sheets, project_yaml, extra)
    out = tmp_path / "out"
    status = main(["build", str(root), "--out", str(out), "--no-pdf"])
    captured = capsys.readouterr()
    assert not out.exists(), "nothing may be written on bad input"
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".out")], "no temp left"
    return status, captured.err.splitlines()


def test_unknown_key_in_a_block__did_you_mean(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace("    title: Heat loss\n", "    titel: Heat loss\n")
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:6:5: error: F1.blocks[0].titel: unknown key 'titel' "
                      "(expected one of id, kind, title, checks, display, notes, given, steps, "
                      "got 'titel'); hint: did you mean 'title'?")


def test_unknown_kind__did_you_mean(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace("kind: formula", "kind: formular")
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert any(line.startswith("proj/sheets/f1.yaml:5:11: error: F1.load.kind: unknown kind "
                               "'formular'") and "did you mean 'formula'?" in line
               for line in err)


def test_yaml_syntax_error_is_located(tmp_path, capsys):
    status, err = run_build(tmp_path, capsys, {"f1": "id: F1\ntitle: [unclosed\nblocks: []\n"})
    assert status == 2
    assert err[0].startswith("proj/sheets/f1.yaml:3:")
    assert "error: not valid YAML" in err[0]


def test_wrong_dimension_in_a_check_limit(tmp_path, capsys):
    sheet = FORMULA_SHEET + "    checks:\n      - {result: Q, at_most: 2 m, source: Limit}\n"
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:14:30: error: F1.load.checks.Q: wrong dimension "
                      "(expected power [W], got length [m] in '2 m')")


def test_check_on_unknown_result(tmp_path, capsys):
    sheet = FORMULA_SHEET + "    checks:\n      - {result: QQ, at_most: 2 W}\n"
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:14:9: error: F1.load.checks.QQ: check on unknown "
                      "result 'QQ' (expected one of Q, got 'QQ'); hint: did you mean 'Q'?")


def test_reference_to_unknown_block(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace("U: 0.3 W/(m^2*K)", "U: {ref: EW1.wall.U}")
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:8:16: error: F1.load.inputs: reference to unknown "
                      "sheet 'EW1' (expected an existing SHEET.block, got 'EW1.wall.U')")


def test_circular_references_name_their_members(tmp_path, capsys):
    a = FORMULA_SHEET.replace("U: 0.3 W/(m^2*K)", "U: {ref: B1.other.R}")
    b = textwrap.dedent("""\
        id: B1
        title: Other
        blocks:
          - id: other
            kind: formula
            given: {x: {ref: F1.load.Q}}
            steps:
              - {name: R, expr: "x / x * 1", unit: "1"}
        """)
    status, err = run_build(tmp_path, capsys, {"f1": a, "b1": b})
    assert status == 2
    assert any("error: B1.other: circular references (expected blocks that do not depend on "
               "themselves, got B1.other → F1.load → B1.other)" in line for line in err)


def test_formula_attribute_access_is_refused(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace('"U * A * dT"', '"U.__class__"')
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:12:25: error: F1.load.inputs.steps[0].expr: attribute "
                      "access is not allowed (expected names, numbers, operators and functions, "
                      "got U.__class__)")


def test_formula_step_unit_mismatch(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace("unit: W}", "unit: m}")
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:12:25: error: F1.load.steps[0] (Q): the expression's unit does "
                      "not match the step's unit (expected length [m] for 'm', got power [W])")


def test_missing_revision_key(tmp_path, capsys):
    project = PROJECT_YAML.replace("purpose: For review, ", "")
    status, err = run_build(tmp_path, capsys, {"f1": FORMULA_SHEET}, project_yaml=project)
    assert status == 2
    assert err[0] == ("proj/project.yaml:4:5: error: revisions[0]: missing key 'purpose' "
                      "(expected 'purpose', got nothing)")


def test_duplicate_block_ids(tmp_path, capsys):
    sheet = FORMULA_SHEET + textwrap.indent(FORMULA_SHEET.split("blocks:\n")[1], "")
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert any("error: F1.load: block id used twice in the sheet" in line for line in err)


def test_every_error_of_a_run_is_reported(tmp_path, capsys):
    sheet = FORMULA_SHEET.replace("    title: Heat loss\n", "    titel: Heat loss\n")
    other = FORMULA_SHEET.replace("id: F1", "id: F2").replace("kind: formula", "kind: nope")
    status, err = run_build(tmp_path, capsys, {"f1": sheet, "f2": other})
    assert status == 2
    assert sum(": error: " in line for line in err) == 2
    assert err[-1] == "calcdoc: 2 errors; nothing written"


def test_bare_number_for_a_dimensional_given_in_a_check(tmp_path, capsys):
    sheet = FORMULA_SHEET + "    checks:\n      - {result: Q, at_most: 300}\n"
    status, err = run_build(tmp_path, capsys, {"f1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/f1.yaml:14:30: error: F1.load.checks.Q: a number without "
                      "a unit (expected power [W], e.g. '1 W', got 300)")


def test_refuses_to_replace_a_folder_it_did_not_build(tmp_path, capsys):
    root = write_project(tmp_path / "proj", {"f1": FORMULA_SHEET})
    out = tmp_path / "precious"
    out.mkdir()
    (out / "drawing.dwg").write_text("not ours")
    status = main(["build", str(root), "--out", str(out), "--no-pdf"])
    err = capsys.readouterr().err
    assert status == 2
    assert (out / "drawing.dwg").read_text() == "not ours"
    assert f"{out}: error: --out: refusing to replace a folder calcdoc did not build" in err


def test_review_comment_on_unknown_block(tmp_path, capsys):
    review = "reviewer: R. R\ncomments:\n  - {on: F1.lod, text: Check, status: open}\n"
    status, err = run_build(tmp_path, capsys, {"f1": FORMULA_SHEET}, extra={"review.yaml": review})
    assert status == 2
    assert err[0] == ("proj/review.yaml:3:5: error: review.comments.on: comment on unknown sheet "
                      "or block 'F1.lod' (expected an existing SHEET or SHEET.block, got 'F1.lod'); "
                      "hint: did you mean 'F1.load'?")


def test_input_needed_only_for_one_configuration_is_named_when_missing(tmp_path, capsys):
    sheet = """\
id: R1
title: Exchange
blocks:
  - id: x
    kind: radiation_exchange
    inputs:
      configuration: general
      temperature_1: 500 degC
      temperature_2: 20 degC
      emissivity_1: 0.9
      emissivity_2: 0.9
      area_1: 1 m^2
      area_2: 4 m^2
"""
    status, err = run_build(tmp_path, capsys, {"r1": sheet})
    assert status == 2
    assert err[0] == ("proj/sheets/r1.yaml:4:5: error: R1.x.inputs: missing input 'view_factor' "
                      "(expected view_factor for configuration general, got nothing)")
