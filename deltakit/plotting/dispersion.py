"""Dispersion results drawn: how much propellant is left, and which cause drives its spread.

Both helpers read the :class:`xarray.Dataset` of :func:`deltakit.disperse`.
:func:`plot_propellant_left` draws the distribution of the propellant left
(signed: below zero the tank is short by that much) as a histogram with its
cumulative curve on a second axis, the percentiles marked and the line where
the tank runs dry. :func:`plot_sensitivity` ranks the causes by the share of
the spread they explain, the bar's colour saying whether more of that cause
leaves more or less propellant. Masses in kg.
"""

from __future__ import annotations

from typing import Any, NamedTuple

import numpy as np
from matplotlib.axes import Axes
from matplotlib.container import BarContainer
from matplotlib.lines import Line2D
from matplotlib.text import Text

from .._text import escape_mathtext
from ._style import COLOURS, style_axes

__all__ = ["LeftArtists", "SensitivityArtists", "plot_propellant_left", "plot_sensitivity"]

ALL_TANKS = "all tanks"


class LeftArtists(NamedTuple):
    """What :func:`plot_propellant_left` drew."""

    histogram: BarContainer
    cumulative: Line2D
    percentiles: list[Line2D]
    labels: list[Text]
    dry: Line2D
    twin: Axes


class SensitivityArtists(NamedTuple):
    """What :func:`plot_sensitivity` drew."""

    bars: BarContainer
    labels: list[Text]


def _margin(ds: Any, system: str | None) -> tuple[np.ndarray, str]:
    """Signed propellant left per sample of one tank (the tightest when ``system`` is None)."""
    margin = ds["propellant_margin"]
    names = [str(s) for s in ds.system.values]
    if system == ALL_TANKS:
        return np.asarray(margin.sum("system", skipna=True)), ALL_TANKS
    if system is None:
        tracked = [s for s in names if np.isfinite(float(margin.sel(system=s)[0]))]
        if not tracked:
            raise ValueError("no tank of this budget is tracked (give the budget a dry mass or loads)")
        low = {s: float(ds["percentiles"].sel(system=s, quantity="propellant_margin").min()) for s in tracked}
        system = min(tracked, key=lambda s: low[s])
    if system not in names:
        raise ValueError(f"`system` must be one of {names + [ALL_TANKS]}, not {system!r}")
    return np.asarray(margin.sel(system=system)), system


def plot_propellant_left(
    ax: Axes,
    ds: Any,
    *,
    system: str | None = None,
    bins: int = 60,
    marks: tuple[float, ...] = (1.0, 10.0, 50.0, 90.0),
    **kwargs: Any,
) -> LeftArtists:
    """Histogram and cumulative curve of the propellant left, percentiles marked.

    Parameters
    ----------
    ax : matplotlib Axes
    ds : xarray.Dataset
        The result of :func:`deltakit.disperse`.
    system : str, optional
        One propulsion system, or ``"all tanks"`` (their sum, which hides
        which tank runs short); default the tightest tank (the lowest
        percentile of propellant left).
    bins : int
        Histogram bins.
    marks : tuple of float
        Percentile levels to mark (computed from the samples drawn).
    **kwargs
        Passed to :meth:`Axes.hist`.

    Returns
    -------
    LeftArtists
        The histogram bars, the cumulative curve (on ``twin``, in %), the
        percentile lines and their labels, and the tank-dry line at zero.

    Examples
    --------
    >>> import deltakit as dk
    >>> from matplotlib.figure import Figure
    >>> b = dk.Budget(1500.0, 3150.0, dry_mass=700.0).add("transfer", 2200.0)
    >>> ds = dk.disperse(b, samples=2000, seed=1, dv=dk.Normal(20.0))
    >>> art = plot_propellant_left(Figure().add_subplot(), ds)
    >>> len(art.percentiles), round(float(art.cumulative.get_ydata()[-1]))
    (4, 100)
    """
    values, name = _margin(ds, system)
    values = values[np.isfinite(values)]
    kwargs.setdefault("color", COLOURS["vehicle"])
    kwargs.setdefault("alpha", 0.85)
    _, edges, histogram = ax.hist(values, bins=bins, **kwargs)
    short = close = None
    for patch, left_edge in zip(histogram, edges[:-1]):
        patch.set_label("_nolegend_")
        if left_edge < 0.0:  # bins of samples that fall short
            patch.set_facecolor(COLOURS["burn"])
            short = patch
        else:
            close = patch
    for patch, label in ((short, "samples short"), (close, "samples that close")):
        if patch is not None:
            patch.set_label(label)
    ordered = np.sort(values)
    twin = ax.twinx()
    fraction = 100.0 * np.arange(1, ordered.size + 1) / ordered.size
    cumulative = twin.plot(
        ordered, fraction, color=COLOURS["after"], linewidth=1.8, label="cumulative, right axis"
    )[0]
    twin.set_ylim(0.0, 118.0)
    twin.set_yticks([0, 20, 40, 60, 80, 100])
    twin.set_ylabel("samples at or below (%)")
    dry = ax.axvline(0.0, color=COLOURS["burn"], linewidth=1.6, linestyle="--", label="tank dry")
    ax.set_ylim(0.0, ax.get_ylim()[1] * 1.35)  # room above the bars for the percentile labels
    top = ax.get_ylim()[1]
    lines, labels = [], []
    for number, level in enumerate(marks):
        value = float(np.percentile(values, level))
        lines.append(ax.axvline(value, color=COLOURS["total"], linewidth=1.0, linestyle=":"))
        height = top * (0.99 - 0.075 * (number % 4))  # stepped, so neighbouring labels never touch
        labels.append(
            ax.text(
                value,
                height,
                f"P{level:g}: {value:,.1f}",
                ha="center",
                va="top",
                fontsize="x-small",
                color=COLOURS["total"],
                bbox={"facecolor": "white", "edgecolor": "none", "alpha": 0.85, "pad": 1},
            )
        )
    holds = float(np.mean(values >= 0.0)) * 100.0
    closes = float(ds["probability_closes"]) * 100.0
    style_axes(
        ax,
        xlabel=f"propellant left, {escape_mathtext(name)} (kg; below 0: short by that much)",
        ylabel="samples",
        title=f"{escape_mathtext(name)}: holds in {holds:.1f} % of {values.size:,} samples "
        f"(whole budget closes in {closes:.1f} %)",
    )
    span = edges[-1] - edges[0]
    low, high = edges[0] - 0.03 * span, edges[-1] + 0.03 * span
    if low > 0.0 and edges[0] < 1.5 * span:  # the dry line is near enough to show without squashing the bars
        low = -0.03 * span
    if low > 0.0:
        dry.set_label(f"tank dry at 0 kg, off the left edge (leanest sample {edges[0]:,.1f} kg)")
    ax.set_xlim(low, high)
    handles = [h for h in (close, short, cumulative, dry) if h is not None]
    ax.legend(
        handles,
        [h.get_label() for h in handles],
        loc="upper center",
        bbox_to_anchor=(0.5, -0.16),
        ncol=len(handles) if sum(len(h.get_label()) for h in handles) < 90 else 2,
        fontsize="small",
        frameon=False,
    )
    return LeftArtists(histogram, cumulative, lines, labels, dry, twin)


def plot_sensitivity(
    ax: Axes, ds: Any, *, target: str = ALL_TANKS, top: int = 10, **kwargs: Any
) -> SensitivityArtists:
    """Horizontal bars: the share of the spread of the propellant left each cause explains.

    Parameters
    ----------
    ax : matplotlib Axes
    ds : xarray.Dataset
        The result of :func:`deltakit.disperse`.
    target : str
        ``"all tanks"`` or one system's name.
    top : int
        How many causes to show (the largest).
    **kwargs
        Passed to :meth:`Axes.barh`.

    Returns
    -------
    SensitivityArtists
        The bars (share in %, largest on top) and their value labels.

    Examples
    --------
    >>> import deltakit as dk
    >>> from matplotlib.figure import Figure
    >>> b = dk.Budget(1500.0, 3150.0, dry_mass=700.0).add("transfer", 2200.0)
    >>> ds = dk.disperse(b, samples=2000, seed=1, dv=dk.Normal(20.0), isp=dk.Normal(1.0))
    >>> art = plot_sensitivity(Figure().add_subplot(), ds)
    >>> len(art.bars)
    2
    """
    targets = list(ds.target.values)
    if target not in targets:
        raise ValueError(f"`target` must be one of {targets}, not {target!r}")
    correlation = np.asarray(ds["correlation"].sel(target=target))
    share = correlation**2
    order = np.argsort(-share, kind="stable")[:top]
    causes = [str(c) for c in np.asarray(ds.cause.values)[order]]
    values = 100.0 * share[order]
    colours = [COLOURS["hohmann"] if correlation[i] >= 0 else COLOURS["burn"] for i in order]
    y = np.arange(len(order))[::-1]
    kwargs.setdefault("height", 0.6)
    bars = ax.barh(y, values, color=colours, **kwargs)
    ax.set_yticks(y, [escape_mathtext(c) for c in causes], fontsize="small")
    labels = [
        ax.text(v + 1.0, yy, f"{v:.1f} %", va="center", fontsize="x-small", color=COLOURS["total"])
        for v, yy in zip(values, y)
    ]
    ax.set_xlim(0.0, 112.0)
    style_axes(
        ax,
        xlabel=f"share of the spread of propellant left (%, first order): {escape_mathtext(target)}",
        title="what drives the spread",
    )
    ax.grid(False, axis="y")
    from matplotlib.patches import Patch

    ax.legend(
        [Patch(color=COLOURS["hohmann"]), Patch(color=COLOURS["burn"])],
        ["more of it leaves more", "more of it leaves less"],
        loc="lower right",
        fontsize="x-small",
        framealpha=0.9,
    )
    return SensitivityArtists(bars, labels)
