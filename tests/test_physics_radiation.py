"""Emission, two-surface exchange and radiant exposure against constants, laws and limits."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from ht.radiation import blackbody_spectral_radiance, q_rad
from numpy.polynomial.legendre import leggauss
from scipy import constants
from scipy.integrate import quad

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.exposure import (
    Emitter,
    flux_against_separation,
    incident_flux,
    minimum_separation,
    worst_point,
)
from calcdoc.physics.radiation import (
    STEFAN_BOLTZMANN,
    emissive_power,
    enclosed_body_exchange,
    net_flux_to_surroundings,
    parallel_plates_exchange,
    two_surface_enclosure_exchange,
)

FEW = settings(max_examples=50, deadline=None)
EMISSIVITY = st.floats(min_value=0.05, max_value=1.0)
TEMPERATURE = st.floats(min_value=250.0, max_value=1500.0)
SIGMA = 5.670374419e-8  # CODATA 2018, W/(m²·K⁴); exact in the SI since 2019 (from memory)


# --- Stefan–Boltzmann law ----------------------------------------------------------------------

def test_stefan_boltzmann__codata_2018_through_scipy_constants():
    assert STEFAN_BOLTZMANN == constants.Stefan_Boltzmann
    # CODATA 2018 prints 5.670 374 419 × 10⁻⁸ (the rest of the digits follow from exact h, c, k)
    assert STEFAN_BOLTZMANN == pytest.approx(SIGMA, rel=1e-9)


def test_stefan_boltzmann__equals_planck_integral_of_h_c_k():
    # σ = 2 π⁵ k⁴ / (15 h³ c²) from the exact SI defining constants (Planck's law integrated)
    k, h, c = constants.k, constants.h, constants.c
    assert STEFAN_BOLTZMANN == pytest.approx(2 * math.pi**5 * k**4 / (15 * h**3 * c**2),
                                             rel=1e-12)


def test_emissive_power__blackbody_equals_integrated_planck_radiance_from_ht():
    # E_b = π ∫ B_λ dλ, with the spectral radiance of the ht library (PyPI reference)
    temperature = 1200.0
    peak = 2.897771955e-3 / temperature  # Wien's displacement constant, CODATA 2018 (from memory)
    radiance = sum(quad(lambda lam: blackbody_spectral_radiance(temperature, lam), a, b,
                        limit=200)[0]
                   for a, b in ((1e-8, peak), (peak, 10 * peak), (10 * peak, 1e-2)))
    assert emissive_power(temperature) == pytest.approx(math.pi * radiance, rel=1e-6)


@pytest.mark.parametrize("emissivity, temperature", [(0.9, 1000.0), (0.3, 400.0), (1.0, 293.15)])
def test_emissive_power__matches_ht_q_rad(emissivity, temperature):
    # ht uses the CODATA 2014 σ = 5.670367e-8: 1.3e-6 relative below CODATA 2018
    assert emissive_power(temperature, emissivity) == pytest.approx(
        q_rad(emissivity, temperature), rel=2e-6)


def test_net_flux_to_surroundings__matches_ht_q_rad_with_surroundings():
    assert net_flux_to_surroundings(400.0, 305.0, 0.85) == pytest.approx(
        q_rad(0.85, 400.0, 305.0), rel=2e-6)
    assert net_flux_to_surroundings(300.0, 350.0, 0.5) < 0.0  # surroundings hotter


def test_emissive_power__vectorised_over_temperatures():
    temperatures = np.array([300.0, 600.0, 1200.0])
    values = emissive_power(temperatures, 0.8)
    assert values == pytest.approx(0.8 * SIGMA * temperatures**4, rel=1e-9)


# --- parallel plates and shields ---------------------------------------------------------------

@FEW
@given(t1=TEMPERATURE, t2=TEMPERATURE)
def test_parallel_plates__black_plates_give_sigma_t1_4_minus_t2_4(t1, t2):
    # ε1 = ε2 = 1: q = σ(T1⁴ − T2⁴) (Stefan–Boltzmann law between black plates)
    result = parallel_plates_exchange(t1, t2, 1.0, 1.0)
    assert result.q == pytest.approx(SIGMA * (t1**4 - t2**4), rel=1e-9, abs=1e-9)
    assert result.effective_emissivity == pytest.approx(1.0)
    assert result.shield_temperatures == ()


def test_parallel_plates__grey_plates_textbook_resistance():
    # q = σ(T1⁴ − T2⁴) / (1/ε1 + 1/ε2 − 1) (Incropera 7th ed. Table 13.3, large parallel planes);
    # 1/0.8 + 1/0.6 − 1 = 1.9167, ε_eff = 0.5217
    result = parallel_plates_exchange(600.0, 300.0, 0.8, 0.6)
    assert result.effective_emissivity == pytest.approx(0.5217, abs=5e-5)
    assert result.q == pytest.approx(0.5217 * SIGMA * (600.0**4 - 300.0**4), rel=1e-4)


def test_parallel_plates__one_shield_of_equal_emissivity_halves_the_flux():
    # Textbook fact: one shield with all emissivities equal halves the flux, and the shield sits
    # at T⁴ = (T1⁴ + T2⁴)/2 (Incropera 7th ed. §13.3.4)
    bare = parallel_plates_exchange(700.0, 320.0, 0.7, 0.7)
    shielded = parallel_plates_exchange(700.0, 320.0, 0.7, 0.7, shields=[(0.7, 0.7)])
    assert shielded.q == pytest.approx(bare.q / 2.0, rel=1e-12)
    (shield,) = shielded.shield_temperatures
    assert shield == pytest.approx(((700.0**4 + 320.0**4) / 2.0) ** 0.25, rel=1e-12)


@FEW
@given(count=st.integers(0, 10), emissivity=EMISSIVITY, t1=TEMPERATURE, t2=TEMPERATURE)
def test_parallel_plates__n_equal_shields_cut_flux_to_one_over_n_plus_one(count, emissivity,
                                                                          t1, t2):
    # Textbook fact: N shields of the plates' emissivity reduce the flux to 1/(N + 1)
    # (Incropera 7th ed. §13.3.4; common practice)
    bare = parallel_plates_exchange(t1, t2, emissivity, emissivity)
    shielded = parallel_plates_exchange(t1, t2, emissivity, emissivity,
                                        shields=[(emissivity, emissivity)] * count)
    assert shielded.q == pytest.approx(bare.q / (count + 1), rel=1e-9, abs=1e-9)
    assert len(shielded.shield_temperatures) == count


@FEW
@given(t1=st.floats(600.0, 1500.0), t2=st.floats(250.0, 550.0),
       shields=st.lists(st.tuples(EMISSIVITY, EMISSIVITY), min_size=1, max_size=5),
       e1=EMISSIVITY, e2=EMISSIVITY)
def test_parallel_plates__shield_temperatures_fall_from_hot_to_cold_with_equal_gap_fluxes(
        t1, t2, shields, e1, e2):
    # Steady state: every gap carries the same net flux (energy balance on each shield)
    result = parallel_plates_exchange(t1, t2, e1, e2, shields=shields)
    temperatures = [t1, *result.shield_temperatures, t2]
    assert all(a > b for a, b in zip(temperatures, temperatures[1:]))
    faces = [e1] + [e for pair in shields for e in pair] + [e2]
    for k in range(len(temperatures) - 1):
        gap = parallel_plates_exchange(temperatures[k], temperatures[k + 1],
                                       faces[2 * k], faces[2 * k + 1])
        assert gap.q == pytest.approx(result.q, rel=1e-8)


def test_parallel_plates__low_emissivity_shield_faces_matter_per_face():
    # Shield emissivities are taken per face: a shield bright towards plate 1 and dull towards
    # plate 2 gives the resistance 1/ε1 + 1/ε2 − 1 + (1/0.1 + 1/0.9 − 1), either way round
    one_way = parallel_plates_exchange(500.0, 300.0, 0.9, 0.9, shields=[(0.1, 0.9)])
    other_way = parallel_plates_exchange(500.0, 300.0, 0.9, 0.9, shields=[(0.9, 0.1)])
    assert one_way.q == pytest.approx(other_way.q, rel=1e-12)
    assert one_way.shield_temperatures[0] != pytest.approx(other_way.shield_temperatures[0])
    expected = 1.0 / (1 / 0.9 + 1 / 0.1 - 1 + 1 / 0.9 + 1 / 0.9 - 1)
    assert one_way.effective_emissivity == pytest.approx(expected, rel=1e-12)


# --- enclosures --------------------------------------------------------------------------------

@FEW
@given(t1=TEMPERATURE, t2=TEMPERATURE, e1=EMISSIVITY, e2=EMISSIVITY)
def test_enclosed_body__large_enclosure_gives_e1_sigma_t1_4_minus_t2_4(t1, t2, e1, e2):
    # Small convex body in a large cavity: q = ε1 σ (T1⁴ − T2⁴) (Incropera 7th ed. Table 13.3)
    result = enclosed_body_exchange(t1, t2, e1, e2)
    assert result.q == pytest.approx(e1 * SIGMA * (t1**4 - t2**4), rel=1e-9, abs=1e-9)
    assert result.effective_emissivity == pytest.approx(e1, rel=1e-12)


def test_enclosed_body__concentric_spheres_textbook_form():
    # Concentric spheres r1 = 0.5, r2 = 1: q = σΔT⁴ / (1/ε1 + (1 − ε2)/ε2 (r1/r2)²)
    # (Incropera 7th ed. Table 13.3); 1/0.6 + (0.2/0.8)(0.25) = 1.7292, ε_eff = 0.5783
    area_1 = 4 * math.pi * 0.5**2
    area_2 = 4 * math.pi * 1.0**2
    result = enclosed_body_exchange(800.0, 400.0, 0.6, 0.8, area_1, area_2)
    assert result.effective_emissivity == pytest.approx(0.5783, abs=5e-5)


@FEW
@given(t1=TEMPERATURE, t2=TEMPERATURE, e1=EMISSIVITY, e2=EMISSIVITY)
def test_enclosed_body__equal_areas_give_parallel_plates(t1, t2, e1, e2):
    # A1 = A2 reduces to 1/ε1 + 1/ε2 − 1 (Incropera 7th ed. Table 13.3, first and third rows)
    body = enclosed_body_exchange(t1, t2, e1, e2, 2.0, 2.0)
    plates = parallel_plates_exchange(t1, t2, e1, e2)
    assert body.q == pytest.approx(plates.q, rel=1e-9, abs=1e-9)


@FEW
@given(t1=TEMPERATURE, t2=TEMPERATURE, e1=EMISSIVITY, e2=EMISSIVITY,
       a1=st.floats(0.1, 10.0), extra=st.floats(0.0, 10.0))
def test_two_surface_enclosure__view_factor_one_gives_enclosed_body(t1, t2, e1, e2, a1, extra):
    # F12 = 1 turns Eq. 13.23 into the convex-body form (Incropera 7th ed. §13.3.3)
    general = two_surface_enclosure_exchange(t1, t2, e1, e2, a1, a1 + extra, 1.0)
    body = enclosed_body_exchange(t1, t2, e1, e2, a1, a1 + extra)
    assert general.q == pytest.approx(body.q, rel=1e-9, abs=1e-9)


def test_two_surface_enclosure__black_surfaces_give_f12_sigma_dt4():
    # Black surfaces: q = F12 σ (T1⁴ − T2⁴) per unit area 1 (Incropera 7th ed. §13.2, from memory)
    result = two_surface_enclosure_exchange(900.0, 300.0, 1.0, 1.0, 2.0, 5.0, 0.6)
    assert result.q == pytest.approx(0.6 * SIGMA * (900.0**4 - 300.0**4), rel=1e-9)


# --- radiant exposure --------------------------------------------------------------------------

def quadrature_flux(emitters, separation, x0, y0, n=48):
    """Σ E ∫∫ s² / (π S⁴) dA by Gauss–Legendre, split at the foot point (independent check)."""
    t, w = leggauss(n)

    def nodes(a, b, cut):
        pieces = [(a, cut), (cut, b)] if a < cut < b else [(a, b)]
        xs = [0.5 * (hi - lo) * t + 0.5 * (hi + lo) for lo, hi in pieces]
        ws = [0.5 * (hi - lo) * w for lo, hi in pieces]
        return np.concatenate(xs), np.concatenate(ws)

    total = 0.0
    for e in emitters:
        x, wx = nodes(e.x, e.x + e.width, x0)
        y, wy = nodes(e.y, e.y + e.height, y0)
        s2 = (x[:, None] - x0) ** 2 + (y[None, :] - y0) ** 2 + separation**2
        total += e.emissive_power * np.sum(wx[:, None] * wy[None, :] * separation**2
                                           / (np.pi * s2 * s2))
    return float(total)


DOORS = [Emitter(0.0, 0.0, 3.0, 3.5, 60_000.0), Emitter(5.0, 0.0, 3.0, 3.5, 60_000.0)]


def test_incident_flux__matches_gauss_legendre_integral_at_several_points():
    emitters = DOORS + [Emitter(10.0, 1.0, 1.2, 1.0, 30_000.0)]
    for x0, y0 in ((1.5, 1.75), (4.0, 1.75), (-2.0, 5.0), (11.0, 1.5)):
        assert incident_flux(emitters, 2.5, x0, y0) == pytest.approx(
            quadrature_flux(emitters, 2.5, x0, y0), rel=1e-7)


def test_incident_flux__far_field_tends_to_point_source():
    # Far away a small diffuse emitter on axis gives q = E A / (π s²) (inverse-square law)
    emitter = Emitter(-0.5, -0.5, 1.0, 1.0, 40_000.0)
    assert incident_flux([emitter], 200.0, 0.0, 0.0) == pytest.approx(
        40_000.0 / (math.pi * 200.0**2), rel=1e-4)


def test_worst_point__single_opening_is_its_centre():
    # Symmetry: the worst point faces the centre of a single opening (common practice)
    found = worst_point([Emitter(2.0, 1.0, 4.0, 2.0, 50_000.0)], 3.0)
    assert (found.x, found.y) == pytest.approx((4.0, 2.0), abs=1e-4)
    assert found.q == pytest.approx(quadrature_flux([Emitter(2.0, 1.0, 4.0, 2.0, 50_000.0)],
                                                    3.0, 4.0, 2.0), rel=1e-8)


def test_worst_point__between_two_openings_faces_neither():
    # Two doors 2 m apart seen from 6 m: both contribute most to the point between them
    found = worst_point(DOORS, 6.0)
    assert 3.0 < found.x < 5.0
    assert found.x == pytest.approx(4.0, abs=1e-3)   # symmetry
    assert found.y == pytest.approx(1.75, abs=1e-3)  # symmetry
    assert found.q > incident_flux(DOORS, 6.0, 1.5, 1.75)  # more than facing one door's centre


def test_worst_point__not_beaten_by_a_fine_brute_force_grid():
    emitters = DOORS + [Emitter(10.0, 2.0, 1.0, 1.0, 90_000.0)]
    for separation in (0.5, 2.0, 7.0):
        found = worst_point(emitters, separation)
        xs, ys = np.meshgrid(np.linspace(-1.0, 12.0, 521), np.linspace(-1.0, 4.5, 221))
        brute = float(np.max(incident_flux(emitters, separation, xs, ys)))
        assert found.q >= brute * (1.0 - 1e-9)


@settings(max_examples=20, deadline=None)  # each example runs two global searches
@given(near=st.floats(0.2, 10.0), grow=st.floats(1.05, 4.0))
def test_worst_point__flux_falls_with_separation(near, grow):
    assert worst_point(DOORS, near * grow).q < worst_point(DOORS, near).q


def test_flux_against_separation__equals_worst_point_and_given_point():
    separations = np.array([1.0, 3.0, 9.0])
    worst = flux_against_separation(DOORS, separations)
    assert worst == pytest.approx([worst_point(DOORS, s).q for s in separations], rel=1e-12)
    given_point = flux_against_separation(DOORS, separations, receiver=(4.0, 1.75))
    assert given_point == pytest.approx([incident_flux(DOORS, s, 4.0, 1.75) for s in separations],
                                        rel=1e-12)


def test_minimum_separation__worst_point_meets_the_limit_there():
    limit = 12_500.0  # piloted ignition of wood, 12.5 kW/m² (common practice)
    result = minimum_separation(DOORS, limit)
    assert not result.met_at_contact
    assert result.q == pytest.approx(limit, rel=1e-8)
    # independent: quadrature flux at the governing point equals the limit
    assert quadrature_flux(DOORS, result.separation, result.x, result.y) == pytest.approx(
        limit, rel=1e-6)
    # and nowhere on a fine grid a little nearer or farther is the worst point missed
    xs, ys = np.meshgrid(np.linspace(-1.0, 9.0, 201), np.linspace(-1.0, 4.5, 111))
    nearer = float(np.max(incident_flux(DOORS, 0.98 * result.separation, xs, ys)))
    farther = float(np.max(incident_flux(DOORS, 1.02 * result.separation, xs, ys)))
    assert nearer > limit > farther


def test_minimum_separation__single_opening_against_closed_form_centre_factor():
    # Centre of an a x b opening: F = 4 F_B3(a/2, b/2, s) (Howell B-3, superposition); check that
    # the separation found makes E·F equal the limit, with F by quadrature
    opening = Emitter(0.0, 0.0, 2.0, 2.0, 50_000.0)
    result = minimum_separation([opening], 12_500.0)
    assert (result.x, result.y) == pytest.approx((1.0, 1.0), abs=1e-4)
    assert quadrature_flux([opening], result.separation, 1.0, 1.0) == pytest.approx(
        12_500.0, rel=1e-6)


def test_minimum_separation__met_at_contact_when_no_emitter_exceeds_the_limit():
    # E ≤ limit: the factors of coplanar rectangles sum to at most 1, so q ≤ E everywhere
    weak = [Emitter(0.0, 0.0, 2.0, 2.0, 2_000.0), Emitter(3.0, 0.0, 2.0, 2.0, 2_400.0)]
    result = minimum_separation(weak, 2_500.0)  # tenability of people, 2.5 kW/m² (common practice)
    assert result.separation == 0.0
    assert result.met_at_contact


def test_minimum_separation__given_point_beside_openings_uses_the_last_crossing():
    # A point beside the doors sees nothing at contact, then more, then less: the answer is the
    # separation beyond which the limit is never exceeded
    point = (9.5, 1.75)
    limit = 5_000.0
    result = minimum_separation(DOORS, limit, receiver=point)
    assert not result.met_at_contact
    assert (result.x, result.y) == point
    assert quadrature_flux(DOORS, result.separation, *point) == pytest.approx(limit, rel=1e-6)
    beyond = np.geomspace(result.separation * 1.001, result.separation * 50.0, 40)
    assert np.all(flux_against_separation(DOORS, beyond, receiver=point) < limit)
    assert incident_flux(DOORS, 1e-3, *point) < limit  # met at contact, yet not the answer


def test_minimum_separation__given_point_never_exceeding_the_limit_gives_zero():
    result = minimum_separation(DOORS, 20_000.0, receiver=(15.0, 1.75))
    assert result.separation == 0.0
    assert result.met_at_contact
    assert 0.0 < result.q < 20_000.0


# --- bad input ---------------------------------------------------------------------------------

@pytest.mark.parametrize("call, quantity, index", [
    (lambda: emissive_power(1000.0, 0.0), "emissivity", None),
    (lambda: emissive_power(1000.0, 1.01), "emissivity", None),
    (lambda: emissive_power(1000.0, -0.2), "emissivity", None),
    (lambda: emissive_power(1000.0, float("nan")), "emissivity", None),
    (lambda: emissive_power(0.0, 0.5), "temperature", None),
    (lambda: emissive_power(np.array([300.0, -5.0]), 0.5), "temperature", None),
    (lambda: net_flux_to_surroundings(300.0, -1.0, 0.9), "surroundings_temperature", None),
    (lambda: parallel_plates_exchange(500.0, 300.0, 0.9, 1.2), "emissivity_2", None),
    (lambda: parallel_plates_exchange(500.0, 300.0, 0.9, 0.9, shields=[(0.5, 0.0)]),
     "shields.emissivity_2", 0),
    (lambda: parallel_plates_exchange(500.0, 300.0, 0.9, 0.9,
                                      shields=[(0.5, 0.5), (1.5, 0.5)]),
     "shields.emissivity_1", 1),
    (lambda: parallel_plates_exchange(500.0, 300.0, 0.9, 0.9, shields=[(0.5,)]), "shields", 0),
    (lambda: enclosed_body_exchange(500.0, 300.0, 0.9, 0.9, 5.0, 2.0), "area_1", None),
    (lambda: enclosed_body_exchange(500.0, 300.0, 0.9, 0.9, None, 2.0), "area_1", None),
    (lambda: enclosed_body_exchange(500.0, 300.0, 0.9, 0.9, -1.0, 2.0), "area_1", None),
    (lambda: two_surface_enclosure_exchange(500.0, 300.0, 0.9, 0.9, 3.0, 1.0, 0.5),
     "view_factor", None),
    (lambda: two_surface_enclosure_exchange(500.0, 300.0, 0.9, 0.9, 1.0, 1.0, 0.0),
     "view_factor", None),
    (lambda: two_surface_enclosure_exchange(500.0, 300.0, 0.9, 0.9, 1.0, -1.0, 0.5), "area_2",
     None),
    (lambda: incident_flux([], 1.0, 0.0, 0.0), "emitters", None),
    (lambda: worst_point([], 1.0), "emitters", None),
    (lambda: incident_flux([Emitter(0.0, 0.0, -1.0, 1.0, 1e4)], 1.0, 0.0, 0.0),
     "emitters.width", 0),
    (lambda: incident_flux([Emitter(0.0, 0.0, 1.0, 1.0, 0.0)], 1.0, 0.0, 0.0),
     "emitters.emissive_power", 0),
    (lambda: incident_flux(DOORS, -2.0, 0.0, 0.0), "separation", None),
    (lambda: incident_flux(DOORS, 2.0, float("nan"), 0.0), "x", None),
    (lambda: incident_flux(DOORS + [Emitter(1.0, 1.0, 1.0, 1.0, 1e4)], 1.0, 0.0, 0.0),
     "emitters", 2),
    (lambda: minimum_separation(DOORS, 0.0), "limit", None),
    (lambda: minimum_separation(DOORS, 1e4, receiver=(float("inf"), 0.0)), "receiver", 0),
])
def test_bad_input__raises_physics_range_error_with_the_parameter_name(call, quantity, index):
    # The function's own parameter name, and for an element of a list argument its position
    # (from 0): the kind maps these to its input paths (Kind.input_names).
    with pytest.raises(PhysicsRangeError) as info:
        call()
    assert info.value.quantity == quantity
    assert info.value.index == index


def test_bad_emissivity__message_says_expected_and_got():
    with pytest.raises(PhysicsRangeError) as info:
        emissive_power(800.0, 1.5)
    assert str(info.value) == "emissivity: out of range (expected 0 < emissivity <= 1, got 1.5)"


def test_enclosed_body__larger_body_than_enclosure_is_refused_with_both_areas():
    with pytest.raises(PhysicsRangeError) as info:
        enclosed_body_exchange(500.0, 300.0, 0.9, 0.9, 5.0, 2.0)
    assert info.value.value == 5.0
    assert "area_2 = 2.0" in info.value.expected
