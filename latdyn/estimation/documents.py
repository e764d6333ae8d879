"""The build-up as rows, JSON and an aircraft file: formatting only, no formulas.

- the table itself is :func:`latdyn.report.tables.buildup_table` (every
  table is defined there once);
- :func:`estimate_document`: the ``latdyn estimate --format json`` document;
- :func:`extension_text`: an aircraft file that ``extends`` the original
  with every derivative as used written into ``[condition.derivatives]``.
"""

from __future__ import annotations

import os

__all__ = ["method_lines", "estimate_document", "extension_text"]


def method_lines(build):
    """One line per method used: 'Cl_p, Cy_p - fin: fin side force in roll (source)'."""
    order, names = [], {}
    for row in build.rows:
        for method in row.methods:
            key = (method.component, method.name, method.source)
            if key not in names:
                order.append(key)
                names[key] = []
            names[key].append(row.name)
    return [f"{', '.join(names[key])} - {key[0]}: {key[1]} ({key[2]})" for key in order]


def estimate_document(aircraft, builds) -> dict:
    """The JSON document: per condition ``"derivatives": {"Cn_beta": {"total", "given",
    "contributions": {...}, "method"}, ...}`` (plus ``used``, ``source``, ``difference``,
    ``missing``), SI units and radians."""
    from latdyn import __version__

    return {"latdyn_version": __version__, "aircraft": aircraft.name, "file": aircraft.file,
            "conditions": [build.as_dict() for build in builds],
            "warnings": list(aircraft.warnings)}


def _number(value) -> str:
    return repr(float(value))


def extension_text(aircraft, builds, path) -> str:
    """An aircraft file extending ``aircraft.file`` with the derivatives used.

    Each condition gets a ``[condition.derivatives]`` block in the axes of
    its derivatives, every derivative written (the given ones as given, the
    estimated ones as estimated, with their contributions in a comment), so
    that the estimates can be reviewed and edited like any other data.  A
    condition with dimensional derivatives is left out (a comment says so).
    """
    from latdyn.aircraft import NondimensionalDerivatives
    from latdyn.model import COEFFICIENT_NAMES

    base = os.path.relpath(os.path.abspath(aircraft.file),
                           os.path.dirname(os.path.abspath(path)))
    from latdyn.text import toml_comment, toml_string

    lines = [f"# Derivatives of {toml_comment(aircraft.name)} as used by latdyn: written ones as given,",
             "# the others estimated from the geometry by the component build-up",
             "# (latdyn estimate). Review and edit them like any other data.",
             f"extends = {toml_string(base.replace(os.sep, '/'))}", ""]
    for build in builds:
        condition = build.condition
        lines.append("[[condition]]")
        lines.append(f"name = {toml_string(condition.name)}")
        if not isinstance(condition.derivatives, NondimensionalDerivatives):
            lines += ["# this condition gives dimensional derivatives: left as written", ""]
            continue
        lines += ["", "[condition.derivatives]", f'axes = "{condition.derivatives.axes}"']
        rows = {row.name: row for row in build.rows}
        for name in COEFFICIENT_NAMES:
            value = getattr(condition.derivatives, name)
            source = condition.source(name)
            comment = source
            row = rows.get(name)
            if source == "estimated" and row is not None and row.contributions:
                comment += ": " + ", ".join(f"{c} {v:.4g}" for c, v in row.contributions.items())
            lines.append(f"{name} = {_number(value)}  # {comment}")
        lines.append("")
    return "\n".join(lines)
