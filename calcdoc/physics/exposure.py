"""Radiant exposure of a receiving plane parallel to a plane of emitting rectangles.

The emitting plane holds one or more rectangles (openings, panels), each a uniform diffuse
emitter of emissive power E. The receiving plane is parallel to it at a separation; a point of
it is given by the coordinates of its foot point in the emitting plane (same x and y axes). A
receiver there is a small element facing the emitters, so its incident flux is
:math:`q = \\sum_i E_i F_{d \\to i}` with the element factor of
:func:`calcdoc.physics.viewfactors.element_to_rectangle`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.solvers import brentq, minimize, minimize_scalar

__all__ = [
    "Emitter",
    "WorstPoint",
    "MinimumSeparation",
    "incident_flux",
    "worst_point",
    "flux_against_separation",
    "minimum_separation",
]


class Emitter(NamedTuple):
    """A uniform diffuse emitting rectangle in the emitting plane (lengths in m, E in W/m²)."""

    x: float
    """x of the lower-left corner [m]."""
    y: float
    """y of the lower-left corner [m]."""
    width: float
    """Extent along x [m], > 0."""
    height: float
    """Extent along y [m], > 0."""
    emissive_power: float
    """Emissive power E = εσT⁴ [W/m²], > 0."""


class WorstPoint(NamedTuple):
    """The point of the receiving plane with the highest incident flux."""

    x: float
    """x of the worst point [m]."""
    y: float
    """y of the worst point [m]."""
    q: float
    """Incident flux there [W/m²]."""


class MinimumSeparation(NamedTuple):
    """The smallest separation at which the limit flux is met, and the point that governs."""

    separation: float
    """Minimum separation [m]; 0 when the limit is met at every separation."""
    met_at_contact: bool
    """True when the limit is met at every separation, down to contact (then separation = 0)."""
    x: float
    """x of the governing point at that separation: the worst point or the given receiver [m]."""
    y: float
    """y of the governing point [m]."""
    q: float
    """Incident flux at the governing point at that separation [W/m²] (= the limit); when the
    limit is met at every separation, the highest flux found at any separation."""


class _Emitters(NamedTuple):
    x: np.ndarray
    y: np.ndarray
    width: np.ndarray
    height: np.ndarray
    emissive_power: np.ndarray

    @property
    def extent(self) -> tuple[float, float, float, float]:
        return (float(self.x.min()), float((self.x + self.width).max()),
                float(self.y.min()), float((self.y + self.height).max()))


def _emitters(emitters: Sequence[Emitter]) -> _Emitters:
    """The emitters as arrays, checked: at least one, sizes and E > 0, no two overlapping."""
    if len(emitters) == 0:
        raise PhysicsRangeError("emitters", 0, "at least one emitting rectangle")
    rows = []
    for index, emitter in enumerate(emitters):
        x, y, width, height, power = (float(v) for v in emitter)
        for name, value in (("x", x), ("y", y)):
            if not math.isfinite(value):
                raise PhysicsRangeError(f"emitters.{name}", value, "a finite coordinate",
                                        index=index)
        for name, value in (("width", width), ("height", height)):
            if not (math.isfinite(value) and value > 0.0):
                raise PhysicsRangeError(f"emitters.{name}", value, "a length > 0 m", index=index)
        if not (math.isfinite(power) and power > 0.0):
            raise PhysicsRangeError("emitters.emissive_power", power,
                                    "an emissive power > 0 W/m^2", index=index)
        rows.append((x, y, width, height, power))
    array = np.array(rows)
    packed = _Emitters(*(array[:, k].copy() for k in range(5)))
    x0, x1, y0, y1 = packed.extent
    tolerance = 1e-9 * max(x1 - x0, y1 - y0)
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            overlap_x = (min(rows[i][0] + rows[i][2], rows[j][0] + rows[j][2])
                         - max(rows[i][0], rows[j][0]))
            overlap_y = (min(rows[i][1] + rows[i][3], rows[j][1] + rows[j][3])
                         - max(rows[i][1], rows[j][1]))
            if overlap_x > tolerance and overlap_y > tolerance:
                raise PhysicsRangeError("emitters", f"overlaps emitters[{i}]",
                                        "emitting rectangles that do not overlap", index=j)
    return packed


def _separation(value: float) -> float:
    s = float(value)
    if not (math.isfinite(s) and s > 0.0):
        raise PhysicsRangeError("separation", s, "a separation > 0 m")
    return s


def _corner_sums(right, left, above, below, want_slopes: bool = False):
    """Sum of the four signed case B-3 corner factors at dimensionless distances to the edges.

    ``right``, ``left``, ``above``, ``below`` are the distances from the foot point to the
    emitter's edges divided by the separation (negative beyond an edge); they broadcast, so a
    grid passes its columns and rows separately and the square roots are taken once per column
    and per row. The same sum as ``viewfactors._corner_factor`` over the four corners (Howell
    case B-3 by superposition), arranged for speed: the corners share their square roots, and
    each pair of arctangents with a common root is one ``arctan2`` by the addition formula
    arctan(p/r) + arctan(q/r) = arg((r + ip)(r + iq)) (r > 0, so no branch is crossed). With
    ``want_slopes`` the partial derivatives of the sum in each of the four distances are
    returned as well (d/d right, d/d left, d/d above, d/d below), reusing the same arctangents.
    """
    width = right + left
    height = above + below
    r2_right = 1.0 + right * right
    r2_left = 1.0 + left * left
    r2_above = 1.0 + above * above
    r2_below = 1.0 + below * below
    root_right = np.sqrt(r2_right)
    root_left = np.sqrt(r2_left)
    root_above = np.sqrt(r2_above)
    root_below = np.sqrt(r2_below)
    vertical = above * below
    horizontal = right * left
    # Σ_v arctan(v / r_u) for u = right, left; Σ_u arctan(u / r_v) for v = above, below
    t_right = np.arctan2(root_right * height, r2_right - vertical)
    t_left = np.arctan2(root_left * height, r2_left - vertical)
    t_above = np.arctan2(root_above * width, r2_above - horizontal)
    t_below = np.arctan2(root_below * width, r2_below - horizontal)
    total = (right / root_right * t_right + left / root_left * t_left
             + above / root_above * t_above + below / root_below * t_below) / (2.0 * np.pi)
    if not want_slopes:
        return total
    # d/dA of the B-3 factor is [arctan(B/r)/r³ + B/(r²(r² + B²))]/(2π), r² = 1 + A²
    above2, below2 = above * above, below * below
    d_ra = 1.0 / (r2_right + above2)
    d_rb = 1.0 / (r2_right + below2)
    d_la = 1.0 / (r2_left + above2)
    d_lb = 1.0 / (r2_left + below2)
    slope_right = (t_right / (r2_right * root_right) + (above * d_ra + below * d_rb) / r2_right)
    slope_left = (t_left / (r2_left * root_left) + (above * d_la + below * d_lb) / r2_left)
    slope_above = (t_above / (r2_above * root_above) + (right * d_ra + left * d_la) / r2_above)
    slope_below = (t_below / (r2_below * root_below) + (right * d_rb + left * d_lb) / r2_below)
    scale = 1.0 / (2.0 * np.pi)
    return (total, slope_right * scale, slope_left * scale, slope_above * scale,
            slope_below * scale)


def _flux(packed: _Emitters, separation: float, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Incident flux at foot points (x, y), broadcast, without re-checking the input."""
    x = np.asarray(x, dtype=float)[..., None] / separation
    y = np.asarray(y, dtype=float)[..., None] / separation
    x_left, x_right = packed.x / separation, (packed.x + packed.width) / separation
    y_below, y_above = packed.y / separation, (packed.y + packed.height) / separation
    factor = _corner_sums(x_right - x, x - x_left, y_above - y, y - y_below)
    return np.sum(factor * packed.emissive_power, axis=-1)


def _flux_and_gradient(packed: _Emitters, separation: float,
                       point: np.ndarray) -> tuple[float, np.ndarray]:
    """Incident flux at one foot point and its gradient in (x, y), for the local optimiser."""
    c = separation
    left = (point[0] - packed.x) / c
    right = (packed.x + packed.width - point[0]) / c
    below = (point[1] - packed.y) / c
    above = (packed.y + packed.height - point[1]) / c
    power = packed.emissive_power
    factor, d_right, d_left, d_above, d_below = _corner_sums(right, left, above, below, True)
    # right and above fall, left and below grow as the point moves by +x, +y
    gradient = np.array([power @ (d_left - d_right), power @ (d_below - d_above)]) / c
    return float(power @ factor), gradient


def incident_flux(emitters: Sequence[Emitter], separation: float, x: ArrayLike,
                  y: ArrayLike) -> float | np.ndarray:
    r"""Return the radiant flux incident on a small receiver facing a plane of emitters.

    .. math::
        q(x, y) = \sum_i E_i\, F_{d \to i}(x - x_i,\; y - y_i;\; w_i, h_i, s)

    Parameters
    ----------
    emitters : sequence of Emitter
        The emitting rectangles (corner *x*\ :sub:`i`, *y*\ :sub:`i`, width *w*\ :sub:`i`,
        height *h*\ :sub:`i` [m], emissive power *E*\ :sub:`i` [W/m²]); at least one, not
        overlapping. A bad emitter is named ``emitters.width`` (``.x``, ``.y``, ``.height``,
        ``.emissive_power``), or ``emitters`` when it overlaps another, with ``index`` its
        position in the list (from 0).
    separation : float
        Distance *s* between the emitting and receiving planes [m], > 0.
    x, y : float or array
        Receiver point, as its foot point in the emitting plane's axes [m]; broadcast.

    Returns
    -------
    q : float or array
        Incident flux [W/m²].

    Notes
    -----
    Emitters are uniform, diffuse and grey at their emissive power (εσT⁴); the receiver is a
    plane element parallel to the emitting plane and facing it; nothing between absorbs,
    emits or obstructs (no atmospheric attenuation, no flame beyond the openings). Each factor is
    Howell's case B-3 by superposition (see ``element_to_rectangle``). Out-of-range input raises
    ``PhysicsRangeError``.

    Examples
    --------
    >>> door = Emitter(x=0.0, y=0.0, width=2.0, height=2.0, emissive_power=50_000.0)
    >>> round(incident_flux([door], 1.0, 1.0, 1.0))
    27706

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    """
    packed = _emitters(emitters)
    s = _separation(separation)
    xa = np.asarray(x, dtype=float)
    ya = np.asarray(y, dtype=float)
    for name, value in (("x", xa), ("y", ya)):
        if not np.all(np.isfinite(value)):
            raise PhysicsRangeError(name, value, "a finite coordinate")
    q = _flux(packed, s, xa, ya)
    return float(q) if q.ndim == 0 else q


def _search(packed: _Emitters, separation: float, margin: float, starts: int) -> WorstPoint:
    x0, x1, y0, y1 = packed.extent
    pad = margin * max(x1 - x0, y1 - y0)
    bounds = [(x0 - pad, x1 + pad), (y0 - pad, y1 + pad)]
    # Flux features are about a separation wide; also resolve the narrowest emitter.
    step = 0.5 * min(separation, float(packed.width.min()), float(packed.height.min()))
    nx = int(np.clip(math.ceil((bounds[0][1] - bounds[0][0]) / step) + 1, 21, 161))
    ny = int(np.clip(math.ceil((bounds[1][1] - bounds[1][0]) / step) + 1, 21, 161))
    xs = np.linspace(*bounds[0], nx)
    ys = np.linspace(*bounds[1], ny)
    grid = _flux(packed, separation, xs[None, :], ys[:, None])  # columns and rows broadcast
    # Start from distinct peaks: grid points not below any of their eight neighbours ...
    padded = np.pad(grid, 1, constant_values=-np.inf)
    peak = np.ones(grid.shape, dtype=bool)
    for di in (-1, 0, 1):
        for dj in (-1, 0, 1):
            if di or dj:
                peak &= grid >= padded[1 + di:1 + di + ny, 1 + dj:1 + dj + nx]
    # ... and the centre of each emitter, which is that emitter's own maximum.
    rows, columns = np.nonzero(peak)
    cx = np.concatenate([xs[columns], packed.x + 0.5 * packed.width])
    cy = np.concatenate([ys[rows], packed.y + 0.5 * packed.height])
    values = np.concatenate([grid[peak], _flux(packed, separation, cx[-len(packed.x):],
                                                cy[-len(packed.x):])])
    order = np.argsort(values, kind="stable")[::-1][:starts]
    scale = float(values[order[0]])
    best = WorstPoint(float(cx[order[0]]), float(cy[order[0]]), scale)

    def objective(point: np.ndarray) -> tuple[float, np.ndarray]:
        flux, gradient = _flux_and_gradient(packed, separation, point)
        return -flux / scale, -gradient / scale

    for index in order:
        found = minimize(objective, np.array([cx[index], cy[index]]), method="L-BFGS-B",
                         jac=True, bounds=bounds, options={"ftol": 1e-13, "gtol": 1e-10})
        q = -float(found.fun) * scale
        if q > best.q:
            best = WorstPoint(float(found.x[0]), float(found.x[1]), q)
    return best


def worst_point(emitters: Sequence[Emitter], separation: float, *, margin: float = 0.05,
                starts: int = 4) -> WorstPoint:
    r"""Return the point of the receiving plane with the highest incident flux, and that flux.

    .. math::
        (x^*, y^*) = \arg\max_{(x, y)} \sum_i E_i\, F_{d \to i}(x, y),
        \qquad q^* = q(x^*, y^*)

    Parameters
    ----------
    emitters : sequence of Emitter
        The emitting rectangles [m, W/m²]; at least one, not overlapping.
    separation : float
        Distance between the emitting and receiving planes [m], > 0.
    margin : float
        Search margin around the emitters' bounding box, as a fraction of its larger side [1];
        default 0.05.
    starts : int
        Number of best grid points from which the local optimiser starts; default 4.

    Returns
    -------
    WorstPoint
        ``x``, ``y`` of the worst point [m] and the incident flux ``q`` there [W/m²].

    Notes
    -----
    Global search: a grid over the emitters' bounding box (plus the margin), fine enough to
    resolve half the separation and half the narrowest emitter (21 to 161 points a side), with
    every emitter's centre added; then a bounded quasi-Newton optimiser (L-BFGS-B, with the
    analytic gradient of the B-3 sums) from the best few candidates among the grid's local peaks
    and those centres. The worst point of several openings need not face any of them: between
    two openings both contribute. The maximum lies inside the bounding box, since outside it
    every factor grows towards the box, so the bounded search covers it. Assumptions as in
    :func:`incident_flux`.

    Examples
    --------
    >>> door = Emitter(x=0.0, y=0.0, width=2.0, height=2.0, emissive_power=50_000.0)
    >>> found = worst_point([door], 1.0)
    >>> round(found.x, 3), round(found.y, 3), round(found.q)
    (1.0, 1.0, 27706)

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    2. R. H. Byrd, P. Lu, J. Nocedal, C. Zhu, A limited memory algorithm for bound constrained
       optimization, SIAM J. Sci. Comput. 16(5), 1190–1208 (1995) (L-BFGS-B, through scipy).
    """
    packed = _emitters(emitters)
    s = _separation(separation)
    if not (math.isfinite(margin) and margin >= 0.0):
        raise PhysicsRangeError("margin", margin, "a fraction >= 0")
    if int(starts) < 1:
        raise PhysicsRangeError("starts", starts, "at least 1")
    return _search(packed, s, float(margin), int(starts))


def _receiver(receiver: tuple[float, float] | None) -> tuple[float, float] | None:
    if receiver is None:
        return None
    x, y = (float(v) for v in receiver)
    for index, value in enumerate((x, y)):
        if not math.isfinite(value):
            raise PhysicsRangeError("receiver", value, "a finite coordinate", index=index)
    return x, y


def _governing(packed: _Emitters, separation: float,
               receiver: tuple[float, float] | None) -> WorstPoint:
    if receiver is None:
        return _search(packed, separation, 0.05, 4)
    x, y = receiver
    return WorstPoint(x, y, float(_flux(packed, separation, x, y)))


def flux_against_separation(emitters: Sequence[Emitter], separations: ArrayLike,
                            receiver: tuple[float, float] | None = None) -> np.ndarray:
    r"""Return the incident flux at the worst point (or at a given point) for each separation.

    .. math::
        q(s) = \max_{(x, y)} q(x, y; s) \quad \text{or} \quad q(x_r, y_r; s)

    Parameters
    ----------
    emitters : sequence of Emitter
        The emitting rectangles [m, W/m²]; at least one, not overlapping.
    separations : array
        Separations at which to evaluate [m], each > 0.
    receiver : (float, float), optional
        A fixed receiver point (x, y) [m]; omitted: the worst point at each separation
        (:func:`worst_point`).

    Returns
    -------
    q : array
        Incident flux at each separation [W/m²], same shape as ``separations``.

    Notes
    -----
    For the plot of flux against separation. The worst point moves with the separation and is
    searched anew at each. Assumptions as in :func:`incident_flux`.

    Examples
    --------
    >>> door = Emitter(x=0.0, y=0.0, width=2.0, height=2.0, emissive_power=50_000.0)
    >>> [round(q) for q in flux_against_separation([door], [1.0, 2.0])]
    [27706, 11973]

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    """
    packed = _emitters(emitters)
    point = _receiver(receiver)
    s = np.asarray(separations, dtype=float)
    flat = [_governing(packed, _separation(value), point).q for value in s.ravel()]
    return np.array(flat).reshape(s.shape)


def minimum_separation(emitters: Sequence[Emitter], limit: float,
                       receiver: tuple[float, float] | None = None, *,
                       scan_points: int = 32) -> MinimumSeparation:
    r"""Return the smallest separation beyond which the incident flux never exceeds a limit.

    .. math::
        s_{\min} = \min\{\, s_0 \ge 0 : q(s) \le q_{\mathrm{limit}} \ \forall s \ge s_0 \,\},
        \qquad q(s_{\min}) = q_{\mathrm{limit}} \text{ when } s_{\min} > 0

    Parameters
    ----------
    emitters : sequence of Emitter
        The emitting rectangles [m, W/m²]; at least one, not overlapping.
    limit : float
        Limit of incident flux [W/m²], > 0.
    receiver : (float, float), optional
        A fixed receiver point (x, y) [m]; omitted: the worst point of the receiving plane at
        each separation.
    scan_points : int
        Number of separations in the bracketing scan; default 32.

    Returns
    -------
    MinimumSeparation
        ``separation`` [m] (0 with ``met_at_contact`` when the limit is met at every
        separation), the governing point ``x``, ``y`` [m] and its flux ``q`` [W/m²] there.

    Notes
    -----
    When no emitter's E exceeds the limit, no point can exceed it (the element factors of
    non-overlapping coplanar rectangles sum to at most 1), so the worst-point answer is 0 at
    once, its flux that of the hottest emitter at contact. Otherwise the flux at any point is
    below :math:`\sum_i E_i A_i / (\pi s^2)`, which bounds the search from above. The
    separations from 10⁻⁴ of that bound up to it are scanned on a geometric grid to bracket the
    last crossing of the limit (the flux at a point beside the openings first rises with
    separation, then falls), and the crossing is then located by Brent's method (scipy
    ``brentq``), not by stepping. For the worst point the scan runs from the far end and stops
    at the first separation above the limit (only the last crossing matters), trying the
    emitters' centres before the global search there (a point above the limit proves the worst
    point is), and no separation is searched twice. For a given point whose flux never exceeds
    the limit on the scan, the peak of the scan is refined by a bounded scalar search before 0
    is returned. If the worst-point flux is already below the limit at the first scanned
    separation, that separation (10⁻⁴ of the bound) is returned as a conservative answer.
    Assumptions as in :func:`incident_flux`; the limit (for example a piloted ignition flux) and
    its source belong to the caller.

    Examples
    --------
    >>> door = Emitter(x=0.0, y=0.0, width=2.0, height=2.0, emissive_power=50_000.0)
    >>> round(minimum_separation([door], 12_500.0).separation, 3)
    1.943

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    2. R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall (1973),
       Ch. 4 (through scipy.optimize.brentq).
    """
    packed = _emitters(emitters)
    point = _receiver(receiver)
    q_limit = float(limit)
    if not (math.isfinite(q_limit) and q_limit > 0.0):
        raise PhysicsRangeError("limit", q_limit, "an incident flux > 0 W/m^2")
    if int(scan_points) < 4:
        raise PhysicsRangeError("scan_points", scan_points, "at least 4")

    emax = float(packed.emissive_power.max())
    if point is None and emax <= q_limit:
        k = int(np.argmax(packed.emissive_power))
        x = float(packed.x[k] + 0.5 * packed.width[k])
        y = float(packed.y[k] + 0.5 * packed.height[k])
        return MinimumSeparation(0.0, True, x, y, emax)
    power = float(np.sum(packed.emissive_power * packed.width * packed.height))
    upper_bound = math.sqrt(power / (math.pi * q_limit))
    separations = np.geomspace(1e-4 * upper_bound, upper_bound, int(scan_points))

    governing: dict[float, WorstPoint] = {}  # each separation searched once

    def governing_at(s: float) -> WorstPoint:
        found = governing.get(s)
        if found is None:
            found = governing[s] = _governing(packed, s, point)
        return found

    def excess_at(s: float) -> float:
        return governing_at(s).q - q_limit

    if point is None:
        # Only the last scanned separation above the limit brackets the answer, so scan from
        # the far end and stop at the first one above it. Any point above the limit proves that
        # the worst point is, so the emitters' centres are tried before the global search.
        centre_x = packed.x + 0.5 * packed.width
        centre_y = packed.y + 0.5 * packed.height
        last = -1
        for index in range(len(separations) - 1, -1, -1):
            s = float(separations[index])
            if (float(np.max(_flux(packed, s, centre_x, centre_y))) > q_limit
                    or excess_at(s) > 0.0):
                last = index
                break
        if last < 0:
            s = float(separations[0])
            found = governing_at(s)
            return MinimumSeparation(s, False, found.x, found.y, found.q)
        lower = float(separations[last])
        # the bound makes the last scanned separation safe; doubling it is safer still
        upper = float(separations[last + 1]) if last + 1 < len(separations) else 2.0 * lower
    else:
        excess = np.array([excess_at(float(s)) for s in separations])
        above = np.flatnonzero(excess > 0.0)
        if above.size:
            last = int(above[-1])
            lower = float(separations[last])
            upper = (float(separations[last + 1]) if last + 1 < len(separations)
                     else 2.0 * lower)
        else:
            peak = int(np.argmax(excess))
            left = float(separations[max(peak - 1, 0)])
            right = float(separations[min(peak + 1, len(separations) - 1)])
            refined = minimize_scalar(lambda s: -excess_at(s), bounds=(left, right),
                                      method="bounded", options={"xatol": 1e-9 * right})
            peak_excess = max(-float(refined.fun), float(excess[peak]))
            if peak_excess <= 0.0:
                return MinimumSeparation(0.0, True, point[0], point[1], peak_excess + q_limit)
            lower, upper = float(refined.x), right
    root = brentq(excess_at, lower, upper, xtol=1e-12 * upper_bound, rtol=1e-10)
    found = governing_at(root)
    return MinimumSeparation(float(root), False, found.x, found.y, found.q)
