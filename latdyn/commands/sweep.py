"""``latdyn sweep FILE --vary KEY=START:STOP:COUNT [--vary KEY=START:STOP:COUNT] [--condition NAME]
[--criteria SET]... [--format table|markdown|csv|json] [--units SI|US] [-o OUT]``: parameter
sweeps with level boundaries (values typed in the file's units, shown in the display units).

Everything is computed before anything is printed or written, so a bad
input leaves no partial output.
"""

from __future__ import annotations

import json
import math
import sys

__all__ = ["add_arguments", "run"]

def add_arguments(parser):
    from latdyn.commands import add_criteria, add_format, add_units

    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--vary", action="append", required=True, metavar="KEY=START:STOP:COUNT",
                        help="parameter range, once or twice: a derivative (Cn_beta, "
                             "condition.derivatives.Cn_beta, N_r), mass, Ixx, Izz, Ixz, speed, "
                             "altitude, density, alpha_deg, gamma_deg, fin.area_ratio, "
                             "fin.arm_ratio, controls.aileron_deg, controls.rudder_deg, "
                             "controls.aileron_rate_deg_s, controls.rudder_rate_deg_s, "
                             "engine.NAME.thrust, engine.NAME.lateral_position, "
                             "engine.NAME.failed_drag; values in the file's units (m, kg, kg m^2, m/s, N in "
                             "an SI file; ft, slug, slug ft^2, ft/s, lbf in a US file) and degrees")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--roll-performance", action="store_true",
                        help="grade roll performance at every point and root-find its level "
                             "boundaries (automatic when a controls.* key is swept; tens of "
                             "microseconds a point)")
    add_criteria(parser)
    add_format(parser)
    add_units(parser, "those of the file")
    parser.add_argument("-o", "--output", "--plot", dest="plot", metavar="OUT",
                        help="write the figures: OUT (mode figures and levels, or the level map "
                             "for two parameters) and OUT-root-locus for one parameter (--plot is "
                             "the older name)")


def run(args):
    from latdyn.assessment import NOTICE
    from latdyn.commands import display_units, load_study_inputs, notice_csv
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import sweep_summary_tables, sweep_table
    from latdyn.studies.sweep import SUMMARY_POINTS, parse_range, sweep, sweep_document

    from latdyn.plots.studies import sweep_figure_paths

    aircraft, criteria = load_study_inputs(args, lambda path: sweep_figure_paths(path, len(args.vary)))
    ranges = [parse_range(text, args.file) for text in args.vary]
    result = sweep(aircraft, ranges, args.condition, criteria, progress=True,
                   roll_performance=True if args.roll_performance else None)
    points = math.prod(result.shape)
    if args.format == "json":
        # a large grid is written compactly (the C encoder; the indented one is ~20x slower)
        indent = 2 if points <= SUMMARY_POINTS * 25 else None
        text = json.dumps(sweep_document(result), indent=indent, allow_nan=False) + "\n"
    else:
        shown = result.in_units(display_units(args, aircraft).name)
        if args.format == "csv":
            text = render(sweep_table(shown), "csv") + notice_csv()
        else:
            markdown = args.format == "markdown"
            style = args.format
            if points > SUMMARY_POINTS:
                levels, ranges = sweep_summary_tables(shown)
                table = "\n\n".join([
                    f"{points} grid points per condition: a summary (every point: --format csv or "
                    "--format json).", render(levels, style), render(ranges, style)])
            else:
                table = render(sweep_table(shown), style)
            title = f"{aircraft.name}  ({aircraft.file})"
            lines = [f"## {escape_markdown(title)}" if markdown else title, "", table, ""]
            units = {axis.key.text: axis.key.unit for axis in shown.axes}
            bullet = "- " if markdown else "  "
            if shown.crossings:
                lines.append("Level-boundary crossings (root-found on the margin):")
                if markdown:
                    lines.append("")
                lines += [bullet + c.words(units.get(c.parameter, ""), units) for c in shown.crossings]
            else:
                lines.append("No level-boundary crossing in the swept range.")
            lines += [f"note: {note}" for note in result.notes]
            lines += ["", f"> {escape_markdown(NOTICE)}" if markdown else NOTICE]
            text = "\n".join(lines) + "\n"
    if args.plot:
        from latdyn.plots.studies import write_sweep_figures

        write_sweep_figures(result, args.plot)
    sys.stdout.write(text)
    return 0
