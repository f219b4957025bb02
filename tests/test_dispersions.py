"""Dispersions: zero spread is the nominal, a normal specific impulse matches first-order
propagation of the rocket equation within the sampling error, seeds and chunks give the
same numbers, dask equals memory, causes move together, and bad specifications are refused.

The vehicle is invented for the tests (the "Fescue" relay tug).
"""

from __future__ import annotations

import math
from statistics import NormalDist

import numpy as np
import pytest

import deltakit as dk
from deltakit import Budget, Normal, Triangular, Uniform, disperse

pytest.importorskip("xarray")
G0 = 9.80665  # standard gravity, m/s^2 (exact by definition: CGPM 1901)
MAIN_ISP, RCS_ISP = 321.0, 224.0  # invented


def fescue(margin: float = 0.0) -> Budget:
    """Ten lines on two systems, a jettison and a docking (invented numbers)."""
    b = Budget(name="Fescue relay tug", dry_mass=900.0)
    b.system("main", dk.exhaust_velocity(MAIN_ISP), 1650.0).system("rcs", dk.exhaust_velocity(RCS_ISP), 60.0)
    for i, dv in enumerate([620.0, 410.0, 95.0, 300.0, 150.0, 220.0, 80.0]):
        b.add(f"main burn {i + 1}", dv, margin=margin)
    b.add("attitude upkeep", 14.0, system="rcs", margin=margin)
    b.jettison("release sensor pod", 45.0)
    b.add("final trim", 9.0, system="rcs", margin=margin)
    b.add_mass("dock with depot", 120.0)
    return b


def one_engine() -> Budget:
    return (
        Budget(2000.0, dk.exhaust_velocity(MAIN_ISP), name="one engine", dry_mass=820.0)
        .add("a", 1800.0)
        .add("b", 900.0)
    )


def test_zero_spread_gives_the_nominal_in_every_percentile():
    b = fescue(margin=0.05)
    ds = disperse(
        b,
        samples=5000,
        seed=3,
        isp={"main": Normal(0.0), "rcs": Uniform(0.0, 0.0)},
        dry_mass=Triangular(0.0, 0.0, 0.0),
        dv=Normal(0.0, relative=True),
    )
    for name, use in b.usage.items():
        p = ds.percentiles.sel(system=name)
        np.testing.assert_allclose(p.sel(quantity="propellant_used"), use.used, rtol=1e-12)
        np.testing.assert_allclose(p.sel(quantity="propellant_left"), use.left, rtol=1e-12)
        np.testing.assert_allclose(p.sel(quantity="shortfall"), use.shortfall, atol=1e-9)
        assert float(ds.nominal.sel(system=name, quantity="propellant_used")) == pytest.approx(
            use.used, rel=1e-12
        )
    assert float(ds.probability_closes) == 1.0 and b.closes
    np.testing.assert_allclose(ds.final_mass, float(b.final_mass), rtol=1e-12)
    assert np.all(ds.sensitivity.values == 0.0)


def test_margins_left_out_disperse_the_bare_delta_v():
    with_margins = fescue(margin=0.1)
    bare = fescue(margin=0.0)
    ds = disperse(with_margins, samples=100, seed=0, isp=Normal(0.0), margins=False)
    np.testing.assert_allclose(
        ds.percentiles.sel(system="main", quantity="propellant_used", percentile=50),
        bare.usage["main"].used,
        rtol=1e-12,
    )


def test_normal_specific_impulse_matches_first_order_propagation():
    # One engine: propellant P = m0 (1 - exp(-D / (g0 Isp))), so to first order
    # sigma_P = |dP/dIsp| sigma_Isp with dP/dIsp = -m0 exp(-D/ve) D g0 / ve^2
    # (the rocket equation differentiated; the second-order term is of
    # relative size (sigma/Isp)^2 ~ 1e-5 here, far below the sampling error).
    b = one_engine()
    sigma, n = 1.2, 200_000
    ds = disperse(b, samples=n, seed=11, isp={"main": Normal(sigma)})
    ve, m0, total = dk.exhaust_velocity(MAIN_ISP), 2000.0, 2700.0
    nominal = m0 * -math.expm1(-total / ve)
    slope = -m0 * math.exp(-total / ve) * total * G0 / ve**2
    sigma_p = abs(slope) * sigma
    used = ds.percentiles.sel(system="main", quantity="propellant_used")
    for level in used.percentile.values:
        z = NormalDist().inv_cdf(level / 100.0)
        expected = nominal + z * sigma_p  # P rises as Isp falls: the same z on the other side
        # standard error of a sample quantile: sqrt(p (1 - p) / n) / pdf(quantile)
        p = level / 100.0
        error = math.sqrt(p * (1 - p) / n) * sigma_p / NormalDist().pdf(z)
        assert abs(float(used.sel(percentile=level)) - expected) < 4.5 * error + 1e-5 * sigma_p, level
    left = ds.percentiles.sel(system="main", quantity="propellant_left", percentile=50)
    # the median's standard error: sqrt(pi / 2) sigma / sqrt(n)
    assert float(left) == pytest.approx(b.usage["main"].left, abs=4.5 * 1.2533 * sigma_p / math.sqrt(n))


def test_two_systems_follow_first_order_propagation_of_the_main_engine():
    # The rcs burns after the main ones: its propellant also moves with the main
    # engine's Isp (through the mass left). Slopes by central differences of the
    # nominal budget (well conditioned: h = 0.01 s, P ~ 1e3 kg, slope ~ 1 kg/s).
    b = fescue()
    sigma, n, h = 1.0, 200_000, 0.01

    def used(isp):
        c = fescue()
        c.system("main", dk.exhaust_velocity(isp), 1650.0)
        return {k: u.used for k, u in c.usage.items()}

    up, down = used(MAIN_ISP + h), used(MAIN_ISP - h)
    ds = disperse(b, samples=n, seed=5, isp={"main": Normal(sigma)})
    for name in ("main", "rcs"):
        slope = (up[name] - down[name]) / (2 * h)
        sigma_p = abs(slope) * sigma
        for level in (10.0, 50.0, 90.0):
            z = NormalDist().inv_cdf(level / 100.0)
            expected = b.usage[name].used + z * sigma_p
            p = level / 100.0
            error = math.sqrt(p * (1 - p) / n) * sigma_p / NormalDist().pdf(z)
            got = float(ds.percentiles.sel(system=name, quantity="propellant_used", percentile=level))
            assert abs(got - expected) < 4.5 * error + 1e-4 * sigma_p, (name, level)


def test_each_sample_is_the_budget_flown_with_that_sample_s_inputs():
    # An independent route: rebuild the budget by hand for a few samples with the
    # drawn specific impulses, dry mass and delta-v, and fly it with Budget.
    b = fescue(margin=0.03)
    ds = disperse(
        b,
        samples=3000,
        seed=8,
        isp={"main": Normal(2.0), "rcs": Normal(4.0)},
        dry_mass=Normal(20.0),
        dv=Normal(0.02, relative=True),
    )
    for s in (0, 17, 1234, 2999):
        c = Budget(name="by hand", dry_mass=float(ds.dry_mass[s]))
        c.system("main", G0 * float(ds.isp[s, 0]), 1650.0).system("rcs", G0 * float(ds.isp[s, 1]), 60.0)
        for i, line in enumerate(b.lines):
            flown = float(ds.dv[s, i])  # the flown delta-v, margin included
            if line.kind == "burn":
                c.add(line.label, flown, system=line.system)
            elif line.kind == "jettison":
                c.jettison(line.label, line.mass)
            else:
                c.add_mass(line.label, line.mass)
        for j, name in enumerate(["main", "rcs"]):
            assert float(ds.propellant_used[s, j]) == pytest.approx(c.usage[name].used, rel=1e-12)
        assert bool(ds.closes[s]) == c.closes


def test_same_seed_same_numbers_and_chunks_do_not_matter():
    b = fescue()
    kw = dict(isp={"main": Normal(1.5)}, dv={"final trim": Uniform(-2.0, 2.0)})
    a = disperse(b, samples=150_000, seed=42, **kw)
    again = disperse(b, samples=150_000, seed=42, **kw)
    chunked = disperse(b, samples=150_000, seed=42, chunks=70_000, **kw)
    other = disperse(b, samples=150_000, seed=43, **kw)
    np.testing.assert_array_equal(a.propellant_used, again.propellant_used)
    np.testing.assert_array_equal(a.percentiles, again.percentiles)
    np.testing.assert_array_equal(a.propellant_used, chunked.propellant_used.compute())
    np.testing.assert_array_equal(a.percentiles, chunked.percentiles)
    np.testing.assert_array_equal(a.sensitivity, chunked.sensitivity)
    assert not np.array_equal(a.propellant_used, other.propellant_used)


@pytest.mark.slow
def test_a_million_samples_through_dask_equal_the_in_memory_result():
    b = fescue(margin=0.02)
    kw = dict(
        isp={"main": Normal(1.5), "rcs": Triangular(-6.0, 0.0, 3.0)},
        dry_mass=Normal(0.02, relative=True),
        dv={"main burn 1": Normal(6.0, cause="navigation"), "main burn 2": Normal(4.0, cause="navigation")},
        loss={"main": Triangular(0.0, 0.003, 0.01, relative=True)},
    )
    memory = disperse(b, samples=1_000_000, seed=2024, **kw)
    lazy = disperse(b, samples=1_000_000, seed=2024, chunks=1 << 18, **kw)
    assert lazy.propellant_used.chunks is not None  # dask-backed samples
    np.testing.assert_array_equal(memory.percentiles, lazy.percentiles)
    assert float(memory.probability_closes) == float(lazy.probability_closes)
    np.testing.assert_array_equal(memory.sensitivity, lazy.sensitivity)
    np.testing.assert_array_equal(memory.correlation, lazy.correlation)
    assert list(memory.cause.values) == list(lazy.cause.values)
    np.testing.assert_array_equal(memory.propellant_left[::997], lazy.propellant_left[::997].compute())
    # and the exact order statistics are numpy's percentiles of the samples
    np.testing.assert_allclose(
        memory.percentiles.sel(system="main", quantity="propellant_used"),
        np.percentile(memory.propellant_used.sel(system="main"), memory.percentile),
        rtol=1e-15,
    )


def test_inputs_sharing_a_cause_move_together_and_rank_as_one():
    b = fescue()
    ds = disperse(
        b,
        samples=20_000,
        seed=1,
        dv={
            "main burn 3": Normal(0.08, relative=True, cause="navigation"),
            "main burn 5": Uniform(-40.0, 40.0, cause="navigation"),
            "attitude upkeep": Triangular(-3.0, 0.0, 6.0, cause="navigation"),
            "main burn 7": Normal(1.0),
        },
    )
    moved = ds.dv.sel(line=[3, 5, 8]).values - ds.dv.sel(line=[3, 5, 8]).values.mean(axis=0)
    ranks = np.argsort(np.argsort(moved, axis=0), axis=0)  # comonotone: the same order in every column
    np.testing.assert_array_equal(ranks[:, 0], ranks[:, 1])
    np.testing.assert_array_equal(ranks[:, 0], ranks[:, 2])
    assert sorted(ds.cause.values) == ["dv: line 7 (main burn 7)", "navigation"]
    assert str(ds.cause.values[0]) == "navigation"  # the big shared error drives the spread


def test_sensitivity_names_the_line_that_drives_the_spread():
    b = fescue()
    ds = disperse(
        b,
        samples=50_000,
        seed=9,
        isp={"main": Normal(0.5), "rcs": Normal(0.5)},
        dry_mass=Normal(2.0),
        dv={"main burn 4": Normal(30.0), "main burn 1": Normal(3.0)},
    )
    assert str(ds.cause.values[0]) == "dv: line 4 (main burn 4)"
    assert np.all(np.diff(ds.sensitivity.values) <= 0.0)  # ranked
    # independent causes of a nearly linear budget: the shares add up to about all of the variance
    assert float(ds.sensitivity.sum()) == pytest.approx(1.0, abs=0.02)
    # a lighter vehicle keeps more: dry mass and propellant left are negatively correlated
    assert float(ds.correlation.sel(cause="dry mass", target="all tanks")) < 0.0


def test_a_loss_keyed_by_system_is_one_draw_for_all_its_burns():
    b = fescue()
    ds = disperse(b, samples=4000, seed=2, loss={"main": Uniform(0.0, 0.02, relative=True)})
    nominal = np.array([line.dv for line in b.lines])
    added = (ds.dv.values - nominal) / np.where(nominal > 0, nominal, 1.0)
    main_lines = [i for i, line in enumerate(b.lines) if line.kind == "burn" and line.system is None]
    spread = added[:, main_lines] - added[:, main_lines[:1]]
    assert np.max(np.abs(spread)) < 1e-12
    assert np.all(added[:, main_lines[0]] >= 0.0) and np.all(added[:, main_lines[0]] <= 0.02)
    np.testing.assert_array_equal(ds.dv.values[:, 7], 14.0)  # the rcs line is not an engine loss of main


def test_distributions_draw_what_they_say():
    rng = np.random.default_rng(0)
    n = 400_000
    for spread, mean, var in [
        (Normal(2.0, mean=0.5), 0.5, 4.0),
        (Uniform(-1.0, 3.0), 1.0, 16.0 / 12.0),
        (Triangular(-1.0, 0.0, 4.0), 1.0, (1 + 0 + 16 - 0 - (-4) - 0) / 18.0),
    ]:
        x = spread.draw(rng, np.empty(n))
        assert x.mean() == pytest.approx(mean, abs=5 * math.sqrt(var / n))
        assert x.var() == pytest.approx(var, rel=0.02)
        z = rng.standard_normal(n)  # the same law through the quantile path (shared causes)
        y = spread.from_normal(z)
        assert y.mean() == pytest.approx(mean, abs=5 * math.sqrt(var / n))
        assert y.var() == pytest.approx(var, rel=0.02)


def test_a_tank_that_can_run_short_gives_the_probability_and_the_shortfall():
    b = fescue()
    b.update(7, dv=82.0)  # the rcs tank is tight: it closes at nominal, not always
    assert b.closes and b.usage["rcs"].left < 2.0
    ds = disperse(b, samples=20_000, seed=4, dv={"attitude upkeep": Normal(3.0)})
    closes = ds.closes.values
    short = ds.shortfall.sel(system="rcs").values
    assert 0.05 < float(ds.probability_closes) < 0.95
    np.testing.assert_array_equal(closes, short == 0.0)
    assert float(ds.probability_closes) == closes.mean()
    assert np.all(ds.propellant_left.values >= 0.0)  # never negative: the shortfall says what is missing
    assert np.all(np.isnan(ds.final_mass.values[~closes]))


def test_a_staged_vehicle_disperses():
    b = Budget(name="Fescue lander", dry_mass=300.0).stage("carrier", 250.0, drop="spent")
    b.system("carrier engine", 3100.0, 900.0, stage="carrier").system("lander", 3050.0, 260.0)
    b.add("transfer", 2600.0, system="carrier engine").add("landing", 600.0, system="lander")
    ds = disperse(b, samples=5000, seed=1, stage_mass={"carrier": Normal(10.0)}, isp=Normal(1.0))
    assert set(ds.cause.values) == {"stage dry mass: carrier", "isp: carrier engine", "isp: lander"}
    assert (
        float(ds.percentiles.sel(system="carrier engine", quantity="propellant_left", percentile=50)) == 0.0
    )


def test_the_budget_is_left_as_it_was():
    b = fescue()
    before = b.to_dict()
    disperse(b, samples=100, seed=0, isp=Normal(1.0), dv=Normal(1.0))
    assert b.to_dict() == before


@pytest.mark.parametrize(
    "call, error, name",
    [
        (lambda: Normal(-1.0), dk.DomainError, "sigma"),
        (lambda: Normal(float("nan")), dk.DomainError, "sigma"),
        (lambda: Uniform(2.0, 1.0), dk.DomainError, "high"),
        (lambda: Triangular(0.0, 3.0, 2.0), dk.DomainError, "mode"),
        (lambda: Normal(1.0, cause=""), dk.DomainError, "cause"),
        (lambda: disperse(fescue(), samples=10, seed=0, isp={"ion": Normal(1.0)}), dk.DomainError, "isp"),
        (lambda: disperse(fescue(), samples=10, seed=0, dv={"no such": Normal(1.0)}), dk.DomainError, "dv"),
        (lambda: disperse(fescue(), samples=10, seed=0, dv={8: Normal(1.0)}), dk.DomainError, "dv"),
        (lambda: disperse(fescue(), samples=10, seed=0, dv={99: Normal(1.0)}), dk.DomainError, "dv"),
        (lambda: disperse(fescue(), samples=1, seed=0), dk.DomainError, "samples"),
        (lambda: disperse(fescue(), samples=10, seed=-1), dk.DomainError, "seed"),
        (lambda: disperse(fescue(), samples=10, seed=0, percentiles=[120]), dk.DomainError, "percentiles"),
        (
            lambda: disperse(fescue(), samples=10, seed=0, stage_mass={"x": Normal(1.0)}),
            dk.DomainError,
            "stage_mass",
        ),
        (lambda: disperse(fescue(), samples=1000, seed=0, isp={"rcs": Normal(100.0)}), dk.DomainError, "isp"),
        (lambda: disperse(fescue(), samples=10, seed=0, isp={"main": 2.0}), TypeError, "isp"),
        (lambda: disperse("budget", samples=10, seed=0), TypeError, "budget"),
        (
            lambda: disperse(Budget(1000.0, 3000.0), samples=10, seed=0, dry_mass=Normal(1.0)),
            dk.DomainError,
            "dry_mass",
        ),
    ],
)
def test_bad_specifications_name_the_parameter(call, error, name):
    with pytest.raises(error, match=f"`{name}"):
        call()


def test_ambiguous_labels_ask_for_the_line_number():
    b = Budget(1000.0, 3000.0).add("trim", 5.0).add("trim", 6.0)
    with pytest.raises(dk.DomainError, match="names lines \\[0, 1\\]: use the line number"):
        disperse(b, samples=10, seed=0, dv={"trim": Normal(1.0)})
    ds = disperse(b, samples=10, seed=0, dv={1: Normal(1.0)})
    assert list(ds.cause.values) == ["dv: line 2 (trim)"]
