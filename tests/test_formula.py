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
    # Emissive power of a black surface at 21 °C: σ·(294.15 K)⁴ = 424.5 W/m²
    # (Stefan–Boltzmann law; σ = 5.670374419e-8 W/(m²·K⁴), CODATA 2018).
    package = evaluate(sheet("      T: 21 degC\n      T_o: 68 degF",
                             '      - {name: E, expr: "sigma * T**4", unit: W/m^2}\n'
                             '      - {name: dT, expr: "T - T_o", unit: K}'))
    results = package.block("F1.calc").output.results
    assert results["E"].value == pytest.approx(Stefan_Boltzmann * 294.15 ** 4, rel=1e-12)
    assert results["E"].value == pytest.approx(424.5, abs=0.1)
    # 21 °C − 68 °F = 294.15 K − 293.15 K = 1 K (NIST SP 811 B.9 for °F)
    assert results["dT"].value == pytest.approx(1.0, abs=1e-9)


def test_units_convert_through_steps(evaluate):
    # 0.25 W/(m²·K) × 240 m² × 24 K = 1440 W = 1.44 kW (hand calculation)
    package = evaluate(sheet("      U: 0.25 W/(m^2*K)\n      A: 240 m^2\n      dT: 24 K",
                             '      - {name: Q, expr: "U * A * dT", unit: kW}',
                             "    checks:\n      - {result: Q, at_most: 1.5 kW}"))
    block = package.block("F1.calc")
    assert block.output.results["Q"].value == pytest.approx(1440.0)
    assert block.output.results["Q"].display == "1.44 kW"
    check = block.checks[0]
    assert check.passed and check.margin_si == pytest.approx(60.0)
    assert check.utilisation == pytest.approx(0.96)


def test_degC_per_degree_inside_compound_given(evaluate):
    # 0.5 W/(m·°C) is 0.5 W/(m·K) (FORMAT.md, Values); 0.5 × 2 m⁻¹... as a U-like product
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
                            "1e+100, got 1e+180)"),
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
