"""View factors of the catalogue cases against published values, 2-D limits and quadrature.

Independent check: the view-factor double integral

    F12 = 1/A1 ∫∫ cosθ1 cosθ2 / (π S²) dA1 dA2

evaluated here by vectorised Gauss–Legendre quadrature over both surfaces, with no use of the
closed forms under test.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.polynomial.legendre import leggauss

from calcdoc.physics import PhysicsRangeError
from calcdoc.physics.viewfactors import (
    coaxial_disks,
    element_to_rectangle,
    element_to_rectangle_corner,
    opposed_rectangles,
    perpendicular_rectangles,
    reciprocal_view_factor,
)

LENGTHS = st.floats(min_value=0.05, max_value=20.0, allow_nan=False, allow_infinity=False)
FEW = settings(max_examples=50, deadline=None)


# --- quadrature helpers (independent of the code under test) ---------------------------------

def gauss(n: int, a: float, b: float) -> tuple[np.ndarray, np.ndarray]:
    """Gauss–Legendre nodes and weights on [a, b]."""
    t, w = leggauss(n)
    return 0.5 * (b - a) * t + 0.5 * (a + b), 0.5 * (b - a) * w


def graded(n: int, length: float, levels: int, ratio: float = 0.25):
    """Composite Gauss–Legendre on [0, length], panels shrinking geometrically towards 0."""
    edges = np.concatenate([[0.0], length * ratio ** np.arange(levels, -1, -1)])
    t, w = leggauss(n)
    a, b = edges[:-1, None], edges[1:, None]
    return (0.5 * (b - a) * t + 0.5 * (a + b)).ravel(), (0.5 * (b - a) * w).ravel()


def split_gauss(n: int, a: float, b: float, cut: float):
    """Gauss–Legendre on [a, b], split at ``cut`` when it lies inside (a peaked integrand)."""
    if a < cut < b:
        x1, w1 = gauss(n, a, cut)
        x2, w2 = gauss(n, cut, b)
        return np.concatenate([x1, x2]), np.concatenate([w1, w2])
    return gauss(n, a, b)


def quadrature_opposed(a: float, b: float, c: float, n: int = 14) -> float:
    """F12 of opposed rectangles [0,a]x[0,b] at z=0 and z=c: kernel c² / (π S⁴)."""
    x, wx = gauss(n, 0.0, a)
    y, wy = gauss(n, 0.0, b)
    dx = x[:, None, None, None] - x[None, None, :, None]
    dy = y[None, :, None, None] - y[None, None, None, :]
    weight = (wx[:, None, None, None] * wy[None, :, None, None]
              * wx[None, None, :, None] * wy[None, None, None, :])
    s2 = dx * dx + dy * dy + c * c
    return float(np.sum(weight * c * c / (np.pi * s2 * s2)) / (a * b))


def quadrature_perpendicular(length: float, w1: float, w2: float) -> float:
    """F12 of rectangle 1 (z=0, 0<y<w1) to rectangle 2 (y=0, 0<z<w2), common edge along x.

    The kernel y1 z2 / (π S⁴) is singular on the common edge. Along the edge the double
    integral over x1 and x2 depends only on u = x1 − x2, so ∫∫ dx1 dx2 becomes
    2 ∫_0^l (l − u) du exactly; the remaining singular corner u = y1 = z2 = 0 is resolved by
    panels graded geometrically towards it (converges to ~1e-9 with 8 points x 10 levels).
    """
    u, wu = graded(8, length, 10)
    y, wy = graded(8, w1, 10)
    z, wz = graded(8, w2, 10)
    uu, yy, zz = u[:, None, None], y[None, :, None], z[None, None, :]
    weight = (wu * (length - u))[:, None, None] * wy[None, :, None] * wz[None, None, :]
    s2 = uu * uu + yy * yy + zz * zz
    return float(2.0 * np.sum(weight * yy * zz / (np.pi * s2 * s2)) / (length * w1))


def quadrature_element(a: float, b: float, c: float, x0: float, y0: float, n: int = 40) -> float:
    """F of an element at foot point (x0, y0) facing the rectangle [0,a]x[0,b] at distance c."""
    x, wx = split_gauss(n, 0.0, a, x0)
    y, wy = split_gauss(n, 0.0, b, y0)
    s2 = (x[:, None] - x0) ** 2 + (y[None, :] - y0) ** 2 + c * c
    return float(np.sum(wx[:, None] * wy[None, :] * c * c / (np.pi * s2 * s2)))


def quadrature_disks(r1: float, r2: float, h: float, n: int = 24) -> float:
    """F12 of coaxial disks; by symmetry one azimuth of disk 1 is enough (factor 2π)."""
    p1, w1 = gauss(n, 0.0, r1)
    p2, w2 = gauss(n, 0.0, r2)
    phi, wphi = gauss(2 * n, 0.0, 2.0 * np.pi)
    s2 = (h * h + p1[:, None, None] ** 2 + p2[None, :, None] ** 2
          - 2.0 * p1[:, None, None] * p2[None, :, None] * np.cos(phi[None, None, :]))
    weight = ((w1 * p1)[:, None, None] * (w2 * p2)[None, :, None] * wphi[None, None, :])
    integral = 2.0 * np.pi * np.sum(weight * h * h / (np.pi * s2 * s2))
    return float(integral / (np.pi * r1 * r1))


# --- published values --------------------------------------------------------------------------

def test_opposed_rectangles__howell_c11_unit_squares():
    # Two unit squares one unit apart: F = 0.1998, the standard check value of case C-11
    # (Howell's catalogue C-11; from memory, printed to 4 decimals).
    assert opposed_rectangles(1.0, 1.0, 1.0) == pytest.approx(0.1998, abs=5e-5)


@pytest.mark.parametrize("x_over_l, y_over_l, reading", [
    (1.0, 1.0, 0.20),    # Incropera 7th ed. Fig. 13.4, Y/L = 1 curve at X/L = 1 (from memory)
    (10.0, 10.0, 0.83),  # Incropera 7th ed. Fig. 13.4, Y/L = 10 curve at X/L = 10 (from memory)
])
def test_opposed_rectangles__incropera_fig_13_4_readings(x_over_l, y_over_l, reading):
    # Figure readings: about ±0.01 on the chart's linear factor scale.
    assert opposed_rectangles(x_over_l, y_over_l, 1.0) == pytest.approx(reading, abs=0.01)


def test_perpendicular_rectangles__howell_c14_unit_squares():
    # Two unit squares at 90° sharing an edge: F = 0.2000 (Howell's catalogue C-14, the standard
    # check value 0.20004; from memory, printed to 4 decimals).
    assert perpendicular_rectangles(1.0, 1.0, 1.0) == pytest.approx(0.2000, abs=5e-5)


def test_perpendicular_rectangles__incropera_fig_13_6_unit_reading():
    # Incropera 7th ed. Fig. 13.6, Z/X = 1 curve at Y/X = 1: about 0.20 (from memory, ±0.01).
    assert perpendicular_rectangles(1.0, 1.0, 1.0) == pytest.approx(0.20, abs=0.01)


def test_coaxial_disks__howell_c41_equal_radius_equal_to_separation():
    # r1 = r2 = h: X = 3, F = (3 - sqrt(5)) / 2 = 0.3820 (Howell's catalogue C-41 evaluated by
    # hand; Incropera 7th ed. Fig. 13.5, r_j/L = 1 at L/r_i = 1 reads about 0.38, from memory).
    assert coaxial_disks(1.0, 1.0, 1.0) == pytest.approx((3.0 - math.sqrt(5.0)) / 2.0, rel=1e-12)
    assert coaxial_disks(1.0, 1.0, 1.0) == pytest.approx(0.38, abs=0.01)


def test_element_to_rectangle_corner__howell_b3_unit_square():
    # Element under the corner of a unit square one unit away: F = 0.1385 (Howell's catalogue
    # B-3; from memory, printed to 4 decimals).
    assert element_to_rectangle_corner(1.0, 1.0, 1.0) == pytest.approx(0.1385, abs=5e-5)


# --- two-dimensional limits (Incropera 7th ed. Table 13.1, from memory) --------------------------

def test_opposed_rectangles__long_strips_tend_to_incropera_table_13_1():
    # Parallel plates with midlines connected by a perpendicular (Incropera Table 13.1):
    # F_ij = {[(Wi + Wj)² + 4]^1/2 - [(Wj - Wi)² + 4]^1/2} / (2 Wi), W = w/L; here Wi = Wj.
    for w_over_l in (0.3, 1.0, 4.0):
        strips = (math.sqrt(4.0 * w_over_l**2 + 4.0) - 2.0) / (2.0 * w_over_l)
        # finite length 1e4 L: end effects of order 1e-4
        assert opposed_rectangles(w_over_l, 1e4, 1.0) == pytest.approx(strips, abs=5e-4)


def test_perpendicular_rectangles__long_plates_tend_to_incropera_table_13_1():
    # Perpendicular plates with a common edge: F_ij = [1 + wj/wi - sqrt(1 + (wj/wi)²)] / 2
    # (Incropera Table 13.1); here the common edge is 1e4 times the widths.
    for wi, wj in ((1.0, 1.0), (1.0, 3.0), (2.0, 0.5)):
        ratio = wj / wi
        plates = (1.0 + ratio - math.sqrt(1.0 + ratio**2)) / 2.0
        assert perpendicular_rectangles(1e4, wi, wj) == pytest.approx(plates, abs=5e-4)


def test_coaxial_disks__small_receiver_tends_to_element_on_axis():
    # A small disk 2 of area A2 on the axis of disk 1, far smaller than h: reciprocity with the
    # element-to-disk factor r1²/(r1² + h²) (Howell's catalogue, element to coaxial disk; from
    # memory) gives F12 = A2/A1 · r1²/(r1² + h²).
    r1, r2, h = 1.5, 1e-4, 2.0
    expected = (r2 / r1) ** 2 * r1**2 / (r1**2 + h**2)
    assert coaxial_disks(r1, r2, h) == pytest.approx(expected, rel=1e-6)


# --- independent quadrature ------------------------------------------------------------------

@pytest.mark.parametrize("a, b, c", [(1.0, 1.0, 1.0), (2.0, 0.5, 1.5), (3.0, 4.0, 2.0),
                                     (0.4, 0.7, 0.9)])
def test_opposed_rectangles__matches_gauss_legendre_double_integral(a, b, c):
    assert opposed_rectangles(a, b, c) == pytest.approx(quadrature_opposed(a, b, c), rel=1e-6)


@pytest.mark.parametrize("length, w1, w2", [(1.0, 1.0, 1.0), (2.0, 1.0, 3.0), (0.5, 2.0, 0.3),
                                            (3.0, 0.4, 0.4)])
def test_perpendicular_rectangles__matches_gauss_legendre_double_integral(length, w1, w2):
    # Singular kernel on the common edge: graded panels, agreement to 1e-6 (see helper).
    assert perpendicular_rectangles(length, w1, w2) == pytest.approx(
        quadrature_perpendicular(length, w1, w2), abs=1e-6)


@pytest.mark.parametrize("a, b, c, x0, y0", [
    (2.0, 1.0, 1.0, 1.0, 0.5),    # centre
    (2.0, 1.0, 0.7, 0.3, 0.8),    # inside, off centre
    (2.0, 1.0, 1.0, 0.0, 0.0),    # on a corner
    (2.0, 1.0, 1.2, 3.0, 0.5),    # beside the rectangle
    (2.0, 1.0, 1.5, -1.0, -2.0),  # diagonally outside
    (2.0, 1.0, 0.5, 1.0, 1.4),    # above the top edge
])
def test_element_to_rectangle__matches_gauss_legendre_integral(a, b, c, x0, y0):
    assert element_to_rectangle(a, b, c, x0, y0) == pytest.approx(
        quadrature_element(a, b, c, x0, y0), rel=1e-7)


@pytest.mark.parametrize("r1, r2, h", [(1.0, 1.0, 1.0), (0.5, 2.0, 1.0), (2.0, 0.7, 1.3)])
def test_coaxial_disks__matches_gauss_legendre_double_integral(r1, r2, h):
    assert coaxial_disks(r1, r2, h) == pytest.approx(quadrature_disks(r1, r2, h), rel=1e-6)


def test_element_to_rectangle__vectorised_over_points_equals_pointwise():
    xs = np.linspace(-1.0, 3.0, 7)
    ys = np.linspace(-0.5, 1.5, 5)
    grid_x, grid_y = np.meshgrid(xs, ys)
    vector = element_to_rectangle(2.0, 1.0, 0.8, grid_x, grid_y)
    assert vector.shape == grid_x.shape
    for (i, j), value in np.ndenumerate(vector):
        assert value == element_to_rectangle(2.0, 1.0, 0.8, float(grid_x[i, j]),
                                             float(grid_y[i, j]))


# --- properties (hypothesis) ------------------------------------------------------------------

@FEW
@given(length=LENGTHS, w1=LENGTHS, w2=LENGTHS)
def test_perpendicular_rectangles__reciprocity(length, w1, w2):
    # A1 F12 = A2 F21 (Incropera 7th ed. Eq. 13.3)
    forward = length * w1 * perpendicular_rectangles(length, w1, w2)
    backward = length * w2 * perpendicular_rectangles(length, w2, w1)
    assert forward == pytest.approx(backward, rel=1e-9)


@FEW
@given(r1=LENGTHS, r2=LENGTHS, h=LENGTHS)
def test_coaxial_disks__reciprocity(r1, r2, h):
    # A1 F12 = A2 F21 (Incropera 7th ed. Eq. 13.3)
    forward = r1 * r1 * coaxial_disks(r1, r2, h)
    backward = r2 * r2 * coaxial_disks(r2, r1, h)
    assert forward == pytest.approx(backward, rel=1e-9)


@FEW
@given(r1=LENGTHS, r2=LENGTHS, h=LENGTHS)
def test_reciprocal_view_factor__gives_the_reverse_disk_factor(r1, r2, h):
    f21 = reciprocal_view_factor(coaxial_disks(r1, r2, h), r1 * r1, r2 * r2)
    assert f21 == pytest.approx(coaxial_disks(r2, r1, h), rel=1e-9)


@FEW
@given(a=LENGTHS, b=LENGTHS, c=LENGTHS)
def test_box_faces__summation_rule_gives_one(a, b, c):
    # Inside a closed a x b x c box, the factors from the a x b face to the other five faces sum
    # to 1 (summation rule, Incropera 7th ed. Eq. 13.4): C-11 plus four C-14 neighbours.
    total = (opposed_rectangles(a, b, c)
             + 2.0 * perpendicular_rectangles(a, b, c)
             + 2.0 * perpendicular_rectangles(b, a, c))
    assert total == pytest.approx(1.0, abs=1e-9)


@FEW
@given(r1=LENGTHS, r2=LENGTHS, h=LENGTHS, a=LENGTHS, b=LENGTHS, c=LENGTHS)
def test_catalogue_factors__never_above_one(r1, r2, h, a, b, c):
    # Summation rule: no factor exceeds 1, and a factor times its area never exceeds the other
    # area (Incropera 7th ed. Eqs. 13.3-13.4).
    for value in (coaxial_disks(r1, r2, h), opposed_rectangles(a, b, c),
                  perpendicular_rectangles(a, b, c), element_to_rectangle(a, b, c, 0.3, 0.2)):
        assert 0.0 < value <= 1.0
    assert r1 * r1 * coaxial_disks(r1, r2, h) <= r2 * r2 * (1.0 + 1e-12)


@FEW
@given(cuts=st.lists(st.floats(min_value=0.1, max_value=5.0), min_size=1, max_size=6),
       height=LENGTHS, c=LENGTHS, x0=st.floats(-5.0, 15.0), y0=st.floats(-5.0, 15.0))
def test_element_to_tiles_of_a_plane__sum_never_above_one(cuts, height, c, x0, y0):
    # Coplanar rectangles side by side: their factors add (superposition) and never exceed 1.
    edges = np.concatenate([[0.0], np.cumsum(cuts)])
    parts = [element_to_rectangle(right - left, height, c, x0 - left, y0)
             for left, right in zip(edges[:-1], edges[1:])]
    whole = element_to_rectangle(edges[-1], height, c, x0, y0)
    assert sum(parts) == pytest.approx(whole, rel=1e-9, abs=1e-15)
    assert sum(parts) <= 1.0


@FEW
@given(width=st.floats(200.0, 1e4), height=st.floats(200.0, 1e4),
       u=st.floats(0.0, 1.0), v=st.floats(0.0, 1.0))
def test_element_factor__growing_rectangle_tends_to_one_half_quarter(width, height, u, v):
    # Bounds from containment, at separation 1: the plane, a half-plane and a quadrant give 1,
    # 1/2 and 1/4 from above; an inscribed disk of radius r gives r²/(r² + 1) from below
    # (element to a coaxial disk, Howell's catalogue; from memory).
    def disk(r):
        return r * r / (r * r + 1.0)

    x = 50.0 + u * (width - 100.0)
    y = 50.0 + v * (height - 100.0)
    inside = element_to_rectangle(width, height, 1.0, x, y)
    reach = min(x, y, width - x, height - y)
    assert disk(reach) <= inside <= 1.0
    edge = element_to_rectangle(width, height, 1.0, x, 0.0)
    assert 0.5 * disk(min(x, width - x, height)) <= edge <= 0.5
    corner = element_to_rectangle(width, height, 1.0, 0.0, 0.0)
    assert 0.25 * disk(min(width, height)) <= corner <= 0.25


def test_element_factor__limits_one_half_quarter_for_a_huge_rectangle():
    size = 1e6  # a million separations: within 1e-5 of the limits
    assert element_to_rectangle(size, size, 1.0, size / 2, size / 2) == pytest.approx(1.0, abs=1e-5)
    assert element_to_rectangle(size, size, 1.0, size / 2, 0.0) == pytest.approx(0.5, abs=1e-5)
    assert element_to_rectangle(size, size, 1.0, 0.0, 0.0) == pytest.approx(0.25, abs=1e-5)


@FEW
@given(a=LENGTHS, b=LENGTHS, c=LENGTHS, grow=st.floats(1.01, 10.0),
       u=st.floats(0.0, 1.0), v=st.floats(0.0, 1.0))
def test_factors__fall_with_separation(a, b, c, grow, u, v):
    far = c * grow
    assert opposed_rectangles(a, b, far) < opposed_rectangles(a, b, c)
    assert coaxial_disks(a, b, far) < coaxial_disks(a, b, c)
    # a foot point over the rectangle (one beside it first sees more as the planes part)
    x, y = u * a, v * b
    assert element_to_rectangle(a, b, far, x, y) < element_to_rectangle(a, b, c, x, y)


# --- bad input ---------------------------------------------------------------------------------

@pytest.mark.parametrize("call, quantity", [
    (lambda: opposed_rectangles(-1.0, 1.0, 1.0), "width"),
    (lambda: opposed_rectangles(1.0, 0.0, 1.0), "height"),
    (lambda: opposed_rectangles(1.0, 1.0, -2.0), "separation"),
    (lambda: perpendicular_rectangles(1.0, -0.5, 1.0), "width_1"),
    (lambda: perpendicular_rectangles(0.0, 1.0, 1.0), "common_edge"),
    (lambda: coaxial_disks(1.0, -1.0, 1.0), "radius_2"),
    (lambda: element_to_rectangle(1.0, 1.0, 1.0, float("nan"), 0.0), "element_x"),
    (lambda: element_to_rectangle_corner(1.0, 1.0, float("inf")), "separation"),
    (lambda: reciprocal_view_factor(1.2, 1.0, 1.0), "view_factor"),
    (lambda: reciprocal_view_factor(0.9, 2.0, 1.0), "view_factor"),
    (lambda: reciprocal_view_factor(0.5, -1.0, 1.0), "area_1"),
])
def test_bad_geometry__raises_physics_range_error(call, quantity):
    with pytest.raises(PhysicsRangeError) as info:
        call()
    assert info.value.quantity == quantity
    assert isinstance(info.value, ValueError)


def test_bad_array_element__error_names_first_offending_value():
    with pytest.raises(PhysicsRangeError) as info:
        opposed_rectangles(np.array([1.0, 2.0, -3.0, -4.0]), 1.0, 1.0)
    assert info.value.value == -3.0
    assert str(info.value) == "width: out of range (expected a finite length > 0 m, got -3.0)"
