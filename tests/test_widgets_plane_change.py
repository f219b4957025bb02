"""PlaneChangeExplorer against the numeric layer and outside references.

The shared panel contract (set, export, stress, blitting, browser) is checked
for every registered panel in test_widgets.py, test_panel_stress.py,
test_panel_redraw.py and test_browser.py; here its own readouts are held to
the numeric layer called directly, and to closed forms written out by hand.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

pytest.importorskip("ipywidgets")

from test_widgets import check_common, readout_text

import deltakit as dk
from deltakit.constants import EARTH
from deltakit.demo import LARKSPAN, LARKSPAN_ORIENTATION, LARKSPAN_TARGET_PLANE
from deltakit.units import deg
from deltakit.widgets import PlaneChangeExplorer

#: Larkspan's case as the panel's values (SI), no apsis change.
LARKSPAN_VALUES = {
    "body": "Earth",
    "periapsis_altitude": LARKSPAN.periapsis_altitude,
    "apoapsis_altitude": LARKSPAN.apoapsis_altitude,
    **LARKSPAN_ORIENTATION,
    "target_inc": LARKSPAN_TARGET_PLANE[0],
    "target_raan": LARKSPAN_TARGET_PLANE[1],
    "apsis_change": "none",
    "apsis_altitude": 0.0,
}


def circular(altitude, **kwargs):
    return {
        **LARKSPAN_VALUES,
        "periapsis_altitude": altitude,
        "apoapsis_altitude": altitude,
        "argp": 0.0,
        **kwargs,
    }


@pytest.fixture(scope="module")
def panel():
    return PlaneChangeExplorer()


def test_default_panel_keeps_the_shared_contract(panel):
    check_common(panel)
    assert panel.error == ""
    assert panel.controls["apsis_altitude"].disabled  # no apsis change by default
    assert not PlaneChangeExplorer(apsis_change="periapsis").controls["apsis_altitude"].disabled


@pytest.mark.parametrize("apsis", [("none", None), ("periapsis", 800e3), ("apoapsis", 30_000e3)])
def test_compute_matches_the_numeric_layer(apsis):
    change, altitude = apsis
    values = {**LARKSPAN_VALUES, "apsis_change": change, "apsis_altitude": altitude or 0.0}
    r = PlaneChangeExplorer.compute(values).results  # no widget made
    orbit = dk.demo.larkspan_orbit()
    target = (
        {} if altitude is None else {{"periapsis": "rp", "apoapsis": "ra"}[change]: EARTH.radius + altitude}
    )
    plan = dk.plane_change_burns(orbit, *LARKSPAN_TARGET_PLANE, **target)
    assert r["turn"] == pytest.approx(float(plan.turn), rel=1e-13)
    for key, k in (("first", 0), ("second", 1)):
        assert r[f"nu_{key}"] == pytest.approx(float(plan.nu[k]), rel=1e-13)
        assert r[f"altitude_{key}"] == pytest.approx(
            float(orbit.radius(plan.nu[k])) - EARTH.radius, rel=1e-12
        )
        np.testing.assert_allclose(r[f"dv_{key}"], float(plan.dv[k]), rtol=1e-12)  # NaN where unreachable
    assert r["cheaper"] == int(plan.cheaper) + 1 and r["best_dv"] == pytest.approx(
        float(plan.best_dv), rel=1e-13
    )
    at_nodes = dk.inclination_change_cost(orbit, np.array(orbit.nodes), LARKSPAN_TARGET_PLANE[0]).dv
    assert r["inclination_only"] == pytest.approx(float(np.min(at_nodes)), rel=1e-13)
    assert r["split_total"] <= r["best_dv"] * (1 + 1e-12)  # one burn is one of the splits


def test_pure_plane_change_of_a_circle_is_two_v_sin_half_the_turn():
    # Curtis, Orbital Mechanics for Engineering Students, 3rd ed., Ch. 6 (plane change manoeuvres):
    # a pure plane change at speed v turning the velocity by di costs dv = 2 v sin(di / 2) (quoted
    # from memory). On a circle the speed is sqrt(mu / r) everywhere, so both crossings cost the same.
    values = circular(700e3, inc=51.6 * deg, raan=0.0, target_inc=45.0 * deg, target_raan=0.0)
    r = PlaneChangeExplorer.compute(values).results
    v = math.sqrt(EARTH.mu / (EARTH.radius + 700e3))
    expected = 2.0 * v * math.sin(0.5 * 6.6 * deg)
    assert r["turn"] == pytest.approx(6.6 * deg, rel=1e-12)
    assert r["dv_first"] == pytest.approx(expected, rel=1e-12)
    assert r["dv_second"] == pytest.approx(expected, rel=1e-12)
    assert r["saving"] == pytest.approx(0.0, abs=1e-9 * expected)
    assert r["inclination_only"] == pytest.approx(expected, rel=1e-12)  # node unchanged: the same burn


def test_node_change_only_follows_spherical_trigonometry():
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Sec. 6.4 (change of the node
    # only, circular orbit): cos(turn) = cos^2 i + sin^2 i cos(d raan), dv = 2 v sin(turn / 2)
    # (quoted from memory). Here retrograde, i = 150 deg, the node moved by 30 deg.
    i, shift = 150.0 * deg, 30.0 * deg
    values = circular(1200e3, inc=i, raan=10 * deg, target_inc=i, target_raan=10 * deg + shift)
    r = PlaneChangeExplorer.compute(values).results
    turn = math.acos(
        math.cos(i) ** 2 + math.sin(i) ** 2 * math.cos(shift)
    )  # about 14.9 deg: well conditioned
    v = math.sqrt(EARTH.mu / (EARTH.radius + 1200e3))
    assert r["turn"] == pytest.approx(turn, rel=1e-12)
    assert r["best_dv"] == pytest.approx(2.0 * v * math.sin(0.5 * turn), rel=1e-12)


@pytest.mark.parametrize("argp", [0.0, 40.0, 200.0, 300.0])
def test_the_cheaper_crossing_of_an_eccentric_orbit_is_the_one_farther_out(argp):
    # common practice: turn the plane where the vehicle is slowest, farther out on an ellipse
    values = {**LARKSPAN_VALUES, "argp": argp * deg}
    computed = PlaneChangeExplorer.compute(values)
    r = computed.results
    altitudes = (r["altitude_first"], r["altitude_second"])
    assert r["cheaper"] == 1 + int(np.argmax(altitudes))
    assert r["saving"] > 0.0 and r["saving"] == pytest.approx(abs(r["dv_first"] - r["dv_second"]), rel=1e-12)
    assert f"Crossing {r['cheaper']} is cheaper" in computed.notes[0]


def test_without_an_apsis_change_splitting_never_pays():
    # 2 vt1 sin(s T / 2) + 2 vt2 sin((1 - s) T / 2) is concave in s: its least value is at an end,
    # the whole turn at the slower crossing (sin is concave on [0, pi / 2])
    r = PlaneChangeExplorer.compute(LARKSPAN_VALUES).results
    assert r["split_share"] == 1.0 and r["split_first"] == r["cheaper"]
    assert r["split_total"] == pytest.approx(r["best_dv"], rel=1e-12) and r["split_saving"] == 0.0


def test_split_of_a_turn_between_perigee_and_apogee_burns():
    """Raise the apoapsis of a circular 300 km orbit to 35,786 km and remove 28.5 deg of inclination.

    The classic split (Curtis, 3rd ed., Ch. 6, combined plane change; from memory): a small share of
    the turn rides on the perigee burn. Written out by hand: the perigee burn changes the speed from
    the circular v1 to the transfer orbit's perigee speed vp and turns it by s T (law of cosines), the
    apogee burn turns the transfer orbit's apogee speed va by the rest: 2 va sin((1 - s) T / 2).
    """
    turn = 28.5 * deg
    values = circular(
        300e3, inc=turn, raan=0.0, target_inc=0.0, target_raan=0.0, apsis_change="apoapsis",
        apsis_altitude=35_786e3,
    )  # fmt: skip
    r = PlaneChangeExplorer.compute(values).results
    r1, r2, mu = EARTH.radius + 300e3, EARTH.radius + 35_786e3, EARTH.mu
    v1 = math.sqrt(mu / r1)
    vp = math.sqrt(2.0 * mu * r2 / (r1 * (r1 + r2)))  # vis-viva at perigee, a = (r1 + r2) / 2
    va = vp * r1 / r2  # angular momentum
    s = np.linspace(0.0, 1.0, 200_001)
    total = np.sqrt(v1**2 + vp**2 - 2.0 * v1 * vp * np.cos(s * turn)) + 2.0 * va * np.sin(
        0.5 * (1 - s) * turn
    )
    best = int(np.argmin(total))
    assert r["split_share"] == pytest.approx(s[best], abs=2e-4)
    assert r["split_total"] == pytest.approx(total[best], rel=1e-9)
    assert 0.0 < r["split_share"] < 0.2  # a small share at perigee
    assert r["split_saving"] == pytest.approx(r["best_dv"] - total[best], rel=1e-6)
    assert r["split_saving"] > 100.0


def test_the_readouts_show_compute_and_name_the_cheaper_crossing(panel):
    r = panel.results
    assert readout_text(panel, "best_dv") == f"{r['best_dv']:.1f} m/s"
    assert readout_text(panel, "turn") == f"{r['turn'] / deg:.3f} deg"
    assert f"crossing {r['cheaper']}" in panel.readouts.value.lower()


def test_a_retrograde_orbit_turned_lands_in_the_target_plane():
    values = {**LARKSPAN_VALUES, "inc": 140 * deg, "target_inc": 140 * deg, "target_raan": 70 * deg}
    computed = PlaneChangeExplorer.compute(values)
    after = computed.drawing["after"]
    assert float(after.inc) == pytest.approx(140 * deg, abs=1e-12)
    assert float(after.raan) == pytest.approx(70 * deg, abs=1e-12)
    assert float(after.rp) == pytest.approx(EARTH.radius + LARKSPAN.periapsis_altitude, rel=1e-12)


@pytest.mark.parametrize(
    "bad, words, control",
    [
        ({"inc": 181 * deg}, "inclination must be between 0 and 180 deg (got 181 deg)", "inc"),
        ({"target_inc": -1 * deg}, "target inclination must be between 0 and 180 deg", "target_inc"),
        (
            {"apsis_change": "periapsis", "apsis_altitude": 30_000e3},
            "no burn along the velocity",
            "apsis_altitude",
        ),
        ({"apsis_change": "apoapsis", "apsis_altitude": -10e3}, "new apoapsis altitude -10 km is below", ""),
        ({"apoapsis_altitude": 100e3}, "below the periapsis altitude", "apoapsis_altitude"),
    ],
)
def test_bad_input_is_a_message_naming_the_control(panel, bad, words, control):
    before = panel.values, panel.results
    panel.set(**bad)
    assert words in panel.error
    assert (panel.values, panel.results) == before
    panel.set(**before[0])
    assert panel.error == ""


def test_a_turn_slider_step_blits_the_3d_view(monkeypatch):
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    static = PlaneChangeExplorer()
    view = static.view
    draws = view.full_draws, view.cell_draws
    for step in (1, 2, 3):
        static.set(target_raan=(45.0 + 0.5 * step) * deg)  # the planes move: the 3-D view and the curves
    assert (view.full_draws, view.cell_draws) == draws
    static.set(periapsis_altitude=2000e3, apoapsis_altitude=60_000e3)  # a new orbit: its view rescales
    assert view.full_draws + view.cell_draws > sum(draws) and static.error == ""


def test_panel_pictures_of_a_default_and_a_stressed_case(artifacts):
    default = PlaneChangeExplorer()
    default.figure.savefig(artifacts / "plane-change-default.png")
    stressed = PlaneChangeExplorer(
        periapsis_altitude=400e3, apoapsis_altitude=120_000e3, argp=75 * deg, inc=160 * deg,
        raan=300 * deg, target_inc=160 * deg, target_raan=340 * deg, apsis_change="none",
    )  # fmt: skip  # retrograde, eccentric, the node moved only
    stressed.figure.savefig(artifacts / "plane-change-stressed.png")
    r = stressed.results
    assert stressed.error == "" and r["turn"] > 10 * deg
    assert r["cheaper"] == 1 + int(r["altitude_second"] > r["altitude_first"])
    after = type(stressed).compute(stressed.values).drawing["after"]
    assert float(after.inc) == pytest.approx(160 * deg, abs=1e-12)
    assert float(after.raan) == pytest.approx(340 * deg, abs=1e-12)
