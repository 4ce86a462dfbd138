"""Timber members in the standard fire: EN 1995-1-2:2004 reduced cross-section method.

Check values: the rates of Table 3.1, k_fi of Table 2.1, k0 of Table 4.1, d0 = 7 mm of §4.2.2 (all
from memory), and hand calculations written out beside the assertions.
"""

from __future__ import annotations

import doctest
import math

import pytest

from calcdoc.physics import PhysicsRangeError, timber
from calcdoc.physics.timber import (
    ZERO_STRENGTH_LAYER,
    bending_resistance_fire,
    effective_charring_depth,
    fire_design_strength,
    notional_charring_depth,
    residual_section,
    time_to_failure,
    timber_fire_properties,
    timber_member_fire,
    zero_strength_coefficient,
)

MINUTE = 60.0
MM_PER_MIN = 1e-3 / 60.0


@pytest.mark.parametrize("kind, beta_n_mm_per_min, k_fi", [
    ("solid_softwood", 0.8, 1.25),   # EN 1995-1-2:2004 Table 3.1 solid softwood; Table 2.1 solid
    ("glulam_softwood", 0.7, 1.15),  # Table 3.1 glued laminated softwood; Table 2.1 glulam
    ("hardwood", 0.7, 1.25),         # Table 3.1 hardwood 290 kg/m³; Table 2.1 solid timber
    ("hardwood_dense", 0.55, 1.25),  # Table 3.1 hardwood >= 450 kg/m³; Table 2.1 solid timber
    ("lvl", 0.7, 1.1),               # Table 3.1 LVL >= 480 kg/m³; Table 2.1 LVL (all from memory)
])
def test_timber_fire_properties__en1995_1_2_tables_3_1_and_2_1(kind, beta_n_mm_per_min, k_fi):
    properties = timber_fire_properties(kind)
    assert properties.notional_charring_rate == pytest.approx(beta_n_mm_per_min * MM_PER_MIN)
    assert properties.k_fi == k_fi
    assert "Table 3.1" in properties.source and "Table 2.1" in properties.source


@pytest.mark.parametrize("kind, minutes, depth_mm", [
    ("solid_softwood", 60, 48.0),   # 0.8 mm/min x 60 min (Table 3.1)
    ("glulam_softwood", 60, 42.0),  # 0.7 mm/min x 60 min
    ("hardwood_dense", 60, 33.0),   # 0.55 mm/min x 60 min
    ("solid_softwood", 30, 24.0),   # 0.8 mm/min x 30 min
    ("lvl", 90, 63.0),              # 0.7 mm/min x 90 min
])
def test_notional_charring_depth__table_3_1_rate_times_time(kind, minutes, depth_mm):
    beta = timber_fire_properties(kind).notional_charring_rate
    assert notional_charring_depth(minutes * MINUTE, beta) == pytest.approx(depth_mm * 1e-3,
                                                                            abs=1e-9)


@pytest.mark.parametrize("minutes, k0", [
    (0, 0.0), (5, 0.25), (10, 0.5), (19, 0.95),  # t/20 below 20 min (Table 4.1)
    (20, 1.0), (60, 1.0), (120, 1.0),            # 1.0 from 20 min on (Table 4.1)
])
def test_zero_strength_coefficient__table_4_1_ramp_to_one_at_20_min(minutes, k0):
    assert zero_strength_coefficient(minutes * MINUTE) == pytest.approx(k0, abs=1e-12)


def test_zero_strength_layer__7_mm():
    assert ZERO_STRENGTH_LAYER == 0.007  # EN 1995-1-2:2004 §4.2.2(1), d0 = 7 mm


@pytest.mark.parametrize("minutes, d_ef_mm", [
    (10, 7.0 + 3.5),   # glulam: 0.7 x 10 = 7 mm char, k0 = 0.5 -> 3.5 mm
    (20, 14.0 + 7.0),  # 0.7 x 20 = 14 mm, k0 = 1 -> 7 mm
    (60, 42.0 + 7.0),  # 0.7 x 60 = 42 mm, + 7 mm
])
def test_effective_charring_depth__eq_4_1_by_hand(minutes, d_ef_mm):
    beta = 0.7 * MM_PER_MIN  # glued laminated softwood, Table 3.1
    assert effective_charring_depth(minutes * MINUTE, beta) == pytest.approx(d_ef_mm * 1e-3,
                                                                             abs=1e-9)


def test_glulam_beam_three_sided_60_min__hand_calculation():
    # Glulam GL24h beam (f_m,k = 24 MPa, EN 14080, common practice) 200 x 600 mm, three sided, R60:
    #   d_char,n = 0.7 mm/min x 60 min = 42 mm;  d_ef = 42 + 1.0 x 7 = 49 mm
    #   b_ef = 200 - 2 x 49 = 102 mm;  h_ef = 600 - 49 = 551 mm
    #   W_ef = 102 x 551^2 / 6 = 102 x 303 601 / 6 = 5 161 217 mm³
    #   f_m,d,fi = 1.0 x 1.15 x 24 / 1.0 = 27.6 MPa
    #   M_Rd,fi = 5 161 217 mm³ x 27.6 N/mm² = 142.450 kN·m
    #   with M_d,fi = 100 kN·m: utilisation 100 / 142.450 = 0.7020
    r = timber_member_fire(0.200, 0.600, 60 * MINUTE, 0.7 * MM_PER_MIN, 1.15, 24e6,
                           "three_sided", design_moment=100e3)
    assert r.charring_depth == pytest.approx(0.042, abs=1e-9)
    assert r.effective_charring_depth == pytest.approx(0.049, abs=1e-9)
    assert r.residual_width == pytest.approx(0.102, abs=1e-9)
    assert r.residual_depth == pytest.approx(0.551, abs=1e-9)
    assert r.section_modulus == pytest.approx(5_161_217e-9, rel=1e-6)
    assert r.design_strength == pytest.approx(27.6e6, rel=1e-12)
    assert r.bending_resistance == pytest.approx(142.450e3, abs=1.0)
    assert r.utilisation == pytest.approx(0.7020, abs=1e-4)
    assert r.burnt_through is False


def test_solid_joist_four_sided_30_min__hand_calculation():
    # Solid C24 joist (f_m,k = 24 MPa, EN 338, common practice) 100 x 200 mm, four sided, R30:
    #   d_char,n = 0.8 x 30 = 24 mm;  d_ef = 24 + 7 = 31 mm
    #   b_ef = 100 - 62 = 38 mm;  h_ef = 200 - 62 = 138 mm
    #   W_ef = 38 x 138^2 / 6 = 38 x 19 044 / 6 = 120 612 mm³
    #   f_m,d,fi = 1.25 x 24 = 30 MPa;  M_Rd,fi = 120 612 x 30 = 3.61836 kN·m
    r = timber_member_fire(0.100, 0.200, 30 * MINUTE, 0.8 * MM_PER_MIN, 1.25, 24e6, "four_sided")
    assert (r.residual_width, r.residual_depth) == pytest.approx((0.038, 0.138), abs=1e-9)
    assert r.section_modulus == pytest.approx(120_612e-9, rel=1e-9)
    assert r.bending_resistance == pytest.approx(3618.36, abs=0.01)
    assert r.utilisation is None and r.time_to_failure is None


def test_residual_section__three_sided_keeps_top_face_four_sided_loses_it():
    # EN 1995-1-2:2004 Figure 4.1: h - d_ef on three sides, h - 2 d_ef on four
    assert residual_section(0.2, 0.6, 0.05, "three_sided") == pytest.approx((0.1, 0.55))
    assert residual_section(0.2, 0.6, 0.05, "four_sided") == pytest.approx((0.1, 0.50))


def test_burnt_through_member__zero_resistance_and_infinite_utilisation():
    # 90 x 200 mm solid softwood, four sided, 60 min: d_ef = 48 + 7 = 55 mm > b/2 = 45 mm
    r = timber_member_fire(0.090, 0.200, 60 * MINUTE, 0.8 * MM_PER_MIN, 1.25, 24e6, "four_sided",
                           design_moment=1e3)
    assert r.burnt_through is True
    assert r.residual_width == 0.0
    assert r.section_modulus == 0.0 and r.bending_resistance == 0.0
    assert math.isinf(r.utilisation)
    assert 0.0 < r.time_to_failure < 60 * MINUTE


def test_time_to_failure__resistance_at_failure_equals_design_moment():
    args = (0.140, 0.450, 0.7 * MM_PER_MIN, 1.15, 28e6)  # GL28h 140 x 450 mm, three sided
    m_d = 40e3
    t_fail = time_to_failure(*args, m_d, 120 * MINUTE)
    assert 0.0 < t_fail < 120 * MINUTE
    at_failure = bending_resistance_fire(args[0], args[1], t_fail, *args[2:])
    assert at_failure == pytest.approx(m_d, rel=1e-6)
    # just before it still holds, just after it does not (M_Rd,fi falls with time)
    assert bending_resistance_fire(args[0], args[1], t_fail - 1.0, *args[2:]) > m_d
    assert bending_resistance_fire(args[0], args[1], t_fail + 1.0, *args[2:]) < m_d


def test_time_to_failure__hand_calculated_resistance_at_60_min_fails_at_60_min():
    # M_Rd,fi(60 min) = 142.450 kN·m for the 200 x 600 mm GL24h beam (hand calculation above)
    t_fail = time_to_failure(0.2, 0.6, 0.7 * MM_PER_MIN, 1.15, 24e6, 142.450e3, 120 * MINUTE)
    assert t_fail == pytest.approx(60 * MINUTE, abs=0.5)


def test_time_to_failure__within_first_20_min_uses_the_k0_ramp():
    # M_Rd,fi(10 min), 200 x 600 GL24h three sided: d_ef = 7 + 3.5 = 10.5 mm,
    # b_ef = 179 mm, h_ef = 589.5 mm, W = 179 x 589.5^2 / 6 = 10 367 389 mm³,
    # M = 10 367 389 x 27.6 = 286.140 kN·m -> the member fails at 10 min under that moment
    t_fail = time_to_failure(0.2, 0.6, 0.7 * MM_PER_MIN, 1.15, 24e6, 286.140e3, 60 * MINUTE)
    assert t_fail == pytest.approx(10 * MINUTE, abs=0.5)


def test_time_to_failure__none_when_resistance_outlasts_the_duration():
    assert time_to_failure(0.2, 0.6, 0.7 * MM_PER_MIN, 1.15, 24e6, 50e3, 30 * MINUTE) is None
    r = timber_member_fire(0.2, 0.6, 30 * MINUTE, 0.7 * MM_PER_MIN, 1.15, 24e6,
                           design_moment=50e3)
    assert r.time_to_failure is None


def test_time_to_failure__zero_when_the_moment_exceeds_the_resistance_at_the_start():
    # M_Rd,fi(0) = 200 x 600^2 / 6 x 27.6 = 331.2 kN·m
    assert time_to_failure(0.2, 0.6, 0.7 * MM_PER_MIN, 1.15, 24e6, 400e3, 60 * MINUTE) == 0.0


def test_fire_design_strength__eq_2_1_with_k_fi():
    # f_d,fi = k_mod,fi k_fi f_k / gamma_M,fi = 1.0 x 1.25 x 24 / 1.0 = 30 MPa
    assert fire_design_strength(24e6, 1.25) == pytest.approx(30e6, rel=1e-12)


@pytest.mark.parametrize("call, quantity", [
    (lambda: timber_fire_properties("oak"), "timber"),
    (lambda: notional_charring_depth(-1.0, 1e-5), "duration"),
    (lambda: notional_charring_depth(60.0, 0.0), "notional_charring_rate"),
    (lambda: residual_section(0.0, 0.2, 0.01), "width"),
    (lambda: residual_section(0.1, 0.2, 0.01, "two_sided"), "exposure"),
    (lambda: effective_charring_depth(60.0, 1e-5, -0.007), "zero_strength_layer"),
    (lambda: fire_design_strength(24e6, 0.0), "k_fi"),
    (lambda: fire_design_strength(-24e6, 1.25), "characteristic_strength"),
    (lambda: timber_member_fire(0.1, 0.2, 60.0, 1e-5, 1.25, -24e6),
     "characteristic_bending_strength"),
    (lambda: time_to_failure(0.1, 0.2, 1e-5, 1.25, 24e6, 0.0, 60.0), "design_moment"),
    (lambda: time_to_failure(0.1, 0.2, 1e-5, 1.25, 24e6, 1e3, 0.0), "duration"),
])
def test_invalid_inputs__refused_naming_the_parameter(call, quantity):
    with pytest.raises(PhysicsRangeError) as caught:
        call()
    assert caught.value.quantity == quantity


def test_docstring_examples__run_as_written():
    failures, _ = doctest.testmod(timber, raise_on_error=False, verbose=False)
    assert failures == 0
