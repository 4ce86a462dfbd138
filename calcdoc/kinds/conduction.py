"""Steady conduction kinds: ``layered_wall`` (plane elements, ISO 6946 and ISO 13788) and
``cylindrical_layers`` (pipe and duct insulation).

The physics is in :mod:`calcdoc.physics.conduction`; this module declares the inputs and
records, as data, the working a checker re-does by hand: every formula in the formula language
over named operands (inputs as written, table and library values in full, earlier results),
the notes that cite the clause behind every default applied, the warnings, and the figures
(the wall's temperature profile, the pipe's radial profile) as :class:`FigureData`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.constants import g as STANDARD_GRAVITY
from scipy.constants import zero_Celsius

from calcdoc.data import Axis, Band, FigureData, Line, Mark, library_value
from calcdoc.references import Cite
from calcdoc.kinds._insulation import (ConductivityCurveField, InsulationMaterial, LayerName,
                                       curve_profile, curve_steps, interface_check_steps,
                                       layer_curves, sizing_steps, solve_with_curves)
from calcdoc.kinds.base import (ABSOLUTE, DIFFERENCE, REQUIRED, Choice, InputRecord,
                                InvalidInput, Items, Kind, MaterialField, Quantity, Record,
                                ResultSpec, Text, Value, phrase)
from calcdoc.physics.air import AIR_TABLE_SOURCE, air_table_interval
from calcdoc.physics.conduction import (CHURCHILL_CHU_SOURCE, COMBINED_METHOD_SOURCE,
                                        SATURATION_PRESSURE_SOURCE, SURFACE_RESISTANCE_SOURCE,
                                        combined_method, cylinder_film_resistance,
                                        cylinder_layer_resistance, cylindrical_layers,
                                        dew_point_temperature, layer_resistance,
                                        pipe_in_still_air, plane_element,
                                        saturation_vapour_pressure, surface_relative_humidity,
                                        surface_resistances, temperature_factor)

__all__ = ["KINDS", "LAYERED_WALL", "CYLINDRICAL_LAYERS"]

# Clauses and values recalled, not yet read against the printed standard: data, not words in
# the source (the package lists them under "Values to confirm").
SERIES_SOURCE = Cite("ISO 6946:2017", "6.7.1, homogeneous layers in series", confirmed=False,
                     key="ISO 6946:2017 6.7.1", value="clause 6.7.1 for homogeneous layers in "
                     "series")
CONDENSATION_RSI_SOURCE = Cite("ISO 13788:2012", "internal surface resistance of opaque "
                               "elements for surface humidity and mould", confirmed=False,
                               key="ISO 13788:2012 R_si 0.25",
                               value="R_si = 0.25 m²·K/W for surface humidity and mould")
TEMPERATURE_FACTOR_SOURCE = "ISO 13788:2012, temperature factor at the internal surface f_Rsi"
MOULD_SOURCE = Cite("ISO 13788:2012", "critical surface relative humidity for mould growth",
                    confirmed=False, key="ISO 13788:2012 mould 80 %",
                    value="80 % surface relative humidity as the mould criterion")
CORRECTIONS_SOURCE = Cite("ISO 6946:2017", "Annex F, corrections to U", confirmed=False,
                          key="ISO 6946:2017 Annex F", value="Annex F for the corrections to U")
STEFAN_BOLTZMANN_SOURCE = "Stefan–Boltzmann law, σ from scipy.constants (CODATA)"
RADIAL_SOURCE = "Fourier's law, radial conduction through coaxial cylindrical layers"
BRENT_SOURCE = "Brent's method (scipy.optimize.brentq)"
GRAVITY_SOURCE = "standard gravity, scipy.constants (CODATA)"

_CAUTION_BASE = ("This calculation supports, and does not replace, the judgement of a licensed "
                 "engineer and the requirements of the local code and the authority having "
                 "jurisdiction.")
WALL_CAUTION = (_CAUTION_BASE + " Surface temperatures, condensation and mould figures are "
                "one-dimensional and steady-state: corners, junctions, fixings and the surface "
                "over a bridge are colder and need a two- or three-dimensional assessment "
                "(ISO 10211) before the element is relied on.")
PIPE_CAUTION = (_CAUTION_BASE + " Surface temperatures: a hot surface can burn on contact "
                "(contact thresholds: EN ISO 13732-1), and a cold surface below the dew point of "
                "the surrounding air collects condensation, which wets the insulation.")

# ISO 13788:2012 Annex E: p_sat = p_0 exp(a θ / (b + θ)), θ the temperature in °C as a number
# (from memory, as the physics module records).
_P_SAT_0 = 610.5  # Pa
_OVER_WATER = (17.269, 237.3)
_OVER_ICE = (21.875, 265.5)
MOULD_THRESHOLD = 0.8  # ISO 13788:2012 critical surface relative humidity (from memory)
_BRENT_TOLERANCE = 1e-9  # K, as pipe_in_still_air solves

# Groups: one formula applied to each item of a list, printed as one table.
GROUP_LAYERS = "Thermal resistance of each layer"
GROUP_FRACTIONS = "Area fraction of each section"
GROUP_SECTIONS = "Total resistance of each section (upper limit)"
GROUP_LOWER = "Equivalent resistance of each bridged layer (lower limit)"
GROUP_SCALED = "Layer resistances for the temperatures (lower limits scaled to R_T)"
GROUP_TEMPERATURES = "Temperature at each interface"
GROUP_CONDENSATION = "Sections with the condensation surface resistance"
GROUP_DIAMETERS = "Outer diameter of each layer"
GROUP_PIPE_LAYERS = "Resistance of each layer per metre"
GROUP_AIR = "Air at the film temperature (linear interpolation in the table)"

_ABC = "abcdefghijklmnopqrstuvwxyz"


# ----------------------------------------------------------------------------- fields


class _TableValue(float):
    """A surface resistance taken from ISO 6946 Table 7 because none was given."""


@dataclass(frozen=True)
class SurfaceResistance(Quantity):
    """A surface resistance whose default is the ISO 6946:2017 Table 7 value for the block's
    ``heat_flow``; the default is recorded as an input with its source."""

    side: str = "inside"

    def default_text(self) -> str:
        if self.side == "inside":
            return "ISO 6946:2017 Table 7 for heat_flow (0.10 up, 0.13 horizontal, 0.17 down)"
        return "ISO 6946:2017 Table 7 (0.04 m²·K/W, every direction)"

    def from_default(self, ctx, parent, path):
        node = parent.get("heat_flow")
        heat_flow = "horizontal" if node is None else node.value
        if heat_flow not in ("horizontal", "upward", "downward"):
            raise InvalidInput  # heat_flow's own error is recorded where it is converted
        inside, outside = surface_resistances(heat_flow)
        value = inside if self.side == "inside" else outside
        # Written as where it comes from; the number prints in full from the SI value.
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written=f"ISO 6946 Table 7, {heat_flow} heat flow",
            si=value, si_unit=self.unit, source=f"{SURFACE_RESISTANCE_SOURCE}, heat flow "
            f"{heat_flow}", origin="default", loc=parent.loc))
        return _TableValue(value)


@dataclass(frozen=True)
class ConductingMaterial(MaterialField):
    """A library material that has a constant conductivity (steady conduction needs one)."""

    def convert(self, node, ctx, path):
        entry = super().convert(node, ctx, path)
        if "conductivity" not in entry or entry.get("law"):
            ctx.error(node, path, f"material '{entry['name']}' has no constant conductivity",
                      "a material with a constant conductivity, or give conductivity",
                      "a temperature-dependent material" if entry.get("law")
                      else "a material without one")
            raise InvalidInput
        return entry


THICKNESS = dict(unit="m", greater_than=0.0, display="mm")
CONDUCTIVITY = dict(unit="W/(m*K)", greater_than=0.0)

BRIDGE_FIELDS = (
    Text("name", "what bridges the layer, e.g. timber battens", default=""),
    Quantity("conductivity", "conductivity of the bridging material", default=REQUIRED,
             **CONDUCTIVITY),
    ConductingMaterial("material", "bridging material from the library", default=REQUIRED),
    Quantity("fraction", "fraction of the area taken by the bridge", unit="1", percent=True,
             greater_than=0.0, less_than=1.0),
    Text("source", "where the bridge's spacing and size come from", default=""),
)

WALL_LAYER_FIELDS = (
    Text("name", "layer name", default=""),
    Quantity("thickness", "layer thickness", **THICKNESS),
    Quantity("conductivity", "design thermal conductivity", default=REQUIRED, **CONDUCTIVITY),
    Quantity("resistance", "thermal resistance of the layer (e.g. an air layer)",
             default=REQUIRED, unit="m^2*K/W", greater_than=0.0),
    ConductingMaterial("material", "material from the library", default=REQUIRED),
    Text("source", "where the layer's data come from", default=""),
    Record("bridge", "a bridging material in part of the layer (combined method)", default=None,
           fields=BRIDGE_FIELDS, exactly_one=(("conductivity", "material"),)),
)

PIPE_LAYER_FIELDS = (
    Text("name", "layer name", default=""),
    Quantity("thickness", "layer thickness", **THICKNESS),
    Quantity("conductivity", "thermal conductivity", default=REQUIRED, **CONDUCTIVITY),
    ConductivityCurveField("conductivity_curve", "conductivity against temperature, averaged "
                           "over the layer's temperature range", default=REQUIRED),
    InsulationMaterial("material", "material from the library (its conductivity curve where it "
                       "has one)", default=REQUIRED),
    Text("source", "where the layer's data come from", default=""),
)

SIZE_LAYER_FIELDS = (
    LayerName("layer", "the layer to size (its name)"),
    Quantity("max_q_per_length", "largest heat flow per metre (its size)", default=REQUIRED,
             unit="W/m", greater_than=0.0),
    Quantity("max_surface_temperature", "largest outer surface temperature", default=REQUIRED,
             unit="K", temperature=ABSOLUTE, greater_than=0.0),
)


# ----------------------------------------------------------------------------- helpers


def _layer_name(layer, j: int) -> str:
    return layer["name"] or f"layer {j}"


def layer_conductivity(out, record, path: str) -> tuple[Value, str]:
    """The conductivity of a layer or bridge as an operand, and the source of a library value:
    an input prints as written, a library value in full."""
    material = record.get("material")
    if material is not None:
        return (library_value(material, "conductivity", "W/(m*K)"),
                material.get("sources", {}).get("conductivity", {}).get(
                    "source", material.get("source", "")))
    return out.input(f"{path}.conductivity"), ""


def _layer_label(j: int, name: str):
    return phrase("Layer {j}, {name}", j=Value(j, given=True), name=Value(name))


def _celsius_number(T: float, given: bool = False) -> Value:
    """A temperature's number in °C as a dimensionless operand, for ISO 13788's empirical
    formulas, which are written in °C."""
    return Value(T - zero_Celsius, "1", given=given)


# ----------------------------------------------------------------------------- layered_wall


def _wall_compute(inp, out):
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    T_i, T_e = out.input("inside_temperature"), out.input("outside_temperature")
    R_si, R_se = surface_resistance_steps(inp, out)
    r_si, r_se = R_si.si, R_se.si

    layers = [_layer_steps(out, layer, j) for j, layer in enumerate(inp.layers, start=1)]
    bridged = [entry for entry in layers if entry["bridge"] is not None]
    combined = None
    if bridged:
        combined = _combined_steps(out, layers, bridged, R_si, R_se)
        R_T = combined["R_T"]
        for_temperatures = combined["scaled"]
    else:
        expr = " + ".join(["R_si"] + [e["name"] for e in layers] + ["R_se"])
        operands = {"R_si": R_si, "R_se": R_se, **{e["name"]: e["R"] for e in layers}}
        value = r_si + sum(e["R"].si for e in layers) + r_se
        R_T = out.step("R_T", expr, operands, value, label="Total thermal resistance",
                       source=SERIES_SOURCE, yields="R_total")
        for_temperatures = [e["R"] for e in layers]

    out.step("U", "1 / R_T", {"R_T": R_T}, 1.0 / R_T.si, label="Thermal transmittance",
             source=SERIES_SOURCE, yields="U")
    out.note("Corrections to U for air gaps in the insulation, mechanical fasteners crossing it "
             "and inverted roofs are not applied.", CORRECTIONS_SOURCE)

    wall = plane_element([R.si for R in for_temperatures], theta_i, theta_e, r_si, r_se)
    q = out.step("q", "(theta_i - theta_e) / R_T", {"theta_i": T_i, "theta_e": T_e, "R_T": R_T},
                 wall.q, label="Heat flux, positive inside to outside", source=SERIES_SOURCE,
                 yields="q")
    if inp.area is not None:
        out.step("Q", "q * A", {"q": q, "A": out.input("area")}, wall.q * inp.area,
                 label="Heat flow through the area", yields="Q")

    temperatures = [float(t) for t in wall.interface_temperatures]
    _temperature_steps(out, temperatures, layers, for_temperatures, q, T_i, T_e, R_si, R_se,
                       bridged=bool(bridged))
    out.result("interface_temperatures", temperatures)

    surface = _condensation_steps(inp, out, layers, combined, R_T, R_si, R_se, T_i, T_e)

    if theta_i < theta_e and inp.inside_relative_humidity is not None:
        out.warn("The inside is colder than the outside: the condensation figures are for the "
                 "inside surface only. Write the element from its warm, humid side to assess "
                 "that side.")
    out.figure(_wall_figure(out, inp, layers, temperatures, surface))


def plane_surface_inputs(inside_meaning: str) -> tuple:
    """Return the declarations of a plane element's surfaces: heat-flow direction and the inside
    and outside surface resistances (ISO 6946 Table 7 unless given), shared by the kinds that
    take a plane build-up (layered_wall, interstitial_condensation)."""
    return (
        Choice("heat_flow", "direction of heat flow (sets R_si)", default="horizontal",
               source="ISO 6946:2017 Table 7", options=("horizontal", "upward", "downward")),
        SurfaceResistance("inside_surface_resistance", inside_meaning,
                          default="ISO 6946:2017 Table 7", source=SURFACE_RESISTANCE_SOURCE,
                          unit="m^2*K/W", at_least=0.0, side="inside"),
        SurfaceResistance("outside_surface_resistance", "outside surface resistance R_se",
                          default="ISO 6946:2017 Table 7", source=SURFACE_RESISTANCE_SOURCE,
                          unit="m^2*K/W", at_least=0.0, side="outside"),
    )


def surface_resistance_steps(inp, out) -> tuple[Value, Value]:
    """State where each surface resistance comes from; return them as operands (inputs as
    written or table values in full)."""
    table_si, table_se = surface_resistances(inp.heat_flow)
    flow = Value(inp.heat_flow)
    values = []
    for side, name, table in (("inside", "R_si", table_si), ("outside", "R_se", table_se)):
        field = f"{side}_surface_resistance"
        given = getattr(inp, field)
        operand = out.input(field)
        label = f"{side.capitalize()} surface resistance"
        if isinstance(given, _TableValue):
            out.statement(name, "the conventional value for {flow} heat flow ({field} not "
                          "given)", given, "m^2*K/W", values={"flow": flow, "field": Value(field)},
                          label=label, source=SURFACE_RESISTANCE_SOURCE)
        else:
            text = "as given" if abs(given - table) <= 1e-12 else (
                "as given, in place of the conventional {table} for {flow} heat flow")
            out.statement(name, text, given, "m^2*K/W",
                          values={"table": Value(table, "m^2*K/W", given=True), "flow": flow},
                          label=label, source=SURFACE_RESISTANCE_SOURCE)
        values.append(operand)
    return values[0], values[1]


def _layer_steps(out, layer, j: int) -> dict:
    """Record a layer's resistance (and its bridge's), return what later steps need."""
    path = f"layers[{j - 1}]"
    name = _layer_name(layer, j)
    entry = {"j": j, "name": f"R_{j}", "label": name, "layer": layer, "bridge": None}
    d = out.input(f"{path}.thickness")
    if layer["resistance"] is not None:
        entry["R"] = out.input(f"{path}.resistance")
        out.note("Layer {j}, {name}: thermal resistance as given; its thickness {d} is used for "
                 "the drawing only.", layer["source"], j=Value(j, given=True), name=Value(name),
                 d=d)
    else:
        lam, material_source = layer_conductivity(out, layer, path)
        value = float(layer_resistance(layer["thickness"], lam.si))
        entry["R"] = out.step(f"R_{j}", f"d_{j} / lambda_{j}", {f"d_{j}": d, f"lambda_{j}": lam},
                              value, "m^2*K/W", label=_layer_label(j, name),
                              source=layer["source"] or material_source, group=GROUP_LAYERS,
                              item=name)
    bridge = layer["bridge"]
    if bridge is not None:
        bridge_name = bridge["name"] or "bridge"
        lam_b, material_source = layer_conductivity(out, bridge, f"{path}.bridge")
        value = float(layer_resistance(layer["thickness"], lam_b.si))
        R_b = out.step(f"R_{j}_b", f"d_{j} / lambda_{j}_b", {f"d_{j}": d, f"lambda_{j}_b": lam_b},
                       value, "m^2*K/W",
                       label=phrase("Layer {j}, {name}, bridged part ({bridge}, {f} of the "
                                    "area)", j=Value(j, given=True), name=Value(name),
                                    bridge=Value(bridge_name),
                                    f=out.input(f"{path}.bridge.fraction")),
                       source=bridge["source"] or material_source, group=GROUP_LAYERS,
                       item=f"{name}: {bridge_name}")
        entry["bridge"] = {"R": R_b, "name": bridge_name,
                           "fraction": out.input(f"{path}.bridge.fraction")}
    return entry


def _sections(bridged: list[dict]) -> list[dict]:
    """The sections of the combined method, clear section first.

    With the bridges assumed aligned (each narrower bridge lies within every wider one), the
    section boundaries are the distinct bridge fractions F_1 < ... < F_k: the clear section
    1 - F_k, then F_k - F_(k-1) crossing the widest bridges only, ..., and F_1 crossing every
    bridge. Each section says which bridge fractions bound it and which layers it bridges."""
    edges: dict[float, dict] = {}
    for entry in bridged:  # one operand per distinct fraction: the first layer that gives it
        edges.setdefault(entry["bridge"]["fraction"].si, entry)
    ordered = sorted(edges)
    sections = []
    upper = None  # the bridge bounding the section from above (None: the whole area)
    for value in reversed(ordered):
        lower = edges[value]
        sections.append({"upper": upper, "lower": lower})
        upper = lower
    sections.append({"upper": upper, "lower": None})
    for section in sections:
        top = 1.0 if section["upper"] is None else section["upper"]["bridge"]["fraction"].si
        section["bridges"] = [e for e in bridged if e["bridge"]["fraction"].si >= top - 1e-15]
    return sections


def _combined_steps(out, layers, bridged, R_si, R_se) -> dict:
    """The combined method of ISO 6946:2017 6.7.2 written out: section fractions, section
    totals, the upper limit, each bridged layer's equivalent resistance, the lower limit, R_T,
    the error estimate, and the layer resistances scaled to R_T for the temperatures."""
    out.note("Bridged layers: the combined method of ISO 6946:2017 (upper limit R'_T with "
             "parallel heat flow through each section, lower limit R''_T with isothermal planes "
             "in each layer; R_T their mean).", COMBINED_METHOD_SOURCE)
    sections = _sections(bridged)
    fraction_names = {e["j"]: f"f_{e['j']}" for e in bridged}

    # Section fractions, each from the bridge fractions that bound it.
    fractions = []
    for m, section in enumerate(sections):
        letter = _ABC[m]
        upper, lower = section["upper"], section["lower"]
        operands, terms = {}, []
        if upper is None:
            terms.append("1")
        else:
            terms.append(fraction_names[upper["j"]])
            operands[fraction_names[upper["j"]]] = upper["bridge"]["fraction"]
        if lower is not None:
            terms.append(fraction_names[lower["j"]])
            operands[fraction_names[lower["j"]]] = lower["bridge"]["fraction"]
        top = 1.0 if upper is None else upper["bridge"]["fraction"].si
        bottom = 0.0 if lower is None else lower["bridge"]["fraction"].si
        section["what"] = ("clear of bridges" if not section["bridges"] else
                           "through " + ", ".join(e["bridge"]["name"] for e in section["bridges"]))
        fractions.append(out.step(f"f_{letter}", " - ".join(terms), operands, top - bottom,
                                  display="%", label=phrase("Section {m}, {what}",
                                                            m=Value(letter),
                                                            what=Value(section["what"])),
                                  source=COMBINED_METHOD_SOURCE, group=GROUP_FRACTIONS,
                                  item=letter))
    if len(bridged) > 1:
        text = ("Several layers are bridged: the bridges are assumed aligned (each narrower "
                "bridge lies within the wider ones), which defines {n} sections.")
        if all(e["bridge"]["R"].si <= e["R"].si for e in bridged):
            text += (" With every bridge conducting better than its layer, this gives the lowest "
                     "upper limit of all arrangements of the same fractions (conservative for "
                     "U).")
        else:
            text += " Another arrangement of the bridges gives a different upper limit."
        out.note(text, COMBINED_METHOD_SOURCE, n=Value(len(sections), given=True))

    def in_section(entry, section) -> tuple[str, Value]:
        if entry in section["bridges"]:
            return f"R_{entry['j']}_b", entry["bridge"]["R"]
        return entry["name"], entry["R"]

    rows = [e["R"].si if e["bridge"] is None else [in_section(e, s)[1].si for s in sections]
            for e in layers]
    f_values = [f.si for f in fractions]
    cm = combined_method(rows, f_values, R_si.si, R_se.si)

    # Upper limit: the sections in parallel.
    totals = []
    for m, section in enumerate(sections):
        names, operands = ["R_si"], {"R_si": R_si, "R_se": R_se}
        value = R_si.si
        for entry in layers:
            name, R = in_section(entry, section)
            names.append(name)
            operands[name] = R
            value += R.si
        value += R_se.si
        totals.append(out.step(f"R_T_{_ABC[m]}", " + ".join(names + ["R_se"]), operands, value,
                               "m^2*K/W", label=phrase("Section {m}, {what}",
                                                       m=Value(_ABC[m]),
                                                       what=Value(section["what"])),
                               source=COMBINED_METHOD_SOURCE, group=GROUP_SECTIONS,
                               item=_ABC[m]))
    parallel = " + ".join(f"f_{_ABC[m]} / R_T_{_ABC[m]}" for m in range(len(sections)))
    operands = {**{f"f_{_ABC[m]}": f for m, f in enumerate(fractions)},
                **{f"R_T_{_ABC[m]}": R for m, R in enumerate(totals)}}
    upper = out.step("R_T_upper", f"1 / ({parallel})", operands, cm.R_upper,
                     label="Upper limit of the total thermal resistance",
                     source=COMBINED_METHOD_SOURCE, yields="R_upper",
                     symbols={"R_T_upper": "R'_{T}"})

    # Lower limit: each bridged layer's sections in parallel, then the layers in series.
    lower_names, lower_operands = ["R_si"], {"R_si": R_si, "R_se": R_se}
    lower_values = []
    for entry in layers:
        if entry["bridge"] is None:
            lower_names.append(entry["name"])
            lower_operands[entry["name"]] = entry["R"]
            lower_values.append(entry["R"])
            continue
        j = entry["j"]
        terms, operands = [], {}
        for m, section in enumerate(sections):
            name, R = in_section(entry, section)
            terms.append(f"f_{_ABC[m]} / {name}")
            operands[f"f_{_ABC[m]}"] = fractions[m]
            operands[name] = R
        value = 1.0 / sum(f.si / in_section(entry, s)[1].si for f, s in zip(fractions, sections))
        R_j = out.step(f"R_{j}_lower", "1 / (" + " + ".join(terms) + ")", operands, value,
                       "m^2*K/W", label=_layer_label(j, entry["label"]),
                       source=COMBINED_METHOD_SOURCE, group=GROUP_LOWER, item=entry["label"],
                       symbols={f"R_{j}_lower": f"R''_{{{j}}}"})
        lower_names.append(f"R_{j}_lower")
        lower_operands[f"R_{j}_lower"] = R_j
        lower_values.append(R_j)
    lower = out.step("R_T_lower", " + ".join(lower_names + ["R_se"]), lower_operands, cm.R_lower,
                     label="Lower limit of the total thermal resistance",
                     source=COMBINED_METHOD_SOURCE, yields="R_lower",
                     symbols={"R_T_lower": "R''_{T}", **_lower_symbols(layers)})
    R_T = out.step("R_T", "(R_T_upper + R_T_lower) / 2", {"R_T_upper": upper, "R_T_lower": lower},
                   cm.R_total, label="Total thermal resistance (combined method)",
                   source=COMBINED_METHOD_SOURCE, yields="R_total",
                   symbols={"R_T_upper": "R'_{T}", "R_T_lower": "R''_{T}"})
    out.step("e", "(R_T_upper - R_T_lower) / (2 * R_T)",
             {"R_T_upper": upper, "R_T_lower": lower, "R_T": R_T}, cm.relative_error,
             display="%", label="Maximum relative error of R_T", source=COMBINED_METHOD_SOURCE,
             symbols={"R_T_upper": "R'_{T}", "R_T_lower": "R''_{T}"})

    # Temperatures of an inhomogeneous element: the lower-limit layer resistances scaled by
    # one factor so that with R_si and R_se they sum to R_T (the physics module's convention).
    out.note("Temperatures through the bridged element are area means: each layer takes its "
             "lower-limit resistance R''_j scaled so that the layers and surfaces sum to R_T "
             "(ISO 6946 defines no layer temperatures for an inhomogeneous element).",
             COMBINED_METHOD_SOURCE)
    names = [n for n in lower_names[1:]]
    operands = {"R_T": R_T, "R_si": R_si, "R_se": R_se,
                **{n: v for n, v in zip(names, lower_values)}}
    scale_value = (R_T.si - R_si.si - R_se.si) / sum(v.si for v in lower_values)
    scale = out.step("s", "(R_T - R_si - R_se) / (" + " + ".join(names) + ")", operands,
                     scale_value, label="Scale factor of the layer resistances for the "
                     "temperatures", source=COMBINED_METHOD_SOURCE, symbols=_lower_symbols(layers))
    scaled = []
    for entry, name, R in zip(layers, names, lower_values):
        j = entry["j"]
        scaled.append(out.step(f"R_{j}_s", f"s * {name}", {"s": scale, name: R},
                               float(cm.layer_resistances[j - 1]), "m^2*K/W",
                               label=_layer_label(j, entry["label"]),
                               source=COMBINED_METHOD_SOURCE, group=GROUP_SCALED,
                               item=entry["label"],
                               symbols={f"R_{j}_s": f"R^{{*}}_{{{j}}}",
                                        **_lower_symbols(layers)}))
    return {"R_T": R_T, "scaled": scaled, "sections": sections, "fractions": fractions,
            "totals": totals, "lower": lower, "rows": rows}


def _lower_symbols(layers) -> dict:
    return {f"R_{e['j']}_lower": f"R''_{{{e['j']}}}" for e in layers if e["bridge"] is not None}


def _temperature_steps(out, temperatures, layers, resistances, q, T_i, T_e, R_si, R_se,
                       bridged: bool):
    """The temperature at each surface and interface, from the inside air outward, and the
    outside surface again from the outside air (the two agree: the sum closes)."""
    symbols = {f"R_{e['j']}_s": f"R^{{*}}_{{{e['j']}}}" for e in layers} if bridged else {}
    previous = out.step("theta_si", "theta_i - q * R_si", {"theta_i": T_i, "q": q, "R_si": R_si},
                        temperatures[0], "K", temperature=ABSOLUTE,
                        label="Inside surface temperature", source=SERIES_SOURCE,
                        yields="theta_si", group=GROUP_TEMPERATURES, item="inside surface")
    previous_name = "theta_si"
    for k, (entry, R) in enumerate(zip(layers, resistances), start=1):
        R_name = f"R_{entry['j']}_s" if bridged else entry["name"]
        last = k == len(layers)
        item = "outside surface" if last else f"{entry['label']} | {layers[k]['label']}"
        value = out.step(f"theta_{k}", f"{previous_name} - q * {R_name}",
                         {previous_name: previous, "q": q, R_name: R}, temperatures[k], "K",
                         temperature=ABSOLUTE,
                         label=phrase("Outer face of layer {j}, {name}", j=Value(k, given=True),
                                      name=Value(entry["label"])),
                         source=SERIES_SOURCE, group=GROUP_TEMPERATURES, item=item,
                         symbols=symbols)
        previous, previous_name = value, f"theta_{k}"
    out.step("theta_se", "theta_e + q * R_se", {"theta_e": T_e, "q": q, "R_se": R_se},
             T_e.si + q.si * R_se.si, "K", temperature=ABSOLUTE,
             label="Outside surface temperature, from the outside air", source=SERIES_SOURCE,
             yields="theta_se", group=GROUP_TEMPERATURES, item="outside surface, from outside")


def _condensation_steps(inp, out, layers, combined, R_T, R_si, R_se, T_i, T_e) -> dict:
    """θsi′ and f_Rsi with the condensation surface resistance; with humidity, the saturation
    pressures, dew point, condensation margin and surface relative humidity."""
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    R_c = out.input("condensation_surface_resistance")
    out.note("Surface humidity and mould figures use R_si,sc = {R} at the inside surface, never "
             "U.", CONDENSATION_RSI_SOURCE, R=R_c)
    if combined is None:
        R_Tc = out.step("R_T_sc", "R_T - R_si + R_si_sc",
                        {"R_T": R_T, "R_si": R_si, "R_si_sc": R_c}, R_T.si - R_si.si + R_c.si,
                        "m^2*K/W",
                        label="Total resistance with the condensation surface resistance",
                        source=CONDENSATION_RSI_SOURCE)
    else:
        R_Tc = _combined_condensation_steps(out, combined, R_si, R_se, R_c)
    theta_sc = theta_i - (theta_i - theta_e) * R_c.si / R_Tc.si
    surface = out.step("theta_si_sc", "theta_i - (theta_i - theta_e) * R_si_sc / R_T_sc",
                       {"theta_i": T_i, "theta_e": T_e, "R_si_sc": R_c, "R_T_sc": R_Tc}, theta_sc,
                       "K", temperature=ABSOLUTE,
                       label="Inside surface temperature for surface humidity",
                       source=CONDENSATION_RSI_SOURCE, symbols={"theta_si_sc": r"\theta_{si}'"})
    if theta_i == theta_e:
        out.not_reached("f_Rsi", "undefined: the inside and outside temperatures are equal")
    else:
        out.step("f_Rsi", "(theta_si_sc - theta_e) / (theta_i - theta_e)",
                 {"theta_si_sc": surface, "theta_e": T_e, "theta_i": T_i},
                 float(temperature_factor(theta_sc, theta_i, theta_e)),
                 label="Temperature factor at the inside surface",
                 source=TEMPERATURE_FACTOR_SOURCE, yields="f_Rsi",
                 symbols={"theta_si_sc": r"\theta_{si}'"})
    if combined is not None:
        out.warn("f_Rsi and the surface humidity of a bridged element are area means; the "
                 "surface over a bridge is colder. Find its minimum temperature by a numerical "
                 "calculation (ISO 10211) before relying on the mould or condensation result.",
                 COMBINED_METHOD_SOURCE)

    phi = inp.inside_relative_humidity
    if phi is None:
        return {"theta": theta_sc, "dew_point": None}
    # Order matters for where a refusal is located: the air first (inside_temperature, then
    # inside_relative_humidity), then the surface (outside_temperature).
    p_v, dew, dew_value = _dew_point_steps(out, theta_i, T_i, out.input("inside_relative_humidity"),
                                           "i", "inside")
    phi_s = float(surface_relative_humidity(theta_i, phi, theta_sc))
    p_sat_s = _saturation_step(out, theta_sc, "si_sc", "Saturation vapour pressure at the inside "
                               "surface", symbols={"theta_si_sc": r"\theta_{si}'",
                                                   "p_sat_si_sc": r"p_{sat}(\theta_{si}')"})
    margin = out.step("Delta_theta", "theta_si_sc - theta_dp", {"theta_si_sc": surface,
                                                              "theta_dp": dew},
                      theta_sc - dew_value, "K", temperature=DIFFERENCE,
                      label="Condensation margin at the inside surface",
                      source=SATURATION_PRESSURE_SOURCE, yields="condensation_margin",
                      symbols={"Delta_theta": r"\Delta\theta_{c}",
                               "theta_si_sc": r"\theta_{si}'"})
    phi_shown = out.step("varphi_si", "p_v / p_sat_si_sc", {"p_v": p_v, "p_sat_si_sc": p_sat_s},
                         phi_s, label="Relative humidity at the inside surface",
                         source=MOULD_SOURCE, yields="surface_relative_humidity",
                         symbols={"p_sat_si_sc": r"p_{sat}(\theta_{si}')"})
    out.note("Interstitial condensation (the ISO 13788 monthly method) is not part of this block: "
             "an interstitial_condensation block assesses it over the same layers.",
             "ISO 13788:2012")
    if margin.si < 0.0:
        out.warn("The inside surface ({surface}) is below the dew point of the inside air "
                 "({dew}): surface condensation is expected.", SATURATION_PRESSURE_SOURCE,
                 surface=surface, dew=dew)
    if phi_s >= MOULD_THRESHOLD:
        out.warn("Surface relative humidity {phi} reaches the {limit} criterion for mould "
                 "growth.", MOULD_SOURCE, phi=phi_shown,
                 limit=Value(MOULD_THRESHOLD, "1", "%", given=True))
    return {"theta": theta_sc, "dew_point": dew_value}


def _combined_condensation_steps(out, combined, R_si, R_se, R_c) -> Value:
    """The combined method again with R_si,sc in place of R_si: each section total and the lower
    limit shift by R_si,sc − R_si; the limits' mean is R_T,sc."""
    sections, fractions = combined["sections"], combined["fractions"]
    cm = combined_method(combined["rows"], [f.si for f in fractions], R_c.si, R_se.si)
    totals = []
    for m, R_T_m in enumerate(combined["totals"]):
        letter = _ABC[m]
        totals.append(out.step(f"R_T_sc_{letter}", f"R_T_{letter} - R_si + R_si_sc",
                               {f"R_T_{letter}": R_T_m, "R_si": R_si, "R_si_sc": R_c},
                               R_T_m.si - R_si.si + R_c.si, "m^2*K/W",
                               label=phrase("Section {m}, {what}", m=Value(letter),
                                            what=Value(sections[m]["what"])),
                               source=CONDENSATION_RSI_SOURCE, group=GROUP_CONDENSATION,
                               item=letter))
    parallel = " + ".join(f"f_{_ABC[m]} / R_T_sc_{_ABC[m]}" for m in range(len(sections)))
    operands = {**{f"f_{_ABC[m]}": f for m, f in enumerate(fractions)},
                **{f"R_T_sc_{_ABC[m]}": R for m, R in enumerate(totals)}}
    symbols = {"R_T_sc_upper": "R'_{T,sc}", "R_T_sc_lower": "R''_{T,sc}", "R_T_lower": "R''_{T}"}
    upper = out.step("R_T_sc_upper", f"1 / ({parallel})", operands, cm.R_upper, "m^2*K/W",
                     label="Upper limit with the condensation surface resistance",
                     source=CONDENSATION_RSI_SOURCE, symbols=symbols)
    lower = out.step("R_T_sc_lower", "R_T_lower - R_si + R_si_sc",
                     {"R_T_lower": combined["lower"], "R_si": R_si, "R_si_sc": R_c},
                     combined["lower"].si - R_si.si + R_c.si, "m^2*K/W",
                     label="Lower limit with the condensation surface resistance",
                     source=CONDENSATION_RSI_SOURCE, symbols=symbols)
    return out.step("R_T_sc", "(R_T_sc_upper + R_T_sc_lower) / 2",
                    {"R_T_sc_upper": upper, "R_T_sc_lower": lower}, cm.R_total, "m^2*K/W",
                    label="Total resistance with the condensation surface resistance (combined "
                          "method)", source=CONDENSATION_RSI_SOURCE, symbols=symbols)


def _saturation_step(out, T: float, suffix: str, label: str, given: bool = False,
                     symbols: dict | None = None) -> Value:
    """p_sat by ISO 13788 Annex E, over water at or above 0 °C and over ice below it, with the
    temperature's °C number as a dimensionless operand."""
    theta = T - zero_Celsius
    a, b = _OVER_WATER if theta >= 0.0 else _OVER_ICE
    name = f"theta_{suffix}"
    value = float(saturation_vapour_pressure(T))
    branch = " (over water, θ ≥ 0 °C; θ as its number in °C)" if theta >= 0.0 else \
        " (over ice, θ < 0 °C; θ as its number in °C)"
    return out.step(f"p_sat_{suffix}", f"p_0 * exp(a * {name} / (b + {name}))",
                    {"p_0": Value(_P_SAT_0, "Pa", given=True), "a": Value(a, given=True),
                     "b": Value(b, given=True), name: _celsius_number(T, given)},
                    value, "Pa", label=label + branch, source=SATURATION_PRESSURE_SOURCE,
                    symbols=symbols)


def _dew_point_steps(out, T_air: float, T_value: Value, phi: Value, suffix: str,
                     which: str, symbols: dict | None = None) -> tuple[Value, Value, float]:
    """The saturation pressure and vapour pressure of moist air and its dew point (the inverse
    of the same formula); return (p_v, dew point as an operand, dew point in K)."""
    p_sat = _saturation_step(out, T_air, suffix, f"Saturation vapour pressure of the {which} "
                             "air", given=T_value.given, symbols=symbols)
    dew = float(dew_point_temperature(T_air, phi.si))
    p_v = out.step("p_v", f"varphi_{suffix} * p_sat_{suffix}",
                   {f"varphi_{suffix}": phi, f"p_sat_{suffix}": p_sat}, phi.si * p_sat.si, "Pa",
                   label=f"Vapour pressure of the {which} air", source=SATURATION_PRESSURE_SOURCE,
                   symbols=symbols)
    over_water = p_v.si >= _P_SAT_0
    a, b = _OVER_WATER if over_water else _OVER_ICE
    dew_value = out.step(
        "theta_dp", "theta_0 + b * log(p_v / p_0) / (a - log(p_v / p_0))",
        {"theta_0": Value(zero_Celsius, "K", temperature=ABSOLUTE, given=True),
         "b": Value(b, "K", temperature=DIFFERENCE, given=True), "p_v": p_v,
         "p_0": Value(_P_SAT_0, "Pa", given=True), "a": Value(a, given=True)},
        dew, "K", temperature=ABSOLUTE,
        label=f"Dew point of the {which} air" + (" (inverse over water)" if over_water else
                                                 " (frost point, inverse over ice)"),
        source=SATURATION_PRESSURE_SOURCE, yields="dew_point")
    return p_v, dew_value, dew


# ----------------------------------------------------------------------------- wall figure


def _wall_figure(out, inp, layers, temperatures, surface) -> FigureData:
    """The temperature profile through the element, layers to scale, with the air on each side
    (the surface films drawn not to scale), the surface for condensation and the dew point."""
    edges = [0.0]
    for layer in inp.layers:
        edges.append(edges[-1] + layer["thickness"])
    total = edges[-1]
    film = 0.08 * total  # the air films are drawn outside the wall, not to scale
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    bands = []
    for k, (entry, x0, x1) in enumerate(zip(layers, edges[:-1], edges[1:])):
        wide = (x1 - x0) >= 0.045 * total
        label = entry["label"] + (f" + {entry['bridge']['name']}" if entry["bridge"] else "")
        # Plain layers alternate white and grey (no hatching under the words); a bridged layer
        # is cross-hatched, as it is not one material.
        bands.append(Band(x0, x1, label if wide else "", 5 if entry["bridge"] else 2 * (k % 2)))
    lines = [
        Line(tuple(edges), tuple(temperatures), "temperature through the element", 0, True),
        Line((-film, -0.4 * film, 0.0), (theta_i, theta_i, temperatures[0]),
             "air and surface film on each side (film not to scale)", 3),
        Line((total, total + 0.4 * film, total + film), (temperatures[-1], theta_e, theta_e),
             "", 3),
        Line((0.0,), (surface["theta"],), "inside surface with R_si,sc (for condensation)", 4,
             True),
    ]
    marks = []
    values = temperatures + [theta_i, theta_e, surface["theta"]]
    if surface["dew_point"] is not None:
        marks.append(Mark("y", surface["dew_point"], "dew point of the inside air", 1))
        values.append(surface["dew_point"])
    low, high = min(values), max(values)
    pad = 0.12 * max(high - low, 1.0)
    names, places = [], {}
    for k, (entry, layer) in enumerate(zip(layers, inp.layers), start=1):
        text = f"{{n{k}}} {{d{k}}}"
        places[f"n{k}"] = Value(entry["label"])
        places[f"d{k}"] = out.input(f"layers[{k - 1}].thickness")
        if entry["bridge"] is not None:
            text += f" with {{b{k}}} over {{f{k}}}"
            places[f"b{k}"] = Value(entry["bridge"]["name"])
            places[f"f{k}"] = entry["bridge"]["fraction"]
        names.append(text)
    places["ti"] = out.input("inside_temperature")
    places["te"] = out.input("outside_temperature")
    caption = ("Temperature profile through the element, inside on the left, inside air {ti}, "
               "outside air {te}. Layers from the inside, to scale: " + "; ".join(names) + ".")
    if surface["dew_point"] is not None:
        places["dew"] = out.value_of("dew_point")
        caption += " Dew point of the inside air {dew}."
    return FigureData(
        key=f"{out.block_key}-profile", caption=phrase(caption, **places),
        x=Axis("position from the inside surface", "m", "mm", (-film, total + film)),
        # room below the profile's lowest point for the legend
        y=Axis("temperature", "K", "degC", (low - 3.0 * pad, high + 1.5 * pad)),
        lines=tuple(lines), bands=tuple(bands), marks=tuple(marks),
        # the profile falls from the warm side: the corner below its start is clear
        legend="lower left" if theta_i >= theta_e else "upper left", size=(160.0, 85.0))


# ----------------------------------------------------------------------------- cylindrical


# The pipe's symbols as the textbooks write them: per-metre quantities primed, the ambient ∞.
_PIPE_SYMBOLS = {"T_a": r"T_{\infty}", "R": "R'", "q": "q'", "R_i": "R'_{i}",
                 "R_o": "R'_{o}", "Nu": r"\overline{Nu}_{D}", "Ra": "Ra_{D}",
                 "theta_a": r"\theta_{\infty}", "p_sat_a": r"p_{sat,\infty}",
                 "varphi_a": r"\varphi_{\infty}"}


def _pipe_compute(inp, out):
    T_i, T_a = inp.inside_temperature, inp.ambient_temperature
    h_i = inp.inside_coefficient
    thicknesses = [layer["thickness"] for layer in inp.layers]
    names = [_layer_name(layer, j) for j, layer in enumerate(inp.layers, start=1)]
    curves = layer_curves(inp.layers)
    conductivities, sources = [], []
    for j, (layer, curve) in enumerate(zip(inp.layers, curves)):
        if curve is None:
            k, material_source = layer_conductivity(out, layer, f"layers[{j}]")
        else:  # its mean over the layer's range, recorded once the range is known
            k, material_source = None, curve.source
        conductivities.append(k)
        sources.append(layer["source"] or material_source)
    # What the physics takes for each layer: a constant conductivity or a curve.
    specs = [k.si if curve is None else curve.physics for k, curve in zip(conductivities, curves)]

    still = solved = None
    if any(curves):
        solved = solve_with_curves(out, inp, specs, curves, names)
        flow = solved.flow
        if inp.surface_emissivity is not None:
            still = solved  # the same convection and radiation figures as pipe_in_still_air's
    elif inp.surface_emissivity is not None:
        still = pipe_in_still_air(inp.inner_diameter, thicknesses, specs, T_i, T_a,
                                  inp.surface_emissivity, h_i)
        flow = still.flow
    else:
        flow = cylindrical_layers(inp.inner_diameter, thicknesses, specs, T_i, T_a,
                                  inp.outside_coefficient, h_i)
    symbols = dict(_PIPE_SYMBOLS)
    T_i_value, T_a_value = out.input("inside_temperature"), out.input("ambient_temperature")

    # Diameters and the resistance of each layer per metre.
    resistances = {}
    if h_i is not None:
        D_0 = out.input("inner_diameter")
        h_in = out.input("inside_coefficient")
        resistances["R_i"] = out.step("R_i", "1 / (h_i * pi * D_0)", {"h_i": h_in, "D_0": D_0},
                                      float(cylinder_film_resistance(D_0.si, h_in.si)), "m*K/W",
                                      label="Inside film resistance per metre",
                                      source=RADIAL_SOURCE, symbols=symbols)
    else:
        out.note("No inside coefficient given: the inner surface is taken at the inside "
                 "temperature (the inside film resistance is neglected).")
    stated_surface = None
    if solved is not None:
        worked = curve_steps(out, inp, solved, curves, names, T_i_value, symbols)
        for j, mean in worked["means"].items():
            conductivities[j] = mean
        stated_surface = worked["faces"].get(len(curves), (None, None))[1]
    previous = out.input("inner_diameter")
    diameters = [previous]
    for j, (layer, k, source) in enumerate(zip(inp.layers, conductivities, sources), start=1):
        name = names[j - 1]
        D_j = out.step(f"D_{j}", f"D_{j - 1} + 2 * t_{j}",
                       {f"D_{j - 1}": previous, f"t_{j}": out.input(f"layers[{j - 1}].thickness")},
                       float(flow.diameters[j]), "m", display="mm", label=_layer_label(j, name),
                       group=GROUP_DIAMETERS, item=name,
                       yields="outer_diameter" if j == len(inp.layers) else None)
        symbols[f"R_{j}"] = f"R'_{{{j}}}"
        resistances[f"R_{j}"] = out.step(
            f"R_{j}", f"log(D_{j} / D_{j - 1}) / (2 * pi * k_{j})",
            {f"D_{j}": D_j, f"D_{j - 1}": previous, f"k_{j}": k},
            float(cylinder_layer_resistance(previous.si, D_j.si, k.si)), "m*K/W",
            label=_layer_label(j, name), source=source or RADIAL_SOURCE,
            group=GROUP_PIPE_LAYERS, item=name, symbols=symbols)
        previous = D_j
        diameters.append(D_j)
    D_n, n = diameters[-1], len(inp.layers)

    if still is not None:
        h_o = _still_air_steps(out, inp, still, D_n, n, T_a_value, symbols, stated_surface)
    else:
        h_o = out.input("outside_coefficient")
        out.result("h_outside", h_o.si)
    resistances["R_o"] = R_o = out.step(
        "R_o", f"1 / (h_o * pi * D_{n})", {"h_o": h_o, f"D_{n}": D_n},
        float(cylinder_film_resistance(D_n.si, flow.h_outside)), "m*K/W",
        label="Outside surface resistance per metre", source=RADIAL_SOURCE, symbols=symbols)

    R = out.step("R", " + ".join(resistances), resistances, flow.R_per_length,
                 label="Total resistance per metre, inside temperature to ambient",
                 source=RADIAL_SOURCE, yields="R_per_length", symbols=symbols)
    q = out.step("q", "(T_i - T_a) / R", {"T_i": T_i_value, "T_a": T_a_value, "R": R},
                 flow.q_per_length, label="Heat flow per metre, positive outward",
                 source=RADIAL_SOURCE, yields="q_per_length", symbols=symbols)
    out.step("Q", "q * L", {"q": q, "L": out.input("length")}, flow.q_per_length * inp.length,
             label="Heat flow over the length", yields="Q", symbols=symbols)
    theta_s = out.step("theta_s", "T_a + q * R_o", {"T_a": T_a_value, "q": q, "R_o": R_o},
                       T_a + flow.q_per_length * R_o.si, label="Outer surface temperature",
                       source=RADIAL_SOURCE, yields="theta_surface", symbols=symbols)
    if solved is not None:
        interface_check_steps(out, inp, names, resistances, q, T_i_value, symbols)
    if flow.q_per_length < 0:
        out.note("The heat flow is negative: the pipe gains heat from the ambient.")

    dew = None
    if inp.ambient_relative_humidity is not None:
        _, dew_value, dew = _dew_point_steps(out, T_a, T_a_value,
                                             out.input("ambient_relative_humidity"), "a",
                                             "ambient", symbols)
        margin = out.step("Delta_theta", "theta_s - theta_dp",
                          {"theta_s": theta_s, "theta_dp": dew_value}, theta_s.si - dew, "K",
                          temperature=DIFFERENCE, label="Condensation margin at the outer surface",
                          source=SATURATION_PRESSURE_SOURCE, yields="condensation_margin",
                          symbols={"Delta_theta": r"\Delta\theta_{c}"})
        if margin.si < 0:
            out.warn("The outer surface ({surface}) is below the dew point of the ambient air "
                     "({dew}): condensation on the insulation is expected.",
                     SATURATION_PRESSURE_SOURCE, surface=theta_s, dew=dew_value)
    if inp.size_layer is not None:
        sizing_steps(out, inp, specs, curves, names, diameters, conductivities, resistances,
                     T_i_value, T_a_value, h_o, symbols, CHURCHILL_CHU_SOURCE)
    out.figure(_pipe_figure(out, inp, flow, conductivities, dew, curves))


def _still_air_steps(out, inp, still, D_n: Value, n: int, T_a: Value, symbols: dict,
                     T_s: Value | None = None) -> Value:
    """The outside coefficient of a horizontal pipe in still air: the surface temperature by
    iteration (a statement, unless ``T_s`` was stated already with the layers' conductivity
    curves), then the film temperature, the air's properties, Ra, Nu (Churchill–Chu), h_c, h_r
    and their sum, each written out at the solved surface temperature."""
    convection, T_s_si = still.convection, still.flow.theta_surface
    D = f"D_{n}"
    out.note("Outside coefficient: natural convection from a long horizontal cylinder in still "
             "air (Churchill–Chu) plus radiation to surroundings at the ambient temperature.",
             CHURCHILL_CHU_SOURCE)
    if T_s is None:
        T_s = _surface_statement(out, T_s_si, T_a, symbols)
    # The film temperature and the table rows are shown in K, as the table is written.
    T_f = out.step("T_f", "(T_s + T_a) / 2", {"T_s": T_s, "T_a": T_a},
                   convection.film_temperature, "K", temperature=ABSOLUTE, display="K",
                   label="Film temperature", source=CHURCHILL_CHU_SOURCE, symbols=symbols)
    lower, upper = air_table_interval(convection.film_temperature)
    air = convection.air
    row_T = {"T_lo": Value(lower.temperature, "K", "K", ABSOLUTE, given=True),
             "T_hi": Value(upper.temperature, "K", "K", ABSOLUTE, given=True), "T_f": T_f}
    properties = {}
    for name, field, unit, item in (("k_air", "conductivity", "W/(m*K)", "conductivity"),
                                    ("nu", "kinematic_viscosity", "m^2/s", "kinematic viscosity"),
                                    ("alpha", "thermal_diffusivity", "m^2/s",
                                     "thermal diffusivity"),
                                    ("Pr", "prandtl", "1", "Prandtl number")):
        # A table look-up: a statement with the two rows it lies between.
        properties[name] = out.statement(
            name, "interpolated between {lo} at {T_lo} and {hi} at {T_hi}",
            getattr(air, field), unit,
            values={"lo": Value(getattr(lower, field), unit, given=True),
                    "hi": Value(getattr(upper, field), unit, given=True),
                    "T_lo": row_T["T_lo"], "T_hi": row_T["T_hi"]},
            label="Air at the film temperature, " + item, source=AIR_TABLE_SOURCE,
            group=GROUP_AIR, item=item)
    Ra = out.step("Ra", f"g * (1 / T_f) * abs(T_s - T_a) * {D} ** 3 / (nu * alpha)",
                  {"g": Value(STANDARD_GRAVITY, "m/s^2", given=True), "T_f": T_f, "T_s": T_s,
                   "T_a": T_a, D: D_n, "nu": properties["nu"],
                   "alpha": properties["alpha"]},
                  convection.rayleigh,
                  label="Rayleigh number on the outer diameter, β = 1/T_f (ideal gas); "
                        "Churchill–Chu holds up to 10¹²",
                  source=CHURCHILL_CHU_SOURCE, symbols=symbols)
    Nu = out.step("Nu", "(0.6 + 0.387 * Ra ** (1 / 6) / (1 + (0.559 / Pr) ** (9 / 16)) ** "
                        "(8 / 27)) ** 2", {"Ra": Ra, "Pr": properties["Pr"]},
                  convection.nusselt, label="Mean Nusselt number, Churchill–Chu",
                  source=CHURCHILL_CHU_SOURCE, symbols=symbols)
    h_c = out.step("h_c", f"Nu * k_air / {D}", {"Nu": Nu, "k_air": properties["k_air"], D: D_n},
                   convection.h, "W/(m^2*K)", label="Natural convection coefficient",
                   source=CHURCHILL_CHU_SOURCE, symbols=symbols)
    h_r = out.step("h_r", "varepsilon * sigma * (T_s ** 2 + T_a ** 2) * (T_s + T_a)",
                   {"varepsilon": out.input("surface_emissivity"), "T_s": T_s, "T_a": T_a},
                   still.h_radiation, "W/(m^2*K)",
                   label="Radiation coefficient to surroundings at the ambient temperature",
                   source=STEFAN_BOLTZMANN_SOURCE, symbols=symbols)
    return out.step("h_o", "h_c + h_r", {"h_c": h_c, "h_r": h_r}, still.flow.h_outside,
                    label="Outside surface coefficient", yields="h_outside")


def _surface_statement(out, T_s_si: float, T_a: Value, symbols: dict) -> Value:
    """The outer surface temperature of a pipe in still air, found by iteration."""
    return out.statement(
        "T_s", "the outer surface temperature at which the heat conducted through the layers "
        "equals the heat leaving the surface by convection and radiation (h_o = h_c + h_r "
        "below, each evaluated at T_s), found by iteration between the ambient temperature "
        "{T_a} and the inside temperature {T_i} to within {tol}",
        T_s_si, "K", temperature=ABSOLUTE,
        values={"T_a": T_a, "T_i": out.input("inside_temperature"),
                "tol": Value(_BRENT_TOLERANCE, "K", temperature=DIFFERENCE, given=True)},
        label="Outer surface temperature (iteration)", source=BRENT_SOURCE, symbols=symbols)


def _pipe_figure(out, inp, flow, conductivities, dew, curves) -> FigureData:
    """The temperature through the layers against radius: within layer j it falls with ln r
    (Fourier's law in a cylinder), T(r) = T_(j-1) − q' ln(r/r_(j-1)) / (2π k_j); within a
    layer with a conductivity curve, Φ(T) = ∫λ dT falls with ln r instead (Kirchhoff)."""
    radii = [float(d) / 2 for d in flow.diameters]
    temperatures = [float(t) for t in flow.interface_temperatures]
    q = flow.q_per_length
    span = radii[-1] - radii[0]
    bands, xs, ys = [], [], []
    for j, (layer, k, curve) in enumerate(zip(inp.layers, conductivities, curves), start=1):
        r = np.geomspace(radii[j - 1], radii[j], 24)
        xs.extend(r.tolist())
        if curve is None:
            ys.extend((temperatures[j - 1] - q * np.log(r / r[0]) / (2 * math.pi * k.si))
                      .tolist())
        else:
            ys.extend(curve_profile(curve, r[0], temperatures[j - 1], q, r.tolist()))
        wide = radii[j] - radii[j - 1] >= 0.08 * span
        bands.append(Band(radii[j - 1], radii[j], _layer_name(layer, j) if wide else "",
                          2 * (j % 2)))
    marks = [Mark("y", inp.ambient_temperature, "ambient air", 1),
             Mark("y", inp.inside_temperature, "fluid inside", 3)]
    places = {"r0": Value(radii[0], "m", "mm"), "rn": Value(radii[-1], "m", "mm"),
              "ts": out.value_of("theta_surface"), "ta": out.input("ambient_temperature")}
    shape = "logarithmic within each layer (Fourier's law in a cylinder" + (
        "; in a layer with a conductivity curve, ∫λ dT is)" if any(curves) else ")")
    caption = ("Temperature through the pipe's layers against the radius from its axis (bore "
               "radius {r0}, outer radius {rn}), " + shape + "; the surface film lies between "
               "the outer surface at {ts} and the ambient air at {ta}.")
    if dew is not None:
        marks.append(Mark("y", dew, "dew point of the ambient air", 2))
        places["dew"] = out.value_of("dew_point")
        caption += " Dew point of the ambient air {dew}."
    return FigureData(
        key=f"{out.block_key}-radial", caption=phrase(caption, **places),
        x=Axis("radius from the pipe axis", "m", "mm"), y=Axis("temperature", "K", "degC"),
        lines=(Line(tuple(xs), tuple(ys)),), bands=tuple(bands), marks=tuple(marks),
        legend=None, size=(160.0, 70.0))


# ----------------------------------------------------------------------------- kinds

LAYERED_WALL = Kind(
    name="layered_wall",
    title="Plane element, steady conduction",
    summary="U-value, heat flux and temperatures of a plane multi-layer element (ISO 6946), "
            "with surface humidity, dew point and mould criterion (ISO 13788).",
    inputs=(
        Items("layers", "layers from the inside outward", fields=WALL_LAYER_FIELDS,
              exactly_one=(("conductivity", "resistance", "material"),), min_items=1),
        Quantity("inside_temperature", "inside air temperature", unit="K",
                 temperature=ABSOLUTE, greater_than=0.0),
        Quantity("outside_temperature", "outside air temperature", unit="K",
                 temperature=ABSOLUTE, greater_than=0.0),
        *plane_surface_inputs("inside surface resistance R_si for U"),
        Quantity("area", "area of the element", default=None, unit="m^2", greater_than=0.0),
        Quantity("inside_relative_humidity", "relative humidity of the inside air",
                 default=None, unit="1", percent=True, greater_than=0.0, at_most=1.0),
        Quantity("condensation_surface_resistance",
                 "inside surface resistance for surface humidity and mould (never for U)",
                 default="0.25 m^2*K/W", source=CONDENSATION_RSI_SOURCE, unit="m^2*K/W",
                 at_least=0.0),
    ),
    results=(
        ResultSpec("R_total", "m^2*K/W", "total thermal resistance R_T, surfaces included"),
        ResultSpec("U", "W/(m^2*K)", "thermal transmittance"),
        ResultSpec("q", "W/m^2", "heat flux, positive inside to outside"),
        ResultSpec("Q", "W", "heat flow through the area"),
        ResultSpec("theta_si", "K", "inside surface temperature (with R_si for U)",
                   temperature=ABSOLUTE),
        ResultSpec("theta_se", "K", "outside surface temperature", temperature=ABSOLUTE),
        ResultSpec("interface_temperatures", "K",
                   "temperatures from the inside surface to the outside surface",
                   temperature=ABSOLUTE, list=True),
        ResultSpec("R_upper", "m^2*K/W", "upper limit R'_T of the combined method"),
        ResultSpec("R_lower", "m^2*K/W", "lower limit R''_T of the combined method"),
        ResultSpec("f_Rsi", "1", "temperature factor at the inside surface (R_si,sc)"),
        ResultSpec("dew_point", "K", "dew point of the inside air", temperature=ABSOLUTE),
        ResultSpec("condensation_margin", "K",
                   "inside surface temperature (R_si,sc) minus dew point",
                   temperature=DIFFERENCE),
        ResultSpec("surface_relative_humidity", "1",
                   "relative humidity at the inside surface (R_si,sc)", display="%"),
    ),
    compute=_wall_compute,
    caution=WALL_CAUTION,
    # Physics parameter names → inputs. layer_resistances is refused only by the combined
    # method's R'_T/R''_T limit, for the bridged layer it names; the saturation pressure is
    # taken first at the inside air (temperature, air_temperature, relative_humidity), then at
    # the inside surface, which leaves the range only through the outside temperature.
    input_names={"layer_resistances": "layers[{index}].bridge",
                 "temperature": "inside_temperature",
                 "air_temperature": "inside_temperature",
                 "relative_humidity": "inside_relative_humidity",
                 "surface_temperature": "outside_temperature",
                 "R_si": "inside_surface_resistance",
                 "R_se": "outside_surface_resistance"},
    references=("ISO 6946:2017", "ISO 13788:2012"),
)

CYLINDRICAL_LAYERS = Kind(
    name="cylindrical_layers",
    title="Cylindrical layers, steady radial conduction",
    summary="Heat flow and surface temperature of an insulated pipe or duct; the outside "
            "coefficient given, or computed for a horizontal pipe in still air "
            "(Churchill–Chu and radiation); conductivity curves averaged over each layer "
            "(EN ISO 12241); the thickness of one layer for a heat-flow or surface-temperature "
            "target.",
    inputs=(
        Quantity("inner_diameter", "inner diameter of the first layer", unit="m",
                 greater_than=0.0, display="mm"),
        Items("layers", "layers from the inside outward", fields=PIPE_LAYER_FIELDS,
              exactly_one=(("conductivity", "conductivity_curve", "material"),), min_items=1),
        Quantity("length", "length of pipe", default="1 m", unit="m", greater_than=0.0),
        Quantity("inside_temperature", "temperature of the fluid inside", unit="K",
                 temperature=ABSOLUTE, greater_than=0.0),
        Quantity("ambient_temperature", "temperature of the surrounding air and surfaces",
                 unit="K", temperature=ABSOLUTE, greater_than=0.0),
        Quantity("inside_coefficient", "inside surface coefficient (omitted: no inside film)",
                 default=None, unit="W/(m^2*K)", greater_than=0.0),
        Quantity("outside_coefficient", "outside surface coefficient, convection and radiation",
                 default=REQUIRED, unit="W/(m^2*K)", greater_than=0.0),
        Quantity("surface_emissivity", "emissivity of the outer surface (then the outside "
                 "coefficient is computed for still air)", default=REQUIRED, unit="1",
                 greater_than=0.0, at_most=1.0),
        Quantity("ambient_relative_humidity", "relative humidity of the ambient air (for the "
                 "condensation margin of a cold pipe)", default=None, unit="1", percent=True,
                 greater_than=0.0, at_most=1.0),
        Record("size_layer", "find the smallest thickness of one layer that meets a maximum "
               "heat flow per metre or a maximum surface temperature", default=None,
               fields=SIZE_LAYER_FIELDS,
               exactly_one=(("max_q_per_length", "max_surface_temperature"),)),
    ),
    results=(
        ResultSpec("outer_diameter", "m", "outer diameter of the last layer", display="mm"),
        ResultSpec("R_per_length", "m*K/W", "total resistance per metre, films included"),
        ResultSpec("q_per_length", "W/m", "heat flow per metre, positive outward"),
        ResultSpec("Q", "W", "heat flow over the length"),
        ResultSpec("theta_surface", "K", "outer surface temperature", temperature=ABSOLUTE),
        ResultSpec("h_outside", "W/(m^2*K)", "outside surface coefficient"),
        ResultSpec("dew_point", "K", "dew point of the ambient air", temperature=ABSOLUTE),
        ResultSpec("condensation_margin", "K", "outer surface temperature minus dew point",
                   temperature=DIFFERENCE),
        ResultSpec("required_thickness", "m", "smallest thickness of the layer named in "
                   "size_layer that meets its target, all else as given", display="mm"),
    ),
    compute=_pipe_compute,
    exactly_one=(("outside_coefficient", "surface_emissivity"),),
    caution=PIPE_CAUTION,
    # Physics parameter names → inputs (inner_diameter, inside_temperature,
    # ambient_temperature, inside_coefficient and outside_coefficient are named alike).
    # emissivity: the still-air coefficient it asks for is outside Churchill–Chu's Ra_D range.
    # A layer temperature outside its conductivity curve is located by the kind itself.
    input_names={"thicknesses": "layers[{index}].thickness",
                 "conductivities": "layers[{index}].conductivity",
                 "emissivity": "surface_emissivity",
                 "temperature": "ambient_temperature",
                 "air_temperature": "ambient_temperature",
                 "relative_humidity": "ambient_relative_humidity",
                 "max_q_per_length": "size_layer.max_q_per_length",
                 "max_surface_temperature": "size_layer.max_surface_temperature"},
    references=("Churchill and Chu (1975)",),
)

KINDS = (LAYERED_WALL, CYLINDRICAL_LAYERS)
