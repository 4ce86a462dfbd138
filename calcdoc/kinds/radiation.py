"""Surface radiation kinds: emission, two-surface exchange, view factors, radiant exposure.

The physics is in :mod:`calcdoc.physics.radiation`, :mod:`calcdoc.physics.viewfactors` and
:mod:`calcdoc.physics.exposure`; this module declares the inputs and results of docs/format.md and
records the working as data: each closed-form step in the formula language over named operands,
each view factor whose closed form needs an arctangent (which the formula language does not
have) as a statement naming its catalogue case after the dimensionless ratios it takes, and the
two radiant-exposure figures as :class:`~calcdoc.data.FigureData`.
"""

from __future__ import annotations

import functools

import numpy as np

from calcdoc.data import Axis, Box, FigureData, Line, Mark, Point, Value, phrase
from calcdoc.errors import MissingInput
from calcdoc.expressions import ExpressionError, parse_expression
from calcdoc.kinds.base import (ABSOLUTE, REQUIRED, Choice, Items, Kind, Quantity, Record,
                                ResultSpec, Text)
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.exposure import (Emitter, MinimumSeparation, flux_against_separation,
                                      incident_flux, minimum_separation, worst_point)
from calcdoc.physics.radiation import (emissive_power, enclosed_body_exchange,
                                       net_flux_to_surroundings, parallel_plates_exchange,
                                       two_surface_enclosure_exchange)
from calcdoc.physics.viewfactors import (coaxial_disks, element_to_rectangle,
                                         element_to_rectangle_corner, opposed_rectangles,
                                         perpendicular_rectangles, reciprocal_view_factor)

__all__ = ["KINDS"]

# Sources as the package cites them, "document (year), place" (calcdoc.references): the
# references list holds each document once. Howell: J. R. Howell, A Catalog of Radiation Heat
# Transfer Configuration Factors, 3rd ed., University of Texas at Austin (2010). Incropera:
# T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, Fundamentals of Heat and Mass
# Transfer, 7th ed., Wiley (2011).
HOWELL = "Howell (2010)"
INCROPERA = "Incropera (2011)"
# The worst-point search and the minimum-separation solve are calcdoc's own method, with
# scipy's optimisers
SEARCH_METHOD = "calcdoc's global search (scipy.optimize.minimize, L-BFGS-B)"
BRENT = "Brent's method (scipy.optimize.brentq) on a bracketing scan"
STEFAN_BOLTZMANN_LAW = "Stefan–Boltzmann law, σ of CODATA 2018 (exact in the SI since 2019)"
SAFETY = ("This calculation supports, and does not replace, the judgement of a licensed engineer "
          "and the requirements of the local code and the authority having jurisdiction.")

W_M2 = "W/m^2"
KW_M2 = "kW/m^2"


def _temperature(name: str, meaning: str, default=REQUIRED) -> Quantity:
    return Quantity(name, meaning, default=default, unit="K", temperature=ABSOLUTE,
                    greater_than=0.0)


def _emissivity(name: str, meaning: str, default=REQUIRED, source: str = "") -> Quantity:
    return Quantity(name, meaning, default=default, source=source, unit="1", greater_than=0.0,
                    at_most=1.0)


def _length(name: str, meaning: str, default=REQUIRED, positive: bool = True) -> Quantity:
    return Quantity(name, meaning, default=default, unit="m",
                    greater_than=0.0 if positive else None)


def _area(name: str, meaning: str, default=None) -> Quantity:
    return Quantity(name, meaning, default=default, unit="m^2", greater_than=0.0)


def _fits(expr: str) -> bool:
    """Whether an expression is within the formula language's length and depth limits (a sum
    over very many shields or emitters is not)."""
    try:
        parse_expression(expr)
    except ExpressionError:
        return False
    return True


def _in_group(out, group: str, item: str) -> None:
    """Put the statement just recorded in a group of like items (one per list item).

    ``BlockOutput.statement`` takes no ``group``/``item`` (``step`` does); a view factor with an
    arctangent per emitter is still one formula applied to each emitter."""
    out.steps[-1].group = group
    out.steps[-1].item = item


# ============================================================================ surface_emission


def _surface_emission(inp, out):
    t, eps = inp.temperature, inp.emissivity
    operands = {"varepsilon": out.input("emissivity"), "T": out.input("temperature")}
    e = out.step("E", "varepsilon * sigma * T ** 4", operands, emissive_power(t, eps), W_M2,
                 label="Emissive power", source=STEFAN_BOLTZMANN_LAW, yields="E")
    if inp.area is not None:
        area = out.input("area")
        out.step("Q", "E * A", {"E": e, "A": area}, e.si * inp.area, "W",
                 label="Emitted power over the area", yields="Q")
    else:
        out.not_reached("Q", "no area given")
    if inp.surroundings_temperature is not None:
        q_net = net_flux_to_surroundings(t, inp.surroundings_temperature, eps)
        q = out.step("q_net", "varepsilon * sigma * (T ** 4 - T_sur ** 4)",
                     {**operands, "T_sur": out.input("surroundings_temperature")}, q_net, W_M2,
                     label="Net flux to the surroundings (positive outward)",
                     source=f"{INCROPERA}, Eq. 1.7", yields="q_net")
        out.note("The surroundings are large, isothermal and enclose the surface, so they act as "
                 "a black body whatever their own emissivity.", f"{INCROPERA}, §1.2.3")
        if inp.area is not None:
            out.step("Q_net", "q_net * A", {"q_net": q, "A": out.input("area")},
                     q.si * inp.area, "W", label="Net power to the surroundings",
                     yields="Q_net")
        else:
            out.not_reached("Q_net", "no area given")
    else:
        out.not_reached("q_net", "no surroundings temperature given")
        out.not_reached("Q_net", "no surroundings temperature given")
    out.note("Grey, diffuse surface: one total hemispherical emissivity for all wavelengths and "
             "directions.", STEFAN_BOLTZMANN_LAW)


SURFACE_EMISSION = Kind(
    name="surface_emission",
    title="Emission from a grey surface",
    summary="Emissive power of a grey diffuse surface (Stefan–Boltzmann law), and its net "
            "exchange with large surroundings.",
    inputs=(
        _temperature("temperature", "absolute temperature of the surface"),
        _emissivity("emissivity", "total hemispherical emissivity of the surface"),
        _area("area", "area of the surface (for the total powers)"),
        _temperature("surroundings_temperature",
                     "absolute temperature of large surroundings that enclose the surface "
                     "(for the net exchange)", default=None),
    ),
    results=(
        ResultSpec("E", W_M2, "emissive power εσT⁴"),
        ResultSpec("Q", "W", "emitted power E·A"),
        ResultSpec("q_net", W_M2, "net flux to the surroundings, positive outward"),
        ResultSpec("Q_net", "W", "net power to the surroundings, positive outward"),
    ),
    compute=_surface_emission,
    caution=SAFETY,
    references=(STEFAN_BOLTZMANN_LAW, INCROPERA),
)


# ============================================================================ radiation_exchange


def _check_exchange_inputs(inp):
    """Refuse inputs that the configuration does not use; ask for those it needs."""
    config = inp.configuration
    if inp.view_factor is not None and config != "general":
        raise PhysicsRangeError("view_factor", inp.view_factor,
                                f"no view_factor for configuration {config} (it is for "
                                "configuration general only)")
    if inp.shields and config != "parallel_plates":
        raise PhysicsRangeError("shields.emissivity_1", inp.shields[0]["emissivity_1"],
                                f"no shields for configuration {config} (they are for "
                                "parallel_plates only)", index=0)
    if inp.emissivity_2 is None and (config != "enclosed_body" or inp.area_2 is not None):
        raise MissingInput("emissivity_2", f"emissivity_2 for configuration {config}")
    if config == "general":
        for name in ("area_1", "area_2", "view_factor"):
            if inp[name] is None:
                raise MissingInput(name, f"{name} for configuration general")
    if config == "enclosed_body" and inp.area_2 is not None and inp.area_1 is None:
        raise MissingInput("area_1", "area_1 (the body's area) when area_2 is given")


def _shield_name(k: int) -> str:
    return f"shield {k + 1}"


def _radiation_exchange(inp, out):
    _check_exchange_inputs(inp)
    config = inp.configuration
    t1, t2, e1, e2 = inp.temperature_1, inp.temperature_2, inp.emissivity_1, inp.emissivity_2
    shields = inp.shields or []
    ops = {"varepsilon_1": out.input("emissivity_1")}
    if e2 is not None:
        ops["varepsilon_2"] = out.input("emissivity_2")

    if config == "parallel_plates":
        pairs = [(s["emissivity_1"], s["emissivity_2"]) for s in shields]
        result = parallel_plates_exchange(t1, t2, e1, e2, shields=pairs)
        terms = ["1 / varepsilon_1 + 1 / varepsilon_2 - 1"]
        for k in range(len(pairs)):
            n = k + 1
            ops[f"varepsilon_s{n}_1"] = out.input(f"shields[{k}].emissivity_1")
            ops[f"varepsilon_s{n}_2"] = out.input(f"shields[{k}].emissivity_2")
            terms.append(f"1 / varepsilon_s{n}_1 + 1 / varepsilon_s{n}_2 - 1")
        expr = "1 / (" + " + ".join(terms) + ")"
        label = "Effective emissivity of large parallel plates"
        if pairs:
            label += ", each shield adding the resistance of one more gap"
        source = f"{INCROPERA}, Table 13.3" + (" and §13.3.4, Eq. 13.24" if pairs else "")
        if not _fits(expr):
            # Too many shields for one line of working: the plates' and each shield's
            # resistance first (dimensionless: resistance times area), then their sum.
            r_plates = out.step("R_p", "1 / varepsilon_1 + 1 / varepsilon_2 - 1",
                                {"varepsilon_1": ops["varepsilon_1"],
                                 "varepsilon_2": ops["varepsilon_2"]},
                                1.0 / e1 + 1.0 / e2 - 1.0, "1",
                                label="Resistance of the plates alone (dimensionless)",
                                source=source)
            resistances = {"R_p": r_plates}
            for k in range(len(pairs)):
                n = k + 1
                resistances[f"R_s{n}"] = out.step(
                    f"R_s{n}", f"1 / varepsilon_s{n}_1 + 1 / varepsilon_s{n}_2 - 1",
                    {f"varepsilon_s{n}_1": ops[f"varepsilon_s{n}_1"],
                     f"varepsilon_s{n}_2": ops[f"varepsilon_s{n}_2"]},
                    1.0 / pairs[k][0] + 1.0 / pairs[k][1] - 1.0, "1",
                    label="Resistance added by the shield (dimensionless)", source=source,
                    group="Resistance added by each shield", item=_shield_name(k))
            total_value = sum(r.si for r in resistances.values())
            total_expr = " + ".join(resistances)
            if _fits(total_expr):
                total = out.step("R_total", total_expr, resistances, total_value, "1",
                                 label="Total resistance (dimensionless)", source=source)
            else:
                total = out.statement("R_total", "Sum of the plates' resistance {r_p} and the "
                                      "resistances added by the {n} shields", total_value,
                                      "1", values={"r_p": r_plates,
                                                   "n": Value(len(pairs), given=True)},
                                      label="Total resistance (dimensionless)", source=source)
            eps_eff = out.step("varepsilon_eff", "1 / R_total", {"R_total": total},
                               1.0 / total_value, "1", label=label, source=source,
                               yields="effective_emissivity")
        else:
            eps_eff = out.step("varepsilon_eff", expr, dict(ops), result.effective_emissivity,
                               "1", label=label, source=source, yields="effective_emissivity")
        if pairs:
            out.note("Shields are thin, conduct well (one temperature through each) and are large "
                     "enough that each surface sees only its neighbours; a shield's "
                     "emissivity_1 is its face towards surface 1.", f"{INCROPERA}, §13.3.4")
    elif config == "enclosed_body":
        result = enclosed_body_exchange(t1, t2, e1, e2 if e2 is not None else 1.0, inp.area_1,
                                        inp.area_2)
        if inp.area_2 is None:
            eps_eff = out.step("varepsilon_eff", "varepsilon_1",
                               {"varepsilon_1": ops["varepsilon_1"]},
                               result.effective_emissivity, "1",
                               label="Effective emissivity, small convex body in a large "
                                     "enclosure (A₁/A₂ → 0)",
                               source=f"{INCROPERA}, Table 13.3",
                               yields="effective_emissivity")
        else:
            eps_eff = out.step("varepsilon_eff",
                               "1 / (1 / varepsilon_1 + (1 - varepsilon_2) / varepsilon_2 * "
                               "A_1 / A_2)",
                               {**ops, "A_1": out.input("area_1"), "A_2": out.input("area_2")},
                               result.effective_emissivity, "1",
                               label="Effective emissivity, convex body inside an enclosure",
                               source=f"{INCROPERA}, Table 13.3",
                               yields="effective_emissivity")
        out.note("The body is convex (it does not see itself, F₁₂ = 1) and the enclosure is "
                 "closed; A₁ ≤ A₂.", f"{INCROPERA}, Table 13.3")
    else:
        result = two_surface_enclosure_exchange(t1, t2, e1, e2, inp.area_1, inp.area_2,
                                                inp.view_factor)
        eps_eff = out.step("varepsilon_eff",
                           "1 / ((1 - varepsilon_1) / varepsilon_1 + 1 / F_12 + "
                           "(1 - varepsilon_2) / varepsilon_2 * A_1 / A_2)",
                           {**ops, "F_12": out.input("view_factor"),
                            "A_1": out.input("area_1"), "A_2": out.input("area_2")},
                           result.effective_emissivity, "1",
                           label="Exchange factor of a closed two-surface enclosure",
                           source=f"{INCROPERA}, §13.3.3, Eq. 13.23",
                           yields="effective_emissivity")
        out.note("The two surfaces close the enclosure (F₁₁ = 1 − F₁₂, F₂₂ = 1 − F₂₁); "
                 "A₁·F₁₂ ≤ A₂ is enforced.", f"{INCROPERA}, §13.3.3")

    temperatures = {"T_1": out.input("temperature_1"), "T_2": out.input("temperature_2")}
    q = out.step("q", "varepsilon_eff * sigma * (T_1 ** 4 - T_2 ** 4)",
                 {"varepsilon_eff": eps_eff, **temperatures}, result.q, W_M2,
                 label="Net flux per unit area of surface 1 (positive 1 → 2)",
                 source=STEFAN_BOLTZMANN_LAW, yields="q")
    if inp.area_1 is not None:
        out.step("Q", "q * A_1", {"q": q, "A_1": out.input("area_1")}, result.q * inp.area_1,
                 "W", label="Net power from surface 1 to surface 2", yields="Q")
    else:
        out.not_reached("Q", "no area_1 given")
    if result.shield_temperatures:
        # Gap k lies between the face before it (surface 1 or shield k's face towards surface
        # 2) and shield k + 1's face towards surface 1; every gap carries the same net flux.
        previous, previous_name, previous_face = temperatures["T_1"], "T_1", "varepsilon_1"
        for k, temperature in enumerate(result.shield_temperatures):
            n = k + 1
            face = f"varepsilon_s{n}_1"
            name = f"T_s{n}"
            previous = out.step(
                name, f"({previous_name} ** 4 - q / sigma * (1 / {previous_face} + 1 / {face} "
                "- 1)) ** 0.25",
                {previous_name: previous, "q": q, previous_face: ops[previous_face],
                 face: ops[face]},
                temperature, "K", temperature=ABSOLUTE,
                label=f"Temperature of {_shield_name(k)} (the same net flux crosses every gap)",
                source=f"{INCROPERA}, §13.3.4", group="Shield temperatures",
                item=_shield_name(k))
            previous_name, previous_face = name, f"varepsilon_s{n}_2"
        out.result("shield_temperatures", list(result.shield_temperatures))
    elif config == "parallel_plates":
        out.not_reached("shield_temperatures", "no shields")
    out.note("Grey, diffuse, opaque, isothermal surfaces; nothing in between absorbs or emits; "
             "steady state.", f"{INCROPERA}, §13.3")


_SHIELD_FIELDS = (
    _emissivity("emissivity_1", "emissivity of the shield's face towards surface 1"),
    _emissivity("emissivity_2", "emissivity of the shield's face towards surface 2"),
)

RADIATION_EXCHANGE = Kind(
    name="radiation_exchange",
    title="Radiation exchange between two grey surfaces",
    summary="Net radiation between two grey diffuse surfaces: large parallel plates (with any "
            "number of shields), a convex body in an enclosure, or a closed two-surface "
            "enclosure with a view factor.",
    inputs=(
        Choice("configuration", "arrangement of the two surfaces",
               options=("parallel_plates", "enclosed_body", "general")),
        _temperature("temperature_1", "absolute temperature of surface 1"),
        _temperature("temperature_2", "absolute temperature of surface 2"),
        _emissivity("emissivity_1", "emissivity of surface 1"),
        _emissivity("emissivity_2", "emissivity of surface 2 (not needed for a body in a large "
                    "enclosure)", default=None),
        _area("area_1", "area of surface 1 (for Q; required for general and with area_2)"),
        _area("area_2", "area of surface 2 (general; enclosed_body: omitted means a large "
              "enclosure, A1 <= A2)"),
        Quantity("view_factor", "view factor F12 from surface 1 to surface 2 (general only; "
                 "A1*F12 <= A2)", default=None, unit="1", greater_than=0.0, at_most=1.0),
        Items("shields", "radiation shields between parallel plates, ordered from surface 1, "
              "each {emissivity_1 (face towards surface 1), emissivity_2}", default=None,
              fields=_SHIELD_FIELDS),
    ),
    results=(
        ResultSpec("q", W_M2, "net flux per unit area of surface 1, positive 1 → 2"),
        ResultSpec("Q", "W", "net power q·A1, positive 1 → 2"),
        ResultSpec("effective_emissivity", "1", "q / (σ(T1⁴ − T2⁴))"),
        ResultSpec("shield_temperatures", "K", "temperature of each shield, from surface 1",
                   temperature=ABSOLUTE, list=True),
    ),
    compute=_radiation_exchange,
    caution=SAFETY,
    references=(STEFAN_BOLTZMANN_LAW, INCROPERA),
    input_names={"shields": "shields[{index}].emissivity_1",
                 "shields.emissivity_1": "shields[{index}].emissivity_1",
                 "shields.emissivity_2": "shields[{index}].emissivity_2"},
)


# ============================================================================ view_factor

_GEOMETRY_INPUTS = {
    "opposed_rectangles": ("width", "height", "separation"),
    "perpendicular_rectangles": ("common_edge", "width_1", "width_2"),
    "element_to_rectangle": ("width", "height", "separation", "element_x", "element_y"),
    "coaxial_disks": ("radius_1", "radius_2", "separation"),
}
_OPTIONAL = {"element_x", "element_y"}
_DIMENSIONS = ("width", "height", "separation", "common_edge", "width_1", "width_2",
               "element_x", "element_y", "radius_1", "radius_2")


def _check_geometry(inp):
    geometry = inp.geometry
    wanted = _GEOMETRY_INPUTS[geometry]
    for name in _DIMENSIONS:
        value = inp[name]
        if value is not None and name not in wanted:
            users = [g for g, names in _GEOMETRY_INPUTS.items() if name in names]
            raise PhysicsRangeError(name, value, f"only the inputs {', '.join(wanted)} for "
                                    f"geometry {geometry} ({name} is for "
                                    f"{' or '.join(users)})")
        if value is None and name in wanted and name not in _OPTIONAL:
            raise MissingInput(name, f"{name} for geometry {geometry}")


def _catalogue(out, case: str, what: str, ratios: dict, value: float):
    """Record a catalogue view factor as a statement after its ratios (its closed form has
    arctangents, which the formula language does not have)."""
    places = " and ".join(f"{name} = {{{name}}}" for name in ratios)
    return out.statement("F_12", f"Howell's catalogue case {case} ({what}) at {places}", value,
                         "1", values=ratios, label=f"View factor, {what}",
                         source=f"{HOWELL}, case {case}", yields="F12")


def _view_factor(inp, out):
    _check_geometry(inp)
    geometry = inp.geometry
    f21_equal = False
    if geometry == "opposed_rectangles":
        a, b, c = (out.input(n) for n in ("width", "height", "separation"))
        f12 = opposed_rectangles(inp.width, inp.height, inp.separation)
        x = out.step("X", "a / c", {"a": a, "c": c}, inp.width / inp.separation,
                     label="Width over separation", source=f"{HOWELL}, case C-11")
        y = out.step("Y", "b / c", {"b": b, "c": c}, inp.height / inp.separation,
                     label="Height over separation", source=f"{HOWELL}, case C-11")
        f = _catalogue(out, "C-11", "identical, parallel, directly opposed rectangles",
                       {"X": x, "Y": y}, f12)
        area_1 = out.step("A_1", "a * b", {"a": a, "b": b}, inp.width * inp.height, "m^2",
                          label="Area of rectangle 1", yields="area_1")
        area_2 = out.step("A_2", "a * b", {"a": a, "b": b}, inp.width * inp.height, "m^2",
                          label="Area of rectangle 2 (identical)", yields="area_2")
        f21_equal = True
    elif geometry == "perpendicular_rectangles":
        length, w1, w2 = (out.input(n) for n in ("common_edge", "width_1", "width_2"))
        f12 = perpendicular_rectangles(inp.common_edge, inp.width_1, inp.width_2)
        w = out.step("W", "w_1 / l", {"w_1": w1, "l": length}, inp.width_1 / inp.common_edge,
                     label="Width of rectangle 1 over the common edge",
                     source=f"{HOWELL}, case C-14")
        h = out.step("H", "w_2 / l", {"w_2": w2, "l": length}, inp.width_2 / inp.common_edge,
                     label="Width of rectangle 2 over the common edge",
                     source=f"{HOWELL}, case C-14")
        f = _catalogue(out, "C-14", "perpendicular rectangles with a common edge, from "
                       "rectangle 1 (width_1) to rectangle 2 (width_2)", {"W": w, "H": h}, f12)
        area_1 = out.step("A_1", "l * w_1", {"l": length, "w_1": w1},
                          inp.common_edge * inp.width_1, "m^2", label="Area of rectangle 1",
                          yields="area_1")
        area_2 = out.step("A_2", "l * w_2", {"l": length, "w_2": w2},
                          inp.common_edge * inp.width_2, "m^2", label="Area of rectangle 2",
                          yields="area_2")
    elif geometry == "element_to_rectangle":
        _element_to_rectangle(inp, out)
        return
    else:
        r1, r2, h = (out.input(n) for n in ("radius_1", "radius_2", "separation"))
        f12 = coaxial_disks(inp.radius_1, inp.radius_2, inp.separation)
        big_r1 = out.step("R_1", "r_1 / h", {"r_1": r1, "h": h}, inp.radius_1 / inp.separation,
                          label="Radius of disk 1 over the separation",
                          source=f"{HOWELL}, case C-41")
        big_r2 = out.step("R_2", "r_2 / h", {"r_2": r2, "h": h}, inp.radius_2 / inp.separation,
                          label="Radius of disk 2 over the separation",
                          source=f"{HOWELL}, case C-41")
        x = out.step("X", "1 + (1 + R_2 ** 2) / R_1 ** 2", {"R_1": big_r1, "R_2": big_r2},
                     1.0 + (1.0 + big_r2.si ** 2) / big_r1.si ** 2,
                     source=f"{HOWELL}, case C-41")
        # The catalogue's (X − √(X² − 4(R₂/R₁)²))/2, multiplied out so that a small disk 2
        # loses no digits to cancellation (the physics evaluates it so, too).
        f = out.step("F_12", "2 * (R_2 / R_1) ** 2 / (X + sqrt(X ** 2 - 4 * (R_2 / R_1) ** 2))",
                     {"R_1": big_r1, "R_2": big_r2, "X": x}, f12,
                     label="Coaxial parallel disks, disk 1 to disk 2: the catalogue's "
                           "½[X − √(X² − 4(R₂/R₁)²)] with the root rationalised",
                     source=f"{HOWELL}, case C-41", yields="F12")
        area_1 = out.step("A_1", "pi * r_1 ** 2", {"r_1": r1}, np.pi * inp.radius_1 ** 2,
                          "m^2", label="Area of disk 1", yields="area_1")
        area_2 = out.step("A_2", "pi * r_2 ** 2", {"r_2": r2}, np.pi * inp.radius_2 ** 2,
                          "m^2", label="Area of disk 2", yields="area_2")
    f21 = reciprocal_view_factor(f.si, area_1.si, area_2.si)
    out.step("F_21", "A_1 * F_12 / A_2", {"A_1": area_1, "F_12": f, "A_2": area_2}, f21,
             label="Reverse factor by reciprocity" + (" (identical rectangles: F₂₁ = F₁₂)"
                                                       if f21_equal else ""),
             source=f"{INCROPERA}, Eq. 13.3", yields="F21")
    out.note("Diffuse surfaces; the factor is purely geometric.", HOWELL)


_CORNERS = (("A_1", "B_1"), ("A_2", "B_1"), ("A_1", "B_2"), ("A_2", "B_2"))
_SUBSCRIPT = {"A_1": "A₁", "A_2": "A₂", "B_1": "B₁", "B_2": "B₂"}
_CORNER_NAMES = ("towards the right and top edges", "towards the left and top edges",
                 "towards the right and bottom edges", "towards the left and bottom edges")


def _element_to_rectangle(inp, out):
    """A plane element facing a rectangle: the four corner rectangles of case B-3 that meet at
    its foot point, each a statement, and their sum."""
    a, b, c = (out.input(n) for n in ("width", "height", "separation"))
    element_to_rectangle(inp.width, inp.height, inp.separation,
                         inp.element_x if inp.element_x is not None else 0.0,
                         inp.element_y if inp.element_y is not None else 0.0)  # range checks
    source = f"{HOWELL}, case B-3"
    if inp.element_x is not None:
        x_e = out.input("element_x")
    else:
        x_e = out.step("x_e", "a / 2", {"a": a}, inp.width / 2.0,
                       "m", label="Foot point at mid-width (element_x not given)")
    if inp.element_y is not None:
        y_e = out.input("element_y")
    else:
        y_e = out.step("y_e", "b / 2", {"b": b}, inp.height / 2.0,
                       "m", label="Foot point at mid-height (element_y not given)")
    if inp.element_x is None or inp.element_y is None:
        out.note("The element's foot point defaults to the centre of the rectangle "
                 "where element_x or element_y is not given.")
    ratios = {
        "A_1": out.step("A_1", "(a - x_e) / c", {"a": a, "x_e": x_e, "c": c},
                        (inp.width - x_e.si) / inp.separation,
                        label="Distance from the foot point to the right edge over the "
                              "separation (negative beyond it)", source=source),
        "A_2": out.step("A_2", "x_e / c", {"x_e": x_e, "c": c}, x_e.si / inp.separation,
                        label="Distance from the foot point to the left edge over the "
                              "separation (negative beyond it)", source=source),
        "B_1": out.step("B_1", "(b - y_e) / c", {"b": b, "y_e": y_e, "c": c},
                        (inp.height - y_e.si) / inp.separation,
                        label="Distance from the foot point to the top edge over the "
                              "separation (negative beyond it)", source=source),
        "B_2": out.step("B_2", "y_e / c", {"y_e": y_e, "c": c}, y_e.si / inp.separation,
                        label="Distance from the foot point to the bottom edge over the "
                              "separation (negative beyond it)", source=source),
    }
    parts = {}
    for k, (name_a, name_b) in enumerate(_CORNERS, start=1):
        ratio_a, ratio_b = ratios[name_a].si, ratios[name_b].si
        values = {"A": Value(abs(ratio_a)), "B": Value(abs(ratio_b))}
        if ratio_a == 0.0 or ratio_b == 0.0:
            part = 0.0
            text = ("The corner rectangle has no area (the foot point is on an edge): it adds "
                    "nothing")
            values = {}
        else:
            sign = 1.0 if ratio_a * ratio_b > 0 else -1.0
            part = sign * float(element_to_rectangle_corner(abs(ratio_a), abs(ratio_b), 1.0))
            text = ("Howell's catalogue case B-3 (plane element under a corner of a parallel "
                    f"rectangle) at A = |{_SUBSCRIPT[name_a]}| = {{A}} and "
                    f"B = |{_SUBSCRIPT[name_b]}| = {{B}}")
            if sign < 0:
                text += ", taken negative: this corner rectangle reaches beyond the rectangle"
        parts[f"F_{k}"] = out.statement(f"F_{k}", text, part, "1", values=values,
                                        label=f"Corner rectangle {_CORNER_NAMES[k - 1]}",
                                        source=source)
        _in_group(out, "Corner rectangles at the foot point", f"{name_a}, {name_b}")
    f12 = sum(p.si for p in parts.values())
    out.step("F_12", "F_1 + F_2 + F_3 + F_4", parts, f12,
             label="Element to the rectangle, by superposition of the four corner rectangles",
             source=f"{INCROPERA}, §13.1.2 (superposition)", yields="F12")
    out.step("A_2", "a * b", {"a": a, "b": b}, inp.width * inp.height, "m^2",
             label="Area of the rectangle", yields="area_2")
    why = "surface 1 is a differential element (no finite area)"
    out.not_reached("F21", why)
    out.not_reached("area_1", why)
    out.note("The receiver is a small plane element parallel to the rectangle and facing "
             "it; its foot point is measured from the rectangle's lower-left corner and may "
             "lie outside the rectangle.", source)
    out.note("Diffuse surfaces; the factor is purely geometric.", HOWELL)


VIEW_FACTOR = Kind(
    name="view_factor",
    title="View factor from a catalogue of closed-form cases",
    summary="Configuration factors of diffuse surfaces from Howell's catalogue: opposed "
            "rectangles (C-11), perpendicular rectangles (C-14), a plane element to a parallel "
            "rectangle at any foot point (B-3 by superposition), coaxial disks (C-41).",
    inputs=(
        Choice("geometry", "catalogue case", options=tuple(_GEOMETRY_INPUTS)),
        _length("width", "rectangle side along x (opposed_rectangles, element_to_rectangle)",
                default=None),
        _length("height", "rectangle side along y (opposed_rectangles, element_to_rectangle)",
                default=None),
        _length("separation", "distance between the parallel planes (opposed_rectangles, "
                "element_to_rectangle, coaxial_disks)", default=None),
        _length("common_edge", "length of the shared edge (perpendicular_rectangles)",
                default=None),
        _length("width_1", "width of rectangle 1 away from the common edge "
                "(perpendicular_rectangles)", default=None),
        _length("width_2", "width of rectangle 2 away from the common edge "
                "(perpendicular_rectangles)", default=None),
        _length("element_x", "x of the element's foot point from the rectangle's lower-left "
                "corner; may be outside (element_to_rectangle; default the centre)",
                default=None, positive=False),
        _length("element_y", "y of the element's foot point from the rectangle's lower-left "
                "corner; may be outside (element_to_rectangle; default the centre)",
                default=None, positive=False),
        _length("radius_1", "radius of disk 1 (coaxial_disks)", default=None),
        _length("radius_2", "radius of disk 2 (coaxial_disks)", default=None),
    ),
    results=(
        ResultSpec("F12", "1", "view factor from surface 1 to surface 2"),
        ResultSpec("F21", "1", "view factor from surface 2 to surface 1 (where both areas "
                   "exist)"),
        ResultSpec("area_1", "m^2", "area of surface 1"),
        ResultSpec("area_2", "m^2", "area of surface 2"),
    ),
    compute=_view_factor,
    references=(HOWELL, INCROPERA),
)


# ============================================================================ radiant_exposure

_EMITTER_FIELDS = (
    Text("name", "name of the emitting rectangle (e.g. a door opening)", default=None),
    _length("width", "width along x"),
    _length("height", "height along y"),
    _length("x", "x of the lower-left corner in the emitting plane", positive=False),
    _length("y", "y of the lower-left corner in the emitting plane", positive=False),
    _temperature("temperature", "absolute temperature of the radiating surface or fire behind "
                 "the opening (or give emissive_power)", default=None),
    _emissivity("emissivity", "emissivity, with temperature only (omitted: 1, a black "
                "opening)", default=None),
    Quantity("emissive_power", "emissive power of the rectangle, instead of temperature and "
             "emissivity", default=None, unit=W_M2, greater_than=0.0, display=KW_M2),
)

_RECEIVER_FIELDS = (
    _length("x", "x of the receiver's foot point in the emitting plane's axes", positive=False),
    _length("y", "y of the receiver's foot point in the emitting plane's axes", positive=False),
)

_EXPOSURE_CAUTION = (SAFETY + " Separation and boundary-distance decisions belong to the local "
                     "code and a licensed engineer: this incident flux is one input to them, "
                     "not the decision.")

_SEARCH = ("a grid over the openings' extent (plus {margin} of it), then a bounded optimiser "
           "(L-BFGS-B) from the best grid peaks")
_SEARCH_MARGIN = 0.05  # of the openings' extent, each side: the physics' own default


@functools.lru_cache(maxsize=64)
def _minimum_separation(emitters: tuple[Emitter, ...], limit: float,
                        receiver: tuple[float, float] | None) -> MinimumSeparation:
    """``minimum_separation``, remembered: it does not depend on the block's separation, and a
    sheet often checks the same openings against the same limit at several separations."""
    return minimum_separation(list(emitters), limit, receiver)


def _radiant_exposure(inp, out):
    emitters, names, powers = [], [], []
    group_e = "Emissive power of each emitter"
    for k, item in enumerate(inp.emitters):
        n = k + 1
        name = item["name"] or f"emitter {n}"
        names.append(name)
        if item["temperature"] is not None:
            if item["emissivity"] is not None:
                eps = out.input(f"emitters[{k}].emissivity")
                label = f"Emissive power of {name}"
            else:
                eps = Value(1.0, "1", given=True)
                label = f"Emissive power of {name} (no emissivity given: a black opening)"
            power = out.step(f"E_{n}", f"varepsilon_{n} * sigma * T_{n} ** 4",
                             {f"varepsilon_{n}": eps, f"T_{n}": out.input(
                                 f"emitters[{k}].temperature")},
                             emissive_power(item["temperature"], eps.si), W_M2,
                             display=KW_M2, label=label, source=STEFAN_BOLTZMANN_LAW,
                             group=group_e, item=name)
        else:
            power = out.input(f"emitters[{k}].emissive_power")
        powers.append(power)
        emitters.append(Emitter(item["x"], item["y"], item["width"], item["height"],
                                power.si))
    s = inp.separation
    incident_flux(emitters, s, 0.0, 0.0)  # checks the emitters (sizes, overlaps) first

    receiver = None
    if inp.receiver is not None:
        receiver = (inp.receiver["x"], inp.receiver["y"])
        incident_flux(emitters, s, *receiver)  # checks the point
        px = out.step("x_worst", "x_r", {"x_r": out.input("receiver.x")}, receiver[0], "m",
                      label="The receiver point as given", yields="x_worst")
        py = out.step("y_worst", "y_r", {"y_r": out.input("receiver.y")}, receiver[1], "m",
                      label="The receiver point as given", yields="y_worst")
        where = "the receiver point"
    else:
        found = worst_point(emitters, s, margin=_SEARCH_MARGIN)
        values = {"s": out.input("separation"),
                  "margin": Value(_SEARCH_MARGIN, "1", "%", given=True)}
        px = out.statement("x_worst", "Global search of the receiving plane at separation {s}: "
                           + _SEARCH, found.x, "m", values=values,
                           label="Worst point of the receiving plane, x",
                           source=SEARCH_METHOD, yields="x_worst")
        py = out.statement("y_worst", "The same search: y of the point of highest incident "
                           "flux", found.y, "m", label="Worst point of the receiving plane, y",
                           source=SEARCH_METHOD, yields="y_worst")
        where = "the worst point"
        out.note("The worst point of several openings need not face any of them: between two "
                 "openings both contribute.", SEARCH_METHOD)

    factors = []
    for k, (emitter, name) in enumerate(zip(emitters, names)):
        n = k + 1
        dx, dy = px.si - emitter.x, py.si - emitter.y
        factor = element_to_rectangle(emitter.width, emitter.height, s, dx, dy)
        factors.append(out.statement(
            f"F_{n}", "Howell's catalogue case B-3 by superposition of the four corner "
            "rectangles that meet at the foot point: {name}, {w} wide and {h} high, at "
            "separation {s}; foot point {dx} across and {dy} up from its lower-left corner",
            factor, "1",
            values={"name": Value(name), "w": out.input(f"emitters[{k}].width"),
                    "h": out.input(f"emitters[{k}].height"), "s": out.input("separation"),
                    "dx": Value(dx, "m"), "dy": Value(dy, "m")},
            label=f"View factor from {where} to {name}",
            source=f"{HOWELL}, case B-3"))
        _in_group(out, "View factor to each emitter", name)
    q = sum(p.si * f.si for p, f in zip(powers, factors))
    expr = " + ".join(f"E_{n} * F_{n}" for n in range(1, len(emitters) + 1))
    operands = {}
    for n, (p, f) in enumerate(zip(powers, factors), start=1):
        operands[f"E_{n}"], operands[f"F_{n}"] = p, f
    # One line of working while it fits the formula language's limits; a statement beyond that.
    if _fits(expr):
        q_value = out.step("q", expr, operands, q, W_M2, label=f"Incident flux at {where}",
                           yields="q")
    else:
        q_value = out.statement("q", "Sum of E_i F_i over the {n} emitters", q, W_M2,
                                values={"n": Value(len(emitters), given=True)},
                                label=f"Incident flux at {where}", yields="q")

    limit = inp.limit
    minimum = None
    if limit is not None:
        q_limit = out.input("limit")
        out.step("U", "q / q_lim", {"q": q_value, "q_lim": q_limit}, q / limit,
                 label="Utilisation of the limit flux", yields="utilisation")
        minimum = _minimum_separation(tuple(emitters), float(limit), receiver)
        if minimum.met_at_contact:
            if receiver is None:
                text = ("No emitter's emissive power exceeds the limit {limit}, so no point of "
                        "the receiving plane can, at any separation")
                values = {"limit": q_limit}
            else:
                text = ("The flux at the given point never exceeds the limit {limit}: its "
                        "highest value at any separation is {q}")
                values = {"limit": q_limit, "q": Value(minimum.q, W_M2, KW_M2)}
            out.statement("s_min", text, 0.0, "m", values=values,
                          label=f"Minimum separation for {where}: the limit is met at every "
                                "separation, even at contact", yields="minimum_separation")
            out.note("Minimum separation {s_min}: the limit {limit} is met at every "
                     "separation, even at contact.", s_min=Value(0.0, "m"), limit=q_limit)
        else:
            out.statement("s_min", "Smallest separation beyond which the incident flux at "
                          + where + " never exceeds the limit {limit}: a geometric scan of "
                          "separations brackets the last crossing, Brent's method solves it; "
                          "there the flux is {q} at x = {x}, y = {y}", minimum.separation, "m",
                          values={"limit": q_limit, "q": Value(minimum.q, W_M2, KW_M2),
                                  "x": Value(minimum.x, "m"), "y": Value(minimum.y, "m")},
                          label=f"Minimum separation for {where}",
                          source=BRENT,
                          yields="minimum_separation")
            out.note("The minimum separation is the separation beyond which the flux never "
                     "exceeds the limit: the last crossing on a geometric scan of separations "
                     "is bracketed and then solved by Brent's method, not by stepping.",
                     BRENT)
    else:
        out.not_reached("utilisation", "no limit given")
        out.not_reached("minimum_separation", "no limit given")
    out.note("Each emitter is a uniform diffuse grey rectangle at its emissive power; the "
             "receiver is a small surface parallel to the emitting face and facing it; no "
             "absorption by the air, no flame projecting beyond the openings and no shielding "
             "are taken into account.", f"{HOWELL}, case B-3")
    out.figure(_plan_figure(out, emitters, names, px.si, py.si, receiver is None))
    out.figure(_flux_figure(out, emitters, s, q, limit, minimum, receiver, where))


def _plan_figure(out, emitters, names, px, py, worst: bool) -> FigureData:
    """The emitting face to scale: the openings as boxes, the worst (or given) point marked.

    The point's words sit in the plot's top-right corner (the view's rule for a point), so the
    plot reaches above the openings by a free band at least as tall as those words."""
    x0 = min([e.x for e in emitters] + [px])
    x1 = max([e.x + e.width for e in emitters] + [px])
    y0 = min([e.y for e in emitters] + [py])
    y1 = max([e.y + e.height for e in emitters] + [py])
    pad = 0.08 * max(x1 - x0, y1 - y0)
    width_mm = 160.0
    plot_width_mm = width_mm - 28.0  # the y axis' numbers and words take the rest
    data_width = x1 - x0 + 2.0 * pad
    band = 0.0
    for _ in range(3):  # the band's height in metres depends on the scale it sets
        data_height = y1 - y0 + 2.0 * pad + band
        height_mm = float(np.clip(plot_width_mm * data_height / data_width + 24.0, 55.0, 120.0))
        scale = min(plot_width_mm / data_width, (height_mm - 24.0) / data_height)  # mm per m
        band = 9.0 / scale  # words of 7 pt with their frame: about 5 mm, and a margin
    label = "worst point" if worst else "receiver point"
    return FigureData(
        key=f"{out.block_key}-elevation",
        caption=phrase("Elevation of the emitting face to scale, with the emitters named and "
                       f"the {label} marked at x = {{x}}, y = {{y}}.", x=Value(px, "m"),
                       y=Value(py, "m")),
        x=Axis("x along the emitting face", "m", "m", (x0 - pad, x1 + pad)),
        y=Axis("y", "m", "m", (y0 - pad, y1 + pad + band)),
        boxes=tuple(Box(e.x, e.y, e.x + e.width, e.y + e.height, name, shade=4)
                    for e, name in zip(emitters, names)),
        points=(Point(px, py, label),),
        legend=None, equal_aspect=True, size=(width_mm, height_mm))


def _flux_figure(out, emitters, s, q, limit, minimum, receiver, where) -> FigureData:
    """Incident flux at the worst (or given) point against separation, with the design
    separation, the limit and the minimum separation marked."""
    # Closer together near the emitters, where the flux bends most.
    reach = max(2.0 * s, 1.4 * minimum.separation if minimum is not None else 0.0)
    separations = np.geomspace(reach / 30.0, reach, 30)
    flux = flux_against_separation(emitters, separations, receiver)
    marks = []
    if limit is not None:
        marks.append(Mark("y", limit, "limit", style=1))
    if minimum is not None and minimum.separation > 0.0:
        marks.append(Mark("x", minimum.separation, "minimum separation", style=3))
    top = 1.08 * max(float(flux.max()), q, limit or 0.0)
    values = {"s": out.input("separation")}
    text = "Incident flux at " + where + " against separation, with the design separation {s}"
    if limit is None:
        text += " marked."
    elif minimum.separation > 0.0:
        text += ", the limit {limit} and the minimum separation {s_min} marked."
        values.update(limit=out.input("limit"), s_min=Value(minimum.separation, "m"))
    else:
        text += (" and the limit {limit} marked; the limit is met at every separation (minimum "
                 "separation {s_min}).")
        values.update(limit=out.input("limit"), s_min=Value(0.0, "m"))
    return FigureData(
        key=f"{out.block_key}-flux",
        caption=phrase(text, **values),
        x=Axis("separation between the emitting face and the receiving plane", "m", "m",
               (0.0, float(separations[-1]))),
        y=Axis("incident flux", W_M2, KW_M2, (0.0, top)),
        lines=(Line(tuple(separations.tolist()), tuple(flux.tolist()),
                    f"incident flux at {where}"),
               Line((s,), (q,), "design separation", style=0, marker=True)),
        marks=tuple(marks), legend="center right")


RADIANT_EXPOSURE = Kind(
    name="radiant_exposure",
    title="Radiant exposure from emitting rectangles",
    summary="Incident radiation on a plane parallel to one or more emitting rectangles "
            "(openings): at a given point or at the worst point found by a global search, with "
            "the utilisation of a limit flux and the minimum separation that meets it.",
    inputs=(
        Items("emitters", "emitting rectangles in one plane, each {name, width, height, x, y, "
              "temperature with emissivity, or emissive_power}", fields=_EMITTER_FIELDS,
              exactly_one=(("temperature", "emissive_power"),),
              at_most_one=(("emissive_power", "emissivity"),), min_items=1),
        _length("separation", "distance from the emitting plane to the parallel receiving "
                "plane"),
        Record("receiver", "one receiver point {x, y} in the emitting plane's axes (omitted: "
               "the worst point of the receiving plane)", default=None, fields=_RECEIVER_FIELDS),
        Quantity("limit", "incident flux limit, e.g. {named: wood_piloted_ignition_flux}",
                 default=None, unit=W_M2, greater_than=0.0, display=KW_M2),
    ),
    results=(
        ResultSpec("q", W_M2, "incident flux at the receiver point (the worst point or the "
                   "given point)", display=KW_M2),
        ResultSpec("x_worst", "m", "x of the worst point, or of the given point"),
        ResultSpec("y_worst", "m", "y of the worst point, or of the given point"),
        ResultSpec("utilisation", "1", "q / limit"),
        ResultSpec("minimum_separation", "m", "smallest separation at which the worst point (or "
                   "the given point) meets the limit; 0 when met even at contact"),
    ),
    compute=_radiant_exposure,
    caution=_EXPOSURE_CAUTION,
    references=(HOWELL, STEFAN_BOLTZMANN_LAW),
    input_names={"emitters": "emitters[{index}].x",
                 "emitters.x": "emitters[{index}].x",
                 "emitters.y": "emitters[{index}].y",
                 "emitters.width": "emitters[{index}].width",
                 "emitters.height": "emitters[{index}].height",
                 "emitters.emissive_power": "emitters[{index}].emissive_power",
                 "x": "receiver.x", "y": "receiver.y"},
)

KINDS = (SURFACE_EMISSION, RADIATION_EXCHANGE, VIEW_FACTOR, RADIANT_EXPOSURE)
