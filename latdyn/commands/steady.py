"""``latdyn steady FILE... [--condition NAME] [--sideslip-deg B] [--bank-deg PHI]
[--format table|markdown|csv|json] [--units SI|US] [-o OUT]``: steady sideslips, crosswind
capability and engine-out control of each flight condition (airspeeds in the display units and knots).

Everything is computed before anything is printed or written, so a bad file
leaves no partial output.
"""

from __future__ import annotations

import json
import math
import sys

__all__ = ["add_arguments", "run", "steady_document"]

FORMATS = ("table", "markdown", "csv", "json")


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--sideslip-deg", type=float, action="append", metavar="B",
                        help="sideslip angle for the rudder, aileron and bank needed (degrees, "
                             "repeatable; default 10)")
    parser.add_argument("--bank-deg", type=float, action="append", default=[], metavar="PHI",
                        help="bank angle of a steady wing-low sideslip: the sideslip, rudder and "
                             "aileron it needs (degrees, repeatable)")
    parser.add_argument("--roll-fraction", type=float, default=0.75, metavar="F",
                        help="fraction of the roll control a crosswind sideslip may use "
                             "(default 0.75, MIL-F-8785C 3.3.7.1)")
    parser.add_argument("--format", choices=FORMATS, default="table", help="output format (default table)")
    from latdyn.commands import add_units

    add_units(parser)
    parser.add_argument("-o", "--output", "--plot", dest="plot", metavar="OUT",
                        help="write the figure (controls against sideslip, engine-out controls "
                             "against airspeed; PNG, SVG or PDF by suffix)")


def steady_document(aircraft, results) -> dict:
    """The ``latdyn steady --format json`` document of one aircraft (SI units, radians)."""
    from latdyn import __version__
    from latdyn.assessment import NOTICE

    return {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
            "notice": NOTICE, "conditions": [r.as_dict() for r in results]}


def _angles(values, option, file):
    from latdyn.errors import InputError

    for value in values:
        if not math.isfinite(value) or abs(value) >= 90.0:
            raise InputError(file, option, "an angle between -90 and 90 degrees", f"{value:g}")
    return tuple(math.radians(v) for v in values)


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.assessment import NOTICE
    from latdyn.commands import display_units
    from latdyn.errors import InputError
    from latdyn.report.render import render
    from latdyn.report.tables import steady_table
    from latdyn.steady import steady

    first = args.files[0]
    sideslips = _angles(args.sideslip_deg if args.sideslip_deg is not None else [10.0],
                        "--sideslip-deg", first)
    banks = _angles(args.bank_deg, "--bank-deg", first)
    if not (math.isfinite(args.roll_fraction) and 0.0 < args.roll_fraction <= 1.0):
        raise InputError(first, "--roll-fraction", "a fraction > 0 and <= 1", f"{args.roll_fraction:g}")
    from latdyn.output_files import Output, check_output_plan

    aircraft_list = [load_aircraft(path) for path in args.files]
    if args.condition:
        for aircraft in aircraft_list:
            aircraft.condition(args.condition)
    check_output_plan([Output(args.plot, "--plot", "figure")])
    computed = [(aircraft, steady(aircraft, args.condition, sideslips, banks, args.roll_fraction))
                for aircraft in aircraft_list]
    if args.format == "json":
        documents = [steady_document(a, r) for a, r in computed]
        text = json.dumps(documents[0] if len(documents) == 1 else documents, indent=2,
                          allow_nan=False) + "\n"
    elif args.format == "csv":
        from latdyn.commands import notice_csv

        from latdyn.report.render import render_csv

        blocks = [render_csv(steady_table(r, units=display_units(args, a), aircraft=a.name))
                  for a, r in computed]
        text = blocks[0] + "".join(b.split("\n", 1)[1] for b in blocks[1:]) + notice_csv()
    else:
        parts = []
        for aircraft, results in computed:
            heading = f"{aircraft.name}  ({aircraft.file})"
            if args.format == "markdown":
                heading = f"## {heading}"
            style = "markdown" if args.format == "markdown" else "text"
            parts.append(heading + "\n\n" + render(steady_table(results, units=display_units(args, aircraft)),
                                                     style))
        text = "\n\n".join(parts) + "\n\n" + NOTICE + "\n"
    if args.plot:
        from latdyn.plots import save_figure
        from latdyn.plots.steady import steady_figure

        figure = steady_figure([(a, r) for a, rs in computed for r in rs])
        save_figure(figure, args.plot)
    sys.stdout.write(text)
    if args.plot:
        print(f"wrote {args.plot}", file=sys.stderr)
    return 0
