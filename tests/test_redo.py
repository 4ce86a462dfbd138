"""A checker re-does the package by hand: every printed step, evaluated from its printed numbers,
gives its printed result.

The evaluator here is the test's own: Python's ``ast`` for the expression, pint for the units,
kelvin arithmetic for temperatures (an absolute temperature printed in °C or °F is converted to
kelvin first, as a checker does) — nothing of calcdoc's expression or unit code. Each step of
results.json (format 2) is re-done from its ``values`` and compared with its ``result`` to half a
unit of the result's last printed digit.
"""

from __future__ import annotations

import ast
import json
import math
from pathlib import Path

import pint
import pytest

from calcdoc.cli import main

ROOT = Path(__file__).resolve().parent.parent
UREG = pint.UnitRegistry()
Q = UREG.Quantity
SIGMA = Q(5.670374419e-8, "W/(m^2*K^4)")  # Stefan–Boltzmann constant, CODATA 2018
FUNCTIONS = {"sqrt": math.sqrt, "exp": math.exp, "log": math.log, "log10": math.log10,
             "sin": math.sin, "cos": math.cos, "tan": math.tan}


def quantity(text: str) -> pint.Quantity:
    """A printed quantity in kelvin arithmetic: '12 degC' → 285.15 K, '5 delta_degC' → 5 K."""
    number, _, unit = text.strip().partition(" ")
    value = float(number)
    if not unit:
        return Q(value, "dimensionless")
    if unit in ("degC", "degF"):
        return Q(value, unit).to("K")
    if unit in ("delta_degC", "delta_degF"):
        return Q(value, unit).to("K")
    return Q(value, unit)


def evaluate(expr: str, values: dict[str, pint.Quantity]) -> pint.Quantity:
    def go(node):
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return Q(float(node.value), "dimensionless")
        if isinstance(node, ast.Name):
            if node.id == "pi":
                return Q(math.pi, "dimensionless")
            if node.id == "sigma":
                return SIGMA
            return values[node.id]
        if isinstance(node, ast.UnaryOp):
            value = go(node.operand)
            return -value if isinstance(node.op, ast.USub) else value
        if isinstance(node, ast.BinOp):
            a, b = go(node.left), go(node.right)
            if isinstance(node.op, ast.Add):
                return a + b
            if isinstance(node.op, ast.Sub):
                return a - b
            if isinstance(node.op, ast.Mult):
                return a * b
            if isinstance(node.op, ast.Div):
                return a / b
            return a ** b.to("dimensionless").magnitude
        if isinstance(node, ast.Call):
            args = [go(a) for a in node.args]
            name = node.func.id
            if name in ("min", "max"):
                unit = args[0].units
                chosen = (min if name == "min" else max)(a.to(unit).magnitude for a in args)
                return Q(chosen, unit)
            if name == "abs":
                return abs(args[0])
            if name == "sqrt":
                return args[0] ** 0.5
            return Q(FUNCTIONS[name](args[0].to("dimensionless").magnitude), "dimensionless")
        raise AssertionError(f"not in the formula language: {ast.dump(node)}")

    return go(ast.parse(expr, mode="eval"))


def half_unit(number: str) -> float:
    mantissa, _, power = number.lower().partition("e")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    return 0.5 * 10.0 ** (-decimals + (int(power) if power else 0))


def redo(step: dict) -> tuple[float, float, float]:
    """Return (re-done value, printed value, half a unit), both in the printed result's unit."""
    values = {name: quantity(text) for name, text in step["values"].items()}
    again = evaluate(step["expr"], values)
    number, _, unit = step["result"].partition(" ")
    if unit in ("degC", "degF"):
        shown = again.to("K").magnitude
        shown = Q(shown, "K").to(unit).magnitude
    elif unit:
        shown = again.to(unit).magnitude
    else:
        shown = again.to("dimensionless").magnitude
    return float(shown), float(number), half_unit(number)


@pytest.fixture(scope="module")
def demo_results(tmp_path_factory) -> dict:
    out = tmp_path_factory.mktemp("redo") / "out"
    assert main(["build", str(ROOT / "projects" / "cold-store"), "--out", str(out),
                 "--no-pdf"]) == 0
    return json.loads((out / "results.json").read_text())


def test_every_printed_step_of_the_demo_redoes_from_its_printed_numbers(demo_results):
    assert demo_results["format_version"] == 2
    steps = [(f"{s['id']}.{b['id']}", step) for s in demo_results["sheets"]
             for b in s["blocks"] for step in b["steps"]]
    closed = [(key, step) for key, step in steps if "expr" in step]
    assert len(closed) >= 150
    wrong = []
    for key, step in closed:
        again, printed, half = redo(step)
        if not abs(again - printed) <= half * (1 + 1e-9) + 1e-300:
            wrong.append(f"{key} {step['name']} = {step['expr']} with {step['values']}: "
                         f"{again!r}, printed {step['result']}")
    assert wrong == []


def test_every_block_of_the_demo_prints_steps(demo_results):
    for sheet in demo_results["sheets"]:
        for block in sheet["blocks"]:
            assert block["steps"], f"{sheet['id']}.{block['id']} prints no step"
            for step in block["steps"]:
                assert set(step) in ({"name", "label", "expr", "values", "result", "source"},
                                     {"name", "label", "statement", "result", "source"})


def test_the_steps_use_only_the_formula_language(demo_results):
    allowed_calls = {"sqrt", "exp", "log", "log10", "sin", "cos", "tan", "abs", "min", "max"}
    for sheet in demo_results["sheets"]:
        for block in sheet["blocks"]:
            for step in (s for s in block["steps"] if "expr" in s):
                tree = ast.parse(step["expr"], mode="eval")
                functions = {id(n.func) for n in ast.walk(tree) if isinstance(n, ast.Call)}
                for node in ast.walk(tree):
                    assert isinstance(node, (ast.Expression, ast.BinOp, ast.UnaryOp, ast.Name,
                                             ast.Constant, ast.Call, ast.Load, ast.Add, ast.Sub,
                                             ast.Mult, ast.Div, ast.Pow, ast.USub, ast.UAdd)), \
                        step["expr"]
                    if isinstance(node, ast.Call):
                        assert node.func.id in allowed_calls, step["expr"]
                    if isinstance(node, ast.Name) and id(node) not in functions:
                        assert node.id in step["values"] or node.id in ("pi", "sigma"), \
                            step["expr"]


def test_redo_evaluator__kelvin_arithmetic_for_printed_celsius():
    # 12 °C − 3.5 W/m² · 0.13 m²·K/W = 11.545 °C (hand calculation): the checker converts
    # °C to kelvin before arithmetic, as pint's offset rules alone would not.
    step = {"expr": "ti - q * R", "values": {"ti": "12 degC", "q": "3.5 W/m^2",
                                             "R": "0.13 m^2*K/W"}, "result": "11.5 degC"}
    again, printed, half = redo(step)
    assert again == pytest.approx(11.545, abs=1e-9) and abs(again - printed) <= half
