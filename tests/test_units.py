"""deltakit.units: the one home of display scales, and quantities read in SI.

A Quantity's bare number must never be read in the wrong unit: 7000 km is
7e6 m, never 7000 m (a silent error of a factor of 1000).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import deltakit as dk
from deltakit import units
from deltakit.constants import EARTH

u = pytest.importorskip("astropy.units")
pint = pytest.importorskip("pint")
ureg = pint.UnitRegistry()


def test_scales_are_the_si_size_of_one_unit():
    # Definitions (SI brochure, 9th edition; IAU 2012 Resolution B2 for the au).
    assert units.km == 1000.0
    assert units.deg == math.pi / 180.0
    assert units.hour == 3600.0 and units.day == 86400.0
    assert units.year == 365.25 * 86400.0
    assert units.au == 149_597_870_700.0
    assert units.km2_per_s2 == 1.0e6
    assert 5 * units.percent == 0.05


@pytest.mark.parametrize(
    "make",
    [lambda: 7000.0 * u.km, lambda: 7000.0 * ureg.km],
    ids=["astropy", "pint"],
)
def test_a_length_quantity_is_read_in_metres(make):
    # circular speed at 7000 km from Earth's centre, the same call in plain SI as reference
    assert dk.circular_speed(make(), EARTH.mu) == dk.circular_speed(7.0e6, EARTH.mu)


def test_mu_angle_and_array_quantities_convert():
    mu = EARTH.mu / 1e9 * u.km**3 / u.s**2
    assert dk.circular_speed(7.0e6, mu) == pytest.approx(dk.circular_speed(7.0e6, EARTH.mu), rel=1e-15)
    radii = np.array([7000.0, 8000.0]) * u.km
    np.testing.assert_array_equal(dk.escape_speed(radii, EARTH.mu), dk.escape_speed([7e6, 8e6], EARTH.mu))
    assert dk.plane_change(7500.0, 30 * u.deg) == pytest.approx(dk.plane_change(7500.0, math.radians(30)))
    assert dk.plane_change(7500.0, 30 * ureg.deg) == pytest.approx(dk.plane_change(7500.0, math.radians(30)))


@pytest.mark.parametrize(
    "quantity, name",
    [(3.0 * u.s, "r"), (3.0 * ureg.s, "r"), (7000 * u.km, "mu")],
)
def test_a_quantity_of_the_wrong_dimension_is_refused_naming_the_parameter(quantity, name):
    kwargs = {"r": 7e6, "mu": EARTH.mu, name: quantity}
    with pytest.raises(dk.DomainError, match=rf"`{name}` must be in m"):
        dk.circular_speed(**kwargs)


def test_a_list_of_quantities_is_converted_element_by_element():
    assert np.allclose(dk.escape_speed([7000 * u.km, 8e6], EARTH.mu), dk.escape_speed([7e6, 8e6], EARTH.mu))


def test_a_dimensional_quantity_where_a_pure_number_belongs_is_refused():
    with pytest.raises(dk.DomainError, match=r"`e` must be a pure number"):
        dk.Conic(7e6, 0.1 * u.m, EARTH.mu)
