"""Writing a report folder: analysis, content, figures and files, atomically.

The folder is built under a temporary name beside the destination and
renamed into place at the end, so a failure part-way leaves nothing
half-written.  Figures are drawn on their own ``matplotlib.figure.Figure``
objects and saved through their canvas: matplotlib's global state (the
pyplot backend, open figures) is left as it was.
"""

from __future__ import annotations

import contextlib
import json
import os
import shutil
import sys
import tempfile

from latdyn.errors import InputError
from latdyn.report.analysis import analyse_report
from latdyn.report.content import report_content
from latdyn.report.render import render_csv, render_html, render_markdown

__all__ = ["write_report", "write_files", "write_folder", "shows_level", "LEVEL_COLUMNS"]


def _progress(total, enabled):
    from tqdm import tqdm

    return tqdm(total=total, desc="latdyn report", unit="step", disable=not enabled, leave=False,
                file=sys.stderr)


def _write_text(path, text):
    with open(path, "w", encoding="utf-8", newline="\n") as handle:
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
        Bad input, or ``output`` exists and ``force`` is not set.
    """
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
        return write_folder(output, fill, force)
    finally:
        bar.close()


def write_folder(output, fill, force=False) -> str:
    """Write a report folder atomically: ``fill(temporary)`` writes into a temporary folder
    beside ``output``, which is renamed into place only when ``fill`` returns.

    Parameters
    ----------
    output : str
        The folder to create.
    fill : callable
        Writes every file into the (existing, empty) folder it is given.
    force : bool
        Replace an existing folder.

    Returns
    -------
    str
        The folder written.

    Raises
    ------
    InputError
        ``output`` exists and ``force`` is not set, or cannot be created; and
        whatever ``fill`` raises (nothing is left behind then).
    """
    output = os.path.normpath(os.fspath(output))
    if os.path.exists(output) and not force:
        raise InputError(output, "-o", "a report folder that does not exist yet (or --force to replace it)",
                         "an existing " + ("folder" if os.path.isdir(output) else "file"))
    parent = os.path.dirname(os.path.abspath(output))
    created = []  # parent folders made here, deepest first: removed again if the report fails
    folder = parent
    while not os.path.exists(folder):
        created.append(folder)
        folder = os.path.dirname(folder)

    def remove_created():
        for made in created:
            with contextlib.suppress(OSError):
                os.rmdir(made)

    try:
        os.makedirs(parent, exist_ok=True)
        temporary = tempfile.mkdtemp(prefix="." + os.path.basename(output) + ".", dir=parent)
    except OSError as error:
        remove_created()
        raise InputError(output, "-o", "a report folder in a writable place",
                         error.strerror or str(error)) from None
    try:
        fill(temporary)
        os.chmod(temporary, 0o755)
        if os.path.exists(output):
            old = tempfile.mkdtemp(prefix="." + os.path.basename(output) + ".old.", dir=parent)
            os.replace(output, os.path.join(old, "previous"))
            os.replace(temporary, output)
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(temporary, output)
    except BaseException:
        shutil.rmtree(temporary, ignore_errors=True)
        remove_created()
        raise
    return output
