"""Transfers between coplanar orbits and plane changes: delta-v magnitudes.

Conventions
-----------
* Every delta-v here is a magnitude, m/s, >= 0, whatever the direction of the
  transfer: raising (``r2 > r1``) and lowering (``r2 < r1``) both work and
  cost the same.
* Radii in m, ``mu`` in m^3/s^2, durations in s, angles in rad.
* :func:`hohmann` and :func:`bielliptic` take circular orbits as radii, or
  elliptic orbits as :class:`~deltakit.Conic` with coaxial apsides; every burn
  is tangential, at an apsis of the orbits it joins.
* Both orbits are coplanar unless a plane change is asked for; a plane change
  turns the velocity about the radius vector (normal burn in the RTN frame).
* Everything broadcasts like a ufunc; scalars in give NumPy scalars out, and
  plain numbers take a scalar fast path with the same checks and results.
* NaN marks an impossible transfer: a bi-elliptic element whose intermediate
  radius ``rb`` lies below both ends, or an orbit given as a Conic that is not
  an ellipse (``e >= 1``: it has no apoapsis to name) or lies in another plane.
* Extreme but finite inputs (1e300, 1e-300) give the right answer where it
  fits a double and inf where it does not, never a warning.

Speed differences are computed in a form that has no cancellation, so a tiny
transfer (``r2`` close to ``r1``) keeps its relative accuracy.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import (
    broadcast_shape,
    finite,
    finite_number,
    is_number,
    positive,
    positive_number,
    require,
    scalar_or_array,
)
from ._evaluate import on_arrays, on_numbers
from ._results import Result, quantity
from .conic import Conic
from .errors import DomainError

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


# ---------------------------------------------------------------------- kernels (one for both paths)
def _tangent_burn(m, r, a_from, a_to, mu):
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
    return m.sqrt(2.0 * mu / r) * abs(difference) / (m.sqrt(s_to) + m.sqrt(s_from))


def _half_period(m, r_low, r_high, mu):
    a = 0.5 * (r_low + r_high)
    return np.pi * m.sqrt(a * a * a / mu)


def _hohmann(m, r1, other1, r2, other2, mu):
    """Burns at r1 (leaving the orbit r1..other1) and at r2 (joining r2..other2), and the time."""
    first = _tangent_burn(m, r1, other1, r2, mu)
    second = _tangent_burn(m, r2, r1, other2, mu)
    return first, second, _half_period(m, r1, r2, mu)


def _bielliptic(m, r1, other1, r2, other2, rb, mu):
    rb = m.where(rb >= m.maximum(r1, r2), rb, np.nan)
    first = _tangent_burn(m, r1, other1, rb, mu)
    second = _tangent_burn(m, rb, r1, r2, mu)
    third = _tangent_burn(m, r2, rb, other2, mu)
    return first, second, third, _half_period(m, r1, rb, mu) + _half_period(m, r2, rb, mu)


def _turned(m, v1, v2, difference, angle):
    """Law of cosines for speeds v1, v2 at ``angle``, given ``difference = v1 - v2`` directly.

    v1^2 + v2^2 - 2 v1 v2 cos(angle) = (v1 - v2)^2 + 4 v1 v2 sin^2(angle/2):
    no cancellation for small angles, nor for nearly equal speeds when the
    caller knows their difference better than by subtracting them.
    """
    half = m.sin(0.5 * angle)
    return m.sqrt(difference * difference + 4.0 * v1 * v2 * half * half)


def _combined(m, v1, v2, angle):
    return _turned(m, v1, v2, v1 - v2, angle)


def _plane_change(m, v, angle):
    return 2.0 * v * m.sin(0.5 * angle)


def _hohmann_speeds(m, r1, r2, mu):
    """Circular and transfer-ellipse speeds at r1 and r2, and the two speed changes.

    The changes ``v_depart - v_circ1`` and ``v_circ2 - v_arrive`` are written
    without subtracting the speeds: with ``s = sqrt(2 r2 / (r1 + r2))``,
    ``s - 1 = ((r2 - r1) / (r1 + r2)) / (s + 1)``, and alike at r2.
    """
    v_circ1 = m.sqrt(mu / r1)
    v_circ2 = m.sqrt(mu / r2)
    total = r1 + r2
    ratio = (r2 - r1) / total
    s_depart = m.sqrt(2.0 * r2 / total)
    s_arrive = m.sqrt(2.0 * r1 / total)
    v_depart = v_circ1 * s_depart
    v_arrive = v_circ2 * s_arrive
    gain_depart = v_circ1 * ratio / (s_depart + 1.0)
    gain_arrive = v_circ2 * ratio / (s_arrive + 1.0)
    return v_circ1, v_depart, v_arrive, v_circ2, gain_depart, gain_arrive


def _split_total(m, speeds, angle, fraction):
    v_circ1, v_depart, v_arrive, v_circ2, gain_depart, gain_arrive = speeds
    return _turned(m, v_circ1, v_depart, gain_depart, fraction * angle) + _turned(
        m, v_arrive, v_circ2, gain_arrive, (1.0 - fraction) * angle
    )


def _hohmann_plane_change(m, r1, r2, mu, angle, fraction):
    v_circ1, v_depart, v_arrive, v_circ2, gain_depart, gain_arrive = _hohmann_speeds(m, r1, r2, mu)
    first = _turned(m, v_circ1, v_depart, gain_depart, fraction * angle)
    second = _turned(m, v_arrive, v_circ2, gain_arrive, (1.0 - fraction) * angle)
    return first, second, _half_period(m, r1, r2, mu)


_INVERSE_GOLDEN = (np.sqrt(5.0) - 1.0) / 2.0


def _best_split(m, r1, r2, mu, angle):
    """Golden-section search of the split on [0, 1]; inputs already broadcast together."""
    speeds = _hohmann_speeds(m, r1, r2, mu)
    low = 0.0 * angle  # zeros (and ones) of the broadcast shape, plain floats on the scalar path
    high = low + 1.0
    inner_low = high - _INVERSE_GOLDEN * (high - low)
    inner_high = low + _INVERSE_GOLDEN * (high - low)
    f_low = _split_total(m, speeds, angle, inner_low)
    f_high = _split_total(m, speeds, angle, inner_high)
    for _ in range(60):  # iterations of the search, each on the whole array
        keep_left = f_low <= f_high
        high = m.where(keep_left, inner_high, high)
        low = m.where(keep_left, low, inner_low)
        new_inner_low = high - _INVERSE_GOLDEN * (high - low)
        new_inner_high = low + _INVERSE_GOLDEN * (high - low)
        # One of the two inner points is reused; evaluate only where it moved.
        moved_low = m.where(keep_left, new_inner_low, inner_high)
        moved_high = m.where(keep_left, inner_low, new_inner_high)
        f_new = _split_total(m, speeds, angle, m.where(keep_left, new_inner_low, new_inner_high))
        f_low, f_high = m.where(keep_left, f_new, f_high), m.where(keep_left, f_low, f_new)
        inner_low, inner_high = moved_low, moved_high
    best = 0.5 * (low + high)
    at_zero = _split_total(m, speeds, angle, 0.0 * best)
    at_best = _split_total(m, speeds, angle, best)
    at_one = _split_total(m, speeds, angle, 0.0 * best + 1.0)
    # the first of the three lowest totals: ties prefer fraction 0, then the search's point
    fraction = m.where((at_zero <= at_best) & (at_zero <= at_one), 0.0, m.where(at_best <= at_one, best, 1.0))
    return m.where(angle == 0.0, 0.0, fraction)


# ---------------------------------------------------------------------- inputs
def _transfer(burns: tuple[Any, ...], duration: Any) -> Transfer:
    """A Transfer from the kernel's burns and duration (arrays or NumPy scalars)."""
    if not isinstance(duration, np.ndarray):  # scalar path: NumPy scalars already
        total = burns[0]
        for b in burns[1:]:
            total = total + b
        return Transfer(burns=burns, total=total, duration=duration)
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


_APSIDES = ("periapsis", "apoapsis")


def _apsis_name(value: Any, name: str) -> str:
    if not isinstance(value, str) or value not in _APSIDES:
        raise DomainError(f"`{name}` must be 'periapsis' or 'apoapsis', not {value!r}")
    return value


def _orbit_end(orbit: Any, apsis: str, name: str) -> tuple[np.ndarray, np.ndarray]:
    """Radius of the named apsis of an orbit and of the other apsis, m.

    A radius is a circle (both apsides at it). A Conic that is not an ellipse
    (``e >= 1``, no apoapsis) gives NaN.
    """
    if not isinstance(orbit, Conic):
        radius = positive(orbit, name, "m")
        return radius, radius
    e = np.asarray(orbit.e, float)
    with np.errstate(invalid="ignore"):
        ellipse = e < 1.0
    rp = np.where(ellipse, np.asarray(orbit.rp, float), np.nan)
    ra = np.where(ellipse, np.asarray(orbit.ra, float), np.nan)
    return (rp, ra) if apsis == "periapsis" else (ra, rp)


def _same_mu(mu: np.ndarray, other: Any, name: str, other_name: str) -> None:
    with np.errstate(invalid="ignore"):
        differs = ~(np.abs(mu - other) <= 1e-12 * np.abs(other))
    require(mu, differs, name, f"the gravitational parameter of `{other_name}`, {np.max(other):.10g}", "")


_NO_RB = object()


def _ends(r1: Any, r2: Any, mu: Any, depart: str, arrive: str, rb: Any = _NO_RB) -> tuple[np.ndarray, ...]:
    """Checked (r1, other1, r2, other2, mu) arrays of a transfer between two orbits, then rb if given.

    Checks run in the order of the parameters, as on the scalar path.
    """
    depart = _apsis_name(depart, "depart")
    arrive = _apsis_name(arrive, "arrive")
    start, other1 = _orbit_end(r1, depart, "r1")
    end, other2 = _orbit_end(r2, arrive, "r2")
    extra = {} if rb is _NO_RB else {"rb": positive(rb, "rb", "m")}
    conics = [(name, orbit) for name, orbit in (("r1", r1), ("r2", r2)) if isinstance(orbit, Conic)]
    if mu is not None:
        mu = positive(mu, "mu", "m^3/s^2")
        for name, orbit in conics:
            _same_mu(mu, np.asarray(orbit.mu, float), "mu", name)
    elif conics:
        mu = np.asarray(conics[0][1].mu, float)
        if len(conics) == 2:
            _same_mu(np.asarray(r2.mu, float), mu, "r2", "r1")
    else:
        raise DomainError("`mu` (m^3/s^2) is required when `r1` and `r2` are radii")
    broadcast_shape(r1=start, r2=end, mu=mu, **extra)
    if len(conics) == 2:
        coplanar = _coplanar(r1, r2)
        if coplanar is not None:
            start = np.where(coplanar, start, np.nan)
    return (start, other1, end, other2, mu, *extra.values())


def _coplanar(first: Conic, second: Conic) -> np.ndarray | None:
    """Where two orbits share their plane and sense of motion (None: planar orbits always do)."""
    n1, n2 = getattr(first, "normal", None), getattr(second, "normal", None)
    if n1 is None or n2 is None:
        return None
    with np.errstate(invalid="ignore"):
        return np.sum(np.asarray(n1, float) * np.asarray(n2, float), axis=-1) >= 1.0 - 1e-12


# ---------------------------------------------------------------------- public
def hohmann(
    r1: ArrayLike | Conic,
    r2: ArrayLike | Conic,
    mu: ArrayLike | None = None,
    *,
    depart: str = "periapsis",
    arrive: str = "apoapsis",
) -> Transfer:
    """Two-burn Hohmann transfer between coplanar orbits: circles (radii) or coaxial ellipses (Conics).

    The transfer ellipse joins the departure point on the first orbit and the
    arrival point on the second, half a revolution apart; both burns are
    tangential. Between circles of radii ``r1`` and ``r2`` it is the classic
    Hohmann transfer. With a :class:`~deltakit.Conic` for either orbit the
    transfer leaves the first at its ``depart`` apsis and arrives at the
    second's ``arrive`` apsis: the orbits are taken as coaxial, with those two
    apsides on opposite sides of the body (their ``argp`` is not read). The
    defaults, periapsis to apoapsis, are the case of two orbits whose
    periapsides point the same way.

    Parameters
    ----------
    r1, r2 : array_like or Conic, shape (...)
        The starting and the target orbit: a circle's radius, m (> 0), or a
        Conic. ``r2 < r1`` is a lowering transfer.
    mu : array_like, shape (...), optional
        Gravitational parameter, m^3/s^2 (> 0). Required for two radii; taken
        from the Conics otherwise (and must then agree with them).
    depart, arrive : {"periapsis", "apoapsis"}, optional
        The apsis of the first orbit where the transfer starts and the apsis of
        the second where it ends. A circle has both at its radius.

    Returns
    -------
    Transfer
        Two burns (onto the transfer ellipse, then onto the target orbit) and
        the duration, half the period of the transfer ellipse. NaN where an
        orbit given as a Conic is not an ellipse (``e >= 1``) or lies in
        another plane.

    Raises
    ------
    DomainError
        If a radius or ``mu`` is not finite and > 0, the orbits have different
        ``mu``, ``depart`` or ``arrive`` is not an apsis name, or the shapes do
        not broadcast.

    Examples
    --------
    From a 300 km Earth orbit to geostationary radius:

    >>> from deltakit import Conic, hohmann
    >>> from deltakit.constants import EARTH
    >>> t = hohmann(EARTH.radius + 300e3, 42164e3, EARTH.mu)
    >>> [round(float(b)) for b in t.burns], round(float(t.total)), round(float(t.duration) / 3600, 2)
    ([2426, 1467], 3893, 5.28)

    From the perigee of a 300 km x 20,000 km orbit instead (an invented tug),
    to geostationary radius; from its apogee the same target costs more (the
    Oberth effect) and takes longer:

    >>> low = Conic.from_apsides(EARTH.radius + 300e3, EARTH.radius + 20_000e3, EARTH.mu)
    >>> by_perigee, by_apogee = hohmann(low, 42164e3), hohmann(low, 42164e3, depart="apoapsis")
    >>> round(float(by_perigee.total)), round(float(by_apogee.total))
    (1858, 2218)
    >>> round(float(by_perigee.duration) / 3600, 2), round(float(by_apogee.duration) / 3600, 2)
    (5.28, 8.77)
    """
    if is_number(r1, r2, mu):
        _apsis_name(depart, "depart")
        _apsis_name(arrive, "arrive")
        r1 = positive_number(r1, "r1", "m")
        r2 = positive_number(r2, "r2", "m")
        mu = positive_number(mu, "mu", "m^3/s^2")
        first, second, duration = on_numbers(_hohmann, r1, r1, r2, r2, mu)
        return _transfer((first, second), duration)
    start, other1, end, other2, mu = _ends(r1, r2, mu, depart, arrive)
    first, second, duration = on_arrays(_hohmann, start, other1, end, other2, mu)
    return _transfer((first, second), duration)


def bielliptic(
    r1: ArrayLike | Conic,
    r2: ArrayLike | Conic,
    rb: ArrayLike,
    mu: ArrayLike | None = None,
    *,
    depart: str = "periapsis",
    arrive: str = "periapsis",
) -> Transfer:
    """Three-burn bi-elliptic transfer through the intermediate radius ``rb``.

    The first burn, at the departure point of the first orbit, raises the
    apoapsis to ``rb``; the second, at ``rb``, moves the periapsis to the
    arrival point; the third joins the second orbit there. Orbits are circles
    (radii) or coaxial ellipses (Conics), as in :func:`hohmann`: the transfer
    leaves at the first orbit's ``depart`` apsis and arrives at the second's
    ``arrive`` apsis, both on the same side of the body (``rb`` opposite). The
    defaults, periapsis to periapsis, are the case of two orbits whose
    periapsides point the same way.

    Parameters
    ----------
    r1, r2 : array_like or Conic, shape (...)
        The starting and the target orbit: a circle's radius, m (> 0), or a Conic.
    rb : array_like, shape (...)
        Intermediate apoapsis radius, m (> 0).
    mu : array_like, shape (...), optional
        Gravitational parameter, m^3/s^2 (> 0); required for two radii, taken
        from the Conics otherwise.
    depart, arrive : {"periapsis", "apoapsis"}, optional
        Apsis of the first orbit where the transfer starts, of the second where it ends.

    Returns
    -------
    Transfer
        Three burns and the duration: half the periods of both ellipses. NaN
        where ``rb`` lies below the departure or the arrival radius (not a
        bi-elliptic transfer), or an orbit given as a Conic is not an ellipse
        or lies in another plane.

    Raises
    ------
    DomainError
        As :func:`hohmann`, and if ``rb`` is not finite and > 0.

    Examples
    --------
    >>> from deltakit import bielliptic
    >>> t = bielliptic(7000e3, 105000e3, 210000e3, 3.986004418e14)
    >>> [round(float(b)) for b in t.burns], round(float(t.total))
    ([2952, 775, 301], 4029)
    >>> float(bielliptic(7000e3, 105000e3, 50000e3, 3.986004418e14).total)
    nan
    """
    if is_number(r1, r2, rb, mu):
        _apsis_name(depart, "depart")
        _apsis_name(arrive, "arrive")
        r1 = positive_number(r1, "r1", "m")
        r2 = positive_number(r2, "r2", "m")
        rb = positive_number(rb, "rb", "m")
        mu = positive_number(mu, "mu", "m^3/s^2")
        *burns, duration = on_numbers(_bielliptic, r1, r1, r2, r2, rb, mu)
        return _transfer(tuple(burns), duration)
    start, other1, end, other2, mu, rb = _ends(r1, r2, mu, depart, arrive, rb)
    *burns, duration = on_arrays(_bielliptic, start, other1, end, other2, rb, mu)
    return _transfer(tuple(burns), duration)


def _angle_number(angle: Any, name: str) -> float:
    angle = finite_number(angle, name, "rad")
    if not 0.0 <= angle <= np.pi:
        _check_angle(angle, name)
    return angle


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


def _speed_number(v: Any, name: str) -> float:
    v = finite_number(v, name, "m/s")
    if v < 0.0:
        _speed(v, name)
    return v


def _speed(v: ArrayLike, name: str) -> np.ndarray:
    v = finite(v, name, "m/s")
    require(v, v < 0.0, name, ">= 0", "m/s")
    return v


def _fraction_number(fraction: Any) -> float:
    fraction = finite_number(fraction, "fraction_first")
    if not 0.0 <= fraction <= 1.0:
        _fraction(fraction)
    return fraction


def _fraction(fraction: ArrayLike) -> np.ndarray:
    fraction = finite(fraction, "fraction_first")
    require(fraction, (fraction < 0.0) | (fraction > 1.0), "fraction_first", "between 0 and 1")
    return fraction


def plane_change(v: ArrayLike, angle: ArrayLike) -> Any:
    """Delta-v to turn a velocity of speed ``v`` through ``angle`` at constant speed.

    ``2 v sin(angle / 2)``.

    Parameters
    ----------
    v : array_like, shape (...)
        Speed, m/s (>= 0).
    angle : array_like, shape (...)
        Angle between the old and the new velocity, rad, in [0, pi].

    Returns
    -------
    ndarray or numpy scalar
        Delta-v magnitude, m/s. Never NaN.

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit import plane_change
    >>> round(float(plane_change(7500.0, np.radians(10.0))), 1)
    1307.3
    """
    if is_number(v, angle):
        return on_numbers(_plane_change, _speed_number(v, "v"), _angle_number(angle, "angle"))
    v = _speed(v, "v")
    angle = _check_angle(angle, "angle")
    broadcast_shape(v=v, angle=angle)
    return scalar_or_array(on_arrays(_plane_change, v, angle))


def combined_plane_change(v1: ArrayLike, v2: ArrayLike, angle: ArrayLike) -> Any:
    """Delta-v that changes speed from ``v1`` to ``v2`` and turns by ``angle`` in one burn.

    The law of cosines, ``sqrt(v1^2 + v2^2 - 2 v1 v2 cos(angle))``, in a form
    without cancellation for small angles.

    Parameters
    ----------
    v1, v2 : array_like, shape (...)
        Speed before and after the burn, m/s (>= 0).
    angle : array_like, shape (...)
        Angle between the two velocities, rad, in [0, pi].

    Returns
    -------
    ndarray or numpy scalar
        Delta-v magnitude, m/s. Never NaN.

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit import combined_plane_change
    >>> round(float(combined_plane_change(1597.0, 3075.0, np.radians(28.5))), 1)
    1837.0
    """
    if is_number(v1, v2, angle):
        return on_numbers(
            _combined, _speed_number(v1, "v1"), _speed_number(v2, "v2"), _angle_number(angle, "angle")
        )
    v1 = _speed(v1, "v1")
    v2 = _speed(v2, "v2")
    angle = _check_angle(angle, "angle")
    broadcast_shape(v1=v1, v2=v2, angle=angle)
    return scalar_or_array(on_arrays(_combined, v1, v2, angle))


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
        Two burns (m/s) and the duration (s, half the transfer-ellipse
        period). Never NaN.

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
    if is_number(r1, r2, mu, angle, fraction_first):
        first, second, duration = on_numbers(
            _hohmann_plane_change,
            positive_number(r1, "r1", "m"),
            positive_number(r2, "r2", "m"),
            positive_number(mu, "mu", "m^3/s^2"),
            _angle_number(angle, "angle"),
            _fraction_number(fraction_first),
        )
        return _transfer((first, second), duration)
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    angle = _check_angle(angle, "angle")
    fraction = _fraction(fraction_first)
    broadcast_shape(r1=r1, r2=r2, mu=mu, angle=angle, fraction_first=fraction)
    first, second, duration = on_arrays(_hohmann_plane_change, r1, r2, mu, angle, fraction)
    return _transfer((first, second), duration)


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
        Fraction in [0, 1] (a pure number), to pass as ``fraction_first`` to
        :func:`hohmann_plane_change`. Never NaN.

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
    if is_number(r1, r2, mu, angle):
        return on_numbers(
            _best_split,
            positive_number(r1, "r1", "m"),
            positive_number(r2, "r2", "m"),
            positive_number(mu, "mu", "m^3/s^2"),
            _angle_number(angle, "angle"),
        )
    r1 = positive(r1, "r1", "m")
    r2 = positive(r2, "r2", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    angle = _check_angle(angle, "angle")
    broadcast_shape(r1=r1, r2=r2, mu=mu, angle=angle)
    return scalar_or_array(on_arrays(_best_split, *np.broadcast_arrays(r1, r2, mu, angle)))
