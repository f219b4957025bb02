"""Two-body relations against handbook values and scipy's integration of the motion."""

from __future__ import annotations

import numpy as np
import pytest
from helpers import propagate
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit.constants import EARTH, JUPITER, MARS, MOON

radii = st.floats(1e5, 1e12)
mus = st.floats(1e9, 1e21)


def test_circular_speed_low_earth_orbit():
    # Common practice: a 400 km circular Earth orbit moves at about 7.67 km/s
    # with a period of about 92.6 minutes.
    r = EARTH.radius + 400e3
    v = dk.circular_speed(r, EARTH.mu)
    assert v == pytest.approx(7670.0, abs=5.0)
    assert 2 * np.pi * r / v / 60 == pytest.approx(92.6, abs=0.1)


def test_circular_speed_curtis_example_6_1():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Example 6.1
    # (from memory): circular orbit of 16 000 km altitude, mu = 398 600 km^3/s^2,
    # R = 6378 km: speed 4.2204 km/s.
    assert dk.circular_speed(22378e3, 398600e9) == pytest.approx(4220.4, abs=0.05)


@pytest.mark.parametrize(
    "body, expected",
    [
        # NASA GSFC planetary fact sheets, escape velocity (values from memory);
        # fact sheets use volumetric mean radii, we use equatorial (mean for the
        # Moon), so allow 0.5 %.
        (EARTH, 11186.0),
        (MOON, 2380.0),
        (MARS, 5030.0),
        (JUPITER, 59500.0),
    ],
)
def test_escape_speed_at_the_surface(body, expected):
    assert dk.escape_speed(body.radius, body.mu) == pytest.approx(expected, rel=5e-3)


@given(r=radii, mu=mus)
def test_escape_is_sqrt2_circular_and_zero_energy(r, mu):
    # Common practice: escape speed is sqrt(2) times circular speed at the same radius.
    assert dk.escape_speed(r, mu) == pytest.approx(np.sqrt(2.0) * dk.circular_speed(r, mu), rel=1e-14)
    assert dk.vis_viva(r, np.inf, mu) == pytest.approx(dk.escape_speed(r, mu), rel=1e-14)
    assert dk.vis_viva(r, r, mu) == pytest.approx(dk.circular_speed(r, mu), rel=1e-14)
    energy = dk.specific_energy(r, dk.circular_speed(r, mu), mu)
    assert energy == pytest.approx(-0.5 * mu / r, rel=1e-12)


@given(r=radii, mu=mus, vinf=st.floats(1.0, 5e4))
def test_vis_viva_on_a_hyperbola(r, mu, vinf):
    # a = -mu / vinf^2 for a hyperbola; vis-viva then gives v^2 = vinf^2 + 2 mu / r
    # (Curtis, Orbital Mechanics for Engineering Students, 3rd ed., Sec. 2.9).
    v = dk.vis_viva(r, -mu / vinf**2, mu)
    assert v == pytest.approx(np.sqrt(vinf**2 + 2 * mu / r), rel=1e-12)
    # C3 = 2 * specific energy = vinf^2 (common practice).
    assert 2 * dk.specific_energy(r, v, mu) == pytest.approx(vinf**2, rel=1e-6, abs=1e-9 * mu / r)


def test_vis_viva_along_an_integrated_orbit():
    # Independent route: integrate the two-body equations with scipy's DOP853 (tests/helpers.py)
    # and compare the speed everywhere along the path with vis-viva.
    mu, rp, ra = EARTH.mu, EARTH.radius + 300e3, 30000e3
    a = 0.5 * (rp + ra)
    vp = np.sqrt(mu * (2 / rp - 1 / a))

    period = 2 * np.pi * np.sqrt(a**3 / mu)
    sol = propagate([rp, 0.0], [0.0, vp], mu, period, rtol=1e-11, atol=1e-6, dense_output=True)
    t = np.linspace(0, period, 401)  # sample 200 is half a period: apoapsis
    x, y, vx, vy = sol.sol(t)
    r = np.hypot(x, y)
    np.testing.assert_allclose(np.hypot(vx, vy), dk.vis_viva(r, a, mu), rtol=1e-8)
    np.testing.assert_allclose(dk.specific_energy(r, np.hypot(vx, vy), mu), -mu / (2 * a), rtol=1e-8)
    assert r[200] == pytest.approx(ra, rel=1e-8)
    assert np.hypot(x[-1] - rp, y[-1]) < 1e-6 * rp  # back where it started after one period


def test_vis_viva_outside_an_ellipse_is_nan():
    # r > 2a on an ellipse: no real speed, an infeasible outcome, NaN only there.
    v = dk.vis_viva([7000e3, 15000e3, 9000e3], 7000e3, EARTH.mu)
    assert np.isnan(v[1]) and np.all(np.isfinite(v[[0, 2]]))
    assert v[0] == dk.vis_viva(7000e3, 7000e3, EARTH.mu)


CASES = {
    "circular_speed": (
        dk.circular_speed,
        [np.array([7e6, 4e7, 1e11]), np.array([EARTH.mu, EARTH.mu, 1.3e20])],
    ),
    "escape_speed": (dk.escape_speed, [np.array([7e6, 4e7, 1e11]), np.array([EARTH.mu, 4e13, 1.3e20])]),
    "vis_viva": (
        dk.vis_viva,
        [np.array([7e6, 4e7, 9e6]), np.array([8e6, -2e7, np.inf]), np.array([EARTH.mu] * 3)],
    ),
    "specific_energy": (
        dk.specific_energy,
        [np.array([7e6, 4e7, 9e6]), np.array([7e3, 0.0, 1.2e4]), np.array([EARTH.mu] * 3)],
    ),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_array_equals_loop_of_scalars(name):
    function, args = CASES[name]
    together = function(*args)
    loop = [function(*(a[i] for a in args)) for i in range(3)]
    assert all(isinstance(x, np.floating) for x in loop)
    np.testing.assert_array_equal(together, loop)
    # Broadcasting like a ufunc: a column against a row.
    grid = function(*(a[:, None] if k == 0 else a[None, :] for k, a in enumerate(args)))
    assert grid.shape == (3, 3)
    np.testing.assert_array_equal(np.diagonal(grid), together)


@pytest.mark.parametrize(
    "call, name",
    [
        (lambda: dk.circular_speed(-1.0, EARTH.mu), "r"),
        (lambda: dk.circular_speed(7e6, 0.0), "mu"),
        (lambda: dk.escape_speed(7e6, -EARTH.mu), "mu"),
        (lambda: dk.vis_viva(7e6, 0.0, EARTH.mu), "a"),
        (lambda: dk.vis_viva(7e6, np.nan, EARTH.mu), "a"),
        (lambda: dk.specific_energy(7e6, -1.0, EARTH.mu), "v"),
        (lambda: dk.specific_energy(np.inf, 1.0, EARTH.mu), "r"),
    ],
)
def test_bad_input_names_the_parameter(call, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`"):
        call()
