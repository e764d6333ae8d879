"""The flight-test report of ``latdyn identify --report``: content and writing.

Content (pure data, like :mod:`latdyn.report.content`): the identification
in words, the identified derivatives beside the prediction, the fit per
channel, the measured responses against the identified model and the
prediction with the residuals (a figure specification), the modes of both
models, and the re-grading: the file's aircraft against the identified
variant (:func:`latdyn.compare.compare`), with the guidance-only notice.
The folder holds the identified variant aircraft file too, so the report
and the file it grades travel together.
"""

from __future__ import annotations

import os

from latdyn.report.blocks import Figure, Heading, Notice, Paragraph, Report
from latdyn.text import slug

__all__ = ["identification_content", "write_identification_report"]


def identification_content(aircraft, result, predicted_modes, identified_modes, comparison=None,
                           variant_file=None, units=None, command="latdyn identify") -> Report:
    """The blocks of the flight-test report.

    Parameters
    ----------
    aircraft : latdyn.aircraft.Aircraft
        The prediction.
    result : latdyn.identification.IdentificationResult
    predicted_modes, identified_modes : latdyn.modes.ModeSet
    comparison : latdyn.compare.Comparison, optional
        The file's aircraft against the identified variant.
    variant_file : str, optional
        The identified variant aircraft file (name shown).
    units : latdyn.display.UnitSystem, optional
    command : str
        The command line, for the provenance.

    Returns
    -------
    Report
    """
    from latdyn import __version__
    from latdyn.assessment import NOTICE
    from latdyn.compare import comparison_document
    from latdyn.display import unit_system
    from latdyn.report.analysis import generation_time
    from latdyn.report.tables import (comparison_tables, identification_fit_table,
                                      identified_derivative_table, identified_mode_table)

    units = units or unit_system(aircraft=aircraft)
    fit = result.fit
    name = slug(f"{result.condition}")
    records = ", ".join(os.path.basename(r.file) or "unnamed" for r in result.records)
    report = Report(title=f"Flight test: {aircraft.name}, condition {result.condition}",
                    generated=generation_time().isoformat())
    report.add(Heading(1, report.title, "top"), Notice(NOTICE),
               Paragraph(f"Derivatives identified from {len(result.records)} measured record(s) ({records}; "
                         f"{fit['samples']} samples) at condition \"{result.condition}\" of {aircraft.file}, "
                         f"by {fit['method']}: {fit['iterations']} iteration(s), "
                         + ("converged." if fit["converged"] else "NOT converged: treat with caution.")
                         + " Standard errors are Cramér-Rao bounds corrected for coloured residuals."))
    primary = result.nondimensional if result.nondimensional is not None else result.derivatives
    report.add(Heading(2, "Identified derivatives", "derivatives"),
               identified_derivative_table(primary, dimensional=result.nondimensional is None,
                                           name=f"{name}-derivatives", units=units))
    if result.nondimensional is not None:
        report.add(identified_derivative_table(
            result.derivatives, dimensional=True, name=f"{name}-dimensional", units=units,
            caption=f"Primed dimensional derivatives ({result.axes} axes, {units.name} units)"))
    if fit.get("max_correlation"):
        pair = fit["max_correlation"]
        report.add(Paragraph(f"Largest correlation between derivatives: {pair['value']:+.3f} "
                             f"({pair['between'][0]}, {pair['between'][1]})."))
    for note in result.notes:
        report.add(Paragraph(f"Note: {note}.", "warning"))
    report.add(Heading(2, "Measured and identified responses", "responses"),
               identification_fit_table(result, units, name=f"{name}-fit"),
               Figure(f"{name}-identification", "Measured responses (grey) against the identified model "
                      "(solid) and the file's prediction (dashed) from the same initial state, with the "
                      "residuals of the identified model as a fraction of each channel's range.",
                      kind="identification", arguments={"result": result}),
               Heading(2, "Modes", "modes"), identified_mode_table(predicted_modes, identified_modes,
                                                                   name=f"{name}-modes"))
    results = {"latdyn_version": __version__, "notice": NOTICE, "aircraft": aircraft.name,
               "file": aircraft.file, "condition": result.condition,
               "derivatives": {item.name: item.as_dict() for item in primary},
               "dimensional": {item.name: item.as_dict() for item in result.derivatives},
               "fit": dict(fit), "notes": list(result.notes),
               "modes": {"predicted": [m.as_dict() for m in predicted_modes],
                         "identified": [m.as_dict() for m in identified_modes]}}
    if comparison is not None:
        levels, inputs, figures = comparison_tables(comparison, f"{name}-regrading", units)
        report.add(Heading(2, "Re-graded with the identified derivatives", "regrading"),
                   Paragraph(f"The file's aircraft (base) against the identified variant "
                             f"({os.path.basename(variant_file) if variant_file else 'identified'}, in this "
                             f"folder). {NOTICE}", "small"),
                   levels, figures, inputs)
        results["comparison"] = comparison_document([comparison])
    report.add(Heading(2, "Provenance", "provenance"),
               Paragraph(f"latdyn {__version__}; {command}; run at {report.generated}."),
               Notice(NOTICE))
    report.results = results
    return report


def write_identification_report(output, aircraft, result, predicted_modes, identified_modes, force=False,
                                units=None, command="latdyn identify", inputs=()) -> str:
    """Write the flight-test report folder atomically, with the identified variant aircraft file.

    The folder holds ``index.html``, ``report.md``, ``tables/*.csv``,
    ``figures/*.png|svg``, ``results.json`` and ``<name>-identified.toml``
    (``<name>``: the aircraft file's name as a safe slug; it extends the
    original aircraft file, relative to the folder).

    Returns
    -------
    str
        The folder written.

    Raises
    ------
    latdyn.errors.InputError
        See :func:`latdyn.report.write.write_folder` (``inputs``: the
        measured records and any other input file of the run besides the
        aircraft's files).
    """
    from dataclasses import replace

    from latdyn.aircraft import load_aircraft
    from latdyn.compare import compare
    from latdyn.identification import write_variant
    from latdyn.report.write import write_files, write_folder

    variant_name = slug(os.path.splitext(os.path.basename(aircraft.file))[0], default="aircraft") \
        + "-identified.toml"
    final = os.path.normpath(os.fspath(output))

    def fill(temporary):
        # the temporary folder sits beside the final one: the same relative path to the original
        variant_path = os.path.join(temporary, variant_name)
        write_variant(aircraft, result, aircraft.file, variant_path, command)
        variant = load_aircraft(variant_path)
        comparison = replace(compare(aircraft, variant), variant_file=os.path.join(final, variant_name))
        report = identification_content(aircraft, result, predicted_modes, identified_modes, comparison,
                                        variant_name, units, command)
        write_files(report, temporary)

    return write_folder(final, fill, force, "--report", (*aircraft.files, *inputs))
