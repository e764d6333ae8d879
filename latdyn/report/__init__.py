"""Reports: from aircraft files to a document a chief engineer can sign.

Three stages, one module each (see DEVELOPERS.md):

* **content** — :mod:`~latdyn.report.analysis` runs the library on the input
  files (:func:`analyse_report`); :mod:`~latdyn.report.content` turns the
  results into blocks (:func:`report_content`): headings, paragraphs, the
  tables of :mod:`~latdyn.report.tables` (one function per table, raw
  values) and figure specifications.  Pure data: no matplotlib, no files.
* **rendering** — :mod:`~latdyn.report.render`: terminal text, Markdown,
  CSV, HTML (style sheet ``report.css``, package data) and JSON.
* **writing** — :mod:`~latdyn.report.write`: draws the figures
  (:mod:`~latdyn.report.figures`) and writes the folder atomically, with
  progress (:func:`write_report`).

The command line's text outputs use the same tables and renderers.
"""

from latdyn.report.analysis import ReportData, analyse_report, sha256_of
from latdyn.report.blocks import Absent, Column, Figure, Heading, Notice, Paragraph, Report, Table
from latdyn.report.content import report_content, results_document
from latdyn.report.render import render, render_csv, render_html, render_markdown, render_text
from latdyn.report.write import write_report

__all__ = [
    "Absent", "Column", "Table", "Heading", "Paragraph", "Notice", "Figure", "Report", "ReportData",
    "analyse_report", "report_content", "build_report", "write_report", "render", "render_text",
    "render_csv", "render_html", "render_markdown", "results_document", "sha256_of",
]


def build_report(files, variants=(), criteria_sets=None, now=None, argv=None, units=None,
                 document=None) -> Report:
    """The content of the report of aircraft files: :func:`analyse_report` then :func:`report_content`.

    No matplotlib and nothing written.
    """
    data = analyse_report(files, variants, criteria_sets, now=now, argv=argv)
    return report_content(data, units, document)
