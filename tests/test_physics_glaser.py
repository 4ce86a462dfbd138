"""Interstitial condensation by the ISO 13788:2012 monthly (Glaser) method.

Check values are hand calculations worked in the comments from the method's equations as
docs/format.md (interstitial_condensation) states them — conduction in series, the Annex E saturation
pressure, the tautest line and g = δ0·[(p_l − p_sat)/Δs_l − (p_sat − p_r)/Δs_r] with
δ0 = 2.0e-10 kg/(m·s·Pa) — each rounded as printed and asserted to that precision. Saturation
pressures above 0 °C are cross-checked against IAPWS-92 (chemicals.air.iapws92_Psat). The walls
and climates are invented for the tests. ISO 13788's own worked example is not used: the printed
standard was not at hand to cite its figures.
"""

from __future__ import annotations

import doctest

import numpy as np
import pytest
from chemicals.air import iapws92_Psat
from scipy import constants

from calcdoc.physics import PhysicsRangeError, glaser
from calcdoc.physics.glaser import (
    equivalent_air_thickness,
    interstitial_condensation,
    month_seconds,
    start_month,
    vapour_profile,
)

C = constants.zero_Celsius  # 273.15 K
DAY = 86400.0  # s

# Wall A (invented): mineral wool inside (R 2.5 m²K/W, s_d 0.1 m), a board outside (R 0.1,
# s_d 2.0 m): vapour-open on the warm side, tighter on the cold side. R_si 0.13, R_se 0.04
# (ISO 6946:2017 Table 7, horizontal heat flow).
WALL_A = ([2.5, 0.1], [0.1, 2.0], 0.13, 0.04)

# Hand calculation, inside air 20 °C, 50 %, used throughout:
#   p_sat(20 °C) = 610.5·exp(17.269·20/257.3) = 2337.0 Pa   (ISO 13788:2012 Annex E)
#   p_i = 0.5 · 2337.0 = 1168.5 Pa
P_INSIDE = 1168.5


# --- one month, one interface ------------------------------------------------------------------

def test_one_interface__hand_calculation_temperature_saturation_and_rate():
    # Hand calculation, wall A, outside 0 °C, 80 %:
    #   R_T = 0.13 + 2.5 + 0.1 + 0.04 = 2.77 m²K/W;  q = 20/2.77 = 7.2202 W/m²
    #   θ_1 = 20 − 7.2202·(0.13 + 2.5) = 1.0108 °C
    #   p_sat,1 = 610.5·exp(17.269·1.0108/238.3108) = 656.90 Pa        (Annex E, over water)
    #   p_e = 0.8 · 610.5 = 488.40 Pa
    #   straight line at s = 0.1 m of 2.1 m: 1168.5 − 680.1·0.1/2.1 = 1136.1 Pa > 656.90 Pa,
    #   so the tautest line touches saturation at the interface: p_1 = 656.90 Pa
    #   g = 2.0e-10·[(1168.48 − 656.90)/0.1 − (656.90 − 488.40)/2.0]
    #     = 2.0e-10·[5115.8 − 84.25] = 1.0063e-6 kg/(m²·s)
    month = vapour_profile(*WALL_A, 20.0 + C, 0.5, 0.0 + C, 0.8)
    assert month.temperatures[1] - C == pytest.approx(1.0108, abs=5e-5)  # hand calculation
    assert month.saturation_pressures[1] == pytest.approx(656.90, abs=0.005)  # hand, Annex E
    # IAPWS-92 over water gives 657.6 Pa at 1.0108 °C: Annex E agrees within 0.2 %.
    assert month.saturation_pressures[1] == pytest.approx(iapws92_Psat(1.0108 + C), rel=0.002)
    assert month.vapour_pressures[0] == pytest.approx(P_INSIDE, abs=0.05)  # hand calculation
    assert month.vapour_pressures[2] == pytest.approx(488.40, abs=0.005)  # hand calculation
    assert month.vapour_pressures[1] == pytest.approx(656.90, abs=0.005)  # touches saturation
    assert month.cumulative_sd == pytest.approx([0.0, 0.1, 2.1])  # s_d summed from inside
    assert month.rates[1] == pytest.approx(1.0063e-6, rel=5e-5)  # hand calculation
    assert month.condensing.tolist() == [False, True, False]
    assert month.rates[0] == month.rates[2] == 0.0  # surfaces hold the air's pressures


def test_wet_interface_in_a_warm_month__evaporates_at_hand_calculated_rate():
    # Hand calculation, wall A holding moisture at the interface, outside 15 °C, 80 %:
    #   θ_1 = 20 − (5/2.77)·2.63 = 15.2527 °C;  p_sat,1 = 610.5·exp(17.269·15.2527/252.5527)
    #       = 1732.3 Pa (Annex E);  p_e = 0.8·p_sat(15 °C) = 0.8·1704.4 = 1363.5 Pa
    #   the wet interface is held at saturation (docs/format.md):
    #   g = 2.0e-10·[(1168.48 − 1732.33)/0.1 − (1732.33 − 1363.53)/2.0]
    #     = 2.0e-10·[−5638.6 − 184.40] = −1.1646e-6 kg/(m²·s), evaporation
    month = vapour_profile(*WALL_A, 20.0 + C, 0.5, 15.0 + C, 0.8, wet_interfaces=[1])
    assert month.saturation_pressures[1] == pytest.approx(1732.3, abs=0.05)  # hand, Annex E
    assert month.saturation_pressures[1] == pytest.approx(iapws92_Psat(15.2527 + C),
                                                          rel=0.002)  # IAPWS-92
    assert month.vapour_pressures[1] == pytest.approx(1732.3, abs=0.05)  # held at saturation
    assert month.rates[1] == pytest.approx(-1.1646e-6, rel=5e-5)  # hand calculation
    assert not month.condensing.any()
    assert month.wet.tolist() == [False, True, False]


def test_dry_interface_in_the_same_warm_month__straight_line_no_condensation():
    # Hand calculation: dry, the straight line at s = 0.1 m is 1168.5 − (1168.5 − 1363.5)·0.1/2.1
    # = 1177.8 Pa, far below p_sat,1 = 1732.3 Pa: no touch, no rate.
    month = vapour_profile(*WALL_A, 20.0 + C, 0.5, 15.0 + C, 0.8)
    assert month.vapour_pressures[1] == pytest.approx(1177.8, abs=0.05)  # hand calculation
    assert not month.rates.any()


def test_vapour_control_layer_on_warm_side__no_condensation_in_a_frost_month():
    # Common practice: a vapour control layer on the warm side keeps the cold side of the
    # insulation below saturation. Wall (invented): lining with a vapour control layer
    # (R 0.06, s_d 100 m), mineral wool (R 2.5, s_d 0.1 m), breather board (R 0.1, s_d 0.1 m);
    # inside 20 °C, 50 %, outside −5 °C, 90 %. Hand calculation:
    #   R_T = 2.83;  θ_2 = 20 − (25/2.83)·2.69 = −3.7633 °C
    #   p_sat,2 = 610.5·exp(21.875·(−3.7633)/261.7367) = 445.75 Pa  (Annex E, over ice)
    #   p_e = 0.9·610.5·exp(21.875·(−5)/260.5) = 0.9·401.18 = 361.06 Pa
    #   straight line at s = 100.1 m of 100.2 m: 361.06 + (1168.48 − 361.06)·0.1/100.2
    #   = 361.87 Pa
    month = vapour_profile([0.06, 2.5, 0.1], [100.0, 0.1, 0.1], 0.13, 0.04,
                           20.0 + C, 0.5, -5.0 + C, 0.9)
    assert month.saturation_pressures[2] == pytest.approx(445.75, abs=0.005)  # hand, Annex E
    assert month.vapour_pressures[2] == pytest.approx(361.87, abs=0.005)  # straight, hand
    assert not month.condensing.any()
    assert not month.rates.any()
    assert np.all(month.vapour_pressures[1:-1] < month.saturation_pressures[1:-1])


# --- one month, two interfaces -----------------------------------------------------------------

def test_two_condensation_interfaces__hand_calculation_of_both_rates():
    # Wall (invented), inside first: insulation (R 1.5, s_d 0.1 m), a membrane (R 0.05,
    # s_d 1.0 m), insulation (R 1.0, s_d 0.1 m), a tight board (R 0.1, s_d 5.0 m); inside
    # 20 °C, 50 %, outside 0 °C, 80 %. Hand calculation (Annex E over water throughout):
    #   R_T = 2.82;  q = 20/2.82 = 7.0922 W/m²
    #   plane 1: θ = 20 − 7.0922·1.63 = 8.4397 °C, p_sat = 1104.74 Pa, s = 0.1 m
    #   plane 2: θ = 20 − 7.0922·1.68 = 8.0851 °C, p_sat = 1078.44 Pa, s = 1.1 m
    #   plane 3: θ = 20 − 7.0922·2.68 = 0.9929 °C, p_sat =  656.05 Pa, s = 1.2 m
    #   p_i = 1168.48 Pa at s = 0, p_e = 488.40 Pa at s = 6.2 m
    #   tautest line through planes 1 and 3: slopes −637.34, −407.90, −33.53 Pa/m (increasing,
    #   so it bends down only at 1 and 3); at plane 2 it is 1104.74 − 448.69·1.0/1.1
    #   = 696.84 Pa < 1078.44 Pa, so plane 2 is not touched.
    #   g_1 = 2.0e-10·(637.34 − 407.90) = 4.5887e-8 kg/(m²·s)
    #   g_3 = 2.0e-10·(407.90 − 33.53) = 7.4875e-8 kg/(m²·s)
    month = vapour_profile([1.5, 0.05, 1.0, 0.1], [0.1, 1.0, 0.1, 5.0], 0.13, 0.04,
                           20.0 + C, 0.5, 0.0 + C, 0.8)
    assert month.saturation_pressures[1:4] == pytest.approx(
        [1104.74, 1078.44, 656.05], abs=0.005)  # hand calculation, Annex E
    assert month.saturation_pressures[1:4] == pytest.approx(
        [iapws92_Psat(t + C) for t in (8.4397, 8.0851, 0.9929)], rel=0.002)  # IAPWS-92
    assert month.vapour_pressures[2] == pytest.approx(696.84, abs=0.005)  # hand calculation
    assert month.condensing.tolist() == [False, True, False, True, False]
    assert month.rates[1] == pytest.approx(4.5887e-8, rel=5e-5)  # hand calculation
    assert month.rates[3] == pytest.approx(7.4875e-8, rel=5e-5)  # hand calculation
    assert month.rates[2] == 0.0


@pytest.mark.parametrize("seed", range(20))
def test_profile__is_the_tautest_line_under_saturation_by_its_definition(seed):
    # docs/format.md's definition, checked on invented random walls and climates: the line never
    # exceeds saturation between the fixed points; between them it is convex (slopes never
    # decrease: it bends only downward, where saturation pushes it), and it bends only at a
    # plane it touches; the rate there is the inflow minus the outflow, so g > 0 at a touch and
    # g = 0 elsewhere, and a wet interface is held at saturation.
    rng = np.random.default_rng(seed)
    n = int(rng.integers(2, 7))
    R = rng.uniform(0.02, 2.0, n)
    s_d = 10.0 ** rng.uniform(-2.0, 1.5, n)
    wet = sorted(set(rng.integers(1, n, int(rng.integers(0, 2))).tolist()))
    month = vapour_profile(R, s_d, 0.13, 0.04, rng.uniform(15.0, 25.0) + C,
                           rng.uniform(0.3, 0.8), rng.uniform(-15.0, 10.0) + C,
                           rng.uniform(0.6, 1.0), wet_interfaces=wet)
    s, p, p_sat = month.cumulative_sd, month.vapour_pressures, month.saturation_pressures
    inner = np.arange(1, n)
    assert np.all(p[inner] <= p_sat[inner] * (1 + 1e-12))
    assert np.all(p[wet] == p_sat[wet])
    slopes = np.diff(p) / np.diff(s)
    bends = slopes[1:] - slopes[:-1]  # at planes 1 … n − 1
    free = np.ones(n - 1, dtype=bool)
    free[np.asarray(wet, dtype=int) - 1] = False
    assert np.all(bends[free] >= -1e-9 * np.abs(slopes).max())
    touching = np.isclose(p[inner], p_sat[inner], rtol=1e-12, atol=0.0)
    assert np.all(~free | touching | (np.abs(bends) <= 1e-9 * np.abs(slopes).max()))
    assert month.rates[inner] == pytest.approx(2.0e-10 * bends, rel=1e-9, abs=1e-18)
    assert np.all(month.rates[inner][free] >= 0.0)


# --- the year -----------------------------------------------------------------------------------

def _year(walls, outside_c, outside_phi):
    return interstitial_condensation(*walls, [20.0 + C] * 12, [0.5] * 12,
                                     [t + C for t in outside_c], outside_phi)


def test_month_lengths__non_leap_year():
    # docs/format.md: a month lasts its days of a non-leap year (365 days, February 28).
    seconds = month_seconds()
    assert seconds.sum() == pytest.approx(365 * DAY)
    assert seconds[1] == pytest.approx(28 * DAY)


def test_year_condensing_december_to_february__starts_in_december_and_dries_out():
    # Wall A; outside 0 °C, 80 % in December, January and February, 15 °C, 80 % otherwise.
    # Start month (docs/format.md): condensation Dec–Feb, none in November, so December.
    # Hand calculation with the rates of the two one-month tests above:
    #   g_c = 1.0063e-6 (wet or dry, the interface is at saturation), g_e = −1.1646e-6 kg/(m²·s)
    #   Dec: 1.0063e-6·31·86400 = 2.6953;  Jan: 5.3906;  Feb: + 1.0063e-6·28·86400 = 7.8250
    #   Mar: 7.8250 − 1.1646e-6·31·86400 = 7.8250 − 3.1193 = 4.7058
    #   Apr: 4.7058 − 1.1646e-6·30·86400 = 4.7058 − 3.0186 = 1.6871
    #   May: 1.6871 − 3.1193 < 0, so 0 (evaporation limited to what is there); balance −1.6871
    #   Jun–Nov: the dry interface stays below saturation (1177.8 < 1732.3 Pa): 0  [kg/m²]
    outside_c = [0.0, 0.0] + [15.0] * 9 + [0.0]
    year = _year(WALL_A, outside_c, [0.8] * 12)
    assert year.condensation_predicted and not year.condensation_every_month
    assert year.start_month == 12  # docs/format.md start-month rule, wrap-around
    assert year.months.tolist() == [12, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]
    assert year.accumulated_total[:6] == pytest.approx(
        [2.6953, 5.3906, 7.8250, 4.7058, 1.6871, 0.0], abs=5e-4)  # hand calculation
    assert year.monthly_balance[5] == pytest.approx(-1.6871, abs=5e-4)  # limited, hand
    assert year.monthly_balance.sum() == pytest.approx(0.0, abs=1e-12)  # all of it went
    assert np.all(year.accumulated >= 0.0)  # docs/format.md: never negative
    assert year.accumulated_total[6:].tolist() == [0.0] * 6
    assert year.max_accumulated == pytest.approx(7.8250, abs=5e-4)  # hand calculation
    assert year.month_of_max == 2  # February, hand calculation
    assert year.end_of_year_accumulated == 0.0
    assert year.dries_out == 1
    # The diagram is February's: the interface at saturation and condensing.
    assert year.worst_month == 2
    assert year.diagram.cumulative_sd == pytest.approx([0.0, 0.1, 2.1])
    assert year.diagram.vapour_pressures[1] == pytest.approx(656.90, abs=0.005)  # hand
    assert year.diagram.condensing.tolist() == [False, True, False]


def test_year_condensing_november_to_march__starts_in_november_and_does_not_dry_out():
    # Wall B (invented): as wall A with s_d 1.0 m inside and 20 m outside. Outside 0 °C, 80 %
    # from November to March, 10 °C, 80 % from April to October; inside 20 °C, 50 %.
    # Hand calculation (Annex E, p_i = 1168.48 Pa):
    #   cold: θ_1 = 1.0108 °C, p_sat,1 = 656.90 Pa, p_e = 488.40 Pa
    #     g_c = 2.0e-10·[(1168.48 − 656.90)/1.0 − (656.90 − 488.40)/20] = 1.00631e-7
    #   warm: θ_1 = 20 − (10/2.77)·2.63 = 10.5054 °C, p_sat,1 = 1269.50 Pa,
    #     p_e = 0.8·1227.31 = 981.85 Pa; dry, the straight line at s = 1.0 m is
    #     1168.48 − 186.63/21 = 1159.59 Pa < 1269.50 Pa: no condensation
    #     wet: g_w = 2.0e-10·[(1168.48 − 1269.50)/1.0 − (1269.50 − 981.85)/20] = −2.3081e-8
    #   Nov–Mar, 151 days: 1.00631e-7·151·86400 = 1.3129 kg/m² (the maximum, end of March)
    #   Apr–Oct, 214 days: −2.3081e-8·214·86400 = −0.4268 kg/m², never reaching zero
    #   end of year (end of October) = 1.3129 − 0.4268 = 0.8861 kg/m²
    wall_b = ([2.5, 0.1], [1.0, 20.0], 0.13, 0.04)
    outside_c = [0.0] * 3 + [10.0] * 7 + [0.0] * 2
    year = _year(wall_b, outside_c, [0.8] * 12)
    assert year.start_month == 11  # docs/format.md start-month rule, wrap-around
    assert year.months.tolist() == [11, 12, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10]
    assert year.rates[0, 1] == pytest.approx(1.00631e-7, rel=5e-5)  # hand calculation
    assert year.rates[5, 1] == pytest.approx(-2.3081e-8, rel=5e-5)  # hand calculation
    assert year.max_accumulated == pytest.approx(1.3129, abs=5e-5)  # hand calculation
    assert year.month_of_max == 3  # March, hand calculation
    assert year.end_of_year_accumulated == pytest.approx(0.8861, abs=5e-5)  # hand calculation
    assert year.dries_out == 0
    assert year.monthly_balance.sum() == pytest.approx(0.8861, abs=5e-5)  # net over the year


def test_year_condensing_every_month__starts_in_january_and_accumulates_all_year():
    # Wall A with outside 0 °C, 80 % all year: g = 1.0063e-6 kg/(m²·s) every month (hand
    # calculation above), so 1.0063e-6·365·86400 = 31.73 kg/m² at the end of December.
    # docs/format.md does not say where such a year starts; calcdoc's convention is January.
    year = _year(WALL_A, [0.0] * 12, [0.8] * 12)
    assert year.condensation_every_month
    assert year.start_month == 1
    assert year.end_of_year_accumulated == pytest.approx(31.73, abs=0.005)  # hand calculation
    assert year.month_of_max == 12
    assert year.dries_out == 0


def test_year_with_vapour_control_layer__no_condensation_zeros_and_dries_out():
    # Common practice: a vapour control layer on the warm side (wall of the one-month test
    # above); a cold invented climate from −5 °C to 15 °C, 90 %. docs/format.md: with no
    # condensation in any month the three results are 0 / 1.
    outside_c = [-5.0, -4.0, 0.0, 5.0, 10.0, 15.0, 15.0, 15.0, 10.0, 5.0, 0.0, -3.0]
    walls = ([0.06, 2.5, 0.1], [100.0, 0.1, 0.1], 0.13, 0.04)
    year = _year(walls, outside_c, [0.9] * 12)
    assert not year.condensation_predicted
    assert year.start_month is None and year.month_of_max is None
    assert year.max_accumulated == 0.0
    assert year.end_of_year_accumulated == 0.0
    assert year.dries_out == 1
    assert not year.accumulated.any() and not year.monthly_balance.any()
    # The diagram is the month in which an interface comes nearest to saturation.
    nearest = [max(m.vapour_pressures[1:-1] / m.saturation_pressures[1:-1])
               for m in (vapour_profile(*walls, 20.0 + C, 0.5, t + C, 0.9) for t in outside_c)]
    assert year.worst_month == int(np.argmax(nearest)) + 1


# --- the start-month rule -----------------------------------------------------------------------

def _months(*condensing):
    return [month in condensing for month in range(1, 13)]


@pytest.mark.parametrize("condensing, expected", [
    (_months(12, 1, 2), 12),       # docs/format.md rule: December follows a dry November
    (_months(11, 12, 1, 2), 11),   # docs/format.md rule: November follows a dry October
    (_months(1, 2, 3), 1),         # docs/format.md rule: January follows a dry December
    (_months(2, 10, 11, 12), 2),   # docs/format.md rule: the first such month in calendar order
    (_months(), None),             # no condensation: no year to step
    (_months(*range(1, 13)), 1),   # every month: calcdoc's convention (docs/format.md is silent)
])
def test_start_month__format_md_rule_cyclic(condensing, expected):
    assert start_month(condensing) == expected


# --- input checks ------------------------------------------------------------------------------

def test_equivalent_air_thickness__mu_times_thickness():
    # Definition s_d = μ·d (ISO 13788:2012 clause 3, from memory; docs/format.md): 50 · 0.012 m.
    assert equivalent_air_thickness(50.0, 0.012) == pytest.approx(0.6, rel=1e-12)


@pytest.mark.parametrize("mu, d, quantity", [
    (0.5, 0.1, "vapour_resistance_factor"),  # common practice: still air is μ = 1, the least
    (10.0, 0.0, "thickness"),
    (10.0, -0.1, "thickness"),
])
def test_equivalent_air_thickness__out_of_range_refused(mu, d, quantity):
    with pytest.raises(PhysicsRangeError) as caught:
        equivalent_air_thickness(mu, d)
    assert caught.value.quantity == quantity


_GOOD_MONTH = dict(layer_resistances=[2.5, 0.1], equivalent_air_thicknesses=[0.1, 2.0],
                   R_si=0.13, R_se=0.04, inside_temperature=293.15,
                   inside_relative_humidity=0.5, outside_temperature=273.15,
                   outside_relative_humidity=0.8)


@pytest.mark.parametrize("name, value", [
    ("layer_resistances", [2.5, 0.0]),
    ("layer_resistances", [2.5, -0.1]),
    ("layer_resistances", []),
    ("equivalent_air_thicknesses", [0.1, 0.0]),
    ("equivalent_air_thicknesses", [0.1]),
    ("R_si", -0.13),
    ("R_se", float("nan")),
    ("inside_temperature", 0.0),
    ("inside_temperature", -5.0),
    ("outside_temperature", 200.0),  # below −40 °C, outside the saturation formulae's range
    ("inside_relative_humidity", 0.0),
    ("outside_relative_humidity", 1.01),
    ("inside_relative_humidity", 50.0),  # a percentage, not a fraction
])
def test_vapour_profile__out_of_range_refused_with_parameter_name(name, value):
    with pytest.raises(PhysicsRangeError) as caught:
        vapour_profile(**{**_GOOD_MONTH, name: value})
    assert caught.value.quantity == name


@pytest.mark.parametrize("wet", [[0], [2], [1.5], [True]])
def test_vapour_profile__wet_interface_must_be_between_layers(wet):
    with pytest.raises(PhysicsRangeError) as caught:
        vapour_profile(**_GOOD_MONTH, wet_interfaces=wet)
    assert caught.value.quantity == "wet_interfaces"


_GOOD_YEAR = dict(layer_resistances=[2.5, 0.1], equivalent_air_thicknesses=[0.1, 2.0],
                  R_si=0.13, R_se=0.04, inside_temperature=[293.15] * 12,
                  inside_relative_humidity=[0.5] * 12, outside_temperature=[273.15] * 12,
                  outside_relative_humidity=[0.8] * 12)


@pytest.mark.parametrize("name, value", [
    ("inside_temperature", [293.15] * 11),
    ("outside_relative_humidity", [0.8] * 13),
    ("outside_temperature", [273.15] * 3 + [0.0] + [273.15] * 8),
    ("inside_relative_humidity", [0.5] * 11 + [1.2]),
    ("equivalent_air_thicknesses", [0.1, -2.0]),
])
def test_year__out_of_range_refused_with_parameter_name(name, value):
    with pytest.raises(PhysicsRangeError) as caught:
        interstitial_condensation(**{**_GOOD_YEAR, name: value})
    assert caught.value.quantity == name


def test_year__bad_month_named_in_message():
    with pytest.raises(PhysicsRangeError) as caught:
        interstitial_condensation(**{**_GOOD_YEAR,
                                     "inside_relative_humidity": [0.5] * 11 + [1.2]})
    assert "December" in str(caught.value)


def test_start_month__not_twelve_months_refused():
    with pytest.raises(PhysicsRangeError) as caught:
        start_month([True] * 11)
    assert caught.value.quantity == "condensation_predicted"


def test_docstring_examples():
    failures, _ = doctest.testmod(glaser, raise_on_error=False, verbose=False)
    assert failures == 0
