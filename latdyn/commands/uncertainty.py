"""``latdyn uncertainty FILE [--samples N] [--seed N] [--vary KEY=±20%|±0.01 [normal|uniform]]...
[--condition NAME] [--criteria SET...] [--format table|json|csv] [--plot OUT]``:
Monte Carlo level probabilities and percentiles of the mode figures.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]

FORMATS = ("table", "json", "csv")


def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--samples", type=int, default=100_000, metavar="N",
                        help="samples per condition (default 100000)")
    parser.add_argument("--seed", type=int, metavar="N", help="random seed (default: a fresh one, "
                        "printed so the run can be repeated)")
    parser.add_argument("--vary", action="append", nargs="+", default=[],
                        metavar="KEY=±AMOUNT [normal|uniform]",
                        help="uncertainty of a derivative or mass property: ±20%% (relative) or "
                             "±0.01 (absolute, file units), normal (1 sigma, default) or uniform "
                             "(half-width); adds to or replaces the file's [uncertainty] tables")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    parser.add_argument("--criteria", nargs="+", metavar="SET",
                        help="criteria sets (default as for latdyn assess)")
    parser.add_argument("--format", choices=FORMATS, default="table",
                        help="output format (default table)")
    parser.add_argument("--plot", metavar="OUT",
                        help="write the samples on the Dutch roll damping-frequency chart to OUT")


def run(args):
    from latdyn.assessment import NOTICE
    from latdyn.commands import load_study_inputs, notice_csv
    from latdyn.report.render import render
    from latdyn.report.tables import uncertainty_tables
    from latdyn.studies.uncertainty import parse_uncertainty, uncertainty, uncertainty_document

    aircraft, criteria = load_study_inputs(args)
    given = [parse_uncertainty(words, args.file) for words in args.vary]
    result = uncertainty(aircraft, given, args.samples, args.seed, args.condition, criteria,
                         progress=True)
    if args.format == "json":
        text = json.dumps(uncertainty_document(result), indent=2, allow_nan=False) + "\n"
    else:
        levels, figures = uncertainty_tables(result)
        style = "csv" if args.format == "csv" else "text"
        notice = notice_csv() if style == "csv" else NOTICE + "\n"
        text = "\n".join([
            f"{aircraft.name}  ({aircraft.file})" if style == "text" else "",
            f"{result.samples} samples per condition, seed {result.seed}" if style == "text" else "",
            render(levels, style),
            render(figures, style),
            notice]).lstrip("\n")
    if args.plot:
        from latdyn.plots.studies import uncertainty_figure

        uncertainty_figure(aircraft, result, path=args.plot)
    sys.stdout.write(text)
    return 0
