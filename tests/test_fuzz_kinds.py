"""Right or refused, for the newer kinds: the demo sheets IC1, SM1, PW1, SB1, TM1 and TB1 changed
one thing at a time, as a careless or hostile user would (tests/kind_mutations.py), give exit 0
or a located error with exit 2, never a traceback, an internal fault or a hang.

The regression tests name each class of fault the mutations found; the bounded fuzz test at the
end runs a fixed, seeded sample of the mutations (the script runs all of them:
``PYTHONPATH=$PWD python tests/kind_mutations.py``).
"""

from __future__ import annotations

import random
import re
from pathlib import Path

import pytest

from calcdoc.cli import main
from kind_mutations import (DEMO, TARGETS, Mutation, check_in_process, mutations, run_all,
                            write_case)


def run_check(tmp_path, capsys, sheet_id: str, old: str, new: str) -> tuple[int, list[str]]:
    """Check the demo sheet with one text change; return (status, stderr lines) and assert
    that no traceback reached the user and nothing was written."""
    text = (DEMO / "sheets" / TARGETS[sheet_id][0]).read_text()
    assert old in text
    write_case(tmp_path / "p", Mutation(sheet_id, "", text.replace(old, new, 1)))
    before = sorted(tmp_path.rglob("*"))
    status = main(["check", "p"])
    err = capsys.readouterr().err
    assert "Traceback" not in err and "internal error" not in err, err
    assert sorted(tmp_path.rglob("*")) == before
    return status, err.splitlines()


# --- a key written with nothing after it in an exactly-one group --------------------------------

def test_cylindrical_layers__material_null_refused_with_location(tmp_path, capsys):
    # `material:` with no value passed "exactly one of" as present, then left the layer with
    # no conductivity at all (an internal fault, exit 3).
    status, err = run_check(tmp_path, capsys, "SM1", "material: mineral_wool_pipe,",
                            "material: ~,")
    assert status == 2
    assert err == [
        "p/sheets/sm1.yaml:22:11: error: SM1.main.inputs.layers[0]: exactly one of conductivity "
        "| conductivity_curve | material is needed (expected exactly one, got none)",
        "    22 |         - {name: Stone wool, thickness: 50 mm, material: ~, source: Insulation "
        "thickness on drawing…",
        "       |           ^",
        "calcdoc: 1 error; nothing written"]


def test_steel_member_heating__critical_temperature_null_refused_with_location(tmp_path, capsys):
    status, err = run_check(tmp_path, capsys, "SB1",
                            "        value: 585 degC\n        source: \"Beam B2 fire design, "
                            "restrained by the slab, calculation S-15 (example)\"\n", "")
    assert status == 2
    assert err[0] == ("p/sheets/sb1.yaml:18:7: error: SB1.beam: exactly one of "
                      "critical_temperature | utilisation is needed (expected exactly one, got "
                      "none)")


def test_thermal_bridge__region_material_null_refused_with_location(tmp_path, capsys):
    status, err = run_check(tmp_path, capsys, "TB1", "material: concrete_block_dense}",
                            "material: null}")
    assert status == 2
    assert err[0] == (
        "p/sheets/tb1.yaml:22:11: error: TB1.ground.inputs.regions[0]: exactly one of "
        "conductivity | material is needed (expected exactly one, got none)")


def test_interstitial_condensation__material_as_a_list_refused_as_not_a_name(tmp_path, capsys):
    # It was refused as "unknown material 'None'", a name the user never wrote.
    status, err = run_check(tmp_path, capsys, "IC1", "material: gypsum_plasterboard}",
                            "material: [gypsum_plasterboard]}")
    assert status == 2
    assert err[0] == (
        "p/sheets/ic1.yaml:19:62: error: IC1.wall.inputs.layers[0].material: not a material "
        "name (expected a material in the library or materials.yaml, got ['gypsum_plasterboard'])")


# --- a pair of lengths with one element not a number ---------------------------------------------

def test_thermal_bridge__pair_with_nan_length_refused_with_location(tmp_path, capsys):
    # [0, nan mm]: the unit written once was looked for in a text that is no number.
    status, err = run_check(tmp_path, capsys, "TB1", "x: [0, 100 mm], y: [-600, 1165 mm]",
                            "x: [0, nan mm], y: [-600, 1165 mm]")
    assert status == 2
    assert err[0] == (
        "p/sheets/tb1.yaml:22:34: error: TB1.ground.inputs.regions[0].x: a number without a "
        "unit (expected a unit of length [m] such as m, got '0')")


# --- physically impossible inputs that gave a number ------------------------------------------

def test_steel_member_heating__critical_temperature_above_1200_degc_refused_with_range(
        tmp_path, capsys):
    # EN 1993-1-2:2005 §3.4.1.2 gives steel's properties from 20 °C to 1200 °C only; a critical
    # temperature of 2000 °C was "not reached" and its check passed whatever the fire.
    status, err = run_check(tmp_path, capsys, "SB1", "value: 585 degC", "value: 2000 degC")
    assert status == 2
    assert err[:3] == [
        "p/sheets/sb1.yaml:29:16: error: SB1.beam.inputs.critical_temperature: "
        "'critical_temperature' out of range (expected critical_temperature <= 1200.00 °C, got "
        "'2000 degC')",
        "    29 |         value: 2000 degC",
        "       |                ^"]


# --- long lists: refused with the list's location, in seconds ---------------------------------

def test_thermal_bridge__thousands_of_flanking_elements_refused_with_location(tmp_path, capsys):
    # 10 000 flanking elements took minutes (an input looked up by a scan per item) and then
    # failed inside the working; a list input holds at most 1000 items (docs/limits.md).
    many = "".join(f"        - {{name: F{i}, U: {{ref: FW1.wall.U}}, length: 1 m}}\n"
                   for i in range(1001))
    status, err = run_check(tmp_path, capsys, "TB1",
                            "        - {name: FW-1 wall, U: {ref: FW1.wall.U}, length: 1 m}\n",
                            many)
    assert status == 2
    assert err[0] == ("p/sheets/tb1.yaml:66:9: error: TB1.corner.inputs.flanking: 'flanking' "
                      "has too many items (expected at most 1000, got 1002)")


def test_cylindrical_layers__conductivity_curve_of_thousands_of_points_refused_with_location(
        tmp_path, capsys):
    points = ", ".join(f'["{i * 0.1:.1f} degC", "0.04 W/(m*K)"]' for i in range(1001))
    status, err = run_check(tmp_path, capsys, "SM1", "material: mineral_wool_pipe,",
                            f"conductivity_curve: [{points}],")
    assert status == 2
    assert err[0].startswith("p/sheets/sm1.yaml:22:68: error: SM1.main.inputs.layers[0]."
                             "conductivity_curve: too many points (expected at most 1000, got "
                             "1001)")


def test_thermal_bridge__flanking_sum_too_long_to_print_refused_with_location(tmp_path, capsys):
    # 200 flanking elements: ψ = L2D − (H_1 + … + H_200) is longer than an expression may be;
    # it was an internal fault (exit 3), it is a refusal at the block.
    many = "".join(f"        - {{name: F{i}, U: {{ref: FW1.wall.U}}, length: 1 m}}\n"
                   for i in range(199))
    status, err = run_check(tmp_path, capsys, "TB1",
                            "        - {name: FW-1 wall, U: {ref: FW1.wall.U}, length: 1 m}\n",
                            many)
    assert status == 2
    assert err[0] == (
        "p/sheets/tb1.yaml:45:5: error: TB1.corner: too many items for the working to be "
        "printed (expected an expression of at most 500 characters (split it into steps), got "
        "1498 characters); hint: split the block, or give its lists fewer items")


# --- the bounded fuzz -----------------------------------------------------------------------------

def sample() -> list[Mutation]:
    """A fixed, seeded sample of every sheet's mutations: the kind-specific ones weighted up,
    the 10 000-item lists left to the script (seconds each), few thermal-bridge solves."""
    rng = random.Random(20261203)
    chosen = []
    for sheet, n in (("IC1", 12), ("SM1", 12), ("PW1", 10), ("SB1", 12), ("TM1", 12),
                     ("TB1", 8)):
        cases = [m for m in mutations(sheet, big=False) if "sliver" not in m.name and
                 "1 µm" not in m.name]
        chosen += rng.sample(cases, n)
    return chosen


def test_fuzz_newer_kinds__mutated_demo_sheets_answered_and_located():
    cases = sample()
    for sheet in TARGETS:  # imports and caches once, before each case is forked
        check_in_process(next(m for m in cases if m.sheet == sheet))
    bad = []
    for outcome in run_all(cases, jobs=2, timeout=60):
        if outcome.verdict != "ok":
            bad.append(f"{outcome.verdict} {outcome.mutation.sheet} {outcome.mutation.name}: "
                       f"{outcome.stderr[:300]}")
    assert not bad, "\n".join(bad)
