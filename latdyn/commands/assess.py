"""``latdyn assess FILE... [--criteria SET]... [--format table|markdown|csv|json]
[--units SI|US] [--condition NAME] [--flight-phase CONDITION=PHASE]... [-o FOLDER]
[--fail-below LEVEL]``:
the handling-qualities summary table.

Default criteria: MIL-F-8785C for a file with ``airplane_class``, both civil
sets (14 CFR 23.181 and 25.181) otherwise.  Everything is computed before
anything is printed or written, so a bad file leaves no partial output.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "parse_flight_phases", "render_assessment", "render_assessments",
           "worst_lines"]

def add_arguments(parser):
    from latdyn.commands import add_criteria, add_fail_below, add_format, add_units

    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    add_criteria(parser)
    add_format(parser)
    add_units(parser)
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--flight-phase", action="append", default=[], metavar="CONDITION=PHASE",
                        help="sub-phase of a condition for bands that hold only in some phases "
                             "(for example attack=combat or attack=ground_attack); repeatable")
    parser.add_argument("-o", "--output", "--plots", dest="plots", metavar="FOLDER",
                        help="also write the charts (PNG and SVG) into this existing folder "
                             "(--plots is the older name)")
    add_fail_below(parser, "a check is")


def parse_flight_phases(items, file="--flight-phase"):
    """``["name=phase", ...]`` to a dict; InputError on a malformed item.

    Examples
    --------
    >>> parse_flight_phases(["attack=combat"])
    {'attack': 'combat'}
    """
    from latdyn.errors import InputError, describe_value

    phases = {}
    for item in items:
        name, sep, phase = item.partition("=")
        phase = phase.strip()
        if not sep or not name.strip() or not phase or not phase.replace("_", "a").isalpha():
            raise InputError(file, None, "CONDITION=PHASE with a phase name of letters and _ "
                             "(for example attack=combat)", describe_value(item))
        phases[name.strip()] = phase.lower()
    return phases


def worst_lines(result):
    """One line per condition: the worst level under each criteria set and the mode that sets it.

    Examples
    --------
    >>> worst_lines(type("R", (), {"conditions": ()})())
    []
    """
    from latdyn.report.tables import check_label

    lines = []
    for condition in result.conditions:
        parts = []
        for name in dict.fromkeys(a.criteria for a in condition.assessments):
            entry = condition.worst(name)
            if entry is None:
                parts.append(f"{name}: not assessed")
            else:
                parts.append(f"{name}: {entry.result} ({check_label(entry.mode)})")
        lines.append(f"{condition.name}: " + "; ".join(parts))
    return lines


def _notes(result):
    """"conditions / mode / criteria: note" lines, what is missing included."""
    from latdyn.report.tables import check_label

    grouped = {}
    for condition in result.conditions:
        for a in condition.assessments:
            label = check_label(a.mode)
            for note in list(a.notes) + [f"missing {item}" for item in a.missing]:
                grouped.setdefault((label, a.criteria, note), []).append(condition.name)
    return [f"{', '.join(names)} / {label} / {criteria}: {note}"
            for (label, criteria, note), names in grouped.items()]


#: Columns of the roll-response indicators on the terminal (the aircraft is in the title).
RESPONSE_TEXT_VIEW = ("condition", "p_osc_over_p_av", "first_minimum_ratio", "phi_osc_over_phi_av", "psi_beta",
                      "omega_phi_over_omega_d", "delta_beta_max", "sideslip_sense", "k", "delta_beta_over_k",
                      "cn_beta_dynamic", "lcdp")
RESPONSE_EXPLAIN = ("MIL-F-8785C 3.3.2 quantities after a full step (p, beta, k) or pulse (phi) roll command, "
                    "rolls to the right; its boundaries against psi_beta (Figures 4 to 6) and the 3.3.2.4 "
                    "sideslip table are not built in. p_min/p_peak: roll rate at the first minimum over the "
                    "first peak (3.3.2.2: at least 25 % for Category B Level 1 and Categories A, C Level 2 "
                    "[secondary]). Cn_beta,dyn and LCDP > 0: resistant to departure (Weissman 1972 [recalled]).")


def _title(result):
    text = f"Handling-qualities assessment: {result.aircraft}"
    if result.file:
        text += f"  ({result.file})"
    if result.airplane_class:
        text += f"  class {result.airplane_class}"
    return text


def render_assessment(result, style="table", units=None) -> str:
    """The summary table of one aircraft as plain text ("table") or "markdown".

    Both carry the guidance-only notice, the criteria sets with their
    editions, the numbered sources and the notes; ``units`` (a
    :class:`latdyn.display.UnitSystem`, default SI) are the display units.
    """
    from latdyn.display import DEFAULT
    from latdyn.assessment import NOTICE
    from latdyn.report.render import escape_markdown, render_markdown_table, render_text
    from latdyn.report.tables import (ASSESSMENT_TEXT_VIEW, assessment_sources, assessment_table,
                                      roll_response_table)

    units = units or DEFAULT
    table = assessment_table(result).select(ASSESSMENT_TEXT_VIEW)
    response = roll_response_table(result, units).select(RESPONSE_TEXT_VIEW)
    sources = assessment_sources(result)
    notes = list(result.notes) + _notes(result)
    criteria = [f"{c.name}: {c.edition}" for c in result.graded_sets]
    explain = ("Worst: the row that limits each condition under each criteria set. "
               "Margin: to the next-better boundary, positive inside.")
    if style == "markdown":
        lines = [f"## {escape_markdown(_title(result))}", "", f"> **{escape_markdown(NOTICE)}**", "",
                 "Criteria:"]
        lines += [f"- {escape_markdown(line)}" for line in criteria]
        lines += ["", "Worst level per condition:"] + [f"- {escape_markdown(line)}" for line in worst_lines(result)]
        lines += ["", render_markdown_table(table), "",
                  escape_markdown(explain) + " Rows below Level 1 (or failing) in bold."]
        if response.rows:
            lines += ["", escape_markdown(response.caption) + ":", "", render_markdown_table(response), "",
                      escape_markdown(RESPONSE_EXPLAIN)]
        lines += ["", "Sources:"]
        lines += [f"{i}. {escape_markdown(text)}" for i, text in enumerate(sources, 1)]
        if notes:
            lines += ["", "Notes:"] + [f"- {escape_markdown(n)}" for n in notes]
        lines += ["", f"*{escape_markdown(NOTICE)}*"]
        return "\n".join(lines)
    lines = [_title(result), NOTICE, "Criteria: " + "; ".join(criteria), "",
             "Worst level per condition:"] + [f"  {line}" for line in worst_lines(result)]
    lines += ["", render_text(table), explain]
    if response.rows:
        lines += ["", response.caption + ":", render_text(response), RESPONSE_EXPLAIN]
    lines += ["", "Sources:"]
    lines += [f"  [{i}] {text}" for i, text in enumerate(sources, 1)]
    if notes:
        lines += ["Notes:"] + [f"  - {n}" for n in notes]
    return "\n".join(lines)


def _equivalent_text(result, style, units=None):
    """The equivalent-system section of an aircraft with augmented conditions ("" otherwise)."""
    view = result.equivalent_view()
    if view is None:
        return ""
    from latdyn.report.render import render_markdown_table, render_text
    from latdyn.report.tables import equivalent_table

    table = equivalent_table(result)
    words = ("Equivalent low-order systems: p/da and beta/dr of the augmented aircraft fitted over 0.1 to "
             "10 rad/s (MIL-STD-1797A's approach; forms, range and mismatch weighting from memory). "
             "M = (20/n) sum(dB^2 + 0.01745 deg^2): an indicator; the equivalent delays tau_e are shown, "
             "not graded (their limits are recalled with low confidence).")
    if style == "markdown":
        return "\n\n" + "\n\n".join([words, render_markdown_table(table), render_assessment(view, style, units)])
    return "\n\n" + "\n".join([words, render_text(table), "", render_assessment(view, style, units)])


def render_assessments(results, style="table", units=None) -> str:
    """All aircraft in one text, Markdown or CSV document.

    CSV: ``#`` comment lines first (the notice, each criteria set and its
    edition), then one header row and one row per condition, criteria set
    and mode, with raw numbers (the governing figures are times, rates,
    ratios and angles: the same in every unit system).  ``units``: one
    :class:`latdyn.display.UnitSystem` per result (or one for all; default
    SI).
    """
    from latdyn.assessment import NOTICE
    from latdyn.report.render import render_csv
    from latdyn.report.tables import ASSESSMENT_CSV_VIEW, assessment_table

    if not isinstance(units, (list, tuple)):
        units = [units] * len(results)
    if style != "csv":
        return "\n\n".join(render_assessment(r, style, u) + _equivalent_text(r, style, u)
                             for r, u in zip(results, units)) + "\n"
    lines = [f"# {NOTICE}"]
    for result in results:
        for c in result.graded_sets:
            line = f"# criteria {c.name}: {c.edition}"
            if line not in lines:
                lines.append(line)
    return "\n".join(lines) + "\n" + render_csv(assessment_table(results).select(ASSESSMENT_CSV_VIEW))


def run(args):
    from dataclasses import replace

    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import assess, default_criteria
    from latdyn.criteria_sets import load_criteria
    from latdyn.errors import InputError
    from latdyn.output_files import Output, check_output_plan
    from latdyn.plots import both_paths
    from latdyn.plots.levels import assessment_figure_paths

    from latdyn.commands import criteria_names, display_units

    phases = parse_flight_phases(args.flight_phase)
    names = criteria_names(args)
    criteria = [load_criteria(name) for name in names] if names else None
    outputs, used = [Output(args.plots, "--plots", "folder")], set()
    chosen, units = [], []
    for path in args.files:
        aircraft = load_aircraft(path)
        units.append(display_units(args, aircraft))
        if args.condition:
            aircraft = replace(aircraft, conditions=(aircraft.condition(args.condition),))
        names = {c.name for c in aircraft.conditions}
        for name in phases:
            if name not in names and not args.condition:
                raise InputError(path, "--flight-phase", "the name of a condition of the file ("
                                 + ", ".join(sorted(names)) + ")", f'"{name}"')
        for condition in aircraft.conditions:  # the file's rule: sub-phases of Category A only
            if condition.name in phases and condition.flight.category != "A":
                category = condition.flight.category
                raise InputError(path, "--flight-phase",
                                 'a condition of category "A" (combat and ground attack are '
                                 "Category A phases)",
                                 f"category {category or 'not given'}", condition.name)
        if args.plots:  # the figures' names, checked with the folder before any work
            sets = criteria or [load_criteria(name) for name in default_criteria(aircraft.airplane_class)]
            files = getattr(aircraft, "files", ())  # as the assessment names them
            figures = assessment_figure_paths(files[0] if files else None, aircraft.name, sets, args.plots, used)
            outputs += [Output(target, "--plots", "figure") for _, first in figures for target in both_paths(first)]
        chosen.append(aircraft)
    check_output_plan(outputs)
    results = [assess(aircraft, criteria, phases) for aircraft in chosen]
    if args.format == "json":
        documents = [r.as_dict() for r in results]
        text = json.dumps(documents[0] if len(documents) == 1 else documents, indent=2,
                          allow_nan=False) + "\n"
    else:
        text = render_assessments(results, args.format, units)
    written = []
    if args.plots:
        from latdyn.plots.levels import write_assessment_figures

        used = set()  # one set of file names for the folder: two aircraft never share one
        for result in results:
            written += write_assessment_figures(result, args.plots, used)
    sys.stdout.write(text)
    for path in written:
        print(f"wrote {path}", file=sys.stderr)
    if args.fail_below:
        from latdyn.assessment import checks_below
        from latdyn.commands import report_below

        return report_below(checks_below(results, args.fail_below), args.fail_below)
    return 0
