"""Handling-qualities levels as pure array functions, vectorised over a batch.

The lowest layer of the assessment: band limits chosen from a criteria set
(:func:`select_bands`) and numpy functions that grade a batch of mode values
against them (:func:`grade`, :func:`dutch_roll_grades`, :func:`roll_grades`,
:func:`spiral_grades`, :func:`roll_spiral_grades`; :func:`mode_levels` does
both steps).  No Python loop runs over the cases: a design study grades a
million Dutch rolls in one call.  :mod:`latdyn.assessment` builds the
per-condition results on top.

Levels are 1, 2, 3, or 4 for "beyond Level 3" (pass/fail sets: 1 pass,
2 fail).  The level bands are guidance only: the applicable certification
basis, local regulations and licensed engineering judgement govern.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from latdyn.criteria_sets import CriteriaSet, LIMIT_KEYS, load_criteria

__all__ = [
    "PARAMETERS", "UNITS", "SYMBOLS", "Grades", "DutchRollLimits", "RollLimits", "SpiralLimits",
    "RollSpiralLimits", "BandSelection", "grade", "dutch_roll_grades", "roll_grades",
    "spiral_grades", "roll_spiral_grades", "select_bands", "grade_mode", "mode_levels",
    "phi_to_beta_excess", "stack_levels", "RollSelection", "select_roll_bands", "grade_roll_performance",
]

#: Parameters a band can limit; ``Grades.governing`` indexes this tuple.
PARAMETERS = ("damping_ratio", "zeta_omega", "natural_frequency", "time_constant",
              "time_to_double", "permitted", "time_to_bank")
#: Unit of each parameter ("" for a ratio).
UNITS = {"damping_ratio": "", "zeta_omega": "rad/s", "natural_frequency": "rad/s",
         "time_constant": "s", "time_to_double": "s", "permitted": "", "time_to_bank": "s"}
#: Trade symbols of each parameter per mode, for tables and plots.
SYMBOLS = {
    ("dutch_roll", "damping_ratio"): "zeta_d", ("dutch_roll", "zeta_omega"): "zeta_d*omega_nd",
    ("dutch_roll", "natural_frequency"): "omega_nd", ("roll_subsidence", "time_constant"): "T_R",
    ("spiral", "time_to_double"): "T_2", ("roll_spiral", "zeta_omega"): "zeta_RS*omega_RS",
    ("roll_spiral", "permitted"): "permitted", ("roll_performance", "time_to_bank"): "t_phi",
}
_INDEX = {name: i for i, name in enumerate(PARAMETERS)}
_LIMIT_PARAMETER = {"min_damping_ratio": "damping_ratio", "min_zeta_omega": "zeta_omega",
                    "min_natural_frequency": "natural_frequency",
                    "max_time_constant": "time_constant", "min_time_to_double": "time_to_double"}
_LN2 = math.log(2.0)


class Grades(NamedTuple):
    """Levels of a batch of modes (arrays with the batch shape ``S``).

    Attributes
    ----------
    level : ndarray of int, shape S
        First grade met: 1, 2, 3 for a levels set, 4 beyond Level 3; for a
        pass/fail set 1 = pass, 2 = fail; 0 = not assessable (a needed value
        is NaN).
    met : ndarray of bool, shape S + (G,)
        Whether each grade's band is met.
    level_margin : ndarray, shape S + (G,)
        Smallest normalised margin over the constraints of each grade
        (fraction of the limit; the margin itself where the limit is 0):
        >= 0 inside the band, continuous in the mode values, for root-finding
        on a level boundary.
    governing : ndarray of int, shape S
        Index into :data:`PARAMETERS` of the constraint that decides the
        margin to the next-better boundary (-1 where not assessable).
    value, limit, margin, margin_fraction : ndarray, shape S
        The governing parameter's value and limit, the margin value - limit
        (limit - value for a maximum; positive inside) in its own units, and
        the margin as a fraction of |limit| (NaN for a zero limit).
    """

    level: np.ndarray
    met: np.ndarray
    level_margin: np.ndarray
    governing: np.ndarray
    value: np.ndarray
    limit: np.ndarray
    margin: np.ndarray
    margin_fraction: np.ndarray


def grade(values, limits, parameters, senses, exclusive=False, levels_only=False) -> Grades:
    """Grade constraints ``sense * (value - limit) >= 0`` into levels.

    Every argument broadcasts to the shape ``S + (G, K)``: G grades (Levels
    1, 2, 3, or one pass/fail grade), K constraints per grade.  A NaN limit
    means "no requirement".  A grade is met when all its constraints are
    met; the level is the first grade met (G + 1 when none is).  The margin
    is taken at the next-better boundary, grade max(level - 1, 1), and the
    governing constraint there is the one with the smallest normalised margin
    (margin / |limit|; the margin itself for a zero limit).  This is common
    practice for reading level tables, not a published formula.

    Parameters
    ----------
    values : array_like
        Constraint values, S + (1 or G, K) [parameter units].
    limits : array_like
        Limits [parameter units]; NaN where a grade does not limit it.
    parameters : array_like of int
        Index into :data:`PARAMETERS` of each constraint.
    senses : array_like
        +1 for a minimum, -1 for a maximum.
    exclusive : array_like of bool
        The value must strictly pass the limit.
    levels_only : bool
        Compute only ``level`` and ``met`` (the margin fields are None): the
        cheaper grading for studies that count levels.

    Returns
    -------
    Grades

    Examples
    --------
    >>> g = grade([[[0.3]], [[0.1]], [[-0.1]]], [[0.19], [0.02], [0.0]], [[0]], [[1]])
    >>> g.level.tolist(), g.margin.round(3).tolist()
    ([1, 2, 4], [0.11, -0.09, -0.1])
    """
    arrays = [np.asarray(values, dtype=float), np.asarray(limits, dtype=float),
              np.asarray(parameters), np.asarray(senses, dtype=float),
              np.asarray(exclusive, dtype=bool)]
    full = np.broadcast_shapes(*(a.shape for a in arrays), (1, 1))
    arrays = [a.reshape((1,) * (len(full) - a.ndim) + a.shape) for a in arrays]
    count, width = full[-2:]

    def column(a, g, k):  # no broadcasting to the batch shape: scalars stay scalars
        return a[..., g if a.shape[-2] > 1 else 0, k if a.shape[-1] > 1 else 0]

    columns = [[tuple(column(a, g, k) for a in arrays) for k in range(width)]
               for g in range(count)]
    return _grade_columns(columns, full[:-2], levels_only)


def _where(condition, yes, no):
    """``np.where``, without a pass over the batch where the condition is one value for all."""
    if np.ndim(condition) == 0:
        return yes if condition else no
    return np.where(condition, yes, no)


def _grade_columns(columns, shape, levels_only=False) -> Grades:
    """:func:`grade` on constraints given per grade and per constraint.

    ``columns[g][k] = (value, limit, parameter, sense, exclusive)``, each an
    array broadcastable to ``shape`` or a scalar (band limits usually are:
    they stay scalars, so a constraint costs a few passes over the batch).
    The loops run over the few grades and constraints, never over the cases.
    With ``levels_only`` only ``level`` and ``met`` are computed.
    """
    if levels_only:
        return _levels_of_columns(columns, shape)
    count = len(columns)
    met = np.empty(shape + (count,), bool)
    level_margin = np.empty(shape + (count,))
    undetermined = np.zeros(shape, bool)
    entries = []  # per grade: (value, limit, margin, fraction, parameter) of each constraint
    chosen = []  # per grade: index of the constraint with the smallest normalised margin
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for g, constraints in enumerate(columns):
            met_g = np.ones(shape, bool)
            smallest = which = None
            grade_entries = []
            for k, (value, limit, parameter, sense, exclusive) in enumerate(constraints):
                value, limit, applicable, margin, missing, ok = _constraint(value, limit, sense, exclusive)
                if missing is not None:
                    undetermined |= missing
                met_g &= ok
                scale = np.abs(limit)
                positive = scale > 0.0
                fraction = _where(positive, margin / _where(positive, scale, 1.0), np.nan)
                normalised = _where(positive, fraction, margin)
                normalised = np.where(np.isnan(normalised), -np.inf, normalised)
                grade_entries.append((value, _where(applicable, limit, np.nan), margin, fraction,
                                      parameter))
                if smallest is None:
                    smallest, which = normalised, 0
                else:
                    better = normalised < smallest
                    smallest = np.where(better, normalised, smallest)
                    which = np.where(better, k, which)
            met[..., g] = met_g
            level_margin[..., g] = smallest
            entries.append(grade_entries)
            chosen.append(which)
    level = _first_met(met, undetermined)
    target = np.clip(level - 2, 0, count - 1)
    # the governing constraint's figures at the next-better boundary
    nan = np.nan
    governing, value, limit, margin, fraction = (np.full(shape, -1), np.full(shape, nan),
                                                 np.full(shape, nan), np.full(shape, nan),
                                                 np.full(shape, nan))
    for g in range(count):
        for k, (value_k, limit_k, margin_k, fraction_k, parameter_k) in enumerate(entries[g]):
            here = (target == g) & (chosen[g] == k) & ~undetermined
            governing = np.where(here, parameter_k, governing)
            value = np.where(here, value_k, value)
            limit = np.where(here, limit_k, limit)
            margin = np.where(here, margin_k, margin)
            fraction = np.where(here, fraction_k, fraction)
    return Grades(level, met, level_margin, governing, value, limit, margin, fraction)


def _levels_of_columns(columns, shape) -> Grades:
    """``level`` and ``met`` of :func:`_grade_columns` alone (the same tests, no margins)."""
    count = len(columns)
    met = np.empty(shape + (count,), bool)
    undetermined = np.zeros(shape, bool)
    with np.errstate(invalid="ignore"):
        for g, constraints in enumerate(columns):
            met_g = np.ones(shape, bool)
            for value, limit, _, sense, exclusive in constraints:
                if np.all(np.isnan(limit)):
                    continue  # no requirement in this grade
                *_, missing, ok = _constraint(value, limit, sense, exclusive)
                if missing is not None:
                    undetermined |= missing
                met_g &= ok
            met[..., g] = met_g
    return Grades(_first_met(met, undetermined), met, None, None, None, None, None, None)


def _constraint(value, limit, sense, exclusive):
    """One constraint ``sense * (value - limit) >= 0`` (strict where ``exclusive``).

    Returns (value, limit, applicable, margin, missing, ok): a NaN limit is no
    requirement (margin +inf, met); a NaN value under a requirement is
    ``missing`` (None when nowhere).
    """
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    applicable = ~np.isnan(limit)
    margin = _where(applicable, sense * (value - limit), np.inf)
    missing = applicable & np.isnan(value)
    ok = margin >= 0.0
    exclusive = np.asarray(exclusive, dtype=bool)
    if exclusive.any():
        ok = ok & ~(exclusive & (margin == 0.0))
    return value, limit, applicable, margin, (missing if np.any(missing) else None), ok


def _first_met(met, undetermined):
    """The first grade met (1-based); G + 1 where none is, 0 where undetermined."""
    count = met.shape[-1]
    level = np.full(met.shape[:-1], count + 1)
    for g in reversed(range(count)):
        level = np.where(met[..., g], g + 1, level)
    return np.where(undetermined, 0, level)


class DutchRollLimits(NamedTuple):
    """Dutch roll band limits per grade (arrays of shape (G,) or S + (G,)).

    Attributes
    ----------
    min_damping_ratio : ndarray
        Least zeta_d [-] (NaN: none).
    min_zeta_omega : ndarray
        Least zeta_d*omega_nd [rad/s] before the |phi/beta| rule (NaN: none).
    min_natural_frequency : ndarray
        Least omega_nd [rad/s] (NaN: none).
    phi_to_beta_coefficient : ndarray
        Rise of the least zeta_d*omega_nd per (rad/s)^2 of omega_nd^2 |phi/beta|_d
        above the threshold [s] (0: no rule).
    phi_to_beta_threshold : float
        [(rad/s)^2].
    damping_ratio_cap : float
        Most zeta_d ever required [-] (NaN: no cap).  Reaching the cap meets it.
    exclusive : ndarray of bool
        zeta_d must exceed ``min_damping_ratio`` strictly.
    zeta_omega_exclusive, frequency_exclusive : ndarray of bool
        zeta_d*omega_nd (with the |phi/beta| rise) and omega_nd must exceed
        their limits strictly (MIL-F-8785C 3.3.1.1 "shall exceed").
    """

    min_damping_ratio: np.ndarray
    min_zeta_omega: np.ndarray
    min_natural_frequency: np.ndarray
    phi_to_beta_coefficient: np.ndarray
    phi_to_beta_threshold: float = 20.0
    damping_ratio_cap: float = np.nan
    exclusive: np.ndarray = np.False_
    zeta_omega_exclusive: np.ndarray = np.False_
    frequency_exclusive: np.ndarray = np.False_


class RollLimits(NamedTuple):
    """Roll-mode limits per grade: most time constant T_R [s] (shape (G,));
    ``exclusive``: T_R must stay strictly below it."""

    max_time_constant: np.ndarray
    exclusive: np.ndarray = np.False_


class SpiralLimits(NamedTuple):
    """Spiral limits per grade: least time to double T_2 [s] (shape (G,));
    ``exclusive``: T_2 must be strictly greater (MIL-F-8785C 3.3.1.3)."""

    min_time_to_double: np.ndarray
    exclusive: np.ndarray = np.False_


class RollSpiralLimits(NamedTuple):
    """Coupled roll-spiral limits per grade: least zeta*omega [rad/s] (shape (G,));
    ``exclusive``: zeta*omega must exceed it (MIL-F-8785C 3.3.1.4)."""

    min_zeta_omega: np.ndarray
    exclusive: np.ndarray = np.False_


def phi_to_beta_excess(natural_frequency, phi_to_beta, threshold=20.0):
    """Excess of omega_nd^2 |phi/beta|_d over its threshold, ``max(0, omega^2 |phi/beta| - threshold)``.

    MIL-F-8785C 3.3.1.1, Table VI note [recalled]: when omega_nd^2 |phi/beta|_d
    exceeds 20 (rad/s)^2 the least zeta_d*omega_nd rises by 0.014, 0.009 and
    0.005 times this excess for Levels 1, 2 and 3.

    Parameters
    ----------
    natural_frequency : array_like
        omega_nd [rad/s].
    phi_to_beta : array_like
        |phi/beta|_d, bank to sideslip amplitude ratio in the mode [-].
    threshold : float
        [(rad/s)^2].

    Returns
    -------
    ndarray
        [(rad/s)^2].

    Examples
    --------
    >>> float(phi_to_beta_excess(2.0, 10.0))
    20.0
    """
    omega = np.asarray(natural_frequency, dtype=float)
    return np.maximum(0.0, omega * omega * np.asarray(phi_to_beta, dtype=float) - threshold)


def dutch_roll_grades(damping_ratio, natural_frequency, phi_to_beta, limits: DutchRollLimits,
                      levels_only=False) -> Grades:
    """Levels of Dutch roll modes from zeta_d, omega_nd and |phi/beta|_d.

    Per grade the requirements are (MIL-F-8785C 3.3.1.1, Table VI and its
    notes [recalled])::

        zeta_d >= max(zeta_min, (zeta_omega_min + c (omega^2 |phi/beta| - 20)+) / omega_nd),
                  capped at zeta_cap (0.7 for Class III)
        omega_nd >= omega_min

    The damping requirement giving the larger zeta_d governs; it is reported
    in zeta_d or in zeta_d*omega_nd [rad/s], whichever sets it.  A missing
    zeta_omega_min is taken as 0 when the |phi/beta| rule raises it (the
    rule's Level 3 coefficient implies that reading: common practice).

    Parameters
    ----------
    damping_ratio : array_like, shape S
        zeta_d, signed [-].
    natural_frequency : array_like, shape S
        omega_nd [rad/s].
    phi_to_beta : array_like, shape S
        |phi/beta|_d [-]; NaN is only harmful where the rule applies.
    limits : DutchRollLimits

    Returns
    -------
    Grades
        ``governing`` is "damping_ratio", "zeta_omega" or "natural_frequency".

    Examples
    --------
    >>> lim = DutchRollLimits(np.array([0.08, 0.02, 0.0]), np.array([0.15, 0.05, np.nan]),
    ...                       np.array([0.4, 0.4, 0.4]), np.array([0.014, 0.009, 0.005]))
    >>> g = dutch_roll_grades([0.1, 0.1], [1.0, 2.5], [1.0, 1.0], lim)
    >>> g.level.tolist(), [PARAMETERS[i] for i in g.governing]
    ([2, 1], ['zeta_omega', 'damping_ratio'])
    """
    zeta = np.asarray(damping_ratio, dtype=float)
    omega = np.asarray(natural_frequency, dtype=float)
    ratio = np.asarray(phi_to_beta, dtype=float)
    shape = np.broadcast_shapes(zeta.shape, omega.shape, ratio.shape)
    zeta, omega = np.broadcast_to(zeta, shape), np.broadcast_to(omega, shape)
    min_zeta = np.asarray(limits.min_damping_ratio, dtype=float)
    min_zw = np.asarray(limits.min_zeta_omega, dtype=float)
    min_omega = np.asarray(limits.min_natural_frequency, dtype=float)
    coefficient = np.asarray(limits.phi_to_beta_coefficient, dtype=float)
    exclusive = np.broadcast_to(np.asarray(limits.exclusive, dtype=bool), min_zeta.shape)
    zw_exclusive = np.broadcast_to(np.asarray(limits.zeta_omega_exclusive, dtype=bool), min_zeta.shape)
    omega_exclusive = np.broadcast_to(np.asarray(limits.frequency_exclusive, dtype=bool), min_zeta.shape)
    cap = np.asarray(limits.damping_ratio_cap, dtype=float)
    count = min_zeta.shape[-1]
    with np.errstate(invalid="ignore", divide="ignore"):
        excess = phi_to_beta_excess(omega, ratio, limits.phi_to_beta_threshold)
        product = zeta * omega
        positive = omega > 0.0
        safe_omega = np.where(positive, omega, 1.0)
        columns = []
        for g in range(count):
            c = coefficient[..., g]
            rise = np.where(c > 0.0, c * excess, 0.0)
            zw_required = np.where(np.isnan(min_zw[..., g]) & (rise > 0.0), 0.0, min_zw[..., g]) + rise
            zeta_from_zw = np.where(positive, zw_required / safe_omega, np.inf)
            zeta_from_zw = np.where(np.isnan(zw_required), np.nan, zeta_from_zw)
            required = np.fmax(min_zeta[..., g], zeta_from_zw)
            capped = required > cap
            use_zw = ~capped & ~np.isnan(zeta_from_zw) & (np.isnan(min_zeta[..., g])
                                                          | (zeta_from_zw > min_zeta[..., g]))
            damping = (np.where(use_zw, product, zeta),
                       np.where(use_zw, zw_required, np.where(capped, cap, min_zeta[..., g])),
                       np.where(use_zw, _INDEX["zeta_omega"], _INDEX["damping_ratio"]), 1.0,
                       np.where(use_zw, zw_exclusive[..., g], exclusive[..., g]) & ~capped)
            frequency = (omega, min_omega[..., g], _INDEX["natural_frequency"], 1.0,
                         omega_exclusive[..., g])
            columns.append([damping, frequency])
    return _grade_columns(columns, shape, levels_only)


def roll_grades(roll_root, limits: RollLimits, levels_only=False) -> Grades:
    """Levels of roll subsidence modes from the real roll root.

    T_R = -1 / lambda_roll (MIL-F-8785C 3.3.1.2, Table VII [recalled]); a
    neutral or divergent root (lambda >= 0) has no time constant and is beyond
    Level 3 (its value is reported as infinite).

    Parameters
    ----------
    roll_root : array_like, shape S
        Real eigenvalue lambda_roll [1/s].
    limits : RollLimits

    Returns
    -------
    Grades

    Examples
    --------
    >>> g = roll_grades([-2.0, -0.5, 0.1], RollLimits(np.array([1.4, 3.0, 10.0])))
    >>> g.level.tolist(), g.value.tolist()
    ([1, 2, 4], [0.5, 2.0, inf])
    """
    root = np.asarray(roll_root, dtype=float)
    with np.errstate(divide="ignore"):
        constant = np.where(root < 0.0, -1.0 / np.where(root < 0.0, root, -1.0), np.inf)
    constant = np.where(np.isnan(root), np.nan, constant)
    return grade(constant[..., None, None], np.asarray(limits.max_time_constant, float)[..., None],
                 _INDEX["time_constant"], -1.0, np.asarray(limits.exclusive, bool)[..., None], levels_only)


def spiral_grades(spiral_root, limits: SpiralLimits, levels_only=False) -> Grades:
    """Levels of spiral modes from the real spiral root.

    T_2 = ln 2 / lambda for a divergent root (MIL-F-8785C 3.3.1.3, Table VIII
    [recalled]); a convergent or neutral spiral meets every level (its time to
    double is reported as infinite).

    Parameters
    ----------
    spiral_root : array_like, shape S
        Real eigenvalue lambda_spiral [1/s].
    limits : SpiralLimits

    Returns
    -------
    Grades

    Examples
    --------
    >>> g = spiral_grades([-0.01, 0.05, 0.5], SpiralLimits(np.array([20.0, 8.0, 4.0])))
    >>> g.level.tolist()
    [1, 2, 4]
    """
    root = np.asarray(spiral_root, dtype=float)
    with np.errstate(divide="ignore"):
        double = np.where(root > 0.0, _LN2 / np.where(root > 0.0, root, 1.0), np.inf)
    double = np.where(np.isnan(root), np.nan, double)
    return grade(double[..., None, None], np.asarray(limits.min_time_to_double, float)[..., None],
                 _INDEX["time_to_double"], 1.0, np.asarray(limits.exclusive, bool)[..., None], levels_only)


def roll_spiral_grades(damping_ratio, natural_frequency, limits: RollSpiralLimits, permitted=True,
                       levels_only=False) -> Grades:
    """Levels of coupled roll-spiral oscillations from zeta_RS and omega_RS.

    zeta_RS*omega_RS >= limit (MIL-F-8785C 3.3.1.4 [recalled]); where the
    oscillation is not permitted (Category A combat and ground attack) it is
    beyond every grade (governing "permitted").

    Parameters
    ----------
    damping_ratio, natural_frequency : array_like, shape S
        zeta_RS [-], omega_RS [rad/s].
    limits : RollSpiralLimits
    permitted : array_like of bool, shape S
        Whether the flight phase permits the oscillation.

    Returns
    -------
    Grades

    Examples
    --------
    >>> g = roll_spiral_grades([0.5, 0.5], [1.2, 1.2], RollSpiralLimits(np.array([0.5, 0.3, 0.15])),
    ...                        permitted=[True, False])
    >>> g.level.tolist(), [PARAMETERS[i] for i in g.governing]
    ([1, 4], ['zeta_omega', 'permitted'])
    """
    zw = np.asarray(damping_ratio, dtype=float) * np.asarray(natural_frequency, dtype=float)
    allowed = np.asarray(permitted, dtype=float)
    minimum = np.asarray(limits.min_zeta_omega, dtype=float)
    shape = np.broadcast_shapes(zw.shape, allowed.shape, minimum.shape[:-1])
    # "permitted": a constraint allowed >= 1 that holds only where the phase forbids the mode
    forbidden = np.where(allowed > 0.0, np.nan, 1.0)
    strict = np.broadcast_to(np.asarray(limits.exclusive, dtype=bool), minimum.shape)
    columns = [[(zw, minimum[..., g], _INDEX["zeta_omega"], 1.0, strict[..., g]),
                (allowed, forbidden, _INDEX["permitted"], 1.0, False)]
               for g in range(minimum.shape[-1])]
    return _grade_columns(columns, shape, levels_only)


# ============================================================ band selection
@dataclass(frozen=True)
class BandSelection:
    """The limits one criteria set puts on one mode for one class/category.

    Attributes
    ----------
    criteria : CriteriaSet
    mode : str
    airplane_class, category, flight_phase : str or None
    altitude : float or None
        [m]
    limits : DutchRollLimits, RollLimits, SpiralLimits or RollSpiralLimits
        Arrays of shape (G,).
    bands : tuple of ((parameter, grade index), Band)
        The band that sets each limit.
    undefined : tuple of int
        Grades (1-based) no band covers: the mode cannot be graded.
    notes : tuple of str
    """

    criteria: CriteriaSet
    mode: str
    airplane_class: str | None
    category: str | None
    flight_phase: str | None
    altitude: float | None
    limits: tuple
    bands: tuple
    undefined: tuple
    notes: tuple
    not_permitted: object = None

    def band(self, parameter, grade_index):
        """The band that sets a limit, or None."""
        for key, band in self.bands:
            if key == (parameter, grade_index):
                return band
        return None


def select_bands(criteria: CriteriaSet, mode, airplane_class, category, flight_phase=None,
                 altitude=None) -> BandSelection:
    """Limits a criteria set puts on one mode for a class, category, sub-phase and altitude.

    Where several bands hold for the same grade (a sub-phase row on top of
    the category row) the strictest value of each limit holds.

    Parameters
    ----------
    criteria : CriteriaSet
    mode : str
        "dutch_roll", "roll_subsidence", "spiral" or "roll_spiral".
    airplane_class : str or None
        "I", "II-C", "II-L", "III" or "IV".
    category : str or None
        "A", "B" or "C".
    flight_phase : str or None
        A sub-phase such as "combat" or "ground_attack".
    altitude : float or None
        Standard pressure (geopotential) altitude [m].

    Returns
    -------
    BandSelection

    Examples
    --------
    >>> from latdyn.criteria_sets import load_criteria
    >>> s = select_bands(load_criteria("mil-f-8785c"), "roll_subsidence", "IV", "A")
    >>> s.limits.max_time_constant.tolist()
    [1.0, 1.4, 10.0]
    """
    entry = criteria.mode(mode)
    if entry is None:
        raise KeyError(f"{criteria.name} has no bands for {mode}")
    count = criteria.grades
    keys = tuple(LIMIT_KEYS[mode])
    values = {key: np.full(count, np.nan) for key in keys}
    strict = {key: np.zeros(count, bool) for key in keys}
    chosen = {}
    covered = np.zeros(count, bool)
    notes = []
    for band in entry.bands:
        g = 0 if band.level is None else band.level - 1
        if not band.applies(airplane_class, category, flight_phase, altitude):
            if (flight_phase is None and band.flight_phases is not None
                    and band.applies(airplane_class, category, band.flight_phases[0], altitude)):
                notes.append(f'{criteria.name}: band "{band.row}" holds only in the '
                             + " and ".join(p.replace("_", "-") for p in band.flight_phases)
                             + " phases; not applied: the condition states no flight phase")
            continue
        covered[g] = True
        for key, limit in band.limits:
            sense = LIMIT_KEYS[mode][key]
            current = values[key][g]
            stricter = np.isnan(current) or (limit > current if sense > 0 else limit < current)
            # equal limits: the later band, unless only the earlier one is strict
            if stricter or (limit == current and (band.exclusive or not strict[key][g])):
                values[key][g] = limit
                strict[key][g] = band.exclusive
                chosen[(_LIMIT_PARAMETER[key], g)] = band
    undefined = tuple(int(g) + 1 for g in np.flatnonzero(~covered))
    not_permitted = None
    if mode == "dutch_roll":
        rule, cap = entry.phi_to_beta_rule, entry.damping_ratio_cap
        limits = DutchRollLimits(
            values["min_damping_ratio"], values["min_zeta_omega"], values["min_natural_frequency"],
            np.asarray(rule.coefficients, float) if rule else np.zeros(count),
            rule.threshold if rule else 20.0,
            cap.value if cap and airplane_class in cap.classes else np.nan,
            strict["min_damping_ratio"], strict["min_zeta_omega"], strict["min_natural_frequency"])
        excusal = entry.frequency_excusal
        if excusal and airplane_class in excusal.classes:
            notes.append(f"{criteria.name}: {excusal.note} ({excusal.source.short()})")
    elif mode == "roll_subsidence":
        limits = RollLimits(values["max_time_constant"], strict["max_time_constant"])
    elif mode == "spiral":
        limits = SpiralLimits(values["min_time_to_double"], strict["min_time_to_double"])
    else:
        limits = RollSpiralLimits(values["min_zeta_omega"], strict["min_zeta_omega"])
        for band in entry.not_permitted:
            if band.applies(airplane_class, category, flight_phase, altitude):
                not_permitted = band
            elif (flight_phase is None and band.flight_phases is not None
                  and band.applies(airplane_class, category, band.flight_phases[0], altitude)):
                notes.append(f"{criteria.name}: a coupled roll-spiral oscillation is not permitted in "
                             + " and ".join(p.replace("_", "-") for p in band.flight_phases)
                             + f" phases ({band.source.short()}); the condition states no flight phase")
    return BandSelection(criteria, mode, airplane_class, category, flight_phase, altitude, limits,
                         tuple(chosen.items()), undefined, tuple(notes), not_permitted)


def grade_mode(selection: BandSelection, *, damping_ratio=None, natural_frequency=None,
               phi_to_beta=None, root=None, levels_only=False) -> Grades:
    """Grade a batch of one mode's values against a band selection.

    Parameters
    ----------
    selection : BandSelection
    damping_ratio, natural_frequency, phi_to_beta : array_like
        zeta [-], omega_n [rad/s], |phi/beta| [-]: Dutch roll and roll-spiral.
    root : array_like
        Real eigenvalue [1/s]: roll subsidence and spiral.
    levels_only : bool
        Only ``level`` and ``met`` (see :func:`grade`).

    Returns
    -------
    Grades
    """
    mode = selection.mode
    if mode == "dutch_roll":
        ratio = np.nan if phi_to_beta is None else phi_to_beta
        return dutch_roll_grades(damping_ratio, natural_frequency, ratio, selection.limits, levels_only)
    if mode == "roll_subsidence":
        return roll_grades(root, selection.limits, levels_only)
    if mode == "spiral":
        return spiral_grades(root, selection.limits, levels_only)
    return roll_spiral_grades(damping_ratio, natural_frequency, selection.limits,
                              permitted=selection.not_permitted is None, levels_only=levels_only)


def mode_levels(criteria, mode, airplane_class, category, *, flight_phase=None, altitude=None,
                **values) -> Grades:
    """Levels of a batch of one mode for one class and category (select + grade).

    Parameters
    ----------
    criteria : CriteriaSet or str
        A criteria set, or a built-in name / file path.
    mode : str
    airplane_class, category, flight_phase : str or None
    altitude : float or None
        [m]
    **values
        ``damping_ratio``, ``natural_frequency``, ``phi_to_beta`` or ``root``
        arrays (see :func:`grade_mode`).

    Returns
    -------
    Grades

    Examples
    --------
    >>> g = mode_levels("mil-f-8785c", "dutch_roll", "III", "C", damping_ratio=[0.11, 0.06],
    ...                 natural_frequency=[1.0, 1.0], phi_to_beta=[1.0, 1.0])
    >>> g.level.tolist()
    [1, 2]
    """
    if not isinstance(criteria, CriteriaSet):
        criteria = load_criteria(criteria)
    selection = select_bands(criteria, mode, airplane_class, category, flight_phase, altitude)
    return grade_mode(selection, **values)


def stack_levels(criteria, arrays, airplane_class, category, flight_phase=None, altitude=None) -> dict:
    """Levels of every mode of a stack of models (:func:`latdyn.modes.analyse_stack` output).

    The batched counterpart of the per-condition assessment, for design
    studies: one :class:`Grades` per mode the criteria set covers, each of
    shape (N,).  A mode the case does not have (roll and spiral where a
    roll-spiral oscillation exists, and the reverse) grades 0 (not
    assessable); a Dutch roll with real roots of opposite signs (a static
    divergence, no damping ratio) grades beyond every band.

    Parameters
    ----------
    criteria : CriteriaSet or str
    arrays : latdyn.modes.ModeArrays
    airplane_class, category, flight_phase : str or None
    altitude : float or None
        [m]

    Returns
    -------
    dict of str to Grades

    Examples
    --------
    >>> from latdyn.modes import analyse_stack
    >>> A = np.array([[[-0.1113, 0.0, -1.0, 32.174 / 243.5], [-1.328, -0.951, 0.609, 0.0],
    ...                [0.757, -0.124, -0.265, 0.0], [0.0, 1.0, 0.0, 0.0]]])
    >>> grades = stack_levels("mil-f-8785c", analyse_stack(A), "III", "C")
    >>> {mode: int(g.level[0]) for mode, g in grades.items()}
    {'dutch_roll': 1, 'roll_subsidence': 1, 'spiral': 1, 'roll_spiral': 0}
    """
    from latdyn.modes import pair_figures

    if not isinstance(criteria, CriteriaSet):
        criteria = load_criteria(criteria)
    out = {}
    for mode in criteria.mode_names:
        selection = select_bands(criteria, mode, airplane_class, category, flight_phase, altitude)
        if mode in ("dutch_roll", "roll_spiral"):
            roots = arrays.dutch_roll if mode == "dutch_roll" else arrays.roll_spiral
            omega, zeta = pair_figures(roots[:, 0], roots[:, 1])
            ratio = arrays.phi_to_beta if mode == "dutch_roll" else None
            grades = grade_mode(selection, damping_ratio=zeta, natural_frequency=omega, phi_to_beta=ratio)
            if mode == "dutch_roll":
                divergence = np.isnan(zeta) & (roots.real.max(axis=1) > 0.0)
                grades = grades._replace(level=np.where(divergence, criteria.grades + 1, grades.level))
        else:
            grades = grade_mode(selection, root=arrays.roll if mode == "roll_subsidence" else arrays.spiral)
        out[mode] = grades
    return out


class RollSelection(NamedTuple):
    """The roll-performance rows of one criteria set that hold for each case, per grade.

    Attributes
    ----------
    bank_change : ndarray, shape (N, G)
        Bank-angle change the row asks for [rad]; NaN where no row holds.
    limit : ndarray, shape (N, G)
        Time allowed [s] (a weight formula at the case's mass); NaN where no row holds.
    row : ndarray of int, shape (N, G)
        Index of the row in ``criteria.roll_performance.bands``; -1 where none holds.
    """

    bank_change: np.ndarray
    limit: np.ndarray
    row: np.ndarray


def select_roll_bands(criteria: CriteriaSet, airplane_class, category, flight_phase=None, mass=None,
                      size=1) -> RollSelection:
    """The roll-performance row of each grade for N cases (the strictest where several hold).

    For each grade (Levels 1, 2, 3, or pass) the rows that hold for the
    class, category, flight phase and mass; of several, the one asking the
    highest mean roll rate (least time allowed per degree of bank) governs,
    as the stricter reading of the table.

    Parameters
    ----------
    criteria : CriteriaSet
        A set with roll-performance rows.
    airplane_class, category, flight_phase : str or None
    mass : float or array_like of shape (N,) or None
        [kg], for rows split by weight or timed by a weight formula.
    size : int
        N.

    Returns
    -------
    RollSelection
    """
    entry = criteria.roll_performance
    wanted = range(1, criteria.grades + 1) if criteria.assessment == "levels" else [None]
    masses = None if mass is None else np.broadcast_to(np.asarray(mass, dtype=float), (size,))
    count = len(wanted)
    change = np.full((size, count), np.nan)
    limit = np.full((size, count), np.nan)
    row = np.full((size, count), -1)
    for g, level in enumerate(wanted):
        best = np.full(size, np.inf)
        for index, band in enumerate(entry.bands if entry is not None else ()):
            if band.level != level:
                continue
            holds = np.broadcast_to(band.applies(airplane_class, category, flight_phase, masses), (size,))
            if not holds.any():
                continue
            allowed = np.broadcast_to(np.asarray(band.time_limit(masses), dtype=float), (size,))
            with np.errstate(invalid="ignore"):
                take = holds & (allowed / band.bank_change < best)
            best = np.where(take, allowed / band.bank_change, best)
            change[take, g] = band.bank_change
            limit[take, g] = allowed[take]
            row[take, g] = index
    return RollSelection(change, limit, row)


def grade_roll_performance(selection: RollSelection, times, levels_only=False) -> Grades:
    """Grade the times to reach each grade's bank-angle change (batch of N cases).

    The constraint of each grade is ``time <= limit`` (a maximum, met at the
    limit: "within"); a case without a row for some grade is not assessable
    (level 0).

    Parameters
    ----------
    selection : RollSelection
    times : array_like, shape (N, G)
        Time to reach each grade's bank-angle change [s] (inf: never).
    levels_only : bool

    Returns
    -------
    Grades
        Batch shape (N,); the governing parameter is ``time_to_bank``.
    """
    times = np.asarray(times, dtype=float)
    grades = grade(times[:, :, None], selection.limit[:, :, None], _INDEX["time_to_bank"], -1.0,
                   levels_only=levels_only)
    missing = (selection.row < 0).any(axis=1)
    if missing.any():
        grades = grades._replace(level=np.where(missing, 0, grades.level))
    return grades
