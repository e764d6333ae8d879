"""Parameter sweeps: mode figures and levels on a grid, and where each level boundary is crossed.

One or two parameters vary over a grid (``KEY=START:STOP:COUNT``); the
cases run through the batched engine (:mod:`latdyn.studies.batch`).  A level
boundary crossing is found by root-finding on the continuous level margin
(:attr:`latdyn.levels.Grades.level_margin`) between neighbouring grid
points whose margins have opposite signs, so the value is not read off the
grid: every bracket of the sweep is refined at once by the Illinois
variant of regula falsi (Dowell and Jarratt, BIT 11, 1971) on the margin of
the full pipeline, each iteration one call of the batched engine for all
brackets.

The static checks of steady flight tied to the criteria sets
(:mod:`latdyn.steady_checks`; the engine-out minimum control speed against
1.2 V_S1 or 1.13 V_SR, ...) are graded at every point as pass/fail sets of
their own (:mod:`latdyn.studies.steady_batch`), so their boundaries are
root-found the same way: for example the rudder power ``Cn_dr`` at which
V_MC reaches 1.2 V_S1.  Each point's ``static_checks`` in the JSON gives
their values, limits and signed margins.

Levels are guidance only (:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from latdyn.errors import InputError
from latdyn.roots import illinois
from latdyn.studies.batch import condition_set, grades_roll, parameter_names, run_batch, sweep_notes
from latdyn.studies.keys import StudyKey, file_units, resolve_key
from latdyn.studies.rules import check_grid

__all__ = ["SweepAxis", "Crossing", "ConditionSweep", "SweepResult", "parse_range", "sweep",
           "find_crossings", "boundary_name", "MAX_POINTS", "level_text",
           "sweep_document", "SUMMARY_POINTS", "level_shares", "figure_ranges", "CurrentDesign",
           "current_design", "static_check_groups", "STATIC_CHECK_POINTS"]

#: Largest grid (points per condition) a sweep accepts [-].
MAX_POINTS = 1_000_000


def parse_range(text, file=""):
    """Split ``KEY=START:STOP:COUNT`` into (key, start, stop, count).

    Raises
    ------
    InputError
        Not of that form, non-finite numbers, COUNT below 2 or too large.

    Examples
    --------
    >>> parse_range("Cn_beta=0.05:0.15:11")
    ('Cn_beta', 0.05, 0.15, 11)
    """
    expected = "KEY=START:STOP:COUNT (for example Cn_beta=0.05:0.15:21)"
    key, sep, rest = text.partition("=")
    parts = rest.split(":")
    if not sep or not key.strip() or len(parts) != 3:
        raise InputError(file, "--vary", expected, f'"{text}"')
    try:
        start, stop = float(parts[0]), float(parts[1])
        count = int(parts[2])
    except ValueError:
        raise InputError(file, "--vary", expected, f'"{text}"') from None
    if not (math.isfinite(start) and math.isfinite(stop)) or start == stop:
        raise InputError(file, "--vary", "finite START and STOP that differ", f'"{text}"')
    if not 2 <= count <= MAX_POINTS:
        raise InputError(file, "--vary", f"COUNT from 2 to {MAX_POINTS}", f'"{text}"')
    return key.strip(), start, stop, count


@dataclass(frozen=True)
class SweepAxis:
    """One swept parameter: its key and grid values (typed units)."""

    key: StudyKey
    values: np.ndarray


@dataclass(frozen=True)
class Crossing:
    """Where one mode crosses one level boundary of one criteria set.

    Attributes
    ----------
    condition, criteria, mode : str
    boundary : str
        "level 1", "level 2", "level 3" or "pass".
    parameter : str
        The swept key as typed.
    value : float
        Parameter value at the crossing [typed units].
    inside : str
        "above" or "below": the side of ``value`` inside the boundary.
    at : dict or None
        Two-parameter sweeps: the other parameter's value on this grid line.
    """

    condition: str
    criteria: str
    mode: str
    boundary: str
    parameter: str
    value: float
    inside: str
    at: dict | None = None

    def as_dict(self) -> dict:
        out = {"condition": self.condition, "criteria": self.criteria, "mode": self.mode,
               "boundary": self.boundary, "parameter": self.parameter, "value": self.value,
               "inside": self.inside}
        if self.at is not None:
            out["at"] = self.at
        return out

    def words(self, unit="", at_units=None) -> str:
        """One line: 'dutch roll meets level 1 at Cn_beta >= 0.0831'.

        ``unit`` is the unit word of ``value``, ``at_units`` {key: unit word} those of ``at``.
        """
        sign = ">=" if self.inside == "above" else "<="
        at_units = at_units or {}
        where = "" if not self.at else " (" + ", ".join(
            f"{k} = {v:.6g}" + (f" {at_units[k]}" if at_units.get(k) else "")
            for k, v in self.at.items()) + ")"
        return (f"{self.condition}: {self.mode.replace('_', ' ')} within {self.boundary} of "
                f"{self.criteria} at {self.parameter} {sign} {self.value:.6g}"
                f"{' ' + unit if unit else ''}{where}")


@dataclass(frozen=True)
class ConditionSweep:
    """The grid results of one condition; unpacks as (condition, result, crossings).

    Attributes
    ----------
    condition : latdyn.aircraft.Condition
    result : latdyn.studies.batch.BatchResult
        Cases in grid order (first parameter slowest).
    crossings : tuple of Crossing
    """

    condition: object
    result: object
    crossings: tuple

    def __iter__(self):
        return iter((self.condition, self.result, self.crossings))


@dataclass(frozen=True)
class SweepResult:
    """A whole sweep.

    Attributes
    ----------
    aircraft : latdyn.aircraft.Aircraft
    axes : tuple of SweepAxis
    criteria : tuple of CriteriaSet
    conditions : tuple of ConditionSweep
    notes : tuple of str
        What the sweep holds and recomputes (:func:`latdyn.studies.batch.sweep_notes`).
    """

    aircraft: object
    axes: tuple
    criteria: tuple
    conditions: tuple
    notes: tuple = ()

    @property
    def crossings(self) -> tuple:
        return tuple(c for item in self.conditions for c in item.crossings)

    @property
    def shape(self) -> tuple:
        return tuple(len(axis.values) for axis in self.axes)

    def grid(self):
        """Parameter values of every case, (N, number of axes) [typed units]."""
        mesh = np.meshgrid(*[axis.values for axis in self.axes], indexing="ij")
        return np.stack([m.ravel() for m in mesh], axis=1)

    def in_units(self, units) -> "SweepResult":
        """The same sweep with its parameter values (grid and crossings) in "SI" or "US" units.

        Angles stay in degrees and the mode figures do not change: only the
        typed units of the swept keys (:class:`~latdyn.studies.keys.StudyKey`)
        are exchanged, by the factors of :mod:`latdyn.units`.
        """
        keys = {axis.key.text: (axis.key, replace(axis.key, units=units)) for axis in self.axes}

        def convert(text, value):
            typed, shown = keys[text]
            return shown.from_si(typed.to_si(value))

        axes = tuple(SweepAxis(keys[axis.key.text][1], convert(axis.key.text, axis.values))
                     for axis in self.axes)
        conditions = tuple(replace(item, crossings=tuple(
            replace(c, value=float(convert(c.parameter, c.value)),
                    at=None if c.at is None else {k: float(convert(k, v)) for k, v in c.at.items()})
            for c in item.crossings)) for item in self.conditions)
        return replace(self, axes=axes, conditions=conditions)

    def __repr__(self):
        axes = " x ".join(f"{a.key.text} {a.values[0]:.4g} to {a.values[-1]:.4g} ({len(a.values)})"
                          for a in self.axes)
        return (f"<SweepResult {self.aircraft.name}: {axes}; {len(self.conditions)} conditions; "
                f"{len(self.crossings)} level-boundary crossings; guidance only>")

    def _repr_html_(self):
        from latdyn.report.notebook import sweep_html

        return sweep_html(self)

    def to_pandas(self):
        """One row per condition and grid point, as in ``latdyn sweep --format json`` (needs pandas).

        See :func:`latdyn.frames.sweep_frame`; the crossings and the notice
        are in ``frame.attrs``.
        """
        from latdyn.frames import sweep_frame

        return sweep_frame(self)


def boundary_name(criteria, grade_index) -> str:
    """Name of a grade's boundary: "level 1".. or "pass" for a pass/fail set."""
    return "pass" if criteria.assessment == "pass_fail" else f"level {grade_index + 1}"


def _overrides(axes, columns):
    return {axis.key.name: axis.key.to_si(np.asarray(column, float))
            for axis, column in zip(axes, columns)}


def _margins_at(aircraft, condition, axes, moving, fixed, criteria_sets, wanted, roll=None):
    """Level margins at parameter values, all at once through the batched engine.

    ``moving`` (M,) values of the first parameter, ``fixed`` (M,) values of
    the second (two-parameter sweeps; ignored otherwise) [typed units];
    ``wanted`` (M,) of (criteria name, mode, grade index).  Returns (M,)
    margins (NaN where the mode is not graded at that value).
    """
    columns = [moving] + ([fixed] if len(axes) > 1 else [])
    cases = condition_set(aircraft, condition, _overrides(axes, columns))
    levels = run_batch(cases, criteria_sets, roll=roll).levels
    out = np.full(len(moving), np.nan)
    for index, (name, mode, grade_index) in enumerate(wanted):
        grades = levels.get((name, mode))
        if grades is not None:
            out[index] = grades.level_margin[index, grade_index]
    return out


def _grid_brackets(values, margins):
    """Sign changes of the grid margins: (crossings at grid points, brackets between them).

    Returns ``points`` [(value, above)] and ``brackets`` [(i, above)] where
    ``above`` says whether the band lies on the side of larger parameter
    values.  A margin of exactly zero at a grid point is a crossing there
    when the margins on either side have opposite signs.
    """
    values = np.asarray(values)
    m = np.asarray(margins, dtype=float)
    a, b = m[:-1], m[1:]
    with np.errstate(invalid="ignore"):
        usable = np.isfinite(a) & np.isfinite(b) & (a * b <= 0) & ~((a == 0) & (b == 0))
    if not usable.any():
        return [], []
    increasing = values[1:] > values[:-1]
    points, brackets = [], []
    for i in np.flatnonzero(usable):
        if a[i] == 0:
            if i > 0 and np.isfinite(m[i - 1]) and m[i - 1] * b[i] < 0:
                points.append((values[i], bool(b[i] > 0)))
        elif b[i] == 0:
            points.append((values[i + 1], bool(a[i] < 0)))
        else:
            brackets.append((int(i), bool((b[i] > 0) == increasing[i])))
    return points, brackets


def find_crossings(aircraft, condition, axes, result, criteria_sets, roll=None) -> tuple:
    """Every level-boundary crossing along the first parameter of a sweep grid.

    For two parameters, along the first one on each grid line of the second.
    Sign changes of the grid's margins bracket the crossings; all brackets
    (every criteria set, mode, boundary and grid line) are then refined
    together by :func:`latdyn.roots.illinois` on the margin of the full pipeline,
    evaluated for every bracket at once through the batched engine, to the
    tolerance of Brent's method used before (1e-12 of the parameter).

    Returns
    -------
    tuple of Crossing
    """
    shape = tuple(len(a.values) for a in axes)
    lines = [()] if len(axes) == 1 else [(j,) for j in range(shape[1])]
    found = []  # (order, Crossing)
    pending = []  # (order, criteria, mode, grade index, line, x0, x1, above)
    order = 0
    for criteria in criteria_sets:
        graded = criteria.mode_names + (("roll_performance",) if criteria.roll_performance else ())
        for mode in graded:
            grades = result.levels.get((criteria.name, mode))
            if grades is None:
                continue
            margins = grades.level_margin.reshape(shape + grades.level_margin.shape[-1:])
            for line in lines:
                for g in range(margins.shape[-1]):
                    series = margins[(slice(None),) + line + (g,)]
                    points, brackets = _grid_brackets(axes[0].values, series)
                    for value, above in points:
                        found.append((order, criteria, mode, g, line, float(value), above))
                        order += 1
                    for i, above in brackets:
                        pending.append((order, criteria, mode, g, line, float(axes[0].values[i]),
                                        float(axes[0].values[i + 1]), above))
                        order += 1
    if pending:
        names = criteria_sets
        wanted = [(item[1].name, item[2], item[3]) for item in pending]
        fixed = np.array([float(axes[1].values[item[4][0]]) if item[4] else 0.0 for item in pending])
        x0 = np.array([item[5] for item in pending])
        x1 = np.array([item[6] for item in pending])
        both = _margins_at(aircraft, condition, axes, np.concatenate([x0, x1]),
                           np.concatenate([fixed, fixed]), names, wanted + wanted, roll)
        f0, f1 = both[:len(pending)], both[len(pending):]
        valid = np.isfinite(f0) & np.isfinite(f1) & (f0 * f1 <= 0)
        keep = np.flatnonzero(valid)
        tolerance = 1e-12 * np.maximum(np.maximum(np.abs(x0), np.abs(x1)), 1e-300)

        def margin(index, points):
            chosen = keep[index]
            return _margins_at(aircraft, condition, axes, points, fixed[chosen], names,
                               [wanted[k] for k in chosen], roll)

        roots = illinois(margin, x0[keep], x1[keep], f0[keep], f1[keep], tolerance[keep])
        for k, root in zip(keep, roots):
            if np.isfinite(root):
                item = pending[k]
                found.append((item[0], item[1], item[2], item[3], item[4], float(root), item[7]))
    out = []
    for _, criteria, mode, g, line, value, above in sorted(found, key=lambda entry: entry[0]):
        at = {axes[1].key.text: float(axes[1].values[line[0]])} if line else None
        out.append(Crossing(condition.name, criteria.name, mode, boundary_name(criteria, g),
                            axes[0].key.text, value, "above" if above else "below", at))
    return tuple(out)


def sweep(aircraft, ranges, condition=None, criteria_sets=None, progress=False,
          roll_performance=None) -> SweepResult:
    """Sweep one or two parameters over a grid for each condition (or the named one).

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
    ranges : sequence of (key, start, stop, count)
        One or two ranges (:func:`parse_range`); values in the file's units
        and degrees.
    condition : str, optional
        Only this condition.
    criteria_sets : iterable of CriteriaSet or str, optional
        Default: :func:`latdyn.assessment.default_criteria` of the aircraft.
    progress : bool
        Progress bar on long runs.
    roll_performance : bool or None
        Grade roll performance at every point (and find its crossings); None:
        where a control key is swept (:func:`latdyn.studies.batch.grades_roll`).

    Returns
    -------
    SweepResult

    Raises
    ------
    InputError
        A key the condition cannot vary, more than two ranges, a grid too large.
    """
    from latdyn.assessment import default_criteria
    from latdyn.studies.batch import _load_sets

    if not 1 <= len(ranges) <= 2:
        raise InputError(aircraft.file, "--vary", "one or two --vary ranges", f"{len(ranges)}")
    if math.prod(r[3] for r in ranges) > MAX_POINTS:
        raise InputError(aircraft.file, "--vary", f"at most {MAX_POINTS} grid points",
                         f"{math.prod(r[3] for r in ranges)}")
    sets = _load_sets(criteria_sets if criteria_sets is not None
                      else default_criteria(aircraft.airplane_class))
    sets += static_check_groups(sets, math.prod(r[3] for r in ranges))
    chosen = (aircraft.condition(condition),) if condition else aircraft.conditions
    words = file_units(aircraft)
    items, notes = [], ()
    axes = None
    for item in chosen:
        allowed = parameter_names(aircraft, item)
        axes = tuple(SweepAxis(resolve_key(key, allowed, aircraft.file, units_word=words,
                                           condition=item.name),
                               np.linspace(start, stop, count))
                     for key, start, stop, count in ranges)
        if len({axis.key.name for axis in axes}) != len(axes):
            raise InputError(aircraft.file, "--vary", "two different keys", "the same key twice")
        check_grid(aircraft, item, axes)
        mesh = np.meshgrid(*[axis.values for axis in axes], indexing="ij")
        cases = condition_set(aircraft, item, _overrides(axes, [m.ravel() for m in mesh]))
        roll = grades_roll(cases, roll_performance)
        result = run_batch(cases, sets, progress=progress, path=len(axes) == 1, roll=roll)
        crossings = find_crossings(aircraft, item, axes, result, sets, roll)
        items.append(ConditionSweep(item, result, crossings))
        notes += sweep_notes(aircraft, item, [axis.key.name for axis in axes])
        if any(key == (g.name, "minimum_control_speed") for g in sets for key in result.levels):
            from latdyn.steady import HELD_NOTE

            notes += (f"{item.name}: engine-out minimum control speed: {HELD_NOTE} at each point",)
        if roll and not any(key == "roll_performance" for _, key in result.levels):
            notes += (f"{item.name}: roll performance not graded: "
                      + ("no aileron travel (aircraft file [controls] aileron_deg, or sweep "
                         "controls.aileron_deg)" if "controls.aileron" not in cases.overrides
                         and getattr(getattr(item, "controls", None), "aileron", None) is None
                         else "no criteria set has a roll-performance row for this condition"),)
    if math.prod(r[3] for r in ranges) > STATIC_CHECK_POINTS and static_check_groups(sets, 1):
        notes += (f"static checks of steady flight not graded on grids above {STATIC_CHECK_POINTS} "
                  "points",)
    return SweepResult(aircraft, axes, sets, tuple(items), tuple(notes))


@dataclass(frozen=True)
class CurrentDesign:
    """The aircraft as its file gives it, placed on a sweep's axes.

    Attributes
    ----------
    condition : str
    values : tuple of float
        The value of each swept parameter [typed units, as the sweep's axes]; NaN where the
        file gives none.
    result : latdyn.studies.batch.BatchResult
        Its mode figures and levels (one case, the same engine as the grid).
    """

    condition: str
    values: tuple
    result: object


def _current_value(aircraft, condition, inputs, name):
    """The file's value of a batch input name [SI, rad]; None where the file gives none."""
    if name in ("fin.area_ratio", "fin.arm_ratio"):
        return 1.0
    if name.startswith("augmentation."):
        augmentation = getattr(condition, "augmentation", None)
        return None if augmentation is None else getattr(augmentation, name.split(".", 1)[1], None)
    if name == "mach":
        return inputs.get("mach_number")
    if name in inputs:
        return inputs[name]
    from latdyn.estimation.buildup import flat_values

    return flat_values(aircraft, condition.flight).get(name)


def current_design(result: SweepResult) -> tuple:
    """Where the current design (the file's values) lies on a sweep, per condition.

    Parameters
    ----------
    result : SweepResult

    Returns
    -------
    tuple of CurrentDesign
        In the order of ``result.conditions``.

    Examples
    --------
    >>> from latdyn.aircraft import load_aircraft
    >>> fin = load_aircraft("aircraft/studies/kestrel-k40-fin.toml")
    >>> swept = sweep(fin, [parse_range("fin.area_ratio=0.5:1.5:3")], "cruise")
    >>> current_design(swept)[0].values
    (1.0,)
    """
    from latdyn.studies.batch import case_inputs

    out = []
    for item in result.conditions:
        cases = condition_set(result.aircraft, item.condition)
        inputs = case_inputs(cases)
        values = []
        for axis in result.axes:
            value = _current_value(result.aircraft, item.condition, inputs, axis.key.name)
            values.append(math.nan if value is None else float(axis.key.from_si(float(np.ravel(value)[0]))))
        out.append(CurrentDesign(item.condition.name, tuple(values), run_batch(cases, result.criteria)))
    return tuple(out)


#: Largest grid (points per condition) on which a sweep grades the static checks of steady flight
#: (the engine-out minimum control speed is a search per point).
STATIC_CHECK_POINTS = 100_000


def static_check_groups(sets, points) -> tuple:
    """The static-check groups tied to the criteria sets (:func:`latdyn.steady_checks.groups_for`)
    not already among them; none on grids above :data:`STATIC_CHECK_POINTS` points."""
    from latdyn.steady_checks import CheckGroup, groups_for

    if points > STATIC_CHECK_POINTS:
        return ()
    present = {c.name for c in sets if isinstance(c, CheckGroup)}
    return tuple(g for g in groups_for([c for c in sets if not isinstance(c, CheckGroup)])
                 if g.name not in present)


#: Grids larger than this (points per condition) print a summary, not every point, as a table.
SUMMARY_POINTS = 400


def level_shares(result: SweepResult) -> list:
    """Share of the grid points at each level, per condition, criteria set and mode.

    Returns
    -------
    list of dict
        ``{"condition", "criteria", "mode", "shares": {word: fraction}}`` with the
        words of :func:`latdyn.studies.uncertainty.level_probabilities`.
    """
    from latdyn.studies.uncertainty import level_probabilities

    out = []
    for item in result.conditions:
        for (name, mode), grades in item.result.levels.items():
            criteria = next(c for c in result.criteria if c.name == name)
            out.append({"condition": item.condition.name, "criteria": name, "mode": mode,
                        "shares": level_probabilities(criteria, grades.level)})
    return out


def figure_ranges(result: SweepResult) -> list:
    """Smallest and largest value of each mode figure over the grid, per condition (SI).

    Returns
    -------
    list of dict
        ``{"condition", "figure", "minimum", "maximum", "available"}`` for the
        figures present somewhere (``available``: share of points that have it).
    """
    from latdyn.studies.batch import FIGURES

    out = []
    for item in result.conditions:
        for name in FIGURES:
            values = np.asarray(getattr(item.result.figures, name), dtype=float)
            finite = values[np.isfinite(values)]
            if finite.size:
                out.append({"condition": item.condition.name, "figure": name,
                            "minimum": float(finite.min()), "maximum": float(finite.max()),
                            "available": finite.size / values.size})
    return out


# ------------------------------------------------------------------ outputs
#: Figures of a sweep point in the JSON document.
_SHOWN = ("dutch_roll_frequency", "dutch_roll_damping", "roll_time_constant", "spiral_time_to_double",
          "spiral_time_to_half", "roll_spiral_frequency", "roll_spiral_damping")


def level_text(criteria, level) -> str:
    """A batch level as a short word: 1, 2, 3, >3, pass, fail, or - (not assessed)."""
    level = int(level)
    if level == 0:
        return "-"
    if criteria.assessment == "pass_fail":
        return "pass" if level == 1 else "fail"
    return ">3" if level > 3 else str(level)


def _json_number(value):
    value = float(value)
    return value if math.isfinite(value) else None


def _crossing_entry(crossing, keys) -> dict:
    """One crossing of the JSON document: ``value`` (and ``at``) in SI units and radians, with
    ``unit``; ``file_value`` (and ``file_at``) as typed, in the file's units, with ``file_unit``."""
    key = keys[crossing.parameter]
    out = crossing.as_dict()
    out["value"] = float(key.to_si(crossing.value))
    out["unit"] = key.si_unit
    out["file_value"] = crossing.value
    out["file_unit"] = key.unit
    if crossing.at is not None:
        out["at"] = {k: float(keys[k].to_si(v)) for k, v in crossing.at.items()}
        out["file_at"] = dict(crossing.at)
    return out


def sweep_document(result: SweepResult) -> dict:
    """The ``latdyn sweep --format json`` document, in SI units and radians.

    Parameter values (the grid, each point's ``parameters``, each crossing's
    ``value`` and ``at``) are SI and radians, labelled by ``unit``; the same
    values as typed, in the aircraft file's units and degrees, stand beside
    them as ``file_values``, ``file_parameters``, ``file_value`` and
    ``file_at``, labelled by ``file_unit``.  Mode figures are SI.
    """
    from latdyn import __version__
    from latdyn.assessment import NOTICE

    typed = result.grid()
    keys = {axis.key.text: axis.key for axis in result.axes}
    grid = np.stack([axis.key.to_si(typed[:, k]) for k, axis in enumerate(result.axes)], axis=1)
    groups = {c.name for c in result.criteria if getattr(c, "checks", None) is not None}
    conditions = []
    for item in result.conditions:
        figures = item.result.figures
        points = []
        for i in range(len(grid)):
            levels = {}
            for (name, mode), grades in item.result.levels.items():
                criteria = next(c for c in result.criteria if c.name == name)
                word = level_text(criteria, grades.level[i])
                value = None if word == "-" else (word if criteria.assessment == "pass_fail"
                                                  else int(grades.level[i]))
                levels.setdefault(name, {})[mode] = value
            static = {}
            for (name, mode), grades in item.result.levels.items():
                if name in groups:
                    static.setdefault(name, {})[mode] = {
                        "value": _json_number(grades.value[i]), "limit": _json_number(grades.limit[i]),
                        "margin": _json_number(grades.margin[i])}
            points.append({
                "parameters": {axis.key.text: float(grid[i, k]) for k, axis in enumerate(result.axes)},
                "file_parameters": {axis.key.text: float(typed[i, k])
                                    for k, axis in enumerate(result.axes)},
                "pattern": int(figures.pattern[i]),
                **{key: _json_number(getattr(figures, key)[i]) for key in _SHOWN},
                "phi_to_beta": _json_number(figures.phi_to_beta[i]),
                "roll_root": _json_number(figures.roll_root[i]),
                "spiral_root": _json_number(figures.spiral_root[i]),
                "time_to_bank": _json_number(figures.time_to_bank[i]),
                "bank_change": _json_number(figures.bank_change[i]),
                "levels": levels,
                **({"static_checks": static} if static else {}),
            })
        conditions.append({"name": item.condition.name, "category": item.condition.flight.category,
                           "points": points})
    return {
        "latdyn_version": __version__, "aircraft": result.aircraft.name,
        "file": result.aircraft.file, "notice": NOTICE, "notes": list(result.notes),
        "parameters": [{"key": a.key.text, "unit": a.key.si_unit,
                        "values": np.asarray(a.key.to_si(a.values), float).tolist(),
                        "file_unit": a.key.unit, "file_values": a.values.tolist()}
                       for a in result.axes],
        "criteria": [c.name for c in result.criteria],
        "conditions": conditions,
        "crossings": [_crossing_entry(c, keys) for c in result.crossings],
    }
