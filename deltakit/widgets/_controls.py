"""The controls panels are made of, with the project's look, and the slider step grid.

Controls show display units (km, km/s, deg) and say so in their labels; the
panel converts to SI. Sliders hold only values on their step grid
``min + k * step``: the browser's slider (noUiSlider in ipywidgets 8) snaps
any other value and sends the snapped one back, which would change the panel's
input behind the analyst's back, so a panel snaps values set from code itself
and says so (:func:`on_slider_grid`, :func:`slider_plan`).
"""

from __future__ import annotations

import math
from typing import Any, NamedTuple

import ipywidgets as widgets

__all__ = [
    "SliderPlan",
    "choice",
    "is_slider",
    "number",
    "number_width",
    "on_slider_grid",
    "slider",
    "slider_plan",
    "toggle",
]


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


def is_slider(widget: Any) -> bool:
    """True for the float and integer sliders of ipywidgets."""
    return isinstance(widget, (widgets.FloatSlider, widgets.IntSlider))


class SliderPlan(NamedTuple):
    """What giving a slider a value means: its new range, its value on the grid, and a note if it moved."""

    low: float
    high: float
    value: float
    note: str


def slider_plan(widget: Any, shown: float) -> SliderPlan:
    """The range and grid value a slider needs to hold ``shown`` (display units), without changing it.

    A value beyond the range widens it by whole steps; an off-grid value moves
    to the nearest step, and the note says so in the analyst's words.

    >>> s = slider("delta-v (m/s)", 100.0, 0.0, 2000.0, 5.0)
    >>> plan = slider_plan(s, 2502.0)
    >>> plan.low, plan.high, plan.value
    (0.0, 2505.0, 2500.0)
    >>> print(plan.note)
    delta-v (m/s): 2502 is between the slider's steps of 5; the panel uses 2500.
    """
    step, low, high = float(widget.step), float(widget.min), float(widget.max)
    if shown > high:
        high = on_slider_grid(low + math.ceil((shown - low) / step - 1e-9) * step, low, step)
    if shown < low:
        low = on_slider_grid(low - math.ceil((low - shown) / step - 1e-9) * step, low, step)
    snapped = min(max(on_slider_grid(shown, low, step), low), high)
    note = ""
    if abs(snapped - shown) > 1e-6 * step:
        note = (
            f"{widget.description}: {shown:.6g} is between the slider's steps of {step:g}; "
            f"the panel uses {snapped:.6g}."
        )
    return SliderPlan(low, high, snapped, note)


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
    """A float slider with the project's look; its right end lies on the step grid too.

    The value given here is only where the slider starts: panels set their
    inputs through :func:`slider_plan`, which widens the range instead of
    clamping a value that lies beyond it.
    """
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


def toggle(description: str, options: list[str], value: str, *, button_width: str = "130px") -> Any:
    """Toggle buttons with the project's look (one of a few fixed choices)."""
    buttons = widgets.ToggleButtons(options=options, value=value, description=description)
    buttons.style = {"button_width": button_width, "description_width": "initial"}
    return buttons
