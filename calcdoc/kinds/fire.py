"""Fire exposure kinds: ``fire_curve`` and ``steel_member_heating`` (docs/format.md).

A fire is passed between blocks as the curve itself: a ``fire_curve`` block publishes its
:class:`~calcdoc.physics.firecurves.FireCurve` as the object of its ``temperature`` series, and a
heated block takes it with ``fire: {ref: "FC1.fire.temperature"}`` or names a nominal curve inline
with ``fire: standard``. :class:`FireField` is that input type; other fire kinds import it from
here, with :func:`exposure_duration`, :func:`fire_convection`, :func:`fire_description` and
:data:`FIRE_CAUTION`.

Both kinds record data only (:mod:`calcdoc.data`): each curve's equation is a step at a
characteristic time, Annex A's quantities are steps, the steel heating shows its first explicit
increment with the numbers, and what a stepped solution gives (a time to a temperature, a
maximum) is a statement. A steel member given by its ``section`` rather than its section factor
first works out the section factor and the shadow factor as steps (``_steel_section``).
Figures are :class:`~calcdoc.data.FigureData`.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from calcdoc.data import (ABSOLUTE, DIFFERENCE, Axis, FigureData, Line, Mark, Phrase, Point,
                          Value, phrase)
from calcdoc.errors import InputError, MissingInput
from calcdoc.kinds._steel_section import SECTION_INPUT_NAMES, SectionFactors, section_steps
from calcdoc.kinds._steel_section import section_input
from calcdoc.kinds.base import (Choice, Field, InputRecord, InvalidInput, Kind, MaterialField,
                                Quantity, Record, ResultSpec, Text, did_you_mean)
from calcdoc.located import plain
from calcdoc.physics import MAX_DURATION
from calcdoc.physics.firecurves import (AMBIENT_TEMPERATURE, DEFAULT_DURATION, NAMED_FIRES,
                                        FireCurve, named_fire, parametric_fire, tabulated_fire)
from calcdoc.physics.sections import ENCASEMENTS
from calcdoc.physics.sections import EXPOSURES as SECTION_EXPOSURES
from calcdoc.physics.steel import (MINIMUM_UTILISATION, PROTECTED_MAX_TIME_STEP, STEEL_DENSITY,
                                   STEEL_TEMPERATURE_RANGE,
                                   UNPROTECTED_MAX_TIME_STEP,
                                   critical_temperature_from_utilisation, net_heat_flux,
                                   protected_steel_heating, protected_temperature_increment,
                                   protection_capacity_ratio, specific_heat_carbon_steel,
                                   temperature_at_time, time_to_temperature,
                                   unprotected_steel_heating, unprotected_temperature_increment)

__all__ = ["KINDS", "FireField", "exposure_duration", "fire_convection", "fire_description",
           "FIRE_CAUTION"]

#: The caution printed with every fire result (DESIGN.md, Safety).
FIRE_CAUTION = ("This calculation supports, and does not replace, the judgement of a licensed "
                "engineer and the requirements of the local code and the authority having "
                "jurisdiction.")

_NAMED_TEXT = " | ".join(NAMED_FIRES)
_FIRE_EXPECTED = (f"a named curve ({_NAMED_TEXT}) or {{ref: \"SHEET.block.temperature\"}} to a "
                  "fire_curve block")
_CURVE_WORDS = {"standard": "standard temperature-time curve",
                "external": "external fire curve",
                "hydrocarbon": "hydrocarbon curve",
                "tabulated": "tabulated curve",
                "parametric": "parametric fire"}

_KELVIN = 273.15
_TIME = dict(unit="s", display="min")


#: The clause of each curve, and of its convection coefficient, as cited beside a step or note
#: (a curve's own source text also states its limits; it is printed with the input).
_CURVE_CLAUSE = {"standard": "EN 1991-1-2:2002 §3.2.1, eq. (3.4)",
                 "external": "EN 1991-1-2:2002 §3.2.2, eq. (3.5)",
                 "hydrocarbon": "EN 1991-1-2:2002 §3.2.3, eq. (3.6)",
                 "parametric": "EN 1991-1-2:2002 Annex A"}
_CONVECTION_CLAUSE = {"standard": "EN 1991-1-2:2002 §3.2.1",
                      "external": "EN 1991-1-2:2002 §3.2.2",
                      "hydrocarbon": "EN 1991-1-2:2002 §3.2.3",
                      "parametric": "EN 1991-1-2:2002 §3.3.1.1"}


def _curve_clause(curve: FireCurve) -> str:
    return _CURVE_CLAUSE.get(curve.name, curve.source)


def _convection_clause(curve: FireCurve) -> str:
    return _CONVECTION_CLAUSE.get(curve.name, curve.source)


def fire_description(curve: FireCurve) -> Phrase:
    """Return a short description of a fire curve for the input table: what it is and its αc."""
    words = _CURVE_WORDS.get(curve.name, curve.name)
    return phrase(words + ", αc = {alpha}",
                  alpha=Value(curve.convection_coefficient, "W/(m^2*K)", given=True))


@dataclass(frozen=True)
class FireField(Field):
    """A fire: a nominal curve named inline (``standard``) or a ref to a fire_curve's series.

    The converted value is the :class:`FireCurve` itself. A named curve is built with the default
    duration (120 min); blocks take their own ``duration`` where they set one. The input is
    recorded with ``shown`` a :class:`~calcdoc.data.Phrase` (:func:`fire_description`).
    """

    def type_text(self) -> str:
        return f"fire: {_NAMED_TEXT}, or {{ref: \"SHEET.block.temperature\"}}"

    def convert(self, node, ctx, path):
        if node.is_scalar and isinstance(node.value, str):
            name = node.value
            if name not in NAMED_FIRES:
                hint = did_you_mean(name, NAMED_FIRES)
                if name in ("tabulated", "parametric"):
                    hint = f"a {name} curve needs its own fire_curve block; refer to it with ref"
                ctx.error(node, path, f"unknown fire curve '{name}'", _FIRE_EXPECTED, repr(name),
                          hint)
                raise InvalidInput
            curve = named_fire(name)
            ctx.records.append(InputRecord(path, self.meaning, name, name, "",
                                           source=_curve_clause(curve), origin="given",
                                           loc=node.loc,
                                           shown=fire_description(curve)))
            return curve
        if node.is_map and "ref" in node.value:
            extra = sorted(set(node.value) - {"ref"})
            if extra:
                ctx.error(node.key_locs[extra[0]], path, f"unknown key '{extra[0]}'", "ref",
                          repr(extra[0]))
                raise InvalidInput
            target = ctx.resolve_ref(node.value["ref"], path)
            if not isinstance(target.obj, FireCurve):
                ctx.error(node, path, f"'{self.name}' does not refer to a fire curve",
                          "the temperature series of a fire_curve block, e.g. "
                          "FC1.fire.temperature", target.target)
                raise InvalidInput
            curve = target.obj
            ctx.records.append(InputRecord(path, self.meaning, f"ref {target.target}",
                                           curve.name, "",
                                           source=f"result {target.target}; "
                                                  f"{_curve_clause(curve)}",
                                           origin="ref", ref=target.target, loc=node.loc,
                                           shown=fire_description(curve)))
            return curve
        ctx.error(node, path, f"'{self.name}' is not a fire", _FIRE_EXPECTED, repr(plain(node)))
        raise InvalidInput


def exposure_duration(duration: float | None, fire: FireCurve) -> float:
    """Return the block's duration [s]: its own, else the fire's."""
    return float(duration) if duration is not None else float(fire.duration)


def fire_convection(coefficient: float | None, fire: FireCurve) -> float:
    """Return αc [W/(m²·K)]: the block's own, else the fire's."""
    return float(coefficient) if coefficient is not None else float(fire.convection_coefficient)


# ----------------------------------------------------------------------------- helpers


def _record(out, path: str) -> InputRecord | None:
    for record in out.records:
        if record.path == path:
            return record
    return None


def _operand(out, path: str, si: float, unit: str, display: str | None = None,
             temperature: str | None = None) -> Value:
    """Return the input at ``path`` as written where it holds ``si``; else ``si`` as a given
    value (a default taken from the fire, a library property)."""
    record = _record(out, path)
    if record is not None and isinstance(record.si, (int, float)) and math.isclose(
            float(record.si), si, rel_tol=1e-12, abs_tol=0.0):
        return record.value()
    return Value(si, unit, display, temperature, given=True)


def _input_error(out, path: str, what: str, expected: str, got: str,
                 fallback: str = "") -> InputError:
    """Return an error located at the input ``path`` and naming it as written; an input that
    is not recorded (free text) is located at the input ``fallback``."""
    record = _record(out, path)
    if record is not None:
        got = repr(record.written)
    else:
        record = _record(out, fallback)
    return InputError(record.loc if record else None, f"{out.block_key}.inputs.{path}", what,
                      expected, got)


def _time(si: float, given: bool = False) -> Value:
    return Value(float(si), given=given, **_TIME)


def _kelvin(si: float, given: bool = False) -> Value:
    return Value(float(si), "K", temperature=ABSOLUTE, given=given)


def _celsius_top(highest: float) -> float:
    """Return a round upper limit for a temperature axis [K]: the next 100 °C above the data."""
    return (math.floor((highest - _KELVIN) / 100.0) + 1) * 100.0 + _KELVIN


#: Fixed constants of the standards' formulas, printed as the standards write them.
_THETA_20 = _kelvin(AMBIENT_TEMPERATURE, given=True)
_SYMBOL_20C = r"20\,\mathrm{{}^{\circ}C}"


# ----------------------------------------------------------------------------- input fields


@dataclass(frozen=True)
class _PointsField(Field):
    """Tabulated points: a list of ["time", "temperature"], each a quantity text."""

    def type_text(self) -> str:
        return 'list of ["time", "temperature"] (times strictly increasing from 0)'

    def convert(self, node, ctx, path):
        if not node.is_list or len(node.value) < 2:
            ctx.error(node, path, "'points' needs at least two points", self.type_text(),
                      repr(plain(node)))
            raise InvalidInput
        time_field = Quantity("time", unit="s")
        temperature_field = Quantity("temperature", unit="K", temperature=ABSOLUTE)
        points, failed, previous = [], False, None
        for i, item in enumerate(node.value):
            item_path = f"{path}[{i}]"
            if not item.is_list or len(item.value) != 2 or not all(v.is_scalar
                                                                    for v in item.value):
                ctx.error(item, item_path, "a point is not a pair", '["time", "temperature"], '
                          'e.g. ["30 min", "843 degC"]', repr(plain(item)))
                failed = True
                continue
            time_node, temperature_node = item.value
            try:
                t, _ = time_field.parse_text(time_node.value, ctx, time_node, item_path + "[0]")
                temperature, _ = temperature_field.parse_text(temperature_node.value, ctx,
                                                              temperature_node,
                                                              item_path + "[1]")
            except InvalidInput:
                failed = True
                continue
            if not temperature > 0.0:
                ctx.error(temperature_node, item_path + "[1]", "'temperature' out of range",
                          "an absolute temperature above 0 K", repr(temperature_node.value))
                failed = True
            if not points and t != 0.0:
                ctx.error(time_node, item_path + "[0]",
                          "the first point must be at the start of the exposure", "0 min",
                          repr(time_node.value))
                failed = True
            elif points and t <= points[-1][0]:
                ctx.error(time_node, item_path + "[0]", "times are not strictly increasing",
                          f"a time after {previous!r}", repr(time_node.value))
                failed = True
            points.append((t, temperature))
            previous = time_node.value
        if failed:
            raise InvalidInput
        temperatures = [p[1] for p in points]
        shown = phrase("{n} points, 0 to {end}, {low} to {high}",
                       n=Value(float(len(points)), given=True), end=_time(points[-1][0], True),
                       low=_kelvin(min(temperatures), True), high=_kelvin(max(temperatures), True))
        ctx.records.append(InputRecord(path, self.meaning, f"{len(points)} points",
                                       [list(p) for p in points], "", origin="given",
                                       loc=node.loc, shown=shown))
        return points


@dataclass(frozen=True)
class _ProtectionField(Record):
    """Fire protection: {thickness, conductivity, density, specific_heat} or
    {material, thickness}."""

    def convert(self, node, ctx, path):
        value = super().convert(node, ctx, path)
        own = [k for k in ("conductivity", "density", "specific_heat") if value[k] is not None]
        if value["material"] is not None:
            if own:
                ctx.error(node, path, "give either a material or the protection's properties",
                          "{material, thickness} or {thickness, conductivity, density, "
                          "specific_heat}", "material and " + ", ".join(own))
                raise InvalidInput
            material = value["material"]
            missing = [k for k in ("conductivity", "density", "specific_heat")
                       if material.get(k) is None]
            if missing:
                ctx.error(node, path, f"material '{material.get('name')}' lacks "
                          + ", ".join(missing), "a material with conductivity, density and "
                          "specific_heat", "missing " + ", ".join(missing))
                raise InvalidInput
            for key in ("conductivity", "density", "specific_heat"):
                value[key] = float(material[key])
            value["source"] = material.get("source", "")
            value["title"] = material.get("title", material.get("name", ""))
        else:
            missing = [k for k in ("conductivity", "density", "specific_heat")
                       if value[k] is None]
            if missing:
                ctx.error(node, path, "the protection's properties are incomplete",
                          "{thickness, conductivity, density, specific_heat} or "
                          "{material, thickness}", "missing " + ", ".join(missing))
                raise InvalidInput
            value["source"] = ""
            value["title"] = "fire protection"
        return value


# ----------------------------------------------------------------------------- fire_curve

_PARAMETRIC_INPUTS = ("opening_factor", "fire_load_density", "thermal_inertia", "fire_growth",
                      "floor_area", "height")
_TABULATED_INPUTS = ("points", "points_source")
_ANNEX_A = "EN 1991-1-2:2002 Annex A"


def _check_curve_inputs(inp, out):
    curve = inp.curve
    given = [name for name in _PARAMETRIC_INPUTS + _TABULATED_INPUTS if inp[name] is not None]
    allowed = {"parametric": _PARAMETRIC_INPUTS, "tabulated": _TABULATED_INPUTS}.get(curve, ())
    stray = [name for name in given if name not in allowed]
    if stray:
        raise _input_error(out, stray[0], f"input '{stray[0]}' does not apply to curve "
                           f"'{curve}'", "only the inputs of the chosen curve (docs/format.md, "
                           "fire_curve)", repr(inp[stray[0]]), fallback="curve")
    if curve == "parametric":
        missing = [n for n in _PARAMETRIC_INPUTS if inp[n] is None]
        if missing:
            raise MissingInput(missing[0], "every input of EN 1991-1-2 Annex A for curve "
                               "'parametric' (missing " + ", ".join(missing) + ")")
    if curve == "tabulated":
        if inp.points is None:
            raise MissingInput("points", "the points of curve 'tabulated'")
        if inp.convection_coefficient is None:
            raise MissingInput("convection_coefficient", "a convection coefficient for curve "
                               "'tabulated' (a tabulated curve has none of its own)")


def _build_curve(inp, out) -> FireCurve:
    name = str(inp.curve)
    if name in NAMED_FIRES:
        curve = named_fire(name, inp.duration if inp.duration is not None else DEFAULT_DURATION)
    elif name == "tabulated":
        curve = tabulated_fire([p[0] for p in inp.points], [p[1] for p in inp.points],
                               inp.convection_coefficient,
                               source=inp.points_source or "points tabulated in this block",
                               duration=inp.duration)
    else:
        curve = parametric_fire(inp.opening_factor, inp.fire_load_density, inp.thermal_inertia,
                                str(inp.fire_growth), inp.floor_area, inp.height,
                                inp.duration if inp.duration is not None else DEFAULT_DURATION)
    if inp.duration is None:
        out.note("Duration {d}: " + ("the last time of the table." if name == "tabulated"
                                     else "calcdoc's default exposure (docs/format.md, fire_curve)."),
                 "docs/format.md, fire_curve", d=_time(curve.duration, True))
    if inp.convection_coefficient is not None and name != "tabulated":
        out.note("Convection coefficient set to {alpha} in place of the curve's {own}.",
                 _convection_clause(curve), alpha=out.input("convection_coefficient"),
                 own=Value(curve.convection_coefficient, "W/(m^2*K)", given=True))
        curve = dataclasses.replace(curve, convection_coefficient=float(
            inp.convection_coefficient))
    return curve


def _series_times(curve: FireCurve, duration: float) -> np.ndarray:
    step = 30.0 if duration <= 4 * 3600.0 else 60.0
    times = list(np.arange(0.0, duration, step)) + [duration]
    if curve.t_max is not None and curve.t_max < duration:
        times.append(curve.t_max)
    if curve.points:
        times += [p[0] for p in curve.points if p[0] <= duration]
    return np.unique(np.asarray(times, dtype=float))


# The nominal curves of EN 1991-1-2:2002 §3.2 as steps: θg = 20 °C + a·f(t), t in minutes as a
# number, a the curve's rise in K.
_NOMINAL = {
    "standard": ("theta_0 + a * log10(8 * t + 1)", 345.0),
    "external": ("theta_0 + a * (1 - 0.687 * exp(-0.32 * t) - 0.313 * exp(-3.8 * t))", 660.0),
    "hydrocarbon": ("theta_0 + a * (1 - 0.325 * exp(-0.167 * t) - 0.675 * exp(-2.5 * t))",
                    1080.0),
}


def _rise(kelvin: float) -> tuple[Value, str]:
    """Return a fixed rise of a standard's formula as an operand, and its printed symbol."""
    return (Value(kelvin, "K", temperature=DIFFERENCE, given=True),
            rf"{kelvin:g}\,\mathrm{{K}}")


def _nominal_steps(curve: FireCurve, duration: float, out):
    expr, rise = _NOMINAL[curve.name]
    a, a_symbol = _rise(rise)
    out.step("theta_g", expr, {"theta_0": _THETA_20, "a": a,
                               "t": Value(duration / 60.0, given=True)},
             curve(duration), "K", temperature=ABSOLUTE, yields="theta_end",
             label=phrase("Gas temperature at the end of the exposure, t = {t} (in the formula "
                          "t in min)", t=_time(duration, True)),
             source=_curve_clause(curve),
             symbols={"theta_0": _SYMBOL_20C, "a": a_symbol})
    out.statement("theta_g_max", "The curve rises throughout the exposure: its highest "
                  "temperature is the one at the end.", curve(duration), yields="theta_max",
                  label="Highest gas temperature", source=_curve_clause(curve))
    out.statement("t_g_max", "The end of the exposure.", duration, yields="t_max",
                  label="Time of the highest gas temperature", source=_curve_clause(curve))


def _annex_a_temperature(out, name: str, t_star_hours: float, value: float, label, **kw):
    """Record eq. (A.1) at a fictitious time t* (a number of hours) as a step."""
    a, a_symbol = _rise(1325.0)
    return out.step(name, "theta_0 + a * (1 - 0.324 * exp(-0.2 * t_star) - 0.204 * exp(-1.7 * "
                          "t_star) - 0.472 * exp(-19 * t_star))",
                    {"theta_0": _THETA_20, "a": a, "t_star": Value(t_star_hours)}, value, "K",
                    temperature=ABSOLUTE, label=label, source=f"{_ANNEX_A}, eq. (A.1)",
                    symbols={"theta_0": _SYMBOL_20C, "a": a_symbol, "t_star": "t^*",
                             "theta_max": r"\theta_{max}"}, **kw)


def _parametric_steps(curve: FireCurve, duration: float, out):
    p = curve.parametric
    fuel = p.regime == "fuel-controlled"
    peak_within = p.t_max <= duration
    O, b, q = (out.input("opening_factor"), out.input("thermal_inertia"),
               out.input("fire_load_density"))
    O_ref = Value(0.04, "m^0.5", given=True)
    b_ref = Value(1160.0, "J/(m^2*s^0.5*K)", given=True)
    symbols = {"O_ref": "0.04", "b_ref": "1160", "q_t_d": "q_{t,d}", "t_max_v": "t_{max,v}",
               "t_lim": "t_{lim}", "t_max": "t_{max}", "Gamma_lim": r"\Gamma_{lim}",
               "O_lim": "O_{lim}", "t_star_max": "t^*_{max}", "t_star_max_c": "t^*_{max}",
               "t_star_end": "t^*", "t_end": "t", "q_ref": "75", "theta_max": r"\theta_{max}"}
    # Annex A's coefficients carry units (t in h, q_t,d in MJ/m²): as operands they print so.
    c_vent = Value(0.2e-3 * 3600.0 / 1e6, "s*m^0.5/(J/m^2)", "h*m^0.5/(MJ/m^2)", given=True)
    c_lim = Value(0.1e-3 * 3600.0 / 1e6, "s*m^0.5/(J/m^2)", "h*m^0.5/(MJ/m^2)", given=True)
    symbols.update({"c_vent": r"0.2\cdot10^{-3}", "c_lim": r"0.1\cdot10^{-3}"})

    gamma = out.step("Gamma", "(O / b) ** 2 / (O_ref / b_ref) ** 2",
                     {"O": O, "b": b, "O_ref": O_ref, "b_ref": b_ref}, p.gamma,
                     label="Time factor of the compartment", source=f"{_ANNEX_A}, eq. (A.2b)",
                     symbols=symbols)
    out.statement("t_lim", f"For {p.fire_growth} fire growth (25, 20 or 15 min for slow, "
                  "medium or fast growth).", p.limiting_time, "s", display="min",
                  label="Limiting time", source=f"{_ANNEX_A}, with eq. (A.7); Annex E, "
                  "Table E.5", symbols=symbols)
    t_lim = _time(p.limiting_time, True)
    t_vent = out.step("t_max_v", "c_vent * q_t_d / O", {"c_vent": c_vent, "q_t_d": q, "O": O},
                      c_vent.si * q.si / O.si, "s", display="h",
                      label="Duration of a ventilation-controlled heating phase",
                      source=f"{_ANNEX_A}, eq. (A.7)", symbols=symbols)
    regime = ("fuel-controlled (t_max = t_lim)" if fuel
              else "ventilation-controlled (t_max,v > t_lim)")
    t_max = out.step("t_max", "max(t_max_v, t_lim)", {"t_max_v": t_vent, "t_lim": t_lim},
                     p.t_max, "s", display="min",
                     label=f"Time of the peak: the fire is {regime}",
                     source=f"{_ANNEX_A}, eq. (A.7)", symbols=symbols,
                     yields="t_max" if peak_within else None)
    if fuel:
        o_lim = out.step("O_lim", "c_lim * q_t_d / t_lim", {"c_lim": c_lim, "q_t_d": q,
                                                            "t_lim": t_lim},
                         p.opening_factor_limit, "m^0.5", label="Limiting opening factor",
                         source=f"{_ANNEX_A}, eq. (A.10)", symbols=symbols)
        gamma_lim = out.step("Gamma_lim", "(O_lim / b) ** 2 / (O_ref / b_ref) ** 2",
                             {"O_lim": o_lim, "b": b, "O_ref": O_ref, "b_ref": b_ref},
                             p.gamma_limit, label="Time factor of the fuel-controlled fire",
                             source=f"{_ANNEX_A}, eq. (A.9)", symbols=symbols)
        q_ref = Value(75e6, "J/m^2", "MJ/m^2", given=True)
        if p.k_applied:
            k = out.step("k", "1 + (O - O_ref) / O_ref * (q_t_d - q_ref) / q_ref * "
                              "(b_ref - b) / b_ref",
                         {"O": O, "O_ref": O_ref, "q_t_d": q, "q_ref": q_ref, "b": b,
                          "b_ref": b_ref}, p.k,
                         label="Factor on Γ_lim: O > 0.04, q_t,d < 75 and b < 1160 all hold",
                         source=f"{_ANNEX_A}, with eq. (A.9)", symbols=symbols)
            heating = "t_lim * Gamma_lim * k"
            operands = {"t_lim": t_lim, "Gamma_lim": gamma_lim, "k": k}
        else:
            out.statement("k", "k = 1: its conditions, O > {O_ref}, q_t,d < {q_ref} and "
                          "b < {b_ref}, do not all hold.", 1.0,
                          values={"O_ref": O_ref, "q_ref": q_ref, "b_ref": b_ref},
                          label="Factor on Γ_lim", source=f"{_ANNEX_A}, with eq. (A.9)")
            heating = "t_lim * Gamma_lim"
            operands = {"t_lim": t_lim, "Gamma_lim": gamma_lim}
        t_star_max = out.step("t_star_max", heating, operands, p.t_star_max_heating * 3600.0,
                              "s", display="h", label="Fictitious time at the peak",
                              source=f"{_ANNEX_A}, eq. (A.8)", symbols=symbols)
    else:
        out.statement("x", "The peak is at t_max,v > t_lim: the fire is ventilation-controlled; "
                      "the heating phase runs on Γ and the cooling phase takes x = 1.", 1.0,
                      label="Regime of the fire", source=f"{_ANNEX_A}, eqs. (A.7), (A.11)")
        t_star_max = out.step("t_star_max", "t_max * Gamma", {"t_max": t_max, "Gamma": gamma},
                              p.t_star_max_heating * 3600.0, "s", display="h",
                              label="Fictitious time at the peak (also t*_max of the cooling "
                                    "phase)", source=f"{_ANNEX_A}, eqs. (A.2a), (A.12)",
                              symbols=symbols)
    theta_max = _annex_a_temperature(
        out, "theta_max", p.t_star_max_heating, p.theta_max,
        label=phrase("Peak gas temperature, at t* = t*_max = {ts} (in the formula t* in h)",
                     ts=t_star_max),
        yields="theta_max" if peak_within else None)

    # Cooling phase, eqs. (A.11) and (A.12).
    ts_cool = p.t_star_max  # hours
    if fuel:
        t_star_c = out.step("t_star_max_c", "t_max_v * Gamma", {"t_max_v": t_vent,
                                                                "Gamma": gamma},
                            p.t_star_max * 3600.0, "s", display="h",
                            label="t*_max of the cooling phase", source=f"{_ANNEX_A}, eq. (A.12)",
                            symbols=symbols)
        x = out.step("x", "t_lim * Gamma / t_star_max_c", {"t_lim": t_lim, "Gamma": gamma,
                                                           "t_star_max_c": t_star_c},
                     p.x, label="x of the cooling phase (fuel-controlled: t_max = t_lim)",
                     source=f"{_ANNEX_A}, eq. (A.11)", symbols=symbols)
    else:
        t_star_c = t_star_max
        x = Value(1.0, given=True)
    rate_label = "Cooling rate r in θg = θmax − r (t* − t*_max x), in K per hour of t*"
    if p.cooling_equation == "A.11b":
        rate = out.step("r", "r_0 * (3 - t_star_max)",
                        {"r_0": Value(250.0, "K", temperature=DIFFERENCE, given=True),
                         "t_star_max": Value(ts_cool)}, p.cooling_rate, "K",
                        temperature=DIFFERENCE, label=rate_label + " (0.5 h < t*_max < 2 h)",
                        source=f"{_ANNEX_A}, eq. (A.11b)",
                        symbols={**symbols, "r_0": r"250\,\mathrm{K}"})
    else:
        bound = ("t*_max = {ts} <= 0.5 h: eq. (A.11a), r = 625 K per hour of t*."
                 if p.cooling_equation == "A.11a" else
                 "t*_max = {ts} >= 2 h: eq. (A.11c), r = 250 K per hour of t*.")
        rate = out.statement("r", bound, p.cooling_rate, "K", temperature=DIFFERENCE,
                             values={"ts": t_star_c}, label=rate_label,
                             source=f"{_ANNEX_A}, eq. ({p.cooling_equation})")

    # The gas temperature at the end of the exposure: heating, cooling, or held at 20 °C.
    t_end = _time(duration, True)
    theta_end = curve(duration)
    if not peak_within:
        if fuel:  # the heating phase runs on Γ_lim (× k), eq. (A.8)
            heat = {"t_end": t_end, **{k: v for k, v in operands.items() if k != "t_lim"}}
            expr = "t_end * " + " * ".join(k for k in heat if k != "t_end")
        else:
            heat, expr = {"t_end": t_end, "Gamma": gamma}, "t_end * Gamma"
        t_star_end = out.step("t_star_end", expr, heat, duration * p.gamma_heating, "s",
                              display="h", label="Fictitious time at the end of the exposure",
                              source=f"{_ANNEX_A}, eq. (A.2a)" if not fuel
                              else f"{_ANNEX_A}, eq. (A.8)", symbols=symbols)
        _annex_a_temperature(out, "theta_g", t_star_end.si / 3600.0, theta_end,
                             label=phrase("Gas temperature at the end of the exposure, before "
                                          "the peak, at t* = {ts} (in the formula t* in h)",
                                          ts=t_star_end), yields="theta_end")
        out.statement("theta_g_max", "The exposure ends before the peak (t_max = {t_max}): "
                      "the highest temperature within it is the one at the end.", theta_end,
                      values={"t_max": t_max}, yields="theta_max",
                      label="Highest gas temperature within the exposure", source=_ANNEX_A)
        out.statement("t_g_max", "The end of the exposure.", duration, yields="t_max",
                      label="Time of the highest gas temperature within the exposure",
                      source=_ANNEX_A)
    elif duration < p.time_to_ambient:
        t_star_end = out.step("t_star_end", "t_end * Gamma", {"t_end": t_end, "Gamma": gamma},
                              duration * p.gamma, "s", display="h",
                              label="Fictitious time at the end of the exposure (cooling uses Γ)",
                              source=f"{_ANNEX_A}, eq. (A.11)", symbols=symbols)
        out.step("theta_g", "theta_max - r * (t_star_end - t_star_max * x)",
                 {"theta_max": theta_max, "r": rate, "t_star_end": Value(t_star_end.si / 3600.0),
                  "t_star_max": Value(ts_cool), "x": x}, theta_end, "K",
                 temperature=ABSOLUTE, yields="theta_end",
                 label="Gas temperature at the end of the exposure, on the cooling line "
                       "(in the formula t* in h)",
                 source=f"{_ANNEX_A}, eq. ({p.cooling_equation})", symbols=symbols)
    else:
        out.statement("theta_g", "The cooling line reaches 20 °C at {t20}, within the exposure; "
                      "the gas is then held at 20 °C.", theta_end, values={
                          "t20": _time(p.time_to_ambient)}, yields="theta_end",
                      label="Gas temperature at the end of the exposure",
                      source=f"{_ANNEX_A}, eq. ({p.cooling_equation})")
    out.note("Annex A of EN 1991-1-2 is informative: its use is subject to the National Annex. "
             "The fire is " + p.regime + ". The compartment is taken to have no openings in "
             "the roof, and the fire load to burn out completely (Annex A). Once the cooling "
             "line reaches 20 °C (at {t20}) the gas is held at 20 °C.", _ANNEX_A,
             t20=_time(p.time_to_ambient))


def _tabulated_steps(curve: FireCurve, duration: float, out):
    points = [p for p in curve.points if p[0] <= duration * (1 + 1e-12)]
    theta_end = curve(duration)
    at_point = math.isclose(points[-1][0], duration, rel_tol=1e-12)
    if at_point:
        out.statement("theta_g", "The point of the table at the end of the exposure, {t}.",
                      theta_end, values={"t": _time(duration, True)}, yields="theta_end",
                      label="Gas temperature at the end of the exposure", source=curve.source)
    else:
        (t_i, theta_i), (t_j, theta_j) = points[-1], curve.points[len(points)]
        out.step("theta_g", "theta_i + (theta_j - theta_i) * (t_end - t_i) / (t_j - t_i)",
                 {"theta_i": _kelvin(theta_i, True), "theta_j": _kelvin(theta_j, True),
                  "t_i": _time(t_i, True), "t_j": _time(t_j, True),
                  "t_end": _time(duration, True)}, theta_end, "K", temperature=ABSOLUTE,
                 yields="theta_end", label="Gas temperature at the end of the exposure, "
                                           "linear between the points either side",
                 source=curve.source, symbols={"t_end": "t"})
    candidates = points + [(duration, theta_end)]
    t_max, theta_max = max(candidates, key=lambda p: (p[1], -p[0]))
    if t_max == duration and not at_point:
        text, when = ("The curve rises from its last point to the end of the exposure: it is "
                      "highest at the end."), "The end of the exposure."
    else:
        text, when = ("The highest point of the table within the exposure (the curve is linear "
                      "between its points)."), "The time of that point."
    out.statement("theta_g_max", text, theta_max, yields="theta_max",
                  label="Highest gas temperature", source=curve.source)
    out.statement("t_g_max", when, t_max, yields="t_max",
                  label="Time of the highest gas temperature", source=curve.source)
    out.note("{n} points, linear interpolation between them; the curve is not extended outside "
             "the table (a time beyond its last point is refused).", curve.source,
             n=Value(float(len(curve.points)), given=True))


def _compute_fire_curve(inp, out):
    _check_curve_inputs(inp, out)
    curve = _build_curve(inp, out)
    duration = curve.duration
    if curve.name == "parametric":
        _parametric_steps(curve, duration, out)
    elif curve.name in NAMED_FIRES:
        _nominal_steps(curve, duration, out)
    else:
        _tabulated_steps(curve, duration, out)
    out.note("Convection coefficient of this fire: {alpha}; blocks heated by it use it unless "
             "they set their own.", _convection_clause(curve),
             alpha=Value(curve.convection_coefficient, "W/(m^2*K)", given=True))
    times = _series_times(curve, duration)
    temperature = np.asarray(curve(times), dtype=float)
    out.add_series("temperature", times, temperature, label=f"gas temperature ({curve.name})",
                   obj=curve)
    marks = ()
    if curve.t_max is not None and curve.t_max <= duration:
        marks = (Mark("x", float(curve.t_max), "peak, t_max", 3),)
    out.figure(FigureData(
        key=f"{out.block_key}-fire-curve",
        caption=f"Gas temperature–time curve ({curve.name}) of {out.block_key}",
        x=Axis("time t", "s", "min", (0.0, duration)),
        y=Axis("gas temperature θg", "K", "degC",
               (_KELVIN, _celsius_top(float(np.max(temperature))))),
        lines=(Line(tuple(times.tolist()), tuple(temperature.tolist()),
                    f"gas temperature θg ({curve.name})", 0),),
        marks=marks, legend="lower right"))


FIRE_CURVE = Kind(
    name="fire_curve",
    title="Fire curve",
    summary="Gas temperature–time exposure: the nominal curves of EN 1991-1-2 §3.2, a tabulated "
            "curve, or the parametric fire of EN 1991-1-2 Annex A.",
    inputs=(
        Choice("curve", "the temperature-time curve",
               options=("standard", "external", "hydrocarbon", "tabulated", "parametric")),
        Quantity("duration", "exposure duration (default 120 min; tabulated: the table's end)",
                 default=None, unit="s", greater_than=0.0, at_most=MAX_DURATION, display="min"),
        _PointsField("points", "tabulated curve: points [time, temperature]", default=None),
        Text("points_source", "tabulated curve: where the points come from", default=None),
        Quantity("convection_coefficient", "αc; default the curve's own: 25 standard and "
                 "external, 50 hydrocarbon, 35 parametric (EN 1991-1-2 §3.2–3.3); required for "
                 "a tabulated curve", default=None, unit="W/(m^2*K)", greater_than=0.0),
        Quantity("opening_factor", "parametric: opening factor O = A_v √h_eq / A_t "
                 "(EN 1991-1-2 Annex A: 0.02 to 0.20 m^½)", default=None, unit="m^0.5",
                 at_least=0.02, at_most=0.20),
        Quantity("fire_load_density", "parametric: design fire load density q_t,d related to "
                 "the total enclosure surface A_t (EN 1991-1-2 Annex A: 50 to 1000 MJ/m²)",
                 default=None, unit="J/m^2", at_least=50e6, at_most=1000e6, display="MJ/m^2"),
        Quantity("thermal_inertia", "parametric: b = √(ρcλ) of the enclosure boundary "
                 "(EN 1991-1-2 Annex A: 100 to 2200 J/(m²·s^½·K))", default=None,
                 unit="J/(m^2*s^0.5*K)", at_least=100.0, at_most=2200.0),
        Choice("fire_growth", "parametric: fire growth rate, t_lim 25 / 20 / 15 min "
               "(EN 1991-1-2 Annex A; Annex E Table E.5)", default=None,
               options=("slow", "medium", "fast")),
        Quantity("floor_area", "parametric: floor area of the compartment (EN 1991-1-2 "
                 "Annex A: at most 500 m²)", default=None, unit="m^2", greater_than=0.0,
                 at_most=500.0),
        Quantity("height", "parametric: compartment height (EN 1991-1-2 Annex A: at most 4 m)",
                 default=None, unit="m", greater_than=0.0, at_most=4.0),
    ),
    results=(
        ResultSpec("theta_max", "K", "highest gas temperature within the duration",
                   temperature=ABSOLUTE),
        ResultSpec("t_max", "s", "time of the highest gas temperature", display="min"),
        ResultSpec("theta_end", "K", "gas temperature at the end of the duration",
                   temperature=ABSOLUTE),
    ),
    compute=_compute_fire_curve,
    caution=FIRE_CAUTION + " A fire curve is a model of exposure, not a prediction of a real "
            "fire: its choice and parameters (fire load, openings, linings) are for the "
            "engineer and the authority to accept for the compartment as built and used.",
    # The physics functions' parameter names that are not the inputs' own.
    input_names={"times": "points", "temperatures": "points", "t": "duration",
                 "name": "curve"},
    references=("EN 1991-1-2:2002", "ISO 834-1:1999"),
)


# ----------------------------------------------------------------------------- steel heating

_UNPROTECTED_CLAUSE = "EN 1993-1-2:2005 §4.2.5.1"
_PROTECTED_CLAUSE = "EN 1993-1-2:2005 §4.2.5.2"
_STEEL_SYMBOLS = {
    "theta_a_cr": r"\theta_{a,cr}", "A_m_V": "A_m/V", "A_p_V": "A_p/V",
    "k_sh_A_m_V": r"k_{sh}\,A_m/V", "h_net": r"\dot h_{net}", "Delta_t": r"\Delta t",
    "Delta_theta_a_t": r"\Delta\theta_{a,t}", "Delta_theta_g_t": r"\Delta\theta_{g,t}",
    "theta_a": r"\theta_{a,t}", "theta_g": r"\theta_{g,t}", "theta_g_1": r"\theta_{g,t+\Delta t}",
    "theta_a_1": r"\theta_{a,t+\Delta t}", "c_1": r"1\,\mathrm{J/(kg\cdot K)}",
    "theta_482": r"482\,\mathrm{{}^{\circ}C}", "a": r"39.19\,\mathrm{K}",
    "theta_a_max": r"\theta_{a,max}", "theta_a_req": r"\theta_{a,req}", "t_cr": "t_{cr}",
}

# EN 1993-1-2:2005 eqs. (3.2a)–(3.2c), θa a number of °C; c_1 = 1 J/(kg·K) carries the unit.
_SPECIFIC_HEAT = (
    (600.0, "(425 + 0.773 * theta_a - 0.00169 * theta_a ** 2 + 0.00000222 * theta_a ** 3) * c_1",
     "eq. (3.2a)"),
    (735.0, "(666 + 13002 / (738 - theta_a)) * c_1", "eq. (3.2b)"),
    (900.0, "(545 + 17820 / (theta_a - 731)) * c_1", "eq. (3.2c)"),
)


def _critical_temperature(inp, out) -> Value:
    if inp.critical_temperature is not None:
        record = _record(out, "critical_temperature")
        return out.statement("theta_a_cr", "As stated in the inputs, with its source.",
                             inp.critical_temperature, yields="theta_critical",
                             label="Critical temperature",
                             source=(record.source if record else "") or "stated input",
                             symbols=_STEEL_SYMBOLS)
    theta_cr = critical_temperature_from_utilisation(inp.utilisation)
    value = out.step("theta_a_cr", "theta_482 + a * log(1 / (0.9674 * mu_0 ** 3.833) - 1)",
                     {"theta_482": _kelvin(482.0 + _KELVIN, True),
                      "a": Value(39.19, "K", temperature=DIFFERENCE, given=True),
                      "mu_0": out.input("utilisation")}, theta_cr, yields="theta_critical",
                     label="Critical temperature from the degree of utilisation (log is the "
                           "natural logarithm)",
                     source="EN 1993-1-2:2005 §4.2.4, eq. (4.22)", symbols=_STEEL_SYMBOLS)
    out.warn("θa,cr from μ0 by eq. (4.22) is valid only where deformation criteria and "
             "stability do not govern: not for columns, nor for beams prone to "
             "lateral-torsional buckling, which need a critical temperature from their own "
             "buckling check. The engineer confirms that this member is neither.",
             "EN 1993-1-2:2005 §4.2.4")
    return value


def _specific_heat_step(out, theta_a: float) -> Value:
    """Record c_a at the start of the first step (EN 1993-1-2:2005 §3.4.1.2)."""
    c_a = specific_heat_carbon_steel(theta_a)
    celsius = theta_a - _KELVIN
    label = phrase("Specific heat of the steel at θa,t = {theta} (in the formula θa in °C)",
                   theta=_kelvin(theta_a))
    for upper, expr, equation in _SPECIFIC_HEAT:
        if celsius < upper:
            return out.step("c_a", expr, {"theta_a": Value(celsius, given=True),
                                          "c_1": Value(1.0, "J/(kg*K)", given=True)},
                            c_a, "J/(kg*K)", label=label,
                            source=f"EN 1993-1-2:2005 §3.4.1.2, {equation}",
                            symbols={"c_1": _STEEL_SYMBOLS["c_1"]})
    return out.statement("c_a", "Constant from 900 °C to 1200 °C.", c_a, "J/(kg*K)",
                         label=label, source="EN 1993-1-2:2005 §3.4.1.2, eq. (3.2d)")


def _first_step_common(out, run):
    """Return the operands of the first explicit step: θa,t, θg,t, Δt."""
    theta_a = _operand(out, "initial_temperature", float(run.temperature[0]), "K",
                       temperature=ABSOLUTE)
    theta_g = _kelvin(run.gas_temperature[0])
    dt = float(run.time[1] - run.time[0])
    return theta_a, theta_g, _operand(out, "time_step", dt, "s")


def _unprotected_first_step(inp, out, run, alpha: float, factors):
    theta_a, theta_g, dt = _first_step_common(out, run)
    c_a = _specific_heat_step(out, theta_a.si)
    am_v, k_sh = factors.section_factor, factors.shadow_factor
    factor = out.step("k_sh_A_m_V", "k_sh * A_m_V", {"k_sh": k_sh, "A_m_V": am_v},
                      k_sh.si * am_v.si, "1/m",
                      label="Section factor with the shadow effect",
                      source=f"{_UNPROTECTED_CLAUSE}, eq. (4.25)", symbols=_STEEL_SYMBOLS)
    h_net = net_heat_flux(theta_g.si, theta_a.si, alpha, inp.emissivity_member,
                          inp.emissivity_fire, inp.configuration_factor)
    h_net = out.step(
        "h_net", "alpha_c * (theta_g - theta_a) + Phi * epsilon_m * epsilon_f * sigma * "
                 "(theta_g ** 4 - theta_a ** 4)",
        {"alpha_c": _operand(out, "convection_coefficient", alpha, "W/(m^2*K)"),
         "theta_g": theta_g, "theta_a": theta_a,
         "Phi": out.input("configuration_factor"), "epsilon_m": out.input("emissivity_member"),
         "epsilon_f": out.input("emissivity_fire")}, h_net, "W/m^2",
        label=phrase("Net heat flux into the member at the start of the first step, t = {t}, "
                     "θg from the fire's curve", t=_time(run.time[0], True)),
        source="EN 1991-1-2:2002 §3.1, eqs. (3.1)–(3.3)", symbols=_STEEL_SYMBOLS)
    delta = unprotected_temperature_increment(theta_g.si, theta_a.si, am_v.si, alpha,
                                              dt.si, k_sh.si, inp.emissivity_member,
                                              inp.emissivity_fire, inp.configuration_factor)
    delta = out.step("Delta_theta_a_t", "k_sh_A_m_V / (c_a * rho_a) * h_net * Delta_t",
                     {"k_sh_A_m_V": factor, "c_a": c_a,
                      "rho_a": Value(STEEL_DENSITY, "kg/m^3", given=True), "h_net": h_net,
                      "Delta_t": dt}, delta, "K", temperature=DIFFERENCE,
                     label="Rise of the steel temperature in the first step",
                     source=f"{_UNPROTECTED_CLAUSE}, eq. (4.25)", symbols=_STEEL_SYMBOLS)
    _next_temperature(out, run, theta_a, delta, _UNPROTECTED_CLAUSE)


def _protected_first_step(inp, out, run, protection: dict, factors):
    theta_a, theta_g, dt = _first_step_common(out, run)
    theta_g_1 = _kelvin(run.gas_temperature[1])
    c_a = _specific_heat_step(out, theta_a.si)
    material = protection["material"] is not None  # its properties are library values
    thickness = out.input("protection.thickness")

    def prop(key, unit):
        si = float(protection[key])
        if material:
            return Value(si, unit, given=True,
                         origin=f"materials.{protection['material']['name']}.{key}")
        return _operand(out, f"protection.{key}", si, unit)
    lambda_p, rho_p, c_p = (prop("conductivity", "W/(m*K)"), prop("density", "kg/m^3"),
                            prop("specific_heat", "J/(kg*K)"))
    a_p_v = factors.section_factor
    rho_a = Value(STEEL_DENSITY, "kg/m^3", given=True)
    phi = out.step("phi", "c_p * rho_p / (c_a * rho_a) * d_p * A_p_V",
                   {"c_p": c_p, "rho_p": rho_p, "c_a": c_a, "rho_a": rho_a, "d_p": thickness,
                    "A_p_V": a_p_v},
                   protection_capacity_ratio(a_p_v.si, thickness.si, rho_p.si, c_p.si,
                                             c_a.si), label="Heat capacity of the protection "
                                                            "relative to the steel",
                   source=f"{_PROTECTED_CLAUSE}, eq. (4.28)", symbols=_STEEL_SYMBOLS)
    delta_g = out.step("Delta_theta_g_t", "theta_g_1 - theta_g",
                       {"theta_g_1": theta_g_1, "theta_g": theta_g},
                       theta_g_1.si - theta_g.si, "K", temperature=DIFFERENCE,
                       label=phrase("Rise of the gas temperature over the first step, from "
                                    "t = {t0} to {t1}, θg from the fire's curve",
                                    t0=_time(run.time[0], True), t1=_time(run.time[1], True)),
                       source=f"{_PROTECTED_CLAUSE}, eq. (4.27)", symbols=_STEEL_SYMBOLS)
    raw = protected_temperature_increment(theta_g.si, theta_g_1.si, theta_a.si,
                                          a_p_v.si, thickness.si, lambda_p.si,
                                          rho_p.si, c_p.si, dt.si, no_fall_while_heating=False)
    delta = out.step(
        "Delta_theta_a_t", "lambda_p * A_p_V * (theta_g - theta_a) / (d_p * c_a * rho_a * "
                           "(1 + phi / 3)) * Delta_t - (exp(phi / 10) - 1) * Delta_theta_g_t",
        {"lambda_p": lambda_p, "A_p_V": a_p_v, "theta_g": theta_g, "theta_a": theta_a,
         "d_p": thickness, "c_a": c_a, "rho_a": rho_a, "phi": phi, "Delta_t": dt,
         "Delta_theta_g_t": delta_g}, raw, "K", temperature=DIFFERENCE,
        label="Rise of the steel temperature in the first step, by the formula",
        source=f"{_PROTECTED_CLAUSE}, eq. (4.27)", symbols=_STEEL_SYMBOLS)
    if delta_g.si > 0.0 and raw < 0.0:
        delta = out.statement("Delta_theta_a_t", "The gas heats (Δθg,t > 0) while the formula "
                              "gives a fall: eq. (4.27) requires Δθa,t ≥ 0, so the rise is 0.",
                              0.0, "K", temperature=DIFFERENCE,
                              label="Rise of the steel temperature in the first step",
                              source=f"{_PROTECTED_CLAUSE}, eq. (4.27)", symbols=_STEEL_SYMBOLS)
    _next_temperature(out, run, theta_a, delta, _PROTECTED_CLAUSE)


def _next_temperature(out, run, theta_a: Value, delta: Value, clause: str):
    out.step("theta_a_1", "theta_a + Delta_theta_a_t",
             {"theta_a": theta_a, "Delta_theta_a_t": delta}, float(run.temperature[1]), "K",
             temperature=ABSOLUTE,
             label=phrase("Steel temperature at the end of the first step, t = {t}; every "
                          "later step repeats this working from the state it starts in",
                          t=_time(run.time[1], True)),
             source=clause, symbols=_STEEL_SYMBOLS)


def _between(run, j: int) -> dict:
    """The two steps either side of a crossing, as phrase values."""
    return {"t_i": _time(run.time[j - 1]), "theta_i": _kelvin(run.temperature[j - 1]),
            "t_j": _time(run.time[j]), "theta_j": _kelvin(run.temperature[j])}


def _stepped_results(inp, out, run, theta_cr: float, duration: float, clause: str):
    t_cr = time_to_temperature(run.time, run.temperature, theta_cr)
    if t_cr is None:
        out.not_reached("time_to_critical", "not reached in {d}", d=_time(duration))
    else:
        j = int(np.nonzero(run.temperature >= theta_cr)[0][0])
        if j == 0:
            out.statement("t_cr", "The steel starts at or above the critical temperature.",
                          t_cr, yields="time_to_critical", symbols=_STEEL_SYMBOLS,
                          label="Time to the critical temperature", source=clause)
        else:
            out.statement("t_cr", "The steel reaches θa,cr between the step at {t_i} ({theta_i}) "
                          "and the step at {t_j} ({theta_j}); the time is found by linear "
                          "interpolation between them.", t_cr, values=_between(run, j),
                          yields="time_to_critical", label="Time to the critical temperature",
                          source=clause, symbols=_STEEL_SYMBOLS)
    if inp.required_resistance is not None:
        at = float(inp.required_resistance)
        theta = temperature_at_time(run.time, run.temperature, at)
        j = int(min(max(np.searchsorted(run.time, at, side="left"), 1), run.time.size - 1))
        if math.isclose(run.time[j], at, rel_tol=1e-12):
            text, values = "The stepped solution at the step at {t}.", {"t": _time(at)}
        else:
            text = ("The stepped solution at {t}, by linear interpolation between the step at "
                    "{t_i} ({theta_i}) and the step at {t_j} ({theta_j}).")
            values = {"t": out.input("required_resistance"), **_between(run, j)}
        out.statement("theta_a_req", text, theta, values=values, yields="theta_at_required",
                      label="Steel temperature at the required period", source=clause,
                      symbols=_STEEL_SYMBOLS)
    i_max = int(np.argmax(run.temperature))
    where = ("at the end of the exposure, {t}." if i_max == run.time.size - 1 else "at {t}.")
    out.statement("theta_a_max", "The highest temperature of the stepped solution, reached "
                  + where, run.theta_max, values={"t": _time(run.time[i_max])},
                  yields="theta_max", label="Highest steel temperature", source=clause,
                  symbols=_STEEL_SYMBOLS)
    return t_cr


def _member_factors(inp, out, fire: FireCurve, protected: bool) -> SectionFactors:
    """Return the section factor and the shadow factor the heating uses: as given, or worked
    out from the member's section (docs/format.md, steel_member_heating — additions)."""
    if inp.section is None:
        for name in ("exposure", "encasement"):
            if inp[name] is not None:
                raise _input_error(out, name, f"input '{name}' applies only to a member given "
                                   "by its section", "'section' in place of 'section_factor' "
                                   "(docs/format.md, steel_member_heating)", "")
        section_factor = out.input("section_factor")
        if protected:
            return SectionFactors(section_factor, None)
        if inp.shadow_factor is None:
            out.note("Shadow factor k_sh = 1: the shadow effect is not taken into account, which "
                     "is on the safe side.", "EN 1993-1-2:2005 §4.2.5.1(2)")
            return SectionFactors(section_factor, Value(1.0, given=True))
        return SectionFactors(section_factor, out.input("shadow_factor"))
    if inp.exposure is None:
        raise MissingInput("exposure", "four_sided | three_sided for a member given by its "
                           "section (EN 1993-1-2:2005 Table 4.2)")
    if protected and inp.encasement is None:
        raise MissingInput("encasement", "contour | box for a protected member given by its "
                           "section (EN 1993-1-2:2005 Table 4.2)")
    if not protected and inp.encasement is not None:
        raise _input_error(out, "encasement", "input 'encasement' applies only to a protected "
                           "member", "a 'protection' with it (docs/format.md, steel_member_heating)",
                           "")
    return section_steps(out, inp.section, inp.exposure, inp.encasement, inp.shadow_factor,
                         nominal_fire=fire.name in NAMED_FIRES)


def _compute_steel(inp, out):
    fire: FireCurve = inp.fire
    duration = exposure_duration(inp.duration, fire)
    if inp.duration is None:
        out.note("Duration {d}: the fire's.", _curve_clause(fire), d=_time(duration, True))
    if inp.required_resistance is not None and inp.required_resistance > duration * (1 + 1e-12):
        written = _record(out, "duration")
        raise _input_error(out, "required_resistance", "outside the range of the method",
                           "a required period within the duration ("
                           + (written.written if written else "the fire's") + ")", "")
    alpha = fire_convection(inp.convection_coefficient, fire)
    protection = inp.protection
    protected = protection is not None
    clause = _PROTECTED_CLAUSE if protected else _UNPROTECTED_CLAUSE

    factors = _member_factors(inp, out, fire, protected)
    theta_cr = _critical_temperature(inp, out).si
    if protected:
        time_step = inp.time_step if inp.time_step is not None else PROTECTED_MAX_TIME_STEP
        run = protected_steel_heating(fire, duration, factors.section_factor.si,
                                      protection["thickness"], protection["conductivity"],
                                      protection["density"], protection["specific_heat"],
                                      time_step, inp.initial_temperature)
        _protected_first_step(inp, out, run, protection, factors)
    else:
        time_step = inp.time_step if inp.time_step is not None else UNPROTECTED_MAX_TIME_STEP
        run = unprotected_steel_heating(fire, duration, factors.section_factor.si, alpha,
                                        factors.shadow_factor.si, inp.emissivity_member,
                                        inp.emissivity_fire, inp.configuration_factor,
                                        time_step, inp.initial_temperature)
        _unprotected_first_step(inp, out, run, alpha, factors)
    out.simulated_until = duration
    t_cr = _stepped_results(inp, out, run, theta_cr, duration, clause)

    method = ("eq. (4.27), protected member" if protected else
              "eq. (4.25), unprotected member")
    out.note("Explicit steps of EN 1993-1-2:2005 " + method + ": Δt = {dt} ({n} steps to {d}); "
             + ("θg, c_a and φ taken at the start of each step, Δθg = θg(t+Δt) − θg(t)"
                if protected else "θg, c_a and the net heat flux taken at the start of each step")
             + "; times between steps by linear interpolation. Steel density {rho} (§3.2.2), "
               "c_a(θ) of §3.4.1.2.", clause, dt=Value(time_step, "s", given=True),
             n=Value(float(run.time.size - 1), given=True), d=_time(duration, True),
             rho=Value(STEEL_DENSITY, "kg/m^3", given=True))
    if inp.time_step is None:
        out.note("Time step {dt}: the clause's upper limit.", clause,
                 dt=Value(time_step, "s", given=True))
    if protected:
        if run.zero_rise_steps:
            out.note("The rule Δθa,t ≥ 0 while Δθg,t > 0 set the rise to zero in {n} step(s).",
                     f"{_PROTECTED_CLAUSE}, eq. (4.27)",
                     n=Value(float(run.zero_rise_steps), given=True))
        out.note("The protection is taken at the gas temperature on its fire side (eq. (4.27) "
                 "has no film coefficient), with constant properties; its moisture (a delay "
                 "near 100 °C) is not counted, which errs on the safe side. Shadow factor, "
                 "emissivities and convection coefficient do not enter eq. (4.27). Protection "
                 "properties are to be taken from the product's assessment (EN 13381-4).",
                 protection.get("source") or _PROTECTED_CLAUSE)
    else:
        own = inp.convection_coefficient is None
        out.note("Convection coefficient αc = {alpha} (" + ("the fire's own" if own else
                                                             "set in this block")
                 + "); configuration factor Φ = {phi}, radiation temperature taken equal to the "
                   "gas temperature (member fully engulfed).",
                 _convection_clause(fire) if own else "EN 1991-1-2:2002 §3.1",
                 alpha=_operand(out, "convection_coefficient", alpha, "W/(m^2*K)"),
                 phi=out.input("configuration_factor"))
    out.add_series("temperature", run.time, run.temperature, label="steel temperature")
    _steel_figure(inp, out, run, fire, theta_cr, t_cr, duration, protected)


def _steel_figure(inp, out, run, fire, theta_cr, t_cr, duration, protected):
    marks = [Mark("y", theta_cr, "critical temperature θa,cr", 1)]
    values = {"cr": _kelvin(theta_cr)}
    caption = "Gas and steel temperatures of " + out.block_key + ", with the critical " \
              "temperature θa,cr = {cr}"
    if inp.required_resistance is not None:
        marks.append(Mark("x", float(inp.required_resistance), "required period", 3))
        values["req"] = out.input("required_resistance")
        caption += " and the required period {req}"
    points = (Point(float(t_cr), theta_cr, "reaches θa,cr"),) if t_cr is not None else ()
    highest = max(float(np.max(run.gas_temperature)), float(np.max(run.temperature)), theta_cr)
    out.figure(FigureData(
        key=f"{out.block_key}-steel",
        caption=Phrase(caption, values),
        x=Axis("time t", "s", "min", (0.0, duration)),
        y=Axis("temperature", "K", "degC", (_KELVIN, _celsius_top(highest))),
        lines=(Line(tuple(run.time.tolist()), tuple(run.temperature.tolist()),
                    "steel θa (" + ("protected" if protected else "unprotected") + ")", 0),
               Line(tuple(run.time.tolist()), tuple(run.gas_temperature.tolist()),
                    f"gas θg ({fire.name})", 1)),
        marks=tuple(marks), points=points, legend="lower right"))


_PROTECTION_FIELDS = (
    Quantity("thickness", "protection thickness d_p", unit="m", greater_than=0.0, display="mm"),
    Quantity("conductivity", "protection conductivity λp", default=None, unit="W/(m*K)",
             greater_than=0.0),
    Quantity("density", "protection density ρp", default=None, unit="kg/m^3", greater_than=0.0),
    Quantity("specific_heat", "protection specific heat c_p", default=None, unit="J/(kg*K)",
             greater_than=0.0),
    MaterialField("material", "protection material from the library", default=None),
)


STEEL_MEMBER_HEATING = Kind(
    name="steel_member_heating",
    title="Steel member heating",
    summary="Lumped steel temperature in a fire, unprotected (EN 1993-1-2 eq. 4.25) or "
            "protected (eq. 4.27), against a critical temperature; the section factor given, "
            "or worked out from an I-section (Table 4.2).",
    inputs=(
        FireField("fire", "the fire the member is exposed to"),
        Quantity("duration", "exposure duration (default: the fire's)", default=None, unit="s",
                 greater_than=0.0, at_most=MAX_DURATION, display="min"),
        Quantity("section_factor", "section factor Am/V (unprotected) or Ap/V (protected), at "
                 "least 10 m⁻¹ (EN 1993-1-2 §4.2.5.1)", unit="1/m", at_least=10.0),
        section_input("the member's section, in place of section_factor: {shape: i_section, "
                      "height, width, web_thickness, flange_thickness, root_radius} or "
                      "{profile: DESIGNATION} from calcdoc's catalogue of rolled sections"),
        Choice("exposure", "with section: sides exposed to the fire, three_sided when the top "
               "face of the top flange lies against a slab (EN 1993-1-2:2005 Table 4.2)",
               default=None, options=SECTION_EXPOSURES),
        Choice("encasement", "with section and protection: the protection follows the "
               "profile (contour) or encloses it (box) (EN 1993-1-2:2005 Table 4.2)",
               default=None, options=ENCASEMENTS),
        Quantity("shadow_factor", "shadow factor k_sh (unprotected); if omitted: 1 with "
                 "section_factor (the shadow effect ignored, on the safe side), eq. (4.26a) or "
                 "(4.26b) of EN 1993-1-2:2005 with section", default=None, greater_than=0.0,
                 at_most=1.0),
        _ProtectionField("protection", "fire protection: {thickness, conductivity, density, "
                         "specific_heat} or {material, thickness}", default=None,
                         fields=_PROTECTION_FIELDS,
                         at_most_one=(("material", "conductivity"), ("material", "density"),
                                      ("material", "specific_heat"))),
        Quantity("emissivity_member", "surface emissivity of the member εm", default="0.7",
                 source="EN 1993-1-2:2005 §2.2(2), carbon steel", greater_than=0.0,
                 at_most=1.0),
        Quantity("emissivity_fire", "emissivity of the fire εf", default="1.0",
                 source="EN 1991-1-2:2002 §3.1(6)", greater_than=0.0, at_most=1.0),
        Quantity("configuration_factor", "configuration factor Φ", default="1.0",
                 source="EN 1991-1-2:2002 §3.1(7)", greater_than=0.0, at_most=1.0),
        Quantity("convection_coefficient", "αc (default: the fire's own)", default=None,
                 unit="W/(m^2*K)", at_least=0.0),
        # Above 1200 °C steel has no properties in EN 1993-1-2 (§3.4.1.2): a critical
        # temperature there is never reached by the heating this kind computes, and its check
        # would pass whatever the fire.
        Quantity("critical_temperature", "critical steel temperature θa,cr, with its source",
                 default=None, unit="K", temperature=ABSOLUTE, greater_than=0.0,
                 at_most=STEEL_TEMPERATURE_RANGE[1], display="degC"),
        Quantity("utilisation", "degree of utilisation μ0 for eq. (4.22), only where "
                 "deformation and stability do not govern (EN 1993-1-2 §4.2.4)", default=None,
                 at_least=MINIMUM_UTILISATION, at_most=1.0),
        Quantity("required_resistance", "required fire resistance period (within the duration)",
                 default=None, unit="s", greater_than=0.0, display="min"),
        Quantity("time_step", "time step Δt (default 5 s unprotected, 30 s protected: the "
                 "limits of EN 1993-1-2 §4.2.5.1 and §4.2.5.2)", default=None, unit="s",
                 greater_than=0.0),
        Quantity("initial_temperature", "steel temperature at the start", default="20 degC",
                 source="EN 1991-1-2:2002 §3.2 (the curves start at 20 °C); EN 1993-1-2:2005 "
                        "§3.4.1.2 (c_a from 20 °C)", unit="K", temperature=ABSOLUTE,
                 greater_than=0.0),
    ),
    results=(
        ResultSpec("theta_critical", "K", "critical steel temperature", temperature=ABSOLUTE),
        ResultSpec("time_to_critical", "s", "time for the steel to reach θa,cr", display="min"),
        ResultSpec("theta_at_required", "K", "steel temperature at the required period",
                   temperature=ABSOLUTE),
        ResultSpec("theta_max", "K", "highest steel temperature within the duration",
                   temperature=ABSOLUTE),
        ResultSpec("section_factor", "1/m", "with section: the section factor used, Am/V "
                   "(unprotected) or Ap/V (protected)"),
        ResultSpec("box_section_factor", "1/m", "with section: box value [Am/V]b"),
        ResultSpec("shadow_factor", "1", "with section, unprotected: shadow factor k_sh"),
        ResultSpec("area", "m^2", "with section: cross-section area A", display="cm^2"),
        ResultSpec("perimeter", "m", "with section: the exposed perimeter that gives the "
                   "section factor (contour, or the box for a box encasement)"),
    ),
    compute=_compute_steel,
    exactly_one=(("section_factor", "section"), ("critical_temperature", "utilisation")),
    caution=FIRE_CAUTION + " The lumped method gives one uniform steel temperature; the "
            "critical temperature, the section factor and the protection product's assessed "
            "properties are the engineer's to confirm.",
    # The physics functions' parameter names that are not the inputs' own: the protection's
    # properties, a fire evaluated beyond its table (t), the required period (at), the fire.
    input_names={"protection_thickness": "protection.thickness",
                 "protection_conductivity": "protection.conductivity",
                 "protection_density": "protection.density",
                 "protection_specific_heat": "protection.specific_heat",
                 "t": "duration", "at": "required_resistance", "gas_temperature": "fire",
                 "gas_temperature_next": "fire", **SECTION_INPUT_NAMES},
    references=("EN 1993-1-2:2005", "EN 1991-1-2:2002", "EN 13381-4"),
)

KINDS = (FIRE_CURVE, STEEL_MEMBER_HEATING)
