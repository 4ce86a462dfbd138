"""The one pint registry, quantity parsing at the input boundary, and display formatting.

Computation runs on coherent SI floats; pint is used only here, at the edges. The registry is built
without ``autoconvert_offset_to_baseunit`` on purpose: that option turns ``W/(m*degC)`` into a value
274 times too small. Absolute temperatures are split from their number and converted to kelvin
before any arithmetic; inside a compound unit ``degC`` and ``degF`` are read as per-degree
differences (docs/format.md, Values).
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import pint

from calcdoc.errors import CalcdocError

__all__ = [
    "ureg", "UnitProblem", "parse_unit", "parse_quantity_text", "convert", "dimension_text",
    "same_dimension", "split_quantity", "unit_text_of", "suggest_unit", "si_unit_for", "ABSOLUTE", "DIFFERENCE",
]

# Unit typography is a display rule (calcdoc.render.numbers); messages here use it too.
from calcdoc.render.numbers import normalise_unit_text as _normalise_unit_text  # noqa: E402
from calcdoc.render.numbers import pretty_unit  # noqa: E402

ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=False)

ABSOLUTE = "absolute"
DIFFERENCE = "difference"

_LONE_ABSOLUTE = {"degC": "degC", "degF": "degF", "K": "K", "kelvin": "K", "degR": "degR",
                  "celsius": "degC", "fahrenheit": "degF", "degree_Celsius": "degC",
                  "degree_Fahrenheit": "degF"}
_LONE_DIFFERENCE = {"K", "kelvin", "delta_degC", "delta_degF", "delta_celsius", "delta_fahrenheit"}

_UNIT_CHARACTERS = re.compile(r"^[A-Za-z_%0-9 ./*^()\-]+$")

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


class UnitProblem(CalcdocError, ValueError):
    """A unit or quantity text that cannot be read; carries expected and got for the message."""

    def __init__(self, what: str, expected: str | None = None, got: str | None = None,
                 hint: str | None = None):
        self.what, self.expected, self.got, self.hint = what, expected, got, hint
        super().__init__(what)


def _compound_degrees_as_differences(text: str) -> str:
    # Inside a compound unit a degree is a per-degree difference: W/(m*degC) = W/(m*K).
    return re.sub(r"(?<![A-Za-z_])deg([CF])(?![A-Za-z_])", r"delta_deg\1", text)


@lru_cache(maxsize=512)
def parse_unit(text: str) -> pint.Unit:
    """Return the pint unit for a unit text; degC/degF inside compound units are differences."""
    text = _normalise_unit_text(text)
    if text in ("", "1", "dimensionless"):
        return ureg.dimensionless
    if text not in _LONE_ABSOLUTE:
        text = _compound_degrees_as_differences(text)
    unit = _read_unit(text)
    if unit is None:
        suggestion = suggest_unit(text)
        raise UnitProblem(f"unknown unit '{text[:60]}'", "a unit pint knows, such as m, "
                          "W/(m*K), degC", repr(text[:60]),
                          f"did you mean '{suggestion}'?" if suggestion else None)
    return unit


def _read_unit(text: str) -> pint.Unit | None:
    if len(text) > 60 or not _UNIT_CHARACTERS.match(text):
        return None
    try:
        unit = ureg.parse_units(text)
        ureg.Quantity(1.0, unit).to_base_units()  # a unit that cannot convert is no unit
    except Exception:  # noqa: BLE001 - pint reading user text raises many kinds
        return None
    return unit


# Units as engineers type them in a hurry: a power without its caret (m2), a product without
# its star (mK), a denominator without brackets (W/m2K), degrees with a space (deg C).
_UNIT_WORDS = sorted(["W", "kW", "MW", "J", "kJ", "MJ", "m", "mm", "cm", "km", "K", "kg", "g",
                      "s", "h", "min", "Pa", "kPa", "N", "degC", "degF", "delta_degC", "Btu",
                      "ft", "in", "lb"], key=len, reverse=True)


def suggest_unit(text: str) -> str | None:
    """Return the unit a mistyped unit text most likely means ('m2' → 'm^2', 'W/m2K' →
    'W/(m^2*K)'), or None when no reading of it is a unit."""
    guess = text.strip().replace("deg C", "degC").replace("deg F", "degF")
    guess = re.sub(r"([A-Za-z])(\d)", r"\1^\2", guess)  # m2 → m^2

    def product(part: str) -> str:
        """'m^2K' → 'm^2*K': split a run of unit words written together."""
        words, rest = [], part
        while rest:
            for word in _UNIT_WORDS:
                match = re.match(re.escape(word) + r"(\^\d+)?", rest)
                if match:
                    words.append(match.group(0))
                    rest = rest[match.end():]
                    break
            else:
                return part
        return "*".join(words)

    numerator, slash, denominator = guess.partition("/")
    numerator = product(numerator) if "*" not in numerator and "(" not in numerator else \
        numerator
    if slash:
        denominator = product(denominator) if "(" not in denominator else denominator
        if "*" in denominator and not denominator.startswith("("):
            denominator = f"({denominator})"
        guess = f"{numerator}/{denominator}"
    else:
        guess = numerator
    if guess != text and _read_unit(_compound_degrees_as_differences(guess)) is not None:
        return guess
    return None


# Names a building engineer uses for common dimensions, with the coherent SI unit of each.
_DIMENSION_NAMES = {
    "m": "length", "m^2": "area", "m^3": "volume", "K": "temperature", "s": "time",
    "kg": "mass", "W": "power", "W/m^2": "heat flux", "W/m": "heat flow per length",
    "W/(m*K)": "thermal conductivity", "m^2*K/W": "thermal resistance",
    "W/(m^2*K)": "heat transfer coefficient", "m*K/W": "thermal resistance per length",
    "kg/m^3": "density", "J/(kg*K)": "specific heat capacity", "1/m": "inverse length",
    "Pa": "pressure or stress", "J/m^2": "energy per area", "J/(m^2*s^0.5*K)": "thermal inertia",
    "m^0.5": "square root of length", "J": "energy or moment", "m^2/s": "diffusivity",
    "m/s": "speed",
}


@lru_cache(maxsize=None)
def _dimension_names() -> dict[str, str]:
    return {str(ureg.Quantity(1.0, u).dimensionality): f"{name} [{pretty_unit(u)}]"
            for u, name in _DIMENSION_NAMES.items()}


def dimension_text(unit: str | pint.Unit) -> str:
    """Return the dimension of a unit in words an engineer reads: 'thermal conductivity
    [W/(m·K)]', or for a dimension without a name its coherent SI unit, 'unit kg/(s³·K)'."""
    u = parse_unit(unit) if isinstance(unit, str) else unit
    dim = str(ureg.Quantity(1.0, _as_multiplicative(u)).dimensionality)
    if dim == "dimensionless":
        return "dimensionless"
    if dim in _dimension_names():
        return _dimension_names()[dim]
    return f"unit {pretty_unit(si_unit_for(u))}"


def _as_multiplicative(u: pint.Unit) -> pint.Unit:
    name = str(u)
    if name == "degree_Celsius":
        return ureg.kelvin
    if name == "degree_Fahrenheit":
        return ureg.degree_Rankine
    return u


def si_unit_for(unit: str | pint.Unit) -> str:
    """Return a coherent SI unit text with the unit's dimension, e.g. 'kW' → 'W'."""
    u = parse_unit(unit) if isinstance(unit, str) else unit
    dim = str(ureg.Quantity(1.0, _as_multiplicative(u)).dimensionality)
    if dim == "dimensionless":
        return "1"
    for candidate in _DIMENSION_NAMES:
        if str(ureg.Quantity(1.0, candidate).dimensionality) == dim:
            return candidate
    base = ureg.Quantity(1.0, _as_multiplicative(u)).to_base_units().units
    numerator = [f"{n}^{p:g}" if p != 1 else n for n, p in _base_parts(base) if p > 0]
    denominator = [f"{n}^{-p:g}" if p != -1 else n for n, p in _base_parts(base) if p < 0]
    text = "*".join(numerator) or "1"
    if denominator:
        joined = "*".join(denominator)
        text += f"/({joined})" if len(denominator) > 1 else f"/{joined}"
    return text


def _base_parts(unit: pint.Unit) -> list[tuple[str, float]]:
    symbols = {"meter": "m", "kilogram": "kg", "second": "s", "kelvin": "K", "ampere": "A",
               "mole": "mol", "candela": "cd"}
    return [(symbols.get(name, name), float(power)) for name, power in unit._units.items()]


def same_dimension(a: str | pint.Unit, b: str | pint.Unit) -> bool:
    """Return True when two units (texts or pint units) have the same dimension."""
    return dimension_text(a) == dimension_text(b)


def _is_temperature(unit: pint.Unit) -> bool:
    return str(ureg.Quantity(1.0, _as_multiplicative(unit)).dimensionality) == "[temperature]"


@lru_cache(maxsize=8192)  # a pure function of its texts; a package writes the same few often
def parse_quantity_text(text: str, si_unit: str, temperature: str | None = None,
                        percent_required: bool = False) -> tuple[float, str]:
    """Return (value in ``si_unit``, the unit as written) for a quantity text.

    ``temperature`` is 'absolute' or 'difference' for temperature inputs; an absolute temperature
    may be written in K, degC or degF, a difference only in K, delta_degC or delta_degF.
    Raises UnitProblem with expected/got texts for the caller to locate.
    """
    match = _NUMBER.match(str(text))
    if not match:
        raise UnitProblem("not a quantity", f"a number and a unit in {pretty_unit(si_unit)}",
                          repr(text))
    number = float(match.group(1))
    if not math.isfinite(number) or abs(number) > 1e100:
        raise UnitProblem("not a finite number", "a magnitude below 1e+100",
                          repr(match.group(1)[:30]))
    unit_text = _normalise_unit_text(match.group(2))
    target = parse_unit(si_unit)
    if unit_text in ("", "1", "dimensionless"):
        if str(target) != "dimensionless" or percent_required:
            expected = "a percentage such as '1.5 %'" if percent_required else \
                f"a unit of {dimension_text(si_unit)} such as {pretty_unit(si_unit)}"
            raise UnitProblem("a number without a unit", expected, repr(text))
        return number, ""
    if percent_required and unit_text not in ("%", "percent"):
        raise UnitProblem("a fraction must be written with %", "a percentage such as '1.5 %'",
                          repr(text))
    is_temp_target = _is_temperature(target)
    if is_temp_target and temperature == ABSOLUTE:
        if unit_text in ("delta_degC", "delta_degF"):
            raise UnitProblem("a temperature difference unit for an absolute temperature",
                              "an absolute temperature in K, degC or degF", repr(text))
        if unit_text not in _LONE_ABSOLUTE:
            raise UnitProblem("not a temperature", "an absolute temperature in K, degC or degF",
                              repr(text))
        q = ureg.Quantity(number, ureg.parse_units(_LONE_ABSOLUTE[unit_text]))
        return float(q.to(ureg.kelvin).magnitude), unit_text
    if is_temp_target and temperature == DIFFERENCE:
        if unit_text in ("degC", "degF", "celsius", "fahrenheit"):
            raise UnitProblem("a temperature difference written as an absolute temperature",
                              "a difference in K, delta_degC or delta_degF", repr(text),
                              hint=f"write '{match.group(1)} K' or '{match.group(1)} delta_{unit_text}'")
    try:
        unit = parse_unit(unit_text)
    except UnitProblem as problem:
        problem.hint = _letter_in_number_hint(str(text)) or problem.hint
        raise
    if not same_dimension(unit, target):
        raise UnitProblem("wrong dimension", dimension_text(target),
                          f"{dimension_text(unit)} in {str(text)!r}")
    try:
        value = float(ureg.Quantity(number, unit).to(target).magnitude)
    except (ArithmeticError, ValueError) as exc:
        raise UnitProblem("cannot convert", f"a value in {pretty_unit(si_unit)}",
                          f"{text!r} ({exc})") from None
    if not math.isfinite(value):
        raise UnitProblem("not a finite number", "a finite value", repr(text))
    return value, unit_text


_LOOKALIKE_DIGITS = str.maketrans({"O": "0", "o": "0", "l": "1", "I": "1"})


def _letter_in_number_hint(text: str) -> str | None:
    """Return a hint when a letter typed for a digit ('15O mm', '1O0 W') split the number, so
    that the rest was read as an unknown unit; None when that is not what happened."""
    match = re.match(r"^\s*([-+]?[\d.]*\d[\d.OolI]*)(\s*)(.*?)\s*$", text)
    if match is None or match.group(1).translate(_LOOKALIKE_DIGITS) == match.group(1):
        return None
    number = match.group(1).translate(_LOOKALIKE_DIGITS)
    try:
        float(number)
        parse_unit(match.group(3))
    except (ValueError, UnitProblem):
        return None
    return f"a letter in the number? did you mean '{number} {match.group(3)}'?"


def split_quantity(text: str) -> tuple[float, str]:
    """Return (number, unit text) of a quantity text such as '240 m^2'; the number finite."""
    match = _NUMBER.match(str(text))
    if not match:
        raise UnitProblem("not a quantity", "a number and a unit, such as '240 m^2'",
                          repr(str(text)[:60]))
    number = float(match.group(1))
    if not math.isfinite(number) or abs(number) > 1e100:
        raise UnitProblem("not a finite number", "a magnitude below 1e+100",
                          repr(match.group(1)[:30]))
    return number, _normalise_unit_text(match.group(2))


def unit_text_of(text: str) -> str:
    """Return the unit part of a quantity text as written ('240 m^2' → 'm^2'; '3' → '')."""
    match = _NUMBER.match(str(text))
    return _normalise_unit_text(match.group(2)) if match else ""


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """Return ``value`` converted between two unit texts; absolute degC/degF handled by offset."""
    if from_unit == to_unit:
        return value
    f = _normalise_unit_text(from_unit)
    t = _normalise_unit_text(to_unit)
    if f in _LONE_ABSOLUTE and t in _LONE_ABSOLUTE:
        q = ureg.Quantity(value, ureg.parse_units(_LONE_ABSOLUTE[f]))
        return float(q.to(ureg.parse_units(_LONE_ABSOLUTE[t])).magnitude)
    return float(ureg.Quantity(value, parse_unit(f)).to(parse_unit(t)).magnitude)


