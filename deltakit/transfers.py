"""Transfers between circular orbits and plane changes: delta-v magnitudes.

Conventions
-----------
* Every delta-v here is a magnitude, m/s, >= 0, whatever the direction of the
  transfer: raising (``r2 > r1``) and lowering (``r2 < r1``) both work and
  cost the same.
* Radii in m, ``mu`` in m^3/s^2, durations in s, angles in rad.
* Both orbits are circular and coplanar unless a plane change is asked for; a
  plane change turns the velocity about the radius vector (normal burn in the
  RTN frame).
* Everything broadcasts like a ufunc; scalars in give NumPy scalars out.
* A bi-elliptic element whose intermediate radius ``rb`` lies below
  ``max(r1, r2)`` is NaN (not a bi-elliptic transfer).

Speed differences are computed in a form that has no cancellation, so a tiny
transfer (``r2`` close to ``r1``) keeps its relative accuracy.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, positive, require, scalar_or_array
from ._results import Result, quantity

__all__ = [
    "Transfer",
    "hohmann",
    "bielliptic",
    "plane_change",
    "combined_plane_change",
    "hohmann_plane_change",
    "best_plane_change_split",
    "BIELLIPTIC_BREAK_EVEN_RATIO",
    "BIELLIPTIC_ALWAYS_BETTER_RATIO",
]

#: Radius ratio r2/r1 below which a Hohmann transfer beats every bi-elliptic
#: transfer; above it a bi-elliptic with a large enough intermediate radius
#: wins. Published as 11.94 (Vallado, Fundamentals of Astrodynamics and
#: Applications, 4th ed., Sec. 6.3.2; Curtis, Orbital Mechanics for Engineering
#: Students, 3rd ed., Sec. 6.4; value quoted from memory). The more precise
#: 11.938765 is the root of Hohmann total = bi-elliptic total with rb -> infinity,
#: which ``tests/test_transfers.py`` finds with our own functions.
BIELLIPTIC_BREAK_EVEN_RATIO: float = 11.94

#: Radius ratio r2/r1 above which every bi-elliptic transfer (any rb > r2)
#: beats the Hohmann transfer. Published as 15.58 (same sources as above,
#: quoted from memory); the more precise 15.581719 is found in the tests.
BIELLIPTIC_ALWAYS_BETTER_RATIO: float = 15.58


@dataclass(frozen=True, repr=False, eq=False)
class Transfer(Result):
    """The burns of a transfer and their sum.

    Attributes
    ----------
    burns : tuple of ndarray or numpy scalar
        Delta-v magnitude of each burn, in the order they are made, m/s.
    total : ndarray or numpy scalar
        Sum of the burns, m/s.
    duration : ndarray or numpy scalar
        Time from the first burn to the last, s.
    """

    burns: tuple = quantity("m/s")
    total: Any = quantity("m/s")
    duration: Any = quantity("s")


def _tangent_burn(r: np.ndarray, a_from: np.ndarray, a_to: np.ndarray, mu: np.ndarray) -> np.ndarray:
    """Magnitude of the speed change at an apsis ``r`` between two coaxial orbits.

    The orbits have their apsides at ``r`` and ``a_from`` (before) and at ``r``
    and ``a_to`` (after): a circle is the orbit with ``a == r``. The speed at
    ``r`` on such an orbit is ``sqrt(2 mu / r) sqrt(a / (r + a))``; the
    difference is written as a quotient so nearly equal orbits lose nothing.
    """
    s_from = a_from / (r + a_from)
    s_to = a_to / (r + a_to)
    # s_to - s_from without cancellation: r (a_to - a_from) / ((r + a_to)(r + a_from))
    difference = r * (a_to - a_from) / ((r + a_to) * (r + a_from))
    return np.sqrt(2.0 * mu / r) * np.abs(difference) / (np.sqrt(s_to) + np.sqrt(s_from))


def _half_period(r_low: np.ndarray, r_high: np.ndarray, mu: np.ndarray) -> np.ndarray:
    a = 0.5 * (r_low + r_high)
    return np.pi * np.sqrt(a * a * a / mu)


def _result(burns: tuple[np.ndarray, ...], duration: np.ndarray) -> Transfer:
    shape = np.broadcast_shapes(*(np.shape(b) for b in burns), np.shape(duration))
    burns = tuple(np.broadcast_to(b, shape) for b in burns)
    total = burns[0]
    for b in burns[1:]:
        total = total + b
    return Transfer(
        burns=tuple(scalar_or_array(np.array(b)) for b in burns),
        total=scalar_or_array(total),
        duration=scalar_or_array(np.broadcast_to(duration, shape).copy()),
    )


def hohmann(r1: ArrayLike, r2: ArrayLike, mu: ArrayLike) -> Transfer:
    """Two-burn Hohmann transfer between coplanar circular orbits of radii ``r1``, ``r2``.

    Parameters
    ----------
    r1, r2 : array_like, shape (...)
        Radius of the starting and the target circular orbit, m (> 0).
        ``r2 < r1`` is a lowering transfer.
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    Transfer
        Two burns (at ``r1`` onto the transfer ellipse, at ``r2`` to circularise)
        and the duration, half the period of the transfer ellipse.

    Raises
    ------
    DomainError
        If a radius or ``mu`` is not finite and > 0.

    Examples
    --------
    From a 300 km Earth orbit to geostationary radius:

    >>> from deltakit import hohmann
    >>> from deltakit.constants import EARTH
    >>> t = hohmann(EARTH.radius + 300e3, 42164e3, EARTH.mu)
    >>> [round(float(b)) for b in t.burns], round(float(t.total)), round(float(t.duration) / 3600, 2)
    ([2426, 1467], 3893, 5.28)
    """
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    first = _tangent_burn(r1, r1, r2, mu)
    second = _tangent_burn(r2, r1, r2, mu)
    return _result((first, second), _half_period(r1, r2, mu))


def bielliptic(r1: ArrayLike, r2: ArrayLike, rb: ArrayLike, mu: ArrayLike) -> Transfer:
    """Three-burn bi-elliptic transfer through the intermediate radius ``rb``.

    The first burn at ``r1`` raises the apoapsis to ``rb``; the second, at
    ``rb``, moves the periapsis to ``r2``; the third circularises at ``r2``.

    Parameters
    ----------
    r1, r2 : array_like, shape (...)
        Radius of the starting and the target circular orbit, m (> 0).
    rb : array_like, shape (...)
        Intermediate apoapsis radius, m (> 0). Elements with
        ``rb < max(r1, r2)`` are NaN.
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    Transfer
        Three burns and the duration: half the periods of both ellipses.

    Examples
    --------
    >>> from deltakit import bielliptic
    >>> t = bielliptic(7000e3, 105000e3, 210000e3, 3.986004418e14)
    >>> [round(float(b)) for b in t.burns], round(float(t.total))
    ([2952, 775, 301], 4029)
    >>> float(bielliptic(7000e3, 105000e3, 50000e3, 3.986004418e14).total)
    nan
    """
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    rb = positive(rb, "rb", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    rb = np.where(rb >= np.maximum(r1, r2), rb, np.nan)
    first = _tangent_burn(r1, r1, rb, mu)
    second = _tangent_burn(rb, r1, r2, mu)
    third = _tangent_burn(r2, rb, r2, mu)
    duration = _half_period(r1, rb, mu) + _half_period(r2, rb, mu)
    return _result((first, second, third), duration)


def _check_angle(angle: ArrayLike, name: str) -> np.ndarray:
    angle = finite(angle, name, "rad")
    require(
        angle,
        (angle < 0.0) | (angle > np.pi),
        name,
        "between 0 and pi (radians; use np.radians for degrees)",
        "rad",
    )
    return angle


def _combined(v1: np.ndarray, v2: np.ndarray, angle: np.ndarray) -> np.ndarray:
    # Law of cosines in the form without cancellation for small angles:
    # v1^2 + v2^2 - 2 v1 v2 cos(angle) = (v1 - v2)^2 + 4 v1 v2 sin^2(angle/2)
    half = np.sin(0.5 * angle)
    difference = v1 - v2
    return np.sqrt(difference * difference + 4.0 * v1 * v2 * half * half)


def plane_change(v: ArrayLike, angle: ArrayLike) -> Any:
    """Delta-v to turn a velocity of speed ``v`` through ``angle`` at constant speed.

    ``2 v sin(angle / 2)``.

    Parameters
    ----------
    v : array_like, shape (...)
        Speed, m/s (>= 0).
    angle : array_like, shape (...)
        Angle between the old and the new velocity, rad, in [0, pi].

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit import plane_change
    >>> round(float(plane_change(7500.0, np.radians(10.0))), 1)
    1307.3
    """
    v = _speed(v, "v")
    angle = _check_angle(angle, "angle")
    return scalar_or_array(2.0 * v * np.sin(0.5 * angle))


def _speed(v: ArrayLike, name: str) -> np.ndarray:
    v = finite(v, name, "m/s")
    require(v, v < 0.0, name, ">= 0", "m/s")
    return v


def combined_plane_change(v1: ArrayLike, v2: ArrayLike, angle: ArrayLike) -> Any:
    """Delta-v that changes speed from ``v1`` to ``v2`` and turns by ``angle`` in one burn.

    The law of cosines, ``sqrt(v1^2 + v2^2 - 2 v1 v2 cos(angle))``.

    Parameters
    ----------
    v1, v2 : array_like, shape (...)
        Speed before and after the burn, m/s (>= 0).
    angle : array_like, shape (...)
        Angle between the two velocities, rad, in [0, pi].

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit import combined_plane_change
    >>> round(float(combined_plane_change(1597.0, 3075.0, np.radians(28.5))), 1)
    1837.0
    """
    v1 = _speed(v1, "v1")
    v2 = _speed(v2, "v2")
    angle = _check_angle(angle, "angle")
    return scalar_or_array(_combined(v1, v2, angle))


def _hohmann_speeds(r1: np.ndarray, r2: np.ndarray, mu: np.ndarray) -> tuple[np.ndarray, ...]:
    """Circular speeds at r1 and r2 and transfer-ellipse speeds there."""
    v_circ1 = np.sqrt(mu / r1)
    v_circ2 = np.sqrt(mu / r2)
    total = r1 + r2
    v_depart = v_circ1 * np.sqrt(2.0 * r2 / total)
    v_arrive = v_circ2 * np.sqrt(2.0 * r1 / total)
    return v_circ1, v_depart, v_arrive, v_circ2


def _split_total(speeds: tuple[np.ndarray, ...], angle: np.ndarray, fraction: np.ndarray) -> np.ndarray:
    v_circ1, v_depart, v_arrive, v_circ2 = speeds
    return _combined(v_circ1, v_depart, fraction * angle) + _combined(
        v_arrive, v_circ2, (1.0 - fraction) * angle
    )


def hohmann_plane_change(
    r1: ArrayLike, r2: ArrayLike, mu: ArrayLike, angle: ArrayLike, fraction_first: ArrayLike
) -> Transfer:
    """Hohmann transfer that also turns the orbit plane by ``angle``, split over both burns.

    Each burn is a combined plane change: the first turns the plane by
    ``fraction_first * angle``, the second by the rest.

    Parameters
    ----------
    r1, r2 : array_like, shape (...)
        Radius of the starting and the target circular orbit, m (> 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).
    angle : array_like, shape (...)
        Total plane change, rad, in [0, pi].
    fraction_first : array_like, shape (...)
        Share of the plane change made at the first burn, in [0, 1].

    Returns
    -------
    Transfer
        Two burns and the duration (half the transfer-ellipse period).

    Examples
    --------
    All of a 28.5 deg plane change at geostationary radius, where the speed is low:

    >>> import numpy as np
    >>> from deltakit.transfers import hohmann_plane_change
    >>> from deltakit.constants import EARTH
    >>> t = hohmann_plane_change(EARTH.radius + 300e3, 42164e3, EARTH.mu, np.radians(28.5), 0.0)
    >>> round(float(t.total))
    4256
    """
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    angle = _check_angle(angle, "angle")
    fraction = finite(fraction_first, "fraction_first")
    require(fraction, (fraction < 0.0) | (fraction > 1.0), "fraction_first", "between 0 and 1")
    v_circ1, v_depart, v_arrive, v_circ2 = _hohmann_speeds(r1, r2, mu)
    first = _combined(v_circ1, v_depart, fraction * angle)
    second = _combined(v_arrive, v_circ2, (1.0 - fraction) * angle)
    return _result((first, second), _half_period(r1, r2, mu))


_INVERSE_GOLDEN = (np.sqrt(5.0) - 1.0) / 2.0


def best_plane_change_split(r1: ArrayLike, r2: ArrayLike, mu: ArrayLike, angle: ArrayLike) -> Any:
    """Share of the plane change to make at the first Hohmann burn that minimises the total.

    A golden-section search over [0, 1] run on whole arrays at once (60
    steps, bracket below 1e-12), then compared with the two ends of the
    interval, so a total that is lowest at an end is found too. Where the
    total does not depend on the split (``angle == 0``) the answer is 0.

    Parameters
    ----------
    r1, r2 : array_like, shape (...)
        Radius of the starting and the target circular orbit, m (> 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).
    angle : array_like, shape (...)
        Total plane change, rad, in [0, pi].

    Returns
    -------
    ndarray or numpy scalar
        Fraction in [0, 1], to pass as ``fraction_first`` to
        :func:`hohmann_plane_change`.

    Examples
    --------
    Low Earth orbit to geostationary radius: a few percent of the turn is
    best made at the fast first burn.

    >>> import numpy as np
    >>> from deltakit.transfers import best_plane_change_split, hohmann_plane_change
    >>> from deltakit.constants import EARTH
    >>> r1, r2, turn = EARTH.radius + 300e3, 42164e3, np.radians(28.5)
    >>> f = best_plane_change_split(r1, r2, EARTH.mu, turn)
    >>> round(float(f), 3), round(float(hohmann_plane_change(r1, r2, EARTH.mu, turn, f).total))
    (0.077, 4231)
    """
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    angle = _check_angle(angle, "angle")
    speeds = _hohmann_speeds(r1, r2, mu)
    shape = np.broadcast_shapes(r1.shape, r2.shape, mu.shape, angle.shape)
    low = np.zeros(shape)
    high = np.ones(shape)
    inner_low = high - _INVERSE_GOLDEN * (high - low)
    inner_high = low + _INVERSE_GOLDEN * (high - low)
    f_low = _split_total(speeds, angle, inner_low)
    f_high = _split_total(speeds, angle, inner_high)
    for _ in range(60):  # iterations of the search, each on the whole array
        keep_left = f_low <= f_high
        high = np.where(keep_left, inner_high, high)
        low = np.where(keep_left, low, inner_low)
        new_inner_low = high - _INVERSE_GOLDEN * (high - low)
        new_inner_high = low + _INVERSE_GOLDEN * (high - low)
        # One of the two inner points is reused; evaluate only where it moved.
        moved_low = np.where(keep_left, new_inner_low, inner_high)
        moved_high = np.where(keep_left, inner_low, new_inner_high)
        f_new = _split_total(speeds, angle, np.where(keep_left, new_inner_low, new_inner_high))
        f_low, f_high = np.where(keep_left, f_new, f_high), np.where(keep_left, f_low, f_new)
        inner_low, inner_high = moved_low, moved_high
    best = 0.5 * (low + high)
    candidates = np.stack([np.zeros(shape), best, np.ones(shape)])
    totals = _split_total(speeds, angle, candidates)
    choice = np.argmin(totals, axis=0)  # first minimum: ties prefer fraction 0
    fraction = np.take_along_axis(candidates, choice[np.newaxis], axis=0)[0]
    fraction = np.where(angle == 0.0, 0.0, fraction)
    return scalar_or_array(fraction)
