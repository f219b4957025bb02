"""LaunchDatePicker: the date-choosing panel against the numeric layer and the trade's known windows.

The panel's readouts must be :func:`deltakit.transfer_pair` at the chosen
dates, its map :func:`deltakit.transfer_map` on its grid, a click must move
the dates, and the budget button must book the readouts' burns. The shared
panel contract (all-or-nothing ``set``, absurd input, closing, blitting) is
checked for every registered panel in test_panel_stress.py and
test_panel_redraw.py.
"""

from __future__ import annotations

import datetime as dt
import html
import io
import json
import re

import numpy as np
import pytest

pytest.importorskip("jplephem")

import deltakit as dk
from deltakit.constants import EARTH, G0, MARS
from deltakit.units import day, km2_per_s2
from deltakit.widgets import LaunchDatePicker
from deltakit.widgets._format import fmt
from deltakit.widgets.launch_dates import GRID


def noon(date: str) -> float:
    """TDB seconds past J2000 of a calendar day at 12:00 TDB, as the panel holds dates."""
    return (dt.date.fromisoformat(date) - dt.date(2000, 1, 1)).days * day


@pytest.fixture(scope="module")
def panel():
    panel = LaunchDatePicker()
    yield panel
    panel.close()


def decode(data: bytes) -> np.ndarray:
    from PIL import Image

    return np.asarray(Image.open(io.BytesIO(data)).convert("RGBA"))


def _pair_of(values):
    """transfer_pair for a panel's values, called as a user would (dates as TDB seconds)."""
    return dk.transfer_pair(
        values["origin"],
        values["target"],
        values["departure"],
        values["arrival"],
        parking=EARTH.radius + values["parking_altitude"],
        arrival_orbit=(
            MARS.radius + values["arrival_periapsis_altitude"],
            MARS.radius + values["arrival_apoapsis_altitude"],
        ),
        vehicle=(values["wet_mass"], values["isp"] * G0, values["propellant"]),
    )


def _click(panel, x, y, axes=None):
    """A left click at data point (x, y) of ``axes`` (the map), as the browser's canvas sends it."""
    from matplotlib.backend_bases import MouseEvent

    axes = axes or panel.axes
    px, py = axes.transData.transform((x, y))
    MouseEvent("button_press_event", panel.figure.canvas, px, py, button=1)._process()


def _axis_day(seconds):
    return 10957.5 + seconds / day  # matplotlib's date number of 2000-01-01T12:00 is 10957.5


# ---------------------------------------------------------------------- against the numeric layer
@pytest.mark.parametrize(
    "departure, arrival",
    [("2028-11-10", "2029-08-20"), ("2028-10-02", "2029-07-01"), ("2028-12-30", "2029-11-30")],
)
def test_readouts_are_transfer_pair_at_the_chosen_dates(panel, departure, arrival):
    panel.set(departure=departure, arrival=arrival)
    assert panel.error == ""
    values = panel.values
    assert values["departure"] == noon(departure) and values["arrival"] == noon(arrival)
    pair = _pair_of(values)
    r = panel.results
    for key in (
        "c3",
        "departure_vinf",
        "departure_declination",
        "arrival_vinf",
        "time_of_flight",
        "escape_dv",
        "capture_dv",
        "total_dv",
        "propellant",
    ):
        assert r[key] == float(getattr(pair, key)), key  # the same function on the same numbers
    assert r["propellant_left"] == values["propellant"] - float(pair.propellant)
    assert r["affordable"] == bool(pair.affordable)
    assert panel.pair.departure.astype("datetime64[D]") == np.datetime64(departure)
    shown = html.unescape(re.sub(r"<[^>]+>", " ", panel.readouts.value))
    assert f"departure C3 {fmt(float(pair.c3), km2_per_s2, 'km²/s²')}" in " ".join(shown.split())
    assert departure in shown and arrival in shown


def test_map_is_transfer_map_on_its_grid(panel):
    computed = LaunchDatePicker.compute(panel.values)
    window = computed.drawing["map"]
    assert window.c3.shape == (GRID, GRID)  # the default ranges are longer than GRID days
    values = panel.values
    ds = dk.transfer_map(
        "Earth",
        "Mars",
        window.departures,
        window.arrivals,
        parking=EARTH.radius + values["parking_altitude"],
        arrival_orbit=(
            MARS.radius + values["arrival_periapsis_altitude"],
            MARS.radius + values["arrival_apoapsis_altitude"],
        ),
        vehicle=(values["wet_mass"], values["isp"] * G0, values["propellant"]),
    )
    np.testing.assert_allclose(window.c3, ds["c3"].values, rtol=1e-12)
    np.testing.assert_allclose(window.total_dv, ds["total_dv"].values, rtol=1e-12)
    np.testing.assert_array_equal(window.affordable, ds["affordable"].values)
    assert (
        window.departures[0] == values["departure_first"]
        and window.departures[-1] == values["departure_last"]
    )
    assert np.all(np.diff(window.departures) % day == 0)  # whole days: slider positions


def test_default_pair_is_the_cheapest_of_the_map():
    panel = LaunchDatePicker()
    window = LaunchDatePicker.compute(panel.values).drawing["map"]
    assert panel.results["total_dv"] == pytest.approx(np.nanmin(window.total_dv), rel=1e-12)
    assert panel.results["affordable"] and panel.results["affordable_pairs"] > 0
    assert panel.adjusted == {} and panel.error == ""
    panel.close()


# ---------------------------------------------------------------------- facts of the trade
def test_the_2018_window_gives_the_published_departure_energy():
    """The 2018 Earth-Mars opportunity, read from the panel's own map and at a flown pair of dates."""
    panel = LaunchDatePicker(
        departure_first="2018-03-15",
        departure_last="2018-07-15",
        arrival_first="2018-09-15",
        arrival_last="2019-06-01",
        departure="2018-05-05",
        arrival="2018-11-26",
    )
    assert panel.error == ""
    window = LaunchDatePicker.compute(panel.values).drawing["map"]
    type_one = np.where(
        window.time_of_flight < 250 * day, window.c3, np.nan
    )  # the short, type-I transfers of that year
    # Same source as tests/test_windows.py: the least type-I C3 of 2018 is about 7.7 km^2/s^2
    # (an independent computation, from memory); a 40 x 40 map lands within a few tenths.
    assert 7.0 < np.nanmin(type_one) / km2_per_s2 < 8.5
    # The InSight lander left Earth on 2018-05-05 and reached Mars on 2018-11-26 (dates from
    # memory); its departure energy lies in the 7-20 km^2/s^2 band of Earth-Mars windows (common
    # practice) and near the map's least, the flight 205 days.
    assert 7.0 < panel.results["c3"] / km2_per_s2 < 20.0
    assert panel.results["c3"] < 1.5 * np.nanmin(type_one)
    assert round(panel.results["time_of_flight"] / day) == 205
    assert panel.results["transfer_angle"] < np.pi
    panel.close()


# ---------------------------------------------------------------------- clicks
def test_a_click_on_the_map_moves_both_dates(panel):
    panel.set(departure="2028-11-10", arrival="2029-08-20")
    target = (noon("2028-10-15"), noon("2029-09-30"))
    view = panel.view
    draws = view.full_draws
    _click(panel, _axis_day(target[0]) + 0.2, _axis_day(target[1]) - 0.3)  # a little off: the nearest day
    assert panel.error == ""
    assert (panel.values["departure"], panel.values["arrival"]) == target
    assert panel.controls["departure"].value == target[0] / day  # the sliders follow the click
    assert panel.results["c3"] == float(_pair_of(panel.values).c3)
    assert view.full_draws == draws  # the marker moved by blitting


def test_a_click_outside_the_map_changes_nothing(panel):
    before = panel.values
    colorbar = panel._colorbar.ax
    _click(panel, 0.5, 10.0, axes=colorbar)  # on the colour bar
    from matplotlib.backend_bases import MouseEvent

    MouseEvent("button_press_event", panel.figure.canvas, 2, 2, button=1)._process()  # the corner
    assert panel.values == before and panel.error == ""


def test_a_click_where_no_transfer_exists_is_refused_with_a_message():
    panel = LaunchDatePicker(arrival_first="2028-10-01")  # arrivals before some departures
    before = panel.values
    _click(panel, _axis_day(noon("2029-01-01")), _axis_day(noon("2028-10-20")))
    assert "is not after the departure" in panel.error
    assert panel.values == before
    panel.close()


# ---------------------------------------------------------------------- what follows what
def test_a_new_window_moves_the_dates_to_its_cheapest_pair():
    panel = LaunchDatePicker()
    panel.set(
        departure_first="2026-09-01",
        departure_last="2027-01-01",
        arrival_first="2027-05-01",
        arrival_last="2027-12-01",
    )
    assert panel.error == ""
    window = LaunchDatePicker.compute(panel.values).drawing["map"]
    assert panel.results["total_dv"] == pytest.approx(np.nanmin(window.total_dv), rel=1e-12)
    assert "cheapest pair" in panel.adjusted["departure"]
    assert panel.controls["departure"].min == noon("2026-09-01") / day
    assert panel.controls["departure"].max == noon("2027-01-01") / day
    panel.close()


def test_a_date_beyond_its_range_widens_the_range_and_the_map():
    panel = LaunchDatePicker()
    panel.set(departure="2029-02-01")
    assert panel.error == ""
    assert panel.values["departure_last"] == noon("2029-02-01") == panel.values["departure"]
    assert "departure" in panel.adjusted["departure_last"]
    assert panel.controls["departure_last"].value == dt.date(2029, 2, 1)
    panel.close()


def test_picking_the_target_as_origin_swaps_the_two(panel):
    panel.set(origin="Mars")
    assert panel.error == "" and panel.values["target"] == "Earth"
    assert "differ" in panel.adjusted["target"]
    panel.set(origin="Earth", target="Mars")
    assert panel.error == ""


@pytest.mark.parametrize(
    "bad, words, control",
    [
        ({"target": "Earth"}, "origin and target must differ", "target"),
        ({"departure_last": "2028-09-01"}, "must come after the first departure date", "departure_last"),
        ({"arrival_first": "1890-01-01"}, "outside the ephemeris", "arrival_first"),
        ({"propellant": 9000.0}, "below the wet mass", "propellant"),
        ({"arrival_apoapsis_altitude": 100e3}, "below the arrival periapsis altitude", "apoapsis"),
        ({"parking_altitude": 0.0}, "above the surface of Earth", "parking"),
        ({"departure": "2028-12-01", "departure_first": "2028-12-10"}, "lies outside the map's", "departure"),
        ({"arrival_first": "2028-01-01", "arrival_last": "2028-03-01"}, "no transfer on this map", "arrival"),
    ],
)
def test_invalid_input_shows_a_message_and_keeps_the_view(panel, bad, words, control):
    before = panel.values, panel.results
    panel.set(**bad)
    assert words in panel.error and control.split("_")[0] in panel.error
    assert (panel.values, panel.results) == before


def test_dates_are_tdb_seconds_and_an_export_restores_the_panel(panel):
    panel.set(departure="2028-11-01", arrival=np.datetime64("2029-09-01"), contours="total delta-v")
    exported = json.loads(json.dumps(panel.export()))
    assert exported["values"]["departure"] == noon("2028-11-01")
    other = LaunchDatePicker(arrival_last="2030-01-01")
    other.set(**exported["values"])
    assert other.export() == exported
    other.close()
    panel.set(departure=noon("2028-11-01") + 5 * 3600.0)  # five hours past noon: snapped to the day
    assert panel.values["departure"] == noon("2028-11-01")
    assert "2028-11-01" in panel.adjusted["departure"]
    panel.set(contours="C3")


# ---------------------------------------------------------------------- the map is computed once
def test_slider_steps_reuse_the_map_and_only_blit(panel):
    from deltakit.widgets.launch_dates import _window_map

    panel.set(departure="2028-11-10", arrival="2029-08-20")
    misses = _window_map.cache_info().misses
    view = panel.view
    draws = view.full_draws
    slider = panel.controls["departure"]
    for _ in range(5):
        slider.value = slider.value + 1
    assert panel.error == "" and panel.values["departure"] == noon("2028-11-15")
    assert _window_map.cache_info().misses == misses  # no map computed for the five steps
    assert view.full_draws == draws  # and none drawn: the marker moved by blitting
    wet_mass = panel.values["wet_mass"]
    panel.set(wet_mass=8000.0)  # a new tank: a new map, the same fill: only the affordable region moves
    assert _window_map.cache_info().misses == misses + 1 and view.full_draws == draws
    picture = decode(view.widget.value)
    view.invalidate()
    view.refresh()  # the long way round: the same picture
    np.testing.assert_array_equal(picture, decode(view.widget.value))
    panel.set(contours="total delta-v")  # another field: drawn anew
    assert view.full_draws > draws + 1
    panel.set(wet_mass=wet_mass, contours="C3")


def test_the_hatched_region_is_the_pairs_the_tank_affords(panel):
    # the region's outline comes from contourpy directly (as matplotlib's contourf would draw it):
    # every pair of the grid deep inside the affordable set is inside it, every pair deep outside
    # is outside, for tanks from small to large
    from scipy.ndimage import binary_erosion

    from deltakit.widgets.launch_dates import _AXIS_J2000, _window_map

    first = panel.values["wet_mass"]
    for wet_mass in (0.9 * first, 0.95 * first, first):  # from a wide region to a small one
        panel.set(wet_mass=wet_mass)
        window = _window_map(panel._case)
        x = _AXIS_J2000 + window.departures / 86400.0
        y = _AXIS_J2000 + window.arrivals / 86400.0
        X, Y = np.meshgrid(x, y, indexing="ij")
        points = np.column_stack([X.ravel(), Y.ravel()])
        inside = panel._hatch.get_path().contains_points(points).reshape(X.shape)
        mask = window.affordable
        assert mask.any() and (~mask).any(), wet_mass
        deep_in, deep_out = binary_erosion(mask), binary_erosion(~mask)
        assert inside[deep_in].all() and not inside[deep_out].any(), wet_mass
    panel.set(wet_mass=first)


# ---------------------------------------------------------------------- budgets
def test_the_button_books_the_readouts_burns(panel):
    panel.set(departure="2028-11-10", arrival="2029-08-20")
    panel.budget_buttons["clear"].click()
    panel.budget_buttons["add"].click()
    budget = panel.budget
    assert [line.label for line in budget.lines] == ["Earth departure 2028-11-10", "Mars arrival 2029-08-20"]
    assert budget.lines[0].dv == panel.results["escape_dv"]
    assert budget.lines[1].dv == panel.results["capture_dv"]
    values = panel.values
    assert budget.m0 == values["wet_mass"] and budget.dry_mass == values["wet_mass"] - values["propellant"]
    assert float(budget.propellant) == pytest.approx(panel.results["propellant"], rel=1e-12)
    assert "2 lines" in panel.budget_status.value
    # another tank: the budget started for the first one is not mixed with it
    panel.set(wet_mass=values["wet_mass"] + 100.0)
    panel.budget_buttons["add"].click()
    assert "another tank" in panel.error and len(panel.budget.lines) == 2
    panel.budget_buttons["clear"].click()
    assert len(panel.budget.lines) == 0 and panel.budget.m0 == values["wet_mass"] + 100.0
    panel.set(wet_mass=values["wet_mass"])


def test_add_to_books_in_any_budget_with_a_margin(panel):
    panel.set(departure="2028-11-10", arrival="2029-08-20")
    budget = dk.Budget(7750.0, 326.0 * G0, name="Ochrewing trial").add("trajectory corrections", 40.0)
    out = panel.add_to(budget, margin=0.05)
    assert out is budget and len(budget.lines) == 3
    assert budget.lines[1].dv == panel.results["escape_dv"] and budget.lines[1].margin == 0.05


# ---------------------------------------------------------------------- pictures
def test_figures_of_the_default_and_stressed_cases(artifacts):
    panel = LaunchDatePicker()
    panel.figure.savefig(artifacts / "launch-dates-default.png")
    panel.set(contours="total delta-v")
    panel.figure.savefig(artifacts / "launch-dates-total-dv.png")
    # a heavy vehicle: no pair on the map fits its tank
    panel.set(wet_mass=20_000.0, propellant=6_100.0, contours="C3")
    assert panel.error == "" and panel.results["affordable_pairs"] == 0
    assert any(
        "No pair of dates on this map fits the tank" in note for note in [html.unescape(panel.readouts.value)]
    )
    panel.figure.savefig(artifacts / "launch-dates-nothing-affordable.png")
    panel.close()
    panel = LaunchDatePicker(arrival_first="2028-10-01")
    _click(panel, _axis_day(noon("2029-01-01")), _axis_day(noon("2028-10-20")))
    assert panel.error
    panel.figure.savefig(artifacts / "launch-dates-refused-click.png")
    panel.close()


def test_a_map_drawn_again_is_the_map_of_a_fresh_panel(monkeypatch):
    """The colour bar and fill are updated in place: after several maps the picture is a fresh panel's."""
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    panel = LaunchDatePicker()
    panel.set(contours="total delta-v")
    panel.set(contours="C3", wet_mass=20_000.0)
    panel.set(wet_mass=LaunchDatePicker().values["wet_mass"], contours="total delta-v")
    fresh = LaunchDatePicker(contours="total delta-v")
    for figure in (panel.figure, fresh.figure):
        figure.canvas.draw()
    np.testing.assert_array_equal(
        np.asarray(panel.figure.canvas.buffer_rgba()), np.asarray(fresh.figure.canvas.buffer_rgba())
    )
    panel.close()
    fresh.close()


def test_an_emptied_date_box_is_a_message_and_a_date_again_restores_the_view():
    panel = LaunchDatePicker()
    before = panel.results
    picker = panel.controls["departure_first"]
    first = picker.value
    picker.value = None  # the browser's date box cleared
    assert panel.error == "first departure date is empty: give a date." and panel.results == before
    picker.value = first
    assert panel.error == "" and panel.results == before
    panel.close()
