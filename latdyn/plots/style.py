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
           "add_notice", "case_colour", "SYMBOLS", "MODE_COLOURS", "CONFIGURATION_MARKERS", "CURRENT",
           "plain", "unit_text", "level_handles", "key_axis", "mark_current", "axis_label", "configuration_style"]

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
              "roll_spiral": "roll-spiral", "roll_performance": "roll performance"}
#: Colour of each mode's figures in study figures (one meaning per colour in a figure).
MODE_COLOURS = {"dutch_roll": PALETTE[0], "roll_subsidence": PALETTE[2], "spiral": PALETTE[4],
                "roll_spiral": PALETTE[3], "roll_performance": PALETTE[1]}
#: Control traces: greys told apart by line style, so that no case colour means a control.
INPUT_COLOURS = {"aileron": "#5c6670", "rudder": "#20262d"}
INPUT_STYLES = {"aileron": (0, (5, 2)), "rudder": "-"}
#: Marker of each configuration on a chart (base first, then the variants).
CONFIGURATION_MARKERS = ("o", "s", "D", "^", "v", "P", "X")
#: The current design on study figures: a black star with a white edge.
CURRENT = dict(marker="*", markersize=13, markerfacecolor="#111111", markeredgecolor="white",
               markeredgewidth=0.9, linestyle="none", zorder=8)
#: The trade's symbols, typeset by matplotlib's mathtext (our fixed strings only; text from
#: input files goes through :func:`plain`).
SYMBOLS = {
    "beta": r"$\beta$", "p": r"$p$", "r": r"$r$", "phi": r"$\phi$", "psi": r"$\psi$", "ny": r"$n_y$",
    "delta": r"$\delta$", "omega": r"$\omega$", "zeta": r"$\zeta$",
    "omega_nd": r"$\omega_{nd}$", "zeta_d": r"$\zeta_d$", "zeta_rs": r"$\zeta_{RS}$",
    "omega_rs": r"$\omega_{RS}$", "T_R": r"$T_R$", "T_2": r"$T_2$", "T_s": r"$T_S$",
    "phi_beta": r"$|\phi/\beta|_d$", "omega2_phi_beta": r"$\omega_{nd}^2\,|\phi/\beta|_d$",
    "zeta_omega": r"$\zeta_d\,\omega_{nd}$", "sigma_v": r"$\sigma_v$", "L_v": r"$L_v$",
    "P": r"$P$", "delta_phi": r"$\Delta\phi$", "delta_a": r"$\delta_a$", "delta_r": r"$\delta_r$",
    "V_MC": r"$V_{MC}$", "V_S1": r"$V_{S1}$", "V_SR": r"$V_{SR}$",
}
#: Type sizes [pt].
TITLE_SIZE, LABEL_SIZE, TICK_SIZE, NOTE_SIZE = 10.5, 8.5, 8, 7


def case_colour(index) -> str:
    """The colour of the ``index``-th case (cycling through :data:`PALETTE`)."""
    return PALETTE[index % len(PALETTE)]


def configuration_style(index) -> dict:
    """Colour and marker of the ``index``-th configuration (0 the base, then the variants)."""
    return {"color": case_colour(index),
            "marker": CONFIGURATION_MARKERS[index % len(CONFIGURATION_MARKERS)]}


def plain(text) -> str:
    r"""Text from an input file (aircraft, condition, criteria names) shown as it is written.

    matplotlib reads a pair of ``$`` as mathtext; escaped, a ``$`` is drawn as a
    dollar sign, so a name is never parsed (nor able to break the drawing); control
    characters are shown escaped (no missing glyph).  The rule is
    :func:`latdyn.text.plain`.

    >>> plain("K-40 $\\frac{")
    'K-40 \\$\\frac{'
    """
    from latdyn.text import plain as plain_text

    return plain_text(text)


def unit_text(word) -> str:
    """A unit word with its powers typeset (``m^2`` -> ``m$^{2}$``).

    >>> unit_text("slug ft^2"), unit_text("1/s")
    ('slug ft$^{2}$', '1/s')
    """
    import re

    return re.sub(r"\^(-?\d+)", r"$^{\1}$", word)


def axis_label(words, symbol=None, unit=None) -> str:
    r"""An axis label: words, the typeset symbol (a :data:`SYMBOLS` key) and the unit in brackets.

    >>> axis_label("damping ratio", "zeta_d", "-")
    'damping ratio $\\zeta_d$ [-]'
    """
    out = words
    if symbol is not None:
        out += " " + SYMBOLS.get(symbol, symbol)
    if unit is not None:
        out += f" [{unit}]"
    return out


def level_handles(levels=(1, 2, 3, 4), undecided=False, pass_fail=False) -> list:
    """Legend handles of the level colours, headed "Levels (guidance only)".

    Parameters
    ----------
    levels : iterable of int
        The levels whose colours appear (4 = beyond Level 3).
    undecided : bool
        Add the grey of regions whose level depends on something not given.
    pass_fail : bool
        Level 1 reads "pass" and 4 "fail".

    Returns
    -------
    list of matplotlib artists
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    from latdyn.assessment import level_words

    handles = [Line2D([], [], linestyle="none", label="Levels (guidance only):")]
    for level in levels:
        if pass_fail:
            words = "pass" if level == 1 else "fail"
        else:
            words = level_words(int(level))
        handles.append(Patch(facecolor=LEVEL_COLOURS[level], edgecolor=MUTED, linewidth=0.4, label=words))
    if undecided:
        handles.append(Patch(facecolor=UNDECIDED, edgecolor=MUTED, linewidth=0.4,
                             label="depends on what is not given"))
    return handles


def key_axis(axis, handles, title=None):
    """Turn ``axis`` (a narrow slot of the figure's grid) into the figure's key: a legend of
    ``handles`` inside the layout, so that the layout engine keeps it clear of everything else.

    Returns
    -------
    matplotlib.legend.Legend
    """
    axis.axis("off")
    return axis.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.0, 1.0), borderaxespad=0.0,
                       fontsize=7.5, frameon=False, title=title, title_fontsize=7.5,
                       alignment="left")


def mark_current(axis, x, y=None, label="current design"):
    """Mark the current design: a star at (x, y), or a vertical line at x with a star on the
    x axis when ``y`` is None; returns the artist that carries the legend label."""
    if y is None:
        axis.axvline(x, color="#111111", linewidth=0.9, linestyle=(0, (1, 1.5)), zorder=7)
        return axis.plot([x], [0.0], transform=axis.get_xaxis_transform(), clip_on=False, label=label,
                         **CURRENT)[0]
    return axis.plot([x], [y], label=label, **CURRENT)[0]


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
