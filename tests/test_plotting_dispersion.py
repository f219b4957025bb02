"""Dispersion plots: the artists show the samples' numbers, labels stay plain text, figures saved to look at.

The vehicle is invented (the "Fescue" tug of tests/test_dispersions.py).
"""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.figure import Figure

import deltakit as dk
from deltakit import Budget, Normal
from deltakit.plotting import plot_propellant_left, plot_sensitivity

pytest.importorskip("xarray")


def tight_tug() -> Budget:
    b = Budget(name="Fescue", dry_mass=900.0)
    b.system("main", dk.exhaust_velocity(321.0), 1650.0).system("rcs", dk.exhaust_velocity(224.0), 60.0)
    b.add("transfer", 1800.0).add("$\\frac{ upkeep", 82.0, system="rcs").add("trim", 9.0, system="rcs")
    return b


@pytest.fixture(scope="module")
def ds():
    return dk.disperse(
        tight_tug(),
        samples=40_000,
        seed=4,
        dv={1: Normal(3.0), 0: Normal(8.0)},
        isp={"main": Normal(1.5), "rcs": Normal(3.0)},
        dry_mass=Normal(10.0),
    )


def test_propellant_left_shows_the_samples(ds, artifacts):
    fig = Figure(figsize=(7, 4.4), layout="constrained")
    ax = fig.add_subplot()
    art = plot_propellant_left(ax, ds)  # the tightest tank: the thrusters' here
    values = ds.propellant_margin.sel(system="rcs").values
    assert sum(p.get_height() for p in art.histogram) == values.size
    assert "rcs" in ax.get_title() and f"{100 * float(ds.probability_closes):.1f} %" in ax.get_title()
    np.testing.assert_allclose(np.sort(values), art.cumulative.get_xdata())
    assert art.cumulative.get_ydata()[-1] == pytest.approx(100.0)
    for line, level in zip(art.percentiles, (1, 10, 50, 90)):
        assert line.get_xdata()[0] == pytest.approx(np.percentile(values, level))
    short = [p for p in art.histogram if p.get_x() < 0.0]
    assert short and all(p.get_facecolor() != art.histogram[-1].get_facecolor() for p in short)
    fig.savefig(artifacts / "dispersion_propellant_left.png", dpi=90)


def test_a_tank_far_from_dry_says_where_dry_is(ds, artifacts):
    fig = Figure(figsize=(7, 4.4), layout="constrained")
    ax = fig.add_subplot()
    art = plot_propellant_left(ax, ds, system="main")
    assert ax.get_xlim()[0] > 0.0 and "off the left edge" in art.dry.get_label()
    fig.savefig(artifacts / "dispersion_main_tank.png", dpi=90)


def test_sensitivity_bars_are_the_ranked_shares(ds, artifacts):
    fig = Figure(figsize=(7, 4), layout="constrained")
    ax = fig.add_subplot()
    art = plot_sensitivity(ax, ds, target="rcs")
    share = 100.0 * ds.correlation.sel(target="rcs").values ** 2
    widths = [bar.get_width() for bar in art.bars]
    np.testing.assert_allclose(widths, np.sort(share)[::-1], rtol=1e-12)
    ticks = [t.get_text() for t in ax.get_yticklabels()]
    assert ticks[0].startswith("dv: line 2") and "\\$\\frac{" in ticks[0]  # largest first; plain text
    fig.canvas.draw()  # a label that is not valid mathtext must not raise
    fig.savefig(artifacts / "dispersion_sensitivity.png", dpi=90)


def test_bad_names_are_refused(ds):
    ax = Figure().add_subplot()
    with pytest.raises(ValueError, match="`system`"):
        plot_propellant_left(ax, ds, system="warp")
    with pytest.raises(ValueError, match="`target`"):
        plot_sensitivity(ax, ds, target="warp")
