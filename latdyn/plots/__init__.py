"""Figures (matplotlib, imported inside the plotting functions only).

One module per kind of figure; each function draws onto a new figure and
returns it, or writes it atomically when given a path.
"""

__all__ = []
