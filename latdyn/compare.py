"""Configuration comparison: what changed between a base aircraft and its variants.

Per flight condition (matched by name): each mode's figures side by side
with the change (absolute and per cent) -- and the roll performance (time to
each criteria set's bank-angle change), the response to roll control and the
departure indicators as figures of ``mode`` "roll_performance",
"roll_response" and "departure" --, the handling-quality level changes
(improved / degraded), and the input differences that caused them — the
derivatives as written in the files, the primed dimensional derivatives
actually used, mass, inertia and flight condition.

No new formulas here: figures come from :mod:`latdyn.modes`, levels from
:mod:`latdyn.assessment`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

from latdyn.aircraft import Aircraft, NondimensionalDerivatives
from latdyn.assessment import NOTICE, assess
from latdyn.model import DIMENSIONAL_NAMES, DIMENSIONAL_UNITS, primed_derivatives
from latdyn.results import analyse_aircraft

__all__ = [
    "FigureChange", "LevelChange", "InputChange", "ConditionComparison", "Comparison",
    "compare", "compare_many", "comparison_document", "MODE_FIGURES", "drops_below", "relative_change",
    "RESPONSE_FIGURES", "DEPARTURE_FIGURES",
]

#: (mode figure attribute, label, unit) compared for each mode.
MODE_FIGURES = (
    ("natural_frequency", "omega_n", "rad/s"),
    ("damping_ratio", "zeta", "-"),
    ("zeta_omega", "zeta*omega_n", "rad/s"),
    ("period", "period", "s"),
    ("time_constant", "time constant", "s"),
    ("time_to_half", "time to half", "s"),
    ("time_to_double", "time to double", "s"),
    ("phi_to_beta", "|phi/beta|", "-"),
    ("real_part", "Re(root)", "1/s"),
)


#: (field, label, unit) of the response to roll control compared (latdyn.roll_response, SI).
RESPONSE_FIGURES = (
    ("p_osc_over_p_av", "p_osc/p_av", "-"),
    ("first_minimum_ratio", "p_min/p_peak", "-"),
    ("phi_osc_over_phi_av", "phi_osc/phi_av", "-"),
    ("psi_beta", "psi_beta", "rad"),
    ("delta_beta_max", "Delta beta_max", "rad"),
    ("k", "k", "-"),
    ("delta_beta_over_k", "Delta beta_max/k", "rad"),
)
#: (field, label, unit) of the departure indicators compared (latdyn.departure).
DEPARTURE_FIGURES = (("cn_beta_dynamic", "Cn_beta,dyn", "1/rad"), ("lcdp", "LCDP", "1/rad"))


def _roll_figures(condition_a, condition_b) -> list:
    """Figure changes of roll performance (each criteria set's graded time to its bank change,
    where base and variant are graded on the same change), the response to roll control and the
    departure indicators of two ConditionAssessments."""
    out = []
    rolls_b = {a.criteria: a for a in condition_b.assessments if a.mode == "roll_performance"}
    for entry_a in condition_a.assessments:
        entry_b = rolls_b.get(entry_a.criteria)
        if entry_a.mode != "roll_performance" or entry_b is None or entry_a.bank_change is None \
                or entry_a.bank_change != entry_b.bank_change:
            continue
        if entry_a.value is None and entry_b.value is None:
            continue
        change, percent = relative_change(entry_a.value, entry_b.value)
        out.append(FigureChange("roll_performance",
                                f"time to {math.degrees(entry_a.bank_change):.3g} deg ({entry_a.criteria})",
                                "s", entry_a.value, entry_b.value, change, percent))
    for group, attribute, table in (("roll_response", "roll_response", RESPONSE_FIGURES),
                                    ("departure", "departure", DEPARTURE_FIGURES)):
        a, b = getattr(condition_a, attribute, None), getattr(condition_b, attribute, None)
        for name, label, unit in table:
            value_a = getattr(a, name, None) if a is not None else None
            value_b = getattr(b, name, None) if b is not None else None
            if value_a is None and value_b is None:
                continue
            change, percent = relative_change(value_a, value_b)
            out.append(FigureChange(group, label, unit, value_a, value_b, change, percent))
    return out


def relative_change(base, variant):
    """(variant - base, per cent change of |base|), None where not defined.

    Examples
    --------
    >>> relative_change(2.0, 2.5)
    (0.5, 25.0)
    >>> relative_change(None, 1.0)
    (None, None)
    >>> relative_change(0.0, 1.0)
    (1.0, None)
    """
    if base is None or variant is None:
        return None, None
    change = variant - base
    percent = 100.0 * change / abs(base) if base != 0 else None
    return change, percent


def _figure(mode, name):
    if mode is None:
        return None
    if name == "zeta_omega":
        if mode.natural_frequency is None or mode.damping_ratio is None:
            return None
        return mode.natural_frequency * mode.damping_ratio
    if name == "real_part":
        return float(mode.eigenvalue.real)
    return getattr(mode, name)


@dataclass(frozen=True)
class FigureChange:
    """One mode figure in the base and the variant; unpacks as (mode, figure, base, variant)."""

    mode: str
    figure: str
    unit: str
    base: float | None
    variant: float | None
    change: float | None
    change_percent: float | None

    def __iter__(self):
        return iter((self.mode, self.figure, self.base, self.variant))

    def as_dict(self):
        return {f.name: getattr(self, f.name) for f in fields(self)}


@dataclass(frozen=True)
class LevelChange:
    """A mode's level (or pass/fail) under one criteria set, base against variant."""

    criteria: str
    edition: str
    mode: str
    base_level: int | None
    variant_level: int | None
    base_pass: bool | None
    variant_pass: bool | None
    base_margin_fraction: float | None
    variant_margin_fraction: float | None
    verdict: str  # "improved", "degraded", "unchanged", "not assessed"

    def as_dict(self):
        return {f.name: getattr(self, f.name) for f in fields(self)}


@dataclass(frozen=True)
class InputChange:
    """One input value that differs between base and variant (SI, angles in degrees).

    ``quantity`` names the display quantity of a dimensional value
    (:class:`latdyn.display.UnitSystem`: ``"mass"``, ``"speed"``, ...), or
    None for a value shown as it is (a coefficient, 1/s, degrees); the
    tables convert by it.  It is not part of the JSON document.
    """

    group: str   # "derivatives (as given)", "primed dimensional", "mass", "flight condition"
    key: str
    unit: str
    base: float | str | None
    variant: float | str | None
    change: float | None
    change_percent: float | None
    quantity: str | None = None

    def as_dict(self):
        return {f.name: getattr(self, f.name) for f in fields(self) if f.name != "quantity"}


@dataclass(frozen=True)
class ConditionComparison:
    """The comparison of one flight condition."""

    name: str
    base_pattern: str
    variant_pattern: str
    figures: tuple
    levels: tuple
    inputs: tuple

    @property
    def level_moves(self):
        """Level changes that moved (improved or degraded)."""
        return tuple(c for c in self.levels if c.verdict in ("improved", "degraded"))

    def as_dict(self):
        return {"name": self.name, "base_pattern": self.base_pattern,
                "variant_pattern": self.variant_pattern,
                "figures": [f.as_dict() for f in self.figures],
                "levels": [c.as_dict() for c in self.levels],
                "input_changes": [c.as_dict() for c in self.inputs]}


@dataclass(frozen=True)
class Comparison:
    """Base against one variant; unpacks as (base, variant, conditions)."""

    base: str
    base_file: str
    variant: str
    variant_file: str
    conditions: tuple
    only_in_base: tuple
    only_in_variant: tuple
    criteria: tuple
    notice: str = NOTICE

    def __iter__(self):
        return iter((self.base, self.variant, self.conditions))

    def as_dict(self):
        return {"base": {"aircraft": self.base, "file": self.base_file},
                "variant": {"aircraft": self.variant, "file": self.variant_file},
                "criteria": [{"name": c.name, "edition": c.edition} for c in self.criteria],
                "conditions": [c.as_dict() for c in self.conditions],
                "only_in_base": list(self.only_in_base),
                "only_in_variant": list(self.only_in_variant)}


def _verdict(base, variant):
    a, b = base.severity, variant.severity
    if a == 0 or b == 0:
        return "not assessed"
    if b < a:
        return "improved"
    if b > a:
        return "degraded"
    return "unchanged"


def _inputs_as_given(aircraft, condition):
    """{(group, key): (SI unit, value, display quantity or None)} of one condition's inputs."""
    from latdyn.display import DERIVATIVE_QUANTITIES

    derivatives = condition.derivatives
    out = {}
    names = [f.name for f in fields(derivatives) if f.name not in ("axes", "primed")]
    label = "derivatives (as given)" if isinstance(derivatives, NondimensionalDerivatives) \
        else "dimensional (as given)"
    for name in names:
        dimensional = not label.startswith("derivatives")
        unit = DIMENSIONAL_UNITS.get(name, "") if dimensional else "1/rad"
        out[(label, name)] = (unit, getattr(derivatives, name),
                              DERIVATIVE_QUANTITIES.get(name) if dimensional else None)
    out[(label, "axes")] = ("", derivatives.axes, None)
    primed = primed_derivatives(aircraft, condition)
    for name in DIMENSIONAL_NAMES:
        out[("primed dimensional", name)] = (DIMENSIONAL_UNITS[name], getattr(primed, name),
                                             DERIVATIVE_QUANTITIES.get(name))
    if aircraft.mass is not None:
        for name, unit, quantity in (("mass", "kg", "mass"), ("Ixx", "kg m^2", "inertia"),
                                     ("Izz", "kg m^2", "inertia"), ("Ixz", "kg m^2", "inertia")):
            out[("mass", name)] = (unit, getattr(aircraft.mass, name), quantity)
    if aircraft.geometry is not None:
        out[("geometry", "wing_area")] = ("m^2", aircraft.geometry.wing_area, "area")
        out[("geometry", "span")] = ("m", aircraft.geometry.span, "length")
    flight = condition.flight
    for name, unit, value, quantity in (
            ("speed", "m/s", flight.speed, "speed"), ("altitude", "m", flight.altitude, "length"),
            ("density", "kg/m^3", flight.density, "density"),
            ("alpha", "deg", math.degrees(flight.alpha), None),
            ("gamma", "deg", math.degrees(flight.gamma), None),
            ("category", "", flight.category, None)):
        out[("flight condition", name)] = (unit, value, quantity)
    return out


def _input_changes(base_aircraft, base_condition, variant_aircraft, variant_condition):
    a = _inputs_as_given(base_aircraft, base_condition)
    b = _inputs_as_given(variant_aircraft, variant_condition)
    changes = []
    for key in list(dict.fromkeys([*a, *b])):
        unit, value_a, quantity = a.get(key, (b[key][0], None, b[key][2]))
        value_b = b[key][1] if key in b else None
        if value_a == value_b:
            continue
        if isinstance(value_a, float) and isinstance(value_b, float) and \
                math.isclose(value_a, value_b, rel_tol=1e-12, abs_tol=1e-15):
            continue
        numeric = isinstance(value_a, (int, float)) and isinstance(value_b, (int, float))
        change, percent = relative_change(value_a, value_b) if numeric else (None, None)
        changes.append(InputChange(key[0], key[1], unit, value_a, value_b, change, percent, quantity))
    return tuple(changes)


def compare(base: Aircraft, variant: Aircraft, criteria_sets=None) -> Comparison:
    """Compare a variant with its base, condition by condition.

    Parameters
    ----------
    base, variant : Aircraft
    criteria_sets : iterable of str or CriteriaSet, optional
        Default: those of :func:`latdyn.assessment.default_criteria` for the
        base's airplane class.

    Returns
    -------
    Comparison
    """
    from latdyn.assessment import default_criteria

    sets = criteria_sets if criteria_sets is not None else default_criteria(base.airplane_class)
    results_a = {r.condition.name: r for r in analyse_aircraft(base)}
    results_b = {r.condition.name: r for r in analyse_aircraft(variant)}
    levels_a = {c.name: c for c in assess(base, sets).conditions}
    assessment_b = assess(variant, sets)
    levels_b = {c.name: c for c in assessment_b.conditions}
    conditions = []
    for name, result_a in results_a.items():
        result_b = results_b.get(name)
        if result_b is None:
            continue
        figures = []
        mode_names = list(dict.fromkeys([m.name for m in result_a.modes]
                                        + [m.name for m in result_b.modes]))
        for mode_name in mode_names:
            mode_a, mode_b = result_a.modes.get(mode_name), result_b.modes.get(mode_name)
            for figure, label, unit in MODE_FIGURES:
                value_a, value_b = _figure(mode_a, figure), _figure(mode_b, figure)
                if value_a is None and value_b is None:
                    continue
                change, percent = relative_change(value_a, value_b)
                figures.append(FigureChange(mode_name, label, unit, value_a, value_b, change, percent))
        figures += _roll_figures(levels_a[name], levels_b[name])
        level_changes = []
        entries_b = {(x.criteria, x.mode): x for x in levels_b[name].assessments}
        for entry_a in levels_a[name].assessments:
            entry_b = entries_b.get((entry_a.criteria, entry_a.mode))
            if entry_b is None:
                continue
            level_changes.append(LevelChange(
                entry_a.criteria, entry_a.edition, entry_a.mode, entry_a.level, entry_b.level,
                entry_a.passed, entry_b.passed, entry_a.margin_fraction, entry_b.margin_fraction,
                _verdict(entry_a, entry_b)))
        conditions.append(ConditionComparison(
            name, result_a.modes.pattern, result_b.modes.pattern, tuple(figures),
            tuple(level_changes),
            _input_changes(base, result_a.condition, variant, result_b.condition)))
    return Comparison(base.name, base.file, variant.name, variant.file, tuple(conditions),
                      tuple(n for n in results_a if n not in results_b),
                      tuple(n for n in results_b if n not in results_a),
                      assessment_b.criteria)


def drops_below(comparisons, threshold) -> list:
    """``(variant, condition, LevelChange)`` of every check a variant takes below Level ``threshold``.

    A drop is a check below the level in the variant that was not below it
    in the base (:func:`latdyn.assessment.below_level`).
    """
    from latdyn.assessment import below_level

    return [(comparison.variant, condition.name, change)
            for comparison in comparisons for condition in comparison.conditions
            for change in condition.levels
            if below_level(change.variant_level, change.variant_pass, threshold)
            and not below_level(change.base_level, change.base_pass, threshold)]


def compare_many(base: Aircraft, variants, criteria_sets=None) -> tuple:
    """The base against each variant: a tuple of :class:`Comparison`."""
    return tuple(compare(base, v, criteria_sets) for v in variants)


def comparison_document(comparisons) -> dict:
    """The JSON document of ``latdyn compare --format json``.

    Layout: ``{"latdyn_version", "notice", "comparisons": [{"base": {"aircraft", "file"},
    "variant": {...}, "criteria": [{"name", "edition"}], "conditions": [{"name",
    "base_pattern", "variant_pattern", "figures": [{"mode", "figure", "unit", "base",
    "variant", "change", "change_percent"}], "levels": [{"criteria", "edition", "mode",
    "base_level", "variant_level", "base_pass", "variant_pass", "base_margin_fraction",
    "variant_margin_fraction", "verdict"}], "input_changes": [{"group", "key", "unit",
    "base", "variant", "change", "change_percent"}]}], "only_in_base", "only_in_variant"}]}``
    """
    from latdyn import __version__

    return {"latdyn_version": __version__, "notice": NOTICE,
            "comparisons": [c.as_dict() for c in comparisons]}
