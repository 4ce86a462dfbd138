"""How numbers, quantities and units print: one home for every display rule.

Plain text for tables and words ('0.273 W/(m²·K)', '−4 °C', '1.23×10⁻⁵'), LaTeX for formulas, and
the machine form of a printed quantity for results.json ('0.273 W/(m^2*K)', the same digits in
a unit pint reads). Absolute temperatures in kelvin are shown to 0.01 K; differences never are.
"""

from __future__ import annotations

import math
import re

__all__ = ["format_number", "format_quantity", "pretty_unit", "latex_unit", "latex_number",
           "latex_quantity", "pretty_written", "display_unit_for", "kelvin_digits",
           "machine_number", "half_unit", "normalise_unit_text"]

ABSOLUTE = "absolute"
DIFFERENCE = "difference"

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def normalise_unit_text(text: str) -> str:
    """Return a unit text with typographic signs spelt as pint reads them (°C → degC, ² → ^2)."""
    text = text.strip()
    for a, b in (("°C", "degC"), ("°F", "degF"), ("℃", "degC"), ("²", "^2"), ("³", "^3"),
                 ("·", "*"), ("⋅", "*"), ("µ", "u"), ("Ω", "ohm")):
        text = text.replace(a, b)
    return text


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """Return ``value`` converted between two unit texts (see :func:`calcdoc.units.convert`)."""
    from calcdoc.units import convert as units_convert
    return units_convert(value, from_unit, to_unit)


# Display units for `units: US` (display only: computation stays in coherent SI).
_US_UNITS = {
    "m": "ft", "m^2": "ft^2", "m^3": "ft^3", "W": "Btu/h", "W/m^2": "Btu/(h*ft^2)",
    "W/m": "Btu/(h*ft)", "W/(m*K)": "Btu/(h*ft*degF)", "m^2*K/W": "h*ft^2*degF/Btu",
    "W/(m^2*K)": "Btu/(h*ft^2*degF)", "m*K/W": "h*ft*degF/Btu", "kg/m^3": "lb/ft^3",
    "J/(kg*K)": "Btu/(lb*degF)", "kg": "lb", "Pa": "psi", "J/m^2": "Btu/ft^2",
}
_SMALL_LENGTHS = {"mm", "cm", "in", "millimeter"}


def display_unit_for(si_unit: str, preferred: str | None, temperature: str | None,
                     system: str = "SI") -> str:
    """Return the unit to show a value in: the preferred one (SI) or its US counterpart."""
    if system != "US":
        if preferred:
            return preferred
        return "degC" if temperature == ABSOLUTE else si_unit
    if temperature == ABSOLUTE:
        return "degF"
    if temperature == DIFFERENCE or (si_unit == "K" and temperature is None):
        return "delta_degF"
    if si_unit == "m" and preferred in _SMALL_LENGTHS:
        return "in"
    if preferred in ("min", "h", "s"):
        return preferred
    return _US_UNITS.get(si_unit, preferred or si_unit)



_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")
_PRETTY_NAMES = {"degC": "°C", "degF": "°F", "delta_degC": "°C", "delta_degF": "°F",
                 "percent": "%", "ohm": "Ω", "um": "µm", "1": "", "dimensionless": ""}


def _superscript(exponent: str) -> str:
    if exponent == "0.5":
        return "½"
    return exponent.translate(_SUPERSCRIPT)


def _reciprocal(text: str) -> str:
    """A reciprocal of one unit is printed with a negative power: '1/m' → 'm^-1'."""
    match = re.fullmatch(r"1\s*/\s*([A-Za-z]+)(?:\^(\d+))?", text)
    if match:
        return f"{match.group(1)}^-{match.group(2) or 1}"
    return text


def pretty_unit(unit: str) -> str:
    """Return a unit text for people: 'W/(m^2*K)' → 'W/(m²·K)', 'degC' → '°C'."""
    text = _reciprocal(normalise_unit_text(unit))
    if text in _PRETTY_NAMES:
        return _PRETTY_NAMES[text]
    text = re.sub(r"\^\((-?[\d.]+)\)|\^(-?[\d.]+)",
                  lambda m: _superscript(m.group(1) or m.group(2)), text)
    text = re.sub(r"\*\*(-?\d+)", lambda m: m.group(1).translate(_SUPERSCRIPT), text)
    text = re.sub(r"delta_deg([CF])", r"°\1", text)
    text = re.sub(r"(?<![A-Za-z_])deg([CF])", r"°\1", text)
    return text.replace("*", "·")


def latex_unit(unit: str) -> str:
    """Return the unit as upright LaTeX: 'W/(m^2*K)' → '\\mathrm{W/(m^{2}\\,K)}'."""
    text = _reciprocal(normalise_unit_text(unit))
    if text in ("", "1", "dimensionless"):
        return ""
    if text in ("%", "percent"):
        return r"\%"
    text = re.sub(r"delta_deg([CF])|(?<![A-Za-z_])deg([CF])",
                  lambda m: "{}^{\\circ}" + (m.group(1) or m.group(2)), text)
    text = re.sub(r"\^\((-?[\d.]+)\)|\^(-?[\d.]+)", lambda m: "^{" + (m.group(1) or m.group(2)) + "}",
                  text)
    text = re.sub(r"\*\*(-?\d+)", r"^{\1}", text)
    text = text.replace("*", r"\cdot ")
    return r"\mathrm{" + text + "}"


def format_number(value: float, sig: int = 3) -> str:
    """Return ``value`` with ``sig`` significant figures for a report.

    Integers digits are never rounded away (12345.6 → '12346', not '12300'); very large or small
    magnitudes use powers of ten ('1.23×10⁻⁵').
    """
    if value is None:
        return "—"
    if isinstance(value, float) and (math.isnan(value) or math.isinf(value)):
        return str(value)
    if value == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(value)))
    if magnitude >= 5 or magnitude <= -4:
        mantissa = f"{value / 10 ** magnitude:.{max(sig - 1, 0)}f}"
        if float(mantissa) in (10.0, -10.0):
            magnitude += 1
            mantissa = f"{value / 10 ** magnitude:.{max(sig - 1, 0)}f}"
        return f"{mantissa.replace('-', '−')}×10{str(magnitude).translate(_SUPERSCRIPT)}"
    decimals = max(sig - 1 - magnitude, 0)
    text = f"{round(value, decimals):.{decimals}f}"
    if text.startswith("-") and float(text) == 0:
        text = text[1:]
    return text.replace("-", "−")


def pretty_written(text: str) -> str | None:
    """Return a quantity text as written, with display typography: '102.5 mm' → '102.5 mm',
    '0.5 W/(m*degC)' → '0.5 W/(m·°C)'. None when the text is not a number and a unit."""
    match = _NUMBER.match(str(text))
    if not match:
        return None
    number = match.group(1).replace("-", "−")
    unit = pretty_unit(match.group(2)) if match.group(2) else ""
    if not unit:
        return number
    return f"{number} {unit}"


def latex_number(value: float, sig: int = 3) -> str:
    """Return the number as LaTeX, with powers of ten as \\times 10^{n}."""
    text = format_number(value, sig).replace("−", "-")
    if "×10" in text:
        mantissa, power = text.split("×10")
        power = power.translate(str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-"))
        return rf"{mantissa} \times 10^{{{power}}}"
    return text


def kelvin_digits(value: float, unit: str, sig: int, difference: bool = False) -> int:
    # An absolute temperature in kelvin has three integer digits: show it to 0.01 K. Callers
    # that know they hold a difference say so; absolute temperatures below 200 K do not occur
    # in building work, so smaller values in K are read as differences.
    if difference or unit not in ("K", "kelvin"):
        return sig
    return max(sig, 5) if abs(value) >= 200 else sig


def format_quantity(value_si: float, si_unit: str, display_unit: str | None = None,
                    sig: int = 3, difference: bool = False) -> str:
    """Return '0.273 W/(m²·K)' for a value held in ``si_unit``, shown in ``display_unit``.

    ``difference``: the value is a temperature difference (never shown to 0.01 K)."""
    unit = display_unit or si_unit
    value = convert(value_si, si_unit, unit)
    sig = kelvin_digits(value, unit, sig, difference)
    shown = pretty_unit(unit)
    number = format_number(value, sig)
    if not shown:
        return number
    if shown == "%":
        return f"{number} %"
    return f"{number} {shown}"


def latex_quantity(value_si: float, si_unit: str, display_unit: str | None = None,
                   sig: int = 3, difference: bool = False) -> str:
    """Return the quantity as LaTeX with a thin space between number and unit."""
    unit = display_unit or si_unit
    value = convert(value_si, si_unit, unit)
    number = latex_number(value, kelvin_digits(value, unit, sig, difference))
    lu = latex_unit(unit)
    if value < 0:
        number = f"({number})" if not lu else number
    return f"{number}\\,{lu}" if lu else number


def machine_number(text: str) -> str:
    """Return a printed number in a form pint and Python read: '−1.23×10⁻⁵' → '-1.23e-5'."""
    text = text.replace("−", "-")
    if "×10" in text:
        mantissa, power = text.split("×10")
        power = power.translate(str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-"))
        return f"{mantissa}e{power}"
    return text


def half_unit(text: str) -> float:
    """Return half a unit of the last digit of a printed number ('11.1' → 0.05)."""
    plain = machine_number(text)
    mantissa, _, power = plain.partition("e")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    return 0.5 * 10.0 ** (-decimals + (int(power) if power else 0))
