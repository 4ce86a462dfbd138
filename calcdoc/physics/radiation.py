"""Emission and net radiation exchange of grey diffuse surfaces (Stefan–Boltzmann law).

Temperatures are absolute, in kelvin; fluxes in W/m². Net exchange is per unit area of surface 1
and positive from surface 1 to surface 2. Every exchange result also gives the effective
emissivity, the factor that turns the black-body difference into the net flux,
:math:`q = \\varepsilon_{\\mathrm{eff}}\\,\\sigma (T_1^4 - T_2^4)`.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike
from scipy import constants

from calcdoc.physics import PhysicsRangeError

__all__ = [
    "STEFAN_BOLTZMANN",
    "ExchangeResult",
    "emissive_power",
    "net_flux_to_surroundings",
    "parallel_plates_exchange",
    "enclosed_body_exchange",
    "two_surface_enclosure_exchange",
]

#: Stefan–Boltzmann constant σ [W/(m²·K⁴)], CODATA 2018 through scipy.constants
#: (exact in the SI since 2019, being built from the exact h, c and k).
STEFAN_BOLTZMANN: float = constants.Stefan_Boltzmann


class ExchangeResult(NamedTuple):
    """Net exchange between two surfaces: flux, effective emissivity, shield temperatures."""

    q: float
    """Net flux per unit area of surface 1, positive from 1 to 2 [W/m²]."""
    effective_emissivity: float
    """q / (σ (T1⁴ − T2⁴)) [1], defined from the resistances so also when T1 = T2."""
    shield_temperatures: tuple[float, ...] = ()
    """Temperature of each shield, ordered from surface 1 [K]; empty without shields."""


def _array(quantity: str, value: ArrayLike, ok: np.ndarray | None, expected: str,
           index: int | None = None) -> np.ndarray:
    """Raise PhysicsRangeError naming the first element where ``ok`` is false; ``index`` is the
    element of a list argument the value belongs to (a shield)."""
    array = np.asarray(value, dtype=float)
    good = np.isfinite(array) if ok is None else (np.isfinite(array) & ok)
    if not np.all(good):
        bad = array[~good].flat[0] if array.ndim else array
        raise PhysicsRangeError(quantity, float(bad), expected, index=index)
    return array


def _temperature(quantity: str, value: ArrayLike) -> np.ndarray:
    array = np.asarray(value, dtype=float)
    return _array(quantity, array, array > 0.0, "an absolute temperature > 0 K")


def _emissivity(quantity: str, value: ArrayLike, index: int | None = None) -> np.ndarray:
    array = np.asarray(value, dtype=float)
    return _array(quantity, array, (array > 0.0) & (array <= 1.0), "0 < emissivity <= 1",
                  index)


def _area(quantity: str, value: float) -> float:
    array = np.asarray(value, dtype=float)
    return float(_array(quantity, array, array > 0.0, "an area > 0 m^2"))


def _result(value: np.ndarray) -> float | np.ndarray:
    return float(value) if np.ndim(value) == 0 else value


def emissive_power(temperature: ArrayLike, emissivity: ArrayLike = 1.0) -> float | np.ndarray:
    r"""Return the emissive power of a grey surface (Stefan–Boltzmann law).

    .. math::
        E = \varepsilon \sigma T^4

    Parameters
    ----------
    temperature : float or array
        Absolute surface temperature *T* [K], > 0.
    emissivity : float or array
        Total hemispherical emissivity ε [1], 0 < ε <= 1; default 1 (a black body).

    Returns
    -------
    E : float or array
        Emissive power [W/m²].

    Notes
    -----
    Grey diffuse surface; σ is CODATA 2018 (``scipy.constants.Stefan_Boltzmann``). Out-of-range
    input raises ``PhysicsRangeError``.

    Examples
    --------
    >>> round(emissive_power(1000.0, 0.9))
    51033

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Eq. 1.5.
    2. E. Tiesinga et al., CODATA recommended values of the fundamental physical constants:
       2018, Rev. Mod. Phys. 93, 025010 (2021).
    """
    t = _temperature("temperature", temperature)
    eps = _emissivity("emissivity", emissivity)
    return _result(eps * STEFAN_BOLTZMANN * t**4)


def net_flux_to_surroundings(temperature: ArrayLike, surroundings_temperature: ArrayLike,
                             emissivity: ArrayLike) -> float | np.ndarray:
    r"""Return the net radiant flux from a small grey surface to large isothermal surroundings.

    .. math::
        q = \varepsilon \sigma \left(T_s^4 - T_{sur}^4\right)

    Parameters
    ----------
    temperature : float or array
        Absolute surface temperature *T*\ :sub:`s` [K], > 0.
    surroundings_temperature : float or array
        Absolute temperature of the surroundings *T*\ :sub:`sur` [K], > 0.
    emissivity : float or array
        Emissivity of the surface ε [1], 0 < ε <= 1.

    Returns
    -------
    q : float or array
        Net flux leaving the surface [W/m²]; negative when the surroundings are hotter.

    Notes
    -----
    The surroundings are much larger than the surface and enclose it, so that they act as a
    black body whatever their emissivity (the limit A1/A2 → 0 of
    :func:`enclosed_body_exchange`). Out-of-range input raises ``PhysicsRangeError``.

    Examples
    --------
    >>> round(net_flux_to_surroundings(400.0, 300.0, 0.8), 1)
    793.9

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Eq. 1.7.
    """
    t = _temperature("temperature", temperature)
    t_sur = _temperature("surroundings_temperature", surroundings_temperature)
    eps = _emissivity("emissivity", emissivity)
    return _result(eps * STEFAN_BOLTZMANN * (t**4 - t_sur**4))


def _gap_resistance(emissivity_a: float, emissivity_b: float) -> float:
    """Resistance (per unit area, times σ) of the gap between two large parallel grey faces."""
    return 1.0 / emissivity_a + 1.0 / emissivity_b - 1.0


def parallel_plates_exchange(temperature_1: float, temperature_2: float, emissivity_1: float,
                             emissivity_2: float,
                             shields: Sequence[tuple[float, float]] = ()) -> ExchangeResult:
    r"""Return the net flux between two large parallel grey plates, with any number of shields.

    .. math::
        q = \frac{\sigma\left(T_1^4 - T_2^4\right)}
                 {\frac{1}{\varepsilon_1} + \frac{1}{\varepsilon_2} - 1
                  + \sum_{k=1}^{N}\left(\frac{1}{\varepsilon_{k,1}} + \frac{1}{\varepsilon_{k,2}}
                  - 1\right)},
        \qquad
        \sigma T_k^4 = \sigma T_{k-1}^4 - q\left(\frac{1}{\varepsilon_{k-1,2}}
                       + \frac{1}{\varepsilon_{k,1}} - 1\right)

    Parameters
    ----------
    temperature_1 : float
        Absolute temperature of plate 1 [K], > 0.
    temperature_2 : float
        Absolute temperature of plate 2 [K], > 0.
    emissivity_1 : float
        Emissivity of plate 1 [1], 0 < ε <= 1.
    emissivity_2 : float
        Emissivity of plate 2 [1], 0 < ε <= 1.
    shields : sequence of (float, float)
        One ``(emissivity_1, emissivity_2)`` pair per shield [1], ordered from plate 1 to plate 2;
        a shield's ``emissivity_1`` is its face towards plate 1. Default: no shield. A bad
        shield is named ``shields`` (a pair of the wrong length) or ``shields.emissivity_1`` /
        ``shields.emissivity_2``, with ``index`` its position in the list (from 0).

    Returns
    -------
    ExchangeResult
        ``q`` net flux from plate 1 to plate 2 [W/m²]; ``effective_emissivity`` [1];
        ``shield_temperatures`` [K], ordered from plate 1.

    Notes
    -----
    Plates and shields are grey, diffuse, opaque, parallel and large enough that each sees only
    its neighbours (view factor 1 between neighbours). Each shield is thin and conducts well, so
    both its faces are at one temperature; nothing but radiation crosses the gaps, and the state
    is steady. The denominator is the sum of the series resistances of the N + 1 gaps, so that
    N shields of the plates' emissivity cut the flux to 1/(N + 1). Out-of-range input raises
    ``PhysicsRangeError``.

    Examples
    --------
    >>> result = parallel_plates_exchange(500.0, 300.0, 0.8, 0.8, shields=[(0.8, 0.8)])
    >>> round(result.q, 1), round(result.shield_temperatures[0], 1)
    (1028.2, 433.5)

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), §13.3.3 Table 13.3 (large parallel planes) and
       §13.3.4 (radiation shields, Eq. 13.24).
    2. J. R. Howell, M. P. Mengüç, K. Daun, R. Siegel, *Thermal Radiation Heat Transfer*, 7th ed.,
       CRC Press (2021), Ch. 6 (radiation shields between parallel plates).
    """
    t1 = float(_temperature("temperature_1", temperature_1))
    t2 = float(_temperature("temperature_2", temperature_2))
    faces = [float(_emissivity("emissivity_1", emissivity_1))]
    for index, shield in enumerate(shields):
        if len(shield) != 2:
            raise PhysicsRangeError("shields", shield, "a pair (emissivity_1, emissivity_2)",
                                    index=index)
        faces.append(float(_emissivity("shields.emissivity_1", shield[0], index)))
        faces.append(float(_emissivity("shields.emissivity_2", shield[1], index)))
    faces.append(float(_emissivity("emissivity_2", emissivity_2)))
    # faces: plate 1, shield 1 face 1, shield 1 face 2, ..., plate 2; gap k joins faces 2k, 2k+1.
    gaps = [_gap_resistance(faces[2 * k], faces[2 * k + 1]) for k in range(len(faces) // 2)]
    total = sum(gaps)
    q = STEFAN_BOLTZMANN * (t1**4 - t2**4) / total
    temperatures = []
    blackbody = STEFAN_BOLTZMANN * t1**4
    for gap in gaps[:-1]:
        blackbody -= q * gap
        temperatures.append((blackbody / STEFAN_BOLTZMANN) ** 0.25)
    return ExchangeResult(q=q, effective_emissivity=1.0 / total,
                          shield_temperatures=tuple(temperatures))


def enclosed_body_exchange(temperature_1: float, temperature_2: float, emissivity_1: float,
                           emissivity_2: float = 1.0, area_1: float | None = None,
                           area_2: float | None = None) -> ExchangeResult:
    r"""Return the net flux from a convex grey body to the grey enclosure around it.

    .. math::
        q = \frac{\sigma\left(T_1^4 - T_2^4\right)}
                 {\frac{1}{\varepsilon_1} + \frac{1 - \varepsilon_2}{\varepsilon_2}
                  \frac{A_1}{A_2}},
        \qquad A_2 \to \infty:\; q = \varepsilon_1 \sigma \left(T_1^4 - T_2^4\right)

    Parameters
    ----------
    temperature_1 : float
        Absolute temperature of the body [K], > 0.
    temperature_2 : float
        Absolute temperature of the enclosure [K], > 0.
    emissivity_1 : float
        Emissivity of the body [1], 0 < ε <= 1.
    emissivity_2 : float
        Emissivity of the enclosure [1], 0 < ε <= 1; default 1 (unused for a large enclosure).
    area_1 : float, optional
        Surface area of the body [m²]; required with ``area_2``.
    area_2 : float, optional
        Inner surface area of the enclosure [m²], >= ``area_1``; omitted: a large enclosure
        (A1/A2 → 0).

    Returns
    -------
    ExchangeResult
        ``q`` net flux per unit area of the body, positive body → enclosure [W/m²];
        ``effective_emissivity`` [1]; no shield temperatures.

    Notes
    -----
    The body is convex (it cannot see itself, F12 = 1); both surfaces are grey, diffuse and
    isothermal, and the enclosure is closed. A1 <= A2 is enforced, since a convex body inside an
    enclosure cannot have the larger area (``PhysicsRangeError``). Concentric spheres and long
    concentric cylinders are exact cases; A1 = A2 gives the parallel-plate result.

    Examples
    --------
    >>> round(enclosed_body_exchange(400.0, 300.0, 0.8).q, 1)
    793.9
    >>> round(enclosed_body_exchange(400.0, 300.0, 0.8, 0.5, area_1=1.0, area_2=4.0).q, 1)
    661.5

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), §13.3.3, Table 13.3 (concentric spheres and
       cylinders, small convex object in a large cavity).
    """
    t1 = float(_temperature("temperature_1", temperature_1))
    t2 = float(_temperature("temperature_2", temperature_2))
    eps1 = float(_emissivity("emissivity_1", emissivity_1))
    eps2 = float(_emissivity("emissivity_2", emissivity_2))
    if area_2 is None:
        if area_1 is not None:
            _area("area_1", area_1)
        area_ratio = 0.0
    else:
        if area_1 is None:
            raise PhysicsRangeError("area_1", None, "the body's area when area_2 is given")
        a1 = _area("area_1", area_1)
        a2 = _area("area_2", area_2)
        if a1 > a2:
            raise PhysicsRangeError("area_1", a1, f"area_1 <= area_2 = {a2!r} m^2 for a convex "
                                    "body inside an enclosure")
        area_ratio = a1 / a2
    total = 1.0 / eps1 + (1.0 - eps2) / eps2 * area_ratio
    q = STEFAN_BOLTZMANN * (t1**4 - t2**4) / total
    return ExchangeResult(q=q, effective_emissivity=1.0 / total)


def two_surface_enclosure_exchange(temperature_1: float, temperature_2: float,
                                   emissivity_1: float, emissivity_2: float, area_1: float,
                                   area_2: float, view_factor: float) -> ExchangeResult:
    r"""Return the net flux in a closed enclosure of two grey surfaces with view factor F12.

    .. math::
        q = \frac{\sigma\left(T_1^4 - T_2^4\right)}
                 {\frac{1 - \varepsilon_1}{\varepsilon_1} + \frac{1}{F_{12}}
                  + \frac{1 - \varepsilon_2}{\varepsilon_2}\frac{A_1}{A_2}}

    Parameters
    ----------
    temperature_1 : float
        Absolute temperature of surface 1 [K], > 0.
    temperature_2 : float
        Absolute temperature of surface 2 [K], > 0.
    emissivity_1 : float
        Emissivity of surface 1 [1], 0 < ε <= 1.
    emissivity_2 : float
        Emissivity of surface 2 [1], 0 < ε <= 1.
    area_1 : float
        Area of surface 1 [m²], > 0.
    area_2 : float
        Area of surface 2 [m²], > 0.
    view_factor : float
        F12 [1], 0 < F12 <= 1, with A1·F12 <= A2 (so that F21 <= 1).

    Returns
    -------
    ExchangeResult
        ``q`` net flux per unit area of surface 1, positive 1 → 2 [W/m²];
        ``effective_emissivity`` [1] (it includes the view factor); no shield temperatures.

    Notes
    -----
    The two surfaces form the whole enclosure: each is grey, diffuse, opaque and isothermal,
    and each may see itself (F11 = 1 − F12, F22 = 1 − F21). The surface and space resistances
    of the radiation network are in series. A1·F12 > A2 would give F21 > 1 and is refused
    (``PhysicsRangeError``), as is out-of-range input.

    Examples
    --------
    >>> round(two_surface_enclosure_exchange(400.0, 300.0, 1.0, 1.0, 1.0, 1.0, 1.0).q, 1)
    992.3

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), §13.3.3, Eq. 13.23 (two-surface enclosure).
    """
    t1 = float(_temperature("temperature_1", temperature_1))
    t2 = float(_temperature("temperature_2", temperature_2))
    eps1 = float(_emissivity("emissivity_1", emissivity_1))
    eps2 = float(_emissivity("emissivity_2", emissivity_2))
    a1 = _area("area_1", area_1)
    a2 = _area("area_2", area_2)
    f12 = float(np.asarray(view_factor, dtype=float))
    if not (np.isfinite(f12) and 0.0 < f12 <= 1.0):
        raise PhysicsRangeError("view_factor", f12, "0 < F12 <= 1")
    if a1 * f12 > a2 * (1.0 + 1e-12):
        raise PhysicsRangeError("view_factor", f12,
                                f"A1*F12 <= A2, i.e. F12 <= {a2 / a1!r} (so that F21 <= 1)")
    total = (1.0 - eps1) / eps1 + 1.0 / f12 + (1.0 - eps2) / eps2 * a1 / a2
    q = STEFAN_BOLTZMANN * (t1**4 - t2**4) / total
    return ExchangeResult(q=q, effective_emissivity=1.0 / total)
