"""Uncertainty: Monte Carlo over uncertain derivatives and mass properties.

Each uncertain input is the nominal value plus an independent random
error: normal with standard deviation ``amount`` or uniform on
[-amount, +amount]; ``amount`` is absolute (SI) or relative to |nominal|.
Samples come from a numpy ``Generator`` (PCG64) seeded from the user's seed
and the condition name, so a run is reproducible and a condition's samples
do not depend on which other conditions run.  The samples go through the
batched engine (:mod:`latdyn.studies.batch`), roll performance included where
asked for and the aileron travel is known; the result per condition and
mode is the fraction of samples at each level (the level probability, with
binomial standard error sqrt(p (1 - p) / n)) and percentiles of the mode
figures.  The static checks of steady flight tied to the criteria sets
(:mod:`latdyn.steady_checks`: the senses and roll-control share of a steady
sideslip, the crosswind sideslip, the engine-out minimum control speed) are
graded in every sample as a sweep grades them
(:mod:`latdyn.studies.steady_batch`), giving the probability of a pass, up to
:data:`latdyn.studies.sweep.STATIC_CHECK_POINTS` samples a condition.

Levels are guidance only (:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import math
import zlib
from dataclasses import dataclass, make_dataclass

import numpy as np

from latdyn.aircraft import DISTRIBUTIONS, Uncertainty
from latdyn.errors import InputError
from latdyn.studies.batch import (FIGURES, condition_set, iterate_batch, nominal_value,
                                  parameter_names)
from latdyn.studies.keys import MASS_PROPERTIES, file_units, resolve_key
from latdyn.studies.rules import sample_rules

__all__ = ["parse_uncertainty", "condition_uncertainties", "draw_samples", "ConditionUncertainty",
           "UncertaintyResult", "uncertainty", "level_probabilities", "standard_errors",
           "figure_percentiles",
           "PERCENTILES", "uncertainty_document", "MAX_SAMPLES", "SampleFigures", "stream_samples",
           "probabilities_from_counts", "LEVEL_SLOTS"]

#: Percentiles reported for every figure [%].
PERCENTILES = (5.0, 50.0, 95.0)
#: Most samples per condition [-].
MAX_SAMPLES = 10_000_000


def parse_uncertainty(words, file=""):
    """Parse ``KEY=±20%`` or ``KEY=±0.01`` with an optional distribution word.

    Parameters
    ----------
    words : str or list of str
        The option's words, for example ``["Cn_r=±20%", "uniform"]``.

    Returns
    -------
    tuple
        (key, kind, amount, distribution); amount a fraction for "relative",
        in the file's units for "absolute".

    Examples
    --------
    >>> parse_uncertainty(["Cn_r=±20%"])
    ('Cn_r', 'relative', 0.2, 'normal')
    >>> parse_uncertainty("Cn_beta=+-0.01 uniform")
    ('Cn_beta', 'absolute', 0.01, 'uniform')
    """
    if isinstance(words, str):
        words = words.split()
    text = " ".join(words)
    expected = ("KEY=±AMOUNT or KEY=±PERCENT% with an optional normal or uniform "
                "(for example Cn_r=±20% or Cn_beta=±0.01 uniform)")
    if not words or len(words) > 2:
        raise InputError(file, "--vary", expected, f'"{text}"')
    distribution = words[1].lower() if len(words) == 2 else "normal"
    if distribution not in DISTRIBUTIONS:
        raise InputError(file, "--vary", expected, f'"{text}"')
    key, sep, amount = words[0].partition("=")
    amount = amount.strip()
    for sign in ("±", "+/-", "+-"):
        if amount.startswith(sign):
            amount = amount[len(sign):]
            break
    else:
        raise InputError(file, "--vary", expected, f'"{text}"')
    relative = amount.endswith("%")
    try:
        value = float(amount[:-1] if relative else amount)
    except ValueError:
        raise InputError(file, "--vary", expected, f'"{text}"') from None
    if not sep or not key.strip() or not math.isfinite(value) or value < 0:
        raise InputError(file, "--vary", expected, f'"{text}"')
    return key.strip(), "relative" if relative else "absolute", value / 100 if relative else value, \
        distribution


def condition_uncertainties(aircraft, condition, given=()) -> tuple:
    """The uncertainties that apply to a condition: the file's, then the given ones (which win).

    Parameters
    ----------
    given : iterable of tuple
        :func:`parse_uncertainty` results (absolute amounts in the file's units).

    Returns
    -------
    tuple of latdyn.aircraft.Uncertainty
        Keys resolved to batch input names, absolute amounts in SI.
    """
    allowed = [k for k in parameter_names(aircraft, condition)
               if k in MASS_PROPERTIES or k in _derivative_names(condition)]
    out = {}
    words = file_units(aircraft) if given else "SI"
    for item in aircraft.uncertainties:
        if item.key in allowed:  # file entries for the other derivative kind do not apply here
            out[item.key] = item
    for key_text, kind, amount, distribution in given:
        key = resolve_key(key_text, allowed, aircraft.file, "--vary", words, condition.name)
        si_amount = key.to_si(amount) if kind == "absolute" else amount
        out[key.name] = Uncertainty(key.name, kind, float(si_amount), distribution)
    return tuple(out[k] for k in sorted(out))


def _derivative_names(condition):
    from latdyn.model import COEFFICIENT_NAMES, DIMENSIONAL_NAMES
    from latdyn.aircraft import NondimensionalDerivatives

    if isinstance(condition.derivatives, NondimensionalDerivatives):
        return COEFFICIENT_NAMES
    return DIMENSIONAL_NAMES


def _generator(seed, condition_name):
    return np.random.default_rng([int(seed), zlib.crc32(condition_name.encode("utf-8"))])


def draw_samples(aircraft, condition, uncertainties, samples, seed) -> dict:
    """Sampled inputs {name: (samples,) array [SI]} of one condition.

    Normal: nominal + s N(0, 1); uniform: nominal + U(-s, s), with s the
    amount (absolute) or amount |nominal| (relative).  Inputs are drawn in
    name order from one Generator, so the same seed gives the same samples.
    """
    rng = _generator(seed, condition.name)
    out = {}
    for item in sorted(uncertainties, key=lambda u: u.key):
        nominal = nominal_value(aircraft, condition, item.key)
        scale = item.amount * abs(nominal) if item.kind == "relative" else item.amount
        if item.distribution == "normal":
            error = rng.standard_normal(samples)
        else:
            error = rng.uniform(-1.0, 1.0, samples)
        with np.errstate(over="ignore", invalid="ignore"):  # left to the file's rules
            out[item.key] = nominal + scale * error
    return out


def level_probabilities(criteria, levels) -> dict:
    """Fractions of the samples at each level (they sum to 1).

    Keys: "level 1", "level 2", "level 3", "beyond level 3" (levels sets) or
    "pass", "fail" (pass/fail sets), and "not assessed".
    """
    levels = np.asarray(levels)
    return probabilities_from_counts(criteria, np.bincount(levels.ravel().astype(np.int64),
                                                           minlength=LEVEL_SLOTS))


#: Length of a level count (:func:`probabilities_from_counts`): levels 0 (not assessed) to 4.
LEVEL_SLOTS = 5


def probabilities_from_counts(criteria, counts) -> dict:
    """:func:`level_probabilities` from the number of samples at each level (index = level)."""
    counts = np.asarray(counts)
    n = max(int(counts.sum()), 1)
    if criteria.assessment == "pass_fail":
        names = {1: "pass", 2: "fail"}
    else:
        names = {1: "level 1", 2: "level 2", 3: "level 3", 4: "beyond level 3"}
    at = lambda value: int(counts[value]) if value < counts.size else 0  # noqa: E731
    out = {word: at(value) / n for value, word in names.items()}
    out["not assessed"] = (int(counts.sum()) - sum(at(value) for value in names)) / n
    return out


def standard_errors(probabilities, samples) -> dict:
    """Binomial standard error sqrt(p (1 - p) / n) of each probability of :func:`level_probabilities`.

    The standard error of a proportion estimated from ``n`` independent
    samples (any statistics text, e.g. Montgomery & Runger, Applied
    Statistics and Probability for Engineers, 3rd ed., 2003, section 8-4 —
    from memory; common practice).

    Examples
    --------
    >>> standard_errors({"pass": 0.5, "fail": 0.5}, 100)
    {'pass': 0.05, 'fail': 0.05}
    """
    return {word: math.sqrt(p * (1 - p) / samples) for word, p in probabilities.items()}


def figure_percentiles(values) -> dict:
    """Percentiles (:data:`PERCENTILES`), mean and the fraction of samples where the figure exists.

    ``values`` may be float32 (as a streamed run keeps them); the statistics
    are computed in float64.
    """
    values = np.asarray(values)
    finite = values[np.isfinite(values)]
    out = {"available": float(finite.size) / max(values.size, 1)}
    if finite.size:
        # numpy's default ("linear") percentile: interpolate between the order statistics at
        # floor and ceil of p/100 (n - 1); those alone are selected (np.partition), in the
        # values' own precision, and interpolated in float64
        position = np.asarray(PERCENTILES) / 100.0 * (finite.size - 1)
        lower = np.floor(position).astype(int)
        upper = np.minimum(lower + 1, finite.size - 1)
        selected = np.partition(finite, np.unique(np.concatenate([lower, upper])))
        low, high = selected[lower].astype(float), selected[upper].astype(float)
        for p, a, b, w in zip(PERCENTILES, low, high, position - lower):
            out[f"p{p:g}"] = float(a + (b - a) * w) if b != a else float(a)
        out["mean"] = float(finite.mean(dtype=float))
    else:
        out.update({f"p{p:g}": None for p in PERCENTILES})
        out["mean"] = None
    return out


def _sample_count(self):
    return len(self.dutch_roll_frequency)


# one float32 array per name of FIGURES, in that order (the list is written once: the fields of
# latdyn.studies.batch.Figures declared with a unit)
SampleFigures = make_dataclass("SampleFigures", [(name, np.ndarray) for name in FIGURES], frozen=True,
                               namespace={"__module__": __name__, "__len__": _sample_count})
SampleFigures.__doc__ = """The mode figures of every sample, kept as float32 (:data:`FIGURES`, NaN where absent).

    What a streamed Monte Carlo run keeps of each sample: 4 bytes a figure
    instead of the batch engine's full :class:`~latdyn.studies.batch.Figures`;
    one field per name of :data:`FIGURES`, in that order.
    """


def stream_samples(cases, criteria_sets, progress=False, roll=False):
    """Level counts and float32 figures of a case set, chunk by chunk (bounded memory).

    Returns
    -------
    counts : dict
        (criteria name, mode) -> samples at each level (index = level, 0 not assessed).
    figures : SampleFigures
    """
    counts = {}
    kept = {name: np.empty(cases.size, np.float32) for name in FIGURES}
    for start, stop, part in iterate_batch(cases, criteria_sets, progress=progress, levels_only=True,
                                           roll=roll):
        for key, grades in part.levels.items():
            chunk = np.bincount(grades.level.astype(np.int64), minlength=LEVEL_SLOTS)
            counts[key] = counts.get(key, 0) + chunk
        for name in FIGURES:
            kept[name][start:stop] = getattr(part.figures, name)
    for key in counts:  # a mode graded in some chunks only: the others were not assessed
        missing = cases.size - int(counts[key].sum())
        if missing:
            counts[key][0] += missing
    return counts, SampleFigures(**kept)


@dataclass(frozen=True)
class ConditionUncertainty:
    """Monte Carlo result of one condition; unpacks as (condition, probabilities, percentiles).

    Attributes
    ----------
    condition : latdyn.aircraft.Condition
    uncertainties : tuple of Uncertainty
    figures : SampleFigures
        Every sample's figures (float32).
    probabilities : dict
        (criteria name, mode) -> :func:`level_probabilities`.
    percentiles : dict
        Figure name -> :func:`figure_percentiles`.
    excluded : int
        Samples that left the file's rules (:func:`latdyn.studies.rules.sample_rules`):
        counted here, never passed to the solver; the probabilities are over the others.
    excluded_rules : dict
        Rule (in words) -> samples that left it.
    """

    condition: object
    uncertainties: tuple
    figures: object
    probabilities: dict
    percentiles: dict
    excluded: int = 0
    excluded_rules: dict | None = None

    def __iter__(self):
        return iter((self.condition, self.probabilities, self.percentiles))


@dataclass(frozen=True)
class UncertaintyResult:
    """A whole Monte Carlo run."""

    aircraft: object
    samples: int
    seed: int
    criteria: tuple
    conditions: tuple
    notes: tuple = ()

    def __repr__(self):
        names = ", ".join(c.name for c in self.criteria)
        return (f"<UncertaintyResult {self.aircraft.name}: {self.samples} samples (seed {self.seed}); "
                f"{len(self.conditions)} conditions; criteria {names}; guidance only>")

    def _repr_html_(self):
        from latdyn.report.notebook import uncertainty_html

        return uncertainty_html(self)

    def to_pandas(self, table="levels"):
        """Level probabilities (``table="levels"``) or figure percentiles (``"figures"``) (needs pandas).

        Columns follow ``latdyn uncertainty --format json``; see
        :func:`latdyn.frames.uncertainty_frame`.
        """
        from latdyn.frames import uncertainty_frame

        return uncertainty_frame(self, table)


def uncertainty(aircraft, given=(), samples=100_000, seed=None, condition=None, criteria_sets=None,
                progress=False, roll_performance=False) -> UncertaintyResult:
    """Level probabilities and figure percentiles under the derivatives' uncertainty.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    given : iterable of tuple
        Command-line uncertainties (:func:`parse_uncertainty`), added to the
        file's [uncertainty] tables (and replacing the same keys).
    samples : int
        Samples per condition [-].
    seed : int, optional
        Seed; None draws one (reported in the result, to repeat the run).
    condition : str, optional
    criteria_sets : iterable, optional
        Default :func:`latdyn.assessment.default_criteria`.
    progress : bool
    roll_performance : bool
        Also grade roll performance (where the aileron travel is known): its
        level probabilities and the ``time_to_bank`` percentiles (tens of
        microseconds a sample).

    Returns
    -------
    UncertaintyResult

    Raises
    ------
    InputError
        No uncertainty given, a bad key or sample count.
    """
    from latdyn.assessment import default_criteria
    from latdyn.studies.batch import _load_sets

    if not 1 <= samples <= MAX_SAMPLES:
        raise InputError(aircraft.file, "--samples", f"a whole number from 1 to {MAX_SAMPLES}",
                         str(samples))
    if seed is None:
        seed = int(np.random.SeedSequence().entropy % (2**63))
    if seed < 0:
        raise InputError(aircraft.file, "--seed", "a whole number >= 0", str(seed))
    from latdyn.studies.sweep import STATIC_CHECK_POINTS, static_check_groups

    sets = _load_sets(criteria_sets if criteria_sets is not None
                      else default_criteria(aircraft.airplane_class))
    notes = ()
    if static_check_groups(sets, 1) and not static_check_groups(sets, samples):
        notes += (f"static checks of steady flight not graded above {STATIC_CHECK_POINTS} samples",)
    sets += static_check_groups(sets, samples)
    chosen = (aircraft.condition(condition),) if condition else aircraft.conditions
    items = []
    for item in chosen:
        specs = condition_uncertainties(aircraft, item, given)
        if not specs:
            raise InputError(aircraft.file, "uncertainty",
                             "an [uncertainty.KEY] table in the file or --vary KEY=±AMOUNT",
                             "no uncertainty for this condition's derivatives", item.name)
        drawn = draw_samples(aircraft, item, specs, samples, seed)
        valid, excluded = sample_rules(aircraft, item, drawn)
        kept = int(np.count_nonzero(valid))
        if kept == 0:
            worst = max(excluded, key=excluded.get)
            # the option when amounts were typed, else the file's [uncertainty.KEY] table behind
            # the rule (a file run without --vary named --vary)
            words = worst.replace("^", " ").replace(":", " ").split()
            named = [spec.key for spec in specs if spec.key in words]
            where = "--vary" if given else f"uncertainty.{named[0]}" if named else "uncertainty"
            raise InputError(aircraft.file, where,
                             "uncertainties whose samples pass the file's rules",
                             f"all {samples} samples leave them ({worst}: {excluded[worst]})",
                             item.name)
        if kept < samples:  # samples that leave the file's rules never reach the solver
            drawn = {k: v[valid] for k, v in drawn.items()}
        counts, figures = stream_samples(condition_set(aircraft, item, drawn), sets, progress,
                                         roll_performance)
        probabilities = {}
        for (name, mode), count in counts.items():
            criteria = next(c for c in sets if c.name == name)
            probabilities[(name, mode)] = probabilities_from_counts(criteria, count)
        percentiles = {name: figure_percentiles(getattr(figures, name)) for name in FIGURES}
        items.append(ConditionUncertainty(item, specs, figures, probabilities, percentiles,
                                          samples - kept, excluded))
        if any(mode == "minimum_control_speed" for _, mode in counts):
            from latdyn.steady import HELD_NOTE

            notes += (f"{item.name}: engine-out minimum control speed: {HELD_NOTE} in each sample",)
    return UncertaintyResult(aircraft, samples, seed, sets, tuple(items), notes)


def uncertainty_document(result: UncertaintyResult) -> dict:
    """The ``latdyn uncertainty --format json`` document (SI)."""
    from latdyn import __version__
    from latdyn.assessment import NOTICE

    return {
        "latdyn_version": __version__, "aircraft": result.aircraft.name,
        "file": result.aircraft.file, "notice": NOTICE, "samples": result.samples,
        "seed": result.seed, "criteria": [c.name for c in result.criteria],
        "conditions": [{
            "name": item.condition.name, "category": item.condition.flight.category,
            "uncertainties": [{"key": u.key, "kind": u.kind, "amount": u.amount,
                               "distribution": u.distribution} for u in item.uncertainties],
            "excluded_samples": {"count": item.excluded, "rules": dict(item.excluded_rules or {})},
            "levels": [{"criteria": name, "mode": mode, "probabilities": p,
                        "standard_error": standard_errors(p, result.samples - item.excluded)}
                       for (name, mode), p in item.probabilities.items()],
            "figures": {name: {"unit": FIGURES[name], **values}
                        for name, values in item.percentiles.items()},
        } for item in result.conditions],
        "notes": list(result.notes),
    }
