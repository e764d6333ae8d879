"""Figures of the design studies: sweep curves and root locus, level maps, uncertainty scatter.

matplotlib is imported inside the functions; figures are built without
pyplot and written atomically (:func:`latdyn.plots.save_both`).
Every figure that shows a level carries the guidance-only notice
(:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import os
import textwrap

import numpy as np

__all__ = ["sweep_figure", "root_locus_figure", "level_map_figure", "uncertainty_figure",
           "write_sweep_figures", "companion_path"]

_MODE_LABELS = {"dutch_roll": "Dutch roll", "roll_subsidence": "roll subsidence",
                "spiral": "spiral", "roll_spiral": "roll-spiral"}


def _figure(width, height):
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height), layout="constrained")


def _notice(figure, extra=None):
    from latdyn.assessment import NOTICE

    width = max(60, int(figure.get_figwidth() * 15))  # characters per line at 7 pt
    lines = (textwrap.wrap(extra, width) if extra else []) + textwrap.wrap(NOTICE, width)
    figure.supxlabel("\n".join(lines), fontsize=7, color="#6b7780", style="italic")


def companion_path(path, tag) -> str:
    """``out.png`` -> ``out-TAG.png``."""
    base, suffix = os.path.splitext(os.fspath(path))
    return f"{base}-{tag}{suffix or '.png'}"


def _save(figure, path):
    from latdyn.plots import save_both

    return save_both(figure, path)


def sweep_figure(result, path=None):
    """One-parameter sweep: mode figures and levels against the parameter, one column per condition.

    Rows: Dutch roll omega_n and zeta; roll time constant and spiral time
    to double; the level of each criteria set and mode as a step line with
    the root-found boundary crossings marked.
    """
    from latdyn.plots.levels import LEVEL_COLOURS

    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    figure = _figure(4.4 * columns + 0.6, 9.0)
    grid = figure.subplots(3, columns, squeeze=False, sharex="col")
    for column, item in enumerate(result.conditions):
        f = item.result.figures
        top, middle, bottom = grid[:, column]
        top.plot(x, f.dutch_roll_frequency, color="#1d3557", label="omega_nd [rad/s]")
        top.plot(x, f.dutch_roll_damping, color="#b5532b", label="zeta_d [-]")
        if np.isfinite(f.roll_spiral_frequency).any():
            top.plot(x, f.roll_spiral_damping, color="#7b4f9d", linestyle="--",
                     label="roll-spiral zeta [-]")
        top.axhline(0.0, color="#3d4550", linewidth=0.6)
        top.set_title(f'Condition "{item.condition.name}"', fontsize=9.5)
        top.legend(fontsize=7)
        middle.plot(x, f.roll_time_constant, color="#2a7f72", label="roll T_R [s]")
        middle.plot(x, f.spiral_time_to_double, color="#a8842a", label="spiral T_2 [s] (divergent)")
        middle.set_yscale("log")
        middle.legend(fontsize=7)
        offsets = {}
        for k, ((name, mode), grades) in enumerate(item.result.levels.items()):
            criteria = next(c for c in result.criteria if c.name == name)
            level = grades.level.astype(float)
            level[level == 0] = np.nan
            offset = 0.08 * (k % 5)
            offsets[(name, mode)] = offset
            bottom.step(x, level + offset, where="mid", label=f"{name} {_MODE_LABELS[mode]}",
                        linewidth=1.3)
            if criteria.assessment == "pass_fail":
                continue
        for crossing in item.crossings:
            bottom.axvline(crossing.value, color="#5b6470", linewidth=0.6, linestyle=":")
            middle.axvline(crossing.value, color="#5b6470", linewidth=0.6, linestyle=":")
            top.axvline(crossing.value, color="#5b6470", linewidth=0.6, linestyle=":")
        for level, colour in LEVEL_COLOURS.items():
            bottom.axhspan(level - 0.5, level + 0.5, color=colour, alpha=0.5, linewidth=0)
        bottom.set_yticks([1, 2, 3, 4], ["Level 1", "Level 2", "Level 3", "beyond 3"], fontsize=7)
        bottom.set_ylim(4.6, 0.4)
        bottom.legend(fontsize=6, loc="lower left")
        bottom.set_xlabel(axis_info.key.label, fontsize=8.5)
        for axis in (top, middle, bottom):
            axis.grid(True, color="#c9ced6", linewidth=0.5)
            axis.tick_params(labelsize=7.5)
    figure.suptitle(f"Sweep of {axis_info.key.text}: {result.aircraft.name}", fontsize=10.5)
    _notice(figure, "Dotted lines: level boundaries found by root-finding on the margin "
                    "(pass/fail sets: level 1 = pass, 2 = fail).")
    return _save(figure, path) if path else figure


def root_locus_figure(result, path=None):
    """Root locus of the modes as the parameter varies, one panel per condition."""
    from matplotlib.cm import ScalarMappable
    from matplotlib.colors import Normalize

    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    figure = _figure(4.6 * columns + 1.2, 4.8)
    panels = figure.subplots(1, columns, squeeze=False)[0]
    norm = Normalize(x.min(), x.max())
    for panel, item in zip(panels, result.conditions):
        f = item.result.figures
        roots = {
            "dutch_roll": f.dutch_roll[:, 0], "roll_subsidence": f.roll + 0j,
            "spiral": f.spiral + 0j, "roll_spiral": f.roll_spiral[:, 0],
        }
        markers = {"dutch_roll": "o", "roll_subsidence": "s", "spiral": "^", "roll_spiral": "D"}
        for mode, values in roots.items():
            keep = np.isfinite(values)
            if not keep.any():
                continue
            for sign in (1, -1) if mode in ("dutch_roll", "roll_spiral") else (1,):
                panel.scatter(values[keep].real, sign * values[keep].imag, c=x[keep], cmap="viridis",
                              norm=norm, s=12, marker=markers[mode],
                              label=_MODE_LABELS[mode] if sign == 1 else None)
        panel.axvline(0.0, color="#3d4550", linewidth=0.8)
        panel.axhline(0.0, color="#3d4550", linewidth=0.5)
        panel.set_xlabel("real part [1/s]", fontsize=8.5)
        panel.set_ylabel("imaginary part [rad/s]", fontsize=8.5)
        panel.set_title(f'Condition "{item.condition.name}"', fontsize=9.5)
        panel.grid(True, color="#c9ced6", linewidth=0.5)
        panel.legend(fontsize=7)
    figure.colorbar(ScalarMappable(norm=norm, cmap="viridis"), ax=list(panels),
                    label=axis_info.key.label)
    figure.suptitle(f"Root locus against {axis_info.key.text}: {result.aircraft.name}",
                    fontsize=10.5)
    return _save(figure, path) if path else figure


def level_map_figure(result, path=None):
    """Two-parameter sweep: the worst level over the modes of each criteria set on the grid,
    with every mode's level boundaries drawn (zero contour of its continuous margin)."""
    from matplotlib.colors import ListedColormap

    from latdyn.plots.levels import LEVEL_COLOURS

    first, second = result.axes
    sets = [c for c in result.criteria if c.assessment == "levels"] or list(result.criteria)
    rows, columns = len(result.conditions), len(sets)
    figure = _figure(5.0 * columns + 0.6, 4.4 * rows + 0.8)
    panels = figure.subplots(rows, columns, squeeze=False)
    X, Y = np.meshgrid(first.values, second.values, indexing="ij")
    shape = result.shape
    colours = ListedColormap(["#e4e6ea"] + [LEVEL_COLOURS[k] for k in (1, 2, 3, 4)])
    styles = {"dutch_roll": "-", "roll_subsidence": "--", "spiral": ":", "roll_spiral": "-."}
    for r, item in enumerate(result.conditions):
        for c, criteria in enumerate(sets):
            panel = panels[r, c]
            graded = {mode: grades for (name, mode), grades in item.result.levels.items()
                      if name == criteria.name}
            worst = np.zeros(shape, int)
            for grades in graded.values():
                worst = np.maximum(worst, grades.level.reshape(shape))
            panel.pcolormesh(X, Y, worst, cmap=colours, vmin=-0.5, vmax=4.5, shading="nearest")
            for mode, grades in graded.items():
                margins = grades.level_margin.reshape(shape + grades.level_margin.shape[-1:])
                for g in range(margins.shape[-1]):
                    field = margins[..., g]
                    if np.isfinite(field).sum() < 4 or not (np.nanmin(field) < 0 < np.nanmax(field)):
                        continue
                    lines = panel.contour(X, Y, field, levels=[0.0], colors="#1f2933",
                                          linewidths=0.9, linestyles=styles[mode])
                    label = (f"{_MODE_LABELS[mode]} L{g + 1}" if criteria.assessment == "levels"
                             else f"{_MODE_LABELS[mode]} pass")
                    panel.clabel(lines, fmt={0.0: label}, fontsize=6.5)
            panel.set_xlabel(first.key.label, fontsize=8.5)
            panel.set_ylabel(second.key.label, fontsize=8.5)
            panel.set_title(f'"{item.condition.name}": {criteria.name}, worst mode level',
                            fontsize=9)
            panel.tick_params(labelsize=7.5)
    figure.suptitle(f"Level map: {result.aircraft.name}", fontsize=10.5)
    _notice(figure, "Fill: worst level over the modes (sage Level 1, straw Level 2, apricot "
                    "Level 3, rose beyond Level 3, grey not assessed). Lines: each mode's level "
                    "boundaries (solid Dutch roll, dashed roll, dotted spiral).")
    return _save(figure, path) if path else figure


def write_sweep_figures(result, path) -> list:
    """The sweep's figures: curves and root locus (one parameter) or the level map (two)."""
    if len(result.axes) == 1:
        return (sweep_figure(result, path)
                + root_locus_figure(result, companion_path(path, "root-locus")))
    return level_map_figure(result, path)


def uncertainty_figure(aircraft, result, criteria=None, path=None, points=4000):
    """Monte Carlo samples of the Dutch roll on the damping-frequency chart with its level regions.

    Uses the assessment's chart (:func:`latdyn.plots.levels.dutch_roll_chart`)
    for the regions and the nominal points, and adds a random subset of the
    samples of each condition to the panel of its category.
    """
    from latdyn.assessment import assess
    from latdyn.plots.levels import dutch_roll_chart

    sets = [criteria] if criteria is not None else list(result.criteria)
    assessment = assess(aircraft, sets)
    figure = dutch_roll_chart(assessment, sets[0])
    panels = [a for a in figure.axes if a.get_xlabel().startswith("undamped")]
    colours = ("#1d3557", "#b5532b", "#2a7f72", "#7b4f9d", "#a8842a")
    for k, item in enumerate(result.conditions):
        category = item.condition.flight.category
        title = f"Category {category}" if category else "category not given"
        panel = next((p for p in panels if title in p.get_title()), panels[0])
        f = item.figures
        count = len(f.dutch_roll_frequency)
        rng = np.random.default_rng(0)
        pick = rng.choice(count, size=min(points, count), replace=False)
        panel.scatter(f.dutch_roll_frequency[pick], f.dutch_roll_damping[pick], s=2, alpha=0.25,
                      color=colours[k % len(colours)], label=f'"{item.condition.name}" samples',
                      zorder=4, linewidths=0)
        panel.legend(fontsize=7, loc="upper right", markerscale=5)
    figure.suptitle(f"Dutch roll under uncertainty ({result.samples} samples): {aircraft.name}",
                    fontsize=10.5)
    return _save(figure, path) if path else figure
