"""``latdyn estimate FILE... [--condition NAME] [--format table|markdown|csv|json] [--units SI|US]
[-o OUT.toml]``: the component build-up of the derivatives of each condition.

Everything is computed (and ``-o`` checked) before anything is printed or
written, so a bad input leaves no partial output.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]

FORMATS = ("table", "markdown", "csv", "json")


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--format", choices=FORMATS, default="table",
                        help="output format (default table)")
    from latdyn.commands import add_units

    add_units(parser)
    parser.add_argument("-o", "--output", metavar="OUT.toml",
                        help="write an aircraft file that extends FILE with the derivatives as "
                             "used (written and estimated) in [condition.derivatives] blocks")


def _text(aircraft_list, builds, markdown, args):
    from latdyn.commands import display_units
    from latdyn.estimation.documents import method_lines
    from latdyn.report.render import render_markdown_table, render_text
    from latdyn.report.tables import buildup_table

    render = render_markdown_table if markdown else render_text
    parts = []
    for aircraft, aircraft_builds in zip(aircraft_list, builds):
        heading = f"{aircraft.name}  ({aircraft.file})"
        parts.append(f"## {heading}" if markdown else heading)
        shown = None
        for build in aircraft_builds:
            table = buildup_table(build, units=display_units(args, aircraft))
            parts += ["", f"### {table.caption}" if markdown else table.caption, "", render(table)]
            lines = method_lines(build)
            if lines != shown:
                parts += ["", "Methods (derivatives - component: method (source)):"]
                parts += [("- " if markdown else "  ") + line for line in lines]
                shown = lines
            parts += [f"note: {note}" for note in build.notes]
            parts += [f"warning: {warning}" for warning in build.warnings]
        parts.append("")
    return "\n".join(parts).rstrip("\n") + "\n"


def _csv(aircraft_list, builds):
    from dataclasses import replace

    from latdyn.report.blocks import Column
    from latdyn.report.render import render_csv
    from latdyn.report.tables import buildup_table

    tables = [(a, buildup_table(b)) for a, bs in zip(aircraft_list, builds) for b in bs]
    columns = {c.key: c for _, t in tables for c in t.columns}
    rows = tuple({"aircraft": a.name, "condition": t.caption.split('"')[1], **row}
                 for a, t in tables for row in t.rows)
    combined = replace(tables[0][1], name="buildup", rows=rows,
                       columns=(Column("aircraft", "Aircraft"), Column("condition", "Condition"),
                                *columns.values()))
    return render_csv(combined, raw=True)


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.estimation import build_up
    from latdyn.estimation.documents import estimate_document, extension_text

    from latdyn.output_files import Output, check_output_plan

    if args.output and len(args.files) > 1:
        raise InputError(args.output, "-o", "one FILE with -o (the file it extends)", f"{len(args.files)} files")
    aircraft_list = [load_aircraft(path) for path in args.files]
    if args.condition:
        for aircraft in aircraft_list:
            aircraft.condition(args.condition)
    check_output_plan([Output(args.output, "-o")])
    builds = [[build_up(a, c) for c in a.conditions
               if not args.condition or c.name == args.condition] for a in aircraft_list]
    if args.format == "json":
        documents = [estimate_document(a, b) for a, b in zip(aircraft_list, builds)]
        payload = documents[0] if len(documents) == 1 else documents
        text = json.dumps(payload, indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = _csv(aircraft_list, builds)
    else:
        text = _text(aircraft_list, builds, args.format == "markdown", args)
    if args.output:
        from latdyn.output_files import atomic_output

        extension = extension_text(aircraft_list[0], builds[0], args.output)
        with atomic_output(args.output) as handle:
            handle.write(extension)
    sys.stdout.write(text)
    return 0
