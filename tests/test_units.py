"""Quantity parsing and display: the temperature rules of docs/format.md, conversions against NIST."""

import pytest

from calcdoc.units import UnitProblem, parse_quantity_text, ureg
from calcdoc.render.numbers import format_number, format_quantity, latex_unit, pretty_unit


def test_absolute_celsius__21_degC_is_294_15_K():
    # 0 °C = 273.15 K exactly (SI Brochure, 9th ed., §2.3.1)
    assert parse_quantity_text("21 degC", "K", "absolute")[0] == pytest.approx(294.15, abs=1e-9)


def test_absolute_fahrenheit__68_degF_is_293_15_K():
    # T/K = (t/°F + 459.67) × 5/9 (NIST SP 811, 2008, B.9): 68 °F = 293.15 K
    assert parse_quantity_text("68 degF", "K", "absolute")[0] == pytest.approx(293.15, abs=1e-9)


def test_negative_celsius__minus_5_degC_is_268_15_K():
    assert parse_quantity_text("-5 degC", "K", "absolute")[0] == pytest.approx(268.15, abs=1e-9)


def test_compound_degC_is_per_degree__0_5_W_per_m_degC_is_0_5_W_per_m_K():
    # A per-degree Celsius interval equals a kelvin (SI Brochure §2.3.1); docs/format.md, Values.
    value, _ = parse_quantity_text("0.5 W/(m*degC)", "W/(m*K)")
    assert value == pytest.approx(0.5, rel=1e-12)


def test_btu_per_hour_square_foot_degF__is_5_678_W_per_m2_K():
    # 1 Btu_IT/(h·ft²·°F) = 5.678 263 W/(m²·K) (NIST SP 811, 2008, B.9)
    value, _ = parse_quantity_text("1 Btu/(h*ft^2*degF)", "W/(m^2*K)")
    assert value == pytest.approx(5.678263, rel=1e-6)


def test_difference_written_in_degC__is_refused_with_a_hint():
    with pytest.raises(UnitProblem) as info:
        parse_quantity_text("140 degC", "K", "difference")
    assert info.value.what == "a temperature difference written as an absolute temperature"
    assert info.value.expected == "a difference in K, delta_degC or delta_degF"
    assert info.value.hint == "write '140 K' or '140 delta_degC'"


@pytest.mark.parametrize("text, meant", [("15O mm", "150 mm"), ("1O0 W", "100 W"),
                                         ("0.O35 W/(m*K)", "0.035 W/(m*K)")])
def test_letter_o_typed_for_a_zero__unknown_unit_with_the_number_meant(text, meant):
    # A letter O for a zero splits the number; the rest reads as an unknown unit.
    with pytest.raises(UnitProblem) as info:
        parse_quantity_text(text, "W" if "W" in text else "m")
    assert info.value.what.startswith("unknown unit")
    assert info.value.hint == f"a letter in the number? did you mean '{meant}'?"


def test_unknown_unit_without_a_lookalike_letter__no_such_hint():
    with pytest.raises(UnitProblem) as info:
        parse_quantity_text("12 furlongs_per_fortnight_x", "m")
    assert "letter in the number" not in (info.value.hint or "")


def test_difference_in_kelvin_and_delta_degF():
    assert parse_quantity_text("140 K", "K", "difference")[0] == 140
    # 1 °F interval = 5/9 K (NIST SP 811 B.9)
    assert parse_quantity_text("9 delta_degF", "K", "difference")[0] == pytest.approx(5.0)


def test_percent_required_for_fractions():
    assert parse_quantity_text("60 %", "1", percent_required=True)[0] == pytest.approx(0.6)
    with pytest.raises(UnitProblem) as info:
        parse_quantity_text("1.5", "1", percent_required=True)
    assert info.value.expected == "a percentage such as '1.5 %'"


def test_wrong_dimension_names_both_dimensions():
    with pytest.raises(UnitProblem) as info:
        parse_quantity_text("140 kg", "W/(m*K)")
    assert info.value.expected == "thermal conductivity [W/(m·K)]"
    assert info.value.got == "mass [kg] in '140 kg'"


def test_registry_never_autoconverts_offset_units():
    # DESIGN.md: autoconvert_offset_to_baseunit makes W/(m*degC) 274 times too small.
    assert ureg.autoconvert_offset_to_baseunit is False


def test_display_typography():
    assert pretty_unit("W/(m^2*K)") == "W/(m²·K)"
    assert pretty_unit("degC") == "°C"
    assert latex_unit("W/(m^2*K^4)") == r"\mathrm{W/(m^{2}\cdot K^{4})}"
    assert format_quantity(0.27312845, "W/(m^2*K)") == "0.273 W/(m²·K)"
    assert format_quantity(294.15, "K", "degC") == "21.0 °C"
    assert format_quantity(0.6, "1", "%") == "60.0 %"


def test_significant_figures_keep_integer_digits():
    assert format_number(12345.6, 3) == "12346"
    assert format_number(0.00012345, 3) == "1.23×10⁻⁴"
    assert format_number(-4.0, 3) == "−4.00"


def test_us_display_units__u_value_in_btu():
    # 1 Btu/(h·ft²·°F) = 5.678263 W/(m²·K) (NIST SP 811 B.9): 0.273 W/(m²·K) = 0.0481
    from calcdoc.render.numbers import display_unit_for
    unit = display_unit_for("W/(m^2*K)", None, None, "US")
    assert format_quantity(0.273, "W/(m^2*K)", unit) == "0.0481 Btu/(h·ft²·°F)"
    # 21 °C = 69.8 °F (T/°F = 1.8·t/°C + 32)
    assert format_quantity(294.15, "K", display_unit_for("K", None, "absolute", "US")) == "69.8 °F"
    # 100 mm = 3.94 in (1 in = 25.4 mm exactly, NIST SP 811 B.9)
    assert format_quantity(0.1, "m", display_unit_for("m", "mm", None, "US")) == "3.94 in"


def test_a_temperature_difference_is_never_shown_to_hundredths():
    # An absolute temperature in kelvin is shown to 0.01 K (294.15 K); a 200 K rise is not.
    assert format_quantity(294.15, "K") == "294.15 K"
    assert format_quantity(200.0, "K", difference=True) == "200 K"
    assert format_quantity(140.0, "K") == "140 K"
