"""Edelbaum's low-thrust delta-v: its averaged dynamics integrated with scipy, limits, facts of the trade."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from deltakit import DomainError, circular_speed, combined_plane_change, edelbaum
from deltakit.constants import EARTH
from deltakit.lowthrust import EDELBAUM_ANGLE_LIMIT


def _averaged_transfer(v1: float, v2: float, angle: float, dv: float) -> tuple[float, float]:
    """Integrate Edelbaum's averaged equations over a delta-v ``dv``; return (speed, plane change).

    Averaged over a revolution of a near-circular orbit with the thrust yawed by
    +-beta out of the plane (sign flipped at the antinodes), per unit delta-v
    s = f t: dV/ds = -cos(beta), di/ds = (2/pi) sin(beta) / V; the optimal yaw keeps
    V sin(beta) constant, so dbeta/ds = sin(beta) / V. The initial yaw is
    tan(beta0) = sin(pi angle / 2) / (v1 / v2 - cos(pi angle / 2)) (Edelbaum 1961,
    as restated by Kechichian 1997; from memory).
    """
    half_pi_angle = 0.5 * math.pi * angle
    beta0 = math.atan2(math.sin(half_pi_angle), v1 / v2 - math.cos(half_pi_angle))

    def rates(s, y):
        v, beta, _ = y
        return [-math.cos(beta), math.sin(beta) / v, 2.0 / math.pi * math.sin(beta) / v]

    sol = solve_ivp(rates, (0.0, dv), [v1, beta0, 0.0], method="DOP853", rtol=1e-12, atol=1e-12)
    assert sol.success
    return sol.y[0, -1], sol.y[2, -1]


@pytest.mark.parametrize(
    "r1, r2, angle_deg",
    [
        (EARTH.radius + 300e3, 42164e3, 28.5),  # an invented electric tug to geostationary orbit
        (EARTH.radius + 300e3, 42164e3, 0.0),
        (7000e3, 7000e3, 40.0),  # plane change alone
        (42164e3, 8000e3, 60.0),  # lowering while turning
        (EARTH.radius + 500e3, 3e8, 100.0),  # far out, a large turn
    ],
)
def test_closed_form_against_its_averaged_dynamics(r1, r2, angle_deg):
    # Independent route: the averaged equations, integrated by scipy over the
    # closed-form delta-v, must arrive at the final speed with the plane turned by
    # the asked angle.
    v1, v2 = float(circular_speed(r1, EARTH.mu)), float(circular_speed(r2, EARTH.mu))
    angle = math.radians(angle_deg)
    dv = float(edelbaum(v1, v2, angle))
    if angle == 0.0 and v1 == v2:
        assert dv == 0.0
        return
    v_end, turned = _averaged_transfer(v1, v2, angle, dv)
    assert v_end == pytest.approx(v2, rel=1e-9)
    assert turned == pytest.approx(angle, abs=1e-9)


def test_facts_of_the_trade():
    # Common practice: without a plane change the slow spiral costs the difference
    # of the circular speeds; at one speed a small change of plane costs pi/2 times
    # the impulsive one; beyond 2 rad the cheapest path goes out and back, v1 + v2
    # (the last from memory, as in the module notes).
    assert edelbaum(7726.0, 3075.0, 0.0) == pytest.approx(7726.0 - 3075.0, rel=1e-15)
    small = 1e-4
    ratio = edelbaum(7000.0, 7000.0, small) / combined_plane_change(7000.0, 7000.0, small)
    assert ratio == pytest.approx(math.pi / 2, rel=1e-8)
    assert edelbaum(7000.0, 7000.0, math.radians(30.0)) == pytest.approx(
        2 * 7000.0 * math.sin(math.pi * math.radians(30.0) / 4), rel=1e-15
    )
    np.testing.assert_allclose(
        edelbaum(7726.0, 3075.0, [EDELBAUM_ANGLE_LIMIT, 2.5, math.pi]), 7726.0 + 3075.0, rtol=1e-15
    )


@given(v1=st.floats(100.0, 20000.0), v2=st.floats(100.0, 20000.0), angle=st.floats(0.0, math.pi))
def test_scalar_path_equals_array_path_and_the_cosine_law(v1, v2, angle):
    one = edelbaum(v1, v2, angle)
    many = edelbaum(np.array([v1]), v2, np.array([angle]))[0]
    assert isinstance(one, np.float64)
    assert one == pytest.approx(float(many), rel=1e-14)
    stretched = 0.5 * math.pi * min(angle, 2.0)
    # the law of cosines, well conditioned where its terms do not cancel
    direct = math.sqrt(v1 * v1 + v2 * v2 - 2 * v1 * v2 * math.cos(stretched))
    assert one == pytest.approx(direct, rel=1e-9, abs=1e-7 * (v1 + v2))


@pytest.mark.parametrize(
    "arguments, match",
    [
        ((0.0, 3000.0, 0.1), r"`v1` must be > 0 m/s"),
        ((7000.0, -1.0, 0.1), r"`v2` must be > 0 m/s"),
        ((7000.0, 3000.0, 3.5), r"`angle` must be between 0 and pi"),
        ((7000.0, 3000.0, -0.1), r"`angle` must be between 0 and pi"),
        ((7000.0, 3000.0, math.nan), r"`angle` must be finite"),
    ],
)
def test_bad_input_names_the_parameter(arguments, match):
    with pytest.raises(DomainError, match=match) as scalar:
        edelbaum(*arguments)
    with pytest.raises(DomainError) as array:
        edelbaum(*(np.asarray(x) for x in arguments))
    assert str(scalar.value) == str(array.value)
