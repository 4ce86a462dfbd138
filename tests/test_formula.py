"""The formula kind: a whitelist expression language on pint quantities, never eval."""

import math

import pytest
from scipy.constants import Stefan_Boltzmann

from calcdoc.kinds.formula import ExpressionError, parse_expression, symbol_latex, to_latex


def sheet(given: str, steps: str, checks: str = "") -> dict:
    return {"f1": f"""\
id: F1
title: Formula sheet
blocks:
  - id: calc
    kind: formula
    given:
{given}
    steps:
{steps}
{checks}"""}


@pytest.mark.parametrize("expr, what", [
    ("U.__class__", "attribute access is not allowed"),
    ("__import__('os')", "function not allowed"),
    ("open('x')", "function not allowed"),
    ("[1, 2]", "not allowed in an expression"),
    ("'text'", "only numbers are allowed as literals"),
    ("a if b else c", "not allowed in an expression"),
    ("lambda: 1", "not allowed in an expression"),
    ("x // 2", "operator not allowed"),
    ("sqrt(x=1)", "keyword arguments are not allowed"),
    ("1 +", "not a valid expression"),
])
def test_expressions_outside_the_whitelist_are_refused(expr, what):
    with pytest.raises(ExpressionError) as info:
        parse_expression(expr)
    assert info.value.what == what


def test_absolute_temperatures_are_in_kelvin_before_arithmetic(evaluate):
    # Emissive power of a black surface at 21 °C written in kelvin: σ·(294.15 K)⁴ = 424.5 W/m²
    # (Stefan–Boltzmann law; σ = 5.670374419e-8 W/(m²·K⁴), CODATA 2018).
    package = evaluate(sheet("      T: 294.15 K\n      T_c: 21 degC\n      T_o: 68 degF",
                             '      - {name: E, expr: "sigma * T**4", unit: W/m^2}\n'
                             '      - {name: dT, expr: "T_c - T_o", unit: K}'))
    results = package.block("F1.calc").output.results
    assert results["E"].value == pytest.approx(Stefan_Boltzmann * 294.15 ** 4, rel=1e-12)
    assert results["E"].value == pytest.approx(424.5, abs=0.1)
    # 21 °C − 68 °F = 294.15 K − 293.15 K = 1 K (NIST SP 811 B.9 for °F), a difference
    assert results["dT"].value == pytest.approx(1.0, abs=1e-9)
    assert results["dT"].spec.temperature == "difference"


@pytest.mark.parametrize("expr, what", [
    ("U * A * dT", "is multiplied"),
    ("Q / dT", "a divisor"),
    ("dT ** 2", "raised to a power"),
    ("sqrt(dT)", "raised to a power"),
    ("-dT", "negated"),
])
def test_offset_temperature_in_a_product_is_refused__silent_wrong_answer_class(
        errors_of, expr, what):
    # 23 °C is 296.15 K: U·A·dT with dT written '23 degC' would silently be 12.9 times the loss
    # a difference of 23 K gives. An absolute temperature written in °C is refused in a product,
    # a quotient, a power and a negation (issue: right or refused).
    errors = errors_of(sheet("      U: 0.3 W/(m^2*K)\n      A: 100 m^2\n"
                                    "      Q: 690 W\n      dT: 23 degC",
                                    f'      - {{name: X, expr: "{expr}", unit: "1"}}'))
    assert len(errors) == 1
    assert f"an absolute temperature {what} (expected a temperature difference, got " \
           "dT = 23 °C); hint: write a difference as '23 K' or '23 delta_degC'" in errors[0] \
        or f"an absolute temperature is {what} (expected a temperature difference, got " \
           "dT = 23 °C); hint: write a difference as '23 K' or '23 delta_degC'" in errors[0]


def test_offset_temperatures_combine_as_engineers_expect__absolute_and_difference(evaluate):
    # θ_i − θ_e of two absolute temperatures is a difference that may be multiplied; an
    # absolute temperature plus a difference stays absolute (common practice).
    package = evaluate(sheet("      U: 0.3 W/(m^2*K)\n      A: 100 m^2\n"
                             "      theta_i: 20 degC\n      theta_e: -3 degC\n      rise: 2 K",
                             '      - {name: Q, expr: "U * A * (theta_i - theta_e)", unit: W}\n'
                             '      - {name: theta_s, expr: "theta_e + rise", unit: degC}'))
    results = package.block("F1.calc").output.results
    assert results["Q"].value == pytest.approx(0.3 * 100 * 23)  # 690 W, hand calculation
    assert results["theta_s"].value == pytest.approx(273.15 - 1.0)
    assert results["theta_s"].spec.temperature == "absolute"


def test_difference_given_an_absolute_unit_is_refused(errors_of):
    # A difference printed in °C would read 20 K as −253 °C.
    errors = errors_of(sheet("      a: 20 degC\n      b: 0 degC",
                                    '      - {name: d, expr: "a - b", unit: degC}'))
    assert "a temperature difference given an absolute unit" in errors[0]
    assert errors[0].endswith("hint: write the unit as K or delta_degC")


def test_two_absolute_temperatures_added_is_refused(errors_of):
    errors = errors_of(sheet("      a: 20 degC\n      b: 0 degC",
                                    '      - {name: m, expr: "(a + b) / 2", unit: degC}'))
    assert "two absolute temperatures are added" in errors[0]
    assert errors[0].endswith("hint: a mean temperature is T_1 + (T_2 - T_1) / 2")


def test_units_convert_through_steps(evaluate):
    # 0.25 W/(m²·K) × 240 m² × 24 K = 1440 W = 1.44 kW (hand calculation)
    package = evaluate(sheet("      U: 0.25 W/(m^2*K)\n      A: 240 m^2\n      dT: 24 K",
                             '      - {name: Q, expr: "U * A * dT", unit: kW}',
                             "    checks:\n      - {result: Q, at_most: 1.5 kW}"))
    block = package.block("F1.calc")
    assert block.output.results["Q"].value == pytest.approx(1440.0)
    from calcdoc.render.printed import print_value
    assert print_value(block.output.value_of("Q"), 3).text == "1.44 kW"
    printed = block.printed_steps(3)[0].record()
    assert printed == {"name": "Q", "label": "", "expr": "U * A * dT",
                       "values": {"U": "0.25 W/(m^2*K)", "A": "240 m^2", "dT": "24 K"},
                       "result": "1.44 kW", "source": ""}
    check = block.checks[0]
    assert check.passed and check.margin_si == pytest.approx(60.0)
    assert check.utilisation == pytest.approx(0.96)


def test_degC_per_degree_inside_compound_given(evaluate):
    # 0.5 W/(m·°C) is 0.5 W/(m·K) (docs/format.md, Values); 0.5 × 2 m⁻¹... as a U-like product
    package = evaluate(sheet("      k: 0.5 W/(m*degC)\n      d: 0.1 m",
                             '      - {name: U, expr: "k / d", unit: W/(m^2*K)}'))
    assert package.block("F1.calc").output.results["U"].value == pytest.approx(5.0)


@pytest.mark.parametrize("expr, message", [
    ("x ** 1000", "exponent too large (expected |exponent| <= 100, got 1000.0)"),
    ("y + x", "unknown name 'y' (expected a name from given, an earlier step, pi or sigma, "
              "got 'y')"),
    ("exp(x * 1000)", "result too large or not a number (expected exp of at most 230, "
                      "got 2000.0)"),
    ("10 ** 90 * 10 ** 90", "result too large or not a number (expected a magnitude below "
                            "1e+100, got 1e+180 from 10 ** 90 * 10 ** 90)"),
])
def test_huge_powers_and_unknown_names_are_located_errors(errors_of, expr, message):
    errors = errors_of(sheet("      x: 2", f'      - {{name: r, expr: "{expr}", unit: "1"}}'))
    assert errors == [f"proj/sheets/f1.yaml:9:25: error: F1.calc.steps[0] (r): {message}"]


def test_adding_unlike_quantities_is_refused(errors_of):
    errors = errors_of(sheet("      a: 1 m\n      b: 1 s", '      - {name: r, expr: "a + b", unit: m}'))
    assert errors == ["proj/sheets/f1.yaml:10:25: error: F1.calc.steps[0] (r): units do not match "
                      "(expected length [m], got time [s])"]


def test_latex_of_an_expression_with_symbols_and_numbers():
    tree = parse_expression("U_w * A_w * (theta_i - theta_e) / 1000")
    assert to_latex(tree, symbol_latex) == \
        r"\frac{U_{w} \cdot A_{w} \cdot \left(\theta_{i} - \theta_{e}\right)}{1000}"
    assert symbol_latex("theta_si") == r"\theta_{si}"
    assert symbol_latex("Q_w_total") == r"Q_{w,total}"


def test_functions_and_constants(evaluate):
    package = evaluate(sheet("      x: 4", '      - {name: r, expr: "sqrt(x) + max(1, 2) + pi", unit: "1"}'))
    assert package.block("F1.calc").output.results["r"].value == pytest.approx(4 + math.pi)
