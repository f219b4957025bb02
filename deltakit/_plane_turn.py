"""Turning an orbit plane about the radius of a burn point: the new inclination, node and latitude.

A burn changes the velocity but not the position, so the new orbit plane
contains the radius vector: it is the old plane turned about the radius by an
angle ``delta``. With the burn point at argument of latitude ``u`` (angle in
the old plane from the ascending node, in the direction of motion) on a plane
of inclination ``inc`` and node ``raan``, the new plane's unit normal, in the
axes (node direction, a quarter turn ahead of it in the reference plane,
pole), is::

    w' = ( sin(delta) sin(u),
          -sin(delta) cos(u) cos(inc) - cos(delta) sin(inc),
           cos(delta) cos(inc) - sin(delta) cos(u) sin(inc) )

(the old normal turned about the radius; derived in
``deltakit.symbolic.space``). ``delta > 0`` tilts the velocity towards the
old normal, as a burn with a positive normal component does. From ``w'``:
``cos(inc') = w'_z``, the node moves by ``atan2(w'_x, -w'_y)`` and the burn
point's new argument of latitude follows from the projections of the radius
on the new node line.

Conventions (those of :mod:`deltakit.conic`): when the new plane is
equatorial (its tilt zero, or too small to square), its node is undefined;
the old node is kept as the reference direction, and the latitude is
measured from it in the new direction of motion. A turn of exactly zero
keeps the old elements bit for bit.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["turned_plane", "turned_plane_number"]

_TWO_PI = 2.0 * math.pi
#: Below this tilt (its square is subnormal, its digits gone) the new plane
#: counts as equatorial, in both the array and the scalar path.
_FLAT = 1e-150


def turned_plane(
    inc: np.ndarray,
    raan: np.ndarray,
    sin_i: np.ndarray,
    cos_i: np.ndarray,
    u: np.ndarray,
    cos_u: np.ndarray,
    sin_u: np.ndarray,
    cos_d: np.ndarray,
    sin_d: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Inclination, node and argument of latitude after turning the plane by ``delta``.

    Arrays broadcast; ``sin_i, cos_i`` are those of ``inc`` (``sin_i`` exactly
    0 at ``inc = pi``), ``cos_u, sin_u`` those of ``u`` and ``cos_d, sin_d``
    those of the turn. Returns ``inc'`` in [0, pi], ``raan'`` in [0, 2 pi)
    (unchanged where the plane did not turn) and ``u'``.
    """
    tilt = sin_d * cos_u
    c = tilt * cos_i + cos_d * sin_i  # node direction of the new plane, along the old node
    s = sin_d * sin_u  # ... and a quarter turn ahead of it, both times sin(inc')
    w_z = cos_d * cos_i - tilt * sin_i
    sin_new = np.sqrt(c * c + s * s)
    inc_new = np.arctan2(sin_new, w_z)
    raan_new = raan + np.arctan2(s, c)
    raan_new -= _TWO_PI * np.floor(raan_new / _TWO_PI)
    # the radius projected on the new node line and on the line a quarter turn ahead
    along = cos_u * c + (sin_u * cos_i) * s
    ahead = (cos_d * sin_u) * c - (cos_d * cos_u * cos_i - sin_d * sin_i) * s
    u_new = np.arctan2(ahead, along)
    flat = np.asarray(sin_new < _FLAT)
    if flat.any():  # the new plane is equatorial: keep the old node as reference
        u_new = np.where(flat, np.where(cos_i * w_z < 0.0, -u, u), u_new)
        raan_new = np.where(flat, raan, raan_new)
        inc_new = np.where(flat, np.where(w_z < 0.0, np.pi, 0.0), inc_new)
    unturned = np.asarray((sin_d == 0.0) & (cos_d > 0.0))
    if unturned.any():  # no turn at all: the old plane exactly
        inc_new = np.where(unturned, inc, inc_new)
        u_new = np.where(unturned, u, u_new)
        raan_new = np.where(unturned, raan, raan_new)
    return inc_new, raan_new, u_new


def turned_plane_number(
    inc: float, raan: float, u: float, cos_d: float, sin_d: float
) -> tuple[float, float, float]:
    """:func:`turned_plane` for one burn point, with :mod:`math` (the scalar fast path)."""
    if sin_d == 0.0 and cos_d > 0.0:
        return inc, raan, u
    sin_i = 0.0 if inc == math.pi else math.sin(inc)
    cos_i = math.cos(inc)
    cos_u, sin_u = math.cos(u), math.sin(u)
    tilt = sin_d * cos_u
    c = tilt * cos_i + cos_d * sin_i
    s = sin_d * sin_u
    w_z = cos_d * cos_i - tilt * sin_i
    sin_new = math.hypot(c, s)
    if sin_new < _FLAT:
        return (math.pi if w_z < 0.0 else 0.0), raan, -u if cos_i * w_z < 0.0 else u
    inc_new = math.atan2(sin_new, w_z)
    node_shift = math.atan2(s, c)
    along = cos_u * c + (sin_u * cos_i) * s
    ahead = (cos_d * sin_u) * c - (cos_d * cos_u * cos_i - sin_d * sin_i) * s
    u_new = math.atan2(ahead, along)
    raan_new = raan if node_shift == 0.0 else (raan + node_shift) % _TWO_PI
    return inc_new, raan_new, u_new
