"""Pipe insulation with temperature-dependent conductivity: mean conductivity, radial heat flow,
and the thickness of one layer that meets a heat-loss or surface-temperature target.

A layer's conductivity λ(T) is given as a piecewise-linear curve through points (T_i, λ_i). In
steady conduction without internal heat sources the Kirchhoff transform Φ(T) = ∫ λ dT turns
∇·(λ∇T) = 0 into Laplace's equation for Φ, so a plane or cylindrical layer carries exactly the heat
flow it would with the constant conductivity

    λ_m = (1 / (T1 − T2)) ∫_{T2}^{T1} λ(T) dT,

the mean of λ over the layer's temperature range (EN ISO 12241, from memory). The layer temperatures
depend on λ_m and λ_m on them; this module solves both together (see
:func:`cylindrical_layers_with_curves`) and then hands the converged λ_m to
:func:`calcdoc.physics.conduction.cylindrical_layers` or
:func:`calcdoc.physics.conduction.pipe_in_still_air` for the result.

Temperatures are absolute, in kelvin; lengths in m; conductivities in W/(m·K); heat flow per metre
of pipe in W/m, positive outward.
"""

from __future__ import annotations

import math
from typing import NamedTuple, Sequence

import numpy as np
from numpy.typing import ArrayLike

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.conduction import (
    FreeConvection,
    RadialHeatFlow,
    cylinder_film_resistance,
    cylindrical_layers,
    free_convection_horizontal_cylinder,
    pipe_in_still_air,
    radiation_coefficient,
)
from calcdoc.physics.solvers import brentq

__all__ = [
    "ConductivityCurve",
    "mean_conductivity",
    "CurvedLayersFlow",
    "cylindrical_layers_with_curves",
    "SIZING_BRACKET",
    "SizedLayer",
    "size_layer",
]

#: Default search range for :func:`size_layer` [m]: 1 mm is thinner than any insulation product,
#: 1 m several times the thickest pipe insulation in use (a few hundred mm, common practice).
SIZING_BRACKET = (1e-3, 1.0)

_RANGE_TOLERANCE = 1e-9  # K: a layer temperature this close to a curve's end is on the curve


class ConductivityCurve(NamedTuple):
    """A piecewise-linear conductivity curve λ(T): temperatures [K] and conductivities [W/(m·K)]."""

    temperatures: ArrayLike
    conductivities: ArrayLike


# --- the curve -----------------------------------------------------------------------------------

def _curve(name: str, temperatures: ArrayLike, conductivities: ArrayLike
           ) -> tuple[np.ndarray, np.ndarray]:
    """The curve as float arrays, refused unless it is at least two points, T increasing, λ > 0."""
    T = np.asarray(temperatures, dtype=float)
    k = np.asarray(conductivities, dtype=float)
    if T.ndim != 1 or k.shape != T.shape or T.size < 2:
        raise PhysicsRangeError(name, f"{T.size} temperatures, {k.size} conductivities",
                                "at least two points, as many conductivities as temperatures")
    if not (np.all(np.isfinite(T)) and np.all(T > 0.0) and np.all(np.diff(T) > 0.0)):
        raise PhysicsRangeError(name, T.tolist(),
                                "absolute temperatures > 0 K, strictly increasing")
    if not (np.all(np.isfinite(k)) and np.all(k > 0.0)):
        raise PhysicsRangeError(name, k.tolist(), "conductivities > 0 W/(m*K)")
    return T, k


def _mean_on_curve(T: np.ndarray, k: np.ndarray, T1: float, T2: float) -> float:
    # The trapezoidal rule on the curve's own nodes is exact for a piecewise-linear λ, and with
    # only the two ends of a short range it reduces to their mean: no cancellation as T1 → T2.
    low, high = min(T1, T2), max(T1, T2)
    if low == high:
        return float(np.interp(low, T, k))
    inside = T[(T > low) & (T < high)]
    points = np.concatenate(([low], inside, [high]))
    return float(np.trapezoid(np.interp(points, T, k), points) / (high - low))


def mean_conductivity(curve_T: ArrayLike, curve_k: ArrayLike, T1: float, T2: float) -> float:
    r"""Return the mean of a piecewise-linear conductivity curve over a temperature range.

    .. math::
        \lambda_m = \frac{1}{T_1 - T_2}\int_{T_2}^{T_1} \lambda(T)\,dT
        \quad (T_1 \ne T_2), \qquad \lambda_m = \lambda(T_1) \quad (T_1 = T_2)

    Parameters
    ----------
    curve_T : sequence of float
        Temperatures of the curve's points [K], at least two, strictly increasing.
    curve_k : sequence of float
        Conductivities at those points [W/(m·K)], each > 0.
    T1 : float
        One end of the range [K], within the curve.
    T2 : float
        The other end [K], within the curve (either order).

    Returns
    -------
    float
        λ_m [W/(m·K)].

    Notes
    -----
    Exact for the piecewise-linear curve (trapezoidal rule on its nodes); no extrapolation: a
    temperature outside the curve raises :class:`~calcdoc.physics.PhysicsRangeError` naming it.
    For a linear law λ = a + bT the mean is λ at the mean temperature (T1 + T2)/2, the rule of
    EN ISO 12241 for declared λ(θ) data (from memory). By the Kirchhoff transform a plane or
    cylindrical layer whose faces are at T1 and T2 conducts exactly the heat flow of a constant
    conductivity λ_m, whatever the shape of λ(T) (reference 2).

    Examples
    --------
    >>> round(mean_conductivity([300.0, 500.0], [0.04, 0.06], 350.0, 450.0), 6)
    0.05

    References
    ----------
    1. EN ISO 12241:2008, Thermal insulation for building equipment and industrial installations
       — Calculation rules. Clause 4, thermal conductivity as a function of temperature (clause
       from memory).
    2. Carslaw, H. S., Jaeger, J. C. Conduction of Heat in Solids, 2nd ed. Oxford, 1959. §1.7
       (Kirchhoff transformation for a conductivity depending on temperature; from memory).
    """
    T, k = _curve("curve", curve_T, curve_k)
    for name, value in (("T1", T1), ("T2", T2)):
        value = float(value)
        if not (math.isfinite(value)
                and T[0] - _RANGE_TOLERANCE <= value <= T[-1] + _RANGE_TOLERANCE):
            raise PhysicsRangeError(name, value, f"a temperature within the conductivity curve, "
                                                 f"{float(T[0])!r} K to {float(T[-1])!r} K")
    return _mean_on_curve(T, k, float(T1), float(T2))


class _Layer:
    """One layer's λ(T): constant, or a curve with its Kirchhoff potential Φ(T) = ∫ λ dT."""

    def __init__(self, index: int, entry):
        self.name = f"conductivities[{index}]"
        if np.ndim(entry) == 0:
            value = float(entry)
            if not (math.isfinite(value) and value > 0.0):
                raise PhysicsRangeError(self.name, value, "a conductivity > 0 W/(m*K) or a curve")
            self.T = np.array([0.0, 1.0])
            self.k = np.array([value, value])
            self.curve = False
        else:
            try:
                temperatures, conductivities = entry
            except (TypeError, ValueError):
                raise PhysicsRangeError(self.name, entry, "a conductivity or a curve "
                                        "(temperatures, conductivities)") from None
            self.T, self.k = _curve(self.name, temperatures, conductivities)
            self.curve = True
        # Φ at the nodes, from the first node; λ is held constant beyond the ends so that Φ is
        # defined (and strictly increasing) for the trial temperatures of the root search.
        self.phi = np.concatenate(([0.0], np.cumsum(np.diff(self.T) * (self.k[1:] + self.k[:-1])
                                                     / 2.0)))

    def potential(self, T: float) -> float:
        if T <= self.T[0]:
            return self.k[0] * (T - self.T[0])
        if T >= self.T[-1]:
            return self.phi[-1] + self.k[-1] * (T - self.T[-1])
        i = int(np.searchsorted(self.T, T, side="right")) - 1
        u = T - self.T[i]
        slope = (self.k[i + 1] - self.k[i]) / (self.T[i + 1] - self.T[i])
        return self.phi[i] + self.k[i] * u + 0.5 * slope * u * u

    def temperature(self, phi: float) -> float:
        """The temperature at which Φ takes a value (Φ is strictly increasing)."""
        if phi <= 0.0:
            return self.T[0] + phi / self.k[0]
        if phi >= self.phi[-1]:
            return self.T[-1] + (phi - self.phi[-1]) / self.k[-1]
        i = int(np.searchsorted(self.phi, phi, side="right")) - 1
        slope = (self.k[i + 1] - self.k[i]) / (self.T[i + 1] - self.T[i])
        rest = phi - self.phi[i]
        # root of slope/2 u² + k_i u − rest = 0 in the form without cancellation
        return self.T[i] + 2.0 * rest / (self.k[i] + math.sqrt(self.k[i] ** 2 + 2.0 * slope * rest))

    def mean(self, T1: float, T2: float) -> float:
        if not self.curve:
            return float(self.k[0])
        for value in (T1, T2):
            if not (self.T[0] - _RANGE_TOLERANCE <= value <= self.T[-1] + _RANGE_TOLERANCE):
                raise PhysicsRangeError(
                    self.name, float(value), f"layer temperatures within its conductivity curve, "
                                             f"{float(self.T[0])!r} K to {float(self.T[-1])!r} K")
        return _mean_on_curve(self.T, self.k, T1, T2)


# --- radial heat flow ----------------------------------------------------------------------------

class CurvedLayersFlow(NamedTuple):
    """Radial heat flow through layers with conductivity curves, with the converged figures."""

    flow: RadialHeatFlow  # as from conduction.cylindrical_layers with the mean conductivities
    mean_conductivities: np.ndarray  # W/(m K), per layer, over its converged temperature range
    iterations: int  # iterations of the root search on the heat flow per metre
    conductivity_change: float  # 1, largest relative change of λ_m under one more substitution
    convection: FreeConvection | None  # still air only: natural convection at the surface
    h_radiation: float | None  # W/(m^2 K), still air only


def _outside(outside_coefficient: float | None, emissivity: float | None) -> str:
    if (outside_coefficient is None) == (emissivity is None):
        raise PhysicsRangeError("outside_coefficient", outside_coefficient,
                                "exactly one of outside_coefficient or emissivity")
    return "coefficient" if emissivity is None else "still_air"


def cylindrical_layers_with_curves(inner_diameter: float, thicknesses: ArrayLike,
                                   conductivities: Sequence, inside_temperature: float,
                                   ambient_temperature: float,
                                   outside_coefficient: float | None = None,
                                   emissivity: float | None = None,
                                   inside_coefficient: float | None = None) -> CurvedLayersFlow:
    r"""Return the heat flow per metre, temperatures and converged mean conductivities of
    cylindrical layers whose conductivities may depend on temperature.

    .. math::
        q' = \frac{2\pi\,[\Phi_j(T_{j-1}) - \Phi_j(T_j)]}{\ln(D_j/D_{j-1})}, \quad
        \Phi_j(T) = \int \lambda_j\,dT, \quad
        q' = \pi D_n\,h_o(T_s)\,(T_s - T_\infty), \quad
        \lambda_{m,j} = \frac{\Phi_j(T_{j-1}) - \Phi_j(T_j)}{T_{j-1} - T_j}

    Parameters
    ----------
    inner_diameter : float
        Inner diameter of the first layer D_0 [m].
    thicknesses : sequence of float
        Layer thicknesses, innermost first [m], each > 0.
    conductivities : sequence
        Per layer, a constant conductivity [W/(m·K)] or a :class:`ConductivityCurve` /
        pair (temperatures [K], conductivities [W/(m·K)]), piecewise linear.
    inside_temperature : float
        Inside fluid temperature T_i [K].
    ambient_temperature : float
        Ambient air (and surroundings) temperature T_∞ [K].
    outside_coefficient : float, optional
        Outside surface coefficient h_o [W/(m²·K)]; exactly one of this and ``emissivity``.
    emissivity : float, optional
        Emissivity of the outer surface [1]; then h_o is natural convection of a horizontal
        cylinder in still air plus radiation, as in
        :func:`calcdoc.physics.conduction.pipe_in_still_air`.
    inside_coefficient : float, optional
        Inside surface coefficient h_i [W/(m²·K)]; omitted, the inner surface is at T_i.

    Returns
    -------
    CurvedLayersFlow
        ``flow`` (:class:`~calcdoc.physics.conduction.RadialHeatFlow`: q' [W/m],
        R' [m·K/W], T_s, interface temperatures [K], h_o), ``mean_conductivities`` λ_m
        [W/(m·K)] per layer, ``iterations``, ``conductivity_change`` [1], and for still air
        ``convection`` and ``h_radiation`` [W/(m²·K)].

    Notes
    -----
    The layer temperatures and the layer conductivities are solved together as one equation in
    q'. For a trial q' the temperatures follow layer by layer from the inside: across layer j,
    Φ_j falls by q' ln(D_j/D_{j-1})/(2π) (the Kirchhoff form of Fourier's law, exact for any
    λ(T)), and the piecewise-quadratic Φ_j is inverted in closed form. The outer surface balance
    q' − π D_n h_o(T_s)(T_s − T_∞) is strictly increasing in q' (T_s falls as q' rises, and the
    surface loss rises with T_s, in still air too: convection and radiation each grow with
    T_s − T_∞), so Brent's method (scipy.optimize.brentq) on the bracket
    q' ∈ [0, (T_i − T_∞)/R'_min], with R'_min the resistance at each curve's largest λ, finds
    the one root; ``iterations`` counts its steps. No fixed-point iteration is needed, but the
    result is its fixed point: ``conductivity_change``, the change of λ_m when recomputed from the
    final temperatures, is at round-off level.

    Every layer temperature at the solution must lie within its curve (no extrapolation);
    otherwise :class:`~calcdoc.physics.PhysicsRangeError` names ``conductivities[j]``. Other
    limits are those of :func:`~calcdoc.physics.conduction.cylindrical_layers` and
    :func:`~calcdoc.physics.conduction.pipe_in_still_air` (air table 200 K to 800 K at the film
    temperature, Ra_D <= 10¹²).

    Examples
    --------
    >>> curve = ConductivityCurve([273.15, 473.15], [0.035, 0.055])
    >>> r = cylindrical_layers_with_curves(0.1, [0.05], [curve], 423.15, 293.15, 10.0)
    >>> round(r.flow.q_per_length, 2), round(float(r.mean_conductivities[0]), 5)
    (48.64, 0.04389)

    References
    ----------
    1. EN ISO 12241:2008, Thermal insulation for building equipment and industrial installations
       — Calculation rules. Clause 4 (mean conductivity over the layer; from memory).
    2. Carslaw, H. S., Jaeger, J. C. Conduction of Heat in Solids, 2nd ed. Oxford, 1959. §1.7
       (Kirchhoff transformation; from memory).
    3. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. §3.3 (radial conduction; from memory).
    """
    mode = _outside(outside_coefficient, emissivity)
    entries = list(conductivities)
    layers = [_Layer(j, entry) for j, entry in enumerate(entries)]
    # Geometry, temperatures and the inside coefficient are checked by the constant-λ solver.
    base = cylindrical_layers(inner_diameter, thicknesses, np.ones(len(layers)),
                              inside_temperature, ambient_temperature, 1.0, inside_coefficient)
    T_i, T_a = float(inside_temperature), float(ambient_temperature)
    D = base.diameters
    D_out = float(D[-1])
    logs = np.log(D[1:] / D[:-1]) / (2.0 * np.pi)
    R_film = 0.0 if inside_coefficient is None else float(
        cylinder_film_resistance(D[0], inside_coefficient))
    if mode == "still_air":
        eps = float(emissivity)
        radiation_coefficient(eps, T_i, T_a)  # checks the emissivity before the search

    def surface_loss(T_s: float) -> float:
        if mode == "coefficient":
            return np.pi * D_out * float(outside_coefficient) * (T_s - T_a)
        h = (free_convection_horizontal_cylinder(D_out, T_s, T_a).h
             + float(radiation_coefficient(eps, T_s, T_a)))
        return np.pi * D_out * h * (T_s - T_a)

    def temperatures(q: float) -> np.ndarray:
        values = [T_i - q * R_film]
        for layer, log in zip(layers, logs):
            values.append(layer.temperature(layer.potential(values[-1]) - q * log))
        return np.array(values)

    low_T, high_T = min(T_i, T_a), max(T_i, T_a)

    def imbalance(q: float) -> float:
        # The surface loss is taken at T_s held between T_∞ and T_i: the root lies there, and
        # trial flows far off it must not reach the air table's limits.
        T_s = min(max(float(temperatures(q)[-1]), low_T), high_T)
        return q - surface_loss(T_s)

    iterations = 0
    if T_i == T_a:
        q = 0.0
    else:
        R_min = R_film + float(np.sum(logs / np.array([layer.k.max() for layer in layers])))
        q_bound = (T_i - T_a) / R_min
        q, report = brentq(imbalance, min(0.0, q_bound), max(0.0, q_bound),
                           xtol=1e-14 * abs(q_bound), rtol=1e-13, full_output=True)
        iterations = report.iterations
    T = temperatures(q)
    means = np.array([layer.mean(T[j], T[j + 1]) for j, layer in enumerate(layers)])

    convection = h_radiation = None
    if mode == "coefficient":
        flow = cylindrical_layers(inner_diameter, thicknesses, means, T_i, T_a,
                                  outside_coefficient, inside_coefficient)
    else:
        still = pipe_in_still_air(inner_diameter, thicknesses, means, T_i, T_a, eps,
                                  inside_coefficient)
        flow, convection, h_radiation = still.flow, still.convection, still.h_radiation
    # One more substitution from the temperatures of the final flow: a fixed point changes nothing.
    T_final = flow.interface_temperatures
    again = np.array([layer.mean(T_final[j], T_final[j + 1]) for j, layer in enumerate(layers)])
    change = float(np.max(np.abs(again - means) / means))
    return CurvedLayersFlow(flow, means, iterations, change, convection, h_radiation)


# --- sizing one layer ----------------------------------------------------------------------------

class SizedLayer(NamedTuple):
    """The thickness of one layer that meets a target, with the performance at that thickness."""

    thickness: float  # m
    performance: CurvedLayersFlow  # at that thickness, all else as given
    target: str  # "max_q_per_length" or "max_surface_temperature"
    met_at_lower_bound: bool  # the target is met over the whole bracket, from its lower end
    monotone: bool  # the sampled figure never rose with thickness over the bracket
    iterations: int  # of the final root search on the thickness (0 when met at the lower bound)


def size_layer(inner_diameter: float, thicknesses: ArrayLike, conductivities: Sequence,
               inside_temperature: float, ambient_temperature: float, layer: int,
               max_q_per_length: float | None = None,
               max_surface_temperature: float | None = None,
               outside_coefficient: float | None = None, emissivity: float | None = None,
               inside_coefficient: float | None = None,
               bracket: tuple[float, float] = SIZING_BRACKET,
               samples: int = 41) -> SizedLayer:
    r"""Return the smallest thickness of one layer (all else as given) that meets a maximum heat
    loss per metre or a maximum outer surface temperature, with the performance at it.

    .. math::
        t^* = \min\{\,t \in [t_{lo}, t_{hi}] : g(s) \le g_{max}\ \forall s \in [t, t_{hi}]\,\},
        \qquad g = |q'| \ \text{or}\ T_s

    Parameters
    ----------
    inner_diameter, thicknesses, conductivities, inside_temperature, ambient_temperature :
        As for :func:`cylindrical_layers_with_curves`; the thickness given for ``layer`` is
        replaced.
    layer : int
        Index of the layer to size (0 = innermost).
    max_q_per_length : float, optional
        Largest heat loss (or, for a cold pipe, gain) per metre |q'| [W/m], > 0.
    max_surface_temperature : float, optional
        Largest outer surface temperature [K], above ambient; hot pipes only (T_i > T_∞).
    outside_coefficient, emissivity, inside_coefficient : float, optional
        As for :func:`cylindrical_layers_with_curves`.
    bracket : (float, float)
        Thicknesses searched [m], 0 < t_lo < t_hi (default 1 mm to 1 m).
    samples : int
        Thicknesses sampled (geometrically spaced) across the bracket before the root search, >= 2.

    Returns
    -------
    SizedLayer
        ``thickness`` [m], ``performance`` (:class:`CurvedLayersFlow` at it), ``target``,
        ``met_at_lower_bound``, ``monotone``, ``iterations``.

    Notes
    -----
    Exactly one target. Thicker insulation need not mean less heat loss: the outer surface grows
    with the thickness, and while the outer diameter is below the critical diameter 2λ/h_o
    (a few tens of mm for λ ≈ 0.04 W/(m·K) and h_o ≈ 5–10 W/(m²·K) in still air) adding
    insulation raises q'. The surface temperature of a hot pipe falls with thickness wherever q'
    falls, since a larger surface losing less heat must be cooler; in still air this still holds,
    because the surface loss π D h_o(T_s, D)(T_s − T_∞) grows with both D and T_s. Outside the
    critical range both figures therefore fall with thickness, but a curve or an inner layer
    much more conductive than an outer one can break this. The search therefore samples the
    figure at ``samples`` thicknesses across the bracket, takes the thickest sample that misses
    the target, and solves between it and the next sample by Brent's method
    (scipy.optimize.brentq, to 10⁻¹² m): the result meets the target and so do the thicker
    samples. ``monotone`` says whether the sampled figure never rose with thickness;
    ``met_at_lower_bound`` whether the target is met already at the bracket's lower end (then
    ``thickness`` is that end). A target missed at the upper end raises
    :class:`~calcdoc.physics.PhysicsRangeError` naming the target, with the figure reached.

    Examples
    --------
    >>> curve = ConductivityCurve([273.15, 473.15], [0.035, 0.055])
    >>> s = size_layer(0.1, [0.05], [curve], 423.15, 293.15, 0, max_q_per_length=40.0,
    ...                outside_coefficient=10.0)
    >>> round(s.thickness * 1e3, 1), round(s.performance.flow.q_per_length, 6)
    (67.8, 40.0)

    References
    ----------
    1. EN ISO 12241:2008, Thermal insulation for building equipment and industrial installations
       — Calculation rules (insulation thickness for a given heat loss or surface temperature;
       from memory).
    2. Bergman, Lavine, Incropera, DeWitt. Fundamentals of Heat and Mass Transfer, 7th ed.
       Wiley, 2011. §3.3.1, critical insulation radius (from memory).
    """
    t = np.array(np.atleast_1d(thicknesses), dtype=float)
    if not (isinstance(layer, (int, np.integer)) and 0 <= int(layer) < t.size):
        raise PhysicsRangeError("layer", layer, f"a layer index from 0 to {t.size - 1}")
    if (max_q_per_length is None) == (max_surface_temperature is None):
        raise PhysicsRangeError("max_q_per_length", max_q_per_length,
                                "exactly one of max_q_per_length or max_surface_temperature")
    low, high = (float(value) for value in bracket)
    if not (math.isfinite(low) and math.isfinite(high) and 0.0 < low < high):
        raise PhysicsRangeError("bracket", bracket, "0 < lower < upper thickness [m]")
    if int(samples) < 2:
        raise PhysicsRangeError("samples", samples, "at least 2")
    T_i, T_a = float(inside_temperature), float(ambient_temperature)
    if max_q_per_length is not None:
        target_name, target = "max_q_per_length", float(max_q_per_length)
        if not (math.isfinite(target) and target > 0.0):
            raise PhysicsRangeError(target_name, target, "a heat flow per metre > 0 W/m")
    else:
        target_name, target = "max_surface_temperature", float(max_surface_temperature)
        if not T_i > T_a:
            raise PhysicsRangeError(target_name, target,
                                    "a hot pipe (inside above ambient): below ambient the surface "
                                    "warms towards ambient as the insulation thickens")
        if not (math.isfinite(target) and target > T_a):
            raise PhysicsRangeError(target_name, target,
                                    f"a temperature above ambient {T_a!r} K: the surface reaches "
                                    "ambient only with infinite insulation")

    def solve(thickness: float) -> CurvedLayersFlow:
        trial = t.copy()
        trial[int(layer)] = thickness
        return cylindrical_layers_with_curves(inner_diameter, trial, conductivities, T_i, T_a,
                                              outside_coefficient, emissivity, inside_coefficient)

    def figure(result: CurvedLayersFlow) -> float:
        if target_name == "max_q_per_length":
            return abs(result.flow.q_per_length)
        return result.flow.theta_surface

    grid = np.geomspace(low, high, int(samples))
    values = np.array([figure(solve(float(x))) for x in grid])
    unit = "W/m" if target_name == "max_q_per_length" else "K"
    if values[-1] > target:
        raise PhysicsRangeError(
            target_name, target,
            f"a target that layer {int(layer)} can meet within {low!r} m to {high!r} m of "
            f"thickness: at {high!r} m the figure is still {values[-1]:.6g} {unit}")
    monotone = bool(np.all(np.diff(values) <= 1e-12 * np.abs(values[:-1])))
    missed = np.nonzero(values > target)[0]
    if missed.size == 0:
        return SizedLayer(low, solve(low), target_name, True, monotone, 0)
    i = int(missed[-1])
    thickness, report = brentq(lambda x: figure(solve(x)) - target, float(grid[i]),
                               float(grid[i + 1]), xtol=1e-12, rtol=1e-12, full_output=True)
    return SizedLayer(float(thickness), solve(float(thickness)), target_name, False, monotone,
                      report.iterations)
