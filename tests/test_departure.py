"""Escape, capture and powered flyby against textbook examples and integration."""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
from _rounding import assert_same_to_rounding
from helpers import distance_event, propagate
from hypothesis import given
from hypothesis import strategies as st

from deltakit import Conic, DomainError, Flyby, capture_burn, energy_gain, escape_burn, powered_flyby
from deltakit.constants import EARTH, JUPITER, MARS, MOON

radii = st.floats(1e6, 1e8)
excess = st.floats(0.0, 20000.0)
gms = st.floats(1e12, 2e17)


# ---------------------------------------------------------------- textbook examples
def test_escape_from_parking_orbit_curtis_earth_to_mars():
    # Curtis, Orbital Mechanics for Engineering Students, Example 8.3 (from
    # memory): leaving a 300 km circular Earth orbit (R = 6378 km,
    # mu = 398 600 km^3/s^2) on a Hohmann transfer to Mars, v_inf = 2.943 km/s,
    # needs dv = 3.590 km/s.
    assert escape_burn(6678e3, 2943.0, 398600e9) == pytest.approx(3590.0, abs=0.5)


def test_escape_just_escaping_is_escape_minus_circular_speed():
    # Common practice: from a circle, just escaping costs (sqrt 2 - 1) v_circ.
    r = EARTH.radius + 400e3
    v = math.sqrt(EARTH.mu / r)
    assert escape_burn(r, 0.0, EARTH.mu) == pytest.approx((math.sqrt(2.0) - 1.0) * v, rel=1e-14)


def test_elliptic_parking_orbit_against_conic_speeds():
    # Independent route through Conic: hyperbola periapsis speed minus the
    # parking ellipse's periapsis speed.
    rp, ra, vinf = MARS.radius + 300e3, 20000e3, 2650.0
    expected = Conic.from_vinf(rp, vinf, MARS.mu).speed(0.0) - Conic.from_apsides(rp, ra, MARS.mu).speed(0.0)
    assert capture_burn(rp, vinf, MARS.mu, ra=ra) == pytest.approx(float(expected), rel=1e-13)
    assert escape_burn(rp, vinf, MARS.mu, ra=ra) == pytest.approx(float(expected), rel=1e-13)
    # A longer ellipse costs less (the Oberth effect of a high periapsis speed).
    ras = np.array([rp, 10000e3, 20000e3, 100000e3])
    costs = capture_burn(rp, vinf, MARS.mu, ra=ras)
    assert (np.diff(costs) < 0).all()
    assert costs[0] == pytest.approx(capture_burn(rp, vinf, MARS.mu), rel=1e-15)


@given(rp=radii, vinf=excess, mu=gms)
def test_capture_equals_escape_and_energy_matches(rp, vinf, mu):
    # Time reversal: the capture burn equals the escape burn. And the burn adds
    # exactly the energy between circle and hyperbola (vis-viva, common practice).
    dv = escape_burn(rp, vinf, mu)
    assert capture_burn(rp, vinf, mu) == dv
    v_circ = math.sqrt(mu / rp)
    added = float(energy_gain(v_circ, dv))
    assert added == pytest.approx(0.5 * vinf**2 + 0.5 * mu / rp, rel=1e-12)


@pytest.mark.parametrize("ratio", [1.0, 3.0, 1e3, 1e6, 1e9])
@pytest.mark.parametrize("vinf", [0.0, 1.0, 150.0, 3000.0])
def test_escape_from_an_elongated_parking_orbit_keeps_its_digits(ratio, vinf):
    # The exact value of the textbook form sqrt(vinf^2 + 2 mu/rp) - v_park for
    # these very float inputs, by mpmath at 50 digits. With ra/rp = 1e6 both
    # speeds agree to 1e-6 of each other: subtracting them in doubles lost
    # 1.4e-10 (an outside audit); the quotient form keeps a few ulp.
    rp, mu = EARTH.radius + 300e3, EARTH.mu
    ra = rp * ratio
    with mpmath.workdps(50):
        r_p, r_a, m_u, v = (mpmath.mpf(x) for x in (rp, ra, mu, vinf))
        hyperbola = mpmath.sqrt(v * v + 2 * m_u / r_p)
        exact = hyperbola - mpmath.sqrt(2 * m_u * r_a / (r_p * (r_p + r_a)))
        exact_circle = hyperbola - mpmath.sqrt(m_u / r_p)
    assert escape_burn(rp, vinf, mu, ra=ra) == pytest.approx(float(exact), rel=2e-15, abs=0.0)
    assert capture_burn(rp, vinf, mu, ra=ra) == pytest.approx(float(exact), rel=2e-15, abs=0.0)
    assert capture_burn(rp, vinf, mu) == pytest.approx(float(exact_circle), rel=2e-15, abs=0.0)


# ---------------------------------------------------------------- powered flyby
def test_unpowered_flyby_turn_angle():
    # Curtis, Sec. 8.9 (from memory): the turn angle of an unpowered flyby is
    # delta = 2 asin(1/e), e = 1 + rp vinf^2 / mu; nothing gained.
    vinf, rp = 5600.0, 1.1 * JUPITER.radius
    e = 1.0 + rp * vinf**2 / JUPITER.mu
    f = powered_flyby(vinf, rp, 0.0, JUPITER.mu)
    assert f.vinf_out == pytest.approx(vinf, rel=1e-15)
    assert f.deflection == pytest.approx(2.0 * math.asin(1.0 / e), rel=1e-14)
    assert f.gain == 0.0


@given(vinf=st.floats(100.0, 20000.0), rp=radii, mu=gms, dv=st.floats(-3000.0, 3000.0))
def test_flyby_energy_is_the_oberth_gain_at_periapsis(vinf, rp, mu, dv):
    # The specific energy of the outgoing leg minus the incoming one is the
    # energy gain of the burn at periapsis speed (energy conservation).
    vp = math.sqrt(vinf**2 + 2 * mu / rp)
    f = powered_flyby(vinf, rp, dv, mu)
    if vp + dv <= 0 or (vp + dv) ** 2 < 2 * mu / rp:
        assert np.isnan(f.vinf_out) and np.isnan(f.gain) and np.isnan(f.deflection)
        return
    # The test's own difference of squares rounds at eps * vinf^2.
    rounding = 1e-15 * (vinf**2 + float(f.vinf_out) ** 2)
    assert 0.5 * f.vinf_out**2 - 0.5 * vinf**2 == pytest.approx(
        float(energy_gain(vp, dv)), rel=1e-10, abs=1e-9 * vp * abs(dv) + rounding
    )
    assert f.gain == pytest.approx(f.vinf_out - vinf - dv, abs=1e-9 * (vp + abs(dv)))
    if dv > 1e-3:  # below that the gain (~dv mu / (rp vinf^2)) nears the rounding of vinf_out
        assert f.gain > 0.0  # burning deep in the well always pays (Oberth)


def test_flyby_capture_and_reversal_are_nan_rest_untouched():
    rp, mu, vinf = MARS.radius + 300e3, MARS.mu, 2000.0
    vp = math.sqrt(vinf**2 + 2 * mu / rp)
    dv = np.array([100.0, -1500.0, -2.5 * vp, 0.0])  # boost, capture, reversal, coast
    f = powered_flyby(vinf, rp, dv, mu)
    assert (
        np.isnan(f.vinf_out[1:3]).all() and np.isnan(f.deflection[1:3]).all() and np.isnan(f.gain[1:3]).all()
    )
    good = powered_flyby(vinf, rp, dv[[0, 3]], mu)
    np.testing.assert_array_equal(f.vinf_out[[0, 3]], good.vinf_out)
    np.testing.assert_array_equal(f.deflection[[0, 3]], good.deflection)


def _exact_flyby(vinf, rp, dv, mu):
    """Excess speed out, turn and gain of a powered flyby for these float inputs, mpmath at 50 digits."""
    with mpmath.workdps(50):
        v, r, d, m = (mpmath.mpf(x) for x in (vinf, rp, dv, mu))
        vp = mpmath.sqrt(v * v + 2 * m / r)
        # (vp + dv)^2 - 2 mu / rp, written so that even mpmath does not cancel at vinf = dv = 0
        v_out = mpmath.sqrt(v * v + d * (2 * vp + d))
        turn = mpmath.asin(1 / (1 + r * v * v / m)) + mpmath.asin(1 / (1 + r * v_out**2 / m))
        return float(v_out), float(turn), float(v_out - v - d)


@pytest.mark.parametrize("vinf", [0.0, 1e-6, 1e-3, 1.0, 100.0, 5000.0])
@pytest.mark.parametrize("dv", [0.0, 1e-3, 50.0])
def test_flyby_turn_near_a_parabola_keeps_its_digits(vinf, dv):
    # Near a parabola e = 1 + rp vinf^2 / mu is within 1e-14 of 1, and asin(1/e)
    # loses about half the digits (an outside audit: about sqrt(eps)); the turn
    # from e - 1 keeps them. Reference: the textbook asin form in mpmath.
    rp, mu = EARTH.radius + 500e3, EARTH.mu
    vinf_out, turn, _ = _exact_flyby(vinf, rp, dv, mu)
    f = powered_flyby(vinf, rp, dv, mu)
    assert f.deflection == pytest.approx(turn, rel=2e-15, abs=0.0)
    assert f.vinf_out == pytest.approx(vinf_out, rel=2e-15, abs=0.0)


@pytest.mark.parametrize("vinf", [1000.0, 3e4, 1e5])
@pytest.mark.parametrize("dv", [-0.5, 1e-3, 1.0, 100.0])
def test_flyby_gain_in_a_shallow_well_keeps_its_digits(vinf, dv):
    # At the Moon with a fast approach the gain vinf_out - vinf - dv is a small
    # remainder of dv (1e-4 of it at 100 km/s): it is computed as a difference of
    # squares over a sum, never by subtracting dv. Reference: mpmath, 50 digits.
    rp, mu = MOON.radius + 100e3, MOON.mu
    _, _, gain = _exact_flyby(vinf, rp, dv, mu)
    assert powered_flyby(vinf, rp, dv, mu).gain == pytest.approx(gain, rel=4e-15, abs=0.0)


def test_powered_flyby_against_integrated_legs():
    # Independent route: integrate both legs from periapsis (scipy DOP853, rtol
    # 1e-12), the incoming leg backwards, out to 2000 periapsis radii; the
    # speeds there (corrected by vis-viva for the remaining potential) give
    # the excess speeds, and the angle between the velocity directions the turn.
    vinf, rp, dv, mu = 7500.0, 1.3 * JUPITER.radius, 800.0, JUPITER.mu
    vp = math.sqrt(vinf**2 + 2 * mu / rp)
    far = 2000.0 * rp

    legs = []
    for speed, direction in ((vp, -1.0), (vp + dv, 1.0)):
        sol = propagate(
            [rp, 0.0], [0.0, speed], mu, direction * 1e9, rtol=1e-12, atol=1e-6, events=distance_event(far)
        )
        legs.append(sol.y_events[0][0])
    (x_in, y_in, vx_in, vy_in), (x_out, y_out, vx_out, vy_out) = legs
    v_out_far = math.hypot(vx_out, vy_out)
    vinf_out = math.sqrt(v_out_far**2 - 2 * mu / math.hypot(x_out, y_out))
    f = powered_flyby(vinf, rp, dv, mu)
    assert f.vinf_out == pytest.approx(vinf_out, rel=1e-9)
    # Far out the velocity points along the asymptote to within about rp/r.
    turn = math.acos((vx_in * vx_out + vy_in * vy_out) / (math.hypot(vx_in, vy_in) * v_out_far))
    assert f.deflection == pytest.approx(turn, abs=2e-3)


@given(
    st.lists(st.tuples(st.floats(0.0, 15000.0), radii, st.floats(-2000.0, 2000.0)), min_size=1, max_size=6)
)
def test_arrays_equal_loop_of_scalar_calls(rows):
    vinf, rp, dv = (np.array(c) for c in zip(*rows))
    many = powered_flyby(vinf, rp, dv, MARS.mu)
    escapes = escape_burn(rp, vinf, MARS.mu, ra=rp * 3.0)
    for i in range(len(rows)):
        one = powered_flyby(vinf[i], rp[i], dv[i], MARS.mu)
        # equal to rounding: the turn uses atan2, where math and NumPy may differ in
        # the last bit, and tiny inputs (1e-127) may be redone in extended precision
        for name in ("vinf_out", "deflection", "gain"):
            assert_same_to_rounding(getattr(many, name)[i], getattr(one, name))
        assert_same_to_rounding(escapes[i], escape_burn(rp[i], vinf[i], MARS.mu, ra=rp[i] * 3.0))


def test_types_broadcasting_and_repr():
    f = powered_flyby(3000.0, 7000e3, 200.0, EARTH.mu)
    assert isinstance(f, Flyby)
    assert all(isinstance(x, np.floating) for x in (f.vinf_out, f.deflection, f.gain))
    assert "m/s" in repr(f) and "rad" in repr(f)
    grid = powered_flyby(np.array([1000.0, 3000.0])[:, None], 7000e3, np.array([0.0, 100.0, 500.0]), EARTH.mu)
    assert grid.gain.shape == (2, 3)
    assert isinstance(escape_burn(7000e3, 100.0, EARTH.mu), np.floating)
    assert escape_burn(np.array([7e6, 8e6]), np.array([[0.0], [1000.0]]), EARTH.mu).shape == (2, 2)


def test_parabolic_arrival_is_valid():
    # vinf = 0 is a parabola: its periapsis speed is the escape speed.
    assert capture_burn(7000e3, 0.0, EARTH.mu) == pytest.approx(
        math.sqrt(2 * EARTH.mu / 7000e3) - math.sqrt(EARTH.mu / 7000e3), rel=1e-14
    )
    f = powered_flyby(0.0, 7000e3, 100.0, EARTH.mu)
    assert f.vinf_out > 0 and np.isfinite(f.deflection) and np.isfinite(f.gain)


# ---------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: escape_burn(-1.0, 1000.0, EARTH.mu), r"`rp` must be > 0 m"),
        (lambda: escape_burn(7e6, -1.0, EARTH.mu), r"`vinf` must be >= 0 m/s"),
        (lambda: escape_burn(7e6, 1000.0, 0.0), r"`mu` must be > 0"),
        (lambda: escape_burn(7e6, 1000.0, EARTH.mu, ra=6e6), r"`ra` must be >= rp"),
        (lambda: capture_burn(7e6, 1000.0, EARTH.mu, ra=[8e6, 6e6, 5e6]), r"`ra` must be >= rp.*2 of 3"),
        (lambda: capture_burn(7e6, np.nan, EARTH.mu), r"`vinf` must be finite"),
        (lambda: capture_burn(7e6, 1000.0, EARTH.mu, ra=-1.0), r"`ra` must be > 0 m"),
        (lambda: powered_flyby(-5.0, 7e6, 100.0, EARTH.mu), r"`vinf_in` must be >= 0 m/s"),
        (lambda: powered_flyby(5000.0, 0.0, 100.0, EARTH.mu), r"`rp` must be > 0 m"),
        (lambda: powered_flyby(5000.0, 7e6, np.inf, EARTH.mu), r"`dv` must be finite"),
        (lambda: powered_flyby(5000.0, 7e6, 100.0, -EARTH.mu), r"`mu` must be > 0"),
    ],
)
def test_bad_input_names_the_parameter(call, match):
    with pytest.raises(DomainError, match=match):
        call()
