"""The handling-qualities summary table: text, Markdown and CSV renderings.

One row per condition, criteria set and mode, with the level (or pass/fail),
the governing parameter, its value and limit, the margin to the next-better
boundary and the source; the row that limits each condition under each
criteria set is marked "worst".  Every rendering carries the guidance-only
notice (:data:`latdyn.assessment.NOTICE`) and names each criteria set with
its edition.  No formulas here: the figures come from :mod:`latdyn.assessment`.
"""

from __future__ import annotations

import csv
import io

from latdyn.assessment import NOTICE, SYMBOLS, UNITS
from latdyn.tables import MODE_LABELS, format_number, render_markdown, render_text

__all__ = ["ASSESSMENT_COLUMNS", "CSV_COLUMNS", "assessment_rows", "render_assessment",
           "render_assessments", "value_text", "parameter_label", "worst_lines"]

#: (key, heading) of the summary table.
ASSESSMENT_COLUMNS = (
    ("condition", "Condition"),
    ("category", "Cat."),
    ("mode", "Mode"),
    ("criteria", "Criteria"),
    ("result", "Level"),
    ("governing", "Governing"),
    ("value", "Value"),
    ("limit", "Limit"),
    ("margin", "Margin"),
    ("margin_percent", "Margin [%]"),
    ("ref", "Source"),
    ("worst", "Worst"),
)

#: Columns of the CSV rendering (raw SI numbers).
CSV_COLUMNS = ("aircraft", "file", "condition", "category", "airplane_class", "criteria", "edition",
               "mode", "level", "pass", "result", "governing", "unit", "value", "limit", "margin",
               "margin_fraction", "worst", "source", "notes", "missing")


def parameter_label(mode, parameter) -> str:
    """Trade symbol of a governing parameter with its unit, e.g. ``zeta_d*omega_nd [rad/s]``.

    Examples
    --------
    >>> parameter_label("roll_subsidence", "time_constant")
    'T_R [s]'
    """
    if parameter is None:
        return "-"
    symbol = SYMBOLS.get((mode, parameter), parameter)
    unit = UNITS.get(parameter, "")
    return f"{symbol} [{unit}]" if unit else symbol


def value_text(assessment) -> str:
    """The governing value as printed: never a stable-looking figure for an unstable mode.

    Examples
    --------
    >>> from latdyn.assessment import Assessment
    >>> value_text(Assessment("x", "e", "spiral", 1, None, "time_to_double", None, 12.0, None, None))
    'convergent'
    """
    a = assessment
    if a.value is not None:
        return format_number(a.value)
    if a.governing == "time_to_double" and a.mode == "spiral":
        return "convergent"
    if a.governing == "time_constant":
        return "divergent"
    if a.governing == "permitted":
        return "not permitted"
    if a.governing == "damping_ratio" and a.notes and "divergence" in a.notes[0]:
        return "static divergence"
    return "-"


def _margin_percent(fraction):
    return "-" if fraction is None else f"{100.0 * fraction:+.1f}"


def _worst_keys(condition):
    keys = set()
    for name in dict.fromkeys(a.criteria for a in condition.assessments):
        entry = condition.worst(name)
        if entry is not None:
            keys.add(id(entry))
    return keys


def assessment_rows(result):
    """Rows of the summary table of one :class:`~latdyn.assessment.AircraftAssessment`.

    Returns
    -------
    rows : list of dict
        Text cells keyed as :data:`ASSESSMENT_COLUMNS`, plus ``is_worst``.
    sources : list of str
        Numbered sources ([1] is ``sources[0]``).
    notes : list of str
        "condition / mode / criteria: note" lines, including what is missing.
    """
    rows, sources, grouped = [], [], {}
    for condition in result.conditions:
        worst = _worst_keys(condition)
        for a in condition.assessments:
            ref = "-"
            if a.source:
                if a.source not in sources:
                    sources.append(a.source)
                ref = f"[{sources.index(a.source) + 1}]" + (f" {a.confidence}" if a.confidence else "")
            label = MODE_LABELS.get(a.mode, a.mode)
            for note in list(a.notes) + [f"missing {item}" for item in a.missing]:
                grouped.setdefault((label, a.criteria, note), []).append(condition.name)
            is_worst = id(a) in worst
            rows.append({
                "condition": condition.name,
                "category": condition.category or "?",
                "mode": label,
                "criteria": a.criteria,
                "result": a.result,
                "governing": parameter_label(a.mode, a.governing),
                "value": value_text(a),
                "limit": format_number(a.limit),
                "margin": format_number(a.margin) if a.margin is None or a.margin < 0
                else "+" + format_number(a.margin),
                "margin_percent": _margin_percent(a.margin_fraction),
                "ref": ref,
                "worst": "<< worst" if is_worst else "",
                "is_worst": is_worst,
            })
    notes = [f"{', '.join(names)} / {label} / {criteria}: {note}"
             for (label, criteria, note), names in grouped.items()]
    return rows, sources, notes


def worst_lines(result):
    """One line per condition: the worst level under each criteria set and the mode that sets it.

    Examples
    --------
    >>> worst_lines(type("R", (), {"conditions": ()})())
    []
    """
    lines = []
    for condition in result.conditions:
        parts = []
        for name in dict.fromkeys(a.criteria for a in condition.assessments):
            entry = condition.worst(name)
            if entry is None:
                parts.append(f"{name}: not assessed")
            else:
                parts.append(f"{name}: {entry.result} ({MODE_LABELS.get(entry.mode, entry.mode)})")
        lines.append(f"{condition.name}: " + "; ".join(parts))
    return lines


def _criteria_lines(result):
    return [f"{c.name}: {c.edition}" for c in result.criteria]


def _title(result):
    text = f"Handling-qualities assessment: {result.aircraft}"
    if result.file:
        text += f"  ({result.file})"
    if result.airplane_class:
        text += f"  class {result.airplane_class}"
    return text


def render_assessment(result, style="table") -> str:
    """The summary table of one aircraft as plain text ("table") or "markdown".

    Both carry the guidance-only notice, the criteria sets with their
    editions, the numbered sources and the notes.
    """
    rows, sources, notes = assessment_rows(result)
    if style == "markdown":
        for row in rows:
            if row["is_worst"]:
                row["result"] = f"**{row['result']}**"
                row["worst"] = "**worst**"
        lines = [f"## {_title(result)}", "", f"> **{NOTICE}**", "", "Criteria:"]
        lines += [f"- {line}" for line in _criteria_lines(result)]
        lines += ["", "Worst level per condition:"] + [f"- {line}" for line in worst_lines(result)]
        lines += ["", render_markdown(ASSESSMENT_COLUMNS, rows), "",
                  "Worst level per condition and criteria set in bold. Margin: to the next-better "
                  "boundary, positive inside.", "", "Sources:"]
        lines += [f"{i}. {text}" for i, text in enumerate(sources, 1)]
        if notes or result.notes:
            lines += ["", "Notes:"] + [f"- {n}" for n in list(result.notes) + notes]
        lines += ["", f"*{NOTICE}*"]
        return "\n".join(lines)
    lines = [_title(result), NOTICE, "Criteria: " + "; ".join(_criteria_lines(result)), "",
             "Worst level per condition:"] + [f"  {line}" for line in worst_lines(result)]
    lines += ["", render_text(ASSESSMENT_COLUMNS, rows),
             "Worst: the row that limits each condition under each criteria set. "
             "Margin: to the next-better boundary, positive inside.", "", "Sources:"]
    lines += [f"  [{i}] {text}" for i, text in enumerate(sources, 1)]
    if notes or result.notes:
        lines += ["Notes:"] + [f"  - {n}" for n in list(result.notes) + notes]
    return "\n".join(lines)


def _csv_number(value):
    return "" if value is None else repr(float(value))


def render_assessments(results, style="table") -> str:
    """All aircraft in one text, Markdown or CSV document.

    CSV: ``#`` comment lines first (the notice, each criteria set and its
    edition), then one header row and one row per condition, criteria set
    and mode, with raw SI numbers.
    """
    if style != "csv":
        return "\n\n".join(render_assessment(r, style) for r in results) + "\n"
    buffer = io.StringIO()
    buffer.write(f"# {NOTICE}\n")
    seen = []
    for result in results:
        for line in _criteria_lines(result):
            if line not in seen:
                seen.append(line)
                buffer.write(f"# criteria {line}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(CSV_COLUMNS)
    for result in results:
        for condition in result.conditions:
            worst = _worst_keys(condition)
            for a in condition.assessments:
                edition = a.edition
                writer.writerow([
                    result.aircraft, result.file or "", condition.name, condition.category or "",
                    condition.airplane_class or "", a.criteria, edition, a.mode,
                    "" if a.level is None else a.level,
                    "" if a.passed is None else ("true" if a.passed else "false"),
                    a.result, a.governing or "", a.unit, _csv_number(a.value), _csv_number(a.limit),
                    _csv_number(a.margin), _csv_number(a.margin_fraction),
                    "true" if id(a) in worst else "false", a.source or "", " | ".join(a.notes),
                    " | ".join(a.missing)])
    return buffer.getvalue()
