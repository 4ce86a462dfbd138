"""View factors (configuration factors) of diffuse surfaces from closed-form catalogue cases.

Each function is one case of Howell's catalogue of configuration factors; the case number is in
its name's docstring. Lengths in metres, factors dimensionless. Inputs may be numpy arrays, which
broadcast against each other; the element factor in particular is evaluated over whole grids of
receiver points when the worst point of a receiving plane is searched for.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from calcdoc.physics import PhysicsRangeError

__all__ = [
    "opposed_rectangles",
    "perpendicular_rectangles",
    "element_to_rectangle_corner",
    "element_to_rectangle",
    "coaxial_disks",
    "reciprocal_view_factor",
]


def _first_bad(array: np.ndarray, bad: np.ndarray) -> float:
    """The first offending value of an array, for the error message."""
    return float(array[bad].flat[0]) if array.ndim else float(array)


def _positive(quantity: str, value: ArrayLike) -> np.ndarray:
    """The value as a float array, refused unless every element is finite and > 0."""
    array = np.asarray(value, dtype=float)
    bad = ~(np.isfinite(array) & (array > 0.0))
    if np.any(bad):
        raise PhysicsRangeError(quantity, _first_bad(array, bad), "a finite length > 0 m")
    return array


def _finite(quantity: str, value: ArrayLike) -> np.ndarray:
    """The value as a float array, refused unless every element is finite."""
    array = np.asarray(value, dtype=float)
    bad = ~np.isfinite(array)
    if np.any(bad):
        raise PhysicsRangeError(quantity, _first_bad(array, bad), "a finite coordinate in m")
    return array


def _result(value: np.ndarray) -> float | np.ndarray:
    """A plain float for scalar input, the array otherwise."""
    return float(value) if value.ndim == 0 else value


def opposed_rectangles(width: ArrayLike, height: ArrayLike,
                       separation: ArrayLike) -> float | np.ndarray:
    r"""Return the view factor between two identical, parallel, directly opposed rectangles.

    .. math::
        F_{12} = \frac{2}{\pi X Y}\left\{
            \ln\left[\frac{(1+X^2)(1+Y^2)}{1+X^2+Y^2}\right]^{1/2}
            + X\sqrt{1+Y^2}\,\tan^{-1}\frac{X}{\sqrt{1+Y^2}}
            + Y\sqrt{1+X^2}\,\tan^{-1}\frac{Y}{\sqrt{1+X^2}}
            - X\tan^{-1}X - Y\tan^{-1}Y \right\},
        \quad X = \frac{a}{c},\; Y = \frac{b}{c}

    Parameters
    ----------
    width : float or array
        Side *a* of each rectangle [m].
    height : float or array
        Side *b* of each rectangle [m].
    separation : float or array
        Distance *c* between the planes of the rectangles [m].

    Returns
    -------
    F12 : float or array
        View factor from one rectangle to the other [1]; equal both ways.

    Notes
    -----
    Exact for diffuse surfaces at any positive dimensions; every length must be > 0
    (``PhysicsRangeError`` otherwise). Howell's catalogue case C-11, also given in
    Incropera's Table 13.2 (aligned parallel rectangles) and plotted in its Fig. 13.4.

    Examples
    --------
    >>> round(opposed_rectangles(1.0, 1.0, 1.0), 4)
    0.1998

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case C-11.
    2. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Table 13.2 and Fig. 13.4.
    """
    a = _positive("width", width)
    b = _positive("height", height)
    c = _positive("separation", separation)
    x = a / c
    y = b / c
    x2 = x * x
    y2 = y * y
    root_x = np.sqrt(1.0 + x2)
    root_y = np.sqrt(1.0 + y2)
    bracket = (0.5 * np.log((1.0 + x2) * (1.0 + y2) / (1.0 + x2 + y2))
               + x * root_y * np.arctan(x / root_y)
               + y * root_x * np.arctan(y / root_x)
               - x * np.arctan(x) - y * np.arctan(y))
    return _result(2.0 / (np.pi * x * y) * bracket)


def perpendicular_rectangles(common_edge: ArrayLike, width_1: ArrayLike,
                             width_2: ArrayLike) -> float | np.ndarray:
    r"""Return the view factor from rectangle 1 to rectangle 2, perpendicular with a common edge.

    .. math::
        F_{12} = \frac{1}{\pi W}\Big\{ W\tan^{-1}\frac{1}{W} + H\tan^{-1}\frac{1}{H}
            - \sqrt{H^2+W^2}\,\tan^{-1}\frac{1}{\sqrt{H^2+W^2}}
            + \frac{1}{4}\ln\Big[\frac{(1+W^2)(1+H^2)}{1+W^2+H^2}
              \Big(\frac{W^2(1+W^2+H^2)}{(1+W^2)(W^2+H^2)}\Big)^{W^2}
              \Big(\frac{H^2(1+H^2+W^2)}{(1+H^2)(H^2+W^2)}\Big)^{H^2}\Big]\Big\},
        \quad W = \frac{w_1}{l},\; H = \frac{w_2}{l}

    Parameters
    ----------
    common_edge : float or array
        Length *l* of the shared edge [m].
    width_1 : float or array
        Width *w*\ :sub:`1` of rectangle 1, perpendicular to the common edge [m].
    width_2 : float or array
        Width *w*\ :sub:`2` of rectangle 2, perpendicular to the common edge [m].

    Returns
    -------
    F12 : float or array
        View factor from rectangle 1 (area *l w*\ :sub:`1`) to rectangle 2 [1].

    Notes
    -----
    The rectangles meet at 90° along the whole common edge. Exact for diffuse surfaces at any
    positive dimensions (every length > 0, ``PhysicsRangeError`` otherwise). Howell's catalogue
    case C-14, also Incropera's Table 13.2 (perpendicular rectangles with a common edge) and
    Fig. 13.6. The logarithm is evaluated as a sum of logarithms so that the powers
    :math:`W^2` and :math:`H^2` cannot overflow.

    Examples
    --------
    >>> round(perpendicular_rectangles(1.0, 1.0, 1.0), 4)
    0.2

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case C-14.
    2. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Table 13.2 and Fig. 13.6.
    """
    length = _positive("common_edge", common_edge)
    w = _positive("width_1", width_1) / length
    h = _positive("width_2", width_2) / length
    w2 = w * w
    h2 = h * h
    sum2 = w2 + h2
    root = np.sqrt(sum2)
    log_term = (np.log((1.0 + w2) * (1.0 + h2) / (1.0 + sum2))
                + w2 * np.log(w2 * (1.0 + sum2) / ((1.0 + w2) * sum2))
                + h2 * np.log(h2 * (1.0 + sum2) / ((1.0 + h2) * sum2)))
    bracket = (w * np.arctan(1.0 / w) + h * np.arctan(1.0 / h)
               - root * np.arctan(1.0 / root) + 0.25 * log_term)
    return _result(bracket / (np.pi * w))


def _corner_factor(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Case B-3 with signed sides: odd in *a* and in *b*, so corner sums superpose directly."""
    x = a / c
    y = b / c
    root_x = np.sqrt(1.0 + x * x)
    root_y = np.sqrt(1.0 + y * y)
    return (x / root_x * np.arctan(y / root_x) + y / root_y * np.arctan(x / root_y)) / (2.0 * np.pi)


def element_to_rectangle_corner(width: ArrayLike, height: ArrayLike,
                                separation: ArrayLike) -> float | np.ndarray:
    r"""Return the view factor from a planar element to a parallel rectangle above one corner.

    .. math::
        F_{d1-2} = \frac{1}{2\pi}\left[\frac{A}{\sqrt{1+A^2}}\tan^{-1}\frac{B}{\sqrt{1+A^2}}
            + \frac{B}{\sqrt{1+B^2}}\tan^{-1}\frac{A}{\sqrt{1+B^2}}\right],
        \quad A = \frac{a}{c},\; B = \frac{b}{c}

    Parameters
    ----------
    width : float or array
        Side *a* of the rectangle [m].
    height : float or array
        Side *b* of the rectangle [m].
    separation : float or array
        Distance *c* from the element to the rectangle's plane [m].

    Returns
    -------
    F : float or array
        View factor from the element to the rectangle [1].

    Notes
    -----
    The element is parallel to the rectangle and its normal passes through one corner of it.
    Exact for diffuse surfaces at any positive dimensions (every length > 0,
    ``PhysicsRangeError`` otherwise); tends to 1/4 as the rectangle grows without bound.
    Howell's catalogue case B-3.

    Examples
    --------
    >>> round(element_to_rectangle_corner(1.0, 1.0, 1.0), 4)
    0.1385

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    """
    a = _positive("width", width)
    b = _positive("height", height)
    c = _positive("separation", separation)
    return _result(_corner_factor(a, b, c))


def element_to_rectangle(width: ArrayLike, height: ArrayLike, separation: ArrayLike,
                         element_x: ArrayLike, element_y: ArrayLike) -> float | np.ndarray:
    r"""Return the view factor from a planar element to a parallel rectangle, at any foot point.

    .. math::
        F_{d1-2}(x, y) = \sum_{u \in \{x,\, a-x\}} \sum_{v \in \{y,\, b-y\}}
            \operatorname{sgn}(u)\operatorname{sgn}(v)\, F_{\mathrm{B3}}(|u|, |v|, c)

    where :math:`F_{\mathrm{B3}}` is :func:`element_to_rectangle_corner`.

    Parameters
    ----------
    width : float or array
        Side *a* of the rectangle, along *x* [m].
    height : float or array
        Side *b* of the rectangle, along *y* [m].
    separation : float or array
        Distance *c* from the element to the rectangle's plane [m].
    element_x : float or array
        *x* of the element's foot point (its projection on the rectangle's plane), measured from
        the rectangle's lower-left corner [m]; any finite value, inside or outside the rectangle.
    element_y : float or array
        *y* of the foot point, from the lower-left corner [m].

    Returns
    -------
    F : float or array
        View factor from the element, facing the rectangle, to the rectangle [1]; broadcast over
        the inputs.

    Notes
    -----
    Superposition (view-factor algebra) of four corner rectangles of case B-3 meeting at the
    foot point. With the corner factor extended as an odd function of each side, a foot point
    outside the rectangle is handled by the same sum: a corner rectangle that reaches beyond the
    foot point is subtracted. Exact for diffuse surfaces; lengths > 0 and finite coordinates
    (``PhysicsRangeError`` otherwise). Tends to 1, 1/2 and 1/4 for a foot point inside, on an
    edge and at a corner of a rectangle that grows without bound.

    Examples
    --------
    >>> round(element_to_rectangle(2.0, 2.0, 1.0, 1.0, 1.0), 4)
    0.5541

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case B-3.
    2. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), §13.1.2 (view-factor relations, superposition).
    """
    a = _positive("width", width)
    b = _positive("height", height)
    c = _positive("separation", separation)
    x = _finite("element_x", element_x)
    y = _finite("element_y", element_y)
    left, right = x, a - x
    below, above = y, b - y
    total = (_corner_factor(right, above, c) + _corner_factor(left, above, c)
             + _corner_factor(right, below, c) + _corner_factor(left, below, c))
    return _result(total)


def coaxial_disks(radius_1: ArrayLike, radius_2: ArrayLike,
                  separation: ArrayLike) -> float | np.ndarray:
    r"""Return the view factor from disk 1 to a parallel coaxial disk 2.

    .. math::
        F_{12} = \frac{1}{2}\left[X - \sqrt{X^2 - 4\left(\frac{R_2}{R_1}\right)^2}\right],
        \quad X = 1 + \frac{1 + R_2^2}{R_1^2},\; R_1 = \frac{r_1}{h},\; R_2 = \frac{r_2}{h}

    Parameters
    ----------
    radius_1 : float or array
        Radius *r*\ :sub:`1` of the emitting disk [m].
    radius_2 : float or array
        Radius *r*\ :sub:`2` of the receiving disk [m].
    separation : float or array
        Distance *h* between the disks [m].

    Returns
    -------
    F12 : float or array
        View factor from disk 1 to disk 2 [1].

    Notes
    -----
    Disks parallel, centres on a common normal. Exact for diffuse surfaces at any positive
    dimensions (every length > 0, ``PhysicsRangeError`` otherwise). Howell's catalogue case
    C-41, also Incropera's Table 13.2 (coaxial parallel disks) and Fig. 13.5. The published
    form loses digits by cancellation when disk 2 is small, so the algebraically equal
    :math:`F_{12} = 2 (R_2/R_1)^2 / [X + \sqrt{X^2 - 4(R_2/R_1)^2}]` is evaluated.

    Examples
    --------
    >>> round(coaxial_disks(1.0, 1.0, 1.0), 3)
    0.382

    References
    ----------
    1. J. R. Howell, *A Catalog of Radiation Heat Transfer Configuration Factors*, 3rd ed.,
       University of Texas at Austin (2010), case C-41.
    2. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Table 13.2 and Fig. 13.5.
    """
    r1 = _positive("radius_1", radius_1)
    r2 = _positive("radius_2", radius_2)
    h = _positive("separation", separation)
    ratio2 = (r2 / r1) ** 2
    x = 1.0 + (h * h + r2 * r2) / (r1 * r1)
    # Rationalised form of (X - sqrt(X^2 - 4 ratio^2)) / 2: no cancellation.
    return _result(2.0 * ratio2 / (x + np.sqrt(x * x - 4.0 * ratio2)))


def reciprocal_view_factor(view_factor: ArrayLike, area_1: ArrayLike,
                           area_2: ArrayLike) -> float | np.ndarray:
    r"""Return the reverse view factor F21 from F12 by reciprocity.

    .. math::
        F_{21} = \frac{A_1 F_{12}}{A_2}

    Parameters
    ----------
    view_factor : float or array
        F12, from surface 1 to surface 2 [1], in [0, 1].
    area_1 : float or array
        Area of surface 1 [m²], > 0.
    area_2 : float or array
        Area of surface 2 [m²], > 0.

    Returns
    -------
    F21 : float or array
        View factor from surface 2 to surface 1 [1].

    Notes
    -----
    Holds for any pair of diffuse surfaces. A result above 1 means that F12 and the areas are
    inconsistent, and is refused (``PhysicsRangeError``), as are F12 outside [0, 1] and areas
    that are not > 0.

    Examples
    --------
    >>> reciprocal_view_factor(0.5, 1.0, 2.0)
    0.25

    References
    ----------
    1. T. L. Bergman, A. S. Lavine, F. P. Incropera, D. P. DeWitt, *Fundamentals of Heat and
       Mass Transfer*, 7th ed., Wiley (2011), Eq. 13.3 (reciprocity relation).
    """
    f12 = np.asarray(view_factor, dtype=float)
    bad = ~(np.isfinite(f12) & (f12 >= 0.0) & (f12 <= 1.0))
    if np.any(bad):
        raise PhysicsRangeError("view_factor", _first_bad(f12, bad), "0 <= F12 <= 1")
    a1 = np.asarray(area_1, dtype=float)
    a2 = np.asarray(area_2, dtype=float)
    for name, area in (("area_1", a1), ("area_2", a2)):
        bad = ~(np.isfinite(area) & (area > 0.0))
        if np.any(bad):
            raise PhysicsRangeError(name, _first_bad(area, bad), "an area > 0 m^2")
    f21 = a1 * f12 / a2
    bad = f21 > 1.0 + 1e-12
    if np.any(bad):
        raise PhysicsRangeError("view_factor", _first_bad(np.broadcast_to(f12, bad.shape), bad),
                                "F12 <= A2/A1, so that the reverse factor F21 <= 1")
    return _result(np.minimum(f21, 1.0))
