"""The fire_curve and steel_member_heating kinds: inputs as docs/format.md names them, located errors,
results against the standards, the fire passed by reference as the curve itself, the working
printed as steps that re-do from their printed numbers, and figures as data."""

import math
from pathlib import Path

import pytest
from test_redo import redo  # the checker's own evaluator: ast and pint, nothing of calcdoc's

from calcdoc.data import FigureData
from calcdoc.kinds import get_kind
from calcdoc.physics.firecurves import FireCurve
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill

K = 273.15
MIN = 60.0
DEMO_SHEETS = Path(__file__).resolve().parents[1] / "projects" / "cold-store" / "sheets"


def fire_sheet(inputs: str, checks: str = "", sheet_id: str = "FC1") -> dict:
    return {sheet_id.lower(): f"""\
id: {sheet_id}
title: Fire sheet
blocks:
  - id: fire
    kind: fire_curve
    inputs:
{inputs}
{checks}"""}


def steel_sheet(inputs: str, checks: str = "") -> dict:
    return {"sc1": f"""\
id: SC1
title: Steel sheet
blocks:
  - id: member
    kind: steel_member_heating
    inputs:
{inputs}
{checks}"""}


PARAMETRIC = """\
      curve: parametric
      duration: 180 min
      opening_factor: 0.06 m^0.5
      fire_load_density: 300 MJ/m^2
      thermal_inertia: 1000 J/(m^2*s^0.5*K)
      fire_growth: medium
      floor_area: 100 m^2
      height: 3 m"""
FUEL_CONTROLLED = PARAMETRIC.replace("0.06 m^0.5", "0.10 m^0.5").replace("300 MJ", "60 MJ") \
    .replace("1000 J", "800 J").replace("medium", "fast")


def steps_of(block) -> dict:
    """The block's steps by name (the last of a name: a rule applied after its formula)."""
    return {s.name: s for s in block.output.steps}


def redo_all(block, sig: int = 3) -> list[str]:
    """Re-do every printed step of a block from its printed numbers; return those that do not
    give their printed result to half a unit of its last digit."""
    wrong = []
    for step in block.printed_steps(sig):
        record = step.record()
        if "expr" not in record:
            continue
        again, printed, half = redo(record)
        if not abs(again - printed) <= half * (1 + 1e-9) + 1e-300:
            wrong.append(f"{block.key} {record['name']} = {record['expr']} with "
                         f"{record['values']}: {again!r}, printed {record['result']}")
    return wrong


# --- fire_curve --------------------------------------------------------------------------------

def test_fire_curve_standard__945C_at_60_min_en1991_1_2_eq3_4(evaluate):
    package = evaluate(fire_sheet("      curve: standard\n      duration: 60 min"))
    block = package.block("FC1.fire")
    results = block.output.results
    # EN 1991-1-2:2002 eq. (3.4): 945 °C at 60 min (ISO 834-1 prints 945 °C).
    assert results["theta_end"].value - K == pytest.approx(945.0, abs=0.5)
    assert results["theta_max"].value == results["theta_end"].value
    assert results["t_max"].value == pytest.approx(60 * MIN)
    curve = block.output.series["temperature"].obj
    assert isinstance(curve, FireCurve) and curve.convection_coefficient == 25.0
    # The curve's equation is the step that gives theta_end, with t in minutes as a number.
    step = steps_of(block)["theta_g"]
    assert step.yields == "theta_end" and "log10(8 * t + 1)" in step.expr
    printed = next(p for p in block.printed_steps(3) if p.name == "theta_g")
    assert printed.values["t"].text == "60" and printed.result.text == "945 °C"


@pytest.mark.parametrize("curve, celsius", [
    ("external", 680.0),      # EN 1991-1-2:2002 eq. (3.5) at 60 min: tends to 680 °C
    ("hydrocarbon", 1100.0),  # EN 1991-1-2:2002 eq. (3.6) at 60 min: tends to 1100 °C
])
def test_fire_curve_external_and_hydrocarbon__plateau_at_60_min(evaluate, curve, celsius):
    block = evaluate(fire_sheet(f"      curve: {curve}\n      duration: 60 min")).block("FC1.fire")
    assert block.output.results["theta_end"].value - K == pytest.approx(celsius, abs=0.5)
    assert steps_of(block)["theta_g"].yields == "theta_end"
    assert redo_all(block) == []


def test_fire_curve_parametric__hand_check_annex_a_and_steps(evaluate):
    package = evaluate(fire_sheet(PARAMETRIC))
    block = package.block("FC1.fire")
    # Hand calculation in tests/test_physics_firecurves.py (EN 1991-1-2:2002 Annex A):
    # Γ = 3.0276, t_max = 1.000 h (ventilation controlled), θmax = 1109.1 °C.
    assert block.output.results["theta_max"].value - K == pytest.approx(1109.1, abs=0.05)
    assert block.output.results["t_max"].value == pytest.approx(3600.0, abs=1e-6)
    # Cooling to 20 °C by 2.439 h < 180 min: the end is ambient.
    assert block.output.results["theta_end"].value - K == pytest.approx(20.0, abs=1e-9)
    steps = steps_of(block)
    assert steps["Gamma"].result.si == pytest.approx(3.0276, rel=1e-4)
    assert steps["Gamma"].expr == "(O / b) ** 2 / (O_ref / b_ref) ** 2"
    assert steps["t_max"].yields == "t_max" and steps["theta_max"].yields == "theta_max"
    # The regime and the held ambient are choices, stated; the closed forms are steps.
    assert steps["x"].expr is None and steps["theta_g"].expr is None
    assert steps["r"].expr is None and steps["r"].result.si == 250.0   # (A.11c), t*max >= 2
    sources = " ".join(s.source for s in block.output.steps)
    assert "(A.2b)" in sources and "(A.7)" in sources and "(A.1)" in sources
    assert any("informative" in str(n["text"]) and "roof" in str(n["text"])
               for n in block.output.notes)
    assert redo_all(block) == []


def test_fire_curve_parametric__end_on_the_cooling_line_a11c(evaluate):
    block = evaluate(fire_sheet(PARAMETRIC.replace("180 min", "90 min"))).block("FC1.fire")
    # Hand calculation (tests/test_physics_firecurves.py, EN 1991-1-2:2002 Annex A):
    # at t = 1.5 h, θg = 1109.12 − 250 (4.5414 − 3.0276) = 730.7 °C.
    assert block.output.results["theta_end"].value - K == pytest.approx(730.7, abs=0.05)
    step = steps_of(block)["theta_g"]
    assert step.expr == "theta_max - r * (t_star_end - t_star_max * x)"
    assert redo_all(block) == []


def test_fire_curve_parametric__end_before_the_peak(evaluate):
    block = evaluate(fire_sheet(PARAMETRIC.replace("180 min", "30 min"))).block("FC1.fire")
    # Hand calculation (tests/test_physics_firecurves.py): heating at 30 min, 1007.2 °C; the
    # peak (1 h) is after the end, so the highest temperature is the one at the end.
    results = block.output.results
    assert results["theta_end"].value - K == pytest.approx(1007.2, abs=0.1)
    assert results["theta_max"].value == results["theta_end"].value
    assert results["t_max"].value == 30 * MIN
    steps = steps_of(block)
    assert steps["theta_g"].yields == "theta_end" and steps["theta_g_max"].yields == "theta_max"
    assert steps["theta_g_max"].expr is None and steps["theta_max"].yields is None
    assert redo_all(block) == []


def test_fire_curve_parametric_fuel_controlled__shows_k_factor(evaluate):
    block = evaluate(fire_sheet(FUEL_CONTROLLED)).block("FC1.fire")
    # Hand calculation (EN 1991-1-2:2002 Annex A, eqs. (A.8)–(A.10) with k): θmax = 704.3 °C,
    # O_lim = 0.024, Γ_lim = 0.7569, k = 0.906897, x = 2.0833.
    assert block.output.results["theta_max"].value - K == pytest.approx(704.3, abs=0.05)
    steps = steps_of(block)
    assert steps["O_lim"].result.si == pytest.approx(0.024, rel=1e-9)
    assert steps["Gamma_lim"].result.si == pytest.approx(0.7569, rel=1e-4)
    assert steps["k"].result.si == pytest.approx(0.906897, rel=1e-5)
    assert steps["x"].result.si == pytest.approx(2.0833, rel=1e-4) and steps["x"].expr
    assert redo_all(block) == []


def test_fire_curve_parametric_fuel_controlled__cooling_a11b_at_18_min(evaluate):
    block = evaluate(fire_sheet(FUEL_CONTROLLED.replace("180 min", "18 min"))).block("FC1.fire")
    # Hand calculation (tests/test_physics_firecurves.py): (A.11b) slope 355.78 per hour of t*;
    # at t = 0.3 h, θg = 704.28 − 355.78 (3.942188 − 3.285156) = 470.5 °C.
    steps = steps_of(block)
    assert steps["r"].expr == "r_0 * (3 - t_star_max)"
    assert steps["r"].result.si == pytest.approx(355.78, abs=0.01)
    assert block.output.results["theta_end"].value - K == pytest.approx(470.5, abs=0.05)
    assert redo_all(block) == []


def test_fire_curve_parametric__short_fire_cools_at_625_a11a(evaluate):
    inputs = PARAMETRIC.replace("0.06 m^0.5", "0.02 m^0.5").replace("300 MJ", "100 MJ") \
        .replace("1000 J", "2000 J").replace("180 min", "90 min")
    block = evaluate(fire_sheet(inputs)).block("FC1.fire")
    # Hand calculation (tests/test_physics_firecurves.py, EN 1991-1-2:2002 Annex A): θmax =
    # 562.0 °C, (A.11a) slope 625, at 1.5 h θg = 535.8 °C.
    assert block.output.results["theta_max"].value - K == pytest.approx(562.0, abs=0.05)
    assert block.output.results["theta_end"].value - K == pytest.approx(535.8, abs=0.05)
    assert steps_of(block)["r"].expr is None and steps_of(block)["r"].result.si == 625.0
    assert redo_all(block) == []


E119 = """\
      curve: tabulated
      convection_coefficient: 25 W/(m^2*K)
      points_source: ASTM E119 table (from memory)
      points:
        - ["0 min", "68 degF"]
        - ["5 min", "1000 degF"]
        - ["10 min", "1300 degF"]
        - ["30 min", "1550 degF"]
        - ["60 min", "1700 degF"]"""


def test_fire_curve_tabulated__astm_e119_points_in_degF(evaluate):
    # ASTM E119 table points, from memory: 0 min 68 °F, 5 min 1000 °F (538 °C), 10 min 1300 °F
    # (704 °C), 30 min 1550 °F (843 °C), 60 min 1700 °F (927 °C).
    block = evaluate(fire_sheet(E119)).block("FC1.fire")
    assert block.output.results["theta_max"].value - K == pytest.approx(927.0, abs=0.6)
    curve = block.output.series["temperature"].obj
    assert curve.duration == 60 * MIN  # the table's end when no duration is given
    assert curve(45 * MIN) - K == pytest.approx(885.0, abs=0.01)  # linear: 1625 °F
    # The end is a point of the table: a statement, not a formula.
    assert steps_of(block)["theta_g"].expr is None
    record = next(r for r in block.inputs if r.path == "points")
    assert fill(record.shown, 3) == "5 points, 0 to 60 min, 20 °C to 927 °C"


def test_fire_curve_tabulated__end_between_points_interpolated(evaluate):
    block = evaluate(fire_sheet(E119 + "\n      duration: 45 min")).block("FC1.fire")
    # Linear between 30 min 1550 °F and 60 min 1700 °F: 1625 °F = 885.0 °C (ASTM E119 points,
    # from memory, as above).
    assert block.output.results["theta_end"].value - K == pytest.approx(885.0, abs=0.01)
    assert steps_of(block)["theta_g"].expr.startswith("theta_i + (theta_j - theta_i)")
    assert redo_all(block) == []


def test_fire_curve_tabulated__needs_a_convection_coefficient(errors_of):
    errors = errors_of(fire_sheet("""\
      curve: tabulated
      points:
        - ["0 min", "20 degC"]
        - ["10 min", "700 degC"]"""))
    assert len(errors) == 1
    assert errors[0].endswith("FC1.fire.inputs: missing input 'convection_coefficient' (expected "
                              "a convection coefficient for curve 'tabulated' (a tabulated curve "
                              "has none of its own), got nothing)")


def test_fire_curve_tabulated__times_strictly_increasing_from_zero(errors_of):
    errors = errors_of(fire_sheet("""\
      curve: tabulated
      convection_coefficient: 25 W/(m^2*K)
      points:
        - ["1 min", "20 degC"]
        - ["10 min", "700 degC"]
        - ["10 min", "750 degC"]"""))
    assert any("points[0][0]: the first point must be at the start of the exposure" in e
               for e in errors)
    assert any("points[2][0]: times are not strictly increasing (expected a time after "
               "'10 min', got '10 min')" in e for e in errors)


def test_fire_curve_tabulated__duration_beyond_table_refused(errors_of):
    errors = errors_of(fire_sheet("""\
      curve: tabulated
      duration: 90 min
      convection_coefficient: 25 W/(m^2*K)
      points:
        - ["0 min", "20 degC"]
        - ["60 min", "900 degC"]"""))
    assert len(errors) == 1
    assert "fc1.yaml:8:17: error: FC1.fire.inputs.duration: outside the range of the method" \
        in errors[0]
    assert "last time of the table" in errors[0]


def test_fire_curve_parametric__missing_annex_a_inputs_listed(errors_of):
    errors = errors_of(fire_sheet("      curve: parametric\n      opening_factor: 0.04 m^0.5"))
    assert len(errors) == 1
    assert errors[0].endswith("FC1.fire.inputs: missing input 'fire_load_density' (expected "
                              "every input of EN 1991-1-2 Annex A for curve 'parametric' "
                              "(missing fire_load_density, thermal_inertia, fire_growth, "
                              "floor_area, height), got nothing)")


def test_fire_curve_parametric__floor_area_above_500_m2_refused(errors_of):
    # EN 1991-1-2:2002 Annex A: floor area up to 500 m².
    errors = errors_of(fire_sheet(PARAMETRIC.replace("100 m^2", "600 m^2")))
    assert len(errors) == 1
    assert "FC1.fire.inputs.floor_area: 'floor_area' out of range" in errors[0]
    assert "expected floor_area <= 500.000 m², got '600 m^2'" in errors[0]


def test_fire_curve__input_of_another_curve_refused_where_it_is_written(errors_of):
    errors = errors_of(fire_sheet("      curve: standard\n      opening_factor: 0.04 m^0.5"))
    assert len(errors) == 1
    assert errors[0].endswith("fc1.yaml:8:23: error: FC1.fire.inputs.opening_factor: input "
                              "'opening_factor' does not apply to curve 'standard' (expected "
                              "only the inputs of the chosen curve (docs/format.md, fire_curve), got "
                              "'0.04 m^0.5')")


def test_fire_curve__own_convection_coefficient_overrides_the_curves(evaluate):
    package = evaluate(fire_sheet("      curve: hydrocarbon\n      convection_coefficient: "
                                  "40 W/(m^2*K)"))
    curve = package.block("FC1.fire").output.series["temperature"].obj
    assert curve.convection_coefficient == 40.0


def test_fire_curve__figure_is_data_drawn_with_the_peak(evaluate):
    block = evaluate(fire_sheet(PARAMETRIC)).block("FC1.fire")
    (figure,) = block.output.figures
    assert isinstance(figure, FigureData)
    assert figure.x.display == "min" and figure.y.display == "degC"
    assert [m.at for m in figure.marks] == [pytest.approx(3600.0)]
    drawn = draw(figure)
    assert drawn.svg.startswith("<svg") and "t_max" in drawn.svg


# --- steel_member_heating ----------------------------------------------------------------------

UNPROTECTED = """\
      fire: standard
      duration: 30 min
      section_factor: 200 1/m
      utilisation: 0.5"""


def test_steel_unprotected__critical_temperature_from_utilisation_table_4_1(evaluate):
    block = evaluate(steel_sheet(UNPROTECTED)).block("SC1.member")
    # EN 1993-1-2:2005 Table 4.1 (from memory): μ0 = 0.50 -> 585 °C.
    assert block.output.results["theta_critical"].value - K == pytest.approx(585.0, abs=0.6)
    step = steps_of(block)["theta_a_cr"]
    assert step.yields == "theta_critical" and "mu_0 ** 3.833" in step.expr
    # §4.2.4: eq. (4.22) not for members where stability governs; the report says so.
    assert any("§4.2.4" in w["source"] and "columns" in str(w["text"])
               for w in block.output.warnings)
    assert block.output.results["time_to_critical"].value < 30 * MIN
    assert redo_all(block) == []


def test_steel_unprotected__hand_calculation_of_the_first_step(evaluate):
    sheets = fire_sheet("""\
      curve: tabulated
      convection_coefficient: 25 W/(m^2*K)
      points:
        - ["0 min", "600 degC"]
        - ["30 min", "900 degC"]""")
    sheets.update(steel_sheet("""\
      fire: {ref: "FC1.fire.temperature"}
      section_factor: 200 1/m
      critical_temperature: 550 degC"""))
    block = evaluate(sheets).block("SC1.member")
    steps = steps_of(block)
    # The first explicit step by hand, θg = 600 °C and θa = 20 °C at its start:
    #   c_a = 425 + 0.773·20 − 1.69e-3·20² + 2.22e-6·20³ = 439.80 J/(kg·K)   EN 1993-1-2 (3.2a)
    #   h_net = 25·580 + 0.7·5.6704e-8·(873.15⁴ − 293.15⁴) = 14 500 + 22 778
    #         = 37 278 W/m²                                                  EN 1991-1-2 (3.1)–(3.3)
    #   Δθa = 1·200/(439.80·7850)·37 278·5 = 10.80 K                          EN 1993-1-2 (4.25)
    # (the same step as the physics docstring's example, 10.8 K)
    assert steps["c_a"].result.si == pytest.approx(439.80, abs=0.005)
    assert steps["h_net"].result.si == pytest.approx(37278.0, abs=1.0)
    assert steps["Delta_theta_a_t"].result.si == pytest.approx(10.80, abs=0.005)
    assert steps["theta_a_1"].result.si - K == pytest.approx(30.80, abs=0.005)
    assert block.output.series["temperature"].y[1] == steps["theta_a_1"].result.si
    assert redo_all(block) == []


def test_steel_protected__fire_by_reference_is_the_curve_itself(evaluate):
    sheets = fire_sheet(PARAMETRIC)
    sheets.update(steel_sheet("""\
      fire: {ref: "FC1.fire.temperature"}
      section_factor: 150 1/m
      protection: {thickness: 20 mm, conductivity: 0.12 W/(m*K), density: 300 kg/m^3,
                   specific_heat: 1200 J/(kg*K)}
      critical_temperature: {value: 500 degC, source: column design (example)}"""))
    package = evaluate(sheets)
    block = package.block("SC1.member")
    series = block.output.series["temperature"]
    # The duration defaults to the fire's (180 min); the steel peaks after the gas peak (1 h)
    # and cools (common practice for protected steel).
    assert series.x[-1] == 180 * MIN
    peak = series.x[max(range(len(series.y)), key=series.y.__getitem__)]
    assert peak > 3600.0
    assert any("eq. (4.27)" in n["source"] or "eq. (4.27)" in str(n["text"])
               for n in block.output.notes)
    record = block.inputs[0]
    assert record.origin == "ref" and record.ref == "FC1.fire.temperature"
    assert fill(record.shown, 3) == "parametric fire, αc = 35 W/(m²·K)"
    assert redo_all(block) == []


def test_steel_protected__hand_calculation_of_the_first_step_and_the_no_fall_rule(evaluate):
    block = evaluate(steel_sheet("""\
      fire: standard
      section_factor: 150 1/m
      protection: {thickness: 20 mm, conductivity: 0.12 W/(m*K), density: 300 kg/m^3,
                   specific_heat: 1200 J/(kg*K)}
      critical_temperature: 500 degC
      required_resistance: 60 min""")).block("SC1.member")
    steps = [s for s in block.output.steps]
    by_name = steps_of(block)
    # The first step by hand, θa = θg = 20 °C at t = 0, Δt = 30 s:
    #   c_a(20 °C) = 439.80 J/(kg·K)                                          EN 1993-1-2 (3.2a)
    #   φ = 1200·300/(439.80·7850)·0.020·150 = 0.31282                       EN 1993-1-2 (4.28)
    #   θg(30 s) = 20 + 345 log10(8·0.5 + 1) = 261.14 °C                     EN 1991-1-2 (3.4)
    #   Δθa = 0 − (e^0.031282 − 1)·241.14 = −7.66 K by the formula           EN 1993-1-2 (4.27)
    #   and Δθa = 0 by the rule Δθa,t >= 0 if Δθg,t > 0 (text of eq. (4.27)).
    assert by_name["phi"].result.si == pytest.approx(0.31282, abs=5e-6)
    assert by_name["Delta_theta_g_t"].result.si == pytest.approx(241.14, abs=0.005)
    formula = next(s for s in steps if s.name == "Delta_theta_a_t" and s.expr)
    assert formula.result.si == pytest.approx(-7.66, abs=0.005)
    assert by_name["Delta_theta_a_t"].expr is None and by_name["Delta_theta_a_t"].result.si == 0
    assert by_name["theta_a_1"].result.si == pytest.approx(20.0 + K, abs=1e-9)
    # Time to θcr by linear interpolation between the two steps either side (docs/format.md).
    series = block.output.series["temperature"]
    j = next(n for n, t in enumerate(series.y) if t >= 500.0 + K)
    t_cr = series.x[j - 1] + 30 * (500.0 + K - series.y[j - 1]) / (series.y[j] - series.y[j - 1])
    assert block.output.results["time_to_critical"].value == pytest.approx(t_cr, rel=1e-12)
    assert by_name["t_cr"].expr is None and by_name["theta_a_req"].expr is None
    assert redo_all(block) == []


def test_steel__not_reached_is_absent_and_at_least_check_passes(evaluate):
    package = evaluate(steel_sheet("""\
      fire: standard
      duration: 90 min
      section_factor: 100 1/m
      protection: {thickness: 40 mm, conductivity: 0.1 W/(m*K), density: 300 kg/m^3,
                   specific_heat: 1200 J/(kg*K)}
      critical_temperature: 550 degC
      required_resistance: 60 min""",
        "    checks:\n      - {result: time_to_critical, at_least: 60 min, source: R 60}"))
    block = package.block("SC1.member")
    assert "time_to_critical" not in block.output.results
    assert fill(block.output.absent["time_to_critical"], 3) == "not reached in 90.0 min"
    assert block.output.simulated_until == 90 * MIN
    assert block.checks[0].passed


def test_steel__at_least_check_beyond_duration_is_an_input_error(errors_of):
    errors = errors_of(steel_sheet("""\
      fire: standard
      duration: 30 min
      section_factor: 100 1/m
      protection: {thickness: 40 mm, conductivity: 0.1 W/(m*K), density: 300 kg/m^3,
                   specific_heat: 1200 J/(kg*K)}
      critical_temperature: 550 degC""",
        "    checks:\n      - {result: time_to_critical, at_least: 60 min, source: R 60}"))
    assert len(errors) == 1 and "beyond the simulated duration" in errors[0]


def test_steel__required_period_longer_than_duration_is_an_input_error(errors_of):
    errors = errors_of(steel_sheet(UNPROTECTED + "\n      required_resistance: 60 min"))
    assert len(errors) == 1
    assert errors[0].endswith("sc1.yaml:11:28: error: SC1.member.inputs.required_resistance: "
                              "outside the range of the method (expected a required period "
                              "within the duration (30 min), got '60 min')")


def test_steel__tabulated_fire_shorter_than_the_duration_is_located_at_duration(errors_of):
    # The physics names its own parameter (t, the time the fire is asked for); the kind's
    # input_names send it to the input the engineer can change.
    sheets = fire_sheet("""\
      curve: tabulated
      convection_coefficient: 25 W/(m^2*K)
      points:
        - ["0 min", "20 degC"]
        - ["30 min", "900 degC"]""")
    sheets.update(steel_sheet(UNPROTECTED.replace("fire: standard",
                                                  'fire: {ref: "FC1.fire.temperature"}')
                              .replace("30 min", "45 min")))
    errors = errors_of(sheets)
    assert len(errors) == 1
    assert "sc1.yaml:8:17: error: SC1.member.inputs.duration: outside the range of the method" \
        in errors[0] and "last time of the table" in errors[0]


def test_steel__critical_temperature_and_utilisation_exclusive(errors_of):
    errors = errors_of(steel_sheet(UNPROTECTED + "\n      critical_temperature: 500 degC"))
    assert any("exactly one of critical_temperature | utilisation" in e for e in errors)


def test_steel__section_factor_below_10_refused(errors_of):
    # EN 1993-1-2:2005 §4.2.5.1: at least 10 m⁻¹.
    errors = errors_of(steel_sheet(UNPROTECTED.replace("200 1/m", "8 1/m")))
    assert len(errors) == 1 and "'section_factor' out of range" in errors[0]


def test_steel__time_step_above_clause_limit_refused_at_the_input(errors_of):
    # EN 1993-1-2:2005 §4.2.5.1: Δt <= 5 s for an unprotected member.
    errors = errors_of(steel_sheet(UNPROTECTED + "\n      time_step: 10 s"))
    assert len(errors) == 1
    assert errors[0].endswith("sc1.yaml:11:18: error: SC1.member.inputs.time_step: outside the "
                              "range of the method (expected 0 s < Δt <= 5 s (EN 1993-1-2:2005 "
                              "§4.2.5.1), got '10 s')")


def test_steel__initial_temperature_below_20C_refused(errors_of):
    errors = errors_of(steel_sheet(UNPROTECTED + "\n      initial_temperature: -25 degC"))
    assert len(errors) == 1
    assert "sc1.yaml:11:28: error: SC1.member.inputs.initial_temperature: outside the range " \
        "of the method" in errors[0] and "starts at 20 °C" in errors[0]


def test_steel__protection_from_library_material(evaluate):
    block = evaluate(steel_sheet("""\
      fire: standard
      section_factor: 150 1/m
      protection: {material: gypsum_plasterboard, thickness: 25 mm}
      critical_temperature: 500 degC""")).block("SC1.member")
    assert "theta_max" in block.output.results
    # The library's properties enter φ in full, as given values.
    phi = steps_of(block)["phi"]
    assert phi.operands["rho_p"].given and phi.operands["d_p"].written == "25 mm"
    assert redo_all(block) == []


def test_steel__incomplete_protection_refused(errors_of):
    errors = errors_of(steel_sheet("""\
      fire: standard
      section_factor: 150 1/m
      protection: {thickness: 25 mm, conductivity: 0.2 W/(m*K)}
      critical_temperature: 500 degC"""))
    assert len(errors) == 1
    assert "the protection's properties are incomplete" in errors[0]
    assert "missing density, specific_heat" in errors[0]


def test_steel__inline_parametric_fire_refused_with_hint(errors_of):
    errors = errors_of(steel_sheet(UNPROTECTED.replace("fire: standard", "fire: parametric")))
    assert len(errors) == 1 and "unknown fire curve 'parametric'" in errors[0]
    assert "needs its own fire_curve block" in errors[0]


def test_steel__figure_marks_critical_temperature_and_required_period(evaluate):
    block = evaluate(steel_sheet(UNPROTECTED.replace("30 min", "60 min")
                                 + "\n      required_resistance: 30 min")).block("SC1.member")
    (figure,) = block.output.figures
    assert [(m.axis, m.at) for m in figure.marks] == [
        ("y", pytest.approx(block.output.results["theta_critical"].value)), ("x", 30 * MIN)]
    assert [line.label for line in figure.lines] == ["steel θa (unprotected)",
                                                     "gas θg (standard)"]
    drawn = draw(figure)
    assert "critical temperature" in drawn.svg and "required period" in drawn.svg
    assert drawn.caption.endswith("with the critical temperature θa,cr = 585 °C and the "
                                  "required period 30 min")


def test_fire_kinds__print_the_caution():
    # DESIGN.md, Safety: every fire result carries the caution.
    for name in ("fire_curve", "steel_member_heating"):
        caution = get_kind(name).caution
        assert "does not replace" in caution and "licensed engineer" in caution


def demo_package(evaluate):
    sheets = {path.stem: path.read_text() for path in sorted(DEMO_SHEETS.glob("fire-*.yaml"))
              if path.stem in ("fire-plant-room", "fire-steel-column")}
    assert len(sheets) == 2
    return evaluate(sheets)


def test_demo_fire_sheets__evaluate_and_pass(evaluate):
    package = demo_package(evaluate)
    column = package.block("SC1.column_r60")
    assert column.passed and len(column.checks) == 2
    burnout = package.block("SC1.column_plant_room")
    assert burnout.passed
    assert package.block("FC1.fire").output.results["t_max"].value > 0


@pytest.mark.parametrize("sig", [3, 4])
def test_demo_fire_sheets__every_printed_step_redoes_from_its_printed_numbers(evaluate, sig):
    package = demo_package(evaluate)
    blocks = [b for sheet in package.sheets for b in sheet.blocks]
    assert len(blocks) == 3
    for block in blocks:
        printed = block.printed_steps(sig)
        assert any("expr" in p.record() for p in printed), block.key
        assert redo_all(block, sig) == []


def test_fire_curve__stray_free_text_refused_at_the_curve(errors_of):
    errors = errors_of(fire_sheet("      curve: standard\n      points_source: ASTM E119"))
    assert len(errors) == 1
    assert errors[0].endswith("fc1.yaml:7:14: error: FC1.fire.inputs.points_source: input "
                              "'points_source' does not apply to curve 'standard' (expected "
                              "only the inputs of the chosen curve (docs/format.md, fire_curve), got "
                              "'ASTM E119')")


def test_fire_curve_tabulated__highest_at_an_end_between_points(evaluate):
    block = evaluate(fire_sheet(E119 + "\n      duration: 45 min")).block("FC1.fire")
    # Rising from 1550 °F at 30 min to 1625 °F at 45 min (ASTM E119 points, from memory): the
    # highest temperature within 45 min is the interpolated end, 885.0 °C, at 45 min.
    results = block.output.results
    assert results["theta_max"].value - K == pytest.approx(885.0, abs=0.01)
    assert results["t_max"].value == 45 * MIN
    assert "highest at the end" in str(steps_of(block)["theta_g_max"].statement)


def test_fire_field__records_the_curve_as_a_phrase_with_its_clause(evaluate):
    block = evaluate(steel_sheet(UNPROTECTED)).block("SC1.member")
    record = next(r for r in block.inputs if r.path == "fire")
    # EN 1991-1-2:2002 §3.2.1: the standard curve, with αc = 25 W/(m²·K).
    assert fill(record.shown, 3) == "standard temperature-time curve, αc = 25 W/(m²·K)"
    assert record.source == "EN 1991-1-2:2002 §3.2.1, eq. (3.4)" and record.si == "standard"
