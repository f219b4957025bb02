"""Lambert's problem: the conic that joins two positions in a given time.

Method
------
The solver follows D. Izzo, "Revisiting Lambert's problem", Celestial
Mechanics and Dynamical Astronomy 121:1-15 (2015). The geometry is reduced
to one parameter ``lam`` (``lam**2 = 1 - c/s``, c the chord, s the
semi-perimeter of the triangle focus-r1-r2) and the time of flight to
``T = sqrt(2 mu / s**3) * tof``; the unknown ``x`` (``x**2 = 1 - a_min/a``:
0 is the minimum-energy ellipse, 1 the parabola, above 1 hyperbolas) solves
``T(x) = T``, with Izzo's initial guesses (his eq. 30) and Householder's
fourth-order iteration. ``T(x)`` is evaluated three ways as Izzo does:
Lancaster's expression away from the parabola, Lagrange's near it, and
Battin's hypergeometric series very near it, where the others lose digits.
The velocities follow from ``x`` by Izzo's eqs. (11)-(12).

Every case iterates at once on arrays; cases that have converged drop out of
later iterations, and a bracket kept per case (``T`` is monotonic on each
branch) turns any step that leaves it into a bisection, so no case can wander
off its branch. Many cases are worked through in blocks of 65,536, so the
temporaries of a step stay small.

Conventions
-----------
* ``prograde=True`` moves counterclockwise seen from +z of the frame
  (angular momentum with a positive z component); a transfer plane that
  contains the z axis then goes the short way (angle below 180 degrees),
  the long way when ``prograde=False``.
* ``revolutions=N > 0`` wraps N full turns before arriving. There are then
  two solutions or none: index 0 of the leading axis is the branch with the
  smaller semi-major axis (the shorter period), index 1 the larger; both are
  NaN where the time of flight is below the minimum for N turns.
* SI units: m, s, m^3/s^2, m/s; vectors on the last axis, shape (..., 3).

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

from dataclasses import dataclass
from math import prod
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._blocks import _block
from ._checks import broadcast_shape, finite, positive, require
from ._results import Result, quantity
from .errors import DomainError

__all__ = ["LambertSolution", "lambert", "lambert_time_of_flight", "transfer_plane"]

#: Below this sine of the transfer angle the plane of the transfer is undefined (0 or 180 degrees).
PLANE_TOLERANCE = 1.0e-12

_BATTIN = 0.01  # |x - 1| below which Battin's series gives T(x)
_LAGRANGE = 0.2  # |x - 1| below which Lagrange's expression gives T(x)
_MAX_STEPS = 40
_STEP_TOLERANCE = 1.0e-13  # |dx| of a bisection that ends the iteration (on the scale of 1 + x near -1)
_ULPS = 4.0 * np.finfo(float).eps  # a few units in the last place of x near 1: no closer step exists
_FINAL_STEP = 1.0e-5  # a Householder step this short leaves an error near (1e-5)^4: the last one (as Izzo)
#: Above this x (N = 0) T(x) = (1 - lam |lam|) / x to rounding (the next term is near ln(2x) / x**2):
#: the short-time limit, where gravity no longer bends the path; solved in closed form.
_ASYMPTOTE_X = 1.0e8
#: Above this T (N = 0) x = -1 to rounding: the long-time limit (1 + x falls as T**(-2/3)).
_LONGEST_T = 1.0e25
#: Cases solved together: 512 kB per float array, so a step's temporaries stay small and warm.
_CASES_PER_BLOCK = 65536
#: Inputs whose magnitudes stay inside this band (norms, tof, mu) are solved in float64; the others
#: in extended precision (long double), so 1e300 m or 1e-300 s neither over- nor underflow.
_BAND = (1.0e-100, 1.0e100)


@dataclass(frozen=True, repr=False, eq=False)
class LambertSolution(Result):
    """Velocities at both ends of a Lambert transfer.

    Attributes
    ----------
    v1 : ndarray, shape (..., 3), or (2, ..., 3) for revolutions > 0
        Velocity just after leaving ``r1``, m/s.
    v2 : ndarray, same shape
        Velocity on arriving at ``r2``, m/s.
    """

    v1: Any = quantity("m/s")
    v2: Any = quantity("m/s")


# ---------------------------------------------------------------------- T(x) and its derivatives
def _hypergeometric(z: np.ndarray) -> np.ndarray:
    """Gauss's 2F1(3, 1; 5/2; z), the series of Battin's form (Izzo 2015, eq. 20), |z| small here."""
    total = np.ones_like(z)
    term = np.ones_like(z)
    for j in range(60):
        term = term * (3.0 + j) * (1.0 + j) / (2.5 + j) * z / (j + 1.0)
        total = total + term
        if np.all(np.abs(term) <= 1.0e-17 * np.abs(total)):
            break
    return total


def _tof_lancaster(x: np.ndarray, lam: np.ndarray, turns: float) -> np.ndarray:
    """T(x) by Lancaster's expression (Izzo 2015, eqs. 18 and 19 with the N pi term)."""
    return _lancaster_parts(x, lam, turns)[0]


def _lancaster_parts(
    x: np.ndarray, lam: np.ndarray, turns: float
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """T(x) by Lancaster's expression, with x^2 - 1 and sqrt(1 + lam^2 (x^2 - 1)) (the derivatives' too)."""
    energy = x * x - 1.0  # E < 0 ellipse, E > 0 hyperbola
    z = np.sqrt(1.0 + lam * lam * energy)
    y = np.sqrt(np.abs(energy))
    g = x * z - lam * energy
    elliptic = energy < 0.0
    # each transcendental only where its branch applies (ufunc `where=`): half the work of both
    d = np.empty_like(x)
    np.arccos(np.clip(g, -1.0, 1.0), out=d, where=elliptic)
    if turns:
        np.add(d, turns * np.pi, out=d, where=elliptic)
    hyperbolic = ~elliptic
    if hyperbolic.any():
        with np.errstate(divide="ignore", invalid="ignore"):
            np.log(y * (z - lam * x) + g, out=d, where=hyperbolic)
    with np.errstate(divide="ignore", invalid="ignore"):
        return (x - lam * z - d / y) / energy, energy, z


def _tof_lagrange(x: np.ndarray, lam: np.ndarray, turns: float) -> np.ndarray:
    """T(x) by Lagrange's expression, for x near 1 (Izzo 2015, eq. 9)."""
    with np.errstate(invalid="ignore", divide="ignore"):
        a = 1.0 / (1.0 - x * x)
        ellipse = a > 0.0
        alpha_e = 2.0 * np.arccos(np.clip(x, -1.0, 1.0))
        beta_e = 2.0 * np.arcsin(np.sqrt(np.clip(lam * lam / np.abs(a), 0.0, 1.0))) * np.sign(lam)
        alpha_h = 2.0 * np.arccosh(np.maximum(x, 1.0))
        beta_h = 2.0 * np.arcsinh(np.sqrt(lam * lam / np.abs(a))) * np.sign(lam)
        root = np.abs(a) * np.sqrt(np.abs(a))
        t_ellipse = (
            root * ((alpha_e - np.sin(alpha_e)) - (beta_e - np.sin(beta_e)) + 2.0 * np.pi * turns) / 2.0
        )
        t_hyperbola = root * ((beta_h - np.sinh(beta_h)) - (alpha_h - np.sinh(alpha_h))) / 2.0
    return np.where(ellipse, t_ellipse, t_hyperbola)


def _tof_battin(x: np.ndarray, lam: np.ndarray, turns: float) -> np.ndarray:
    """T(x) by Battin's series, for x very near 1 (Izzo 2015, eq. 20)."""
    energy = x * x - 1.0
    rho = np.abs(energy)
    z = np.sqrt(1.0 + lam * lam * energy)
    eta = z - lam * x
    s1 = 0.5 * (1.0 - lam - x * eta)
    q = 4.0 / 3.0 * _hypergeometric(s1)
    t = (eta * eta * eta * q + 4.0 * lam * eta) / 2.0
    if turns > 0:
        with np.errstate(divide="ignore"):
            t = t + turns * np.pi / (rho * np.sqrt(rho))
    return t


def _tof(x: np.ndarray, lam: np.ndarray, turns: float) -> np.ndarray:
    """Non-dimensional time of flight T(x) for N = ``turns`` revolutions."""
    return _tof_parts(x, lam, turns)[0]


def _tof_parts(x: np.ndarray, lam: np.ndarray, turns: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """T(x), with x^2 - 1 and sqrt(1 + lam^2 (x^2 - 1)), which :func:`_derivatives` needs as well."""
    t, energy, z = _lancaster_parts(x, lam, turns)
    distance = np.abs(x - 1.0)
    near = distance < _LAGRANGE
    if near.any():
        index = np.flatnonzero(near)
        xs, ls, ds = x.ravel()[index], lam.ravel()[index], distance.ravel()[index]
        series = ds < _BATTIN
        t_near = np.where(series, _tof_battin(xs, ls, turns), _tof_lagrange(xs, ls, turns))
        t.ravel()[index] = t_near
    return t, energy, z


def _derivatives(
    x: np.ndarray, t: np.ndarray, lam: np.ndarray, energy: Any = None, y: Any = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """dT/dx, d2T/dx2, d3T/dx3 at x where T(x) = t (Izzo 2015, eq. 22).

    ``energy`` = x^2 - 1 and ``y`` = sqrt(1 - lam^2 (1 - x^2)) when the caller has them already.
    """
    lam2 = lam * lam
    if energy is None:
        energy = x * x - 1.0
    if y is None:
        y = np.sqrt(1.0 + lam2 * energy)
    with np.errstate(divide="ignore", invalid="ignore"):
        inverse = -1.0 / energy  # 1 / (1 - x^2)
        twice_lam3 = 2.0 * lam2 * lam
        rest = 1.0 - lam2
        y2 = y * y
        y3 = y2 * y
        d1 = (3.0 * t * x - 2.0 + twice_lam3 * x / y) * inverse
        d2 = (3.0 * t + 5.0 * x * d1 + rest * twice_lam3 / y3) * inverse
        d3 = (7.0 * x * d2 + 8.0 * d1 - 3.0 * rest * lam2 * twice_lam3 * x / (y3 * y2)) * inverse
    return d1, d2, d3


# ---------------------------------------------------------------------- solving T(x) = T
def _solve(
    target: np.ndarray,
    lam: np.ndarray,
    turns: float,
    x0: np.ndarray,
    low: np.ndarray,
    high: np.ndarray,
    increasing: bool,
) -> np.ndarray:
    """x in (low, high) with T(x) = target: Householder steps, bisection when a step leaves the bracket.

    A Householder step shorter than ``_FINAL_STEP`` is the last one: its
    error is of the order of the step to the fourth power, below rounding.
    """
    x = x0.copy()
    low, high = low.copy(), high.copy()
    active = np.flatnonzero(np.isfinite(target) & np.isfinite(x))
    converged = np.zeros(x.shape, dtype=bool)
    whole = active.size == x.size  # while every case iterates, skip the gathers and scatters
    for _ in range(_MAX_STEPS):
        if active.size == 0:
            break
        if whole:
            xa, la, ta, lo, hi = x, lam, target, low, high
        else:
            xa, la, ta, lo, hi = x[active], lam[active], target[active], low[active], high[active]
        t, energy, z = _tof_parts(xa, la, turns)
        miss = t - ta
        # keep the bracket: T decreases with x on the zero-revolution and left branches
        above = ~(miss > 0.0) if increasing else miss > 0.0
        np.copyto(lo, xa, where=above)
        np.copyto(hi, xa, where=~above)
        d1, d2, d3 = _derivatives(xa, t, la, energy, z)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            d1_squared, miss_d2 = d1 * d1, miss * d2
            step = (
                miss * (d1_squared - 0.5 * miss_d2) / (d1 * (d1_squared - miss_d2) + d3 * (miss * miss / 6.0))
            )
            new = xa - step  # a case with T = target steps by 0 (and is done) unless the step is NaN
            outside = ~((new >= lo) & (new <= hi))  # NaN too
            # near x = -1 (very long flights) T varies on the scale of 1 + x: steps are measured on it,
            # down to the few units in the last place that x can still resolve there
            scale = np.maximum(np.minimum(xa + 1.0, 1.0), _ULPS / _FINAL_STEP)
            done = np.abs(step) < _FINAL_STEP * scale
        if outside.any():  # rare: bisect those cases (an open bracket doubles outwards)
            index = np.flatnonzero(outside)
            lo_out, hi_out, x_out = lo[index], hi[index], xa[index]
            bisected = np.where(
                np.isfinite(hi_out), 0.5 * (lo_out + hi_out), lo_out + np.maximum(1.0, np.abs(lo_out))
            )
            exact = miss[index] == 0.0
            bisected = np.where(exact, x_out, bisected)
            new[index] = bisected
            tolerance = np.maximum(_STEP_TOLERANCE * scale[index], _ULPS)
            done[index] = exact | (np.abs(bisected - x_out) < tolerance)
        if whole:
            x, low, high = new, lo, hi
            converged = done
            active = np.flatnonzero(~done)
            whole = active.size == x.size
        else:
            x[active], low[active], high[active] = new, lo, hi
            converged[active[done]] = True
            active = active[~done]
    x[~converged] = np.nan
    return x


def _minimum_time(lam: np.ndarray, turns: float) -> tuple[np.ndarray, np.ndarray]:
    """x and T at the minimum time of flight for N turns, by Halley's iteration from x = 0 (Izzo 2015, §3)."""
    x = np.zeros_like(lam)
    t = np.arccos(lam) + lam * np.sqrt(1.0 - lam * lam) + turns * np.pi
    for _ in range(16):
        d1, d2, d3 = _derivatives(x, t, lam)
        with np.errstate(divide="ignore", invalid="ignore"):
            new = np.where(d1 != 0.0, x - d1 * d2 / (d2 * d2 - d1 * d3 / 2.0), x)
        new = np.clip(new, -1.0 + 1e-15, 1.0 - 1e-15)
        change = np.abs(new - x)
        x = new
        t = _tof(x, lam, turns)
        if np.all(change < 1.0e-13):
            break
    return x, t


def _zero_revolution_guess(target: np.ndarray, lam: np.ndarray) -> np.ndarray:
    """Izzo's starting x for N = 0 (Izzo 2015, eq. 30)."""
    t00 = np.arccos(lam) + lam * np.sqrt(1.0 - lam * lam)
    t1 = 2.0 / 3.0 * (1.0 - lam * lam * lam)  # not lam**3: pow() is slow on arrays
    with np.errstate(divide="ignore", invalid="ignore"):
        x0 = -(target - t00) / (target - t00 + 4.0)  # long flights: T >= T00
    # the other two forms on their own cases only: pow() of the others' values is slow and useless
    short = np.flatnonzero(target <= t1)
    if short.size:
        ts, ls, t1s = target[short], lam[short], t1[short]
        x0[short] = t1s * (t1s - ts) / (0.4 * (1.0 - ls * ls * ls * ls * ls) * ts) + 1.0
    between = np.flatnonzero((target < t00) & (target > t1))
    if between.size:
        tb, t00b = target[between], t00[between]
        x0[between] = (tb / t00b) ** (np.log(2.0) / np.log(t1[between] / t00b)) - 1.0
    return x0


def _solve_x(target: np.ndarray, lam: np.ndarray, turns: int) -> np.ndarray:
    """x of each case; shape (...) for N = 0, (2, ...) for N > 0 (short-period branch first)."""
    target, lam = np.broadcast_arrays(target, lam)
    shape = target.shape
    x = _solve_x_flat(np.ravel(target), np.ravel(lam), turns)
    return x.reshape(shape if turns == 0 else (2, *shape))


def _solve_x_flat(target: np.ndarray, lam: np.ndarray, turns: int) -> np.ndarray:
    longest = None
    if np.fmax.reduce(target, initial=-np.inf) > _LONGEST_T:  # x = -1 (and +1) to rounding: no iteration
        longest = target > _LONGEST_T
        target = np.where(longest, np.nan, target)
    if turns == 0:
        x0 = _zero_revolution_guess(target, lam)
        low = np.full_like(target, -1.0)
        high = np.full_like(target, np.inf)
        x = _solve(target, lam, 0.0, x0, low, high, increasing=False)
        if longest is not None:
            x[longest] = -1.0
        return x
    x_min, t_min = _minimum_time(lam, float(turns))
    reachable = target >= t_min
    goal = np.where(reachable, target, np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        left_start = ((turns * np.pi + np.pi) / (8.0 * target)) ** (2.0 / 3.0)
        right_start = ((8.0 * target) / (turns * np.pi)) ** (2.0 / 3.0)
    left0 = np.clip((left_start - 1.0) / (left_start + 1.0), -1.0, x_min)
    right0 = np.clip((right_start - 1.0) / (right_start + 1.0), x_min, 1.0)
    left = _solve(goal, lam, float(turns), left0, np.full_like(target, -1.0), x_min, increasing=False)
    right = _solve(goal, lam, float(turns), right0, x_min.copy(), np.ones_like(target), increasing=True)
    # order the branches by semi-major axis a = a_min / (1 - x^2): shorter period first
    if longest is not None:
        left[longest], right[longest] = -1.0, 1.0
    left_shorter = np.abs(left) <= np.abs(right)
    short = np.where(left_shorter, left, right)
    long = np.where(left_shorter, right, left)
    return np.stack([short, long])


# ---------------------------------------------------------------------- geometry
def _cross(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """a x b on the last axis, component by component (np.cross moves axes and copies)."""
    a0, a1, a2 = a[..., 0], a[..., 1], a[..., 2]
    b0, b1, b2 = b[..., 0], b[..., 1], b[..., 2]
    out = np.empty(np.broadcast_shapes(a.shape, b.shape))
    np.subtract(a1 * b2, a2 * b1, out=out[..., 0])
    np.subtract(a2 * b0, a0 * b2, out=out[..., 1])
    np.subtract(a0 * b1, a1 * b0, out=out[..., 2])
    return out


def _unit(v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    norm = np.sqrt(np.einsum("...i,...i->...", v, v))
    with np.errstate(invalid="ignore", divide="ignore"):
        return v / norm[..., None], norm


def _vector(value: ArrayLike, name: str) -> np.ndarray:
    array = finite(value, name, "m")
    if array.ndim == 0 or array.shape[-1] != 3:
        raise DomainError(f"`{name}` must hold 3-vectors on its last axis, shape (..., 3), got {array.shape}")
    zero = ~np.any(array != 0.0, axis=-1)  # by components: the norm of (1e-300, 0, 0) underflows
    if zero.any():
        require(zero, zero, name, "a nonzero vector (a position away from the focus)")
    return array


def checked_revolutions(value: Any) -> int:
    """``value`` as the number of full turns (an integer >= 0), or a DomainError naming `revolutions`."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)) or value < 0:
        raise DomainError(f"`revolutions` must be an integer >= 0, got {value!r}")
    return int(value)


def checked_prograde(value: Any) -> bool:
    """``value`` as the direction of motion (True or False), or a DomainError naming `prograde`."""
    if not isinstance(value, (bool, np.bool_)):
        raise DomainError(f"`prograde` must be True or False, got {value!r}")
    return bool(value)


def lambert(
    r1: ArrayLike,
    r2: ArrayLike,
    tof: ArrayLike,
    mu: ArrayLike,
    revolutions: int = 0,
    prograde: bool = True,
) -> LambertSolution:
    """Velocities of the conic that goes from ``r1`` to ``r2`` in time ``tof``.

    Parameters
    ----------
    r1, r2 : array_like, shape (..., 3)
        Positions at departure and arrival, m (nonzero).
    tof : array_like, shape (...)
        Time of flight, s (> 0).
    mu : array_like, shape (...)
        Gravitational parameter of the central body, m^3/s^2 (> 0).
    revolutions : int, optional
        Full turns made on the way (default 0).
    prograde : bool, optional
        Move counterclockwise seen from +z (default) or clockwise.

    Returns
    -------
    LambertSolution
        ``v1``, ``v2`` of shape ``(..., 3)``, with ``...`` the broadcast shape
        of the cases; for ``revolutions > 0`` shape ``(2, ..., 3)``, index 0
        the shorter-period branch.

    Notes
    -----
    NaN where there is no solution: a multi-revolution time of flight shorter
    than the minimum for that many turns, and a transfer angle of 0 or 180
    degrees (within ``PLANE_TOLERANCE`` in its sine). At 180 degrees the
    positions and the focus lie on one line, so every plane through that line
    holds a transfer of the same shape: the velocity's direction is undefined
    and no single answer is right. (Shift an arrival date by a fraction of a
    day to leave the singular line.)

    Flights so short that gravity no longer bends the path (Izzo's x above
    1e8) are solved in closed form, and flights so long that x = -1 to
    rounding (T above 1e25) take that limit; inputs such as 1e300 m or
    1e-300 s are solved in long double and give the right answer in float64,
    or inf where it does not fit one.

    Raises
    ------
    DomainError
        Non-finite input, a zero position, ``tof`` or ``mu`` <= 0, inputs that
        do not broadcast, or ``revolutions`` not an integer >= 0.

    See Also
    --------
    lambert_time_of_flight : the time of flight of a given ``x``, the function this solver inverts.
    transfer_map : Lambert's problem over a grid of departure and arrival dates.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students, Example 5.2 (3rd ed.):
    from (5000, 10000, 2100) km to (-14600, 2500, 7000) km about the Earth in
    one hour (quoted from memory: v1 = (-5.9925, 1.9254, 3.2456) km/s).

    >>> import numpy as np
    >>> from deltakit import lambert
    >>> from deltakit.constants import EARTH
    >>> out = lambert([5000e3, 10000e3, 2100e3], [-14600e3, 2500e3, 7000e3], 3600.0, 398600e9)
    >>> np.round(out.v1 / 1e3, 4)
    array([-5.9925,  1.9254,  3.2456])

    Many cases at once (no Python loop), and two revolutions:

    >>> r2 = np.array([[0.0, 8000e3, 0.0], [-8000e3, 1.0, 0.0]])
    >>> lambert([7000e3, 0.0, 0.0], r2, 3000.0, EARTH.mu).v1.shape
    (2, 3)
    >>> lambert([7000e3, 0.0, 0.0], [0.0, 8000e3, 0.0], 4 * 3600.0, EARTH.mu, revolutions=2).v1.shape
    (2, 3)
    """
    r1 = _vector(r1, "r1")
    r2 = _vector(r2, "r2")
    tof = positive(tof, "tof", "s")
    mu = positive(mu, "mu", "m^3/s^2")
    revolutions = checked_revolutions(revolutions)
    prograde = checked_prograde(prograde)
    shape = broadcast_shape(r1=r1[..., 0], r2=r2[..., 0], tof=tof, mu=mu)
    r1 = np.broadcast_to(r1, (*shape, 3))
    r2 = np.broadcast_to(r2, (*shape, 3))
    tof = np.broadcast_to(tof, shape)
    mu = np.broadcast_to(mu, shape)
    v1, v2, _ = _velocities(r1, r2, tof, mu, revolutions, prograde)
    return LambertSolution(v1=v1, v2=v2)


def transfer_plane(
    u1: np.ndarray, u2: np.ndarray, prograde: bool
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Unit normal of the motion, transfer angle in [0, 2 pi) and whether the plane is defined.

    ``u1``, ``u2`` are unit vectors (..., 3). The motion's normal has a positive
    z component when ``prograde`` (a polar plane goes the short way); the
    angle exceeds pi when the motion goes the long way round.
    """
    normal = _cross(u1, u2)
    sin_angle = np.sqrt(np.einsum("...i,...i->...", normal, normal))
    cos_angle = np.einsum("...i,...i->...", u1, u2)
    flip = (normal[..., 2] < 0.0) if prograde else (normal[..., 2] >= 0.0)
    sign = np.where(flip, -1.0, 1.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        h = normal * (sign / sin_angle)[..., None]
    angle = np.arctan2(sign * sin_angle, cos_angle) % (2.0 * np.pi)
    return h, angle, sin_angle > PLANE_TOLERANCE


def _velocities(
    r1: np.ndarray, r2: np.ndarray, tof: np.ndarray, mu: Any, turns: int, prograde: bool
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The solver on checked arrays that broadcast together (the map's fast path): v1, v2, transfer angle.

    Many cases are solved in blocks of about ``_CASES_PER_BLOCK`` (cut as
    :mod:`deltakit._blocks` cuts them), so the solver's temporaries stay small
    and warm instead of being fresh arrays of every case at each step.
    """
    r1, r2, tof, mu = (np.asarray(a) for a in (r1, r2, tof, mu))
    shape = np.broadcast_shapes(r1.shape[:-1], r2.shape[:-1], tof.shape, mu.shape)
    if prod(shape) <= 2 * _CASES_PER_BLOCK:
        return _velocities_of_block(r1, r2, tof, mu, turns, prograde)
    ndim = len(shape)
    r1, r2 = (a.reshape((1,) * (ndim + 1 - a.ndim) + a.shape) for a in (r1, r2))
    tof, mu = (a.reshape((1,) * (ndim - a.ndim) + a.shape) for a in (tof, mu))
    axis, inner = ndim - 1, 1  # cut along `axis`; the axes after it go whole into each block
    while axis > 0 and inner * shape[axis] <= _CASES_PER_BLOCK:
        inner *= shape[axis]
        axis -= 1
    step = max(1, _CASES_PER_BLOCK // inner)
    branches = (slice(None),) if turns else ()
    v1 = np.empty((2, *shape, 3) if turns else (*shape, 3))
    v2 = np.empty_like(v1)
    angle = np.empty(shape)
    for outer in np.ndindex(*shape[:axis]):
        for start in range(0, shape[axis], step):
            cut = slice(start, start + step)
            parts = [_block(a, outer, axis, cut) for a in (r1, r2, tof, mu)]
            index = (*outer, cut)
            v1[branches + index], v2[branches + index], angle[index] = _velocities_of_block(
                *parts, turns, prograde
            )
    return v1, v2, angle


def _velocities_of_block(
    r1: np.ndarray, r2: np.ndarray, tof: np.ndarray, mu: Any, turns: int, prograde: bool
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`_velocities` on one block of cases.

    ``r1``, ``r2`` may keep length-1 axes (a grid of departures x arrivals):
    their norms and unit vectors are then computed once per date, not per pair.
    Inputs beyond ``_BAND`` (1e300 m, 1e-300 s) are solved in long double
    and returned in float64: the right answer, or inf where it exceeds float64.
    """
    # vectors as contiguous components: every step below is then a plain pass over the cases
    x1, y1, z1 = (r1[..., k].copy() for k in range(3))
    x2, y2, z2 = (r2[..., k].copy() for k in range(3))
    with np.errstate(over="ignore", under="ignore"):
        n1 = np.sqrt(x1 * x1 + y1 * y1 + z1 * z1)
        n2 = np.sqrt(x2 * x2 + y2 * y2 + z2 * z2)
    if r1.dtype == np.float64 and _beyond_band(n1, n2, tof, mu):
        wide = [np.asarray(a, dtype=np.longdouble) for a in (r1, r2, tof, mu)]
        with np.errstate(over="ignore", under="ignore"):
            v1, v2, angle = _velocities_of_block(*wide, turns, prograde)
            return v1.astype(np.float64), v2.astype(np.float64), angle.astype(np.float64)
    # the plane of the motion, as transfer_plane finds it, component by component
    with np.errstate(invalid="ignore", divide="ignore"):
        inverse1, inverse2 = 1.0 / n1, 1.0 / n2
        a1, b1, c1 = x1 * inverse1, y1 * inverse1, z1 * inverse1
        a2, b2, c2 = x2 * inverse2, y2 * inverse2, z2 * inverse2
        nx, ny, nz = b1 * c2 - c1 * b2, c1 * a2 - a1 * c2, a1 * b2 - b1 * a2
        sin_angle = np.sqrt(nx * nx + ny * ny + nz * nz)
        sign = np.where((nz < 0.0) if prograde else (nz >= 0.0), -1.0, 1.0)
        inverse = sign / sin_angle
        hx, hy, hz = nx * inverse, ny * inverse, nz * inverse
    angle = np.asarray(np.arctan2(sign * sin_angle, a1 * a2 + b1 * b2 + c1 * c2))  # (-pi, pi] to [0, 2 pi)
    np.add(angle, 2.0 * np.pi, out=angle, where=angle < 0.0)
    planar = sin_angle > PLANE_TOLERANCE
    dx, dy, dz = x2 - x1, y2 - y1, z2 - z1
    chord = np.sqrt(dx * dx + dy * dy + dz * dz)
    s = 0.5 * (n1 + n2 + chord)
    # lam = sqrt(1 - c/s) with its sign, from the half angle: no cancellation near 180 degrees
    lam = np.sqrt(n1 * n2) * np.cos(angle / 2.0) / s
    lam = np.where(planar, lam, np.nan)
    target = np.sqrt(2.0 * mu / (s * s * s)) * tof
    straight = _straight_cases(target, lam) if turns == 0 else None
    if straight is not None:
        solved = np.where(straight, np.nan, target)
    else:
        solved = target

    x = _solve_x(solved, lam, turns)

    gamma = np.sqrt(mu * s / 2.0)
    rho = (n1 - n2) / chord
    sigma = np.sqrt(np.maximum(1.0 - rho * rho, 0.0))
    y = np.sqrt(1.0 - lam * lam * (1.0 - x * x))
    radial1 = gamma * ((lam * y - x) - rho * (lam * y + x)) / n1
    radial2 = -gamma * ((lam * y - x) + rho * (lam * y + x)) / n2
    transverse = gamma * sigma * (y + lam * x)
    if straight is not None:
        # x = (1 - lam |lam|) / T to rounding: written with y / x and gamma x = s^2 (1 - lam |lam|) / (2 tof),
        # which neither overflow for the largest x nor need mu (gravity no longer bends the path)
        with np.errstate(over="ignore", under="ignore", invalid="ignore", divide="ignore"):
            a = 1.0 - lam * np.abs(lam)
            inverse_x = target / a
            q = np.sqrt((1.0 - lam * lam) * inverse_x * inverse_x + lam * lam)
            gx = a * s * s / (2.0 * tof)
            radial1 = np.where(straight, gx * ((lam * q - 1.0) - rho * (lam * q + 1.0)) / n1, radial1)
            radial2 = np.where(straight, -gx * ((lam * q - 1.0) + rho * (lam * q + 1.0)) / n2, radial2)
            transverse = np.where(straight, gx * sigma * (q + lam), transverse)
    # v = radial u + transverse (h x u) / |r| at each end
    v1 = _along(radial1, transverse / n1, (a1, b1, c1), (hx, hy, hz))
    v2 = _along(radial2, transverse / n2, (a2, b2, c2), (hx, hy, hz))
    return v1, v2, angle


def _along(radial: np.ndarray, transverse: np.ndarray, u: tuple, h: tuple) -> np.ndarray:
    """``radial u + transverse (h x u)`` as vectors on the last axis, from components."""
    ux, uy, uz = u
    hx, hy, hz = h
    shape = np.broadcast_shapes(radial.shape, transverse.shape, ux.shape, hx.shape)
    out = np.empty((*shape, 3), dtype=np.result_type(radial, ux))
    out[..., 0] = radial * ux + transverse * (hy * uz - hz * uy)
    out[..., 1] = radial * uy + transverse * (hz * ux - hx * uz)
    out[..., 2] = radial * uz + transverse * (hx * uy - hy * ux)
    return out


def _beyond_band(*values: Any) -> bool:
    """True when any magnitude (NaN aside) lies outside ``_BAND``: the long-double path then."""
    low, high = _BAND
    for value in values:
        value = np.asarray(value)
        if np.fmin.reduce(value, axis=None, initial=np.inf) < low:
            return True
        if np.fmax.reduce(value, axis=None, initial=-np.inf) > high:
            return True
    return False


def _straight_cases(target: np.ndarray, lam: np.ndarray) -> np.ndarray | None:
    """Where T is so short that x = (1 - lam |lam|) / T exceeds ``_ASYMPTOTE_X`` (None: nowhere)."""
    if not np.fmin.reduce(target, axis=None, initial=np.inf) < 2.0 / _ASYMPTOTE_X:  # 1 - lam |lam| <= 2
        return None
    with np.errstate(invalid="ignore"):
        straight = (1.0 - lam * np.abs(lam)) > _ASYMPTOTE_X * target
    return straight if straight.any() else None


def lambert_time_of_flight(x: ArrayLike, lam: ArrayLike, revolutions: int = 0) -> Any:
    """Izzo's non-dimensional time of flight ``T(x)`` for the geometry ``lam``.

    ``tof = T / sqrt(2 mu / s**3)``; ``x**2 = 1 - a_min / a`` with ``a_min = s/2``.
    This is the function :func:`lambert` inverts, exposed so its derivation
    (``deltakit.symbolic.derive("lambert_time_of_flight")``) can be checked
    against it.

    Parameters
    ----------
    x : array_like
        Izzo's variable (> -1; below 1 ellipses, above 1 hyperbolas).
    lam : array_like
        Geometry parameter in [-1, 1] (negative: the long way round).
    revolutions : int, optional
        Full turns.

    Examples
    --------
    At x = 0 (the minimum-energy ellipse) and lam = 0, half a turn of the
    ellipse: T = pi / 2.

    >>> from deltakit.lambert_solver import lambert_time_of_flight
    >>> round(float(lambert_time_of_flight(0.0, 0.0)), 12)
    1.570796326795
    """
    x = finite(x, "x")
    lam = finite(lam, "lam")
    require(x, ~(x > -1.0), "x", "> -1")
    require(lam, ~(np.abs(lam) <= 1.0), "lam", "within [-1, 1]")
    turns = checked_revolutions(revolutions)
    shape = broadcast_shape(x=x, lam=lam)
    x, lam = np.broadcast_to(x, shape).copy(), np.broadcast_to(lam, shape).copy()
    far = x > _ASYMPTOTE_X  # hyperbolas so fast that T = (1 - lam |lam|) / x to rounding
    if far.any():
        x_near = np.where(far, 2.0, x)
        with np.errstate(invalid="ignore"):
            t = np.where(far, (1.0 - lam * np.abs(lam)) / x, _tof(x_near, lam, float(turns)))
    else:
        t = _tof(x, lam, float(turns))
    return t[()] if t.ndim == 0 else t
