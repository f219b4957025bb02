"""Blitting: the artists a slider moves, drawn over a saved picture of the rest, only where they changed.

After a full draw the picture without the animated artists is kept (the
background) and the animated artists are drawn on top. An update then finds
the animated artists that changed (matplotlib marks them ``stale``), restores
the background where they were and where they are now, and draws again every
animated artist that touches those places, growing the set until it closes:
a pixel is then made of exactly the background and the same artists, in the
same order, as a full blit would make it, so the picture is identical
(``tests/test_panel_redraw.py`` checks it against a full redraw). A step of a
slider that moves one plot leaves the others' pixels alone.

Where an artist draws: inside its clip box when it is clipped (an axes'
curves; a pixel of room for Agg's rounding of the box), else inside its
window extent (a legend, a marker at the frame), with a few pixels of room
for antialiasing.

Cells: a panel may say which part of the figure holds all of an axes'
furniture (frame, ticks, tick labels, axis labels, title, legend). When only
that axes' limits change, :meth:`Blitter.redraw` draws the figure again
into a scratch canvas, with only the artists that reach into the cell, and
copies the cell into the background: a fraction of a full draw, and the same
pixels (tests compare it with a full redraw).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

__all__ = ["Blitter"]

#: Pixels added around an artist's box: antialiased edges spill over its extent.
_ROOM = 3

Region = tuple[int, int, int, int]  # rows r0:r1, columns c0:c1 of the canvas buffer


def _overlap(a: Region, b: Region) -> bool:
    return a[0] < b[1] and b[0] < a[1] and a[2] < b[3] and b[2] < a[3]


class Blitter:
    """The animated artists of one figure and the background they are drawn over."""

    def __init__(self, figure: Any) -> None:
        self.figure = figure
        self.artists: list[Any] = []
        self._background: np.ndarray | None = None
        self._drawn: dict[int, Region | None] = {}
        #: id(axes) -> (axes, its cell as rectangles in figure fractions (x0, y0, x1, y1))
        self.cells: dict[int, tuple[Any, list[tuple[float, float, float, float]]]] = {}
        self._scratch: Any = None

    def add(self, *artists: Any, before: Any = None) -> None:
        """Animate ``artists``, drawn in this order after those added before (or just ``before`` one)."""
        at = len(self.artists) if before is None else self.artists.index(before)
        self.artists[at:at] = artists
        for artist in artists:
            artist.set_animated(True)

    def release(self, *artists: Any) -> None:
        """Stop animating ``artists`` (about to be removed from the figure)."""
        gone = {id(artist) for artist in artists}
        self.artists[:] = [artist for artist in self.artists if id(artist) not in gone]
        for key in gone:
            self._drawn.pop(key, None)

    def _buffer(self) -> np.ndarray:
        return np.asarray(self.figure.canvas.get_renderer().buffer_rgba())

    @property
    def ready(self) -> bool:
        """True when a background of the canvas's current size is saved."""
        return self._background is not None and self._background.shape == self._buffer().shape

    def forget(self) -> None:
        self._background = None
        self._drawn.clear()

    def save(self) -> None:
        """Keep what the canvas holds now (a full draw, without animated artists); draw them on top."""
        self._background = self._buffer().copy()
        self._draw(self.artists)

    def _pixels(self, rect: tuple[float, float, float, float]) -> Region:
        """A rectangle in figure fractions as buffer rows and columns."""
        height, width = self._background.shape[:2]
        x0, y0, x1, y1 = rect
        # rounded, not widened: cells that share an edge do not overlap
        return (
            max(0, round((1.0 - y1) * height)),
            min(height, round((1.0 - y0) * height)),
            max(0, round(x0 * width)),
            min(width, round(x1 * width)),
        )

    def redraw(self, axes: list[Any]) -> bool:
        """Draw the cells of ``axes`` again (their limits changed); False when one has no cell."""
        if not all(id(ax) in self.cells for ax in axes):
            return False
        from matplotlib.backends.backend_agg import RendererAgg

        figure = self.figure
        height, width = self._background.shape[:2]
        if self._scratch is None or (self._scratch.height, self._scratch.width) != (height, width):
            self._scratch = RendererAgg(width, height, figure.dpi)
        scratch = self._scratch
        scratch.clear()
        regions = [self._pixels(rect) for ax in axes for rect in self.cells[id(ax)][1]]
        figure.patch.draw(scratch)
        renderer = figure.canvas.get_renderer()
        children = [a for a in figure.get_children() if a is not figure.patch and not a.get_animated()]
        for artist in sorted(children, key=lambda a: a.get_zorder()):  # the order of Figure.draw
            if id(artist) in self.cells:
                reach = [self._pixels(rect) for rect in self.cells[id(artist)][1]]
            elif hasattr(artist, "get_window_extent") and not hasattr(artist, "xaxis"):
                x0, y0, x1, y1 = artist.get_window_extent(renderer).extents
                reach = [self._pixels((x0 / width, y0 / height, x1 / width, y1 / height))]
            else:
                reach = [(0, height, 0, width)]  # an axes with no cell may draw anywhere
            if any(_overlap(mine, cell) for mine in reach for cell in regions):
                artist.draw(scratch)
        drawn = np.asarray(scratch.buffer_rgba())
        for r0, r1, c0, c1 in regions:
            self._background[r0:r1, c0:c1] = drawn[r0:r1, c0:c1]
        for ax in axes:
            ax.stale = False
        self._buffer()[...] = self._background
        self._draw(self.artists)
        return True

    def _region(self, artist: Any) -> Region | None:
        """Buffer rows and columns an artist can draw into, now."""
        if not artist.get_visible():
            return None
        box = artist.get_clip_box() if artist.get_clip_on() else None
        # a clipped artist cannot spill past its clip box, which Agg rounds to whole pixels: one
        # pixel of room, so a curve's axes does not reach the title a few pixels above it
        room = 1 if box is not None else _ROOM
        if box is None:
            box = artist.get_window_extent(self.figure.canvas.get_renderer())
        x0, y0, x1, y1 = box.extents
        if not all(map(math.isfinite, (x0, y0, x1, y1))) or x1 < x0 or y1 < y0:
            return None
        height, width = (
            self._background.shape[:2] if self._background is not None else self._buffer().shape[:2]
        )
        r0, r1 = height - math.ceil(y1) - room, height - math.floor(y0) + room
        c0, c1 = math.floor(x0) - room, math.ceil(x1) + room
        return max(r0, 0), min(r1, height), max(c0, 0), min(c1, width)

    def _draw(self, artists: list[Any], places: dict[int, Region | None] | None = None) -> None:
        """Draw ``artists`` in order and keep where each drew (``places``: already known, by id)."""
        for artist in artists:
            if artist.get_visible():
                (artist.axes or self.figure).draw_artist(artist)
            key = id(artist)
            self._drawn[key] = places[key] if places is not None and key in places else self._region(artist)
            artist.stale = False

    def update(self) -> bool:
        """Redraw the animated artists that changed, and those they touch; False when none changed."""
        changed = [artist for artist in self.artists if artist.stale]
        if not changed:
            return False
        # where each artist's pixels are: a changed one where it was drawn and where it will be, an
        # unchanged one where it was drawn (it has not moved: its place is not asked again, which
        # spares a text layout per artist and step)
        places: dict[int, list[Region]] = {}
        current: dict[int, Region | None] = {}
        for artist in self.artists:
            drawn = self._drawn.get(id(artist))
            now = self._region(artist) if artist.stale or id(artist) not in self._drawn else drawn
            current[id(artist)] = now
            places[id(artist)] = [r for r in {drawn, now} if r is not None]
        # each place once: the curves of one axes share its clip box, copied back and tested once
        regions = list(dict.fromkeys(r for a in changed for r in places[id(a)]))
        chosen = {id(a) for a in changed}
        growing = True
        while growing:
            growing = False
            for artist in self.artists:
                if id(artist) in chosen:
                    continue
                own = places[id(artist)]
                if any(_overlap(mine, other) for mine in own for other in regions):
                    chosen.add(id(artist))
                    regions += [r for r in own if r not in regions]
                    growing = True
        buffer = self._buffer()
        for r0, r1, c0, c1 in regions:
            buffer[r0:r1, c0:c1] = self._background[r0:r1, c0:c1]
        self._draw([artist for artist in self.artists if id(artist) in chosen], current)
        return True
