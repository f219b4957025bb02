"""One Keplerian orbit in its own plane: :class:`Conic`.

Conventions
-----------
* SI units: radii in m, speeds in m/s, ``mu`` in m^3/s^2, angles in rad.
* The orbit lies in a plane with a fixed reference direction. ``argp`` is the
  angle from that direction to periapsis, positive counter-clockwise; the body
  moves counter-clockwise (positive angular momentum), so the true anomaly
  ``nu`` grows with time.
* Eccentricity ``e`` is 0 for a circle, between 0 and 1 for an ellipse, 1 for a
  parabola and above 1 for a hyperbola. The semi-major axis ``a`` is negative
  for a hyperbola and ``inf`` for a parabola.
* Velocity components are radial (outward) and transverse (along the motion,
  perpendicular to the radius): the in-plane part of the RTN frame.
* Elements broadcast: a Conic of arrays is many orbits at once, and every
  method broadcasts its ``nu`` against them.
* A point a hyperbola never reaches (``1 + e cos nu <= 0``) gives NaN.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import finite, nonnegative, positive, require, scalar_or_array
from ._results import Result, quantity

__all__ = ["Conic", "elements_from_state"]

_TWO_PI = 2.0 * np.pi


@dataclass(frozen=True, repr=False, eq=False)
class Conic(Result):
    """A conic orbit: periapsis radius, eccentricity, gravitational parameter.

    Parameters
    ----------
    rp : array_like, shape (...)
        Periapsis radius, m (> 0).
    e : array_like, shape (...)
        Eccentricity (>= 0).
    mu : array_like, shape (...)
        Gravitational parameter of the central body, m^3/s^2 (> 0).
    argp : array_like, shape (...), optional
        In-plane angle from the reference direction to periapsis, rad.

    The four are broadcast together; the fields hold the broadcast arrays
    (NumPy scalars for scalar input) and are read-only.

    Examples
    --------
    >>> from deltakit import Conic
    >>> from deltakit.constants import EARTH
    >>> gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu)
    >>> round(float(gto.e), 4), round(float(gto.period) / 3600, 2)
    (0.7283, 10.53)
    >>> round(float(gto.speed(0.0)))
    10195
    """

    rp: Any = quantity("m")
    e: Any = quantity("")
    mu: Any = quantity("m^3/s^2")
    argp: Any = quantity("rad", default=0.0)

    def __post_init__(self) -> None:
        rp = positive(self.rp, "rp", "m")
        e = nonnegative(self.e, "e")
        mu = positive(self.mu, "mu", "m^3/s^2")
        argp = finite(self.argp, "argp", "rad")
        self._store(rp, e, mu, argp)

    def _store(
        self, rp: np.ndarray, e: np.ndarray, mu: np.ndarray, argp: np.ndarray, copy: bool = True
    ) -> None:
        shape = np.broadcast_shapes(rp.shape, e.shape, mu.shape, argp.shape)
        for name, value in zip(("rp", "e", "mu", "argp"), (rp, e, mu, argp)):
            if shape:
                if copy:  # own, contiguous, read-only copy: nobody can change it behind our back
                    value = np.array(np.broadcast_to(value, shape))
                    value.flags.writeable = False
                else:  # read-only view of an array the caller has just made and holds no more
                    value = np.broadcast_to(value, shape)
            object.__setattr__(self, name, scalar_or_array(value))

    @classmethod
    def _trusted(cls, rp: Any, e: Any, mu: Any, argp: Any = 0.0, *, copy: bool = True) -> Conic:
        """Build without checks from arrays the numeric layer computed itself.

        Elements may be NaN (an infeasible outcome); nothing is validated.
        With ``copy=False`` the fields are read-only views of the given arrays,
        for callers that have just made those arrays and keep no reference
        (saves four copies on a million burns).
        """
        conic = object.__new__(cls)
        conic._store(
            np.asarray(rp, float), np.asarray(e, float), np.asarray(mu, float), np.asarray(argp, float), copy
        )
        return conic

    # ------------------------------------------------------------------ constructors
    @classmethod
    def from_apsides(cls, rp: ArrayLike, ra: ArrayLike, mu: ArrayLike, argp: ArrayLike = 0.0) -> Conic:
        """The ellipse (or circle) with periapsis ``rp`` and apoapsis ``ra``, both m.

        Raises :class:`~deltakit.DomainError` when ``ra < rp``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).e)
        0.125
        """
        rp = positive(rp, "rp", "m")
        ra = positive(ra, "ra", "m")
        require(ra, ra < rp, "ra", ">= rp (apoapsis at or beyond periapsis)", "m")
        return cls(rp, (ra - rp) / (ra + rp), mu, argp)

    @classmethod
    def circular(cls, r: ArrayLike, mu: ArrayLike) -> Conic:
        """The circular orbit of radius ``r``, m.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.circular(7000e3, 3.986e14).e)
        0.0
        """
        return cls(positive(r, "r", "m"), 0.0, mu)

    @classmethod
    def from_vinf(cls, rp: ArrayLike, vinf: ArrayLike, mu: ArrayLike, argp: ArrayLike = 0.0) -> Conic:
        """The hyperbola with periapsis ``rp`` (m) and excess speed ``vinf`` (m/s).

        ``vinf = 0`` gives the parabola.

        Examples
        --------
        >>> from deltakit import Conic
        >>> hyp = Conic.from_vinf(6678e3, 3000.0, 3.986e14)
        >>> round(float(hyp.vinf), 6)
        3000.0
        """
        rp = positive(rp, "rp", "m")
        vinf = nonnegative(vinf, "vinf", "m/s")
        mu = positive(mu, "mu", "m^3/s^2")
        return cls(rp, 1.0 + rp * vinf * vinf / mu, mu, argp)

    @classmethod
    def from_state(cls, r_vec: ArrayLike, v_vec: ArrayLike, mu: ArrayLike) -> Conic:
        """The conic through position ``r_vec`` (m) with velocity ``v_vec`` (m/s).

        Both are 2-vectors in the orbit plane, components on the last axis,
        shape (..., 2). Motion must be counter-clockwise (angular momentum
        ``h = x vy - y vx > 0``); a clockwise or purely radial state has no
        Conic in this convention and gives NaN elements. Use
        :meth:`true_anomaly_at` for the true anomaly of ``r_vec``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> c = Conic.from_state([7000e3, 0.0], [0.0, 8000.0], 3.986e14)
        >>> round(float(c.rp)), round(float(c.e), 6)
        (7000000, 0.123934)
        """
        r_vec = _two_vector(r_vec, "r_vec")
        v_vec = _two_vector(v_vec, "v_vec")
        mu = positive(mu, "mu", "m^3/s^2")
        x, y = r_vec[..., 0], r_vec[..., 1]
        require(r_vec, np.hypot(x, y) <= 0.0, "r_vec", "non-zero (a position away from the centre)", "m")
        rp, e, argp = elements_from_state(x, y, v_vec[..., 0], v_vec[..., 1], mu)
        return cls._trusted(rp, e, mu, argp)

    # ------------------------------------------------------------------ properties
    @property
    def shape(self) -> tuple[int, ...]:
        """Broadcast shape of the elements (``()`` for one orbit)."""
        return np.shape(self.rp)

    def __getitem__(self, index: Any) -> Conic:
        """The orbits at ``index`` of the element arrays."""
        return Conic._trusted(*(np.asarray(getattr(self, n))[index] for n in ("rp", "e", "mu", "argp")))

    @property
    def p(self) -> Any:
        """Semi-latus rectum ``rp (1 + e)``, m."""
        return self.rp * (1.0 + self.e)

    @property
    def a(self) -> Any:
        """Semi-major axis, m: negative for a hyperbola, ``inf`` for a parabola."""
        with np.errstate(divide="ignore"):
            return scalar_or_array(np.divide(self.rp, 1.0 - self.e))

    @property
    def ra(self) -> Any:
        """Apoapsis radius, m (``inf`` for ``e >= 1``, NaN where ``e`` is NaN)."""
        with np.errstate(divide="ignore", invalid="ignore"):
            return scalar_or_array(np.where(self.e >= 1.0, np.inf, self.p / (1.0 - self.e)))

    @property
    def energy(self) -> Any:
        """Specific orbital energy ``-mu (1 - e) / (2 rp)``, J/kg."""
        return -self.mu * (1.0 - self.e) / (2.0 * self.rp)

    @property
    def h(self) -> Any:
        """Specific angular momentum ``sqrt(mu p)``, m^2/s."""
        return np.sqrt(self.mu * self.p)

    @property
    def period(self) -> Any:
        """Orbital period, s (``inf`` for ``e >= 1``, NaN where ``e`` is NaN)."""
        with np.errstate(divide="ignore", invalid="ignore"):
            a = np.divide(self.rp, 1.0 - self.e)
            return scalar_or_array(
                np.where(self.e >= 1.0, np.inf, _TWO_PI * np.sqrt(np.abs(a) ** 3 / self.mu))
            )

    @property
    def vinf(self) -> Any:
        """Hyperbolic excess speed, m/s (0 for a parabola, NaN for ``e < 1``)."""
        with np.errstate(invalid="ignore"):
            return scalar_or_array(
                np.where(self.e >= 1.0, np.sqrt(np.abs(self.mu * (self.e - 1.0) / self.rp)), np.nan)
            )

    @property
    def true_anomaly_limit(self) -> Any:
        """Largest reachable ``|nu|``, rad: pi for an ellipse, the asymptote for a hyperbola.

        For ``e >= 1`` the limit itself is not reached (it lies at infinity).
        """
        with np.errstate(divide="ignore", invalid="ignore"):
            return scalar_or_array(np.where(self.e <= 1.0, np.pi, np.arccos(-1.0 / np.maximum(self.e, 1.0))))

    # ------------------------------------------------------------------ along the orbit
    def _reachable(self, nu: ArrayLike) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        nu = finite(nu, "nu", "rad")
        cos_nu = np.cos(nu)
        denominator = 1.0 + self.e * cos_nu
        ok = denominator > 0.0
        return nu, cos_nu, denominator, ok

    def radius(self, nu: ArrayLike) -> Any:
        """Radius at true anomaly ``nu`` (rad), m: ``p / (1 + e cos nu)``.

        NaN where a hyperbola does not reach ``nu``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).radius(3.141592653589793))
        9000000.0
        """
        _, _, denominator, ok = self._reachable(nu)
        with np.errstate(divide="ignore", invalid="ignore"):
            return scalar_or_array(np.where(ok, self.p / denominator, np.nan))

    def speed(self, nu: ArrayLike) -> Any:
        """Speed at true anomaly ``nu``, m/s: ``sqrt(mu/p (1 + 2 e cos nu + e^2))``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> round(float(Conic.circular(7000e3, 3.986e14).speed(1.0)), 3)
        7546.049
        """
        _, cos_nu, _, ok = self._reachable(nu)
        e = self.e
        with np.errstate(invalid="ignore"):
            squared = self.mu / self.p * (1.0 + 2.0 * e * cos_nu + e * e)
            return scalar_or_array(np.where(ok, np.sqrt(squared), np.nan))

    def flight_path_angle(self, nu: ArrayLike) -> Any:
        """Angle of the velocity above the local horizontal, rad (positive climbing).

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).flight_path_angle(0.0))
        0.0
        """
        nu, cos_nu, denominator, ok = self._reachable(nu)
        return scalar_or_array(np.where(ok, np.arctan2(self.e * np.sin(nu), denominator), np.nan))

    def velocity(self, nu: ArrayLike) -> tuple[Any, Any]:
        """Radial and transverse velocity components at ``nu``, m/s.

        Returns
        -------
        radial, transverse : ndarray or numpy scalar
            ``sqrt(mu/p) e sin nu`` and ``sqrt(mu/p) (1 + e cos nu)``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> vr, vt = Conic.circular(7000e3, 3.986e14).velocity(0.5)
        >>> float(vr), round(float(vt), 3)
        (0.0, 7546.049)
        """
        nu, _, denominator, ok = self._reachable(nu)
        scale = np.sqrt(self.mu / self.p)
        radial = np.where(ok, scale * self.e * np.sin(nu), np.nan)
        transverse = np.where(ok, scale * denominator, np.nan)
        return scalar_or_array(radial), scalar_or_array(transverse)

    def state(self, nu: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
        """Position and velocity at ``nu`` in the plane's fixed axes, shape (..., 2).

        Examples
        --------
        >>> from deltakit import Conic
        >>> r_vec, v_vec = Conic.circular(7000e3, 3.986e14).state(0.0)
        >>> r_vec.tolist(), [round(x, 3) for x in v_vec.tolist()]
        ([7000000.0, 0.0], [0.0, 7546.049])
        """
        nu = finite(nu, "nu", "rad")
        r = np.asarray(self.radius(nu))
        radial, transverse = self.velocity(nu)
        angle = nu + self.argp
        c, s = np.cos(angle), np.sin(angle)
        r_vec = np.stack(np.broadcast_arrays(r * c, r * s), axis=-1)
        v_vec = np.stack(
            np.broadcast_arrays(radial * c - transverse * s, radial * s + transverse * c), axis=-1
        )
        return r_vec, v_vec

    def true_anomaly_at(self, r_vec: ArrayLike) -> Any:
        """True anomaly of a position ``r_vec`` (shape (..., 2)) on this orbit, rad in (-pi, pi].

        Examples
        --------
        >>> from deltakit import Conic
        >>> c = Conic(7000e3, 0.1, 3.986e14, argp=0.5)
        >>> round(float(c.true_anomaly_at(c.state(1.0)[0])), 12)
        1.0
        """
        r_vec = _two_vector(r_vec, "r_vec")
        angle = np.arctan2(r_vec[..., 1], r_vec[..., 0]) - self.argp
        return scalar_or_array(np.pi - np.mod(np.pi - angle, _TWO_PI))


def elements_from_state(
    x: np.ndarray, y: np.ndarray, vx: np.ndarray, vy: np.ndarray, mu: np.ndarray
) -> tuple:
    """Periapsis radius, eccentricity and argp of the conic through a planar state.

    Unchecked arrays in, arrays out: the shared kernel of
    :meth:`Conic.from_state` and the finite-burn integrator. Elements are NaN
    where the angular momentum ``h = x vy - y vx`` is not positive.
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        r = np.hypot(x, y)
        h = x * vy - y * vx
        v2 = vx * vx + vy * vy
        rv = x * vx + y * vy
        ex = ((v2 - mu / r) * x - rv * vx) / mu
        ey = ((v2 - mu / r) * y - rv * vy) / mu
        e = np.hypot(ex, ey)
        good = h > 0.0
        rp = np.where(good, h * h / mu / (1.0 + e), np.nan)
    return rp, np.where(good, e, np.nan), np.where(good, np.arctan2(ey, ex), np.nan)


def _two_vector(value: ArrayLike, name: str) -> np.ndarray:
    array = finite(value, name)
    if array.ndim == 0 or array.shape[-1] != 2:
        from .errors import DomainError

        raise DomainError(f"`{name}` must have 2 components on its last axis, got shape {array.shape}")
    return array
