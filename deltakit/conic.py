"""One Keplerian orbit in space: :class:`Conic`.

Conventions
-----------
* SI units: radii in m, speeds in m/s, ``mu`` in m^3/s^2, angles in rad.
* Six elements: periapsis radius ``rp``, eccentricity ``e``, gravitational
  parameter ``mu``, argument of periapsis ``argp``, inclination ``inc`` and
  right ascension of the ascending node ``raan``. The orbit plane is tilted by
  ``inc`` (in [0, pi]; above pi/2 the orbit is retrograde) about the line of
  nodes, which lies at ``raan`` from the +x axis in the reference (x-y) plane;
  ``argp`` is measured in the orbit plane from the ascending node to periapsis,
  in the direction of motion.
* The body moves counter-clockwise seen from the tip of its angular momentum
  (:attr:`Conic.normal`), so the true anomaly ``nu`` grows with time.
* ``inc = raan = 0`` is the planar orbit of deltakit's first versions: the
  plane is the x-y plane, ``argp`` is the angle from +x to periapsis, and every
  planar result is what it always was.
* Two frames for vectors (components on the last axis): ``"plane"`` gives
  2-vectors in the orbit plane, x along the ascending node and y a quarter
  turn ahead in the direction of motion (the reference x, y for a planar
  orbit); ``"inertial"`` gives 3-vectors in the central body's axes (x, y the
  reference plane, z its pole). For ``inc = pi`` the plane's y axis is the
  reference -y.
* Eccentricity ``e`` is 0 for a circle, between 0 and 1 for an ellipse, 1 for a
  parabola and above 1 for a hyperbola. The semi-major axis ``a`` is negative
  for a hyperbola and ``inf`` for a parabola.
* Velocity components are radial (outward) and transverse (along the motion,
  perpendicular to the radius): the in-plane part of the RTN frame.
* Elements broadcast: a Conic of arrays is many orbits at once, and every
  method broadcasts its ``nu`` against them. An element given as a scalar is
  kept as a broadcast view, never copied to the full shape.
* A point a hyperbola never reaches (``1 + e cos nu <= 0``) gives NaN.

Singular cases: one convention
------------------------------
Where an element is undefined, :meth:`Conic.from_state` gives it a fixed
value, and :meth:`Conic.state` reproduces the state it came from:

* **equatorial** (``inc`` 0 or pi, the node is undefined): ``raan = 0``, so
  the +x axis stands for the line of nodes and ``argp`` is measured from +x in
  the direction of motion;
* **circular** (``e = 0``, periapsis undefined; ``e`` at rounding level,
  below 4 machine epsilons, counts as 0): ``argp = 0``, so periapsis is put at
  the ascending node and ``nu`` is the argument of latitude;
* **both** (circular and equatorial): ``raan = argp = 0``, ``nu`` is the
  angle from +x in the direction of motion (the true longitude for a
  prograde orbit);
* **retrograde equatorial** (``inc = pi``): as equatorial, so ``argp`` and
  ``nu`` are measured from +x clockwise seen from +z (the direction of motion).

These never give NaN or a warning. Only a state with zero angular momentum
(a purely radial fall, or no velocity) has no conic: its elements are NaN.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import (
    broadcast_shape,
    finite,
    finite_number,
    is_number,
    nonnegative,
    nonnegative_number,
    positive,
    positive_number,
    require,
    scalar_or_array,
)
from ._results import Result, quantity
from .errors import DomainError

__all__ = ["Conic", "elements_from_state"]

_TWO_PI = 2.0 * np.pi
_INF = math.inf
_FIELDS = ("rp", "e", "mu", "argp", "inc", "raan")
#: Eccentricities up to this are rounding noise of a circular state: e = 0 there.
_CIRCULAR = 4.0 * np.finfo(float).eps
_INCLINATION_RULE = "between 0 and pi (radians; use np.radians for degrees)"
_FRAMES = ("plane", "inertial")


@dataclass(frozen=True, repr=False, eq=False, init=False)
class Conic(Result):
    """A conic orbit in space: periapsis radius, eccentricity, ``mu`` and orientation.

    Parameters
    ----------
    rp : array_like, shape (...)
        Periapsis radius, m (> 0).
    e : array_like, shape (...)
        Eccentricity (>= 0).
    mu : array_like, shape (...)
        Gravitational parameter of the central body, m^3/s^2 (> 0).
    argp : array_like, shape (...), optional
        Argument of periapsis: angle in the orbit plane from the ascending
        node (for a planar orbit: from +x) to periapsis, rad.
    inc : array_like, shape (...), optional
        Inclination of the orbit plane to the reference plane, rad in [0, pi].
    raan : array_like, shape (...), optional
        Right ascension of the ascending node: angle from +x to the line of
        nodes in the reference plane, rad.

    The six are broadcast together; the fields hold read-only arrays of the
    broadcast shape (NumPy scalars for scalar input), where an element given as
    a scalar is a broadcast view of that scalar, not a copy.

    Examples
    --------
    >>> from deltakit import Conic
    >>> from deltakit.constants import EARTH
    >>> gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu)
    >>> round(float(gto.e), 4), round(float(gto.period) / 3600, 2)
    (0.7283, 10.53)
    >>> round(float(gto.speed(0.0)))
    10195

    An inclined orbit (invented: 51.6 deg, node at 30 deg):

    >>> import numpy as np
    >>> station = Conic.circular(6778e3, EARTH.mu, inc=np.radians(51.6), raan=np.radians(30.0))
    >>> np.round(station.normal, 4)
    array([ 0.3918, -0.6787,  0.6211])
    """

    rp: Any = quantity("m")
    e: Any = quantity("")
    mu: Any = quantity("m^3/s^2")
    argp: Any = quantity("rad", default=0.0)
    inc: Any = quantity("rad", default=0.0)
    raan: Any = quantity("rad", default=0.0)

    def __init__(
        self,
        rp: ArrayLike,
        e: ArrayLike,
        mu: ArrayLike,
        argp: ArrayLike = 0.0,
        inc: ArrayLike = 0.0,
        raan: ArrayLike = 0.0,
    ) -> None:
        if is_number(rp, e, mu, argp, inc, raan):  # one orbit of plain, moderate numbers: no arrays at all
            values = (float(rp), float(e), float(mu), float(argp), float(inc), float(raan))
            x_rp, x_e, x_mu, x_argp, x_inc, x_raan = values
            if not (
                0.0 < x_rp < _INF
                and 0.0 <= x_e < _INF
                and 0.0 < x_mu < _INF
                and -_INF < x_argp < _INF
                and 0.0 <= x_inc <= math.pi
                and -_INF < x_raan < _INF
            ):  # something breaks a rule: the helpers raise its message
                values = (
                    positive_number(rp, "rp", "m"),
                    nonnegative_number(e, "e"),
                    positive_number(mu, "mu", "m^3/s^2"),
                    finite_number(argp, "argp", "rad"),
                    _inclination_number(inc),
                    finite_number(raan, "raan", "rad"),
                )
            self._set_numbers(*values)
            return
        elements = (
            positive(rp, "rp", "m"),
            nonnegative(e, "e"),
            positive(mu, "mu", "m^3/s^2"),
            finite(argp, "argp", "rad"),
            _inclination(inc),
            finite(raan, "raan", "rad"),
        )
        broadcast_shape(**dict(zip(_FIELDS, elements)))  # names the elements whose shapes clash
        self._store(elements, copy=True)

    # ------------------------------------------------------------------ storage
    @classmethod
    def _of_numbers(cls, rp: float, e: float, mu: float, argp: float, inc: float, raan: float) -> Conic:
        """One orbit from floats the numeric layer computed: the scalar path where they are moderate.

        Outside the fast path's band (or NaN) the orbit takes the array path, so
        later scalar formulas can neither overflow nor underflow.
        """
        conic = object.__new__(cls)
        if is_number(rp, e, mu, argp, inc, raan):
            conic._set_numbers(rp, e, mu, argp, inc, raan)
        else:
            conic._store(tuple(np.asarray(x, dtype=float) for x in (rp, e, mu, argp, inc, raan)), copy=False)
        return conic

    def _set_numbers(self, rp: float, e: float, mu: float, argp: float, inc: float, raan: float) -> None:
        """Store one orbit of checked Python floats (the scalar fast path)."""
        f = np.float64
        fields = self.__dict__
        fields["rp"], fields["e"], fields["mu"] = f(rp), f(e), f(mu)
        fields["argp"], fields["inc"], fields["raan"] = f(argp), f(inc), f(raan)
        fields["_numbers"] = (rp, e, mu, argp, inc, raan)

    def _store(self, arrays: tuple[np.ndarray, ...], copy: bool) -> None:
        """Store checked element arrays: compact for the kernels, broadcast views for the fields.

        With ``copy`` an array the caller could still change is copied at its
        own shape (nobody can change the orbit behind our back); a scalar is
        never copied to the full shape, only viewed at it.
        """
        compact = []
        for value in arrays:
            if copy and _changeable(value):
                value = np.array(value)  # our own copy, at the value's own shape
            if _writeable(value):
                value = value.view()  # a read-only view: the owner of the data is us
                value.flags.writeable = False
            compact.append(value)
        shape = np.broadcast_shapes(*(a.shape for a in compact))
        fields = {}
        for name, value in zip(_FIELDS, compact):
            if value.shape != shape:
                value = np.broadcast_to(value, shape)  # read-only view, no copy
            fields[name] = scalar_or_array(value)
        self.__dict__.update(fields, _numbers=None, _compact=tuple(compact))

    @classmethod
    def _trusted(
        cls, rp: Any, e: Any, mu: Any, argp: Any = 0.0, inc: Any = 0.0, raan: Any = 0.0, *, copy: bool = True
    ) -> Conic:
        """Build without checks from arrays the numeric layer computed itself.

        Elements may be NaN (an infeasible outcome); nothing is validated.
        With ``copy=False`` the arrays are taken over as they are (behind
        read-only views): for callers that have just made them and change
        them no more (saves six copies on a million burns).
        """
        conic = object.__new__(cls)
        arrays = tuple(np.asarray(x, dtype=float) for x in (rp, e, mu, argp, inc, raan))
        conic._store(arrays, copy=copy)
        return conic

    def _elements(self) -> tuple[np.ndarray, ...]:
        """The six elements at their own (compact) shapes, for the kernels."""
        compact = self.__dict__.get("_compact")
        if compact is None:
            compact = tuple(np.asarray(getattr(self, n)) for n in _FIELDS)
            self.__dict__["_compact"] = compact
        return compact

    # ------------------------------------------------------------------ constructors
    @classmethod
    def from_apsides(
        cls,
        rp: ArrayLike,
        ra: ArrayLike,
        mu: ArrayLike,
        argp: ArrayLike = 0.0,
        inc: ArrayLike = 0.0,
        raan: ArrayLike = 0.0,
    ) -> Conic:
        """The ellipse (or circle) with periapsis ``rp`` and apoapsis ``ra``, both m.

        ``argp``, ``inc`` and ``raan`` orient it as in :class:`Conic`.
        Raises :class:`~deltakit.DomainError` when ``ra < rp``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).e)
        0.125
        """
        if is_number(rp, ra, mu, argp, inc, raan):  # moderate finite numbers: check the rules inline
            rp, ra, mu = float(rp), float(ra), float(mu)
            if 0.0 < rp <= ra and mu > 0.0 and 0.0 <= inc <= math.pi:
                conic = object.__new__(cls)
                conic._set_numbers(rp, (ra - rp) / (ra + rp), mu, float(argp), float(inc), float(raan))
                return conic
        if is_number(rp, ra):
            rp = positive_number(rp, "rp", "m")
            ra = positive_number(ra, "ra", "m")
            below = ra < rp
        else:
            rp = positive(rp, "rp", "m")
            ra = positive(ra, "ra", "m")
            broadcast_shape(rp=rp, ra=ra)
            below = np.any(ra < rp)
        if below:
            require(np.asarray(ra), np.asarray(ra < rp), "ra", ">= rp (apoapsis at or beyond periapsis)", "m")
        return cls(rp, (ra - rp) / (ra + rp), mu, argp, inc, raan)

    @classmethod
    def circular(cls, r: ArrayLike, mu: ArrayLike, inc: ArrayLike = 0.0, raan: ArrayLike = 0.0) -> Conic:
        """The circular orbit of radius ``r``, m, in the plane ``inc``, ``raan``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.circular(7000e3, 3.986e14).e)
        0.0
        """
        if is_number(r):
            return cls(positive_number(r, "r", "m"), 0.0, mu, 0.0, inc, raan)
        r = positive(r, "r", "m")
        broadcast_shape(r=r, mu=positive(mu, "mu", "m^3/s^2"))
        return cls(r, 0.0, mu, 0.0, inc, raan)

    @classmethod
    def from_vinf(
        cls,
        rp: ArrayLike,
        vinf: ArrayLike,
        mu: ArrayLike,
        argp: ArrayLike = 0.0,
        inc: ArrayLike = 0.0,
        raan: ArrayLike = 0.0,
    ) -> Conic:
        """The hyperbola with periapsis ``rp`` (m) and excess speed ``vinf`` (m/s).

        ``vinf = 0`` gives the parabola.

        Examples
        --------
        >>> from deltakit import Conic
        >>> hyp = Conic.from_vinf(6678e3, 3000.0, 3.986e14)
        >>> round(float(hyp.vinf), 6)
        3000.0
        """
        if is_number(rp, vinf, mu):
            rp = positive_number(rp, "rp", "m")
            vinf = nonnegative_number(vinf, "vinf", "m/s")
            mu = positive_number(mu, "mu", "m^3/s^2")
        else:
            rp = positive(rp, "rp", "m")
            vinf = nonnegative(vinf, "vinf", "m/s")
            mu = positive(mu, "mu", "m^3/s^2")
            broadcast_shape(rp=rp, vinf=vinf, mu=mu)
        with np.errstate(over="ignore"):
            e = 1.0 + rp * (vinf / mu) * vinf  # in this order rp vinf^2 / mu overflows only if it must
        if not np.all(np.isfinite(e)):
            require(
                np.asarray(vinf),
                ~np.isfinite(np.broadcast_to(e, np.shape(vinf)) if np.shape(vinf) else e),
                "vinf",
                "small enough that rp vinf^2 / mu (the eccentricity) fits a float, with these `rp` and `mu`",
                "m/s",
            )
        return cls(rp, e, mu, argp, inc, raan)

    @classmethod
    def from_state(cls, r_vec: ArrayLike, v_vec: ArrayLike, mu: ArrayLike) -> Conic:
        """The conic through position ``r_vec`` (m) with velocity ``v_vec`` (m/s).

        Components are on the last axis. 3-vectors, shape (..., 3), are in the
        central body's inertial axes and give the full element set, with the
        conventions of the module notes where an element is undefined
        (equatorial, circular, retrograde equatorial). 2-vectors, shape
        (..., 2), are in the orbit plane's own axes, where motion is
        counter-clockwise (``h = x vy - y vx > 0``): they give ``inc = raan =
        0``, and a clockwise state has no Conic in that frame (NaN elements;
        give it as a 3-vector with z = 0 for the retrograde orbit). A state
        with zero angular momentum gives NaN elements. Use
        :meth:`true_anomaly_at` for the true anomaly of ``r_vec``.

        Raises
        ------
        DomainError
            If a vector has the wrong number of components, the two differ,
            a component is not finite, ``mu <= 0`` or ``r_vec`` is zero.

        Examples
        --------
        >>> from deltakit import Conic
        >>> c = Conic.from_state([7000e3, 0.0], [0.0, 8000.0], 3.986e14)
        >>> round(float(c.rp)), round(float(c.e), 6)
        (7000000, 0.123934)

        A retrograde equatorial state (clockwise seen from +z) as 3-vectors:

        >>> import numpy as np
        >>> c = Conic.from_state([7000e3, 0.0, 0.0], [0.0, -8000.0, 0.0], 3.986e14)
        >>> float(np.degrees(c.inc)), float(c.raan), round(float(c.e), 6)
        (180.0, 0.0, 0.123934)
        """
        r_vec = _vector(r_vec, "r_vec")
        v_vec = _vector(v_vec, "v_vec")
        if v_vec.shape[-1] != r_vec.shape[-1]:
            raise DomainError(
                f"`v_vec` must have as many components as `r_vec` ({r_vec.shape[-1]}), "
                f"got shape {v_vec.shape}"
            )
        mu = positive(mu, "mu", "m^3/s^2")
        broadcast_shape(r_vec=r_vec[..., 0], v_vec=v_vec[..., 0], mu=mu)
        with np.errstate(over="ignore"):
            r_norm = np.sqrt(np.sum(r_vec * r_vec, axis=-1))
        require(r_vec, r_norm <= 0.0, "r_vec", "non-zero (a position away from the centre)", "m")
        own_mu = np.array(mu) if _changeable(mu) else mu
        if r_vec.shape[-1] == 2:
            rp, e, argp = elements_from_state(r_vec[..., 0], r_vec[..., 1], v_vec[..., 0], v_vec[..., 1], mu)
            return cls._trusted(rp, e, own_mu, argp, copy=False)
        rp, e, argp, inc, raan = _elements_3d(r_vec, v_vec, mu)
        return cls._trusted(rp, e, own_mu, argp, inc, raan, copy=False)

    # ------------------------------------------------------------------ properties
    @property
    def shape(self) -> tuple[int, ...]:
        """Broadcast shape of the elements (``()`` for one orbit)."""
        return np.shape(self.rp)

    def __getitem__(self, index: Any) -> Conic:
        """The orbits at ``index`` of the element arrays."""
        return Conic._trusted(*(np.asarray(getattr(self, n))[index] for n in _FIELDS), copy=False)

    @property
    def p(self) -> Any:
        """Semi-latus rectum ``rp (1 + e)``, m."""
        return self.rp * (1.0 + self.e)

    @property
    def a(self) -> Any:
        """Semi-major axis, m: negative for a hyperbola, ``inf`` for a parabola."""
        numbers = self._numbers
        if numbers is not None:
            rp, e = numbers[0], numbers[1]
            return np.float64(math.inf if e == 1.0 else rp / (1.0 - e))
        with np.errstate(divide="ignore"):
            return scalar_or_array(np.divide(self.rp, 1.0 - self.e))

    @property
    def ra(self) -> Any:
        """Apoapsis radius, m (``inf`` for ``e >= 1``, NaN where ``e`` is NaN)."""
        numbers = self._numbers
        if numbers is not None:
            rp, e = numbers[0], numbers[1]
            return np.float64(math.inf if e >= 1.0 else rp * (1.0 + e) / (1.0 - e))
        with np.errstate(divide="ignore", invalid="ignore"):
            return scalar_or_array(np.where(self.e >= 1.0, np.inf, self.p / (1.0 - self.e)))

    @property
    def energy(self) -> Any:
        """Specific orbital energy ``-mu (1 - e) / (2 rp)``, J/kg."""
        return -self.mu * (1.0 - self.e) / (2.0 * self.rp)

    @property
    def h(self) -> Any:
        """Specific angular momentum ``sqrt(mu p)``, m^2/s."""
        numbers = self._numbers
        if numbers is not None:
            return np.float64(math.sqrt(numbers[2] * (numbers[0] * (1.0 + numbers[1]))))
        return np.sqrt(self.mu * self.p)

    @property
    def period(self) -> Any:
        """Orbital period, s (``inf`` for ``e >= 1``, NaN where ``e`` is NaN)."""
        numbers = self._numbers
        if numbers is not None:
            rp, e, mu = numbers[:3]
            if e >= 1.0:
                return np.float64(math.inf)
            a = rp / (1.0 - e)
            return np.float64(_TWO_PI * math.sqrt(abs(a) ** 3 / mu))
        with np.errstate(divide="ignore", invalid="ignore"):
            a = np.divide(self.rp, 1.0 - self.e)
            return scalar_or_array(
                np.where(self.e >= 1.0, np.inf, _TWO_PI * np.sqrt(np.abs(a) ** 3 / self.mu))
            )

    @property
    def vinf(self) -> Any:
        """Hyperbolic excess speed, m/s (0 for a parabola, NaN for ``e < 1``)."""
        numbers = self._numbers
        if numbers is not None:
            rp, e, mu = numbers[:3]
            return np.float64(math.sqrt(abs(mu * (e - 1.0) / rp)) if e >= 1.0 else math.nan)
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

    @property
    def normal(self) -> np.ndarray:
        """Unit vector along the angular momentum, inertial axes, shape (..., 3).

        ``(sin inc sin raan, -sin inc cos raan, cos inc)``: +z for a planar
        orbit, -z for a retrograde equatorial one (exactly).

        Examples
        --------
        >>> from deltakit import Conic
        >>> Conic.circular(7000e3, 3.986e14).normal.tolist()
        [0.0, -0.0, 1.0]
        """
        return np.stack(
            np.broadcast_arrays(*_unit_normal(np.asarray(self.inc), np.asarray(self.raan))), axis=-1
        )

    @property
    def nodes(self) -> tuple[Any, Any]:
        """True anomalies of the ascending and the descending node, rad in (-pi, pi].

        ``-argp`` and ``pi - argp``, wrapped. NaN where a hyperbola never
        reaches the node. For an equatorial orbit, whose node is undefined,
        these are the crossings of the +x and -x axes (the convention of the
        module notes); to find where a plane change must be made, use
        :func:`deltakit.plane_change_burns`, which intersects the two planes.

        Examples
        --------
        >>> import numpy as np
        >>> from deltakit import Conic
        >>> c = Conic(7000e3, 0.1, 3.986e14, argp=np.radians(30.0), inc=0.5)
        >>> [round(float(np.degrees(nu)), 6) for nu in c.nodes]
        [-30.0, 150.0]
        """
        argp = np.asarray(self.argp)
        ascending = _wrap(-argp)
        descending = _wrap(np.pi - argp)
        limit = np.asarray(self.true_anomaly_limit)
        with np.errstate(invalid="ignore"):
            open_orbit = np.asarray(self.e) >= 1.0
            ascending = np.where(open_orbit & (np.abs(ascending) >= limit), np.nan, ascending)
            descending = np.where(open_orbit & (np.abs(descending) >= limit), np.nan, descending)
        shape = self.shape
        return (
            scalar_or_array(np.broadcast_to(ascending, shape).copy()),
            scalar_or_array(np.broadcast_to(descending, shape).copy()),
        )

    # ------------------------------------------------------------------ along the orbit
    def _reachable(self, nu: ArrayLike) -> tuple[np.ndarray, ...]:
        """nu checked; sin nu, cos^2(nu/2), ``1 + e cos nu`` and where it is > 0 (the conic reaches nu)."""
        nu = finite(nu, "nu", "rad")
        _, sin_nu, half_cos2 = _half_angle(nu)
        e = self.e
        denominator = (1.0 - e) + (2.0 * e) * half_cos2  # 1 + e cos nu, free of cancellation
        ok = denominator > 0.0
        return nu, sin_nu, half_cos2, denominator, ok

    def _scalar_nu(self, nu: Any) -> float | None:
        """``nu`` as a checked float when this is one orbit of numbers and ``nu`` a number."""
        if self._numbers is not None and is_number(nu):
            return finite_number(nu, "nu", "rad")
        return None

    def radius(self, nu: ArrayLike) -> Any:
        """Radius at true anomaly ``nu`` (rad), m: ``p / (1 + e cos nu)``.

        NaN where a hyperbola does not reach ``nu``.

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).radius(3.141592653589793))
        9000000.0
        """
        x = self._scalar_nu(nu)
        if x is not None:
            rp, e = self._numbers[:2]
            q = (1.0 - e) + (2.0 * e) * _half_angle_number(x)[2]
            return np.float64(rp * (1.0 + e) / q if q > 0.0 else math.nan)
        _, _, _, denominator, ok = self._reachable(nu)
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
        x = self._scalar_nu(nu)
        if x is not None:
            rp, e, mu = self._numbers[:3]
            half_cos2 = _half_angle_number(x)[2]
            if (1.0 - e) + (2.0 * e) * half_cos2 <= 0.0:
                return np.float64(math.nan)
            return np.float64(math.sqrt(mu / (rp * (1.0 + e)) * ((1.0 - e) ** 2 + 4.0 * e * half_cos2)))
        _, _, half_cos2, _, ok = self._reachable(nu)
        e = self.e
        with np.errstate(invalid="ignore"):
            # 1 + 2 e cos nu + e^2 as a sum of two terms >= 0: no cancellation near apoapsis
            squared = self.mu / self.p * ((1.0 - e) ** 2 + 4.0 * e * half_cos2)
            return scalar_or_array(np.where(ok, np.sqrt(squared), np.nan))

    def flight_path_angle(self, nu: ArrayLike) -> Any:
        """Angle of the velocity above the local horizontal, rad (positive climbing).

        Examples
        --------
        >>> from deltakit import Conic
        >>> float(Conic.from_apsides(7000e3, 9000e3, 3.986e14).flight_path_angle(0.0))
        0.0
        """
        x = self._scalar_nu(nu)
        if x is not None:
            e = self._numbers[1]
            _, sin_nu, half_cos2 = _half_angle_number(x)
            q = (1.0 - e) + (2.0 * e) * half_cos2
            return np.float64(math.atan2(e * sin_nu, q) if q > 0.0 else math.nan)
        _, sin_nu, _, denominator, ok = self._reachable(nu)
        return scalar_or_array(np.where(ok, np.arctan2(self.e * sin_nu, denominator), np.nan))

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
        x = self._scalar_nu(nu)
        if x is not None:
            rp, e, mu = self._numbers[:3]
            _, sin_nu, half_cos2 = _half_angle_number(x)
            q = (1.0 - e) + (2.0 * e) * half_cos2
            if q <= 0.0:
                return np.float64(math.nan), np.float64(math.nan)
            scale = math.sqrt(mu / (rp * (1.0 + e)))
            return np.float64(scale * e * sin_nu), np.float64(scale * q)
        _, sin_nu, _, denominator, ok = self._reachable(nu)
        scale = np.sqrt(self.mu / self.p)
        radial = np.where(ok, scale * self.e * sin_nu, np.nan)
        transverse = np.where(ok, scale * denominator, np.nan)
        return scalar_or_array(radial), scalar_or_array(transverse)

    def state(self, nu: ArrayLike, frame: str = "plane") -> tuple[np.ndarray, np.ndarray]:
        """Position and velocity at ``nu``, components on the last axis.

        Parameters
        ----------
        nu : array_like
            True anomaly, rad.
        frame : {"plane", "inertial"}, optional
            ``"plane"``: 2-vectors in the orbit plane's axes (x along the
            ascending node, y a quarter turn ahead in the direction of motion;
            for a planar orbit the reference x, y), shape (..., 2).
            ``"inertial"``: 3-vectors in the central body's axes, shape (..., 3).

        Examples
        --------
        >>> from deltakit import Conic
        >>> r_vec, v_vec = Conic.circular(7000e3, 3.986e14).state(0.0)
        >>> r_vec.tolist(), [round(x, 3) for x in v_vec.tolist()]
        ([7000000.0, 0.0], [0.0, 7546.049])
        >>> r_vec, v_vec = Conic.circular(7000e3, 3.986e14, inc=3.141592653589793).state(1.0, "inertial")
        >>> float(r_vec[2]), float(v_vec[2])
        (0.0, 0.0)
        """
        if frame not in _FRAMES:
            raise DomainError(f"`frame` must be 'plane' or 'inertial', not {frame!r}")
        nu = finite(nu, "nu", "rad")
        r = np.asarray(self.radius(nu))
        radial, transverse = self.velocity(nu)
        angle = nu + self.argp
        c, s = np.cos(angle), np.sin(angle)
        x, y = r * c, r * s
        vx, vy = radial * c - transverse * s, radial * s + transverse * c
        if frame == "plane":
            return np.stack(np.broadcast_arrays(x, y), axis=-1), np.stack(
                np.broadcast_arrays(vx, vy), axis=-1
            )
        rotate = _plane_to_inertial(np.asarray(self.inc), np.asarray(self.raan))
        return rotate(x, y), rotate(vx, vy)

    def true_anomaly_at(self, r_vec: ArrayLike) -> Any:
        """True anomaly of a position on this orbit, rad in (-pi, pi].

        ``r_vec`` is a 2-vector in the orbit plane's axes, shape (..., 2), or a
        3-vector in inertial axes, shape (..., 3), projected onto the plane.

        Examples
        --------
        >>> from deltakit import Conic
        >>> c = Conic(7000e3, 0.1, 3.986e14, argp=0.5, inc=1.0, raan=2.0)
        >>> round(float(c.true_anomaly_at(c.state(1.0)[0])), 12)
        1.0
        >>> round(float(c.true_anomaly_at(c.state(1.0, "inertial")[0])), 12)
        1.0
        """
        r_vec = _vector(r_vec, "r_vec")
        if r_vec.shape[-1] == 2:
            x, y = r_vec[..., 0], r_vec[..., 1]
        else:
            x, y = _inertial_to_plane(r_vec, np.asarray(self.inc), np.asarray(self.raan))
        angle = np.arctan2(y, x) - self.argp
        return scalar_or_array(np.pi - np.mod(np.pi - angle, _TWO_PI))


# ---------------------------------------------------------------------- state -> elements
def elements_from_state(
    x: np.ndarray, y: np.ndarray, vx: np.ndarray, vy: np.ndarray, mu: np.ndarray
) -> tuple:
    """Periapsis radius, eccentricity and argp of the conic through a state in its plane.

    Unchecked arrays in, arrays out: the shared kernel of
    :meth:`Conic.from_state` and the finite-burn integrator. Elements are NaN
    where the angular momentum ``h = x vy - y vx`` is not positive. An
    eccentricity at rounding level (circular state) is 0 with ``argp = 0``.
    """
    with np.errstate(invalid="ignore", divide="ignore", over="ignore", under="ignore"):
        r = np.hypot(x, y)
        h = x * vy - y * vx
        v2 = vx * vx + vy * vy
        rv = x * vx + y * vy
        # mu times the eccentricity vector, v^2 r - (r.v) v - mu r/|r|: no mu / r, which
        # overflows for a tiny radius, and no division by mu, which overflows for a tiny mu
        big_ex = v2 * x - rv * vx - mu * (x / r)
        big_ey = v2 * y - rv * vy - mu * (y / r)
        big_e = np.hypot(big_ex, big_ey)
        e = big_e / mu
        good = h > 0.0
        circular = e <= _CIRCULAR
        e = np.where(circular, 0.0, e)
        rp = np.where(good, h * h / np.where(circular, mu, mu + big_e), np.nan)  # h^2 / (mu (1 + e))
        argp = np.where(circular, 0.0, np.arctan2(big_ey, big_ex))
    return rp, np.where(good, e, np.nan), np.where(good, argp, np.nan)


def _elements_3d(r_vec: np.ndarray, v_vec: np.ndarray, mu: np.ndarray) -> tuple:
    """rp, e, argp, inc, raan of the conic through inertial 3-vectors (NaN where h = 0)."""
    x, y, z = r_vec[..., 0], r_vec[..., 1], r_vec[..., 2]
    vx, vy, vz = v_vec[..., 0], v_vec[..., 1], v_vec[..., 2]
    with np.errstate(over="ignore", invalid="ignore"):
        hx = y * vz - z * vy
        hy = z * vx - x * vz
        hz = x * vy - y * vx
    with np.errstate(over="ignore", invalid="ignore"):
        tilt = np.hypot(hx, hy)  # |h| sin inc: zero exactly for an equatorial state
        h = np.hypot(tilt, hz)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore", under="ignore"):
        inc = np.arctan2(tilt, hz)
        # a tilt in the subnormal range has lost its digits: no node to speak of
        inclined = tilt > 1e-290 * h
        cos_raan = np.where(inclined, -hy / tilt, 1.0)  # the equatorial convention: node along +x
        sin_raan = np.where(inclined, hx / tilt, 0.0)
        raan = np.where(inclined, np.arctan2(hx, -hy), 0.0)
        raan = np.where(raan < 0.0, raan + _TWO_PI, raan)
        cos_i, sin_i = hz / h, tilt / h
        # coordinates in the orbit plane: x along the node, y a quarter turn ahead
        x_plane = x * cos_raan + y * sin_raan
        y_plane = (y * cos_raan - x * sin_raan) * cos_i + z * sin_i
        vx_plane = vx * cos_raan + vy * sin_raan
        vy_plane = (vy * cos_raan - vx * sin_raan) * cos_i + vz * sin_i
    rp, e, argp = elements_from_state(x_plane, y_plane, vx_plane, vy_plane, mu)
    no_orbit = ~(h > 0.0)
    return rp, e, argp, np.where(no_orbit, np.nan, inc), np.where(no_orbit, np.nan, raan)


# ---------------------------------------------------------------------- anomalies
def _half_angle(nu: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """cos nu, sin nu and cos^2(nu/2) from one tangent of the half angle.

    On NumPy builds with a vectorised ``tan`` this costs a fraction of ``cos``
    and ``sin`` apart (about a tenth on the project's machines); they agree
    with them to an ulp or two over (-pi, pi]. ``cos^2(nu/2) = (1 + cos nu)/2``
    keeps its digits near nu = pi, where ``1 + e cos nu`` would cancel.
    """
    t = np.tan(0.5 * nu)
    t2 = t * t
    half_cos2 = 1.0 / (1.0 + t2)
    return (1.0 - t2) * half_cos2, (2.0 * t) * half_cos2, half_cos2


def _half_angle_number(nu: float) -> tuple[float, float, float]:
    """:func:`_half_angle` for one float, with :mod:`math`."""
    t = math.tan(0.5 * nu)
    t2 = t * t
    half_cos2 = 1.0 / (1.0 + t2)
    return (1.0 - t2) * half_cos2, (2.0 * t) * half_cos2, half_cos2


# ---------------------------------------------------------------------- frames
def _sin_cos_inclination(inc: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """sin and cos of the inclination, with sin exactly 0 at inc = pi (np.sin(pi) is 1.2e-16)."""
    return np.where(inc == np.pi, 0.0, np.sin(inc)), np.cos(inc)


def _unit_normal(inc: Any, raan: Any) -> tuple[Any, Any, Any]:
    """Components of the unit normal ``(sin i sin raan, -sin i cos raan, cos i)`` of planes.

    Exact for the planar (+z) and the retrograde equatorial (-z) orbit; the
    ``+ 0.0`` turns an equatorial orbit's -0.0 into 0.0.
    """
    sin_i, cos_i = _sin_cos_inclination(inc)
    return sin_i * np.sin(raan) + 0.0, 0.0 - sin_i * np.cos(raan), cos_i


def _plane_to_inertial(inc: np.ndarray, raan: np.ndarray):
    """A function turning plane 2-vector components (x, y) into inertial 3-vectors."""
    sin_i, cos_i = _sin_cos_inclination(inc)
    cos_o, sin_o = np.cos(raan), np.sin(raan)

    def rotate(x: Any, y: Any) -> np.ndarray:
        y_tilted = y * cos_i
        return np.stack(
            np.broadcast_arrays(x * cos_o - y_tilted * sin_o, x * sin_o + y_tilted * cos_o, y * sin_i),
            axis=-1,
        )

    return rotate


def _inertial_to_plane(vec: np.ndarray, inc: np.ndarray, raan: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Components of inertial 3-vectors along the plane's x (node) and y axes."""
    sin_i, cos_i = _sin_cos_inclination(inc)
    cos_o, sin_o = np.cos(raan), np.sin(raan)
    x, y, z = vec[..., 0], vec[..., 1], vec[..., 2]
    return x * cos_o + y * sin_o, (y * cos_o - x * sin_o) * cos_i + z * sin_i


def _wrap(angle: np.ndarray) -> np.ndarray:
    """An angle in (-pi, pi]."""
    return np.pi - np.mod(np.pi - angle, _TWO_PI)


# ---------------------------------------------------------------------- checks
def _writeable(array: np.ndarray) -> bool:
    if array.base is not None:  # perhaps a view from np.broadcast_arrays, whose flag warns when read
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", FutureWarning)
            return bool(array.flags.writeable)
    return bool(array.flags.writeable)


def _changeable(array: np.ndarray) -> bool:
    """True when some array in the chain of bases could still be written to."""
    while array is not None:
        if isinstance(array, np.ndarray) and _writeable(array):
            return True
        array = getattr(array, "base", None)
    return False


def _inclination(value: ArrayLike) -> np.ndarray:
    inc = finite(value, "inc", "rad")
    require(inc, (inc < 0.0) | (inc > np.pi), "inc", _INCLINATION_RULE, "rad")
    return inc


def _inclination_number(value: Any) -> float:
    inc = finite_number(value, "inc", "rad")
    if not 0.0 <= inc <= math.pi:
        _inclination(inc)  # raises the array path's message
    return inc


def _vector(value: ArrayLike, name: str) -> np.ndarray:
    array = finite(value, name, "m" if name == "r_vec" else "m/s")
    if array.ndim == 0 or array.shape[-1] not in (2, 3):
        raise DomainError(
            f"`{name}` must have 2 (in the orbit plane) or 3 (inertial) components on its last axis, "
            f"got shape {array.shape}"
        )
    return array
