"""SciPy's solvers as the physics calls them, each loaded on its first call.

scipy.optimize, scipy.integrate and scipy.linalg take about 0.35 s to import; a rebuild whose
blocks all come from the build cache (:mod:`calcdoc.stored`) solves nothing and so does not
load them. Each function here is SciPy's own, called with the arguments given and returning
what it returns.
"""

from __future__ import annotations

__all__ = ["brentq", "minimize", "minimize_scalar", "cumulative_trapezoid", "dgtsv"]


def brentq(*args, **kwargs):
    """:func:`scipy.optimize.brentq` (Brent's method on a bracketing interval)."""
    from scipy.optimize import brentq as solve
    return solve(*args, **kwargs)


def minimize(*args, **kwargs):
    """:func:`scipy.optimize.minimize`."""
    from scipy.optimize import minimize as solve
    return solve(*args, **kwargs)


def minimize_scalar(*args, **kwargs):
    """:func:`scipy.optimize.minimize_scalar`."""
    from scipy.optimize import minimize_scalar as solve
    return solve(*args, **kwargs)


def cumulative_trapezoid(*args, **kwargs):
    """:func:`scipy.integrate.cumulative_trapezoid`."""
    from scipy.integrate import cumulative_trapezoid as integrate
    return integrate(*args, **kwargs)


def dgtsv(*args, **kwargs):
    """LAPACK's tridiagonal solver :func:`scipy.linalg.lapack.dgtsv`."""
    from scipy.linalg.lapack import dgtsv as solve
    return solve(*args, **kwargs)
