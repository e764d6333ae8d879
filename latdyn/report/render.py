"""Renderers: tables and reports as terminal text, Markdown, CSV, HTML and JSON.

They only format: every value comes from a table built by
:mod:`latdyn.report.tables` (rows of raw values) and every number passes
through the one formatter :func:`latdyn.display.format_number` with the
digits its :class:`~latdyn.report.blocks.Column` asks for.  Text is escaped
for the format it goes into (Markdown headings and cells alike; HTML).
"""

from __future__ import annotations

import base64
import csv
import html
import io
import math
import numbers
import os
import re
from functools import lru_cache

from latdyn.display import DASH, format_number, format_root
from latdyn.report.blocks import Absent, Figure, Heading, Notice, Paragraph, Table
from latdyn.text import printable, spreadsheet_cell

__all__ = ["KEEP_ROWS", "page_style", "cell_text", "render_text", "render_markdown_table", "render_csv", "render_html_table",
           "table_records", "render", "escape_markdown", "render_markdown", "render_html", "css"]


# ------------------------------------------------------------------ cells

def _matches(value, raw):
    if isinstance(raw, bool) or raw is None:
        return value is raw
    return not isinstance(value, bool) and value == raw


def cell_text(value, column=None) -> str:
    """The display text of a raw value in a column.

    Examples
    --------
    >>> from latdyn.report.blocks import Column
    >>> cell_text(0.0038, Column("margin", "Margin", signed=True)), cell_text(None), cell_text(Absent("convergent"))
    ('+0.003800', '-', 'convergent')
    >>> cell_text((complex(-0.2, 1.4),)), cell_text(3)
    ('-0.2000 ± 1.400j', '3')
    """
    if column is not None:
        for raw, words in column.words:
            if _matches(value, raw):
                return words
    digits = column.digits if column is not None else 4
    if value is None:
        return DASH
    if isinstance(value, Absent):
        return value.reason
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    if isinstance(value, complex):
        return format_root(value, digits)
    if isinstance(value, (tuple, list)):
        return ", ".join(cell_text(v, column) for v in value)
    if isinstance(value, numbers.Integral):
        return f"{int(value):+d}" if column is not None and column.signed else str(int(value))
    if isinstance(value, numbers.Real):
        if column is None:
            return format_number(value, digits)
        return format_number(value, digits, style=column.style, signed=column.signed)
    return str(value)


def _is_number(value):
    return isinstance(value, numbers.Real) and not isinstance(value, bool)


# ------------------------------------------------------------------ plain text

def render_text(table: Table) -> str:
    """Plain-text table with aligned columns (the terminal); control characters in a name
    (an escape sequence, a line break) shown escaped (:func:`latdyn.text.printable`)."""
    headings = [printable(c.heading) for c in table.columns]
    cells = [[printable(cell_text(row.get(c.key), c)) for c in table.columns] for row in table.rows]
    widths = [max(len(h), *(len(c[i]) for c in cells)) if cells else len(h)
              for i, h in enumerate(headings)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(headings, widths)).rstrip(),
             "  ".join("-" * w for w in widths)]
    for row in cells:
        lines.append("  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())
    return "\n".join(lines)


# ------------------------------------------------------------------ Markdown

_MD_ALWAYS = re.compile(r"([\\`*~<|$])")
_MD_UNDERSCORE = re.compile(r"(?<![A-Za-z0-9])_|_(?![A-Za-z0-9])")
_MD_LINK = re.compile(r"(!?)\[(?=[^\]]*\][(\[:])")
_MD_ENTITY = re.compile(r"&(?=#?[A-Za-z0-9]+;)")
_MD_LINE_START = re.compile(r"^(\s*)(#{1,6}(?=\s|$)|>|[-+](?=\s|$)|-(?=[-\s]*$))")
_MD_ORDERED = re.compile(r"^(\s*\d{1,9})([.)])(?=\s|$)")


def escape_markdown(text, block=True) -> str:
    """Text that Markdown (CommonMark with tables) shows as written.

    Backslash-escapes what would make markup: a backslash or a backtick, ``*``, ``~``, ``<``, ``|``,
    ``$`` (math in renderers that typeset it), an
    underscore that could open or close emphasis (not one inside a word such
    as ``omega_n``), a ``[`` that would open a link, an ``&`` that would make
    an entity, and, with ``block`` (text that starts a line: headings,
    paragraphs, list items, not table cells), a block marker at the start
    (``#``, ``>``, and ``-`` or ``1.`` before a space); line breaks become spaces and other
    control characters are shown escaped (``\\x1b``: :func:`latdyn.text.printable`).

    Examples
    --------
    >>> escape_markdown("|phi/beta| [-]"), escape_markdown("zeta_d*omega_nd [rad/s]")
    ('\\\\|phi/beta\\\\| [-]', 'zeta_d\\\\*omega_nd [rad/s]')
    >>> escape_markdown("# [x](y) _a_"), escape_markdown("-0.25"), escape_markdown("1. x")
    ('\\\\# \\\\[x](y) \\\\_a\\\\_', '-0.25', '1\\\\. x')
    """
    text = printable(" ".join(str(text).splitlines()))
    text = _MD_ALWAYS.sub(r"\\\1", text)
    text = _MD_UNDERSCORE.sub(r"\\_", text)
    text = _MD_LINK.sub(r"\1\\[", text)
    text = _MD_ENTITY.sub(r"\\&", text)
    if block:
        text = _MD_ORDERED.sub(r"\1\\\2", _MD_LINE_START.sub(r"\1\\\2", text))
    return text


def render_markdown_table(table: Table) -> str:
    """A Markdown (pipe) table; headings and cells escaped, emphasised rows in bold."""
    lines = ["| " + " | ".join(escape_markdown(c.heading, False) for c in table.columns) + " |",
             "|" + "|".join("---" for _ in table.columns) + "|"]
    for index, row in enumerate(table.rows):
        cells = [escape_markdown(cell_text(row.get(c.key), c), False) for c in table.columns]
        if index in table.emphasis:
            cells = [f"**{cell}**" if cell else cell for cell in cells]
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines)


# ------------------------------------------------------------------ CSV

def _raw_csv(value) -> str:
    if value is None or isinstance(value, Absent):
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, numbers.Integral):
        return str(int(value))
    if isinstance(value, float):
        return repr(float(value))
    if isinstance(value, (tuple, list)):
        return ";".join(_raw_csv(v) for v in value)
    return str(value)


def render_csv(table: Table, raw=True, header=None) -> str:
    """CSV text of a table.

    Parameters
    ----------
    raw : bool
        True: the raw values (every digit of a float, empty where none; the
        report's ``tables/*.csv``, the assess CSV). False: the display text
        (the study commands' ``--format csv``).  Either way a text cell (a
        name from a file) that a spreadsheet would read as a formula is
        guarded (:func:`latdyn.text.spreadsheet_cell`) and its control
        characters (line breaks, ESC, NUL) shown escaped (one row per line);
        numbers are not touched.
    header : {"keys", "headings"}, optional
        The header row; default the column keys for raw values, the
        headings for display text.
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    header = header or ("keys" if raw else "headings")
    writer.writerow([c.key if header == "keys" else c.heading for c in table.columns])
    show = _raw_csv if raw else cell_text
    for row in table.rows:
        cells = []
        for c in table.columns:
            value = row.get(c.key)
            text = show(value) if raw else show(value, c)
            cells.append(spreadsheet_cell(printable(text)) if _is_text(value) else text)
        writer.writerow(cells)
    return buffer.getvalue()


def _is_text(value):
    """A text value (a name from a file): its CSV cell is guarded against formulas; numbers are not."""
    if isinstance(value, (tuple, list)):
        return any(_is_text(v) for v in value)
    return isinstance(value, str)


# ------------------------------------------------------------------ JSON, HTML

def _json_value(value):
    if value is None or isinstance(value, Absent):
        return None
    if isinstance(value, bool) or isinstance(value, str):
        return value
    if isinstance(value, complex):
        return [value.real, value.imag]
    if isinstance(value, (tuple, list)):
        return [_json_value(v) for v in value]
    if isinstance(value, numbers.Integral):
        return int(value)
    if isinstance(value, numbers.Real):
        value = float(value)
        return value if math.isfinite(value) else None
    return str(value)


def table_records(table: Table) -> dict:
    """A table as a JSON-ready document: its columns (key, title, symbol, unit) and raw rows.

    Examples
    --------
    >>> from latdyn.report.blocks import Column
    >>> table_records(Table("t", "T", (Column("x", "x", "m"),), ({"x": Absent("n/a")},)))["rows"]
    [{'x': None}]
    """
    return {"name": table.name, "caption": table.caption,
            "columns": [c.as_dict() for c in table.columns],
            "rows": [{c.key: _json_value(row.get(c.key)) for c in table.columns} for row in table.rows]}


def _html(text) -> str:
    """Text for HTML: markup characters escaped and control characters (invalid in HTML) shown
    escaped; line breaks kept."""
    return html.escape(printable(text, keep="\n\t"))


def render_html_table(table: Table) -> str:
    """An HTML ``<table>`` with its caption; numbers right-aligned, emphasised rows marked."""
    out = [f"<table><caption>{_html(table.caption)}</caption><thead><tr>"
           + "".join(f"<th>{_html(c.heading)}</th>" for c in table.columns) + "</tr></thead><tbody>"]
    for index, row in enumerate(table.rows):
        mark = ' class="mark"' if index in table.emphasis else ""
        cells = []
        for c in table.columns:
            value = row.get(c.key)
            cls = ' class="num"' if _is_number(value) else ""
            cells.append(f"<td{cls}>{_html(cell_text(value, c))}</td>")
        out.append(f"<tr{mark}>" + "".join(cells) + "</tr>")
    out.append("</tbody></table>")
    return "\n".join(out)


def render(table: Table, style="text") -> str:
    """A table as "text" (or "table"), "markdown", "csv" (headings and display text) or "json"."""
    if style == "json":
        import json

        return json.dumps(table_records(table), indent=2, allow_nan=False) + "\n"
    if style == "csv":
        return render_csv(table, raw=False)
    return {"text": render_text, "table": render_text, "markdown": render_markdown_table}[style](table)


# ------------------------------------------------------------------ whole reports

@lru_cache(maxsize=1)
def css() -> str:
    """The report's style sheet (the package data file ``report.css``)."""
    from importlib.resources import files

    return files("latdyn.report").joinpath("report.css").read_text(encoding="utf-8")


def render_markdown(report) -> str:
    """``report.md``: the blocks in Markdown, figures as relative links to ``figures/``."""
    out = []
    for block in report.blocks:
        if isinstance(block, Heading):
            out.append("#" * block.level + " " + escape_markdown(block.text))
        elif isinstance(block, Notice):
            out.append("> **" + escape_markdown(block.text) + "**")
        elif isinstance(block, Paragraph):
            text = escape_markdown(block.text)
            out.append(f"*{text}*" if block.style == "small" else text)
        elif isinstance(block, Table):
            out.append(f"**{escape_markdown(block.caption)}**\n\n" + render_markdown_table(block))
        elif isinstance(block, Figure):
            caption = escape_markdown(block.caption)
            out.append(f"![{caption}](figures/{block.name}.png)\n\n*{caption}*")
    return "\n\n".join(out) + "\n"


def _css_string(text) -> str:
    r"""A CSS string literal of free text: backslash, quote, ``<``, ``>`` and control characters
    as CSS hex escapes, so a name ends neither the string nor the ``<style>`` element.

    Examples
    --------
    >>> print(_css_string('a"</style>'))
    "a\22 \3c /style\3e "
    """
    out = []
    for character in str(text):
        if character in '\\"<>' or ord(character) < 32 or ord(character) == 127:
            out.append(f"\\{ord(character):x} ")
        else:
            out.append(character)
    return '"' + "".join(out) + '"'


def page_style(report) -> str:
    """Print page boxes: the guidance-only notice at the foot of every printed page, page
    numbers ("page 3 of 12"), and the document number and revision at the head."""
    from latdyn.assessment import NOTICE

    head = " ".join(f"{words} {report.document[key]}" for key, words in
                    (("number", "Document"), ("revision", "revision"), ("date", "of"))
                    if report.document.get(key))
    return ("@page {\n"
            f"  @top-left {{ content: {_css_string(report.title)}; font-size: 8pt; color: #555; }}\n"
            f"  @top-right {{ content: {_css_string(head)}; font-size: 8pt; color: #555; }}\n"
            f"  @bottom-left {{ content: {_css_string(NOTICE)}; font-size: 7pt; color: #8a1c1c; }}\n"
            '  @bottom-right { content: "page " counter(page) " of " counter(pages); font-size: 8pt; }\n'
            "}")


#: Printed lines of a table (or of a run of related tables) short enough to keep whole on a
#: page: about a third of an A4 landscape page at the print style's 11 px, so that moving a kept
#: block to the next page never leaves more than a third of a page empty.  Longer tables break
#: between rows (filling the page), their heading row repeated on each page.
KEEP_ROWS = 12
#: Characters of a cell's text on one printed line, for the line count of a row with long text.
_LINE_CHARACTERS = 48


def _printed_lines(table) -> int:
    """Printed lines of a table's rows: a row with a long cell (a source, a note) wraps."""
    return sum(max(1, max((-(-len(cell_text(row.get(c.key), c)) // _LINE_CHARACTERS)
                           for c in table.columns), default=1))
               for row in table.rows)


def _html_groups(blocks):
    """The blocks with related tables gathered: runs of tables (and the small-print notes that
    follow each) with nothing else between them, as lists; other blocks as they are."""
    out, run = [], None
    for block in blocks:
        note = isinstance(block, Paragraph) and block.style == "small"
        if isinstance(block, Table) or (note and run is not None):
            if run is None:
                run = []
                out.append(run)
            run.append(block)
        else:
            run = None
            out.append(block)
    return out


def _html_table_group(run) -> str:
    """A run of related tables: ``<div class="tables">``, kept on one printed page where its
    printed lines fit (class ``keep``), else each table that fits kept whole, a long one breaking
    between rows."""
    lines = sum(_printed_lines(b) + 2 for b in run if isinstance(b, Table))
    parts, current = [], None
    for block in run:
        if isinstance(block, Table):
            keep = " keep" if _printed_lines(block) <= KEEP_ROWS else " long"
            current = [f'<div class="table{keep}">', render_html_table(block)]
            parts.append(current)
        else:
            current.append(f'<p class="{_html(block.style)}">{_html(block.text)}</p>')
    group = " keep" if lines <= KEEP_ROWS and len(parts) > 1 else ""
    return (f'<div class="tables{group}">\n' + "\n".join("\n".join(p) + "\n</div>" for p in parts)
            + "\n</div>")


def render_html(report, folder) -> str:
    """The self-contained HTML page; the figures (``folder/figures/<name>.png``) embedded as data.

    Related tables (a run of tables with nothing but their small-print notes between them) are
    gathered in a ``div.tables``; the print style keeps a table with its caption, heading row
    and notes on one page where it has at most :data:`KEEP_ROWS` printed lines (``div.table.keep``;
    a row with a long cell counts its wrapped lines), and a whole run where the run fits
    (``div.tables.keep``)."""
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
           f"<title>{_html(report.title)}</title>", f"<style>\n{css()}</style>",
           f"<style>\n{page_style(report)}</style></head><body>"]
    headings = [b for b in report.blocks if isinstance(b, Heading) and b.level == 2]
    nav_done = False
    for block in _html_groups(report.blocks):
        if isinstance(block, list):
            out.append(_html_table_group(block))
        elif isinstance(block, Heading):
            if block.level == 2 and not nav_done:
                out.append("<nav><strong>Contents</strong><ul>" + "".join(
                    f'<li><a href="#{_html(h.anchor)}">{_html(h.text)}</a></li>' for h in headings)
                    + "</ul></nav>")
                nav_done = True
            out.append(f'<h{block.level} id="{_html(block.anchor)}">{_html(block.text)}'
                       f"</h{block.level}>")
        elif isinstance(block, Notice):
            out.append(f'<div class="notice">{_html(block.text)}</div>')
        elif isinstance(block, Paragraph):
            style = f' class="{_html(block.style)}"' if block.style else ""
            out.append(f"<p{style}>{_html(block.text)}</p>")
        elif isinstance(block, Table):
            out.append(render_html_table(block))
        elif isinstance(block, Figure):
            with open(os.path.join(folder, "figures", block.name + ".png"), "rb") as handle:
                data = base64.b64encode(handle.read()).decode("ascii")
            out.append(f'<figure><img alt="{_html(block.caption)}" src="data:image/png;base64,{data}">'
                       f"<figcaption>{_html(block.caption)}</figcaption></figure>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"
