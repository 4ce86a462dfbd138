"""Temperature-dependent thermal properties of concrete and carbon steel in fire.

Concrete with siliceous or calcareous aggregate follows EN 1992-1-2:2004 §3.3 (the clause gives
both aggregates the same specific heat, density change and conductivity); carbon steel follows
EN 1993-1-2:2005 §3.2.2 and §3.4.1. Every function takes temperatures in kelvin (a float or a numpy
array) and returns SI values of the same shape.

Each law is defined by its standard for 20 °C ≤ θ ≤ 1200 °C. By default a temperature outside that
range raises :class:`~calcdoc.physics.PhysicsRangeError`; with ``extend=True`` the value at the
nearer end of the range is held instead, and the caller (the transient solver's result records the
temperatures reached in each layer) is responsible for reporting that the law was extended.

Equation numbers are those of the editions named; they are given from memory of the printed
standards and sit beside the clause number, which is the primary citation.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from calcdoc.physics import PhysicsRangeError

__all__ = [
    "ZERO_CELSIUS", "LAW_TEMPERATURE_RANGE", "ThermalLaw",
    "concrete_conductivity_upper", "concrete_conductivity_lower", "concrete_conductivity",
    "concrete_specific_heat_dry", "concrete_specific_heat_peak", "concrete_specific_heat",
    "concrete_density", "concrete_law",
    "steel_conductivity", "steel_specific_heat", "steel_density", "carbon_steel_law",
    "constant_law", "LAWS", "make_law",
]

ZERO_CELSIUS = 273.15
"""0 °C in kelvin [K]."""

LAW_TEMPERATURE_RANGE = (20.0 + ZERO_CELSIUS, 1200.0 + ZERO_CELSIUS)
"""Range of both standards' laws, 20 °C to 1200 °C, in kelvin [K]."""

# A temperature this close to the end of the range (K) is taken as inside it: the range is printed
# to whole degrees and a solver's 20 °C initial state must not trip it through rounding.
_RANGE_TOLERANCE = 1e-6

_MOISTURE_LIMIT = 0.03
_NORMAL_WEIGHT_DENSITY = (2000.0, 2600.0)


def _celsius(temperature, extend: bool):
    """Return (θ in °C as an array clipped to the law's range, whether the input was a scalar).

    Every law names its temperature argument ``temperature``: that is the quantity an error
    names."""
    kelvin = np.asarray(temperature, dtype=float)
    scalar = kelvin.ndim == 0
    theta = kelvin - ZERO_CELSIUS
    low, high = 20.0, 1200.0
    if not extend:
        if np.any(~np.isfinite(theta)) or np.any(theta < low - _RANGE_TOLERANCE) \
                or np.any(theta > high + _RANGE_TOLERANCE):
            bad = theta[(~np.isfinite(theta)) | (theta < low - _RANGE_TOLERANCE)
                        | (theta > high + _RANGE_TOLERANCE)]
            raise PhysicsRangeError(
                "temperature", float(bad.flat[0]) + ZERO_CELSIUS,
                "a temperature from 293.15 K to 1473.15 K (20 °C to 1200 °C)")
    return np.clip(theta, low, high), scalar


def _out(value: np.ndarray, scalar: bool):
    return float(value) if scalar else value


# ------------------------------------------------------------------------------------ concrete


def concrete_conductivity_upper(temperature, *, extend: bool = False):
    r"""Return the upper-limit thermal conductivity of normal-weight concrete [W/(m·K)].

    .. math::

        \lambda_c = 2 - 0.2451\,(\theta/100) + 0.0107\,(\theta/100)^2
        \qquad 20\,^\circ\mathrm{C} \le \theta \le 1200\,^\circ\mathrm{C}

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature T = θ + 273.15 [K].
    extend : bool
        Hold the 20 °C / 1200 °C value outside the range instead of raising.

    Returns
    -------
    float or ndarray
        Thermal conductivity λc [W/(m·K)].

    Notes
    -----
    Valid for 20 °C ≤ θ ≤ 1200 °C, siliceous and calcareous aggregate alike. EN 1992-1-2
    §3.3.3(2) lets the National Annex set the conductivity between the lower and upper limit; its
    Note says Annex A (the temperature profiles) is compatible with the lower limit, which is
    calcdoc's default.

    Examples
    --------
    >>> round(concrete_conductivity_upper(293.15), 3)
    1.951

    References
    ----------
    1. EN 1992-1-2:2004, Eurocode 2: Design of concrete structures, Part 1-2: Structural fire
       design, §3.3.3(2), eq. (3.7).
    """
    theta, scalar = _celsius(temperature, extend)
    r = theta / 100.0
    return _out(2.0 - 0.2451 * r + 0.0107 * r * r, scalar)


def concrete_conductivity_lower(temperature, *, extend: bool = False):
    r"""Return the lower-limit thermal conductivity of normal-weight concrete [W/(m·K)].

    .. math::

        \lambda_c = 1.36 - 0.136\,(\theta/100) + 0.0057\,(\theta/100)^2
        \qquad 20\,^\circ\mathrm{C} \le \theta \le 1200\,^\circ\mathrm{C}

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature T = θ + 273.15 [K].
    extend : bool
        Hold the 20 °C / 1200 °C value outside the range instead of raising.

    Returns
    -------
    float or ndarray
        Thermal conductivity λc [W/(m·K)].

    Notes
    -----
    Valid for 20 °C ≤ θ ≤ 1200 °C, siliceous and calcareous aggregate alike. This is the limit
    EN 1992-1-2 Annex A's temperature profiles are compatible with (Note to §3.3.3(2)), and
    calcdoc's default.

    Examples
    --------
    >>> round(concrete_conductivity_lower(293.15), 3)
    1.333

    References
    ----------
    1. EN 1992-1-2:2004, Eurocode 2: Design of concrete structures, Part 1-2: Structural fire
       design, §3.3.3(2), eq. (3.8).
    """
    theta, scalar = _celsius(temperature, extend)
    r = theta / 100.0
    return _out(1.36 - 0.136 * r + 0.0057 * r * r, scalar)


def concrete_conductivity(temperature, limit: str = "lower", *, extend: bool = False):
    r"""Return the thermal conductivity of normal-weight concrete at the chosen limit [W/(m·K)].

    .. math::

        \lambda_c = \begin{cases}
        2 - 0.2451\,(\theta/100) + 0.0107\,(\theta/100)^2 & \text{upper limit}\\
        1.36 - 0.136\,(\theta/100) + 0.0057\,(\theta/100)^2 & \text{lower limit}
        \end{cases}

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature [K].
    limit : {"lower", "upper"}
        Which limit of §3.3.3(2) to use [-].
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Thermal conductivity λc [W/(m·K)].

    Notes
    -----
    Dispatches to :func:`concrete_conductivity_lower` or :func:`concrete_conductivity_upper`;
    valid for 20 °C ≤ θ ≤ 1200 °C.

    Examples
    --------
    >>> round(concrete_conductivity(1473.15, "upper"), 2)
    0.6

    References
    ----------
    1. EN 1992-1-2:2004, §3.3.3(2), eqs. (3.7) and (3.8).
    """
    if limit == "lower":
        return concrete_conductivity_lower(temperature, extend=extend)
    if limit == "upper":
        return concrete_conductivity_upper(temperature, extend=extend)
    raise PhysicsRangeError("limit", limit, "'lower' or 'upper'")


def concrete_specific_heat_dry(temperature, *, extend: bool = False):
    r"""Return the specific heat of dry normal-weight concrete (moisture u = 0 %) [J/(kg·K)].

    .. math::

        c_p(\theta) = \begin{cases}
        900 & 20 \le \theta \le 100\\
        900 + (\theta - 100) & 100 < \theta \le 200\\
        1000 + (\theta - 200)/2 & 200 < \theta \le 400\\
        1100 & 400 < \theta \le 1200
        \end{cases} \quad (\theta \text{ in } ^\circ\mathrm{C})

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature [K].
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Specific heat cp [J/(kg·K)].

    Notes
    -----
    The law of §3.3.2(1) for siliceous and calcareous aggregate, for methods that model moisture
    explicitly. Where moisture is not modelled explicitly use :func:`concrete_specific_heat`,
    which adds the peak of §3.3.2(2).

    Examples
    --------
    >>> concrete_specific_heat_dry(573.15)
    1050.0

    References
    ----------
    1. EN 1992-1-2:2004, §3.3.2(1) and Figure 3.6.
    """
    theta, scalar = _celsius(temperature, extend)
    cp = np.where(theta <= 100.0, 900.0,
                  np.where(theta <= 200.0, 900.0 + (theta - 100.0),
                           np.where(theta <= 400.0, 1000.0 + (theta - 200.0) / 2.0, 1100.0)))
    return _out(cp, scalar)


def concrete_specific_heat_peak(moisture_content: float) -> float:
    r"""Return the peak specific heat c_p,peak of concrete for a moisture content [J/(kg·K)].

    .. math::

        c_{p,\mathrm{peak}} = \begin{cases}
        900 + (1470 - 900)\,u/0.015 & 0 \le u \le 0.015\\
        1470 + (2020 - 1470)\,(u - 0.015)/0.015 & 0.015 < u \le 0.03
        \end{cases}

    Parameters
    ----------
    moisture_content : float
        Moisture content u by weight of concrete, as a fraction (1.5 % = 0.015) [1].

    Returns
    -------
    float
        c_p,peak [J/(kg·K)].

    Notes
    -----
    §3.3.2(2) gives 900, 1470 and 2020 J/(kg·K) at u = 0, 1.5 and 3 % and allows linear
    interpolation between them. Above 3 % the clause gives no value, and explosive spalling must be
    assessed (EN 1992-1-2 §4.5.1(2): spalling is unlikely below k % moisture by weight; k is
    nationally determined, recommended 3): a moisture content outside 0 to 3 % raises
    :class:`~calcdoc.physics.PhysicsRangeError`.

    Examples
    --------
    >>> concrete_specific_heat_peak(0.015)
    1470.0

    References
    ----------
    1. EN 1992-1-2:2004, §3.3.2(2) and Figure 3.6.
    2. EN 1992-1-2:2004, §4.5.1(2) (moisture limit k for explosive spalling).
    """
    u = float(moisture_content)
    if not np.isfinite(u) or u < 0.0 or u > _MOISTURE_LIMIT + 1e-12:
        raise PhysicsRangeError(
            "moisture_content", u,
            "u from 0 to 0.03, i.e. 0 to 3 % by weight (EN 1992-1-2 §3.3.2(2)); above 3 % "
            "explosive spalling must be assessed (EN 1992-1-2 §4.5.1(2))")
    if u <= 0.015:
        return 900.0 + (1470.0 - 900.0) * u / 0.015
    return 1470.0 + (2020.0 - 1470.0) * (min(u, _MOISTURE_LIMIT) - 0.015) / 0.015


def concrete_specific_heat(temperature, moisture_content: float = 0.015, *,
                           extend: bool = False):
    r"""Return the specific heat of normal-weight concrete with its moisture peak [J/(kg·K)].

    .. math::

        c_p(\theta) = \begin{cases}
        900 & 20 \le \theta \le 100\\
        c_{p,\mathrm{peak}} & 100 < \theta \le 115\\
        c_{p,\mathrm{peak}} + (1000 - c_{p,\mathrm{peak}})\,(\theta - 115)/85 & 115 < \theta \le 200\\
        1000 + (\theta - 200)/2 & 200 < \theta \le 400\\
        1100 & 400 < \theta \le 1200
        \end{cases} \quad (\theta \text{ in } ^\circ\mathrm{C})

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature [K].
    moisture_content : float
        Moisture content u by weight, a fraction from 0 to 0.03 [1]; default 0.015 (1.5 %).
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Specific heat cp [J/(kg·K)].

    Notes
    -----
    §3.3.2(2): where moisture is not modelled explicitly, the dry law of §3.3.2(1) is given a
    constant value c_p,peak between 100 °C and 115 °C with a linear decrease between 115 °C and
    200 °C (to the dry value 1000 J/(kg·K) at 200 °C); c_p,peak from
    :func:`concrete_specific_heat_peak`. Written as the clause states it, the u = 0 curve differs
    from the dry law by up to 15 J/(kg·K) near 115 °C. Valid for 20 °C ≤ θ ≤ 1200 °C and
    0 ≤ u ≤ 3 %; above 3 % see §4.5.1(2) (spalling).

    Examples
    --------
    >>> concrete_specific_heat(383.15, 0.03)
    2020.0

    References
    ----------
    1. EN 1992-1-2:2004, §3.3.2(1)–(2) and Figure 3.6.
    2. EN 1992-1-2:2004, §4.5.1(2).
    """
    peak = concrete_specific_heat_peak(moisture_content)
    theta, scalar = _celsius(temperature, extend)
    cp = np.where(theta <= 100.0, 900.0,
                  np.where(theta <= 115.0, peak,
                           np.where(theta <= 200.0, peak + (1000.0 - peak) * (theta - 115.0) / 85.0,
                                    np.where(theta <= 400.0, 1000.0 + (theta - 200.0) / 2.0,
                                             1100.0))))
    return _out(cp, scalar)


def concrete_density(temperature, density_20: float = 2300.0, *, extend: bool = False):
    r"""Return the density of normal-weight concrete at a temperature, after water loss [kg/m³].

    .. math::

        \rho(\theta) = \rho(20\,^\circ\mathrm{C}) \times \begin{cases}
        1 & 20 \le \theta \le 115\\
        1 - 0.02\,(\theta - 115)/85 & 115 < \theta \le 200\\
        0.98 - 0.03\,(\theta - 200)/200 & 200 < \theta \le 400\\
        0.95 - 0.07\,(\theta - 400)/800 & 400 < \theta \le 1200
        \end{cases}

    Parameters
    ----------
    temperature : float or ndarray
        Concrete temperature [K].
    density_20 : float
        Density at 20 °C, ρ(20 °C) [kg/m³]; 2000 to 2600 (normal-weight concrete).
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Density ρ(θ) [kg/m³].

    Notes
    -----
    §3.3.2(3), siliceous and calcareous aggregate. The §3.3 laws are for normal-weight concrete;
    ρ(20 °C) outside 2000 to 2600 kg/m³ (the normal-weight range of EN 206, from memory) raises
    :class:`~calcdoc.physics.PhysicsRangeError`. The volumetric specific heat is
    c_v(θ) = ρ(θ) c_p(θ) (§3.3.2(4)).

    Examples
    --------
    >>> concrete_density(473.15)
    2254.0

    References
    ----------
    1. EN 1992-1-2:2004, §3.3.2(3) and (4).
    """
    rho20 = float(density_20)
    low, high = _NORMAL_WEIGHT_DENSITY
    if not np.isfinite(rho20) or rho20 < low or rho20 > high:
        raise PhysicsRangeError("density_20", rho20,
                                "2000 to 2600 kg/m³ (normal-weight concrete, EN 1992-1-2 §3.3)")
    theta, scalar = _celsius(temperature, extend)
    factor = np.where(theta <= 115.0, 1.0,
                      np.where(theta <= 200.0, 1.0 - 0.02 * (theta - 115.0) / 85.0,
                               np.where(theta <= 400.0, 0.98 - 0.03 * (theta - 200.0) / 200.0,
                                        0.95 - 0.07 * (theta - 400.0) / 800.0)))
    return _out(rho20 * factor, scalar)


# --------------------------------------------------------------------------------- carbon steel


def steel_conductivity(temperature, *, extend: bool = False):
    r"""Return the thermal conductivity of carbon steel [W/(m·K)].

    .. math::

        \lambda_a = \begin{cases}
        54 - 3.33\times10^{-2}\,\theta_a & 20 \le \theta_a < 800\\
        27.3 & 800 \le \theta_a \le 1200
        \end{cases} \quad (\theta_a \text{ in } ^\circ\mathrm{C})

    Parameters
    ----------
    temperature : float or ndarray
        Steel temperature [K].
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Thermal conductivity λa [W/(m·K)].

    Notes
    -----
    Valid for 20 °C ≤ θa ≤ 1200 °C (EN 1993-1-2 §3.4.1.3(1)). The simplified constant 45 W/(m·K) of §3.4.1.3(2) is not used.

    Examples
    --------
    >>> round(steel_conductivity(293.15), 1)
    53.3

    References
    ----------
    1. EN 1993-1-2:2005, Eurocode 3: Design of steel structures, Part 1-2: General rules,
       Structural fire design, §3.4.1.3(1), eq. (3.3).
    """
    theta, scalar = _celsius(temperature, extend)
    return _out(np.where(theta < 800.0, 54.0 - 3.33e-2 * theta, 27.3), scalar)


def steel_specific_heat(temperature, *, extend: bool = False):
    r"""Return the specific heat of carbon steel [J/(kg·K)].

    .. math::

        c_a = \begin{cases}
        425 + 7.73\times10^{-1}\theta_a - 1.69\times10^{-3}\theta_a^2
            + 2.22\times10^{-6}\theta_a^3 & 20 \le \theta_a < 600\\
        666 + 13002/(738 - \theta_a) & 600 \le \theta_a < 735\\
        545 + 17820/(\theta_a - 731) & 735 \le \theta_a < 900\\
        650 & 900 \le \theta_a \le 1200
        \end{cases} \quad (\theta_a \text{ in } ^\circ\mathrm{C})

    Parameters
    ----------
    temperature : float or ndarray
        Steel temperature [K].
    extend : bool
        Hold the end values outside 20 °C to 1200 °C instead of raising.

    Returns
    -------
    float or ndarray
        Specific heat ca [J/(kg·K)].

    Notes
    -----
    Valid for 20 °C ≤ θa ≤ 1200 °C (EN 1993-1-2 §3.4.1.2(1)); the peak of
    5000 J/(kg·K) at 735 °C represents the metallurgical phase change. The simplified constant
    600 J/(kg·K) of §3.4.1.2(2) is not used.

    Examples
    --------
    >>> round(steel_specific_heat(1008.15))
    5000

    References
    ----------
    1. EN 1993-1-2:2005, §3.4.1.2(1), eq. (3.2).
    """
    theta, scalar = _celsius(temperature, extend)
    # The unused branches are evaluated too; keep their denominators away from zero.
    below_peak = 666.0 + 13002.0 / np.maximum(738.0 - theta, 3.0)
    above_peak = 545.0 + 17820.0 / np.maximum(theta - 731.0, 4.0)
    cubic = 425.0 + 7.73e-1 * theta - 1.69e-3 * theta ** 2 + 2.22e-6 * theta ** 3
    ca = np.where(theta < 600.0, cubic,
                  np.where(theta < 735.0, below_peak,
                           np.where(theta < 900.0, above_peak, 650.0)))
    return _out(ca, scalar)


def steel_density(temperature, *, extend: bool = False):
    r"""Return the unit mass of carbon steel, independent of temperature [kg/m³].

    .. math::

        \rho_a = 7850\ \mathrm{kg/m^3}

    Parameters
    ----------
    temperature : float or ndarray
        Steel temperature [K] (checked against the 20 °C to 1200 °C range, otherwise unused).
    extend : bool
        Accept temperatures outside the range instead of raising.

    Returns
    -------
    float or ndarray
        Unit mass ρa [kg/m³].

    Notes
    -----
    EN 1993-1-2 §3.2.2(1): the unit mass may be considered independent of the steel temperature.

    Examples
    --------
    >>> steel_density(873.15)
    7850.0

    References
    ----------
    1. EN 1993-1-2:2005, §3.2.2(1).
    """
    theta, scalar = _celsius(temperature, extend)
    return _out(np.full_like(theta, 7850.0), scalar)


# ----------------------------------------------------------------------------------- law records


@dataclass(frozen=True)
class ThermalLaw:
    """A material's conductivity, density and specific heat as functions of temperature in K.

    ``conductivity``, ``density`` and ``specific_heat`` take a float or array of temperatures [K]
    and return W/(m·K), kg/m³ and J/(kg·K); outside ``temperature_range`` they hold the end value
    (the solver reports the temperatures reached so that the extension can be flagged).
    ``breakpoints`` [K] are the temperatures where a property has a kink or a jump, so that a
    tabulation can place nodes on them.
    """

    name: str
    conductivity: Callable
    density: Callable
    specific_heat: Callable
    source: str
    temperature_range: tuple[float, float] = (0.0, float("inf"))
    breakpoints: tuple[float, ...] = ()
    options: dict = field(default_factory=dict)

    @property
    def constant(self) -> bool:
        """True when no property depends on temperature."""
        return self.name == "constant"


def concrete_law(conductivity_limit: str = "lower", moisture_content: float = 0.015,
                 density_20: float = 2300.0) -> ThermalLaw:
    """Return the EN 1992-1-2 §3.3 law for siliceous or calcareous aggregate concrete.

    Parameters: ``conductivity_limit`` "lower" (default) or "upper" [-]; ``moisture_content``
    u by weight, 0 to 0.03 [1] (default 0.015); ``density_20`` ρ(20 °C), 2000 to 2600 [kg/m³]
    (default 2300). Returns a :class:`ThermalLaw` whose functions hold the 20 °C and 1200 °C
    values outside that range. Raises :class:`~calcdoc.physics.PhysicsRangeError` for a moisture
    content above 3 % (§3.3.2(2) gives no peak and §4.5.1(2) requires a spalling assessment), an
    unknown limit or a density outside the normal-weight range.

    Reference: EN 1992-1-2:2004 §3.3.2 (specific heat, density), §3.3.3 (conductivity).
    """
    if conductivity_limit not in ("lower", "upper"):
        raise PhysicsRangeError("conductivity_limit", conductivity_limit, "'lower' or 'upper'")
    concrete_specific_heat_peak(moisture_content)
    concrete_density(293.15, density_20)
    u = float(moisture_content)
    rho20 = float(density_20)
    conductivity = (concrete_conductivity_lower if conductivity_limit == "lower"
                    else concrete_conductivity_upper)
    return ThermalLaw(
        name="en1992_concrete",
        conductivity=lambda T: conductivity(T, extend=True),
        density=lambda T: concrete_density(T, rho20, extend=True),
        specific_heat=lambda T: concrete_specific_heat(T, u, extend=True),
        # The source cites the clauses only; the options are data (``options``), which the
        # caller prints with its own values.
        source="EN 1992-1-2:2004, §3.3.2 and §3.3.3",
        temperature_range=LAW_TEMPERATURE_RANGE,
        breakpoints=tuple(ZERO_CELSIUS + t for t in (20.0, 100.0, 115.0, 200.0, 400.0, 1200.0)),
        options={"conductivity_limit": conductivity_limit, "moisture_content": u,
                 "density_20": rho20},
    )


def carbon_steel_law() -> ThermalLaw:
    """Return the EN 1993-1-2 law for carbon steel (λa §3.4.1.3, ca §3.4.1.2, ρa §3.2.2).

    Returns a :class:`ThermalLaw` whose functions hold the 20 °C and 1200 °C values outside that
    range. Reference: EN 1993-1-2:2005 §3.2.2(1), §3.4.1.2(1) eq. (3.2), §3.4.1.3(1) eq. (3.3).
    """
    return ThermalLaw(
        name="en1993_carbon_steel",
        conductivity=lambda T: steel_conductivity(T, extend=True),
        density=lambda T: steel_density(T, extend=True),
        specific_heat=lambda T: steel_specific_heat(T, extend=True),
        source="EN 1993-1-2:2005, §3.2.2, §3.4.1.2 and §3.4.1.3",
        temperature_range=LAW_TEMPERATURE_RANGE,
        breakpoints=tuple(ZERO_CELSIUS + t for t in (20.0, 600.0, 735.0, 800.0, 900.0, 1200.0)),
    )


def constant_law(conductivity: float, density: float, specific_heat: float,
                 source: str = "") -> ThermalLaw:
    """Return a law with constant conductivity [W/(m·K)], density [kg/m³], specific heat [J/(kg·K)].

    Each value must be positive (raises :class:`~calcdoc.physics.PhysicsRangeError` otherwise).
    """
    values = {"conductivity": conductivity, "density": density, "specific_heat": specific_heat}
    for quantity, value in values.items():
        if not np.isfinite(value) or value <= 0.0:
            raise PhysicsRangeError(quantity, value, "a positive finite value")
    k, rho, c = float(conductivity), float(density), float(specific_heat)
    return ThermalLaw(
        name="constant",
        conductivity=lambda T: np.full_like(np.asarray(T, dtype=float), k),
        density=lambda T: np.full_like(np.asarray(T, dtype=float), rho),
        specific_heat=lambda T: np.full_like(np.asarray(T, dtype=float), c),
        source=source,
        options={"conductivity": k, "density": rho, "specific_heat": c},
    )


LAWS: dict[str, Callable[..., ThermalLaw]] = {
    "en1992_concrete": concrete_law,
    "en1993_carbon_steel": carbon_steel_law,
}
"""Law name (as written in materials/fire.yaml) → factory returning a :class:`ThermalLaw`."""


def make_law(name: str, **options) -> ThermalLaw:
    """Return the law registered as ``name`` with its options (see :data:`LAWS`)."""
    try:
        factory = LAWS[name]
    except KeyError:
        raise PhysicsRangeError("name", name, "one of " + ", ".join(sorted(LAWS))) from None
    return factory(**options)
