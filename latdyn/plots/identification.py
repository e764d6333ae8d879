"""Measured against identified responses: the check of an identification.

One column per manoeuvre: the control inputs on top; per measured channel the measured trace, the
identified model's response (biases included) and the file's prediction from
the same initial state, and below them the residuals.  matplotlib is
imported inside the function; the figure is made without pyplot.
"""

from __future__ import annotations

import numpy as np

__all__ = ["identification_figure"]

_LABELS = {"beta": (r"$\beta$", "deg"), "p": (r"$p$", "deg/s"), "r": (r"$r$", "deg/s"),
           "phi": (r"$\phi$", "deg"), "ny": (r"$n_y$", "g")}
#: Residual colour of each channel: the palette after the two the model traces use.
_RESIDUAL_COLOURS = {"beta": 2, "p": 3, "r": 4, "phi": 5, "ny": 6}


def identification_figure(result, figure=None):
    """Measured, identified and predicted responses with residuals.

    Parameters
    ----------
    result : latdyn.identification.IdentificationResult
    figure : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.figure import Figure

    from latdyn.plots.style import INPUT_COLOURS, INPUT_STYLES, MUTED, PALETTE, plain, style_axis

    records = result.records
    channels = [c for c in ("beta", "p", "r", "phi", "ny") if any(c in r.channels for r in records)]
    rows = len(channels) + 2
    columns = len(records)
    if figure is None:
        figure = Figure(figsize=(5.2 * columns + 1.0, 1.55 * rows + 1.2), layout="constrained")
    else:
        figure.clear()
    axes = figure.subplots(rows, columns, sharex="col", squeeze=False)
    measured_colour, identified_colour, predicted_colour = MUTED, PALETTE[0], PALETTE[1]
    for j, record in enumerate(records):
        simulated = result.simulated[j]
        predicted = result.predicted_outputs[j] + result.biases[j]
        residual_axis = axes[-1, j]
        control_axis = axes[0, j]
        style_axis(control_axis)
        for k, control in enumerate(("aileron", "rudder")):
            control_axis.plot(record.time, np.degrees(record.inputs[:, k]), color=INPUT_COLOURS[control],
                              linewidth=1.1, linestyle=INPUT_STYLES[control], label=control)
        control_axis.legend(fontsize=7, loc="upper right", frameon=False)
        if j == 0:
            control_axis.set_ylabel("control [deg]", fontsize=8)
        for i, channel in enumerate(channels):
            axis = axes[i + 1, j]
            style_axis(axis)
            symbol, unit = _LABELS[channel]
            factor = 1.0 if channel == "ny" else 180.0 / np.pi
            if channel not in record.channels:
                axis.text(0.5, 0.5, "not measured", transform=axis.transAxes, ha="center", va="center",
                          fontsize=8, color=MUTED)
            else:
                k = record.channels.index(channel)
                axis.plot(record.time, record.measured[:, k] * factor, color=measured_colour, linewidth=0.8,
                          label="measured")
                axis.plot(record.time, predicted[:, k] * factor, color=predicted_colour, linewidth=1.0,
                          linestyle=(0, (4, 2)), label="file's prediction")
                axis.plot(record.time, simulated[:, k] * factor, color=identified_colour, linewidth=1.3,
                          label="identified model")
                residual = (record.measured[:, k] - simulated[:, k])
                scale = np.max(np.abs(record.measured[:, k] - record.measured[:, k].mean())) or 1.0
                residual_axis.plot(record.time, residual / scale, linewidth=0.7, label=symbol,
                                   color=PALETTE[_RESIDUAL_COLOURS[channel]])
            if j == 0:
                axis.set_ylabel(f"{symbol} [{unit}]", fontsize=8)
        style_axis(residual_axis)
        residual_axis.set_xlabel("time [s]", fontsize=8)
        if j == 0:
            residual_axis.set_ylabel("residual /\nrange [-]", fontsize=8)
        residual_axis.legend(fontsize=7, ncol=len(channels), loc="upper right", frameon=False)
        name = record.file.replace("\\", "/").rsplit("/", 1)[-1] or f"record {j + 1}"
        axes[0, j].set_title(plain(name), fontsize=9, loc="left")
    axes[1, 0].legend(fontsize=7, loc="upper right", frameon=False)
    figure.suptitle(plain(f'Identification, condition "{result.condition}": {result.fit["method"]}'), fontsize=10)
    return figure
