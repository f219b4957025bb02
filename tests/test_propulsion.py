"""Propulsion and energy accounting against handbook values and first principles."""

from __future__ import annotations

from fractions import Fraction

import mpmath
import numpy as np
import pytest
from _rounding import assert_same_to_rounding
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import quad

import deltakit as dk
from deltakit.constants import G0
from deltakit.propulsion import EnergySplit

masses = st.floats(1.0, 1e5)
fractions = st.floats(0.01, 0.95)
speeds = st.floats(-2e4, 2e4)
exhaust = st.floats(200.0, 5e4)


# ---------------------------------------------------------------------- exhaust velocity
def test_standard_gravity_matches_astropy():
    # astropy.constants.g0: standard acceleration of gravity, 9.80665 m/s^2 exactly
    # (3rd CGPM 1901); both must agree to the last digit.
    from astropy import constants as const

    assert G0 == const.g0.value
    assert dk.exhaust_velocity(1.0) == const.g0.value


def test_exhaust_velocity_scales_isp():
    isp = np.array([220.0, 320.0, 450.0])
    np.testing.assert_allclose(dk.exhaust_velocity(isp), isp * 9.80665, rtol=0, atol=0)


# ---------------------------------------------------------------------- rocket equation
def test_rocket_equation_against_curtis_example_6_1():
    # Curtis, Orbital Mechanics for Engineering Students (3rd ed.), Example 6.1
    # (values from memory): a 2000 kg spacecraft, Isp 300 s, total delta-v
    # 3.0522 km/s for a 480 x 800 km to 16 000 km circular change of orbit;
    # propellant mass fraction 0.6456, propellant 1291 kg. Curtis uses
    # g0 = 9.807 m/s^2, which moves the propellant by about 0.04 kg.
    ve = dk.exhaust_velocity(300.0)
    propellant = dk.propellant_mass(3052.2, ve, m0=2000.0)
    assert propellant == pytest.approx(1291.0, abs=1.0)
    assert propellant / 2000.0 == pytest.approx(0.6456, abs=2e-4)
    assert dk.rocket_dv(ve, 2000.0, 2000.0 - 1291.0) == pytest.approx(3052.2, abs=2.0)


def test_rocket_equation_e_folding():
    # Common practice: a mass ratio of e gives exactly one exhaust velocity of delta-v.
    assert dk.rocket_dv(3000.0, np.e * 100.0, 100.0) == pytest.approx(3000.0, rel=1e-15)
    assert dk.rocket_dv(3000.0, 100.0, 100.0) == 0.0


@pytest.mark.parametrize("spent", [1e-12, 1e-9, 1e-3, 1.0, 500.0, 999.0, 999.999])
def test_rocket_equation_keeps_its_digits_for_tiny_burns(spent):
    # ln(m0 / mf) for these float masses, by mpmath at 50 digits. With mf within
    # 1e-12 of m0 the quotient m0 / mf rounds to 1 + 1e-12 +- 1e-16: taking its
    # log lost four digits (relative error 1e-4); log1p((m0 - mf) / mf) keeps them.
    m0, ve = 1000.0, 3200.0
    mf = m0 - spent
    with mpmath.workdps(50):
        exact = float(mpmath.mpf(ve) * mpmath.log(mpmath.mpf(m0) / mpmath.mpf(mf)))
    assert dk.rocket_dv(ve, m0, mf) == pytest.approx(exact, rel=1e-15, abs=0.0)
    split = dk.burn_energy(m0, mf, ve, 7700.0)
    with mpmath.workdps(50):
        dv = mpmath.mpf(exact)
        vehicle = float(mpmath.mpf(mf) * dv * (mpmath.mpf(7700.0) + dv / 2))
    assert split.vehicle == pytest.approx(vehicle, rel=4e-15, abs=0.0)


@given(ratio=st.floats(0.0, 8.0), ve=exhaust, m=masses)
def test_propellant_mass_round_trips(ratio, ve, m):
    # Mass ratios up to e^8 (about 3000) cover every real stage; beyond that,
    # m0 - propellant loses digits to cancellation in the test itself.
    dv = ratio * ve
    from_m0 = dk.propellant_mass(dv, ve, m0=m)
    from_mf = dk.propellant_mass(dv, ve, mf=m)
    # Both ways, the masses close on the requested delta-v.
    assert dk.rocket_dv(ve, m, m - from_m0) == pytest.approx(dv, rel=1e-9, abs=1e-9 * ve)
    assert dk.rocket_dv(ve, m + from_mf, m) == pytest.approx(dv, rel=1e-9, abs=1e-9 * ve)
    # Burning from m0 = mf + propellant spends exactly that propellant.
    assert dk.propellant_mass(dv, ve, m0=m + from_mf) == pytest.approx(from_mf, rel=1e-9, abs=1e-12 * m)


def test_propellant_mass_small_delta_v_keeps_precision():
    # expm1 keeps the leading term dm = m0 dv / ve for tiny burns (common practice).
    assert dk.propellant_mass(1e-9, 3000.0, m0=1000.0) == pytest.approx(
        1000.0 * 1e-9 / 3000.0, rel=1e-9, abs=0.0
    )


# ---------------------------------------------------------------------- ejection energy
def test_cart_gains_more_energy_when_moving_fast():
    # Common practice: a 1 kg cart given 1 m/s gains 1.5 J when moving at 1 m/s
    # and 10.5 J when moving at 10 m/s. Here a 2 kg cart throws 1 kg back at
    # 1 m/s, so the remaining 1 kg gains 1 m/s.
    split = dk.ejection_energy(2.0, 1.0, 1.0, [1.0, 10.0])
    np.testing.assert_allclose(split.vehicle, [1.5, 10.5], rtol=1e-15)
    # The books balance: the energy released is the same at both speeds.
    np.testing.assert_allclose(split.total, [1.0, 1.0], rtol=1e-15)
    np.testing.assert_allclose(split.ejecta, split.total - split.vehicle, rtol=1e-15)


def _exact_ejection(m_vehicle, m_ejected, u, v0):
    """Momentum conservation in the lab frame, then kinetic energies, in exact rational arithmetic.

    Every float is an exact rational, so this reference has no rounding at all:
    no difference of large numbers can cost it a digit, however close ``v_rest``
    and ``v_ejecta`` lie or however fast the frame moves.
    """
    m, m_ej, u, v0 = (Fraction(x) for x in (m_vehicle, m_ejected, u, v0))
    m_rest = m - m_ej
    v_ejecta = v0 - u
    v_rest = (m * v0 - m_ej * v_ejecta) / m_rest  # total momentum m v0 is kept
    vehicle = m_rest * (v_rest**2 - v0**2) / 2
    ejecta = m_ej * (v_ejecta**2 - v0**2) / 2
    return vehicle, ejecta, v_rest - v_ejecta


@given(m=masses, f=fractions, u=st.floats(0.0, 1e4), v0=speeds, v1=speeds)
def test_ejection_total_independent_of_frame_speed(m, f, u, v0, v1):
    m_ej = f * m
    a = dk.ejection_energy(m, m_ej, u, v0)
    b = dk.ejection_energy(m, m_ej, u, v1)
    vehicle, ejecta, w = _exact_ejection(m, m_ej, u, v0)
    total = vehicle + ejecta
    # The books close exactly in the reference: the total is 0.5 m_ej u^2 m / m_rest
    # (u in the frame that moved with the whole vehicle before the ejection) and
    # 0.5 mu_red w^2 with the reduced mass mu_red = m_ej m_rest / m and the relative
    # speed w (two-body kinetic energy in the centre-of-mass frame; common practice).
    m_rest = Fraction(m) - Fraction(m_ej)
    assert total == Fraction(m_ej) * Fraction(u) ** 2 * Fraction(m) / m_rest / 2
    assert total == Fraction(m_ej) * m_rest / Fraction(m) * w * w / 2
    # deltakit's total: the same whatever the frame speed, and right to rounding
    # (a product and a quotient of the inputs: a few ulp, and m - m_ej rounded).
    assert a.total == pytest.approx(b.total, rel=1e-13)
    assert a.total == pytest.approx(float(total), rel=1e-13)
    # The split: each share is right to rounding of its own size, which is the
    # size of its terms (m_rest dv |v0| for the vehicle, m_ej u |v0| for the
    # ejecta): that is how far a one-ulp change of v0 moves the exact value.
    # Below the normal range (u of 1e-313 m/s) a few of the tiniest steps are allowed too.
    dv = m_ej * u / float(m_rest)
    underflow = 4 * np.finfo(float).smallest_subnormal
    assert abs(a.vehicle - float(vehicle)) <= 1e-13 * float(m_rest) * dv * (abs(v0) + dv) + underflow
    assert abs(a.ejecta - float(ejecta)) <= 1e-13 * m_ej * u * (abs(v0) + u) + underflow


def test_ejection_vehicle_share_grows_with_speed():
    # The Oberth effect in the energy books: same ejection, faster vehicle,
    # more of the same total goes to the vehicle.
    split = dk.ejection_energy(1000.0, 10.0, 3000.0, np.linspace(0.0, 1e4, 11))
    assert np.all(np.diff(split.vehicle) > 0)
    assert np.all(np.diff(split.ejecta) < 0)
    assert np.ptp(split.total) == 0.0


def test_ejection_of_nothing_changes_nothing():
    split = dk.ejection_energy(10.0, 0.0, 100.0, 5.0)
    assert (split.vehicle, split.ejecta, split.total) == (0.0, 0.0, 0.0)


# ---------------------------------------------------------------------- burn energy
@given(m0=masses, f=fractions, ve=exhaust, v0=speeds, v1=speeds)
def test_burn_total_is_half_propellant_ve_squared(m0, f, ve, v0, v1):
    mf = m0 * (1.0 - f)
    a = dk.burn_energy(m0, mf, ve, v0)
    b = dk.burn_energy(m0, mf, ve, v1)
    # References at 50 digits (mpmath) from the very float inputs: the rocket
    # equation's speed gain, then the kinetic energies as a difference of squares,
    # which 50 digits carry through without loss.
    with mpmath.workdps(50):
        m0_, mf_, ve_, v0_ = (mpmath.mpf(x) for x in (m0, mf, ve, v0))
        dv_ = ve_ * mpmath.log(m0_ / mf_)
        expected = float((m0_ - mf_) * ve_**2 / 2)
        vehicle = float(mf_ * ((v0_ + dv_) ** 2 - v0_**2) / 2)
    dv = float(dv_)
    assert a.total == pytest.approx(expected, rel=1e-14, abs=0.0)
    assert b.total == pytest.approx(expected, rel=1e-14, abs=0.0)
    # The vehicle's share is right to rounding of its terms mf dv |v0| (how far a
    # one-ulp change of v0 moves it), and the books close to rounding of the largest.
    assert abs(a.vehicle - vehicle) <= 1e-14 * mf * dv * (abs(v0) + dv)
    assert abs(a.vehicle + a.ejecta - a.total) <= 1e-15 * max(abs(a.vehicle), abs(a.ejecta), a.total)


@pytest.mark.parametrize("v0", [-3000.0, 0.0, 2500.0, 7800.0, 15000.0])
@pytest.mark.parametrize(
    "m0, mf, ve", [(1000.0, 800.0, 3000.0), (5000.0, 1200.0, 4400.0), (50.0, 49.0, 700.0)]
)
def test_burn_ejecta_against_quadrature(m0, mf, ve, v0):
    # The exhaust element dm leaves at v(m) - ve with v(m) = v0 + ve ln(m0/m)
    # (rocket equation); its kinetic-energy change from v0 integrated by
    # scipy.integrate.quad over the propellant.
    def integrand(m):
        v = v0 + ve * np.log(m0 / m)
        return 0.5 * ((v - ve) ** 2 - v0**2)

    expected, error = quad(integrand, mf, m0, epsabs=0.0, epsrel=1e-12)
    split = dk.burn_energy(m0, mf, ve, v0)
    scale = 0.5 * (m0 - mf) * (ve * ve + v0 * v0)
    assert abs(split.ejecta - expected) <= 1e-10 * scale + 10 * error


def _discrete_burn(m0, mf, ve, v0, steps):
    """The burn as `steps` equal ejections, all cases at once (no loop over steps)."""
    dm = (m0 - mf) / steps
    m_before = m0 - dm * np.arange(steps)
    gain = dm * ve / (m_before - dm)  # speed gained per ejection, momentum conservation
    v_before = v0 + np.concatenate(([0.0], np.cumsum(gain)[:-1]))
    step = dk.ejection_energy(m_before, dm, ve, v_before)
    v_final = v_before[-1] + gain[-1]
    vehicle = 0.5 * mf * (v_final**2 - v0**2)
    ejecta = np.sum(0.5 * dm * ((v_before - ve) ** 2 - v0**2))
    return vehicle, ejecta, np.sum(step.total), step


def test_burn_is_the_limit_of_many_small_ejections():
    m0, mf, ve, v0 = 1500.0, 900.0, 3200.0, 7000.0
    split = dk.burn_energy(m0, mf, ve, v0)
    errors = []
    for steps in (100, 1000, 10000):
        vehicle, ejecta, total, step = _discrete_burn(m0, mf, ve, v0, steps)
        # Each step's books balance on their own.
        np.testing.assert_allclose(
            step.vehicle + step.ejecta, step.total, rtol=1e-9, atol=1e-6 * float(step.total[0])
        )
        errors.append([abs(vehicle - split.vehicle), abs(ejecta - split.ejecta), abs(total - split.total)])
    errors = np.array(errors) / float(split.total)
    # First-order convergence: ten times the steps, about a tenth of the error.
    assert np.all(errors[1:] < errors[:-1] / 5)
    assert np.all(errors[-1] < 1e-3)


def test_propulsive_efficiency_equals_energy_books_of_a_short_burn():
    # Sutton & Biblarz, Rocket Propulsion Elements (9th ed.), Sec. 2.3,
    # propulsive efficiency 2 (v/c) / (1 + (v/c)^2) (equation number from
    # memory). Independently: for a short burn at speed v the vehicle gains the
    # thrust work, the exhaust keeps 0.5 dm (v - ve)^2, and the efficiency is
    # vehicle / (vehicle + that residual energy).
    ve = 3000.0
    v = np.array([300.0, 1500.0, 3000.0, 6000.0, 12000.0])
    m0, dm = 1000.0, 1e-4
    split = dk.burn_energy(m0, m0 - dm, ve, v)
    residual = 0.5 * dm * (v - ve) ** 2
    np.testing.assert_allclose(
        dk.propulsive_efficiency(v, ve), split.vehicle / (split.vehicle + residual), rtol=1e-6
    )
    assert dk.propulsive_efficiency(ve, ve) == 1.0
    assert dk.propulsive_efficiency(0.0, ve) == 0.0


# ---------------------------------------------------------------------- vectorisation
CASES = {
    "exhaust_velocity": (dk.exhaust_velocity, [np.array([200.0, 310.0, 450.0])]),
    "rocket_dv": (
        dk.rocket_dv,
        [
            np.array([2000.0, 3000.0, 4500.0]),
            np.array([900.0, 1200.0, 80.0]),
            np.array([500.0, 1100.0, 10.0]),
        ],
    ),
    "propulsive_efficiency": (
        dk.propulsive_efficiency,
        [np.array([-100.0, 0.0, 5000.0]), np.array([3000.0, 2000.0, 4000.0])],
    ),
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_array_equals_loop_of_scalars(name):
    function, args = CASES[name]
    together = function(*args)
    one_by_one = [function(*(a[i] for a in args)) for i in range(3)]
    assert all(isinstance(x, np.floating) for x in one_by_one)
    # equal to rounding: the scalar path's math.log1p may differ from np.log1p in the last bit
    assert_same_to_rounding(together, one_by_one)


def test_propellant_mass_array_equals_loop():
    dv = np.array([0.0, 500.0, 4000.0])
    ve = np.array([3000.0, 2200.0, 4400.0])
    m = np.array([100.0, 2000.0, 7.5])
    for key in ("m0", "mf"):
        together = dk.propellant_mass(dv, ve, **{key: m})
        loop = [dk.propellant_mass(dv[i], ve[i], **{key: m[i]}) for i in range(3)]
        assert all(isinstance(x, np.floating) for x in loop)
        assert_same_to_rounding(together, loop)


@pytest.mark.parametrize("function", [dk.ejection_energy, dk.burn_energy])
def test_energy_splits_array_equal_loop(function):
    a = np.array([1000.0, 20.0, 7.0])
    b = np.array([100.0, 10.0, 6.5]) if function is dk.ejection_energy else np.array([600.0, 19.0, 0.5])
    c = np.array([3000.0, 1.0, 450.0])
    v0 = np.array([[0.0], [7500.0]])  # broadcasts to shape (2, 3)
    together = function(a, b, c, v0)
    assert isinstance(together, EnergySplit)
    for field in ("vehicle", "ejecta", "total"):
        values = getattr(together, field)
        assert values.shape == (2, 3)
        for i in range(2):
            for j in range(3):
                single = getattr(function(a[j], b[j], c[j], v0[i, 0]), field)
                assert isinstance(single, np.floating)
                assert_same_to_rounding(values[i, j], single)


def test_energy_split_is_frozen_and_prints_units():
    split = dk.burn_energy(1000.0, 800.0, 3000.0, 0.0)
    assert repr(split).count(" J") == 3
    with pytest.raises(AttributeError):
        split.total = 0.0


# ---------------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    "call, name",
    [
        (lambda: dk.exhaust_velocity(0.0), "isp"),
        (lambda: dk.rocket_dv(-1.0, 10.0, 5.0), "ve"),
        (lambda: dk.rocket_dv(3000.0, 10.0, 11.0), "mf"),
        (lambda: dk.rocket_dv(3000.0, 10.0, 0.0), "mf"),
        (lambda: dk.rocket_dv(3000.0, -10.0, 5.0), "m0"),
        (lambda: dk.propellant_mass(-5.0, 3000.0, m0=10.0), "dv"),
        (lambda: dk.propellant_mass(5.0, 3000.0), "m0"),
        (lambda: dk.propellant_mass(5.0, 3000.0, m0=10.0, mf=5.0), "mf"),
        (lambda: dk.propellant_mass(5.0, 3000.0, mf=np.nan), "mf"),
        (lambda: dk.ejection_energy(10.0, 10.0, 1.0, 0.0), "m_ejected"),
        (lambda: dk.ejection_energy(10.0, -1.0, 1.0, 0.0), "m_ejected"),
        (lambda: dk.ejection_energy(0.0, 0.0, 1.0, 0.0), "m_vehicle"),
        (lambda: dk.ejection_energy(10.0, 1.0, -1.0, 0.0), "u"),
        (lambda: dk.ejection_energy(10.0, 1.0, 1.0, np.inf), "v0"),
        (lambda: dk.burn_energy(10.0, 12.0, 3000.0, 0.0), "mf"),
        (lambda: dk.burn_energy(10.0, 8.0, 0.0, 0.0), "ve"),
        (lambda: dk.propulsive_efficiency(np.nan, 3000.0), "v"),
    ],
)
def test_bad_input_names_the_parameter(call, name):
    with pytest.raises(dk.DomainError, match=f"`{name}`"):
        call()


def test_final_mass_above_initial_counts_bad_elements():
    with pytest.raises(dk.DomainError, match=r"`mf` must be <= m0.*2 of 4 elements"):
        dk.rocket_dv(3000.0, [10.0, 10.0, 10.0, 10.0], [5.0, 11.0, 9.0, 12.0])
