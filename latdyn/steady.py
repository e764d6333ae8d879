"""Steady straight flight with sideslip: sideslips, crosswind capability, engine-out control.

The same derivatives that give the modes answer the static questions of a
lateral-directional review.  In steady straight flight the rates are zero
and the side-force, rolling-moment and yawing-moment balances are three
linear equations in sideslip beta, aileron da, rudder dr and the bank phi
(through the weight component, W cos(gamma) sin(phi))::

    qS (Cy_beta beta + Cy_da da + Cy_dr dr) + W cos(gamma) sin(phi) + Y_T = 0
    qSb (Cl_beta beta + Cl_da da + Cl_dr dr)                          + L_T = 0
    qSb (Cn_beta beta + Cn_da da + Cn_dr dr)                          + N_T = 0

with C_L = W cos(gamma) / (q S) the weight component carried by lift, so
that the side-force row reads Cy_beta beta + ... + C_L sin(phi) = 0, and
(Y_T, L_T, N_T) the asymmetric thrust (zero with all engines running).
Inside, the rows are divided by m, Ixx and Izz and the moment rows are
primed (:func:`latdyn.model.prime`), exactly the rows of the state-space
model with p = r = 0, so files with dimensional derivatives are handled
alike: with phi free, the steady state of the A and B matrices (for
stability-axis equations, where theta0 = gamma0) is this balance.

Sources: B. Etkin and L. D. Reid, *Dynamics of Flight: Stability and
Control*, 3rd ed., Wiley, 1996, section 4.9 (the equations of motion whose
steady state this is); the closed forms for Cl_dr = Cn_da = Cy_dr = 0
(rudder per sideslip -Cn_beta/Cn_dr, aileron per sideslip -Cl_beta/Cl_da,
bank per sideslip -Cy_beta/C_L) are those of the steady-sideslip and
crosswind-landing discussions of R. C. Nelson, *Flight Stability and
Automatic Control*, 2nd ed., McGraw-Hill, 1998, chapter 2 (section number
from memory).  Criteria: MIL-F-8785C 3.3.6 and 3.3.7.1, 14 CFR 23.149,
25.149, 23.177, 25.177, 23.233, 25.233, 25.237 (see
``latdyn/criteria/steady/steady-checks.toml`` for the paragraphs and the
confidence of each number).

The engine-out results hold the condition's non-dimensional derivatives
over the speed range (only the dynamic pressure changes): every result
says so (:data:`HELD_NOTE`).  Results are guidance only
(:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from latdyn.units import KNOT as _KNOT
from latdyn.units import STANDARD_GRAVITY

__all__ = [
    "HELD_NOTE", "LINEAR_NOTE", "CONTROL_NAMES", "DEFAULT_ROLL_FRACTION", "ENGINE_OUT_BANK",
    "balance_matrix", "solve_balance", "sideslip_gradients", "sideslip_limit",
    "crosswind_component", "thrust_moments", "engine_out_solution", "minimum_control_speed",
    "SteadyBalance", "SideslipResult", "CrosswindResult", "EngineOutCase", "EngineOutResult",
    "SteadyResult", "steady_balance", "steady_sideslip", "crosswind_capability", "engine_out",
    "steady", "control_travel", "primed_forcing", "static_derivatives",
]

#: Said beside every engine-out result.
HELD_NOTE = ("the condition's non-dimensional derivatives are held over the speed range "
             "(only the dynamic pressure changes)")
#: Said beside results at large sideslip.
LINEAR_NOTE = "linear derivatives: large sideslip angles are outside their usual range of validity"
#: Control names, in the order of the limiting-control codes.
CONTROL_NAMES = ("rudder", "aileron")
#: Fraction of the roll control that a crosswind sideslip may use (MIL-F-8785C 3.3.7.1, S).
DEFAULT_ROLL_FRACTION = 0.75
#: Bank toward the operating engine(s) allowed by 14 CFR 23.149(a) and 25.149(b) [rad].
ENGINE_OUT_BANK = math.radians(5.0)


# ============================================================ array layer
def balance_matrix(derivatives, speed, gravity_term):
    """The steady-flight balance as a matrix over (beta, aileron, rudder, sin phi).

    Rows: side force per unit mass [m/s^2], primed rolling and yawing
    moments per inertia [1/s^2]::

        [V Y_v    Y_da    Y_dr    g cos(gamma)]
        [L'_beta  L'_da   L'_dr   0           ]
        [N'_beta  N'_da   N'_dr   0           ]

    (Etkin & Reid, 3rd ed., 1996, section 4.9, with p = r = 0.)  With
    non-dimensional derivatives V Y_v = q S Cy_beta / m and g cos(gamma) =
    q S C_L / m, C_L = W cos(gamma) / (q S).

    Parameters
    ----------
    derivatives : mapping
        Primed dimensional derivatives (:data:`latdyn.model.DIMENSIONAL_NAMES`), SI.
    speed : float or array
        True airspeed V [m/s].
    gravity_term : float or array
        g cos(gamma) [m/s^2].

    Returns
    -------
    numpy.ndarray
        (..., 3, 4).

    Examples
    --------
    >>> M = balance_matrix({"Y_v": -0.2, "L_beta": -3.0, "N_beta": 2.0, "L_da": 5.0,
    ...                     "N_dr": -1.5}, 50.0, 9.8)
    >>> M.tolist()
    [[-10.0, 0.0, 0.0, 9.8], [-3.0, 5.0, 0.0, 0.0], [2.0, 0.0, -1.5, 0.0]]
    """
    d = {k: np.asarray(derivatives.get(k, 0.0), dtype=float)
         for k in ("Y_v", "Y_da", "Y_dr", "L_beta", "L_da", "L_dr", "N_beta", "N_da", "N_dr")}
    V = np.asarray(speed, dtype=float)
    g = np.asarray(gravity_term, dtype=float)
    shape = np.broadcast_shapes(V.shape, g.shape, *(v.shape for v in d.values()))
    M = np.zeros(shape + (3, 4))
    M[..., 0, 0] = V * d["Y_v"]
    M[..., 0, 1] = d["Y_da"]
    M[..., 0, 2] = d["Y_dr"]
    M[..., 0, 3] = g
    M[..., 1, 0] = d["L_beta"]
    M[..., 1, 1] = d["L_da"]
    M[..., 1, 2] = d["L_dr"]
    M[..., 2, 0] = d["N_beta"]
    M[..., 2, 1] = d["N_da"]
    M[..., 2, 2] = d["N_dr"]
    return M


def solve_balance(matrix, fixed, value, forcing=None):
    """Solve the balance for the three unknowns other than the one held.

    ``matrix @ (beta, aileron, rudder, sin phi) + forcing = 0``.

    Parameters
    ----------
    matrix : array (..., 3, 4)
        From :func:`balance_matrix`.
    fixed : int
        Index of the unknown that is given: 0 sideslip, 3 sin(bank).
    value : float or array
        Its value [rad for sideslip; the sine for the bank].
    forcing : array (..., 3), optional
        Asymmetric thrust per unit mass / inertia (primed), default zero.

    Returns
    -------
    numpy.ndarray
        (..., 4): beta [rad], aileron [rad], rudder [rad], sin(phi); NaN
        where the controls cannot balance the other terms (a singular
        system, for example no rudder power).

    Examples
    --------
    >>> M = balance_matrix({"Y_v": -0.2, "L_beta": -3.0, "N_beta": 2.0, "L_da": 5.0,
    ...                     "N_dr": -1.5}, 50.0, 9.8)
    >>> [round(float(v), 6) for v in solve_balance(M, 0, 0.1)]
    [0.1, 0.06, 0.133333, 0.102041]
    """
    M = np.asarray(matrix, dtype=float)
    free = [i for i in range(4) if i != fixed]
    square = M[..., :, free]
    rhs = -M[..., :, fixed] * np.asarray(value, dtype=float)[..., None]
    if forcing is not None:
        rhs = rhs - np.asarray(forcing, dtype=float)
    shape = np.broadcast_shapes(square.shape[:-2], rhs.shape[:-1])
    square = np.broadcast_to(square, shape + (3, 3))
    rhs = np.broadcast_to(rhs, shape + (3,))
    scale = np.max(np.abs(square), axis=(-2, -1))
    det = np.linalg.det(square)
    singular = ~(np.abs(det) > 1e-12 * np.where(scale > 0, scale, 1.0) ** 3)
    safe = np.where(singular[..., None, None], np.eye(3), square)
    solution = np.linalg.solve(safe, rhs[..., None])[..., 0]
    solution = np.where(singular[..., None], np.nan, solution)
    out = np.empty(shape + (4,))
    out[..., free] = solution
    out[..., fixed] = np.broadcast_to(np.asarray(value, dtype=float), shape)
    return out


def sideslip_gradients(matrix):
    """Aileron, rudder and bank per unit sideslip in steady straight flight.

    The linear solution of the balance at small bank (sin phi ~ phi).

    Returns
    -------
    numpy.ndarray
        (..., 3): d(aileron)/d(beta), d(rudder)/d(beta), d(phi)/d(beta)
        [rad per rad, signed].

    Examples
    --------
    Closed forms for Cl_dr = Cn_da = Y_dr = Y_da = 0: -L_beta/L_da,
    -N_beta/N_dr, -V Y_v/(g cos gamma):

    >>> M = balance_matrix({"Y_v": -0.2, "L_beta": -3.0, "N_beta": 2.0, "L_da": 5.0,
    ...                     "N_dr": -1.5}, 50.0, 9.8)
    >>> [round(float(v), 6) for v in sideslip_gradients(M)]
    [0.6, 1.333333, 1.020408]
    """
    return solve_balance(matrix, 0, 1.0)[..., 1:]


def sideslip_limit(gradients, aileron_max, rudder_max, roll_fraction=1.0):
    """Largest steady sideslip within full rudder and a fraction of the aileron travel.

    beta_max = min(rudder_max / |d dr/d beta|, f aileron_max / |d da/d beta|).

    Parameters
    ----------
    gradients : array (..., 3)
        From :func:`sideslip_gradients`.
    aileron_max, rudder_max : float or array
        Travel each way [rad]; None or NaN: that control is not limited.
    roll_fraction : float
        Fraction f of the aileron travel that may be used [-].

    Returns
    -------
    beta_max : numpy.ndarray
        [rad], positive; inf when neither control is limited.
    limited_by : numpy.ndarray of int
        0 rudder, 1 aileron (:data:`CONTROL_NAMES`), -1 neither.

    Examples
    --------
    >>> beta, which = sideslip_limit([0.6, 1.333333, 1.0], 0.3, 0.4363, 0.75)
    >>> round(float(beta), 4), int(which)
    (0.3272, 0)
    """
    g = np.asarray(gradients, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        rudder = np.asarray(np.nan if rudder_max is None else rudder_max, dtype=float) / np.abs(g[..., 1])
        aileron = (roll_fraction * np.asarray(np.nan if aileron_max is None else aileron_max,
                                              dtype=float) / np.abs(g[..., 0]))
    rudder = np.where(np.isnan(rudder), np.inf, rudder)
    aileron = np.where(np.isnan(aileron), np.inf, aileron)
    beta = np.minimum(rudder, aileron)
    which = np.where(np.isinf(beta), -1, np.where(aileron < rudder, 1, 0))
    return beta, which


def crosswind_component(beta, speed):
    """90 deg crosswind component held by a wing-low sideslip: V_cw = V sin(beta) [m/s].

    beta = arcsin(V_cw / V) (the crab angle of a straight track across
    a wind at right angles to it; common practice); beta at or above 90 deg
    gives V.

    Examples
    --------
    >>> round(float(crosswind_component(math.radians(30.0), 60.0)), 9)
    30.0
    """
    return np.asarray(speed, dtype=float) * np.sin(np.minimum(np.asarray(beta, dtype=float), np.pi / 2))


def thrust_moments(positions, thrusts, failed, failed_drag):
    """Yawing moment of asymmetric thrust about the centre of gravity, body axes [N m].

    N_T = -sum over the operating engines of y_i T_i + y_f D_f, with y
    positive to the right wing and N positive nose right (a thrust T along
    +x at y gives the moment -y T about z; the failed engine's drag D acts
    along -x).  Thrust lines are taken through the c.g. height (no rolling
    moment).  Common practice.

    Parameters
    ----------
    positions : array (..., n)
        Lateral positions y_i [m] (the engines along the last axis).
    thrusts : array (..., n)
        Thrust of every engine [N].
    failed : int
        Index of the failed engine.
    failed_drag : float or array
        Its drag [N].

    Examples
    --------
    Right engine (y = 3 m) failed, left engine 10 kN, 500 N drag: nose right.

    >>> float(thrust_moments([-3.0, 3.0], [10000.0, 10000.0], 1, 500.0))
    31500.0
    """
    y = np.asarray(positions, dtype=float)
    T = np.array(thrusts, dtype=float)
    operating = np.ones(y.shape[-1], dtype=bool)
    operating[failed] = False
    return -np.sum(np.where(operating, y * T, 0.0), axis=-1) + y[..., failed] * failed_drag


def primed_forcing(yawing_moment_body, angle, Ixx, Izz, Ixz):
    """Primed forcing rows (..., 3) of a body-axis yawing moment N_b [N m].

    The body moment (0, N_b) seen in axes rotated by ``angle`` about y (alpha
    for stability-axis derivatives, 0 for body axes): L = sin(angle) N_b,
    N = cos(angle) N_b; primed with the inertias of those axes,
    L' = (L/Ixx + (Ixz/Ixx) N/Izz) / (1 - Ixz^2/(Ixx Izz)) and likewise N'
    (Etkin & Reid, 3rd ed., 1996, section 4.9).  Broadcasts over every argument.

    Examples
    --------
    >>> primed_forcing(1000.0, 0.0, 2000.0, 5000.0, 0.0).tolist()
    [0.0, 0.0, 0.2]
    """
    N_b = np.asarray(yawing_moment_body, dtype=float)
    angle, Ixx, Izz, Ixz = (np.asarray(v, dtype=float) for v in (angle, Ixx, Izz, Ixz))
    L, N = np.sin(angle) * N_b, np.cos(angle) * N_b
    gain = 1.0 / (1.0 - Ixz**2 / (Ixx * Izz))
    rolling = gain * (L / Ixx + (Ixz / Ixx) * N / Izz)
    yawing = gain * (N / Izz + (Ixz / Izz) * L / Ixx)
    rolling, yawing = np.broadcast_arrays(rolling, yawing)
    return np.stack([np.zeros_like(rolling), rolling, yawing], axis=-1)


def static_derivatives(values, primed, derivatives, alpha, inertia):
    """Static directional and lateral derivatives in stability axes, over a batch.

    Non-dimensional files: (Cn_beta, Cl_beta) [1/rad], rotated from body axes
    by alpha (:func:`latdyn.model.rotate_coefficients`).  Dimensional files:
    the unprimed (N_beta, L_beta) [1/s^2], L = L' - (Ixz/Ixx) N' and
    N = N' - (Ixz/Izz) L' (the inverse of :func:`latdyn.model.prime`) where the
    inertias are known, the primed values otherwise: each has the sign of its
    coefficient.

    Parameters
    ----------
    values : mapping
        Inputs as given (the coefficients of a non-dimensional file) [SI].
    primed : mapping
        Primed dimensional derivatives in the derivatives' axes.
    derivatives : NondimensionalDerivatives or DimensionalDerivatives
        For the kind of file and its axes.
    alpha : float or array
        [rad].
    inertia : array (..., 3) or None
        (Ixx, Izz, Ixz) in the derivatives' axes [kg m^2].

    Returns
    -------
    (directional, lateral) : arrays
    """
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import rotate_coefficients, rotate_inertia, rotate_primed

    if isinstance(derivatives, NondimensionalDerivatives):
        coefficients = {k: values[k] for k in ("Cy_beta", "Cl_beta", "Cn_beta")}
        if derivatives.axes == "body":
            coefficients = rotate_coefficients(coefficients, alpha)
        return np.asarray(coefficients["Cn_beta"], float), np.asarray(coefficients["Cl_beta"], float)
    stab = primed if derivatives.axes == "stability" else rotate_primed(primed, alpha)
    L, N = np.asarray(stab["L_beta"], float), np.asarray(stab["N_beta"], float)
    if inertia is not None:
        Ixx, Izz, Ixz = (np.asarray(inertia, float)[..., k] for k in range(3))
        if derivatives.axes != "stability":
            Ixx, Izz, Ixz = rotate_inertia(Ixx, Izz, Ixz, alpha)
        L, N = L - (Ixz / Ixx) * N, N - (Ixz / Izz) * L
    return N, L


def engine_out_solution(matrix, reference_speed, speeds, forcing, sin_bank):
    """Sideslip, aileron and rudder of steady straight flight with asymmetric thrust.

    The force and moment derivatives scale with the dynamic pressure, so the
    first three columns of the balance at speed V are those at the
    reference speed times (V / V_ref)^2 (the non-dimensional derivatives
    are held); the weight term is not scaled.

    Parameters
    ----------
    matrix : array (3, 4)
        Balance at the reference speed.
    reference_speed : float
        [m/s].
    speeds : array (n,)
        True airspeeds [m/s] (same density).
    forcing : array (n, 3)
        Primed thrust forcing per mass / inertia at each speed.
    sin_bank : float
        Sine of the bank angle held.

    Returns
    -------
    numpy.ndarray
        (n, 4): beta, aileron, rudder [rad], sin(phi).
    """
    V = np.asarray(speeds, dtype=float)
    M = np.array(np.broadcast_to(matrix, V.shape + (3, 4)), dtype=float)
    M[..., :3] *= ((V / reference_speed) ** 2)[..., None, None]
    return solve_balance(M, 3, np.full(V.shape, sin_bank), forcing)


def minimum_control_speed(speeds, ratio):
    """Highest speed at which a control reaches full travel, by root-finding on a grid.

    Parameters
    ----------
    speeds : array (n,)
        Increasing airspeeds [m/s].
    ratio : callable
        ratio(V) -> array (2,): |rudder| / rudder travel and |aileron| /
        aileron travel needed at V (NaN where a control has no travel).

    Returns
    -------
    speed : float or None
        The minimum control speed [m/s]; None when no control runs out in
        the range or one is out at its top.
    limited_by : int
        0 rudder, 1 aileron, -1 none.
    state : str
        "found", "below" (enough control over the whole range) or "above"
        (a control is out of travel at the top of the range).

    Examples
    --------
    >>> v, which, state = minimum_control_speed(np.linspace(10.0, 100.0, 50),
    ...                                         lambda V: np.array([(40.0 / V) ** 2, np.nan]))
    >>> round(v, 9), which, state
    (40.0, 0, 'found')
    """
    from scipy.optimize import brentq

    V = np.asarray(speeds, dtype=float)
    values = np.array([ratio(v) for v in V])
    worst = np.nanmax(np.where(np.isnan(values), -np.inf, values), axis=1)
    over = worst >= 1.0
    if over[-1]:
        return None, int(np.nanargmax(values[-1])), "above"
    if not over.any():
        return None, -1, "below"
    last = int(np.nonzero(over)[0][-1])

    def excess(v):
        r = np.asarray(ratio(v), dtype=float)
        return float(np.max(np.where(np.isnan(r), -np.inf, r))) - 1.0

    speed = brentq(excess, V[last], V[last + 1], xtol=1e-9, rtol=1e-12)
    r = np.asarray(ratio(speed), dtype=float)
    return float(speed), int(np.nanargmax(np.where(np.isnan(r), -np.inf, r))), "found"


# ============================================================ dataclass layer
@dataclass(frozen=True)
class SteadyBalance:
    """The steady-flight balance of one condition.

    Attributes
    ----------
    matrix : numpy.ndarray
        (3, 4), :func:`balance_matrix`.
    speed, density : float
        True airspeed [m/s] and density [kg/m^3] of the condition.
    gamma, alpha : float
        Flight-path angle and trim angle of attack [rad].
    axes : str
        Axes of the derivatives (and of the moment rows).
    inertia : tuple of float or None
        (Ixx, Izz, Ixz) in those axes [kg m^2]; None when the file has none.
    lift_coefficient : float or None
        C_L = W cos(gamma) / (q S) (non-dimensional files with a mass).
    static : dict
        The static-stability derivatives in stability axes: Cy_beta,
        Cl_beta, Cn_beta (non-dimensional files) or Y_beta [m/s^2], L_beta,
        N_beta [1/s^2] (unprimed where the inertias are known).
    """

    matrix: np.ndarray
    speed: float
    density: float
    gamma: float
    alpha: float
    axes: str
    inertia: tuple | None
    lift_coefficient: float | None
    static: dict

    def forcing(self, yawing_moment_body):
        """Primed forcing rows (..., 3) of a body-axis yawing moment [N m] (None without inertia)."""
        if self.inertia is None:
            return None
        angle = self.alpha if self.axes == "stability" else 0.0
        return primed_forcing(yawing_moment_body, angle, *self.inertia)


def steady_balance(aircraft, condition) -> SteadyBalance:
    """The balance of a condition (see :func:`balance_matrix`)."""
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import DIMENSIONAL_NAMES, primed_derivatives, rotate_inertia

    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    flight = condition.flight
    primed = primed_derivatives(aircraft, condition)
    values = {name: getattr(primed, name) for name in DIMENSIONAL_NAMES}
    gravity = STANDARD_GRAVITY * math.cos(flight.gamma)
    matrix = balance_matrix(values, flight.speed, gravity)
    m = aircraft.mass
    inertia = None
    if m is not None:
        inertia = (m.Ixx, m.Izz, m.Ixz)
        if m.axes != primed.axes:
            angle = flight.alpha if primed.axes == "stability" else -flight.alpha
            inertia = tuple(float(v) for v in rotate_inertia(m.Ixx, m.Izz, m.Ixz, angle))
    derivatives = condition.derivatives
    lift = None
    given = {k: getattr(derivatives, k) for k in ("Cy_beta", "Cl_beta", "Cn_beta")} \
        if isinstance(derivatives, NondimensionalDerivatives) else {}
    N, L = (float(v) for v in static_derivatives(given, values, derivatives, flight.alpha, inertia))
    if isinstance(derivatives, NondimensionalDerivatives):
        static = {"Cy_beta": float(given["Cy_beta"]), "Cl_beta": L, "Cn_beta": N}
        if m is not None and m.mass is not None and aircraft.geometry is not None:
            lift = (m.mass * STANDARD_GRAVITY * math.cos(flight.gamma)
                    / (flight.dynamic_pressure * aircraft.geometry.wing_area))
    else:
        static = {"Y_beta": float(flight.speed * values["Y_v"]), "L_beta": L, "N_beta": N}
    return SteadyBalance(matrix, flight.speed, flight.density, flight.gamma, flight.alpha,
                         primed.axes, inertia, lift, static)


def control_travel(condition):
    controls = getattr(condition, "controls", None)
    if controls is None:
        return None, None
    return getattr(controls, "aileron", None), getattr(controls, "rudder", None)


@dataclass(frozen=True)
class SideslipResult:
    """Steady straight sideslips of one condition.

    Attributes
    ----------
    aileron_per_sideslip, rudder_per_sideslip, bank_per_sideslip : float
        Gradients [rad per rad, signed]; NaN when the controls cannot
        balance the sideslip.
    full_rudder_sideslip : float or None
        Sideslip reached with full rudder, or less when the aileron runs
        out first [rad]; None without control travel.
    limited_by : str or None
        "rudder" or "aileron".
    points : tuple of dict
        Operating points: {"sideslip", "aileron", "rudder", "bank"} [rad],
        and "aileron_fraction" / "rudder_fraction" of the travel (None
        without travel).
    senses : dict
        Signed quantities whose sign the sense checks test (see
        :func:`steady_sideslip`).
    roll_fraction_at_10deg : float or None
        Fraction of the aileron travel needed for 10 deg of sideslip
        (MIL-F-8785C 3.3.6.3.2 / 3.3.7.1).
    notes : tuple of str
    """

    aileron_per_sideslip: float
    rudder_per_sideslip: float
    bank_per_sideslip: float
    full_rudder_sideslip: float | None
    limited_by: str | None
    points: tuple = ()
    senses: dict = field(default_factory=dict)
    roll_fraction_at_10deg: float | None = None
    notes: tuple = ()

    def as_dict(self) -> dict:
        """The ``"sideslip"`` entry of ``latdyn steady --format json``."""
        return {"rudder_per_sideslip": _json(self.rudder_per_sideslip),
                "aileron_per_sideslip": _json(self.aileron_per_sideslip),
                "bank_per_sideslip": _json(self.bank_per_sideslip),
                "full_rudder_sideslip": _json(self.full_rudder_sideslip),
                "limited_by": self.limited_by,
                "roll_control_fraction_at_10deg": _json(self.roll_fraction_at_10deg),
                "points": [{k: _json(v) for k, v in p.items()} for p in self.points],
                "notes": list(self.notes)}


def _json(value):
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _point(balance, fixed, value, aileron_max, rudder_max):
    solution = solve_balance(balance.matrix, fixed, value)
    beta, aileron, rudder, sin_bank = (float(v) for v in solution)
    bank = math.asin(sin_bank) if abs(sin_bank) <= 1.0 else math.nan
    return {"sideslip": beta, "aileron": aileron, "rudder": rudder, "bank": bank,
            "aileron_fraction": abs(aileron) / aileron_max if aileron_max else None,
            "rudder_fraction": abs(rudder) / rudder_max if rudder_max else None}


def steady_sideslip(balance, aileron_max=None, rudder_max=None, sideslips=(), banks=()):
    """Steady straight sideslips: gradients, operating points, full-rudder sideslip.

    Parameters
    ----------
    balance : SteadyBalance
    aileron_max, rudder_max : float or None
        Control travel each way [rad].
    sideslips : iterable of float
        Sideslip angles for operating points [rad].
    banks : iterable of float
        Bank angles for operating points (the sideslip found) [rad].

    Returns
    -------
    SideslipResult
        ``senses`` holds ``rudder_moment_per_sideslip`` (N'_dr d dr/d beta:
        negative when right pedal gives left sideslip, MIL-F-8785C 3.3.6.1),
        ``aileron_moment_per_sideslip`` (L'_da d da/d beta: positive when
        left roll control goes with left sideslip, 3.3.6.3) and
        ``bank_per_sideslip`` (positive: more right bank with more right
        sideslip, 3.3.6.2), each [1/s^2 per rad, or rad per rad].
    """
    gradients = sideslip_gradients(balance.matrix)
    da, dr, dphi = (float(v) for v in gradients)
    notes = []
    if not math.isfinite(dr):
        notes.append("the controls cannot hold a steady sideslip (the aileron and rudder moments "
                     "are not independent)")
    full = limited = None
    if rudder_max is not None and math.isfinite(dr):
        beta, which = sideslip_limit(gradients, aileron_max, rudder_max)
        if np.isfinite(beta):
            full, limited = float(beta), CONTROL_NAMES[int(which)]
            if full > math.radians(15.0):
                notes.append(LINEAR_NOTE)
    elif rudder_max is None:
        notes.append("no rudder travel ([controls] rudder_deg): full-rudder sideslip not computed")
    points = [_point(balance, 0, b, aileron_max, rudder_max) for b in sideslips]
    points += [_point(balance, 3, math.sin(p), aileron_max, rudder_max) for p in banks]
    M = balance.matrix
    senses = {"rudder_moment_per_sideslip": float(M[2, 2] * dr + M[2, 1] * da) if math.isfinite(dr)
              else math.nan,
              "aileron_moment_per_sideslip": float(M[1, 1] * da + M[1, 2] * dr) if math.isfinite(da)
              else math.nan,
              "bank_per_sideslip": dphi}
    fraction = abs(da) * math.radians(10.0) / aileron_max if aileron_max and math.isfinite(da) else None
    return SideslipResult(da, dr, dphi, full, limited, tuple(points), senses, fraction, tuple(notes))


@dataclass(frozen=True)
class CrosswindResult:
    """Crosswind capability of a steady wing-low sideslip at the condition's speed.

    Attributes
    ----------
    max_component : float or None
        Largest 90 deg crosswind component [m/s] (None without travel).
    limited_by : str or None
        "rudder" or "aileron" (the roll control at its allowed fraction).
    roll_control_fraction : float
        Fraction of the aileron travel allowed [-].
    sideslip : float or None
        The sideslip that holds it [rad].
    required : dict
        The civil crosswind components the file's stall speeds give [m/s]
        ("14 CFR 23.233" from V_S0, "14 CFR 25.237" from V_SR0).
    notes : tuple of str
    """

    max_component: float | None
    limited_by: str | None
    roll_control_fraction: float
    sideslip: float | None
    required: dict = field(default_factory=dict)
    notes: tuple = ()

    def as_dict(self) -> dict:
        """The ``"crosswind"`` entry of ``latdyn steady --format json``."""
        return {"max_component": _json(self.max_component), "limited_by": self.limited_by,
                "roll_control_fraction": self.roll_control_fraction,
                "sideslip": _json(self.sideslip),
                "required_components": {k: _json(v) for k, v in self.required.items()},
                "notes": list(self.notes)}


def civil_crosswind_components(stall_speeds) -> dict:
    """Crosswind components the civil rules ask for, from the stall speeds given [m/s].

    14 CFR 23.233(a): at least 0.2 V_S0 (S).  14 CFR 25.237 (S) / 25.233 (V):
    20 kt or 0.2 V_SR0, whichever is greater, need not exceed 25 kt.  The
    numbers are read from the static-checks data file
    (:func:`latdyn.steady_checks.rule_limits`).

    Examples
    --------
    >>> from latdyn.aircraft import StallSpeeds
    >>> r = civil_crosswind_components(StallSpeeds(V_S0=40.0, V_SR0=40.0))
    >>> round(r["14 CFR 23.233"], 6), round(r["14 CFR 25.237"] / (1852 / 3600), 6)
    (8.0, 20.0)
    """
    from latdyn.steady_checks import rule_limits

    return rule_limits("crosswind_component", stall_speeds)


def crosswind_capability(balance, aileron_max=None, rudder_max=None, stall_speeds=None,
                         roll_fraction=DEFAULT_ROLL_FRACTION) -> CrosswindResult:
    """The largest 90 deg crosswind a steady wing-low sideslip holds at the condition's speed.

    beta_max from :func:`sideslip_limit` with the aileron travel times
    ``roll_fraction`` (MIL-F-8785C 3.3.7.1: 75 %, S), then
    V_cw = V sin(beta_max).
    """
    required = civil_crosswind_components(stall_speeds)
    if rudder_max is None and aileron_max is None:
        return CrosswindResult(None, None, roll_fraction, None, required,
                               ("no control travel ([controls] rudder_deg, aileron_deg): crosswind "
                                "capability not computed",))
    gradients = sideslip_gradients(balance.matrix)
    beta, which = sideslip_limit(gradients, aileron_max, rudder_max, roll_fraction)
    notes = []
    if rudder_max is None or aileron_max is None:
        missing = "rudder_deg" if rudder_max is None else "aileron_deg"
        notes.append(f"no [controls] {missing}: that control is taken as unlimited")
    if not np.isfinite(beta):
        return CrosswindResult(None, None, roll_fraction, None, required,
                               tuple(notes + ["the controls are not limited: no crosswind limit"]))
    beta = float(beta)
    if beta > math.radians(15.0):
        notes.append(LINEAR_NOTE)
    notes.append("steady wing-low sideslip in the air at the condition's speed; ground handling "
                 "and the landing gear are not modelled")
    return CrosswindResult(float(crosswind_component(beta, balance.speed)), CONTROL_NAMES[int(which)],
                           roll_fraction, beta, required, tuple(notes))


@dataclass(frozen=True)
class EngineOutCase:
    """Steady straight flight with one engine failed, at one bank angle, against airspeed.

    Attributes
    ----------
    bank : float
        Bank angle held [rad] (positive right wing down).
    speeds : numpy.ndarray
        True airspeeds [m/s].
    sideslip, aileron, rudder : numpy.ndarray
        Needed at each speed [rad].
    minimum_control_speed : float or None
        True airspeed at the condition's altitude where a control runs out
        [m/s].
    limited_by : str or None
    state : str
        "found", "below" or "above" (:func:`minimum_control_speed`), or
        "no_travel".
    equivalent_airspeed, calibrated_airspeed : float or None
        Of the minimum control speed [m/s].
    """

    bank: float
    speeds: np.ndarray
    sideslip: np.ndarray
    aileron: np.ndarray
    rudder: np.ndarray
    minimum_control_speed: float | None
    limited_by: str | None
    state: str
    equivalent_airspeed: float | None = None
    calibrated_airspeed: float | None = None


@dataclass(frozen=True)
class EngineOutResult:
    """Engine-out control of one condition.

    Attributes
    ----------
    failed_engine : str or None
        The critical engine (named in the file or found: the failure giving
        the highest minimum control speed wings level, or without control
        travel the largest yawing moment at the condition's speed).
    wings_level, banked : EngineOutCase or None
        At zero bank and at :data:`ENGINE_OUT_BANK` toward the operating
        engine(s).
    limits : dict
        The civil limits the stall speeds give, calibrated airspeed [m/s]:
        "14 CFR 23.149(b)" = 1.2 V_S1, "14 CFR 25.149(c)" = 1.13 V_SR.
    notes : tuple of str
        Always includes :data:`HELD_NOTE` when anything is computed.
    """

    failed_engine: str | None
    wings_level: EngineOutCase | None
    banked: EngineOutCase | None
    limits: dict = field(default_factory=dict)
    notes: tuple = ()

    @property
    def minimum_control_speed(self):
        """The minimum control speed with the allowed bank [m/s TAS] (None when not found)."""
        return None if self.banked is None else self.banked.minimum_control_speed

    def as_dict(self) -> dict:
        """The ``"engine_out"`` entry of ``latdyn steady --format json``."""
        banked, level = self.banked, self.wings_level
        return {
            "minimum_control_speed": _json(self.minimum_control_speed),
            "limited_by": banked.limited_by if banked is not None else None,
            "bank": banked.bank if banked is not None else None,
            "minimum_control_speed_equivalent": _json(banked.equivalent_airspeed) if banked else None,
            "minimum_control_speed_calibrated": _json(banked.calibrated_airspeed) if banked else None,
            "minimum_control_speed_wings_level": _json(level.minimum_control_speed) if level else None,
            "limited_by_wings_level": level.limited_by if level is not None else None,
            "failed_engine": self.failed_engine,
            "limits_calibrated": {k: _json(v) for k, v in self.limits.items()},
            "notes": list(self.notes),
        }


def _speed_grid(reference_speed, engines):
    top = 2.0 * reference_speed
    for engine in engines:
        if engine.thrust_speeds:
            top = max(top, engine.thrust_speeds[-1])
    return np.geomspace(0.1 * reference_speed, top, 161)


def _engine_case(balance, engines, failed, speeds, bank, aileron_max, rudder_max, altitude):
    positions = [e.lateral_position for e in engines]
    thrusts = np.stack([np.broadcast_to(e.thrust_at(speeds), speeds.shape) for e in engines], axis=-1)
    moment = thrust_moments(positions, thrusts, failed, engines[failed].failed_drag)
    solution = engine_out_solution(balance.matrix, balance.speed, speeds, balance.forcing(moment),
                                   math.sin(bank))
    travel = np.array([np.nan if rudder_max is None else rudder_max,
                       np.nan if aileron_max is None else aileron_max])
    vmc, which, state = None, -1, "no_travel"
    if not np.all(np.isnan(travel)):
        failed_engine = engines[failed]

        def ratio(v):
            T = np.array([e.thrust_at(v) for e in engines])
            N = thrust_moments(positions, T, failed, failed_engine.failed_drag)
            s = engine_out_solution(balance.matrix, balance.speed, np.array([v]),
                                    balance.forcing(np.array([N])), math.sin(bank))[0]
            return np.abs(s[[2, 1]]) / travel

        vmc, which, state = minimum_control_speed(speeds, ratio)
    eas = cas = None
    if vmc is not None:
        from latdyn.atmosphere import calibrated_airspeed, equivalent_airspeed

        eas = float(equivalent_airspeed(vmc, balance.density))
        if altitude is not None:
            cas = float(calibrated_airspeed(vmc, altitude))
    return EngineOutCase(bank, speeds, solution[:, 0], solution[:, 1], solution[:, 2], vmc,
                         CONTROL_NAMES[which] if which >= 0 and state != "no_travel" else None, state,
                         eas, cas)


def engine_out(balance, engines, aileron_max=None, rudder_max=None, stall_speeds=None,
               altitude=None, bank=ENGINE_OUT_BANK, speeds=None) -> EngineOutResult:
    """Steady straight flight with the critical engine failed, and the minimum control speed.

    At each true airspeed V (the condition's density) the balance is solved
    for sideslip, aileron and rudder with the bank held at zero and at
    ``bank`` toward the operating engine(s) (14 CFR 23.149(a), 25.149(b):
    at most 5 deg); the minimum control speed is where the rudder (or the
    aileron) reaches full travel.  The non-dimensional derivatives of the
    condition are held over the speed range (:data:`HELD_NOTE`).

    Parameters
    ----------
    balance : SteadyBalance
    engines : sequence of latdyn.aircraft.Engine
    aileron_max, rudder_max : float or None
        Travel each way [rad].
    stall_speeds : latdyn.aircraft.StallSpeeds or None
    altitude : float or None
        Geopotential altitude of the condition [m] (for the calibrated airspeed).
    bank : float
        Largest bank toward the operating engine(s) [rad].
    speeds : array, optional
        True airspeeds [m/s]; default 0.1 to 2 times the condition's speed.

    Returns
    -------
    EngineOutResult
    """
    from latdyn.steady_checks import rule_limits

    limits = rule_limits("minimum_control_speed", stall_speeds)
    if len(engines) < 2:
        reason = "no [[engine]] tables" if not engines else "one engine only"
        return EngineOutResult(None, None, None, limits, (f"{reason}: engine-out control not computed",))
    if balance.inertia is None:
        return EngineOutResult(None, None, None, limits,
                               ("no [mass] inertias: the thrust moment cannot be set against the "
                                "derivatives; engine-out control not computed",))
    speeds = _speed_grid(balance.speed, engines) if speeds is None else np.asarray(speeds, dtype=float)
    named = [i for i, e in enumerate(engines) if e.critical]
    candidates = named or [i for i, e in enumerate(engines) if e.lateral_position != 0.0]
    if not candidates:
        return EngineOutResult(None, None, None, limits,
                               ("every engine is on the centre line: no asymmetric thrust",))
    cases = {i: _engine_case(balance, engines, i, speeds, 0.0, aileron_max, rudder_max, altitude)
             for i in candidates}

    def severity(i):
        case = cases[i]
        if case.state == "above":
            return (2, math.inf)
        if case.minimum_control_speed is not None:
            return (1, case.minimum_control_speed)
        at = int(np.argmin(np.abs(speeds - balance.speed)))
        return (0, abs(float(case.rudder[at])) if np.isfinite(case.rudder[at]) else 0.0)

    failed = named[0] if named else max(candidates, key=severity)
    notes = [HELD_NOTE]
    notes.append(f'critical engine "{engines[failed].name}"'
                 + (" (named in the file)" if named else " (found: highest minimum control speed"
                    + (")" if cases[failed].state != "no_travel" else
                       "; without control travel, the largest rudder needed at the condition's speed)")))
    toward = -math.copysign(1.0, engines[failed].lateral_position)
    banked = _engine_case(balance, engines, failed, speeds, toward * bank, aileron_max, rudder_max, altitude)
    level = cases[failed]
    for case, words in ((level, "wings level"), (banked, f"{math.degrees(bank):g} deg bank")):
        if case.state == "below":
            notes.append(f"{words}: the controls hold straight flight down to {speeds[0] / _KNOT:.0f} kt "
                         "TAS (no minimum control speed in the range)")
        elif case.state == "above":
            notes.append(f"{words}: {CONTROL_NAMES[0] if case.limited_by == 'rudder' else 'aileron'} "
                         f"out of travel up to {speeds[-1] / _KNOT:.0f} kt TAS (the top of the range)")
    if level.state == "no_travel":
        notes.append("no control travel ([controls] rudder_deg, aileron_deg): minimum control speed "
                     "not computed")
    if altitude is None:
        notes.append("the condition gives a density, not an altitude: no calibrated airspeed; "
                     "the equivalent airspeed is compared with the stall speeds")
    if banked.minimum_control_speed is not None:
        at = np.interp(banked.minimum_control_speed, speeds, np.abs(banked.sideslip))
        if at > math.radians(15.0):
            notes.append(LINEAR_NOTE)
    return EngineOutResult(engines[failed].name, level, banked, limits, tuple(notes))


@dataclass(frozen=True)
class SteadyResult:
    """Steady lateral-directional flight of one condition.

    Unpacks as (sideslip, crosswind, engine_out).
    """

    condition: str
    category: str | None
    balance: SteadyBalance
    sideslip: SideslipResult
    crosswind: CrosswindResult
    engine_out: EngineOutResult
    stall_speeds: object = None
    notes: tuple = ()

    def __iter__(self):
        return iter((self.sideslip, self.crosswind, self.engine_out))

    def as_dict(self) -> dict:
        """The JSON entry of one condition (SI units, radians)."""
        return {"name": self.condition, "category": self.category,
                "true_airspeed": self.balance.speed, "density": self.balance.density,
                "lift_coefficient": _json(self.balance.lift_coefficient),
                "static_derivatives": self.balance.static,
                "stall_speeds": (self.stall_speeds.given() if self.stall_speeds is not None else {}),
                "sideslip": self.sideslip.as_dict(), "crosswind": self.crosswind.as_dict(),
                "engine_out": self.engine_out.as_dict(), "notes": list(self.notes)}


def steady(aircraft, condition=None, sideslips=(math.radians(10.0),), banks=(),
           roll_fraction=DEFAULT_ROLL_FRACTION) -> tuple:
    """Steady sideslips, crosswind capability and engine-out control of every condition.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    condition : str, optional
        Only this condition.
    sideslips, banks : iterable of float
        Operating points of the sideslip table [rad].
    roll_fraction : float
        Fraction of the roll control a crosswind sideslip may use.

    Returns
    -------
    tuple of SteadyResult
    """
    chosen = (aircraft.condition(condition),) if condition else aircraft.conditions
    out = []
    for item in chosen:
        balance = steady_balance(aircraft, item)
        aileron_max, rudder_max = control_travel(item)
        stall = getattr(item, "stall_speeds", None)
        sideslip = steady_sideslip(balance, aileron_max, rudder_max, sideslips, banks)
        crosswind = crosswind_capability(balance, aileron_max, rudder_max, stall, roll_fraction)
        engines = engine_out(balance, aircraft.engines, aileron_max, rudder_max, stall,
                             item.flight.altitude)
        notes = []
        if stall is None:
            notes.append("no [stall_speeds]: the civil crosswind and minimum-control-speed limits "
                         "are not compared")
        out.append(SteadyResult(item.name, item.flight.category, balance, sideslip, crosswind, engines,
                                stall, tuple(notes)))
    return tuple(out)
