"""Plane and cylindrical conduction, surface humidity and the outside coefficient of a pipe.

Every check value names its source beside it. Reference libraries: ht (heat transfer), chemicals
(Lemmon and Jacobsen 2004 air transport properties, IAPWS-92 saturation pressure), scipy.constants.
"""

from __future__ import annotations

import doctest
import math

import ht
import numpy as np
import pytest
from chemicals.air import (
    iapws92_Psat,
    lemmon2000_air_d2A0_dtau2,
    lemmon2000_air_MW,
    lemmon2000_air_R,
    lemmon2000_air_T_reducing,
    lemmon2000_rho,
)
from chemicals.thermal_conductivity import k_air_lemmon
from chemicals.viscosity import mu_air_lemmon
from scipy import constants
from scipy.optimize import brentq

from calcdoc.physics import PhysicsRangeError, air, conduction
from calcdoc.physics.air import AIR_TABLE_RANGE, air_properties
from calcdoc.physics.conduction import (
    combined_method,
    cylinder_film_resistance,
    cylinder_layer_resistance,
    cylindrical_layers,
    dew_point_temperature,
    free_convection_horizontal_cylinder,
    layer_resistance,
    nusselt_horizontal_cylinder_churchill_chu,
    pipe_in_still_air,
    plane_element,
    radiation_coefficient,
    saturation_temperature,
    saturation_vapour_pressure,
    surface_relative_humidity,
    surface_resistances,
    temperature_factor,
)

C = constants.zero_Celsius  # 273.15 K


# --- ISO 6946:2017 surface resistances and plane layers ----------------------------------------

@pytest.mark.parametrize("heat_flow, R_si", [
    ("upward", 0.10),      # ISO 6946:2017 Table 7
    ("horizontal", 0.13),  # ISO 6946:2017 Table 7
    ("downward", 0.17),    # ISO 6946:2017 Table 7
])
def test_surface_resistances__iso6946_table7(heat_flow, R_si):
    inside, outside = surface_resistances(heat_flow)
    assert inside == pytest.approx(R_si, abs=0.005)
    assert outside == pytest.approx(0.04, abs=0.005)  # ISO 6946:2017 Table 7, R_se all directions


def test_surface_resistances__default_is_horizontal():
    assert surface_resistances() == surface_resistances("horizontal")


def test_surface_resistances__unknown_direction_refused():
    with pytest.raises(PhysicsRangeError) as caught:
        surface_resistances("sideways")
    assert caught.value.quantity == "heat_flow"


def test_plane_wall_u_value__hand_calculation_masonry_cavity_wall():
    # Hand calculation (invented wall), conventional R_si, R_se of ISO 6946:2017 Table 7:
    #   R_si                              0.13
    #   plaster      0.013 m / 0.40      = 0.0325
    #   blockwork    0.100 m / 0.20      = 0.5000
    #   mineral wool 0.100 m / 0.035     = 2.8571
    #   brick        0.1025 m / 0.77     = 0.1331
    #   R_se                              0.04
    #   R_T = 3.6928 m2K/W, U = 1/R_T = 0.2708 W/(m2K)
    #   theta_i = 20 degC, theta_e = -5 degC: q = 25/3.6928 = 6.770 W/m2
    #   theta_si = 20 - 6.770*0.13 = 19.12 degC; theta_se = -5 + 6.770*0.04 = -4.73 degC
    layers = [layer_resistance(d, lam) for d, lam in
              [(0.013, 0.40), (0.100, 0.20), (0.100, 0.035), (0.1025, 0.77)]]
    wall = plane_element(layers, 20.0 + C, -5.0 + C, 0.13, 0.04)
    assert wall.R_total == pytest.approx(3.6928, abs=0.00005)  # hand calculation above
    assert wall.U == pytest.approx(0.2708, abs=0.00005)        # hand calculation above
    assert wall.q == pytest.approx(6.770, abs=0.0005)          # hand calculation above
    assert len(wall.interface_temperatures) == 5
    assert wall.interface_temperatures[0] - C == pytest.approx(19.12, abs=0.005)   # hand calc
    assert wall.interface_temperatures[-1] - C == pytest.approx(-4.73, abs=0.005)  # hand calc


def test_plane_wall_temperatures__fall_by_q_times_each_resistance():
    # Fourier's law for layers in series: the drop across each layer is q R_j (physics).
    R = [0.1, 2.0, 0.5]
    wall = plane_element(R, 295.0, 270.0, 0.13, 0.04)
    assert np.diff(wall.interface_temperatures) == pytest.approx(-wall.q * np.array(R))


def test_plane_wall__refuses_non_positive_layer_resistance():
    with pytest.raises(PhysicsRangeError):
        plane_element([0.5, 0.0], 293.15, 273.15, 0.13, 0.04)


# --- ISO 6946:2017 6.7.2 combined method ------------------------------------------------------

def test_combined_method__hand_calculation_timber_frame_wall():
    # No published worked example is recalled reliably enough to assert; hand calculation to
    # ISO 6946:2017 6.7.2 for an invented timber-frame wall, R_si 0.13, R_se 0.04 (Table 7):
    #   plasterboard 0.0125/0.21 = 0.05952; OSB 0.011/0.13 = 0.08462
    #   140 mm layer: mineral wool 0.14/0.038 = 3.68421 (f = 0.85),
    #                 timber 0.14/0.13 = 1.07692 (f = 0.15)
    #   upper: R_Ta = 3.99835, R_Tb = 1.39106; 1/R'_T = 0.85/3.99835 + 0.15/1.39106 = 0.320419
    #          R'_T = 3.1209
    #   lower: 1/R_j = 0.85/3.68421 + 0.15/1.07692 = 0.370000, R_j = 2.70270
    #          R''_T = 0.13 + 0.05952 + 2.70270 + 0.08462 + 0.04 = 3.0168
    #   R_T = (3.1209 + 3.0168)/2 = 3.0689, U = 0.3259, e = 0.1041/(2*3.0689) = 0.0170
    plasterboard = 0.0125 / 0.21
    bridged = [0.14 / 0.038, 0.14 / 0.13]
    osb = 0.011 / 0.13
    result = combined_method([plasterboard, bridged, osb], [0.85, 0.15], 0.13, 0.04)
    assert result.R_upper == pytest.approx(3.1209, abs=0.00005)       # hand calculation above
    assert result.R_lower == pytest.approx(3.0168, abs=0.00005)       # hand calculation above
    assert result.R_total == pytest.approx(3.0689, abs=0.00005)       # hand calculation above
    assert 1.0 / result.R_total == pytest.approx(0.3259, abs=0.00005)  # hand calculation above
    assert result.relative_error == pytest.approx(0.0170, abs=0.00005)  # hand calculation above


def test_combined_method__lower_limit_never_exceeds_upper():
    # ISO 6946:2017 6.7.2: R''_T <= R'_T (the isothermal-planes bound is the lower one).
    rng = np.random.default_rng(6946)
    for _ in range(200):
        layers, sections = rng.integers(1, 5), rng.integers(1, 4)
        fractions = rng.dirichlet(np.ones(sections))
        R = rng.uniform(0.02, 3.0, size=(layers, sections))
        R[rng.random(layers) < 0.5] = rng.uniform(0.02, 3.0)  # some homogeneous layers
        try:
            result = combined_method(list(R), fractions, 0.13, 0.04)
        except PhysicsRangeError:
            continue  # ratio above 1.5, refused (tested below)
        assert result.R_lower <= result.R_upper * (1 + 1e-12)
        assert result.R_lower * (1 - 1e-12) <= result.R_total <= result.R_upper * (1 + 1e-12)


def test_combined_method__limits_equal_without_bridging():
    # ISO 6946:2017 6.7.2: with homogeneous layers both limits are the series sum of 6.7.1.
    layers = [0.06, 2.5, 0.13]
    result = combined_method(layers, [0.3, 0.7], 0.13, 0.04)
    series = plane_element(layers, 293.15, 273.15, 0.13, 0.04).R_total
    assert result.R_upper == pytest.approx(series, rel=1e-12)
    assert result.R_lower == pytest.approx(series, rel=1e-12)
    assert result.relative_error == pytest.approx(0.0, abs=1e-12)


def test_combined_method__layer_resistances_give_total_with_given_surface_resistances():
    # Convention documented in combined_method: R_si + sum(R_j) + R_se = R_T.
    result = combined_method([0.06, [3.68, 1.08], 0.085], [0.85, 0.15], 0.13, 0.04)
    wall = plane_element(result.layer_resistances, 293.15, 263.15, 0.13, 0.04)
    assert wall.R_total == pytest.approx(result.R_total, rel=1e-12)
    assert wall.interface_temperatures[0] == pytest.approx(293.15 - 30.0 * 0.13 / result.R_total)


def test_combined_method__steel_bridged_insulation_refused():
    # ISO 6946:2017 6.7.2.1 (from memory): not applicable when R'_T/R''_T > 1.5; a steel stud
    # (lambda 50) at 2 % through 100 mm of insulation (lambda 0.035) is far beyond that.
    with pytest.raises(PhysicsRangeError) as caught:
        combined_method([0.05, [0.1 / 0.035, 0.1 / 50.0]], [0.98, 0.02], 0.13, 0.04)
    # The error names the function's own parameter and the bridged layer (index 1), which the
    # kind maps to that layer's bridge in the sheet.
    assert (caught.value.quantity, caught.value.index) == ("layer_resistances", 1)
    assert caught.value.value > 1.5


def test_combined_method__fractions_must_sum_to_one():
    with pytest.raises(PhysicsRangeError):
        combined_method([[2.0, 1.0]], [0.8, 0.1], 0.13, 0.04)


# --- ISO 13788:2012 saturation pressure, dew point, surface humidity ---------------------------

@pytest.mark.parametrize("theta", [0.0, 5.0, 10.0, 20.0, 30.0, 40.0, 60.0, 80.0])
def test_saturation_pressure_over_water__iapws92_within_0p2_percent(theta):
    # Reference: IAPWS (1992) saturation pressure of water, as implemented in chemicals.
    assert saturation_vapour_pressure(theta + C) == pytest.approx(
        iapws92_Psat(theta + C), rel=0.002)


def test_saturation_pressure__2337_pa_at_20_degc():
    # 2337 Pa at 20 degC: the ISO 13788 formula's value as printed in building-physics tables
    # (from memory); IAPWS gives 2339 Pa (checked above within 0.2 %).
    assert saturation_vapour_pressure(20.0 + C) == pytest.approx(2337.0, abs=0.5)


@pytest.mark.parametrize("theta, p_ice, rel", [
    (-10.0, 259.9, 0.005),  # IAPWS (2011) sublimation pressure tables, 259.9 Pa (from memory)
    (-20.0, 103.2, 0.01),   # IAPWS (2011) sublimation pressure tables, 103.2 Pa (from memory)
    (-30.0, 38.0, 0.012),   # IAPWS (2011) sublimation pressure tables, 38.0 Pa (from memory)
    (-40.0, 12.84, 0.02),   # IAPWS (2011) sublimation pressure tables, 12.84 Pa (from memory)
])
def test_saturation_pressure_over_ice__iapws_sublimation_tables(theta, p_ice, rel):
    assert saturation_vapour_pressure(theta + C) == pytest.approx(p_ice, rel=rel)


def test_saturation_pressure__continuous_at_0_degc_at_610p5_pa():
    # ISO 13788:2012 Annex E: both formulae give 610.5 Pa at 0 degC.
    just_below = saturation_vapour_pressure(C - 1e-9)
    at_zero = saturation_vapour_pressure(C)
    assert at_zero == pytest.approx(610.5, abs=0.05)
    assert just_below == pytest.approx(at_zero, rel=1e-8)


def test_saturation_pressure__outside_minus_40_to_80_degc_refused():
    with pytest.raises(PhysicsRangeError):
        saturation_vapour_pressure(C - 41.0)
    with pytest.raises(PhysicsRangeError):
        saturation_vapour_pressure(C + 81.0)


def test_dew_point__20_degc_50_percent_is_9p3_degc():
    # Psychrometric tables: 20 degC, 50 % RH has a dew point of 9.3 degC (common practice).
    assert dew_point_temperature(20.0 + C, 0.5) - C == pytest.approx(9.3, abs=0.05)


def test_dew_point__inverts_saturation_pressure_over_water_and_ice():
    # saturation_temperature is the inverse of the ISO 13788 formulae on both branches.
    T = np.array([-39.0, -15.0, -0.5, 0.0, 0.5, 12.0, 45.0, 79.0]) + C
    assert saturation_temperature(saturation_vapour_pressure(T)) == pytest.approx(T, abs=1e-9)


def test_dew_point__relative_humidity_given_as_percentage_refused():
    with pytest.raises(PhysicsRangeError):
        dew_point_temperature(293.15, 50.0)


def test_surface_relative_humidity__saturated_at_the_dew_point():
    # By definition the air is saturated at a surface at its dew point (physics).
    T_d = dew_point_temperature(21.0 + C, 0.6)
    assert surface_relative_humidity(21.0 + C, 0.6, T_d) == pytest.approx(1.0, rel=1e-9)
    assert surface_relative_humidity(21.0 + C, 0.6, 21.0 + C) == pytest.approx(0.6, rel=1e-12)


def test_temperature_factor__equals_one_minus_u_times_rsi():
    # ISO 13788:2012: for a plane element f_Rsi = 1 - U R_si (from memory); here with the
    # condensation resistance 0.25 m2K/W of ISO 13788 for opaque elements.
    wall = plane_element([0.5, 2.5], 20.0 + C, -5.0 + C, 0.25, 0.04)
    f = temperature_factor(wall.interface_temperatures[0], 20.0 + C, -5.0 + C)
    assert f == pytest.approx(1.0 - wall.U * 0.25, rel=1e-12)
    # Hand calculation: R_T = 3.29, f = 1 - 0.25/3.29 = 0.924
    assert f == pytest.approx(0.924, abs=0.0005)


def test_temperature_factor__undefined_for_equal_temperatures():
    with pytest.raises(PhysicsRangeError):
        temperature_factor(293.15, 293.15, 293.15)


# --- cylindrical layers -----------------------------------------------------------------------

@pytest.mark.parametrize("D1, D2, k", [(0.9, 1.0, 20.0), (0.05, 0.15, 0.04), (0.1, 0.2, 0.035)])
def test_cylinder_layer_resistance__matches_ht_r_cylinder(D1, D2, k):
    # Reference: ht.conduction.R_cylinder(Di, Do, k, L) for L = 1 m.
    assert cylinder_layer_resistance(D1, D2, k) == pytest.approx(
        ht.conduction.R_cylinder(D1, D2, k, 1.0), rel=1e-12)


def test_cylinder_layer_resistance__ht_docs_example():
    # ht.conduction.R_cylinder docs: R_cylinder(0.9, 1., 20, 10) = 8.384e-05 K/W over 10 m.
    assert cylinder_layer_resistance(0.9, 1.0, 20.0) / 10.0 == pytest.approx(8.384e-5, rel=1e-4)


def test_cylindrical_layers__matches_ht_cylindrical_heat_transfer_docs_example():
    # ht.conduction.cylindrical_heat_transfer docs example: steel pipe with insulation,
    # Q = 73.12 W/m, outer surface 306.58 K.
    args = dict(Ti=453.15, To=301.15, hi=1e12, ho=22.697193, Di=0.0779272,
                ts=[0.0054864, 0.05], ks=[56.045, 0.0598535265])
    reference = ht.conduction.cylindrical_heat_transfer(**args)
    result = cylindrical_layers(args["Di"], args["ts"], args["ks"], args["Ti"], args["To"],
                                args["ho"])
    assert result.q_per_length == pytest.approx(73.12, abs=0.005)  # ht docs, printed value
    assert result.q_per_length == pytest.approx(reference["Q"], rel=1e-9)
    assert result.interface_temperatures == pytest.approx(reference["Ts"], rel=1e-9)
    assert result.theta_surface == pytest.approx(306.58, abs=0.005)  # ht docs, printed value


def test_cylindrical_layers__inside_film_matches_ht():
    # ht.conduction.cylindrical_heat_transfer with a finite inside coefficient (heat flow only:
    # ht's temperature list starts at the fluid temperature, without the inside film drop).
    reference = ht.conduction.cylindrical_heat_transfer(
        Ti=353.15, To=283.15, hi=800.0, ho=9.0, Di=0.05, ts=[0.003, 0.04, 0.001],
        ks=[45.0, 0.037, 200.0])
    result = cylindrical_layers(0.05, [0.003, 0.04, 0.001], [45.0, 0.037, 200.0],
                                353.15, 283.15, 9.0, inside_coefficient=800.0)
    assert result.q_per_length == pytest.approx(reference["Q"], rel=1e-9)
    assert result.outer_diameter == pytest.approx(0.05 + 2 * 0.044)


def test_cylindrical_layers__hand_calculation_single_layer():
    # Hand calculation: D 0.1 -> 0.2 m, k = 0.04, h_o = 10:
    #   R' = ln(2)/(2 pi 0.04) + 1/(10 pi 0.2) = 2.7579 + 0.1592 = 2.9171 m K/W
    #   q' = (150 - 20)/2.9171 = 44.56 W/m
    result = cylindrical_layers(0.1, [0.05], [0.04], 150.0 + C, 20.0 + C, 10.0)
    assert result.R_per_length == pytest.approx(2.9171, abs=0.00005)  # hand calculation
    assert result.q_per_length == pytest.approx(44.56, abs=0.01)       # hand calculation
    assert cylinder_film_resistance(0.2, 10.0) == pytest.approx(0.1592, abs=0.00005)


def test_cylinder_layer_resistance__outer_not_larger_refused():
    with pytest.raises(PhysicsRangeError):
        cylinder_layer_resistance(0.2, 0.2, 0.04)


# --- Churchill-Chu natural convection, horizontal cylinder --------------------------------------

@pytest.mark.parametrize("Ra", [1e-3, 1.0, 1e4, 1e7, 1e9, 1e12])
@pytest.mark.parametrize("Pr", [0.7, 7.0, 100.0])
def test_churchill_chu__matches_ht_nu_horizontal_cylinder(Ra, Pr):
    # Reference: ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(Pr, Gr), Ra = Gr Pr.
    reference = ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(Pr, Ra / Pr)
    assert nusselt_horizontal_cylinder_churchill_chu(Ra, Pr) == pytest.approx(reference, rel=1e-12)


def test_churchill_chu__bergman_6th_example_9_2():
    # Bergman et al., Fundamentals of Heat and Mass Transfer, 6th ed., Example 9.2, as quoted in
    # the ht documentation of Nu_horizontal_cylinder_Churchill_Chu: Pr = 0.69, Gr = 2.63e9,
    # Nu_D = 139.
    assert nusselt_horizontal_cylinder_churchill_chu(0.69 * 2.63e9, 0.69) == pytest.approx(
        139.0, abs=0.5)


def test_churchill_chu__above_ra_1e12_refused():
    # Churchill and Chu (1975) / Bergman et al.: valid for Ra_D <= 1e12.
    with pytest.raises(PhysicsRangeError) as caught:
        nusselt_horizontal_cylinder_churchill_chu(1.01e12, 0.7)
    assert caught.value.quantity == "rayleigh"
    with pytest.raises(PhysicsRangeError):
        nusselt_horizontal_cylinder_churchill_chu(-1.0, 0.7)


def test_free_convection__large_duct_above_ra_1e12_refused():
    # D = 10 m, 400 K in 300 K air: Ra_D ~ 4e12 > 1e12.
    with pytest.raises(PhysicsRangeError) as caught:
        free_convection_horizontal_cylinder(10.0, 400.0, 300.0)
    assert caught.value.quantity == "diameter"  # its own parameter (Ra_D grows with D^3)


def test_pipe_in_still_air__above_ra_1e12_refused_at_the_emissivity():
    # Churchill and Chu (1975): Ra_D <= 1e12; a 10 m duct at 150 degC in 20 degC air exceeds it.
    # The function names its own parameter that asked for the still-air coefficient.
    with pytest.raises(PhysicsRangeError) as caught:
        pipe_in_still_air(10.0, [0.05], [0.04], 423.15, 293.15, 0.9)
    assert caught.value.quantity == "emissivity"
    assert "give the outside coefficient instead" in caught.value.expected


@pytest.mark.parametrize("T_i, T_a, quantity", [
    (293.15, 150.0, "ambient_temperature"),   # below the 200 K row of the air table
    (1500.0, 293.15, "inside_temperature"),   # film (T_i + T_a)/2 = 897 K, above 800 K
])
def test_pipe_in_still_air__air_table_range_names_its_own_parameter(T_i, T_a, quantity):
    with pytest.raises(PhysicsRangeError) as caught:
        pipe_in_still_air(0.1, [0.05], [0.04], T_i, T_a, 0.9)
    assert caught.value.quantity == quantity


def test_cylindrical_layers__bad_layer_named_with_its_index():
    with pytest.raises(PhysicsRangeError) as caught:
        cylindrical_layers(0.1, [0.003, 0.0], [50.0, 0.04], 350.0, 290.0, 10.0)
    assert (caught.value.quantity, caught.value.index) == ("thicknesses", 1)
    with pytest.raises(PhysicsRangeError) as caught:
        cylindrical_layers(0.1, [0.003, 0.05], [50.0, -0.04], 350.0, 290.0, 10.0)
    assert (caught.value.quantity, caught.value.index) == ("conductivities", 1)


def test_dew_point__air_too_dry_for_the_formula_range_refused_at_the_humidity():
    # ISO 13788 Annex E formulae held to -40..+80 degC here: at -30 degC and 5 %, the vapour
    # pressure (about 1.9 Pa) is below the saturation pressure at -40 degC (about 12.6 Pa),
    # both by the Annex E formula over ice (hand calculation).
    with pytest.raises(PhysicsRangeError) as caught:
        dew_point_temperature(-30.0 + C, 0.05)
    assert caught.value.quantity == "relative_humidity"
    with pytest.raises(PhysicsRangeError) as caught:
        dew_point_temperature(90.0 + C, 0.5)
    assert caught.value.quantity == "air_temperature"
    with pytest.raises(PhysicsRangeError) as caught:
        surface_relative_humidity(20.0 + C, 0.5, -45.0 + C)
    assert caught.value.quantity == "surface_temperature"


@pytest.mark.parametrize("T", [200.0, 213.7, 300.0, 367.0, 555.5, 800.0])
def test_air_table_interval__interpolation_reproduces_air_properties(T):
    # The rows returned, interpolated linearly, give air_properties' values (the kind writes
    # this interpolation out as steps).
    lower, upper = air.air_table_interval(T)
    assert lower.temperature <= T <= upper.temperature
    share = (T - lower.temperature) / (upper.temperature - lower.temperature)
    props = air_properties(T)
    for name in ("conductivity", "kinematic_viscosity", "thermal_diffusivity", "prandtl"):
        low, high = getattr(lower, name), getattr(upper, name)
        assert low + (high - low) * share == pytest.approx(getattr(props, name), rel=1e-12)


def _lemmon_air(T: float, pressure: float = 1e5) -> dict:
    """Air properties from Lemmon and Jacobsen (2004) and Lemmon et al. (2000), via chemicals."""
    M = lemmon2000_air_MW / 1000.0  # kg/mol
    rho_molar = lemmon2000_rho(T, pressure)
    mu = mu_air_lemmon(T, rho_molar)
    k = k_air_lemmon(T, rho_molar)
    tau = lemmon2000_air_T_reducing / T
    # Ideal-gas heat capacity; the residual part is under 0.1 % at 1 bar.
    cp = (lemmon2000_air_R - lemmon2000_air_R * tau ** 2 * lemmon2000_air_d2A0_dtau2(tau, 0.0)) / M
    rho = rho_molar * M
    return {"k": k, "nu": mu / rho, "alpha": k / (rho * cp), "Pr": mu * cp / k}


@pytest.mark.parametrize("T", [float(t) for t in air._T])
def test_air_table__agrees_with_lemmon_jacobsen(T):
    # Reference: Lemmon and Jacobsen (2004) transport properties, Lemmon et al. (2000) density,
    # at 100 kPa (the table's densities correspond to 100 kPa). The tolerances are the
    # agreement stated in calcdoc.physics.air, rounded up.
    table = air_properties(T)
    reference = _lemmon_air(T)
    assert table.conductivity == pytest.approx(reference["k"], rel=0.025)
    assert table.kinematic_viscosity == pytest.approx(reference["nu"], rel=0.015)
    assert table.thermal_diffusivity == pytest.approx(reference["alpha"], rel=0.03)
    assert table.prandtl == pytest.approx(reference["Pr"], rel=0.03)
    assert table.expansion_coefficient == pytest.approx(1.0 / T, rel=1e-12)  # ideal gas


def test_air_table__film_temperature_outside_table_refused():
    with pytest.raises(PhysicsRangeError):
        air_properties(AIR_TABLE_RANGE[0] - 1.0)
    with pytest.raises(PhysicsRangeError):
        air_properties(AIR_TABLE_RANGE[1] + 1.0)


@pytest.mark.parametrize("D, T_s, T_inf", [(0.1, 438.15, 296.15), (0.3, 318.15, 288.15),
                                           (0.05, 268.15, 293.15)])
def test_free_convection__agrees_with_ht_and_lemmon_properties(D, T_s, T_inf):
    # Reference: ht's Churchill-Chu Nu with air properties from Lemmon and Jacobsen (2004) at
    # 1 atm and g = 9.80665 m/s2 (scipy.constants); within 2 % for the table's differences.
    T_f = 0.5 * (T_s + T_inf)
    props = _lemmon_air(T_f, pressure=constants.atm)
    Gr = constants.g * (1.0 / T_f) * abs(T_s - T_inf) * D ** 3 / props["nu"] ** 2
    Nu = ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(props["Pr"], Gr)
    h_reference = Nu * props["k"] / D
    assert free_convection_horizontal_cylinder(D, T_s, T_inf).h == pytest.approx(
        h_reference, rel=0.02)


# --- radiation coefficient --------------------------------------------------------------------

@pytest.mark.parametrize("theta, h_r0", [(-10.0, 4.1), (0.0, 4.6), (10.0, 5.1), (20.0, 5.7),
                                         (30.0, 6.3)])
def test_radiation_coefficient__iso6946_annex_c_black_body_values(theta, h_r0):
    # ISO 6946:2017 Annex C, table of h_r0 = 4 sigma T_m^3 by mean temperature (from memory).
    assert radiation_coefficient(1.0, theta + C, theta + C) == pytest.approx(h_r0, abs=0.05)


def test_radiation_coefficient__reproduces_stefan_boltzmann_exchange():
    # h_r (T_s - T_sur) = eps sigma (T_s^4 - T_sur^4), sigma from scipy.constants (CODATA).
    eps, T_s, T_sur = 0.85, 438.15, 296.15
    exchange = eps * constants.Stefan_Boltzmann * (T_s ** 4 - T_sur ** 4)
    assert radiation_coefficient(eps, T_s, T_sur) * (T_s - T_sur) == pytest.approx(exchange,
                                                                                   rel=1e-12)


def test_radiation_coefficient__emissivity_above_one_refused():
    with pytest.raises(PhysicsRangeError):
        radiation_coefficient(1.2, 300.0, 290.0)


# --- insulated pipe in still air --------------------------------------------------------------

def _reference_pipe(D0, ts, ks, T_i, T_a, eps):
    """Independent solve: ht layers and Churchill-Chu, Lemmon air properties at 1 atm."""
    D = D0 + 2 * sum(ts)
    R_in = sum(ht.conduction.R_cylinder(d1, d1 + 2 * t, k, 1.0) for d1, t, k in
               zip(np.concatenate(([D0], D0 + 2 * np.cumsum(ts)[:-1])), ts, ks))

    def h_out(T_s):
        T_f = 0.5 * (T_s + T_a)
        props = _lemmon_air(T_f, pressure=constants.atm)
        Gr = constants.g / T_f * abs(T_s - T_a) * D ** 3 / props["nu"] ** 2
        h_c = ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(props["Pr"], Gr) \
            * props["k"] / D
        h_r = eps * constants.Stefan_Boltzmann * (T_s ** 4 - T_a ** 4) / (T_s - T_a)
        return h_c + h_r

    T_s = brentq(lambda T: (T_i - T) / R_in - math.pi * D * h_out(T) * (T - T_a),
                 min(T_i, T_a) + 1e-6, max(T_i, T_a) - 1e-6)
    return T_s, (T_i - T_s) / R_in


@pytest.mark.parametrize("D0, ts, ks, T_i, T_a, eps", [
    (0.1143, [0.0060, 0.05], [50.0, 0.04], 180.0 + C, 15.0 + C, 0.3),   # steam main, invented
    (0.0603, [0.0039, 0.03], [50.0, 0.035], 6.0 + C, 25.0 + C, 0.9),    # chilled water, invented
    (0.2191, [0.0082], [50.0], 90.0 + C, 10.0 + C, 0.8),                # bare hot-water pipe
])
def test_pipe_in_still_air__agrees_with_independent_solve_from_ht(D0, ts, ks, T_i, T_a, eps):
    # Reference: the same heat balance solved with ht (R_cylinder, Churchill-Chu) and Lemmon
    # air properties; q within 1 % and the surface within 0.2 K (the air table's differences).
    result = pipe_in_still_air(D0, ts, ks, T_i, T_a, eps)
    T_s_ref, q_ref = _reference_pipe(D0, ts, ks, T_i, T_a, eps)
    assert result.flow.q_per_length == pytest.approx(q_ref, rel=0.01)
    assert result.flow.theta_surface == pytest.approx(T_s_ref, abs=0.2)


def test_pipe_in_still_air__surface_balance_closes_with_ht_cylindrical_heat_transfer():
    # ht.conduction.cylindrical_heat_transfer with the solved outside coefficient gives back the
    # same heat flow and surface temperature (the iteration converged on the balance).
    result = pipe_in_still_air(0.1143, [0.006, 0.05], [50.0, 0.04], 453.15, 288.15, 0.3)
    reference = ht.conduction.cylindrical_heat_transfer(
        Ti=453.15, To=288.15, hi=1e15, ho=result.flow.h_outside, Di=0.1143, ts=[0.006, 0.05],
        ks=[50.0, 0.04])
    assert result.flow.q_per_length == pytest.approx(reference["Q"], rel=1e-9)
    assert result.flow.theta_surface == pytest.approx(reference["Ts"][-1], abs=1e-6)
    assert result.convection.h + result.h_radiation == pytest.approx(result.flow.h_outside)
    fresh = free_convection_horizontal_cylinder(result.flow.outer_diameter,
                                                result.flow.theta_surface, 288.15)
    assert fresh.h == pytest.approx(result.convection.h, rel=1e-6)


def test_pipe_in_still_air__cold_pipe_gains_heat():
    result = pipe_in_still_air(0.0603, [0.0039, 0.03], [50.0, 0.035], 279.15, 298.15, 0.9)
    assert result.flow.q_per_length < 0.0
    assert 279.15 < result.flow.theta_surface < 298.15


def test_pipe_in_still_air__no_temperature_difference_no_heat_flow():
    result = pipe_in_still_air(0.1, [0.05], [0.04], 293.15, 293.15, 0.9)
    assert result.flow.q_per_length == 0.0
    assert result.flow.theta_surface == 293.15


# --- docstrings ---------------------------------------------------------------------------------

@pytest.mark.parametrize("module", [conduction, air])
def test_docstring_examples__run_as_written(module):
    failures, _ = doctest.testmod(module, raise_on_error=False, verbose=False)
    assert failures == 0
