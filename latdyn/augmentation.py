"""The augmented aircraft: yaw damper, roll damper, interconnect, lags and delay.

The closed loop is assembled here from named linear blocks (our own
interconnection, checked in the tests against python-control's
``interconnect`` and ``feedback`` to 1e-10)::

    pilot aileron --(+)--> aileron command --[delay]--[actuator]--> aileron surface --+
                   ^  K_p                                                              |
                   +------ [roll-rate sensor] <-- p <----------- airframe <-----------+
    pilot rudder ---(+)--> rudder command  --[delay]--[actuator]--> rudder surface ---+
                   ^  ^ K_r                                                            |
                   |  +--- [washout] <-- [yaw-rate sensor] <-- r <-- airframe <--------+
                   +------ [interconnect lag] x K_ari <-- aileron command

* yaw damper: rudder command += K_r w(s) r_s with the washout
  w(s) = tau_w s / (tau_w s + 1) (none when no time constant is given);
  with the usual Cn_dr < 0 a positive K_r damps the Dutch roll;
* roll damper: aileron command += K_p p_s; it damps the roll when K_p has
  the sign opposite to Cl_da (L_da);
* aileron-rudder interconnect: rudder command += K_ari a(s) x aileron
  command, a(s) = 1 / (tau_i s + 1) or 1;
* sensors s(s) = 1 / (tau_s s + 1) on p and r; actuators 1 / (tau_a s + 1);
* a pure delay exp(-s T) of both surface commands, by its [n/n] Padé
  approximation (:func:`pade`, order stated with every result).

The airframe's modes keep their names in the closed loop by continuity: the
feedback gains are raised from zero (where the roots are the bare
airframe's and the blocks' own, each named) to their values, and every root
is followed along the way (:func:`track_roots`).  Roots that the blocks add
are named for their block (washout, actuator, sensor, delay).

Everything here works on one model at a time with ``numpy.linalg.eig``
(the bare 4-state batch engine, :mod:`latdyn.eigen`, is untouched).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from latdyn.aircraft import Augmentation
from latdyn.model import LateralModel, lateral_model
from latdyn.modes import PATTERNS, ModeSet, _make_mode, find_modes

__all__ = [
    "Block", "AugmentedModel", "ADDED_LABELS", "SURFACE_OUTPUTS", "pade", "connect",
    "augmentation_blocks", "augmented_model", "condition_model", "track_roots",
    "augmented_modes", "model_modes", "loop_matrices", "bare_aircraft", "is_augmented", "added_label", "describe",
    "actuator_rate_limits", "RateLimitedRun", "simulate_rate_limited", "WashoutEffect",
    "MAX_RATE_LIMITED_STEPS", "StiffRun", "fastest_setting",
    "washout_effect", "static_gain",
]

#: Display names of the roots the augmentation adds, by block.
ADDED_LABELS = {
    "washout": "washout",
    "roll_rate_sensor": "roll-rate sensor",
    "yaw_rate_sensor": "yaw-rate sensor",
    "interconnect_lag": "interconnect lag",
    "aileron_delay": "aileron command delay (Padé)",
    "rudder_delay": "rudder command delay (Padé)",
    "aileron_actuator": "aileron actuator",
    "rudder_actuator": "rudder actuator",
}

#: Outputs the augmented model adds to the airframe's: the surface deflections [rad].
SURFACE_OUTPUTS = ("aileron_surface", "rudder_surface")

_AIRFRAME_MODES = ("dutch_roll", "roll_subsidence", "spiral", "roll_spiral")


@dataclass(frozen=True)
class Block:
    """A linear block x' = A x + B u, y = C x + D u with named signals.

    Attributes
    ----------
    name : str
        Names the roots of the block (:data:`ADDED_LABELS`, or "airframe").
    A, B, C, D : numpy.ndarray
    inputs, outputs, states : tuple of str
    """

    name: str
    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    D: np.ndarray
    inputs: tuple
    outputs: tuple
    states: tuple


def pade(delay, order):
    """State-space realisation of the [n/n] Padé approximation of exp(-s T).

    .. math::
        e^{-sT} \\approx \\frac{\\sum_k c_k (-sT)^k}{\\sum_k c_k (sT)^k},\\qquad
        c_k = \\frac{(2n-k)!\\, n!}{(2n)!\\, k!\\, (n-k)!}

    (G. A. Baker and P. Graves-Morris, *Padé Approximants*, 2nd ed., 1996,
    section 1.2 -- from memory; checked in the tests against
    ``control.pade``).  Realised in controllable companion form in the
    normalised variable sT, then scaled by 1/T.

    Parameters
    ----------
    delay : float
        T > 0 [s].
    order : int
        n >= 1.

    Returns
    -------
    A, B, C, D : numpy.ndarray
        (n, n), (n, 1), (1, n), (1, 1).

    Examples
    --------
    First order: (1 - sT/2) / (1 + sT/2), one pole at -2/T, D = -1.

    >>> A, B, C, D = pade(0.1, 1)
    >>> float(A[0, 0]), float(D[0, 0])
    (-20.0, -1.0)
    """
    n = int(order)
    c = [math.factorial(2 * n - k) * math.factorial(n)
         / (math.factorial(2 * n) * math.factorial(k) * math.factorial(n - k)) for k in range(n + 1)]
    den = np.array(c)                                   # coefficients of (sT)^k, k = 0..n
    num = np.array([ck * (-1.0) ** k for k, ck in enumerate(c)])
    feedthrough = num[n] / den[n]
    rest = (num - feedthrough * den)[:n] / den[n]       # strictly proper remainder, (sT)^0..(sT)^(n-1)
    monic = den[:n] / den[n]
    A = np.zeros((n, n))
    A[0, :] = -monic[::-1]
    A[1:, :-1] = np.eye(n - 1)
    B = np.zeros((n, 1))
    B[0, 0] = 1.0
    C = rest[::-1][None, :].copy()
    return A / delay, B / delay, C, np.array([[feedthrough]])


def added_label(name):
    """Display name of an added root from its block name(s) (joined by ``_and_``).

    Examples
    --------
    >>> added_label("aileron_actuator_and_rudder_actuator")
    'aileron actuator + rudder actuator'
    """
    return " + ".join(ADDED_LABELS.get(part, part.replace("_", " ")) for part in name.split("_and_"))


def describe(augmentation) -> str:
    """The augmentation in one line of words (SI; rate limits in deg/s).

    Examples
    --------
    >>> describe(Augmentation(yaw_damper_gain=0.8, washout_time_constant=2.0, time_delay=0.05))
    'yaw damper 0.8 s with washout 2 s; delay 0.05 s (Padé order 2)'
    """
    a = augmentation
    parts = []
    if a.yaw_damper_gain:
        parts.append(f"yaw damper {a.yaw_damper_gain:g} s" + (f" with washout {a.washout_time_constant:g} s"
                                                             if a.washout_time_constant else " (no washout)"))
    if a.roll_damper_gain:
        parts.append(f"roll damper {a.roll_damper_gain:g} s")
    if a.interconnect_gain:
        parts.append(f"interconnect {a.interconnect_gain:g} rudder/aileron"
                     + (f" lag {a.interconnect_time_constant:g} s" if a.interconnect_time_constant else ""))
    if a.sensor_time_constant:
        parts.append(f"rate sensors {a.sensor_time_constant:g} s")
    if a.actuator_time_constant:
        parts.append(f"actuators {a.actuator_time_constant:g} s")
    if a.time_delay:
        parts.append(f"delay {a.time_delay:g} s (Padé order {a.pade_order})")
    return "; ".join(parts) or "engaged, nothing in it"


def _lag(name, target, time_constant, gain=1.0):
    """Block gain / (tau s + 1) with output ``target``."""
    return Block(name, np.array([[-1.0 / time_constant]]), np.array([[gain / time_constant]]),
                 np.array([[1.0]]), np.zeros((1, 1)), (f"{name}.in",), (target,), (name,))


def connect(blocks, feeds, inputs, outputs):
    """Interconnect named linear blocks (the algebra of a signal-flow diagram).

    Every block input is a weighted sum of block outputs and external
    inputs.  With all blocks stacked (x' = A_b x + B_b u, y = C_b x + D_b u)
    and u = K y + E w::

        y = M (C_b x + D_b E w),  M = (I - D_b K)^-1
        x' = (A_b + B_b K M C_b) x + (B_b E + B_b K M D_b E) w

    (the standard construction, e.g. K. Zhou, J. C. Doyle and K. Glover,
    *Robust and Optimal Control*, 1996, section 3.6 -- from memory; checked
    against ``control.interconnect`` in the tests).

    Parameters
    ----------
    blocks : sequence of Block
    feeds : mapping of str to sequence of (str, float)
        For each block input, its sources (block outputs or external
        inputs) and their gains.
    inputs : sequence of str
        External inputs w.
    outputs : mapping of str to sequence of (str, float)
        Each output as a weighted sum of signals.

    Returns
    -------
    A, B, C, D : numpy.ndarray
    states : tuple of str
    """
    parts = _stacked(blocks, feeds, inputs, outputs)
    return (*_closed(*parts[:-1]), parts[-1])


def _stacked(blocks, feeds, inputs, outputs):
    """The stacked blocks and the connection matrices of :func:`connect`."""
    u_names = [name for b in blocks for name in b.inputs]
    y_names = [name for b in blocks for name in b.outputs]
    n = sum(len(b.states) for b in blocks)
    nu, ny, nw = len(u_names), len(y_names), len(inputs)
    Ab, Bb = np.zeros((n, n)), np.zeros((n, nu))
    Cb, Db = np.zeros((ny, n)), np.zeros((ny, nu))
    i = j = k = 0
    for b in blocks:
        ns, ni, no = len(b.states), len(b.inputs), len(b.outputs)
        Ab[i:i + ns, i:i + ns] = b.A
        Bb[i:i + ns, j:j + ni] = b.B
        Cb[k:k + no, i:i + ns] = b.C
        Db[k:k + no, j:j + ni] = b.D
        i, j, k = i + ns, j + ni, k + no
    y_index = {name: index for index, name in enumerate(y_names)}
    w_index = {name: index for index, name in enumerate(inputs)}

    def weights(sources):
        ky, kw = np.zeros(ny), np.zeros(nw)
        for source, gain in sources:
            if source in y_index:
                ky[y_index[source]] += gain
            elif source in w_index:
                kw[w_index[source]] += gain
            else:
                raise KeyError(f"no signal {source!r}")
        return ky, kw

    K, E = np.zeros((nu, ny)), np.zeros((nu, nw))
    for row, name in enumerate(u_names):
        K[row], E[row] = weights(feeds.get(name, ()))
    rows = [weights(sources) for sources in outputs.values()]
    Sy = np.array([r[0] for r in rows]).reshape(len(rows), ny)
    Sw = np.array([r[1] for r in rows]).reshape(len(rows), nw)
    states = tuple(name for b in blocks for name in b.states)
    return Ab, Bb, Cb, Db, K, E, Sy, Sw, states


def _closed(Ab, Bb, Cb, Db, K, E, Sy, Sw):
    """Close the connections (the equations of :func:`connect`)."""
    M = np.linalg.inv(np.eye(len(Db)) - Db @ K)
    Cy = M @ Cb
    Dy = M @ Db @ E
    A = Ab + Bb @ K @ Cy
    B = Bb @ E + Bb @ K @ Dy
    return A, B, Sy @ Cy, Sy @ Dy + Sw


def augmentation_blocks(model: LateralModel, augmentation: Augmentation, loop_gain=1.0):
    """Blocks, feeds and outputs of the augmented aircraft (see the module notes).

    Parameters
    ----------
    model : LateralModel
        The bare airframe (states beta, p, r, phi; inputs aileron and rudder
        surface, then any further inputs such as gusts, which pass straight
        to the airframe as external inputs of the closed loop).
    augmentation : Augmentation
    loop_gain : float
        Factor on the yaw- and roll-damper gains (1: as given; 0: the loops open).

    Returns
    -------
    blocks : list of Block
    feeds : dict
    outputs : dict
    """
    aug = augmentation
    airframe = Block("airframe", np.asarray(model.A, float), np.asarray(model.B, float),
                     np.asarray(model.C, float), np.asarray(model.D, float),
                     tuple(f"airframe.{name}" for name in model.input_names), tuple(model.output_names),
                     tuple(model.state_names))
    blocks = [airframe]
    feeds = {f"airframe.{name}": [(name, 1.0)] for name in model.input_names[2:]}
    k_yaw = aug.yaw_damper_gain * loop_gain
    k_roll = aug.roll_damper_gain * loop_gain

    def rate_source(rate, block_name):
        if aug.sensor_time_constant is None:
            return rate
        block = _lag(block_name, f"{rate}_sensed", aug.sensor_time_constant)
        blocks.append(block)
        feeds[block.inputs[0]] = [(rate, 1.0)]
        return block.outputs[0]

    aileron_command = [("aileron", 1.0)]
    if aug.roll_damper_gain != 0.0:
        aileron_command.append((rate_source("p", "roll_rate_sensor"), k_roll))
    rudder_command = [("rudder", 1.0)]
    if aug.yaw_damper_gain != 0.0:
        yaw = rate_source("r", "yaw_rate_sensor")
        if aug.washout_time_constant is not None:
            tau = aug.washout_time_constant
            washout = Block("washout", np.array([[-1.0 / tau]]), np.array([[1.0 / tau]]),
                            np.array([[-1.0]]), np.array([[1.0]]), ("washout.in",), ("r_washed",),
                            ("washout",))
            blocks.append(washout)
            feeds["washout.in"] = [(yaw, 1.0)]
            yaw = "r_washed"
        rudder_command.append((yaw, k_yaw))
    if aug.interconnect_gain != 0.0:
        if aug.interconnect_time_constant is None:
            rudder_command += [(source, gain * aug.interconnect_gain) for source, gain in aileron_command]
        else:
            block = _lag("interconnect_lag", "interconnect_rudder", aug.interconnect_time_constant,
                         aug.interconnect_gain)
            blocks.append(block)
            feeds[block.inputs[0]] = list(aileron_command)
            rudder_command.append(("interconnect_rudder", 1.0))
    surfaces = {}
    for surface, command in (("aileron", aileron_command), ("rudder", rudder_command)):
        sources = command
        if aug.time_delay > 0.0:
            A, B, C, D = pade(aug.time_delay, aug.pade_order)
            name = f"{surface}_delay"
            block = Block(name, A, B, C, D, (f"{name}.in",), (f"{surface}_delayed",),
                          tuple(f"{name}_{k + 1}" for k in range(aug.pade_order)))
            blocks.append(block)
            feeds[block.inputs[0]] = sources
            sources = [(block.outputs[0], 1.0)]
        if aug.actuator_time_constant is not None:
            block = _lag(f"{surface}_actuator", f"{surface}_actuator_out", aug.actuator_time_constant)
            blocks.append(block)
            feeds[block.inputs[0]] = sources
            sources = [(block.outputs[0], 1.0)]
        feeds[f"airframe.{surface}"] = sources
        surfaces[f"{surface}_surface"] = sources
    outputs = {name: [(name, 1.0)] for name in model.output_names}
    outputs.update(surfaces)
    return blocks, feeds, outputs


@dataclass(frozen=True)
class AugmentedModel(LateralModel):
    """The closed-loop augmented aircraft of one flight condition.

    A :class:`latdyn.model.LateralModel` whose inputs are the pilot's aileron
    and rudder [rad] and whose outputs are the airframe's (beta, p, r, phi,
    ny) and the surface deflections :data:`SURFACE_OUTPUTS`; the first four
    states are the airframe's.  Adds ``bare`` (the airframe alone),
    ``augmentation`` and ``state_blocks`` (the block of each state).
    """

    bare: LateralModel | None = None
    augmentation: Augmentation | None = None
    state_blocks: tuple = ()


def _assemble(model, augmentation, loop_gain=1.0):
    blocks, feeds, outputs = augmentation_blocks(model, augmentation, loop_gain)
    A, B, C, D, states = connect(blocks, feeds, tuple(model.input_names), outputs)
    owners = tuple(b.name for b in blocks for _ in b.states)
    return A, B, C, D, states, tuple(outputs), owners, blocks


def augmented_model(model: LateralModel, augmentation: Augmentation) -> AugmentedModel:
    """The closed loop of an airframe model with its augmentation (:func:`augmentation_blocks`, :func:`connect`)."""
    A, B, C, D, states, outputs, owners, _ = _assemble(model, augmentation)
    return AugmentedModel(A, B, C, D, states, tuple(model.input_names), outputs, model.axes,
                          model.speed, model.alpha_equations, model.theta, model.derivatives,
                          model.name, model, augmentation, owners)


def is_augmented(condition) -> bool:
    """The condition has an engaged augmentation."""
    return getattr(condition, "augmentation", None) is not None


def condition_model(aircraft, condition, augmented=True):
    """The model of a condition: the augmented closed loop where it has one.

    Returns
    -------
    LateralModel or AugmentedModel
    """
    if isinstance(condition, str):
        condition = aircraft.condition(condition)
    model = lateral_model(aircraft, condition)
    if augmented and is_augmented(condition):
        return augmented_model(model, condition.augmentation)
    return model


def bare_aircraft(aircraft):
    """The aircraft with every condition's augmentation taken off."""
    return replace(aircraft, conditions=tuple(replace(c, augmentation=None) for c in aircraft.conditions))


def _assign(previous, current):
    """Order ``current`` roots to follow ``previous`` (least total distance); also each root's move."""
    from scipy.optimize import linear_sum_assignment

    cost = np.abs(previous[:, None] - current[None, :])
    rows, cols = linear_sum_assignment(cost)
    order = np.empty(len(previous), dtype=int)
    order[rows] = cols
    return current[order], np.abs(current[order] - previous)


def _room(roots, labels):
    """Each root's distance to the nearest distinct root of another name.

    Coincident roots and roots of one name (the two roots of a pair) are
    interchangeable: swapping them changes no name; so are the aileron and
    rudder channels' roots of one kind of block (identical blocks, named by
    channel only for the reader).
    """
    gaps = np.abs(roots[:, None] - roots[None, :])
    scale = max(float(np.abs(roots).max()), 1.0)
    names = np.asarray([label.replace("aileron_", "").replace("rudder_", "") for label in labels])
    apart = (gaps > 1e-9 * scale) & (names[:, None] != names[None, :])
    return np.where(apart, gaps, np.inf).min(axis=1)


def loop_matrices(model: LateralModel, augmentation: Augmentation):
    """The closed loop's state matrix as a function of the loop gain.

    The feedback gains enter the connection matrix linearly, K(k) = K0 + k (K1 - K0),
    so A(k) = A_b + B_b K(k) (I - D_b K(k))^-1 C_b is cheap to evaluate for any k.

    Returns
    -------
    callable
        k -> A(k) [1/s].
    blocks : list of Block
    """
    blocks, feeds, outputs = augmentation_blocks(model, augmentation, 0.0)
    open_parts = _stacked(blocks, feeds, tuple(model.input_names), outputs)
    closed_blocks, closed_feeds, _ = augmentation_blocks(model, augmentation, 1.0)
    closed_parts = _stacked(closed_blocks, closed_feeds, tuple(model.input_names), outputs)
    Ab, Bb, Cb, Db, K0, E, Sy, Sw, _ = open_parts
    change = closed_parts[4] - K0

    def matrix(gain):
        K = K0 + gain * change
        return Ab + Bb @ K @ np.linalg.solve(np.eye(len(Db)) - Db @ K, Cb)

    return matrix, blocks


def track_roots(model: LateralModel, augmentation: Augmentation, steps=16):
    """Roots of the closed loop named by continuity from the open loops.

    At loop gain 0 the roots are the bare airframe's (named by
    :func:`latdyn.modes.find_modes`) and each block's own; the gain is
    raised to 1 in steps (halved where a root moves more than half its
    distance to the nearest root of another name), each root following the nearest
    root of the next step (an optimal assignment).

    Returns
    -------
    roots : numpy.ndarray of complex
        The closed-loop roots.
    labels : list of str
        Airframe mode name or block name of each root.
    """
    matrix, blocks = loop_matrices(model, augmentation)
    roots, labels = [], []
    for mode in find_modes(model):
        roots += list(mode.eigenvalues)
        labels += [mode.name] * len(mode.eigenvalues)
    for block in blocks[1:]:
        values = np.linalg.eigvals(block.A)
        roots += list(values)
        labels += [block.name] * len(values)
    current, _ = _assign(np.array(roots, dtype=complex), np.linalg.eigvals(matrix(0.0)))
    gain, step = 0.0, 1.0 / steps
    while gain < 1.0:
        trial = min(1.0, gain + step)
        moved, moves = _assign(current, np.linalg.eigvals(matrix(trial)))
        if np.any(moves > _room(current, labels) / 2.0) and step > 1e-3:
            step /= 2.0
            continue
        current, gain = moved, trial
        step = min(step * 2.0, 1.0 / steps)
    return current, labels


def _pattern_index(names, dutch_oscillatory):
    if "roll_spiral" in names:
        return 1 if dutch_oscillatory else 3
    return 0 if dutch_oscillatory else 2


def augmented_modes(model: AugmentedModel, imag_tolerance=1e-7) -> ModeSet:
    """Named modes of the closed loop, with the added roots (``ModeSet.added``).

    The airframe's Dutch roll, roll subsidence and spiral (or roll-spiral
    oscillation) are named by :func:`track_roots`; two real roots that
    couple into a pair across a roll/spiral label form a roll-spiral
    oscillation; an oscillation formed by one root of the Dutch roll (or
    roll-spiral) and a block's root, while the mode's other root is real,
    is that mode (coupled with the block) and the real root is named for
    the block.  A roll or spiral root that couples with a block's root
    into an oscillation is listed with the added roots under both names
    (the airframe mode then has no separate root to grade).  Mode shapes are the airframe part (beta, p, r, phi) of the
    closed-loop eigenvectors.
    """
    roots, labels = track_roots(model.bare, model.augmentation)
    values, vectors = np.linalg.eig(model.A)
    order, _ = _assign(roots, values)
    index = [int(np.argmin(np.abs(values - root))) for root in order]
    vectors = vectors[:, index]
    scale = max(float(np.abs(model.A).max()), 1e-300)
    neutral = 1e-12 * scale
    is_real = np.abs(roots.imag) <= imag_tolerance * scale
    roots = np.where(is_real, roots.real + 0j, roots)
    # group roots: a complex root with its conjugate; real roots alone
    groups, used = [], set()
    for i in range(len(roots)):
        if i in used:
            continue
        used.add(i)
        if is_real[i]:
            groups.append([i])
            continue
        partner = min((j for j in range(len(roots)) if j not in used and not is_real[j]),
                      key=lambda j: abs(roots[j] - np.conj(roots[i])), default=None)
        if partner is not None:
            used.add(partner)
            groups.append([i, partner] if roots[i].imag > 0 else [partner, i])
        else:
            groups.append([i])
    labels = list(labels)
    for group in groups:
        # an oscillation of a two-root airframe mode and a block's root, with the mode's other
        # root left real: the oscillation is the mode (coupled with the block), the real root the block's
        names = {labels[i] for i in group}
        pair_name = next((n for n in names if n in ("dutch_roll", "roll_spiral")), None)
        other = next((n for n in names if n not in _AIRFRAME_MODES), None)
        if len(group) == 2 and pair_name and other:
            rest = [j for j in range(len(roots)) if labels[j] == pair_name and j not in group and is_real[j]]
            if len(rest) == 1:
                labels[rest[0]] = other
                for i in group:
                    labels[i] = pair_name
    airframe, added = {}, []
    for group in groups:
        names = {labels[i] for i in group}
        if names <= set(_AIRFRAME_MODES):
            for i in group:
                airframe.setdefault(labels[i], []).append(i)
        else:
            name = "_and_".join(sorted(names))
            added.append((name, group))
    modes = []
    dutch = airframe.get("dutch_roll", [])
    dutch_oscillatory = len(dutch) == 2 and not is_real[dutch[0]]
    if dutch:
        dutch = sorted(dutch, key=lambda i: (-roots[i].imag, -roots[i].real))
        if not dutch_oscillatory:
            dutch = sorted(dutch, key=lambda i: -roots[i].real)
        vector = vectors[:4, dutch[0]]
        ratio = abs(vector[3]) / abs(vector[0]) if abs(vector[0]) > 0 else math.inf
        modes.append(_make_mode("dutch_roll", roots[dutch], vector, neutral, ratio, reference="beta"))
    rest = [i for name in ("roll_subsidence", "spiral", "roll_spiral") for i in airframe.get(name, [])]
    pair = [i for i in rest if not is_real[i]]
    if len(pair) == 2:
        pair = sorted(pair, key=lambda i: -roots[i].imag)
        modes.append(_make_mode("roll_spiral", roots[pair], vectors[:4, pair[0]], neutral))
    elif len(rest) == 2:
        faster, slower = sorted(rest, key=lambda i: -abs(roots[i].real))
        modes.append(_make_mode("roll_subsidence", [roots[faster]], vectors[:4, faster], neutral))
        modes.append(_make_mode("spiral", [roots[slower]], vectors[:4, slower], neutral))
    else:
        for i in rest:
            if is_real[i] and labels[i] in ("roll_subsidence", "spiral"):
                modes.append(_make_mode(labels[i], [roots[i]], vectors[:4, i], neutral))
            else:
                added.append((labels[i], [i]))
    added_modes = []
    for name, group in added:
        group = sorted(group, key=lambda i: -roots[i].imag)
        added_modes.append(_make_mode(name, roots[group], vectors[:4, group[0]], neutral))
    names = {m.name for m in modes}
    return ModeSet(tuple(modes), PATTERNS[_pattern_index(names, dutch_oscillatory)], tuple(added_modes))


def model_modes(model) -> ModeSet:
    """Modes of a bare or augmented model (the one call for both)."""
    if isinstance(model, AugmentedModel):
        return augmented_modes(model)
    return find_modes(model)


def actuator_rate_limits(condition, model) -> dict:
    """Rate limits [rad/s] of the augmented model's actuators from the condition's ``[controls]``.

    Only actuators that exist (an ``actuator_time_constant``) can be rate
    limited; an empty dict means the response is linear.
    """
    controls = getattr(condition, "controls", None)
    if not isinstance(model, AugmentedModel) or controls is None:
        return {}
    limits = {}
    for surface in ("aileron", "rudder"):
        rate = getattr(controls, f"{surface}_rate", None)
        if rate is not None and f"{surface}_actuator" in model.state_names:
            limits[surface] = float(rate)
    return limits


@dataclass(frozen=True)
class RateLimitedRun:
    """A rate-limited response and where the limits acted.

    Attributes
    ----------
    response : latdyn.responses.Response
    limits : dict
        Surface -> rate limit [rad/s].
    limited_time : dict
        Surface -> time spent on the limit [s].
    step : float
        Integration step [s].
    """

    response: object
    limits: dict
    limited_time: dict
    step: float

    def __iter__(self):
        return iter((self.response, self.limits, self.limited_time))


#: Most Runge-Kutta steps of one rate-limited run (a few seconds of integration; a typical run
#: needs a few thousand).  A closed loop so fast that its run would need more (a time constant
#: of 1e-30 s asks for 1e31 steps) is refused (:class:`StiffRun`) instead of integrated for ever.
MAX_RATE_LIMITED_STEPS = 1_000_000


class StiffRun(ValueError):
    """A rate-limited run would need more than :data:`MAX_RATE_LIMITED_STEPS` integration steps.

    Attributes
    ----------
    steps : float
        The steps the run would need.
    fastest : float
        The closed loop's fastest root magnitude |lambda| [1/s].
    """

    def __init__(self, steps, fastest):
        super().__init__(f"a rate-limited run of {steps:.3g} integration steps (fastest root "
                         f"{fastest:.3g} 1/s)")
        self.steps = steps
        self.fastest = fastest


def fastest_setting(augmentation: Augmentation):
    """The augmentation key of the shortest time scale and that time scale [s], or None.

    The time constants as given; the delay as ``time_delay / (2 pade_order)`` (the Padé
    approximation's fastest poles grow with the order as about 2 n / delay; common practice).
    """
    scales = {key: getattr(augmentation, key) for key in
              ("washout_time_constant", "interconnect_time_constant", "actuator_time_constant",
               "sensor_time_constant")}
    if augmentation.time_delay > 0:
        scales["time_delay"] = augmentation.time_delay / (2 * augmentation.pade_order)
    scales = {key: value for key, value in scales.items() if value}
    if not scales:
        return None
    key = min(scales, key=scales.get)
    return key, scales[key]


def simulate_rate_limited(model: AugmentedModel, history, limits, initial=None, label="") -> RateLimitedRun:
    """Time response of the augmented aircraft with rate-limited actuators (nonlinear).

    The closed loop x' = A x + B u is linear except for the actuator states,
    whose rate (their row of A x + B u: (command - deflection) / tau) is
    clipped to +-limit.  Integrated by the classical fourth-order Runge-Kutta
    method with the input held over each sample (E. Hairer, S. P. Nørsett
    and G. Wanner, *Solving Ordinary Differential Equations I*, 2nd ed.,
    1993, section II.1 -- from memory), sub-steps no longer than 0.5 / |lambda|max
    of the closed loop.  With limits never reached it agrees with the exact
    linear simulation to the integration error (tested).

    Parameters
    ----------
    model : AugmentedModel
    history : latdyn.inputs.InputHistory
    limits : dict
        "aileron" and/or "rudder" -> rate limit [rad/s].
    initial : latdyn.inputs.InitialDisturbance, optional
    label : str

    Returns
    -------
    RateLimitedRun

    Raises
    ------
    StiffRun
        The run would need more than :data:`MAX_RATE_LIMITED_STEPS` steps (a closed loop far
        faster than the time step: a time constant of microseconds or less).
    """
    from latdyn.responses import Response, with_heading

    A, B, C, D, states, outputs = with_heading(np.asarray(model.A), np.asarray(model.B), np.asarray(model.C),
                                               np.asarray(model.D), float(model.theta),
                                               tuple(model.state_names), tuple(model.output_names))
    n = len(states)
    clip_index = np.array([states.index(f"{s}_actuator") for s in limits], dtype=int)
    clip_rate = np.array([limits[s] for s in limits], dtype=float)
    x = np.zeros(n) if initial is None else initial.vector(states)
    time = np.asarray(history.time, dtype=float)
    inputs = np.asarray(history.values, dtype=float)
    fastest = float(np.abs(np.linalg.eigvals(A)).max())
    with np.errstate(over="ignore", invalid="ignore"):
        substeps_each = np.ceil(np.diff(time) * fastest / 0.5)
        steps = float(np.maximum(substeps_each, 1.0).sum()) if np.isfinite(fastest) else math.inf
    if not steps <= MAX_RATE_LIMITED_STEPS:
        raise StiffRun(steps, fastest)
    on_limit = np.zeros(len(clip_index))

    def rate(state, u):
        value = A @ state + B @ u
        value[clip_index] = np.clip(value[clip_index], -clip_rate, clip_rate)
        return value

    trajectory = np.empty((time.size, n))
    trajectory[0] = x
    smallest = np.inf
    for k in range(time.size - 1):
        dt = time[k + 1] - time[k]
        substeps = max(1, int(np.ceil(dt * fastest / 0.5)))
        h = dt / substeps
        smallest = min(smallest, h)
        u = inputs[k]
        for _ in range(substeps):
            k1 = rate(x, u)
            unclipped = (A @ x + B @ u)[clip_index]
            on_limit += h * (np.abs(unclipped) > clip_rate)
            k2 = rate(x + 0.5 * h * k1, u)
            k3 = rate(x + 0.5 * h * k2, u)
            k4 = rate(x + h * k3, u)
            x = x + (h / 6.0) * (k1 + 2 * k2 + 2 * k3 + k4)
        trajectory[k + 1] = x
    out = trajectory @ C.T + inputs @ D.T
    words = ", ".join(f"{s} {math.degrees(r):g} deg/s" for s, r in limits.items())
    description = f"{history.description}; actuator rate limits {words} (nonlinear simulation)"
    if initial is not None and hasattr(initial, "describe") and not initial.is_zero:
        description += f", {initial.describe()}"
    response = Response(time, inputs, trajectory, out, states, tuple(model.input_names), outputs, label,
                        description, "zero", history.end_time)
    return RateLimitedRun(response, dict(limits), {s: float(t) for s, t in zip(limits, on_limit)},
                          float(smallest if np.isfinite(smallest) else 0.0))


@dataclass(frozen=True)
class WashoutEffect:
    """What the yaw damper's washout does in steady turns and to the spiral.

    Attributes
    ----------
    washout_time_constant : float or None
        As given [s] (None: the damper has no washout).
    yaw_damper_gain : float
        [s].
    spiral_bare : float or None
        Spiral root of the bare airframe [1/s].
    spiral_with_washout, spiral_without_washout : float or None
        Spiral root of the closed loop with the washout as given and with it
        taken out [1/s] (None where there is no separate spiral root, or no
        washout to compare).
    yaw_rate_ratio_with_washout, yaw_rate_ratio_without_washout : float or None
        Steady yaw rate per held aileron of the closed loop as a fraction of
        the bare airframe's, r/da(0)_augmented / r/da(0)_bare [-]: 1 means the
        damper leaves steady turns alone; below 1 it fights them.  None where
        the bare airframe or the closed loop has no steady state (a root on
        or right of the imaginary axis, such as a divergent spiral).
    """

    washout_time_constant: float | None
    yaw_damper_gain: float
    spiral_bare: float | None
    spiral_with_washout: float | None
    spiral_without_washout: float | None
    yaw_rate_ratio_with_washout: float | None
    yaw_rate_ratio_without_washout: float | None

    def as_dict(self) -> dict:
        return {name: getattr(self, name) for name in self.__dataclass_fields__}

    def words(self) -> str:
        """One line for the mode table."""
        def pct(value):
            return "-" if value is None else f"{100.0 * value:.0f}%"

        def root(value):
            return "-" if value is None else f"{value:.4g} 1/s"

        if self.yaw_rate_ratio_without_washout is None:
            turn = "no steady turn to compare (a neutral or divergent root)"
        elif self.washout_time_constant is None:
            turn = f"steady-turn yaw rate {pct(self.yaw_rate_ratio_without_washout)} of the bare airframe's"
        else:
            turn = (f"steady-turn yaw rate {pct(self.yaw_rate_ratio_with_washout)} of the bare airframe's "
                    f"with it, {pct(self.yaw_rate_ratio_without_washout)} without")
        if self.washout_time_constant is None:
            return (f"yaw damper without washout: {turn}; spiral root {root(self.spiral_without_washout)} "
                    f"(bare {root(self.spiral_bare)})")
        return (f"washout {self.washout_time_constant:g} s: {turn}; spiral root "
                f"{root(self.spiral_with_washout)} with it, {root(self.spiral_without_washout)} without "
                f"(bare {root(self.spiral_bare)})")


def static_gain(model, output, input):
    """G(0) = D - C A^-1 B of one channel, or None where A is singular (a neutral root).

    Examples
    --------
    >>> from types import SimpleNamespace as NS
    >>> m = NS(A=np.array([[-2.0]]), B=np.array([[4.0]]), C=np.array([[1.0]]), D=np.zeros((1, 1)),
    ...        output_names=("y",), input_names=("u",))
    >>> static_gain(m, "y", "u")
    2.0
    """
    A = np.asarray(model.A, dtype=float)
    i, j = model.output_names.index(output), model.input_names.index(input)
    if np.linalg.cond(A) > 1e12:
        return None
    return float(model.D[i, j] - model.C[i] @ np.linalg.solve(A, model.B[:, j]))


def washout_effect(model: AugmentedModel) -> WashoutEffect | None:
    """The washout's effect on steady turns and on the spiral (None without a yaw damper).

    The steady yaw rate of a turn held with aileron is r/da at s = 0; a yaw
    damper without washout feeds K r back at s = 0 and so opposes the turn,
    r/da(0) = r/da_bare(0) / (1 - K r/dr_bare(0)) when the actuator and
    delay pass steady signals unchanged (block algebra at s = 0; the washout
    tau s / (tau s + 1) is 0 there, so it leaves the ratio at 1).  The spiral
    root of the closed loop shows the same thing in the modes.
    """
    augmentation = model.augmentation
    if not augmentation.yaw_damper_gain:
        return None
    bare = model.bare
    spiral = find_modes(bare).get("spiral")

    def steady(system):
        stable = np.all(np.linalg.eigvals(system.A).real < 0)
        return static_gain(system, "r", "aileron") if stable else None

    bare_gain = steady(bare)

    def figures(aug):
        closed = augmented_model(bare, aug)
        mode = augmented_modes(closed).get("spiral")
        gain = steady(closed)
        ratio = gain / bare_gain if gain is not None and bare_gain not in (None, 0.0) else None
        return (mode.eigenvalue.real if mode is not None else None), ratio

    without = figures(replace(augmentation, washout_time_constant=None))
    given = figures(augmentation) if augmentation.washout_time_constant is not None else (None, None)
    return WashoutEffect(augmentation.washout_time_constant, augmentation.yaw_damper_gain,
                         spiral.eigenvalue.real if spiral is not None else None, given[0], without[0],
                         given[1], without[1])
