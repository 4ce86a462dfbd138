"""Properties of dry air at atmospheric pressure, by linear interpolation in a handbook table.

The table is Table A.4 ("Thermophysical properties of gases at atmospheric pressure", air) of
Bergman, Lavine, Incropera and DeWitt, *Fundamentals of Heat and Mass Transfer*, 7th ed., Wiley
2011, rows 200 K to 800 K. The figures below were written down from memory of that table, then
checked against the independent modern formulation of Lemmon and Jacobsen (2004) for the
conductivity and viscosity and Lemmon et al. (2000) for the density and heat capacity
(tests/test_physics_conduction.py): conductivity within 2.2 %, kinematic viscosity within 1.1 %
and diffusivity within 2.6 % (both at 100 kPa), Prandtl number within 2.6 %, over the whole range.

The table's densities correspond to p = 100 kPa (ρRT/p = 1.000 within 0.1 %), not 101.325 kPa:
ν and α scale as 1/p, a 1.3 % difference that changes a natural-convection Nusselt number by
less than 0.5 %. Conductivity and Prandtl number do not depend on pressure near 1 atm.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike

from calcdoc.physics import PhysicsRangeError

__all__ = ["AIR_TABLE_SOURCE", "AIR_TABLE_RANGE", "AirProperties", "air_properties",
           "air_table_interval"]

AIR_TABLE_SOURCE = (
    "Bergman, Lavine, Incropera, DeWitt, Fundamentals of Heat and Mass Transfer, 7th ed. "
    "(Wiley, 2011), Table A.4, air at atmospheric pressure; linear interpolation"
)

# T [K], k [10^-3 W/(m K)], nu [10^-6 m^2/s], alpha [10^-6 m^2/s], Pr [1]
_TABLE = np.array([
    [200.0, 18.1, 7.590, 10.3, 0.737],
    [250.0, 22.3, 11.44, 15.9, 0.720],
    [300.0, 26.3, 15.89, 22.5, 0.707],
    [350.0, 30.0, 20.92, 29.9, 0.700],
    [400.0, 33.8, 26.41, 38.3, 0.690],
    [450.0, 37.3, 32.39, 47.2, 0.686],
    [500.0, 40.7, 38.79, 56.7, 0.684],
    [550.0, 43.9, 45.57, 66.7, 0.683],
    [600.0, 46.9, 52.69, 76.9, 0.685],
    [650.0, 49.7, 60.21, 87.3, 0.690],
    [700.0, 52.4, 68.10, 98.0, 0.695],
    [750.0, 54.9, 76.37, 109.0, 0.702],
    [800.0, 57.3, 84.93, 120.0, 0.709],
])
_T = _TABLE[:, 0]
_K = _TABLE[:, 1] * 1e-3
_NU = _TABLE[:, 2] * 1e-6
_ALPHA = _TABLE[:, 3] * 1e-6
_PR = _TABLE[:, 4]

AIR_TABLE_RANGE = (float(_T[0]), float(_T[-1]))


class AirProperties(NamedTuple):
    """Properties of dry air at one temperature (SI)."""

    temperature: float | np.ndarray  # K
    conductivity: float | np.ndarray  # W/(m K)
    kinematic_viscosity: float | np.ndarray  # m^2/s
    thermal_diffusivity: float | np.ndarray  # m^2/s
    prandtl: float | np.ndarray  # 1
    expansion_coefficient: float | np.ndarray  # 1/K


def air_properties(temperature: ArrayLike) -> AirProperties:
    r"""Return the conductivity, kinematic viscosity, diffusivity, Prandtl number and expansion
    coefficient of dry air at atmospheric pressure.

    .. math::
        \phi(T) = \phi_i + (\phi_{i+1} - \phi_i)\,\frac{T - T_i}{T_{i+1} - T_i},
        \qquad \beta = \frac{1}{T}

    Parameters
    ----------
    temperature : float or array
        Air temperature *T* [K], usually the film temperature (T_s + T_∞)/2.

    Returns
    -------
    AirProperties
        ``conductivity`` k [W/(m·K)], ``kinematic_viscosity`` ν [m²/s],
        ``thermal_diffusivity`` α [m²/s], ``prandtl`` Pr [1], ``expansion_coefficient``
        β [1/K] (ideal gas), each a float for scalar input.

    Notes
    -----
    Valid from 200 K to 800 K (the rows held); outside that a PhysicsRangeError is raised. Linear
    interpolation between rows 50 K apart overstates ν and α by at most 0.9 % (midway between
    200 K and 250 K; under 0.4 % above 325 K) and k and Pr by under 0.2 %, judged against the
    smooth curves of reference 2. β = 1/T holds for an ideal gas, which air at atmospheric
    pressure is to within 0.1 % in this range.

    Examples
    --------
    >>> props = air_properties(367.0)
    >>> round(props.conductivity, 5), round(props.prandtl, 3)
    (0.03129, 0.697)

    References
    ----------
    1. Bergman, T. L., Lavine, A. S., Incropera, F. P., DeWitt, D. P. Fundamentals of Heat and
       Mass Transfer, 7th ed. Wiley, 2011. Table A.4 (air). Values recalled from memory and
       checked against reference 2.
    2. Lemmon, E. W., Jacobsen, R. T. Viscosity and thermal conductivity equations for nitrogen,
       oxygen, argon, and air. Int. J. Thermophys. 25(1), 2004, 21-69.
    """
    T = np.asarray(temperature, dtype=float)
    bad = ~(np.isfinite(T) & (T >= _T[0]) & (T <= _T[-1]))
    if np.any(bad):
        found = float(T[bad].flat[0]) if T.ndim else float(T)
        raise PhysicsRangeError(
            "temperature", found,
            f"{_T[0]:g} K to {_T[-1]:g} K, the rows of the air table ({AIR_TABLE_SOURCE})")
    values = [np.interp(T, _T, column) for column in (_K, _NU, _ALPHA, _PR)]
    values.append(1.0 / T)
    if T.ndim == 0:
        return AirProperties(float(T), *(float(v) for v in values))
    return AirProperties(T, *values)


def air_table_interval(temperature: float) -> tuple[AirProperties, AirProperties]:
    r"""Return the two rows of the air table between which a temperature lies, for writing out
    the linear interpolation that :func:`air_properties` performs.

    .. math::
        T_i \le T \le T_{i+1}, \qquad
        \phi(T) = \phi_i + (\phi_{i+1} - \phi_i)\,\frac{T - T_i}{T_{i+1} - T_i}

    Parameters
    ----------
    temperature : float
        Air temperature *T* [K].

    Returns
    -------
    (lower, upper) : tuple of AirProperties
        The rows at T_i and T_{i+1} [SI, as :func:`air_properties`]; at a row's own temperature
        the interval that starts there (the last interval at the table's upper end).

    Notes
    -----
    Valid from 200 K to 800 K, the rows held; outside that a PhysicsRangeError is raised.
    Interpolating between the two rows reproduces :func:`air_properties` to rounding.

    Examples
    --------
    >>> lower, upper = air_table_interval(367.0)
    >>> lower.temperature, upper.temperature
    (350.0, 400.0)

    References
    ----------
    1. Bergman, T. L., Lavine, A. S., Incropera, F. P., DeWitt, D. P. Fundamentals of Heat and
       Mass Transfer, 7th ed. Wiley, 2011. Table A.4 (air). Values recalled from memory (see
       :func:`air_properties`).
    """
    T = float(temperature)
    if not (np.isfinite(T) and _T[0] <= T <= _T[-1]):
        raise PhysicsRangeError(
            "temperature", T,
            f"{_T[0]:g} K to {_T[-1]:g} K, the rows of the air table ({AIR_TABLE_SOURCE})")
    i = min(int(np.searchsorted(_T, T, side="right")) - 1, len(_T) - 2)

    def row(j: int) -> AirProperties:
        return AirProperties(float(_T[j]), float(_K[j]), float(_NU[j]), float(_ALPHA[j]),
                             float(_PR[j]), 1.0 / float(_T[j]))

    return row(i), row(i + 1)
