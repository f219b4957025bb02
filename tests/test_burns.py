"""Impulsive burns: checks against independent routes and facts of the trade."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from helpers import apsis_event, propagate, specific_energy
from hypothesis import assume, given
from hypothesis import strategies as st

from deltakit import BurnOutcome, Conic, DomainError, burn, burn_prograde, energy_gain, hohmann
from deltakit._blocks import BLOCK as _BLOCK
from deltakit.burns import _cos_sin
from deltakit.constants import EARTH, MARS

MU = EARTH.mu

# ---------------------------------------------------------------- strategies
radii = st.floats(6.6e6, 5e7)
eccentricities = st.floats(0.0, 3.0)
angles = st.floats(-math.pi, math.pi)
burn_components = st.floats(-2000.0, 2000.0)


def _conic(rp, e, argp=0.0):
    return Conic(rp, e, MU, argp)


def _reachable(conic, nu):
    # Keep well inside a hyperbola's asymptote, where the radius stays modest.
    return 1.0 + float(conic.e) * math.cos(nu) > 0.05


def _rtn_to_inertial(conic, nu, radial, transverse):
    angle = nu + conic.argp
    c, s = np.cos(angle), np.sin(angle)
    return np.stack([radial * c - transverse * s, radial * s + transverse * c], axis=-1)


# ---------------------------------------------------------------- facts of the trade
def test_energy_gain_of_a_cart():
    # Common practice (the Oberth relation on a cart): a 1 kg cart given 1 m/s
    # gains 1.5 J when it was moving at 1 m/s, and 10.5 J when moving at 10 m/s.
    mass = 1.0
    assert mass * energy_gain(1.0, 1.0) == pytest.approx(1.5, rel=1e-15)
    assert mass * energy_gain(10.0, 1.0) == pytest.approx(10.5, rel=1e-15)
    # At rest the gain is only the kinetic energy of the delta-v itself.
    assert energy_gain(0.0, 3.0) == pytest.approx(4.5)


def test_energy_gain_braking_and_broadcasting():
    # Braking from 10 to 9 m/s: 0.5*(81 - 100) = -9.5 J/kg (kinetic energy, common practice).
    assert energy_gain(10.0, -1.0) == pytest.approx(-9.5)
    v = np.array([1.0, 10.0, 100.0])[:, None]
    dv = np.array([1.0, 2.0])
    out = energy_gain(v, dv)
    assert out.shape == (3, 2)
    np.testing.assert_allclose(out, 0.5 * ((v + dv) ** 2 - v**2), rtol=1e-14)
    assert isinstance(energy_gain(1.0, 1.0), np.floating)


def test_small_tangential_burn_on_a_circle():
    # Common practice (first-order perturbation of a circular orbit): a small
    # tangential dv on a circle of speed v gives e = 2 dv / v; exactly, e = 2x + x^2
    # with x = dv/v. Checks the burn keeps full relative accuracy for tiny burns.
    circle = Conic.circular(7000e3, MU)
    v = math.sqrt(MU / 7000e3)
    for dv in (1e-6, 1e-3, 1.0):
        x = dv / v
        out = burn(circle, 0.3, transverse=dv)
        assert out.after.e == pytest.approx(2 * x + x * x, rel=1e-12)
        # The burn point becomes periapsis: nu_after is 0 and argp moves to the burn point.
        assert out.nu_after == pytest.approx(0.0, abs=1e-9)
        assert out.after.argp == pytest.approx(0.3, abs=1e-9)


def test_hohmann_first_burn_raises_apoapsis_to_target():
    # A prograde burn of the Hohmann first delta-v at any point of a circle puts
    # apoapsis at the target radius (Vallado, Fundamentals of Astrodynamics and
    # Applications, 4th ed., Sec. 6.3.1; the construction of the transfer).
    r1, r2 = EARTH.radius + 300e3, 42164e3
    transfer = hohmann(r1, r2, MU)
    out = burn_prograde(Conic.circular(r1, MU), 1.2, transfer.burns[0])
    assert out.after.ra == pytest.approx(r2, rel=1e-12)
    assert out.after.rp == pytest.approx(r1, rel=1e-12)
    # Second burn at apoapsis circularises.
    second = burn_prograde(out.after, math.pi, transfer.burns[1])
    assert second.after.e == pytest.approx(0.0, abs=1e-12)
    assert second.after.rp == pytest.approx(r2, rel=1e-12)


def test_oberth_same_dv_more_energy_at_periapsis():
    # Common practice (Oberth effect): the same delta-v changes the orbital energy
    # most where the vehicle is fastest, i.e. at periapsis.
    gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, MU)
    nu = np.linspace(-math.pi, math.pi, 361)
    gained = burn_prograde(gto, nu, 50.0).energy_change
    assert nu[np.argmax(gained)] == pytest.approx(0.0, abs=1e-12)
    assert abs(nu[np.argmin(gained)]) == pytest.approx(math.pi)
    np.testing.assert_allclose(gained, energy_gain(gto.speed(nu), 50.0), rtol=1e-13)


def test_half_angle_cos_sin_match_numpy():
    # The burn kernels take cos and sin from tan(nu/2); they must agree with
    # NumPy's cos and sin to a few ulp, also at +-pi and beyond one turn.
    nu = np.concatenate([np.linspace(-math.pi, math.pi, 100001), [0.0, -0.0, 7.5, -40.0, 1e3]])
    cos_nu, sin_nu = _cos_sin(nu)
    # Beyond one turn, the halving and NumPy's own range reduction differ by
    # about the rounding of nu itself (ulp(1e3) ~ 1e-13).
    tolerance = 1e-15 * np.maximum(1.0, 100.0 * np.abs(nu) * (np.abs(nu) > math.pi))
    assert (np.abs(cos_nu - np.cos(nu)) <= tolerance).all()
    assert (np.abs(sin_nu - np.sin(nu)) <= tolerance).all()


# ---------------------------------------------------------------- independent route: integration
@pytest.mark.parametrize(
    "rp, ra, nu, radial, transverse",
    [
        (EARTH.radius + 300e3, EARTH.radius + 300e3, 0.0, 0.0, 2425.0),  # Hohmann-like raise
        (EARTH.radius + 250e3, 42164e3, 2.5, 150.0, -300.0),  # mixed burn on a transfer orbit
        (7000e3, 12000e3, -1.0, -400.0, 250.0),  # radial-in and prograde
    ],
)
def test_burn_apsides_agree_with_integrated_trajectory(rp, ra, nu, radial, transverse):
    # Independent route: start from the state after the burn (position before,
    # velocity before + dv) and integrate the two-body equations with scipy's
    # DOP853 at rtol 1e-12 for one period; the radius extremes must be the
    # apsides of the predicted conic.
    before = Conic.from_apsides(rp, ra, MU, argp=0.4)
    r_vec, v_vec = before.state(nu)
    v_vec = v_vec + _rtn_to_inertial(before, nu, radial, transverse)
    out = burn(before, nu, radial, transverse)
    assert float(out.after.e) < 1.0

    sol = propagate(
        r_vec, v_vec, MU, 1.02 * float(out.after.period), rtol=1e-12, atol=1e-6, events=apsis_event()
    )
    apsis_radii = np.hypot(sol.y_events[0][:, 0], sol.y_events[0][:, 1])
    assert apsis_radii.min() == pytest.approx(float(out.after.rp), rel=1e-9)
    assert apsis_radii.max() == pytest.approx(float(out.after.ra), rel=1e-9)
    # And the energy after matches the integrated state's (vis-viva).
    assert float(out.after.energy) == pytest.approx(specific_energy(r_vec, v_vec, MU), rel=1e-12)


# ---------------------------------------------------------------- properties
@given(rp=radii, e=eccentricities, argp=angles, nu=angles, radial=burn_components, transverse=burn_components)
def test_energy_change_is_the_difference_of_orbit_energies(rp, e, argp, nu, radial, transverse):
    before = _conic(rp, e, argp)
    assume(_reachable(before, nu))
    out = burn(before, nu, radial, transverse)
    assume(np.isfinite(out.energy_change))
    difference = float(out.after.energy - before.energy)
    scale = float(before.speed(nu)) * math.hypot(radial, transverse) + radial**2 + transverse**2
    # The difference of two orbit energies carries rounding of order eps * mu / r
    # (the size of the terms that cancel in them); the burn's own energy change
    # is the accurate side.
    # (and eps times the energies themselves, larger than mu / r near a hyperbola's asymptote).
    # A nearly radial orbit after the burn (e -> 1) holds its energy -mu (1 - e) / (2 rp)
    # only to eps / |1 - e|: there the reference, not the burn, is inexact.
    assume(abs(1.0 - float(out.after.e)) > 1e-6)
    rounding = 1e-14 * (MU / float(before.radius(nu)) + abs(float(before.energy)))
    assert float(out.energy_change) == pytest.approx(difference, abs=1e-9 * scale + rounding)


@given(rp=radii, e=eccentricities, argp=angles, nu=angles, radial=burn_components, transverse=burn_components)
def test_state_after_is_position_before_and_velocity_plus_dv(rp, e, argp, nu, radial, transverse):
    before = _conic(rp, e, argp)
    assume(_reachable(before, nu))
    out = burn(before, nu, radial, transverse)
    assume(np.isfinite(out.nu_after))
    # In inertial axes: a burn that reverses the motion turns the plane over
    # (inc = pi), whose own plane axes are the mirror image of the old ones.
    r_before, v_before = before.state(nu, "inertial")
    r_after, v_after = out.after.state(out.nu_after, "inertial")
    r = float(np.linalg.norm(r_before))
    np.testing.assert_allclose(r_after, r_before, rtol=0, atol=1e-9 * r)
    expected_v = v_before + np.append(_rtn_to_inertial(before, nu, radial, transverse), 0.0)
    speed = float(np.linalg.norm(expected_v)) + 1.0
    np.testing.assert_allclose(v_after, expected_v, rtol=0, atol=1e-9 * speed)
    assert -math.pi <= out.nu_after <= math.pi
    assert out.dv == pytest.approx(math.hypot(radial, transverse))


@given(rp=radii, e=eccentricities, nu=angles, dv=st.floats(-3000.0, 3000.0))
def test_prograde_is_burn_along_the_velocity(rp, e, nu, dv):
    before = _conic(rp, e, 0.7)
    assume(_reachable(before, nu))
    vr, vt = before.velocity(nu)
    v = math.hypot(vr, vt)
    assume(dv > -0.999 * v)
    along = burn(before, nu, dv * vr / v, dv * vt / v)
    prograde = burn_prograde(before, nu, dv)
    for name in ("rp", "e"):
        assert getattr(prograde.after, name) == pytest.approx(getattr(along.after, name), rel=1e-9, abs=1e-12)
    assert (
        np.cos(prograde.after.argp - along.after.argp) == pytest.approx(1.0, abs=1e-9)
        or float(along.after.e) < 1e-9
    )
    assert prograde.energy_change == pytest.approx(along.energy_change, rel=1e-9, abs=1e-6)
    assert prograde.dv == pytest.approx(abs(dv))


@given(
    st.lists(
        st.tuples(radii, st.floats(0.0, 0.95), angles, angles, burn_components, burn_components),
        min_size=1,
        max_size=8,
    )
)
def test_arrays_equal_loop_of_scalar_calls(rows):
    rp, e, argp, nu, radial, transverse = (np.array(column) for column in zip(*rows))
    many = burn(Conic(rp, e, MU, argp), nu, radial, transverse)
    many_prograde = burn_prograde(Conic(rp, e, MU, argp), nu, transverse)
    for i, row in enumerate(rows):
        one = burn(_conic(row[0], row[1], row[2]), row[3], row[4], row[5])
        one_prograde = burn_prograde(_conic(row[0], row[1], row[2]), row[3], row[5])
        for a, b in ((many, one), (many_prograde, one_prograde)):
            for name in ("rp", "e", "argp", "mu"):
                assert np.asarray(getattr(a.after, name))[i] == pytest.approx(
                    float(getattr(b.after, name)), rel=1e-14, abs=1e-15, nan_ok=True
                )
            for name in ("nu", "dv", "energy_change", "nu_after"):
                assert np.asarray(getattr(a, name))[i] == pytest.approx(
                    float(getattr(b, name)), rel=1e-14, abs=1e-12, nan_ok=True
                )


def test_blocked_evaluation_equals_small_calls():
    # Above 2 * _BLOCK elements the work is split in cache-sized blocks; the
    # result must not depend on it, also for a broadcast grid.
    rng = np.random.default_rng(7)
    n = 2 * _BLOCK + 1234
    rp = rng.uniform(6.7e6, 4e7, n)
    e = rng.uniform(0.0, 2.0, n)
    nu = rng.uniform(-math.pi, math.pi, n)
    dv = rng.uniform(-4000.0, 4000.0, n)
    conic = Conic(rp, e, MU, rng.uniform(-3, 3, n))
    big = burn_prograde(conic, nu, dv)
    parts = [burn_prograde(conic[s], nu[s], dv[s]) for s in (slice(0, 1000), slice(1000, n))]
    for name in ("rp", "e", "argp"):
        joined = np.concatenate([np.atleast_1d(getattr(p.after, name)) for p in parts])
        np.testing.assert_array_equal(getattr(big.after, name), joined)
    np.testing.assert_array_equal(big.energy_change, np.concatenate([p.energy_change for p in parts]))
    assert np.isnan(big.energy_change).any() and np.isfinite(big.energy_change).any()

    grid_nu = np.linspace(-math.pi, math.pi, 300)[:, None]
    grid_dv = np.linspace(-500.0, 500.0, 300)[None, :]
    gto = Conic.from_apsides(6.7e6, 4.2e7, MU, 0.2)
    grid = burn(gto, grid_nu, radial=0.1 * grid_dv, transverse=grid_dv)
    rows = [burn(gto, grid_nu[i], radial=0.1 * grid_dv[0], transverse=grid_dv[0]) for i in (0, 150, 299)]
    for i, row in zip((0, 150, 299), rows):
        np.testing.assert_array_equal(grid.after.rp[i], row.after.rp)
        np.testing.assert_array_equal(grid.nu_after[i], row.nu_after)
    assert grid.after.shape == (300, 300) and grid.nu.shape == (300, 300)


# ---------------------------------------------------------------- infeasible outcomes: NaN, rest untouched
def test_stopping_the_motion_is_nan_only_there_and_reversing_gives_the_retrograde_orbit():
    circle = Conic.circular(7000e3, MU)
    v = float(circle.speed(0.0))
    dv = np.array([100.0, -v, -1.5 * v, -0.5 * v])
    out = burn_prograde(circle, 0.0, dv)
    # dv = -v stops the vehicle: no angular momentum, no conic (NaN there only)
    assert np.isnan(out.energy_change[1]) and np.isnan(out.after.rp[1]) and np.isnan(out.nu_after[1])
    assert np.isfinite(out.energy_change[[0, 2, 3]]).all() and np.isfinite(out.after.e[[0, 2, 3]]).all()
    alone = burn_prograde(circle, 0.0, dv[[0, 3]])
    np.testing.assert_array_equal(out.after.rp[[0, 3]], alone.after.rp)
    np.testing.assert_array_equal(out.dv, np.abs(dv))  # the asked-for magnitude stays
    # dv = -1.5 v leaves the vehicle at half the circular speed, going the other
    # way: the retrograde orbit (inc = pi) whose periapsis speed is 0.5 v at the
    # burn point, now its apoapsis (common practice: a circle's speed times 0.5
    # gives e = 1 - 0.5^2 = 0.75 with the burn point at apoapsis).
    assert out.after.inc[2] == np.pi and out.after.inc[0] == 0.0
    assert out.after.e[2] == pytest.approx(0.75, rel=1e-14)
    assert out.after.ra[2] == pytest.approx(7000e3, rel=1e-14)
    assert out.energy_change[2] == pytest.approx(v * dv[2] + 0.5 * dv[2] ** 2, rel=1e-15)
    r_vec, v_vec = out.after[2].state(out.nu_after[2], "inertial")
    np.testing.assert_allclose(r_vec, [7000e3, 0.0, 0.0], atol=1e-6)
    np.testing.assert_allclose(v_vec, [0.0, -0.5 * v, 0.0], atol=1e-9)
    # Transverse burn that leaves exactly zero angular momentum (pure radial motion).
    zero_h = burn(circle, 0.0, radial=[0.0, 10.0], transverse=[-v, -10.0])
    assert np.isnan(zero_h.after.rp[0]) and np.isfinite(zero_h.after.rp[1])


def test_reversed_cells_of_a_sweep_grid_are_retrograde_orbits():
    # On a burn point x delta-v grid the feasibility check works on the grid's
    # factors; the cells that reverse the motion are exactly those with dv < -v,
    # and they are the retrograde orbits (inc = pi), not NaN.
    gto = Conic.from_apsides(6.7e6, 4.2e7, MU)
    nu = np.linspace(-math.pi, math.pi, 41)[:, None]
    dv = np.linspace(-12000.0, 500.0, 60)[None, :]
    out = burn_prograde(gto, nu, dv)
    reversed_ = dv < -gto.speed(nu)
    assert reversed_.any() and (~reversed_).any()
    assert np.isfinite(out.energy_change).all() and np.isfinite(out.after.rp).all()
    np.testing.assert_array_equal(out.after.inc == np.pi, reversed_)
    np.testing.assert_array_equal(out.after.inc == 0.0, ~reversed_)
    transverse = burn(gto, nu, transverse=dv)
    np.testing.assert_array_equal(transverse.after.inc == np.pi, dv < -gto.velocity(nu)[1])


def test_point_a_hyperbola_never_reaches_is_nan():
    hyperbola = Conic.from_vinf(7000e3, 3000.0, MU)
    limit = float(hyperbola.true_anomaly_limit)
    out = burn(hyperbola, [0.0, limit + 0.1, -limit - 0.2], transverse=10.0)
    assert np.isfinite(out.after.rp[0]) and np.isnan(out.after.rp[1:]).all()
    assert np.isnan(burn_prograde(hyperbola, limit + 0.1, 10.0).energy_change)


def test_scalars_in_give_numpy_scalars_and_units_in_repr():
    out = burn_prograde(Conic.circular(MARS.radius + 400e3, MARS.mu), 0.0, 100.0)
    assert isinstance(out, BurnOutcome)
    for value in (out.nu, out.dv, out.energy_change, out.nu_after, out.after.rp):
        assert isinstance(value, np.floating)
    text = repr(out)
    assert "J/kg" in text and "m/s" in text


def test_empty_arrays_give_empty_outcomes():
    out = burn_prograde(Conic.circular(7000e3, MU), np.zeros((0, 3)), 1.0)
    assert out.after.shape == (0, 3) and out.energy_change.shape == (0, 3)


def test_results_are_read_only():
    conic = Conic(np.full(3, 7e6), 0.1, MU)
    out = burn(conic, 0.0, transverse=[1.0, 2.0, 3.0])
    with pytest.raises(ValueError):
        out.after.rp[0] = 1.0
    with pytest.raises(dataclasses.FrozenInstanceError):
        out.energy_change = 0.0  # frozen dataclass


# ---------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "call, match",
    [
        (lambda c: burn(c, np.nan, 1.0), "`nu` must be finite"),
        (lambda c: burn(c, 0.0, radial=np.inf), "`radial` must be finite"),
        (lambda c: burn(c, 0.0, transverse=[1.0, np.nan]), r"`transverse` must be finite.*1 of 2"),
        (lambda c: burn_prograde(c, np.inf, 1.0), "`nu` must be finite"),
        (lambda c: burn_prograde(c, 0.0, np.nan), "`dv` must be finite"),
        (lambda c: energy_gain(-1.0, 1.0), r"`v` must be >= 0 m/s"),
        (lambda c: energy_gain(1.0, np.inf), "`dv` must be finite"),
        (lambda c: burn(c, "north", 1.0), "`nu` must be a real number"),
    ],
)
def test_bad_input_names_the_parameter(call, match):
    with pytest.raises(DomainError, match=match):
        call(Conic.circular(7000e3, MU))


def test_conic_must_be_a_conic():
    with pytest.raises(TypeError, match="`conic` must be a deltakit.Conic"):
        burn((7000e3, 0.0, MU), 0.0, 1.0)
    with pytest.raises(TypeError, match="`conic`"):
        burn_prograde(None, 0.0, 1.0)
