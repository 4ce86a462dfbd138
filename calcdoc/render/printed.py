"""Printed values, phrases and steps: the numbers a checker reads and can re-do by hand.

Every printed number comes from here. An input prints as written; a library or table value in
full; a computed value to the project's significant figures. A step prints its result to the
project's significant figures (the same text as the block result it gives), and each computed
operand with as many more figures as it takes for the step, evaluated from the printed operands,
to give the printed result within half a unit of its last digit (:func:`print_step`). An
absolute temperature that enters a product, a quotient or a power prints in K (σT⁴ as engineers
write it); one that is only added to or subtracted from prints in °C.

Each printed quantity has two forms: the text of the page ('−4 °C', '1.23×10⁻⁵ m') and the same
digits in a form pint reads ('-4 degC', '1.23e-5 m'), which results.json keeps.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

from calcdoc.data import ABSOLUTE, DIFFERENCE, Phrase, Step, Value
from calcdoc.expressions import (CONSTANTS, absolute_in_product, evaluate_float, number_latex,
                                 parse_expression, symbol_latex, to_latex)
from calcdoc.render.numbers import (display_unit_for, format_number, half_unit, kelvin_digits,
                                    latex_unit, machine_number, pretty_unit)
from calcdoc.units import convert

__all__ = ["Printed", "PrintedStep", "print_value", "fill", "print_step", "shown_unit",
           "MAX_EXTRA_DIGITS"]

MAX_EXTRA_DIGITS = 8
"""Most figures added to an operand beyond the project's, so that a step re-does."""

_GIVEN_DIGITS = 6


@dataclass(frozen=True)
class Printed:
    """A quantity as printed: the number's text, the unit it is in, and both forms."""

    number: str  # as on the page: '−4', '1.23×10⁻⁵'
    unit: str  # a unit text pint reads: 'degC', 'W/(m^2*K)', '' for a pure number

    @property
    def text(self) -> str:
        """The page's form: '−4 °C', '0.273 W/(m²·K)', '61.1 %'."""
        shown = pretty_unit(self.unit) if self.unit else ""
        return f"{self.number} {shown}" if shown else self.number

    @property
    def machine(self) -> str:
        """The same digits as pint reads them: '-4 degC', '0.273 W/(m^2*K)', '61.1 percent'."""
        number = machine_number(self.number)
        unit = {"%": "percent"}.get(self.unit, self.unit)
        if unit not in ("degC", "degF"):  # inside a compound unit a degree is a difference
            unit = re.sub(r"(?<![A-Za-z_])deg([CF])(?![A-Za-z_])", r"delta_deg\1", unit)
        return f"{number} {unit}" if unit and unit != "1" else number

    @property
    def latex(self) -> str:
        number = number_latex_text(self.number)
        lu = latex_unit(self.unit) if self.unit else ""
        return f"{number}\\,{lu}" if lu else number

    def si(self, si_unit: str) -> float:
        """The printed number converted back to ``si_unit`` (for re-doing a step)."""
        value = float(machine_number(self.number))
        return convert(value, self.unit or "1", si_unit) if self.unit else value


def number_latex_text(number: str) -> str:
    """A printed number as LaTeX: '−1.23×10⁻⁵' → '-1.23 \\times 10^{-5}'."""
    text = number.replace("−", "-")
    if "×10" in text:
        mantissa, power = text.split("×10")
        power = power.translate(str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-"))
        return rf"{mantissa} \times 10^{{{power}}}"
    return text


def shown_unit(value: Value, system: str = "SI") -> str:
    """Return the unit a value is shown in under the project's unit system."""
    if isinstance(value.si, str):
        return ""
    unit = display_unit_for(value.unit, value.display, value.temperature, system)
    return "" if unit in ("1", "dimensionless") else unit


_WRITTEN = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def _given_number(value: float) -> str:
    """A given number in full (up to six figures, no padding zeros): 0.035, 293.15, 1.2e-05."""
    if value == 0:
        return "0"
    text = f"{value:.{_GIVEN_DIGITS}g}"
    if "e" in text:
        mantissa, power = text.split("e")
        return f"{mantissa}×10{str(int(power)).translate(_SUPER)}".replace("-", "−")
    return text.replace("-", "−")


_SUPER = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")


def print_curve(curve) -> list[tuple[Printed, Printed]]:
    """Return a conductivity curve's points as printed: (temperature, conductivity) each in full,
    from ``[T in K, λ in W/(m·K)]`` pairs (the materials library's form)."""
    return [(print_value(Value(t, "K", temperature=ABSOLUTE, given=True), 3),
             print_value(Value(k, "W/(m*K)", given=True), 3)) for t, k in curve]


def print_value(value: Value, sig: int, system: str = "SI", kelvin: bool = False,
                index: int | None = None) -> Printed:
    """Return a value as printed: as written (an input), in full (a given number) or to ``sig``
    significant figures; ``kelvin`` prints an absolute temperature in K."""
    si = value.si[index] if index is not None else value.si
    unit = "K" if kelvin else shown_unit(value, system)
    if value.written is not None and not kelvin and index is None:
        match = _WRITTEN.match(value.written)
        if match and match.group(2) == unit:
            return Printed(match.group(1).replace("-", "−"), unit)
    shown = convert(float(si), value.unit, unit) if unit else float(si)
    if value.given:
        text = _given_number(shown)
        # In full where six figures hold the number; a conversion that does not (US units)
        # leaves it to the significant figures below, so that a step still re-does.
        again = float(machine_number(text))
        if math.isclose(again, shown, rel_tol=1e-12, abs_tol=0.0) or not math.isfinite(shown):
            return Printed(text, unit)
    difference = value.temperature == DIFFERENCE or (value.unit == "K" and
                                                     value.temperature is None)
    digits = kelvin_digits(shown, unit, sig, difference)
    return Printed(format_number(shown, digits), unit)


def fill(text: Phrase | str, sig: int, system: str = "SI") -> str:
    """Return a phrase with each named place filled by its value as printed."""
    if isinstance(text, str):
        return text
    if not text.values:
        return text.template
    return text.template.format(**{name: _phrase_value(v, sig, system)
                                   for name, v in text.values.items()})


def _phrase_value(value: Value, sig: int, system: str) -> str:
    if isinstance(value.si, str):
        return value.si
    if isinstance(value.si, (list, tuple)):
        return ", ".join(print_value(value, sig, system, index=i).text
                         for i in range(len(value.si)))
    return print_value(value, sig, system).text


@dataclass
class PrintedStep:
    """A step as printed: the texts of the page and the machine forms of results.json."""

    name: str
    label: str
    source: str
    expr: str | None
    values: dict  # operand → Printed
    result: Printed
    statement: str | None
    latex_symbol: str
    latex_formula: str
    latex_substituted: str
    latex_result: str
    yields: str | None = None
    group: str | None = None
    item: str | None = None
    extra_digits: int = 0
    symbols: dict = field(default_factory=dict)
    template: str | None = None  # a statement's words with its named places
    filled: dict = field(default_factory=dict)  # each named place as printed

    def record(self) -> dict:
        """The step as results.json keeps it (format 2)."""
        if self.expr is None:
            return {"name": self.name, "label": self.label, "statement": self.statement,
                    "result": self.result.machine, "source": str(self.source or "")}
        return {"name": self.name, "label": self.label, "expr": self.expr,
                "values": {k: p.machine for k, p in self.values.items()},
                "result": self.result.machine, "source": str(self.source or "")}


def _symbol(name: str, symbols: dict) -> str:
    if name in symbols:
        return symbols[name]
    if name in CONSTANTS:
        return CONSTANTS[name][2]
    return symbol_latex(name)


def print_step(step: Step, sig: int, system: str = "SI") -> PrintedStep:
    """Return a step as printed, with enough figures on each computed operand for the step to
    re-do from the printed numbers to the printed result."""
    label = fill(step.label, sig, system)
    result = print_value(step.result, sig, system)
    symbol = _symbol(step.name, step.symbols)
    if step.expr is None:
        statement = step.statement
        filled = {k: _phrase_value(v, sig, system) for k, v in statement.values.items()} \
            if isinstance(statement, Phrase) else {}
        return PrintedStep(step.name, label, step.source, None, {}, result,
                           fill(statement, sig, system), symbol, "", "", result.latex,
                           step.yields, step.group, step.item, template=getattr(
                               statement, "template", None), filled=filled)
    tree = parse_expression(step.expr)
    absolute = {n for n, v in step.operands.items() if v.temperature == ABSOLUTE}
    kelvin = absolute_in_product(tree, absolute)
    target = float(machine_number(result.number))
    tolerance = half_unit(result.number) * (1 + 1e-9) + 1e-300
    extra = 0
    while True:
        printed = {n: print_value(v, sig + extra, system, kelvin=n in kelvin)
                   for n, v in step.operands.items()}
        if _redoes(tree, step, printed, result, target, tolerance) or \
                extra >= MAX_EXTRA_DIGITS:
            break
        extra += 1
    formula = to_latex(tree, lambda n: _symbol(n, step.symbols))
    substituted = to_latex(tree, lambda n: _substituted(n, printed))
    return PrintedStep(step.name, label, step.source, step.expr, printed, result, None, symbol,
                       formula, substituted, result.latex, step.yields, step.group, step.item,
                       extra, step.symbols)


def _redoes(tree, step: Step, printed: dict, result: Printed, target: float,
            tolerance: float) -> bool:
    try:
        again = evaluate_float(tree, {n: p.si(step.operands[n].unit)
                                      for n, p in printed.items()})
        shown = convert(again, step.result.unit, result.unit) if result.unit else again
    except (ArithmeticError, ValueError):
        return False
    return math.isfinite(shown) and abs(shown - target) <= tolerance


def _substituted(name: str, printed: dict) -> str:
    if name in printed:
        p = printed[name]
        text = p.latex
        return rf"\left({text}\right)" if p.number.startswith("−") else text
    # pi and sigma are named constants of the formula language: written as their symbols, as
    # an engineer writes them (the Stefan–Boltzmann constant's value is stated with the method).
    return CONSTANTS[name][2]


# ----------------------------------------------------------------------------- results and checks


def result_value(out, name: str) -> Value:
    """Return a block result as a :class:`Value` shown in its display unit."""
    return out.value_of(name)


@dataclass(frozen=True)
class PrintedCheck:
    value: str
    limit: str
    margin: str
    utilisation: str
    note: str


def print_check(check, sig: int, system: str = "SI") -> PrintedCheck:
    """Return a check's value, limit and margin as printed; where the value and the limit would
    print the same but differ, both get more figures until they do not (a reader must see why a
    check that looks equal fails)."""
    note = fill(check.note, sig, system) if check.note is not None else ""
    difference = check.temperature is not None
    whole = getattr(check, "whole", False)
    limit_value = Value(check.limit_si, check.si_unit, check.display_unit, check.temperature,
                        given=whole)
    if check.value_si is None:
        return PrintedCheck(note, print_value(limit_value, sig, system).text, "—", "—", note)
    value = Value(check.value_si, check.si_unit, check.display_unit, check.temperature,
                  given=whole)
    digits = sig
    value_text = print_value(value, digits, system).text
    limit_text = print_value(limit_value, digits, system).text
    while value_text == limit_text and check.value_si != check.limit_si and digits < 12:
        digits += 1
        value_text = print_value(value, digits, system).text
        limit_text = print_value(limit_value, digits, system).text
    # A temperature margin is a difference, in K (°F difference under US units).
    margin_value = Value(check.margin_si, "K" if difference else check.si_unit,
                         None if difference else check.display_unit,
                         DIFFERENCE if difference else None, given=whole)
    utilisation = "—" if check.utilisation is None or math.isinf(check.utilisation) else \
        f"{check.utilisation:.2f}"
    return PrintedCheck(value_text, limit_text, print_value(margin_value, digits, system).text,
                        utilisation, note)
