"""The interstitial_condensation kind (ISO 13788:2012 monthly method, Glaser), evaluated from
sheets written inline.

Check values are the hand calculations of tests/test_physics_glaser.py (worked in its comments
from the method as docs/format.md states it: conduction in series, the Annex E saturation pressure,
the tautest line, g = δ0·[(p_l − p_c)/s_l − (p_c − p_r)/s_r], δ0 = 2.0e-10 kg/(m·s·Pa)), the
same invented walls and climates written as sheets, and hand calculations of the same kind in
the comments here. Bad inputs are asserted word for word (FILE:LINE:COL, exit 2, nothing
written), every printed step is re-done with tests/test_redo.py's own evaluator, and the figures
are checked as data.
"""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

import pytest

from calcdoc.cli import main
from calcdoc.kinds import registry
from calcdoc.kinds.condensation import MAX_SLICES
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill, print_check
from conftest import write_project
from test_redo import redo

C = 273.15  # K at 0 °C (definition of the Celsius scale)
ROOT = Path(__file__).resolve().parent.parent
MONTHS = ("January", "February", "March", "April", "May", "June", "July", "August",
          "September", "October", "November", "December")


def layer(name: str, thickness: str, R: float, s_d: float) -> str:
    """A layer line of a sheet: thermal resistance and s_d as given."""
    return (f"        - {{name: {name}, thickness: {thickness}, resistance: {R} m^2*K/W, "
            f"equivalent_air_thickness: {s_d} m}}")


# Wall A of tests/test_physics_glaser.py (invented): insulation R 2.5 m²K/W, s_d 0.1 m inside, a
# board R 0.1 m²K/W, s_d 2.0 m outside; R_si 0.13, R_se 0.04 (ISO 6946:2017 Table 7, the
# defaults for horizontal heat flow).
WALL_A = "\n".join([layer("insulation", "100 mm", 2.5, 0.1), layer("board", "10 mm", 0.1, 2.0)])
# Wall B (invented, the physics tests): as wall A with s_d 1.0 m inside and 20 m outside.
WALL_B = "\n".join([layer("insulation", "100 mm", 2.5, 1.0), layer("board", "10 mm", 0.1, 20)])
# Two condensation interfaces (the physics tests): insulation, membrane, insulation, board.
WALL_TWO = "\n".join([layer("inner insulation", "50 mm", 1.5, 0.1),
                      layer("membrane", "1 mm", 0.05, 1.0),
                      layer("outer insulation", "40 mm", 1.0, 0.1),
                      layer("tight board", "10 mm", 0.1, 5.0)])
# A vapour control layer on the warm side (the physics tests; common practice).
WALL_VCL = "\n".join([layer("lining", "15 mm", 0.06, 100), layer("wool", "100 mm", 2.5, 0.1),
                      layer("breather board", "10 mm", 0.1, 0.1)])
SLAB = layer("slab", "100 mm", 2.5, 1)


def climate(outside_c, outside_phi=80, inside_c=20, inside_phi=50) -> str:
    """Twelve climate rows, January first; a scalar is the same every month."""
    def monthly(v):
        return list(v) if isinstance(v, (list, tuple)) else [v] * 12
    rows = zip(MONTHS, monthly(inside_c), monthly(inside_phi), monthly(outside_c),
               monthly(outside_phi))
    return "\n".join(
        f"        - {{month: {m}, inside_temperature: {ti} degC, inside_relative_humidity: "
        f"{pi} %, outside_temperature: {te} degC, outside_relative_humidity: {pe} %}}"
        for m, ti, pi, te, pe in rows)


def sheet(layers: str, rows: str, extra: str = "") -> dict[str, str]:
    return {"s": "id: S\ntitle: Test sheet\nblocks:\n  - id: ic\n    kind: "
                 "interstitial_condensation\n    inputs:\n      layers:\n" + layers +
                 "\n      climate:\n" + rows + "\n" + extra}


def results(block) -> dict:
    return {name: r.value for name, r in block.output.results.items()}


def printed(block, sig: int = 3) -> dict:
    return {s.name: s for s in block.printed_steps(sig)}


def raw(block) -> dict:
    return {s.name: s for s in block.output.steps}


def texts(entries) -> list[str]:
    return [fill(e["text"], 3) for e in entries]


def redo_all(block) -> list[str]:
    """Every printed formula step re-done from its printed numbers (tests/test_redo.py)."""
    wrong = []
    for step in block.printed_steps(3):
        record = step.record()
        if "expr" not in record:
            continue
        again, shown, half = redo(record)
        if not abs(again - shown) <= half * (1 + 1e-9) + 1e-300:
            wrong.append(f"{record['name']} = {record['expr']}: {again!r}, printed "
                         f"{record['result']}")
    return wrong


# Wall A, outside 0 °C, 80 % from December to February, 15 °C, 80 % otherwise; inside 20 °C,
# 50 % all year (tests/test_physics_glaser.py).
A_YEAR = climate([0, 0] + [15] * 9 + [0])


@pytest.fixture
def wall_a(evaluate):
    return evaluate(sheet(WALL_A, A_YEAR)).block("S.ic")


# --- results against the hand calculations ---------------------------------------------------

def test_wall_a_year__hand_calculation_starts_in_december_and_dries_out(wall_a):
    # Hand calculation (tests/test_physics_glaser.py): g = 1.0063e-6 kg/(m²·s) condensing,
    # −1.1646e-6 evaporating; Dec 2.6953, Jan 5.3906, Feb 7.8250, Mar 4.7058, Apr 1.6871,
    # May 0 (evaporation limited to what is there) kg/m²; the maximum at the end of February.
    r = results(wall_a)
    assert r["max_accumulated"] == pytest.approx(7.8250, abs=5e-4)  # hand calculation
    assert r["month_of_max"] == 2  # February, hand calculation
    assert r["end_of_year_accumulated"] == 0.0
    assert r["dries_out"] == 1
    shown = raw(wall_a)
    assert shown["m_0"].result.si == 12  # docs/format.md start-month rule: December after November
    assert [shown[f"M_{j}"].result.si for j in range(1, 7)] == pytest.approx(
        [2.6953, 5.3906, 7.8250, 4.7058, 1.6871, 0.0], abs=5e-4)  # hand calculation
    assert [shown[f"M_{j}"].item for j in (1, 2, 12)] == ["December", "January", "November"]
    series = wall_a.output.series
    assert series["accumulated"].y[:3] == pytest.approx([2.6953, 5.3906, 7.8250], abs=5e-4)
    assert sum(series["monthly_balance"].y) == pytest.approx(0.0, abs=1e-12)  # all evaporated
    assert series["monthly_balance"].y[5] == pytest.approx(-1.6871, abs=5e-4)  # hand, limited


def test_wall_a__worst_month_rate_written_out_with_delta_0_as_a_given_operand(wall_a):
    # Hand calculation, February (0 °C, 80 %): θ at the interface 1.0108 °C, p_sat 656.90 Pa
    # (Annex E), p_i = 0.5 · 2337.0 = 1168.5 Pa, p_e = 0.8 · 610.5 = 488.40 Pa;
    # g = 2.0e-10·[(1168.48 − 656.90)/0.1 − (656.90 − 488.40)/2.0] = 1.0063e-6 kg/(m²·s).
    steps = raw(wall_a)
    g = steps["g_c"]
    assert g.expr == "delta_0 * ((p_i - p_c) / s_i - (p_c - p_e) / s_e)"
    assert g.result.si == pytest.approx(1.0063e-6, rel=5e-5)  # hand calculation
    assert g.operands["delta_0"].si == 2.0e-10  # docs/format.md: δ0 = 2.0 × 10⁻¹⁰ kg/(m·s·Pa)
    assert g.operands["delta_0"].given
    assert steps["theta_1"].result.si - C == pytest.approx(1.0108, abs=5e-5)  # hand
    assert steps["p_sat_1"].result.si == pytest.approx(656.90, abs=0.005)  # hand, Annex E
    assert steps["p_i"].result.si == pytest.approx(1168.5, abs=0.05)  # hand calculation
    assert steps["p_e"].result.si == pytest.approx(488.40, abs=0.005)  # hand calculation
    assert (steps["s_i"].result.si, steps["s_e"].result.si) == pytest.approx((0.1, 2.0))
    shown = printed(wall_a)["g_c"]
    assert shown.values["delta_0"].text == "2×10⁻¹⁰ kg/(m·s·Pa)"
    assert fill(g.label, 3) == ("Condensation rate at insulation | board, where the vapour "
                                "pressure line touches saturation (p_c = p_sat,1)")
    assert "February" in fill(steps["q"].label, 3)


def test_wall_b_year__does_not_dry_out_and_says_so(evaluate):
    # Hand calculation (tests/test_physics_glaser.py): condensation November to March at
    # 1.00631e-7 kg/(m²·s), 1.3129 kg/m² by the end of March; evaporation April to October at
    # −2.3081e-8 kg/(m²·s), 0.8861 kg/m² left at the end of October.
    block = evaluate(sheet(WALL_B, climate([0] * 3 + [10] * 7 + [0] * 2))).block("S.ic")
    r = results(block)
    assert r["max_accumulated"] == pytest.approx(1.3129, abs=5e-5)  # hand calculation
    assert r["month_of_max"] == 3  # March, hand calculation
    assert r["end_of_year_accumulated"] == pytest.approx(0.8861, abs=5e-5)  # hand calculation
    assert r["dries_out"] == 0
    assert raw(block)["m_0"].result.si == 11  # docs/format.md rule: November after October
    assert texts(block.output.warnings) == [
        "The element does not dry out: 0.886 kg/m² remains after the year and accumulates "
        "year on year, which the method does not accept."]
    assert printed(block)["D"].statement == ("0: 0.886 kg/m² remains at the end of the year "
                                             "and accumulates year on year")


def test_condensation_every_month__year_starts_in_january_by_convention(evaluate):
    # Wall A at 0 °C, 80 % all year: 1.0063e-6 kg/(m²·s) · 365 · 86400 s = 31.73 kg/m²
    # (hand calculation, tests/test_physics_glaser.py); docs/format.md is silent on the start of such
    # a year: calcdoc's convention is January, and the statement says so.
    block = evaluate(sheet(WALL_A, climate(0))).block("S.ic")
    r = results(block)
    assert r["end_of_year_accumulated"] == pytest.approx(31.73, abs=0.005)  # hand calculation
    assert r["month_of_max"] == 12 and r["dries_out"] == 0
    start = raw(block)["m_0"]
    assert start.result.si == 1 and start.source.startswith("calcdoc convention")


def test_two_interfaces__both_rates_written_out_against_the_hand_calculation(evaluate):
    # Hand calculation (tests/test_physics_glaser.py), inside 20 °C, 50 %, outside 0 °C, 80 %:
    # the line touches at the first insulation's outer face (p_sat 1104.74 Pa) and at the tight
    # board (656.05 Pa), not at the membrane's outer face (696.84 < 1078.44 Pa);
    #   g_a = 2.0e-10·(637.34 − 407.90) = 4.5887e-8,  g_b = 2.0e-10·(407.90 − 33.53)
    #   = 7.4875e-8 kg/(m²·s); every month alike, so after the year
    #   (4.5887e-8 + 7.4875e-8) · 365 · 86400 = 3.8084 kg/m².
    block = evaluate(sheet(WALL_TWO, climate(0))).block("S.ic")
    steps = raw(block)
    assert steps["g_a"].expr == "delta_0 * ((p_i - p_a) / s_ia - (p_a - p_b) / s_ab)"
    assert steps["g_b"].expr == "delta_0 * ((p_a - p_b) / s_ab - (p_b - p_e) / s_be)"
    assert steps["g_a"].result.si == pytest.approx(4.5887e-8, rel=5e-5)  # hand calculation
    assert steps["g_b"].result.si == pytest.approx(7.4875e-8, rel=5e-5)  # hand calculation
    assert steps["s_ab"].result.si == pytest.approx(1.1)  # membrane and outer insulation
    assert results(block)["end_of_year_accumulated"] == pytest.approx(3.8084, abs=5e-4)
    # The month's statement gives the rate and the moisture held at each interface.
    january = printed(block)["M_1"].statement
    assert "g = 4.59×10⁻⁸ kg/(m²·s), 7.49×10⁻⁸ kg/(m²·s)" in january


def test_no_condensation__zero_one_absent_month_and_the_nearest_plane_written_out(evaluate):
    # Vapour control layer on the warm side (common practice; tests/test_physics_glaser.py),
    # outside −5 … 15 °C, 90 %. Nearest to saturation: June (15 °C), at wool | breather board.
    # Hand calculation: θ = 20 − (5/2.83)·2.69 = 15.2473 °C, p_sat = 1731.7 Pa (Annex E);
    # p_e = 0.9 · 1704.4 = 1533.97 Pa; straight line at s = 100.1 of 100.2 m:
    # 1533.97 + (1168.48 − 1533.97)·0.1/100.2 = 1533.60 Pa; φ = 1533.60/1731.7 = 88.56 %.
    outside = [-5, -4, 0, 5, 10, 15, 15, 15, 10, 5, 0, -3]
    block = evaluate(sheet(WALL_VCL, climate(outside, 90))).block("S.ic")
    r = results(block)
    assert (r["max_accumulated"], r["end_of_year_accumulated"], r["dries_out"]) == (0, 0, 1)
    assert "month_of_max" not in r
    assert fill(block.output.absent["month_of_max"], 3) == "no condensation in any month"
    assert ("No condensation is predicted in any month: with every interface dry, the vapour "
            "pressure line lies below saturation at every plane all year, so no moisture "
            "accumulates and the element dries out.") in texts(block.output.notes)
    steps = raw(block)
    assert steps["p_k"].result.si == pytest.approx(1533.60, abs=0.005)  # hand calculation
    assert steps["varphi_k"].result.si == pytest.approx(0.8856, abs=5e-5)  # hand calculation
    assert "wool | breather board" in fill(steps["varphi_k"].label, 3)
    assert "June" in fill(steps["q"].label, 3)
    assert [steps[f"varphi_max_{m}"].item for m in (1, 12)] == ["January", "December"]
    assert all(steps[f"varphi_max_{m}"].result.si < 1 for m in range(1, 13))
    assert len(block.output.figures) == 1  # no accumulation to draw


def test_heat_flow_upward__iso6946_table7_inside_resistance_enters_r_t(evaluate):
    # ISO 6946:2017 Table 7: R_si 0.10 for upward heat flow; 0.10 + 2.5 + 0.1 + 0.04 = 2.74.
    block = evaluate(sheet(WALL_A, A_YEAR, "      heat_flow: upward\n")).block("S.ic")
    assert raw(block)["R_T"].result.si == pytest.approx(2.74)  # ISO 6946:2017 Table 7


# --- thick layers ---------------------------------------------------------------------------

def test_thick_layers__slices_untouched_so_the_working_is_at_the_faces(wall_a):
    # Insulation of 2.5 m²K/W: ten slices of 0.25 (ISO 13788 subdivision, recalled). None
    # reaches saturation in any month, so the working is written at the two faces and a
    # statement gives the highest relative humidity at a slice plane.
    assert ("Thick layers: each layer above 0.25 m²·K/W is divided into the least number of "
            "equal slices of at most 0.25 m²·K/W each, so that saturation is tested inside it "
            "as well as at its faces: insulation, 10 slices.") in texts(wall_a.output.notes)
    steps = raw(wall_a)
    assert {n for n in steps if re.fullmatch(r"theta_\d+", n)} == {"theta_0", "theta_1",
                                                                   "theta_2"}
    assert steps["varphi_sl"].result.si < 1
    assert steps["theta_1"].expr == "theta_0 - q * R_1"
    assert steps["varphi_sl"].source.value.startswith("layers above 0.25 m²·K/W")
    assert not steps["varphi_sl"].source.confirmed  # a recalled clause is data


def test_thick_single_layer__condensation_inside_it_found_through_the_slices(evaluate):
    # One homogeneous layer has no interface: without slices nothing could condense in it.
    # Hand calculation, R 2.5 m²K/W, s_d 1 m, inside 20 °C, 70 %, outside −10 °C, 100 %:
    # R_T = 2.67, q = 30/2.67 = 11.236 W/m²; at mid-thickness θ = 20 − 11.236·1.38 = 4.494 °C,
    # p_sat = 610.5·exp(17.269·4.494/241.794) = 841.6 Pa (Annex E); p_i = 0.7·2337.0 =
    # 1635.9 Pa, p_e = 610.5·exp(21.875·(−10)/255.5) = 259.3 Pa (over ice); the straight line
    # at mid-thickness is (1635.9 + 259.3)/2 = 947.6 Pa > 841.6 Pa: it would cross saturation.
    block = evaluate(sheet(SLAB, climate(-10, 100, 20, 70))).block("S.ic")
    r = results(block)
    assert r["max_accumulated"] > 0 and r["dries_out"] == 0
    steps = raw(block)
    assert steps["dR_1"].expr == "R_1 / n_1" and steps["dR_1"].result.si == pytest.approx(0.25)
    assert steps["p_sat_5"].result.si == pytest.approx(841.6, abs=0.05)  # hand, Annex E
    assert steps["theta_5"].expr == "theta_4 - q * dR_5"  # every slice plane written out
    touched = [fill(s.label, 3) for s in block.output.steps if re.fullmatch(r"g_\w", s.name)]
    assert touched and all("slab at" in t for t in touched)


def test_too_many_slices__refused_where_the_layer_is_written(tmp_path, capsys):
    status, err = run_build(tmp_path, capsys,
                            sheet(layer("block of foam", "2 m", 60, 10), climate(0)))
    assert status == 2
    assert err[0] == (
        f"proj/sheets/s.yaml:8:44: error: S.ic.inputs.layers[0]: the element divides into 240 "
        f"slices of at most 0.25 m²·K/W (expected at most {MAX_SLICES} slices (layers of up to "
        f"50 m²·K/W in all), got block of foam in 240 slices)")


# --- library materials ----------------------------------------------------------------------

def test_library_vapour_properties__mu_times_d_a_given_mu_wins_and_a_membrane_s_d(evaluate):
    # s_d = μ·d (ISO 13788, definition): 10 · 12.5 mm = 0.125 m with the library's μ of
    # plasterboard; a μ written on the layer replaces the library's (3 · 100 mm = 0.3 m); the
    # breather membrane's declared s_d enters as the library gives it.
    layers = """\
        - {name: board, thickness: 12.5 mm, material: gypsum_plasterboard}
        - {name: wool, thickness: 100 mm, material: mineral_wool, vapour_resistance_factor: 3}
        - {name: membrane, thickness: 0.5 mm, material: breather_membrane}
        - {name: cladding, thickness: 20 mm, conductivity: 0.13 W/(m*K),
           vapour_resistance_factor: 50}"""
    block = evaluate(sheet(layers, A_YEAR)).block("S.ic")
    steps = raw(block)
    assert steps["s_d_1"].result.si == pytest.approx(0.125)  # 10 · 12.5 mm
    assert steps["s_d_1"].operands["mu_1"].origin == "materials.gypsum_plasterboard." \
                                                     "vapour_resistance_factor"
    assert steps["s_d_2"].result.si == pytest.approx(0.3)  # 3 · 100 mm, μ as written
    assert printed(block)["s_d_2"].values["mu_2"].text == "3"
    assert "s_d_3" not in steps
    assert any("s_d 0.05 m of the library's Breather membrane" in t
               for t in texts(block.output.notes))
    used = {v.origin for s in block.output.steps for v in s.operands.values() if v.origin}
    assert "materials.breather_membrane.equivalent_air_thickness" in used


# --- printed working and figures --------------------------------------------------------------

@pytest.mark.parametrize("layers, rows", [
    (WALL_A, A_YEAR),
    (WALL_B, climate([0] * 3 + [10] * 7 + [0] * 2)),
    (WALL_TWO, climate(0)),
    (WALL_VCL, climate([-5, -4, 0, 5, 10, 15, 15, 15, 10, 5, 0, -3], 90)),
    (SLAB, climate(-10, 100, 20, 70)),
])
def test_every_printed_step_redoes_from_its_printed_numbers(evaluate, layers, rows):
    block = evaluate(sheet(layers, rows)).block("S.ic")
    assert redo_all(block) == []
    assert len([s for s in block.output.steps if s.expr]) >= 8


def test_monthly_table__one_statement_a_month_with_the_air_the_rate_and_the_moisture(wall_a):
    rows = [s for s in wall_a.printed_steps(3) if re.fullmatch(r"M_\d+", s.name)]
    assert [s.item for s in rows] == list(MONTHS[11:] + MONTHS[:11])
    assert len({s.group for s in rows}) == 1
    assert rows[0].statement == ("20 °C, 50 % inside, 0 °C, 80 % outside; g = 1.01×10⁻⁶ "
                                 "kg/(m²·s), t = 31 d")
    assert rows[4].statement.endswith("g = −1.16×10⁻⁶ kg/(m²·s), t = 30 d")  # April


def test_figures__vapour_pressure_diagram_and_accumulation_as_data(wall_a):
    diagram, accumulation = wall_a.output.figures
    assert (diagram.x.unit, diagram.y.unit) == ("m", "Pa")
    assert [v for b in diagram.bands for v in (b.x0, b.x1)] == pytest.approx([0, 0.1, 0.1, 2.1])
    saturation, vapour = diagram.lines
    assert saturation.x[0] == 0.0 and saturation.x[-1] == pytest.approx(2.1)
    assert vapour.y[0] == pytest.approx(1168.5, abs=0.05)  # p_i, hand calculation
    assert vapour.y[-1] == pytest.approx(488.40, abs=0.005)  # p_e, hand calculation
    (point,) = diagram.points
    assert point.x == pytest.approx(0.1) and point.y == pytest.approx(656.90, abs=0.005)
    assert fill(point.label, 3) == ("condensation at insulation | board: g = 1.01×10⁻⁶ "
                                    "kg/(m²·s)")
    assert accumulation.x.unit == "1" and accumulation.y.unit == "kg/m^2"
    (line,) = accumulation.lines
    assert line.x == tuple(float(v) for v in range(13))
    assert line.y[:4] == pytest.approx((0.0, 2.6953, 5.3906, 7.8250), abs=5e-4)  # hand
    assert draw(accumulation).half  # the second figure stands beside another


def test_whole_number_results_print_as_whole_numbers(wall_a):
    assert printed(wall_a)["m_max"].result.text == "2"
    assert printed(wall_a)["D"].result.text == "1"
    assert wall_a.output.value_of("dries_out").given


def test_kind_declares_the_format_md_names_and_a_caution():
    kind = registry()["interstitial_condensation"]
    assert [f.name for f in kind.inputs] == ["layers", "heat_flow", "inside_surface_resistance",
                                             "outside_surface_resistance", "climate"]
    assert [r.name for r in kind.results] == ["max_accumulated", "month_of_max",
                                              "end_of_year_accumulated", "dries_out"]
    assert "licensed engineer" in kind.caution and "local code" in kind.caution


# --- bad input, word for word ------------------------------------------------------------------

def run_build(tmp_path, capsys, sheets):
    """Build a project; return (status, stderr lines); nothing may be written."""
    write_project(tmp_path / "proj", sheets)
    status = main(["build", "proj", "--out", "out", "--no-pdf"])
    err = capsys.readouterr().err
    assert "Traceback" not in err
    assert not (tmp_path / "out").exists(), "nothing may be written on bad input"
    return status, err.splitlines()


def _rows(**changes) -> str:
    """The climate of wall A's year with some months' entries changed (index → key: text)."""
    lines = A_YEAR.splitlines()
    for index, (key, text) in changes.items():
        lines[int(index)] = re.sub(rf"{key}: [^,}}]+", f"{key}: {text}", lines[int(index)])
    return "\n".join(lines)


@pytest.mark.parametrize("layers, rows, expected", [
    (WALL_A, "\n".join(A_YEAR.splitlines()[:11]),
     ["proj/sheets/s.yaml:11:9: error: S.ic.inputs.climate: the climate needs twelve months "
      "(expected exactly 12 entries, January to December in calendar order, got 11 entries)"]),
    (WALL_A, _rows(**{"0": ("month", "February"), "1": ("month", "January")}),
     ["proj/sheets/s.yaml:11:19: error: S.ic.inputs.climate[0].month: months out of calendar "
      "order (expected January (entry 1 of 12, January first), got 'February')",
      "proj/sheets/s.yaml:12:19: error: S.ic.inputs.climate[1].month: months out of calendar "
      "order (expected February (entry 2 of 12, January first), got 'January')"]),
    (WALL_A, _rows(**{"1": ("month", "Febuary")}),
     ["proj/sheets/s.yaml:12:19: error: S.ic.inputs.climate[1].month: unknown month 'Febuary' "
      "(expected February (entry 2 of 12, January first), got 'Febuary'); hint: did you mean "
      "'February'?"]),
    ("        - {name: insulation, thickness: 100 mm, conductivity: 0.04 W/(m*K)}", A_YEAR,
     ["proj/sheets/s.yaml:8:11: error: S.ic.inputs.layers[0]: no vapour resistance for layer "
      "'insulation' (expected vapour_resistance_factor (μ) or equivalent_air_thickness (s_d), "
      "or a material that carries one, got neither)"]),
    # Vapour-tight metals carry no μ in the library (ISO 10456 gives μ = ∞).
    ("        - {name: cladding, thickness: 0.7 mm, material: steel_sheet}\n" + WALL_A, A_YEAR,
     ["proj/sheets/s.yaml:8:11: error: S.ic.inputs.layers[0]: no vapour resistance for layer "
      "'cladding' (expected vapour_resistance_factor (μ) or equivalent_air_thickness (s_d), or "
      "a material that carries one, got material 'steel_sheet' without either)"]),
    ("        - {name: insulation, thickness: 100 mm, conductivity: 0.04 W/(m*K), "
     "vapour_resistance_factor: 1, equivalent_air_thickness: 0.1 m}", A_YEAR,
     ["proj/sheets/s.yaml:8:11: error: S.ic.inputs.layers[0]: at most one of "
      "vapour_resistance_factor | equivalent_air_thickness (expected at most one, got "
      "vapour_resistance_factor, equivalent_air_thickness)"]),
    # Common practice: still air is μ = 1, the least any material has.
    ("        - {name: insulation, thickness: 100 mm, conductivity: 0.04 W/(m*K), "
     "vapour_resistance_factor: 0.5}", A_YEAR,
     ["proj/sheets/s.yaml:8:103: error: S.ic.inputs.layers[0].vapour_resistance_factor: "
      "'vapour_resistance_factor' out of range (expected vapour_resistance_factor >= 1.00000, "
      "got 0.5)"]),
    (WALL_A, _rows(**{"6": ("outside_relative_humidity", "105 %")}),
     ["proj/sheets/s.yaml:17:143: error: S.ic.inputs.climate[6].outside_relative_humidity: "
      "'outside_relative_humidity' out of range (expected outside_relative_humidity <= "
      "1.00000, got '105 %')"]),
    # The Annex E formulae are taken from −40 °C to +80 °C (calcdoc.physics.conduction).
    (WALL_A, _rows(**{"0": ("outside_temperature", "-45 degC")}),
     ["proj/sheets/s.yaml:11:110: error: S.ic.inputs.climate[0].outside_temperature: "
      "'outside_temperature' out of range (expected outside_temperature >= −40.0000 °C, got "
      "'-45 degC')"]),
])
def test_bad_input__located_word_for_word_exit_2_nothing_written(tmp_path, capsys, layers, rows,
                                                                 expected):
    status, err = run_build(tmp_path, capsys, sheet(layers, rows))
    assert status == 2
    assert [line for line in err if ": error: " in line] == expected
    assert err[-1] == f"calcdoc: {len(expected)} error{'s' if len(expected) > 1 else ''}; " \
                      "nothing written"


# --- the demo sheet ----------------------------------------------------------------------------

@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The cold-store project with sheet IC1 added to its list, built (no PDF)."""
    root = tmp_path_factory.mktemp("demo") / "cold-store"
    shutil.copytree(ROOT / "projects" / "cold-store", root)
    project = root / "project.yaml"
    text = project.read_text()
    if "sheets/ic1.yaml" not in text:
        project.write_text(text.replace("    - sheets/ew1.yaml\n",
                                        "    - sheets/ew1.yaml\n    - sheets/ic1.yaml\n"))
    out = root.parent / "out"
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 0
    return json.loads((out / "results.json").read_text())


def test_demo_ic1__dries_out_and_both_checks_pass_with_whole_numbers_shown(demo):
    (sheet_ic1,) = [s for s in demo["sheets"] if s["id"] == "IC1"]
    (block,) = sheet_ic1["blocks"]
    assert block["kind"] == "interstitial_condensation"
    assert block["results"]["dries_out"]["display"] == "1"
    assert block["results"]["max_accumulated"]["si"] < 0.5  # the sheet's common-practice limit
    assert [c["passed"] for c in block["checks"]] == [True, True]
    for step in block["steps"]:
        if "expr" in step:
            again, shown, half = redo(step)
            assert abs(again - shown) <= half * (1 + 1e-9) + 1e-300, step


def test_check_on_a_whole_number_result_prints_whole_numbers(evaluate):
    block = evaluate(sheet(WALL_A, A_YEAR, "    checks:\n      - {result: dries_out, "
                                            "at_least: 1, source: test}\n")).block("S.ic")
    (check,) = block.checks
    shown = print_check(check, 3)
    assert (shown.value, shown.limit, shown.margin) == ("1", "1", "0")
