"""A panel's figure and the widget that shows it: live in a kernel, a static PNG elsewhere.

Figures are live (an ipympl canvas widget) when the code runs in a Jupyter
kernel with ipympl installed, and static otherwise (an Image widget holding the
figure's PNG, sent again after each update). ``DELTAKIT_FIGURES=live|static|auto``
in the environment overrides the choice.

Speed: artists that slider steps move are registered with
:meth:`FigureView.animate`. A step redraws only them, over a saved picture of
everything else (blitting), and a full draw happens only when something else
changed (:meth:`FigureView.invalidate`: axis limits, a body or an orbit typed
in a number box). Pictures are PNG-encoded by :func:`~deltakit.widgets._png.encode_png`
(unfiltered rows, zlib level 1: exact, about 4x faster than Pillow's default);
the live canvas sends only the pixels that changed (ipympl's diff frames), the
static view a whole PNG whose unchanged bands of rows keep their compressed
bytes (:class:`~deltakit.widgets._png.FrameEncoder`).

The notebook's own matplotlib set-up is left alone: importing ipympl would
switch the global backend (its package ``__init__`` calls ``matplotlib.use``),
so it is imported here with that call held off; panels never touch rcParams.
"""

from __future__ import annotations

import contextlib
import os
from base64 import b64encode
from collections.abc import Iterator
from typing import Any

import ipywidgets as widgets
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from ._blit import Blitter
from ._png import FrameEncoder, encode_png
from ._stamped import stamp_figure

__all__ = ["FigureView", "figure_mode"]


def figure_mode() -> str:
    """``"live"`` (ipympl canvas) or ``"static"`` (PNG) for new panels.

    Live needs ipympl and a running Jupyter kernel; ``DELTAKIT_FIGURES`` set to
    ``live`` or ``static`` overrides the automatic choice.
    """
    wanted = os.environ.get("DELTAKIT_FIGURES", "auto").strip().lower()
    if wanted in ("live", "static"):
        return wanted
    try:
        from IPython import get_ipython

        shell = get_ipython()
        if shell is None or not hasattr(shell, "kernel"):
            return "static"
        import importlib.util

        if importlib.util.find_spec("ipympl") is None:
            return "static"
    except Exception:  # noqa: BLE001  # no IPython or no kernel: a static figure still works
        return "static"
    return "live"


@contextlib.contextmanager
def _backend_kept() -> Iterator[None]:
    """Hold off ``matplotlib.use`` while ipympl is imported, so the notebook's backend stays."""
    import matplotlib

    use = matplotlib.use
    matplotlib.use = lambda *args, **kwargs: None
    try:
        yield
    finally:
        matplotlib.use = use


_LIVE_CANVAS: type | None = None


def _live_canvas_class() -> type:
    """ipympl's canvas widget, sending frames encoded by :func:`encode_png` (made once)."""
    global _LIVE_CANVAS
    if _LIVE_CANVAS is not None:
        return _LIVE_CANVAS
    with _backend_kept():
        from ipympl.backend_nbagg import Canvas

    class LiveCanvas(Canvas):
        """An ipympl canvas whose frames cost a fast exact encode (same protocol, same pixels)."""

        def get_diff_image(self) -> bytes | None:
            # matplotlib's web canvas protocol: a full frame first, then frames holding only the
            # pixels that changed (the others transparent, drawn over the last frame by the browser)
            if not self._png_is_old:
                return None
            pixels = np.asarray(self.get_renderer().buffer_rgba())
            buff = pixels.view(np.uint32).squeeze(2)
            if self._force_full or buff.shape != self._last_buff.shape or (pixels[:, :, 3] != 255).any():
                self.set_image_mode("full")
                output = pixels
            else:
                self.set_image_mode("diff")
                output = np.where(buff != self._last_buff, buff, 0).view(np.uint8).reshape(pixels.shape)
            self._last_buff = buff.copy()
            self._force_full = False
            self._png_is_old = False
            if self._current_image_mode == "diff":
                # the rows a step leaves alone are transparent in every diff frame: their deflated
                # bands are reused, only the rows that changed are deflated
                frames = self.__dict__.setdefault("_diff_frames", FrameEncoder())
                return frames.encode(output, keep_alpha=True)
            return encode_png(output)

        def send_binary(self, data: bytes) -> None:
            if self.syncing_data_url:  # no browser yet: keep a picture for a saved notebook's widget state
                pixels = self._last_buff.view(np.uint8).reshape((*self._last_buff.shape, 4))
                self._data_url = b64encode(encode_png(pixels)).decode("ascii")
            self.send({"data": '{"type": "binary"}'}, buffers=[data])

        @property
        def shown(self) -> bool:
            """True once a browser has drawn this canvas (it then asks for frames itself)."""
            return not self.syncing_data_url

    _LIVE_CANVAS = LiveCanvas
    return LiveCanvas


class FigureView:
    """A matplotlib Figure and the widget that shows it.

    Call :meth:`refresh` after moving artists. Artists registered with
    :meth:`animate` are the ones slider steps move; a refresh redraws those
    that changed over the saved background (:class:`~deltakit.widgets._blit.Blitter`)
    unless :meth:`invalidate` asked for a full draw since the last one.
    """

    def __init__(self, figure: Figure, mode: str | None = None) -> None:
        self.figure = figure
        self.mode = mode or figure_mode()
        self._blitter = Blitter(figure)
        self._frames = FrameEncoder()  # the static view's PNGs: only changed rows deflated again
        self._stale = True
        self._stale_axes: list[Any] = []
        #: Full draws and cell redraws so far (tests and benchmarks read them).
        self.full_draws = 0
        self.cell_draws = 0
        if self.mode == "live":
            canvas = _live_canvas_class()(figure)
            with _backend_kept():
                from ipympl.backend_nbagg import FigureManager

            FigureManager(canvas, id(figure))
            canvas.header_visible = False
            # ipympl lays its toolbar over the figure wherever it is placed (over the y-axis label and
            # ticks on the left, over titles and legends at the top), and a panel keeps its own axis
            # limits, which pan and zoom would fight: no toolbar. ``panel.figure.savefig`` saves a picture.
            canvas.toolbar_visible = False
            canvas.toolbar_position = "top"
            canvas.resizable = False
            self.widget: widgets.DOMWidget = canvas
        else:
            FigureCanvasAgg(figure)
            self.widget = widgets.Image(format="png", layout=widgets.Layout(max_width="100%", height="auto"))
        self.widget.add_class("deltakit-figure")
        figure.canvas.mpl_connect("draw_event", self._after_full_draw)

    def animate(self, *artists: Any, before: Any = None) -> None:
        """Mark artists that slider steps move; they are redrawn alone over a saved background.

        They are drawn in the order given, after the animated artists marked
        earlier, or just before the animated artist ``before`` (their z-order
        among the animated ones).

        After every full draw (ours, a resize, a request from the browser) the
        background is saved again and the animated artists drawn on top, so
        they are never missing from the picture.
        """
        self._blitter.add(*artists, before=before)

    def release(self, *artists: Any) -> None:
        """Stop animating ``artists`` (call it before removing them from the figure)."""
        self._blitter.release(*artists)

    def cell(self, axes: Any, *rects: tuple[float, float, float, float]) -> None:
        """Say which part of the figure (rectangles in figure fractions) holds all of ``axes``' furniture.

        Its frame, ticks, tick labels, axis labels, title and legend must lie
        inside; then a change of its limits redraws only that part.
        """
        self._blitter.cells[id(axes)] = (axes, list(rects))

    def invalidate(self, *axes: Any) -> None:
        """Ask for a redraw at the next :meth:`refresh`: of these axes' cells, or of everything.

        Call it when something not animated changed: axis limits (name the
        axes), a label or a legend (no axes: a full draw).
        """
        if axes:
            self._stale_axes += [ax for ax in axes if ax not in self._stale_axes]
        else:
            self._stale = True

    @property
    def stale(self) -> bool:
        """True when the next refresh draws the whole figure."""
        return self._stale or not self._blitter.ready

    def _after_full_draw(self, event: Any) -> None:
        if (
            self.figure.canvas.is_saving()
        ):  # savefig draws animated artists itself; its picture is no background
            self._blitter.forget()
            return
        self.full_draws += 1
        self._blitter.save()

    def refresh(self) -> None:
        """Show the figure's current artists: the animated ones that changed, or all when needed."""
        canvas = self.figure.canvas
        full = self.stale
        axes, self._stale, self._stale_axes = self._stale_axes, False, []
        if full or axes:  # tick labels and legends made since the last draw become stamps too
            stamp_figure(self.figure)
        if not full and axes:
            full = not self._blitter.redraw(axes)
            self.cell_draws += not full
        elif not full and not self._blitter.update():
            return  # nothing moved: nothing to draw or send
        if self.mode == "live":
            if not full:
                canvas.blit(self.figure.bbox)
            elif canvas.shown:
                canvas.draw()  # draws and sends the frame at once: no round trip through the browser
            else:
                canvas.draw_idle()  # the browser asks for the first frame when it shows the canvas
            return
        if full:
            canvas.draw()  # the draw_event hook saves the background and adds the animated artists
        self.widget.value = self.png()

    def png(self) -> bytes:
        """PNG bytes of what the canvas holds now (exact, fast: it is sent often)."""
        return self._frames.encode(np.asarray(self.figure.canvas.buffer_rgba()))

    def close(self) -> None:
        """Let go of the figure: close the canvas widget (and ipympl's toolbar) and drop the artists."""
        canvas = self.figure.canvas
        toolbar = getattr(canvas, "toolbar", None)
        for widget in (self.widget, toolbar):
            if isinstance(widget, widgets.Widget):
                widget.close()
        self._blitter.artists.clear()
        self._blitter.forget()
