"""Time responses of the linear lateral model, exact for held inputs.

The state equation x' = A x + B u is solved exactly between grid times for
an input held constant over each step (zero-order hold) or varying linearly
(first-order hold), by the matrix exponential of an augmented matrix:

    exp([[A h, B h], [0, 0]]) = [[Phi, Gamma], [0, I]]
    x(t + h) = Phi x(t) + Gamma u(t)

(Franklin, Powell and Workman, *Digital Control of Dynamic Systems*, 3rd ed.,
sec. 4.3.3 -- from memory; Van Loan, "Computing integrals involving the
matrix exponential", IEEE Trans. Automatic Control 23(3), 1978).  The
recursion is evaluated by a parallel prefix scan in numpy (log2 N vectorised
steps instead of N Python steps), which is exact to round-off.  No general
ODE integrator is used.

States are in rad and rad/s, the lateral load factor in g; degrees are for
display only (:func:`display_columns`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from latdyn.display import SI, SIGNAL_QUANTITIES

__all__ = [
    "overflow_time",
    "LARGEST_VALUE",
    "finite_part",
    "CSV_COLUMNS",
    "HOLDS",
    "Response",
    "discretise",
    "expm_stack",
    "propagate",
    "SEQUENTIAL_BATCH",
    "simulate_arrays",
    "with_heading",
    "simulate",
    "STANDARD_LIMITS",
    "sized_amplitude",
    "size_run",
    "STEP_WINDOW",
    "step_window",
    "RunSizing",
    "size_step_run",
    "size_defaults",
    "StandardResponse",
    "standard_response", "replayed_response",
    "display_columns",
    "csv_text",
    "write_csv",
]

#: Columns of a response CSV file, in order.
CSV_COLUMNS = ("time", "aileron_deg", "rudder_deg", "beta_deg", "p_deg_s", "r_deg_s",
               "phi_deg", "psi_deg", "ny_g")

#: Input interpolation between grid times: held constant or linear.
HOLDS = ("zero", "linear")

#: Column name of each signal in a response CSV file (a public layout: degrees, deg/s and g,
#: whatever the display units; factors from :data:`latdyn.display.SI`).
_DISPLAY = {
    name: (column, SI.convert(1.0, SIGNAL_QUANTITIES[name]))
    for name, column in (("aileron", "aileron_deg"), ("rudder", "rudder_deg"), ("beta", "beta_deg"),
                         ("p", "p_deg_s"), ("r", "r_deg_s"), ("phi", "phi_deg"), ("psi", "psi_deg"),
                         ("ny", "ny_g"))
}


#: Coefficients b_0 .. b_13 of the [13/13] Pade approximant and the largest 1-norm it serves
#: unscaled (N. J. Higham, "The scaling and squaring method for the matrix exponential
#: revisited", SIAM J. Matrix Anal. Appl. 26(4), 2005, table 2.3 and eq. 2.3).
_PADE13 = (64764752532480000.0, 32382376266240000.0, 7771770303897600.0, 1187353796428800.0,
           129060195264000.0, 10559470521600.0, 670442572800.0, 33522128640.0, 1323241920.0,
           40840800.0, 960960.0, 16380.0, 182.0, 1.0)
_THETA13 = 5.371920351148152

#: Stacks of at least this many matrices take the vectorised exponential.
_STACK_EXPM = 16


def expm_stack(M):
    """Matrix exponential of a stack of matrices.

    A small stack goes to ``scipy.linalg.expm``.  A large one is computed
    at once by scaling and squaring with the [13/13] Pade approximant
    (Higham, SIAM J. Matrix Anal. Appl. 26(4), 2005, algorithm 2.3 --
    the algorithm's number from memory): each matrix scaled by 2^-s with
    s = max(0, ceil(log2(||M||_1 / theta_13))), R = (V - U)^-1 (V + U),
    then squared s times -- the per-matrix loop of scipy replaced by
    vectorised products over the stack.

    Parameters
    ----------
    M : array_like, shape (..., n, n)

    Returns
    -------
    numpy.ndarray, shape (..., n, n)

    Examples
    --------
    >>> E = expm_stack(np.stack([[[0.0, 1.0], [-1.0, 0.0]]] * 20))  # rotation by 1 rad
    >>> bool(np.allclose(E[7], [[np.cos(1), np.sin(1)], [-np.sin(1), np.cos(1)]]))
    True
    """
    M = np.asarray(M, dtype=float)
    if M.ndim < 3 or math.prod(M.shape[:-2]) < _STACK_EXPM:
        from scipy.linalg import expm

        return expm(M)
    n = M.shape[-1]
    norm = np.abs(M).sum(axis=-2).max(axis=-1)
    with np.errstate(divide="ignore"):
        squarings = np.maximum(0, np.ceil(np.log2(norm / _THETA13)))
    squarings = np.where(np.isfinite(squarings), squarings, 0).astype(int)
    X = M / np.ldexp(1.0, squarings)[..., None, None]
    b = _PADE13
    identity = np.eye(n)
    X2 = X @ X
    X4 = X2 @ X2
    X6 = X4 @ X2
    U = X @ (X6 @ (b[13] * X6 + b[11] * X4 + b[9] * X2) + b[7] * X6 + b[5] * X4 + b[3] * X2
             + b[1] * identity)
    V = X6 @ (b[12] * X6 + b[10] * X4 + b[8] * X2) + b[6] * X6 + b[4] * X4 + b[2] * X2 + b[0] * identity
    R = np.linalg.solve(V - U, V + U)
    for k in range(int(squarings.max(initial=0))):
        chosen = squarings > k
        R[chosen] = R[chosen] @ R[chosen]
    return R


def discretise(A, B, step_size, hold="zero"):
    """Exact discrete-time matrices of x' = A x + B u over one step.

    For a zero-order hold ``x[k+1] = Phi x[k] + Gamma0 u[k]`` with
    ``exp([[A h, B h], [0, 0]]) = [[Phi, Gamma0], [0, I]]``; for a
    first-order hold (input linear between samples)
    ``x[k+1] = Phi x[k] + Gamma0 u[k] + Gamma1 u[k+1]`` from
    ``exp([[A h, B h, 0], [0, 0, I], [0, 0, 0]])`` (Franklin, Powell and
    Workman, *Digital Control of Dynamic Systems*, 3rd ed., sec. 4.3 and
    6.3 -- from memory).

    Parameters
    ----------
    A : array_like, shape (..., n, n)
        State matrix [1/s], with an optional leading batch axis.
    B : array_like, shape (..., n, k)
        Input matrix [state units per rad per s].
    step_size : float or array_like, shape (...,)
        Time step h [s], broadcast against the batch axis.
    hold : {"zero", "linear"}
        Input between samples.

    Returns
    -------
    Phi, Gamma0, Gamma1 : numpy.ndarray
        Shapes (..., n, n), (..., n, k), (..., n, k); ``Gamma1`` is zero for
        a zero-order hold.

    Examples
    --------
    >>> Phi, Gamma0, Gamma1 = discretise([[-1.0]], [[1.0]], 1.0)
    >>> round(float(Phi[0, 0]), 6), round(float(Gamma0[0, 0]), 6)
    (0.367879, 0.632121)
    """
    if hold not in HOLDS:
        raise ValueError(f"hold must be one of {HOLDS}, found {hold!r}")
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    n, k = B.shape[-2], B.shape[-1]
    h = np.asarray(step_size, dtype=float)[..., None, None]
    batch = np.broadcast_shapes(A.shape[:-2], B.shape[:-2], h.shape[:-2])
    size = n + k if hold == "zero" else n + 2 * k
    M = np.zeros(batch + (size, size))
    M[..., :n, :n] = A * h
    M[..., :n, n:n + k] = B * h
    if hold == "linear":
        M[..., n:n + k, n + k:] = np.eye(k)
    E = expm_stack(M)
    Phi = E[..., :n, :n]
    if hold == "zero":
        return Phi, E[..., :n, n:], np.zeros(batch + (n, k))
    Gamma1 = E[..., :n, n + k:]
    return Phi, E[..., :n, n:n + k] - Gamma1, Gamma1


#: Batch size from which :func:`propagate` runs the plain recurrence instead of the prefix scan
#: (measured with benchmarks/responses.py: the scan's O(N log N) work with large temporaries
#: loses to N vectorised steps once the batch holds about a hundred cases).
SEQUENTIAL_BATCH = 128


def propagate(Phi, forcing):
    """Solve ``x[k] = Phi[k] x[k-1] + forcing[k]`` for all k.

    ``forcing[..., 0, :]`` is the initial state.  For one case or a small
    batch the affine maps are composed by a parallel prefix scan in
    ceil(log2 N) vectorised steps (Hillis and Steele, "Data parallel
    algorithms", Comm. ACM 29(12), 1986; the linear-recurrence form in
    Blelloch, "Prefix sums and their applications", CMU-CS-90-190, 1990);
    for a batch of :data:`SEQUENTIAL_BATCH` cases or more with one matrix
    per case, the recurrence runs step by step, each step vectorised over
    the batch (state components as contiguous rows).  Both are exact to
    round-off.

    Parameters
    ----------
    Phi : array_like, shape (..., n, n) or (..., N, n, n)
        Transition matrix of every step (one matrix for a uniform grid, or
        one per sample with ``Phi[..., 0, :, :]`` unused).
    forcing : array_like, shape (..., N, n)
        Initial state followed by the forced part of each step.

    Returns
    -------
    numpy.ndarray, shape (..., N, n)
        The states.

    Examples
    --------
    >>> propagate(np.array([[0.5]]), np.array([[1.0], [0.0], [1.0]])).ravel().tolist()
    [1.0, 0.5, 1.25]
    """
    x = np.array(forcing, dtype=float)
    Phi = np.asarray(Phi, dtype=float)
    count = x.shape[-2]
    uniform = Phi.ndim != x.ndim + 1
    batch = x.shape[:-2]
    if uniform and math.prod(batch) >= SEQUENTIAL_BATCH:
        return _recurrence(np.broadcast_to(Phi, batch + Phi.shape[-2:]), x)
    if not uniform:
        Phi = Phi.copy()
    power = Phi
    shift = 1
    while shift < count:
        if uniform:
            x[..., shift:, :] = x[..., shift:, :] + x[..., :-shift, :] @ np.swapaxes(power, -1, -2)
            power = power @ power
        else:
            x[..., shift:, :] = x[..., shift:, :] + (power[..., shift:, :, :] @ x[..., :-shift, :, None])[..., 0]
            power = np.concatenate([power[..., :shift, :, :],
                                    power[..., shift:, :, :] @ power[..., :-shift, :, :]], axis=-3)
        shift *= 2
    return x


def _recurrence(Phi, forcing):
    """``x[k] = Phi x[k-1] + forcing[k]`` step by step, vectorised over the batch.

    Layout (N, n, batch): each state component of a step is one contiguous
    row, so a step is n*n multiply-adds of batch-long rows.
    """
    batch = forcing.shape[:-2]
    count, n = forcing.shape[-2:]
    size = math.prod(batch)
    F = np.ascontiguousarray(np.moveaxis(forcing.reshape(size, count, n), 0, -1))   # (N, n, size)
    P = np.ascontiguousarray(np.moveaxis(Phi.reshape(size, n, n), 0, -1))           # (n, n, size)
    X = np.empty_like(F)
    X[0] = F[0]
    term = np.empty(size)
    for k in range(1, count):
        previous, current = X[k - 1], X[k]
        np.copyto(current, F[k])
        for i in range(n):
            row = current[i]
            for j in range(n):
                np.multiply(P[i, j], previous[j], out=term)
                row += term
    return np.moveaxis(X, -1, 0).reshape(batch + (count, n))


def simulate_arrays(A, B, C, D, time, inputs, initial_state=None, hold="zero"):
    """States and outputs of x' = A x + B u, y = C x + D u on a time grid.

    Exact for inputs held constant between grid times (``hold="zero"``; the
    sample at t[k] acts on [t[k], t[k+1])) or linear between them
    (``hold="linear"``).  Non-uniform grids are allowed.

    Parameters
    ----------
    A, B, C, D : array_like
        Shapes (..., n, n), (..., n, k), (..., m, n), (..., m, k), with an
        optional leading batch axis [SI units].
    time : array_like, shape (N,)
        Strictly increasing grid times [s].
    inputs : array_like, shape (..., N, k)
        Input samples [rad].
    initial_state : array_like, shape (..., n), optional
        State at ``time[0]`` [rad, rad/s]; default trim (zero).
    hold : {"zero", "linear"}
        Input between samples.

    Returns
    -------
    states : numpy.ndarray, shape (..., N, n)
    outputs : numpy.ndarray, shape (..., N, m)

    Examples
    --------
    First-order lag x' = -x + u, unit step from rest: x(t) = 1 - exp(-t).

    >>> x, y = simulate_arrays([[-1.0]], [[1.0]], [[1.0]], [[0.0]], [0.0, 1.0, 2.0], [[1.0]] * 3)
    >>> np.round(y[:, 0], 6).tolist()
    [0.0, 0.632121, 0.864665]
    """
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    C = np.asarray(C, dtype=float)
    D = np.asarray(D, dtype=float)
    time = np.asarray(time, dtype=float)
    u = np.asarray(inputs, dtype=float)
    n = A.shape[-1]
    if time.ndim != 1 or time.size < 1:
        raise ValueError("time must be a 1-D array with at least one value")
    if u.shape[-2] != time.size or u.shape[-1] != B.shape[-1]:
        raise ValueError(f"inputs must have shape (..., {time.size}, {B.shape[-1]}), found {u.shape}")
    steps = np.diff(time)
    if steps.size and not np.all(steps > 0):
        raise ValueError("time must be strictly increasing")
    batch = np.broadcast_shapes(A.shape[:-2], B.shape[:-2], u.shape[:-2])
    x0 = np.zeros(batch + (n,)) if initial_state is None else np.broadcast_to(
        np.asarray(initial_state, dtype=float), batch + (n,))
    forcing = np.zeros(batch + (time.size, n))
    forcing[..., 0, :] = x0
    if steps.size:
        uniform = np.ptp(steps) <= 1e-9 * steps.max()
        if uniform:
            h = (time[-1] - time[0]) / steps.size
            Phi, G0, G1 = discretise(A, B, h, hold)
            # one Gamma for every step: u @ Gamma^T, one matrix product per case
            w = u[..., :-1, :] @ np.swapaxes(G0, -1, -2)
            if hold == "linear":
                w = w + u[..., 1:, :] @ np.swapaxes(G1, -1, -2)
        else:
            unique, index = np.unique(np.round(steps, 12), return_inverse=True)
            PhiU, G0U, G1U = discretise(A[..., None, :, :], B[..., None, :, :], unique, hold)
            Phi = np.concatenate([np.zeros(PhiU.shape[:-3] + (1, n, n)), PhiU[..., index, :, :]], axis=-3)
            G0 = G0U[..., index, :, :]
            G1 = G1U[..., index, :, :]
            w = (G0 @ u[..., :-1, :, None])[..., 0]
            if hold == "linear":
                w = w + (G1 @ u[..., 1:, :, None])[..., 0]
        forcing[..., 1:, :] = w
        if uniform:
            states = propagate(Phi, forcing)
        else:
            states = propagate(np.broadcast_to(Phi, batch + Phi.shape[-3:]), forcing)
    else:
        states = forcing
    outputs = states @ np.swapaxes(C, -1, -2) + u @ np.swapaxes(D, -1, -2)
    return states, outputs


def with_heading(A, B, C, D, theta, state_names, output_names):
    """Add the heading state psi (psi' = r / cos(theta0)) and output.

    Kinematics of the Euler angles for small disturbances about wings-level
    flight (Etkin and Reid, *Dynamics of Flight: Stability and Control*,
    3rd ed., eq. 4.4,8 -- from memory).

    Parameters
    ----------
    A, B, C, D : numpy.ndarray
        Model without psi; states must include ``r``.
    theta : float
        Trim pitch attitude theta0 [rad] in the model's axes.
    state_names, output_names : tuple of str
        Names of the model's states and outputs.

    Returns
    -------
    A, B, C, D, state_names, output_names
        With psi appended as last state and (before ``ny``) as an output.
    """
    n = A.shape[-1]
    r = state_names.index("r")
    A5 = np.zeros(A.shape[:-2] + (n + 1, n + 1))
    A5[..., :n, :n] = A
    A5[..., n, r] = 1.0 / math.cos(theta)
    B5 = np.concatenate([B, np.zeros(B.shape[:-2] + (1, B.shape[-1]))], axis=-2)
    C5 = np.concatenate([C, np.zeros(C.shape[:-1] + (1,))], axis=-1)
    psi_row = np.zeros(C5.shape[:-2] + (1, n + 1))
    psi_row[..., 0, n] = 1.0
    at = output_names.index("ny") if "ny" in output_names else len(output_names)
    C5 = np.concatenate([C5[..., :at, :], psi_row, C5[..., at:, :]], axis=-2)
    D5 = np.concatenate([D[..., :at, :], np.zeros(D.shape[:-2] + (1, D.shape[-1])), D[..., at:, :]], axis=-2)
    names = tuple(output_names[:at]) + ("psi",) + tuple(output_names[at:])
    return A5, B5, C5, D5, tuple(state_names) + ("psi",), names


@dataclass(frozen=True, eq=False)
class Response:
    """A simulated time history.  Unpacks as ``time, inputs, states, outputs``.

    Attributes
    ----------
    time : numpy.ndarray, shape (N,)
        Grid times [s].
    inputs : numpy.ndarray, shape (N, 2)
        Aileron and rudder deflections [rad].
    states : numpy.ndarray, shape (N, n)
        States [rad, rad/s] in the order ``state_names``.
    outputs : numpy.ndarray, shape (N, m)
        Outputs [rad, rad/s, g] in the order ``output_names``.
    state_names, input_names, output_names : tuple of str
    label : str
        Name of the case (aircraft and condition) for legends.
    description : str
        The input and initial disturbance in words.
    hold : str
        ``"zero"`` or ``"linear"``: how the input was held between samples.
    input_end : float
        Time of the last control change [s] (0 for a free response).
    """

    time: np.ndarray
    inputs: np.ndarray
    states: np.ndarray
    outputs: np.ndarray
    state_names: tuple
    input_names: tuple = ("aileron", "rudder")
    output_names: tuple = ()
    label: str = ""
    description: str = ""
    hold: str = "zero"
    input_end: float = 0.0

    def __post_init__(self):
        from latdyn.inputs import freeze_arrays

        freeze_arrays(self, ("time", "inputs", "states", "outputs"))

    def __iter__(self):
        return iter((self.time, self.inputs, self.states, self.outputs))

    def signal(self, name) -> np.ndarray:
        """One input, state or output by name [SI units].

        Examples
        --------
        >>> r = Response([0.0, 1.0], [[0, 0], [0, 0]], [[1.0], [2.0]], [[1.0], [2.0]], ("beta",), output_names=("beta",))
        >>> r.signal("beta").tolist()
        [1.0, 2.0]
        """
        if name in self.output_names:
            return self.outputs[:, self.output_names.index(name)]
        if name in self.state_names:
            return self.states[:, self.state_names.index(name)]
        if name in self.input_names:
            return self.inputs[:, self.input_names.index(name)]
        raise KeyError(f"no signal {name!r} in the response")

    def __repr__(self):
        label = f" {self.label}" if self.label else ""
        what = f": {self.description}" if self.description else ""
        end = float(self.time[-1]) if len(self.time) else 0.0
        return (f"<Response{label}{what}; t = 0 to {end:.4g} s, {len(self.time)} samples; "
                f"states {', '.join(self.state_names)}>")

    def _repr_html_(self):
        from latdyn.report.notebook import response_html

        return response_html(self)

    def to_pandas(self):
        """The time history as a DataFrame indexed by time [s] (needs pandas).

        Columns are those of ``latdyn respond --csv`` (display units: deg,
        deg/s, g); see :func:`latdyn.frames.response_frame`.
        """
        from latdyn.frames import response_frame

        return response_frame(self)


def simulate(model, history, initial=None, hold="zero", label="") -> Response:
    """Time response of a lateral model to an input history.

    Parameters
    ----------
    model : latdyn.model.LateralModel
        Anything with ``A, B, C, D, state_names, output_names, theta``; the
        heading psi is added (psi' = r / cos(theta0)) when the model does not
        have it.
    history : latdyn.inputs.InputHistory
        Time grid [s] and deflections [rad].
    initial : latdyn.inputs.InitialDisturbance or array_like, optional
        Initial state [rad, rad/s]; default trim.
    hold : {"zero", "linear"}
        Input between samples; the zero-order hold reproduces step-wise
        inputs exactly.
    label : str
        Name of the case for legends.

    Returns
    -------
    Response
    """
    A, B, C, D = (np.asarray(m, dtype=float) for m in (model.A, model.B, model.C, model.D))
    state_names = tuple(model.state_names)
    output_names = tuple(model.output_names)
    if "psi" not in state_names:
        A, B, C, D, state_names, output_names = with_heading(
            A, B, C, D, float(model.theta), state_names, output_names)
    if initial is None:
        x0 = None
    elif hasattr(initial, "vector"):
        x0 = initial.vector(state_names)
    else:
        x0 = np.asarray(initial, dtype=float)
    inputs = history.values
    with np.errstate(over="ignore", invalid="ignore"):  # an overflow is found by overflow_time, not warned
        states, outputs = simulate_arrays(A, B, C, D, history.time, inputs, x0, hold)
    description = history.description
    if initial is not None and hasattr(initial, "describe") and not initial.is_zero:
        description = ", ".join(t for t in (description if not history.is_zero else "", initial.describe()) if t)
    return Response(history.time, inputs, states, outputs, state_names, tuple(model.input_names)
                    if hasattr(model, "input_names") else ("aileron", "rudder"),
                    output_names, label, description, hold, history.end_time)


#: Largest magnitude a response's states and outputs may reach [SI units]: far beyond any motion
#: (the linear model holds to a few tenths of a radian) and far short of the floating-point range,
#: so that every unit conversion and plot of the values stays finite (our choice).
LARGEST_VALUE = 1e100


def overflow_time(response):
    """The first time [s] at which a response is beyond :data:`LARGEST_VALUE` or not a finite number, or None.

    A strongly divergent model (a root doubling the motion every few
    milliseconds) run for tens of seconds grows beyond the largest floating
    point number: the caller refuses such a run, or shows the part before
    (:func:`finite_part`), instead of showing NaN.

    >>> import numpy as np
    >>> r = Response(np.array([0.0, 1.0, 2.0]), np.zeros((3, 2)), np.zeros((3, 1)),
    ...              np.array([[0.0], [np.inf], [np.nan]]), ("beta",), ("aileron", "rudder"), ("beta",))
    >>> overflow_time(r)
    1.0
    """
    with np.errstate(invalid="ignore"):
        bad = ~((np.abs(response.states) <= LARGEST_VALUE).all(axis=1)
                & (np.abs(response.outputs) <= LARGEST_VALUE).all(axis=1))
    return float(response.time[np.argmax(bad)]) if bad.any() else None


def finite_part(response):
    """The part of a response that is still a finite number, and the time it stops being one.

    A strongly divergent root (doubling the motion every few milliseconds)
    grows beyond :data:`LARGEST_VALUE`, then the floating-point range, within
    the run; what follows is not a motion.  Read-outs and figures use the part
    before (:func:`overflow_time`).

    Returns
    -------
    (Response, float or None)
        The response cut before the first non-finite sample (at least its
        first sample), and that time [s]; the response itself and None when
        every sample is finite.

    Examples
    --------
    >>> import numpy as np
    >>> r = Response(np.array([0.0, 1.0, 2.0]), np.zeros((3, 2)), np.zeros((3, 1)),
    ...              np.array([[0.0], [0.5], [np.inf]]), ("beta",), ("aileron", "rudder"), ("beta",))
    >>> part, at = finite_part(r)
    >>> part.time.tolist(), at
    ([0.0, 1.0], 2.0)
    """
    at = overflow_time(response)
    if at is None:
        return response, None
    time = np.asarray(response.time)
    kept = max(int(np.searchsorted(time, at)), 1)
    return replace(response, time=time[:kept], inputs=np.asarray(response.inputs)[:kept],
                   states=np.asarray(response.states)[:kept], outputs=np.asarray(response.outputs)[:kept],
                   input_end=min(response.input_end, float(time[kept - 1]))), at


#: Largest sideslip and bank a standard response is sized to stay within [rad]: 8 deg and 30 deg
#: (our choice, well inside the small-disturbance range).
STANDARD_LIMITS = {"beta": math.radians(8.0), "phi": math.radians(30.0)}


def sized_amplitude(models, unit, limits=None, largest=5.0) -> float:
    """The input amplitude that keeps every model's response within ``limits``.

    Sizing (our choice): the largest amplitude in 0.5 deg steps, at least
    0.5 deg and at most ``largest``, for which every signal of ``limits``
    stays within its limit in every model -- found from the response to
    ``unit``, the input at 1 deg, scaled (exact because the models are
    linear; an augmented model's actuator rate limits are not applied here).

    Parameters
    ----------
    models : sequence of latdyn.model.LateralModel
    unit : latdyn.inputs.InputHistory
        The input with an amplitude of 1 deg.
    limits : dict, optional
        Signal -> largest magnitude [rad]; default :data:`STANDARD_LIMITS`.
    largest : float
        Largest amplitude [deg].

    Returns
    -------
    float
        Amplitude [rad].

    Examples
    --------
    A first-order lag from the rudder to sideslip, 2 deg of sideslip per degree
    of rudder: 4 deg of rudder keeps beta within 8 deg.

    >>> from latdyn.inputs import make_input, time_grid
    >>> from latdyn.model import LateralModel
    >>> A = np.diag([-1.0, -2.0, -2.0, -3.0]); B = np.zeros((4, 2)); B[0, 1] = 2.0
    >>> model = LateralModel(A, B, np.eye(4), np.zeros((4, 2)), ("beta", "p", "r", "phi"),
    ...                      ("aileron", "rudder"), ("beta", "p", "r", "phi"), "body", 50.0,
    ...                      0.0, 0.0, None, "lag")
    >>> time = time_grid(30.0, 0.01, (1.0,))
    >>> round(math.degrees(sized_amplitude([model], make_input("rudder-step", time, math.radians(1.0), 1.0, 1.0))), 6)
    4.0
    """
    return _sized(models, unit, limits, largest)[0]


def _sized(models, unit, limits=None, largest=5.0):
    """(:func:`sized_amplitude` [rad], whether every signal stays within its limit at that amplitude)."""
    ratios = _limit_ratios(models, unit, limits)
    worst = max((float(r.max()) for r in ratios.values()), default=0.0)
    degrees = _half_degrees(worst, largest)
    return math.radians(degrees), worst * degrees <= 1.0 + 1e-12


def _limit_ratios(models, unit, limits=None) -> dict:
    """Signal -> the largest |signal| / limit over the models at each sample of the response to ``unit``."""
    limits = STANDARD_LIMITS if limits is None else limits
    ratios = {}
    for model in models:
        trial = simulate(model, unit)
        for name, limit in limits.items():
            ratio = np.abs(trial.signal(name)) / limit
            ratios[name] = ratio if name not in ratios else np.maximum(ratios[name], ratio)
    return ratios


def _half_degrees(worst, largest) -> float:
    """The largest amplitude in 0.5 deg steps (0.5 deg at least, ``largest`` at most) for which a
    response of ``worst`` times its limit per degree stays within the limit [deg]."""
    if not worst > 0:
        return largest
    return max(0.5, min(largest, math.floor(2.0 / worst) / 2.0))


def size_run(models, kinds, settings, limits=None):
    """A run's settings with the amplitude sized to the small-disturbance range, where it may be.

    When every named input returns to zero (:data:`latdyn.inputs.TRANSIENT_KINDS`)
    the amplitude becomes :func:`sized_amplitude` of the models for those
    inputs on the run's grid, never above the given default; a run with a
    step is left as it is (a held deflection banks the aircraft further the
    longer the run: :func:`size_step_run` sizes its length and amplitude
    together).  Call it only where the user gave no amplitude.

    Parameters
    ----------
    models : sequence of latdyn.model.LateralModel
        The cases run with the one input history.
    kinds : sequence of str
        The run's inputs (kinds of :data:`latdyn.inputs.INPUT_KINDS`; input files are not sized).
    settings : latdyn.inputs.RunSettings
    limits : dict, optional
        Signal -> largest magnitude [rad]; default :data:`STANDARD_LIMITS`.

    Returns
    -------
    settings : latdyn.inputs.RunSettings
    sized : bool
        The amplitude was sized.
    """
    sized, done, _ = _size_run(models, kinds, settings, limits)
    return sized, done


def _size_run(models, kinds, settings, limits):
    """:func:`size_run`'s (settings, sized), and whether the bounds are kept at the amplitude found."""
    from dataclasses import replace

    from latdyn.inputs import TRANSIENT_KINDS, run_inputs

    named = [kind for kind in kinds if kind in TRANSIENT_KINDS]
    if not named or len(named) != len([k for k in kinds if not k.lower().endswith(".csv") and k != "none"]):
        return settings, False, True
    unit = run_inputs(named, (), replace(settings, amplitude=math.radians(1.0)))
    amplitude, within = _sized(models, unit, limits, largest=math.degrees(settings.amplitude))
    return replace(settings, amplitude=amplitude), True, within


#: Roll-mode time constants and Dutch roll periods a step run shows at least after the input
#: starts (:func:`step_window`).
STEP_WINDOW = {"roll_time_constants": 5.0, "dutch_roll_periods": 1.0}


def step_window(modes) -> float:
    """Shortest stretch of a step run after the input starts: the roll mode settled and one
    Dutch roll period shown [s].

    ``max(5 T_R, T_d)``: five roll-mode time constants T_R (a first-order
    mode is then within exp(-5) = 0.7 % of its steady value -- common
    practice takes four to five time constants as settled) and one Dutch
    roll period T_d (one full cycle of the oscillation superimposed on the
    roll -- common practice).  Without a stable real roll root the period of
    a coupled roll-spiral oscillation stands for 5 T_R; without an
    oscillatory Dutch roll a 6 s period is assumed, as in
    :func:`latdyn.inputs.default_inputs`.

    Parameters
    ----------
    modes : latdyn.modes.ModeSet

    Returns
    -------
    float
        [s]

    Examples
    --------
    Roll time constant 0.33 s, Dutch roll period 3.4 s: the Dutch roll period governs.

    >>> from types import SimpleNamespace as Mode
    >>> modes = {"roll_subsidence": Mode(time_constant=0.33), "dutch_roll": Mode(period=3.4)}
    >>> step_window(modes)
    3.4
    """
    roll = modes.get("roll_subsidence")
    coupled = modes.get("roll_spiral")
    dutch = modes.get("dutch_roll")
    if roll is not None and roll.time_constant:
        roll_span = STEP_WINDOW["roll_time_constants"] * roll.time_constant
    else:
        roll_span = coupled.period if coupled is not None and coupled.period else 0.0
    period = dutch.period if dutch is not None and dutch.period else 6.0
    return max(roll_span, STEP_WINDOW["dutch_roll_periods"] * period)


@dataclass(frozen=True)
class RunSizing:
    """How the defaults of a step run were chosen (:func:`size_step_run`).

    Attributes
    ----------
    amplitude_sized : bool
        The amplitude was sized (none was given).
    duration_sized : bool
        The run length was sized (none was given).
    window : float or None
        The shortest run the rule allows: the start of the input plus
        :func:`step_window` of the slowest case [s] (None when the length was given).
    limited_by : str or None
        The signal whose bound ended the run (``"phi"``, ``"beta"``); None when
        the run ends at the window or at the default run length.
    limits : dict
        Signal -> the bound it was sized to [rad].
    within : bool
        Every signal of ``limits`` stays within its bound over the run at the
        sized amplitude (False: even the smallest amplitude, 0.5 deg, passes one).
    """

    amplitude_sized: bool
    duration_sized: bool
    window: float | None = None
    limited_by: str | None = None
    limits: dict = None
    within: bool = True

    def words(self, settings, names=None) -> dict:
        """How the defaults were chosen, in words (for the command line and the report).

        Parameters
        ----------
        settings : latdyn.inputs.RunSettings
            The settings the sizing returned.
        names : dict, optional
            Signal -> its name in the text; default ``|beta|``, ``|phi|``.

        Returns
        -------
        dict
            Setting (``"duration"``, ``"amplitude"``) -> a sentence, for each setting sized.
        """
        limits = self.limits or STANDARD_LIMITS
        names = {name: f"|{name}|" for name in limits} | dict(names or {})
        bounds = " and ".join(f"{names[name]} within {math.degrees(limit):g} deg" for name, limit in limits.items())
        passes = " or ".join(f"{names[name]} passes {math.degrees(limit):g} deg" for name, limit in limits.items())
        sentences = {}
        if self.duration_sized:
            if self.limited_by is not None:
                ended = f"ends as {names[self.limited_by]} reaches its bound"
            elif settings.duration <= self.window + 1e-9:
                ended = "is the shortest allowed"
            else:
                ended = "is the default run: the bounds are not reached"
            sentences["duration"] = (f"run length {settings.duration:g} s, sized to the bank change: a step run "
                                     f"ends before {passes}, but not before the roll mode has settled and one "
                                     f"Dutch roll period has passed (by {self.window:g} s); this one {ended}")
        if self.amplitude_sized and self.within:
            sentences["amplitude"] = (f"amplitude {math.degrees(settings.amplitude):g} deg, sized to keep "
                                      f"{bounds} over the run in every case shown")
        elif self.amplitude_sized:
            sentences["amplitude"] = (f"amplitude {math.degrees(settings.amplitude):g} deg, the smallest the "
                                      f"sizing gives; even so {passes} over the run")
        return sentences


def size_step_run(models, modes, kinds, settings, amplitude_given=False, duration_given=False,
                  limits=None):
    """A step run's settings: the length sized to the bank change, the amplitude to the bounds.

    Rule (our choice; the parts marked are common practice): a held
    deflection banks the aircraft further the longer the run, so the
    default run of a step (any kind of :data:`latdyn.inputs.HELD_KINDS` in
    the run) ends at the last sample before any signal of ``limits`` first
    passes its bound (|phi| 30 deg, |beta| 8 deg by default), but not before
    the input start plus :func:`step_window` of every case (the roll mode
    settled and one Dutch roll period shown), rounded up to 0.1 s, nor after
    the default run length of ``settings``; the end is rounded down to 0.1 s
    (or to the step when it is longer).  The default amplitude is the
    largest in 0.5 deg steps (at most the given default, at least 0.5 deg)
    that keeps every signal of ``limits`` within its bound over the window
    (over the whole run when its length was given), so that the sized run
    ends within the bounds.  Both come from one simulation of each model at
    1 deg, scaled (exact: the models are linear; actuator rate limits are not
    applied here).  What is given is kept.

    Parameters
    ----------
    models : sequence of latdyn.model.LateralModel
        The cases run with the one input history.
    modes : sequence of latdyn.modes.ModeSet
        Their modes, in the same order.
    kinds : sequence of str
        The run's inputs (kinds of :data:`latdyn.inputs.INPUT_KINDS`); a run
        with an input file or without a step is returned as it is.
    settings : latdyn.inputs.RunSettings
        The run with its defaults; its duration is the longest a sized run may last.
    amplitude_given, duration_given : bool
        The user gave the amplitude, the run length.
    limits : dict, optional
        Signal -> largest magnitude [rad]; default :data:`STANDARD_LIMITS`.

    Returns
    -------
    settings : latdyn.inputs.RunSettings
    sizing : RunSizing
    """
    from dataclasses import replace

    from latdyn.inputs import HELD_KINDS, INPUT_KINDS, run_inputs

    limits = STANDARD_LIMITS if limits is None else dict(limits)
    named = [kind for kind in kinds if kind != "none"]
    untouched = RunSizing(False, False, limits=limits)
    if (not any(kind in HELD_KINDS for kind in named) or not all(kind in INPUT_KINDS for kind in named)
            or (amplitude_given and duration_given)):
        return settings, untouched
    unit = run_inputs(named, (), replace(settings, amplitude=math.radians(1.0)))
    ratios = _limit_ratios(models, unit, limits)
    running = {name: np.maximum.accumulate(ratio) for name, ratio in ratios.items()}
    worst = np.max(np.stack(list(running.values())), axis=0)
    time = unit.time
    quantum = settings.step * max(1, math.ceil(0.1 / settings.step - 1e-9))
    window = None
    horizon = settings.duration
    if not duration_given:
        shortest = max(settings.start + max(step_window(m) for m in modes), unit.end_time)
        window = min(settings.duration, quantum * math.ceil(shortest / quantum - 1e-9))
        horizon = window
    amplitude, within = settings.amplitude, True
    if not amplitude_given:
        peak = float(worst[time <= horizon * (1 + 1e-12)][-1])
        degrees = _half_degrees(peak, math.degrees(settings.amplitude))
        amplitude, within = math.radians(degrees), peak * degrees <= 1.0 + 1e-12
    duration, limited_by = settings.duration, None
    if not duration_given:
        scale = math.degrees(amplitude)
        outside = np.flatnonzero(worst * scale > 1.0 + 1e-12)
        if outside.size:
            first = int(outside[0])
            last = quantum * math.floor(float(time[first - 1]) / quantum + 1e-9)
            duration = max(window, last)
            if duration < settings.duration:
                limited_by = max(running, key=lambda name: running[name][first]) if last >= window else None
    sizing = RunSizing(not amplitude_given, not duration_given, window, limited_by, limits, within)
    return replace(settings, amplitude=amplitude, duration=duration), sizing


def size_defaults(models, modes, kinds, settings, amplitude_given=False, duration_given=False,
                  limits=None):
    """The defaults of a run sized: a step run by :func:`size_step_run`, a run of inputs that
    return to zero by :func:`size_run` (its amplitude only); what is given is kept.

    Parameters
    ----------
    models, modes, kinds, settings, amplitude_given, duration_given, limits
        As for :func:`size_step_run`.

    Returns
    -------
    settings : latdyn.inputs.RunSettings
    sizing : RunSizing
    """
    from latdyn.inputs import HELD_KINDS

    limits = STANDARD_LIMITS if limits is None else dict(limits)
    if any(kind in HELD_KINDS for kind in kinds):
        return size_step_run(models, modes, kinds, settings, amplitude_given, duration_given, limits)
    sized, within = False, True
    if not amplitude_given:
        settings, sized, within = _size_run(models, kinds, settings, limits)
    return settings, RunSizing(sized, False, limits=limits, within=within)


@dataclass(frozen=True)
class StandardResponse:
    """A standard response sized for the aircraft; unpacks as (response, readouts).

    Attributes
    ----------
    kind : str
        ``"rudder-doublet"`` or ``"aileron-step"`` (any kind of
        :data:`latdyn.inputs.INPUT_KINDS`).
    response : Response
    readouts : latdyn.readouts.ResponseReadouts
    amplitude : float
        Control deflection used [rad].
    limits : dict
        Signal -> the largest magnitude it was sized to stay within [rad].
    sizing : RunSizing or None
        How the defaults were chosen (:meth:`RunSizing.words` with ``settings``).
    settings : latdyn.inputs.RunSettings or None
        The run's settings.
    """

    kind: str
    response: Response
    readouts: object
    amplitude: float
    limits: dict
    sizing: RunSizing | None = None
    settings: object = None

    def __iter__(self):
        return iter((self.response, self.readouts))


def standard_response(model, modes, kind, label="", limits=None) -> StandardResponse:
    """The standard rudder-doublet or aileron-step response of a condition, with its read-outs.

    Sized for the aircraft as ``latdyn respond`` sizes a run with no amplitude
    or length given (:func:`size_defaults`): the input of
    :func:`latdyn.inputs.default_inputs`, its amplitude lowered in 0.5 deg
    steps (5 deg at most, 0.5 deg at least) so that every signal of
    ``limits`` stays within its limit; a step's run length sized to the bank
    change (:func:`size_step_run`).

    Parameters
    ----------
    model : latdyn.model.LateralModel
    modes : latdyn.modes.ModeSet
    kind : str
        An input kind of :data:`latdyn.inputs.INPUT_KINDS`.
    label : str
        Name of the case.
    limits : dict, optional
        Signal -> largest magnitude [rad]; default :data:`STANDARD_LIMITS`.

    Returns
    -------
    StandardResponse
    """
    from latdyn.inputs import default_inputs, run_inputs, run_settings
    from latdyn.readouts import read_response

    limits = STANDARD_LIMITS if limits is None else limits
    settings, sizing = size_defaults([model], [modes], [kind], run_settings(default_inputs(modes)),
                                     limits=limits)
    response = simulate(model, run_inputs([kind], (), settings), label=label)
    return StandardResponse(kind, finite_part(response)[0], read_response(response), settings.amplitude,
                            dict(limits), sizing, settings)


def replayed_response(model, standard, label="") -> StandardResponse:
    """Another model's response (a variant's) to the very input of a standard response.

    The time grid and the deflections are those of ``standard`` (not sized
    again), so that the two responses can be laid over each other and
    compared.

    Parameters
    ----------
    model : latdyn.model.LateralModel
    standard : StandardResponse
    label : str
        Name of the case.

    Returns
    -------
    StandardResponse
    """
    from latdyn.inputs import InputHistory
    from latdyn.readouts import read_response

    given = standard.response
    history = InputHistory(given.time, given.signal("aileron"), given.signal("rudder"), given.description)
    response = simulate(model, history, label=label)
    return StandardResponse(standard.kind, finite_part(response)[0], read_response(response),
                            standard.amplitude, dict(standard.limits), standard.sizing, standard.settings)


def display_columns(response) -> dict:
    """The response in display units, keyed by the CSV column names.

    Returns
    -------
    dict
        ``{"time": [s], "aileron_deg": [deg], ..., "ny_g": [g]}`` in the
        order of :data:`CSV_COLUMNS`; a signal the model lacks is NaN.
    """
    columns = {"time": np.asarray(response.time)}
    for name, (column, factor) in _DISPLAY.items():
        try:
            columns[column] = response.signal(name) * factor
        except KeyError:
            columns[column] = np.full(response.time.shape, np.nan)
    return {name: columns[name] for name in CSV_COLUMNS}


def csv_text(response) -> str:
    """The response as CSV text with the columns :data:`CSV_COLUMNS` (display units)."""
    columns = display_columns(response)
    table = np.column_stack(list(columns.values()))
    lines = [",".join(CSV_COLUMNS)]
    lines += [",".join(f"{value:.10g}" for value in row) for row in table]
    return "\n".join(lines) + "\n"


def write_csv(path, response) -> None:
    """Write a response as CSV with the columns :data:`CSV_COLUMNS` (atomically).

    Parameters
    ----------
    path : str or os.PathLike
        Output file; written to a temporary file in the same folder first,
        then renamed, so no half-written file is left behind.
    response : Response
    """
    from latdyn.output_files import atomic_output

    with atomic_output(path, text=True) as handle:
        handle.write(csv_text(response))
