"""The ``wall_fire_exposure`` kind: transient conduction through layers heated on one face.

Inputs and results are those of FORMAT.md (wall_fire_exposure); the physics is
:func:`calcdoc.physics.transient.solve_transient` with the material laws of
:mod:`calcdoc.physics.thermal_laws`. Every run is repeated with the cells and the time step
halved, and the report states the change in the time to insulation (FORMAT.md asks for under 1 %).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from calcdoc.kinds.base import (ABSOLUTE, DIFFERENCE, Choice, Figure, Items, Kind, MaterialField,
                                Quantity, ResultSpec, Text, _Invalid)
from calcdoc.kinds.fire import FIRE_CAUTION, FireField, exposure_duration, fire_convection
from calcdoc.physics import MAX_DURATION, PhysicsRangeError
from calcdoc.physics.thermal_laws import (ZERO_CELSIUS, ThermalLaw,
                                          carbon_steel_law, concrete_law,
                                          concrete_specific_heat_peak, constant_law)
from calcdoc.physics.transient import (DEFAULT_MIN_CELLS, FireExposure, HeldTemperature, Layer,
                                       check_convergence)
from calcdoc.render.numbers import format_quantity

__all__ = ["KINDS", "WALL_FIRE_EXPOSURE", "material_law_figure", "PROFILE_TIMES"]

#: Times of the profile figure (FORMAT.md / issue 4: 30, 60, 90 and 120 min) [s].
PROFILE_TIMES = (1800.0, 3600.0, 5400.0, 7200.0)

_CONCRETE = "en1992_concrete"
_STEEL = "en1993_carbon_steel"
_CONCRETE_OPTIONS = ("conductivity_limit", "moisture_content", "density")
_CONSTANT = ("conductivity", "density", "specific_heat")
_NAME = re.compile(r"^[a-z0-9_]+$")
_RESERVED_MONITORS = ("unexposed_end", "unexposed_at_required", "unexposed", "exposed")

_DEFAULT_MOISTURE = 0.015
_DEFAULT_DENSITY_20 = 2300.0
_DECAY_DEFAULT = 200.0
_DECAY_SOURCE = ("EN 1991-1-2:2002 §2.1.3: decay-phase limit Δθ1, a nationally determined "
                 "parameter; recommended value 200 K (from memory of the Note)")
_CONCRETE_DEFAULT_SOURCE = ("EN 1992-1-2:2004 §3.3.3(2) Note (Annex A is compatible with the "
                            "lower limit); §3.3.2(2) (1.5 % moisture); FORMAT.md defaults")


# ----------------------------------------------------------------------------- input fields


@dataclass(frozen=True)
class _LayersField(Items):
    """Layers from the exposed face; each a law material with its options, or constant values."""

    def convert(self, node, ctx, path):
        layers = super().convert(node, ctx, path)
        failed = False
        for i, (item, layer) in enumerate(zip(node.value, layers)):
            where = f"{path}[{i}]"
            material = layer["material"]
            own = [k for k in _CONSTANT if layer[k] is not None]
            options = [k for k in ("conductivity_limit", "moisture_content")
                       if layer[k] is not None]
            law = material.get("law") if material is not None else None
            if material is None:
                missing = [k for k in _CONSTANT if layer[k] is None]
                if missing or options:
                    ctx.error(item, where, "a layer without a material needs constant "
                              "conductivity, density and specific_heat (and takes no concrete "
                              "options)", "{thickness, material} or {thickness, conductivity, "
                              "density, specific_heat}",
                              ("missing " + ", ".join(missing)) if missing
                              else ", ".join(options))
                    failed = True
            elif law == _CONCRETE:
                extra = [k for k in ("conductivity", "specific_heat") if layer[k] is not None]
                if extra:
                    ctx.error(item, where, f"material '{material['name']}' follows the laws "
                              "of EN 1992-1-2 §3.3; its conductivity and specific heat are "
                              "set by them", "conductivity_limit, moisture_content or density "
                              "(ρ at 20 °C)", ", ".join(extra))
                    failed = True
            elif law == _STEEL:
                if own or options:
                    ctx.error(item, where, f"material '{material['name']}' follows the laws "
                              "of EN 1993-1-2 §3.2–3.4 and takes no options",
                              "{thickness, material}", ", ".join(own + options))
                    failed = True
            elif law:
                ctx.error(item, where, f"material '{material['name']}' names an unknown law",
                          f"{_CONCRETE} or {_STEEL}", repr(law))
                failed = True
            else:
                lacking = [k for k in _CONSTANT if material.get(k) is None]
                if own or options or lacking:
                    ctx.error(item, where, f"material '{material['name']}' is a constant-"
                              "property material: give either the material or the layer's own "
                              "values", "{thickness, material} with a material that has "
                              "conductivity, density and specific_heat",
                              ", ".join(own + options) if own or options
                              else "material lacks " + ", ".join(lacking))
                    failed = True
        if failed:
            raise _Invalid
        return layers


@dataclass(frozen=True)
class _MonitorField(Items):
    """Monitor points {name, depth}; names become results ``theta_<name>``."""

    def convert(self, node, ctx, path):
        monitors = super().convert(node, ctx, path)
        seen, failed = set(), False
        for i, (item, monitor) in enumerate(zip(node.value, monitors)):
            name = monitor["name"]
            where = f"{path}[{i}].name"
            if not _NAME.match(name) or name in _RESERVED_MONITORS:
                ctx.error(item.value["name"], where, f"monitor name '{name}' is not usable",
                          "lower-case letters, digits and _, not " + ", ".join(_RESERVED_MONITORS),
                          repr(name))
                failed = True
            elif name in seen:
                ctx.error(item.value["name"], where, f"monitor name '{name}' is used twice",
                          "a unique name", repr(name))
                failed = True
            seen.add(name)
        if failed:
            raise _Invalid
        return monitors


_LAYER_FIELDS = (
    Text("name", "layer name", default=None),
    Quantity("thickness", "layer thickness", unit="m", greater_than=0.0, display="mm"),
    MaterialField("material", "material: concrete_siliceous, concrete_calcareous, carbon_steel "
                  "(temperature-dependent laws) or a constant-property board", default=None),
    Quantity("conductivity", "constant conductivity λ (layer without a material)", default=None,
             unit="W/(m*K)", greater_than=0.0),
    Quantity("density", "constant density ρ; for EN 1992-1-2 concrete ρ(20 °C) (default "
             "2300 kg/m³)", default=None, unit="kg/m^3", greater_than=0.0),
    Quantity("specific_heat", "constant specific heat c (layer without a material)",
             default=None, unit="J/(kg*K)", greater_than=0.0),
    Choice("conductivity_limit", "EN 1992-1-2 concrete: conductivity limit of §3.3.3(2) "
           "(default lower)", default=None, options=("lower", "upper")),
    Quantity("moisture_content", "EN 1992-1-2 concrete: moisture content by weight, 0 to 3 % "
             "(default 1.5 %; §3.3.2(2)); above 3 % a spalling warning, and the 3 % peak is "
             "used", default=None, percent=True, at_least=0.0, less_than=1.0),
    Text("source", "where the layer's values come from", default=None),
)

_MONITOR_FIELDS = (
    Text("name", "monitor name (result theta_<name>)"),
    Quantity("depth", "depth from the exposed face", unit="m", at_least=0.0, display="mm"),
)


# ----------------------------------------------------------------------------- compute


_MOISTURE_CAP = 0.03  # EN 1992-1-2 §3.3.2(2): the specific-heat peak is given up to 3 %


def _layer_law(i: int, layer: dict, out) -> tuple[ThermalLaw, str]:
    """Return the law of one layer and a description for the report."""
    material = layer["material"]
    if material is None:
        law = constant_law(layer["conductivity"], layer["density"], layer["specific_heat"],
                           layer.get("source") or "stated in the layer")
        return law, "constant properties stated in the layer"
    law_name = material.get("law")
    if law_name == _CONCRETE:
        limit = layer["conductivity_limit"] or "lower"
        u = _DEFAULT_MOISTURE if layer["moisture_content"] is None else layer["moisture_content"]
        if u > _MOISTURE_CAP:
            # §3.3.2(2) gives the peak only up to 3 %; more moisture only delays the unexposed
            # face (a longer plateau near 100 °C), so taking the 3 % peak errs on the safe side.
            out.warn(f"Layer {i + 1}: moisture content {100 * u:.3g} % is above 3 %: explosive "
                     "spalling must be considered (EN 1992-1-2 §4.5.1(2)). The specific-heat "
                     "peak is taken at its 3 % value (2020 J/(kg·K)), which shortens the "
                     "insulation time compared with a wetter peak.",
                     "EN 1992-1-2:2004 §3.3.2(2) and §4.5.1(2)")
            u = _MOISTURE_CAP
        rho20 = _DEFAULT_DENSITY_20 if layer["density"] is None else layer["density"]
        defaults = [text for text, given in (
            ("lower-limit conductivity", layer["conductivity_limit"]),
            ("moisture content 1.5 %", layer["moisture_content"]),
            ("ρ(20 °C) = 2300 kg/m³", layer["density"])) if given is None]
        if defaults:
            out.note(f"Layer {i + 1} ({material['name']}): " + ", ".join(defaults)
                     + " by default.", _CONCRETE_DEFAULT_SOURCE)
        try:
            law = concrete_law(limit, u, rho20)
        except PhysicsRangeError as exc:
            field = {"concrete moisture content": "moisture_content",
                     "concrete density at 20 °C": "density"}.get(exc.quantity, "material")
            value, expected = exc.value, exc.expected
            if field == "moisture_content":
                value = f"{100 * float(value):.4g} %"
                expected = ("0 to 3 % by weight (EN 1992-1-2 §3.3.2(2)); above 3 % explosive "
                            "spalling must be assessed (EN 1992-1-2 §4.5.1(2))")
            raise PhysicsRangeError(f"layers[{i}].{field}", value, expected) from None
        return law, (f"EN 1992-1-2 §3.3 laws, {limit}-limit conductivity, moisture "
                     f"{100 * u:.3g} %, ρ(20 °C) = {rho20:.4g} kg/m³")
    if law_name == _STEEL:
        return carbon_steel_law(), "EN 1993-1-2 §3.2–3.4 laws of carbon steel"
    law = constant_law(material["conductivity"], material["density"], material["specific_heat"],
                       material.get("source", ""))
    return law, f"constant properties of library material {material['name']}"


def _law_curves(laws):
    """Plain data for the materials-law figure: λ, c, ρ over 20–1200 °C for each distinct law."""
    theta = np.linspace(20.0, 1200.0, 1181)
    kelvin = theta + ZERO_CELSIUS
    curves, seen = [], set()
    for label, law in laws:
        if law.name == "constant":
            continue
        key = (law.name, tuple(sorted(law.options.items())))
        if key in seen:
            continue
        seen.add(key)
        curves.append({"label": label, "source": law.source, "theta": theta.tolist(),
                       "conductivity": np.asarray(law.conductivity(kelvin)).tolist(),
                       "specific_heat": np.asarray(law.specific_heat(kelvin)).tolist(),
                       "density": np.asarray(law.density(kelvin)).tolist()})
    return curves


def _exposed_flux_step(out, run, fire, alpha, inp, t_rep):
    j = int(np.argmin(np.abs(run.times - t_rep)))
    tg, ts = float(run.boundary_temperature[j]), float(run.exposed_surface[j])
    phi, em, ef = inp.configuration_factor, inp.exposed_emissivity, inp.emissivity_fire
    sigma = 5.670374419e-8
    h_net = alpha * (tg - ts) + phi * em * ef * sigma * (tg ** 4 - ts ** 4)
    out.step(r"\dot h_{net}",
             r"\alpha_c\,(T_g - T_m) + \Phi\,\varepsilon_m\,\varepsilon_f\,\sigma\,(T_g^4 - T_m^4)",
             rf"{out.q(alpha, 'W/(m^2*K)')} \cdot ({out.q(tg, 'K', 'K')} - {out.q(ts, 'K', 'K')})"
             rf" + {out.q(phi, '1')} \cdot {out.q(em, '1')} \cdot {out.q(ef, '1')} \cdot \sigma"
             rf" \cdot (({out.q(tg, 'K', 'K')})^4 - ({out.q(ts, 'K', 'K')})^4)",
             h_net, "W/m^2", label=f"Net heat flux into the exposed face at "
                                   f"t = {out.qt(run.times[j], 's', 'min')} (gas and surface "
                                   "temperatures from the computation)",
             source="EN 1991-1-2:2002 §3.1, eqs. (3.1)–(3.3)", display_unit="kW/m^2")


def _unexposed_flux_step(out, run, inp, t_rep):
    j = int(np.argmin(np.abs(run.times - t_rep)))
    tu, ta = float(run.unexposed_surface[j]), float(inp.initial_temperature)
    h, e = inp.unexposed_convection, inp.unexposed_emissivity
    sigma = 5.670374419e-8
    q = h * (tu - ta) + e * sigma * (tu ** 4 - ta ** 4)
    out.step(r"\dot h_{out}", r"\alpha_c\,(T_{u} - T_\infty) + \varepsilon_m\,\sigma\,"
                              r"(T_{u}^4 - T_\infty^4)",
             rf"{out.q(h, 'W/(m^2*K)')} \cdot ({out.q(tu, 'K', 'K')} - {out.q(ta, 'K', 'K')})"
             rf" + {out.q(e, '1')} \cdot \sigma \cdot (({out.q(tu, 'K', 'K')})^4 - "
             rf"({out.q(ta, 'K', 'K')})^4)", q, "W/m^2",
             label=f"Heat lost from the unexposed face at t = {out.qt(run.times[j], 's', 'min')}",
             source="EN 1991-1-2:2002 §3.1(5), with eqs. (3.1)–(3.3)")


def _insulation_step(out, run, t_ins, limit_at):
    rise = run.unexposed_rise
    j = int(np.searchsorted(run.times, t_ins, side="left"))
    j = min(max(j, 1), run.times.size - 1)
    t0, t1, d0, d1 = run.times[j - 1], run.times[j], rise[j - 1], rise[j]
    lim = limit_at(t1)
    out.step(r"t_I", r"t_j + (t_{j+1} - t_j)\,\frac{\Delta\theta_{lim} - \Delta\theta_j}"
                     r"{\Delta\theta_{j+1} - \Delta\theta_j}",
             rf"{out.q(t0, 's', 'min')} + {out.q(t1 - t0, 's')} \cdot \frac{{{out.q(lim, 'K')} - "
             rf"{out.q(d0, 'K')}}}{{{out.q(d1, 'K')} - {out.q(d0, 'K')}}}", t_ins, "s",
             label="Time to insulation: rise of the unexposed face above the initial "
                   "temperature reaches the limit (linear between steps)",
             source="EN 1363-1 (140 K mean rise); EN 1991-1-2:2002 §2.1.3",
             display_unit="min")


def _compute_wall(inp, out):
    fire = inp.fire
    if fire is None and inp.duration is None:
        raise PhysicsRangeError("fixed_temperature", "no duration",
                                "a duration: with fixed_temperature there is no fire to take it "
                                "from")
    duration = exposure_duration(inp.duration, fire) if fire is not None else float(inp.duration)
    if fire is not None and inp.duration is None:
        out.note(f"Duration {out.qt(duration, 's', 'min')}: the fire's.", fire.source)
    required = inp.required_resistance
    if required is not None and required > duration * (1 + 1e-12):
        raise PhysicsRangeError("required_resistance", format_quantity(required, "s", "min", 4),
                                f"a required period within the duration "
                                f"({format_quantity(duration, 's', 'min', 4)})")
    if inp.time_step > duration:
        raise PhysicsRangeError("time_step", format_quantity(inp.time_step, "s", "s", 4),
                                f"a step within the duration "
                                f"({format_quantity(duration, 's', 'min', 4)})")

    parametric = fire is not None and fire.name == "parametric"
    decay_from = decay_rise = None
    if inp.decay_insulation_rise is not None and not parametric:
        raise PhysicsRangeError("decay_insulation_rise", format_quantity(
            inp.decay_insulation_rise, "K", "K", 4), "only with a parametric fire (the decay "
            "phase of EN 1991-1-2 Annex A, §2.1.3)")
    if parametric:
        decay_from = float(fire.t_max)
        if inp.decay_insulation_rise is None:
            decay_rise = _DECAY_DEFAULT
            out.note(f"Decay-phase insulation limit {out.qt(decay_rise, 'K', difference=True)} after the gas peak "
                     f"at {out.qt(decay_from, 's', 'min')} (default).", _DECAY_SOURCE)
        else:
            decay_rise = float(inp.decay_insulation_rise)
            out.note(f"Decay-phase insulation limit {out.qt(decay_rise, 'K', difference=True)} after the gas peak "
                     f"at {out.qt(decay_from, 's', 'min')} (stated).",
                     "EN 1991-1-2:2002 §2.1.3 (nationally determined parameter)")
        out.note(f"Insulation limit {out.qt(inp.insulation_rise, 'K', difference=True)} until the gas peak.",
                 "EN 1991-1-2:2002 §2.1.3")

    # Layers
    laws, descriptions, law_labels = [], [], []
    for i, layer in enumerate(inp.layers):
        law, text = _layer_law(i, layer, out)
        label = layer["name"] or (layer["material"]["name"] if layer["material"] else
                                  f"layer {i + 1}")
        laws.append((label, law))
        law_labels.append(label)
        descriptions.append(f"{i + 1}. {label}: {out.qt(layer['thickness'], 'm', 'mm')}, {text}")
    layers = [Layer(layer["thickness"], law, label)
              for layer, (label, law) in zip(inp.layers, laws)]
    total = float(sum(layer["thickness"] for layer in inp.layers))

    monitors = inp.monitor or []
    for j, monitor in enumerate(monitors):
        if monitor["depth"] > total * (1 + 1e-12):
            raise PhysicsRangeError(f"monitor[{j}].depth",
                                    format_quantity(monitor["depth"], "m", "mm", 4),
                                    f"a depth within the element "
                                    f"({format_quantity(total, 'm', 'mm', 4)})")

    # Exposure
    if fire is not None:
        alpha = fire_convection(inp.exposed_convection, fire)
        exposure = FireExposure(fire, alpha, inp.exposed_emissivity, inp.emissivity_fire,
                                inp.configuration_factor)
        alpha_source = ("the fire's own" if inp.exposed_convection is None
                        else "set in this block")
        out.note(f"Exposed face: gas at the {fire.name} curve, αc = "
                 f"{out.qt(alpha, 'W/(m^2*K)')} ({alpha_source}), εm = "
                 f"{out.qt(inp.exposed_emissivity, '1')}, εf = "
                 f"{out.qt(inp.emissivity_fire, '1')}, Φ = "
                 f"{out.qt(inp.configuration_factor, '1')}; radiation temperature taken equal to "
                 "the gas temperature.", f"EN 1991-1-2:2002 §3.1, eqs. (3.1)–(3.3); {fire.source}")
    else:
        held = float(inp.fixed_temperature)
        exposure = HeldTemperature(lambda t: np.full_like(np.asarray(t, dtype=float), held))
        alpha = None
        out.note(f"Exposed face held at {out.qt(held, 'K', 'degC')} from the start.",
                 "stated input")
    out.note(f"Unexposed face: convection {out.qt(inp.unexposed_convection, 'W/(m^2*K)')} plus "
             f"radiation with εm = {out.qt(inp.unexposed_emissivity, '1')} to surroundings at "
             f"the initial temperature {out.qt(inp.initial_temperature, 'K', 'degC')}.",
             "EN 1991-1-2:2002 §3.1(5)")

    report = sorted({t for t in PROFILE_TIMES if t <= duration * (1 + 1e-12)}
                    | ({required} if required is not None else set()) | {duration})
    options = dict(initial_temperature=inp.initial_temperature,
                   unexposed_convection=inp.unexposed_convection,
                   unexposed_emissivity=inp.unexposed_emissivity,
                   monitor_depths=[m["depth"] for m in monitors], report_times=report,
                   insulation_rise=inp.insulation_rise, decay_insulation_rise=decay_rise,
                   decay_from=decay_from, cell_size=inp.cell_size, min_cells=DEFAULT_MIN_CELLS,
                   time_step=inp.time_step)
    try:
        check = check_convergence(layers, exposure, duration, **options)
    except PhysicsRangeError as exc:
        raise _located(exc) from None
    run = check.base

    # Steps
    for i, (layer, (label, law)) in enumerate(zip(inp.layers, laws)):
        if law.name == _CONCRETE:
            u = law.options["moisture_content"]
            peak = concrete_specific_heat_peak(u)
            if u <= 0.015:
                formula = r"900 + (1470 - 900)\,\frac{u}{1.5\,\%}"
                numbers = rf"900 + (1470 - 900) \cdot \frac{{{out.q(u, '1', '%')}}}{{1.5\,\%}}"
            else:
                formula = r"1470 + (2020 - 1470)\,\frac{u - 1.5\,\%}{1.5\,\%}"
                numbers = (rf"1470 + (2020 - 1470) \cdot \frac{{{out.q(u, '1', '%')} - 1.5\,\%}}"
                           r"{1.5\,\%}")
            out.step(r"c_{p,peak}", formula, numbers, peak, "J/(kg*K)",
                     label=f"Peak specific heat of layer {i + 1} ({label}) between 100 and "
                           "115 °C, falling linearly to 1000 J/(kg·K) at 200 °C",
                     source="EN 1992-1-2:2004 §3.3.2(2)")
    t_rep = required if required is not None else duration
    if fire is not None:
        _exposed_flux_step(out, run, fire, alpha, inp, t_rep)
    _unexposed_flux_step(out, run, inp, t_rep)

    def limit_at(t):
        if decay_from is not None and t > decay_from:
            return decay_rise
        return inp.insulation_rise

    out.simulated_until = duration
    t_ins = run.time_to_insulation
    if t_ins is None:
        out.not_reached("time_to_insulation", f"not reached in {out.qt(duration, 's', 'min')}")
    else:
        if t_ins > 0.0:
            _insulation_step(out, run, t_ins, limit_at)
        out.result("time_to_insulation", t_ins)
    out.result("theta_unexposed_end", float(run.unexposed_surface[-1]))
    t_at = required if required is not None else duration
    if required is not None:
        out.result("theta_unexposed_at_required",
                   float(np.interp(required, run.times, run.unexposed_surface)))
    for j, monitor in enumerate(monitors):
        out.result(f"theta_{monitor['name']}", float(np.interp(t_at, run.times, run.monitors[j])),
                   unit="K", meaning=f"temperature at {out.qt(monitor['depth'], 'm', 'mm')} from "
                   "the exposed face, at " + ("the required period" if required is not None
                                              else "the end"), temperature=ABSOLUTE,
                   display="degC")

    q_in, q_out, q_st = run.heat_in[-1], run.heat_out[-1], run.heat_stored[-1]
    out.step(r"\varepsilon_Q", r"\frac{|Q_{in} - Q_{out} - Q_{stored}|}{Q_{in}}",
             rf"\frac{{|{out.q(q_in, 'J/m^2', 'MJ/m^2')} - {out.q(q_out, 'J/m^2', 'MJ/m^2')} - "
             rf"{out.q(q_st, 'J/m^2', 'MJ/m^2')}|}}{{{out.q(q_in, 'J/m^2', 'MJ/m^2')}}}",
             abs(q_in - q_out - q_st) / q_in if q_in else 0.0, "1",
             label="Energy balance of the computation at the end (heat in = heat stored + heat "
                   "out; a check of the numerical method)",
             source="first law of thermodynamics (common practice)")

    # Statement of method and verification
    out.note("Layers from the exposed face: " + "; ".join(descriptions) + ".",
             "; ".join(sorted({law.source for _, law in laws if law.source})))
    out.note("Method: one-dimensional transient conduction, " + run.mesh.statement()
             + ". Harmonic-mean conductance between cells (perfect contact between layers), face "
               "nodes without heat capacity, heat capacity from the tabulated enthalpy "
               "∫ρ(θ)c(θ)dθ (energy-conserving across the moisture peak). "
             f"Energy balance error {run.energy_balance_error:.1e}.",
             "calcdoc.physics.transient (method stated in its module documentation)")
    what = ("time to insulation" if check.quantity == "time_to_insulation"
            else "rise of the unexposed face at the end")
    text = (f"Mesh and time step check: halving both (cells {run.mesh.cells_per_layer} → "
            f"{check.refined.mesh.cells_per_layer}, Δt {out.qt(run.mesh.time_step, 's')} → "
            f"{out.qt(check.refined.mesh.time_step, 's')}) changes the {what} by "
            f"{100 * check.relative_change:.2g} % (limit {100 * check.limit:.0f} %).")
    out.note(text, "FORMAT.md, wall_fire_exposure")
    if not check.passed:
        out.warn(text + " The result is not resolved to 1 %: reduce cell_size and time_step.",
                 "FORMAT.md, wall_fire_exposure")
    for index, low, high, (lo, hi) in run.outside_law_range():
        label = laws[index][0]
        beyond = []
        if low < lo - 1e-6:
            beyond.append(f"down to {out.qt(low, 'K', 'degC')}, below "
                          f"{out.qt(lo, 'K', 'degC')}")
        if high > hi + 1e-6:
            beyond.append(f"up to {out.qt(high, 'K', 'degC')}, above {out.qt(hi, 'K', 'degC')}")
        out.warn(f"Layer {index + 1} ({label}) reached temperatures {' and '.join(beyond)}, "
                 "outside the range of its material law; the value at the end of the range was "
                 "held there.", laws[index][1].source)
    if any(law.name == _CONCRETE for _, law in laws):
        out.note("Explosive spalling is not modelled. It is unlikely where the moisture content "
                 "is below k = 3 % by weight (recommended value); the engineer confirms that the "
                 "concrete, its moisture and its exposure meet §4.5.", "EN 1992-1-2:2004 §4.5.1")
    out.note("Insulation is judged on the rise of the unexposed face above the initial "
             "temperature (in one dimension the mean and the maximum rise coincide). Moisture "
             "enters only through the specific-heat peak; there is no moisture migration, no "
             "spalling and no fall-off of layers.", "EN 1363-1; EN 1991-1-2:2002 §2.1.3")

    # Series and figure data
    out.add_series("theta_unexposed", run.times, run.unexposed_surface,
                   label="unexposed face temperature")
    out.add_series("theta_exposed", run.times, run.exposed_surface,
                   label="exposed face temperature")
    for j, monitor in enumerate(monitors):
        out.add_series(f"theta_{monitor['name']}", run.times, run.monitors[j],
                       label=f"temperature at {out.qt(monitor['depth'], 'm', 'mm')}")
    rows = [int(np.argmin(np.abs(run.report_times - t))) for t in report]
    out.figure_data["wall"] = {
        "times": run.times.tolist(), "boundary": run.boundary_temperature.tolist(),
        "held": fire is None, "fire": fire.name if fire is not None else "held surface",
        "exposed": run.exposed_surface.tolist(), "unexposed": run.unexposed_surface.tolist(),
        "initial": float(inp.initial_temperature), "limit": float(inp.insulation_rise),
        "decay_limit": decay_rise, "decay_from": decay_from, "duration": duration,
        "required": required, "time_to_insulation": t_ins,
        "depths": run.node_depths.tolist(),
        "profiles": {f"{t:.6g}": run.profiles[row].tolist() for t, row in zip(report, rows)},
        "interfaces": np.cumsum([layer["thickness"] for layer in inp.layers])[:-1].tolist(),
        "monitors": [{"name": m["name"], "depth": m["depth"], "history": run.monitors[j].tolist()}
                     for j, m in enumerate(monitors)],
        "laws": _law_curves(list(zip(law_labels, (law for _, law in laws))))}


_LOCATED_NAMES = {"time step": "time_step", "cell size": "cell_size",
                  "initial temperature": "initial_temperature"}


def _located(exc: PhysicsRangeError) -> PhysicsRangeError:
    for key, name in _LOCATED_NAMES.items():
        if str(exc.quantity).startswith(key):
            return PhysicsRangeError(name, exc.value, exc.expected)
    if str(exc.quantity).startswith("time t"):
        return PhysicsRangeError("duration", exc.value, exc.expected)
    match = re.match(r"layer (\d+) ", str(exc.quantity))
    if match:
        return PhysicsRangeError(f"layers[{int(match.group(1)) - 1}].thickness", exc.value,
                                 f"{exc.quantity}: {exc.expected}")
    return exc


# ----------------------------------------------------------------------------- figures


def _figure_profiles(block, data):
    from calcdoc.render.plots import LINE_STYLES, COLOURS, figure, svg_of
    depths_mm = np.asarray(data["depths"]) * 1000.0
    with figure(block.key + "-profiles") as (fig, ax):
        for n, (t, profile) in enumerate(data["profiles"].items()):
            ax.plot(depths_mm, np.asarray(profile) - ZERO_CELSIUS,
                    color=COLOURS[n % len(COLOURS)], linestyle=LINE_STYLES[n % len(LINE_STYLES)],
                    label=f"t = {float(t) / 60.0:.0f} min")
        for x in data["interfaces"]:
            ax.axvline(1000.0 * x, color="#777777", linewidth=0.6, linestyle=":")
        ax.set_xlabel("depth from the exposed face x [mm]")
        ax.set_ylabel("temperature θ [°C]")
        ax.set_xlim(0.0, depths_mm[-1])
        ax.set_ylim(bottom=0.0)
        ax.legend(loc="upper right")
        svg = svg_of(fig)
    return Figure(block.key + "-profiles", svg,
                  f"Temperature through the thickness of {block.key} at the report times "
                  "(exposed face at 0; dotted lines: layer interfaces)")


def _figure_unexposed(block, data):
    from calcdoc.render.plots import (LINE_STYLES, figure, mark_horizontal, mark_vertical,
                                      svg_of, thin)
    minutes = np.asarray(data["times"]) / 60.0
    initial = data["initial"] - ZERO_CELSIUS
    with figure(block.key + "-unexposed") as (fig, ax):
        ax.plot(*thin(minutes, np.asarray(data["unexposed"]) - ZERO_CELSIUS), color="#1f3b73",
                linestyle=LINE_STYLES[0], label="unexposed face θ")
        if data["decay_from"] is None:
            mark_horizontal(ax, initial + data["limit"],
                            f"insulation limit: initial + {data['limit']:.0f} K")
        else:
            peak = data["decay_from"] / 60.0
            end = data["duration"] / 60.0
            ax.plot([0.0, peak, peak, end],
                    [initial + data["limit"]] * 2 + [initial + data["decay_limit"]] * 2,
                    color="#000000", linestyle="--", linewidth=0.9,
                    label=f"insulation limit: + {data['limit']:.0f} K to the gas peak, "
                          f"+ {data['decay_limit']:.0f} K after")
        if data["required"] is not None:
            mark_vertical(ax, data["required"] / 60.0,
                          f"required {data['required'] / 60.0:.0f} min")
        if data["time_to_insulation"] is not None:
            t = data["time_to_insulation"]
            rise = np.interp(t, data["times"], data["unexposed"]) - ZERO_CELSIUS
            ax.plot([t / 60.0], [rise], marker="o", color="#000000", linestyle="none",
                    label=f"insulation ends, {t / 60.0:.0f} min")
        ax.set_xlabel("time t [min]")
        ax.set_ylabel("unexposed face temperature θ [°C]")
        ax.set_xlim(0.0, data["duration"] / 60.0)
        limits = [initial + data["limit"]]
        if data["decay_limit"] is not None:
            limits.append(initial + data["decay_limit"])
        top = max(max(data["unexposed"]) - ZERO_CELSIUS, *limits)
        ax.set_ylim(min(0.0, initial - 5.0), 1.12 * top)
        ax.legend(loc="lower right")
        svg = svg_of(fig)
    return Figure(block.key + "-unexposed", svg,
                  f"Unexposed face temperature of {block.key} with the insulation limit "
                  f"(rise of {data['limit']:.0f} K above the initial temperature)")


def _figure_histories(block, data):
    from calcdoc.render.plots import LINE_STYLES, COLOURS, figure, svg_of, thin
    minutes = np.asarray(data["times"]) / 60.0
    with figure(block.key + "-histories") as (fig, ax):
        lines = [("held surface temperature" if data["held"] else f"gas θg ({data['fire']})",
                  data["boundary"]), ("exposed face", data["exposed"])]
        lines += [(f"{m['name']} ({1000 * m['depth']:.0f} mm)", m["history"])
                  for m in data["monitors"]]
        lines.append(("unexposed face", data["unexposed"]))
        for n, (label, values) in enumerate(lines):
            ax.plot(*thin(minutes, np.asarray(values) - ZERO_CELSIUS),
                    color=COLOURS[n % len(COLOURS)],
                    linestyle=LINE_STYLES[n % len(LINE_STYLES)], label=label)
        ax.set_xlabel("time t [min]")
        ax.set_ylabel("temperature θ [°C]")
        ax.set_xlim(0.0, data["duration"] / 60.0)
        ax.set_ylim(bottom=0.0)
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0))
        svg = svg_of(fig)
    return Figure(block.key + "-histories", svg,
                  f"Temperatures of {block.key} over time: exposure, faces and monitor points")


def material_law_figure(key: str, curves: list[dict]) -> Figure:
    """Return the materials-appendix figure: λ, c and ρ against θ for each law in ``curves``.

    ``curves`` holds plain data as produced for a block's figure data (label, theta [°C],
    conductivity [W/(m·K)], specific_heat [J/(kg·K)], density [kg/m³], source).
    """
    from calcdoc.render.plots import LINE_STYLES, COLOURS, figure, svg_of, thin
    with figure(key, height_mm=62) as (fig, ax):
        fig.delaxes(ax)
        axes = fig.subplots(1, 3)
        panels = (("conductivity", "λ [W/(m·K)]"), ("specific_heat", "c [J/(kg·K)]"),
                  ("density", "ρ [kg/m³]"))
        for axis, (name, ylabel) in zip(axes, panels):
            for n, curve in enumerate(curves):
                axis.plot(*thin(curve["theta"], curve[name]), color=COLOURS[n % len(COLOURS)],
                          linestyle=LINE_STYLES[n % len(LINE_STYLES)], label=curve["label"])
            axis.set_xlabel("θ [°C]")
            axis.set_ylabel(ylabel)
            axis.set_xlim(0.0, 1200.0)
            axis.set_xticks([0, 400, 800, 1200])
        axes[2].legend(loc="lower left")
        svg = svg_of(fig)
    sources = "; ".join(f"{c['label']}: {c['source']}" for c in curves)
    return Figure(key, svg, "Temperature-dependent material laws used (20 °C to 1200 °C). "
                  + sources)


def _figures_wall(block):
    data = block.output.figure_data["wall"]
    figures = [_figure_profiles(block, data), _figure_unexposed(block, data),
               _figure_histories(block, data)]
    if data["laws"]:
        figures.append(material_law_figure(block.key + "-laws", data["laws"]))
    return figures


# ----------------------------------------------------------------------------- declaration


WALL_FIRE_EXPOSURE = Kind(
    name="wall_fire_exposure",
    title="Wall or slab exposed to fire on one face",
    summary="Transient one-dimensional conduction through layers heated by a fire on one face "
            "(EN 1991-1-2 §3.1 boundaries, EN 1992-1-2 / EN 1993-1-2 material laws): "
            "temperatures and the time to the insulation criterion.",
    inputs=(
        _LayersField("layers", "layers from the exposed face", fields=_LAYER_FIELDS,
                     min_items=1),
        FireField("fire", "the fire on the exposed face", default=None),
        Quantity("fixed_temperature", "exposed surface held at this temperature (instead of a "
                 "fire)", default=None, unit="K", temperature=ABSOLUTE, greater_than=0.0),
        Quantity("duration", "exposure duration (default: the fire's; required with "
                 "fixed_temperature)", default=None, unit="s", greater_than=0.0,
                 at_most=MAX_DURATION, display="min"),
        Quantity("exposed_convection", "αc on the exposed face (default: the fire's own)",
                 default=None, unit="W/(m^2*K)", at_least=0.0),
        Quantity("exposed_emissivity", "surface emissivity εm of the exposed face",
                 default="0.7", source="EN 1992-1-2:2004 §2.2(2) (concrete surfaces)",
                 greater_than=0.0, at_most=1.0),
        Quantity("emissivity_fire", "emissivity of the fire εf", default="1.0",
                 source="EN 1991-1-2:2002 §3.1(6)", greater_than=0.0, at_most=1.0),
        Quantity("configuration_factor", "configuration factor Φ of the exposed face",
                 default="1.0", source="EN 1991-1-2:2002 §3.1(7)", greater_than=0.0,
                 at_most=1.0),
        Quantity("unexposed_convection", "αc on the unexposed face (radiation counted "
                 "separately)", default="4 W/(m^2*K)", source="EN 1991-1-2:2002 §3.1(5)",
                 unit="W/(m^2*K)", at_least=0.0),
        Quantity("unexposed_emissivity", "surface emissivity of the unexposed face",
                 default="0.7", source="EN 1992-1-2:2004 §2.2(2) (concrete surfaces)",
                 at_least=0.0, at_most=1.0),
        Quantity("initial_temperature", "uniform initial temperature, also the ambient on the "
                 "unexposed side", default="20 degC",
                 source="EN 1991-1-2:2002 §3.2 (the curves start at 20 °C); EN 1363-1",
                 unit="K", temperature=ABSOLUTE, greater_than=0.0),
        _MonitorField("monitor", "monitor points {name, depth}", default=None,
                      fields=_MONITOR_FIELDS),
        Quantity("insulation_rise", "insulation limit: mean rise of the unexposed face",
                 default="140 K", source="EN 1363-1 (mean rise 140 K); EN 1991-1-2:2002 §2.1.3",
                 unit="K", temperature=DIFFERENCE, greater_than=0.0),
        Quantity("decay_insulation_rise", "parametric fire: limit after the gas peak (nationally "
                 "determined; default 200 K, the recommended value of EN 1991-1-2 §2.1.3)",
                 default=None, unit="K", temperature=DIFFERENCE, greater_than=0.0),
        Quantity("required_resistance", "required fire resistance period (within the duration)",
                 default=None, unit="s", greater_than=0.0, display="min"),
        Quantity("cell_size", "largest cell of the mesh (at least 8 cells per layer)",
                 default="2 mm", source="calcdoc default, checked by halving (FORMAT.md)",
                 unit="m", greater_than=0.0, display="mm"),
        Quantity("time_step", "time step Δt", default="10 s",
                 source="calcdoc default, checked by halving (FORMAT.md)", unit="s",
                 greater_than=0.0),
    ),
    results=(
        ResultSpec("time_to_insulation", "s", "time to the insulation criterion",
                   display="min"),
        ResultSpec("theta_unexposed_end", "K", "unexposed face temperature at the end",
                   temperature=ABSOLUTE),
        ResultSpec("theta_unexposed_at_required", "K", "unexposed face temperature at the "
                   "required period", temperature=ABSOLUTE),
    ),
    compute=_compute_wall,
    figures=_figures_wall,
    exactly_one=(("fire", "fixed_temperature"),),
    caution=FIRE_CAUTION + " This block assesses temperatures and the insulation criterion (I) "
            "by one-dimensional heat conduction only: integrity (E), load-bearing capacity (R), "
            "spalling, joints, penetrations and the fall-off of layers are not assessed.",
    references=("EN 1991-1-2:2002", "EN 1992-1-2:2004", "EN 1993-1-2:2005", "EN 1363-1"),
)

KINDS = (WALL_FIRE_EXPOSURE,)
