"""Figures of the design studies: sweep curves and root locus, level maps, uncertainty scatter.

Each function draws into a given figure (``fig=``; a new one by default) and
returns it; saving is separate (:func:`write_sweep_figures`,
:func:`latdyn.plots.save_both`).  matplotlib is imported inside the
functions, no pyplot is used; the style is :mod:`latdyn.plots.style`, shared
with every other figure.
Every figure that shows a level carries the guidance-only notice
(:data:`latdyn.assessment.NOTICE`).
"""

from __future__ import annotations

import os

import numpy as np

from latdyn.plots.style import (LABEL_SIZE, LEVEL_COLOURS, MODE_MARKERS, MODE_NAMES, MUTED, PALETTE, RULE,
                                TEXT, TICK_SIZE, TITLE_SIZE, UNDECIDED, add_notice, case_colour, figure_for, style_axis)

__all__ = ["sweep_figure", "root_locus_figure", "level_map_figure", "uncertainty_figure",
           "write_sweep_figures", "companion_path"]

_BOUNDARY = dict(color=MUTED, linewidth=0.6, linestyle=":")


def companion_path(path, tag) -> str:
    """``out.png`` -> ``out-TAG.png``."""
    base, suffix = os.path.splitext(os.fspath(path))
    return f"{base}-{tag}{suffix or '.png'}"


def sweep_figure(result, fig=None):
    """One-parameter sweep: mode figures and levels against the parameter, one column per condition.

    Rows: Dutch roll omega_n and zeta; roll time constant and spiral time
    to double; the level of each criteria set and mode as a step line with
    the root-found boundary crossings marked.

    Parameters
    ----------
    result : latdyn.studies.sweep.SweepResult
        A sweep of one parameter.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    figure = figure_for(fig, 4.4 * columns + 0.6, 9.0)
    grid = figure.subplots(3, columns, squeeze=False, sharex="col")
    for column, item in enumerate(result.conditions):
        f = item.result.figures
        top, middle, bottom = grid[:, column]
        top.plot(x, f.dutch_roll_frequency, color=PALETTE[0], label="omega_nd [rad/s]")
        top.plot(x, f.dutch_roll_damping, color=PALETTE[1], label="zeta_d [-]")
        if np.isfinite(f.roll_spiral_frequency).any():
            top.plot(x, f.roll_spiral_damping, color=PALETTE[3], linestyle="--",
                     label="roll-spiral zeta [-]")
        top.axhline(0.0, color=RULE, linewidth=0.6)
        top.set_title(f'Condition "{item.condition.name}"', fontsize=9.5)
        top.legend(fontsize=7)
        middle.plot(x, f.roll_time_constant, color=PALETTE[2], label="roll T_R [s]")
        middle.plot(x, f.spiral_time_to_double, color=PALETTE[4], label="spiral T_2 [s] (divergent)")
        middle.set_yscale("log")
        middle.legend(fontsize=7)
        for k, ((name, mode), grades) in enumerate(item.result.levels.items()):
            level = grades.level.astype(float)
            level[level == 0] = np.nan
            bottom.step(x, level + 0.08 * (k % 5), where="mid", label=f"{name} {MODE_NAMES[mode]}",
                        linewidth=1.3, color=case_colour(k))
        for crossing in item.crossings:
            for axis in (top, middle, bottom):
                axis.axvline(crossing.value, **_BOUNDARY)
        for level, colour in LEVEL_COLOURS.items():
            bottom.axhspan(level - 0.5, level + 0.5, color=colour, alpha=0.5, linewidth=0)
        bottom.set_yticks([1, 2, 3, 4], ["Level 1", "Level 2", "Level 3", "beyond 3"], fontsize=7)
        bottom.set_ylim(4.6, 0.4)
        bottom.legend(fontsize=6, loc="lower left")
        bottom.set_xlabel(axis_info.key.label, fontsize=LABEL_SIZE)
        for axis in (top, middle, bottom):
            style_axis(axis)
    figure.suptitle(f"Sweep of {axis_info.key.text}: {result.aircraft.name}", fontsize=TITLE_SIZE)
    add_notice(figure, "Dotted lines: level boundaries found by root-finding on the margin "
                       "(pass/fail sets: level 1 = pass, 2 = fail).")
    return figure


def root_locus_figure(result, fig=None):
    """Root locus of the modes as the parameter varies, one panel per condition.

    Parameters
    ----------
    result : latdyn.studies.sweep.SweepResult
        A sweep of one parameter.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.cm import ScalarMappable
    from matplotlib.colors import Normalize

    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    figure = figure_for(fig, 4.6 * columns + 1.2, 4.8)
    panels = figure.subplots(1, columns, squeeze=False)[0]
    norm = Normalize(x.min(), x.max())
    for panel, item in zip(panels, result.conditions):
        f = item.result.figures
        roots = {
            "dutch_roll": f.dutch_roll[:, 0], "roll_subsidence": f.roll + 0j,
            "spiral": f.spiral + 0j, "roll_spiral": f.roll_spiral[:, 0],
        }
        for mode, values in roots.items():
            keep = np.isfinite(values)
            if not keep.any():
                continue
            for sign in (1, -1) if mode in ("dutch_roll", "roll_spiral") else (1,):
                panel.scatter(values[keep].real, sign * values[keep].imag, c=x[keep], cmap="viridis",
                              norm=norm, s=12, marker=MODE_MARKERS[mode],
                              label=MODE_NAMES[mode] if sign == 1 else None)
        style_axis(panel)
        panel.axvline(0.0, color=RULE, linewidth=0.8)
        panel.axhline(0.0, color=RULE, linewidth=0.5)
        panel.set_xlabel("real part [1/s]", fontsize=LABEL_SIZE)
        panel.set_ylabel("imaginary part [rad/s]", fontsize=LABEL_SIZE)
        panel.set_title(f'Condition "{item.condition.name}"', fontsize=9.5)
        panel.legend(fontsize=7)
    bar = figure.colorbar(ScalarMappable(norm=norm, cmap="viridis"), ax=list(panels))
    bar.set_label(axis_info.key.label, fontsize=LABEL_SIZE, color=TEXT)
    bar.ax.tick_params(labelsize=TICK_SIZE, colors=TEXT)
    figure.suptitle(f"Root locus against {axis_info.key.text}: {result.aircraft.name}",
                    fontsize=TITLE_SIZE)
    return figure


def level_map_figure(result, fig=None):
    """Two-parameter sweep: the worst level over the modes of each criteria set on the grid,
    with every mode's level boundaries drawn (zero contour of its continuous margin).

    Parameters
    ----------
    result : latdyn.studies.sweep.SweepResult
        A sweep of two parameters.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.colors import ListedColormap

    first, second = result.axes
    sets = [c for c in result.criteria if c.assessment == "levels"] or list(result.criteria)
    rows, columns = len(result.conditions), len(sets)
    figure = figure_for(fig, 5.0 * columns + 0.6, 4.4 * rows + 0.8)
    panels = figure.subplots(rows, columns, squeeze=False)
    X, Y = np.meshgrid(first.values, second.values, indexing="ij")
    shape = result.shape
    colours = ListedColormap([UNDECIDED] + [LEVEL_COLOURS[k] for k in (1, 2, 3, 4)])
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
                    lines = panel.contour(X, Y, field, levels=[0.0], colors=TEXT,
                                          linewidths=0.9, linestyles=styles[mode])
                    label = (f"{MODE_NAMES[mode]} L{g + 1}" if criteria.assessment == "levels"
                             else f"{MODE_NAMES[mode]} pass")
                    panel.clabel(lines, fmt={0.0: label}, fontsize=6.5)
            panel.set_xlabel(first.key.label, fontsize=LABEL_SIZE)
            panel.set_ylabel(second.key.label, fontsize=LABEL_SIZE)
            panel.set_title(f'"{item.condition.name}": {criteria.name}, worst mode level',
                            fontsize=9)
            style_axis(panel)
    figure.suptitle(f"Level map: {result.aircraft.name}", fontsize=TITLE_SIZE)
    add_notice(figure, "Fill: worst level over the modes (sage Level 1, straw Level 2, apricot "
                    "Level 3, rose beyond Level 3, grey not assessed). Lines: each mode's level "
                       "boundaries (solid Dutch roll, dashed roll, dotted spiral).")
    return figure


def write_sweep_figures(result, path) -> list:
    """Write the sweep's figures (PNG and SVG): curves and root locus (one parameter) or the level
    map (two). Returns the paths written."""
    from latdyn.plots import save_both

    if len(result.axes) == 1:
        return (save_both(sweep_figure(result), path)
                + save_both(root_locus_figure(result), companion_path(path, "root-locus")))
    return save_both(level_map_figure(result), path)


def uncertainty_figure(result, assessment, criteria=None, fig=None, points=4000):
    """Monte Carlo samples of the Dutch roll on the damping-frequency chart with its level regions.

    The assessment's chart (:func:`latdyn.plots.levels.dutch_roll_chart`) of
    the nominal aircraft gives the regions and the nominal points; a random
    subset of each condition's samples is added to the panel of its category.

    Parameters
    ----------
    result : latdyn.studies.uncertainty.UncertaintyResult
    assessment : latdyn.assessment.AircraftAssessment
        The nominal aircraft assessed against the criteria (the caller's :func:`latdyn.assessment.assess`).
    criteria : CriteriaSet, optional
        The set whose regions are drawn; default the first of the run.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.
    points : int
        Samples drawn per condition (a fixed random subset).

    Returns
    -------
    matplotlib.figure.Figure
    """
    from latdyn.plots.levels import dutch_roll_chart

    criteria = criteria if criteria is not None else result.criteria[0]
    figure = dutch_roll_chart(assessment, criteria, fig=fig)
    panels = [a for a in figure.axes if a.get_xlabel().startswith("undamped")]
    for k, item in enumerate(result.conditions):
        category = item.condition.flight.category
        title = f"Category {category}" if category else "category not given"
        panel = next((p for p in panels if title in p.get_title()), panels[0])
        f = item.figures
        count = len(f.dutch_roll_frequency)
        rng = np.random.default_rng(0)
        pick = rng.choice(count, size=min(points, count), replace=False)
        panel.scatter(f.dutch_roll_frequency[pick], f.dutch_roll_damping[pick], s=2, alpha=0.25,
                      color=case_colour(k), label=f'"{item.condition.name}" samples',
                      zorder=4, linewidths=0)
        panel.legend(fontsize=7, loc="upper right", markerscale=5)
    figure.suptitle(f"Dutch roll under uncertainty ({result.samples} samples): {result.aircraft.name}",
                    fontsize=TITLE_SIZE)
    return figure
