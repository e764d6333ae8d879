"""``latdyn sensitivity FILE [--condition NAME] [--format table|json|csv] [--top N]``:
ranked normalised sensitivities of the mode figures ("which derivative to change").
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "sensitivity_rows", "sensitivity_document"]

FORMATS = ("table", "json", "csv")
FIGURE_LABELS = {
    "dutch_roll_frequency": "Dutch roll omega_n [rad/s]",
    "dutch_roll_damping": "Dutch roll zeta [-]",
    "roll_time_constant": "Roll time constant T_R [s]",
    "spiral_root": "Spiral root [1/s]",
    "roll_spiral_frequency": "Roll-spiral omega_n [rad/s]",
    "roll_spiral_damping": "Roll-spiral zeta [-]",
}
COLUMNS = (("condition", "Condition"), ("figure", "Figure"), ("rank", "Rank"),
           ("parameter", "Parameter"), ("value", "Value [SI]"),
           ("derivative", "d figure / d parameter [SI]"), ("normalised", "% per %"))


def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--format", choices=FORMATS, default="table",
                        help="output format (default table)")
    parser.add_argument("--top", type=int, default=0, metavar="N",
                        help="show only the N largest per figure (default all)")


def sensitivity_rows(results, top=0):
    """Rows of the sensitivity table (ranked per figure)."""
    from latdyn.tables import format_number

    rows = []
    for result in results:
        figures = dict.fromkeys(s.figure for s in result.items)
        for figure in figures:
            ranked = result.for_figure(figure)
            for rank, item in enumerate(ranked[:top] if top > 0 else ranked, start=1):
                rows.append({
                    "condition": result.condition.name, "figure": FIGURE_LABELS[figure],
                    "rank": str(rank), "parameter": item.parameter,
                    "value": format_number(item.value),
                    "derivative": f"{item.derivative:.4g}",
                    "normalised": "-" if item.normalised is None else f"{item.normalised:+.3f}",
                })
    return rows


def sensitivity_document(aircraft, results) -> dict:
    from latdyn import __version__

    return {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
            "conditions": [{"name": r.condition.name, "pattern": r.pattern,
                            "sensitivities": [s.as_dict() for s in r.items]} for r in results]}


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.studies.sensitivity import sensitivities
    from latdyn.tables import render

    if args.top < 0:
        raise InputError(args.file, "--top", "a whole number >= 0", str(args.top))
    aircraft = load_aircraft(args.file)
    results = sensitivities(aircraft, args.condition)
    if args.format == "json":
        text = json.dumps(sensitivity_document(aircraft, results), indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = render(COLUMNS, sensitivity_rows(results, args.top), "csv")
    else:
        lines = [f"{aircraft.name}  ({aircraft.file})",
                 "Normalised sensitivity: % change of the figure per % change of the parameter "
                 "(eigenvalue perturbation, left and right eigenvectors).", ""]
        for result in results:
            lines += [f'Condition "{result.condition.name}": {result.pattern}',
                      render(COLUMNS[1:], sensitivity_rows([result], args.top), "text"), ""]
        text = "\n".join(lines)
    sys.stdout.write(text)
    return 0
