"""Figures (matplotlib, imported inside the plotting functions only).

One module per kind of figure (``levels``, ``responses``, ``studies``,
``identification``) and one style for all (``style``).  Each plotting
function draws into a given figure (``fig=``) or axis (``ax=``) or a new
``matplotlib.figure.Figure`` made without pyplot, and returns the Figure;
saving is separate (:func:`save_figure`, :func:`save_both`, atomic).  No
library code touches matplotlib's global state.
"""

import os

__all__ = ["save_figure", "save_both", "both_paths"]


#: Metadata that would make two writes of one figure differ (a time stamp), left out per format.
_NO_DATES = {"svg": {"Date": None}, "pdf": {"CreationDate": None}}


def save_figure(figure, path, dpi=150):
    """Write a figure atomically (temporary file in the same folder, then rename).

    The same figure gives the same bytes on every run in SVG and PDF (no time
    stamp, SVG element ids from a fixed salt instead of random); PNG has
    neither.  PostScript keeps matplotlib's creation time.

    Parameters
    ----------
    figure : matplotlib.figure.Figure
    path : str or os.PathLike
        Output file; the format follows the suffix (``.png``, ``.pdf``, ``.svg``;
        PNG without a suffix).
    dpi : int
        Resolution of raster formats [dots per inch].

    Returns
    -------
    path
    """
    import matplotlib

    from latdyn.output_files import atomic_path

    kind = os.path.splitext(os.fspath(path))[1][1:].lower() or "png"  # not the temporary name's
    with atomic_path(path) as temporary, matplotlib.rc_context({"svg.hashsalt": "latdyn"}):
        figure.savefig(temporary, dpi=dpi, facecolor="white", format=kind, metadata=_NO_DATES.get(kind))
    return path


def both_paths(path) -> list:
    """The files :func:`save_both` writes for ``path``: it, and its PNG or SVG companion.

    Examples
    --------
    >>> both_paths("out/study.png"), both_paths("study.pdf")
    (['out/study.png', 'out/study.svg'], ['study.pdf'])
    """
    path = os.fspath(path)
    base, suffix = os.path.splitext(path)
    if suffix.lower() in (".png", ".svg"):
        return [path, base + (".svg" if suffix.lower() == ".png" else ".png")]
    return [path]


def save_both(figure, path, dpi=150):
    """Write a figure to ``path`` and, when it ends in .png or .svg, to the other format too.

    The figure is laid out once: its layout engine runs for the first file,
    then the layout is kept (the engine set to "none") for the second, so
    both files show the same layout at the cost of one.

    Returns
    -------
    list of str
        The paths written.
    """
    targets = both_paths(path)
    for number, target in enumerate(targets):
        save_figure(figure, target, dpi)
        if number == 0 and len(targets) > 1 and figure.get_layout_engine() is not None:
            figure.set_layout_engine("none")
    return targets
