"""Reports: from aircraft files to a document a chief engineer can sign.

A report is built once as a list of blocks (headings, paragraphs, tables
with their raw values, figures) and rendered from the same blocks to a
self-contained ``index.html`` (figures embedded, print-friendly), to
``report.md``, to one CSV per table and to ``results.json`` (the JSON
documents of ``modes``, ``assess`` and ``compare``).  It is written into a
temporary folder beside the destination and renamed into place at the end,
so a failure part-way leaves no half-written report.

No formulas here: every number comes from the pipeline stages.
"""

from __future__ import annotations

import base64
import contextlib
import csv
import datetime
import hashlib
import html
import io
import json
import math
import os
import re
import shutil
import sys
import tempfile
from dataclasses import dataclass, field, replace

import numpy as np

from latdyn import __version__
from latdyn.errors import InputError

__all__ = [
    "Heading", "Paragraph", "Notice", "Table", "Figure", "Report", "build_report",
    "write_report", "render_html", "render_markdown", "results_document", "sha256_of",
]


# ------------------------------------------------------------------ blocks

@dataclass(frozen=True)
class Heading:
    level: int
    text: str
    anchor: str = ""


@dataclass(frozen=True)
class Paragraph:
    text: str
    style: str = ""  # "", "small", "warning"


@dataclass(frozen=True)
class Notice:
    text: str


@dataclass(frozen=True)
class Table:
    """A table: raw values (numbers stay numbers for the CSV), formatted for display."""

    name: str            # CSV file name without suffix
    caption: str
    columns: tuple       # ((key, heading), ...)
    rows: tuple          # dicts of key -> value (float, int, str, None)
    emphasis: tuple = () # row indices to highlight


@dataclass(frozen=True)
class Figure:
    name: str            # file name without suffix (figures/<name>.png and .svg)
    caption: str


@dataclass
class Report:
    """The blocks of a report and its machine-readable results."""

    title: str
    blocks: list = field(default_factory=list)
    results: dict = field(default_factory=dict)
    figures_written: list = field(default_factory=list)
    generated: str = ""

    def add(self, *blocks):
        self.blocks.extend(blocks)


# ------------------------------------------------------------------ formatting

def display(value, digits=4):
    """Display text of a raw table value."""
    from latdyn.tables import format_number

    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return format_number(value, digits)
    return str(value)


def _slug(text):
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower() or "item"


def sha256_of(path) -> str:
    """SHA-256 of a file's bytes, hexadecimal."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 16), b""):
            digest.update(chunk)
    return digest.hexdigest()


# ------------------------------------------------------------------ content

def _summary_rows(assessments):
    """Worst level per condition and criteria set, for every aircraft."""
    from latdyn.assessment_tables import parameter_label

    rows, emphasis = [], []
    for assessment in assessments:
        for condition in assessment.conditions:
            for criteria in assessment.criteria:
                worst = condition.worst(criteria.name)
                if worst is None:
                    continue
                rows.append({
                    "aircraft": assessment.aircraft, "condition": condition.name,
                    "category": condition.category or "not given",
                    "criteria": criteria.name,
                    "result": worst.result, "mode": _mode_label(worst.mode),
                    "governing": parameter_label(worst.mode, worst.governing),
                    "value": worst.value, "limit": worst.limit,
                    "margin": worst.margin,
                    "margin_percent": None if worst.margin_fraction is None else 100 * worst.margin_fraction,
                })
                if worst.severity >= 2:
                    emphasis.append(len(rows) - 1)
    return rows, emphasis


SUMMARY_COLUMNS = (("aircraft", "Aircraft"), ("condition", "Condition"), ("category", "Cat."),
                   ("criteria", "Criteria"), ("result", "Worst result"), ("mode", "Limiting mode"),
                   ("governing", "Governing"), ("value", "Value"), ("limit", "Limit"),
                   ("margin", "Margin"), ("margin_percent", "Margin [%]"))

ASSESSMENT_COLUMNS = (("mode", "Mode"), ("criteria", "Criteria"), ("result", "Result"),
                      ("governing", "Governing"), ("value", "Value"),
                      ("limit", "Limit"), ("margin", "Margin"), ("margin_percent", "Margin [%]"),
                      ("source", "Source"))

MODE_COLUMNS = (("mode", "Mode"), ("re", "Re(root) [1/s]"), ("im", "Im(root) [1/s]"),
                ("natural_frequency", "omega_n [rad/s]"), ("damping_ratio", "zeta [-]"),
                ("period", "Period [s]"), ("time_constant", "T [s]"),
                ("time_to_half", "T_half [s]"), ("time_to_double", "T_double [s]"),
                ("cycles_to_half", "N_half [cycles]"), ("phi_to_beta", "|phi/beta| [-]"),
                ("status", "Status"))


def _mode_label(name):
    from latdyn.tables import MODE_LABELS

    return MODE_LABELS.get(name, name)


def _mode_rows(modes):
    rows, emphasis = [], []
    for mode in modes:
        status = "neutral" if mode.neutral else ("stable" if mode.stable else "DIVERGENT")
        label = _mode_label(mode.name) + ("" if mode.oscillatory or mode.name != "dutch_roll"
                                          else " (non-oscillatory)")
        rows.append({"mode": label, "re": float(mode.eigenvalue.real), "im": abs(float(mode.eigenvalue.imag)),
                     "natural_frequency": mode.natural_frequency, "damping_ratio": mode.damping_ratio,
                     "period": mode.period, "time_constant": mode.time_constant,
                     "time_to_half": mode.time_to_half, "time_to_double": mode.time_to_double,
                     "cycles_to_half": mode.cycles_to_half, "phi_to_beta": mode.phi_to_beta,
                     "status": status})
        if not mode.stable:
            emphasis.append(len(rows) - 1)
    return rows, emphasis


def _assessment_rows(condition):
    from latdyn.assessment_tables import parameter_label

    rows, emphasis = [], []
    for entry in condition.assessments:
        rows.append({"mode": _mode_label(entry.mode), "criteria": entry.criteria,
                     "result": entry.result, "governing": parameter_label(entry.mode, entry.governing),
                     "value": entry.value, "limit": entry.limit, "margin": entry.margin,
                     "margin_percent": None if entry.margin_fraction is None else 100 * entry.margin_fraction,
                     "source": entry.source})
        if entry.severity >= 2:
            emphasis.append(len(rows) - 1)
    return rows, emphasis


def _flight_rows(result):
    flight = result.condition.flight
    model = result.model
    rows = [
        ("category", "Flight-phase category", "-", flight.category or "not given"),
        ("altitude", "Geopotential altitude", "m", flight.altitude),
        ("speed", "True airspeed", "m/s", flight.speed),
        ("mach", "Mach number", "-", flight.mach),
        ("density", "Density", "kg/m^3", flight.density),
        ("dynamic_pressure", "Dynamic pressure", "Pa", flight.dynamic_pressure),
        ("alpha", "Trim angle of attack", "deg", math.degrees(flight.alpha)),
        ("gamma", "Flight-path angle", "deg", math.degrees(flight.gamma)),
        ("axes", "Axes of the equations", "-", model.axes),
    ]
    return [{"key": k, "quantity": q, "unit": u, "value": v} for k, q, u, v in rows]


def _mass_rows(aircraft):
    rows = []
    if aircraft.mass is not None:
        m = aircraft.mass
        rows += [("Mass", "kg", m.mass), ("Ixx", "kg m^2", m.Ixx), ("Izz", "kg m^2", m.Izz),
                 ("Ixz (integral of x z dm)", "kg m^2", m.Ixz), ("Inertia axes", "-", m.axes)]
    if aircraft.geometry is not None:
        g = aircraft.geometry
        rows += [("Wing area S", "m^2", g.wing_area), ("Span b", "m", g.span),
                 ("Mean chord", "m", g.mean_chord)]
    return [{"quantity": q, "unit": u, "value": v} for q, u, v in rows]


def _derivative_rows(result):
    """One row per derivative: as given in the file, and the primed dimensional one used."""
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import COEFFICIENT_NAMES, DIMENSIONAL_NAMES, DIMENSIONAL_UNITS

    given = result.condition.derivatives
    if isinstance(given, NondimensionalDerivatives):
        given_names = COEFFICIENT_NAMES
        given_units = ["1/rad"] * len(given_names)
    else:
        given_names = DIMENSIONAL_NAMES
        given_units = [DIMENSIONAL_UNITS[n] for n in given_names]
    used = result.model.derivatives
    rows = []
    for name, unit, used_name in zip(given_names, given_units, DIMENSIONAL_NAMES):
        rows.append({"given": name, "given_unit": unit, "given_value": getattr(given, name),
                     "used": used_name + "'" if used_name[0] in "LN" else used_name,
                     "used_unit": DIMENSIONAL_UNITS[used_name], "used_value": getattr(used, used_name)})
    return rows


def _derivative_caption(result):
    from latdyn.aircraft import NondimensionalDerivatives

    given = result.condition.derivatives
    kind = "non-dimensional" if isinstance(given, NondimensionalDerivatives) else (
        "dimensional, " + ("primed" if given.primed else "not primed"))
    return (f"Derivatives as given ({kind}, {given.axes} axes) and as used "
            f"(primed dimensional, {result.model.axes} axes, SI)")


DERIVATIVE_COLUMNS = (("given", "As given"), ("given_unit", "Unit"), ("given_value", "Value"),
                      ("used", "Used"), ("used_unit", "Unit "), ("used_value", "Value "))


def _transfer_rows(model, modes):
    from latdyn.transfer_functions import bank_numerator_ratios, transfer_functions

    rows, ratios = [], None
    for transfer in transfer_functions(model, modes=modes):
        numerator = "".join(f.text(4) for f in transfer.numerator) or "1"
        denominator = "".join(f.text(4) for f in transfer.denominator)
        rows.append({"transfer": transfer.name, "gain": float(transfer.gain), "numerator": numerator,
                     "denominator": denominator, "static_gain": transfer.static_gain})
        if transfer.output == "phi" and transfer.input == "aileron":
            dutch = modes.get("dutch_roll")
            if dutch is not None and dutch.oscillatory:
                ratios = bank_numerator_ratios(transfer, dutch.eigenvalue)
    return rows, ratios


#: Largest sideslip and bank the report's standard responses are sized to stay within [deg]
#: (our choice, well inside the small-disturbance range).
RESPONSE_LIMITS = {"beta": 8.0, "phi": 30.0}


def _response(model, modes, kind, label):
    """The standard rudder-doublet or aileron-step response of a condition, with its read-outs.

    Sized for the aircraft: the input of :func:`latdyn.inputs.default_inputs`, its amplitude
    lowered (in 0.5 deg steps, 5 deg at most) so that sideslip and bank stay within
    :data:`RESPONSE_LIMITS` — exact, the model being linear.  The aileron step runs for five
    roll time constants or one and a half Dutch roll periods, whichever is longer.
    """
    from latdyn.inputs import default_inputs, make_input, switch_times, time_grid
    from latdyn.readouts import read_response
    from latdyn.responses import simulate

    settings = default_inputs(modes)
    duration = settings.duration
    if kind == "aileron-step":
        roll = modes.get("roll_subsidence")
        dutch = modes.get("dutch_roll")
        spans = [5 * roll.time_constant if roll is not None and roll.time_constant else 0.0,
                 1.5 * dutch.period if dutch is not None and dutch.period else 0.0]
        duration = min(duration, math.ceil(settings.start + max(max(spans), 3.0)))
    time = time_grid(duration, settings.step, switch_times(kind, settings.half_period, settings.start))
    unit = make_input(kind, time, math.radians(1.0), settings.half_period, settings.start)
    trial = simulate(model, unit, label=label)
    worst = max(float(np.abs(trial.signal(name)).max()) / math.radians(limit)
                for name, limit in RESPONSE_LIMITS.items())
    degrees = 5.0 if worst == 0 else max(0.5, min(5.0, math.floor(2.0 / worst) / 2.0))
    history = make_input(kind, time, math.radians(degrees), settings.half_period, settings.start)
    response = simulate(model, history, label=label)
    return response, read_response(response)


READOUT_COLUMNS = (("input", "Input"), ("signal", "Signal"), ("peak", "Peak"), ("unit", "Unit"),
                   ("time", "At [s]"))

_DISPLAY_UNITS = {"beta": ("deg", 180 / math.pi), "p": ("deg/s", 180 / math.pi),
                  "r": ("deg/s", 180 / math.pi), "phi": ("deg", 180 / math.pi),
                  "psi": ("deg", 180 / math.pi), "ny": ("g", 1.0)}


def _readout_rows(kind, readouts, modes):
    rows = []
    for peak in readouts.peaks:
        unit, factor = _DISPLAY_UNITS.get(peak.signal, ("", 1.0))
        rows.append({"input": kind, "signal": peak.signal, "peak": peak.value * factor, "unit": unit,
                     "time": peak.time})
    unit, factor = _DISPLAY_UNITS["phi"]
    rows.append({"input": kind, "signal": "phi at the end", "peak": readouts.residual_bank_angle * factor,
                 "unit": unit, "time": readouts.residual_time})
    estimate = readouts.dutch_roll
    dutch = modes.get("dutch_roll")
    if estimate is not None:
        rows.append({"input": kind, "signal": f"Dutch roll zeta from the trace ({estimate.signal})",
                     "peak": estimate.damping_ratio, "unit": "-", "time": None})
        rows.append({"input": kind, "signal": "Dutch roll period from the trace", "peak": estimate.period,
                     "unit": "s", "time": None})
    if dutch is not None and dutch.oscillatory:
        rows.append({"input": kind, "signal": "Dutch roll zeta from the eigenvalues",
                     "peak": dutch.damping_ratio, "unit": "-", "time": None})
        rows.append({"input": kind, "signal": "Dutch roll period from the eigenvalues",
                     "peak": dutch.period, "unit": "s", "time": None})
    return rows


def _close(figure):
    import matplotlib.pyplot as plt

    plt.close(figure)


def _save(report, folder, figure, name):
    from latdyn.plots import save_both

    os.makedirs(os.path.join(folder, "figures"), exist_ok=True)
    save_both(figure, os.path.join(folder, "figures", name + ".png"))
    _close(figure)
    report.figures_written.append(name)


def _progress(total, enabled):
    from tqdm import tqdm

    return tqdm(total=total, desc="latdyn report", unit="step", disable=not enabled, leave=False,
                file=sys.stderr)


def build_report(files, variants=(), criteria_sets=None, folder=None, progress=None,
                 now=None, argv=None) -> Report:
    """Build the report of aircraft files (and a comparison with variants).

    Parameters
    ----------
    files : sequence of str
        Aircraft files analysed in full; the first is the base of the comparison.
    variants : sequence of str
        Variant files compared with the first file.
    criteria_sets : sequence of str, optional
        Criteria set names or files; default per aircraft (military with a class).
    folder : str
        Folder the figures are written into (the temporary report folder).
    progress : bool, optional
        Show a progress bar on stderr (default: when stderr is a terminal).
    now : datetime.datetime, optional
        Time of the run (for the human-readable files only).

    Returns
    -------
    Report
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import NOTICE, assess
    from latdyn.compare import (FIGURE_COLUMNS, INPUT_COLUMNS, LEVEL_COLUMNS, compare_many,
                                comparison_document)
    from latdyn.criteria import load_criteria
    from latdyn.plots.levels import dutch_roll_chart, roll_spiral_chart, s_plane_map
    from latdyn.plots.responses import time_history_figure
    from latdyn.results import analyse_aircraft, modes_document

    if progress is None:
        progress = sys.stderr.isatty()
    now = now or datetime.datetime.now(datetime.timezone.utc)
    aircraft_list = [load_aircraft(path) for path in files]
    variant_list = [load_aircraft(path) for path in variants]
    criteria_objects = [load_criteria(c) for c in criteria_sets] if criteria_sets else None
    analyses = [analyse_aircraft(a) for a in aircraft_list]
    assessments = [assess(a, criteria_objects) for a in aircraft_list]
    variant_assessments = [assess(v, criteria_objects) for v in variant_list]
    comparisons = compare_many(aircraft_list[0], variant_list, criteria_objects) if variant_list else ()

    title = "Lateral-directional dynamics: " + ", ".join(a.name for a in aircraft_list)
    report = Report(title=title, generated=now.isoformat(timespec="seconds"))
    steps = sum(len(r) for r in analyses) * 3 + len(aircraft_list)
    bar = _progress(steps, progress)

    # --- first screen: notice and what this is
    report.add(Heading(1, title, "top"), Notice(NOTICE),
               Paragraph(f"Generated by latdyn {__version__} on {report.generated}. "
                         "All figures come from the linear small-disturbance model of each flight "
                         "condition (states sideslip, roll rate, yaw rate, bank). SI units; angles "
                         "in degrees where marked."))

    # --- handling-qualities summary, worst level per condition first
    summary, emphasis = _summary_rows([*assessments, *variant_assessments])
    order = sorted(range(len(summary)), key=lambda i: (-_severity_of(summary[i]), i))
    summary = [summary[i] for i in order]
    emphasis = [order.index(i) for i in emphasis]
    report.add(Heading(2, "Handling-qualities summary", "summary"),
               Paragraph("Worst result per flight condition and criteria set, worst first. "
                         "Margin: to the next-better boundary in the governing parameter's units "
                         "(positive inside the boundary). " + NOTICE, "small"),
               Table("summary", "Worst result per condition", SUMMARY_COLUMNS, tuple(summary),
                     tuple(emphasis)),
               Paragraph("Criteria editions: " + "; ".join(
                   f"{c.name}: {c.edition}" for c in {c.name: c for a in [*assessments, *variant_assessments]
                                                       for c in a.criteria}.values()) + ".", "small"))
    notes = [n for a in [*assessments, *variant_assessments] for n in a.notes]
    for note in notes:
        report.add(Paragraph("Note: " + note, "warning"))

    # --- configuration comparison
    if comparisons:
        from latdyn.compare import comparison_rows

        report.add(Heading(2, "Configuration comparison", "comparison"),
                   Paragraph(f"Base: {aircraft_list[0].name} ({aircraft_list[0].file}). Conditions "
                             "are matched by name. " + NOTICE, "small"))
        for index, comparison in enumerate(comparisons, start=1):
            figures, levels, inputs = comparison_rows(comparison)
            raw_figures = [dict(condition=c.name, mode=_mode_label(f.mode), figure=f.figure, unit=f.unit,
                                base=f.base, variant=f.variant, change=f.change,
                                change_percent=f.change_percent)
                           for c in comparison.conditions for f in c.figures]
            raw_inputs = [dict(condition=c.name, group=i.group, key=i.key, unit=i.unit, base=i.base,
                               variant=i.variant, change=i.change, change_percent=i.change_percent)
                          for c in comparison.conditions for i in c.inputs]
            moved = [i for i, row in enumerate(levels) if row["verdict"] in ("IMPROVED", "DEGRADED")]
            moves = [f"{levels[i]['condition']}: {levels[i]['mode']} ({levels[i]['criteria']}) "
                     f"{levels[i]['base']} → {levels[i]['variant']}, {levels[i]['verdict'].lower()}"
                     for i in moved]
            report.add(Heading(3, f"{comparison.variant}", f"variant-{index}"),
                       Paragraph(f"File {comparison.variant_file}. Level changes: "
                                 + ("; ".join(moves) if moves else "none") + "."),
                       Table(f"comparison-{index}-levels", "Levels, base against variant",
                             LEVEL_COLUMNS, tuple(levels), tuple(moved)),
                       Table(f"comparison-{index}-inputs", "Input differences (what caused the change)",
                             INPUT_COLUMNS, tuple(raw_inputs)),
                       Table(f"comparison-{index}-figures", "Mode figures, base against variant",
                             FIGURE_COLUMNS, tuple(raw_figures)))
            if comparison.only_in_base or comparison.only_in_variant:
                report.add(Paragraph("Not compared: only in the base " + (", ".join(comparison.only_in_base) or "-")
                                     + "; only in the variant " + (", ".join(comparison.only_in_variant) or "-"),
                                     "warning"))

    # --- per aircraft, per condition
    for aircraft, results, assessment in zip(aircraft_list, analyses, assessments):
        slug = _slug(os.path.splitext(os.path.basename(aircraft.file))[0])
        report.add(Heading(2, aircraft.name, slug),
                   Paragraph(f"File {aircraft.file}; airplane class {aircraft.airplane_class or 'not given'}."
                             + (f" {aircraft.description}." if aircraft.description else "")))
        report.add(Table(f"{slug}-mass-geometry", "Mass, inertia and geometry (SI, as read from the file)",
                         (("quantity", "Quantity"), ("unit", "Unit"), ("value", "Value")),
                         tuple(_mass_rows(aircraft))))
        _save(report, folder, s_plane_map(assessment), f"{slug}-s-plane")
        report.add(Figure(f"{slug}-s-plane", "Roots of every condition in the s-plane."))
        level_sets = [c for c in assessment.criteria if c.assessment == "levels"
                      and c.mode("spiral") and c.mode("roll_subsidence")]
        for criteria in level_sets:
            _save(report, folder, roll_spiral_chart(assessment, criteria), f"{slug}-roll-spiral-{criteria.name}")
            report.add(Figure(f"{slug}-roll-spiral-{criteria.name}",
                              f"Roll time constant and spiral time to double against the {criteria.name} "
                              f"limits ({criteria.edition}). Guidance only."))
        bar.update(1)
        for result, condition_assessment in zip(results, assessment.conditions):
            name = result.condition.name
            cslug = f"{slug}-{_slug(name)}"
            report.add(Heading(3, f"{aircraft.name}: {name}", cslug))
            if result.condition.flight.description:
                report.add(Paragraph(result.condition.flight.description))
            report.add(Table(f"{cslug}-flight-condition", "Flight condition and derived quantities",
                             (("quantity", "Quantity"), ("unit", "Unit"), ("value", "Value")),
                             tuple(_flight_rows(result))),
                       Table(f"{cslug}-derivatives", _derivative_caption(result), DERIVATIVE_COLUMNS,
                             tuple(_derivative_rows(result))))
            rows, marks = _mode_rows(result.modes)
            report.add(Paragraph(f"Roots: {result.modes.pattern}."),
                       Table(f"{cslug}-modes", "Modes", MODE_COLUMNS, tuple(rows), tuple(marks)))
            rows, marks = _assessment_rows(condition_assessment)
            report.add(Table(f"{cslug}-assessment", "Assessment against the criteria (guidance only)",
                             ASSESSMENT_COLUMNS, tuple(rows), tuple(marks)))
            single = replace(assessment, conditions=(condition_assessment,))
            for criteria in [c for c in assessment.criteria if c.mode("dutch_roll")]:
                figure_name = f"{cslug}-dutch-roll-{criteria.name}"
                _save(report, folder, dutch_roll_chart(single, criteria), figure_name)
                report.add(Figure(figure_name, f"Dutch roll damping against frequency with the "
                                               f"{criteria.name} regions ({criteria.edition}). Guidance only."))
            bar.update(1)
            readout_rows = []
            for kind in ("rudder-doublet", "aileron-step"):
                response, readouts = _response(result.model, result.modes, kind, f"{aircraft.name} / {name}")
                figure_name = f"{cslug}-{kind}"
                _save(report, folder, time_history_figure([response], [readouts], [result.modes]), figure_name)
                article = "an" if kind.startswith("aileron") else "a"
                report.add(Figure(figure_name, f"Response to {article} {kind.replace('-', ' ')} "
                                               f"({response.description}), sized to stay within "
                                               f"{RESPONSE_LIMITS['beta']:g} deg of sideslip and "
                                               f"{RESPONSE_LIMITS['phi']:g} deg of bank."))
                readout_rows += _readout_rows(kind, readouts, result.modes)
                for warning in readouts.warnings:
                    report.add(Paragraph(f"Response note ({kind}): {warning}", "warning"))
            report.add(Table(f"{cslug}-readouts", "Read-outs from the responses, beside the eigenvalue figures",
                             READOUT_COLUMNS, tuple(readout_rows)))
            transfer_rows, ratios = _transfer_rows(result.model, result.modes)
            report.add(Table(f"{cslug}-transfer-functions",
                             "Transfer functions in factored form (output per rad of control)",
                             (("transfer", "Transfer function"), ("gain", "Gain"),
                              ("numerator", "Numerator"), ("denominator", "Denominator"),
                              ("static_gain", "Static gain")), tuple(transfer_rows)))
            if ratios is not None:
                report.add(Paragraph(f"Bank-to-aileron numerator: omega_phi/omega_d = {display(ratios[0])}, "
                                     f"zeta_phi/zeta_d = {display(ratios[1])} (indicator, no level bands)."))
            bar.update(1)
    bar.close()

    # --- warnings
    warnings = [w for a in [*aircraft_list, *variant_list] for w in a.warnings]
    missing = [f"{a.file}: no airplane_class (military levels limited)" for a in [*aircraft_list, *variant_list]
               if a.airplane_class is None]
    missing += [f'{a.file}: condition "{c.name}": no category' for a in [*aircraft_list, *variant_list]
                for c in a.conditions if c.flight.category is None]
    report.add(Heading(2, "Warnings", "warnings"))
    if warnings or missing:
        for text in [*warnings, *missing]:
            report.add(Paragraph(text, "warning"))
    else:
        report.add(Paragraph("None: no sign anomalies, class and category given everywhere."))

    # --- provenance
    inputs = []
    for a in [*aircraft_list, *variant_list]:
        for path in a.files:
            inputs.append({"file": path, "sha256": sha256_of(path)})
    criteria_files = [c for c in (criteria_sets or ()) if os.path.exists(c)]
    for path in criteria_files:
        inputs.append({"file": path, "sha256": sha256_of(path)})
    used_sets = {c.name: c for a in [*assessments, *variant_assessments] for c in a.criteria}
    report.add(Heading(2, "Provenance", "provenance"),
               Paragraph(f"latdyn {__version__}; run at {report.generated}"
                         + (f"; command: {' '.join(argv)}" if argv else "") + "."),
               Table("provenance-inputs", "Input files (SHA-256 of their bytes)",
                     (("file", "File"), ("sha256", "SHA-256")), tuple(inputs)),
               Table("provenance-criteria", "Criteria sets",
                     (("name", "Set"), ("edition", "Edition"), ("title", "Title")),
                     tuple({"name": c.name, "edition": c.edition, "title": c.title}
                           for c in used_sets.values())),
               Notice(NOTICE))

    report.results = results_document(aircraft_list, analyses, assessments, variant_list,
                                      variant_assessments, comparisons, inputs)
    return report


def _severity_of(row):
    text = row["result"]
    if text.startswith("Level "):
        return int(text.split()[1])
    if "beyond" in text.lower():
        return 4
    if text.lower().startswith("fail"):
        return 2
    if text.lower().startswith("pass"):
        return 1
    return 0


def results_document(aircraft_list, analyses, assessments, variant_list, variant_assessments,
                     comparisons, inputs) -> dict:
    """``results.json``: the modes, assess and compare documents; no timestamps."""
    from latdyn.assessment import NOTICE
    from latdyn.compare import comparison_document
    from latdyn.results import modes_document

    return {
        "latdyn_version": __version__,
        "notice": NOTICE,
        "aircraft": [{"modes": modes_document(a, r), "assess": s.as_dict()}
                     for a, r, s in zip(aircraft_list, analyses, assessments)],
        "variants": [{"modes": modes_document(v), "assess": s.as_dict()}
                     for v, s in zip(variant_list, variant_assessments)],
        "comparison": comparison_document(comparisons) if comparisons else None,
        "inputs": inputs,
    }


# ------------------------------------------------------------------ rendering

CSS = """
:root { --ink: #1f2a36; --muted: #5b6773; --rule: #d5dbe1; --band: #f3f5f7; --accent: #8a4b08;
        --alert: #a1271b; }
body { font: 14px/1.45 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: var(--ink);
       max-width: 1100px; margin: 24px auto; padding: 0 20px; }
h1 { font-size: 24px; margin: 0 0 10px; }
h2 { font-size: 19px; border-bottom: 2px solid var(--ink); padding-bottom: 3px; margin-top: 34px; }
h3 { font-size: 16px; margin-top: 26px; }
.notice { border: 2px solid var(--accent); background: #fff7ec; padding: 10px 14px; margin: 12px 0;
          font-weight: 600; }
.small { color: var(--muted); font-size: 12.5px; }
.warning { color: var(--alert); }
table { border-collapse: collapse; margin: 8px 0 16px; font-size: 12.5px; }
caption { text-align: left; font-weight: 600; padding: 4px 0; }
th, td { border: 1px solid var(--rule); padding: 3px 7px; text-align: left; vertical-align: top; }
th { background: var(--band); }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.mark td { background: #fdecea; font-weight: 600; }
figure { margin: 10px 0 20px; }
figure img { max-width: 100%; border: 1px solid var(--rule); }
figcaption { color: var(--muted); font-size: 12.5px; }
nav ul { columns: 2; font-size: 13px; }
@page { size: A4 landscape; margin: 12mm; }
@media print {
  body { max-width: none; margin: 0; font-size: 11px; }
  h2, h3 { page-break-after: avoid; }
  thead { display: table-header-group; }
  tr, figure, .notice { page-break-inside: avoid; }
  figure img { max-height: 170mm; }
  nav { display: none; }
  a { color: inherit; text-decoration: none; }
}
"""


def _is_number(value):
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def render_html(report: Report, folder: str) -> str:
    """The self-contained HTML page (figures embedded as PNG data)."""
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
           f"<title>{html.escape(report.title)}</title>", f"<style>{CSS}</style></head><body>"]
    headings = [b for b in report.blocks if isinstance(b, Heading) and b.level == 2]
    nav_done = False
    for block in report.blocks:
        if isinstance(block, Heading):
            if block.level == 2 and not nav_done:
                out.append("<nav><strong>Contents</strong><ul>" + "".join(
                    f'<li><a href="#{h.anchor}">{html.escape(h.text)}</a></li>' for h in headings)
                    + "</ul></nav>")
                nav_done = True
            out.append(f'<h{block.level} id="{block.anchor}">{html.escape(block.text)}</h{block.level}>')
        elif isinstance(block, Notice):
            out.append(f'<div class="notice">{html.escape(block.text)}</div>')
        elif isinstance(block, Paragraph):
            style = f' class="{block.style}"' if block.style else ""
            out.append(f"<p{style}>{html.escape(block.text)}</p>")
        elif isinstance(block, Table):
            out.append(f"<table><caption>{html.escape(block.caption)}</caption><thead><tr>"
                       + "".join(f"<th>{html.escape(h)}</th>" for _, h in block.columns) + "</tr></thead><tbody>")
            for index, row in enumerate(block.rows):
                mark = ' class="mark"' if index in block.emphasis else ""
                cells = []
                for key, _ in block.columns:
                    value = row.get(key)
                    cls = ' class="num"' if _is_number(value) else ""
                    cells.append(f"<td{cls}>{html.escape(display(value))}</td>")
                out.append(f"<tr{mark}>" + "".join(cells) + "</tr>")
            out.append("</tbody></table>")
        elif isinstance(block, Figure):
            with open(os.path.join(folder, "figures", block.name + ".png"), "rb") as handle:
                data = base64.b64encode(handle.read()).decode("ascii")
            out.append(f'<figure><img alt="{html.escape(block.caption)}" src="data:image/png;base64,{data}">'
                       f"<figcaption>{html.escape(block.caption)}</figcaption></figure>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def render_markdown(report: Report) -> str:
    """``report.md``: the same blocks, figures as relative links to figures/."""
    from latdyn.tables import render_markdown as table_markdown

    out = []
    for block in report.blocks:
        if isinstance(block, Heading):
            out.append("#" * block.level + " " + block.text)
        elif isinstance(block, Notice):
            out.append("> **" + block.text + "**")
        elif isinstance(block, Paragraph):
            out.append(("*" + block.text + "*") if block.style == "small" else block.text)
        elif isinstance(block, Table):
            rows = [{k: display(row.get(k)) for k, _ in block.columns} for row in block.rows]
            for index in block.emphasis:
                rows[index] = {k: f"**{v}**" for k, v in rows[index].items()}
            out.append(f"**{block.caption}**\n\n" + table_markdown(block.columns, rows))
        elif isinstance(block, Figure):
            out.append(f"![{block.caption}](figures/{block.name}.png)\n\n*{block.caption}*")
    return "\n\n".join(out) + "\n"


def _csv_value(value):
    if value is None:
        return ""
    if isinstance(value, float):
        return repr(value)
    return str(value)


def render_csv(table: Table) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([key for key, _ in table.columns])
    for row in table.rows:
        writer.writerow([_csv_value(row.get(key)) for key, _ in table.columns])
    return buffer.getvalue()


# ------------------------------------------------------------------ writing

def write_report(files, output, variants=(), criteria_sets=None, force=False, progress=None,
                 argv=None) -> str:
    """Build and write a report folder atomically.

    Parameters
    ----------
    files, variants, criteria_sets
        As :func:`build_report`.
    output : str
        The report folder to create.
    force : bool
        Replace an existing folder.

    Returns
    -------
    str
        The folder written.

    Raises
    ------
    InputError
        Bad input, or ``output`` exists and ``force`` is not set.
    """
    output = os.path.normpath(os.fspath(output))
    if os.path.exists(output) and not force:
        raise InputError(output, "-o", "a report folder that does not exist yet (or --force to replace it)",
                         "an existing " + ("folder" if os.path.isdir(output) else "file"))
    parent = os.path.dirname(os.path.abspath(output))
    created = []  # parent folders made here, deepest first: removed again if the report fails
    folder = parent
    while not os.path.exists(folder):
        created.append(folder)
        folder = os.path.dirname(folder)

    def remove_created():
        for made in created:
            with contextlib.suppress(OSError):
                os.rmdir(made)

    try:
        os.makedirs(parent, exist_ok=True)
        temporary = tempfile.mkdtemp(prefix="." + os.path.basename(output) + ".", dir=parent)
    except OSError as error:
        remove_created()
        raise InputError(output, "-o", "a report folder in a writable place",
                         error.strerror or str(error)) from None
    try:
        import matplotlib

        matplotlib.use("Agg")
        report = build_report(files, variants, criteria_sets, temporary, progress, argv=argv)
        tables = os.path.join(temporary, "tables")
        os.makedirs(tables, exist_ok=True)
        for block in report.blocks:
            if isinstance(block, Table):
                with open(os.path.join(tables, block.name + ".csv"), "w", newline="") as handle:
                    handle.write(render_csv(block))
        with open(os.path.join(temporary, "report.md"), "w") as handle:
            handle.write(render_markdown(report))
        with open(os.path.join(temporary, "index.html"), "w") as handle:
            handle.write(render_html(report, temporary))
        with open(os.path.join(temporary, "results.json"), "w") as handle:
            json.dump(report.results, handle, indent=2, allow_nan=False, sort_keys=False)
            handle.write("\n")
        os.chmod(temporary, 0o755)
        if os.path.exists(output):
            old = tempfile.mkdtemp(prefix="." + os.path.basename(output) + ".old.", dir=parent)
            os.replace(output, os.path.join(old, "previous"))
            os.replace(temporary, output)
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(temporary, output)
    except BaseException:
        shutil.rmtree(temporary, ignore_errors=True)
        remove_created()
        raise
    return output
