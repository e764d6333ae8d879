"""Drawing a report's figure specifications: the plot behind each ``Figure.kind``.

Imported only when a report is written (it imports the plotting modules,
which import matplotlib inside their functions).
"""

from __future__ import annotations

__all__ = ["PLOTS", "draw"]


def _s_plane(result):
    from latdyn.plots.levels import s_plane_map

    return s_plane_map(result)


def _roll_spiral(result, criteria):
    from latdyn.plots.levels import roll_spiral_chart

    return roll_spiral_chart(result, criteria)


def _dutch_roll(result, criteria):
    from latdyn.plots.levels import dutch_roll_chart

    return dutch_roll_chart(result, criteria)


def _time_history(responses, readouts, modes):
    from latdyn.plots.responses import time_history_figure

    return time_history_figure(responses, readouts, modes)


#: ``Figure.kind`` -> function of the figure's arguments returning a matplotlib Figure.
PLOTS = {"s_plane": _s_plane, "roll_spiral": _roll_spiral, "dutch_roll": _dutch_roll,
         "time_history": _time_history}


def draw(spec):
    """The matplotlib Figure of a :class:`~latdyn.report.blocks.Figure` specification."""
    return PLOTS[spec.kind](**spec.arguments)
