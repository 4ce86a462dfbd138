"""timber_member_fire (docs/format.md): EN 1995-1-2:2004 reduced cross-section method for a
rectangular member in the standard fire, recorded as steps a checker re-does; the tables' values
as values to confirm; the time to failure from the root solve; located errors word for word;
figures as data.

Check values: βn of Table 3.1, k_fi of Table 2.1, k0 of Table 4.1 and d0 = 7 mm of §4.2.2 (all
from memory, as in tests/test_physics_timber.py), and the hand calculations of that file, written
out again beside the assertions.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from test_hostile import run
from test_kinds_fire import redo_all, steps_of

from calcdoc.data import Box, FigureData
from calcdoc.kinds import get_kind
from calcdoc.provenance import values_to_confirm
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill

MIN = 60.0
DEMO_SHEETS = Path(__file__).resolve().parents[1] / "projects" / "cold-store" / "sheets"


def timber_sheet(inputs: str, checks: str = "") -> dict:
    return {"tm1": f"""\
id: TM1
title: Timber sheet
blocks:
  - id: beam
    kind: timber_member_fire
    inputs:
{inputs}
{checks}"""}


GLULAM = """\
      width: 200 mm
      depth: 600 mm
      timber: glulam_softwood
      exposure: three_sided
      duration: 60 min
      characteristic_bending_strength: 24 N/mm^2
      design_moment: 100 kN*m"""


def results_of(block) -> dict:
    return {name: r.value for name, r in block.output.results.items()}


# --- the method against hand calculations -----------------------------------------------------

def test_glulam_200x600_three_sided_60_min__every_step_by_hand(evaluate):
    block = evaluate(timber_sheet(GLULAM)).block("TM1.beam")
    # GL24h 200 x 600 mm, three sides, 60 min (EN 1995-1-2:2004 §4.2.2):
    #   βn = 0.7 mm/min (Table 3.1, glulam softwood); k_fi = 1.15 (Table 2.1, glulam)
    #   d_char,n = 0.7 x 60 = 42 mm; k0 = 1 (t >= 20 min); d_ef = 42 + 7 = 49 mm
    #   b_ef = 200 - 98 = 102 mm; h_ef = 600 - 49 = 551 mm
    #   W_ef = 102 x 551² / 6 = 5 161 217 mm³; f_m,d,fi = 1.0 x 1.15 x 24 / 1.0 = 27.6 N/mm²
    #   M_Rd,fi = 5 161 217 x 27.6 = 142.450 kN·m; utilisation 100 / 142.450 = 0.7020
    results = results_of(block)
    assert results["charring_depth"] == pytest.approx(0.042, abs=1e-9)
    assert results["effective_charring_depth"] == pytest.approx(0.049, abs=1e-9)
    assert results["residual_width"] == pytest.approx(0.102, abs=1e-9)
    assert results["residual_depth"] == pytest.approx(0.551, abs=1e-9)
    assert results["section_modulus"] == pytest.approx(5_161_217e-9, rel=1e-6)
    assert results["bending_resistance"] == pytest.approx(142.450e3, abs=1.0)
    assert results["utilisation"] == pytest.approx(0.7020, abs=1e-4)
    steps = steps_of(block)
    assert steps["beta_n"].expr is None and steps["beta_n"].result.si == pytest.approx(
        0.7e-3 / 60)
    assert steps["k_fi"].expr is None and steps["k_fi"].result.si == 1.15
    assert steps["k_0"].expr is None and steps["k_0"].result.si == 1.0
    assert steps["d_char_n"].expr == "beta_n * t"
    assert steps["d_ef"].expr == "d_char_n + k_0 * d_0"
    assert steps["b_ef"].expr == "b - 2 * d_ef" and steps["h_ef"].expr == "h - d_ef"
    assert steps["W_ef"].expr == "b_ef * h_ef ** 2 / 6"
    assert steps["f_m_d_fi"].expr == "k_mod_fi * k_fi * f_m_k / gamma_M_fi"
    assert steps["f_m_d_fi"].result.si == pytest.approx(27.6e6, rel=1e-12)
    assert steps["M_Rd_fi"].expr == "W_ef * f_m_d_fi"
    assert steps["mu_fi"].yields == "utilisation"
    # The table values enter the working in full, as the tables print them.
    printed = {p.name: p for p in block.printed_steps(3)}
    assert printed["d_char_n"].values["beta_n"].text == "0.7 mm/min"
    assert printed["d_char_n"].values["t"].text == "60 min"
    assert printed["M_Rd_fi"].result.text == "142 kN·m"
    assert redo_all(block) == []


def test_solid_softwood_100x200_four_sided_30_min__hand_calculation(evaluate):
    block = evaluate(timber_sheet("""\
      width: 100 mm
      depth: 200 mm
      timber: solid_softwood
      exposure: four_sided
      duration: 30 min
      characteristic_bending_strength: 24 N/mm^2""")).block("TM1.beam")
    # C24 (f_m,k = 24 N/mm², EN 338, common practice), βn = 0.8 mm/min, k_fi = 1.25:
    #   d_ef = 24 + 7 = 31 mm; b_ef = 38 mm; h_ef = 200 - 62 = 138 mm
    #   W_ef = 38 x 138² / 6 = 120 612 mm³; M_Rd,fi = 120 612 x 30 = 3.61836 kN·m
    results = results_of(block)
    assert (results["residual_width"], results["residual_depth"]) == pytest.approx(
        (0.038, 0.138), abs=1e-9)
    assert results["bending_resistance"] == pytest.approx(3618.36, abs=0.01)
    assert steps_of(block)["h_ef"].expr == "h - 2 * d_ef"
    # No design moment: no utilisation and no time to failure, and nothing said about them.
    assert "utilisation" not in results and "time_to_failure" not in results
    assert not block.output.absent
    assert redo_all(block) == []


def test_10_min__k0_ramp_of_table_4_1_as_a_step(evaluate):
    block = evaluate(timber_sheet(GLULAM.replace("60 min", "10 min"))).block("TM1.beam")
    # t = 10 min < 20 min: k0 = 10/20 = 0.5 (Table 4.1); d_ef = 7 + 0.5 x 7 = 10.5 mm;
    # b_ef = 179 mm, h_ef = 589.5 mm; M_Rd,fi = 179 x 589.5² / 6 x 27.6 = 286.140 kN·m
    steps = steps_of(block)
    assert steps["k_0"].expr == "t / t_20" and steps["k_0"].result.si == pytest.approx(0.5)
    assert results_of(block)["effective_charring_depth"] == pytest.approx(0.0105, abs=1e-9)
    assert results_of(block)["bending_resistance"] == pytest.approx(286.140e3, abs=1.0)
    assert redo_all(block) == []


def test_given_charring_rate_and_k_fi__used_as_stated(evaluate):
    block = evaluate(timber_sheet(GLULAM.replace(
        "timber: glulam_softwood",
        "notional_charring_rate: {value: 0.65 mm/min, source: Product assessment (example)}\n"
        "      k_fi: 1.25"))).block("TM1.beam")
    # d_char,n = 0.65 x 60 = 39 mm; d_ef = 46 mm; b_ef = 108 mm, h_ef = 554 mm
    # W_ef = 108 x 554² / 6 = 5 524 488 mm³; f = 1.25 x 24 = 30 N/mm² -> 165.735 kN·m
    steps = steps_of(block)
    assert "beta_n" not in steps and "k_fi" not in steps
    assert steps["d_char_n"].operands["beta_n"].written == "0.65 mm/min"
    assert results_of(block)["charring_depth"] == pytest.approx(0.039, abs=1e-9)
    assert results_of(block)["bending_resistance"] == pytest.approx(165.735e3, abs=1.0)
    assert redo_all(block) == []


# --- time to failure ----------------------------------------------------------------------------

def test_time_to_failure__60_min_for_the_resistance_at_60_min(evaluate):
    block = evaluate(timber_sheet(GLULAM.replace("60 min", "120 min").replace(
        "100 kN*m", "142.450 kN*m"))).block("TM1.beam")
    # M_Rd,fi(60 min) = 142.450 kN·m (hand calculation above): the member fails at 60 min.
    assert results_of(block)["time_to_failure"] == pytest.approx(60 * MIN, abs=0.5)
    step = steps_of(block)["t_fail"]
    assert step.expr is None and step.yields == "time_to_failure"
    assert "Brent's method" in str(step.statement)
    assert block.output.simulated_until == 120 * MIN


def test_time_to_failure__beyond_the_duration_is_absent_and_an_at_least_check_passes(evaluate):
    package = evaluate(timber_sheet(GLULAM.replace("60 min", "30 min").replace(
        "100 kN*m", "50 kN*m"),
        "    checks:\n      - {result: time_to_failure, at_least: 30 min, source: R 30}"))
    block = package.block("TM1.beam")
    assert "time_to_failure" not in block.output.results
    assert fill(block.output.absent["time_to_failure"], 3) == "not reached in 30.0 min"
    assert block.checks[0].passed


def test_burnt_through__no_section_no_utilisation_and_failure_within_the_duration(evaluate):
    block = evaluate(timber_sheet("""\
      width: 90 mm
      depth: 200 mm
      timber: solid_softwood
      exposure: four_sided
      duration: 60 min
      characteristic_bending_strength: 24 N/mm^2
      design_moment: 1 kN*m""")).block("TM1.beam")
    # d_ef = 48 + 7 = 55 mm > b/2 = 45 mm: burnt through before 60 min.
    results = results_of(block)
    assert results["residual_width"] == 0.0 and results["bending_resistance"] == 0.0
    assert steps_of(block)["b_ef"].expr is None and steps_of(block)["W_ef"].expr is None
    assert "utilisation" not in results and "burnt through" in fill(
        block.output.absent["utilisation"], 3)
    assert 0.0 < results["time_to_failure"] < 60 * MIN
    assert redo_all(block) == []


# --- values to confirm, notes, caution -----------------------------------------------------------

def test_table_values__listed_as_values_to_confirm(evaluate):
    package = evaluate(timber_sheet(GLULAM))
    found = {item.key: item.what for item in values_to_confirm(package)}
    assert found["EN 1995-1-2:2004 Table 3.1 glulam_softwood"] == (
        "βn = 0.7 mm/min for glued laminated softwood, ρk ≥ 290 kg/m³")
    assert found["EN 1995-1-2:2004 Table 2.1 glulam_softwood"] == (
        "k_fi = 1.15 for glued laminated timber")
    assert "EN 1995-1-2:2004 §4.2.2 d0 and Table 4.1 k0" in found
    assert "EN 1995-1-2:2004 k_mod,fi and γM,fi" in found


def test_timber_kind__prints_the_caution_and_the_stability_warning(evaluate):
    # DESIGN.md, Safety: every fire result carries the caution.
    caution = get_kind("timber_member_fire").caution
    assert "does not replace" in caution and "licensed engineer" in caution
    block = evaluate(timber_sheet(GLULAM)).block("TM1.beam")
    assert any("lateral-torsional" in str(w["text"]) for w in block.output.warnings)


# --- figures as data ------------------------------------------------------------------------------

def test_figures__residual_section_to_scale_and_resistance_with_the_design_moment(evaluate):
    block = evaluate(timber_sheet(GLULAM.replace("60 min", "120 min"))).block("TM1.beam")
    section, resistance = block.output.figures
    assert isinstance(section, FigureData) and section.equal_aspect
    # original 200 x 600; char line at 0.7 x 120 = 84 mm; d_ef = 91 mm; top face protected
    assert section.boxes[0] == Box(0.0, 0.0, 0.2, 0.6, "", 1)
    assert section.boxes[1] == Box(pytest.approx(0.084), pytest.approx(0.084),
                                   pytest.approx(0.116), 0.6, "", 2)
    residual = section.boxes[2]
    assert (residual.x0, residual.y0, residual.x1, residual.y1) == pytest.approx(
        (0.091, 0.091, 0.109, 0.6))
    assert [m.at for m in section.marks] == [0.6]
    assert [(m.axis, m.at) for m in resistance.marks] == [("y", 100e3)]
    assert resistance.points and resistance.points[0].y == 100e3
    assert resistance.lines[0].y[0] == pytest.approx(331.2e3, rel=1e-9)  # 200 x 600² / 6 x 27.6
    drawn = draw(section)
    assert drawn.half and drawn.svg.startswith("<svg")
    assert "residual section 18.0 mm × 509 mm" in drawn.caption
    drawn = draw(resistance)
    assert drawn.half and "design moment" in drawn.svg


# --- errors, word for word --------------------------------------------------------------------------

@pytest.mark.parametrize("inputs, message", [
    (GLULAM + "\n      notional_charring_rate: 0.7 mm/min",
     "proj/sheets/tm1.yaml:7:7: error: TM1.beam: exactly one of timber | notional_charring_rate "
     "is needed (expected exactly one, got timber, notional_charring_rate)"),
    (GLULAM + "\n      k_fi: 1.15",
     "proj/sheets/tm1.yaml:14:13: error: TM1.beam.inputs.k_fi: input 'k_fi' applies only with "
     "notional_charring_rate (expected k_fi from Table 2.1 for the timber given (or "
     "notional_charring_rate with k_fi in place of timber), got '1.15')"),
    (GLULAM.replace("timber: glulam_softwood", "notional_charring_rate: 0.65 mm/min"),
     "proj/sheets/tm1.yaml:4:5: error: TM1.beam.inputs: missing input 'k_fi' (expected k_fi of "
     "EN 1995-1-2:2004 Table 2.1 with notional_charring_rate, got nothing)"),
    (GLULAM.replace("glulam_softwood", "glulam"),
     "proj/sheets/tm1.yaml:9:15: error: TM1.beam.inputs.timber: 'timber' is not one of the "
     "choices (expected solid_softwood | glulam_softwood | hardwood | hardwood_dense | lvl, got "
     "'glulam')"),
    (GLULAM.replace("100 kN*m", "100 kN"),
     "proj/sheets/tm1.yaml:13:22: error: TM1.beam.inputs.design_moment: wrong dimension "
     "(expected energy or moment [J], got unit kg·m/s² in '100 kN')"),
    (GLULAM.replace("three_sided", "three sides"),
     "proj/sheets/tm1.yaml:10:17: error: TM1.beam.inputs.exposure: 'exposure' is not one of the "
     "choices (expected three_sided | four_sided, got 'three sides'); hint: did you mean "
     "'three_sided'?"),
    (GLULAM + "\n      zero_strength_layer: -7 mm",
     "proj/sheets/tm1.yaml:14:28: error: TM1.beam.inputs.zero_strength_layer: "
     "'zero_strength_layer' out of range (expected zero_strength_layer >= 0 m, got '-7 mm')"),
], ids=["timber_and_rate", "k_fi_with_timber", "rate_without_k_fi", "unknown_timber",
        "moment_as_a_force", "unknown_exposure", "negative_zero_strength_layer"])
def test_bad_timber_input__located_error_word_for_word(errors_of, inputs, message):
    assert errors_of(timber_sheet(inputs)) == [message]


def test_bad_timber_input__exit_2_and_nothing_written(tmp_path, capsys):
    status, err = run(tmp_path, capsys, timber_sheet(GLULAM.replace("200 mm", "-200 mm")))
    assert status == 2
    assert err[0] == ("proj/sheets/tm1.yaml:7:14: error: TM1.beam.inputs.width: 'width' out of "
                      "range (expected width > 0 m, got '-200 mm')")


# --- the demo sheet --------------------------------------------------------------------------------

def demo_sheet(evaluate):
    return evaluate({"tm1": (DEMO_SHEETS / "tm1.yaml").read_text()})


def test_demo_tm1__evaluates_and_passes(evaluate):
    block = demo_sheet(evaluate).block("TM1.beam")
    assert block.passed and len(block.checks) == 2
    # GL24h 140 x 450 mm, three sides, 30 min: d_ef = 21 + 7 = 28 mm, b_ef = 84 mm,
    # h_ef = 422 mm, W_ef = 84 x 422² / 6 = 2 493 176 mm³, M_Rd,fi = x 27.6 = 68.81 kN·m
    assert results_of(block)["bending_resistance"] == pytest.approx(68.81e3, abs=10.0)


@pytest.mark.parametrize("sig", [3, 4])
def test_demo_tm1__every_printed_step_redoes_from_its_printed_numbers(evaluate, sig):
    assert redo_all(demo_sheet(evaluate).block("TM1.beam"), sig) == []
