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

from calcdoc.errors import InputError, Location
from calcdoc.kinds.base import (ABSOLUTE, DIFFERENCE, REQUIRED, Field, FreeMapping,
                                InputRecord, Items, Kind, Text, _Invalid, did_you_mean,
                                value_mapping)
from calcdoc.located import Node, plain
from calcdoc.data import Value
from calcdoc.render.numbers import pretty_written
from calcdoc.units import (UnitProblem, dimension_text, parse_quantity_text, parse_unit,
                           si_unit_for, split_quantity, unit_text_of, ureg)

__all__ = ["KINDS", "parse_expression", "to_latex", "FUNCTIONS"]

from calcdoc.expressions import (CONSTANTS, FUNCTIONS, MAX_EXPONENT,  # noqa: E402
                                 MAX_EXPRESSION_CHARS, MAX_EXPRESSION_DEPTH, MAX_MAGNITUDE,
                                 ExpressionError, names_in, parse_expression, symbol_latex,
                                 to_latex)

@dataclass
class Expression:
    text: str
    tree: ast.Expression
    loc: Location
    node: Node | None = None

    def loc_at(self, ast_node) -> Location:
        """Return the location of an operation inside the expression, for a caret."""
        offset = getattr(ast_node, "col_offset", 0) or 0
        return self.node.loc_at(offset) if self.node is not None else self.loc


# ------------------------------------------------------------------------ evaluation


@dataclass
class Given:
    """A value as a pint quantity (absolute temperatures in K), whether it is an absolute
    temperature, a temperature difference or neither (None: also a value written in K, which
    may be either), and the value to print where it is an operand of a step."""

    quantity: pint.Quantity
    value: Value | None
    temperature: str | None
    shown: str = ""  # as written or referred to, for messages


_DIFFERENCE_HINT = ("write a difference as '23 K' or '23 delta_degC', or subtract two "
                    "temperatures (T_i - T_e); an absolute temperature in a product, such as "
                    "sigma * T ** 4, is written in K")


def _evaluate(expr: "Expression", names: dict[str, Given], where: str) -> Given:
    """Return the value of an expression with its temperature kind (absolute, difference).

    Arithmetic runs on pint quantities in coherent units, so units are checked at every
    operation. An absolute temperature written in °C or °F (or taken from an absolute result)
    may be added to a difference, subtracted from another absolute temperature (giving a
    difference) and compared; multiplying, dividing or raising it to a power is refused: in an
    engineer's formula that is almost always a difference written as a temperature, and pint's
    kelvin arithmetic would then give a silently wrong number (23 °C taken as 296 K)."""

    def fail(node, what, expected, got, hint=None):
        raise InputError(expr.loc_at(node), where, what, expected, got, hint)

    def text_of(node) -> str:
        return ast.get_source_segment(expr.text, node) or ast.unparse(node)

    def check(node, q):
        magnitude = q.magnitude
        if isinstance(magnitude, complex):
            fail(node, "no real value", "a real number", f"{text_of(node)} (a negative value "
                 "to a fractional power)")
        magnitude = float(magnitude)
        if not math.isfinite(magnitude) or abs(magnitude) > MAX_MAGNITUDE:
            fail(node, "result too large or not a number", f"a magnitude below "
                 f"{MAX_MAGNITUDE:g}", f"{magnitude:.4g} from {text_of(node)}")
        return q

    def dimensionless(node, q, what):
        if not q.dimensionless:
            fail(node, f"{what} needs a dimensionless argument", "dimensionless",
                 dimension_text(q.units))
        return float(q.to("dimensionless").magnitude)

    def refuse_absolute(node, operand, value: Given, action: str):
        if value.temperature == ABSOLUTE:
            fail(operand, f"an absolute temperature is {action}", "a temperature difference",
                 f"{text_of(operand)} = {value.shown or 'an absolute temperature'}",
                 _DIFFERENCE_HINT)

    def go(node) -> Given:
        if isinstance(node, ast.Expression):
            return go(node.body)
        if isinstance(node, ast.Constant):
            return Given(ureg.Quantity(float(node.value), "dimensionless"), None, None)
        if isinstance(node, ast.Name):
            if node.id in names:
                return names[node.id]
            if node.id in CONSTANTS:
                value, unit, _ = CONSTANTS[node.id]
                return Given(ureg.Quantity(value, parse_unit(unit)), None, None)
            hint = did_you_mean(node.id, names)
            fail(node, f"unknown name '{node.id}'", "a name from given, an earlier step, pi or "
                 "sigma", repr(node.id), hint)
        if isinstance(node, ast.UnaryOp):
            value = go(node.operand)
            if isinstance(node.op, ast.USub):
                refuse_absolute(node, node.operand, value, "negated")
                return Given(-value.quantity, None, value.temperature)
            return value
        if isinstance(node, ast.BinOp):
            left, right = go(node.left), go(node.right)
            return binary(node, left, right)
        if isinstance(node, ast.Call):
            return call(node, [go(a) for a in node.args])
        raise ValueError(type(node).__name__)  # pragma: no cover - parse_expression guards

    def binary(node, left: Given, right: Given) -> Given:
        op = type(node.op)
        a, b = left.quantity, right.quantity
        kind = None
        if op in (ast.Mult, ast.Div, ast.Pow):
            action = {ast.Mult: "multiplied", ast.Div: "divided",
                      ast.Pow: "raised to a power"}[op]
            refuse_absolute(node, node.left, left, action)
            refuse_absolute(node, node.right, right, action if op is not ast.Div else
                            "a divisor")
        elif op is ast.Add:
            if left.temperature == ABSOLUTE and right.temperature == ABSOLUTE:
                fail(node, "two absolute temperatures are added", "an absolute temperature "
                     "plus a difference", f"{text_of(node.left)} + {text_of(node.right)}",
                     "a mean temperature is T_1 + (T_2 - T_1) / 2")
            kind = ABSOLUTE if ABSOLUTE in (left.temperature, right.temperature) else (
                DIFFERENCE if DIFFERENCE in (left.temperature, right.temperature) else None)
        else:  # Sub
            if right.temperature == ABSOLUTE and left.temperature != ABSOLUTE:
                fail(node, "an absolute temperature is subtracted from a difference",
                     "an absolute temperature minus a temperature", text_of(node))
            if left.temperature == ABSOLUTE:
                kind = DIFFERENCE if right.temperature == ABSOLUTE else ABSOLUTE
            elif DIFFERENCE in (left.temperature, right.temperature):
                kind = DIFFERENCE
        try:
            if op is ast.Pow:
                exponent = dimensionless(node.right, b, "a power")
                if abs(exponent) > MAX_EXPONENT:
                    fail(node, "exponent too large", f"|exponent| <= {MAX_EXPONENT:g}",
                         repr(exponent))
                if not a.dimensionless and exponent != round(exponent * 2) / 2:
                    fail(node, "a quantity with a unit can only be raised to a whole or half "
                         "power", "a whole or half exponent", repr(exponent))
                base = float(a.magnitude)
                if base == 0 and exponent < 0:
                    fail(node, "division by zero", "a non-zero base for a negative power",
                         text_of(node))
                if base != 0 and abs(exponent * math.log10(abs(base))) > 100:
                    fail(node, "result too large or not a number",
                         f"a magnitude below {MAX_MAGNITUDE:g}", f"{text_of(node)} overflows")
                result = a ** exponent
            elif op is ast.Add:
                result = a + b
            elif op is ast.Sub:
                result = a - b
            elif op is ast.Mult:
                result = a * b
            else:
                if float(b.magnitude) == 0:
                    fail(node, "division by zero", "a non-zero divisor",
                         f"{text_of(node.right)} = 0")
                result = a / b
        except pint.DimensionalityError as exc:
            fail(node, "units do not match", dimension_text(exc.units1),
                 dimension_text(exc.units2))
        except InputError:
            raise
        except (ZeroDivisionError, OverflowError, FloatingPointError, ValueError) as exc:
            fail(node, "cannot be evaluated", "a finite real result",
                 f"{text_of(node)} ({exc})")
        return Given(check(node, result), None, kind)

    def call(node, args: list[Given]) -> Given:
        name = node.func.id
        if name in ("min", "max"):
            if len(args) < 2:
                fail(node, f"{name} takes two or more arguments", "2 or more", str(len(args)))
            kinds = {g.temperature for g in args}
            if ABSOLUTE in kinds and len(kinds) > 1:
                fail(node, f"{name} of an absolute temperature and a difference",
                     "temperatures of one kind", text_of(node))
            try:
                values = [g.quantity.to(args[0].quantity.units) for g in args]
            except pint.DimensionalityError as exc:
                fail(node, "units do not match", dimension_text(exc.units1),
                     dimension_text(exc.units2))
            chosen = (min if name == "min" else max)(range(len(values)),
                                                     key=lambda i: values[i].magnitude)
            return Given(values[chosen], None, args[chosen].temperature)
        if len(args) != 1:
            fail(node, f"{name} takes one argument", "1 argument", f"{len(args)} arguments")
        value = args[0]
        a = value.quantity
        if name == "sqrt":
            refuse_absolute(node, node.args[0], value, "raised to a power")
            if float(a.magnitude) < 0:
                fail(node, "square root of a negative value", "a value >= 0",
                     f"{text_of(node.args[0])} = {float(a.magnitude):.4g}")
            return Given(check(node, a ** 0.5), None, None)
        if name == "abs":
            return Given(abs(a), None, value.temperature)
        x = dimensionless(node.args[0], a, name)
        if name in ("log", "log10") and x <= 0:
            fail(node, f"{name} of a value <= 0", "a positive argument", repr(x))
        if name == "exp" and x > 230:
            fail(node, "result too large or not a number", "exp of at most 230", repr(x))
        fn = {"exp": math.exp, "log": math.log, "log10": math.log10, "sin": math.sin,
              "cos": math.cos, "tan": math.tan}[name]
        try:
            result = fn(x)
        except (ValueError, OverflowError) as exc:
            fail(node, "cannot be evaluated", "a finite real result", f"{text_of(node)} ({exc})")
        return Given(check(node, ureg.Quantity(result, "dimensionless")), None, None)

    return go(expr.tree)


# ------------------------------------------------------------------------ fields


_LONE_TEMPERATURES = ("degC", "degF", "°C", "°F")


def _given_value(name: str, node: Node, ctx, path: str, key_loc: Location) -> Given:
    if not name.isidentifier() or name in FUNCTIONS or name in CONSTANTS:
        ctx.error(key_loc, path, f"'{name}' cannot be a name",
                  "a name of letters, digits and _ that is not a function or constant",
                  repr(name))
        raise _Invalid
    source, origin = "", "given"
    if node.is_map and "ref" in node.value:
        target = ctx.resolve_ref(node.value["ref"], path)
        if target.obj is not None or isinstance(target.value, list):
            ctx.error(node, path, "a formula takes single results", "a single result",
                      target.target)
            raise _Invalid
        q = ureg.Quantity(target.value, parse_unit(target.si_unit))
        ctx.records.append(InputRecord(path, name, f"ref {target.target}", target.value,
                                       target.si_unit, target.display_unit,
                                       f"result {target.target}", "ref", target.target, node.loc,
                                       temperature=target.temperature))
        return Given(q, Value(target.value, target.si_unit, target.display_unit,
                              target.temperature), target.temperature,
                     f"the result {target.target}")
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
        before = len(ctx.errors)
        value_node, source, origin = value_mapping(node, ctx, path, name)
        if len(ctx.errors) > before:
            raise _Invalid
        text = value_node.value
    else:
        value_node = node
        text = node.value
    if isinstance(text, bool) or not isinstance(text, (int, float, str)):
        ctx.error(value_node, path, f"'{name}' is not a quantity", "a quantity such as '240 m^2'",
                  repr(text))
        raise _Invalid
    if isinstance(text, (int, float)):
        if not math.isfinite(float(text)) or abs(float(text)) > MAX_MAGNITUDE:
            ctx.error(value_node, path, f"'{name}' is not a finite number",
                      f"a magnitude below {MAX_MAGNITUDE:g}", repr(text))
            raise _Invalid
        q = ureg.Quantity(float(text), "dimensionless")
        written_unit, temperature = "1", None
    else:
        try:
            number, unit = split_quantity(str(text))
            if unit in _LONE_TEMPERATURES:
                value_k, _ = parse_quantity_text(str(text), "K", ABSOLUTE)
                q = ureg.Quantity(value_k, "K")
                written_unit, temperature = "K", ABSOLUTE
            else:
                u = parse_unit(unit)
                q = ureg.Quantity(number, u)
                written_unit, temperature = unit or "1", (DIFFERENCE if str(u) in (
                    "delta_degree_Celsius", "delta_degree_Fahrenheit") else None)
                if temperature:
                    q = q.to("K")
                    written_unit = "K"
        except UnitProblem as problem:
            ctx.error(value_node, path, f"'{name}' is not a quantity",
                      "a number and a unit, such as '240 m^2'", f"{text!r} ({problem.what})",
                      problem.hint)
            raise _Invalid from None
    si = si_unit_for(written_unit)
    value_si = float(q.to(parse_unit(si)).magnitude) if si != "1" else float(
        q.to("dimensionless").magnitude)
    written_text = str(text)
    shown_unit = unit_text_of(written_text)
    record = InputRecord(path, name, written_text, value_si, si, shown_unit or None, source,
                         "named" if node.is_map and "named" in node.value else origin, None,
                         value_node.loc, temperature=temperature, written_unit=shown_unit)
    ctx.records.append(record)
    return Given(q, record.value(), temperature, pretty_written(written_text) or written_text)


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
            return Expression(str(node.value), parse_expression(str(node.value)), node.loc,
                              node)
        except ExpressionError as exc:
            ctx.error(node.loc_at(exc.offset), path, exc.what, exc.expected, exc.got, exc.hint)
            raise _Invalid from None


@dataclass(frozen=True)
class UnitField(Field):
    """A unit text such as 'kW'."""

    def type_text(self) -> str:
        return "unit"

    def convert(self, node, ctx, path):
        if not node.is_scalar or isinstance(node.value, bool) or node.value is None:
            ctx.error(node, path, "not a unit", "a unit such as 'kW'", repr(plain(node)))
            raise _Invalid
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
        where = f"{out.block_key}.steps[{i}] ({name})"
        value = _evaluate(expr, names, where)
        q = value.quantity
        written = unit.strip()
        lone = written in _LONE_TEMPERATURES
        target = parse_unit("K" if lone else unit)
        if q.dimensionality != ureg.Quantity(1.0, target).dimensionality:
            raise InputError(expr.loc, where,
                             "the expression's unit does not match the step's unit",
                             f"{dimension_text(target)} for '{unit}'",
                             dimension_text(q.units))
        temperature = _step_temperature(value, written, target, expr, where)
        si = si_unit_for("K" if lone else unit)
        value_si = float(q.to(parse_unit(si)).magnitude) if si != "1" else float(
            q.to("dimensionless").magnitude)
        operands = {n: names[n].value for n in names_in(expr.tree)}
        result = out.step(name, expr.text, operands, value_si, si,
                          display=written if written not in ("", "1") else None,
                          temperature=temperature, label=step["label"], source=step["source"],
                          yields=name)
        names[name] = Given(ureg.Quantity(value_si, parse_unit(si)) if si != "1" else
                            ureg.Quantity(value_si, "dimensionless"), result, temperature,
                            f"the step {name}")


def _step_temperature(value: Given, written: str, target, expr, where: str) -> str | None:
    """Return whether a step's result is an absolute temperature or a difference.

    A step in degC or degF is absolute, in delta_degC or delta_degF a difference; a step in K
    is what its expression gives (absolute only when built from an absolute temperature). A
    difference declared absolute, or the reverse, is refused: it would print 20 K as −253 °C."""
    if str(ureg.Quantity(1.0, target).dimensionality) != "[temperature]":
        return None
    if written in _LONE_TEMPERATURES:
        if value.temperature == DIFFERENCE:
            raise InputError(expr.loc, where, "a temperature difference given an absolute unit",
                             "an absolute temperature for the unit " + written,
                             "a difference of temperatures",
                             "write the unit as K or delta_" + written.replace("°", "deg"))
        return ABSOLUTE
    if str(target) in ("delta_degree_Celsius", "delta_degree_Fahrenheit"):
        if value.temperature == ABSOLUTE:
            raise InputError(expr.loc, where, "an absolute temperature given a difference unit",
                             "a temperature difference for the unit " + written,
                             "an absolute temperature", "write the unit as degC or K")
        return DIFFERENCE
    return ABSOLUTE if value.temperature == ABSOLUTE else DIFFERENCE


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

