"""``latdyn sweep FILE --vary KEY=START:STOP:COUNT [--vary ...] [--condition NAME]
[--criteria SET...] [--format table|json|csv] [--plot OUT]``: parameter sweeps with level boundaries.

Everything is computed before anything is printed or written, so a bad
input leaves no partial output.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]

FORMATS = ("table", "json", "csv")


def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--vary", action="append", required=True, metavar="KEY=START:STOP:COUNT",
                        help="parameter range, once or twice: a derivative (Cn_beta, "
                             "condition.derivatives.Cn_beta, N_r), mass, Ixx, Izz, Ixz, speed, "
                             "altitude, density, alpha_deg, gamma_deg, fin.area_ratio, "
                             "fin.arm_ratio; values in the file's units and degrees")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--criteria", nargs="+", metavar="SET",
                        help="criteria sets (default as for latdyn assess)")
    parser.add_argument("--format", choices=FORMATS, default="table",
                        help="output format (default table)")
    parser.add_argument("--plot", metavar="OUT",
                        help="write the figures: OUT (mode figures and levels, or the level map "
                             "for two parameters) and OUT-root-locus for one parameter")


def run(args):
    from latdyn.assessment import NOTICE
    from latdyn.commands import load_study_inputs, notice_csv
    from latdyn.report.render import render
    from latdyn.report.tables import sweep_table
    from latdyn.studies.sweep import parse_range, sweep, sweep_document

    aircraft, criteria = load_study_inputs(args)
    ranges = [parse_range(text, args.file) for text in args.vary]
    result = sweep(aircraft, ranges, args.condition, criteria, progress=True)
    if args.format == "json":
        text = json.dumps(sweep_document(result), indent=2, allow_nan=False) + "\n"
    else:
        table = render(sweep_table(result), "csv" if args.format == "csv" else "text")
        if args.format == "csv":
            text = table + notice_csv()
        else:
            lines = [f"{aircraft.name}  ({aircraft.file})", "", table, ""]
            units = {axis.key.text: axis.key.unit for axis in result.axes}
            if result.crossings:
                lines.append("Level-boundary crossings (root-found on the margin):")
                lines += ["  " + c.words(units.get(c.parameter, "")) for c in result.crossings]
            else:
                lines.append("No level-boundary crossing in the swept range.")
            lines += ["", NOTICE]
            text = "\n".join(lines) + "\n"
    if args.plot:
        from latdyn.plots.studies import write_sweep_figures

        write_sweep_figures(result, args.plot)
    sys.stdout.write(text)
    return 0
