"""Steady conduction through plane and cylindrical layers, with the surface figures that go with it.

Plane elements follow ISO 6946:2017 (surface resistances, layers in series, the combined method
for bridged layers); the vapour-pressure and surface-humidity figures follow ISO 13788:2012;
cylindrical layers use the radial form of Fourier's law, and the outside coefficient of a pipe in
still air is natural convection by the Churchill–Chu correlation plus linearised radiation.

Temperatures are absolute, in kelvin, in and out. Every function takes and returns coherent SI
floats or numpy arrays. Where a clause, table or equation number is recalled rather than read from
the printed standard, the docstring says "from memory".
"""

from __future__ import annotations

from typing import Callable, NamedTuple, Sequence

import numpy as np
from numpy.typing import ArrayLike
from scipy import constants

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.air import AIR_TABLE_RANGE, AIR_TABLE_SOURCE, AirProperties, air_properties
from calcdoc.physics.solvers import brentq

__all__ = [
    "SURFACE_RESISTANCE_SOURCE",
    "COMBINED_METHOD_SOURCE",
    "SATURATION_PRESSURE_SOURCE",
    "CHURCHILL_CHU_SOURCE",
    "surface_resistances",
    "layer_resistance",
    "PlaneElement",
    "plane_element",
    "CombinedMethod",
    "combined_method",
    "saturation_vapour_pressure",
    "saturation_temperature",
    "dew_point_temperature",
    "surface_relative_humidity",
    "temperature_factor",
    "cylinder_layer_resistance",
    "cylinder_film_resistance",
    "RadialHeatFlow",
    "cylindrical_layers",
    "nusselt_horizontal_cylinder_churchill_chu",
    "FreeConvection",
    "free_convection_horizontal_cylinder",
    "radiation_coefficient",
    "PipeInStillAir",
    "pipe_in_still_air",
]

ZERO_CELSIUS = constants.zero_Celsius  # 273.15 K


def _checked(quantity: str, value: ArrayLike, ok: Callable[[np.ndarray], np.ndarray],
             expected: str) -> np.ndarray:
    """The value as a float array, refused unless every element is finite and ``ok``; for a
    list argument the error gives the index (along the first axis) of the first bad element."""
    array = np.asarray(value, dtype=float)
    bad = ~(np.isfinite(array) & ok(array))
    if np.any(bad):
        if array.ndim:
            first = tuple(int(i) for i in np.argwhere(bad)[0])
            raise PhysicsRangeError(quantity, float(array[first]), expected, index=first[0])
        raise PhysicsRangeError(quantity, float(array), expected)
    return array


def _positive(quantity: str, value: ArrayLike, unit: str = "") -> np.ndarray:
    return _checked(quantity, value, lambda a: a > 0.0, f"a finite value > 0 {unit}".rstrip())


def _non_negative(quantity: str, value: ArrayLike, unit: str) -> np.ndarray:
    return _checked(quantity, value, lambda a: a >= 0.0, f"a finite value >= 0 {unit}")


def _emissivity(value: ArrayLike) -> np.ndarray:
    return _checked("emissivity", value, lambda e: (e > 0.0) & (e <= 1.0), "0 < emissivity <= 1")


def _result(value: np.ndarray) -> float | np.ndarray:
    """A plain float for scalar input, the array otherwise."""
    return float(value) if np.ndim(value) == 0 else value


# ---------------------------------------------------------------------------------------------
# Plane elements, ISO 6946:2017
# ---------------------------------------------------------------------------------------------

SURFACE_RESISTANCE_SOURCE = "ISO 6946:2017, 6.8, Table 7 (conventional surface resistances)"
COMBINED_METHOD_SOURCE = "ISO 6946:2017, 6.7.2 (combined method, upper and lower limits)"
SATURATION_PRESSURE_SOURCE = ("ISO 13788:2012, Annex E (saturation vapour pressure over water "
                              "at or above 0 degC, over ice below)")
CHURCHILL_CHU_SOURCE = ("Churchill and Chu, Int. J. Heat Mass Transfer 18 (1975) 1049-1053, "
                        "horizontal cylinder, Ra_D <= 1e12")

# Table 7: R_si by direction of heat flow, R_se the same for every direction [m^2 K/W].
_INSIDE_SURFACE_RESISTANCE = {"upward": 0.10, "horizontal": 0.13, "downward": 0.17}
_OUTSIDE_SURFACE_RESISTANCE = 0.04

# ISO 6946:2017 6.7.2.1 (from memory): the combined method is not applicable when the upper
# limit exceeds the lower limit by more than half.
_COMBINED_METHOD_MAX_RATIO = 1.5


def surface_resistances(heat_flow: str = "horizontal") -> tuple[float, float]:
    r"""Return the conventional inside and outside surface resistances (R_si, R_se) of a plane
    building element for a direction of heat flow.

    .. math::
        R_{si} = \begin{cases} 0.10 & \text{upward} \\ 0.13 & \text{horizontal} \\
        0.17 & \text{downward} \end{cases}\ \mathrm{m^2\,K/W}, \qquad
        R_{se} = 0.04\ \mathrm{m^2\,K/W}

    Parameters
    ----------
    heat_flow : str
        Direction of heat flow: ``"horizontal"``, ``"upward"`` or ``"downward"``.

    Returns
    -------
    (R_si, R_se) : tuple of float
        Inside and outside surface resistances [m²·K/W].

    Notes
    -----
    The values of ISO 6946:2017 Table 7 apply to plane surfaces in contact with air, with no
    specific information on boundary conditions; Annex C gives their basis (h_c and h_r) and
    values for other conditions (from memory). "Horizontal" covers heat flow directions within
    ±30° of the horizontal plane (the note to Table 7, from memory). They are the values for
    U-value calculations; surface condensation and mould checks use other inside resistances
    (ISO 13788:2012).

    Examples
    --------
    >>> surface_resistances("upward")
    (0.1, 0.04)

    References
    ----------
    1. ISO 6946:2017, Building components and building elements — Thermal resistance and
       thermal transmittance — Calculation methods. 6.8, Table 7.
    """
    try:
        inside = _INSIDE_SURFACE_RESISTANCE[heat_flow]
    except (KeyError, TypeError):
        raise PhysicsRangeError(
            "heat_flow", heat_flow,
            "'horizontal', 'upward' or 'downward' (ISO 6946:2017 Table 7)") from None
    return inside, _OUTSIDE_SURFACE_RESISTANCE


def layer_resistance(thickness: ArrayLike, conductivity: ArrayLike) -> float | np.ndarray:
    r"""Return the thermal resistance of a homogeneous layer.

    .. math::
        R = \frac{d}{\lambda}

    Parameters
    ----------
    thickness : float or array
        Layer thickness *d* [m].
    conductivity : float or array
        Design thermal conductivity λ [W/(m·K)].

    Returns
    -------
    R : float or array
        Thermal resistance [m²·K/W].

    Notes
    -----
    Fourier's law for a homogeneous plane layer; both inputs must be > 0.

    Examples
    --------
    >>> round(layer_resistance(0.1, 0.035), 4)
    2.8571

    References
    ----------
    1. ISO 6946:2017, 6.7.1 (homogeneous layers, R = d/λ; subclause number from memory).
    """
    d = _positive("thickness", thickness, "m")
    lam = _positive("conductivity", conductivity, "W/(m*K)")
    return _result(d / lam)


class PlaneElement(NamedTuple):
    """Steady conduction through a plane element (SI)."""

    R_total: float  # m^2 K/W, surface resistances included
    U: float  # W/(m^2 K)
    q: float  # W/m^2, positive inside -> outside
    interface_temperatures: np.ndarray  # K, inside surface ... outside surface


def plane_element(layer_resistances: ArrayLike, inside_temperature: float,
                  outside_temperature: float, R_si: float, R_se: float) -> PlaneElement:
    r"""Return the total resistance, U-value, heat flux and interface temperatures of plane
    layers in series between two air temperatures.

    .. math::
        R_T = R_{si} + \sum_{j=1}^{n} R_j + R_{se}, \qquad U = \frac{1}{R_T}, \qquad
        q = \frac{\theta_i - \theta_e}{R_T}, \qquad
        \theta_k = \theta_i - q\left(R_{si} + \sum_{j=1}^{k} R_j\right),\ k = 0 \ldots n

    Parameters
    ----------
    layer_resistances : sequence of float
        Resistances R_j of the layers, inside first [m²·K/W], each > 0.
    inside_temperature : float
        Inside air temperature θ_i [K].
    outside_temperature : float
        Outside air temperature θ_e [K].
    R_si : float
        Inside surface resistance [m²·K/W], >= 0.
    R_se : float
        Outside surface resistance [m²·K/W], >= 0.

    Returns
    -------
    PlaneElement
        ``R_total`` [m²·K/W], ``U`` [W/(m²·K)], ``q`` [W/m²] (positive inside → outside) and
        ``interface_temperatures`` [K]: n + 1 values, the inside surface θ_si, each interface
        between layers, and the outside surface θ_se.

    Notes
    -----
    One-dimensional steady conduction (Fourier's law) through layers in series, ISO 6946:2017
    6.7.1 (from memory). For a bridged element pass the layer resistances returned by
    :func:`combined_method`, which sum with R_si and R_se to its R_T. Temperatures must be
    > 0 K; θ_i = θ_e gives q = 0.

    Examples
    --------
    >>> wall = plane_element([0.5, 2.5], 293.15, 273.15, 0.13, 0.04)
    >>> round(wall.U, 4), round(wall.q, 3)
    (0.3155, 6.309)

    References
    ----------
    1. ISO 6946:2017, 6.7.1, total thermal resistance of homogeneous layers (from memory).
    """
    R = _positive("layer_resistances", np.atleast_1d(layer_resistances), "m^2*K/W")
    theta_i = float(_positive("inside_temperature", inside_temperature, "K"))
    theta_e = float(_positive("outside_temperature", outside_temperature, "K"))
    r_si = float(_non_negative("R_si", R_si, "m^2*K/W"))
    r_se = float(_non_negative("R_se", R_se, "m^2*K/W"))
    R_total = r_si + float(R.sum()) + r_se
    q = (theta_i - theta_e) / R_total
    cumulative = r_si + np.concatenate(([0.0], np.cumsum(R)))
    return PlaneElement(R_total, 1.0 / R_total, q, theta_i - q * cumulative)


class CombinedMethod(NamedTuple):
    """Result of the combined method of ISO 6946:2017 6.7.2 (SI)."""

    R_upper: float  # m^2 K/W, R'_T
    R_lower: float  # m^2 K/W, R''_T
    R_total: float  # m^2 K/W, (R'_T + R''_T)/2
    relative_error: float  # 1, maximum relative error e
    layer_resistances: np.ndarray  # m^2 K/W, per layer, summing with R_si, R_se to R_total


def combined_method(layer_resistances: Sequence[ArrayLike], fractions: ArrayLike,
                    R_si: float, R_se: float) -> CombinedMethod:
    r"""Return the upper and lower limits, the total thermal resistance and its error estimate
    for a plane element with thermally inhomogeneous (bridged) layers.

    .. math::
        \frac{1}{R'_T} = \sum_m \frac{f_m}{R_{Tm}},\quad
        R_{Tm} = R_{si} + \sum_j R_{mj} + R_{se};\qquad
        \frac{1}{R_j} = \sum_m \frac{f_m}{R_{mj}},\quad
        R''_T = R_{si} + \sum_j R_j + R_{se}

    .. math::
        R_T = \frac{R'_T + R''_T}{2}, \qquad e = \frac{R'_T - R''_T}{2 R_T}

    Parameters
    ----------
    layer_resistances : sequence
        One entry per layer, inside first. A homogeneous layer is one resistance [m²·K/W]; an
        inhomogeneous layer is a sequence of its resistances R_mj in each section m [m²·K/W],
        in the order of ``fractions``. All > 0.
    fractions : sequence of float
        Fractional areas f_m of the sections [1], each in (0, 1], summing to 1.
    R_si : float
        Inside surface resistance [m²·K/W], >= 0.
    R_se : float
        Outside surface resistance [m²·K/W], >= 0.

    Returns
    -------
    CombinedMethod
        ``R_upper`` R'_T, ``R_lower`` R''_T, ``R_total`` R_T [m²·K/W]; ``relative_error`` e [1];
        ``layer_resistances`` [m²·K/W], one per layer, for :func:`plane_element`.

    Notes
    -----
    ISO 6946:2017 6.7.2 (subclause numbers from memory: 6.7.2.2 R_T, 6.7.2.3 upper limit,
    6.7.2.4 lower limit, 6.7.2.5 error estimate). The upper limit assumes one-dimensional heat
    flow through each section in parallel; the lower limit assumes every plane parallel to the
    surfaces isothermal. R_mj = d_j/λ_mj, which for a layer of one thickness is the same as the
    standard's equivalent conductivity λ''_j = Σ f_m λ_mj. An air layer inside an inhomogeneous
    layer is entered as its resistance R_g. The method is refused (PhysicsRangeError) when
    R'_T/R''_T > 1.5 (e > 20 %), where ISO 6946:2017 6.7.2.1 says it does not apply (from
    memory); insulation bridged by metal is outside its scope and needs a numerical
    calculation to ISO 10211. The error names ``layer_resistances`` with the index of the most
    inhomogeneous layer (the largest ratio of the area-weighted arithmetic to harmonic mean of
    its section resistances), the bridge a reader would change first.

    The layer temperatures of a bridged element are not defined by the standard. By the
    convention used here, ``layer_resistances`` are the lower-limit layer resistances R_j
    scaled by one factor so that R_si + Σ R_j + R_se = R_T, keeping R_si and R_se as given:
    the inside surface temperature is then θ_i − q R_si with q = ΔT/R_T, a mean over the area.

    Examples
    --------
    >>> r = combined_method([0.06, [3.684, 1.077], 0.085], [0.85, 0.15], 0.13, 0.04)
    >>> round(r.R_upper, 3), round(r.R_lower, 3), round(r.R_total, 3)
    (3.122, 3.018, 3.07)

    References
    ----------
    1. ISO 6946:2017, Building components and building elements — Thermal resistance and
       thermal transmittance — Calculation methods. 6.7.2, combined method (subclause numbers
       from memory).
    """
    f = _checked("fractions", np.atleast_1d(fractions),
                 lambda a: (a > 0.0) & (a <= 1.0), "0 < f <= 1")
    if f.ndim != 1:
        raise ValueError(f"fractions must be one-dimensional, got shape {f.shape}")
    if abs(float(f.sum()) - 1.0) > 1e-6:
        raise PhysicsRangeError("fractions", float(f.sum()),
                                "fractions summing to 1: the sections make up the whole area "
                                "(ISO 6946:2017 6.7.2)")
    if len(layer_resistances) == 0:
        raise PhysicsRangeError("layer_resistances", 0, "at least one layer")
    rows = []
    for index, layer in enumerate(layer_resistances):
        row = np.asarray(layer, dtype=float)
        if row.ndim > 1 or (row.ndim == 1 and row.shape[0] != f.shape[0]):
            raise ValueError(f"layer {index + 1}: expected one resistance or {f.shape[0]} "
                             f"(one per section), got shape {row.shape}")
        rows.append(np.broadcast_to(row, f.shape))
    R = _positive("layer_resistances", np.vstack(rows), "m^2*K/W")  # shape (layers, sections)
    r_si = float(_non_negative("R_si", R_si, "m^2*K/W"))
    r_se = float(_non_negative("R_se", R_se, "m^2*K/W"))

    R_sections = r_si + R.sum(axis=0) + r_se
    R_upper = 1.0 / float(np.sum(f / R_sections))
    R_layers = 1.0 / np.sum(f / R, axis=1)
    R_lower = r_si + float(R_layers.sum()) + r_se
    if R_upper / R_lower > _COMBINED_METHOD_MAX_RATIO:
        # The layer to blame is the most inhomogeneous one: the largest ratio of its
        # area-weighted arithmetic to harmonic mean resistance (its own "upper over lower").
        spread = (R @ f) * np.sum(f / R, axis=1)
        raise PhysicsRangeError(
            "layer_resistances", R_upper / R_lower,
            f"R'_T/R''_T <= {_COMBINED_METHOD_MAX_RATIO} for the combined method (ISO 6946:2017 "
            "6.7.2); a bridge this conductive needs a numerical calculation to ISO 10211",
            index=int(np.argmax(spread)))
    R_total = 0.5 * (R_upper + R_lower)
    relative_error = (R_upper - R_lower) / (2.0 * R_total)
    scale = (R_total - r_si - r_se) / float(R_layers.sum())
    return CombinedMethod(R_upper, R_lower, R_total, relative_error, R_layers * scale)


# ---------------------------------------------------------------------------------------------
# Water vapour and surface humidity, ISO 13788:2012
# ---------------------------------------------------------------------------------------------

_P_SAT_0 = 610.5  # Pa at 0 degC, ISO 13788:2012 Annex E
_WATER = (17.269, 237.3)  # over water, theta >= 0 degC
_ICE = (21.875, 265.5)  # over ice, theta < 0 degC
# Range used here (ISO 13788 states none): where the two formulae agree with IAPWS within 2 %.
_SATURATION_T_MIN = ZERO_CELSIUS - 40.0
_SATURATION_T_MAX = ZERO_CELSIUS + 80.0
_SATURATION_RANGE_TEXT = ("-40 degC to +80 degC (233.15 K to 353.15 K), where the ISO 13788:2012 "
                          "Annex E formulae agree with IAPWS within 2 %")


def _magnus(theta: np.ndarray) -> np.ndarray:
    a = np.where(theta >= 0.0, _WATER[0], _ICE[0])
    b = np.where(theta >= 0.0, _WATER[1], _ICE[1])
    return _P_SAT_0 * np.exp(a * theta / (b + theta))


_P_SAT_MIN = float(_magnus(np.float64(_SATURATION_T_MIN - ZERO_CELSIUS)))  # Pa
_P_SAT_MAX = float(_magnus(np.float64(_SATURATION_T_MAX - ZERO_CELSIUS)))  # Pa


def saturation_vapour_pressure(temperature: ArrayLike) -> float | np.ndarray:
    r"""Return the saturation water vapour pressure over water (θ >= 0 °C) or over ice
    (θ < 0 °C).

    .. math::
        p_{sat} = 610.5\,\exp\left(\frac{17.269\,\theta}{237.3 + \theta}\right)\ (\theta \ge 0),
        \qquad
        p_{sat} = 610.5\,\exp\left(\frac{21.875\,\theta}{265.5 + \theta}\right)\ (\theta < 0),
        \qquad \theta = T - 273.15

    Parameters
    ----------
    temperature : float or array
        Temperature *T* [K].

    Returns
    -------
    p_sat : float or array
        Saturation vapour pressure [Pa].

    Notes
    -----
    ISO 13788:2012 Annex E (equation numbers E.7 over water and E.8 over ice from memory, not
    checked against the printed standard). The two branches meet at 610.5 Pa at 0 °C. ISO 13788
    gives no range; this function accepts −40 °C to +80 °C, where the formulae agree with the
    IAPWS saturation and sublimation pressures within 0.2 % over water and 2 % over ice
    (1 % down to −30 °C), and raises PhysicsRangeError outside it.

    Examples
    --------
    >>> round(saturation_vapour_pressure(293.15))
    2337

    References
    ----------
    1. ISO 13788:2012, Hygrothermal performance of building components and building
       elements — Internal surface temperature to avoid critical surface humidity and
       interstitial condensation — Calculation methods. Annex E (from memory).
    """
    T = _saturation_range("temperature", temperature)
    return _result(_magnus(T - ZERO_CELSIUS))


def saturation_temperature(vapour_pressure: ArrayLike) -> float | np.ndarray:
    r"""Return the temperature at which a water vapour pressure is the saturation pressure
    (the dew point, or frost point below 0 °C).

    .. math::
        \theta = \frac{b\,x}{a - x},\quad x = \ln\frac{p}{610.5},\quad
        (a, b) = \begin{cases} (17.269,\ 237.3) & p \ge 610.5\ \mathrm{Pa} \\
        (21.875,\ 265.5) & p < 610.5\ \mathrm{Pa} \end{cases}

    Parameters
    ----------
    vapour_pressure : float or array
        Partial pressure of water vapour *p* [Pa].

    Returns
    -------
    T : float or array
        Saturation temperature [K]: over water at or above 0 °C, over ice below it.

    Notes
    -----
    The exact inverse of :func:`saturation_vapour_pressure` (ISO 13788:2012 Annex E, from
    memory); p = 610.5 Pa is the branch point. Accepts the pressures of that function's range
    (−40 °C to +80 °C) and raises PhysicsRangeError outside them.

    Examples
    --------
    >>> round(saturation_temperature(1168.5) - 273.15, 2)
    9.27

    References
    ----------
    1. ISO 13788:2012, Annex E (from memory).
    """
    p = _checked("vapour_pressure", vapour_pressure,
                 lambda v: (v >= _P_SAT_MIN) & (v <= _P_SAT_MAX),
                 f"{_P_SAT_MIN:.1f} Pa to {_P_SAT_MAX:.0f} Pa, the saturation pressures of "
                 + _SATURATION_RANGE_TEXT)
    x = np.log(p / _P_SAT_0)
    a = np.where(x >= 0.0, _WATER[0], _ICE[0])
    b = np.where(x >= 0.0, _WATER[1], _ICE[1])
    return _result(ZERO_CELSIUS + b * x / (a - x))


def _relative_humidity(value: ArrayLike) -> np.ndarray:
    return _checked("relative_humidity", value, lambda v: (v > 0.0) & (v <= 1.0),
                    "0 < phi <= 1 (a fraction, not a percentage)")


def _saturation_range(quantity: str, temperature: ArrayLike, what: str = "") -> np.ndarray:
    """The temperature, refused (under the caller's parameter name) outside the range of the
    saturation pressure formulae; ``what`` names the temperature in the message."""
    return _checked(quantity, temperature,
                    lambda t: (t >= _SATURATION_T_MIN) & (t <= _SATURATION_T_MAX),
                    what + _SATURATION_RANGE_TEXT)


def dew_point_temperature(air_temperature: ArrayLike,
                          relative_humidity: ArrayLike) -> float | np.ndarray:
    r"""Return the dew point (frost point below 0 °C) of moist air.

    .. math::
        p = \varphi\,p_{sat}(T_a), \qquad T_d = p_{sat}^{-1}(p)

    Parameters
    ----------
    air_temperature : float or array
        Air temperature T_a [K].
    relative_humidity : float or array
        Relative humidity φ [1], 0 < φ <= 1.

    Returns
    -------
    T_d : float or array
        Dew point temperature [K].

    Notes
    -----
    Uses the saturation pressure of ISO 13788:2012 Annex E over water at or above 0 °C and over
    ice below it (from memory), valid from −40 °C to +80 °C.

    Examples
    --------
    >>> round(dew_point_temperature(293.15, 0.5) - 273.15, 1)
    9.3

    References
    ----------
    1. ISO 13788:2012, Annex E (from memory).
    """
    T_a = _saturation_range("air_temperature", air_temperature)
    phi = _relative_humidity(relative_humidity)
    p = phi * np.asarray(saturation_vapour_pressure(T_a))
    # p never exceeds p_sat(T_a), so only a dew point below the range can be refused: air
    # that dry is refused at its humidity.
    low = p < _P_SAT_MIN
    if np.any(low):
        found = phi[low].flat[0] if np.ndim(phi) else phi
        raise PhysicsRangeError("relative_humidity", float(found),
                                "a humidity whose dew point is within " + _SATURATION_RANGE_TEXT)
    return saturation_temperature(p)


def surface_relative_humidity(air_temperature: ArrayLike, relative_humidity: ArrayLike,
                              surface_temperature: ArrayLike) -> float | np.ndarray:
    r"""Return the relative humidity of the air in contact with a surface.

    .. math::
        \varphi_s = \frac{\varphi\,p_{sat}(T_a)}{p_{sat}(T_s)}

    Parameters
    ----------
    air_temperature : float or array
        Room air temperature T_a [K].
    relative_humidity : float or array
        Room relative humidity φ [1], 0 < φ <= 1.
    surface_temperature : float or array
        Surface temperature T_s [K].

    Returns
    -------
    phi_s : float or array
        Relative humidity at the surface [1]. Not capped: a value above 1 means the vapour
        pressure exceeds saturation at the surface, so water condenses on it.

    Notes
    -----
    The air's vapour pressure is unchanged up to the surface (ISO 13788:2012, clause 4 and
    its mould criterion of φ_s = 0.8, from memory); saturation pressure as in
    :func:`saturation_vapour_pressure`, −40 °C to +80 °C.

    Examples
    --------
    >>> round(surface_relative_humidity(293.15, 0.5, 283.15), 3)
    0.952

    References
    ----------
    1. ISO 13788:2012, clause 4 (surface humidity) and Annex E (from memory).
    """
    T_a = _saturation_range("air_temperature", air_temperature)
    T_s = _saturation_range("surface_temperature", surface_temperature,
                            "a surface temperature within ")
    phi = _relative_humidity(relative_humidity)
    p = phi * np.asarray(saturation_vapour_pressure(T_a))
    return _result(p / np.asarray(saturation_vapour_pressure(T_s)))


def temperature_factor(surface_temperature: ArrayLike, inside_temperature: ArrayLike,
                       outside_temperature: ArrayLike) -> float | np.ndarray:
    r"""Return the temperature factor at the internal surface.

    .. math::
        f_{Rsi} = \frac{\theta_{si} - \theta_e}{\theta_i - \theta_e}

    Parameters
    ----------
    surface_temperature : float or array
        Internal surface temperature θ_si [K].
    inside_temperature : float or array
        Internal air temperature θ_i [K].
    outside_temperature : float or array
        External air temperature θ_e [K]; must differ from θ_i.

    Returns
    -------
    f_Rsi : float or array
        Temperature factor [1].

    Notes
    -----
    Defined in ISO 13788:2012 (clause 3, and 4.2 for its use against mould; from memory). For a
    plane element it equals 1 − U R_si, with R_si the resistance used for θ_si.

    Examples
    --------
    >>> round(temperature_factor(290.15, 293.15, 273.15), 3)
    0.85

    References
    ----------
    1. ISO 13788:2012, clause 3, temperature factor at the internal surface (from memory).
    """
    theta_si = _positive("surface_temperature", surface_temperature, "K")
    theta_i = _positive("inside_temperature", inside_temperature, "K")
    theta_e = _positive("outside_temperature", outside_temperature, "K")
    difference = theta_i - theta_e
    if np.any(difference == 0.0):
        raise PhysicsRangeError("outside_temperature", _result(theta_e),
                                "a temperature other than the inside temperature: f_Rsi is "
                                "undefined when they are equal")
    return _result((theta_si - theta_e) / difference)


# ---------------------------------------------------------------------------------------------
# Cylindrical layers
# ---------------------------------------------------------------------------------------------

def cylinder_layer_resistance(inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                              conductivity: ArrayLike) -> float | np.ndarray:
    r"""Return the radial conduction resistance per unit length of a cylindrical layer.

    .. math::
        R' = \frac{\ln(D_2/D_1)}{2\pi k}

    Parameters
    ----------
    inner_diameter : float or array
        Inner diameter D_1 [m], > 0.
    outer_diameter : float or array
        Outer diameter D_2 [m], > D_1.
    conductivity : float or array
        Thermal conductivity k [W/(m·K)], > 0.

    Returns
    -------
    R' : float or array
        Resistance per unit length [m·K/W].

    Notes
    -----
    Fourier's law integrated over a long, homogeneous cylindrical shell in steady radial
    conduction, constant k.

    Examples
    --------
    >>> round(cylinder_layer_resistance(0.1, 0.2, 0.04), 3)
    2.758

    References
    ----------
    1. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. Eq. 3.33 (radial resistance of a cylindrical wall; equation number from
       memory).
    """
    d1 = _positive("inner_diameter", inner_diameter, "m")
    d2 = _positive("outer_diameter", outer_diameter, "m")
    k = _positive("conductivity", conductivity, "W/(m*K)")
    if np.any(d2 <= d1):
        raise PhysicsRangeError("outer_diameter", _result(d2),
                                "a diameter greater than the inner diameter")
    return _result(np.log(d2 / d1) / (2.0 * np.pi * k))


def cylinder_film_resistance(diameter: ArrayLike, coefficient: ArrayLike) -> float | np.ndarray:
    r"""Return the surface (film) resistance per unit length of a cylinder.

    .. math::
        R' = \frac{1}{h\,\pi D}

    Parameters
    ----------
    diameter : float or array
        Diameter of the surface D [m], > 0.
    coefficient : float or array
        Surface heat transfer coefficient h [W/(m²·K)], > 0.

    Returns
    -------
    R' : float or array
        Resistance per unit length [m·K/W].

    Notes
    -----
    Newton's law of cooling over the surface area πD per metre of length.

    Examples
    --------
    >>> round(cylinder_film_resistance(0.2, 10.0), 4)
    0.1592

    References
    ----------
    1. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. §3.3.1 (thermal circuit of a cylindrical wall; from memory).
    """
    D = _positive("diameter", diameter, "m")
    h = _positive("coefficient", coefficient, "W/(m^2*K)")
    return _result(1.0 / (h * np.pi * D))


class RadialHeatFlow(NamedTuple):
    """Steady radial heat flow through cylindrical layers (SI, per metre of length)."""

    outer_diameter: float  # m
    diameters: np.ndarray  # m, inner diameter, each layer boundary, outer diameter
    R_per_length: float  # m K/W, inside temperature to ambient, films included
    q_per_length: float  # W/m, positive outward
    theta_surface: float  # K, outer surface
    interface_temperatures: np.ndarray  # K, at each of `diameters`
    h_outside: float  # W/(m^2 K)


def cylindrical_layers(inner_diameter: float, thicknesses: ArrayLike, conductivities: ArrayLike,
                       inside_temperature: float, ambient_temperature: float,
                       outside_coefficient: float,
                       inside_coefficient: float | None = None) -> RadialHeatFlow:
    r"""Return the resistance, heat flow per unit length and temperatures of cylindrical layers
    between an inside fluid and the ambient.

    .. math::
        R' = \frac{1}{h_i \pi D_0} + \sum_{j=1}^{n} \frac{\ln(D_j/D_{j-1})}{2\pi k_j}
        + \frac{1}{h_o \pi D_n}, \qquad q' = \frac{T_i - T_\infty}{R'},
        \qquad D_j = D_{j-1} + 2 t_j

    Parameters
    ----------
    inner_diameter : float
        Inner diameter of the first layer D_0 [m].
    thicknesses : sequence of float
        Layer thicknesses t_j, innermost first [m], at least one, each > 0.
    conductivities : sequence of float
        Layer conductivities k_j [W/(m·K)], one per layer.
    inside_temperature : float
        Inside fluid temperature T_i [K].
    ambient_temperature : float
        Ambient temperature T_∞ [K].
    outside_coefficient : float
        Outside surface coefficient h_o [W/(m²·K)], convection and radiation together.
    inside_coefficient : float, optional
        Inside surface coefficient h_i [W/(m²·K)]; omitted, the inner surface is at T_i.

    Returns
    -------
    RadialHeatFlow
        ``outer_diameter`` D_n [m], ``diameters`` D_0 … D_n [m], ``R_per_length`` R'
        [m·K/W], ``q_per_length`` q' [W/m] (positive outward), ``theta_surface`` [K] (outer
        surface), ``interface_temperatures`` [K] at D_0 … D_n, ``h_outside`` [W/(m²·K)].

    Notes
    -----
    Steady one-dimensional radial conduction (Fourier's law) through long coaxial layers in
    perfect contact, constant conductivities, uniform surface coefficients.

    Examples
    --------
    >>> r = cylindrical_layers(0.1, [0.05], [0.04], 423.15, 293.15, 10.0)
    >>> round(r.R_per_length, 3), round(r.q_per_length, 1)
    (2.917, 44.6)

    References
    ----------
    1. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. §3.3 (radial systems; from memory).
    """
    t = _positive("thicknesses", np.atleast_1d(thicknesses), "m")
    k = _positive("conductivities", np.atleast_1d(conductivities), "W/(m*K)")
    if t.ndim != 1 or t.shape != k.shape or t.size == 0:
        raise ValueError(f"expected one conductivity per layer and at least one layer, got "
                         f"{t.size} thicknesses and {k.size} conductivities")
    d0 = float(_positive("inner_diameter", inner_diameter, "m"))
    T_i = float(_positive("inside_temperature", inside_temperature, "K"))
    T_a = float(_positive("ambient_temperature", ambient_temperature, "K"))
    h_o = float(_positive("outside_coefficient", outside_coefficient, "W/(m^2*K)"))
    h_i = None if inside_coefficient is None else float(
        _positive("inside_coefficient", inside_coefficient, "W/(m^2*K)"))
    diameters = d0 + 2.0 * np.concatenate(([0.0], np.cumsum(t)))
    resistances = [0.0 if h_i is None else float(cylinder_film_resistance(d0, h_i))]
    resistances.extend(np.log(diameters[1:] / diameters[:-1]) / (2.0 * np.pi * k))
    R_outside = float(cylinder_film_resistance(diameters[-1], h_o))
    R_per_length = float(np.sum(resistances)) + R_outside
    q = (T_i - T_a) / R_per_length
    temperatures = T_i - q * np.cumsum(resistances)
    return RadialHeatFlow(float(diameters[-1]), diameters, R_per_length, q,
                          float(temperatures[-1]), temperatures, h_o)


# ---------------------------------------------------------------------------------------------
# Outside coefficient of a horizontal cylinder in still air
# ---------------------------------------------------------------------------------------------

_CHURCHILL_CHU_RA_MAX = 1e12
_RA_RANGE_TEXT = "0 <= Ra_D <= 1e12 for the Churchill-Chu correlation (Churchill and Chu 1975)"
_AIR_RANGE_TEXT = (f"{AIR_TABLE_RANGE[0]:g} K to {AIR_TABLE_RANGE[1]:g} K, the rows of the air "
                   f"table ({AIR_TABLE_SOURCE})")
_GRAVITY = constants.g  # standard gravity, 9.80665 m/s^2


def nusselt_horizontal_cylinder_churchill_chu(rayleigh: ArrayLike,
                                              prandtl: ArrayLike) -> float | np.ndarray:
    r"""Return the mean Nusselt number for natural convection from a long isothermal horizontal
    cylinder by the Churchill–Chu correlation.

    .. math::
        \overline{Nu}_D = \left\{0.60 + \frac{0.387\,Ra_D^{1/6}}
        {\left[1 + (0.559/Pr)^{9/16}\right]^{8/27}}\right\}^2

    Parameters
    ----------
    rayleigh : float or array
        Rayleigh number on the diameter, Ra_D = g β |T_s − T_∞| D³/(ν α) [1], 0 <= Ra_D <= 10¹².
    prandtl : float or array
        Prandtl number of the fluid at the film temperature [1], > 0.

    Returns
    -------
    Nu_D : float or array
        Mean Nusselt number h D / k [1].

    Notes
    -----
    Valid for Ra_D <= 10¹² (reference 2); above it PhysicsRangeError is raised. The authors
    correlated data down to Ra_D ≈ 10⁻⁵; below that the formula tends to its limit 0.36, which
    matters only for a surface a negligible fraction of a kelvin from ambient. One expression
    covers the laminar and turbulent ranges, for a heated or a cooled cylinder.

    Examples
    --------
    >>> round(nusselt_horizontal_cylinder_churchill_chu(5.07e6, 0.697), 1)
    23.1

    References
    ----------
    1. Churchill, S. W., Chu, H. H. S. Correlating equations for laminar and turbulent free
       convection from a horizontal cylinder. Int. J. Heat Mass Transfer 18(9), 1975,
       1049-1053. Eq. for the full range of Ra (the one above).
    2. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. Eq. 9.34 (equation number from memory).
    """
    Ra = _checked("rayleigh", rayleigh, lambda r: (r >= 0.0) & (r <= _CHURCHILL_CHU_RA_MAX),
                  _RA_RANGE_TEXT)
    Pr = _positive("prandtl", prandtl)
    denominator = (1.0 + (0.559 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return _result((0.60 + 0.387 * Ra ** (1.0 / 6.0) / denominator) ** 2)


class FreeConvection(NamedTuple):
    """Natural convection from a horizontal cylinder in air (SI)."""

    h: float  # W/(m^2 K)
    nusselt: float  # 1
    rayleigh: float  # 1
    film_temperature: float  # K
    air: AirProperties  # at the film temperature


def free_convection_horizontal_cylinder(diameter: float, surface_temperature: float,
                                        ambient_temperature: float) -> FreeConvection:
    r"""Return the natural convection coefficient of a long horizontal cylinder in still air,
    with the Rayleigh and Nusselt numbers and the air properties used.

    .. math::
        T_f = \frac{T_s + T_\infty}{2}, \qquad
        Ra_D = \frac{g\,\beta\,|T_s - T_\infty|\,D^3}{\nu\,\alpha}, \qquad
        h = \frac{k}{D}\,\overline{Nu}_D(Ra_D, Pr)

    Parameters
    ----------
    diameter : float
        Outer diameter D [m].
    surface_temperature : float
        Surface temperature T_s [K].
    ambient_temperature : float
        Temperature of the still air far from the cylinder T_∞ [K].

    Returns
    -------
    FreeConvection
        ``h`` [W/(m²·K)], ``nusselt`` [1], ``rayleigh`` [1], ``film_temperature`` [K] and the
        ``air`` properties at it (k, ν, α, Pr, β = 1/T_f).

    Notes
    -----
    Air properties at the film temperature from :func:`calcdoc.physics.air.air_properties`
    (200 K to 800 K); g is standard gravity 9.80665 m/s² (scipy.constants). The Churchill–Chu
    correlation holds for an isothermal cylinder with Ra_D <= 10¹²; outside either range
    PhysicsRangeError is raised: an ambient outside the air table names
    ``ambient_temperature``, a film temperature outside it ``surface_temperature``, and Ra_D
    above 10¹² ``diameter`` (Ra_D grows with D³).

    Examples
    --------
    >>> round(free_convection_horizontal_cylinder(0.1, 438.15, 296.15).h, 2)
    7.23

    References
    ----------
    1. Churchill, S. W., Chu, H. H. S. Int. J. Heat Mass Transfer 18(9), 1975, 1049-1053.
    2. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. Eq. 9.25 (Ra) and 9.34 (Nu), Table A.4 (air); numbers from memory.
    """
    D = float(_positive("diameter", diameter, "m"))
    T_a = float(_checked("ambient_temperature", ambient_temperature,
                         lambda t: (t >= AIR_TABLE_RANGE[0]) & (t <= AIR_TABLE_RANGE[1]),
                         _AIR_RANGE_TEXT))
    # With the ambient in the table, a film temperature outside it is the surface's doing.
    T_s = float(_checked("surface_temperature", surface_temperature,
                         lambda t: (t > 0.0) & (0.5 * (t + T_a) >= AIR_TABLE_RANGE[0])
                         & (0.5 * (t + T_a) <= AIR_TABLE_RANGE[1]),
                         "a film temperature (T_s + T_inf)/2 within " + _AIR_RANGE_TEXT))
    T_film = 0.5 * (T_s + T_a)
    air = air_properties(T_film)
    Ra = (_GRAVITY * air.expansion_coefficient * abs(T_s - T_a) * D ** 3
          / (air.kinematic_viscosity * air.thermal_diffusivity))
    if Ra > _CHURCHILL_CHU_RA_MAX:  # D^3 makes the diameter the deciding input
        raise PhysicsRangeError("diameter", Ra, _RA_RANGE_TEXT)
    Nu = float(nusselt_horizontal_cylinder_churchill_chu(Ra, air.prandtl))
    return FreeConvection(Nu * air.conductivity / D, Nu, Ra, T_film, air)


def radiation_coefficient(emissivity: ArrayLike, surface_temperature: ArrayLike,
                          surroundings_temperature: ArrayLike) -> float | np.ndarray:
    r"""Return the linearised radiation coefficient of a small grey surface in large
    surroundings.

    .. math::
        h_r = \varepsilon\,\sigma\,(T_s^2 + T_{sur}^2)(T_s + T_{sur})

    Parameters
    ----------
    emissivity : float or array
        Hemispherical emissivity of the surface ε [1], 0 < ε <= 1.
    surface_temperature : float or array
        Surface temperature T_s [K].
    surroundings_temperature : float or array
        Temperature of the surroundings T_sur [K].

    Returns
    -------
    h_r : float or array
        Radiation coefficient [W/(m²·K)], so that h_r (T_s − T_sur) = ε σ (T_s⁴ − T_sur⁴).

    Notes
    -----
    Stefan–Boltzmann law for a grey diffuse surface completely enclosed by much larger
    surroundings (which then act as a black body); exact, not an approximation, for that case.
    σ from scipy.constants (CODATA).

    Examples
    --------
    >>> round(radiation_coefficient(0.9, 323.15, 293.15), 2)
    5.99

    References
    ----------
    1. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. Eq. 1.9 (radiation heat transfer coefficient; equation number from memory).
    """
    eps = _emissivity(emissivity)
    T_s = _positive("surface_temperature", surface_temperature, "K")
    T_sur = _positive("surroundings_temperature", surroundings_temperature, "K")
    return _result(eps * constants.Stefan_Boltzmann * (T_s ** 2 + T_sur ** 2) * (T_s + T_sur))


class PipeInStillAir(NamedTuple):
    """A horizontal insulated pipe in still air: the heat flow and the outside coefficient."""

    flow: RadialHeatFlow  # with h_outside = convection.h + h_radiation
    convection: FreeConvection  # at the solved surface temperature
    h_radiation: float  # W/(m^2 K)


def pipe_in_still_air(inner_diameter: float, thicknesses: ArrayLike, conductivities: ArrayLike,
                      inside_temperature: float, ambient_temperature: float,
                      emissivity: float, inside_coefficient: float | None = None) -> PipeInStillAir:
    r"""Return the heat flow per unit length and outer surface temperature of a horizontal
    pipe with cylindrical layers in still air, with the outside coefficient found from the
    surface temperature.

    .. math::
        \frac{T_i - T_s}{R'_{in}} = \pi D_n\,\left[h_c(T_s) + h_r(T_s)\right](T_s - T_\infty),
        \qquad R'_{in} = \frac{1}{h_i \pi D_0} + \sum_j \frac{\ln(D_j/D_{j-1})}{2\pi k_j}

    Parameters
    ----------
    inner_diameter : float
        Inner diameter of the first layer D_0 [m].
    thicknesses : sequence of float
        Layer thicknesses, innermost first [m].
    conductivities : sequence of float
        Layer conductivities [W/(m·K)].
    inside_temperature : float
        Inside fluid temperature T_i [K].
    ambient_temperature : float
        Temperature of the still air and of the surroundings T_∞ [K].
    emissivity : float
        Emissivity of the outer surface [1], 0 < ε <= 1.
    inside_coefficient : float, optional
        Inside surface coefficient [W/(m²·K)]; omitted, the inner surface is at T_i.

    Returns
    -------
    PipeInStillAir
        ``flow`` (:class:`RadialHeatFlow` with ``h_outside`` = h_c + h_r), ``convection``
        (:class:`FreeConvection` at the solved surface temperature) and ``h_radiation``
        [W/(m²·K)].

    Notes
    -----
    The surface temperature T_s is the root, between T_∞ and T_i, of the heat balance above,
    found with Brent's method (scipy.optimize.brentq) to 10⁻⁹ K. h_c is natural convection by
    the Churchill–Chu correlation (:func:`free_convection_horizontal_cylinder`); h_r is
    radiation to surroundings at T_∞ (:func:`radiation_coefficient`). Assumes steady state, a
    long horizontal isothermal outer surface, still air, large surroundings. The air table
    (200 K to 800 K) must hold the film temperatures at both ends of the bracket, T_∞ and
    (T_i + T_∞)/2 (else PhysicsRangeError naming ``ambient_temperature`` or
    ``inside_temperature``), and Ra_D must not exceed 10¹² on the way (else PhysicsRangeError
    naming ``emissivity``: the still-air coefficient that giving an emissivity asks for does not
    apply, and an outside coefficient must be given instead).

    Examples
    --------
    >>> r = pipe_in_still_air(0.1, [0.05], [0.04], 423.15, 293.15, 0.9)
    >>> round(r.flow.theta_surface - 273.15, 1), round(r.flow.q_per_length, 1)
    (28.2, 44.2)

    References
    ----------
    1. Churchill, S. W., Chu, H. H. S. Int. J. Heat Mass Transfer 18(9), 1975, 1049-1053.
    2. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. §3.3 (radial conduction), §9.6.3 (horizontal cylinder), Eq. 1.9
       (radiation coefficient); numbers from memory.
    """
    # Validate the layers once, with the inside resistance from a unit outside coefficient.
    base = cylindrical_layers(inner_diameter, thicknesses, conductivities, inside_temperature,
                              ambient_temperature, 1.0, inside_coefficient)
    eps = float(_emissivity(emissivity))
    T_i, T_a, D = float(inside_temperature), float(ambient_temperature), base.outer_diameter
    R_inside = base.R_per_length - float(cylinder_film_resistance(D, 1.0))
    low, high = AIR_TABLE_RANGE
    if not low <= T_a <= high:
        raise PhysicsRangeError("ambient_temperature", T_a, _AIR_RANGE_TEXT)
    if not low <= 0.5 * (T_i + T_a) <= high:
        raise PhysicsRangeError("inside_temperature", T_i, "a film temperature (T_i + T_inf)/2 "
                                "within " + _AIR_RANGE_TEXT)

    def outside_coefficients(T_s: float) -> tuple[FreeConvection, float]:
        return (free_convection_horizontal_cylinder(D, T_s, T_a),
                float(radiation_coefficient(eps, T_s, T_a)))

    def imbalance(T_s: float) -> float:
        convection, h_r = outside_coefficients(T_s)
        return (T_i - T_s) / R_inside - np.pi * D * (convection.h + h_r) * (T_s - T_a)

    try:
        if T_i == T_a:
            T_s = T_a
        else:
            T_s = brentq(imbalance, min(T_i, T_a), max(T_i, T_a), xtol=1e-9)
        convection, h_r = outside_coefficients(T_s)
    except PhysicsRangeError as exc:  # Ra_D above 1e12; the film temperatures were checked
        raise PhysicsRangeError("emissivity", exc.value, _RA_RANGE_TEXT + "; give the outside "
                                "coefficient instead") from None
    flow = cylindrical_layers(inner_diameter, thicknesses, conductivities, inside_temperature,
                              ambient_temperature, convection.h + h_r, inside_coefficient)
    return PipeInStillAir(flow, convection, h_r)
