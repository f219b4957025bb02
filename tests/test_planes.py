"""plane_change_burns and inclination_change_cost: textbook plane changes, the burns they name, properties."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from deltakit import (
    Conic,
    DomainError,
    burn,
    combined_plane_change,
    inclination_change_cost,
    plane_change,
    plane_change_burns,
)
from deltakit.constants import EARTH

VALLADO_MU = 398600.4418e9
VALLADO_R = 6378.137e3
MU = EARTH.mu
DEG = math.pi / 180.0


def _normal(inc, raan):
    """Unit normal of a plane, typed here from its definition (common practice)."""
    return np.array([math.sin(inc) * math.sin(raan), -math.sin(inc) * math.cos(raan), math.cos(inc)])


# ---------------------------------------------------------------- textbook examples
# Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Examples 6-4 to
# 6-6 (values from memory): a circular orbit of 1.8 Earth radii (speed 5.892311 km/s)
# at i = 55 deg with its node at 45 deg.
VALLADO_ORBIT = Conic.circular(1.8 * VALLADO_R, VALLADO_MU, inc=55 * DEG, raan=45 * DEG)


def test_vallado_example_6_4_inclination_only():
    # Example 6-4: 55 -> 40 deg at the node costs 1.5382 km/s.
    assert float(VALLADO_ORBIT.speed(0.0)) == pytest.approx(5892.311, abs=1e-3)
    plan = plane_change_burns(VALLADO_ORBIT, 40 * DEG, 45 * DEG)
    assert plan.turn == pytest.approx(15 * DEG, rel=1e-14)
    np.testing.assert_allclose(plan.dv, 1538.2, atol=0.05)
    # the burns are at the nodes: the argument of latitude is 0 and 180 deg
    assert sorted(abs(math.remainder(float(nu), 2 * math.pi)) for nu in plan.nu) == pytest.approx(
        [0.0, math.pi]
    )


def test_vallado_example_6_5_node_only():
    # Example 6-5: the node from 45 to 0 deg at i = 55 deg: the burn points lie at
    # arguments of latitude 103.3647 deg (and 180 deg on), the turn is 36.53 deg and
    # the cost about 3.69 km/s.
    plan = plane_change_burns(VALLADO_ORBIT, 55 * DEG, 0.0)
    latitudes = sorted(math.degrees(math.remainder(float(nu), 2 * math.pi)) % 360 for nu in plan.nu)
    assert latitudes == pytest.approx([76.6353, 256.6353], abs=1e-4)  # 256.6353 = 76.6353 + 180
    assert latitudes[0] == pytest.approx(180 - 103.3647, abs=1e-4)
    assert math.degrees(plan.turn) == pytest.approx(36.53, abs=0.01)
    np.testing.assert_allclose(plan.dv, 3694.0, atol=2.0)


def test_vallado_example_6_6_inclination_and_node():
    # Example 6-6: 55 -> 40 deg and the node 45 -> 0 deg in one burn: turn 35.74 deg,
    # 3.6159 km/s.
    plan = plane_change_burns(VALLADO_ORBIT, 40 * DEG, 0.0)
    assert math.degrees(plan.turn) == pytest.approx(35.74, abs=0.01)
    np.testing.assert_allclose(plan.dv, 3615.9, atol=0.5)
    # Vallado's spherical trigonometry for the turn, typed here independently
    cos_turn = math.cos(55 * DEG) * math.cos(40 * DEG) + math.sin(55 * DEG) * math.sin(40 * DEG) * math.cos(
        45 * DEG
    )
    assert plan.turn == pytest.approx(math.acos(cos_turn), rel=1e-14)


def test_pure_plane_change_on_a_circle_is_the_isosceles_triangle():
    # Common practice: on a circle the turn costs 2 v sin(turn / 2) at either point
    # (deltakit.plane_change, tested against its own sources).
    orbit = Conic.circular(EARTH.radius + 700e3, MU, inc=1.7, raan=5.0)
    plan = plane_change_burns(orbit, 1.2, 4.4)
    v = float(orbit.speed(0.0))
    np.testing.assert_allclose(plan.dv, plane_change(v, float(plan.turn)), rtol=1e-14)
    assert plan.cheaper == 0 and plan.saving == pytest.approx(0.0, abs=1e-9)


def test_apoapsis_is_the_cheaper_crossing_of_an_ellipse():
    # Common practice (plane changes are made where the vehicle is slow): with the
    # line of nodes along the major axis, the crossing at apoapsis costs
    # (1 - e) / (1 + e) of the one at periapsis.
    e = 0.6
    orbit = Conic(7000e3, e, MU, argp=0.0, inc=0.5)  # periapsis at the ascending node
    plan = plane_change_burns(orbit, 0.7, 0.0)
    at_periapsis, at_apoapsis = (plan.dv[0], plan.dv[1]) if abs(plan.nu[0]) < 1 else (plan.dv[1], plan.dv[0])
    assert at_apoapsis / at_periapsis == pytest.approx((1 - e) / (1 + e), rel=1e-12)
    assert abs(abs(float(plan.best_nu)) - math.pi) < 1e-12
    assert plan.saving == pytest.approx(at_periapsis - at_apoapsis, rel=1e-12)


# ---------------------------------------------------------------- the burns it names do the job
planes = st.tuples(st.floats(0.0, math.pi), st.floats(0.0, 2 * math.pi))


@given(
    rp=st.floats(6.6e6, 4e7), e=st.floats(0.0, 0.9), argp=st.floats(-math.pi, math.pi),
    old=planes, new=planes, apoapsis=st.one_of(st.none(), st.floats(1.0, 30.0)),
)  # fmt: skip
def test_named_burns_reach_the_new_plane_and_the_target(rp, e, argp, old, new, apoapsis):
    conic = Conic(rp, e, MU, argp, *old)
    target = {} if apoapsis is None else {"ra": rp * (1 + e) / (1 - e) * apoapsis}
    plan = plane_change_burns(conic, *new, **target)
    w_new = _normal(*new)
    for k in range(2):
        if not np.isfinite(plan.dv[k]):
            continue
        out = burn(conic, plan.nu[k], plan.radial[k], plan.transverse[k], plan.normal[k])
        assume(np.isfinite(out.after.e))
        np.testing.assert_allclose(out.after.normal, w_new, atol=1e-12)
        components = math.sqrt(plan.radial[k] ** 2 + plan.transverse[k] ** 2 + plan.normal[k] ** 2)
        assert plan.dv[k] == pytest.approx(components, rel=1e-12, abs=1e-9)
        if target:
            assert out.after.ra == pytest.approx(target["ra"], rel=1e-9)
        else:  # a pure plane change keeps the shape and the speed
            assert out.after.rp == pytest.approx(rp, rel=1e-12)
            assert out.after.e == pytest.approx(e, abs=1e-12)
    turn = math.acos(np.clip(_normal(*old) @ w_new, -1.0, 1.0))
    assert plan.turn == pytest.approx(turn, abs=1e-7)
    assert plan.best_dv == pytest.approx(np.nanmin(plan.dv), rel=1e-15, nan_ok=True)


def test_with_a_target_it_is_the_combined_plane_change():
    # The same burn also raises the apoapsis: at an apsis (no radial speed) the
    # delta-v is combined_plane_change(v, w, turn) with w from the apsis change.
    orbit = Conic.from_apsides(EARTH.radius + 300e3, EARTH.radius + 300e3, MU, inc=28.5 * DEG)
    plan = plane_change_burns(orbit, 20 * DEG, 0.0, ra=42164e3)
    v = float(orbit.speed(0.0))
    w = math.sqrt(2 * MU / orbit.rp - 2 * MU / (orbit.rp + 42164e3))  # vis-viva at perigee of the transfer
    np.testing.assert_allclose(plan.dv, combined_plane_change(v, w, 8.5 * DEG), rtol=1e-12)


def test_arrays_of_conics_and_targets_broadcast():
    conics = Conic(7000e3, np.array([0.0, 0.3, 0.6]), MU, inc=0.4)
    plan = plane_change_burns(conics, np.array([[0.5], [0.6]]), 1.0)
    assert plan.turn.shape == (2, 3) and plan.dv[0].shape == (2, 3) and plan.cheaper.shape == (2, 3)
    one = plane_change_burns(conics[1], 0.6, 1.0)
    assert one.dv[1] == pytest.approx(float(plan.dv[1][1, 1]), rel=1e-14)


def test_same_plane_costs_nothing_and_a_hyperbola_may_miss_a_crossing():
    orbit = Conic(7000e3, 0.2, MU, argp=0.3, inc=0.8, raan=2.0)
    same = plane_change_burns(orbit, 0.8, 2.0)
    assert same.turn == 0.0 and same.dv == (0.0, 0.0)
    np.testing.assert_allclose(same.nu, orbit.nodes, atol=1e-15)  # the old nodes stand for the line
    hyperbola = Conic(7000e3, 3.0, MU, argp=math.radians(170.0), inc=0.3)
    plan = plane_change_burns(hyperbola, 0.6, 0.0)
    assert np.isnan(plan.dv).sum() == 1
    assert plan.best_dv == np.nanmin(plan.dv) and np.isnan(plan.saving)


# ---------------------------------------------------------------- the cost curve along the orbit
def test_inclination_cost_is_least_at_the_nodes_and_reaches_its_target():
    orbit = Conic.circular(6778e3, MU, inc=51.6 * DEG, raan=0.3)
    nu = np.radians(np.arange(-180.0, 180.0, 5.0))
    cost = inclination_change_cost(orbit, nu, 45 * DEG)
    v = float(orbit.speed(0.0))
    assert np.nanmin(cost.dv) == pytest.approx(plane_change(v, 6.6 * DEG), rel=1e-12)
    assert set(np.degrees(nu[cost.dv == np.nanmin(cost.dv)]).round(6)) == {0.0, -180.0}
    for k in np.flatnonzero(np.isfinite(cost.dv)):
        vt = float(orbit.velocity(nu[k])[1])
        out = burn(orbit, nu[k], 0.0, vt * (math.cos(cost.turn[k]) - 1), vt * math.sin(cost.turn[k]))
        assert out.after.inc == pytest.approx(45 * DEG, abs=1e-12)
        assert math.remainder(float(out.after.raan - cost.raan[k]), 2 * math.pi) == pytest.approx(
            0.0, abs=1e-12
        )
    # near the antinodes a normal burn can only raise the inclination: out of reach
    assert np.isnan(cost.dv[np.abs(np.abs(nu) - math.pi / 2) < 1e-9]).all()


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda c: plane_change_burns(c, 3.5, 0.0), r"`inc` must be between 0 and pi"),
        (lambda c: plane_change_burns(c, 0.5, np.inf), r"`raan` must be finite"),
        (lambda c: plane_change_burns(c, 0.5, 0.0, ra=-1.0), r"`ra` must be > 0 m"),
        (lambda c: plane_change_burns(c, 0.5, 0.0, ra=1e7, vinf=1.0), r"exactly one target"),
        (lambda c: inclination_change_cost(c, np.nan, 0.5), r"`nu` must be finite"),
        (lambda c: inclination_change_cost(c, 0.0, -0.5), r"`inc` must be between 0 and pi"),
    ],
)
def test_bad_input_names_the_parameter(call, match):
    with pytest.raises(DomainError, match=match):
        call(Conic.circular(7000e3, MU, inc=0.5))
