"""Impulsive burns: a velocity change at one point of a conic, and the new conic.

Conventions
-----------
* Frame: the radial / transverse / normal (RTN) frame at the burn point.
  ``radial`` is along the position vector, positive outward; ``transverse``
  is perpendicular to it in the orbit plane, positive in the direction of
  motion; ``normal`` is along the orbit's angular momentum
  (:attr:`~deltakit.Conic.normal`). A normal component turns the orbit plane
  about the radius: it changes inclination and node as well as shape.
* A prograde burn is along the velocity; ``dv < 0`` in :func:`burn_prograde`
  is retrograde (against the velocity).
* SI units: m/s for velocity changes, J/kg for specific energy, rad for angles.
* The burn is instantaneous: the position is unchanged, the velocity jumps by
  the delta-v. The new conic generally has a new periapsis direction
  (``after.argp``) and, with a normal component, a new plane (``after.inc``,
  ``after.raan``); ``nu_after`` is the burn point's true anomaly on it.
* A burn that reverses the direction of motion gives the orbit it really
  makes: the same path flown the other way, in the plane turned over
  (``inc`` becomes ``pi - inc``, the node moves by pi; a planar orbit becomes
  the retrograde ``inc = pi`` one). Its energy change is still
  ``v . dv + |dv|^2 / 2``.
* Infeasible outcomes are NaN (error policy): a burn that leaves zero angular
  momentum (the new velocity along the radius, or zero), and a true anomaly
  that a hyperbola never reaches, give NaN in every outcome of that element
  (``after``, ``nu_after``, ``energy_change``); ``dv`` stays the magnitude
  that was asked for.
* Everything broadcasts: the conic's elements, ``nu`` and the burn components
  are broadcast together, like a ufunc.

The energy change is computed as ``v . dv + |dv|^2 / 2``, which is exact
algebra and avoids subtracting two large orbital energies; the new elements
come from the new eccentricity vector written relative to the old one, so a
tiny burn on a near-circle keeps its relative accuracy.

Speed: the conic is trusted (it was validated when made), only the burn
inputs are checked, and large inputs are worked through in cache-sized blocks
of the flattened cases (:mod:`deltakit._blocks`), each step writing in
place; one orbit of plain numbers takes a scalar path written with
:mod:`math`. ``benchmarks/bench_burns.py`` and ``benchmarks/bench_space.py``
compare this with cache-blocked hand-written NumPy.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._blocks import blockwise
from ._checks import (
    broadcast_shape,
    finite,
    finite_number,
    instance_of,
    is_number,
    nonnegative,
    nonnegative_number,
    scalar_or_array,
)
from ._plane_turn import turned_plane, turned_plane_number
from ._results import Result, quantity
from .conic import Conic, _half_angle, _half_angle_number
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


# ---------------------------------------------------------------------- shared steps
def _cos_sin(nu: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """cos and sin of ``nu`` from one tangent of the half angle (see :func:`deltakit.conic._half_angle`)."""
    cos_nu, sin_nu, _ = _half_angle(nu)
    return cos_nu, sin_nu


def _all_ordinary(q: np.ndarray, dv: np.ndarray, v: np.ndarray, x: np.ndarray) -> bool:
    """True when every burn point is reachable and no burn stops or reverses the motion.

    That is ``q > 0`` and ``x = dv / v > -1`` everywhere, with ``v > 0`` the
    speed component the burn acts on. A few reductions decide it, on the
    small factors ``dv`` and ``v`` when they are smaller than ``x`` (a sweep
    grid); a NaN counts as not ordinary.
    """
    if np.min(q) > 0.0:
        if dv.size + v.size < x.size:
            if np.min(dv) > -np.min(v):  # then dv > -v everywhere
                return True
        elif np.min(x) > -1.0:
            return True
    return False


#: Flags of a planar burn: the plane is kept (0), turned over by a reversal (1) or there is no orbit (2).
_REVERSED, _NO_ORBIT = 1, 2


def _flag(flags: np.ndarray, bad: np.ndarray, scale_t: np.ndarray) -> None:
    """Mark the burns that reverse the motion and those that leave no orbit."""
    np.copyto(flags, _REVERSED, where=scale_t < 0.0)
    np.copyto(flags, _NO_ORBIT, where=bad)


def _after_elements(
    scale_t2: np.ndarray,
    e_cos_new: np.ndarray,
    e_sin_new: np.ndarray,
    p: np.ndarray,
    argp_nu: np.ndarray,
    out: list[np.ndarray],
) -> None:
    """Write the elements after the burn into ``out`` = (rp, e, argp, nu_after, ...).

    ``scale_t2`` is (new transverse speed / old transverse speed)^2, NaN where
    infeasible, so the new semi-latus rectum is ``p * scale_t2``;
    ``e_cos_new`` and ``e_sin_new`` are ``e' cos nu'`` and ``e' sin nu'`` in
    the new plane; ``argp_nu`` is the burn point's argument of latitude.
    """
    rp_new, e_new, argp_new, nu_after = out[:4]
    np.multiply(e_cos_new, e_cos_new, out=e_new)
    e_new += e_sin_new * e_sin_new
    np.sqrt(e_new, out=e_new)
    np.arctan2(e_sin_new, e_cos_new, out=nu_after)
    np.multiply(scale_t2, p, out=rp_new)
    rp_new /= 1.0 + e_new
    np.subtract(argp_nu, nu_after, out=argp_new)


# ---------------------------------------------------------------------- kernels
def _prograde_kernel(rp, e, mu, argp, nu, dv, out):
    """Prograde burns: write rp, e, argp, nu_after, energy_change and the flags (see :func:`_flag`)."""
    energy_change = out[4]
    p = rp * (1.0 + e)
    cos_nu, sin_nu, half_cos2 = _half_angle(nu)
    e_cos = e * cos_nu
    one_minus_e = 1.0 - e
    e_half = (2.0 * e) * half_cos2  # e (1 + cos nu), free of cancellation near apoapsis
    q = one_minus_e + e_half  # 1 + e cos nu
    # v = sqrt(mu/p ((1 - e)^2 + 4 e cos^2(nu/2))), the sum of two terms >= 0
    v = one_minus_e * one_minus_e + 2.0 * e_half
    v = v * (mu / p)  # may broadcast up
    np.sqrt(v, out=v)
    x = dv / v
    np.add(v, 0.5 * dv, out=energy_change)
    energy_change *= dv
    scale_t = 1.0 + x
    # Both velocity components scale by s = 1 + x:
    # e' cos nu' = q s^2 - 1, e' sin nu' = s |s| e sin nu (s < 0: the motion reversed,
    # the plane turned over), the first written without the "- 1" cancellation.
    e_cos_new = x + 2.0
    e_cos_new *= x
    e_cos_new = e_cos_new * q  # may broadcast up
    e_cos_new += e_cos
    if _all_ordinary(q, dv, v, x):
        scale_t *= scale_t
        e_sin_new = scale_t * (e * sin_nu)
    else:
        bad = ~(q > 0.0) | ~(scale_t != 0.0)
        _flag(out[5], bad, scale_t)
        factor = np.where(bad, np.nan, scale_t * np.abs(scale_t))
        np.copyto(energy_change, np.nan, where=bad)
        e_sin_new = factor * (e * sin_nu)
        scale_t = np.abs(factor)
    _after_elements(scale_t, e_cos_new, e_sin_new, p, argp + nu, out)


def _rtn_kernel(rp, e, mu, argp, nu, radial, transverse, out):
    """In-plane RTN burns: write rp, e, argp, nu_after, energy_change and the flags (see :func:`_flag`)."""
    energy_change = out[4]
    p = rp * (1.0 + e)
    cos_nu, sin_nu, half_cos2 = _half_angle(nu)
    q = (1.0 - e) + (2.0 * e) * half_cos2  # 1 + e cos nu = p / r, > 0 where the conic reaches nu
    root_p_mu = np.sqrt(p / mu)
    vr = e * sin_nu / root_p_mu
    vt = q / root_p_mu
    x = transverse / vt  # relative change of transverse speed
    np.add(
        vr * radial + vt * transverse, 0.5 * (radial * radial + transverse * transverse), out=energy_change
    )
    scale_t = 1.0 + x
    if not _all_ordinary(q, transverse, vt, x):
        bad = ~(q > 0.0) | ~(scale_t != 0.0)
        _flag(out[5], bad, scale_t)
        # a reversed burn flies the new plane (turned over) with transverse speed |s| vt
        scale_t = np.where(bad, np.nan, np.abs(scale_t))
        np.copyto(energy_change, np.nan, where=bad)
    # e' cos nu' = r vt'^2/mu - 1 and e' sin nu' = r vt' vr'/mu, written
    # without the "- 1" cancellation for small burns on near-circles.
    e_cos_new = e * cos_nu + q * x * (2.0 + x)
    e_sin_new = scale_t * (e * sin_nu + radial * root_p_mu)
    _after_elements(scale_t * scale_t, e_cos_new, e_sin_new, p, argp + nu, out)


def _space_kernel(rp, e, mu, argp, inc, raan, nu, radial, transverse, normal, out):
    """Full RTN burns: write rp, e, argp, nu_after, energy_change, inc, raan."""
    energy_change, inc_new, raan_new = out[4], out[5], out[6]
    p = rp * (1.0 + e)
    cos_nu, sin_nu, half_cos2 = _half_angle(nu)
    q = (1.0 - e) + (2.0 * e) * half_cos2
    root_p_mu = np.sqrt(p / mu)
    vr = e * sin_nu / root_p_mu
    vt = q / root_p_mu
    x = transverse / vt
    y = normal / vt
    np.add(
        vr * radial + vt * transverse,
        0.5 * (radial * radial + transverse * transverse + normal * normal),
        out=energy_change,
    )
    # The new velocity has radial part vr + radial and, in the turned plane, the
    # transverse part s vt with s = |(1 + x, y)|; the plane turns about the radius
    # by delta, cos delta = (1 + x) / s, sin delta = y / s.
    along = 1.0 + x
    scale_t = np.sqrt(along * along + y * y)
    if not (np.min(q) > 0.0 and np.min(scale_t) > 0.0):
        bad = ~(q > 0.0) | ~(scale_t > 0.0)
        scale_t = np.where(bad, np.nan, scale_t)
        np.copyto(energy_change, np.nan, where=bad)
    e_cos_new = e * cos_nu + q * (x * (2.0 + x) + y * y)
    e_sin_new = scale_t * (e * sin_nu + radial * root_p_mu)
    u = argp + nu
    _after_elements(scale_t * scale_t, e_cos_new, e_sin_new, p, u, out)
    cos_a, sin_a = _cos_sin(argp)
    cos_u = cos_a * cos_nu - sin_a * sin_nu
    sin_u = sin_a * cos_nu + cos_a * sin_nu
    cos_i, sin_i = _cos_sin(inc)
    sin_i = np.where(inc == np.pi, 0.0, sin_i)  # exactly 0 for a retrograde equatorial orbit
    inverse = 1.0 / scale_t
    inc_b, raan_b, u_new = turned_plane(
        inc, raan, sin_i, cos_i, u, cos_u, sin_u, along * inverse, y * inverse
    )
    np.copyto(inc_new, inc_b)
    np.copyto(raan_new, raan_b)
    np.subtract(u_new, out[3], out=out[2])


def _magnitude_kernel(radial, transverse, normal, out):
    """|dv| of RTN components."""
    magnitude = out[0]
    np.multiply(radial, radial, out=magnitude)
    magnitude += transverse * transverse
    magnitude += normal * normal
    np.sqrt(magnitude, out=magnitude)


# ---------------------------------------------------------------------- assembling outcomes
def _flagged_planes(
    elements: tuple[np.ndarray, ...], nu: np.ndarray, results: tuple[np.ndarray, ...]
) -> tuple[np.ndarray, np.ndarray]:
    """The planes after the flagged planar burns (``results[5]``): turned over, or NaN.

    Rewrites the ``argp`` of reversed burns in ``results[2]``; returns full
    ``inc`` and ``raan`` arrays.
    """
    flags = results[5]
    shape = flags.shape
    _, _, _, argp, inc, raan = (np.broadcast_to(a, shape) for a in elements)
    inc_all, raan_all = np.array(inc), np.array(raan)
    where = flags == _REVERSED  # a mask: boolean indexing works for one case (shape ()) too
    if where.any():
        u = argp[where] + np.broadcast_to(nu, shape)[where]
        inc_w = inc[where]
        sin_i = np.where(inc_w == np.pi, 0.0, np.sin(inc_w))
        inc_b, raan_b, u_new = turned_plane(
            inc_w, raan[where], sin_i, np.cos(inc_w), u, np.cos(u), np.sin(u), -1.0, 0.0
        )
        results[2][where] = u_new - results[3][where]
        inc_all[where], raan_all[where] = inc_b, raan_b
    no_orbit = flags == _NO_ORBIT
    inc_all[no_orbit] = raan_all[no_orbit] = np.nan
    return inc_all, raan_all


def _outcome(
    conic: Conic,
    nu: np.ndarray,
    dv: np.ndarray,
    rp_new: np.ndarray,
    e_new: np.ndarray,
    argp_new: np.ndarray,
    nu_after: np.ndarray,
    energy_change: np.ndarray,
    inc_new: np.ndarray,
    raan_new: np.ndarray,
) -> BurnOutcome:
    shape = rp_new.shape
    after = Conic._trusted(rp_new, e_new, conic._elements()[2], argp_new, inc_new, raan_new, copy=False)
    return _record(
        BurnOutcome,
        before=conic,
        after=after,
        nu=scalar_or_array(np.broadcast_to(nu, shape)),
        dv=scalar_or_array(np.broadcast_to(dv, shape)),
        energy_change=scalar_or_array(energy_change),
        nu_after=scalar_or_array(nu_after),
    )


def _planar_outcome(conic, elements, nu, dv, results) -> BurnOutcome:
    inc, raan = elements[4], elements[5]
    if results[5].any():
        inc, raan = _flagged_planes(elements, nu, results)
    return _outcome(conic, nu, dv, *results[:5], inc, raan)


def _record(cls: type, **fields: Any) -> Any:
    """A frozen result made without its generated ``__init__`` (the fields are ready)."""
    record = object.__new__(cls)
    record.__dict__.update(fields)
    return record


def _shaped(conic: Conic) -> np.ndarray:
    """A stand-in of the conic's shape for :func:`broadcast_shape` (a view, no data)."""
    return np.broadcast_to(0.0, conic.shape)


def _elements(conic: Conic) -> tuple[np.ndarray, ...]:
    instance_of(conic, Conic, "conic")
    return conic._elements()


# ---------------------------------------------------------------------- public
def burn(
    conic: Conic,
    nu: ArrayLike,
    radial: ArrayLike = 0.0,
    transverse: ArrayLike = 0.0,
    normal: ArrayLike = 0.0,
) -> BurnOutcome:
    """Apply an impulsive burn with RTN components at true anomaly ``nu``.

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
    normal : array_like, shape (...), optional
        Normal component of the delta-v, m/s, along the orbit's angular
        momentum: it turns the plane about the radius (changing ``inc`` and
        ``raan``).

    Returns
    -------
    BurnOutcome
        ``after`` is the new conic; ``energy_change = v . dv + |dv|^2/2`` (J/kg).
        A burn that reverses the motion gives the retrograde orbit it makes
        (plane turned over). Elements whose burn leaves no angular momentum
        (new velocity along the radius), or whose ``nu`` the hyperbola never
        reaches, are NaN.

    Raises
    ------
    DomainError
        If ``nu``, ``radial``, ``transverse`` or ``normal`` is not finite.

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

    A normal burn at the node turns the plane: 100 m/s at 7.5 km/s is 0.76 deg:

    >>> import numpy as np
    >>> out = burn(leo, 0.0, normal=100.0)
    >>> round(float(np.degrees(out.after.inc)), 3)
    0.759
    """
    if type(conic) is Conic and conic._numbers is not None and is_number(nu, radial, transverse, normal):
        return _burn_number(conic, float(nu), float(radial), float(transverse), float(normal))
    elements = _elements(conic)
    nu = finite(nu, "nu", "rad")
    radial = finite(radial, "radial", "m/s")
    transverse = finite(transverse, "transverse", "m/s")
    normal = finite(normal, "normal", "m/s")
    broadcast_shape(conic=_shaped(conic), nu=nu, radial=radial, transverse=transverse, normal=normal)
    if normal.ndim == 0 and normal == 0.0:  # in the plane: the planar kernel, bit for bit
        results = blockwise(_rtn_kernel, (*elements[:4], nu, radial, transverse), 5, flags=True)
        return _planar_outcome(conic, elements, nu, np.hypot(radial, transverse), results)
    results = blockwise(_space_kernel, (*elements, nu, radial, transverse, normal), 7)
    (dv,) = blockwise(_magnitude_kernel, (radial, transverse, normal), 1)  # no full-size temporaries
    return _outcome(conic, nu, dv, *results)


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
        A retrograde burn beyond the speed (``dv < -v``) reverses the motion:
        the outcome is the retrograde orbit it makes. ``dv = -v`` (the vehicle
        stops) and points a hyperbola never reaches are NaN.

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
    if type(conic) is Conic and conic._numbers is not None and is_number(nu, dv):
        return _prograde_number(conic, float(nu), float(dv))  # moderate finite numbers (is_number)
    elements = _elements(conic)
    nu = finite(nu, "nu", "rad")
    dv = finite(dv, "dv", "m/s")
    broadcast_shape(conic=_shaped(conic), nu=nu, dv=dv)
    results = blockwise(_prograde_kernel, (*elements[:4], nu, dv), 5, flags=True)
    return _planar_outcome(conic, elements, nu, np.abs(dv), results)


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
    if is_number(v, dv):
        v = nonnegative_number(v, "v", "m/s")
        dv = finite_number(dv, "dv", "m/s")
        return np.float64(dv * (v + 0.5 * dv))
    v = nonnegative(v, "v", "m/s")
    dv = finite(dv, "dv", "m/s")
    broadcast_shape(v=v, dv=dv)
    with np.errstate(over="ignore"):  # beyond a float the gain is inf, as it should be
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
    instance_of(conic, Conic, "conic")
    nu = finite(nu, "nu", "rad")
    dv = finite(dv, "dv", "m/s")
    angle = finite(angle, "angle", "rad")
    broadcast_shape(conic=_shaped(conic), nu=nu, dv=dv, angle=angle)
    if reference == "velocity":
        direction = angle + np.asarray(conic.flight_path_angle(nu))
    elif reference == "transverse":
        direction = angle
    else:
        raise DomainError(f"`reference` must be 'velocity' or 'transverse', not {reference!r}")
    return burn(conic, nu, radial=dv * np.sin(direction), transverse=dv * np.cos(direction))


# ---------------------------------------------------------------------- one orbit of numbers
# The same steps as the kernels above, with math on Python floats: a scalar call
# costs microseconds, not the set-up of a dozen arrays. Results agree with the
# array path to rounding (tests/test_burns.py checks it on random inputs).
def _number_outcome(
    conic: Conic,
    nu: float,
    dv: float,
    p: float,
    scale_t2: float,
    e_cos_new: float,
    e_sin_new: float,
    energy_change: float,
    plane: tuple[float, float, float] | None,
) -> BurnOutcome:
    """The outcome of one burn from its new eccentricity vector; NaN everywhere if infeasible."""
    rp, e, mu, argp, inc, raan = conic._numbers
    if scale_t2 != scale_t2:  # NaN: infeasible
        nan = math.nan
        after = Conic._of_numbers(nan, nan, mu, nan, nan, nan)
        return _record(
            BurnOutcome, before=conic, after=after, nu=np.float64(nu), dv=np.float64(dv),
            energy_change=np.float64(nan), nu_after=np.float64(nan),
        )  # fmt: skip
    e_new = math.sqrt(e_cos_new * e_cos_new + e_sin_new * e_sin_new)
    nu_after = math.atan2(e_sin_new, e_cos_new)
    rp_new = scale_t2 * p / (1.0 + e_new)
    if plane is None:
        inc_new, raan_new, u_new = inc, raan, argp + nu
    else:
        inc_new, raan_new, u_new = plane
    after = Conic._of_numbers(rp_new, e_new, mu, u_new - nu_after, inc_new, raan_new)
    f = np.float64
    outcome = object.__new__(BurnOutcome)
    fields = outcome.__dict__
    fields["before"], fields["after"], fields["nu"], fields["dv"] = conic, after, f(nu), f(dv)
    fields["energy_change"], fields["nu_after"] = f(energy_change), f(nu_after)
    return outcome


def _prograde_number(conic: Conic, nu: float, dv: float) -> BurnOutcome:
    """:func:`burn_prograde` for one orbit of numbers, ``nu`` and ``dv`` moderate and finite (is_number)."""
    rp, e, mu, argp, inc, raan = conic._numbers
    p = rp * (1.0 + e)
    t = math.tan(0.5 * nu)  # the half-angle steps of deltakit.conic._half_angle_number, inline
    t2 = t * t
    half_cos2 = 1.0 / (1.0 + t2)
    cos_nu, sin_nu = (1.0 - t2) * half_cos2, (2.0 * t) * half_cos2
    e_cos = e * cos_nu
    one_minus_e = 1.0 - e
    e_half = (2.0 * e) * half_cos2
    q = one_minus_e + e_half
    v = math.sqrt((one_minus_e * one_minus_e + 2.0 * e_half) * (mu / p))
    x = dv / v
    energy_change = dv * (v + 0.5 * dv)
    scale_t = 1.0 + x
    e_cos_new = x * (x + 2.0) * q + e_cos
    plane = None
    if not (q > 0.0 and scale_t != 0.0):
        scale_t2 = math.nan
        e_sin_new = math.nan
    else:
        scale_t2 = scale_t * scale_t
        e_sin_new = scale_t * abs(scale_t) * (e * sin_nu)
        if scale_t < 0.0:
            plane = turned_plane_number(inc, raan, argp + nu, -1.0, 0.0)
    return _number_outcome(conic, nu, abs(dv), p, scale_t2, e_cos_new, e_sin_new, energy_change, plane)


def _burn_number(conic: Conic, nu: float, radial: float, transverse: float, normal: float) -> BurnOutcome:
    """:func:`burn` for one orbit of numbers and moderate finite inputs (checked by is_number)."""
    rp, e, mu, argp, inc, raan = conic._numbers
    p = rp * (1.0 + e)
    cos_nu, sin_nu, half_cos2 = _half_angle_number(nu)
    q = (1.0 - e) + (2.0 * e) * half_cos2
    root_p_mu = math.sqrt(p / mu)
    vr = e * sin_nu / root_p_mu
    vt = q / root_p_mu
    x = transverse / vt
    y = normal / vt
    energy_change = (
        vr * radial + vt * transverse + 0.5 * (radial * radial + transverse * transverse + normal * normal)
    )
    along = 1.0 + x
    scale_t = math.hypot(along, y) if normal != 0.0 else abs(along)
    dv = math.sqrt(radial * radial + transverse * transverse + normal * normal)
    if not (q > 0.0 and scale_t > 0.0):
        return _number_outcome(conic, nu, dv, p, math.nan, math.nan, math.nan, energy_change, None)
    if normal == 0.0:  # the planar kernel's steps
        e_cos_new = e * cos_nu + q * x * (2.0 + x)
    else:
        e_cos_new = e * cos_nu + q * (x * (2.0 + x) + y * y)
    e_sin_new = scale_t * (e * sin_nu + radial * root_p_mu)
    plane = None
    if normal != 0.0 or along < 0.0:
        plane = turned_plane_number(inc, raan, argp + nu, along / scale_t, y / scale_t)
    return _number_outcome(conic, nu, dv, p, scale_t * scale_t, e_cos_new, e_sin_new, energy_change, plane)
