"""Labels that keep clear of each other: a figure's movable labels are nudged until none
overlaps another label, the legend, the axis texts or the edge of its axes.

A figure function marks a label it may move with :func:`movable` and calls :func:`declutter`
last. The layout is run once; the legend is then pinned where it was put
(its "best" place would otherwise move away from the labels it is being kept clear of), and
each movable label in turn, in the order it was drawn, takes the first free place among
small steps up and down (then sideways) from where it was asked to stand.
"""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.text import Annotation, Text

from ..readout import CAUTION_SHORT

MOVABLE = "isokin-movable"
#: Steps tried, in units of the label's own height (up and down alternately), then sideways
#: in units of its width.
VERTICAL_STEPS = np.array([0.0, 0.6, -0.6, 1.2, -1.2, 1.8, -1.8, 2.4, -2.4, 3.0, -3.0, 3.6, -3.6, 4.5, -4.5, 5.5,
                           -5.5, 7.0, -7.0, 9.0, -9.0])
SIDEWAYS_STEPS = np.array([0.0, -0.5, 0.5, -1.0, 1.0])
#: Clear space kept around a label, pixels.
PAD_PX = 1.5


def literal(text: str) -> str:
    """Input text as plain text on a figure: a ``$`` is a dollar sign, never maths."""
    return text.replace("$", r"\$")


def finish(fig, footer="", width=150):
    """Finish a report figure: the footer (``footer``, each paragraph wrapped to ``width``
    characters, then the short caution) under the axes with room made for it, and the
    movable labels set clear (:func:`declutter`). Returns the figure."""
    lines = [line for paragraph in footer.split("\n") if paragraph.strip()
             for line in textwrap.wrap(paragraph, width)]
    text = "\n".join([*lines, f"{CAUTION_SHORT} isokin estimate."])
    fig.text(0.01, 0.005, literal(text), fontsize=6.8, color="#444444", ha="left", va="bottom")
    bottom = 0.025 * (len(lines) + 1) + 0.015
    fig.get_layout_engine().set(rect=(0, bottom, 1, 0.995 - bottom))
    declutter(fig)
    return fig


def movable(text):
    """Mark a label that :func:`declutter` may move; returns it."""
    text.set_gid(MOVABLE)
    text.set_in_layout(False)
    return text


def _visible(text):
    return text.get_visible() and bool(text.get_text().strip())


def _drawn_ticks(fig):
    """Tick labels outside their axis's view are kept but never drawn: they take no room."""
    hidden = set()
    for axis in fig.findobj(lambda a: hasattr(a, "get_major_ticks") and hasattr(a, "get_view_interval")):
        low, high = sorted(axis.get_view_interval())
        for tick in (*axis.get_major_ticks(), *axis.get_minor_ticks()):
            if not (low <= tick.get_loc() <= high or np.isclose(tick.get_loc(), [low, high], rtol=1e-9).any()):
                hidden |= {tick.label1, tick.label2}
    return hidden


def declutter(fig):
    """Move the figure's movable labels clear of every other label (see the module notes)."""
    renderer = fig.canvas.get_renderer()
    engine = fig.get_layout_engine()
    if engine is not None:  # the layout alone, not a whole drawing pass over every curve
        engine.execute(fig)
    legends = [ax.get_legend() for ax in fig.axes if ax.get_legend() is not None] + list(fig.legends)
    for legend in legends:  # pin it where the layout put it
        box = legend.get_window_extent(renderer).transformed(legend.axes.transAxes.inverted()) \
            if legend.axes is not None else None
        if box is not None:
            legend.set_loc((float(box.x0), float(box.y0)))
    in_legend = {t for lg in legends for t in (*lg.get_texts(), lg.get_title())}
    hidden = _drawn_ticks(fig)
    texts = [t for t in fig.findobj(Text) if t not in in_legend and t not in hidden and _visible(t)]
    placed = [lg.get_window_extent(renderer) for lg in legends]
    placed += [_extent(t, renderer) for t in texts if t.get_gid() != MOVABLE]
    for text in (t for t in texts if t.get_gid() == MOVABLE):
        placed.append(_place(text, renderer, placed))


def _extent(text, renderer):
    """The box of the words alone (an annotation's own extent takes in its arrow)."""
    if isinstance(text, Annotation):
        text.update_positions(renderer)  # where its words stand, before any drawing
    return Text.get_window_extent(text, renderer)


def _place(text, renderer, placed):
    box = _extent(text, renderer)
    frame = text.axes.bbox if text.axes is not None else text.figure.bbox
    best = None
    for dx in SIDEWAYS_STEPS * box.width:
        for dy in VERTICAL_STEPS * box.height:
            moved = box.translated(dx, dy)
            inside = (moved.x0 >= frame.x0 and moved.x1 <= frame.x1 and moved.y0 >= frame.y0
                      and moved.y1 <= frame.y1)
            if inside and not any(moved.padded(PAD_PX).overlaps(other) for other in placed):
                best = (dx, dy)
                break
        if best is not None:
            break
    if best is None or best == (0.0, 0.0):
        return box
    _shift(text, *best)
    return box.translated(*best)


def _shift(text, dx, dy):
    """Move a text (or an annotation's text) by (dx, dy) pixels, in its own coordinates."""
    if isinstance(text, Annotation):
        if text.anncoords == "offset points":
            per_point = text.figure.dpi / 72.0
            text.xyann = (text.xyann[0] + dx / per_point, text.xyann[1] + dy / per_point)
            return
        transform = {"data": text.axes.transData, "axes fraction": text.axes.transAxes}[text.anncoords]
        x, y = transform.transform(text.xyann)
        text.xyann = tuple(transform.inverted().transform((x + dx, y + dy)))
    else:
        transform = text.get_transform()
        x, y = transform.transform(text.get_position())
        text.set_position(tuple(transform.inverted().transform((x + dx, y + dy))))
