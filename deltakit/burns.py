"""Impulsive burns: a velocity change at one point of a conic, and the new conic.

Conventions
-----------
* Frame: the in-plane part of the radial / transverse / normal (RTN) frame at
  the burn point. ``radial`` is along the position vector, positive outward;
  ``transverse`` is perpendicular to it in the orbit plane, positive in the
  direction of motion. Out-of-plane (normal) burns are plane changes, see
  :mod:`deltakit.transfers`.
* A prograde burn is along the velocity; ``dv < 0`` in :func:`burn_prograde`
  is retrograde (against the velocity).
* SI units: m/s for velocity changes, J/kg for specific energy, rad for angles.
* The burn is instantaneous: the position is unchanged, the velocity jumps by
  the delta-v. The new conic keeps the plane and generally has a new
  periapsis direction: ``after.argp = before.argp + nu - nu_after``.
* Infeasible outcomes are NaN (error policy): a burn that reverses the
  direction of motion or leaves zero angular momentum (new transverse speed
  ``<= 0``), and a true anomaly that a hyperbola never reaches, give NaN in
  every outcome of that element (``after``, ``nu_after``, ``energy_change``);
  ``dv`` stays the magnitude that was asked for.
* Everything broadcasts: the conic's elements, ``nu`` and the burn components
  are broadcast together, like a ufunc.

The energy change is computed as ``v . dv + |dv|^2 / 2``, which is exact
algebra and avoids subtracting two large orbital energies.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, nonnegative, scalar_or_array
from ._results import Result, quantity
from .conic import Conic

__all__ = ["BurnOutcome", "burn", "burn_prograde", "energy_gain"]


@dataclass(frozen=True, repr=False, eq=False)
class BurnOutcome(Result):
    """What an impulsive burn did.

    Attributes
    ----------
    before : Conic
        The orbit before the burn (the conic that was passed in, not copied).
    after : Conic
        The orbit after the burn, broadcast to the shape of the outcome.
    nu : ndarray or numpy scalar
        True anomaly of the burn point on ``before``, rad.
    dv : ndarray or numpy scalar
        Magnitude of the velocity change, m/s.
    energy_change : ndarray or numpy scalar
        Change of specific orbital energy, J/kg.
    nu_after : ndarray or numpy scalar
        True anomaly of the burn point on ``after``, rad in (-pi, pi].
    """

    before: Conic = quantity("")
    after: Conic = quantity("")
    nu: Any = quantity("rad")
    dv: Any = quantity("m/s")
    energy_change: Any = quantity("J/kg")
    nu_after: Any = quantity("rad", default=0.0)


def _new_conic(
    before: Conic,
    scale_t: np.ndarray,
    e_cos_new: np.ndarray,
    e_sin_new: np.ndarray,
    p: np.ndarray,
    nu: np.ndarray,
) -> tuple[Conic, np.ndarray]:
    """Assemble the conic after the burn from the new eccentricity vector in RTN.

    ``scale_t`` is new transverse speed / old transverse speed (NaN where
    infeasible), so the new semi-latus rectum is ``p * scale_t**2``;
    ``e_cos_new`` and ``e_sin_new`` are ``e' cos nu'`` and ``e' sin nu'``.
    """
    e_new = np.hypot(e_cos_new, e_sin_new)
    nu_after = np.arctan2(e_sin_new, e_cos_new)
    p_new = p * scale_t * scale_t
    rp_new = p_new / (1.0 + e_new)
    argp_new = nu - nu_after
    argp_new += before.argp
    after = Conic._trusted(rp_new, e_new, before.mu, argp_new)
    return after, nu_after


def burn(conic: Conic, nu: ArrayLike, radial: ArrayLike = 0.0, transverse: ArrayLike = 0.0) -> BurnOutcome:
    """Apply an impulsive burn with in-plane RTN components at true anomaly ``nu``.

    Parameters
    ----------
    conic : Conic
        The orbit before the burn (its elements broadcast with the other inputs).
    nu : array_like, shape (...)
        True anomaly of the burn point, rad.
    radial : array_like, shape (...), optional
        Radial component of the delta-v, m/s, positive outward.
    transverse : array_like, shape (...), optional
        Transverse component of the delta-v, m/s, positive along the motion.

    Returns
    -------
    BurnOutcome
        ``after`` is the new conic; ``energy_change = v . dv + |dv|^2/2`` (J/kg).
        Elements whose burn leaves a transverse speed ``<= 0`` (motion reversed
        or no angular momentum left), or whose ``nu`` the hyperbola never
        reaches, are NaN.

    Raises
    ------
    DomainError
        If ``nu``, ``radial`` or ``transverse`` is not finite.

    Examples
    --------
    Raise the apoapsis of a circular orbit (invented vehicle, Earth's mu):

    >>> from deltakit import Conic, burn
    >>> from deltakit.constants import EARTH
    >>> leo = Conic.circular(7000e3, EARTH.mu)
    >>> out = burn(leo, 0.0, transverse=500.0)
    >>> round(float(out.after.ra) / 1e3), round(float(out.energy_change))
    (9221, 3898027)

    A pure radial kick rotates the periapsis; the burn point keeps its radius:

    >>> out = burn(leo, 0.0, radial=100.0)
    >>> round(float(out.after.radius(out.nu_after)))
    7000000
    """
    if not isinstance(conic, Conic):
        raise TypeError(f"`conic` must be a deltakit.Conic, not {type(conic).__name__}")
    nu = finite(nu, "nu", "rad")
    radial = finite(radial, "radial", "m/s")
    transverse = finite(transverse, "transverse", "m/s")
    e = conic.e
    p = conic.p
    cos_nu = np.cos(nu)
    sin_nu = np.sin(nu)
    q = 1.0 + e * cos_nu  # p / r, > 0 where the conic reaches nu
    root_p_mu = np.sqrt(p / conic.mu)
    with np.errstate(divide="ignore", invalid="ignore"):
        vr = e * sin_nu / root_p_mu
        vt = q / root_p_mu
        x = transverse / vt  # relative change of transverse speed
        scale_t = 1.0 + x
        scale_t = np.where((q > 0.0) & (scale_t > 0.0), scale_t, np.nan)
        # e' cos nu' = r vt'^2/mu - 1 and e' sin nu' = r vt' vr'/mu, written
        # without the "- 1" cancellation for small burns on near-circles.
        e_cos_new = e * cos_nu + q * x * (2.0 + x)
        e_sin_new = scale_t * (e * sin_nu + radial * root_p_mu)
        after, nu_after = _new_conic(conic, scale_t, e_cos_new, e_sin_new, p, nu)
        energy_change = vr * radial + vt * transverse + 0.5 * (radial * radial + transverse * transverse)
        energy_change = np.where(np.isnan(scale_t), np.nan, energy_change)
    dv = np.hypot(radial, transverse)
    shape = after.shape
    return BurnOutcome(
        before=conic,
        after=after,
        nu=scalar_or_array(np.broadcast_to(nu, shape)),
        dv=scalar_or_array(np.broadcast_to(dv, shape)),
        energy_change=scalar_or_array(energy_change),
        nu_after=scalar_or_array(nu_after),
    )


def burn_prograde(conic: Conic, nu: ArrayLike, dv: ArrayLike) -> BurnOutcome:
    """Burn along the velocity at true anomaly ``nu``; ``dv < 0`` burns retrograde.

    Same as :func:`burn` with the components along the local velocity, but
    computed directly: the velocity is scaled by ``1 + dv/v``, so the flight
    path angle at the burn point is unchanged.

    Parameters
    ----------
    conic : Conic
        The orbit before the burn.
    nu : array_like, shape (...)
        True anomaly of the burn point, rad.
    dv : array_like, shape (...)
        Signed delta-v along the velocity, m/s (negative: retrograde).

    Returns
    -------
    BurnOutcome
        ``dv`` holds the magnitude ``|dv|``; ``energy_change = v dv + dv^2/2``.
        Elements with ``dv <= -v`` (the burn would stop or reverse the motion)
        are NaN, as are points a hyperbola never reaches.

    Raises
    ------
    DomainError
        If ``nu`` or ``dv`` is not finite.

    Examples
    --------
    The same 100 m/s adds more orbital energy at periapsis than at apoapsis:

    >>> from deltakit import Conic, burn_prograde
    >>> gto = Conic.from_apsides(6678e3, 42164e3, 3.986004418e14)
    >>> at_periapsis = burn_prograde(gto, 0.0, 100.0).energy_change
    >>> at_apoapsis = burn_prograde(gto, 3.141592653589793, 100.0).energy_change
    >>> round(float(at_periapsis / at_apoapsis), 2)
    6.15
    """
    if not isinstance(conic, Conic):
        raise TypeError(f"`conic` must be a deltakit.Conic, not {type(conic).__name__}")
    nu = finite(nu, "nu", "rad")
    dv = finite(dv, "dv", "m/s")
    e = conic.e
    p = conic.p
    cos_nu = np.cos(nu)
    e_cos = e * cos_nu
    q = 1.0 + e_cos
    with np.errstate(divide="ignore", invalid="ignore"):
        # v = sqrt(mu/p) sqrt(1 + 2 e cos nu + e^2)
        v = np.sqrt(conic.mu / p * (q + e_cos + e * e))
        x = dv / v
        scale_t = 1.0 + x
        scale_t = np.where((q > 0.0) & (scale_t > 0.0), scale_t, np.nan)
        # Both velocity components scale by (1 + x):
        # e' cos nu' = q (1 + x)^2 - 1, e' sin nu' = (1 + x)^2 e sin nu.
        e_cos_new = e_cos + q * x * (2.0 + x)
        e_sin_new = scale_t * scale_t * (e * np.sin(nu))
        after, nu_after = _new_conic(conic, scale_t, e_cos_new, e_sin_new, p, nu)
        energy_change = dv * (v + 0.5 * dv)
        energy_change = np.where(np.isnan(scale_t), np.nan, energy_change)
    shape = after.shape
    return BurnOutcome(
        before=conic,
        after=after,
        nu=scalar_or_array(np.broadcast_to(nu, shape)),
        dv=scalar_or_array(np.broadcast_to(np.abs(dv), shape)),
        energy_change=scalar_or_array(energy_change),
        nu_after=scalar_or_array(nu_after),
    )


def energy_gain(v: ArrayLike, dv: ArrayLike) -> Any:
    """Specific energy added by a prograde burn ``dv`` at speed ``v``: ``v dv + dv^2/2``.

    The Oberth relation: the same delta-v adds more energy the faster the
    vehicle already moves. Per kilogram of vehicle, J/kg (multiply by the
    mass for joules).

    Parameters
    ----------
    v : array_like, shape (...)
        Speed before the burn, m/s (>= 0).
    dv : array_like, shape (...)
        Speed change along the motion, m/s (negative: braking).

    Returns
    -------
    ndarray or numpy scalar
        J/kg.

    Raises
    ------
    DomainError
        If ``v`` is negative or either argument is not finite.

    Examples
    --------
    >>> from deltakit import energy_gain
    >>> float(energy_gain(1.0, 1.0)), float(energy_gain(10.0, 1.0))
    (1.5, 10.5)
    """
    v = nonnegative(v, "v", "m/s")
    dv = finite(dv, "dv", "m/s")
    return scalar_or_array(dv * (v + 0.5 * dv))
