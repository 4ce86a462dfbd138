"""The section of a steel member in fire, for ``steel_member_heating`` (docs/format.md, additions).

A member is given by its section instead of a section factor: an I-section by its five
dimensions (``{shape: i_section, height, width, web_thickness, flange_thickness,
root_radius}``) or a rolled section from calcdoc's catalogue (``{profile: "IPE 300"}``,
calcdoc/materials/sections.yaml). The kind then works out the section factor as a checker
does, step by step (EN 1993-1-2:2005 Table 4.2): the perimeter and the area from the
dimensions, the exposed perimeter, the box perimeter, Am/V (or Ap/V) and the box value, and
for an unprotected member the shadow factor of eq. (4.26a) or (4.26b).

A catalogue section's dimensions enter the working as given values that remember where they
came from (``Value.origin = "sections.DESIGNATION.DIMENSION"``): the catalogue's entries are
``confirmed: false`` until checked against the printed tables, and calcdoc.provenance lists
every section a block's working uses under "Values to confirm".
"""

from __future__ import annotations

from dataclasses import dataclass

from calcdoc.data import Value, phrase
from calcdoc.kinds.base import (REQUIRED, Choice, InputRecord, InvalidInput, Quantity, Record,
                                Text)
from calcdoc.located import plain
from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.sections import (RolledSection, box_perimeter, closest_sections,
                                      i_section_area, i_section_perimeter, rolled_section,
                                      shadow_factor)
from calcdoc.references import Cite

__all__ = ["SectionField", "section_input", "SECTION_DIMENSIONS", "SECTION_INPUT_NAMES",
           "section_steps", "SectionFactors", "TABLE_4_2", "SHADOW_SOURCE_A", "SHADOW_SOURCE_B"]

#: The five dimensions of an I-section, as the inputs and the physics name them.
SECTION_DIMENSIONS = ("height", "width", "web_thickness", "flange_thickness", "root_radius")
#: The symbols each dimension has in the working.
_SYMBOL = {"height": "h", "width": "b", "web_thickness": "t_w", "flange_thickness": "t_f",
           "root_radius": "r"}
#: The physics functions' parameter names → the inputs they come from (Kind.input_names).
SECTION_INPUT_NAMES = {name: f"section.{name}" for name in SECTION_DIMENSIONS}

TABLE_4_2 = "EN 1993-1-2:2005 §4.2.5.1, Table 4.2"
# Recalled, not read against the printed clause: data, listed under "Values to confirm".
SHADOW_SOURCE_A = Cite("EN 1993-1-2:2005", "§4.2.5.1(2), eq. (4.26a)", confirmed=False,
                       key="EN 1993-1-2:2005 eq. (4.26a)",
                       value="k_sh = 0.9·[Am/V]b/[Am/V] for I-sections under nominal fire "
                             "actions")
SHADOW_SOURCE_B = Cite("EN 1993-1-2:2005", "§4.2.5.1(2), eq. (4.26b)", confirmed=False,
                       key="EN 1993-1-2:2005 eq. (4.26b)",
                       value="k_sh = [Am/V]b/[Am/V] in all cases other than an I-section under "
                             "a nominal fire")

_SYMBOLS = {"P_exp": "P_{exp}", "A_m_V": "A_m/V", "A_p_V": "A_p/V", "A_m_V_b": "[A_m/V]_b"}

_SECTION_FIELDS = (
    Choice("shape", "shape of the section", default=None, options=("i_section",)),
    Quantity("height", "overall height h", default=None, unit="m", greater_than=0.0),
    Quantity("width", "flange width b", default=None, unit="m", greater_than=0.0),
    Quantity("web_thickness", "web thickness t_w", default=None, unit="m", greater_than=0.0),
    Quantity("flange_thickness", "flange thickness t_f", default=None, unit="m",
             greater_than=0.0),
    Quantity("root_radius", "root radius r", default=None, unit="m", at_least=0.0),
    Text("profile", "designation of a rolled section in calcdoc's catalogue, e.g. IPE 300, "
         "HEB 200, UB 356x171x51, UC 254x254x73", default=None),
)
_SHAPE_EXPECTED = ("{shape: i_section, height, width, web_thickness, flange_thickness, "
                   "root_radius} or {profile: DESIGNATION}")
_CATALOGUE_TEXT = ("a rolled section in calcdoc's catalogue (IPE 80 to 600, HEA and HEB 100 to "
                   "600, UB, UC)")


@dataclass(frozen=True)
class SectionField(Record):
    """The section of the member: an I-section by its dimensions or a rolled section by its
    designation. The value is a dict with the five dimensions in m, ``profile`` (the
    :class:`~calcdoc.physics.sections.RolledSection`, or None) and ``shape``. Declare it with
    :func:`section_input`."""

    def convert(self, node, ctx, path):
        value = super().convert(node, ctx, path)
        given = [k for k in SECTION_DIMENSIONS if value[k] is not None]
        if value["profile"] is not None:
            if given:
                ctx.error(node, path, "give either a profile or the section's dimensions",
                          _SHAPE_EXPECTED, "profile and " + ", ".join(given))
                raise InvalidInput
            value["profile"] = _catalogue_section(node.value["profile"], ctx, f"{path}.profile")
            for key in SECTION_DIMENSIONS:
                value[key] = getattr(value["profile"], key)
            return value
        missing = [k for k in SECTION_DIMENSIONS if value[k] is None]
        if missing:
            ctx.error(node, path, "the section's dimensions are incomplete", _SHAPE_EXPECTED,
                      "missing " + ", ".join(missing))
            raise InvalidInput
        return value


def section_input(meaning: str) -> SectionField:
    """Return the ``section`` input of a kind; declare it with ``exactly_one`` together with
    ``section_factor``."""
    return SectionField("section", meaning, default=REQUIRED, fields=_SECTION_FIELDS,
                        exactly_one=(("shape", "profile"),))


def _catalogue_section(node, ctx, path: str) -> RolledSection:
    """Return the catalogue's section for a designation, recorded as an input that shows its
    dimensions and the catalogue's source; an unknown designation is a located error naming
    the closest designations."""
    name = str(plain(node))
    try:
        section = rolled_section(name)
    except PhysicsRangeError:
        close = closest_sections(name)
        ctx.error(node, path, f"unknown profile '{name}'", _CATALOGUE_TEXT, repr(name),
                  "closest in the catalogue: " + ", ".join(f"'{c}'" for c in close)
                  if close else None)
        raise InvalidInput from None
    values = {_SYMBOL[k]: _dimension(section, k) for k in SECTION_DIMENSIONS}
    shown = phrase(section.designation + ": h = {h}, b = {b}, t_w = {t_w}, t_f = {t_f}, "
                   "r = {r}", **values)
    ctx.records.append(InputRecord(path, "rolled section from calcdoc's catalogue", name,
                                   section.designation, "", source=section.dimension_source,
                                   origin="given", loc=node.loc, shown=shown))
    return section


def _dimension(section: RolledSection, key: str) -> Value:
    """A catalogue dimension as a given operand in mm that remembers its entry."""
    return Value(float(getattr(section, key)), "m", "mm", given=True,
                 origin=f"sections.{section.designation}.{key}")


@dataclass(frozen=True)
class SectionFactors:
    """What the section's steps give, as operands for the heating steps."""

    section_factor: Value  # Am/V (unprotected) or Ap/V (protected)
    shadow_factor: Value | None  # k_sh for an unprotected member


def section_steps(out, section: dict, exposure: str, encasement: str | None,
                  shadow_given: float | None, nominal_fire: bool) -> SectionFactors:
    """Record the section factor's working (EN 1993-1-2:2005 Table 4.2, eq. (4.26a/b)) and
    return the section factor and, for an unprotected member, the shadow factor.

    ``encasement`` is None for an unprotected member; ``shadow_given`` is the block's own
    ``shadow_factor`` (None: worked out by eq. (4.26a) or (4.26b))."""
    profile = section["profile"]
    if profile is not None:
        dims = {_SYMBOL[k]: _dimension(profile, k) for k in SECTION_DIMENSIONS}
    else:
        dims = {_SYMBOL[k]: out.input(f"section.{k}") for k in SECTION_DIMENSIONS}
    h, b, tw, tf, r = (section[k] for k in SECTION_DIMENSIONS)
    three = exposure == "three_sided"
    box = encasement == "box"
    protected = encasement is not None
    where = ("from the catalogue" if profile is not None else "from its dimensions")

    perimeter = None
    if not box:  # a box encasement is heated through the box alone: the contour is not needed
        perimeter = out.step(
            "P", "2 * h + 4 * b - 2 * t_w + (2 * pi - 8) * r",
            {k: dims[k] for k in ("h", "b", "t_w", "r")}, i_section_perimeter(h, b, tw, tf, r),
            "m", label=f"Perimeter of the I-section {where}: straight edges and four root "
                       "fillets as quarter circles", source=TABLE_4_2, symbols=_SYMBOLS,
            yields=None if three else "perimeter")
        if three:
            perimeter = out.step(
                "P_exp", "P - b", {"P": perimeter, "b": dims["b"]}, perimeter.si - b, "m",
                label="Exposed perimeter on three sides: the top face of the top flange lies "
                      "against the element above", source=TABLE_4_2, symbols=_SYMBOLS,
                yields="perimeter")
    area = out.step(
        "A", "2 * b * t_f + (h - 2 * t_f) * t_w + (4 - pi) * r ** 2",
        {k: dims[k] for k in ("b", "t_f", "h", "t_w", "r")}, i_section_area(h, b, tw, tf, r),
        "m^2", label="Area of the I-section: two flanges, the web between them and four root "
                     "fillets", source=TABLE_4_2, symbols=_SYMBOLS, yields="area")
    box_length = box_perimeter(h, b, exposure)
    p_box = out.step(
        "P_b", "b + 2 * h" if three else "2 * (b + h)", {"b": dims["b"], "h": dims["h"]},
        box_length, "m", label="Perimeter of the box around the section"
        + (f" {where}, three sides: the top face lies against the element above" if box and three
           else f" {where}, four sides" if box else
           ", three sides" if three else ", four sides"),
        source=TABLE_4_2, symbols=_SYMBOLS, yields="perimeter" if box else None)
    box_factor = out.step(
        "A_m_V_b", "P_b / A", {"P_b": p_box, "A": area}, p_box.si / area.si, "1/m",
        label="Box value of the section factor", source=TABLE_4_2, symbols=_SYMBOLS,
        yields="box_section_factor")
    if box:
        factor = out.step(
            "A_p_V", "A_m_V_b", {"A_m_V_b": box_factor}, box_factor.si, "1/m",
            label="Section factor of the protected member: a box encasement is heated "
                  "through the box perimeter", source=TABLE_4_2, symbols=_SYMBOLS,
            yields="section_factor")
    else:
        name = "A_p_V" if protected else "A_m_V"
        label = ("Section factor of the protected member: a contour encasement follows the "
                 "exposed perimeter" if protected else
                 "Section factor of the unprotected member: exposed perimeter over area")
        factor = out.step(name, "P_exp / A" if three else "P / A",
                          {"P_exp" if three else "P": perimeter, "A": area},
                          perimeter.si / area.si, "1/m", label=label, source=TABLE_4_2,
                          symbols=_SYMBOLS, yields="section_factor")
    if protected:  # eq. (4.27) has no shadow factor: the result does not exist
        return SectionFactors(factor, None)
    if shadow_given is not None:
        out.statement("k_sh", "As stated in the inputs.", shadow_given,
                             yields="shadow_factor", label="Shadow factor",
                             source="EN 1993-1-2:2005 §4.2.5.1(2)", symbols=_SYMBOLS)
        return SectionFactors(factor, out.input("shadow_factor"))
    value = shadow_factor(factor.si, box_factor.si, nominal_fire)
    if nominal_fire:
        k_sh = out.step("k_sh", "0.9 * A_m_V_b / A_m_V", {"A_m_V_b": box_factor, "A_m_V": factor},
                        value, label="Shadow factor of an I-section under a nominal fire",
                        source=SHADOW_SOURCE_A, symbols=_SYMBOLS, yields="shadow_factor")
    else:
        k_sh = out.step("k_sh", "A_m_V_b / A_m_V", {"A_m_V_b": box_factor, "A_m_V": factor},
                        value, label="Shadow factor: the fire is not a nominal curve, so the "
                                     "0.9 of eq. (4.26a) does not apply",
                        source=SHADOW_SOURCE_B, symbols=_SYMBOLS, yields="shadow_factor")
    return SectionFactors(factor, k_sh)
