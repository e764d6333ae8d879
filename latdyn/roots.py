"""Roots of many bracketed scalar functions at once (vectorised, one call per iteration for all).

The Illinois variant of regula falsi (M. Dowell and P. Jarratt, "A modified
regula falsi method for computing the root of an equation", BIT 11, 1971):
the new point replaces b; when its sign equals b's, the retained end's value
is halved, which keeps convergence superlinear.  A point that falls outside
its bracket is replaced by the midpoint (safeguard).  Used for the sweeps'
level-boundary crossings (:mod:`latdyn.studies.sweep`) and the time to a
bank-angle change (:mod:`latdyn.roll_performance`).
"""

from __future__ import annotations

import numpy as np

__all__ = ["illinois"]


def illinois(function, a, b, fa, fb, tolerance, iterations=200):
    """Roots of ``function`` in the brackets [a, b] (arrays), all refined together.

    Stops per bracket when the bracket is shorter than ``tolerance`` or the
    value is exactly zero; ``function`` is called with the indices of the
    brackets still running and their points.

    Parameters
    ----------
    function : callable
        ``function(index, points) -> values`` for the brackets ``index``.
    a, b : array_like
        Bracket ends; ``fa`` and ``fb`` (their values) of opposite signs.
    tolerance : array_like
        Bracket length at which each stops.
    iterations : int

    Returns
    -------
    root : ndarray
        NaN where the function became non-finite.

    Examples
    --------
    >>> r = illinois(lambda i, x: x**2 - 2.0, [1.0], [2.0], [-1.0], [2.0], [1e-14])
    >>> abs(float(r[0]) - 2.0**0.5) < 1e-13
    True
    """
    a, b, fa, fb = (np.array(v, dtype=float) for v in (a, b, fa, fb))
    tolerance = np.broadcast_to(np.asarray(tolerance, dtype=float), a.shape)
    root = np.full(a.shape, np.nan)
    active = np.ones(a.shape, bool)
    for _ in range(iterations):
        index = np.flatnonzero(active)
        if not index.size:
            break
        ai, bi, fai, fbi = a[index], b[index], fa[index], fb[index]
        with np.errstate(invalid="ignore", divide="ignore"):
            c = bi - fbi * (bi - ai) / (fbi - fai)
        low, high = np.minimum(ai, bi), np.maximum(ai, bi)
        outside = ~np.isfinite(c) | (c <= low) | (c >= high)
        c = np.where(outside, 0.5 * (ai + bi), c)
        fc = function(index, c)
        failed = ~np.isfinite(fc)
        exact = fc == 0.0
        flip = fc * fbi < 0.0
        # the bracket becomes [b, c] where the sign changed, [a, c] (a's value halved) where not
        new_a = np.where(flip, bi, ai)
        new_fa = np.where(flip, fbi, 0.5 * fai)
        a[index], fa[index], b[index], fb[index] = new_a, new_fa, c, fc
        done = exact | (np.abs(c - new_a) <= tolerance[index])
        root[index[done & ~failed]] = c[done & ~failed]
        active[index[done | failed]] = False
    # brackets still running after every iteration: their last point
    root[active] = b[active]
    return root
