"""steel_member_heating given by its section (docs/format.md, "steel_member_heating — additions"): the
section factor worked out as steps by EN 1993-1-2:2005 Table 4.2 from a catalogue profile or
from the dimensions, the shadow factor of eq. (4.26a) / (4.26b), the heating fed with them,
the catalogue's unconfirmed dimensions listed as values to confirm, located errors word for
word, and every printed step re-done from its printed numbers.

Check values are hand calculations written out beside the assertions, from the dimensions of
the sections' published tables (Euronorm 19-57 for IPE, Euronorm 53-62 for HE, BS 4-1:2005 for
UB; the same figures as tests/test_physics_sections.py) and the published areas of those tables.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from test_hostile import run
from test_kinds_fire import redo_all, steps_of

from calcdoc.provenance import values_to_confirm
from calcdoc.render.printed import fill
from conftest import PROJECT_YAML

K = 273.15
MIN = 60.0
DEMO_SHEETS = Path(__file__).resolve().parents[1] / "projects" / "cold-store" / "sheets"


def beam_sheet(inputs: str, checks: str = "") -> dict:
    return {"sb1": f"""\
id: SB1
title: Steel beam sheet
blocks:
  - id: beam
    kind: steel_member_heating
    inputs:
{inputs}
{checks}"""}


IPE_300 = """\
      fire: standard
      duration: 30 min
      section: {profile: "IPE 300"}
      exposure: four_sided
      critical_temperature: 550 degC"""
IPE_300_DIMENSIONS = IPE_300.replace(
    'section: {profile: "IPE 300"}',
    "section: {shape: i_section, height: 300 mm, width: 150 mm, web_thickness: 7.1 mm, "
    "flange_thickness: 10.7 mm, root_radius: 15 mm}")
PROTECTION = ("\n      protection: {thickness: 20 mm, conductivity: 0.12 W/(m*K), density: "
              "300 kg/m^3, specific_heat: 1200 J/(kg*K)}")


def results_of(block) -> dict:
    return {name: r.value for name, r in block.output.results.items()}


# --- unprotected: Am/V, the box value and k_sh --------------------------------------------------

def test_ipe_300_four_sided__table_4_2_steps_and_eq_4_26a_by_hand(evaluate):
    block = evaluate(beam_sheet(IPE_300)).block("SB1.beam")
    # IPE 300: h 300, b 150, t_w 7.1, t_f 10.7, r 15 mm (Euronorm 19-57).
    # P = 2·300 + 4·150 − 2·7.1 + (2π − 8)·15 = 1160.05 mm            (EN 1993-1-2 Table 4.2)
    # A = 2·150·10.7 + (300 − 21.4)·7.1 + (4 − π)·15² = 5381.2 mm²    (published 53.81 cm²)
    # Am/V = 1160.05 / 5381.2 mm = 215.57 m⁻¹; box 2(150 + 300) = 900 mm → 167.25 m⁻¹
    # k_sh = 0.9 · 167.25 / 215.57 = 0.6983                           (eq. (4.26a), standard fire)
    results = results_of(block)
    assert results["perimeter"] == pytest.approx(1.16005, abs=5e-6)
    assert results["area"] == pytest.approx(53.81e-4, abs=0.005e-4)
    assert results["section_factor"] == pytest.approx(215.57, abs=0.01)
    assert results["box_section_factor"] == pytest.approx(167.25, abs=0.01)
    assert results["shadow_factor"] == pytest.approx(0.6983, abs=1e-4)
    steps = steps_of(block)
    assert steps["P"].expr == "2 * h + 4 * b - 2 * t_w + (2 * pi - 8) * r"
    assert steps["A"].expr == "2 * b * t_f + (h - 2 * t_f) * t_w + (4 - pi) * r ** 2"
    assert steps["P_b"].expr == "2 * (b + h)"
    assert steps["A_m_V"].expr == "P / A" and steps["A_m_V"].yields == "section_factor"
    assert steps["A_m_V_b"].expr == "P_b / A"
    assert steps["k_sh"].expr == "0.9 * A_m_V_b / A_m_V" and steps["k_sh"].yields == \
        "shadow_factor"
    assert "P_exp" not in steps
    # The heating takes them: k_sh·Am/V = 0.9·[Am/V]_b = 0.9 · 167.25 = 150.52 m⁻¹ (eq. (4.25))
    factor = steps["k_sh_A_m_V"]
    assert factor.operands["k_sh"] is steps["k_sh"].result
    assert factor.operands["A_m_V"] is steps["A_m_V"].result
    assert factor.result.si == pytest.approx(150.52, abs=0.01)
    assert redo_all(block) == []


def test_ipe_300__printed_dimensions_as_the_catalogue_and_section_factor_in_m_minus_1(evaluate):
    block = evaluate(beam_sheet(IPE_300)).block("SB1.beam")
    printed = {p.name: p for p in block.printed_steps(3)}
    assert {k: v.text for k, v in printed["P"].values.items()} == {
        "h": "300 mm", "b": "150 mm", "t_w": "7.1 mm", "r": "15 mm"}
    assert printed["A_m_V"].result.text == "216 m⁻¹"
    record = next(r for r in block.inputs if r.path == "section.profile")
    # Euronorm 19-57: IPE 300 dimensions; the catalogue's source for them.
    assert fill(record.shown, 3) == ("IPE 300: h = 300 mm, b = 150 mm, t_w = 7.1 mm, "
                                     "t_f = 10.7 mm, r = 15 mm")
    assert record.source == "Euronorm 19-57 and EN 10365:2017, IPE dimensions and sectional area"


def test_ipe_300_three_sided__exposed_perimeter_p_minus_b_by_hand(evaluate):
    block = evaluate(beam_sheet(IPE_300.replace("four_sided", "three_sided"))).block("SB1.beam")
    # Three sides (top flange against a slab), EN 1993-1-2 Table 4.2:
    # P_exp = 1160.05 − 150 = 1010.05 mm → Am/V = 187.70 m⁻¹
    # box b + 2h = 750 mm → 139.37 m⁻¹; k_sh = 0.9 · 750 / 1010.05 = 0.6683 (eq. (4.26a))
    results = results_of(block)
    assert results["perimeter"] == pytest.approx(1.01005, abs=5e-6)
    assert results["section_factor"] == pytest.approx(187.70, abs=0.01)
    assert results["box_section_factor"] == pytest.approx(139.37, abs=0.01)
    assert results["shadow_factor"] == pytest.approx(0.6683, abs=1e-4)
    steps = steps_of(block)
    assert steps["P_exp"].expr == "P - b" and steps["P_exp"].yields == "perimeter"
    assert steps["P_b"].expr == "b + 2 * h"
    assert steps["A_m_V"].expr == "P_exp / A"
    assert redo_all(block) == []


def test_section_by_dimensions__same_factors_as_the_catalogue_and_nothing_to_confirm(evaluate):
    by_profile = evaluate(beam_sheet(IPE_300))
    by_dimensions = evaluate(beam_sheet(IPE_300_DIMENSIONS))
    a, b = results_of(by_profile.block("SB1.beam")), results_of(by_dimensions.block("SB1.beam"))
    for name in ("perimeter", "area", "section_factor", "box_section_factor", "shadow_factor"):
        assert b[name] == pytest.approx(a[name], rel=1e-12)
    block = by_dimensions.block("SB1.beam")
    assert [r.path for r in block.inputs if r.path.startswith("section.")] == [
        "section.shape", "section.height", "section.width", "section.web_thickness",
        "section.flange_thickness", "section.root_radius"]
    assert steps_of(block)["P"].operands["h"].written == "300 mm"
    # the engineer's own dimensions carry their own sources: no catalogue entry to confirm
    keys = [item.key for item in values_to_confirm(by_dimensions)]
    assert not any(key.startswith("sections.") for key in keys)
    assert redo_all(block) == []


def test_parametric_fire__eq_4_26b_without_the_0_9(evaluate):
    sheets = {"fc1": """\
id: FC1
title: Fire sheet
blocks:
  - id: fire
    kind: fire_curve
    inputs:
      curve: parametric
      duration: 60 min
      opening_factor: 0.06 m^0.5
      fire_load_density: 300 MJ/m^2
      thermal_inertia: 1000 J/(m^2*s^0.5*K)
      fire_growth: medium
      floor_area: 100 m^2
      height: 3 m
"""}
    sheets.update(beam_sheet(IPE_300.replace("fire: standard", 'fire: {ref: "FC1.fire.temperature"}')))
    package = evaluate(sheets)
    block = package.block("SB1.beam")
    # EN 1993-1-2 eq. (4.26b) (from memory), any fire other than a nominal curve:
    # k_sh = [Am/V]_b / [Am/V] = 900 / 1160.05 = 0.7758
    assert results_of(block)["shadow_factor"] == pytest.approx(0.7758, abs=1e-4)
    step = steps_of(block)["k_sh"]
    assert step.expr == "A_m_V_b / A_m_V" and "(4.26b)" in str(step.source)
    keys = [item.key for item in values_to_confirm(package)]
    assert "EN 1993-1-2:2005 eq. (4.26b)" in keys and "EN 1993-1-2:2005 eq. (4.26a)" not in keys
    assert redo_all(block) == []


def test_shadow_factor_given__used_as_stated(evaluate):
    block = evaluate(beam_sheet(IPE_300 + "\n      shadow_factor: 1")).block("SB1.beam")
    steps = steps_of(block)
    assert steps["k_sh"].expr is None and steps["k_sh"].yields == "shadow_factor"
    assert results_of(block)["shadow_factor"] == 1.0
    # k_sh·Am/V = 1 · 215.57 m⁻¹ (Table 4.2 hand calculation above)
    assert steps["k_sh_A_m_V"].result.si == pytest.approx(215.57, abs=0.01)
    assert redo_all(block) == []


def test_heating__fed_with_the_section_factor_and_shadow_factor_worked_out(evaluate):
    # The same member given by the hand-calculated factors (Am/V 215.57 m⁻¹, k_sh 0.6983) heats
    # the same way: the section's figures are what the heating uses.
    by_section = evaluate(beam_sheet(IPE_300)).block("SB1.beam")
    by_factor = evaluate(beam_sheet(IPE_300.replace(
        'section: {profile: "IPE 300"}\n      exposure: four_sided',
        "section_factor: 215.57 1/m\n      shadow_factor: 0.6983"))).block("SB1.beam")
    assert results_of(by_section)["time_to_critical"] == pytest.approx(
        results_of(by_factor)["time_to_critical"], rel=1e-3)
    assert "section_factor" not in results_of(by_factor)  # results of a section only


# --- protected: Ap/V -------------------------------------------------------------------------------

def test_heb_300_contour_encasement__ap_v_equals_am_v_and_no_shadow_factor(evaluate):
    block = evaluate(beam_sheet(IPE_300.replace("IPE 300", "HEB 300") + PROTECTION
                                + "\n      encasement: contour")).block("SB1.beam")
    # HEB 300: h 300, b 300, t_w 11, t_f 19, r 27 mm (Euronorm 53-62).
    # P = 600 + 1200 − 22 + (2π − 8)·27 = 1731.65 mm (published surface 1.732 m²/m)
    # A = 2·300·19 + (300 − 38)·11 + (4 − π)·27² = 14 907.8 mm² (published 149.1 cm²)
    # Ap/V (contour) = P/A = 116.16 m⁻¹; box 2(300 + 300) = 1200 mm → 80.50 m⁻¹
    results = results_of(block)
    assert results["section_factor"] == pytest.approx(116.16, abs=0.01)
    assert results["box_section_factor"] == pytest.approx(80.50, abs=0.01)
    assert results["perimeter"] == pytest.approx(1.73165, abs=5e-6)
    assert "shadow_factor" not in results and "shadow_factor" not in block.output.absent
    steps = steps_of(block)
    assert steps["A_p_V"].expr == "P / A" and "k_sh" not in steps
    assert steps["phi"].operands["A_p_V"] is steps["A_p_V"].result
    assert redo_all(block) == []


def test_ub_box_encasement_three_sided__box_perimeter_over_area(evaluate):
    block = evaluate(beam_sheet(IPE_300.replace("IPE 300", "UB 356x171x51")
                                .replace("four_sided", "three_sided") + PROTECTION
                                + "\n      encasement: box")).block("SB1.beam")
    # UB 356x171x51: h 355, b 171.5, t_w 7.4, t_f 11.5, r 10.2 mm (BS 4-1:2005).
    # A = 2·171.5·11.5 + (355 − 23)·7.4 + (4 − π)·10.2² = 6490.6 mm² (published 64.9 cm²)
    # box on three sides b + 2h = 881.5 mm → Ap/V = 881.5 / 6490.6 mm = 135.81 m⁻¹
    results = results_of(block)
    assert results["area"] == pytest.approx(64.906e-4, abs=0.001e-4)
    assert results["perimeter"] == pytest.approx(0.8815, abs=1e-9)
    assert results["section_factor"] == pytest.approx(135.81, abs=0.01)
    assert results["section_factor"] == results["box_section_factor"]
    steps = steps_of(block)
    assert "P" not in steps and "P_exp" not in steps  # a box needs no contour
    assert steps["A_p_V"].expr == "A_m_V_b"
    assert redo_all(block) == []


# --- the catalogue's dimensions are values to confirm ----------------------------------------------

def test_catalogue_section__listed_as_a_value_to_confirm_with_its_source(evaluate):
    package = evaluate(beam_sheet(IPE_300))
    found = {item.key: item for item in values_to_confirm(package)}
    item = found["sections.IPE 300"]
    # calcdoc/materials/sections.yaml: every entry confirmed: false until checked.
    assert item.what == "rolled section IPE 300: dimensions"
    assert item.value == "h 300, b 150, t_w 7.1, t_f 10.7, r 15 (mm)"
    assert item.against == "Euronorm 19-57 and EN 10365:2017, IPE dimensions and sectional area"
    assert item.used_in == ("SB1.beam",) and item.confirmation is None
    # The 0.9 of eq. (4.26a) is recalled: it is to be confirmed too.
    assert "EN 1993-1-2:2005 eq. (4.26a)" in found
    # The dimensions enter the working as given values that remember their entry.
    assert steps_of(package.block("SB1.beam"))["P"].operands["h"].origin == \
        "sections.IPE 300.height"


def test_catalogue_section__a_project_confirmation_is_accepted(evaluate):
    project = PROJECT_YAML + """\
confirmations:
  - {value: sections.IPE 300, by: B. Checker, date: 2026-11-26,
     against: "EN 10365:2017, IPE table"}
"""
    package = evaluate(beam_sheet(IPE_300), project_yaml=project)
    item = next(i for i in values_to_confirm(package) if i.key == "sections.IPE 300")
    assert item.confirmation is not None and item.confirmation.by == "B. Checker"


# --- errors, word for word --------------------------------------------------------------------------

@pytest.mark.parametrize("inputs, message", [
    (IPE_300.replace('"IPE 300"', '"IPE 310"'),
     "proj/sheets/sb1.yaml:9:26: error: SB1.beam.inputs.section.profile: unknown profile "
     "'IPE 310' (expected a rolled section in calcdoc's catalogue (IPE 80 to 600, HEA and HEB "
     "100 to 600, UB, UC), got 'IPE 310'); hint: closest in the catalogue: 'IPE 300', "
     "'IPE 330', 'IPE 360'"),
    (IPE_300 + "\n      section_factor: 200 1/m",
     "proj/sheets/sb1.yaml:7:7: error: SB1.beam: exactly one of section_factor | section is "
     "needed (expected exactly one, got section_factor, section)"),
    (IPE_300.replace('{profile: "IPE 300"}', '{profile: "IPE 300", height: 300 mm}'),
     "proj/sheets/sb1.yaml:9:16: error: SB1.beam.inputs.section: give either a profile or the "
     "section's dimensions (expected {shape: i_section, height, width, web_thickness, "
     "flange_thickness, root_radius} or {profile: DESIGNATION}, got profile and height)"),
    (IPE_300.replace('{profile: "IPE 300"}', "{shape: i_section, height: 300 mm, width: 150 mm}"),
     "proj/sheets/sb1.yaml:9:16: error: SB1.beam.inputs.section: the section's dimensions are "
     "incomplete (expected {shape: i_section, height, width, web_thickness, flange_thickness, "
     "root_radius} or {profile: DESIGNATION}, got missing web_thickness, flange_thickness, "
     "root_radius)"),
    (IPE_300.replace("\n      exposure: four_sided", ""),
     "proj/sheets/sb1.yaml:4:5: error: SB1.beam.inputs: missing input 'exposure' (expected "
     "four_sided | three_sided for a member given by its section (EN 1993-1-2:2005 Table 4.2), "
     "got nothing)"),
    (IPE_300 + PROTECTION,
     "proj/sheets/sb1.yaml:4:5: error: SB1.beam.inputs: missing input 'encasement' (expected "
     "contour | box for a protected member given by its section (EN 1993-1-2:2005 Table 4.2), "
     "got nothing)"),
    (IPE_300 + "\n      encasement: box",
     "proj/sheets/sb1.yaml:12:19: error: SB1.beam.inputs.encasement: input 'encasement' "
     "applies only to a protected member (expected a 'protection' with it (docs/format.md, "
     "steel_member_heating), got 'box')"),
    (IPE_300.replace('section: {profile: "IPE 300"}', "section_factor: 200 1/m"),
     "proj/sheets/sb1.yaml:10:17: error: SB1.beam.inputs.exposure: input 'exposure' applies only "
     "to a member given by its section (expected 'section' in place of 'section_factor' "
     "(docs/format.md, steel_member_heating), got 'four_sided')"),
    (IPE_300_DIMENSIONS.replace("web_thickness: 7.1 mm", "web_thickness: 160 mm"),
     "proj/sheets/sb1.yaml:9:81: error: SB1.beam.inputs.section.web_thickness: outside the range "
     "of the method (expected less than the width b = 0.15 m, got '160 mm')"),
    (IPE_300_DIMENSIONS.replace("i_section", "h_section"),
     "proj/sheets/sb1.yaml:9:24: error: SB1.beam.inputs.section.shape: 'shape' is not one of "
     "the choices (expected i_section, got 'h_section'); hint: did you mean 'i_section'?"),
], ids=["unknown_profile", "section_and_section_factor", "profile_and_dimensions",
        "incomplete_dimensions", "no_exposure", "no_encasement", "encasement_unprotected",
        "exposure_with_section_factor", "web_wider_than_flange", "unknown_shape"])
def test_bad_section_input__located_error_word_for_word(errors_of, inputs, message):
    assert errors_of(beam_sheet(inputs)) == [message]


def test_unknown_profile__exit_2_and_nothing_written(tmp_path, capsys):
    status, err = run(tmp_path, capsys, beam_sheet(IPE_300.replace("IPE 300", "UB 356x171x50")))
    assert status == 2
    assert err[0] == ("proj/sheets/sb1.yaml:9:26: error: SB1.beam.inputs.section.profile: "
                      "unknown profile 'UB 356x171x50' (expected a rolled section in calcdoc's "
                      "catalogue (IPE 80 to 600, HEA and HEB 100 to 600, UB, UC), got "
                      "'UB 356x171x50'); hint: closest in the catalogue: 'UB 356x171x51', "
                      "'UB 356x171x45', 'UB 356x171x57'")


# --- the demo sheet --------------------------------------------------------------------------------

def demo_sheet(evaluate):
    return evaluate({"sb1": (DEMO_SHEETS / "sb1.yaml").read_text()})


def test_demo_sb1__evaluates_and_passes_with_the_box_section_factor(evaluate):
    block = demo_sheet(evaluate).block("SB1.beam")
    assert block.passed and len(block.checks) == 2
    # UB 356x171x51 boxed on three sides: 135.81 m⁻¹ (hand calculation above)
    assert results_of(block)["section_factor"] == pytest.approx(135.81, abs=0.01)
    assert results_of(block)["time_to_critical"] > 60 * MIN


@pytest.mark.parametrize("sig", [3, 4])
def test_demo_sb1__every_printed_step_redoes_from_its_printed_numbers(evaluate, sig):
    block = demo_sheet(evaluate).block("SB1.beam")
    assert redo_all(block, sig) == []
