"""The ``wall_fire_exposure`` kind: transient conduction through layers heated on one face.

Inputs and results are those of docs/format.md (wall_fire_exposure); the physics is
:func:`calcdoc.physics.transient.check_convergence` (the solver run twice, the second time with
the cells and the time step halved) with the material laws of
:mod:`calcdoc.physics.thermal_laws`.

What the block records, as data (:mod:`calcdoc.data`): the closed-form pieces a checker can redo
by hand as steps — each layer's properties at 20 °C (for concrete and steel from the laws of
EN 1992-1-2 §3.3 and EN 1993-1-2 §3.4, with the table values as operands), the insulation limit
θ_lim = θ_0 + Δθ, and the heat fluxes through both faces at the end of the exposure; the
transient run and what it gives (time to insulation, face and monitor temperatures) as
statements with their figures as named values; and the figures (temperature histories, the
profile through the element at the report times, the material laws for the appendix).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
from scipy.constants import Stefan_Boltzmann as SIGMA

from calcdoc.data import (ABSOLUTE, DIFFERENCE, Axis, Band, FigureData, Line, Mark, Phrase, Point,
                          Value, library_value, phrase)
from calcdoc.errors import MissingInput
from calcdoc.kinds.base import (Choice, InvalidInput, Items, Kind, MaterialField, Quantity,
                                ResultSpec, Text)
from calcdoc.kinds.fire import FIRE_CAUTION, FireField, exposure_duration, fire_convection
from calcdoc.physics import MAX_DURATION, PhysicsRangeError
from calcdoc.physics.thermal_laws import (LAW_TEMPERATURE_RANGE, ZERO_CELSIUS, ThermalLaw,
                                          carbon_steel_law, concrete_conductivity, concrete_law,
                                          concrete_specific_heat_peak, constant_law,
                                          steel_conductivity, steel_specific_heat)
from calcdoc.physics.transient import (DEFAULT_MIN_CELLS, FireExposure, HeldTemperature, Layer,
                                       check_convergence)
from calcdoc.progress import time_steps
from calcdoc.references import Cite

__all__ = ["KINDS", "WALL_FIRE_EXPOSURE", "PROFILE_TIMES"]

#: Times of the profile figure (30, 60, 90 and 120 min, with the required period and the end) [s].
PROFILE_TIMES = (1800.0, 3600.0, 5400.0, 7200.0)

_CONCRETE = "en1992_concrete"
_STEEL = "en1993_carbon_steel"
_CONSTANT = ("conductivity", "density", "specific_heat")
_NAME = re.compile(r"^[a-z0-9_]+$")
_RESERVED_MONITORS = ("unexposed_end", "unexposed_at_required", "unexposed", "exposed")

_DEFAULT_MOISTURE = 0.015
_DEFAULT_DENSITY_20 = 2300.0
_MOISTURE_CAP = 0.03  # EN 1992-1-2 §3.3.2(2): the specific-heat peak is given up to 3 %
_DECAY_DEFAULT = 200.0
# The recommended decay-phase limit is recalled, not read from the printed Note: marked as data,
# so that the package lists it among the values to confirm.
_DECAY_SOURCE = Cite("EN 1991-1-2:2002", "§2.1.3, Note", confirmed=False,
                     key="EN 1991-1-2:2002 §2.1.3 decay-phase insulation limit",
                     value="decay-phase insulation limit 200 K (recommended value)")
# A source is printed as [n, where]: the clause only, the reasons are in the words it supports.
_CONCRETE_DEFAULT_SOURCE = "EN 1992-1-2:2004, §3.3.3(2) Note and §3.3.2(2)"
_EN1992 = "EN 1992-1-2:2004"
_EN1993 = "EN 1993-1-2:2005"
_RUN_SOURCE = "calcdoc.physics.transient (the method is stated in its documentation)"
_RESOLUTION_SOURCE = ("calcdoc input format (docs/format.md), wall_fire_exposure: the mesh and step "
                      "resolve the result to 1 %")
_INSULATION_SOURCE = "EN 1363-1; EN 1991-1-2:2002, §2.1.3"


def _given(value: float, unit: str = "1", display: str | None = None,
           temperature: str | None = None) -> Value:
    """A table, library or default value: printed in full."""
    return Value(float(value), unit, display, temperature, given=True)


def _percent(fraction: float) -> Value:
    return _given(fraction, "1", "%")


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
            raise InvalidInput
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
            raise InvalidInput
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


# ----------------------------------------------------------------------------- layers


@dataclass
class _LayerPlan:
    """One layer as the block uses it: its law, its name, and how the report describes it."""

    index: int
    label: str
    thickness: float
    law: ThermalLaw
    description: Phrase


def _optional_input(out, path: str, fallback: Value) -> Value:
    """Return the input at ``path`` as written, or ``fallback`` where it was not written."""
    try:
        return out.input(path)
    except KeyError:
        return fallback


def _concrete_plan(i: int, layer: dict, label: str, out) -> tuple[ThermalLaw, Phrase]:
    limit = layer["conductivity_limit"] or "lower"
    u = _DEFAULT_MOISTURE if layer["moisture_content"] is None else layer["moisture_content"]
    where = {"n": _given(i + 1), "name": Value(label)}
    if u > _MOISTURE_CAP:
        # §3.3.2(2) gives the peak only up to 3 %; more moisture only delays the unexposed
        # face (a longer plateau near 100 °C), so taking the 3 % peak errs on the safe side.
        out.warn("Layer {n} ({name}): moisture content {u} is above {cap}: explosive spalling "
                 "must be considered (EN 1992-1-2 §4.5.1(2)). The specific-heat peak is taken at "
                 "its {cap} value ({peak}), which shortens the insulation time compared with a "
                 "wetter peak.", f"{_EN1992} §3.3.2(2) and §4.5.1(2)", **where,
                 u=out.input(f"layers[{i}].moisture_content"), cap=_percent(_MOISTURE_CAP),
                 peak=_given(concrete_specific_heat_peak(_MOISTURE_CAP), "J/(kg*K)"))
        u = _MOISTURE_CAP
    rho20 = _DEFAULT_DENSITY_20 if layer["density"] is None else layer["density"]
    defaults = [(text, values) for text, values, given in (
        ("lower-limit conductivity", {}, layer["conductivity_limit"]),
        ("moisture content {u}", {"u": _percent(_DEFAULT_MOISTURE)}, layer["moisture_content"]),
        ("ρ(20 °C) = {rho}", {"rho": _given(_DEFAULT_DENSITY_20, "kg/m^3")}, layer["density"]),
    ) if given is None]
    if defaults:
        values = {k: v for _, part in defaults for k, v in part.items()}
        out.note("Layer {n} ({name}): " + ", ".join(text for text, _ in defaults)
                 + " by default" + ("; the lower limit is the one EN 1992-1-2 Annex A is "
                                    "compatible with" if layer["conductivity_limit"] is None
                                    else "")
                 + ("; ρ(20 °C) is calcdoc's default for normal-weight concrete"
                    if layer["density"] is None else "") + ".",
                 _CONCRETE_DEFAULT_SOURCE, **where, **values)
    try:
        law = concrete_law(limit, u, rho20)
    except PhysicsRangeError as exc:  # the law does not know which layer it is for
        raise PhysicsRangeError(exc.quantity, exc.value, exc.expected, index=i) from None
    description = phrase("EN 1992-1-2 §3.3 concrete, {limit}-limit conductivity, moisture "
                         "content {u}, ρ(20 °C) = {rho}", limit=Value(limit), u=_percent(u),
                         rho=_given(rho20, "kg/m^3"))
    return law, description


def _plan_layers(inp, out) -> list[_LayerPlan]:
    plans = []
    for i, layer in enumerate(inp.layers):
        material = layer["material"]
        label = layer["name"] or (material["name"] if material else "unnamed layer")
        law_name = material.get("law") if material is not None else None
        if material is None:
            law = constant_law(layer["conductivity"], layer["density"], layer["specific_heat"],
                               layer.get("source") or "")
            description = phrase("constant properties stated in the layer")
        elif law_name == _CONCRETE:
            law, description = _concrete_plan(i, layer, label, out)
        elif law_name == _STEEL:
            law, description = carbon_steel_law(), phrase("EN 1993-1-2 §3.2–3.4 carbon steel")
        else:
            law = constant_law(material["conductivity"], material["density"],
                               material["specific_heat"], material.get("source", ""))
            description = phrase("constant properties of the library material {material}",
                                 material=Value(material["name"]))
        plans.append(_LayerPlan(i, label, float(layer["thickness"]), law, description))
    return plans


def _item_of(out, i: int) -> str:
    """The name the input tables give layer ``i`` (its own name, or the list's numbering), so
    that a layer's steps and its inputs name it alike."""
    for record in out.records:
        if record.path == f"layers[{i}].thickness":
            return record.item
    return ""


def _layer_steps(inp, out, plans: list[_LayerPlan]):
    """Each layer's properties at 20 °C, from its law's equations and tables, and its thermal
    diffusivity there: the numbers a checker compares with the standard first."""
    theta = _given(20.0)  # the laws take θ as a number of °C
    for plan in plans:
        i = plan.index
        item = _item_of(out, i)
        layer = inp.layers[i]
        material = layer["material"]
        where = {"n": _given(i + 1), "name": Value(plan.label)}

        def label(words: str) -> Phrase:
            return phrase("Layer {n}, {name}: " + words, **where)

        if plan.law.name == _CONCRETE:
            u = plan.law.options["moisture_content"]
            written = layer["moisture_content"]
            # as written, unless defaulted or capped at 3 % (then the value the law used)
            moisture = (out.input(f"layers[{i}].moisture_content")
                        if written is not None and written <= _MOISTURE_CAP else _percent(u))
            peak = concrete_specific_heat_peak(u)
            peak_words = ("peak specific heat of the concrete between 100 °C and 115 °C, for its "
                          "moisture content u")
            if u <= _DEFAULT_MOISTURE:
                out.step("c_p_peak", "c_0 + (c_1 - c_0) * u / u_1",
                         {"c_0": _given(900.0, "J/(kg*K)"), "c_1": _given(1470.0, "J/(kg*K)"),
                          "u": moisture, "u_1": _percent(0.015)}, peak, "J/(kg*K)",
                         label=label(peak_words), source=f"{_EN1992} §3.3.2(2)", item=item,
                         group="Peak specific heat of concrete between 100 and 115 °C "
                               "(linear between u = 0 and 1.5 %)")
            else:
                out.step("c_p_peak", "c_1 + (c_2 - c_1) * (u - u_1) / u_1",
                         {"c_1": _given(1470.0, "J/(kg*K)"), "c_2": _given(2020.0, "J/(kg*K)"),
                          "u": moisture, "u_1": _percent(0.015)}, peak, "J/(kg*K)",
                         label=label(peak_words), source=f"{_EN1992} §3.3.2(2)", item=item,
                         group="Peak specific heat of concrete between 100 and 115 °C "
                               "(linear between u = 1.5 and 3 %)")
            limit = plan.law.options["conductivity_limit"]
            coefficients = (1.36, 0.136, 0.0057) if limit == "lower" else (2.0, 0.2451, 0.0107)
            lam = out.step(
                "lambda_20", "lambda_0 - lambda_1 * (theta / 100) + lambda_2 * (theta / 100) ** 2",
                {"lambda_0": _given(coefficients[0], "W/(m*K)"),
                 "lambda_1": _given(coefficients[1], "W/(m*K)"),
                 "lambda_2": _given(coefficients[2], "W/(m*K)"), "theta": theta},
                float(concrete_conductivity(ZERO_CELSIUS + 20.0, limit)), "W/(m*K)",
                label=label(f"conductivity of the concrete at θ = 20 °C, {limit} limit"),
                item=item,
                source=f"{_EN1992} §3.3.3(2), eq. ({'3.8' if limit == 'lower' else '3.7'}) "
                       "(θ in °C)",
                group=f"Conductivity of concrete at 20 °C, {limit} limit")
            rho = _optional_input(out, f"layers[{i}].density",
                                  _given(plan.law.options["density_20"], "kg/m^3"))
            c = _given(900.0, "J/(kg*K)")  # §3.3.2(1): 900 J/(kg·K) from 20 °C to 100 °C
            source = f"{_EN1992}, §3.3.2(1) and (3)"
        elif plan.law.name == _STEEL:
            lam = out.step("lambda_20", "lambda_0 - lambda_1 * theta",
                           {"lambda_0": _given(54.0, "W/(m*K)"),
                            "lambda_1": _given(3.33e-2, "W/(m*K)"), "theta": theta},
                           float(steel_conductivity(ZERO_CELSIUS + 20.0)), "W/(m*K)",
                           label=label("conductivity of the steel at θ = 20 °C"), item=item,
                           source=f"{_EN1993} §3.4.1.3(1), eq. (3.3) (θ in °C)",
                           group="Conductivity of carbon steel at 20 °C")
            c = out.step("c_p_20", "c_0 + c_1 * theta - c_2 * theta ** 2 + c_3 * theta ** 3",
                         {"c_0": _given(425.0, "J/(kg*K)"), "c_1": _given(7.73e-1, "J/(kg*K)"),
                          "c_2": _given(1.69e-3, "J/(kg*K)"), "c_3": _given(2.22e-6, "J/(kg*K)"),
                          "theta": theta},
                         float(steel_specific_heat(ZERO_CELSIUS + 20.0)), "J/(kg*K)",
                         label=label("specific heat of the steel at θ = 20 °C"), item=item,
                         source=f"{_EN1993} §3.4.1.2(1), eq. (3.2) (θ in °C)",
                         group="Specific heat of carbon steel at 20 °C")
            rho = _given(7850.0, "kg/m^3")
            source = f"{_EN1993}, §3.2.2(1)"
        else:
            if material is None:
                lam, rho, c = (out.input(f"layers[{i}].{name}") for name in _CONSTANT)
                source = layer.get("source") or ""
            else:
                lam, rho, c = (library_value(material, "conductivity", "W/(m*K)"),
                               library_value(material, "density", "kg/m^3"),
                               library_value(material, "specific_heat", "J/(kg*K)"))
                source = material.get("source", "")
        out.step("a_20", "lambda_20 / (rho_20 * c_p_20)",
                 {"lambda_20": lam, "rho_20": rho, "c_p_20": c},
                 lam.si / (rho.si * c.si), "m^2/s", display="mm^2/s",
                 label=label("thermal diffusivity at 20 °C"), item=item,
                 source=source, group="Thermal diffusivity at 20 °C")


# ----------------------------------------------------------------------------- compute


def _written(out, path: str) -> str:
    """The text an input was written as, for an error message about it."""
    for record in out.records:
        if record.path == path:
            return record.written
    return path


def _compute_wall(inp, out):
    fire = inp.fire
    if fire is None and inp.duration is None:
        raise MissingInput("duration", "a duration: with fixed_temperature there is no fire to "
                                       "take it from")
    duration = exposure_duration(inp.duration, fire) if fire is not None else float(inp.duration)
    t_end = (out.input("duration") if inp.duration is not None
             else _given(duration, "s", "min"))
    if fire is not None and inp.duration is None:
        out.note("Duration {t}: the fire's.", "", t=t_end)  # the fire's row cites its source
    required = inp.required_resistance
    if required is not None and required > duration * (1 + 1e-12):
        raise PhysicsRangeError("required_resistance", _written(out, "required_resistance"),
                                "a required period within the duration of the exposure")

    parametric = fire is not None and fire.name == "parametric"
    decay_from = decay_rise = None
    if inp.decay_insulation_rise is not None and not parametric:
        raise PhysicsRangeError("decay_insulation_rise", _written(out, "decay_insulation_rise"),
                                "only with a parametric fire (the decay phase of EN 1991-1-2 "
                                "Annex A, §2.1.3)")
    rise = out.input("insulation_rise")
    if parametric:
        decay_from = float(fire.t_max)
        peak = Value(decay_from, "s", "min")
        if inp.decay_insulation_rise is None:
            decay_rise = _given(_DECAY_DEFAULT, "K", temperature=DIFFERENCE)
            out.note("Decay-phase insulation limit {rise} after the gas peak at {t} (default).",
                     _DECAY_SOURCE, rise=decay_rise, t=peak)
        else:
            decay_rise = out.input("decay_insulation_rise")
            out.note("Decay-phase insulation limit {rise} after the gas peak at {t} (stated).",
                     "EN 1991-1-2:2002 §2.1.3 (nationally determined parameter)",
                     rise=decay_rise, t=peak)
        out.note("Insulation limit {rise} until the gas peak.", "EN 1991-1-2:2002 §2.1.3",
                 rise=rise)

    plans = _plan_layers(inp, out)
    for plan in plans:
        out.note("Layer {n}, {name}, {d}: " + plan.description.template + ".", plan.law.source,
                 n=_given(plan.index + 1), name=Value(plan.label),
                 d=out.input(f"layers[{plan.index}].thickness"), **plan.description.values)
    layers = [Layer(plan.thickness, plan.law, plan.label) for plan in plans]
    monitors = inp.monitor or []

    # Exposure
    theta_0 = out.input("initial_temperature")
    if fire is not None:
        alpha = fire_convection(inp.exposed_convection, fire)
        exposure = FireExposure(fire, alpha, inp.exposed_emissivity, inp.emissivity_fire,
                                inp.configuration_factor)
        h_c = (out.input("exposed_convection") if inp.exposed_convection is not None
               else _given(alpha, "W/(m^2*K)"))
        out.note("Exposed face: gas temperature of the {fire} fire, convection coefficient {h_c} "
                 + ("(the fire's own)" if inp.exposed_convection is None else
                    "(set in this block)")
                 + "; radiation temperature taken equal to the gas temperature.",
                 "EN 1991-1-2:2002, §3.1, eqs. (3.1)–(3.3)",
                 fire=Value(fire.name), h_c=h_c)
    else:
        held = float(inp.fixed_temperature)
        exposure = HeldTemperature(lambda t: np.full_like(np.asarray(t, dtype=float), held))
        h_c = None
        out.note("Exposed face held at {theta} from the start.", "",
                 theta=out.input("fixed_temperature"))
    out.note("Unexposed face: convection {h} plus radiation with emissivity {e} to "
             "surroundings at the initial temperature {theta}.", "EN 1991-1-2:2002 §3.1(5)",
             h=out.input("unexposed_convection"), e=out.input("unexposed_emissivity"),
             theta=theta_0)

    report = sorted({t for t in PROFILE_TIMES if t <= duration * (1 + 1e-12)}
                    | ({required} if required is not None else set()) | {duration})
    check = check_convergence(
        layers, exposure, duration, initial_temperature=inp.initial_temperature,
        unexposed_convection=inp.unexposed_convection,
        unexposed_emissivity=inp.unexposed_emissivity,
        monitor_depths=[m["depth"] for m in monitors], report_times=report,
        insulation_rise=inp.insulation_rise,
        decay_insulation_rise=None if decay_rise is None else decay_rise.si,
        decay_from=decay_from, cell_size=inp.cell_size, min_cells=DEFAULT_MIN_CELLS,
        time_step=inp.time_step, on_step=time_steps(out.block_key or "fire wall", duration))
    run = check.base
    out.simulated_until = duration

    # Steps: the closed-form pieces, then the run and what it gives
    _layer_steps(inp, out, plans)
    theta_lim = out.step("theta_lim", "theta_0 + Delta_theta",
                         {"theta_0": theta_0, "Delta_theta": rise},
                         theta_0.si + rise.si, "K", temperature=ABSOLUTE,
                         symbols={"Delta_theta": r"\Delta\theta"},
                         label="Insulation limit: the initial temperature plus the permitted "
                               "mean rise of the unexposed face" + (
                                   ", until the gas peak" if parametric else ""),
                         source=_INSULATION_SOURCE)
    theta_lim_2 = None
    if parametric:
        theta_lim_2 = out.step("theta_lim_2", "theta_0 + Delta_theta_2",
                               {"theta_0": theta_0, "Delta_theta_2": decay_rise},
                               theta_0.si + decay_rise.si, "K", temperature=ABSOLUTE,
                               symbols={"Delta_theta_2": r"\Delta\theta_{2}"},
                               label="Insulation limit after the gas peak (decay phase)",
                               source="EN 1991-1-2:2002 §2.1.3")
    _run_statement(out, run, check, theta_0, t_end)
    _result_statements(out, run, inp, monitors, required, duration, t_end, theta_lim,
                       theta_lim_2, decay_from, rise, decay_rise)
    _flux_steps(out, run, inp, fire, h_c, theta_0, t_end)

    # Warnings and the statement of what is not modelled
    if not check.passed:
        out.warn("Halving the cells and the time step changes the result by {change}, more "
                 "than {limit}: the result is not resolved; reduce cell_size and time_step.",
                 _RESOLUTION_SOURCE,
                 change=Value(check.relative_change, "1", "%"), limit=_percent(check.limit))
    for index, low, high, (lo, hi) in run.outside_law_range():
        where = {"n": _given(index + 1), "name": Value(plans[index].label)}
        if low < lo - 1e-6:
            out.warn("Layer {n} ({name}) reached {low}, below the start of its material law at "
                     "{lo}; the law's value there was held.", plans[index].law.source, **where,
                     low=Value(low, "K", temperature=ABSOLUTE),
                     lo=_given(lo, "K", temperature=ABSOLUTE))
        if high > hi + 1e-6:
            out.warn("Layer {n} ({name}) reached {high}, above the end of its material law at "
                     "{hi}; the law's value there was held.", plans[index].law.source, **where,
                     high=Value(high, "K", temperature=ABSOLUTE),
                     hi=_given(hi, "K", temperature=ABSOLUTE))
    if any(plan.law.name == _CONCRETE for plan in plans):
        out.note("Explosive spalling is not modelled. It is unlikely where the moisture content "
                 "is below k = {k} by weight (recommended value); the engineer confirms that the "
                 "concrete, its moisture and its exposure meet §4.5.", f"{_EN1992} §4.5.1",
                 k=_percent(0.03))
    out.note("Insulation is judged on the rise of the unexposed face above the initial "
             "temperature (in one dimension the mean and the maximum rise coincide). Moisture "
             "enters only through the specific-heat peak; there is no moisture migration, no "
             "spalling and no fall-off of layers.", "EN 1363-1; EN 1991-1-2:2002 §2.1.3")

    # Series and figures
    out.add_series("theta_unexposed", run.times, run.unexposed_surface,
                   label="unexposed face temperature")
    out.add_series("theta_exposed", run.times, run.exposed_surface,
                   label="exposed face temperature")
    for j, monitor in enumerate(monitors):
        out.add_series(f"theta_{monitor['name']}", run.times, run.monitors[j],
                       label=f"temperature at monitor point {monitor['name']}")
    _figures(out, run, inp, plans, monitors, fire, report, duration, required, theta_lim,
             theta_lim_2, decay_from, rise, decay_rise)


def _run_statement(out, run, check, theta_0: Value, t_end: Value):
    mesh, refined = run.mesh, check.refined.mesh
    what = ("the time to insulation" if check.quantity == "time_to_insulation"
            else "the rise of the unexposed face at the end (insulation is not reached)")
    if check.quantity == "time_to_insulation":
        v_1, v_2 = Value(check.value, "s", "min"), Value(check.refined_value, "s", "min")
    else:
        v_1 = Value(check.value, "K", temperature=DIFFERENCE)
        v_2 = Value(check.refined_value, "K", temperature=DIFFERENCE)
    out.statement(
        "delta_halving",
        "Implicit finite volumes (backward Euler) in enthalpy form from a uniform {theta_0} "
        "for {t_end}: cells per layer {cells} of {sizes}, time step {dt}; properties tabulated "
        "every {table} and iterated to {tol} in each step. Halving both (cells per layer "
        "{cells_2}, time step {dt_2}) changes " + what + " from {v_1} to {v_2}, by {change} "
        "(limit {limit}). Energy balance error of the run {energy}.",
        check.relative_change, "1", display="%",
        values={"theta_0": theta_0, "t_end": t_end,
                "cells": _given_list(mesh.cells_per_layer),
                "sizes": Value(list(mesh.cell_sizes), "m", "mm"),
                "dt": _given(mesh.time_step, "s"), "table": _given(mesh.table_spacing, "K",
                                                                   temperature=DIFFERENCE),
                "tol": _given(mesh.tolerance, "K", temperature=DIFFERENCE),
                "cells_2": _given_list(refined.cells_per_layer),
                "dt_2": _given(refined.time_step, "s"), "v_1": v_1, "v_2": v_2,
                "change": Value(check.relative_change, "1", "%"),
                "limit": _percent(check.limit),
                "energy": Value(run.energy_balance_error, "1")},
        symbols={"delta_halving": r"\delta_{1/2}"},
        label="Transient conduction through the layers, checked by halving the cells and the "
              "time step", source=_RUN_SOURCE)


def _given_list(numbers) -> Value:
    return Value([float(n) for n in numbers], "1", given=True)


def _result_statements(out, run, inp, monitors, required, duration, t_end, theta_lim,
                       theta_lim_2, decay_from, rise, decay_rise):
    t_ins = run.time_to_insulation
    if t_ins is None:
        out.not_reached("time_to_insulation", "not reached in {t}", t=Value(duration, "s", "min"))
    elif t_ins <= run.times[0]:
        out.statement("t_I", "The rise of the unexposed face exceeds its limit {limit} from the "
                      "start.", t_ins, "s", values={"limit": rise}, label="Time to insulation",
                      source=_INSULATION_SOURCE, yields="time_to_insulation")
    else:
        j = int(np.clip(np.searchsorted(run.times, t_ins, side="left"), 1, run.times.size - 1))
        after_peak = decay_from is not None and run.times[j] > decay_from
        limit, reached = (decay_rise, theta_lim_2) if after_peak else (rise, theta_lim)
        out.statement(
            "t_I", "The unexposed face reaches {theta_lim} (a rise of {limit} above the initial "
            "temperature) in the time step from t = {t_0} to {t_1} of the run; the time is "
            "interpolated linearly within the step.", t_ins, "s",
            values={"theta_lim": reached, "limit": limit,
                    "t_0": _given(run.times[j - 1], "s"), "t_1": _given(run.times[j], "s")},
            label="Time to insulation, from the transient run", source=_INSULATION_SOURCE,
            yields="time_to_insulation")
    out.statement("theta_u_end", "Temperature of the unexposed face at the end of the exposure, "
                  "t = {t}, from the transient run.", float(run.unexposed_surface[-1]), "K",
                  values={"t": t_end}, label="Unexposed face at the end",
                  yields="theta_unexposed_end")
    at = t_end
    if required is not None:
        at = out.input("required_resistance")
        out.statement("theta_u_req", "Temperature of the unexposed face at the required period "
                      "t = {t} (a time step of the run).",
                      float(np.interp(required, run.times, run.unexposed_surface)), "K",
                      values={"t": at}, label="Unexposed face at the required period",
                      yields="theta_unexposed_at_required")
    t_at = required if required is not None else duration
    for j, monitor in enumerate(monitors):
        name = f"theta_{monitor['name']}"
        value = float(np.interp(t_at, run.times, run.monitors[j]))
        # Declared first so that the results table says what the point is; the statement then
        # gives its value and how it was found.
        out.result(name, value, unit="K", meaning=f"temperature at monitor point "
                   f"{monitor['name']}, at " + ("the required period" if required is not None
                                                else "the end"), temperature=ABSOLUTE,
                   display="degC")
        out.statement(name, "Temperature at the depth {x} from the exposed face (monitor point "
                      "{name}) at t = {t}, linear between the nodes either side of it.", value,
                      "K", values={"x": out.input(f"monitor[{j}].depth"),
                                   "name": Value(monitor["name"]), "t": at},
                      label="Monitor point " + monitor["name"], yields=name, symbols={name: r"\theta_{\mathrm{"
                                            + monitor["name"].replace("_", r"\_") + "}}"})


def _flux_steps(out, run, inp, fire, h_c, theta_0: Value, t_end: Value):
    """The heat fluxes through both faces at the end, from the boundary conditions of
    EN 1991-1-2 §3.1 with the run's surface temperatures: a check on the run a checker can
    redo by hand."""
    theta_s = Value(float(run.exposed_surface[-1]), "K", temperature=ABSOLUTE)
    if fire is not None:
        tg, ts = float(run.boundary_temperature[-1]), theta_s.si
        phi, em, ef = (out.input("configuration_factor"), out.input("exposed_emissivity"),
                       out.input("emissivity_fire"))
        q = h_c.si * (tg - ts) + phi.si * em.si * ef.si * SIGMA * (tg ** 4 - ts ** 4)
        out.step("q_net", "h_c * (theta_g - theta_s) + Phi * varepsilon_m * varepsilon_f * sigma"
                          " * (theta_g ** 4 - theta_s ** 4)",
                 {"h_c": h_c, "theta_g": Value(tg, "K", temperature=ABSOLUTE),
                  "theta_s": theta_s, "Phi": phi, "varepsilon_m": em, "varepsilon_f": ef},
                 q, "W/m^2", display="kW/m^2",
                 label=phrase("Net heat flux into the exposed face at the end, t = {t} (gas "
                              "and surface temperatures from the run)", t=t_end),
                 source="EN 1991-1-2:2002 §3.1, eqs. (3.1)–(3.3)")
    tu, ta = float(run.unexposed_surface[-1]), theta_0.si
    h_u, e_u = out.input("unexposed_convection"), out.input("unexposed_emissivity")
    q_u = h_u.si * (tu - ta) + e_u.si * SIGMA * (tu ** 4 - ta ** 4)
    out.step("q_u", "h_u * (theta_u - theta_0) + varepsilon_u * sigma * (theta_u ** 4 - "
                    "theta_0 ** 4)",
             {"h_u": h_u, "theta_u": Value(tu, "K", temperature=ABSOLUTE), "theta_0": theta_0,
              "varepsilon_u": e_u}, q_u, "W/m^2",
             label=phrase("Heat lost from the unexposed face at the end, t = {t}", t=t_end),
             source="EN 1991-1-2:2002 §3.1(5), with eqs. (3.1)–(3.3)")


# ----------------------------------------------------------------------------- figures




def _series(values) -> tuple:
    return tuple(float(v) for v in np.asarray(values, dtype=float))


def _temperature_axis(label: str, values, floor: float, head: float = 1.12) -> Axis:
    """A temperature axis from 0 °C (or below the lowest value) to ``head`` times the highest
    (in °C), leaving room above the curves for words."""
    top = max(float(np.max(v)) for v in values)
    low = min(ZERO_CELSIUS, floor - 5.0)
    return Axis(label, "K", "degC", (low, ZERO_CELSIUS + head * (top - ZERO_CELSIUS)))


def _limit_marks(theta_lim, theta_lim_2, decay_from, required) -> list[Mark]:
    marks = []
    if theta_lim_2 is None:
        marks.append(Mark("y", theta_lim.si, phrase("insulation limit {t}", t=theta_lim),
                          style=1))
    else:  # one label, above the upper line: two labels 60 K apart would print over each other
        marks.append(Mark("y", theta_lim.si, "", style=1))
        marks.append(Mark("y", theta_lim_2.si, phrase("insulation limits: {t} to the gas peak "
                                                      "(lower line), {t_2} after it",
                                                      t=theta_lim, t_2=theta_lim_2), style=2))
        marks.append(Mark("x", decay_from, "gas peak", style=2))
    if required is not None:
        marks.append(Mark("x", required, phrase("required {t}", t=Value(required, "s", "min")),
                          style=3))
    return marks


def _figures(out, run, inp, plans, monitors, fire, report, duration, required, theta_lim,
             theta_lim_2, decay_from, rise, decay_rise):
    key = out.block_key
    time_axis = Axis("time t", "s", "min", (0.0, duration))
    initial = float(inp.initial_temperature)
    marks = _limit_marks(theta_lim, theta_lim_2, decay_from, required)
    limits = [theta_lim.si] + ([theta_lim_2.si] if theta_lim_2 is not None else [])

    # The unexposed face against the insulation limit
    theta_0 = out.input("initial_temperature")
    if theta_lim_2 is None:
        words = ("Unexposed face temperature with the insulation limit (a rise of {rise} above "
                 "the initial temperature {theta_0})")
    else:
        words = ("Unexposed face temperature with the insulation limits (a rise of {rise} above "
                 "the initial temperature {theta_0} until the gas peak, {rise_2} after it)")
    points = ()
    t_ins = run.time_to_insulation
    if t_ins is not None:
        # the time goes in the caption: words by the point would cover the required period's
        points = (Point(t_ins, float(np.interp(t_ins, run.times, run.unexposed_surface))),)
        words += "; ×: insulation ends at {t_ins}"
    caption = phrase(words, rise=rise, theta_0=theta_0,
                     **({} if decay_rise is None else {"rise_2": decay_rise}),
                     **({} if t_ins is None else {"t_ins": Value(t_ins, "s", "min")}))
    out.figure(FigureData(
        f"{key}-unexposed", caption,
        time_axis,
        _temperature_axis("unexposed face temperature θ", [run.unexposed_surface, limits],
                          initial, head=1.3),
        lines=(Line(_series(run.times), _series(run.unexposed_surface), "unexposed face"),),
        marks=tuple(marks), points=points, legend="lower right"))

    # Every history: exposure, faces and monitor points
    lines = [Line(_series(run.times), _series(run.boundary_temperature),
                  "held surface temperature" if fire is None else f"gas θg ({fire.name})",
                  style=1),
             Line(_series(run.times), _series(run.exposed_surface), "exposed face", style=0)]
    for j, monitor in enumerate(monitors):
        lines.append(Line(_series(run.times), _series(run.monitors[j]),
                          phrase("{name} at {x}", name=Value(monitor["name"]),
                                 x=out.input(f"monitor[{j}].depth")), style=2 + j))
    lines.append(Line(_series(run.times), _series(run.unexposed_surface), "unexposed face",
                      style=2 + len(monitors)))
    out.figure(FigureData(
        f"{key}-histories",
        "Temperatures over time: the exposure, both faces and the monitor points, with the "
        "insulation limit",
        time_axis,
        _temperature_axis("temperature θ", [line.y for line in lines], initial, head=1.45),
        lines=tuple(lines), marks=tuple(marks), legend="best"))

    # Profiles through the element, layers as bands
    total = float(sum(plan.thickness for plan in plans))
    edges = np.concatenate([[0.0], np.cumsum([plan.thickness for plan in plans])])
    rows = [int(np.argmin(np.abs(run.report_times - t))) for t in report]
    profiles = [run.profiles[row] for row in rows]
    out.figure(FigureData(
        f"{key}-profiles",
        "Temperature through the thickness at the report times (exposed face at depth 0; "
        "bands: the layers)",
        Axis("depth from the exposed face x", "m", "mm", (0.0, total)),
        _temperature_axis("temperature θ", profiles, initial),
        lines=tuple(Line(_series(run.node_depths), _series(profile),
                         phrase("t = {t}", t=Value(t, "s", "min")), style=n)
                    for n, (t, profile) in enumerate(zip(report, profiles))),
        bands=tuple(Band(float(edges[i]), float(edges[i + 1]), plan.label,
                         shade=0 if i % 2 == 0 else 2) for i, plan in enumerate(plans)),
        legend="upper right"))

    # The material laws, for the appendix: one figure per law and property
    seen = []
    for plan in plans:
        law = plan.law
        if law.constant or (law.name, law.options) in seen:
            continue
        seen.append((law.name, law.options))
        kelvin = _law_temperatures(law)
        for prop, words, unit in (("conductivity", "thermal conductivity λ", "W/(m*K)"),
                                  ("specific_heat", "specific heat", "J/(kg*K)"),
                                  ("density", "density ρ", "kg/m^3")):
            values = np.asarray(getattr(law, prop)(kelvin), dtype=float) * np.ones_like(kelvin)
            caption = Phrase("Material law, " + words + ", 20 °C to 1200 °C: "
                             + plan.description.template + ". Source: {law_source}.",
                             {**plan.description.values, "law_source": Value(law.source)})
            out.figure(FigureData(
                f"{key}-law-{len(seen)}-{prop}", caption,
                Axis("temperature θ", "K", "degC", LAW_TEMPERATURE_RANGE),
                Axis(words, unit), lines=(Line(_series(kelvin), _series(values)),),
                legend=None, size=(160.0, 60.0), appendix=True))


def _law_temperatures(law: ThermalLaw) -> np.ndarray:
    """Temperatures to draw a law at: every degree, and each side of its jumps and kinks."""
    low, high = LAW_TEMPERATURE_RANGE
    kinks = [b for b in law.breakpoints if low < b < high]
    grid = np.concatenate([np.arange(low, high, 1.0), [high], [b - 1e-6 for b in kinks],
                           [b + 1e-6 for b in kinks]])
    return np.unique(grid)


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
                 default="140 K", source="EN 1363-1; EN 1991-1-2:2002, §2.1.3",
                 unit="K", temperature=DIFFERENCE, greater_than=0.0),
        Quantity("decay_insulation_rise", "parametric fire: limit after the gas peak (nationally "
                 "determined; default 200 K, the recommended value of EN 1991-1-2 §2.1.3)",
                 default=None, unit="K", temperature=DIFFERENCE, greater_than=0.0),
        Quantity("required_resistance", "required fire resistance period (within the duration)",
                 default=None, unit="s", greater_than=0.0, display="min"),
        Quantity("cell_size", "largest cell of the mesh (at least 8 cells per layer)",
                 default="2 mm", source="calcdoc default, checked by halving (docs/format.md)",
                 unit="m", greater_than=0.0, display="mm"),
        Quantity("time_step", "time step Δt", default="10 s",
                 source="calcdoc default, checked by halving (docs/format.md)", unit="s",
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
    exactly_one=(("fire", "fixed_temperature"),),
    caution=FIRE_CAUTION + " This block assesses temperatures and the insulation criterion (I) "
            "by one-dimensional heat conduction only: integrity (E), load-bearing capacity (R), "
            "spalling, joints, penetrations and the fall-off of layers are not assessed.",
    # The parameter names of calcdoc.physics.transient and .thermal_laws → the inputs they
    # come from (the evaluator locates a PhysicsRangeError there).
    input_names={
        "layers": "layers[{index}]",
        "moisture_content": "layers[{index}].moisture_content",
        "density_20": "layers[{index}].density",
        "conductivity_limit": "layers[{index}].conductivity_limit",
        "conductivity": "layers[{index}].conductivity",
        "density": "layers[{index}].density",
        "specific_heat": "layers[{index}].specific_heat",
        "monitor_depths": "monitor[{index}].depth",
        "report_times": "required_resistance",
        "cells_per_layer": "cell_size",
        "ambient_temperature": "initial_temperature",
        "convection": "exposed_convection",
        "emissivity_member": "exposed_emissivity",
        "decay_from": "fire",
        "exposed": "fire",
    },
    references=("EN 1991-1-2:2002", "EN 1992-1-2:2004", "EN 1993-1-2:2005", "EN 1363-1"),
)

KINDS = (WALL_FIRE_EXPOSURE,)
