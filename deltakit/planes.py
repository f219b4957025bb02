"""Turning the orbit plane: where the old orbit meets the new plane, and what each crossing costs.

Conventions
-----------
* A single impulsive burn keeps the position, so it can put the vehicle into
  a new plane only where the old orbit crosses that plane: at two points half
  a turn apart, on the line where the two planes meet.
* The angle between the planes, the *turn*, follows from spherical
  trigonometry on the two poles (inclination ``i``, node ``raan``)::

      cos(turn) = cos(i1) cos(i2) + sin(i1) sin(i2) cos(raan2 - raan1)

  (Vallado, Fundamentals of Astrodynamics and Applications, 4th ed.,
  Sec. 6.4, combined change of inclination and node; quoted from memory).
  It is computed as the angle between the two unit normals (``atan2`` of
  their cross and dot products), good at every angle.
* A pure plane change turns the velocity about the radius by the turn: the
  radial speed stays, the transverse speed ``vt`` turns, and
  ``dv = 2 vt sin(turn / 2)`` (on a circle ``2 v sin(turn / 2)``; Curtis,
  Orbital Mechanics for Engineering Students, 3rd ed., Ch. 6, plane change
  manoeuvres). Where the orbit crosses the new plane at the slower point
  (farther out), the turn is cheaper.
* With a shape target (``ra``, ``rp``, ``period`` or ``vinf``, as in
  :func:`deltakit.burn_to`) the same burn also changes the speed along the
  velocity, from ``v`` to ``w``; the velocity turns by ``alpha`` with
  ``sin(alpha / 2) = (vt / v) sin(turn / 2)``, and the delta-v is
  :func:`deltakit.combined_plane_change` of ``v``, ``w`` and ``alpha``.
* The first point lies along ``normal_old x normal_new``: there the new orbit
  rises through the old plane; the second is half a turn later. When the
  planes agree (turn 0, or pi: the same plane flown the other way) the line
  of intersection is undefined and the old orbit's nodes stand for it.
* SI units: rad for angles, m/s for speeds; inputs broadcast like a ufunc.
  A point a hyperbola never reaches gives NaN at that point; ``cheaper``
  then picks the other.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import broadcast_shape, finite, instance_of, scalar_or_array
from ._plane_turn import turned_plane
from ._results import Result, quantity
from .conic import Conic, _inclination, _sin_cos_inclination, _unit_normal, _wrap
from .targeting import burn_to
from .transfers import _combined

__all__ = ["InclinationChange", "PlaneChangeBurns", "inclination_change_cost", "plane_change_burns"]


@dataclass(frozen=True, repr=False, eq=False)
class PlaneChangeBurns(Result):
    """The two single-burn ways into a new plane, and the cheaper one.

    Attributes
    ----------
    nu : tuple of two ndarray
        True anomalies on the old orbit of the two points where it crosses the
        new plane, rad: first where the new orbit rises through the old plane,
        second half a turn later.
    turn : ndarray or numpy scalar
        Angle between the old and the new plane, rad in [0, pi].
    dv : tuple of two ndarray
        Delta-v of the burn at each point, m/s (NaN where a hyperbola does not
        reach it, or no burn along the velocity reaches the shape target).
    radial, transverse, normal : tuple of two ndarray
        The RTN components of each burn, m/s: ``burn(conic, nu[k],
        radial[k], transverse[k], normal[k])`` makes it.
    cheaper : ndarray or numpy scalar of int
        0 or 1, the index of the cheaper point (0 on a tie).
    best_nu, best_dv : ndarray or numpy scalar
        True anomaly (rad) and delta-v (m/s) of the cheaper point.
    saving : ndarray or numpy scalar
        Delta-v saved by the cheaper point against the other, m/s.
    """

    nu: tuple = quantity("rad")
    turn: Any = quantity("rad")
    dv: tuple = quantity("m/s")
    radial: tuple = quantity("m/s")
    transverse: tuple = quantity("m/s")
    normal: tuple = quantity("m/s")
    cheaper: Any = quantity("")
    best_nu: Any = quantity("rad")
    best_dv: Any = quantity("m/s")
    saving: Any = quantity("m/s")


@dataclass(frozen=True, repr=False, eq=False)
class InclinationChange(Result):
    """A normal burn that reaches an inclination at a given point, the node left free.

    Attributes
    ----------
    dv : ndarray or numpy scalar
        Delta-v of the least such burn, m/s (NaN where the inclination cannot
        be reached from that point).
    turn : ndarray or numpy scalar
        Angle the plane turns about the radius, rad in (-pi, pi] (positive:
        the burn points along the orbit normal).
    raan : ndarray or numpy scalar
        Right ascension of the ascending node after the burn, rad.
    """

    dv: Any = quantity("m/s")
    turn: Any = quantity("rad")
    raan: Any = quantity("rad")


def plane_change_burns(
    conic: Conic,
    inc: ArrayLike,
    raan: ArrayLike,
    *,
    ra: ArrayLike | None = None,
    rp: ArrayLike | None = None,
    period: ArrayLike | None = None,
    vinf: ArrayLike | None = None,
) -> PlaneChangeBurns:
    """Where to turn ``conic`` into the plane ``inc``, ``raan``, and what each of the two points costs.

    Parameters
    ----------
    conic : Conic
        The orbit before the burn.
    inc : array_like
        Inclination of the new plane, rad in [0, pi].
    raan : array_like
        Right ascension of the ascending node of the new plane, rad.
    ra, rp, period, vinf : array_like, optional
        At most one shape target reached by the same burn (see
        :func:`deltakit.burn_to`): the speed changes along the velocity while
        the plane turns. None: a pure plane change.

    Returns
    -------
    PlaneChangeBurns
        Both points, the turn, the delta-v and components at each, the cheaper one.

    Raises
    ------
    DomainError
        If ``inc`` is outside [0, pi], ``raan`` is not finite, or a target
        breaks its rule.

    Examples
    --------
    An invented relay in a 600 x 8,000 km Earth orbit at 28.5 deg moves to a
    35 deg plane whose node lies 20 deg further east:

    >>> import numpy as np
    >>> from deltakit import Conic, plane_change_burns
    >>> from deltakit.constants import EARTH
    >>> orbit = Conic.from_apsides(EARTH.radius + 600e3, EARTH.radius + 8000e3, EARTH.mu,
    ...                            argp=np.radians(40.0), inc=np.radians(28.5))
    >>> plan = plane_change_burns(orbit, np.radians(35.0), np.radians(20.0))
    >>> round(float(np.degrees(plan.turn)), 2), [round(float(dv)) for dv in plan.dv]
    (12.29, [1825, 965])
    >>> int(plan.cheaper), round(float(plan.saving))  # the second point, farther out, is cheaper
    (1, 860)
    """
    instance_of(conic, Conic, "conic")
    inc_new = _inclination(inc)
    raan_new = finite(raan, "raan", "rad")
    broadcast_shape(conic=np.broadcast_to(0.0, conic.shape), inc=inc_new, raan=raan_new)
    target = {k: v for k, v in (("ra", ra), ("rp", rp), ("period", period), ("vinf", vinf)) if v is not None}
    _, _, _, argp, inc_old, raan_old = conic._elements()
    sin1, cos1 = _sin_cos_inclination(inc_old)
    w1 = _unit_normal(inc_old, raan_old)
    w2 = _unit_normal(inc_new, raan_new)
    d = (w1[1] * w2[2] - w1[2] * w2[1], w1[2] * w2[0] - w1[0] * w2[2], w1[0] * w2[1] - w1[1] * w2[0])
    sin_turn = np.sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2])
    turn = np.arctan2(sin_turn, w1[0] * w2[0] + w1[1] * w2[1] + w1[2] * w2[2])
    # the line of intersection in the old plane's axes (x along its node)
    cos_o, sin_o = np.cos(raan_old), np.sin(raan_old)
    along_node = d[0] * cos_o + d[1] * sin_o
    ahead = (d[1] * cos_o - d[0] * sin_o) * cos1 + d[2] * sin1
    u_first = np.where(sin_turn > 0.0, np.arctan2(ahead, along_node), 0.0)
    nu_first = _wrap(u_first - argp)
    nu_second = _wrap(nu_first + np.pi)
    points = []
    for nu, delta in ((nu_first, turn), (nu_second, -turn)):
        points.append(_burn_at(conic, nu, delta, target))
    dv = tuple(p[0] for p in points)
    with np.errstate(invalid="ignore"):
        second = (dv[1] < dv[0]) | (np.isnan(dv[0]) & ~np.isnan(dv[1]))
        saving = np.abs(dv[1] - dv[0])
    shape = np.broadcast_shapes(*(np.shape(x) for x in (*dv, nu_first, turn)))

    def full(x: Any) -> Any:
        return scalar_or_array(np.array(np.broadcast_to(x, shape)))

    return PlaneChangeBurns(
        nu=(full(nu_first), full(nu_second)),
        turn=full(turn),
        dv=tuple(full(x) for x in dv),
        radial=tuple(full(p[1]) for p in points),
        transverse=tuple(full(p[2]) for p in points),
        normal=tuple(full(p[3]) for p in points),
        cheaper=scalar_or_array(np.broadcast_to(second, shape).astype(int)),
        best_nu=full(np.where(second, nu_second, nu_first)),
        best_dv=full(np.where(second, dv[1], dv[0])),
        saving=full(saving),
    )


def _burn_at(conic: Conic, nu: np.ndarray, delta: np.ndarray, target: dict[str, Any]) -> tuple[Any, ...]:
    """Delta-v and RTN components of turning the plane by ``delta`` about the radius at ``nu``."""
    vr, vt = (np.asarray(x) for x in conic.velocity(nu))
    half = np.sin(0.5 * delta)
    if not target:
        magnitude = 2.0 * vt * np.abs(half)
        return magnitude, np.zeros_like(magnitude), -2.0 * vt * half * half, vt * np.sin(delta)
    v = np.sqrt(vr * vr + vt * vt)
    w = v + np.asarray(burn_to(conic, nu, **target))
    ratio = w / v
    with np.errstate(invalid="ignore"):
        alpha = 2.0 * np.arcsin(np.minimum(vt / v * np.abs(half), 1.0))
    magnitude = _combined(np, v, w, alpha)
    radial = (ratio - 1.0) * vr
    transverse = (ratio - 1.0) * vt - 2.0 * ratio * vt * half * half
    return magnitude, radial, transverse, ratio * vt * np.sin(delta)


def inclination_change_cost(conic: Conic, nu: ArrayLike, inc: ArrayLike) -> InclinationChange:
    """The least normal burn at ``nu`` that gives the inclination ``inc``, the node left free.

    The cost curve along the orbit of an inclination change: the burn turns
    the plane about the radius by the smallest angle that reaches ``inc``
    (``cos inc = cos i cos d - sin i cos u sin d`` at argument of latitude
    ``u``), at ``2 vt sin(|d| / 2)``. It is cheapest at a node, where the turn
    is the inclination change itself, and away from the nodes only part of the
    turn tilts the plane (and moves the node instead).

    Parameters
    ----------
    conic : Conic
        The orbit before the burn.
    nu : array_like
        True anomaly of the burn point, rad.
    inc : array_like
        Inclination to reach, rad in [0, pi].

    Returns
    -------
    InclinationChange
        ``dv``, the signed ``turn`` and the node reached; NaN where ``inc`` is
        out of reach from that point (the plane through the radius can only
        tilt so far) or the hyperbola never reaches ``nu``.

    Examples
    --------
    Lowering a 51.6 deg circular orbit (invented) to 45 deg: cheapest at the nodes.

    >>> import numpy as np
    >>> from deltakit import Conic, inclination_change_cost
    >>> orbit = Conic.circular(6778e3, 3.986004418e14, inc=np.radians(51.6))
    >>> cost = inclination_change_cost(orbit, np.radians([0.0, 45.0, 90.0]), np.radians(45.0))
    >>> np.round(cost.dv).tolist()
    [883.0, 1322.0, nan]
    """
    instance_of(conic, Conic, "conic")
    nu = finite(nu, "nu", "rad")
    target = _inclination(inc)
    broadcast_shape(conic=np.broadcast_to(0.0, conic.shape), nu=nu, inc=target)
    _, _, _, argp, inc_old, raan_old = conic._elements()
    sin_i, cos_i = _sin_cos_inclination(inc_old)
    u = argp + nu
    cos_u, sin_u = np.cos(u), np.sin(u)
    # cos(target) = A cos(d + phi) with A = |(cos i, sin i cos u)|, phi = atan2(sin i cos u, cos i)
    reach = np.hypot(cos_i, sin_i * cos_u)
    phi = np.arctan2(sin_i * cos_u, cos_i)
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = np.cos(target) / reach
        spread = np.arccos(np.where(np.abs(ratio) <= 1.0, ratio, np.nan))
    one, other = _wrap(spread - phi), _wrap(-spread - phi)
    delta = np.where(np.abs(one) <= np.abs(other), one, other)
    _, vt = conic.velocity(nu)
    dv = 2.0 * np.asarray(vt) * np.abs(np.sin(0.5 * delta))
    _, raan_new, _ = turned_plane(
        inc_old, raan_old, sin_i, cos_i, u, cos_u, sin_u, np.cos(delta), np.sin(delta)
    )
    raan_new = np.where(np.isnan(dv), np.nan, raan_new)
    shape = np.broadcast_shapes(np.shape(dv), np.shape(delta), np.shape(raan_new))

    def full(x: Any) -> Any:
        return scalar_or_array(np.array(np.broadcast_to(x, shape)))

    return InclinationChange(dv=full(dv), turn=full(delta), raan=full(raan_new))
