"""Two-body relations: speeds and specific energy at a radius.

All arguments are SI (m, m/s, m^3/s^2) and broadcast like NumPy ufuncs;
scalars in give NumPy scalars out. Specific energy is J/kg (m^2/s^2), zero for
a parabola, negative for a bound orbit.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ._checks import nonnegative, nonzero, positive, scalar_or_array

__all__ = ["circular_speed", "escape_speed", "vis_viva", "specific_energy"]


def circular_speed(r: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Speed of a circular orbit, sqrt(mu / r).

    Parameters
    ----------
    r : array_like, shape (...)
        Orbit radius, m (> 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    speed : ndarray or numpy scalar
        m/s.

    Examples
    --------
    >>> from deltakit import circular_speed
    >>> from deltakit.constants import EARTH
    >>> round(float(circular_speed(EARTH.radius + 400e3, EARTH.mu)), 1)
    7668.6
    """
    r = positive(r, "r", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    return scalar_or_array(np.sqrt(mu / r))


def escape_speed(r: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Speed that makes the specific energy zero at radius ``r``, sqrt(2 mu / r).

    Examples
    --------
    >>> from deltakit import escape_speed
    >>> from deltakit.constants import EARTH
    >>> round(float(escape_speed(EARTH.radius, EARTH.mu)))
    11180
    """
    r = positive(r, "r", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    return scalar_or_array(np.sqrt(2.0 * mu / r))


def vis_viva(r: ArrayLike, a: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Speed at radius ``r`` on a conic of semi-major axis ``a``.

    ``v = sqrt(mu (2/r - 1/a))``. ``a`` is negative for a hyperbola and may be
    ``inf`` for a parabola. Where ``r`` lies outside the conic (``r > 2a`` on an
    ellipse, so no real speed exists) the element is NaN.

    Parameters
    ----------
    r : array_like
        Radius, m (> 0).
    a : array_like
        Semi-major axis, m (non-zero; ``inf`` allowed).
    mu : array_like
        Gravitational parameter, m^3/s^2 (> 0).

    Examples
    --------
    >>> from deltakit import vis_viva
    >>> round(float(vis_viva(7000e3, 7000e3, 3.986004418e14)), 3)
    7546.053
    """
    r = positive(r, "r", "m")
    a = nonzero(a, "a", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    with np.errstate(invalid="ignore"):
        speed_squared = mu * (2.0 / r - 1.0 / a)
        return scalar_or_array(np.where(speed_squared >= 0.0, np.sqrt(np.abs(speed_squared)), np.nan))


def specific_energy(r: ArrayLike, v: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Specific orbital energy, v^2/2 - mu/r, J/kg.

    Examples
    --------
    >>> from deltakit import specific_energy, escape_speed
    >>> abs(float(specific_energy(7000e3, escape_speed(7000e3, 3.986e14), 3.986e14))) < 1e-6
    True
    """
    r = positive(r, "r", "m")
    v = nonnegative(v, "v", "m/s")
    mu = positive(mu, "mu", "m^3/s^2")
    return scalar_or_array(0.5 * v * v - mu / r)
