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
    "augmented_modes", "model_modes", "bare_aircraft", "is_augmented", "added_label", "describe",
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
    M = np.linalg.inv(np.eye(ny) - Db @ K)
    Cy = M @ Cb
    Dy = M @ Db @ E
    A = Ab + Bb @ K @ Cy
    B = Bb @ E + Bb @ K @ Dy
    rows = [weights(sources) for sources in outputs.values()]
    Sy = np.array([r[0] for r in rows]).reshape(len(rows), ny)
    Sw = np.array([r[1] for r in rows]).reshape(len(rows), nw)
    C = Sy @ Cy
    D = Sy @ Dy + Sw
    states = tuple(name for b in blocks for name in b.states)
    return A, B, C, D, states


def augmentation_blocks(model: LateralModel, augmentation: Augmentation, loop_gain=1.0):
    """Blocks, feeds and outputs of the augmented aircraft (see the module notes).

    Parameters
    ----------
    model : LateralModel
        The bare airframe (states beta, p, r, phi; inputs aileron, rudder surface).
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
                     ("airframe.aileron", "airframe.rudder"), tuple(model.output_names),
                     tuple(model.state_names))
    blocks, feeds = [airframe], {}
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
    """Order ``current`` roots to follow ``previous`` (least total distance)."""
    from scipy.optimize import linear_sum_assignment

    cost = np.abs(previous[:, None] - current[None, :])
    rows, cols = linear_sum_assignment(cost)
    order = np.empty(len(previous), dtype=int)
    order[rows] = cols
    return current[order], float(cost[rows, cols].max())


def track_roots(model: LateralModel, augmentation: Augmentation, steps=48):
    """Roots of the closed loop named by continuity from the open loops.

    At loop gain 0 the roots are the bare airframe's (named by
    :func:`latdyn.modes.find_modes`) and each block's own; the gain is
    raised to 1 in steps (halved where a root moves more than a third of
    the distance to its nearest neighbour), each root following the nearest
    root of the next step (an optimal assignment).

    Returns
    -------
    roots : numpy.ndarray of complex
        The closed-loop roots.
    labels : list of str
        Airframe mode name or block name of each root.
    """
    bare_modes = find_modes(model)
    roots, labels = [], []
    for mode in bare_modes:
        roots += list(mode.eigenvalues)
        labels += [mode.name] * len(mode.eigenvalues)
    _, _, _, _, _, _, _, blocks = _assemble(model, augmentation, 0.0)
    for block in blocks[1:]:
        values = np.linalg.eigvals(block.A)
        roots += list(values)
        labels += [block.name] * len(values)
    current = np.array(roots, dtype=complex)
    current, _ = _assign(current, np.linalg.eigvals(_assemble(model, augmentation, 0.0)[0]))
    gain, step = 0.0, 1.0 / steps
    while gain < 1.0:
        trial = min(1.0, gain + step)
        new = np.linalg.eigvals(_assemble(model, augmentation, trial)[0])
        moved, largest = _assign(current, new)
        gaps = np.abs(current[:, None] - current[None, :]) + np.diag(np.full(len(current), np.inf))
        spacing = float(np.min(gaps)) if len(current) > 1 else np.inf
        if largest > spacing / 3.0 and step > 1e-6:
            step /= 2.0
            continue
        current, gain = moved, trial
        step = min(step * 1.5, 1.0 / steps)
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
    oscillation.  Mode shapes are the airframe part (beta, p, r, phi) of the
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
