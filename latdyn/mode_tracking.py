"""Mode names that stay continuous along a path of models (a sweep).

At one model the modes are named by root pattern and mode shape
(:mod:`latdyn.modes`).  Along a sweep that is not enough: where two complex
pairs have similar sideslip content, or where two real roots cross in
magnitude, the instantaneous rule can hand a name from one root to another
between neighbouring points.  Along a path the names follow the roots: each
point takes, among the valid namings of its four roots (a Dutch roll pair or
two real Dutch roll roots; roll and spiral roots or a roll-spiral pair), the
one closest to the previous point's named roots (root-locus continuation,
common practice).  The first point keeps its instantaneous names.
"""

from __future__ import annotations

import itertools

import numpy as np

from latdyn.modes import ModeArrays, analyse_stack

__all__ = ["analyse_path", "track_modes"]


def _slots(pattern, dutch, roll, spiral, roll_spiral):
    """Named roots of one point as four slots: two Dutch roll, then roll/spiral or the pair."""
    if pattern in (1, 3):
        rest = (roll_spiral[0], roll_spiral[1])
    else:
        rest = (complex(roll), complex(spiral))
    return (complex(dutch[0]), complex(dutch[1])) + rest


def _namings(roots, tolerance):
    """Every valid naming of four roots: (pattern, dutch pair, rest pair)."""
    roots = [complex(r) for r in roots]
    out = []
    for first, second in itertools.combinations(range(4), 2):
        a, b = roots[first], roots[second]
        others = [roots[k] for k in range(4) if k not in (first, second)]
        dutch_pair = abs(a.imag) > tolerance and abs(a - b.conjugate()) <= 10 * tolerance
        dutch_real = abs(a.imag) <= tolerance and abs(b.imag) <= tolerance
        if not (dutch_pair or dutch_real):
            continue
        c, d = others
        rest_pair = abs(c.imag) > tolerance and abs(c - d.conjugate()) <= 10 * tolerance
        rest_real = abs(c.imag) <= tolerance and abs(d.imag) <= tolerance
        if not (rest_pair or rest_real):
            continue
        if dutch_pair:
            dutch = (a, b) if a.imag > 0 else (b, a)
        else:
            dutch = (a, b) if a.real >= b.real else (b, a)
        if rest_pair:
            rest = (c, d) if c.imag > 0 else (d, c)
            pattern = 1 if dutch_pair else 3
        else:
            rest = (c, d)  # (roll, spiral) in either order: both orders are tried
            pattern = 0 if dutch_pair else 2
        out.append((pattern, dutch, rest))
        if not rest_pair:
            out.append((pattern, dutch, (d, c)))
    return out


def _distance(slots, previous):
    """Distance between two namings: Dutch roll roots to Dutch roll roots, the rest to the rest."""
    dutch = min(abs(slots[0] - previous[0]) + abs(slots[1] - previous[1]),
                abs(slots[0] - previous[1]) + abs(slots[1] - previous[0]))
    rest = abs(slots[2] - previous[2]) + abs(slots[3] - previous[3])
    return dutch + rest


def _vector(A, root):
    values, vectors = np.linalg.eig(A)
    return vectors[:, int(np.argmin(np.abs(values - root)))]


def track_modes(A, arrays: ModeArrays | None = None) -> ModeArrays:
    """Rename the modes of a path of models so that each name follows its root.

    Parameters
    ----------
    A : array_like
        (N, 4, 4) state matrices in path order.
    arrays : ModeArrays, optional
        The instantaneous analysis of ``A`` (computed when not given).

    Returns
    -------
    ModeArrays
        Same layout as :func:`latdyn.modes.analyse_stack`, continuous along the path.
    """
    A = np.asarray(A, dtype=float)[..., :4, :4]
    if arrays is None:
        arrays = analyse_stack(A)
    pattern = arrays.pattern.copy()
    dutch = arrays.dutch_roll.copy()
    roll = arrays.roll.copy()
    spiral = arrays.spiral.copy()
    roll_spiral = arrays.roll_spiral.copy()
    vectors = arrays.vectors.copy()
    phi_to_beta = arrays.phi_to_beta.copy()
    if len(A) < 2:
        return arrays
    previous = _slots(pattern[0], dutch[0], roll[0], spiral[0], roll_spiral[0])
    for i in range(1, len(A)):
        current = _slots(pattern[i], dutch[i], roll[i], spiral[i], roll_spiral[i])
        scale = max(np.abs(A[i]).max(), np.finfo(float).tiny)
        tolerance = 1e-7 * scale
        best = min(_namings(current, tolerance),
                   key=lambda naming: _distance(naming[1] + naming[2], previous),
                   default=None)
        if best is not None and _distance(best[1] + best[2], previous) < _distance(current, previous):
            new_pattern, new_dutch, rest = best
            pattern[i] = new_pattern
            dutch[i] = new_dutch
            vectors[i, :, 0] = _vector(A[i], new_dutch[0])
            with np.errstate(divide="ignore", invalid="ignore"):
                phi_to_beta[i] = abs(vectors[i, 3, 0]) / abs(vectors[i, 0, 0])
            if new_pattern in (1, 3):
                roll[i] = spiral[i] = np.nan
                roll_spiral[i] = rest
                vectors[i, :, 1] = vectors[i, :, 2] = np.nan
                vectors[i, :, 3] = _vector(A[i], rest[0])
            else:
                roll[i], spiral[i] = rest[0].real, rest[1].real
                roll_spiral[i] = np.nan
                vectors[i, :, 1] = _vector(A[i], rest[0])
                vectors[i, :, 2] = _vector(A[i], rest[1])
                vectors[i, :, 3] = np.nan
            current = new_dutch + tuple(rest)
        previous = current
    return ModeArrays(pattern, dutch, roll, spiral, roll_spiral, vectors, phi_to_beta)


def analyse_path(A) -> ModeArrays:
    """Modes of a path of models (N, 4, 4) with names continuous along the path."""
    return track_modes(A)
