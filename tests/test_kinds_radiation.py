"""The radiation kinds evaluated from sheets: results, steps, figures and located errors."""

from __future__ import annotations

import math

import pytest
from ht.radiation import q_rad

from calcdoc.kinds import get_kind
from calcdoc.physics.exposure import Emitter, incident_flux, minimum_separation
from calcdoc.physics.viewfactors import element_to_rectangle

SIGMA = 5.670374419e-8  # CODATA 2018, W/(m²·K⁴) (from memory)


def sheet(blocks: str) -> dict[str, str]:
    return {"rad": "id: RAD\ntitle: Radiation\nblocks:\n" + blocks}


def results(package, key: str) -> dict[str, float]:
    return {name: r.value for name, r in package.block(key).output.results.items()}


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
    assert out.absent["Q"] == "no area given"
    assert out.absent["q_net"] == "no surroundings temperature given"


def test_surface_emission__steps_show_sigma_and_kelvin(evaluate):
    package = evaluate(sheet("""
  - id: panel
    kind: surface_emission
    title: Panel
    inputs: {temperature: 80 degC, emissivity: 0.95}
"""))
    (step,) = package.block("RAD.panel").output.steps
    assert r"5.670374 \times 10^{-8}" in step.substituted
    assert r"353.15\,\mathrm{K}" in step.substituted


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
    assert package.block("RAD.pipe").output.absent["Q"] == "no area_1 given"


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
    assert "view_factor is outside the range of the method" in error
    assert "A1*F12 <= A2" in error


def test_radiation_exchange__enclosed_body_larger_than_enclosure_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: radiation_exchange
    title: Body larger than its enclosure
    inputs: {configuration: enclosed_body, temperature_1: 400 K, temperature_2: 300 K,
             emissivity_1: 0.8, emissivity_2: 0.5, area_1: 4 m^2, area_2: 1 m^2}
"""))
    assert "area_1 is outside the range of the method" in error
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


def test_view_factor__input_of_another_geometry_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: view_factor
    title: Disks with a width
    inputs: {geometry: coaxial_disks, radius_1: 1 m, radius_2: 1 m, separation: 1 m,
             width: 2 m}
"""))
    assert "width is outside the range of the method" in error
    assert "width is for opposed_rectangles or element_to_rectangle" in error


def test_view_factor__missing_dimension_is_refused(errors_of):
    (error,) = errors_of(sheet("""
  - id: bad
    kind: view_factor
    title: Disks without a radius
    inputs: {geometry: coaxial_disks, radius_1: 1 m, separation: 1 m}
"""))
    assert "radius_2 for geometry coaxial_disks" in error
    assert "got nothing" in error


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
    assert block.output.absent["minimum_separation"] == "no limit given"


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
    assert any("met at every separation, even at contact" in n["text"]
               for n in block.output.notes)


def test_radiant_exposure__two_pictures_drawn_deterministically(evaluate):
    package = evaluate(sheet(DOORS))
    block = package.block("RAD.bay")
    first = block.kind.figures(block)
    again = block.kind.figures(block)
    assert [f.key for f in first] == ["RAD.bay-elevation", "RAD.bay-flux"]
    assert [f.svg for f in first] == [f.svg for f in again]
    elevation, flux = first
    assert "Door 1" in elevation.svg and "Door 2" in elevation.svg
    assert "worst point" in elevation.svg
    assert "minimum separation" in flux.svg and "limit 12.5" in flux.svg


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
    assert "emitters[1].x is outside the range of the method" in error
    assert "do not overlap" in error
    assert "rad.yaml:11:" in error
