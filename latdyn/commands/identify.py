"""``latdyn identify FILE --condition NAME --data FLIGHT.csv [...]``: derivatives from flight test.

Reads the measured manoeuvres, identifies the derivatives
(:mod:`latdyn.identification`), prints them beside the aircraft file's
prediction with their bounds, the fit per channel and the modes of both
models; ``-o`` writes a variant aircraft file that extends the original with
the identified derivatives; ``--plot`` writes measured against identified
responses with the residuals.  All numbers come from the library.
"""

from __future__ import annotations

import json
import os
import sys

__all__ = ["add_arguments", "run", "identify_document"]

FORMATS = ("table", "markdown", "csv", "json")


def add_arguments(parser):
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML): the prediction, mass and geometry")
    parser.add_argument("--condition", metavar="NAME",
                        help="the flight condition the records were flown at (default the first)")
    parser.add_argument("--data", metavar="FLIGHT.csv", action="append", required=True,
                        help="a measured manoeuvre (CSV: time, aileron_deg, rudder_deg, beta_deg, p_deg_s, "
                             "r_deg_s, phi_deg, ny_g); repeat for several manoeuvres at the condition")
    parser.add_argument("--column", metavar="SIGNAL=NAME", action="append", default=[],
                        help="read SIGNAL (time, aileron, rudder, beta, p, r, phi, ny) from column NAME "
                             "(same unit as the default column); repeat")
    parser.add_argument("--fix", metavar="DERIVATIVE", action="append", default=[],
                        help="hold a derivative at the file's value (Cn_p or N_p); repeat")
    parser.add_argument("--method", choices=("output-error", "equation-error"), default="output-error",
                        help="output error (maximum likelihood, default) or equation error (least squares)")
    parser.add_argument("--format", choices=FORMATS, default="table", help="output format (default table)")
    from latdyn.commands import add_units

    add_units(parser, "those of the file")
    parser.add_argument("-o", "--output", metavar="OUT.toml",
                        help="write a variant aircraft file (extends FILE) with the identified derivatives")
    parser.add_argument("--plot", metavar="OUT", help="write measured against identified responses (.png, .svg, .pdf)")
    parser.add_argument("--report", metavar="FOLDER",
                        help="write a flight-test report folder (HTML, Markdown, CSV, JSON, figures) with the "
                             "identified variant aircraft file and the aircraft re-graded with it")
    parser.add_argument("--force", action="store_true", help="replace an existing --report folder")


def _columns(items):
    from latdyn.errors import InputError

    mapping = {}
    for item in items:
        signal, separator, name = item.partition("=")
        if not separator or not signal.strip() or not name.strip():
            raise InputError("command line", "--column", "SIGNAL=NAME, for example beta=AOS_deg",
                             repr(item))
        mapping[signal.strip()] = name.strip()
    return mapping


def identify_document(aircraft, result, predicted_modes, identified_modes) -> dict:
    """The ``--format json`` document (SI, radians; non-dimensional derivatives per radian)."""
    from latdyn import __version__

    primary = result.nondimensional if result.nondimensional is not None else result.derivatives
    return {
        "latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
        "conditions": [{
            "name": result.condition,
            "derivatives": {item.name: item.as_dict() for item in primary},
            "nondimensional": result.nondimensional is not None,
            "dimensional": {item.name: item.as_dict() for item in result.derivatives},
            "axes": result.axes,
            "fit": dict(result.fit),
            "modes": {"predicted": [m.as_dict() for m in predicted_modes],
                      "identified": [m.as_dict() for m in identified_modes]},
            "records": [r.file for r in result.records],
            "notes": list(result.notes),
        }],
    }


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.commands import display_units
    from latdyn.errors import InputError
    from latdyn.flight_data import read_flight_csv
    from latdyn.identification import identified_model, identify, write_variant
    from latdyn.model import lateral_model
    from latdyn.modes import UnresolvedRoots, find_modes
    from latdyn.output_files import Output, check_output_plan
    from latdyn.results import condition_modes
    from latdyn.report.render import render, render_csv
    from latdyn.report.tables import (identification_fit_table, identified_derivative_table,
                                      identified_mode_table)

    if args.output and args.output.lower().endswith(".toml") is False:
        raise InputError(args.output, "-o", "an aircraft file name ending in .toml", repr(args.output))
    columns = _columns(args.column)
    aircraft = load_aircraft(args.file)
    condition = aircraft.condition(args.condition) if args.condition else aircraft.conditions[0]
    records = [read_flight_csv(path, columns) for path in args.data]
    check_output_plan([Output(args.output, "-o"), Output(args.plot, "--plot", "figure"),
                       Output(args.report, "--report", "report", args.force)], args.data)
    method = args.method.replace("-", "_")
    result = identify(aircraft, condition, records, fix=args.fix, method=method)
    model = lateral_model(aircraft, condition)
    predicted_modes = condition_modes(aircraft, condition, model)
    try:
        identified_modes = find_modes(identified_model(model, result))
    except UnresolvedRoots as error:
        raise InputError(aircraft.file, None, "flight-test records that identify a model whose roots double "
                         "precision can resolve", f"{error} (identified from {', '.join(args.data)})",
                         condition.name) from None
    if args.plot:
        from latdyn.plots import save_figure
        from latdyn.plots.identification import identification_figure

        save_figure(identification_figure(result), args.plot)
    if args.output:
        write_variant(aircraft, result, aircraft.file, args.output)
    if args.report:
        from latdyn.report.flight_test import write_identification_report

        write_identification_report(args.report, aircraft, result, predicted_modes, identified_modes,
                                    force=args.force, command="latdyn identify " + " ".join(sys.argv[2:]),
                                    inputs=args.data)
    primary = result.nondimensional if result.nondimensional is not None else result.derivatives
    dimensional = result.nondimensional is None
    units = display_units(args, aircraft)
    derivatives = identified_derivative_table(primary, dimensional=dimensional, units=units)
    if args.format == "json":
        text = json.dumps(identify_document(aircraft, result, predicted_modes, identified_modes),
                          indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = render_csv(derivatives, raw=True)
    else:
        style = "markdown" if args.format == "markdown" else "text"
        fit = result.fit
        lines = [f"{aircraft.name}  ({aircraft.file})",
                 f'Condition "{result.condition}": {len(records)} record(s), {fit["samples"]} samples; '
                 f'{fit["method"]}, {fit["iterations"]} iteration(s), '
                 + ("converged" if fit["converged"] else "NOT converged") + ".",
                 "Standard errors: Cramer-Rao bounds corrected for coloured residuals "
                 "(equation error: least-squares standard errors).", ""]
        lines += ["Derivatives " + ("(non-dimensional, per rad; rates per p b/2V, r b/2V)"
                                    if not dimensional else
                                    f"(primed dimensional, {units.name} units, {result.axes} axes)"),
                  render(derivatives, style), ""]
        if not dimensional:
            lines += [f"Primed dimensional derivatives ({result.axes} axes, {units.name} units)",
                      render(identified_derivative_table(result.derivatives, dimensional=True, units=units),
                             style), ""]
        lines += ["Fit per measured channel", render(identification_fit_table(result, units), style), ""]
        lines += ["Modes of the file's model and of the identified model",
                  render(identified_mode_table(predicted_modes, identified_modes), style), ""]
        if fit.get("max_correlation"):
            pair = fit["max_correlation"]
            lines.append(f"Largest correlation between derivatives: {pair['value']:+.3f} "
                         f"({pair['between'][0]}, {pair['between'][1]}).")
        for note in result.notes:
            lines.append(f"Note: {note}.")
        if args.output:
            lines.append(f"Variant aircraft file written: {args.output}")
        if args.report:
            lines.append(f"Flight-test report written: {os.path.join(args.report, 'index.html')}")
        text = "\n".join(lines).rstrip() + "\n"
    sys.stdout.write(text)
    return 0
