"""A delta-v budget as a waterfall of vehicle mass, line by line.

Each bar stands at the mass before its line: the lower part (slate) is the
mass left after the line, the upper part (amber) the propellant the line
burns. The first bar is the starting mass. Masses in kg. Line labels are
shown as typed (never read as mathtext: a label ``$\\frac{`` stays text).
"""

from __future__ import annotations

from typing import Any, NamedTuple

import numpy as np
from matplotlib.axes import Axes
from matplotlib.container import BarContainer
from matplotlib.lines import Line2D

from .._text import escape_mathtext
from ._style import COLOURS, style_axes

__all__ = ["WaterfallArtists", "budget_masses", "plot_budget_waterfall", "update_budget_waterfall"]


class WaterfallArtists(NamedTuple):
    """What :func:`plot_budget_waterfall` drew: remaining-mass and propellant bars."""

    remaining: BarContainer
    spent: BarContainer
    dry: Line2D | None = None


def budget_masses(budget: Any) -> tuple[list[str], np.ndarray]:
    """Labels and masses (kg) for the waterfall: the start, then after each line.

    Examples
    --------
    >>> from deltakit import Budget
    >>> b = Budget(1000.0, 3000.0).add("raise", 300.0)
    >>> labels, masses = budget_masses(b)
    >>> labels, [round(float(m), 1) for m in masses]
    (['start', 'raise'], [1000.0, 904.8])
    """
    labels = ["start", *[line.label for line in budget.lines]]
    masses = np.concatenate([[float(budget.m0)], np.asarray(budget.mass_after, dtype=float).reshape(-1)])
    return labels, masses


def _spent(budget: Any, masses: np.ndarray) -> np.ndarray:
    """Propellant of each bar: none at the start, then each line's (a jettison or a docking burns none)."""
    per_line = getattr(budget, "propellant_per_line", None)
    if per_line is None:
        before = np.concatenate([[masses[0]], masses[:-1]])
        return before - masses
    return np.concatenate([[0.0], np.asarray(per_line, dtype=float).reshape(-1)])


def _mass_readout(labels: list[str], masses: np.ndarray, spent: np.ndarray):
    """The mouse readout of a waterfall: the line under the cursor and its masses.

    The x axis holds line names, not numbers, so the default readout would
    show an empty x; this one names the bar and gives its masses in kg.
    """

    def format_coord(x: float, y: float) -> str:
        i = int(np.floor(x + 0.5))
        cursor = f"cursor at {y:,.0f} kg"
        if not 0 <= i < len(labels):
            return cursor
        if i == 0:
            return f"start: {masses[0]:,.1f} kg; {cursor}"
        return f"{labels[i]}: propellant {spent[i]:,.1f} kg, mass after {masses[i]:,.1f} kg; {cursor}"

    return format_coord


def plot_budget_waterfall(ax: Axes, budget: Any, *, width: float = 0.7, **kwargs: Any) -> WaterfallArtists:
    """Draw the mass after each line of a :class:`deltakit.Budget`.

    Parameters
    ----------
    ax : matplotlib Axes
    budget : Budget
    width : float
        Bar width (fraction of the spacing).
    **kwargs
        Passed to :meth:`Axes.bar` for the remaining-mass bars.

    Returns
    -------
    WaterfallArtists
        ``remaining`` (bar heights: mass after each line, kg; the first bar is
        the starting mass) and ``spent`` (propellant of each line, kg, stacked
        on top).

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> from deltakit import Budget
    >>> b = Budget(1000.0, 3000.0).add("raise", 300.0)
    >>> art = plot_budget_waterfall(Figure().add_subplot(), b)
    >>> [round(float(p.get_height()), 1) for p in art.remaining]
    [1000.0, 904.8]
    """
    labels, masses = budget_masses(budget)
    spent = _spent(budget, masses)
    x = np.arange(len(masses))
    kwargs.setdefault("color", COLOURS["vehicle"])
    remaining = ax.bar(x, masses, width, label="mass after the line", **kwargs)
    spent_bars = ax.bar(
        x, spent, width, bottom=masses, color=COLOURS["exhaust"], alpha=0.85, label="propellant of the line"
    )
    ax.set_xticks(
        x,
        [escape_mathtext(label) for label in labels],
        rotation=30 if len(labels) > 4 else 0,
        ha="right" if len(labels) > 4 else "center",
    )
    ax.set_ylim(0.0, max(float(masses[0]), 1e-9) * 1.08)
    style_axes(ax, ylabel="vehicle mass (kg)")
    ax.grid(False, axis="x")
    dry = None
    dry_mass = getattr(budget, "dry_mass", None)
    if dry_mass is not None:
        dry = ax.axhline(
            float(dry_mass), color=COLOURS["burn"], linestyle="--", linewidth=1.2, label="dry mass"
        )
    # above the axes, where no bar can stand under it
    ax.legend(loc="lower center", bbox_to_anchor=(0.5, 1.0), ncol=3, fontsize="small", frameon=False)
    ax.format_coord = _mass_readout(labels, masses, spent)
    return WaterfallArtists(remaining, spent_bars, dry)


def update_budget_waterfall(
    ax: Axes, artists: WaterfallArtists | None, budget: Any, **kwargs: Any
) -> WaterfallArtists:
    """Redraw the waterfall after the budget changed.

    Heights move in place when the number of lines is the same; otherwise the
    bars are replaced (a line was added or removed).
    """
    labels, masses = budget_masses(budget)
    if artists is not None and len(artists.remaining) == len(masses):
        spent = _spent(budget, masses)
        for bar, m in zip(artists.remaining, masses):
            bar.set_height(m)
        for bar, m, s in zip(artists.spent, masses, spent):
            bar.set_y(m)
            bar.set_height(s)
        ax.set_xticks(np.arange(len(labels)), [escape_mathtext(label) for label in labels])
        ax.set_ylim(0.0, max(float(masses[0]), 1e-9) * 1.08)
        ax.format_coord = _mass_readout(labels, masses, spent)
        dry_mass = getattr(budget, "dry_mass", None)
        if (artists.dry is None) == (dry_mass is None):
            if artists.dry is not None:
                artists.dry.set_ydata([float(dry_mass)] * 2)
            return artists
    if artists is not None:
        artists.remaining.remove()
        artists.spent.remove()
        if artists.dry is not None:
            artists.dry.remove()
    return plot_budget_waterfall(ax, budget, **kwargs)
