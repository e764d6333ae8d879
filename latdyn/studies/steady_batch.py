"""Static checks of steady flight over a batch of cases (sweeps): the balance, V_MC and verdicts.

The array layer of :mod:`latdyn.steady` over the N cases of a case set
(:mod:`latdyn.studies.batch`): the balance of each case from its primed
derivatives, the sideslip gradients and senses, the static derivatives, the
crosswind limit, and the engine-out minimum control speed, found for every
case at once -- the last speed of a geometric grid at which a control is out
of travel brackets it, and the brackets are refined together by the
Illinois iteration of the sweeps (:func:`latdyn.roots.illinois`) to
the tolerance of the single case's Brent search
(:func:`latdyn.steady.minimum_control_speed`), so one case of a batch gives
the number ``latdyn assess`` gives for it.  The checks are graded with
:func:`latdyn.steady_checks.check_margins` into :class:`latdyn.levels.Grades`
(pass = 1, fail = 2, 0 undecided; ``level_margin`` the margin over the
magnitude of the limit, or the margin for a zero limit), so a sweep root-finds their
boundaries like any level boundary.

Inputs the cases may vary besides the derivatives and the flight condition:
``engine.<name>.lateral_position`` [m], ``engine.<name>.thrust`` [N] (a
constant thrust), ``engine.<name>.failed_drag`` [N], and the control travel
``controls.rudder`` / ``controls.aileron`` [rad] where the studies carry
them.  The condition's non-dimensional derivatives are held over the
engine-out speed range (:data:`latdyn.steady.HELD_NOTE`).  Verdicts are
guidance only (:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["ENGINE_FIELDS", "engine_parameters", "case_balance", "batch_minimum_control_speed",
           "case_minimum_control_speed", "steady_grades", "GRID_POINTS"]

#: Engine inputs a case set can vary: field of :class:`latdyn.aircraft.Engine` -> dimension.
ENGINE_FIELDS = {"lateral_position": "length", "thrust": "force", "failed_drag": "force"}
#: Speeds of the engine-out grid (as :func:`latdyn.steady.engine_out`).
GRID_POINTS = 161


def engine_parameters(aircraft) -> tuple:
    """Engine inputs of an aircraft with two engines or more: ``engine.<name>.<field>``.

    A thrust given as a table is not a sweep key (a constant replaces it only
    where the file gives a constant).

    >>> from latdyn.aircraft import Engine
    >>> from types import SimpleNamespace
    >>> a = SimpleNamespace(engines=(Engine("left", -2.0, 900.0), Engine("right", 2.0, None, (0, 1), (1, 1))))
    >>> engine_parameters(a)[:4]
    ('engine.left.lateral_position', 'engine.left.thrust', 'engine.left.failed_drag', 'engine.right.lateral_position')
    """
    engines = getattr(aircraft, "engines", ()) or ()
    if len(engines) < 2:
        return ()
    return tuple(f"engine.{e.name}.{field}" for e in engines for field in ENGINE_FIELDS
                 if field != "thrust" or e.thrust is not None)


def case_balance(cases, values=None, primed=None):
    """The steady balance of every case: (matrix (N, 3, 4), inertia (N, 3) or None, angle (N,)).

    ``angle`` rotates a body-axis moment into the derivatives' axes (alpha in
    stability axes, 0 in body axes).  ``values`` and ``primed`` are the case
    inputs and primed derivatives when the caller has them.
    """
    from latdyn.model import DIMENSIONAL_NAMES, rotate_inertia
    from latdyn.steady import balance_matrix
    from latdyn.studies.batch import case_primed
    from latdyn.units import STANDARD_GRAVITY

    if values is None or primed is None:
        values, primed = case_primed(cases)
    n = cases.size
    shape = (n,)
    matrix = balance_matrix({k: primed[k] for k in DIMENSIONAL_NAMES}, values["speed"],
                            STANDARD_GRAVITY * np.cos(values["gamma"]))
    matrix = np.broadcast_to(matrix, shape + (3, 4))
    axes = cases.condition.derivatives.axes
    alpha = np.broadcast_to(np.asarray(values["alpha"], float), shape)
    mass = cases.aircraft.mass
    inertia = None
    if mass is not None:
        Ixx, Izz, Ixz = (np.broadcast_to(np.asarray(values[k], float), shape) for k in ("Ixx", "Izz", "Ixz"))
        if mass.axes != axes:
            angle = alpha if axes == "stability" else -alpha
            Ixx, Izz, Ixz = rotate_inertia(Ixx, Izz, Ixz, angle)
        inertia = np.stack(np.broadcast_arrays(Ixx, Izz, Ixz), axis=-1)
    angle = alpha if axes == "stability" else np.zeros(shape)
    return matrix, inertia, angle


def _engine_values(cases, n):
    """Per-case engine positions (N, e), constant thrust (N, e; NaN for a table) and drag (N, e)."""
    engines = cases.aircraft.engines
    out = {}
    for field in ENGINE_FIELDS:
        columns = []
        for e in engines:
            key = f"engine.{e.name}.{field}"
            nominal = getattr(e, field)
            value = cases.overrides.get(key, np.nan if nominal is None else nominal)
            columns.append(np.broadcast_to(np.asarray(value, float), (n,)))
        out[field] = np.stack(columns, axis=-1)
    return out


def _thrust(cases, constant, speeds):
    """Thrust of every engine at the speeds (N, k) -> (N, k, e)."""
    engines = cases.aircraft.engines
    columns = []
    for j, e in enumerate(engines):
        if e.thrust is None and f"engine.{e.name}.thrust" not in cases.overrides:
            columns.append(np.interp(speeds, e.thrust_speeds, e.thrust_values))
        else:
            columns.append(np.broadcast_to(constant[:, j, None], speeds.shape))
    return np.stack(columns, axis=-1)


def batch_minimum_control_speed(matrix, speed, forcing, travel, sin_bank, top=None, points=GRID_POINTS):
    """Minimum control speed of N cases at once [m/s TAS].

    Parameters
    ----------
    matrix : array (N, 3, 4)
        Balance at each case's reference speed (:func:`latdyn.steady.balance_matrix`).
    speed : array (N,)
        Reference true airspeeds [m/s].
    forcing : callable
        forcing(index, V) -> (len(index), k, 3) primed thrust forcing of the
        cases ``index`` at true airspeeds V (len(index), k).
    travel : array (N, 2)
        Rudder and aileron travel [rad] (NaN: not limited).
    sin_bank : array (N,)
        Sine of the bank held.
    top : array (N,), optional
        Top of the speed range [m/s]; default twice the reference speed.

    Returns
    -------
    speed : numpy.ndarray (N,)
        The minimum control speed; NaN where none is found in the range.
    limited_by : numpy.ndarray of int (N,)
        0 rudder, 1 aileron, -1 none.
    state : numpy.ndarray of int (N,)
        0 found, 1 below the range (enough control everywhere), 2 above (a
        control out of travel at the top), 3 no travel.
    """
    from latdyn.steady import solve_balance
    from latdyn.roots import illinois

    matrix = np.asarray(matrix, float)
    speed = np.asarray(speed, float)
    n = speed.shape[0]
    travel = np.asarray(travel, float)
    sin_bank = np.broadcast_to(np.asarray(sin_bank, float), (n,))
    top = 2.0 * speed if top is None else np.maximum(np.asarray(top, float), 2.0 * speed)
    low = 0.1 * speed
    fractions = np.linspace(0.0, 1.0, points)
    grid = low[:, None] * (top / low)[:, None] ** fractions[None, :]

    def ratios(index, V):
        M = np.array(np.broadcast_to(matrix[index][:, None], V.shape + (3, 4)))
        M[..., :3] *= ((V / speed[index][:, None]) ** 2)[..., None, None]
        solution = solve_balance(M, 3, np.broadcast_to(sin_bank[index][:, None], V.shape),
                                 forcing(index, V))
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.abs(solution[..., [2, 1]]) / travel[index][:, None, :]

    everything = np.arange(n)
    values = ratios(everything, grid)
    worst = np.max(np.where(np.isnan(values), -np.inf, values), axis=-1)
    over = worst >= 1.0
    no_travel = np.all(np.isnan(travel), axis=-1)
    above = over[:, -1] & ~no_travel
    found = over.any(axis=1) & ~above & ~no_travel
    state = np.where(no_travel, 3, np.where(above, 2, np.where(found, 0, 1)))
    result = np.full(n, np.nan)
    which = np.full(n, -1)
    which[above] = np.argmax(np.where(np.isnan(values[above, -1]), -np.inf, values[above, -1]), axis=-1)
    index = np.flatnonzero(found)
    if index.size:
        last = (points - 1) - np.argmax(over[index, ::-1], axis=1)
        a = grid[index, last]
        b = grid[index, last + 1]

        def excess(active, V):
            chosen = index[active]
            r = ratios(chosen, np.asarray(V, float)[:, None])[:, 0]
            return np.max(np.where(np.isnan(r), -np.inf, r), axis=-1) - 1.0

        fa = worst[index, last] - 1.0
        fb = worst[index, last + 1] - 1.0
        tolerance = np.maximum(1e-9, 1e-12 * b)
        roots = illinois(excess, a, b, fa, fb, tolerance)
        result[index] = roots
        r = ratios(index, roots[:, None])[:, 0]
        which[index] = np.argmax(np.where(np.isnan(r), -np.inf, r), axis=-1)
    return result, which, state


def case_minimum_control_speed(cases, bank, values=None, primed=None):
    """The engine-out minimum control speed of every case, with the critical engine of each.

    The critical engine is the one the file names, or else the one whose
    failure gives the highest minimum control speed wings level (a control out
    of travel over the whole range counting highest), as for one case
    (:func:`latdyn.steady.engine_out`); the bank ``bank`` [rad] is toward the
    operating engine(s).

    Returns
    -------
    dict
        ``speed`` (N,) true airspeed [m/s] (NaN where none), ``calibrated`` (N,)
        (equivalent airspeed where the condition gives no altitude), ``limited_by``,
        ``state`` (:func:`batch_minimum_control_speed`), ``failed`` (N,) engine
        index; None when the aircraft has fewer than two engines or no inertias.
    """
    from latdyn.steady import primed_forcing, thrust_moments
    from latdyn.studies.batch import case_primed

    aircraft, condition = cases.aircraft, cases.condition
    engines = aircraft.engines
    if len(engines) < 2 or aircraft.mass is None:
        return None
    if values is None or primed is None:
        values, primed = case_primed(cases)
    n = cases.size
    matrix, inertia, angle = case_balance(cases, values, primed)
    speed = np.broadcast_to(np.asarray(values["speed"], float), (n,))
    engine = _engine_values(cases, n)
    controls = getattr(condition, "controls", None)
    travel = np.stack([np.broadcast_to(np.asarray(cases.overrides.get(
        f"controls.{name}", np.nan if getattr(controls, name, None) is None else getattr(controls, name)),
        float), (n,)) for name in ("rudder", "aileron")], axis=-1)
    table_top = max((e.thrust_speeds[-1] for e in engines if e.thrust_speeds), default=0.0)
    top = np.maximum(2.0 * speed, table_top)

    def solve(failed, sin_bank):
        def forcing(index, V):
            T = _thrust(cases, engine["thrust"][index], V)
            y = engine["lateral_position"][index][:, None, :]
            N_b = thrust_moments(y, T, failed, engine["failed_drag"][index, failed][:, None])
            Ixx, Izz, Ixz = (inertia[index, k][:, None] for k in range(3))
            return primed_forcing(N_b, angle[index][:, None], Ixx, Izz, Ixz)

        return batch_minimum_control_speed(matrix, speed, forcing, travel, sin_bank, top)

    named = [i for i, e in enumerate(engines) if e.critical]
    positions = engine["lateral_position"]
    if named:
        failed = np.full(n, named[0])
    else:
        candidates = [i for i in range(len(engines)) if np.any(positions[:, i] != 0.0)]
        if not candidates:
            return None
        severity = []
        for i in candidates:
            v, _, state = solve(i, np.zeros(n))
            severity.append(np.where(state == 2, np.inf, np.where(np.isnan(v), -np.inf, v)))
        failed = np.asarray(candidates)[np.argmax(np.stack(severity, axis=-1), axis=-1)]
    out_speed, out_which, out_state = np.full(n, np.nan), np.full(n, -1), np.full(n, 3)
    for i in np.unique(failed):
        chosen = failed == i
        toward = -np.sign(positions[:, i])
        v, which, state = solve(int(i), toward * math.sin(bank))
        out_speed[chosen], out_which[chosen], out_state[chosen] = v[chosen], which[chosen], state[chosen]
    altitude = values.get("altitude")
    with np.errstate(invalid="ignore"):
        if altitude is not None and not np.any(np.isnan(np.asarray(altitude, float))):
            from latdyn.atmosphere import calibrated_airspeed

            calibrated = np.where(np.isfinite(out_speed),
                                  calibrated_airspeed(np.nan_to_num(out_speed), altitude), np.nan)
        else:
            from latdyn.atmosphere import equivalent_airspeed

            calibrated = equivalent_airspeed(out_speed, values["density"])
    return {"speed": out_speed, "calibrated": np.asarray(calibrated, float), "limited_by": out_which,
            "state": out_state, "failed": failed}


def _quantities(cases, checks, values, primed):
    """Each check's quantity over the batch (N,) [SI, rad]; NaN where not computable."""
    from latdyn.steady import crosswind_component, sideslip_gradients, sideslip_limit, static_derivatives

    n = cases.size
    matrix, inertia, _ = case_balance(cases, values, primed)
    gradients = sideslip_gradients(matrix)
    da, dr, dphi = gradients[:, 0], gradients[:, 1], gradients[:, 2]
    condition = cases.condition
    controls = getattr(condition, "controls", None)
    travel = {name: np.broadcast_to(np.asarray(cases.overrides.get(
        f"controls.{name}", np.nan if getattr(controls, name, None) is None else getattr(controls, name)),
        float), (n,)) for name in ("rudder", "aileron")}
    static = static_derivatives(values, primed, condition.derivatives, values["alpha"], inertia)
    speed = np.broadcast_to(np.asarray(values["speed"], float), (n,))
    out, cache = {}, {}
    for check in checks:
        q = check.quantity
        if q == "rudder_moment_per_sideslip":
            value = matrix[:, 2, 2] * dr + matrix[:, 2, 1] * da
        elif q == "aileron_moment_per_sideslip":
            value = matrix[:, 1, 1] * da + matrix[:, 1, 2] * dr
        elif q == "bank_per_sideslip":
            value = dphi
        elif q == "directional_stability":
            value = static[0]
        elif q == "lateral_stability":
            value = static[1]
        elif q == "roll_control_fraction":
            value = np.abs(da) * check.at_sideslip / travel["aileron"]
        elif q in ("crosswind_sideslip", "crosswind_component"):
            beta, _ = sideslip_limit(gradients, travel["aileron"], travel["rudder"],
                                     check.roll_control_fraction)
            beta = np.where(np.isfinite(beta), beta, np.nan)
            value = beta if q == "crosswind_sideslip" else crosswind_component(beta, speed)
        else:  # minimum_control_speed
            if check.bank not in cache:
                cache[check.bank] = case_minimum_control_speed(cases, check.bank, values, primed)
            found = cache[check.bank]
            if found is None:
                value = np.full(n, np.nan)
            else:
                # out of travel over the whole range: +inf (fails); enough control everywhere: -inf
                value = np.where(found["state"] == 2, np.inf,
                                 np.where(found["state"] == 1, -np.inf, found["calibrated"]))
        out[(check.group, check.name)] = np.broadcast_to(np.asarray(value, float), (n,))
    return out


def steady_grades(cases, groups, flight_phase=None, values=None, primed=None) -> dict:
    """Verdicts of the static checks over a batch, as :class:`latdyn.levels.Grades`.

    Parameters
    ----------
    cases : latdyn.studies.batch.CaseSet
    groups : iterable of latdyn.steady_checks.CheckGroup
    flight_phase : str, optional

    Returns
    -------
    dict
        (group name, check name) -> Grades with one grade (pass/fail): ``level``
        1 pass, 2 fail, 0 undecided; ``value`` the quantity, ``limit``,
        ``margin`` (signed, positive inside), ``margin_fraction`` and
        ``level_margin`` (N, 1) (the fraction, or the margin for a zero limit)
        for root-finding.  Checks that do not hold for the condition's category
        and phase are left out.
    """
    from latdyn.levels import Grades
    from latdyn.steady_checks import check_margins
    from latdyn.studies.batch import case_primed

    condition = cases.condition
    category = condition.flight.category
    stall = getattr(condition, "stall_speeds", None)
    checks = [c for g in groups for c in g.checks
              if category is not None or c.categories is None]
    checks = [c for c in checks if c.categories is None or c.applies(category, flight_phase)]
    if not checks:
        return {}
    if values is None or primed is None:
        values, primed = case_primed(cases)
    quantities = _quantities(cases, checks, values, primed)
    out = {}
    n = cases.size
    for check in checks:
        value = quantities[(check.group, check.name)]
        limit = check.limit_value(stall)
        limit = np.nan if limit is None else limit
        passed, decided, margin, fraction = check_margins(value, limit, check.sense, check.exclusive)
        infinite = np.isinf(value) & np.isfinite(limit)
        passed = np.where(infinite, check.sense * value > 0, passed)
        decided = decided | infinite
        level = np.where(decided, np.where(passed, 1, 2), 0)
        if check.indicator:
            level = np.zeros(n, int)
        level_margin = np.where(limit != 0, fraction, margin) if np.isfinite(limit) else np.full(n, np.nan)
        level_margin = np.where(np.isfinite(level_margin), level_margin, np.nan)
        out[(check.group, check.name)] = Grades(
            level.astype(int), (level == 1)[:, None], level_margin[:, None], np.full(n, -1),
            np.where(np.isfinite(value), value, np.nan), np.full(n, limit), np.where(np.isfinite(margin), margin, np.nan),
            np.where(np.isfinite(fraction), fraction, np.nan))
    return out
