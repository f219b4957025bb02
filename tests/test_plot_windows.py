"""The launch-window plot draws what the map holds, where the map says."""

from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("jplephem")
pytest.importorskip("xarray")
import matplotlib

matplotlib.use("Agg")
import matplotlib.dates as mdates
import matplotlib.pyplot as plt

import deltakit as dk
from deltakit.constants import EARTH, MARS
from deltakit.plotting import map_minimum, plot_transfer_map


@pytest.fixture(scope="module")
def window():
    departures = np.arange("2028-09-15", "2029-01-20", 3, dtype="datetime64[D]")
    arrivals = np.arange("2029-05-15", "2030-01-15", 3, dtype="datetime64[D]")
    return dk.transfer_map(
        "Earth",
        "Mars",
        departures,
        arrivals,
        parking=EARTH.radius + 300e3,
        arrival_orbit=(MARS.radius + 400e3, MARS.radius + 33_000e3),
        vehicle=(4000.0, 3150.0, 3150.0),
    )


def test_minima_are_marked_at_the_map_minimum_and_labelled_with_dates(window, artifacts):
    fig, ax = plt.subplots(figsize=(9, 6.5), layout="constrained")
    artists = plot_transfer_map(ax, window)
    fig.savefig(artifacts / "transfer_map_2028.png", dpi=100)
    value, departure, arrival = map_minimum(window["c3"])
    c3 = window["c3"].values
    assert value == np.nanmin(c3)
    (x,), (y,) = artists.minima[0].get_data()
    assert x == pytest.approx(mdates.date2num(departure)) and y == pytest.approx(mdates.date2num(arrival))
    text = artists.labels[0].get_text()
    assert f"{value / 1e6:.2f}" in text and str(departure)[:10] in text and str(arrival)[:10] in text
    assert "arrival v∞" in artists.labels[1].get_text()
    assert artists.affordable is not None  # the tank affords some pairs of this window
    assert isinstance(ax.xaxis.get_major_formatter(), mdates.ConciseDateFormatter)
    assert "departure from Earth" in ax.get_xlabel() and "arrival at Mars" in ax.get_ylabel()
    plt.close(fig)


def test_levels_given_are_the_levels_drawn(window):
    fig, ax = plt.subplots()
    artists = plot_transfer_map(ax, window, c3_levels=[8, 10, 12, 16], vinf_levels=[3.0, 4.0], colorbar=False)
    assert list(artists.c3.levels) == [8, 10, 12, 16]
    assert list(artists.arrival_vinf.levels) == [3.0, 4.0]
    assert artists.colorbar is None
    plt.close(fig)


def test_a_multi_revolution_map_asks_for_a_branch():
    ds = dk.transfer_map(
        "Earth",
        "Mars",
        np.datetime64("2028-10-01") + np.arange(0, 90, 30),
        np.datetime64("2030-10-01") + np.arange(0, 90, 30),
        revolutions=1,
    )
    fig, ax = plt.subplots()
    with pytest.raises(ValueError, match="branch"):
        plot_transfer_map(ax, ds)
    plt.close(fig)
