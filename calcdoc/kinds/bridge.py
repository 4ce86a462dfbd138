"""The ``thermal_bridge`` kind: steady two-dimensional conduction through a building junction
(ISO 10211), its linear thermal transmittance ψ and the temperature factor f_Rsi of its coldest
inside surface point (ISO 13788).

The solver is :func:`calcdoc.physics.bridge2d.thermal_bridge`; this module declares the inputs
(regions and surfaces of the section, the flanking elements) and records, as data, what a checker
reads: the solve and its mesh check as statements with their numbers, the heat flow balance, ψ
as a formula over the flanking elements' U-values and lengths, the surface-temperature solve and
f_Rsi as a formula, and the section drawn to scale with its isotherms.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
from scipy.constants import zero_Celsius

from calcdoc.data import Axis, Box, Contours, FigureData, Line, Point, library_value
from calcdoc.kinds.base import (ABSOLUTE, DIFFERENCE, REQUIRED, Choice, Field, InputRecord,
                                InvalidInput, Items, Kind, Quantity, ResultSpec, Text, Value,
                                phrase)
from calcdoc.kinds.conduction import (CONDENSATION_RSI_SOURCE, TEMPERATURE_FACTOR_SOURCE,
                                      ConductingMaterial)
from calcdoc.errors import InputError
from calcdoc.located import plain
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.bridge2d import Region, Surface, psi, thermal_bridge
from calcdoc.references import Cite

__all__ = ["KINDS", "THERMAL_BRIDGE"]

# Clauses recalled, not yet read against the printed standard: data, not words in the source
# (the package lists them under "Values to confirm").
MESH_SOURCE = Cite("ISO 10211:2017", "number of subdivisions", confirmed=False,
                   key="ISO 10211:2017 subdivisions 1 %",
                   value="halving the cells changes the heat flow by less than 1 %")
CUT_OFF_SOURCE = Cite("ISO 10211:2017", "§5.2, cut-off planes", confirmed=False,
                      key="ISO 10211:2017 5.2", value="§5.2, cut-off planes of the geometrical "
                      "model are adiabatic")
PSI_SOURCE = Cite("ISO 10211:2017", "linear thermal transmittance", confirmed=False, key="ISO 10211:2017 psi",
                  value="Ψ = L2D − Σ U_j l_j")

CAUTION = ("This calculation supports, and does not replace, the judgement of a licensed "
           "engineer and the requirements of the local code and the authority having "
           "jurisdiction. The junction is a steady two-dimensional model: three-dimensional "
           "corners, fixings and point bridges are colder than any two-dimensional section "
           "shows, and the surface temperature depends on the surface resistances and the "
           "conductivities assumed.")

GROUP_FLANKING = "Heat flow of each flanking element per kelvin"

# The isotherms are drawn at round steps in °C: the smallest of these giving at most this many.
_ISOTHERM_STEPS = (0.5, 1.0, 2.0, 2.5, 5.0, 10.0, 20.0, 25.0, 50.0)
_MOST_ISOTHERMS = 10
# More flanking elements than this are written one U·l product per row before ψ.
_FLANKING_IN_ONE_LINE = 3


# ----------------------------------------------------------------------------- fields


@dataclass(frozen=True)
class LengthPair(Field):
    """Two lengths written as a list, ``[0 mm, 365 mm]``, or with the unit once, ``[0, 365 mm]``
    (a bare number takes the other's unit): a region's extent along an axis (``x``, ``y``) or a
    point of the section (``from``, ``to``). Recorded as one input whose value is the pair in
    metres, shown as written."""

    point: bool = False  # (x, y) of a point rather than an interval along an axis

    def type_text(self) -> str:
        return "[x, y] (two lengths)" if self.point else "[start, end] (two lengths)"

    def json_schema(self) -> dict:
        length = {"anyOf": [{"type": "string", "description": "a length, e.g. '365 mm'"},
                            {"type": "number", "description": "a number taking the other "
                             "length's unit"}]}
        return {"description": f"{self.meaning} ({self.type_text()})", "type": "array",
                "minItems": 2, "maxItems": 2, "items": length}

    def convert(self, node, ctx, path):
        example = "[0, 1.2 m]" if self.point else "[0, 365 mm]"
        if not node.is_list or len(node.value) != 2 or not all(e.is_scalar and e.value is not
                                                                None for e in node.value):
            ctx.error(node, path, f"'{self.name}' is not two lengths",
                      f"a list of two lengths, e.g. {example}", repr(plain(node)))
            raise InvalidInput
        texts = [e.value if isinstance(e.value, str) else repr(e.value) for e in node.value]
        parts = [_NUMBER.match(t) for t in texts]
        bare = [m is not None and m.end() == len(t) and not isinstance(e.value, bool)
                for m, t, e in zip(parts, texts, node.value)]
        if bare[0] != bare[1] and parts[bare.index(False)] is not None:
            # one unit for the pair, written once: [0, 365 mm] is [0 mm, 365 mm]; where the
            # other is no number at all ('nan mm'), each is parsed as written and refused
            unit = texts[bare.index(False)][parts[bare.index(False)].end():].strip()
            texts = [f"{t} {unit}" if b else t for t, b in zip(texts, bare)]
        length = Quantity(self.name, self.meaning, unit="m")
        values, units = [], []
        for element, text in zip(node.value, texts):
            value, unit = length.parse_text(text, ctx, element, path)
            length._check_range(value, ctx, element, path, repr(element.value))
            values.append(value)
            units.append(unit)
        numbers = [m[1] if (m := _NUMBER.match(t)) else t for t in texts]
        if units[0] == units[1]:
            # the unit once, as the pair was written: '−62.5 to 1165 mm'
            template = ("({a}, {b}) " if self.point else "{a} to {b} ") + units[0]
            shown = phrase(template, **{k: Value(float(n), written=n, given=True)
                                        for k, n in zip("ab", numbers)})
        else:
            shown = phrase("({a}, {b})" if self.point else "{a} to {b}",
                           **{k: Value(v, "m", u, written=t, given=True)
                              for k, v, u, t in zip("ab", values, units, texts)})
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written="[" + ", ".join(
                str(e.value) for e in node.value) + "]", si=values, si_unit="m",
            loc=node.loc, shown=shown))
        return tuple(values)


_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)")

CONDUCTIVITY = dict(unit="W/(m*K)", greater_than=0.0)
RESISTANCE = dict(unit="m^2*K/W", at_least=0.0)

REGION_FIELDS = (
    Text("name", "region name", default=""),
    LengthPair("x", "extent along x"),
    LengthPair("y", "extent along y"),
    Quantity("conductivity", "thermal conductivity", default=REQUIRED, **CONDUCTIVITY),
    ConductingMaterial("material", "material from the library", default=REQUIRED),
    Text("source", "where the region's data come from", default=""),
)

SURFACE_FIELDS = (
    Text("name", "surface name", default=""),
    Choice("side", "the environment the surface faces", options=("inside", "outside")),
    LengthPair("from", "one end of the segment", point=True),
    LengthPair("to", "the other end of the segment", point=True),
    Quantity("surface_resistance", "surface resistance (0 holds the surface at the "
             "environment's temperature)", **RESISTANCE),
    Text("source", "where the surface resistance comes from", default=""),
)

FLANKING_FIELDS = (
    Text("name", "flanking element", default=""),
    Quantity("U", "thermal transmittance of the flanking element", unit="W/(m^2*K)",
             at_least=0.0),
    Quantity("length", "length over which its U applies in the model", unit="m",
             at_least=0.0),
    Text("source", "where the U-value and the length come from", default=""),
)


# ----------------------------------------------------------------------------- compute


def _name(item: dict, what: str, k: int) -> str:
    return item["name"] or f"{what} {k + 1}"


def _conductivity(out, region: dict, k: int) -> Value:
    """A region's conductivity as a value the working names: the input as written, or the
    library value (which then enters the list of values to confirm if it is recalled)."""
    material = region["material"]
    if material is not None:
        return library_value(material, "conductivity", "W/(m*K)")
    return out.input(f"regions[{k}].conductivity")


_ITEM_ERROR = re.compile(r"^(regions|surfaces)\[(\d+)\](?:\.(x|y|from|to))?$")


def _as_written(exc: PhysicsRangeError, out) -> Exception:
    """The solver's refusal with the coordinates as the engineer wrote them (it states them in
    metres), so that the message quotes the sheet; a refusal of a whole item (a surface off the
    body's boundary, a detached region) is located where that item's first field is written,
    there being no input of the item's own path to locate it at."""
    match = _ITEM_ERROR.match(exc.quantity)
    if not match:
        return exc
    written = {r.path: r.written for r in out.records}
    item = f"{match[1]}[{match[2]}]"
    if match[3] is not None:
        if f"{item}.{match[3]}" not in written:
            return exc
        return PhysicsRangeError(exc.quantity, written[f"{item}.{match[3]}"], exc.expected,
                                 exc.index)
    value = (f"from {written.get(item + '.from')} to {written.get(item + '.to')}"
             if match[1] == "surfaces" else str(exc.value))
    loc = next((r.loc for r in out.records if r.path.startswith(item + ".") and r.loc), None)
    if loc is None:
        return exc
    return InputError(loc, f"{out.block_key}.inputs.{item}", "outside the range of the method",
                      exc.expected, value)


def _compute(inp, out):
    theta_i, theta_e = inp.inside_temperature, inp.outside_temperature
    if not theta_i > theta_e:
        # θ_si,min and f_Rsi are the warm side's: "inside" must be the warmer environment
        raise PhysicsRangeError("inside_temperature", theta_i,
                                "an inside temperature above the outside temperature (write "
                                "the junction from its warm side)")
    T_i, T_e = out.input("inside_temperature"), out.input("outside_temperature")
    conductivities = [_conductivity(out, r, k) for k, r in enumerate(inp.regions)]
    regions = [Region(r["x"], r["y"], lam.si) for r, lam in zip(inp.regions, conductivities)]
    surfaces = [Surface(s["from"], s["to"], s["side"], s["surface_resistance"])
                for s in inp.surfaces]
    try:
        bridge = thermal_bridge(regions, surfaces, theta_i, theta_e, cell_size=inp.cell_size,
                                condensation_surface_resistance=(
                                    inp.condensation_surface_resistance))
    except PhysicsRangeError as exc:
        raise _as_written(exc, out) from None

    out.note("Every boundary of the section that is not a listed surface is adiabatic: a "
             "cut-off plane or a plane of symmetry.", CUT_OFF_SOURCE)
    library = {f"lambda_{k + 1}": lam for k, lam in enumerate(conductivities)
               if lam.origin is not None}
    L2D = _solve_statement(out, bridge, library)
    _balance_statement(out, bridge, T_i, T_e)
    _psi_steps(out, inp, bridge, L2D)
    theta_min = _surface_statements(out, bridge)
    out.step("f_Rsi", "(theta_si_min - theta_e) / (theta_i - theta_e)",
             {"theta_si_min": theta_min, "theta_e": T_e, "theta_i": T_i}, bridge.f_Rsi,
             label="Temperature factor at that point",
             source=TEMPERATURE_FACTOR_SOURCE, yields="f_Rsi",
             symbols={"theta_si_min": r"\theta_{si,min}"})
    out.figure(_section_figure(out, inp, bridge, conductivities))


def _solve_statement(out, bridge, library: dict) -> Value:
    """L2D, with the mesh and both refinement criteria stated with their numbers."""
    check = bridge.mesh_check
    used, other = check.levels[check.used], check.levels[check.compared]
    # The two meshes' L2D in full: the change between them is what the criterion judges.
    values = {"cells": Value(used.cells, given=True),
              "smallest": Value(used.smallest_cell, "m", "mm"),
              "largest": Value(used.largest_cell, "m", "mm"),
              "cells_2": Value(other.cells, given=True),
              "L_1": Value(used.L2D, "W/(m*K)", given=True),
              "L_2": Value(other.L2D, "W/(m*K)", given=True),
              "change": Value(check.relative_change, "1", "%"),
              "tol": Value(check.tolerance, "1", "%", given=True),
              "change_f": Value(check.f_Rsi_change),
              "tol_f": Value(check.f_Rsi_tolerance, given=True)}
    if check.explicit:
        values["size"] = out.input("cell_size")
        text = ("Finite volumes on a uniform mesh of cells of at most {size} through every "
                "region edge and surface end: {cells} cells of {smallest} to {largest}, "
                "L2D = {L_1} (heat flow into the inside surfaces per kelvin of θi − θe). On the "
                "halved mesh ({cells_2} cells) L2D = {L_2}, a change of {change} (criterion "
                "{tol}); f_Rsi changes by {change_f} (criterion {tol_f}).")
    else:
        text = ("Finite volumes on a mesh through every region edge and surface end, graded "
                "towards them and halved until L2D changes by less than {tol} and f_Rsi by "
                "less than {tol_f}: {cells} cells of {smallest} to {largest}, L2D = {L_1} (heat "
                "flow into the inside surfaces per kelvin of θi − θe); on the mesh before, "
                "{cells_2} cells, L2D = {L_2}: a change of {change}; f_Rsi changed by "
                "{change_f}.")
    L2D = out.statement("L_2D", text, bridge.L2D, "W/(m*K)", values=values,
                        label="Thermal coupling coefficient (the solve)",
                        source=MESH_SOURCE, yields="L2D", uses=library)
    if not check.converged:
        what = ("L2D changes by {change}, more than {tol}" if check.relative_change >=
                check.tolerance else "f_Rsi changes by {change_f}, more than {tol_f}")
        out.warn("The mesh check is not met: " + what + " on halving the cells. Give a "
                 "smaller cell_size, or simplify the section (two surfaces held at fixed "
                 "temperatures meeting at a corner never settle).", MESH_SOURCE,
                 change=values["change"], tol=values["tol"], change_f=values["change_f"],
                 tol_f=values["tol_f"])
    return L2D


def _balance_statement(out, bridge, T_i: Value, T_e: Value):
    design = bridge.design
    out.statement(
        "Phi", "Per metre of junction at {theta_i} inside and {theta_e} outside: {in_} in "
        "through the inside surfaces, {out_} out through the outside surfaces, a difference of "
        "{diff}.", design.heat_flow_in, "W/m",
        values={"theta_i": T_i, "theta_e": T_e, "in_": Value(design.heat_flow_in, "W/m"),
                "out_": Value(design.heat_flow_out, "W/m"),
                "diff": Value(design.imbalance, "W/m")},
        label="Heat flow balance (in and out)", source="first law of thermodynamics")


def _psi_steps(out, inp, bridge, L2D: Value):
    if not inp.flanking:
        out.not_reached("psi", "no flanking elements given")
        return
    value = psi(bridge.L2D, [(f["U"], f["length"]) for f in inp.flanking])
    operands = {"L_2D": L2D}
    if len(inp.flanking) <= _FLANKING_IN_ONE_LINE:
        terms = []
        for k, _ in enumerate(inp.flanking, start=1):
            operands[f"U_{k}"] = out.input(f"flanking[{k - 1}].U")
            operands[f"l_{k}"] = out.input(f"flanking[{k - 1}].length")
            terms.append(f"U_{k} * l_{k}")
        expr = "L_2D - " + " - ".join(terms)
    else:
        names = []
        for k, item in enumerate(inp.flanking, start=1):
            U, length = out.input(f"flanking[{k - 1}].U"), out.input(f"flanking[{k - 1}].length")
            operands[f"H_{k}"] = out.step(f"H_{k}", f"U_{k} * l_{k}",
                                          {f"U_{k}": U, f"l_{k}": length}, U.si * length.si,
                                          "W/(m*K)", label=_name(item, "flanking element", k - 1),
                                          source=PSI_SOURCE, group=GROUP_FLANKING,
                                          item=_name(item, "flanking element", k - 1))
            names.append(f"H_{k}")
        expr = "L_2D - (" + " + ".join(names) + ")"
    out.step("psi", expr, operands, value, "W/(m*K)",
             label="Linear thermal transmittance", source=PSI_SOURCE,
             yields="psi", symbols={"psi": r"\Psi"})


def _surface_statements(out, bridge) -> Value:
    surface = bridge.condensation
    R = out.input("condensation_surface_resistance")
    theta = out.statement(
        "theta_si_min", "Solved again on the same mesh with {R} on every inside surface: the "
        "lowest inside surface temperature, corners included, at x = {x}, y = {y}.", bridge.theta_si_min, "K", temperature=ABSOLUTE,
        values={"R": R, "x": Value(bridge.x_si_min, "m"), "y": Value(bridge.y_si_min, "m")},
        label="Coldest inside surface point",
        source=CONDENSATION_RSI_SOURCE, yields="theta_si_min",
        symbols={"theta_si_min": r"\theta_{si,min}"})
    for axis, value in (("x", bridge.x_si_min), ("y", bridge.y_si_min)):
        out.statement(f"{axis}_si_min", "", value, "m", label=f"Its {axis}",
                      yields=f"{axis}_si_min", group="Place of the coldest inside surface point",
                      item=axis)
    return theta


# ----------------------------------------------------------------------------- figure


def _isotherm_levels(theta_i: float, theta_e: float) -> tuple[float, tuple]:
    """Isotherms at a round step in °C strictly between the two air temperatures: the smallest
    step of ``_ISOTHERM_STEPS`` giving at most ``_MOST_ISOTHERMS`` lines. Returns the step [K]
    and the levels [K]."""
    low, high = theta_e - zero_Celsius, theta_i - zero_Celsius
    for step in _ISOTHERM_STEPS:
        first = math.floor(low / step + 1e-9) + 1
        last = math.ceil(high / step - 1e-9) - 1
        if last - first + 1 <= _MOST_ISOTHERMS:
            break
    return step, tuple(zero_Celsius + step * n for n in range(first, last + 1))


def _visible_block(section, index: int):
    """The largest grid block a region still shows after later regions override it, as
    (x0, y0, x1, y1) [m], or None when nothing of it shows."""
    rows, columns = np.nonzero(section.blocks == index)
    if len(rows) == 0:
        return None
    widths = np.diff(section.x_breaks)[columns]
    heights = np.diff(section.y_breaks)[rows]
    # the block that holds the name best: the one whose shorter side is longest
    best = int(np.argmax(np.minimum(widths, 3.0 * heights)))
    j, i = rows[best], columns[best]
    return (section.x_breaks[i], section.y_breaks[j], section.x_breaks[i + 1],
            section.y_breaks[j + 1])


def _material_key(region: dict, lam: Value, k: int) -> tuple[str, str]:
    """What a region is made of, for its shade and the key: (identity, words of the key). The
    key names the material (its conductivity is in the regions table), or the region where the
    region gives its own conductivity."""
    material = region["material"]
    if material is not None:
        return material["name"], material.get("title", material["name"])
    return f"conductivity {lam.si!r}", _name(region, "region", k)


# The drawing: width of the PDF's text [mm]; what the axes' numbers and words take beside and
# below the section, the key beside it, and the height of 7 pt words with their margin [mm]
# (estimates, for choosing which region names fit inside their region).
_WIDTH_MM, _AXES_MM, _BELOW_MM, _CHAR_MM, _LINE_MM = 160.0, 20.0, 14.0, 1.45, 4.5
_KEY_CHAR_MM = 1.15  # a character of the legend's 7.5 pt words, on average
_TALLEST_MM, _SHORTEST_MM = 85.0, 60.0
# The view's shades (calcdoc.render.plots): plain fills first (light grey, white, pale yellow,
# peach, darker grey), then hatched ones.
_SHADE_ORDER = (2, 0, 6, 4, 11, 1, 3, 5, 7, 8, 9, 10)


def _section_figure(out, inp, bridge, conductivities) -> FigureData:
    """The section to scale: regions shaded by material (a key beside), surfaces with their
    resistances, isotherms of the surface-humidity solve and its coldest inside point."""
    section = bridge.design.mesh.section
    field = (bridge.condensation or bridge.design).field
    x0, x1 = float(section.x_breaks[0]), float(section.x_breaks[-1])
    y0, y1 = float(section.y_breaks[0]), float(section.y_breaks[-1])
    pad = 0.03 * max(x1 - x0, y1 - y0)

    # a shade per material, plain fills for the materials of largest area, where most of the
    # isotherms run; hatched shades for the smaller ones
    area, keys = {}, {}
    for k, (region, lam) in enumerate(zip(inp.regions, conductivities)):
        identity, words = _material_key(region, lam, k)
        keys.setdefault(identity, words)
        area[identity] = area.get(identity, 0.0) + float(np.sum(
            (section.blocks == k) * np.outer(np.diff(section.y_breaks), np.diff(section.x_breaks))))
    ranked = sorted(area, key=lambda identity: -area[identity])
    shades = {identity: _SHADE_ORDER[n % len(_SHADE_ORDER)] for n, identity in enumerate(ranked)}
    keys = list(keys.values())
    key_mm = 10.0 + _KEY_CHAR_MM * max([len(w) for w in keys] + [36])  # 36: a surface's words
    plot_width = _WIDTH_MM - _AXES_MM - key_mm
    data_width, data_height = x1 - x0 + 2 * pad, y1 - y0 + 2 * pad
    height = float(np.clip(plot_width * data_height / data_width + _BELOW_MM, _SHORTEST_MM,
                           _TALLEST_MM))
    scale = min(plot_width / data_width, (height - _BELOW_MM) / data_height)  # mm per m

    boxes = []
    for k, (region, lam) in enumerate(zip(inp.regions, conductivities)):
        identity, _ = _material_key(region, lam, k)
        rx, ry = region["x"], region["y"]
        name = _name(region, "region", k)
        shown = _visible_block(section, k)
        label, at = "", None
        if shown is not None:
            wide = (shown[2] - shown[0]) * scale >= _CHAR_MM * len(name) + 2.0
            tall = (shown[3] - shown[1]) * scale >= _LINE_MM
            if wide and tall:
                label = name
                at = ((shown[0] + shown[2]) / 2, (shown[1] + shown[3]) / 2)
        boxes.append(Box(min(rx), min(ry), max(rx), max(ry), label, shade=shades[identity],
                         label_at=at, legend=_material_key(region, lam, k)[1]))

    lines, styles = [], {}
    for k, surface in enumerate(inp.surfaces):
        group = (surface["side"], surface["surface_resistance"])
        first = group not in styles
        if first:
            styles[group] = len(styles)
        label = phrase(f"{surface['side']} surface, R_s = {{R}}",
                       R=out.input(f"surfaces[{k}].surface_resistance")) if first else ""
        (sx, sy), (ex, ey) = surface["from"], surface["to"]
        lines.append(Line((sx, ex), (sy, ey), label, style=styles[group]))

    step, levels = _isotherm_levels(inp.inside_temperature, inp.outside_temperature)
    contours = Contours(tuple(field.x_nodes.tolist()), tuple(field.y_nodes.tolist()),
                        tuple(tuple(row) for row in field.node_temperature.tolist()), "K",
                        "degC", levels)
    caption = phrase(
        "The section to scale, regions shaded by material (key beside), the inside and outside "
        "surfaces with their surface resistances, every other boundary adiabatic; isotherms "
        "every {step} of the solve with {R} on the inside surfaces. The cross marks the coldest "
        "inside surface point, {theta} at x = {x}, y = {y} (f_Rsi = {f}).",
        step=Value(step, "K", temperature=DIFFERENCE, given=True),
        R=out.input("condensation_surface_resistance"),
        theta=out.value_of("theta_si_min"), x=out.value_of("x_si_min"),
        y=out.value_of("y_si_min"), f=Value(bridge.f_Rsi))
    return FigureData(
        key=f"{out.block_key}-section", caption=caption,
        x=Axis("x", "m", "m", (x0 - pad, x1 + pad)), y=Axis("y", "m", "m", (y0 - pad, y1 + pad)),
        lines=tuple(lines), boxes=tuple(boxes), contours=contours,
        points=(Point(bridge.x_si_min, bridge.y_si_min, "coldest inside surface point"),),
        legend="outside", equal_aspect=True, size=(_WIDTH_MM, height))


# ----------------------------------------------------------------------------- the kind

THERMAL_BRIDGE = Kind(
    name="thermal_bridge",
    title="Junction, steady two-dimensional conduction",
    summary="L2D, the linear thermal transmittance ψ and the temperature factor f_Rsi of a "
            "junction from a two-dimensional section of rectangular regions (ISO 10211), the "
            "mesh refined until halving it changes L2D by less than 1 %.",
    inputs=(
        Items("regions", "rectangles of the section, each of one material; a later region "
              "overrides an earlier one where they overlap; a point covered by none is not "
              "part of the body", fields=REGION_FIELDS,
              exactly_one=(("conductivity", "material"),), min_items=1),
        Items("surfaces", "segments of the body's boundary facing the inside or the outside; "
              "every other boundary is adiabatic", fields=SURFACE_FIELDS, min_items=2),
        Quantity("inside_temperature", "inside air temperature (the warm side)", unit="K",
                 temperature=ABSOLUTE, greater_than=0.0),
        Quantity("outside_temperature", "outside air temperature", unit="K",
                 temperature=ABSOLUTE, greater_than=0.0),
        Items("flanking", "flanking elements: ψ = L2D − Σ U·l (the lengths set whether ψ is on "
              "internal or external dimensions)", default=None, fields=FLANKING_FIELDS,
              min_items=1),
        Quantity("condensation_surface_resistance",
                 "inside surface resistance for θ_si,min and f_Rsi (never for L2D)",
                 default="0.25 m^2*K/W", source=CONDENSATION_RSI_SOURCE, unit="m^2*K/W",
                 at_least=0.0),
        Quantity("cell_size", "largest cell of one uniform mesh (omitted: refined until "
                 "halving changes L2D by less than 1 % and f_Rsi by less than 0.005)",
                 default=None, unit="m", greater_than=0.0, display="mm"),
    ),
    results=(
        ResultSpec("L2D", "W/(m*K)", "heat flow inside to outside per kelvin and metre"),
        ResultSpec("psi", "W/(m*K)", "linear thermal transmittance, L2D − Σ U·l"),
        ResultSpec("theta_si_min", "K", "lowest inside surface temperature (R_si,sc)",
                   temperature=ABSOLUTE),
        ResultSpec("f_Rsi", "1", "temperature factor at the coldest inside point"),
        ResultSpec("x_si_min", "m", "x of the coldest inside point"),
        ResultSpec("y_si_min", "m", "y of the coldest inside point"),
    ),
    compute=_compute,
    caution=CAUTION,
    # The solver names list items as the sheet does (regions[1].x, surfaces[2], flanking[0].U);
    # the inside and outside temperatures, cell_size and condensation_surface_resistance are
    # named alike. A section too fine for the default refinement is the regions' doing.
    input_names={"max_cells": "regions"},
    references=("ISO 10211:2017", "ISO 13788:2012"),
)

KINDS = (THERMAL_BRIDGE,)
