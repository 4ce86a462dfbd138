"""The engineer's own worked formulas: given values, steps with expressions, checks.

Expressions are parsed with Python's ``ast`` and walked against a whitelist (numbers, names,
``+ - * / **``, parentheses, a fixed list of functions and the constants pi and sigma); they are
never passed to ``eval``. Arithmetic runs on pint quantities in coherent units, so every step is
dimension-checked; absolute temperatures given in degC or degF are converted to kelvin first.
"""

from __future__ import annotations

import ast
import math
from dataclasses import dataclass

import pint
from scipy.constants import Stefan_Boltzmann

from calcdoc.errors import InputError, Location
from calcdoc.kinds.base import (REQUIRED, ABSOLUTE, DIFFERENCE, Field, FreeMapping, InputRecord,
                                Items, Kind, Text, _Invalid, did_you_mean)
from calcdoc.located import Node, plain
from calcdoc.units import (UnitProblem, dimension_text, format_quantity, latex_quantity,
                           parse_quantity_text, parse_unit, si_unit_for, ureg)

__all__ = ["KINDS", "parse_expression", "to_latex", "FUNCTIONS"]

MAX_EXPONENT = 100.0
MAX_MAGNITUDE = 1e100
FUNCTIONS = ("sqrt", "exp", "log", "log10", "sin", "cos", "tan", "abs", "min", "max")
CONSTANTS = {"pi": (math.pi, "1", r"\pi"),
             "sigma": (Stefan_Boltzmann, "W/(m^2*K^4)", r"\sigma")}
_GREEK = {"alpha", "beta", "gamma", "delta", "epsilon", "varepsilon", "zeta", "eta", "theta",
          "vartheta", "iota", "kappa", "lambda", "mu", "nu", "xi", "rho", "tau", "upsilon", "phi",
          "varphi", "chi", "psi", "omega", "Gamma", "Delta", "Theta", "Lambda", "Xi", "Phi",
          "Psi", "Omega", "Sigma", "Pi"}


class ExpressionError(ValueError):
    def __init__(self, what: str, expected: str, got: str):
        self.what, self.expected, self.got = what, expected, got
        super().__init__(what)


@dataclass
class Expression:
    text: str
    tree: ast.Expression
    loc: Location


def parse_expression(text: str) -> ast.Expression:
    """Return the checked AST of an expression; raise ExpressionError for anything not allowed."""
    try:
        tree = ast.parse(str(text), mode="eval")
    except SyntaxError as exc:
        raise ExpressionError("not a valid expression", "an expression such as 'U * A * dT'",
                              f"{text!r} ({exc.msg})") from None
    for node in ast.walk(tree):
        if isinstance(node, (ast.Expression, ast.Load, ast.operator, ast.unaryop)):
            if isinstance(node, ast.operator) and not isinstance(
                    node, (ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow)):
                raise ExpressionError("operator not allowed", "+ - * / **",
                                      type(node).__name__)
            if isinstance(node, ast.unaryop) and not isinstance(node, (ast.UAdd, ast.USub)):
                raise ExpressionError("operator not allowed", "unary + or -",
                                      type(node).__name__)
            continue
        if isinstance(node, (ast.BinOp, ast.UnaryOp, ast.Name)):
            continue
        if isinstance(node, ast.Constant):
            if isinstance(node.value, bool) or not isinstance(node.value, (int, float)):
                raise ExpressionError("only numbers are allowed as literals", "a number",
                                      repr(node.value))
            continue
        if isinstance(node, ast.Call):
            if not isinstance(node.func, ast.Name) or node.func.id not in FUNCTIONS:
                got = node.func.id if isinstance(node.func, ast.Name) else ast.unparse(node.func)
                raise ExpressionError("function not allowed", ", ".join(FUNCTIONS), repr(got))
            if node.keywords:
                raise ExpressionError("keyword arguments are not allowed",
                                      "positional arguments", ast.unparse(node))
            continue
        if isinstance(node, ast.Attribute):
            raise ExpressionError("attribute access is not allowed",
                                  "names, numbers, operators and functions", ast.unparse(node))
        raise ExpressionError("not allowed in an expression",
                              "names, numbers, + - * / **, functions", type(node).__name__)
    return tree


# ------------------------------------------------------------------------ LaTeX


def symbol_latex(name: str) -> str:
    """Return a name as a math symbol: 'theta_si' → '\\theta_{si}', 'U_w' → 'U_{w}'."""
    base, _, sub = name.partition("_")

    def part(word: str) -> str:
        if word in _GREEK:
            return "\\" + word
        return word if len(word) == 1 else r"\mathit{" + word + "}"

    text = part(base)
    if sub:
        pieces = [("\\" + p if p in _GREEK else p) for p in sub.split("_") if p]
        text += "_{" + ",".join(pieces) + "}"
    return text


_PRECEDENCE = {ast.Add: 1, ast.Sub: 1, ast.Mult: 2, ast.Div: 2, ast.Pow: 4}


def to_latex(tree: ast.AST, leaf) -> str:
    """Return LaTeX for an expression; ``leaf(name)`` renders each name (symbol or value)."""

    def prec(node) -> int:
        if isinstance(node, ast.BinOp):
            return _PRECEDENCE[type(node.op)]
        if isinstance(node, ast.UnaryOp):
            return 3
        return 5

    def wrap(node, limit: int) -> str:
        text = go(node)
        return rf"\left({text}\right)" if prec(node) < limit else text

    def go(node) -> str:
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return _number_latex(node.value)
        if isinstance(node, ast.Name):
            return leaf(node.id)
        if isinstance(node, ast.UnaryOp):
            sign = "-" if isinstance(node.op, ast.USub) else "+"
            return sign + wrap(node.operand, 3)
        if isinstance(node, ast.BinOp):
            op = type(node.op)
            if op is ast.Div:
                return rf"\frac{{{go(node.left)}}}{{{go(node.right)}}}"
            if op is ast.Pow:
                base = go(node.left)
                if prec(node.left) <= 4 or "\\," in base:
                    base = rf"\left({base}\right)"
                return f"{{{base}}}^{{{go(node.right)}}}"
            symbol = {ast.Add: " + ", ast.Sub: " - ", ast.Mult: r" \cdot "}[op]
            right_limit = _PRECEDENCE[op] + (1 if op is ast.Sub else 0)
            return wrap(node.left, _PRECEDENCE[op]) + symbol + wrap(node.right, right_limit)
        if isinstance(node, ast.Call):
            name = node.func.id
            args = [go(a) for a in node.args]
            if name == "sqrt":
                return rf"\sqrt{{{args[0]}}}"
            if name == "abs":
                return rf"\left|{args[0]}\right|"
            if name in ("exp", "log", "sin", "cos", "tan", "min", "max"):
                return rf"\{name}\left({', '.join(args)}\right)"
            if name == "log10":
                return rf"\log_{{10}}\left({args[0]}\right)"
        raise ValueError(type(node).__name__)  # pragma: no cover - parse_expression guards

    return go(tree)


def _number_latex(value) -> str:
    text = repr(value) if isinstance(value, float) else str(value)
    if "e" in text:
        mantissa, power = text.split("e")
        return rf"{mantissa} \times 10^{{{int(power)}}}"
    return text


# ------------------------------------------------------------------------ evaluation


@dataclass
class Given:
    """A given value as a pint quantity (absolute temperatures in K) and how to show it."""

    quantity: pint.Quantity
    latex: str
    temperature: str | None


def _evaluate(tree: ast.AST, names: dict[str, Given], loc: Location, where: str) -> pint.Quantity:
    def fail(what, expected, got):
        raise InputError(loc, where, what, expected, got)

    def check(q):
        magnitude = float(q.magnitude)
        if not math.isfinite(magnitude) or abs(magnitude) > MAX_MAGNITUDE:
            fail("result too large or not a number", f"a magnitude below {MAX_MAGNITUDE:g}",
                 f"{magnitude:.4g}")
        return q

    def dimensionless(q, what):
        if not q.dimensionless:
            fail(f"{what} needs a dimensionless argument", "dimensionless",
                 dimension_text(q.units))
        return float(q.to("dimensionless").magnitude)

    def go(node):
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return ureg.Quantity(float(node.value), "dimensionless")
        if isinstance(node, ast.Name):
            if node.id in names:
                return names[node.id].quantity
            if node.id in CONSTANTS:
                value, unit, _ = CONSTANTS[node.id]
                return ureg.Quantity(value, parse_unit(unit))
            fail(f"unknown name '{node.id}'", "a name from given, an earlier step, pi or sigma",
                 repr(node.id) + (f" ({did_you_mean(node.id, names)})"
                                  if did_you_mean(node.id, names) else ""))
        if isinstance(node, ast.UnaryOp):
            value = go(node.operand)
            return -value if isinstance(node.op, ast.USub) else value
        if isinstance(node, ast.BinOp):
            left, right = go(node.left), go(node.right)
            op = type(node.op)
            try:
                if op is ast.Pow:
                    exponent = dimensionless(right, "a power")
                    if abs(exponent) > MAX_EXPONENT:
                        fail("exponent too large", f"|exponent| <= {MAX_EXPONENT:g}",
                             repr(exponent))
                    if not left.dimensionless and exponent != round(exponent * 2) / 2:
                        fail("a quantity with a unit can only be raised to a whole or half power",
                             "a whole or half exponent", repr(exponent))
                    if float(left.magnitude) != 0 and \
                            abs(exponent * math.log10(abs(float(left.magnitude)))) > 100:
                        fail("result too large or not a number",
                             f"a magnitude below {MAX_MAGNITUDE:g}", "an overflow")
                    return check(left ** exponent)
                if op is ast.Add:
                    return check(left + right)
                if op is ast.Sub:
                    return check(left - right)
                if op is ast.Mult:
                    return check(left * right)
                if op is ast.Div:
                    if float(right.magnitude) == 0:
                        fail("division by zero", "a non-zero divisor", "0")
                    return check(left / right)
            except pint.DimensionalityError as exc:
                fail("units do not match", dimension_text(exc.units1),
                     dimension_text(exc.units2))
        if isinstance(node, ast.Call):
            name = node.func.id
            args = [go(a) for a in node.args]
            count = {"min": None, "max": None}.get(name, 1)
            if count is not None and len(args) != 1:
                fail(f"{name} takes one argument", "1 argument", f"{len(args)} arguments")
            if name in ("min", "max"):
                if len(args) < 2:
                    fail(f"{name} takes two or more arguments", "2 or more", str(len(args)))
                try:
                    values = [a.to(args[0].units) for a in args]
                except pint.DimensionalityError as exc:
                    fail("units do not match", dimension_text(exc.units1),
                         dimension_text(exc.units2))
                return (min if name == "min" else max)(values, key=lambda q: q.magnitude)
            a = args[0]
            if name == "sqrt":
                if float(a.magnitude) < 0:
                    fail("square root of a negative value", "a value >= 0",
                         repr(float(a.magnitude)))
                return a ** 0.5
            if name == "abs":
                return abs(a)
            x = dimensionless(a, name)
            if name in ("log", "log10") and x <= 0:
                fail(f"{name} of a value <= 0", "a positive argument", repr(x))
            if name == "exp" and x > 230:
                fail("result too large or not a number", "exp of at most 230", repr(x))
            fn = {"exp": math.exp, "log": math.log, "log10": math.log10, "sin": math.sin,
                  "cos": math.cos, "tan": math.tan}[name]
            return ureg.Quantity(fn(x), "dimensionless")
        raise ValueError(type(node).__name__)  # pragma: no cover

    return go(tree)


# ------------------------------------------------------------------------ fields


_LONE_TEMPERATURES = ("degC", "degF", "°C", "°F")


def _given_value(name: str, node: Node, ctx, path: str, key_loc: Location) -> Given:
    if not name.isidentifier() or name in FUNCTIONS or name in CONSTANTS:
        ctx.error(key_loc, path, f"'{name}' cannot be a name",
                  "a name of letters, digits and _ that is not a function or constant",
                  repr(name))
        raise _Invalid
    source = ""
    if node.is_map and "ref" in node.value:
        target = ctx.resolve_ref(node.value["ref"], path)
        if target.obj is not None or isinstance(target.value, list):
            ctx.error(node, path, "a formula takes single results", "a single result",
                      target.target)
            raise _Invalid
        q = ureg.Quantity(target.value, parse_unit(target.si_unit))
        ctx.records.append(InputRecord(path, name, f"ref {target.target}", target.value,
                                       target.si_unit, target.display, f"result {target.target}",
                                       "ref", target.target, node.loc))
        return Given(q, latex_quantity(target.value, target.si_unit, None, ctx.precision),
                     target.temperature)
    if node.is_map and "named" in node.value:
        entry = ctx.named.get(str(node.value["named"].value))
        if entry is None:
            ctx.error(node.value["named"], path, "unknown named value",
                      "a name from `calcdoc kinds`", repr(node.value["named"].value),
                      did_you_mean(str(node.value["named"].value), ctx.named))
            raise _Invalid
        text, source = entry["value"], entry.get("source", "")
        value_node = node
    elif node.is_map:
        for key in node.value:
            if key not in ("value", "source"):
                ctx.error(node.key_locs[key], path, f"unknown key '{key}'",
                          "value, source, ref or named", repr(key),
                          did_you_mean(key, ["value", "source", "ref", "named"]))
                raise _Invalid
        if "value" not in node.value:
            ctx.error(node, path, f"'{name}' has no value", "{value: QUANTITY, source: TEXT}",
                      repr(plain(node)))
            raise _Invalid
        value_node = node.value["value"]
        text = value_node.value
        source = str(plain(node.value.get("source")) or "")
    else:
        value_node = node
        text = node.value
    if isinstance(text, bool) or not isinstance(text, (int, float, str)):
        ctx.error(value_node, path, f"'{name}' is not a quantity", "a quantity such as '240 m^2'",
                  repr(text))
        raise _Invalid
    if isinstance(text, (int, float)):
        q = ureg.Quantity(float(text), "dimensionless")
        written_unit, temperature = "1", None
        latex = _number_latex(float(text)) if isinstance(text, float) else str(text)
    else:
        number, _, unit = str(text).strip().partition(" ")
        unit = unit.strip()
        try:
            if unit in _LONE_TEMPERATURES:
                value_k, _ = parse_quantity_text(str(text), "K", ABSOLUTE)
                q = ureg.Quantity(value_k, "K")
                written_unit, temperature = "K", ABSOLUTE
            else:
                u = parse_unit(unit)
                q = ureg.Quantity(float(number), u)
                written_unit, temperature = unit, (DIFFERENCE if str(u) in (
                    "delta_degree_Celsius", "delta_degree_Fahrenheit") else None)
                if temperature:
                    q = q.to("K")
                    written_unit = "K"
        except (UnitProblem, ValueError) as problem:
            ctx.error(value_node, path, f"'{name}' is not a quantity",
                      "a number and a unit, such as '240 m^2'",
                      repr(text) + (f" ({problem.what})" if isinstance(problem, UnitProblem)
                                    else ""))
            raise _Invalid from None
        latex = latex_quantity(float(q.magnitude), written_unit, None, ctx.precision)
    si = si_unit_for(written_unit)
    value_si = float(q.to(parse_unit(si)).magnitude) if si != "1" else float(
        q.to("dimensionless").magnitude)
    display = format_quantity(value_si, si, "degC" if temperature == ABSOLUTE else
                              (written_unit if written_unit != "1" else None), ctx.precision)
    ctx.records.append(InputRecord(path, name, str(text), value_si, si, display, source,
                                   "named" if node.is_map and "named" in node.value else "given",
                                   None, value_node.loc))
    return Given(q, latex, temperature)


@dataclass(frozen=True)
class ExpressionField(Field):
    """An expression in the whitelist language, parsed at load time and kept with its location."""

    def type_text(self) -> str:
        return "expression"

    def convert(self, node, ctx, path):
        if not node.is_scalar or not isinstance(node.value, (str, int, float)):
            ctx.error(node, path, "not an expression", "an expression such as 'U * A * dT'",
                      repr(plain(node)))
            raise _Invalid
        try:
            return Expression(str(node.value), parse_expression(str(node.value)), node.loc)
        except ExpressionError as exc:
            ctx.error(node, path, exc.what, exc.expected, exc.got)
            raise _Invalid from None


@dataclass(frozen=True)
class UnitField(Field):
    """A unit text such as 'kW'."""

    def type_text(self) -> str:
        return "unit"

    def convert(self, node, ctx, path):
        try:
            parse_unit(str(node.value))
        except UnitProblem as p:
            ctx.error(node, path, p.what, p.expected, p.got)
            raise _Invalid from None
        return (str(node.value), node.loc)


STEP_FIELDS = (
    Text("name", "the result's name, usable by later steps and by ref"),
    ExpressionField("expr", "the expression"),
    UnitField("unit", "unit of the result", default="1"),
    Text("label", "what the step computes, in words", default=""),
    Text("source", "where the formula comes from", default=""),
)


def _compute(inp, out):
    names: dict[str, Given] = dict(inp.given)
    for i, step in enumerate(inp.steps):
        name = step["name"]
        expr: Expression = step["expr"]
        unit, unit_loc = step["unit"] if isinstance(step["unit"], tuple) else (step["unit"],
                                                                                 expr.loc)
        where = f"{out.block_key}.steps[{i}]"
        if not name.isidentifier() or name in FUNCTIONS or name in CONSTANTS:
            raise InputError(expr.loc, where, f"'{name}' cannot be a step name",
                             "a name of letters, digits and _", repr(name))
        if name in names:
            raise InputError(expr.loc, where, f"'{name}' is already defined",
                             "a new name", repr(name))
        q = _evaluate(expr.tree, names, expr.loc, f"{out.block_key}.steps[{i}] ({name})")
        lone = unit.strip() in _LONE_TEMPERATURES
        target = parse_unit("K" if lone else unit)
        if q.dimensionality != ureg.Quantity(1.0, target).dimensionality:
            raise InputError(expr.loc, f"{out.block_key}.steps[{i}] ({name})",
                             "the expression's unit does not match the step's unit",
                             f"{dimension_text(target)} for '{unit}'",
                             dimension_text(q.units))
        si = si_unit_for("K" if lone else unit)
        value_si = float(q.to(parse_unit(si)).magnitude) if si != "1" else float(
            q.to("dimensionless").magnitude)
        temperature = ABSOLUTE if lone else None
        symbolic = to_latex(expr.tree, lambda n: symbol_latex(n) if n not in CONSTANTS
                            else CONSTANTS[n][2])
        substituted = to_latex(expr.tree, lambda n: _substitute(n, names))
        out.step(symbol_latex(name), symbolic, substituted, value_si, si,
                 label=step["label"], source=step["source"], display_unit=unit)
        out.result(name, value_si, unit=si, meaning=step["label"], temperature=temperature,
                   display=unit)
        names[name] = Given(ureg.Quantity(value_si, parse_unit(si)) if si != "1" else
                            ureg.Quantity(value_si, "dimensionless"),
                            latex_quantity(value_si, si, unit if not lone else "K",
                                           out.precision), temperature)


def _substitute(name: str, names: dict[str, Given]) -> str:
    if name in names:
        return names[name].latex
    if name == "pi":
        return r"\pi"
    value, unit, _ = CONSTANTS[name]
    return latex_quantity(value, unit, None, 4)


FORMULA = Kind(
    name="formula",
    title="Worked formula",
    summary="The engineer's own steps: given values, expressions with units checked, checks.",
    inputs=(
        FreeMapping("given", "named input values (quantities, refs or named values)",
                    default=REQUIRED, convert_value=_given_value),
        Items("steps", "the steps in order, each {name, expr, unit, label, source}",
              fields=STEP_FIELDS, min_items=1),
    ),
    results=(),
    compute=_compute,
    open_results=True,
    inputs_at_block_level=True,
)

KINDS = (FORMULA,)

