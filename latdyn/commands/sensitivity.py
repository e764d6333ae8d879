"""``latdyn sensitivity FILE [--condition NAME] [--format table|json|csv] [--top N]``:
ranked normalised sensitivities of the mode figures ("which derivative to change").
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "sensitivity_document"]

FORMATS = ("table", "json", "csv")


def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--format", choices=FORMATS, default="table",
                        help="output format (default table)")
    parser.add_argument("--top", type=int, default=0, metavar="N",
                        help="show only the N largest per figure (default all)")


def sensitivity_document(aircraft, results) -> dict:
    from latdyn import __version__

    return {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
            "conditions": [{"name": r.condition.name, "pattern": r.pattern,
                            "sensitivities": [s.as_dict() for s in r.items]} for r in results]}


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.report.render import render
    from latdyn.report.tables import sensitivity_table
    from latdyn.studies.sensitivity import sensitivities

    if args.top < 0:
        raise InputError(args.file, "--top", "a whole number >= 0", str(args.top))
    aircraft = load_aircraft(args.file)
    results = sensitivities(aircraft, args.condition)
    if args.format == "json":
        text = json.dumps(sensitivity_document(aircraft, results), indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = render(sensitivity_table(results, args.top), "csv")
    else:
        lines = [f"{aircraft.name}  ({aircraft.file})",
                 "Normalised sensitivity: % change of the figure per % change of the parameter "
                 "(eigenvalue perturbation, left and right eigenvectors).", ""]
        for result in results:
            table = sensitivity_table([result], args.top)
            lines += [f'Condition "{result.condition.name}": {result.pattern}',
                      render(table.select([c.key for c in table.columns if c.key != "condition"]), "text"),
                      ""]
        text = "\n".join(lines)
    sys.stdout.write(text)
    return 0
