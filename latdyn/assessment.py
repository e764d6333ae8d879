"""Handling-qualities levels of the lateral-directional modes against criteria sets.

Three layers:

1. Pure numpy array functions in :mod:`latdyn.levels` (re-exported here),
   vectorised over a leading batch axis: :func:`grade`,
   :func:`dutch_roll_grades`, :func:`roll_grades`, :func:`spiral_grades`,
   :func:`roll_spiral_grades`, fed with band limits chosen from a criteria
   set by :func:`select_bands` (:func:`mode_levels` does both).
2. Small frozen dataclasses: :class:`Assessment` (one criteria set, one
   mode, one condition), :class:`ConditionAssessment`,
   :class:`AircraftAssessment`.
3. One entry point, :func:`assess` (aircraft file -> model -> modes -> levels).

Levels are 1, 2, 3, or 4 for "beyond Level 3"; a pass/fail set gives
``passed`` instead.  The margin is to the next-better boundary: for a
Level 1 mode, how far inside the Level 1 boundary it is (positive); for a
Level 2 mode, how far it is from reaching Level 1 (negative); for a mode
beyond Level 3, how far from Level 3.  It is given in the governing
parameter's own units and as a fraction of the limit.

The level bands are guidance only (:data:`NOTICE`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields, replace

import numpy as np

from latdyn.criteria_sets import CATEGORIES, CLASSES, CriteriaSet, load_criteria
from latdyn.levels import (PARAMETERS, SYMBOLS, UNITS, BandSelection, DutchRollLimits,
                           Grades, RollLimits, RollSpiralLimits, SpiralLimits, dutch_roll_grades,
                           grade, grade_mode, mode_levels, phi_to_beta_excess, roll_grades,
                           roll_spiral_grades, select_bands, spiral_grades, stack_levels,
                           select_roll_bands, grade_roll_performance)

__all__ = [
    "NOTICE", "PARAMETERS", "UNITS", "SYMBOLS", "DEFAULT_MILITARY", "DEFAULT_CIVIL",
    "Grades", "DutchRollLimits", "RollLimits", "SpiralLimits", "RollSpiralLimits",
    "BandSelection", "grade", "dutch_roll_grades", "roll_grades", "spiral_grades",
    "roll_spiral_grades", "select_bands", "grade_mode", "mode_levels",
    "phi_to_beta_excess", "stack_levels", "Assessment", "ConditionAssessment", "AircraftAssessment",
    "assess_modes", "assess", "default_criteria", "level_words", "assess_roll_performance", "assess_readings",
    "below_level", "checks_below",
]

#: The guidance-only notice carried by every table, report and plot that shows a level.
NOTICE = ("GUIDANCE ONLY: handling-qualities levels are guidance against published "
          "criteria, not a compliance finding. The applicable certification basis, "
          "local regulations and licensed engineering judgement govern.")

DEFAULT_MILITARY = ("mil-f-8785c",)
DEFAULT_CIVIL = ("14cfr23-181", "14cfr25-181", "14cfr23-157", "amc25-147f")

# ============================================================ dataclass layer
def level_words(level, passed=None) -> str:
    """A level or pass/fail in words.

    Examples
    --------
    >>> level_words(4), level_words(None, False), level_words(2)
    ('beyond Level 3', 'fail', 'Level 2')
    """
    if level is None:
        if passed is None:
            return "not assessed"
        return "pass" if passed else "fail"
    return "beyond Level 3" if level >= 4 else f"Level {level}"


def below_level(level, passed, threshold) -> bool:
    """True when a check is worse than Level ``threshold`` (1, 2 or 3).

    A level above the threshold (2 or worse against 1; 4 is beyond Level 3)
    and a failed pass/fail check are below it; a check that is not assessed
    is not.

    Examples
    --------
    >>> below_level(2, None, 1), below_level(1, None, 1), below_level(None, False, 3)
    (True, False, True)
    >>> below_level(None, True, 1), below_level(None, None, 1)
    (False, False)
    """
    if level is not None:
        return level > threshold
    return passed is False


def checks_below(results, threshold) -> list:
    """``(aircraft, condition, Assessment)`` of every check below Level ``threshold``.

    Parameters
    ----------
    results : iterable of AircraftAssessment
    threshold : int
        1, 2 or 3.
    """
    return [(result.aircraft, condition.name, entry)
            for result in results for condition in result.conditions
            for entry in condition.assessments if below_level(entry.level, entry.passed, threshold)]


def _number(value):
    value = float(value)
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class Assessment:
    """One mode of one condition against one criteria set.

    Attributes
    ----------
    criteria : str
        Criteria set name.
    edition : str
        Its edition.
    mode : str
    level : int or None
        1, 2, 3, or 4 for beyond Level 3; None for a pass/fail set or when
        the level cannot be decided (see ``missing`` and ``notes``).
    passed : bool or None
        Pass/fail sets only.
    governing : str or None
        Parameter that sets the margin (see :data:`PARAMETERS`).
    value, limit : float or None
        Its value and the boundary value [unit]; value None where the
        parameter does not exist (divergent roll, convergent spiral).
    margin : float or None
        value - limit (limit - value for a maximum) to the next-better
        boundary [unit]; positive inside.
    margin_fraction : float or None
        margin / |limit| [-].
    unit : str
    source : str or None
        Citation of the band that sets the limit, with its confidence.
    row : str or None
        The band's table row.
    confidence : str or None
    notes : tuple of str
    missing : tuple of str
        What the file lacks for a full assessment.
    bank_change : float or None
        Roll performance: the bank-angle change the governing row asks for [rad].
    """

    criteria: str
    edition: str
    mode: str
    level: int | None
    passed: bool | None
    governing: str | None
    value: float | None
    limit: float | None
    margin: float | None
    margin_fraction: float | None
    unit: str = ""
    source: str | None = None
    row: str | None = None
    confidence: str | None = None
    notes: tuple = ()
    missing: tuple = ()
    bank_change: float | None = None

    def __iter__(self):
        return (getattr(self, f.name) for f in fields(self))

    @property
    def result(self) -> str:
        """Level or pass/fail in words ("undecided" when something the criteria need is missing)."""
        if self.level is None and self.passed is None and self.missing:
            return "undecided"
        return level_words(self.level, self.passed)

    @property
    def severity(self) -> int:
        """Ordering key of badness: 0 not assessed, 1..4 levels, pass 1, fail 2."""
        if self.level is not None:
            return self.level
        if self.passed is None:
            return 0
        return 1 if self.passed else 2

    def summary(self) -> str:
        """One line: criteria set, mode, result and the governing parameter against its limit."""
        text = f"{self.criteria} {self.mode}: {self.result}"
        if self.governing is not None:
            value = "n/a" if self.value is None else f"{self.value:.4g}"
            unit = f" {self.unit}" if self.unit and self.unit != "-" else ""
            text += f", {self.governing} {value}{unit}"
            if self.limit is not None:
                text += f" (limit {self.limit:.4g})"
        return text

    def __repr__(self):
        return f"<Assessment {self.summary()}; guidance only>"

    def _repr_html_(self):
        from latdyn.report.notebook import assessment_html

        return assessment_html(self)

    def as_dict(self) -> dict:
        """The JSON entry of ``latdyn assess --format json``."""
        out = {"criteria": self.criteria, "edition": self.edition, "mode": self.mode,
               "level": self.level, "pass": self.passed, "governing": self.governing,
               "value": self.value, "limit": self.limit, "margin": self.margin,
               "source": self.source, "margin_fraction": self.margin_fraction, "unit": self.unit,
               "notes": list(self.notes), "missing": list(self.missing)}
        if self.mode == "roll_performance":
            out["bank_change"] = self.bank_change
        return out


@dataclass(frozen=True)
class ConditionAssessment:
    """All assessments of one flight condition.

    Attributes
    ----------
    name, category, airplane_class, flight_phase : str or None
    altitude : float or None
        [m]
    assessments : tuple of Assessment
    modes : object
        The ModeSet the assessments were made from (None when built from values).
    roll : latdyn.roll_performance.RollResult or None
        The rolls after a full roll command (where the file gives aileron travel).
    equivalent : object
        The fitted equivalent low-order system of an augmented condition
        (:class:`latdyn.equivalent_systems.EquivalentSystem`), else None.
    equivalent_assessments : tuple of Assessment
        Its Dutch roll, roll and spiral graded with the same criteria sets.
    roll_response : latdyn.roll_response.RollResponse or None
        Roll-rate and bank oscillations, psi_beta, sideslip excursion, k (indicators).
    departure : latdyn.departure.Departure or None
        Cn_beta,dyn and LCDP (indicators).
    ambiguous_naming : dict or None
        Where the eigenvectors do not confirm two modes' names
        (:func:`latdyn.modes.naming_ambiguity`): the ambiguity, both readings'
        results per criteria set and the reading graded (the more conservative).
    steady : latdyn.steady.SteadyResult or None
        The steady solution the static checks were graded from (None when no
        check group was graded).
    """

    name: str
    category: str | None
    airplane_class: str | None
    flight_phase: str | None
    altitude: float | None
    assessments: tuple
    modes: object = None
    roll: object = None
    equivalent: object = None
    equivalent_assessments: tuple = ()
    roll_response: object = None
    departure: object = None
    ambiguous_naming: dict | None = None
    steady: object = None

    def __iter__(self):
        return iter(self.assessments)

    def for_criteria(self, name) -> tuple:
        """Assessments of one criteria set."""
        return tuple(a for a in self.assessments if a.criteria == name)

    def worst(self, name) -> Assessment | None:
        """The assessment that limits the condition under one criteria set.

        Highest level (or fail) first; among equals the smallest margin
        fraction (or margin where the fraction is undefined).
        """
        entries = [a for a in self.for_criteria(name) if a.severity > 0]
        if not entries:
            return None

        def key(a):
            closeness = a.margin_fraction if a.margin_fraction is not None else (
                a.margin if a.margin is not None else math.inf)
            return (a.severity, -closeness)

        return max(entries, key=key)

    def as_dict(self) -> dict:
        """The JSON entry of one condition."""
        worst = {}
        for name in dict.fromkeys(a.criteria for a in self.assessments):
            entry = self.worst(name)
            worst[name] = None if entry is None else {"mode": entry.mode, "level": entry.level,
                                                      "pass": entry.passed}
        response = self.roll_response.as_dict() if self.roll_response is not None else dict.fromkeys(
            ("p_osc_over_p_av", "phi_osc_over_phi_av", "psi_beta", "delta_beta_max", "k",
             "delta_beta_over_k", "sideslip_sense"))
        departure = self.departure.as_dict() if self.departure is not None else {
            "cn_beta_dynamic": None, "lcdp": None}
        document = {"name": self.name, "category": self.category, "airplane_class": self.airplane_class,
                    "assessments": [a.as_dict() for a in self.assessments], "flight_phase": self.flight_phase,
                    "worst": worst, "roll_response": response, "departure": departure,
                    "ambiguous_naming": self.ambiguous_naming}
        if self.equivalent is not None:
            document["equivalent_system"] = {**self.equivalent.as_dict(), "assessments": [
                a.as_dict() for a in self.equivalent_assessments]}
        return document

    def __repr__(self):
        worst = [self.worst(name) for name in dict.fromkeys(a.criteria for a in self.assessments)]
        text = "; ".join(f"worst {entry.summary()}" for entry in worst if entry is not None)
        return (f"<ConditionAssessment {self.name} (category {self.category or '-'}): "
                f"{len(self.assessments)} assessments; {text or 'nothing assessed'}; guidance only>")

    def _repr_html_(self):
        from latdyn.report.notebook import assessment_html

        return assessment_html(self)

    def to_pandas(self):
        """The assessments as a DataFrame (needs pandas); see :func:`latdyn.frames.assessment_frame`."""
        from latdyn.frames import assessment_frame

        return assessment_frame(self)


@dataclass(frozen=True)
class AircraftAssessment:
    """Assessment of every condition of one aircraft.

    Attributes
    ----------
    aircraft : str
        Aircraft name.
    file : str or None
    airplane_class : str or None
    criteria : tuple of CriteriaSet
    conditions : tuple of ConditionAssessment
    notes : tuple of str
        File-wide notes (what is missing).
    notice : str
        :data:`NOTICE`.
    checks : tuple of latdyn.steady_checks.CheckGroup
        The static-check groups graded beside the criteria sets (pass/fail;
        each is a criteria name of the condition's rows).
    """

    aircraft: str
    file: str | None
    airplane_class: str | None
    criteria: tuple
    conditions: tuple
    notes: tuple = ()
    notice: str = NOTICE
    checks: tuple = ()

    @property
    def graded_sets(self) -> tuple:
        """The criteria sets and the static-check groups, in the order of their rows."""
        return tuple(self.criteria) + tuple(self.checks)

    def __iter__(self):
        return iter(self.conditions)

    def equivalent_view(self):
        """The grades of the equivalent low-order systems as an AircraftAssessment of their own
        (the augmented conditions only), or None when no condition is augmented."""
        from dataclasses import replace

        conditions = tuple(replace(c, assessments=c.equivalent_assessments, modes=c.equivalent.modes,
                                   roll=None, equivalent=None, equivalent_assessments=())
                           for c in self.conditions if c.equivalent is not None)
        if not conditions:
            return None
        return replace(self, aircraft=f"{self.aircraft}: equivalent low-order systems", conditions=conditions,
                       notes=("equivalent Dutch roll, roll and spiral of the fitted low-order system "
                              "(MIL-STD-1797A approach, forms from memory); the equivalent delays and the "
                              "mismatch are indicators, not graded",))

    def as_dict(self, version=None) -> dict:
        """The JSON document of ``latdyn assess --format json``."""
        if version is None:
            from latdyn import __version__ as version
        return {"latdyn_version": version, "aircraft": self.aircraft, "notice": self.notice,
                "conditions": [c.as_dict() for c in self.conditions], "file": self.file,
                "criteria": [{"name": c.name, "edition": c.edition, "title": c.title,
                              "document": c.document} for c in self.graded_sets],
                "notes": list(self.notes)}

    def __repr__(self):
        counts = {}
        for condition in self.conditions:
            for entry in condition.assessments:
                key = f"{entry.criteria} {entry.result}"
                counts[key] = counts.get(key, 0) + 1
        tally = ", ".join(f"{key} x{count}" for key, count in counts.items())
        return (f"<AircraftAssessment {self.aircraft}: {len(self.conditions)} conditions; "
                f"{tally or 'nothing assessed'}; guidance only>")

    def _repr_html_(self):
        from latdyn.report.notebook import assessment_html

        return assessment_html(self)

    def to_pandas(self):
        """The assessments as a DataFrame, one row per condition, mode and criteria set (needs pandas).

        Columns are the fields of ``latdyn assess --format json``; the
        guidance-only notice is in ``frame.attrs["notice"]``.  See
        :func:`latdyn.frames.assessment_frame`.
        """
        from latdyn.frames import assessment_frame

        return assessment_frame(self)


def default_criteria(airplane_class) -> tuple:
    """Default criteria sets: military with an airplane class, both civil sets without.

    Examples
    --------
    >>> default_criteria(None)
    ('14cfr23-181', '14cfr25-181', '14cfr23-157', 'amc25-147f')
    """
    return DEFAULT_MILITARY if airplane_class else DEFAULT_CIVIL


def _load_sets(criteria_sets):
    out = []
    for entry in criteria_sets:
        out.append(entry if isinstance(entry, CriteriaSet) else load_criteria(entry))
    return tuple(out)


def _mode_values(mode_name, mode):
    if mode_name in ("dutch_roll", "roll_spiral"):
        values = {"damping_ratio": np.nan if mode.damping_ratio is None else mode.damping_ratio,
                  "natural_frequency": np.nan if mode.natural_frequency is None else mode.natural_frequency}
        if mode_name == "dutch_roll":
            values["phi_to_beta"] = np.nan if mode.phi_to_beta is None else mode.phi_to_beta
        return values
    return {"root": complex(mode.eigenvalue).real}


def _candidates(entry, airplane_class, category, altitude):
    """Values to try for each unknown the mode's bands depend on."""
    bands = entry.bands + tuple(entry.not_permitted)
    classes = [airplane_class]
    if airplane_class is None and any(b.classes is not None for b in bands):
        classes = list(CLASSES)
    categories = [category]
    if category is None and any(b.categories is not None for b in bands):
        categories = list(CATEGORIES)
    altitudes = [altitude]
    breaks = entry.altitude_breaks()
    if altitude is None and breaks:
        altitudes = [breaks[0] - 1.0] + list(breaks)
    return classes, categories, altitudes


def _describe(selection, grades, mode_name, mode, criteria, extra_notes):
    """Assessment from the grades of one candidate (index 0 of a batch of 1)."""
    level = int(grades.level[0])
    pass_fail = criteria.assessment == "pass_fail"
    notes = list(selection.notes) + list(extra_notes)
    if level == 0:
        return Assessment(criteria.name, criteria.edition, mode_name, None, None, None, None, None,
                          None, None, notes=tuple(notes + ["a mode value needed by the criteria is missing"]))
    governing = PARAMETERS[int(grades.governing[0])]
    target = min(max(level - 2, 0), criteria.grades - 1)
    band = selection.band(governing, target)
    if governing == "permitted":
        band = selection.not_permitted
    source_parts = []
    row = confidence = None
    if band is not None:
        row, confidence = band.row, band.source.confidence
        source_parts.append(f'{band.source.document}, {band.source.reference}, row "{band.row}" '
                            f"[{band.source.confidence}]" + (f": {band.source.caution}" if band.source.caution
                                                             else ""))
        if band.note and "derivation" in band.note:
            notes.append(band.note)
    entry = criteria.mode(mode_name)
    value = _number(grades.value[0])
    limit = _number(grades.limit[0])
    margin = _number(grades.margin[0])
    fraction = _number(grades.margin_fraction[0])
    if mode_name == "dutch_roll":
        rule = entry.phi_to_beta_rule
        if rule is not None and mode.natural_frequency is not None and mode.phi_to_beta is not None:
            product = mode.natural_frequency ** 2 * mode.phi_to_beta
            if product > rule.threshold:
                notes.append(f"omega_nd^2 |phi/beta|_d = {product:.3g} (rad/s)^2 exceeds {rule.threshold:g}: "
                             "least zeta_d*omega_nd raised by "
                             + ", ".join(f"{c * (product - rule.threshold):.3g}" for c in rule.coefficients)
                             + " rad/s" + (" (Levels 1, 2, 3)" if len(rule.coefficients) == 3 else "")
                             + f" ({rule.source.short()})")
                if governing == "zeta_omega":
                    source_parts.append(rule.source.text())
        cap = entry.damping_ratio_cap
        if (cap is not None and governing == "damping_ratio" and selection.airplane_class in cap.classes
                and limit is not None and limit == cap.value):
            notes.append(f"zeta_d = {cap.value:g} is the most required for Class "
                         f"{selection.airplane_class} ({cap.source.short()})")
            source_parts.append(cap.source.text())
        if mode.damping_ratio is not None and mode.damping_ratio < 0:
            notes.append("divergent Dutch roll" + (f": time to double {mode.time_to_double:.3g} s"
                                                    if mode.time_to_double else ""))
    elif mode_name == "roll_subsidence" and value is None:
        notes.append("divergent or neutral roll mode: no time constant, beyond Level 3"
                     + (f" (time to double {mode.time_to_double:.3g} s)" if mode.time_to_double else ""))
        margin = fraction = None
    elif mode_name == "spiral" and value is None:
        notes.append("convergent spiral: meets every level"
                     + (f" (time to half {mode.time_to_half:.3g} s)" if mode.time_to_half else ""))
        margin = fraction = None
    elif governing == "permitted":
        value = limit = margin = fraction = None
        notes.append(f'coupled roll-spiral oscillation not permitted: "{band.row}"')
    passed = None
    if pass_fail:
        passed = level == 1
        level = None
    return Assessment(criteria.name, criteria.edition, mode_name, level, passed, governing, value, limit,
                      margin, fraction, UNITS[governing], "; ".join(source_parts) or None, row, confidence,
                      tuple(dict.fromkeys(notes)))


def _missing_words(dimension, condition_name):
    if dimension == "airplane_class":
        return "airplane_class (aircraft file key airplane_class)"
    if dimension == "category":
        return f'category (condition "{condition_name}" key category)'
    return f'altitude (condition "{condition_name}": density given instead of altitude)'


def _assess_one(criteria, mode_name, mode, airplane_class, category, flight_phase, altitude,
                condition_name, extra_notes=()):
    entry = criteria.mode(mode_name)
    classes, categories, altitudes = _candidates(entry, airplane_class, category, altitude)
    results = {}
    for cls in classes:
        for cat in categories:
            for alt in altitudes:
                selection = select_bands(criteria, mode_name, cls, cat, flight_phase, alt)
                if selection.undefined and selection.not_permitted is None:
                    results[(cls, cat, alt)] = None
                    continue
                values = {k: np.atleast_1d(v) for k, v in _mode_values(mode_name, mode).items()}
                grades = grade_mode(selection, **values)
                results[(cls, cat, alt)] = _describe(selection, grades, mode_name, mode, criteria, extra_notes)
    unknown = {"airplane_class": len(classes) > 1, "category": len(categories) > 1,
               "altitude": len(altitudes) > 1}
    outcomes = list(results.values())
    if any(r is None for r in outcomes):
        if len(outcomes) == 1:
            grades = ", ".join(str(g) for g in select_bands(criteria, mode_name, airplane_class, category,
                                                             flight_phase, altitude).undefined)
            return Assessment(criteria.name, criteria.edition, mode_name, None, None, None, None, None, None,
                              None, notes=(f"{criteria.name} has no band for Level {grades} of Class "
                                           f"{airplane_class}, Category {category}",))
    defined = [r for r in outcomes if r is not None]
    decided = defined and len(defined) == len(outcomes) and len({(r.level, r.passed) for r in defined}) == 1
    if decided:
        def closeness(r):
            if r.margin_fraction is not None:
                return r.margin_fraction
            return r.margin if r.margin is not None else math.inf

        chosen = min(defined, key=closeness)
        notes = list(chosen.notes)
        for dimension, varied in unknown.items():
            if varied:
                words = {"airplane_class": "airplane class", "category": "category",
                         "altitude": "altitude"}[dimension]
                notes.append(f"{words} not given: every {words} gives {chosen.result}"
                             + ("" if len({(r.limit, r.governing) for r in defined}) == 1
                                else f"; margin shown for the least favourable {words}"))
        return replace(chosen, notes=tuple(notes), missing=())
    # The unknowns change the result: say which ones, assess nothing more.
    keys = list(results)
    missing = []
    for position, dimension in enumerate(("airplane_class", "category", "altitude")):
        if not unknown[dimension]:
            continue
        for key in keys:
            others = [k for k in keys if all(k[i] == key[i] for i in range(3) if i != position)]
            seen = {None if results[k] is None else (results[k].level, results[k].passed) for k in others}
            if len(seen) > 1:
                missing.append(_missing_words(dimension, condition_name))
                break
    levels = sorted({r.severity for r in defined})
    if criteria.assessment == "pass_fail":
        spread = "pass or fail"
    else:
        spread = " to ".join(level_words(v) for v in (levels[0], levels[-1])) if levels else "not assessed"
    words = " and ".join(item.split(" (")[0].replace("_", " ") for item in missing) or "what is missing"
    return Assessment(criteria.name, criteria.edition, mode_name, None, None, None, None, None, None, None,
                      notes=(f"{spread} depending on the {words} (not given)",), missing=tuple(missing))


def _static_divergence(criteria, mode):
    """A non-oscillatory Dutch roll with real roots of opposite signs: beyond every band."""
    words = "real Dutch roll roots of opposite signs: a static directional divergence"
    if mode.time_to_double:
        words += f" (time to double {mode.time_to_double:.3g} s)"
    pass_fail = criteria.assessment == "pass_fail"
    return Assessment(criteria.name, criteria.edition, "dutch_roll", None if pass_fail else 4,
                      False if pass_fail else None, "damping_ratio", None, None, None, None,
                      notes=(words + (": fail" if pass_fail else ": beyond Level 3"),))


def assess_modes(modes, criteria_sets, airplane_class=None, category=None, flight_phase=None,
                 altitude=None, condition_name="") -> tuple:
    """Assess the modes of one condition against criteria sets.

    Parameters
    ----------
    modes : latdyn.modes.ModeSet
        The condition's modes (``get(name)`` returns a Mode or None).
    criteria_sets : iterable of CriteriaSet or str
    airplane_class, category, flight_phase : str or None
    altitude : float or None
        Standard pressure (geopotential) altitude [m].
    condition_name : str
        For the wording of what is missing.

    Returns
    -------
    tuple of Assessment
        One per criteria set and mode covered by the set that the condition
        has (roll subsidence and spiral entries say so when the roots couple
        into a roll-spiral oscillation).
    """
    out = []
    coupled = modes.get("roll_spiral") is not None
    pattern = getattr(modes, "pattern", "")
    for criteria in _load_sets(criteria_sets):
        for mode_name in criteria.mode_names:
            mode = modes.get(mode_name)
            if mode is None:
                if mode_name == "roll_spiral":
                    continue
                if coupled and mode_name in ("roll_subsidence", "spiral"):
                    note = ("no separate root: the roll and spiral roots couple into a roll-spiral oscillation"
                            + ("" if criteria.mode("roll_spiral") else
                               f"; {criteria.name} has no requirement for it"))
                else:
                    note = f"no {mode_name.replace('_', ' ')} mode found" + (f" (mode pattern {pattern})"
                                                                           if pattern else "")
                out.append(Assessment(criteria.name, criteria.edition, mode_name, None, None, None, None, None,
                                      None, None, notes=(note,)))
                continue
            if mode_name == "dutch_roll" and mode.damping_ratio is None and mode.divergent:
                out.append(_static_divergence(criteria, mode))
                continue
            out.append(_assess_one(criteria, mode_name, mode, airplane_class, category, flight_phase,
                                   altitude, condition_name))
    return tuple(out)


def assess_readings(modes, assessments, criteria_sets, airplane_class=None, category=None,
                    flight_phase=None, altitude=None, condition_name="") -> tuple:
    """Both readings of an ambiguous mode naming graded; the more conservative kept, saying so.

    Where the eigenvectors do not confirm the names of two modes
    (:func:`latdyn.modes.naming_ambiguity`: roll and spiral roots, or the
    Dutch roll and a roll-spiral oscillation), the other reading (the names
    swapped) is graded too.  For each criteria set, the reading whose worse
    entry of the two modes is worse (higher level, or fail) is the one graded;
    on a tie the named reading.  Each entry of the two modes notes the
    ambiguity, the reading graded and the other reading's results.

    Parameters
    ----------
    modes : latdyn.modes.ModeSet
    assessments : tuple of Assessment
        :func:`assess_modes` of ``modes`` (the named reading).
    criteria_sets, airplane_class, category, flight_phase, altitude, condition_name
        As :func:`assess_modes`.

    Returns
    -------
    assessments : tuple of Assessment
        With the entries of the two modes from the reading graded.
    ambiguous_naming : dict or None
        ``NamingAmbiguity.as_dict()`` with ``"readings"`` (``{"named", "other"}``,
        each criteria set -> mode -> result in words) and ``"graded"``
        (criteria set -> "named" or "other"); None where the names are confirmed.
    """
    ambiguity = getattr(modes, "ambiguity", None)
    if ambiguity is None:
        return tuple(assessments), None
    other = assess_modes(ambiguity.other, criteria_sets, airplane_class, category, flight_phase, altitude,
                         condition_name)
    names = set(ambiguity.names)
    readings = {"named": {}, "other": {}}
    graded = {}
    replacement = {}
    for criteria in dict.fromkeys(a.criteria for a in assessments):
        mine = [a for a in assessments if a.criteria == criteria and a.mode in names]
        theirs = [a for a in other if a.criteria == criteria and a.mode in names]
        readings["named"][criteria] = {a.mode: a.result for a in mine}
        readings["other"][criteria] = {a.mode: a.result for a in theirs}
        worse = max((a.severity for a in theirs), default=0) > max((a.severity for a in mine), default=0)
        graded[criteria] = "other" if worse else "named"
        kept, shown = (theirs, mine) if worse else (mine, theirs)
        words = "; ".join(f"{a.mode.replace('_', ' ')} {a.result}" for a in shown)
        note = ("mode naming ambiguous: " + ambiguity.reason + "; graded on the "
                + ("other reading (names swapped), the more conservative" if worse
                   else "named reading" + (", the more conservative" if any(
                       a.severity != b.severity for a, b in zip(mine, theirs)) else
                       " (both readings give the same results)"))
                + f"; the {'named' if worse else 'other'} reading gives {words}")
        for entry in kept:
            replacement[(criteria, entry.mode)] = replace(entry, notes=entry.notes + (note,))
    out = tuple(replacement.get((a.criteria, a.mode), a) for a in assessments)
    return out, {**ambiguity.as_dict(), "readings": readings, "graded": graded}


def _roll_entry(criteria, **values):
    fields_ = dict(level=None, passed=None, governing="time_to_bank", value=None, limit=None,
                   margin=None, margin_fraction=None, unit="s")
    fields_.update(values)
    return Assessment(criteria.name, criteria.edition, "roll_performance", **fields_)


def assess_roll_performance(model, controls, criteria_sets, airplane_class=None, category=None,
                            flight_phase=None, mass=None, speed=None, condition_name="") -> tuple:
    """Roll performance of one condition against the roll-performance rows of criteria sets.

    The graded figure is the time to reach each row's bank-angle change after
    an abrupt full roll command, rate-limited where a rate limit is given,
    rudder pedals free, from wings level (:mod:`latdyn.roll_performance`).
    The row that sets the margin is the next-better boundary, as for the modes.

    Parameters
    ----------
    model : latdyn.model.LateralModel
    controls : latdyn.aircraft.Controls or None
    criteria_sets : iterable of CriteriaSet or str
    airplane_class, category, flight_phase : str or None
    mass : float or None
        [kg], for the civil weight rules.
    speed : float or None
        True airspeed [m/s], for rows with a speed range.
    condition_name : str

    Returns
    -------
    assessments : tuple of Assessment
        One per criteria set with roll-performance rows (``mode`` "roll_performance").
    roll : latdyn.roll_performance.RollResult or None
        The rolls themselves (None without aileron travel).
    """
    from latdyn import roll_performance as rp

    sets = [c for c in _load_sets(criteria_sets) if c.roll_performance is not None]
    if not sets:
        return (), None
    aileron = getattr(controls, "aileron", None)
    if aileron is None:
        missing = (f'aileron travel (aircraft file [controls] aileron_deg, or condition "{condition_name}" '
                   "[condition.controls])",)
        return tuple(_roll_entry(c, notes=("no aileron travel given: roll performance not assessed",),
                                 missing=missing) for c in sets), None
    rate = getattr(controls, "aileron_rate", None)
    longest = max(b.max_time for c in sets for b in c.roll_performance.bands)
    roll = rp.roll_performance(model, aileron, rate, duration=max(10.0, 1.5 * longest))
    A, B = np.asarray(model.A, float)[None], np.asarray(model.B, float)[None]
    column = list(model.input_names).index("aileron")
    bank_row = np.asarray(model.C, float)[list(model.output_names).index("phi")]
    rate_value = np.inf if rate is None else rate
    out = []
    for criteria in sets:
        entry = criteria.roll_performance
        selection = select_roll_bands(criteria, airplane_class, category, flight_phase, mass)
        if (selection.row[0] < 0).any():
            out.append(_roll_entry(criteria, notes=_roll_gap_notes(criteria, entry, airplane_class, category,
                                                                   flight_phase, mass),
                                   missing=_roll_missing(entry, airplane_class, category, flight_phase, mass,
                                                         condition_name)))
            continue
        chosen = [entry.bands[i] for i in selection.row[0]]
        times = rp.time_to_bank(A, B, [aileron], [rate_value], selection.bank_change, bank_row, column)
        grades = grade_roll_performance(selection, times)
        level = int(grades.level[0])
        target = min(max(level - 2, 0), len(chosen) - 1)
        band = chosen[target]
        value = _number(grades.value[0])
        notes = [rp.PEDALS_FREE_NOTE, rp.ROLL_DIRECTION_NOTE]
        if band.bank_change == math.radians(60.0) and criteria.assessment == "pass_fail":
            notes.append(rp.REVERSAL_NOTE)
        notes.append(f"aileron {math.degrees(aileron):.3g} deg "
                     + (f"at {math.degrees(rate):.3g} deg/s" if rate else "as an abrupt step"))
        if value is None:
            notes.append(f"the pedals-free roll does not reach {math.degrees(band.bank_change):.3g} deg "
                         f"within {rp.HORIZON:g} s")
        coordinated = roll.time_to(band.bank_change, coordinated=True)
        if math.isfinite(coordinated):
            notes.append(f"rudder-coordinated roll (zero sideslip, not graded): "
                         f"{math.degrees(band.bank_change):.3g} deg in {coordinated:.3g} s")
        if band.time_weight_divisor is not None:
            notes.append(f"time allowed from the weight formula at W = {mass / POUND_KG:.0f} lb")
        source = (f'{band.source.document}, {band.source.reference}, row "{band.row}" [{band.source.confidence}]'
                  + (f": {band.source.caution}" if band.source.caution else ""))
        passed = None
        if criteria.assessment == "pass_fail":
            passed, level = level == 1, None
        out.append(_roll_entry(criteria, level=level, passed=passed, value=value,
                               limit=_number(grades.limit[0]),
                               margin=None if value is None else _number(grades.margin[0]),
                               margin_fraction=None if value is None else _number(grades.margin_fraction[0]),
                               source=source, row=band.row, confidence=band.source.confidence,
                               notes=tuple(notes), bank_change=band.bank_change))
    return tuple(out), roll


POUND_KG = 0.45359237


def _roll_requirement(sets, airplane_class, category, flight_phase, mass, speed):
    """(bank change [rad], time [s]) of the Level 1 (or pass) roll-performance row of the first set
    that has one for the condition: the requirement k is measured against (MIL-F-8785C 6.2.6)."""
    for criteria in sets:
        entry = criteria.roll_performance
        if entry is None:
            continue
        for band in entry.bands:
            if band.level in (1, None) and band.applies(airplane_class, category, flight_phase, mass, speed):
                return band.bank_change, band.time_limit(mass)
    return None


def _roll_gap_notes(criteria, entry, airplane_class, category, flight_phase, mass):
    """Why no row decides: the rows not built in, or what the condition must state."""
    notes = []
    phases = sorted({p for b in entry.bands for p in (b.flight_phases or ())})
    if phases and flight_phase is None:
        notes.append(f"{criteria.name}: its rows hold in the " + " and ".join(phases)
                     + " phases: state the condition's flight_phase")
    elif phases and flight_phase not in phases and all(b.flight_phases for b in entry.bands):
        notes.append(f"{criteria.name}: no row for the {flight_phase} phase (rows for "
                     + " and ".join(phases) + ")")
    else:
        notes.append(f"{criteria.name}: no roll-performance row for Class {airplane_class or '(not given)'}, "
                     f"Category {category or '(not given)'}")
        if entry.note:
            notes.append(entry.note)
    if any(b.speed_low or b.speed_high for b in entry.bands):
        notes.append("rows with a speed range need V_min and V_max, which the aircraft file does not carry: "
                     "not applied")
    return tuple(notes)


def _roll_missing(entry, airplane_class, category, flight_phase, mass, condition_name):
    missing = []
    if airplane_class is None and any(b.classes is not None for b in entry.bands):
        missing.append("airplane_class (aircraft file key airplane_class)")
    if category is None and any(b.categories is not None for b in entry.bands):
        missing.append(f'category (condition "{condition_name}" key category)')
    if flight_phase is None and all(b.flight_phases for b in entry.bands):
        missing.append(f'flight_phase (condition "{condition_name}" key flight_phase)')
    if mass is None and any("mass" in b.needs() for b in entry.bands):
        missing.append("mass ([mass] mass)")
    return tuple(missing)


def assess(aircraft, criteria_sets=None, flight_phases=None, equivalent=True,
           static_checks=None) -> AircraftAssessment:
    """Assess every condition of an aircraft against handling-qualities criteria.

    Pipeline: :func:`latdyn.aircraft.load_aircraft` ->
    :func:`latdyn.augmentation.condition_model` (the bare airframe, or the
    augmented closed loop where the condition has an ``[augmentation]``) ->
    :func:`latdyn.augmentation.model_modes` ->
    :func:`assess_modes`.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft or str or os.PathLike
        An aircraft, or the path of an aircraft file.
    criteria_sets : iterable of CriteriaSet or str, optional
        Built-in names or file paths; default :func:`default_criteria`.
    flight_phases : mapping of str to str, optional
        Sub-phase per condition name (for example ``{"attack": "combat"}``)
        for the bands that hold only in some phases of a category.  A
        condition's own ``flight_phase`` attribute, if the aircraft file
        gives one, is used otherwise.
    equivalent : bool
        For each augmented condition also fit the equivalent low-order system
        (:func:`latdyn.equivalent_systems.fit_equivalent_system`) and grade its
        Dutch roll, roll and spiral with the same criteria sets.
    static_checks : iterable of latdyn.steady_checks.CheckGroup, optional
        The static checks of steady flight (sideslip senses, dihedral limit,
        static stability, crosswind, engine-out minimum control speed) to
        grade; default the built-in groups tied to the criteria sets used
        (:func:`latdyn.steady_checks.groups_for`); ``()`` grades none.

    Returns
    -------
    AircraftAssessment

    Raises
    ------
    latdyn.errors.InputError
        Bad aircraft or criteria file.
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.augmentation import condition_model
    from latdyn.departure import departure_indicators
    from latdyn.results import condition_modes
    from latdyn.roll_response import roll_response
    from latdyn.steady_checks import assess_steady, groups_for

    if not hasattr(aircraft, "conditions"):
        aircraft = load_aircraft(aircraft)
    airplane_class = aircraft.airplane_class
    sets = _load_sets(criteria_sets if criteria_sets is not None else default_criteria(airplane_class))
    groups = groups_for(sets) if static_checks is None else tuple(static_checks)
    flight_phases = dict(flight_phases or {})
    conditions = []
    for condition in aircraft.conditions:
        flight = condition.flight
        phase = flight_phases.get(condition.name, getattr(flight, "flight_phase", None))
        model = condition_model(aircraft, condition)
        modes = condition_modes(aircraft, condition, model)
        assessments = assess_modes(modes, sets, airplane_class, flight.category, phase, flight.altitude,
                                   condition.name)
        assessments, naming = assess_readings(modes, assessments, sets, airplane_class, flight.category,
                                              phase, flight.altitude, condition.name)
        mass = aircraft.mass.mass if aircraft.mass is not None else None
        controls = getattr(condition, "controls", None)
        rolls, roll = assess_roll_performance(model, controls, sets, airplane_class, flight.category,
                                              phase, mass, flight.speed, condition.name)
        response = roll_response(model, modes.get("dutch_roll"), getattr(controls, "aileron", None),
                                 _roll_requirement(sets, airplane_class, flight.category, phase, mass,
                                                   flight.speed), flight.category)
        fitted, graded = None, ()
        if equivalent and getattr(condition, "augmentation", None) is not None:
            from latdyn.equivalent_systems import fit_equivalent_system

            fitted = fit_equivalent_system(model, modes)
            graded = assess_modes(fitted.modes, sets, airplane_class, flight.category, phase,
                                  flight.altitude, condition.name)
        static, steady = assess_steady(aircraft, condition, groups, flight_phase=phase)
        conditions.append(ConditionAssessment(condition.name, flight.category, airplane_class, phase,
                                              flight.altitude, assessments + rolls + static, modes, roll,
                                              fitted, graded, roll_response=response,
                                              departure=departure_indicators(aircraft, condition),
                                              ambiguous_naming=naming, steady=steady))
    notes = []
    if airplane_class is None and any(s.assessment == "levels" for s in sets):
        notes.append("the aircraft file gives no airplane_class: military levels are given only where "
                     "every class gives the same result")
    augmented = [c.name for c in aircraft.conditions if getattr(c, "augmentation", None) is not None]
    if augmented:
        notes.append("graded with the stability augmentation engaged (closed-loop modes) in condition "
                     + ", ".join(f'"{n}"' for n in augmented))
    missing_category = [c.name for c in aircraft.conditions if c.flight.category is None]
    if missing_category and any(s.assessment == "levels" for s in sets):
        notes.append("no category for condition " + ", ".join(f'"{n}"' for n in missing_category)
                     + ": levels are given only where every category gives the same result")
    files = getattr(aircraft, "files", ())
    return AircraftAssessment(aircraft.name, files[0] if files else None, airplane_class, sets,
                              tuple(conditions), tuple(notes), checks=groups)
