"""The numeric boundary under attack: every public numeric function, every hostile input.

The promises (README, DEVELOPERS.md, issue 11): nonsense input raises a
DomainError (or a TypeError) that names the parameter; text, bytes, bools,
dates, complex numbers, integers too large for a float and None are never
taken as numbers; masked arrays are refused (their mask would be lost);
astropy and pint quantities are read in SI, never as their bare number;
shapes that do not broadcast raise a DomainError naming the parameters and
their shapes; extreme but finite values (1e300, 1e-300, -1e300) leak no
RuntimeWarning; inputs are never changed in place.

The harness below calls every public numeric function of ``deltakit._NAMES``
(Conic constructors included) with each hostile input in each parameter, the
others valid. A case that fails in a module another branch owns is marked
``xfail(strict=True)`` with that branch's name: it turns red once fixed there,
and must then be unmarked.

The second half checks the scalar fast path against the array path on random
inputs (same results to rounding, same errors) and the extreme values of the
closed forms against mpmath.
"""

from __future__ import annotations

import datetime
import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass, fields, is_dataclass
from typing import Any

import mpmath
import numpy as np
import pytest
from _rounding import assert_same_to_rounding
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit.constants import EARTH

u = pytest.importorskip("astropy.units")
pint = pytest.importorskip("pint")
ureg = pint.UnitRegistry()

MU = EARTH.mu
ORBIT = dk.Conic.from_apsides(7000e3, 9000e3, MU)


# ---------------------------------------------------------------------- the public numeric functions
@dataclass(frozen=True)
class Case:
    """How to call one public function: valid keyword values, SI unit of each numeric one, owner."""

    call: Callable[..., Any]
    good: dict[str, Any]
    units: dict[str, str]
    owner: str = "boundary"
    #: Budget lines hold one number per parameter: arrays are refused there, not broadcast.
    arrays: bool = True
    #: Trades take axes of a grid: 1-D arrays of any lengths, not arrays that broadcast.
    grid: bool = False
    #: Parameters that take dates as well as TDB seconds: a datetime there is a value, not hostile.
    dates: frozenset[str] = frozenset()


def _numbers(record):
    """The numeric fields of a vehicle record (its names are not numbers to compare)."""
    return tuple(
        getattr(record, f.name) for f in fields(record) if isinstance(getattr(record, f.name), float)
    )


def _budget_add(dv_or_transfer, ve, margin):
    return dk.Budget(1000.0, 3000.0).add("line", dv_or_transfer, ve, margin)


def _trade(name):
    def call(**kwargs):
        pytest.importorskip("xarray")
        return getattr(dk, name)(**kwargs)

    call.__name__ = name
    return call


def _planets(function):
    """``function`` of the `planets` extra (pyerfa, jplephem, skyfield-data; maps also xarray)."""

    def call(**kwargs):
        for module in ("erfa", "jplephem", "skyfield_data"):
            pytest.importorskip(module)
        if function is dk.transfer_map:
            pytest.importorskip("xarray")
        return function(**kwargs)

    call.__name__ = function.__name__
    return call


#: TDB seconds past J2000 of 2028-11-15 and 2029-08-20 UTC: an Earth-Mars pair of the 2028 window.
DEPART, ARRIVE = 911131269.18, 935150469.18
DAY = 86400.0
EARTH_PARKING, MARS_ORBIT = 6678.137e3, 3789.5e3  # 300 km and 400 km up (radii of deltakit.constants)


def _add_transfer(margin):
    pair = _planets(dk.transfer_pair)(
        origin="Earth",
        target="Mars",
        departure=DEPART,
        arrival=ARRIVE,
        parking=EARTH_PARKING,
        arrival_orbit=MARS_ORBIT,
    )
    return dk.add_transfer(dk.Budget(3000.0, 3200.0), pair, margin=margin)


M, MPS, MU_UNIT, RAD, KG, S = "m", "m/s", "m^3/s^2", "rad", "kg", "s"

CASES: dict[str, Case] = {
    # two-body relations
    "circular_speed": Case(dk.circular_speed, {"r": 7e6, "mu": MU}, {"r": M, "mu": MU_UNIT}),
    "escape_speed": Case(dk.escape_speed, {"r": 7e6, "mu": MU}, {"r": M, "mu": MU_UNIT}),
    "vis_viva": Case(dk.vis_viva, {"r": 7e6, "a": 8e6, "mu": MU}, {"r": M, "a": M, "mu": MU_UNIT}),
    "specific_energy": Case(
        dk.specific_energy, {"r": 7e6, "v": 7e3, "mu": MU}, {"r": M, "v": MPS, "mu": MU_UNIT}
    ),
    # conics (the space branch)
    "Conic": Case(
        dk.Conic,
        {"rp": 7e6, "e": 0.1, "mu": MU, "argp": 0.3},
        {"rp": M, "e": "", "mu": MU_UNIT, "argp": RAD},
        "space",
    ),
    "Conic.from_apsides": Case(
        dk.Conic.from_apsides, {"rp": 7e6, "ra": 9e6, "mu": MU}, {"rp": M, "ra": M, "mu": MU_UNIT}, "space"
    ),
    "Conic.circular": Case(dk.Conic.circular, {"r": 7e6, "mu": MU}, {"r": M, "mu": MU_UNIT}, "space"),
    "Conic.from_vinf": Case(
        dk.Conic.from_vinf, {"rp": 7e6, "vinf": 3e3, "mu": MU}, {"rp": M, "vinf": MPS, "mu": MU_UNIT}, "space"
    ),
    "Conic.from_state": Case(
        dk.Conic.from_state,
        {"r_vec": [7e6, 1e5], "v_vec": [10.0, 7.6e3], "mu": MU},
        {"r_vec": M, "v_vec": MPS, "mu": MU_UNIT},
        "space",
    ),
    # impulsive burns (the space branch)
    "burn": Case(
        dk.burn,
        {"conic": ORBIT, "nu": 0.5, "radial": 10.0, "transverse": 100.0},
        {"nu": RAD, "radial": MPS, "transverse": MPS},
        "space",
    ),
    "burn_prograde": Case(
        dk.burn_prograde, {"conic": ORBIT, "nu": 0.5, "dv": 100.0}, {"nu": RAD, "dv": MPS}, "space"
    ),
    "burn_at_angle": Case(
        dk.burn_at_angle,
        {"conic": ORBIT, "nu": 0.5, "dv": 100.0, "angle": 0.2},
        {"nu": RAD, "dv": MPS, "angle": RAD},
        "space",
    ),
    "energy_gain": Case(dk.energy_gain, {"v": 7e3, "dv": 100.0}, {"v": MPS, "dv": MPS}, "space"),
    # orbits in space: targeting, plane changes, low thrust (the space branch)
    "burn_to": Case(dk.burn_to, {"conic": ORBIT, "nu": 0.5, "ra": 2e7}, {"nu": RAD, "ra": M}, "space"),
    "plane_change_burns": Case(
        dk.plane_change_burns, {"conic": ORBIT, "inc": 0.5, "raan": 1.0}, {"inc": RAD, "raan": RAD}, "space"
    ),
    "inclination_change_cost": Case(
        dk.inclination_change_cost, {"conic": ORBIT, "nu": 0.5, "inc": 0.3}, {"nu": RAD, "inc": RAD}, "space"
    ),
    "edelbaum": Case(
        dk.edelbaum, {"v1": 7.7e3, "v2": 3.1e3, "angle": 0.5}, {"v1": MPS, "v2": MPS, "angle": RAD}, "space"
    ),
    # transfers and plane changes
    "hohmann": Case(dk.hohmann, {"r1": 7e6, "r2": 4e7, "mu": MU}, {"r1": M, "r2": M, "mu": MU_UNIT}),
    "bielliptic": Case(
        dk.bielliptic, {"r1": 7e6, "r2": 4e7, "rb": 8e7, "mu": MU}, {"r1": M, "r2": M, "rb": M, "mu": MU_UNIT}
    ),
    "plane_change": Case(dk.plane_change, {"v": 7e3, "angle": 0.3}, {"v": MPS, "angle": RAD}),
    "combined_plane_change": Case(
        dk.combined_plane_change, {"v1": 7e3, "v2": 6e3, "angle": 0.3}, {"v1": MPS, "v2": MPS, "angle": RAD}
    ),
    "hohmann_plane_change": Case(
        dk.hohmann_plane_change,
        {"r1": 7e6, "r2": 4e7, "mu": MU, "angle": 0.3, "fraction_first": 0.2},
        {"r1": M, "r2": M, "mu": MU_UNIT, "angle": RAD, "fraction_first": ""},
    ),
    "best_plane_change_split": Case(
        dk.best_plane_change_split,
        {"r1": 7e6, "r2": 4e7, "mu": MU, "angle": 0.3},
        {"r1": M, "r2": M, "mu": MU_UNIT, "angle": RAD},
    ),
    # departure, arrival, flyby
    "escape_burn": Case(
        dk.escape_burn,
        {"rp": 7e6, "vinf": 3e3, "mu": MU, "ra": 2e7},
        {"rp": M, "vinf": MPS, "mu": MU_UNIT, "ra": M},
    ),
    "capture_burn": Case(
        dk.capture_burn,
        {"rp": 7e6, "vinf": 3e3, "mu": MU, "ra": 2e7},
        {"rp": M, "vinf": MPS, "mu": MU_UNIT, "ra": M},
    ),
    "powered_flyby": Case(
        dk.powered_flyby,
        {"vinf_in": 3e3, "rp": 7e6, "dv": 100.0, "mu": MU},
        {"vinf_in": MPS, "rp": M, "dv": MPS, "mu": MU_UNIT},
    ),
    # propulsion and energy accounting
    "exhaust_velocity": Case(dk.exhaust_velocity, {"isp": 300.0}, {"isp": S}),
    "rocket_dv": Case(dk.rocket_dv, {"ve": 3e3, "m0": 1e3, "mf": 500.0}, {"ve": MPS, "m0": KG, "mf": KG}),
    "propellant_mass(m0)": Case(
        lambda dv, ve, m0: dk.propellant_mass(dv, ve, m0=m0),
        {"dv": 1e3, "ve": 3e3, "m0": 1e3},
        {"dv": MPS, "ve": MPS, "m0": KG},
    ),
    "propellant_mass(mf)": Case(
        lambda dv, ve, mf: dk.propellant_mass(dv, ve, mf=mf),
        {"dv": 1e3, "ve": 3e3, "mf": 1e3},
        {"dv": MPS, "ve": MPS, "mf": KG},
    ),
    "ejection_energy": Case(
        dk.ejection_energy,
        {"m_vehicle": 1e3, "m_ejected": 10.0, "u": 3e3, "v0": 7e3},
        {"m_vehicle": KG, "m_ejected": KG, "u": MPS, "v0": MPS},
    ),
    "burn_energy": Case(
        dk.burn_energy,
        {"m0": 1e3, "mf": 800.0, "ve": 3e3, "v0": 7e3},
        {"m0": KG, "mf": KG, "ve": MPS, "v0": MPS},
    ),
    "propulsive_efficiency": Case(dk.propulsive_efficiency, {"v": 7e3, "ve": 3e3}, {"v": MPS, "ve": MPS}),
    # budgets (the vehicles branch)
    "Budget": Case(
        lambda m0, ve: dk.Budget(m0, ve),
        {"m0": 1e3, "ve": 3e3},
        {"m0": KG, "ve": MPS},
        "vehicles",
        arrays=False,
    ),
    "Budget.add": Case(
        _budget_add,
        {"dv_or_transfer": 500.0, "ve": 3e3, "margin": 0.05},
        {"dv_or_transfer": MPS, "ve": MPS, "margin": ""},
        "vehicles",
        arrays=False,
    ),
    # vehicles, spreads and staging (the vehicles branch)
    "PropulsionSystem": Case(
        lambda ve, propellant, residual: _numbers(dk.PropulsionSystem("main", ve, propellant, residual)),
        {"ve": 3e3, "propellant": 500.0, "residual": 0.02},
        {"ve": MPS, "propellant": KG, "residual": ""},
        "vehicles",
        arrays=False,
    ),
    "Stage": Case(
        lambda dry_mass: _numbers(dk.Stage("carrier", dry_mass)),
        {"dry_mass": 600.0},
        {"dry_mass": KG},
        "vehicles",
        arrays=False,
    ),
    "Normal": Case(
        lambda sigma, mean: dk.Normal(sigma, mean),
        {"sigma": 2.0, "mean": 0.5},
        {"sigma": "", "mean": ""},
        "vehicles",
        arrays=False,
    ),
    "Uniform": Case(
        lambda low, high: dk.Uniform(low, high),
        {"low": -1.0, "high": 1.0},
        {"low": "", "high": ""},
        "vehicles",
        arrays=False,
    ),
    "Triangular": Case(
        lambda low, mode, high: dk.Triangular(low, mode, high),
        {"low": -1.0, "mode": 0.0, "high": 2.0},
        {"low": "", "mode": "", "high": ""},
        "vehicles",
        arrays=False,
    ),
    # stages on the last axis, cases on the leading ones: shapes follow that rule (tests/test_staging.py)
    "optimal_staging": Case(
        dk.optimal_staging,
        {"total_dv": 9000.0, "ve": np.array([2900.0, 3400.0]), "structural_ratio": np.array([0.08, 0.12])},
        {"total_dv": MPS, "ve": MPS, "structural_ratio": ""},
        "vehicles",
        grid=True,
    ),
    # finite burns (the space branch)
    "thrust_arc": Case(
        dk.thrust_arc,
        {"conic": ORBIT, "thrust": 2e4, "ve": 3e3, "m0": 1e3, "dv": 50.0, "nu_center": 0.0, "splits": 1},
        {"thrust": "N", "ve": MPS, "m0": KG, "dv": MPS, "nu_center": RAD, "splits": ""},
        "space",
    ),
    "loss_table": Case(
        lambda conic, ve, m0, dv: dk.loss_table(conic, ve, m0, dv, thrust_to_weight=[1.0], splits=[1]),
        {"conic": ORBIT, "ve": 3e3, "m0": 1e3, "dv": 50.0},
        {"ve": MPS, "m0": KG, "dv": MPS},
        "space",
        arrays=False,
    ),
    # Kepler's equation
    "mean_to_eccentric": Case(dk.mean_to_eccentric, {"M": 1.0, "e": 0.5}, {"M": RAD, "e": ""}),
    "eccentric_to_mean": Case(dk.eccentric_to_mean, {"E": 1.0, "e": 0.5}, {"E": RAD, "e": ""}),
    "mean_to_hyperbolic": Case(dk.mean_to_hyperbolic, {"M": 1.0, "e": 1.5}, {"M": RAD, "e": ""}),
    "hyperbolic_to_mean": Case(dk.hyperbolic_to_mean, {"H": 1.0, "e": 1.5}, {"H": RAD, "e": ""}),
    "mean_motion": Case(dk.mean_motion, {"conic": ORBIT}, {}),
    "mean_anomaly": Case(dk.mean_anomaly, {"conic": ORBIT, "nu": 1.0}, {"nu": RAD}),
    "true_anomaly_from_mean": Case(dk.true_anomaly_from_mean, {"conic": ORBIT, "M": 1.0}, {"M": RAD}),
    "time_of_flight": Case(
        dk.time_of_flight, {"conic": ORBIT, "nu1": 0.0, "nu2": 1.0}, {"nu1": RAD, "nu2": RAD}
    ),
    "propagate": Case(dk.propagate, {"conic": ORBIT, "nu": 0.0, "dt": 100.0}, {"nu": RAD, "dt": S}),
    # ready-made trades (the structure branch)
    "best_burn_point": Case(
        _trade("best_burn_point"),
        {"rp": 7e6, "ra": np.array([9e6, 1.2e7]), "dv": 100.0, "mu": MU},
        {"rp": M, "ra": M, "dv": MPS, "mu": MU_UNIT},
        "structure",
        grid=True,
    ),
    "bielliptic_break_even": Case(
        _trade("bielliptic_break_even"),
        {"r2_ratio": np.array([10.0, 14.0]), "rb_ratio": np.array([20.0, 30.0])},
        {"r2_ratio": "", "rb_ratio": ""},
        "structure",
        grid=True,
    ),
    "propellant_grid": Case(
        _trade("propellant_grid"),
        {"dv": np.array([1e3, 2e3]), "m0": 1e3, "ve": 3e3},
        {"dv": MPS, "m0": KG, "ve": MPS},
        "structure",
        grid=True,
    ),
    # between the planets (the planets branch): dates are TDB seconds here, or dates where marked
    "epoch": Case(_planets(dk.epoch), {"value": DEPART}, {"value": S}, "planets", dates=frozenset({"value"})),
    "planet_state": Case(
        _planets(dk.planet_state),
        {"body": "Mars", "t": DEPART, "center": "Sun", "frame": "ecliptic"},
        {"t": S},
        "planets",
        dates=frozenset({"t"}),
    ),
    # Curtis, Orbital Mechanics for Engineering Students, 3rd ed., Example 5.2 (quoted from memory)
    "lambert": Case(
        dk.lambert,
        {
            "r1": [5000e3, 10000e3, 2100e3],
            "r2": [-14600e3, 2500e3, 7000e3],
            "tof": 3600.0,
            "mu": MU,
            "revolutions": 0,
            "prograde": True,
        },
        {"r1": M, "r2": M, "tof": S, "mu": MU_UNIT},
        "planets",
    ),
    "lambert(revolutions)": Case(
        dk.lambert,
        {"r1": [7000e3, 0.0, 0.0], "r2": [0.0, 8000e3, 0.0], "tof": 4 * 3600.0, "mu": MU, "revolutions": 2},
        {"r1": M, "r2": M, "tof": S, "mu": MU_UNIT},
        "planets",
    ),
    "lambert_time_of_flight": Case(
        dk.lambert_time_of_flight, {"x": 0.3, "lam": 0.5, "revolutions": 0}, {"x": "", "lam": ""}, "planets"
    ),
    "transfer_pair": Case(
        _planets(dk.transfer_pair),
        {"origin": "Earth", "target": "Mars", "departure": DEPART, "arrival": ARRIVE},
        {"departure": S, "arrival": S},
        "planets",
        dates=frozenset({"departure", "arrival"}),
    ),
    "transfer_pair(orbits)": Case(
        lambda parking, arrival_orbit: _planets(dk.transfer_pair)(
            origin="Earth",
            target="Mars",
            departure=DEPART,
            arrival=ARRIVE,
            parking=parking,
            arrival_orbit=arrival_orbit,
        ),
        {"parking": EARTH_PARKING, "arrival_orbit": MARS_ORBIT},
        {"parking": M, "arrival_orbit": M},
        "planets",
        arrays=False,  # one orbit about each body
    ),
    "transfer_map": Case(
        _planets(dk.transfer_map),
        {
            "origin": "Earth",
            "target": "Mars",
            "departures": np.array([DEPART, DEPART + 10 * DAY]),
            "arrivals": np.array([ARRIVE, ARRIVE + 10 * DAY, ARRIVE + 20 * DAY]),
        },
        {"departures": S, "arrivals": S},
        "planets",
        grid=True,
    ),
    "add_transfer": Case(_add_transfer, {"margin": 0.05}, {"margin": ""}, "planets", arrays=False),
}

#: Public names that are not numeric functions of values, and why.
NOT_NUMERIC = {
    "BurnOutcome": "a result type",
    "Transfer": "a result type",
    "Flyby": "a result type",
    "EnergySplit": "a result type",
    "ArcOutcome": "a result type",
    "PlaneChangeBurns": "a result type",
    "InclinationChange": "a result type",
    "sweep": "takes a function and axes; its boundary is the function's own",
    "save_sweep": "writes a dataset to a path (the files tests)",
    "open_sweep": "reads a path (the files tests)",
    "BudgetLine": "a record of one budget line (its numbers are checked by Budget)",
    "SystemUsage": "a result type",
    "StagingSplit": "a result type",
    "MarginPolicy": "tables of fractions by name (tests/test_vehicles.py, the margins doctests)",
    "disperse": "takes a budget and spreads, each checked by its own Case (tests/test_dispersions.py)",
    "report": "writes documents (tests/test_reports.py)",
    "LambertSolution": "a result type",
    "TransferPair": "a result type",
}


def test_every_public_name_is_covered():
    covered = {name.partition(".")[0].partition("(")[0] for name in CASES}
    missing = sorted(set(dk._NAMES) - covered - set(NOT_NUMERIC))
    assert not missing, f"add a Case for each new public function to tests/test_boundary.py: {missing}"


#: The planets' parameters that are names, choices or counts, not numbers: each refusal names it.
CHOICES = [
    ("epoch", {"scale": "gps"}, "scale"),
    ("epoch", {"scale": 3}, "scale"),
    ("epoch", {"value": "2028-02-30"}, "value"),  # no such day
    ("epoch", {"value": "2028-11-15T24:00:01"}, "value"),
    ("planet_state", {"body": 499}, "body"),  # a NAIF code is not a name here
    ("planet_state", {"center": None}, "center"),
    ("planet_state", {"frame": "galactic"}, "frame"),
    ("planet_state", {"t": "2028-13-01"}, "t"),
    ("planet_state", {"t": "1850-01-01"}, "t"),  # before DE421
    ("lambert", {"revolutions": 1.0}, "revolutions"),
    ("lambert", {"revolutions": True}, "revolutions"),
    ("lambert", {"prograde": 1}, "prograde"),
    ("lambert", {"r1": [7e6, 0.0]}, "r1"),
    ("lambert", {"r2": [0.0, 0.0, 0.0]}, "r2"),
    ("lambert_time_of_flight", {"revolutions": "1"}, "revolutions"),
    ("lambert_time_of_flight", {"x": -1.0}, "x"),
    ("lambert_time_of_flight", {"lam": 1.5}, "lam"),
    ("transfer_pair", {"origin": 3}, "origin"),
    ("transfer_pair", {"target": "Sun"}, "target"),
    ("transfer_pair", {"departure": "next spring"}, "departure"),
    ("transfer_pair", {"arrival": "2060-01-01"}, "arrival"),  # after DE421
    ("transfer_map", {"origin": "Pluto"}, "origin"),
    ("transfer_map", {"departures": ["2028-13-01"]}, "departures"),
    ("transfer_map", {"arrivals": ["2060-01-01"]}, "arrivals"),
]


@pytest.mark.parametrize("case_name, changes, param", CHOICES, ids=lambda v: str(v))
def test_names_choices_and_counts_are_refused_naming_the_parameter(case_name, changes, param):
    with pytest.raises((TypeError, dk.DomainError)) as info:
        _call(CASES[case_name], **changes)
    assert f"`{param}`" in str(info.value), str(info.value)


@pytest.mark.parametrize("branch", [2, True, 1.0, "1"])
def test_transfer_pair_branch_is_zero_or_one(branch):
    with pytest.raises(dk.DomainError, match="`branch`"):
        _call(CASES["transfer_pair"], revolutions=1, branch=branch)


# ---------------------------------------------------------------------- hostile values
def _text(good):
    return str(good)


HOSTILE: dict[str, Callable[[Any], Any]] = {
    "text": _text,
    "text-array": lambda good: np.array([str(good)]),
    "bytes": lambda good: str(good).encode(),
    "bool": lambda good: True,
    "numpy-bool": lambda good: np.True_,
    "bool-array": lambda good: np.array([True, False]),
    "datetime": lambda good: datetime.datetime(2030, 1, 1),
    "date": lambda good: datetime.date(2030, 1, 1),
    "timedelta": lambda good: datetime.timedelta(seconds=100),
    "datetime64": lambda good: np.datetime64("2030-01-01"),
    # a zero imaginary part must not pass silently either
    "complex": lambda good: complex(good, 0.0) if np.ndim(good) == 0 else np.asarray(good) + 0j,
    "complex-array": lambda good: np.array([good, good], dtype=complex),
    "huge-int": lambda good: 10**400,
    "huge-int-list": lambda good: [10**400],
    "None": lambda good: None,
    "object": lambda good: object(),
}
#: Kinds refused outright: a TypeError or DomainError naming the parameter.
REFUSED = sorted(HOSTILE)
#: Kinds that are dates: read as UTC dates where a parameter takes dates (Case.dates), refused elsewhere.
DATE_KINDS = {"datetime", "date", "datetime64"}
#: Parameters where None means "not given".
OPTIONAL = {
    ("escape_burn", "ra"),
    ("capture_burn", "ra"),
    ("Budget.add", "ve"),
    ("Budget.add", "margin"),  # None: the margin policy's, by the line's category
    ("Budget", "ve"),  # None: the systems are declared with Budget.system
    ("PropulsionSystem", "propellant"),  # None: the tank holds what the start mass leaves
    ("transfer_pair(orbits)", "parking"),  # None: no escape burn
    ("transfer_pair(orbits)", "arrival_orbit"),  # None: no capture burn
    ("add_transfer", "margin"),  # None: the margin policy's, as Budget.add
}
EXTREMES = {"1e300": 1e300, "1e-300": 1e-300, "-1e300": -1e300}

#: A unit of the same dimension as each SI unit, of another size (so a bare number reads wrong).
_SCALED = {
    "m": ("km", 1e3),
    "m/s": ("km/s", 1e3),
    "m^3/s^2": ("km**3/s**2", 1e9),
    "rad": ("deg", math.pi / 180.0),
    "kg": ("g", 1e-3),
    "s": ("min", 60.0),
    "N": ("kN", 1e3),
    "": ("percent", 1e-2),
}
_WRONG_DIMENSION = {"m": "s", "m/s": "m", "m^3/s^2": "m", "rad": "m", "kg": "s", "s": "m", "N": "kg", "": "m"}


def _numeric(case: Case) -> list[str]:
    return [name for name in case.good if name in case.units]


def _cases(kinds):
    for case_name, case in CASES.items():
        for param in _numeric(case):
            for kind in kinds:
                yield case_name, param, kind


# ---------------------------------------------------------------------- known failures of other branches
QUANTITIES = ["quantity-astropy", "quantity-pint"]
WRONG_DIMENSIONS = ["wrong-dimension-astropy", "wrong-dimension-pint"]


def _known() -> dict[tuple[str, str, str], str]:
    """(case, parameter, kind) -> owner, for the failures found in modules other branches own.

    Each entry is a promise not yet kept there; the test is a strict xfail, so
    it turns red when fixed and must be taken off this list.
    """
    known: dict[tuple[str, str, str], str] = {}

    def fails(case: str, params: list[str] | None, kinds: list[str]) -> None:
        for param in params or _numeric(CASES[case]):
            for kind in kinds:
                known[(case, param, kind)] = CASES[case].owner

    # space: conics, burns, finite burns: nothing left
    # vehicles: budgets check their numbers with the shared checks now (deltakit._scalars): nothing left
    # structure: trades over sweeps check their inputs at the start: none left
    return known


#: Calls that once took tens of seconds (thrust 1e-300 N: the issue's "runs for minutes"); thrust_arc
#: now refuses them at once (its stated bounds), and the short timeout keeps it so.
SLOW = {("thrust_arc", "m0", "1e300"), ("thrust_arc", "thrust", "1e-300")}
#: Cases that take seconds (marked slow, left out of the quick loop).
LONG = SLOW | {("thrust_arc", "dv", "1e300"), ("loss_table", "dv", "1e300")}


KNOWN = _known()


def _params(kinds):
    for case_name, param, kind in _cases(kinds):
        marks = []
        owner = KNOWN.get((case_name, param, kind))
        if owner is not None:
            marks.append(pytest.mark.xfail(strict=True, reason=f"owned by the {owner} branch"))
        if (case_name, param, kind) in LONG:
            marks.append(pytest.mark.slow)
        if (case_name, param, kind) in SLOW:
            marks.append(pytest.mark.timeout(5))
        yield pytest.param(case_name, param, kind, id=f"{case_name}-{param}-{kind}", marks=marks)


def _call(case: Case, **changes: Any) -> Any:
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # any warning at the boundary is a failure
        return case.call(**{**case.good, **changes})


def _names_the_parameter(error: BaseException, param: str) -> bool:
    return f"`{param}`" in str(error)


# ---------------------------------------------------------------------- refused kinds
@pytest.mark.parametrize("case_name, param, kind", list(_params(REFUSED)))
def test_hostile_input_is_refused_naming_the_parameter(case_name, param, kind):
    case = CASES[case_name]
    if kind == "None" and (case_name, param) in OPTIONAL:
        pytest.skip("None is the default of this parameter: not given")
    if kind in DATE_KINDS and param in case.dates:  # a date here is a value: read as UTC, as epoch reads it
        date = HOSTILE[kind](case.good[param])
        _same_result(_call(case, **{param: date}), _call(case, **{param: dk.epoch(date)}))
        return
    with pytest.raises((TypeError, dk.DomainError)) as info:
        _call(case, **{param: HOSTILE[kind](case.good[param])})
    assert _names_the_parameter(info.value, param), str(info.value)


@pytest.mark.parametrize("case_name, param, kind", list(_params(["masked"])))
def test_masked_arrays_are_refused_not_unmasked(case_name, param, kind):
    case = CASES[case_name]
    values = _with_shape(case.good[param], 2)
    mask = np.zeros(values.shape, dtype=bool)
    mask[0] = True
    masked = np.ma.masked_array(values, mask=mask)
    with pytest.raises(dk.DomainError) as info:
        _call(case, **{param: masked})
    assert _names_the_parameter(info.value, param) and "masked" in str(info.value)


# ---------------------------------------------------------------------- quantities
def _quantity(library: str, value: Any, unit: str) -> Any:
    if library == "astropy":
        return np.asarray(value, dtype=float) * u.Unit(unit)
    return ureg.Quantity(np.asarray(value, dtype=float), unit)


def _same_result(a: Any, b: Any, rtol: float = 1e-13) -> None:
    if is_dataclass(a):
        for field in fields(a):
            _same_result(getattr(a, field.name), getattr(b, field.name), rtol)
    elif isinstance(a, tuple):
        for x, y in zip(a, b, strict=True):
            _same_result(x, y, rtol)
    elif isinstance(a, dk.Budget):
        _same_result((a.m0, a.ve, a.total_dv, a.propellant), (b.m0, b.ve, b.total_dv, b.propellant), rtol)
    elif hasattr(a, "data_vars"):  # an xarray Dataset
        for name in a.data_vars:
            _same_result(a[name].values, b[name].values, rtol)
    elif hasattr(a, "to_numpy"):  # a pandas DataFrame
        _same_result(a.to_numpy(dtype=float), b.to_numpy(dtype=float), rtol)
    elif isinstance(a, str) or np.asarray(a).dtype.kind in "Mb":  # names, dates, flags: exactly
        np.testing.assert_array_equal(a, b)
    else:
        assert_same_to_rounding(a, b, rtol)


@pytest.mark.parametrize("case_name, param, kind", list(_params(["quantity-astropy", "quantity-pint"])))
def test_a_quantity_is_read_in_si(case_name, param, kind):
    case = CASES[case_name]
    if param == "splits":
        pytest.skip("a whole number of burns: a quantity of it is not a count")
    unit, size = _SCALED[case.units[param]]
    value = np.asarray(case.good[param], dtype=float)
    expected = _call(case)
    got = _call(case, **{param: _quantity(kind.partition("-")[2], value / size, unit)})
    _same_result(got, expected)


@pytest.mark.parametrize(
    "case_name, param, kind", list(_params(["wrong-dimension-astropy", "wrong-dimension-pint"]))
)
def test_a_quantity_of_another_dimension_is_refused(case_name, param, kind):
    case = CASES[case_name]
    library = kind.rpartition("-")[2]
    wrong = _quantity(library, case.good[param], _WRONG_DIMENSION[case.units[param]])
    with pytest.raises(dk.DomainError) as info:
        _call(case, **{param: wrong})
    assert _names_the_parameter(info.value, param), str(info.value)


# ---------------------------------------------------------------------- shapes
def _with_shape(value: Any, n: int) -> np.ndarray:
    value = np.asarray(value, dtype=float)
    return np.broadcast_to(value, (n, *value.shape)).copy()


@pytest.mark.parametrize("case_name, param, kind", list(_params(["shape"])))
def test_shapes_that_do_not_broadcast_name_the_parameters(case_name, param, kind):
    case = CASES[case_name]
    if not case.arrays:
        pytest.skip("one number per parameter: arrays are refused (checked below)")
    if case.grid:
        pytest.skip("axes of a grid: any lengths are welcome")
    others = [p for p in _numeric(case) if p != param]
    if not others and "conic" not in case.good:
        pytest.skip("a single parameter always broadcasts")
    changes = {param: _with_shape(case.good[param], 4)}
    if others:
        changes[others[0]] = _with_shape(case.good[others[0]], 3)
        other = others[0]
    else:  # the conic's elements against the parameter
        changes["conic"] = dk.Conic.from_apsides(7000e3, np.full(3, 9000e3), MU)
        other = "conic"
    with pytest.raises(dk.DomainError) as info:
        _call(case, **changes)
    message = str(info.value)
    assert f"`{param}`" in message and f"`{other}`" in message and "(4" in message and "(3" in message, (
        message
    )


@pytest.mark.parametrize(
    "case_name",
    [name for name, case in CASES.items() if not case.arrays],
)
def test_one_number_parameters_refuse_arrays(case_name):
    case = CASES[case_name]
    for param in _numeric(case):
        with pytest.raises(dk.DomainError, match=f"`{param}`"):
            _call(case, **{param: np.full(3, case.good[param])})


# ---------------------------------------------------------------------- extremes
@pytest.mark.parametrize("case_name, param, kind", list(_params(EXTREMES)))
def test_extreme_values_leak_no_warning(case_name, param, kind):
    case = CASES[case_name]
    value = EXTREMES[kind]
    good = np.asarray(case.good[param], dtype=float)
    extreme = value if good.ndim == 0 else np.full(good.shape, value)
    try:
        _call(case, **{param: extreme})
    except dk.DomainError as error:  # nonsense (a negative radius) or a broken relation: named
        assert any(_names_the_parameter(error, p) for p in case.good), str(error)


# ---------------------------------------------------------------------- inputs untouched
@pytest.mark.parametrize(
    "case_name", sorted(name for name, case in CASES.items() if case.arrays and _numeric(case))
)
def test_inputs_are_never_changed(case_name):
    case = CASES[case_name]
    if case.grid:  # axes stay axes
        arrays = {p: np.array(case.good[p], dtype=float) for p in _numeric(case)}
    else:
        arrays = {p: _with_shape(case.good[p], 2) for p in _numeric(case)}
    if case_name == "thrust_arc":
        arrays["splits"] = np.array([1, 2])
    before = {p: a.copy() for p, a in arrays.items()}
    for a in arrays.values():
        a.flags.writeable = False  # an attempt to write would raise, not pass unseen
    _call(case, **arrays)
    for p, a in arrays.items():
        np.testing.assert_array_equal(a, before[p], err_msg=p)


# ---------------------------------------------------------------------- scalar fast path = array path
#: The functions with a scalar fast path (this branch's modules).
FAST = sorted(name for name, case in CASES.items() if case.owner == "boundary" and "conic" not in case.good)


def _value(unit: str) -> st.SearchStrategy[float]:
    realistic = {
        "m": st.floats(1e5, 1e12),
        "m/s": st.floats(-2e4, 5e4),
        "m^3/s^2": st.floats(1e9, 2e20),
        "rad": st.floats(-10.0, 10.0),
        "kg": st.floats(1.0, 1e6),
        "s": st.floats(0.0, 1e5),
        "": st.floats(0.0, 3.0),
    }[unit]
    anything = st.floats(allow_nan=True, allow_infinity=True)
    return st.one_of(
        realistic,
        realistic,
        anything,
        st.integers(-(10**6), 10**6),
        st.sampled_from([0.0, -0.0, 1.0, 10**400]),
    )


def _outcome(call: Callable[[], Any]) -> tuple[str, Any]:
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            return "value", call()
    except (dk.DomainError, TypeError) as error:
        return "error", (type(error), str(error))


@pytest.mark.parametrize("case_name", FAST)
@given(data=st.data())
def test_scalar_path_equals_array_path(case_name, data):
    # The same numbers as plain floats (the fast path) and as 0-d arrays (the
    # array path): the same error with the same message, or the same result to
    # rounding (see tests/_rounding.py), NumPy scalars both.
    case = CASES[case_name]
    values = {p: data.draw(_value(case.units[p]), label=p) for p in _numeric(case)}
    fast = _outcome(lambda: case.call(**values))
    slow = _outcome(lambda: case.call(**{p: np.asarray(v) for p, v in values.items()}))
    assert fast[0] == slow[0], (fast, slow)
    if fast[0] == "error":
        assert fast[1] == slow[1]
        return
    _same_result(fast[1], slow[1], rtol=1e-14)
    for x in _leaves(fast[1]):
        assert type(x) is np.float64, type(x)


def _leaves(result: Any) -> list[Any]:
    if is_dataclass(result):
        return [leaf for field in fields(result) for leaf in _leaves(getattr(result, field.name))]
    if isinstance(result, tuple):
        return [leaf for part in result for leaf in _leaves(part)]
    return [result]


# ---------------------------------------------------------------------- extremes against mpmath
# The closed forms at 1e300 and 1e-300, evaluated by mpmath at 60 digits from
# the same float inputs: the right answer where it fits a double, inf where not.
def _mp(function):
    def exact(*args):
        with mpmath.workdps(60):
            value = function(*(mpmath.mpf(a) for a in args))
            return (
                float(value)
                if abs(value) < mpmath.mpf("1.7976931348623157e308")
                else math.copysign(math.inf, value)
            )

    return exact


EXACT = {
    "circular_speed": (dk.circular_speed, _mp(lambda r, mu: mpmath.sqrt(mu / r))),
    "escape_speed": (dk.escape_speed, _mp(lambda r, mu: mpmath.sqrt(2 * mu / r))),
    "vis_viva": (dk.vis_viva, _mp(lambda r, a, mu: mpmath.sqrt(mu * (2 / r - 1 / a)))),
    "specific_energy": (dk.specific_energy, _mp(lambda r, v, mu: v * v / 2 - mu / r)),
    "plane_change": (dk.plane_change, _mp(lambda v, angle: 2 * v * mpmath.sin(angle / 2))),
    "propulsive_efficiency": (
        dk.propulsive_efficiency,
        _mp(lambda v, ve: 2 * (v / ve) / (1 + (v / ve) ** 2)),
    ),
    "rocket_dv": (dk.rocket_dv, _mp(lambda ve, m0, mf: ve * mpmath.log(m0 / mf))),
    "propellant_mass(mf)": (
        lambda dv, ve, mf: dk.propellant_mass(dv, ve, mf=mf),
        _mp(lambda dv, ve, mf: mf * mpmath.expm1(dv / ve)),
    ),
    "escape_burn": (
        dk.escape_burn,
        _mp(lambda rp, vinf, mu: mpmath.sqrt(vinf**2 + 2 * mu / rp) - mpmath.sqrt(mu / rp)),
    ),
    "hohmann": (
        lambda r1, r2, mu: dk.hohmann(r1, r2, mu).total,
        _mp(
            lambda r1, r2, mu: (
                (
                    mpmath.sqrt(mu / r1) * (mpmath.sqrt(2 * r2 / (r1 + r2)) - 1)
                    + mpmath.sqrt(mu / r2) * (1 - mpmath.sqrt(2 * r1 / (r1 + r2)))
                )
                * mpmath.sign(r2 - r1)
            )
        ),
    ),
}
EXTREME_INPUTS = {
    "circular_speed": [(1e-300, MU), (1e300, 1e-300), (1e-300, 1e300), (7e6, 1e-300)],
    "escape_speed": [(1e-300, MU), (1e300, 1e-300), (1e-300, 1e300)],
    "vis_viva": [(1e-300, 1e-300, 1e300), (1e300, -1e300, 1e-300), (7e6, 1e300, 1e-300), (1e-300, 1e300, MU)],
    "specific_energy": [
        (7e6, 1e300, MU),
        (1e-300, 1e-300, MU),
        (1e300, 1e-300, 1e-300),
        (1e-300, 1e200, 1e100),
    ],
    "plane_change": [(1e300, 0.3), (1e-300, 1e-300), (1e300, 1e-300)],
    "propulsive_efficiency": [(1e300, 1e-300), (1e-300, 1e300), (-1e300, 3e3), (3e3, 1e300)],
    "rocket_dv": [(1e300, 1e300, 1e-300), (1e-300, 1.0, 1.0 - 1e-16), (3e3, 1e300, 1.0)],
    "propellant_mass(mf)": [(1e-300, 1e-300, 1e300), (1e-300, 3e3, 1e300), (1.0, 1e300, 1e-300)],
    "escape_burn": [(1e-300, 0.0, MU), (1e300, 3e3, 1e-300), (7e6, 1e300, MU), (7e6, 1e-300, 1e-300)],
    "hohmann": [(1e-300, 1e300, MU), (1e-300, 2e-300, 1e-300), (1e300, 1.5e300, 1e300)],
}


@pytest.mark.skipif(np.finfo(np.longdouble).maxexp <= 1024, reason="no extended long double on this platform")
@pytest.mark.parametrize(
    "name, args", [(name, args) for name, cases in EXTREME_INPUTS.items() for args in cases], ids=str
)
def test_extreme_inputs_give_the_right_answer(name, args):
    function, exact = EXACT[name]
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        got = function(*args)
        got_array = function(*(np.full(2, a) for a in args))
    expected = exact(*args)
    assert float(got) == pytest.approx(expected, rel=1e-14, abs=0.0)
    np.testing.assert_array_equal(got_array, [got, got])
