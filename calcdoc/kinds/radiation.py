"""Surface radiation kinds: emission, two-surface exchange, view factors, radiant exposure.

The physics is in :mod:`calcdoc.physics.radiation`, :mod:`calcdoc.physics.viewfactors` and
:mod:`calcdoc.physics.exposure`; this module declares the inputs and results of FORMAT.md, records
each step with its numbers substituted, and draws the two radiant-exposure pictures.
"""

from __future__ import annotations

import functools
import re

import numpy as np

from calcdoc.kinds.base import (ABSOLUTE, REQUIRED, Choice, Figure, Items, Kind, Quantity, Record,
                                ResultSpec, Text)
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.exposure import (Emitter, MinimumSeparation, flux_against_separation,
                                      incident_flux, minimum_separation, worst_point)
from calcdoc.physics.radiation import (STEFAN_BOLTZMANN, emissive_power,
                                       enclosed_body_exchange, net_flux_to_surroundings,
                                       parallel_plates_exchange, two_surface_enclosure_exchange)
from calcdoc.physics.viewfactors import (coaxial_disks, element_to_rectangle,
                                         element_to_rectangle_corner, opposed_rectangles,
                                         perpendicular_rectangles, reciprocal_view_factor)
from calcdoc.render.numbers import format_quantity, latex_quantity

__all__ = ["KINDS"]

HOWELL = ("J. R. Howell, A Catalog of Radiation Heat Transfer Configuration Factors, 3rd ed., "
          "University of Texas at Austin (2010)")
INCROPERA = ("T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, Fundamentals of Heat "
             "and Mass Transfer, 7th ed., Wiley (2011)")
STEFAN_BOLTZMANN_LAW = ("Stefan–Boltzmann law, σ = 5.670374419×10⁻⁸ W/(m²·K⁴) (CODATA 2018, "
                        "exact in the SI since 2019)")
SAFETY = ("This calculation supports, and does not replace, the judgement of a licensed engineer "
          "and the requirements of the local code and the authority having jurisdiction.")

W_M2 = "W/m^2"
SIGMA_UNIT = "W/(m^2*K^4)"


def _sigma() -> str:
    return latex_quantity(STEFAN_BOLTZMANN, SIGMA_UNIT, None, 7)


def _kelvin(out, value: float) -> str:
    return out.q(value, "K", "K")


def _number(out, value: float) -> str:
    return out.q(value, "1")


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


# ============================================================================ surface_emission


def _surface_emission(inp, out):
    t, eps = inp.temperature, inp.emissivity
    e = emissive_power(t, eps)
    out.step("E", r"\varepsilon \sigma T^{4}",
             rf"{_number(out, eps)} \cdot {_sigma()} \cdot \left({_kelvin(out, t)}\right)^{{4}}",
             e, W_M2, label="Emissive power", source=STEFAN_BOLTZMANN_LAW)
    out.result("E", e)
    if inp.area is not None:
        out.step("Q", "E A", rf"{out.q(e, W_M2)} \cdot {out.q(inp.area, 'm^2')}", e * inp.area,
                 "W", label="Emitted power over the area")
        out.result("Q", e * inp.area)
    else:
        out.not_reached("Q", "no area given")
    if inp.surroundings_temperature is not None:
        t_sur = inp.surroundings_temperature
        q_net = net_flux_to_surroundings(t, t_sur, eps)
        out.step("q_{net}", r"\varepsilon \sigma \left(T^{4} - T_{sur}^{4}\right)",
                 rf"{_number(out, eps)} \cdot {_sigma()} \cdot \left(\left({_kelvin(out, t)}"
                 rf"\right)^{{4}} - \left({_kelvin(out, t_sur)}\right)^{{4}}\right)",
                 q_net, W_M2, label="Net flux to the surroundings (positive outward)",
                 source=f"{INCROPERA}, Eq. 1.7")
        out.result("q_net", q_net)
        out.note("The surroundings are large, isothermal and enclose the surface, so they act as "
                 "a black body whatever their own emissivity.", f"{INCROPERA}, §1.2.3")
        if inp.area is not None:
            out.step("Q_{net}", "q_{net} A",
                     rf"{out.q(q_net, W_M2)} \cdot {out.q(inp.area, 'm^2')}", q_net * inp.area,
                     "W", label="Net power to the surroundings")
            out.result("Q_net", q_net * inp.area)
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


def _refuse(name: str, value, expected: str):
    raise PhysicsRangeError(name, value, expected)  # value None: the input is missing


def _radiation_exchange(inp, out):
    config = inp.configuration
    t1, t2, e1, e2 = inp.temperature_1, inp.temperature_2, inp.emissivity_1, inp.emissivity_2
    a1, a2, f12 = inp.area_1, inp.area_2, inp.view_factor
    shields = inp.shields or []
    if f12 is not None and config != "general":
        _refuse("view_factor", f12, f"no view_factor for configuration {config} (it is for "
                "configuration general only)")
    if shields and config != "parallel_plates":
        _refuse("shields[0].emissivity_1", shields[0]["emissivity_1"],
                f"no shields for configuration {config} (they are for parallel_plates only)")
    if e2 is None and (config != "enclosed_body" or a2 is not None):
        _refuse("emissivity_2", None, f"emissivity_2 for configuration {config}")
    if config == "general":
        for name, value in (("area_1", a1), ("area_2", a2), ("view_factor", f12)):
            if value is None:
                _refuse(name, None, f"{name} for configuration general")
    if config == "enclosed_body" and a2 is not None and a1 is None:
        _refuse("area_1", None, "area_1 (the body's area) when area_2 is given")

    dt4 = STEFAN_BOLTZMANN * (t1**4 - t2**4)
    out.step(r"E_{b1} - E_{b2}", r"\sigma \left(T_{1}^{4} - T_{2}^{4}\right)",
             rf"{_sigma()} \cdot \left(\left({_kelvin(out, t1)}\right)^{{4}} - "
             rf"\left({_kelvin(out, t2)}\right)^{{4}}\right)",
             dt4, W_M2, label="Difference of black-body emissive powers",
             source=STEFAN_BOLTZMANN_LAW)

    eps_eff = r"\varepsilon_{\mathrm{eff}}"
    if config == "parallel_plates":
        pairs = [(s["emissivity_1"], s["emissivity_2"]) for s in shields]
        result = parallel_plates_exchange(t1, t2, e1, e2, shields=pairs)
        formula = r"\frac{1}{\frac{1}{\varepsilon_{1}} + \frac{1}{\varepsilon_{2}} - 1"
        numbers = (rf"\frac{{1}}{{\frac{{1}}{{{_number(out, e1)}}} + "
                   rf"\frac{{1}}{{{_number(out, e2)}}} - 1")
        for a, b in pairs:
            numbers += (rf" + \frac{{1}}{{{_number(out, a)}}} + \frac{{1}}{{{_number(out, b)}}}"
                        " - 1")
        if pairs:
            formula += (r" + \sum_{k}\left(\frac{1}{\varepsilon_{k,1}} + "
                        r"\frac{1}{\varepsilon_{k,2}} - 1\right)")
        out.step(eps_eff, formula + "}", numbers + "}", result.effective_emissivity, "1",
                 label="Effective emissivity of large parallel plates"
                       + (f" with {len(pairs)} shield(s)" if pairs else ""),
                 source=f"{INCROPERA}, Table 13.3 and §13.3.4 (radiation shields)")
        if pairs:
            out.note("Shields are thin, conduct well (one temperature through each) and are large "
                     "enough that each surface sees only its neighbours; a shield's "
                     "emissivity_1 is its face towards surface 1.",
                     f"{INCROPERA}, §13.3.4")
    elif config == "enclosed_body":
        result = enclosed_body_exchange(t1, t2, e1, e2 if e2 is not None else 1.0, a1, a2)
        if a2 is None:
            out.step(eps_eff, r"\varepsilon_{1}", _number(out, e1), result.effective_emissivity,
                     "1", label="Effective emissivity, small convex body in a large enclosure "
                                "(A₁/A₂ → 0)", source=f"{INCROPERA}, Table 13.3")
        else:
            out.step(eps_eff,
                     r"\frac{1}{\frac{1}{\varepsilon_{1}} + \frac{1 - \varepsilon_{2}}"
                     r"{\varepsilon_{2}} \frac{A_{1}}{A_{2}}}",
                     rf"\frac{{1}}{{\frac{{1}}{{{_number(out, e1)}}} + "
                     rf"\frac{{1 - {_number(out, e2)}}}{{{_number(out, e2)}}} \cdot "
                     rf"\frac{{{out.q(a1, 'm^2')}}}{{{out.q(a2, 'm^2')}}}}}",
                     result.effective_emissivity, "1",
                     label="Effective emissivity, convex body inside an enclosure",
                     source=f"{INCROPERA}, Table 13.3")
        out.note("The body is convex (it does not see itself, F₁₂ = 1) and the enclosure is "
                 "closed; A₁ ≤ A₂.", f"{INCROPERA}, Table 13.3")
    else:
        result = two_surface_enclosure_exchange(t1, t2, e1, e2, a1, a2, f12)
        out.step(eps_eff,
                 r"\frac{1}{\frac{1 - \varepsilon_{1}}{\varepsilon_{1}} + \frac{1}{F_{12}} + "
                 r"\frac{1 - \varepsilon_{2}}{\varepsilon_{2}} \frac{A_{1}}{A_{2}}}",
                 rf"\frac{{1}}{{\frac{{1 - {_number(out, e1)}}}{{{_number(out, e1)}}} + "
                 rf"\frac{{1}}{{{_number(out, f12)}}} + "
                 rf"\frac{{1 - {_number(out, e2)}}}{{{_number(out, e2)}}} \cdot "
                 rf"\frac{{{out.q(a1, 'm^2')}}}{{{out.q(a2, 'm^2')}}}}}",
                 result.effective_emissivity, "1",
                 label="Exchange factor of a closed two-surface enclosure",
                 source=f"{INCROPERA}, §13.3.3, Eq. 13.23")
        out.note("The two surfaces close the enclosure (F₁₁ = 1 − F₁₂, F₂₂ = 1 − F₂₁); "
                 "A₁·F₁₂ ≤ A₂ is enforced.", f"{INCROPERA}, §13.3.3")

    out.step("q", rf"{eps_eff} \left(E_{{b1}} - E_{{b2}}\right)",
             rf"{_number(out, result.effective_emissivity)} \cdot {out.q(dt4, W_M2)}",
             result.q, W_M2, label="Net flux per unit area of surface 1 (positive 1 → 2)")
    out.result("q", result.q)
    out.result("effective_emissivity", result.effective_emissivity)
    if a1 is not None:
        out.step("Q", "q A_{1}", rf"{out.q(result.q, W_M2)} \cdot {out.q(a1, 'm^2')}",
                 result.q * a1, "W", label="Net power from surface 1 to surface 2")
        out.result("Q", result.q * a1)
    else:
        out.not_reached("Q", "no area_1 given")
    if result.shield_temperatures:
        faces = [e1] + [e for pair in pairs for e in pair] + [e2]
        previous = t1
        for k, temperature in enumerate(result.shield_temperatures):
            a, b = faces[2 * k], faces[2 * k + 1]
            out.step(rf"T_{{s{k + 1}}}",
                     r"\left[T_{k-1}^{4} - \frac{q}{\sigma}\left(\frac{1}{\varepsilon_{a}} + "
                     r"\frac{1}{\varepsilon_{b}} - 1\right)\right]^{1/4}",
                     rf"\left[\left({_kelvin(out, previous)}\right)^{{4}} - "
                     rf"\frac{{{out.q(result.q, W_M2)}}}{{{_sigma()}}}\left("
                     rf"\frac{{1}}{{{_number(out, a)}}} + \frac{{1}}{{{_number(out, b)}}} - 1"
                     r"\right)\right]^{1/4}",
                     temperature, "K", display_unit="degC",
                     label=f"Temperature of shield {k + 1} (equal net flux through every gap)",
                     source=f"{INCROPERA}, §13.3.4")
            previous = temperature
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
            _refuse(name, value, f"only the inputs {', '.join(wanted)} for geometry {geometry} "
                    f"({name} is for {' or '.join(users)})")
        if value is None and name in wanted and name not in _OPTIONAL:
            _refuse(name, None, f"{name} for geometry {geometry}")


def _view_factor(inp, out):
    _check_geometry(inp)
    geometry = inp.geometry
    m = lambda v: out.q(v, "m")  # noqa: E731 - a short local formatter
    if geometry == "opposed_rectangles":
        a, b, c = inp.width, inp.height, inp.separation
        x, y = a / c, b / c
        out.step("X", r"\frac{a}{c}", rf"\frac{{{m(a)}}}{{{m(c)}}}", x, "1")
        out.step("Y", r"\frac{b}{c}", rf"\frac{{{m(b)}}}{{{m(c)}}}", y, "1")
        f12 = opposed_rectangles(a, b, c)
        log_term = 0.5 * np.log((1 + x * x) * (1 + y * y) / (1 + x * x + y * y))
        out.step("L", r"\ln\sqrt{\frac{(1+X^{2})(1+Y^{2})}{1+X^{2}+Y^{2}}}",
                 rf"\ln\sqrt{{\frac{{(1+{_number(out, x)}^{{2}})(1+{_number(out, y)}^{{2}})}}"
                 rf"{{1+{_number(out, x)}^{{2}}+{_number(out, y)}^{{2}}}}}}", log_term, "1")
        rx, ry = np.sqrt(1 + x * x), np.sqrt(1 + y * y)
        arc_term = (x * ry * np.arctan(x / ry) + y * rx * np.arctan(y / rx)
                    - x * np.arctan(x) - y * np.arctan(y))
        out.step("S", r"X\sqrt{1+Y^{2}}\tan^{-1}\frac{X}{\sqrt{1+Y^{2}}}"
                 r" + Y\sqrt{1+X^{2}}\tan^{-1}\frac{Y}{\sqrt{1+X^{2}}}"
                 r" - X\tan^{-1}X - Y\tan^{-1}Y",
                 rf"S\left(X = {_number(out, x)},\ Y = {_number(out, y)}\right)", arc_term, "1")
        out.step("F_{12}", r"\frac{2\,(L + S)}{\pi X Y}",
                 rf"\frac{{2\,({_number(out, log_term)} + {_number(out, arc_term)})}}"
                 rf"{{\pi \cdot {_number(out, x)} \cdot {_number(out, y)}}}", f12, "1",
                 label="Identical, parallel, directly opposed rectangles",
                 source=f"{HOWELL}, case C-11")
        area_1 = area_2 = a * b
        f21 = f12
        out.note("The rectangles are identical, so F21 = F12.", f"{INCROPERA}, Eq. 13.3")
    elif geometry == "perpendicular_rectangles":
        length, w1, w2 = inp.common_edge, inp.width_1, inp.width_2
        w, h = w1 / length, w2 / length
        out.step("W", r"\frac{w_{1}}{l}", rf"\frac{{{m(w1)}}}{{{m(length)}}}", w, "1")
        out.step("H", r"\frac{w_{2}}{l}", rf"\frac{{{m(w2)}}}{{{m(length)}}}", h, "1")
        f12 = perpendicular_rectangles(length, w1, w2)
        root = np.sqrt(w * w + h * h)
        arc_term = w * np.arctan(1 / w) + h * np.arctan(1 / h) - root * np.arctan(1 / root)
        out.step("S", r"W\tan^{-1}\frac{1}{W} + H\tan^{-1}\frac{1}{H}"
                 r" - \sqrt{H^{2}+W^{2}}\tan^{-1}\frac{1}{\sqrt{H^{2}+W^{2}}}",
                 rf"S\left(W = {_number(out, w)},\ H = {_number(out, h)}\right)", arc_term, "1")
        w2_, h2_, sum2 = w * w, h * h, w * w + h * h
        log_term = 0.25 * (np.log((1 + w2_) * (1 + h2_) / (1 + sum2))
                           + w2_ * np.log(w2_ * (1 + sum2) / ((1 + w2_) * sum2))
                           + h2_ * np.log(h2_ * (1 + sum2) / ((1 + h2_) * sum2)))
        out.step("L", r"\frac{1}{4}\ln\left[\frac{(1+W^{2})(1+H^{2})}{1+W^{2}+H^{2}}"
                 r"\left(\frac{W^{2}(1+W^{2}+H^{2})}{(1+W^{2})(W^{2}+H^{2})}\right)^{W^{2}}"
                 r"\left(\frac{H^{2}(1+H^{2}+W^{2})}{(1+H^{2})(H^{2}+W^{2})}\right)^{H^{2}}"
                 r"\right]",
                 rf"L\left(W = {_number(out, w)},\ H = {_number(out, h)}\right)", log_term, "1")
        out.step("F_{12}", r"\frac{S + L}{\pi W}",
                 rf"\frac{{{_number(out, arc_term)} + {_number(out, log_term)}}}"
                 rf"{{\pi \cdot {_number(out, w)}}}", f12, "1",
                 label="Perpendicular rectangles with a common edge, from surface 1 "
                       "(width_1) to surface 2 (width_2)",
                 source=f"{HOWELL}, case C-14")
        area_1, area_2 = length * w1, length * w2
        f21 = None
    elif geometry == "element_to_rectangle":
        a, b, c = inp.width, inp.height, inp.separation
        x0 = inp.element_x if inp.element_x is not None else a / 2.0
        y0 = inp.element_y if inp.element_y is not None else b / 2.0
        if inp.element_x is None or inp.element_y is None:
            out.note("The element's foot point defaults to the centre of the rectangle "
                     "where element_x or element_y is not given.")
        parts = []
        corners = ((a - x0, b - y0), (x0, b - y0), (a - x0, y0), (x0, y0))
        for k, (u, v) in enumerate(corners, start=1):
            part = (np.sign(u) * np.sign(v) * element_to_rectangle_corner(abs(u), abs(v), c)
                    if u != 0.0 and v != 0.0 else 0.0)
            parts.append(float(part))
            sign = "-" if part < 0 else ""
            out.step(rf"F_{{{k}}}",
                     r"\frac{\operatorname{sgn}(uv)}{2\pi}\left["
                     r"\frac{A}{\sqrt{1+A^{2}}}\tan^{-1}\frac{B}{\sqrt{1+A^{2}}} + "
                     r"\frac{B}{\sqrt{1+B^{2}}}\tan^{-1}\frac{A}{\sqrt{1+B^{2}}}\right]",
                     rf"{sign}F\left(A = {_number(out, abs(u) / c)},\ "
                     rf"B = {_number(out, abs(v) / c)}\right)", float(part), "1",
                     label=f"Corner rectangle {k} at the foot point, sides u = "
                           f"{out.qt(u, 'm')}, v = {out.qt(v, 'm')} (A = |u|/c, B = |v|/c; "
                           "negative where it reaches beyond the rectangle)",
                     source=f"{HOWELL}, case B-3")
        f12 = element_to_rectangle(a, b, c, x0, y0)
        numbers = " + ".join(_number(out, p) if p >= 0 else rf"\left({_number(out, p)}\right)"
                             for p in parts)
        out.step("F_{d1-2}", r"F_{1} + F_{2} + F_{3} + F_{4}", numbers, f12, "1",
                 label="Element to the rectangle, by superposition of the four corner "
                       "rectangles", source=f"{INCROPERA}, §13.1.2 (superposition)")
        area_1, area_2, f21 = None, a * b, None
        out.note("The receiver is a small plane element parallel to the rectangle and facing "
                 "it; its foot point is measured from the rectangle's lower-left corner and may "
                 "lie outside the rectangle.", f"{HOWELL}, case B-3")
    else:
        r1, r2, h = inp.radius_1, inp.radius_2, inp.separation
        big_r1, big_r2 = r1 / h, r2 / h
        x = 1.0 + (1.0 + big_r2**2) / big_r1**2
        out.step("R_{1}", r"\frac{r_{1}}{h}", rf"\frac{{{m(r1)}}}{{{m(h)}}}", big_r1, "1")
        out.step("R_{2}", r"\frac{r_{2}}{h}", rf"\frac{{{m(r2)}}}{{{m(h)}}}", big_r2, "1")
        out.step("X", r"1 + \frac{1 + R_{2}^{2}}{R_{1}^{2}}",
                 rf"1 + \frac{{1 + {_number(out, big_r2)}^{{2}}}}{{{_number(out, big_r1)}^{{2}}}}",
                 x, "1")
        f12 = coaxial_disks(r1, r2, h)
        out.step("F_{12}", r"\frac{1}{2}\left[X - \sqrt{X^{2} - 4\left(\frac{R_{2}}{R_{1}}"
                 r"\right)^{2}}\right]",
                 rf"\frac{{1}}{{2}}\left[{_number(out, x)} - \sqrt{{{_number(out, x)}^{{2}} - "
                 rf"4\left(\frac{{{_number(out, big_r2)}}}{{{_number(out, big_r1)}}}\right)"
                 r"^{2}}\right]", f12, "1", label="Coaxial parallel disks, disk 1 to disk 2",
                 source=f"{HOWELL}, case C-41")
        area_1, area_2 = np.pi * r1**2, np.pi * r2**2
        f21 = None
    out.result("F12", f12)
    if area_1 is not None:
        if f21 is None:
            f21 = reciprocal_view_factor(f12, area_1, area_2)
            out.step("F_{21}", r"\frac{A_{1} F_{12}}{A_{2}}",
                     rf"\frac{{{out.q(area_1, 'm^2')} \cdot {_number(out, f12)}}}"
                     rf"{{{out.q(area_2, 'm^2')}}}", f21, "1", label="Reverse factor by "
                     "reciprocity", source=f"{INCROPERA}, Eq. 13.3")
        out.result("F21", f21)
        out.result("area_1", area_1)
    else:
        out.not_reached("F21", "surface 1 is a differential element (no finite area)")
        out.not_reached("area_1", "surface 1 is a differential element (no finite area)")
    out.result("area_2", area_2)
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
             "emissivity", default=None, unit=W_M2, greater_than=0.0, display="kW/m^2"),
)

_RECEIVER_FIELDS = (
    _length("x", "x of the receiver's foot point in the emitting plane's axes", positive=False),
    _length("y", "y of the receiver's foot point in the emitting plane's axes", positive=False),
)

_EXPOSURE_CAUTION = (SAFETY + " Separation and boundary-distance decisions belong to the local "
                     "code and a licensed engineer: this incident flux is one input to them, "
                     "not the decision.")
_PHYSICS_EMITTER = re.compile(r"^emitters\[(\d+)\](.*)$")
_PHYSICS_NAME = re.compile(r"emitters\[(\d+)\]")


def _emitter_path(quantity: str) -> str:
    """The physics names emitters from 1; the sheet's input paths count from 0."""
    match = _PHYSICS_EMITTER.match(quantity)
    if not match:
        return quantity
    return f"emitters[{int(match.group(1)) - 1}]{match.group(2) or '.x'}"


@functools.lru_cache(maxsize=64)
def _minimum_separation(emitters: tuple[Emitter, ...], limit: float,
                        receiver: tuple[float, float] | None) -> MinimumSeparation:
    """``minimum_separation``, remembered: it does not depend on the block's separation, and a
    sheet often checks the same openings against the same limit at several separations."""
    return minimum_separation(list(emitters), limit, receiver)


def _radiant_exposure(inp, out):
    emitters, names = [], []
    for k, item in enumerate(inp.emitters):
        name = item["name"] or f"emitter {k + 1}"
        names.append(name)
        symbol = rf"E_{{{k + 1}}}"
        if item["temperature"] is not None:
            eps = item["emissivity"] if item["emissivity"] is not None else 1.0
            power = emissive_power(item["temperature"], eps)
            out.step(symbol, r"\varepsilon \sigma T^{4}",
                     rf"{_number(out, eps)} \cdot {_sigma()} \cdot "
                     rf"\left({_kelvin(out, item['temperature'])}\right)^{{4}}",
                     power, W_M2, display_unit="kW/m^2",
                     label=f"Emissive power of {name}"
                           + (" (emissivity 1, a black opening)" if item["emissivity"] is None
                              else ""), source=STEFAN_BOLTZMANN_LAW)
        else:
            power = item["emissive_power"]
        emitters.append(Emitter(item["x"], item["y"], item["width"], item["height"], power))
    s = inp.separation
    try:
        incident_flux(emitters, s, 0.0, 0.0)  # checks the emitters (sizes, overlaps)
    except PhysicsRangeError as exc:
        value = _PHYSICS_NAME.sub(lambda m: f"emitters[{int(m.group(1)) - 1}]", str(exc.value))
        raise PhysicsRangeError(_emitter_path(exc.quantity), value, exc.expected) from None

    if inp.receiver is not None:
        px, py = inp.receiver["x"], inp.receiver["y"]
        q = incident_flux(emitters, s, px, py)
        where = "the given receiver point"
    else:
        found = worst_point(emitters, s)
        px, py, q = found.x, found.y, found.q
        where = "the worst point"
        out.note("Worst point found by a global search of the receiving plane: a grid over the "
                 "emitters' extent (plus 5 %), then a bounded optimiser (L-BFGS-B) from the "
                 "best grid peaks. The worst point of several openings need not face any of "
                 "them.", "scipy.optimize.minimize (L-BFGS-B)")

    m = lambda v: out.q(v, "m")  # noqa: E731 - a short local formatter
    terms_symbolic, terms_numbers = [], []
    for k, (emitter, name) in enumerate(zip(emitters, names), start=1):
        factor = element_to_rectangle(emitter.width, emitter.height, s, px - emitter.x,
                                      py - emitter.y)
        out.step(rf"F_{{{k}}}",
                 r"F_{\mathrm{B3}}\left(w_{i}, h_{i}, s;\ x - x_{i},\ y - y_{i}\right)",
                 rf"F\left({m(emitter.width)},\ {m(emitter.height)},\ {m(s)};\ "
                 rf"{m(px - emitter.x)},\ {m(py - emitter.y)}\right)", factor, "1",
                 label=f"View factor from {where} to {name}",
                 source=f"{HOWELL}, case B-3 (superposition of corner rectangles)")
        terms_symbolic.append(rf"E_{{{k}}} F_{{{k}}}")
        terms_numbers.append(rf"{out.q(emitter.emissive_power, W_M2, 'kW/m^2')} \cdot "
                             rf"{_number(out, factor)}")
    out.step("q", " + ".join(terms_symbolic), " + ".join(terms_numbers), q, W_M2,
             display_unit="kW/m^2", label=f"Incident flux at {where}")
    out.result("q", q)
    out.result("x_worst", px)
    out.result("y_worst", py)

    limit = inp.limit
    minimum = None
    if limit is not None:
        out.step("U", r"\frac{q}{q_{\mathrm{limit}}}",
                 rf"\frac{{{out.q(q, W_M2, 'kW/m^2')}}}{{{out.q(limit, W_M2, 'kW/m^2')}}}",
                 q / limit, "1", label="Utilisation of the limit flux")
        out.result("utilisation", q / limit)
        receiver = None if inp.receiver is None else (px, py)
        minimum = _minimum_separation(tuple(emitters), float(limit), receiver)
        out.step(r"s_{\min}",
                 r"\min\left\{s_{0} : q(s) \le q_{\mathrm{limit}}\ \forall s \ge s_{0}\right\}",
                 rf"\min\left\{{s_{{0}} : q(s) \le {out.q(limit, W_M2, 'kW/m^2')}\ "
                 rf"\forall s \ge s_{{0}}\right\}}", minimum.separation, "m",
                 label=f"Minimum separation for {where}",
                 source="Brent's method (scipy.optimize.brentq) on a bracketing scan")
        out.result("minimum_separation", minimum.separation)
        if minimum.met_at_contact:
            out.note(f"Minimum separation 0 m: the limit {out.qt(limit, W_M2, 'kW/m^2')} is met "
                     "at every separation, even at contact "
                     + ("(no emitter's emissive power exceeds it)." if receiver is None else
                        f"(the highest flux at the point is {out.qt(minimum.q, W_M2, 'kW/m^2')})."
                        ))
        else:
            out.step(r"q(s_{\min})", r"\sum_{i} E_{i} F_{i}\left(s_{\min}\right)", "",
                     minimum.q, W_M2, display_unit="kW/m^2",
                     label=f"Check: incident flux at {where} at the minimum separation "
                           f"(x = {out.qt(minimum.x, 'm')}, y = {out.qt(minimum.y, 'm')})")
            out.note("The minimum separation is the separation beyond which the flux never "
                     "exceeds the limit: the last crossing on a geometric scan of separations "
                     "is bracketed and then solved by Brent's method, not by stepping.",
                     "scipy.optimize.brentq")
    else:
        out.not_reached("utilisation", "no limit given")
        out.not_reached("minimum_separation", "no limit given")
    out.note("Each emitter is a uniform diffuse grey rectangle at its emissive power; the "
             "receiver is a small surface parallel to the emitting face and facing it; no "
             "absorption by the air, no flame projecting beyond the openings and no shielding "
             "are taken into account.", f"{HOWELL}, case B-3")

    # Figure data (plain numbers): the flux against separation around the design separation,
    # closer together near the emitters, where the flux bends most.
    reach = max(2.0 * s, 1.4 * minimum.separation if minimum is not None else 0.0)
    separations = np.geomspace(reach / 30.0, reach, 30)
    receiver = None if inp.receiver is None else (px, py)
    out.figure_data["exposure"] = {
        "emitters": [(name, e.x, e.y, e.width, e.height, e.emissive_power)
                     for name, e in zip(names, emitters)],
        "point": (px, py), "worst": inp.receiver is None, "separation": s, "q": q,
        "limit": limit,
        "minimum_separation": None if minimum is None else minimum.separation,
        "separations": separations.tolist(),
        "flux": flux_against_separation(emitters, separations, receiver).tolist(),
    }


def _exposure_figures(block) -> list[Figure]:
    from matplotlib.patches import Rectangle

    from calcdoc.render.plots import (COLOURS, HATCHES, figure, mark_horizontal, mark_vertical,
                                      svg_of, thin)

    data = block.output.figure_data.get("exposure")
    if not data:
        return []
    sig = block.output.precision
    figures = []
    x_all = [e[1] for e in data["emitters"]] + [e[1] + e[3] for e in data["emitters"]]
    y_all = [e[2] for e in data["emitters"]] + [e[2] + e[4] for e in data["emitters"]]
    px, py = data["point"]
    x0, x1 = min(x_all + [px]), max(x_all + [px])
    y0, y1 = min(y_all + [py]), max(y_all + [py])
    pad = 0.08 * max(x1 - x0, y1 - y0)
    aspect = (y1 - y0 + 2 * pad) / (x1 - x0 + 2 * pad)
    height_mm = float(np.clip(140.0 * aspect + 22.0, 55.0, 120.0))
    with figure(block.key + "-elevation", 160, height_mm) as (fig, ax):
        for k, (name, x, y, w, h, _power) in enumerate(data["emitters"]):
            ax.add_patch(Rectangle((x, y), w, h, facecolor="#f6e0d3", edgecolor="#000000",
                                   hatch=HATCHES[k % len(HATCHES)], linewidth=0.9))
            ax.text(x + w / 2, y + h / 2, name, ha="center", va="center", fontsize=7.5,
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 1.0})
        label = "worst point" if data["worst"] else "receiver point"
        ax.plot([px], [py], marker="X", markersize=9, color=COLOURS[1], linestyle="none",
                markeredgecolor="#000000", label=label)
        ax.annotate(f"{label} ({format_quantity(px, 'm', 'm', sig)}, "
                    f"{format_quantity(py, 'm', 'm', sig)})", xy=(px, py), xytext=(7, 7),
                    textcoords="offset points", fontsize=7.5,
                    bbox={"facecolor": "white", "edgecolor": "#000000", "linewidth": 0.5,
                          "pad": 1.5})
        ax.set_xlim(x0 - pad, x1 + pad)
        ax.set_ylim(y0 - pad, y1 + pad)
        ax.set_aspect("equal")
        ax.set_xlabel("x along the emitting face (m)")
        ax.set_ylabel("y (m)")
        svg = svg_of(fig)
    figures.append(Figure(block.key + "-elevation", svg,
                          f"Elevation of the emitting face to scale, with the emitters named and "
                          f"the {label} at separation "
                          f"{format_quantity(data['separation'], 'm', 'm', sig)} marked."))

    separations = np.array(data["separations"])
    flux = np.array(data["flux"]) / 1000.0
    with figure(block.key + "-flux", 160, 80) as (fig, ax):
        ax.plot(*thin(separations, flux), color=COLOURS[0], linestyle="-",
                label=f"incident flux at the {'worst point' if data['worst'] else 'receiver'}")
        ax.plot([data["separation"]], [data["q"] / 1000.0], marker="o", color=COLOURS[0],
                linestyle="none", label="design separation")
        if data["limit"] is not None:
            mark_horizontal(ax, data["limit"] / 1000.0,
                            f"limit {format_quantity(data['limit'], W_M2, 'kW/m^2', sig)}")
        if data["minimum_separation"]:
            mark_vertical(ax, data["minimum_separation"], "minimum separation "
                          f"{format_quantity(data['minimum_separation'], 'm', 'm', sig)}")
        ax.set_xlim(0.0, float(separations[-1]))
        ax.set_ylim(0.0, 1.08 * max(float(flux.max()),
                                    (data["limit"] or 0.0) / 1000.0))
        ax.set_xlabel("separation between the emitting face and the receiving plane (m)")
        ax.set_ylabel("incident flux (kW/m²)")
        ax.legend(loc="center right")
        svg = svg_of(fig)
    if data["limit"] is None:
        caption = "Incident flux against separation, with the design separation marked."
    elif data["minimum_separation"]:
        caption = ("Incident flux against separation, with the design separation, the limit and "
                   "the minimum separation marked.")
    else:
        caption = ("Incident flux against separation, with the design separation and the limit "
                   "marked; the limit is met at every separation (minimum separation 0 m).")
    figures.append(Figure(block.key + "-flux", svg, caption))
    return figures


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
                 default=None, unit=W_M2, greater_than=0.0, display="kW/m^2"),
    ),
    results=(
        ResultSpec("q", W_M2, "incident flux at the receiver point (the worst point or the "
                   "given point)", display="kW/m^2"),
        ResultSpec("x_worst", "m", "x of the worst point, or of the given point"),
        ResultSpec("y_worst", "m", "y of the worst point, or of the given point"),
        ResultSpec("utilisation", "1", "q / limit"),
        ResultSpec("minimum_separation", "m", "smallest separation at which the worst point (or "
                   "the given point) meets the limit; 0 when met even at contact"),
    ),
    compute=_radiant_exposure,
    figures=_exposure_figures,
    caution=_EXPOSURE_CAUTION,
    references=(HOWELL, STEFAN_BOLTZMANN_LAW),
)

KINDS = (SURFACE_EMISSION, RADIATION_EXCHANGE, VIEW_FACTOR, RADIANT_EXPOSURE)
