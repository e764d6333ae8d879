"""Tables for people: mode figures as rows of text, rendered as plain text,
Markdown or CSV.  No formulas here: the figures come from :mod:`latdyn.modes`.
"""

from __future__ import annotations

import csv
import io
import math

__all__ = [
    "MODE_LABELS", "MODE_COLUMNS", "SHAPE_COLUMNS", "mode_rows", "shape_rows", "render",
    "render_text", "render_markdown",
    "render_csv", "format_number", "format_root",
]

MODE_LABELS = {
    "dutch_roll": "Dutch roll",
    "roll_subsidence": "Roll subsidence",
    "spiral": "Spiral",
    "roll_spiral": "Roll-spiral oscillation",
}

#: (key, heading) of the mode table; units in the heading.
MODE_COLUMNS = (
    ("mode", "Mode"),
    ("eigenvalue", "Root(s) [1/s]"),
    ("natural_frequency", "omega_n [rad/s]"),
    ("damping_ratio", "zeta [-]"),
    ("period", "Period [s]"),
    ("time_constant", "T [s]"),
    ("time_to_half", "T_half [s]"),
    ("time_to_double", "T_double [s]"),
    ("cycles_to_half", "N_half [cycles]"),
    ("phi_to_beta", "|phi/beta| [-]"),
    ("status", "Status"),
)

DASH = "-"


def format_number(value, digits=4):
    """A figure with ``digits`` significant digits, or a dash where it does not apply.

    Examples
    --------
    >>> format_number(0.0087612), format_number(None), format_number(1234.5)
    ('0.008761', '-', '1234')
    """
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return DASH
    if value == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(value)))
    decimals = max(digits - 1 - magnitude, 0)
    return f"{value:.{decimals}f}"


def format_root(root, digits=4):
    """A root as ``re`` or ``re ± im j``.

    Examples
    --------
    >>> format_root(complex(-0.25, 1.5)), format_root(complex(-1.121, 0))
    ('-0.2500 ± 1.500j', '-1.121')
    """
    root = complex(root)
    if root.imag == 0:
        return format_number(root.real, digits)
    return f"{format_number(root.real, digits)} ± {format_number(abs(root.imag), digits)}j"


def _status(mode):
    if mode.neutral:
        return "NEUTRAL"
    if not mode.stable:
        return "DIVERGENT"
    return "stable"


def mode_rows(modes):
    """Rows (dicts of text keyed as :data:`MODE_COLUMNS`) of a :class:`~latdyn.modes.ModeSet`.

    A divergent mode shows its time to double and a dash for the time
    constant and time to half: no stable-looking figure for an unstable mode.
    The roots an augmentation adds (``modes.added``) follow the airframe's
    modes, labelled "added: <block>".
    """
    from latdyn.augmentation import added_label

    rows = []
    added = tuple(getattr(modes, "added", ()))
    for mode in tuple(modes) + added:
        label = MODE_LABELS.get(mode.name) or f"added: {added_label(mode.name)}"
        if mode.name == "dutch_roll" and not mode.oscillatory:
            label += " (non-oscillatory)"
        if mode.oscillatory:
            roots = format_root(mode.eigenvalues[0])
        else:
            roots = ", ".join(format_root(r) for r in mode.eigenvalues)
        rows.append({
            "mode": label,
            "eigenvalue": roots,
            "natural_frequency": format_number(mode.natural_frequency),
            "damping_ratio": format_number(mode.damping_ratio),
            "period": format_number(mode.period),
            "time_constant": format_number(mode.time_constant),
            "time_to_half": format_number(mode.time_to_half),
            "time_to_double": format_number(mode.time_to_double),
            "cycles_to_half": format_number(mode.cycles_to_half, 3),
            "phi_to_beta": format_number(mode.phi_to_beta, 3),
            "status": _status(mode),
        })
    return rows


#: (key, heading) of the mode-shape table.
SHAPE_COLUMNS = (
    ("mode", "Mode"), ("reference", "Relative to"),
    ("beta", "beta [rad] (phase deg)"), ("p", "p [rad/s] (phase deg)"),
    ("r", "r [rad/s] (phase deg)"), ("phi", "phi [rad] (phase deg)"),
)


def shape_rows(modes):
    """Rows of the mode shapes: each state's magnitude and phase relative to the reference state.

    Examples
    --------
    >>> import numpy as np
    >>> from latdyn.modes import modes_from_matrix
    >>> A = np.array([[-0.1113, 0.0, -1.0, 0.1321], [-1.328, -0.951, 0.609, 0.0],
    ...               [0.757, -0.124, -0.265, 0.0], [0.0, 1.0, 0.0, 0.0]])
    >>> shape_rows(modes_from_matrix(A))[0]["reference"]
    'beta'
    """
    import math as _math

    rows = []
    for mode in modes:
        shape = mode.mode_shape
        if shape is None:
            continue
        row = {"mode": MODE_LABELS[mode.name], "reference": shape.normalised_to}
        for state in ("beta", "p", "r", "phi"):
            magnitude = shape.magnitude[state]
            phase = _math.degrees(shape.phase[state])
            row[state] = f"{format_number(magnitude, 3)} ({phase:+.0f})" if mode.oscillatory \
                else f"{'-' if abs(phase) > 90 else '+'}{format_number(magnitude, 3)}"
        rows.append(row)
    return rows


def render_text(columns, rows):
    """Plain-text table with aligned columns."""
    headings = [heading for _, heading in columns]
    cells = [[str(row.get(key, "")) for key, _ in columns] for row in rows]
    widths = [max(len(h), *(len(c[i]) for c in cells)) if cells else len(h)
              for i, h in enumerate(headings)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(headings, widths)).rstrip(),
             "  ".join("-" * w for w in widths)]
    for row in cells:
        lines.append("  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())
    return "\n".join(lines)


def render_markdown(columns, rows):
    """Markdown (pipe) table."""
    headings = [heading for _, heading in columns]
    lines = ["| " + " | ".join(headings) + " |", "|" + "|".join("---" for _ in headings) + "|"]
    for row in rows:
        lines.append("| " + " | ".join(str(row.get(key, "")).replace("|", "\\|")
                                        for key, _ in columns) + " |")
    return "\n".join(lines)


def render_csv(columns, rows):
    """CSV text with a heading row."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([heading for _, heading in columns])
    for row in rows:
        writer.writerow([row.get(key, "") for key, _ in columns])
    return buffer.getvalue()


def render(columns, rows, style="text"):
    """Render rows as "text", "markdown" or "csv"."""
    return {"text": render_text, "table": render_text, "markdown": render_markdown,
            "csv": render_csv}[style](columns, rows)
