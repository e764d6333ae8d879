"""``latdyn modes FILE... [--condition NAME] [--format table|markdown|csv|json] [--units SI|US]
[--shapes]``:
the mode table of each condition (``--json`` is ``--format json``)."""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run", "condition_heading", "augmentation_lines", "washout_lines",
           "departure_lines"]


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    from latdyn.commands import add_format

    add_format(parser)
    parser.add_argument("--json", action="store_const", const="json", dest="format",
                        help="the same as --format json")
    from latdyn.commands import add_units

    add_units(parser)
    parser.add_argument("--shapes", action="store_true",
                        help="also print the mode shapes (eigenvector magnitudes and phases)")


def condition_heading(result, units=None):
    """One line describing a flight condition, in display units (SI by default) with degrees."""
    from latdyn.display import SI, format_number

    units = units or SI
    flight = result.condition.flight
    parts = [f'Condition "{flight.name}"',
             f"category {flight.category}" if flight.category else "category not given"]

    def quantity(word, value, kind):
        parts.append(f"{word} {format_number(units.convert(value, kind))} {units.label(kind)}")

    if flight.altitude is not None:
        quantity("altitude", flight.altitude, "length")
    quantity("V", flight.speed, "speed")
    knots = [f"{format_number(units.convert(value, 'airspeed_kt'))} kt {word}"
             for value, word in ((flight.speed, "TAS"), (flight.calibrated_airspeed, "CAS"))
             if value is not None]
    parts[-1] += f" ({', '.join(knots)})"
    if flight.mach is not None:
        parts.append(f"Mach {flight.mach:.3f}")
    quantity("rho", flight.density, "density")
    quantity("q", flight.dynamic_pressure, "pressure")
    angle = units.unit("angle")
    parts.append(f"alpha {angle(flight.alpha):.2f} deg, gamma {angle(flight.gamma):.2f} deg")
    parts.append(f"{result.model.axes} axes")
    return " | ".join(parts)


def augmentation_lines(condition):
    """The augmentation line of a condition (none when it has no augmentation)."""
    augmentation = getattr(condition, "augmentation", None)
    if augmentation is None:
        return []
    from latdyn.augmentation import describe

    return [f"  augmented: {describe(augmentation)}; airframe modes of the closed loop, "
            "then the roots the augmentation adds"]


def washout_lines(result):
    """The washout's effect on turns and the spiral (none without a yaw damper)."""
    from latdyn.augmentation import AugmentedModel, washout_effect

    if not isinstance(result.model, AugmentedModel):
        return []
    effect = washout_effect(result.model)
    return [] if effect is None else [f"  {effect.words()}"]


def departure_lines(aircraft, condition):
    """The departure indicators of one condition, one line (indicators, not levels)."""
    from latdyn.departure import departure_indicators

    found = departure_indicators(aircraft, condition)
    if found.cn_beta_dynamic is None and found.lcdp is None:
        return [f"  departure indicators: {found.notes[0]}"] if found.notes else []
    parts = []
    for name, value in (("Cn_beta,dyn", found.cn_beta_dynamic), ("LCDP", found.lcdp)):
        if value is not None:
            parts.append(f"{name} {value:+.4g} /rad ({'> 0' if value > 0 else 'NOT > 0: departure-prone'})")
    return ["  departure indicators (Weissman 1972 [recalled]): " + ", ".join(parts)]


def run(args):
    from dataclasses import replace

    from latdyn.aircraft import load_aircraft
    from latdyn.commands import display_units
    from latdyn.results import analyse_aircraft, modes_document, provenance_line
    from latdyn.report.blocks import Column
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import MODE_TEXT_VIEW, mode_table, shape_table

    aircraft_list = [load_aircraft(path) for path in args.files]
    if args.condition:
        for aircraft in aircraft_list:
            aircraft.condition(args.condition)
    style = args.format
    markdown = style == "markdown"
    documents, texts, stacked = [], [], {"modes": [], "shapes": []}
    for aircraft in aircraft_list:
        results = analyse_aircraft(aircraft, args.condition)
        if style == "json":
            documents.append(modes_document(aircraft, results))
            continue
        if style == "csv":
            for result in results:
                where = {"aircraft": aircraft.name, "condition": result.condition.name}
                stacked["modes"].append((where, mode_table(result.modes).select(MODE_TEXT_VIEW)))
                if args.shapes:
                    stacked["shapes"].append((where, shape_table(result.modes)))
            continue
        title = (f"{aircraft.name}  ({aircraft.file})"
                 + (f"  class {aircraft.airplane_class}" if aircraft.airplane_class else ""))
        lines = [f"## {escape_markdown(title)}" if markdown else title]
        for result in results:
            heading = condition_heading(result, display_units(args, aircraft))
            lines += ["", f"### {escape_markdown(heading)}" if markdown else heading]
            provenance = provenance_line(result.condition)
            ambiguity = result.modes.ambiguity
            notes = [*([f"  {provenance}"] if provenance else []),
                     f"  roots: {result.modes.pattern}",
                     *([f"  NAMING AMBIGUOUS: {ambiguity.reason}; assess grades both readings"]
                       if ambiguity is not None else []),
                     *augmentation_lines(result.condition)]
            if markdown:
                lines += ["", *(escape_markdown(n.strip()) for n in notes), ""]
            else:
                lines += notes
            lines += [render(mode_table(result.modes).select(MODE_TEXT_VIEW), style),
                      *washout_lines(result), *departure_lines(aircraft, result.condition)]
            if args.shapes:
                lines += ["" if markdown else None,
                          "  mode shapes (real modes: signed magnitude; oscillations: magnitude "
                          "and phase in degrees):", "" if markdown else None,
                          render(shape_table(result.modes), style)]
        for warning in aircraft.warnings:
            lines.append(f"warning: {warning}")
        texts.append("\n".join(line for line in lines if line is not None))
    if style == "json":
        payload = documents[0] if len(documents) == 1 else documents
        sys.stdout.write(json.dumps(payload, indent=2, allow_nan=False) + "\n")
    elif style == "csv":
        where = (Column("aircraft", "Aircraft"), Column("condition", "Condition"))
        parts = []
        for key in ("modes", "shapes"):
            if stacked[key]:
                first = stacked[key][0][1]
                rows = tuple(dict(place, **row) for place, table in stacked[key] for row in table.rows)
                parts.append(render(replace(first, columns=where + first.columns, rows=rows,
                                            emphasis=()), "csv"))
        sys.stdout.write("\n".join(parts))
    else:
        sys.stdout.write("\n\n".join(texts) + "\n")
    return 0
