"""Roll performance: the bank angle reached after an abrupt full roll command.

From the linear model, after a full aileron command (a step, or a ramp at the
aileron rate limit when the file gives one), rudder pedals free (the rudder
held at neutral, which is what the linear controls-fixed model gives), rolls
from wings level:

* :func:`response_to_ramp` -- any outputs of a batch of state-space models
  after a unit step or rate-limited ramp input, in closed form from the
  eigen-decomposition (no time stepping, exact at any time);
* :func:`time_to_bank` and :func:`bank_at_time` -- the time to reach a given
  bank-angle change and the change reached at a given time;
* :func:`coordinated_model` -- the same roll with the rudder holding the
  sideslip at exactly zero (the rudder deflection this needs is an output);
* :func:`roll_performance` -- both rolls for one condition, with the figures
  a criterion needs.

The closed form of a unit step into a state-space model with distinct
eigenvalues lambda_k, eigenvectors V and residues r_k = (C V)_k (V^-1 b)_k is

    y(t) = sum_k r_k (e^(lambda_k t) - 1) / lambda_k + d,

and of a unit ramp t / t_r held at 1 after t_r,

    y(t) = sum_k r_k [H_k(t) - H_k(t - t_r)] / t_r + d min(t / t_r, 1),
    H_k(tau) = (e^(lambda_k tau) - 1 - lambda_k tau) / lambda_k^2 (tau > 0; else 0)

(the convolution of the impulse response with the input; common practice,
for example Ogata, *Modern Control Engineering*, on the solution of the
state equation).  Cases whose eigenvectors are nearly dependent (a multiple
root) are computed with the matrix exponential instead.

The level bands this is graded against are guidance only: the applicable
certification basis, local regulations and licensed engineering judgement
govern.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from latdyn.roots import illinois

__all__ = [
    "response_to_ramp", "impulse_history", "bank_history", "time_to_bank", "bank_at_time", "coordinated_model",
    "RollResult", "roll_performance", "single_degree_of_freedom_bank", "HORIZON", "ROLL_DIRECTION_NOTE",
    "PEDALS_FREE_NOTE", "COORDINATED_NOTE", "REVERSAL_NOTE", "roll_requirements",
]

#: Longest time searched for a bank-angle change [s].
HORIZON = 30.0
_GRID = 301           # samples on [0, HORIZON] (every 0.1 s)
_TIME_TOLERANCE = 1e-12  # [s], the crossing's bracket at the end of the root search
_SMALL = 1e-4         # |lambda t| below which the series are used
_CONDITION_LIMIT = 1e8

ROLL_DIRECTION_NOTE = ("full aileron in the direction that rolls right (the sign of L_da'); the "
                       "linear model rolls the same way to the left")
PEDALS_FREE_NOTE = ("pedals free: the rudder held at neutral (the linear controls-fixed model); graded, "
                    "as it is the conservative figure without a pilot model")
COORDINATED_NOTE = ("rudder coordinated: the rudder deflection that holds the sideslip at exactly zero "
                    "throughout (side force of the controls neglected in that condition), shown for "
                    "comparison, not graded; its rudder travel is not limited")
REVERSAL_NOTE = ("a reversal from a steady 30 deg bank through 60 deg is taken as a 60 deg bank-angle "
                 "change from wings level in the linear model")


def _phi1(z):
    """(e^z - 1) / z, with its series near 0."""
    z = np.asarray(z, dtype=complex)
    with np.errstate(all="ignore"):
        out = np.expm1(z) / z
    small = np.abs(z) < _SMALL
    if small.any():
        zs = z[small]
        out[small] = 1.0 + zs / 2.0 + zs * zs / 6.0
    return out


def _phi2(z):
    """(e^z - 1 - z) / z^2, with its series near 0."""
    z = np.asarray(z, dtype=complex)
    with np.errstate(all="ignore"):
        out = (np.expm1(z) - z) / (z * z)
    small = np.abs(z) < _SMALL
    if small.any():
        zs = z[small]
        out[small] = 0.5 + zs / 6.0 + zs * zs / 24.0
    return out


def _ramp_integral(lam, tau):
    """H(tau) = (e^(lam tau) - 1 - lam tau) / lam^2 for tau > 0, else 0 (broadcast)."""
    tau = np.maximum(tau, 0.0)
    return tau * tau * _phi2(lam * tau)


def _modal(A, b, c):
    """Eigenvalues and output residues of a batch; flags of ill-conditioned cases."""
    lam, V = np.linalg.eig(A)
    with np.errstate(all="ignore"):
        condition = np.linalg.cond(V)
    bad = ~np.isfinite(condition) | (condition > _CONDITION_LIMIT)
    Vs = np.where(bad[:, None, None], np.eye(A.shape[-1]), V)
    w = np.linalg.solve(Vs, b[..., None].astype(complex))[..., 0]      # (N, n)
    residues = np.einsum("nmk,nk->nmk", c @ Vs, w)                    # (N, m, n)
    return lam, residues, bad


def _expm_response(A, b, c, d, times, ramp_time):
    """Fallback for one case: the augmented matrix exponential (exact for a ramp-limited input)."""
    from scipy.linalg import expm

    n = A.shape[0]
    # states x, u, u_dot: x' = A x + b u, u' = u_dot, u_dot' = 0
    M = np.zeros((n + 2, n + 2))
    M[:n, :n] = A
    M[:n, n] = b
    M[n, n + 1] = 1.0
    out = np.empty((c.shape[0], len(times)))
    for i, t in enumerate(times):
        if ramp_time > 0.0:
            z0 = np.zeros(n + 2)
            z0[n + 1] = 1.0 / ramp_time
            z = expm(M * min(t, ramp_time)) @ z0
            if t > ramp_time:
                z[n + 1] = 0.0
                z = expm(M * (t - ramp_time)) @ z
        else:
            z0 = np.zeros(n + 2)
            z0[n] = 1.0
            z = expm(M * t) @ z0
        out[:, i] = c @ z[:n] + d * z[n]
    return out


def _modal_response(lam, residues, t, ramp):
    """sum_k r_k g_k(t) of the closed forms above: (N, m, T) from lam (N, n), residues (N, m, n),
    times t (N, T) and ramp times (N,) (0: a step); no feedthrough."""
    L = lam[:, :, None]                                                # (N, n, 1)
    tt = t[:, None, :]                                                 # (N, 1, T)
    step = ramp <= 0.0
    safe_ramp = np.where(step, 1.0, ramp)[:, None, None]
    with np.errstate(all="ignore"):
        if step.all():
            g = tt * _phi1(L * tt)                                     # (N, n, T)
        elif not step.any():
            g = (_ramp_integral(L, tt) - _ramp_integral(L, tt - safe_ramp)) / safe_ramp
        else:
            g_ramp = (_ramp_integral(L, tt) - _ramp_integral(L, tt - safe_ramp)) / safe_ramp
            g = np.where(step[:, None, None], tt * _phi1(L * tt), g_ramp)
        # a root that doubles the motion every few milliseconds leaves the floating-point range:
        # those histories are inf/nan and their figures "not computed" (never warned per model)
        return np.einsum("nmk,nkt->nmt", residues, g).real


def response_to_ramp(A, b, c, d, times, ramp_time=0.0):
    """Outputs of a batch of linear models after a unit step or a rate-limited ramp input.

    The input is u(t) = min(t / t_r, 1) (a unit step where t_r = 0), from rest.

    Parameters
    ----------
    A : array_like, shape (N, n, n)
        State matrices.
    b : array_like, shape (N, n)
        Input column.
    c : array_like, shape (N, m, n)
        Output rows.
    d : array_like, shape (N, m)
        Direct feedthrough.
    times : array_like, shape (T,) or (N, T)
        Times after the start of the input [s], >= 0.
    ramp_time : float or array_like, shape (N,)
        t_r, the time the input takes to reach 1 [s] (0: a step).

    Returns
    -------
    numpy.ndarray, shape (N, m, T)

    Examples
    --------
    A first-order lag 1/(s + 2), unit step: y = (1 - e^(-2 t)) / 2.

    >>> y = response_to_ramp([[[-2.0]]], [[1.0]], [[[1.0]]], [[0.0]], [0.5])
    >>> round(float(y[0, 0, 0]), 12) == round((1 - math.exp(-1.0)) / 2, 12)
    True
    """
    A = np.asarray(A, dtype=float)
    b = np.asarray(b, dtype=float)
    c = np.asarray(c, dtype=float)
    d = np.asarray(d, dtype=float)
    N = A.shape[0]
    times = np.asarray(times, dtype=float)
    t = np.broadcast_to(times, (N,) + times.shape[-1:])                # (N, T)
    ramp = np.broadcast_to(np.asarray(ramp_time, dtype=float), (N,))
    lam, residues, bad = _modal(A, b, c)
    y = _modal_response(lam, residues, t, ramp)
    step = ramp <= 0.0
    u = np.where(step[:, None], 1.0, np.minimum(t / np.where(step, 1.0, ramp)[:, None], 1.0))
    y = y + d[:, :, None] * u[:, None, :]
    for i in np.flatnonzero(bad):
        y[i] = _expm_response(A[i], b[i], c[i], d[i], t[i], float(ramp[i]))
    return y


def impulse_history(A, B, times, row, input_column=0):
    """Output ``row`` of a batch of models after a unit impulse on one input, from rest.

    y(t) = c e^(A t) b = sum_k r_k e^(lambda_k t) (the closed form above; the
    matrix exponential for a multiple root).

    Returns
    -------
    numpy.ndarray, shape (N, T)

    Examples
    --------
    >>> y = impulse_history([[[-2.0]]], [[[1.0]]], [0.5], [1.0])
    >>> round(float(y[0, 0]), 12) == round(math.exp(-1.0), 12)
    True
    """
    from scipy.linalg import expm

    A = np.asarray(A, dtype=float)
    b = np.asarray(B, dtype=float)[:, :, input_column]
    N, n = A.shape[0], A.shape[-1]
    c = np.broadcast_to(np.asarray(row, dtype=float), (N, n))[:, None, :]
    t = np.asarray(times, dtype=float)
    lam, residues, bad = _modal(A, b, c)
    with np.errstate(all="ignore"):  # a strongly divergent root overflows: inf/nan, "not computed"
        y = np.einsum("nk,nkt->nt", residues[:, 0, :], np.exp(lam[:, :, None] * t[None, None, :])).real
    for i in np.flatnonzero(bad):
        y[i] = [c[i, 0] @ expm(A[i] * ti) @ b[i] for ti in t]
    return y


def bank_history(A, B, aileron, aileron_rate, times, bank_row, input_column=0, output_rows=None,
                 feedthrough=None):
    """Bank angle (and other outputs) after a full, possibly rate-limited, roll command.

    The aileron goes to ``aileron`` in the direction that rolls right (the
    sign of the bank response's initial curvature, ``C_phi A B_a``, that is
    of L_da' for the bare airframe), at ``aileron_rate`` where one is given.

    Parameters
    ----------
    A : array_like, shape (N, n, n)
    B : array_like, shape (N, n, k)
    aileron : array_like, shape (N,)
        Full aileron travel [rad], > 0.
    aileron_rate : array_like, shape (N,)
        Rate limit [rad/s]; NaN or inf for an abrupt step.
    times : array_like, shape (T,)
        [s]
    bank_row : array_like, shape (N, n) or (n,)
        Output row of the bank angle (C of phi).
    input_column : int
        Column of B that is the aileron (or the pilot's roll command).
    output_rows : array_like, shape (N, m, n), optional
        Further outputs (their feedthrough in ``feedthrough``, shape (N, m)).

    Returns
    -------
    bank : numpy.ndarray, shape (N, T)
        Bank angle in the direction of the roll [rad].
    outputs : numpy.ndarray, shape (N, m, T) or None
        The further outputs, signed for the same command.
    sign : numpy.ndarray, shape (N,)
        +1 or -1: the sign of the aileron deflection that rolls right (0 when
        the aileron does not roll the aircraft).
    """
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    N, n = A.shape[0], A.shape[-1]
    b = B[:, :, input_column]
    row = np.broadcast_to(np.asarray(bank_row, dtype=float), (N, n))
    sign = _roll_sign(A, b, row)
    amplitude = sign * np.asarray(aileron, dtype=float)
    rate = np.broadcast_to(np.asarray(aileron_rate, dtype=float), (N,))
    with np.errstate(all="ignore"):
        ramp = np.where(np.isfinite(rate) & (rate > 0.0), np.abs(amplitude) / rate, 0.0)
    rows = row[:, None, :]
    d = np.zeros((N, 1))
    if output_rows is not None:
        rows = np.concatenate([rows, np.asarray(output_rows, dtype=float)], axis=1)
        extra = np.zeros((N, rows.shape[1] - 1)) if feedthrough is None else np.asarray(feedthrough, float)
        d = np.concatenate([d, extra], axis=1)
    y = response_to_ramp(A, b, rows, d, times, ramp) * amplitude[:, None, None]
    return y[:, 0, :], (y[:, 1:, :] if output_rows is not None else None), sign


#: Grid samples scanned at a time, and cases at a time, when searching for a first crossing: a
#: case leaves the scan once it has reached every target, so the cost follows the crossing time.
_BLOCK = 10
_CASES = 2048


class _Bank:
    """The bank-angle response of a batch to its full roll command, prepared once for many times."""

    def __init__(self, A, B, aileron, rate, row, input_column):
        self.A = np.asarray(A, dtype=float)
        N, n = self.A.shape[0], self.A.shape[-1]
        self.b = np.asarray(B, dtype=float)[:, :, input_column]
        self.row = np.broadcast_to(np.asarray(row, dtype=float), (N, n))
        sign = _roll_sign(self.A, self.b, self.row)
        self.amplitude = sign * np.broadcast_to(np.asarray(aileron, dtype=float), (N,))
        rate = np.broadcast_to(np.asarray(rate, dtype=float), (N,))
        with np.errstate(all="ignore"):
            self.ramp = np.where(np.isfinite(rate) & (rate > 0.0), np.abs(self.amplitude) / rate, 0.0)
        self.lam, residues, self.bad = _modal(self.A, self.b, self.row[:, None, :])
        self.residues = residues[:, 0, :]

    def take(self, index) -> "_Bank":
        out = object.__new__(_Bank)
        for name in ("A", "b", "row", "amplitude", "ramp", "lam", "residues", "bad"):
            setattr(out, name, getattr(self, name)[index])
        return out

    def at(self, times):
        """Bank angle [rad] at times (T,) or (N, T)."""
        N = self.A.shape[0]
        times = np.asarray(times, dtype=float)
        t = np.broadcast_to(times, (N,) + times.shape[-1:])
        y = _modal_response(self.lam, self.residues[:, None, :], t, self.ramp)[:, 0, :]
        for i in np.flatnonzero(self.bad):
            y[i] = _expm_response(self.A[i], self.b[i], self.row[i][None], np.zeros(1), t[i],
                                  float(self.ramp[i]))[0]
        return y * self.amplitude[:, None]


def _roll_sign(A, b, row):
    """+1 or -1: the sign of the command that rolls right; 0 where it does not roll the aircraft.

    The sign of the bank response's initial curvature C_phi A b (of L_da' for the bare
    airframe); through an augmentation's actuator and delay the first non-zero C_phi A^k b.
    """
    N, n = A.shape[0], A.shape[-1]
    sign = np.zeros(N)
    vector = b
    scale = np.abs(A).max(axis=(1, 2)) + 1.0
    size = np.abs(row).max(axis=1) * np.abs(b).max(axis=1)
    scaled = A / scale[:, None, None]  # C (A/s)^k b against 1e-12 |C| |b|: no s^k to overflow
    for k in range(n):
        value = np.einsum("nk,nk->n", row, vector)
        sign = np.where((sign == 0) & (np.abs(value) > 1e-12 * size), np.sign(value), sign)
        vector = np.einsum("nkj,nj->nk", scaled, vector)
    return sign


def _first_crossing(A, B, aileron, rate, row, target, input_column):
    """Earliest times the bank angle reaches each target (N, K), by a grid and bisection; inf if never.

    The grid is that of :data:`HORIZON` in :data:`_GRID` samples, scanned
    :data:`_BLOCK` samples at a time (a case stops once it has reached every
    target); the crossing is then found between the grid samples around it by
    :func:`latdyn.roots.illinois` to :data:`_TIME_TOLERANCE`.
    """
    A = np.asarray(A, dtype=float)
    N = A.shape[0]
    out = np.empty(target.shape)
    for start in range(0, N, _CASES):
        part = slice(start, min(start + _CASES, N))
        prepared = _Bank(A[part], np.asarray(B, float)[part],
                         np.broadcast_to(np.asarray(aileron, float), (N,))[part],
                         np.broadcast_to(np.asarray(rate, float), (N,))[part],
                         np.broadcast_to(np.asarray(row, float), (N, A.shape[-1]))[part], input_column)
        out[part] = _crossing_of(prepared, target[part])
    return out


def _crossing_of(prepared, target):
    grid = np.linspace(0.0, HORIZON, _GRID)
    n, K = target.shape
    index = np.full((n, K), -1)
    pending = np.arange(n)
    for first in range(0, _GRID, _BLOCK):
        if not pending.size:
            break
        bank = prepared.take(pending).at(grid[first:first + _BLOCK])        # (p, T)
        reached = bank[:, None, :] >= target[pending][:, :, None]           # (p, K, T)
        known = index[pending]
        new = reached.any(axis=2) & (known < 0)
        known[new] = first + reached.argmax(axis=2)[new]
        index[pending] = known
        pending = pending[(known < 0).any(axis=1)]
    found = index >= 0
    index = np.where(found, index, 1)
    # the crossing between the grid samples around it: the same target asked for twice
    # (several grades with one bank change) is refined once
    columns, inverse = np.unique(target, axis=1, return_inverse=True)
    first = np.array([np.flatnonzero(inverse.ravel() == j)[0] for j in range(columns.shape[1])])
    refine = found[:, first] & (index[:, first] > 0)
    cases, which = np.nonzero(refine)
    times = np.where(found & (index > 0), np.nan, np.where(found, 0.0, np.inf))
    if cases.size:
        picked = index[cases, first[which]]
        low, high = grid[picked - 1], grid[picked]
        flat = prepared.take(cases)
        wanted = columns[cases, which]
        f_low = flat.at(low[:, None])[:, 0] - wanted
        f_high = flat.at(high[:, None])[:, 0] - wanted

        def excess(active, points):
            return flat.take(active).at(points[:, None])[:, 0] - wanted[active]

        root = illinois(excess, low, high, f_low, f_high, np.full(cases.size, _TIME_TOLERANCE))
        root = np.where(f_high == 0.0, high, root)
        root = np.where(f_low >= 0.0, low, root)  # reached on the earlier sample after all (round-off)
        solved = np.full(columns.shape, np.nan)
        solved[cases, which] = root
        times = np.where(np.isnan(times), solved[:, inverse.ravel()], times)
    return times


def _bank_at(A, B, aileron, rate, row, times, input_column):
    """Bank angle of case i at its own time times[i] [rad]."""
    # the closed form takes (N, T) times: one time per case
    bank, _, _ = bank_history(A, B, aileron, rate, np.asarray(times, float)[:, None], row, input_column)
    return bank[:, 0]


def time_to_bank(A, B, aileron, aileron_rate, bank_change, bank_row, input_column=0):
    """Time to reach a bank-angle change after a full roll command, from wings level [s].

    Parameters
    ----------
    A, B, aileron, aileron_rate, bank_row, input_column
        As :func:`bank_history`.
    bank_change : array_like, shape (N,) or (N, K)
        The bank-angle change(s) to reach [rad], > 0 (K changes per case:
        one response, every change found in it).

    Returns
    -------
    numpy.ndarray, shape of ``bank_change``
        The first time the bank angle reaches the change [s]; inf when it is
        not reached within :data:`HORIZON`.
    """
    A = np.asarray(A, dtype=float)
    change = np.asarray(bank_change, dtype=float)
    target = np.broadcast_to(change if change.ndim == 2 else change.reshape(-1, 1) if change.ndim
                             else change, (A.shape[0], change.shape[-1] if change.ndim == 2 else 1))
    times = _first_crossing(A, B, aileron, aileron_rate, bank_row, np.array(target), input_column)
    return times if change.ndim == 2 else times[:, 0]


def bank_at_time(A, B, aileron, aileron_rate, time, bank_row, input_column=0):
    """Bank-angle change reached at a given time after a full roll command [rad].

    Parameters
    ----------
    time : array_like, shape (N,)
        [s]

    Returns
    -------
    numpy.ndarray, shape (N,)
    """
    A = np.asarray(A, dtype=float)
    times = np.broadcast_to(np.asarray(time, dtype=float), (A.shape[0],))
    return _bank_at(A, B, aileron, aileron_rate, bank_row, times, input_column)


def coordinated_model(A, B):
    """The lateral model with the rudder holding the sideslip at exactly zero.

    With beta = beta_dot = 0 the sideslip equation gives the yaw rate,
    ``r = -(a_bp p + a_bphi phi) / a_br`` (the controls' side force
    neglected there); the yaw equation then fixes the rudder deflection
    and the roll equation the roll acceleration:

        p_dot - b_p,dr dr    = a_pp p + a_pr r + a_pphi phi + b_p,da da
        k_p p_dot - b_r,dr dr = a_rp p + a_rr r + a_rphi phi + b_r,da da - k_phi phi_dot

    with ``r = k_p p + k_phi phi``.  Common practice (the zero-sideslip
    constraint of a coordinated roll), derived here for the 4-state model.

    Parameters
    ----------
    A : array_like, shape (N, 4, 4)
        States beta, p, r, phi.
    B : array_like, shape (N, 4, 2)
        Inputs aileron, rudder.

    Returns
    -------
    A2 : numpy.ndarray, shape (N, 2, 2)
        States p, phi.
    B2 : numpy.ndarray, shape (N, 2, 1)
        Input aileron.
    rudder_row : numpy.ndarray, shape (N, 3)
        Rudder deflection per (p, phi, aileron) [rad per rad/s, rad, rad].
    valid : numpy.ndarray of bool, shape (N,)
        False where the rudder has no yawing moment or the sideslip equation
        no yaw-rate term.
    """
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    a = lambda i, j: A[:, i, j]  # noqa: E731
    with np.errstate(all="ignore"):
        k_p = -a(0, 1) / a(0, 2)
        k_phi = -a(0, 3) / a(0, 2)
        # phi_dot = a31 p + a32 r = (a31 + a32 k_p) p + a32 k_phi phi
        f_p = a(3, 1) + a(3, 2) * k_p
        f_phi = a(3, 2) * k_phi
        # right-hand sides as rows over (p, phi, da)
        P = np.stack([a(1, 1) + a(1, 2) * k_p, a(1, 3) + a(1, 2) * k_phi, B[:, 1, 0]], axis=1)
        R = np.stack([a(2, 1) + a(2, 2) * k_p - k_phi * f_p,
                      a(2, 3) + a(2, 2) * k_phi - k_phi * f_phi, B[:, 2, 0]], axis=1)
        b_p, b_r = B[:, 1, 1], B[:, 2, 1]
        det = -b_r + b_p * k_p
        valid = np.isfinite(k_p) & np.isfinite(k_phi) & (np.abs(det) > 1e-12) & (a(0, 2) != 0.0)
        det = np.where(valid, det, 1.0)
        # [[1, -b_p], [k_p, -b_r]] [p_dot, dr] = [P, R]
        p_dot = (-b_r[:, None] * P + b_p[:, None] * R) / det[:, None]
        rudder = (-k_p[:, None] * P + R) / det[:, None]
    N = A.shape[0]
    A2 = np.zeros((N, 2, 2))
    A2[:, 0, 0], A2[:, 0, 1] = p_dot[:, 0], p_dot[:, 1]
    A2[:, 1, 0], A2[:, 1, 1] = f_p, f_phi
    B2 = np.zeros((N, 2, 1))
    B2[:, 0, 0] = p_dot[:, 2]
    zero = ~valid
    A2[zero], B2[zero] = 0.0, 0.0
    return A2, B2, np.where(valid[:, None], rudder, np.nan), valid


def single_degree_of_freedom_bank(time, steady_roll_rate, roll_time_constant):
    """Bank angle of the single-degree-of-freedom roll after a step roll command [rad].

        phi(t) = p_ss (t - T_R (1 - e^(-t / T_R)))

    the time integral of p(t) = p_ss (1 - e^(-t/T_R)), the step response of
    the single-degree-of-freedom rolling approximation p/delta_a =
    L_da / (s - L_p), T_R = -1/L_p, p_ss = -L_da delta_a / L_p (Etkin and
    Reid, *Dynamics of Flight: Stability and Control*, 3rd ed., Wiley, 1996,
    eq. (9.7,7), the single-degree-of-freedom roll approximation).

    Parameters
    ----------
    time : array_like
        [s]
    steady_roll_rate : float
        p_ss [rad/s].
    roll_time_constant : float
        T_R [s].

    Returns
    -------
    numpy.ndarray
        [rad]

    Examples
    --------
    >>> round(float(single_degree_of_freedom_bank(1.0, 1.0, 0.5)), 6)
    0.567668
    """
    t = np.asarray(time, dtype=float)
    return steady_roll_rate * (t - roll_time_constant * (-np.expm1(-t / roll_time_constant)))


@dataclass(frozen=True)
class RollResult:
    """The rolls of one condition after a full roll command.

    Attributes
    ----------
    aileron : float
        Aileron travel used [rad].
    aileron_rate : float or None
        Rate limit used [rad/s] (None: an abrupt step).
    times : numpy.ndarray
        Time grid [s].
    bank : numpy.ndarray
        Bank angle of the pedals-free roll [rad] (the graded roll).
    bank_coordinated : numpy.ndarray or None
        Bank angle with the rudder holding zero sideslip [rad].
    rudder_coordinated : numpy.ndarray or None
        The rudder deflection that needs [rad].
    sideslip : numpy.ndarray
        Sideslip of the pedals-free roll [rad].
    roll_rate : numpy.ndarray
        Roll rate of the pedals-free roll [rad/s].
    notes : tuple of str
    """

    aileron: float
    aileron_rate: float | None
    times: np.ndarray
    bank: np.ndarray
    bank_coordinated: np.ndarray | None
    rudder_coordinated: np.ndarray | None
    sideslip: np.ndarray
    roll_rate: np.ndarray
    notes: tuple = ()

    def time_to(self, bank_change, coordinated=False) -> float:
        """First time the roll reaches a bank-angle change [s] (inf if it does not within the grid)."""
        bank = self.bank_coordinated if coordinated else self.bank
        if bank is None:
            return math.nan
        reached = np.flatnonzero(bank >= bank_change)
        if reached.size == 0:
            return math.inf
        i = int(reached[0])
        if i == 0:
            return 0.0
        t0, t1, b0, b1 = self.times[i - 1], self.times[i], bank[i - 1], bank[i]
        return float(t0 + (bank_change - b0) * (t1 - t0) / (b1 - b0))

    def bank_at(self, time, coordinated=False) -> float:
        """Bank-angle change reached at a time [rad] (linear between samples)."""
        bank = self.bank_coordinated if coordinated else self.bank
        if bank is None:
            return math.nan
        return float(np.interp(time, self.times, bank))


def _rows(model, names):
    """Output rows of the model for named signals (states or outputs)."""
    C = np.asarray(model.C, dtype=float)
    out = []
    for name in names:
        index = list(model.output_names).index(name)
        out.append(C[index])
    return np.array(out)


def roll_performance(model, aileron, aileron_rate=None, duration=None, samples=801) -> RollResult:
    """The pedals-free and the rudder-coordinated roll of one model after a full roll command.

    Parameters
    ----------
    model : latdyn.model.LateralModel
        States beta, p, r, phi (an augmented model keeps them as its first
        outputs; its ``aileron`` input is the pilot's roll command).
    aileron : float
        Full aileron travel [rad].
    aileron_rate : float or None
        Rate limit [rad/s].
    duration : float, optional
        Length of the time history [s] (default 10 s).
    samples : int

    Returns
    -------
    RollResult
    """
    duration = 10.0 if duration is None else float(duration)
    times = np.linspace(0.0, duration, samples)
    A = np.asarray(model.A, dtype=float)[None]
    B = np.asarray(model.B, dtype=float)[None]
    column = list(model.input_names).index("aileron")
    rows = _rows(model, ("phi", "beta", "p"))
    C_all = np.asarray(model.C, float)
    D_all = np.asarray(model.D, float)
    feed = np.array([[D_all[list(model.output_names).index(n), column] for n in ("beta", "p")]])
    rate = math.inf if aileron_rate is None else float(aileron_rate)
    bank, extra, sign = bank_history(A, B, [aileron], [rate], times, rows[0], column,
                                     rows[1:][None], feed)
    notes = [PEDALS_FREE_NOTE, ROLL_DIRECTION_NOTE]
    bank_c = rudder_c = None
    if A.shape[-1] == 4 and C_all.shape[1] == 4:
        A2, B2, rudder_row, valid = coordinated_model(A, B)
        if valid[0]:
            bank2, rudder2, _ = bank_history(A2, B2, [aileron], [rate], times, [[0.0, 1.0]], 0,
                                             rudder_row[:, None, :2], rudder_row[:, 2:])
            bank_c, rudder_c = bank2[0], rudder2[0, 0]
            notes.append(COORDINATED_NOTE)
    if sign[0] == 0:
        notes.append("the aileron has no rolling moment: no roll")
    return RollResult(float(aileron), None if aileron_rate is None else float(aileron_rate), times,
                      bank[0], bank_c, rudder_c, extra[0, 0], extra[0, 1], tuple(notes))


def roll_requirements(assessments) -> list:
    """(label, bank change [rad], time allowed [s], result in words) of the roll-performance rows graded.

    From the ``roll_performance`` entries of a condition's assessment
    (:class:`latdyn.assessment.Assessment`) that have a limit.
    """
    out = []
    for entry in assessments:
        if entry.mode != "roll_performance" or entry.limit is None or entry.bank_change is None:
            continue
        label = (f"{entry.criteria}, {entry.row}" if entry.row else
                 f"{entry.criteria}: {math.degrees(entry.bank_change):.3g} deg in {entry.limit:.3g} s")
        out.append((label, entry.bank_change, entry.limit, entry.result))
    return out
