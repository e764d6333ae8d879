"""One style for every figure: colours, markers, type sizes, the figure factory, axis
styling and the guidance-only notice.

Figures are ``matplotlib.figure.Figure`` objects made without pyplot, so
drawing one touches no global matplotlib state (no backend switch, no open
figure list); they are saved through their own canvas
(:func:`latdyn.plots.save_figure`).  matplotlib is imported inside the
functions.
"""

from __future__ import annotations

import textwrap

__all__ = ["TEXT", "MUTED", "GRID", "BAND", "RULE", "UNDECIDED", "LEVEL_COLOURS", "LEVEL_INK",
           "PALETTE", "MODE_MARKERS", "MODE_NAMES", "INPUT_COLOURS", "INPUT_STYLES", "TITLE_SIZE",
           "LABEL_SIZE", "TICK_SIZE", "NOTE_SIZE", "new_figure", "figure_for", "style_axis",
           "add_notice", "case_colour"]

#: Ink of titles, labels and tick labels.
TEXT = "#1f2933"
#: Ink of notes and secondary lines.
MUTED = "#6b7780"
#: Grid lines.
GRID = "#d5dae0"
#: Shaded bands (controls moving).
BAND = "#eef1f4"
#: Zero lines and axes of the s-plane.
RULE = "#3d4550"
#: Region whose level depends on something not given.
UNDECIDED = "#e4e6ea"
#: Region fills by level (1, 2, 3, 4 = beyond Level 3): sage, straw, apricot, rose.
LEVEL_COLOURS = {1: "#d3e9d6", 2: "#f2e4b8", 3: "#f2c9a9", 4: "#e8aeae"}
#: Darker ink of the same hues for labels.
LEVEL_INK = {1: "#2f6b3c", 2: "#7a6318", 3: "#8a4b20", 4: "#8c2f2f"}
#: Case colours, in order (deep blue, burnt orange, sea green, violet, ochre, slate, raspberry).
PALETTE = ("#1d3557", "#b5532b", "#2a7f72", "#7b4f9d", "#a8842a", "#4f5d6b", "#c2417a")
#: Marker of each mode.
MODE_MARKERS = {"dutch_roll": "o", "roll_subsidence": "s", "spiral": "^", "roll_spiral": "D"}
#: Mode names in running text (legends).
MODE_NAMES = {"dutch_roll": "Dutch roll", "roll_subsidence": "roll subsidence", "spiral": "spiral",
              "roll_spiral": "roll-spiral"}
#: Control traces.
INPUT_COLOURS = {"aileron": "#2a7f72", "rudder": "#b5532b"}
INPUT_STYLES = {"aileron": (0, (5, 2)), "rudder": "-"}
#: Type sizes [pt].
TITLE_SIZE, LABEL_SIZE, TICK_SIZE, NOTE_SIZE = 10.5, 8.5, 8, 7


def case_colour(index) -> str:
    """The colour of the ``index``-th case (cycling through :data:`PALETTE`)."""
    return PALETTE[index % len(PALETTE)]


def new_figure(width, height):
    """A new figure [in] with the constrained layout, made without pyplot."""
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height), layout="constrained")


def figure_for(fig, width, height):
    """``fig`` cleared for a new drawing, or a new figure of the given size when None."""
    if fig is None:
        return new_figure(width, height)
    fig.clear()
    return fig


def style_axis(axis, zero_line=False):
    """Light grid below the data, no top and right spines, small dark tick labels."""
    axis.grid(True, color=GRID, linewidth=0.6)
    axis.set_axisbelow(True)
    for side in ("top", "right"):
        axis.spines[side].set_visible(False)
    for side in ("left", "bottom"):
        axis.spines[side].set_color(MUTED)
    axis.tick_params(colors=TEXT, labelsize=TICK_SIZE, length=3)
    if zero_line:
        axis.axhline(0.0, color=MUTED, linewidth=0.6, zorder=1)


def add_notice(figure, extra=None):
    """The guidance-only notice (:data:`latdyn.assessment.NOTICE`) under the figure, inside the
    layout so that nothing overlaps it; ``extra`` (a note on the figure) above it."""
    from latdyn.assessment import NOTICE

    width = max(60, int(figure.get_figwidth() * 15))      # characters per line at 7 pt
    lines = (textwrap.wrap(extra, width) if extra else []) + textwrap.wrap(NOTICE, width)
    figure.supxlabel("\n".join(lines), fontsize=NOTE_SIZE, color=MUTED, style="italic")
