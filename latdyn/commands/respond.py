"""``latdyn respond FILE... [--condition NAME]... [--input KIND|FILE.csv]... [-o OUT]...
[--format table|markdown|csv|json] [--units SI|US] [--transfer-functions] ...``: time responses.

Simulates each chosen condition (of one or more aircraft files) with the
same input, prints the read-outs beside the eigenvalue figures, and writes
the time history as CSV and the stacked time-history plot (several cases
overlaid).  ``--transfer-functions`` (or ``--bode``) on its own computes
the transfer functions only, without a simulation.  All the work is done by latdyn.inputs, latdyn.responses,
latdyn.readouts, latdyn.transfer_functions and latdyn.plots.responses.
"""

from __future__ import annotations

import math
import os
import sys

__all__ = ["add_arguments", "run", "case_csv_paths", "respond_document", "FIGURE_SUFFIXES"]

#: Output suffixes that -o writes as the time-history figure (anything else: CSV).
FIGURE_SUFFIXES = (".png", ".svg", ".pdf")
#: Options that ask for a simulation (with --transfer-functions alone there is none).
_SIMULATION_OPTIONS = ("inputs", "amplitude_deg", "half_period", "start", "duration", "dt",
                       "csv", "plot")

_COMMAND_LINE = "command line"
#: The option that sets each run setting the library may size.
_SIZED_OPTIONS = {"duration": "--duration", "amplitude": "--amplitude-deg"}


def add_arguments(parser):
    parser.add_argument("files", nargs="+", metavar="FILE", help="aircraft file(s) (TOML)")
    parser.add_argument("--condition", metavar="NAME", action="append",
                        help="flight condition (repeat to overlay several; 'all' for every one); "
                             "default the first condition of each file")
    parser.add_argument("--input", metavar="KIND|FILE.csv", action="append", dest="inputs",
                        help="rudder-doublet (default), aileron-step, rudder-step, aileron-pulse, "
                             "rudder-pulse, 3211 (rudder), aileron-doublet, aileron-3211, none, or a CSV "
                             "file with columns time, aileron, rudder [s, deg, deg]; repeat for "
                             "simultaneous inputs")
    parser.add_argument("--amplitude-deg", type=float, metavar="A",
                        help="control deflection [deg] (default 5, lowered to keep |beta| within 8 deg "
                             "and |phi| within 30 deg over the run)")
    parser.add_argument("--half-period", type=float, metavar="T",
                        help="doublet half-period and pulse width [s]; the 3-2-1-1 unit is half of it "
                             "(default: half the Dutch roll period)")
    parser.add_argument("--start", type=float, metavar="T0", help="start of the input [s] (default 1)")
    parser.add_argument("--duration", type=float, metavar="T",
                        help="length of the run [s] (default: several Dutch roll cycles; for a step, "
                             "until |phi| reaches 30 deg or |beta| 8 deg, but at least until the roll "
                             "mode settles and one Dutch roll period has passed)")
    parser.add_argument("--dt", type=float, metavar="DT", help="time step [s] (default sized for the modes)")
    parser.add_argument("--spiral", action="store_true",
                        help="long view for the spiral mode (duration and step sized for it)")
    for name, unit in (("beta0-deg", "deg"), ("phi0-deg", "deg"), ("p0-deg-s", "deg/s"),
                       ("r0-deg-s", "deg/s")):
        parser.add_argument(f"--{name}", type=float, default=0.0, metavar="X",
                            help=f"initial {name.split('0')[0]} disturbance [{unit}]")
    parser.add_argument("-o", "--output", action="append", default=[], metavar="OUT",
                        help="write OUT: the stacked time-history plot for .png, .svg, .pdf, "
                             "else the time history as CSV (one file per case); repeat for both")
    parser.add_argument("--csv", metavar="OUT", help="write the time history as CSV (as -o OUT.csv)")
    parser.add_argument("--plot", metavar="OUT",
                        help="write the stacked time-history plot (.png, .pdf, .svg; as -o)")
    parser.add_argument("--bode", metavar="OUT", help="write Bode plots of the transfer functions")
    parser.add_argument("--transfer-functions", action="store_true",
                        help="the transfer functions in factored form (and, with --format json, "
                             "gain, zeros and poles); alone, without a simulation")
    from latdyn.commands import add_format, add_units

    add_units(parser)
    add_format(parser, extra="; csv prints the time history, or the transfer functions when "
                             "there is no simulation")


def _check_positive(value, option, allow_zero=False):
    from latdyn.errors import InputError

    if value is None:
        return
    if not math.isfinite(value) or value < 0 or (value == 0 and not allow_zero):
        expected = "a number >= 0" if allow_zero else "a number > 0"
        raise InputError(_COMMAND_LINE, option, expected, repr(value))


def _check_angles(args):
    """Deflection and initial disturbance: finite; the deflection and angles within bounds [deg]."""
    from latdyn.errors import InputError
    from latdyn.inputs import MAX_DEFLECTION_DEG

    # beyond a right angle of sideslip or a half turn of bank the numbers are a slip of units
    # or a typo (common practice); the rates need only be finite
    for option, limit in (("--amplitude-deg", MAX_DEFLECTION_DEG), ("--beta0-deg", 90.0), ("--phi0-deg", 180.0),
                          ("--p0-deg-s", None), ("--r0-deg-s", None)):
        value = getattr(args, option[2:].replace("-", "_"))
        if value is None:
            continue
        if not math.isfinite(value):
            raise InputError(_COMMAND_LINE, option, "a finite number", repr(value))
        if limit is not None and abs(value) > limit:
            raise InputError(_COMMAND_LINE, option, f"a number from -{limit:g} to {limit:g} [deg]", repr(value))


def _cases(args):
    """(aircraft, condition) pairs in the order asked for."""
    from latdyn.aircraft import load_aircraft

    cases = []
    for path in args.files:
        aircraft = load_aircraft(path)
        names = args.condition or [aircraft.conditions[0].name]
        if "all" in names:
            chosen = list(aircraft.conditions)
        else:
            chosen = [aircraft.condition(name) for name in names]
        cases.extend((aircraft, condition) for condition in chosen)
    return cases


def _labels(cases):
    """Legend names: the condition when one file, else file and condition."""
    files = {aircraft.file for aircraft, _ in cases}
    if len(cases) == 1:
        aircraft, condition = cases[0]
        return [f"{aircraft.name} / {condition.name}"]
    if len(files) == 1:
        return [condition.name for _, condition in cases]
    return [f"{os.path.splitext(os.path.basename(a.file))[0]} / {c.name}" for a, c in cases]


def case_csv_paths(path, labels):
    """CSV path of each case: ``path`` itself for one case, else ``stem-<label>.csv``, the label
    as a safe slug (:func:`latdyn.text.file_name`), numbered where two collide.

    Examples
    --------
    >>> case_csv_paths("out.csv", ["climb", "approach / flaps 25", "../climb"])
    ['out-climb.csv', 'out-approach-flaps-25.csv', 'out-climb-2.csv']
    """
    from latdyn.text import file_name, numbered

    if len(labels) == 1:
        return [path]
    stem, suffix = os.path.splitext(path)
    used = set()
    return [f"{stem}-{numbered(file_name(label), used)}{suffix or '.csv'}" for label in labels]


def _histories(args, reference_defaults, models, modes):
    """The input history on one grid, the settings used (the amplitude, and for a step the run
    length, sized when not given) and how the defaults were chosen, in words."""
    from latdyn.errors import InputError
    from latdyn.inputs import INPUT_KINDS, read_input_csv, run_inputs, run_settings
    from latdyn.responses import size_defaults

    kinds = args.inputs or ["rudder-doublet"]
    tables = []
    for kind in kinds:
        if kind.lower().endswith(".csv"):
            tables.append(read_input_csv(kind))
        elif kind not in INPUT_KINDS:
            raise InputError(_COMMAND_LINE, "--input",
                             f"one of {', '.join(INPUT_KINDS)} or a file ending in .csv", f'"{kind}"')
    _check_positive(args.half_period, "--half-period")
    _check_positive(args.start, "--start", allow_zero=True)
    _check_positive(args.duration, "--duration")
    _check_positive(args.dt, "--dt")
    settings = run_settings(
        reference_defaults, tables,
        amplitude=math.radians(args.amplitude_deg) if args.amplitude_deg is not None else None,
        half_period=args.half_period, start=args.start, duration=args.duration, step=args.dt,
        spiral=args.spiral, source=_COMMAND_LINE, options={"duration": "--duration", "step": "--dt"})
    # the long view for the spiral is a chosen length, as --duration is
    settings, sizing = size_defaults(models, modes, kinds, settings,
                                     amplitude_given=args.amplitude_deg is not None,
                                     duration_given=args.duration is not None or args.spiral)
    document = dict(settings.as_dict(), amplitude_sized=sizing.amplitude_sized,
                    duration_sized=sizing.duration_sized)
    words = {_SIZED_OPTIONS[name]: sentence for name, sentence in sizing.words(settings).items()}
    return run_inputs(kinds, tables, settings), document, words


def _format(value, digits=4):
    from latdyn.display import format_number

    return format_number(value, digits)




def _dutch_lines(readout, modes):
    dutch = modes.get("dutch_roll")
    trace = readout.dutch_roll
    lines = []
    if trace is not None:
        growing = " (growing oscillation)" if trace.damping_ratio < 0 else ""
        lines.append(f"  Dutch roll from the trace:       zeta {_format(trace.damping_ratio)}, "
                     f"period {_format(trace.period)} s{growing}  "
                     f"(log decrement on {trace.count} extrema of {trace.signal} after the input)")
    else:
        lines.append("  Dutch roll from the trace:       too few clear extrema after the input to read")
    if dutch is not None and dutch.oscillatory:
        line = (f"  Dutch roll from the eigenvalues: zeta {_format(dutch.damping_ratio)}, "
                f"period {_format(dutch.period)} s")
        if dutch.divergent:
            line += f"  DIVERGENT: time to double {_format(dutch.time_to_double)} s"
        lines.append(line)
    elif dutch is not None:
        lines.append("  Dutch roll from the eigenvalues: not oscillatory (two real roots)")
    return lines


def _transfer_lines(model, modes):
    from latdyn.modes import MODE_LABELS
    from latdyn.transfer_functions import bank_numerator_ratios, transfer_functions

    transfers = transfer_functions(model, modes=modes)
    lines = ["  Transfer functions (SI: rad and rad/s per rad; K = high-frequency gain; G(0) = static gain)"]
    denominator = "".join(f.text() for f in transfers[0].denominator)
    from latdyn.augmentation import added_label

    names = ", ".join(f"{f.text()} {MODE_LABELS.get(f.mode) or added_label(f.mode or '')}".strip()
                      for f in transfers[0].denominator)
    lines.append(f"    denominator (the modes): {denominator}")
    lines.append(f"      = {names}")
    for transfer in transfers:
        numerator = "".join(f.text() for f in transfer.numerator) or "1"
        static = _format(transfer.static_gain) if transfer.static_gain is not None else "-"
        lines.append(f"    {transfer.name:8s} = {transfer.gain:.4g} {numerator} / denominator"
                     f"    G(0) = {static}")
    dutch = modes.get("dutch_roll")
    phi_da = next(t for t in transfers if t.name == "phi/da")
    ratios = None
    if dutch is not None and dutch.oscillatory:
        ratios = bank_numerator_ratios(phi_da, dutch.eigenvalue)
        if ratios is not None:
            lines.append(f"    phi/da numerator: omega_phi/omega_d = {_format(ratios[0])}, "
                         f"zeta_phi/zeta_d = {_format(ratios[1])}")
    return lines, transfers, ratios


def _summary(label, aircraft, response, readout, modes, settings, sizing, units):
    from latdyn.display import SIGNAL_QUANTITIES, bank_at_end_words

    lines = [f"{label}  ({aircraft.file})"]
    lines.append(f"  input: {response.description or 'none'}; 0 to {settings['duration']:g} s, "
                 f"step {settings['step']:g} s ({response.time.size} samples)")
    for option, sentence in sizing.items():
        lines.append(f"  {sentence} ({option} sets it)")
    peaks = []
    for peak in readout.peaks:
        quantity = SIGNAL_QUANTITIES.get(peak.signal)
        value = units.convert(peak.value, quantity) if quantity else peak.value
        unit = units.label(quantity) if quantity else ""
        peaks.append(f"{peak.signal} {_format(value)} {unit} "
                     + (f"at the end ({peak.time:.2f} s, still changing)"
                        if readout.at_end(peak) else f"at {peak.time:.2f} s"))
    lines.append("  peaks: " + " | ".join(peaks))
    lines += _dutch_lines(readout, modes)
    lines.append(f"  bank angle at the end ({readout.residual_time:g} s): "
                 f"{_format(units.convert(readout.residual_bank_angle, 'angle'))} {units.label('angle')}, "
                 f"{bank_at_end_words(readout, units)}")
    for warning in readout.warnings:
        lines.append(f"  warning: {warning}")
    return lines


def _sort_outputs(args):
    """Fold ``-o`` into --csv and --plot by suffix (InputError on a second of one kind)."""
    from latdyn.errors import InputError

    for path in args.output:
        option = "plot" if os.path.splitext(path)[1].lower() in FIGURE_SUFFIXES else "csv"
        if getattr(args, option):
            raise InputError(_COMMAND_LINE, "-o", f"one {option} output (a second -o or --{option} "
                             "names the same output)", f'"{path}"')
        setattr(args, option, path)


def _simulation_wanted(args):
    """False for --transfer-functions or --bode on their own (no input or output of a run)."""
    if not (args.transfer_functions or args.bode):
        return True
    initial = any(getattr(args, name) for name in ("beta0_deg", "phi0_deg", "p0_deg_s", "r0_deg_s"))
    return initial or args.spiral or any(getattr(args, name) for name in _SIMULATION_OPTIONS)


def _readout_document(response, readout, settings):
    trace = readout.dutch_roll
    return {
        "input": response.description or None,
        "settings": settings,
        "peaks": [{"signal": p.signal, "value": p.value, "time": p.time} for p in readout.peaks],
        "dutch_roll_from_trace": None if trace is None else {
            "damping_ratio": trace.damping_ratio, "period": trace.period,
            "natural_frequency": trace.natural_frequency, "signal": trace.signal,
            "extrema": trace.count},
        "bank_angle_at_end": readout.residual_bank_angle,
        "time_at_end": readout.residual_time,
        "bank_rate_at_end": readout.bank_rate_at_end,
        "bank_at_end_state": readout.bank_at_end_state,
        "warnings": list(readout.warnings),
    }


def respond_document(cases, labels, readouts=None, transfers=None, ratios=None) -> dict:
    """The ``latdyn respond --format json`` document (SI units, radians).

    ``{"latdyn_version", "cases": [{"aircraft", "file", "condition", "label",
    "response": {"input", "settings", "peaks", "dutch_roll_from_trace",
    "bank_angle_at_end", "time_at_end", "warnings"} or null,
    "transfer_functions": [{"output", "input", "gain", "zeros", "poles", ...}]
    or null, "bank_numerator_ratios": {"frequency", "damping"} or null,
    "warnings"}]}``.
    """
    from latdyn import __version__

    out = []
    for index, ((aircraft, condition), label) in enumerate(zip(cases, labels)):
        ratio = ratios[index] if ratios else None
        out.append({
            "aircraft": aircraft.name, "file": aircraft.file, "condition": condition.name,
            "label": label,
            "response": readouts[index] if readouts else None,
            "transfer_functions": ([t.as_dict() for t in transfers[index]] if transfers
                                   else None),
            "bank_numerator_ratios": None if ratio is None else {
                "frequency": ratio[0], "damping": ratio[1]},
            "warnings": list(aircraft.warnings)})
    return {"latdyn_version": __version__, "cases": out}


def _refuse_overflow(cases, responses, args):
    """One line for a run over which a strongly divergent model's response leaves the floating-point range."""
    from latdyn.errors import InputError
    from latdyn.responses import LARGEST_VALUE, overflow_time

    for (aircraft, condition), response in zip(cases, responses):
        at = overflow_time(response)
        if at is not None:
            option = "--duration" if args.duration is None else f"--duration {args.duration:g}"
            raise InputError(aircraft.file, option, f"a run over which the response stays a finite number (it "
                             f"grows without bound, beyond {LARGEST_VALUE:g} at {at:g} s on its way out of the "
                             "floating-point range: a divergent root; give a shorter --duration)",
                             f"a run to {response.time[-1]:g} s", condition.name)


def _rate_limited(aircraft, condition, model, history, limits, initial, label, args):
    """The rate-limited run, or one line naming what makes it too stiff to integrate."""
    from latdyn.augmentation import (MAX_RATE_LIMITED_STEPS, StiffRun, fastest_setting,
                                     simulate_rate_limited)
    from latdyn.errors import InputError

    try:
        return simulate_rate_limited(model, history, limits, initial, label)
    except StiffRun as error:
        setting = fastest_setting(condition.augmentation)
        expected = (f"a closed loop slow enough for the rate-limited simulation (at most "
                    f"{MAX_RATE_LIMITED_STEPS:,} integration steps over the run)")
        if setting is not None and 1.0 / setting[1] >= 0.1 * error.fastest:
            key = setting[0]
            raise InputError(aircraft.file, f"augmentation.{key}", expected,
                             f"{getattr(condition.augmentation, key):g} s: {error}",
                             condition.name) from None
        option = "--duration" if args.duration is None else f"--duration {args.duration:g}"
        raise InputError(aircraft.file, option, expected + "; give a shorter --duration", str(error),
                         condition.name) from None


def run(args):
    from latdyn.augmentation import condition_model
    from latdyn.inputs import InitialDisturbance, default_inputs
    from latdyn.results import condition_modes
    from latdyn.readouts import read_response
    from latdyn.responses import csv_text, simulate, write_csv

    from latdyn.output_files import Output, check_output_plan

    _sort_outputs(args)
    _check_angles(args)
    cases = _cases(args)
    labels = _labels(cases)
    csv_paths = case_csv_paths(args.csv, labels) if args.csv else []
    check_output_plan([*(Output(path, "--csv") for path in csv_paths), Output(args.plot, "--plot", "figure"),
                       Output(args.bode, "--bode", "figure")],
                      [kind for kind in args.inputs or () if os.path.isfile(kind)])  # input CSVs, read later
    models = [condition_model(aircraft, condition) for aircraft, condition in cases]
    modes = [condition_modes(aircraft, condition, model)
             for (aircraft, condition), model in zip(cases, models)]
    simulating = _simulation_wanted(args)
    responses, readouts, settings, sizing, limited = [], [], {}, {}, [None] * len(cases)
    if simulating:
        limited = []
        history, settings, sizing = _histories(args, default_inputs(modes[0]), models, modes)
        initial = InitialDisturbance(beta=math.radians(args.beta0_deg), p=math.radians(args.p0_deg_s),
                                     r=math.radians(args.r0_deg_s), phi=math.radians(args.phi0_deg))
        from latdyn.augmentation import actuator_rate_limits, simulate_rate_limited

        for (aircraft, condition), model, label in zip(cases, models, labels):
            limits = actuator_rate_limits(condition, model)
            if limits:
                run = _rate_limited(aircraft, condition, model, history, limits, initial, label, args)
                responses.append(run.response)
                limited.append(run)
            else:
                responses.append(simulate(model, history, initial, label=label))
                limited.append(None)
        _refuse_overflow(cases, responses, args)
        readouts = [read_response(response) for response in responses]
    want_transfers = args.transfer_functions or args.bode
    all_transfers, all_lines, all_ratios = [], [], []
    for model, mode_set in zip(models, modes):
        if want_transfers:
            transfer_lines, transfers, ratio = _transfer_lines(model, mode_set)
            all_transfers.append(transfers)
            all_lines.append(transfer_lines)
            all_ratios.append(ratio)

    if args.format == "json":
        import json

        documents = ([_readout_document(r, o, settings) for r, o in zip(responses, readouts)]
                     if simulating else None)
        text = json.dumps(respond_document(cases, labels, documents,
                                           all_transfers if args.transfer_functions else None,
                                           all_ratios if args.transfer_functions else None),
                          indent=2, allow_nan=False) + "\n"
    elif args.format == "csv":
        from dataclasses import replace

        from latdyn.report.blocks import Column
        from latdyn.report.render import render
        from latdyn.report.tables import transfer_table

        if simulating:
            from latdyn.text import printable

            text = "\n".join((f"# {printable(label)}\n" if len(labels) > 1 else "") + csv_text(response)
                             for label, response in zip(labels, responses))
        else:
            tables = [transfer_table(transfers) for transfers in all_transfers]
            rows = tuple(dict(row, case=label) for label, table in zip(labels, tables)
                         for row in table.rows)
            text = render(replace(tables[0], columns=(Column("case", "Case"), *tables[0].columns),
                                  rows=rows), "csv")
    else:
        lines = []
        for index, ((aircraft, _), label) in enumerate(zip(cases, labels)):
            if lines:
                lines.append("")
            if simulating:
                from latdyn.commands import display_units

                lines += _summary(label, aircraft, responses[index], readouts[index], modes[index],
                                  settings, sizing, display_units(args, aircraft))
            else:
                lines.append(f"{label}  ({aircraft.file})")
            model, run = models[index], limited[index]
            if getattr(model, "augmentation", None) is not None:
                from latdyn.augmentation import describe

                lines.append(f"  augmented: {describe(model.augmentation)}")
            if run is not None:
                reached = ", ".join(f"{s} {t:.2f} s" for s, t in run.limited_time.items()
                                    if t > 0) or "never"
                lines.append("  actuator rate limits active: nonlinear simulation (fourth-order "
                             f"Runge-Kutta, step {run.step:.3g} s); time on the limit: {reached}")
            if args.transfer_functions:
                lines += all_lines[index]
            for warning in aircraft.warnings:
                lines.append(f"  warning: {warning}")
        if args.format == "markdown":
            lines = [("## " + line) if line and not line.startswith(" ") else
                     ("- " + line.strip() if line.strip() else "") for line in lines]
        text = "\n".join(lines) + "\n"
    written = []
    if args.csv:
        for path, response in zip(csv_paths, responses):
            write_csv(path, response)
            written.append(path)
    if args.plot:
        from latdyn.plots import save_figure
        from latdyn.plots.responses import time_history_figure

        save_figure(time_history_figure(responses, readouts, modes, labels=labels), args.plot)
        written.append(args.plot)
    if args.bode:
        from latdyn.plots import save_figure
        from latdyn.plots.responses import bode_figure

        save_figure(bode_figure(all_transfers[0], modes[0],
                                title=labels[0] if len(labels) == 1 else f"{labels[0]} (first case)"),
                    args.bode)
        written.append(args.bode)
    sys.stdout.write(text)
    for path in written:
        print(f"wrote {path}", file=sys.stdout if args.format in ("table", "markdown")
              else sys.stderr)
    return 0
