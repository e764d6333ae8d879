"""Time-history and Bode figures of lateral responses.

The time history is the stacked strip chart flight-test engineers read: the
control inputs on top, then sideslip, roll rate, yaw rate and bank, on one
time axis, in degrees and deg/s.  Each trace carries its read-outs (peak,
the extrema used for the Dutch roll logarithmic decrement, the residual bank
angle) and a table underneath sets the damping and period read from the
trace beside the eigenvalue figures.  Several responses (conditions,
aircraft files) can be overlaid.

Each function draws into a given figure (``fig=``; a new one by default) and
returns it; saving is separate (:func:`latdyn.plots.save_figure`).
matplotlib is imported inside the functions, no pyplot is used (no global
state); the style is :mod:`latdyn.plots.style`.
"""

from __future__ import annotations


import numpy as np

from latdyn.display import SI, SIGNAL_QUANTITIES, format_number
from latdyn.plots.style import (BAND, GRID, INPUT_COLOURS, INPUT_STYLES, LEVEL_INK, MUTED, PALETTE, SYMBOLS, TEXT,
                                case_colour, figure_for, plain, style_axis)

__all__ = ["time_history_figure", "bode_figure"]

_LABEL_BOX = dict(boxstyle="round,pad=0.15", facecolor="white", edgecolor="none", alpha=0.85)

#: Symbol of each signal on its panel (typeset); the unit is the display unit of its quantity.
_SYMBOLS = {name: SYMBOLS[name] for name in ("beta", "p", "r", "phi", "psi", "ny")}


def _unit(name):
    quantity = SIGNAL_QUANTITIES.get(name)
    return SI.label(quantity) if quantity else ""


def _factor(name):
    return SI.convert(1.0, SIGNAL_QUANTITIES.get(name, "angle"))


def _style_axis(axis):
    style_axis(axis, zero_line=True)


def _fmt(value, digits=3):
    return format_number(value, digits)


#: Control names in the input panel's legend.
_CONTROL_WORDS = {"aileron": f"aileron {SYMBOLS['delta_a']}", "rudder": f"rudder {SYMBOLS['delta_r']}"}


def _end_words(response, readout):
    """The bank angle at the end of the run, worded for what it is: steady or still changing."""
    from latdyn.display import bank_at_end_words

    final = readout.residual_bank_angle * _factor("phi")
    return (f"{SYMBOLS['phi']} at end of run {_fmt(final)} {_unit('phi')} (t = {readout.residual_time:g} s), "
            + bank_at_end_words(readout, SI))


#: Colour of each output on the Bode figure (the same output has the same colour in every column).
_OUTPUT_COLOURS = {"beta": PALETTE[0], "p": PALETTE[1], "r": PALETTE[2], "phi": PALETTE[3], "ny": PALETTE[4]}
#: Control symbols of the transfer-function names.
_CONTROL_SYMBOLS = {"aileron": SYMBOLS["delta_a"], "rudder": SYMBOLS["delta_r"]}


def _transfer_name(transfer) -> str:
    """``phi/da`` typeset: the output's symbol over the control's."""
    output = _SYMBOLS.get(transfer.output, plain(transfer.output))
    control = _CONTROL_SYMBOLS.get(transfer.input, plain(transfer.input))
    return f"{output} / {control}"


def _eigen_dutch(modes):
    if modes is None:
        return None
    dutch = modes.get("dutch_roll")
    if dutch is None or not dutch.oscillatory:
        return None
    return dutch


def time_history_figure(responses, readouts=None, modes=None, labels=None, title=None,
                        signals=("beta", "p", "r", "phi"), fig=None):
    """Stacked time history: inputs, then ``signals``, with the read-outs.

    Parameters
    ----------
    responses : Response or sequence of Response
        One response, or several to overlay (same input, other conditions or
        aircraft).
    readouts : sequence of ResponseReadouts, optional
        Read-outs of each response; computed when not given.
    modes : sequence of ModeSet or None, optional
        Modes of each response's model, for the eigenvalue figures beside the
        read-outs.
    labels : sequence of str, optional
        Legend names; default each response's label.
    title : str, optional
        Figure title; default the single response's label.
    signals : sequence of str
        Output panels under the input panel.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from latdyn.readouts import read_response

    if hasattr(responses, "time"):
        responses = [responses]
    responses = list(responses)
    if readouts is None:
        readouts = [read_response(r) for r in responses]
    if modes is None:
        modes = [None] * len(responses)
    labels = list(labels) if labels is not None else [r.label or f"case {i + 1}" for i, r in enumerate(responses)]
    labels = [plain(label) for label in labels]
    single = len(responses) == 1

    rows = 1 + len(signals)
    table_height = 0.75 + 0.22 * len(responses)
    figure = figure_for(fig, 8.6, 1.0 + 1.6 * rows + table_height)
    grid = figure.add_gridspec(rows + 1, 1, height_ratios=[0.8] + [1.0] * len(signals) + [table_height / 1.6])
    axes = [figure.add_subplot(grid[0])]
    for i in range(len(signals)):
        axes.append(figure.add_subplot(grid[i + 1], sharex=axes[0]))
    table_axis = figure.add_subplot(grid[rows])
    table_axis.axis("off")

    end = max(float(r.time[-1]) for r in responses)
    for axis in axes:
        _style_axis(axis)
        axis.set_xlim(0.0, end)
        # Shade the time the controls are moving (first response).
    first = responses[0]
    moving = np.nonzero(np.any(np.diff(first.inputs, axis=0) != 0, axis=1))[0]
    if moving.size:
        begin, finish = first.time[moving[0] + 1], first.input_end
        for axis in axes:
            axis.axvspan(begin, finish, color=BAND, zorder=0, linewidth=0)

    # Input panel: drawn once when every response has the same input.
    top = axes[0]
    shared = all(r.inputs.shape == first.inputs.shape and np.array_equal(r.inputs, first.inputs)
                 and np.array_equal(r.time, first.time) for r in responses)
    for index, response in enumerate(responses[:1] if shared else responses):
        colour = case_colour(index)
        for j, name in enumerate(response.input_names):
            values = response.inputs[:, j] * _factor(name)
            if not np.any(values):
                continue
            top.step(response.time, values, where="post", linewidth=1.4,
                     color=INPUT_COLOURS.get(name, colour) if shared else colour,
                     linestyle=INPUT_STYLES.get(name, "-"),
                     label=_CONTROL_WORDS.get(name, name) if shared else f"{name}, {labels[index]}")
    top.set_ylabel(f"{SYMBOLS['delta']} [{_unit('rudder')}]", color=TEXT, fontsize=9)
    handles, _ = top.get_legend_handles_labels()
    if handles:
        top.legend(loc="upper right", fontsize=7.5, frameon=False, ncol=2)
    else:
        top.text(0.99, 0.8, "no control input", transform=top.transAxes, ha="right",
                 fontsize=8, color=MUTED)

    # Output panels.
    cases = []  # (trace, name) of each case, for the key
    for k, name in enumerate(signals):
        axis = axes[k + 1]
        symbol, unit = _SYMBOLS.get(name, name), _unit(name)
        axis.set_ylabel(f"{symbol} [{unit}]", color=TEXT, fontsize=9)
        for index, (response, readout) in enumerate(zip(responses, readouts)):
            colour = case_colour(index)
            try:
                values = response.signal(name) * _factor(name)
            except KeyError:
                continue
            trace, = axis.plot(response.time, values, color=colour, linewidth=1.5,
                               label=None if single else labels[index], zorder=3)
            if not single and k == 0:
                cases.append((trace, labels[index]))
            peak = readout.peak(name) if name in response.output_names else None
            if peak is not None and peak.value != 0:
                shown = peak.value * _factor(name)
                # drawn whole where the peak is the last sample (a step run ends at its largest bank)
                axis.plot([peak.time], [shown], marker="v" if shown > 0 else "^", color=colour,
                          markersize=5, zorder=4, clip_on=False)
                at_end = readout.at_end(peak)
                if single and not (at_end and name == "phi"):  # the bank at the end has its own words
                    words = (f"largest {_fmt(shown)} {unit}, at the end of the run (still changing)" if at_end
                             else f"peak {_fmt(shown)} {unit} at {peak.time:.2f} s")
                    right = peak.time > 0.55 * end
                    axis.annotate(words, (peak.time, shown), xytext=(-7 if right else 7, -5 if shown > 0 else 5),
                                  textcoords="offset points", ha="right" if right else "left",
                                  va="top" if shown > 0 else "bottom", fontsize=7.5, color=TEXT,
                                  bbox=_LABEL_BOX, zorder=6)
            dutch = readout.dutch_roll
            if dutch is not None and dutch.signal == name:
                axis.plot(dutch.extremum_times, np.asarray(dutch.extremum_values) * _factor(name),
                          linestyle="none", marker="o", markersize=3.5, markerfacecolor="white", color=colour,
                          markeredgecolor=colour, markeredgewidth=0.9, zorder=5,
                          label=f"extrema read for {SYMBOLS['zeta']}, {SYMBOLS['P']}" if single else None)
            if name == "phi":
                final = readout.residual_bank_angle * _factor(name)
                axis.plot([readout.residual_time], [final], marker="<", color=colour, markersize=5,
                          clip_on=False, zorder=5)
                if single:
                    axis.annotate(_end_words(response, readout), (readout.residual_time, final),
                                  xytext=(-8, -5 if final > 0 else 5), textcoords="offset points",
                                  ha="right", va="top" if final > 0 else "bottom", fontsize=7.5, color=TEXT,
                                  bbox=_LABEL_BOX, zorder=6)
        if single and any(r.dutch_roll is not None and r.dutch_roll.signal == name for r in readouts):
            axis.legend(loc="upper right", fontsize=7.5, frameon=False)
        if not single and k == 0:
            # under the read-out table, not over the traces (no free corner once several cases overlap)
            # handles and names given (a name starting with "_" is kept: matplotlib leaves such labels out
            # of the legends it collects itself)
            figure.legend([t for t, _ in cases], [n for _, n in cases], loc="outside lower center", ncol=2,
                          fontsize=7.5, frameon=False)
        if k < len(signals) - 1:
            axis.tick_params(labelbottom=False)
    top.tick_params(labelbottom=False)
    axes[-1].set_xlabel("time [s]", color=TEXT, fontsize=9)

    # Title.
    heading = plain(title) if title else (labels[0] if single else "Lateral-directional responses compared")
    figure.suptitle(heading, fontsize=11.5, color=TEXT, fontweight="bold", x=0.01, ha="left")
    description = first.description or "free response"
    top.set_title(f"{plain(description)}   |   linear small-disturbance model, exact for held inputs",
                  fontsize=8, color=MUTED, loc="left")
    if any(r.warnings for r in readouts):
        top.text(0.0, 1.16, "Beyond the small-disturbance range "
                 f"(|{SYMBOLS['beta']}| > 15 deg or |{SYMBOLS['phi']}| > 45 deg): "
                 "the linear model no longer represents the aircraft.", transform=top.transAxes,
                 fontsize=8, color=LEVEL_INK[4], fontweight="bold")

    # Read-out table: the trace figures beside the eigenvalue figures.
    header = [f"peak {_SYMBOLS[n]}\n[{_unit(n)}]" for n in ("beta", "p", "r", "phi", "ny")]
    header += [f"Dutch roll {SYMBOLS['zeta_d']}\ntrace | eigen", f"Dutch roll {SYMBOLS['P']} [s]\ntrace | eigen",
               f"{SYMBOLS['phi']} at end\n[{_unit('phi')}]"]
    widths = [0.09, 0.09, 0.09, 0.09, 0.09, 0.16, 0.16, 0.09]
    if not single:
        header = ["case"] + header
        widths = [0.24] + [w * 0.76 / sum(widths) for w in widths]
    else:
        widths = [w / sum(widths) for w in widths]
    cells = []
    short = _distinct_labels(labels)
    for response, readout, mode_set, label in zip(responses, readouts, modes, labels):
        row = [] if single else [short[len(cells)]]
        for name in ("beta", "p", "r", "phi", "ny"):
            try:
                peak = readout.peak(name)
            except KeyError:
                row.append("-")
                continue
            row.append(_fmt(peak.value * _factor(name)) + ("*" if readout.at_end(peak) else ""))
        eigen = _eigen_dutch(mode_set)
        dutch = readout.dutch_roll
        row.append(f"{_fmt(dutch.damping_ratio, 4) if dutch else '-'}  |  "
                   f"{_fmt(eigen.damping_ratio, 4) if eigen else '-'}")
        row.append(f"{_fmt(dutch.period, 4) if dutch else '-'}  |  "
                   f"{_fmt(eigen.period, 4) if eigen else '-'}")
        row.append(_fmt(readout.residual_bank_angle * _factor("phi")))
        cells.append(row)
    ends = any(r.at_end(p) for r in readouts for p in r.peaks)  # a third line of notes
    bottom = 0.38 if ends else 0.28
    table = table_axis.table(cellText=cells, colLabels=header, cellLoc="center", colLoc="center",
                             colWidths=widths, bbox=[0.0, bottom, 1.0, 1.0 - bottom])
    table.auto_set_font_size(False)
    table.set_fontsize(7.5)
    for (r, c), cell in table.get_celld().items():
        cell.set_edgecolor(GRID)
        cell.set_linewidth(0.6)
        if r == 0:
            cell.set_facecolor(BAND)
            cell.set_text_props(color=TEXT, fontweight="bold")
        else:
            cell.set_text_props(color=TEXT if single else case_colour(r - 1))
    read = [r.dutch_roll for r in readouts if r.dutch_roll is not None]
    names = sorted({_SYMBOLS.get(d.signal, d.signal) for d in read})
    how = ("logarithmic decrement on successive extrema of " + " / ".join(names)
           + " after the input (circles)" if read else "too few extrema after the input for a read-out")
    note = (f"Dutch roll trace figures: {how};\neigen: from the model's eigenvalues. "
            f"Shaded: controls moving. {SYMBOLS['phi']} at end: the bank angle when the run stops "
            "(still changing where it is building or decaying)."
            + ("\n*: the largest value is the last of the run, still changing (not a peak)."
               if ends else ""))
    table_axis.text(0.0, 0.02, note, transform=table_axis.transAxes, fontsize=7, color=MUTED,
                    va="bottom")
    return figure


def _distinct_labels(labels, width=28):
    """Case names short enough for a table cell that still tell the cases apart.

    Where a name is longer than ``width`` characters, the words every name
    starts with are left out (shown as an ellipsis) so that the part that
    differs stays; what is still too long is cut at the end.

    Examples
    --------
    >>> _distinct_labels(["Kestrel K-40 commuter (Northmoor Regional Air)",
    ...                   "Kestrel K-40 commuter, wing-tip tanks full"])
    ['\u2026(Northmoor Regional Air)', '\u2026wing-tip tanks full']
    >>> _distinct_labels(["climb", "cruise"])
    ['climb', 'cruise']
    """
    import os

    labels = [str(label) for label in labels]
    if len(labels) > 1 and any(len(label) > width for label in labels):
        common = os.path.commonprefix(labels)
        at_boundary = all(not label[len(common):len(common) + 1].isalnum() for label in labels)
        cut = len(common) if at_boundary else max(common.rfind(c) for c in " ,/") + 1
        rests = [label[cut:].lstrip(" ,/") for label in labels]
        if cut > 0 and all(rests) and len(set(rests)) == len(rests):
            labels = ["\u2026" + rest for rest in rests]
    return [label if len(label) <= width else label[:width - 1] + "\u2026" for label in labels]


def bode_figure(transfers, modes=None, omega=None, title=None, fig=None):
    """Bode magnitude and phase of transfer functions, with the mode frequencies marked.

    Parameters
    ----------
    transfers : sequence of TransferFunction
        Overlaid on one figure.
    modes : ModeSet, optional
        Marks the Dutch roll natural frequency and the roll and spiral
        root magnitudes.
    omega : array_like, optional
        Frequencies [rad/s]; default two decades around all roots.
    title : str, optional
        Name of the case, shown in the title.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from latdyn.transfer_functions import bode_data, frequency_grid

    transfers = list(transfers)
    if omega is None:
        omega = frequency_grid([r for t in transfers for r in t.poles], points=600, decades=1.0)
    controls = [name for name in ("rudder", "aileron") if any(t.input == name for t in transfers)]
    controls += sorted({t.input for t in transfers} - set(controls))
    figure = figure_for(fig, 11.0, 7.4)
    grid = figure.subplots(2, len(controls), sharex=True, squeeze=False, height_ratios=[1.2, 1.0])
    marks = []
    if modes is not None:
        dutch = modes.get("dutch_roll")
        if dutch is not None and dutch.natural_frequency:
            marks.append((dutch.natural_frequency, f"{SYMBOLS['omega_nd']} Dutch roll"))
        for name, text in (("roll_subsidence", f"1/{SYMBOLS['T_R']} roll"), ("spiral", f"1/{SYMBOLS['T_s']} spiral"),
                           ("roll_spiral", f"{SYMBOLS['omega_rs']} roll-spiral")):
            mode = modes.get(name)
            if mode is not None and abs(mode.eigenvalue) > 0:
                marks.append((abs(mode.eigenvalue), text))
    for column, control in enumerate(controls):
        magnitude_axis, phase_axis = grid[0, column], grid[1, column]
        for axis in (magnitude_axis, phase_axis):
            _style_axis(axis)
            axis.set_xscale("log")
            axis.set_xlim(omega[0], omega[-1])
        chosen = [t for t in transfers if t.input == control]
        for transfer in chosen:
            data = bode_data(transfer, omega)
            colour = _OUTPUT_COLOURS.get(transfer.output, MUTED)
            magnitude_axis.plot(data.omega, data.magnitude_db, color=colour, linewidth=1.5,
                                label=_transfer_name(transfer))
            phase_axis.plot(data.omega, data.phase_deg, color=colour, linewidth=1.5)
        for frequency, text in marks:
            for axis in (magnitude_axis, phase_axis):
                axis.axvline(frequency, color=MUTED, linewidth=0.8, linestyle=(0, (2, 2)), zorder=1)
            magnitude_axis.annotate(text, (frequency, 0.0), xycoords=("data", "axes fraction"),
                                    xytext=(3, 4), textcoords="offset points", fontsize=7,
                                    color=MUTED, rotation=90, va="bottom")
        magnitude_axis.set_title(f"{control} inputs", fontsize=9.5, color=TEXT, loc="left")
        magnitude_axis.legend(loc="upper right", fontsize=8, frameon=False)
        phase_axis.set_xlabel(f"frequency {SYMBOLS['omega']} [rad/s]", color=TEXT, fontsize=9)
        if column == 0:
            magnitude_axis.set_ylabel("magnitude [dB]", color=TEXT, fontsize=9)
            phase_axis.set_ylabel("phase [deg]", color=TEXT, fontsize=9)
    figure.suptitle("Lateral-directional transfer functions" + (f": {plain(title)}" if title else ""),
                    fontsize=11.5, color=TEXT, fontweight="bold", x=0.01, ha="left")
    figure.supxlabel("Magnitude of output per control deflection: rad per rad, (rad/s) per rad "
                     "(the same in degrees). Dashed: mode frequencies (|root|).", fontsize=7.5,
                     color=MUTED, x=0.01, ha="left")
    return figure
