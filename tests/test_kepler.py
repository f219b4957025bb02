"""Kepler's equation and time of flight, checked against textbooks and scipy.

Independent routes used here: scipy.optimize.brentq on Kepler's equation
written with plain np.sin / np.sinh, and scipy.integrate.quad of the
angular-momentum relation dt/dnu = r^2 / h (no Kepler equation at all).
"""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import quad
from scipy.optimize import brentq

import deltakit as dk
from deltakit import (
    Conic,
    DomainError,
    eccentric_to_mean,
    hyperbolic_to_mean,
    mean_anomaly,
    mean_to_eccentric,
    mean_to_hyperbolic,
    propagate,
    time_of_flight,
    true_anomaly_from_mean,
)
from deltakit.kepler import mean_motion

MU_CURTIS = 398600e9  # m^3/s^2: the Earth value used throughout Curtis's examples


def _round_trip_tolerance(M):
    # rounding of E itself is eps * |E|, so the bound scales with |M| for many turns
    return 1e-12 * np.maximum(1.0, np.abs(M))


# ------------------------------------------------------------------ elliptic solver
@given(
    M=st.floats(-1e4, 1e4, allow_nan=False),
    e=st.floats(0.0, 0.999),
)
def test_elliptic_round_trip_hypothesis(M, e):
    E = mean_to_eccentric(M, e)
    assert abs(eccentric_to_mean(E, e) - M) <= _round_trip_tolerance(M)
    # the plain form of Kepler's equation holds too (absolute, a few eps of |E|)
    assert abs(E - e * np.sin(E) - M) <= 1e-12 * max(1.0, abs(M))


def test_elliptic_round_trip_grid_near_parabolic_and_tiny():
    e = np.array([0.0, 1e-12, 1e-6, 0.1, 0.5, 0.9, 0.99, 0.999, 0.999999, 1 - 1e-12])[:, None]
    M = np.concatenate(
        [
            [0.0, 1e-300, 1e-15, 1e-9, 1e-5, 0.01, 0.3, 1.0, 3.0, np.pi, -np.pi],
            -np.geomspace(1e-12, 1e6, 40),
            np.geomspace(1e-12, 1e6, 40),
        ]
    )[None, :]
    E = mean_to_eccentric(M, e)
    assert E.shape == (e.size, M.size)
    back = eccentric_to_mean(E, e)
    assert np.all(np.abs(back - M) <= _round_trip_tolerance(M))
    # E - M is e sin E, so within e of M and of the same sign
    assert np.all(np.abs(E - M) <= e + 1e-12 * np.maximum(1, np.abs(M)))


def test_elliptic_matches_brentq_and_mpmath():
    # brentq on the plain equation is limited by its own cancellation near e = 1,
    # so its bound scales with 1 / (1 - e cos E); mpmath at 40 digits is exact here.
    for e in (0.0, 0.3, 0.97, 0.9999):
        for M in (1e-6, 0.2, 2.5, np.pi - 1e-9):
            E = mean_to_eccentric(M, e)
            reference = brentq(lambda x, e=e, M=M: x - e * np.sin(x) - M, 0.0, np.pi, xtol=1e-15, rtol=1e-15)
            slope = 1.0 - e * np.cos(reference)
            assert E == pytest.approx(reference, rel=1e-14 / slope, abs=1e-15)
            with mpmath.workdps(40):
                exact = mpmath.findroot(lambda x, e=e, M=M: x - e * mpmath.sin(x) - M, reference)
            assert E == pytest.approx(float(exact), rel=2e-15, abs=0.0)


def test_elliptic_keeps_turns_and_is_odd():
    e = 0.6
    E = mean_to_eccentric(1.0, e)
    assert mean_to_eccentric(1.0 + 6 * np.pi, e) == pytest.approx(E + 6 * np.pi, rel=1e-14)
    assert mean_to_eccentric(-1.0, e) == pytest.approx(-E, rel=1e-15)
    # E = pi at M = pi (apoapsis), either way round
    assert mean_to_eccentric(np.pi, e) == pytest.approx(np.pi, rel=1e-15)


def test_vallado_example_2_1():
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 2-1,
    # quoted from memory: M = 235.4 deg, e = 0.4 -> E = 220.512074767522 deg.
    E = mean_to_eccentric(np.radians(235.4), 0.4)
    assert np.degrees(E) % 360.0 == pytest.approx(220.512074767522, abs=1e-9)


# ------------------------------------------------------------------ hyperbolic solver
@given(
    M=st.floats(-1e6, 1e6, allow_nan=False),
    e=st.floats(1.0 + 1e-9, 10.0),
)
def test_hyperbolic_round_trip_hypothesis(M, e):
    H = mean_to_hyperbolic(M, e)
    assert abs(hyperbolic_to_mean(H, e) - M) <= _round_trip_tolerance(M)


def test_hyperbolic_round_trip_grid():
    e = np.array([1 + 1e-12, 1 + 1e-6, 1.001, 1.1, 1.5, 2.0, 5.0, 10.0, 100.0])[:, None]
    M = np.concatenate([[0.0, 1e-300], np.geomspace(1e-12, 1e8, 60), -np.geomspace(1e-12, 1e8, 60)])[None, :]
    H = mean_to_hyperbolic(M, e)
    assert np.all(np.isfinite(H))
    assert np.all(np.abs(hyperbolic_to_mean(H, e) - M) <= _round_trip_tolerance(M))


def test_hyperbolic_matches_brentq_and_mpmath():
    for e in (1.0001, 1.5, 4.0, 10.0):
        for M in (1e-5, 0.7, 40.0, 3e4):
            H = mean_to_hyperbolic(M, e)
            reference = brentq(lambda x, e=e, M=M: e * np.sinh(x) - x - M, 0.0, 30.0, xtol=1e-15, rtol=1e-15)
            slope = e * np.cosh(reference) - 1.0
            assert H == pytest.approx(reference, rel=1e-14 * max(1.0, M) / slope / reference + 1e-14, abs=0.0)
            with mpmath.workdps(40):
                exact = mpmath.findroot(lambda x, e=e, M=M: e * mpmath.sinh(x) - x - M, reference)
            assert H == pytest.approx(float(exact), rel=2e-15, abs=0.0)


def test_vallado_example_2_3():
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 2-3,
    # quoted from memory: M = 235.4 deg (used as 4.108505 rad), e = 2.4 -> H = 1.601376144.
    assert mean_to_hyperbolic(np.radians(235.4), 2.4) == pytest.approx(1.601376144, abs=2e-9)


# ------------------------------------------------------------------ on a conic
def test_curtis_example_3_1_and_3_2():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Examples 3.1 and 3.2,
    # quoted from memory: rp = 9600 km, ra = 21000 km; period 18834 s;
    # perigee to 120 deg: E = 1.7281 rad, M = 1.3601 rad, t = 4077 s;
    # three hours after perigee: M = 3.6029 rad, E = 3.4794 rad, nu = 193.2 deg.
    c = Conic.from_apsides(9600e3, 21000e3, MU_CURTIS)
    assert c.period == pytest.approx(18834, abs=1)
    assert mean_anomaly(c, np.radians(120.0)) == pytest.approx(1.3601, abs=1e-4)
    assert time_of_flight(c, 0.0, np.radians(120.0)) == pytest.approx(4077, abs=1)
    M = mean_motion(c) * 3 * 3600.0
    assert M == pytest.approx(3.6029, abs=1e-4)
    assert mean_to_eccentric(M, c.e) == pytest.approx(3.4794, abs=1e-4)
    assert np.degrees(propagate(c, 0.0, 3 * 3600.0)) == pytest.approx(193.2, abs=0.05)


def test_curtis_example_3_5_hyperbolic():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Example 3.5,
    # quoted from memory: perigee speed 15 km/s at 300 km altitude (rp = 6678 km):
    # e = 2.7696; at nu = 100 deg r = 48497 km, M = 11.279 rad, t = 4141 s;
    # three hours later M = 40.690 rad, F = 3.4631, nu = 107.78 deg, r = 163180 km, v = 10.51 km/s.
    rp = 6678e3
    vinf = np.sqrt(15000.0**2 - 2 * MU_CURTIS / rp)
    c = Conic.from_vinf(rp, vinf, MU_CURTIS)
    assert c.e == pytest.approx(2.7696, abs=1e-4)
    nu1 = np.radians(100.0)
    assert c.radius(nu1) == pytest.approx(48497e3, rel=1e-4)
    assert mean_anomaly(c, nu1) == pytest.approx(11.279, abs=1e-3)
    assert time_of_flight(c, 0.0, nu1) == pytest.approx(4141, abs=1)
    nu2 = propagate(c, nu1, 3 * 3600.0)
    assert mean_anomaly(c, nu2) == pytest.approx(40.690, abs=1e-3)
    assert np.degrees(nu2) == pytest.approx(107.78, abs=0.01)
    assert c.radius(nu2) == pytest.approx(163180e3, rel=1e-4)
    assert c.speed(nu2) == pytest.approx(10510, abs=10)


def _quad_time(c, nu1, nu2):
    """Time from nu1 to nu2 by integrating dt/dnu = r^2 / h (no Kepler equation)."""
    return quad(lambda nu: c.radius(nu) ** 2 / c.h, nu1, nu2, epsabs=0, epsrel=1e-13, limit=200)[0]


@pytest.mark.parametrize(
    "e, nu1, nu2",
    [
        (0.0, 0.3, 2.0),
        (0.4, -2.5, 2.9),
        (0.97, -0.2, 3.0),
        (1 - 1e-7, -1.0, 2.0),
        (1.0, -1.5, 2.5),
        (1 + 1e-7, 0.5, 2.5),
        (1.3, -1.2, 1.9),
        (6.0, -1.6, 1.7),
    ],
)
def test_time_of_flight_matches_quadrature(e, nu1, nu2):
    c = Conic(7000e3, e, 3.986004418e14)
    assert time_of_flight(c, nu1, nu2) == pytest.approx(_quad_time(c, nu1, nu2), rel=1e-9)


def test_parabola_barker():
    # Barker's equation in its textbook form, t = 0.5 sqrt(p^3/mu) (D + D^3/3)
    # (Curtis, Orbital Mechanics for Engineering Students, 3rd ed., Section 3.5).
    rp, mu = 8000e3, 3.986004418e14
    c = Conic(rp, 1.0, mu)
    nu = np.array([-2.0, 0.3, 1.5, 3.0])
    D = np.tan(nu / 2)
    expected = 0.5 * np.sqrt((2 * rp) ** 3 / mu) * (D + D**3 / 3)
    np.testing.assert_allclose(time_of_flight(c, 0.0, nu[1:]), expected[1:], rtol=1e-13)
    np.testing.assert_allclose(propagate(c, 0.0, expected), nu, rtol=1e-12)


def test_time_is_continuous_through_parabola():
    nu = np.array([0.5, 2.0, 2.8])
    times = [time_of_flight(Conic(7000e3, e, 3.986e14), -0.5, nu) for e in (1 - 1e-9, 1.0, 1 + 1e-9)]
    np.testing.assert_allclose(times[0], times[1], rtol=1e-7)
    np.testing.assert_allclose(times[2], times[1], rtol=1e-7)


def test_time_of_flight_is_forward():
    ellipse = Conic(7000e3, 0.3, 3.986e14)
    a, b = 2.0, -2.5
    # going round once: a -> b -> a is one period, and 300 deg -> 10 deg passes periapsis
    assert time_of_flight(ellipse, a, b) + time_of_flight(ellipse, b, a) == pytest.approx(
        ellipse.period, rel=1e-13
    )
    assert time_of_flight(ellipse, np.radians(300), np.radians(10)) == pytest.approx(
        time_of_flight(ellipse, np.radians(-60), np.radians(10)), rel=1e-13
    )
    assert time_of_flight(ellipse, 1.0, 1.0) == 0.0
    assert time_of_flight(ellipse, 1.0 + 2 * np.pi, 1.0) == pytest.approx(0.0, abs=1e-6)
    hyperbola = Conic(7000e3, 1.5, 3.986e14)
    assert np.isnan(time_of_flight(hyperbola, 1.0, -1.0))
    assert np.isnan(time_of_flight(hyperbola, 0.0, 3.0))  # beyond the asymptote (2.30 rad)


@given(
    e=st.one_of(st.floats(0.0, 0.999), st.floats(1.0 + 1e-6, 10.0)),
    nu=st.floats(-1.5, 1.5),
    dt=st.floats(-2e5, 2e5),
)
def test_propagate_round_trip(e, nu, dt):
    c = Conic(7000e3, e, 3.986004418e14)
    there = propagate(c, nu, dt)
    back = propagate(c, there, -dt)
    assert back == pytest.approx(nu, abs=1e-9)
    # and the time forward agrees with dt (for the ellipse, modulo a period)
    if dt >= 0:
        expected = dt % c.period if e < 1 else dt
        tof = time_of_flight(c, nu, there)
        assert tof == pytest.approx(expected, rel=1e-9, abs=1e-6) or (
            e < 1 and abs(tof - expected) == pytest.approx(c.period, rel=1e-9)
        )


def test_propagate_counts_turns_and_goes_back():
    c = Conic.from_apsides(7000e3, 30000e3, 3.986e14)
    assert propagate(c, 0.0, 2.5 * c.period) == pytest.approx(5 * np.pi, rel=1e-12)
    assert propagate(c, 0.0, -0.5 * c.period) == pytest.approx(-np.pi, rel=1e-12)
    nu = np.linspace(-3 * np.pi, 3 * np.pi, 13)
    np.testing.assert_allclose(true_anomaly_from_mean(c, mean_anomaly(c, nu)), nu, atol=1e-12)


def test_broadcasting_and_scalars():
    c = Conic(7000e3, np.array([0.1, 0.5, 1.0, 2.0]), 3.986e14)
    nu = np.linspace(-1, 1, 3)[:, None]
    assert mean_anomaly(c, nu).shape == (3, 4)
    assert propagate(c, nu, 100.0).shape == (3, 4)
    assert time_of_flight(c, 0.0, nu).shape == (3, 4)
    assert isinstance(mean_to_eccentric(0.5, 0.1), np.floating)
    assert isinstance(mean_to_hyperbolic(0.5, 1.1), np.floating)
    assert isinstance(time_of_flight(Conic(7000e3, 0.1, 3.986e14), 0.0, 1.0), np.floating)
    assert dk.propagate is propagate


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: mean_to_eccentric(1.0, 1.0), r"`e` must be < 1"),
        (lambda: mean_to_eccentric([1.0, np.nan], 0.5), r"`M` must be finite"),
        (lambda: mean_to_eccentric(1.0, -0.1), r"`e` must be >= 0"),
        (lambda: mean_to_hyperbolic(1.0, 1.0), r"`e` must be > 1"),
        (lambda: hyperbolic_to_mean(np.inf, 2.0), r"`H` must be finite"),
        (lambda: propagate(Conic(7000e3, 0.1, 3.986e14), 0.0, np.nan), r"`dt` must be finite"),
        (lambda: time_of_flight(Conic(7000e3, 0.1, 3.986e14), np.inf, 0.0), r"`nu1` must be finite"),
    ],
)
def test_bad_input_names_the_parameter(call, match):
    with pytest.raises(DomainError, match=match):
        call()


def test_a_conic_of_the_wrong_type_is_a_type_error():
    with pytest.raises(TypeError, match=r"`conic` must be a deltakit.Conic, not str"):
        mean_anomaly("not a conic", 1.0)


@pytest.mark.parametrize("E", [1e-6, 1e-3, 0.05, 0.5, 0.99, 1.01, 2.0])
def test_mean_anomaly_keeps_its_digits_near_parabolic(E):
    # M = E - e sin E for e near 1 and small E is a difference of nearly equal
    # numbers; deltakit evaluates it without cancellation. mpmath at 50 digits is exact.
    for e in (0.999999, 1 - 1e-12):
        with mpmath.workdps(50):
            exact = float(mpmath.mpf(E) - mpmath.mpf(e) * mpmath.sin(E))
        assert eccentric_to_mean(E, e) == pytest.approx(exact, rel=1e-14, abs=0.0)
    for e in (1.000001, 1 + 1e-12):
        with mpmath.workdps(50):
            exact = float(mpmath.mpf(e) * mpmath.sinh(E) - mpmath.mpf(E))
        assert hyperbolic_to_mean(E, e) == pytest.approx(exact, rel=1e-14, abs=0.0)
