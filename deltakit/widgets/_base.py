"""What every deltakit panel shares: controls in display units, values in SI,
one update method, a figure that updates in place, readouts, a message line for
invalid input, the caution line, and export/restore.

Figures are live (an ipympl canvas widget) when the code runs in a Jupyter
kernel with ipympl installed, and static otherwise (an Image widget holding the
figure's PNG, redrawn after each update). ``DELTAKIT_FIGURES=live|static|auto``
in the environment overrides the choice.
"""

from __future__ import annotations

import html
import io
import math
import os
from collections.abc import Callable, Iterable
from typing import Any, ClassVar

import ipywidgets as widgets
import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from .._text import CAUTION
from ..errors import DomainError

__all__ = ["CAUTION", "FigureView", "Panel", "figure_mode", "json_ready", "on_slider_grid"]


#: Significant digits kept when a display value is turned back into SI, so that
#: ``set(**values)`` followed by ``values`` gives the same numbers.
_DIGITS = 12


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
        import ipympl.backend_nbagg  # noqa: F401
    except Exception:  # noqa: BLE001  # no IPython, no kernel or no ipympl: a static figure still works
        return "static"
    return "live"


class FigureView:
    """A matplotlib Figure and the widget that shows it.

    ``refresh()`` after moving artists: a live canvas redraws when idle, a
    static view renders the PNG again. Artists registered with
    :meth:`animate` are the ones a fast update moves: in a static view they
    are drawn over a saved background (blitting), so ``refresh(fast=True)``
    skips the axes, ticks and text that did not change.
    """

    def __init__(self, figure: Figure, mode: str | None = None) -> None:
        self.figure = figure
        self.mode = mode or figure_mode()
        self._animated: list[Any] = []
        self._background: Any = None
        if self.mode == "live":
            from ipympl.backend_nbagg import Canvas, FigureManager

            canvas = Canvas(figure)
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

    def animate(self, *artists: Any) -> None:
        """Mark artists that fast updates move; they are blitted over a saved background.

        After every full draw (ours, a resize, a request from the browser) the
        background is saved again and the animated artists drawn on top, so
        they are never missing from the picture.
        """
        if not self._animated:
            self.figure.canvas.mpl_connect("draw_event", self._after_full_draw)
        self._animated.extend(artists)
        for artist in artists:
            artist.set_animated(True)

    def _after_full_draw(self, event: Any) -> None:
        canvas = self.figure.canvas
        if canvas.is_saving():  # savefig draws animated artists itself; its picture is no background
            self._background = None
            return
        self._background = canvas.copy_from_bbox(self.figure.bbox)
        self._draw_animated()

    def _draw_animated(self) -> None:
        for artist in self._animated:
            if artist.get_visible():
                artist.axes.draw_artist(artist)

    def refresh(self, fast: bool = False) -> None:
        """Show the figure's current artists; ``fast`` when only animated artists moved."""
        canvas = self.figure.canvas
        blit = fast and self._background is not None
        if blit:
            canvas.restore_region(self._background)
            self._draw_animated()
        if self.mode == "live":
            canvas.blit(self.figure.bbox) if blit else canvas.draw_idle()
            return
        if not blit:
            canvas.draw()  # the draw_event hook saves the background and adds the animated artists
        self.widget.value = self.png()

    def png(self) -> bytes:
        """PNG bytes of what the canvas holds now (fast zlib level: it is redrawn often)."""
        from PIL import Image

        canvas = self.figure.canvas
        image = Image.frombuffer("RGBA", canvas.get_width_height(), canvas.buffer_rgba(), "raw", "RGBA", 0, 1)
        buffer = io.BytesIO()
        image.save(buffer, format="png", compress_level=1)
        return buffer.getvalue()


def json_ready(value: Any) -> Any:
    """Plain Python numbers, lists and dicts; NaN and infinities become None."""
    if isinstance(value, dict):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, (np.ndarray, np.generic)):
        return json_ready(value.tolist())
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return value
    if isinstance(value, (int, float)):
        value = float(value) if isinstance(value, float) else value
        return None if isinstance(value, float) and not math.isfinite(value) else value
    return str(value)


def _decimals(x: float) -> int:
    """Decimal places of a slider's step or origin as written (0.05 -> 2, 5.0 -> 0)."""
    text = f"{abs(x):.10f}".rstrip("0")
    return len(text.split(".")[1])


def on_slider_grid(value: float, low: float, step: float) -> float:
    """The nearest value a slider with origin ``low`` and ``step`` can hold: ``low + k * step``.

    The browser's slider snaps every value to this grid and sends the snapped
    value back to the kernel, so a panel only ever gives its sliders grid values.

    >>> on_slider_grid(7.6686, 0.0, 0.05), on_slider_grid(-37.3, -180.0, 1.0), on_slider_grid(0.3, 0.0, 0.1)
    (7.65, -37.0, 0.3)
    """
    if not step > 0.0:
        return float(value)
    k = round((value - low) / step)
    return round(low + k * step, max(_decimals(step), _decimals(low)))


def _is_slider(widget: Any) -> bool:
    return isinstance(widget, (widgets.FloatSlider, widgets.IntSlider))


def _round_si(x: float) -> float:
    return float(f"{x:.{_DIGITS}g}")


def html_table(rows: Iterable[tuple[str, str, str]]) -> str:
    """Readout rows ``(key, label, text)`` as a small HTML table; keys become data attributes."""
    cells = "".join(
        f'<tr data-readout="{html.escape(key)}"><td style="padding:1px 12px 1px 0">{html.escape(label)}</td>'
        f'<td style="padding:1px 0;font-variant-numeric:tabular-nums"><b>{html.escape(text)}</b></td></tr>'
        for key, label, text in rows
    )
    return f"<table>{cells}</table>"


def fmt(value: Any, scale: float, unit: str, digits: int = 4) -> str:
    """A readout number in display units.

    >>> fmt(4612.3, 1e3, "km/s"), fmt(61970183.9, 1e3, "km"), fmt(51579.9, 1e6, "MJ/kg")
    ('4.612 km/s', '61,970 km', '0.05158 MJ/kg')
    """
    value = float(value)
    if math.isinf(value):
        return ("" if value > 0 else "-") + "unbounded"
    if not math.isfinite(value):
        return "n/a"
    shown = value / scale
    size = abs(shown)
    if size >= 10 ** (digits - 1):
        text = f"{shown:,.0f}"
    elif size >= 1.0:
        text = f"{shown:.{digits - 1 - math.floor(math.log10(size))}f}"
    elif size == 0.0:
        text = "0"
    else:
        text = f"{shown:.{digits}g}"
    return f"{text} {unit}".strip()


class Panel(widgets.VBox):
    """Base of the deltakit panels (an :class:`ipywidgets.VBox`).

    Subclasses build ``self.controls`` with :meth:`_control`, a figure with
    :meth:`_figure`, then call :meth:`_finish`; they implement
    ``_update(changed)``, which computes everything first and only then moves
    artists and sets ``self._results`` and the readouts. An exception raised
    by ``_update`` leaves the last valid view and shows its message.
    """

    version: ClassVar[int] = 1
    #: Readouts shown beside the figure: key -> (label, SI scale, display unit).
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {}

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.controls: dict[str, widgets.ValueWidget] = {}
        self._scales: dict[str, float | None] = {}
        self._results: dict[str, Any] = {}
        self._holding = False
        self._pending: set[str] = set()
        self._error = ""
        self._adjusted: dict[str, str] = {}
        #: set by ``_update`` when only animated artists moved (a fast redraw is enough)
        self._fast = False
        self.figure: Figure | None = None
        self.view: FigureView | None = None
        self.message = widgets.HTML(value="")
        self.message.add_class("deltakit-message")
        self.readouts = widgets.HTML(value="")
        self.readouts.add_class("deltakit-readout")
        self.caution = widgets.HTML(
            value='<div style="font-size:0.8em;color:#555;line-height:1.3">'
            f"{html.escape(CAUTION, quote=False)}</div>"
        )
        self.caution.add_class("deltakit-caution")

    # ------------------------------------------------------------------ building
    def _control(
        self, name: str, widget: widgets.ValueWidget, scale: float | None = None
    ) -> widgets.ValueWidget:
        """Register a control. ``scale`` is SI units per display unit (1e3 for km); None for non-numbers."""
        widget.style = {"description_width": "initial"}
        widget.add_class(f"deltakit-control-{name.replace('_', '-')}")
        if _is_slider(widget):
            self._put_on_grid(name, widget, float(widget.value))
        self.controls[name] = widget
        self._scales[name] = scale
        return widget

    def _figure(self, width: float = 7.6, height: float = 3.8, **kwargs: Any) -> Figure:
        self.figure = Figure(figsize=(width, height), dpi=100, **kwargs)
        self.view = FigureView(self.figure)
        return self.figure

    def _finish(self, title: str, rows: list[list[str]], extra: list[widgets.Widget] | None = None) -> None:
        """Lay out the panel, wire every control to one update, draw the first view."""
        heading = widgets.HTML(value=f"<b>{html.escape(title)}</b>")
        boxes = [
            widgets.HBox([self.controls[name] for name in row], layout=widgets.Layout(flex_flow="row wrap"))
            for row in rows
        ]
        children: list[widgets.Widget] = [heading, *boxes, *(extra or []), self.message]
        if self.view is not None:
            children.append(self.view.widget)
        children += [self.readouts, self.caution]
        self.children = children
        self.add_class("deltakit-panel")
        for widget in self.controls.values():
            widget.observe(self._on_change, names="value")
        self._refresh(set(self.controls))

    # ------------------------------------------------------------------ values in SI
    def _si(self, name: str) -> Any:
        value = self.controls[name].value
        scale = self._scales[name]
        if scale is None:
            return value
        return _round_si(float(value) * scale)

    @property
    def values(self) -> dict[str, Any]:
        """The inputs, SI (m, m/s, kg, s, rad), keyed like :attr:`controls`."""
        return {name: self._si(name) for name in self.controls}

    @property
    def results(self) -> dict[str, Any]:
        """The readouts of the last valid view, SI."""
        return dict(self._results)

    def set(self, **values: Any) -> Panel:
        """Drive the panel from code with SI values; one update for all of them.

        Names are those of :attr:`controls`. A slider holds only values on
        its step grid (the browser would snap any other and send it back):
        an off-step value moves to the nearest step, and the readouts and
        :attr:`adjusted` say so. A value outside a slider's range widens the
        range by whole steps.
        """
        unknown = sorted(set(values) - set(self.controls))
        if unknown:
            raise TypeError(
                f"{type(self).__name__}.set() got unknown names {unknown}; "
                f"expected some of {sorted(self.controls)}"
            )
        self._adjusted = {}
        self._holding = True
        try:
            for name, value in values.items():
                self._assign(name, value)
        finally:
            self._holding = False
        self._refresh(set(values))
        return self

    def _assign(self, name: str, value: Any) -> None:
        widget = self.controls[name]
        scale = self._scales[name]
        if scale is None:
            if isinstance(
                widget, (widgets.Dropdown, widgets.ToggleButtons, widgets.RadioButtons, widgets.Select)
            ):
                options = [o[1] if isinstance(o, tuple) else o for o in widget.options]
                if value not in options:
                    raise DomainError(f"`{name}` must be one of {options}, not {value!r}")
            widget.value = value
            return
        try:
            shown = float(value) / scale
        except (TypeError, ValueError) as err:
            raise DomainError(f"`{name}` must be a number, not {value!r}") from err
        if not math.isfinite(shown):
            raise DomainError(f"`{name}` must be finite, not {value!r}")
        if _is_slider(widget):
            self._put_on_grid(name, widget, shown)
            return
        if hasattr(widget, "max") and shown > widget.max:
            widget.max = shown
        if hasattr(widget, "min") and shown < widget.min:
            widget.min = shown
        widget.value = shown

    def _put_on_grid(self, name: str, widget: Any, shown: float) -> None:
        """Give a slider ``shown`` (display units) as the nearest value it can hold, and say so if it moved.

        The browser snaps a slider to ``min + k * step`` and sends the snapped
        value back, so an off-grid value would change the panel's input behind
        the analyst's back. Instead the panel snaps at once and names the
        change in its readouts. A value beyond the range widens it by whole steps.
        """
        step = float(widget.step)
        if shown > widget.max:
            widget.max = on_slider_grid(
                widget.min + math.ceil((shown - widget.min) / step - 1e-9) * step, widget.min, step
            )
        if shown < widget.min:
            widget.min = on_slider_grid(
                widget.min - math.ceil((widget.min - shown) / step - 1e-9) * step, widget.min, step
            )
        snapped = min(max(on_slider_grid(shown, widget.min, step), widget.min), widget.max)
        if abs(snapped - shown) > 1e-6 * step:
            self._adjusted[name] = (
                f"{widget.description}: {shown:.6g} is between the slider's steps of {step:g}; "
                f"the panel uses {snapped:.6g}."
            )
        widget.value = snapped

    @property
    def adjusted(self) -> dict[str, str]:
        """Slider values set from code that were moved to the slider's step grid: name -> note."""
        return dict(self._adjusted)

    def export(self) -> dict[str, Any]:
        """Inputs and readouts, JSON-ready and SI: ``{"panel", "version", "values", "results"}``.

        ``panel.set(**exported["values"])`` restores a panel of the same kind.
        """
        return {
            "panel": type(self).__name__,
            "version": self.version,
            "values": json_ready(self.values),
            "results": json_ready(self._results),
        }

    # ------------------------------------------------------------------ updating
    def _on_change(self, change: dict[str, Any]) -> None:
        name = next((k for k, w in self.controls.items() if w is change["owner"]), None)
        if self._holding:
            return
        widget = change["owner"]
        if (
            _is_slider(widget)
            and isinstance(change.get("old"), (int, float))
            and abs(change["new"] - change["old"]) <= 1e-9 * float(widget.step)
        ):
            return  # the browser echoing our own value in its float arithmetic: nothing moved
        self._adjusted.pop(name, None)
        self._refresh({name} if name else set(self.controls))

    def _refresh(self, changed: set[str]) -> None:
        self._pending |= changed
        try:
            self._update(set(self._pending))
        except (DomainError, ValueError, ZeroDivisionError) as err:
            self._show_message(str(err))
            return
        except Exception as err:  # noqa: BLE001  # never raise into the notebook; say what went wrong
            self._show_message(f"unexpected {type(err).__name__}: {err}")
            return
        self._pending.clear()
        self._show_message("")
        if self.view is not None:
            self.view.refresh(fast=self._fast)
        self._fast = False

    def _show_message(self, text: str) -> None:
        self._error = text
        if not text:
            self.message.value = ""
            return
        self.message.value = (
            '<div style="color:#8a1c1c;background:#fbeaea;border-left:3px solid #b3245c;padding:3px 8px">'
            f"<b>Not shown:</b> {html.escape(text, quote=False)} The view keeps the last valid inputs.</div>"
        )

    @property
    def error(self) -> str:
        """The current message about invalid input, or ``""``."""
        return self._error

    def _show_readouts(self, results: dict[str, Any], notes: list[str] | None = None) -> None:
        rows = [
            (key, label, fmt(results[key], scale, unit))
            for key, (label, scale, unit) in self.readout_spec.items()
            if key in results
        ]
        body = html_table(rows)
        notes = [*self._adjusted.values(), *(notes or [])]
        if notes:
            body += "".join(f'<div style="color:#5a4a00">{html.escape(n)}</div>' for n in notes)
        self.readouts.value = body

    def _update(self, changed: set[str]) -> None:  # pragma: no cover - abstract
        raise NotImplementedError


def sticky_limits(
    ax: Any, low: float, high: float, *, axis: str = "y", include_zero: bool = True, force: bool = False
) -> bool:
    """Set the limits of ``axis`` for data in [low, high] only when needed; True if they changed.

    Limits stay put while the data stay inside them and fill at least 60 %
    of the span, so a slider step usually leaves the axes (ticks, labels)
    alone and the panel can redraw just the moving artists.
    """
    if not (math.isfinite(low) and math.isfinite(high)):
        low, high = 0.0, 1.0
    pad = 0.08 * (high - low) or 0.05 * max(abs(high), 1e-3)
    want_low, want_high = low - pad, high + pad
    if include_zero and low >= 0.0:
        want_low = 0.0
    if include_zero and high <= 0.0:
        want_high = 0.0 + pad
    current_low, current_high = ax.get_ylim() if axis == "y" else ax.get_xlim()
    inside = current_low <= low and high <= current_high
    filled = (want_high - want_low) >= 0.6 * (current_high - current_low)
    if inside and filled and not force:
        return False
    (ax.set_ylim if axis == "y" else ax.set_xlim)(want_low, want_high)
    return True


def slider(
    description: str,
    value: float,
    low: float,
    high: float,
    step: float,
    *,
    readout_format: str = ".1f",
    continuous: bool = True,
) -> widgets.FloatSlider:
    """A float slider with the project's look; its right end lies on the step grid too."""
    high = on_slider_grid(low + math.ceil((high - low) / step - 1e-9) * step, low, step)
    return widgets.FloatSlider(
        value=min(max(value, low), high),
        min=low,
        max=high,
        step=step,
        description=description,
        readout_format=readout_format,
        continuous_update=continuous,
        layout=widgets.Layout(width="520px"),
    )


#: Room for the digits of a number box (about 12 characters) beside its label.
_INPUT_PX = 130
#: Width of one character of a control's label at the notebook's font size.
_LABEL_CHAR_PX = 7.4


def number_width(description: str) -> str:
    """A number box wide enough for its label and about 12 digits.

    >>> number_width("dry mass (kg)")
    '226px'
    """
    return f"{round(len(description) * _LABEL_CHAR_PX + _INPUT_PX)}px"


def number(
    description: str, value: float, *, step: float | None = None, width: str | None = None
) -> widgets.FloatText:
    """A float text box with the project's look, as wide as its label needs (or ``width``)."""
    return widgets.FloatText(
        value=value,
        description=description,
        step=step,
        layout=widgets.Layout(width=width or number_width(description)),
    )


def choice(description: str, options: list[Any], value: Any, *, width: str = "250px") -> widgets.Dropdown:
    """A drop-down with the project's look."""
    return widgets.Dropdown(
        options=options, value=value, description=description, layout=widgets.Layout(width=width)
    )


Callback = Callable[[dict[str, Any]], None]
