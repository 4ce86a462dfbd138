"""Interstitial condensation by the monthly method of ISO 13788:2012 (the Glaser method).

One month: steady conduction gives the temperature, and from it the saturation vapour pressure,
at each plane of a layered element; the vapour pressure over cumulative equivalent air thickness
is the tautest line from the inside to the outside vapour pressure that nowhere exceeds
saturation, and where it touches saturation vapour condenses at the rate by which the inflow
exceeds the outflow. The year: twelve months stepped from the start month, moisture accumulating
at the condensation interfaces and evaporating from them, as the method in the docs/format.md section
``interstitial_condensation`` states it.

Planes are numbered 0 … n for n layers: 0 is the inside surface, k (1 ≤ k ≤ n − 1) the interface
between layer k and layer k + 1 counted from the inside, n the outside surface. Every per-plane
array has n + 1 entries; the two surfaces never condense (the inside and outside vapour pressures
are held there), so their entries are zero.

Temperatures are absolute, in kelvin. Every function takes and returns coherent SI floats or
numpy arrays. Clause numbers of ISO 13788:2012 are recalled, not read from the printed standard,
and the docstrings say "from memory" where they give one.
"""

from __future__ import annotations

from typing import Callable, Iterable, NamedTuple, Sequence

import numpy as np
from numpy.typing import ArrayLike
from scipy import constants

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.conduction import (
    SATURATION_PRESSURE_SOURCE,
    _checked,
    _result,
    plane_element,
    saturation_vapour_pressure,
)

__all__ = [
    "GLASER_METHOD_SOURCE",
    "VAPOUR_PERMEABILITY_OF_AIR",
    "MONTH_NAMES",
    "MONTH_DAYS",
    "month_seconds",
    "equivalent_air_thickness",
    "VapourProfile",
    "vapour_profile",
    "start_month",
    "CondensationYear",
    "interstitial_condensation",
]

GLASER_METHOD_SOURCE = ("ISO 13788:2012, clause 6 (monthly interstitial condensation, Glaser "
                        "method); saturation pressure: " + SATURATION_PRESSURE_SOURCE)

# δ0 of the method (docs/format.md, interstitial_condensation; the value ISO 13788:2012 uses for the
# water vapour permeability of still air, from memory) [kg/(m s Pa)].
VAPOUR_PERMEABILITY_OF_AIR = 2.0e-10

MONTH_NAMES = ("January", "February", "March", "April", "May", "June", "July", "August",
               "September", "October", "November", "December")
# A non-leap year, as docs/format.md settles it.
MONTH_DAYS = (31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31)

# A point is a vertex of the tautest line only when it lies below the chord of its neighbours by
# more than this fraction of the largest saturation pressure: a point on the chord to within
# rounding neither condenses nor evaporates, and must not start a year of accumulation.
_TOUCH_TOLERANCE = 1e-12


def month_seconds() -> np.ndarray:
    r"""Return the length of each calendar month of a non-leap year, January first.

    .. math::
        t_m = 86\,400\ \mathrm{s} \times (31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31)_m

    Returns
    -------
    t : numpy array of 12 floats
        Seconds in each month [s]; they sum to 365 days.

    Notes
    -----
    docs/format.md (interstitial_condensation) settles that a month lasts its days of a non-leap
    year; ISO 13788:2012 leaves the month's length to the climate data (from memory).

    Examples
    --------
    >>> float(month_seconds()[1])
    2419200.0

    References
    ----------
    1. ISO 13788:2012, clause 6 (monthly mean climate data; from memory).
    """
    return np.asarray(MONTH_DAYS, dtype=float) * constants.day


def equivalent_air_thickness(vapour_resistance_factor: ArrayLike,
                             thickness: ArrayLike) -> float | np.ndarray:
    r"""Return the water vapour diffusion-equivalent air layer thickness of a layer.

    .. math::
        s_d = \mu\,d

    Parameters
    ----------
    vapour_resistance_factor : float or array
        Water vapour resistance factor μ [1], >= 1.
    thickness : float or array
        Layer thickness *d* [m], > 0.

    Returns
    -------
    s_d : float or array
        Equivalent air thickness [m].

    Notes
    -----
    μ is the ratio of the vapour permeability of still air to that of the material, so still
    air has μ = 1 and no material has less: μ < 1 is refused (common practice; tabulated design
    values, e.g. ISO 10456, start at 1). Definition of s_d as in ISO 13788:2012 clause 3 (from
    memory) and docs/format.md.

    Examples
    --------
    >>> equivalent_air_thickness(50.0, 0.012)
    0.6

    References
    ----------
    1. ISO 13788:2012, clause 3, water vapour diffusion-equivalent air layer thickness (from
       memory).
    """
    mu = _checked("vapour_resistance_factor", vapour_resistance_factor, lambda m: m >= 1.0,
                  "mu >= 1 (still air is 1)")
    d = _checked("thickness", thickness, lambda t: t > 0.0, "a finite value > 0 m")
    return _result(mu * d)


class VapourProfile(NamedTuple):
    """One month's temperatures, vapour pressures and condensation rates at each plane (SI).

    Planes 0 … n: the inside surface, the interfaces between layers, the outside surface.
    """

    temperatures: np.ndarray  # K
    saturation_pressures: np.ndarray  # Pa
    cumulative_sd: np.ndarray  # m, 0 at the inside surface
    vapour_pressures: np.ndarray  # Pa, the tautest line, wet interfaces at saturation
    rates: np.ndarray  # kg/(m^2 s), > 0 condensation, < 0 evaporation, 0 elsewhere
    condensing: np.ndarray  # bool, rate > 0
    wet: np.ndarray  # bool, interfaces held at saturation by accumulated moisture


def _layers(layer_resistances: ArrayLike,
            equivalent_air_thicknesses: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    R = _checked("layer_resistances", np.atleast_1d(layer_resistances), lambda r: r > 0.0,
                 "a finite value > 0 m^2*K/W for every layer")
    s_d = _checked("equivalent_air_thicknesses", np.atleast_1d(equivalent_air_thicknesses),
                   lambda s: s > 0.0,
                   "a finite value > 0 m for every layer (s_d = mu*d with mu >= 1, d > 0)")
    if R.ndim != 1 or R.size == 0:
        raise PhysicsRangeError("layer_resistances", R.size, "at least one layer, in a list")
    if s_d.shape != R.shape:
        raise PhysicsRangeError("equivalent_air_thicknesses", s_d.size,
                                f"one value per layer ({R.size})")
    return R, s_d


def _surface_resistance(quantity: str, value: float) -> float:
    return float(_checked(quantity, value, lambda r: r >= 0.0, "a finite value >= 0 m^2*K/W"))


def _air_temperature(quantity: str, value: ArrayLike, month: str = "") -> np.ndarray:
    """Refused below 0 K or outside the range of the saturation pressure formulae."""
    T = _checked(quantity, value, lambda t: t > 0.0, "a finite value > 0 K" + month)
    try:
        saturation_vapour_pressure(T)
    except PhysicsRangeError as exc:
        raise PhysicsRangeError(quantity, exc.value, exc.expected + month) from None
    return T


def _relative_humidity(quantity: str, value: ArrayLike, month: str = "") -> np.ndarray:
    return _checked(quantity, value, lambda v: (v > 0.0) & (v <= 1.0),
                    "0 < phi <= 1 (a fraction, not a percentage)" + month)


def _wet_planes(wet_interfaces: Iterable[int], n_layers: int) -> np.ndarray:
    wet = np.zeros(n_layers + 1, dtype=bool)
    for index in wet_interfaces:
        if isinstance(index, (bool, np.bool_)) or int(index) != index \
                or not 1 <= index <= n_layers - 1:
            raise PhysicsRangeError(
                "wet_interfaces", index,
                f"interface numbers 1 to {n_layers - 1} (the planes between layers; 0 and "
                f"{n_layers} are the surfaces)" if n_layers > 1
                else "none: one layer has no interface")
        wet[int(index)] = True
    return wet


def _tautest_vertices(s: np.ndarray, ceiling: np.ndarray, tolerance: float) -> list[int]:
    """Indices of the vertices of the tautest line from the first to the last point below the
    others: the lower convex hull of the points (monotone chain over s, already increasing).

    scipy.spatial.ConvexHull (Qhull) would need three points not on one line and return both
    chains of the hull; over points already sorted the lower chain is these few lines."""
    hull: list[int] = []
    for index in range(s.size):
        # The last vertex stays only if it lies below the chord from the one before it to the
        # new point: only then does saturation hold the line down there.
        while len(hull) >= 2:
            a, b = hull[-2], hull[-1]
            chord = ceiling[a] + (ceiling[index] - ceiling[a]) * (s[b] - s[a]) / (s[index] - s[a])
            if ceiling[b] < chord - tolerance:
                break
            hull.pop()
        hull.append(index)
    return hull


def _profile(R: np.ndarray, s_d: np.ndarray, r_si: float, r_se: float, theta_i: float,
             phi_i: float, theta_e: float, phi_e: float, wet: np.ndarray) -> VapourProfile:
    """The month's profile from checked inputs."""
    temperatures = plane_element(R, theta_i, theta_e, r_si, r_se).interface_temperatures
    p_sat = np.asarray(saturation_vapour_pressure(temperatures), dtype=float)
    s = np.concatenate(([0.0], np.cumsum(s_d)))
    n = R.size
    p_inside = phi_i * float(saturation_vapour_pressure(theta_i))
    p_outside = phi_e * float(saturation_vapour_pressure(theta_e))

    # The surfaces hold the air's vapour pressures and wet interfaces hold saturation; between
    # two such anchors the line is the tautest one under saturation.
    ceiling = p_sat.copy()
    ceiling[0], ceiling[n] = p_inside, p_outside
    anchors = [0, *np.flatnonzero(wet).tolist(), n]
    tolerance = _TOUCH_TOLERANCE * float(max(p_sat.max(), p_inside, p_outside))
    vertices: list[int] = [0]
    for start, end in zip(anchors[:-1], anchors[1:]):
        segment = _tautest_vertices(s[start:end + 1], ceiling[start:end + 1], tolerance)
        vertices.extend(start + v for v in segment[1:])
    vertex = np.asarray(vertices)
    p = np.interp(s, s[vertex], ceiling[vertex])

    rates = np.zeros(n + 1)
    for left, middle, right in zip(vertex[:-2], vertex[1:-1], vertex[2:]):
        inflow = (p[left] - p[middle]) / (s[middle] - s[left])
        outflow = (p[middle] - p[right]) / (s[right] - s[middle])
        rates[middle] = VAPOUR_PERMEABILITY_OF_AIR * (inflow - outflow)
    return VapourProfile(temperatures, p_sat, s, p, rates, rates > 0.0, wet.copy())


def vapour_profile(layer_resistances: ArrayLike, equivalent_air_thicknesses: ArrayLike,
                   R_si: float, R_se: float, inside_temperature: float,
                   inside_relative_humidity: float, outside_temperature: float,
                   outside_relative_humidity: float,
                   wet_interfaces: Iterable[int] = ()) -> VapourProfile:
    r"""Return one month's plane temperatures, saturation and actual vapour pressures over
    cumulative equivalent air thickness, and the condensation or evaporation rate at each
    interface, by the Glaser method.

    .. math::
        \theta_k = \theta_i - \frac{\theta_i - \theta_e}{R_T}\Bigl(R_{si} + \sum_{j \le k} R_j
        \Bigr), \quad p_{sat,k} = p_{sat}(\theta_k), \quad s_k = \sum_{j \le k} s_{d,j},
        \quad p_0 = \varphi_i\,p_{sat}(\theta_i), \quad p_n = \varphi_e\,p_{sat}(\theta_e)

    .. math::
        p(s) = \text{the tautest line from } (0, p_0) \text{ to } (s_n, p_n)
        \text{ with } p(s_k) \le p_{sat,k}, \qquad p(s_k) = p_{sat,k}\ \text{at a wet
        interface}

    .. math::
        g_k = \delta_0 \left[\frac{p_{l} - p_{sat,k}}{s_k - s_{l}}
        - \frac{p_{sat,k} - p_{r}}{s_{r} - s_k}\right], \qquad
        \delta_0 = 2.0 \times 10^{-10}\ \mathrm{kg/(m\,s\,Pa)}

    Parameters
    ----------
    layer_resistances : sequence of float
        Thermal resistance R_j of each layer, inside first [m²·K/W], each > 0.
    equivalent_air_thicknesses : sequence of float
        Equivalent air thickness s_d,j = μ_j d_j of each layer [m], each > 0.
    R_si : float
        Inside surface resistance [m²·K/W], >= 0.
    R_se : float
        Outside surface resistance [m²·K/W], >= 0.
    inside_temperature : float
        Inside air temperature θ_i [K].
    inside_relative_humidity : float
        Inside relative humidity φ_i [1], 0 < φ_i <= 1.
    outside_temperature : float
        Outside air temperature θ_e [K].
    outside_relative_humidity : float
        Outside relative humidity φ_e [1], 0 < φ_e <= 1.
    wet_interfaces : iterable of int, optional
        Interfaces (plane numbers 1 … n − 1) holding moisture accumulated in earlier months;
        each is held at saturation.

    Returns
    -------
    VapourProfile
        Per plane 0 … n (inside surface, interfaces, outside surface): ``temperatures`` [K],
        ``saturation_pressures`` [Pa], ``cumulative_sd`` [m], ``vapour_pressures`` [Pa] (the
        profile; p_0 and p_n are the inside and outside air's), ``rates`` g [kg/(m²·s)]
        (positive: condensation; negative: evaporation, only at a wet interface; zero where the
        line does not touch saturation and at the surfaces), ``condensing`` (g > 0) and
        ``wet`` (the interfaces given in ``wet_interfaces``).

    Notes
    -----
    The method as docs/format.md (interstitial_condensation) states it, after ISO 13788:2012 clause 6
    (from memory): steady one-dimensional conduction with the surface resistances; saturation
    pressure of ISO 13788 Annex E over ice below 0 °C (:func:`calcdoc.physics.conduction.
    saturation_vapour_pressure`, −40 °C to +80 °C, so every air temperature must lie there);
    surface vapour resistances neglected. The tautest line is the lower convex hull of the
    points (s_k, p_sat,k) between the fixed points: the surfaces and the wet interfaces; l and r
    are the neighbouring vertices of the line. Saturation is tested at the planes only: a layer
    whose saturation curve may dip below the line inside it is split into thinner layers by the
    caller. Every layer must have s_d > 0 (μ >= 1 and d > 0 give it), since a layer with
    s_d = 0 would put two planes at one point of the diagram, where g divides by zero. A
    point on the chord of its neighbours to within 10⁻¹² of the largest pressure is not a
    touch. Vapour condensing on a surface is not interstitial condensation and is not computed
    here (compare p_0 with p_sat,0 for the inside surface).

    Examples
    --------
    >>> m = vapour_profile([2.5, 0.1], [0.1, 2.0], 0.13, 0.04, 293.15, 0.5, 273.15, 0.8)
    >>> round(float(m.temperatures[1]) - 273.15, 3), round(float(m.rates[1]) * 1e6, 3)
    (1.011, 1.006)

    References
    ----------
    1. ISO 13788:2012, Hygrothermal performance of building components and building
       elements — Internal surface temperature to avoid critical surface humidity and
       interstitial condensation — Calculation methods. Clause 6 (monthly interstitial
       condensation) and Annex E (saturation pressure); clause numbers from memory, equation
       numbers not checked.
    2. Glaser, H. Graphisches Verfahren zur Untersuchung von Diffusionsvorgängen.
       Kältetechnik 11 (1959) 345–349 (from memory).
    """
    R, s_d = _layers(layer_resistances, equivalent_air_thicknesses)
    r_si = _surface_resistance("R_si", R_si)
    r_se = _surface_resistance("R_se", R_se)
    theta_i = float(_air_temperature("inside_temperature", inside_temperature))
    theta_e = float(_air_temperature("outside_temperature", outside_temperature))
    phi_i = float(_relative_humidity("inside_relative_humidity", inside_relative_humidity))
    phi_e = float(_relative_humidity("outside_relative_humidity", outside_relative_humidity))
    wet = _wet_planes(wet_interfaces, R.size)
    return _profile(R, s_d, r_si, r_se, theta_i, phi_i, theta_e, phi_e, wet)


def start_month(condensation_predicted: Sequence[bool]) -> int | None:
    r"""Return the calendar month (1–12) in which the year of the monthly method starts.

    .. math::
        m_0 = \min\{\, m \in 1 \ldots 12 : c_m \wedge \neg c_{m-1} \,\}, \qquad c_0 \equiv c_{12}

    Parameters
    ----------
    condensation_predicted : sequence of 12 bool
        c_m: whether condensation is predicted in month m, January first, with no moisture
        accumulated (every interface dry).

    Returns
    -------
    m_0 : int or None
        The first month in calendar order, taken cyclically (December precedes January), in
        which condensation is predicted after a month in which none is; 1 (January) when
        condensation is predicted in every month; None when in none.

    Notes
    -----
    The rule of docs/format.md (interstitial_condensation), after ISO 13788:2012 clause 6 (from
    memory). Condensation from December to February starts the year in December; from November
    to February, in November. docs/format.md does not say where a year with condensation in every
    month starts; January is calcdoc's convention (there is then no dry month to start after).

    Examples
    --------
    >>> start_month([True, True] + [False] * 9 + [True])
    12

    References
    ----------
    1. ISO 13788:2012, clause 6, choice of the starting month (from memory).
    """
    c = np.asarray(condensation_predicted)
    if c.shape != (12,):
        raise PhysicsRangeError("condensation_predicted", c.size,
                                "exactly 12 months, January to December")
    c = c.astype(bool)
    if not c.any():
        return None
    if c.all():
        return 1
    starts = np.flatnonzero(c & ~np.roll(c, 1))
    return int(starts[0]) + 1


class CondensationYear(NamedTuple):
    """A year of interstitial condensation by the monthly method (SI).

    Month arrays run in the order stepped, the start month first; ``months`` gives their
    calendar numbers. Per-plane arrays have shape (12, n + 1).
    """

    condensation_predicted: bool  # in any month with every interface dry
    condensation_every_month: bool  # then the year starts in January by convention
    start_month: int | None  # 1-12; None when no condensation
    months: np.ndarray  # int, calendar month numbers in the order stepped
    accumulated: np.ndarray  # kg/m^2, (12, n + 1), per plane at each month end
    accumulated_total: np.ndarray  # kg/m^2, (12,), over all interfaces at each month end
    monthly_balance: np.ndarray  # kg/m^2, (12,), change of the total over the month
    rates: np.ndarray  # kg/(m^2 s), (12, n + 1), the month's g at each plane
    condensing: np.ndarray  # bool, (12, n + 1), g > 0
    max_accumulated: float  # kg/m^2
    month_of_max: int | None  # 1-12 calendar month; None when no condensation
    end_of_year_accumulated: float  # kg/m^2, after the twelfth month
    dries_out: int  # 1 when end_of_year_accumulated is 0, else 0
    worst_month: int  # 1-12, the month of the diagram
    diagram: VapourProfile  # the worst month's profile


def _monthly(check: Callable[[str, ArrayLike, str], np.ndarray], quantity: str,
             value: ArrayLike) -> np.ndarray:
    """Twelve values, January first, each passing ``check``; the message names the month."""
    array = np.asarray(value, dtype=float)
    if array.shape != (12,):
        raise PhysicsRangeError(quantity, f"{array.size} values",
                                "exactly 12 months, January to December")
    for month, item in zip(MONTH_NAMES, array):
        check(quantity, item, f", in every month ({month} is not)")
    return array


def interstitial_condensation(layer_resistances: ArrayLike,
                              equivalent_air_thicknesses: ArrayLike, R_si: float, R_se: float,
                              inside_temperature: ArrayLike, inside_relative_humidity: ArrayLike,
                              outside_temperature: ArrayLike,
                              outside_relative_humidity: ArrayLike) -> CondensationYear:
    r"""Return the moisture accumulated at each interface at each month end over a year, its
    maximum, the amount left after the year and whether the element dries out, by the monthly
    method of ISO 13788:2012.

    .. math::
        M_{k,m} = \max\left(0,\ M_{k,m-1} + g_{k,m}\,t_m\right), \quad M_{k,\,before} = 0,
        \qquad M_m = \sum_k M_{k,m}, \qquad t_m = \text{days}_m \times 86\,400\ \mathrm{s}

    .. math::
        M_{max} = \max_m M_m, \qquad M_{end} = M_{12\text{th month from } m_0}, \qquad
        \text{dries out} \iff M_{end} = 0

    Parameters
    ----------
    layer_resistances : sequence of float
        Thermal resistance of each layer, inside first [m²·K/W], each > 0.
    equivalent_air_thicknesses : sequence of float
        Equivalent air thickness s_d of each layer [m], each > 0.
    R_si : float
        Inside surface resistance [m²·K/W], >= 0.
    R_se : float
        Outside surface resistance [m²·K/W], >= 0.
    inside_temperature : sequence of 12 float
        Monthly mean inside air temperature, January first [K].
    inside_relative_humidity : sequence of 12 float
        Monthly mean inside relative humidity [1], each in (0, 1].
    outside_temperature : sequence of 12 float
        Monthly mean outside air temperature [K].
    outside_relative_humidity : sequence of 12 float
        Monthly mean outside relative humidity [1], each in (0, 1].

    Returns
    -------
    CondensationYear
        ``condensation_predicted``, ``condensation_every_month``, ``start_month`` (1–12 or
        None), ``months`` (calendar numbers in the order stepped); per month end in that order:
        ``accumulated`` per plane and ``accumulated_total`` [kg/m²], ``monthly_balance``
        [kg/m²] (the net change of the total over the month, after evaporation is limited to
        what is there), ``rates`` [kg/(m²·s)] and ``condensing``; ``max_accumulated`` [kg/m²],
        ``month_of_max`` (1–12 or None), ``end_of_year_accumulated`` [kg/m²], ``dries_out``
        (1 or 0), ``worst_month`` (1–12) and ``diagram``, that month's
        :class:`VapourProfile`.

    Notes
    -----
    The method of docs/format.md (interstitial_condensation), after ISO 13788:2012 clause 6 (from
    memory). Condensation is predicted in a month when its profile with every interface dry
    (:func:`vapour_profile`) touches saturation; the year starts in the month given by
    :func:`start_month` with every interface dry and runs twelve months. In each month the
    interfaces holding moisture are held at saturation (their g may be negative: evaporation);
    moisture evaporating within a month is limited to what is there, so no interface ever
    holds less than zero, and the month's profile is not recomputed after it dries out part way
    through. The month of the largest total is the first reached, in the order stepped, when
    two are equal. The worst month is the month of the maximum; with no condensation in any
    month, every amount is 0, ``dries_out`` is 1, ``start_month`` and ``month_of_max`` are
    None, and the worst month is the one in which an interface comes nearest to saturation
    (largest p/p_sat; the surfaces count only for a single layer, which has no interface).
    Climate ranges as :func:`vapour_profile`.

    Examples
    --------
    >>> year = interstitial_condensation(
    ...     [2.5, 0.1], [0.1, 2.0], 0.13, 0.04, [293.15] * 12, [0.5] * 12,
    ...     [273.15] * 2 + [288.15] * 9 + [273.15], [0.8] * 12)
    >>> year.start_month, year.month_of_max, year.dries_out
    (12, 2, 1)

    References
    ----------
    1. ISO 13788:2012, Hygrothermal performance of building components and building
       elements — Internal surface temperature to avoid critical surface humidity and
       interstitial condensation — Calculation methods. Clause 6 (clause number from memory,
       equation numbers not checked).
    """
    R, s_d = _layers(layer_resistances, equivalent_air_thicknesses)
    r_si = _surface_resistance("R_si", R_si)
    r_se = _surface_resistance("R_se", R_se)
    theta_i = _monthly(_air_temperature, "inside_temperature", inside_temperature)
    phi_i = _monthly(_relative_humidity, "inside_relative_humidity", inside_relative_humidity)
    theta_e = _monthly(_air_temperature, "outside_temperature", outside_temperature)
    phi_e = _monthly(_relative_humidity, "outside_relative_humidity", outside_relative_humidity)
    n = R.size
    seconds = month_seconds()

    def month_profile(month: int, wet: np.ndarray) -> VapourProfile:
        return _profile(R, s_d, r_si, r_se, float(theta_i[month]), float(phi_i[month]),
                        float(theta_e[month]), float(phi_e[month]), wet)

    dry = [month_profile(m, np.zeros(n + 1, dtype=bool)) for m in range(12)]
    predicted = [bool(profile.condensing.any()) for profile in dry]
    first = start_month(predicted)
    if first is None:
        return _no_condensation(dry, n)

    order = (np.arange(12) + first - 1) % 12
    accumulated = np.zeros((12, n + 1))
    rates = np.zeros((12, n + 1))
    profiles: list[VapourProfile] = []
    held = np.zeros(n + 1)
    for step, month in enumerate(order):
        profile = dry[month] if step == 0 else month_profile(month, held > 0.0)
        held = np.maximum(held + profile.rates * seconds[month], 0.0)
        accumulated[step], rates[step] = held, profile.rates
        profiles.append(profile)
    total = accumulated.sum(axis=1)
    balance = np.diff(total, prepend=0.0)
    worst = int(np.argmax(total))
    end = float(total[-1])
    return CondensationYear(
        condensation_predicted=True, condensation_every_month=all(predicted),
        start_month=first, months=order + 1, accumulated=accumulated, accumulated_total=total,
        monthly_balance=balance, rates=rates, condensing=rates > 0.0,
        max_accumulated=float(total[worst]), month_of_max=int(order[worst]) + 1,
        end_of_year_accumulated=end, dries_out=int(end == 0.0),
        worst_month=int(order[worst]) + 1, diagram=profiles[worst])


def _no_condensation(dry: list[VapourProfile], n: int) -> CondensationYear:
    """The year when no month condenses: zeros, dries out, diagram of the nearest approach."""
    planes = slice(1, n) if n > 1 else slice(0, n + 1)
    nearness = [float(np.max(p.vapour_pressures[planes] / p.saturation_pressures[planes]))
                for p in dry]
    worst = int(np.argmax(nearness))
    zeros = np.zeros((12, n + 1))
    return CondensationYear(
        condensation_predicted=False, condensation_every_month=False, start_month=None,
        months=np.arange(1, 13), accumulated=zeros, accumulated_total=np.zeros(12),
        monthly_balance=np.zeros(12), rates=zeros.copy(), condensing=zeros.astype(bool),
        max_accumulated=0.0, month_of_max=None, end_of_year_accumulated=0.0, dries_out=1,
        worst_month=worst + 1, diagram=dry[worst])
