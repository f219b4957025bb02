"""Low thrust between circular orbits: Edelbaum's delta-v with a change of plane.

A low-thrust vehicle spirals slowly from one circular orbit to another while
turning the plane, thrusting along the direction of motion tilted out of the
plane by a yaw angle that flips sign at each antinode. With the yaw held
piecewise constant over each revolution and chosen optimally, the total
delta-v is (Edelbaum, T. N., "Propulsion requirements for controllable
satellites", ARS Journal 31(8), 1961, pp. 1079-1089; quoted from memory)::

    dv = sqrt(v1^2 + v2^2 - 2 v1 v2 cos(pi/2 * angle))

with ``v1``, ``v2`` the circular speeds and ``angle`` the change of plane: the
law of cosines of an impulsive combined plane change, with the angle
stretched by pi/2 (a slow plane change at one speed costs pi/2 times the
impulsive one, for small angles). The optimal yaw law holds for a change of
plane up to 2 rad (114.6 deg); beyond it the cheapest spiral goes out to a
vanishing speed and back, at ``v1 + v2`` (also from memory).

Conventions: SI units (m/s, rad); speeds are those of the circular orbits
(``sqrt(mu / r)``); everything broadcasts like a ufunc. Results are for
preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import broadcast_shape, finite_number, is_number, positive, positive_number, scalar_or_array
from .transfers import _check_angle, _combined

__all__ = ["EDELBAUM_ANGLE_LIMIT", "edelbaum"]

#: Largest change of plane the optimal yaw law covers, rad (2 rad = 114.6 deg).
EDELBAUM_ANGLE_LIMIT = 2.0


def edelbaum(v1: ArrayLike, v2: ArrayLike, angle: ArrayLike) -> Any:
    """Low-thrust delta-v between circular orbits of speeds ``v1``, ``v2`` with a change of plane.

    Parameters
    ----------
    v1, v2 : array_like, shape (...)
        Circular speeds of the first and the last orbit, m/s (> 0).
    angle : array_like, shape (...)
        Change of plane, rad in [0, pi].

    Returns
    -------
    ndarray or numpy scalar
        m/s: ``|v1 - v2|`` without a plane change, ``2 v sin(pi angle / 4)`` at
        one speed, ``v1 + v2`` from a change of 2 rad on (see the module notes).

    Examples
    --------
    An invented electric tug from a 28.5 deg, 300 km Earth orbit to the
    equatorial geostationary orbit (circular speeds 7726 and 3075 m/s):

    >>> import numpy as np
    >>> from deltakit import edelbaum, combined_plane_change
    >>> round(float(edelbaum(7726.0, 3075.0, np.radians(28.5))))
    5951
    >>> turn = np.radians(1.0)  # a slow small turn costs pi/2 times the impulsive one
    >>> round(float(edelbaum(7726.0, 7726.0, turn) / combined_plane_change(7726.0, 7726.0, turn)), 4)
    1.5708
    """
    if is_number(v1, v2, angle):
        v1 = positive_number(v1, "v1", "m/s")
        v2 = positive_number(v2, "v2", "m/s")
        angle = finite_number(angle, "angle", "rad")
        if 0.0 <= angle <= math.pi:
            return np.float64(_combined(math, v1, v2, 0.5 * math.pi * min(angle, EDELBAUM_ANGLE_LIMIT)))
    v1 = positive(v1, "v1", "m/s")
    v2 = positive(v2, "v2", "m/s")
    angle = _check_angle(angle, "angle")
    broadcast_shape(v1=v1, v2=v2, angle=angle)
    # in units of the larger speed, so that speeds near the top of the float range do not overflow
    scale = np.maximum(v1, v2)
    stretched = 0.5 * np.pi * np.minimum(angle, EDELBAUM_ANGLE_LIMIT)
    return scalar_or_array(scale * _combined(np, v1 / scale, v2 / scale, stretched))
