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
algebra and avoids subtracting two large orbital energies; the new elements
come from the new eccentricity vector written relative to the old one, so a
tiny burn on a near-circle keeps its relative accuracy.

Speed: the conic is trusted (it was validated when made), only the burn
inputs are checked, and large inputs are worked through in cache-sized
blocks of the broadcast shape, each step writing in place.
``benchmarks/bench_burns.py`` compares this with hand-fused NumPy and a
plain-Python loop.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, instance_of, nonnegative, scalar_or_array
from ._results import Result, quantity
from .conic import Conic
from .errors import DomainError

__all__ = ["BurnOutcome", "burn", "burn_at_angle", "burn_prograde", "energy_gain"]


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
        True anomaly of the burn point on ``after``, rad in [-pi, pi].
    """

    before: Conic = quantity("")
    after: Conic = quantity("")
    nu: Any = quantity("rad")
    dv: Any = quantity("m/s")
    energy_change: Any = quantity("J/kg")
    nu_after: Any = quantity("rad", default=0.0)


_BLOCK = 32768  # elements per block: the temporaries of one block stay in cache


def _cos_sin(nu: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """cos and sin of ``nu`` from one tangent of the half angle.

    On NumPy builds with a vectorised ``tan`` this costs a fraction of ``cos``
    and ``sin`` apart; the two agree with them to an ulp or two over (-pi, pi].
    """
    t = np.tan(0.5 * nu)
    t2 = t * t
    inverse = 1.0 / (1.0 + t2)
    cos_nu = (1.0 - t2) * inverse
    sin_nu = (2.0 * t) * inverse
    return cos_nu, sin_nu


def _infeasible(q: np.ndarray, dv: np.ndarray, v: np.ndarray, x: np.ndarray) -> np.ndarray | None:
    """Mask of infeasible burns, or None when there is none (the usual case).

    Infeasible: the burn point is unreachable (``q <= 0``) or the burn stops
    or reverses the motion (``x = dv / v <= -1``, with ``v > 0`` the speed
    component the burn acts on: the new one is ``<= 0``). A few reductions
    decide whether any exists, on the small factors ``dv`` and ``v`` when
    they are smaller than ``x`` (a sweep grid); a NaN counts as infeasible.
    """
    if np.min(q) > 0.0:
        if dv.size + v.size < x.size:
            if np.min(dv) > -np.min(v):  # then dv > -v everywhere
                return None
        elif np.min(x) > -1.0:
            return None
    return (q <= 0.0) | ~(x > -1.0)


def _after_elements(
    scale_t2: np.ndarray,
    e_cos_new: np.ndarray,
    e_sin_new: np.ndarray,
    p: np.ndarray,
    argp_nu: np.ndarray,
    out: tuple[np.ndarray, ...],
) -> None:
    """Write the elements after the burn into ``out`` = (rp, e, argp, nu_after, ...).

    ``scale_t2`` is (new transverse speed / old transverse speed)^2, NaN where
    infeasible, so the new semi-latus rectum is ``p * scale_t2``;
    ``e_cos_new`` and ``e_sin_new`` are ``e' cos nu'`` and ``e' sin nu'``;
    ``argp_nu`` is ``argp + nu``, the direction of the burn point.
    """
    rp_new, e_new, argp_new, nu_after = out[:4]
    np.multiply(e_cos_new, e_cos_new, out=e_new)
    e_new += e_sin_new * e_sin_new
    np.sqrt(e_new, out=e_new)
    np.arctan2(e_sin_new, e_cos_new, out=nu_after)
    np.multiply(scale_t2, p, out=rp_new)
    rp_new /= 1.0 + e_new
    np.subtract(argp_nu, nu_after, out=argp_new)


def _prograde_kernel(rp, e, mu, argp, nu, dv, out):
    """Prograde burns: write rp, e, argp, nu_after, energy_change into ``out``."""
    energy_change = out[4]
    p = rp * (1.0 + e)
    cos_nu, sin_nu = _cos_sin(nu)
    e_cos = e * cos_nu
    q = 1.0 + e_cos
    # v = sqrt(mu/p (1 + 2 e cos nu + e^2))
    v = q + e_cos
    v += e * e
    v = v * (mu / p)  # may broadcast up
    np.sqrt(v, out=v)
    x = dv / v
    np.add(v, 0.5 * dv, out=energy_change)
    energy_change *= dv
    scale_t = 1.0 + x
    bad = _infeasible(q, dv, v, x)
    if bad is not None:
        scale_t = np.where(bad, np.nan, scale_t)
        np.copyto(energy_change, np.nan, where=bad)
    # Both velocity components scale by (1 + x):
    # e' cos nu' = q (1 + x)^2 - 1, e' sin nu' = (1 + x)^2 e sin nu,
    # the first written without the "- 1" cancellation for small burns.
    e_cos_new = x + 2.0
    e_cos_new *= x
    e_cos_new = e_cos_new * q  # may broadcast up
    e_cos_new += e_cos
    scale_t *= scale_t
    e_sin_new = scale_t * (e * sin_nu)
    _after_elements(scale_t, e_cos_new, e_sin_new, p, argp + nu, out)


def _rtn_kernel(rp, e, mu, argp, nu, radial, transverse, out):
    """Burns given in RTN: write rp, e, argp, nu_after, energy_change into ``out``."""
    energy_change = out[4]
    p = rp * (1.0 + e)
    cos_nu, sin_nu = _cos_sin(nu)
    q = 1.0 + e * cos_nu  # p / r, > 0 where the conic reaches nu
    root_p_mu = np.sqrt(p / mu)
    vr = e * sin_nu / root_p_mu
    vt = q / root_p_mu
    x = transverse / vt  # relative change of transverse speed
    np.add(
        vr * radial + vt * transverse, 0.5 * (radial * radial + transverse * transverse), out=energy_change
    )
    scale_t = 1.0 + x
    bad = _infeasible(q, transverse, vt, x)
    if bad is not None:
        scale_t = np.where(bad, np.nan, scale_t)
        np.copyto(energy_change, np.nan, where=bad)
    # e' cos nu' = r vt'^2/mu - 1 and e' sin nu' = r vt' vr'/mu, written
    # without the "- 1" cancellation for small burns on near-circles.
    e_cos_new = e * cos_nu + q * x * (2.0 + x)
    e_sin_new = scale_t * (e * sin_nu + radial * root_p_mu)
    _after_elements(scale_t * scale_t, e_cos_new, e_sin_new, p, argp + nu, out)


def _blockwise(kernel, *arrays: np.ndarray) -> tuple[np.ndarray, ...]:
    """Run an elementwise kernel over the broadcast of ``arrays`` in cache-sized blocks.

    The kernel writes five outputs of the broadcast shape. Blocks are slices
    along the first axis; an input that is broadcast along that axis is passed
    whole, so work on a short axis (``cos nu`` of a 1000 x 1000 grid of burn
    points x delta-v) is done once per block row, not once per element.
    Small inputs run in one call.
    """
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    if not shape:  # one case: work on 1-element arrays, so in-place steps hold
        return tuple(o.reshape(()) for o in _blockwise(kernel, *(a.reshape(1) for a in arrays)))
    outputs = tuple(np.empty(shape) for _ in range(5))
    size = outputs[0].size
    ndim = len(shape)
    arrays = tuple(a.reshape((1,) * (ndim - a.ndim) + a.shape) for a in arrays)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        if size <= 2 * _BLOCK:
            if size:
                kernel(*arrays, out=outputs)
            return outputs
        rows = max(1, _BLOCK * shape[0] // size)
        for start in range(0, shape[0], rows):  # blocks of many cases, not cases
            stop = start + rows
            block = tuple(a if a.shape[0] == 1 else a[start:stop] for a in arrays)
            kernel(*block, out=tuple(o[start:stop] for o in outputs))
    return outputs


def _outcome(
    conic: Conic, nu: np.ndarray, dv: np.ndarray, results: tuple[np.ndarray, ...], shape: tuple[int, ...]
) -> BurnOutcome:
    rp_new, e_new, argp_new, nu_after, energy_change = results
    return BurnOutcome(
        before=conic,
        after=Conic._trusted(rp_new, e_new, conic.mu, argp_new, copy=False),
        nu=scalar_or_array(np.broadcast_to(nu, shape)),
        dv=scalar_or_array(np.broadcast_to(dv, shape)),
        energy_change=scalar_or_array(energy_change),
        nu_after=scalar_or_array(nu_after),
    )


def _elements(conic: Conic) -> tuple[np.ndarray, ...]:
    instance_of(conic, Conic, "conic")
    return tuple(np.asarray(getattr(conic, name), dtype=float) for name in ("rp", "e", "mu", "argp"))


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
    elements = _elements(conic)
    nu = finite(nu, "nu", "rad")
    radial = finite(radial, "radial", "m/s")
    transverse = finite(transverse, "transverse", "m/s")
    shape = np.broadcast_shapes(*(a.shape for a in elements), nu.shape, radial.shape, transverse.shape)
    results = _blockwise(_rtn_kernel, *elements, nu, radial, transverse)
    return _outcome(conic, nu, np.hypot(radial, transverse), results, shape)


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
    elements = _elements(conic)
    nu = finite(nu, "nu", "rad")
    dv = finite(dv, "dv", "m/s")
    shape = np.broadcast_shapes(*(a.shape for a in elements), nu.shape, dv.shape)
    results = _blockwise(_prograde_kernel, *elements, nu, dv)
    return _outcome(conic, nu, np.abs(dv), results, shape)


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


def burn_at_angle(conic: Conic, nu: Any, dv: Any, angle: Any = 0.0, *, reference: str = "velocity"):
    """An impulsive in-plane burn of size ``dv`` turned ``angle`` from a reference.

    With ``reference="velocity"`` (default) ``angle`` (rad) is measured from
    the velocity towards the outward side: 0 prograde, pi retrograde, pi/2
    perpendicular to the velocity, outwards. In the radial/transverse frame the
    burn then points at ``angle + gamma`` from the transverse direction, gamma
    being the flight-path angle. With ``reference="transverse"`` the angle is
    measured from the transverse direction towards the radial one (pi/2 is a
    purely radial, outward burn). Thin wrapper over :func:`burn`;
    broadcasts.

    Examples
    --------
    >>> from deltakit import Conic, burn_at_angle
    >>> out = burn_at_angle(Conic.circular(7000e3, 3.986e14), 0.0, 100.0)
    >>> round(float(out.after.ra) / 1e3)
    7384
    """
    dv = finite(dv, "dv", "m/s")
    angle = finite(angle, "angle", "rad")
    if reference == "velocity":
        direction = angle + np.asarray(conic.flight_path_angle(nu))
    elif reference == "transverse":
        direction = angle
    else:
        raise DomainError(f"`reference` must be 'velocity' or 'transverse', not {reference!r}")
    return burn(conic, nu, radial=dv * np.sin(direction), transverse=dv * np.cos(direction))
