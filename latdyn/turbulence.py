"""Response to atmospheric turbulence: the Dryden lateral gust model, RMS, spectra, time histories.

Gust model (MIL-F-8785C, 5 November 1980, 3.7.1.2, printed p. 47; the spectra as
transcribed at secondary confidence; one-sided, integral over 0..inf = sigma^2 --
the normalisation from memory)::

    Phi_v(Omega) = sigma_v^2 (L_v / pi) [1 + 3 (L_v Omega)^2] / [1 + (L_v Omega)^2]^2

with the spatial frequency Omega = omega / V (Taylor's frozen field).  Driven by
unit white noise n (E[n(t) n(t')] = delta(t - t')), the filter

    v_g = sigma_v sqrt(T) (1 + sqrt(3) T s) / (1 + T s)^2 n,   T = L_v / V

has |H(j omega)|^2 = pi Phi_v(omega / V) / V, so its variance is sigma_v^2 (the
standard shaping filter; checked in the tests against the integral of the spectrum).

Rotary components (MIL-F-8785C 3.7.2 forms, **from memory**; the intensities and
scale lengths of the document's Figure 7 are likewise from memory and not used):

* yaw-rate gust from the lateral gust's gradient along x:
  r_g = (s / V) / (1 + 3 b s / (pi V)) v_g (b the span) -- sign: r_g = +(1/V) dv_g/dt
  for a field frozen in the air;
* roll-rate gust from the vertical gust's spanwise gradient:
  Phi_p(omega) = sigma_w^2 / (V L_w) 0.8 (pi L_w / (4 b))^(1/3) / (1 + (4 b omega / (pi V))^2),
  realised as a first-order filter on an independent white noise.  sigma_w and L_w
  default to sigma_v and L_v (isotropic turbulence, common practice); the user may
  give others.

The gusts act through the aerodynamic terms only: the air-relative sideslip and
rates are beta - v_g/V, p - p_g, r - r_g, so the gust input columns are minus the
aerodynamic columns of A (Y_v, L_beta, N_beta; Y_p/V, L_p, N_p; Y_r/V, L_r, N_r) and
of the lateral load factor (B. Etkin, *Dynamics of Atmospheric Flight*, Wiley, 1972,
chapter 13 -- from memory; the same construction as McRuer, Ashkenas & Graham, 1973,
chapter 6).  Rate and attitude sensors of an augmentation measure inertial motion.

RMS values come from the stationary covariance, A P + P A^T + B B^T = 0 (a Lyapunov
equation; scipy.linalg.solve_continuous_lyapunov).  A stationary covariance exists only
when every root is stable: where a root is neutral or divergent (a divergent spiral is
common), the RMS is that of the stable modes alone, computed in modal coordinates, and
the modes left out are named -- in the air the pilot holds the bank against them.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from latdyn.units import STANDARD_GRAVITY

__all__ = [
    "CovarianceUnresolved", "LYAPUNOV_TOLERANCE",
    "GUST_INPUTS", "RMS_OUTPUTS", "DEGREES", "Gust", "gust_model", "dryden_lateral",
    "TurbulenceSystem", "turbulence_system", "covariance", "TurbulenceResult", "turbulence_response",
    "output_spectra", "time_history", "dryden_spectrum",
]

#: Gust inputs added to the airframe: air-relative sideslip, roll- and yaw-rate gusts [rad, rad/s].
GUST_INPUTS = ("beta_gust", "p_gust", "r_gust")
#: Outputs whose RMS is reported, in the order of the JSON ``rms`` block [rad, rad/s, g].
RMS_OUTPUTS = ("beta", "p", "r", "phi", "ny")
#: Display factor of each output to degrees (ny stays in g).
DEGREES = {"beta": 180 / math.pi, "p": 180 / math.pi, "r": 180 / math.pi, "phi": 180 / math.pi, "ny": 1.0}


@dataclass(frozen=True)
class Gust:
    """Turbulence intensity and scale lengths [m/s, m].

    Attributes
    ----------
    sigma_v : float
        RMS lateral gust velocity.
    scale_length : float
        L_v.
    sigma_w, scale_length_w : float or None
        Vertical gust intensity and scale length for the roll-rate gust; None: sigma_v, L_v.
    rotary : bool
        Include the roll- and yaw-rate gusts.
    """

    sigma_v: float
    scale_length: float
    sigma_w: float | None = None
    scale_length_w: float | None = None
    rotary: bool = True


def dryden_spectrum(omega, sigma_v, scale_length, speed):
    """One-sided temporal Dryden lateral spectrum Phi_v(omega) [(m/s)^2 per rad/s].

    Phi_v(Omega) / V with Omega = omega / V (MIL-F-8785C 3.7.1.2, see the module notes).

    Examples
    --------
    The integral over 0..inf is sigma_v^2 (by (1/pi) int (1 + 3x^2)/(1 + x^2)^2 dx = 1):

    >>> from scipy.integrate import quad
    >>> round(quad(lambda w: dryden_spectrum(w, 2.0, 300.0, 100.0), 0, np.inf)[0], 9)
    4.0
    """
    x = scale_length * np.asarray(omega, dtype=float) / speed
    return sigma_v**2 * (scale_length / (math.pi * speed)) * (1 + 3 * x**2) / (1 + x**2) ** 2


def dryden_lateral(gust: Gust, speed, span):
    """The gust filters: unit white noises (n_v, n_p) -> (beta_g, p_g, r_g).

    Returns
    -------
    A, B, C : numpy.ndarray
        (4, 4), (4, 2), (3, 4): states two of the v filter, one of the r_g lag,
        one of the p_g filter (without rotary gusts p_g and r_g are zero).
    """
    T = gust.scale_length / speed
    A = np.zeros((4, 4))
    B = np.zeros((4, 2))
    C = np.zeros((3, 4))
    A[0, 1] = 1.0
    A[1, 0], A[1, 1] = -1.0 / T**2, -2.0 / T
    B[1, 0] = 1.0 / T**2
    v_row = gust.sigma_v * math.sqrt(T) * np.array([1.0, math.sqrt(3.0) * T, 0.0, 0.0])
    C[0] = v_row / speed                              # beta_g = v_g / V
    sigma_w = gust.sigma_v if gust.sigma_w is None else gust.sigma_w
    L_w = gust.scale_length if gust.scale_length_w is None else gust.scale_length_w
    tau_r = 3.0 * span / (math.pi * speed)
    tau_p = 4.0 * span / (math.pi * speed)
    A[2, 2] = -1.0 / tau_r
    A[2, :2] += v_row[:2] / tau_r                     # x_r' = (v_g - x_r) / tau_r
    A[3, 3] = -1.0 / tau_p
    if gust.rotary:
        C[2, :2] = v_row[:2] / (speed * tau_r)        # r_g = (v_g - x_r) / (V tau_r)
        C[2, 2] = -1.0 / (speed * tau_r)
        gain = sigma_w * math.sqrt(0.8 * math.pi / (speed * L_w)) * (math.pi * L_w / (4.0 * span)) ** (1 / 6)
        B[3, 1] = gain / tau_p
        C[1, 3] = 1.0
    return A, B, C


def gust_model(model):
    """The bare airframe with the gust inputs :data:`GUST_INPUTS` after aileron and rudder.

    Parameters
    ----------
    model : latdyn.model.LateralModel
        With ``derivatives`` (primed dimensional, SI) and ``speed``.
    """
    from dataclasses import replace

    d = model.derivatives
    V = model.speed
    g = STANDARD_GRAVITY
    n = model.A.shape[0]
    Bg = np.zeros((n, 3))
    Bg[:3, 0] = -np.array([d.Y_v, d.L_beta, d.N_beta])
    Bg[:3, 1] = -np.array([d.Y_p / V, d.L_p, d.N_p])
    Bg[:3, 2] = -np.array([d.Y_r / V, d.L_r, d.N_r])
    Dg = np.zeros((model.C.shape[0], 3))
    ny = list(model.output_names).index("ny")
    Dg[ny] = -np.array([V * d.Y_v, d.Y_p, d.Y_r]) / g
    return replace(model, B=np.hstack([model.B, Bg]), D=np.hstack([model.D, Dg]),
                   input_names=tuple(model.input_names) + GUST_INPUTS)


@dataclass(frozen=True)
class TurbulenceSystem:
    """Aircraft and gust filters driven by unit white noise: x' = A x + B n, y = C x.

    Outputs :data:`RMS_OUTPUTS`; states the gust filters' then the aircraft's.
    """

    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    output_names: tuple
    aircraft_states: tuple


def turbulence_system(model, gust: Gust, span) -> TurbulenceSystem:
    """Connect the gust filters to a bare or augmented model (:mod:`latdyn.augmentation`)."""
    from latdyn.augmentation import AugmentedModel, augmented_model

    if isinstance(model, AugmentedModel):
        closed = augmented_model(gust_model(model.bare), model.augmentation)
    else:
        closed = gust_model(model)
    Af, Bf, Cf = dryden_lateral(gust, model.speed, span)
    columns = [list(closed.input_names).index(name) for name in GUST_INPUTS]
    Bg, Dg = closed.B[:, columns], closed.D[:, columns]
    rows = [list(closed.output_names).index(name) for name in RMS_OUTPUTS]
    na, nf = closed.A.shape[0], Af.shape[0]
    A = np.zeros((nf + na, nf + na))
    A[:nf, :nf] = Af
    A[nf:, :nf] = Bg @ Cf
    A[nf:, nf:] = closed.A
    B = np.vstack([Bf, np.zeros((na, Bf.shape[1]))])
    C = np.hstack([Dg[rows] @ Cf, closed.C[rows]])
    return TurbulenceSystem(A, B, C, RMS_OUTPUTS, tuple(closed.state_names))


#: Largest relative residual |A P + P A^T + B B^T| / |B B^T| of a stationary covariance
#: accepted (common practice: a check of the computed solution; a clean solve gives about 1e-15).
LYAPUNOV_TOLERANCE = 1e-6


class CovarianceUnresolved(ValueError):
    """The stationary covariance of a model cannot be computed to working accuracy.

    Raised (by :func:`covariance`) instead of an RMS that is not known: a model whose stable
    and neutral roots cannot be separated (the ordered Schur form fails even with a wider
    neutral band), or whose Lyapunov solution leaves a residual above
    :data:`LYAPUNOV_TOLERANCE` (roots spanning more magnitudes than double precision holds).
    """


def covariance(A, B, stable_margin=1e-9):
    """Stationary state covariance of x' = A x + B n (unit white noise), and the roots left out.

    All roots stable: the Lyapunov equation A P + P A^T + B B^T = 0.  Otherwise
    the covariance of the stable modes alone, P = Q_s P_s Q_s^T with
    A_s P_s + P_s A_s^T + B_s B_s^T = 0 for the decoupled stable part
    (:func:`_stable_part`).

    Returns
    -------
    P : numpy.ndarray
    left_out : numpy.ndarray of complex
        The roots whose modes are not in P (empty when all are stable).

    Raises
    ------
    CovarianceUnresolved
        The solution cannot be vouched for (its residual is checked).
    """
    from scipy.linalg import solve_continuous_lyapunov

    As, Bs, Qs, left_out = _stable_part(A, B, stable_margin)
    W = Bs @ Bs.T
    with warnings.catch_warnings(), np.errstate(all="ignore"):
        # scipy's note on perturbed coefficients: the residual below decides
        warnings.simplefilter("ignore", RuntimeWarning)
        Ps = solve_continuous_lyapunov(As, -W)
        residual = np.abs(As @ Ps + Ps @ As.T + W).max() / max(np.abs(W).max(), np.finfo(float).tiny)
    if not residual <= LYAPUNOV_TOLERANCE:
        raise CovarianceUnresolved(f"a stationary covariance whose Lyapunov residual is {residual:.2g} of "
                                   f"the noise intensity (at most {LYAPUNOV_TOLERANCE:g})")
    return Qs @ Ps @ Qs.T, left_out


def _stable_part(A, B, stable_margin=1e-9):
    """The stable modes as a system of their own: (A_s, B_s, Q_s, left-out roots).

    Ordered real Schur form A = Q T Q^T with the stable roots first,
    T = [[T11, T12], [0, T22]]; the Sylvester equation T11 X - X T22 = -T12
    decouples the blocks, so the stable modes follow z' = T11 z + B_s n with
    B_s = (Q^T B)_1 - X (Q^T B)_2 and contribute x = Q_1 z (G. H. Golub and
    C. F. Van Loan, *Matrix Computations*, 4th ed., 2013, sections 7.6.3 and
    7.6.5 -- block diagonalisation by a Sylvester equation; robust where an
    eigenvector basis is not, as for the Dryden filter's double root).

    Where LAPACK cannot reorder the Schur form (roots too close to the stable margin to be
    separated), the neutral band is widened a hundredfold at a time, up to 1e-3 of the
    largest root; beyond, :class:`CovarianceUnresolved`.
    """
    from scipy.linalg import LinAlgError, schur, solve_sylvester

    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    values = np.linalg.eigvals(A)
    margin = stable_margin
    while True:
        limit = -margin * max(float(np.abs(values).max()), 1.0)
        try:
            T, Q, count = schur(A, output="real", sort=lambda re, im: re < limit)
            break
        except LinAlgError as error:
            margin *= 100.0
            if margin > 1e-3:
                raise CovarianceUnresolved(f"stable and neutral roots that can be separated ({error})") from None
    left_out = values[values.real >= limit]
    QB = Q.T @ B
    if count == A.shape[0]:
        return T, QB, Q, left_out
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # the covariance's residual decides
        X = solve_sylvester(T[:count, :count], -T[count:, count:], -T[:count, count:])
    return T[:count, :count], QB[:count] - X @ QB[count:], Q[:, :count], left_out


def output_spectra(system: TurbulenceSystem, omega):
    """One-sided output spectra [unit^2 per rad/s], integral over 0..inf = the RMS squared.

    Phi_y(omega) = (1/pi) sum_k |G_yk(j omega)|^2 for unit white-noise inputs n_k, with
    G(j omega) = C Q_s (j omega - A_s)^-1 B_s over the stable modes (all of them
    when the aircraft is stable; as the RMS leaves a divergent mode out, so do the spectra).

    Returns
    -------
    numpy.ndarray
        (len(omega), outputs).
    """
    omega = np.asarray(omega, dtype=float)
    As, Bs, Qs, _ = _stable_part(system.A, system.B)
    CQ = system.C @ Qs
    identity = np.eye(As.shape[0])
    out = np.empty((omega.size, system.C.shape[0]))
    for i, w in enumerate(omega):
        G = CQ @ np.linalg.solve(1j * w * identity - As, Bs)
        out[i] = (np.abs(G) ** 2).sum(axis=1) / math.pi
    return out


@dataclass(frozen=True)
class TurbulenceResult:
    """RMS response of one model to one gust; unpacks as (rms, left_out).

    Attributes
    ----------
    gust : Gust
    rms : dict
        Output name -> RMS [rad, rad/s, g].
    left_out : tuple of complex
        Roots (neutral or divergent) whose modes are not in the RMS.
    system : TurbulenceSystem
    """

    gust: Gust
    rms: dict
    left_out: tuple
    system: TurbulenceSystem

    def __iter__(self):
        return iter((self.rms, self.left_out))

    def as_dict(self) -> dict:
        """The ``"turbulence"`` block of the JSON contract (SI)."""
        return {"sigma_v": self.gust.sigma_v, "scale_length": self.gust.scale_length,
                "rms": {name: float(self.rms[name]) for name in RMS_OUTPUTS}}

    def notes(self) -> dict:
        """What the RMS includes and leaves out (the sibling ``"turbulence_notes"`` block)."""
        gust = self.gust
        return {"sigma_w": gust.sigma_v if gust.sigma_w is None else gust.sigma_w,
                "scale_length_w": gust.scale_length if gust.scale_length_w is None else gust.scale_length_w,
                "rotary_gusts": gust.rotary,
                "left_out_roots": [[float(r.real), float(r.imag)] for r in self.left_out],
                "model": "Dryden lateral gust (MIL-F-8785C 3.7.1.2); rotary forms from memory"}


def turbulence_response(model, gust: Gust, span) -> TurbulenceResult:
    """RMS of beta, p, r, phi and ny of a bare or augmented model in Dryden turbulence."""
    system = turbulence_system(model, gust, span)
    P, left_out = covariance(system.A, system.B)
    variance = np.einsum("ij,jk,ik->i", system.C, P, system.C)
    rms = {name: math.sqrt(max(float(v), 0.0)) for name, v in zip(system.output_names, variance)}
    return TurbulenceResult(gust, rms, tuple(complex(r) for r in left_out), system)


def time_history(system: TurbulenceSystem, duration, step, seed):
    """A seeded time history of the outputs, sampled exactly from the continuous process.

    Between samples x[k+1] = Phi x[k] + w[k] with w ~ N(0, Q), Phi = exp(A h),
    Q = int_0^h exp(A s) B B^T exp(A^T s) ds from exp([[-A, B B^T], [0, A^T]] h)
    (C. F. Van Loan, "Computing integrals involving the matrix exponential",
    IEEE Trans. Automatic Control 23(3), 1978), starting from rest.

    Returns
    -------
    time : numpy.ndarray, (N,)
    outputs : numpy.ndarray, (N, outputs)
    """
    from scipy.linalg import expm

    A, B, C = system.A, system.B, system.C
    n = A.shape[0]
    M = np.zeros((2 * n, 2 * n))
    M[:n, :n] = -A * step
    M[:n, n:] = B @ B.T * step
    M[n:, n:] = A.T * step
    with np.errstate(all="ignore"):
        E = expm(M)
    if not np.all(np.isfinite(E)):
        # exp(|lambda| h) beyond double precision: a root far faster than the step (a stiff model)
        from latdyn.errors import InputError

        fastest = float(np.max(np.abs(np.linalg.eigvals(A)))) if np.all(np.isfinite(A)) else math.inf
        raise InputError("command line", "--dt", f"a step short enough for the fastest root ({fastest:.3g} 1/s) "
                         f"to be sampled in double precision (at most {500.0 / fastest:.2g} s)", f"{step:g} s")
    Phi = E[n:, n:].T
    Q = Phi @ E[:n, n:]
    Q = 0.5 * (Q + Q.T)
    values, vectors = np.linalg.eigh(Q)
    root = vectors * np.sqrt(np.clip(values, 0.0, None))
    count = int(round(duration / step)) + 1
    rng = np.random.default_rng(seed)
    noise = rng.standard_normal((count - 1, n)) @ root.T
    x = np.zeros(n)
    states = np.empty((count, n))
    states[0] = x
    for k in range(count - 1):
        x = Phi @ x + noise[k]
        states[k + 1] = x
    return np.arange(count) * step, states @ C.T
