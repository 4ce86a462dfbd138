"""The radiation kinds evaluated from sheets: results, steps as data, figures as data and
located errors; and every printed step of the demo's radiation sheets re-done with pint."""

from __future__ import annotations

import ast
import math
import re
import shutil
from pathlib import Path

import pytest
from ht.radiation import q_rad
from scipy.constants import Stefan_Boltzmann

from calcdoc.evaluate import evaluate_project
from calcdoc.expressions import parse_expression
from calcdoc.kinds import get_kind
from calcdoc.physics.exposure import Emitter, incident_flux, minimum_separation
from calcdoc.physics.viewfactors import element_to_rectangle, element_to_rectangle_corner
from calcdoc.project import load_project
from calcdoc.render.plots import draw
from calcdoc.render.printed import fill, print_step
from calcdoc.units import parse_unit, ureg

SIGMA = 5.670374419e-8  # CODATA 2018, W/(m²·K⁴) (from memory)


def sheet(blocks: str) -> dict[str, str]:
    return {"rad": "id: RAD\ntitle: Radiation\nblocks:\n" + blocks}


def results(package, key: str) -> dict[str, float]:
    return {name: r.value for name, r in package.block(key).output.results.items()}


def steps(package, key: str, sig: int = 3) -> dict:
    """The block's steps as printed, by name (the last of a name wins)."""
    return {s.name: s for s in (print_step(step, sig) for step in
                                package.block(key).output.steps)}


def words(text) -> str:
    """A phrase (absent result, note, statement) as the report prints it."""
    return fill(text, 3)


# --- surface_emission --------------------------------------------------------------------------

def test_surface_emission__hand_calculation_and_ht_reference(evaluate):
    package = evaluate(sheet("""
  - id: flue
    kind: surface_emission
    title: Flue casing
    inputs: {temperature: 250 degC, emissivity: 0.9, area: 2 m^2,
             surroundings_temperature: 20 degC}
"""))
    r = results(package, "RAD.flue")
    t, t_sur = 523.15, 293.15
    # Stefan–Boltzmann law by hand: 0.9 σ 523.15⁴ = 3823 W/m² (4 figures)
    assert r["E"] == pytest.approx(0.9 * SIGMA * t**4, rel=1e-9)
    assert r["E"] == pytest.approx(3823.0, abs=0.5)
    assert r["Q"] == pytest.approx(2.0 * r["E"], rel=1e-12)
    # ht (PyPI) q_rad, CODATA 2014 σ: agrees to 2e-6
    assert r["q_net"] == pytest.approx(q_rad(0.9, t, t_sur), rel=2e-6)
    assert r["Q_net"] == pytest.approx(2.0 * r["q_net"], rel=1e-12)


def test_surface_emission__absent_results_say_why(evaluate):
    package = evaluate(sheet("""
  - id: panel
    kind: surface_emission
    title: Panel
    inputs: {temperature: 80 degC, emissivity: 0.95}
"""))
    out = package.block("RAD.panel").output
    assert set(out.results) == {"E"}
    assert words(out.absent["Q"]) == "no area given"
    assert words(out.absent["q_net"]) == "no surroundings temperature given"


def test_surface_emission__step_is_stefan_boltzmann_with_the_temperature_in_kelvin(evaluate):
    package = evaluate(sheet("""
  - id: panel
    kind: surface_emission
    title: Panel
    inputs: {temperature: 80 degC, emissivity: 0.95}
"""))
    (step,) = package.block("RAD.panel").output.steps
    assert step.expr == "varepsilon * sigma * T ** 4" and step.yields == "E"
    record = print_step(step, 3).record()
    # 80 °C enters a power, so it prints in K: 353.15 K (as written, converted exactly)
    assert record["values"] == {"varepsilon": "0.95", "T": "353.15 K"}
    # 0.95 σ 353.15⁴ = 837.9 W/m² (Stefan–Boltzmann law by hand, CODATA 2018 σ)
    assert record["result"] == "838 W/m^2"


# --- radiation_exchange ------------------------------------------------------------------------

def test_radiation_exchange__one_equal_shield_halves_the_flux(evaluate):
    package = evaluate(sheet("""
  - id: bare
    kind: radiation_exchange
    title: Without shield
    inputs: {configuration: parallel_plates, temperature_1: 400 degC, temperature_2: 40 degC,
             emissivity_1: 0.8, emissivity_2: 0.8, area_1: 3 m^2}
  - id: shielded
    kind: radiation_exchange
    title: With shield
    inputs:
      configuration: parallel_plates
      temperature_1: 400 degC
      temperature_2: 40 degC
      emissivity_1: 0.8
      emissivity_2: 0.8
      area_1: 3 m^2
      shields: [{emissivity_1: 0.8, emissivity_2: 0.8}]
"""))
    bare, shielded = results(package, "RAD.bare"), results(package, "RAD.shielded")
    t1, t2 = 673.15, 313.15
    # q = σ(T1⁴ − T2⁴)/(1/ε1 + 1/ε2 − 1) (Incropera 7th ed. Table 13.3) by hand
    assert bare["q"] == pytest.approx(SIGMA * (t1**4 - t2**4) / 1.5, rel=1e-9)
    assert bare["Q"] == pytest.approx(3.0 * bare["q"], rel=1e-12)
    # one shield of the same emissivity halves the flux (textbook fact, Incropera §13.3.4)
    assert shielded["q"] == pytest.approx(bare["q"] / 2.0, rel=1e-12)
    (shield,) = shielded["shield_temperatures"]
    assert shield == pytest.approx(((t1**4 + t2**4) / 2.0) ** 0.25, rel=1e-9)


def test_radiation_exchange__shielded_effective_emissivity_written_term_by_term(evaluate):
    package = evaluate(sheet("""
  - id: shielded
    kind: radiation_exchange
    title: Two shields
    inputs:
      configuration: parallel_plates
      temperature_1: 400 degC
      temperature_2: 40 degC
      emissivity_1: 0.8
      emissivity_2: 0.9
      shields: [{emissivity_1: 0.1, emissivity_2: 0.2}, {emissivity_1: 0.3, emissivity_2: 0.4}]
"""))
    printed = steps(package, "RAD.shielded")
    assert printed["varepsilon_eff"].expr == (
        "1 / (1 / varepsilon_1 + 1 / varepsilon_2 - 1 + 1 / varepsilon_s1_1 + "
        "1 / varepsilon_s1_2 - 1 + 1 / varepsilon_s2_1 + 1 / varepsilon_s2_2 - 1)")
    # Incropera 7th ed. Eq. 13.24 by hand: 1/0.8 + 1/0.9 − 1 + (10 + 5 − 1) + (3.333 + 2.5 − 1)
    # = 20.194, ε_eff = 0.04952
    r = results(package, "RAD.shielded")
    assert r["effective_emissivity"] == pytest.approx(0.04952, abs=5e-6)
    assert printed["q"].expr == "varepsilon_eff * sigma * (T_1 ** 4 - T_2 ** 4)"
    assert printed["q"].yields == "q"
    # the shield temperatures: one formula per shield, gap by gap from surface 1
    shield_steps = [s for s in package.block("RAD.shielded").output.steps
                    if s.group == "Shield temperatures"]
    assert [(s.name, s.item) for s in shield_steps] == [("T_s1", "shield 1"),
                                                         ("T_s2", "shield 2")]
    assert shield_steps[1].expr == ("(T_s1 ** 4 - q / sigma * (1 / varepsilon_s1_2 + "
                                    "1 / varepsilon_s2_1 - 1)) ** 0.25")
    assert [s.result.si for s in shield_steps] == r["shield_temperatures"]


def test_radiation_exchange__ten_equal_shields_cut_the_flux_to_one_eleventh(evaluate):
    # Too many shields for one line of working: the kind sums them in steps instead.
    shields = ", ".join(["{emissivity_1: 0.8, emissivity_2: 0.8}"] * 10)
    package = evaluate(sheet(f"""
  - id: bare
    kind: radiation_exchange
    title: Without shields
    inputs: {{configuration: parallel_plates, temperature_1: 400 degC, temperature_2: 40 degC,
             emissivity_1: 0.8, emissivity_2: 0.8}}
  - id: many
    kind: radiation_exchange
    title: Ten shields
    inputs:
      configuration: parallel_plates
      temperature_1: 400 degC
      temperature_2: 40 degC
      emissivity_1: 0.8
      emissivity_2: 0.8
      shields: [{shields}]
"""))
    # N shields of the plates' emissivity cut the flux to 1/(N + 1) (Incropera 7th ed. §13.3.4)
    assert results(package, "RAD.many")["q"] == pytest.approx(
        results(package, "RAD.bare")["q"] / 11.0, rel=1e-12)
    assert len(results(package, "RAD.many")["shield_temperatures"]) == 10
    printed = steps(package, "RAD.many")
    assert printed["varepsilon_eff"].expr == "1 / R_total"
    assert printed["R_total"].expr == "R_p + " + " + ".join(f"R_s{n}" for n in range(1, 11))
    # each shield of emissivity 0.8 adds 1/0.8 + 1/0.8 − 1 = 1.5 (Incropera 7th ed. §13.3.4)
    assert printed["R_s10"].record()["result"] == "1.50"


def test_radiation_exchange__body_in_large_enclosure(evaluate):
    package = evaluate(sheet("""
  - id: pipe
    kind: radiation_exchange
    title: Pipe in a large hall
    inputs: {configuration: enclosed_body, temperature_1: 150 degC, temperature_2: 15 degC,
             emissivity_1: 0.85}
"""))
    r = results(package, "RAD.pipe")
    # ε1 σ (T1⁴ − T2⁴) (Incropera 7th ed. Table 13.3, small convex object in a large cavity)
    assert r["q"] == pytest.approx(0.85 * SIGMA * (423.15**4 - 288.15**4), rel=1e-9)
    assert r["effective_emissivity"] == pytest.approx(0.85)
    assert words(package.block("RAD.pipe").output.absent["Q"]) == "no area_1 given"


def test_radiation_exchange__general_enclosure_without_view_factor_is_a_missing_input(
        errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiation_exchange
    title: No view factor
    inputs: {configuration: general, temperature_1: 400 K, temperature_2: 300 K,
             emissivity_1: 0.8, emissivity_2: 0.5, area_1: 1 m^2, area_2: 4 m^2}
"""))
    assert error == ("proj/sheets/rad.yaml:5:5: error: RAD.bad.inputs: missing input "
                     "'view_factor' (expected view_factor for configuration general, got "
                     "nothing)")


def test_radiation_exchange__general_enclosure_refuses_f21_above_one(errors_of):
    errors = errors_of(sheet("""
  - id: bad
    kind: radiation_exchange
    title: Inconsistent view factor
    inputs: {configuration: general, temperature_1: 400 K, temperature_2: 300 K,
             emissivity_1: 0.8, emissivity_2: 0.5, area_1: 4 m^2, area_2: 1 m^2,
             view_factor: 0.5}
"""))
    (error,) = errors
    assert "rad.yaml:" in error
    assert "inputs.view_factor: outside the range of the method" in error
    assert "A1*F12 <= A2" in error


def test_radiation_exchange__enclosed_body_larger_than_enclosure_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiation_exchange
    title: Body larger than its enclosure
    inputs: {configuration: enclosed_body, temperature_1: 400 K, temperature_2: 300 K,
             emissivity_1: 0.8, emissivity_2: 0.5, area_1: 4 m^2, area_2: 1 m^2}
"""))
    assert "inputs.area_1: outside the range of the method" in error
    assert "area_1 <= area_2" in error


def test_radiation_exchange__shields_only_for_parallel_plates(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiation_exchange
    title: Shield in an enclosure
    inputs:
      configuration: enclosed_body
      temperature_1: 400 K
      temperature_2: 300 K
      emissivity_1: 0.8
      shields: [{emissivity_1: 0.1, emissivity_2: 0.1}]
"""))
    assert "for parallel_plates only" in error
    # located at the first shield's emissivity_1 (Kind.input_names maps the physics' name)
    assert error.startswith("proj/sheets/rad.yaml:13:") and ".shields[0].emissivity_1:" in error


@pytest.mark.parametrize("emissivity", ["0", "1.2", "-0.1"])
def test_radiation_exchange__emissivity_outside_zero_one_is_a_located_error(errors_of, emissivity):
    (error,) = errors_of(sheet(f"""
  - id: bad
    kind: radiation_exchange
    title: Bad emissivity
    inputs: {{configuration: parallel_plates, temperature_1: 400 K, temperature_2: 300 K,
             emissivity_1: {emissivity}, emissivity_2: 0.5}}
"""))
    assert "rad.yaml:9:" in error and "'emissivity_1' out of range" in error


# --- view_factor -------------------------------------------------------------------------------

def test_view_factor__opposed_unit_squares_and_perpendicular_reciprocity(evaluate):
    package = evaluate(sheet("""
  - id: opposed
    kind: view_factor
    title: Opposed squares
    inputs: {geometry: opposed_rectangles, width: 1 m, height: 1 m, separation: 1 m}
  - id: corner
    kind: view_factor
    title: Wall to floor
    inputs: {geometry: perpendicular_rectangles, common_edge: 2 m, width_1: 1 m, width_2: 3 m}
"""))
    # Howell's catalogue C-11, unit squares: 0.1998 (from memory)
    assert results(package, "RAD.opposed")["F12"] == pytest.approx(0.1998, abs=5e-5)
    r = results(package, "RAD.corner")
    assert r["area_1"] * r["F12"] == pytest.approx(r["area_2"] * r["F21"], rel=1e-12)


def test_view_factor__catalogue_cases_are_statements_after_their_ratio_steps(evaluate):
    package = evaluate(sheet("""
  - id: opposed
    kind: view_factor
    title: Opposed squares
    inputs: {geometry: opposed_rectangles, width: 2 m, height: 1 m, separation: 500 mm}
  - id: corner
    kind: view_factor
    title: Wall to floor
    inputs: {geometry: perpendicular_rectangles, common_edge: 2 m, width_1: 1 m, width_2: 3 m}
"""))
    opposed = package.block("RAD.opposed").output.steps
    assert [(s.name, s.expr) for s in opposed] == [
        ("X", "a / c"), ("Y", "b / c"), ("F_12", None), ("A_1", "a * b"), ("A_2", "a * b"),
        ("F_21", "A_1 * F_12 / A_2")]
    f12 = print_step(opposed[2], 3)
    assert f12.yields == "F12"
    assert f12.statement == ("Howell's catalogue case C-11 (identical, parallel, directly "
                             "opposed rectangles) at X = 4.00 and Y = 2.00")
    corner = package.block("RAD.corner").output.steps
    assert [(s.name, s.expr) for s in corner[:2]] == [("W", "w_1 / l"), ("H", "w_2 / l")]
    assert "case C-14" in print_step(corner[2], 3).statement


def test_view_factor__element_defaults_to_the_centre_and_has_no_reverse_factor(evaluate):
    package = evaluate(sheet("""
  - id: element
    kind: view_factor
    title: Element facing a panel
    inputs: {geometry: element_to_rectangle, width: 2 m, height: 2 m, separation: 1 m}
"""))
    block = package.block("RAD.element")
    # centre of a 2 m square 1 m away: 4 × B-3(1, 1) = 4 × 0.1385 = 0.5541 (Howell B-3, from
    # memory of the corner value)
    assert block.output.results["F12"].value == pytest.approx(0.5541, abs=2e-4)
    assert "F21" in block.output.absent
    assert block.output.results["area_2"].value == pytest.approx(4.0)
    printed = steps(package, "RAD.element")
    assert printed["F_12"].expr == "F_1 + F_2 + F_3 + F_4" and printed["F_12"].yields == "F12"
    corners = [s for s in block.output.steps if s.group == "Corner rectangles at the foot point"]
    assert [s.name for s in corners] == ["F_1", "F_2", "F_3", "F_4"]
    ratios = [("A₁", "B₁"), ("A₂", "B₁"), ("A₁", "B₂"), ("A₂", "B₂")]
    for step, (a, b) in zip(corners, ratios):
        assert step.expr is None  # the corner factor has arctangents: a statement
        # each corner: Howell's B-3 at A = B = 1: 0.1385 (from memory)
        assert step.result.si == pytest.approx(0.1385, abs=5e-5)
        assert print_step(step, 3).statement == (
            "Howell's catalogue case B-3 (plane element under a corner of a parallel "
            f"rectangle) at A = |{a}| = 1.00 and B = |{b}| = 1.00")


def test_view_factor__foot_point_beyond_the_rectangle_subtracts_corner_rectangles(evaluate):
    package = evaluate(sheet("""
  - id: beside
    kind: view_factor
    title: Element beside a panel
    inputs: {geometry: element_to_rectangle, width: 2 m, height: 2 m, separation: 1 m,
             element_x: 3 m, element_y: 1 m}
"""))
    block = package.block("RAD.beside")
    # By view-factor algebra (Incropera 7th ed. §13.1.2): the element at x = 3 sees the
    # rectangle [0, 2] as [0, 3] minus [2, 3]; with the foot point at mid-height each is two
    # corner rectangles of Howell's case B-3: 2 F_B3(3, 1) − 2 F_B3(1, 1).
    expected = (2.0 * element_to_rectangle_corner(3.0, 1.0, 1.0)
                - 2.0 * element_to_rectangle_corner(1.0, 1.0, 1.0))
    assert block.output.results["F12"].value == pytest.approx(expected, rel=1e-12)
    negative = [print_step(s, 3).statement for s in block.output.steps
                if s.group and s.result.si < 0]
    assert len(negative) == 2
    assert all("taken negative" in text for text in negative)


def test_view_factor__coaxial_disks(evaluate):
    package = evaluate(sheet("""
  - id: disks
    kind: view_factor
    title: Disks
    inputs: {geometry: coaxial_disks, radius_1: 1 m, radius_2: 1 m, separation: 1 m}
"""))
    # (3 − √5)/2 = 0.382, Howell's catalogue C-41 by hand
    assert results(package, "RAD.disks")["F12"] == pytest.approx((3 - math.sqrt(5)) / 2,
                                                                 rel=1e-9)
    printed = steps(package, "RAD.disks")
    # C-41 has no arctangent: a step, with the catalogue's root rationalised
    assert printed["F_12"].expr == ("2 * (R_2 / R_1) ** 2 / (X + sqrt(X ** 2 - 4 * (R_2 / R_1) "
                                    "** 2))")
    assert printed["X"].record()["result"] == "3.00"
    assert printed["F_21"].record()["result"] == "0.382"


def test_view_factor__input_of_another_geometry_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: view_factor
    title: Disks with a width
    inputs: {geometry: coaxial_disks, radius_1: 1 m, radius_2: 1 m, separation: 1 m,
             width: 2 m}
"""))
    assert "inputs.width: outside the range of the method" in error
    assert "width is for opposed_rectangles or element_to_rectangle" in error


def test_view_factor__missing_dimension_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: view_factor
    title: Disks without a radius
    inputs: {geometry: coaxial_disks, radius_1: 1 m, separation: 1 m}
"""))
    assert error == ("proj/sheets/rad.yaml:5:5: error: RAD.bad.inputs: missing input "
                     "'radius_2' (expected radius_2 for geometry coaxial_disks, got nothing)")


def test_view_factor__negative_dimension_is_a_located_error(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: view_factor
    title: Negative width
    inputs: {geometry: opposed_rectangles, width: -1 m, height: 1 m, separation: 1 m}
"""))
    assert "rad.yaml:8:" in error and "'width' out of range (expected width > 0" in error


# --- radiant_exposure --------------------------------------------------------------------------

DOORS = """
  - id: bay
    kind: radiant_exposure
    title: Loading bay doors to the boundary
    inputs:
      emitters:
        - {name: Door 1, width: 3 m, height: 4 m, x: 0 m, y: 0 m, temperature: 1000 K}
        - {name: Door 2, width: 3 m, height: 4 m, x: 5 m, y: 0 m, emissive_power: 56.7 kW/m^2}
      separation: 7 m
      limit: {named: wood_piloted_ignition_flux}
    checks:
      - {result: q, at_most: {named: wood_piloted_ignition_flux}}
"""


def test_radiant_exposure__worst_point_flux_utilisation_and_minimum_separation(evaluate):
    package = evaluate(sheet(DOORS))
    r = results(package, "RAD.bay")
    # black opening at 1000 K: σ T⁴ = 56.70 kW/m² (Stefan–Boltzmann law by hand)
    e1 = SIGMA * 1000.0**4
    emitters = [Emitter(0.0, 0.0, 3.0, 4.0, e1), Emitter(5.0, 0.0, 3.0, 4.0, 56_700.0)]
    # the kind reports the flux at the point it reports
    assert r["q"] == pytest.approx(incident_flux(emitters, 7.0, r["x_worst"], r["y_worst"]),
                                   rel=1e-9)
    # nearly symmetric doors 2 m apart seen from 7 m: the worst point is between them
    assert 3.0 < r["x_worst"] < 5.0
    assert r["y_worst"] == pytest.approx(2.0, abs=1e-3)
    # 12.5 kW/m², piloted ignition of wood (common practice; named value)
    assert r["utilisation"] == pytest.approx(r["q"] / 12_500.0, rel=1e-12)
    assert r["minimum_separation"] == pytest.approx(
        minimum_separation(emitters, 12_500.0).separation, rel=1e-6)
    (check,) = package.block("RAD.bay").checks
    assert check.passed == (r["q"] <= 12_500.0)


def test_radiant_exposure__working_per_emitter_then_the_sum(evaluate):
    package = evaluate(sheet(DOORS))
    block = package.block("RAD.bay")
    out = block.output
    powers = [s for s in out.steps if s.group == "Emissive power of each emitter"]
    # Door 2 gives its emissive power: only Door 1 has a step
    assert [(s.name, s.item, s.expr) for s in powers] == [
        ("E_1", "Door 1", "varepsilon_1 * sigma * T_1 ** 4")]
    # black opening at 1000 K: σ T⁴ = 56.70 kW/m² (Stefan–Boltzmann law by hand)
    assert print_step(powers[0], 3).record()["values"] == {"varepsilon_1": "1",
                                                           "T_1": "1000 K"}
    assert print_step(powers[0], 3).record()["result"] == "56.7 kW/m^2"
    factors = [s for s in out.steps if s.group == "View factor to each emitter"]
    assert [(s.name, s.item, s.expr) for s in factors] == [("F_1", "Door 1", None),
                                                           ("F_2", "Door 2", None)]
    assert all("case B-3" in print_step(s, 3).statement for s in factors)
    printed = steps(package, "RAD.bay")
    assert printed["q"].expr == "E_1 * F_1 + E_2 * F_2" and printed["q"].yields == "q"
    assert printed["q"].record()["values"]["E_2"] == "56.7 kW/m^2"  # as written
    assert printed["U"].expr == "q / q_lim"
    assert printed["x_worst"].expr is None and printed["y_worst"].expr is None
    assert printed["s_min"].expr is None
    assert "Brent's method" in printed["s_min"].statement
    assert printed["s_min"].yields == "minimum_separation"


def test_radiant_exposure__given_point(evaluate):
    package = evaluate(sheet("""
  - id: point
    kind: radiant_exposure
    title: Corner of the neighbouring building
    inputs:
      emitters:
        - {name: Door, width: 3 m, height: 4 m, x: 0 m, y: 0 m, temperature: 900 degC,
           emissivity: 0.9}
      separation: 5 m
      receiver: {x: 6 m, y: 2 m}
"""))
    block = package.block("RAD.point")
    r = results(package, "RAD.point")
    e = 0.9 * SIGMA * 1173.15**4
    assert r["q"] == pytest.approx(e * element_to_rectangle(3.0, 4.0, 5.0, 6.0, 2.0), rel=1e-9)
    assert (r["x_worst"], r["y_worst"]) == (6.0, 2.0)
    assert words(block.output.absent["minimum_separation"]) == "no limit given"
    printed = steps(package, "RAD.point")
    assert printed["x_worst"].expr == "x_r" and printed["x_worst"].record()["values"] == {
        "x_r": "6 m"}


def test_radiant_exposure__met_at_contact_gives_zero_with_a_note(evaluate):
    package = evaluate(sheet("""
  - id: warm
    kind: radiant_exposure
    title: Warm panel
    inputs:
      emitters: [{name: Panel, width: 2 m, height: 2 m, x: 0 m, y: 0 m, emissive_power: 2 kW/m^2}]
      separation: 1 m
      limit: {named: people_tenability_flux}
"""))
    block = package.block("RAD.warm")
    assert block.output.results["minimum_separation"].value == 0.0
    assert any("met at every separation, even at contact" in words(n["text"])
               for n in block.output.notes)
    (statement,) = [print_step(s, 3) for s in block.output.steps if s.name == "s_min"]
    # 2 kW/m² from the panel can never exceed the 2.5 kW/m² tenability limit (common practice)
    assert statement.statement == ("No emitter's emissive power exceeds the limit 2.5 kW/m², "
                                   "so no point of the receiving plane can, at any separation")


def test_radiant_exposure__figures_are_data_drawn_deterministically(evaluate):
    package = evaluate(sheet(DOORS))
    block = package.block("RAD.bay")
    plan, flux = block.output.figures
    assert (plan.key, flux.key) == ("RAD.bay-elevation", "RAD.bay-flux")
    assert [b.label for b in plan.boxes] == ["Door 1", "Door 2"]
    assert [(b.x0, b.y0, b.x1, b.y1) for b in plan.boxes] == [(0.0, 0.0, 3.0, 4.0),
                                                              (5.0, 0.0, 8.0, 4.0)]
    (point,) = plan.points
    r = results(package, "RAD.bay")
    assert (point.x, point.y, point.label) == (r["x_worst"], r["y_worst"], "worst point")
    assert plan.equal_aspect
    assert [(m.axis, m.at, m.label) for m in flux.marks] == [
        ("y", 12_500.0, "limit"), ("x", r["minimum_separation"], "minimum separation")]
    assert flux.y.display == "kW/m^2"
    assert fill(flux.caption, 3).endswith("the limit 12.5 kW/m² and the minimum separation "
                                          f"{r['minimum_separation']:.2f} m marked.")
    first = [draw(f).svg for f in block.output.figures]
    again = [draw(f).svg for f in block.output.figures]
    assert first == again
    assert "Door 1" in first[0] and "worst point" in first[0]
    assert "minimum separation" in first[1] and "limit" in first[1]


_RECTANGLE = re.compile(r'<path d="M ([-\d.]+) ([-\d.]+) \s*L ([-\d.]+) ([-\d.]+) \s*'
                        r'L ([-\d.]+) ([-\d.]+) \s*L ([-\d.]+) ([-\d.]+) \s*z\s*"([^>]*)>')


def _rectangles(svg: str) -> list[tuple[tuple[float, float, float, float], str]]:
    """Every closed four-corner path of an SVG as (x0, y0, x1, y1) with its attributes."""
    found = []
    for match in _RECTANGLE.finditer(svg):
        xs = [float(match.group(i)) for i in (1, 3, 5, 7)]
        ys = [float(match.group(i)) for i in (2, 4, 6, 8)]
        found.append(((min(xs), min(ys), max(xs), max(ys)), match.group(9)))
    return found


@pytest.mark.parametrize("emitters", [
    DOORS,
    # one tall opening reaching the top right of the emitting face
    """
  - id: bay
    kind: radiant_exposure
    title: One tall opening
    inputs:
      emitters: [{name: Shaft, width: 1 m, height: 9 m, x: 0 m, y: 0 m, temperature: 900 K}]
      separation: 2 m
""",
])
def test_radiant_exposure__the_points_words_do_not_cover_the_openings(evaluate, emitters):
    # Drawn by the view, then read back from the SVG: the frame of the point's words and the
    # openings (patches clipped to the plot) must not overlap.
    package = evaluate(sheet(emitters))
    svg = draw(package.block("RAD.bay").output.figures[0]).svg
    words_group = svg[:svg.index(">worst point<")]
    frame = _rectangles(words_group[words_group.rindex('<g id="text_'):])[0][0]
    openings = [box for box, attributes in _rectangles(svg) if "clip-path" in attributes]
    assert len(openings) == len(package.block("RAD.bay").output.figures[0].boxes)
    for x0, y0, x1, y1 in openings:
        assert x1 <= frame[0] or frame[2] <= x0 or y1 <= frame[1] or frame[3] <= y0, (
            (x0, y0, x1, y1), frame)


def test_radiant_exposure__caution_names_the_local_code_and_a_licensed_engineer():
    caution = get_kind("radiant_exposure").caution
    assert "licensed engineer" in caution and "local code" in caution
    assert "boundary-distance" in caution


def test_radiant_exposure__every_input_is_explained():
    # `calcdoc kinds radiant_exposure` prints these declarations
    described = get_kind("radiant_exposure").describe()
    for field in described["inputs"]:
        assert field["meaning"], field["name"]
        for sub in field.get("fields", []):
            assert sub["meaning"], f"{field['name']}.{sub['name']}"


@pytest.mark.parametrize("emitter, expected", [
    ("{name: A, width: 2 m, height: 2 m, x: 0 m, y: 0 m}", "exactly one of temperature | "
     "emissive_power is needed"),
    ("{name: A, width: 2 m, height: 2 m, x: 0 m, y: 0 m, temperature: 800 K, "
     "emissive_power: 30 kW/m^2}", "exactly one of temperature | emissive_power is needed"),
    ("{name: A, width: 2 m, height: 2 m, x: 0 m, y: 0 m, emissive_power: 30 kW/m^2, "
     "emissivity: 0.9}", "at most one of emissive_power | emissivity"),
    ("{name: A, width: 2 m, height: 2 m, x: 0 m, y: 0 m, temperature: 800 K, emissivity: 1.3}",
     "'emissivity' out of range"),
    ("{name: A, width: -2 m, height: 2 m, x: 0 m, y: 0 m, temperature: 800 K}",
     "'width' out of range"),
])
def test_radiant_exposure__bad_emitter_is_a_located_error(errors_of, emitter, expected):
    errors = errors_of(sheet(f"""
  - id: bad
    kind: radiant_exposure
    title: Bad emitter
    inputs:
      emitters: [{emitter}]
      separation: 3 m
"""))
    assert any(expected in e and "rad.yaml:" in e for e in errors), errors


def test_radiant_exposure__no_emitters_is_a_located_error(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiant_exposure
    title: Point receiver and nothing to see
    inputs:
      emitters: []
      separation: 3 m
      receiver: {x: 0 m, y: 0 m}
"""))
    assert "'emitters' has too few items (expected at least 1, got 0)" in error
    assert "rad.yaml:9:" in error


@pytest.mark.parametrize("limit, expected", [
    ("12.5 kW", "wrong dimension"),
    ("{named: mould_surface_humidity}", "named value 'mould_surface_humidity' has the wrong "
     "dimension"),
])
def test_radiant_exposure__limit_of_the_wrong_dimension_is_a_located_error(errors_of, limit,
                                                                           expected):
    (error,) = errors_of(sheet(f"""
  - id: bad
    kind: radiant_exposure
    title: Limit in the wrong unit
    inputs:
      emitters: [{{name: A, width: 2 m, height: 2 m, x: 0 m, y: 0 m, temperature: 800 K}}]
      separation: 3 m
      limit: {limit}
"""))
    assert expected in error and "rad.yaml:11:" in error


def test_radiant_exposure__overlapping_emitters_are_refused_at_the_emitter(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiant_exposure
    title: Overlapping openings
    inputs:
      emitters:
        - {name: A, width: 3 m, height: 3 m, x: 0 m, y: 0 m, temperature: 900 K}
        - {name: B, width: 3 m, height: 3 m, x: 2 m, y: 1 m, temperature: 900 K}
      separation: 3 m
"""))
    assert "inputs.emitters[1].x: outside the range of the method" in error
    assert "do not overlap" in error
    assert "got overlaps emitters[0]" in error
    assert "rad.yaml:11:" in error


# --- every printed step of the demo's radiation sheets re-does -----------------------------------

DEMO = Path(__file__).resolve().parent.parent / "projects" / "cold-store"
DEMO_SHEETS = ("sheets/rad-loading-bay.yaml", "sheets/rad-flue-shield.yaml")


def _quantity(machine: str):
    """A printed operand as pint reads it ('1173.15 K', '107 kW/m^2', '0.95', '181 degC')."""
    number, _, unit = machine.partition(" ")
    if not unit:
        return ureg.Quantity(float(number), "dimensionless")
    if unit in ("degC", "degF"):  # an absolute temperature: to kelvin before any arithmetic
        return ureg.Quantity(float(number), unit).to("K")
    return ureg.Quantity(float(number), parse_unit(unit))


def _redo(expr: str, values: dict):
    """Evaluate a step's expression with pint from its printed operands; σ from scipy's
    CODATA constant, π from math."""
    constants = {"sigma": ureg.Quantity(Stefan_Boltzmann, "W/(m^2*K^4)"), "pi": math.pi}
    functions = {"sqrt": lambda q: q ** 0.5}

    def go(node):
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return float(node.value)
        if isinstance(node, ast.Name):
            return _quantity(values[node.id]) if node.id in values else constants[node.id]
        if isinstance(node, ast.UnaryOp):
            return -go(node.operand) if isinstance(node.op, ast.USub) else go(node.operand)
        if isinstance(node, ast.Call):
            return functions[node.func.id](*(go(a) for a in node.args))
        left, right = go(node.left), go(node.right)
        return {ast.Add: lambda: left + right, ast.Sub: lambda: left - right,
                ast.Mult: lambda: left * right, ast.Div: lambda: left / right,
                ast.Pow: lambda: left ** right}[type(node.op)]()

    return go(parse_expression(expr))


def _half_unit(number: str) -> float:
    """Half a unit of the last printed digit ('11.6' → 0.05, '1.23e-5' → 5e-8)."""
    mantissa, _, power = number.partition("e")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    return 0.5 * 10.0 ** (int(power or 0) - decimals)


@pytest.fixture(scope="module", params=[3, 5])
def demo_radiation(request, tmp_path_factory):
    """The demo project with only its radiation sheets, at 3 and at 5 significant figures."""
    root = tmp_path_factory.mktemp("demo") / "cold-store"
    (root / "sheets").mkdir(parents=True)
    for name in DEMO_SHEETS:
        shutil.copy(DEMO / name, root / name)
    text = (DEMO / "project.yaml").read_text()
    text = re.sub(r"  sheets:\n(    - .*\n)+", "  sheets:\n" + "".join(
        f"    - {name}\n" for name in DEMO_SHEETS), text)
    text = re.sub(r"(?m)^precision: \d+", f"precision: {request.param}", text)
    (root / "project.yaml").write_text(text)
    return evaluate_project(load_project(root)), request.param


def test_demo_radiation_sheets__every_printed_step_redoes_with_pint(demo_radiation):
    package, sig = demo_radiation
    blocks = [b for s in package.sheets for b in s.blocks]
    assert {b.kind.name for b in blocks} == {"radiant_exposure", "view_factor",
                                             "surface_emission", "radiation_exchange"}
    redone = 0
    for block in blocks:
        printed = block.printed_steps(sig)
        assert any(p.expr for p in printed), block.key  # every block prints working
        for step in printed:
            if step.expr is None:
                continue
            record = step.record()
            number, _, unit = record["result"].partition(" ")
            again = _redo(step.expr, record["values"])
            if unit:
                again = again.to("degC" if unit == "degC" else parse_unit(unit)).magnitude
            elif hasattr(again, "to"):
                again = again.to("dimensionless").magnitude
            assert abs(again - float(number)) <= _half_unit(number) * (1 + 1e-9), (
                block.key, step.name, step.expr, record)
            redone += 1
    assert redone >= 40


def test_radiant_exposure__forty_openings_sum_in_a_statement_and_agree_with_the_physics(
        evaluate):
    # A sum of forty E_i·F_i is longer than one line of working may be: a statement instead.
    openings = "\n".join(
        f"        - {{name: W{k}, width: 0.5 m, height: 0.5 m, x: {k % 10} m, "
        f"y: {k // 10} m, emissive_power: 20 kW/m^2}}" for k in range(40))
    package = evaluate(sheet(f"""
  - id: bay
    kind: radiant_exposure
    title: A wall of windows
    inputs:
      emitters:
{openings}
      separation: 6 m
      receiver: {{x: 4.75 m, y: 1.75 m}}
"""))
    emitters = [Emitter(k % 10, k // 10, 0.5, 0.5, 20_000.0) for k in range(40)]
    r = results(package, "RAD.bay")
    assert r["q"] == pytest.approx(incident_flux(emitters, 6.0, 4.75, 1.75), rel=1e-9)
    printed = steps(package, "RAD.bay")
    assert printed["q"].expr is None and printed["q"].yields == "q"
    assert len([s for s in package.block("RAD.bay").output.steps
                if s.group == "View factor to each emitter"]) == 40
