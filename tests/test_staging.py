"""optimal_staging against the textbook's closed forms and against scipy.optimize on the same problem."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit import optimal_staging

G0 = 9.80665  # standard gravity, m/s^2 (exact by definition: CGPM 1901)


def payload_fraction(dv_split, c, eps):
    """Payload over lift-off mass for a given split (the objective, written out here)."""
    n = np.exp(np.asarray(dv_split) / c)
    return np.prod((1.0 - n * eps) / (n * (1.0 - eps)))


def scipy_split(total, c, eps):
    """Maximise the payload fraction over the split with SLSQP (scipy's general optimiser).

    The unknowns are the stages' shares of the total (order one), with the
    gradient written out, so the optimiser converges to the split itself and
    not only to the (flat) payload fraction.
    """
    optimize = pytest.importorskip("scipy.optimize")
    c, eps = np.asarray(c, float), np.asarray(eps, float)
    share_max = c * np.log(1.0 / eps) / total  # no stage can give more than this

    def objective(x):
        n = np.exp(x * total / c)
        return -np.sum(np.log(1.0 - n * eps) - np.log(n * (1.0 - eps)))

    def gradient(x):
        n = np.exp(x * total / c)
        return (total / c) * (n * eps / (1.0 - n * eps) + 1.0)

    result = optimize.minimize(
        objective,
        c / c.sum(),
        jac=gradient,
        method="SLSQP",
        bounds=[(0.0, 0.999 * m) for m in share_max],
        constraints=[{"type": "eq", "fun": lambda x: np.sum(x) - 1.0, "jac": lambda x: np.ones_like(x)}],
        options={"ftol": 1e-16, "maxiter": 1000},
    )
    assert result.success, result.message
    return result.x * total


def test_identical_stages_split_equally_with_the_textbook_payload_fraction():
    # Identical stages share the delta-v equally and carry the payload fraction
    # ((exp(-dv/(N c)) - eps) / (1 - eps))^N: Curtis, Orbital Mechanics for
    # Engineering Students, chapter 11, restricted staging (from memory; it
    # follows from the payload ratio of one stage, n (1 - eps) / (1 - n eps)).
    c, eps, total = dk.exhaust_velocity(350.0), 0.1, 9500.0
    # one such stage gives at most c ln(1/eps) = 7.9 km/s: 9.5 km/s is out of its reach
    assert np.isnan(optimal_staging(total, [c], [eps]).payload_fraction)
    for stages in (2, 3, 4, 5):
        split = optimal_staging(total, [c] * stages, [eps] * stages)
        np.testing.assert_allclose(split.dv, total / stages, rtol=1e-13)
        expected = ((np.exp(-total / (stages * c)) - eps) / (1.0 - eps)) ** stages
        assert float(split.payload_fraction) == pytest.approx(expected, rel=1e-12)


def test_the_textbook_three_stage_problem_against_scipy():
    # The set-up of Curtis's optimal-staging example (chapter 11): three stages
    # with Isp 400, 350, 300 s and structural ratios 0.10, 0.15, 0.20 lifting a
    # payload to 10 km/s (problem quoted from memory; the book's printed
    # answer was not at hand, so the reference is scipy's optimiser on the
    # same problem, plus the multiplier rule n_i = (c_i eta - 1)/(c_i eps_i eta)).
    # We recall the book's lift-off mass for a 5000 kg payload as about 191 t,
    # which the payload fraction below gives; not asserted, being from memory.
    c = dk.exhaust_velocity(np.array([400.0, 350.0, 300.0]))
    eps = np.array([0.10, 0.15, 0.20])
    split = optimal_staging(10_000.0, c, eps)
    reference = scipy_split(10_000.0, c, eps)
    np.testing.assert_allclose(split.dv, reference, atol=0.05)
    assert float(split.payload_fraction) >= payload_fraction(reference, c, eps) * (1.0 - 1e-12)
    assert float(np.sum(split.dv)) == pytest.approx(10_000.0, rel=1e-14)
    eta = float(split.multiplier)
    np.testing.assert_allclose(split.mass_ratio, (c * eta - 1.0) / (c * eps * eta), rtol=1e-13)
    # stages with the better engine and lighter structure do more of the work
    assert split.dv[0] > split.dv[1] > split.dv[2]
    structure, propellant = split.masses(5000.0)
    lift_off = 5000.0 + structure.sum() + propellant.sum()
    assert 5000.0 / lift_off == pytest.approx(float(split.payload_fraction), rel=1e-12)
    np.testing.assert_allclose(structure / (structure + propellant), eps, rtol=1e-12)


@given(
    stages=st.integers(2, 4),
    data=st.data(),
)
def test_no_other_split_carries_more(stages, data):
    c = np.array(data.draw(st.lists(st.floats(2000.0, 4500.0), min_size=stages, max_size=stages)))
    eps = np.array(data.draw(st.lists(st.floats(0.05, 0.25), min_size=stages, max_size=stages)))
    most = np.sum(c * np.log(1.0 / eps))
    total = data.draw(st.floats(0.3, 0.9)) * most
    split = optimal_staging(total, c, eps)
    if np.isnan(split.payload_fraction):
        # the optimum would ask some stage for less than nothing: a nudge of any split that stays
        # physical (every stage >= 0) carries no more than dropping that stage would
        return
    best = float(split.payload_fraction)
    rng = np.random.default_rng(data.draw(st.integers(0, 2**32 - 1)))
    for _ in range(20):  # random feasible splits near and far
        nudge = rng.normal(0.0, 0.05 * total, stages)
        nudge -= nudge.mean()
        other = split.dv + nudge
        if np.all(other >= 0.0) and np.all(other < c * np.log(1.0 / eps)):
            assert payload_fraction(other, c, eps) <= best * (1.0 + 1e-12)


def test_vectorised_over_cases_equals_case_by_case():
    totals = np.array([[6000.0], [8000.0], [11000.0]])
    c = dk.exhaust_velocity(np.array([[310.0, 340.0], [300.0, 420.0]]))  # two vehicles
    eps = np.array([0.09, 0.13])
    split = optimal_staging(totals, c, eps)
    assert split.dv.shape == (3, 2, 2) and split.payload_fraction.shape == (3, 2)
    for i in range(3):
        for j in range(2):
            one = optimal_staging(totals[i, 0], c[j], eps)
            np.testing.assert_allclose(split.dv[i, j], one.dv, rtol=1e-14)
            assert split.payload_fraction[i, j] == pytest.approx(float(one.payload_fraction), rel=1e-14)


def test_impossible_totals_are_nan():
    c, eps = [3000.0, 3000.0], [0.1, 0.1]
    most = 2 * 3000.0 * np.log(10.0)
    split = optimal_staging([most * 1.01, most * 0.5], c, eps)
    assert np.isnan(split.payload_fraction[0]) and np.all(np.isnan(split.dv[0]))
    assert np.isfinite(split.payload_fraction[1])


@pytest.mark.parametrize(
    "args, name",
    [
        ((-1.0, [3000.0], [0.1]), "total_dv"),
        ((1000.0, [0.0], [0.1]), "ve"),
        ((1000.0, [3000.0], [1.0]), "structural_ratio"),
        ((1000.0, [3000.0], [0.0]), "structural_ratio"),
        ((1000.0, [3000.0, 3000.0], [0.1, 0.1, 0.1]), "ve"),
    ],
)
def test_bad_input_names_the_parameter(args, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`"):
        optimal_staging(*args)


@pytest.mark.parametrize(
    "total, isp, eps",
    [
        (9000.0, [290.0, 347.0], [0.08, 0.12]),
        (12_500.0, [280.0, 330.0, 360.0, 450.0], [0.07, 0.09, 0.11, 0.15]),
        (7000.0, [320.0, 320.0], [0.15, 0.05]),
    ],
)
def test_invented_stacks_against_scipy(total, isp, eps):
    c, eps = dk.exhaust_velocity(np.array(isp)), np.array(eps)
    split = optimal_staging(total, c, eps)
    reference = scipy_split(total, c, eps)
    np.testing.assert_allclose(split.dv, reference, atol=0.05)
    assert float(split.payload_fraction) == pytest.approx(payload_fraction(reference, c, eps), rel=1e-9)


def test_a_stage_the_optimum_would_not_use_is_nan_where_scipy_gives_it_nothing():
    # A heavy bottom stage under a light one: the best split gives the bottom stage
    # nothing (scipy stops at the bound), so the stack should lose that stage.
    c, eps = dk.exhaust_velocity(np.array([320.0, 320.0])), np.array([0.25, 0.05])
    reference = scipy_split(4000.0, c, eps)
    assert reference[0] < 1e-6 * 4000.0
    assert np.isnan(optimal_staging(4000.0, c, eps).payload_fraction)
