"""``latdyn turbulence FILE --sigma-v S --scale-length L [--condition NAME]
[--format table|markdown|csv|json] [--units SI|US] [-o OUT] [--csv OUT --duration T --dt DT
--seed N]``: RMS response to Dryden lateral turbulence (the gust typed in the file's units, m/s
and m or ft/s and ft, shown in the display units).

All the work is done by latdyn.turbulence (and latdyn.augmentation for an augmented aircraft);
this module checks the options, prints and writes.
"""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]

_COMMAND_LINE = "command line"


def add_arguments(parser):
    from latdyn.commands import file_unit_help

    speed, length = file_unit_help("speed"), file_unit_help("length")
    parser.add_argument("file", metavar="FILE", help="aircraft file (TOML)")
    parser.add_argument("--sigma-v", type=float, required=True, metavar="S",
                        help=f"RMS lateral gust velocity sigma_v {speed}")
    parser.add_argument("--scale-length", type=float, required=True, metavar="L",
                        help=f"lateral scale length L_v {length}")
    parser.add_argument("--sigma-w", type=float, metavar="S",
                        help=f"RMS vertical gust velocity for the roll-rate gust {speed} (default sigma_v)")
    parser.add_argument("--scale-length-w", type=float, metavar="L",
                        help=f"vertical scale length for the roll-rate gust {length} (default L_v)")
    parser.add_argument("--no-rotary", action="store_true", help="leave out the roll- and yaw-rate gusts")
    parser.add_argument("--condition", metavar="NAME", help="only this flight condition")
    from latdyn.commands import add_format, add_units

    add_format(parser)
    add_units(parser, "those of the file")
    parser.add_argument("-o", "--output", "--plot", dest="plot", metavar="OUT",
                        help="write the output spectra (.png, .pdf, .svg; --plot is the older name)")
    parser.add_argument("--csv", metavar="OUT",
                        help="write a seeded time history (one file per condition when several)")
    parser.add_argument("--duration", type=float, default=120.0, metavar="T",
                        help="length of the time history [s] (default 120)")
    parser.add_argument("--dt", type=float, default=0.02, metavar="DT", help="time step [s] (default 0.02)")
    parser.add_argument("--seed", type=int, default=1, metavar="N", help="random seed (default 1)")


def run(args):
    from latdyn import __version__
    from latdyn.aircraft import load_aircraft
    from latdyn.augmentation import AugmentedModel, condition_model
    from latdyn.errors import InputError
    from latdyn.report.render import escape_markdown, render
    from latdyn.report.tables import turbulence_table
    from latdyn.results import condition_turbulence
    from latdyn.turbulence import Gust

    from latdyn.commands import positive_option

    for value, option, dimension in ((args.sigma_v, "--sigma-v", "speed"), (args.scale_length, "--scale-length", "length"),
                                     (args.sigma_w, "--sigma-w", "speed"), (args.scale_length_w, "--scale-length-w", "length"),
                                     (args.duration, "--duration", "time"), (args.dt, "--dt", "time")):
        positive_option(value, option, dimension)
    if args.dt >= args.duration:
        raise InputError(_COMMAND_LINE, "--dt", f"a step smaller than the duration ({args.duration:g} s)",
                         f"{args.dt:g} s")
    if args.duration / args.dt > 2_000_000:
        raise InputError(_COMMAND_LINE, "--dt", "at most 2000000 samples", f"{args.duration / args.dt:.3g}")
    from latdyn.commands.respond import case_csv_paths
    from latdyn.output_files import Output, check_output_plan

    aircraft = load_aircraft(args.file)
    if aircraft.geometry is None:
        raise InputError(aircraft.file, "geometry.span", "a [geometry] span (the rotary gusts need it)",
                         "no [geometry] block")
    chosen = (aircraft.condition(args.condition),) if args.condition else aircraft.conditions
    paths = case_csv_paths(args.csv, [c.name for c in chosen]) if args.csv else []
    check_output_plan([*(Output(path, "--csv") for path in paths), Output(args.plot, "--plot", "figure")])
    from latdyn.commands import option_to_si

    # the gust is typed in the file's units (as --vary is), computed in SI
    gust = Gust(*(option_to_si(value, dimension, aircraft.units) for value, dimension in (
        (args.sigma_v, "speed"), (args.scale_length, "length"), (args.sigma_w, "speed"),
        (args.scale_length_w, "length"))), not args.no_rotary)
    span = aircraft.geometry.span
    entries, documents, primary = [], [], []
    for condition in chosen:
        model = condition_model(aircraft, condition)
        result = condition_turbulence(aircraft, condition, model, gust, span)
        primary.append(result)
        document = {"name": condition.name, "turbulence": result.as_dict(),
                    "turbulence_notes": result.notes()}
        if isinstance(model, AugmentedModel):
            bare = condition_turbulence(aircraft, condition, model.bare, gust, span)
            entries += [(condition.name, "augmented", result), (condition.name, "bare airframe", bare)]
            document["bare"] = {"turbulence": bare.as_dict(), "turbulence_notes": bare.notes()}
        else:
            entries.append((condition.name, "bare airframe", result))
        documents.append(document)
    written = []
    if args.csv:
        for path, result in zip(paths, primary):
            _write_history(path, result, args, aircraft.units)
            written.append(path)
    if args.plot:
        from latdyn.plots import save_figure
        from latdyn.plots.turbulence import spectra_figure

        save_figure(spectra_figure(entries, title=aircraft.name), args.plot)
        written.append(args.plot)
    if args.format == "json":
        payload = {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
                   "conditions": documents}
        sys.stdout.write(json.dumps(payload, indent=2, allow_nan=False) + "\n")
    elif args.format == "csv":
        sys.stdout.write(render(turbulence_table(entries), "csv"))
        for path in written:
            print(f"wrote {path}", file=sys.stderr)
    else:
        from latdyn.commands import display_units
        from latdyn.display import format_number

        units = display_units(args, aircraft)

        def shown(value, quantity):
            return f"{format_number(units.convert(value, quantity))} {units.label(quantity)}"

        lines = [f"{aircraft.name}  ({aircraft.file})",
                 f"Dryden lateral turbulence (MIL-F-8785C 3.7.1.2): sigma_v {shown(gust.sigma_v, 'speed')}, "
                 f"L_v {shown(gust.scale_length, 'length')}"
                 + ("" if args.no_rotary else "; with roll- and yaw-rate gusts (forms from memory), "
                    f"sigma_w {shown(gust.sigma_w or gust.sigma_v, 'speed')}, "
                    f"L_w {shown(gust.scale_length_w or gust.scale_length, 'length')}"),
                 "RMS from the stationary covariance (Lyapunov); a neutral or divergent mode (usually the "
                 "spiral) is left out and named: the pilot holds the bank against it.",
                 render(turbulence_table(entries), args.format)]
        if args.format == "markdown":
            words = ["## " + escape_markdown(lines[0])] + [escape_markdown(line) for line in lines[1:-1]]
            lines = ["\n\n".join(words + [lines[-1]])]
        lines += [f"wrote {path}" for path in written]
        sys.stdout.write("\n".join(lines) + "\n")
    return 0


def _write_history(path, result, args, units):
    """The seeded time history; its first line names the gust as typed (the file's ``units``)."""
    import numpy as np

    from latdyn.output_files import atomic_output
    from latdyn.turbulence import DEGREES, RMS_OUTPUTS, time_history
    from latdyn.units import unit_word

    time, outputs = time_history(result.system, args.duration, args.dt, args.seed)
    names = {"beta": "beta_deg", "p": "p_deg_s", "r": "r_deg_s", "phi": "phi_deg", "ny": "ny_g"}
    factors = np.array([DEGREES[k] for k in RMS_OUTPUTS])
    with atomic_output(path, text=True) as handle:
        handle.write(f"# seeded turbulence time history, seed {args.seed}, sigma_v {args.sigma_v:g} "
                     f"{unit_word('speed', units)}, L_v {args.scale_length:g} {unit_word('length', units)}\n")
        handle.write("time," + ",".join(names[k] for k in RMS_OUTPUTS) + "\n")
        for t, row in zip(time, outputs * factors):
            handle.write(f"{t:.6g}," + ",".join(f"{v:.8g}" for v in row) + "\n")
