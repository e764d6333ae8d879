"""Eigenvalues and eigenvectors of stacks of 4x4 real matrices, vectorised.

A batched LAPACK call pays a per-matrix overhead that dominates on 4x4
matrices.  Here the roots come from the characteristic quartic instead,
solved for the whole stack at once:

1. Characteristic polynomial det(lambda I - A) = lambda^4 + c1 lambda^3 +
   c2 lambda^2 + c3 lambda + c4 from the sums of principal minors
   (c1 = -tr A, c2 = sum of principal 2x2 minors, c3 = -sum of principal 3x3
   minors, c4 = det A; G. H. Golub and C. F. Van Loan, *Matrix
   Computations*, 4th ed., 2013, section 7.1.1, and any linear-algebra text).
2. The quartic factored into two real quadratics through the Descartes
   resolvent cubic U^3 + 2 p U^2 + (p^2 - 4 r) U - q^2 = 0 of the depressed
   quartic y^4 + p y^2 + q y + r (y = x + a/4), whose largest root is real
   and non-negative (R. W. D. Nickalls, "The quartic equation: invariants
   and Euler's solution revealed", *The Mathematical Gazette* 93, 2009,
   pp. 66-75; the factorisation is classical, common practice).
3. Each root polished by Newton steps on the undepressed quartic, a step
   kept only where it lowers |p(lambda)|; conjugate pairs are kept exactly
   conjugate.
4. Right eigenvectors from the adjugate of (A - lambda I), which has rank
   one at a simple root: its columns are multiples of the eigenvector
   (Golub and Van Loan, section 7.1; common practice).  Only the columns
   of the sideslip and bank rows are formed; a root where both are small
   against |p'(lambda)| goes to LAPACK.

Cases the quartic route cannot resolve to full accuracy (roots closer than
:data:`SEPARATION` of the spectral scale, polynomial coefficients not
reproduced by the roots, non-finite values) are passed to
``numpy.linalg.eig`` (LAPACK ``geev``), so every returned root is either a
polished simple root or LAPACK's.
"""

from __future__ import annotations

import numpy as np

__all__ = ["characteristic_coefficients", "quartic_roots", "eig_stack", "SEPARATION"]

#: Roots closer than this fraction of the spectral scale go to LAPACK [-].
SEPARATION = 1e-4
#: Relative mismatch of the polynomial coefficients rebuilt from the roots
#: above which a case goes to LAPACK [-].
COEFFICIENT_TOLERANCE = 1e-10
NEWTON_STEPS = 2
#: Least norm of the chosen adjugate column, as a share of |p'(lambda)| [-].
ADJUGATE_SHARE = 0.05


def _minors(A):
    """2x2 minors of rows (0, 1) and of rows (2, 3), keyed by column pair."""
    a = [[A[..., i, j] for j in range(4)] for i in range(4)]
    pairs = ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))
    top = {(i, j): a[0][i] * a[1][j] - a[0][j] * a[1][i] for i, j in pairs}
    bottom = {(i, j): a[2][i] * a[3][j] - a[2][j] * a[3][i] for i, j in pairs}
    return a, top, bottom


def _det3(a, rows, cols):
    (r0, r1, r2), (k0, k1, k2) = rows, cols
    return (a[r0][k0] * (a[r1][k1] * a[r2][k2] - a[r1][k2] * a[r2][k1])
            - a[r0][k1] * (a[r1][k0] * a[r2][k2] - a[r1][k2] * a[r2][k0])
            + a[r0][k2] * (a[r1][k0] * a[r2][k1] - a[r1][k1] * a[r2][k0]))


def _det4(top, bottom):
    return (top[0, 1] * bottom[2, 3] - top[0, 2] * bottom[1, 3] + top[0, 3] * bottom[1, 2]
            + top[1, 2] * bottom[0, 3] - top[1, 3] * bottom[0, 2] + top[2, 3] * bottom[0, 1])


def characteristic_coefficients(A):
    """Coefficients of det(lambda I - A) for a stack of 4x4 matrices.

    .. math::
        \\det(\\lambda I - A) = \\lambda^4 + c_1 \\lambda^3 + c_2 \\lambda^2
        + c_3 \\lambda + c_4

    with c1 = -tr A, c2 the sum of the principal 2x2 minors, c3 minus the sum
    of the principal 3x3 minors and c4 = det A (Golub & Van Loan, *Matrix
    Computations*, 4th ed., 2013, section 7.1.1).

    Parameters
    ----------
    A : array_like
        (..., 4, 4) real matrices [any units; the roots are in the same units].

    Returns
    -------
    numpy.ndarray
        (..., 4): c1, c2, c3, c4.

    Examples
    --------
    >>> characteristic_coefficients(np.diag([1.0, 2.0, 3.0, 4.0])).tolist()
    [-10.0, 35.0, -50.0, 24.0]
    """
    A = np.asarray(A, dtype=float)
    a, top, bottom = _minors(A)
    c1 = -(a[0][0] + a[1][1] + a[2][2] + a[3][3])
    c2 = (top[0, 1] + bottom[2, 3]
          + a[0][0] * a[2][2] - a[0][2] * a[2][0] + a[0][0] * a[3][3] - a[0][3] * a[3][0]
          + a[1][1] * a[2][2] - a[1][2] * a[2][1] + a[1][1] * a[3][3] - a[1][3] * a[3][1])
    c3 = -sum(_det3(a, rows, rows) for rows in ((0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3)))
    c4 = _det4(top, bottom)
    return np.stack([c1, c2, c3, c4], axis=-1)


def _largest_cubic_root(b, c, d):
    """Largest real root of U^3 + b U^2 + c U + d (real coefficients, arrays)."""
    # depressed cubic t^3 + P t + Q with U = t - b/3
    shift = b / 3.0
    P = c - b * shift
    Q = d - c * shift + 2.0 * shift**3
    half_q = Q / 2.0
    third_p = P / 3.0
    disc = half_q**2 + third_p**3
    with np.errstate(invalid="ignore", divide="ignore"):
        # one real root (disc > 0): Cardano with the sign chosen against cancellation
        root_disc = np.sqrt(np.maximum(disc, 0.0))
        s = np.cbrt(-half_q - np.copysign(root_disc, half_q))
        one = np.where(s != 0.0, s - third_p / s, 0.0)
        # three real roots (disc <= 0): trigonometric form, the largest
        m = np.sqrt(np.maximum(-third_p, 0.0))
        cos_arg = np.clip(np.where(m > 0, -half_q / np.where(m > 0, m, 1.0) ** 3, 0.0), -1, 1)
        three = 2.0 * m * np.cos(np.arccos(cos_arg) / 3.0)
    U = np.where(disc > 0, one, three) - shift
    for _ in range(2):  # Newton polish on the cubic
        f = ((U + b) * U + c) * U + d
        df = (3.0 * U + 2.0 * b) * U + c
        with np.errstate(invalid="ignore", divide="ignore"):
            step = np.where(df != 0, f / df, 0.0)
        U = np.where(np.isfinite(step), U - step, U)
    return U


def _quadratic(linear, constant):
    """Roots of x^2 + linear x + constant: (first, second, complex flag)."""
    disc = linear * linear - 4.0 * constant
    is_complex = disc < 0
    root_disc = np.sqrt(np.abs(disc))
    # real roots, the stable way: q = -(linear + sign(linear) sqrt(disc)) / 2
    q = -0.5 * (linear + np.copysign(root_disc, linear))
    with np.errstate(invalid="ignore", divide="ignore"):
        other = np.where(q != 0, constant / q, 0.0)
    upper = -0.5 * linear + 0.5j * root_disc
    first = np.where(is_complex, upper, q + 0j)
    second = np.where(is_complex, np.conj(upper), other + 0j)
    return first, second, is_complex


def _evaluate(c1, c2, c3, c4, x):
    f = (((x + c1) * x + c2) * x + c3) * x + c4
    df = ((4.0 * x + 3.0 * c1) * x + 2.0 * c2) * x + c3
    return f, df


def _polish(coefficients, roots, steps):
    """Newton steps on the quartic, each kept only where it lowers |p|."""
    f, df = _evaluate(*coefficients, roots)
    size = np.abs(f)
    for _ in range(steps):
        with np.errstate(divide="ignore", invalid="ignore"):
            trial = roots - f / df
        f_trial, df_trial = _evaluate(*coefficients, trial)
        size_trial = np.abs(f_trial)
        better = size_trial < size  # False for NaN
        roots = np.where(better, trial, roots)
        f = np.where(better, f_trial, f)
        df = np.where(better, df_trial, df)
        size = np.where(better, size_trial, size)
    return roots


def quartic_roots(coefficients):
    """Roots of monic real quartics x^4 + c1 x^3 + c2 x^2 + c3 x + c4, vectorised.

    Factoring into two real quadratics through the Descartes resolvent cubic
    (Nickalls, *The Mathematical Gazette* 93, 2009, pp. 66-75), then Newton
    polish on the quartic itself.

    Parameters
    ----------
    coefficients : array_like
        (N, 4) real coefficients c1..c4.

    Returns
    -------
    roots : numpy.ndarray of complex
        (N, 4): the roots of the first quadratic factor then of the second;
        a complex pair is upper root first and exactly conjugate, a real root
        has a zero imaginary part.
    pair : numpy.ndarray of bool
        (N, 2): whether each quadratic factor gave a complex pair.

    Examples
    --------
    >>> roots, pair = quartic_roots(np.array([[-10.0, 35.0, -50.0, 24.0]]))
    >>> sorted(round(float(r.real), 12) for r in roots[0])
    [1.0, 2.0, 3.0, 4.0]
    """
    c = np.ascontiguousarray(np.asarray(coefficients, dtype=float).T)  # (4, N)
    c1, c2, c3, c4 = c
    # scale x = s z so the coefficients are of order one
    s = np.maximum(np.maximum(np.abs(c1), np.sqrt(np.abs(c2))),
                   np.maximum(np.cbrt(np.abs(c3)), np.sqrt(np.sqrt(np.abs(c4)))))
    s[~(s > 0)] = 1.0
    inverse = 1.0 / s
    a = c1 * inverse
    b = c2 * inverse**2
    cc = c3 * inverse**3
    d = c4 * inverse**4
    # depressed quartic y^4 + p y^2 + q y + r, z = y - a/4
    a4 = 0.25 * a
    a4_2 = a4 * a4
    p = b - 6.0 * a4_2
    q = cc - 2.0 * b * a4 + 8.0 * a4_2 * a4
    r = d - cc * a4 + b * a4_2 - 3.0 * a4_2 * a4_2
    U = np.maximum(_largest_cubic_root(2.0 * p, p * p - 4.0 * r, -q * q), 0.0)
    u = np.sqrt(U)
    total = p + U
    use_q = U > 1e-10
    with np.errstate(divide="ignore", invalid="ignore"):
        difference = np.where(use_q, q / u, 0.0)
    # (y^2 + u y + v)(y^2 - u y + w): v + w = p + U, w - v = q / u, v w = r
    disc = np.sqrt(np.maximum(total * total - 4.0 * r, 0.0))
    v = 0.5 * np.where(use_q, total - difference, total - disc)
    w = 0.5 * np.where(use_q, total + difference, total + disc)
    # back to x: y^2 + u y + v with y = x/s + a/4
    s2 = s * s
    f1, s1, k1 = _quadratic((u + 2.0 * a4) * s, (v + u * a4 + a4_2) * s2)
    f2, s2_, k2 = _quadratic((2.0 * a4 - u) * s, (w - u * a4 + a4_2) * s2)
    roots = np.stack([f1, s1, f2, s2_])  # (4, N)
    roots = _polish(c[:, None, :], roots, NEWTON_STEPS)
    # keep pairs exactly conjugate and real roots exactly real
    pair = np.stack([k1, k2])
    upper = roots[0::2]
    paired = np.empty_like(roots)
    paired[0::2] = upper
    paired[1::2] = np.conj(upper)
    pair4 = np.repeat(pair, 2, axis=0)
    roots = np.where(pair4, paired, roots.real + 0j)
    return np.ascontiguousarray(roots.T), np.ascontiguousarray(pair.T)


def _adjugate_vectors(A, roots, rows=(0, 1, 2, 3)):
    """Right eigenvectors from the adjugate of (A - lambda I), unit 2-norm.

    Only the adjugate columns of ``rows`` are formed (column i of adj(M) is
    built from the cofactors of row i of M); the one of largest norm is
    taken.  Works in a (component, root, case) layout so that every array
    operation runs over contiguous memory.  Returns the vectors and the
    norm of the chosen column.
    """
    a = np.ascontiguousarray(np.moveaxis(A, 0, -1))  # (4, 4, n) real
    lam = np.ascontiguousarray(roots.T)  # (4 roots, n)
    m = [[a[i, j] for j in range(4)] for i in range(4)]
    for i in range(4):
        m[i][i] = a[i, i] - lam  # (4, n) complex; off-diagonal entries stay real (n,)
    pairs = ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))
    top = {(i, j): m[0][i] * m[1][j] - m[0][j] * m[1][i] for i, j in pairs}
    bottom = {(i, j): m[2][i] * m[3][j] - m[2][j] * m[3][i] for i, j in pairs}
    cols = ((1, 2, 3), (0, 2, 3), (0, 1, 3), (0, 1, 2))
    shape = lam.shape
    best = None
    for i in rows:
        # cofactors of row i: the 3x3 minor expanded along its first (i = 0, 1)
        # or last (i = 2, 3) row, signs +, -, +; then (-1)^(i+j)
        row, minors = (m[1 - i], bottom) if i < 2 else (m[5 - i], top)
        column = []
        for j, (k0, k1, k2) in enumerate(cols):
            value = (row[k0] * minors[k1, k2] - row[k1] * minors[k0, k2]
                     + row[k2] * minors[k0, k1])
            column.append(np.broadcast_to(value if (i + j) % 2 == 0 else -value, shape))
        column = np.stack(column)  # (4 components, 4 roots, n)
        norm = np.einsum("kij,kij->ij", column.real, column.real) + np.einsum(
            "kij,kij->ij", column.imag, column.imag)
        if best is None:
            best, best_norm = column, norm
        else:
            take = norm > best_norm
            best = np.where(take, column, best)
            best_norm = np.where(take, norm, best_norm)
    length = np.sqrt(best_norm)
    with np.errstate(invalid="ignore", divide="ignore"):
        best = best / length
    return np.ascontiguousarray(np.moveaxis(best, -1, 0)), length.T  # (n, 4, 4), (n, 4)


def eig_stack(A):
    """Eigenvalues and right eigenvectors of a stack of real 4x4 matrices.

    The vectorised quartic route of this module, with ``numpy.linalg.eig``
    for the cases it cannot resolve (near-multiple roots, non-finite input).

    Parameters
    ----------
    A : array_like
        (N, 4, 4) real matrices.

    Returns
    -------
    values : numpy.ndarray of complex
        (N, 4) eigenvalues; complex pairs exactly conjugate.
    vectors : numpy.ndarray of complex
        (N, 4, 4): column k is the unit right eigenvector of ``values[:, k]``.

    Examples
    --------
    >>> A = np.array([[[0.0, 1.0, 0, 0], [-4.0, -0.4, 0, 0], [0, 0, -3.0, 0], [0, 0, 1.0, -0.5]]])
    >>> values, vectors = eig_stack(A)
    >>> sorted((round(float(v.real), 12), round(float(abs(v.imag)), 12)) for v in values[0])
    [(-3.0, 0.0), (-0.5, 0.0), (-0.2, 1.989974874213), (-0.2, 1.989974874213)]
    >>> bool(np.allclose(A[0] @ vectors[0], vectors[0] * values[0], atol=1e-12))
    True
    """
    A = np.asarray(A, dtype=float)
    if A.ndim != 3 or A.shape[1:] != (4, 4):
        raise ValueError("eig_stack expects an (N, 4, 4) stack")
    coefficients = characteristic_coefficients(A)
    with np.errstate(all="ignore"):
        values, _ = quartic_roots(coefficients)
        # adjugate columns of the sideslip and bank rows only; at a simple root
        # column i of adj(lambda I - A) = p'(lambda) w_i v / (w^T v), so a column
        # norm of at least ADJUGATE_SHARE |p'(lambda)| means |w_i| / |w^T v| is
        # not small and the column is accurate; other cases go to LAPACK
        vectors, length = _adjugate_vectors(A, values, rows=(0, 3))
        _, slope = _evaluate(*np.ascontiguousarray(coefficients.T)[:, :, None], values)
        resolved = length >= ADJUGATE_SHARE * np.abs(slope)
        scale = np.max(np.abs(values), axis=1)
        gaps = np.where(np.eye(4, dtype=bool), np.inf,
                        np.abs(values[:, :, None] - values[:, None, :]))
        separated = gaps.min(axis=(1, 2)) > SEPARATION * scale
        # the roots must give back the coefficients (Vieta)
        e = values
        rebuilt = np.stack([
            -(e[:, 0] + e[:, 1] + e[:, 2] + e[:, 3]),
            e[:, 0] * e[:, 1] + e[:, 0] * e[:, 2] + e[:, 0] * e[:, 3]
            + e[:, 1] * e[:, 2] + e[:, 1] * e[:, 3] + e[:, 2] * e[:, 3],
            -(e[:, 0] * e[:, 1] * e[:, 2] + e[:, 0] * e[:, 1] * e[:, 3]
              + e[:, 0] * e[:, 2] * e[:, 3] + e[:, 1] * e[:, 2] * e[:, 3]),
            e[:, 0] * e[:, 1] * e[:, 2] * e[:, 3]], axis=1).real
        powers = np.maximum(scale, np.finfo(float).tiny)[:, None] ** np.arange(1, 5)
        mismatch = np.max(np.abs(rebuilt - coefficients) / powers, axis=1)
        good = (separated & (mismatch < COEFFICIENT_TOLERANCE)
                & np.all(np.isfinite(vectors), axis=(1, 2)) & np.all(resolved, axis=1))
    bad = ~good
    if bad.any():
        values[bad], vectors[bad] = np.linalg.eig(A[bad])
    return values, vectors
