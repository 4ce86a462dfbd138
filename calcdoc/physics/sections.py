"""Section factors of steel I-sections in fire: EN 1993-1-2:2005 §4.2.5.1, Table 4.2, eq. (4.26a).

The perimeter and area of a rolled I-section follow from its five dimensions (height h, width b,
web thickness t_w, flange thickness t_f, root radius r), with the four root fillets as quarter
circles. The section factor is the exposed perimeter over the area (Table 4.2): the contour for an
unprotected member or a contour (profile) encasement, the enclosing box for a box encasement and for
the shadow effect of eq. (4.26a). "Three sided" means the top face of the top flange is shielded,
e.g. by a slab.

All lengths are in metres, areas in m², section factors in 1/m. The one function here that reads a
file is :func:`load_section_catalogue` (the catalogue of rolled sections,
calcdoc/materials/sections.yaml); everything else is pure.
"""

from __future__ import annotations

import difflib
import math
import re
from functools import lru_cache
from pathlib import Path
from typing import NamedTuple

import yaml

from calcdoc.physics import PhysicsRangeError

__all__ = [
    "EXPOSURES",
    "ENCASEMENTS",
    "SHADOW_FACTOR_COEFFICIENT",
    "i_section_perimeter",
    "i_section_area",
    "box_perimeter",
    "section_factor",
    "box_section_factor",
    "shadow_factor",
    "ISectionFactors",
    "i_section_factors",
    "RolledSection",
    "CATALOGUE_PATH",
    "load_section_catalogue",
    "rolled_section",
    "closest_sections",
]

#: Sides of an I-section exposed to the fire (docs/format.md, steel_member_heating).
EXPOSURES = ("four_sided", "three_sided")
#: Fire protection follows the profile (contour) or encloses it (box), EN 1993-1-2:2005 Table 4.2.
ENCASEMENTS = ("contour", "box")
#: The 0.9 of eq. (4.26a), k_sh = 0.9 [Am/V]_b / [Am/V], for I-sections under nominal fire actions.
SHADOW_FACTOR_COEFFICIENT = 0.9

CATALOGUE_PATH = Path(__file__).resolve().parent.parent / "materials" / "sections.yaml"


# --- checks ------------------------------------------------------------------------------------

def _length(name: str, value: float, allow_zero: bool = False) -> float:
    value = float(value)
    ok = math.isfinite(value) and (value >= 0.0 if allow_zero else value > 0.0)
    if not ok:
        raise PhysicsRangeError(name, value, "a finite length >= 0 m" if allow_zero
                                else "a finite length > 0 m")
    return value


def _i_section(height: float, width: float, web_thickness: float, flange_thickness: float,
               root_radius: float) -> tuple[float, float, float, float, float]:
    """The five dimensions as floats, refused unless they describe a real I-section."""
    h = _length("height", height)
    b = _length("width", width)
    tw = _length("web_thickness", web_thickness)
    tf = _length("flange_thickness", flange_thickness)
    r = _length("root_radius", root_radius, allow_zero=True)
    if tw >= b:
        raise PhysicsRangeError("web_thickness", tw, f"less than the width b = {b!r} m")
    if 2.0 * tf >= h:
        raise PhysicsRangeError("flange_thickness", tf,
                                f"less than half the height h/2 = {h / 2.0!r} m")
    # Each fillet must fit in the corner between web and flange: a quarter circle of radius r
    # needs r of flange outstand and r of clear web depth on each side.
    room = min((b - tw) / 2.0, (h - 2.0 * tf) / 2.0)
    if r > room:
        raise PhysicsRangeError("root_radius", r,
                                f"at most {room!r} m, so that the fillets fit between web and "
                                "flanges: r <= (b - t_w)/2 and r <= (h - 2 t_f)/2")
    return h, b, tw, tf, r


def _exposure(exposure: str) -> str:
    if exposure not in EXPOSURES:
        raise PhysicsRangeError("exposure", exposure, "'four_sided' or 'three_sided'")
    return exposure


# --- perimeter, area -----------------------------------------------------------------------------

def i_section_perimeter(height: float, width: float, web_thickness: float,
                        flange_thickness: float, root_radius: float) -> float:
    r"""Return the outer perimeter P [m] of a rolled I-section with root fillets.

    .. math::
        P = 2h + 4b - 2t_w + (2\pi - 8)\,r

    Parameters
    ----------
    height : float
        Overall height h [m], > 0.
    width : float
        Flange width b [m], > t_w.
    web_thickness : float
        t_w [m], > 0.
    flange_thickness : float
        t_f [m], 0 < t_f < h/2.
    root_radius : float
        Root (fillet) radius r [m], >= 0, fitting between web and flanges.

    Returns
    -------
    float
        Perimeter P [m] (the surface per metre length, m²/m).

    Notes
    -----
    Geometry: the straight outline 2h + 4b − 2t_w, with each of the four fillets replacing 2r of
    straight edge by a quarter arc πr/2. The section's tables give the same figure as the painted
    surface per metre. Dimensions that do not make an I-section (t_w >= b, 2t_f >= h, fillets that
    do not fit) raise :class:`~calcdoc.physics.PhysicsRangeError`.

    Examples
    --------
    >>> round(i_section_perimeter(0.300, 0.150, 0.0071, 0.0107, 0.015), 4)   # IPE 300
    1.16

    References
    ----------
    1. EN 1993-1-2:2005, Eurocode 3 — Design of steel structures — Part 1-2: Structural fire
       design. §4.2.5.1, Table 4.2 (section factor as perimeter over area).
    """
    h, b, tw, _, r = _i_section(height, width, web_thickness, flange_thickness, root_radius)
    return 2.0 * h + 4.0 * b - 2.0 * tw + (2.0 * math.pi - 8.0) * r


def i_section_area(height: float, width: float, web_thickness: float, flange_thickness: float,
                   root_radius: float) -> float:
    r"""Return the cross-section area A [m²] of a rolled I-section with root fillets.

    .. math::
        A = 2\,b\,t_f + (h - 2t_f)\,t_w + (4 - \pi)\,r^2

    Parameters
    ----------
    height : float
        Overall height h [m], > 0.
    width : float
        Flange width b [m], > t_w.
    web_thickness : float
        t_w [m], > 0.
    flange_thickness : float
        t_f [m], 0 < t_f < h/2.
    root_radius : float
        Root radius r [m], >= 0, fitting between web and flanges.

    Returns
    -------
    float
        Area A [m²].

    Notes
    -----
    Geometry: two flanges, the web between them and four fillets, each a square r² less a quarter
    circle πr²/4. Sloping flanges and edge roundings of older profiles are not represented.

    Examples
    --------
    >>> round(i_section_area(0.300, 0.150, 0.0071, 0.0107, 0.015) * 1e4, 2)   # IPE 300, cm²
    53.81

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1, Table 4.2 (V is the volume per unit length, i.e. the area).
    """
    h, b, tw, tf, r = _i_section(height, width, web_thickness, flange_thickness, root_radius)
    return 2.0 * b * tf + (h - 2.0 * tf) * tw + (4.0 - math.pi) * r * r


def box_perimeter(height: float, width: float, exposure: str = "four_sided") -> float:
    r"""Return the perimeter [m] of the box enclosing an I-section, on its exposed sides.

    .. math::
        P_b = \begin{cases} 2(b + h) & \text{four sided} \\ b + 2h & \text{three sided}
        \end{cases}

    Parameters
    ----------
    height : float
        h [m], > 0.
    width : float
        b [m], > 0.
    exposure : str
        ``"four_sided"`` or ``"three_sided"`` (top face shielded).

    Returns
    -------
    float
        Box perimeter [m].

    Notes
    -----
    The box is the smallest rectangle around the section; on three sides the top face, which lies
    against the shielding element, is left out.

    Examples
    --------
    >>> round(box_perimeter(0.300, 0.150, "three_sided"), 3)
    0.75

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1, Table 4.2 (box value of the section factor) and §4.2.5.1(2),
       eq. (4.26a) (box value [Am/V]_b).
    """
    h = _length("height", height)
    b = _length("width", width)
    return 2.0 * (b + h) if _exposure(exposure) == "four_sided" else b + 2.0 * h


# --- section factors ---------------------------------------------------------------------------

def section_factor(height: float, width: float, web_thickness: float, flange_thickness: float,
                   root_radius: float, exposure: str = "four_sided",
                   encasement: str | None = None) -> float:
    r"""Return the section factor [1/m] of an I-section: Am/V unprotected, Ap/V protected.

    .. math::
        \frac{A_m}{V} = \begin{cases} P/A & \text{four sided} \\ (P - b)/A & \text{three sided}
        \end{cases}, \qquad
        \frac{A_p}{V} = \begin{cases} A_m/V & \text{contour encasement} \\
        P_b/A & \text{box encasement} \end{cases}

    Parameters
    ----------
    height, width, web_thickness, flange_thickness, root_radius : float
        h, b, t_w, t_f, r [m] (see :func:`i_section_perimeter`).
    exposure : str
        ``"four_sided"`` or ``"three_sided"`` (top face of the top flange shielded).
    encasement : str or None
        None for an unprotected member; ``"contour"`` or ``"box"`` for fire protection that
        follows the profile or encloses it.

    Returns
    -------
    float
        Am/V (unprotected) or Ap/V (protected) [1/m].

    Notes
    -----
    EN 1993-1-2:2005 Table 4.2. On three sides the shielded face of the top flange (width b) is
    not exposed. A contour encasement is heated through the same perimeter as the bare steel, so
    Ap/V = Am/V; a box encasement through the box perimeter, :func:`box_perimeter`. The heating
    equations need Am/V >= 10 1/m (§4.2.5.1), which every rolled I-section meets; that limit is
    applied by the heating functions in :mod:`calcdoc.physics.steel`.

    Examples
    --------
    >>> round(section_factor(0.300, 0.150, 0.0071, 0.0107, 0.015))   # IPE 300, 1/m
    216
    >>> round(section_factor(0.300, 0.150, 0.0071, 0.0107, 0.015, "three_sided", "box"))
    139

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1 and §4.2.5.2, Table 4.2.
    """
    h, b, tw, tf, r = _i_section(height, width, web_thickness, flange_thickness, root_radius)
    area = i_section_area(h, b, tw, tf, r)
    if encasement is None or encasement == "contour":
        perimeter = i_section_perimeter(h, b, tw, tf, r)
        if _exposure(exposure) == "three_sided":
            perimeter -= b
        return perimeter / area
    if encasement == "box":
        return box_perimeter(h, b, exposure) / area
    raise PhysicsRangeError("encasement", encasement,
                            "None (unprotected), 'contour' or 'box' (EN 1993-1-2:2005 Table 4.2)")


def box_section_factor(height: float, width: float, web_thickness: float, flange_thickness: float,
                       root_radius: float, exposure: str = "four_sided") -> float:
    r"""Return the box value of the section factor [Am/V]_b [1/m] of an I-section.

    .. math::
        \left[\frac{A_m}{V}\right]_b = \frac{P_b}{A}

    Parameters
    ----------
    height, width, web_thickness, flange_thickness, root_radius : float
        h, b, t_w, t_f, r [m].
    exposure : str
        ``"four_sided"`` or ``"three_sided"``.

    Returns
    -------
    float
        [Am/V]_b [1/m].

    Notes
    -----
    The box perimeter over the area of the steel, as used in eq. (4.26a) for the shadow effect;
    the same figure is Ap/V of a box encasement.

    Examples
    --------
    >>> round(box_section_factor(0.300, 0.150, 0.0071, 0.0107, 0.015))   # IPE 300
    167

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1(2), eq. (4.26a) and Table 4.2.
    """
    return section_factor(height, width, web_thickness, flange_thickness, root_radius, exposure,
                          "box")


def shadow_factor(section_factor_value: float, box_section_factor_value: float,
                  nominal_fire: bool = True) -> float:
    r"""Return the correction factor for the shadow effect k_sh [-] of an unprotected I-section.

    .. math::
        k_{sh} = 0.9\,\frac{[A_m/V]_b}{A_m/V}\ \text{(nominal fire)}, \qquad
        k_{sh} = \frac{[A_m/V]_b}{A_m/V}\ \text{(other fires)}

    Parameters
    ----------
    section_factor_value : float
        Am/V [1/m], > 0.
    box_section_factor_value : float
        [Am/V]_b [1/m], > 0, not more than Am/V.
    nominal_fire : bool
        True under a nominal fire (the standard, external or hydrocarbon curve, EN 1991-1-2
        §3.2): eq. (4.26a); False under any other fire: eq. (4.26b).

    Returns
    -------
    float
        k_sh [-], <= 0.9 (nominal fire) or <= 1.

    Notes
    -----
    Eq. (4.26a) holds for I-sections under nominal fire actions (the standard fire among them); in
    all other cases eq. (4.26b), k_sh = [Am/V]_b/[Am/V], applies, and k_sh = 1 is always on the
    safe side. The box of a convex outline cannot exceed its contour, so [Am/V]_b > Am/V is refused.

    Examples
    --------
    >>> shadow_factor(200.0, 120.0)
    0.54
    >>> shadow_factor(200.0, 120.0, nominal_fire=False)
    0.6

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1(2), eqs. (4.26a) and (4.26b).
    """
    am_v = float(section_factor_value)
    box = float(box_section_factor_value)
    if not (math.isfinite(am_v) and am_v > 0.0):
        raise PhysicsRangeError("section_factor_value", am_v, "a finite Am/V > 0 1/m")
    if not (math.isfinite(box) and 0.0 < box <= am_v):
        raise PhysicsRangeError("box_section_factor_value", box,
                                f"0 < [Am/V]_b <= Am/V = {am_v!r} 1/m (the box of an I-section "
                                "is never longer than its contour)")
    return (SHADOW_FACTOR_COEFFICIENT if nominal_fire else 1.0) * box / am_v


class ISectionFactors(NamedTuple):
    """Perimeters, area and section factors of an I-section for one exposure (SI)."""

    area: float  # m^2
    perimeter: float  # m, exposed contour (P, or P - b on three sides)
    box_perimeter: float  # m, exposed box (2(b + h), or b + 2h on three sides)
    section_factor: float  # 1/m, Am/V unprotected, Ap/V with the encasement given
    box_section_factor: float  # 1/m, [Am/V]_b
    shadow_factor: float | None  # 1, eq. (4.26a); None for a protected member


def i_section_factors(height: float, width: float, web_thickness: float, flange_thickness: float,
                      root_radius: float, exposure: str = "four_sided",
                      encasement: str | None = None, nominal_fire: bool = True) -> ISectionFactors:
    r"""Return the area, exposed perimeters, section factors and shadow factor of an I-section.

    .. math::
        \frac{A_m}{V} = \frac{P_{exp}}{A}, \qquad \left[\frac{A_m}{V}\right]_b = \frac{P_b}{A},
        \qquad k_{sh} = 0.9\,\frac{[A_m/V]_b}{A_m/V}

    Parameters
    ----------
    height, width, web_thickness, flange_thickness, root_radius : float
        h, b, t_w, t_f, r [m].
    exposure : str
        ``"four_sided"`` or ``"three_sided"``.
    encasement : str or None
        None (unprotected), ``"contour"`` or ``"box"``.
    nominal_fire : bool
        True under a nominal fire curve (eq. (4.26a)), False otherwise (eq. (4.26b)).

    Returns
    -------
    ISectionFactors
        ``area`` [m²], ``perimeter`` and ``box_perimeter`` [m] on the exposed sides,
        ``section_factor`` (the one to use: Am/V, or Ap/V for the encasement) and
        ``box_section_factor`` [1/m], ``shadow_factor`` [-] (unprotected only; None when protected,
        where eq. (4.26a) does not apply).

    Notes
    -----
    Combines :func:`i_section_area`, :func:`i_section_perimeter`, :func:`box_perimeter`,
    :func:`section_factor` and :func:`shadow_factor`; see those for the clauses.

    Examples
    --------
    >>> f = i_section_factors(0.300, 0.150, 0.0071, 0.0107, 0.015)   # IPE 300
    >>> round(f.section_factor), round(f.box_section_factor), round(f.shadow_factor, 3)
    (216, 167, 0.698)

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1, Table 4.2 and eqs. (4.26a), (4.26b); §4.2.5.2.
    """
    h, b, tw, tf, r = _i_section(height, width, web_thickness, flange_thickness, root_radius)
    _exposure(exposure)
    area = i_section_area(h, b, tw, tf, r)
    perimeter = i_section_perimeter(h, b, tw, tf, r) - (b if exposure == "three_sided" else 0.0)
    box = box_perimeter(h, b, exposure)
    used = section_factor(h, b, tw, tf, r, exposure, encasement)
    box_factor = box / area
    k_sh = (shadow_factor(perimeter / area, box_factor, nominal_fire) if encasement is None
            else None)
    return ISectionFactors(area, perimeter, box, used, box_factor, k_sh)


# --- catalogue of rolled sections ----------------------------------------------------------------

class RolledSection(NamedTuple):
    """One rolled I-section of the catalogue, in SI."""

    designation: str  # as written in the catalogue, e.g. "IPE 300", "UB 457x191x67"
    family: str  # IPE, HEA, HEB, UB, UC
    height: float  # m
    width: float  # m
    web_thickness: float  # m
    flange_thickness: float  # m
    root_radius: float  # m
    published_area: float  # m^2, the tabulated A
    published_surface: float | None  # m^2/m, the tabulated surface per metre
    source: str  # the family's source documents and tables
    confirmed: bool  # checked against the printed table

    @property
    def dimension_source(self) -> str:
        """The part of the family's source that gives the dimensions (the rest names the
        tables of areas and surfaces, which the formulas here work out from the dimensions)."""
        parts = [p.strip() for p in self.source.split(";") if "dimension" in p]
        return "; ".join(parts) or self.source


def _key(designation: str) -> str:
    """A designation reduced for lookup: upper case, no spaces, '×' as 'X', 'HE 300 A' as HEA300."""
    text = re.sub(r"\s+", "", str(designation).upper().replace("×", "X"))
    match = re.fullmatch(r"HE(\d+)([AB])", text)
    return f"HE{match.group(2)}{match.group(1)}" if match else text


@lru_cache(maxsize=4)
def load_section_catalogue(path: str | Path = CATALOGUE_PATH) -> dict[str, RolledSection]:
    """Return the catalogue of rolled I-sections by designation, dimensions converted to metres.

    Parameters
    ----------
    path : str or Path
        The catalogue file (default: the built-in one).

    Returns
    -------
    dict
        Designation as written → :class:`RolledSection`.

    Notes
    -----
    The catalogue (calcdoc/materials/sections.yaml) gives, per family, a ``source`` text and its
    ``sections``: h, b, tw, tf, r in mm, A in cm², surface in m²/m and ``confirmed`` (false until
    checked against the printed table). This is the one function of the module that reads a file;
    the result is cached.

    Examples
    --------
    >>> round(load_section_catalogue()["IPE 300"].height, 3)
    0.3

    References
    ----------
    1. The ``source`` of each family in the catalogue.
    """
    with open(path, encoding="utf-8") as handle:
        tree = yaml.load(handle, Loader=getattr(yaml, "CSafeLoader", yaml.SafeLoader))
    catalogue: dict[str, RolledSection] = {}
    for family, entry in tree.items():
        source = str(entry["source"])
        for designation, row in entry["sections"].items():
            surface = row.get("surface")
            catalogue[str(designation)] = RolledSection(
                designation=str(designation), family=str(family),
                height=row["h"] * 1e-3, width=row["b"] * 1e-3,
                web_thickness=row["tw"] * 1e-3, flange_thickness=row["tf"] * 1e-3,
                root_radius=row["r"] * 1e-3, published_area=row["A"] * 1e-4,
                published_surface=None if surface is None else float(surface),
                source=source, confirmed=bool(row.get("confirmed", False)))
    return catalogue


def rolled_section(profile: str, path: str | Path = CATALOGUE_PATH) -> RolledSection:
    """Return the rolled I-section of a designation from the catalogue.

    Spacing and case do not matter, "×" may stand for "x", and "HE 300 A" finds "HEA 300".

    Parameters
    ----------
    profile : str
        Designation, e.g. ``"IPE 300"``, ``"HEB 200"``, ``"UB 457x191x67"``, ``"UC 254x254x73"``.
    path : str or Path
        The catalogue file (default: the built-in one).

    Returns
    -------
    RolledSection
        Dimensions [m], published area [m²] and surface [m²/m], source and confirmation flag.

    Notes
    -----
    An unknown designation raises :class:`~calcdoc.physics.PhysicsRangeError` naming the closest
    designations in the catalogue.

    Examples
    --------
    >>> rolled_section("he 200 b").designation
    'HEB 200'

    References
    ----------
    1. The ``source`` of the section's family in the catalogue.
    """
    catalogue = load_section_catalogue(path)
    by_key = {_key(name): section for name, section in catalogue.items()}
    found = by_key.get(_key(profile))
    if found is None:
        close = closest_sections(profile, path=path)
        hint = f"; closest: {', '.join(close)}" if close else ""
        raise PhysicsRangeError("profile", profile,
                                "a designation in the catalogue of rolled sections (IPE 80-600, "
                                f"HEA/HEB 100-600, UB, UC){hint}")
    return found


def closest_sections(profile: str, n: int = 3, path: str | Path = CATALOGUE_PATH) -> list[str]:
    """Return the designations in the catalogue closest to a designation, closest first.

    Parameters
    ----------
    profile : str
        A designation, perhaps mistyped (``"IPE 310"``, ``"UB 356x171x50"``).
    n : int
        Most designations returned.
    path : str or Path
        The catalogue file (default: the built-in one).

    Returns
    -------
    list of str
        Up to ``n`` designations as written in the catalogue; empty when none is close.

    Notes
    -----
    Designations are compared as :func:`rolled_section` finds them (case, spacing and "×"
    ignored), by the similarity ratio of :class:`difflib.SequenceMatcher` (at least 0.6); among
    equally similar designations the one whose sizes are nearest comes first.

    Examples
    --------
    >>> closest_sections("IPE 310")[0]
    'IPE 300'

    References
    ----------
    1. Python standard library, difflib.SequenceMatcher.
    """
    wanted = _key(profile)
    numbers = [float(x) for x in re.findall(r"\d+(?:\.\d+)?", wanted)]

    def distance(key: str) -> float:
        # Among equally similar names, the nearest size first: IPE 310 is nearer IPE 300 than
        # IPE 360, though each differs from it by one character.
        theirs = [float(x) for x in re.findall(r"\d+(?:\.\d+)?", key)]
        if len(theirs) != len(numbers):
            return math.inf
        return sum(abs(a - b) for a, b in zip(theirs, numbers))

    ranked = []
    for name in load_section_catalogue(path):
        key = _key(name)
        ratio = difflib.SequenceMatcher(None, wanted, key).ratio()
        if ratio >= 0.6:
            ranked.append((-round(ratio, 9), distance(key), name))
    return [name for _, _, name in sorted(ranked)[:n]]
