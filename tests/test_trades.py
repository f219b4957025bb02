"""Ready-made trades: published break-even ratios, best burn points, propellant grids.

Outside sources
---------------
* Bi-elliptic versus Hohmann between circular orbits: the bi-elliptic transfer
  can beat the Hohmann transfer only for r2/r1 > 11.94 (with rb large enough)
  and beats it for every rb > r2 once r2/r1 > 15.58. Curtis, Orbital Mechanics
  for Engineering Students, 3rd ed., Sec. 6.4; Vallado, Fundamentals of
  Astrodynamics and Applications, 4th ed., Sec. 6.3. The sharper values
  11.938765 and 15.581719 are quoted from memory.
* The same two ratios are found again independently here: from the textbook
  closed forms of both transfers (written out in this file, not taken from
  deltakit) with scipy's root finder.
* Vis-viva, v^2 = mu (2/r - 1/a), for the speeds at the apsides (any
  astrodynamics text, e.g. Curtis 3rd ed. Eq. 2.81; common practice).
"""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st
from scipy.optimize import brentq

xr = pytest.importorskip("xarray")
da = pytest.importorskip("dask.array")

import deltakit as dk
from deltakit.constants import EARTH, MARS
from deltakit.trades import (
    best_burn_point,
    bielliptic_break_even,
    prograde_energy_change,
    propellant_grid,
)

# Published thresholds (see module docstring) and the grid step used to find them.
SOME_WIN_PUBLISHED = 11.94
ALL_WIN_PUBLISHED = 15.58
STEP = 0.005


# ---------------------------------------------------------------------- textbook closed forms
def hohmann_total(ratio):
    """Hohmann total in circular speeds at r1 (Curtis 3rd ed. Sec. 6.3, from memory)."""
    return (np.sqrt(2 * ratio / (1 + ratio)) - 1) + (np.sqrt(1 / ratio) - np.sqrt(2 / (ratio * (1 + ratio))))


def bielliptic_total(ratio, rb):
    """Bi-elliptic total in circular speeds at r1, r1 = 1 (Curtis 3rd ed. Sec. 6.4, from memory)."""
    a1, a2 = (1 + rb) / 2, (ratio + rb) / 2
    first = np.sqrt(2 - 1 / a1) - 1
    second = np.sqrt(2 / rb - 1 / a2) - np.sqrt(2 / rb - 1 / a1)
    third = np.sqrt(2 / ratio - 1 / a2) - np.sqrt(1 / ratio)
    return first + second + abs(third)


def some_win_root():
    # rb -> infinity: the bi-elliptic total tends to (sqrt(2) - 1)(1 + 1/sqrt(R))
    return brentq(lambda r: hohmann_total(r) - (np.sqrt(2) - 1) * (1 + 1 / np.sqrt(r)), 5.0, 14.0, xtol=1e-12)


def all_win_root():
    # every rb > r2 wins once the advantage grows from zero as rb leaves r2
    def slope(r, h=1e-6):
        return (hohmann_total(r) - bielliptic_total(r, r * (1 + h))) / (r * h)

    return brentq(slope, 13.0, 18.0, xtol=1e-12)


# ---------------------------------------------------------------------- bi-elliptic break-even
@pytest.fixture(scope="module")
def break_even():
    ratios = np.round(np.arange(11.0, 17.0 + STEP / 2, STEP), 6)
    rb = np.concatenate([np.arange(11.0, 60.0, STEP), np.geomspace(60.0, 1e12, 600)])
    return bielliptic_break_even(ratios, rb)


def test_break_even_ratios_match_the_published_values(break_even):
    some = float(break_even["ratio_some_win"])
    every = float(break_even["ratio_all_win"])
    assert some == pytest.approx(SOME_WIN_PUBLISHED, abs=0.01)
    assert every == pytest.approx(ALL_WIN_PUBLISHED, abs=0.01)
    # and the independent roots of the textbook closed forms, to the grid step
    assert some_win_root() == pytest.approx(11.938765, abs=1e-5)  # published, from memory
    assert all_win_root() == pytest.approx(15.581719, abs=1e-4)  # published, from memory
    assert some - STEP <= some_win_root() <= some + 1e-9
    assert every - STEP <= all_win_root() <= every + 1e-9


def test_break_even_curve_against_a_root_finder(break_even):
    """rb/r1 above which bi-elliptic wins, between the two thresholds."""
    curve = break_even["rb_break_even"]
    for ratio in (12.5, 13.0, 14.0, 15.0):
        root = brentq(lambda rb, r=ratio: hohmann_total(r) - bielliptic_total(r, rb), ratio * (1 + 1e-6), 1e9)
        assert float(curve.sel(r2_ratio=ratio)) == pytest.approx(root, rel=2e-3)
    # below the first threshold no rb wins; beyond the second, every rb above r2 does
    assert curve.sel(r2_ratio=slice(None, 11.93)).isnull().all()
    beyond = curve.sel(r2_ratio=slice(15.6, None))
    np.testing.assert_allclose(beyond, beyond["r2_ratio"], atol=STEP + 1e-9)
    # between them the break-even radius falls as the target moves out
    between = curve.sel(r2_ratio=slice(12.0, 15.5)).values
    assert np.all(np.diff(between) < 0)


def test_advantage_is_the_sign_of_the_transfers(break_even):
    adv = break_even["advantage"].sel(r2_ratio=[12.0, 14.0], rb_ratio=[20.0, 1000.0], method="nearest")
    for ratio in adv["r2_ratio"].values:
        for rb in adv["rb_ratio"].values:
            expected = hohmann_total(ratio) - bielliptic_total(ratio, rb)
            assert float(adv.sel(r2_ratio=ratio, rb_ratio=rb)) == pytest.approx(expected, rel=1e-9, abs=1e-12)
    assert break_even["advantage"].attrs["units"] == "1"
    assert break_even["bielliptic_wins"].dtype == bool
    # rb below r2 is no bi-elliptic transfer at all
    assert break_even["advantage"].sel(r2_ratio=16.0, rb_ratio=12.0, method="nearest").isnull()


def test_break_even_lazy_equals_eager():
    ratios = np.linspace(11.0, 17.0, 61)
    rb = np.geomspace(11.0, 1e9, 300)
    eager = bielliptic_break_even(ratios, rb)
    lazy = bielliptic_break_even(ratios, rb, chunks={"r2_ratio": 16, "rb_ratio": 64})
    assert isinstance(lazy["advantage"].data, da.Array)
    xr.testing.assert_identical(lazy.compute(), eager)


# ---------------------------------------------------------------------- best burn point
def vis_viva(r, a, mu):
    return np.sqrt(mu * (2 / r - 1 / a))


def test_prograde_burns_best_at_periapsis_retrograde_at_apoapsis():
    rp = np.array([6700e3, 7000e3, 9000e3])
    ra = np.array([6700e3, 12000e3, 42164e3])
    best = best_burn_point(rp, ra, [-150.0, 10.0, 400.0], EARTH.mu)
    assert best["nu_best"].dims == ("dv", "rp", "ra")
    exists = best["rp"] <= best["ra"]
    nu_best = best["nu_best"]
    strictly_elliptic = best["rp"] < best["ra"]
    # Oberth: the same delta-v adds most energy where the speed is highest (common practice)
    assert (nu_best.sel(dv=[10.0, 400.0]).where(exists) == 0.0).sum() == 2 * int(exists.sum())
    assert (nu_best.sel(dv=-150.0).where(strictly_elliptic) == np.pi).sum() == int(strictly_elliptic.sum())
    # no orbit with ra < rp: NaN, not an error
    assert best["energy_change_best"].where(~exists).isnull().all()
    assert best["nu_best"].attrs["units"] == "rad"
    assert best["burn_point_benefit"].attrs["units"] == "J/kg"


@pytest.mark.parametrize("dv", [5.0, 120.0, 900.0])
def test_benefit_is_the_apsis_speed_difference_times_dv(dv):
    """Best minus worst = (v_p - v_a) dv for a prograde burn: the dv^2/2 terms cancel."""
    rp, ra = np.array([MARS.radius + 250e3]), np.array([MARS.radius + 4000e3, MARS.radius + 33000e3])
    best = best_burn_point(rp, ra, dv, MARS.mu)
    a = (rp[:, None] + ra[None, :]) / 2
    expected = (vis_viva(rp[:, None], a, MARS.mu) - vis_viva(ra[None, :], a, MARS.mu)) * dv
    np.testing.assert_allclose(best["burn_point_benefit"].values, expected, rtol=1e-9)
    # and the best energy change is the one burn_prograde gives at periapsis
    orbit = dk.Conic.from_apsides(rp[:, None], ra[None, :], MARS.mu)
    np.testing.assert_allclose(
        best["energy_change_best"].values, dk.burn_prograde(orbit, 0.0, dv).energy_change, rtol=1e-12
    )


def test_best_burn_point_lazy_equals_eager():
    axes = {
        "rp": np.linspace(6700e3, 9000e3, 9),
        "ra": np.linspace(8000e3, 60000e3, 11),
        "dv": [-50.0, 30.0, 300.0],
    }
    eager = best_burn_point(mu=EARTH.mu, **axes)
    lazy = best_burn_point(mu=EARTH.mu, chunks={"nu": 90, "rp": 4}, **axes)
    assert isinstance(lazy["energy_change_best"].data, da.Array)
    xr.testing.assert_identical(lazy.compute(), eager)


def _energy_change_exact(nu, dv, rp, ra, mu):
    """v dv + dv^2/2 with vis-viva on the conic equation, in 40-digit arithmetic (mpmath).

    Vis-viva and the conic equation (common practice; Curtis 3rd ed. Eq. 2.81
    and 2.45); evaluated exactly enough that its own rounding is irrelevant.
    """
    with mpmath.workdps(40):
        rp, ra, mu, nu, dv = (mpmath.mpf(x) for x in (rp, ra, mu, nu, dv))
        e = (ra - rp) / (ra + rp)
        a, p = (rp + ra) / 2, 2 * rp * ra / (rp + ra)
        r = p / (1 + e * mpmath.cos(nu))
        v = mpmath.sqrt(mu * (2 / r - 1 / a))
        return float(v), float(v * dv + dv * dv / 2)


@given(
    nu=st.floats(-7.0, 7.0),
    dv=st.floats(-3000.0, 3000.0),
    rp=st.floats(6500e3, 50000e3),
    span=st.floats(0.0, 400000e3),
)
def test_prograde_energy_change_is_the_oberth_gain_at_the_conic_speed(nu, dv, rp, span):
    ra = rp + span
    speed, expected = _energy_change_exact(nu, dv, rp, ra, EARTH.mu)
    assume(abs(speed + dv) > 1e-9 * speed)  # not on the edge where the burn stops the vehicle
    # A burn with dv < -v reverses the motion (as burn_prograde does): still v dv + dv^2/2. Near
    # dv = -2v the speed comes back to v and the factor v + dv/2 cancels: the relative accuracy of
    # the result is then eps * v / |v + dv/2|, so those few cases are left out of the relative check.
    assume(abs(speed + 0.5 * dv) > 1e-3 * speed)
    got = float(prograde_energy_change(nu, dv, rp, ra, EARTH.mu))
    assert got == pytest.approx(expected, rel=1e-12, abs=0.0)


def test_prograde_energy_change_equals_burn_prograde_and_keeps_apoapsis_digits():
    rng = np.random.default_rng(8)  # invented Earth orbits, up to lunar distance
    rp = rng.uniform(6600e3, 20000e3, 500)
    ra = rp + rng.uniform(0.0, 4e8, 500)
    nu, dv = rng.uniform(-np.pi, np.pi, 500), rng.uniform(-500.0, 3000.0, 500)
    twin = dk.burn_prograde(dk.Conic.from_apsides(rp, ra, EARTH.mu), nu, dv).energy_change
    np.testing.assert_allclose(prograde_energy_change(nu, dv, rp, ra, EARTH.mu), twin, rtol=1e-10)
    # at apoapsis of an orbit reaching 1e6 periapsis radii the speed is tiny and exact here
    _, exact = _energy_change_exact(np.pi, 1.0, 7000e3, 7e12, EARTH.mu)
    assert float(prograde_energy_change(np.pi, 1.0, 7000e3, 7e12, EARTH.mu)) == pytest.approx(
        exact, rel=1e-14
    )


def test_prograde_energy_change_checks_its_inputs():
    with pytest.raises(dk.DomainError, match="`ra` must be > 0 m"):
        prograde_energy_change(0.0, 10.0, 7e6, -1.0, EARTH.mu)
    with pytest.raises(dk.DomainError, match="`nu` must be finite"):
        prograde_energy_change(np.nan, 10.0, 7e6, 8e6, EARTH.mu)
    with pytest.raises(dk.DomainError, match="`dv` must be finite"):
        best_burn_point(7e6, 8e6, [np.inf], EARTH.mu)
    with pytest.raises(dk.DomainError, match="`m0` must be > 0 kg"):
        propellant_grid(100.0, [0.0, 1000.0], 3000.0)


# ---------------------------------------------------------------------- propellant over vehicles
def test_budget_and_sweep_give_the_same_propellant():
    m0s = np.array([650.0, 1200.0, 2400.0])
    ves = np.array([2200.0, 3100.0, 4400.0])
    lines = [("departure", 820.0, 0.05), ("mid-course", 35.0, 0.5), ("capture", 910.0, 0.03)]
    grid = propellant_grid(sum(dv * (1 + margin) for _, dv, margin in lines), m0s, ves)
    for m0 in m0s:
        for ve in ves:  # the test's own loop: one Budget per vehicle, the oracle
            budget = dk.Budget(m0, ve)
            for label, dv, margin in lines:
                budget.add(label, dv, margin=margin)
            cell = grid.sel(m0=m0, ve=ve)
            assert float(cell["propellant"]) == pytest.approx(float(budget.propellant), rel=1e-12)
            assert float(cell["final_mass"]) == pytest.approx(float(budget.final_mass), rel=1e-12)
    assert grid["propellant"].attrs["units"] == "kg"
    assert grid["m0"].attrs["units"] == "kg" and grid["ve"].attrs["units"] == "m/s"
    assert float(grid["dv"]) == pytest.approx(sum(dv * (1 + margin) for _, dv, margin in lines))


def test_rocket_equation_fraction():
    """dv = ve spends 1 - 1/e of the initial mass (rocket equation; common practice)."""
    grid = propellant_grid([0.0, 3000.0], [500.0, 1000.0], 3000.0)
    np.testing.assert_allclose(grid["propellant_fraction"].sel(dv=3000.0), 1 - np.exp(-1), rtol=1e-14)
    assert (grid["propellant"].sel(dv=0.0) == 0).all()
    assert grid["propellant_fraction"].dims == ("dv", "m0")


def test_propellant_grid_lazy_and_bad_input():
    eager = propellant_grid(np.linspace(0, 4000, 41), np.linspace(300, 3000, 28), np.linspace(2000, 4500, 26))
    lazy = propellant_grid(
        np.linspace(0, 4000, 41), np.linspace(300, 3000, 28), np.linspace(2000, 4500, 26), chunks=500
    )
    xr.testing.assert_identical(lazy.compute(), eager)
    with pytest.raises(dk.DomainError, match="`ve` must be > 0"):
        propellant_grid(100.0, [1000.0], [3000.0, -1.0])
    with pytest.raises(dk.DomainError, match="`r2_ratio` must be > 0"):
        bielliptic_break_even([0.0, 12.0], [20.0])
    with pytest.raises(dk.DomainError, match="`r2_ratio` must be increasing"):
        bielliptic_break_even([14.0, 12.0], [20.0])
