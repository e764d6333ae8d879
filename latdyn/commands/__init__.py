"""The commands of ``latdyn``, one module each (see :mod:`latdyn.cli`).

Shared steps of the study commands live here: reading what they all read
before any work, so that bad input stops them before anything is written.
"""

__all__ = ["load_study_inputs", "notice_csv"]


def load_study_inputs(args):
    """Check ``--plot``, load the aircraft and ``--criteria``, check ``--condition``.

    Returns
    -------
    (Aircraft, list of CriteriaSet or None)

    Raises
    ------
    latdyn.errors.InputError
        Bad output path, aircraft file, criteria set or condition name.
    """
    from latdyn.aircraft import load_aircraft
    from latdyn.criteria_sets import load_criteria

    if getattr(args, "plot", None):
        from latdyn.output_files import check_output_file

        check_output_file(args.plot, "--plot", figure=True)
    aircraft = load_aircraft(args.file)
    criteria = [load_criteria(name) for name in args.criteria] if args.criteria else None
    if args.condition:
        aircraft.condition(args.condition)
    return aircraft, criteria


def notice_csv() -> str:
    """The guidance-only notice as a one-column CSV block, for CSV outputs that show levels."""
    from latdyn.assessment import NOTICE
    from latdyn.report.blocks import Column, Table
    from latdyn.report.render import render_csv

    return render_csv(Table("notice", "", (Column("notice", "notice"),), ({"notice": NOTICE},)))
