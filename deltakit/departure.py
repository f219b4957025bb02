"""Leaving and reaching a body: escape and capture burns, powered flybys.

Conventions
-----------
* Burns are made at periapsis, along the velocity (tangential), where the
  Oberth effect makes them cheapest. Escape and capture burns are magnitudes,
  m/s, >= 0; the ``dv`` of a powered flyby is signed (negative: braking).
* ``vinf`` is the hyperbolic excess speed, m/s: the speed left over far from
  the body (``C3 = vinf**2``).
* The parking orbit has periapsis radius ``rp``; it is circular when ``ra`` is
  None and the ellipse ``rp..ra`` otherwise.
* SI units (m, m/s, m^3/s^2, rad); everything broadcasts like a ufunc.
* A powered flyby whose burn leaves the vehicle bound to the body (or
  reverses its motion) gives NaN in that element.
* Plain numbers take a scalar fast path with the same checks and results;
  shapes that do not broadcast raise DomainError naming them; extreme but
  finite inputs (1e300, 1e-300) give the right answer where it fits a double,
  inf where it does not, and never a warning.

Accuracy: differences of nearly equal speeds are never formed. The escape
burn from an elongated parking orbit (``ra / rp`` of 1e6, where both speeds
at periapsis lie within 1e-6 of each other) is written as
``(vinf^2 + 2 mu / (rp + ra)) / (v_hyperbola + v_park)``, and the turn of a
flyby leg as ``atan2(1, sqrt(k (2 + k)))`` with ``k = e - 1 = rp vinf^2 / mu``
computed directly, which keeps its digits near a parabola where
``asin(1 / e)`` loses half of them.
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
    nonnegative,
    nonnegative_number,
    positive,
    positive_number,
    require,
    scalar_or_array,
)
from ._evaluate import on_arrays, on_numbers
from ._results import Result, quantity

__all__ = ["Flyby", "escape_burn", "capture_burn", "powered_flyby"]

_RA_RULE = ">= rp (apoapsis at or beyond periapsis)"


def _from_circle(m, rp, vinf, mu):
    """Periapsis burn between a circle of radius rp and the hyperbola of excess vinf.

    ``v_hyperbola^2 - v_circle^2 = vinf^2 + mu / rp``: the difference of the
    two speeds is that over their sum, with nothing subtracted.
    """
    circle_squared = mu / rp
    v_hyperbola = m.sqrt(vinf * vinf + 2.0 * circle_squared)
    return (vinf * vinf + circle_squared) / (v_hyperbola + m.sqrt(circle_squared))


def _from_ellipse(m, rp, vinf, mu, ra):
    """The same from the ellipse rp..ra: ``v_hyperbola^2 - v_park^2 = vinf^2 + 2 mu / (rp + ra)``."""
    v_hyperbola = m.sqrt(vinf * vinf + 2.0 * mu / rp)
    v_park = m.sqrt(2.0 * mu * ra / (rp * (rp + ra)))
    return (vinf * vinf + 2.0 * mu / (rp + ra)) / (v_hyperbola + v_park)


def _periapsis_burn(rp: ArrayLike, vinf: ArrayLike, mu: ArrayLike, ra: ArrayLike | None) -> Any:
    if is_number(rp, vinf, mu) and (ra is None or is_number(ra)):
        rp = positive_number(rp, "rp", "m")
        vinf = nonnegative_number(vinf, "vinf", "m/s")
        mu = positive_number(mu, "mu", "m^3/s^2")
        if ra is None:
            return on_numbers(_from_circle, rp, vinf, mu)
        ra = positive_number(ra, "ra", "m")
        if ra < rp:
            require(ra, True, "ra", _RA_RULE, "m")
        return on_numbers(_from_ellipse, rp, vinf, mu, ra)
    rp = positive(rp, "rp", "m")
    vinf = nonnegative(vinf, "vinf", "m/s")
    mu = positive(mu, "mu", "m^3/s^2")
    if ra is None:
        broadcast_shape(rp=rp, vinf=vinf, mu=mu)
        return scalar_or_array(on_arrays(_from_circle, rp, vinf, mu))
    ra = positive(ra, "ra", "m")
    broadcast_shape(rp=rp, vinf=vinf, mu=mu, ra=ra)
    require(ra, ra < rp, "ra", _RA_RULE, "m")
    return scalar_or_array(on_arrays(_from_ellipse, rp, vinf, mu, ra))


def escape_burn(rp: ArrayLike, vinf: ArrayLike, mu: ArrayLike, ra: ArrayLike | None = None) -> Any:
    """Prograde burn at parking-orbit periapsis that leaves with excess speed ``vinf``.

    ``sqrt(vinf^2 + 2 mu / rp) - v_park``, where ``v_park`` is the periapsis
    speed of the parking orbit (evaluated as the difference of the squared
    speeds over their sum, so an elongated parking orbit loses no digits).

    Parameters
    ----------
    rp : array_like, shape (...)
        Periapsis radius of the parking orbit (its radius when circular), m (> 0).
    vinf : array_like, shape (...)
        Hyperbolic excess speed wanted, m/s (>= 0; 0 is just escaping).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).
    ra : array_like, shape (...), optional
        Apoapsis radius of an elliptic parking orbit, m (>= rp).

    Returns
    -------
    ndarray or numpy scalar
        Delta-v magnitude, m/s, >= 0. Never NaN: every valid input has a burn.

    Raises
    ------
    DomainError
        Non-finite input, ``rp`` or ``mu`` <= 0, ``vinf`` < 0, ``ra`` < ``rp``,
        or shapes that do not broadcast.

    Examples
    --------
    Leave a 300 km Earth orbit with C3 = 12 km^2/s^2 (an invented departure):

    >>> import numpy as np
    >>> from deltakit import escape_burn
    >>> from deltakit.constants import EARTH
    >>> round(float(escape_burn(EARTH.radius + 300e3, np.sqrt(12e6), EARTH.mu)))
    3736

    An elliptic parking orbit up to 100 000 km costs much less:

    >>> round(float(escape_burn(EARTH.radius + 300e3, np.sqrt(12e6), EARTH.mu, ra=100000e3)))
    884
    """
    return _periapsis_burn(rp, vinf, mu, ra)


def capture_burn(rp: ArrayLike, vinf: ArrayLike, mu: ArrayLike, ra: ArrayLike | None = None) -> Any:
    """Retrograde burn at periapsis of an arrival hyperbola into a parking orbit.

    The same magnitude as :func:`escape_burn` (the manoeuvre run backwards in
    time): ``sqrt(vinf^2 + 2 mu / rp) - v_park``.

    Parameters
    ----------
    rp : array_like, shape (...)
        Periapsis radius of the arrival hyperbola and the parking orbit, m (> 0).
    vinf : array_like, shape (...)
        Hyperbolic excess speed on arrival, m/s (>= 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).
    ra : array_like, shape (...), optional
        Apoapsis radius of an elliptic capture orbit, m (>= rp).

    Returns
    -------
    ndarray or numpy scalar
        Delta-v magnitude, m/s, >= 0. Never NaN: every valid input has a burn.

    Examples
    --------
    Arrive at Mars with 2.6 km/s excess and capture at 400 km altitude:

    >>> from deltakit import capture_burn
    >>> from deltakit.constants import MARS
    >>> rp = MARS.radius + 400e3
    >>> into_circle = capture_burn(rp, 2600.0, MARS.mu)
    >>> into_ellipse = capture_burn(rp, 2600.0, MARS.mu, ra=33000e3)
    >>> round(float(into_circle)), round(float(into_ellipse))
    (2056, 917)
    """
    return _periapsis_burn(rp, vinf, mu, ra)


@dataclass(frozen=True, repr=False, eq=False)
class Flyby(Result):
    """Outcome of a powered flyby.

    Attributes
    ----------
    vinf_out : ndarray or numpy scalar
        Hyperbolic excess speed on leaving, m/s (NaN if the burn left the
        vehicle bound).
    deflection : ndarray or numpy scalar
        Angle between the incoming and the outgoing excess velocity, rad.
    gain : ndarray or numpy scalar
        ``vinf_out - (vinf_in + dv)``, m/s: the excess speed the burn bought
        beyond its own delta-v by being made deep in the well.
    """

    vinf_out: Any = quantity("m/s")
    deflection: Any = quantity("rad")
    gain: Any = quantity("m/s")


def _leg_turn(m, k):
    """Half the turn of an unpowered hyperbola, ``asin(1 / e)``, from ``k = e - 1``.

    ``asin(1 / e) = atan2(1, sqrt(e^2 - 1))`` and ``e^2 - 1 = k (2 + k)``: no
    rounding of ``1 / e`` near 1, where asin loses half the digits.
    """
    return m.atan2(1.0, m.sqrt(k * (2.0 + k)))


def _flyby(m, vinf_in, rp, dv, mu):
    escape_squared = 2.0 * mu / rp
    vp = m.sqrt(vinf_in * vinf_in + escape_squared)
    # (vp + dv)^2 - 2 mu/rp without subtracting the large escape term
    vinf_out_squared = vinf_in * vinf_in + dv * (2.0 * vp + dv)
    unbound = (vinf_out_squared >= 0.0) & (vp + dv > 0.0)
    vinf_out_squared = m.where(unbound, vinf_out_squared, np.nan)
    vinf_out = m.sqrt(vinf_out_squared)
    deflection = _leg_turn(m, rp * vinf_in * vinf_in / mu) + _leg_turn(m, rp * vinf_out_squared / mu)
    # vinf_out - vinf_in = (vinf_out^2 - vinf_in^2) / (vinf_out + vinf_in), of the sign of dv
    both = vinf_out + vinf_in
    speed_up = m.where(both > 0.0, dv * (2.0 * vp + dv) / m.where(both > 0.0, both, 1.0), 0.0 * both)
    # gain = (vp - vinf_in) - (vp + dv - vinf_out), each a difference of squares over a sum:
    # escape^2 / (vp + vinf_in) - escape^2 / (vp + dv + vinf_out), put over one denominator
    gain = escape_squared * (speed_up + dv) / ((vp + vinf_in) * (vp + dv + vinf_out))
    return vinf_out, deflection, gain


def powered_flyby(vinf_in: ArrayLike, rp: ArrayLike, dv: ArrayLike, mu: ArrayLike) -> Flyby:
    """Prograde burn ``dv`` at periapsis of a flyby hyperbola.

    The periapsis speed ``vp = sqrt(vinf_in^2 + 2 mu/rp)`` becomes ``vp + dv``, so
    ``vinf_out = sqrt((vp + dv)^2 - 2 mu / rp)``. The excess velocity turns by
    ``asin(1/e_in) + asin(1/e_out)`` with ``e = 1 + rp vinf^2 / mu`` on each leg
    (evaluated as ``atan2(1, sqrt(e^2 - 1))`` from ``e - 1``, exact near a parabola).

    Parameters
    ----------
    vinf_in : array_like, shape (...)
        Hyperbolic excess speed on arrival, m/s (>= 0).
    rp : array_like, shape (...)
        Periapsis radius of the flyby, m (> 0).
    dv : array_like, shape (...)
        Delta-v along the velocity at periapsis, m/s (negative: braking).
    mu : array_like, shape (...)
        Gravitational parameter of the flyby body, m^3/s^2 (> 0).

    Returns
    -------
    Flyby
        ``vinf_out`` and ``gain`` in m/s, ``deflection`` in rad. NaN in every
        field where ``(vp + dv)^2 < 2 mu / rp`` (the vehicle is captured) or
        ``vp + dv <= 0`` (the burn reverses the motion).

    Raises
    ------
    DomainError
        Non-finite input, ``vinf_in`` < 0, ``rp`` or ``mu`` <= 0, or shapes
        that do not broadcast.

    Examples
    --------
    500 m/s at 1.1 Jupiter radii, arriving with 5.6 km/s (an invented probe):

    >>> import numpy as np
    >>> from deltakit import powered_flyby
    >>> from deltakit.constants import JUPITER
    >>> f = powered_flyby(5600.0, 1.1 * JUPITER.radius, 500.0, JUPITER.mu)
    >>> round(float(f.vinf_out)), round(float(f.gain)), round(float(np.degrees(f.deflection)), 1)
    (9416, 3316, 150.2)
    """
    if is_number(vinf_in, rp, dv, mu):
        vinf_out, deflection, gain = on_numbers(
            _flyby,
            nonnegative_number(vinf_in, "vinf_in", "m/s"),
            positive_number(rp, "rp", "m"),
            finite_number(dv, "dv", "m/s"),
            positive_number(mu, "mu", "m^3/s^2"),
        )
        return Flyby(vinf_out=vinf_out, deflection=deflection, gain=gain)
    vinf_in = nonnegative(vinf_in, "vinf_in", "m/s")
    rp = positive(rp, "rp", "m")
    dv = finite(dv, "dv", "m/s")
    mu = positive(mu, "mu", "m^3/s^2")
    broadcast_shape(vinf_in=vinf_in, rp=rp, dv=dv, mu=mu)
    vinf_out, deflection, gain = on_arrays(_flyby, vinf_in, rp, dv, mu)
    return Flyby(
        vinf_out=scalar_or_array(vinf_out),
        deflection=scalar_or_array(deflection),
        gain=scalar_or_array(gain),
    )
