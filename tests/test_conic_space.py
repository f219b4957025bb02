"""Orbits in space: Conic's inclination and node against textbook examples, conventions and properties."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit import Conic
from deltakit._checks import is_number
from deltakit.constants import EARTH

MU_CURTIS = 398600e9  # Curtis uses mu = 398 600 km^3/s^2
MU_VALLADO = 398600.4418e9  # Vallado, 4th ed., EGM-96 value
MU = EARTH.mu


def _angle_close(a, b, tol):
    """Angles equal modulo a full turn."""
    return abs(math.remainder(float(a) - float(b), 2 * math.pi)) <= tol


# ---------------------------------------------------------------------- textbook examples
def test_curtis_example_4_3_state_to_elements_retrograde():
    # Curtis, Orbital Mechanics for Engineering Students (2nd/3rd ed.), Example 4.3
    # (values from memory): r = (-6045, -3490, 2500) km, v = (-3.457, 6.618, 2.533) km/s
    # give h = 58 310 km^2/s, i = 153.2 deg (retrograde), RAAN = 255.3 deg,
    # e = 0.1712, argument of perigee 20.07 deg, true anomaly 28.45 deg,
    # a = 8788 km.
    r = np.array([-6045.0, -3490.0, 2500.0]) * 1e3
    v = np.array([-3.457, 6.618, 2.533]) * 1e3
    c = Conic.from_state(r, v, MU_CURTIS)
    assert c.h == pytest.approx(58310e6, abs=5e6)
    assert math.degrees(c.inc) == pytest.approx(153.2, abs=0.05)
    assert math.degrees(c.raan) == pytest.approx(255.3, abs=0.05)
    assert c.e == pytest.approx(0.1712, abs=5e-5)
    assert math.degrees(c.argp) == pytest.approx(20.07, abs=0.005)
    assert math.degrees(c.true_anomaly_at(r)) == pytest.approx(28.45, abs=0.005)
    assert c.a == pytest.approx(8788e3, abs=0.5e3)
    assert c.inc > math.pi / 2  # retrograde
    # and back: the state at that true anomaly is the given one
    r_back, v_back = c.state(c.true_anomaly_at(r), "inertial")
    np.testing.assert_allclose(r_back, r, rtol=1e-13)
    np.testing.assert_allclose(v_back, v, rtol=1e-13)


def test_vallado_example_2_5_state_to_elements():
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 2-5
    # (values from memory): r = (6524.834, 6862.875, 6448.296) km,
    # v = (4.901327, 5.533756, -1.976341) km/s give p = 11 067.790 km,
    # a = 36 127.343 km, e = 0.832853, i = 87.870 deg, RAAN = 227.898 deg,
    # argument of perigee 53.38 deg, true anomaly 92.335 deg. The book's p and
    # angles differ from an exact evaluation of its own inputs in the last digit
    # (p by 8 m, i by 0.001 deg), so the tolerances are one unit there.
    r = np.array([6524.834, 6862.875, 6448.296]) * 1e3
    v = np.array([4.901327, 5.533756, -1.976341]) * 1e3
    c = Conic.from_state(r, v, MU_VALLADO)
    assert c.p == pytest.approx(11067.790e3, rel=1e-6)
    assert c.a == pytest.approx(36127.343e3, rel=1e-6)
    assert c.e == pytest.approx(0.832853, abs=1e-6)
    assert math.degrees(c.inc) == pytest.approx(87.870, abs=1.5e-3)
    assert math.degrees(c.raan) == pytest.approx(227.898, abs=1.5e-3)
    assert math.degrees(c.argp) == pytest.approx(53.38, abs=0.005)
    assert math.degrees(c.true_anomaly_at(r)) == pytest.approx(92.335, abs=1.5e-3)


def test_curtis_example_4_7_elements_to_state_hyperbola():
    # Curtis (2nd/3rd ed.), Example 4.7 (values from memory): h = 80 000 km^2/s,
    # e = 1.4, i = 30 deg, RAAN = 40 deg, argument of perigee 60 deg, true anomaly
    # 30 deg give r = (-4040, 4815, 3629) km and v = (-10.39, -4.772, 1.744) km/s.
    h, e = 80000e6, 1.4
    rp = h * h / (MU_CURTIS * (1 + e))  # h^2 = mu rp (1 + e)
    c = Conic(rp, e, MU_CURTIS, argp=math.radians(60), inc=math.radians(30), raan=math.radians(40))
    r, v = c.state(math.radians(30), "inertial")
    np.testing.assert_allclose(r / 1e3, [-4040.0, 4815.0, 3629.0], atol=0.5)
    np.testing.assert_allclose(v / 1e3, [-10.39, -4.772, 1.744], atol=5e-3)


# ---------------------------------------------------------------------- singular cases: one convention
def test_equatorial_state_has_node_on_x_and_round_trips_exactly():
    # Convention (module notes): an equatorial orbit's node is undefined; raan = 0
    # and argp is measured from +x. The state comes back bit for bit.
    r = np.array([5000e3, 5000e3, 0.0])
    v = np.array([-4000.0, 6500.0, 0.0])
    c = Conic.from_state(r, v, MU)
    assert c.inc == 0.0 and c.raan == 0.0
    planar = Conic.from_state(r[:2], v[:2], MU)  # today's planar answer
    for name in ("rp", "e", "argp"):
        assert getattr(c, name) == getattr(planar, name), name
    r_back, v_back = c.state(c.true_anomaly_at(r), "inertial")
    np.testing.assert_allclose(r_back, r, rtol=1e-15, atol=1e-9)
    np.testing.assert_allclose(v_back, v, rtol=1e-15, atol=1e-12)
    assert r_back[2] == 0.0 and v_back[2] == 0.0


def test_retrograde_equatorial_state():
    # Motion clockwise seen from +z: inc = pi exactly, raan = 0, argp measured from +x
    # in the direction of motion (clockwise), so the same shape as the mirrored
    # prograde state, and z stays exactly zero on the way back.
    r = np.array([7000e3, 1000e3, 0.0])
    v = np.array([500.0, -7600.0, 0.0])
    c = Conic.from_state(r, v, MU)
    assert c.inc == math.pi and c.raan == 0.0
    mirrored = Conic.from_state(r * [1, -1, 1], v * [1, -1, 1], MU)  # y -> -y: prograde
    assert mirrored.inc == 0.0
    assert c.rp == pytest.approx(float(mirrored.rp), rel=1e-15)
    assert c.e == pytest.approx(float(mirrored.e), rel=1e-15)
    assert c.argp == pytest.approx(float(mirrored.argp), abs=1e-15)
    np.testing.assert_array_equal(c.normal, [0.0, 0.0, -1.0])
    r_back, v_back = c.state(c.true_anomaly_at(r), "inertial")
    np.testing.assert_allclose(r_back, r, rtol=1e-14)
    np.testing.assert_allclose(v_back, v, rtol=1e-14)
    assert r_back[2] == 0.0 and v_back[2] == 0.0


def test_circular_state_puts_periapsis_at_the_node():
    # Convention: a circular orbit's periapsis is undefined; argp = 0 and nu is the
    # argument of latitude. An inclined circle, and a circle in the plane.
    inclined = Conic.circular(7000e3, MU, inc=0.9, raan=2.0)
    r, v = inclined.state(1.3, "inertial")
    c = Conic.from_state(r, v, MU)
    assert c.e == 0.0 and c.argp == 0.0
    assert c.inc == pytest.approx(0.9, abs=1e-15) and c.raan == pytest.approx(2.0, abs=1e-15)
    assert c.true_anomaly_at(r) == pytest.approx(1.3, abs=1e-14)
    both = Conic.from_state([0.0, 7000e3, 0.0], [-float(inclined.speed(0.0)), 0.0, 0.0], MU)
    assert both.e == 0.0 and both.argp == 0.0 and both.raan == 0.0 and both.inc == 0.0
    assert both.true_anomaly_at([0.0, 7000e3, 0.0]) == pytest.approx(math.pi / 2, abs=1e-15)


@pytest.mark.filterwarnings("error")
def test_singular_cases_give_no_nan_and_no_warning():
    cases = [
        ([7000e3, 0.0, 0.0], [0.0, 7546.0, 0.0]),  # circular equatorial
        ([7000e3, 0.0, 0.0], [0.0, -7546.0, 0.0]),  # circular retrograde equatorial
        ([7000e3, 0.0, 0.0], [0.0, 0.0, 7546.0]),  # polar, starting on the node
        ([0.0, 0.0, 7000e3], [7546.0, 0.0, 0.0]),  # polar, over the pole
    ]
    for r, v in cases:
        c = Conic.from_state(r, v, MU)
        values = [float(getattr(c, n)) for n in ("rp", "e", "argp", "inc", "raan")]
        assert np.isfinite(values).all(), (r, v)
        r_back, v_back = c.state(c.true_anomaly_at(r), "inertial")
        np.testing.assert_allclose(r_back, r, rtol=0, atol=1e-8)
        np.testing.assert_allclose(v_back, v, rtol=0, atol=1e-11)


def test_zero_angular_momentum_is_nan():
    c = Conic.from_state([[7000e3, 0.0, 0.0], [7000e3, 0.0, 0.0]], [[100.0, 0.0, 0.0], [0.0, 0.0, 7e3]], MU)
    assert np.isnan(c.inc[0]) and np.isnan(c.rp[0]) and np.isfinite(c.inc[1])


# ---------------------------------------------------------------------- planar results unchanged
def test_planar_conic_in_space_is_the_planar_conic():
    flat = Conic(7000e3, 0.3, MU, argp=0.7)
    spatial = Conic(7000e3, 0.3, MU, argp=0.7, inc=0.0, raan=0.0)
    nu = np.linspace(-2.0, 2.0, 9)
    r2, v2 = flat.state(nu)
    r3, v3 = spatial.state(nu, "inertial")
    np.testing.assert_array_equal(r3[:, :2], r2)
    np.testing.assert_array_equal(v3[:, :2], v2)
    assert (r3[:, 2] == 0.0).all() and (v3[:, 2] == 0.0).all()
    np.testing.assert_array_equal(spatial.normal, [0.0, 0.0, 1.0])


def test_normal_and_nodes():
    # Common practice: the normal is (sin i sin RAAN, -sin i cos RAAN, cos i); the
    # ascending node is where the orbit crosses the reference plane going up (+z).
    c = Conic(7000e3, 0.2, MU, argp=0.8, inc=0.6, raan=1.1)
    w = c.normal
    assert np.linalg.norm(w) == pytest.approx(1.0, rel=1e-15)
    r, v = c.state(0.37, "inertial")
    np.testing.assert_allclose(np.cross(r, v) / np.linalg.norm(np.cross(r, v)), w, atol=1e-15)
    ascending, descending = c.nodes
    for nu, rising in ((ascending, True), (descending, False)):
        r, v = c.state(nu, "inertial")
        assert abs(r[2]) < 1e-8 * np.linalg.norm(r)
        assert (v[2] > 0) == rising
    # the ascending node lies along raan in the reference plane
    r, _ = c.state(ascending, "inertial")
    assert math.atan2(r[1], r[0]) == pytest.approx(1.1, abs=1e-12)
    # a hyperbola that never reaches a node gives NaN there
    hyperbola = Conic(7000e3, 1.5, MU, argp=math.radians(150.0), inc=0.3)
    asc, desc = hyperbola.nodes
    assert np.isnan(asc) and np.isfinite(desc)


# ---------------------------------------------------------------------- properties (hypothesis)
spatial_conics = st.tuples(
    st.floats(1e5, 1e11),  # rp
    st.one_of(st.floats(0.0, 0.99), st.floats(1.01, 5.0)),  # e
    st.floats(1e10, 1e20),  # mu
    st.floats(-math.pi, math.pi),  # argp
    st.one_of(st.floats(0.0, math.pi), st.sampled_from([0.0, math.pi, math.pi / 2])),  # inc
    st.floats(0.0, 2 * math.pi),  # raan
    st.floats(-0.95, 0.95),  # nu as a fraction of the reachable range
)


@given(spatial_conics)
def test_state_to_elements_to_state_round_trip(case):
    rp, e, mu, argp, inc, raan, fraction = case
    conic = Conic(rp, e, mu, argp, inc, raan)
    nu = fraction * float(conic.true_anomaly_limit)
    r, v = conic.state(nu, "inertial")
    again = Conic.from_state(r, v, mu)
    r_back, v_back = again.state(again.true_anomaly_at(r), "inertial")
    np.testing.assert_allclose(r_back, r, rtol=0, atol=1e-12 * np.linalg.norm(r))
    np.testing.assert_allclose(v_back, v, rtol=0, atol=1e-12 * np.linalg.norm(v))
    assert again.rp == pytest.approx(rp, rel=1e-10)
    assert again.e == pytest.approx(e, abs=1e-10)
    np.testing.assert_allclose(again.normal, conic.normal, atol=1e-13)
    sin_i = math.sin(inc)
    if sin_i > 1e-6:  # the node is defined: it comes back
        assert _angle_close(again.raan, raan, 1e-9 / sin_i)
        if e > 1e-3:
            assert _angle_close(again.argp, argp, 1e-8)


@given(spatial_conics)
def test_three_vectors_of_a_planar_orbit_give_the_planar_elements(case):
    rp, e, mu, argp, _, _, fraction = case
    conic = Conic(rp, e, mu, argp)
    nu = fraction * float(conic.true_anomaly_limit)
    r2, v2 = conic.state(nu)
    r3, v3 = conic.state(nu, "inertial")
    flat, spatial = Conic.from_state(r2, v2, mu), Conic.from_state(r3, v3, mu)
    for name in ("rp", "e", "argp"):
        assert getattr(spatial, name) == getattr(flat, name), name
    assert spatial.inc == 0.0 and spatial.raan == 0.0


@given(
    st.lists(
        st.tuples(st.floats(0.0, math.pi), st.floats(-7.0, 7.0), st.floats(-3.0, 3.0)), min_size=1, max_size=6
    )
)
def test_array_conic_equals_loop_of_scalar_conics(rows):
    inc, raan, nu = (np.array(c) for c in zip(*rows))
    many = Conic(7000e3, 0.4, MU, 0.3, inc, raan)
    r, v = many.state(nu, "inertial")
    w = many.normal
    for i in range(len(rows)):
        one = Conic(7000e3, 0.4, MU, 0.3, float(inc[i]), float(raan[i]))
        r1, v1 = one.state(float(nu[i]), "inertial")
        np.testing.assert_array_equal(r[i], r1)
        np.testing.assert_array_equal(v[i], v1)
        np.testing.assert_array_equal(w[i], one.normal)


# ---------------------------------------------------------------------- scalar fast path
@given(spatial_conics)
def test_scalar_fast_path_equals_array_path(case):
    rp, e, mu, argp, inc, raan, fraction = case
    one = Conic(rp, e, mu, argp, inc, raan)  # plain floats: the fast path
    many = Conic(*(np.array([x]) for x in (rp, e, mu, argp, inc, raan)))  # arrays
    # plain numbers of moderate size take the fast path (deltakit._checks.BAND), others the array path
    assert (one._numbers is not None) == is_number(rp, e, mu, argp, inc, raan) and many._numbers is None
    nu = fraction * float(one.true_anomaly_limit)
    for name in ("rp", "e", "mu", "argp", "inc", "raan", "a", "ra", "p", "energy", "h", "period", "vinf"):
        a, b = getattr(one, name), getattr(many, name)[0]
        assert isinstance(a, np.float64), name
        assert a == pytest.approx(float(b), rel=1e-14, abs=0.0, nan_ok=True), name
    for name in ("radius", "speed", "flight_path_angle"):
        a, b = getattr(one, name)(nu), getattr(many, name)(np.array([nu]))[0]
        assert isinstance(a, np.float64), name
        assert a == pytest.approx(float(b), rel=1e-14, abs=1e-300, nan_ok=True), name
    for a, b in zip(one.velocity(nu), many.velocity(np.array([nu]))):
        assert a == pytest.approx(float(b[0]), rel=1e-13, abs=1e-12 * float(one.speed(nu)))


@pytest.mark.parametrize(
    "arguments, name",
    [
        ((-1.0, 0.1, MU), "rp"),
        ((7e6, -0.1, MU), "e"),
        ((7e6, 0.1, 0.0), "mu"),
        ((7e6, 0.1, MU, math.inf), "argp"),
        ((7e6, 0.1, MU, 0.0, -0.1), "inc"),
        ((7e6, 0.1, MU, 0.0, 4.0), "inc"),
        ((7e6, 0.1, MU, 0.0, 0.5, math.nan), "raan"),
    ],
)
def test_scalar_and_array_paths_raise_the_same_errors(arguments, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`") as scalar:
        Conic(*arguments)
    with pytest.raises(dk.DomainError) as array:
        Conic(*(np.asarray(x) for x in arguments))
    assert str(scalar.value) == str(array.value)


# ---------------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: Conic(7e6, 0.1, MU, inc=np.array([0.1, 3.5])), r"`inc` must be between 0 and pi.*1 of 2"),
        (lambda: Conic(7e6, 0.1, MU, inc=-1e-9), r"`inc` must be between 0 and pi"),
        (lambda: Conic(7e6, 0.1, MU, raan=np.inf), r"`raan` must be finite"),
        (lambda: Conic.circular(7e6, MU, inc=4.0), r"`inc`"),
        (lambda: Conic.from_apsides(7e6, 8e6, MU, raan=[0.0, np.nan]), r"`raan` must be finite"),
        (
            lambda: Conic.from_state([1e7, 0.0, 0.0, 0.0], [0.0, 7e3, 0.0, 0.0], MU),
            r"`r_vec` must have 2 .* or 3",
        ),
        (lambda: Conic.from_state([1e7, 0.0, 0.0], [0.0, 7e3], MU), r"`v_vec` must have as many components"),
        (lambda: Conic.from_state(1e7, [0.0, 7e3, 0.0], MU), r"`r_vec`"),
        (lambda: Conic.from_state([0.0, 0.0, 0.0], [0.0, 7e3, 0.0], MU), r"`r_vec` must be non-zero"),
        (lambda: Conic(7e6, 0.1, MU).state(0.0, frame="ecliptic"), r"`frame` must be 'plane' or 'inertial'"),
        (lambda: Conic(7e6, 0.1, MU).true_anomaly_at([1.0, 2.0, 3.0, 4.0]), r"`r_vec`"),
    ],
)
def test_bad_input_names_the_parameter(call, match):
    with pytest.raises(dk.DomainError, match=match):
        call()


# ---------------------------------------------------------------------- memory: scalars stay scalars
def test_scalars_broadcast_against_arrays_are_views_not_copies():
    rp = np.linspace(7e6, 8e6, 100_000)
    conic = Conic(rp, 0.1, MU, 0.0, 0.5, 1.0)
    for name in ("e", "mu", "argp", "inc", "raan"):
        field = getattr(conic, name)
        assert field.shape == (100_000,) and field.strides == (0,), name
    assert conic.rp.strides == (8,) and not np.shares_memory(conic.rp, rp)  # the array is our own copy
    rp[0] = 1.0  # changing the caller's array changes nothing in the orbit
    assert conic.rp[0] == 7e6
    with pytest.raises(ValueError):
        conic.mu[0] = 1.0


def test_array_of_planes_with_nodes_that_hyperbolas_never_reach():
    c = Conic(7000e3, np.array([0.5, 3.0]), MU, argp=math.radians(170.0), inc=0.2)
    asc, desc = c.nodes  # ascending at nu = -170 deg, beyond the e = 3 asymptote (109.5 deg)
    assert np.isfinite(desc).all()
    assert np.isfinite(asc[0]) and np.isnan(asc[1])
