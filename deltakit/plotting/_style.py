"""Colours and the axes style shared by deltakit's figures (display units live in :mod:`deltakit.units`).

Our own palette: a deep slate for the orbit as it is, a warm amber for the
orbit after a burn, a raspberry for burn points and delta-v, a pine green and a
plum for the two transfer families, a cool grey for the central body. They stay
apart for the common colour-vision deficiencies (no red/green pair carries
meaning alone: lines also differ in style).
"""

from __future__ import annotations

__all__ = ["COLOURS", "plain_log_ticks", "style_axes"]

#: Named colours used across the plots (hex sRGB).
COLOURS: dict[str, str] = {
    "before": "#27476e",
    "after": "#d98e04",
    "burn": "#b3245c",
    "body": "#aebbc7",
    "body_edge": "#6f7f8c",
    "hohmann": "#2f7d5b",
    "bielliptic": "#7b4f9d",
    "reference": "#7a7a7a",
    "vehicle": "#27476e",
    "exhaust": "#d98e04",
    "total": "#4d4d4d",
    "grid": "#e4e8ec",
}


def style_axes(ax, *, xlabel: str | None = None, ylabel: str | None = None, title: str | None = None) -> None:
    """Light grid and labels, set only where the Axes has none yet."""
    ax.grid(True, color=COLOURS["grid"], linewidth=0.8)
    ax.set_axisbelow(True)
    if xlabel and not ax.get_xlabel():
        ax.set_xlabel(xlabel)
    if ylabel and not ax.get_ylabel():
        ax.set_ylabel(ylabel)
    if title and not ax.get_title():
        ax.set_title(title, fontsize="medium")


def plain_log_ticks(axis) -> None:
    """Ticks of a log axis at 1, 2, 5, 10, 20, ... labelled as plain numbers, with no minor ticks.

    Plainer to read than powers of ten, and a third of the tick artists a
    default log axis draws (each costs a full figure draw time).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> ax = Figure().add_subplot(xscale="log", xlim=(1, 50))
    >>> plain_log_ticks(ax.xaxis)
    >>> [ax.xaxis.get_major_formatter()(v) for v in ax.xaxis.get_majorticklocs() if 1 <= v <= 50]
    ['1', '2', '5', '10', '20', '50']
    """
    from matplotlib.ticker import FuncFormatter, LogLocator, NullLocator

    axis.set_major_locator(LogLocator(base=10.0, subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(FuncFormatter(lambda value, position: f"{value:g}"))
    axis.set_minor_locator(NullLocator())
