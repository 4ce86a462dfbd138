"""The wall_fire_exposure kind: inputs and results of docs/format.md, defaults with their clauses,
located errors, and agreement with published limits and closed-form solutions."""

import ast
import math
import shutil
import textwrap
from pathlib import Path

import numpy as np
import pint
import pytest
from scipy.constants import Stefan_Boltzmann
from scipy.special import erfc

from calcdoc.evaluate import evaluate_folder
from calcdoc.expressions import parse_expression
from calcdoc.physics.thermal_laws import LAWS
from calcdoc.project import Collector, builtin_material_files, load_materials
from calcdoc.render.numbers import half_unit
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill

DEMO = Path(__file__).resolve().parent.parent / "projects" / "cold-store"
DEMO_SHEETS = ("sheets/fire-plant-room.yaml", "sheets/fire-wall.yaml")  # the wall refs FC1
SIG = 3  # the demo's precision


def sheet(inputs: str, checks: str = "", extra_blocks: str = "") -> dict:
    text = "id: W1\ntitle: Wall sheet\nblocks:\n  - id: wall\n    kind: wall_fire_exposure\n" \
           "    inputs:\n" + textwrap.indent(textwrap.dedent(inputs), "      ")
    if checks:
        text += "    checks:\n" + textwrap.indent(textwrap.dedent(checks), "      ")
    return {"w1": text + extra_blocks}


CONCRETE_120 = """\
layers:
  - {name: slab, thickness: 120 mm, material: concrete_siliceous}
fire: standard
duration: 180 min
"""

PARAMETRIC_SHEET = {"fc": """\
id: FC
title: Fire
blocks:
  - id: fire
    kind: fire_curve
    inputs:
      curve: parametric
      duration: 180 min
      opening_factor: 0.05 m^0.5
      fire_load_density: 200 MJ/m^2
      thermal_inertia: 1300 J/(m^2*s^0.5*K)
      fire_growth: medium
      floor_area: 60 m^2
      height: 3.6 m
"""}


def results(package, key="W1.wall"):
    return package.block(key).output.results


def notes_of(block) -> str:
    return " ".join(fill(n["text"], SIG) for n in block.output.notes)


def printed_steps(block) -> dict:
    return {(s.name, s.item): s for s in block.printed_steps(SIG)}


# ------------------------------------------------------------------- published agreement


def test_slab_120_mm_standard_fire__not_below_en1992_1_2_table_5_8_rei_120(evaluate):
    # EN 1992-1-2:2004 Table 5.8 (from memory): hs = 120 mm for REI 120. Defaults: lower-limit
    # conductivity, 1.5 % moisture, 2300 kg/m³ (docs/format.md), 140 K mean rise (EN 1363-1).
    package = evaluate(sheet(CONCRETE_120 + "required_resistance: 120 min\n",
                             "- {result: time_to_insulation, at_least: 120 min}\n"))
    block = package.block("W1.wall")
    assert block.output.results["time_to_insulation"].value >= 120 * 60.0
    assert block.checks[0].passed
    # the rise at the required period is below the 140 K limit (EN 1363-1)
    assert results(package)["theta_unexposed_at_required"].value < 293.15 + 140.0


def test_held_surface_temperature__semi_infinite_erfc_through_the_kind(evaluate):
    # Carslaw & Jaeger, Conduction of Heat in Solids, 2nd ed. §2.4 (from memory):
    # T = Ti + (Ts - Ti) erfc(x / (2 sqrt(α t))); 300 mm of a constant-property layer is
    # semi-infinite for 1 h (α = 5e-7 m²/s). Tolerance 0.5 % of the 100 K step.
    package = evaluate(sheet("""\
        layers:
          - {thickness: 300 mm, conductivity: 1.0 W/(m*K), density: 2000 kg/m^3,
             specific_heat: 1000 J/(kg*K)}
        fixed_temperature: 120 degC
        duration: 60 min
        unexposed_convection: 0 W/(m^2*K)
        unexposed_emissivity: 0
        monitor:
          - {name: x10, depth: 10 mm}
          - {name: x50, depth: 50 mm}
        """))
    r = results(package)
    for name, depth in (("theta_x10", 0.01), ("theta_x50", 0.05)):
        expected = 293.15 + 100.0 * erfc(depth / (2.0 * math.sqrt(5e-7 * 3600.0)))
        assert r[name].value == pytest.approx(expected, abs=0.5)


def test_calcareous_is_a_thermal_alias_of_siliceous__en1992_1_2_3_3(evaluate):
    # EN 1992-1-2:2004 §3.3: the same specific heat, density change and conductivity for both.
    siliceous = evaluate(sheet(CONCRETE_120))
    calcareous = evaluate(sheet(CONCRETE_120.replace("concrete_siliceous",
                                                     "concrete_calcareous")))
    assert results(calcareous)["time_to_insulation"].value == pytest.approx(
        results(siliceous)["time_to_insulation"].value, rel=1e-12)


def test_upper_limit_conductivity_shortens_insulation__en1992_1_2_3_3_3(evaluate):
    # EN 1992-1-2 §3.3.3(2): the upper limit conducts more, so the unexposed face heats sooner.
    lower = evaluate(sheet(CONCRETE_120))
    upper = evaluate(sheet(CONCRETE_120.replace("material: concrete_siliceous}",
                                                "material: concrete_siliceous, "
                                                "conductivity_limit: upper}")))
    assert results(upper)["time_to_insulation"].value < results(lower)["time_to_insulation"].value


def test_wetter_concrete_insulates_longer__en1992_1_2_3_3_2_peak(evaluate):
    # EN 1992-1-2 §3.3.2(2): a higher moisture content raises c_p,peak (1470 → 2020 J/(kg·K)),
    # so more heat is absorbed near 100 °C.
    dry = evaluate(sheet(CONCRETE_120.replace("}", ", moisture_content: 0 %}")))
    wet = evaluate(sheet(CONCRETE_120.replace("}", ", moisture_content: 3 %}")))
    assert results(wet)["time_to_insulation"].value > results(dry)["time_to_insulation"].value


# ------------------------------------------------------------------- defaults and records


def test_defaults_carry_their_clauses(evaluate):
    package = evaluate(sheet(CONCRETE_120))
    block = package.block("W1.wall")
    records = {r.path: r for r in block.inputs}
    # EN 1991-1-2:2002 §3.1(5): 4 W/(m²·K) on the unexposed side, radiation counted separately.
    assert records["unexposed_convection"].si == pytest.approx(4.0)
    assert "§3.1(5)" in records["unexposed_convection"].source
    # EN 1363-1: mean rise 140 K; EN 1992-1-2 §2.2(2): εm = 0.7 for concrete.
    assert records["insulation_rise"].si == pytest.approx(140.0)
    assert records["exposed_emissivity"].si == pytest.approx(0.7)
    assert "§2.2(2)" in records["exposed_emissivity"].source
    notes = notes_of(block)
    assert "lower-limit conductivity, moisture content 1.5 %" in notes
    # the run is stated with its mesh, step and the halving check (docs/format.md)
    run = printed_steps(block)["delta_halving", None]
    assert "cells per layer 60 of 2.00 mm, time step 10 s" in run.statement
    assert "Halving both (cells per layer 120, time step 5 s) changes the time to insulation" \
        in run.statement
    assert "(limit 1 %)" in run.statement
    assert block.output.steps[[s.name for s in block.output.steps].index(
        "delta_halving")].result.si < 0.01  # docs/format.md: under 1 %
    assert block.kind.caution.startswith("This calculation supports, and does not replace")


def test_parametric_fire__decay_limit_200_k_after_the_peak_en1991_1_2_2_1_3(evaluate):
    # EN 1991-1-2:2002 §2.1.3: 140 K until the gas peak, then the decay-phase limit (recommended
    # 200 K, from memory). A 70 mm wall passes 140 K only after the 48 min peak of this fire, so a
    # stated decay limit of 140 K ends insulation sooner than the 200 K default.
    wall = """\
        layers:
          - {thickness: 70 mm, material: concrete_siliceous}
        fire: {ref: "FC.fire.temperature"}
        """
    default = evaluate({**PARAMETRIC_SHEET, **sheet(wall)})
    strict = evaluate({**PARAMETRIC_SHEET, **sheet(wall + "decay_insulation_rise: 140 K\n")})
    block = default.block("W1.wall")
    assert "Decay-phase insulation limit 200 K after the gas peak" in notes_of(block)
    # both limits are steps: θ_0 + Δθ (EN 1363-1, 140 K) and θ_0 + Δθ_2 (200 K)
    steps = printed_steps(block)
    assert steps["theta_lim", None].result.text == "160 °C"
    assert steps["theta_lim_2", None].result.text == "220 °C"
    peak = default.block("FC.fire").output.results["t_max"].value
    strict_time = results(strict)["time_to_insulation"].value
    assert strict_time > peak
    assert results(default)["time_to_insulation"].value > strict_time


def test_not_reached__absent_and_at_least_check_within_duration_passes(evaluate):
    # docs/format.md (Checks): a time not reached is absent; an at_least check passes when the duration
    # covers the limit, and is an input error otherwise.
    package = evaluate(sheet(CONCRETE_120.replace("180 min", "60 min"),
                             "- {result: time_to_insulation, at_least: 60 min}\n"))
    block = package.block("W1.wall")
    assert "time_to_insulation" not in block.output.results
    assert fill(block.output.absent["time_to_insulation"], SIG) == "not reached in 60.0 min"
    assert block.output.simulated_until == pytest.approx(3600.0)
    assert block.checks[0].passed


def test_at_least_check_beyond_duration__input_error(errors_of):
    errors = errors_of(sheet(CONCRETE_120.replace("180 min", "60 min"),
                             "- {result: time_to_insulation, at_least: 90 min}\n"))
    assert any("beyond the simulated duration" in e for e in errors)


def test_monitor_points__results_and_series_named_theta_name(evaluate):
    package = evaluate(sheet(CONCRETE_120 + "required_resistance: 90 min\nmonitor:\n"
                             "  - {name: rebar, depth: 30 mm}\n"))
    block = package.block("W1.wall")
    series = block.output.series["theta_rebar"]
    at_required = np.interp(5400.0, series.x, series.y)
    assert block.output.results["theta_rebar"].value == pytest.approx(at_required, abs=1e-6)
    assert set(block.output.series) >= {"theta_unexposed", "theta_rebar"}


def test_figures__histories_profiles_and_material_laws_as_data(evaluate):
    package = evaluate(sheet(CONCRETE_120 + "required_resistance: 120 min\n"))
    block = package.block("W1.wall")
    figures = {f.key: f for f in block.output.figures}
    assert list(figures)[:3] == ["W1.wall-unexposed", "W1.wall-histories", "W1.wall-profiles"]
    unexposed = figures["W1.wall-unexposed"]
    # the insulation limit θ_0 + 140 K = 160 °C (EN 1363-1) and the required period are marks
    marks = {m.axis: m for m in unexposed.marks}
    assert marks["y"].at == pytest.approx(293.15 + 140.0)
    assert marks["x"].at == pytest.approx(120 * 60.0)
    assert fill(marks["x"].label, SIG) == "required 120 min"
    assert "140 K" in fill(unexposed.caption, SIG)
    # profiles at 30/60/90/120 min and the end of the exposure, the layer as a band
    profiles = figures["W1.wall-profiles"]
    assert [fill(line.label, SIG) for line in profiles.lines] == [
        "t = 30.0 min", "t = 60.0 min", "t = 90.0 min", "t = 120 min", "t = 180 min"]
    assert [(b.x0, b.x1, b.label) for b in profiles.bands] == [(0.0, pytest.approx(0.12),
                                                                 "slab")]
    # the concrete laws go to the appendix, one figure per property
    laws = [f for f in block.output.figures if f.appendix]
    assert [f.y.unit for f in laws] == ["W/(m*K)", "J/(kg*K)", "kg/m^3"]
    # EN 1992-1-2 §3.3.3(2) eq. (3.8): λ = 1.333 W/(m·K) at 20 °C, 0.549 at 1200 °C (by hand)
    conductivity = laws[0].lines[0]
    assert conductivity.y[0] == pytest.approx(1.333, abs=0.0005)
    assert conductivity.y[-1] == pytest.approx(0.549, abs=0.0005)
    for figure in block.output.figures:  # every one draws
        assert draw(figure, SIG).svg.lstrip().startswith("<svg")


def test_board_over_concrete__library_board_from_fire_yaml(evaluate):
    package = evaluate(sheet("""\
        layers:
          - {name: board, thickness: 15 mm, material: calcium_silicate_board}
          - {name: wall, thickness: 100 mm, material: concrete_siliceous}
        fire: standard
        duration: 240 min
        """))
    bare = evaluate(sheet(CONCRETE_120.replace("120 mm", "100 mm").replace("180", "240")))
    # a protective board delays the unexposed face (common practice)
    assert results(package)["time_to_insulation"].value > results(bare)["time_to_insulation"].value


# ------------------------------------------------------------------- steps a checker redoes


def test_layer_steps__en1992_and_en1993_properties_at_20_degc(evaluate):
    package = evaluate(sheet("""\
        layers:
          - {name: slab, thickness: 100 mm, material: concrete_siliceous,
             moisture_content: 3 %}
          - {name: plate, thickness: 5 mm, material: carbon_steel}
        fire: standard
        duration: 30 min
        """))
    steps = printed_steps(package.block("W1.wall"))
    value = {key: step.result for key, step in steps.items()}
    # EN 1992-1-2:2004 §3.3.3(2) eq. (3.8), lower limit at 20 °C: 1.36 − 0.136·0.2 + 0.0057·0.04
    # = 1.333 W/(m·K) (by hand from the printed equation)
    assert value["lambda_20", "slab"].si("W/(m*K)") == pytest.approx(1.333, abs=0.005)
    # EN 1992-1-2:2004 §3.3.2(2): c_p,peak = 2020 J/(kg·K) at u = 3 %
    assert value["c_p_peak", "slab"].text == "2020 J/(kg·K)"
    assert steps["c_p_peak", "slab"].values["u"].text == "3 %"  # as written
    # EN 1993-1-2:2005 §3.4.1.3 eq. (3.3): 54 − 0.0333·20 = 53.3 W/(m·K); §3.4.1.2 eq. (3.2):
    # 425 + 0.773·20 − 1.69e-3·20² + 2.22e-6·20³ = 440 J/(kg·K) (by hand)
    assert value["lambda_20", "plate"].text == "53.3 W/(m·K)"
    assert value["c_p_20", "plate"].text == "440 J/(kg·K)"
    # EN 1993-1-2 §3.2.2(1) ρ = 7850 kg/m³: a = 53.3 / (7850 · 440) = 15.4 mm²/s (by hand)
    assert value["a_20", "plate"].text == "15.4 mm²/s"
    assert steps["a_20", "slab"].group == steps["a_20", "plate"].group  # one table


def test_boundary_flux_at_the_end__iso834_gas_temperature_and_en1991_1_2_eq_3_1(evaluate):
    package = evaluate(sheet(CONCRETE_120))
    step = printed_steps(package.block("W1.wall"))["q_net", None]
    assert step.expr == ("h_c * (theta_g - theta_s) + Phi * varepsilon_m * varepsilon_f * sigma "
                         "* (theta_g ** 4 - theta_s ** 4)")
    # ISO 834-1:1999 / EN 1991-1-2 eq. (3.4): 20 + 345 log10(8·180 + 1) = 1110 °C at 180 min
    assert step.values["theta_g"].si("degC") == pytest.approx(1110.0, abs=0.5)
    assert step.values["theta_g"].unit == "K"  # printed absolute, in a fourth power
    # EN 1991-1-2 §3.1(5) and §3.2.1(2): αc = 25 W/(m²·K) for the standard fire, εm = 0.7
    # (EN 1992-1-2 §2.2(2)), εf = 1, Φ = 1
    assert [step.values[n].text for n in ("h_c", "varepsilon_m", "varepsilon_f", "Phi")] == [
        "25 W/(m²·K)", "0.7", "1", "1"]


def _pint_value(text: str, ureg: pint.UnitRegistry):
    """A printed machine quantity ('20 degC', '1.5 percent', '0.7') as pint reads it; an
    absolute temperature in °C in kelvin, where arithmetic on it is defined."""
    number, _, unit = text.partition(" ")
    q = ureg.Quantity(float(number), unit or "dimensionless")
    return q.to("kelvin") if unit == "degC" else q


def _redo(expr: str, values: dict, ureg: pint.UnitRegistry):
    names = {k: _pint_value(v, ureg) for k, v in values.items()}
    names["sigma"] = ureg.Quantity(Stefan_Boltzmann, "W/(m^2*K^4)")  # scipy.constants

    def go(node):
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return ureg.Quantity(float(node.value), "dimensionless")
        if isinstance(node, ast.Name):
            return names[node.id]
        if isinstance(node, ast.UnaryOp):
            return -go(node.operand)
        if isinstance(node, ast.Call):
            args = [go(a) for a in node.args]
            return {"abs": abs, "min": min, "max": max}[node.func.id](*args)
        left, right = go(node.left), go(node.right)
        return {ast.Add: left.__add__, ast.Sub: left.__sub__, ast.Mult: left.__mul__,
                ast.Div: left.__truediv__, ast.Pow: left.__pow__}[type(node.op)](right)

    return go(parse_expression(expr))


def test_demo_steps__redo_with_pint_from_the_printed_numbers(tmp_path):
    # Every formula step of the demo's wall sheet, evaluated with pint (a reference units
    # library, a registry of its own) from the operands as printed, gives the printed result to
    # half a unit of its last digit; every block prints at least one such step.
    project = tmp_path / "demo"
    shutil.copytree(DEMO, project)
    (project / "review.yaml").unlink(missing_ok=True)  # its comments are on the other sheets
    text = (project / "project.yaml").read_text()
    start = text.index("  sheets:\n")
    end = text.index("revisions:")
    (project / "project.yaml").write_text(
        text[:start] + "  sheets:\n" + "".join(f"    - {s}\n" for s in DEMO_SHEETS)
        + text[end:])
    package = evaluate_folder(project)
    ureg = pint.UnitRegistry()
    blocks = [b for s in package.sheets for b in s.blocks if b.kind.name == "wall_fire_exposure"]
    assert [b.key for b in blocks] == ["W7.standard", "W7.plant_room"]
    for block in blocks:
        formulas = [s for s in block.printed_steps(SIG) if s.expr is not None]
        assert formulas, block.key
        for step in formulas:
            record = step.record()
            number, _, unit = record["result"].partition(" ")
            again = _redo(record["expr"], record["values"], ureg)
            again = again.to(unit or "dimensionless").magnitude if unit != "degC" else \
                again.to("degC").magnitude
            assert abs(again - float(number)) <= half_unit(number) * (1 + 1e-9), \
                (block.key, step.name, step.item, record, again)


def test_cold_store_side_below_20_degc__warned_outside_the_en1992_law(evaluate):
    # EN 1992-1-2:2004 §3.3 gives its laws from 20 °C; a wall starting at 5 °C leaves that range
    # and the block says so, naming the layer and both temperatures.
    package = evaluate(sheet(CONCRETE_120.replace("180 min", "30 min")
                             + "initial_temperature: 5 degC\n"))
    warnings = [fill(w["text"], SIG) for w in package.block("W1.wall").output.warnings]
    assert any(w.startswith("Layer 1 (slab) reached 5.00 °C, below the start of its material law "
                            "at 20 °C") for w in warnings), warnings


# ----------------------------------------------------------------------------- bad input


def test_moisture_above_3_percent__spalling_warning_and_the_3_percent_peak(evaluate):
    # EN 1992-1-2:2004 §3.3.2(2) gives the peak only to 3 %; above it §4.5.1(2) requires a
    # spalling assessment (issue: "a spalling warning above 3 %"). The 3 % peak is used, which
    # can only shorten the insulation time against a wetter peak (safe side).
    wet = evaluate(sheet(CONCRETE_120.replace("}", ", moisture_content: 3.5 %}")))
    at_cap = evaluate(sheet(CONCRETE_120.replace("}", ", moisture_content: 3 %}")))
    warnings = [fill(w["text"], SIG) for w in wet.block("W1.wall").output.warnings]
    assert any("explosive spalling must be considered (EN 1992-1-2 §4.5.1(2))" in w
               for w in warnings)
    assert results(wet)["time_to_insulation"].value == results(at_cap)["time_to_insulation"].value


def test_insulation_rise_in_degc__refused_as_an_absolute_temperature(errors_of):
    # docs/format.md (Values): a difference only in K, delta_degC or delta_degF.
    errors = errors_of(sheet(CONCRETE_120 + "insulation_rise: 140 degC\n"))
    assert len(errors) == 1 and "insulation_rise" in errors[0]


@pytest.mark.parametrize("inputs, words", [
    (CONCRETE_120 + "required_resistance: 240 min\n", "required_resistance"),
    (CONCRETE_120 + "decay_insulation_rise: 200 K\n", "only with a parametric fire"),
    (CONCRETE_120 + "fixed_temperature: 500 degC\n", "exactly one of fire | fixed_temperature"),
    (CONCRETE_120.replace("fire: standard\nduration: 180 min\n", "fixed_temperature: 500 degC\n"),
     "a duration"),
    (CONCRETE_120 + "monitor:\n  - {name: deep, depth: 130 mm}\n", "monitor[0].depth"),
    # EN 1992-1-2 §3.3 is for normal-weight concrete, 2000 to 2600 kg/m³
    (CONCRETE_120.replace("}", ", density: 1800 kg/m^3}"), "layers[0].density"),
    (CONCRETE_120 + "monitor:\n  - {name: Deep-1, depth: 30 mm}\n", "is not usable"),
    (CONCRETE_120.replace("}", ", conductivity: 1.5 W/(m*K)}"), "set by them"),
    (CONCRETE_120.replace("concrete_siliceous}", "carbon_steel, moisture_content: 1 %}"),
     "takes no options"),
    (CONCRETE_120.replace("material: concrete_siliceous", "conductivity: 1 W/(m*K)"),
     "missing density, specific_heat"),
    (CONCRETE_120.replace("concrete_siliceous", "concrete_siliceos"), "did you mean"),
])
def test_bad_wall_inputs__one_located_error_each(errors_of, inputs, words):
    errors = errors_of(sheet(inputs))
    assert len(errors) == 1, errors
    assert words in errors[0]
    assert ".yaml:" in errors[0].split(" error:")[0]


def test_fire_yaml__entries_cited_and_laws_registered():
    # Every library material carries a source (docs/format.md); law entries name a registered law,
    # and both concrete names share EN 1992-1-2 §3.3 (thermal aliases).
    files = [p for p in builtin_material_files() if p.name == "fire.yaml"]
    collector = Collector()
    materials = load_materials(files, files[0].parent, collector)
    assert not collector.errors
    for name, entry in materials.items():
        assert entry["source"]
        if "law" in entry:
            assert entry["law"] in LAWS
        else:
            assert {"conductivity", "density", "specific_heat"} <= set(entry)
    assert materials["concrete_siliceous"]["law"] == materials["concrete_calcareous"]["law"]
    assert materials["carbon_steel"]["law"] == "en1993_carbon_steel"
