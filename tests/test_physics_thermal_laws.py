"""EN 1992-1-2 §3.3 concrete and EN 1993-1-2 §3.2–3.4 carbon-steel thermal laws.

Check values are the standards' printed constants, or hand evaluations of their equations written
out beside the assertion; tolerances match the precision the value is written to.
"""

import numpy as np
import pytest

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.thermal_laws import (
    LAWS, carbon_steel_law, concrete_conductivity, concrete_conductivity_lower,
    concrete_conductivity_upper, concrete_density, concrete_law, concrete_specific_heat,
    concrete_specific_heat_dry, concrete_specific_heat_peak, constant_law, make_law,
    steel_conductivity, steel_density, steel_specific_heat)

C = 273.15  # K at 0 °C


def K(celsius):
    return np.asarray(celsius, dtype=float) + C


# ------------------------------------------------------------------- concrete conductivity


def test_concrete_conductivity_upper__en1992_1_2_eq_3_7_at_20_and_1200_degc():
    # EN 1992-1-2:2004 eq. (3.7): 2 - 0.2451(θ/100) + 0.0107(θ/100)²; the leading 2 W/(m·K) is
    # the value at θ = 0, outside the law's range. By hand:
    # 20 °C: 2 - 0.04902 + 0.000428 = 1.951; 1200 °C: 2 - 2.9412 + 1.5408 = 0.600
    assert concrete_conductivity_upper(K(20)) == pytest.approx(1.951, abs=0.0005)
    assert concrete_conductivity_upper(K(1200)) == pytest.approx(0.600, abs=0.0005)


def test_concrete_conductivity_lower__en1992_1_2_eq_3_8_at_20_and_1200_degc():
    # EN 1992-1-2:2004 eq. (3.8): 1.36 - 0.136(θ/100) + 0.0057(θ/100)². By hand:
    # 20 °C: 1.36 - 0.0272 + 0.000228 = 1.333; 1200 °C: 1.36 - 1.632 + 0.8208 = 0.549
    assert concrete_conductivity_lower(K(20)) == pytest.approx(1.333, abs=0.0005)
    assert concrete_conductivity_lower(K(1200)) == pytest.approx(0.549, abs=0.0005)


def test_concrete_conductivity__lower_limit_is_default_and_below_upper():
    # docs/format.md: lower limit by default (EN 1992-1-2 §3.3.3(2) Note: Annex A compatible with it);
    # the lower limit lies below the upper one over 20-1200 °C: by hand, upper - lower =
    # 0.64 - 0.1091 r + 0.005 r² (r = θ/100) has its least value 0.045 at r = 10.9.
    theta = K(np.linspace(20, 1200, 60))
    assert np.array_equal(concrete_conductivity(theta), concrete_conductivity_lower(theta))
    assert np.all(concrete_conductivity_lower(theta) < concrete_conductivity_upper(theta))


# ------------------------------------------------------------------- concrete specific heat


def test_concrete_specific_heat_dry__en1992_1_2_3_3_2_1_values():
    # EN 1992-1-2:2004 §3.3.2(1): 900 to 100 °C; 900 + (θ - 100) to 200 °C; 1000 + (θ - 200)/2
    # to 400 °C; 1100 above. By hand: 150 °C -> 950, 300 °C -> 1050, 800 °C -> 1100 J/(kg·K).
    values = concrete_specific_heat_dry(K([20, 100, 150, 200, 300, 400, 800]))
    assert values == pytest.approx([900, 900, 950, 1000, 1050, 1100, 1100], abs=0.5)


def test_concrete_specific_heat_peak__en1992_1_2_3_3_2_2_at_0_15_and_3_percent():
    # EN 1992-1-2:2004 §3.3.2(2): c_p,peak = 900, 1470, 2020 J/(kg·K) at u = 0, 1.5, 3 %;
    # linear interpolation allowed: 0.75 % -> (900 + 1470)/2 = 1185, 2.25 % -> 1745.
    assert concrete_specific_heat_peak(0.0) == pytest.approx(900, abs=0.5)
    assert concrete_specific_heat_peak(0.015) == pytest.approx(1470, abs=0.5)
    assert concrete_specific_heat_peak(0.03) == pytest.approx(2020, abs=0.5)
    assert concrete_specific_heat_peak(0.0075) == pytest.approx(1185, abs=0.5)
    assert concrete_specific_heat_peak(0.0225) == pytest.approx(1745, abs=0.5)


def test_concrete_specific_heat__peak_plateau_100_to_115_then_linear_to_200_degc():
    # EN 1992-1-2:2004 §3.3.2(2) and Figure 3.6: constant c_p,peak between 100 and 115 °C, linear
    # decrease between 115 and 200 °C (to the dry value 1000 at 200 °C); 20 °C value 900.
    # By hand at 1.5 %: 157.5 °C (midway) -> (1470 + 1000)/2 = 1235 J/(kg·K).
    u = 0.015
    assert concrete_specific_heat(K(20), u) == pytest.approx(900, abs=0.5)
    assert concrete_specific_heat(K(100), u) == pytest.approx(900, abs=0.5)
    assert concrete_specific_heat(K(100.5), u) == pytest.approx(1470, abs=0.5)
    assert concrete_specific_heat(K(115), u) == pytest.approx(1470, abs=0.5)
    assert concrete_specific_heat(K(157.5), u) == pytest.approx(1235, abs=0.5)
    assert concrete_specific_heat(K(200), u) == pytest.approx(1000, abs=0.5)
    assert concrete_specific_heat(K(110), 0.03) == pytest.approx(2020, abs=0.5)
    assert concrete_specific_heat(K(600), u) == pytest.approx(1100, abs=0.5)


def test_concrete_moisture_above_3_percent__refused_for_spalling_en1992_1_2_4_5_1():
    # EN 1992-1-2:2004 §3.3.2(2) gives the peak up to 3 %; above k = 3 % (recommended value,
    # §4.5.1(2)) explosive spalling must be assessed, so the law refuses the input.
    with pytest.raises(PhysicsRangeError) as raised:
        concrete_specific_heat(K(110), 0.035)
    assert raised.value.quantity == "moisture_content"  # the function's own parameter name
    assert raised.value.value == pytest.approx(0.035)
    assert "4.5.1" in raised.value.expected and "spalling" in str(raised.value)
    with pytest.raises(PhysicsRangeError):
        concrete_law(moisture_content=0.031)
    with pytest.raises(PhysicsRangeError):
        concrete_specific_heat_peak(-0.001)


# ------------------------------------------------------------------------- concrete density


def test_concrete_density__en1992_1_2_3_3_2_3_factors():
    # EN 1992-1-2:2004 §3.3.2(3): ρ(20 °C) to 115 °C, then factors 0.98 at 200 °C, 0.95 at 400 °C
    # and 0.95 - 0.07 = 0.88 at 1200 °C. With 2300 kg/m³ by hand: 2254, 2185, 2024 kg/m³.
    values = concrete_density(K([20, 115, 200, 400, 1200]))
    assert values == pytest.approx([2300, 2300, 2254, 2185, 2024], abs=0.5)
    assert concrete_density(K(400), 2400.0) == pytest.approx(0.95 * 2400, abs=0.5)


def test_concrete_density_outside_normal_weight__refused():
    # §3.3 laws are for normal-weight concrete: 2000-2600 kg/m³ (EN 206, from memory).
    with pytest.raises(PhysicsRangeError) as raised:
        concrete_density(K(20), 1600.0)
    assert raised.value.quantity == "density_20"  # the function's own parameter name


# ----------------------------------------------------------------------------- carbon steel


def test_steel_conductivity__en1993_1_2_3_4_1_3():
    # EN 1993-1-2:2005 §3.4.1.3: 54 - 3.33e-2 θ below 800 °C, 27.3 W/(m·K) from 800 to 1200 °C.
    # By hand: 20 °C -> 53.334 (53.3); 500 °C -> 37.35.
    assert steel_conductivity(K(20)) == pytest.approx(53.3, abs=0.05)
    assert steel_conductivity(K(500)) == pytest.approx(37.35, abs=0.005)
    assert steel_conductivity(K([800, 1000, 1200])) == pytest.approx([27.3] * 3, abs=0.05)


def test_steel_specific_heat__en1993_1_2_3_4_1_2_values_and_5000_peak_at_735_degc():
    # EN 1993-1-2:2005 §3.4.1.2. By hand: 20 °C: 425 + 15.46 - 0.676 + 0.018 = 439.8 (≈ 440);
    # 735 °C: 545 + 17820/4 = 5000 (the phase-change peak); above 900 °C: 650 J/(kg·K).
    assert steel_specific_heat(K(20)) == pytest.approx(440, abs=0.5)
    assert steel_specific_heat(K(735)) == pytest.approx(5000, abs=0.5)
    assert steel_specific_heat(K([900, 1200])) == pytest.approx([650, 650], abs=0.5)
    # The branches meet at 600 °C: cubic 759.9, 666 + 13002/138 = 760.2 (by hand).
    below, above = steel_specific_heat(K([599.999, 600.0]))
    assert below == pytest.approx(760, abs=0.5) and above == pytest.approx(760, abs=0.5)


def test_steel_density__en1993_1_2_3_2_2_constant_7850():
    # EN 1993-1-2:2005 §3.2.2(1): ρa = 7850 kg/m³, independent of temperature.
    assert steel_density(K([20, 600, 1200])) == pytest.approx([7850] * 3)


# ------------------------------------------------------------------ ranges, shapes, registry


def test_laws_outside_20_to_1200_degc__refused_unless_extended():
    # Both standards define their laws for 20 °C ≤ θ ≤ 1200 °C.
    for law in (concrete_conductivity_lower, steel_specific_heat, concrete_specific_heat):
        with pytest.raises(PhysicsRangeError) as raised:
            law(K(1250))
        assert raised.value.quantity == "temperature"  # the function's own parameter name
        with pytest.raises(PhysicsRangeError):
            law(K(5))
    assert concrete_conductivity_lower(K(1300), extend=True) == pytest.approx(0.549, abs=0.0005)
    assert concrete_conductivity_lower(K(-20), extend=True) == pytest.approx(1.333, abs=0.0005)


def test_laws__vectorised_over_arrays_and_floats_for_scalars():
    theta = K(np.array([[20.0, 300.0], [700.0, 1100.0]]))
    for function in (concrete_conductivity_upper, concrete_specific_heat, concrete_density,
                     steel_conductivity, steel_specific_heat, steel_density):
        assert function(theta).shape == (2, 2)
        assert isinstance(function(K(500.0)), float)


def test_law_registry__names_used_in_materials_fire_yaml():
    # calcdoc/materials/fire.yaml names these laws; concrete_siliceous and concrete_calcareous
    # share en1992_concrete (EN 1992-1-2:2004 §3.3 gives both aggregates the same laws).
    assert set(LAWS) >= {"en1992_concrete", "en1993_carbon_steel"}
    concrete = make_law("en1992_concrete", conductivity_limit="upper", moisture_content=0.03)
    assert concrete.conductivity(K(20)) == pytest.approx(1.951, abs=0.0005)
    assert concrete.specific_heat(K(110)) == pytest.approx(2020, abs=0.5)
    steel = carbon_steel_law()
    assert steel.conductivity(K(20)) == pytest.approx(53.3, abs=0.05)
    # each refusal names the parameter as the function takes it
    for call, quantity in ((lambda: make_law("en1992_concrete", conductivity_limit="middle"),
                            "conductivity_limit"),
                           (lambda: make_law("timber"), "name"),
                           (lambda: constant_law(0.0, 600.0, 1200.0), "conductivity"),
                           (lambda: constant_law(1.0, 600.0, -1.0), "specific_heat"),
                           (lambda: concrete_law(density_20=2700.0), "density_20")):
        with pytest.raises(PhysicsRangeError) as raised:
            call()
        assert raised.value.quantity == quantity
