"""Every table latdyn shows, defined once: one function per table.

Each function takes result objects of the library and returns a
:class:`~latdyn.report.blocks.Table`: rows of raw values (numbers stay
numbers; angles and rates already in the display units of ``units``) and
the columns with their names, symbols and units.  The terminal text,
Markdown, CSV, HTML and JSON renderers (:mod:`latdyn.report.render`) only
format them; where two outputs show different columns of the same table
they take a view (:meth:`Table.select`), never a second definition.

No formulas here: every number comes from the pipeline stages.
"""

from __future__ import annotations

import math
import os

from latdyn.display import DEFAULT, SIGNAL_QUANTITIES, bank_at_end_words, format_number
from latdyn.modes import MODE_LABELS
from latdyn.report.blocks import Absent, Column, Table

__all__ = [
    "MODE_TEXT_VIEW", "MODE_REPORT_VIEW", "ASSESSMENT_TEXT_VIEW", "ASSESSMENT_REPORT_VIEW",
    "ASSESSMENT_CSV_VIEW", "SUMMARY_VIEW", "FIGURE_GROUPS",
    "mode_status", "mode_table", "shape_table", "flight_condition_table", "mass_table",
    "given_table", "assessment_table", "assessment_sources",
    "summary_table", "comparison_tables", "readout_table", "transfer_table", "provenance_tables",
    "sweep_table", "sensitivity_table", "uncertainty_tables", "uncertainty_inputs_table", "parameter_label", "value_reason",
    "turbulence_table", "equivalent_table", "roll_response_table", "FIGURE_LABELS", "buildup_table", "buildup_caption",
    "steady_table", "check_label", "STEADY_PARTS",
]


def _columns(*columns):
    return tuple(columns)


# ------------------------------------------------------------------ modes

def mode_status(mode) -> str:
    """``stable``, ``neutral`` or ``DIVERGENT``: the same word in every output.

    Examples
    --------
    >>> from types import SimpleNamespace as M
    >>> mode_status(M(neutral=False, stable=False)), mode_status(M(neutral=True, stable=False))
    ('DIVERGENT', 'neutral')
    """
    if mode.neutral:
        return "neutral"
    return "stable" if mode.stable else "DIVERGENT"


MODE_COLUMNS = _columns(
    Column("mode", "Mode"),
    Column("roots", "Root(s)", "1/s"),
    Column("re", "Re(root)", "1/s"),
    Column("im", "Im(root)", "1/s"),
    Column("natural_frequency", "omega_n", "rad/s"),
    Column("damping_ratio", "zeta", "-"),
    Column("period", "Period", "s"),
    Column("time_constant", "T", "s"),
    Column("time_to_half", "T_half", "s"),
    Column("time_to_double", "T_double", "s"),
    Column("cycles_to_half", "N_half", "cycles", digits=3),
    Column("phi_to_beta", "|phi/beta|", "-", digits=3),
    Column("status", "Status"),
)
#: Columns of the mode table on the terminal (roots as ``re ± im j``).
MODE_TEXT_VIEW = ("mode", "roots", "natural_frequency", "damping_ratio", "period", "time_constant",
                  "time_to_half", "time_to_double", "cycles_to_half", "phi_to_beta", "status")
#: Columns of the mode table in a report (real and imaginary parts as numbers).
MODE_REPORT_VIEW = ("mode", "re", "im", "natural_frequency", "damping_ratio", "period",
                    "time_constant", "time_to_half", "time_to_double", "cycles_to_half",
                    "phi_to_beta", "status")


def mode_table(modes, name="modes", caption="Modes") -> Table:
    """The mode table of a :class:`~latdyn.modes.ModeSet`.

    A divergent mode has its time to double and no time constant or time to
    half (None): no stable-looking figure for an unstable mode.  Rows of
    modes that are not stable are emphasised.  The roots an augmentation
    adds (``modes.added``) follow the airframe's modes, labelled
    "added: <block>".
    """
    rows, emphasis = [], []
    added = tuple(getattr(modes, "added", ()))
    for mode in tuple(modes) + added:
        if mode.name in MODE_LABELS:
            label = MODE_LABELS[mode.name]
        else:
            from latdyn.augmentation import added_label

            label = f"added: {added_label(mode.name)}"
        if mode.name == "dutch_roll" and not mode.oscillatory:
            label += " (non-oscillatory)"
        roots = (complex(mode.eigenvalues[0]),) if mode.oscillatory else tuple(
            complex(r) for r in mode.eigenvalues)
        rows.append({"mode": label, "roots": roots, "re": float(mode.eigenvalue.real),
                     "im": abs(float(mode.eigenvalue.imag)),
                     "natural_frequency": mode.natural_frequency, "damping_ratio": mode.damping_ratio,
                     "period": mode.period, "time_constant": mode.time_constant,
                     "time_to_half": mode.time_to_half, "time_to_double": mode.time_to_double,
                     "cycles_to_half": mode.cycles_to_half, "phi_to_beta": mode.phi_to_beta,
                     "status": mode_status(mode)})
        if not mode.stable:
            emphasis.append(len(rows) - 1)
    return Table(name, caption, MODE_COLUMNS, tuple(rows), tuple(emphasis))


def shape_table(modes, units=DEFAULT) -> Table:
    """Mode shapes: each state's magnitude relative to the reference state, with its phase.

    Oscillatory modes: ``magnitude (phase)`` with the phase in degrees;
    real modes: the signed magnitude.

    Examples
    --------
    >>> import numpy as np
    >>> from latdyn.modes import modes_from_matrix
    >>> A = np.array([[-0.1113, 0.0, -1.0, 0.1321], [-1.328, -0.951, 0.609, 0.0],
    ...               [0.757, -0.124, -0.265, 0.0], [0.0, 1.0, 0.0, 0.0]])
    >>> shape_table(modes_from_matrix(A)).rows[0]["reference"]
    'beta'
    """
    from latdyn.display import format_number

    angle = units.unit("angle")
    columns = (Column("mode", "Mode"), Column("reference", "Relative to"),
               *(Column(state, f"{state} [{unit}] (phase {angle.label})")
                 for state, unit in (("beta", "rad"), ("p", "rad/s"), ("r", "rad/s"), ("phi", "rad"))))
    rows = []
    for mode in modes:
        shape = mode.mode_shape
        if shape is None:
            continue
        row = {"mode": MODE_LABELS[mode.name], "reference": shape.normalised_to}
        for state in ("beta", "p", "r", "phi"):
            magnitude = shape.magnitude[state]
            phase = angle(shape.phase[state])
            row[state] = (f"{format_number(magnitude, 3)} ({phase:+.0f})" if mode.oscillatory
                          else f"{'-' if abs(phase) > 90 else '+'}{format_number(magnitude, 3)}")
        rows.append(row)
    return Table("mode-shapes", "Mode shapes", columns, tuple(rows))


# ------------------------------------------------------------------ inputs

_QUANTITY_COLUMNS = _columns(Column("quantity", "Quantity"), Column("unit", "Unit"),
                             Column("value", "Value"))


def flight_condition_table(result, name="flight-condition", units=DEFAULT) -> Table:
    """Flight condition and derived quantities of a :class:`~latdyn.results.ConditionResult`
    (each airspeed in the display units and in knots, 1 kt = 1852 m/h)."""
    flight = result.condition.flight
    rows = [
        ("category", "Flight-phase category", "-", flight.category or "not given"),
        ("altitude", "Geopotential altitude", units.label("length"), units.convert(flight.altitude, "length")),
        *((key, words, units.label(quantity), units.convert(value, quantity))
          for field, words in (("speed", "True airspeed"), ("equivalent_airspeed", "Equivalent airspeed"),
                               ("calibrated_airspeed", "Calibrated airspeed"))
          for value in (getattr(flight, field),)
          for key, quantity in ((field, "speed"), (f"{field}_kt", "airspeed_kt"))),
        ("mach", "Mach number", "-", flight.mach),
        ("density", "Density", units.label("density"), units.convert(flight.density, "density")),
        ("dynamic_pressure", "Dynamic pressure", units.label("pressure"),
         units.convert(flight.dynamic_pressure, "pressure")),
        ("alpha", "Trim angle of attack", units.label("angle"), units.convert(flight.alpha, "angle")),
        ("gamma", "Flight-path angle", units.label("angle"), units.convert(flight.gamma, "angle")),
        ("axes", "Axes of the equations", "-", result.model.axes),
    ]
    return Table(name, "Flight condition and derived quantities",
                 _QUANTITY_COLUMNS,
                 tuple({"key": k, "quantity": q, "unit": u, "value": v} for k, q, u, v in rows))


def mass_table(aircraft, name="mass-geometry", units=DEFAULT) -> Table:
    """Mass, inertia and geometry of an aircraft."""
    rows = []
    if aircraft.mass is not None:
        m = aircraft.mass
        inertia = units.label("inertia")
        rows += [("Mass", units.label("mass"), units.convert(m.mass, "mass")),
                 ("Ixx", inertia, units.convert(m.Ixx, "inertia")),
                 ("Izz", inertia, units.convert(m.Izz, "inertia")),
                 ("Ixz (integral of x z dm)", inertia, units.convert(m.Ixz, "inertia")),
                 ("Inertia axes", "-", m.axes)]
    if aircraft.geometry is not None:
        g = aircraft.geometry
        rows += [("Wing area S", units.label("area"), units.convert(g.wing_area, "area")),
                 ("Span b", units.label("length"), units.convert(g.span, "length")),
                 ("Mean chord", units.label("length"), units.convert(g.mean_chord, "length"))]
    return Table(name, f"Mass, inertia and geometry ({units.name} units)",
                 _QUANTITY_COLUMNS, tuple({"quantity": q, "unit": u, "value": v} for q, u, v in rows))


def _given_text(value) -> str:
    """A value exactly as read (a float's shortest repr, so it equals the file's number)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value)
    return str(value)


def _used(key, aircraft, result):
    """(name, SI value, SI unit) that the model uses for a key of the file, or None."""
    from latdyn.aircraft import SPEED_KEYS
    from latdyn.aircraft_file import DIMENSIONAL_FORMS
    from latdyn.model import DIMENSIONAL_OF, DIMENSIONAL_UNITS

    section, _, name = key.rpartition(".")
    if section in ("mass", "geometry"):
        owner = aircraft.mass if section == "mass" else aircraft.geometry
        unit = {"mass": "kg", "wing_area": "m^2", "span": "m", "mean_chord": "m"}.get(name, "kg m^2")
        value = getattr(owner, name, None) if owner is not None else None
        return None if not isinstance(value, float) else (name, value, unit)
    if result is None:
        return None
    flight = result.condition.flight
    if section == "condition":
        if name in SPEED_KEYS:
            return ("V (true airspeed)", flight.speed, "m/s")
        return {"altitude": ("altitude", flight.altitude, "m"),
                "density": ("rho", flight.density, "kg/m^3"),
                "alpha_deg": ("alpha", flight.alpha, "rad"),
                "gamma_deg": ("gamma", flight.gamma, "rad")}.get(name)
    quantity = None
    if section == "condition.derivatives" and name in DIMENSIONAL_OF:
        quantity = DIMENSIONAL_OF[name]
    elif section == "condition.dimensional":
        quantity = next((q for q, forms in DIMENSIONAL_FORMS.items()
                         if any(form[0] == name for form in forms)), None)
    if quantity is None:
        return None
    label = quantity + "'" if quantity[0] in "LN" else quantity
    return (label, getattr(result.model.derivatives, quantity), DIMENSIONAL_UNITS[quantity])


def given_table(aircraft, result=None, name="given") -> Table:
    """Values exactly as the file gives them (key, value, unit of the file), with the value used.

    Without ``result``: the ``[mass]`` and ``[geometry]`` tables; with one: the
    condition's own keys and its derivative block.  "As used" is what the
    model uses, in SI units and radians (derivatives primed, in the axes of
    the equations).
    """
    from latdyn.aircraft_file import given_values, read_tree

    condition = result.condition.name if result is not None else None
    values = given_values(read_tree(aircraft.file), condition) if aircraft.file else ()
    rows = []
    for item in values:
        if (result is None) != item.key.startswith(("mass.", "geometry.")):
            continue
        used = _used(item.key, aircraft, result)
        rows.append({"key": item.key, "value": _given_text(item.value), "unit": item.unit,
                     "used": used[0] if used else None, "used_value": used[1] if used else None,
                     "used_unit": used[2] if used else None,
                     "file": os.path.basename(item.file)})
    columns = [Column("key", "As given"), Column("value", "Value"), Column("unit", "Unit"),
               Column("used", "As used"), Column("used_value", "Value"), Column("used_unit", "Unit")]
    if len({row["file"] for row in rows}) > 1:
        columns.append(Column("file", "From file"))
    what = "Mass and geometry" if result is None else "Flight condition and derivatives"
    return Table(name, f"{what} as given in the file ({aircraft.units} units) and as used "
                       "(SI units and radians)", tuple(columns), tuple(rows))


# ------------------------------------------------------------------ estimation

def buildup_caption(build, units=DEFAULT) -> str:
    """Caption of a build-up table: axes, units, the condition's airspeed (display units) and lift
    coefficient."""
    lift = (f", C_L = {format_number(build.lift_coefficient)}" if build.lift_coefficient is not None
            else "")
    speed = getattr(getattr(build.condition, "flight", None), "speed", None)
    at = (f", V = {format_number(units.convert(speed, 'speed'))} {units.label('speed')}"
          if speed is not None else "")
    return (f"Component build-up of the derivatives of \"{build.condition.name}\" "
            f"({build.axes} axes, per rad, rates per p b/2V and r b/2V{at}{lift})")


def buildup_table(build, name="buildup", units=DEFAULT) -> Table:
    """One row per estimated derivative: each component's contribution, the estimate, the
    value written in the file (if any), their difference, the value used and its source
    (given, estimated, default)."""
    from latdyn.estimation import COMPONENTS

    components = build.components or COMPONENTS
    rows = []
    for row in build.rows:
        out = {"derivative": row.name, "source": row.source, "given": row.given,
               "used": row.used, "difference": row.difference,
               "total": row.total if row.total is not None or not row.missing
               else Absent(f"no {row.missing}")}
        for component in components:
            out[component] = row.contributions.get(component)
        rows.append(out)
    columns = (Column("derivative", "Derivative"),
               *(Column(component, component.replace("_", "-")) for component in components),
               Column("total", "Estimate"), Column("given", "Given"),
               Column("difference", "Estimate - given", signed=True), Column("used", "Used"),
               Column("source", "Source"))
    return Table(name, buildup_caption(build, units), columns, tuple(rows))


# ------------------------------------------------------------------ assessment

def parameter_label(mode, parameter) -> str:
    """Trade symbol of a governing parameter with its unit, e.g. ``zeta_d*omega_nd [rad/s]``.

    Examples
    --------
    >>> parameter_label("roll_subsidence", "time_constant")
    'T_R [s]'
    """
    from latdyn.levels import SYMBOLS, UNITS

    if parameter is None:
        return "-"
    symbol = SYMBOLS.get((mode, parameter), parameter)
    unit = UNITS.get(parameter, "")
    return f"{symbol} [{unit}]" if unit else symbol


def value_reason(assessment) -> str:
    """Why a governing value is missing: never a stable-looking figure for an unstable mode.

    Examples
    --------
    >>> from latdyn.assessment import Assessment
    >>> value_reason(Assessment("x", "e", "spiral", 1, None, "time_to_double", None, 12.0, None, None))
    'convergent'
    """
    a = assessment
    if a.governing == "time_to_double" and a.mode == "spiral":
        return "convergent"
    if a.governing == "time_constant":
        return "divergent"
    if a.governing == "permitted":
        return "not permitted"
    if a.governing == "time_to_bank" and a.bank_change is not None:
        return "not reached"
    if a.governing == "damping_ratio" and a.notes and "divergence" in a.notes[0]:
        return "static divergence"
    return "-"


ASSESSMENT_COLUMNS = _columns(
    Column("aircraft", "Aircraft"),
    Column("file", "File"),
    Column("condition", "Condition"),
    Column("category", "Cat."),
    Column("airplane_class", "Class"),
    Column("mode", "Mode"),
    Column("mode_name", "Mode (name)"),
    Column("criteria", "Criteria"),
    Column("edition", "Edition"),
    Column("level", "Level"),
    Column("pass", "Pass"),
    Column("result", "Result"),
    Column("governing", "Governing"),
    Column("governing_name", "Governing (name)"),
    Column("unit", "Unit"),
    Column("value", "Value"),
    Column("limit", "Limit"),
    Column("margin", "Margin", signed=True),
    Column("margin_fraction", "Margin fraction", signed=True),
    Column("margin_percent", "Margin", "%", digits=1, style="fixed", signed=True),
    Column("ref", "Source"),
    Column("source", "Source"),
    Column("notes", "Notes"),
    Column("missing", "Missing"),
    Column("worst", "Worst", words=((True, "<< worst"), (False, ""))),
)
#: Columns of ``latdyn assess`` (text and Markdown).
ASSESSMENT_TEXT_VIEW = ("condition", "category", "mode", "criteria", "result", "governing", "value",
                        "limit", "margin", "margin_percent", "ref", "worst")
#: Columns of the assessment of one condition in a report.
ASSESSMENT_REPORT_VIEW = ("mode", "criteria", "result", "governing", "value", "limit", "margin",
                          "margin_percent", "source")
#: Columns of ``latdyn assess --format csv`` (a public layout: names, not labels).
ASSESSMENT_CSV_VIEW = ("aircraft", "file", "condition", "category", "airplane_class", "criteria",
                       "edition", ("mode", "mode_name"), "level", "pass", "result",
                       ("governing", "governing_name"), "unit", "value", "limit", "margin",
                       "margin_fraction", "worst", "source", "notes", "missing")


def assessment_sources(assessment) -> list:
    """The sources cited by an :class:`~latdyn.assessment.AircraftAssessment`, numbered in order
    of first use (``[1]`` is the first)."""
    sources = []
    for condition in assessment.conditions:
        for entry in condition.assessments:
            if entry.source and entry.source not in sources:
                sources.append(entry.source)
    return sources


def _worst_ids(condition):
    ids = set()
    for name in dict.fromkeys(a.criteria for a in condition.assessments):
        entry = condition.worst(name)
        if entry is not None:
            ids.add(id(entry))
    return ids


def check_label(name) -> str:
    """A mode or a static check in words (the name itself when it has no label).

    >>> check_label("dutch_roll"), check_label("minimum_control_speed"), check_label("departure")
    ('Dutch roll', 'Engine out: V_MC', 'Departure indicators')
    """
    from latdyn.steady_checks import CHECK_LABELS

    return MODE_LABELS.get(name) or FIGURE_GROUPS.get(name) or CHECK_LABELS.get(name, name)


def _governing_label(entry) -> str:
    from latdyn.steady_checks import QUANTITY_SYMBOLS

    if entry.bank_change is not None:
        return f"t to {math.degrees(entry.bank_change):.0f} deg [s]"
    if entry.governing in QUANTITY_SYMBOLS:
        unit = "deg" if entry.unit == "rad" else entry.unit
        symbol = QUANTITY_SYMBOLS[entry.governing]
        return f"{symbol} [{unit}]" if unit else symbol
    return parameter_label(entry.mode, entry.governing)


def _display_angle(entry, value):
    """Static-check angles are shown in degrees (the JSON keeps radians)."""
    if value is None or entry.unit != "rad":
        return value
    return math.degrees(value)


def _assessment_row(assessment, condition, entry, sources, worst):
    ref = "-"
    if entry.source:
        ref = f"[{sources.index(entry.source) + 1}]" + (f" {entry.confidence}" if entry.confidence else "")
    return {
        "aircraft": assessment.aircraft, "file": assessment.file,
        "condition": condition.name,
        "category": condition.category or Absent("not given"),
        "airplane_class": condition.airplane_class,
        "mode": check_label(entry.mode), "mode_name": entry.mode,
        "criteria": entry.criteria, "edition": entry.edition,
        "level": entry.level, "pass": entry.passed, "result": entry.result,
        "governing": _governing_label(entry), "governing_name": entry.governing,
        "unit": entry.unit,
        "value": _display_angle(entry, entry.value) if entry.value is not None else Absent(value_reason(entry)),
        "limit": _display_angle(entry, entry.limit), "margin": _display_angle(entry, entry.margin),
        "margin_fraction": entry.margin_fraction,
        "margin_percent": None if entry.margin_fraction is None else 100 * entry.margin_fraction,
        "ref": ref, "source": entry.source, "notes": " | ".join(entry.notes),
        "missing": " | ".join(entry.missing), "worst": id(entry) in worst,
    }


def assessment_table(assessments, condition=None, name="assessment",
                     caption="Assessment against the criteria (guidance only)") -> Table:
    """One row per aircraft, condition, criteria set and mode.

    Parameters
    ----------
    assessments : AircraftAssessment or sequence of them
    condition : str, optional
        Only this condition.

    Returns
    -------
    Table
        ``worst`` marks the row that limits its condition under its criteria
        set; rows below Level 1 (or failing) are emphasised.  ``ref`` numbers
        the sources per aircraft (:func:`assessment_sources`).
    """
    if hasattr(assessments, "conditions"):
        assessments = (assessments,)
    rows, emphasis = [], []
    for assessment in assessments:
        sources = assessment_sources(assessment)
        for item in assessment.conditions:
            if condition is not None and item.name != condition:
                continue
            worst = _worst_ids(item)
            for entry in item.assessments:
                rows.append(_assessment_row(assessment, item, entry, sources, worst))
                if entry.severity >= 2:
                    emphasis.append(len(rows) - 1)
    return Table(name, caption, ASSESSMENT_COLUMNS, tuple(rows), tuple(emphasis))


#: Columns of the handling-qualities summary of a report.
SUMMARY_VIEW = ("aircraft", "condition", "category", "criteria", "result", "mode", "governing", "value",
                "limit", "margin", "margin_percent")


def summary_table(assessments, name="summary", caption="Worst result per condition") -> Table:
    """The worst row per aircraft, condition and criteria set, worst first: by level (or
    fail), then by the smallest margin to the next-better boundary in per cent of it; a check
    against a zero limit (a sense, whose margin is in its own units and has no per cent) after
    those of its level, then a row without a margin."""
    rows = []
    for assessment in assessments:
        sources = assessment_sources(assessment)
        for item in assessment.conditions:
            for criteria in assessment.graded_sets:
                worst = item.worst(criteria.name)
                if worst is not None:
                    # a margin in per cent of the limit is comparable across checks; a margin
                    # against a zero limit (a sense) is in its quantity's units, so those rows
                    # follow, among themselves by margin, and rows without a margin come last
                    closeness = ((0, worst.margin_fraction) if worst.margin_fraction is not None
                                 else (1, worst.margin) if worst.margin is not None
                                 else (2, 0.0))
                    rows.append((worst.severity,
                                 _assessment_row(assessment, item, worst, sources, {id(worst)}),
                                 closeness))
    # worst level first; among equal levels the smallest margin (fraction) first
    order = sorted(range(len(rows)), key=lambda i: (-rows[i][0], *rows[i][2], i))
    emphasis = tuple(k for k, i in enumerate(order) if rows[i][0] >= 2)
    columns = tuple(Column(c.key, {"result": "Worst result", "mode": "Limiting mode"}.get(c.key, c.title),
                           c.unit, c.symbol, c.digits, c.style, c.signed, c.words)
                    for c in ASSESSMENT_COLUMNS)
    table = Table(name, caption, columns, tuple(rows[i][1] for i in order), emphasis)
    return table.select(SUMMARY_VIEW)


# ------------------------------------------------------------------ comparison

#: Row labels of the comparison's figures that are not modes (indicators, not graded).
FIGURE_GROUPS = {"roll_response": "Response to roll control", "departure": "Departure indicators"}


def comparison_tables(comparison, prefix="comparison", units=DEFAULT) -> tuple:
    """(levels, inputs, figures) tables of a :class:`~latdyn.compare.Comparison`.

    Level changes that moved read IMPROVED / DEGRADED and are emphasised.
    The input differences are in the display units of ``units`` (a
    dimensional value by its ``quantity``; coefficients, 1/s and degrees as
    they are); the percentages are the same in every unit system.
    """
    from latdyn.assessment import level_words

    figures, levels, inputs, moved = [], [], [], []
    for condition in comparison.conditions:
        for item in condition.figures:
            figures.append({"condition": condition.name,
                            "mode": check_label(item.mode),
                            "figure": item.figure, "unit": item.unit, "base": item.base,
                            "variant": item.variant, "change": item.change,
                            "change_percent": item.change_percent})
        for item in condition.levels:
            verdict = item.verdict.upper() if item.verdict in ("improved", "degraded") else item.verdict
            if verdict != item.verdict:
                moved.append(len(levels))
            levels.append({"condition": condition.name, "mode": check_label(item.mode),
                           "criteria": item.criteria,
                           "base": level_words(item.base_level, item.base_pass),
                           "variant": level_words(item.variant_level, item.variant_pass),
                           "verdict": verdict})
        for item in condition.inputs:
            quantity = getattr(item, "quantity", None)
            unit = units.unit(quantity) if quantity else None
            shown = (lambda value: value) if unit is None else unit
            inputs.append({"condition": condition.name, "group": item.group, "key": item.key,
                           "unit": unit.label if unit else item.unit, "base": shown(item.base),
                           "variant": shown(item.variant), "change": shown(item.change),
                           "change_percent": item.change_percent})
    change = (Column("change", "Change", signed=True),
              Column("change_percent", "Change", "%", digits=3, signed=True))
    where = (Column("condition", "Condition"),)
    values = (Column("base", "Base"), Column("variant", "Variant"))
    return (
        Table(f"{prefix}-levels", "Levels, base against variant",
              where + (Column("mode", "Mode"), Column("criteria", "Criteria")) + values
              + (Column("verdict", "Verdict"),), tuple(levels), tuple(moved)),
        Table(f"{prefix}-inputs", f"Input differences (what caused the change; {units.name} units)",
              where + (Column("group", "Group"), Column("key", "Key"), Column("unit", "Unit"))
              + values + change, tuple(inputs)),
        Table(f"{prefix}-figures", "Mode figures, base against variant",
              where + (Column("mode", "Mode"), Column("figure", "Figure"), Column("unit", "Unit"))
              + values + change, tuple(figures)),
    )


# ------------------------------------------------------------------ responses

def readout_table(responses, modes, name="readouts", units=DEFAULT) -> Table:
    """Read-outs of responses beside the eigenvalue figures.

    Parameters
    ----------
    responses : sequence of (str, ResponseReadouts)
        Input kind and the read-outs of its response.
    modes : ModeSet
    """
    rows = []
    dutch = modes.get("dutch_roll")
    for kind, readouts in responses:
        for peak in readouts.peaks:
            at_end = readouts.at_end(peak)
            if at_end and peak.signal == "phi":
                continue  # the bank angle at the end has its own row, with what it is doing
            quantity = SIGNAL_QUANTITIES.get(peak.signal)
            rows.append({"input": kind, "signal": peak.signal + (
                             " largest at the end of the run (still changing, not a peak)"
                             if at_end else ""),
                         "peak": units.convert(peak.value, quantity) if quantity else peak.value,
                         "unit": units.label(quantity) if quantity else "", "time": peak.time})
        rows.append({"input": kind, "signal": f"phi at the end ({bank_at_end_words(readouts, units)})",
                     "peak": units.convert(readouts.residual_bank_angle, "angle"),
                     "unit": units.label("angle"), "time": readouts.residual_time})
        estimate = readouts.dutch_roll
        if estimate is not None:
            rows.append({"input": kind, "signal": f"Dutch roll zeta from the trace ({estimate.signal})",
                         "peak": estimate.damping_ratio, "unit": "-", "time": None})
            rows.append({"input": kind, "signal": "Dutch roll period from the trace",
                         "peak": estimate.period, "unit": "s", "time": None})
        if dutch is not None and dutch.oscillatory:
            rows.append({"input": kind, "signal": "Dutch roll zeta from the eigenvalues",
                         "peak": dutch.damping_ratio, "unit": "-", "time": None})
            rows.append({"input": kind, "signal": "Dutch roll period from the eigenvalues",
                         "peak": dutch.period, "unit": "s", "time": None})
    columns = (Column("input", "Input"), Column("signal", "Signal"), Column("peak", "Peak or value"),
               Column("unit", "Unit"), Column("time", "At", "s"))
    return Table(name, "Read-outs from the responses, beside the eigenvalue figures", columns, tuple(rows))


def transfer_table(transfers, name="transfer-functions") -> Table:
    """Transfer functions in factored form (output per rad of control)."""
    rows = []
    for transfer in transfers:
        rows.append({"transfer": transfer.name, "gain": float(transfer.gain),
                     "numerator": "".join(f.text(4) for f in transfer.numerator) or "1",
                     "denominator": "".join(f.text(4) for f in transfer.denominator),
                     "static_gain": transfer.static_gain})
    columns = (Column("transfer", "Transfer function"), Column("gain", "Gain"),
               Column("numerator", "Numerator"), Column("denominator", "Denominator"),
               Column("static_gain", "Static gain"))
    return Table(name, "Transfer functions in factored form (output per rad of control)", columns,
                 tuple(rows))


# ------------------------------------------------------------------ provenance

def provenance_tables(inputs, criteria_sets) -> tuple:
    """(input files with their SHA-256, criteria sets with their editions)."""
    return (
        Table("provenance-inputs", "Input files (SHA-256 of their bytes)",
              (Column("file", "File"), Column("sha256", "SHA-256")), tuple(inputs)),
        Table("provenance-criteria", "Criteria sets",
              (Column("name", "Set"), Column("edition", "Edition"), Column("title", "Title")),
              tuple({"name": c.name, "edition": c.edition, "title": c.title} for c in criteria_sets)),
    )


# ------------------------------------------------------------------ studies

_SWEEP_FIGURES = (("dutch_roll_frequency", "DR omega_n", "rad/s"), ("dutch_roll_damping", "DR zeta", "-"),
                  ("roll_time_constant", "T_R", "s"), ("spiral_time_to_double", "spiral T_2", "s"),
                  ("spiral_time_to_half", "spiral T_half", "s"),
                  ("roll_spiral_frequency", "RS omega_n", "rad/s"), ("roll_spiral_damping", "RS zeta", "-"),
                  ("time_to_bank", "t to bank", "s"))
_MODE_SHORT = {"dutch_roll": "DR", "roll_subsidence": "roll", "spiral": "spiral", "roll_spiral": "RS",
               "roll_performance": "roll perf."}


def sweep_table(result, name="sweep") -> Table:
    """One row per condition and grid point of a :class:`~latdyn.studies.sweep.SweepResult`:
    the parameters (file units), the mode figures present anywhere (SI) and the levels in short."""
    import numpy as np

    from latdyn.studies.sweep import level_text

    columns = [Column("condition", "Condition")]
    columns += [Column(f"p{k}", axis.key.label, digits=6, style="general")
                for k, axis in enumerate(result.axes)]
    shown = [Column(key, title, unit) for key, title, unit in _SWEEP_FIGURES
             if any(np.isfinite(getattr(c.result.figures, key)).any() for c in result.conditions)]
    columns += shown
    columns += [Column(f"levels:{c.name}", f"{c.name} levels") for c in result.criteria]
    grid = result.grid()
    rows = []
    for item in result.conditions:
        figures = item.result.figures
        for i in range(len(grid)):
            row = {"condition": item.condition.name}
            for k in range(len(result.axes)):
                row[f"p{k}"] = float(grid[i, k])
            for column in shown:
                value = float(getattr(figures, column.key)[i])
                row[column.key] = value if np.isfinite(value) else None
            for criteria in result.criteria:
                parts = [f"{_MODE_SHORT.get(mode, mode)} {level_text(criteria, grades.level[i])}"
                         for (set_name, mode), grades in item.result.levels.items()
                         if set_name == criteria.name and int(grades.level[i]) != 0]
                row[f"levels:{criteria.name}"] = ", ".join(parts) or "-"
            rows.append(row)
    return Table(name, "Sweep", tuple(columns), tuple(rows))


def sweep_summary_tables(result) -> tuple:
    """The summary of a large sweep: level shares over the grid and the figures' ranges.

    Returns
    -------
    (Table, Table)
        Shares of the grid points at each level per condition, criteria set
        and mode (guidance only); smallest and largest value of each mode
        figure (SI) per condition.
    """
    from latdyn.studies.sweep import figure_ranges, level_shares

    words = ("level 1", "level 2", "level 3", "beyond level 3", "pass", "fail", "not assessed")
    shares = level_shares(result)
    present = [w for w in words if any(w in item["shares"] for item in shares)]
    level_columns = [Column("condition", "Condition"), Column("criteria", "Criteria"),
                     Column("mode", "Mode")]
    level_columns += [Column(w, f"{w} [% of grid]", digits=1, style="fixed") for w in present]
    level_rows = []
    for item in shares:
        row = {"condition": item["condition"], "criteria": item["criteria"],
               "mode": MODE_LABELS.get(item["mode"], item["mode"])}
        row.update({w: (100.0 * item["shares"][w] if w in item["shares"] else None) for w in present})
        level_rows.append(row)
    from latdyn.studies.batch import FIGURES

    units = dict(FIGURES)
    titles = {"phi_to_beta": "|phi/beta|", "roll_root": "roll root", "spiral_root": "spiral root",
              **{key: title for key, title, _ in _SWEEP_FIGURES}}
    range_columns = (Column("condition", "Condition"), Column("figure", "Figure"), Column("unit", "Unit"),
                     Column("minimum", "Smallest"), Column("maximum", "Largest"),
                     Column("available", "Points with the mode [%]", digits=1, style="fixed"))
    range_rows = [{"condition": item["condition"], "figure": titles.get(item["figure"], item["figure"]),
                   "unit": units.get(item["figure"], ""), "minimum": item["minimum"],
                   "maximum": item["maximum"], "available": 100.0 * item["available"]}
                  for item in figure_ranges(result)]
    return (Table("sweep-levels", "Levels over the grid (guidance only)", tuple(level_columns),
                  tuple(level_rows)),
            Table("sweep-ranges", "Mode figures over the grid", range_columns, tuple(range_rows)))


#: Labels of the mode figures of the studies (trade symbols and units).
FIGURE_LABELS = {
    "dutch_roll_frequency": "Dutch roll omega_n [rad/s]",
    "dutch_roll_damping": "Dutch roll zeta [-]",
    "phi_to_beta": "Dutch roll |phi/beta| [-]",
    "roll_root": "Roll root [1/s]",
    "roll_time_constant": "Roll time constant T_R [s]",
    "spiral_root": "Spiral root [1/s]",
    "spiral_time_to_double": "Spiral time to double T_2 [s]",
    "spiral_time_to_half": "Spiral time to half T_1/2 [s]",
    "roll_spiral_frequency": "Roll-spiral omega_n [rad/s]",
    "roll_spiral_damping": "Roll-spiral zeta [-]",
    "time_to_bank": "Roll performance: time to the Level 1 (or pass) bank change, pedals free [s]",
}


def _parameter_unit(name, dimension, units) -> str:
    """Printed unit of a study parameter in "SI" or "US": its dimension's unit, a dimensional
    derivative's own unit (``L_beta`` 1/s^2: no length in it, the same in both systems), 1/rad
    for a coefficient, else "-".

    >>> _parameter_unit("L_beta", "none", "US"), _parameter_unit("Y_p", "speed", "US")
    ('1/s^2', 'ft/s')
    >>> _parameter_unit("augmentation.yaw_damper_gain", "second", "SI"), _parameter_unit("Cn_r", "none", "SI")
    ('s', '1/rad')
    """
    from latdyn import units as unit_factors
    from latdyn.model import DIMENSIONAL_UNITS

    word = unit_factors.UNIT_WORDS.get(dimension) and unit_factors.unit_word(dimension, units)
    if word:
        return word
    if name in DIMENSIONAL_UNITS:
        return DIMENSIONAL_UNITS[name]
    return "1/rad" if name.startswith("C") else "-"


def sensitivity_table(results, top=0, name="sensitivity", units="SI") -> Table:
    """Ranked sensitivities (per condition and figure) of
    :func:`latdyn.studies.sensitivity.sensitivities`; ``top`` > 0 keeps the N largest.

    Each parameter's value and the derivative are in the parameter's own units
    (those of the aircraft file, ``units`` "SI" or "US"), and a column says
    which change of the parameter moves the figure away from the level
    boundaries (:data:`latdyn.studies.sensitivity.BETTER`).
    """
    from latdyn import units as unit_factors

    rows = []
    for result in results:
        for figure in dict.fromkeys(s.figure for s in result.items):
            ranked = result.for_figure(figure)
            for rank, item in enumerate(ranked[:top] if top > 0 else ranked, start=1):
                dimension, word = _parameter_dimension_unit(item.parameter, units)
                per_unit = unit_factors.to_si(1.0, dimension, units)
                better = item.improves_when
                rows.append({"condition": result.condition.name,
                             "figure": FIGURE_LABELS[figure], "rank": rank,
                             "parameter": item.parameter, "unit": word,
                             "value": unit_factors.from_si(item.value, dimension, units),
                             "derivative": item.derivative * per_unit,
                             "normalised": item.normalised,
                             "improves": None if better is None else
                             f"{'raise' if better == 'increased' else 'lower'} {item.parameter}"})
    columns = (Column("condition", "Condition"), Column("figure", "Figure"), Column("rank", "Rank"),
               Column("parameter", "Parameter"), Column("unit", "Unit"), Column("value", "Value"),
               Column("derivative", "d figure / d parameter", "per parameter unit",
                      style="general"),
               Column("normalised", "% per %", digits=3, style="fixed", signed=True),
               Column("improves", "Away from the boundaries"))
    return Table(name, "Normalised sensitivities, in the parameters' own units; the last column "
                       "says which change moves the figure away from the level boundaries",
                 columns, tuple(rows))


def _parameter_dimension_unit(parameter, units) -> tuple:
    """(dimension for the unit factors, printed unit) of a study parameter in "SI" or "US"."""
    from latdyn import units as unit_factors
    from latdyn.studies.keys import parameter_dimension

    dimension = parameter_dimension(parameter)
    word = _parameter_unit(parameter, dimension, units)
    return (dimension if dimension in unit_factors.DIMENSION_FACTORS else "none"), word


def uncertainty_inputs_table(result, units="SI", name="uncertainty-inputs") -> Table:
    """What a Monte Carlo run varied: per condition and parameter, its nominal value and spread (one
    standard deviation of a normal distribution or the half-width of a uniform one) in the
    parameter's own units ("SI" or "US"), and the spread as a percentage of the nominal value."""
    from latdyn import units as unit_factors
    from latdyn.studies.batch import nominal_value

    rows = []
    for item in result.conditions:
        for uncertainty in item.uncertainties:
            dimension, word = _parameter_dimension_unit(uncertainty.key, units)
            nominal = nominal_value(result.aircraft, item.condition, uncertainty.key)
            spread = (uncertainty.amount * abs(nominal) if uncertainty.kind == "relative"
                      else uncertainty.amount)
            rows.append({"condition": item.condition.name, "parameter": uncertainty.key, "unit": word,
                         "nominal": unit_factors.from_si(nominal, dimension, units),
                         "spread": unit_factors.from_si(spread, dimension, units),
                         "relative": 100 * spread / abs(nominal) if nominal else None,
                         "distribution": "normal (1 sigma)" if uncertainty.distribution == "normal"
                         else "uniform (half-width)"})
    columns = (Column("condition", "Condition"), Column("parameter", "Parameter"), Column("unit", "Unit"),
               Column("nominal", "Nominal"), Column("spread", "Spread"),
               Column("relative", "Spread", "% of nominal", digits=3),
               Column("distribution", "Distribution"))
    return Table(name, "The uncertainties sampled, in the parameters' own units", columns, tuple(rows))


def uncertainty_tables(result) -> tuple:
    """(level probabilities, figure percentiles) of an
    :class:`~latdyn.studies.uncertainty.UncertaintyResult`."""
    from latdyn.display import format_number
    from latdyn.studies.uncertainty import standard_errors

    level_rows, figure_rows = [], []
    for item in result.conditions:
        for (set_name, mode), probabilities in item.probabilities.items():
            if mode == "roll_spiral" and probabilities["not assessed"] == 1.0:
                continue  # no sample has a roll-spiral oscillation
            errors = standard_errors(probabilities, result.samples - item.excluded)
            parts = [f"{word} {format_number(100 * p, 2, style='fixed')}% "
                     f"(±{format_number(100 * errors[word], 2, style='fixed')})"
                     for word, p in probabilities.items() if p > 0]
            level_rows.append({"condition": item.condition.name, "criteria": set_name,
                               "mode": check_label(mode), "probabilities": "; ".join(parts)})
        for figure, values in item.percentiles.items():
            if not values["available"]:
                continue
            figure_rows.append({"condition": item.condition.name,
                                "figure": FIGURE_LABELS.get(figure, figure),
                                **{key: values[key] for key in ("p5", "p50", "p95", "mean")},
                                "available": 100 * values["available"]})
    return (
        Table("uncertainty-levels", "Level probabilities",
              (Column("condition", "Condition"), Column("criteria", "Criteria"), Column("mode", "Mode"),
               Column("probabilities", "Probability of each level (± standard error)")),
              tuple(level_rows)),
        Table("uncertainty-figures", "Percentiles of the mode figures",
              (Column("condition", "Condition"), Column("figure", "Figure"), Column("p5", "5 %"),
               Column("p50", "median"), Column("p95", "95 %"), Column("mean", "mean"),
               Column("available", "samples with the mode", "%", digits=1, style="fixed")),
              tuple(figure_rows)),
    )


def turbulence_table(entries, name="turbulence") -> Table:
    """RMS response to turbulence of (condition name, aircraft label, TurbulenceResult) entries
    (:func:`latdyn.turbulence.turbulence_response`), in degrees, deg/s and g."""
    from latdyn.turbulence import DEGREES, RMS_OUTPUTS

    rows = []
    for condition, label, result in entries:
        row = {"condition": condition, "aircraft": label}
        row.update({key: result.rms[key] * DEGREES[key] for key in RMS_OUTPUTS})
        row["left_out"] = ", ".join(f"{r.real:.4g} 1/s" for r in result.left_out) or "-"
        rows.append(row)
    columns = (Column("condition", "Condition"), Column("aircraft", "Aircraft"),
               Column("beta", "RMS beta", "deg"), Column("p", "RMS p", "deg/s"),
               Column("r", "RMS r", "deg/s"), Column("phi", "RMS phi", "deg"), Column("ny", "RMS n_y", "g"),
               Column("left_out", "Roots left out"))
    return Table(name, "RMS response to Dryden lateral turbulence", columns, tuple(rows))


def equivalent_table(assessment, name="equivalent-systems") -> Table:
    """Parameters and mismatch of the equivalent low-order systems of an AircraftAssessment's
    augmented conditions (:mod:`latdyn.equivalent_systems`)."""
    rows = []
    for item in assessment.conditions:
        fitted = item.equivalent
        if fitted is None:
            continue
        p = fitted.parameters
        rows.append({"condition": item.name, "omega_d": p["omega_d"], "zeta_d": p["zeta_d"],
                     "roll_root": p["roll_root"], "spiral_root": p["spiral_root"],
                     "tau_p": p["tau_p"], "tau_beta": p["tau_beta"],
                     "mismatch_p": fitted.mismatch["p/da"], "mismatch_beta": fitted.mismatch["beta/dr"]})
    columns = (Column("condition", "Condition"), Column("omega_d", "omega_d", "rad/s"),
               Column("zeta_d", "zeta_d", "-"), Column("roll_root", "lambda_R", "1/s"),
               Column("spiral_root", "lambda_S", "1/s"), Column("tau_p", "tau_e p/da", "s"),
               Column("tau_beta", "tau_e beta/dr", "s"), Column("mismatch_p", "M p/da", "-", digits=3),
               Column("mismatch_beta", "M beta/dr", "-", digits=3))
    return Table(name, "Equivalent low-order systems (fitted to p/da and beta/dr, 0.1 to 10 rad/s)",
                 columns, tuple(rows))


def roll_response_table(assessments, units=DEFAULT, name="roll-response") -> Table:
    """Response to roll control and departure indicators, one row per aircraft and condition.

    Indicators only (pedals free, right rolls): MIL-F-8785C 3.3.2 quantities
    (:mod:`latdyn.roll_response`) and Cn_beta,dyn, LCDP (:mod:`latdyn.departure`).
    """
    if not isinstance(assessments, (list, tuple)):
        assessments = (assessments,)
    rows = []
    for assessment in assessments:
        for condition in assessment.conditions:
            response, departure = condition.roll_response, condition.departure
            if response is None and departure is None:
                continue

            def value(obj, key, quantity=None):
                raw = getattr(obj, key, None) if obj is not None else None
                if raw is None:
                    return Absent("-")
                return units.convert(raw, quantity) if quantity else raw

            rows.append({
                "aircraft": assessment.aircraft, "condition": condition.name,
                "p_osc_over_p_av": value(response, "p_osc_over_p_av"),
                "first_minimum_ratio": value(response, "first_minimum_ratio"),
                "phi_osc_over_phi_av": value(response, "phi_osc_over_phi_av"),
                "psi_beta": value(response, "psi_beta", "angle"),
                "omega_phi_over_omega_d": value(response, "omega_phi_over_omega_d"),
                "delta_beta_max": value(response, "delta_beta_max", "angle"),
                "sideslip_sense": value(response, "sideslip_sense"),
                "k": value(response, "k"),
                "delta_beta_over_k": value(response, "delta_beta_over_k", "angle"),
                "cn_beta_dynamic": value(departure, "cn_beta_dynamic"),
                "lcdp": value(departure, "lcdp"),
            })
    angle = units.label("angle")
    columns = (Column("aircraft", "Aircraft"), Column("condition", "Condition"),
               Column("p_osc_over_p_av", "p_osc/p_av", "-", digits=3),
               Column("first_minimum_ratio", "p_min/p_peak", "-", digits=3),
               Column("phi_osc_over_phi_av", "phi_osc/phi_av", "-", digits=3),
               Column("psi_beta", "psi_beta", angle, digits=3),
               Column("omega_phi_over_omega_d", "omega_phi/omega_d", "-", digits=3),
               Column("delta_beta_max", "Delta beta_max", angle, digits=3),
               Column("sideslip_sense", "Sense"),
               Column("k", "k", "-", digits=3),
               Column("delta_beta_over_k", "Delta beta/k", angle, digits=3),
               Column("cn_beta_dynamic", "Cn_beta,dyn", "1/rad", digits=3),
               Column("lcdp", "LCDP", "1/rad", digits=3))
    return Table(name, "Response to roll control and departure indicators (indicators, not graded; "
                 "pedals free)", columns, tuple(rows))
# ------------------------------------------------------------------ steady flight

#: Parts of the steady-flight results, with the static checks shown beside each.
STEADY_PARTS = {
    "sideslip": ("Steady sideslips", ("rudder_sense", "bank_sense", "roll_control_sense",
                                      "dihedral_roll_control", "directional_stability",
                                      "lateral_stability")),
    "crosswind": ("Crosswind capability", ("crosswind_sideslip", "crosswind_component")),
    "engine_out": ("One engine out", ("minimum_control_speed",)),
}


def _steady_part(quantity) -> str:
    if quantity.startswith(("crosswind", )):
        return "crosswind"
    if quantity.startswith(("minimum control speed", "limit of", "engine-out")):
        return "engine_out"
    return "sideslip"


def steady_table(results, name="steady", units=DEFAULT, aircraft=None, part=None) -> Table:
    """Steady sideslips, crosswind capability and engine-out control of
    :func:`latdyn.steady.steady` results: one row per condition and quantity
    (with an ``aircraft`` column holding ``aircraft`` when it is given).

    ``value`` is in the display unit of ``units`` named in ``unit`` (angles in
    degrees, per-degree gradients in deg/deg), airspeeds also in knots.
    ``part`` ("sideslip", "crosswind" or "engine_out") keeps the rows of one
    part (:data:`STEADY_PARTS`); None keeps all.
    """
    from latdyn.steady import HELD_NOTE, LINEAR_NOTE
    from latdyn.steady_checks import rule_words
    from latdyn.units import KNOT

    held = "non-dimensional derivatives held over the speed range"
    rows = []

    def add(condition, quantity, value, kind, limited_by=None, note=""):
        if part is not None and _steady_part(quantity) != part:
            return
        if isinstance(value, float) and math.isnan(value):  # a singular balance: no figure, said so
            value = None
        if kind == "speed":
            unit, shown = units.label("speed"), units.convert(value, "speed")
            knots = None if value is None else value / KNOT
        elif kind == "angle":
            unit, shown, knots = units.label("angle"), units.convert(value, "angle"), None
        elif kind == "ratio":
            unit, shown, knots = f"{units.label('angle')}/{units.label('angle')}", value, None
        elif kind == "fraction":
            unit, shown, knots = "%", None if value is None else 100.0 * value, None
        else:
            unit, shown, knots = "", value, None
        rows.append({"condition": condition, "quantity": quantity,
                     "value": Absent("not computed") if value is None and kind != "none" else shown,
                     "unit": unit, "knots": knots, "limited_by": limited_by, "note": note})

    for result in results:
        name_ = result.condition
        s, c, e = result.sideslip, result.crosswind, result.engine_out
        add(name_, "rudder per sideslip", s.rudder_per_sideslip, "ratio",
            note="signed; + rudder gives the yawing moment of the sign of Cn_dr")
        add(name_, "aileron per sideslip", s.aileron_per_sideslip, "ratio",
            note="signed; + aileron gives the rolling moment of the sign of Cl_da")
        add(name_, "bank per sideslip", s.bank_per_sideslip, "ratio",
            note="+: right wing down with the wind from the right")
        for point in s.points:
            sideslip, bank = (math.degrees(point[key]) for key in ("sideslip", "bank"))
            at = f"at sideslip {sideslip:.3g} deg, " + (f"bank {bank:.3g} deg" if math.isfinite(bank)
                                                        else "bank not computed")
            for control in ("rudder", "aileron"):
                fraction = point[f"{control}_fraction"]
                add(name_, f"{control} {at}", point[control], "angle",
                    note="" if fraction is None or not math.isfinite(fraction)
                    else f"{100 * fraction:.0f} % of travel")
        add(name_, "full-rudder sideslip", s.full_rudder_sideslip, "angle", s.limited_by,
            "; ".join("large sideslip (linear derivatives)" if n == LINEAR_NOTE else n for n in s.notes))
        if s.roll_fraction_at_10deg is not None:
            add(name_, "roll control for 10 deg of sideslip", s.roll_fraction_at_10deg, "fraction",
                note="of the aileron travel")
        note = ("; ".join(c.notes) if c.max_component is None else
                f"at most {100 * c.roll_control_fraction:.0f} % roll control; in the air (no ground "
                "handling)" + ("; large sideslip (linear derivatives)" if LINEAR_NOTE in c.notes else ""))
        add(name_, "crosswind capability (90 deg component)", c.max_component, "speed", c.limited_by, note)
        for rule, value in c.required.items():
            add(name_, f"crosswind asked by {rule}", value, "speed")
        if e.failed_engine is None:
            add(name_, "engine-out minimum control speed", None, "speed", None, "; ".join(e.notes))
            continue
        for case, words in ((e.wings_level, "wings level"), (e.banked, None)):
            label = words or f"{abs(math.degrees(case.bank)):g} deg bank toward the operating engine"
            add(name_, f"minimum control speed (TAS), {label}", case.minimum_control_speed, "speed",
                case.limited_by, f'"{e.failed_engine}" engine failed; {held}')
            if case.minimum_control_speed is not None:
                kind = "CAS" if case.calibrated_airspeed is not None else "EAS"
                value = case.calibrated_airspeed if kind == "CAS" else case.equivalent_airspeed
                add(name_, f"minimum control speed ({kind}), {label}", value, "speed", case.limited_by, held)
        words = rule_words("minimum_control_speed")
        for rule, value in e.limits.items():
            add(name_, f"limit of {rule} (CAS)", value, "speed", None, words.get(rule, ""))
        extra = [n for n in e.notes if n != HELD_NOTE]
        if extra:
            add(name_, "engine-out notes", None, "none", None, "; ".join(extra))
    columns = (Column("condition", "Condition"), Column("quantity", "Quantity"),
               Column("value", "Value"), Column("unit", "Unit"), Column("knots", "Airspeed", "kt"),
               Column("limited_by", "Limited by"), Column("note", "Note"))
    if aircraft is not None:
        columns = (Column("aircraft", "Aircraft"),) + columns
        rows = [{"aircraft": aircraft, **row} for row in rows]
    caption = "Steady sideslips, crosswind and engine out" if part is None else STEADY_PARTS[part][0]
    return Table(name, caption, columns, tuple(rows))



# ------------------------------------------------------------------ flight test (latdyn identify)

_CHANNEL_NAMES = {"beta": "sideslip", "p": "roll rate", "r": "yaw rate", "phi": "bank",
                  "ny": "lateral load factor"}


def identified_derivative_table(estimates, dimensional=False, name="identified-derivatives",
                                caption="Identified derivatives beside the prediction", units=DEFAULT) -> Table:
    """Each derivative identified from flight test beside the file's prediction, with its bound.

    Parameters
    ----------
    estimates : sequence of latdyn.identification.ParameterEstimate
    dimensional : bool
        Primed dimensional derivatives rather than non-dimensional (1/rad): in the display units
        of ``units`` (side force per rate and per control hold a length; the others are 1/s or
        1/s^2 in any unit system).
    """
    from latdyn.display import DisplayUnit, derivative_unit
    from latdyn.model import DIMENSIONAL_UNITS

    columns = (Column("derivative", "Derivative"), Column("unit", "Unit"), Column("value", "Identified"),
               Column("standard_error", "Std. error", digits=3),
               Column("predicted", "Predicted"), Column("difference", "Difference", signed=True),
               Column("sigmas", "Difference", "std. errors", digits=3, signed=True),
               Column("status", "Status"))
    rows, emphasis = [], []
    for item in estimates:
        if item.fixed:
            status = "held at the prediction"
        elif not item.identifiable:
            status = f"NOT identifiable: {item.note}"
        else:
            status = "identified"
        difference = None if item.fixed or item.predicted is None else item.value - item.predicted
        unit = (derivative_unit(units, item.name, DIMENSIONAL_UNITS[item.name]) if dimensional
                else DisplayUnit("1/rad"))
        rows.append({"derivative": item.name, "unit": unit.label,
                     "value": unit(item.value), "standard_error": unit(item.standard_error),
                     "predicted": unit(item.predicted), "difference": unit(difference),
                     "sigmas": item.difference_in_standard_errors, "status": status})
        if not item.fixed and not item.identifiable:
            emphasis.append(len(rows) - 1)
    return Table(name, caption, columns, tuple(rows), tuple(emphasis))


def identification_fit_table(result, units=DEFAULT, name="identification-fit") -> Table:
    """Fit per measured channel: RMS residual (display units), R^2, lag-1 autocorrelation."""
    columns = (Column("channel", "Channel"), Column("unit", "Unit"), Column("rms_residual", "RMS residual"),
               Column("r_squared", "R^2", "-"), Column("lag1_autocorrelation", "Lag-1 autocorrelation", "-",
                                                       digits=3, signed=True))
    rows = []
    for channel, stats in result.fit["channels"].items():
        quantity = SIGNAL_QUANTITIES[channel]
        rows.append({"channel": _CHANNEL_NAMES[channel], "unit": units.label(quantity),
                     "rms_residual": units.convert(stats["rms_residual"], quantity),
                     "r_squared": stats["r_squared"], "lag1_autocorrelation": stats["lag1_autocorrelation"]})
    return Table(name, "Fit per measured channel", columns, tuple(rows))


def identified_mode_table(predicted, identified, name="identified-modes") -> Table:
    """The mode figures of the file's model and of the identified model."""
    columns = (Column("figure", "Mode figure"), Column("unit", "Unit"), Column("predicted", "Predicted"),
               Column("identified", "Identified"))
    rows = []
    for mode_name, label in (("dutch_roll", "Dutch roll"), ("roll_subsidence", "Roll"), ("spiral", "Spiral"),
                             ("roll_spiral", "Roll-spiral")):
        before, after = predicted.get(mode_name), identified.get(mode_name)
        if before is None and after is None:
            continue
        figures = (("natural_frequency", "omega_n", "rad/s"), ("damping_ratio", "zeta", "-")) \
            if mode_name in ("dutch_roll", "roll_spiral") else (
                ("time_constant", "T", "s"), ("time_to_double", "T_double", "s"))
        for key, symbol, unit in figures:
            values = [getattr(mode, key) if mode is not None else None for mode in (before, after)]
            if all(v is None for v in values):
                continue
            rows.append({"figure": f"{label} {symbol}", "unit": unit, "predicted": values[0],
                         "identified": values[1]})
    return Table(name, "Modes of the file's model and of the identified model", columns, tuple(rows))
