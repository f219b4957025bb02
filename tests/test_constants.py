"""Constants against astropy and published ratios.

astropy.constants carries the IAU 2015 Resolution B3 *nominal* values for the
Sun, Earth and Jupiter: rounded conversion constants, not best estimates. Our
gravitational parameters are best estimates (IERS 2010 for Earth, JPL DE440
for the others), so the comparison tolerance is the rounding of the nominal
value, and for Jupiter the difference is the mass of its moons (our value is
the system's, the nominal one the planet's).
"""

from __future__ import annotations

import math

import pytest
from astropy import constants as const

from deltakit import constants
from deltakit.constants import BODIES, EARTH, G0, JUPITER, MOON, SUN, CentralBody


@pytest.mark.parametrize(
    "ours, reference, rel, why",
    [
        # Nominal GM_earth = 3.986004e14 is the IERS value cut to 7 digits.
        (EARTH.mu, const.GM_earth.value, 2e-7, "nominal value rounded to 7 digits"),
        # Nominal GM_sun = 1.3271244e20, best estimate cut to 8 digits.
        (SUN.mu, const.GM_sun.value, 1e-8, "nominal value rounded to 8 digits"),
        # Nominal R_earth = 6.3781e6 m is the WGS 84 radius rounded to 100 m.
        (EARTH.radius, const.R_earth.value, 1e-5, "nominal value rounded to 100 m"),
        # R_sun and R_jup: we use the nominal values themselves.
        (SUN.radius, const.R_sun.value, 0.0, "the same nominal value"),
        (JUPITER.radius, const.R_jup.value, 0.0, "the same nominal value"),
    ],
)
def test_against_astropy(ours, reference, rel, why):
    assert ours == pytest.approx(reference, rel=rel, abs=0.0), why


def test_jupiter_system_minus_planet_is_the_galilean_moons():
    # Our Jupiter GM is the system value (DE440); astropy's nominal GM_jup
    # (IAU 2015 B3) is the planet alone. The difference must be the moons:
    # GM of Io 5959.9, Europa 3202.7, Ganymede 9887.8, Callisto 7179.3 km^3/s^2
    # (JPL planetary satellite physical parameters; values from memory); the
    # small moons add far less than 1 % of that.
    galilean = (5959.9 + 3202.7 + 9887.8 + 7179.3) * 1e9
    assert JUPITER.mu - const.GM_jup.value == pytest.approx(galilean, rel=0.01)


def test_standard_gravity_is_exact():
    # 3rd CGPM (1901); astropy carries the same defined value.
    assert G0 == 9.80665 == const.g0.value


def test_earth_moon_mass_ratio():
    # IAU 2009 System of Astronomical Constants (Luzum et al. 2011): Moon/Earth
    # mass ratio 1.230 003 71e-2 (value from memory).
    assert EARTH.mu / MOON.mu == pytest.approx(1.0 / 1.23000371e-2, rel=1e-7)


def test_sun_earth_mass_ratio():
    # IAU 2009 System of Astronomical Constants: Sun/Earth mass ratio
    # 332 946.0487 (value from memory); the GMs differ in time scale
    # conventions at the 1e-8 level.
    assert SUN.mu / EARTH.mu == pytest.approx(332946.0487, rel=1e-7)


def test_geostationary_radius_gives_a_sidereal_day():
    # Common practice: the geostationary radius 42 164.17 km gives a period of
    # one sidereal day, 86 164.09 s (IERS Conventions 2010 Earth rotation).
    period = 2.0 * math.pi * math.sqrt(42164.17e3**3 / EARTH.mu)
    assert period == pytest.approx(86164.09, abs=0.05)


def test_every_body_is_cited_and_sane():
    assert list(BODIES) == [
        "Sun",
        "Mercury",
        "Venus",
        "Earth",
        "Moon",
        "Mars",
        "Jupiter",
        "Saturn",
        "Uranus",
        "Neptune",
    ]
    for name, body in BODIES.items():
        assert isinstance(body, CentralBody) and body.name == name
        assert body.mu > 0 and body.radius > 0
        assert "GM" in body.source and "radius" in body.source
        assert getattr(constants, name.upper()) is body
    # Ordering facts of the trade: the Sun dominates, Jupiter is the largest planet.
    planets = [b for b in BODIES.values() if b not in (SUN, MOON)]
    assert max(planets, key=lambda b: b.mu) is JUPITER
    assert all(SUN.mu > 1000 * b.mu for b in planets)


def test_bodies_are_immutable():
    with pytest.raises(AttributeError):
        EARTH.mu = 1.0
    assert "m^3/s^2" in repr(EARTH) and "Earth" in repr(EARTH)
