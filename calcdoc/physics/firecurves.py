"""Gas temperature–time curves for fire exposure: EN 1991-1-2:2002 §3.2 and Annex A.

A fire is a :class:`FireCurve`: an object that is called with times [s] and returns gas
temperatures [K], and carries its convection coefficient [W/(m²·K)], the duration it was set up
for [s] and a source string citing the clause. Blocks that are heated by a fire receive this
object itself (evaluable at any time), never samples of it.

Curves:

- :func:`standard_fire` — EN 1991-1-2:2002 §3.2.1, eq. (3.4), the curve of ISO 834-1:1999;
- :func:`external_fire` — EN 1991-1-2:2002 §3.2.2, eq. (3.5);
- :func:`hydrocarbon_fire` — EN 1991-1-2:2002 §3.2.3, eq. (3.6);
- :func:`tabulated_fire` — the user's own points, linear interpolation, refused outside the table;
- :func:`parametric_fire` — EN 1991-1-2:2002 Annex A (informative), heating and cooling phases,
  ventilation- and fuel-controlled regimes.

All temperatures are absolute, in kelvin; the standard's equations are written in °C and minutes
(nominal curves) or hours (Annex A), and are converted here at the boundary of each function.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from calcdoc.physics import PhysicsRangeError

__all__ = [
    "FireCurve",
    "ParametricFireDetails",
    "standard_fire_temperature",
    "external_fire_temperature",
    "hydrocarbon_fire_temperature",
    "standard_fire",
    "external_fire",
    "hydrocarbon_fire",
    "tabulated_fire",
    "parametric_fire",
    "named_fire",
    "NAMED_FIRES",
    "FIRE_GROWTH_LIMITING_TIME",
    "AMBIENT_TEMPERATURE",
    "DEFAULT_DURATION",
]

#: 20 °C, the initial (ambient) gas temperature of every curve of EN 1991-1-2:2002 §3.2 and Annex A.
AMBIENT_TEMPERATURE = 293.15

#: 120 min, the default duration of a fire (docs/format.md, fire_curve).
DEFAULT_DURATION = 7200.0

_KELVIN_OFFSET = 273.15

#: Annex A's limiting time t_lim [s] by fire growth rate: 25 / 20 / 15 min for slow / medium / fast
#: (EN 1991-1-2:2002 Annex A, with eq. (A.7); growth rate per Annex E, Table E.5).
FIRE_GROWTH_LIMITING_TIME = {"slow": 25 * 60.0, "medium": 20 * 60.0, "fast": 15 * 60.0}

_STANDARD_SOURCE = ("EN 1991-1-2:2002 §3.2.1, eq. (3.4) (the standard temperature-time curve, "
                    "as ISO 834-1:1999); αc = 25 W/(m²·K), §3.2.1")
_EXTERNAL_SOURCE = "EN 1991-1-2:2002 §3.2.2, eq. (3.5) (external fire curve); αc = 25 W/(m²·K), §3.2.2"
_HYDROCARBON_SOURCE = ("EN 1991-1-2:2002 §3.2.3, eq. (3.6) (hydrocarbon curve); "
                       "αc = 50 W/(m²·K), §3.2.3")
_PARAMETRIC_SOURCE = ("EN 1991-1-2:2002 Annex A (informative), eqs. (A.1)–(A.12), its use subject "
                      "to the National Annex; αc = 35 W/(m²·K), §3.3.1.1; valid for compartments of "
                      "floor area up to 500 m², height up to 4 m and without openings in the roof, "
                      "the fire load being completely burnt out (Annex A)")


@dataclass(frozen=True)
class ParametricFireDetails:
    """The intermediate values of an EN 1991-1-2 Annex A parametric fire, for the report.

    Times marked [h] are in hours, as Annex A writes them; t_max and time_to_ambient are also given
    in seconds on the curve.
    """

    opening_factor: float          #: O [m^½]
    fire_load_density: float       #: q_t,d [J/m²] (of the total enclosure surface A_t)
    thermal_inertia: float         #: b [J/(m²·s^½·K)]
    fire_growth: str               #: slow | medium | fast
    floor_area: float              #: A_f [m²]
    height: float                  #: compartment height [m]
    limiting_time: float           #: t_lim [s]
    gamma: float                   #: Γ, eq. (A.2b) [-]
    regime: str                    #: "ventilation-controlled" or "fuel-controlled"
    t_max: float                   #: time of the peak, eq. (A.7) [s]
    theta_max: float               #: peak gas temperature [K]
    gamma_heating: float           #: Γ used in the heating phase: Γ, or Γ_lim (× k) [-]
    opening_factor_limit: float | None   #: O_lim, eq. (A.10) [m^½] (fuel-controlled only)
    gamma_limit: float | None      #: Γ_lim of eq. (A.9) before any k factor [-] (fuel-controlled)
    k: float                       #: Annex A k factor (1.0 when its conditions do not all hold)
    k_applied: bool                #: whether O > 0.04, q_t,d < 75 MJ/m² and b < 1160 all hold
    t_star_max_heating: float      #: t*_max reached at the peak in the heating phase [h]
    t_star_max: float              #: t*_max of the cooling phase, eq. (A.12) [h]
    x: float                       #: x of eqs. (A.11a–c) [-]
    cooling_rate: float            #: slope of eqs. (A.11a–c) [K per hour of t*]
    cooling_equation: str          #: "A.11a", "A.11b" or "A.11c"
    time_to_ambient: float         #: time when the cooling branch reaches 20 °C [s]


@dataclass(frozen=True)
class FireCurve:
    """A gas temperature–time curve: call it with times [s] to get gas temperatures [K].

    Attributes
    ----------
    name : str
        standard | external | hydrocarbon | tabulated | parametric.
    convection_coefficient : float
        αc [W/(m²·K)] that belongs to the curve (EN 1991-1-2:2002 §3.2–3.3), used by heated members
        unless they set their own.
    duration : float
        Exposure time the curve was set up for [s]. Nominal and parametric curves can be evaluated
        beyond it; a tabulated curve only within its table.
    source : str
        The clause (or the user's source) the curve comes from.
    equation : str
        The governing equation in LaTeX, for the report.
    parametric : ParametricFireDetails or None
        Annex A's intermediate values (parametric curves only).
    """

    name: str
    convection_coefficient: float
    duration: float
    source: str
    equation: str
    temperature_function: Callable[[np.ndarray], np.ndarray] = field(repr=False, compare=False)
    parametric: ParametricFireDetails | None = None
    points: tuple[tuple[float, float], ...] | None = None

    def __call__(self, t):
        """Return the gas temperature [K] at time(s) t [s] (a float for a scalar, else an array)."""
        times = np.asarray(t, dtype=float)
        if times.size and not np.all(np.isfinite(times)):
            raise PhysicsRangeError("t", _worst(times, ~np.isfinite(times)), "finite times")
        if times.size and np.min(times) < 0.0:
            raise PhysicsRangeError("t", float(np.min(times)), "t >= 0 s")
        result = self.temperature_function(times)
        if np.ndim(result) == 0:
            return float(result)
        return result

    def temperature(self, t):
        """Return the gas temperature [K] at time(s) t [s]; the same as calling the curve."""
        return self(t)

    @property
    def t_max(self) -> float | None:
        """Time of the gas temperature peak [s] (parametric curves; None for the others)."""
        return self.parametric.t_max if self.parametric else None

    @property
    def peak_time(self) -> float | None:
        """Time of the gas temperature peak [s]; the same as t_max (parametric curves only)."""
        return self.t_max

    @property
    def theta_max(self) -> float | None:
        """Peak gas temperature [K] (parametric curves; None for the others)."""
        return self.parametric.theta_max if self.parametric else None

    @property
    def regime(self) -> str | None:
        """ventilation-controlled or fuel-controlled (parametric curves; None for the others)."""
        return self.parametric.regime if self.parametric else None


def _worst(values: np.ndarray, mask: np.ndarray) -> float:
    return float(values[mask].flat[0])


def _check_duration(duration: float) -> float:
    duration = float(duration)
    if not (math.isfinite(duration) and duration > 0.0):
        raise PhysicsRangeError("duration", duration, "a finite duration > 0 s")
    return duration


def _check_convection(alpha: float) -> float:
    alpha = float(alpha)
    if not (math.isfinite(alpha) and alpha > 0.0):
        raise PhysicsRangeError("convection_coefficient", alpha, "αc > 0 W/(m²·K)")
    return alpha


# --- nominal curves, EN 1991-1-2:2002 §3.2 ------------------------------------------------------

def standard_fire_temperature(t):
    r"""Return the gas temperature [K] of the standard temperature-time curve at time t.

    .. math:: \theta_g = 20 + 345 \log_{10}(8 t + 1)

    with θg in °C and t in minutes.

    Parameters
    ----------
    t : float or array
        Time from the start of the exposure [s], t >= 0.

    Returns
    -------
    float or array
        Gas temperature θg + 273.15 [K].

    Notes
    -----
    Defined for any t >= 0 (the formula has no upper limit); rises without bound, slowly.
    The same curve is ISO 834-1:1999 §6.1.

    Examples
    --------
    >>> round(float(standard_fire_temperature(3600.0)) - 273.15)
    945

    References
    ----------
    1. EN 1991-1-2:2002, Eurocode 1 — Actions on structures — Part 1-2, §3.2.1, eq. (3.4).
    2. ISO 834-1:1999, Fire-resistance tests — Elements of building construction — Part 1, §6.1.
    """
    minutes = np.asarray(t, dtype=float) / 60.0
    return 20.0 + 345.0 * np.log10(8.0 * minutes + 1.0) + _KELVIN_OFFSET


def external_fire_temperature(t):
    r"""Return the gas temperature [K] of the external fire curve at time t.

    .. math:: \theta_g = 660 \left(1 - 0.687 e^{-0.32 t} - 0.313 e^{-3.8 t}\right) + 20

    with θg in °C and t in minutes.

    Parameters
    ----------
    t : float or array
        Time from the start of the exposure [s], t >= 0.

    Returns
    -------
    float or array
        Gas temperature θg + 273.15 [K].

    Notes
    -----
    For the outer surface of separating external walls exposed to fire from different parts of
    the façade (EN 1991-1-2:2002 §3.2.2). Tends to 680 °C.

    Examples
    --------
    >>> round(float(external_fire_temperature(3600.0)) - 273.15)
    680

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.2, eq. (3.5).
    """
    minutes = np.asarray(t, dtype=float) / 60.0
    return (660.0 * (1.0 - 0.687 * np.exp(-0.32 * minutes) - 0.313 * np.exp(-3.8 * minutes))
            + 20.0 + _KELVIN_OFFSET)


def hydrocarbon_fire_temperature(t):
    r"""Return the gas temperature [K] of the hydrocarbon curve at time t.

    .. math:: \theta_g = 1080 \left(1 - 0.325 e^{-0.167 t} - 0.675 e^{-2.5 t}\right) + 20

    with θg in °C and t in minutes.

    Parameters
    ----------
    t : float or array
        Time from the start of the exposure [s], t >= 0.

    Returns
    -------
    float or array
        Gas temperature θg + 273.15 [K].

    Notes
    -----
    Tends to 1100 °C.

    Examples
    --------
    >>> round(float(hydrocarbon_fire_temperature(3600.0)) - 273.15)
    1100

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.3, eq. (3.6).
    """
    minutes = np.asarray(t, dtype=float) / 60.0
    return (1080.0 * (1.0 - 0.325 * np.exp(-0.167 * minutes) - 0.675 * np.exp(-2.5 * minutes))
            + 20.0 + _KELVIN_OFFSET)


def standard_fire(duration: float = DEFAULT_DURATION) -> FireCurve:
    r"""Return the standard temperature-time curve as a :class:`FireCurve` (αc = 25 W/(m²·K)).

    .. math:: \theta_g = 20 + 345 \log_{10}(8 t + 1) \quad [^\circ\mathrm{C},\ t\ \mathrm{in\ min}]

    Parameters
    ----------
    duration : float
        Exposure duration [s], > 0 (default 7200 s = 120 min).

    Returns
    -------
    FireCurve
        Curve of :func:`standard_fire_temperature` with convection_coefficient 25 W/(m²·K).

    Notes
    -----
    αc = 25 W/(m²·K) is the coefficient EN 1991-1-2:2002 §3.2.1 gives with the curve.

    Examples
    --------
    >>> fire = standard_fire()
    >>> fire.convection_coefficient, round(fire(1800.0) - 273.15)
    (25.0, 842)

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.1, eq. (3.4).
    2. ISO 834-1:1999, §6.1.
    """
    return FireCurve(
        name="standard", convection_coefficient=25.0, duration=_check_duration(duration),
        source=_STANDARD_SOURCE,
        equation=r"\theta_g = 20 + 345\,\log_{10}(8t + 1)",
        temperature_function=standard_fire_temperature)


def external_fire(duration: float = DEFAULT_DURATION) -> FireCurve:
    r"""Return the external fire curve as a :class:`FireCurve` (αc = 25 W/(m²·K)).

    .. math:: \theta_g = 660 (1 - 0.687 e^{-0.32 t} - 0.313 e^{-3.8 t}) + 20

    Parameters
    ----------
    duration : float
        Exposure duration [s], > 0 (default 7200 s).

    Returns
    -------
    FireCurve
        Curve of :func:`external_fire_temperature` with convection_coefficient 25 W/(m²·K).

    Notes
    -----
    αc = 25 W/(m²·K), EN 1991-1-2:2002 §3.2.2.

    Examples
    --------
    >>> external_fire().convection_coefficient
    25.0

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.2, eq. (3.5).
    """
    return FireCurve(
        name="external", convection_coefficient=25.0, duration=_check_duration(duration),
        source=_EXTERNAL_SOURCE,
        equation=r"\theta_g = 660\,(1 - 0.687\,e^{-0.32 t} - 0.313\,e^{-3.8 t}) + 20",
        temperature_function=external_fire_temperature)


def hydrocarbon_fire(duration: float = DEFAULT_DURATION) -> FireCurve:
    r"""Return the hydrocarbon curve as a :class:`FireCurve` (αc = 50 W/(m²·K)).

    .. math:: \theta_g = 1080 (1 - 0.325 e^{-0.167 t} - 0.675 e^{-2.5 t}) + 20

    Parameters
    ----------
    duration : float
        Exposure duration [s], > 0 (default 7200 s).

    Returns
    -------
    FireCurve
        Curve of :func:`hydrocarbon_fire_temperature` with convection_coefficient 50 W/(m²·K).

    Notes
    -----
    αc = 50 W/(m²·K), EN 1991-1-2:2002 §3.2.3.

    Examples
    --------
    >>> hydrocarbon_fire().convection_coefficient
    50.0

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.3, eq. (3.6).
    """
    return FireCurve(
        name="hydrocarbon", convection_coefficient=50.0, duration=_check_duration(duration),
        source=_HYDROCARBON_SOURCE,
        equation=r"\theta_g = 1080\,(1 - 0.325\,e^{-0.167 t} - 0.675\,e^{-2.5 t}) + 20",
        temperature_function=hydrocarbon_fire_temperature)


#: The named curves a block may write inline (``fire: standard``): name → constructor(duration).
NAMED_FIRES: dict[str, Callable[[float], FireCurve]] = {
    "standard": standard_fire,
    "external": external_fire,
    "hydrocarbon": hydrocarbon_fire,
}


def named_fire(name: str, duration: float = DEFAULT_DURATION) -> FireCurve:
    """Return the nominal curve called ``name`` (standard | external | hydrocarbon) for a duration [s].

    Parameters
    ----------
    name : str
        standard | external | hydrocarbon.
    duration : float
        Exposure duration [s] (default 7200 s).

    Returns
    -------
    FireCurve
        The curve, with its own convection coefficient.

    Notes
    -----
    Only the nominal curves of EN 1991-1-2:2002 §3.2 can be named inline; a tabulated or
    parametric curve needs its own block.

    Examples
    --------
    >>> named_fire("hydrocarbon", 3600.0).duration
    3600.0

    References
    ----------
    1. EN 1991-1-2:2002, §3.2.1–3.2.3.
    """
    try:
        constructor = NAMED_FIRES[name]
    except KeyError:
        raise PhysicsRangeError("name", name, " | ".join(NAMED_FIRES)) from None
    return constructor(duration)


# --- tabulated curve ---------------------------------------------------------------------------

def tabulated_fire(times, temperatures, convection_coefficient: float,
                   source: str = "tabulated by the user",
                   duration: float | None = None) -> FireCurve:
    r"""Return a :class:`FireCurve` through the given points, linear between them.

    .. math::
        \theta_g(t) = \theta_i + (\theta_{i+1} - \theta_i)\,\frac{t - t_i}{t_{i+1} - t_i},
        \quad t_i \le t \le t_{i+1}

    Parameters
    ----------
    times : sequence of float
        Times [s], strictly increasing, the first one 0 s (the start of the exposure); at least two.
    temperatures : sequence of float
        Gas temperatures [K] at those times, each > 0 K.
    convection_coefficient : float
        αc [W/(m²·K)] to use with this curve, > 0; a tabulated curve has no coefficient of its own,
        so it must be stated.
    source : str
        Where the points come from, printed with the curve.
    duration : float or None
        Exposure duration [s], > 0 and at most the last time of the table; None: the last time
        of the table.

    Returns
    -------
    FireCurve
        name "tabulated", duration as given or the last time of the table.

    Notes
    -----
    Outside the table the curve is refused, not extended: evaluating it before 0 s or after the
    last time raises :class:`~calcdoc.physics.PhysicsRangeError`. Holding the last value could
    understate a fire that was still growing, so the table must cover the whole exposure.

    Examples
    --------
    >>> fire = tabulated_fire([0.0, 600.0], [293.15, 993.15], 25.0)
    >>> round(fire(300.0), 2)
    643.15

    References
    ----------
    1. Linear interpolation between the user's points (no standard method; the points are the
       user's and carry the user's source).
    """
    t = np.asarray(times, dtype=float)
    theta = np.asarray(temperatures, dtype=float)
    alpha = _check_convection(convection_coefficient)
    if t.ndim != 1 or theta.ndim != 1 or t.size != theta.size:
        raise PhysicsRangeError("temperatures", f"{theta.size} temperatures for {t.size} times",
                                "as many temperatures as times, in one list each")
    if t.size < 2:
        raise PhysicsRangeError("times", int(t.size), "at least 2 points")
    if not np.all(np.isfinite(t)):
        bad = int(np.argmax(~np.isfinite(t)))
        raise PhysicsRangeError("times", float(t[bad]), "finite times", index=bad)
    if not np.all(np.isfinite(theta)):
        bad = int(np.argmax(~np.isfinite(theta)))
        raise PhysicsRangeError("temperatures", float(theta[bad]), "finite temperatures",
                                index=bad)
    if t[0] != 0.0:
        raise PhysicsRangeError("times", float(t[0]), "0 s (the start of the exposure)", index=0)
    steps = np.diff(t)
    if np.any(steps <= 0.0):
        bad = int(np.argmax(steps <= 0.0)) + 1
        raise PhysicsRangeError("times", float(t[bad]),
                                f"strictly increasing times (> {float(t[bad - 1])!r} s)",
                                index=bad)
    if np.any(theta <= 0.0):
        bad = int(np.argmax(theta <= 0.0))
        raise PhysicsRangeError("temperatures", float(theta[bad]),
                                "an absolute temperature > 0 K", index=bad)
    t_end = float(t[-1])
    if duration is None:
        exposure = t_end
    else:
        exposure = _check_duration(duration)
        if exposure > t_end * (1.0 + 1e-12):
            raise PhysicsRangeError("duration", exposure,
                                    f"duration <= {t_end!r} s, the last time of the table (a "
                                    "tabulated curve is not extended beyond its points)")
        exposure = min(exposure, t_end)
    t_table = t.copy()
    theta_table = theta.copy()

    def temperature(times_s: np.ndarray) -> np.ndarray:
        # A tolerance of one part in 10^12 of the table's span lets a time stepper land on the end.
        if times_s.size and np.max(times_s) > t_end * (1.0 + 1e-12):
            raise PhysicsRangeError("t", float(np.max(times_s)),
                                    f"0 s <= t <= {t_end!r} s, the last time of the table "
                                    "(the curve is not extended beyond its points)")
        return np.interp(times_s, t_table, theta_table)

    return FireCurve(
        name="tabulated", convection_coefficient=alpha, duration=exposure, source=str(source),
        equation=(r"\theta_g(t) = \theta_i + (\theta_{i+1} - \theta_i)"
                  r"\,\frac{t - t_i}{t_{i+1} - t_i}"),
        temperature_function=temperature,
        points=tuple((float(a), float(b)) for a, b in zip(t, theta)))


# --- parametric curve, EN 1991-1-2:2002 Annex A ------------------------------------------------

def _annex_a_heating(t_star):
    # Eq. (A.1) in °C, t* in hours.
    return 20.0 + 1325.0 * (1.0 - 0.324 * np.exp(-0.2 * t_star) - 0.204 * np.exp(-1.7 * t_star)
                            - 0.472 * np.exp(-19.0 * t_star))


def parametric_fire(opening_factor: float, fire_load_density: float, thermal_inertia: float,
                    fire_growth: str, floor_area: float, height: float,
                    duration: float = DEFAULT_DURATION) -> FireCurve:
    r"""Return the EN 1991-1-2 Annex A parametric fire (heating and cooling) as a :class:`FireCurve`.

    Heating phase, eqs. (A.1), (A.2a), (A.2b):

    .. math::
        \theta_g = 20 + 1325\left(1 - 0.324 e^{-0.2 t^*} - 0.204 e^{-1.7 t^*}
                   - 0.472 e^{-19 t^*}\right),\quad t^* = t\,\Gamma,\quad
        \Gamma = \frac{(O/b)^2}{(0.04/1160)^2}

    Peak, eq. (A.7): :math:`t_{max} = \max(0.2\cdot10^{-3} q_{t,d}/O;\ t_{lim})`.
    If :math:`t_{max} = t_{lim}` (fuel-controlled), eqs. (A.8)–(A.10):
    :math:`t^* = t\,\Gamma_{lim}`, :math:`\Gamma_{lim} = (O_{lim}/b)^2/(0.04/1160)^2`,
    :math:`O_{lim} = 0.1\cdot10^{-3} q_{t,d}/t_{lim}`, with Γ_lim multiplied by
    :math:`k = 1 + \frac{O-0.04}{0.04}\,\frac{q_{t,d}-75}{75}\,\frac{1160-b}{1160}`
    when O > 0.04, q_t,d < 75 and b < 1160.

    Cooling phase, eqs. (A.11a–c), with t* = tΓ, eq. (A.12)
    :math:`t^*_{max} = (0.2\cdot10^{-3} q_{t,d}/O)\,\Gamma` and x = 1 if t_max > t_lim,
    x = t_lim Γ / t*_max if t_max = t_lim:

    .. math::
        \theta_g = \theta_{max} - r\,(t^* - t^*_{max} x),\quad
        r = 625 \ (t^*_{max} \le 0.5),\
        250 (3 - t^*_{max}) \ (0.5 < t^*_{max} < 2),\
        250 \ (t^*_{max} \ge 2)

    θ in °C, times in hours, q_t,d in MJ/m².

    Parameters
    ----------
    opening_factor : float
        O = A_v √h_eq / A_t [m^½], 0.02 <= O <= 0.20.
    fire_load_density : float
        Design fire load density q_t,d related to the total enclosure surface A_t [J/m²],
        50 MJ/m² <= q_t,d <= 1000 MJ/m².
    thermal_inertia : float
        b = √(ρ c λ) of the enclosure boundary [J/(m²·s^½·K)], 100 <= b <= 2200.
    fire_growth : str
        slow | medium | fast, giving t_lim = 25 | 20 | 15 min.
    floor_area : float
        Floor area of the compartment [m²], > 0 and <= 500 m².
    height : float
        Compartment height [m], > 0 and <= 4 m.
    duration : float
        Exposure duration [s] (default 7200 s).

    Returns
    -------
    FireCurve
        name "parametric", convection_coefficient 35 W/(m²·K), with ``parametric`` holding Γ, the
        regime, t_max [s], θ_max [K], O_lim, Γ_lim, k, t*_max, x and the cooling slope.

    Notes
    -----
    Validity (Annex A), each enforced with :class:`~calcdoc.physics.PhysicsRangeError`:
    100 <= b <= 2200 J/(m²·s^½·K), 0.02 <= O <= 0.20 m^½, 50 <= q_t,d <= 1000 MJ/m², floor area
    <= 500 m², height <= 4 m. Annex A also requires no openings in the roof: an assumption the
    caller must state. Annex A is informative; its use is subject to the National Annex.
    Once the cooling branch reaches 20 °C the curve stays at 20 °C (Annex A does not continue the
    line below ambient; common practice). The peak is t_max = t_lim in the fuel-controlled case;
    in the ventilation-controlled case the heating phase uses Γ and t*_max = t_max Γ.

    Examples
    --------
    >>> fire = parametric_fire(0.06, 300e6, 1000.0, "medium", 100.0, 3.0)
    >>> fire.regime, round(fire.t_max), round(fire.theta_max - 273.15)
    ('ventilation-controlled', 3600, 1109)

    References
    ----------
    1. EN 1991-1-2:2002, Annex A (informative), eqs. (A.1), (A.2a), (A.2b), (A.7)–(A.12);
       convection coefficient §3.3.1.1.
    """
    O = float(opening_factor)
    b = float(thermal_inertia)
    q_mj = float(fire_load_density) / 1e6
    if not (math.isfinite(O) and 0.02 <= O <= 0.20):
        raise PhysicsRangeError("opening_factor", O, "0.02 <= O <= 0.20 m^0.5 "
                                "(EN 1991-1-2:2002 Annex A)")
    if not (math.isfinite(b) and 100.0 <= b <= 2200.0):
        raise PhysicsRangeError("thermal_inertia", b,
                                "100 <= b <= 2200 J/(m^2*s^0.5*K) (EN 1991-1-2:2002 Annex A)")
    if not (math.isfinite(q_mj) and 50.0 <= q_mj <= 1000.0):
        raise PhysicsRangeError("fire_load_density", float(fire_load_density),
                                "50e6 <= q_t,d <= 1000e6 J/m^2, i.e. 50 to 1000 MJ/m^2 "
                                "(EN 1991-1-2:2002 Annex A)")
    if fire_growth not in FIRE_GROWTH_LIMITING_TIME:
        raise PhysicsRangeError("fire_growth", fire_growth, "slow | medium | fast")
    area = float(floor_area)
    if not (math.isfinite(area) and 0.0 < area <= 500.0):
        raise PhysicsRangeError("floor_area", area, "0 < floor area <= 500 m^2 "
                                "(EN 1991-1-2:2002 Annex A)")
    h = float(height)
    if not (math.isfinite(h) and 0.0 < h <= 4.0):
        raise PhysicsRangeError("height", h, "0 < height <= 4 m "
                                "(EN 1991-1-2:2002 Annex A)")
    duration = _check_duration(duration)

    t_lim_h = FIRE_GROWTH_LIMITING_TIME[fire_growth] / 3600.0
    gamma = (O / b) ** 2 / (0.04 / 1160.0) ** 2                       # (A.2b)
    t_vent_h = 0.2e-3 * q_mj / O
    t_max_h = max(t_vent_h, t_lim_h)                                   # (A.7)
    t_star_max = t_vent_h * gamma                                      # (A.12)
    if t_vent_h > t_lim_h:
        regime = "ventilation-controlled"
        gamma_heating = gamma
        o_lim = gamma_lim = None
        k, k_applied = 1.0, False
        x = 1.0
    else:
        # t_max = t_lim: the fire is fuel controlled (note to eq. (A.7)).
        regime = "fuel-controlled"
        o_lim = 0.1e-3 * q_mj / t_lim_h                                # (A.10)
        gamma_lim = (o_lim / b) ** 2 / (0.04 / 1160.0) ** 2           # (A.9)
        k_applied = O > 0.04 and q_mj < 75.0 and b < 1160.0
        k = (1.0 + ((O - 0.04) / 0.04) * ((q_mj - 75.0) / 75.0) * ((1160.0 - b) / 1160.0)
             if k_applied else 1.0)
        gamma_heating = gamma_lim * k                                  # (A.8) with k
        x = t_lim_h * gamma / t_star_max                               # x of (A.11)
    t_star_max_heating = t_max_h * gamma_heating
    theta_max_c = float(_annex_a_heating(t_star_max_heating))
    if t_star_max <= 0.5:
        rate, cooling_equation = 625.0, "A.11a"
    elif t_star_max < 2.0:
        rate, cooling_equation = 250.0 * (3.0 - t_star_max), "A.11b"
    else:
        rate, cooling_equation = 250.0, "A.11c"
    # Cooling reaches 20 °C where θmax − r (tΓ − t*max x) = 20.
    t_ambient_h = ((theta_max_c - 20.0) / rate + t_star_max * x) / gamma

    def temperature(times_s: np.ndarray) -> np.ndarray:
        t_h = times_s / 3600.0
        heating = _annex_a_heating(t_h * gamma_heating)
        cooling = np.maximum(theta_max_c - rate * (t_h * gamma - t_star_max * x), 20.0)
        return np.where(t_h <= t_max_h, heating, cooling) + _KELVIN_OFFSET

    details = ParametricFireDetails(
        opening_factor=O, fire_load_density=float(fire_load_density), thermal_inertia=b,
        fire_growth=fire_growth, floor_area=area, height=h,
        limiting_time=FIRE_GROWTH_LIMITING_TIME[fire_growth], gamma=gamma, regime=regime,
        t_max=t_max_h * 3600.0, theta_max=theta_max_c + _KELVIN_OFFSET,
        gamma_heating=gamma_heating, opening_factor_limit=o_lim, gamma_limit=gamma_lim, k=k,
        k_applied=k_applied, t_star_max_heating=t_star_max_heating, t_star_max=t_star_max, x=x,
        cooling_rate=rate, cooling_equation=cooling_equation,
        time_to_ambient=t_ambient_h * 3600.0)
    return FireCurve(
        name="parametric", convection_coefficient=35.0, duration=duration,
        source=_PARAMETRIC_SOURCE,
        equation=(r"\theta_g = 20 + 1325\left(1 - 0.324\,e^{-0.2 t^*} - 0.204\,e^{-1.7 t^*}"
                  r" - 0.472\,e^{-19 t^*}\right)"),
        temperature_function=temperature, parametric=details)
