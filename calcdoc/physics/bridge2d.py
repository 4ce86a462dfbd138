r"""Steady two-dimensional conduction through a building junction: L2D, ψ and f_Rsi (ISO 10211).

The method, stated so that a checker can reproduce it:

* **Geometry.** The section is a set of axis-aligned rectangles (regions), each of one thermal
  conductivity; where regions overlap the later one wins, and a point covered by no region is not
  part of the body (a room or the outside air). Surfaces are axis-aligned segments on the body's
  boundary, each facing the inside or the outside environment through a surface resistance
  (0 holds the surface at the environment temperature). Every other boundary face is adiabatic:
  a cut-off plane or a symmetry plane (ISO 10211:2017 §5.2, from memory). A body in two pieces
  (regions that touch only at a corner point are not joined) is refused, naming a region of the
  detached piece: each piece would need its own environments and its own L2D.
* **Space.** Cell-centred finite volumes on a rectilinear grid whose lines include every region
  edge and every surface end point, so that each cell lies wholly in one region and each boundary
  face wholly on one surface or on none. Two neighbouring cells exchange heat through the series
  resistance of their two half cells, G = l / (d₁/(2λ₁) + d₂/(2λ₂)) per metre of junction (the
  harmonic mean), which is exact for layers in series. A boundary face on a surface joins its cell
  to the environment through the half-cell resistance plus the surface resistance,
  G = l / (d/(2λ) + R_s).
* **Solution.** The linear system is assembled with numpy (no loop over cells) as a
  :mod:`scipy.sparse` matrix and solved by sparse LU (:func:`scipy.sparse.linalg.splu`, minimum
  degree ordering on AᵀA + A; the matrix is symmetric and positive definite). It is solved once
  for the dimensionless temperature τ = (θ − θ_e)/(θ_i − θ_e), with τ = 1 inside and 0 outside, so
  L2D and f_Rsi follow without dividing by θ_i − θ_e and θ = θ_e + τ (θ_i − θ_e).
* **Mesh.** By default a graded mesh (cells small at each grid line and growing away from it, up
  to a largest cell) is halved (every cell split in two both ways) until halving changes L2D by
  less than 1 %, ISO 10211's criterion for the number of subdivisions (from memory: the standard
  states it on the sum of the heat flows entering the object, which for two environments is
  L2D·Δθ), and (calcdoc's addition, see :func:`thermal_bridge`) until f_Rsi changes by less
  than 0.005. With an explicit ``cell_size`` each interval between grid lines is divided into
  equal cells of at most that size, and the result on that mesh is compared with the halved mesh.
* **Surface temperatures.** See :func:`solve_section` for the face and corner temperatures.

Temperatures are absolute, in kelvin, in and out; lengths in m; heat flows per metre of
junction. Clause numbers recalled without the printed standard at hand say "from memory".
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.solvers import cumulative_trapezoid

__all__ = [
    "DEFAULT_TOLERANCE", "DEFAULT_F_RSI_TOLERANCE", "DEFAULT_CONDENSATION_SURFACE_RESISTANCE",
    "DEFAULT_MAX_CELLS",
    "MESH_CRITERION_SOURCE", "CUT_OFF_SOURCE", "CONDENSATION_RSI_SOURCE",
    "Region", "Surface", "Section", "Mesh", "TemperatureField", "SurfaceProfile",
    "SectionSolution", "MeshLevel", "MeshCheck", "ThermalBridge",
    "prepare_section", "solve_section", "thermal_bridge", "psi",
]

DEFAULT_TOLERANCE = 0.01
"""Largest relative change of L2D on halving the cells that ends the refinement [1]."""

DEFAULT_CONDENSATION_SURFACE_RESISTANCE = 0.25
"""Inside surface resistance for the surface-temperature solve [m²·K/W] (ISO 13788)."""

DEFAULT_F_RSI_TOLERANCE = 0.005
"""Largest change of f_Rsi on halving the cells that ends the refinement [1] (calcdoc's own)."""

DEFAULT_MAX_CELLS = 1_000_000
"""Refinement stops (not converged) rather than solve a mesh with more body cells than this."""

MESH_CRITERION_SOURCE = ("ISO 10211:2017, number of subdivisions: halving the cells changes the "
                         "heat flow by less than 1 % (clause number not confirmed)")
CUT_OFF_SOURCE = "ISO 10211:2017 §5.2, cut-off planes of the geometrical model (from memory)"
CONDENSATION_RSI_SOURCE = ("ISO 13788:2012, internal surface resistance 0.25 m²·K/W for the "
                           "surface temperature (value from memory)")

SIDES = ("inside", "outside")

# Coarse graded mesh (the start of the refinement): the largest cell is this fraction of the
# section's larger extent; the cell at a grid line is this fraction of the shorter interval
# beside it; the cell size grows with the distance from a grid line at this rate (m per m, about
# 1.4 from one cell to the next). Chosen on the cases of tests/test_physics_bridge2d.py and the
# benchmark: both criteria are then met after one to three halvings, with L2D within 0.5 % and
# f_Rsi within 0.003 of the result on a mesh 32 times finer.
_LARGEST_FRACTION = 1.0 / 10.0
_EDGE_FRACTION = 1.0 / 10.0
_GROWTH = 0.4
_SAMPLES = 257  # points per interval on which the size function is integrated


# ------------------------------------------------------------------------------------ inputs


@dataclass(frozen=True)
class Region:
    """One rectangle of the section: ``x`` = (x0, x1) [m], ``y`` = (y0, y1) [m], λ [W/(m·K)]."""

    x: tuple[float, float]
    y: tuple[float, float]
    conductivity: float


@dataclass(frozen=True)
class Surface:
    """A segment of the body's boundary from ``start`` to ``end`` (each (x, y) [m]).

    ``side`` is ``"inside"`` or ``"outside"`` (the environment it faces) and
    ``surface_resistance`` R_s [m²·K/W] (0 holds the face at the environment temperature).
    ``start`` and ``end`` are docs/format.md's ``from`` and ``to``.
    """

    start: tuple[float, float]
    end: tuple[float, float]
    side: str
    surface_resistance: float


# ------------------------------------------------------------------------- prepared geometry


@dataclass(frozen=True)
class _Placed:
    """A validated surface on the breakpoint grid."""

    index: int
    vertical: bool  # lies on a line x = const
    line: int  # breakpoint index of that line
    span: tuple[int, int]  # breakpoint indices along the line, ascending
    body_after: bool  # the body lies on the side of higher coordinate
    inside: bool
    resistance: float
    reversed: bool  # the segment was given from the higher to the lower coordinate


@dataclass(frozen=True)
class Section:
    """A validated section: grid lines (breakpoints), the region of each block between them,
    conductivities and surfaces. Build it with :func:`prepare_section`."""

    x_breaks: np.ndarray
    y_breaks: np.ndarray
    blocks: np.ndarray  # (ny_b, nx_b) region index of each block, -1 where no body
    conductivity: np.ndarray  # per region [W/(m·K)]
    surfaces: tuple[_Placed, ...]
    surface_count: int

    def coarse_mesh(self) -> "Mesh":
        """Return the graded mesh the refinement starts from."""
        extent = max(self.x_breaks[-1] - self.x_breaks[0], self.y_breaks[-1] - self.y_breaks[0])
        largest = _LARGEST_FRACTION * extent
        x, xb = _graded_axis(self.x_breaks, largest)
        y, yb = _graded_axis(self.y_breaks, largest)
        return Mesh(x, y, xb, yb, _break_nodes(xb), _break_nodes(yb), self)

    def uniform_cell_count(self, cell_size: float) -> float:
        """Return the number of body cells :meth:`uniform_mesh` would make, without making it."""
        # capped so that an absurdly small size gives a huge count rather than an overflow
        columns = np.clip(np.ceil(np.diff(self.x_breaks) / cell_size - 1e-9), 1.0, 1e15)
        rows = np.clip(np.ceil(np.diff(self.y_breaks) / cell_size - 1e-9), 1.0, 1e15)
        return float(rows @ (self.blocks >= 0).astype(float) @ columns)

    def uniform_mesh(self, cell_size: float) -> "Mesh":
        """Return the mesh dividing each interval between grid lines into equal cells of at most
        ``cell_size`` [m]."""
        x, xb = _uniform_axis(self.x_breaks, cell_size)
        y, yb = _uniform_axis(self.y_breaks, cell_size)
        return Mesh(x, y, xb, yb, _break_nodes(xb), _break_nodes(yb), self)


@dataclass(frozen=True, eq=False)
class Mesh:
    """A rectilinear mesh refining the section's grid lines: node coordinates ``x``, ``y`` [m],
    the block column / row of each cell, and the node index of each grid line."""

    x: np.ndarray
    y: np.ndarray
    x_block: np.ndarray
    y_block: np.ndarray
    x_node_of_break: np.ndarray
    y_node_of_break: np.ndarray
    section: Section

    @property
    def body_cells(self) -> int:
        """Number of cells in the body (the unknowns) [-]."""
        nx_b = len(self.section.x_breaks) - 1
        ny_b = len(self.section.y_breaks) - 1
        per_column = np.bincount(self.x_block, minlength=nx_b)
        per_row = np.bincount(self.y_block, minlength=ny_b)
        return int(per_row @ (self.section.blocks >= 0).astype(np.int64) @ per_column)

    def cell_sizes(self) -> tuple[float, float]:
        """Return the smallest and the largest cell side over both directions [m]."""
        sides = np.concatenate((np.diff(self.x), np.diff(self.y)))
        return float(sides.min()), float(sides.max())

    def halved(self) -> "Mesh":
        """Return the mesh with every cell split in two in each direction."""
        return Mesh(_halve(self.x), _halve(self.y), np.repeat(self.x_block, 2),
                    np.repeat(self.y_block, 2), 2 * self.x_node_of_break,
                    2 * self.y_node_of_break, self.section)


def _halve(nodes: np.ndarray) -> np.ndarray:
    out = np.empty(2 * len(nodes) - 1)
    out[0::2] = nodes
    out[1::2] = 0.5 * (nodes[:-1] + nodes[1:])
    return out


def _break_nodes(blocks_of_cells: np.ndarray) -> np.ndarray:
    counts = np.bincount(blocks_of_cells)
    return np.concatenate(([0], np.cumsum(counts)))


def _graded_axis(breaks: np.ndarray, largest: float) -> tuple[np.ndarray, np.ndarray]:
    """Nodes of a graded axis and the block of each cell: at a grid line the cell is
    ``_EDGE_FRACTION`` of the shorter interval beside it (at most ``largest``) and the size grows
    linearly with distance, s(t) = min(largest, s_a + g t, s_b + g (L − t)); the nodes divide
    ∫ dt / s(t) into equal parts."""
    lengths = np.diff(breaks)
    beside = np.minimum(np.concatenate((lengths[:1], lengths)),
                        np.concatenate((lengths, lengths[-1:])))
    edge = np.minimum(largest, _EDGE_FRACTION * beside)
    nodes, blocks = [breaks[:1]], []
    for k, length in enumerate(lengths):
        t = np.linspace(0.0, length, _SAMPLES)
        size = np.minimum(np.minimum(largest, edge[k] + _GROWTH * t),
                          edge[k + 1] + _GROWTH * (length - t))
        steps = cumulative_trapezoid(1.0 / size, t, initial=0.0)
        count = max(1, math.ceil(steps[-1] - 1e-9))
        inner = np.interp(np.linspace(0.0, steps[-1], count + 1)[1:-1], steps, t)
        nodes.append(breaks[k] + inner)
        nodes.append(breaks[k + 1:k + 2])
        blocks.append(np.full(count, k))
    return np.concatenate(nodes), np.concatenate(blocks)


def _uniform_axis(breaks: np.ndarray, cell_size: float) -> tuple[np.ndarray, np.ndarray]:
    lengths = np.diff(breaks)
    counts = np.maximum(1, np.ceil(lengths / cell_size - 1e-9).astype(np.int64))
    nodes = [breaks[:1]]
    for k, count in enumerate(counts):
        nodes.append(np.linspace(breaks[k], breaks[k + 1], count + 1)[1:])
    return np.concatenate(nodes), np.repeat(np.arange(len(counts)), counts)


# ------------------------------------------------------------------------------ validation


def _finite(quantity: str, value, expected: str = "a finite number") -> float:
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise PhysicsRangeError(quantity, value, expected) from None
    if not math.isfinite(number):
        raise PhysicsRangeError(quantity, number, expected)
    return number


def _pair(quantity: str, value) -> tuple[float, float]:
    try:
        a, b = value
    except (TypeError, ValueError):
        raise PhysicsRangeError(quantity, value, "two finite numbers [m]") from None
    return (_finite(quantity, a, "two finite numbers [m]"),
            _finite(quantity, b, "two finite numbers [m]"))


def _temperature(quantity: str, value) -> float:
    number = _finite(quantity, value, "a finite absolute temperature > 0 K")
    if number <= 0.0:
        raise PhysicsRangeError(quantity, number, "a finite absolute temperature > 0 K")
    return number


def _merge(values: np.ndarray, tolerance: float) -> np.ndarray:
    """Sorted values with any two closer than ``tolerance`` taken as one (rounding noise in
    coordinates such as 0.1 + 0.2 must not create a sliver of cells)."""
    ordered = np.unique(values)
    kept = [ordered[0]]
    for value in ordered[1:]:
        if value - kept[-1] > tolerance:
            kept.append(value)
    return np.asarray(kept)


def prepare_section(regions: Sequence[Region], surfaces: Sequence[Surface]) -> Section:
    r"""Return the validated section (grid lines, blocks, conductivities, surfaces) that
    :func:`solve_section` meshes and solves.

    .. math::
        \text{body} = \bigcup_r \,[x_{0,r}, x_{1,r}] \times [y_{0,r}, y_{1,r}],\qquad
        \lambda(x, y) = \lambda_{\max\{r \,:\, (x, y) \in r\}}

    Parameters
    ----------
    regions : sequence of Region
        Rectangles ``x`` = (x0, x1) [m], ``y`` = (y0, y1) [m] (either order), conductivity λ
        [W/(m·K)] > 0; a later region overrides an earlier one where they overlap.
    surfaces : sequence of Surface
        Axis-aligned segments on the body's boundary, ``side`` inside | outside, surface
        resistance [m²·K/W] >= 0; at least one of each side. They may not overlap one another.

    Returns
    -------
    Section
        Grid lines ``x_breaks``, ``y_breaks`` [m], the region index of each block between them
        (-1 outside the body), conductivities [W/(m·K)] and the placed surfaces.

    Notes
    -----
    Raises :class:`~calcdoc.physics.PhysicsRangeError` naming the item: ``regions`` (none, or the
    body in more than one piece: ``regions[i]`` names a region of a detached piece),
    ``regions[i].x`` / ``regions[i].y`` (not two finite numbers, or zero width),
    ``regions[i].conductivity`` (not > 0), ``surfaces`` (none, or no inside or no outside
    surface), ``surfaces[i]`` (not parallel to an axis, zero length, not on the body's boundary,
    or overlapping an earlier surface), ``surfaces[i].side``, ``surfaces[i].surface_resistance``
    (< 0), ``surfaces[i].from`` / ``surfaces[i].to`` (not two finite numbers). Coordinates closer
    than 10⁻⁹ of the section's extent are taken as one grid line. A gap that no region covers is
    not part of the body, so its faces are adiabatic: an air layer or cavity must be given as a
    region of its equivalent conductivity (ISO 10211 and ISO 6946 give it, from memory).

    Examples
    --------
    >>> wall = [Region((0.0, 0.3), (0.0, 1.0), 1.0)]
    >>> faces = [Surface((0.0, 0.0), (0.0, 1.0), "inside", 0.13),
    ...          Surface((0.3, 0.0), (0.3, 1.0), "outside", 0.04)]
    >>> prepare_section(wall, faces).x_breaks.tolist()
    [0.0, 0.3]

    References
    ----------
    1. ISO 10211:2017 §5.2, cut-off planes (adiabatic boundaries) of the geometrical model
       (from memory).
    """
    regions = list(regions)
    surfaces = list(surfaces)
    if not regions:
        raise PhysicsRangeError("regions", "no regions", "at least one region")
    if not surfaces:
        raise PhysicsRangeError("surfaces", "no surfaces",
                                "at least one inside and one outside surface")
    boxes, conductivities = [], []
    for i, region in enumerate(regions):
        x0, x1 = sorted(_pair(f"regions[{i}].x", region.x))
        y0, y1 = sorted(_pair(f"regions[{i}].y", region.y))
        k = _finite(f"regions[{i}].conductivity", region.conductivity,
                    "a finite conductivity > 0 W/(m*K)")
        if k <= 0.0:
            raise PhysicsRangeError(f"regions[{i}].conductivity", k,
                                    "a finite conductivity > 0 W/(m*K)")
        boxes.append((x0, x1, y0, y1))
        conductivities.append(k)
    ends = []
    for i, surface in enumerate(surfaces):
        start = _pair(f"surfaces[{i}].from", surface.start)
        end = _pair(f"surfaces[{i}].to", surface.end)
        if surface.side not in SIDES:
            raise PhysicsRangeError(f"surfaces[{i}].side", surface.side, "inside or outside")
        resistance = _finite(f"surfaces[{i}].surface_resistance", surface.surface_resistance,
                             "a finite surface resistance >= 0 m^2*K/W")
        if resistance < 0.0:
            raise PhysicsRangeError(f"surfaces[{i}].surface_resistance", resistance,
                                    "a finite surface resistance >= 0 m^2*K/W")
        ends.append((start, end, resistance))

    box_array = np.asarray(boxes)
    xs = np.concatenate((box_array[:, :2].ravel(), [c for s, e, _ in ends for c in (s[0], e[0])]))
    ys = np.concatenate((box_array[:, 2:].ravel(), [c for s, e, _ in ends for c in (s[1], e[1])]))
    extent = max(np.ptp(xs), np.ptp(ys), 1e-300)
    tolerance = 1e-9 * extent
    x_breaks, y_breaks = _merge(xs, tolerance), _merge(ys, tolerance)

    def snap(breaks, value):
        return int(np.argmin(np.abs(breaks - value)))

    blocks = np.full((len(y_breaks) - 1, len(x_breaks) - 1), -1, dtype=np.int64)
    for i, (x0, x1, y0, y1) in enumerate(boxes):
        i0, i1 = snap(x_breaks, x0), snap(x_breaks, x1)
        j0, j1 = snap(y_breaks, y0), snap(y_breaks, y1)
        if i0 == i1:
            raise PhysicsRangeError(f"regions[{i}].x", regions[i].x,
                                    "x0 < x1 (a region of non-zero width)")
        if j0 == j1:
            raise PhysicsRangeError(f"regions[{i}].y", regions[i].y,
                                    "y0 < y1 (a region of non-zero height)")
        blocks[j0:j1, i0:i1] = i

    body = blocks >= 0
    owner_x = np.full((body.shape[0], body.shape[1] + 1), -1)  # faces on lines x = const
    owner_y = np.full((body.shape[0] + 1, body.shape[1]), -1)  # faces on lines y = const
    placed = []
    for i, (start, end, resistance) in enumerate(ends):
        name = f"surfaces[{i}]"
        shown = f"from {list(start)} to {list(end)}"
        sx, sy = snap(x_breaks, start[0]), snap(y_breaks, start[1])
        ex, ey = snap(x_breaks, end[0]), snap(y_breaks, end[1])
        if sx == ex and sy == ey:
            raise PhysicsRangeError(name, shown, "a segment of non-zero length")
        if sx != ex and sy != ey:
            raise PhysicsRangeError(name, shown, "a segment parallel to the x or the y axis")
        vertical = sx == ex
        line = sx if vertical else sy
        a, b = (sy, ey) if vertical else (sx, ex)
        lo, hi = min(a, b), max(a, b)
        if vertical:
            before = body[lo:hi, line - 1] if line > 0 else np.zeros(hi - lo, bool)
            after = body[lo:hi, line] if line < body.shape[1] else np.zeros(hi - lo, bool)
            owners = owner_x[lo:hi, line]
        else:
            before = body[line - 1, lo:hi] if line > 0 else np.zeros(hi - lo, bool)
            after = body[line, lo:hi] if line < body.shape[0] else np.zeros(hi - lo, bool)
            owners = owner_y[line, lo:hi]
        if not np.all(before != after):
            raise PhysicsRangeError(name, shown, "a segment on the boundary of the body "
                                    "(body on one side only, along its whole length)")
        if not (np.all(after) or np.all(before)):
            raise PhysicsRangeError(name, shown, "a segment along one face of the body "
                                    "(split it where the body changes side)")
        if np.any(owners >= 0):
            other = int(owners[owners >= 0][0])
            raise PhysicsRangeError(name, shown, f"a segment not overlapping surfaces[{other}]")
        owners[:] = i
        placed.append(_Placed(i, vertical, line, (lo, hi), bool(after[0]),
                              surfaces[i].side == "inside", resistance, a > b))

    sides = {p.inside for p in placed}
    if sides != {True, False}:
        missing = "inside" if True not in sides else "outside"
        raise PhysicsRangeError("surfaces", f"no {missing} surface",
                                "at least one inside and one outside surface")
    _require_one_piece(blocks)
    return Section(x_breaks, y_breaks, blocks, np.asarray(conductivities, float), tuple(placed),
                   len(surfaces))


def _require_one_piece(blocks: np.ndarray) -> None:
    body = blocks >= 0
    number = np.full(body.shape, -1)
    number[body] = np.arange(int(body.sum()))
    across = body[:, :-1] & body[:, 1:]
    upward = body[:-1] & body[1:]
    rows = np.concatenate((number[:, :-1][across], number[:-1][upward]))
    cols = np.concatenate((number[:, 1:][across], number[1:][upward]))
    n = int(body.sum())
    from scipy import sparse  # scipy's sparse modules load when a section is solved
    from scipy.sparse.csgraph import connected_components

    graph = sparse.coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(n, n))
    pieces, label = connected_components(graph, directed=False)
    if pieces > 1:
        owner = blocks[body]
        first = owner[label == label[0]]
        detached = sorted(set(owner[label != label[0]].tolist()) - set(first.tolist()))
        region = detached[0] if detached else int(owner[label != label[0]][0])
        raise PhysicsRangeError(f"regions[{region}]", f"a body in {pieces} pieces",
                                "one connected body: regions joined along an edge (a region "
                                f"touching only at a corner is not joined); regions[{region}] "
                                "is apart from regions[" + str(int(first[0])) + "]")


# ----------------------------------------------------------------------------------- results


@dataclass(frozen=True, eq=False)
class TemperatureField:
    """The temperature on the mesh, in a form a contour plot takes directly.

    ``x_nodes`` (nx + 1), ``y_nodes`` (ny + 1): grid lines [m]; ``x_centres`` (nx),
    ``y_centres`` (ny): cell centres [m]; ``cell_temperature`` (ny, nx) [K] and
    ``node_temperature`` (ny + 1, nx + 1) [K], NaN outside the body (rows are y, columns x, as
    a contour plot takes them); ``region_index`` (ny, nx), -1 outside.
    """

    x_nodes: np.ndarray
    y_nodes: np.ndarray
    x_centres: np.ndarray
    y_centres: np.ndarray
    cell_temperature: np.ndarray
    node_temperature: np.ndarray
    region_index: np.ndarray

    def at(self, x, y) -> np.ndarray | float:
        """Return the temperature [K] at points (x, y) [m], bilinear between nodes (NaN off the
        body)."""
        from scipy.interpolate import RegularGridInterpolator

        interpolate = RegularGridInterpolator((self.y_nodes, self.x_nodes), self.node_temperature,
                                              bounds_error=False, fill_value=np.nan)
        y, x = np.broadcast_arrays(np.asarray(y, float), np.asarray(x, float))
        values = interpolate(np.column_stack((y.ravel(), x.ravel()))).reshape(x.shape)
        return float(values) if values.ndim == 0 else values


@dataclass(frozen=True, eq=False)
class SurfaceProfile:
    """Temperatures along one surface from its ``from`` end to its ``to`` end: points alternate
    between vertices (grid nodes, ``at_vertex`` True) and face centres; ``x``, ``y`` [m],
    ``temperature`` [K]."""

    surface: int
    side: str
    x: np.ndarray
    y: np.ndarray
    temperature: np.ndarray
    at_vertex: np.ndarray


@dataclass(frozen=True, eq=False)
class SectionSolution:
    """One solve on one mesh. Heat flows per metre of junction; positive from inside to outside.

    ``L2D`` [W/(m·K)] is the heat flow into the inside surfaces per kelvin of θ_i − θ_e and
    ``L2D_out`` the same out of the outside surfaces (equal to solver precision);
    ``heat_flow_in`` / ``heat_flow_out`` [W/m] at the given temperatures (into the inside, out
    of the outside surfaces), ``imbalance`` = in − out [W/m], ``relative_imbalance`` [1];
    ``surface_heat_flows`` [W/m] per surface in input order (into the body at an inside surface,
    out of it at an outside surface); ``theta_si_min`` [K], ``f_Rsi`` [1], ``x_si_min``,
    ``y_si_min`` [m]: the coldest inside surface point; ``inside_surface_resistance`` the
    resistance that replaced every inside one (None: each surface's own).
    """

    mesh: Mesh
    cells: int
    L2D: float
    L2D_out: float
    heat_flow_in: float
    heat_flow_out: float
    imbalance: float
    relative_imbalance: float
    surface_heat_flows: np.ndarray
    theta_si_min: float
    f_Rsi: float
    x_si_min: float
    y_si_min: float
    inside_surface_resistance: float | None
    field: TemperatureField
    profiles: tuple[SurfaceProfile, ...]


@dataclass(frozen=True)
class MeshLevel:
    """One mesh solved: body ``cells`` [-], ``smallest_cell`` and ``largest_cell`` sides [m],
    ``L2D`` on it [W/(m·K)] and ``f_Rsi`` [1] (from the surface-temperature solve when there is
    one)."""

    cells: int
    smallest_cell: float
    largest_cell: float
    L2D: float
    f_Rsi: float


@dataclass(frozen=True)
class MeshCheck:
    """The mesh check: the meshes solved (``levels``, coarse to fine), the index of the mesh
    whose results are reported (``used``) and of the one it is compared with (``compared``),
    the relative change of L2D between them against ``tolerance`` (ISO 10211's 1 %), the change
    of f_Rsi against ``f_Rsi_tolerance`` (None: not checked), ``converged`` (both met), and
    whether the cell size was given (``explicit``)."""

    levels: tuple[MeshLevel, ...]
    used: int
    compared: int
    relative_change: float
    tolerance: float
    f_Rsi_change: float
    f_Rsi_tolerance: float | None
    converged: bool
    explicit: bool

    def statement(self) -> str:
        """Return the sentences stating the mesh and the check."""
        used, other = self.levels[self.used], self.levels[self.compared]
        how = "halved" if self.compared > self.used else "previous (twice as coarse)"
        met = self.relative_change < self.tolerance
        text = (f"{used.cells} cells of {1000 * used.smallest_cell:.3g} to "
                f"{1000 * used.largest_cell:.3g} mm: L2D = {used.L2D:.5g} W/(m·K); on the {how} "
                f"mesh ({other.cells} cells) L2D = {other.L2D:.5g} W/(m·K), a change of "
                f"{100 * self.relative_change:.3g} %, which {'meets' if met else 'does NOT meet'}"
                f" the {100 * self.tolerance:.3g} % criterion.")
        if self.f_Rsi_tolerance is not None:
            met = self.f_Rsi_change < self.f_Rsi_tolerance
            text += (f" f_Rsi = {used.f_Rsi:.4f} ({other.f_Rsi:.4f} on the {how} mesh), a change "
                     f"of {self.f_Rsi_change:.2g}, {'within' if met else 'NOT within'} "
                     f"{self.f_Rsi_tolerance:.2g}.")
        return text


@dataclass(frozen=True, eq=False)
class ThermalBridge:
    """Result of :func:`thermal_bridge`; SI units as in :class:`SectionSolution`.

    ``theta_si_min``, ``f_Rsi``, ``x_si_min`` and ``y_si_min`` come from the ``condensation``
    solve (every inside surface resistance replaced) when there is one, else from ``design``.
    """

    L2D: float
    heat_flow_in: float
    heat_flow_out: float
    imbalance: float
    theta_si_min: float
    f_Rsi: float
    x_si_min: float
    y_si_min: float
    design: SectionSolution
    condensation: SectionSolution | None
    mesh_check: MeshCheck


# ------------------------------------------------------------------------------------ solve


def solve_section(section: Section, mesh: Mesh, inside_temperature: float,
                  outside_temperature: float,
                  inside_surface_resistance: float | None = None) -> SectionSolution:
    r"""Return the temperature field, heat flows, L2D and the coldest inside surface point of a
    section on one mesh.

    .. math::
        \sum_{n} G_{cn} (\tau_n - \tau_c) + \sum_{f \in c} G_f (\tau_{\mathrm{env}} - \tau_c) = 0,
        \quad G_{cn} = \frac{l}{\frac{d_c}{2\lambda_c} + \frac{d_n}{2\lambda_n}},\quad
        G_f = \frac{l_f}{\frac{d_c}{2\lambda_c} + R_s}

    .. math::
        L_{2D} = \sum_{f \in \text{inside}} G_f (1 - \tau_c),\qquad
        \theta = \theta_e + \tau\,(\theta_i - \theta_e),\qquad
        f_{Rsi} = \tau_{si,\min} = \frac{\theta_{si,\min} - \theta_e}{\theta_i - \theta_e}

    Parameters
    ----------
    section : Section
        From :func:`prepare_section`.
    mesh : Mesh
        ``section.coarse_mesh()`` or ``section.uniform_mesh(size)``, possibly ``.halved()``.
    inside_temperature : float
        θ_i [K] > 0, the environment of every inside surface.
    outside_temperature : float
        θ_e [K] > 0, the environment of every outside surface.
    inside_surface_resistance : float or None
        If given [m²·K/W] >= 0, it replaces every inside surface resistance (ISO 13788's
        0.25 m²·K/W for the surface-temperature check); outside surfaces keep theirs.

    Returns
    -------
    SectionSolution
        L2D [W/(m·K)], heat flows [W/m], θ_si,min [K], f_Rsi [1] and its place [m], the
        temperature field [K] and the temperature along each surface [K].

    Notes
    -----
    Surface temperatures. At a face centre the surface temperature follows from the face's own
    flux, θ_s = θ_env − q R_s (exact for the discrete solution, second-order in the cell size).
    At the vertices along a surface it is interpolated linearly between the two neighbouring
    face centres, and at the two ends of a surface (a corner, or where it meets a cut-off plane
    or another surface) it is extrapolated linearly from the two nearest face centres of that
    surface and kept within [θ_e, θ_i] (the maximum principle of the steady field). Extrapolation
    is chosen over taking the nearest face because at the inside corner of a junction the surface
    temperature falls all the way to the corner: the nearest face centre, half a cell away,
    would overstate the minimum by about half a cell's worth of gradient, and that error shrinks
    only in proportion to the cell. Where two surfaces end at one corner each gives its own
    estimate; the minimum search takes the lower, the node field their mean. Nodes elsewhere
    take the mean of the body cells around them weighted by distance (bilinear) and by
    conductivity, so that a node on the interface of two layers has the temperature continuity
    of heat flow gives there. Fixed temperatures
    (R_s = 0) on two surfaces meeting at a corner give an unbounded heat flow there in the
    continuum, so such a model never meets the 1 % criterion; it is useful only at a stated
    ``cell_size``.

    Examples
    --------
    >>> wall = [Region((0.0, 0.3), (0.0, 1.0), 1.0)]
    >>> faces = [Surface((0.0, 0.0), (0.0, 1.0), "inside", 0.13),
    ...          Surface((0.3, 0.0), (0.3, 1.0), "outside", 0.04)]
    >>> section = prepare_section(wall, faces)
    >>> result = solve_section(section, section.uniform_mesh(0.05), 293.15, 273.15)
    >>> round(result.L2D, 4)  # U·l = 1 / (0.13 + 0.3 + 0.04) · 1 m
    2.1277

    References
    ----------
    1. ISO 10211:2017, Clause 4 (principles: steady state, properties independent of
       temperature, no heat sources) and §5.2 (cut-off planes) (from memory).
    2. Patankar, S. V., Numerical Heat Transfer and Fluid Flow, 1980, §4.2.3: the interface
       conductivity as the harmonic mean of the half-cell resistances (from memory).
    """
    theta_i = _temperature("inside_temperature", inside_temperature)
    theta_e = _temperature("outside_temperature", outside_temperature)
    if inside_surface_resistance is not None:
        inside_surface_resistance = _finite("condensation_surface_resistance",
                                            inside_surface_resistance,
                                            "a finite surface resistance >= 0 m^2*K/W")
        if inside_surface_resistance < 0.0:
            raise PhysicsRangeError("condensation_surface_resistance", inside_surface_resistance,
                                    "a finite surface resistance >= 0 m^2*K/W")
    dx, dy = np.diff(mesh.x), np.diff(mesh.y)
    region = section.blocks[np.ix_(mesh.y_block, mesh.x_block)]
    body = region >= 0
    k = np.where(body, section.conductivity[np.maximum(region, 0)], np.nan)
    n = int(body.sum())
    number = np.full(body.shape, -1, dtype=np.int64)
    number[body] = np.arange(n)

    # Conductances between neighbours: series half cells (harmonic mean), per metre of junction.
    half_x = dx[None, :] / (2.0 * k)
    half_y = dy[:, None] / (2.0 * k)
    pair_x = body[:, :-1] & body[:, 1:]
    pair_y = body[:-1, :] & body[1:, :]
    g_x = (dy[:, None] / (half_x[:, :-1] + half_x[:, 1:]))[pair_x]
    g_y = (dx[None, :] / (half_y[:-1, :] + half_y[1:, :]))[pair_y]
    a_x, b_x = number[:, :-1][pair_x], number[:, 1:][pair_x]
    a_y, b_y = number[:-1, :][pair_y], number[1:, :][pair_y]

    faces = _surface_faces(section, mesh, k, half_x, half_y, number, inside_surface_resistance)
    g_f = faces["length"] / (faces["half"] + faces["resistance"])
    environment = faces["inside"].astype(float)

    diagonal = (np.bincount(a_x, g_x, n) + np.bincount(b_x, g_x, n) + np.bincount(a_y, g_y, n)
                + np.bincount(b_y, g_y, n) + np.bincount(faces["cell"], g_f, n))
    rows = np.concatenate((a_x, b_x, a_y, b_y, np.arange(n)))
    cols = np.concatenate((b_x, a_x, b_y, a_y, np.arange(n)))
    data = np.concatenate((-g_x, -g_x, -g_y, -g_y, diagonal))
    from scipy import sparse
    from scipy.sparse.linalg import splu

    matrix = sparse.csc_matrix((data, (rows, cols)), shape=(n, n))
    rhs = np.bincount(faces["cell"], g_f * environment, n)
    tau = splu(matrix, permc_spec="MMD_AT_PLUS_A").solve(rhs)

    # Flows per kelvin, positive into the body; surface temperature from each face's own flux.
    q = g_f * (environment - tau[faces["cell"]])
    tau_face = environment - q / faces["length"] * faces["resistance"]
    inside = faces["inside"]
    L2D_in = float(q[inside].sum())
    L2D_out = float(-q[~inside].sum())
    per_surface = np.bincount(faces["surface"], np.where(inside, q, -q), section.surface_count)

    difference = theta_i - theta_e
    cell_tau = np.full(body.shape, np.nan)
    cell_tau[body] = tau
    node_tau = _node_field(cell_tau, k, body, dx, dy)
    profiles_tau, vertex_sum, vertex_count = _profiles(section, mesh, faces, tau_face)
    touched = vertex_count > 0
    node_tau[touched] = vertex_sum[touched] / vertex_count[touched]

    coldest = (math.inf, math.nan, math.nan)
    profiles = []
    for placed, (px, py, ptau, vertex) in zip(section.surfaces, profiles_tau):
        if placed.inside:
            m = int(np.argmin(ptau))
            if ptau[m] < coldest[0]:
                coldest = (float(ptau[m]), float(px[m]), float(py[m]))
        profiles.append(SurfaceProfile(placed.index, "inside" if placed.inside else "outside",
                                       px, py, theta_e + ptau * difference, vertex))

    field = TemperatureField(mesh.x, mesh.y, 0.5 * (mesh.x[:-1] + mesh.x[1:]),
                             0.5 * (mesh.y[:-1] + mesh.y[1:]), theta_e + cell_tau * difference,
                             theta_e + node_tau * difference, np.where(body, region, -1))
    return SectionSolution(
        mesh=mesh, cells=n, L2D=L2D_in, L2D_out=L2D_out, heat_flow_in=L2D_in * difference,
        heat_flow_out=L2D_out * difference, imbalance=(L2D_in - L2D_out) * difference,
        relative_imbalance=(L2D_in - L2D_out) / L2D_in, surface_heat_flows=per_surface * difference,
        theta_si_min=theta_e + coldest[0] * difference, f_Rsi=coldest[0], x_si_min=coldest[1],
        y_si_min=coldest[2], inside_surface_resistance=inside_surface_resistance, field=field,
        profiles=tuple(profiles))


def _surface_faces(section, mesh, k, half_x, half_y, number, inside_resistance) -> dict:
    """Every boundary face on a surface: its cell, length, half-cell resistance, surface
    resistance, side, surface and centre, in the order of the surfaces and along each."""
    parts = []
    for placed in section.surfaces:
        if placed.vertical:
            node = int(mesh.x_node_of_break[placed.line])
            lo, hi = (int(mesh.y_node_of_break[s]) for s in placed.span)
            column = node if placed.body_after else node - 1
            rows = np.arange(lo, hi)
            cells = (rows, np.full(hi - lo, column))
            length = np.diff(mesh.y)[lo:hi]
            half = half_x[cells]
            centre_x = np.full(hi - lo, mesh.x[node])
            centre_y = 0.5 * (mesh.y[lo:hi] + mesh.y[lo + 1:hi + 1])
        else:
            node = int(mesh.y_node_of_break[placed.line])
            lo, hi = (int(mesh.x_node_of_break[s]) for s in placed.span)
            row = node if placed.body_after else node - 1
            columns = np.arange(lo, hi)
            cells = (np.full(hi - lo, row), columns)
            length = np.diff(mesh.x)[lo:hi]
            half = half_y[cells]
            centre_x = 0.5 * (mesh.x[lo:hi] + mesh.x[lo + 1:hi + 1])
            centre_y = np.full(hi - lo, mesh.y[node])
        resistance = (inside_resistance if placed.inside and inside_resistance is not None
                      else placed.resistance)
        parts.append({"cell": number[cells], "length": length, "half": half,
                      "resistance": np.full(hi - lo, resistance),
                      "inside": np.full(hi - lo, placed.inside),
                      "surface": np.full(hi - lo, placed.index), "x": centre_x, "y": centre_y})
    return {key: np.concatenate([p[key] for p in parts]) for key in parts[0]}


def _profiles(section, mesh, faces, tau_face):
    """Surface temperatures (τ) at face centres and vertices along each surface, and the sums
    and counts of the vertex estimates on the node grid."""
    shape = (len(mesh.y), len(mesh.x))
    vertex_sum, vertex_count = np.zeros(shape), np.zeros(shape)
    out, start = [], 0
    for placed in section.surfaces:
        if placed.vertical:
            lo, hi = (int(mesh.y_node_of_break[s]) for s in placed.span)
            vertices = mesh.y[lo:hi + 1]
        else:
            lo, hi = (int(mesh.x_node_of_break[s]) for s in placed.span)
            vertices = mesh.x[lo:hi + 1]
        m = hi - lo
        t = tau_face[start:start + m]
        start += m
        centres = 0.5 * (vertices[:-1] + vertices[1:])
        at_vertex = np.empty(m + 1)
        if m > 1:
            at_vertex[1:-1] = np.interp(vertices[1:-1], centres, t)
            at_vertex[0] = t[0] + (t[0] - t[1]) * ((centres[0] - vertices[0])
                                                  / (centres[1] - centres[0]))
            at_vertex[-1] = t[-1] + (t[-1] - t[-2]) * ((vertices[-1] - centres[-1])
                                                      / (centres[-1] - centres[-2]))
        else:
            at_vertex[:] = t[0]
        at_vertex = np.clip(at_vertex, 0.0, 1.0)
        along = np.empty(2 * m + 1)
        along[0::2], along[1::2] = vertices, centres
        values = np.empty(2 * m + 1)
        values[0::2], values[1::2] = at_vertex, t
        is_vertex = np.zeros(2 * m + 1, bool)
        is_vertex[0::2] = True
        if placed.vertical:
            node = int(mesh.x_node_of_break[placed.line])
            px, py = np.full(2 * m + 1, mesh.x[node]), along
            index = (np.arange(lo, hi + 1), np.full(m + 1, node))
        else:
            node = int(mesh.y_node_of_break[placed.line])
            px, py = along, np.full(2 * m + 1, mesh.y[node])
            index = (np.full(m + 1, node), np.arange(lo, hi + 1))
        np.add.at(vertex_sum, index, at_vertex)
        np.add.at(vertex_count, index, 1.0)
        if placed.reversed:
            px, py, values, is_vertex = px[::-1], py[::-1], values[::-1], is_vertex[::-1]
        out.append((px, py, values, is_vertex))
    return out, vertex_sum, vertex_count


def _node_field(cell: np.ndarray, k: np.ndarray, body: np.ndarray, dx: np.ndarray,
                dy: np.ndarray) -> np.ndarray:
    """Mean at each node of the body cells around it, each weighted by its bilinear
    (distance) weight times its conductivity; NaN where no body cell touches the node.

    The conductivity weight makes a node on the interface of two layers take the temperature
    that continuity of heat flow gives there, (λ_a/d_a θ_a + λ_b/d_b θ_b)/(λ_a/d_a + λ_b/d_b),
    instead of the plain mean of the two cell centres (which would put the interface under
    insulation half-way to the temperature of the insulation's centre)."""
    def weights(d):
        before = np.zeros(len(d) + 1)  # weight of the cell before the node
        after = np.zeros(len(d) + 1)
        before[1:-1] = d[1:] / (d[:-1] + d[1:])
        after[1:-1] = d[:-1] / (d[:-1] + d[1:])
        before[-1], after[0] = 1.0, 1.0
        return before, after

    wl, wr = weights(dx)
    wb, wa = weights(dy)
    padded = np.zeros((body.shape[0] + 2, body.shape[1] + 2))
    mask = np.zeros_like(padded)
    padded[1:-1, 1:-1] = np.where(body, cell, 0.0)
    mask[1:-1, 1:-1] = np.where(body, k, 0.0)
    total = np.zeros((body.shape[0] + 1, body.shape[1] + 1))
    weight = np.zeros_like(total)
    for wy, rows in ((wb[:, None], slice(0, -1)), (wa[:, None], slice(1, None))):
        for wx, cols in ((wl[None, :], slice(0, -1)), (wr[None, :], slice(1, None))):
            w = wy * wx * mask[rows, cols]
            total += w * padded[rows, cols]
            weight += w
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(weight > 0.0, total / weight, np.nan)


# ----------------------------------------------------------------------------- the junction


def thermal_bridge(regions: Sequence[Region], surfaces: Sequence[Surface],
                   inside_temperature: float, outside_temperature: float, *,
                   cell_size: float | None = None,
                   condensation_surface_resistance: float | None =
                   DEFAULT_CONDENSATION_SURFACE_RESISTANCE,
                   tolerance: float = DEFAULT_TOLERANCE,
                   f_Rsi_tolerance: float | None = DEFAULT_F_RSI_TOLERANCE,
                   max_cells: int = DEFAULT_MAX_CELLS) -> ThermalBridge:
    r"""Return L2D, the heat flows, θ_si,min, f_Rsi and the mesh check of a two-dimensional
    junction, refining the mesh to ISO 10211's criterion.

    .. math::
        L_{2D} = \frac{\Phi}{\theta_i - \theta_e},\qquad
        \frac{|L_{2D}^{(2n)} - L_{2D}^{(n)}|}{L_{2D}^{(2n)}} < 1\,\%,\qquad
        f_{Rsi} = \frac{\theta_{si,\min} - \theta_e}{\theta_i - \theta_e}
        \Big|_{R_{si} = 0.25\ \mathrm{m^2K/W}}

    Parameters
    ----------
    regions : sequence of Region
        The section's rectangles (see :func:`prepare_section`).
    surfaces : sequence of Surface
        Inside and outside surfaces with their resistances [m²·K/W].
    inside_temperature : float
        θ_i [K] > 0.
    outside_temperature : float
        θ_e [K] > 0.
    cell_size : float, optional
        Largest cell [m] > 0 of a single uniform mesh; it is also solved halved to report the
        change. By default a graded mesh is halved until L2D changes by less than ``tolerance``
        (and f_Rsi by less than ``f_Rsi_tolerance``).
    condensation_surface_resistance : float or None
        R_si [m²·K/W] >= 0 replacing every inside surface resistance for θ_si,min and f_Rsi
        (default 0.25, ISO 13788); None takes them from the design solve.
    tolerance : float
        Relative change of L2D on halving that ends the refinement [1], 0 < tolerance < 1
        (0.01, ISO 10211).
    f_Rsi_tolerance : float or None
        Change of f_Rsi on halving that must also be met [1], > 0 (0.005, which is 0.1 K for
        20 K between inside and outside); None checks L2D only, as ISO 10211 does.
    max_cells : int
        The refinement stops, unconverged, before a mesh with more body cells than this [-].

    Returns
    -------
    ThermalBridge
        ``L2D`` [W/(m·K)], ``heat_flow_in`` / ``heat_flow_out`` / ``imbalance`` [W/m],
        ``theta_si_min`` [K], ``f_Rsi`` [1], ``x_si_min`` / ``y_si_min`` [m], the ``design`` and
        ``condensation`` solutions (fields, profiles) and the ``mesh_check``.

    Notes
    -----
    Valid for steady conduction with conductivities independent of temperature and no heat
    sources, two environments (one inside, one outside temperature) and axis-aligned
    geometry. The reported results are those of the finest mesh solved (default) or of the
    stated mesh (``cell_size``); ``mesh_check.converged`` is False when the refinement stopped
    at ``max_cells`` or a stated mesh changes by more than the tolerances on halving: the kind
    must then say so.

    ISO 10211 checks the heat flow only. calcdoc also refines until f_Rsi settles, because the
    surface temperature at an inside corner converges more slowly than L2D (on a plain external
    corner of a 300 mm wall, L2D settles within 0.3 % on a mesh of 50 mm cells while f_Rsi is
    still 0.02 too high, 0.4 K at 20 K). The 0.005 default matches the 0.1 K that ISO 10211
    allows between calculated and reference temperatures in its validation cases (from memory)
    for a 20 K difference. θ_si,min is searched over face centres and surface vertices, corners
    included (see :func:`solve_section`). Where the inside surface temperature is nearly uniform
    around its minimum, its place can move by a few cells from one mesh to the next while its
    value does not (in bench/bench_bridge.py: 18 mm above the floor corner on the mesh used, at
    the corner on finer meshes, f_Rsi differing by 0.0007).

    Raises :class:`~calcdoc.physics.PhysicsRangeError` as :func:`prepare_section` does, and for
    ``inside_temperature``, ``outside_temperature``, ``cell_size`` (not > 0, or a halved mesh
    above ``max_cells``), ``condensation_surface_resistance`` (< 0), ``tolerance``,
    ``f_Rsi_tolerance`` and ``max_cells`` (too few for the first two meshes).

    Examples
    --------
    >>> wall = [Region((0.0, 0.3), (0.0, 1.0), 1.0)]
    >>> faces = [Surface((0.0, 0.0), (0.0, 1.0), "inside", 0.13),
    ...          Surface((0.3, 0.0), (0.3, 1.0), "outside", 0.04)]
    >>> bridge = thermal_bridge(wall, faces, 293.15, 273.15)
    >>> round(bridge.L2D, 4), round(bridge.f_Rsi, 4)  # U·l = 1/0.47; f = 1 - 0.25/0.59
    (2.1277, 0.5763)

    References
    ----------
    1. ISO 10211:2017, rules for the number of subdivisions (halving changes the heat flow by
       less than 1 %; clause number not confirmed), §5.2 cut-off planes (from memory).
    2. ISO 13788:2012, internal surface resistance 0.25 m²·K/W for surface temperatures and the
       temperature factor f_Rsi (from memory).
    """
    theta_i = _temperature("inside_temperature", inside_temperature)
    theta_e = _temperature("outside_temperature", outside_temperature)
    tolerance = _finite("tolerance", tolerance, "0 < tolerance < 1")
    if not 0.0 < tolerance < 1.0:
        raise PhysicsRangeError("tolerance", tolerance, "0 < tolerance < 1")
    if f_Rsi_tolerance is not None:
        f_Rsi_tolerance = _finite("f_Rsi_tolerance", f_Rsi_tolerance, "a finite value > 0")
        if f_Rsi_tolerance <= 0.0:
            raise PhysicsRangeError("f_Rsi_tolerance", f_Rsi_tolerance, "a finite value > 0")
    if condensation_surface_resistance is not None:
        condensation_surface_resistance = _finite(
            "condensation_surface_resistance", condensation_surface_resistance,
            "a finite surface resistance >= 0 m^2*K/W")
        if condensation_surface_resistance < 0.0:
            raise PhysicsRangeError("condensation_surface_resistance",
                                    condensation_surface_resistance,
                                    "a finite surface resistance >= 0 m^2*K/W")
    section = prepare_section(regions, surfaces)

    def solve(mesh):
        design = solve_section(section, mesh, theta_i, theta_e)
        if condensation_surface_resistance is None:
            return design, None
        return design, solve_section(section, mesh, theta_i, theta_e,
                                     condensation_surface_resistance)

    def f_of(level):
        return (level[1] or level[0]).f_Rsi

    def changes(coarser, finer):
        """Relative change of L2D (on the finer mesh's value) and change of f_Rsi."""
        return (abs(finer[0].L2D - coarser[0].L2D) / abs(finer[0].L2D),
                abs(f_of(finer) - f_of(coarser)))

    def settled(change_L2D, change_f):
        return change_L2D < tolerance and (f_Rsi_tolerance is None or change_f < f_Rsi_tolerance)

    if cell_size is None:
        mesh = section.coarse_mesh()
        finer = mesh.halved()
        if finer.body_cells > max_cells:
            raise PhysicsRangeError("max_cells", max_cells,
                                    f"at least {finer.body_cells} cells for the mesh check")
        solved = [solve(mesh), solve(finer)]
        while not settled(*changes(solved[-2], solved[-1])):
            mesh = solved[-1][0].mesh.halved()
            if mesh.body_cells > max_cells:
                break
            solved.append(solve(mesh))
        used, compared = len(solved) - 1, len(solved) - 2
        change_L2D, change_f = changes(solved[compared], solved[used])
    else:
        size = _finite("cell_size", cell_size, "a finite cell size > 0 m")
        if size <= 0.0:
            raise PhysicsRangeError("cell_size", size, "a finite cell size > 0 m")
        if 4.0 * section.uniform_cell_count(size) > max_cells:
            smallest = _smallest_allowed(section, max_cells)
            raise PhysicsRangeError("cell_size", size,
                                    f"a cell size giving at most {max_cells} cells on the halved "
                                    f"check mesh (about {smallest:.3g} m or more)")
        mesh = section.uniform_mesh(size)
        solved = [solve(mesh), solve(mesh.halved())]
        used, compared = 0, 1
        change_L2D, change_f = changes(solved[0], solved[1])

    levels = tuple(MeshLevel(d.cells, *d.mesh.cell_sizes(), d.L2D, f_of((d, c)))
                   for d, c in solved)
    check = MeshCheck(levels, used, compared, change_L2D, tolerance, change_f, f_Rsi_tolerance,
                      settled(change_L2D, change_f), cell_size is not None)
    design, condensation = solved[used]
    surface = condensation if condensation is not None else design
    return ThermalBridge(design.L2D, design.heat_flow_in, design.heat_flow_out, design.imbalance,
                         surface.theta_si_min, surface.f_Rsi, surface.x_si_min, surface.y_si_min,
                         design, condensation, check)


def _smallest_allowed(section: Section, max_cells: int) -> float:
    area = float(np.sum((section.blocks >= 0) * np.outer(np.diff(section.y_breaks),
                                                          np.diff(section.x_breaks))))
    return 2.0 * math.sqrt(area / max_cells)


# ----------------------------------------------------------------------------------------- ψ


def psi(L2D: float, flanking: Sequence[tuple[float, float]]) -> float:
    r"""Return the linear thermal transmittance ψ of a junction.

    .. math::
        \Psi = L_{2D} - \sum_{j} U_j\, l_j

    Parameters
    ----------
    L2D : float
        Thermal coupling coefficient of the two-dimensional model [W/(m·K)] >= 0.
    flanking : sequence of (U, length)
        Each flanking element's thermal transmittance U_j [W/(m²·K)] >= 0 and the length l_j
        [m] >= 0 over which it applies in the model. The lengths decide the convention: on
        internal, overall internal or external dimensions (ISO 13789; state which).

    Returns
    -------
    float
        ψ [W/(m·K)]; negative values are normal on external dimensions at external corners.

    Notes
    -----
    ISO 10211:2017 §10.1 (linear thermal transmittance from a 2-D calculation; clause number
    from memory). Raises :class:`~calcdoc.physics.PhysicsRangeError` for ``L2D``,
    ``flanking[j].U`` or ``flanking[j].length`` not finite or negative.

    Examples
    --------
    >>> round(psi(0.75, [(0.3, 1.0), (0.25, 1.2)]), 4)
    0.15

    References
    ----------
    1. ISO 10211:2017, linear thermal transmittance Ψ = L2D − Σ U_j l_j (from memory; equation
       number not confirmed).
    """
    value = _finite("L2D", L2D, "a finite L2D >= 0 W/(m*K)")
    if value < 0.0:
        raise PhysicsRangeError("L2D", value, "a finite L2D >= 0 W/(m*K)")
    total = 0.0
    for j, item in enumerate(flanking):
        try:
            u, length = item
        except (TypeError, ValueError):
            raise PhysicsRangeError(f"flanking[{j}]", item, "a pair (U, length)") from None
        u = _finite(f"flanking[{j}].U", u, "a finite U >= 0 W/(m^2*K)")
        length = _finite(f"flanking[{j}].length", length, "a finite length >= 0 m")
        if u < 0.0:
            raise PhysicsRangeError(f"flanking[{j}].U", u, "a finite U >= 0 W/(m^2*K)")
        if length < 0.0:
            raise PhysicsRangeError(f"flanking[{j}].length", length, "a finite length >= 0 m")
        total += u * length
    return value - total
