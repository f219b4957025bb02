"""A launch-window map drawn over the plane of departure and arrival dates.

Filled contours show the departure energy C3 (km^2/s^2; above the top level
the map is left blank), dashed contours the
arrival excess speed (km/s), thin dotted lines the time of flight (days); the
least C3 and the least arrival speed are marked and labelled with their
dates, and the pairs a vehicle's tank affords (when the map knows them) are
outlined and hatched. Dates are on both axes as dates. The data come from
:func:`deltakit.transfer_map`; nothing is computed here but the scales.
"""

from __future__ import annotations

from typing import Any, NamedTuple

import matplotlib.dates as mdates
import numpy as np
from matplotlib.axes import Axes
from matplotlib.ticker import MaxNLocator

from .._text import escape_mathtext
from ..units import day, km2_per_s2, km_per_s
from ._style import COLOURS, style_axes

__all__ = ["TransferMapArtists", "map_minimum", "plot_transfer_map"]

_C3_COLOURS = "cividis"  # perceptually even, reads in grey; dark where C3 is least


class TransferMapArtists(NamedTuple):
    """What :func:`plot_transfer_map` drew."""

    c3: Any
    arrival_vinf: Any
    time_of_flight: Any
    minima: list[Any]
    labels: list[Any]
    affordable: Any = None
    colorbar: Any = None


def map_minimum(values: Any) -> tuple[float, np.datetime64, np.datetime64]:
    """Least value of a map variable and the departure and arrival dates where it lies.

    Examples
    --------
    >>> import numpy as np, xarray as xr
    >>> da = xr.DataArray([[3.0, 1.0], [np.nan, 2.0]], dims=("departure", "arrival"),
    ...                   coords={"departure": np.array(["2028-01-01", "2028-01-02"], dtype="datetime64[s]"),
    ...                           "arrival": np.array(["2028-09-01", "2028-09-02"], dtype="datetime64[s]")})
    >>> value, departure, arrival = map_minimum(da)
    >>> value, str(departure)[:10], str(arrival)[:10]
    (1.0, '2028-01-01', '2028-09-02')
    """
    data = np.asarray(values.values, dtype=float)
    if not np.isfinite(data).any():
        return float("nan"), np.datetime64("NaT"), np.datetime64("NaT")
    i, j = np.unravel_index(np.nanargmin(data), data.shape)
    return float(data[i, j]), values["departure"].values[i], values["arrival"].values[j]


def _nice_levels(low: float, high: float, count: int) -> np.ndarray:
    return MaxNLocator(count).tick_values(low, high)


def _date(value: Any) -> str:
    return np.datetime_as_string(np.datetime64(value, "D"), unit="D")


def plot_transfer_map(
    ax: Axes,
    ds: Any,
    *,
    c3_levels: Any = None,
    vinf_levels: Any = None,
    tof_levels: Any = None,
    colorbar: bool = True,
    **kwargs: Any,
) -> TransferMapArtists:
    """Contours of C3, arrival excess speed and time of flight over departure x arrival dates.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Where to draw.
    ds : xarray.Dataset
        A map from :func:`deltakit.transfer_map` (one ``branch`` selected
        for a multi-revolution map: ``ds.sel(branch="short period")``).
    c3_levels : array_like, optional
        Filled-contour levels of C3, km^2/s^2 (default: from the least C3
        up, about a dozen).
    vinf_levels : array_like, optional
        Line-contour levels of the arrival excess speed, km/s.
    tof_levels : array_like, optional
        Lines of constant time of flight, days.
    colorbar : bool, optional
        Add a colour bar for C3 beside the Axes (default True).
    **kwargs
        Passed to ``ax.contourf`` for the C3 fill.

    Returns
    -------
    TransferMapArtists

    Examples
    --------
    >>> import numpy as np, matplotlib
    >>> matplotlib.use("Agg")
    >>> import matplotlib.pyplot as plt
    >>> import deltakit as dk
    >>> from deltakit.plotting import plot_transfer_map
    >>> ds = dk.transfer_map("Earth", "Mars", np.arange("2028-10-01", "2029-01-01", 7, dtype="datetime64[D]"),
    ...                      np.arange("2029-06-01", "2029-12-01", 7, dtype="datetime64[D]"))
    >>> fig, ax = plt.subplots()
    >>> artists = plot_transfer_map(ax, ds)
    >>> len(artists.minima)
    2
    >>> plt.close(fig)
    """
    if "branch" in ds.dims:
        raise ValueError(
            "`ds` has two branches (a multi-revolution map): choose one, "
            "e.g. plot_transfer_map(ax, ds.sel(branch='short period'))"
        )
    ds = ds.transpose("departure", "arrival")
    x = mdates.date2num(ds["departure"].values)
    y = mdates.date2num(ds["arrival"].values)
    c3 = np.asarray(ds["c3"].values, dtype=float).T / km2_per_s2  # rows: arrival (y), columns: departure (x)
    vinf = np.asarray(ds["arrival_vinf"].values, dtype=float).T / km_per_s
    tof = np.asarray(ds["time_of_flight"].values, dtype=float).T / day

    if c3_levels is None:
        low = np.floor(np.nanmin(c3))
        c3_levels = _nice_levels(low, min(np.nanpercentile(c3, 40), low + 40.0), 12)
    if vinf_levels is None:
        low = np.floor(2 * np.nanmin(vinf)) / 2
        vinf_levels = np.arange(low + 0.5, low + 3.01, 0.5)
    if tof_levels is None:
        tof_levels = _nice_levels(np.nanmin(tof), np.nanmax(tof), 8)[1:-1]

    options = {"cmap": _C3_COLOURS, "alpha": 0.85, **kwargs}  # above the top level: left blank
    c3_fill = ax.contourf(x, y, c3, levels=c3_levels, **options)
    vinf_lines = ax.contour(
        x, y, vinf, levels=vinf_levels, colors=COLOURS["burn"], linewidths=1.0, linestyles="--"
    )
    ax.clabel(vinf_lines, fmt="%.1f km/s", fontsize="x-small", inline=True)
    tof_lines = ax.contour(
        x, y, tof, levels=tof_levels, colors=COLOURS["total"], linewidths=0.8, linestyles=":"
    )
    ax.clabel(tof_lines, fmt="%.0f d", fontsize="x-small", inline=True)

    affordable = None
    if "affordable" in ds:
        mask = np.asarray(ds["affordable"].values, dtype=float).T
        if mask.any():
            affordable = ax.contourf(x, y, mask, levels=[0.5, 1.5], colors="none", hatches=["///"])
            ax.contour(x, y, mask, levels=[0.5], colors=COLOURS["after"], linewidths=2.0)

    minima, labels = [], []
    for key, scale, unit, colour, offset in (
        ("c3", km2_per_s2, "km²/s²", COLOURS["before"], (8, 10)),
        ("arrival_vinf", km_per_s, "km/s", COLOURS["burn"], (8, -26)),
    ):
        value, departure, arrival = map_minimum(ds[key])
        if not np.isfinite(value):
            continue
        px, py = mdates.date2num(departure), mdates.date2num(arrival)
        name = "C3" if key == "c3" else "arrival v∞"
        (marker,) = ax.plot(
            [px], [py], marker="*", markersize=13, color=colour, markeredgecolor="white", ls=""
        )
        text = f"least {name} {value / scale:.2f} {unit}\n{_date(departure)} → {_date(arrival)}"
        label = ax.annotate(
            text,
            (px, py),
            xytext=offset,
            textcoords="offset points",
            fontsize="x-small",
            color=colour,
            bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": colour, "alpha": 0.85},
        )
        minima.append(marker)
        labels.append(label)

    for axis in (ax.xaxis, ax.yaxis):
        locator = mdates.AutoDateLocator()
        axis.set_major_locator(locator)
        axis.set_major_formatter(mdates.ConciseDateFormatter(locator))
    origin = escape_mathtext(ds.attrs.get("origin", "origin"))
    target = escape_mathtext(ds.attrs.get("target", "target"))
    style_axes(
        ax,
        xlabel=f"departure from {origin} (UTC)",
        ylabel=f"arrival at {target} (UTC)",
        title=f"{origin} to {target}: C3 (fill), arrival v∞ (dashed), time of flight (dotted)"
        + ("\nhatched: the pairs the tank affords" if affordable is not None else ""),
    )
    bar = None
    if colorbar:
        bar = ax.figure.colorbar(c3_fill, ax=ax, label="C3 at departure (km²/s²)")
    return TransferMapArtists(c3_fill, vinf_lines, tof_lines, minima, labels, affordable, bar)
