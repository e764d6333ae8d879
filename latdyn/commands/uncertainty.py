"""``latdyn uncertainty FILE [--samples N] [--seed N] [--vary KEY=±AMOUNT[,normal|,uniform]]...
[--condition NAME] [--criteria SET]... [--format table|markdown|csv|json] [--units SI|US] [-o OUT]``:
Monte Carlo level probabilities and percentiles of the mode figures; the uncertainties sampled in
the display units.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]



def add_arguments(parser):
    from latdyn.commands import add_criteria, add_format, add_units

    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--samples", type=int, default=100_000, metavar="N",
                        help="samples per condition (default 100000)")
    parser.add_argument("--seed", type=int, metavar="N", help="random seed (default: a fresh one, "
                        "printed so the run can be repeated)")
    parser.add_argument("--vary", action="append", default=[],
                        metavar="KEY=±AMOUNT[,uniform]",
                        help="uncertainty of a derivative or mass property, one per option: "
                             "KEY=±20%% (relative) or KEY=±0.01 (absolute, file units: kg, kg m^2, m/s in an "
                             "SI file, slug, slug ft^2, ft/s in a US file; +- for ±), "
                             "normal (1 sigma, default) or ,uniform (half-width) after a comma; "
                             "adds to or replaces the file's [uncertainty] tables")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--roll-performance", action="store_true",
                        help="also grade roll performance (where the file gives the aileron travel): "
                             "its level probabilities and the time to the bank change; tens of "
                             "microseconds a sample")
    add_criteria(parser)
    add_format(parser)
    add_units(parser, "those of the file")
    parser.add_argument("-o", "--output", "--plot", dest="plot", metavar="OUT",
                        help="write the samples on the Dutch roll damping-frequency chart to OUT "
                             "(--plot is the older name)")


def run(args):
    from latdyn.assessment import NOTICE
    from latdyn.commands import display_units, load_study_inputs, notice_csv
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import uncertainty_inputs_table, uncertainty_tables
    from latdyn.studies.uncertainty import parse_uncertainty, uncertainty, uncertainty_document

    from latdyn.plots import both_paths

    aircraft, criteria = load_study_inputs(args, both_paths)
    given = [parse_uncertainty(words.replace(",", " "), args.file) for words in args.vary]
    result = uncertainty(aircraft, given, args.samples, args.seed, args.condition, criteria,
                         progress=True, roll_performance=args.roll_performance)
    if args.format == "json":
        text = json.dumps(uncertainty_document(result), indent=2, allow_nan=False) + "\n"
    else:
        levels, figures = uncertainty_tables(result)
        inputs = uncertainty_inputs_table(result, display_units(args, aircraft).name)
        style = args.format
        markdown = style == "markdown"
        notice = {"csv": notice_csv(), "markdown": f"> {escape_markdown(NOTICE)}\n"}.get(
            style, NOTICE + "\n")
        title = f"{aircraft.name}  ({aircraft.file})"
        head = [] if style == "csv" else [
            f"## {escape_markdown(title)}" if markdown else title,
            f"{result.samples} samples per condition, seed {result.seed}",
            *[f'condition "{item.condition.name}": {item.excluded} samples left the file\'s rules '
              f"and were not analysed (" + "; ".join(f"{rule}: {count}" for rule, count
                                                  in (item.excluded_rules or {}).items()) + ")"
              for item in result.conditions if item.excluded], *result.notes]
        separator = "\n\n" if markdown else "\n"
        # the CSV blocks keep their order (the inputs added last); text and Markdown say first
        # what was varied
        tables = [levels, figures, inputs] if style == "csv" else [inputs, levels, figures]
        text = separator.join([*head, *(render(table, style) for table in tables), notice])
    if args.plot:
        from latdyn.assessment import assess
        from latdyn.plots import save_both
        from latdyn.plots.studies import uncertainty_figure

        save_both(uncertainty_figure(result, assess(aircraft, criteria)), args.plot)
    sys.stdout.write(text)
    return 0
