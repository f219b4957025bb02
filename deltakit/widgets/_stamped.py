"""Labels that slider steps move, drawn from a picture of their glyphs made once.

Laying out and rasterising a text costs matplotlib about 0.6 ms however short
it is, and a label that follows a moving mark (a percentile, a bar's share) is
drawn again on every step. A :class:`StampedText` renders its glyphs once per
text, font, colour and resolution into a small transparent picture, and later
draws only stamp that picture at the label's place, its anchor on a whole
pixel (so the picture is the same at every place). Every draw of the label,
blitted or full, goes through the same stamp, so a blitted frame still equals
a full redraw pixel for pixel (``tests/test_panel_redraw.py``).

Only on matplotlib's Agg canvases (the panels, PNG files); any other renderer
(PDF, SVG, a report's vector figure) draws the label as the plain
:class:`matplotlib.text.Text` it is, as do labels with a box, path effects
or TeX.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from matplotlib.backends.backend_agg import RendererAgg
from matplotlib.colors import to_rgba
from matplotlib.text import Text
from matplotlib.transforms import IdentityTransform

__all__ = ["StampedText", "stamped", "stamped_text"]

#: Pictures kept per label (one per text it has shown); the oldest is dropped beyond this.
_KEPT = 64
#: Transparent pixels around a label's glyphs in its picture (antialiased edges).
_PAD = 3


class StampedText(Text):
    """A :class:`~matplotlib.text.Text` drawn on Agg canvases from a cached picture of its glyphs."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        super().__init__(*args, **kwargs)
        self._stamps: dict[tuple, tuple[np.ndarray, int, int]] = {}

    def _plain(self, renderer: Any) -> bool:
        return (
            type(renderer) is not RendererAgg
            or self.get_bbox_patch() is not None
            or bool(self.get_path_effects())
            or self.get_usetex()
        )

    def _stamp(self, renderer: Any, posx: float, posy: float) -> tuple[np.ndarray, int, int]:
        """The picture of the glyphs and where the anchor sits in it (columns from the left, rows up)."""
        key = (
            self.get_text(),
            hash(self._fontproperties),
            to_rgba(self.get_color(), self.get_alpha()),
            self.get_horizontalalignment(),
            self.get_verticalalignment(),
            self._multialignment,
            self.get_rotation(),
            self._linespacing,
            self._antialiased,
            renderer.dpi,
        )
        found = self._stamps.get(key)
        if found is not None:
            return found
        box = self.get_window_extent(renderer)
        anchor_x = _PAD + math.ceil(posx - box.x0)
        anchor_y = _PAD + math.ceil(posy - box.y0)
        width = anchor_x + math.ceil(box.x1 - posx) + _PAD + 1
        height = anchor_y + math.ceil(box.y1 - posy) + _PAD + 1
        small = RendererAgg(max(width, 1), max(height, 1), renderer.dpi)
        proto = Text(anchor_x, anchor_y, self.get_text())
        proto.update_from(self)
        proto.set_transform(IdentityTransform())
        proto.set_clip_on(False)
        proto.set_clip_path(None)
        proto.set_figure(self.get_figure(root=True))
        proto.draw(small)
        picture = np.ascontiguousarray(np.asarray(small.buffer_rgba())[::-1])  # draw_image: bottom row first
        if len(self._stamps) >= _KEPT:
            self._stamps.pop(next(iter(self._stamps)))
        self._stamps[key] = found = (picture, anchor_x, anchor_y)
        return found

    def draw(self, renderer: Any) -> None:
        if renderer is None or not self.get_visible() or self.get_text() == "" or self._plain(renderer):
            super().draw(renderer)
            return
        self._renderer = renderer
        x, y = self.get_unitless_position()
        posx, posy = self.get_transform().transform((x, y))
        if not (math.isfinite(posx) and math.isfinite(posy)):
            return
        posx, posy = float(round(posx)), float(round(posy))  # a whole pixel: one picture serves everywhere
        picture, anchor_x, anchor_y = self._stamp(renderer, posx, posy)
        gc = renderer.new_gc()
        self._set_gc_clip(gc)
        renderer.draw_image(gc, int(posx) - anchor_x, int(posy) - anchor_y, picture)
        gc.restore()
        self.stale = False


def stamped(text: Text) -> StampedText:
    """A :class:`StampedText` in place of ``text``: the same look and place, in the same axes or figure.

    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> label = stamped(ax.text(0.5, 0.5, "P10", fontsize="small", ha="center"))
    >>> label.get_text(), label.get_horizontalalignment(), label in ax.texts
    ('P10', 'center', True)
    """
    new = StampedText(*text.get_position(), text.get_text())
    new.update_from(text)
    new.set_zorder(text.get_zorder())
    new.set_animated(text.get_animated())
    axes = text.axes
    transform = text.get_transform()
    text.remove()
    if axes is not None:
        axes._add_text(new)  # where Axes.text puts a text: ax.texts, clipped to the axes patch
    else:
        text.get_figure(root=False).add_artist(new)
    new.set_transform(transform)
    new.set_clip_on(text.get_clip_on())
    return new


def stamped_text(ax: Any, x: float, y: float, text: str, **kwargs: Any) -> StampedText:
    """``ax.text(x, y, text, **kwargs)``, made a :class:`StampedText`.

    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> type(stamped_text(ax, 0.0, 1.0, "12 %", va="center")).__name__
    'StampedText'
    """
    return stamped(ax.text(x, y, text, **kwargs))
