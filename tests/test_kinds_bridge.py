"""The thermal_bridge kind through sheets written inline: the one-dimensional limit by hand, ISO
10211's validation case 2 as the physics tests already use it, located errors word for word,
the printed working re-done from its printed numbers, and the section figure as data.

Each check value names its source beside it. Temperatures 20 °C inside and 0 °C outside unless
said otherwise, so that 0.1 K is an f_Rsi of 0.005.
"""

from __future__ import annotations

import math
import shutil
import textwrap
from pathlib import Path

import numpy as np
import pytest

from calcdoc.cli import main
from calcdoc.evaluate import evaluate_folder
from calcdoc.provenance import values_to_confirm
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill
from conftest import write_project
from test_redo import redo

C = 273.15  # K at 0 °C (definition of the Celsius scale)
ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "projects" / "cold-store"


def sheet(inputs: str, checks: str = "") -> dict[str, str]:
    text = ("id: B\ntitle: Junction sheet\nblocks:\n  - id: tb\n    kind: thermal_bridge\n"
            "    inputs:\n" + textwrap.indent(textwrap.dedent(inputs), "      "))
    if checks:
        text += "    checks:\n" + textwrap.indent(textwrap.dedent(checks), "      ")
    return {"b": text}


def results(package, key: str = "B.tb") -> dict:
    return {name: r.value for name, r in package.block(key).output.results.items()}


def printed(block) -> dict:
    return {s.name: s for s in block.printed_steps(3)}


# A plain wall with no junction: d = 0.33 m of λ = 1 W/(m·K), 1.2 m high, R_si 0.13, R_se 0.04.
PLAIN_WALL = """\
regions:
  - {name: Wall, x: [0, 330 mm], y: [0, 1.2 m], conductivity: 1 W/(m*K)}
surfaces:
  - {name: Inside face, side: inside, from: [0, 0 m], to: [0, 1.2 m], surface_resistance: 0.13 m^2*K/W}
  - {name: Outside face, side: outside, from: [330 mm, 1.2 m], to: [330 mm, 0 m], surface_resistance: 0.04 m^2*K/W}
inside_temperature: 20 degC
outside_temperature: 0 degC
flanking:
  - {name: Wall, U: 2 W/(m^2*K), length: 1.2 m}
"""

# ISO 10211 validation case 2 as tests/test_physics_bridge2d.py:iso10211_case2 builds it (its
# docstring gives the sources and the caveats: the standard itself was not at hand; geometry and
# values as quoted by Feel++, feelpp/feelpp toolboxes/heat/cases/Building/
# ThermalBridgesENISO10211/case2.json; the 47.5 mm total thickness those points need). The
# condensation surface resistance is set to the case's own R_si, so that the surface solve is
# the case itself.
ISO_CASE_2 = """\
regions:
  - {name: Insulation, x: [0, 500 mm], y: [0, 41.5 mm], conductivity: 0.029 W/(m*K)}
  - {name: Concrete, x: [0, 500 mm], y: [41.5, 47.5 mm], conductivity: 1.15 W/(m*K)}
  - {name: Wood, x: [0, 15 mm], y: [36.5, 41.5 mm], conductivity: 0.12 W/(m*K)}
  - {name: Plate, x: [0, 500 mm], y: [0, 1.5 mm], conductivity: 230 W/(m*K)}
  - {name: Web, x: [0, 1.5 mm], y: [0, 36.5 mm], conductivity: 230 W/(m*K)}
  - {name: Flange, x: [0, 15 mm], y: [35, 36.5 mm], conductivity: 230 W/(m*K)}
surfaces:
  - {name: Inside, side: inside, from: [0, 0 mm], to: [500, 0 mm], surface_resistance: 0.11 m^2*K/W}
  - {name: Outside, side: outside, from: [0, 47.5 mm], to: [500, 47.5 mm], surface_resistance: 0.06 m^2*K/W}
inside_temperature: 20 degC
outside_temperature: 0 degC
condensation_surface_resistance: 0.11 m^2*K/W
"""


# ----------------------------------------------------------------------- one-dimensional limit


def test_plain_wall__l2d_is_u_times_length_psi_zero_and_f_rsi_one_dimensional(evaluate):
    # Hand calculation (ISO 6946:2017 6.7.1, from memory, layers in series):
    #   R_T = 0.13 + 0.33/1 + 0.04 = 0.50 m²·K/W, U = 2.0 W/(m²·K); L2D = U·l = 2.0 · 1.2 = 2.4
    #   W/(m·K); ψ = L2D − U·l = 0 (ISO 10211, from memory: a section without a junction);
    #   f_Rsi = 1 − R_si'/R_T' with R_si' = 0.25 (ISO 13788, from memory):
    #   1 − 0.25/(0.25 + 0.33 + 0.04) = 1 − 0.25/0.62 = 0.596774; θ_si = 20·0.596774 = 11.935 °C.
    r = results(evaluate(sheet(PLAIN_WALL)))
    assert r["L2D"] == pytest.approx(2.4, rel=1e-9)          # hand calculation above
    assert r["psi"] == pytest.approx(0.0, abs=1e-9)          # hand calculation above
    assert r["f_Rsi"] == pytest.approx(0.596774, abs=1e-6)   # hand calculation above
    assert r["theta_si_min"] - C == pytest.approx(11.935, abs=0.001)  # hand calculation above
    assert r["x_si_min"] == pytest.approx(0.0, abs=1e-12)    # on the inside face


def test_plain_wall__unit_written_once_is_the_same_section(evaluate):
    once = results(evaluate(sheet(PLAIN_WALL)))
    both = results(evaluate(sheet(PLAIN_WALL.replace("x: [0, 330 mm]", "x: [0 mm, 330 mm]")
                                  .replace("[0, 0 m]", "[0 m, 0 m]"))))
    assert both == once


# ------------------------------------------------------------------------- a published case


def test_iso10211_case2__heat_flow_and_coldest_inside_point_as_quoted_by_feelpp(evaluate):
    package = evaluate(sheet(ISO_CASE_2))
    r = results(package)
    # ISO 10211 case 2, heat flow 9.5 W/m at 20 K, tolerance 0.1 W/m (as quoted by Feel++,
    # see ISO_CASE_2): L2D = 9.5/20 = 0.475 W/(m·K) within 0.005
    assert r["L2D"] * 20.0 == pytest.approx(9.5, abs=0.1)
    block = package.block("B.tb")
    balance = printed(block)["Phi"]
    assert balance.result.text == "9.49 W/m"  # the same heat flow, as printed (3 figures)
    # Point H, the inside surface over the web, 16.8 °C within 0.1 K (as quoted by Feel++): the
    # coldest point of the inside surface, which the solve finds there.
    assert r["theta_si_min"] - C == pytest.approx(16.8, abs=0.1)
    assert (r["x_si_min"], r["y_si_min"]) == (pytest.approx(0.0, abs=1e-9),
                                              pytest.approx(0.0, abs=1e-9))
    # the figure's isotherm field is that solution: points I (0.5, 0) 18.3 °C and A (0, 0.0475)
    # 7.1 °C, within 0.1 K (as quoted by Feel++)
    field = block.output.figures[0].contours
    values = np.asarray(field.values)
    assert values[0, -1] - C == pytest.approx(18.3, abs=0.1)
    assert values[-1, 0] - C == pytest.approx(7.1, abs=0.1)
    assert "psi" not in r and "no flanking" in fill(block.output.absent["psi"], 3)


# ----------------------------------------------------------------------------- the working


def test_psi__one_step_over_the_flanking_u_values_and_lengths(evaluate):
    block = evaluate(sheet(PLAIN_WALL.replace(
        "  - {name: Wall, U: 2 W/(m^2*K), length: 1.2 m}",
        "  - {name: Upper, U: 2 W/(m^2*K), length: 0.7 m}\n"
        "  - {name: Lower, U: 2 W/(m^2*K), length: 0.5 m}"))).block("B.tb")
    step = printed(block)["psi"]
    assert step.expr == "L_2D - U_1 * l_1 - U_2 * l_2" and step.yields == "psi"
    assert {k: v.text for k, v in step.values.items() if k != "L_2D"} == {
        "U_1": "2 W/(m²·K)", "l_1": "0.7 m", "U_2": "2 W/(m²·K)", "l_2": "0.5 m"}


def test_psi__many_flanking_elements_grouped_as_u_times_l_products(evaluate):
    many = "\n".join(f"  - {{name: Part {k}, U: 2 W/(m^2*K), length: 0.3 m}}" for k in range(4))
    block = evaluate(sheet(PLAIN_WALL.replace(
        "  - {name: Wall, U: 2 W/(m^2*K), length: 1.2 m}", many))).block("B.tb")
    steps = printed(block)
    assert steps["psi"].expr == "L_2D - (H_1 + H_2 + H_3 + H_4)"
    assert [s.item for s in block.printed_steps(3) if s.group] [:4] == [
        f"Part {k}" for k in range(4)]
    assert block.output.results["psi"].value == pytest.approx(0.0, abs=1e-9)  # 2.4 − 4·0.6


def test_mesh_check__both_criteria_and_the_last_two_meshes_stated(evaluate):
    block = evaluate(sheet(ISO_CASE_2)).block("B.tb")
    solve = printed(block)["L_2D"]
    assert solve.expr is None and solve.yields == "L2D"
    text = solve.statement
    # ISO 10211's 1 % criterion (from memory) and calcdoc's f_Rsi criterion, 0.005
    assert "halved until L2D changes by less than 1 % and f_Rsi by less than 0.005" in text
    for place in ("cells", "smallest", "largest", "cells_2", "L_1", "L_2", "change",
                  "change_f"):
        assert place in solve.filled
    check_values = [solve.filled["cells"], solve.filled["cells_2"]]
    assert int(check_values[0]) == 4 * int(check_values[1])  # halved: four times the cells
    assert solve.filled["change"].endswith("%")


def test_stated_cell_size__uniform_mesh_compared_with_its_halving(evaluate):
    block = evaluate(sheet(PLAIN_WALL + "cell_size: 50 mm\n")).block("B.tb")
    text = printed(block)["L_2D"].statement
    assert text.startswith("Finite volumes on a uniform mesh of cells of at most 50 mm")
    assert "On the halved mesh" in text
    assert block.output.results["L2D"].value == pytest.approx(2.4, rel=1e-9)  # exact in 1-D


def test_library_conductivities__listed_as_values_to_confirm(evaluate):
    # A library value recalled rather than read (confirmed: false) that the solve uses must be
    # listed for confirmation, although no formula prints it.
    package = evaluate(sheet(PLAIN_WALL.replace("conductivity: 1 W/(m*K)",
                                                "material: concrete_normal")))
    keys = [v.key for v in values_to_confirm(package)]
    assert "materials.concrete_normal.conductivity" in keys
    assert "ISO 13788:2012 R_si 0.25" in keys  # the default R_si for surface humidity


def test_every_printed_step_redoes_from_its_printed_numbers(evaluate):
    package = evaluate(sheet(PLAIN_WALL.replace(
        "  - {name: Wall, U: 2 W/(m^2*K), length: 1.2 m}",
        "  - {name: Upper, U: 1.9 W/(m^2*K), length: 0.7 m}\n"
        "  - {name: Lower, U: 2.1 W/(m^2*K), length: 0.5 m}")))
    formulas = [s.record() for s in package.block("B.tb").printed_steps(3) if s.expr]
    assert {f["name"] for f in formulas} == {"psi", "f_Rsi"}
    for record in formulas:  # redo: the test's own evaluator, pint and kelvin arithmetic
        again, shown, half = redo(record)
        assert abs(again - shown) <= half * (1 + 1e-9), record


# ------------------------------------------------------------------------------- the figure


def test_figure__regions_surfaces_isotherms_and_coldest_point_as_data(evaluate):
    inputs = PLAIN_WALL.replace(
        "  - {name: Wall, x: [0, 330 mm], y: [0, 1.2 m], conductivity: 1 W/(m*K)}",
        "  - {name: Wall, x: [0, 330 mm], y: [0, 1.2 m], material: concrete_normal}\n"
        "  - {name: Nib, x: [330, 500 mm], y: [0.5, 0.7 m], material: pir_board}")
    inputs = inputs.replace(
        "  - {name: Outside face, side: outside, from: [330 mm, 1.2 m], to: [330 mm, 0 m], "
        "surface_resistance: 0.04 m^2*K/W}",
        "  - {name: Outside face, side: outside, from: [330 mm, 1.2 m], to: [330 mm, 0.7 m], "
        "surface_resistance: 0.04 m^2*K/W}")
    package = evaluate(sheet(inputs))
    r = results(package)
    figure = package.block("B.tb").output.figures[0]
    assert figure.equal_aspect and figure.legend == "outside" and figure.size[0] == 160.0
    # one box per region, shaded by material, the key naming the material
    assert [(b.x0, b.y0, b.x1, b.y1) for b in figure.boxes] == [
        (0.0, 0.0, 0.33, 1.2), (0.33, 0.5, 0.5, 0.7)]
    assert [b.legend for b in figure.boxes] == ["Reinforced concrete (2 % steel), normal weight",
                                                "Polyisocyanurate (PIR) board, foil faced"]
    assert figure.boxes[0].shade != figure.boxes[1].shade
    # one line per surface along its segment, its resistance in the legend
    assert [(line.x, line.y) for line in figure.lines] == [((0.0, 0.0), (0.0, 1.2)),
                                                           ((0.33, 0.33), (1.2, 0.7))]
    assert [fill(line.label, 3) for line in figure.lines] == [
        "inside surface, R_s = 0.13 m²·K/W", "outside surface, R_s = 0.04 m²·K/W"]
    # isotherms: the field on the mesh nodes in K, NaN off the body, at whole 2 °C steps
    c = figure.contours
    values = np.asarray(c.values)
    assert values.shape == (len(c.y), len(c.x))
    off = (np.asarray(c.x)[None, :] > 0.331) & ((np.asarray(c.y)[:, None] < 0.499) |
                                                (np.asarray(c.y)[:, None] > 0.701))
    assert np.all(np.isnan(values[off])) and not np.any(np.isnan(values[~off]))
    assert [round(level - C, 9) for level in c.levels] == [2, 4, 6, 8, 10, 12, 14, 16, 18]
    assert (c.unit, c.display) == ("K", "degC")
    # the coldest inside point, its temperature in the caption
    (point,) = figure.points
    assert (point.x, point.y) == (r["x_si_min"], r["y_si_min"])
    assert f"{r['theta_si_min'] - C:.3g} °C" in fill(figure.caption, 3)
    drawn = draw(figure)
    assert not drawn.half and "<svg" in drawn.svg and "coldest inside surface point" in drawn.svg


# ------------------------------------------------------------------------------- bad input


def build_errors(tmp_path, capsys, sheets) -> tuple[int, list[str]]:
    write_project(tmp_path / "proj", sheets)
    status = main(["build", "proj", "--out", "out", "--no-pdf"])
    err = capsys.readouterr().err
    assert "Traceback" not in err
    assert not (tmp_path / "out").exists(), "nothing may be written on bad input"
    return status, err.splitlines()


def test_surface_off_the_boundary__located_at_that_surface_exit_2(tmp_path, capsys):
    inputs = PLAIN_WALL.replace(
        "inside_temperature:",
        "  - name: Stray\n    side: outside\n    from: [100, 0 mm]\n    to: [100, 1200 mm]\n"
        "    surface_resistance: 0.04 m^2*K/W\ninside_temperature:")
    status, err = build_errors(tmp_path, capsys, sheet(inputs))
    assert status == 2
    assert err == [
        "proj/sheets/b.yaml:13:17: error: B.tb.inputs.surfaces[2]: outside the range of the "
        "method (expected a segment on the boundary of the body (body on one side only, along "
        "its whole length), got from [100, 0 mm] to [100, 1200 mm])",
        "    13 |           side: outside",
        "       |                 ^",
        "calcdoc: 1 error; nothing written"]


def test_region_extent_not_two_lengths__located_exit_2(tmp_path, capsys):
    status, err = build_errors(tmp_path, capsys, sheet(PLAIN_WALL.replace(
        "x: [0, 330 mm]", "x: [330 mm]")))
    assert status == 2
    assert err[0] == ("proj/sheets/b.yaml:8:27: error: B.tb.inputs.regions[0].x: 'x' is not two "
                      "lengths (expected a list of two lengths, e.g. [0, 365 mm], got ['330 mm'])")


def test_inside_not_warmer__refused_at_the_inside_temperature(tmp_path, capsys):
    # θ_si,min and f_Rsi belong to the warm side (docs/format.md: write an element from its warm side)
    status, err = build_errors(tmp_path, capsys, sheet(PLAIN_WALL.replace(
        "inside_temperature: 20 degC", "inside_temperature: -5 degC")))
    assert status == 2
    assert err[0] == (
        "proj/sheets/b.yaml:12:27: error: B.tb.inputs.inside_temperature: outside the range of "
        "the method (expected an inside temperature above the outside temperature (write the "
        "junction from its warm side), got '-5 degC')")


# ------------------------------------------------------------------------------------ demo


def test_demo_sheet_tb1__evaluates_checks_pass_and_its_steps_redo(tmp_path):
    # A copy of the demo with only TB1 and the sheets whose U-values it takes (EW1, FW1).
    project = tmp_path / "demo"
    shutil.copytree(DEMO, project)
    (project / "review.yaml").unlink(missing_ok=True)
    text = (project / "project.yaml").read_text()
    start, end = text.index("  sheets:\n"), text.index("revisions:")
    (project / "project.yaml").write_text(
        text[:start] + "  sheets:\n    - sheets/ew1.yaml\n    - sheets/fw1.yaml\n"
        "    - sheets/tb1.yaml\n" + text[end:])
    package = evaluate_folder(project)
    blocks = [b for s in package.sheets if s.spec.id == "TB1" for b in s.blocks]
    assert [b.key for b in blocks] == ["TB1.ground", "TB1.corner"]
    for block in blocks:
        assert block.checks and all(c.passed for c in block.checks), block.key
        assert block.output.warnings == []  # the mesh check is met
        for record in (s.record() for s in block.printed_steps(3) if s.expr):
            again, shown, half = redo(record)
            assert abs(again - shown) <= half * (1 + 1e-9), (block.key, record)
    # ψ of an external corner on internal dimensions is positive and small (common practice)
    corner = blocks[1].output.results
    assert 0.0 < corner["psi"].value < 0.05
    assert math.isclose(corner["x_si_min"].value, 0.0, abs_tol=1e-9)  # the inside corner


def test_mesh_check_not_met__warned_with_its_numbers(evaluate):
    # Two surfaces held at fixed temperatures (R = 0) meeting at a corner: the heat flow there
    # is unbounded in the continuum, so halving a coarse mesh changes L2D by more than 1 %
    # (calcdoc/physics/bridge2d.py, solve_section notes).
    block = evaluate(sheet("""\
        regions:
          - {name: Square, x: [0, 1 m], y: [0, 1 m], conductivity: 1 W/(m*K)}
        surfaces:
          - {name: Top, side: inside, from: [0, 1 m], to: [1, 1 m], surface_resistance: 0 m^2*K/W}
          - {name: Side, side: outside, from: [1, 1 m], to: [1, 0 m], surface_resistance: 0 m^2*K/W}
        inside_temperature: 20 degC
        outside_temperature: 0 degC
        cell_size: 250 mm
        """)).block("B.tb")
    (warning,) = [fill(w["text"], 3) for w in block.output.warnings]
    assert warning.startswith("The mesh check is not met: L2D changes by ")
    assert ", more than 1 % on halving the cells." in warning
