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
import sys

__all__ = ["add_arguments", "run", "derivative_rows", "fit_rows", "mode_rows", "identify_document"]

FORMATS = ("table", "markdown", "csv", "json")

DERIVATIVE_COLUMNS = (("derivative", "Derivative"), ("unit", "Unit"), ("value", "Identified"),
                      ("standard_error", "Std. error"), ("predicted", "Predicted"),
                      ("difference", "Difference"), ("sigmas", "Difference [std. errors]"),
                      ("status", "Status"))
FIT_COLUMNS = (("channel", "Channel"), ("unit", "Unit"), ("rms_residual", "RMS residual"),
               ("r_squared", "R^2 [-]"), ("lag1_autocorrelation", "Lag-1 autocorrelation [-]"))
MODE_COLUMNS = (("figure", "Mode figure"), ("unit", "Unit"), ("predicted", "Predicted"),
                ("identified", "Identified"))

_CHANNEL_NAMES = {"beta": "sideslip", "p": "roll rate", "r": "yaw rate", "phi": "bank",
                  "ny": "lateral load factor"}


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
    parser.add_argument("-o", "--output", metavar="OUT.toml",
                        help="write a variant aircraft file (extends FILE) with the identified derivatives")
    parser.add_argument("--plot", metavar="OUT", help="write measured against identified responses (.png, .svg, .pdf)")


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


def derivative_rows(estimates, dimensional=False):
    """Rows (raw values) of the derivative table."""
    from latdyn.model import DIMENSIONAL_UNITS

    rows = []
    for item in estimates:
        if item.fixed:
            status = "held at the prediction"
        elif not item.identifiable:
            status = f"NOT identifiable: {item.note}"
        else:
            status = "identified"
        difference = None if item.fixed or item.predicted is None else item.value - item.predicted
        rows.append({"derivative": item.name,
                     "unit": DIMENSIONAL_UNITS[item.name] if dimensional else "1/rad",
                     "value": item.value, "standard_error": item.standard_error,
                     "predicted": item.predicted, "difference": difference,
                     "sigmas": item.difference_in_standard_errors, "status": status})
    return rows


def fit_rows(result):
    """Rows (raw values, display units) of the fit table."""
    from latdyn.display import SI, SIGNAL_QUANTITIES

    rows = []
    for channel, stats in result.fit["channels"].items():
        quantity = SIGNAL_QUANTITIES[channel]
        rows.append({"channel": _CHANNEL_NAMES[channel], "unit": SI.label(quantity),
                     "rms_residual": SI.convert(stats["rms_residual"], quantity),
                     "r_squared": stats["r_squared"], "lag1_autocorrelation": stats["lag1_autocorrelation"]})
    return rows


def mode_rows(predicted, identified):
    """Rows of the mode figures of the file's model and the identified model."""
    rows = []
    for name, label in (("dutch_roll", "Dutch roll"), ("roll_subsidence", "Roll"), ("spiral", "Spiral"),
                        ("roll_spiral", "Roll-spiral")):
        before, after = predicted.get(name), identified.get(name)
        if before is None and after is None:
            continue
        figures = (("natural_frequency", "omega_n", "rad/s"), ("damping_ratio", "zeta", "-")) \
            if name in ("dutch_roll", "roll_spiral") else (
                ("time_constant", "T", "s"), ("time_to_double", "T_double", "s"))
        for key, symbol, unit in figures:
            values = [getattr(mode, key) if mode is not None else None for mode in (before, after)]
            if all(v is None for v in values):
                continue
            rows.append({"figure": f"{label} {symbol}", "unit": unit, "predicted": values[0],
                         "identified": values[1]})
    return rows


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
            "fit": _json_fit(result.fit),
            "modes": {"predicted": [m.as_dict() for m in predicted_modes],
                      "identified": [m.as_dict() for m in identified_modes]},
            "records": [r.file for r in result.records],
            "notes": list(result.notes),
        }],
    }


def _json_fit(fit):
    return {key: value for key, value in fit.items()}


def run(args):
    from latdyn.aircraft import load_aircraft
    from latdyn.errors import InputError
    from latdyn.flight_data import read_flight_csv
    from latdyn.identification import identified_model, identify, write_variant
    from latdyn.model import lateral_model
    from latdyn.modes import find_modes
    from latdyn.output_files import check_output_file

    for option, path, figure in (("-o", args.output, False), ("--plot", args.plot, True)):
        if path:
            check_output_file(path, option, figure=figure)
    if args.output and args.output.lower().endswith(".toml") is False:
        raise InputError(args.output, "-o", "an aircraft file name ending in .toml", repr(args.output))
    columns = _columns(args.column)
    aircraft = load_aircraft(args.file)
    condition = aircraft.condition(args.condition) if args.condition else aircraft.conditions[0]
    import os

    inputs = {os.path.realpath(p) for p in (*aircraft.files, *args.data)}
    for option, path in (("-o", args.output), ("--plot", args.plot)):
        if path and os.path.realpath(path) in inputs:
            raise InputError(path, option, "an output path that is not one of the inputs",
                             "the path of an input file")
    records = [read_flight_csv(path, columns) for path in args.data]
    method = args.method.replace("-", "_")
    result = identify(aircraft, condition, records, fix=args.fix, method=method)
    model = lateral_model(aircraft, condition)
    predicted_modes = find_modes(model)
    identified_modes = find_modes(identified_model(model, result))
    if args.plot:
        from latdyn.plots import save_figure
        from latdyn.plots.identification import identification_figure

        save_figure(identification_figure(result), args.plot)
    if args.output:
        write_variant(aircraft, result, aircraft.file, args.output)
    primary = result.nondimensional if result.nondimensional is not None else result.derivatives
    dimensional = result.nondimensional is None
    if args.format == "json":
        text = json.dumps(identify_document(aircraft, result, predicted_modes, identified_modes),
                          indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        text = _csv(derivative_rows(primary, dimensional))
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
                                    if not dimensional else f"(primed dimensional, SI, {result.axes} axes)"),
                  _render(DERIVATIVE_COLUMNS, derivative_rows(primary, dimensional), style), ""]
        if not dimensional:
            lines += [f"Primed dimensional derivatives ({result.axes} axes, SI)",
                      _render(DERIVATIVE_COLUMNS, derivative_rows(result.derivatives, True), style), ""]
        lines += ["Fit per measured channel", _render(FIT_COLUMNS, fit_rows(result), style), ""]
        lines += ["Modes of the file's model and of the identified model",
                  _render(MODE_COLUMNS, mode_rows(predicted_modes, identified_modes), style), ""]
        if fit.get("max_correlation"):
            pair = fit["max_correlation"]
            lines.append(f"Largest correlation between derivatives: {pair['value']:+.3f} "
                         f"({pair['between'][0]}, {pair['between'][1]}).")
        for note in result.notes:
            lines.append(f"Note: {note}.")
        if args.output:
            lines.append(f"Variant aircraft file written: {args.output}")
        text = "\n".join(lines).rstrip() + "\n"
    sys.stdout.write(text)
    return 0


def _table(columns, rows):
    from latdyn.report.blocks import Column, Table

    return Table("identify", "", tuple(Column(key, heading) for key, heading in columns), tuple(rows))


def _render(columns, rows, style):
    from latdyn.report.render import render

    return render(_table(columns, rows), style)


def _csv(rows):
    from latdyn.report.render import render_csv

    return render_csv(_table(DERIVATIVE_COLUMNS, rows), raw=True, header="headings")
