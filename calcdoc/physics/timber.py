"""Timber members in the standard fire: EN 1995-1-2:2004 reduced cross-section method (§4.2.2).

A rectangular member of width b and depth h chars from its exposed faces at the notional charring
rate βn (Table 3.1), which includes the effect of corner rounding and fissures. Below the char line
a zero-strength layer k0·d0 is also discounted (§4.2.2, Table 4.1); the rest of the section keeps
its strength at normal temperature, raised by k_fi to a 20 % fractile (Table 2.1) and with
k_mod,fi = 1.0 and γ_M,fi = 1.0.

Units are SI throughout: lengths in m, times in s, charring rates in m/s, strengths in Pa, moments
in N·m. The standard's tables give βn in mm/min and d0 in mm; the constants below convert them once.
Values marked "from memory" were recalled, not read from the printed standard when written.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.solvers import brentq

__all__ = [
    "TimberFireProperties",
    "TIMBER_TYPES",
    "EXPOSURES",
    "ZERO_STRENGTH_LAYER",
    "ZERO_STRENGTH_RAMP_TIME",
    "K_MOD_FI",
    "GAMMA_M_FI",
    "timber_fire_properties",
    "notional_charring_depth",
    "zero_strength_coefficient",
    "effective_charring_depth",
    "residual_section",
    "fire_design_strength",
    "bending_resistance_fire",
    "TimberMemberFire",
    "timber_member_fire",
    "time_to_failure",
]

_MM_PER_MIN = 1e-3 / 60.0  # m/s
_MINUTE = 60.0  # s


class TimberFireProperties(NamedTuple):
    """Notional charring rate and k_fi of a kind of timber (SI)."""

    title: str
    notional_charring_rate: float  # m/s, βn of EN 1995-1-2:2004 Table 3.1
    k_fi: float  # 1, EN 1995-1-2:2004 Table 2.1
    source: str


# EN 1995-1-2:2004 Table 3.1 (βn, mm/min) and Table 2.1 (k_fi); from memory, checked against each
# other: beech counts as softwood in Table 3.1; hardwood between 290 and 450 kg/m³ may be
# interpolated linearly (Table 3.1 note, from memory) - give `notional_charring_rate` for that.
TIMBER_TYPES: dict[str, TimberFireProperties] = {
    "solid_softwood": TimberFireProperties(
        "Solid softwood (or beech), characteristic density >= 290 kg/m³", 0.8 * _MM_PER_MIN, 1.25,
        "EN 1995-1-2:2004 Table 3.1 (solid timber, βn = 0.8 mm/min); Table 2.1 (solid timber, "
        "k_fi = 1.25)"),
    "glulam_softwood": TimberFireProperties(
        "Glued laminated softwood (or beech), characteristic density >= 290 kg/m³",
        0.7 * _MM_PER_MIN, 1.15,
        "EN 1995-1-2:2004 Table 3.1 (glued laminated timber, βn = 0.7 mm/min); Table 2.1 (glued "
        "laminated timber, k_fi = 1.15)"),
    "hardwood": TimberFireProperties(
        "Solid hardwood, characteristic density 290 kg/m³", 0.7 * _MM_PER_MIN, 1.25,
        "EN 1995-1-2:2004 Table 3.1 (hardwood, ρk = 290 kg/m³, βn = 0.7 mm/min); Table 2.1 "
        "(solid timber, k_fi = 1.25)"),
    "hardwood_dense": TimberFireProperties(
        "Solid hardwood, characteristic density >= 450 kg/m³", 0.55 * _MM_PER_MIN, 1.25,
        "EN 1995-1-2:2004 Table 3.1 (hardwood, ρk >= 450 kg/m³, βn = 0.55 mm/min); Table 2.1 "
        "(solid timber, k_fi = 1.25)"),
    "lvl": TimberFireProperties(
        "Laminated veneer lumber, characteristic density >= 480 kg/m³", 0.7 * _MM_PER_MIN, 1.1,
        "EN 1995-1-2:2004 Table 3.1 (LVL, βn = 0.7 mm/min); Table 2.1 (LVL, k_fi = 1.1)"),
}

#: Faces exposed: three sided (top face protected, e.g. by a floor) or four sided.
EXPOSURES = ("three_sided", "four_sided")
#: d0 = 7 mm, the zero-strength layer of the reduced cross-section method (§4.2.2(1)).
ZERO_STRENGTH_LAYER = 0.007
#: k0 grows linearly to 1 over the first 20 min on unprotected surfaces (Table 4.1).
ZERO_STRENGTH_RAMP_TIME = 20.0 * _MINUTE
#: k_mod,fi = 1.0 in the reduced cross-section method (§4.2.2(5), from memory).
K_MOD_FI = 1.0
#: γ_M,fi = 1.0, the recommended partial factor for timber in fire (§2.3(1) note, from memory).
GAMMA_M_FI = 1.0


# --- checks ------------------------------------------------------------------------------------

def _positive(name: str, value: float, unit: str) -> float:
    value = float(value)
    if not (math.isfinite(value) and value > 0.0):
        raise PhysicsRangeError(name, value, f"a finite value > 0 {unit}")
    return value


def _non_negative(name: str, value: float, unit: str) -> float:
    value = float(value)
    if not (math.isfinite(value) and value >= 0.0):
        raise PhysicsRangeError(name, value, f"a finite value >= 0 {unit}")
    return value


def _exposure(exposure: str) -> str:
    if exposure not in EXPOSURES:
        raise PhysicsRangeError("exposure", exposure,
                                "'three_sided' (top face protected) or 'four_sided'")
    return exposure


# --- EN 1995-1-2 steps -------------------------------------------------------------------------

def timber_fire_properties(timber: str) -> TimberFireProperties:
    r"""Return the notional charring rate βn and k_fi of a kind of timber.

    .. math::
        \beta_n = \text{Table 3.1}, \qquad k_{fi} = \text{Table 2.1}

    Parameters
    ----------
    timber : str
        ``"solid_softwood"``, ``"glulam_softwood"``, ``"hardwood"`` (ρk = 290 kg/m³),
        ``"hardwood_dense"`` (ρk >= 450 kg/m³) or ``"lvl"``.

    Returns
    -------
    TimberFireProperties
        ``title``, ``notional_charring_rate`` βn [m/s], ``k_fi`` [-] and ``source``.

    Notes
    -----
    βn [mm/min]: solid softwood 0.8, glued laminated softwood 0.7, hardwood 0.7 (ρk = 290 kg/m³)
    and 0.55 (ρk >= 450 kg/m³), LVL 0.7; softwood values need ρk >= 290 kg/m³ and LVL
    ρk >= 480 kg/m³. k_fi: solid timber 1.25, glued laminated timber 1.15, LVL 1.1. The hardwood
    entries are solid timber; glued laminated hardwood takes k_fi = 1.15 (give βn and k_fi
    directly). Table values from memory.

    Examples
    --------
    >>> p = timber_fire_properties("solid_softwood")
    >>> round(p.notional_charring_rate * 60e3, 2), p.k_fi   # mm/min, -
    (0.8, 1.25)

    References
    ----------
    1. EN 1995-1-2:2004, Eurocode 5 — Design of timber structures — Part 1-2: Structural fire
       design. §3.4.2, Table 3.1; §2.3, Table 2.1.
    """
    try:
        return TIMBER_TYPES[timber]
    except (KeyError, TypeError):
        raise PhysicsRangeError("timber", timber, "one of " + ", ".join(
            f"'{name}'" for name in TIMBER_TYPES) + " (EN 1995-1-2:2004 Table 3.1)") from None


def notional_charring_depth(duration: float, notional_charring_rate: float) -> float:
    r"""Return the notional charring depth d_char,n [m] after a time of standard fire exposure.

    .. math::
        d_{char,n} = \beta_n\, t

    Parameters
    ----------
    duration : float
        Time of fire exposure t [s], >= 0.
    notional_charring_rate : float
        βn [m/s], > 0.

    Returns
    -------
    float
        d_char,n [m].

    Notes
    -----
    Constant charring rate under the standard fire (ISO 834 / EN 1991-1-2 §3.2.1) for surfaces
    unprotected throughout the fire. βn includes corner rounding and fissures, so the residual
    section is taken as a rectangle.

    Examples
    --------
    >>> round(notional_charring_depth(3600.0, 0.8e-3 / 60.0) * 1e3, 6)   # mm after 60 min
    48.0

    References
    ----------
    1. EN 1995-1-2:2004, §3.4.2, eq. (3.2) (equation number from memory).
    """
    t = _non_negative("duration", duration, "s")
    beta = _positive("notional_charring_rate", notional_charring_rate, "m/s")
    return beta * t


def zero_strength_coefficient(duration: float) -> float:
    r"""Return k0 [-], the fraction of the zero-strength layer d0 reached after a time of fire.

    .. math::
        k_0 = \begin{cases} t / 20\ \mathrm{min} & t < 20\ \mathrm{min} \\
        1 & t \ge 20\ \mathrm{min} \end{cases}

    Parameters
    ----------
    duration : float
        Time of fire exposure t [s], >= 0.

    Returns
    -------
    float
        k0 [-], 0 to 1.

    Notes
    -----
    For surfaces unprotected throughout the fire (Table 4.1, first row). Protected surfaces with
    t_ch > 20 min have a different ramp, not provided here.

    Examples
    --------
    >>> zero_strength_coefficient(600.0), zero_strength_coefficient(3600.0)
    (0.5, 1.0)

    References
    ----------
    1. EN 1995-1-2:2004, §4.2.2(2), Table 4.1.
    """
    t = _non_negative("duration", duration, "s")
    return min(t / ZERO_STRENGTH_RAMP_TIME, 1.0)


def effective_charring_depth(duration: float, notional_charring_rate: float,
                             zero_strength_layer: float = ZERO_STRENGTH_LAYER) -> float:
    r"""Return the effective charring depth d_ef [m] of the reduced cross-section method.

    .. math::
        d_{ef} = d_{char,n} + k_0\, d_0

    Parameters
    ----------
    duration : float
        Time of fire exposure t [s], >= 0.
    notional_charring_rate : float
        βn [m/s], > 0.
    zero_strength_layer : float
        d0 [m], >= 0 (7 mm, §4.2.2(1)).

    Returns
    -------
    float
        d_ef [m], measured from each exposed face.

    Notes
    -----
    Unprotected surfaces, standard fire. The zero-strength layer stands for the loss of strength
    and stiffness of the heated wood next to the char line.

    Examples
    --------
    >>> round(effective_charring_depth(3600.0, 0.7e-3 / 60.0) * 1e3, 6)   # 42 + 7 mm
    49.0

    References
    ----------
    1. EN 1995-1-2:2004, §4.2.2, eq. (4.1) and Table 4.1.
    """
    d0 = _non_negative("zero_strength_layer", zero_strength_layer, "m")
    return (notional_charring_depth(duration, notional_charring_rate)
            + zero_strength_coefficient(duration) * d0)


def residual_section(width: float, depth: float, effective_charring_depth_value: float,
                     exposure: str = "three_sided") -> tuple[float, float]:
    r"""Return the effective width and depth (b_ef, h_ef) [m] of a rectangular member after fire.

    .. math::
        b_{ef} = b - 2 d_{ef}, \qquad
        h_{ef} = \begin{cases} h - d_{ef} & \text{three sided} \\ h - 2 d_{ef} & \text{four sided}
        \end{cases}

    each taken as 0 where the formula gives less.

    Parameters
    ----------
    width : float
        b [m], > 0.
    depth : float
        h [m], > 0.
    effective_charring_depth_value : float
        d_ef [m], >= 0.
    exposure : str
        ``"three_sided"`` (top face protected) or ``"four_sided"``.

    Returns
    -------
    (b_ef, h_ef) : tuple of float
        Residual width and depth [m]; 0 when the member has burnt through in that direction.

    Notes
    -----
    Both side faces char on either exposure; the bottom face chars always and the top face only
    when four sided (EN 1995-1-2:2004 Figure 4.1).

    Examples
    --------
    >>> b_ef, h_ef = residual_section(0.200, 0.600, 0.049)
    >>> round(b_ef, 6), round(h_ef, 6)
    (0.102, 0.551)

    References
    ----------
    1. EN 1995-1-2:2004, §4.2.2, Figure 4.1.
    """
    b = _positive("width", width, "m")
    h = _positive("depth", depth, "m")
    d_ef = _non_negative("effective_charring_depth_value", effective_charring_depth_value, "m")
    faces = 1.0 if _exposure(exposure) == "three_sided" else 2.0
    return max(b - 2.0 * d_ef, 0.0), max(h - faces * d_ef, 0.0)


def fire_design_strength(characteristic_strength: float, k_fi: float,
                         k_mod_fi: float = K_MOD_FI, gamma_M_fi: float = GAMMA_M_FI) -> float:
    r"""Return the design strength in fire f_d,fi [Pa] from a characteristic strength.

    .. math::
        f_{d,fi} = k_{mod,fi}\,\frac{k_{fi}\, f_k}{\gamma_{M,fi}}

    Parameters
    ----------
    characteristic_strength : float
        f_k [Pa], > 0 (e.g. f_m,k for bending).
    k_fi : float
        k_fi [-], > 0 (Table 2.1: 1.25 solid timber, 1.15 glulam, 1.1 LVL).
    k_mod_fi : float
        k_mod,fi [-], > 0 (1.0 in the reduced cross-section method).
    gamma_M_fi : float
        γ_M,fi [-], > 0 (1.0 recommended).

    Returns
    -------
    float
        f_d,fi [Pa].

    Notes
    -----
    k_fi f_k is the 20 % fractile strength f_20 (eq. (2.4)); eq. (2.1) applies k_mod,fi and
    γ_M,fi. Equation numbers from memory.

    Examples
    --------
    >>> round(fire_design_strength(24e6, 1.15) / 1e6, 6)
    27.6

    References
    ----------
    1. EN 1995-1-2:2004, §2.3, eqs. (2.1) and (2.4), Table 2.1; §4.2.2(5) (k_mod,fi = 1.0).
    """
    f_k = _positive("characteristic_strength", characteristic_strength, "Pa")
    k = _positive("k_fi", k_fi, "")
    k_mod = _positive("k_mod_fi", k_mod_fi, "")
    gamma = _positive("gamma_M_fi", gamma_M_fi, "")
    return k_mod * k * f_k / gamma


class TimberMemberFire(NamedTuple):
    """Reduced cross-section of a rectangular timber member after a time of standard fire (SI)."""

    charring_depth: float  # m, d_char,n
    effective_charring_depth: float  # m, d_ef
    residual_width: float  # m, b_ef (0 when burnt through)
    residual_depth: float  # m, h_ef (0 when burnt through)
    section_modulus: float  # m^3, W_ef
    design_strength: float  # Pa, f_m,d,fi
    bending_resistance: float  # N m, M_Rd,fi
    burnt_through: bool  # b_ef or h_ef reached 0
    utilisation: float | None  # 1, M_d,fi / M_Rd,fi (inf when burnt through); None without M_d
    time_to_failure: float | None  # s; None without M_d or when M_Rd,fi > M_d,fi throughout


def bending_resistance_fire(width: float, depth: float, duration: float,
                            notional_charring_rate: float, k_fi: float,
                            characteristic_bending_strength: float,
                            exposure: str = "three_sided",
                            zero_strength_layer: float = ZERO_STRENGTH_LAYER) -> float:
    r"""Return the bending resistance M_Rd,fi [N·m] of a rectangular member after a time of fire.

    .. math::
        M_{Rd,fi} = \frac{b_{ef}\,h_{ef}^2}{6}\; k_{mod,fi}\,\frac{k_{fi}\,f_{m,k}}{\gamma_{M,fi}}

    Parameters
    ----------
    width, depth : float
        b, h [m], > 0.
    duration : float
        Time of fire exposure t [s], >= 0.
    notional_charring_rate : float
        βn [m/s], > 0.
    k_fi : float
        k_fi [-], > 0.
    characteristic_bending_strength : float
        f_m,k [Pa], > 0.
    exposure : str
        ``"three_sided"`` or ``"four_sided"``.
    zero_strength_layer : float
        d0 [m] (7 mm).

    Returns
    -------
    float
        M_Rd,fi [N·m] about the major axis (depth h); 0 once burnt through.

    Notes
    -----
    Elastic section modulus of the residual rectangle; see :func:`timber_member_fire` for the
    full set of intermediate values. k_mod,fi = γ_M,fi = 1.0.

    Examples
    --------
    >>> round(bending_resistance_fire(0.2, 0.6, 3600.0, 0.7e-3 / 60, 1.15, 24e6) / 1e3, 2)
    142.45

    References
    ----------
    1. EN 1995-1-2:2004, §4.2.2, eq. (4.1), Table 4.1; §2.3, eq. (2.1), Table 2.1.
    """
    return timber_member_fire(width, depth, duration, notional_charring_rate, k_fi,
                              characteristic_bending_strength, exposure,
                              zero_strength_layer).bending_resistance


def time_to_failure(width: float, depth: float, notional_charring_rate: float, k_fi: float,
                    characteristic_bending_strength: float, design_moment: float,
                    duration: float, exposure: str = "three_sided",
                    zero_strength_layer: float = ZERO_STRENGTH_LAYER) -> float | None:
    r"""Return the time [s] at which M_Rd,fi falls to the design moment in fire, or None.

    .. math::
        M_{Rd,fi}(t_{fail}) = M_{d,fi}, \qquad 0 \le t_{fail} \le t_{duration}

    Parameters
    ----------
    width, depth : float
        b, h [m], > 0.
    notional_charring_rate : float
        βn [m/s], > 0.
    k_fi : float
        k_fi [-], > 0.
    characteristic_bending_strength : float
        f_m,k [Pa], > 0.
    design_moment : float
        M_d,fi [N·m], > 0.
    duration : float
        End of the exposure considered [s], > 0.
    exposure : str
        ``"three_sided"`` or ``"four_sided"``.
    zero_strength_layer : float
        d0 [m] (7 mm).

    Returns
    -------
    float or None
        t_fail [s]; 0 when M_Rd,fi < M_d,fi from the start; None when M_Rd,fi stays above
        M_d,fi until ``duration``.

    Notes
    -----
    d_ef grows continuously and never shrinks with t, so M_Rd,fi(t) is continuous and
    non-increasing and the root is unique; it is found by Brent's method
    (scipy.optimize.brentq) to 10⁻⁶ s.

    Examples
    --------
    >>> round(time_to_failure(0.2, 0.6, 0.7e-3 / 60, 1.15, 24e6, 142.45e3, 7200.0) / 60, 2)
    60.0

    References
    ----------
    1. EN 1995-1-2:2004, §4.2.2 (reduced cross-section method).
    """
    m_d = _positive("design_moment", design_moment, "N*m")
    end = _positive("duration", duration, "s")

    def margin(t: float) -> float:
        return bending_resistance_fire(width, depth, t, notional_charring_rate, k_fi,
                                       characteristic_bending_strength, exposure,
                                       zero_strength_layer) - m_d

    if margin(0.0) <= 0.0:
        return 0.0
    if margin(end) > 0.0:
        return None
    return float(brentq(margin, 0.0, end, xtol=1e-6))


def timber_member_fire(width: float, depth: float, duration: float,
                       notional_charring_rate: float, k_fi: float,
                       characteristic_bending_strength: float,
                       exposure: str = "three_sided",
                       zero_strength_layer: float = ZERO_STRENGTH_LAYER,
                       design_moment: float | None = None) -> TimberMemberFire:
    r"""Return the charring depths, residual section, section modulus and bending resistance of a
    rectangular timber member after a time of standard fire, with the utilisation and time to
    failure for a design moment.

    .. math::
        d_{char,n} = \beta_n t, \quad d_{ef} = d_{char,n} + k_0 d_0, \quad
        b_{ef} = b - 2d_{ef}, \quad h_{ef} = h - d_{ef}\ (\text{or } h - 2d_{ef}),

    .. math::
        W_{ef} = \frac{b_{ef} h_{ef}^2}{6}, \quad
        f_{m,d,fi} = k_{mod,fi}\frac{k_{fi} f_{m,k}}{\gamma_{M,fi}}, \quad
        M_{Rd,fi} = W_{ef} f_{m,d,fi}

    Parameters
    ----------
    width : float
        b [m], > 0.
    depth : float
        h [m], > 0 (bending about the axis across the depth).
    duration : float
        Time of standard fire exposure t [s], >= 0.
    notional_charring_rate : float
        βn [m/s], > 0 (Table 3.1; see :func:`timber_fire_properties`).
    k_fi : float
        k_fi [-], > 0 (Table 2.1).
    characteristic_bending_strength : float
        f_m,k [Pa], > 0.
    exposure : str
        ``"three_sided"`` (top face protected) or ``"four_sided"``.
    zero_strength_layer : float
        d0 [m], >= 0 (7 mm).
    design_moment : float, optional
        M_d,fi [N·m], > 0; gives ``utilisation`` and ``time_to_failure``.

    Returns
    -------
    TimberMemberFire
        ``charring_depth``, ``effective_charring_depth``, ``residual_width``, ``residual_depth``
        [m], ``section_modulus`` [m³], ``design_strength`` [Pa], ``bending_resistance`` [N·m],
        ``burnt_through``, ``utilisation`` [-] (inf once burnt through) and ``time_to_failure``
        [s] (within ``duration``; None beyond it).

    Notes
    -----
    Reduced cross-section method, §4.2.2, for unprotected surfaces in the standard fire
    (ISO 834-1, EN 1991-1-2 §3.2.1); not for parametric fires or protected surfaces. When b_ef or
    h_ef reaches zero the member has burnt through: W_ef = 0 and M_Rd,fi = 0. Lateral-torsional
    stability of the residual section is not checked (§4.2.2 leaves it to EN 1995-1-1 with the
    residual section).

    Examples
    --------
    >>> r = timber_member_fire(0.2, 0.6, 3600.0, 0.7e-3 / 60, 1.15, 24e6, design_moment=100e3)
    >>> round(r.section_modulus * 1e9), round(r.bending_resistance / 1e3, 2)
    (5161217, 142.45)
    >>> round(r.utilisation, 3)
    0.702

    References
    ----------
    1. EN 1995-1-2:2004, Eurocode 5 — Design of timber structures — Part 1-2: Structural fire
       design. §3.4.2, eq. (3.2), Table 3.1; §4.2.2, eq. (4.1), Table 4.1, Figure 4.1; §2.3,
       eqs. (2.1), (2.4), Table 2.1 (equation numbers from memory).
    """
    b = _positive("width", width, "m")
    h = _positive("depth", depth, "m")
    f_m_k = _positive("characteristic_bending_strength", characteristic_bending_strength, "Pa")
    d_char = notional_charring_depth(duration, notional_charring_rate)
    d_ef = effective_charring_depth(duration, notional_charring_rate, zero_strength_layer)
    b_ef, h_ef = residual_section(b, h, d_ef, exposure)
    f_d = fire_design_strength(f_m_k, k_fi)
    modulus = b_ef * h_ef ** 2 / 6.0
    resistance = modulus * f_d
    burnt = b_ef <= 0.0 or h_ef <= 0.0
    utilisation = failure = None
    if design_moment is not None:
        m_d = _positive("design_moment", design_moment, "N*m")
        utilisation = m_d / resistance if resistance > 0.0 else math.inf
        if float(duration) > 0.0:
            failure = time_to_failure(b, h, notional_charring_rate, k_fi,
                                      characteristic_bending_strength, m_d, duration, exposure,
                                      zero_strength_layer)
        elif resistance <= m_d:
            failure = 0.0
    return TimberMemberFire(d_char, d_ef, b_ef, h_ef, modulus, f_d, resistance, burnt,
                            utilisation, failure)
