"""The fire_curve and steel_member_heating kinds: inputs as FORMAT.md names them, located errors,
results against the standards, the fire passed by reference as the curve itself, and figures."""

import math
from pathlib import Path

import pytest

from calcdoc.kinds import get_kind
from calcdoc.physics.firecurves import FireCurve

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


def test_fire_curve_parametric__hand_check_annex_a_and_steps(evaluate):
    package = evaluate(fire_sheet(PARAMETRIC))
    block = package.block("FC1.fire")
    # Hand calculation in tests/test_physics_firecurves.py (EN 1991-1-2:2002 Annex A):
    # Γ = 3.0276, t_max = 1.000 h (ventilation controlled), θmax = 1109.1 °C.
    assert block.output.results["theta_max"].value - K == pytest.approx(1109.1, abs=0.05)
    assert block.output.results["t_max"].value == pytest.approx(3600.0, abs=1e-6)
    # Cooling to 20 °C by 2.439 h < 180 min: the end is ambient.
    assert block.output.results["theta_end"].value - K == pytest.approx(20.0, abs=1e-9)
    symbols = [s.symbol for s in block.output.steps]
    assert r"\Gamma" in symbols and r"\theta_{max}" in symbols and "r" in symbols
    sources = " ".join(s.source for s in block.output.steps)
    assert "(A.2b)" in sources and "(A.7)" in sources and "(A.1)" in sources
    assert any("informative" in n["text"] and "roof" in n["text"] for n in block.output.notes)


def test_fire_curve_parametric_fuel_controlled__shows_k_factor(evaluate):
    inputs = PARAMETRIC.replace("0.06 m^0.5", "0.10 m^0.5").replace("300 MJ", "60 MJ") \
        .replace("1000 J", "800 J").replace("medium", "fast")
    block = evaluate(fire_sheet(inputs)).block("FC1.fire")
    # Hand calculation (EN 1991-1-2:2002 Annex A, eqs. (A.8)–(A.10) with k): θmax = 704.3 °C.
    assert block.output.results["theta_max"].value - K == pytest.approx(704.3, abs=0.05)
    symbols = [s.symbol for s in block.output.steps]
    assert "k" in symbols and r"O_{lim}" in symbols and r"\Gamma_{lim}" in symbols


def test_fire_curve_tabulated__astm_e119_points_in_degF(evaluate):
    # ASTM E119 table points, from memory: 0 min 68 °F, 5 min 1000 °F (538 °C), 10 min 1300 °F
    # (704 °C), 30 min 1550 °F (843 °C), 60 min 1700 °F (927 °C).
    package = evaluate(fire_sheet("""\
      curve: tabulated
      convection_coefficient: 25 W/(m^2*K)
      points_source: ASTM E119 table (from memory)
      points:
        - ["0 min", "68 degF"]
        - ["5 min", "1000 degF"]
        - ["10 min", "1300 degF"]
        - ["30 min", "1550 degF"]
        - ["60 min", "1700 degF"]"""))
    block = package.block("FC1.fire")
    assert block.output.results["theta_max"].value - K == pytest.approx(927.0, abs=0.6)
    curve = block.output.series["temperature"].obj
    assert curve.duration == 60 * MIN  # the table's end when no duration is given
    assert curve(45 * MIN) - K == pytest.approx(885.0, abs=0.01)  # linear: 1625 °F


def test_fire_curve_tabulated__needs_a_convection_coefficient(errors_of):
    errors = errors_of(fire_sheet("""\
      curve: tabulated
      points:
        - ["0 min", "20 degC"]
        - ["10 min", "700 degC"]"""))
    assert len(errors) == 1
    assert "FC1.fire.inputs.curve: curve 'tabulated' needs its points and a convection " \
           "coefficient" in errors[0]
    assert "missing convection_coefficient" in errors[0]


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
    assert any("points[2][0]: times are not strictly increasing" in e for e in errors)


def test_fire_curve_tabulated__duration_beyond_table_refused(errors_of):
    errors = errors_of(fire_sheet("""\
      curve: tabulated
      duration: 90 min
      convection_coefficient: 25 W/(m^2*K)
      points:
        - ["0 min", "20 degC"]
        - ["60 min", "900 degC"]"""))
    assert len(errors) == 1 and "duration is outside the range of the method" in errors[0]
    assert "last time of the table" in errors[0]


def test_fire_curve_parametric__missing_annex_a_inputs_listed(errors_of):
    errors = errors_of(fire_sheet("      curve: parametric\n      opening_factor: 0.04 m^0.5"))
    assert len(errors) == 1
    assert "missing fire_load_density, thermal_inertia, fire_growth, floor_area, height" \
        in errors[0]


def test_fire_curve_parametric__floor_area_above_500_m2_refused(errors_of):
    # EN 1991-1-2:2002 Annex A: floor area up to 500 m².
    errors = errors_of(fire_sheet(PARAMETRIC.replace("100 m^2", "600 m^2")))
    assert len(errors) == 1
    assert "FC1.fire.inputs.floor_area: 'floor_area' out of range" in errors[0]
    assert "expected floor_area <= 500.000 m², got '600 m^2'" in errors[0]


def test_fire_curve__input_of_another_curve_refused(errors_of):
    errors = errors_of(fire_sheet("      curve: standard\n      opening_factor: 0.04 m^0.5"))
    assert len(errors) == 1
    assert "input 'opening_factor' does not apply to curve 'standard'" in errors[0]


def test_fire_curve__own_convection_coefficient_overrides_the_curves(evaluate):
    package = evaluate(fire_sheet("      curve: hydrocarbon\n      convection_coefficient: "
                                  "40 W/(m^2*K)"))
    curve = package.block("FC1.fire").output.series["temperature"].obj
    assert curve.convection_coefficient == 40.0


def test_fire_curve__figure_is_svg(evaluate):
    block = evaluate(fire_sheet(PARAMETRIC)).block("FC1.fire")
    figures = block.kind.figures(block)
    assert len(figures) == 1 and figures[0].svg.startswith("<svg")
    assert "t_max" in figures[0].svg


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
    # §4.2.4: eq. (4.22) not for members where stability governs; the report says so.
    assert any("§4.2.4" in w["source"] and "columns" in w["message"]
               for w in block.output.warnings)
    assert block.output.results["time_to_critical"].value < 30 * MIN


def test_steel_unprotected__hand_calculation_of_the_shown_step(evaluate):
    block = evaluate(steel_sheet(UNPROTECTED)).block("SC1.member")
    data = block.output.figure_data["steel"]
    steps = {s.symbol: s for s in block.output.steps}
    # The report shows one step by hand; recompute it from EN 1993-1-2 eqs. (3.2a), (4.25) and
    # EN 1991-1-2 eqs. (3.1)–(3.3), at the state the report prints (θg, θa at the start).
    i = next(n for n, t in enumerate(data["steel"]) if t >= data["theta_critical"]) - 1
    theta_g, theta_a = data["gas"][i], data["steel"][i]
    c = theta_a - K
    assert c < 600.0
    c_a = 425 + 0.773 * c - 1.69e-3 * c ** 2 + 2.22e-6 * c ** 3                 # eq. (3.2a)
    h_net = 25 * (theta_g - theta_a) + 0.7 * 5.670374419e-8 * (theta_g ** 4 - theta_a ** 4)
    delta = 200 / (c_a * 7850) * h_net * 5.0                                     # eq. (4.25)
    assert steps["c_a"].value_si == pytest.approx(c_a, rel=1e-9)
    assert steps[r"\dot h_{net}"].value_si == pytest.approx(h_net, rel=1e-9)
    assert steps[r"\Delta\theta_{a,t}"].value_si == pytest.approx(delta, rel=1e-9)
    assert data["steel"][i + 1] - data["steel"][i] == pytest.approx(delta, rel=1e-9)


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
    data = block.output.figure_data["steel"]
    # The duration defaults to the fire's (180 min); the steel peaks after the gas peak (1 h)
    # and cools (common practice for protected steel).
    assert data["duration"] == 180 * MIN
    peak = data["time"][max(range(len(data["steel"])), key=data["steel"].__getitem__)]
    assert peak > 3600.0
    assert any("eq. (4.27)" in n["source"] or "eq. (4.27)" in n["text"]
               for n in block.output.notes)
    assert block.inputs[0].origin == "ref" and block.inputs[0].ref == "FC1.fire.temperature"


def test_steel_protected__hand_calculation_of_the_shown_step(evaluate):
    block = evaluate(steel_sheet("""\
      fire: standard
      section_factor: 150 1/m
      protection: {thickness: 20 mm, conductivity: 0.12 W/(m*K), density: 300 kg/m^3,
                   specific_heat: 1200 J/(kg*K)}
      critical_temperature: 500 degC
      required_resistance: 60 min""")).block("SC1.member")
    data = block.output.figure_data["steel"]
    steps = {s.symbol: s for s in block.output.steps}
    i = next(n for n, t in enumerate(data["steel"]) if t >= data["theta_critical"]) - 1
    theta_g, theta_g1, theta_a = data["gas"][i], data["gas"][i + 1], data["steel"][i]
    c = theta_a - K
    c_a = 425 + 0.773 * c - 1.69e-3 * c ** 2 + 2.22e-6 * c ** 3                 # eq. (3.2a)
    phi = 1200 * 300 / (c_a * 7850) * 0.020 * 150                                # eq. (4.28)
    delta = (0.12 * 150 * (theta_g - theta_a) / (0.020 * c_a * 7850 * (1 + phi / 3)) * 30
             - (math.exp(phi / 10) - 1) * (theta_g1 - theta_g))                  # eq. (4.27)
    assert steps[r"\phi"].value_si == pytest.approx(phi, rel=1e-9)
    assert steps[r"\Delta\theta_{a,t}"].value_si == pytest.approx(delta, rel=1e-9)
    # Time to θcr by linear interpolation between the two steps (FORMAT.md).
    t_cr = data["time"][i] + 30 * (data["theta_critical"] - theta_a) / (
        data["steel"][i + 1] - theta_a)
    assert block.output.results["time_to_critical"].value == pytest.approx(t_cr, rel=1e-12)


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
    assert block.output.absent["time_to_critical"] == "not reached in 90.0 min"
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
    assert "SC1.member: required_resistance is outside the range of the method" in errors[0]
    assert "within the duration (30.00 min)" in errors[0]


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
    assert "time_step is outside the range of the method" in errors[0]
    assert "§4.2.5.1" in errors[0]


def test_steel__initial_temperature_below_20C_refused(errors_of):
    errors = errors_of(steel_sheet(UNPROTECTED + "\n      initial_temperature: -25 degC"))
    assert len(errors) == 1 and "initial_temperature is outside the range" in errors[0]


def test_steel__protection_from_library_material(evaluate):
    block = evaluate(steel_sheet("""\
      fire: standard
      section_factor: 150 1/m
      protection: {material: gypsum_plasterboard, thickness: 25 mm}
      critical_temperature: 500 degC""")).block("SC1.member")
    assert "theta_max" in block.output.results


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
    svg = block.kind.figures(block)[0].svg
    assert "critical" in svg and "required 30 min" in svg


def test_fire_kinds__print_the_caution():
    # DESIGN.md, Safety: every fire result carries the caution.
    for name in ("fire_curve", "steel_member_heating"):
        caution = get_kind(name).caution
        assert "does not replace" in caution and "licensed engineer" in caution


def test_demo_fire_sheets__evaluate_and_pass(evaluate):
    sheets = {path.stem: path.read_text() for path in sorted(DEMO_SHEETS.glob("fire-*.yaml"))
              if path.stem in ("fire-plant-room", "fire-steel-column")}
    assert len(sheets) == 2
    package = evaluate(sheets)
    column = package.block("SC1.column_r60")
    assert column.passed and len(column.checks) == 2
    burnout = package.block("SC1.column_plant_room")
    assert burnout.passed
    assert package.block("FC1.fire").output.results["t_max"].value > 0
