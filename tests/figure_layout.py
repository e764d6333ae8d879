"""Rendered-layout checks of figures (Agg canvas attached to the figure only: no global state).

The text of a figure is measured by the renderer (``Text.get_window_extent``):
every visible text lies inside the figure and no two overlap.  Common practice
for figures that are printed; the checks are ours.
"""

from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.text import Text

#: Pixels two boxes may share (anti-aliasing and the renderer's rounding).
TOLERANCE = 1.0


def rendered(figure):
    """Draw the figure on its own Agg canvas; returns the renderer."""
    canvas = FigureCanvasAgg(figure)
    canvas.draw()
    return canvas.get_renderer()


def _all_axes(figure):
    stack, out = list(figure.axes), []
    while stack:
        axes = stack.pop()
        out.append(axes)
        stack += list(getattr(axes, "child_axes", ()))
    return out


def _tick_labels(figure):
    """(every tick label, the tick labels drawn): matplotlib keeps ticks outside the view that
    it does not draw."""
    every, drawn = set(), set()
    for axes in _all_axes(figure):
        for axis in (axes.xaxis, axes.yaxis):
            for tick in axis.majorTicks + axis.minorTicks:
                every |= {id(tick.label1), id(tick.label2)}
            if not axes.axison:
                continue
            for tick in axis._update_ticks():
                drawn |= {id(label) for label, on in ((tick.label1, tick.label1.get_visible()),
                                                      (tick.label2, tick.label2.get_visible())) if on}
    return every, drawn


def texts(figure):
    """Every visible, non-empty text artist the figure draws (titles, labels, the tick labels in
    view, legends, annotations, table cells)."""
    every, drawn = _tick_labels(figure)
    found = []
    for artist in figure.findobj(Text):
        if not artist.get_visible() or not artist.get_text().strip():
            continue
        if artist.axes is not None and not artist.axes.get_visible():
            continue
        if id(artist) in every and id(artist) not in drawn:
            continue
        found.append(artist)
    for axes in _all_axes(figure):
        for table in axes.tables:
            found += [cell.get_text() for cell in table.get_celld().values()
                      if cell.get_text().get_text().strip()]
    return found


def _inside(box, outer):
    return (box.x0 >= outer.x0 - TOLERANCE and box.y0 >= outer.y0 - TOLERANCE
            and box.x1 <= outer.x1 + TOLERANCE and box.y1 <= outer.y1 + TOLERANCE)


def _overlap(a, b):
    return (min(a.x1, b.x1) - max(a.x0, b.x0) > TOLERANCE and min(a.y1, b.y1) - max(a.y0, b.y0) > TOLERANCE)


def layout_problems(figure):
    """Texts outside the figure and pairs of texts that overlap, as readable lines."""
    renderer = rendered(figure)
    outer = figure.bbox
    boxes = []
    for artist in texts(figure):
        box = artist.get_window_extent(renderer)
        if box.width <= 0 or box.height <= 0:
            continue
        clip = artist.get_clip_box() if artist.get_clip_on() else None
        if clip is not None and not _overlap(box, clip):
            continue  # clipped away: not drawn
        boxes.append((artist, box))
    problems = [f"outside the figure: {a.get_text()!r}" for a, box in boxes if not _inside(box, outer)]
    notes = {id(t) for axes in _all_axes(figure) for t in axes.texts}
    problems += [f"outside its axes: {a.get_text()!r}" for a, box in boxes
                 if id(a) in notes and a.axes.axison and not _inside(box, a.axes.bbox)]
    for i, (a, box_a) in enumerate(boxes):
        for b, box_b in boxes[i + 1:]:
            if _overlap(box_a, box_b):
                problems.append(f"overlap: {a.get_text()!r} and {b.get_text()!r}")
    return problems
