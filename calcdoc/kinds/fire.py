"""Fire exposure kinds: ``fire_curve`` and ``steel_member_heating`` (FORMAT.md).

A fire is passed between blocks as the curve itself: a ``fire_curve`` block publishes its
:class:`~calcdoc.physics.firecurves.FireCurve` as the object of its ``temperature`` series, and a
heated block takes it with ``fire: {ref: "FC1.fire.temperature"}`` or names a nominal curve inline
with ``fire: standard``. :class:`FireField` is that input type; other fire kinds import it from
here, with :func:`exposure_duration` and :func:`fire_convection`.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from calcdoc.errors import InputError, Location
from calcdoc.kinds.base import (ABSOLUTE, Choice, Field, InputRecord, Kind,
                                MaterialField, Quantity, Record, ResultSpec, Text, _Invalid,
                                did_you_mean)
from calcdoc.located import plain
from calcdoc.physics import MAX_DURATION, PhysicsRangeError
from calcdoc.physics.firecurves import (NAMED_FIRES, FireCurve, named_fire, parametric_fire,
                                        tabulated_fire)
from calcdoc.physics.steel import (MINIMUM_UTILISATION,
                                   PROTECTED_MAX_TIME_STEP, STEEL_DENSITY,
                                   UNPROTECTED_MAX_TIME_STEP, critical_temperature_from_utilisation,
                                   net_heat_flux, protected_steel_heating,
                                   protected_temperature_increment, protection_capacity_ratio,
                                   specific_heat_carbon_steel, temperature_at_time,
                                   time_to_temperature, unprotected_steel_heating,
                                   unprotected_temperature_increment)
from calcdoc.render.numbers import format_quantity

__all__ = ["KINDS", "FireField", "exposure_duration", "fire_convection", "fire_description",
           "FIRE_CAUTION"]

#: The caution printed with every fire result (DESIGN.md, Safety).
FIRE_CAUTION = ("This calculation supports, and does not replace, the judgement of a licensed "
                "engineer and the requirements of the local code and the authority having "
                "jurisdiction.")

_NAMED_TEXT = " | ".join(NAMED_FIRES)
_FIRE_EXPECTED = (f"a named curve ({_NAMED_TEXT}) or {{ref: \"SHEET.block.temperature\"}} to a "
                  "fire_curve block")


def fire_description(curve: FireCurve) -> str:
    """Return a short description of a fire curve for the input table."""
    words = {"standard": "standard temperature-time curve",
             "external": "external fire curve",
             "hydrocarbon": "hydrocarbon curve",
             "tabulated": "tabulated curve",
             "parametric": "parametric fire"}.get(curve.name, curve.name)
    alpha = format_quantity(curve.convection_coefficient, "W/(m^2*K)", None, 3)
    return f"{words}, αc = {alpha}"


@dataclass(frozen=True)
class FireField(Field):
    """A fire: a nominal curve named inline (``standard``) or a ref to a fire_curve's series.

    The converted value is the :class:`FireCurve` itself. A named curve is built with the default
    duration (120 min); blocks take their own ``duration`` where they set one.
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
                raise _Invalid
            curve = named_fire(name)
            ctx.records.append(InputRecord(path, self.meaning, name, name, "",
                                           fire_description(curve), curve.source, "given",
                                           loc=node.loc))
            return curve
        if node.is_map and "ref" in node.value:
            extra = sorted(set(node.value) - {"ref"})
            if extra:
                ctx.error(node.key_locs[extra[0]], path, f"unknown key '{extra[0]}'", "ref",
                          repr(extra[0]))
                raise _Invalid
            target = ctx.resolve_ref(node.value["ref"], path)
            if not isinstance(target.obj, FireCurve):
                ctx.error(node, path, f"'{self.name}' does not refer to a fire curve",
                          "the temperature series of a fire_curve block, e.g. "
                          "FC1.fire.temperature", target.target)
                raise _Invalid
            curve = target.obj
            ctx.records.append(InputRecord(path, self.meaning, f"ref {target.target}",
                                           curve.name, "", fire_description(curve),
                                           f"result {target.target}; {curve.source}", "ref",
                                           target.target, node.loc))
            return curve
        ctx.error(node, path, f"'{self.name}' is not a fire", _FIRE_EXPECTED, repr(plain(node)))
        raise _Invalid


def exposure_duration(duration: float | None, fire: FireCurve) -> float:
    """Return the block's duration [s]: its own, else the fire's."""
    return float(duration) if duration is not None else float(fire.duration)


def fire_convection(coefficient: float | None, fire: FireCurve) -> float:
    """Return αc [W/(m²·K)]: the block's own, else the fire's."""
    return float(coefficient) if coefficient is not None else float(fire.convection_coefficient)


# ----------------------------------------------------------------------------- input helpers


class _Word(str):
    """A choice that remembers where it was written, for errors raised in compute."""

    loc: Location
    where: str


@dataclass(frozen=True)
class _LocatedChoice(Choice):
    def convert(self, node, ctx, path):
        value = super().convert(node, ctx, path)
        word = _Word(value)
        word.loc, word.where = node.loc, ctx.where(path)
        return word


@dataclass(frozen=True)
class _PointsField(Field):
    """Tabulated points: a list of ["time", "temperature"], each a quantity text."""

    def type_text(self) -> str:
        return 'list of ["time", "temperature"] (times strictly increasing from 0)'

    def convert(self, node, ctx, path):
        if not node.is_list or len(node.value) < 2:
            ctx.error(node, path, "'points' needs at least two points", self.type_text(),
                      repr(plain(node)))
            raise _Invalid
        time_field = Quantity("time", unit="s", at_least=0.0)
        temperature_field = Quantity("temperature", unit="K", temperature=ABSOLUTE,
                                     greater_than=0.0)
        points, failed = [], False
        for i, item in enumerate(node.value):
            item_path = f"{path}[{i}]"
            if not item.is_list or len(item.value) != 2 or not all(v.is_scalar
                                                                    for v in item.value):
                ctx.error(item, item_path, "a point is not a pair", '["time", "temperature"], '
                          'e.g. ["30 min", "843 degC"]', repr(plain(item)))
                failed = True
                continue
            try:
                t, _ = time_field.parse_text(item.value[0].value, ctx, item.value[0],
                                             item_path + "[0]")
                temperature, _ = temperature_field.parse_text(item.value[1].value, ctx,
                                                              item.value[1], item_path + "[1]")
                time_field._check_range(t, ctx, item.value[0], item_path + "[0]",
                                        repr(item.value[0].value))
                temperature_field._check_range(temperature, ctx, item.value[1],
                                               item_path + "[1]", repr(item.value[1].value))
            except _Invalid:
                failed = True
                continue
            if not points and t != 0.0:
                ctx.error(item.value[0], item_path + "[0]",
                          "the first point must be at the start of the exposure", "0 min",
                          repr(item.value[0].value))
                failed = True
            elif points and t <= points[-1][0]:
                ctx.error(item.value[0], item_path + "[0]", "times are not strictly increasing",
                          f"a time after {format_quantity(points[-1][0], 's', 'min', 6)}",
                          repr(item.value[0].value))
                failed = True
            points.append((t, temperature))
        if failed:
            raise _Invalid
        low = min(p[1] for p in points)
        high = max(p[1] for p in points)
        display = (f"{len(points)} points, 0 to {format_quantity(points[-1][0], 's', 'min', 4)}, "
                   f"{format_quantity(low, 'K', 'degC', 4)} to "
                   f"{format_quantity(high, 'K', 'degC', 4)}")
        ctx.records.append(InputRecord(path, self.meaning, f"{len(points)} points",
                                       [list(p) for p in points], "", display, "", "given",
                                       loc=node.loc))
        return points


@dataclass(frozen=True)
class _ProtectionField(Record):
    """Fire protection: {thickness, conductivity, density, specific_heat} or {material, thickness}."""

    def convert(self, node, ctx, path):
        value = super().convert(node, ctx, path)
        own = [k for k in ("conductivity", "density", "specific_heat") if value[k] is not None]
        if value["material"] is not None:
            if own:
                ctx.error(node, path, "give either a material or the protection's properties",
                          "{material, thickness} or {thickness, conductivity, density, "
                          "specific_heat}", "material and " + ", ".join(own))
                raise _Invalid
            material = value["material"]
            missing = [k for k in ("conductivity", "density", "specific_heat")
                       if material.get(k) is None]
            if missing:
                ctx.error(node, path, f"material '{material.get('name')}' lacks "
                          + ", ".join(missing), "a material with conductivity, density and "
                          "specific_heat", "missing " + ", ".join(missing))
                raise _Invalid
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
                raise _Invalid
            value["source"] = ""
            value["title"] = "fire protection"
        return value


def _located_error(word: _Word, what: str, expected: str, got: str, hint: str | None = None):
    return InputError(word.loc, word.where, what, expected, got, hint)


# ----------------------------------------------------------------------------- fire_curve

_PARAMETRIC_INPUTS = ("opening_factor", "fire_load_density", "thermal_inertia", "fire_growth",
                      "floor_area", "height")
_TABULATED_INPUTS = ("points", "points_source")
_DEFAULT_DURATION = 7200.0


def _curve_inputs_check(inp):
    curve = inp.curve
    given = {name for name in _PARAMETRIC_INPUTS + _TABULATED_INPUTS if inp[name] is not None}
    allowed = {"parametric": set(_PARAMETRIC_INPUTS),
               "tabulated": set(_TABULATED_INPUTS)}.get(curve, set())
    stray = sorted(given - allowed)
    if stray:
        raise _located_error(curve, f"input '{stray[0]}' does not apply to curve '{curve}'",
                             "only the inputs of the chosen curve (FORMAT.md, fire_curve)",
                             ", ".join(stray))
    if curve == "parametric":
        missing = [n for n in _PARAMETRIC_INPUTS if inp[n] is None]
        if missing:
            raise _located_error(curve, "curve 'parametric' needs the inputs of EN 1991-1-2 "
                                 "Annex A", ", ".join(_PARAMETRIC_INPUTS), "missing "
                                 + ", ".join(missing))
    if curve == "tabulated":
        missing = [n for n in ("points", "convection_coefficient") if inp[n] is None]
        if missing:
            raise _located_error(curve, "curve 'tabulated' needs its points and a convection "
                                 "coefficient (a tabulated curve has none of its own)",
                                 "points and convection_coefficient", "missing "
                                 + ", ".join(missing))


def _build_curve(inp, out) -> FireCurve:
    name = str(inp.curve)
    if name in NAMED_FIRES:
        duration = inp.duration if inp.duration is not None else _DEFAULT_DURATION
        curve = named_fire(name, duration)
    elif name == "tabulated":
        times = [p[0] for p in inp.points]
        temperatures = [p[1] for p in inp.points]
        curve = tabulated_fire(times, temperatures, inp.convection_coefficient,
                               source=inp.points_source or "points tabulated in this block")
        if inp.duration is not None:
            if inp.duration > curve.duration * (1 + 1e-12):
                raise PhysicsRangeError(
                    "duration", format_quantity(inp.duration, "s", "min", 4),
                    f"duration <= {format_quantity(curve.duration, 's', 'min', 4)}, the last "
                    "time of the table (a tabulated curve is not extended beyond its points)")
            curve = dataclasses.replace(curve, duration=float(inp.duration))
    else:
        duration = inp.duration if inp.duration is not None else _DEFAULT_DURATION
        try:
            curve = parametric_fire(inp.opening_factor, inp.fire_load_density,
                                    inp.thermal_inertia, str(inp.fire_growth), inp.floor_area,
                                    inp.height, duration)
        except PhysicsRangeError as exc:
            raise _renamed(exc, {"opening factor": "opening_factor",
                                 "thermal inertia": "thermal_inertia",
                                 "fire load density": "fire_load_density",
                                 "floor area": "floor_area", "height": "height",
                                 "fire growth": "fire_growth"}) from None
    if inp.duration is None:
        out.note(f"Duration {format_quantity(curve.duration, 's', 'min', 4)}: "
                 + ("the last time of the table." if name == "tabulated"
                    else "calcdoc's default exposure (FORMAT.md, fire_curve)."),
                 "FORMAT.md, fire_curve")
    if inp.convection_coefficient is not None and name != "tabulated":
        out.note(f"Convection coefficient set to "
                 f"{out.qt(inp.convection_coefficient, 'W/(m^2*K)')} in place of the curve's "
                 f"{out.qt(curve.convection_coefficient, 'W/(m^2*K)')}.", curve.source)
        curve = dataclasses.replace(curve, convection_coefficient=float(
            inp.convection_coefficient))
    return curve


def _renamed(exc: PhysicsRangeError, names: dict[str, str]) -> PhysicsRangeError:
    for key, input_name in names.items():
        if key in str(exc.quantity):
            return PhysicsRangeError(input_name, exc.value, exc.expected)
    return exc


def _series_times(curve: FireCurve, duration: float) -> np.ndarray:
    step = 30.0 if duration <= 4 * 3600.0 else 60.0
    times = list(np.arange(0.0, duration, step)) + [duration]
    if curve.t_max is not None and curve.t_max < duration:
        times.append(curve.t_max)
    if curve.points:
        times += [p[0] for p in curve.points if p[0] <= duration]
    return np.unique(np.asarray(times, dtype=float))


def _nominal_steps(curve: FireCurve, t_end: float, out):
    minutes = t_end / 60.0
    m = out.q(minutes, "1")
    if curve.name == "standard":
        substituted = rf"20 + 345\,\log_{{10}}(8 \cdot {m} + 1)"
    elif curve.name == "external":
        substituted = (rf"660\,(1 - 0.687\,e^{{-0.32 \cdot {m}}} - 0.313\,e^{{-3.8 \cdot {m}}})"
                       " + 20")
    else:
        substituted = (rf"1080\,(1 - 0.325\,e^{{-0.167 \cdot {m}}} - 0.675\,e^{{-2.5 \cdot {m}}})"
                       " + 20")
    out.step(r"\theta_g", curve.equation, substituted, curve(t_end), "K",
             label=f"Gas temperature at the end of the exposure (t = {out.qt(t_end, 's', 'min')},"
                   " t in min, θ in °C)", source=curve.source, display_unit="degC")


def _parametric_steps(curve: FireCurve, out):
    p = curve.parametric
    q_mj = p.fire_load_density / 1e6
    src = "EN 1991-1-2:2002 Annex A"
    out.step(r"\Gamma", r"\frac{(O/b)^2}{(0.04/1160)^2}",
             rf"\frac{{({out.q(p.opening_factor, '1')}/{out.q(p.thermal_inertia, '1')})^2}}"
             r"{(0.04/1160)^2}", p.gamma, "1", label="Time factor", source=f"{src}, eq. (A.2b)")
    t_vent = 0.2e-3 * q_mj / p.opening_factor
    out.step(r"t_{max}", r"\max\left(0.2\cdot10^{-3}\,q_{t,d}/O;\ t_{lim}\right)",
             rf"\max\left(0.2\cdot10^{{-3}} \cdot {out.q(q_mj, '1')}/{out.q(p.opening_factor, '1')};"
             rf"\ {out.q(p.limiting_time / 3600.0, '1')}\right)\,\mathrm{{h}}",
             p.t_max, "s", label=f"Time of the peak ({p.regime}; t_lim for "
                                 f"{p.fire_growth} growth, q_t,d in MJ/m², t in h)",
             source=f"{src}, eq. (A.7)", display_unit="min")
    if p.regime == "fuel-controlled":
        t_lim_h = p.limiting_time / 3600.0
        out.step(r"O_{lim}", r"0.1\cdot10^{-3}\,q_{t,d}/t_{lim}",
                 rf"0.1\cdot10^{{-3}} \cdot {out.q(q_mj, '1')}/{out.q(t_lim_h, '1')}",
                 p.opening_factor_limit, "m^0.5", label="Limiting opening factor",
                 source=f"{src}, eq. (A.10)")
        out.step(r"\Gamma_{lim}", r"\frac{(O_{lim}/b)^2}{(0.04/1160)^2}",
                 rf"\frac{{({out.q(p.opening_factor_limit, '1')}/"
                 rf"{out.q(p.thermal_inertia, '1')})^2}}{{(0.04/1160)^2}}", p.gamma_limit, "1",
                 label="Time factor of the fuel-controlled fire", source=f"{src}, eq. (A.9)")
        if p.k_applied:
            out.step("k", r"1 + \frac{O - 0.04}{0.04}\,\frac{q_{t,d} - 75}{75}\,"
                          r"\frac{1160 - b}{1160}",
                     rf"1 + \frac{{{out.q(p.opening_factor, '1')} - 0.04}}{{0.04}}\,"
                     rf"\frac{{{out.q(q_mj, '1')} - 75}}{{75}}\,"
                     rf"\frac{{1160 - {out.q(p.thermal_inertia, '1')}}}{{1160}}", p.k, "1",
                     label="Factor on Γ_lim (O > 0.04, q_t,d < 75 MJ/m² and b < 1160)",
                     source=f"{src}, with eq. (A.9)")
        out.step(r"t^*_{max}", r"t_{lim}\,\Gamma_{lim}" + (r"\,k" if p.k_applied else ""),
                 rf"{out.q(t_lim_h, '1')} \cdot {out.q(p.gamma_limit, '1')}"
                 + (rf" \cdot {out.q(p.k, '1')}" if p.k_applied else ""),
                 p.t_star_max_heating, "1", label="Fictitious time at the peak [h]",
                 source=f"{src}, eq. (A.8)")
    else:
        out.step(r"t^*_{max}", r"t_{max}\,\Gamma",
                 rf"{out.q(p.t_max / 3600.0, '1')} \cdot {out.q(p.gamma, '1')}",
                 p.t_star_max_heating, "1", label="Fictitious time at the peak [h]",
                 source=f"{src}, eq. (A.2a)")
    ts = out.q(p.t_star_max_heating, "1")
    out.step(r"\theta_{max}", curve.equation.replace("t^*", "t^*_{max}"),
             rf"20 + 1325\left(1 - 0.324\,e^{{-0.2 \cdot {ts}}} - 0.204\,e^{{-1.7 \cdot {ts}}}"
             rf" - 0.472\,e^{{-19 \cdot {ts}}}\right)", p.theta_max, "K",
             label="Peak gas temperature (θ in °C)", source=f"{src}, eq. (A.1)",
             display_unit="degC")
    out.step(r"t^*_{max,c}", r"(0.2\cdot10^{-3}\,q_{t,d}/O)\,\Gamma",
             rf"(0.2\cdot10^{{-3}} \cdot {out.q(q_mj, '1')}/{out.q(p.opening_factor, '1')})"
             rf" \cdot {out.q(p.gamma, '1')}", p.t_star_max, "1",
             label="t*_max of the cooling phase [h]", source=f"{src}, eq. (A.12)")
    if p.regime == "fuel-controlled":
        out.step("x", r"t_{lim}\,\Gamma / t^*_{max,c}",
                 rf"{out.q(p.limiting_time / 3600.0, '1')} \cdot {out.q(p.gamma, '1')}"
                 rf"/{out.q(p.t_star_max, '1')}", p.x, "1",
                 label="x of the cooling phase (t_max = t_lim)", source=f"{src}, eq. (A.11)")
    rate_formula = {"A.11a": "625", "A.11b": r"250\,(3 - t^*_{max,c})", "A.11c": "250"}
    rate_numbers = {"A.11a": "625", "A.11b": rf"250\,(3 - {out.q(p.t_star_max, '1')})",
                    "A.11c": "250"}
    out.step("r", rate_formula[p.cooling_equation], rate_numbers[p.cooling_equation],
             p.cooling_rate, "1",
             label="Cooling rate, K per hour of t* (θg = θmax − r (t* − t*_max,c x))",
             source=f"{src}, eq. ({p.cooling_equation})")
    out.note(f"Annex A of EN 1991-1-2 is informative: its use is subject to the National Annex. "
             f"The fire is {p.regime}. The compartment is taken to have no openings in the "
             f"roof, and the fire load to burn out completely (Annex A). Once the cooling line "
             f"reaches 20 °C (at {out.qt(p.time_to_ambient, 's', 'min')}) the gas is held at "
             f"20 °C.", src)


def _compute_fire_curve(inp, out):
    _curve_inputs_check(inp)
    curve = _build_curve(inp, out)
    duration = curve.duration
    times = _series_times(curve, duration)
    temperature = np.asarray(curve(times), dtype=float)
    if curve.name == "parametric":
        _parametric_steps(curve, out)
    elif curve.name in NAMED_FIRES:
        _nominal_steps(curve, duration, out)
    else:
        out.note(f"{len(curve.points)} points, linear interpolation between them; the curve is "
                 "not extended outside the table (a time beyond its last point is refused).",
                 curve.source)
    i_max = int(np.argmax(temperature))
    out.result("theta_max", temperature[i_max])
    out.result("t_max", times[i_max])
    out.result("theta_end", temperature[-1])
    out.note(f"Convection coefficient of this fire: "
             f"{out.qt(curve.convection_coefficient, 'W/(m^2*K)')}; blocks heated by it use it "
             "unless they set their own.", curve.source)
    out.add_series("temperature", times, temperature, label=f"gas temperature ({curve.name})",
                   obj=curve)
    out.figure_data["fire"] = {"time": times.tolist(), "temperature": temperature.tolist(),
                               "name": curve.name, "t_max": curve.t_max, "duration": duration}


def _figures_fire_curve(block):
    from calcdoc.render.plots import LINE_STYLES, figure, mark_vertical, svg_of, thin
    data = block.output.figure_data["fire"]
    minutes = np.asarray(data["time"]) / 60.0
    celsius = np.asarray(data["temperature"]) - 273.15
    with figure(block.key + "-fire-curve") as (fig, ax):
        ax.plot(*thin(minutes, celsius), color="#b03a2e", linestyle=LINE_STYLES[0],
                label=f"gas temperature θg ({data['name']})")
        if data["t_max"] is not None and data["t_max"] <= data["duration"]:
            mark_vertical(ax, data["t_max"] / 60.0, "peak, t_max")
        ax.set_xlabel("time t [min]")
        ax.set_ylabel("gas temperature θg [°C]")
        ax.set_xlim(0.0, data["duration"] / 60.0)
        ax.set_ylim(bottom=0.0)
        ax.legend(loc="lower right")
        svg = svg_of(fig)
    return [Figure(block.key + "-fire-curve", svg,
                   f"Gas temperature–time curve ({data['name']}) of {block.key}")]


FIRE_CURVE = Kind(
    name="fire_curve",
    title="Fire curve",
    summary="Gas temperature–time exposure: the nominal curves of EN 1991-1-2 §3.2, a tabulated "
            "curve, or the parametric fire of EN 1991-1-2 Annex A.",
    inputs=(
        _LocatedChoice("curve", "the temperature-time curve",
                       options=("standard", "external", "hydrocarbon", "tabulated",
                                "parametric")),
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
        _LocatedChoice("fire_growth", "parametric: fire growth rate, t_lim 25 / 20 / 15 min "
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
    references=("EN 1991-1-2:2002", "ISO 834-1:1999"),
)


# ----------------------------------------------------------------------------- steel heating

_STEEL_NAMES = {
    "section factor": "section_factor", "time step": "time_step",
    "initial steel temperature": "initial_temperature", "shadow factor": "shadow_factor",
    "member emissivity": "emissivity_member", "fire emissivity": "emissivity_fire",
    "configuration factor": "configuration_factor",
    "convection coefficient": "convection_coefficient",
    "protection thickness": "protection.thickness",
    "protection conductivity": "protection.conductivity",
    "protection density": "protection.density",
    "protection specific heat": "protection.specific_heat",
    "degree of utilisation": "utilisation", "steel temperature": "duration",
    "time of a tabulated fire": "duration",
}


def _steel_error(exc: PhysicsRangeError) -> PhysicsRangeError:
    quantity = str(exc.quantity)
    for key, name in _STEEL_NAMES.items():
        if quantity.startswith(key):
            value = exc.value
            if name in ("initial_temperature", "duration") and key != "time of a tabulated fire" \
                    and isinstance(value, float):
                value = f"{format_quantity(value, 'K', 'degC', 4)} ({quantity})"
            elif key == "time of a tabulated fire" and isinstance(value, float):
                value = format_quantity(value, "s", "min", 4)
            return PhysicsRangeError(name, value, exc.expected)
    return exc


def _representative_step(run, target: float | None, at: float | None) -> int:
    """Index i of the step shown by hand: the one that crosses the target, else the one holding
    the required time, else the one that ends at the highest steel temperature."""
    if target is not None:
        above = np.nonzero(run.temperature >= target)[0]
        if above.size and above[0] > 0:
            return int(above[0]) - 1
    if at is not None:
        return int(min(max(np.searchsorted(run.time, at, side="right") - 1, 0),
                       run.time.size - 2))
    return int(min(max(int(np.argmax(run.temperature)) - 1, 0), run.time.size - 2))


def _unprotected_steps(inp, out, run, i, alpha):
    t_i, dt = run.time[i], run.time[i + 1] - run.time[i]
    theta_g, theta_a = run.gas_temperature[i], run.temperature[i]
    c_a = specific_heat_carbon_steel(theta_a)
    h_net = net_heat_flux(theta_g, theta_a, alpha, inp.emissivity_member, inp.emissivity_fire,
                          inp.configuration_factor)
    delta = unprotected_temperature_increment(theta_g, theta_a, inp.section_factor, alpha, dt,
                                              inp.shadow_factor, inp.emissivity_member,
                                              inp.emissivity_fire, inp.configuration_factor)
    when = f"step from t = {out.qt(t_i, 's', 'min')} (θg = {out.qt(theta_g, 'K', 'degC')}, " \
           f"θa = {out.qt(theta_a, 'K', 'degC')})"
    out.step(r"c_a", r"c_a(\theta_{a,t})", rf"c_a({out.q(theta_a, 'K', 'degC')})", c_a,
             "J/(kg*K)", label=f"Specific heat of steel, {when}",
             source="EN 1993-1-2:2005 §3.4.1.2, eq. (3.2)")
    out.step(r"\dot h_{net}",
             r"\alpha_c(\theta_g - \theta_a) + \Phi\,\varepsilon_m\varepsilon_f\,\sigma"
             r"\left[(\theta_g + 273)^4 - (\theta_a + 273)^4\right]",
             rf"{out.q(alpha, 'W/(m^2*K)')}\,({out.q(theta_g, 'K')} - {out.q(theta_a, 'K')})"
             rf" + {out.q(inp.configuration_factor, '1')} \cdot "
             rf"{out.q(inp.emissivity_member, '1')} \cdot {out.q(inp.emissivity_fire, '1')}"
             rf" \cdot \sigma\,\left[({out.q(theta_g, 'K')})^4 - ({out.q(theta_a, 'K')})^4\right]",
             h_net, "W/m^2", label="Net heat flux at the start of the step (θ + 273 taken "
                                   "as the kelvin temperature)",
             source="EN 1991-1-2:2002 §3.1, eqs. (3.1)–(3.3)")
    out.step(r"\Delta\theta_{a,t}",
             r"k_{sh}\,\frac{A_m/V}{c_a\,\rho_a}\,\dot h_{net}\,\Delta t",
             rf"{out.q(inp.shadow_factor, '1')} \cdot \frac{{{out.q(inp.section_factor, '1/m')}}}"
             rf"{{{out.q(c_a, 'J/(kg*K)')} \cdot {out.q(STEEL_DENSITY, 'kg/m^3')}}} \cdot "
             rf"{out.q(h_net, 'W/m^2')} \cdot {out.q(dt, 's')}", delta, "K",
             label="Rise of the steel temperature in the step",
             source="EN 1993-1-2:2005 §4.2.5.1, eq. (4.25)")


def _protected_steps(inp, out, run, i, protection):
    t_i, dt = run.time[i], run.time[i + 1] - run.time[i]
    theta_g, theta_g1 = run.gas_temperature[i], run.gas_temperature[i + 1]
    theta_a = run.temperature[i]
    c_a = specific_heat_carbon_steel(theta_a)
    d_p, lam, rho_p, c_p = (protection["thickness"], protection["conductivity"],
                            protection["density"], protection["specific_heat"])
    phi = protection_capacity_ratio(inp.section_factor, d_p, rho_p, c_p, c_a)
    delta = protected_temperature_increment(theta_g, theta_g1, theta_a, inp.section_factor, d_p,
                                            lam, rho_p, c_p, dt)
    when = f"step from t = {out.qt(t_i, 's', 'min')} (θg = {out.qt(theta_g, 'K', 'degC')}, " \
           f"θa = {out.qt(theta_a, 'K', 'degC')})"
    out.step(r"c_a", r"c_a(\theta_{a,t})", rf"c_a({out.q(theta_a, 'K', 'degC')})", c_a,
             "J/(kg*K)", label=f"Specific heat of steel, {when}",
             source="EN 1993-1-2:2005 §3.4.1.2, eq. (3.2)")
    out.step(r"\phi", r"\frac{c_p\,\rho_p}{c_a\,\rho_a}\,d_p\,\frac{A_p}{V}",
             rf"\frac{{{out.q(c_p, 'J/(kg*K)')} \cdot {out.q(rho_p, 'kg/m^3')}}}"
             rf"{{{out.q(c_a, 'J/(kg*K)')} \cdot {out.q(STEEL_DENSITY, 'kg/m^3')}}} \cdot "
             rf"{out.q(d_p, 'm', 'mm')} \cdot {out.q(inp.section_factor, '1/m')}", phi, "1",
             label="Heat capacity of the protection relative to the steel",
             source="EN 1993-1-2:2005 §4.2.5.2, eq. (4.28)")
    out.step(r"\Delta\theta_{a,t}",
             r"\frac{\lambda_p\,A_p/V\,(\theta_{g,t} - \theta_{a,t})}{d_p\,c_a\,\rho_a\,"
             r"(1 + \phi/3)}\,\Delta t - (e^{\phi/10} - 1)\,\Delta\theta_{g,t}",
             rf"\frac{{{out.q(lam, 'W/(m*K)')} \cdot {out.q(inp.section_factor, '1/m')} \cdot "
             rf"({out.q(theta_g, 'K')} - {out.q(theta_a, 'K')})}}{{{out.q(d_p, 'm', 'mm')} \cdot "
             rf"{out.q(c_a, 'J/(kg*K)')} \cdot {out.q(STEEL_DENSITY, 'kg/m^3')} \cdot "
             rf"(1 + {out.q(phi, '1')}/3)}} \cdot {out.q(dt, 's')} - "
             rf"(e^{{{out.q(phi, '1')}/10}} - 1) \cdot {out.q(theta_g1 - theta_g, 'K')}",
             delta, "K", label="Rise of the steel temperature in the step (Δθg = θg(t+Δt) − "
                               "θg(t); Δθa ≥ 0 while Δθg > 0)",
             source="EN 1993-1-2:2005 §4.2.5.2, eq. (4.27)")


def _compute_steel(inp, out):
    fire: FireCurve = inp.fire
    duration = exposure_duration(inp.duration, fire)
    if inp.duration is None:
        out.note(f"Duration {out.qt(duration, 's', 'min')}: the fire's.", fire.source)
    if inp.required_resistance is not None and inp.required_resistance > duration * (1 + 1e-12):
        raise PhysicsRangeError(
            "required_resistance", format_quantity(inp.required_resistance, "s", "min", 4),
            f"a required period within the duration ({format_quantity(duration, 's', 'min', 4)})")
    alpha = fire_convection(inp.convection_coefficient, fire)
    protection = inp.protection
    protected = protection is not None

    # Critical temperature: stated, or eq. (4.22) where §4.2.4 allows it.
    if inp.critical_temperature is not None:
        theta_cr = float(inp.critical_temperature)
        out.step(r"\theta_{a,cr}", r"\theta_{a,cr}", out.q(theta_cr, "K", "degC"), theta_cr, "K",
                 label="Critical temperature, as stated with its source (input table)",
                 source="stated input", display_unit="degC")
    else:
        mu0 = float(inp.utilisation)
        try:
            theta_cr = critical_temperature_from_utilisation(mu0)
        except PhysicsRangeError as exc:
            raise _steel_error(exc) from None
        out.step(r"\theta_{a,cr}",
                 r"39.19\,\ln\left[\frac{1}{0.9674\,\mu_0^{3.833}} - 1\right] + 482",
                 rf"39.19\,\ln\left[\frac{{1}}{{0.9674 \cdot {out.q(mu0, '1')}^{{3.833}}}} - 1"
                 r"\right] + 482", theta_cr, "K",
                 label="Critical temperature from the degree of utilisation (θ in °C)",
                 source="EN 1993-1-2:2005 §4.2.4, eq. (4.22)", display_unit="degC")
        out.warn("θa,cr from μ0 by eq. (4.22) is valid only where deformation criteria and "
                 "stability do not govern: not for columns, nor for beams prone to "
                 "lateral-torsional buckling, which need a critical temperature from their own "
                 "buckling check. The engineer confirms that this member is neither.",
                 "EN 1993-1-2:2005 §4.2.4")

    try:
        if protected:
            time_step = inp.time_step if inp.time_step is not None else PROTECTED_MAX_TIME_STEP
            run = protected_steel_heating(fire, duration, inp.section_factor,
                                          protection["thickness"], protection["conductivity"],
                                          protection["density"], protection["specific_heat"],
                                          time_step, inp.initial_temperature)
        else:
            time_step = inp.time_step if inp.time_step is not None else UNPROTECTED_MAX_TIME_STEP
            run = unprotected_steel_heating(fire, duration, inp.section_factor, alpha,
                                            inp.shadow_factor, inp.emissivity_member,
                                            inp.emissivity_fire, inp.configuration_factor,
                                            time_step, inp.initial_temperature)
    except PhysicsRangeError as exc:
        raise _steel_error(exc) from None

    t_cr = time_to_temperature(run.time, run.temperature, theta_cr)
    i = _representative_step(run, theta_cr, inp.required_resistance)
    if protected:
        _protected_steps(inp, out, run, i, protection)
    else:
        _unprotected_steps(inp, out, run, i, alpha)

    out.result("theta_critical", theta_cr)
    out.simulated_until = duration
    if t_cr is None:
        out.not_reached("time_to_critical", f"not reached in {out.qt(duration, 's', 'min')}")
    else:
        j = int(np.nonzero(run.temperature >= theta_cr)[0][0])
        if j > 0:
            out.step(r"t_{cr}", r"t_i + \Delta t\,\frac{\theta_{a,cr} - \theta_{a,i}}"
                                r"{\theta_{a,i+1} - \theta_{a,i}}",
                     rf"{out.q(run.time[j - 1], 's', 'min')} + {out.q(run.time[j] - run.time[j - 1], 's')}"
                     rf"\,\frac{{{out.q(theta_cr, 'K')} - {out.q(run.temperature[j - 1], 'K')}}}"
                     rf"{{{out.q(run.temperature[j], 'K')} - {out.q(run.temperature[j - 1], 'K')}}}",
                     t_cr, "s", label="Time to the critical temperature, linear between steps",
                     source="FORMAT.md, steel_member_heating", display_unit="min")
        out.result("time_to_critical", t_cr)
    if inp.required_resistance is not None:
        out.result("theta_at_required",
                   temperature_at_time(run.time, run.temperature, inp.required_resistance))
    out.result("theta_max", run.theta_max)

    method = ("eq. (4.27), protected member" if protected else
              "eq. (4.25), unprotected member")
    out.note(f"Explicit steps of EN 1993-1-2:2005 {method}: Δt = {out.qt(time_step, 's')} "
             f"({run.time.size - 1} steps to {out.qt(duration, 's', 'min')}), "
             + ("θg, c_a and φ taken at the start of each step, Δθg = θg(t+Δt) − θg(t)"
                if protected else "θg, c_a and the net heat flux taken at the start of each step")
             + "; times between steps by linear interpolation. Steel density 7850 kg/m³ "
               "(§3.2.2), c_a(θ) of §3.4.1.2.",
             "EN 1993-1-2:2005 §4.2.5.2" if protected else "EN 1993-1-2:2005 §4.2.5.1")
    if inp.time_step is None:
        out.note(f"Time step {out.qt(time_step, 's')}: the clause's upper limit.",
                 "EN 1993-1-2:2005 §4.2.5.2" if protected else "EN 1993-1-2:2005 §4.2.5.1")
    if protected:
        if run.zero_rise_steps:
            out.note(f"The rule Δθa,t ≥ 0 while Δθg,t > 0 set the rise to zero in "
                     f"{run.zero_rise_steps} step(s).", "EN 1993-1-2:2005 §4.2.5.2, eq. (4.27)")
        out.note("The protection is taken at the gas temperature on its fire side (eq. (4.27) "
                 "has no film coefficient), with constant properties; its moisture (a delay "
                 "near 100 °C) is not counted, which errs on the safe side. Shadow factor, "
                 "emissivities and convection coefficient do not enter eq. (4.27). Protection "
                 "properties are to be taken from the product's assessment (EN 13381-4).",
                 protection.get("source") or "EN 1993-1-2:2005 §4.2.5.2")
    else:
        source = ("the fire's own" if inp.convection_coefficient is None else "set in this block")
        out.note(f"Convection coefficient αc = {out.qt(alpha, 'W/(m^2*K)')} ({source}); "
                 f"configuration factor Φ = {out.qt(inp.configuration_factor, '1')}, radiation "
                 "temperature taken equal to the gas temperature (member fully engulfed).",
                 fire.source if inp.convection_coefficient is None else
                 "EN 1991-1-2:2002 §3.1")
    out.add_series("temperature", run.time, run.temperature, label="steel temperature")
    out.figure_data["steel"] = {
        "time": run.time.tolist(), "steel": run.temperature.tolist(),
        "gas": run.gas_temperature.tolist(), "theta_critical": theta_cr,
        "required": inp.required_resistance, "time_to_critical": t_cr, "duration": duration,
        "fire": fire.name, "protected": protected}


def _figures_steel(block):
    from calcdoc.render.plots import (LINE_STYLES, figure, mark_horizontal, mark_vertical,
                                      svg_of, thin)
    data = block.output.figure_data["steel"]
    minutes = np.asarray(data["time"]) / 60.0
    with figure(block.key + "-steel") as (fig, ax):
        ax.plot(*thin(minutes, np.asarray(data["gas"]) - 273.15), color="#b03a2e",
                linestyle=LINE_STYLES[0], label=f"gas θg ({data['fire']})")
        ax.plot(*thin(minutes, np.asarray(data["steel"]) - 273.15), color="#1f3b73",
                linestyle=LINE_STYLES[1], label="steel θa"
                + (" (protected)" if data["protected"] else " (unprotected)"))
        mark_horizontal(ax, data["theta_critical"] - 273.15,
                        f"critical θa,cr = {data['theta_critical'] - 273.15:.0f} °C")
        if data["required"] is not None:
            mark_vertical(ax, data["required"] / 60.0,
                          f"required {data['required'] / 60.0:.0f} min")
        if data["time_to_critical"] is not None:
            ax.plot([data["time_to_critical"] / 60.0], [data["theta_critical"] - 273.15],
                    marker="o", color="#000000", linestyle="none", label="time to θa,cr")
        ax.set_xlabel("time t [min]")
        ax.set_ylabel("temperature [°C]")
        ax.set_xlim(0.0, data["duration"] / 60.0)
        ax.set_ylim(bottom=0.0)
        ax.legend(loc="lower right")
        svg = svg_of(fig)
    return [Figure(block.key + "-steel", svg,
                   f"Gas and steel temperatures of {block.key}, with the critical temperature"
                   + (" and the required period" if data["required"] is not None else ""))]


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
            "protected (eq. 4.27), against a critical temperature.",
    inputs=(
        FireField("fire", "the fire the member is exposed to"),
        Quantity("duration", "exposure duration (default: the fire's)", default=None, unit="s",
                 greater_than=0.0, at_most=MAX_DURATION, display="min"),
        Quantity("section_factor", "section factor Am/V (unprotected) or Ap/V (protected), at "
                 "least 10 m⁻¹ (EN 1993-1-2 §4.2.5.1)", unit="1/m", at_least=10.0),
        Quantity("shadow_factor", "shadow factor k_sh (unprotected)", default="1",
                 source="EN 1993-1-2:2005 §4.2.5.1, eq. (4.26): 1 ignores the shadow effect, "
                        "which is conservative", greater_than=0.0, at_most=1.0),
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
        Quantity("critical_temperature", "critical steel temperature θa,cr, with its source",
                 default=None, unit="K", temperature=ABSOLUTE, greater_than=0.0),
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
    ),
    compute=_compute_steel,
    exactly_one=(("critical_temperature", "utilisation"),),
    caution=FIRE_CAUTION + " The lumped method gives one uniform steel temperature; the "
            "critical temperature, the section factor and the protection product's assessed "
            "properties are the engineer's to confirm.",
    references=("EN 1993-1-2:2005", "EN 1991-1-2:2002", "EN 13381-4"),
)

KINDS = (FIRE_CURVE, STEEL_MEMBER_HEATING)
