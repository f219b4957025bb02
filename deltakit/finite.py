"""Finite burns: what a real thrust arc loses against the impulsive ideal.

An impulsive burn at periapsis spends all its propellant where the vehicle is
fastest, which is where a given delta-v adds the most orbital energy (the
Oberth effect). A real engine needs time, so part of the propellant is spent
away from that point and the energy gained falls short. :func:`thrust_arc`
integrates the burn; :func:`loss_table` tabulates the shortfall for one
mission against thrust-to-weight ratio and the number of periapsis passes the
burn is split over.

Conventions
-----------
* SI units: thrust in N, exhaust velocity and delta-v in m/s, masses in kg,
  time in s, specific energy in J/kg, angles in rad.
* The motion is planar two-body motion plus thrust, in the plane of the
  :class:`~deltakit.Conic`. Thrust is constant; the mass falls at
  ``thrust / ve`` kg/s.
* ``loss`` is a delta-v (m/s): ``dv`` minus the prograde impulse at
  ``nu_center`` that would give the arc's energy change. It is positive when
  the arc does worse than the impulse, which is the rule near periapsis; an
  arc centred near apoapsis spends part of its propellant where the vehicle
  is faster than at the centre, so its loss can be slightly negative.
* Inputs broadcast together (conic elements, thrust, ve, m0, dv, nu_center,
  splits); every case is integrated at once, the Python loop runs over
  integration steps and burns only.

Results are for preliminary analysis, not for flight operations: defer to the
mission's verified tools.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, instance_of, nonnegative, positive, require, scalar_or_array
from ._results import Result, quantity
from ._rk853 import integrate
from .conic import Conic, elements_from_state
from .constants import G0
from .errors import DomainError
from .kepler import propagate

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

__all__ = ["ArcOutcome", "thrust_arc", "loss_table", "STEERING"]

#: The steering laws :func:`thrust_arc` knows.
STEERING = ("prograde", "inertial")

# Tolerances of the integrator on the state scaled to radius 1 and circular
# speed 1 at the start of each burn; they give energy changes good to better
# than 1e-6 relative (tests/test_finite.py checks this against scipy).
_RTOL = 1e-12
_ATOL = 1e-12


@dataclass(frozen=True, repr=False, eq=False)
class ArcOutcome(Result):
    """What a finite burn (or a series of them) did.

    Attributes
    ----------
    after : Conic
        The orbit after the (last) burn.
    energy_change : ndarray or numpy scalar
        Specific orbital energy gained over the whole manoeuvre, J/kg.
    ideal_energy_change : ndarray or numpy scalar
        What the impulsive prograde ``dv`` at ``nu_center`` would give,
        ``v dv + dv^2 / 2``, J/kg.
    loss : ndarray or numpy scalar
        ``dv`` minus the prograde impulse at ``nu_center`` that gives
        ``energy_change``, m/s.
    propellant : ndarray or numpy scalar
        Propellant burnt, kg (that of the ideal ``dv`` by the rocket equation).
    duration : ndarray or numpy scalar
        Total firing time, s (coasts between split burns not included).
    """

    after: Any = quantity("")
    energy_change: Any = quantity("J/kg")
    ideal_energy_change: Any = quantity("J/kg")
    loss: Any = quantity("m/s")
    propellant: Any = quantity("kg")
    duration: Any = quantity("s")


# ------------------------------------------------------------------ equations of motion
def _rates_prograde(t, y, accel, mass, flow, ux, uy):
    """Planar two-body motion plus thrust along the velocity, scaled units (mu = 1)."""
    x, yy, vx, vy = y
    r2 = x * x + yy * yy
    inv_r3 = 1.0 / (r2 * np.sqrt(r2))
    a_thrust = accel / (mass - flow * t) / np.sqrt(vx * vx + vy * vy)
    return np.stack([vx, vy, -x * inv_r3 + a_thrust * vx, -yy * inv_r3 + a_thrust * vy])


def _rates_inertial(t, y, accel, mass, flow, ux, uy):
    """Planar two-body motion plus thrust along a fixed direction (ux, uy), scaled units."""
    x, yy, vx, vy = y
    r2 = x * x + yy * yy
    inv_r3 = 1.0 / (r2 * np.sqrt(r2))
    a_thrust = accel / (mass - flow * t)
    return np.stack([vx, vy, -x * inv_r3 + a_thrust * ux, -yy * inv_r3 + a_thrust * uy])


# ------------------------------------------------------------------ conic helpers
def _state(rp, e, mu, argp, nu):
    """Position and velocity on a conic, NaN-tolerant (no input checks)."""
    with np.errstate(invalid="ignore", divide="ignore"):
        p = rp * (1.0 + e)
        r = p / (1.0 + e * np.cos(nu))
        scale = np.sqrt(mu / p)
        radial, transverse = scale * e * np.sin(nu), scale * (1.0 + e * np.cos(nu))
    angle = nu + argp
    c, s = np.cos(angle), np.sin(angle)
    return r * c, r * s, radial * c - transverse * s, radial * s + transverse * c


def _burn(rp, e, mu, argp, nu_center, thrust, ve, mass, propellant, prograde):
    """One burn per case, centred in time on ``nu_center``: start state (4 arrays), final state (4, n)."""
    duration = propellant * ve / thrust
    nu_start = np.asarray(propagate(Conic._trusted(rp, e, mu, argp), nu_center, -0.5 * duration))
    x, y, vx, vy = _state(rp, e, mu, argp, nu_start)
    _, _, ux, uy = _state(rp, e, mu, argp, nu_center)
    with np.errstate(invalid="ignore", divide="ignore"):
        speed_c = np.hypot(ux, uy)
        ux, uy = ux / speed_c, uy / speed_c
        # scale: unit length = radius at burn start, unit speed = circular speed there
        length = np.hypot(x, y)
        speed = np.sqrt(mu / length)
        unit_time = length / speed
        y0 = np.stack([x / length, y / length, vx / speed, vy / speed])
        accel = thrust / (mu / length**2)  # kg: thrust over the unit acceleration
        flow = thrust / ve * unit_time  # kg per unit time
        t_end = duration / unit_time
    rates = _rates_prograde if prograde else _rates_inertial
    final, _ = integrate(rates, y0, t_end, (accel, mass, flow, ux, uy), rtol=_RTOL, atol=_ATOL)
    final = final * np.stack([length, length, speed, speed])
    # no firing time, no change: keep the start state to the last bit
    final = np.where(duration == 0.0, np.stack([x, y, vx, vy]), final)
    return (x, y, vx, vy), final


def _energy(x, y, vx, vy, mu):
    with np.errstate(invalid="ignore"):
        return 0.5 * (vx * vx + vy * vy) - mu / np.hypot(x, y)


# ------------------------------------------------------------------ public
def thrust_arc(
    conic: Conic,
    thrust: ArrayLike,
    ve: ArrayLike,
    m0: ArrayLike,
    dv: ArrayLike,
    nu_center: ArrayLike = 0.0,
    steering: str = "prograde",
    splits: ArrayLike = 1,
) -> ArcOutcome:
    """Spend the propellant of an ideal ``dv`` with a real thrust, centred on ``nu_center``.

    The propellant ``m0 (1 - exp(-dv / ve))`` is burnt at constant ``thrust``
    with mass flow ``thrust / ve``. The burn is centred in time on the passage
    through ``nu_center``: it starts half the burn time earlier, found by
    Kepler's equation on ``conic`` (elliptic or hyperbolic). The planar
    two-body plus thrust equations are then integrated for all cases together
    (adaptive order-8 Runge-Kutta, tolerances 1e-12 on the scaled state).

    With ``splits = N`` the same propellant is spent in N equal burns: the first
    centred on ``nu_center``, each later one centred on the periapsis of the
    orbit the previous burn left, reached by a Keplerian coast (not
    integrated). If an intermediate orbit is not bound (e >= 1) there is no
    next periapsis to come back to, and ``after``, ``energy_change`` and
    ``loss`` are NaN for that case. A ``nu_center`` a hyperbola never reaches
    gives NaN too.

    Parameters
    ----------
    conic : Conic
        Orbit before the burn (elements broadcast with the other inputs).
    thrust : array_like
        Engine thrust, N (> 0).
    ve : array_like
        Effective exhaust velocity, m/s (> 0).
    m0 : array_like
        Vehicle mass at the start of the (first) burn, kg (> 0).
    dv : array_like
        Ideal delta-v whose propellant is spent, m/s (>= 0).
    nu_center : array_like, optional
        True anomaly on ``conic`` at the middle of the (first) burn, rad.
    steering : {"prograde", "inertial"}, optional
        "prograde" thrusts along the instantaneous velocity; "inertial" holds
        the direction of the velocity at the burn's centre point.
    splits : int or array_like of int, optional
        Number of equal burns (>= 1).

    Returns
    -------
    ArcOutcome
        Fields broadcast to the common shape; NumPy scalars for scalar input.

    Notes
    -----
    The integrator takes about 45 steps per revolution of thrusting, all
    cases together, so a spiral of many revolutions costs time in proportion.
    A case still unfinished after 100,000 steps (some 2,000 revolutions) is
    NaN. The central body is a point mass: an arc that dips below the
    surface is not flagged.

    Examples
    --------
    A 30 kN stage of 12 t leaving a 300 km Earth orbit with 3.2 km/s (ve 4.4 km/s):

    >>> from deltakit import Conic, thrust_arc
    >>> from deltakit.constants import EARTH
    >>> leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    >>> out = thrust_arc(leo, 30e3, 4400.0, 12e3, 3200.0)
    >>> round(float(out.duration)), round(float(out.propellant))
    (910, 6201)
    >>> 50 < float(out.loss) < 120  # m/s lost to the long arc
    True
    """
    instance_of(conic, Conic, "conic")
    thrust = positive(thrust, "thrust", "N")
    ve = positive(ve, "ve", "m/s")
    m0 = positive(m0, "m0", "kg")
    dv = nonnegative(dv, "dv", "m/s")
    nu_center = finite(nu_center, "nu_center", "rad")
    if not isinstance(steering, str) or steering not in STEERING:
        raise DomainError(f"`steering` must be one of {', '.join(map(repr, STEERING))}, not {steering!r}")
    splits = _splits(splits)

    arrays = np.broadcast_arrays(
        *(np.asarray(getattr(conic, n), float) for n in ("rp", "e", "mu", "argp")),
        thrust,
        ve,
        m0,
        dv,
        nu_center,
        splits,
    )
    shape = arrays[0].shape
    rp, e, mu, argp, thrust, ve, m0, dv, nu_center, splits = (a.ravel() for a in arrays)

    propellant = -np.expm1(-dv / ve) * m0
    each = propellant / splits
    _, _, vx0, vy0 = _state(rp, e, mu, argp, nu_center)
    speed_center = np.hypot(vx0, vy0)

    state = np.full((4, rp.size), np.nan)
    energy_start = np.full(rp.size, np.nan)
    coast = (rp, e, argp)
    alive = np.ones(rp.size, dtype=bool)
    for k in range(int(splits.max(initial=1))):
        if k == 0:
            todo = np.arange(rp.size)
            centre = nu_center
        else:
            # the next burn needs a next periapsis: bound orbits only
            alive &= (coast[1] < 1.0) | (k >= splits)
            todo = np.flatnonzero(alive & (k < splits))
            centre = np.zeros(rp.size)
        if todo.size == 0:
            break
        c_rp, c_e, c_argp = (q[todo] for q in coast)
        start, final = _burn(
            c_rp,
            c_e,
            mu[todo],
            c_argp,
            centre[todo],
            thrust[todo],
            ve[todo],
            m0[todo] - k * each[todo],
            each[todo],
            steering == "prograde",
        )
        if k == 0:
            # energies from states on both ends, so a zero burn changes nothing at all
            energy_start = _energy(*start, mu)
        state[:, todo] = final
        new_rp, new_e, new_argp = elements_from_state(*final, mu[todo])
        coast = tuple(np.array(q, float) for q in coast)
        for old, new in zip(coast, (new_rp, new_e, new_argp)):
            old[todo] = new

    x, y, vx, vy = state
    with np.errstate(invalid="ignore"):
        energy_change = np.where(alive, _energy(x, y, vx, vy, mu) - energy_start, np.nan)
        ideal = speed_center * dv + 0.5 * dv * dv
        # the prograde impulse giving energy_change solves v x + x^2/2 = dE:
        # x = 2 dE / (v + sqrt(v^2 + 2 dE)), free of cancellation for small dE
        root = np.sqrt(speed_center**2 + 2.0 * energy_change)
        equivalent = 2.0 * energy_change / (speed_center + root)
        loss = dv - equivalent
    after_rp, after_e, after_argp = elements_from_state(x, y, vx, vy, mu)
    after_rp, after_e, after_argp = (np.where(alive, q, np.nan) for q in (after_rp, after_e, after_argp))

    def out(q: np.ndarray) -> Any:
        return scalar_or_array(np.reshape(q, shape))

    return ArcOutcome(
        after=Conic._trusted(out(after_rp), out(after_e), out(mu), out(after_argp)),
        energy_change=out(energy_change),
        ideal_energy_change=out(ideal),
        loss=out(loss),
        propellant=out(propellant),
        duration=out(propellant * ve / thrust),
    )


def _splits(splits: ArrayLike) -> np.ndarray:
    array = finite(splits, "splits")
    require(array, (array < 1) | (array != np.round(array)), "splits", "a whole number >= 1")
    return array.astype(int)


def loss_table(
    conic: Conic,
    ve: float,
    m0: float,
    dv: float,
    thrust_to_weight: Sequence[float] = (0.02, 0.05, 0.1, 0.2, 0.5, 1.0, 2.0),
    splits: Sequence[int] = (1, 2, 3, 4),
    nu_center: float = 0.0,
    steering: str = "prograde",
) -> pd.DataFrame:
    """Finite-burn loss for one mission against thrust-to-weight ratio and number of burns.

    Thrust-to-weight is ``thrust / (m0 G0)`` with standard gravity
    G0 = 9.80665 m/s^2, the usual engine-sizing figure. All cells come from one
    vectorised :func:`thrust_arc` call. NaN marks a split plan whose
    intermediate orbit escapes (see :func:`thrust_arc`).

    Parameters
    ----------
    conic : Conic
        The orbit the burn starts from (one orbit).
    ve, m0, dv : float
        Exhaust velocity (m/s), initial mass (kg), ideal delta-v (m/s).
    thrust_to_weight : sequence of float
        Rows of the table.
    splits : sequence of int
        Numbers of equal burns, one loss column each.
    nu_center, steering
        As in :func:`thrust_arc`.

    Returns
    -------
    pandas.DataFrame
        Index ``thrust/weight``; columns ``thrust (N)``, ``burn time (s)``
        (total firing time) and ``loss, N burn(s) (m/s)`` per split count.

    Examples
    --------
    >>> from deltakit import Conic, loss_table
    >>> from deltakit.constants import EARTH
    >>> leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    >>> table = loss_table(leo, 3200.0, 2000.0, 3300.0, thrust_to_weight=[0.1, 1.0], splits=[1, 3])
    >>> list(table.columns)
    ['thrust (N)', 'burn time (s)', 'loss, 1 burn (m/s)', 'loss, 3 burns (m/s)']
    >>> bool(table.loc[1.0, 'loss, 1 burn (m/s)'] < table.loc[0.1, 'loss, 1 burn (m/s)'])
    True
    """
    import pandas as pd

    instance_of(conic, Conic, "conic")
    if conic.shape != ():
        raise DomainError(f"`conic` must be one orbit for a table, got element shape {conic.shape}")
    ratio = positive(np.atleast_1d(thrust_to_weight), "thrust_to_weight")
    counts = _splits(np.atleast_1d(splits))
    m0 = positive(m0, "m0", "kg")
    thrust = ratio * m0 * G0
    outcome = thrust_arc(conic, thrust[:, None], ve, m0, dv, nu_center, steering, counts[None, :])
    loss = np.reshape(outcome.loss, (ratio.size, counts.size))
    columns = {
        "thrust (N)": thrust,
        "burn time (s)": np.broadcast_to(outcome.duration, loss.shape)[:, 0],
    }
    for j, n in enumerate(counts):
        columns[f"loss, {n} burn{'' if n == 1 else 's'} (m/s)"] = loss[:, j]
    table = pd.DataFrame(columns, index=pd.Index(ratio, name="thrust/weight"))
    table.attrs["note"] = "Preliminary analysis only, not for flight operations."
    return table
