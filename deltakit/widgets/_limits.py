"""Axis limits that hold still while a slider moves.

A change of axis limits redraws ticks, tick labels and grid: a full figure
draw, several times the cost of moving a curve. So limits sit on a ladder of
round values with room above the data, move up only when the data would leave
the view, and move down only when a lower rung would hold the data with room
to spare (a hysteresis): a slider swept end to end redraws its axes a handful
of times, not at every step, and the data never shrink to a sliver of the view.
"""

from __future__ import annotations

import math
from typing import Any

__all__ = ["COARSE", "FARTHEST", "follow_limits", "follow_square", "nice_ceiling"]

#: The largest distance (m) a panel draws, about 6700 au: beyond any orbit around one of the bodies
#: of :mod:`deltakit.constants`; a larger radius or altitude is refused with a message.
FARTHEST = 1.0e15

#: Room kept between the data and the frame, as a fraction of the data's extent.
PAD = 0.06
#: A view is tightened only when a lower rung would hold the data with this much to spare.
SPARE = 0.5
#: On an axis holding data of both signs, neither side is shown smaller than this part of the other.
BALANCE = 0.25
#: Rungs of the ladder of round values within each power of ten (a view is at most twice the data it
#: was fitted to, plus PAD).
_RUNGS = (1.0, 1.5, 2.0, 3.0, 5.0, 10.0)
#: A coarser ladder for data that a slider sweeps over decades (a view is at most 2.5 times the data):
#: fewer rungs to cross, so fewer redraws of the axes.
COARSE = (1.0, 2.0, 5.0, 10.0)


def nice_ceiling(x: float, rungs: tuple[float, ...] = _RUNGS) -> float:
    """The smallest round value (1, 1.5, 2, 3 or 5 times a power of ten) that is >= ``x`` (> 0).

    ``rungs`` are the round values within a power of ten (from 1 to 10).

    >>> nice_ceiling(0.46), nice_ceiling(2.0), nice_ceiling(5.01), nice_ceiling(2.6e4)
    (0.5, 2.0, 10.0, 30000.0)
    >>> nice_ceiling(2.6e4, COARSE)
    50000.0
    """
    power = 10.0 ** math.floor(math.log10(x))
    for rung in rungs:
        if x <= rung * power * (1.0 + 1e-12):
            return rung * power
    return 10.0 * power  # pragma: no cover - the last rung always holds


def _lower_rung(level: float, rungs: tuple[float, ...] = _RUNGS) -> float:
    """The rung below ``level`` on the ladder of round values."""
    power = 10.0 ** math.floor(math.log10(level) + 1e-12)
    rung = level / power
    below = max((r for r in rungs if r < rung - 1e-9), default=None)
    return below * power if below is not None else 0.5 * power


def _side(current: float, needed: float, force: bool, rungs: tuple[float, ...] = _RUNGS) -> float:
    """One end of a zero-based view: the rung to use for data reaching ``needed`` (> 0)."""
    if not needed > 0.0:
        return current if current > 0.0 and not force else 1.0
    if not force and current >= needed and needed > SPARE * _lower_rung(current, rungs):
        return current
    return nice_ceiling(needed * (1.0 + PAD), rungs)


def follow_limits(
    ax: Any,
    low: float,
    high: float,
    *,
    axis: str = "y",
    include_zero: bool = True,
    force: bool = False,
    headroom: float = 0.3,
    rungs: tuple[float, ...] = _RUNGS,
) -> bool:
    """Keep data spanning [low, high] in view of ``axis``; True if the limits changed.

    With ``include_zero`` (totals, energies, masses) the view starts at zero
    and each end is a round value (:func:`nice_ceiling`) with room
    above the data; it moves only when the data leave it or a lower round
    value would hold them with room to spare. Without, the view is the data
    with ``headroom`` beyond each end, moved when the data leave it or fill
    less than a third of it. ``rungs`` are the round values of the ladder
    within a power of ten (:data:`COARSE`: fewer, for data swept over decades).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> follow_limits(ax, 0.0, 0.46, force=True), [round(float(v), 2) for v in ax.get_ylim()]
    (True, [0.0, 0.5])
    >>> follow_limits(ax, 0.0, 0.3), follow_limits(ax, 0.0, 0.52)   # inside: no change; beyond: up a rung
    (False, True)
    >>> [round(float(v), 2) for v in ax.get_ylim()]
    [0.0, 1.0]
    """
    if not (math.isfinite(low) and math.isfinite(high)):
        low, high = 0.0, 1.0
    current_low, current_high = ax.get_ylim() if axis == "y" else ax.get_xlim()
    if include_zero:
        size = max(abs(low), abs(high))
        # a side that data of the other sign reach is at least BALANCE of the whole, and stays while the
        # data come back near zero: values crossing zero do not walk down the ladder of small rungs
        keep_top = current_high > 0.0 and not force and high > -BALANCE * size
        keep_bottom = current_low < 0.0 and not force and low < BALANCE * size
        top = _side(current_high, max(high, BALANCE * size), force, rungs) if high > 0.0 or keep_top else 0.0
        bottom = (
            -_side(-current_low, max(-low, BALANCE * size), force, rungs) if low < 0.0 or keep_bottom else 0.0
        )
        if top == bottom == 0.0:
            top = current_high if current_high > 0.0 and not force else 1.0
        want_low, want_high = bottom, top
    else:
        span = max(high - low, 0.05 * max(abs(low), abs(high)), 1e-9)
        middle = 0.5 * (low + high)
        low, high = min(low, middle - 0.5 * span), max(high, middle + 0.5 * span)
        inside = current_low <= low - PAD * span and high + PAD * span <= current_high
        if inside and span >= (current_high - current_low) / 3.0 and not force:
            return False
        extra = (PAD + headroom) * span
        want_low, want_high = low - extra, high + extra
    if (want_low, want_high) == (current_low, current_high):
        return False
    (ax.set_ylim if axis == "y" else ax.set_xlim)(want_low, want_high)
    return True


def follow_square(
    ax: Any,
    extent: tuple[float, float, float, float],
    *,
    centre: tuple[float, float],
    base: float,
    force: bool = False,
    ratio: float = 1.5,
) -> bool:
    """Keep a box of data in a square view (equal scales on both axes); True if the limits changed.

    The view is a square around ``centre`` whose half-width is ``base``
    times a power of ``ratio``: the smallest that holds the data box
    ``extent = (x_low, x_high, y_low, y_high)``, and it stays one rung
    larger until the smaller one would hold the data with room to spare
    (``force``: the smallest rung now, for a case typed anew).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot()
    >>> box, centre = (-1.0, 1.0, -1.0, 1.0), (0.0, 0.0)
    >>> follow_square(ax, box, centre=centre, base=1.2, ratio=2.0, force=True)
    True
    >>> follow_square(ax, (-1.0, 2.0, -1.0, 1.0), centre=centre, base=1.2, ratio=2.0), float(ax.get_xlim()[1])
    (True, 2.4)
    >>> follow_square(ax, (-1.0, 1.3, -1.0, 1.0), centre=centre, base=1.2, ratio=2.0)  # lower rung: too tight
    False
    """
    x_low, x_high, y_low, y_high = extent
    cx, cy = centre
    needed = max(cx - x_low, x_high - cx, cy - y_low, y_high - cy, 0.0) * (1.0 + PAD)
    rung = max(0, math.ceil(math.log(max(needed, base) / base, ratio) - 1e-9))
    (x0, x1) = ax.get_xlim()
    current = 0.5 * (x1 - x0)
    if not force and math.isclose(0.5 * (x0 + x1), cx) and current >= needed and current > base * (1 - 1e-9):
        if needed > SPARE * current / ratio or math.isclose(current, base):
            return False
    half = base * ratio**rung
    if math.isclose(half, current) and math.isclose(0.5 * (x0 + x1), cx):
        return False  # already there (``force`` only lifts the hysteresis)
    ax.set_xlim(cx - half, cx + half)
    ax.set_ylim(cy - half, cy + half)
    return True
