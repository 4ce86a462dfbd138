"""Steady conduction kinds: ``layered_wall`` (plane elements, ISO 6946 and ISO 13788) and
``cylindrical_layers`` (pipe and duct insulation).

The physics is in :mod:`calcdoc.physics.conduction`; this module declares the inputs, turns the
SI floats into steps a checker can follow by hand (each formula with its numbers substituted),
records the notes that cite the clause behind every default applied, the warnings, and the data
of the temperature-profile figure, which :func:`wall_figures` draws.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from scipy.constants import zero_Celsius

from calcdoc.kinds.base import (ABSOLUTE, DIFFERENCE, REQUIRED, Choice, Figure, InputRecord,
                                Items, Kind, MaterialField, Quantity, Record, ResultSpec, Text,
                                _Invalid)
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.air import AIR_TABLE_SOURCE
from calcdoc.physics.conduction import (CHURCHILL_CHU_SOURCE, COMBINED_METHOD_SOURCE,
                                        SATURATION_PRESSURE_SOURCE, SURFACE_RESISTANCE_SOURCE,
                                        combined_method, cylinder_film_resistance,
                                        cylinder_layer_resistance, cylindrical_layers,
                                        dew_point_temperature, layer_resistance,
                                        pipe_in_still_air, plane_element,
                                        saturation_vapour_pressure, surface_relative_humidity,
                                        surface_resistances, temperature_factor)
from calcdoc.units import convert
from calcdoc.render.numbers import format_number, format_quantity, latex_number, latex_unit, pretty_unit

__all__ = ["KINDS", "LAYERED_WALL", "CYLINDRICAL_LAYERS", "wall_figures"]

ZERO_CELSIUS = zero_Celsius  # 273.15 K (scipy.constants)

SERIES_SOURCE = "ISO 6946:2017, 6.7.1, homogeneous layers in series (subclause number from memory)"
CONDENSATION_RSI_SOURCE = ("ISO 13788:2012, internal surface resistance 0.25 m²·K/W of opaque "
                           "elements for surface humidity and mould (value from memory; clause "
                           "not checked against the printed standard)")
TEMPERATURE_FACTOR_SOURCE = "ISO 13788:2012, temperature factor at the internal surface f_Rsi"
MOULD_SOURCE = ("ISO 13788:2012, critical surface relative humidity of 80 % for mould growth "
                "(from memory)")
CORRECTIONS_SOURCE = "ISO 6946:2017, Annex F (corrections to U; from memory)"
STEFAN_BOLTZMANN_SOURCE = "Stefan–Boltzmann law, σ from scipy.constants (CODATA)"
RADIAL_SOURCE = "Fourier's law, radial conduction through coaxial cylindrical layers"

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
            raise _Invalid  # heat_flow's own error is recorded where it is converted
        inside, outside = surface_resistances(heat_flow)
        value = inside if self.side == "inside" else outside
        written = f"{value} m^2*K/W"
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written=written, si=value, si_unit=self.unit,
            display=format_quantity(value, self.unit, None, ctx.precision),
            source=f"{SURFACE_RESISTANCE_SOURCE}, heat flow {heat_flow}", origin="default",
            loc=parent.loc))
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
            raise _Invalid
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
    ConductingMaterial("material", "material from the library", default=REQUIRED),
    Text("source", "where the layer's data come from", default=""),
)


# ----------------------------------------------------------------------------- formatting


def _num(value: float) -> str:
    """A number as given by the user: up to six significant figures, no padding zeros."""
    text = f"{value:.6g}"
    if "e" in text:
        mantissa, power = text.split("e")
        return rf"{mantissa} \times 10^{{{int(power)}}}"
    return text


def _given(value_si: float, si_unit: str, display_unit: str | None = None) -> str:
    """LaTeX of an input value in the unit it is shown in, without rounding it away."""
    unit = display_unit or si_unit
    value = convert(value_si, si_unit, unit)
    lu = latex_unit(unit)
    text = _num(value)
    return f"{text}\\,{lu}" if lu else text


def _given_text(value_si: float, si_unit: str, display_unit: str | None = None) -> str:
    """Plain text of an input value, e.g. '0.13 m²·K/W'."""
    unit = display_unit or si_unit
    text = f"{convert(value_si, si_unit, unit):.6g}".replace("-", "−")
    shown = pretty_unit(unit)
    return f"{text} {shown}" if shown else text


def _p(latex: str, value: float) -> str:
    """Parenthesise a negative value inside a formula."""
    return rf"\left({latex}\right)" if value < 0 else latex


def _celsius(theta_k: float) -> float:
    return theta_k - ZERO_CELSIUS


def _layer_label(layer, j: int) -> str:
    return layer["name"] or f"layer {j}"


def _conductivity(record) -> tuple[float, str]:
    """(conductivity, source) of a layer or bridge given by value or by material."""
    if record.get("material") is not None:
        material = record["material"]
        return material["conductivity"], material.get("source", "")
    return record["conductivity"], ""


def _material_path(record, path: str) -> str:
    return f"{path}.material" if record.get("material") is not None else f"{path}.conductivity"


# ----------------------------------------------------------------------------- layered_wall


def _wall_compute(inp, out):
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    R_si, R_se = float(inp.inside_surface_resistance), float(inp.outside_surface_resistance)
    _surface_resistance_notes(inp, out, R_si, R_se)

    # Each layer's resistance, and the bridged layers' second material.
    layers = []
    for j, layer in enumerate(inp.layers, start=1):
        layers.append(_layer_step(out, layer, j))

    bridged = [entry for entry in layers if entry["bridge"] is not None]
    if bridged:
        R_total, layer_R, sections = _combined(out, layers, bridged, R_si, R_se)
    else:
        layer_R = [entry["R"] for entry in layers]
        R_total = R_si + sum(layer_R) + R_se
        out.step("R_{T}", r"R_{si} + \sum_{j} R_{j} + R_{se}",
                 " + ".join([_given(R_si, "m^2*K/W")]
                            + [out.q(r, "m^2*K/W") for r in layer_R]
                            + [_given(R_se, "m^2*K/W")]),
                 R_total, "m^2*K/W", label="Total thermal resistance", source=SERIES_SOURCE)
        sections = None
    out.result("R_total", R_total)

    U = 1.0 / R_total
    out.step("U", r"\frac{1}{R_{T}}", rf"\frac{{1}}{{{out.q(R_total, 'm^2*K/W')}}}", U,
             "W/(m^2*K)", label="Thermal transmittance", source=SERIES_SOURCE)
    out.result("U", U)
    out.note("Corrections to U for air gaps in the insulation, mechanical fasteners crossing it "
             "and inverted roofs are not applied.", CORRECTIONS_SOURCE)

    wall = plane_element(layer_R, theta_i, theta_e, R_si, R_se)
    q = wall.q
    dT = theta_i - theta_e
    ti, te = _given(theta_i, "K", "degC"), _given(theta_e, "K", "degC")
    out.step("q", r"\frac{\theta_{i} - \theta_{e}}{R_{T}}",
             rf"\frac{{{ti} - {_p(te, _celsius(theta_e))}}}{{{out.q(R_total, 'm^2*K/W')}}}",
             q, "W/m^2", label="Heat flux, positive inside to outside", source=SERIES_SOURCE)
    out.result("q", q)
    if inp.area is not None:
        Q = q * inp.area
        out.step("Q", "q A", rf"{out.q(q, 'W/m^2')} \cdot {_given(inp.area, 'm^2')}", Q, "W",
                 label="Heat flow through the area")
        out.result("Q", Q)

    temperatures = [float(t) for t in wall.interface_temperatures]
    _temperature_steps(out, temperatures, layers, layer_R, q, theta_i, theta_e, R_si, R_se,
                       bridged=bool(bridged))
    out.result("theta_si", temperatures[0])
    out.result("theta_se", temperatures[-1])
    out.result("interface_temperatures", temperatures)

    surface = _condensation(inp, out, layers, sections, R_total, R_si, R_se)

    if theta_i < theta_e and inp.inside_relative_humidity is not None:
        out.warn("The inside is colder than the outside: the condensation figures are for the "
                 "inside surface only. Write the element from its warm, humid side to assess "
                 "that side.")

    out.figure_data["profile"] = {
        "names": [_layer_label(layer, j) for j, layer in enumerate(inp.layers, start=1)],
        "thicknesses_mm": [layer["thickness"] * 1000.0 for layer in inp.layers],
        "bridges": [None if e["bridge"] is None else
                    {"name": e["bridge"]["name"], "fraction": e["bridge"]["fraction"]}
                    for e in layers],
        "temperatures_degC": [_celsius(t) for t in temperatures],
        "inside_degC": _celsius(theta_i),
        "outside_degC": _celsius(theta_e),
        "R_si": R_si,
        "R_se": R_se,
        "condensation_R_si": inp.condensation_surface_resistance,
        "condensation_surface_degC": None if surface is None else _celsius(surface["theta"]),
        "dew_point_degC": None if surface is None or surface["dew_point"] is None
        else _celsius(surface["dew_point"]),
    }


def _surface_resistance_notes(inp, out, R_si, R_se):
    table_si, table_se = surface_resistances(inp.heat_flow)
    for side, value, table, symbol in (("inside", R_si, table_si, "R_si"),
                                       ("outside", R_se, table_se, "R_se")):
        name = f"{side}_surface_resistance"
        shown = _given_text(value, "m^2*K/W")
        if isinstance(getattr(inp, name), _TableValue):
            out.note(f"{symbol} = {shown}: the conventional value for {inp.heat_flow} heat flow "
                     f"({name} not given).", SURFACE_RESISTANCE_SOURCE)
        elif abs(value - table) > 1e-12:
            out.note(f"{symbol} = {shown} as given, in place of the conventional "
                     f"{_given_text(table, 'm^2*K/W')} for {inp.heat_flow} heat flow.",
                     SURFACE_RESISTANCE_SOURCE)


def _layer_step(out, layer, j: int) -> dict:
    d = layer["thickness"]
    label = f"Layer {j}, {_layer_label(layer, j)}"
    entry = {"R": None, "bridge": None, "index": j - 1, "label": label}
    if layer["resistance"] is not None:
        entry["R"] = layer["resistance"]
        out.note(f"{label}: thermal resistance R_{j} = "
                 f"{_given_text(entry['R'], 'm^2*K/W')} as given (thickness "
                 f"{_given_text(d, 'm', 'mm')} used for the drawing only).",
                 layer["source"])
    else:
        lam, material_source = _conductivity(layer)
        entry["R"] = float(layer_resistance(d, lam))
        out.step(f"R_{{{j}}}", rf"\frac{{d_{{{j}}}}}{{\lambda_{{{j}}}}}",
                 rf"\frac{{{_given(d, 'm')}}}{{{_given(lam, 'W/(m*K)')}}}", entry["R"],
                 "m^2*K/W", label=label, source=layer["source"] or material_source)
    bridge = layer["bridge"]
    if bridge is not None:
        lam_b, material_source = _conductivity(bridge)
        R_b = float(layer_resistance(d, lam_b))
        name = bridge["name"] or "bridge"
        out.step(rf"R_{{{j},b}}", rf"\frac{{d_{{{j}}}}}{{\lambda_{{{j},b}}}}",
                 rf"\frac{{{_given(d, 'm')}}}{{{_given(lam_b, 'W/(m*K)')}}}", R_b, "m^2*K/W",
                 label=f"{label}, bridged part ({name}, "
                       f"{format_quantity(bridge['fraction'], '1', '%', 3)} of the area)",
                 source=bridge["source"] or material_source)
        entry["bridge"] = {"R": R_b, "fraction": bridge["fraction"], "name": name,
                           "path": _material_path(bridge, f"layers[{j - 1}].bridge")}
    return entry


def _sections(bridged: list[dict]) -> list[tuple[float, list[bool]]]:
    """Return the sections of the combined method as (fraction, bridged flag per bridged layer).

    With the bridges assumed aligned (each narrower bridge lies within every wider one), the
    section boundaries are the distinct bridge fractions: the clear section first, then sections
    crossing more and more bridges."""
    edges = sorted({b["bridge"]["fraction"] for b in bridged})
    bounds = [0.0] + edges + [1.0]
    sections = []
    for lo, hi in zip(bounds[:-1], bounds[1:]):
        if hi - lo <= 0.0:
            continue
        flags = [b["bridge"]["fraction"] >= hi - 1e-15 for b in bridged]
        sections.append((hi - lo, flags))
    sections.reverse()  # clear section first
    return sections


def _section_rows(layers, bridged, sections):
    """The per-layer, per-section resistances for combined_method."""
    rows = []
    for entry in layers:
        if entry["bridge"] is None:
            rows.append(entry["R"])
        else:
            k = bridged.index(entry)
            rows.append([entry["bridge"]["R"] if flags[k] else entry["R"]
                         for _, flags in sections])
    return rows


def _run_combined(rows, fractions, R_si, R_se, bridged):
    try:
        return combined_method(rows, fractions, R_si, R_se)
    except PhysicsRangeError as exc:
        if exc.quantity != "R_upper/R_lower":
            raise
        # Locate the refusal at the bridge that does the most bridging.
        worst = max(bridged, key=lambda e: e["bridge"]["fraction"]
                    * (1.0 - e["bridge"]["R"] / e["R"]))
        raise PhysicsRangeError(
            worst["bridge"]["path"], f"R'_T/R''_T = {format_number(exc.value, 3)}",
            "R'_T/R''_T <= 1.5 for the combined method (ISO 6946:2017 6.7.2); a bridge this "
            "conductive needs a numerical calculation to ISO 10211") from None


def _combined(out, layers, bridged, R_si, R_se):
    sections = _sections(bridged)
    names = "abcdefghijklmnopqrstuvwxyz"
    fractions = [f for f, _ in sections]
    rows = _section_rows(layers, bridged, sections)
    cm = _run_combined(rows, fractions, R_si, R_se, bridged)

    aligned = len(bridged) > 1
    out.note("Bridged layers: the combined method of ISO 6946:2017 (upper limit R'_T with "
             "parallel heat flow through each section, lower limit R''_T with isothermal planes "
             "in each layer; R_T their mean).", COMBINED_METHOD_SOURCE)
    if aligned:
        text = ("Several layers are bridged: the bridges are assumed aligned (each narrower "
                "bridge lies within the wider ones), which defines "
                f"{len(sections)} sections of fractions "
                + ", ".join(format_quantity(f, '1', '%', 3) for f in fractions) + ".")
        if all(e["bridge"]["R"] <= e["R"] for e in bridged):
            text += (" With every bridge conducting better than its layer, this gives the lowest "
                     "upper limit of all arrangements of the same fractions (conservative for "
                     "U).")
        else:
            text += " Another arrangement of the bridges gives a different upper limit."
        out.note(text, COMBINED_METHOD_SOURCE)

    section_totals = []
    for m, (f, flags) in enumerate(sections):
        name = names[m]
        terms = [_given(R_si, "m^2*K/W")]
        for entry, row in zip(layers, rows):
            value = row if not isinstance(row, list) else row[m]
            terms.append(out.q(value, "m^2*K/W"))
        terms.append(_given(R_se, "m^2*K/W"))
        total = R_si + sum(r if not isinstance(r, list) else r[m] for r in rows) + R_se
        section_totals.append(total)
        crossed = [e["bridge"]["name"] for e, flag in zip(bridged, flags) if flag]
        what = "clear of bridges" if not crossed else "through " + ", ".join(crossed)
        out.step(rf"R_{{T{name}}}", rf"R_{{si}} + \sum_{{j}} R_{{{name}j}} + R_{{se}}",
                 " + ".join(terms), total, "m^2*K/W",
                 label=f"Section {name} ({what}), f_{name} = "
                       f"{format_quantity(f, '1', '%', 3)}",
                 source=COMBINED_METHOD_SOURCE)
    sum_terms = " + ".join(rf"\frac{{{_num(f)}}}{{{out.q(R, 'm^2*K/W')}}}"
                           for f, R in zip(fractions, section_totals))
    out.step(r"R'_{T}", r"\frac{1}{\sum_{m} f_{m}/R_{Tm}}",
             rf"\frac{{1}}{{{sum_terms}}}", cm.R_upper, "m^2*K/W",
             label="Upper limit of the total thermal resistance", source=COMBINED_METHOD_SOURCE)

    lower = []
    for entry, row in zip(layers, rows):
        if not isinstance(row, list):
            lower.append(out.q(row, "m^2*K/W"))
            continue
        j = entry["index"] + 1
        R_j = 1.0 / sum(f / r for f, r in zip(fractions, row))
        terms = " + ".join(rf"\frac{{{_num(f)}}}{{{out.q(r, 'm^2*K/W')}}}"
                           for f, r in zip(fractions, row))
        out.step(rf"R''_{{{j}}}", r"\frac{1}{\sum_{m} f_{m}/R_{mj}}",
                 rf"\frac{{1}}{{{terms}}}", R_j, "m^2*K/W",
                 label=f"{entry['label']}, equivalent resistance for the lower limit",
                 source=COMBINED_METHOD_SOURCE)
        lower.append(out.q(R_j, "m^2*K/W"))
    out.step(r"R''_{T}", r"R_{si} + \sum_{j} R''_{j} + R_{se}",
             " + ".join([_given(R_si, "m^2*K/W")] + lower + [_given(R_se, "m^2*K/W")]),
             cm.R_lower, "m^2*K/W", label="Lower limit of the total thermal resistance",
             source=COMBINED_METHOD_SOURCE)
    out.step("R_{T}", r"\frac{R'_{T} + R''_{T}}{2}",
             rf"\frac{{{out.q(cm.R_upper, 'm^2*K/W')} + {out.q(cm.R_lower, 'm^2*K/W')}}}{{2}}",
             cm.R_total, "m^2*K/W", label="Total thermal resistance (combined method)",
             source=COMBINED_METHOD_SOURCE)
    out.step("e", r"\frac{R'_{T} - R''_{T}}{2 R_{T}}",
             rf"\frac{{{out.q(cm.R_upper, 'm^2*K/W')} - {out.q(cm.R_lower, 'm^2*K/W')}}}"
             rf"{{2 \cdot {out.q(cm.R_total, 'm^2*K/W')}}}",
             cm.relative_error, "1", label="Maximum relative error of R_T",
             source=COMBINED_METHOD_SOURCE, display_unit="%")
    out.result("R_upper", cm.R_upper)
    out.result("R_lower", cm.R_lower)
    out.note("Temperatures through the bridged element are area means: each layer takes its "
             "lower-limit resistance R''_j scaled so that the layers and surfaces sum to R_T "
             "(ISO 6946 defines no layer temperatures for an inhomogeneous element).",
             COMBINED_METHOD_SOURCE)
    return cm.R_total, [float(r) for r in cm.layer_resistances], (sections, rows, fractions,
                                                                   bridged)


def _temperature_steps(out, temperatures, layers, layer_R, q, theta_i, theta_e, R_si, R_se,
                       bridged: bool):
    qq = out.q(q, "W/m^2")
    out.step(r"\theta_{si}", r"\theta_{i} - q R_{si}",
             rf"{_given(theta_i, 'K', 'degC')} - {_p(qq, q)} \cdot {_given(R_si, 'm^2*K/W')}",
             temperatures[0], "K", label="Inside surface temperature", display_unit="degC",
             source=SERIES_SOURCE)
    symbol = "R''^{*}" if bridged else "R"
    for k, (entry, R) in enumerate(zip(layers, layer_R), start=1):
        previous = temperatures[k - 1]
        prev = out.q(previous, "K", "degC")
        out.step(rf"\theta_{{{k}}}", rf"\theta_{{{k - 1}}} - q {symbol}_{{{k}}}",
                 rf"{prev} - {_p(qq, q)} \cdot {out.q(R, 'm^2*K/W')}", temperatures[k], "K",
                 label=f"Temperature on the outer face of {entry['label'].lower()}",
                 display_unit="degC", source=SERIES_SOURCE)
    out.step(r"\theta_{se}", r"\theta_{e} + q R_{se}",
             rf"{_p(_given(theta_e, 'K', 'degC'), _celsius(theta_e))} + {_p(qq, q)} \cdot "
             rf"{_given(R_se, 'm^2*K/W')}",
             theta_e + q * R_se, "K", label="Outside surface temperature", display_unit="degC",
             source=SERIES_SOURCE)


def _condensation(inp, out, layers, sections, R_total, R_si, R_se):
    """f_Rsi with the condensation surface resistance, and the humidity figures when given."""
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    R_c = inp.condensation_surface_resistance
    out.note(f"Surface humidity and mould figures use R_si = {_given_text(R_c, 'm^2*K/W')} at the "
             "inside surface, never U.", CONDENSATION_RSI_SOURCE)
    if sections is None:
        R_Tc = R_total - R_si + R_c
        out.step("R_{T,c}", r"R_{T} - R_{si} + R_{si,c}",
                 rf"{out.q(R_total, 'm^2*K/W')} - {_given(R_si, 'm^2*K/W')} + "
                 rf"{_given(R_c, 'm^2*K/W')}", R_Tc, "m^2*K/W",
                 label="Total resistance with the condensation surface resistance",
                 source=CONDENSATION_RSI_SOURCE)
    else:
        section_list, rows, fractions, bridged = sections
        cm = _run_combined(rows, fractions, R_c, R_se, bridged)
        R_Tc = cm.R_total
        out.step("R_{T,c}", r"\frac{R'_{T,c} + R''_{T,c}}{2}",
                 rf"\frac{{{out.q(cm.R_upper, 'm^2*K/W')} + {out.q(cm.R_lower, 'm^2*K/W')}}}"
                 "{2}", R_Tc, "m^2*K/W",
                 label="Total resistance with the condensation surface resistance (combined "
                       "method repeated with R_si,c)", source=CONDENSATION_RSI_SOURCE)
    dT = theta_i - theta_e
    theta_sc = theta_i - dT * R_c / R_Tc
    ti, te = _given(theta_i, "K", "degC"), _given(theta_e, "K", "degC")
    out.step(r"\theta_{si}^{\prime}", r"\theta_{i} - (\theta_{i} - \theta_{e}) "
             r"\frac{R_{si,c}}{R_{T,c}}",
             rf"{ti} - \left({ti} - {_p(te, _celsius(theta_e))}\right) "
             rf"\frac{{{_given(R_c, 'm^2*K/W')}}}{{{out.q(R_Tc, 'm^2*K/W')}}}",
             theta_sc, "K", label="Inside surface temperature for surface humidity",
             display_unit="degC", source=CONDENSATION_RSI_SOURCE)
    if dT == 0.0:
        out.not_reached("f_Rsi", "undefined: the inside and outside temperatures are equal")
    else:
        f = float(temperature_factor(theta_sc, theta_i, theta_e))
        out.step("f_{Rsi}", r"\frac{\theta_{si}^{\prime} - \theta_{e}}{\theta_{i} - \theta_{e}}",
                 rf"\frac{{{out.q(theta_sc, 'K', 'degC')} - {_p(te, _celsius(theta_e))}}}"
                 rf"{{{ti} - {_p(te, _celsius(theta_e))}}}", f, "1",
                 label="Temperature factor at the inside surface",
                 source=TEMPERATURE_FACTOR_SOURCE)
        out.result("f_Rsi", f)
    if sections is not None:
        out.warn("f_Rsi and the surface humidity of a bridged element are area means; the "
                 "surface over a bridge is colder. Find its minimum temperature by a numerical "
                 "calculation (ISO 10211) before relying on the mould or condensation result.",
                 COMBINED_METHOD_SOURCE)

    phi = inp.inside_relative_humidity
    if phi is None:
        return {"theta": theta_sc, "dew_point": None}
    p_v, dew = _dew_point_steps(out, theta_i, phi, r"\theta_{i}", r"\varphi_{i}", "inside",
                                ("inside_temperature", "inside_relative_humidity"))
    try:
        phi_s = float(surface_relative_humidity(theta_i, phi, theta_sc))
        p_sat_s = float(saturation_vapour_pressure(theta_sc))
    except PhysicsRangeError as exc:
        raise PhysicsRangeError("inside_temperature", exc.value,
                                f"{exc.quantity} {exc.expected}") from None
    margin = theta_sc - dew
    out.step(r"\Delta\theta_{c}", r"\theta_{si}^{\prime} - \theta_{dp}",
             rf"{out.q(theta_sc, 'K', 'degC')} - {_p(out.q(dew, 'K', 'degC'), _celsius(dew))}",
             margin, "K", label="Condensation margin at the inside surface",
             source=SATURATION_PRESSURE_SOURCE)
    surface = r"\theta_{si}^{\prime}"
    out.step(rf"p_{{sat}}({surface})", _p_sat_formula(_celsius(theta_sc), surface),
             _p_sat_substituted(_celsius(theta_sc)), p_sat_s, "Pa",
             label="Saturation vapour pressure at the inside surface",
             source=SATURATION_PRESSURE_SOURCE)
    out.step(r"\varphi_{si}", r"\frac{p_{v}}{p_{sat}(\theta_{si}^{\prime})}",
             rf"\frac{{{out.q(p_v, 'Pa')}}}{{{out.q(p_sat_s, 'Pa')}}}", phi_s, "1",
             display_unit="%", label="Relative humidity at the inside surface",
             source=MOULD_SOURCE)
    out.result("dew_point", dew)
    out.result("condensation_margin", margin)
    out.result("surface_relative_humidity", phi_s)
    out.note("Interstitial condensation (the ISO 13788 monthly method) is not assessed by this "
             "block.", "ISO 13788:2012")
    if margin < 0.0:
        out.warn(f"The inside surface ({out.qt(theta_sc, 'K', 'degC')}) is below the dew point "
                 f"of the inside air ({out.qt(dew, 'K', 'degC')}): surface condensation is "
                 "expected.", SATURATION_PRESSURE_SOURCE)
    if phi_s >= 0.8:
        out.warn(f"Surface relative humidity {out.qt(phi_s, '1', '%')} reaches the 80 % "
                 "criterion for mould growth.", MOULD_SOURCE)
    return {"theta": theta_sc, "dew_point": dew}


def _dew_point_steps(out, T_air: float, phi: float, symbol: str, phi_symbol: str, which: str,
                     inputs: tuple[str, str]) -> tuple[float, float]:
    """Record the saturation pressure, vapour pressure and dew point steps of moist air and
    return (vapour pressure [Pa], dew point [K]); out-of-range values are located at
    ``inputs`` (temperature, humidity)."""
    try:
        p_sat = float(saturation_vapour_pressure(T_air))
        dew = float(dew_point_temperature(T_air, phi))
    except PhysicsRangeError as exc:
        target = inputs[1] if exc.quantity == "vapour pressure" else inputs[0]
        raise PhysicsRangeError(target, exc.value, f"{exc.quantity} {exc.expected}") from None
    p_v = phi * p_sat
    out.note("Saturation vapour pressure over water at or above 0 °C and over ice below it.",
             SATURATION_PRESSURE_SOURCE)
    out.step(rf"p_{{sat}}({symbol})", _p_sat_formula(_celsius(T_air), symbol),
             _p_sat_substituted(_celsius(T_air)), p_sat, "Pa",
             label=f"Saturation vapour pressure of the {which} air",
             source=SATURATION_PRESSURE_SOURCE)
    out.step("p_{v}", rf"{phi_symbol}\, p_{{sat}}({symbol})",
             rf"{_given(phi, '1', '%')} \cdot {out.q(p_sat, 'Pa')}", p_v, "Pa",
             label=f"Vapour pressure of the {which} air", source=SATURATION_PRESSURE_SOURCE)
    x = math.log(p_v / 610.5)
    a, b = (17.269, 237.3) if x >= 0.0 else (21.875, 265.5)
    shown_x = _p(latex_number(x, 4), x)
    out.step(r"\theta_{dp}", rf"\frac{{{b}\, x}}{{{a} - x}},\ x = \ln\frac{{p_{{v}}}}{{610.5}}",
             rf"\frac{{{b} \cdot {shown_x}}}{{{a} - {shown_x}}},\ "
             rf"x = \ln\frac{{{out.q(p_v, 'Pa')}}}{{610.5\,\mathrm{{Pa}}}}", dew, "K",
             label=f"Dew point of the {which} air" + (" (frost point, over ice)" if x < 0 else ""),
             display_unit="degC", source=SATURATION_PRESSURE_SOURCE)
    return p_v, dew


def _p_sat_formula(theta_c: float, symbol: str) -> str:
    a, b = (17.269, 237.3) if theta_c >= 0.0 else (21.875, 265.5)
    return rf"610.5\,\mathrm{{Pa}} \cdot \exp\left(\frac{{{a}\, {symbol}}}{{{b} + {symbol}}}\right)"


def _p_sat_substituted(theta_c: float) -> str:
    a, b = (17.269, 237.3) if theta_c >= 0.0 else (21.875, 265.5)
    t = _p(_num(round(theta_c, 2)), theta_c)
    return rf"610.5\,\mathrm{{Pa}} \cdot \exp\left(\frac{{{a} \cdot {t}}}{{{b} + {t}}}\right)"


# ----------------------------------------------------------------------------- the figure


def pipe_figures(block) -> list[Figure]:
    """The temperature through the insulation against radius, layers shaded and named."""
    data = block.output.figure_data.get("radial")
    if not data:
        return []
    from calcdoc.render.plots import figure, svg_of

    sig = block.output.precision
    with figure(block.key + "-radial", 160, 70) as (fig, ax):
        for j, curve in enumerate(data["curves"]):
            r = curve["r_mm"]
            ax.axvspan(r[0], r[-1], facecolor="#ebebeb" if j % 2 else "#ffffff",
                       edgecolor="#777777", hatch="//" if j % 2 else None, linewidth=0.6,
                       zorder=0)
            ax.text((r[0] + r[-1]) / 2, 0.5, curve["name"], transform=ax.get_xaxis_transform(),
                    rotation=90, ha="center", va="center", fontsize=6.5,
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 1.0}, zorder=3)
            ax.plot(r, curve["t_degC"], color="#000000", linewidth=1.4, zorder=4,
                    label="temperature through the insulation" if j == 0 else None)
        ax.axhline(data["ambient_degC"], color="#000000", linestyle="--", linewidth=0.9,
                   label="ambient " + format_quantity(data["ambient_degC"] + ZERO_CELSIUS, "K",
                                                      "degC", sig))
        ax.set_xlabel("radius from the pipe axis (mm), bore at "
                      f"{format_number(data['bore_mm'], sig)} mm")
        ax.set_ylabel("temperature (°C)")
        ax.legend(loc="best")
        svg = svg_of(fig)
    return [Figure(block.key + "-radial", svg,
                   "Temperature through the pipe insulation against radius (logarithmic within "
                   "each layer, Fourier's law in a cylinder); the surface film lies between the "
                   "outer surface and the ambient line.")]


def wall_figures(block) -> list[Figure]:
    """The temperature profile through the wall, drawn to scale, as an SVG figure."""
    data = block.output.figure_data.get("profile")
    if not data:
        return []
    from calcdoc.render.plots import figure, svg_of

    sig = block.output.precision
    thick = data["thicknesses_mm"]
    total = sum(thick)
    edges = [0.0]
    for t in thick:
        edges.append(edges[-1] + t)
    film = 0.08 * total  # the air films are drawn outside the wall, not to scale
    temps = data["temperatures_degC"]
    t_i, t_e = data["inside_degC"], data["outside_degC"]

    def deg(v):
        return format_quantity(v + ZERO_CELSIUS, "K", "degC", sig)

    with figure(block.key + "-profile", 160, 85) as (fig, ax):
        for j, (x0, x1) in enumerate(zip(edges[:-1], edges[1:])):
            bridge = data["bridges"][j]
            hatch = "x" if bridge else ("//" if j % 2 else None)
            ax.axvspan(x0, x1, facecolor="#ebebeb" if j % 2 else "#ffffff", edgecolor="#777777",
                       hatch=hatch, linewidth=0.6, zorder=0)
            ax.annotate(str(j + 1), xy=((x0 + x1) / 2, 1.0), xycoords=("data", "axes fraction"),
                        xytext=(0, 2), textcoords="offset points", ha="center", va="bottom",
                        fontsize=7)
            if (x1 - x0) >= 0.045 * total:
                name = data["names"][j]
                if bridge:
                    name += (f"\n+ {bridge['name']} "
                             f"{format_quantity(bridge['fraction'], '1', '%', sig)}")
                ax.text((x0 + x1) / 2, 0.5, name, transform=ax.get_xaxis_transform(),
                        rotation=90, ha="center", va="center", fontsize=6.5,
                        multialignment="center",
                        bbox={"facecolor": "white", "edgecolor": "none", "pad": 1.0},
                        zorder=3)
        ax.plot(edges, temps, color="#000000", linestyle="-", marker="o", markersize=3,
                linewidth=1.4, label="temperature through the wall (U-value surface resistances)",
                zorder=4)
        # Surface films: a short level line for each air temperature and a dotted drop to the
        # surface, outside the wall's true-scale extent.
        ax.plot([-film, -0.4 * film], [t_i, t_i], color="#000000", linewidth=1.4, zorder=4)
        ax.plot([-0.4 * film, 0.0], [t_i, temps[0]], color="#000000", linestyle=":",
                linewidth=1.2, zorder=4)
        ax.plot([total + 0.4 * film, total + film], [t_e, t_e], color="#000000", linewidth=1.4,
                zorder=4)
        ax.plot([total, total + 0.4 * film], [temps[-1], t_e], color="#000000", linestyle=":",
                linewidth=1.2, zorder=4, label="surface film (drawn not to scale)")
        ax.annotate(f"inside air {deg(t_i)}", xy=(-film, t_i), xytext=(0, 4),
                    textcoords="offset points", fontsize=7, ha="left", va="bottom")
        ax.annotate(f"outside air {deg(t_e)}", xy=(total + film, t_e), xytext=(0, 4),
                    textcoords="offset points", fontsize=7, ha="right", va="bottom")
        if data["condensation_surface_degC"] is not None:
            ax.plot([0.0], [data["condensation_surface_degC"]], linestyle="none", marker="v",
                    markersize=5, markerfacecolor="white", markeredgecolor="#000000", zorder=5,
                    label=f"inside surface for condensation (R_si = "
                          f"{format_quantity(data['condensation_R_si'], 'm^2*K/W', None, sig)})")
        if data["dew_point_degC"] is not None:
            ax.axhline(data["dew_point_degC"], color="#000000", linestyle="--", linewidth=0.9,
                       label=f"dew point of the inside air {deg(data['dew_point_degC'])}",
                       zorder=4)
        ax.set_xlim(-film, total + film)
        values = temps + [t_i, t_e] + [v for v in (data["dew_point_degC"],
                                                   data["condensation_surface_degC"])
                                        if v is not None]
        low, high = min(values), max(values)
        pad = 0.12 * max(high - low, 1.0)
        ax.set_ylim(low - pad, high + 1.5 * pad)
        ticks = [0.0]
        for e in edges[1:]:
            if e - ticks[-1] >= 0.06 * total:
                ticks.append(e)
        if ticks[-1] != edges[-1]:
            ticks[-1] = edges[-1]
        ax.set_xticks(ticks)
        ax.set_xticklabels([f"{t:.4g}" for t in ticks])
        ax.set_xlabel("position from the inside surface [mm] (layers to scale)")
        ax.set_ylabel("temperature [°C]")
        ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.22), ncol=2, fontsize=6.5)
        ax.grid(False)
        svg = svg_of(fig)
    key = "; ".join(
        f"{j + 1} {name} {t:.6g} mm"
        + (f" with {b['name']} ({format_quantity(b['fraction'], '1', '%', sig)})" if b else "")
        for j, (name, t, b) in enumerate(zip(data["names"], thick, data["bridges"])))
    caption = (f"Temperature profile through {block.spec.title or block.key}, inside on the left. "
               f"Layers: {key}.")
    return [Figure(block.key + "-profile", svg, caption)]


# ----------------------------------------------------------------------------- cylindrical


def _pipe_compute(inp, out):
    D0 = inp.inner_diameter
    thicknesses = [layer["thickness"] for layer in inp.layers]
    conductivities, sources = [], []
    for layer in inp.layers:
        lam, material_source = _conductivity(layer)
        conductivities.append(lam)
        sources.append(layer["source"] or material_source)
    T_i, T_a = inp.inside_temperature, inp.ambient_temperature
    h_i = inp.inside_coefficient

    convection = None
    h_r = None
    if inp.surface_emissivity is not None:
        try:
            still = pipe_in_still_air(D0, thicknesses, conductivities, T_i, T_a,
                                      inp.surface_emissivity, h_i)
        except PhysicsRangeError as exc:
            raise _pipe_range_error(exc, T_a) from None
        flow, convection, h_r = still.flow, still.convection, still.h_radiation
    else:
        flow = cylindrical_layers(D0, thicknesses, conductivities, T_i, T_a,
                                  inp.outside_coefficient, h_i)

    # Diameters and layer resistances.
    diameters = [float(d) for d in flow.diameters]
    terms_sym, terms_num = [], []
    if h_i is not None:
        R_in = float(cylinder_film_resistance(D0, h_i))
        out.step(r"R'_{i}", r"\frac{1}{h_{i} \pi D_{0}}",
                 rf"\frac{{1}}{{{_given(h_i, 'W/(m^2*K)')} \cdot \pi \cdot {_given(D0, 'm')}}}",
                 R_in, "m*K/W", label="Inside film resistance per metre", source=RADIAL_SOURCE)
        terms_sym.append(r"R'_{i}")
        terms_num.append(out.q(R_in, "m*K/W"))
    else:
        out.note("No inside coefficient given: the inner surface is taken at the inside "
                 "temperature (the inside film resistance is neglected).")
    for j, (layer, t, lam, source) in enumerate(zip(inp.layers, thicknesses, conductivities,
                                                     sources), start=1):
        label = f"Layer {j}, {_layer_label(layer, j)}"
        D_prev, D_j = diameters[j - 1], diameters[j]
        prev = _given(D_prev, "m") if j == 1 else out.q(D_prev, "m")
        out.step(f"D_{{{j}}}", rf"D_{{{j - 1}}} + 2 t_{{{j}}}",
                 rf"{prev} + 2 \cdot {_given(t, 'm')}", D_j, "m",
                 label=f"{label}, outer diameter", display_unit="mm")
        R_j = float(cylinder_layer_resistance(D_prev, D_j, lam))
        out.step(f"R'_{{{j}}}", rf"\frac{{\ln(D_{{{j}}}/D_{{{j - 1}}})}}{{2 \pi k_{{{j}}}}}",
                 rf"\frac{{\ln({out.q(D_j, 'm')}/{out.q(D_prev, 'm')})}}"
                 rf"{{2 \pi \cdot {_given(lam, 'W/(m*K)')}}}", R_j, "m*K/W",
                 label=f"{label}, resistance per metre", source=source or RADIAL_SOURCE)
        terms_sym.append(f"R'_{{{j}}}")
        terms_num.append(out.q(R_j, "m*K/W"))
    D_n = flow.outer_diameter
    out.result("outer_diameter", D_n)

    theta_s = flow.theta_surface
    if convection is not None:
        _still_air_steps(out, inp, convection, h_r, theta_s, T_a, D_n)
    h_o = flow.h_outside
    R_out = float(cylinder_film_resistance(D_n, h_o))
    h_shown = (out.q(h_o, "W/(m^2*K)") if convection is not None
               else _given(h_o, "W/(m^2*K)"))
    out.step(r"R'_{o}", r"\frac{1}{h_{o} \pi D_{n}}",
             rf"\frac{{1}}{{{h_shown} \cdot \pi \cdot {out.q(D_n, 'm')}}}",
             R_out, "m*K/W", label="Outside surface resistance per metre", source=RADIAL_SOURCE)
    terms_sym.append(r"R'_{o}")
    terms_num.append(out.q(R_out, "m*K/W"))
    out.result("h_outside", h_o)

    R = flow.R_per_length
    out.step("R'", " + ".join(terms_sym), " + ".join(terms_num), R, "m*K/W",
             label="Total resistance per metre, inside temperature to ambient",
             source=RADIAL_SOURCE)
    out.result("R_per_length", R)
    q = flow.q_per_length
    ti, ta = _given(T_i, "K", "degC"), _given(T_a, "K", "degC")
    out.step("q'", r"\frac{T_{i} - T_{\infty}}{R'}",
             rf"\frac{{{ti} - {_p(ta, _celsius(T_a))}}}{{{out.q(R, 'm*K/W')}}}", q, "W/m",
             label="Heat flow per metre, positive outward", source=RADIAL_SOURCE)
    out.result("q_per_length", q)
    Q = q * inp.length
    out.step("Q", "q' L", rf"{_p(out.q(q, 'W/m'), q)} \cdot {_given(inp.length, 'm')}", Q, "W",
             label="Heat flow over the length")
    out.result("Q", Q)
    out.step(r"\theta_{s}", r"T_{\infty} + q' R'_{o}",
             rf"{_p(ta, _celsius(T_a))} + {_p(out.q(q, 'W/m'), q)} \cdot {out.q(R_out, 'm*K/W')}",
             theta_s, "K", label="Outer surface temperature", display_unit="degC",
             source=RADIAL_SOURCE)
    out.result("theta_surface", theta_s)
    # Plain data for the radial profile figure: within layer j the temperature falls with
    # ln(r) (Fourier's law in a cylinder), T(r) = T_{j-1} − q' ln(r/r_{j-1}) / (2π k_j).
    curves = []
    temps = [float(t) for t in flow.interface_temperatures]
    for j, lam in enumerate(conductivities, start=1):
        r = np.geomspace(diameters[j - 1] / 2, diameters[j] / 2, 24)
        curves.append({"r_mm": (1000 * r).tolist(),
                       "t_degC": (temps[j - 1] - q * np.log(r / r[0]) / (2 * math.pi * lam)
                                  - ZERO_CELSIUS).tolist(),
                       "name": _layer_label(inp.layers[j - 1], j)})
    out.figure_data["radial"] = {"curves": curves, "inside_degC": T_i - ZERO_CELSIUS,
                                 "ambient_degC": T_a - ZERO_CELSIUS,
                                 "bore_mm": 500 * diameters[0], "outer_mm": 500 * diameters[-1]}
    if q < 0:
        out.note("The heat flow is negative: the pipe gains heat from the ambient.")

    phi = inp.ambient_relative_humidity
    if phi is not None:
        p_v, dew = _dew_point_steps(out, T_a, phi, r"\theta_{\infty}", r"\varphi_{\infty}",
                                    "ambient",
                                    ("ambient_temperature", "ambient_relative_humidity"))
        margin = theta_s - dew
        out.step(r"\Delta\theta_{c}", r"\theta_{s} - \theta_{dp}",
                 rf"{out.q(theta_s, 'K', 'degC')} - {_p(out.q(dew, 'K', 'degC'), _celsius(dew))}",
                 margin, "K", label="Condensation margin at the outer surface",
                 source=SATURATION_PRESSURE_SOURCE)
        out.result("dew_point", dew)
        out.result("condensation_margin", margin)
        if margin < 0:
            out.warn(f"The outer surface ({out.qt(theta_s, 'K', 'degC')}) is below the dew point "
                     f"of the ambient air ({out.qt(dew, 'K', 'degC')}): condensation on the "
                     "insulation is expected.", SATURATION_PRESSURE_SOURCE)


def _pipe_range_error(exc: PhysicsRangeError, T_a: float) -> PhysicsRangeError:
    if exc.quantity == "Ra_D":
        return PhysicsRangeError(
            "surface_emissivity", f"Ra_D = {format_number(exc.value, 3)}",
            f"{exc.expected}; give outside_coefficient instead")
    if exc.quantity == "air temperature":
        low, high = 200.0, 800.0
        target = "ambient_temperature" if not low <= T_a <= high else "inside_temperature"
        return PhysicsRangeError(target, f"film temperature {exc.value:.5g} K", exc.expected)
    return exc


def _still_air_steps(out, inp, convection, h_r, theta_s, T_a, D_n):
    air = convection.air
    out.note("Outside coefficient: natural convection from a long horizontal cylinder in still "
             "air (Churchill–Chu) plus radiation to surroundings at the ambient temperature; the "
             "surface temperature is found by iteration (Brent's method) so that the heat "
             "conducted through the layers equals the heat leaving the surface.",
             CHURCHILL_CHU_SOURCE)
    out.note(f"Air at the film temperature {out.qt(convection.film_temperature, 'K', 'degC')}: "
             f"k = {out.qt(air.conductivity, 'W/(m*K)')}, "
             f"ν = {out.qt(air.kinematic_viscosity, 'm^2/s')}, "
             f"α = {out.qt(air.thermal_diffusivity, 'm^2/s')}, Pr = {out.qt(air.prandtl, '1')}, "
             f"β = 1/T_f.", AIR_TABLE_SOURCE)
    out.step("T_{f}", r"\frac{T_{s} + T_{\infty}}{2}",
             rf"\frac{{{out.q(theta_s, 'K')} + {_given(T_a, 'K')}}}{{2}}",
             convection.film_temperature, "K", label="Film temperature (at the solved surface "
             "temperature " + out.qt(theta_s, "K", "degC") + ")", source=CHURCHILL_CHU_SOURCE)
    out.step("Ra_{D}", r"\frac{g \beta |T_{s} - T_{\infty}| D_{n}^{3}}{\nu \alpha}",
             rf"\frac{{9.807\,\mathrm{{m/s^{{2}}}} \cdot "
             rf"\frac{{1}}{{{out.q(convection.film_temperature, 'K')}}} \cdot "
             rf"{out.q(abs(theta_s - T_a), 'K')} \cdot ({out.q(D_n, 'm')})^{{3}}}}"
             rf"{{{out.q(air.kinematic_viscosity, 'm^2/s')} \cdot "
             rf"{out.q(air.thermal_diffusivity, 'm^2/s')}}}",
             convection.rayleigh, "1", label="Rayleigh number (valid up to 10^12)",
             source=CHURCHILL_CHU_SOURCE)
    out.step(r"\overline{Nu}_{D}",
             r"\left\{0.60 + \frac{0.387\, Ra_{D}^{1/6}}{\left[1 + (0.559/Pr)^{9/16}"
             r"\right]^{8/27}}\right\}^{2}",
             rf"\left\{{0.60 + \frac{{0.387 \cdot ({out.q(convection.rayleigh, '1')})^{{1/6}}}}"
             rf"{{\left[1 + (0.559/{out.q(air.prandtl, '1')})^{{9/16}}\right]^{{8/27}}}}"
             r"\right\}^{2}",
             convection.nusselt, "1", label="Nusselt number, Churchill–Chu",
             source=CHURCHILL_CHU_SOURCE)
    out.step("h_{c}", r"\frac{\overline{Nu}_{D}\, k}{D_{n}}",
             rf"\frac{{{out.q(convection.nusselt, '1')} \cdot "
             rf"{out.q(air.conductivity, 'W/(m*K)')}}}{{{out.q(D_n, 'm')}}}",
             convection.h, "W/(m^2*K)", label="Natural convection coefficient",
             source=CHURCHILL_CHU_SOURCE)
    out.step("h_{r}", r"\varepsilon \sigma (T_{s}^{2} + T_{\infty}^{2})(T_{s} + T_{\infty})",
             rf"{_given(inp.surface_emissivity, '1')} \cdot \sigma \cdot "
             rf"\left(({out.q(theta_s, 'K')})^{{2}} + ({_given(T_a, 'K')})^{{2}}\right)"
             rf"\left({out.q(theta_s, 'K')} + {_given(T_a, 'K')}\right)",
             h_r, "W/(m^2*K)", label="Radiation coefficient to the surroundings",
             source=STEFAN_BOLTZMANN_SOURCE)
    out.step("h_{o}", "h_{c} + h_{r}",
             rf"{out.q(convection.h, 'W/(m^2*K)')} + {out.q(h_r, 'W/(m^2*K)')}",
             convection.h + h_r, "W/(m^2*K)", label="Outside surface coefficient")


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
        Choice("heat_flow", "direction of heat flow (sets R_si)", default="horizontal",
               source="ISO 6946:2017 Table 7", options=("horizontal", "upward", "downward")),
        SurfaceResistance("inside_surface_resistance", "inside surface resistance R_si for U",
                          default="ISO 6946:2017 Table 7", source=SURFACE_RESISTANCE_SOURCE,
                          unit="m^2*K/W", at_least=0.0, side="inside"),
        SurfaceResistance("outside_surface_resistance", "outside surface resistance R_se",
                          default="ISO 6946:2017 Table 7", source=SURFACE_RESISTANCE_SOURCE,
                          unit="m^2*K/W", at_least=0.0, side="outside"),
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
        ResultSpec("f_Rsi", "1", "temperature factor at the inside surface (R_si,c)"),
        ResultSpec("dew_point", "K", "dew point of the inside air", temperature=ABSOLUTE),
        ResultSpec("condensation_margin", "K",
                   "inside surface temperature (R_si,c) minus dew point", temperature=DIFFERENCE),
        ResultSpec("surface_relative_humidity", "1",
                   "relative humidity at the inside surface (R_si,c)", display="%"),
    ),
    compute=_wall_compute,
    figures=wall_figures,
    caution=WALL_CAUTION,
    references=("ISO 6946:2017", "ISO 13788:2012"),
)

CYLINDRICAL_LAYERS = Kind(
    name="cylindrical_layers",
    title="Cylindrical layers, steady radial conduction",
    summary="Heat flow and surface temperature of an insulated pipe or duct; the outside "
            "coefficient given, or computed for a horizontal pipe in still air "
            "(Churchill–Chu and radiation).",
    inputs=(
        Quantity("inner_diameter", "inner diameter of the first layer", unit="m",
                 greater_than=0.0, display="mm"),
        Items("layers", "layers from the inside outward", fields=PIPE_LAYER_FIELDS,
              exactly_one=(("conductivity", "material"),), min_items=1),
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
    ),
    compute=_pipe_compute,
    figures=pipe_figures,
    exactly_one=(("outside_coefficient", "surface_emissivity"),),
    caution=PIPE_CAUTION,
    references=("Churchill and Chu (1975)",),
)

KINDS = (LAYERED_WALL, CYLINDRICAL_LAYERS)
