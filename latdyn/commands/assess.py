"""``latdyn assess FILE... [--criteria SET...] [--format table|markdown|csv|json]``:
the handling-qualities summary table.

Default criteria: MIL-F-8785C for a file with ``airplane_class``, both civil
sets (14 CFR 23.181 and 25.181) otherwise.  Everything is computed before
anything is printed or written, so a bad file leaves no partial output.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "parse_flight_phases"]

FORMATS = ("table", "markdown", "csv", "json")


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    parser.add_argument("--criteria", nargs="+", metavar="SET",
                        help="criteria sets: built-in names (mil-f-8785c, mil-f-8785b, 14cfr23-181, "
                             "14cfr23-181-pre2011, 14cfr25-181) or criteria file paths; default "
                             "mil-f-8785c with an airplane_class, else 14cfr23-181 and 14cfr25-181")
    parser.add_argument("--format", choices=FORMATS, default="table", help="output format (default table)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--flight-phase", action="append", default=[], metavar="CONDITION=PHASE",
                        help="sub-phase of a condition for bands that hold only in some phases "
                             "(for example attack=combat or attack=ground_attack); repeatable")
    parser.add_argument("--plots", metavar="FOLDER",
                        help="also write the charts (PNG and SVG) into this existing folder")


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


def run(args):
    from dataclasses import replace

    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import assess
    from latdyn.assessment_tables import render_assessments
    from latdyn.criteria_sets import load_criteria
    from latdyn.errors import InputError

    phases = parse_flight_phases(args.flight_phase)
    criteria = [load_criteria(name) for name in args.criteria] if args.criteria else None
    if args.plots:
        from latdyn.output_files import check_output_folder

        check_output_folder(args.plots, "--plots")
    results = []
    for path in args.files:
        aircraft = load_aircraft(path)
        if args.condition:
            aircraft = replace(aircraft, conditions=(aircraft.condition(args.condition),))
        names = {c.name for c in aircraft.conditions}
        for name in phases:
            if name not in names and not args.condition:
                raise InputError(path, "--flight-phase", "the name of a condition of the file ("
                                 + ", ".join(sorted(names)) + ")", f'"{name}"')
        results.append(assess(aircraft, criteria, phases))
    if args.format == "json":
        documents = [r.as_dict() for r in results]
        text = json.dumps(documents[0] if len(documents) == 1 else documents, indent=2,
                          allow_nan=False) + "\n"
    else:
        text = render_assessments(results, args.format)
    written = []
    if args.plots:
        from latdyn.plots.levels import write_assessment_figures

        for result in results:
            written += write_assessment_figures(result, args.plots)
    sys.stdout.write(text)
    for path in written:
        print(f"wrote {path}", file=sys.stderr)
    return 0
