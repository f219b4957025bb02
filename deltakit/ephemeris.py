"""Where the Sun, the planets and the Moon are: JPL's DE421 ephemeris.

:func:`planet_state` reads the JPL planetary and lunar ephemeris DE421
(Folkner, Williams and Boggs, "The Planetary and Lunar Ephemeris DE 421",
JPL Interplanetary Network Progress Report 42-178, 2009) from the SPK file
``de421.bsp`` that the ``skyfield-data`` package ships, with ``jplephem``'s SPK
reader. Both come with the ``planets`` extra (``pip install
"deltakit[planets]"``) and are imported on first use only.

Conventions
-----------
* Bodies: the Sun, the Moon and the planets. Mercury, Venus, Earth and Mars
  are the planets' centres; Jupiter, Saturn, Uranus and Neptune are their
  system barycentres, the only points DE421 gives for them (their moons move
  the planet itself by at most a few thousand km, well inside preliminary
  accuracy). Names are case-insensitive, or a :class:`~deltakit.constants.CentralBody`.
* Times are TDB seconds past J2000 (:func:`deltakit.epoch`) or dates, which
  are converted by :func:`~deltakit.epoch` as UTC. DE421 covers 1899-07-29 to
  2053-10-09; a time outside raises :class:`~deltakit.DomainError`.
* Frames: ``"ecliptic"`` is the mean ecliptic and equinox of J2000: the ICRF
  axes of DE421 turned by the IAU 2006 frame bias and the IAU 2006 obliquity
  of the ecliptic at J2000, 84381.406 arcsec (Capitaine, Wallace and Chapront
  2003, adopted by IAU 2006 Resolution B1), through ERFA's ``ecm06``.
  ``"icrf"`` keeps DE421's own axes (the ICRF, equatorial).
* SI out: m and m/s, components on the last axis, shape ``t.shape + (3,)``.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import atexit
import functools
from importlib import resources
from typing import Any

import numpy as np

from .constants import BODIES, CentralBody
from .errors import DomainError
from .timescales import J2000_JD, require_planets_extra, tdb_seconds

__all__ = [
    "BODY_CODES",
    "EPHEMERIS_SPAN",
    "FRAMES",
    "body_name",
    "central_body",
    "ecliptic_rotation",
    "ephemeris_path",
    "planet_state",
]

#: NAIF integer codes of the points :func:`planet_state` knows, by body name.
BODY_CODES: dict[str, int] = {
    "Sun": 10,
    "Mercury": 199,
    "Venus": 299,
    "Earth": 399,
    "Moon": 301,
    "Mars": 499,
    "Jupiter": 5,  # system barycentre
    "Saturn": 6,
    "Uranus": 7,
    "Neptune": 8,
}

#: The span of DE421 as TDB seconds past J2000 (JD 2414864.5 to 2471184.5 TDB).
EPHEMERIS_SPAN: tuple[float, float] = ((2414864.5 - J2000_JD) * 86_400.0, (2471184.5 - J2000_JD) * 86_400.0)

FRAMES = ("ecliptic", "icrf")

_KM = 1.0e3
_KM_PER_DAY = 1.0e3 / 86_400.0


def ephemeris_path() -> str:
    """Path of the DE421 SPK file shipped by ``skyfield-data``.

    Examples
    --------
    >>> from deltakit.ephemeris import ephemeris_path
    >>> ephemeris_path().endswith("de421.bsp")
    True
    """
    require_planets_extra("skyfield_data")
    path = resources.files("skyfield_data") / "data" / "de421.bsp"
    return str(path)


@functools.lru_cache(maxsize=1)
def _kernel() -> Any:
    spk = require_planets_extra("jplephem.spk")
    kernel = spk.SPK.open(ephemeris_path())
    atexit.register(kernel.close)  # the file stays open for the session, closed at exit (no ResourceWarning)
    return {(segment.center, segment.target): segment for segment in kernel.segments}


@functools.cache
def _chain(code: int) -> tuple[tuple[int, int], ...]:
    """Segments (center, target) from the solar-system barycentre (0) down to ``code``."""
    segments = _kernel()
    links = {target: center for center, target in segments}
    chain = []
    while code != 0:
        center = links[code]
        chain.append((center, code))
        code = center
    return tuple(reversed(chain))


@functools.lru_cache(maxsize=1)
def ecliptic_rotation() -> np.ndarray:
    """Matrix from ICRF axes to the mean ecliptic and equinox of J2000 (IAU 2006), shape (3, 3).

    ``r_ecliptic = R @ r_icrf``: frame bias, precession to J2000 (none) and
    the rotation by the obliquity 84381.406 arcsec, all from ERFA's ``ecm06``.

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit.ephemeris import ecliptic_rotation
    >>> R = ecliptic_rotation()
    >>> round(float(np.degrees(np.arccos(R[2, 2])) * 3600), 1)  # the obliquity, arcsec
    84381.4
    """
    erfa = require_planets_extra("erfa")
    matrix = np.array(erfa.ecm06(J2000_JD, 0.0))
    matrix.setflags(write=False)
    return matrix


def _code_of(body: Any, name: str) -> int:
    if isinstance(body, CentralBody):
        body = body.name
    if isinstance(body, str):
        for known, code in BODY_CODES.items():
            if body.strip().lower() == known.lower():
                return code
    known_names = ", ".join(BODY_CODES)
    raise DomainError(f"`{name}` must be one of {known_names} (or its deltakit.constants body), got {body!r}")


def _times(t: Any, name: str = "t") -> np.ndarray:
    """TDB seconds of times or dates given as ``name``, checked inside DE421's span."""
    seconds = np.asarray(tdb_seconds(t, name), dtype=float)
    start, stop = EPHEMERIS_SPAN
    outside = (seconds < start) | (seconds > stop)
    if outside.any():
        count = int(np.count_nonzero(outside))
        raise DomainError(
            f"`{name}` must lie within DE421's span, 1899-07-29 to 2053-10-09 TDB: "
            f"{count} of {seconds.size} times lie outside"
        )
    return seconds


def _barycentric(code: int, seconds: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Position (km) and velocity (km/day) of ``code`` from the solar-system barycentre, shape (3, ...)."""
    segments = _kernel()
    position = np.zeros((3, *seconds.shape))
    velocity = np.zeros((3, *seconds.shape))
    days = seconds / 86_400.0
    for link in _chain(code):
        # Two-part Julian date (J2000 + days), so no precision is lost in the sum.
        p, v = segments[link].compute_and_differentiate(J2000_JD, days)
        position += p
        velocity += v
    return position, velocity


def planet_state(body: Any, t: Any, center: Any = "Sun", frame: str = "ecliptic") -> tuple[Any, Any]:
    """Position and velocity of a body relative to another, from DE421.

    Parameters
    ----------
    body : str or CentralBody
        ``"Sun"``, ``"Mercury"``, ``"Venus"``, ``"Earth"``, ``"Moon"``,
        ``"Mars"``, ``"Jupiter"``, ``"Saturn"``, ``"Uranus"``, ``"Neptune"``
        (any case), or the body of :mod:`deltakit.constants`.
    t : array_like, shape (...)
        TDB seconds past J2000 (numbers), or dates (ISO text, datetime,
        numpy.datetime64; read as UTC by :func:`deltakit.epoch`).
    center : str or CentralBody, optional
        The body the state is measured from (default the Sun); ``"Earth"``
        gives the Moon around the Earth.
    frame : {"ecliptic", "icrf"}, optional
        Mean ecliptic and equinox of J2000 (default), or the ICRF (equatorial).

    Returns
    -------
    r : ndarray, shape (..., 3)
        Position, m.
    v : ndarray, shape (..., 3)
        Velocity, m/s.

    Raises
    ------
    DomainError
        An unknown body or frame, or a time outside DE421 (1899-07-29 to 2053-10-09).
    ImportError
        Without the ``planets`` extra.

    Examples
    --------
    Earth about 1 au from the Sun, moving at about 30 km/s, in the ecliptic plane:

    >>> import numpy as np
    >>> from deltakit import planet_state
    >>> from deltakit.units import au, km_per_s
    >>> r, v = planet_state("Earth", "2028-11-10")
    >>> round(float(np.linalg.norm(r) / au), 3), round(float(np.linalg.norm(v) / km_per_s), 1)
    (0.99, 30.2)
    >>> bool(abs(r[2]) < 1e-4 * np.linalg.norm(r))
    True

    Many dates at once, and the Moon around the Earth:

    >>> r, v = planet_state("Moon", np.datetime64("2030-01-01") + np.arange(3), center="Earth")
    >>> r.shape
    (3, 3)
    """
    code = _code_of(body, "body")
    origin = _code_of(center, "center")
    if frame not in FRAMES:
        raise DomainError(f"`frame` must be one of {FRAMES}, got {frame!r}")
    seconds = _times(t)
    r_body, v_body = _barycentric(code, seconds)
    r_origin, v_origin = _barycentric(origin, seconds)
    r = np.moveaxis(r_body - r_origin, 0, -1) * _KM
    v = np.moveaxis(v_body - v_origin, 0, -1) * _KM_PER_DAY
    if frame == "ecliptic":
        rotation = ecliptic_rotation()
        r = r @ rotation.T
        v = v @ rotation.T
    return r, v


def body_name(body: Any, name: str = "body") -> str:
    """The canonical name of a body :func:`planet_state` knows ("mars" -> "Mars")."""
    code = _code_of(body, name)
    return next(known for known, value in BODY_CODES.items() if value == code)


def central_body(body: Any, name: str = "body") -> CentralBody:
    """The :mod:`deltakit.constants` body (mu, radius) of a body name."""
    return BODIES[body_name(body, name)]
