"""Roll-performance figure: bank angle against time after the full roll command.

Pedals free (the graded roll) and rudder-coordinated (zero sideslip, shown
for comparison), each requirement's time and bank-angle change marked.  The
levels are guidance only (:data:`latdyn.assessment.NOTICE`, under the figure).
"""

from __future__ import annotations

import math

import numpy as np

from latdyn.plots.style import (LABEL_SIZE, LEVEL_INK, MUTED, PALETTE, SYMBOLS, TEXT, TITLE_SIZE, add_notice,
                                figure_for, key_axis, plain, style_axis)

__all__ = ["roll_performance_figure"]


def roll_performance_figure(roll, requirements=(), title=None, fig=None):
    """Bank angle against time after the full roll command, pedals free and rudder-coordinated.

    Parameters
    ----------
    roll : latdyn.roll_performance.RollResult
    requirements : sequence of (str, float, float, str)
        Label, bank-angle change [rad], time allowed [s] and the result in
        words (:func:`latdyn.roll_performance.roll_requirements`): each drawn as the time and change
        it asks for (the roll meets it where its curve passes the corner's
        left).
    title : str, optional
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    figure = figure_for(fig, 9.2, 4.6)
    axis, key = figure.subplots(1, 2, width_ratios=[1.0, 0.05])
    style_axis(axis)
    t = np.asarray(roll.times)
    limit_time = max([r[2] for r in requirements], default=0.0)
    end = min(float(t[-1]), max(3.0, 1.6 * limit_time))
    keep = t <= end
    rolls = axis.plot(t[keep], np.degrees(roll.bank[keep]), color=PALETTE[0], linewidth=1.8,
                      label="pedals free (graded)")  # the key's entries, kept whatever their names
    if roll.bank_coordinated is not None:
        rolls += axis.plot(t[keep], np.degrees(roll.bank_coordinated[keep]), color=PALETTE[1], linewidth=1.4,
                           linestyle=(0, (5, 2)), label="rudder coordinated (zero sideslip, not graded)")
    for label, change, allowed, result in requirements:
        degrees = math.degrees(change)
        ink = LEVEL_INK.get(int(result[-1]) if result[-1:].isdigit() else 0, TEXT) \
            if result.startswith("Level") else (LEVEL_INK[1] if result == "pass" else LEVEL_INK[4])
        axis.plot([0.0, allowed, allowed], [degrees, degrees, 0.0], color=MUTED, linewidth=0.8,
                  linestyle=":")
        rolls += axis.plot([allowed], [degrees], marker="s", markersize=6, color=ink, linestyle="none",
                           label=plain(f"{label}: {result}"))
    axis.set_xlim(0.0, end)
    axis.set_ylim(bottom=0.0)
    axis.set_xlabel("time after the roll command [s]", fontsize=LABEL_SIZE)
    axis.set_ylabel(f"bank-angle change {SYMBOLS['delta_phi']} [deg]", fontsize=LABEL_SIZE)
    rate = (f" at {math.degrees(roll.aileron_rate):.3g} deg/s" if roll.aileron_rate else ", abrupt")
    axis.set_title(plain(title) if title else f"Roll performance: full aileron {math.degrees(roll.aileron):.3g} deg{rate}",
                   fontsize=TITLE_SIZE, color=TEXT)
    key_axis(key, rolls, "Rolls and requirements\n(marker ink: result, guidance only)")
    add_notice(figure, "Linear model, from wings level; a reversal roll is taken as a bank-angle change "
                       "from wings level.")
    return figure
