"""Axis limits that hold still while a slider moves.

A change of axis limits redraws ticks, tick labels and grid: a full figure
draw, several times the cost of moving a curve. So limits get headroom when
they are set and change only when the data would leave the view, or when the
data would shrink to a small part of it (the curve must stay readable). A
slider sweep then redraws the axes a handful of times, not at every step.
"""

from __future__ import annotations

import math
from typing import Any

__all__ = ["follow_limits", "follow_square"]

#: Extra room given beyond the data whenever limits are set, as a fraction of the data's span.
HEADROOM = 0.3
#: Limits are tightened when the data fill less than this fraction of the view.
FILL = 0.35
#: Room around the data that is always kept (the curve never touches the frame).
PAD = 0.06
#: Data spanning less than this fraction of their size are shown as if they spanned it: a nearly
#: flat curve reads as flat, not as magnified rounding.
MIN_SPAN = 0.05


def follow_limits(
    ax: Any,
    low: float,
    high: float,
    *,
    axis: str = "y",
    include_zero: bool = True,
    force: bool = False,
    headroom: float = HEADROOM,
    fill: float = FILL,
) -> bool:
    """Keep data spanning [low, high] in view of ``axis``; True if the limits changed.

    Limits stay put while the data stay inside them (with :data:`PAD` room)
    and fill at least ``fill`` of the span. When they must move, they are set
    with ``headroom`` beyond the data, so the next steps fit too. With
    ``include_zero`` the view keeps 0 at its edge for data of one sign.

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> follow_limits(ax, 0.0, 10.0, force=True), [round(float(v), 2) for v in ax.get_ylim()]
    (True, [0.0, 13.6])
    >>> follow_limits(ax, 0.0, 12.0)   # still inside, still filling the view: no change
    False
    """
    if not (math.isfinite(low) and math.isfinite(high)):
        low, high = 0.0, 1.0
    span = max(high - low, MIN_SPAN * max(abs(low), abs(high)), 1e-9)
    middle = 0.5 * (low + high)
    low, high = min(low, middle - 0.5 * span), max(high, middle + 0.5 * span)
    current_low, current_high = ax.get_ylim() if axis == "y" else ax.get_xlim()
    need_low, need_high = low - 0.5 * PAD * span, high + 0.5 * PAD * span
    if include_zero and low >= 0.0:
        need_low = 0.0  # the view starts at zero: the data may touch it
    if include_zero and high <= 0.0:
        need_high = 0.0
    inside = current_low <= need_low and need_high <= current_high
    filled = span >= fill * (current_high - current_low)
    if inside and filled and not force:
        return False
    extra = (PAD + headroom) * span
    want_low, want_high = low - extra, high + extra
    if include_zero and low >= 0.0:
        want_low = 0.0
    if include_zero and high <= 0.0:
        want_high = 0.0
    if want_high <= want_low:
        want_high = want_low + 1.0
    (ax.set_ylim if axis == "y" else ax.set_xlim)(want_low, want_high)
    return True


def follow_square(
    ax: Any,
    x_low: float,
    x_high: float,
    y_low: float,
    y_high: float,
    *,
    force: bool = False,
    headroom: float = 0.15,
    fill: float = 0.45,
) -> bool:
    """Keep a box of data in a square view (equal scales on both axes); True if the limits changed.

    The view is a square around the data's centre; it moves only when the
    data would leave it or fill less than ``fill`` of its width.

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> follow_square(ax, -1.0, 1.0, -2.0, 2.0, force=True), [round(float(v), 2) for v in ax.get_ylim()]
    (True, [-2.42, 2.42])
    >>> follow_square(ax, -1.0, 1.2, -2.0, 2.1)
    False
    """
    half = 0.5 * max(x_high - x_low, y_high - y_low, 1e-9)
    (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
    margin = PAD * half
    inside = x0 <= x_low - margin and x_high + margin <= x1 and y0 <= y_low - margin and y_high + margin <= y1
    filled = 2.0 * half >= fill * min(x1 - x0, y1 - y0)
    if inside and filled and not force:
        return False
    cx, cy = 0.5 * (x_low + x_high), 0.5 * (y_low + y_high)
    size = half * (1.0 + PAD + headroom)
    ax.set_xlim(cx - size, cx + size)
    ax.set_ylim(cy - size, cy + size)
    return True
