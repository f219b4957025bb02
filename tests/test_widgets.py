"""Panels driven from code, headless (Agg): values, artists, readouts, export.

The readouts are checked against the numeric layer called directly with the
same inputs; the physics checks themselves (against textbooks and scipy) live
in the numeric layer's tests. Saved figures land in the artefact folder for a
person to look at.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

pytest.importorskip("ipywidgets")

import deltakit as dk
from deltakit.constants import BODIES, EARTH, MARS
from deltakit.widgets import CAUTION
from deltakit.widgets._base import fmt

DEG = math.pi / 180.0


def readout_text(panel, key):
    """The text a person reads in the readout row ``key``."""
    html = panel.readouts.value
    start = html.index(f'data-readout="{key}"')
    cell = html[start:].split("<b>", 1)[1]
    return cell.split("</b>", 1)[0]


def check_common(panel):
    """Contract every panel keeps: keys, caution, JSON export that restores."""
    assert set(panel.values) == set(panel.controls)
    assert CAUTION in panel.caution.value
    assert "preliminary analysis" in panel.caution.value
    exported = panel.export()
    text = json.dumps(exported, allow_nan=False)
    assert json.loads(text)["panel"] == type(panel).__name__
    fresh = type(panel)()
    fresh.set(**exported["values"])
    assert fresh.export() == exported
    assert fresh.error == ""


# ---------------------------------------------------------------------- BurnPointExplorer
@pytest.fixture
def explorer():
    return dk.widgets.BurnPointExplorer()


def test_explorer_default_case_is_valid_and_matches_numeric_layer(explorer):
    v = explorer.values
    body = BODIES[v["body"]]
    orbit = dk.Conic.from_apsides(body.radius + v["periapsis_altitude"], body.radius + v["apoapsis_altitude"], body.mu)
    outcome = dk.burn_prograde(orbit, v["nu"], v["dv"])
    r = explorer.results
    assert explorer.error == ""
    assert r["speed"] == pytest.approx(float(orbit.speed(v["nu"])), rel=1e-12)
    assert r["energy_change"] == pytest.approx(float(outcome.energy_change), rel=1e-9)
    assert r["periapsis_altitude_after"] == pytest.approx(float(outcome.after.rp) - body.radius, rel=1e-9)
    assert r["apoapsis_altitude_after"] == pytest.approx(float(outcome.after.ra) - body.radius, rel=1e-9)
    # Oberth relation for a prograde burn: dE = v dv + dv^2/2 (common practice)
    assert r["energy_change"] == pytest.approx(float(dk.energy_gain(r["speed"], v["dv"])), rel=1e-9)
    at_apo = dk.burn_prograde(orbit, math.pi, v["dv"])
    assert r["energy_change_at_apoapsis"] == pytest.approx(float(at_apo.energy_change), rel=1e-9)
    assert readout_text(explorer, "speed") == fmt(r["speed"], 1e3, "km/s")
    check_common(explorer)


def test_explorer_set_moves_values_artists_and_readouts(explorer):
    before_text = readout_text(explorer, "energy_change")
    curve_before = explorer._artists["curve"].get_ydata().copy()
    explorer.set(body="Earth", periapsis_altitude=500e3, apoapsis_altitude=8000e3, dv=250.0, nu=-90 * DEG)
    v = explorer.values
    assert v["body"] == "Earth" and v["dv"] == 250.0 and v["nu"] == pytest.approx(-math.pi / 2, abs=1e-11)
    orbit = dk.Conic.from_apsides(EARTH.radius + 500e3, EARTH.radius + 8000e3, EARTH.mu)
    # burn marker sits on the orbit at the burn point, in km
    marker = explorer._artists["burn"].marker.get_xydata()[0]
    r_vec, _ = orbit.state(-math.pi / 2)
    np.testing.assert_allclose(marker, r_vec / 1e3, rtol=1e-9, atol=1e-3)  # 1 m
    # the energy curve equals the Oberth relation at each sampled point
    x, y = explorer._artists["curve"].get_data()
    expected = dk.energy_gain(orbit.speed(np.radians(x)), 250.0) / 1e6
    np.testing.assert_allclose(y, expected, rtol=1e-9)
    assert not np.allclose(curve_before, y)
    assert readout_text(explorer, "energy_change") != before_text
    outcome = dk.burn_prograde(orbit, -math.pi / 2, 250.0)
    assert explorer.results["energy_change"] == pytest.approx(float(outcome.energy_change), rel=1e-9)
    # the orbit drawn after the burn satisfies the conic equation of the outcome
    xs, ys = explorer._artists["burn"].after.orbit.get_data()
    after = outcome.after
    theta = np.arctan2(ys, xs) - float(after.argp)
    np.testing.assert_allclose(np.hypot(xs, ys) * 1e3, after.p / (1 + after.e * np.cos(theta)), rtol=1e-9)


def test_explorer_burn_point_only_moves_marker_not_curve(explorer):
    curve = explorer._artists["curve"].get_ydata().copy()
    explorer.set(nu=2.0)
    np.testing.assert_array_equal(explorer._artists["curve"].get_ydata(), curve)
    cx, cy = explorer._artists["current"].get_data()
    assert cx[0] == pytest.approx(math.degrees(2.0))
    assert cy[0] == pytest.approx(explorer.results["energy_change"] / 1e6)


@pytest.mark.parametrize(
    "bad, words",
    [
        ({"periapsis_altitude": -50e3}, "below the surface"),
        ({"apoapsis_altitude": 100e3}, "below the periapsis"),
        ({"dv": 9000.0, "direction": "retrograde", "nu": math.pi}, "reverses the motion"),
    ],
)
def test_explorer_invalid_input_shows_message_keeps_view(explorer, bad, words):
    results = explorer.results
    marker = explorer._artists["burn"].marker.get_xydata().copy()
    image = explorer.view.widget.value
    explorer.set(**bad)  # must not raise
    assert words in explorer.error
    assert words in explorer.message.value
    assert explorer.results == results
    np.testing.assert_array_equal(explorer._artists["burn"].marker.get_xydata(), marker)
    assert explorer.view.widget.value == image
    # still usable: a valid input clears the message and updates
    explorer.set(periapsis_altitude=400e3, apoapsis_altitude=20000e3, dv=100.0, direction="prograde", nu=0.0)
    assert explorer.error == "" and explorer.message.value == ""
    assert explorer.results != results


def test_explorer_directions_match_rtn_components(explorer):
    explorer.set(body="Mars", periapsis_altitude=300e3, apoapsis_altitude=10000e3, dv=200.0, nu=1.0,
                 direction="radial out")
    orbit = dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 10000e3, MARS.mu)
    expected = dk.burn(orbit, 1.0, radial=200.0)
    assert explorer.results["energy_change"] == pytest.approx(float(expected.energy_change), rel=1e-9)
    assert explorer.controls["angle"].disabled
    explorer.set(direction="any angle from prograde", angle=math.pi)
    assert not explorer.controls["angle"].disabled
    retro = dk.burn_prograde(orbit, 1.0, -200.0)
    assert explorer.results["energy_change"] == pytest.approx(float(retro.energy_change), rel=1e-9)


def test_explorer_figure_saved(explorer, artifacts):
    explorer.set(dv=150.0, nu=45 * DEG)
    explorer.figure.savefig(artifacts / "burn_point_explorer.png", dpi=100)
    assert (artifacts / "burn_point_explorer.png").stat().st_size > 10_000


def test_set_refuses_unknown_names(explorer):
    with pytest.raises(TypeError, match="unknown names"):
        explorer.set(altitude=1.0)
