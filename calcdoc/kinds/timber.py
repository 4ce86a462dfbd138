"""Timber in fire: ``timber_member_fire`` (docs/format.md), EN 1995-1-2:2004 reduced cross-section.

A rectangular member chars from its exposed faces under the standard fire at the notional
charring rate βn; a zero-strength layer k0·d0 below the char line is discounted too, and the
residual rectangle keeps its strength at normal temperature (raised to a 20 % fractile by k_fi).
The working is recorded as a checker writes it: βn and k_fi from their tables, d_char,n, k0,
d_ef, the residual width and depth, W_ef, f_m,d,fi and M_Rd,fi, then with a design moment the
utilisation and the time at which the resistance falls to it (a root solve, stated). The
figures are the residual section to scale and the resistance against time.

The physics is :mod:`calcdoc.physics.timber`. The tables' values were recalled, not read from
the printed standard: they are cited with :class:`~calcdoc.references.Cite` ``confirmed=False``
so that the package lists them under "Values to confirm".
"""

from __future__ import annotations

import numpy as np

from calcdoc.data import Axis, Box, FigureData, Line, Mark, Phrase, Point, Value, phrase
from calcdoc.errors import InputError, MissingInput
from calcdoc.kinds.base import Choice, Kind, Quantity, ResultSpec
from calcdoc.kinds.fire import FIRE_CAUTION
from calcdoc.physics import MAX_DURATION
from calcdoc.physics.timber import (EXPOSURES, GAMMA_M_FI, K_MOD_FI, TIMBER_TYPES,
                                    ZERO_STRENGTH_RAMP_TIME, bending_resistance_fire,
                                    timber_member_fire)
from calcdoc.references import Cite

__all__ = ["KINDS", "TIMBER_MEMBER_FIRE"]

_EN1995 = "EN 1995-1-2:2004"
_METHOD = f"{_EN1995} §4.2.2"
_CHARRING = f"{_EN1995} §3.4.2"
_BRENT = "Brent's method (scipy.optimize.brentq)"
_MM_PER_MIN = 1e-3 / 60.0

# The words each table uses for a kind of timber, for the value a project confirms.
_TABLE_3_1_ROW = {"solid_softwood": "solid softwood, ρk ≥ 290 kg/m³",
                  "glulam_softwood": "glued laminated softwood, ρk ≥ 290 kg/m³",
                  "hardwood": "solid hardwood, ρk = 290 kg/m³",
                  "hardwood_dense": "solid hardwood, ρk ≥ 450 kg/m³",
                  "lvl": "LVL, ρk ≥ 480 kg/m³"}
_TABLE_2_1_ROW = {"solid_softwood": "solid timber", "glulam_softwood": "glued laminated timber",
                  "hardwood": "solid timber", "hardwood_dense": "solid timber", "lvl": "LVL"}

# Recalled, not read against the printed standard: data, listed under "Values to confirm".
_ZERO_STRENGTH_SOURCE = Cite(_EN1995, "§4.2.2(1) and Table 4.1", confirmed=False,
                             key="EN 1995-1-2:2004 §4.2.2 d0 and Table 4.1 k0",
                             value="d0 = 7 mm; k0 = t/20 min for t < 20 min and 1 after, "
                                   "unprotected surfaces")
_STRENGTH_SOURCE = Cite(_EN1995, "§2.3, eq. (2.1); §4.2.2(5)", confirmed=False,
                        key="EN 1995-1-2:2004 k_mod,fi and γM,fi",
                        value="k_mod,fi = 1.0 in the reduced cross-section method and "
                              "γM,fi = 1.0 (recommended value)")

_SYMBOLS = {"beta_n": r"\beta_n", "d_char_n": "d_{char,n}", "k_0": "k_0", "d_0": "d_0",
            "d_ef": "d_{ef}", "b_ef": "b_{ef}", "h_ef": "h_{ef}", "W_ef": "W_{ef}",
            "k_fi": "k_{fi}", "k_mod_fi": "k_{mod,fi}", "f_m_k": "f_{m,k}",
            "gamma_M_fi": r"\gamma_{M,fi}", "f_m_d_fi": "f_{m,d,fi}", "M_Rd_fi": "M_{Rd,fi}",
            "M_d_fi": "M_{d,fi}", "t_20": r"20\,\mathrm{min}",
            "t_fail": "t_{fail}"}
_LENGTH = dict(unit="m", display="mm")


def _table_sources(timber: str) -> tuple[Cite, Cite]:
    """The two table look-ups of a kind of timber, each a value to confirm."""
    properties = TIMBER_TYPES[timber]
    beta = properties.notional_charring_rate / _MM_PER_MIN
    return (Cite(_EN1995, "§3.4.2, Table 3.1", confirmed=False,
                 key=f"EN 1995-1-2:2004 Table 3.1 {timber}",
                 value=f"βn = {beta:g} mm/min for {_TABLE_3_1_ROW[timber]}"),
            Cite(_EN1995, "§2.3, Table 2.1", confirmed=False,
                 key=f"EN 1995-1-2:2004 Table 2.1 {timber}",
                 value=f"k_fi = {properties.k_fi:g} for {_TABLE_2_1_ROW[timber]}"))


def _record(out, path: str):
    for record in out.records:
        if record.path == path:
            return record
    return None


def _refused(out, path: str, what: str, expected: str) -> InputError:
    """An error located at the input ``path`` and quoting it as written."""
    record = _record(out, path)
    return InputError(record.loc if record else None, f"{out.block_key}.inputs.{path}", what,
                      expected, repr(record.written) if record else "")


def _time(si: float, given: bool = False) -> Value:
    return Value(float(si), "s", "min", given=given)


def _charring_inputs(inp, out) -> tuple[Value, Value, float, float]:
    """Return βn and k_fi as operands and as floats: looked up from the tables for a kind of
    timber, or as given."""
    if inp.timber is None:
        if inp.k_fi is None:
            raise MissingInput("k_fi", "k_fi of EN 1995-1-2:2004 Table 2.1 with "
                               "notional_charring_rate")
        out.note("βn and k_fi as stated in the inputs, with their sources.", _CHARRING)
        return (out.input("notional_charring_rate"), out.input("k_fi"),
                float(inp.notional_charring_rate), float(inp.k_fi))
    if inp.k_fi is not None:
        raise _refused(out, "k_fi", "input 'k_fi' applies only with notional_charring_rate",
                       "k_fi from Table 2.1 for the timber given (or notional_charring_rate "
                       "with k_fi in place of timber)")
    properties = TIMBER_TYPES[inp.timber]
    table_3_1, table_2_1 = _table_sources(inp.timber)
    beta = properties.notional_charring_rate
    out.statement("beta_n", properties.title.replace(">=", "≥") + ": βn = {beta}.", beta, "m/s",
                  values={"beta": Value(beta, "m/s", "mm/min", given=True)}, display="mm/min",
                  label="Notional charring rate, by table", source=table_3_1, symbols=_SYMBOLS)
    out.statement("k_fi", _TABLE_2_1_ROW[inp.timber].capitalize() + ": k_fi = {k}.",
                  properties.k_fi, values={"k": Value(properties.k_fi, given=True)},
                  label="Factor to the 20 % fractile strength, by table", source=table_2_1,
                  symbols=_SYMBOLS)
    # The table values enter the working in full, as the tables print them.
    return (Value(beta, "m/s", "mm/min", given=True), Value(properties.k_fi, given=True), beta,
            properties.k_fi)


def _compute(inp, out):
    beta_v, k_fi_v, beta, k_fi = _charring_inputs(inp, out)
    duration = float(inp.duration)
    three = inp.exposure == "three_sided"
    result = timber_member_fire(inp.width, inp.depth, duration, beta, k_fi,
                                inp.characteristic_bending_strength, inp.exposure,
                                inp.zero_strength_layer, inp.design_moment)
    t = out.input("duration")
    b, h = out.input("width"), out.input("depth")

    d_char = out.step("d_char_n", "beta_n * t", {"beta_n": beta_v, "t": t},
                      result.charring_depth, label="Notional charring depth",
                      source=_CHARRING, symbols=_SYMBOLS, yields="charring_depth")
    if duration < ZERO_STRENGTH_RAMP_TIME:
        k_0 = out.step("k_0", "t / t_20", {"t": t, "t_20": _time(ZERO_STRENGTH_RAMP_TIME, True)},
                       duration / ZERO_STRENGTH_RAMP_TIME,
                       label="Share of the zero-strength layer reached (t < 20 min)",
                       source=_ZERO_STRENGTH_SOURCE, symbols=_SYMBOLS)
    else:
        k_0 = out.statement("k_0", "t = {t} is at least 20 min: k0 = 1.", 1.0, values={"t": t},
                            label="Share of the zero-strength layer reached",
                            source=_ZERO_STRENGTH_SOURCE, symbols=_SYMBOLS)
        k_0 = Value(1.0, given=True)
    d_ef = out.step("d_ef", "d_char_n + k_0 * d_0",
                    {"d_char_n": d_char, "k_0": k_0, "d_0": out.input("zero_strength_layer")},
                    result.effective_charring_depth, label="Effective charring depth",
                    source=_ZERO_STRENGTH_SOURCE, symbols=_SYMBOLS,
                    yields="effective_charring_depth")
    b_ef = _residual(out, "b_ef", "b - 2 * d_ef", {"b": b, "d_ef": d_ef}, result.residual_width,
                     "Residual width: both sides char", "residual_width")
    h_expr, h_label = (("h - d_ef", "Residual depth: the bottom face chars, the top face is "
                        "protected") if three else
                       ("h - 2 * d_ef", "Residual depth: top and bottom faces char"))
    h_ef = _residual(out, "h_ef", h_expr, {"h": h, "d_ef": d_ef}, result.residual_depth, h_label,
                     "residual_depth")
    if result.burnt_through:
        w_ef = out.statement("W_ef", "The member has burnt through: no section is left.", 0.0,
                             "m^3", label="Section modulus of the residual section",
                             source=_METHOD, symbols=_SYMBOLS, yields="section_modulus")
    else:
        w_ef = out.step("W_ef", "b_ef * h_ef ** 2 / 6", {"b_ef": b_ef, "h_ef": h_ef},
                        result.section_modulus, label="Elastic section modulus of the residual "
                        "section", source=_METHOD, symbols=_SYMBOLS, yields="section_modulus")
    f_d = out.step("f_m_d_fi", "k_mod_fi * k_fi * f_m_k / gamma_M_fi",
                   {"k_mod_fi": Value(K_MOD_FI, given=True), "k_fi": k_fi_v,
                    "f_m_k": out.input("characteristic_bending_strength"),
                    "gamma_M_fi": Value(GAMMA_M_FI, given=True)},
                   result.design_strength, "Pa", display="N/mm^2",
                   label="Design bending strength in fire", source=_STRENGTH_SOURCE,
                   symbols=_SYMBOLS)
    m_rd = out.step("M_Rd_fi", "W_ef * f_m_d_fi", {"W_ef": w_ef, "f_m_d_fi": f_d},
                    result.bending_resistance, label="Bending resistance in fire",
                    source=_METHOD, symbols=_SYMBOLS, yields="bending_resistance")
    out.simulated_until = duration
    if inp.design_moment is not None:
        _design_moment_steps(inp, out, result, m_rd, duration)
    _notes(inp, out, three)
    out.figure(_section_figure(inp, out, result, three))
    out.figure(_resistance_figure(inp, out, beta, k_fi, result, duration))


def _residual(out, name, expr, operands, value, label, yields) -> Value:
    """A residual dimension: the formula, or 0 where the charring has met in the middle."""
    if value > 0.0:
        return out.step(name, expr, operands, value, label=label, source=_METHOD,
                        symbols=_SYMBOLS, yields=yields)
    return out.statement(name, f"{expr.replace(' * ', ' ')} is not positive: the member has "
                         "burnt through, and nothing is left.", 0.0, label=label,
                         source=_METHOD, symbols=_SYMBOLS, yields=yields)


def _design_moment_steps(inp, out, result, m_rd: Value, duration: float):
    m_d = out.input("design_moment")
    if result.bending_resistance > 0.0:
        out.step("mu_fi", "M_d_fi / M_Rd_fi", {"M_d_fi": m_d, "M_Rd_fi": m_rd},
                 result.utilisation, label="Utilisation in fire", source=_METHOD,
                 symbols=_SYMBOLS, yields="utilisation")
    else:
        out.not_reached("utilisation", "the member has burnt through: no resistance is left")
    t_fail = result.time_to_failure
    if t_fail is None:
        out.not_reached("time_to_failure", "not reached in {d}", d=_time(duration))
    elif t_fail == 0.0:
        out.statement("t_fail", "M_d,fi = {m} exceeds M_Rd,fi at the start of the fire.", 0.0,
                      values={"m": m_d}, label="Time to failure", source=_METHOD,
                      symbols=_SYMBOLS, yields="time_to_failure")
    else:
        out.statement("t_fail", "M_Rd,fi(t), worked out as above at each time, falls as the "
                      "section chars; it equals M_d,fi = {m} at this time, the root of "
                      "M_Rd,fi(t) − M_d,fi = 0 between 0 and {d} found by Brent's method.",
                      t_fail, "s", values={"m": m_d, "d": _time(duration, True)},
                      display="min", label="Time to failure", source=f"{_METHOD}; {_BRENT}",
                      symbols=_SYMBOLS, yields="time_to_failure")


def _notes(inp, out, three: bool):
    out.note("Standard fire (ISO 834-1:1999, EN 1991-1-2:2002 §3.2.1) on the exposed faces for "
             "the whole duration, on surfaces unprotected throughout; βn includes the rounding "
             "of the corners and fissures, so the residual section is a rectangle. " + (
                 "Three sides exposed: both sides and the bottom face char, the top face is "
                 "protected by the element it carries." if three else
                 "Four sides exposed: all faces char."), _CHARRING)
    out.warn("Only the bending resistance of the residual section is checked here; its "
             "lateral-torsional stability (EN 1995-1-1 with the residual section), shear and "
             "the connections are to be checked separately.", _METHOD)


def _section_figure(inp, out, result, three: bool) -> FigureData:
    """The section to scale: the original rectangle shaded where it has charred, the
    zero-strength layer and the residual section; half the text width, beside the graph."""
    b, h = float(inp.width), float(inp.depth)
    d_char, d_ef = result.charring_depth, result.effective_charring_depth
    top_char = h if three else h - d_char
    top_ef = h if three else h - d_ef
    boxes = [Box(0.0, 0.0, b, h, "", shade=1)]
    if b > 2 * d_char and top_char > d_char:
        boxes.append(Box(d_char, d_char, b - d_char, top_char, "", shade=2))
    if not result.burnt_through:
        boxes.append(Box(d_ef, d_ef, b - d_ef, top_ef, "residual", shade=0))
    pad = 0.08 * max(b, h)
    height = h + 2 * pad
    width = max(b + 2 * pad, 1.6 * height)  # wide enough to stand half the text width
    marks = (Mark("y", h, "top face protected", 0),) if three else ()
    values = {"b": out.input("width"), "h": out.input("depth"), "t": out.input("duration"),
              "dc": Value(d_char, **_LENGTH), "def": Value(d_ef, **_LENGTH)}
    caption = ("Cross-section of " + out.block_key + " after {t}, to scale: the original "
               "{b} × {h}, charred to d_char,n = {dc} (hatched), the zero-strength layer to "
               "d_ef = {def} (grey)")
    if result.burnt_through:
        caption += "; nothing is left"
    else:
        values.update(be=Value(result.residual_width, **_LENGTH),
                      he=Value(result.residual_depth, **_LENGTH))
        caption += " and the residual section {be} × {he} (white)"
    return FigureData(
        key=f"{out.block_key}-section", caption=Phrase(caption, values),
        x=Axis("width", "m", "mm", (b / 2 - width / 2, b / 2 + width / 2)),
        y=Axis("depth", "m", "mm", (-pad, h + pad)),
        boxes=tuple(boxes), marks=marks, legend=None, equal_aspect=True, size=(86.0, 56.0))


def _resistance_figure(inp, out, beta, k_fi, result, duration: float) -> FigureData:
    """M_Rd,fi against time up to the duration, with the design moment and the failure."""
    times = np.linspace(0.0, duration, 241)
    moments = [bending_resistance_fire(inp.width, inp.depth, float(t), beta, k_fi,
                                       inp.characteristic_bending_strength, inp.exposure,
                                       inp.zero_strength_layer) for t in times]
    marks, points, values = [], [], {}
    caption = "Bending resistance M_Rd,fi of " + out.block_key + " against the time of fire"
    top = max(moments)
    if inp.design_moment is not None:
        m_d = float(inp.design_moment)
        top = max(top, m_d)
        marks.append(Mark("y", m_d, "design moment M_d,fi", 1))
        values["md"] = out.input("design_moment")
        caption += ", with the design moment M_d,fi = {md}"
        if result.time_to_failure is not None:
            points.append(Point(result.time_to_failure, m_d, "M_Rd,fi = M_d,fi"))
    return FigureData(
        key=f"{out.block_key}-resistance", caption=Phrase(caption, values),
        x=Axis("time t", "s", "min", (0.0, duration)),
        y=Axis("resistance M_Rd,fi", "N*m", "kN*m", (0.0, 1.08 * top)),
        lines=(Line(tuple(times.tolist()), tuple(moments), "M_Rd,fi", 0),),
        marks=tuple(marks), points=tuple(points), legend="upper right")


TIMBER_MEMBER_FIRE = Kind(
    name="timber_member_fire",
    title="Timber member in fire",
    summary="Residual cross-section and bending resistance of a rectangular timber member in "
            "the standard fire, by the reduced cross-section method of EN 1995-1-2:2004 "
            "§4.2.2.",
    inputs=(
        Quantity("width", "width b of the member", unit="m", greater_than=0.0),
        Quantity("depth", "depth h of the member (bending about the axis across the depth)",
                 unit="m", greater_than=0.0),
        Choice("timber", "kind of timber: sets βn (EN 1995-1-2:2004 Table 3.1) and k_fi "
               "(Table 2.1)", options=tuple(TIMBER_TYPES)),
        Quantity("notional_charring_rate", "notional charring rate βn, in place of timber, "
                 "with k_fi", unit="m/s", greater_than=0.0, display="mm/min"),
        Quantity("k_fi", "k_fi (EN 1995-1-2:2004 Table 2.1), with notional_charring_rate",
                 default=None, greater_than=0.0),
        Choice("exposure", "faces exposed: three_sided (the top face protected, e.g. by a "
               "floor) or four_sided", options=EXPOSURES),
        Quantity("duration", "time of standard fire exposure t (ISO 834-1; EN 1991-1-2 §3.2.1)",
                 unit="s", greater_than=0.0, at_most=MAX_DURATION, display="min"),
        Quantity("characteristic_bending_strength", "characteristic bending strength f_m,k",
                 unit="Pa", greater_than=0.0),
        Quantity("design_moment", "design bending moment in fire M_d,fi (optional)",
                 default=None, unit="N*m", greater_than=0.0),
        Quantity("zero_strength_layer", "zero-strength layer d0", default="7 mm",
                 source="EN 1995-1-2:2004 §4.2.2(1)", unit="m", at_least=0.0),
    ),
    results=(
        ResultSpec("charring_depth", "m", "notional charring depth d_char,n", display="mm"),
        ResultSpec("effective_charring_depth", "m", "effective charring depth d_ef",
                   display="mm"),
        ResultSpec("residual_width", "m", "width of the residual section b_ef", display="mm"),
        ResultSpec("residual_depth", "m", "depth of the residual section h_ef", display="mm"),
        ResultSpec("section_modulus", "m^3", "section modulus of the residual section W_ef",
                   display="cm^3"),
        ResultSpec("bending_resistance", "N*m", "bending resistance in fire M_Rd,fi",
                   display="kN*m"),
        ResultSpec("utilisation", "1", "with design_moment: M_d,fi / M_Rd,fi"),
        ResultSpec("time_to_failure", "s", "with design_moment: time at which M_Rd,fi falls "
                   "to M_d,fi", display="min"),
    ),
    compute=_compute,
    exactly_one=(("timber", "notional_charring_rate"),),
    caution=FIRE_CAUTION + " The reduced cross-section method applies to surfaces unprotected "
            "throughout a standard fire; the timber's grade and density, the exposure and the "
            "design moment in fire are the engineer's to confirm.",
    # The physics functions' parameter names that are not the inputs' own.
    input_names={"characteristic_strength": "characteristic_bending_strength",
                 "effective_charring_depth_value": "duration"},
    references=("EN 1995-1-2:2004", "EN 1991-1-2:2002", "ISO 834-1:1999"),
)

KINDS = (TIMBER_MEMBER_FIRE,)
