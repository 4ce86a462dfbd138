"""The ``interstitial_condensation`` kind: the monthly method of ISO 13788:2012 (Glaser).

The physics is in :mod:`calcdoc.physics.glaser`; this module declares the inputs of docs/format.md,
divides thick layers into slices (the physics tests saturation at planes only), and records as
data the working a checker re-does: each layer's thermal resistance and equivalent air
thickness, the worst month in full (the temperature and saturation pressure at every plane, the
inside and outside vapour pressures, the rate at each interface the vapour pressure line touches,
written out), the year month by month (each month's climate and rate as a statement of the
tautest line, the moisture at its end as a step), the results, and two figures: the worst
month's vapour pressure diagram over cumulative s_d and the moisture accumulated by month.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace

import numpy as np
from scipy.constants import zero_Celsius

from calcdoc.data import Axis, Band, FigureData, Line, Point, Value, library_value, phrase
from calcdoc.errors import InputError
from calcdoc.kinds.base import (ABSOLUTE, REQUIRED, InvalidInput, Items, Kind, Quantity,
                                ResultSpec, Text, did_you_mean)
from calcdoc.physics import PhysicsRangeError
from calcdoc.kinds.conduction import (SERIES_SOURCE, THICKNESS, ConductingMaterial,
                                      layer_conductivity, plane_surface_inputs,
                                      surface_resistance_steps)
from calcdoc.physics.conduction import layer_resistance, saturation_vapour_pressure
from calcdoc.physics.glaser import (MONTH_NAMES, VAPOUR_PERMEABILITY_OF_AIR,
                                    equivalent_air_thickness, interstitial_condensation,
                                    month_seconds, vapour_profile)
from calcdoc.references import Cite

__all__ = ["KINDS", "INTERSTITIAL_CONDENSATION", "SLICE_RESISTANCE", "MAX_SLICES"]

# Clauses and values recalled, not read in the printed standard: data, so that the package
# lists them under "Values to confirm".
METHOD_SOURCE = Cite("ISO 13788:2012", "clause 6, monthly method (Glaser)", confirmed=False,
                     key="ISO 13788:2012 clause 6",
                     value="clause 6 for the monthly method of interstitial condensation")
DELTA_0_SOURCE = Cite("ISO 13788:2012", "water vapour permeability of still air",
                      confirmed=False, key="ISO 13788:2012 delta_0",
                      value="δ0 = 2.0 × 10⁻¹⁰ kg/(m·s·Pa)")
SLICES_SOURCE = Cite("ISO 13788:2012", "clause 6, subdivision of thick layers", confirmed=False,
                     key="ISO 13788:2012 slices",
                     value="layers above 0.25 m²·K/W divided into slices of at most "
                           "0.25 m²·K/W each")
START_SOURCE = Cite("ISO 13788:2012", "clause 6, starting month", confirmed=False,
                    key="ISO 13788:2012 start month",
                    value="the year starts in the first month with condensation after a month "
                          "without")
SATURATION_SOURCE = "ISO 13788:2012, Annex E (saturation vapour pressure)"
START_CONVENTION = ("calcdoc convention: with condensation in every month there is no dry month "
                    "to start after, so the year starts in January")

CAUTION = ("This calculation supports, and does not replace, the judgement of a licensed "
           "engineer and the requirements of the local code and the authority having "
           "jurisdiction. The monthly method assesses vapour diffusion under steady monthly "
           "means only: air leakage through the element, liquid water, moisture stored in the "
           "materials, rain, built-in moisture and solar and sky radiation are not represented "
           "(a transient hygrothermal simulation, EN 15026, represents them). Corners, junctions "
           "and fixings are colder than the one-dimensional element.")

SLICE_RESISTANCE = 0.25  # m²·K/W, the largest slice of a thick layer (ISO 13788, recalled)
MAX_SLICES = 200  # slices of one element: 50 m²·K/W of layers, far beyond any envelope
P_REF = 610.5  # Pa, ISO 13788:2012 Annex E: p_sat at 0 °C (as calcdoc.physics.conduction)
_OVER_WATER = (17.269, 237.3)
_OVER_ICE = (21.875, 265.5)
_TEMPERATURE_RANGE = dict(at_least=zero_Celsius - 40.0, at_most=zero_Celsius + 80.0)

GROUP_R = "Thermal resistance of each layer"
GROUP_SD = "Equivalent air thickness of each layer"
GROUP_SLICES = "Slice resistance of each layer above 0.25 m²·K/W"
GROUP_MONTHS_DRY = ("Each month, every interface dry: the air, and the highest "
                    "relative humidity p/p_sat at a plane (below 100 %: no condensation)")
_RATE = "kg/(m^2*s)"
_MASS = "kg/m^2"

_LETTERS = "abdfhkmnqruvwxyz"  # interface letters; c names the only one, e and i the air


# ----------------------------------------------------------------------------- fields


@dataclass(frozen=True)
class VapourLayers(Items):
    """The layers, each with a vapour resistance: its own μ or s_d, or its material's."""

    def convert(self, node, ctx, path):
        layers = super().convert(node, ctx, path)
        failed = False
        for i, (item, layer) in enumerate(zip(node.value, layers)):
            if layer["vapour_resistance_factor"] is not None or \
                    layer["equivalent_air_thickness"] is not None:
                continue
            material = layer["material"]
            if material is not None and ("vapour_resistance_factor" in material or
                                         "equivalent_air_thickness" in material):
                continue
            name = layer["name"] or f"layer {i + 1}"
            ctx.error(item, f"{path}[{i}]", f"no vapour resistance for layer '{name}'",
                      "vapour_resistance_factor (μ) or equivalent_air_thickness (s_d), or a "
                      "material that carries one",
                      f"material '{material['name']}' without either" if material is not None
                      else "neither")
            failed = True
        if failed:
            raise InvalidInput
        return layers


@dataclass(frozen=True)
class ClimateMonths(Items):
    """Exactly twelve months, January first, in calendar order; each row named by its month."""

    def convert(self, node, ctx, path):
        if node.is_list and len(node.value) != 12:
            ctx.error(node, path, "the climate needs twelve months",
                      "exactly 12 entries, January to December in calendar order",
                      f"{len(node.value)} entries")
            raise InvalidInput
        first = len(ctx.records)
        months = super().convert(node, ctx, path)
        failed = False
        for i, (item, month) in enumerate(zip(node.value, months)):
            expected = MONTH_NAMES[i]
            if month["month"] == expected:
                continue
            written = month["month"]
            known = written in MONTH_NAMES
            ctx.error(item.value["month"], f"{path}[{i}].month",
                      "months out of calendar order" if known else f"unknown month '{written}'",
                      f"{expected} (entry {i + 1} of 12, January first)", repr(written),
                      None if known else did_you_mean(written, MONTH_NAMES))
            failed = True
        if failed:
            raise InvalidInput
        for record in ctx.records[first:]:  # the item tables name each row by its month
            found = re.match(re.escape(path) + r"\[(\d+)\]", record.path)
            if found:
                record.item = MONTH_NAMES[int(found.group(1))]
        return months


LAYER_FIELDS = (
    Text("name", "layer name", default=""),
    Quantity("thickness", "layer thickness", **THICKNESS),
    Quantity("conductivity", "design thermal conductivity", default=REQUIRED,
             unit="W/(m*K)", greater_than=0.0),
    Quantity("resistance", "thermal resistance of the layer (e.g. an air layer)",
             default=REQUIRED, unit="m^2*K/W", greater_than=0.0),
    ConductingMaterial("material", "material from the library (may carry μ or s_d)",
                       default=REQUIRED),
    Quantity("vapour_resistance_factor", "water vapour resistance factor μ: this or s_d unless "
             "the material carries one, and then in place of the material's", default=None,
             unit="1", at_least=1.0),
    Quantity("equivalent_air_thickness", "equivalent air thickness s_d (a sheet's declared "
             "value): this or μ unless the material carries one", default=None, unit="m",
             greater_than=0.0),
    Text("source", "where the layer's data come from", default=""),
)


def _air(name: str, meaning: str) -> Quantity:
    return Quantity(name, meaning, unit="K", temperature=ABSOLUTE, display="degC",
                    **_TEMPERATURE_RANGE)


def _humidity(name: str, meaning: str) -> Quantity:
    return Quantity(name, meaning, unit="1", percent=True, greater_than=0.0, at_most=1.0)


CLIMATE_FIELDS = (
    Text("month", "January … December, in calendar order"),
    _air("inside_temperature", "monthly mean inside air temperature"),
    _humidity("inside_relative_humidity", "monthly mean inside relative humidity"),
    _air("outside_temperature", "monthly mean outside air temperature"),
    _humidity("outside_relative_humidity", "monthly mean outside relative humidity"),
    Text("source", "where the month's climate comes from", default=""),
)


# ----------------------------------------------------------------------------- helpers


def _given(out) -> Value:
    """Make the statement just recorded print its whole number in full (a month, a count)."""
    step = out.steps[-1]
    step.result = replace(step.result, given=True)
    return step.result


def _layer_name(layer, j: int) -> str:
    return layer["name"] or f"layer {j}"


def _slices(R: float) -> int:
    """The least number of equal slices of at most SLICE_RESISTANCE each (rounding forgiven)."""
    return max(1, math.ceil(round(R / SLICE_RESISTANCE, 9)))


def _material_source(material: dict, prop: str) -> str:
    return material.get("sources", {}).get(prop, {}).get("source", material.get("source", ""))


def _resistance_steps(out, inp) -> list[dict]:
    """Each layer's thermal resistance: d/λ as a step, a given resistance as a note."""
    layers = []
    for j, layer in enumerate(inp.layers, start=1):
        path, name = f"layers[{j - 1}]", _layer_name(layer, j)
        entry = {"j": j, "label": name, "layer": layer, "path": path}
        d = out.input(f"{path}.thickness")
        if layer["resistance"] is not None:
            entry["R"] = out.input(f"{path}.resistance")
        else:
            lam, material_source = layer_conductivity(out, layer, path)
            entry["R"] = out.step(f"R_{j}", f"d_{j} / lambda_{j}",
                                  {f"d_{j}": d, f"lambda_{j}": lam},
                                  float(layer_resistance(layer["thickness"], lam.si)), "m^2*K/W",
                                  label=phrase("Layer {j}, {name}", j=Value(j, given=True),
                                               name=Value(name)),
                                  source=layer["source"] or material_source, group=GROUP_R,
                                  item=name)
        layers.append(entry)
    given = [e["label"] for e in layers if e["layer"]["resistance"] is not None]
    if given:
        out.note("Thermal resistance as given: {layers}.", layers=Value(", ".join(given)))
    return layers


def _vapour_steps(out, layers) -> None:
    """Each layer's equivalent air thickness: μ·d as a step (μ given or the library's), an s_d
    given or from the library in a note."""
    for entry in layers:
        j, layer, path, name = entry["j"], entry["layer"], entry["path"], entry["label"]
        material = layer["material"]
        d = out.input(f"{path}.thickness")
        if layer["equivalent_air_thickness"] is not None:
            entry["s_d"] = out.input(f"{path}.equivalent_air_thickness")
            continue
        if layer["vapour_resistance_factor"] is not None:
            mu, source = out.input(f"{path}.vapour_resistance_factor"), layer["source"]
        elif "vapour_resistance_factor" in material:
            mu = library_value(material, "vapour_resistance_factor", "1")
            source = _material_source(material, "vapour_resistance_factor")
        else:
            entry["s_d"] = library_value(material, "equivalent_air_thickness", "m")
            out.note("Layer {j}, {name}: equivalent air thickness s_d {s} of the library's "
                     "{title} (a sheet's declared value, independent of its thickness).",
                     _material_source(material, "equivalent_air_thickness"),
                     j=Value(j, given=True), name=Value(name), s=entry["s_d"],
                     title=Value(material.get("title", material["name"])))
            continue
        entry["s_d"] = out.step(f"s_d_{j}", f"mu_{j} * d_{j}", {f"mu_{j}": mu, f"d_{j}": d},
                                float(equivalent_air_thickness(mu.si, d.si)), "m",
                                label=phrase("Layer {j}, {name}", j=Value(j, given=True),
                                             name=Value(name)),
                                source=source, group=GROUP_SD, item=name)
    given = [e["label"] for e in layers if e["layer"]["equivalent_air_thickness"] is not None]
    if given:
        out.note("Equivalent air thickness s_d as given: {layers}.",
                 layers=Value(", ".join(given)))


def _planes(layers) -> list[dict]:
    """Divide each layer above SLICE_RESISTANCE into equal slices; return the planes 1 … N of
    the calculation (the outer face of each slice), each with its layer and slice."""
    planes = []
    names = [e["label"] for e in layers]
    for entry in layers:
        entry["n"] = n = _slices(entry["R"].si)
        for m in range(1, n + 1):
            j = entry["j"]
            if m < n:
                item = f"{entry['label']} at {m}/{n}"
            elif j < len(layers):
                item = f"{entry['label']} | {names[j]}"
            else:
                item = "outside surface"
            planes.append({"index": len(planes) + 1, "layer": entry, "m": m, "item": item,
                           "face": m == n, "R": entry["R"].si / n, "s_d": entry["s_d"].si / n})
    return planes


def _inside_slices(planes, profiles) -> tuple[float, int, int] | None:
    """The highest relative humidity p/p_sat at a plane inside a sliced layer over the months'
    profiles, with the plane and the month (0-based); None when no layer is sliced."""
    inside = [p["index"] for p in planes if not p["face"]]
    if not inside:
        return None
    best = None
    for month, profile in profiles:
        ratio = profile.vapour_pressures[inside] / profile.saturation_pressures[inside]
        i = int(np.argmax(ratio))
        if best is None or ratio[i] > best[0]:
            best = (float(ratio[i]), inside[i], month)
    return best


def _slice_steps(out, layers, planes, full: bool, nearest) -> list[dict]:
    """Say how thick layers are treated; return the planes the working is written at, each
    with its resistance ΔR as an operand: every slice plane when one reaches saturation in
    some month (the working must show it), else the faces of the layers only, with the
    highest relative humidity at a slice plane as a statement."""
    limit = Value(SLICE_RESISTANCE, "m^2*K/W", given=True)
    sliced = [e for e in layers if e["n"] > 1]
    if not sliced:
        out.note("Thick layers: no layer is above {limit}, so saturation is tested at the faces "
                 "of the layers (a thicker one would be divided into slices of at most {limit} "
                 "each).", SLICES_SOURCE, limit=limit)
    else:
        listed = ", ".join(f"{e['label']}, {e['n']} slices" for e in sliced)
        out.note("Thick layers: each layer above {limit} is divided into the least number of "
                 "equal slices of at most {limit} each, so that saturation is tested inside it "
                 "as well as at its faces: {listed}.", SLICES_SOURCE, limit=limit,
                 listed=Value(listed))
    if not full:
        if sliced:
            ratio, k, month = nearest
            out.statement("varphi_sl", "the highest at a slice plane in any month ({plane}, "
                          "{month}) is below saturation: no slice plane is touched, so the "
                          "working below is written at the faces of the layers", ratio, "1",
                          display="%",
                          values={"plane": Value(planes[k - 1]["item"]),
                                  "month": Value(MONTH_NAMES[month])},
                          label="Relative humidity inside the sliced layers",
                          source=SLICES_SOURCE, symbols={"varphi_sl": r"\varphi_{sl}"})
        shown = [p for p in planes if p["face"]]
        for j, plane in enumerate(shown, start=1):
            plane.update(operand=(f"R_{j}", layers[j - 1]["R"]), symbols={})
        return shown
    for entry in sliced:
        j = entry["j"]
        entry["dR"] = out.step(f"dR_{j}", f"R_{j} / n_{j}",
                               {f"R_{j}": entry["R"], f"n_{j}": Value(entry["n"], given=True)},
                               entry["R"].si / entry["n"], "m^2*K/W",
                               label=phrase("Layer {j}, {name}", j=Value(j, given=True),
                                            name=Value(entry["label"])),
                               source=SLICES_SOURCE, group=GROUP_SLICES, item=entry["label"],
                               symbols={f"dR_{j}": rf"\Delta R_{{{j}}}",
                                        "dR_j": r"\Delta R_{j}"})
    for plane in planes:
        k, entry = plane["index"], plane["layer"]
        plane.update(operand=(f"dR_{k}", entry.get("dR", entry["R"])),
                     symbols={f"dR_{k}": rf"\Delta R_{{{k}}}", "dR_j": r"\Delta R_{j}"})
    return planes


def _saturation_step(out, T: float, name: str, theta: str, label, *, group=None, item=None,
                     symbols=None) -> Value:
    """p_sat by ISO 13788 Annex E with the temperature's °C number as a dimensionless operand;
    the reference pressure is named p_ref, so that a group's formula stays one formula."""
    celsius = T - zero_Celsius
    a, b = _OVER_WATER if celsius >= 0.0 else _OVER_ICE
    return out.step(name, f"p_ref * exp(a * {theta} / (b + {theta}))",
                    {"p_ref": Value(P_REF, "Pa", given=True), "a": Value(a, given=True),
                     "b": Value(b, given=True), theta: Value(celsius, "1")},
                    float(saturation_vapour_pressure(T)), "Pa", label=label,
                    source=SATURATION_SOURCE, group=group, item=item, symbols=symbols)


def _s_sum(planes, layers, start: int, end: int) -> tuple[str, dict, float]:
    """The equivalent air thickness between planes ``start`` and ``end`` (0: the inside
    surface) as an expression over the layers' s_d: whole layers by name, parts of a sliced
    layer as a fraction."""
    counts: dict[int, int] = {}
    for plane in planes[start:end]:
        j = plane["layer"]["j"]
        counts[j] = counts.get(j, 0) + 1
    terms, operands, value = [], {}, 0.0
    for j, count in counts.items():
        entry = layers[j - 1]
        name = f"s_d_{j}"
        operands[name] = entry["s_d"]
        if count == entry["n"]:
            terms.append(name)
            value += entry["s_d"].si
        else:
            terms.append(f"{count} / {entry['n']} * {name}")
            value += count / entry["n"] * entry["s_d"].si
    return " + ".join(terms), operands, value


def _air_pressure_steps(out, m: int, T_i: float, T_e: float) -> tuple[Value, Value]:
    """The inside and outside air's vapour pressure in month m (0-based): φ times the Annex E
    saturation pressure, one step each."""
    values = []
    for side, which, T in (("i", "inside", T_i), ("e", "outside", T_e)):
        celsius = T - zero_Celsius
        a, b = _OVER_WATER if celsius >= 0.0 else _OVER_ICE
        phi = out.input(f"climate[{m}].{which}_relative_humidity")
        theta = f"theta_{side}"
        values.append(out.step(
            f"p_{side}", f"varphi_{side} * p_ref * exp(a * {theta} / (b + {theta}))",
            {f"varphi_{side}": phi, "p_ref": Value(P_REF, "Pa", given=True),
             "a": Value(a, given=True), "b": Value(b, given=True), theta: Value(celsius, "1")},
            phi.si * float(saturation_vapour_pressure(T)), "Pa",
            label=f"Vapour pressure of the {which} air, {MONTH_NAMES[m]} (θ in °C)",
            source=SATURATION_SOURCE))
    return values[0], values[1]


def _plane_steps(out, shown, month: int, why: str, R_T: Value, R_si: Value,
                 temperatures) -> dict[int, Value]:
    """The worst month: heat flux, the inside surface, then the temperature and the saturation
    pressure at each plane shown (two tables, one line a plane); return the saturation
    pressures by plane of the calculation."""
    name = MONTH_NAMES[month]
    T_i = out.input(f"climate[{month}].inside_temperature")
    T_e = out.input(f"climate[{month}].outside_temperature")
    q = out.step("q", "(theta_i - theta_e) / R_T", {"theta_i": T_i, "theta_e": T_e, "R_T": R_T},
                 (T_i.si - T_e.si) / R_T.si, "W/m^2",
                 label=f"Heat flux in {name}, {why}", source=SERIES_SOURCE)
    previous = out.step("theta_0", "theta_i - q * R_si", {"theta_i": T_i, "q": q, "R_si": R_si},
                        float(temperatures[0]), "K", temperature=ABSOLUTE,
                        label=f"Inside surface temperature, {name}", source=SERIES_SOURCE,
                        symbols={"theta_0": r"\theta_{si}"})
    sliced = shown[0]["operand"][0].startswith("dR")
    group_t = f"Temperature at each plane, {name}" + (
        " (ΔR_j: the layer or slice inside plane j)" if sliced else "")
    group_p = (f"Saturation pressure at each plane, {name} (θ_j in °C; a, b over water at or "
               "above 0 °C, over ice below)")
    for j, plane in enumerate(shown, start=1):
        operand, R = plane["operand"]
        previous = out.step(f"theta_{j}", f"theta_{j - 1} - q * {operand}",
                            {f"theta_{j - 1}": previous, "q": q, operand: R},
                            float(temperatures[plane["index"]]), "K", temperature=ABSOLUTE,
                            label=plane["item"], source=SERIES_SOURCE, group=group_t,
                            item=plane["item"], symbols=plane["symbols"])
    saturation = {}
    for j, plane in enumerate(shown, start=1):
        plane["shown"] = j
        saturation[plane["index"]] = _saturation_step(
            out, float(temperatures[plane["index"]]), f"p_sat_{j}", f"theta_{j}",
            plane["item"], group=group_p, item=plane["item"])
    return saturation


def _plane_name(planes, k: int) -> str:
    if k == 0:
        return "the inside surface"
    return "the outside surface" if k == len(planes) else planes[k - 1]["item"]


# ----------------------------------------------------------------------------- compute


def _compute(inp, out):
    R_si, R_se = surface_resistance_steps(inp, out)
    layers = _resistance_steps(out, inp)
    _vapour_steps(out, layers)
    planes = _planes(layers)
    if len(planes) > MAX_SLICES:
        thickest = max(layers, key=lambda e: e["n"])
        record = next(r for r in out.records if r.path == f"{thickest['path']}.thickness")
        raise InputError(record.loc, f"{out.block_key}.inputs.{thickest['path']}",
                         f"the element divides into {len(planes)} slices of at most "
                         f"{SLICE_RESISTANCE:g} m²·K/W",
                         f"at most {MAX_SLICES} slices (layers of up to "
                         f"{MAX_SLICES * SLICE_RESISTANCE:g} m²·K/W in all)",
                         f"{thickest['label']} in {thickest['n']} slices")

    months = {key: [c[key] for c in inp.climate] for key in
              ("inside_temperature", "inside_relative_humidity", "outside_temperature",
               "outside_relative_humidity")}
    R = [p["R"] for p in planes]
    s_d = [p["s_d"] for p in planes]
    try:
        year = interstitial_condensation(R, s_d, R_si.si, R_se.si,
                                         *(months[key] for key in months))
    except PhysicsRangeError as exc:
        if exc.quantity in months and exc.index is None:  # locate the month refused
            month = next(m for m, v in enumerate(months[exc.quantity]) if v == exc.value)
            raise PhysicsRangeError(exc.quantity, exc.value, exc.expected, month) from None
        raise

    # Every month's profile as the year steps it (moisture held from the month before), and
    # every month dry (the start month's test): where the slice planes stand.
    def profile(m: int, wet=()):
        return vapour_profile(R, s_d, R_si.si, R_se.si, *(months[key][m] for key in months),
                              wet_interfaces=wet)

    dry = [(m, profile(m)) for m in range(12)]
    stepped = []
    if year.condensation_predicted:
        for step, calendar in enumerate(year.months):
            held = year.accumulated[step - 1] if step else np.zeros(len(planes) + 1)
            wet = [k for k in range(1, len(planes)) if held[k] > 0.0]
            stepped.append((int(calendar) - 1, profile(int(calendar) - 1, wet)))
    nearest = _inside_slices(planes, dry + stepped)
    full = nearest is not None and nearest[0] >= 1.0 - 1e-9
    shown = _slice_steps(out, layers, planes, full, nearest)

    names = ["R_si"] + [f"R_{e['j']}" for e in layers] + ["R_se"]
    R_T = out.step("R_T", " + ".join(names),
                   {"R_si": R_si, "R_se": R_se, **{f"R_{e['j']}": e["R"] for e in layers}},
                   R_si.si + sum(e["R"].si for e in layers) + R_se.si, "m^2*K/W",
                   label="Total thermal resistance", source=SERIES_SOURCE)
    out.note("Monthly method (Glaser), each month steady: the vapour pressure over the "
             "cumulative equivalent air thickness s_d = μ·d is the tautest line from the inside "
             "to the outside air's that nowhere exceeds saturation; where it touches, vapour "
             "condenses at the inflow less the outflow. Moisture held at an interface keeps it "
             "at saturation until it has evaporated. Surface vapour resistances neglected; "
             "months of a non-leap year.", METHOD_SOURCE)
    out.note("Water vapour permeability of still air δ0 = {d0}.", DELTA_0_SOURCE,
             d0=Value(VAPOUR_PERMEABILITY_OF_AIR, "kg/(m*s*Pa)", given=True))
    wet_surface = [MONTH_NAMES[m] for m, month in dry
                   if month.vapour_pressures[0] > month.saturation_pressures[0]]
    if wet_surface:
        out.warn("The inside surface is below the dew point of the inside air in {months} "
                 "(with the surface resistance for U): surface condensation, which the monthly "
                 "method does not assess.", SATURATION_SOURCE,
                 months=Value(", ".join(wet_surface)))
    if year.condensation_predicted:
        _condensation(out, inp, year, layers, planes, shown, R_T, R_si)
    else:
        _no_condensation(out, inp, year, layers, planes, shown, R_T, R_si, dry)


def _start_statement(out, year) -> None:
    start = year.start_month
    if year.condensation_every_month:
        out.statement("m_0", "{month}: condensation is predicted in every month with every "
                      "interface dry", start, values={"month": Value(MONTH_NAMES[start - 1])},
                      label="Start of the year", source=START_CONVENTION)
    else:
        out.statement("m_0", "{month}: the first month (taken cyclically) with condensation after "
                      "a month without, every interface dry; the year runs twelve months from "
                      "there", start, values={"month": Value(MONTH_NAMES[start - 1])},
                      label="Start of the year (month 1 to 12)", source=START_SOURCE)
    _given(out)


def _condensation(out, inp, year, layers, planes, shown, R_T, R_si) -> None:
    n = len(planes)
    worst = year.worst_month - 1
    diagram = year.diagram
    active = [k for k in range(1, n) if np.any(year.rates[:, k] != 0.0)]
    letter = {k: ("c" if len(active) == 1 else _LETTERS[i % len(_LETTERS)])
              for i, k in enumerate(active)}

    # The worst month in full.
    why = "the month of the largest accumulation"
    saturation = _plane_steps(out, shown, worst, why, R_T, R_si, diagram.temperatures)
    p_i, p_e = _air_pressure_steps(out, worst, inp.climate[worst]["inside_temperature"],
                                   inp.climate[worst]["outside_temperature"])
    vertices = [k for k in range(1, n) if diagram.rates[k] != 0.0 or diagram.wet[k]]
    anchors = [0, *vertices, n]
    point_name = {0: "i", n: "e", **letter}
    pressure = {0: p_i, n: p_e, **{k: saturation[k] for k in vertices}}
    segments = {}
    for left, right in zip(anchors[:-1], anchors[1:]):
        a, b = point_name[left], point_name[right]
        name = f"s_{a}{b}"
        if len(vertices) == 1 and len(active) == 1:
            name = "s_i" if left == 0 else "s_e"
        expr, operands, value = _s_sum(planes, layers, left, right)
        segments[left, right] = (name, out.step(
            name, expr, operands, value, "m",
            label=f"Equivalent air thickness from {_plane_name(planes, left)} to "
                  f"{_plane_name(planes, right)}", source=METHOD_SOURCE))
    delta_0 = Value(VAPOUR_PERMEABILITY_OF_AIR, "kg/(m*s*Pa)", given=True)
    rates = {}
    for left, k, right in zip(anchors[:-2], anchors[1:-1], anchors[2:]):
        L, X, Rr = point_name[left], point_name[k], point_name[right]
        s_l_name, s_l = segments[left, k]
        s_r_name, s_r = segments[k, right]
        operands = {"delta_0": delta_0, f"p_{L}": pressure[left], f"p_{X}": pressure[k],
                    f"p_{Rr}": pressure[right], s_l_name: s_l, s_r_name: s_r}
        g = VAPOUR_PERMEABILITY_OF_AIR * ((pressure[left].si - pressure[k].si) / s_l.si -
                                          (pressure[k].si - pressure[right].si) / s_r.si)
        if g > 0.0:
            label = ("Condensation rate at {plane}, where the vapour pressure line touches "
                     "saturation (p_{x} = p_sat,{k})")
        else:
            label = ("Evaporation rate at {plane}, held at saturation by the moisture there "
                     "(p_{x} = p_sat,{k})")
        rates[k] = out.step(f"g_{X}", f"delta_0 * ((p_{L} - p_{X}) / {s_l_name} - "
                            f"(p_{X} - p_{Rr}) / {s_r_name})", operands, g, _RATE,
                            label=phrase(label.replace("{x}", X),
                                         plane=Value(planes[k - 1]["item"]),
                                         k=Value(planes[k - 1]["shown"], given=True)),
                            source=METHOD_SOURCE)

    # The year, month by month: a statement a month (the month's air, the rate the tautest
    # line gives at each interface that ever holds moisture, the moisture at the month's end).
    _start_statement(out, year)
    seconds = month_seconds()
    where = [planes[k - 1]["item"] for k in active]
    if len(active) == 1:
        group = (f"Month by month at {where[0]}: the air, the rate g (negative: evaporation), "
                 "the moisture held at the month's end M_j = max(0, M_j−1 + g·t)")
        text = "{θi}, {φi} inside, {θe}, {φe} outside; g = {g}, t = {t}"
    else:
        group = ("Month by month at " + ", ".join(where) + " in turn: the air, the rates g "
                 "(negative: evaporation), the moisture held at each at the month's end "
                 "max(0, M_j−1 + g·t), and M_j their sum")
        text = "{θi}, {φi} inside, {θe}, {φe} outside; g = {g}, t = {t}, held {held}"
    totals: list[Value] = []
    for step, calendar in enumerate(year.months, start=1):
        m = int(calendar) - 1
        values = {"θi": out.input(f"climate[{m}].inside_temperature"),
                  "φi": out.input(f"climate[{m}].inside_relative_humidity"),
                  "θe": out.input(f"climate[{m}].outside_temperature"),
                  "φe": out.input(f"climate[{m}].outside_relative_humidity"),
                  "g": Value([float(year.rates[step - 1, k]) for k in active], _RATE)
                  if len(active) > 1 else Value(float(year.rates[step - 1, active[0]]), _RATE),
                  "t": Value(float(seconds[m]), "s", "d", given=True)}
        if len(active) > 1:
            values["held"] = Value([float(year.accumulated[step - 1, k]) for k in active],
                                   _MASS)
        totals.append(out.statement(f"M_{step}", text, float(year.accumulated_total[step - 1]),
                                    _MASS, values=values,
                                    label=f"{MONTH_NAMES[m]}: moisture held at its end",
                                    source=METHOD_SOURCE, group=group, item=MONTH_NAMES[m]))

    # The results.
    worst_step = int(np.flatnonzero(year.months == year.month_of_max)[0])
    names = [f"M_{j}" for j in range(1, 13)]
    out.step("M_max", "max(" + ", ".join(names) + ")", dict(zip(names, totals)),
             year.max_accumulated, _MASS, label="Largest moisture at a month's end",
             source=METHOD_SOURCE, yields="max_accumulated")
    out.statement("m_max", "end of {month}", year.month_of_max,
                  values={"month": Value(MONTH_NAMES[year.month_of_max - 1])},
                  label="Month of the largest moisture", source=METHOD_SOURCE,
                  yields="month_of_max")
    last = MONTH_NAMES[int(year.months[-1]) - 1]
    end = out.step("M_end", "M_12", {"M_12": totals[-1]}, year.end_of_year_accumulated, _MASS,
                   label=f"Moisture left twelve months from the start (end of {last})",
                   source=METHOD_SOURCE, yields="end_of_year_accumulated")
    if year.dries_out:
        out.statement("D", "1: all the moisture evaporates within the year (M_end = 0)", 1,
                      label="The element dries out", source=METHOD_SOURCE, yields="dries_out")
    else:
        out.statement("D", "0: {M} remains at the end of the year and accumulates year on year",
                      0, values={"M": end}, label="The element dries out",
                      source=METHOD_SOURCE, yields="dries_out")
        out.warn("The element does not dry out: {M} remains after the year and accumulates "
                 "year on year, which the method does not accept.", METHOD_SOURCE, M=end)
    _series(out, year)
    out.figure(_diagram(out, inp, year, layers, planes, worst, why, vertices, pressure, rates))
    out.figure(_accumulation_figure(out, year, worst_step))


def _series(out, year) -> None:
    start = MONTH_NAMES[int(year.months[0]) - 1]
    x = list(range(1, 13))
    out.add_series("accumulated", x, year.accumulated_total, "1", _MASS,
                   f"months from the start of {start}",
                   "moisture in the element at each month end, from the start month")
    out.add_series("monthly_balance", x, year.monthly_balance, "1", _MASS,
                   f"months from the start of {start}",
                   "net change of the moisture over each month, from the start month")


def _no_condensation(out, inp, year, layers, planes, shown, R_T, R_si, dry) -> None:
    n = len(planes)
    worst = year.worst_month - 1
    diagram = year.diagram
    why = "the month nearest to condensation"
    saturation = _plane_steps(out, shown, worst, why, R_T, R_si, diagram.temperatures)
    p_i, p_e = _air_pressure_steps(out, worst, inp.climate[worst]["inside_temperature"],
                                   inp.climate[worst]["outside_temperature"])
    # The plane of the working nearest to saturation in that month, written out.
    inner = [p["index"] for p in shown if p["index"] < n]
    near, k = None, None
    if inner:
        ratio = diagram.vapour_pressures / diagram.saturation_pressures
        k = max(inner, key=lambda i: ratio[i])
        item = planes[k - 1]["item"]
        expr, operands, value = _s_sum(planes, layers, 0, k)
        s_k = out.step("s_ik", expr, operands, value, "m",
                       label=f"Equivalent air thickness from the inside surface to {item}",
                       source=METHOD_SOURCE, symbols={"s_ik": r"s_{i,k}"})
        expr, operands, value = _s_sum(planes, layers, 0, n)
        s_T = out.step("s_T", expr, operands, value, "m",
                       label="Equivalent air thickness of the element", source=METHOD_SOURCE)
        p_k = out.step("p_k", "p_i - (p_i - p_e) * s_ik / s_T",
                       {"p_i": p_i, "p_e": p_e, "s_ik": s_k, "s_T": s_T},
                       float(diagram.vapour_pressures[k]), "Pa",
                       label=f"Vapour pressure at {item} on the straight line from the inside "
                             "to the outside air", source=METHOD_SOURCE,
                       symbols={"s_ik": r"s_{i,k}"})
        near = out.step("varphi_k", "p_k / p_sat_k", {"p_k": p_k, "p_sat_k": saturation[k]},
                        p_k.si / saturation[k].si, "1", display="%",
                        label=f"Relative humidity at {item}, the plane nearest to saturation: "
                              "below 100 %, no condensation", source=METHOD_SOURCE)
    else:
        out.note("A single layer of at most {limit} has no plane inside the element at which "
                 "vapour could condense.", SLICES_SOURCE,
                 limit=Value(SLICE_RESISTANCE, "m^2*K/W", given=True))
    for m, month in dry:
        if not inner:
            break
        ratio = month.vapour_pressures / month.saturation_pressures
        k_m = max(range(1, n), key=lambda i: ratio[i])
        out.statement(
            f"varphi_max_{m + 1}", "{θi}, {φi} inside, {θe}, {φe} outside; nearest {at}",
            float(ratio[k_m]), "1", display="%",
            values={"θi": out.input(f"climate[{m}].inside_temperature"),
                    "φi": out.input(f"climate[{m}].inside_relative_humidity"),
                    "θe": out.input(f"climate[{m}].outside_temperature"),
                    "φe": out.input(f"climate[{m}].outside_relative_humidity"),
                    "at": Value(planes[k_m - 1]["item"])},
            label=f"{MONTH_NAMES[m]}: the highest relative humidity at a plane",
            source=METHOD_SOURCE, group=GROUP_MONTHS_DRY, item=MONTH_NAMES[m],
            symbols={f"varphi_max_{m + 1}": rf"\varphi_{{max,{m + 1}}}"})
    out.statement("M_max", "no condensation in any month", 0.0, _MASS,
                  label="Largest moisture at a month's end", source=METHOD_SOURCE,
                  yields="max_accumulated")
    out.statement("M_end", "no condensation in any month", 0.0, _MASS,
                  label="Moisture left at the end of the year", source=METHOD_SOURCE,
                  yields="end_of_year_accumulated")
    out.statement("D", "1: nothing condenses, so nothing is left", 1,
                  label="The element dries out", source=METHOD_SOURCE, yields="dries_out")
    out.not_reached("month_of_max", "no condensation in any month")
    out.note("No condensation is predicted in any month: with every interface dry, the vapour "
             "pressure line lies below saturation at every plane all year, so no moisture "
             "accumulates and the element dries out.", METHOD_SOURCE)
    x = list(range(1, 13))
    out.add_series("accumulated", x, year.accumulated_total, "1", _MASS, "months from January",
                   "moisture in the element at each month end: none")
    out.add_series("monthly_balance", x, year.monthly_balance, "1", _MASS,
                   "months from January", "net change of the moisture over each month: none")
    out.figure(_diagram(out, inp, year, layers, planes, worst, why, [], {}, {},
                        nearest=(k, near)))


# ----------------------------------------------------------------------------- figures


def _diagram(out, inp, year, layers, planes, worst, why, vertices, pressure, rates,
             nearest=None) -> FigureData:
    """The worst month's saturation and vapour pressures over cumulative s_d, the layers as
    bands over their s_d, the interfaces the line touches as points."""
    d = year.diagram
    s = [float(v) for v in d.cumulative_sd]
    total = s[-1]
    bands, edges, start = [], [], 0.0
    for entry in layers:
        end = start + entry["s_d"].si
        wide = (end - start) >= 0.06 * total
        bands.append(Band(start, end, entry["label"] if wide else "", 2 * (entry["j"] % 2)))
        edges.append(entry)
        start = end
    lines = (Line(tuple(s), tuple(float(v) for v in d.saturation_pressures),
                  "saturation pressure p_sat", 0, True),
             Line(tuple(s), tuple(float(v) for v in d.vapour_pressures),
                  "vapour pressure p", 1))
    points = []
    for i, k in enumerate(vertices):
        if i == 0:
            what = "condensation" if rates[k].si > 0 else "evaporation"
            label = phrase("{what} at {plane}: g = {g}", what=Value(what),
                           plane=Value(planes[k - 1]["item"]), g=rates[k])
            if len(vertices) > 1:
                label = phrase(label.template + " (and {more} more)",
                               **label.values, more=Value(len(vertices) - 1, given=True))
        else:
            label = ""
        points.append(Point(s[k], pressure[k].si, label))
    if nearest is not None and nearest[1] is not None:
        k, near = nearest
        points.append(Point(s[k], float(d.vapour_pressures[k]),
                            phrase("nearest to saturation: {plane}, {phi}",
                                   plane=Value(planes[k - 1]["item"]), phi=near)))
    names, places = [], {"month": Value(MONTH_NAMES[worst]), "why": Value(why),
                         "pi": Value(float(d.vapour_pressures[0]), "Pa"),
                         "pe": Value(float(d.vapour_pressures[-1]), "Pa")}
    for entry in layers:
        names.append(f"{{n{entry['j']}}} {{s{entry['j']}}}")
        places[f"n{entry['j']}"] = Value(entry["label"])
        places[f"s{entry['j']}"] = replace(entry["s_d"], display="m", written=None)
    caption = ("Vapour pressure through the element in {month}, {why}, over the equivalent air "
               "thickness from the inside surface (left) to the outside surface (right): inside "
               "air {pi}, outside air {pe}; saturation pressure at every plane. Layers by s_d: "
               + "; ".join(names) + ".")
    top = max(max(d.saturation_pressures), max(d.vapour_pressures))
    return FigureData(
        key=f"{out.block_key}-vapour", caption=phrase(caption, **places),
        x=Axis("equivalent air thickness from the inside surface, s_d", "m", "m", (0.0, total)),
        y=Axis("pressure", "Pa", "Pa", (0.0, 1.15 * float(top))),
        lines=lines, bands=tuple(bands), points=tuple(points), legend="lower left",
        size=(160.0, 75.0))


def _accumulation_figure(out, year, worst_step: int) -> FigureData:
    start = MONTH_NAMES[int(year.months[0]) - 1]
    x = tuple(float(v) for v in range(13))
    y = (0.0,) + tuple(float(v) for v in year.accumulated_total)
    peak = Value(year.max_accumulated, _MASS)
    month = Value(MONTH_NAMES[year.month_of_max - 1])
    caption = ("Moisture in the element at each month end over the year from the start of "
               "{start} (0), summed over the interfaces: the most, {peak}, at the end of "
               "{month}; {end} left after twelve months.")
    return FigureData(
        key=f"{out.block_key}-accumulated",
        caption=phrase(caption, start=Value(start), peak=peak, month=month,
                       end=Value(year.end_of_year_accumulated, _MASS)),
        x=Axis(f"months from the start of {start}", "1", limits=(0.0, 12.0)),
        y=Axis("moisture held", _MASS, limits=(0.0, 1.2 * year.max_accumulated)),
        lines=(Line(x, y, "", 0, True),),
        points=(Point(worst_step + 1.0, year.max_accumulated,
                      phrase("most: {peak}, end of {month}", peak=peak, month=month)),),
        legend=None, size=(86.0, 52.0))


# ----------------------------------------------------------------------------- the kind

INTERSTITIAL_CONDENSATION = Kind(
    name="interstitial_condensation",
    title="Interstitial condensation, monthly method",
    summary="Moisture condensing and evaporating inside a plane element month by month "
            "(ISO 13788 monthly method, Glaser): the largest amount held, whether it dries "
            "out within the year.",
    inputs=(
        VapourLayers("layers", "layers from the inside outward", fields=LAYER_FIELDS,
                     exactly_one=(("conductivity", "resistance", "material"),),
                     at_most_one=(("vapour_resistance_factor", "equivalent_air_thickness"),),
                     min_items=1),
        *plane_surface_inputs("inside surface resistance R_si"),
        ClimateMonths("climate", "monthly mean climate, January to December",
                      fields=CLIMATE_FIELDS, min_items=12),
    ),
    results=(
        ResultSpec("max_accumulated", _MASS,
                   "largest moisture held in the element at a month's end"),
        ResultSpec("month_of_max", "1", "calendar month (1–12) at whose end it is held",
                   whole=True),
        ResultSpec("end_of_year_accumulated", _MASS,
                   "moisture left twelve months from the start month"),
        ResultSpec("dries_out", "1", "1 when all of it evaporates within the year, else 0",
                   whole=True),
    ),
    compute=_compute,
    caution=CAUTION,
    # Physics parameter names → inputs. Every other range (μ >= 1, d > 0, a resistance > 0, the
    # months' temperatures and humidities) is refused where it is written, before the physics.
    input_names={"R_si": "inside_surface_resistance", "R_se": "outside_surface_resistance",
                 "inside_temperature": "climate[{index}].inside_temperature",
                 "inside_relative_humidity": "climate[{index}].inside_relative_humidity",
                 "outside_temperature": "climate[{index}].outside_temperature",
                 "outside_relative_humidity": "climate[{index}].outside_relative_humidity"},
    references=("ISO 13788:2012", "ISO 6946:2017"),
)

KINDS = (INTERSTITIAL_CONDENSATION,)
