"""Out-of-plane and motion-reversing burns: scipy's integration in 3-D, properties, the scalar path."""

from __future__ import annotations

import math

import numpy as np
import pytest
from helpers import apsis_event, propagate, specific_energy
from hypothesis import assume, given
from hypothesis import strategies as st

from deltakit import Conic, DomainError, burn, burn_prograde, energy_gain
from deltakit.constants import EARTH, MARS

MU = EARTH.mu

radii = st.floats(6.6e6, 5e7)
eccentricities = st.floats(0.0, 3.0)
angles = st.floats(-math.pi, math.pi)
inclinations = st.one_of(st.floats(0.0, math.pi), st.sampled_from([0.0, math.pi]))
components = st.floats(-2000.0, 2000.0)


def _rtn_vectors(r, v):
    """Radial, transverse and normal unit vectors from a state (the test's own, not deltakit's)."""
    radial = r / np.linalg.norm(r)
    normal = np.cross(r, v)
    normal /= np.linalg.norm(normal)
    return radial, np.cross(normal, radial), normal


def _state_after(conic, nu, radial, transverse, normal):
    r, v = conic.state(nu, "inertial")
    ur, ut, un = _rtn_vectors(r, v)
    return r, v + radial * ur + transverse * ut + normal * un


def _reachable(conic, nu):
    return 1.0 + float(conic.e) * math.cos(nu) > 0.05


# ---------------------------------------------------------------- independent route: 3-D integration
@pytest.mark.parametrize(
    "rp, ra, argp, inc, raan, nu, radial, transverse, normal",
    [
        # invented burns on invented Earth orbits
        (EARTH.radius + 400e3, EARTH.radius + 400e3, 0.0, 0.9, 1.2, 0.4, 0.0, 0.0, 600.0),  # pure normal
        (EARTH.radius + 250e3, 42164e3, 0.3, 0.5, 4.0, 2.9, 50.0, 300.0, -800.0),  # near apoapsis
        (7000e3, 12000e3, -1.0, 0.0, 0.0, -1.0, -100.0, 250.0, 900.0),  # lifts a planar orbit
        (7000e3, 9000e3, 2.0, math.pi, 0.0, 0.7, 0.0, -200.0, 300.0),  # from a retrograde equatorial one
        (8000e3, 30000e3, 1.0, 2.5, 0.3, 0.1, 0.0, -17000.0, 0.0),  # reverses the motion
    ],
)
def test_out_of_plane_burn_against_integrated_trajectory(
    rp, ra, argp, inc, raan, nu, radial, transverse, normal
):
    # Independent route: the state after the burn (position before, velocity before
    # plus the delta-v in RTN axes built here) integrated with scipy's DOP853 at
    # rtol 1e-12 for one period: the apsides, the plane (inclination and node from
    # the integrated angular momentum) and the energy must be those of the
    # predicted conic to 1e-9.
    before = Conic.from_apsides(rp, ra, MU, argp=argp, inc=inc, raan=raan)
    r0, v0 = _state_after(before, nu, radial, transverse, normal)
    out = burn(before, nu, radial, transverse, normal)
    after = out.after
    assert float(after.e) < 1.0

    sol = propagate(r0, v0, MU, 1.02 * float(after.period), rtol=1e-12, atol=1e-6, events=apsis_event())
    apsides = np.linalg.norm(sol.y_events[0][:, :3], axis=1)
    assert apsides.min() == pytest.approx(float(after.rp), rel=1e-9)
    assert apsides.max() == pytest.approx(float(after.ra), rel=1e-9)
    end = sol.y[:, -1]
    h = np.cross(end[:3], end[3:])
    inc_integrated = math.atan2(math.hypot(h[0], h[1]), h[2])
    assert float(after.inc) == pytest.approx(inc_integrated, rel=1e-9, abs=1e-12)
    if math.hypot(h[0], h[1]) > 1e-6 * np.linalg.norm(h):
        node = math.atan2(h[0], -h[1])
        assert math.remainder(float(after.raan) - node, 2 * math.pi) == pytest.approx(0.0, abs=1e-9)
    assert float(after.energy) == pytest.approx(specific_energy(end[:3], end[3:], MU), rel=1e-9)
    # the energy change is v . dv + |dv|^2 / 2, with v the velocity before
    _, v_before = before.state(nu, "inertial")
    assert float(out.energy_change) == pytest.approx(
        v_before @ (v0 - v_before) + 0.5 * (v0 - v_before) @ (v0 - v_before)
    )


def test_normal_burn_at_the_node_turns_the_inclination_by_its_angle():
    # Common practice (the velocity triangle of a plane change at the node): a
    # normal burn N on a circular orbit of speed v at the ascending node turns the
    # plane by atan(N / v) about the line of nodes: the inclination grows by it and
    # the node stays.
    leo = Conic.circular(EARTH.radius + 500e3, MU, inc=math.radians(28.5), raan=math.radians(80.0))
    v = float(leo.speed(0.0))
    out = burn(leo, 0.0, normal=np.array([100.0, -300.0, 2000.0]))
    np.testing.assert_allclose(
        out.after.inc, math.radians(28.5) + np.arctan(np.array([100.0, -300.0, 2000.0]) / v), rtol=1e-14
    )
    np.testing.assert_allclose(out.after.raan, math.radians(80.0), rtol=1e-14)
    # At an antinode (90 deg from the node) the same burn moves the node instead:
    # the spherical triangle of the two poles there gives tan(dRAAN) = tan(d) / sin(i)
    # and cos(i') = cos(i) cos(d), with d = atan(N / v) (derived here from the
    # poles' coordinates; common practice).
    anti = burn(leo, math.pi / 2, normal=100.0)
    turn = math.atan(100.0 / v)
    i0 = math.radians(28.5)
    assert anti.after.inc == pytest.approx(math.acos(math.cos(i0) * math.cos(turn)), rel=1e-12)
    assert anti.after.raan - math.radians(80.0) == pytest.approx(
        math.atan(math.tan(turn) / math.sin(i0)), rel=1e-12
    )


# ---------------------------------------------------------------- properties
@given(
    rp=radii, e=eccentricities, argp=angles, inc=inclinations, raan=st.floats(0.0, 7.0), nu=angles,
    radial=components, transverse=components, normal=components,
)  # fmt: skip
def test_state_after_is_position_before_and_velocity_plus_dv(
    rp, e, argp, inc, raan, nu, radial, transverse, normal
):
    before = Conic(rp, e, MU, argp, inc, raan)
    assume(_reachable(before, nu))
    out = burn(before, nu, radial, transverse, normal)
    assume(np.isfinite(out.nu_after))
    r0, v_expected = _state_after(before, nu, radial, transverse, normal)
    r1, v1 = out.after.state(out.nu_after, "inertial")
    np.testing.assert_allclose(r1, r0, rtol=0, atol=1e-9 * np.linalg.norm(r0))
    np.testing.assert_allclose(v1, v_expected, rtol=0, atol=1e-9 * (np.linalg.norm(v_expected) + 1.0))
    assert 0.0 <= out.after.inc <= math.pi


@given(
    rp=radii, e=eccentricities, argp=angles, inc=inclinations, nu=angles, radial=components, normal=components
)
def test_energy_change_is_the_difference_of_orbit_energies(rp, e, argp, inc, nu, radial, normal):
    before = Conic(rp, e, MU, argp, inc, 0.4)
    assume(_reachable(before, nu))
    out = burn(before, nu, radial, 0.3 * radial, normal)
    assume(np.isfinite(out.energy_change))
    # The difference of two orbit energies carries rounding of order eps mu / r (the
    # size of the terms that cancel in it); the burn's own v . dv + |dv|^2/2 is the
    # accurate side, so the reference's own rounding is allowed for.
    dv2 = radial**2 + (0.3 * radial) ** 2 + normal**2
    scale = float(before.speed(nu)) * math.sqrt(dv2) + dv2
    # (and of order eps times the energies themselves, larger than mu / r near a hyperbola's
    # asymptote). A nearly radial orbit after the burn (e -> 1) holds its energy
    # -mu (1 - e) / (2 rp) only to eps / |1 - e|: there the reference, not the burn, is inexact.
    assume(abs(1.0 - float(out.after.e)) > 1e-6)
    rounding = 1e-14 * (MU / float(before.radius(nu)) + abs(float(before.energy)))
    assert float(out.energy_change) == pytest.approx(
        float(out.after.energy - before.energy), abs=1e-9 * scale + rounding
    )


@given(rp=radii, e=st.floats(0.0, 0.95), argp=angles, nu=angles, radial=components, transverse=components)
def test_normal_zero_in_the_space_kernel_equals_the_planar_kernel(rp, e, argp, nu, radial, transverse):
    # normal=0.0 (a scalar) takes the planar steps of the planar versions (here
    # the scalar path, with math.tan); an array of zeros goes through the 3-D
    # kernel: the two agree to 1e-15, or an ulp or two.
    before = Conic(rp, e, MU, argp)
    assume(_reachable(before, nu))
    planar = burn(before, nu, radial, transverse)
    spatial = burn(before, nu, radial, transverse, np.zeros(1))
    for name in ("rp", "e"):
        a, b = float(getattr(planar.after, name)), float(getattr(spatial.after, name)[0])
        assert a == pytest.approx(b, rel=3e-15, abs=1e-15, nan_ok=True), name
    assume(np.isfinite(planar.nu_after))
    # the burn point's argument of latitude agrees always; periapsis (argp, nu_after)
    # only where there is one (a circle's is a convention, down to the sign of a zero)
    pairs = [(planar.after.argp + planar.nu_after, spatial.after.argp[0] + spatial.nu_after[0], 1.0)]
    e_after = float(planar.after.e)
    if e_after > 1e-12:
        # periapsis is the direction of the eccentricity vector: its components carry
        # an ulp of their size, an angle of an ulp over e
        pairs += [
            (planar.after.argp, spatial.after.argp[0], e_after),
            (planar.nu_after, spatial.nu_after[0], e_after),
        ]
    for a, b, size in pairs:
        tolerance = 2e-15 * max(1.0, abs(float(a))) / min(1.0, size)
        assert abs(math.remainder(float(a) - float(b), 2 * math.pi)) <= tolerance
    assert spatial.after.inc[0] == planar.after.inc
    assert planar.energy_change == pytest.approx(float(spatial.energy_change[0]), rel=3e-15, abs=1e-15)


@given(
    rp=radii, e=st.floats(0.0, 0.95), argp=angles, inc=inclinations, nu=angles, excess=st.floats(1.05, 3.0)
)
def test_reversed_motion_energy_change_is_the_oberth_relation(rp, e, argp, inc, nu, excess):
    # A retrograde burn beyond the speed, dv = -excess v, reverses the motion: the
    # outcome is the retrograde orbit, and its energy change is v dv + dv^2/2 along
    # the velocity (energy_gain), equal to the difference of the orbit energies
    # (up to their own rounding, eps mu / r). Excess >= 1.05: just beyond 1 the
    # reversed orbit is nearly radial (e -> 1), whose elements rp, e hold its state
    # only to eps / (1 - e), which would make the reference, not the burn, inexact.
    before = Conic(rp, e, MU, argp, inc, 1.0)
    speed = float(before.speed(nu))
    dv = -excess * speed
    out = burn_prograde(before, nu, dv)
    # (the speed is computed in two ways, equal to a few ulp: v dv + dv^2/2 cancels
    # at dv = -2 v, so the reference carries a few eps v |dv|)
    assert float(out.energy_change) == pytest.approx(
        float(energy_gain(speed, dv)), rel=1e-14, abs=1e-15 * speed * abs(dv)
    )
    # (orbit energies from the states: the conic's -mu (1 - e) / (2 rp) loses digits
    # when the reversed orbit is nearly radial, e close to 1)
    r0, v0 = before.state(nu, "inertial")
    r1, v1 = out.after.state(out.nu_after, "inertial")
    difference = 0.5 * (v1 @ v1 - v0 @ v0) - MU / np.linalg.norm(r1) + MU / np.linalg.norm(r0)
    rounding = 1e-14 * MU / float(before.radius(nu))
    assert float(out.energy_change) == pytest.approx(difference, rel=1e-9, abs=rounding)
    assert float(out.after.inc) == pytest.approx(math.pi - inc, abs=1e-15)  # the plane turned over
    np.testing.assert_allclose(r1, r0, rtol=0, atol=1e-9 * np.linalg.norm(r0))
    np.testing.assert_allclose(v1, (1.0 - excess) * v0, rtol=0, atol=1e-9 * speed)


@given(
    st.lists(
        st.tuples(
            radii, st.floats(0.0, 0.95), angles, inclinations, angles, components, components, components
        ),
        min_size=1,
        max_size=6,
    )
)
def test_arrays_equal_loop_of_scalar_calls(rows):
    rp, e, argp, inc, nu, radial, transverse, normal = (np.array(column) for column in zip(*rows))
    many = burn(Conic(rp, e, MU, argp, inc, 0.7), nu, radial, transverse, normal)
    for i, row in enumerate(rows):
        one = burn(Conic(row[0], row[1], MU, row[2], row[3], 0.7), row[4], row[5], row[6], row[7])
        for name in ("rp", "e", "inc"):
            assert np.asarray(getattr(many.after, name))[i] == pytest.approx(
                float(getattr(one.after, name)), rel=1e-13, abs=1e-13, nan_ok=True
            ), name
        for name in ("argp", "raan"):
            a, b = float(np.asarray(getattr(many.after, name))[i]), float(getattr(one.after, name))
            if np.isfinite(b) and math.sin(row[3]) > 1e-6:
                assert abs(math.remainder(a - b, 2 * math.pi)) <= 1e-12, name
        assert many.energy_change[i] == pytest.approx(
            float(one.energy_change), rel=1e-13, abs=1e-9, nan_ok=True
        )


@given(
    rp=radii, e=eccentricities, argp=angles, inc=inclinations, nu=angles,
    radial=components, transverse=components, normal=components, dv=st.floats(-20000.0, 3000.0),
)  # fmt: skip
def test_scalar_fast_path_equals_array_path(rp, e, argp, inc, nu, radial, transverse, normal, dv):
    one = Conic(rp, e, MU, argp, inc, 0.25)
    many = Conic(*(np.array([x]) for x in (rp, e, MU, argp, inc, 0.25)))
    for scalar, array in (
        (burn(one, nu, radial, transverse, normal), burn(many, np.array([nu]), radial, transverse, normal)),
        (burn(one, nu, radial, transverse), burn(many, np.array([nu]), radial, transverse)),
        (burn_prograde(one, nu, dv), burn_prograde(many, np.array([nu]), dv)),
    ):
        assert isinstance(scalar.energy_change, np.float64) and isinstance(scalar.after.rp, np.float64)
        for name in ("rp", "e", "inc", "mu"):
            a, b = float(getattr(scalar.after, name)), float(getattr(array.after, name)[0])
            assert a == pytest.approx(b, rel=1e-13, abs=1e-13, nan_ok=True), name
        for name in ("argp", "raan"):
            a, b = float(getattr(scalar.after, name)), float(getattr(array.after, name)[0])
            if np.isfinite(b):
                assert abs(math.remainder(a - b, 2 * math.pi)) <= 1e-12 * max(1.0, abs(b)), name
            else:
                assert np.isnan(a)
        for name in ("energy_change", "dv"):
            a, b = float(getattr(scalar, name)), float(getattr(array, name)[0])
            assert a == pytest.approx(b, rel=1e-14, abs=1e-12, nan_ok=True), name


@pytest.mark.parametrize(
    "call",
    [
        lambda c: burn(c, math.nan, 1.0),
        lambda c: burn(c, 0.0, normal=math.inf),
        lambda c: burn(c, 0.0, transverse=-math.inf),
        lambda c: burn_prograde(c, 0.0, math.nan),
    ],
)
def test_scalar_and_array_paths_raise_the_same_errors(call):
    one = Conic.circular(7000e3, MU, inc=0.3)
    many = Conic.circular(np.array([7000e3]), MU, inc=0.3)
    with pytest.raises(DomainError) as scalar:
        call(one)
    with pytest.raises(DomainError) as array:
        call(many)
    assert str(scalar.value) == str(array.value)


def test_normal_must_be_finite_and_named():
    with pytest.raises(DomainError, match=r"`normal` must be finite.*1 of 2"):
        burn(Conic.circular(7000e3, MU), 0.0, normal=[1.0, np.nan])


def test_scalar_outcome_of_a_burn_that_leaves_no_angular_momentum_is_nan():
    circle = Conic.circular(MARS.radius + 300e3, MARS.mu, inc=0.4)
    v = float(circle.speed(0.0))
    out = burn(circle, 0.0, radial=10.0, transverse=-v)
    assert np.isnan(out.after.rp) and np.isnan(out.nu_after) and np.isnan(out.energy_change)
    assert out.dv == pytest.approx(math.hypot(10.0, v))


@given(v=st.floats(0.0, 2e4), dv=st.floats(-3e4, 3e4))
def test_energy_gain_scalar_path_equals_array_path(v, dv):
    one = energy_gain(v, dv)
    assert isinstance(one, np.float64)
    assert one == energy_gain(np.array([v]), np.array([dv]))[0]


@pytest.mark.parametrize("arguments", [(-1.0, 1.0), (1.0, math.inf), (math.nan, 1.0)])
def test_energy_gain_paths_raise_the_same_errors(arguments):
    with pytest.raises(DomainError) as scalar:
        energy_gain(*arguments)
    with pytest.raises(DomainError) as array:
        energy_gain(*(np.asarray(x) for x in arguments))
    assert str(scalar.value) == str(array.value)
