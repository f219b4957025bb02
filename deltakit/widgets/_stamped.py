"""Labels, tick labels and legends drawn from a picture of themselves made once.

Laying out and rasterising a text costs matplotlib about 0.6 ms however short
it is, and a label that follows a moving mark (a percentile, a bar's share) is
drawn again on every step. A :class:`StampedText` renders its glyphs once per
text, font, colour and resolution into a small transparent picture, and later
draws only stamp that picture at the label's place, its anchor on a whole
pixel (so the picture is the same at every place). Every draw of the label,
blitted or full, goes through the same stamp, so a blitted frame still equals
a full redraw pixel for pixel (``tests/test_panel_redraw.py``).

Two more kinds of stamps serve full draws (a body or a map typed anew):
tick labels (:func:`stamp_tick_labels`: their pictures are shared by every
axis, so the "0", "20" or "Nov 2028" drawn before costs nothing) and
legends (:func:`stamp_legend`: laid out and drawn once per place and
content, within a level of rounding of matplotlib's own picture). A panel's
view stamps its figure's tick labels and legends before every full or cell
draw (:func:`stamp_figure`), whenever the panel made them.

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
from matplotlib.legend import Legend
from matplotlib.text import Text
from matplotlib.transforms import IdentityTransform

__all__ = ["StampedText", "stamp_figure", "stamp_legend", "stamp_tick_labels", "stamped", "stamped_text"]

#: Pictures kept per label (one per text it has shown); the oldest is dropped beyond this.
_KEPT = 64
#: Pictures kept for tick labels, shared by every axis (the same "0" or "Nov 2028" serves all).
_KEPT_SHARED = 1024
_SHARED: dict[tuple, tuple[np.ndarray, int, int]] = {}
#: Transparent pixels around a label's glyphs in its picture (antialiased edges).
_PAD = 3


def _figure_of(artist: Any, *, root: bool) -> Any:
    """The figure an artist is in (``get_figure(root=...)`` since matplotlib 3.10, ``.figure`` before)."""
    try:
        return artist.get_figure(root=root)
    except TypeError:
        return artist.figure


class StampedText(Text):
    """A :class:`~matplotlib.text.Text` drawn on Agg canvases from a cached picture of its glyphs."""

    _kept = _KEPT

    def _store(self) -> dict[tuple, tuple[np.ndarray, int, int]]:
        """This label's pictures (made on first use: a Text turned stamped has none yet)."""
        return self.__dict__.setdefault("_stamps", {})

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
            getattr(self, "_antialiased", None),  # a Text property since matplotlib 3.8
            renderer.dpi,
        )
        store = self._store()
        found = store.get(key)
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
        proto.set_figure(_figure_of(self, root=True))
        proto.draw(small)
        picture = np.ascontiguousarray(np.asarray(small.buffer_rgba())[::-1])  # draw_image: bottom row first
        if len(store) >= self._kept:
            store.pop(next(iter(store)))
        store[key] = found = (picture, anchor_x, anchor_y)
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


class _StampedTickLabel(StampedText):
    """A tick label (or another label whose texts recur): its pictures are shared with every other."""

    _kept = _KEPT_SHARED

    def _store(self) -> dict[tuple, tuple[np.ndarray, int, int]]:
        return _SHARED


def stamp_tick_labels(axis: Any) -> None:
    """Draw the tick labels of ``axis`` as stamps: those it has and those it makes later.

    A change of limits gives new tick labels, most of them texts drawn
    before ("0", "20", "Nov 2028"): their pictures are found in a cache
    shared by all axes, so a full draw of the figure lays out and rasterises
    only the texts it has never shown. The labels' places and sizes (and so
    the layout of the axes) are matplotlib's own; only their anchors are
    rounded to whole pixels when drawn.

    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> stamp_tick_labels(ax.xaxis)
    >>> type(ax.xaxis.get_major_ticks()[0].label1).__name__
    '_StampedTickLabel'
    """
    if getattr(axis, "_deltakit_stamped", False):
        return  # stamped already: its tick factory is wrapped once
    axis._deltakit_stamped = True
    make = axis._get_tick  # matplotlib makes every tick here (Axis._get_tick, matplotlib >= 3.1)

    def stamped_labels(tick: Any) -> Any:
        for text in (tick.label1, tick.label2):
            if type(text) is Text:
                text.__class__ = _StampedTickLabel  # the same object: its axis keeps every reference
        return tick

    axis._get_tick = lambda major: stamped_labels(make(major))
    for tick in [*axis.majorTicks, *axis.minorTicks]:
        stamped_labels(tick)


def stamped(text: Text, *, shared: bool = False) -> StampedText:
    """A :class:`StampedText` in place of ``text``: the same look and place, in the same axes or figure.

    ``shared``: its pictures go to the cache the tick labels share (for labels
    made anew with texts that recur, such as a contour's values).

    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> label = stamped(ax.text(0.5, 0.5, "P10", fontsize="small", ha="center"))
    >>> label.get_text(), label.get_horizontalalignment(), label in ax.texts
    ('P10', 'center', True)
    """
    new = (_StampedTickLabel if shared else StampedText)(*text.get_position(), text.get_text())
    new.update_from(text)
    new.set_zorder(text.get_zorder())
    new.set_animated(text.get_animated())
    axes = text.axes
    transform = text.get_transform()
    text.remove()
    if axes is not None:
        axes._add_text(new)  # where Axes.text puts a text: ax.texts, clipped to the axes patch
    else:
        _figure_of(text, root=False).add_artist(new)
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


def _look(handle: Any) -> tuple:
    """What a legend handle shows (a change of any of these draws the legend anew)."""
    keys = []
    for name in (
        "get_color",
        "get_facecolor",
        "get_edgecolor",
        "get_linestyle",
        "get_linewidth",
        "get_marker",
        "get_markersize",
        "get_hatch",
        "get_alpha",
        "get_visible",
    ):
        getter = getattr(handle, name, None)
        if getter is not None:
            value = getter()
            keys.append(tuple(np.ravel(value).tolist()) if isinstance(value, np.ndarray) else value)
    return (type(handle).__name__, *map(str, keys))


class _StampedLegend(Legend):
    """A legend drawn on Agg canvases from a picture of itself, made once per place and content."""

    def _key(self, renderer: Any) -> tuple:
        anchor = self.get_bbox_to_anchor()
        return (
            renderer.dpi,
            renderer.width,
            renderer.height,
            str(self._loc),
            tuple(anchor.bounds) if anchor is not None else None,
            tuple(self.parent.bbox.bounds),
            self.get_title().get_text(),
            tuple(text.get_text() for text in self.get_texts()),
            tuple(_look(handle) for handle in self.legend_handles),
            self.get_frame_on(),
        )

    def draw(self, renderer: Any) -> None:
        if type(renderer) is not RendererAgg or not self.get_visible():
            Legend.draw(self, renderer)
            return
        key = self._key(renderer)
        store = self.__dict__.setdefault("_stamps", {})
        found = store.get(key)
        if found is None:
            # the legend drawn alone on a transparent canvas of the same size: the same layout and
            # pixels as on the figure, then cut out around it
            scratch = RendererAgg(int(renderer.width), int(renderer.height), renderer.dpi)
            Legend.draw(self, scratch)
            box = self.get_window_extent(scratch)
            width, height = int(renderer.width), int(renderer.height)
            x0, x1 = max(math.floor(box.x0) - _PAD, 0), min(math.ceil(box.x1) + _PAD, width)
            y0, y1 = max(math.floor(box.y0) - _PAD, 0), min(math.ceil(box.y1) + _PAD, height)
            if x1 <= x0 or y1 <= y0:
                return
            pixels = np.asarray(scratch.buffer_rgba())[height - y1 : height - y0, x0:x1]
            if len(store) >= 8:
                store.pop(next(iter(store)))
            store[key] = found = (np.ascontiguousarray(pixels[::-1]), x0, y0)  # draw_image: bottom row first
        picture, x0, y0 = found
        gc = renderer.new_gc()
        renderer.draw_image(gc, x0, y0, picture)
        gc.restore()
        self.stale = False


def stamp_legend(legend: Legend) -> None:
    """Draw ``legend`` from a picture of itself, made again only when its place or content changes.

    Laying out a legend (its boxes of handles and texts) and drawing it
    takes several milliseconds per legend at every full draw of a panel,
    for a picture that a new body or orbit does not change.

    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> _ = ax.plot([0, 1], label="burn")
    >>> legend = ax.legend()
    >>> stamp_legend(legend)
    >>> isinstance(legend, Legend), type(legend).__name__
    (True, '_StampedLegend')
    """
    if type(legend) is Legend:
        legend.__class__ = _StampedLegend  # the same object: its axes or figure keeps its reference


def stamp_figure(figure: Any) -> None:
    """Stamp the tick labels of every 2-D axes and every legend of ``figure`` not stamped yet.

    :class:`~deltakit.widgets._view.FigureView` calls it before each full or
    cell draw, so axes, colour bars and legends a panel makes at any time
    (at its first draw, with a new map) are drawn from stamps too. Cheap when
    all are stamped already.

    >>> from matplotlib.figure import Figure
    >>> figure = Figure()
    >>> ax = figure.add_subplot()
    >>> _ = ax.plot([0, 1], label="burn")
    >>> _ = ax.legend()
    >>> stamp_figure(figure)
    >>> type(ax.get_legend()).__name__, type(ax.xaxis.get_major_ticks()[0].label1).__name__
    ('_StampedLegend', '_StampedTickLabel')
    """
    for ax in figure.axes:
        if ax.name == "rectilinear":
            stamp_tick_labels(ax.xaxis)
            stamp_tick_labels(ax.yaxis)
        legend = ax.get_legend()
        if legend is not None:
            stamp_legend(legend)
    for legend in figure.legends:
        stamp_legend(legend)
