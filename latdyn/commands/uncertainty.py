"""``latdyn uncertainty FILE [--samples N] [--seed N] [--vary KEY=±20%|±0.01 [normal|uniform]]...
[--condition NAME] [--criteria SET...] [--format table|json|csv] [--plot OUT]``:
Monte Carlo level probabilities and percentiles of the mode figures.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "uncertainty_rows"]

FORMATS = ("table", "json", "csv")
LEVEL_COLUMNS = (("condition", "Condition"), ("criteria", "Criteria"), ("mode", "Mode"),
                 ("probabilities", "Probability of each level (± standard error)"))
FIGURE_COLUMNS = (("condition", "Condition"), ("figure", "Figure"), ("p5", "5 %"),
                  ("p50", "median"), ("p95", "95 %"), ("mean", "mean"),
                  ("available", "samples with the mode"))


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


def uncertainty_rows(result):
    """(level rows, figure rows) of the tables."""
    import math

    from latdyn.tables import MODE_LABELS, format_number

    level_rows, figure_rows = [], []
    for item in result.conditions:
        for (name, mode), probabilities in item.probabilities.items():
            if mode == "roll_spiral" and probabilities["not assessed"] == 1.0:
                continue  # no sample has a roll-spiral oscillation
            parts = [f"{word} {100 * p:.2f}% (±{100 * math.sqrt(p * (1 - p) / result.samples):.2f})"
                     for word, p in probabilities.items() if p > 0]
            level_rows.append({"condition": item.condition.name, "criteria": name,
                               "mode": MODE_LABELS[mode], "probabilities": "; ".join(parts)})
        for figure, values in item.percentiles.items():
            if not values["available"]:
                continue
            row = {"condition": item.condition.name, "figure": figure}
            for key in ("p5", "p50", "p95", "mean"):
                row[key] = format_number(values[key])
            row["available"] = f"{100 * values['available']:.1f}%"
            figure_rows.append(row)
    return level_rows, figure_rows


def run(args):
    from latdyn.assessment import NOTICE
    from latdyn.commands import load_study_inputs, notice_csv
    from latdyn.studies.uncertainty import parse_uncertainty, uncertainty, uncertainty_document
    from latdyn.tables import render

    aircraft, criteria = load_study_inputs(args)
    given = [parse_uncertainty(words, args.file) for words in args.vary]
    result = uncertainty(aircraft, given, args.samples, args.seed, args.condition, criteria,
                         progress=True)
    if args.format == "json":
        text = json.dumps(uncertainty_document(result), indent=2, allow_nan=False) + "\n"
    else:
        level_rows, figure_rows = uncertainty_rows(result)
        style = "csv" if args.format == "csv" else "text"
        notice = notice_csv() if style == "csv" else NOTICE + "\n"
        text = "\n".join([
            f"{aircraft.name}  ({aircraft.file})" if style == "text" else "",
            f"{result.samples} samples per condition, seed {result.seed}" if style == "text" else "",
            render(LEVEL_COLUMNS, level_rows, style),
            render(FIGURE_COLUMNS, figure_rows, style),
            notice]).lstrip("\n")
    if args.plot:
        from latdyn.plots.studies import uncertainty_figure

        uncertainty_figure(aircraft, result, path=args.plot)
    sys.stdout.write(text)
    return 0
