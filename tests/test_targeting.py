"""burn_to: textbook transfers, its targets reached by burn_prograde, NaN where none is, the scalar path."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from deltakit import Conic, DomainError, burn_prograde, burn_to
from deltakit.constants import EARTH

VALLADO_MU = 398600.4418e9  # Vallado, 4th ed., examples
VALLADO_R = 6378.137e3
MU = EARTH.mu


def test_hohmann_burns_of_vallado_example_6_1():
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Example 6-1
    # (values from memory): from 191.34411 km to 35 781.34857 km altitude,
    # dv_a = 2.457 km/s at the low orbit and dv_b = 1.478 km/s at apoapsis.
    r1, r2 = VALLADO_R + 191.34411e3, VALLADO_R + 35781.34857e3
    low = Conic.circular(r1, VALLADO_MU)
    first = burn_to(low, 0.7, ra=r2)  # any point of a circle
    assert first == pytest.approx(2457.0, abs=0.5)
    transfer = burn_prograde(low, 0.7, first).after
    second = burn_to(transfer, math.pi, rp=r2)  # raise periapsis to the apoapsis: circularise
    assert second == pytest.approx(1478.0, abs=0.5)
    assert burn_prograde(transfer, math.pi, second).after.e == pytest.approx(0.0, abs=1e-12)


def test_escape_of_curtis_example_8_3():
    # Curtis, Orbital Mechanics for Engineering Students, Example 8.3 (from memory):
    # leaving a 300 km circular Earth orbit (R = 6378 km, mu = 398 600 km^3/s^2)
    # with vinf = 2.943 km/s takes 3.590 km/s.
    parking = Conic.circular(6378e3 + 300e3, 398600e9)
    assert burn_to(parking, 0.0, vinf=2943.0) == pytest.approx(3590.0, abs=1.0)


def test_period_target_against_keplers_third_law():
    # Common practice (Kepler's third law): a period T means a = (mu (T / 2 pi)^2)^(1/3).
    gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, MU, argp=0.3)
    sidereal_day = 86164.0905  # s (common practice)
    dv = burn_to(gto, np.array([0.0, 1.0, math.pi]), period=sidereal_day)
    after = burn_prograde(gto, np.array([0.0, 1.0, math.pi]), dv).after
    np.testing.assert_allclose(after.period, sidereal_day, rtol=1e-12)
    np.testing.assert_allclose(after.a, (MU * (sidereal_day / (2 * math.pi)) ** 2) ** (1 / 3), rtol=1e-12)


# ---------------------------------------------------------------- properties
radii = st.floats(6.6e6, 5e7)
fractions = st.floats(-0.9, 0.9)


@given(rp=radii, e=st.floats(0.0, 2.5), fraction=fractions, stretch=st.floats(1.0, 20.0))
def test_apoapsis_target_is_reached(rp, e, fraction, stretch):
    conic = Conic(rp, e, MU, 0.4, 0.8, 1.0)
    nu = fraction * float(conic.true_anomaly_limit)
    r = float(conic.radius(nu))
    target = r * stretch
    dv = burn_to(conic, nu, ra=target)
    # a target at the burn point's radius (off an apsis) leaves the vehicle nearly at
    # rest: burn_prograde's 1 + dv/v then carries eps / (1 + dv/v), the check does not
    assume(np.isfinite(dv) and dv > -0.99 * float(conic.speed(nu)))
    after = burn_prograde(conic, nu, dv).after
    assert after.ra == pytest.approx(target, rel=1e-9)
    assert after.inc == conic.inc and after.raan == conic.raan  # along the velocity: same plane


@given(rp=radii, e=st.floats(0.0, 2.5), fraction=fractions, shrink=st.floats(0.05, 1.0))
def test_periapsis_target_is_reached_or_nan_beyond_the_line_of_flight(rp, e, fraction, shrink):
    conic = Conic(rp, e, MU, -0.2)
    nu = fraction * float(conic.true_anomaly_limit)
    r = float(conic.radius(nu))
    gamma = float(conic.flight_path_angle(nu))
    target = r * shrink
    dv = burn_to(conic, nu, rp=target)
    # the closest approach of the straight line along the velocity is r cos(gamma):
    # a periapsis at or above it is reached by no burn along the velocity
    if target >= r * math.cos(gamma) * (1 + 1e-9) and abs(gamma) > 1e-9:
        assert np.isnan(dv)
        return
    assume(np.isfinite(dv) and target < r * math.cos(gamma) * (1 - 1e-6))
    after = burn_prograde(conic, nu, dv).after
    assert after.rp == pytest.approx(target, rel=1e-8)


@given(rp=radii, e=st.floats(0.0, 2.5), fraction=fractions, vinf=st.floats(0.0, 20000.0))
def test_excess_speed_target_is_reached(rp, e, fraction, vinf):
    conic = Conic(rp, e, MU)
    nu = fraction * float(conic.true_anomaly_limit)
    dv = burn_to(conic, nu, vinf=vinf)
    after = burn_prograde(conic, nu, dv).after
    # specific energy vinf^2 / 2 (well conditioned: compared as energies, scale mu / r)
    scale = MU / float(conic.radius(nu))
    assert float(after.energy) == pytest.approx(0.5 * vinf * vinf, abs=1e-9 * scale)


def test_unreachable_targets_are_nan_only_there():
    ellipse = Conic.from_apsides(7000e3, 20000e3, MU)
    nu = np.array([0.0, 2.0, math.pi])
    dv = burn_to(ellipse, nu, ra=15000e3)  # below the radius at apoapsis (20 000 km)
    r = ellipse.radius(nu)
    np.testing.assert_array_equal(np.isnan(dv), r > 15000e3)
    assert np.isnan(burn_to(ellipse, 0.0, period=1.0))  # a < r / 2: no such orbit through the point
    hyperbola = Conic(7000e3, 2.0, MU)
    assert np.isnan(burn_to(hyperbola, 2.5, vinf=1000.0))  # beyond the asymptote


def test_own_apsis_target_takes_the_least_burn():
    # At an apsis the target of its own radius: nothing to do if that apsis already
    # is the target kind, else the burn to the circular speed.
    ellipse = Conic.from_apsides(7000e3, 20000e3, MU)
    assert burn_to(ellipse, 0.0, rp=7000e3) == 0.0
    assert burn_to(ellipse, math.pi, ra=20000e3) == 0.0
    to_circle = burn_to(ellipse, math.pi, rp=20000e3)
    assert to_circle == pytest.approx(math.sqrt(MU / 20000e3) - float(ellipse.speed(math.pi)), rel=1e-14)


@given(
    rp=radii, e=st.floats(0.0, 2.5), fraction=fractions, target=st.floats(1e6, 1e9),
    kind=st.sampled_from(["ra", "rp", "period", "vinf"]),
)  # fmt: skip
def test_scalar_fast_path_equals_array_path(rp, e, fraction, target, kind):
    one = Conic(rp, e, MU, 1.0)
    many = Conic(np.array([rp]), e, MU, 1.0)
    nu = fraction * float(one.true_anomaly_limit)
    value = target * (1e-3 if kind == "vinf" else 1.0)
    scalar = burn_to(one, nu, **{kind: value})
    array = burn_to(many, np.array([nu]), **{kind: value})[0]
    assert isinstance(scalar, np.float64)
    assert scalar == pytest.approx(float(array), rel=1e-13, abs=1e-9, nan_ok=True)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        ({}, "give exactly one target"),
        ({"ra": 1e7, "rp": 7e6}, r"give exactly one target.*got `ra`, `rp`"),
        ({"ra": -1.0}, r"`ra` must be > 0 m"),
        ({"rp": np.array([7e6, 0.0])}, r"`rp` must be > 0 m"),
        ({"period": np.nan}, r"`period` must be finite"),
        ({"vinf": -1.0}, r"`vinf` must be >= 0 m/s"),
    ],
)
def test_bad_input_names_the_parameter(kwargs, match):
    for conic in (Conic.circular(7000e3, MU), Conic.circular(np.array([7000e3]), MU)):
        with pytest.raises(DomainError, match=match):
            burn_to(conic, 0.0, **kwargs)
    with pytest.raises(TypeError, match="`conic`"):
        burn_to((7000e3, 0.0), 0.0, ra=1e7)
