"""Physical constants and the central bodies, each value with its source.

Units are SI: ``mu`` in m^3/s^2, ``radius`` in m.

Gravitational parameters are the best estimates of the JPL planetary and lunar
ephemeris DE440 (Park, Folkner, Williams and Boggs, "The JPL Planetary and Lunar
Ephemerides DE440 and DE441", Astronomical Journal 161:105, 2021, Table 8),
converted from km^3/s^2; for a planet with moons the value is that of the
system (planet plus moons), which is what a spacecraft far from the moons
feels. Earth uses the IERS Conventions (2010) value, the one geodesy and most
orbit work use. Radii are equatorial radii of the IAU Working Group on
Cartographic Coordinates and Rotational Elements 2015 report (Archinal et al.,
Celestial Mechanics and Dynamical Astronomy 130:22, 2018), mean radius for the
Moon, and the IAU 2015 Resolution B3 nominal radius for the Sun. The digits were
quoted from memory of those tables; ``tests/test_constants.py`` cross-checks the
ones astropy also carries.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "G0",
    "CentralBody",
    "SUN",
    "MERCURY",
    "VENUS",
    "EARTH",
    "MOON",
    "MARS",
    "JUPITER",
    "SATURN",
    "URANUS",
    "NEPTUNE",
    "BODIES",
]

#: Standard acceleration of gravity, m/s^2. Exact by definition (3rd CGPM, 1901;
#: ISO 80000-3), used to turn specific impulse in seconds into exhaust velocity.
G0: float = 9.80665


@dataclass(frozen=True)
class CentralBody:
    """A body that a spacecraft orbits.

    Parameters
    ----------
    name : str
        Display name.
    mu : float
        Gravitational parameter G*M, m^3/s^2.
    radius : float
        Equatorial radius (mean radius for the Moon), m.
    source : str
        Where the two numbers come from.

    Examples
    --------
    >>> from deltakit.constants import EARTH
    >>> round(EARTH.radius + 400e3)
    6778137
    """

    name: str
    mu: float
    radius: float
    source: str

    def __repr__(self) -> str:
        return f"CentralBody({self.name}: mu={self.mu:.10g} m^3/s^2, radius={self.radius:.7g} m)"


_DE440 = "GM: JPL ephemeris DE440 (Park et al. 2021, Table 8)"
_IAU = "radius: IAU WGCCRE 2015 (Archinal et al. 2018)"

SUN = CentralBody(
    "Sun",
    1.32712440041279e20,
    6.957e8,
    "GM: JPL ephemeris DE440 (Park et al. 2021, Table 8); radius: IAU 2015 Resolution B3 nominal",
)
MERCURY = CentralBody("Mercury", 2.2031868551e13, 2.44053e6, f"{_DE440}; {_IAU}")
VENUS = CentralBody("Venus", 3.24858592e14, 6.0518e6, f"{_DE440}; {_IAU}")
EARTH = CentralBody(
    "Earth",
    3.986004418e14,
    6.378137e6,
    "GM: IERS Conventions (2010), Table 1.1; radius: WGS 84 / IERS (2010) equatorial",
)
MOON = CentralBody("Moon", 4.902800118e12, 1.7374e6, f"{_DE440}; radius: IAU WGCCRE 2015 mean radius")
MARS = CentralBody("Mars", 4.2828375816e13, 3.39619e6, f"{_DE440} (system); {_IAU}")
JUPITER = CentralBody("Jupiter", 1.267127641e17, 7.1492e7, f"{_DE440} (system); {_IAU}")
SATURN = CentralBody("Saturn", 3.79405848418e16, 6.0268e7, f"{_DE440} (system); {_IAU}")
URANUS = CentralBody("Uranus", 5.7945564e15, 2.5559e7, f"{_DE440} (system); {_IAU}")
NEPTUNE = CentralBody("Neptune", 6.83652710058e15, 2.4764e7, f"{_DE440} (system); {_IAU}")

#: The bodies by name, in order of distance from the Sun (the Moon after Earth).
BODIES: dict[str, CentralBody] = {
    body.name: body for body in (SUN, MERCURY, VENUS, EARTH, MOON, MARS, JUPITER, SATURN, URANUS, NEPTUNE)
}
