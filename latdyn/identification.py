"""Derivatives from flight test: identification from measured time histories.

From one or more measured manoeuvres (:class:`latdyn.flight_data.FlightRecord`)
at one flight condition, this stage estimates the primed dimensional
derivatives of the lateral model (:data:`latdyn.model.DIMENSIONAL_NAMES`, in
the axes of the aircraft file's condition) with their uncertainty, and
converts them to non-dimensional derivatives through the file's geometry,
mass and flight condition.

Two methods, as in the published practice (V. Klein and E. A. Morelli,
*Aircraft System Identification: Theory and Practice*, AIAA, 2006: chapter 5
for equation error, chapter 6 for output error; R. V. Jategaonkar, *Flight
Vehicle System Identification*, AIAA, 2006, chapter 4 -- chapter numbers
from memory):

* **Equation error** (:func:`equation_error`): ordinary least squares of the
  measured state derivatives on the measured states and controls, each
  equation with its own bias.  The state derivatives come from smoothed
  numerical differentiation (local cubic least squares, A. Savitzky and
  M. J. E. Golay, *Analytical Chemistry* 36(8), 1964).  Fast, needs sideslip,
  roll and yaw rate, and is biased by noise on the regressors: a first
  estimate and the start of output error.
* **Output error** (:func:`output_error`): maximum likelihood for the linear
  model with white measurement noise.  The model's outputs are simulated
  exactly for the held inputs (:func:`latdyn.responses.simulate_arrays`);
  Gauss-Newton steps with Levenberg-Marquardt damping minimise the
  weighted output residuals, the noise covariance (diagonal) re-estimated
  from the residuals between steps (the relaxation method); each manoeuvre
  has its own initial state and a constant bias on every measured channel.
  Cramer-Rao bounds from the information matrix, corrected for coloured
  residuals as E. A. Morelli and V. Klein, "Determining the accuracy of
  maximum likelihood parameter estimates with colored residuals", NASA
  CR-194893, 1994, describe:

  .. math::
      \\mathrm{Cov} = M^{-1} \\Big[\\sum_i \\sum_j S_i^T R^{-1}
      \\hat R_{vv}(i - j) R^{-1} S_j\\Big] M^{-1}

  with the residual autocorrelation estimate R_vv over a Bartlett lag
  window (:func:`_coloured_middle`; the window is our choice).

A derivative is called not identifiable from the manoeuvres given when its
bound is larger than its value or it correlates beyond
:data:`HIGH_CORRELATION` with another parameter (Klein and Morelli, 2006,
use 0.9 as the mark of high correlation -- from memory; ours is the
stricter 0.95).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from latdyn.model import COEFFICIENT_NAMES, DIMENSIONAL_NAMES, lateral_matrices, output_matrices
from latdyn.units import STANDARD_GRAVITY

__all__ = [
    "HIGH_CORRELATION", "ParameterEstimate", "EquationErrorResult", "IdentificationResult",
    "equation_error", "output_error", "identify", "nondimensional_map", "smoothed_derivative",
    "DERIVATIVE_FOR_COEFFICIENT",
]

#: Correlation beyond which two estimates are called not separable.
HIGH_CORRELATION = 0.95

#: The primed dimensional derivative that carries each non-dimensional one.
DERIVATIVE_FOR_COEFFICIENT = {
    "Cy_beta": "Y_v", "Cy_p": "Y_p", "Cy_r": "Y_r", "Cl_beta": "L_beta", "Cl_p": "L_p",
    "Cl_r": "L_r", "Cn_beta": "N_beta", "Cn_p": "N_p", "Cn_r": "N_r", "Cy_da": "Y_da",
    "Cl_da": "L_da", "Cn_da": "N_da", "Cy_dr": "Y_dr", "Cl_dr": "L_dr", "Cn_dr": "N_dr",
}

_CONTROL_DERIVATIVES = {"aileron": ("Y_da", "L_da", "N_da"), "rudder": ("Y_dr", "L_dr", "N_dr")}


@dataclass(frozen=True)
class ParameterEstimate:
    """One derivative: identified value, bound and prediction.  Unpacks as
    ``value, standard_error, predicted``.

    Attributes
    ----------
    name : str
        The derivative (``L_p`` or ``Cl_p``).
    value : float
        Identified value (the prediction where ``fixed``).
    standard_error : float or None
        Cramer-Rao bound corrected for coloured residuals (None where fixed).
    predicted : float or None
        The aircraft file's value.
    fixed : bool
        Held at the prediction, not identified.
    identifiable : bool
        False when the bound exceeds the value or the estimate correlates
        beyond :data:`HIGH_CORRELATION` with another.
    note : str
        Why it is not identifiable (or why it was fixed).
    """

    name: str
    value: float
    standard_error: float | None
    predicted: float | None
    fixed: bool = False
    identifiable: bool = True
    note: str = ""

    def __iter__(self):
        return iter((self.value, self.standard_error, self.predicted))

    @property
    def difference_in_standard_errors(self) -> float | None:
        """(value - predicted) / standard_error, or None."""
        if self.fixed or not self.standard_error or self.predicted is None:
            return None
        return (self.value - self.predicted) / self.standard_error

    def as_dict(self) -> dict:
        """The JSON entry ``{"value", "standard_error", "predicted", "fixed", ...}``."""
        return {"value": float(self.value),
                "standard_error": None if self.standard_error is None else float(self.standard_error),
                "predicted": None if self.predicted is None else float(self.predicted),
                "fixed": bool(self.fixed), "identifiable": bool(self.identifiable),
                "note": self.note or None}


@dataclass(frozen=True)
class EquationErrorResult:
    """Equation-error estimates.  Unpacks as ``values, standard_errors``.

    Attributes
    ----------
    values, standard_errors : dict
        Per estimated derivative (SI); the standard errors are those of
        ordinary least squares (optimistic for coloured residuals).
    equations : tuple of str
        The equations regressed (``"roll"``, ``"yaw"``, ``"side force (ny)"``
        or ``"sideslip"``).
    notes : tuple of str
    """

    values: dict
    standard_errors: dict
    equations: tuple
    notes: tuple = ()

    def __iter__(self):
        return iter((self.values, self.standard_errors))


@dataclass(frozen=True, eq=False)
class IdentificationResult:
    """Identified derivatives of one flight condition, with fit and residuals.

    Unpacks as ``derivatives, nondimensional, fit``.

    Attributes
    ----------
    condition : str
        The flight condition.
    derivatives : tuple of ParameterEstimate
        Primed dimensional derivatives (SI) in ``axes``.
    nondimensional : tuple of ParameterEstimate or None
        The non-dimensional derivatives [1/rad] where the file has geometry
        and mass.
    axes : str
        Axes of the derivatives.
    fit : dict
        ``{"method", "iterations", "converged", "cost", "samples",
        "channels": {name: {"rms_residual", "noise_std", "r_squared",
        "lag1_autocorrelation"}}, "max_correlation", "records"}``.
    correlation : numpy.ndarray
        Correlation matrix of the free derivatives (order of ``free``).
    free : tuple of str
        The identified derivatives.
    records : tuple of FlightRecord
    simulated : tuple of numpy.ndarray
        The identified model's outputs for each record (channels of the record).
    predicted_outputs : tuple of numpy.ndarray
        The file model's outputs for each record, from the same initial state.
    initial_states, biases : tuple of numpy.ndarray
        Per record [rad, rad/s] and per measured channel.
    equation_error : EquationErrorResult or None
        The first estimate.
    notes : tuple of str
    """

    condition: str
    derivatives: tuple
    nondimensional: tuple | None
    axes: str
    fit: dict
    correlation: np.ndarray
    free: tuple
    records: tuple
    simulated: tuple
    predicted_outputs: tuple
    initial_states: tuple
    biases: tuple
    equation_error: EquationErrorResult | None = None
    notes: tuple = ()

    def __iter__(self):
        return iter((self.derivatives, self.nondimensional, self.fit))

    def estimate(self, name) -> ParameterEstimate:
        """The estimate of one derivative, dimensional (``L_p``) or not (``Cl_p``)."""
        for item in (*self.derivatives, *(self.nondimensional or ())):
            if item.name == name:
                return item
        raise KeyError(name)

    @property
    def values(self) -> dict:
        """Identified primed dimensional derivatives (SI), every name."""
        return {item.name: item.value for item in self.derivatives}

    def __repr__(self):
        free = sum(not item.fixed for item in self.derivatives)
        return (f"IdentificationResult({self.condition!r}: {free} derivatives identified from "
                f"{len(self.records)} record(s), {self.fit['method']}, "
                f"{'converged' if self.fit['converged'] else 'NOT converged'})")

    def to_pandas(self):
        """The estimates as a pandas DataFrame (pandas imported only here)."""
        import pandas

        rows = [{"derivative": item.name, **item.as_dict()}
                for item in (*(self.nondimensional or ()), *self.derivatives)]
        return pandas.DataFrame(rows)


# ------------------------------------------------------------------ smoothing

def smoothed_derivative(signal, step, window_time=0.25, order=3):
    """Smoothed signal and its time derivative by local polynomial least squares.

    A Savitzky-Golay filter (Savitzky and Golay, *Analytical Chemistry*
    36(8), 1964, 1627-1639) of the given polynomial order over a window of
    about ``window_time`` (an odd number of samples, at least ``order + 2``).

    Parameters
    ----------
    signal : array_like, shape (N,) or (N, m)
        Evenly sampled signal(s).
    step : float
        Sample spacing [s].
    window_time : float
        Window length [s].
    order : int
        Polynomial order.

    Returns
    -------
    smoothed, derivative : numpy.ndarray
        Same shape as ``signal``; the derivative per second.

    Examples
    --------
    A cubic is reproduced exactly, and so is its derivative:

    >>> t = np.arange(50) * 0.02
    >>> x, dx = smoothed_derivative(t**3, 0.02)
    >>> bool(np.allclose(x, t**3)), bool(np.allclose(dx, 3 * t**2))
    (True, True)
    """
    from scipy.signal import savgol_filter

    signal = np.asarray(signal, dtype=float)
    window = int(round(window_time / step)) // 2 * 2 + 1
    window = max(window, order + 2 + (order + 2 + 1) % 2)
    window = min(window, signal.shape[0] - (1 - signal.shape[0] % 2))
    smoothed = savgol_filter(signal, window, order, axis=0, mode="interp")
    derivative = savgol_filter(signal, window, order, deriv=1, delta=step, axis=0, mode="interp")
    return smoothed, derivative


# ------------------------------------------------------------------ the model

@dataclass(frozen=True)
class _Setting:
    """What stays fixed during identification: the flight condition of the equations."""

    speed: float
    alpha_equations: float
    theta: float
    gravity: float = STANDARD_GRAVITY


def _setting(model):
    return _Setting(float(model.speed), float(model.alpha_equations), float(model.theta))


def _matrices(values, setting, channels):
    """A, B, C, D of derivative values (arrays of one batch shape) for the measured channels."""
    from latdyn.flight_data import CHANNELS

    A, B = lateral_matrices(values, setting.speed, setting.alpha_equations, setting.theta, setting.gravity)
    C, D = output_matrices(values, setting.speed, 4, setting.gravity)
    rows = [CHANNELS.index(c) for c in channels]
    return A, B, C[..., rows, :], D[..., rows, :]


def _discrete(values, setting, channels, step):
    """Exact held-input discrete model of derivative values: Phi, Gamma, C, D (batched like the values)."""
    from latdyn.responses import discretise

    A, B, C, D = _matrices(values, setting, channels)
    Phi, Gamma, _ = discretise(A, B, step)
    return Phi, Gamma, C, D


def _run(discrete, record, initial):
    """Outputs (..., N, m) of a discrete model for one record from ``initial`` (..., 4)."""
    from latdyn.responses import propagate

    Phi, Gamma, C, D = discrete
    batch = Phi.shape[:-2]
    forcing = np.zeros(batch + (record.time.size, 4))
    forcing[..., 0, :] = initial
    forcing[..., 1:, :] = record.inputs[:-1] @ np.swapaxes(Gamma, -1, -2)
    states = propagate(Phi, forcing)
    return states @ np.swapaxes(C, -1, -2) + record.inputs @ np.swapaxes(D, -1, -2)


def _simulate(values, setting, record, initial):
    """Outputs (..., N, m) of derivative values for one record from ``initial`` (..., 4)."""
    return _run(_discrete(values, setting, record.channels, record.step), record, initial)


# ------------------------------------------------------------------ equation error

def equation_error(records, model, fixed=None):
    """Equation-error estimates of the primed dimensional derivatives.

    Regressions (one bias per equation and record; Klein and Morelli, 2006,
    chapter 5 -- from memory)::

        p_dot = L_beta beta + L_p p + L_r r + L_da da + L_dr dr + b
        r_dot = N_beta beta + N_p p + N_r r + N_da da + N_dr dr + b
        g ny  = Y_v V beta + Y_p p + Y_r r + Y_da da + Y_dr dr + b       (ny measured)
        beta_dot - sin(a0) p + cos(a0) r - (g cos(th0)/V) phi
              = Y_v beta + (Y_p p + Y_r r + Y_da da + Y_dr dr)/V + b    (otherwise)

    States and their derivatives from :func:`smoothed_derivative`; a
    derivative in ``fixed`` moves to the left-hand side.

    Parameters
    ----------
    records : sequence of FlightRecord
        At the same flight condition; sideslip, roll and yaw rate measured.
    model : latdyn.model.LateralModel
        The condition's model (speed, angles of the equations).
    fixed : mapping of str to float, optional
        Derivatives held at these values.

    Returns
    -------
    EquationErrorResult
        Empty (with a note) when sideslip, roll rate or yaw rate is missing.
    """
    setting = _setting(model)
    fixed = dict(fixed or {})
    needed = {"beta", "p", "r"}
    if not all(needed <= set(record.channels) for record in records):
        return EquationErrorResult({}, {}, (), ("equation error needs sideslip, roll rate and yaw rate "
                                                "measured in every record; skipped",))
    use_ny = all("ny" in record.channels for record in records)
    use_phi = all("phi" in record.channels for record in records)
    equations = {"roll": ("L_beta", "L_p", "L_r", "L_da", "L_dr"),
                 "yaw": ("N_beta", "N_p", "N_r", "N_da", "N_dr")}
    if use_ny or use_phi:
        equations["side force (ny)" if use_ny else "sideslip"] = ("Y_v", "Y_p", "Y_r", "Y_da", "Y_dr")
    excited = _excited(records)
    values, errors, notes = {}, {}, []
    for equation, names in equations.items():
        lhs_parts, regressor_parts, bias_parts = [], [], []
        for index, record in enumerate(records):
            smoothed, rates = smoothed_derivative(np.column_stack([record.measured, record.inputs]),
                                                  record.step)
            signal = dict(zip((*record.channels, "aileron", "rudder"), smoothed.T))
            rate = dict(zip((*record.channels, "aileron", "rudder"), rates.T))
            lhs, X = _regression(equation, signal, rate, setting)
            lhs_parts.append(lhs)
            regressor_parts.append(X)
            bias = np.zeros((lhs.size, len(records)))
            bias[:, index] = 1.0
            bias_parts.append(bias)
        lhs = np.concatenate(lhs_parts)
        X = np.concatenate(regressor_parts)
        free = [i for i, name in enumerate(names) if name not in fixed and _is_excited(name, excited)]
        for i, name in enumerate(names):
            if i not in free:
                lhs = lhs - X[:, i] * fixed.get(name, model.derivatives.__getattribute__(name))
        design = np.column_stack([X[:, free], np.concatenate(bias_parts)])
        solution, _, rank, _ = np.linalg.lstsq(design, lhs, rcond=None)
        if rank < design.shape[1]:
            notes.append(f"{equation} equation: the regressors are linearly dependent; estimates not unique")
        residual = lhs - design @ solution
        dof = max(lhs.size - design.shape[1], 1)
        variance = float(residual @ residual) / dof
        covariance = variance * np.linalg.pinv(design.T @ design)
        for k, i in enumerate(free):
            values[names[i]] = float(solution[k])
            errors[names[i]] = float(math.sqrt(max(covariance[k, k], 0.0)))
    return EquationErrorResult(values, errors, tuple(equations), tuple(notes))


def _regression(equation, signal, rate, setting):
    """Left-hand side and regressors (columns in the equation's derivative order)."""
    beta, p, r = signal["beta"], signal["p"], signal["r"]
    controls = (signal["aileron"], signal["rudder"])
    if equation == "roll":
        return rate["p"], np.column_stack([beta, p, r, *controls])
    if equation == "yaw":
        return rate["r"], np.column_stack([beta, p, r, *controls])
    V, g = setting.speed, setting.gravity
    if equation.startswith("side force"):
        return g * signal["ny"], np.column_stack([V * beta, p, r, *controls])
    lhs = (rate["beta"] - math.sin(setting.alpha_equations) * p + math.cos(setting.alpha_equations) * r
           - g * math.cos(setting.theta) / V * signal["phi"])
    return lhs, np.column_stack([beta, p / V, r / V, controls[0] / V, controls[1] / V])


def _excited(records):
    """Which controls move in at least one record."""
    return {name: any(np.ptp(record.inputs[:, i]) > 0 for record in records)
            for i, name in enumerate(("aileron", "rudder"))}


def _is_excited(name, excited):
    return not any(name in names and not excited[control]
                   for control, names in _CONTROL_DERIVATIVES.items())


# ------------------------------------------------------------------ output error

def output_error(records, model, start=None, free=None, max_iterations=60, tolerance=1e-7):
    """Maximum-likelihood (output-error) estimates of the primed dimensional derivatives.

    Parameters
    ----------
    records : sequence of FlightRecord
        At the same flight condition.
    model : latdyn.model.LateralModel
        The condition's model: its derivatives are the prediction and the
        values of the derivatives not in ``free``.
    start : mapping of str to float, optional
        Starting values of free derivatives (default the prediction).
    free : sequence of str, optional
        The derivatives to identify (default every one whose control moves).
    max_iterations : int
        Most Gauss-Newton steps.
    tolerance : float
        Convergence: every parameter change below ``tolerance`` times its
        bound and the relative change of the cost below ``tolerance``.

    Returns
    -------
    dict
        ``values`` (every derivative), ``free``, ``covariance`` (corrected),
        ``covariance_white`` (the plain Cramer-Rao bound), ``information``,
        ``initial_states``, ``biases``, ``simulated``, ``noise`` (per channel
        variance), ``iterations``, ``converged``, ``cost``, ``parameter_names``.
    """
    setting = _setting(model)
    predicted = {name: float(getattr(model.derivatives, name)) for name in DIMENSIONAL_NAMES}
    excited = _excited(records)
    if free is None:
        free = [name for name in DIMENSIONAL_NAMES if _is_excited(name, excited)]
    free = [name for name in DIMENSIONAL_NAMES if name in set(free)]
    values = dict(predicted)
    values.update({k: float(v) for k, v in (start or {}).items() if k in values})
    initial = [np.array([record.channel(c)[0] if c in record.channels else 0.0
                         for c in ("beta", "p", "r", "phi")]) for record in records]
    biases = [np.zeros(len(record.channels)) for record in records]
    channels = sorted({c for record in records for c in record.channels},
                      key=lambda c: ("beta", "p", "r", "phi", "ny").index(c))
    scale = {name: max(abs(values[name]), abs(predicted[name]), 1e-3) for name in free}
    P = len(free)
    layout = [P]
    for record in records:
        layout.append(layout[-1] + 4 + len(record.channels))
    n_parameters = layout[-1]

    def unpack(theta):
        vals = dict(values)
        vals.update(zip(free, theta[:P]))
        x0s = [theta[layout[j]:layout[j] + 4] for j in range(len(records))]
        bs = [theta[layout[j] + 4:layout[j + 1]] for j in range(len(records))]
        return vals, x0s, bs

    def pack(vals, x0s, bs):
        return np.concatenate([[vals[name] for name in free], *[np.concatenate([x, b]) for x, b in zip(x0s, bs)]])

    def residuals(theta):
        vals, x0s, bs = unpack(theta)
        out = []
        for record, x0, b in zip(records, x0s, bs):
            out.append(record.measured - _simulate(vals, setting, record, x0) - b)
        return out

    from latdyn.responses import propagate

    def sensitivities(theta):
        """Outputs and d(outputs)/d(theta) of every record: (N, m) and (N, m, n_parameters)."""
        vals, x0s, bs = unpack(theta)
        steps = np.array([1e-5 * scale[name] for name in free])
        batch = {name: np.full(2 * P + 1, vals[name]) for name in DIMENSIONAL_NAMES}
        for i, name in enumerate(free):
            batch[name][1 + 2 * i] += steps[i]
            batch[name][2 + 2 * i] -= steps[i]
        cache = {}
        result = []
        for j, (record, x0, b) in enumerate(zip(records, x0s, bs)):
            key = (record.channels, round(record.step, 12))
            if key not in cache:
                cache[key] = _discrete(batch, setting, record.channels, record.step)
            Phi, Gamma, C, D = cache[key]
            outputs = _run((Phi, Gamma, C, D), record, np.broadcast_to(x0, (2 * P + 1, 4)))
            y = outputs[0] + b
            S = np.zeros(y.shape + (n_parameters,))
            if P:
                S[..., :P] = np.moveaxis((outputs[1::2] - outputs[2::2]) / (2 * steps[:, None, None]), 0, -1)
            # the outputs are linear in the initial state: y_k = C Phi^k x0 (nominal model)
            free_response = propagate(np.broadcast_to(Phi[0], (4, 4, 4)),
                                      np.concatenate([np.eye(4)[:, None, :],
                                                      np.zeros((4, record.time.size - 1, 4))], axis=1))
            S[..., layout[j]:layout[j] + 4] = np.moveaxis(free_response @ C[0].T, 0, -1)
            S[..., layout[j] + 4:layout[j + 1]] = np.eye(len(record.channels))[None, :, :]
            result.append((y, S))
        return result

    def noise_of(res):
        total = {c: [0.0, 0] for c in channels}
        for record, v in zip(records, res):
            for k, c in enumerate(record.channels):
                total[c][0] += float(v[:, k] @ v[:, k])
                total[c][1] += v.shape[0]
        floor = {c: max((1e-13 * max(float(np.sqrt(np.mean(record.channel(c) ** 2)))
                                    for record in records if c in record.channels)) ** 2, 1e-30)
                 for c in channels}
        return {c: max(s / n, floor[c]) for c, (s, n) in total.items()}

    def weights(noise, record):
        return np.array([1.0 / noise[c] for c in record.channels])

    def cost(res, noise):
        return 0.5 * sum(float(np.sum(v**2 * weights(noise, record))) for record, v in zip(records, res))

    theta = pack(values, initial, biases)
    res = residuals(theta)
    noise = noise_of(res)
    damping = 1e-3
    converged = False
    iterations = 0
    for iterations in range(1, max_iterations + 1):
        current = cost(res, noise)
        M = np.zeros((n_parameters, n_parameters))
        g = np.zeros(n_parameters)
        for record, v, (_, S) in zip(records, res, sensitivities(theta)):
            w = weights(noise, record)
            SW = S * w[None, :, None]
            M += np.einsum("tmp,tmq->pq", SW, S)
            g += np.einsum("tmp,tm->p", SW, v)
        diagonal = np.diag(M).copy()
        diagonal[diagonal <= 0] = 1.0
        accepted = False
        for _ in range(12):
            try:
                step = np.linalg.solve(M + damping * np.diag(diagonal), g)
            except np.linalg.LinAlgError:
                damping *= 10.0
                continue
            trial = theta + step
            trial_res = residuals(trial)
            trial_cost = cost(trial_res, noise)
            if np.isfinite(trial_cost) and trial_cost <= current:
                accepted = True
                break
            damping *= 10.0
        if not accepted:
            converged = True  # no step lowers the cost: at the minimum to round-off
            break
        damping = max(damping / 10.0, 1e-9)
        try:
            bounds = np.sqrt(np.abs(np.diag(np.linalg.inv(M))))
        except np.linalg.LinAlgError:
            bounds = np.full(n_parameters, np.inf)
        theta, res = trial, trial_res
        new_noise = noise_of(res)
        relative = abs(current - trial_cost) / max(current, 1e-300)
        small_steps = np.all(np.abs(step) <= tolerance * np.where(bounds > 0, bounds, 1.0) + 1e-14)
        noise_settled = all(abs(new_noise[c] - noise[c]) <= 1e-6 * noise[c] for c in channels)
        noise = new_noise
        if (relative < tolerance or small_steps) and noise_settled:
            converged = True
            break
    # information matrix, bounds and the coloured-residual correction at the estimate
    M = np.zeros((n_parameters, n_parameters))
    middle = np.zeros((n_parameters, n_parameters))
    simulated = []
    for record, v, (y, S) in zip(records, res, sensitivities(theta)):
        w = weights(noise, record)
        U = S * w[None, :, None]
        M += np.einsum("tmp,tmq->pq", U, S)
        middle += _coloured_middle(U, v)
        simulated.append(y)
    inverse = np.linalg.pinv(M)
    covariance = inverse @ middle @ inverse
    covariance = 0.5 * (covariance + covariance.T)
    vals, x0s, bs = unpack(theta)
    return {
        "values": vals, "free": tuple(free), "covariance": covariance, "covariance_white": inverse,
        "information": M, "initial_states": tuple(x0s), "biases": tuple(bs),
        "simulated": tuple(simulated), "residuals": tuple(res), "noise": noise,
        "iterations": iterations, "converged": converged, "cost": cost(res, noise),
        "parameter_names": tuple(free) + tuple(
            f"{kind}[{j}]" for j, record in enumerate(records)
            for kind in (*(f"x0.{s}" for s in ("beta", "p", "r", "phi")),
                         *(f"bias.{c}" for c in record.channels))),
    }


def correlation_lags(v, most=None):
    """The lag up to which residuals are correlated: the first lag at which the
    autocorrelation of every channel lies inside the white-noise band
    +-1.96/sqrt(N) (common practice; at most ``most``, default N/10).

    Examples
    --------
    >>> correlation_lags(np.random.default_rng(1).standard_normal((2000, 2)))
    1
    """
    v = np.asarray(v, dtype=float)
    N = v.shape[0]
    most = max(1, N // 10) if most is None else most
    centred = v - v.mean(axis=0)
    power = np.sum(centred**2, axis=0)
    power[power == 0] = 1.0
    band = 1.96 / math.sqrt(N)
    for lag in range(1, most + 1):
        rho = np.sum(centred[lag:] * centred[:-lag], axis=0) / power
        if np.all(np.abs(rho) <= band):
            return lag
    return most


def _coloured_middle(U, v, lags=None):
    """sum_i sum_j U_i^T Rvv(i - j) U_j over a Bartlett lag window.

    ``U`` (N, m, P): weighted sensitivities R^-1 S; ``v`` (N, m): residuals.
    ``Rvv(k) = (1/N) sum_t v_t v_(t-k)^T`` is used for |k| <= K (K from
    :func:`correlation_lags` unless given) with the weights 1 - |k|/(K + 1),
    which keep the sum positive semi-definite (a truncated lag window; with
    white residuals it is the information matrix).  All lags would include
    the near-zero-frequency band that the fit itself has emptied (the
    residuals are orthogonal to the sensitivities at the estimate) and
    understate the bounds.
    """
    N = v.shape[0]
    K = correlation_lags(v) if lags is None else lags
    total = np.zeros((U.shape[-1], U.shape[-1]))
    for k in range(0, K + 1):
        weight = 1.0 - k / (K + 1.0)
        R = (v[k:].T @ v[:N - k]) / N          # Rvv(k) = E[v_t v_(t-k)^T]
        term = np.einsum("tap,ab,tbq->pq", U[k:], R, U[:N - k])
        total += weight * (term if k == 0 else term + term.T)
    return total


# ------------------------------------------------------------------ non-dimensional

def nondimensional_map(aircraft, condition):
    """The linear map from non-dimensional to primed dimensional derivatives.

    ``d = F c`` with ``c`` in :data:`COEFFICIENT_NAMES` order and ``d`` in
    :data:`DIMENSIONAL_NAMES` order, in the axes of the condition's
    derivatives (:func:`latdyn.model.primed_values` applied to unit vectors:
    the map is linear for a given flight condition, mass and geometry).

    Returns
    -------
    numpy.ndarray, shape (15, 15), or None
        None when the file lacks geometry or mass.
    """
    from latdyn.model import primed_values

    if aircraft.geometry is None or aircraft.mass is None:
        return None
    flight = condition.flight
    m, g = aircraft.mass, aircraft.geometry
    axes = condition.derivatives.axes
    basis = {name: np.eye(len(COEFFICIENT_NAMES))[i] for i, name in enumerate(COEFFICIENT_NAMES)}
    values = primed_values(basis, True, True, axes, m.axes, flight.alpha, g.wing_area, g.span, m.mass,
                           m.Ixx, m.Izz, m.Ixz, flight.density, flight.speed)
    return np.array([np.asarray(values[name], dtype=float) for name in DIMENSIONAL_NAMES])


# ------------------------------------------------------------------ entry point

def identify(aircraft, condition, records, fix=(), method="output_error") -> IdentificationResult:
    """Identify the lateral-directional derivatives of a condition from flight records.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
        The prediction: its derivatives start the estimation and fill the
        fixed ones; its geometry and mass convert to non-dimensional form.
    condition : str or latdyn.aircraft.Condition
        The flight condition the records were flown at.
    records : sequence of FlightRecord
    fix : sequence of str
        Derivatives held at the prediction: dimensional (``Y_p``) or
        non-dimensional names (``Cy_p`` holds its primed dimensional
        derivative ``Y_p``).
    method : {"output_error", "equation_error"}

    Returns
    -------
    IdentificationResult
    """
    from latdyn.errors import InputError
    from latdyn.model import lateral_model

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    records = tuple(records)
    model = lateral_model(aircraft, condition)
    predicted = {name: float(getattr(model.derivatives, name)) for name in DIMENSIONAL_NAMES}
    held = set()
    for name in fix:
        key = DERIVATIVE_FOR_COEFFICIENT.get(name, name)
        if key not in DIMENSIONAL_NAMES:
            raise InputError("command line", "--fix", "a derivative such as Cn_r or N_r "
                             f"({', '.join(COEFFICIENT_NAMES)})", repr(name))
        held.add(key)
    excited = _excited(records)
    notes = []
    for control, names in _CONTROL_DERIVATIVES.items():
        if not excited[control]:
            notes.append(f"the {control} does not move in any record: {', '.join(names)} held at the "
                         "prediction")
    missing = [c for c in ("beta", "p", "r", "phi", "ny") if not any(c in r.channels for r in records)]
    if missing:
        notes.append(f"not measured: {', '.join(missing)}; identified from the other channels "
                     "(wider bounds on the derivatives those channels carry)")
    free = [name for name in DIMENSIONAL_NAMES if name not in held and _is_excited(name, excited)]
    first = equation_error(records, model, fixed={name: predicted[name] for name in DIMENSIONAL_NAMES
                                                  if name not in free})
    notes.extend(first.notes)
    if method == "equation_error":
        if not first.values:
            raise InputError(records[0].file, None, "sideslip, roll rate and yaw rate for equation error",
                             "a record without them")
        values = dict(predicted)
        values.update(first.values)
        free = [name for name in free if name in first.values]
        errors = {name: first.standard_errors[name] for name in free}
        covariance = np.diag([errors[name] ** 2 for name in free])
        correlation = np.eye(len(free))
        fit = {"method": "equation error (ordinary least squares)", "iterations": 1, "converged": True}
        estimate = {"values": values, "initial_states": tuple(np.zeros(4) for _ in records),
                    "biases": tuple(np.zeros(len(r.channels)) for r in records)}
        simulated = tuple(_simulate(values, _setting(model), r, np.zeros(4)) for r in records)
        full_correlation, parameter_names = correlation, tuple(free)
    else:
        start = {k: v for k, v in first.values.items() if k in free and _plausible_start(k, v, predicted)}
        try:
            with np.errstate(all="ignore"):  # numbers that are not finite are caught below
                estimate = output_error(records, model, start=start, free=free)
                retry = output_error(records, model, start=None, free=free) if not estimate["converged"] else None
            if retry is not None and retry["converged"] and retry["cost"] <= estimate["cost"]:
                estimate = retry
                notes.append("the equation-error start did not converge; restarted from the prediction")
        except (np.linalg.LinAlgError, FloatingPointError, OverflowError) as error:
            estimate = {"values": {}, "covariance": np.array(np.nan), "failure": str(error)}
        if not (all(np.isfinite(v) for v in estimate["values"].values())
                and np.all(np.isfinite(estimate["covariance"]))):
            # a stiff or extreme model: no finite estimate to report, one line instead of a traceback
            raise InputError(aircraft.file, None, "a model and records that output error fits in finite numbers "
                             "(check the magnitudes of the derivatives, or try --method equation-error)",
                             estimate.get("failure", "estimates or bounds that are not finite"), condition.name)
        values = estimate["values"]
        covariance_all = estimate["covariance"]
        P = len(free)
        covariance = covariance_all[:P, :P]
        errors = {name: float(math.sqrt(max(covariance[i, i], 0.0))) for i, name in enumerate(free)}
        sd = np.sqrt(np.clip(np.diag(covariance_all), 1e-300, None))
        full_correlation = covariance_all / np.outer(sd, sd)
        correlation = full_correlation[:P, :P]
        parameter_names = estimate["parameter_names"]
        simulated = estimate["simulated"]
        fit = {"method": "output error (maximum likelihood, Gauss-Newton)",
               "iterations": estimate["iterations"], "converged": estimate["converged"],
               "cost": estimate["cost"]}
        if not estimate["converged"]:
            notes.append("output error did not converge: treat the estimates with caution")
    derivatives = []
    for i, name in enumerate(DIMENSIONAL_NAMES):
        if name not in free:
            reason = "held at the prediction" + (" (--fix)" if name in held else "")
            derivatives.append(ParameterEstimate(name, values[name], None, predicted[name], True, True, reason))
            continue
        k = free.index(name)
        value, error = float(values[name]), errors[name]
        identifiable, note = _identifiability(k, value, error, full_correlation, parameter_names)
        derivatives.append(ParameterEstimate(name, value, error, predicted[name], False, bool(identifiable),
                                             note))
    unidentifiable = [d.name for d in derivatives if not d.identifiable]
    if unidentifiable:
        notes.append("not identifiable from the manoeuvres given: " + ", ".join(unidentifiable)
                     + " (fix them, or fly manoeuvres that excite them)")
    nondimensional = _nondimensional(aircraft, condition, derivatives, free, covariance, predicted,
                                     full_correlation, parameter_names)
    fit.update(_fit_statistics(records, simulated, estimate, full_correlation, parameter_names))
    predicted_outputs = tuple(_simulate(predicted, _setting(model), r, x0)
                              for r, x0 in zip(records, estimate["initial_states"]))
    return IdentificationResult(
        condition=condition.name, derivatives=tuple(derivatives), nondimensional=nondimensional,
        axes=model.axes, fit=fit, correlation=correlation, free=tuple(free), records=records,
        simulated=tuple(simulated), predicted_outputs=predicted_outputs,
        initial_states=tuple(estimate["initial_states"]), biases=tuple(estimate["biases"]),
        equation_error=first if first.values else None, notes=tuple(notes))


def _plausible_start(name, value, predicted):
    """An equation-error value starts output error unless it is wildly off the prediction."""
    reference = abs(predicted[name])
    return math.isfinite(value) and (reference == 0 or abs(value - predicted[name]) < 10 * reference)


def _identifiability(k, value, error, correlation, names):
    if not math.isfinite(error) or error > abs(value):
        return False, f"bound {error:.3g} larger than the value"
    row = np.abs(correlation[k]).copy()
    row[k] = 0.0
    worst = int(np.argmax(row)) if row.size else 0
    if row.size and row[worst] > HIGH_CORRELATION:
        return False, f"correlation {correlation[k, worst]:+.3f} with {names[worst]}"
    return True, ""


def _nondimensional(aircraft, condition, derivatives, free, covariance, predicted, correlation, names):
    F = nondimensional_map(aircraft, condition)
    if F is None:
        return None
    try:
        G = np.linalg.inv(F)
    except np.linalg.LinAlgError:
        return None
    d = np.array([item.value for item in derivatives])
    c = G @ d
    c_predicted = G @ np.array([predicted[name] for name in DIMENSIONAL_NAMES])
    full = np.zeros((len(DIMENSIONAL_NAMES),) * 2)
    index = [DIMENSIONAL_NAMES.index(name) for name in free]
    full[np.ix_(index, index)] = covariance
    c_covariance = G @ full @ G.T
    by_dimensional = {item.name: item for item in derivatives}
    out = []
    for i, name in enumerate(COEFFICIENT_NAMES):
        carrier = by_dimensional[DERIVATIVE_FOR_COEFFICIENT[name]]
        fixed = carrier.fixed and not np.any(np.abs(G[i, index]) > 0) if index else carrier.fixed
        error = None if fixed else float(math.sqrt(max(c_covariance[i, i], 0.0)))
        identifiable = carrier.identifiable and (error is None or error <= abs(c[i]))
        if not carrier.identifiable and carrier.note.startswith("correlation"):
            note = carrier.note
        elif identifiable:
            note = ""
        else:
            note = f"bound {error:.3g} larger than the value"
        out.append(ParameterEstimate(name, float(c[i]), error, float(c_predicted[i]), bool(fixed),
                                     bool(identifiable), note))
    return tuple(out)


def _fit_statistics(records, simulated, estimate, correlation, names):
    channels = {}
    for c in ("beta", "p", "r", "phi", "ny"):
        measured, fitted = [], []
        for record, y, b in zip(records, simulated, estimate["biases"]):
            if c in record.channels:
                k = record.channels.index(c)
                measured.append(record.measured[:, k])
                fitted.append(y[:, k])
        if not measured:
            continue
        z = np.concatenate(measured)
        v = z - np.concatenate(fitted)
        spread = float(np.sum((z - z.mean()) ** 2))
        lag = float(np.sum(v[1:] * v[:-1]) / np.sum(v * v)) if np.sum(v * v) > 0 else 0.0
        channels[c] = {"rms_residual": float(np.sqrt(np.mean(v**2))),
                       "r_squared": 1.0 - float(v @ v) / spread if spread > 0 else None,
                       "lag1_autocorrelation": lag}
    derivatives = [i for i, name in enumerate(names) if name in DIMENSIONAL_NAMES]
    correlation = np.asarray(correlation)[np.ix_(derivatives, derivatives)]
    names = [names[i] for i in derivatives]
    upper = np.abs(np.triu(correlation, 1))
    pair = np.unravel_index(int(np.argmax(upper)), upper.shape) if upper.size else (0, 0)
    return {"samples": int(sum(r.time.size for r in records)), "records": [r.file for r in records],
            "channels": channels,
            "max_correlation": None if not upper.size else {
                "value": float(correlation[pair]), "between": [names[pair[0]], names[pair[1]]]}}


# ------------------------------------------------------------------ the identified aircraft

def identified_model(model, result):
    """The condition's model with the identified derivatives (a :class:`LateralModel`).

    Parameters
    ----------
    model : latdyn.model.LateralModel
        The file's model of the condition.
    result : IdentificationResult
    """
    from dataclasses import replace

    from latdyn.aircraft import DimensionalDerivatives

    values = result.values
    setting = _setting(model)
    A, B = lateral_matrices(values, setting.speed, setting.alpha_equations, setting.theta)
    C, D = output_matrices(values, setting.speed, 4)
    derivatives = DimensionalDerivatives(axes=model.axes, primed=True, **values)
    return replace(model, A=A, B=B, C=C, D=D, derivatives=derivatives,
                   name=f"{model.name} (identified)")


def variant_text(aircraft, result, base_file, output_file, command="latdyn identify") -> str:
    """An aircraft file that ``extends`` the original with the identified derivatives.

    Written in SI (``units = "SI"``: the values below are SI whatever the
    original's units).  Where the original gives non-dimensional derivatives
    the variant gives them too (``[condition.derivatives]``, same axes);
    otherwise the primed dimensional ones (``[condition.dimensional]``,
    ``primed = true``).  Each value carries its bound and the prediction in
    a comment.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    result : IdentificationResult
    base_file, output_file : str
        The original aircraft file and the variant's path (``extends`` is
        written relative to the variant's folder).
    """
    import os

    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.text import toml_comment, toml_string

    condition = aircraft.condition(result.condition)
    relative = os.path.relpath(os.path.abspath(base_file), os.path.dirname(os.path.abspath(output_file)))
    nondimensional = isinstance(condition.derivatives, NondimensionalDerivatives) and result.nondimensional
    lines = [
        f"# Derivatives of condition {toml_comment(toml_string(result.condition))} identified from flight test "
        f"({result.fit['method']}).",
        "# Records: " + toml_comment(", ".join(os.path.basename(r.file) or "unnamed" for r in result.records)) + ".",
        "# Beside each value: its standard error (Cramer-Rao bound, corrected for coloured residuals)",
        "# and the value predicted by the original file.  Written by " + toml_comment(command) + ".",
        f"extends = {toml_string(relative.replace(os.sep, '/'))}",
        'units = "SI"',
        f"name = {toml_string(aircraft.name + ' (identified from flight test)')}",
        "",
        "[[condition]]",
        f"name = {toml_string(result.condition)}",
    ]
    if nondimensional:
        lines += ["[condition.derivatives]", f'axes = "{condition.derivatives.axes}"']
        estimates = result.nondimensional
    else:
        lines += ["[condition.dimensional]", f'axes = "{result.axes}"', "primed = true"]
        estimates = result.derivatives
    for item in estimates:
        if item.fixed:
            comment = "held at the prediction"
        else:
            comment = f"+- {item.standard_error:.3g}; predicted {item.predicted:.6g}"
            if not item.identifiable:
                comment += f"; NOT identifiable ({item.note})"
        lines.append(f"{item.name} = {item.value:.6g}  # {comment}")
    return "\n".join(lines) + "\n"


def write_variant(aircraft, result, base_file, output_file, command="latdyn identify") -> None:
    """Write :func:`variant_text` atomically, after checking that it loads.

    Raises
    ------
    latdyn.errors.InputError
        When the variant would not load (for example a base condition whose
        derivatives are written in force and moment units, which the
        identified primed values cannot override key by key).
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.output_files import atomic_path

    text = variant_text(aircraft, result, base_file, output_file, command)
    with atomic_path(output_file, "-o") as temporary:  # beside the output: the same relative extends
        with open(temporary, "w", encoding="utf-8", newline="\n") as stream:
            stream.write(text)
        try:
            load_aircraft(temporary)
        except InputError as error:
            raise InputError(output_file, "-o", "a variant file that loads (the identified values written "
                             "over the original's keys)", f"{error.key or 'a problem'}: {error.found}"
                             ) from None
