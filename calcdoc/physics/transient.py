r"""One-dimensional transient conduction through a layered wall or slab heated on one face.

The method, stated so that a checker can reproduce it:

* **Space.** Cell-centred finite volumes. Each layer (listed from the exposed face) is divided
  into equal cells wholly of its material; a cell's conductivity, density and specific heat are
  those of its own temperature. Two neighbouring cells exchange heat through the series
  resistance of their two half cells, G = 1 / (Δx₁/(2λ₁) + Δx₂/(2λ₂)) (the harmonic mean of the
  half-cell conductances), which is also how perfect contact between two layers is represented.
  Each face is a node without heat capacity, joined to its cell by the half-cell conductance 2λ/Δx.
* **Time.** Backward (implicit) Euler. It is L-stable and, because every matrix it produces is an
  M-matrix, it obeys a discrete maximum principle: no temperature overshoots or oscillates near
  the sudden onset of a fire or across the moisture plateau of concrete at 100–200 °C, where
  Crank–Nicolson rings with steps of practical size. Its first-order time error is controlled by
  the time step, which :func:`check_convergence` verifies.
* **Heat capacity.** The volumetric enthalpy H(T) = ∫ρ(T)c(T) dT of each layer is tabulated once
  (nodes every ``table_spacing`` kelvin and at each law breakpoint, trapezoidal integration); a
  cell's heat capacity over a step is the chord (H(Tⁿ⁺¹) − H(Tⁿ)) / (Tⁿ⁺¹ − Tⁿ). At convergence
  the stored energy change is therefore exactly H(Tⁿ⁺¹) − H(Tⁿ), including the step in c at
  100 °C, whatever the time step.
* **Nonlinearity.** Picard iteration within each step: conductivities, chord capacities and the
  radiative coefficients h_r = Φ ε σ (T_r² + T_s²)(T_r + T_s) (exact at convergence, and always
  positive, so the maximum principle holds in every iterate) are taken from the previous iterate
  and the tridiagonal system is solved with scipy's LAPACK tridiagonal solver (``dgtsv``, the
  routine behind :func:`scipy.linalg.solve_banded` for one sub- and super-diagonal) until no
  temperature changes by more than ``tolerance``. A step that does not converge is split in two.
* **Boundaries.** Exposed face: gas at θg(t) with convection αc and radiation
  Φ εm εf σ (T_g⁴ − T_s⁴) (EN 1991-1-2 §3.1, eqs. 3.1–3.3, with the radiation temperature taken
  as the gas temperature), or a held surface temperature. Unexposed face: convection (4 W/(m²·K),
  EN 1991-1-2 §3.1(5)) and radiation with emissivity εm (0.7) to surroundings at the ambient
  temperature (by default the initial temperature).

Defaults: cells of at most :data:`DEFAULT_CELL_SIZE` (2 mm) and at least
:data:`DEFAULT_MIN_CELLS` (8) per layer, time step :data:`DEFAULT_TIME_STEP` (10 s). For the
cases in tests/test_physics_transient.py (80 mm and 100 mm concrete at 1.5 % and 3 % moisture, and a
15 mm board over 80 mm of concrete, under the standard fire) halving both changes
``time_to_insulation`` by under 0.1 %, against docs/format.md's 1 %; any other case is checked with
:func:`check_convergence` (the wall_fire_exposure kind runs it every time).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Sequence

import numpy as np
from scipy.constants import Stefan_Boltzmann as SIGMA

from calcdoc.physics import MAX_CELL_STEPS, MAX_CELLS, MAX_TIME_STEPS, PhysicsRangeError
from calcdoc.physics.solvers import cumulative_trapezoid, dgtsv
from calcdoc.physics.thermal_laws import ThermalLaw, constant_law

__all__ = [
    "DEFAULT_CELL_SIZE", "DEFAULT_MIN_CELLS", "DEFAULT_TIME_STEP", "DEFAULT_TABLE_SPACING",
    "Layer", "FireExposure", "HeldTemperature", "Mesh", "TransientResult", "ConvergenceCheck",
    "solve_transient", "insulation_time", "check_convergence", "mesh_for",
]

DEFAULT_CELL_SIZE = 0.002
"""Largest cell in a layer by default [m]."""

DEFAULT_MIN_CELLS = 8
"""Fewest cells in a layer by default [-]."""

DEFAULT_TIME_STEP = 10.0
"""Default time step [s]."""

DEFAULT_TABLE_SPACING = 0.5
"""Default spacing of the property and enthalpy tables [K]."""

_CHORD_EPSILON = 1e-4  # K: below this change the tabulated ρc at the old temperature is used


# ---------------------------------------------------------------------------------- inputs


@dataclass(frozen=True)
class Layer:
    """One layer: ``thickness`` [m] and its :class:`~calcdoc.physics.thermal_laws.ThermalLaw`.

    Build it with :meth:`constant` for fixed properties or :meth:`from_functions` for any
    callables of temperature in K (each returning an array of the same shape).
    """

    thickness: float
    law: ThermalLaw
    name: str = ""

    @classmethod
    def constant(cls, thickness: float, conductivity: float, density: float,
                 specific_heat: float, name: str = "") -> "Layer":
        """Return a layer of fixed λ [W/(m·K)], ρ [kg/m³] and c [J/(kg·K)]."""
        return cls(thickness, constant_law(conductivity, density, specific_heat), name)

    @classmethod
    def from_functions(cls, thickness: float, conductivity: Callable, density: Callable,
                       specific_heat: Callable, name: str = "",
                       breakpoints: Sequence[float] = ()) -> "Layer":
        """Return a layer whose λ, ρ and c are callables of temperature [K]."""
        law = ThermalLaw("functions", conductivity, density, specific_heat, source="",
                         breakpoints=tuple(breakpoints))
        return cls(thickness, law, name)


@dataclass(frozen=True)
class FireExposure:
    """The exposed face heated by gas at ``gas_temperature(t)`` [K, t in s].

    ``convection`` αc [W/(m²·K)], ``emissivity_member`` εm [1], ``emissivity_fire`` εf [1] and
    ``configuration_factor`` Φ [1] enter EN 1991-1-2 §3.1 eqs. (3.2) and (3.3). The gas function
    should accept an array of times; a function of one float is also accepted.
    """

    gas_temperature: Callable
    convection: float = 25.0
    emissivity_member: float = 0.7
    emissivity_fire: float = 1.0
    configuration_factor: float = 1.0

    def __post_init__(self):
        # Checked here so that an error names the parameter as written to this constructor.
        if not (np.isfinite(self.convection) and self.convection >= 0.0):
            raise PhysicsRangeError("convection", self.convection, "a coefficient ≥ 0 W/(m²·K)")
        for name in ("emissivity_member", "emissivity_fire", "configuration_factor"):
            value = getattr(self, name)
            if not 0.0 <= value <= 1.0:
                raise PhysicsRangeError(name, value, "0 to 1")


@dataclass(frozen=True)
class HeldTemperature:
    """The exposed face held at ``surface_temperature(t)`` [K, t in s]."""

    surface_temperature: Callable


# --------------------------------------------------------------------------------- outputs


@dataclass(frozen=True)
class Mesh:
    """The discretisation used: cells and cell size per layer [-, m], time step [s], table [K]."""

    cells_per_layer: tuple[int, ...]
    cell_sizes: tuple[float, ...]
    time_step: float
    table_spacing: float
    tolerance: float

    @property
    def cells(self) -> int:
        return sum(self.cells_per_layer)


@dataclass(frozen=True)
class TransientResult:
    """Histories and profiles of one computation; temperatures in K, times in s, depths in m.

    ``node_depths`` are the exposed face, every cell centre, every layer interface and the
    unexposed face, increasing; ``profiles[i]`` is the temperature at those depths at
    ``report_times[i]``. ``monitors[j]`` is the history at ``monitor_depths[j]``, interpolated
    linearly between neighbouring nodes. Energies are per unit area [J/m²], cumulative from 0:
    ``heat_in`` through the exposed face, ``heat_out`` through the unexposed face, ``heat_stored``
    the rise of enthalpy; ``energy_balance_error`` is max |in − out − stored| / max |in|.
    ``layer_temperature_ranges`` gives (lowest, highest) temperature reached in each layer.
    """

    times: np.ndarray
    boundary_temperature: np.ndarray
    exposed_surface: np.ndarray
    unexposed_surface: np.ndarray
    initial_temperature: float
    monitor_depths: np.ndarray
    monitors: np.ndarray
    report_times: np.ndarray
    node_depths: np.ndarray
    profiles: np.ndarray
    heat_in: np.ndarray
    heat_out: np.ndarray
    heat_stored: np.ndarray
    energy_balance_error: float
    time_to_insulation: float | None
    insulation_rise: float
    decay_insulation_rise: float | None
    decay_from: float | None
    mesh: Mesh
    iterations: int
    split_steps: int
    layer_temperature_ranges: tuple[tuple[float, float], ...]
    layers: tuple[Layer, ...] = field(repr=False, default=())

    @property
    def unexposed_rise(self) -> np.ndarray:
        """Rise of the unexposed face above the initial temperature [K]."""
        return self.unexposed_surface - self.initial_temperature

    def outside_law_range(self) -> list[tuple[int, float, float, tuple[float, float]]]:
        """Return (layer index, lowest, highest, law range) for layers that left their law's range.

        Outside its range a law holds its end value (thermal_laws); the caller reports this.
        """
        found = []
        for i, (layer, (low, high)) in enumerate(zip(self.layers, self.layer_temperature_ranges)):
            lo, hi = layer.law.temperature_range
            if low < lo - 1e-6 or high > hi + 1e-6:
                found.append((i, low, high, (lo, hi)))
        return found


@dataclass(frozen=True)
class ConvergenceCheck:
    """Result of halving both cell size and time step (see :func:`check_convergence`)."""

    quantity: str
    value: float
    refined_value: float
    relative_change: float
    limit: float
    base: TransientResult = field(repr=False)
    refined: TransientResult = field(repr=False)

    @property
    def passed(self) -> bool:
        return self.relative_change < self.limit


# ----------------------------------------------------------------------------- tabulation


class _Tables:
    """Conductivity, ρc and enthalpy of every layer in one shifted table (one np.interp each)."""

    def __init__(self, layers: Sequence[Layer], low: float, high: float, spacing: float):
        self.low = low
        self.span = (high - low) + 10.0 * spacing + 1.0
        grids, ks, rcs, hs = [], [], [], []
        for index, layer in enumerate(layers):
            grid = np.arange(low, high + spacing, spacing)
            inside = [b for b in layer.law.breakpoints if low < b < high]
            nudge = 1e-7 * max(1.0, spacing)
            grid = np.unique(np.concatenate([grid, [b - nudge for b in inside],
                                             [b + nudge for b in inside]]))
            k = np.asarray(layer.law.conductivity(grid), dtype=float) * np.ones_like(grid)
            rc = (np.asarray(layer.law.density(grid), dtype=float)
                  * np.asarray(layer.law.specific_heat(grid), dtype=float)) * np.ones_like(grid)
            for quantity, values in (("conductivity", k), ("volumetric heat capacity", rc)):
                if not np.all(np.isfinite(values)) or np.any(values <= 0.0):
                    bad = values[~(np.isfinite(values) & (values > 0.0))][0]
                    raise PhysicsRangeError("layers", float(bad), f"a law giving a positive "
                                            f"finite {quantity} over the temperatures met",
                                            index=index)
            enthalpy = cumulative_trapezoid(rc, grid, initial=0.0)
            offset = index * self.span
            grids.append(grid + offset)
            ks.append(k)
            rcs.append(rc)
            hs.append(enthalpy)
        self.grid = np.concatenate(grids)
        self.k = np.concatenate(ks)
        self.rc = np.concatenate(rcs)
        self.h = np.concatenate(hs)

    def conductivity(self, ts: np.ndarray) -> np.ndarray:
        return np.interp(ts, self.grid, self.k)

    def capacity(self, ts: np.ndarray) -> np.ndarray:
        return np.interp(ts, self.grid, self.rc)

    def enthalpy(self, ts: np.ndarray) -> np.ndarray:
        return np.interp(ts, self.grid, self.h)


# ------------------------------------------------------------------------------- the solver


def mesh_for(layers: Sequence[Layer], cell_size: float = DEFAULT_CELL_SIZE,
             min_cells: int = DEFAULT_MIN_CELLS) -> tuple[int, ...]:
    """Return the number of cells in each layer: at least ``min_cells``, cells ≤ ``cell_size`` [m]."""
    if not cell_size > 0.0:
        raise PhysicsRangeError("cell_size", cell_size, "a positive length in m")
    return tuple(max(int(min_cells), math.ceil(layer.thickness / cell_size - 1e-9))
                 for layer in layers)


def _evaluate(function: Callable, times: np.ndarray) -> np.ndarray:
    """Evaluate a function of time on an array, accepting functions of one float too."""
    try:
        values = np.asarray(function(times), dtype=float)
        if values.shape == times.shape:
            return values
        if values.ndim == 0:
            return np.full_like(times, float(values))
    except (TypeError, ValueError):
        pass
    return np.array([float(function(float(t))) for t in times])


def _time_grid(duration: float, time_step: float, forced: Sequence[float]) -> np.ndarray:
    count = max(1, math.ceil(duration / time_step - 1e-9))
    regular = np.linspace(0.0, duration, count + 1)
    extra = [t for t in forced if 0.0 < t < duration]
    grid = np.unique(np.concatenate([regular, extra]))
    # Drop regular points that would leave a sliver step next to a forced time.
    keep = np.ones(grid.size, dtype=bool)
    forced_set = np.array(sorted(set(extra)))
    if forced_set.size:
        for i in range(1, grid.size - 1):
            if np.min(np.abs(forced_set - grid[i])) == 0.0:
                continue
            near = np.min(np.abs(forced_set - grid[i]))
            if near < 1e-3 * time_step:
                keep[i] = False
    return grid[keep]


def _check(quantity: str, value: float, ok: bool, expected: str, index: int | None = None) -> None:
    if not ok:
        raise PhysicsRangeError(quantity, value, expected, index)


def solve_transient(
    layers: Sequence[Layer],
    exposed: FireExposure | HeldTemperature,
    duration: float,
    *,
    initial_temperature: float = 293.15,
    ambient_temperature: float | None = None,
    unexposed_convection: float = 4.0,
    unexposed_emissivity: float = 0.7,
    monitor_depths: Sequence[float] = (),
    report_times: Sequence[float] = (),
    insulation_rise: float = 140.0,
    decay_insulation_rise: float | None = None,
    decay_from: float | None = None,
    cell_size: float = DEFAULT_CELL_SIZE,
    min_cells: int = DEFAULT_MIN_CELLS,
    cells_per_layer: Sequence[int] | None = None,
    time_step: float = DEFAULT_TIME_STEP,
    table_spacing: float = DEFAULT_TABLE_SPACING,
    tolerance: float = 1e-3,
    max_iterations: int = 30,
    on_step: Callable[[float], None] | None = None,
) -> TransientResult:
    r"""Return temperature histories of a layered element heated on one face (implicit FV).

    .. math::

        \frac{H_i(T_i^{n+1}) - H_i(T_i^{n})}{\Delta t}\,\Delta x_i
        = G_{i-1/2}\,(T_{i-1}^{n+1} - T_i^{n+1}) + G_{i+1/2}\,(T_{i+1}^{n+1} - T_i^{n+1}),
        \qquad G_{i+1/2} = \Big(\frac{\Delta x_i}{2\lambda_i} + \frac{\Delta x_{i+1}}{2\lambda_{i+1}}\Big)^{-1}

        \dot h_\mathrm{net} = \alpha_c (\theta_g - \theta_m)
        + \Phi\,\varepsilon_m \varepsilon_f\,\sigma\,\big[(\theta_g + 273)^4 - (\theta_m + 273)^4\big]

    Parameters
    ----------
    layers : sequence of Layer
        Layers from the exposed face; thickness [m] and law (λ [W/(m·K)], ρ [kg/m³],
        c [J/(kg·K)] as functions of T [K]).
    exposed : FireExposure or HeldTemperature
        Gas temperature [K] with αc [W/(m²·K)], εm, εf, Φ [1]; or a held surface temperature [K].
    duration : float
        Simulated time [s].
    initial_temperature : float
        Uniform initial temperature [K]; the insulation rise is measured from it.
    ambient_temperature : float, optional
        Surroundings of the unexposed face [K]; default the initial temperature.
    unexposed_convection : float
        αc on the unexposed face [W/(m²·K)]; 4 per EN 1991-1-2 §3.1(5).
    unexposed_emissivity : float
        Surface emissivity of the unexposed face [1]; 0.7 (concrete, EN 1992-1-2 §2.2(2)).
    monitor_depths : sequence of float
        Depths from the exposed face whose histories are returned [m].
    report_times : sequence of float
        Times at which whole profiles are returned [s]; each becomes a step boundary.
    insulation_rise : float
        Rise of the unexposed face that ends insulation [K]; 140 (EN 1363-1, EN 1991-1-2 §2.1.3).
    decay_insulation_rise : float, optional
        Rise that applies after ``decay_from`` instead [K] (parametric fire, decay phase).
    decay_from : float, optional
        Time from which ``decay_insulation_rise`` applies, e.g. the time of the gas peak [s].
    cell_size, min_cells, cells_per_layer
        Largest cell [m] and fewest cells per layer [-], or the cells of each layer explicitly.
    time_step : float
        Step [s]; report times and ``decay_from`` are added as step boundaries.
    table_spacing : float
        Spacing of the property tables [K].
    tolerance : float
        Picard convergence: largest temperature change between iterates [K].
    max_iterations : int
        Iterations before a step is split in two [-].
    on_step : callable, optional
        Called with the time reached [s] after each step, for a progress display; it must not
        change anything the solver uses.

    Returns
    -------
    TransientResult
        Times [s], face, monitor and profile temperatures [K], energies [J/m²], the time to
        insulation [s] (None when not reached) and the mesh used.

    Notes
    -----
    One-dimensional conduction with perfect contact between layers, no mass transfer (moisture
    enters only through the specific-heat peak of the law, EN 1992-1-2 §3.3.2(2)) and no spalling
    or fall-off of layers. Laws hold their end values outside their range; the result records the
    temperatures reached per layer (:meth:`TransientResult.outside_law_range`). Insulation is
    judged on the rise of the unexposed face node above ``initial_temperature``.

    Examples
    --------
    >>> wall = [Layer.constant(0.1, 1.0, 2000.0, 1000.0)]
    >>> r = solve_transient(wall, HeldTemperature(lambda t: 393.15), 3600.0)
    >>> bool(r.energy_balance_error < 1e-3)
    True

    References
    ----------
    1. EN 1991-1-2:2002, Eurocode 1: Actions on structures, Part 1-2: Actions on structures
       exposed to fire, §3.1, eqs. (3.1)–(3.3) and §3.1(5).
    2. EN 1991-1-2:2002, §2.1.3 (insulation criteria, including the decay phase).
    3. S. V. Patankar, Numerical Heat Transfer and Fluid Flow, 1980, §4.2 (harmonic-mean
       interface conductivity, implicit scheme).
    """
    layers = tuple(layers)
    _check("layers", len(layers), len(layers) >= 1, "at least one layer")
    for i, layer in enumerate(layers):
        _check("layers", layer.thickness, np.isfinite(layer.thickness) and layer.thickness > 0.0,
               "a layer of positive thickness in m", i)
    _check("duration", duration, np.isfinite(duration) and duration > 0.0, "a positive time in s")
    _check("time_step", time_step, np.isfinite(time_step) and 0.0 < time_step <= duration,
           f"a positive time in s, at most the duration {duration:g} s")
    _check("initial_temperature", initial_temperature,
           np.isfinite(initial_temperature) and initial_temperature > 0.0, "a temperature > 0 K")
    ambient = initial_temperature if ambient_temperature is None else float(ambient_temperature)
    _check("ambient_temperature", ambient, np.isfinite(ambient) and ambient > 0.0,
           "a temperature > 0 K")
    _check("unexposed_convection", unexposed_convection, unexposed_convection >= 0.0,
           "a coefficient ≥ 0 W/(m²·K)")
    _check("unexposed_emissivity", unexposed_emissivity, 0.0 <= unexposed_emissivity <= 1.0,
           "0 to 1")
    _check("insulation_rise", insulation_rise, insulation_rise > 0.0, "a rise > 0 K")
    if (decay_insulation_rise is None) != (decay_from is None):
        raise PhysicsRangeError("decay_insulation_rise", decay_insulation_rise,
                                "given together with the time it applies from")
    if decay_insulation_rise is not None:
        _check("decay_insulation_rise", decay_insulation_rise, decay_insulation_rise > 0.0,
               "a rise > 0 K")
        _check("decay_from", decay_from, decay_from >= 0.0, "a time ≥ 0 s")
    if not isinstance(exposed, (FireExposure, HeldTemperature)):  # a FireExposure checks itself
        raise PhysicsRangeError("exposed", type(exposed).__name__,
                                "FireExposure or HeldTemperature")
    total = float(sum(layer.thickness for layer in layers))
    monitor_depths = np.asarray(monitor_depths, dtype=float).reshape(-1)
    for j, depth in enumerate(monitor_depths):
        _check("monitor_depths", depth, 0.0 <= depth <= total * (1 + 1e-12),
               f"a depth from 0 to {total:g} m (the total thickness)", j)
    report_times = np.asarray(report_times, dtype=float).reshape(-1)
    for j, t in enumerate(report_times):
        _check("report_times", t, 0.0 <= t <= duration * (1 + 1e-12),
               f"a time from 0 to the duration {duration:g} s", j)

    # ---- mesh
    if cells_per_layer is None:
        cells = mesh_for(layers, cell_size, min_cells)
    else:
        cells = tuple(int(n) for n in cells_per_layer)
        _check("cells_per_layer", len(cells), len(cells) == len(layers) and min(cells) >= 1,
               "one positive count per layer")
    total_cells = sum(cells)
    _check("cell_size" if cells_per_layer is None else "cells_per_layer",
           cell_size if cells_per_layer is None else total_cells,
           total_cells <= MAX_CELLS, f"a mesh of at most {MAX_CELLS} cells (this one has "
           f"{total_cells})")
    steps = float(duration) / float(time_step)
    _check("time_step", time_step, steps <= MAX_TIME_STEPS,
           f"at most {MAX_TIME_STEPS} steps over the duration (this one takes {steps:.0f})")
    _check("time_step", time_step, steps * total_cells <= MAX_CELL_STEPS,
           f"at most {MAX_CELL_STEPS:.0e} cell-steps ({total_cells} cells × {steps:.0f} steps "
           "here): a larger time step or cell size")
    dx = np.concatenate([np.full(n, layer.thickness / n) for n, layer in zip(cells, layers)])
    n_cells = dx.size
    layer_of_cell = np.repeat(np.arange(len(layers)), cells)
    edges = np.concatenate([[0.0], np.cumsum(dx)])
    centres = 0.5 * (edges[:-1] + edges[1:])
    half_resistance_factor = 0.5 * dx  # R_half = (Δx/2) / λ

    forced = list(report_times)
    if decay_from is not None:
        forced.append(float(decay_from))
    times = _time_grid(float(duration), float(time_step), forced)

    if isinstance(exposed, FireExposure):
        boundary = _evaluate(exposed.gas_temperature, times)
        held = False
        h_c = float(exposed.convection)
        rad = (float(exposed.configuration_factor) * float(exposed.emissivity_member)
               * float(exposed.emissivity_fire) * SIGMA)
    else:
        boundary = _evaluate(exposed.surface_temperature, times)
        held = True
        h_c = rad = 0.0
    if not np.all(np.isfinite(boundary)) or np.any(boundary <= 0.0):
        raise PhysicsRangeError("exposed",
                                float(boundary[~(np.isfinite(boundary) & (boundary > 0))][0]),
                                "finite temperatures > 0 K at every step")
    h_cu = float(unexposed_convection)
    rad_u = float(unexposed_emissivity) * SIGMA

    # ---- property tables over every temperature the maximum principle allows
    t_low = min(float(boundary.min()), initial_temperature, ambient) - 5.0
    t_high = max(float(boundary.max()), initial_temperature, ambient) + 5.0
    tables = _Tables(layers, t_low, t_high, table_spacing)
    shift = layer_of_cell * tables.span  # table coordinate = T + shift

    # ---- state: x = [exposed face, cells..., unexposed face]
    size = n_cells + 2
    x = np.full(size, float(initial_temperature))
    if held:
        x[0] = boundary[0]
    history = np.empty((times.size, size))
    history[0] = x
    heat_in = np.zeros(times.size)
    heat_out = np.zeros(times.size)
    ab = np.zeros((3, size))
    counters = {"iterations": 0, "splits": 0}

    def advance(x_old: np.ndarray, x_guess: np.ndarray, dt: float, t_new: float,
                boundary_new: float, depth: int = 0):
        """One backward-Euler step; returns (x_new, q_in, q_out) or splits the step."""
        cells_old = x_old[1:-1]
        s_old = cells_old + shift
        h_old = tables.enthalpy(s_old)
        rc_old = tables.capacity(s_old)
        xk = x_guess.copy()
        for _ in range(max_iterations):
            counters["iterations"] += 1
            cells_k = xk[1:-1]
            s_k = cells_k + shift
            k = tables.conductivity(s_k)
            change = cells_k - cells_old
            small = np.abs(change) < _CHORD_EPSILON
            chord = (tables.enthalpy(s_k) - h_old) / np.where(small, 1.0, change)
            capacity = np.where(small, rc_old, chord)
            r_half = half_resistance_factor / k
            conductance = 1.0 / np.concatenate(([r_half[0]], r_half[:-1] + r_half[1:],
                                                [r_half[-1]]))
            a = capacity * dx / dt
            ab[0, 1:] = -conductance
            ab[2, :-1] = -conductance
            ab[1, 1:-1] = a + conductance[:-1] + conductance[1:]
            rhs = np.empty(size)
            rhs[1:-1] = a * cells_old
            if held:
                ab[1, 0] = 1.0
                ab[0, 1] = 0.0
                rhs[0] = boundary_new
            else:
                ts = xk[0]
                h_r = rad * (boundary_new ** 2 + ts ** 2) * (boundary_new + ts)
                ab[1, 0] = conductance[0] + h_c + h_r
                rhs[0] = (h_c + h_r) * boundary_new
            tu = xk[-1]
            h_ru = rad_u * (ambient ** 2 + tu ** 2) * (ambient + tu)
            ab[1, -1] = conductance[-1] + h_cu + h_ru
            rhs[-1] = (h_cu + h_ru) * ambient
            # LAPACK's tridiagonal solver (scipy's banded solver without its per-call checks)
            _, _, _, x_new, info = dgtsv(ab[2, :-1], ab[1], ab[0, 1:], rhs, 1, 1, 1, 1)
            if info != 0:
                raise RuntimeError(f"tridiagonal solve failed (LAPACK dgtsv info {info})")
            delta = float(np.max(np.abs(x_new - xk)))
            xk = x_new
            if delta < tolerance:
                break
        else:
            if depth >= 12:
                raise RuntimeError(
                    f"transient conduction did not converge near t = {t_new:g} s "
                    f"(step split {depth} times)")
            counters["splits"] += 1
            half = 0.5 * dt
            t_mid = t_new - half
            boundary_mid = (float(_evaluate(exposed.gas_temperature if not held
                                            else exposed.surface_temperature,
                                            np.array([t_mid]))[0]))
            x_mid, q_in1, q_out1 = advance(x_old, x_old, half, t_mid, boundary_mid, depth + 1)
            x_end, q_in2, q_out2 = advance(x_mid, x_mid, half, t_new, boundary_new, depth + 1)
            return x_end, 0.5 * (q_in1 + q_in2), 0.5 * (q_out1 + q_out2)
        # Fluxes at the converged state, from the same conductances as the last solve.
        if held:
            q_in = conductance[0] * (xk[0] - xk[1])
        else:
            ts = xk[0]
            q_in = h_c * (boundary_new - ts) + rad * (boundary_new ** 4 - ts ** 4)
        tu = xk[-1]
        q_out = h_cu * (tu - ambient) + rad_u * (tu ** 4 - ambient ** 4)
        return xk, q_in, q_out

    previous_dt = None
    x_before = x.copy()
    for n in range(1, times.size):
        dt = times[n] - times[n - 1]
        if previous_dt is None:
            guess = x
        else:
            guess = x + (x - x_before) * (dt / previous_dt)
            if held:
                guess[0] = boundary[n]
        x_new, q_in, q_out = advance(x, guess, dt, times[n], float(boundary[n]))
        x_before, x = x, x_new
        previous_dt = dt
        history[n] = x
        if on_step is not None:
            on_step(float(times[n]))
        heat_in[n] = heat_in[n - 1] + q_in * dt
        heat_out[n] = heat_out[n - 1] + q_out * dt

    # ---- post-processing
    cell_history = history[:, 1:-1]
    shifted_history = cell_history + shift
    h0 = tables.enthalpy(np.full(n_cells, float(initial_temperature)) + shift)
    heat_stored = (tables.enthalpy(shifted_history) - h0) @ dx
    scale = max(float(np.max(np.abs(heat_in))), float(np.max(np.abs(heat_stored))), 1e-300)
    energy_error = float(np.max(np.abs(heat_in - heat_out - heat_stored))) / scale

    # interface temperatures by continuity of flux across the two half cells
    boundaries_idx = np.cumsum(cells)[:-1]  # first cell of each following layer
    depths = [0.0, *centres, total]
    columns = [history[:, 0], *cell_history.T, history[:, -1]]
    if boundaries_idx.size:
        k_history = tables.conductivity(shifted_history)
        g = k_history / half_resistance_factor
        for b in boundaries_idx:
            ga, gb = g[:, b - 1], g[:, b]
            t_interface = (ga * cell_history[:, b - 1] + gb * cell_history[:, b]) / (ga + gb)
            depths.append(edges[b])
            columns.append(t_interface)
    order = np.argsort(depths, kind="stable")
    node_depths = np.asarray(depths)[order]
    node_history = np.column_stack(columns)[:, order]

    monitors = np.empty((monitor_depths.size, times.size))
    for j, depth in enumerate(monitor_depths):
        i = int(np.clip(np.searchsorted(node_depths, depth, side="right") - 1, 0,
                        node_depths.size - 2))
        span = node_depths[i + 1] - node_depths[i]
        w = 0.0 if span <= 0 else (depth - node_depths[i]) / span
        monitors[j] = (1 - w) * node_history[:, i] + w * node_history[:, i + 1]

    report_rows = [int(np.argmin(np.abs(times - t))) for t in report_times]
    profiles = node_history[report_rows] if report_rows else np.empty((0, node_depths.size))

    ranges = []
    for index in range(len(layers)):
        columns_l = np.nonzero(layer_of_cell == index)[0]
        lo_edge, hi_edge = edges[columns_l[0]], edges[columns_l[-1] + 1]
        in_layer = (node_depths >= lo_edge - 1e-12) & (node_depths <= hi_edge + 1e-12)
        values = node_history[:, in_layer]
        ranges.append((float(values.min()), float(values.max())))

    unexposed = history[:, -1]
    t_insulation = insulation_time(times, unexposed - initial_temperature, insulation_rise,
                                   decay_insulation_rise, decay_from)
    mesh = Mesh(cells, tuple(layer.thickness / n for n, layer in zip(cells, layers)),
                float(time_step), float(table_spacing), float(tolerance))
    return TransientResult(
        times=times, boundary_temperature=boundary, exposed_surface=history[:, 0].copy(),
        unexposed_surface=unexposed.copy(), initial_temperature=float(initial_temperature),
        monitor_depths=monitor_depths, monitors=monitors, report_times=report_times,
        node_depths=node_depths, profiles=profiles, heat_in=heat_in, heat_out=heat_out,
        heat_stored=heat_stored, energy_balance_error=energy_error,
        time_to_insulation=t_insulation, insulation_rise=float(insulation_rise),
        decay_insulation_rise=None if decay_insulation_rise is None
        else float(decay_insulation_rise),
        decay_from=None if decay_from is None else float(decay_from), mesh=mesh,
        iterations=counters["iterations"], split_steps=counters["splits"],
        layer_temperature_ranges=tuple(ranges), layers=layers)


def insulation_time(times, rise, threshold: float, decay_threshold: float | None = None,
                    decay_from: float | None = None) -> float | None:
    r"""Return the first time the rise exceeds its limit, by linear interpolation [s], or None.

    .. math::

        t_I = t_j + (t_{j+1} - t_j)\,\frac{\Delta\theta_\mathrm{lim} - \Delta\theta_j}
              {\Delta\theta_{j+1} - \Delta\theta_j},
        \qquad \Delta\theta_\mathrm{lim} = \begin{cases}
        \Delta\theta_1 & t \le t_\mathrm{decay}\\ \Delta\theta_2 & t > t_\mathrm{decay}\end{cases}

    Parameters
    ----------
    times : array
        Increasing times [s].
    rise : array
        Rise of the unexposed face above the initial temperature at those times [K].
    threshold : float
        Limit Δθ₁ [K] (140 K for the mean rise, EN 1363-1 and EN 1991-1-2 §2.1.3).
    decay_threshold : float, optional
        Limit Δθ₂ after ``decay_from`` [K] (parametric fire, decay phase: nationally determined).
    decay_from : float, optional
        Time after which Δθ₂ applies [s] (the time of the peak gas temperature).

    Returns
    -------
    float or None
        Time at which the rise first exceeds the limit that applies [s]; None if never.

    Notes
    -----
    The limit is a step function of time; a sample exactly at ``decay_from`` is judged against
    Δθ₁. Where ``decay_from`` falls between samples the rise there is interpolated linearly.

    Examples
    --------
    >>> insulation_time([0.0, 60.0, 120.0], [0.0, 100.0, 200.0], 140.0)
    84.0

    References
    ----------
    1. EN 1991-1-2:2002, §2.1.3 (insulation criterion, heating and decay phases).
    2. EN 1363-1:2012, Fire resistance tests, Part 1: General requirements (insulation:
       mean rise 140 K), from memory.
    """
    t = np.asarray(times, dtype=float)
    d = np.asarray(rise, dtype=float)
    if t.shape != d.shape or t.ndim != 1 or t.size < 1:
        raise PhysicsRangeError("rise", t.shape, "times and rises of equal length")
    if decay_threshold is not None and decay_from is not None and t[0] < decay_from < t[-1] \
            and not np.any(t == decay_from):
        j = int(np.searchsorted(t, decay_from))
        d_at = np.interp(decay_from, t, d)
        t = np.insert(t, j, decay_from)
        d = np.insert(d, j, d_at)
    if decay_threshold is None or decay_from is None:
        limit = np.full_like(t, float(threshold))
    else:
        limit = np.where(t <= decay_from, float(threshold), float(decay_threshold))
    if d[0] > limit[0]:
        return float(t[0])
    for j in range(t.size - 1):
        # The interval (t_j, t_j+1] carries the limit of its right end.
        lim = limit[j + 1]
        if d[j + 1] > lim:
            if d[j] >= lim:
                return float(t[j])
            return float(t[j] + (t[j + 1] - t[j]) * (lim - d[j]) / (d[j + 1] - d[j]))
    return None


def check_convergence(layers: Sequence[Layer], exposed: FireExposure | HeldTemperature,
                      duration: float, *, limit: float = 0.01, **options) -> ConvergenceCheck:
    """Return the change in time to insulation when cell size and time step are both halved.

    Runs :func:`solve_transient` with ``options`` (default mesh and step unless given) and again
    with every layer's cell count doubled and the time step halved. The compared quantity is
    ``time_to_insulation``; where insulation is not reached in either run, the rise of the
    unexposed face at the end is compared instead. ``limit`` is the largest acceptable relative
    change [1] (0.01: 1 %, docs/format.md's requirement for the default mesh).
    """
    layers = tuple(layers)
    base = solve_transient(layers, exposed, duration, **options)
    refined_options = dict(options)
    refined_options.pop("cell_size", None)
    refined_options.pop("min_cells", None)
    refined_options["cells_per_layer"] = tuple(2 * n for n in base.mesh.cells_per_layer)
    refined_options["time_step"] = 0.5 * base.mesh.time_step
    refined = solve_transient(layers, exposed, duration, **refined_options)
    if base.time_to_insulation is not None and refined.time_to_insulation is not None:
        quantity = "time_to_insulation"
        value, refined_value = base.time_to_insulation, refined.time_to_insulation
    elif base.time_to_insulation is None and refined.time_to_insulation is None:
        quantity = "unexposed_rise_end"
        value, refined_value = float(base.unexposed_rise[-1]), float(refined.unexposed_rise[-1])
    else:
        # Reached in one run and not the other: compare against the duration.
        quantity = "time_to_insulation"
        value = base.time_to_insulation if base.time_to_insulation is not None else duration
        refined_value = (refined.time_to_insulation if refined.time_to_insulation is not None
                         else duration)
    change = abs(value - refined_value) / max(abs(refined_value), 1e-300)
    return ConvergenceCheck(quantity, float(value), float(refined_value), float(change),
                            float(limit), base, refined)
