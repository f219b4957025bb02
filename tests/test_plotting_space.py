"""draw_conic_3d: the drawn points lie on the orbit in space, the plane and nodes are where they belong."""

from __future__ import annotations

import math

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.figure import Figure

import deltakit as dk
from deltakit.constants import EARTH
from deltakit.plotting import draw_conic_3d, update_conic_3d


def _axes():
    return Figure(figsize=(6, 6)).add_subplot(projection="3d")


def _normal(inc, raan):
    """The plane's unit normal from its definition (common practice)."""
    return np.array([math.sin(inc) * math.sin(raan), -math.sin(inc) * math.cos(raan), math.cos(inc)])


@pytest.mark.parametrize(
    "conic",
    [
        dk.Conic.circular(EARTH.radius + 400e3, EARTH.mu, inc=math.radians(51.6), raan=1.0),
        dk.Conic.from_apsides(7000e3, 20000e3, EARTH.mu, argp=0.7, inc=2.4, raan=4.0),  # retrograde
        dk.Conic.from_vinf(EARTH.radius + 300e3, 3500.0, EARTH.mu, argp=2.0, inc=0.3),  # hyperbola
    ],
    ids=["inclined circle", "retrograde ellipse", "hyperbola"],
)
def test_points_lie_in_the_orbit_plane_on_the_conic(conic):
    art = draw_conic_3d(_axes(), conic, body_radius=EARTH.radius)
    x, y, z = (np.asarray(a) * 1e3 for a in art.orbit.get_data_3d())
    points = np.stack([x, y, z], axis=-1)
    keep = np.isfinite(points).all(axis=1)
    w = _normal(float(conic.inc), float(conic.raan))
    radius = np.linalg.norm(points[keep], axis=1)
    np.testing.assert_allclose(points[keep] @ w, 0.0, atol=1e-9 * radius.max())  # in the plane
    # on the conic: r = p / (1 + e cos nu), nu read back by the numeric layer
    nu = conic.true_anomaly_at(points[keep])
    np.testing.assert_allclose(radius, conic.p / (1 + conic.e * np.cos(nu)), rtol=1e-9)
    # the ascending node lies in the reference plane on the line of nodes, and the orbit rises there
    ax_, ay_, az_ = (np.asarray(a)[0] for a in art.ascending.get_data_3d())
    if np.isfinite(ax_):
        assert abs(az_) < 1e-6 * radius.max() / 1e3
        assert math.atan2(ay_, ax_) == pytest.approx(
            float(conic.raan) % (2 * math.pi) - 2 * math.pi * (float(conic.raan) % (2 * math.pi) > math.pi),
            abs=1e-9,
        )
    nx, ny, nz = art.nodes.get_data_3d()
    assert (
        np.all(nz == 0.0)
        and abs(math.atan2(ny[1], nx[1]) - math.remainder(float(conic.raan), 2 * math.pi)) < 1e-12
    )
    # periapsis at the smallest radius
    px, py, pz = (np.asarray(a)[0] * 1e3 for a in art.periapsis.get_data_3d())
    assert math.sqrt(px * px + py * py + pz * pz) == pytest.approx(float(conic.rp), rel=1e-12)
    assert art.plane in art.orbit.axes.collections  # the reference plane


def test_update_moves_the_artists_in_place(artifacts):
    ax = _axes()
    start = dk.Conic.from_apsides(
        EARTH.radius + 600e3, EARTH.radius + 8000e3, EARTH.mu, argp=0.7, inc=0.5, raan=1.0
    )
    art = draw_conic_3d(ax, start, body_radius=EARTH.radius)
    before = len(ax.lines), len(ax.collections)
    turned = dk.Conic.from_apsides(
        EARTH.radius + 600e3, EARTH.radius + 8000e3, EARTH.mu, argp=0.7, inc=0.8, raan=1.4
    )
    same = update_conic_3d(art, turned)
    assert same is art and (len(ax.lines), len(ax.collections)) == before  # no new artists
    x, y, z = (np.asarray(a) * 1e3 for a in art.orbit.get_data_3d())
    w = _normal(0.8, 1.4)
    np.testing.assert_allclose(np.stack([x, y, z], axis=-1) @ w, 0.0, atol=1e-3)
    limits = ax.get_xlim()
    update_conic_3d(
        art, dk.Conic.from_apsides(EARTH.radius + 600e3, EARTH.radius + 8100e3, EARTH.mu, inc=0.8)
    )
    assert ax.get_xlim() == limits  # a small change does not rescale the view
    update_conic_3d(art, dk.Conic.from_apsides(EARTH.radius + 600e3, 60000e3, EARTH.mu, inc=0.8))
    assert ax.get_xlim()[1] > limits[1]  # an orbit leaving the view does
    ax.figure.savefig(artifacts / "conic_3d_updated.png", dpi=80)


def test_single_orbit_and_nan_elements():
    with pytest.raises(dk.DomainError, match="single orbit"):
        draw_conic_3d(_axes(), dk.Conic(7e6, np.array([0.1, 0.2]), EARTH.mu))
    nan = dk.Conic._trusted(np.nan, np.nan, EARTH.mu)
    art = draw_conic_3d(_axes(), nan)
    assert np.isnan(art.orbit.get_data_3d()[0]).all()
