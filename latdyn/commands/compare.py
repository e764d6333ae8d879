"""``latdyn compare BASE VARIANT... [--criteria SET]... [--format table|markdown|csv|json]
[--units SI|US] [--fail-below LEVEL]``: the input differences in the base file's units by
default."""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "render_comparisons"]


def add_arguments(parser):
    parser.add_argument("base", metavar="BASE", help="the base aircraft file")
    parser.add_argument("variants", nargs="+", metavar="VARIANT", help="variant aircraft file(s)")
    from latdyn.commands import add_criteria, add_fail_below, add_format, add_units

    add_criteria(parser)
    add_format(parser)
    add_units(parser, "those of the base file")
    add_fail_below(parser, "a variant takes a check that was not")


def render_comparisons(comparisons, style, units=None):
    """Text of the comparisons in the table, markdown or csv style (``units``: display units,
    default SI)."""
    from latdyn.assessment import NOTICE
    from latdyn.display import DEFAULT
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import comparison_tables
    from latdyn.text import printable

    shown = escape_markdown if style == "markdown" else printable  # names from the files are data
    parts = []
    for comparison in comparisons:
        level_table, input_table, figure_table = comparison_tables(comparison, units=units or DEFAULT)
        levels = level_table.rows
        criteria = ", ".join(f"{c.name} ({c.edition})" for c in comparison.criteria)
        head = [shown(f"Comparison: {comparison.variant} ({comparison.variant_file})"),
                "  " + shown(f"against base: {comparison.base} ({comparison.base_file})"),
                NOTICE, shown(f"Criteria: {criteria}")]
        moves = ["  " + shown(f"{row['condition']}: {row['mode']} under {row['criteria']}: {row['base']} -> "
                              f"{row['variant']} ({row['verdict']})")
                 for row in levels if row["verdict"] in ("IMPROVED", "DEGRADED")]
        head.append("Level changes:" if moves else "Level changes: none")
        head += moves
        if comparison.only_in_base or comparison.only_in_variant:
            head.append(shown("Conditions not compared: only in base " + (", ".join(comparison.only_in_base) or "-")
                              + "; only in variant " + (", ".join(comparison.only_in_variant) or "-")))
        if style == "markdown":
            head = [head[0], "", head[1].strip(), "", f"> {NOTICE}", "", *head[3:]]
        sections = [("Mode figures", figure_table), ("Levels", level_table),
                    (f"Input differences ({(units or DEFAULT).name} units)", input_table)]
        body = []
        for title, table in sections:
            if style == "csv":
                body.append(f"# {title}\n" + render(table, "csv").rstrip("\n"))
            else:
                body.append((f"### {title}\n\n" if style == "markdown" else f"{title}:\n")
                            + (render(table, style) if table.rows else "(none)"))
        if style == "csv":
            parts.append("\n".join("# " + line.strip() for line in head if line.strip()) + "\n"
                         + "\n".join(body))
        else:
            parts.append("\n".join(head) + "\n\n" + "\n\n".join(body))
    return "\n\n".join(parts) + "\n"


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.compare import compare_many, comparison_document

    base = load_aircraft(args.base)
    variants = [load_aircraft(path) for path in args.variants]
    from latdyn.commands import criteria_names

    comparisons = compare_many(base, variants, criteria_names(args))
    if args.format == "json":
        text = json.dumps(comparison_document(comparisons), indent=2, allow_nan=False) + "\n"
    else:
        from latdyn.commands import display_units

        text = render_comparisons(comparisons, args.format, display_units(args, base))
    sys.stdout.write(text)
    if args.fail_below:
        from latdyn.commands import report_below
        from latdyn.compare import drops_below

        return report_below(drops_below(comparisons, args.fail_below), args.fail_below, "drops to")
    return 0
