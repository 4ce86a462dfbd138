"""The layered_wall and cylindrical_layers kinds, evaluated from sheets written inline.

Every check value names its source beside it: ISO 6946:2017 and ISO 13788:2012 (values from
memory where marked), hand calculations written out in the comments, the `ht` library's
conduction functions as an independent reference, NIST SP 811 for unit conversions. Bad inputs
are asserted word for word, each in the located format FILE:LINE:COL: error: WHERE: WHAT
(expected X, got Y).
"""

from __future__ import annotations

import ast
import json
import re
import shutil
from pathlib import Path

import ht
import pytest
import yaml
from scipy import constants

from calcdoc.cli import main
from calcdoc.physics.conduction import combined_method
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill, print_step

C = 273.15  # K at 0 degC (definition of the Celsius scale)
ROOT = Path(__file__).resolve().parent.parent


def sheet(block: str) -> dict[str, str]:
    """A one-block sheet S in the file sheets/s.yaml; ``block`` is indented under blocks:."""
    return {"s": "id: S\ntitle: Test sheet\nblocks:\n" + block}


def wall_sheet(layers: str, extra: str = "", inside: str = "20 degC",
               outside: str = "-5 degC") -> dict[str, str]:
    return sheet(f"""\
  - id: wall
    kind: layered_wall
    inputs:
      layers:
{layers}
      inside_temperature: {inside}
      outside_temperature: {outside}
{extra}""")


MASONRY = """\
        - {name: plaster, thickness: 13 mm, conductivity: 0.40 W/(m*K)}
        - {name: blockwork, thickness: 100 mm, conductivity: 0.20 W/(m*K)}
        - {name: mineral wool, thickness: 100 mm, conductivity: 0.035 W/(m*K)}
        - {name: brick, thickness: 102.5 mm, conductivity: 0.77 W/(m*K)}"""


def results(package, key):
    return {name: r.value for name, r in package.block(key).output.results.items()}


def steps(package, key):
    """The block's steps by name (the last of a name wins)."""
    return {s.name: s for s in package.block(key).output.steps}


def printed(package, key, sig: int = 3):
    """The block's steps as printed, by name."""
    return {s.name: print_step(s, sig) for s in package.block(key).output.steps}


def texts(entries, sig: int = 3):
    """Notes or warnings as the report prints them."""
    return [fill(e["text"], sig) for e in entries]


# --- layered_wall: homogeneous layers ---------------------------------------------------------

def test_layered_wall_u_value__hand_calculation_with_iso6946_table7_surfaces(evaluate):
    # Hand calculation (invented wall), R_si = 0.13 and R_se = 0.04 m2K/W from ISO 6946:2017
    # Table 7 for horizontal heat flow:
    #   plaster 0.013/0.40 = 0.0325; blockwork 0.100/0.20 = 0.5000
    #   mineral wool 0.100/0.035 = 2.8571; brick 0.1025/0.77 = 0.1331
    #   R_T = 0.13 + 0.0325 + 0.5000 + 2.8571 + 0.1331 + 0.04 = 3.6928 m2K/W
    #   U = 1/3.6928 = 0.2708 W/(m2K); q = 25/3.6928 = 6.770 W/m2; Q = 6.770 * 12 = 81.24 W
    #   theta_si = 20 - 6.770*0.13 = 19.12 degC; theta_se = -5 + 6.770*0.04 = -4.73 degC
    #   after plaster: 19.12 - 6.770*0.0325 = 18.90 degC
    package = evaluate(wall_sheet(MASONRY, extra="      area: 12 m^2\n"))
    r = results(package, "S.wall")
    assert r["R_total"] == pytest.approx(3.6928, abs=0.00005)  # hand calculation above
    assert r["U"] == pytest.approx(0.2708, abs=0.00005)        # hand calculation above
    assert r["q"] == pytest.approx(6.770, abs=0.0005)          # hand calculation above
    assert r["Q"] == pytest.approx(81.24, abs=0.01)            # hand calculation above
    assert r["theta_si"] - C == pytest.approx(19.12, abs=0.005)   # hand calculation above
    assert r["theta_se"] - C == pytest.approx(-4.73, abs=0.005)   # hand calculation above
    temperatures = r["interface_temperatures"]
    assert len(temperatures) == 5  # inside surface, three interfaces, outside surface
    assert temperatures[1] - C == pytest.approx(18.90, abs=0.005)  # hand calculation above
    assert "R_upper" not in r and "R_lower" not in r  # homogeneous: no combined method


def test_layered_wall__table7_default_recorded_as_input_and_stated_as_a_step(evaluate):
    package = evaluate(wall_sheet(MASONRY))
    block = package.block("S.wall")
    inputs = {record.path: record for record in block.inputs}
    assert inputs["inside_surface_resistance"].si == pytest.approx(0.13)  # ISO 6946 Table 7
    assert inputs["inside_surface_resistance"].origin == "default"
    assert "Table 7" in inputs["inside_surface_resistance"].source
    assert inputs["outside_surface_resistance"].si == pytest.approx(0.04)  # ISO 6946 Table 7
    shown = printed(package, "S.wall")
    assert [(shown[n].statement, shown[n].result.text) for n in ("R_si", "R_se")] == [
        ("the conventional value for horizontal heat flow (inside_surface_resistance not "
         "given)", "0.130 m²·K/W"),
        ("the conventional value for horizontal heat flow (outside_surface_resistance not "
         "given)", "0.0400 m²·K/W")]
    assert all("Table 7" in shown[n].source for n in ("R_si", "R_se"))
    # The table values enter the sum in full, as the table prints them.
    total = shown["R_T"]
    assert total.expr == "R_si + R_1 + R_2 + R_3 + R_4 + R_se"
    assert (total.values["R_si"].text, total.values["R_se"].text) == ("0.13 m²·K/W",
                                                                     "0.04 m²·K/W")


@pytest.mark.parametrize("heat_flow, R_si", [
    ("upward", 0.10),    # ISO 6946:2017 Table 7
    ("downward", 0.17),  # ISO 6946:2017 Table 7
])
def test_layered_wall__heat_flow_direction_sets_iso6946_table7_inside_resistance(
        evaluate, heat_flow, R_si):
    # Same wall as the hand calculation above, whose layers and R_se sum to 3.6928 - 0.13.
    package = evaluate(wall_sheet(MASONRY, extra=f"      heat_flow: {heat_flow}\n"))
    r = results(package, "S.wall")
    assert r["R_total"] == pytest.approx(3.6928 - 0.13 + R_si, abs=0.00005)


def test_layered_wall__given_surface_resistance_overrides_table7_stating_the_table_value(
        evaluate):
    package = evaluate(wall_sheet(MASONRY, extra="      outside_surface_resistance: "
                                                 "0.13 m^2*K/W\n"))
    block = package.block("S.wall")
    # Hand calculation: 3.6928 - 0.04 + 0.13 = 3.7828 m2K/W.
    assert block.output.results["R_total"].value == pytest.approx(3.7828, abs=0.00005)
    R_se = printed(package, "S.wall")["R_se"]
    assert R_se.statement == ("as given, in place of the conventional 0.04 m²·K/W for "
                              "horizontal heat flow")  # ISO 6946:2017 Table 7: R_se 0.04
    assert R_se.source == "ISO 6946:2017, 6.8, Table 7 (conventional surface resistances)"
    assert printed(package, "S.wall")["R_T"].values["R_se"].text == "0.13 m²·K/W"  # as written


def test_layered_wall__resistance_layer_enters_the_sum_directly(evaluate):
    # ISO 6946:2017 Table 8: 0.18 m2K/W for an unventilated air layer >= 25 mm, horizontal
    # heat flow (from memory). Hand calculation: 3.6928 + 0.18 = 3.8728 m2K/W.
    layers = MASONRY + "\n        - {name: cavity, thickness: 50 mm, resistance: 0.18 m^2*K/W}"
    package = evaluate(wall_sheet(layers))
    assert results(package, "S.wall")["R_total"] == pytest.approx(3.8728, abs=0.00005)


# --- layered_wall: units through the kind ----------------------------------------------------

def test_conductivity_in_w_per_m_degc__is_a_per_kelvin_value(evaluate):
    # docs/format.md, Values: inside a compound unit degC is a per-degree difference, so
    # 0.5 W/(m*degC) = 0.5 W/(m*K) (NIST SP 811: a Celsius degree equals a kelvin).
    # Hand calculation: R = 0.1/0.5 = 0.2; R_T = 0.13 + 0.2 + 0.04 = 0.37 m2K/W.
    layers = "        - {name: board, thickness: 100 mm, conductivity: 0.5 W/(m*degC)}"
    package = evaluate(wall_sheet(layers))
    assert results(package, "S.wall")["R_total"] == pytest.approx(0.37, abs=1e-9)


def test_inside_temperature_68_degf__is_293p15_k(evaluate):
    # NIST SP 811: T/K = (t/degF + 459.67)/1.8, so 68 degF = 293.15 K (= 20 degC).
    # Hand calculation with the masonry wall above: q = (293.15 - 268.15)/3.6928 = 6.770 W/m2.
    package = evaluate(wall_sheet(MASONRY, inside="68 degF"))
    block = package.block("S.wall")
    inputs = {record.path: record for record in block.inputs}
    assert inputs["inside_temperature"].si == pytest.approx(293.15, abs=1e-9)  # NIST SP 811
    assert block.output.results["q"].value == pytest.approx(6.770, abs=0.0005)  # hand calc


# --- layered_wall: bridged layers (combined method) -------------------------------------------

TIMBER_FRAME = """\
        - {name: plasterboard, thickness: 12.5 mm, conductivity: 0.21 W/(m*K)}
        - name: studs and mineral wool
          thickness: 140 mm
          conductivity: 0.038 W/(m*K)
          bridge: {name: timber studs, conductivity: 0.13 W/(m*K), fraction: 15 %}
        - {name: OSB, thickness: 11 mm, conductivity: 0.13 W/(m*K)}"""


def test_bridged_wall__combined_method_limits_match_hand_calculation(evaluate):
    # Hand calculation to ISO 6946:2017 6.7.2 (the same invented wall as
    # tests/test_physics_conduction.py), R_si 0.13, R_se 0.04 (Table 7):
    #   plasterboard 0.0125/0.21 = 0.05952; OSB 0.011/0.13 = 0.08462
    #   140 mm layer: mineral wool 0.14/0.038 = 3.68421 (f = 0.85), timber 0.14/0.13 = 1.07692
    #   upper: R_Ta = 3.99835, R_Tb = 1.39106; R'_T = 1/(0.85/3.99835 + 0.15/1.39106) = 3.1209
    #   lower: R_j = 1/(0.85/3.68421 + 0.15/1.07692) = 2.70270; R''_T = 3.0168
    #   R_T = (3.1209 + 3.0168)/2 = 3.0689; U = 0.3259
    package = evaluate(wall_sheet(TIMBER_FRAME))
    r = results(package, "S.wall")
    assert r["R_upper"] == pytest.approx(3.1209, abs=0.00005)  # hand calculation above
    assert r["R_lower"] == pytest.approx(3.0168, abs=0.00005)  # hand calculation above
    assert r["R_total"] == pytest.approx(3.0689, abs=0.00005)  # hand calculation above
    assert r["U"] == pytest.approx(0.3259, abs=0.00005)        # hand calculation above
    found = steps(package, "S.wall")
    assert found["R_T_a"].result.si == pytest.approx(3.99835, abs=0.000005)  # hand calc
    assert found["R_T_b"].result.si == pytest.approx(1.39106, abs=0.000005)  # hand calc
    assert found["R_2_lower"].result.si == pytest.approx(2.70270, abs=0.000005)  # hand calc
    # The sums are written out, each section with the layer it crosses, ISO 6946:2017 6.7.2.
    assert found["R_T_a"].expr == "R_si + R_1 + R_2 + R_3 + R_se"
    assert found["R_T_b"].expr == "R_si + R_1 + R_2_b + R_3 + R_se"
    assert found["R_T_upper"].expr == "1 / (f_a / R_T_a + f_b / R_T_b)"
    assert found["R_2_lower"].expr == "1 / (f_a / R_2 + f_b / R_2_b)"
    assert found["R_T_lower"].expr == "R_si + R_1 + R_2_lower + R_3 + R_se"
    assert found["R_T"].expr == "(R_T_upper + R_T_lower) / 2"
    assert (found["f_a"].expr, found["f_b"].expr) == ("1 - f_2", "f_2")
    assert found["f_a"].result.si == pytest.approx(0.85, abs=1e-12)  # 100 % - 15 %
    assert found["R_2"].group == found["R_2_b"].group == "Thermal resistance of each layer"
    assert (found["R_2"].item, found["R_2_b"].item) == ("studs and mineral wool",
                                                        "studs and mineral wool: timber studs")


TWO_BRIDGED = """\
        - name: insulation A
          thickness: 100 mm
          conductivity: 0.04 W/(m*K)
          bridge: {name: battens A, conductivity: 0.2 W/(m*K), fraction: 10 %}
        - name: insulation B
          thickness: 50 mm
          conductivity: 0.04 W/(m*K)
          bridge: {name: battens B, conductivity: 0.125 W/(m*K), fraction: 20 %}"""


def test_two_bridged_layers__aligned_sections_hand_calculation(evaluate):
    # Hand calculation to ISO 6946:2017 6.7.2 with the bridges aligned (the 10 % bridge lies
    # within the 20 % one), R_si + R_se = 0.17 (Table 7):
    #   A: 0.1/0.04 = 2.5, bridge 0.1/0.2 = 0.5; B: 0.05/0.04 = 1.25, bridge 0.05/0.125 = 0.4
    #   sections: 80 % clear 0.17 + 2.5 + 1.25 = 3.92; 10 % through B only 0.17 + 2.5 + 0.4 =
    #   3.07; 10 % through both 0.17 + 0.5 + 0.4 = 1.07
    #   R'_T = 1/(0.8/3.92 + 0.1/3.07 + 0.1/1.07) = 1/0.330113 = 3.02927
    #   R''_T = 0.17 + 1/(0.9/2.5 + 0.1/0.5) + 1/(0.8/1.25 + 0.2/0.4) = 0.17 + 1.785714 +
    #   0.877193 = 2.83291; R_T = 2.93109
    package = evaluate(wall_sheet(TWO_BRIDGED))
    block = package.block("S.wall")
    r = results(package, "S.wall")
    assert r["R_upper"] == pytest.approx(3.02927, abs=0.000005)  # hand calculation above
    assert r["R_lower"] == pytest.approx(2.83291, abs=0.000005)  # hand calculation above
    assert r["R_total"] == pytest.approx(2.93109, abs=0.000005)  # hand calculation above
    aligned = [t for t in texts(block.output.notes) if "assumed aligned" in t]
    assert aligned == [
        "Several layers are bridged: the bridges are assumed aligned (each narrower bridge lies "
        "within the wider ones), which defines 3 sections. With every bridge conducting better "
        "than its layer, this gives the lowest upper limit of all arrangements of the same "
        "fractions (conservative for U)."]
    # The sections' fractions, each from the bridge fractions that bound it (hand calculation
    # above: 80 %, 10 %, 10 %).
    found = steps(package, "S.wall")
    assert [(found[n].expr, round(found[n].result.si, 12)) for n in ("f_a", "f_b", "f_c")] == [
        ("1 - f_2", 0.8), ("f_2 - f_1", 0.1), ("f_1", 0.1)]
    assert found["R_T_b"].expr == "R_si + R_1 + R_2_b + R_se"   # through B only
    assert found["R_T_c"].expr == "R_si + R_1_b + R_2_b + R_se"  # through both


def test_two_bridged_layers__aligned_upper_limit_below_crossed_arrangement():
    # The note's claim, against the other arrangement by hand: battens crossing at random
    # (independent fractions 0.1 x 0.2) give sections 72 % clear 3.92, 8 % A only
    # 0.17 + 0.5 + 1.25 = 1.92, 18 % B only 3.07, 2 % both 1.07;
    # R'_T = 1/(0.72/3.92 + 0.08/1.92 + 0.18/3.07 + 0.02/1.07) = 3.30400 > 3.02927 (aligned).
    crossed = combined_method([[2.5, 0.5, 2.5, 0.5], [1.25, 1.25, 0.4, 0.4]],
                              [0.72, 0.08, 0.18, 0.02], 0.13, 0.04)
    assert crossed.R_upper == pytest.approx(3.30400, abs=0.000005)  # hand calculation above
    assert crossed.R_upper > 3.02927  # aligned value, hand calculation in the test above


def test_bridged_wall__surface_figures_are_area_means_with_a_warning(evaluate):
    package = evaluate(wall_sheet(TIMBER_FRAME, extra="      inside_relative_humidity: 50 %\n"))
    warnings = texts(package.block("S.wall").output.warnings)
    assert ("f_Rsi and the surface humidity of a bridged element are area means; the surface "
            "over a bridge is colder. Find its minimum temperature by a numerical calculation "
            "(ISO 10211) before relying on the mould or condensation result.") in warnings


# --- layered_wall: surface humidity (ISO 13788) ------------------------------------------------

SOLID_BLOCK = "        - {name: dense block, thickness: 100 mm, conductivity: 1.13 W/(m*K)}"


def test_surface_humidity__hand_calculation_with_iso13788_surface_resistance(evaluate):
    # Masonry wall above, 20 degC / 50 % inside, -5 degC outside; R_si,c = 0.25 m2K/W for
    # opaque elements (ISO 13788:2012, from memory):
    #   R_T,c = 3.6928 - 0.13 + 0.25 = 3.8128; theta_si' = 20 - 25*0.25/3.8128 = 18.361 degC
    #   f_Rsi = 1 - 0.25/3.8128 = 0.9344
    #   dew point of 20 degC, 50 %: 9.3 degC (psychrometric tables, common practice)
    #   p_sat(18.361) = 610.5 exp(17.269*18.361/(237.3 + 18.361)) = 2110.1 Pa (ISO 13788
    #   formula over water); p_v = 0.5 * 2337 = 1168.5 Pa (2337 Pa at 20 degC, ISO 13788
    #   formula); phi_si = 1168.5/2110.1 = 0.5538
    #   the formula's own dew point: x = ln(1168.5/610.5) = 0.6492, 237.3 x/(17.269 - x)
    #   = 9.27 degC; margin = 18.361 - 9.269 = 9.092 K
    package = evaluate(wall_sheet(MASONRY, extra="      inside_relative_humidity: 50 %\n"))
    r = results(package, "S.wall")
    assert r["f_Rsi"] == pytest.approx(0.9344, abs=0.00005)               # hand calculation
    assert r["dew_point"] - C == pytest.approx(9.3, abs=0.05)             # psychrometric tables
    assert r["condensation_margin"] == pytest.approx(9.092, abs=0.0005)   # hand calculation
    assert r["surface_relative_humidity"] == pytest.approx(0.5538, abs=0.00005)  # hand calc
    # U is computed with R_si = 0.13, not the condensation resistance (docs/format.md).
    assert r["U"] == pytest.approx(0.2708, abs=0.00005)


def test_surface_humidity__cold_wall_warns_of_condensation_and_mould(evaluate):
    # Hand calculation: one leaf of dense block, R = 0.1/1.13 = 0.0885; R_T,c = 0.25 + 0.0885
    # + 0.04 = 0.3785; theta_si' = 20 - 25*0.25/0.3785 = 3.49 degC, below the 9.3 degC dew point
    # of 20 degC / 50 % air (psychrometric tables, common practice).
    package = evaluate(wall_sheet(SOLID_BLOCK, extra="      inside_relative_humidity: 50 %\n"))
    block = package.block("S.wall")
    r = results(package, "S.wall")
    assert r["condensation_margin"] == pytest.approx(3.49 - 9.3, abs=0.06)  # hand calculation
    assert r["surface_relative_humidity"] > 1.0  # vapour pressure above saturation at 3.49 degC
    messages = texts(block.output.warnings)
    assert any(m.startswith("The inside surface (3.49 °C) is below the dew point of the inside "
                            "air (9.27 °C): surface condensation is expected.")
               for m in messages)
    assert any(m.endswith("reaches the 80 % criterion for mould growth.") for m in messages)
    # ISO 13788:2012 mould criterion of 80 % surface relative humidity (from memory).


def test_surface_humidity__frost_point_over_ice_for_cold_inside_air(evaluate):
    # ISO 13788:2012 (from memory): below 0 degC the saturation pressure over ice applies.
    # Hand calculation with its formula over ice: p_sat(-10) = 610.5 exp(21.875*(-10)/255.5)
    # = 259.3 Pa (IAPWS sublimation tables: 259.9 Pa, from memory); p = 0.8 * 259.3 = 207.5 Pa;
    # x = ln(207.5/610.5) = -1.0793; frost point = 265.5 x/(21.875 - x) = -12.48 degC.
    # (Inverting the formula over water instead would give -13.96 degC.)
    package = evaluate(wall_sheet(SOLID_BLOCK, inside="-10 degC", outside="-20 degC",
                                  extra="      inside_relative_humidity: 80 %\n"))
    assert results(package, "S.wall")["dew_point"] - C == pytest.approx(-12.48, abs=0.005)


def test_humidity_is_not_required_and_its_results_are_absent_without_it(evaluate):
    r = results(evaluate(wall_sheet(MASONRY)), "S.wall")
    assert "f_Rsi" in r
    assert not {"dew_point", "condensation_margin", "surface_relative_humidity"} & set(r)


# --- layered_wall: the figure ------------------------------------------------------------------

def test_wall_figure__layers_to_scale_named_with_dew_point_and_drawn_deterministically(evaluate):
    package = evaluate(wall_sheet(MASONRY, extra="      inside_relative_humidity: 50 %\n"))
    block = package.block("S.wall")
    [figure] = block.output.figures
    # Layers to scale: the bands' widths are the thicknesses as written (13, 100, 100, 102.5 mm).
    assert [b.x1 - b.x0 for b in figure.bands] == pytest.approx([0.013, 0.1, 0.1, 0.1025])
    assert [b.label for b in figure.bands][1:] == ["blockwork", "mineral wool", "brick"]
    [profile] = [line for line in figure.lines if line.label.startswith("temperature")]
    assert profile.y == pytest.approx(tuple(results(package, "S.wall")["interface_temperatures"]))
    [dew] = figure.marks
    assert dew.label == "dew point of the inside air"
    assert dew.at - C == pytest.approx(9.27, abs=0.005)  # hand calculation, surface humidity test
    assert (figure.x.display, figure.y.display) == ("mm", "degC")
    caption = fill(figure.caption, 3)
    assert caption.endswith("Layers from the inside, to scale: plaster 13 mm; blockwork 100 mm; "
                            "mineral wool 100 mm; brick 102.5 mm. Dew point of the inside air "
                            "9.27 °C.")
    first, second = draw(figure), draw(figure)
    assert first.svg == second.svg  # same bytes for the same inputs
    for text in ("blockwork", "mineral wool", "brick", "dew point of the inside air",
                 "position from the inside surface (mm)"):
        assert text in first.svg


# --- cylindrical_layers -----------------------------------------------------------------------

def pipe_sheet(inputs: str) -> dict[str, str]:
    return sheet(f"""\
  - id: pipe
    kind: cylindrical_layers
    inputs:
{inputs}""")


HT_EXAMPLE = """\
      inner_diameter: 77.9272 mm
      layers:
        - {name: steel, thickness: 5.4864 mm, conductivity: 56.045 W/(m*K)}
        - {name: insulation, thickness: 50 mm, conductivity: 0.0598535265 W/(m*K)}
      inside_temperature: 453.15 K
      ambient_temperature: 301.15 K
      outside_coefficient: 22.697193 W/(m^2*K)
      length: 10 m
"""


def test_pipe__matches_ht_cylindrical_heat_transfer_docs_example(evaluate):
    # ht.conduction.cylindrical_heat_transfer documentation example: Q = 73.12 W/m and the outer
    # surface at 306.58 K (printed values), hi = 1e12 (no inside film).
    reference = ht.conduction.cylindrical_heat_transfer(
        Ti=453.15, To=301.15, hi=1e12, ho=22.697193, Di=0.0779272, ts=[0.0054864, 0.05],
        ks=[56.045, 0.0598535265])
    r = results(evaluate(pipe_sheet(HT_EXAMPLE)), "S.pipe")
    assert r["q_per_length"] == pytest.approx(73.12, abs=0.005)           # ht docs, printed
    assert r["theta_surface"] == pytest.approx(306.58, abs=0.005)         # ht docs, printed
    assert r["q_per_length"] == pytest.approx(reference["Q"], rel=1e-6)  # ht (hi = 1e12)
    assert r["R_per_length"] == pytest.approx((453.15 - 301.15) / reference["Q"], rel=1e-6)
    assert r["Q"] == pytest.approx(731.2, abs=0.05)  # 73.12 W/m over 10 m
    assert r["outer_diameter"] == pytest.approx(0.0779272 + 2 * 0.0554864, rel=1e-12)
    assert r["h_outside"] == pytest.approx(22.697193, rel=1e-12)  # as given


def test_pipe__inside_coefficient_matches_ht(evaluate):
    # ht.conduction.cylindrical_heat_transfer with a finite inside coefficient.
    reference = ht.conduction.cylindrical_heat_transfer(
        Ti=353.15, To=283.15, hi=800.0, ho=9.0, Di=0.05, ts=[0.003, 0.04], ks=[45.0, 0.037])
    inputs = """\
      inner_diameter: 50 mm
      layers:
        - {name: steel, thickness: 3 mm, conductivity: 45 W/(m*K)}
        - {name: wool, thickness: 40 mm, conductivity: 0.037 W/(m*K)}
      inside_temperature: 80 degC
      ambient_temperature: 10 degC
      inside_coefficient: 800 W/(m^2*K)
      outside_coefficient: 9 W/(m^2*K)
"""
    r = results(evaluate(pipe_sheet(inputs)), "S.pipe")
    assert r["q_per_length"] == pytest.approx(reference["Q"], rel=1e-9)  # ht
    # ht's layer temperatures leave out the inside film drop, so the surface is checked from
    # ht's heat flow through the outside film: T_s = T_o + Q/(h_o pi D_o), D_o = 0.136 m.
    assert r["theta_surface"] == pytest.approx(283.15 + reference["Q"] / (9.0 * 3.141592653589793
                                                                        * 0.136), rel=1e-9)


STILL_AIR = """\
      inner_diameter: 82.5 mm
      layers:
        - {name: steel, thickness: 3.2 mm, conductivity: 50 W/(m*K)}
        - {name: foam, thickness: 25 mm, conductivity: 0.036 W/(m*K)}
      inside_temperature: 6 degC
      ambient_temperature: 20 degC
      ambient_relative_humidity: 65 %
      surface_emissivity: 0.9
"""


def test_pipe_in_still_air__outside_coefficient_closes_the_balance_with_ht(evaluate):
    # With the kind's computed h_outside as ho, ht.conduction.cylindrical_heat_transfer gives
    # the same heat flow and surface temperature (an independent series-resistance solve).
    package = evaluate(pipe_sheet(STILL_AIR))
    r = results(package, "S.pipe")
    reference = ht.conduction.cylindrical_heat_transfer(
        Ti=279.15, To=293.15, hi=1e12, ho=r["h_outside"], Di=0.0825, ts=[0.0032, 0.025],
        ks=[50.0, 0.036])
    assert r["q_per_length"] == pytest.approx(reference["Q"], rel=1e-6)   # ht
    assert r["theta_surface"] == pytest.approx(reference["Ts"][-1], abs=1e-5)  # ht
    assert r["q_per_length"] < 0  # a chilled pipe gains heat (positive is outward)
    # Cold pipe in still air: a combined coefficient of a few W/(m2K), radiation the larger
    # part at emissivity 0.9 (common practice: about 5 W/(m2K) radiation near 20 degC).
    values = {name: step.result.si for name, step in steps(package, "S.pipe").items()}
    assert 4.5 < values["h_r"] < 5.5
    assert 1.0 < values["h_c"] < 4.0
    # Stefan–Boltzmann law, sigma from scipy.constants:
    # h_r (T_s - T_a) = eps sigma (T_s^4 - T_a^4).
    T_s = r["theta_surface"]
    assert values["h_r"] * (T_s - 293.15) == pytest.approx(
        0.9 * constants.Stefan_Boltzmann * (T_s ** 4 - 293.15 ** 4), rel=1e-9)


def test_pipe__ambient_dew_point_and_condensation_margin(evaluate):
    # 20 degC at 65 %: p_v = 0.65 * 2337 = 1519 Pa (ISO 13788 formula, 2337 Pa at 20 degC);
    # x = ln(1519/610.5) = 0.9116; dew point = 237.3 x/(17.269 - x) = 13.22 degC (hand calc).
    r = results(evaluate(pipe_sheet(STILL_AIR)), "S.pipe")
    assert r["dew_point"] - C == pytest.approx(13.22, abs=0.01)  # hand calculation above
    assert r["condensation_margin"] == pytest.approx(r["theta_surface"] - r["dew_point"])


def test_pipe__churchill_chu_outside_ra_1e12_refused_at_the_emissivity(errors_of):
    # Churchill and Chu (1975): the correlation holds for Ra_D <= 1e12; a 10 m duct at 150 degC
    # in 20 degC air is above it at the inside temperature.
    inputs = """\
      inner_diameter: 10 m
      layers:
        - {name: wool, thickness: 50 mm, conductivity: 0.04 W/(m*K)}
      inside_temperature: 150 degC
      ambient_temperature: 20 degC
      surface_emissivity: 0.9
"""
    [message] = errors_of(pipe_sheet(inputs))
    assert re.fullmatch(
        r"proj/sheets/s\.yaml:12:27: error: S\.pipe\.inputs\.surface_emissivity: outside the "
        r"range of the method \(expected 0 <= Ra_D <= 1e12 for the Churchill-Chu correlation "
        r"\(Churchill and Chu 1975\); give the outside coefficient instead, got [\d.]+e\+12\)",
        message)


# --- bad inputs, word for word -----------------------------------------------------------------

def test_bad_input__negative_thickness(errors_of):
    layers = "        - {name: brick, thickness: -10 mm, conductivity: 0.77 W/(m*K)}"
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:8:36: error: S.wall.inputs.layers[0].thickness: 'thickness' out of "
        "range (expected thickness > 0 mm, got '-10 mm')"]


def test_bad_input__layer_without_conductivity_or_material(errors_of):
    assert errors_of(wall_sheet("        - {name: brick, thickness: 100 mm}")) == [
        "proj/sheets/s.yaml:8:11: error: S.wall.inputs.layers[0]: exactly one of conductivity "
        "| resistance | material is needed (expected exactly one, got none)"]


def test_bad_input__layer_with_both_conductivity_and_material(errors_of):
    layers = ("        - {name: brick, thickness: 100 mm, conductivity: 0.77 W/(m*K), "
              "material: brick_clay}")
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:8:11: error: S.wall.inputs.layers[0]: exactly one of conductivity "
        "| resistance | material is needed (expected exactly one, got conductivity, material)"]


def test_bad_input__difference_unit_for_an_absolute_temperature(errors_of):
    assert errors_of(wall_sheet(MASONRY, inside="20 delta_degC")) == [
        "proj/sheets/s.yaml:12:27: error: S.wall.inputs.inside_temperature: a temperature "
        "difference unit for an absolute temperature (expected an absolute temperature in K, "
        "degC or degF, got '20 delta_degC')"]


def test_bad_input__unknown_material_with_did_you_mean(errors_of):
    layers = "        - {name: brick, thickness: 100 mm, material: brick_clai}"
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:8:54: error: S.wall.inputs.layers[0].material: unknown material "
        "'brick_clai' (expected a material in the library or materials.yaml, got "
        "'brick_clai'); hint: did you mean 'brick_clay'?"]


def test_bad_input__humidity_without_percent(errors_of):
    assert errors_of(wall_sheet(MASONRY, extra="      inside_relative_humidity: 60\n")) == [
        "proj/sheets/s.yaml:14:33: error: S.wall.inputs.inside_relative_humidity: a number "
        "without a unit (expected a percentage such as '1.5 %', got '60')"]


def test_bad_input__bridge_fraction_without_percent(errors_of):
    layers = ("        - {name: wool, thickness: 100 mm, conductivity: 0.035 W/(m*K), "
              "bridge: {conductivity: 0.13 W/(m*K), fraction: 0.1}}")
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:8:119: error: S.wall.inputs.layers[0].bridge.fraction: a number "
        "without a unit (expected a percentage such as '1.5 %', got '0.1')"]


def test_bad_input__heat_flow_misspelt(errors_of):
    assert errors_of(wall_sheet(MASONRY, extra="      heat_flow: upwards\n")) == [
        "proj/sheets/s.yaml:14:18: error: S.wall.inputs.heat_flow: 'heat_flow' is not one of "
        "the choices (expected horizontal | upward | downward, got 'upwards'); hint: did you "
        "mean 'upward'?"]


def test_bad_input__temperature_dependent_material_refused_for_steady_conduction(errors_of):
    layers = "        - {name: slab, thickness: 100 mm, material: concrete_siliceous}"
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:8:53: error: S.wall.inputs.layers[0].material: material "
        "'concrete_siliceous' has no constant conductivity (expected a material with a constant "
        "conductivity, or give conductivity, got a temperature-dependent material)"]


def test_bad_input__steel_bridge_beyond_the_combined_method(errors_of):
    # ISO 6946:2017 6.7.2 (from memory): not applicable when R'_T/R''_T > 1.5. Hand
    # calculation: wool 0.1/0.035 = 2.857, steel 0.1/50 = 0.002, R_si + R_se = 0.17;
    # R'_T = 1/(0.98/3.027 + 0.02/0.172) = 2.2726; R''_T = 0.17 + 1/(0.98/2.857 + 0.02/0.002)
    # = 0.2667; ratio 8.52.
    layers = ("        - {name: wool, thickness: 100 mm, conductivity: 0.035 W/(m*K), "
              "bridge: {conductivity: 50 W/(m*K), fraction: 2 %}}")
    # The refusal names the bridged layer; a bridge is a mapping, not an input recorded by
    # itself, so the evaluator places it at the block (see the report on the lead's locator).
    assert errors_of(wall_sheet(layers)) == [
        "proj/sheets/s.yaml:4:5: error: S.wall.inputs.layers[0].bridge: outside the range of "
        "the method (expected R'_T/R''_T <= 1.5 for the combined method (ISO 6946:2017 6.7.2); "
        "a bridge this conductive needs a numerical calculation to ISO 10211, got 8.522)"]


def test_bad_input__pipe_with_both_outside_coefficient_and_emissivity(errors_of):
    inputs = """\
      inner_diameter: 100 mm
      layers:
        - {name: wool, thickness: 50 mm, conductivity: 0.04 W/(m*K)}
      inside_temperature: 150 degC
      ambient_temperature: 20 degC
      surface_emissivity: 0.9
      outside_coefficient: 10 W/(m^2*K)
"""
    assert errors_of(pipe_sheet(inputs)) == [
        "proj/sheets/s.yaml:7:7: error: S.pipe: exactly one of outside_coefficient | "
        "surface_emissivity is needed (expected exactly one, got outside_coefficient, "
        "surface_emissivity)"]


def test_bad_input__every_error_of_a_block_reported_at_once(errors_of):
    layers = ("        - {name: a, thickness: -1 mm, conductivity: 0.77 W/(m*K)}\n"
              "        - {name: b, thickness: 100 mm, material: brick_clai}")
    messages = errors_of(wall_sheet(layers, inside="20 delta_degC"))
    assert len(messages) == 3
    assert all(re.match(r"proj/sheets/s\.yaml:\d+:\d+: error: S\.wall\.inputs\.", m)
               for m in messages)


LTHW = """\
      inner_diameter: 54.5 mm
      layers:
        - {name: Steel pipe wall, thickness: 2.9 mm, conductivity: 50 W/(m*K)}
        - {name: Elastomeric foam, thickness: 32 mm, conductivity: 0.036 W/(m*K)}
      length: 20 m
      inside_temperature: 70 degC
      ambient_temperature: 15 degC
      surface_emissivity: 0.9
"""


def test_pipe_radial_profile_figure_ends_at_the_surface_temperature(evaluate):
    # The profile follows Fourier's law in a cylinder, T(r) = T_0 − q' ln(r/r_0)/(2πk), so its
    # end must equal the computed outer-surface temperature; the figure is deterministic.
    package = evaluate(pipe_sheet(LTHW))
    [figure] = package.block("S.pipe").output.figures
    [line] = figure.lines
    r = results(package, "S.pipe")
    assert line.y[-1] == pytest.approx(r["theta_surface"], abs=1e-6)
    assert line.x[-1] == pytest.approx(r["outer_diameter"] / 2, rel=1e-12)
    assert line.y[0] == pytest.approx(343.15, abs=1e-9)  # no inside film: the bore at 70 °C
    assert [m.label for m in figure.marks] == ["ambient air", "fluid inside"]
    first, second = draw(figure), draw(figure)
    assert first.svg == second.svg and "Elastomeric foam" in first.svg


# --- the working a checker re-does --------------------------------------------------------------

def test_saturation_pressure_step__iso13788_annex_e_exp_of_the_celsius_number(evaluate):
    # ISO 13788:2012 Annex E (from memory): p_sat = 610.5 exp(17.269 θ/(237.3 + θ)) over water,
    # θ in °C; 2337 Pa at 20 °C (the formula's value in building-physics tables, from memory).
    package = evaluate(wall_sheet(MASONRY, extra="      inside_relative_humidity: 50 %\n"))
    shown = printed(package, "S.wall")
    p_sat = shown["p_sat_i"]
    assert p_sat.expr == "p_0 * exp(a * theta_i / (b + theta_i))"
    assert {k: v.text for k, v in p_sat.values.items()} == {
        "p_0": "610.5 Pa", "a": "17.269", "b": "237.3", "theta_i": "20"}  # ISO 13788 Annex E
    assert p_sat.result.text == "2337 Pa"
    # The dew point by the inverse of the same formula, ln written log.
    dew = shown["theta_dp"]
    assert dew.expr == "theta_0 + b * log(p_v / p_0) / (a - log(p_v / p_0))"
    assert (dew.values["theta_0"].text, dew.values["b"].text) == ("0 °C", "237.3 K")
    assert dew.result.text == "9.27 °C"  # hand calculation in the surface humidity test
    assert shown["Delta_theta"].expr == "theta_si_sc - theta_dp"
    assert shown["varphi_si"].expr == "p_v / p_sat_si_sc"


def test_frost_point_step__uses_the_formula_over_ice(evaluate):
    # ISO 13788:2012 Annex E (from memory): below 0 °C, a = 21.875 and b = 265.5 (over ice).
    package = evaluate(wall_sheet(SOLID_BLOCK, inside="-10 degC", outside="-20 degC",
                                  extra="      inside_relative_humidity: 80 %\n"))
    shown = printed(package, "S.wall")
    assert (shown["p_sat_i"].values["a"].text, shown["p_sat_i"].values["b"].text) == (
        "21.875", "265.5")
    assert (shown["theta_dp"].values["a"].text, shown["theta_dp"].values["b"].text) == (
        "21.875", "265.5 K")
    assert shown["p_sat_i"].result.text == "259 Pa"  # 259.3 Pa, hand calculation above


def test_interface_temperatures__one_step_per_interface_grouped(evaluate):
    package = evaluate(wall_sheet(MASONRY))
    found = steps(package, "S.wall")
    chain = [found[n] for n in ("theta_si", "theta_1", "theta_2", "theta_3", "theta_4")]
    assert [s.expr for s in chain] == ["theta_i - q * R_si", "theta_si - q * R_1",
                                       "theta_1 - q * R_2", "theta_2 - q * R_3",
                                       "theta_3 - q * R_4"]
    assert {s.group for s in chain} == {"Temperature at each interface"}
    assert [s.item for s in chain] == ["inside surface", "plaster | blockwork",
                                       "blockwork | mineral wool", "mineral wool | brick",
                                       "outside surface"]
    # The chain and the outside air give the same outside surface (hand calculation: −4.73 °C).
    assert found["theta_se"].expr == "theta_e + q * R_se"
    assert found["theta_4"].result.si - C == pytest.approx(-4.73, abs=0.005)
    assert found["theta_se"].result.si == pytest.approx(found["theta_4"].result.si, abs=1e-9)


def test_pipe_still_air_steps__iteration_stated_then_churchill_chu_written_out(evaluate):
    package = evaluate(pipe_sheet(STILL_AIR))
    found = steps(package, "S.pipe")
    assert found["T_s"].expr is None and "iteration" in fill(found["T_s"].statement, 3)
    assert found["T_f"].expr == "(T_s + T_a) / 2"
    # Churchill and Chu (1975), the full-range equation for a horizontal cylinder.
    assert found["Nu"].expr == ("(0.6 + 0.387 * Ra ** (1 / 6) / (1 + (0.559 / Pr) ** (9 / 16)) "
                                "** (8 / 27)) ** 2")
    assert found["Ra"].expr == "g * (1 / T_f) * abs(T_s - T_a) * D_2 ** 3 / (nu * alpha)"
    assert found["Ra"].operands["g"].si == pytest.approx(9.80665, abs=1e-12)  # standard gravity
    assert found["h_c"].expr == "Nu * k_air / D_2"
    assert found["h_r"].expr == "varepsilon * sigma * (T_s ** 2 + T_a ** 2) * (T_s + T_a)"
    assert found["h_o"].expr == "h_c + h_r"
    assert found["R_2"].expr == "log(D_2 / D_1) / (2 * pi * k_2)"
    assert found["R_2"].group == "Resistance of each layer per metre"
    assert found["R"].expr == "R_1 + R_2 + R_o"
    # A table look-up is a statement naming the two rows it lies between: Bergman et al.
    # Table A.4 (from memory) has k = 0.0263 W/(m·K) at 300 K and 0.0223 W/(m·K) at 250 K.
    k = found["k_air"]
    assert k.expr is None
    assert k.statement.template == "interpolated between {lo} at {T_lo} and {hi} at {T_hi}"
    assert (k.statement.values["lo"].si, k.statement.values["hi"].si) == (0.0223, 0.0263)
    lo, hi = k.statement.values["T_lo"].si, k.statement.values["T_hi"].si
    assert lo <= k.operands.get("T_f", found["T_f"].result).si <= hi
    assert k.result.si == pytest.approx(0.0223 + (0.0263 - 0.0223) * (found["T_f"].result.si
                                                                     - lo) / (hi - lo))


def _only_my_sheets(tmp_path: Path) -> Path:
    """The demo project with only the conduction sheets and the sheet that refers to them."""
    demo = tmp_path / "demo"
    shutil.copytree(ROOT / "projects" / "cold-store", demo)
    project = yaml.safe_load((demo / "project.yaml").read_text())
    keep = ["sheets/ew1.yaml", "sheets/fw1.yaml", "sheets/pipework.yaml", "sheets/heat-gains.yaml"]
    assert set(keep) <= set(project["package"]["sheets"])
    project["package"]["sheets"] = keep
    (demo / "project.yaml").write_text(yaml.safe_dump(project, sort_keys=False))
    for sheet in (demo / "sheets").iterdir():
        if f"sheets/{sheet.name}" not in keep:
            sheet.unlink()
    return demo


def test_demo_sheets__every_printed_step_redoes_from_its_printed_numbers(tmp_path):
    # The checker's re-do of tests/test_redo.py (pint, kelvin arithmetic, nothing of calcdoc's
    # own expression or unit code) on the conduction sheets alone.
    from test_redo import redo
    out = tmp_path / "out"
    assert main(["build", str(_only_my_sheets(tmp_path)), "--out", str(out), "--no-pdf"]) == 0
    package = json.loads((out / "results.json").read_text())
    blocks = [(f"{s['id']}.{b['id']}", b) for s in package["sheets"] for b in s["blocks"]]
    assert [key for key, _ in blocks] == ["EW1.wall", "FW1.wall", "PW1.chw", "PW1.lthw",
                                          "HG1.gains"]
    wrong, count = [], 0
    for key, block in blocks:
        assert block["steps"], f"{key} prints no step"
        for step in (s for s in block["steps"] if "expr" in s):
            count += 1
            names = {n.id for n in ast.walk(ast.parse(step["expr"], mode="eval"))
                     if isinstance(n, ast.Name)} - {"pi", "sigma", "exp", "log", "abs"}
            assert names <= set(step["values"]), (key, step["expr"])
            again, shown, half = redo(step)
            if not abs(again - shown) <= half * (1 + 1e-9) + 1e-300:
                wrong.append(f"{key} {step['name']} = {step['expr']} with {step['values']}: "
                             f"{again!r}, printed {step['result']}")
    assert count >= 100
    assert wrong == []


# --- physics refusals located at the input, through Kind.input_names ---------------------------

def test_bad_input__air_too_dry_for_the_dew_point_range_located_at_the_humidity(errors_of):
    # ISO 13788 Annex E formulae held to -40..+80 degC: -30 degC air at 5 % has its dew point
    # below -40 degC (hand calculation in tests/test_physics_conduction.py).
    assert errors_of(wall_sheet(SOLID_BLOCK, inside="-30 degC", outside="-40 degC",
                                extra="      inside_relative_humidity: 5 %\n")) == [
        "proj/sheets/s.yaml:11:33: error: S.wall.inputs.inside_relative_humidity: outside the "
        "range of the method (expected a humidity whose dew point is within -40 degC to +80 degC "
        "(233.15 K to 353.15 K), where the ISO 13788:2012 Annex E formulae agree with IAPWS "
        "within 2 %, got '5 %')"]


def test_bad_input__surface_below_the_saturation_range_located_at_the_outside_temperature(
        errors_of):
    # The inside surface of a single leaf at -120 degC outside is below -40 degC: the outside
    # temperature is what puts it there.
    [message] = errors_of(wall_sheet(SOLID_BLOCK, outside="-120 degC",
                                     extra="      inside_relative_humidity: 50 %\n"))
    assert message.startswith(
        "proj/sheets/s.yaml:10:28: error: S.wall.inputs.outside_temperature: outside the range "
        "of the method (expected a surface temperature within -40 degC to +80 degC")


def test_bad_input__ambient_outside_the_air_table_located_at_the_ambient_temperature(errors_of):
    # Bergman et al. Table A.4 rows held: 200 K to 800 K.
    inputs = HT_EXAMPLE.replace("ambient_temperature: 301.15 K", "ambient_temperature: 150 K") \
        .replace("outside_coefficient: 22.697193 W/(m^2*K)", "surface_emissivity: 0.9")
    [message] = errors_of(pipe_sheet(inputs))
    assert message.startswith("proj/sheets/s.yaml:12:28: error: S.pipe.inputs."
                              "ambient_temperature: outside the range of the method (expected "
                              "200 K to 800 K")
