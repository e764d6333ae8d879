"""Notebook display: the HTML that Jupyter shows for a result object (``_repr_html_``).

The tables are the report's own (:mod:`latdyn.report.tables`, rendered by
:func:`latdyn.report.render.render_html_table`): a notebook shows the same
columns, words and digits as the terminal and the report.  Anything that
shows a level carries the guidance-only notice.  The result classes call
these functions from their ``_repr_html_`` methods, importing this module
only then (the one place the library reaches into the report layer; see the
layering contract in ``tests/test_report_structure.py``).

No matplotlib here and nothing written.
"""

from __future__ import annotations

import html
import warnings
from dataclasses import replace

from latdyn.report.render import render_html_table

__all__ = ["MAX_ROWS", "modes_html", "assessment_html", "response_html", "sweep_html",
           "uncertainty_html"]

#: Rows shown of a long table (the rest: ``to_pandas()``).
MAX_ROWS = 30


def _notice():
    from latdyn.assessment import NOTICE

    return f"<p><strong>{html.escape(NOTICE)}</strong></p>"


def _line(text):
    return f"<p>{html.escape(text)}</p>"


def _table(table):
    shown = table
    if len(table.rows) > MAX_ROWS:
        shown = replace(table, rows=table.rows[:MAX_ROWS],
                        emphasis=tuple(i for i in table.emphasis if i < MAX_ROWS))
    out = render_html_table(shown)
    if shown is not table:
        out += _line(f"... {len(table.rows) - MAX_ROWS} more rows of {len(table.rows)}: "
                     "to_pandas() gives them all.")
    return out


def _join(*parts):
    return "<div>\n" + "\n".join(parts) + "\n</div>"


def modes_html(modes) -> str:
    """A :class:`~latdyn.modes.ModeSet` (or one :class:`~latdyn.modes.Mode`): the mode table."""
    from latdyn.report.tables import MODE_TEXT_VIEW, mode_table

    pattern = getattr(modes, "pattern", None)
    if pattern is None:  # one Mode
        modes = (modes,)
    caption = "Modes" + (f" ({pattern})" if pattern else "")
    return _join(_table(mode_table(modes, caption=caption).select(MODE_TEXT_VIEW)))


def assessment_html(assessment) -> str:
    """An aircraft's, a condition's or one assessment: the notice, the table and its sources."""
    from latdyn.assessment import AircraftAssessment, Assessment, ConditionAssessment
    from latdyn.report.tables import ASSESSMENT_TEXT_VIEW, assessment_sources, assessment_table

    if isinstance(assessment, Assessment):
        assessment = ConditionAssessment("", None, None, None, None, (assessment,))
    if isinstance(assessment, ConditionAssessment):
        assessment = AircraftAssessment("", None, assessment.airplane_class, (), (assessment,))
    view = ASSESSMENT_TEXT_VIEW if len(assessment.conditions) > 1 or assessment.conditions[0].name \
        else tuple(k for k in ASSESSMENT_TEXT_VIEW if k not in ("condition", "category"))
    parts = [_notice()]
    if assessment.aircraft:
        parts.append(_line(assessment.aircraft))
    parts.append(_table(assessment_table(assessment).select(view)))
    sources = assessment_sources(assessment)
    if sources:
        parts.append("<ol>" + "".join(f"<li>{html.escape(s)}</li>" for s in sources) + "</ol>")
    return _join(*parts)


def response_html(response) -> str:
    """A :class:`~latdyn.responses.Response`: what it is and its read-outs (peaks, log decrement)."""
    from latdyn.modes import ModeSet
    from latdyn.readouts import read_response
    from latdyn.report.tables import readout_table

    with warnings.catch_warnings():  # shown below as text: no warning each time it is displayed
        warnings.simplefilter("ignore")
        readouts = read_response(response)
    kind = response.description or "response"
    parts = [_line(f"{response.label + ': ' if response.label else ''}{kind}; t = 0 to "
                   f"{float(response.time[-1]):.4g} s, {len(response.time)} samples "
                   "(to_pandas() for the time history)")]
    parts.append(_table(readout_table([(kind, readouts)], ModeSet((), ""))))
    parts += [f'<p class="warning">warning: {html.escape(w)}</p>' for w in readouts.warnings]
    return _join(*parts)


def sweep_html(result) -> str:
    """A :class:`~latdyn.studies.sweep.SweepResult`: the notice, the grid and the crossings."""
    from latdyn.report.tables import sweep_table

    units = {axis.key.text: axis.key.unit for axis in result.axes}
    crossings = [html.escape(c.words(units.get(c.parameter, ""), units)) for c in result.crossings]
    parts = [_notice(), _line(result.aircraft.name), _table(sweep_table(result))]
    parts.append("<p>Level-boundary crossings (root-found on the margin):</p><ul>"
                 + "".join(f"<li>{c}</li>" for c in crossings) + "</ul>" if crossings
                 else _line("No level-boundary crossing in the swept range."))
    return _join(*parts)


def uncertainty_html(result) -> str:
    """An :class:`~latdyn.studies.uncertainty.UncertaintyResult`: the notice, the uncertainties
    sampled (in the file's units) and the result tables."""
    from latdyn.report.tables import uncertainty_inputs_table, uncertainty_tables

    levels, figures = uncertainty_tables(result)
    inputs = uncertainty_inputs_table(result, result.aircraft.units)
    return _join(_notice(), _line(f"{result.aircraft.name}: {result.samples} samples per condition, "
                                  f"seed {result.seed}"), _table(inputs), _table(levels), _table(figures))
