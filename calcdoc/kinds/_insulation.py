"""Conductivity curves and the sizing of one layer, for the kind ``cylindrical_layers``.

A pipe layer may carry a conductivity curve λ(θ), written in the layer or taken from a library
material. The physics (:mod:`calcdoc.physics.insulation`) solves the temperatures through the
layers together with each curve layer's mean conductivity; this module declares the inputs the
curves and the sizing add, and records their working as data: the converged temperatures as
statements, each mean conductivity as a step (its range within one straight piece of the curve)
or as a statement naming the curve's points it integrates over, the interface temperatures found
again from q′, and for ``size_layer`` the root solve as a statement with q′ and θs worked out at
the required thickness. :mod:`calcdoc.kinds.conduction` calls it; the registry skips the module
(its name starts with an underscore).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
from scipy.constants import zero_Celsius

from calcdoc.data import ABSOLUTE, DIFFERENCE, Value, phrase
from calcdoc.errors import InputError
from calcdoc.kinds.base import (MAX_ITEMS, Field, InputRecord, InvalidInput, MaterialField,
                                Quantity, did_you_mean)
from calcdoc.located import plain
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.insulation import (SIZING_BRACKET, ConductivityCurve,
                                        cylindrical_layers_with_curves, mean_conductivity,
                                        size_layer)
from calcdoc.physics.solvers import brentq
from calcdoc.references import Cite

__all__ = ["ConductivityCurveField", "InsulationMaterial", "LayerName", "LayerCurve",
           "layer_curves", "solve_with_curves", "curve_steps", "interface_check_steps",
           "sizing_steps", "curve_profile", "MEAN_CONDUCTIVITY_SOURCE"]

# The clause is recalled, not read: data for "Values to confirm", never words in the source.
MEAN_CONDUCTIVITY_SOURCE = Cite(
    "EN ISO 12241:2008", "4, thermal conductivity as a function of temperature",
    confirmed=False, key="EN ISO 12241:2008 mean conductivity",
    value="an insulation layer's conductivity taken as the mean of λ(θ) over the layer's "
          "temperature range")
BRENT_SOURCE = "Brent's method (scipy.optimize.brentq)"
# Samples of the figure across the thickness range before the root search (the physics
# default): close enough that a target crossed twice between two samples is not missed in any
# real insulation, cheap enough for a block.
SIZING_SAMPLES = 41

GROUP_CONVERGED = "Temperatures through the layers at convergence, solved with the means"
GROUP_MEAN = "Mean conductivity of each layer with a conductivity curve"
GROUP_CHECK = "Temperature at each interface from q′ (the converged temperatures again)"
GROUP_SIZED_DIAMETERS = "Outer diameter of each layer at the required thickness"
GROUP_SIZED_MEAN = "Mean conductivity at the required thickness"
GROUP_SIZED_LAYERS = "Resistance of each layer per metre at the required thickness"

_CURVE_POINT_SYMBOLS = {"theta_c1": r"\theta_{c,1}", "theta_c2": r"\theta_{c,2}",
                        "lambda_c1": r"\lambda_{c,1}", "lambda_c2": r"\lambda_{c,2}"}
_ON_THE_CURVE = 1e-9  # K: a layer temperature this close to a curve's end is on it (physics)


# ----------------------------------------------------------------------------- inputs


def _celsius(T: float) -> str:
    """A temperature for an error message, in °C to 0.01 K: '-40 °C', '26.13 °C'."""
    return f"{round(T - zero_Celsius, 2):g} °C"


def _both(T: float) -> str:
    """A temperature of a curve's end, in °C and K as either may have been written."""
    return f"{_celsius(T)} ({T:.6g} K)"


@dataclass(frozen=True)
class ConductivityCurveField(Field):
    """A layer's conductivity curve: ``[["T1", "λ1"], ["T2", "λ2"], …]``, absolute temperatures
    strictly increasing, at least two points. The value is a list of ``(T [K], λ [W/(m·K)])``."""

    def type_text(self) -> str:
        return ('list of ["temperature", "conductivity"] (absolute temperatures increasing, at '
                'least two points)')

    def json_schema(self) -> dict:
        pair = {"type": "array", "minItems": 2, "maxItems": 2,
                "items": {"type": "string", "description": "a quantity, e.g. '50 degC' or "
                                                           "'0.039 W/(m*K)'"}}
        return {"description": f"{self.meaning} ({self.type_text()})", "type": "array",
                "minItems": 2, "items": pair}

    def convert(self, node, ctx, path):
        if not node.is_list:
            ctx.error(node, path, "not a list of [temperature, conductivity] pairs",
                      '[["T1", "λ1"], ["T2", "λ2"], ...] with absolute temperatures, increasing',
                      repr(plain(node)))
            raise InvalidInput
        if len(node.value) > MAX_ITEMS:  # refused before thousands of points are parsed
            ctx.error(node, path, "too many points", f"at most {MAX_ITEMS}",
                      str(len(node.value)))
            raise InvalidInput
        temperature = Quantity("temperature", unit="K", temperature=ABSOLUTE)
        conductivity = Quantity("conductivity", unit="W/(m*K)")
        points, written, failed = [], [], False
        for i, item in enumerate(node.value):
            here = f"{path}[{i}]"
            if not item.is_list or len(item.value) != 2 or not all(v.is_scalar
                                                                    for v in item.value):
                ctx.error(item, here, "not a [temperature, conductivity] pair",
                          'a pair such as ["10 degC", "0.035 W/(m*K)"]', repr(plain(item)))
                failed = True
                continue
            t_node, k_node = item.value
            try:
                T, _ = temperature.parse_text(t_node.value, ctx, t_node, here)
                k, _ = conductivity.parse_text(k_node.value, ctx, k_node, here)
            except InvalidInput:
                failed = True
                continue
            if not T > 0.0:
                ctx.error(t_node, here, "out of range", "an absolute temperature above 0 K",
                          repr(t_node.value))
                failed = True
            elif not k > 0.0:
                ctx.error(k_node, here, "out of range", "a conductivity above 0",
                          repr(k_node.value))
                failed = True
            elif points and not T > points[-1][0]:
                ctx.error(t_node, here, "temperatures not increasing",
                          f"a temperature above {written[-1]}, the one before",
                          repr(t_node.value))
                failed = True
            else:
                points.append((T, k))
                written.append(str(t_node.value))
        if not failed and len(points) < 2:
            ctx.error(node, path, "too few points",
                      "at least two [temperature, conductivity] pairs",
                      f"{len(points)} pair" + ("" if len(points) == 1 else "s"))
            failed = True
        if failed:
            raise InvalidInput
        places = {}
        for m, (T, k) in enumerate(points):
            places[f"k{m}"] = Value(k, "W/(m*K)", given=True)
            places[f"t{m}"] = Value(T, "K", temperature=ABSOLUTE, given=True)
        shown = phrase("λ(θ): " + ", ".join(f"{{k{m}}} at {{t{m}}}" for m in range(len(points))),
                       **places)
        ctx.records.append(InputRecord(path, self.meaning, f"{len(points)} points",
                                       [list(p) for p in points], "", origin="given",
                                       loc=node.loc, shown=shown))
        return points


@dataclass(frozen=True)
class InsulationMaterial(MaterialField):
    """A library material for a pipe layer: one with a conductivity curve (which is then used)
    or, without one, a constant conductivity."""

    def convert(self, node, ctx, path):
        entry = super().convert(node, ctx, path)
        curve = entry.get("conductivity_curve")
        if curve:
            title = entry.get("title", entry["name"])
            ctx.records[-1].shown = phrase(
                f"{title}, λ(θ) curve from {{lo}} to {{hi}}",
                lo=Value(curve[0][0], "K", temperature=ABSOLUTE, given=True),
                hi=Value(curve[-1][0], "K", temperature=ABSOLUTE, given=True))
            return entry
        if "conductivity" not in entry or entry.get("law"):
            ctx.error(node, path, f"material '{entry['name']}' has no constant conductivity",
                      "a material with a constant conductivity or a conductivity curve, or give "
                      "conductivity", "a temperature-dependent material" if entry.get("law")
                      else "a material without one")
            raise InvalidInput
        return entry


@dataclass(frozen=True)
class LayerName(Field):
    """The name of one of the block's layers (checked against them when the block is
    computed); recorded as an input so that the report shows it and an error can point at it."""

    def type_text(self) -> str:
        return "the name of a layer"

    def json_schema(self) -> dict:
        return {"description": self.meaning, "type": "string"}

    def convert(self, node, ctx, path):
        if not node.is_scalar or node.value is None or isinstance(node.value, bool):
            ctx.error(node, path, f"'{self.name}' is not a layer name", self.type_text(),
                      repr(plain(node)))
            raise InvalidInput
        name = str(node.value)
        ctx.records.append(InputRecord(path, self.meaning, name, name, "", loc=node.loc))
        return name


# ----------------------------------------------------------------------------- curves


@dataclass(frozen=True)
class LayerCurve:
    """A layer's conductivity curve as used: points in SI, where it was given (the input path
    an error points at), the library value it is (``materials.NAME.conductivity_curve``, for
    "Values to confirm") and the material it comes from."""

    temperatures: tuple
    conductivities: tuple
    path: str
    origin: str | None = None
    material: dict | None = None
    source: str = ""

    @property
    def physics(self) -> ConductivityCurve:
        return ConductivityCurve(list(self.temperatures), list(self.conductivities))

    def temperature(self, m: int) -> Value:
        return Value(self.temperatures[m], "K", temperature=ABSOLUTE, given=True,
                     origin=self.origin)

    def conductivity(self, m: int) -> Value:
        return Value(self.conductivities[m], "W/(m*K)", given=True, origin=self.origin)


def layer_curves(layers) -> list[LayerCurve | None]:
    """Return each layer's curve: written in the layer, or its material's; None for a layer of
    constant conductivity."""
    curves = []
    for j, layer in enumerate(layers):
        if layer.get("conductivity_curve"):
            points = layer["conductivity_curve"]
            curves.append(LayerCurve(tuple(p[0] for p in points), tuple(p[1] for p in points),
                                     f"layers[{j}].conductivity_curve"))
        elif layer.get("material") is not None and layer["material"].get("conductivity_curve"):
            material = layer["material"]
            points = material["conductivity_curve"]
            cited = material.get("sources", {}).get("conductivity_curve", {})
            curves.append(LayerCurve(tuple(p[0] for p in points), tuple(p[1] for p in points),
                                     f"layers[{j}].material",
                                     f"materials.{material['name']}.conductivity_curve",
                                     material, cited.get("source") or material.get("source", "")))
        else:
            curves.append(None)
    return curves


def _record(out, path: str):
    return next((r for r in out.records if r.path == path), None)


def _curve_range_error(out, exc: PhysicsRangeError, curves, names, sizing: str = ""):
    """Return the input error for a layer whose temperatures leave its conductivity curve, or
    None when the physics error is about something else."""
    match = re.fullmatch(r"conductivities\[(\d+)\]", str(exc.quantity))
    if match is None or curves[int(match.group(1))] is None:
        return None
    j = int(match.group(1))
    curve = curves[j]
    record = _record(out, curve.path)
    what = (f"layer {j + 1} ({names[j]}) reaches a temperature outside its conductivity "
            "curve" + sizing)
    got = _both(float(exc.value)) if isinstance(exc.value, (int, float)) else str(exc.value)
    return InputError(record.loc if record else None, f"{out.block_key}.inputs.{curve.path}",
                      what, f"layer temperatures within the curve, "
                      f"{_both(curve.temperatures[0])} to {_both(curve.temperatures[-1])}",
                      got, "extend the curve with the product's declared values over the "
                      "layer's temperatures, or choose an insulation rated for them")


def solve_with_curves(out, inp, specs, curves, names):
    """Return the physics' joint solution of temperatures and mean conductivities; a layer
    temperature outside its curve is an input error naming the layer."""
    try:
        return cylindrical_layers_with_curves(
            inp.inner_diameter, [layer["thickness"] for layer in inp.layers], specs,
            inp.inside_temperature, inp.ambient_temperature, inp.outside_coefficient,
            inp.surface_emissivity, inp.inside_coefficient)
    except PhysicsRangeError as exc:
        error = _curve_range_error(out, exc, curves, names)
        if error is None:
            raise
        raise error from None


def _interface_item(k: int, n: int, names) -> str:
    if k == 0:
        return "inner surface"
    if k == n:
        return "outer surface"
    return f"{names[k - 1]} | {names[k]}"


def curve_steps(out, inp, solved, curves, names, T_i: Value, symbols: dict) -> dict:
    """Record the method, the converged temperatures the curve layers need and each curve
    layer's mean conductivity. Return the faces (index → Value, with its name) and the mean
    conductivities (layer index → Value)."""
    n = len(curves)
    film = inp.inside_coefficient is not None
    out.note("A layer with a conductivity curve takes the curve's mean over its temperature "
             "range (exact, by the Kirchhoff transform), solved together with the temperatures "
             "by Brent's method on q′ ({n} iterations; one more substitution changes a mean by "
             "a fraction {change} at most); the converged temperatures are stated below and "
             "found again from q′.", MEAN_CONDUCTIVITY_SOURCE,
             n=Value(float(solved.iterations), given=True),
             change=Value(float(solved.conductivity_change), given=True))
    for j, curve in enumerate(curves):
        if curve is None or curve.material is None:
            continue
        material = curve.material
        text = ("Layer {j}, {name}: the conductivity curve of the library material {material} "
                "is used")
        values = {"j": Value(j + 1, given=True), "name": Value(names[j]),
                  "material": Value(material["name"])}
        if "conductivity" in material:
            text += "; its constant {k} is for materials without a curve"
            values["k"] = Value(material["conductivity"], "W/(m*K)", given=True)
        out.note(text + ".", curve.source, **values)

    T = [float(t) for t in solved.flow.interface_temperatures]
    needed = sorted({k for j, curve in enumerate(curves) if curve for k in (j, j + 1)})
    faces: dict[int, tuple[str, Value]] = {}
    for k in needed:
        if k == 0 and not film:
            faces[0] = ("T_i", T_i)  # no inside film: the bore is at the inside temperature
            continue
        name = "T_s" if k == n else f"T_{k}"
        # What was done is said by the method note and the group's name (or, printed alone,
        # the label): the rows give the values only.
        label = ("Outer surface temperature at convergence, solved with the means" if k == n
                 else "Inner surface temperature at convergence, solved with the means" if k == 0
                 else phrase("Temperature between layers {a} and {b} at convergence, solved "
                             "with the means", a=Value(k, given=True), b=Value(k + 1, given=True)))
        faces[k] = (name, out.statement(
            name, "", T[k], "K",
            temperature=ABSOLUTE, label=label, source=BRENT_SOURCE, group=GROUP_CONVERGED,
            item=_interface_item(k, n, names), symbols=symbols))

    means = {}
    for j, curve in enumerate(curves):
        if curve is None:
            continue
        symbols[f"k_{j + 1}"] = rf"\lambda_{{m,{j + 1}}}"
        means[j] = _mean_step(out, j, curve, faces[j], faces[j + 1],
                              float(solved.mean_conductivities[j]), names[j], symbols)
    return {"faces": faces, "means": means}


def _segment(curve: LayerCurve, low: float, high: float) -> int | None:
    """The straight piece of the curve holding the whole range, or None."""
    Tc = curve.temperatures
    for m in range(len(Tc) - 1):
        if Tc[m] - _ON_THE_CURVE <= low and high <= Tc[m + 1] + _ON_THE_CURVE:
            return m
    return None


def _mean_step(out, j: int, curve: LayerCurve, inner, outer, value: float, name: str,
               symbols: dict) -> Value:
    """The mean conductivity of a curve layer over its range: λ at the mean temperature where
    the range lies within one straight piece (the mean of the end values), else the area under
    the curve's pieces over the range divided by the range."""
    (inner_name, inner_value), (outer_name, outer_value) = inner, outer
    low, high = sorted((inner_value.si, outer_value.si))
    label = phrase("Layer {j}, {name}", j=Value(j + 1, given=True), name=Value(name))
    step_name = f"k_{j + 1}"
    m = _segment(curve, low, high)
    if m is not None:
        operands = {inner_name: inner_value, outer_name: outer_value,
                    "theta_c1": curve.temperature(m), "theta_c2": curve.temperature(m + 1),
                    "lambda_c1": curve.conductivity(m), "lambda_c2": curve.conductivity(m + 1)}
        # The mean of the end values, written with differences of temperatures only, so that
        # every temperature prints as the engineer reads it (in °C).
        return out.step(step_name, f"lambda_c1 + (lambda_c2 - lambda_c1) * (({inner_name} - "
                        f"theta_c1) + ({outer_name} - theta_c1)) / (2 * (theta_c2 - theta_c1))",
                        operands,
                        value, "W/(m*K)", label=label, source=MEAN_CONDUCTIVITY_SOURCE,
                        group=GROUP_MEAN, item=name,
                        symbols={**symbols, **_CURVE_POINT_SYMBOLS})
    Tc, kc = np.asarray(curve.temperatures), np.asarray(curve.conductivities)
    inside = [i for i, t in enumerate(Tc) if low < t < high]
    points = [low] + [float(Tc[i]) for i in inside] + [high]
    lambdas = [float(np.interp(t, Tc, kc)) for t in points]
    area = sum((lambdas[i] + lambdas[i + 1]) / 2 * (points[i + 1] - points[i])
               for i in range(len(points) - 1))
    ends = {low: inner_value if inner_value.si == low else outer_value}
    ends[high] = outer_value if outer_value.si == high else inner_value
    places = {"t0": ends[low], "k0": Value(lambdas[0], "W/(m*K)")}
    for p, i in enumerate(inside, start=1):
        places[f"t{p}"] = curve.temperature(i)
        places[f"k{p}"] = curve.conductivity(i)
    last = len(points) - 1
    places[f"t{last}"] = ends[high]
    places[f"k{last}"] = Value(lambdas[-1], "W/(m*K)")
    places["area"] = Value(area, "W/m")
    places["range"] = Value(high - low, "K", temperature=DIFFERENCE)
    through = ", ".join(f"{{k{p}}} at {{t{p}}}" for p in range(len(points)))
    return out.statement(
        step_name, "the area under the curve's straight pieces through " + through +
        ", {area} (trapezoidal rule, exact for straight pieces), divided by the range {range}",
        value, "W/(m*K)", values=places, label=label, source=MEAN_CONDUCTIVITY_SOURCE,
        group=GROUP_MEAN, item=name, symbols=symbols)


def interface_check_steps(out, inp, names, resistances: dict, q: Value, T_i: Value,
                          symbols: dict):
    """The temperatures between the layers again, from the inside temperature, q′ and each
    resistance: they give back the converged temperatures stated before."""
    n = len(names)
    previous, previous_name = T_i, "T_i"
    if "R_i" in resistances:
        previous = out.step("theta_0", "T_i - q * R_i", {"T_i": T_i, "q": q,
                                                         "R_i": resistances["R_i"]},
                            T_i.si - q.si * resistances["R_i"].si, "K", temperature=ABSOLUTE,
                            label="Inner surface", group=GROUP_CHECK, item="inner surface",
                            symbols=symbols)
        previous_name = "theta_0"
    for k in range(1, n):
        R = resistances[f"R_{k}"]
        previous = out.step(f"theta_{k}", f"{previous_name} - q * R_{k}",
                            {previous_name: previous, "q": q, f"R_{k}": R},
                            previous.si - q.si * R.si, "K", temperature=ABSOLUTE,
                            label=phrase("Between layers {a} and {b}", a=Value(k, given=True),
                                         b=Value(k + 1, given=True)),
                            group=GROUP_CHECK, item=_interface_item(k, n, names),
                            symbols=symbols)
        previous_name = f"theta_{k}"


def curve_profile(curve: LayerCurve, r0: float, T0: float, q: float, radii) -> list[float]:
    """Temperatures at radii within a curve layer whose inner face (radius r0) is at T0:
    Φ(T0) − Φ(T) = q′ ln(r/r0)/(2π), Φ = ∫λ dT, solved for each T (Kirchhoff transform)."""
    Tc, kc = list(curve.temperatures), list(curve.conductivities)
    out = []
    for r in radii:
        drop = q * math.log(r / r0) / (2.0 * math.pi)
        if drop == 0.0:
            out.append(T0)
            continue
        # Φ(T0) − Φ(T) = λ_m(T0, T)·(T0 − T) grows as T moves away from T0, towards the end
        # of the curve on the side the heat flows to.
        end = Tc[0] if drop > 0 else Tc[-1]

        def residual(T):
            return mean_conductivity(Tc, kc, T0, T) * (T0 - T) - drop

        if residual(end) * residual(T0) > 0:  # beyond the curve: cannot happen at a solution
            out.append(float("nan"))
            continue
        out.append(float(brentq(residual, min(T0, end), max(T0, end), xtol=1e-9)))
    return out


# ----------------------------------------------------------------------------- sizing


def _layer_index(out, name: str, names: list[str]) -> int:
    record = _record(out, "size_layer.layer")
    where = f"{out.block_key}.inputs.size_layer.layer"
    loc = record.loc if record else None
    found = [j for j, n in enumerate(names) if n == name]
    if not found:
        raise InputError(loc, where, f"unknown layer '{name}'",
                         "one of " + ", ".join(repr(n) for n in names), repr(name),
                         did_you_mean(name, names))
    if len(found) > 1:
        raise InputError(loc, where, f"more than one layer is named '{name}'",
                         "the name of one layer (give the layers distinct names)",
                         f"layers {', '.join(str(j + 1) for j in found)}")
    return found[0]


def sizing_steps(out, inp, specs, curves, names, diameters, conductivities, resistances,
                 T_i: Value, T_a: Value, h_o: Value, symbols: dict, convection_source: str):
    """Find the required thickness of the named layer and work out q′ and θs at it."""
    spec = inp.size_layer
    j = _layer_index(out, spec["layer"], names)
    n = len(names)
    target_name = "max_q_per_length" if spec["max_q_per_length"] is not None else \
        "max_surface_temperature"
    target = spec[target_name]
    thicknesses = [layer["thickness"] for layer in inp.layers]
    common = (inp.inner_diameter, thicknesses, specs, inp.inside_temperature,
              inp.ambient_temperature)
    outside = dict(outside_coefficient=inp.outside_coefficient,
                   emissivity=inp.surface_emissivity, inside_coefficient=inp.inside_coefficient)
    try:
        sized = size_layer(*common, j, **{target_name: target}, **outside,
                           bracket=SIZING_BRACKET, samples=SIZING_SAMPLES)
    except PhysicsRangeError as exc:
        error = _curve_range_error(out, exc, curves, names,
                                   f" while layer {j + 1} ({names[j]}) is sized")
        if error is None and exc.quantity == target_name:
            error = _unreachable(out, exc, common, j, target_name, names, outside)
        if error is None:
            raise
        raise error from None
    performance, flow = sized.performance, sized.performance.flow
    star = dict(symbols)
    target_value = out.input(f"size_layer.{target_name}")
    low, high = (Value(x, "m", "mm", given=True) for x in SIZING_BRACKET)
    what = ("the heat flow per metre is at most {target} (its size, for a pipe that gains heat)"
            if target_name == "max_q_per_length" else
            "the outer surface temperature is at most {target}")
    if sized.met_at_lower_bound:
        text = ("the target is met already at {low}, the thinnest thickness searched (up to "
                "{high}), where " + what)
    else:
        text = ("the smallest thickness, all else as given, at which " + what + ": {samples} "
                "thicknesses from {low} to {high} tried, then Brent's method between the two "
                "either side of the target ({iterations} iterations)")
    star["t_req"] = rf"t^{{*}}_{{{j + 1}}}"
    t_req = out.statement(
        "t_req", text, sized.thickness, "m", display="mm",
        values={"target": target_value, "low": low, "high": high,
                "samples": Value(float(SIZING_SAMPLES), given=True),
                "iterations": Value(float(sized.iterations), given=True)},
        label=phrase("Required thickness of layer {j}, {name}", j=Value(j + 1, given=True),
                     name=Value(names[j])),
        source=BRENT_SOURCE, yields="required_thickness", symbols=star)
    if not sized.monotone:
        out.warn("The figure does not fall steadily with the thickness of layer {j} over the "
                 "range searched (a thin layer below the critical diameter adds surface faster "
                 "than resistance): the required thickness is the smallest above which every "
                 "thicker sample meets the target.", j=Value(j + 1, given=True))

    # Diameters from the sized layer outward.
    D = {k: (f"D_{k}", diameters[k]) for k in range(n + 1)}
    for k in range(j + 1, n + 1):
        thickness = ("t_req", t_req) if k == j + 1 else (
            f"t_{k}", out.input(f"layers[{k - 1}].thickness"))
        previous_name, previous = D[k - 1]
        name = f"D_{k}_req"
        star[name] = rf"D^{{*}}_{{{k}}}"
        D[k] = (name, out.step(name, f"{previous_name} + 2 * {thickness[0]}",
                               {previous_name: previous, thickness[0]: thickness[1]},
                               previous.si + 2 * thickness[1].si, "m", display="mm",
                               label=phrase("Layer {k}, {name}", k=Value(k, given=True),
                                            name=Value(names[k - 1])),
                               group=GROUP_SIZED_DIAMETERS, item=names[k - 1], symbols=star))
    T = [float(t) for t in flow.interface_temperatures]
    k_star = {}
    for k, curve in enumerate(curves, start=1):
        if curve is None:
            continue
        name = f"k_{k}_req"
        star[name] = rf"\lambda^{{*}}_{{m,{k}}}"
        k_star[k] = (name, out.statement(
            name, "the curve's mean over {a} to {b}, the layer's temperatures at the required "
            "thickness",
            float(performance.mean_conductivities[k - 1]), "W/(m*K)",
            values={"a": Value(T[k - 1], "K", temperature=ABSOLUTE),
                    "b": Value(T[k], "K", temperature=ABSOLUTE)},
            label=phrase("Layer {k}, {name}", k=Value(k, given=True), name=Value(names[k - 1])),
            source=MEAN_CONDUCTIVITY_SOURCE, group=GROUP_SIZED_MEAN, item=names[k - 1],
            symbols=star))
    D_n_name, D_n = D[n]
    if performance.convection is not None:
        star["h_o_req"] = r"h^{*}_{o}"
        h_star = ("h_o_req", out.statement(
            "h_o_req", "convection {h_c} + radiation {h_r}, as above at the outer surface "
            "temperature {T_s} and diameter {D} of the required thickness",
            flow.h_outside, "W/(m^2*K)",
            values={"h_c": Value(performance.convection.h, "W/(m^2*K)"),
                    "h_r": Value(performance.h_radiation, "W/(m^2*K)"),
                    "T_s": Value(flow.theta_surface, "K", temperature=ABSOLUTE), "D": D_n},
            label="Outside surface coefficient at the required thickness",
            source=convection_source, symbols=star))
    else:
        h_star = ("h_o", h_o)

    # Resistances: a layer changes where its diameters or its mean conductivity do.
    terms = {}
    if "R_i" in resistances:
        terms["R_i"] = resistances["R_i"]
    for k in range(1, n + 1):
        if k <= j and curves[k - 1] is None:
            terms[f"R_{k}"] = resistances[f"R_{k}"]
            continue
        outer_name, outer = D[k]
        inner_name, inner = D[k - 1]
        k_name, k_value = k_star.get(k, (f"k_{k}", conductivities[k - 1]))
        name = f"R_{k}_req"
        star[name] = rf"R'^{{*}}_{{{k}}}"
        terms[name] = out.step(name, f"log({outer_name} / {inner_name}) / (2 * pi * {k_name})",
                               {outer_name: outer, inner_name: inner, k_name: k_value},
                               math.log(outer.si / inner.si) / (2 * math.pi * k_value.si),
                               "m*K/W", label=phrase("Layer {k}, {name}", k=Value(k, given=True),
                                                     name=Value(names[k - 1])),
                               group=GROUP_SIZED_LAYERS, item=names[k - 1], symbols=star)
    star["R_o_req"] = r"R'^{*}_{o}"
    h_name, h_value = h_star
    terms["R_o_req"] = R_o = out.step(
        "R_o_req", f"1 / ({h_name} * pi * {D_n_name})", {h_name: h_value, D_n_name: D_n},
        1.0 / (h_value.si * math.pi * D_n.si), "m*K/W",
        label="Outside surface resistance per metre at the required thickness", symbols=star)
    star["R_req"] = r"R'^{*}"
    R = out.step("R_req", " + ".join(terms), terms, sum(v.si for v in terms.values()), "m*K/W",
                 label="Total resistance per metre at the required thickness", symbols=star)
    star["q_req"] = r"q'^{*}"
    q = out.step("q_req", "(T_i - T_a) / R_req", {"T_i": T_i, "T_a": T_a, "R_req": R},
                 (T_i.si - T_a.si) / R.si, "W/m",
                 label=phrase("Heat flow per metre at the required thickness (target {t})",
                              t=target_value) if target_name == "max_q_per_length" else
                 "Heat flow per metre at the required thickness", symbols=star)
    star["theta_s_req"] = r"\theta^{*}_{s}"
    out.step("theta_s_req", "T_a + q_req * R_o_req", {"T_a": T_a, "q_req": q, "R_o_req": R_o},
             T_a.si + q.si * R_o.si, "K", temperature=ABSOLUTE,
             label=phrase("Outer surface temperature at the required thickness (target {t})",
                          t=target_value) if target_name == "max_surface_temperature" else
             "Outer surface temperature at the required thickness", symbols=star)


def _unreachable(out, exc, common, j, target_name, names, outside):
    """The error for a target the layer cannot meet within the thicknesses searched, with the
    figure reached at the thickest; None when the physics refused the target for another
    reason (then its own message stands)."""
    thicknesses = list(common[1])
    thicknesses[j] = SIZING_BRACKET[1]
    try:
        thickest = cylindrical_layers_with_curves(common[0], thicknesses, *common[2:],
                                                  **outside).flow
    except PhysicsRangeError:
        return None
    if target_name == "max_q_per_length":
        reached = abs(thickest.q_per_length)
        figure = f"the heat flow per metre is still {reached:.3g} W/m"
    else:
        reached = thickest.theta_surface
        figure = f"the outer surface temperature is still {_celsius(reached)}"
    if not reached > exc.value:
        return None
    record = _record(out, f"size_layer.{target_name}")
    return InputError(record.loc if record else None,
                      f"{out.block_key}.inputs.size_layer.{target_name}",
                      f"layer {j + 1} ({names[j]}) cannot meet the target within "
                      f"{SIZING_BRACKET[0] * 1e3:g} mm to {SIZING_BRACKET[1] * 1e3:g} mm",
                      f"a target met within that range; at {SIZING_BRACKET[1] * 1e3:g} mm "
                      f"{figure}", repr(record.written) if record else None)
