"""Conic against textbook examples, its own invariants and scipy's integration of the motion."""

from __future__ import annotations

import numpy as np
import pytest
from helpers import propagate
from hypothesis import assume, given
from hypothesis import strategies as st

import deltakit as dk
from deltakit import Conic
from deltakit.constants import EARTH

MU_CURTIS = 398600e9  # Curtis uses mu = 398 600 km^3/s^2 and R = 6378 km
MU_VALLADO = 398600.4418e9  # Vallado, 4th ed., EGM-96 value


# ---------------------------------------------------------------------- textbook examples
def test_curtis_example_6_1_angular_momenta():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Example 6.1
    # (values from memory): the 480 x 800 km orbit has h = 52 876 km^2/s, the
    # 480 x 16 000 km transfer ellipse h = 64 690 km^2/s.
    orbit = Conic.from_apsides(6378e3 + 480e3, 6378e3 + 800e3, MU_CURTIS)
    transfer = Conic.from_apsides(6378e3 + 480e3, 6378e3 + 16000e3, MU_CURTIS)
    assert orbit.h == pytest.approx(52876e6, abs=0.5e6)
    assert transfer.h == pytest.approx(64690e6, abs=0.5e6)
    # The perigee burn of that example, 1.7225 km/s, is the speed difference at periapsis.
    assert transfer.speed(0.0) - orbit.speed(0.0) == pytest.approx(1722.5, abs=0.1)


def test_vallado_example_2_5_in_the_orbit_plane():
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.),
    # Example 2-5 (values from memory): r = (6524.834, 6862.875, 6448.296) km,
    # v = (4.901327, 5.533756, -1.976341) km/s give p = 11 067.790 km,
    # a = 36 127.343 km, e = 0.832853 and true anomaly 92.335 deg. We rotate the
    # state into its own orbit plane (x along r) and compare the in-plane elements.
    r = np.array([6524.834, 6862.875, 6448.296]) * 1e3
    v = np.array([4.901327, 5.533756, -1.976341]) * 1e3
    x_axis = r / np.linalg.norm(r)
    y_axis = np.cross(np.cross(r, v), r)
    y_axis /= np.linalg.norm(y_axis)
    r_plane = [np.linalg.norm(r), 0.0]
    conic = Conic.from_state(r_plane, [v @ x_axis, v @ y_axis], MU_VALLADO)
    assert conic.p == pytest.approx(11067.790e3, rel=1e-6)
    assert conic.a == pytest.approx(36127.343e3, rel=1e-6)
    assert conic.e == pytest.approx(0.832853, abs=1e-6)
    assert np.degrees(conic.true_anomaly_at(r_plane)) == pytest.approx(92.335, abs=1e-3)


def test_curtis_example_8_3_departure_hyperbola():
    # Curtis (3rd ed.), Example 8.3 (values from memory): leaving a 300 km
    # circular Earth parking orbit for Mars with vinf = 2.943 km/s; the
    # hyperbola has e = 1.1451, perigee speed 11.32 km/s and the burn from the
    # 7.726 km/s circular speed is 3.590 km/s.
    rp = 6378e3 + 300e3
    hyperbola = Conic.from_vinf(rp, 2943.0, MU_CURTIS)
    assert hyperbola.e == pytest.approx(1.1451, abs=1e-4)
    assert hyperbola.speed(0.0) == pytest.approx(11320.0, abs=10.0)
    assert hyperbola.speed(0.0) - Conic.circular(rp, MU_CURTIS).speed(0.0) == pytest.approx(3590.0, abs=1.0)
    assert hyperbola.vinf == pytest.approx(2943.0, rel=1e-12)


# ---------------------------------------------------------------------- properties per kind
MU = EARTH.mu
RP = 7000e3


@pytest.mark.parametrize(
    "e, expected",
    [
        # Closed forms of the conic sections (Curtis, 3rd ed., Ch. 2; common practice).
        (
            0.0,
            dict(
                a=RP, ra=RP, p=RP, energy=-MU / (2 * RP), period=2 * np.pi * np.sqrt(RP**3 / MU), vinf=np.nan
            ),
        ),
        (
            0.125,
            dict(
                a=8000e3,
                ra=9000e3,
                p=7875e3,
                energy=-MU / (2 * 8000e3),
                period=2 * np.pi * np.sqrt(8000e3**3 / MU),
                vinf=np.nan,
            ),
        ),
        (1.0, dict(a=np.inf, ra=np.inf, p=2 * RP, energy=0.0, period=np.inf, vinf=0.0)),
        (2.0, dict(a=-RP, ra=np.inf, p=3 * RP, energy=MU / (2 * RP), period=np.inf, vinf=np.sqrt(MU / RP))),
    ],
)
def test_properties_of_each_kind(e, expected):
    conic = Conic(RP, e, MU)
    for name, value in expected.items():
        got = getattr(conic, name)
        assert isinstance(got, np.floating), name
        if np.isnan(value):
            assert np.isnan(got), name
        else:
            assert got == pytest.approx(value, rel=1e-14, abs=1e-9), name
    assert conic.h == pytest.approx(np.sqrt(MU * expected["p"]), rel=1e-15)


def test_hyperbola_asymptote_and_unreachable_points():
    hyperbola = Conic(RP, 2.0, MU)
    assert hyperbola.true_anomaly_limit == pytest.approx(np.radians(120.0), rel=1e-14)
    nu = np.radians([0.0, 119.0, 121.0, 180.0, -150.0])
    radius = hyperbola.radius(nu)
    assert np.all(np.isfinite(radius[:2])) and np.all(np.isnan(radius[2:]))
    assert np.all(np.isnan(hyperbola.speed(nu)[2:])) and np.all(np.isnan(hyperbola.state(nu)[0][2:]))
    assert Conic(RP, 0.5, MU).true_anomaly_limit == np.pi


def test_parabola_speed_is_escape_speed_everywhere():
    parabola = Conic(RP, 1.0, MU)
    nu = np.linspace(-3.0, 3.0, 13)
    np.testing.assert_allclose(parabola.speed(nu), dk.escape_speed(parabola.radius(nu), MU), rtol=1e-14)


# ---------------------------------------------------------------------- invariants (hypothesis)
conics = st.tuples(
    st.floats(1e5, 1e11),  # rp
    st.one_of(st.floats(0.0, 0.99), st.just(1.0), st.floats(1.01, 5.0)),  # e
    st.floats(1e10, 1e20),  # mu
    st.floats(-np.pi, np.pi),  # argp
    st.floats(-0.95, 0.95),  # nu as a fraction of the reachable range
)


@given(conics)
def test_state_round_trip_conserves_h_and_energy(case):
    rp, e, mu, argp, fraction = case
    conic = Conic(rp, e, mu, argp)
    nu = fraction * conic.true_anomaly_limit
    r_vec, v_vec = conic.state(nu)
    # Angular momentum and energy from the state equal the conic's.
    h = r_vec[0] * v_vec[1] - r_vec[1] * v_vec[0]
    assert h == pytest.approx(conic.h, rel=1e-10)
    r, v = np.hypot(*r_vec), np.hypot(*v_vec)
    scale = mu / r
    assert dk.specific_energy(r, v, mu) == pytest.approx(conic.energy, abs=1e-10 * scale)
    again = Conic.from_state(r_vec, v_vec, mu)
    assert again.rp == pytest.approx(rp, rel=1e-8)
    assert again.e == pytest.approx(e, abs=1e-8)
    assert again.h == pytest.approx(conic.h, rel=1e-10)
    if e > 1e-3:  # the periapsis direction of a near-circle is ill-defined
        assert np.cos(again.argp - argp) == pytest.approx(1.0, abs=1e-8)
        assert np.cos(again.true_anomaly_at(r_vec) - nu) == pytest.approx(1.0, abs=1e-8)


@given(conics)
def test_speed_matches_vis_viva_and_velocity_components(case):
    rp, e, mu, argp, fraction = case
    conic = Conic(rp, e, mu, argp)
    nu = fraction * conic.true_anomaly_limit
    r = conic.radius(nu)
    assume(np.isfinite(r))
    speed = conic.speed(nu)
    assert speed == pytest.approx(dk.vis_viva(r, conic.a, mu), rel=1e-9)
    radial, transverse = conic.velocity(nu)
    assert np.hypot(radial, transverse) == pytest.approx(speed, rel=1e-12)
    assert transverse * r == pytest.approx(conic.h, rel=1e-12)  # h = r v_transverse
    assert conic.flight_path_angle(nu) == pytest.approx(np.arctan2(radial, transverse), abs=1e-12)


def _integrate(conic: Conic, nu0: float, duration: float, samples: int):
    r_vec, v_vec = conic.state(nu0)
    t = np.linspace(0.0, duration, samples)
    sol = propagate(r_vec, v_vec, float(conic.mu), duration, t_eval=t, rtol=1e-11, atol=1e-6)
    return sol.y[:2].T, sol.y[2:].T


@pytest.mark.parametrize("rp, ra", [(EARTH.radius + 250e3, 42164e3), (7000e3, 7000e3), (8000e3, 20000e3)])
def test_period_against_integration(rp, ra):
    # Independent route: scipy's DOP853 (tests/helpers.py) integrates the two-body equations
    # for one period; the orbit must close, pass apoapsis at half the period
    # and stay on the conic all along.
    conic = Conic.from_apsides(rp, ra, EARTH.mu, argp=0.7)
    positions, velocities = _integrate(conic, 0.0, float(conic.period), 201)
    start, end = positions[0], positions[-1]
    assert np.hypot(*(end - start)) < 1e-6 * rp
    assert np.hypot(*positions[100]) == pytest.approx(ra, rel=1e-8)
    nu = conic.true_anomaly_at(positions)
    np.testing.assert_allclose(conic.radius(nu), np.hypot(positions[:, 0], positions[:, 1]), rtol=1e-8)
    np.testing.assert_allclose(conic.speed(nu), np.hypot(velocities[:, 0], velocities[:, 1]), rtol=1e-8)


def test_hyperbola_against_integration():
    # Along an integrated hyperbolic path the state stays on the conic and the
    # speed tends to vinf: v^2 = vinf^2 + 2 mu / r.
    conic = Conic.from_vinf(EARTH.radius + 500e3, 4000.0, EARTH.mu, argp=-1.0)
    positions, velocities = _integrate(conic, -1.5, 2e5, 101)
    r = np.hypot(positions[:, 0], positions[:, 1])
    v = np.hypot(velocities[:, 0], velocities[:, 1])
    nu = conic.true_anomaly_at(positions)
    np.testing.assert_allclose(conic.radius(nu), r, rtol=1e-8)
    np.testing.assert_allclose(v**2 - 2 * EARTH.mu / r, conic.vinf**2, rtol=1e-7)
    assert np.all(np.abs(nu) < conic.true_anomaly_limit)


# ---------------------------------------------------------------------- arrays
def test_array_conic_equals_loop_of_scalar_conics():
    rp = np.array([7000e3, 6678e3, 1e9, 3.4e6])
    e = np.array([0.0, 0.7, 1.0, 2.5])
    mu = np.array([EARTH.mu, EARTH.mu, 1.3e20, 4.3e13])
    argp = np.array([0.0, 1.0, -2.0, 3.0])
    nu = np.array([0.3, 2.0, -1.0, 1.5])
    many = Conic(rp, e, mu, argp)
    assert many.shape == (4,)
    for name in ("a", "ra", "p", "energy", "h", "period", "vinf", "true_anomaly_limit"):
        loop = [getattr(Conic(rp[i], e[i], mu[i], argp[i]), name) for i in range(4)]
        assert all(isinstance(x, np.floating) for x in loop), name
        np.testing.assert_array_equal(getattr(many, name), loop, err_msg=name)
    for name in ("radius", "speed", "flight_path_angle"):
        loop = [getattr(Conic(rp[i], e[i], mu[i], argp[i]), name)(nu[i]) for i in range(4)]
        assert all(isinstance(x, np.floating) for x in loop), name
        np.testing.assert_array_equal(getattr(many, name)(nu), loop, err_msg=name)
    r_vec, v_vec = many.state(nu)
    assert r_vec.shape == v_vec.shape == (4, 2)
    for i in range(4):
        single_r, single_v = Conic(rp[i], e[i], mu[i], argp[i]).state(nu[i])
        np.testing.assert_array_equal(r_vec[i], single_r)
        np.testing.assert_array_equal(v_vec[i], single_v)
        assert many[i].e == e[i]
    # One conic against many anomalies broadcasts like a ufunc.
    assert Conic(RP, 0.3, MU).radius(np.zeros((2, 3))).shape == (2, 3)


def test_elements_are_read_only():
    conic = Conic(np.array([7e6, 8e6]), 0.1, MU)
    with pytest.raises(AttributeError):
        conic.rp = 1.0
    with pytest.raises(ValueError):
        conic.rp[0] = 1.0
    assert "m^3/s^2" in repr(conic)


def test_clockwise_or_radial_state_gives_nan_only_there():
    r_vec = np.array([[7000e3, 0.0], [7000e3, 0.0], [7000e3, 0.0]])
    v_vec = np.array([[0.0, 7500.0], [0.0, -7500.0], [100.0, 0.0]])
    conic = Conic.from_state(r_vec, v_vec, MU)
    assert np.isfinite(conic.e[0]) and np.all(np.isnan(conic.e[1:]))
    assert conic.rp[0] == Conic.from_state(r_vec[0], v_vec[0], MU).rp


# ---------------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "call, name",
    [
        (lambda: Conic(-1.0, 0.1, MU), "rp"),
        (lambda: Conic(RP, -0.1, MU), "e"),
        (lambda: Conic(RP, 0.1, 0.0), "mu"),
        (lambda: Conic(RP, 0.1, MU, np.inf), "argp"),
        (lambda: Conic.from_apsides(9000e3, 7000e3, MU), "ra"),
        (lambda: Conic.circular(0.0, MU), "r"),
        (lambda: Conic.from_vinf(RP, -1.0, MU), "vinf"),
        (lambda: Conic.from_state([0.0, 0.0], [1.0, 1.0], MU), "r_vec"),
        (lambda: Conic.from_state([1.0, 2.0, 3.0], [1.0, 1.0], MU), "r_vec"),
        (lambda: Conic(RP, 0.1, MU).radius(np.nan), "nu"),
    ],
)
def test_bad_input_names_the_parameter(call, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`"):
        call()
