"""The eigen-solver at the edges of its inputs: stiff, badly scaled and nearly singular models.

``find_modes`` must give the roots ``numpy.linalg.eig`` gives (LAPACK ``geev``, the reference
library) to a relative tolerance, or refuse in one line (:class:`latdyn.modes.UnresolvedRoots`);
never other roots in silence.  Where the two disagree beyond the tolerance, the referee is the
exact characteristic polynomial of the (floating-point) matrix, formed in rational arithmetic by
the Faddeev-LeVerrier recursion (F. R. Gantmacher, *The Theory of Matrices*, vol. 1, Chelsea,
1959, chapter IV, section 4; an algorithm independent of the solver's sums of principal minors):
latdyn's root must then be the one the exact polynomial vouches for.

The models are built the way the program builds them (:func:`latdyn.model.prime`,
:func:`latdyn.model.lateral_matrices`) from derivatives scaled over 8 orders of magnitude,
Ixz^2 within 1e-12 of Ixx Izz and speeds down to 1e-2 m/s (invented, far beyond any aircraft):
entries spanning up to 21 orders of magnitude.
"""

from fractions import Fraction

import numpy as np
import pytest

from latdyn.eigen import RESOLVE_TOLERANCE, eig_components
from latdyn.model import lateral_matrices, prime
from latdyn.modes import UnresolvedRoots, analyse_stack, modes_from_matrix

# The derivatives of case P2 of Teper (NASA CR-96008, 1969) as the starting point, SI-like.
BASE = dict(Y_v=-0.1113, L_beta=-1.328, L_p=-0.951, L_r=0.609, N_beta=0.757, N_p=-0.124, N_r=-0.265)


def stiff_matrix(rng):
    """A state matrix from derivatives each scaled by 10^U(-4, 4), a nearly singular inertia and a
    speed from 1e-2 to 1e3 m/s: entries spanning up to 21 orders of magnitude (11 typically)."""
    derivatives = {k: v * 10.0 ** rng.uniform(-4, 4) for k, v in BASE.items()}
    Ixx, Izz = 10.0 ** rng.uniform(0, 6), 10.0 ** rng.uniform(0, 6)
    Ixz = np.sqrt(Ixx * Izz) * (1.0 - 10.0 ** rng.uniform(-12, -1)) * rng.choice([-1.0, 1.0])
    A, _ = lateral_matrices(prime(derivatives, Ixx, Izz, Ixz), 10.0 ** rng.uniform(-2, 3), 0.0, 0.0)
    return np.asarray(A)


def exact_polynomial(A):
    """Coefficients [1, c1, c2, c3, c4] of det(lambda I - A), exactly (Faddeev-LeVerrier)."""
    a = [[Fraction(float(x)) for x in row] for row in A]
    n = len(a)
    identity = [[Fraction(int(i == j)) for j in range(n)] for i in range(n)]
    M = [row[:] for row in identity]
    coefficients = [Fraction(1)]
    for k in range(1, n + 1):
        AM = [[sum(a[i][m] * M[m][j] for m in range(n)) for j in range(n)] for i in range(n)]
        c = -sum(AM[i][i] for i in range(n)) / k
        coefficients.append(c)
        M = [[AM[i][j] + c * identity[i][j] for j in range(n)] for i in range(n)]
    return coefficients


def exact_newton_step(coefficients, root):
    """|p(root) / p'(root)| of the exact polynomial at a floating-point root (rational arithmetic)."""
    re, im = Fraction(root.real), Fraction(root.imag)
    pr, pi, dr, di = Fraction(0), Fraction(0), Fraction(0), Fraction(0)
    for c in coefficients:  # Horner for p and p' together, complex as pairs
        dr, di = dr * re - di * im + pr, dr * im + di * re + pi
        pr, pi = pr * re - pi * im + c, pr * im + pi * re
    size = dr * dr + di * di
    if size == 0:
        return float("inf")
    return float((pr * pr + pi * pi) / size) ** 0.5


def matched(ours, reference, tolerance):
    """Whether every reference root has one of ours within tolerance (relative), one to one."""
    remaining = list(ours)
    for z in reference:
        distances = [abs(w - z) for w in remaining]
        k = int(np.argmin(distances))
        if distances[k] > tolerance * max(abs(z), 1e-300):
            return False
        remaining.pop(k)
    return True


def reported_roots(modes):
    return [r for mode in modes for r in mode.eigenvalues]


@pytest.mark.parametrize("seed", range(8), ids=[f"seed-{s}" for s in range(8)])
def test_stiff_models_give_lapacks_roots_or_refuse(seed):
    rng = np.random.default_rng(seed)
    refused = agreed = refereed = 0
    spans = []
    for _ in range(25):
        A = stiff_matrix(rng)
        entries = np.abs(A[A != 0])
        spans.append(entries.max() / entries.min())
        try:
            modes = modes_from_matrix(A)
        except UnresolvedRoots as error:
            assert "\n" not in str(error) and "cannot be computed to working accuracy" in str(error)
            refused += 1
            continue
        ours = reported_roots(modes)
        reference = np.linalg.eigvals(A)
        if matched(ours, reference, 1e-6):
            agreed += 1
            continue
        # they differ: the exact polynomial must vouch for each of latdyn's roots that differs
        coefficients = exact_polynomial(A)
        spread = sorted(abs(z) for z in ours)
        for w in ours:
            if min(abs(w - z) for z in reference) <= 1e-6 * abs(w):
                continue
            step = exact_newton_step(coefficients, w)
            assert step <= RESOLVE_TOLERANCE * abs(w) + 1e-8 * spread[2] + 1e-4, (A, ours, reference)
        refereed += 1
    assert refused + agreed + refereed == 25
    assert max(spans) > 1e12  # the models do span many orders of magnitude


def test_a_dutch_roll_pair_among_entries_up_to_3e8_stays_a_pair():
    """Of the kind the issue's campaign found: a nearly singular inertia (Ixz^2 = 0.99977 Ixx Izz)
    and derivatives over 12 orders of magnitude give entries from 9e-4 to 3e8; before the fix the
    Dutch roll pair (0.746 +- 1.302j, also the exact polynomial's) came out as two equal real
    roots, its imaginary part being below 1e-7 of the largest entry."""
    derivatives = dict(Y_v=-0.000891, L_beta=-0.559, L_p=-1.1e-06, L_r=2.18e-05, N_beta=7.38,
                       N_p=-0.00192, N_r=-12100.0)
    Ixx, Izz = 4274.0, 1.471e5
    Ixz = -np.sqrt(Ixx * Izz) * (1.0 - 1.14e-4)
    A = np.asarray(lateral_matrices(prime(derivatives, Ixx, Izz, Ixz), 1.63, 0.0, 0.0)[0])
    reference = np.linalg.eigvals(A)
    upper = reference[reference.imag > 0]
    assert upper.size == 1 and abs(upper[0].imag) < 1e-7 * np.abs(A).max()
    modes = modes_from_matrix(A)
    dutch = modes["dutch_roll"]
    assert dutch.oscillatory
    assert dutch.eigenvalue == pytest.approx(upper[0], rel=1e-6)
    assert matched(reported_roots(modes), reference, 1e-6)
    coefficients = exact_polynomial(A)
    assert exact_newton_step(coefficients, dutch.eigenvalue) < 1e-9


def test_a_pair_among_entries_of_1e8_is_still_a_pair():
    """A Dutch roll of 2.5 rad/s beside a roll mode of -1e8 1/s: a pair, as LAPACK says."""
    A = np.array([[-0.1, 0.0, -1.0, 0.1],
                  [-1.0e7, -1.0e8, 1.0e6, 0.0],
                  [6.0, 0.0, -0.4, 0.0],
                  [0.0, 1.0, 0.0, 0.0]])
    modes = modes_from_matrix(A)
    reference = np.linalg.eigvals(A)
    assert modes["dutch_roll"].oscillatory
    assert matched(reported_roots(modes), reference, 1e-6)


@pytest.mark.parametrize("value", [np.inf, np.nan, 1e300], ids=["infinite", "nan", "overflowing"])
def test_matrices_that_overflow_are_refused_not_a_traceback(value):
    """Before the fix: LAPACK's 'Array must not contain infs or NaNs' traceback."""
    A = np.array([[-0.1, 0.0, -1.0, 0.1], [-1.3, -1.0, 0.6, 0.0], [0.7, -0.1, -0.3, 0.0],
                  [0.0, 1.0, 0.0, 0.0]])
    A[1, 1] = -value if value == 1e300 else value
    A[2, 2] = value
    with pytest.raises(UnresolvedRoots, match="cannot be computed|overflow"):
        modes_from_matrix(A)


def test_a_batch_marks_unresolved_cases_and_reports_nothing_of_them():
    """One unresolvable case among good ones: its roots are NaN and flagged; the others unchanged."""
    good = np.array([[-0.1113, 0.0, -1.0, 0.1321], [-1.328, -0.951, 0.609, 0.0],
                     [0.757, -0.124, -0.265, 0.0], [0.0, 1.0, 0.0, 0.0]])
    bad = good.copy()
    bad[1, 1] = np.inf
    stack = np.stack([good, bad, good])
    arrays = analyse_stack(stack)
    assert arrays.resolved.tolist() == [True, False, True]
    assert np.isnan(arrays.dutch_roll[1]).all()
    np.testing.assert_array_equal(arrays.dutch_roll[0], analyse_stack(good[None]).dutch_roll[0])


def test_error_estimates_cover_the_exact_roots_on_ordinary_models():
    """The roots' own error estimates: small on ordinary models and never below the distance to
    the exact polynomial's root (checked with one exact Newton step)."""
    rng = np.random.default_rng(7)
    A = np.stack([np.array([[-0.1, 0.0, -1.0, 0.13], [-1.3, -1.0, 0.6, 0.0],
                            [0.75, -0.12, -0.27, 0.0], [0.0, 1.0, 0.0, 0.0]])
                  * rng.uniform(0.5, 2.0, (4, 4)) for _ in range(20)])
    roots = eig_components(A)
    assert roots.resolved.all()
    for i in range(len(A)):
        coefficients = exact_polynomial(A[i])
        for k in range(4):
            w = complex(roots.real[k, i], roots.imag[k, i])
            assert roots.error[k, i] < 1e-9 * abs(w)
            assert exact_newton_step(coefficients, w) <= roots.error[k, i]
