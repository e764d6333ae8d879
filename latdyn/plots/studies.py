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

from latdyn.plots.style import (CURRENT, LABEL_SIZE, LEVEL_COLOURS, MODE_COLOURS, MODE_MARKERS, MODE_NAMES, MUTED,
                                RULE, TEXT, TICK_SIZE, TITLE_SIZE, UNDECIDED, add_notice, axis_label, case_colour,
                                figure_for, key_axis, level_handles, mark_current, plain, style_axis, unit_text)

__all__ = ["sweep_figure", "root_locus_figure", "level_map_figure", "uncertainty_figure",
           "write_sweep_figures", "sweep_figure_paths", "companion_path"]

_BOUNDARY = dict(color=MUTED, linewidth=0.6, linestyle=":")
#: Line style of each mode's level boundaries on a level map.
_MODE_LINES = {"dutch_roll": "-", "roll_subsidence": "--", "spiral": ":", "roll_spiral": "-.",
               "roll_performance": (0, (5, 1, 1, 1, 1, 1))}


def companion_path(path, tag) -> str:
    """``out.png`` -> ``out-TAG.png``."""
    base, suffix = os.path.splitext(os.fspath(path))
    return f"{base}-{tag}{suffix or '.png'}"


#: Fin keys of a sweep with the fin dimension each ratio scales: (ratio key, field, words, symbol).
_FIN_SCALES = {"fin.area_ratio": ("area", "area", "fin area", r"$S_F$"),
               "fin.arm_ratio": ("arm", "length", "fin arm", r"$l_F$")}
#: Line styles of the criteria sets on a level panel (one per set).
_SET_STYLES = ("-", (0, (5, 2)), (0, (1, 1.5)), (0, (6, 2, 1, 2)))


def _key_label(key) -> str:
    """A swept key's label: the key as typed (plain text) and its unit, typeset."""
    return plain(key.text) + (f" [{unit_text(key.unit)}]" if key.unit else "")


def _fin_axis(axis, aircraft, key, side):
    """A second scale on ``side`` ("top" or "right") in fin area (or arm) in the file's units, for
    a fin-ratio key; nothing for other keys.  Returns the secondary axis or None."""
    scale = _FIN_SCALES.get(key.name)
    fin = getattr(aircraft, "fin", None)
    if scale is None or fin is None:
        return None
    from latdyn.studies.keys import file_units
    from latdyn.units import from_si, unit_word

    field, dimension, words, symbol = scale
    words_units = file_units(aircraft)
    size = float(from_si(getattr(fin, field), dimension, words_units))
    functions = (lambda ratio: ratio * size, lambda value: value / size)
    second = (axis.secondary_xaxis(side, functions=functions) if side == "top"
              else axis.secondary_yaxis(side, functions=functions))
    label = f"{words} {symbol} [{unit_text(unit_word(dimension, words_units))}] (file: {size:.4g})"
    (second.set_xlabel if side == "top" else second.set_ylabel)(label, fontsize=LABEL_SIZE, color=TEXT)
    second.tick_params(labelsize=TICK_SIZE, colors=TEXT)
    return second


def sweep_figure(result, fig=None):
    """One-parameter sweep: each mode figure on its own axis and the levels, one column per condition.

    Rows: Dutch roll undamped natural frequency; damping ratios (Dutch
    roll, and the roll-spiral pair where it forms); roll time constant;
    spiral time to double; the level of each criteria set and mode as a step
    line with the root-found boundary crossings marked.  Each mode keeps one
    colour in every row; the current design (the file's values) is marked;
    a fin-ratio sweep also reads in fin area (or arm) in the file's units.

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
    from matplotlib.lines import Line2D
    from matplotlib.ticker import NullFormatter

    from latdyn.studies.sweep import current_design

    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    currents = current_design(result)
    figure = figure_for(fig, 4.4 * columns + 2.6, 11.0)
    grid = figure.subplots(5, columns + 1, squeeze=False, width_ratios=[1.0] * columns + [0.05])
    for axis in grid[1:, -1]:
        axis.remove()
    rows = (("dutch_roll_frequency", axis_label("Dutch roll", "omega_nd", "rad/s"), "dutch_roll", False),
            ("dutch_roll_damping", axis_label("damping ratio", "zeta", "-"), "dutch_roll", False),
            ("roll_time_constant", axis_label("roll", "T_R", "s"), "roll_subsidence", True),
            ("spiral_time_to_double", axis_label("spiral (divergent)", "T_2", "s"), "spiral", True))
    # the modes' levels (the static checks of steady flight are in the sweep's tables and JSON)
    sets = list(dict.fromkeys(name for item in result.conditions for name, mode in item.result.levels
                              if mode in MODE_COLOURS))
    for column, (item, current) in enumerate(zip(result.conditions, currents)):
        f, here = item.result.figures, current.result.figures
        panels = grid[:, column]
        nominal = current.values[0]
        for axis in panels[1:]:
            axis.sharex(panels[0])
        for axis, (name, label, mode, log) in zip(panels, rows):
            values = np.asarray(getattr(f, name), dtype=float)
            axis.plot(x, values, color=MODE_COLOURS[mode], linewidth=1.5)
            if name == "dutch_roll_damping" and np.isfinite(f.roll_spiral_damping).any():
                axis.plot(x, f.roll_spiral_damping, color=MODE_COLOURS["roll_spiral"], linestyle="--",
                          linewidth=1.3)
            if name == "dutch_roll_damping":
                axis.axhline(0.0, color=RULE, linewidth=0.6)
            finite = values[np.isfinite(values)]
            if log and finite.size and finite.min() > 0 and finite.max() > 10 * finite.min():
                axis.set_yscale("log")
                axis.yaxis.set_minor_formatter(NullFormatter())
            if column == 0:
                axis.set_ylabel(label, fontsize=LABEL_SIZE, color=TEXT)
            value = float(np.asarray(getattr(here, name), dtype=float)[0])
            if np.isfinite(nominal) and np.isfinite(value):
                mark_current(axis, nominal, value)
            if not np.isfinite(values).any():
                axis.text(0.5, 0.5, "no such mode over the range", transform=axis.transAxes, ha="center",
                          va="center", fontsize=7.5, color=MUTED)
        bottom = panels[-1]
        for (name, mode), grades in item.result.levels.items():
            if mode not in MODE_COLOURS:
                continue
            level = grades.level.astype(float)
            level[level == 0] = np.nan
            k = sets.index(name)
            bottom.step(x, level + 0.1 * (list(MODE_COLOURS).index(mode) - 1.5) + 0.03 * k, where="mid",
                        linewidth=1.3, color=MODE_COLOURS[mode], linestyle=_SET_STYLES[k % len(_SET_STYLES)])
        for crossing in item.crossings:
            for axis in panels:
                axis.axvline(crossing.value, **_BOUNDARY)
        for level, colour in LEVEL_COLOURS.items():
            bottom.axhspan(level - 0.5, level + 0.5, color=colour, alpha=0.5, linewidth=0)
        bottom.set_yticks([1, 2, 3, 4], ["Level 1", "Level 2", "Level 3", "beyond 3"], fontsize=7)
        bottom.set_ylim(4.6, 0.4)
        if np.isfinite(nominal):
            mark_current(bottom, nominal)
        bottom.set_xlabel(_key_label(axis_info.key), fontsize=LABEL_SIZE, color=TEXT)
        _fin_axis(panels[0], result.aircraft, axis_info.key, "top")
        panels[0].set_title(plain(f'Condition "{item.condition.name}"'), fontsize=9.5, color=TEXT)
        for axis in panels:
            style_axis(axis)
        for axis in panels[:-1]:
            axis.tick_params(labelbottom=False)
    modes = [m for m in MODE_COLOURS if any(m == mode for item in result.conditions for _, mode in item.result.levels)
             or m in ("dutch_roll", "roll_subsidence", "spiral")]
    handles = [Line2D([], [], color=MODE_COLOURS[m], linewidth=1.5, label=MODE_NAMES[m]) for m in modes]
    handles += [Line2D([], [], color=MUTED, linestyle=_SET_STYLES[k % len(_SET_STYLES)], linewidth=1.3,
                       label=plain(f"levels: {name}")) for k, name in enumerate(sets)]
    handles += [Line2D([], [], label="current design (file)", **CURRENT),
                Line2D([], [], label="level boundary (root-found)", **_BOUNDARY)]
    handles += level_handles()
    key_axis(grid[0, -1], handles, "Key")
    figure.suptitle(plain(f"Sweep of {axis_info.key.text}: {result.aircraft.name}"), fontsize=TITLE_SIZE,
                    color=TEXT)
    add_notice(figure, "Dotted lines: level boundaries found by root-finding on the margin "
                       "(pass/fail sets: level 1 = pass, 2 = fail).")
    return figure


def root_locus_figure(result, fig=None):
    """Root locus of the modes as the parameter varies, one panel per condition.

    The colour of a root is the parameter's value (colour bar); the current
    design's roots are marked.

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

    from latdyn.studies.sweep import current_design

    axis_info = result.axes[0]
    x = axis_info.values
    columns = len(result.conditions)
    figure = figure_for(fig, 4.6 * columns + 1.6, 5.0)
    panels = figure.subplots(1, columns, squeeze=False)[0]
    norm = Normalize(x.min(), x.max())
    for panel, item, current in zip(panels, result.conditions, current_design(result)):
        for figures, here in ((item.result.figures, False), (current.result.figures, True)):
            roots = {
                "dutch_roll": figures.dutch_roll[:, 0], "roll_subsidence": figures.roll + 0j,
                "spiral": figures.spiral + 0j, "roll_spiral": figures.roll_spiral[:, 0],
            }
            for mode, values in roots.items():
                keep = np.isfinite(values)
                if not keep.any():
                    continue
                for sign in (1, -1) if mode in ("dutch_roll", "roll_spiral") else (1,):
                    if here:
                        panel.plot(values[keep].real, sign * values[keep].imag,
                                   label="current design" if (sign == 1 and mode == "dutch_roll") else None,
                                   **CURRENT)
                    else:
                        panel.scatter(values[keep].real, sign * values[keep].imag, c=x[keep], cmap="viridis",
                                      norm=norm, s=12, marker=MODE_MARKERS[mode],
                                      label=MODE_NAMES[mode] if sign == 1 else None)
        style_axis(panel)
        panel.axvline(0.0, color=RULE, linewidth=0.8)
        panel.axhline(0.0, color=RULE, linewidth=0.5)
        panel.set_xlabel("real part [1/s]", fontsize=LABEL_SIZE, color=TEXT)
        panel.set_ylabel("imaginary part [rad/s]", fontsize=LABEL_SIZE, color=TEXT)
        panel.set_title(plain(f'Condition "{item.condition.name}"'), fontsize=9.5, color=TEXT)
        panel.legend(fontsize=7, loc="best")
    bar = figure.colorbar(ScalarMappable(norm=norm, cmap="viridis"), ax=list(panels))
    bar.set_label(_key_label(axis_info.key), fontsize=LABEL_SIZE, color=TEXT)
    bar.ax.tick_params(labelsize=TICK_SIZE, colors=TEXT)
    _fin_axis(bar.ax, result.aircraft, axis_info.key, "left")
    figure.suptitle(plain(f"Root locus against {axis_info.key.text}: {result.aircraft.name}"),
                    fontsize=TITLE_SIZE, color=TEXT)
    return figure


def level_map_figure(result, fig=None):
    """Two-parameter sweep: the worst level over the modes of each criteria set on the grid,
    with every mode's level boundaries drawn (zero contour of its continuous margin).

    A key gives the level colours (guidance only) and the boundary line
    styles; the current design (the file's values) is marked; a fin-ratio
    axis also reads in fin area (or arm) in the file's units.

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
    from matplotlib.lines import Line2D

    from latdyn.studies.sweep import current_design

    first, second = result.axes
    modal = [c for c in result.criteria if getattr(c, "checks", None) is None]   # not the static checks
    sets = [c for c in modal if c.assessment == "levels"] or modal
    rows, columns = len(result.conditions), len(sets)
    figure = figure_for(fig, 5.0 * columns + 3.0, 4.6 * rows + 1.0)
    panels = figure.subplots(rows, columns + 1, squeeze=False, width_ratios=[1.0] * columns + [0.05])
    for axis in panels[1:, -1]:
        axis.remove()
    X, Y = np.meshgrid(first.values, second.values, indexing="ij")
    shape = result.shape
    colours = ListedColormap([UNDECIDED] + [LEVEL_COLOURS[k] for k in (1, 2, 3, 4)])
    drawn, shown, undecided = set(), set(), False
    for r, (item, current) in enumerate(zip(result.conditions, current_design(result))):
        for c, criteria in enumerate(sets):
            panel = panels[r, c]
            graded = {mode: grades for (name, mode), grades in item.result.levels.items()
                      if name == criteria.name}
            worst = np.zeros(shape, int)
            for grades in graded.values():
                worst = np.maximum(worst, grades.level.reshape(shape))
            shown |= {int(v) for v in np.unique(worst) if v > 0}
            undecided = undecided or bool((worst == 0).any())
            panel.pcolormesh(X, Y, worst, cmap=colours, vmin=-0.5, vmax=4.5, shading="nearest")
            for mode, grades in graded.items():
                margins = grades.level_margin.reshape(shape + grades.level_margin.shape[-1:])
                for g in range(margins.shape[-1]):
                    field = margins[..., g]
                    if np.isfinite(field).sum() < 4 or not (np.nanmin(field) < 0 < np.nanmax(field)):
                        continue
                    panel.contour(X, Y, field, levels=[0.0], colors=TEXT, linewidths=0.9,
                                  linestyles=[_MODE_LINES[mode]])
                    drawn.add(mode)
            if all(np.isfinite(current.values)):
                mark_current(panel, *current.values)
            panel.set_xlabel(_key_label(first.key), fontsize=LABEL_SIZE, color=TEXT)
            panel.set_ylabel(_key_label(second.key), fontsize=LABEL_SIZE, color=TEXT)
            _fin_axis(panel, result.aircraft, first.key, "top")
            _fin_axis(panel, result.aircraft, second.key, "right")
            panel.set_title(plain(f'"{item.condition.name}": {criteria.name}, worst mode level'),
                            fontsize=9, color=TEXT)
            style_axis(panel)
    handles = [Line2D([], [], label="current design (file)", **CURRENT)]
    handles += [Line2D([], [], color=TEXT, linewidth=0.9, linestyle=_MODE_LINES[m],
                       label=f"{MODE_NAMES[m]} level boundary") for m in _MODE_LINES if m in drawn]
    handles += level_handles(sorted(shown) or (1, 2, 3, 4), undecided=undecided)
    key_axis(panels[0, -1], handles, "Key (fill: worst level over the modes)")
    figure.suptitle(plain(f"Level map: {result.aircraft.name}"), fontsize=TITLE_SIZE, color=TEXT)
    add_notice(figure)
    return figure


def write_sweep_figures(result, path) -> list:
    """Write the sweep's figures (PNG and SVG): curves and root locus (one parameter) or the level
    map (two). Returns the paths written."""
    from latdyn.plots import save_both

    if len(result.axes) == 1:
        return (save_both(sweep_figure(result), path)
                + save_both(root_locus_figure(result), companion_path(path, "root-locus")))
    return save_both(level_map_figure(result), path)


def sweep_figure_paths(path, parameters) -> list:
    """The files :func:`write_sweep_figures` writes for ``path`` and a sweep of ``parameters``
    keys (for the up-front check of the outputs): the figure and, for one parameter, its root locus
    ``OUT-root-locus``, each with its PNG or SVG companion.

    Examples
    --------
    >>> sweep_figure_paths("study.png", 1)
    ['study.png', 'study.svg', 'study-root-locus.png', 'study-root-locus.svg']
    """
    from latdyn.plots import both_paths

    firsts = [path] if parameters != 1 else [path, companion_path(path, "root-locus")]
    return [target for first in firsts for target in both_paths(first)]


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
    from matplotlib.lines import Line2D

    from latdyn.plots.levels import dutch_roll_chart

    criteria = criteria if criteria is not None else result.criteria[0]
    figure = dutch_roll_chart(assessment, criteria, fig=fig)
    panels = [a for a in figure.axes if a.get_xlabel().startswith("undamped")]
    key = figure.axes[-1]
    old = key.get_legend()
    handles, labels = list(old.legend_handles), [t.get_text() for t in old.get_texts()]
    names = [c.name for c in assessment.conditions]
    for item in result.conditions:
        category = item.condition.flight.category
        title = f"Category {category}" if category else "category not given"
        panel = next((p for p in panels if title in p.get_title()), panels[0])
        f = item.figures
        count = len(f.dutch_roll_frequency)
        rng = np.random.default_rng(0)
        pick = rng.choice(count, size=min(points, count), replace=False)
        colour = case_colour(names.index(item.condition.name) if item.condition.name in names else 0)
        panel.scatter(f.dutch_roll_frequency[pick], f.dutch_roll_damping[pick], s=2, alpha=0.25,
                      color=colour, zorder=4, linewidths=0)
        at = labels.index("Levels (guidance only):")
        handles.insert(at, Line2D([], [], marker="o", markersize=4, linestyle="none", alpha=0.5,
                                          color=colour))
        labels.insert(at, plain(f'"{item.condition.name}" samples'))
    key.get_legend().remove()
    key.legend(handles, labels, loc="upper left", bbox_to_anchor=(0.0, 1.0), borderaxespad=0.0, fontsize=7.5,
               frameon=False, title=old.get_title().get_text(), title_fontsize=7.5, alignment="left")
    figure.suptitle(plain(f"Dutch roll under uncertainty ({result.samples} samples): {result.aircraft.name}"),
                    fontsize=TITLE_SIZE, color=TEXT)
    return figure
