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
* The motion is two-body motion plus thrust. Thrust is constant; the mass
  falls at ``thrust / ve`` kg/s. Steering laws (:data:`STEERING`):
  ``"prograde"`` along the velocity, ``"retrograde"`` against it (braking:
  captures, lowering the apoapsis), ``"inertial"`` along the fixed direction
  of the velocity at the burn's centre, ``"normal"`` and ``"antinormal"``
  along and against the instantaneous angular momentum (turning the plane).
  The first three keep the motion in the plane of the :class:`~deltakit.Conic`
  (integrated there, so its inclination and node are kept exactly); the last
  two are integrated in three dimensions.
* The energy change is integrated directly (its rate is the thrust
  acceleration times the velocity), not taken as a difference of two large
  orbital energies, so a tiny burn keeps its relative accuracy.
* ``loss`` is a delta-v (m/s): ``dv`` minus the impulse at ``nu_center``
  that would do what the arc did. For the in-plane laws that impulse is along
  the velocity (against it for ``"retrograde"``) and gives the same energy
  change; for ``"normal"`` and ``"antinormal"`` it is the pure plane change
  (the velocity turned at constant speed, ``2 v_t sin(turn / 2)``) that turns
  the plane by the same angle. The loss is positive when the arc does
  worse than the impulse, the rule near periapsis; an arc centred near
  apoapsis spends part of its propellant where the vehicle is faster than at
  the centre, so its loss can be slightly negative.
* Inputs broadcast together (conic elements, thrust, ve, m0, dv, nu_center,
  splits); every case is integrated at once, the Python loop runs over
  integration steps and burns only.
* Bounds: a burn lasting more than :data:`MAX_REVOLUTIONS` revolutions of the
  circular orbit at its starting radius, more than :data:`MAX_SPLITS` splits,
  or a ``dv`` of more than :data:`MAX_DV_OVER_VE` exhaust velocities is
  refused with a :class:`~deltakit.DomainError` before any integration (it
  would take minutes, or could not be resolved in time at all). Nothing hangs,
  and no answer is a wrong number.

Results are for preliminary analysis, not for flight operations: defer to the
mission's verified tools.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import broadcast_shape, finite, instance_of, nonnegative, positive, require, scalar_or_array
from ._results import Result, quantity
from ._rk853 import integrate
from .conic import Conic, _elements_3d, _plane_to_inertial, _unit_normal, elements_from_state
from .constants import G0
from .errors import DomainError
from .kepler import propagate

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

__all__ = [
    "ArcOutcome",
    "thrust_arc",
    "loss_table",
    "STEERING",
    "MAX_REVOLUTIONS",
    "MAX_SPLITS",
    "MAX_DV_OVER_VE",
]

#: The steering laws :func:`thrust_arc` knows.
STEERING = ("prograde", "retrograde", "inertial", "normal", "antinormal")
_IN_PLANE = ("prograde", "retrograde", "inertial")

#: Longest burn integrated, in revolutions of the circular orbit at the burn's
#: starting radius (the integrator takes about 45 steps per revolution and at
#: most 100,000 steps, all cases together).
MAX_REVOLUTIONS = 2000
#: Most burns a manoeuvre may be split into (each split is one integration).
MAX_SPLITS = 1000
#: Largest delta-v, in exhaust velocities: a mass ratio of 4.9e8. Beyond it the
#: vehicle's last fraction of mass makes the acceleration grow faster than a
#: time step can resolve (measured: 20 integrates, 25 does not).
MAX_DV_OVER_VE = 20.0

# Tolerances of the integrator on the state scaled to radius 1 and circular
# speed 1 at the start of each burn, and on the energy gain scaled by the
# burn's own delta-v; they give energy changes good to better than 1e-6
# relative (tests/test_finite.py checks this against scipy).
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
        Specific orbital energy gained over the whole manoeuvre, J/kg
        (negative for a braking arc).
    ideal_energy_change : ndarray or numpy scalar
        What the impulsive ideal at ``nu_center`` would give: ``v dv + dv^2 / 2``
        for ``dv`` along the velocity, ``-v dv + dv^2 / 2`` against it, 0 for a
        plane change (normal steering turns the velocity, it does no work), J/kg.
    loss : ndarray or numpy scalar
        ``dv`` minus the impulse at ``nu_center`` that does what the arc did
        (see the module notes), m/s.
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
# Scaled units (mu = 1). The last state component is the energy gained,
# divided by the burn's own delta-v (``gain``): its rate is a_thrust . v.
def _rates_along(t, y, accel, mass_end, t_end, flow, sign, gain):
    """Planar two-body motion plus thrust along ``sign`` times the velocity (+1 or -1)."""
    x, yy, vx, vy = y[0], y[1], y[2], y[3]
    r2 = x * x + yy * yy
    inv_r3 = 1.0 / (r2 * np.sqrt(r2))
    speed = np.sqrt(vx * vx + vy * vy)
    a = sign * accel / (mass_end + flow * (t_end - t))
    a_speed = a / speed
    return np.stack([vx, vy, -x * inv_r3 + a_speed * vx, -yy * inv_r3 + a_speed * vy, a * speed / gain])


def _rates_inertial(t, y, accel, mass_end, t_end, flow, ux, uy, gain):
    """Planar two-body motion plus thrust along a fixed direction (ux, uy)."""
    x, yy, vx, vy = y[0], y[1], y[2], y[3]
    r2 = x * x + yy * yy
    inv_r3 = 1.0 / (r2 * np.sqrt(r2))
    a = accel / (mass_end + flow * (t_end - t))
    ax, ay = a * ux, a * uy
    return np.stack([vx, vy, -x * inv_r3 + ax, -yy * inv_r3 + ay, (ax * vx + ay * vy) / gain])


def _rates_normal(t, y, accel, mass_end, t_end, flow, sign, gain):
    """Two-body motion plus thrust along sign * (r x v) / |r x v|, in three dimensions."""
    x, yy, z, vx, vy, vz = y[0], y[1], y[2], y[3], y[4], y[5]
    r2 = x * x + yy * yy + z * z
    inv_r3 = 1.0 / (r2 * np.sqrt(r2))
    hx, hy, hz = yy * vz - z * vy, z * vx - x * vz, x * vy - yy * vx
    a = sign * accel / (mass_end + flow * (t_end - t)) / np.sqrt(hx * hx + hy * hy + hz * hz)
    ax, ay, az = a * hx, a * hy, a * hz
    power = ax * vx + ay * vy + az * vz  # zero but for rounding: the thrust is normal to v
    return np.stack([vx, vy, vz, -x * inv_r3 + ax, -yy * inv_r3 + ay, -z * inv_r3 + az, power / gain])


# ------------------------------------------------------------------ conic helpers
def _plane_state(rp, e, mu, argp, nu):
    """Position and velocity in the conic's plane axes, NaN-tolerant (no input checks)."""
    with np.errstate(invalid="ignore", divide="ignore"):
        p = rp * (1.0 + e)
        r = p / (1.0 + e * np.cos(nu))
        scale = np.sqrt(mu / p)
        radial, transverse = scale * e * np.sin(nu), scale * (1.0 + e * np.cos(nu))
    angle = nu + argp
    c, s = np.cos(angle), np.sin(angle)
    return r * c, r * s, radial * c - transverse * s, radial * s + transverse * c


def _burn_scales(rp, e, mu, argp, nu_start, thrust, ve, propellant):
    """Start state and the scales of one burn per case: radius 1, circular speed 1 at the start."""
    x, y, vx, vy = _plane_state(rp, e, mu, argp, nu_start)
    with np.errstate(invalid="ignore", divide="ignore"):
        length = np.hypot(x, y)
        speed = np.sqrt(mu / length)
        unit_time = length / speed
        t_end = propellant * ve / thrust / unit_time
    return (x, y, vx, vy), length, speed, unit_time, t_end


def _burn(conic_elements, nu_center, thrust, ve, mass_end, propellant, steering):
    """One burn per case, centred in time on ``nu_center``.

    Returns the final state in inertial axes (6 arrays), the energy gained and,
    for the in-plane laws, the final in-plane elements (rp, e, argp) or None.
    """
    rp, e, mu, argp, inc, raan = conic_elements
    duration = propellant * ve / thrust
    nu_start = np.asarray(propagate(Conic._trusted(rp, e, mu, argp), nu_center, -0.5 * duration))
    (x, y, vx, vy), length, speed, unit_time, t_end = _burn_scales(
        rp, e, mu, argp, nu_start, thrust, ve, propellant
    )
    with np.errstate(invalid="ignore", divide="ignore"):
        # the burn's own delta-v in scaled units: the energy gain is scaled by it
        gain = ve * np.log1p(propellant / mass_end) / speed
        gain = np.where(gain > 0.0, gain, 1.0)  # no burn: no gain to scale
        accel = thrust / (mu / length**2)  # kg: thrust over the unit acceleration
        flow = thrust / ve * unit_time  # kg per unit time
    zero = np.zeros_like(x)
    if steering in _IN_PLANE:
        _, _, ux, uy = _plane_state(rp, e, mu, argp, nu_center)
        with np.errstate(invalid="ignore", divide="ignore"):
            speed_c = np.hypot(ux, uy)
            ux, uy = ux / speed_c, uy / speed_c
        y0 = np.stack([x / length, y / length, vx / speed, vy / speed, zero])
        if steering == "inertial":
            rates, params = _rates_inertial, (accel, mass_end, t_end, flow, ux, uy, gain)
        else:
            rates, params = (
                _rates_along,
                (accel, mass_end, t_end, flow, (1.0 if steering == "prograde" else -1.0) + zero, gain),
            )
        final, _ = integrate(rates, y0, t_end, params, rtol=_RTOL, atol=_ATOL)
        px, py = final[0] * length, final[1] * length
        pvx, pvy = final[2] * speed, final[3] * speed
        pz = pvz = zero
    else:
        sign = (1.0 if steering == "normal" else -1.0) + zero
        y0 = np.stack([x / length, y / length, zero, vx / speed, vy / speed, zero, zero])
        final, _ = integrate(
            _rates_normal, y0, t_end, (accel, mass_end, t_end, flow, sign, gain), rtol=_RTOL, atol=_ATOL
        )
        px, py, pz = final[0] * length, final[1] * length, final[2] * length
        pvx, pvy, pvz = final[3] * speed, final[4] * speed, final[5] * speed
    energy_gain = final[-1] * gain * speed * speed
    # no firing time, no change: keep the start state to the last bit
    none = duration == 0.0
    px, py, pvx, pvy = (np.where(none, a, b) for a, b in ((x, px), (y, py), (vx, pvx), (vy, pvy)))
    pz, pvz = np.where(none, 0.0, pz), np.where(none, 0.0, pvz)
    energy_gain = np.where(none, 0.0, energy_gain)
    plane = elements_from_state(px, py, pvx, pvy, mu) if steering in _IN_PLANE else None
    to_inertial = _plane_to_inertial(inc, raan)
    r_in, v_in = to_inertial(px, py), to_inertial(pvx, pvy)
    if steering not in _IN_PLANE:  # the out-of-plane part along the old normal
        normal = np.stack(np.broadcast_arrays(*_unit_normal(inc, raan), zero)[:3], axis=-1)
        r_in = r_in + pz[:, None] * normal
        v_in = v_in + pvz[:, None] * normal
    return r_in, v_in, energy_gain, plane


def _next_elements(conic_elements, r_in, v_in, plane, steering):
    """Elements of the orbit after one burn: in-plane laws keep the plane exactly."""
    rp, e, mu, argp, inc, raan = conic_elements
    if plane is not None:
        new_rp, new_e, new_argp = plane
        flipped = ~np.isfinite(new_rp) & np.isfinite(r_in).all(axis=-1)
        if not flipped.any():
            return new_rp, new_e, new_argp, inc, raan
    return _elements_3d(r_in, v_in, mu)


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
    Kepler's equation on ``conic`` (elliptic or hyperbolic). The two-body plus
    thrust equations are then integrated for all cases together (adaptive
    order-8 Runge-Kutta, tolerances 1e-12 on the scaled state), with the
    energy gained as one more integrated quantity.

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
    steering : {"prograde", "retrograde", "inertial", "normal", "antinormal"}, optional
        "prograde" thrusts along the instantaneous velocity, "retrograde"
        against it (a braking arc); "inertial" holds the direction of the
        velocity at the burn's centre point; "normal" and "antinormal" thrust
        along and against the instantaneous orbit normal (a plane change).
    splits : int or array_like of int, optional
        Number of equal burns, 1 to :data:`MAX_SPLITS`.

    Returns
    -------
    ArcOutcome
        Fields broadcast to the common shape; NumPy scalars for scalar input.

    Raises
    ------
    DomainError
        For nonsense input (named), for a burn longer than
        :data:`MAX_REVOLUTIONS` revolutions (``thrust`` too low for the
        ``dv``), or more than :data:`MAX_SPLITS` splits.

    Notes
    -----
    The integrator takes about 45 steps per revolution of thrusting, all
    cases together, so a spiral of many revolutions costs time in proportion.
    A case still unfinished after 100,000 steps is NaN. The central body is a
    point mass: an arc that dips below the surface is not flagged.

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

    Turning the plane with a 2 kN engine, 200 m/s centred on the node:

    >>> import numpy as np
    >>> turn = thrust_arc(leo, 2000.0, 3100.0, 1500.0, 200.0, steering="normal")
    >>> round(float(np.degrees(turn.after.inc)), 2), 0 < float(turn.loss) < 5
    (1.48, True)
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
    broadcast_shape(
        conic=np.broadcast_to(0.0, conic.shape),
        thrust=thrust,
        ve=ve,
        m0=m0,
        dv=dv,
        nu_center=nu_center,
        splits=splits,
    )

    arrays = np.broadcast_arrays(*conic._elements(), thrust, ve, m0, dv, nu_center, splits)
    shape = arrays[0].shape
    rp, e, mu, argp, inc, raan, thrust, ve, m0, dv, nu_center, splits = (np.array(a).ravel() for a in arrays)

    require(
        np.reshape(dv, shape),
        np.reshape(dv > MAX_DV_OVER_VE * ve, shape),
        "dv",
        f"at most {MAX_DV_OVER_VE:g} exhaust velocities `ve` (a mass ratio of {np.exp(MAX_DV_OVER_VE):.1e})",
        "m/s",
    )
    propellant = -np.expm1(-dv / ve) * m0
    final_mass = np.exp(-dv / ve) * m0
    each = propellant / splits
    # mass at the end of the first burn; each later one ends `each` lighter. Counted
    # from the final mass, so a burn that spends nearly all the mass keeps its digits.
    mass_end = final_mass + (splits - 1) * each
    _check_duration(rp, e, mu, argp, nu_center, thrust, ve, each, shape)
    _, _, vx0, vy0 = _plane_state(rp, e, mu, argp, nu_center)
    speed_center = np.hypot(vx0, vy0)

    r_final = np.full((rp.size, 3), np.nan)
    v_final = np.full((rp.size, 3), np.nan)
    energy_change = np.zeros(rp.size)
    coast = [rp, e, argp, inc, raan]
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
        elements = (coast[0][todo], coast[1][todo], mu[todo], coast[2][todo], coast[3][todo], coast[4][todo])
        r_in, v_in, gained, plane = _burn(
            elements,
            centre[todo],
            thrust[todo],
            ve[todo],
            mass_end[todo] - k * each[todo],
            each[todo],
            steering,
        )
        energy_change[todo] += gained
        r_final[todo], v_final[todo] = r_in, v_in
        new = _next_elements(elements, r_in, v_in, plane, steering)
        coast = [np.array(q, float) for q in coast]
        for old, value in zip(coast, new):
            old[todo] = value

    with np.errstate(invalid="ignore", divide="ignore"):
        energy_change = np.where(alive & np.isfinite(r_final).all(axis=-1), energy_change, np.nan)
        ideal, equivalent = _impulse_equivalent(
            steering, speed_center, dv, energy_change, (rp, e, mu, argp, inc, raan), nu_center, coast
        )
        loss = dv - equivalent
    after = [np.where(alive, q, np.nan) for q in coast]

    def out(q: np.ndarray) -> Any:
        return scalar_or_array(np.reshape(q, shape))

    return ArcOutcome(
        after=Conic._trusted(
            *(out(q) for q in (after[0], after[1], mu, after[2], after[3], after[4])), copy=False
        ),
        energy_change=out(energy_change),
        ideal_energy_change=out(ideal),
        loss=out(loss),
        propellant=out(propellant),
        duration=out(propellant * ve / thrust),
    )


def _impulse_equivalent(steering, speed, dv, energy_change, before, nu_center, after):
    """The ideal impulse's energy change, and the impulse at the centre doing what the arc did."""
    if steering in ("normal", "antinormal"):
        rp, e, mu, argp, inc, raan = before
        # the plane turned by the angle between the normals; the impulsive ideal is the
        # pure plane change at the centre, the transverse velocity turned at constant
        # speed: 2 v_t sin(turn / 2), no energy change (a normal thrust does no work)
        w_before = np.stack(np.broadcast_arrays(*_unit_normal(inc, raan)), axis=-1)
        w_after = np.stack(np.broadcast_arrays(*_unit_normal(after[3], after[4])), axis=-1)
        turn = np.arctan2(
            np.linalg.norm(np.cross(w_before, w_after), axis=-1), np.sum(w_before * w_after, -1)
        )
        transverse = np.sqrt(mu / (rp * (1.0 + e))) * (1.0 + e * np.cos(nu_center))
        return np.zeros_like(dv), 2.0 * transverse * np.sin(0.5 * turn)
    if steering == "retrograde":
        # -v x + x^2/2 = dE: x = -2 dE / (v + sqrt(v^2 + 2 dE)), free of cancellation
        root = np.sqrt(speed * speed + 2.0 * energy_change)
        return dv * (0.5 * dv - speed), -2.0 * energy_change / (speed + root)
    # the prograde impulse giving energy_change solves v x + x^2/2 = dE:
    # x = 2 dE / (v + sqrt(v^2 + 2 dE)), free of cancellation for small dE
    root = np.sqrt(speed * speed + 2.0 * energy_change)
    return speed * dv + 0.5 * dv * dv, 2.0 * energy_change / (speed + root)


def _check_duration(rp, e, mu, argp, nu_center, thrust, ve, each, shape) -> None:
    """Refuse burns beyond MAX_REVOLUTIONS, measured at the centre's radius (before any integration)."""
    x, y, _, _ = _plane_state(rp, e, mu, argp, nu_center)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        r = np.hypot(x, y)
        revolutions = each * ve / thrust / (2.0 * np.pi * np.sqrt(r**3 / mu))
        too_long = revolutions > MAX_REVOLUTIONS  # False where nu_center is unreachable (NaN)
    if too_long.any():
        require(
            np.reshape(thrust, shape),
            np.reshape(too_long, shape),
            "thrust",
            f"large enough for each burn to last at most {MAX_REVOLUTIONS} revolutions of the orbit "
            "(raise the thrust, lower `dv` or split the burn)",
            "N",
        )


def _splits(splits: ArrayLike) -> np.ndarray:
    array = finite(splits, "splits")
    require(array, (array < 1) | (array != np.round(array)), "splits", "a whole number >= 1")
    require(array, array > MAX_SPLITS, "splits", f"at most {MAX_SPLITS}")
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
        The cells are SI floats at full precision; the table shows them
        rounded (thrust and burn time to the unit, losses to 0.1 m/s or three
        significant digits when smaller), through its pandas ``Styler``
        (``_repr_html_``) and its text form.

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
    >>> print(table)  # doctest: +NORMALIZE_WHITESPACE
                  thrust (N) burn time (s) loss, 1 burn (m/s) loss, 3 burns (m/s)
    thrust/weight
    0.1                1,961         2,100              282.8                45.3
    1.0               19,613           210                4.5               0.485
    """
    from ._loss_table import LossTable

    instance_of(conic, Conic, "conic")
    if conic.shape != ():
        raise DomainError(f"`conic` must be one orbit for a table, got element shape {conic.shape}")
    ratio = positive(np.atleast_1d(thrust_to_weight), "thrust_to_weight")
    counts = _splits(np.atleast_1d(splits))
    m0 = positive(m0, "m0", "kg")
    ve = positive(ve, "ve", "m/s")
    dv = nonnegative(dv, "dv", "m/s")
    nu_center = finite(nu_center, "nu_center", "rad")
    for name, value in (("ve", ve), ("m0", m0), ("dv", dv), ("nu_center", nu_center)):
        if np.ndim(value) != 0:
            raise DomainError(
                f"`{name}` must be one number for a table (its rows are thrust-to-weight, its columns "
                f"splits), got shape {np.shape(value)}"
            )
    thrust = ratio * m0 * G0
    outcome = thrust_arc(conic, thrust[:, None], ve, m0, dv, nu_center, steering, counts[None, :])
    loss = np.reshape(outcome.loss, (ratio.size, counts.size))
    columns = {
        "thrust (N)": thrust,
        "burn time (s)": np.broadcast_to(outcome.duration, loss.shape)[:, 0],
    }
    for j, n in enumerate(counts):
        columns[f"loss, {n} burn{'' if n == 1 else 's'} (m/s)"] = loss[:, j]
    import pandas as pd

    table = LossTable(columns, index=pd.Index(ratio, name="thrust/weight"))
    table.attrs["note"] = "Preliminary analysis only, not for flight operations."
    return table
