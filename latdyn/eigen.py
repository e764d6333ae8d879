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
3. Each root polished by one Newton step on the undepressed quartic; of a
   complex pair only the upper root is polished and the lower one is its
   exact conjugate, real roots stay exactly real.
4. Eigenvector components from the adjugate of (A - lambda I), which has rank
   one at a simple root: its columns are multiples of the eigenvector
   (Golub and Van Loan, section 7.1; common practice).  Every cofactor of
   A - lambda I is a polynomial in lambda of degree 3 at most, with
   coefficients from A alone: they are formed once per matrix and evaluated
   at the four roots by Horner's rule.  Only the columns of the sideslip and
   bank rows are used; a root where the sideslip and bank components of both
   are small against |p'(lambda)| goes to LAPACK.

Complex numbers are carried as real and imaginary parts in real arrays
(numpy's complex loops are several times slower than its real ones), in a
(component, case) layout so every operation runs over contiguous memory.

Every root carries an estimate of its own error, whichever method found
it: the radius of a disc around it that holds a root of the exact
characteristic polynomial of A, by Rouche's theorem, allowing for the
residual of the computed polynomial at the root and the rounding of its
coefficients (bounded through the characteristic polynomial of |A| with
every term taken positive, as in the rounding bound of Horner's rule, N. J.
Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM,
2002, section 5.1); see :func:`_root_errors`.  Being componentwise, it
does not grow with the spread of the matrix entries the way a normwise
bound does; where no such disc is found the root is not known.

Cases the quartic route cannot vouch for (roots closer than
:data:`SEPARATION` of the spectral scale, polynomial coefficients not
reproduced by the roots, an error estimate above :data:`FAST_TOLERANCE`,
eigenvector columns too small to trust, non-finite values) are passed to
``numpy.linalg.eig`` (LAPACK ``geev``, which balances each matrix
first), whose roots are polished by Newton steps on the polynomial where
that lowers its residual.  A case where even those roots are not known to
:data:`RESOLVE_TOLERANCE` of themselves (nor negligible against the
second largest root modulus, :data:`NEGLIGIBLE`, nor known to lie within
the caller's ``neutral_radius`` of zero) is marked unresolved
(:attr:`EigenComponents.resolved`): its roots are not to be reported.

Roots are returned in *factor layout*: slots (0, 1) and (2, 3) each hold
either a complex pair, upper root first and the lower its exact conjugate,
or two real roots (LAPACK's roots are put in the same layout).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

__all__ = ["characteristic_coefficients", "quartic_roots", "eig_stack", "eig_components",
           "EigenComponents", "SEPARATION", "FAST_TOLERANCE", "RESOLVE_TOLERANCE", "NEGLIGIBLE"]

#: Roots closer than this fraction of the spectral scale go to LAPACK [-].
SEPARATION = 1e-4
#: Relative mismatch of the polynomial coefficients rebuilt from the roots
#: above which a case goes to LAPACK [-].
COEFFICIENT_TOLERANCE = 1e-10
#: Least size of the sideslip and bank components of the chosen adjugate
#: column, as a share of |p'(lambda)| [-].
ADJUGATE_SHARE = 0.05
#: Estimated error of a root of the quartic route, relative to the root, above
#: which the case goes to LAPACK [-].
FAST_TOLERANCE = 1e-9
#: Estimated error of a root, relative to the root, above which it is not
#: resolved (unless negligible, below) [-].
RESOLVE_TOLERANCE = 1e-3
#: An error estimate below this fraction of the second largest root modulus
#: is at working precision: such a root counts as resolved (it is zero to
#: working precision, as a neutral root is) [-].
NEGLIGIBLE = 1e-8
#: Multiple of the unit round-off in the rounding part of the error estimates [-].
ROUNDING = 32.0
_EPS = np.finfo(float).eps


def _entries(A):
    """(4, 4, ...) contiguous copy of (..., 4, 4) matrices: entry (i, j) of all of them in a row."""
    return np.ascontiguousarray(np.moveaxis(np.asarray(A, dtype=float), (-2, -1), (0, 1)))


def _coefficients(a):
    """c1..c4 of det(lambda I - A) from entries in (4, 4, ...) layout."""
    def minor(rows, i, j):  # 2x2 minor of two rows and columns i, j
        r0, r1 = rows
        return a[r0, i] * a[r1, j] - a[r0, j] * a[r1, i]

    top = {(i, j): minor((0, 1), i, j) for i, j in ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))}
    bottom = {(i, j): minor((2, 3), i, j) for i, j in ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))}

    def det3(rows):
        r0, r1, r2 = rows
        k0, k1, k2 = rows
        return (a[r0, k0] * (a[r1, k1] * a[r2, k2] - a[r1, k2] * a[r2, k1])
                - a[r0, k1] * (a[r1, k0] * a[r2, k2] - a[r1, k2] * a[r2, k0])
                + a[r0, k2] * (a[r1, k0] * a[r2, k1] - a[r1, k1] * a[r2, k0]))

    c1 = -(a[0, 0] + a[1, 1] + a[2, 2] + a[3, 3])
    c2 = (top[0, 1] + bottom[2, 3]
          + a[0, 0] * a[2, 2] - a[0, 2] * a[2, 0] + a[0, 0] * a[3, 3] - a[0, 3] * a[3, 0]
          + a[1, 1] * a[2, 2] - a[1, 2] * a[2, 1] + a[1, 1] * a[3, 3] - a[1, 3] * a[3, 1])
    c3 = -(det3((0, 1, 2)) + det3((0, 1, 3)) + det3((0, 2, 3)) + det3((1, 2, 3)))
    c4 = (top[0, 1] * bottom[2, 3] - top[0, 2] * bottom[1, 3] + top[0, 3] * bottom[1, 2]
          + top[1, 2] * bottom[0, 3] - top[1, 3] * bottom[0, 2] + top[2, 3] * bottom[0, 1])
    return c1, c2, c3, c4


def _magnitude_coefficients(a):
    """c1..c4 of the characteristic polynomial of |A| with every term positive ((4, 4, ...) entries).

    Each is the sum of the magnitudes of the products that make up the
    coefficient of A (permanents in place of determinants), so it bounds
    the rounding error of that coefficient: |fl(c_k) - c_k| <~ k eps m_k.
    """
    a = np.abs(a)

    def perm(r0, r1, i, j):  # 2x2 permanent of two rows and columns i, j
        return a[r0, i] * a[r1, j] + a[r0, j] * a[r1, i]

    pairs = ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3))
    top = {(i, j): perm(0, 1, i, j) for i, j in pairs}
    bottom = {(i, j): perm(2, 3, i, j) for i, j in pairs}

    def perm3(r0, r1, r2):
        return (a[r0, r0] * perm(r1, r2, r1, r2) + a[r0, r1] * perm(r1, r2, r0, r2)
                + a[r0, r2] * perm(r1, r2, r0, r1))

    m1 = a[0, 0] + a[1, 1] + a[2, 2] + a[3, 3]
    m2 = sum(a[i, i] * a[j, j] + a[i, j] * a[j, i] for i, j in pairs)
    m3 = perm3(0, 1, 2) + perm3(0, 1, 3) + perm3(0, 2, 3) + perm3(1, 2, 3)
    m4 = (top[0, 1] * bottom[2, 3] + top[0, 2] * bottom[1, 3] + top[0, 3] * bottom[1, 2]
          + top[1, 2] * bottom[0, 3] + top[1, 3] * bottom[0, 2] + top[2, 3] * bottom[0, 1])
    return m1, m2, m3, m4


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
    return np.stack(_coefficients(_entries(A)), axis=-1)


def _largest_cubic_root(b, c, d):
    """Largest real root of U^3 + b U^2 + c U + d (real coefficients, arrays).

    Cardano's formula where the cubic has one real root, the trigonometric
    form where it has three (computed only for those cases), then two Newton
    steps on the cubic.
    """
    # depressed cubic t^3 + P t + Q with U = t - b/3
    shift = b / 3.0
    P = c - b * shift
    Q = d - c * shift + 2.0 * shift * shift * shift
    half_q = 0.5 * Q
    third_p = P / 3.0
    disc = half_q * half_q + third_p * third_p * third_p
    with np.errstate(invalid="ignore", divide="ignore"):
        # one real root (disc > 0): Cardano with the sign chosen against cancellation
        s = np.cbrt(-half_q - np.copysign(np.sqrt(np.maximum(disc, 0.0)), half_q))
        t = np.where(s != 0.0, s - third_p / s, 0.0)
        three = np.flatnonzero(~(disc > 0))
        if three.size:
            # three real roots (disc <= 0): trigonometric form, the largest
            m = np.sqrt(np.maximum(-third_p[three], 0.0))
            positive = m > 0
            safe = np.where(positive, m, 1.0)
            cos_arg = np.clip(np.where(positive, -half_q[three] / (safe * safe * safe), 0.0), -1, 1)
            t[three] = 2.0 * m * np.cos(np.arccos(cos_arg) / 3.0)
        U = t - shift
        for _ in range(2):  # Newton polish on the cubic
            f = ((U + b) * U + c) * U + d
            df = (3.0 * U + 2.0 * b) * U + c
            step = f / df
            U = np.where(np.isfinite(step), U - step, U)
    return U


def _quadratic_factors(c1, c2, c3, c4):
    """The quartic as (x^2 + L_0 x + K_0)(x^2 + L_1 x + K_1): L and K of shape (2, ...)."""
    # scale x = s z so the coefficients are of order one
    s = np.maximum(np.maximum(np.abs(c1), np.sqrt(np.abs(c2))),
                   np.maximum(np.cbrt(np.abs(c3)), np.sqrt(np.sqrt(np.abs(c4)))))
    s[~(s > 0)] = 1.0
    inverse = 1.0 / s
    inverse2 = inverse * inverse
    a = c1 * inverse
    b = c2 * inverse2
    cc = c3 * (inverse2 * inverse)
    d = c4 * (inverse2 * inverse2)
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
    ua4 = u * a4
    linear = np.stack([(u + 2.0 * a4) * s, (2.0 * a4 - u) * s])
    constant = np.stack([(v + ua4 + a4_2) * s2, (w - ua4 + a4_2) * s2])
    return linear, constant


def _value_and_slope(c, re, im):
    """p(x) and p'(x) of x^4 + c1 x^3 + c2 x^2 + c3 x + c4 at x = re + i im, as (fr, fi, dr, di).

    Horner's rule (b_k = b_(k-1) x + c_k, d_k = d_(k-1) x + b_(k-1)) in real
    arithmetic.
    """
    c1, c2, c3, c4 = c
    br, bi = re + c1, im                                        # b1 = x + c1
    dr, di = re + br, im + bi                                   # d2 = x + b1
    br, bi = br * re - bi * im + c2, br * im + bi * re          # b2
    dr, di = dr * re - di * im + br, dr * im + di * re + bi     # d3
    br, bi = br * re - bi * im + c3, br * im + bi * re          # b3
    dr, di = dr * re - di * im + br, dr * im + di * re + bi     # p'
    fr, fi = br * re - bi * im + c4, br * im + bi * re          # p
    return fr, fi, dr, di


def _newton_complex(c, re, im):
    """One Newton step on x^4 + c1 x^3 + c2 x^2 + c3 x + c4 at x = re + i im.

    No step where it is not finite (p'(x) = 0).  Returns the new (re, im)
    and p'(x) as (re, im).
    """
    fr, fi, dr, di = _value_and_slope(c, re, im)
    size = dr * dr + di * di
    new_re = re - (fr * dr + fi * di) / size
    new_im = im - (fi * dr - fr * di) / size
    # no step where p'(x) = 0 (a multiple root) or the values overflow
    keep = np.isfinite(new_re) & np.isfinite(new_im)
    return np.where(keep, new_re, re), np.where(keep, new_im, im), dr, di


def _newton_real(c, x):
    """One Newton step on the quartic at real x (none where not finite); returns the new x and p'(x)."""
    c1, c2, c3, c4 = c
    b = x + c1
    d = x + b
    b = b * x + c2
    d = d * x + b
    b = b * x + c3
    d = d * x + b
    new = x - (b * x + c4) / d
    return np.where(np.isfinite(new), new, x), d


def _factor_roots(c):
    """Polished roots of the quartic with coefficients c = (c1, c2, c3, c4), per quadratic factor.

    Returns (re, im, slope_re, slope_im, pair): re and im (4, ...) in factor
    layout, p'(lambda) at each root (the lower root of a pair has the
    conjugate slope), and pair (2, ...): whether each factor is a complex pair.
    """
    linear, constant = _quadratic_factors(*c)
    disc = linear * linear - 4.0 * constant
    pair = disc < 0
    root_disc = np.sqrt(np.abs(disc))
    # real roots the stable way: q = -(L + sign(L) sqrt(disc)) / 2, then K / q
    q = -0.5 * (linear + np.copysign(root_disc, linear))
    other = np.where(q != 0, constant / q, 0.0)
    half = -0.5 * linear
    first_re, first_im, first_dr, first_di = _newton_complex(
        c, np.where(pair, half, q), np.where(pair, 0.5 * root_disc, 0.0))
    second, second_d = _newton_real(c, other)
    first_im = np.where(pair, np.abs(first_im), 0.0)
    first_di = np.where(pair, first_di, 0.0)
    re = np.stack([first_re[0], np.where(pair[0], first_re[0], second[0]),
                   first_re[1], np.where(pair[1], first_re[1], second[1])])
    im = np.stack([first_im[0], np.where(pair[0], -first_im[0], 0.0),
                   first_im[1], np.where(pair[1], -first_im[1], 0.0)])
    slope_re = np.stack([first_dr[0], np.where(pair[0], first_dr[0], second_d[0]),
                         first_dr[1], np.where(pair[1], first_dr[1], second_d[1])])
    slope_im = np.stack([first_di[0], -first_di[0], first_di[1], -first_di[1]])
    return re, im, slope_re, slope_im, pair


def quartic_roots(coefficients):
    """Roots of monic real quartics x^4 + c1 x^3 + c2 x^2 + c3 x + c4, vectorised.

    Factoring into two real quadratics through the Descartes resolvent cubic
    (Nickalls, *The Mathematical Gazette* 93, 2009, pp. 66-75), then a Newton
    step on the quartic itself.

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
    with np.errstate(all="ignore"):
        re, im, _, _, pair = _factor_roots(c)
    return _complex_rows(re, im), np.ascontiguousarray(pair.T)


def _rounding(magnitudes, x):
    """ROUNDING eps P(x): the bound on the coefficients' rounding at |z| = x (P from the magnitudes)."""
    m1, m2, m3, m4 = magnitudes
    return ROUNDING * _EPS * ((((x + m1) * x + m2) * x + m3) * x + m4)


def _simple_root_errors(c, magnitudes, re, im):
    """Error estimates 2 e / |p'(lambda)| of simple roots, e = |p(lambda)| + rounding, (4, N).

    The first-order radius of :func:`_root_errors` without its validity
    checks: the quartic route vouches only for well-separated roots that
    reproduce the coefficients, where the first order holds.
    """
    fr, fi, dr, di = _value_and_slope(c, re, im)
    e = np.sqrt(fr * fr + fi * fi) + _rounding(magnitudes, np.sqrt(re * re + im * im))
    return 2.0 * e / np.sqrt(dr * dr + di * di)


def _root_errors(c, magnitudes, re, im, orders=(1, 2, 3, 4), radius=None, scales=(1.0, 2.0, 4.0, 8.0)):
    """Estimated absolute error of roots of the quartic, (4, N) (whatever method found them).

    The computed coefficients differ from the exact ones of A by at most
    d(z) = ROUNDING eps P(|z|) at any z (P: the polynomial of the coefficient
    magnitudes, :func:`_magnitude_coefficients`).  Around a computed root
    lambda, p(z) = sum t_j (z - lambda)^j with |t_0| = |p(lambda)|; by
    Rouche's theorem, where on the circle |z - lambda| = r

        |t_k| r^k > |p(lambda)| + d(|lambda| + r) + sum over j != k, j >= 1 of |t_j| r^j

    the exact polynomial has k roots within r of lambda (P. Henrici,
    *Applied and Computational Complex Analysis*, vol. 1, Wiley, 1974,
    section 4.10, for the theorem; its use as a root-inclusion test is
    common practice).  A radius passes when that holds and exactly k of the
    computed roots lie within it (so no exact root is claimed twice).  The
    radii tried for order k are r_k = (2 e / |t_k|)^(1/k) with
    e = |p(lambda)| + d(|lambda|) times each of ``scales``, for the orders in
    ``orders`` ((1,) and one scale for the simple roots of the quartic
    route), and each radius in ``radius`` (arrays (N,) or floats) for
    every order where given.  The estimate is the smallest radius that passes,
    infinite where none does (the root is not known).
    """
    c1, c2 = c[0], c[1]
    fr, fi, dr, di = _value_and_slope(c, re, im)
    size = np.sqrt(re * re + im * im)

    def rounding(x):
        return _rounding(magnitudes, x)

    residual = np.hypot(fr, fi)
    e = residual + rounding(size)
    # Taylor coefficients of p about lambda: p', p''/2, p'''/6 = 4 x + c1, and 1
    t = {1: np.hypot(dr, di),
         2: np.hypot(6.0 * (re * re - im * im) + 3.0 * c1 * re + c2, 12.0 * re * im + 3.0 * c1 * im),
         3: np.hypot(4.0 * re + c1, 4.0 * im), 4: 1.0}
    # distance from each root to every root (itself included): (4, 4, N)
    distance = np.hypot(re[:, None] - re[None], im[:, None] - im[None])
    candidates = [(k, scale * (2.0 * e / t[k]) ** (1.0 / k)) for k in orders for scale in scales]
    if radius is not None:
        candidates += [(k, scale * np.broadcast_to(r, np.shape(re)))
                       for r in radius for k in (1, 2, 3, 4) for scale in scales]
    error = np.full(np.shape(re), np.inf)
    for k, r in candidates:
        others = sum(t[j] * r**j for j in (1, 2, 3, 4) if j != k)
        holds = t[k] * r**k > residual + rounding(size + r) + others
        holds &= (distance <= r[:, None]).sum(axis=1) == k
        error = np.where(holds, np.fmin(error, r), error)
    return np.where(e == 0, 0.0, error)


def _complex_rows(re, im):
    """(N, k) complex array from real and imaginary parts of shape (k, N)."""
    out = np.empty(re.shape[::-1], dtype=complex)
    out.real = re.T
    out.imag = im.T
    return out


# ------------------------------------------------------------ eigenvectors
def _times(x, y):
    """x * y where either may be the constant 1.0 or -1.0 of a diagonal entry (no pass for those)."""
    for unit, other in ((x, y), (y, x)):
        if isinstance(unit, float) and abs(unit) == 1.0:
            return other if unit > 0 else -other
    return x * y


def _product(p, q):
    """Product of two polynomials given as coefficient lists, lowest power first."""
    out = [None] * (len(p) + len(q) - 1)
    for i, x in enumerate(p):
        for j, y in enumerate(q):
            term = _times(x, y)
            out[i + j] = term if out[i + j] is None else out[i + j] + term
    return out


def _combine(*terms):
    """Sum of polynomials given as (sign, coefficient list) pairs."""
    out = [None] * max(len(p) for _, p in terms)
    for sign, p in terms:
        for k, x in enumerate(p):
            if out[k] is None:
                out[k] = x if sign > 0 else -x
            else:
                out[k] = out[k] + x if sign > 0 else out[k] - x
    return out


def _cofactor_polynomial(a, i, j):
    """Cofactor (i, j) of A - lambda I as a polynomial in lambda, coefficients lowest power first.

    C_ij = (-1)^(i+j) det of A - lambda I without row i and column j, the
    3x3 determinant expanded along its first row (entries on the diagonal of
    A - lambda I are a_kk - lambda, the others a_kl).
    """
    rows = [r for r in range(4) if r != i]
    cols = [k for k in range(4) if k != j]
    e = [[[a[r, k], -1.0] if r == k else [a[r, k]] for k in cols] for r in rows]

    def minor(k0, k1):  # of the last two rows
        return _combine((1, _product(e[1][k0], e[2][k1])), (-1, _product(e[1][k1], e[2][k0])))

    sign = -1 if (i + j) % 2 else 1
    return _combine((sign, _product(e[0][0], minor(1, 2))), (-sign, _product(e[0][1], minor(0, 2))),
                    (sign, _product(e[0][2], minor(0, 1))))


def _horner(coefficients, re, im):
    """Real polynomial (coefficients lowest power first) at x = re + i im: (real, imaginary).

    ``im`` None: x is real and the imaginary part returned is None.
    """
    high = coefficients[::-1]
    vr = high[0] * re + high[1]
    vi = None if im is None else high[0] * im
    for c in high[2:]:
        if im is None:
            vr = vr * re + c
        else:
            vr, vi = vr * re - vi * im + c, vr * im + vi * re
    return vr, vi


def _squared(z):
    re, im = z
    return re * re if im is None else re * re + im * im


def _choose(take, first, second):
    """Where ``take``, the (re, im) pair ``second``, else ``first``."""
    (r0, i0), (r1, i1) = first, second
    return np.where(take, r1, r0), (None if i0 is None else np.where(take, i1, i0))


class EigenComponents(NamedTuple):
    """Roots of a stack of 4x4 matrices with the sideslip and bank components of their eigenvectors.

    Every array is (4, N), root slot first (factor layout, see the module
    notes), so that each slot of all the cases is one contiguous row.

    Attributes
    ----------
    real, imag : numpy.ndarray
        Real and imaginary parts of the eigenvalues.
    sideslip_real, sideslip_imag, bank_real, bank_imag : numpy.ndarray
        Components 0 and 3 (sideslip and bank of a lateral model) of a right
        eigenvector of each root, both of one arbitrary scale per root.
    vectors : numpy.ndarray of complex, (N, 4, 4), or None
        Unit right eigenvectors (column k for slot k) when asked for.
    entry_scale : numpy.ndarray, (N,)
        Largest |a_ij| of each matrix [units of A].
    error : numpy.ndarray, (4, N)
        Estimated absolute error of each root (see the module notes) [units of A].
    resolved : numpy.ndarray of bool, (N,)
        Every root of the case is known to :data:`RESOLVE_TOLERANCE` of
        itself or is negligible against the spectral radius; False also for
        matrices with non-finite entries (their roots are NaN).
    """

    real: np.ndarray
    imag: np.ndarray
    sideslip_real: np.ndarray
    sideslip_imag: np.ndarray
    bank_real: np.ndarray
    bank_imag: np.ndarray
    vectors: np.ndarray | None = None
    entry_scale: np.ndarray | None = None
    error: np.ndarray | None = None
    resolved: np.ndarray | None = None

    @property
    def values(self) -> np.ndarray:
        """Eigenvalues (N, 4) complex."""
        return _complex_rows(self.real, self.imag)


def eig_components(A, vectors=False, neutral_radius=0.0) -> EigenComponents:
    """Eigenvalues of a stack of real 4x4 matrices with the sideslip and bank eigenvector components.

    The vectorised quartic route of this module, with ``numpy.linalg.eig``
    for the cases it cannot resolve (near-multiple roots, roots that do not
    reproduce the polynomial, eigenvector columns too small to trust,
    non-finite values).  Whether a case goes to LAPACK does not depend on
    ``vectors``, so the roots and components are the same either way.

    Parameters
    ----------
    A : array_like
        (N, 4, 4) real matrices.
    vectors : bool
        Also return the unit right eigenvectors.
    neutral_radius : float
        A root known only to lie within this distance of zero counts as
        resolved (neutral) [units of A].

    Returns
    -------
    EigenComponents

    Examples
    --------
    >>> A = np.array([[[0.0, 1.0, 0, 0], [-4.0, -0.4, 0, 0], [0, 0, -3.0, 0], [0, 0, 1.0, -0.5]]])
    >>> roots = eig_components(A)
    >>> roots.real[:, 0].round(12).tolist(), roots.imag[:, 0].round(12).tolist()
    ([-0.2, -0.2, -0.5, -3.0], [1.989974874213, -1.989974874213, 0.0, 0.0])
    """
    A = np.asarray(A, dtype=float)
    if A.ndim != 3 or A.shape[1:] != (4, 4):
        raise ValueError("eig_components expects an (N, 4, 4) stack")
    a = _entries(A)
    with np.errstate(all="ignore"):
        c = _coefficients(a)
        re, im, slope_re, slope_im, pair = _factor_roots(c)
        polynomials = {(i, k): _cofactor_polynomial(a, i, k) for i in (0, 3) for k in (0, 3)}
        # the upper root of each factor (complex) and the second root (real, where the factor is real)
        upper = {key: _horner(p, re[0::2], im[0::2]) for key, p in polynomials.items()}
        lower = {key: _horner(p, re[1::2], None) for key, p in polynomials.items()}
        # column i of adj(A - lambda I) = p'(lambda) w_i v / (w^T v): where the sideslip and
        # bank components of the larger of the two columns reach ADJUGATE_SHARE |p'(lambda)|,
        # |w_i| / |w^T v| is not small and the column is accurate; other cases go to LAPACK
        columns = np.ones(A.shape[0], bool)
        takes, components = [], []
        for roots, slots in ((upper, slice(0, None, 2)), (lower, slice(1, None, 2))):
            size0 = _squared(roots[0, 0]) + _squared(roots[0, 3])
            size3 = _squared(roots[3, 0]) + _squared(roots[3, 3])
            take = size3 > size0
            enough = np.maximum(size0, size3) >= ADJUGATE_SHARE**2 * (
                slope_re[slots] ** 2 + slope_im[slots] ** 2)
            if roots is lower:
                enough |= pair  # the lower root of a pair is the conjugate of the upper one
            columns &= enough.all(axis=0)
            takes.append(take)
            components.append((_choose(take, roots[0, 0], roots[3, 0]),
                               _choose(take, roots[0, 3], roots[3, 3])))
        (beta_upper, phi_upper), (beta_lower, phi_lower) = components
        beta_re, beta_im = _slots(pair, beta_upper, beta_lower)
        phi_re, phi_im = _slots(pair, phi_upper, phi_lower)
        # separation: the smallest distance between two roots against the spectral scale
        scale2 = (re * re + im * im).max(axis=0)
        gap2 = np.full(A.shape[0], np.inf)
        for i, j in ((0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3)):
            dr, di = re[i] - re[j], im[i] - im[j]
            gap2 = np.minimum(gap2, dr * dr + di * di)
        separated = gap2 > SEPARATION**2 * scale2
        # the roots must give back the coefficients (Vieta, factor by factor)
        total = re[0::2] + re[1::2]
        product = re[0::2] * re[1::2] - im[0::2] * im[1::2]
        rebuilt = (-(total[0] + total[1]), product[0] + product[1] + total[0] * total[1],
                   -(total[0] * product[1] + total[1] * product[0]), product[0] * product[1])
        scale = np.maximum(np.sqrt(scale2), np.finfo(float).tiny)
        mismatch = np.zeros(A.shape[0])
        power = np.ones(A.shape[0])
        for rebuilt_k, c_k in zip(rebuilt, c):
            power = power * scale
            mismatch = np.maximum(mismatch, np.abs(rebuilt_k - c_k) / power)
        finite = np.isfinite(beta_re + beta_im + phi_re + phi_im).all(axis=0)
        # the roots' own error estimates: vouched for where small against the root, or
        # negligible against the spectral radius (zero to working precision)
        magnitudes = _magnitude_coefficients(a)
        error = _simple_root_errors(c, magnitudes, re, im)
        size = np.sqrt(re * re + im * im)
        floor = _negligible(size)
        vouched = (error <= FAST_TOLERANCE * size + floor).all(axis=0)
        good = separated & (mismatch < COEFFICIENT_TOLERANCE) & finite & columns & vouched
    with np.errstate(all="ignore"):
        unit = _unit_vectors(a, re, im, pair, takes) if vectors else None
    bad = np.flatnonzero(~good)
    if bad.size:
        lapack_values, lapack_vectors = _lapack(A[bad])
        # factor layout: complex pairs (LAPACK gives them upper root first) before real roots
        order = np.argsort(lapack_values.imag == 0, axis=1, kind="stable")
        lapack_values = np.take_along_axis(lapack_values, order, axis=1).T
        lapack_vectors = np.take_along_axis(lapack_vectors, order[:, None, :], axis=2)
        re[:, bad], im[:, bad] = lapack_values.real, lapack_values.imag
        beta_re[:, bad], beta_im[:, bad] = lapack_vectors[:, 0, :].real.T, lapack_vectors[:, 0, :].imag.T
        phi_re[:, bad], phi_im[:, bad] = lapack_vectors[:, 3, :].real.T, lapack_vectors[:, 3, :].imag.T
        if vectors:
            unit[bad] = lapack_vectors
        with np.errstate(all="ignore"):
            cb = [x[bad] for x in c]
            re[:, bad], im[:, bad] = _polish(cb, re[:, bad], im[:, bad])
            size = np.sqrt(re * re + im * im)
            floor = _negligible(size)
            error[:, bad] = _root_errors([x[bad] for x in c], [x[bad] for x in magnitudes],
                                         re[:, bad], im[:, bad],
                                         radius=(floor[bad], neutral_radius))
    with np.errstate(invalid="ignore"):
        # a root known to lie within neutral_radius of zero is neutral, whatever the
        # rounding of a cancelling det A
        neutral = (size <= error) & (error <= neutral_radius)
        resolved = ((error <= RESOLVE_TOLERANCE * size + floor) | neutral).all(axis=0)
    entry_scale = np.maximum(a.max(axis=(0, 1)), -a.min(axis=(0, 1)))
    return EigenComponents(re, im, beta_re, beta_im, phi_re, phi_im, unit, entry_scale, error,
                           resolved)


def _polish(c, re, im, steps=2):
    """Newton steps on the characteristic polynomial at LAPACK's roots, kept where the residual falls.

    A complex pair stays exactly conjugate (the same arithmetic on conjugate
    numbers) and a real root stays real.
    """
    for _ in range(steps):
        fr, fi, _, _ = _value_and_slope(c, re, im)
        new_re, new_im, _, _ = _newton_complex(c, re, im)
        nr, ni, _, _ = _value_and_slope(c, new_re, new_im)
        better = np.hypot(nr, ni) < np.hypot(fr, fi)
        re, im = np.where(better, new_re, re), np.where(better, new_im, im)
    return re, im


def _negligible(size):
    """The error below which a root counts as resolved whatever its size, (N,), from the moduli (4, N).

    :data:`NEGLIGIBLE` of the second largest root modulus: the scale of the
    slower modes.  Not the spectral radius: one very fast root (a huge roll
    damping) must not make the other modes' errors look small.
    """
    a, b, c, d = np.nan_to_num(size, nan=np.inf)
    high, low = np.maximum(a, b), np.minimum(a, b)
    high2, low2 = np.maximum(c, d), np.minimum(c, d)
    return NEGLIGIBLE * np.maximum(np.minimum(high, high2), np.maximum(low, low2))


def _lapack(A):
    """Eigenvalues and unit right eigenvectors of the matrices the quartic route left.

    ``numpy.linalg.eig``: LAPACK ``geev``, which balances each matrix by a
    diagonal similarity before the QR iteration (``gebal``; B. N. Parlett
    and C. Reinsch, *Numerische Mathematik* 13, 1969, pp. 293-304; Golub
    and Van Loan, section 7.5.7).  Matrices with non-finite entries are not
    passed on: their roots and vectors are NaN.
    """
    values = np.full((A.shape[0], 4), np.nan, dtype=complex)
    unit = np.full(A.shape, np.nan, dtype=complex)
    finite = np.flatnonzero(np.isfinite(A).all(axis=(1, 2)))
    if finite.size:
        values[finite], unit[finite] = np.linalg.eig(A[finite])
    return values, unit


def _slots(pair, upper, lower):
    """(4, N) real and imaginary parts in factor layout from the upper and lower roots' values.

    The lower slot of a pair takes the conjugate of the upper slot's value.
    """
    (upper_re, upper_im), (lower_re, _) = upper, lower
    re = np.empty((4,) + upper_re.shape[1:])
    im = np.empty_like(re)
    re[0::2] = upper_re
    im[0::2] = upper_im
    re[1::2] = np.where(pair, upper_re, lower_re)
    im[1::2] = np.where(pair, -upper_im, 0.0)
    return re, im


def _unit_vectors(a, re, im, pair, takes):
    """Unit right eigenvectors (N, 4, 4) from the chosen adjugate columns of the sideslip and bank rows."""
    n = re.shape[1]
    out_re = np.empty((4, 4, n))  # (component, root slot, case)
    out_im = np.empty((4, 4, n))
    polynomials = {(i, k): _cofactor_polynomial(a, i, k) for i in (0, 3) for k in range(4)}
    with np.errstate(all="ignore"):
        for k in range(4):
            upper = _choose(takes[0], *(_horner(polynomials[i, k], re[0::2], im[0::2]) for i in (0, 3)))
            lower = _choose(takes[1], *(_horner(polynomials[i, k], re[1::2], None) for i in (0, 3)))
            out_re[k], out_im[k] = _slots(pair, upper, lower)
        length = np.sqrt((out_re * out_re + out_im * out_im).sum(axis=0))
        out_re /= length
        out_im /= length
    vectors = np.empty((n, 4, 4), dtype=complex)
    vectors.real = np.moveaxis(out_re, -1, 0)
    vectors.imag = np.moveaxis(out_im, -1, 0)
    return vectors


def eig_stack(A):
    """Eigenvalues and right eigenvectors of a stack of real 4x4 matrices.

    The vectorised quartic route of this module, with ``numpy.linalg.eig``
    for the cases it cannot resolve (near-multiple roots, non-finite input);
    :func:`eig_components` with the vectors.

    Parameters
    ----------
    A : array_like
        (N, 4, 4) real matrices.

    Returns
    -------
    values : numpy.ndarray of complex
        (N, 4) eigenvalues in factor layout; complex pairs exactly conjugate.
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
    result = eig_components(A, vectors=True)
    return result.values, result.vectors
