"""Lumped temperature of steel members in fire: EN 1993-1-2:2005 §4.2.5 with §3.4.1.2 and §4.2.4.

Scheme (docs/format.md, steel_member_heating): explicit steps of eq. (4.25) (unprotected) or eq. (4.27)
(protected) on times t_0 = 0, t_i = i Δt (the last step shortened to end at the duration). Every
quantity of a step — the gas temperature θg, the steel specific heat c_a, the net heat flux — is
taken at the start of the step, t_i; in eq. (4.27) Δθg = θg(t_i + Δt) − θg(t_i). Times between
steps are found by linear interpolation.

All temperatures are absolute, in kelvin. The standard writes θ + 273 for the absolute temperature
in eq. (3.3) of EN 1991-1-2 and σ = 5.67·10⁻⁸; here θ + 273.15 (the kelvin value itself) and the
CODATA σ of scipy.constants are used: both differ from the rounded figures by under 0.1 % of the
radiative flux.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
from scipy.constants import Stefan_Boltzmann

from calcdoc.physics import MAX_TIME_STEPS, PhysicsRangeError

__all__ = [
    "SteelHeating",
    "specific_heat_carbon_steel",
    "net_heat_flux",
    "critical_temperature_from_utilisation",
    "protection_capacity_ratio",
    "unprotected_temperature_increment",
    "protected_temperature_increment",
    "unprotected_steel_heating",
    "protected_steel_heating",
    "time_to_temperature",
    "temperature_at_time",
    "STEEL_DENSITY",
    "MEMBER_EMISSIVITY",
    "FIRE_EMISSIVITY",
    "CONFIGURATION_FACTOR",
    "UNPROTECTED_MAX_TIME_STEP",
    "PROTECTED_MAX_TIME_STEP",
    "MINIMUM_SECTION_FACTOR",
    "MINIMUM_UTILISATION",
    "STEEL_TEMPERATURE_RANGE",
]

_KELVIN_OFFSET = 273.15

#: ρa = 7850 kg/m³, unit mass of steel independent of temperature (EN 1993-1-2:2005 §3.2.2).
STEEL_DENSITY = 7850.0
#: εm = 0.7 for carbon steel surfaces (EN 1993-1-2:2005 §2.2(2)).
MEMBER_EMISSIVITY = 0.7
#: εf = 1.0, emissivity of the fire (EN 1991-1-2:2002 §3.1(6)).
FIRE_EMISSIVITY = 1.0
#: Φ = 1.0, configuration factor where no value is computed (EN 1991-1-2:2002 §3.1(7)).
CONFIGURATION_FACTOR = 1.0
#: Δt <= 5 s for eq. (4.25), unprotected members (EN 1993-1-2:2005 §4.2.5.1).
UNPROTECTED_MAX_TIME_STEP = 5.0
#: Δt <= 30 s for eq. (4.27), protected members (EN 1993-1-2:2005 §4.2.5.2).
PROTECTED_MAX_TIME_STEP = 30.0
#: Am/V not less than 10 m⁻¹ in eq. (4.25) (EN 1993-1-2:2005 §4.2.5.1); calcdoc applies the same
#: lower limit to Ap/V of protected members (docs/format.md, steel_member_heating).
MINIMUM_SECTION_FACTOR = 10.0
#: μ0 >= 0.013 for eq. (4.22) (EN 1993-1-2:2005 §4.2.4).
MINIMUM_UTILISATION = 0.013
#: 20 °C <= θa <= 1200 °C [K], the range of c_a in EN 1993-1-2:2005 §3.4.1.2, eqs. (3.2a–d).
STEEL_TEMPERATURE_RANGE = (20.0 + _KELVIN_OFFSET, 1200.0 + _KELVIN_OFFSET)

_RANGE_TOLERANCE = 1e-9


# --- material and flux -------------------------------------------------------------------------

def _specific_heat_celsius(theta: float) -> float:
    # EN 1993-1-2:2005 eqs. (3.2a)–(3.2d), θ in °C; the caller has checked 20 <= θ <= 1200.
    if theta < 600.0:
        return 425.0 + 7.73e-1 * theta - 1.69e-3 * theta ** 2 + 2.22e-6 * theta ** 3
    if theta < 735.0:
        return 666.0 + 13002.0 / (738.0 - theta)
    if theta < 900.0:
        return 545.0 + 17820.0 / (theta - 731.0)
    return 650.0


def _check_steel_range(temperature: np.ndarray, name: str = "temperature") -> None:
    low, high = STEEL_TEMPERATURE_RANGE
    bad = (temperature < low - _RANGE_TOLERANCE) | (temperature > high + _RANGE_TOLERANCE) | \
        ~np.isfinite(temperature)
    if np.any(bad):
        raise PhysicsRangeError(name, float(temperature[bad].flat[0]),
                                "293.15 K <= θa <= 1473.15 K, i.e. 20 °C to 1200 °C "
                                "(EN 1993-1-2:2005 §3.4.1.2)")


def specific_heat_carbon_steel(temperature):
    r"""Return the specific heat c_a [J/(kg·K)] of carbon steel at a temperature.

    .. math::
        c_a = \begin{cases}
        425 + 7.73\cdot10^{-1}\theta_a - 1.69\cdot10^{-3}\theta_a^2 + 2.22\cdot10^{-6}\theta_a^3
            & 20 \le \theta_a < 600 \\
        666 + \dfrac{13002}{738 - \theta_a} & 600 \le \theta_a < 735 \\
        545 + \dfrac{17820}{\theta_a - 731} & 735 \le \theta_a < 900 \\
        650 & 900 \le \theta_a \le 1200
        \end{cases}

    with θa in °C.

    Parameters
    ----------
    temperature : float or array
        Steel temperature [K], 293.15 K to 1473.15 K (20 °C to 1200 °C).

    Returns
    -------
    float or array
        Specific heat c_a [J/(kg·K)].

    Notes
    -----
    Valid 20 °C <= θa <= 1200 °C; outside that range :class:`~calcdoc.physics.PhysicsRangeError`
    is raised. The peak of 5000 J/(kg·K) at 735 °C is the metallurgical phase change.

    Examples
    --------
    >>> round(specific_heat_carbon_steel(735.0 + 273.15))
    5000

    References
    ----------
    1. EN 1993-1-2:2005, Eurocode 3 — Design of steel structures — Part 1-2, §3.4.1.2,
       eqs. (3.2a)–(3.2d) and Figure 3.4.
    """
    values = np.asarray(temperature, dtype=float)
    _check_steel_range(values)
    celsius = values - _KELVIN_OFFSET
    result = np.vectorize(_specific_heat_celsius, otypes=[float])(celsius)
    return float(result) if result.ndim == 0 else result


def _check_fraction(name: str, value: float, expected: str = "0 < value <= 1") -> float:
    value = float(value)
    if not (math.isfinite(value) and 0.0 < value <= 1.0):
        raise PhysicsRangeError(name, value, expected)
    return value


def _check_positive(name: str, value: float, symbol: str, unit: str) -> float:
    value = float(value)
    if not (math.isfinite(value) and value > 0.0):
        raise PhysicsRangeError(name, value, f"{symbol} > 0 {unit}, finite")
    return value


def _check_absolute(name: str, value, symbol: str) -> np.ndarray:
    values = np.asarray(value, dtype=float)
    if not np.all(np.isfinite(values)) or np.any(values <= 0.0):
        bad = values[~np.isfinite(values) | (values <= 0.0)]
        raise PhysicsRangeError(name, float(bad.flat[0]),
                                f"{symbol}: an absolute temperature > 0 K")
    return values


def net_heat_flux(gas_temperature, member_temperature, convection_coefficient: float,
                  emissivity_member: float = MEMBER_EMISSIVITY,
                  emissivity_fire: float = FIRE_EMISSIVITY,
                  configuration_factor: float = CONFIGURATION_FACTOR):
    r"""Return the net heat flux h_net [W/m²] into a member surface from the fire.

    .. math::
        \dot h_{net} = \alpha_c (\theta_g - \theta_m)
        + \Phi\,\varepsilon_m \varepsilon_f\,\sigma\,[(\theta_r + 273)^4 - (\theta_m + 273)^4],
        \quad \theta_r = \theta_g

    Parameters
    ----------
    gas_temperature : float or array
        Gas temperature θg [K], > 0 (also the radiation temperature θr of a fully engulfed member).
    member_temperature : float or array
        Surface temperature of the member θm [K], > 0.
    convection_coefficient : float
        αc [W/(m²·K)], >= 0.
    emissivity_member : float
        εm [-], 0 < εm <= 1 (0.7 for carbon steel, EN 1993-1-2:2005 §2.2(2)).
    emissivity_fire : float
        εf [-], 0 < εf <= 1 (1.0, EN 1991-1-2:2002 §3.1(6)).
    configuration_factor : float
        Φ [-], 0 < Φ <= 1 (1.0, EN 1991-1-2:2002 §3.1(7)).

    Returns
    -------
    float or array
        h_net = h_net,c + h_net,r [W/m²], positive into the member.

    Notes
    -----
    Temperatures are absolute (the standard's θ + 273 is the kelvin value, taken here exactly as
    θ + 273.15); σ is the CODATA value of scipy.constants (the standard rounds it to 5.67·10⁻⁸).

    Examples
    --------
    >>> round(net_heat_flux(1000.0, 500.0, 25.0))   # 12 500 convective + 37 212 radiative
    49712

    References
    ----------
    1. EN 1991-1-2:2002, §3.1, eqs. (3.1), (3.2), (3.3).
    """
    tg = _check_absolute("gas_temperature", gas_temperature, "θg")
    tm = _check_absolute("member_temperature", member_temperature, "θm")
    alpha = float(convection_coefficient)
    if not (math.isfinite(alpha) and alpha >= 0.0):
        raise PhysicsRangeError("convection_coefficient", alpha, "αc >= 0 W/(m²·K)")
    em = _check_fraction("emissivity_member", emissivity_member, "0 < εm <= 1")
    ef = _check_fraction("emissivity_fire", emissivity_fire, "0 < εf <= 1")
    phi = _check_fraction("configuration_factor", configuration_factor, "0 < Φ <= 1")
    flux = alpha * (tg - tm) + phi * em * ef * Stefan_Boltzmann * (tg ** 4 - tm ** 4)
    return float(flux) if np.ndim(flux) == 0 else flux


def critical_temperature_from_utilisation(utilisation: float) -> float:
    r"""Return the critical steel temperature θa,cr [K] for a degree of utilisation μ0.

    .. math::
        \theta_{a,cr} = 39.19 \ln\left[\frac{1}{0.9674\,\mu_0^{3.833}} - 1\right] + 482

    with θa,cr in °C.

    Parameters
    ----------
    utilisation : float
        Degree of utilisation μ0 = E_fi,d / R_fi,d,0 [-], 0.013 <= μ0 <= 1.

    Returns
    -------
    float
        Critical temperature θa,cr [K].

    Notes
    -----
    EN 1993-1-2:2005 §4.2.4 allows eq. (4.22) only where deformation criteria and stability do
    not govern: not for members governed by buckling (columns, beams prone to lateral-torsional
    buckling), which need a critical temperature of their own. μ0 >= 0.013 is the clause's limit;
    μ0 > 1 would be a member that fails cold and is refused. Table 4.1 of the standard tabulates
    this equation.

    Examples
    --------
    >>> round(critical_temperature_from_utilisation(0.5) - 273.15)
    585

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.4, eq. (4.22) and Table 4.1.
    """
    mu0 = float(utilisation)
    if not (math.isfinite(mu0) and MINIMUM_UTILISATION <= mu0 <= 1.0):
        raise PhysicsRangeError("utilisation", mu0,
                                "0.013 <= μ0 <= 1 (EN 1993-1-2:2005 §4.2.4, eq. (4.22))")
    return 39.19 * math.log(1.0 / (0.9674 * mu0 ** 3.833) - 1.0) + 482.0 + _KELVIN_OFFSET


# --- one step ----------------------------------------------------------------------------------

def _check_section_factor(section_factor: float, symbol: str) -> float:
    value = float(section_factor)
    if not (math.isfinite(value) and value >= MINIMUM_SECTION_FACTOR):
        raise PhysicsRangeError("section_factor", value,
                                f"{symbol} >= 10 1/m (EN 1993-1-2:2005 §4.2.5.1)")
    return value


def _check_time_step(time_step: float, limit: float, clause: str) -> float:
    value = float(time_step)
    if not (math.isfinite(value) and 0.0 < value <= limit):
        raise PhysicsRangeError("time_step", value,
                                f"0 s < Δt <= {limit:g} s (EN 1993-1-2:2005 {clause})")
    return value


def protection_capacity_ratio(section_factor: float, protection_thickness: float,
                              protection_density: float, protection_specific_heat: float,
                              steel_specific_heat: float, density: float = STEEL_DENSITY) -> float:
    r"""Return φ [-], the heat capacity of the fire protection relative to the steel.

    .. math:: \phi = \frac{c_p \rho_p}{c_a \rho_a}\, d_p\, \frac{A_p}{V}

    Parameters
    ----------
    section_factor : float
        Ap/V [1/m], > 0.
    protection_thickness : float
        d_p [m], > 0.
    protection_density : float
        ρp [kg/m³], > 0.
    protection_specific_heat : float
        c_p [J/(kg·K)], > 0.
    steel_specific_heat : float
        c_a [J/(kg·K)], > 0.
    density : float
        ρa [kg/m³] (7850, EN 1993-1-2:2005 §3.2.2).

    Returns
    -------
    float
        φ [-].

    Notes
    -----
    Used in eq. (4.27). Every argument must be finite and > 0.

    Examples
    --------
    >>> round(protection_capacity_ratio(150.0, 0.02, 300.0, 1200.0, 600.0), 4)
    0.2293

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.2, eq. (4.28).
    """
    return (_check_positive("protection_specific_heat", protection_specific_heat, "c_p",
                            "J/(kg·K)")
            * _check_positive("protection_density", protection_density, "ρp", "kg/m³")
            / (_check_positive("steel_specific_heat", steel_specific_heat, "c_a", "J/(kg·K)")
               * _check_positive("density", density, "ρa", "kg/m³"))
            * _check_positive("protection_thickness", protection_thickness, "d_p", "m")
            * _check_positive("section_factor", section_factor, "Ap/V", "1/m"))


def _unprotected_step(theta_g: float, theta_a: float, factor: float, alpha: float,
                      radiation: float, density: float, dt: float) -> float:
    # factor = k_sh Am/V; radiation = Φ εm εf σ
    c_a = _specific_heat_celsius(theta_a - _KELVIN_OFFSET)
    h_net = alpha * (theta_g - theta_a) + radiation * (theta_g ** 4 - theta_a ** 4)
    return factor / (c_a * density) * h_net * dt


def _protected_step(theta_g: float, theta_g_next: float, theta_a: float, section_factor: float,
                    d_p: float, lambda_p: float, rho_p: float, c_p: float, density: float,
                    dt: float, no_fall_while_heating: bool = True) -> tuple[float, bool]:
    c_a = _specific_heat_celsius(theta_a - _KELVIN_OFFSET)
    phi = c_p * rho_p / (c_a * density) * d_p * section_factor
    delta_g = theta_g_next - theta_g
    delta_a = (lambda_p * section_factor * (theta_g - theta_a)
               / (d_p * c_a * density * (1.0 + phi / 3.0)) * dt
               - (math.exp(phi / 10.0) - 1.0) * delta_g)
    if no_fall_while_heating and delta_g > 0.0 and delta_a < 0.0:
        return 0.0, True     # Δθa,t >= 0 if Δθg,t > 0 (text of eq. (4.27))
    return delta_a, False


def unprotected_temperature_increment(gas_temperature: float, steel_temperature: float,
                                      section_factor: float, convection_coefficient: float,
                                      time_step: float, shadow_factor: float = 1.0,
                                      emissivity_member: float = MEMBER_EMISSIVITY,
                                      emissivity_fire: float = FIRE_EMISSIVITY,
                                      configuration_factor: float = CONFIGURATION_FACTOR,
                                      density: float = STEEL_DENSITY) -> float:
    r"""Return the rise Δθa,t [K] of an unprotected steel member in one time step.

    .. math::
        \Delta\theta_{a,t} = k_{sh}\,\frac{A_m/V}{c_a \rho_a}\,\dot h_{net}\,\Delta t

    with c_a at θa,t and h_net of EN 1991-1-2 eq. (3.1) at θg,t and θa,t (start of the step).

    Parameters
    ----------
    gas_temperature : float
        θg at the start of the step [K], > 0.
    steel_temperature : float
        θa at the start of the step [K], 293.15 K to 1473.15 K.
    section_factor : float
        Am/V [1/m], >= 10.
    convection_coefficient : float
        αc [W/(m²·K)], >= 0.
    time_step : float
        Δt [s], 0 < Δt <= 5.
    shadow_factor : float
        k_sh [-], 0 < k_sh <= 1 (eq. (4.26a/b); 1 is conservative).
    emissivity_member, emissivity_fire, configuration_factor : float
        εm, εf, Φ [-], each in (0, 1].
    density : float
        ρa [kg/m³] (7850).

    Returns
    -------
    float
        Δθa,t [K] (negative when the member cools).

    Notes
    -----
    Δt <= 5 s and Am/V >= 10 m⁻¹ are the clause's limits, enforced.

    Examples
    --------
    >>> round(unprotected_temperature_increment(600.0 + 273.15, 293.15, 200.0, 25.0, 5.0), 1)
    10.8

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1, eq. (4.25); §3.4.1.2, eq. (3.2).
    2. EN 1991-1-2:2002, §3.1, eqs. (3.1)–(3.3).
    """
    factor = _check_fraction("shadow_factor", shadow_factor, "0 < k_sh <= 1") * \
        _check_section_factor(section_factor, "Am/V")
    dt = _check_time_step(time_step, UNPROTECTED_MAX_TIME_STEP, "§4.2.5.1")
    theta_g = float(_check_absolute("gas_temperature", gas_temperature, "θg"))
    theta_a = float(steel_temperature)
    _check_steel_range(np.asarray(theta_a), "steel_temperature")
    alpha = float(convection_coefficient)
    if not (math.isfinite(alpha) and alpha >= 0.0):
        raise PhysicsRangeError("convection_coefficient", alpha, "αc >= 0 W/(m²·K)")
    radiation = (_check_fraction("configuration_factor", configuration_factor, "0 < Φ <= 1")
                 * _check_fraction("emissivity_member", emissivity_member, "0 < εm <= 1")
                 * _check_fraction("emissivity_fire", emissivity_fire, "0 < εf <= 1")
                 * Stefan_Boltzmann)
    rho = _check_positive("density", density, "ρa", "kg/m³")
    return _unprotected_step(theta_g, theta_a, factor, alpha, radiation, rho, dt)


def protected_temperature_increment(gas_temperature: float, gas_temperature_next: float,
                                    steel_temperature: float, section_factor: float,
                                    protection_thickness: float, protection_conductivity: float,
                                    protection_density: float, protection_specific_heat: float,
                                    time_step: float, density: float = STEEL_DENSITY,
                                    no_fall_while_heating: bool = True) -> float:
    r"""Return the rise Δθa,t [K] of a steel member with fire protection in one time step.

    .. math::
        \Delta\theta_{a,t} = \frac{\lambda_p A_p/V\,(\theta_{g,t} - \theta_{a,t})}
        {d_p c_a \rho_a (1 + \phi/3)}\,\Delta t - (e^{\phi/10} - 1)\,\Delta\theta_{g,t},
        \quad \Delta\theta_{a,t} \ge 0 \text{ if } \Delta\theta_{g,t} > 0

    with c_a and φ (eq. (4.28)) at θa,t, and Δθg,t = θg(t + Δt) − θg(t).

    Parameters
    ----------
    gas_temperature : float
        θg,t at the start of the step [K], > 0.
    gas_temperature_next : float
        θg at the end of the step [K], > 0.
    steel_temperature : float
        θa,t [K], 293.15 K to 1473.15 K.
    section_factor : float
        Ap/V [1/m], >= 10.
    protection_thickness : float
        d_p [m], > 0.
    protection_conductivity : float
        λp [W/(m·K)], > 0.
    protection_density : float
        ρp [kg/m³], > 0.
    protection_specific_heat : float
        c_p [J/(kg·K)], > 0.
    time_step : float
        Δt [s], 0 < Δt <= 30.
    density : float
        ρa [kg/m³] (7850).
    no_fall_while_heating : bool
        Apply the rule of eq. (4.27), Δθa,t >= 0 if Δθg,t > 0 (default); False returns the
        formula's own value, for a report that shows the formula and then the rule.

    Returns
    -------
    float
        Δθa,t [K], set to 0 where the formula gives a fall while the gas is still heating
        (unless ``no_fall_while_heating`` is False).

    Notes
    -----
    The fire side of the protection is taken at the gas temperature (eq. (4.27) has no film
    coefficient). Moisture in the protection (a delay at 100 °C, §4.2.5.2) is not modelled, which
    errs on the safe side for heating.

    Examples
    --------
    >>> round(protected_temperature_increment(800.0, 805.0, 400.0, 150.0, 0.02, 0.1, 300.0,
    ...                                       1200.0, 30.0), 2)
    1.96

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.2, eqs. (4.27), (4.28); §3.4.1.2, eq. (3.2).
    """
    ap_v = _check_section_factor(section_factor, "Ap/V")
    dt = _check_time_step(time_step, PROTECTED_MAX_TIME_STEP, "§4.2.5.2")
    theta_g = float(_check_absolute("gas_temperature", gas_temperature, "θg"))
    theta_g_next = float(_check_absolute("gas_temperature_next", gas_temperature_next,
                                         "θg(t+Δt)"))
    theta_a = float(steel_temperature)
    _check_steel_range(np.asarray(theta_a), "steel_temperature")
    d_p = _check_positive("protection_thickness", protection_thickness, "d_p", "m")
    lambda_p = _check_positive("protection_conductivity", protection_conductivity, "λp",
                               "W/(m·K)")
    rho_p = _check_positive("protection_density", protection_density, "ρp", "kg/m³")
    c_p = _check_positive("protection_specific_heat", protection_specific_heat, "c_p",
                          "J/(kg·K)")
    rho = _check_positive("density", density, "ρa", "kg/m³")
    return _protected_step(theta_g, theta_g_next, theta_a, ap_v, d_p, lambda_p, rho_p, c_p, rho,
                           dt, no_fall_while_heating)[0]


# --- time histories ----------------------------------------------------------------------------

@dataclass(frozen=True)
class SteelHeating:
    """Steel temperature history of :func:`unprotected_steel_heating` or
    :func:`protected_steel_heating`.

    Attributes
    ----------
    time : ndarray
        t_i [s], from 0 to the duration.
    temperature : ndarray
        Steel temperature θa(t_i) [K].
    gas_temperature : ndarray
        θg(t_i) [K].
    time_step : float
        Δt [s] (the last step may be shorter, to end at the duration).
    method : str
        "unprotected, EN 1993-1-2:2005 eq. (4.25)" or "protected, EN 1993-1-2:2005 eq. (4.27)".
    zero_rise_steps : int
        Steps in which the rule Δθa >= 0 while Δθg > 0 set the rise to 0 (protected only).
    """

    time: np.ndarray = field(repr=False)
    temperature: np.ndarray = field(repr=False)
    gas_temperature: np.ndarray = field(repr=False)
    time_step: float
    method: str
    zero_rise_steps: int = 0

    @property
    def theta_max(self) -> float:
        """Highest steel temperature over the history [K]."""
        return float(np.max(self.temperature))


def _time_grid(duration: float, time_step: float) -> np.ndarray:
    steps = max(1, math.ceil(duration / time_step - 1e-9))
    if steps > MAX_TIME_STEPS:
        raise PhysicsRangeError("time_step", time_step,
                                f"at most {MAX_TIME_STEPS} steps over the duration (this one "
                                f"takes {steps})")
    return np.minimum(np.arange(steps + 1, dtype=float) * time_step, duration)


def _gas_history(fire: Callable, times: np.ndarray) -> np.ndarray:
    gas = np.asarray(fire(times), dtype=float)
    if gas.shape != times.shape:
        raise PhysicsRangeError("fire", f"shape {gas.shape}",
                                f"one gas temperature per time, shape {times.shape}")
    return _check_absolute("fire", gas, "θg of the fire")


def _check_initial(initial_temperature: float) -> float:
    theta0 = float(initial_temperature)
    low, high = STEEL_TEMPERATURE_RANGE
    if not (math.isfinite(theta0) and low - _RANGE_TOLERANCE <= theta0 <= high):
        raise PhysicsRangeError(
            "initial_temperature", theta0,
            "293.15 K <= θa,0 <= 1473.15 K: c_a of EN 1993-1-2:2005 §3.4.1.2 starts at 20 °C "
            "(a member that starts colder may be taken at 20 °C, which reaches any temperature "
            "sooner)")
    return max(theta0, low)


def _out_of_range(theta: float, t: float, duration: float) -> PhysicsRangeError:
    # The duration is what the engineer can change: the steel leaves the range of c_a within it.
    return PhysicsRangeError(
        "duration", duration,
        f"a duration that ends before the steel leaves 293.15 K <= θa <= 1473.15 K, i.e. "
        f"20 °C to 1200 °C, the range of c_a (EN 1993-1-2:2005 §3.4.1.2): θa = {theta:.6g} K "
        f"at t = {t:g} s")


def unprotected_steel_heating(fire: Callable, duration: float, section_factor: float,
                              convection_coefficient: float, shadow_factor: float = 1.0,
                              emissivity_member: float = MEMBER_EMISSIVITY,
                              emissivity_fire: float = FIRE_EMISSIVITY,
                              configuration_factor: float = CONFIGURATION_FACTOR,
                              time_step: float = UNPROTECTED_MAX_TIME_STEP,
                              initial_temperature: float = 293.15,
                              density: float = STEEL_DENSITY) -> SteelHeating:
    r"""Return the temperature history of an unprotected steel member in a fire.

    .. math::
        \theta_{a,i+1} = \theta_{a,i} + k_{sh}\,\frac{A_m/V}{c_a(\theta_{a,i})\,\rho_a}\,
        \dot h_{net}(\theta_g(t_i), \theta_{a,i})\,\Delta t

    Parameters
    ----------
    fire : callable
        Gas temperature θg [K] as a function of a time array [s] (a
        :class:`~calcdoc.physics.firecurves.FireCurve`).
    duration : float
        End of the exposure [s], > 0.
    section_factor : float
        Am/V [1/m], >= 10 (§4.2.5.1).
    convection_coefficient : float
        αc [W/(m²·K)], >= 0 (the fire's own, EN 1991-1-2:2002 §3.2–3.3, unless set).
    shadow_factor : float
        k_sh [-], 0 < k_sh <= 1 (eq. (4.26a/b); 1 is conservative).
    emissivity_member : float
        εm [-] (0.7, EN 1993-1-2:2005 §2.2(2)).
    emissivity_fire : float
        εf [-] (1.0, EN 1991-1-2:2002 §3.1(6)).
    configuration_factor : float
        Φ [-] (1.0, EN 1991-1-2:2002 §3.1(7)).
    time_step : float
        Δt [s], 0 < Δt <= 5 (§4.2.5.1).
    initial_temperature : float
        θa at t = 0 [K], 293.15 K to 1473.15 K.
    density : float
        ρa [kg/m³] (7850, §3.2.2).

    Returns
    -------
    SteelHeating
        time [s], temperature [K], gas_temperature [K].

    Notes
    -----
    Explicit (forward) steps with θg, c_a and h_net at the start of each step; the last step is
    shortened to end at the duration. The steel must stay within 20–1200 °C, the range of c_a
    (§3.4.1.2); leaving it raises :class:`~calcdoc.physics.PhysicsRangeError` naming the time.

    Examples
    --------
    >>> from calcdoc.physics.firecurves import standard_fire
    >>> run = unprotected_steel_heating(standard_fire(), 1800.0, 200.0, 25.0)
    >>> float(run.time[1]), run.time.size
    (5.0, 361)

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.1, eqs. (4.25), (4.26); §3.4.1.2, eq. (3.2); §2.2(2).
    2. EN 1991-1-2:2002, §3.1, eqs. (3.1)–(3.3).
    """
    duration = _check_positive("duration", duration, "duration", "s")
    factor = _check_fraction("shadow_factor", shadow_factor, "0 < k_sh <= 1") * \
        _check_section_factor(section_factor, "Am/V")
    dt = _check_time_step(time_step, UNPROTECTED_MAX_TIME_STEP, "§4.2.5.1")
    alpha = float(convection_coefficient)
    if not (math.isfinite(alpha) and alpha >= 0.0):
        raise PhysicsRangeError("convection_coefficient", alpha, "αc >= 0 W/(m²·K)")
    radiation = (_check_fraction("configuration_factor", configuration_factor, "0 < Φ <= 1")
                 * _check_fraction("emissivity_member", emissivity_member, "0 < εm <= 1")
                 * _check_fraction("emissivity_fire", emissivity_fire, "0 < εf <= 1")
                 * Stefan_Boltzmann)
    rho = _check_positive("density", density, "ρa", "kg/m³")
    theta = _check_initial(initial_temperature)

    times = _time_grid(duration, dt)
    gas = _gas_history(fire, times)
    steel = np.empty_like(times)
    steel[0] = theta
    low, high = STEEL_TEMPERATURE_RANGE
    for i in range(times.size - 1):
        theta += _unprotected_step(float(gas[i]), theta, factor, alpha, radiation, rho,
                                   float(times[i + 1] - times[i]))
        if not (low - _RANGE_TOLERANCE <= theta <= high):
            raise _out_of_range(theta, float(times[i + 1]), duration)
        steel[i + 1] = theta
    return SteelHeating(time=times, temperature=steel, gas_temperature=gas, time_step=dt,
                        method="unprotected, EN 1993-1-2:2005 eq. (4.25)")


def protected_steel_heating(fire: Callable, duration: float, section_factor: float,
                            protection_thickness: float, protection_conductivity: float,
                            protection_density: float, protection_specific_heat: float,
                            time_step: float = PROTECTED_MAX_TIME_STEP,
                            initial_temperature: float = 293.15,
                            density: float = STEEL_DENSITY) -> SteelHeating:
    r"""Return the temperature history of a steel member with fire protection in a fire.

    .. math::
        \theta_{a,i+1} = \theta_{a,i} + \frac{\lambda_p A_p/V\,(\theta_g(t_i) - \theta_{a,i})}
        {d_p c_a \rho_a (1 + \phi/3)}\,\Delta t - (e^{\phi/10} - 1)\,
        [\theta_g(t_{i+1}) - \theta_g(t_i)],\quad
        \phi = \frac{c_p \rho_p}{c_a \rho_a} d_p \frac{A_p}{V}

    with the rise set to 0 where it would be negative while the gas heats (Δθg > 0).

    Parameters
    ----------
    fire : callable
        Gas temperature θg [K] as a function of a time array [s].
    duration : float
        End of the exposure [s], > 0.
    section_factor : float
        Ap/V [1/m], >= 10.
    protection_thickness : float
        d_p [m], > 0.
    protection_conductivity : float
        λp [W/(m·K)], > 0.
    protection_density : float
        ρp [kg/m³], > 0.
    protection_specific_heat : float
        c_p [J/(kg·K)], > 0.
    time_step : float
        Δt [s], 0 < Δt <= 30 (§4.2.5.2).
    initial_temperature : float
        θa at t = 0 [K], 293.15 K to 1473.15 K.
    density : float
        ρa [kg/m³] (7850, §3.2.2).

    Returns
    -------
    SteelHeating
        time [s], temperature [K], gas_temperature [K], zero_rise_steps.

    Notes
    -----
    Explicit steps with θg, c_a and φ at the start of each step and Δθg over the step. The
    protection is taken with constant properties; its moisture (a delay at 100 °C, §4.2.5.2) is
    not modelled, which errs on the safe side for heating. The steel must stay within 20–1200 °C.

    Examples
    --------
    >>> from calcdoc.physics.firecurves import standard_fire
    >>> run = protected_steel_heating(standard_fire(), 7200.0, 150.0, 0.02, 0.1, 300.0, 1200.0)
    >>> float(run.time[-1]), run.time.size, run.time_step
    (7200.0, 241, 30.0)

    References
    ----------
    1. EN 1993-1-2:2005, §4.2.5.2, eqs. (4.27), (4.28); §3.4.1.2, eq. (3.2).
    """
    duration = _check_positive("duration", duration, "duration", "s")
    ap_v = _check_section_factor(section_factor, "Ap/V")
    dt = _check_time_step(time_step, PROTECTED_MAX_TIME_STEP, "§4.2.5.2")
    d_p = _check_positive("protection_thickness", protection_thickness, "d_p", "m")
    lambda_p = _check_positive("protection_conductivity", protection_conductivity, "λp",
                               "W/(m·K)")
    rho_p = _check_positive("protection_density", protection_density, "ρp", "kg/m³")
    c_p = _check_positive("protection_specific_heat", protection_specific_heat, "c_p",
                          "J/(kg·K)")
    rho = _check_positive("density", density, "ρa", "kg/m³")
    theta = _check_initial(initial_temperature)

    times = _time_grid(duration, dt)
    gas = _gas_history(fire, times)
    steel = np.empty_like(times)
    steel[0] = theta
    zero_rise = 0
    low, high = STEEL_TEMPERATURE_RANGE
    for i in range(times.size - 1):
        delta, clamped = _protected_step(float(gas[i]), float(gas[i + 1]), theta, ap_v, d_p,
                                         lambda_p, rho_p, c_p, rho,
                                         float(times[i + 1] - times[i]))
        zero_rise += clamped
        theta += delta
        if not (low - _RANGE_TOLERANCE <= theta <= high):
            raise _out_of_range(theta, float(times[i + 1]), duration)
        steel[i + 1] = theta
    return SteelHeating(time=times, temperature=steel, gas_temperature=gas, time_step=dt,
                        method="protected, EN 1993-1-2:2005 eq. (4.27)", zero_rise_steps=zero_rise)


def time_to_temperature(time, temperature, target: float) -> float | None:
    r"""Return the first time [s] at which a temperature history reaches a target, or None.

    .. math::
        t = t_{i-1} + (t_i - t_{i-1})\,\frac{\theta_{target} - \theta_{i-1}}{\theta_i - \theta_{i-1}}

    for the first i with θ_i >= θ_target.

    Parameters
    ----------
    time : array
        Times [s], increasing.
    temperature : array
        Temperatures [K] at those times.
    target : float
        Temperature to reach [K].

    Returns
    -------
    float or None
        Time of the first crossing [s] by linear interpolation between steps; the first time if
        the history starts at or above the target; None when it is never reached.

    Notes
    -----
    Linear interpolation between steps, as docs/format.md (steel_member_heating) states.

    Examples
    --------
    >>> time_to_temperature([0.0, 10.0, 20.0], [300.0, 400.0, 500.0], 450.0)
    15.0

    References
    ----------
    1. Linear interpolation; no standard-specific method.
    """
    t = np.asarray(time, dtype=float)
    theta = np.asarray(temperature, dtype=float)
    if t.shape != theta.shape or t.ndim != 1 or t.size == 0:
        raise PhysicsRangeError("temperature", f"{theta.size} temperatures for {t.size} times",
                                "as many temperatures as times, at least one")
    reached = np.nonzero(theta >= target)[0]
    if reached.size == 0:
        return None
    i = int(reached[0])
    if i == 0:
        return float(t[0])
    fraction = (target - theta[i - 1]) / (theta[i] - theta[i - 1])
    return float(t[i - 1] + (t[i] - t[i - 1]) * fraction)


def temperature_at_time(time, temperature, at: float) -> float:
    r"""Return the temperature [K] of a history at a time, by linear interpolation between steps.

    .. math:: \theta(t) = \theta_i + (\theta_{i+1} - \theta_i)\,\frac{t - t_i}{t_{i+1} - t_i}

    Parameters
    ----------
    time : array
        Times [s], increasing.
    temperature : array
        Temperatures [K].
    at : float
        Time [s], within the history.

    Returns
    -------
    float
        θ(at) [K].

    Notes
    -----
    A time outside the history raises :class:`~calcdoc.physics.PhysicsRangeError`.

    Examples
    --------
    >>> temperature_at_time([0.0, 10.0], [300.0, 400.0], 2.5)
    325.0

    References
    ----------
    1. Linear interpolation; no standard-specific method.
    """
    t = np.asarray(time, dtype=float)
    theta = np.asarray(temperature, dtype=float)
    at = float(at)
    if not (t[0] <= at <= t[-1] * (1.0 + 1e-12)):
        raise PhysicsRangeError("at", at, f"{float(t[0])!r} s <= t <= {float(t[-1])!r} s, "
                                "within the simulated history")
    return float(np.interp(at, t, theta))
