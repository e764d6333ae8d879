"""The commands of ``latdyn``, one module each (see :mod:`latdyn.cli`).

Shared here: the options every command spells the same way, and the steps
the study commands share (reading what they all read before any work, so
that bad input stops them before anything is written).

Command-line conventions (every command follows them; see DEVELOPERS.md):

* options may stand before, between or after the positional files; ``--`` ends them;
* an option that takes several values is repeated (``--criteria A
  --criteria B``; commas also separate criteria names), and takes one value
  each time, so it never swallows a file;
* ``--format table|markdown|csv|json`` on every command that prints results
  (JSON in SI units and radians);
* ``--units SI|US`` on every command that prints dimensional values: text,
  Markdown and CSV in that unit system, by default the one each aircraft
  file is written in (JSON stays SI);
* a number with a dimension given as an option (``--vary``, ``--sigma-v``, ...) is read in
  the unit system of the aircraft file (m or ft, m/s or ft/s; angles in degrees, times in
  seconds in both), and its help says so (:func:`file_unit_help`);
* ``-o/--output`` on every command that writes a file or folder (older
  option names stay as aliases);
* bad input: one line on stderr and exit status 2; ``--fail-below LEVEL``
  (assess, compare) exits 1 when a check is (or drops) below the level.
"""

__all__ = ["positive_option", "load_study_inputs", "notice_csv", "FORMATS", "add_format", "add_criteria",
           "criteria_names", "add_fail_below", "report_below", "add_units", "display_units",
           "file_unit_help", "option_to_si"]

def positive_option(value, option, dimension="none"):
    """Refuse a number given on the command line that is not > 0 or lies beyond the plausible range.

    The range is that of a file's number of the same dimension
    (:func:`latdyn.aircraft_file.plausible_range`, SI): ``--sigma-v 1e300``
    is one line, not an overflow deep in the solver.  None (not given) passes.

    >>> positive_option(1e300, "--sigma-v", "speed")
    Traceback (most recent call last):
    ...
    latdyn.errors.InputError: command line: --sigma-v: expected a number > 0 and at most 1e+06, found 1e+300
    """
    import math

    from latdyn.aircraft_file import plausible_range
    from latdyn.errors import InputError

    if value is None:
        return
    least, largest = plausible_range(dimension)
    if not math.isfinite(value) or value <= 0:
        raise InputError("command line", option, "a number > 0", repr(value))
    if value > largest:
        raise InputError("command line", option, f"a number > 0 and at most {largest:g}", f"{value:g}")


#: Output formats of the commands that print results.
FORMATS = ("table", "markdown", "csv", "json")

_CRITERIA_HELP = ("criteria set: a built-in name (mil-f-8785c, mil-f-8785b, 14cfr23-181, "
                  "14cfr23-181-pre2011, 14cfr25-181) or a criteria file; repeat the option "
                  "(or separate names by commas) for several; default mil-f-8785c with an "
                  "airplane_class, else 14cfr23-181 and 14cfr25-181")


def add_format(parser, formats=FORMATS, extra=""):
    """``--format`` with the given choices (default table)."""
    parser.add_argument("--format", choices=formats, default="table",
                        help="output format: " + ", ".join(formats) + " (default table; json in "
                             "SI units and radians)" + extra)


def add_units(parser, default="those of each file"):
    """``--units SI|US``: the display units of text, Markdown and CSV (JSON stays SI)."""
    parser.add_argument("--units", choices=("SI", "US"),
                        help=f"display units of the text, Markdown and CSV outputs (default: "
                             f"{default}; JSON stays SI)")


def display_units(args, aircraft=None):
    """The :class:`latdyn.display.UnitSystem` of ``--units``, else the aircraft file's.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> display_units(SimpleNamespace(units="US")).name, display_units(SimpleNamespace(units=None)).name
    ('US', 'SI')
    """
    from latdyn.display import unit_system

    return unit_system(getattr(args, "units", None), aircraft)


def file_unit_help(dimension) -> str:
    """The unit of an option read in the file's units, for its help: both systems.

    Examples
    --------
    >>> file_unit_help("speed")
    '[m/s in an SI file, ft/s in a US file]'
    """
    from latdyn.units import unit_word

    return f"[{unit_word(dimension, 'SI')} in an SI file, {unit_word(dimension, 'US')} in a US file]"


def option_to_si(value, dimension, units):
    """An option's value, typed in the file's unit system ``units`` ("SI" or "US"), in SI (None
    stays None).

    Examples
    --------
    >>> option_to_si(10.0, "length", "US")
    3.048
    """
    from latdyn.units import to_si

    return None if value is None else float(to_si(value, dimension, units))


def add_criteria(parser):
    """``--criteria SET``, repeatable; one value each time."""
    parser.add_argument("--criteria", action="append", metavar="SET", help=_CRITERIA_HELP)


def criteria_names(args):
    """The criteria names given (commas split), or None for the default sets.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> criteria_names(SimpleNamespace(criteria=["mil-f-8785c,14cfr23-181", "my.toml"]))
    ['mil-f-8785c', '14cfr23-181', 'my.toml']
    >>> criteria_names(SimpleNamespace(criteria=None)) is None
    True
    """
    if not args.criteria:
        return None
    names = [name.strip() for item in args.criteria for name in item.split(",")]
    return [name for name in names if name] or None


def add_fail_below(parser, what):
    """``--fail-below LEVEL`` (1, 2 or 3)."""
    parser.add_argument("--fail-below", type=int, choices=(1, 2, 3), metavar="LEVEL",
                        help=f"exit with status 1 when {what} below Level LEVEL (1, 2 or 3; a "
                             "failed pass/fail check counts as below any level); the output is "
                             "printed first")


def report_below(found, threshold, verb="is"):
    """Print one line per check below the level on stderr; 1 if any, else 0."""
    import sys

    from latdyn.assessment import level_words

    for name, condition, item in found:
        level = getattr(item, "variant_level", getattr(item, "level", None))
        passed = getattr(item, "variant_pass", getattr(item, "passed", None))
        print(f'latdyn: {name} / "{condition}": {item.mode} under {item.criteria} {verb} '
              f"{level_words(level, passed)}, below Level {threshold} (--fail-below {threshold})",
              file=sys.stderr)
    return 1 if found else 0


def load_study_inputs(args, figures=None):
    """Load the aircraft and ``--criteria``, check ``--condition``, then check the figures ``--plot``
    will write (:func:`latdyn.output_files.check_output_plan`) before any work.

    Parameters
    ----------
    args : argparse.Namespace
    figures : callable, optional
        ``figures(path)``: every file the command writes for ``--plot PATH``
        (companions included); default ``[path]``.

    Returns
    -------
    (Aircraft, list of CriteriaSet or None)

    Raises
    ------
    latdyn.errors.InputError
        Bad aircraft file, criteria set or condition name; an output that
        could not be written or is one of the files read.
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.criteria_sets import load_criteria
    from latdyn.output_files import Output, check_output_plan

    aircraft = load_aircraft(args.file)
    names = criteria_names(args)
    criteria = [load_criteria(name) for name in names] if names else None
    if args.condition:
        aircraft.condition(args.condition)
    if getattr(args, "plot", None):
        paths = figures(args.plot) if figures else [args.plot]
        check_output_plan([Output(path, "--plot", "figure") for path in paths])
    return aircraft, criteria


def notice_csv() -> str:
    """The guidance-only notice as a one-column CSV block, for CSV outputs that show levels."""
    from latdyn.assessment import NOTICE
    from latdyn.report.blocks import Column, Table
    from latdyn.report.render import render_csv

    return render_csv(Table("notice", "", (Column("notice", "notice"),), ({"notice": NOTICE},)))
