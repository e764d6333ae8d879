"""Figure of the response to turbulence: one-sided output spectra (matplotlib inside the function)."""

from __future__ import annotations

import numpy as np

__all__ = ["spectra_figure"]

_LABELS = {"beta": r"$\Phi_\beta$ [deg$^2$/(rad/s)]", "p": r"$\Phi_p$ [(deg/s)$^2$/(rad/s)]",
           "r": r"$\Phi_r$ [(deg/s)$^2$/(rad/s)]", "phi": r"$\Phi_\phi$ [deg$^2$/(rad/s)]",
           "ny": r"$\Phi_{n_y}$ [g$^2$/(rad/s)]"}


def spectra_figure(entries, title="", omega=None, fig=None):
    """Power spectra of beta, p, r, phi and n_y, one line per (condition, aircraft) entry.

    Parameters
    ----------
    entries : sequence of (condition name, label, latdyn.turbulence.TurbulenceResult)
    title : str
    omega : array_like, optional
        Frequencies [rad/s]; default 0.01 to 100 rad/s.
    fig : matplotlib.figure.Figure, optional
        Draw into this figure (cleared); default a new one.  Saving is separate
        (:func:`latdyn.plots.save_figure`).

    Returns
    -------
    matplotlib.figure.Figure
    """
    from latdyn.plots.style import (GRID, LABEL_SIZE, SYMBOLS, TEXT, TITLE_SIZE, case_colour, figure_for, plain,
                                    style_axis)
    from latdyn.turbulence import DEGREES, RMS_OUTPUTS, output_spectra

    omega = np.logspace(-2, 2, 400) if omega is None else np.asarray(omega, dtype=float)
    figure = figure_for(fig, 8.0, 10.0)
    axes = figure.subplots(len(RMS_OUTPUTS), 1, sharex=True)
    for index, (name, label, result) in enumerate(entries):
        spectra = output_spectra(result.system, omega)
        style = "-" if label != "bare airframe" else "--"
        for ax, (k, key) in zip(axes, enumerate(RMS_OUTPUTS)):
            ax.loglog(omega, spectra[:, k] * DEGREES[key] ** 2, style, color=case_colour(index),
                      label=plain(f"{name}, {label}") + f": RMS {result.rms[key] * DEGREES[key]:.3g}")
    for ax, key in zip(axes, RMS_OUTPUTS):
        style_axis(ax)
        ax.grid(True, which="both", color=GRID, linewidth=0.5)
        ax.set_ylabel(_LABELS[key], fontsize=LABEL_SIZE, color=TEXT)
        ax.legend(fontsize=7, loc="lower left")
    axes[-1].set_xlabel(f"frequency {SYMBOLS['omega']} [rad/s]", fontsize=LABEL_SIZE, color=TEXT)
    gust = entries[0][2].gust if entries else None
    heading = f"Response to Dryden lateral turbulence: {plain(title)}"
    if gust is not None:
        heading += f"\n{SYMBOLS['sigma_v']} {gust.sigma_v:g} m/s, {SYMBOLS['L_v']} {gust.scale_length:g} m " \
                   "(one-sided spectra; a neutral or divergent mode is left out)"
    figure.suptitle(heading, fontsize=TITLE_SIZE, color=TEXT)
    return figure
