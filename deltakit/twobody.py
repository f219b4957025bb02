"""Two-body relations: speeds and specific energy at a radius.

Conventions
-----------
* SI units: radii and semi-major axes in m, speeds in m/s, ``mu`` in m^3/s^2,
  specific energy in J/kg (m^2/s^2): zero for a parabola, negative for a bound
  orbit.
* Everything broadcasts like a NumPy ufunc; scalars in give NumPy scalars out.
  Plain numbers (``float``, ``int``, ``numpy.float64``) take a scalar fast path
  with the same checks, messages and results.
* Extreme but finite inputs (1e300, 1e-300) give the right answer where it fits
  a double and +-inf where it does not (a speed above about 1e308 m/s), never
  a warning (see :mod:`deltakit._evaluate`).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from ._checks import (
    broadcast_shape,
    is_number,
    nonnegative,
    nonnegative_number,
    nonzero,
    nonzero_number,
    positive,
    positive_number,
    scalar_or_array,
)
from ._evaluate import on_arrays, on_numbers

__all__ = ["circular_speed", "escape_speed", "vis_viva", "specific_energy"]


def _circular_speed(m, r, mu):
    return m.sqrt(mu / r)


def _escape_speed(m, r, mu):
    return m.sqrt(2.0 * mu / r)


def _vis_viva(m, r, a, mu):
    speed_squared = mu * (2.0 / r - 1.0 / a)
    return m.where(speed_squared >= 0.0, m.sqrt(abs(speed_squared)), np.nan)


def _specific_energy(m, r, v, mu):
    return 0.5 * v * v - mu / r


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
        m/s. Never NaN (every valid input has a circular speed).

    Raises
    ------
    DomainError
        If ``r`` or ``mu`` is not finite and > 0, or their shapes do not broadcast.

    Examples
    --------
    >>> from deltakit import circular_speed
    >>> from deltakit.constants import EARTH
    >>> round(float(circular_speed(EARTH.radius + 400e3, EARTH.mu)), 1)
    7668.6
    """
    if is_number(r, mu):
        return on_numbers(_circular_speed, positive_number(r, "r", "m"), positive_number(mu, "mu", "m^3/s^2"))
    r = positive(r, "r", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    broadcast_shape(r=r, mu=mu)
    return scalar_or_array(on_arrays(_circular_speed, r, mu))


def escape_speed(r: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Speed that makes the specific energy zero at radius ``r``, sqrt(2 mu / r).

    Parameters
    ----------
    r : array_like, shape (...)
        Radius, m (> 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    speed : ndarray or numpy scalar
        m/s. Never NaN.

    Examples
    --------
    >>> from deltakit import escape_speed
    >>> from deltakit.constants import EARTH
    >>> round(float(escape_speed(EARTH.radius, EARTH.mu)))
    11180
    """
    if is_number(r, mu):
        return on_numbers(_escape_speed, positive_number(r, "r", "m"), positive_number(mu, "mu", "m^3/s^2"))
    r = positive(r, "r", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    broadcast_shape(r=r, mu=mu)
    return scalar_or_array(on_arrays(_escape_speed, r, mu))


def vis_viva(r: ArrayLike, a: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Speed at radius ``r`` on a conic of semi-major axis ``a``.

    ``v = sqrt(mu (2/r - 1/a))``. ``a`` is negative for a hyperbola and may be
    ``inf`` for a parabola.

    Parameters
    ----------
    r : array_like, shape (...)
        Radius, m (> 0).
    a : array_like, shape (...)
        Semi-major axis, m (non-zero and not NaN; ``+-inf`` allowed).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    speed : ndarray or numpy scalar
        m/s. NaN where ``r`` lies outside the conic (``r > 2a`` on an ellipse,
        so no real speed exists).

    Examples
    --------
    >>> from deltakit import vis_viva
    >>> round(float(vis_viva(7000e3, 7000e3, 3.986004418e14)), 3)
    7546.053
    """
    if is_number(r, a, mu):
        return on_numbers(
            _vis_viva,
            positive_number(r, "r", "m"),
            nonzero_number(a, "a", "m"),
            positive_number(mu, "mu", "m^3/s^2"),
        )
    r = positive(r, "r", "m")
    a = nonzero(a, "a", "m")
    mu = positive(mu, "mu", "m^3/s^2")
    broadcast_shape(r=r, a=a, mu=mu)
    return scalar_or_array(on_arrays(_vis_viva, r, a, mu))


def specific_energy(r: ArrayLike, v: ArrayLike, mu: ArrayLike) -> np.floating | np.ndarray:
    """Specific orbital energy, v^2/2 - mu/r, J/kg.

    Parameters
    ----------
    r : array_like, shape (...)
        Radius, m (> 0).
    v : array_like, shape (...)
        Speed, m/s (>= 0).
    mu : array_like, shape (...)
        Gravitational parameter, m^3/s^2 (> 0).

    Returns
    -------
    energy : ndarray or numpy scalar
        J/kg. Never NaN; +-inf only where the energy itself lies beyond the
        float range (a speed above about 1e154 m/s).

    Examples
    --------
    >>> from deltakit import specific_energy, escape_speed
    >>> abs(float(specific_energy(7000e3, escape_speed(7000e3, 3.986e14), 3.986e14))) < 1e-6
    True
    """
    if is_number(r, v, mu):
        return on_numbers(
            _specific_energy,
            positive_number(r, "r", "m"),
            nonnegative_number(v, "v", "m/s"),
            positive_number(mu, "mu", "m^3/s^2"),
        )
    r = positive(r, "r", "m")
    v = nonnegative(v, "v", "m/s")
    mu = positive(mu, "mu", "m^3/s^2")
    broadcast_shape(r=r, v=v, mu=mu)
    return scalar_or_array(on_arrays(_specific_energy, r, v, mu))
