"""Launch windows: Lambert transfers over a grid of departure and arrival dates.

:func:`transfer_map` solves Lambert's problem about the Sun between two
bodies of DE421 for every pair of a departure date and an arrival date and
returns the map an analyst reads a window from: the departure energy C3, the
direction of the departure asymptote, the arrival excess speed and, given the
orbits and a vehicle, the delta-v and the propellant each pair costs.
:func:`transfer_pair` gives the same readouts for chosen dates (what a
date-choosing panel shows), and :func:`add_transfer` books a pair's
departure and arrival burns as two lines of a :class:`~deltakit.Budget`.

Conventions
-----------
* The transfer is a heliocentric conic from the origin's centre at departure
  to the target's centre at arrival (patched conics: the bodies' own wells
  are left to the escape and capture burns). Positions come from
  :func:`deltakit.planet_state` in the ecliptic of J2000.
* ``c3`` is the square of the departure excess speed ``|v1 - v_origin|``,
  m^2/s^2 (analysts quote km^2/s^2: divide by ``deltakit.units.km2_per_s2``).
* Asymptote directions are declination and right ascension on ICRF axes
  (the Earth's mean equator and equinox of J2000), as launch-vehicle tables
  give them, for the arrival too; rad.
* Orbits (``parking`` about the origin, ``arrival_orbit`` about the target)
  are given as a radius (a circular orbit, m), a pair ``(rp, ra)`` of
  periapsis and apoapsis radii (m), or a :class:`~deltakit.Conic` about that
  body. Burns are made at periapsis along the velocity
  (:func:`deltakit.escape_burn`, :func:`deltakit.capture_burn`).
* Vehicles: ``(m0, ve)`` or ``(m0, ve, propellant_load)`` in kg and m/s, an
  object with ``wet_mass``, ``exhaust_velocity`` and ``propellant_mass``
  (the vehicles of :mod:`deltakit.demo`), or a :class:`~deltakit.Budget`,
  whose lines are spent first: the transfer burns start from its final
  mass, and its ``dry_mass`` (when given) bounds the tank.
* Pairs whose arrival is not after the departure, and pairs with no Lambert
  solution, are NaN (``affordable`` False).
* SI units throughout; every variable of the map carries its unit in
  ``attrs["units"]``.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import broadcast_shape, positive, require
from ._results import Result, quantity
from .conic import Conic
from .constants import SUN, CentralBody
from .departure import capture_burn, escape_burn
from .ephemeris import _times as ephemeris_times
from .ephemeris import body_name, central_body, ecliptic_rotation, planet_state
from .errors import DomainError
from .lambert_solver import _velocities, checked_prograde, checked_revolutions
from .timescales import tdb_seconds, to_datetime64
from .units import is_quantity

if TYPE_CHECKING:  # the `scale` extra; the sweep imports it at run time
    import xarray

__all__ = ["BRANCHES", "TransferPair", "add_transfer", "transfer_map", "transfer_pair"]

#: Names of the two solutions of a multi-revolution map, in the order of :func:`deltakit.lambert`.
BRANCHES = ("short period", "long period")

_UNITS = {
    "c3": "m^2/s^2",
    "departure_vinf": "m/s",
    "departure_declination": "rad",
    "departure_right_ascension": "rad",
    "arrival_vinf": "m/s",
    "arrival_declination": "rad",
    "arrival_right_ascension": "rad",
    "time_of_flight": "s",
    "transfer_angle": "rad",
    "escape_dv": "m/s",
    "capture_dv": "m/s",
    "total_dv": "m/s",
    "propellant": "kg",
    "affordable": "",
}


# ---------------------------------------------------------------------- orbits and vehicles
@dataclass(frozen=True)
class _Orbit:
    rp: float
    ra: float | None
    mu: float


def _orbit_about(spec: Any, body: CentralBody, name: str) -> _Orbit | None:
    """A parking or arrival orbit as (rp, ra or None, mu of the body)."""
    if spec is None:
        return None
    if isinstance(spec, Conic):
        e = float(np.max(spec.e))
        if np.ndim(spec.rp) or e >= 1.0:
            raise DomainError(f"`{name}` must be one closed orbit (a Conic with e < 1), got e = {e}")
        if not np.isclose(float(spec.mu), body.mu, rtol=1e-6):
            raise DomainError(
                f"`{name}` is a Conic with mu = {float(spec.mu):.10g} m^3/s^2, but it must orbit "
                f"{body.name} (mu = {body.mu:.10g} m^3/s^2)"
            )
        rp, ra = float(spec.rp), (float(spec.ra) if e > 0.0 else None)
    elif isinstance(spec, (tuple, list)):
        if len(spec) != 2:
            raise DomainError(f"`{name}` as a pair must be (rp, ra) in m, got {len(spec)} values")
        rp = float(positive(spec[0], f"{name}[0] (rp)", "m"))
        ra = float(positive(spec[1], f"{name}[1] (ra)", "m"))
        require(ra, ra < rp, f"{name}[1] (ra)", f">= rp = {rp} m (apoapsis at or beyond periapsis)")
    else:
        value = positive(spec, name, "m")
        if value.ndim:
            raise DomainError(f"`{name}` must be one radius, m, not an array of shape {value.shape}")
        rp, ra = float(value), None
    if rp <= body.radius:
        raise DomainError(
            f"`{name}` periapsis radius must be above {body.name}'s radius {body.radius:.7g} m, got "
            f"{rp:.7g} m: give a radius from the centre, not an altitude"
        )
    return _Orbit(rp, ra, body.mu)


@dataclass(frozen=True)
class _Tank:
    m0: float
    ve: float
    capacity: float  # usable propellant, kg; NaN when unknown


def _tank_of(vehicle: Any) -> _Tank | None:
    if vehicle is None:
        return None
    if hasattr(vehicle, "final_mass") and hasattr(vehicle, "propellant_left"):  # a Budget
        m0 = float(vehicle.final_mass)
        if not np.isfinite(m0):
            raise DomainError("`vehicle` is a Budget that is already infeasible (it runs dry before its end)")
        return _Tank(m0, float(vehicle.ve), float(vehicle.propellant_left))
    if all(hasattr(vehicle, key) for key in ("wet_mass", "exhaust_velocity", "propellant_mass")):
        return _Tank(float(vehicle.wet_mass), float(vehicle.exhaust_velocity), float(vehicle.propellant_mass))
    if isinstance(vehicle, (tuple, list)) and len(vehicle) in (2, 3):
        m0 = float(positive(vehicle[0], "vehicle[0] (m0)", "kg"))
        ve = float(positive(vehicle[1], "vehicle[1] (ve)", "m/s"))
        capacity = np.nan
        if len(vehicle) == 3:
            capacity = float(positive(vehicle[2], "vehicle[2] (propellant load)", "kg"))
            require(capacity, capacity > m0, "vehicle[2] (propellant load)", f"<= m0 = {m0} kg", "")
        return _Tank(m0, ve, capacity)
    raise DomainError(
        "`vehicle` must be (m0, ve), (m0, ve, propellant_load), a deltakit.demo.Vehicle or a "
        f"deltakit.Budget; got {type(vehicle).__name__}"
    )


# ---------------------------------------------------------------------- the fields of one set of pairs
def _angles(v_icrf: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    speed = np.sqrt(np.einsum("...i,...i->...", v_icrf, v_icrf))
    with np.errstate(invalid="ignore", divide="ignore"):
        declination = np.arcsin(np.clip(v_icrf[..., 2] / speed, -1.0, 1.0))
    right_ascension = np.arctan2(v_icrf[..., 1], v_icrf[..., 0]) % (2.0 * np.pi)
    return speed, declination, right_ascension


def _pair_fields(
    t_departure: np.ndarray,
    t_arrival: np.ndarray,
    *,
    origin: str,
    target: str,
    revolutions: int = 0,
    prograde: bool = True,
    parking: _Orbit | None = None,
    arrival_orbit: _Orbit | None = None,
    tank: _Tank | None = None,
) -> dict[str, np.ndarray]:
    """Every readout for departure and arrival times that broadcast together (TDB s)."""
    r_origin, v_origin = planet_state(origin, t_departure)
    r_target, v_target = planet_state(target, t_arrival)
    tof = np.asarray(t_arrival - t_departure, dtype=float)
    with np.errstate(invalid="ignore"):
        tof = np.where(tof > 0.0, tof, np.nan)
    v1, v2, angle = _velocities(r_origin, r_target, tof, SUN.mu, revolutions, prograde)
    to_icrf = ecliptic_rotation()  # ICRF -> ecliptic; its rows turn ecliptic vectors back
    departure = (v1 - v_origin) @ to_icrf
    arrival = (v2 - v_target) @ to_icrf
    vinf_out, dec_out, ra_out = _angles(departure)
    vinf_in, dec_in, ra_in = _angles(arrival)
    fields = {
        "c3": vinf_out * vinf_out,
        "departure_vinf": vinf_out,
        "departure_declination": dec_out,
        "departure_right_ascension": np.where(np.isfinite(vinf_out), ra_out, np.nan),
        "arrival_vinf": vinf_in,
        "arrival_declination": dec_in,
        "arrival_right_ascension": np.where(np.isfinite(vinf_in), ra_in, np.nan),
        "time_of_flight": np.broadcast_to(tof, vinf_out.shape),
        "transfer_angle": np.broadcast_to(np.where(np.isfinite(tof), angle, np.nan), vinf_out.shape),
    }
    burns = []
    if parking is not None:
        with np.errstate(invalid="ignore"):
            fields["escape_dv"] = _burn(escape_burn, parking, vinf_out)
        burns.append(fields["escape_dv"])
    if arrival_orbit is not None:
        fields["capture_dv"] = _burn(capture_burn, arrival_orbit, vinf_in)
        burns.append(fields["capture_dv"])
    if burns:
        fields["total_dv"] = sum(burns[1:], burns[0])
    if tank is not None:
        fields["propellant"] = tank.m0 * -np.expm1(-fields["total_dv"] / tank.ve)
        if np.isfinite(tank.capacity):
            with np.errstate(invalid="ignore"):
                fields["affordable"] = fields["propellant"] <= tank.capacity
    return fields


def _burn(function: Any, orbit: _Orbit, vinf: np.ndarray) -> np.ndarray:
    """An escape or capture burn where the excess speed exists, NaN elsewhere."""
    known = np.isfinite(vinf)
    dv = function(orbit.rp, np.where(known, vinf, 0.0), orbit.mu, orbit.ra)
    return np.where(known, dv, np.nan)


def _check_bodies(origin: Any, target: Any) -> tuple[str, str]:
    origin_name, target_name = body_name(origin, "origin"), body_name(target, "target")
    for name, value in (("origin", origin_name), ("target", target_name)):
        if value in ("Sun", "Moon"):
            raise DomainError(f"`{name}` must be a planet (the transfer is about the Sun), got {value}")
    if origin_name == target_name:
        raise DomainError(f"`origin` and `target` must differ, both are {origin_name}")
    return origin_name, target_name


def _check_common(
    origin: Any, target: Any, revolutions: Any, parking: Any, arrival_orbit: Any, vehicle: Any, prograde: Any
) -> dict[str, Any]:
    origin_name, target_name = _check_bodies(origin, target)
    settings = {
        "origin": origin_name,
        "target": target_name,
        "revolutions": checked_revolutions(revolutions),
        "prograde": checked_prograde(prograde),
        "parking": _orbit_about(parking, central_body(origin_name), "parking"),
        "arrival_orbit": _orbit_about(arrival_orbit, central_body(target_name), "arrival_orbit"),
        "tank": _tank_of(vehicle),
    }
    if settings["tank"] is not None and settings["parking"] is None and settings["arrival_orbit"] is None:
        raise DomainError(
            "`vehicle` needs `parking` and/or `arrival_orbit`: the propellant is that of their burns"
        )
    return settings


def _dates(values: Any, name: str) -> tuple[np.ndarray, np.ndarray]:
    """A 1-D axis of dates: (the coordinate as given, TDB seconds inside DE421's span)."""
    if is_quantity(values) or isinstance(values, np.ma.MaskedArray):  # read in seconds, or refused
        array = np.asarray(tdb_seconds(values, name), dtype=float)
    else:
        array = np.asarray(values)
    if array.ndim != 1 or array.size == 0:
        raise DomainError(f"`{name}` must be a 1-D sequence of dates, got shape {array.shape}")
    seconds = ephemeris_times(array, name)  # dates outside DE421 fail here, not later inside a lazy block
    if array.dtype.kind in "USO":
        coordinate = np.asarray([np.datetime64(to_datetime64(t), "s") for t in seconds.tolist()])
    else:
        coordinate = array
    return coordinate, seconds


# ---------------------------------------------------------------------- public
def _map_block(departure_tdb: np.ndarray, arrival_tdb: np.ndarray, **settings: Any) -> dict[str, np.ndarray]:
    """The sweep's function: open grids of TDB seconds in, the map's fields out."""
    fields = _pair_fields(departure_tdb.ravel()[:, None], arrival_tdb.ravel()[None, :], **settings)
    if settings.get("revolutions", 0) == 0:
        return fields
    return {f"{key}__{k}": value[k] for key, value in fields.items() for k in range(2)}


def transfer_map(
    origin: Any,
    target: Any,
    departures: ArrayLike,
    arrivals: ArrayLike,
    *,
    revolutions: int = 0,
    parking: Any = None,
    arrival_orbit: Any = None,
    vehicle: Any = None,
    chunks: Any = None,
    prograde: bool = True,
) -> xarray.Dataset:
    """Departure energy, arrival speed and their cost over departure x arrival dates.

    Parameters
    ----------
    origin, target : str or CentralBody
        Planets of DE421 (``"Earth"``, ``"Mars"``...), different.
    departures, arrivals : array_like of dates, shape (n,) and (m,)
        numpy.datetime64 (kept as the coordinates; xarray holds day-resolution
        dates at its coarsest resolution, seconds, with the same values), ISO
        text, datetime, or TDB seconds past J2000.
    revolutions : int, optional
        Full turns about the Sun on the way (default 0). For more than 0 the
        map gains a ``branch`` dimension (``BRANCHES``: the shorter- and the
        longer-period solution).
    parking : float, (rp, ra) or Conic, optional
        Parking orbit about the origin (module notes); adds ``escape_dv``.
    arrival_orbit : float, (rp, ra) or Conic, optional
        Orbit captured into at the target; adds ``capture_dv``.
    vehicle : tuple, Vehicle or Budget, optional
        Adds ``propellant`` (kg) for ``total_dv`` and, when the tank's
        propellant load is known, ``affordable``.
    chunks : optional
        As :func:`deltakit.sweep`: maps above ``deltakit.sweeps.EAGER_LIMIT``
        pairs, or any map with ``chunks`` given, come back lazy (dask).
    prograde : bool, optional
        Transfers that move counterclockwise seen from the ecliptic north (default).

    Returns
    -------
    xarray.Dataset
        Dimensions ``departure``, ``arrival`` (and ``branch``): ``c3``
        (m^2/s^2), ``departure_vinf``, ``departure_declination``,
        ``departure_right_ascension``, ``arrival_vinf``,
        ``arrival_declination``, ``arrival_right_ascension``,
        ``time_of_flight`` (s), ``transfer_angle`` (rad, below pi for a
        type-I transfer, above for type II); with orbits ``escape_dv``, ``capture_dv``,
        ``total_dv`` (m/s, the sum of the burns given); with a vehicle
        ``propellant`` (kg) and ``affordable`` (bool). Coordinates
        ``departure_tdb`` and ``arrival_tdb`` hold the TDB seconds.

    Raises
    ------
    DomainError
        Unknown or equal bodies, dates outside DE421, an orbit below the
        body's surface, a vehicle without orbits.

    See Also
    --------
    transfer_pair : the same readouts for chosen dates.
    deltakit.plotting.plot_transfer_map : the map drawn as contours.

    Examples
    --------
    An invented look at the 2028-29 Earth-Mars window, ten days apart:

    >>> import numpy as np
    >>> import deltakit as dk
    >>> from deltakit.units import km2_per_s2
    >>> departures = np.arange("2028-10-01", "2029-01-01", 10, dtype="datetime64[D]")
    >>> arrivals = np.arange("2029-06-01", "2029-12-01", 10, dtype="datetime64[D]")
    >>> ds = dk.transfer_map("Earth", "Mars", departures, arrivals)
    >>> ds["c3"].dims, ds["c3"].attrs["units"]
    (('departure', 'arrival'), 'm^2/s^2')
    >>> best = ds["c3"].where(ds["c3"] == ds["c3"].min(), drop=True)
    >>> 7 < float(best.min()) / km2_per_s2 < 20
    True
    """
    from .sweeps import sweep

    settings = _check_common(origin, target, revolutions, parking, arrival_orbit, vehicle, prograde)
    departure_dates, departure_tdb = _dates(departures, "departures")
    arrival_dates, arrival_tdb = _dates(arrivals, "arrivals")

    units = {**_UNITS, **{f"{key}__{k}": unit for key, unit in _UNITS.items() for k in range(2)}}
    units.update(departure_tdb="s", arrival_tdb="s")
    ds = sweep(
        _map_block,
        departure_tdb=departure_tdb,
        arrival_tdb=arrival_tdb,
        fixed=settings,
        chunks=chunks,
        units=units,
    )
    ds = ds.rename({"departure_tdb": "departure", "arrival_tdb": "arrival"})
    ds = ds.assign_coords(
        departure=departure_dates,
        arrival=arrival_dates,
        departure_tdb=("departure", departure_tdb, {"units": "s", "scale": "TDB seconds past J2000"}),
        arrival_tdb=("arrival", arrival_tdb, {"units": "s", "scale": "TDB seconds past J2000"}),
    )
    ds = ds.drop_vars([name for name in ("revolutions",) if name in ds.coords])
    if settings["revolutions"] > 0:
        ds = _stack_branches(ds)
    ds.attrs.update(
        origin=settings["origin"],
        target=settings["target"],
        revolutions=settings["revolutions"],
        frame="heliocentric, ecliptic of J2000 (asymptote angles on ICRF axes)",
        ephemeris="JPL DE421",
    )
    ds.attrs.pop("fixed", None)
    return ds


def _stack_branches(ds: Any) -> Any:
    import xarray as xr

    names = sorted({key.rsplit("__", 1)[0] for key in ds.data_vars})
    stacked = {}
    for name in names:
        parts = [ds[f"{name}__{k}"] for k in range(2)]
        stacked[name] = xr.concat(parts, dim="branch").assign_attrs(parts[0].attrs)
    out = xr.Dataset(stacked, attrs=ds.attrs).assign_coords(branch=list(BRANCHES))
    return out.transpose("branch", "departure", "arrival")


@dataclass(frozen=True, repr=False, eq=False)
class TransferPair(Result):
    """Readouts of the transfer between one departure date and one arrival date (or arrays of pairs).

    Fields are those of :func:`transfer_map`'s variables; the burns, propellant
    and ``affordable`` are NaN (False) when the orbits or the vehicle were not given.
    """

    origin: str = dataclasses.field(metadata={"unit": ""})
    target: str = dataclasses.field(metadata={"unit": ""})
    departure: Any = quantity("")
    arrival: Any = quantity("")
    time_of_flight: Any = quantity("s")
    c3: Any = quantity("m^2/s^2")
    departure_vinf: Any = quantity("m/s")
    departure_declination: Any = quantity("rad")
    departure_right_ascension: Any = quantity("rad")
    arrival_vinf: Any = quantity("m/s")
    arrival_declination: Any = quantity("rad")
    arrival_right_ascension: Any = quantity("rad")
    transfer_angle: Any = quantity("rad")
    escape_dv: Any = quantity("m/s")
    capture_dv: Any = quantity("m/s")
    total_dv: Any = quantity("m/s")
    propellant: Any = quantity("kg")
    affordable: Any = quantity("")


def transfer_pair(
    origin: Any,
    target: Any,
    departure: Any,
    arrival: Any,
    *,
    revolutions: int = 0,
    parking: Any = None,
    arrival_orbit: Any = None,
    vehicle: Any = None,
    prograde: bool = True,
    branch: int = 0,
) -> TransferPair:
    """The readouts of :func:`transfer_map` for chosen dates, exactly at those dates.

    ``departure`` and ``arrival`` are dates (or arrays of them, paired
    element by element); the other parameters are those of
    :func:`transfer_map`, plus ``branch`` (0 or 1: which multi-revolution
    solution, :data:`BRANCHES`). This is what a date-choosing panel shows
    for the pair under the cursor, and what :func:`add_transfer` books.

    Examples
    --------
    >>> import deltakit as dk
    >>> from deltakit.constants import EARTH, MARS
    >>> from deltakit.units import km2_per_s2, km_per_s, day
    >>> pair = dk.transfer_pair("Earth", "Mars", "2028-11-15", "2029-08-20",
    ...                         parking=EARTH.radius + 300e3, arrival_orbit=MARS.radius + 400e3)
    >>> round(float(pair.time_of_flight / day))
    278
    >>> 7 < float(pair.c3) / km2_per_s2 < 20, 2 < float(pair.arrival_vinf) / km_per_s < 4
    (True, True)
    """
    settings = _check_common(origin, target, revolutions, parking, arrival_orbit, vehicle, prograde)
    if (
        isinstance(branch, (bool, np.bool_))
        or not isinstance(branch, (int, np.integer))
        or branch not in (0, 1)
    ):
        raise DomainError(f"`branch` must be 0 (shorter period) or 1 (longer period), got {branch!r}")
    t_departure = ephemeris_times(departure, "departure")
    t_arrival = ephemeris_times(arrival, "arrival")
    broadcast_shape(departure=t_departure, arrival=t_arrival)
    fields = _pair_fields(t_departure, t_arrival, **settings)
    shape = np.shape(fields["c3"])
    if settings["revolutions"] > 0:
        fields = {key: value[branch] for key, value in fields.items()}
        shape = shape[1:]
    missing = np.full(shape, np.nan)
    values = {key: fields.get(key, missing) for key in _UNITS}
    values["affordable"] = fields.get("affordable", np.zeros(shape, dtype=bool))
    values = {key: value[()] if np.ndim(value) == 0 else value for key, value in values.items()}
    return TransferPair(
        origin=settings["origin"],
        target=settings["target"],
        departure=to_datetime64(t_departure),
        arrival=to_datetime64(t_arrival),
        **values,
    )


def add_transfer(budget: Any, pair: TransferPair, *, margin: float = 0.0) -> Any:
    """Book a pair's escape and capture burns as two lines of ``budget`` (and return it).

    The lines are labelled with the bodies and the UTC dates; only the
    burns the pair knows are added (give ``parking`` and/or
    ``arrival_orbit`` to :func:`transfer_pair`). Like
    :meth:`deltakit.Budget.add`, the budget is changed in place and
    returned for chaining.

    Parameters
    ----------
    budget : Budget
        The budget to extend.
    pair : TransferPair
        One pair of dates (not an array of pairs).
    margin : float, optional
        Fraction added to each line's delta-v (0.05 = +5 %).

    Examples
    --------
    >>> import deltakit as dk
    >>> from deltakit.constants import EARTH, MARS
    >>> pair = dk.transfer_pair("Earth", "Mars", "2028-11-15", "2029-08-20",
    ...                         parking=EARTH.radius + 300e3, arrival_orbit=(MARS.radius + 400e3, 30000e3))
    >>> budget = dk.add_transfer(dk.Budget(3000.0, 3200.0, name="demo"), pair, margin=0.05)
    >>> [line.label for line in budget.lines]
    ['Earth departure 2028-11-15', 'Mars arrival 2029-08-20']
    """
    if not isinstance(pair, TransferPair):
        raise TypeError(
            f"`pair` must be a deltakit.TransferPair (from transfer_pair), not {type(pair).__name__}"
        )
    if np.ndim(pair.c3):
        raise DomainError(f"`pair` must be one pair of dates, got an array of shape {np.shape(pair.c3)}")
    lines = [
        (f"{pair.origin} departure {np.datetime_as_string(pair.departure, unit='D')}", pair.escape_dv),
        (f"{pair.target} arrival {np.datetime_as_string(pair.arrival, unit='D')}", pair.capture_dv),
    ]
    if not any(np.isfinite(dv) for _, dv in lines):
        raise DomainError(
            "`pair` has no burns: give `parking` and/or `arrival_orbit` to transfer_pair, "
            "or its transfer has no solution (NaN)"
        )
    for label, dv in lines:
        if np.isfinite(dv):
            budget.add(label, float(dv), margin=margin)
    return budget
