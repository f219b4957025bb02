"""Targeting: the burn along the velocity that reaches a target apoapsis, periapsis, period or excess speed.

Conventions
-----------
* The burn is along the velocity at true anomaly ``nu`` (prograde if the
  delta-v is positive, retrograde if negative), so the position and the
  flight-path angle ``gamma`` at the burn point stay as they are and only the
  speed changes, from ``v`` to ``w = v + dv``.
* SI units: radii in m, period in s, speeds in m/s.
* The speed after the burn follows from energy and angular momentum at the
  burn point (radius ``r``) and at the target apsis: an apsis ``R`` is
  reached with speed ``w`` when ``w^2 = 2 mu R (R - r) / (r ((R - r)(R + r) +
  r^2 sin^2 gamma))``, the same for an apoapsis (``R >= r``) and a periapsis
  (``R <= r cos gamma``); a period fixes the semi-major axis, an excess speed
  the energy.
* NaN where no burn along the velocity reaches the target: an apoapsis below
  the burn point, a periapsis above ``r cos gamma`` (the closest approach of
  the straight line along the velocity), a period whose semi-major axis is
  below ``r / 2``, a point a hyperbola never reaches. Where the burn point is
  already an apsis (``gamma = 0``, to 1e-15) and the target is its own radius
  (to 4 ulp), the answer is the least burn: none if the point is already that
  apsis, otherwise the burn to the circular speed.
* Broadcasts like a ufunc; one orbit of plain numbers takes a scalar path
  written with :mod:`math` (same checks, messages and results).

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import (
    broadcast_shape,
    finite,
    finite_number,
    instance_of,
    is_number,
    nonnegative,
    nonnegative_number,
    positive,
    positive_number,
    scalar_or_array,
)
from .conic import Conic, _half_angle, _half_angle_number
from .errors import DomainError

__all__ = ["burn_to"]

_TARGETS = {"ra": ("m", True), "rp": ("m", True), "period": ("s", True), "vinf": ("m/s", False)}


def burn_to(
    conic: Conic,
    nu: ArrayLike,
    *,
    ra: ArrayLike | None = None,
    rp: ArrayLike | None = None,
    period: ArrayLike | None = None,
    vinf: ArrayLike | None = None,
) -> Any:
    """The delta-v along the velocity at ``nu`` that reaches one target, m/s (negative: retrograde).

    Give exactly one of the targets. Apply it with
    ``burn_prograde(conic, nu, dv)``.

    Parameters
    ----------
    conic : Conic
        The orbit before the burn.
    nu : array_like
        True anomaly of the burn point, rad.
    ra : array_like, optional
        Apoapsis radius to reach, m (> 0).
    rp : array_like, optional
        Periapsis radius to reach, m (> 0).
    period : array_like, optional
        Orbital period to reach, s (> 0).
    vinf : array_like, optional
        Hyperbolic excess speed to reach, m/s (>= 0; 0 is the parabola).

    Returns
    -------
    ndarray or numpy scalar
        Signed delta-v along the velocity, m/s; NaN where no burn along the
        velocity reaches the target (see the module notes).

    Raises
    ------
    DomainError
        If not exactly one target is given, or an input breaks its rule.

    Examples
    --------
    The first burn of a Hohmann transfer from a 300 km Earth orbit to
    geostationary radius, and the apoapsis it gives:

    >>> from deltakit import Conic, burn_prograde, burn_to
    >>> from deltakit.constants import EARTH
    >>> leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    >>> dv = burn_to(leo, 0.0, ra=42164e3)
    >>> round(float(dv), 1), round(float(burn_prograde(leo, 0.0, dv).after.ra) / 1e3, 3)
    (2425.7, 42164.0)
    >>> round(float(burn_to(leo, 0.0, vinf=3000.0)), 1)  # leave with 3 km/s to spare
    3604.5
    """
    instance_of(conic, Conic, "conic")
    given = {name: value for name, value in (("ra", ra), ("rp", rp), ("period", period), ("vinf", vinf))}
    chosen = [name for name, value in given.items() if value is not None]
    if len(chosen) != 1:
        raise DomainError(
            "give exactly one target: `ra` (apoapsis, m), `rp` (periapsis, m), `period` (s) or "
            f"`vinf` (excess speed, m/s); got {', '.join(f'`{n}`' for n in chosen) or 'none'}"
        )
    (kind,) = chosen
    target = given[kind]
    unit, strictly = _TARGETS[kind]
    numbers = conic._numbers
    if numbers is not None and is_number(nu, target):
        nu = finite_number(nu, "nu", "rad")
        value = positive_number(target, kind, unit) if strictly else nonnegative_number(target, kind, unit)
        return np.float64(_burn_to_number(numbers, nu, kind, value))
    nu = finite(nu, "nu", "rad")
    value = positive(target, kind, unit) if strictly else nonnegative(target, kind, unit)
    broadcast_shape(conic=np.broadcast_to(0.0, conic.shape), nu=nu, **{kind: value})
    rp0, e, mu = (np.asarray(x) for x in conic._elements()[:3])
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        p = rp0 * (1.0 + e)
        _, sin_nu, half_cos2 = _half_angle(nu)
        q = (1.0 - e) + (2.0 * e) * half_cos2  # 1 + e cos nu, as Conic computes it
        reachable = q > 0.0
        r = p / q
        scale = np.sqrt(mu / p)
        vr, vt = scale * e * sin_nu, scale * q
        v2 = vr * vr + vt * vt
        sin2 = vr * vr / v2  # sin^2 of the flight-path angle
        w2 = _target_speed_squared(kind, value, r, sin2, mu, v2)
        dv = (w2 - v2) / (np.sqrt(w2) + np.sqrt(v2))  # w - v without cancellation
        dv = np.where(reachable & (w2 > 0.0), dv, np.nan)
    return scalar_or_array(dv)


#: The burn point counts as an apsis when |sin(flight-path angle)| is below 1e-15
#: (at nu = pi the sine of the float pi is 1.2e-16, not 0).
_APSIS_SIN2 = 1e-30
#: ... and a target counts as the radius of the burn point within 4 ulp.
_SAME_RADIUS = 4.0 * np.finfo(float).eps


def _target_speed_squared(kind: str, value: Any, r: Any, sin2: Any, mu: Any, v2: Any) -> Any:
    """Speed squared after the burn that reaches the target; <= 0 or NaN where none does."""
    if kind == "vinf":
        return value * value + 2.0 * mu / r
    if kind == "period":
        a = np.cbrt(mu * (value / (2.0 * np.pi)) ** 2)
        return mu * (2.0 / r - 1.0 / a)
    reach = value - r  # >= 0 for an apoapsis, <= 0 for a periapsis
    denominator = reach * (value + r) + r * r * sin2
    general = 2.0 * mu * value * reach / (r * denominator)
    apsis = sin2 <= _APSIS_SIN2
    at_apsis = 2.0 * mu * value / (r * (value + r))  # gamma = 0: the general form with reach cancelled
    own = apsis & (np.abs(reach) <= _SAME_RADIUS * r)  # the burn point is the target apsis already
    w2 = np.where(apsis, at_apsis, general)
    if kind == "ra":
        w2 = np.where(own, np.minimum(v2, mu / r), w2)
        return np.where(own | (reach >= 0.0), w2, np.nan)
    w2 = np.where(own, np.maximum(v2, mu / r), w2)
    # a periapsis at or above r cos(gamma) is not reached: the denominator is not negative there
    return np.where(own | ((reach <= 0.0) & (apsis | (denominator < 0.0))), w2, np.nan)


def _burn_to_number(numbers: tuple[float, ...], nu: float, kind: str, value: float) -> float:
    """:func:`burn_to` for one orbit and one burn point, with :mod:`math`."""
    rp0, e, mu = numbers[:3]
    p = rp0 * (1.0 + e)
    _, sin_nu, half_cos2 = _half_angle_number(nu)
    q = (1.0 - e) + (2.0 * e) * half_cos2
    if not q > 0.0:
        return math.nan
    r = p / q
    scale = math.sqrt(mu / p)
    vr, vt = scale * e * sin_nu, scale * q
    v2 = vr * vr + vt * vt
    sin2 = vr * vr / v2
    if kind == "vinf":
        w2 = value * value + 2.0 * mu / r
    elif kind == "period":
        a = (mu * (value / (2.0 * math.pi)) ** 2) ** (1.0 / 3.0)
        w2 = mu * (2.0 / r - 1.0 / a)
    else:
        reach = value - r
        denominator = reach * (value + r) + r * r * sin2
        apsis = sin2 <= _APSIS_SIN2
        if apsis and abs(reach) <= _SAME_RADIUS * r:
            w2 = min(v2, mu / r) if kind == "ra" else max(v2, mu / r)
        elif kind == "ra" and reach < 0.0:
            return math.nan
        elif kind == "rp" and (reach > 0.0 or not (apsis or denominator < 0.0)):
            return math.nan
        elif apsis:
            w2 = 2.0 * mu * value / (r * (value + r))
        else:
            w2 = 2.0 * mu * value * reach / (r * denominator)
    if not w2 > 0.0:
        return math.nan
    return (w2 - v2) / (math.sqrt(w2) + math.sqrt(v2))
