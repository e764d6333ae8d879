"""``latdyn sensitivity FILE [--condition NAME] [--format table|markdown|csv|json] [--units SI|US]
[--top N]``:
ranked normalised sensitivities of the mode figures ("which derivative to change").
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]



def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    from latdyn.commands import add_format, add_units

    add_format(parser)
    add_units(parser, "those of the file")
    parser.add_argument("--top", type=int, default=0, metavar="N",
                        help="show only the N largest per figure (default all)")


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import sensitivity_table
    from latdyn.studies.sensitivity import sensitivities, sensitivity_document

    if args.top < 0:
        raise InputError(args.file, "--top", "a whole number >= 0", str(args.top))
    from latdyn.commands import display_units

    aircraft = load_aircraft(args.file)
    units = display_units(args, aircraft).name
    results = sensitivities(aircraft, args.condition)
    if args.format == "json":
        text = json.dumps(sensitivity_document(aircraft, results), indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = render(sensitivity_table(results, args.top, units=units), "csv")
    else:
        markdown = args.format == "markdown"
        title = f"{aircraft.name}  ({aircraft.file})"
        lines = [f"## {escape_markdown(title)}" if markdown else title, "",
                 "Normalised sensitivity: % change of the figure per % change of the parameter "
                 "(eigenvalue perturbation, left and right eigenvectors).", ""]
        for result in results:
            table = sensitivity_table([result], args.top, units=units)
            heading = f'Condition "{result.condition.name}": {result.pattern}'
            lines += [f"### {escape_markdown(heading)}\n" if markdown else heading,
                      render(table.select([c.key for c in table.columns if c.key != "condition"]),
                             args.format), ""]
        text = "\n".join(lines)
    sys.stdout.write(text)
    return 0
