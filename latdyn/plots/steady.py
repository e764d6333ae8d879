"""Figures of steady lateral-directional flight.

Per condition, two panels: the rudder, aileron and bank of steady straight
sideslips against sideslip (travel limits, the full-rudder sideslip and the
crosswind limit marked; a top axis gives the 90 deg crosswind component the
sideslip holds), and, with one engine out, the rudder, aileron and sideslip
against calibrated airspeed, wings level and banked toward the operating
engine, with the minimum control speeds and the civil limits marked.

matplotlib is imported inside the functions; figures are made without
pyplot (no global state).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["steady_figure", "sideslip_axes", "engine_out_axes"]

from latdyn.plots.style import GRID as _GRID, MUTED as _MUTED, PALETTE, TEXT as _TEXT, SYMBOLS, plain
from latdyn.units import KNOT as _KNOT

#: One colour per quantity (the style's palette): rudder, aileron, bank, sideslip.
_RUDDER, _AILERON, _BANK, _BETA = PALETTE[1], PALETTE[2], PALETTE[3], PALETTE[0]


def _style(ax):
    ax.grid(True, color=_GRID, linewidth=0.6)
    ax.axhline(0.0, color=_MUTED, linewidth=0.6)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)


def _travel_lines(ax, travel, colour, label):
    if travel:
        for sign in (1, -1):
            ax.axhline(sign * math.degrees(travel), color=colour, linewidth=0.8, linestyle=(0, (2, 2)))
        ax.annotate(f"{label} travel", (0.01, math.degrees(travel)), xycoords=("axes fraction", "data"),
                    ha="left", va="bottom", fontsize=7, color=colour)


def sideslip_axes(ax, result, travel=(None, None)):
    """Draw controls and bank against sideslip for one :class:`latdyn.steady.SteadyResult`."""
    s, c = result.sideslip, result.crosswind
    aileron_max, rudder_max = travel
    top = max(20.0, math.degrees(s.full_rudder_sideslip) * 1.15 if s.full_rudder_sideslip else 0.0)
    beta = np.linspace(0.0, math.radians(min(top, 45.0)), 91)
    ax.plot(np.degrees(beta), np.degrees(s.rudder_per_sideslip * beta), color=_RUDDER, label="rudder")
    ax.plot(np.degrees(beta), np.degrees(s.aileron_per_sideslip * beta), color=_AILERON,
            linestyle=(0, (5, 2)), label="aileron")
    ax.plot(np.degrees(beta), np.degrees(s.bank_per_sideslip * beta), color=_BANK,
            linestyle=(0, (1, 1.5)), label="bank")
    _travel_lines(ax, rudder_max, _RUDDER, "rudder")
    _travel_lines(ax, aileron_max, _AILERON, "aileron")
    if s.full_rudder_sideslip is not None:
        x = math.degrees(s.full_rudder_sideslip)
        ax.axvline(x, color=_TEXT, linewidth=0.9)
        ax.annotate(f"full rudder {x:.1f}\u00b0\n({s.limited_by} limits)", (x, 0.02),
                    xycoords=("data", "axes fraction"), ha="right", va="bottom", fontsize=7,
                    rotation=90, color=_TEXT)
    if c.sideslip is not None:
        x = math.degrees(c.sideslip)
        ax.axvline(x, color=_MUTED, linewidth=0.9, linestyle=(0, (4, 2)))
        ax.annotate(f"crosswind limit {c.max_component / _KNOT:.0f} kt\n({c.limited_by}, "
                    f"{100 * c.roll_control_fraction:.0f} % roll)", (x, 0.98),
                    xycoords=("data", "axes fraction"), ha="right", va="top", fontsize=7, color=_MUTED,
                    bbox=dict(boxstyle="round,pad=0.15", facecolor="white", edgecolor="none", alpha=0.85))
    speed = result.balance.speed
    secondary = ax.secondary_xaxis(
        "top", functions=(lambda b: speed * np.sin(np.radians(np.clip(b, 0, 90))) / _KNOT,
                          lambda w: np.degrees(np.arcsin(np.clip(w * _KNOT / speed, -1, 1)))))
    secondary.set_xlabel("90\u00b0 crosswind component held [kt]", fontsize=8)
    secondary.tick_params(labelsize=7)
    ax.set_xlim(0.0, float(np.degrees(beta[-1])))
    ax.set_xlabel(f"sideslip {SYMBOLS['beta']} [deg] (wind from the right)")
    ax.set_ylabel("deflection, bank [deg]")
    ax.legend(fontsize=7, loc="lower left", frameon=False)
    _style(ax)
    return ax


def engine_out_axes(ax, result, travel=(None, None), altitude=None):
    """Draw the engine-out controls and sideslip against airspeed for one condition."""
    from latdyn.atmosphere import calibrated_airspeed, equivalent_airspeed

    e = result.engine_out
    aileron_max, rudder_max = travel
    if e.wings_level is None:
        ax.text(0.5, 0.5, "engine out not computed:\n" + "\n".join(e.notes), ha="center", va="center",
                fontsize=8, color=_MUTED, transform=ax.transAxes, wrap=True)
        ax.set_axis_off()
        return ax
    speeds = e.wings_level.speeds
    if altitude is not None:
        x = calibrated_airspeed(speeds, altitude) / _KNOT
        word, convert = "calibrated", lambda v: calibrated_airspeed(v, altitude)
    else:
        x = equivalent_airspeed(speeds, result.balance.density) / _KNOT
        word, convert = "equivalent", lambda v: equivalent_airspeed(v, result.balance.density)
    for case, style in ((e.wings_level, (0, (5, 2))), (e.banked, "-")):
        bank = f"{abs(math.degrees(case.bank)):g}\u00b0 bank" if case.bank else "wings level"
        ax.plot(x, np.degrees(case.rudder), color=_RUDDER, linestyle=style, label=f"rudder, {bank}")
        ax.plot(x, np.degrees(case.aileron), color=_AILERON, linestyle=style, label=f"aileron, {bank}")
        ax.plot(x, np.degrees(case.sideslip), color=_BETA, linestyle=style, linewidth=0.9,
                label=f"sideslip, {bank}")
        if case.minimum_control_speed is not None:
            v = float(convert(case.minimum_control_speed)) / _KNOT
            ax.axvline(v, color=_TEXT, linestyle=style, linewidth=0.9)
            ax.annotate(f"{SYMBOLS['V_MC']} {v:.0f} kt ({bank}, {plain(case.limited_by)})", (v, 0.02),
                        xycoords=("data", "axes fraction"), rotation=90, ha="right", va="bottom",
                        fontsize=7, color=_TEXT)
    markers = [float(convert(c.minimum_control_speed)) / _KNOT for c in (e.wings_level, e.banked)
               if c.minimum_control_speed is not None]
    for number, (rule, value) in enumerate(sorted(e.limits.items(), key=lambda item: item[1])):
        v = value / _KNOT
        markers.append(v)
        ax.axvline(v, color=_MUTED, linewidth=0.9, linestyle=(0, (1, 1.5)))
        speed = f"1.2 {SYMBOLS['V_S1']}" if "23" in rule else f"1.13 {SYMBOLS['V_SR']}"
        ax.annotate(f"{speed} ({plain(rule)})", (v, 0.98),
                    xycoords=("data", "axes fraction"), rotation=90, ha="left" if number else "right",
                    va="top", fontsize=7, color=_MUTED)
    _travel_lines(ax, rudder_max, _RUDDER, "rudder")
    _travel_lines(ax, aileron_max, _AILERON, "aileron")
    limit = 2.0 * max(math.degrees(rudder_max or 0.0), math.degrees(aileron_max or 0.0), 10.0)
    ax.set_ylim(-limit, limit)
    markers.append(float(convert(result.balance.speed)) / _KNOT)
    ax.set_xlim(max(float(x[0]), 0.6 * min(markers)), min(float(x[-1]), 1.4 * max(markers)))
    ax.set_xlabel(plain(f"{word} airspeed [kt], \u201c{e.failed_engine}\u201d engine failed"))
    ax.set_ylabel("deflection, sideslip [deg]")
    ax.legend(fontsize=6.5, loc="upper right", frameon=False, ncol=2)
    _style(ax)
    return ax


def steady_figure(cases, figure=None):
    """One row of two panels per condition.

    Parameters
    ----------
    cases : sequence of (Aircraft, SteadyResult)
    figure : matplotlib.figure.Figure, optional

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure

    from latdyn.assessment import NOTICE
    from latdyn.steady import HELD_NOTE, control_travel

    n = max(len(cases), 1)
    if figure is None:
        figure = Figure(figsize=(11.0, 3.9 * n + 0.8), layout="constrained")
    axes = figure.subplots(n, 2, squeeze=False)
    for row, (aircraft, result) in enumerate(cases):
        condition = aircraft.condition(result.condition)
        travel = control_travel(condition)
        sideslip_axes(axes[row, 0], result, travel)
        engine_out_axes(axes[row, 1], result, travel, condition.flight.altitude)
        axes[row, 0].set_title(plain(f"{aircraft.name}: \u201c{result.condition}\u201d, steady sideslips"),
                               fontsize=9, loc="left")
        axes[row, 1].set_title("one engine out (non-dimensional derivatives held)", fontsize=9,
                               loc="left")
    figure.suptitle(f"Engine out: {HELD_NOTE}.\n{NOTICE}", fontsize=7, color=_MUTED)
    return figure
