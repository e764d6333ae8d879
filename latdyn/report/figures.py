"""Drawing a report's figure specifications: the plot behind each ``Figure.kind``.

Imported only when a report is written (it imports the plotting modules,
which import matplotlib inside their functions).
"""

from __future__ import annotations

import functools
import os

__all__ = ["PLOTS", "draw", "draw_all"]


def _s_plane(result):
    from latdyn.plots.levels import s_plane_map

    return s_plane_map(result)


def _roll_spiral(result, criteria, variants=()):
    from latdyn.plots.levels import roll_spiral_chart

    return roll_spiral_chart(result, criteria, variants=variants)


def _dutch_roll(result, criteria, variants=()):
    from latdyn.plots.levels import dutch_roll_chart

    return dutch_roll_chart(result, criteria, variants=variants)


def _time_history(responses, readouts, modes, labels=None):
    from latdyn.plots.responses import time_history_figure

    return time_history_figure(responses, readouts, modes, labels=labels)


def _roll_performance(roll, requirements, title=None):
    from latdyn.plots.roll import roll_performance_figure

    return roll_performance_figure(roll, requirements, title)


def _identification(result):
    from latdyn.plots.identification import identification_figure

    return identification_figure(result)


def _steady(aircraft, result):
    from latdyn.plots.steady import steady_figure

    return steady_figure([(aircraft, result)])


#: ``Figure.kind`` -> function of the figure's arguments returning a matplotlib Figure.
PLOTS = {"identification": _identification, "s_plane": _s_plane, "roll_spiral": _roll_spiral, "dutch_roll": _dutch_roll,
         "time_history": _time_history, "roll_performance": _roll_performance, "steady": _steady}


def draw(spec):
    """The matplotlib Figure of a :class:`~latdyn.report.blocks.Figure` specification."""
    return PLOTS[spec.kind](**spec.arguments)


#: Fewest figures for which drawing is spread over worker processes.
PARALLEL_FIGURES = 4

_PENDING = ()  # the specifications the forked workers draw (inherited, not pickled)


def _draw_one(index, folder):
    from latdyn.plots import save_both

    spec = _PENDING[index]
    save_both(draw(spec), os.path.join(folder, spec.name + ".png"))
    return index


def draw_all(specs, folder, step=None, workers=None):
    """Draw and save (PNG and SVG) every figure specification into ``folder``.

    With several cores and at least :data:`PARALLEL_FIGURES` figures the
    figures are drawn in worker processes (forked, so the specifications are
    inherited, not pickled; where fork is not available, one after another);
    an error or an interruption in the parent ends the workers before it
    passes on.
    The files are the same either way.

    Parameters
    ----------
    specs : sequence of latdyn.report.blocks.Figure
    folder : str
        Existing folder for ``<name>.png`` and ``<name>.svg``.
    step : callable, optional
        Called once per figure written (progress).
    workers : int, optional
        Worker processes (default: the usable cores, at most 4; 1 draws here).
    """
    global _PENDING
    import multiprocessing

    specs = tuple(specs)
    if workers is None:
        cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1)
        workers = min(cores, 4)
    methods = multiprocessing.get_all_start_methods()
    if workers <= 1 or len(specs) < PARALLEL_FIGURES or "fork" not in methods:
        for index in range(len(specs)):
            _PENDING = specs
            _draw_one(index, folder)
            if step is not None:
                step()
        _PENDING = ()
        return
    _PENDING = specs
    try:
        # a pool that is terminated (workers killed, joined) when anything interrupts the parent,
        # so no worker writes into a folder being removed; workers leave SIGINT to the parent
        with multiprocessing.get_context("fork").Pool(workers, initializer=_worker_signals) as pool:
            for _ in pool.imap_unordered(functools.partial(_draw_one, folder=folder), range(len(specs))):
                if step is not None:
                    step()
    finally:
        _PENDING = ()


def _worker_signals():
    """In a worker: SIGINT ignored (the parent handles it), SIGTERM ends the worker at once."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
