"""Handling-qualities charts: the modes placed against the level bands.

* :func:`dutch_roll_chart`: damping ratio against undamped natural frequency,
  with the level regions of one criteria set for each class and category
  (one panel per category present) and every condition's Dutch roll point;
* :func:`roll_spiral_chart`: roll time constant and spiral time to double of
  each condition against that condition's limits, as banded strips;
* :func:`s_plane_map`: every root of every condition.

The regions are computed by the assessment's own array functions on a grid
(:func:`latdyn.levels.dutch_roll_grades`), so the picture and the table
cannot disagree.  Every figure carries the guidance-only notice.

Each function draws into a given figure (``fig=``; a new one by default) or
axis (``ax=``) and returns the Figure; saving is separate
(:func:`latdyn.plots.save_both`, :func:`write_assessment_figures`).
matplotlib is imported inside the functions and no pyplot is used; the style
is :mod:`latdyn.plots.style`.
"""

from __future__ import annotations

import os

import numpy as np

from latdyn.plots import save_both
from latdyn.plots.style import (CONFIGURATION_MARKERS, GRID, LABEL_SIZE, LEVEL_COLOURS, LEVEL_INK,
                                MODE_MARKERS, MUTED, PALETTE, RULE, SYMBOLS, TEXT, TICK_SIZE, TITLE_SIZE, UNDECIDED,
                                add_notice, axis_label, case_colour, configuration_style, figure_for,
                                key_axis, level_handles, plain, style_axis)

__all__ = ["LEVEL_COLOURS", "LEVEL_INK", "dutch_roll_chart", "roll_spiral_chart", "s_plane_map",
           "write_assessment_figures", "assessment_figure_paths"]


#: Ring round a variant's point that is graded worse than the base's in the same condition.
_LOSS = dict(marker="o", markersize=16, markerfacecolor="none", markeredgecolor=LEVEL_INK[4], markeredgewidth=1.4,
             linestyle="none", zorder=7)
#: Line styles of the damping limits of a pass/fail set (one per row of the set).
_LIMIT_STYLES = ("-", (0, (5, 2)), (0, (1, 1.5)), (0, (6, 2, 1, 2)))


def _level_words(level):
    from latdyn.assessment import level_words

    return level_words(int(level))


def _level_sets(result):
    return [c for c in result.criteria if c.assessment == "levels" and c.mode("dutch_roll")]


def _dutch_roll_grid(criteria, airplane_class, category, omega, zeta):
    """Level on a grid for one class/category; 0 where the unknown class/category matters."""
    from latdyn.criteria_sets import CATEGORIES, CLASSES
    from latdyn.levels import dutch_roll_grades, select_bands

    classes = [airplane_class] if airplane_class else list(CLASSES)
    categories = [category] if category else list(CATEGORIES)
    grids = []
    for cls in classes:
        for cat in categories:
            selection = select_bands(criteria, "dutch_roll", cls, cat)
            if selection.undefined:
                continue
            grades = dutch_roll_grades(zeta, omega, np.zeros_like(zeta), selection.limits)
            grids.append(grades.level)
    if not grids:
        return np.zeros(zeta.shape, int)
    stack = np.stack(grids)
    same = np.all(stack == stack[0], axis=0)
    return np.where(same, stack[0], 0)


def _exact_boundaries(axis, criteria, airplane_class, category, omega_top, zeta_top):
    """Draw each level's Dutch roll boundary from its equation; False when it is not one curve.

    The boundary of a band is zeta_d = max(zeta_min, (zeta omega)_min / omega_nd) (capped
    where the criteria cap the damping required) for omega_nd above omega_min, and the
    vertical omega_nd = omega_min: a hyperbola joined to a horizontal line, drawn on a
    fine geometric grid instead of read off the level grid.
    """
    from latdyn.levels import select_bands

    if not airplane_class or not category:
        return False  # the regions depend on a class or category that is not given
    selection = select_bands(criteria, "dutch_roll", airplane_class, category)
    if selection.undefined:
        return False
    limits = selection.limits
    least_zeta = np.atleast_1d(np.asarray(limits.min_damping_ratio, float))
    least_product = np.atleast_1d(np.asarray(limits.min_zeta_omega, float))
    least_omega = np.atleast_1d(np.asarray(limits.min_natural_frequency, float))
    cap = float(limits.damping_ratio_cap)
    for grade in range(least_zeta.shape[-1]):
        start = least_omega[grade] if np.isfinite(least_omega[grade]) else 0.0
        omega = np.geomspace(max(start, 1e-3 * omega_top), omega_top, 800)
        zeta = np.full(omega.shape, -np.inf)
        if np.isfinite(least_zeta[grade]):
            zeta = np.fmax(zeta, least_zeta[grade])
        if np.isfinite(least_product[grade]):
            zeta = np.fmax(zeta, least_product[grade] / omega)
        if np.isfinite(cap):
            zeta = np.fmin(zeta, cap)
        if np.all(np.isfinite(zeta)):
            axis.plot(omega, np.minimum(zeta, 2.0 * zeta_top), color=MUTED, linewidth=0.9, zorder=3)
        if start > 0.0:
            bottom = zeta[0] if np.isfinite(zeta[0]) else -1.0
            axis.plot([start, start], [bottom, 2.0 * zeta_top], color=MUTED, linewidth=0.9, zorder=3)
    return True


def _label_regions(axis, level, extent, size):
    """Write each region's level in words at its most interior point where the words fit.

    ``size`` (width, height) [in]: the panel's size once laid out; it sets how
    many grid cells the words cover.  A region too small for its words
    stays unlabelled (the key names its colour).
    """
    from scipy.ndimage import binary_erosion, distance_transform_edt

    x0, x1, y0, y1 = extent
    rows, cols = level.shape
    width, height = size
    for value in (1, 2, 3, 4):
        mask = level == value
        if not mask.any():
            continue
        words = _level_words(value)
        half_cols = int(np.ceil(0.5 * len(words) * 0.68 * 9 / 72 / width * cols)) + 1
        half_rows = int(np.ceil(0.5 * 1.4 * 9 / 72 / height * rows)) + 1
        fits = binary_erosion(mask, structure=np.ones((2 * half_rows + 1, 2 * half_cols + 1), bool),
                              border_value=0)
        if not fits.any():
            continue
        padded = np.pad(mask, 1, constant_values=False)
        distance = distance_transform_edt(padded)[1:-1, 1:-1]
        distance[~fits] = 0.0
        i, j = np.unravel_index(np.argmax(distance), mask.shape)
        x = x0 + (j + 0.5) / cols * (x1 - x0)
        y = y0 + (i + 0.5) / rows * (y1 - y0)
        axis.text(x, y, words, ha="center", va="center", fontsize=9, weight="bold",
                  color=LEVEL_INK[value], alpha=0.85)


def _dutch_points(assessment, criteria):
    """(condition, Dutch roll mode, its assessment entry) of every condition with a Dutch roll pair."""
    points = []
    for condition in assessment.conditions:
        mode = condition.modes.get("dutch_roll") if condition.modes is not None else None
        if mode is None or mode.natural_frequency is None or mode.damping_ratio is None:
            continue
        entry = next((a for a in condition.assessments
                      if a.criteria == criteria.name and a.mode == "dutch_roll"), None)
        points.append((condition, mode, entry))
    return points


def dutch_roll_chart(result, criteria=None, fig=None, resolution=360, variants=()):
    """Dutch roll damping ratio against natural frequency, with the level regions.

    One panel per flight-phase category among the conditions; each shows
    the regions of ``criteria`` for the aircraft's class and that category
    (computed without the omega^2 |phi/beta| rule; points where the rule
    raises the boundary are flagged) and the Dutch roll of each condition
    of that category.  For a pass/fail set the damping limits are drawn as
    lines.  Variants (other configurations of the aircraft) are drawn on the
    same panels, each configuration in its own colour (and, where one
    condition is shown, its own marker; else the marker tells the
    conditions apart), the base open, with an
    arrow from the base to the variant where a condition of the same name
    exists in both; the legend gives each point's level.  A key of the level
    colours says the levels are guidance only.

    Parameters
    ----------
    result : latdyn.assessment.AircraftAssessment
        The base configuration.
    criteria : CriteriaSet, optional
        Default: the first levels set of the assessment, else its first set.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.
    resolution : int
        Grid points per axis of the regions [-].
    variants : sequence of latdyn.assessment.AircraftAssessment
        Other configurations, assessed against the same criteria set.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.colors import ListedColormap
    from matplotlib.lines import Line2D

    sets = _level_sets(result)
    if criteria is None:
        criteria = sets[0] if sets else next(c for c in result.criteria if c.mode("dutch_roll"))
    configurations = [result, *variants]
    points = [(k, *item) for k, assessment in enumerate(configurations)
              for item in _dutch_points(assessment, criteria)]
    condition_names = list(dict.fromkeys(c.name for _, c, _, _ in points))
    base_names = [c.name for c in result.conditions]
    pass_fail = criteria.assessment != "levels"
    categories = ["all"] if pass_fail else (list(dict.fromkeys(c.category for _, c, _, _ in points)) or [None])
    omega_top = max([3.0] + [1.15 * m.natural_frequency for _, _, m, _ in points])
    zeta_top = max([0.6] + [1.15 * m.damping_ratio for _, _, m, _ in points])
    zeta_bottom = min([-0.1] + [m.damping_ratio - 0.05 for _, _, m, _ in points])
    figure = figure_for(fig, max(4.6 * len(categories) + 3.4, 8.4), 5.6)
    regions = []
    *axes, key = figure.subplots(1, len(categories) + 1, squeeze=False,
                                 width_ratios=[1.0] * len(categories) + [0.05])[0]
    omega_axis = np.linspace(0.0, omega_top, resolution)
    zeta_axis = np.linspace(zeta_bottom, zeta_top, resolution)
    omega_grid, zeta_grid = np.meshgrid(omega_axis, zeta_axis)
    extent = (0.0, omega_top, zeta_bottom, zeta_top)
    flagged, shown_levels, undecided, losses = [], set(), False, False
    handles = []
    for axis, category in zip(axes, categories):
        style_axis(axis)
        if criteria.assessment == "levels":
            level = _dutch_roll_grid(criteria, result.airplane_class, category, omega_grid, zeta_grid)
            colours = ListedColormap([UNDECIDED] + [LEVEL_COLOURS[k] for k in (1, 2, 3, 4)])
            axis.imshow(level, origin="lower", extent=extent, aspect="auto", cmap=colours,
                        vmin=-0.5, vmax=4.5, interpolation="nearest")
            if not _exact_boundaries(axis, criteria, result.airplane_class, category, omega_top,
                                     zeta_top):
                axis.contour(omega_grid, zeta_grid, level, levels=[0.5, 1.5, 2.5, 3.5], colors=MUTED,
                             linewidths=0.7)
            regions.append((axis, level))
            shown_levels |= {int(v) for v in np.unique(level) if v > 0}
            undecided = undecided or bool((level == 0).any())
        else:
            entry = criteria.mode("dutch_roll")
            for number, band in enumerate(entry.bands):
                limit = band.limit("min_damping_ratio")
                if limit is not None:
                    style = _LIMIT_STYLES[number % len(_LIMIT_STYLES)]
                    line = axis.axhline(limit, color=RULE, linewidth=1.1, linestyle=style)
                    if axis is axes[0]:
                        line.set_label(plain(f"{band.row}: ") + f"{SYMBOLS['zeta_d']} = {limit:.4g}")
                        handles.append(line)
            axis.axhspan(zeta_bottom, 0.0, color=LEVEL_COLOURS[4], alpha=0.5, linewidth=0)
            shown_levels |= {1, 4}
        axis.axhline(0.0, color=RULE, linewidth=0.8)
        for k, condition, mode, entry in points:
            if not pass_fail and condition.category != category:
                continue
            style = configuration_style(k)
            # one condition: each configuration its marker (as on the roll/spiral chart); several: the
            # marker tells the conditions apart and the colour the configurations
            marker = style["marker"] if len(configurations) == 1 or len(condition_names) == 1 else \
                CONFIGURATION_MARKERS[condition_names.index(condition.name) % len(CONFIGURATION_MARKERS)]
            colour = case_colour(base_names.index(condition.name)) if len(configurations) == 1 \
                else style["color"]
            words = entry.result if entry is not None else "not assessed"
            label = plain((f"{configurations[k].aircraft}: " if len(configurations) > 1 else "")
                          + f'"{condition.name}" ({words})')
            handle, = axis.plot(mode.natural_frequency, mode.damping_ratio, marker=marker, markersize=7.5,
                                markerfacecolor="white" if k == 0 else colour, markeredgecolor=colour,
                                markeredgewidth=1.6, linestyle="none", zorder=6)
            handles.append(Line2D([], [], marker=marker, markersize=7, linestyle="none",
                                  markerfacecolor="white" if k == 0 else colour, markeredgecolor=colour,
                                  markeredgewidth=1.6, label=label))
            if k > 0:
                base = next(((m, e) for j, c, m, e in points
                             if j == 0 and c.name == condition.name and c.category == condition.category), None)
                if base is not None:
                    axis.annotate("", (mode.natural_frequency, mode.damping_ratio),
                                  xytext=(base[0].natural_frequency, base[0].damping_ratio),
                                  arrowprops=dict(arrowstyle="-|>", color=colour, linewidth=0.9,
                                                  shrinkA=5, shrinkB=5), zorder=5)
                    if entry is not None and base[1] is not None and entry.severity > base[1].severity > 0:
                        axis.plot(mode.natural_frequency, mode.damping_ratio, **_LOSS)
                        losses = True
            rule = criteria.mode("dutch_roll").phi_to_beta_rule
            if rule and mode.phi_to_beta is not None and \
                    mode.natural_frequency ** 2 * mode.phi_to_beta > rule.threshold:
                flagged.append(plain(condition.name))
        axis.set_xlim(0.0, omega_top)
        axis.set_ylim(zeta_bottom, zeta_top)
        axis.set_xlabel(axis_label("undamped natural frequency", "omega_nd", "rad/s"), fontsize=LABEL_SIZE,
                        color=TEXT)
        axis.set_ylabel(axis_label("damping ratio", "zeta_d", "-"), fontsize=LABEL_SIZE, color=TEXT)
        if pass_fail:
            axis.set_title("every condition", fontsize=9.5, color=TEXT)
        else:
            heading = f"Category {category}" if category else "category not given"
            cls = f"Class {result.airplane_class}" if result.airplane_class else "class not given"
            axis.set_title(plain(f"{cls}, {heading}"), fontsize=9.5, color=TEXT)
    title = plain(f"Dutch roll: {result.aircraft}") + ("" if not variants else " and its variants") + \
        "\n" + plain(f"{criteria.name}: {criteria.edition}")
    figure.suptitle(title, fontsize=TITLE_SIZE, color=TEXT)
    if losses:
        handles.append(Line2D([], [], label="worse than the base (loses a level or a pass)", **_LOSS))
    handles += level_handles(sorted(shown_levels) or (1, 2, 3, 4), undecided=undecided, pass_fail=pass_fail)
    key_axis(key, handles, "Configuration: condition (result)" if len(configurations) > 1
             else "Condition (result)")
    extra = None
    if criteria.mode("dutch_roll").phi_to_beta_rule:
        extra = f"Regions drawn for {SYMBOLS['omega2_phi_beta']} below the rule's threshold."
        if flagged:
            extra += (" At " + ", ".join(flagged) + " it is above: the damping boundaries of that point lie "
                      "higher than drawn (see the table).")
    add_notice(figure, extra)
    if regions:
        figure.draw_without_rendering()  # lays the figure out: the panels' sizes are known
        for axis, level in regions:
            _label_regions(axis, level, extent, (axis.bbox.width / figure.dpi, axis.bbox.height / figure.dpi))
    return figure


#: Height of a band on a roll/spiral strip [row units] and the height each configuration's
#: marker line adds to a row [in].
_BAND_HEIGHT = 0.62
_LINE_HEIGHT = 0.26


def _strip(axis, rows, title, xlabel, log_floor, log_ceiling, configurations):
    """Banded strips: per condition its level bands along x and each configuration's value as a
    marker on its own line within the band (the base first), annotated with value and result."""
    axis.set_xscale("log")
    lines = max(configurations, 1)
    spacing = _BAND_HEIGHT / lines
    middle = np.sqrt(log_floor * log_ceiling)
    for y, row in enumerate(rows):
        edges = row["limits"]
        if edges is not None:
            if row["sense"] < 0:           # maximum: Level 1 from 0 to L1, ...
                bounds = [log_floor] + list(edges) + [log_ceiling]
                levels = (1, 2, 3, 4)
            else:                          # minimum: beyond from 0 to L3, ..., Level 1 above L1
                bounds = [log_floor] + list(edges[::-1]) + [log_ceiling]
                levels = (4, 3, 2, 1)
            for (lo, hi), level in zip(zip(bounds[:-1], bounds[1:]), levels):
                axis.barh(y, hi - lo, left=lo, height=_BAND_HEIGHT, color=LEVEL_COLOURS[level],
                          edgecolor="white", linewidth=0.8)
        for point in row["points"]:
            k = point["configuration"]
            style = configuration_style(k)
            at = y + (k - (lines - 1) / 2) * spacing
            value = point["value"]
            if value is None:
                axis.text(log_ceiling * 0.9, at, point["text"], ha="right", va="center", fontsize=7,
                          color=style["color"], weight="bold")
                continue
            shown = min(max(value, log_floor * 1.05), log_ceiling * 0.95)
            axis.plot(shown, at, marker=style["marker"], markersize=6.5, linestyle="none",
                      markerfacecolor="white" if k == 0 else style["color"], markeredgecolor=style["color"],
                      markeredgewidth=1.4, zorder=5)
            if point["loses"]:
                axis.plot(shown, at, **dict(_LOSS, markersize=12))
            right = shown <= middle
            axis.annotate(f"{value:.3g} s  {point['result']}", (shown, at), xytext=(9 if right else -9, 0),
                          textcoords="offset points", ha="left" if right else "right", va="center",
                          fontsize=7, color=TEXT)
    axis.set_yticks(range(len(rows)), [r["label"] for r in rows], fontsize=8)
    axis.set_ylim(-0.6, len(rows) - 0.4)
    axis.invert_yaxis()
    axis.set_xlim(log_floor, log_ceiling)
    axis.set_xlabel(xlabel, fontsize=LABEL_SIZE, color=TEXT)
    axis.set_title(title, fontsize=9.5, color=TEXT)
    axis.grid(True, axis="x", which="both", color=GRID, linewidth=0.4, alpha=0.6)
    axis.tick_params(colors=TEXT, labelsize=TICK_SIZE, length=3)
    for side in ("top", "right"):
        axis.spines[side].set_visible(False)


def _roll_spiral_rows(configurations, criteria):
    """Rows of the roll and spiral strips: one per condition name (the base's first), each with
    the base's bands and every configuration's value, result and whether it is worse than the base's."""
    from latdyn.levels import select_bands

    names = list(dict.fromkeys(c.name for assessment in configurations for c in assessment.conditions))
    strips = {"roll_subsidence": [], "spiral": []}
    for name in names:
        found = [(k, next((c for c in a.conditions if c.name == name), None)) for k, a in enumerate(configurations)]
        found = [(k, c) for k, c in found if c is not None]
        owner_index, owner = found[0]
        airplane_class = configurations[owner_index].airplane_class
        label = plain(f"{name} ({owner.category or '?'})")
        for mode_name, key in (("roll_subsidence", "max_time_constant"), ("spiral", "min_time_to_double")):
            edges = None
            if owner.category and airplane_class and criteria.mode(mode_name):
                selection = select_bands(criteria, mode_name, airplane_class, owner.category)
                if not selection.undefined:
                    edges = tuple(float(v) for v in getattr(selection.limits, key))
            points, base_entry = [], None
            for k, condition in found:
                entry = next((a for a in condition.assessments
                              if a.criteria == criteria.name and a.mode == mode_name), None)
                if k == 0:
                    base_entry = entry
                mode = condition.modes.get(mode_name) if condition.modes is not None else None
                if mode is None:
                    value, text = None, "coupled roll-spiral"
                elif mode_name == "roll_subsidence":
                    value = mode.time_constant
                    text = "divergent" if value is None else ""
                else:
                    value = mode.time_to_double
                    text = "convergent" if value is None else ""
                loses = (k > 0 and entry is not None and base_entry is not None
                         and entry.severity > base_entry.severity > 0)
                points.append({"configuration": k, "value": value, "text": text,
                               "result": entry.result if entry else "", "loses": loses})
            strips[mode_name].append({"label": label, "limits": edges, "points": points,
                                      "sense": -1 if mode_name == "roll_subsidence" else 1})
    return strips["roll_subsidence"], strips["spiral"]


def roll_spiral_chart(result, criteria=None, fig=None, variants=()):
    """Roll time constant and spiral time to double of each condition against its limits.

    One row per condition: the level bands of its class and category as a
    strip, and the value of each configuration as a marker on its own line
    within the strip, annotated with the value and the result.  Variants
    (other configurations of the aircraft) are drawn as on the Dutch roll
    chart (:func:`dutch_roll_chart`): each configuration in its colour and
    marker (:func:`latdyn.plots.style.configuration_style`), the base open,
    the variants filled, a variant graded worse than the base in the same
    condition ringed; the key names the configurations and the level colours
    (guidance only).

    Parameters
    ----------
    result : latdyn.assessment.AircraftAssessment
        The base configuration.
    criteria : CriteriaSet, optional
        A levels set with roll and spiral bands; default the first one.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.
    variants : sequence of latdyn.assessment.AircraftAssessment
        Other configurations, assessed against the same criteria set; their
        conditions are matched to the base's by name.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.lines import Line2D

    if criteria is None:
        criteria = next(c for c in result.criteria if c.assessment == "levels" and c.mode("spiral"))
    configurations = [result, *variants]
    roll_rows, spiral_rows = _roll_spiral_rows(configurations, criteria)
    count = len(configurations)
    row_height = max(0.55, 0.2 + _LINE_HEIGHT * count)
    figure = figure_for(fig, 11.4 if variants else 10.4, 1.9 + row_height * max(len(roll_rows), 1) + 0.9)
    left, right, key = figure.subplots(1, 3, width_ratios=[1.0, 1.0, 0.05])
    _strip(left, roll_rows, f"Roll mode: time constant {SYMBOLS['T_R']}",
           axis_label("roll time constant", "T_R", "s") + " (shorter is better)", 0.02, 30.0, count)
    _strip(right, spiral_rows, f"Spiral: time to double {SYMBOLS['T_2']} (divergent spiral)",
           axis_label("spiral time to double", "T_2", "s") + " (longer is better)", 1.0, 1000.0, count)
    handles = []
    for k, assessment in enumerate(configurations):
        style = configuration_style(k)
        handles.append(Line2D([], [], marker=style["marker"], markersize=7, linestyle="none",
                              markerfacecolor="white" if k == 0 else style["color"],
                              markeredgecolor=style["color"], markeredgewidth=1.4,
                              label=plain(assessment.aircraft) + (" (base)" if k == 0 and variants else "")))
    if any(p["loses"] for row in roll_rows + spiral_rows for p in row["points"]):
        handles.append(Line2D([], [], label="worse than the base (loses a level)", **dict(_LOSS, markersize=12)))
    handles += level_handles()
    key_axis(key, handles, "Configuration" if variants else None)
    cls = f"Class {result.airplane_class}" if result.airplane_class else "class not given (no bands drawn)"
    title = plain(f"Roll and spiral modes: {result.aircraft}") + (" and its variants" if variants else "")
    figure.suptitle(title + plain(f", {cls}\n{criteria.name}: {criteria.edition}"), fontsize=TITLE_SIZE,
                    color=TEXT)
    add_notice(figure)
    return figure


def s_plane_map(result, ax=None):
    """Every root of every condition in the complex plane (symmetric-log real axis).

    Parameters
    ----------
    result : latdyn.assessment.AircraftAssessment
    ax : matplotlib.axes.Axes, optional
        Draw on this axis (of the caller's figure); default a new figure.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.lines import Line2D

    from latdyn.modes import MODE_LABELS

    if ax is None:
        figure = figure_for(None, 8.4, 6.0)
        axis = figure.subplots()
    else:
        axis, figure = ax, ax.figure
    style_axis(axis)
    top = 1.0
    reals = [0.1]
    for index, condition in enumerate(result.conditions):
        colour = case_colour(index)
        if condition.modes is None:
            continue
        for mode in condition.modes:
            roots = [complex(r) for r in mode.eigenvalues]
            if len(roots) == 2 and roots[0].imag != 0:
                roots = [roots[0], roots[0].conjugate()]
            for root in roots:
                axis.plot(root.real, root.imag, marker=MODE_MARKERS[mode.name], linestyle="none",
                          markersize=7, markerfacecolor=colour, markeredgecolor="white", alpha=0.9)
                top = max(top, abs(root.imag))
                reals.append(abs(root.real))
    span = max(reals) * 1.3
    axis.set_xscale("symlog", linthresh=0.1)
    axis.set_xlim(-span, max(0.5, 0.05 * span))
    axis.set_ylim(-1.15 * top, 1.15 * top)
    axis.axvspan(0.0, max(0.5, 0.05 * span), color=LEVEL_COLOURS[4], alpha=0.45, linewidth=0)
    axis.text(0.99, 0.98, "unstable", transform=axis.transAxes, ha="right", va="top", fontsize=8,
              color=LEVEL_INK[4])
    axis.axvline(0.0, color=RULE, linewidth=0.8)
    axis.axhline(0.0, color=RULE, linewidth=0.8)
    axis.set_xlabel("real part [1/s] (symmetric log scale, linear within \u00b10.1)", fontsize=LABEL_SIZE, color=TEXT)
    axis.set_ylabel("imaginary part [rad/s]", fontsize=LABEL_SIZE, color=TEXT)
    handles = [Line2D([], [], marker=m, linestyle="none", color=PALETTE[5], label=MODE_LABELS[name])
               for name, m in MODE_MARKERS.items()]
    handles += [Line2D([], [], marker="o", linestyle="none", color=case_colour(i),
                       label=plain(c.name)) for i, c in enumerate(result.conditions)]
    axis.legend(handles=handles, fontsize=7.5, frameon=False, loc="upper left")
    title = plain(f"Roots of every condition: {result.aircraft}")
    if ax is None:
        figure.suptitle(title, fontsize=TITLE_SIZE, color=TEXT)
    else:
        axis.set_title(title, fontsize=TITLE_SIZE, color=TEXT)
    add_notice(figure)
    return figure


def write_assessment_figures(result, folder, used=None) -> list:
    """Write the Dutch roll chart (one per criteria set), the roll/spiral chart and the s-plane map.

    Files: ``<aircraft>-dutch-roll-<set>``, ``<aircraft>-roll-spiral-<set>``
    and ``<aircraft>-s-plane``, each as .png and .svg, in ``folder``; the
    names are safe slugs of the aircraft file's name (or the aircraft's) and
    the set's (:func:`latdyn.text.file_name`), numbered where they collide.

    Parameters
    ----------
    result : latdyn.assessment.AssessmentResult
    folder : str
    used : set of str, optional
        File names (without suffix) taken already in ``folder``; the new ones are added.

    Returns
    -------
    list of str
        The paths written.
    """
    written = []
    for (chart, criteria), path in assessment_figure_paths(result.file, result.aircraft, result.criteria, folder,
                                                            used):
        if chart == "dutch-roll":
            written += save_both(dutch_roll_chart(result, criteria), path)
        elif chart == "roll-spiral":
            written += save_both(roll_spiral_chart(result, criteria), path)
        else:
            written += save_both(s_plane_map(result), path)
    return written


def assessment_figure_paths(file, aircraft, criteria_sets, folder, used=None) -> list:
    """The figures :func:`write_assessment_figures` draws, with the PNG path of each (the SVG
    beside it), named as that function describes; known before the assessment is computed.

    Parameters
    ----------
    file : str or None
        The aircraft file (its name gives the figures' names), else ``aircraft`` does.
    aircraft : str
        The aircraft's name.
    criteria_sets : sequence of CriteriaSet
    folder : str
    used : set of str, optional
        File names taken already in ``folder``; the new ones are added.

    Returns
    -------
    list of ((str, CriteriaSet or None), str)
        ``(("dutch-roll" | "roll-spiral" | "s-plane", criteria set), path)`` in drawing order.
    """
    from latdyn.text import file_name, numbered, slug

    used = set() if used is None else used
    stem = os.path.splitext(os.path.basename(file))[0] if file else aircraft
    name = slug(stem, default="aircraft")

    def path(*words):
        return os.path.join(folder, numbered(file_name(name, *words), used) + ".png")

    charts = [(("dutch-roll", c), path("dutch-roll", c.name)) for c in criteria_sets if c.mode("dutch_roll")]
    charts += [(("roll-spiral", c), path("roll-spiral", c.name)) for c in criteria_sets
               if c.assessment == "levels" and c.mode("spiral") and c.mode("roll_subsidence")]
    return charts + [(("s-plane", None), path("s-plane"))]
