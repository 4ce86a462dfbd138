"""Fire curves against EN 1991-1-2:2002 §3.2 and Annex A, ISO 834-1 and ASTM E119 table points.

Every check value names its source. "From memory" marks a published figure recalled, not looked
up; hand calculations are written out in the comments from the equations of the standard.
"""

import numpy as np
import pytest

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.firecurves import (
    FIRE_GROWTH_LIMITING_TIME, FireCurve, external_fire, external_fire_temperature,
    hydrocarbon_fire, hydrocarbon_fire_temperature, named_fire, parametric_fire, standard_fire,
    standard_fire_temperature, tabulated_fire)

K = 273.15
MIN = 60.0
HOUR = 3600.0


def celsius(kelvin):
    return np.asarray(kelvin) - K


def fahrenheit_to_kelvin(f):
    return (f - 32.0) * 5.0 / 9.0 + K


# --- nominal curves ----------------------------------------------------------------------------

def test_standard_curve__en1991_1_2_eq3_4_945C_at_60min():
    # EN 1991-1-2:2002 eq. (3.4): 20 + 345 log10(8*60 + 1) = 945 °C (printed to 1 °C in ISO 834-1)
    assert celsius(standard_fire_temperature(60 * MIN)) == pytest.approx(945.0, abs=0.5)


@pytest.mark.parametrize("minutes, expected_c", [
    (5, 576),      # ISO 834-1:1999 tabulated values, from memory
    (10, 678),     # ISO 834-1:1999, from memory
    (15, 739),     # ISO 834-1:1999, from memory
    (30, 842),     # ISO 834-1:1999, from memory
    (90, 1006),    # ISO 834-1:1999, from memory
    (120, 1049),   # ISO 834-1:1999, from memory
    (180, 1110),   # ISO 834-1:1999, from memory
    (240, 1153),   # ISO 834-1:1999, from memory
])
def test_standard_curve__iso834_1_table_values(minutes, expected_c):
    # Table printed to 1 °C: tolerance half a degree plus rounding.
    assert celsius(standard_fire()(minutes * MIN)) == pytest.approx(expected_c, abs=0.5)


def test_nominal_curves__start_at_20C():
    # EN 1991-1-2:2002 eqs. (3.4)–(3.6) all give 20 °C at t = 0.
    for function in (standard_fire_temperature, external_fire_temperature,
                     hydrocarbon_fire_temperature):
        assert celsius(function(0.0)) == pytest.approx(20.0, abs=1e-9)


@pytest.mark.parametrize("minutes", [30, 60, 120])
def test_external_curve__plateau_680C(minutes):
    # EN 1991-1-2:2002 eq. (3.5): 660 + 20 = 680 °C once the exponentials have decayed.
    assert celsius(external_fire()(minutes * MIN)) == pytest.approx(680.0, abs=0.5)


@pytest.mark.parametrize("minutes", [60, 120])
def test_hydrocarbon_curve__plateau_1100C(minutes):
    # EN 1991-1-2:2002 eq. (3.6): 1080 + 20 = 1100 °C once the exponentials have decayed.
    assert celsius(hydrocarbon_fire()(minutes * MIN)) == pytest.approx(1100.0, abs=0.5)


def test_curves__carry_the_convection_coefficient_of_their_clause():
    # EN 1991-1-2:2002 §3.2.1 (25), §3.2.2 (25), §3.2.3 (50), §3.3.1.1 (35) W/(m²·K).
    assert standard_fire().convection_coefficient == 25.0
    assert external_fire().convection_coefficient == 25.0
    assert hydrocarbon_fire().convection_coefficient == 50.0
    parametric = parametric_fire(0.06, 300e6, 1000.0, "medium", 100.0, 3.0)
    assert parametric.convection_coefficient == 35.0


def test_curves__cite_their_clause_and_equation():
    assert "§3.2.1" in standard_fire().source and "(3.4)" in standard_fire().source
    assert "§3.2.2" in external_fire().source and "(3.5)" in external_fire().source
    assert "§3.2.3" in hydrocarbon_fire().source and "(3.6)" in hydrocarbon_fire().source
    assert "Annex A" in parametric_fire(0.06, 300e6, 1000.0, "medium", 100.0, 3.0).source


def test_named_fire__inline_names_and_duration():
    fire = named_fire("standard", 3600.0)
    assert isinstance(fire, FireCurve) and fire.name == "standard" and fire.duration == 3600.0
    with pytest.raises(PhysicsRangeError):
        named_fire("smouldering")


def test_curve__array_in_array_out_and_refuses_negative_time():
    fire = standard_fire()
    values = fire(np.array([0.0, 30 * MIN, 60 * MIN]))
    assert values.shape == (3,)
    with pytest.raises(PhysicsRangeError):
        fire(-1.0)


# --- tabulated curve ---------------------------------------------------------------------------

# ASTM E119 time-temperature curve, table points (°F; the table also prints °C), from memory:
# 0 min 68 °F (20 °C), 5 min 1000 °F (538 °C), 10 min 1300 °F (704 °C), 30 min 1550 °F (843 °C),
# 1 h 1700 °F (927 °C), 2 h 1850 °F (1010 °C), 4 h 2000 °F (1093 °C).
E119_MINUTES = [0, 5, 10, 30, 60, 120, 240]
E119_FAHRENHEIT = [68, 1000, 1300, 1550, 1700, 1850, 2000]
E119_CELSIUS = [20, 538, 704, 843, 927, 1010, 1093]


def e119_curve():
    return tabulated_fire([m * MIN for m in E119_MINUTES],
                          [fahrenheit_to_kelvin(f) for f in E119_FAHRENHEIT],
                          convection_coefficient=25.0, source="ASTM E119 table (from memory)")


def test_tabulated_curve__astm_e119_table_points_read_back():
    fire = e119_curve()
    for minutes, expected_c in zip(E119_MINUTES, E119_CELSIUS):
        # ASTM E119's °C column is printed to 1 °C.
        assert celsius(fire(minutes * MIN)) == pytest.approx(expected_c, abs=0.6)
    assert fire.duration == 240 * MIN and fire.convection_coefficient == 25.0


def test_tabulated_curve__astm_e119_linear_between_points():
    fire = e119_curve()
    # Linear interpolation between the table's 30 min 1550 °F and 60 min 1700 °F:
    # 45 min -> 1625 °F = 885.0 °C.
    assert celsius(fire(45 * MIN)) == pytest.approx(885.0, abs=0.01)
    # Between 5 min 1000 °F and 10 min 1300 °F: 7.5 min -> 1150 °F = 621.1 °C.
    assert celsius(fire(7.5 * MIN)) == pytest.approx(621.1, abs=0.06)


def test_tabulated_curve__refused_beyond_last_point():
    fire = e119_curve()
    with pytest.raises(PhysicsRangeError) as caught:
        fire(241 * MIN)
    assert "last time of the table" in str(caught.value)
    assert caught.value.quantity == "t"


def test_tabulated_curve__duration_within_the_table_only():
    # A tabulated curve is not extended beyond its points (calcdoc's rule, DEVELOPERS.md).
    times, temperatures = [0.0, 600.0, 1200.0], [293.15, 900.0, 1000.0]
    assert tabulated_fire(times, temperatures, 25.0).duration == 1200.0
    assert tabulated_fire(times, temperatures, 25.0, duration=900.0).duration == 900.0
    with pytest.raises(PhysicsRangeError) as caught:
        tabulated_fire(times, temperatures, 25.0, duration=1260.0)
    assert caught.value.quantity == "duration" and "last time of the table" in \
        caught.value.expected


def test_tabulated_curve__times_must_increase_strictly_from_zero():
    with pytest.raises(PhysicsRangeError) as caught:
        tabulated_fire([0.0, 600.0, 600.0], [293.15, 900.0, 950.0], 25.0)
    assert "strictly increasing" in str(caught.value)
    assert (caught.value.quantity, caught.value.index) == ("times", 2)
    with pytest.raises(PhysicsRangeError) as caught:
        tabulated_fire([60.0, 600.0], [293.15, 900.0], 25.0)
    assert (caught.value.quantity, caught.value.index) == ("times", 0)
    with pytest.raises(PhysicsRangeError) as caught:
        tabulated_fire([0.0, 600.0], [293.15, -1.0], 25.0)
    assert (caught.value.quantity, caught.value.index) == ("temperatures", 1)
    with pytest.raises(PhysicsRangeError):
        tabulated_fire([0.0], [293.15], 25.0)


def test_tabulated_curve__convection_coefficient_must_be_stated_and_positive():
    with pytest.raises(TypeError):
        tabulated_fire([0.0, 600.0], [293.15, 900.0])  # no coefficient: refused
    with pytest.raises(PhysicsRangeError):
        tabulated_fire([0.0, 600.0], [293.15, 900.0], 0.0)


# --- parametric curve, EN 1991-1-2:2002 Annex A --------------------------------------------------

def test_parametric__limiting_times_25_20_15_min():
    # EN 1991-1-2:2002 Annex A, with eq. (A.7): t_lim = 25 / 20 / 15 min for slow / medium / fast.
    assert FIRE_GROWTH_LIMITING_TIME == {"slow": 1500.0, "medium": 1200.0, "fast": 900.0}


def test_parametric__ventilation_controlled_hand_check_annex_a():
    # Hand calculation, EN 1991-1-2:2002 Annex A: O = 0.06 m^½, b = 1000 J/(m²s^½K),
    # q_t,d = 300 MJ/m², medium growth (t_lim = 20 min = 0.3333 h).
    #   (A.2b) Γ = (O/b)² / (0.04/1160)² = (0.06·1160 / (0.04·1000))² = 1.74² = 3.0276
    #   (A.7)  t_max = max(0.2e-3·300/0.06 ; 0.3333) = max(1.000 ; 0.3333) = 1.000 h
    #          > t_lim: ventilation controlled; t*_max = 1.000·3.0276 = 3.0276 h
    #   (A.1)  θmax = 20 + 1325(1 − 0.324e^−0.60552 − 0.204e^−5.14692 − 0.472e^−57.5)
    #               = 20 + 1325(1 − 0.17684 − 0.00119 − 0) = 1109.1 °C
    fire = parametric_fire(0.06, 300e6, 1000.0, "medium", floor_area=100.0, height=3.0)
    p = fire.parametric
    assert p.regime == "ventilation-controlled" and fire.regime == "ventilation-controlled"
    assert p.gamma == pytest.approx(3.0276, rel=1e-4)
    assert fire.t_max == pytest.approx(1.000 * HOUR, rel=1e-4)
    assert fire.peak_time == fire.t_max
    assert celsius(fire.theta_max) == pytest.approx(1109.1, abs=0.05)
    assert celsius(fire(1.0 * HOUR)) == pytest.approx(1109.1, abs=0.05)
    # Heating at 30 min, (A.1) with t* = 0.5·3.0276 = 1.5138 h:
    #   20 + 1325(1 − 0.324e^−0.30276 − 0.204e^−2.57346 − 0.472e^−28.8)
    #   = 20 + 1325(1 − 0.23936 − 0.01556 − 0) = 20 + 1325·0.74508 = 1007.2 °C
    assert celsius(fire(0.5 * HOUR)) == pytest.approx(1007.2, abs=0.1)
    # Cooling: (A.12) t*_max = (0.2e-3·300/0.06)·Γ = 3.0276 >= 2 -> (A.11c), x = 1.0.
    #   At t = 1.5 h: t* = 4.5414; θg = 1109.12 − 250(4.5414 − 3.0276) = 730.7 °C
    assert p.cooling_equation == "A.11c" and p.x == 1.0
    assert celsius(fire(1.5 * HOUR)) == pytest.approx(730.7, abs=0.05)
    # 20 °C reached at t* = 3.0276 + 1089.12/250 = 7.3841 -> t = 2.4389 h; held at 20 °C after.
    assert p.time_to_ambient == pytest.approx(2.4389 * HOUR, rel=1e-4)
    assert celsius(fire(3.0 * HOUR)) == pytest.approx(20.0, abs=1e-9)


def test_parametric__fuel_controlled_with_k_factor_hand_check_annex_a():
    # Hand calculation, EN 1991-1-2:2002 Annex A: O = 0.10 m^½, b = 800 J/(m²s^½K),
    # q_t,d = 60 MJ/m², fast growth (t_lim = 15 min = 0.25 h).
    #   (A.7)  0.2e-3·60/0.10 = 0.12 h < t_lim = 0.25 h -> t_max = t_lim: fuel controlled
    #   (A.10) O_lim = 0.1e-3·60/0.25 = 0.024
    #   (A.9)  Γ_lim = (0.024·1160/(0.04·800))² = 0.87² = 0.7569
    #   O = 0.10 > 0.04, q_t,d = 60 < 75, b = 800 < 1160: Γ_lim multiplied by
    #          k = 1 + (0.06/0.04)·(−15/75)·(360/1160) = 1 − 0.093103 = 0.906897
    #          Γ_lim·k = 0.686430
    #   (A.8)  t* = t·Γ_lim·k; at t_max = 0.25 h: t* = 0.171608
    #   (A.1)  θmax = 20 + 1325(1 − 0.324e^−0.034322 − 0.204e^−0.291733 − 0.472e^−3.260551)
    #               = 20 + 1325(1 − 0.313069 − 0.152381 − 0.018110) = 704.3 °C
    fire = parametric_fire(0.10, 60e6, 800.0, "fast", floor_area=100.0, height=3.0)
    p = fire.parametric
    assert fire.regime == "fuel-controlled"
    assert p.opening_factor_limit == pytest.approx(0.024, rel=1e-9)
    assert p.gamma_limit == pytest.approx(0.7569, rel=1e-4)
    assert p.k_applied and p.k == pytest.approx(0.906897, rel=1e-5)
    assert p.gamma_heating == pytest.approx(0.686430, rel=1e-5)
    assert fire.t_max == pytest.approx(0.25 * HOUR, rel=1e-9)
    assert celsius(fire.theta_max) == pytest.approx(704.3, abs=0.05)
    # Heating at 10 min: t* = (1/6)·0.686430 = 0.114405 -> (A.1) gives 631.7 °C.
    assert celsius(fire(10 * MIN)) == pytest.approx(631.7, abs=0.1)
    # Cooling: Γ = (0.10·1160/(0.04·800))² = 3.625² = 13.140625
    #   (A.12) t*_max = 0.12·13.140625 = 1.576875, between 0.5 and 2 -> (A.11b),
    #          slope 250(3 − 1.576875) = 355.78 per hour of t*
    #   x = t_lim·Γ / t*_max = 0.25·13.140625/1.576875 = 2.0833; t*_max·x = 3.285156
    #   At t = 0.3 h: t* = 3.942188; θg = 704.28 − 355.78(3.942188 − 3.285156) = 470.5 °C
    assert p.cooling_equation == "A.11b"
    assert p.x == pytest.approx(2.0833, rel=1e-4)
    assert p.cooling_rate == pytest.approx(355.78, abs=0.01)
    assert celsius(fire(0.3 * HOUR)) == pytest.approx(470.5, abs=0.05)


def test_parametric__short_fire_cools_at_625_per_hour_a11a():
    # Hand calculation, EN 1991-1-2:2002 Annex A: O = 0.02, b = 2000, q_t,d = 100 MJ/m², medium.
    #   Γ = (0.02·1160/(0.04·2000))² = 0.29² = 0.0841; t_max = max(0.2e-3·100/0.02 ; 1/3) = 1.0 h
    #   t*_max = 0.0841 <= 0.5 -> (A.11a), slope 625
    #   (A.1) θmax = 20 + 1325(1 − 0.318596 − 0.176823 − 0.095489) = 562.0 °C
    #   At 1.5 h: t* = 0.12615; θg = 562.04 − 625(0.12615 − 0.0841) = 535.8 °C
    fire = parametric_fire(0.02, 100e6, 2000.0, "medium", floor_area=50.0, height=2.8)
    assert fire.regime == "ventilation-controlled"
    assert fire.parametric.cooling_equation == "A.11a"
    assert celsius(fire.theta_max) == pytest.approx(562.0, abs=0.05)
    assert celsius(fire(1.5 * HOUR)) == pytest.approx(535.8, abs=0.05)


def test_parametric__fuel_controlled_without_k_when_load_not_below_75():
    # Annex A: k applies only when O > 0.04 AND q_t,d < 75 AND b < 1160; here q_t,d = 80.
    # 0.2e-3·80/0.10 = 0.16 h < t_lim 0.25 h: fuel controlled, k = 1.
    fire = parametric_fire(0.10, 80e6, 800.0, "fast", 100.0, 3.0)
    assert fire.regime == "fuel-controlled"
    assert not fire.parametric.k_applied and fire.parametric.k == 1.0
    # (A.10) O_lim = 0.1e-3·80/0.25 = 0.032; (A.9) Γ_lim = (0.032·1160/(0.04·800))² = 1.16² = 1.3456
    assert fire.parametric.gamma_heating == pytest.approx(1.3456, rel=1e-4)


def test_parametric__gamma_one_approximates_standard_curve():
    # Annex A note: with Γ = 1 eq. (A.1) approximates the standard curve. O = 0.04, b = 1160 give
    # Γ = 1; q_t,d = 1000 keeps the heating phase running for 5 h. Agreement within 25 K from
    # 15 min to 120 min (common practice: the two curves are drawn as near-coincident).
    fire = parametric_fire(0.04, 1000e6, 1160.0, "medium", 100.0, 3.0)
    assert fire.parametric.gamma == pytest.approx(1.0, rel=1e-12)
    times = np.arange(15, 121, 5) * MIN
    assert np.max(np.abs(fire(times) - standard_fire()(times))) < 25.0
    # and within 2 K at 60 min: 944.1 °C (A.1 at t* = 1 h) against 945.3 °C (eq. 3.4), by hand.
    assert fire(60 * MIN) - standard_fire()(60 * MIN) == pytest.approx(-1.2, abs=0.1)


def test_parametric__continuous_at_the_peak_in_both_regimes():
    # Annex A: the cooling line of (A.11) starts from θmax at t_max (x makes it so when fuel
    # controlled).
    for fire in (parametric_fire(0.06, 300e6, 1000.0, "medium", 100.0, 3.0),
                 parametric_fire(0.10, 60e6, 800.0, "fast", 100.0, 3.0)):
        before = fire(fire.t_max * (1 - 1e-9))
        after = fire(fire.t_max * (1 + 1e-9))
        assert after == pytest.approx(before, abs=1e-3)
        assert after < fire.theta_max + 1e-6


@pytest.mark.parametrize("kwargs, quantity", [
    (dict(thermal_inertia=99.0), "thermal_inertia"),
    (dict(thermal_inertia=2201.0), "thermal_inertia"),
    (dict(opening_factor=0.019), "opening_factor"),
    (dict(opening_factor=0.201), "opening_factor"),
    (dict(fire_load_density=49e6), "fire_load_density"),
    (dict(fire_load_density=1001e6), "fire_load_density"),
    (dict(floor_area=501.0), "floor_area"),
    (dict(height=4.01), "height"),
    (dict(fire_growth="very fast"), "fire_growth"),
])
def test_parametric__annex_a_validity_limits_refused(kwargs, quantity):
    # EN 1991-1-2:2002 Annex A: 100 <= b <= 2200, 0.02 <= O <= 0.20, 50 <= q_t,d <= 1000 MJ/m²,
    # floor area <= 500 m², height <= 4 m.
    arguments = dict(opening_factor=0.06, fire_load_density=300e6, thermal_inertia=1000.0,
                     fire_growth="medium", floor_area=100.0, height=3.0)
    arguments.update(kwargs)
    with pytest.raises(PhysicsRangeError) as caught:
        parametric_fire(**arguments)
    # The error names the function's own parameter, which the kind maps to its input.
    assert caught.value.quantity == quantity


def test_parametric__limits_are_inclusive():
    # Annex A writes the limits with <=: the end values are accepted.
    parametric_fire(0.02, 50e6, 100.0, "slow", 500.0, 4.0)
    parametric_fire(0.20, 1000e6, 2200.0, "fast", 500.0, 4.0)


def test_physics_range_error__message_names_quantity_expected_and_got():
    with pytest.raises(PhysicsRangeError) as caught:
        parametric_fire(0.5, 300e6, 1000.0, "medium", 100.0, 3.0)
    error = caught.value
    assert isinstance(error, ValueError)
    assert error.value == 0.5
    assert str(error) == ("opening_factor: out of range (expected 0.02 <= O <= 0.20 "
                          "m^0.5 (EN 1991-1-2:2002 Annex A), got 0.5)")
