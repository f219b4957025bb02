"""Panels driven from code, headless (Agg): values, artists, readouts, export.

Each panel's maths is its pure ``compute(values)``; it is checked here once
against the numeric layer called directly with the same inputs (the physics
checks themselves, against textbooks and scipy, live in the numeric layer's
tests). The widgets are then checked against ``compute``: what the readouts,
the artists and the export show is what it gave. Saved figures land in the
artefact folder for a person to look at.
"""

from __future__ import annotations

import html
import json
import math

import numpy as np
import pytest

pytest.importorskip("ipywidgets")

import deltakit as dk
from deltakit.constants import BODIES, EARTH, MARS, MOON
from deltakit.units import deg, km
from deltakit.widgets import CAUTION
from deltakit.widgets._format import fmt

PANEL_NAMES = list(dk.widgets.PANELS)
#: The panels that have sliders (BudgetBuilder and FormulaSheet have none).
SLIDER_PANELS = [name for name in PANEL_NAMES if name not in ("BudgetBuilder", "FormulaSheet")]


def readout_text(panel, key):
    """The text a person reads in the readout row ``key``."""
    text = panel.readouts.value
    start = text.index(f'data-readout="{key}"')
    cell = text[start:].split("<b>", 1)[1]
    return html.unescape(cell.split("</b>", 1)[0])


def check_common(panel):
    """Contract every panel keeps: keys, caution, compute, JSON export that restores."""
    assert set(panel.values) == set(panel.controls)
    assert CAUTION in html.unescape(panel.caution.value)
    assert "preliminary analysis" in panel.caution.value
    assert type(panel).compute(panel.values).results == panel.results  # the view shows compute's case
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


def test_explorer_compute_matches_numeric_layer():
    values = {
        "body": "Mars",
        "periapsis_altitude": 300e3,
        "apoapsis_altitude": 33_000e3,
        "dv": 100.0,
        "direction": "prograde",
        "angle": 0.0,
        "nu": 30 * deg,
    }
    r = dk.widgets.BurnPointExplorer.compute(values).results  # no widget made
    orbit = dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 33_000e3, MARS.mu)
    outcome = dk.burn_prograde(orbit, 30 * deg, 100.0)
    assert r["speed"] == pytest.approx(float(orbit.speed(30 * deg)), rel=1e-12)
    assert r["energy_change"] == pytest.approx(float(outcome.energy_change), rel=1e-9)
    assert r["periapsis_altitude_after"] == pytest.approx(float(outcome.after.rp) - MARS.radius, rel=1e-9)
    assert r["apoapsis_altitude_after"] == pytest.approx(float(outcome.after.ra) - MARS.radius, rel=1e-9)
    at_apo = dk.burn_prograde(orbit, math.pi, 100.0)
    assert r["energy_change_at_apoapsis"] == pytest.approx(float(at_apo.energy_change), rel=1e-9)


def test_explorer_default_view_shows_compute(explorer):
    r = explorer.results
    assert explorer.error == ""
    assert r == dk.widgets.BurnPointExplorer.compute(explorer.values).results
    assert readout_text(explorer, "speed") == fmt(r["speed"], 1e3, "km/s")
    cx, cy = explorer._artists["current"].get_data()
    assert cx[0] == pytest.approx(30.0) and cy[0] == pytest.approx(r["energy_change"] / 1e6)
    check_common(explorer)


def test_explorer_set_moves_values_artists_and_readouts(explorer):
    before_text = readout_text(explorer, "energy_change")
    curve_before = explorer._artists["curve"].get_ydata().copy()
    explorer.set(body="Earth", periapsis_altitude=500e3, apoapsis_altitude=8000e3, dv=250.0, nu=-90 * deg)
    v = explorer.values
    assert v["body"] == "Earth" and v["dv"] == 250.0 and v["nu"] == pytest.approx(-math.pi / 2, abs=1e-11)
    orbit = dk.Conic.from_apsides(EARTH.radius + 500e3, EARTH.radius + 8000e3, EARTH.mu)
    # burn marker sits on the orbit at the burn point, in km
    marker = explorer._artists["burn"].marker.get_xydata()[0]
    r_vec, _ = orbit.state(-math.pi / 2)
    np.testing.assert_allclose(marker, r_vec / 1e3, rtol=1e-9, atol=1e-3)  # 1 m
    x, y = explorer._artists["curve"].get_data()
    np.testing.assert_allclose(
        y, dk.burn_prograde(orbit, np.radians(x), 250.0).energy_change / 1e6, rtol=1e-9
    )
    assert not np.allclose(curve_before, y)
    assert readout_text(explorer, "energy_change") != before_text
    # the orbit drawn after the burn satisfies the conic equation of the outcome
    after = dk.burn_prograde(orbit, -math.pi / 2, 250.0).after
    xs, ys = explorer._artists["burn"].after.orbit.get_data()
    theta = np.arctan2(ys, xs) - float(after.argp)
    np.testing.assert_allclose(np.hypot(xs, ys) * 1e3, after.p / (1 + after.e * np.cos(theta)), rtol=1e-9)


def test_explorer_burn_point_only_moves_marker_not_curve(explorer):
    curve = explorer._artists["curve"].get_ydata().copy()
    explorer.set(nu=math.radians(115.0))  # on the slider's 1 deg step
    np.testing.assert_array_equal(explorer._artists["curve"].get_ydata(), curve)
    cx, cy = explorer._artists["current"].get_data()
    assert cx[0] == pytest.approx(115.0)
    assert cy[0] == pytest.approx(explorer.results["energy_change"] / 1e6)


@pytest.mark.parametrize(
    "bad, words, control",
    [
        ({"periapsis_altitude": -50e3}, "below the surface", "periapsis_altitude"),
        ({"apoapsis_altitude": 100e3}, "below the periapsis", "apoapsis_altitude"),
        ({"dv": -1097.0}, "delta-v must be >= 0 m/s, got -1097 m/s", "dv"),
        ({"dv": 9000.0, "direction": "retrograde", "nu": math.pi}, "reverses the motion", "dv"),
    ],
)
def test_explorer_invalid_input_shows_message_keeps_view(explorer, bad, words, control):
    results, values = explorer.results, explorer.values
    marker = explorer._artists["burn"].marker.get_xydata().copy()
    image = explorer.view.widget.value
    explorer.set(**bad)  # must not raise
    assert words in explorer.error
    assert words in html.unescape(explorer.message.value)
    assert explorer.results == results and explorer.values == values  # no control changed
    np.testing.assert_array_equal(explorer._artists["burn"].marker.get_xydata(), marker)
    assert explorer.view.widget.value == image
    with pytest.raises(dk.DomainError, match=words) as refused:
        type(explorer).compute({**values, **bad})
    assert control in refused.value.controls
    # still usable: a valid input clears the message and updates
    explorer.set(periapsis_altitude=400e3, apoapsis_altitude=20000e3, dv=100.0, direction="prograde", nu=0.0)
    assert explorer.error == "" and explorer.message.value == ""
    assert explorer.results != results


def test_explorer_directions_match_rtn_components(explorer):
    explorer.set(
        body="Mars",
        periapsis_altitude=300e3,
        apoapsis_altitude=10000e3,
        dv=200.0,
        nu=math.radians(57.0),
        direction="radial out",
    )
    orbit = dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 10000e3, MARS.mu)
    expected = dk.burn(orbit, math.radians(57.0), radial=200.0)
    assert explorer.results["energy_change"] == pytest.approx(float(expected.energy_change), rel=1e-9)
    assert explorer.controls["angle"].disabled
    explorer.set(direction="any angle from prograde", angle=math.pi)
    assert not explorer.controls["angle"].disabled
    retro = dk.burn_prograde(orbit, math.radians(57.0), -200.0)
    assert explorer.results["energy_change"] == pytest.approx(float(retro.energy_change), rel=1e-9)


def test_explorer_escape_case_exports_json(explorer):
    explorer.set(body="Earth", periapsis_altitude=400e3, apoapsis_altitude=400e3, dv=3300.0, nu=0.0)
    assert explorer.error == ""
    assert explorer.results["eccentricity_after"] > 1.0
    assert "escapes Earth" in explorer.readouts.value
    assert "drawn out to" in explorer.readouts.value  # the hyperbola is clipped at a stated radius
    assert explorer._artists["clip"].get_visible()
    assert readout_text(explorer, "apoapsis_altitude_after") == "unbounded"
    exported = explorer.export()
    assert exported["results"]["apoapsis_altitude_after"] is None
    json.dumps(exported, allow_nan=False)


def test_explorer_figure_saved(explorer, artifacts):
    explorer.set(dv=150.0, nu=45 * deg)
    explorer.figure.savefig(artifacts / "burn_point_explorer.png", dpi=100)
    assert (artifacts / "burn_point_explorer.png").stat().st_size > 10_000


def test_set_refuses_unknown_names(explorer):
    with pytest.raises(TypeError, match="unknown names"):
        explorer.set(altitude=1.0)


# ---------------------------------------------------------------------- PropellantTrade
@pytest.fixture
def trade():
    return dk.widgets.PropellantTrade()


def test_propellant_compute_matches_numeric_layer():
    values = {
        "dry_mass": 1450.0,
        "mass_input": "propellant mass",
        "propellant_mass": 4200.0,
        "mass_ratio": 1.0,
        "exhaust_input": "specific impulse",
        "isp": 321.0,
        "exhaust_velocity": 0.0,
        "speed": 7670.0,
    }
    r = dk.widgets.PropellantTrade.compute(values).results
    ve = float(dk.exhaust_velocity(321.0))
    assert r["dv"] == pytest.approx(float(dk.rocket_dv(ve, 5650.0, 1450.0)), rel=1e-12)
    split = dk.burn_energy(5650.0, 1450.0, ve, 7670.0)
    assert r["energy_vehicle"] == pytest.approx(float(split.vehicle), rel=1e-12)
    assert r["energy_exhaust"] == pytest.approx(float(split.ejecta), rel=1e-12)
    assert r["efficiency_start"] == pytest.approx(float(dk.propulsive_efficiency(7670.0, ve)), rel=1e-12)


def test_propellant_default_view_shows_compute(trade):
    r = trade.results
    assert trade.error == ""
    widths = [bar.get_width() for bar in trade._bars]
    np.testing.assert_allclose(
        widths, np.array([r["energy_vehicle"], r["energy_exhaust"], r["energy_total"]]) / 1e9, rtol=1e-12
    )
    assert readout_text(trade, "dv") == fmt(r["dv"], 1.0, "m/s")
    check_common(trade)


def test_propellant_rocket_equation_by_hand(trade):
    # ve = Isp g0 with g0 = 9.80665 m/s^2 exactly (ISO 80000-3); dv = ve ln(m0/mf)
    trade.set(dry_mass=1000.0, mass_input="mass ratio", mass_ratio=math.e, isp=300.0, speed=0.0)
    assert trade.results["dv"] == pytest.approx(300.0 * 9.80665, rel=1e-9)
    # the propellant box follows the ratio (0.01 kg): m0 - mf = (e - 1) mf
    assert trade.values["propellant_mass"] == pytest.approx((math.e - 1.0) * 1000.0, abs=0.005)
    assert trade.controls["propellant_mass"].disabled and not trade.controls["mass_ratio"].disabled


def test_propellant_energy_released_does_not_depend_on_speed(trade):
    trade.set(speed=0.0)
    at_rest = trade.results
    trade.set(speed=9000.0)
    moving = trade.results
    # total = 0.5 (m0 - mf) ve^2 whatever the speed (DESIGN.md, burn_energy)
    assert moving["energy_total"] == pytest.approx(at_rest["energy_total"], rel=1e-12)
    assert moving["energy_vehicle"] > at_rest["energy_vehicle"]
    assert trade._now.get_xdata()[0] == pytest.approx(9000.0 / moving["exhaust_velocity"])


def test_propellant_exhaust_velocity_input(trade):
    trade.set(exhaust_input="exhaust velocity", exhaust_velocity=4400.0)
    assert trade.results["exhaust_velocity"] == 4400.0
    assert trade.values["isp"] == pytest.approx(4400.0 / 9.80665, abs=0.005)  # the mirrored box shows 0.01 s


def test_propellant_the_input_given_is_the_one_used():
    """Giving one of a pair makes it count: an exhaust velocity given is not silently ignored."""
    panel = dk.widgets.PropellantTrade(exhaust_velocity=3200.0)
    assert panel.values["exhaust_input"] == "exhaust velocity"
    assert panel.results["exhaust_velocity"] == 3200.0
    assert panel.controls["isp"].value == 326.31  # 3200 / 9.80665 = 326.3091881529... shown to 0.01 s
    panel.set(isp=300.0)  # giving the other one switches back
    assert panel.values["exhaust_input"] == "specific impulse"
    assert panel.results["exhaust_velocity"] == pytest.approx(300.0 * 9.80665, rel=1e-12)
    ratio = dk.widgets.PropellantTrade(mass_ratio=2.0)
    assert ratio.values["mass_input"] == "mass ratio" and ratio.results["mass_ratio"] == 2.0
    with pytest.raises(dk.DomainError, match="`isp` or `exhaust_velocity`"):
        dk.widgets.PropellantTrade(isp=300.0, exhaust_velocity=4000.0)


@pytest.mark.parametrize(
    "bad, words",
    [
        ({"dry_mass": 0.0}, "dry mass"),
        ({"mass_input": "mass ratio", "mass_ratio": 0.5}, "mass ratio"),
        ({"isp": -3.0}, "specific impulse"),
    ],
)
def test_propellant_invalid_input(trade, bad, words):
    results = trade.results
    trade.set(**bad)
    assert words in trade.error and trade.results == results
    trade.set(dry_mass=900.0, mass_input="propellant mass", isp=310.0)
    assert trade.error == ""


def test_propellant_figure_saved(trade, artifacts):
    trade.figure.savefig(artifacts / "propellant_trade.png", dpi=100)


# ---------------------------------------------------------------------- TransferTrade
@pytest.fixture
def transfer():
    return dk.widgets.TransferTrade()


def test_transfer_textbook_hohmann(transfer):
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Example 6-1:
    # 191.34411 km to 35 781.34857 km altitude, total 3.935224 km/s (quoted from memory).
    transfer.set(
        body="Earth",
        initial_altitude=191.34411e3,
        final_altitude=35781.34857e3,
        intermediate_altitude=100000e3,
        plane_change=0.0,
    )
    assert transfer.error == ""
    assert transfer.results["hohmann_total"] == pytest.approx(3935.224, rel=2e-5)
    assert transfer.results["best_split"] == 0.0


def test_transfer_compute_matches_numeric_layer():
    from deltakit.transfers import best_plane_change_split

    values = {
        "body": "Earth",
        "initial_altitude": 7000e3 - EARTH.radius,
        "final_altitude": 105000e3 - EARTH.radius,
        "intermediate_altitude": 210000e3 - EARTH.radius,
        "plane_change": 20 * deg,
    }
    r = dk.widgets.TransferTrade.compute(values).results
    assert r["initial_radius"] == pytest.approx(7000e3, rel=1e-15)
    assert r["hohmann_total"] == pytest.approx(float(dk.hohmann(7000e3, 105000e3, EARTH.mu).total), rel=1e-12)
    b = dk.bielliptic(7000e3, 105000e3, 210000e3, EARTH.mu)
    assert r["bielliptic_total"] == pytest.approx(float(b.total), rel=1e-12)
    assert r["best_split"] == pytest.approx(
        float(best_plane_change_split(7000e3, 105000e3, EARTH.mu, 20 * deg))
    )
    # past the published ratio 15.58 every bi-elliptic beats Hohmann (Vallado, 4th ed., Sec. 6.3.2)
    assert r["radius_ratio"] == pytest.approx(15.0) and r["bielliptic_saving"] > 0.0


def test_transfer_artists_show_compute(transfer):
    transfer.set(body="Earth", r1=7000e3, r2=105000e3, rb=210000e3, plane_change=20 * deg)  # older names
    v = transfer.values
    assert v["initial_altitude"] == pytest.approx(7000e3 - EARTH.radius)
    computed = dk.widgets.TransferTrade.compute(v)
    np.testing.assert_array_equal(transfer._split_curve.get_ydata(), computed.drawing["split"])
    assert transfer._ratio_now.get_xdata()[0] == pytest.approx(15.0)
    hx, hy = transfer._transfer.hohmann.get_data()  # the drawn Hohmann arc ends on the final orbit
    assert math.hypot(hx[-1], hy[-1]) == pytest.approx(105000.0)


def test_transfer_takes_altitudes_like_the_other_panels():
    by_altitude = dk.widgets.TransferTrade(
        initial_altitude=300 * km, final_altitude=35_786 * km, plane_change=0.0
    )
    by_radius = dk.widgets.TransferTrade(
        r1=EARTH.radius + 300 * km, r2=EARTH.radius + 35_786 * km, plane_change=0.0
    )
    assert by_radius.values == by_altitude.values
    assert "altitude (km)" in by_altitude.controls["initial_altitude"].description
    # the v1 export (radii) still restores
    old = {"body": "Earth", "r1": 7000e3, "r2": 42164e3, "rb": 90000e3, "plane_change": 0.0}
    by_altitude.set(**old)
    assert by_altitude.results["final_radius"] == pytest.approx(42164e3)


def test_transfer_plane_change_follows_a_new_case(transfer):
    """The demo's 28.5 deg belong to its Earth case; another body or orbit starts coplanar."""
    assert transfer.values["plane_change"] == pytest.approx(28.5 * deg)
    transfer.set(body="Mars", initial_altitude=400e3, final_altitude=20_000e3, intermediate_altitude=40_000e3)
    assert transfer.values["plane_change"] == 0.0
    assert "28.5 deg belonged to" in transfer.readouts.value
    transfer.set(plane_change=10 * deg)  # the analyst's own choice stays
    transfer.set(body="Venus")
    assert transfer.values["plane_change"] == pytest.approx(10 * deg)
    assert dk.widgets.TransferTrade(body="Mars").values["plane_change"] == 0.0
    own = dk.widgets.TransferTrade(plane_change=5 * deg)
    own.controls["body"].value = "Mars"  # as in the browser
    assert own.values["plane_change"] == pytest.approx(5 * deg)
    demo = dk.widgets.TransferTrade()
    demo.controls["final_altitude"].value = 50_000.0  # km, typed in the box
    assert demo.values["plane_change"] == 0.0 and demo.error == ""


def test_transfer_bielliptic_needs_high_intermediate_altitude(transfer):
    transfer.set(
        initial_altitude=600e3, final_altitude=35_786e3, intermediate_altitude=20_000e3, plane_change=0.0
    )
    assert transfer.error == ""
    assert math.isnan(transfer.results["bielliptic_total"])
    assert "No bi-elliptic transfer" in transfer.readouts.value
    assert transfer.export()["results"]["bielliptic_total"] is None
    json.dumps(transfer.export(), allow_nan=False)


def test_transfer_invalid_altitude_below_surface(transfer):
    results = transfer.results
    transfer.set(initial_altitude=-100e3)
    assert "below the surface of Earth" in transfer.error and transfer.results == results
    transfer.set(initial_altitude=500e3)
    assert transfer.error == ""


def test_transfer_common_contract(transfer, artifacts):
    transfer.figure.savefig(artifacts / "transfer_trade.png", dpi=100)
    check_common(transfer)


# ---------------------------------------------------------------------- EscapeFlyby
@pytest.fixture
def escape():
    return dk.widgets.EscapeFlyby()


def test_escape_compute_matches_numeric_layer(escape):
    v = escape.values
    body = BODIES[v["body"]]
    rp, ra = body.radius + v["periapsis_altitude"], body.radius + v["apoapsis_altitude"]
    r = dk.widgets.EscapeFlyby.compute(v).results
    assert r["dv_periapsis"] == pytest.approx(float(dk.escape_burn(rp, v["vinf"], body.mu, ra)), rel=1e-12)
    assert r["dv_far"] == pytest.approx(float(dk.escape_burn(rp, 0.0, body.mu, ra)) + v["vinf"], rel=1e-12)
    flyby = dk.powered_flyby(v["vinf"], body.radius + v["flyby_altitude"], v["flyby_dv"], body.mu)
    assert r["gain"] == pytest.approx(float(flyby.gain), rel=1e-12)
    assert r["deflection"] == pytest.approx(float(flyby.deflection), rel=1e-12)
    _, y = escape._flyby_now.get_data()
    assert y[0] == pytest.approx(float(flyby.gain))
    check_common(escape)


def test_escape_from_circle_with_zero_excess_is_root_two_minus_one(escape):
    # escape from a circular orbit costs (sqrt(2) - 1) v_circ (common practice)
    escape.set(body="Earth", periapsis_altitude=400e3, apoapsis_altitude=400e3, vinf=0.0)
    v_circ = float(dk.circular_speed(EARTH.radius + 400e3, EARTH.mu))
    assert escape.results["dv_periapsis"] == pytest.approx((math.sqrt(2) - 1) * v_circ, rel=1e-12)
    assert escape.results["saving"] == pytest.approx(0.0, abs=1e-9)
    escape.set(vinf=3000.0)
    assert escape.results["saving"] > 0.0  # burning deep in the well always saves


def test_escape_flyby_curves_and_legend_follow_the_burn(escape):
    escape.set(flyby_dv=600.0)
    computed = dk.widgets.EscapeFlyby.compute(escape.values)
    for (_, line), gain in zip(escape._gain_curves, computed.drawing["gains"]):
        np.testing.assert_array_equal(line.get_ydata(), gain)
    assert [t.get_text() for t in escape._flyby_legend.get_texts()] == [
        "half this burn",
        "this burn",
        "twice this burn",
    ]  # names that hold whatever the burn: the legend is never redrawn by the burn slider


@pytest.mark.parametrize(
    "bad, words",
    [
        ({"periapsis_altitude": -10e3}, "below the surface"),
        ({"apoapsis_altitude": 1e3}, "below the periapsis"),
        ({"flyby_altitude": -5e3}, "flyby periapsis"),
    ],
)
def test_escape_invalid_input(escape, bad, words):
    results = escape.results
    escape.set(**bad)
    assert words in escape.error and escape.results == results


def test_escape_figure_saved(escape, artifacts):
    escape.figure.savefig(artifacts / "escape_flyby.png", dpi=100)


# ---------------------------------------------------------------------- BudgetBuilder
@pytest.fixture
def builder():
    return dk.widgets.BudgetBuilder()


def budget_by_hand(values):
    from deltakit.widgets._formulas import evaluate

    budget = dk.Budget(
        values["m0"], values["isp"] * 9.80665, values["name"], dry_mass=values["dry_mass"] or None
    )
    for line in values["lines"]:
        ve = None if line["isp"] is None else line["isp"] * 9.80665
        budget.add(line["label"], evaluate(line["formula"], line["params"]), ve=ve, margin=line["margin"])
    return budget


def test_builder_default_matches_budget(builder):
    budget = budget_by_hand(builder.values)
    r = builder.results
    assert builder.error == ""
    assert r["total_dv"] == pytest.approx(float(budget.total_dv), rel=1e-12)
    assert r["final_mass"] == pytest.approx(float(budget.final_mass), rel=1e-12)
    np.testing.assert_allclose([b.get_height() for b in builder._waterfall.remaining][1:], budget.mass_after)
    assert builder.export_text.value == builder.budget.to_markdown()
    assert "formula capture" in builder.export_text.value  # the table says where a line's delta-v came from
    check_common(builder)


def test_builder_model_is_a_budget(builder):
    """The panel's lines live in one Budget (no second model): edits go through its methods."""
    assert isinstance(builder.budget, dk.Budget)
    assert [line.label for line in builder.budget.lines] == [x["label"] for x in builder.values["lines"]]
    capture = next(i for i, x in enumerate(builder.values["lines"]) if x["formula"] == "capture_burn")
    line = builder.budget.lines[capture]
    assert line.source["formula"] == "capture_burn"  # the formula travels with the line
    rp = MOON.radius + line.source["params"]["periapsis_altitude"]
    assert line.dv == pytest.approx(float(dk.capture_burn(rp, line.source["params"]["vinf"], MOON.mu)))


def test_builder_editor_add_update_move_remove(builder):
    n = len(builder.values["lines"])
    builder.form["label"].value = "apoapsis raise"
    builder.form["formula"].value = "hohmann"
    fields = builder._param_widgets["hohmann"]
    fields["body"].value = "Earth"
    fields["r1"].value = 7000.0
    fields["r2"].value = 9000.0
    builder.form["margin"].value = 10.0  # percent, as the label says
    builder.buttons["add"].click()
    lines = builder.values["lines"]
    assert len(lines) == n + 1 and lines[-1]["label"] == "apoapsis raise"
    assert lines[-1]["params"]["r2"] == pytest.approx(9000e3)
    assert builder.budget.lines[-1].dv == pytest.approx(float(dk.hohmann(7000e3, 9000e3, EARTH.mu).total))
    assert builder.budget.lines[-1].margin == pytest.approx(0.1)  # the budget holds the fraction
    assert "margin (%" in builder.form["margin"].description
    assert builder.controls["lines"].value == n  # the new line is selected
    builder.buttons["up"].click()
    assert builder.values["lines"][n - 1]["label"] == "apoapsis raise"
    builder.form["label"].value = "apoapsis raise, revised"
    builder.buttons["update"].click()
    assert builder.values["lines"][n - 1]["label"] == "apoapsis raise, revised"
    builder.buttons["remove"].click()
    assert [x["label"] for x in builder.values["lines"]] == [x["label"] for x in lines[:-1]]
    assert len(builder._waterfall.remaining) == n + 1


def test_builder_editor_refuses_bad_line_without_raising(builder):
    lines = builder.values["lines"]
    builder.form["formula"].value = "bielliptic"
    fields = builder._param_widgets["bielliptic"]
    fields["r1"].value, fields["r2"].value, fields["rb"].value = 7000.0, 42164.0, 20000.0  # rb below r2
    builder.buttons["add"].click()
    assert "no solution" in builder.error
    assert builder.values["lines"] == lines
    builder.form["formula"].value = "number"
    builder.form["margin"].value = 500.0  # 500 %: more than the line itself
    builder.buttons["add"].click()
    assert "between 0 and 100 %" in builder.error
    assert builder.values["lines"] == lines


def test_builder_margin_above_one_is_refused_from_code(builder):
    lines = builder.values["lines"]
    builder.set(lines=[{**lines[0], "margin": 5.0}])  # 500 %: the API takes a fraction
    assert "margin 500 % must be between 0 and 100 %" in builder.error
    assert builder.values["lines"] == lines


def test_builder_save_load_round_trip(builder, tmp_path):
    path = tmp_path / "halyard.json"
    builder.set(path=str(path))
    builder.file_buttons["save"].click()
    assert builder.error == "" and path.exists()
    assert dk.Budget.load(path) == builder.budget  # the file is the panel's budget
    fresh = dk.widgets.BudgetBuilder(lines=[], m0=100.0, isp=200.0, dry_mass=0.0, path=str(path))
    fresh.file_buttons["load"].click()
    assert fresh.error == ""
    mine, theirs = builder.values, fresh.values
    mine.pop("path"), theirs.pop("path")
    assert theirs == mine
    assert fresh.results == builder.results


def test_builder_refuses_corrupt_file_and_leaves_it(builder, tmp_path):
    path = tmp_path / "notes.json"
    path.write_text('{"format": "someone else", "data": [1, 2')
    builder.set(path=str(path))
    values = builder.values
    builder.file_buttons["load"].click()
    assert "load failed" in builder.error
    assert builder.values == values
    builder.file_buttons["save"].click()  # must not overwrite a foreign file
    assert "save failed" in builder.error
    assert path.read_text() == '{"format": "someone else", "data": [1, 2'


def test_builder_exports_and_downloads(builder):
    import base64

    for kind, method in (("Markdown", "to_markdown"), ("LaTeX", "to_latex")):
        builder.export_format.value = kind
        expected = getattr(builder.budget, method)()
        assert builder.export_text.value == expected
        encoded = builder.export_link.value.split("base64,", 1)[1].split('"', 1)[0]
        assert base64.b64decode(encoded).decode() == expected
    builder.export_format.value = "CSV"
    assert builder.export_text.value.splitlines()[0].count(",") >= 5
    # "Halyard: Earth orbit ..." gives single dashes, never "--"
    assert 'download="Halyard-Earth-orbit-to-low-lunar-orbit.csv"' in builder.export_link.value


def test_builder_invalid_masses(builder):
    results = builder.results
    builder.set(dry_mass=99999.0)
    assert "dry mass" in builder.error and builder.results == results
    builder.set(dry_mass=1450.0)
    assert builder.error == ""


def test_builder_infeasible_budget_says_so(builder):
    builder.set(dry_mass=3000.0)
    assert builder.error == ""
    assert "does not close" in builder.readouts.value
    assert builder.export()["results"]["final_mass"] is None


def test_builder_figure_saved(builder, artifacts):
    builder.figure.savefig(artifacts / "budget_builder.png", dpi=100)


# ---------------------------------------------------------------------- FormulaSheet
@pytest.fixture(scope="module")
def sheet():
    pytest.importorskip("sympy")
    return dk.widgets.FormulaSheet()


def test_sheet_shows_derivation(sheet):
    from deltakit.symbolic import derive

    sheet.set(derivation="hohmann", steps=True)
    d = derive("hohmann")
    shown = html.unescape(sheet.sheet.value)
    assert d.title in shown
    assert d.result_tex() in shown
    for assumption in d.assumptions[:1]:
        assert assumption.split("$")[0][:30] in shown
    assert sheet.latex_text.value == d.latex(steps=True)
    assert sheet.markdown_text.value == d.markdown()
    assert 'download="hohmann.tex"' in sheet.downloads.value
    sheet.set(steps=False)
    assert sheet.latex_text.value == d.latex(steps=False)
    assert "<ol>" not in sheet.sheet.value
    assert sheet.figure is None


def test_sheet_contract(sheet):
    sheet.set(derivation="rocket_equation", steps=True)
    check_common(sheet)


def test_sheet_refuses_unknown_derivation():
    pytest.importorskip("sympy")
    with pytest.raises(dk.DomainError, match="`derivation` must be one of"):
        dk.widgets.FormulaSheet(derivation="warp drive")


# ---------------------------------------------------------------------- constructor = set()
@pytest.mark.parametrize(
    "panel_name, bad, words",
    [
        ("BurnPointExplorer", {"dv": -1097.0}, "delta-v must be >= 0 m/s, got -1097 m/s"),
        ("BurnPointExplorer", {"apoapsis_altitude": 100e3}, "below the periapsis altitude"),
        ("PropellantTrade", {"dry_mass": -5.0}, "dry mass must be > 0 kg"),
        ("TransferTrade", {"final_altitude": -3e3}, "final orbit altitude -3 km is below the surface"),
        ("EscapeFlyby", {"vinf": -100.0}, "excess speed must be >= 0 km/s"),
        (
            "PlaneChangeExplorer",
            {"target_inc": 190 * deg},
            "target inclination must be between 0 and 180 deg",
        ),
        ("BudgetBuilder", {"m0": -1.0}, "starting mass must be > 0 kg"),
        ("DispersionView", {"samples": 50.0}, "number of samples must be between 100"),
    ],
)
def test_constructor_checks_like_set(panel_name, bad, words):
    """A constructor argument the panel cannot show raises the message set() shows, never a silent clamp."""
    cls = getattr(dk.widgets, panel_name)
    with pytest.raises(dk.DomainError, match=words):
        cls(**bad)
    panel = cls()
    panel.set(**bad)
    assert words in panel.error


@pytest.mark.parametrize("panel_name", SLIDER_PANELS)
def test_constructor_value_beyond_a_slider_widens_it(panel_name):
    cls = getattr(dk.widgets, panel_name)
    name, far = {
        "BurnPointExplorer": ("dv", 2600.0),
        "PropellantTrade": ("speed", 25_000.0),
        "TransferTrade": ("plane_change", 0.0),
        "EscapeFlyby": ("flyby_dv", 4000.0),
        "PlaneChangeExplorer": ("target_raan", 400 * deg),  # a node past a full turn: the same plane
        "DispersionView": ("isp_spread", 12.0),
        "LaunchDatePicker": ("arrival", 947_548_800.0),  # 2030-01-10 12:00 TDB: the arrival range widens
    }[panel_name]
    panel = cls(**{name: far})
    assert panel.values[name] == pytest.approx(far) and panel.error == ""
    assert panel.controls[name].max >= panel.controls[name].value


# ---------------------------------------------------------------------- sliders hold what the browser shows
# The browser's slider (noUiSlider in ipywidgets 8) snaps any value to min + k * step
# and sends the snapped value back (seen in tests/test_browser.py), so a panel must
# never give a slider an off-grid value: it would change its own input once shown.


def _sliders(panel):
    import ipywidgets as widgets

    return {
        name: w
        for name, w in panel.controls.items()
        if isinstance(w, (widgets.FloatSlider, widgets.IntSlider))
    }


def _on_grid(value, low, step):
    k = (value - low) / step
    return abs(k - round(k)) < 1e-9


@pytest.mark.parametrize("panel_name", PANEL_NAMES)
def test_default_slider_values_lie_on_their_step_grid(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    for name, w in _sliders(panel).items():
        assert _on_grid(w.value, w.min, w.step), f"{panel_name}.{name} = {w.value} is off its {w.step} step"
        assert _on_grid(w.max, w.min, w.step), f"{panel_name}.{name} max = {w.max} is off its {w.step} step"
    assert panel.adjusted == {}


@pytest.mark.parametrize("panel_name", SLIDER_PANELS)
def test_off_step_value_from_code_is_snapped_and_said(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    assert _sliders(panel), f"{panel_name} has no slider"
    for name, w in _sliders(panel).items():
        scale = panel._scales[name]
        low, step = w.min, w.step
        target = w.value + step if w.value + step <= w.max else w.value - step
        asked = target + 0.3 * step  # display units, 30 % of a step past a grid value
        panel.set(**{name: asked * scale})
        assert w.value == pytest.approx(target, abs=1e-9 * step)
        assert _on_grid(w.value, low, step)
        assert panel.values[name] == pytest.approx(target * scale, rel=1e-9, abs=1e-12)
        assert name in panel.adjusted and w.description in panel.adjusted[name]
        assert w.description in html.unescape(panel.readouts.value)  # the analyst sees the change
        panel.set(**{name: target * scale})  # on the grid: nothing to say
        assert name not in panel.adjusted and panel.error == ""


@pytest.mark.parametrize("panel_name", SLIDER_PANELS)
def test_value_beyond_slider_range_widens_it_by_whole_steps(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    for name, w in _sliders(panel).items():
        far = w.max + 7.5 * w.step  # half a step off the grid, beyond the right end
        values = panel.values
        panel.set(**{name: far * panel._scales[name]})
        if panel.error:  # beyond what the panel can show (a plane change past 180 deg): nothing changed
            assert panel.values == values
            continue
        assert w.max >= w.value and _on_grid(w.max, w.min, w.step) and _on_grid(w.value, w.min, w.step)
        assert abs(w.value - far) <= 0.5 * w.step + 1e-9


def test_browser_echo_of_the_same_slider_value_does_not_recompute(explorer, monkeypatch):
    calls = []
    original = type(explorer).compute
    monkeypatch.setattr(
        type(explorer), "compute", classmethod(lambda cls, v: (calls.append(1), original(v))[1])
    )
    nu = explorer.controls["nu"]
    nu.value = nu.value + 1e-13  # what float arithmetic in the browser may send back for the same step
    assert calls == []
    nu.value = nu.value + nu.step
    assert calls == [1]


def test_mirrored_number_boxes_show_few_digits(trade):
    # the box that follows the other input shows 0.1 m/s and 4 decimals of the ratio, not 9 digits
    assert trade.controls["exhaust_velocity"].value == round(trade.controls["exhaust_velocity"].value, 4)
    assert trade.controls["mass_ratio"].value == round(trade.controls["mass_ratio"].value, 4)
    assert trade.results["exhaust_velocity"] == pytest.approx(trade.values["isp"] * 9.80665, rel=1e-12)


# ---------------------------------------------------------------------- no text over text
def _text_boxes(fig):
    """(name, window bbox, rotation) of every drawn text, tick label and legend of a figure."""
    from matplotlib.axis import Axis
    from matplotlib.legend import Legend
    from matplotlib.text import Text

    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    legends = [legend for legend in fig.findobj(Legend) if legend.get_visible()]
    skip = {id(t) for legend in legends for t in [*legend.get_texts(), legend.get_title()]}
    found = []
    for axis in fig.findobj(Axis):
        ticks = axis.get_major_ticks() + axis.get_minor_ticks()
        skip |= {id(t) for tick in ticks for t in (tick.label1, tick.label2)}
        if not (axis.get_visible() and axis.axes.get_visible()):
            continue
        for tick in axis._update_ticks():  # only the ticks inside the view are drawn
            found += [
                (f"tick {t.get_text()!r}", t.get_window_extent(renderer), t.get_rotation())
                for t in (tick.label1, tick.label2)
                if t.get_visible() and t.get_text().strip()
            ]
    for t in fig.findobj(Text):
        if id(t) not in skip and t.get_visible() and t.get_text().strip():
            found.append((f"text {t.get_text()!r}", t.get_window_extent(renderer), t.get_rotation()))
    found += [
        (f"legend {[t.get_text() for t in legend.get_texts()][:2]}", legend.get_window_extent(renderer), 0)
        for legend in legends
    ]
    return found


def _overlapping_text(fig):
    import itertools

    clashes = []
    for (a, box_a, rot_a), (b, box_b, rot_b) in itertools.combinations(_text_boxes(fig), 2):
        if rot_a % 90 and rot_b % 90:
            continue  # the upright boxes of two slanted labels overlap without their letters doing so
        width = min(box_a.x1, box_b.x1) - max(box_a.x0, box_b.x0)
        height = min(box_a.y1, box_b.y1) - max(box_a.y0, box_b.y0)
        if width > 1 and height > 1:
            clashes.append((a, b))
    return clashes


@pytest.mark.parametrize("panel_name", SLIDER_PANELS + ["BudgetBuilder"])
def test_panel_figure_has_no_overlapping_text(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    assert _text_boxes(panel.figure), "no text found: the check would pass on anything"
    assert _overlapping_text(panel.figure) == []


def test_overlap_check_sees_overlapping_text():
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(4, 3))
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.text(0.5, 0.5, "break-even 15.58")
    ax.text(0.52, 0.5, "this r2/r1")
    assert len(_overlapping_text(fig)) == 1


@pytest.mark.parametrize("ratio", [11.94, 15.58, 17.7])
def test_transfer_break_even_values_sit_above_the_moving_line(transfer, ratio):
    # the "this r2/r1" line is clipped to the axes; the values above the frame can never be crossed
    r1 = transfer.results["initial_radius"]
    transfer.set(final_altitude=r1 * ratio - EARTH.radius)
    transfer.figure.canvas.draw()
    renderer = transfer.figure.canvas.get_renderer()
    top = transfer.ratio_axes.get_window_extent(renderer).y1
    values = [t for t in transfer.ratio_axes.texts if t.get_text() in ("11.94", "15.58")]
    assert len(values) == 2
    assert all(t.get_window_extent(renderer).y0 >= top for t in values)
    assert _overlapping_text(transfer.figure) == []
