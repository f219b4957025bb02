"""LaunchDatePicker: choose the departure and arrival dates of an interplanetary transfer.

Pick the origin and target planets, the ranges of departure and arrival
dates, the parking orbit about the origin, the orbit to brake into at the
target, and the vehicle's tank. The panel draws the launch-window map over
departure x arrival dates (the departure energy C3 or the delta-v of both
burns, filled; time of flight dotted), hatches and outlines the pairs the tank
affords, and marks the pair of dates chosen with the two sliders or a click
on the map. The readouts are those of :func:`deltakit.transfer_pair` at
exactly those dates; the button books them in the panel's own
:attr:`LaunchDatePicker.budget` through :func:`deltakit.add_transfer`
(:meth:`LaunchDatePicker.add_to` books them in any budget).

Dates
-----
Every date of the panel is a calendar day at 12:00 TDB, the time of day of the
J2000 epoch (69 s from 12:00 UTC: nothing a window map can see), so a day
is a whole multiple of 86 400 s and the sliders step by whole days.
:attr:`~deltakit.widgets.Panel.values` holds dates as TDB seconds past J2000
(SI, what :func:`deltakit.epoch` gives); :meth:`~LaunchDatePicker.set` and
the constructor also take ISO text (``"2028-11-15"``), ``datetime.date`` or
``numpy.datetime64`` (their calendar day). :attr:`LaunchDatePicker.pair`
carries the chosen dates as ``numpy.datetime64`` (UTC).

The map is the expensive part: it is computed once per set of bodies, date
ranges, orbits and tank (and kept for the last few), so a slider step or a
click costs one Lambert solution, :func:`deltakit.transfer_pair`, and moves
the marker by blitting.

Default case: the invented Ochrewing orbiter (:mod:`deltakit.demo`) in the
late-2028 Earth-Mars window, leaving a 400 km Earth orbit and braking into a
400 km x 33 000 km orbit about Mars; positions from JPL's DE421. The chosen
pair starts at the map's cheapest one (least delta-v of both burns).

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import datetime as _dt
import functools
import math
import warnings
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar, NamedTuple

import ipywidgets as widgets
import numpy as np

from .._text import escape_html, escape_mathtext
from ..budget import Budget
from ..constants import BODIES, G0
from ..demo import OCHREWING, OCHREWING_CAPTURE_ALTITUDES
from ..ephemeris import BODY_CODES, EPHEMERIS_SPAN
from ..errors import DomainError
from ..plotting._style import COLOURS, style_axes
from ..units import day, deg, km, km2_per_s2, km_per_s
from ._base import Computed, InputError, Panel, _Plan, choice, fmt, number, radius_at, slider, toggle
from ._format import html_notes, html_table
from ._stamped import stamped

__all__ = ["CONTOURS", "LaunchDatePicker", "PLANETS"]

#: The planets a transfer can leave from or go to (about the Sun), in order from the Sun.
PLANETS: tuple[str, ...] = tuple(name for name in BODY_CODES if name not in ("Sun", "Moon"))
#: What the map's fill shows.
CONTOURS: tuple[str, ...] = ("C3", "total delta-v")
#: Dates along each axis of the map (whole days, both ends included): 40 x 40 Lambert solutions.
GRID = 40

_NOON = np.datetime64("2000-01-01T12:00", "s")  # J2000's calendar day and time of day (TDB)
_FIRST_DAY = _dt.date(2000, 1, 1)
_AXIS_J2000 = 10957.5  # matplotlib's date number of 2000-01-01T12:00 (days since 1970-01-01)
_RANGES = ("departure_first", "departure_last", "arrival_first", "arrival_last")
_CHOSEN = ("departure", "arrival")
_RANGE_OF = {"departure": ("departure_first", "departure_last"), "arrival": ("arrival_first", "arrival_last")}
_WORDS = {
    "departure_first": "first departure date",
    "departure_last": "last departure date",
    "arrival_first": "first arrival date",
    "arrival_last": "last arrival date",
    "departure": "departure",
    "arrival": "arrival",
}
_SPAN_TEXT = "1899-07-29 to 2053-10-09"


# ---------------------------------------------------------------------- dates
def _date_text(seconds: float) -> str:
    """The calendar day (TDB) of TDB seconds past J2000, or the seconds when far beyond any calendar.

    >>> _date_text(0.0), _date_text(10_546 * 86_400.0), _date_text(1e300)
    ('2000-01-01', '2028-11-15', '1e+300 s from J2000')
    """
    if not abs(seconds) < 1e11:
        return f"{seconds:.3g} s from J2000"
    return str(_NOON + np.timedelta64(round(seconds), "s"))[:10]


def _calendar_day(value: Any, name: str) -> int:
    """Days from 2000-01-01 to the calendar day of a date given as text, date or datetime64."""
    try:
        if isinstance(value, _dt.datetime):
            value = value.date()
        if isinstance(value, _dt.date):
            return (value - _FIRST_DAY).days
        moment = np.datetime64(value)
        if np.isnat(moment):
            raise ValueError("not a time")
        return int(
            (moment.astype("datetime64[D]") - np.datetime64("2000-01-01", "D")) / np.timedelta64(1, "D")
        )
    except (ValueError, TypeError, OverflowError):
        raise DomainError(
            f"`{name}` must be a date (ISO text such as '2028-11-15', datetime.date, numpy.datetime64) "
            f"or TDB seconds past J2000, not {value!r}"
        ) from None


def _is_date(value: Any) -> bool:
    return isinstance(value, (str, _dt.date, np.datetime64))


# ---------------------------------------------------------------------- the case and its map
@dataclass(frozen=True)
class _Case:
    """The checked inputs of one view, SI."""

    origin: str
    target: str
    departures: tuple[float, float]
    arrivals: tuple[float, float]
    parking: float  # radius, m
    arrival_orbit: tuple[float, float]  # (rp, ra), m
    tank: tuple[float, float, float]  # (wet mass kg, exhaust velocity m/s, usable propellant kg)


class _WindowMap(NamedTuple):
    """The map on a grid of whole days: TDB seconds along each axis, fields over (departure, arrival)."""

    departures: np.ndarray
    arrivals: np.ndarray
    c3: np.ndarray
    total_dv: np.ndarray
    propellant: np.ndarray
    affordable: np.ndarray
    time_of_flight: np.ndarray
    cheapest: tuple[int, int] | None  # indices of the least total delta-v, None when no transfer


def _axis(first: float, last: float) -> np.ndarray:
    """Up to GRID whole days from ``first`` to ``last`` (TDB s), both ends included."""
    days = np.unique(np.round(np.linspace(first / day, last / day, GRID)))
    return np.clip(days * day, first, last)


@functools.lru_cache(maxsize=6)
def _window_map(case: _Case) -> _WindowMap:
    """The map of one case (cached: a slider step or a click finds it here)."""
    from ..windows import transfer_pair

    departures, arrivals = _axis(*case.departures), _axis(*case.arrivals)
    grid = transfer_pair(
        case.origin,
        case.target,
        departures[:, None],
        arrivals[None, :],
        parking=case.parking,
        arrival_orbit=case.arrival_orbit,
        vehicle=case.tank,
    )
    total = np.asarray(grid.total_dv, dtype=float)
    cheapest = None
    if np.isfinite(total).any():
        i, j = np.unravel_index(int(np.nanargmin(total)), total.shape)
        cheapest = (int(i), int(j))
    fields = [np.asarray(getattr(grid, key), dtype=float) for key in ("c3", "total_dv", "propellant")]
    for field in fields:
        field.flags.writeable = False
    affordable = np.asarray(grid.affordable, dtype=bool)
    tof = np.broadcast_to(np.asarray(grid.time_of_flight, dtype=float), total.shape)
    return _WindowMap(departures, arrivals, *fields, affordable, tof, cheapest)


def _day_axes(window: _WindowMap) -> tuple[np.ndarray, np.ndarray]:
    """The map's departure and arrival dates as matplotlib date numbers (days)."""
    return _AXIS_J2000 + window.departures / day, _AXIS_J2000 + window.arrivals / day


def _case_of(values: Mapping[str, Any]) -> _Case:
    """The inputs of ``values`` checked, in the words of the controls (InputError)."""
    origin, target = values["origin"], values["target"]
    for name, planet in (("origin", origin), ("target", target)):
        if planet not in PLANETS:
            raise InputError(f"{name} must be a planet ({', '.join(PLANETS)}), not {planet}.", name)
    if origin == target:
        raise InputError(f"origin and target must differ (both are {origin}).", "target")
    start, stop = EPHEMERIS_SPAN
    for name in _RANGES:
        value = values[name]
        if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value):
            raise InputError(f"{_WORDS[name]} is empty: give a date.", name)
        if not start <= value <= stop:
            raise InputError(
                f"{_WORDS[name]} {_date_text(value)} lies outside the ephemeris (DE421: {_SPAN_TEXT}).", name
            )
    for first, last in (_RANGE_OF["departure"], _RANGE_OF["arrival"]):
        if not values[last] > values[first]:
            raise InputError(
                f"{_WORDS[last]} {_date_text(values[last])} must come after the {_WORDS[first]} "
                f"{_date_text(values[first])}.",
                last,
            )
    if not values["arrival_last"] > values["departure_first"]:
        raise InputError(
            f"last arrival date {_date_text(values['arrival_last'])} is not after the first departure date "
            f"{_date_text(values['departure_first'])}: no transfer on this map.",
            "arrival_last",
        )
    origin_body, target_body = BODIES[origin], BODIES[target]
    orbits = (
        ("parking_altitude", "parking orbit altitude", origin_body),
        ("arrival_periapsis_altitude", "arrival periapsis altitude", target_body),
        ("arrival_apoapsis_altitude", "arrival apoapsis altitude", target_body),
    )
    parking, rp, ra = (radius_at(values, name, label, body) for name, label, body in orbits)
    for (name, label, body), radius in zip(orbits, (parking, rp, ra)):
        if not radius > body.radius:
            raise InputError(f"{label} must be above the surface of {body.name} (> 0 km).", name)
    if ra < rp:
        raise InputError(
            f"arrival apoapsis altitude {(ra - target_body.radius) / km:g} km is below the arrival periapsis "
            f"altitude {(rp - target_body.radius) / km:g} km.",
            "arrival_apoapsis_altitude",
        )
    wet, propellant, isp = values["wet_mass"], values["propellant"], values["isp"]
    if not wet > 0.0:
        raise InputError(f"wet mass must be > 0 kg (got {wet:g} kg).", "wet_mass")
    if not 0.0 < propellant < wet:
        raise InputError(
            f"usable propellant must be > 0 kg and below the wet mass {wet:g} kg (got {propellant:g} kg).",
            "propellant",
        )
    if not isp > 0.0:
        raise InputError(f"specific impulse must be > 0 s (got {isp:g} s).", "isp")
    ve = isp * G0
    if not math.isfinite(ve):
        raise InputError(f"specific impulse {isp:g} s is too large to compute with.", "isp")
    return _Case(
        origin,
        target,
        (float(values["departure_first"]), float(values["departure_last"])),
        (float(values["arrival_first"]), float(values["arrival_last"])),
        parking,
        (rp, ra),
        (float(wet), ve, float(propellant)),
    )


def _map_levels(field: np.ndarray, scale: float, span: float) -> np.ndarray | None:
    """Fill levels from the least value up: about a dozen, above them blank (None: nothing to fill)."""
    from matplotlib.ticker import MaxNLocator

    finite = field[np.isfinite(field)] / scale
    if finite.size < 4:
        return None
    low = math.floor(float(finite.min()))
    high = min(float(np.percentile(finite, 40)), low + span)
    levels = MaxNLocator(12).tick_values(low, max(high, low + 1.0))
    return levels if levels.size >= 2 else None


# ---------------------------------------------------------------------- the panel
class LaunchDatePicker(Panel):
    """Choose a pair of departure and arrival dates on a launch-window map; book it in a budget.

    Parameters (keyword-only, SI; dates as TDB seconds past J2000 or as dates, module notes)
    -----------------------------------------------------------------------------------------
    origin, target : str
        Planets (:data:`PLANETS`), different.
    departure_first, departure_last : date
        The map's range of departure dates.
    arrival_first, arrival_last : date
        The map's range of arrival dates.
    parking_altitude : float
        Circular parking orbit about the origin, m above its surface.
    arrival_periapsis_altitude, arrival_apoapsis_altitude : float
        The orbit braked into at the target, m above its surface.
    wet_mass, propellant : float
        The vehicle in its parking orbit and its usable propellant, kg.
    isp : float
        Specific impulse of its engine, s.
    departure, arrival : date or None
        The chosen pair; None: the map's cheapest pair (least delta-v of both burns).
    contours : str
        What the map fills: "C3" or "total delta-v" (:data:`CONTOURS`).

    Examples
    --------
    >>> from deltakit.widgets import LaunchDatePicker
    >>> panel = LaunchDatePicker(departure="2028-11-10", arrival="2029-08-20")
    >>> panel.pair.departure.astype("datetime64[D]"), round(panel.results["time_of_flight"] / 86400)
    (np.datetime64('2028-11-10'), 283)
    >>> 7 < panel.results["c3"] / 1e6 < 20
    True
    >>> budget = panel.add_to(panel.budget)
    >>> [line.label for line in budget.lines]
    ['Earth departure 2028-11-10', 'Mars arrival 2029-08-20']
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "time_of_flight": ("time of flight", day, "days"),
        "c3": ("departure C3", km2_per_s2, "km²/s²"),
        "departure_vinf": ("departure v∞", km_per_s, "km/s"),
        "departure_declination": ("declination of the departure asymptote", deg, "deg"),
        "arrival_vinf": ("arrival v∞", km_per_s, "km/s"),
        "escape_dv": ("departure burn", km_per_s, "km/s"),
        "capture_dv": ("arrival burn", km_per_s, "km/s"),
        "total_dv": ("both burns", km_per_s, "km/s"),
        "propellant": ("propellant needed", 1.0, "kg"),
        "propellant_left": ("propellant left (negative: short)", 1.0, "kg"),
    }

    def __init__(
        self,
        *,
        origin: str = "Earth",
        target: str = "Mars",
        departure_first: Any = "2028-09-20",
        departure_last: Any = "2029-01-10",
        arrival_first: Any = "2029-06-01",
        arrival_last: Any = "2029-12-15",
        parking_altitude: float = OCHREWING.periapsis_altitude,
        arrival_periapsis_altitude: float = OCHREWING_CAPTURE_ALTITUDES[0],
        arrival_apoapsis_altitude: float = OCHREWING_CAPTURE_ALTITUDES[1],
        wet_mass: float = OCHREWING.vehicle.wet_mass,
        propellant: float = OCHREWING.vehicle.propellant_mass,
        isp: float = OCHREWING.vehicle.isp,
        departure: Any = None,
        arrival: Any = None,
        contours: str = "C3",
    ) -> None:
        super().__init__()
        self._follow_notes: dict[str, str] = {}
        asked_dates = {"departure": departure, "arrival": arrival}
        self._choose_cheapest = {name for name, value in asked_dates.items() if value is None}
        self._map: _WindowMap | None = None
        self._map_artists: list[Any] = []
        self._tof_labels: list[Any] = []  # the time-of-flight lines' labels (animated, stamped)
        self._colorbar: Any = None
        self._shown_fill: tuple[int, str] | None = None
        self._shown_layers: tuple[np.ndarray, ...] | None = None  # what the map's fill and lines show
        self._shown_names: tuple[str, str] | None = None  # ... and the planets its labels name
        self._pair: Any = None
        self._case: _Case | None = None
        #: The budget the button adds pairs to: made empty for the panel's tank (New budget starts again).
        self.budget: Budget | None = None
        self._control("origin", choice("from", list(PLANETS), "Earth", width="160px"))
        self._control("target", choice("to", list(PLANETS), "Mars", width="160px"))
        self._control("contours", toggle("map shows", list(CONTOURS), "C3", button_width="110px"))
        for name in _RANGES:
            picker = widgets.DatePicker(
                value=_FIRST_DAY, description=_WORDS[name], layout=widgets.Layout(width="270px")
            )
            self._control(name, picker)
        self._control("parking_altitude", number("parking orbit altitude (km)", 0.0), km, "m")
        self._control("arrival_periapsis_altitude", number("arrival periapsis altitude (km)", 0.0), km, "m")
        self._control("arrival_apoapsis_altitude", number("arrival apoapsis altitude (km)", 0.0), km, "m")
        self._control("wet_mass", number("wet mass (kg)", 0.0), 1.0, "kg")
        self._control("propellant", number("usable propellant (kg)", 0.0), 1.0, "kg")
        self._control("isp", number("specific impulse (s)", 0.0), 1.0, "s")
        self._date_labels = {}
        rows = []
        for name in _CHOSEN:
            control = slider(name, 0.0, 0.0, 1.0, 1.0, readout_format=".0f")
            control.readout = False
            self._control(name, control, day, "s")
            label = widgets.HTML(value="")
            label.add_class(f"deltakit-date-{name}")
            self._date_labels[name] = label
            rows.append(widgets.HBox([control, label]))
        self._build_budget_box()
        self._build_figure()
        initial = {
            "origin": origin,
            "target": target,
            "contours": contours,
            "departure_first": departure_first,
            "departure_last": departure_last,
            "arrival_first": arrival_first,
            "arrival_last": arrival_last,
            "parking_altitude": parking_altitude,
            "arrival_periapsis_altitude": arrival_periapsis_altitude,
            "arrival_apoapsis_altitude": arrival_apoapsis_altitude,
            "wet_mass": wet_mass,
            "propellant": propellant,
            "isp": isp,
        }
        initial.update({name: value for name, value in asked_dates.items() if value is not None})
        self._finish(
            "Launch dates: a pair of dates on the window map, and what it costs",
            [
                ["origin", "target", "contours"],
                ["departure_first", "departure_last"],
                ["arrival_first", "arrival_last"],
                ["parking_altitude", "arrival_periapsis_altitude", "arrival_apoapsis_altitude"],
                ["wet_mass", "propellant", "isp"],
            ],
            initial=initial,
            extra=rows,
            below=[self._budget_box],
        )
        self._choose_cheapest = set()
        self.budget = self._tank_budget()
        self._show_budget()

    # ------------------------------------------------------------------ dates in the controls
    def _si(self, name: str) -> Any:
        if name in _RANGES:
            value = self.controls[name].value
            return None if value is None else float((value - _FIRST_DAY).days * day)
        return super()._si(name)

    def _plan(self, name: str, value: Any) -> _Plan:
        if name in _RANGES:
            return self._plan_range(name, value)
        if name in _CHOSEN and _is_date(value):
            value = _calendar_day(value, name) * day
        plan = super()._plan(name, value)
        if name in _CHOSEN and plan.note:  # the base's note speaks of days since J2000: say dates
            plan = plan._replace(
                note=f"{name}: a date between whole days (12:00 TDB); the panel uses {_date_text(plan.si)}."
            )
        return plan

    def _plan_range(self, name: str, value: Any) -> _Plan:
        note = ""
        if _is_date(value):
            days = _calendar_day(value, name)
        else:
            if isinstance(value, bool) or not isinstance(value, (int, float, np.integer, np.floating)):
                raise DomainError(
                    f"`{name}` must be a date (ISO text, datetime.date, numpy.datetime64) or TDB seconds "
                    f"past J2000, not {type(value).__name__}"
                )
            if not math.isfinite(value):
                raise DomainError(f"`{name}` must be finite, got {value!r}")
            days = round(float(value) / day)
            if abs(float(value) - days * day) > 1.0:
                note = f"{_WORDS[name]}: the panel uses the whole day {_date_text(days * day)} (12:00 TDB)."
        try:
            date = _FIRST_DAY + _dt.timedelta(days=days)
        except OverflowError:
            raise DomainError(
                f"`{name}` lies beyond the calendar (DE421 covers {_SPAN_TEXT}), got {value!r}"
            ) from None
        widget = self.controls[name]
        return _Plan(float(days * day), lambda: setattr(widget, "value", date), note)

    # ------------------------------------------------------------------ what follows what
    def _apply(self, si_values: dict[str, Any], *, touched: set[str], **kwargs: Any) -> bool:
        # the dates' follow-ups are merged here, over the constructor's own values of the controls
        # that follow (the base's hook would keep those), and their notes go through the hook
        try:
            followed, self._follow_notes = self._dates_follow(si_values, touched)
        except (TypeError, ValueError, OverflowError):  # an empty date box: compute names it
            followed, self._follow_notes = {}, {}
        return super()._apply({**si_values, **followed}, touched=touched, **kwargs)

    def _follow_up(self, touched: set[str]) -> tuple[dict[str, Any], dict[str, str]]:
        notes, self._follow_notes = self._follow_notes, {}
        return {}, notes

    def _dates_follow(
        self, given: dict[str, Any], touched: set[str]
    ) -> tuple[dict[str, Any], dict[str, str]]:
        """Ranges widen to hold a date chosen beyond them; dates outside new ranges go to the cheapest."""
        try:
            asked = {name: self._plan(name, value).si for name, value in given.items()}
        except DomainError:
            return {}, {}  # the plan of set() raises the message itself
        candidate = {**self.values, **asked}
        followed: dict[str, Any] = {}
        notes: dict[str, str] = {}
        if touched == {"origin"} and candidate["origin"] == candidate["target"] and self._case is not None:
            followed["target"] = self._case.origin  # the origin of the last view: the two swap
            notes["target"] = f"target set to {followed['target']}: origin and target must differ."
            candidate.update(followed)
        for name in _CHOSEN:
            first, last = _RANGE_OF[name]
            value = candidate[name]
            if name not in touched or {first, last} & touched or not isinstance(value, float):
                continue
            for end, outside in ((first, value < candidate[first]), (last, value > candidate[last])):
                if outside and math.isfinite(value) and abs(value) < 1e11:
                    followed[end] = float(round(value / day) * day)
                    notes[end] = (
                        f"{_WORDS[end]} moved to {_date_text(followed[end])} to hold the chosen {name}."
                    )
        candidate.update(followed)
        free = [name for name in _CHOSEN if name not in touched]
        outside = any(
            not candidate[_RANGE_OF[name][0]] <= candidate[name] <= candidate[_RANGE_OF[name][1]]
            for name in free
            if isinstance(candidate[name], float)
        )
        moved = (touched & set(_RANGES) and outside) or self._choose_cheapest
        if free and moved:
            try:
                window = _window_map(_case_of(candidate))
            except (DomainError, ArithmeticError, ValueError):
                return {k: v for k, v in followed.items() if k not in touched}, notes  # compute says why
            if window.cheapest is not None:
                i, j = window.cheapest
                if free == ["arrival"]:  # the cheapest arrival for the departure given
                    i = int(np.argmin(abs(window.departures - candidate["departure"])))
                    j = int(
                        np.nanargmin(np.where(np.isfinite(window.total_dv[i]), window.total_dv[i], np.inf))
                    )
                elif free == ["departure"]:
                    j = int(np.argmin(abs(window.arrivals - candidate["arrival"])))
                    i = int(
                        np.nanargmin(
                            np.where(np.isfinite(window.total_dv[:, j]), window.total_dv[:, j], np.inf)
                        )
                    )
                best = {"departure": float(window.departures[i]), "arrival": float(window.arrivals[j])}
                for name in free:
                    followed[name] = best[name]
                if not self._choose_cheapest:
                    notes[free[0]] = (
                        f"{' and '.join(free)} moved to the map's cheapest pair (least delta-v, both burns): "
                        "the chosen dates lay outside the new ranges."
                    )
        return {k: v for k, v in followed.items() if k not in touched}, notes

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """The map and the chosen pair's readouts for ``values`` (SI, keyed like the controls)."""
        from ..windows import transfer_pair

        case = _case_of(values)
        departure, arrival = values["departure"], values["arrival"]
        for name, value in (("departure", departure), ("arrival", arrival)):
            first, last = (values[key] for key in _RANGE_OF[name])
            if not first <= value <= last:
                raise InputError(
                    f"{name} {_date_text(value)} lies outside the map's {name} dates "
                    f"{_date_text(first)} to {_date_text(last)}.",
                    name,
                )
        if not arrival > departure:
            raise InputError(
                f"arrival {_date_text(arrival)} is not after the departure {_date_text(departure)}: "
                "no transfer.",
                "arrival",
                "departure",
            )
        if values["contours"] not in CONTOURS:
            raise InputError(
                f"the map shows one of {', '.join(CONTOURS)}, not {values['contours']}.", "contours"
            )
        window = _window_map(case)
        pair = transfer_pair(
            case.origin,
            case.target,
            departure,
            arrival,
            parking=case.parking,
            arrival_orbit=case.arrival_orbit,
            vehicle=case.tank,
        )
        if not np.isfinite(pair.c3):
            raise InputError(
                f"no transfer from {_date_text(departure)} to {_date_text(arrival)}: the planets lie "
                "180 deg apart about the Sun, where the transfer's plane is undefined; move a date by a day.",
                "departure",
                "arrival",
            )
        capacity = case.tank[2]
        results = {
            "departure_date": _date_text(departure),
            "arrival_date": _date_text(arrival),
            "time_of_flight": float(pair.time_of_flight),
            "c3": float(pair.c3),
            "departure_vinf": float(pair.departure_vinf),
            "departure_declination": float(pair.departure_declination),
            "departure_right_ascension": float(pair.departure_right_ascension),
            "arrival_vinf": float(pair.arrival_vinf),
            "arrival_declination": float(pair.arrival_declination),
            "transfer_angle": float(pair.transfer_angle),
            "escape_dv": float(pair.escape_dv),
            "capture_dv": float(pair.capture_dv),
            "total_dv": float(pair.total_dv),
            "propellant": float(pair.propellant),
            "propellant_left": capacity - float(pair.propellant),
            "affordable": bool(pair.affordable),
            "affordable_pairs": int(np.count_nonzero(window.affordable)),
        }
        notes = []
        if not results["affordable"]:
            notes.append(
                f"The tank cannot afford this pair: it needs {-results['propellant_left']:,.0f} kg more "
                f"than the {capacity:,.0f} kg it holds."
            )
        if not results["affordable_pairs"]:
            least = np.nanmin(window.propellant) if window.cheapest is not None else math.nan
            notes.append(
                f"No pair of dates on this map fits the tank (the cheapest needs {least:,.0f} kg of "
                f"{capacity:,.0f} kg): widen the dates, lighten the vehicle or capture into a looser orbit."
            )
        if results["transfer_angle"] > math.pi:
            notes.append("Type II transfer: more than half-way round the Sun.")
        drawing = {"map": window, "pair": pair, "case": case, "contours": values["contours"]}
        return Computed(results, tuple(notes), drawing)

    def _show_readouts(self, computed: Computed) -> None:
        """The base's readouts with the chosen dates as their first rows (one table)."""
        r = computed.results
        rows = [
            ("departure_date", "departure", f"{r['departure_date']} (12:00 TDB)"),
            ("arrival_date", "arrival", f"{r['arrival_date']} (12:00 TDB)"),
            *(
                (key, label, fmt(r[key], scale, unit))
                for key, (label, scale, unit) in self.readout_spec.items()
                if key in r
            ),
        ]
        self.readouts.value = html_table(rows) + html_notes([*self._adjusted.values(), *computed.notes])

    # ------------------------------------------------------------------ the pair and the budget
    @property
    def pair(self) -> Any:
        """The :class:`deltakit.TransferPair` of the chosen dates (last valid view)."""
        return self._pair

    def add_to(self, budget: Budget, *, margin: float = 0.0) -> Budget:
        """Book the chosen pair's departure and arrival burns as two lines of ``budget`` (returned).

        Through :func:`deltakit.add_transfer`: the lines carry the bodies and dates,
        their delta-v is the readouts' departure and arrival burn; ``margin`` is a
        fraction (0.05 = +5 %).
        """
        from ..windows import add_transfer

        if self._pair is None:
            raise DomainError("no valid pair of dates to add")
        return add_transfer(budget, self._pair, margin=margin)

    def _tank_budget(self) -> Budget:
        """A new, empty budget for the panel's tank (wet mass, exhaust velocity, dry mass)."""
        wet, ve, propellant = self._case.tank
        return Budget(wet, ve, name=f"{self._case.origin} to {self._case.target}", dry_mass=wet - propellant)

    def _build_budget_box(self) -> None:
        self.budget_buttons = {
            "add": widgets.Button(
                description="Add pair to budget",
                button_style="primary",
                icon="plus",
                layout=widgets.Layout(width="190px"),
            ),
            "clear": widgets.Button(description="New budget", icon="file"),
        }
        for key, button in self.budget_buttons.items():
            button.add_class(f"deltakit-dates-{key}")
        self.budget_buttons["add"].on_click(lambda _: self._add_to_own_budget())
        self.budget_buttons["clear"].on_click(lambda _: self._new_budget())
        self.budget_status = widgets.HTML(value="")
        self.budget_status.add_class("deltakit-dates-budget")
        self._budget_box = widgets.HBox(
            [*self.budget_buttons.values(), self.budget_status], layout=widgets.Layout(flex_flow="row wrap")
        )

    def _add_to_own_budget(self) -> None:
        """The button: the chosen pair into :attr:`budget`; problems go to the message line."""
        wet, ve, propellant = self._case.tank
        if not self.budget.lines:
            self.budget = self._tank_budget()
        elif (self.budget.m0, self.budget.ve, self.budget.dry_mass) != (wet, ve, wet - propellant):
            self._show_message(
                "The budget was started for another tank (wet mass, propellant or specific impulse): "
                "press New budget first."
            )
            return
        try:
            self.add_to(self.budget)
        except (DomainError, ValueError) as err:
            self._show_message(f"add to budget failed: {err}")
            return
        self._show_budget()

    def _new_budget(self) -> None:
        self.budget = self._tank_budget()
        self._show_budget()

    def _show_budget(self) -> None:
        budget = self.budget
        if not budget.lines:
            self.budget_status.value = "budget: no lines yet"
            return
        left = budget.propellant_left
        closes = budget.first_infeasible is None
        text = (
            f"budget: {len(budget.lines)} lines, {fmt(float(budget.total_dv), km_per_s, 'km/s')}, "
            f"propellant {fmt(float(budget.propellant), 1.0, 'kg')}"
            + (f", {fmt(float(left), 1.0, 'kg')} left" if closes and left is not None else ", does not close")
        )
        self.budget_status.value = escape_html(text)

    # ------------------------------------------------------------------ the figure
    def _build_figure(self) -> None:
        import matplotlib.dates as mdates
        from matplotlib.lines import Line2D
        from matplotlib.patches import Patch

        fig = self._figure(7.6, 5.6)
        self.axes = ax = fig.add_axes((0.14, 0.1, 0.69, 0.72))
        self._colorbar_rect = (0.855, 0.1, 0.025, 0.72)
        (self._cheapest,) = ax.plot(
            [],
            [],
            marker="*",
            markersize=13,
            color=COLOURS["hohmann"],
            markeredgecolor="white",
            ls="",
            zorder=4,
        )
        chosen = {"color": COLOURS["burn"], "linewidth": 0.9, "linestyle": "--", "zorder": 5}
        self._cross_x = ax.axvline(_AXIS_J2000, **chosen)
        self._cross_y = ax.axhline(_AXIS_J2000, **chosen)
        (self._marker,) = ax.plot(
            [_AXIS_J2000],
            [_AXIS_J2000],
            marker="o",
            markersize=8,
            color=COLOURS["burn"],
            markeredgecolor="white",
            ls="",
            zorder=6,
        )
        for axis in (ax.xaxis, ax.yaxis):
            locator = mdates.AutoDateLocator(minticks=3, maxticks=7)
            axis.set_major_locator(locator)
            axis.set_major_formatter(  # every label says its month and year ("Nov 2028", "15 Nov")
                mdates.ConciseDateFormatter(
                    locator,
                    formats=["%Y", "%b %Y", "%d %b", "%H:%M", "%H:%M", "%S"],
                    zero_formats=["", "%b %Y", "%b %Y", "%d %b", "%H:%M", "%H:%M"],
                    show_offset=False,
                )
            )
        handles = [
            Line2D([], [], marker="o", color=COLOURS["burn"], markeredgecolor="white", ls="--", lw=0.9),
            Line2D(
                [], [], marker="*", markersize=11, color=COLOURS["hohmann"], markeredgecolor="white", ls=""
            ),
            Patch(facecolor="none", edgecolor=COLOURS["after"], hatch="///", linewidth=2.0),
            Line2D([], [], color=COLOURS["total"], ls=":", lw=0.8),
        ]
        ax.legend(
            handles,
            ["chosen pair", "least delta-v on the map", "the tank affords", "time of flight (days)"],
            loc="lower center",
            bbox_to_anchor=(0.5, 1.0),
            ncol=4,
            fontsize="x-small",
            frameon=False,
            handlelength=1.8,
            columnspacing=1.0,
        )
        import matplotlib
        from matplotlib.patches import PathPatch
        from matplotlib.path import Path as MplPath

        # the region the tank affords, hatched and outlined: two artists made once, their outlines
        # set for each map; animated (in z-order, under the cheapest star and the chosen pair) so a
        # new tank redraws them alone over the map
        empty = MplPath(np.zeros((0, 2)))
        self._hatch = PathPatch(
            empty, facecolor="none", edgecolor=COLOURS["after"], hatch="///", linewidth=0.0, zorder=2
        )
        self._outline = PathPatch(  # joined and capped as a contour line is
            empty,
            facecolor="none",
            edgecolor=COLOURS["after"],
            linewidth=2.0,
            zorder=3,
            joinstyle=matplotlib.rcParams["lines.solid_joinstyle"],
            capstyle=matplotlib.rcParams["lines.solid_capstyle"],
        )
        for patch in (self._hatch, self._outline):
            ax.add_patch(patch)
        self.view.animate(
            self._hatch, self._outline, self._cheapest, self._cross_x, self._cross_y, self._marker
        )
        fig.canvas.mpl_connect("button_press_event", self._on_click)

    def _layers(self, window: _WindowMap, contours: str) -> tuple[np.ndarray, ...]:
        """What the fill and the time-of-flight lines show: equal layers, the same picture under them."""
        field = window.c3 if contours == "C3" else window.total_dv
        return (window.departures, window.arrivals, field, window.time_of_flight)

    def _same_layers(self, layers: tuple[np.ndarray, ...]) -> bool:
        shown = self._shown_layers
        return shown is not None and all(np.array_equal(a, b, equal_nan=True) for a, b in zip(shown, layers))

    def _show_cheapest(self, window: _WindowMap) -> None:
        """The star on the pair of least total delta-v (none when the map has no transfer)."""
        x, y = _day_axes(window)
        cheapest = window.cheapest
        self._cheapest.set_data(*(([x[cheapest[0]]], [y[cheapest[1]]]) if cheapest else ([], [])))

    def _draw_affordable(self, window: _WindowMap) -> None:
        """The hatched region the tank affords and its outline (animated artists, moved in place)."""
        import contourpy
        from matplotlib.path import Path as MplPath

        x, y = _day_axes(window)
        mask = window.affordable.T.astype(float)
        if mask.any() and mask.shape[0] >= 2 and mask.shape[1] >= 2:
            # the outlines matplotlib's contourf and contour would draw (the same contourpy generator)
            generator = contourpy.contour_generator(
                x, y, mask, fill_type="OuterCode", line_type="SeparateCode"
            )
            points, codes = generator.filled(0.5, 1.5)
            region = MplPath(np.concatenate(points), np.concatenate(codes)) if points else None
            points, codes = generator.lines(0.5)
            edge = MplPath(np.concatenate(points), np.concatenate(codes)) if points else None
        else:
            region = edge = None
        empty = MplPath(np.zeros((0, 2)))
        self._hatch.set_path(region or empty)
        self._outline.set_path(edge or empty)

    def _draw_map(self, window: _WindowMap, case: _Case, contours: str) -> None:
        """The map's fill, time-of-flight lines and colour bar, drawn anew."""
        ax = self.axes
        self.view.release(*self._tof_labels)
        for artist in self._map_artists:
            artist.remove()
        self._map_artists, self._tof_labels = [], []
        x, y = _day_axes(window)
        c3_shown = contours == "C3"
        field, scale, span = (window.c3, km2_per_s2, 40.0) if c3_shown else (window.total_dv, km_per_s, 4.0)
        label = "departure C3 (km²/s²)" if c3_shown else "delta-v of both burns (km/s)"
        ax.set_xlim(x[0], x[-1])  # before the contours: their labels are placed in screen space
        ax.set_ylim(y[0], y[-1])
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # NaN corners (arrival before departure) are left blank
            levels = _map_levels(field, scale, span)
            if levels is not None:
                fill = ax.contourf(x, y, field.T / scale, levels=levels, cmap="cividis", alpha=0.85, zorder=1)
                self._map_artists.append(fill)
                self._show_colorbar(fill, label)
            elif self._colorbar is not None:  # nothing to fill (no transfer on the map): no scale either
                self._colorbar.ax.set_visible(False)
            tof = window.time_of_flight / day
            finite = tof[np.isfinite(tof)]
            if finite.size >= 4:
                from matplotlib.ticker import MaxNLocator

                tof_levels = MaxNLocator(6).tick_values(finite.min(), finite.max())
                tof_levels = tof_levels[(tof_levels > finite.min()) & (tof_levels < finite.max())]
                if tof_levels.size:
                    lines = ax.contour(
                        x,
                        y,
                        tof.T,
                        levels=tof_levels,
                        colors=COLOURS["total"],
                        linewidths=0.8,
                        linestyles=":",
                    )
                    ax.clabel(lines, fmt="%.0f", fontsize="x-small", inline=True)  # removed with the lines
                    # the labels stay above the hatched region, as their z-order says: animated after
                    # it, and stamped (a blit over the map draws them again at little cost)
                    lines.labelTexts[:] = self._tof_labels = [
                        stamped(text, shared=True) for text in lines.labelTexts
                    ]
                    self.view.animate(*self._tof_labels, before=self._outline)
                    self._map_artists.append(lines)
        origin, target = escape_mathtext(case.origin), escape_mathtext(case.target)
        ax.set_xlabel("")
        ax.set_ylabel("")
        ax.set_title("")
        style_axes(ax, xlabel=f"departure from {origin} (date)", ylabel=f"arrival at {target} (date)")
        ax.set_title(
            f"{origin} to {target}: {'C3' if c3_shown else 'delta-v of both burns'} by pair of dates",
            fontsize="medium",
            pad=24,
        )

    def _show_colorbar(self, fill: Any, label: str) -> None:
        """The colour bar of the new fill: made once, then given the fill's levels (no new axes each map)."""
        bar = self._colorbar
        if bar is None:
            self._colorbar = self.figure.colorbar(
                fill, cax=self.figure.add_axes(self._colorbar_rect), label=label
            )
            return
        bar.ax.set_visible(True)
        bar.boundaries, bar.values = fill._levels, fill.cvalues  # what Colorbar takes from a fill when made
        bar.update_normal(fill)
        bar.set_label(label)

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d = computed.drawing
        window, case, pair = d["map"], d["case"], d["pair"]
        fill = (id(window), d["contours"])
        if fill != self._shown_fill or window is not self._map:
            layers = self._layers(window, d["contours"])
            # the same fill and lines (a new tank or vehicle mass): only the affordable region and the
            # cheapest star move, blitted over the map as it is
            if not (self._same_layers(layers) and self._shown_names == (case.origin, case.target)):
                self._draw_map(window, case, d["contours"])
                self._shown_layers, self._shown_names = layers, (case.origin, case.target)
                self.view.invalidate()
            self._show_cheapest(window)
            self._draw_affordable(window)
            self._map, self._shown_fill = window, fill
        self._case, self._pair = case, pair
        values = self.values
        x = _AXIS_J2000 + values["departure"] / day
        y = _AXIS_J2000 + values["arrival"] / day
        self._marker.set_data([x], [y])
        self._cross_x.set_xdata([x, x])
        self._cross_y.set_ydata([y, y])
        with self._quietly():
            for name in _CHOSEN:
                first, last = (values[key] / day for key in _RANGE_OF[name])
                widget = self.controls[name]
                if (widget.min, widget.max) != (first, last):  # first <= value <= last (compute checked)
                    widget.min = first
                    widget.max = last
        for name in _CHOSEN:
            first = values[_RANGE_OF[name][0]]
            shown, count = computed.results[f"{name}_date"], round((values[name] - first) / day)
            text = f"<b>{escape_html(shown)}</b> (day {count} of the range)"
            self._date_labels[name].value = text

    # ------------------------------------------------------------------ a click on the map
    def _on_click(self, event: Any) -> None:
        """A click inside the map chooses the pair of dates under it (whole days); elsewhere nothing."""
        if event.inaxes is not self.axes or event.xdata is None or event.ydata is None:
            return
        values = self.values
        chosen = {}
        for name, where in (("departure", event.xdata), ("arrival", event.ydata)):
            first, last = (values[key] for key in _RANGE_OF[name])
            seconds = round(where - _AXIS_J2000) * day
            chosen[name] = float(min(max(seconds, first), last))
        self.set(**chosen)

    def close(self) -> None:
        self._map_artists, self._tof_labels = [], []
        self._colorbar = None
        self._pair = None
        super().close()
