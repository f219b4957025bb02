"""Kepler's equation: time along a conic, and where a body is after a time.

Conventions
-----------
* SI units: time in s, angles in rad, ``mu`` in m^3/s^2.
* Elliptic mean anomaly ``M = E - e sin E`` with mean motion ``n = sqrt(mu / a^3)``.
* Hyperbolic mean anomaly ``M = e sinh H - H`` with ``n = sqrt(mu / (-a)^3)``.
* Parabolic mean anomaly (Barker's equation) ``M = D + D^3 / 3`` with
  ``D = tan(nu / 2)`` and ``n = 2 sqrt(mu / p^3)``, ``p = 2 rp``.
* In all three, the time since periapsis is ``M / n``.
* For an ellipse, true and mean anomalies are continuous: a true anomaly of
  ``nu + 2 pi k`` maps to ``M + 2 pi k``, so revolutions are counted, not lost.
* Everything broadcasts like a ufunc; scalars in give NumPy scalars out.

The solvers reduce an elliptic mean anomaly to (-pi, pi], start from a guess
that is good near e = 1 (a cubic in E) and for large hyperbolic M (a
logarithm), take a few Halley steps and then Newton steps until every element
has converged. Near e = 1 the differences ``E - sin E`` and ``sinh H - H``
are evaluated by their series, so no precision is lost to cancellation.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, instance_of, nonnegative, require, scalar_or_array
from .conic import Conic

__all__ = [
    "mean_to_eccentric",
    "eccentric_to_mean",
    "mean_to_hyperbolic",
    "hyperbolic_to_mean",
    "mean_anomaly",
    "true_anomaly_from_mean",
    "mean_motion",
    "time_of_flight",
    "propagate",
]

_TWO_PI = 2.0 * np.pi
_MAX_ITERATIONS = 60
_TOLERANCE = 4.0 * np.finfo(float).eps

# x - sin x = sum_k (-1)^(k+1) x^(2k+1) / (2k+1)!  for k >= 1, and
# sinh x - x = sum_k x^(2k+1) / (2k+1)!. Terms up to x^19 keep full double
# precision for |x| <= 1 (the next, x^21 / 21!, is below 1e-18 of the first).
_ODD_FACTORIALS = np.array([float(math.factorial(2 * k + 1)) for k in range(1, 10)])


def _series(x: np.ndarray, alternating: bool) -> np.ndarray:
    x2 = x * x
    total = np.zeros_like(x)
    for k in range(len(_ODD_FACTORIALS) - 1, -1, -1):  # Horner, highest term first
        sign = -1.0 if (alternating and k % 2 == 1) else 1.0
        total = total * x2 + sign / _ODD_FACTORIALS[k]
    return total * x2 * x


def _x_minus_sin(x: np.ndarray) -> np.ndarray:
    """``x - sin x`` without cancellation for small ``x``."""
    small = np.abs(x) < 1.0
    return np.where(small, _series(np.where(small, x, 0.0), True), x - np.sin(x))


def _sinh_minus_x(x: np.ndarray) -> np.ndarray:
    """``sinh x - x`` without cancellation for small ``x``."""
    small = np.abs(x) < 1.0
    return np.where(small, _series(np.where(small, x, 0.0), False), np.sinh(x) - x)


def _reduce(angle: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Split an angle into whole turns and a remainder in (-pi, pi]."""
    turns = np.round(angle / _TWO_PI)
    reduced = angle - _TWO_PI * turns
    # round() may leave the remainder just outside (-pi, pi] by rounding: fold it back
    reduced = np.where(reduced <= -np.pi, reduced + _TWO_PI, reduced)
    turns = np.where(angle - _TWO_PI * turns <= -np.pi, turns - 1.0, turns)
    return turns, reduced


def _cubic_root(c1: np.ndarray, c3: np.ndarray, y: np.ndarray) -> np.ndarray:
    """The real root x >= 0 of ``c1 x + c3 x^3 = y`` for c1 >= 0, c3 >= 0, y >= 0.

    Cardano's root ``s - p / s`` rewritten as ``2 q / (s^2 + p + p^2 / s^2)``,
    a sum of positive terms, so it keeps its digits when the linear term
    dominates. Where ``c3`` is 0 (or negligible) the root is ``y / c1``.
    """
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        p = c1 / (3.0 * c3)
        q = y / (2.0 * c3)
        s = np.cbrt(q + np.sqrt(q * q + p * p * p))
        s2 = s * s
        x = 2.0 * q / (s2 + p + p * p / s2)
        linear = y / c1
    x = np.where(q > 0.0, x, 0.0)
    return np.where(np.isfinite(x), x, linear)


# ---------------------------------------------------------------------- elliptic
def eccentric_to_mean(E: ArrayLike, e: ArrayLike) -> Any:
    """Elliptic mean anomaly ``M = E - e sin E``, rad.

    Parameters
    ----------
    E : array_like
        Eccentric anomaly, rad (any real value; turns are kept).
    e : array_like
        Eccentricity, 0 <= e < 1.

    Examples
    --------
    >>> from deltakit import eccentric_to_mean
    >>> round(float(eccentric_to_mean(1.0, 0.5)), 9)  # 1 - 0.5 sin(1)
    0.579264508
    """
    E = finite(E, "E", "rad")
    e = _elliptic_e(e)
    turns, reduced = _reduce(E)
    # (1 - e) E + e (E - sin E) stays accurate near e = 1 and E = 0
    M = (1.0 - e) * reduced + e * _x_minus_sin(reduced)
    return scalar_or_array(M + _TWO_PI * turns)


def mean_to_eccentric(M: ArrayLike, e: ArrayLike) -> Any:
    """Solve Kepler's equation ``M = E - e sin E`` for the eccentric anomaly, rad.

    Parameters
    ----------
    M : array_like
        Mean anomaly, rad (any real value; the turns are carried over to E).
    e : array_like
        Eccentricity, 0 <= e < 1.

    Returns
    -------
    E : ndarray or numpy scalar
        Eccentric anomaly, rad, with ``E - 2 pi k`` in (-pi, pi] when
        ``M - 2 pi k`` is.

    Examples
    --------
    Vallado, Fundamentals of Astrodynamics and Applications, Example 2-1
    (M = 235.4 deg, e = 0.4; quoted from memory: E = 220.512074767522 deg):

    >>> import numpy as np
    >>> from deltakit import mean_to_eccentric
    >>> round(float(np.degrees(mean_to_eccentric(np.radians(235.4), 0.4))) % 360, 9)
    220.512074768
    """
    M = finite(M, "M", "rad")
    e = _elliptic_e(e)
    M, e = np.broadcast_arrays(M, e)
    turns, reduced = _reduce(M)
    sign = np.where(reduced < 0.0, -1.0, 1.0)
    target = np.abs(reduced)  # solve on [0, pi]; E is odd in M
    E = _elliptic_guess(target, e)
    E = _solve(E, target, e, _elliptic_residual, lower=target, upper=np.minimum(target + e, np.pi))
    return scalar_or_array(sign * E + _TWO_PI * turns)


def _elliptic_e(e: ArrayLike) -> np.ndarray:
    e = nonnegative(e, "e")
    require(e, e >= 1.0, "e", "< 1 (an ellipse or circle)")
    return e


def _elliptic_guess(M: np.ndarray, e: np.ndarray) -> np.ndarray:
    # Near periapsis E - sin E ~ E^3/6 makes Kepler's equation a cubic whose
    # root is excellent near e = 1; elsewhere M + e sin M / (1 - sin(M + e) + sin M)
    # is a classic starter that is good for moderate e.
    cubic = _cubic_root(1.0 - e, e / 6.0, M)
    with np.errstate(divide="ignore", invalid="ignore"):
        classic = M + e * np.sin(M) / (1.0 - np.sin(M + e) + np.sin(M))
    classic = np.where(np.isfinite(classic), classic, M + e)
    guess = np.where(cubic < 1.0, cubic, classic)
    return np.clip(guess, M, np.minimum(M + e, np.pi))


def _elliptic_residual(E: np.ndarray, M: np.ndarray, e: np.ndarray) -> tuple[np.ndarray, ...]:
    f = (1.0 - e) * E + e * _x_minus_sin(E) - M
    # 1 - e cos E written so it keeps its digits near e = 1, E = 0
    df = (1.0 - e) + 2.0 * e * np.sin(0.5 * E) ** 2
    d2f = e * np.sin(E)
    return f, df, d2f


# ---------------------------------------------------------------------- hyperbolic
def hyperbolic_to_mean(H: ArrayLike, e: ArrayLike) -> Any:
    """Hyperbolic mean anomaly ``M = e sinh H - H``, rad.

    Parameters
    ----------
    H : array_like
        Hyperbolic anomaly, rad.
    e : array_like
        Eccentricity, e > 1.

    Examples
    --------
    >>> from deltakit import hyperbolic_to_mean
    >>> round(float(hyperbolic_to_mean(1.0, 2.0)), 9)  # 2 sinh(1) - 1
    1.350402387
    """
    H = finite(H, "H", "rad")
    e = _hyperbolic_e(e)
    with np.errstate(over="ignore"):
        return scalar_or_array((e - 1.0) * H + e * _sinh_minus_x(H))


def mean_to_hyperbolic(M: ArrayLike, e: ArrayLike) -> Any:
    """Solve ``M = e sinh H - H`` for the hyperbolic anomaly, rad.

    Parameters
    ----------
    M : array_like
        Hyperbolic mean anomaly, rad (any real value).
    e : array_like
        Eccentricity, e > 1.

    Examples
    --------
    Vallado, Fundamentals of Astrodynamics and Applications, Example 2-3
    (M = 235.4 deg taken as radians 4.108505, e = 2.4; quoted from memory:
    H = 1.601376144):

    >>> import numpy as np
    >>> from deltakit import mean_to_hyperbolic
    >>> round(float(mean_to_hyperbolic(np.radians(235.4), 2.4)), 9)
    1.601376144
    """
    M = finite(M, "M", "rad")
    e = _hyperbolic_e(e)
    M, e = np.broadcast_arrays(M, e)
    sign = np.where(M < 0.0, -1.0, 1.0)
    target = np.abs(M)
    # Bracket: asinh(M/e) <= H (since e sinh H = M + H >= M), and the cubic root
    # of (e - 1) H + e H^3 / 6 = M is >= H (since sinh H - H >= H^3 / 6).
    lower = np.arcsinh(target / e)
    upper = _cubic_root(e - 1.0, e / 6.0, target)
    # For large M, e sinh H ~ e exp(H) / 2 = M + H gives H ~ log(2 M / e + 1.8).
    guess = np.where(target > 6.0 * e, np.log(2.0 * target / e + 1.8), upper)
    guess = np.clip(guess, lower, np.maximum(lower, upper))
    H = _solve(guess, target, e, _hyperbolic_residual, lower=lower, upper=np.maximum(lower, upper))
    return scalar_or_array(sign * H)


def _hyperbolic_e(e: ArrayLike) -> np.ndarray:
    e = finite(e, "e")
    require(e, e <= 1.0, "e", "> 1 (a hyperbola)")
    return e


def _hyperbolic_residual(H: np.ndarray, M: np.ndarray, e: np.ndarray) -> tuple[np.ndarray, ...]:
    f = (e - 1.0) * H + e * _sinh_minus_x(H) - M
    df = (e - 1.0) + 2.0 * e * np.sinh(0.5 * H) ** 2  # e cosh H - 1, accurate near e = 1
    d2f = e * np.sinh(H)
    return f, df, d2f


# ---------------------------------------------------------------------- shared solver
def _solve(x, M, e, residual, lower, upper):
    """Halley steps, then Newton steps, kept inside [lower, upper], until converged."""
    x = np.array(x, dtype=float)
    if x.size == 0:
        return x
    for iteration in range(_MAX_ITERATIONS):
        f, df, d2f = residual(x, M, e)
        with np.errstate(divide="ignore", invalid="ignore"):
            newton = f / df
            step = newton / (1.0 - 0.5 * newton * d2f / df) if iteration < 3 else newton
        step = np.where(np.isfinite(step), step, newton)
        new = np.clip(x - step, lower, upper)
        # converged: the step is at rounding level of the answer
        done = np.abs(new - x) <= _TOLERANCE * np.abs(new)
        x = new
        if done.all():
            break
    return x


# ---------------------------------------------------------------------- on a conic
def _conic(conic: Any) -> Conic:
    instance_of(conic, Conic, "conic")
    return conic


def mean_motion(conic: Conic) -> Any:
    """Mean motion ``n`` of each conic, rad/s (so that time since periapsis is ``M / n``).

    Examples
    --------
    >>> from deltakit import Conic
    >>> from deltakit.kepler import mean_motion
    >>> c = Conic.from_apsides(7000e3, 9000e3, 3.986e14)
    >>> round(float(2 * 3.141592653589793 / mean_motion(c) - c.period), 6)
    0.0
    """
    conic = _conic(conic)
    rp, e, mu = np.asarray(conic.rp, float), np.asarray(conic.e, float), np.asarray(conic.mu, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        a_abs = rp / np.abs(1.0 - e)
        n = np.where(e == 1.0, 2.0 * np.sqrt(mu / (2.0 * rp) ** 3), np.sqrt(mu / a_abs**3))
    return scalar_or_array(n)


def mean_anomaly(conic: Conic, nu: ArrayLike) -> Any:
    """Mean anomaly at true anomaly ``nu``: elliptic, hyperbolic or parabolic (Barker), rad.

    See the module notes for the three definitions. For an ellipse whole turns
    of ``nu`` are kept; a point a hyperbola never reaches gives NaN.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students, Example 3.1 (quoted
    from memory): rp = 9600 km, ra = 21000 km, nu = 120 deg give M = 1.3601 rad.

    >>> import numpy as np
    >>> from deltakit import Conic, mean_anomaly
    >>> c = Conic.from_apsides(9600e3, 21000e3, 398600e9)
    >>> round(float(mean_anomaly(c, np.radians(120.0))), 4)
    1.3601
    """
    conic = _conic(conic)
    nu = finite(nu, "nu", "rad")
    nu, e = np.broadcast_arrays(nu, np.asarray(conic.e, float))
    turns, reduced = _reduce(nu)
    half_sin, half_cos = np.sin(0.5 * reduced), np.cos(0.5 * reduced)
    elliptic = e < 1.0
    hyperbolic = e > 1.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        # ellipse: tan(E/2) = sqrt((1-e)/(1+e)) tan(nu/2)
        ee = np.where(elliptic, e, 0.0)
        E = 2.0 * np.arctan2(np.sqrt(1.0 - ee) * half_sin, np.sqrt(1.0 + ee) * half_cos)
        M_ellipse = (1.0 - ee) * E + ee * _x_minus_sin(E) + _TWO_PI * turns
        # hyperbola: tanh(H/2) = sqrt((e-1)/(e+1)) tan(nu/2), NaN beyond the asymptote
        eh = np.where(hyperbolic, e, 2.0)
        ratio = np.sqrt((eh - 1.0) / (eh + 1.0)) * half_sin / half_cos
        reachable = (1.0 + eh * np.cos(reduced) > 0.0) & (np.abs(ratio) < 1.0)
        H = np.where(reachable, 2.0 * np.arctanh(np.where(reachable, ratio, 0.0)), np.nan)
        M_hyperbola = (eh - 1.0) * H + eh * _sinh_minus_x(np.where(reachable, H, 0.0))
        M_hyperbola = np.where(reachable, M_hyperbola, np.nan)
        # parabola: Barker, D = tan(nu/2); nu = +-pi is at infinity
        D = half_sin / half_cos
        M_parabola = np.where(np.abs(reduced) < np.pi, D + D**3 / 3.0, np.nan)
    M = np.where(elliptic, M_ellipse, np.where(hyperbolic, M_hyperbola, M_parabola))
    return scalar_or_array(M)


def true_anomaly_from_mean(conic: Conic, M: ArrayLike) -> Any:
    """True anomaly at mean anomaly ``M`` (the inverse of :func:`mean_anomaly`), rad.

    For an ellipse the turns of ``M`` are kept (``M + 2 pi`` gives ``nu + 2 pi``);
    for a hyperbola or parabola ``nu`` stays inside the asymptotes.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students, Example 3.2 (quoted
    from memory): the orbit of Example 3.1, M = 3.6029 rad gives nu = 193.2 deg.

    >>> import numpy as np
    >>> from deltakit import Conic, true_anomaly_from_mean
    >>> c = Conic.from_apsides(9600e3, 21000e3, 398600e9)
    >>> round(float(np.degrees(true_anomaly_from_mean(c, 3.6029))), 1)
    193.2
    """
    conic = _conic(conic)
    M = finite(M, "M", "rad")
    M, e = np.broadcast_arrays(M, np.asarray(conic.e, float))
    elliptic = e < 1.0
    hyperbolic = e > 1.0
    # ellipse
    ee = np.where(elliptic, e, 0.0)
    E = np.asarray(mean_to_eccentric(np.where(elliptic, M, 0.0), ee))
    turns, reduced = _reduce(E)
    nu_ellipse = (
        2.0 * np.arctan2(np.sqrt(1.0 + ee) * np.sin(0.5 * reduced), np.sqrt(1.0 - ee) * np.cos(0.5 * reduced))
        + _TWO_PI * turns
    )
    # hyperbola
    eh = np.where(hyperbolic, e, 2.0)
    H = np.asarray(mean_to_hyperbolic(np.where(hyperbolic, M, 0.0), eh))
    nu_hyperbola = 2.0 * np.arctan(np.sqrt((eh + 1.0) / (eh - 1.0)) * np.tanh(0.5 * H))
    # parabola: D^3 + 3 D - 3 M = 0 (Cardano), solved for |M| and signed
    D = np.where(M < 0.0, -1.0, 1.0) * _cubic_root(np.ones_like(M), np.full_like(M, 1.0 / 3.0), np.abs(M))
    nu_parabola = 2.0 * np.arctan(D)
    nu = np.where(elliptic, nu_ellipse, np.where(hyperbolic, nu_hyperbola, nu_parabola))
    return scalar_or_array(nu)


def time_of_flight(conic: Conic, nu1: ArrayLike, nu2: ArrayLike) -> Any:
    """Time to fly forward from true anomaly ``nu1`` to ``nu2``, s.

    On an ellipse the answer is the wait until the body next reaches ``nu2``,
    in [0, period): going from 300 deg to 10 deg passes periapsis. On a
    hyperbola or parabola the body passes each point once, so ``nu2`` behind
    ``nu1`` (or a point the conic never reaches) gives NaN. Points that differ
    only by rounding (a few ulp of mean anomaly) count as the same point.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students, Example 3.1 (quoted
    from memory): perigee to nu = 120 deg on rp = 9600 km, ra = 21000 km
    takes 4077 s.

    >>> import numpy as np
    >>> from deltakit import Conic, time_of_flight
    >>> c = Conic.from_apsides(9600e3, 21000e3, 398600e9)
    >>> round(float(time_of_flight(c, 0.0, np.radians(120.0))))
    4077
    """
    conic = _conic(conic)
    nu1 = finite(nu1, "nu1", "rad")
    nu2 = finite(nu2, "nu2", "rad")
    e = np.asarray(conic.e, float)
    n = np.asarray(mean_motion(conic))
    # reduce both to (-pi, pi] first, so the ellipse difference is of two small numbers
    M1 = np.asarray(mean_anomaly(conic, _reduce(nu1)[1]))
    M2 = np.asarray(mean_anomaly(conic, _reduce(nu2)[1]))
    difference = M2 - M1
    # a point a rounding error behind the start is the start itself, not a turn later
    rounding = 8.0 * np.finfo(float).eps * np.maximum(1.0, np.maximum(np.abs(M1), np.abs(M2)))
    with np.errstate(invalid="ignore"):
        difference = np.where((difference < 0.0) & (difference > -rounding), 0.0, difference)
        wrapped = np.mod(difference, _TWO_PI)
        forward = np.where(e < 1.0, wrapped, np.where(difference >= 0.0, difference, np.nan))
        return scalar_or_array(forward / n)


def propagate(conic: Conic, nu: ArrayLike, dt: ArrayLike) -> Any:
    """True anomaly reached after time ``dt`` (s) from true anomaly ``nu``; ``dt < 0`` goes back.

    For an ellipse the result keeps counting turns (after one period ``nu``
    has grown by 2 pi). A start point a hyperbola never reaches gives NaN.

    Examples
    --------
    >>> from deltakit import Conic, propagate
    >>> c = Conic.from_apsides(9600e3, 21000e3, 398600e9)
    >>> round(float(propagate(c, 0.5, c.period)) - 0.5, 9)  # one full turn
    6.283185307
    >>> round(float(propagate(c, propagate(c, 0.5, 3600.0), -3600.0)), 12)
    0.5
    """
    conic = _conic(conic)
    nu = finite(nu, "nu", "rad")
    dt = finite(dt, "dt", "s")
    M = np.asarray(mean_anomaly(conic, nu)) + np.asarray(mean_motion(conic)) * dt
    finite_M = np.isfinite(M)
    nu_out = np.asarray(true_anomaly_from_mean(conic, np.where(finite_M, M, 0.0)))
    return scalar_or_array(np.where(finite_M, nu_out, np.nan))
