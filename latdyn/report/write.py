"""Writing a report folder: analysis, content, figures and files, atomically.

The folder is built under a temporary name beside the destination and
renamed into place at the end, so a failure or an interruption part-way
leaves nothing half-written (:mod:`latdyn.output_folders`: the manifest
that marks a report folder, exclusive renames, ``--force`` for report
folders only).  Figures are drawn on their own ``matplotlib.figure.Figure``
objects and saved through their canvas: matplotlib's global state (the
pyplot backend, open figures) is left as it was.
"""

from __future__ import annotations

import json
import os
import sys

from latdyn.report.analysis import analyse_report
from latdyn.report.content import report_content
from latdyn.report.render import render_csv, render_html, render_markdown

__all__ = ["write_report", "write_files", "write_folder", "shows_level", "LEVEL_COLUMNS"]


def _progress(total, enabled):
    from tqdm import tqdm

    return tqdm(total=total, desc="latdyn report", unit="step", disable=not enabled, leave=False,
                file=sys.stderr)


def _write_text(path, text):
    from latdyn.output_files import atomic_output

    with atomic_output(path) as handle:
        handle.write(text)


def write_files(report, folder, step=None) -> None:
    """Draw the figures and write every file of a report into an existing (temporary) folder.

    Files: ``figures/<name>.png`` and ``.svg``, ``tables/<name>.csv``,
    ``report.md``, ``index.html`` and ``results.json``.
    """
    from latdyn.report.figures import draw_all

    figures = os.path.join(folder, "figures")
    os.makedirs(figures, exist_ok=True)
    draw_all(report.figures, figures, step)
    tables = os.path.join(folder, "tables")
    os.makedirs(tables, exist_ok=True)
    for table in report.tables:
        text = render_csv(table)
        if shows_level(table):
            from latdyn.assessment import NOTICE

            text = f"# {NOTICE}\n" + text
        _write_text(os.path.join(tables, table.name + ".csv"), text)
    _write_text(os.path.join(folder, "report.md"), render_markdown(report))
    _write_text(os.path.join(folder, "index.html"), render_html(report, folder))
    _write_text(os.path.join(folder, "results.json"),
                json.dumps(report.results, indent=2, allow_nan=False, sort_keys=False) + "\n")


#: Column keys of a table that shows a level or a verdict (its CSV carries the notice).
LEVEL_COLUMNS = ("result", "level", "verdict", "probabilities", "base_level", "variant_level")


def shows_level(table) -> bool:
    """True when a table shows a level, pass/fail or verdict (its CSV starts with the notice)."""
    return any(column.key in LEVEL_COLUMNS for column in table.columns) or "level" in table.name


def write_report(files, output, variants=(), criteria_sets=None, force=False, progress=None,
                 argv=None, units=None, document=None, gust=None) -> str:
    """Analyse aircraft files and write their report folder atomically.

    Parameters
    ----------
    files : sequence of str
        Aircraft files analysed in full; the first is the base of the comparison.
    output : str
        The report folder to create.
    variants : sequence of str
        Variant files compared with the first file.
    criteria_sets : sequence of str, optional
        Criteria set names or files; default per aircraft.
    force : bool
        Replace an existing folder.
    progress : bool, optional
        Show a progress bar on stderr (default: when stderr is a terminal).
    argv : sequence of str, optional
        The command line, recorded in the provenance.
    units : latdyn.display.UnitSystem, optional
        Display units of the tables (default: those of the first file).
    document : dict, optional
        The document block (title, number, revision, date, prepared, checked,
        approved; :data:`latdyn.report.content.DOCUMENT_FIELDS`).
    gust : latdyn.turbulence.Gust, optional
        Turbulence for the RMS tables of the augmented conditions.

    Returns
    -------
    str
        The folder written.

    Raises
    ------
    InputError
        Bad input, or ``output`` exists and ``force`` is not set (or is not
        a report folder, or holds an input file).
    """
    inputs = [*files, *variants, *(name for name in criteria_sets or () if os.path.isfile(name))]
    if progress is None:
        progress = sys.stderr.isatty()
    bar = _progress(None, progress)

    def fill(temporary):
        data = analyse_report(files, variants, criteria_sets, argv=argv, step=lambda: bar.update(1), gust=gust)
        report = report_content(data, units, document)
        bar.total = data.condition_count + len(report.figures)
        bar.refresh()
        write_files(report, temporary, step=lambda: bar.update(1))

    try:
        return write_folder(output, fill, force, inputs=inputs)
    finally:
        bar.close()


def write_folder(output, fill, force=False, option="-o", inputs=()) -> str:
    """Write a report folder atomically: ``fill(temporary)`` writes into a temporary folder
    beside ``output``, which is put in place only when ``fill`` returns.

    The folder gets its manifest (:data:`latdyn.output_folders.MARKER`);
    ``force`` replaces only a latdyn report folder, never one holding an
    input of the run, and never a folder that appeared during the run unless
    it is a report (:func:`latdyn.output_folders.atomic_folder`).

    Parameters
    ----------
    output : str
        The folder to create.
    fill : callable
        Writes every file into the (existing, empty) folder it is given.
    force : bool
        Replace an existing report folder.
    option : str
        The command-line option that named the folder, for the messages.
    inputs : iterable of str
        Input files known before the run (those read by ``fill`` are added).

    Returns
    -------
    str
        The folder written.

    Raises
    ------
    InputError
        ``output`` exists and ``force`` is not set (or it is not a report
        folder, or holds an input), cannot be created or written; and
        whatever ``fill`` raises (nothing is left behind then).
    """
    from latdyn.output_folders import atomic_folder

    output = os.path.normpath(os.fspath(output))
    with atomic_folder(output, force, option, inputs) as temporary:
        fill(temporary)
    return output
