"""Finite burns, checked against scipy's DOP853 case by case and against small-arc theory.

The reference in this file never uses deltakit's Kepler solver or integrator:
it starts from the state at the burn centre (Conic.state), coasts backwards
half the burn time with solve_ivp, burns forward with solve_ivp, and for split
burns finds the next periapsis with a solve_ivp event (r . v crossing zero
upwards). The coasts are tests/helpers.py's two-body propagation; the burns add
the thrust to its two-body rates.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from helpers import apsis_event, propagate, specific_energy, two_body_rates
from scipy.integrate import solve_ivp

from deltakit import ArcOutcome, Conic, DomainError, loss_table, thrust_arc
from deltakit.constants import EARTH, G0, MARS

RTOL = 1e-12  # the tolerances the brief asks of the reference


def _rates(mu, thrust, ve, m_start, direction):
    def rates(t, s):
        vx, vy, gx, gy = two_body_rates(t, s, mu)
        if direction is None:
            ux, uy = np.array([vx, vy]) / np.hypot(vx, vy)
        else:
            ux, uy = direction
        a = thrust / (m_start - thrust / ve * t)
        return [vx, vy, gx + a * ux, gy + a * uy]

    return rates


def _atol(state):
    r, v = np.hypot(*state[:2]), np.hypot(*state[2:])
    return np.array([r, r, v, v]) * 1e-14


def _coast(mu, state, dt):
    if dt == 0.0:
        return np.asarray(state, float)
    return propagate(state[:2], state[2:], mu, dt, rtol=RTOL, atol=_atol(state)).y[:, -1]


def _next_periapsis(mu, state):
    """Coast to the next periapsis with an event; None if the orbit is not bound."""
    energy = specific_energy(state[:2], state[2:], mu)
    if energy >= 0.0:
        return None
    period = 2 * np.pi * np.sqrt((-mu / (2 * energy)) ** 3 / mu)
    # the burn just ended after periapsis (r . v > 0): the rising crossing is the next one
    periapsis = apsis_event(direction=1.0, terminal=True)
    sol = propagate(state[:2], state[2:], mu, 1.5 * period, rtol=RTOL, atol=_atol(state), events=periapsis)
    times = sol.t_events[0]
    return sol.y_events[0][0] if times.size else None


def _scipy_arc(conic, thrust, ve, m0, dv, nu_center=0.0, steering="prograde", splits=1):
    """Reference: energy change and final state of the split burn, case by case."""
    mu = float(conic.mu)
    propellant = m0 * (1 - np.exp(-dv / ve))
    each = propellant / splits
    burn_time = each * ve / thrust
    r_vec, v_vec = conic.state(nu_center)
    centre = np.concatenate([r_vec, v_vec])
    start_energy = None
    state = centre
    for k in range(splits):
        if k > 0:
            centre = _next_periapsis(mu, state)
            if centre is None:
                return np.nan, np.full(4, np.nan)
        start = _coast(mu, centre, -0.5 * burn_time)
        if start_energy is None:
            start_energy = specific_energy(start[:2], start[2:], mu)
        direction = None if steering == "prograde" else centre[2:] / np.hypot(*centre[2:])
        sol = solve_ivp(
            _rates(mu, thrust, ve, m0 - k * each, direction),
            (0.0, burn_time),
            start,
            method="DOP853",
            rtol=RTOL,
            atol=_atol(start),
        )
        state = sol.y[:, -1]
    return specific_energy(state[:2], state[2:], mu) - start_energy, state


# name, conic, thrust N, ve m/s, m0 kg, dv m/s, nu_center rad, steering
# Invented vehicles around real bodies (constants cited in deltakit.constants).
CASES = [
    (
        "LEO departure stage, T/W 0.25",
        Conic.circular(EARTH.radius + 300e3, EARTH.mu),
        30e3,
        4400.0,
        12e3,
        3200.0,
        0.0,
        "prograde",
    ),
    (
        "GTO apogee-raise at perigee, low thrust",
        Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu, argp=0.7),
        400.0,
        3100.0,
        2500.0,
        400.0,
        0.0,
        "prograde",
    ),
    (
        "same, inertial steering",
        Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu, argp=0.7),
        400.0,
        3100.0,
        2500.0,
        400.0,
        0.0,
        "inertial",
    ),
    (
        "ellipse, burn centred off periapsis",
        Conic.from_apsides(8000e3, 20000e3, EARTH.mu, argp=-1.0),
        2000.0,
        3000.0,
        1500.0,
        600.0,
        1.2,
        "prograde",
    ),
    (
        "Mars arrival hyperbola, burn past periapsis",
        Conic.from_vinf(MARS.radius + 400e3, 2500.0, MARS.mu),
        5000.0,
        3200.0,
        3000.0,
        900.0,
        0.3,
        "prograde",
    ),
    (
        "Mars hyperbola, inertial",
        Conic.from_vinf(MARS.radius + 400e3, 2500.0, MARS.mu),
        5000.0,
        3200.0,
        3000.0,
        900.0,
        -0.2,
        "inertial",
    ),
    (
        "parabola, burn centred on periapsis",
        Conic.from_vinf(EARTH.radius + 500e3, 0.0, EARTH.mu),
        10e3,
        3200.0,
        5000.0,
        500.0,
        0.0,
        "prograde",
    ),
    (
        "near-parabolic ellipse (e = 0.99), inertial",
        Conic(EARTH.radius + 500e3, 0.99, EARTH.mu, argp=2.0),
        3000.0,
        3200.0,
        5000.0,
        700.0,
        -0.1,
        "inertial",
    ),
    (
        "electric propulsion, spiral of about eight turns",
        Conic.circular(EARTH.radius + 1000e3, EARTH.mu),
        2.0,
        30000.0,
        1000.0,
        100.0,
        0.0,
        "prograde",
    ),
]


def _stack(cases):
    conic = Conic(*(np.array([float(getattr(c[1], n)) for c in cases]) for n in ("rp", "e", "mu", "argp")))
    columns = [np.array([c[i] for c in cases]) for i in range(2, 7)]
    return conic, columns


@pytest.mark.parametrize("steering", ["prograde", "inertial"])
def test_matches_scipy_case_by_case(steering):
    cases = [c for c in CASES if c[7] == steering]
    conic, (thrust, ve, m0, dv, nu_center) = _stack(cases)
    out = thrust_arc(conic, thrust, ve, m0, dv, nu_center, steering)  # one vectorised call
    for i, case in enumerate(cases):
        energy_change, state = _scipy_arc(case[1], *case[2:])
        reference = Conic.from_state(state[:2], state[2:], case[1].mu)
        assert out.energy_change[i] == pytest.approx(energy_change, rel=1e-6), case[0]
        assert out.after.rp[i] == pytest.approx(reference.rp, rel=1e-7), case[0]
        assert out.after.e[i] == pytest.approx(reference.e, rel=1e-7, abs=1e-9), case[0]
        assert out.after.argp[i] == pytest.approx(reference.argp, abs=1e-7), case[0]


def test_split_burns_match_scipy_with_event_coasts():
    # A small vehicle with a weak engine leaving a 400 km Earth orbit in three perigee burns.
    leo = Conic.circular(EARTH.radius + 400e3, EARTH.mu)
    thrust, ve, m0, dv = 220.0, 3100.0, 1800.0, 1200.0
    out = thrust_arc(leo, thrust, ve, m0, dv, splits=3)
    energy_change, state = _scipy_arc(leo, thrust, ve, m0, dv, splits=3)
    reference = Conic.from_state(state[:2], state[2:], leo.mu)
    assert out.energy_change == pytest.approx(energy_change, rel=1e-6)
    assert out.after.rp == pytest.approx(reference.rp, rel=1e-7)
    assert out.after.e == pytest.approx(reference.e, rel=1e-7)
    assert out.after.argp == pytest.approx(reference.argp, abs=1e-6)


def test_impulsive_limit():
    # Loss tends to zero as thrust grows: below 1e-4 of dv at thrust-to-weight 100
    # (weight = m0 G0), and, for a short arc, falling as 1/(thrust)^2 (the burn
    # time squared, as the small-arc expansion in the next tests shows).
    gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu)
    m0, ve, dv = 3000.0, 3100.0, 1500.0
    ratio = np.array([0.1, 1.0, 10.0, 100.0, 1000.0])
    out = thrust_arc(gto, ratio * m0 * G0, ve, m0, dv)
    fraction = out.loss / dv
    assert fraction[3] < 1e-4
    assert np.all(np.diff(fraction) < 0)
    assert fraction[4] / fraction[3] == pytest.approx(0.01, rel=0.05)
    assert out.energy_change[-1] == pytest.approx(out.ideal_energy_change[-1], rel=1e-6)


def test_loss_grows_as_thrust_falls():
    leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    ratio = np.geomspace(3.0, 0.03, 9)
    out = thrust_arc(leo, ratio * 8000 * G0, 3300.0, 8000.0, 3150.0)
    assert np.all(np.diff(out.loss) > 0)
    assert np.all(out.energy_change < out.ideal_energy_change)


def test_three_splits_lose_less_than_one_at_low_thrust():
    leo = Conic.circular(EARTH.radius + 400e3, EARTH.mu)
    out = thrust_arc(leo, 220.0, 3100.0, 1800.0, 1200.0, splits=np.array([1, 2, 3, 6]))
    assert np.all(np.diff(out.loss) < 0)
    assert out.loss[2] < out.loss[0]
    # same propellant and firing time whatever the split
    assert np.ptp(out.propellant) == 0.0 and np.ptp(out.duration) == 0.0


def test_small_arc_loss_circular_inertial():
    # Derived here (first order in dv/v, constant acceleration): on a circular
    # orbit the velocity turns at the mean motion n, so a thrust held in the
    # direction of the velocity at the centre is off by n tau at time tau and
    # only cos(n tau) of it adds energy. Averaged over a burn of length t_b:
    #   loss ~= dv (1 - sin(phi/2) / (phi/2)),  phi = n t_b  (~ dv phi^2 / 24 for small phi).
    # This is the classic cosine (steering) loss of a fixed-attitude burn; the
    # formula is our derivation, not quoted from a table.
    leo = Conic.circular(EARTH.radius + 500e3, EARTH.mu)
    n = np.sqrt(EARTH.mu / leo.rp**3)
    m0, ve, dv = 1000.0, 30000.0, 5.0  # tiny dv and heavy exhaust: nearly constant acceleration
    phi = np.array([0.05, 0.1, 0.2, 0.4, 0.8])
    burn_time = phi / n
    thrust = m0 * (1 - np.exp(-dv / ve)) * ve / burn_time
    out = thrust_arc(leo, thrust, ve, m0, dv, steering="inertial")
    predicted = dv * (1 - np.sin(phi / 2) / (phi / 2))
    np.testing.assert_allclose(out.loss, predicted, rtol=1e-3)


def test_small_arc_loss_at_periapsis_prograde():
    # Derived here (first order in dv/v): near periapsis r ~ rp (1 + e n_p^2 tau^2 / 2)
    # with n_p = sqrt(mu / rp^3), so by energy conservation the speed falls as
    # v ~ vp - e mu^2 tau^2 / (2 vp rp^4). Averaging v over a burn of length t_b
    # centred on periapsis (mean of tau^2 is t_b^2 / 12) gives
    #   loss ~= dv * e / (1 + e) * (n_p t_b)^2 / 24,
    # the same (n t_b)^2 / 24 form as the steering loss above.
    rp = EARTH.radius + 300e3
    e = np.array([0.1, 0.5, 0.73, 0.95])
    conic = Conic(rp, e, EARTH.mu)
    n_p = np.sqrt(EARTH.mu / rp**3)
    m0, ve, dv = 1000.0, 30000.0, 2.0
    burn_time = 0.15 / n_p
    thrust = m0 * (1 - np.exp(-dv / ve)) * ve / burn_time
    out = thrust_arc(conic, thrust, ve, m0, dv)
    predicted = dv * e / (1 + e) * (n_p * burn_time) ** 2 / 24
    np.testing.assert_allclose(out.loss, predicted, rtol=0.01)


def test_zero_dv_changes_nothing():
    c = Conic.from_apsides(7000e3, 9000e3, EARTH.mu, argp=0.4)
    out = thrust_arc(c, 100.0, 3000.0, 500.0, 0.0, nu_center=1.0)
    assert out.energy_change == 0.0 and out.loss == 0.0 and out.duration == 0.0
    assert out.after.rp == pytest.approx(c.rp, rel=1e-14)
    assert out.after.e == pytest.approx(c.e, rel=1e-13)


def test_unbound_intermediate_orbit_and_unreachable_centre_give_nan():
    leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    # equal propellant per burn: with ve = 30 km/s, 4 km/s in two burns stays bound after
    # the first (about 1.9 km/s); 8 km/s does not (the first gives about 3.7 km/s > escape)
    out = thrust_arc(leo, 20000.0, 30000.0, 1000.0, np.array([4000.0, 8000.0]), splits=2)
    assert np.isfinite(out.loss[0]) and np.isfinite(out.after.e[0])
    assert np.isnan(out.loss[1]) and np.isnan(out.after.e[1]) and np.isnan(out.energy_change[1])
    assert np.isfinite(out.propellant[1])  # the propellant question still has an answer
    hyperbola = Conic(7000e3, 1.5, EARTH.mu)
    out = thrust_arc(hyperbola, 2000.0, 3000.0, 1000.0, 100.0, nu_center=2.5)  # beyond 2.30 rad
    assert np.isnan(out.loss) and np.isnan(out.after.rp)


def test_broadcasting_scalars_and_repr():
    c = Conic(7000e3, np.array([0.0, 0.2, 0.6]), EARTH.mu)
    out = thrust_arc(c, np.array([[500.0], [5000.0]]), 3000.0, 1000.0, 200.0)
    assert out.loss.shape == (2, 3) and out.after.shape == (2, 3)
    # the stronger engine loses less on each orbit
    assert np.all(out.loss[1] < out.loss[0])
    single = thrust_arc(c[1], 500.0, 3000.0, 1000.0, 200.0)
    assert isinstance(single.loss, np.floating)
    assert single.loss == pytest.approx(out.loss[0, 1], rel=1e-9)
    assert isinstance(single, ArcOutcome) and "m/s" in repr(single) and "J/kg" in repr(single)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(thrust=-1.0), r"`thrust` must be > 0"),
        (dict(ve=0.0), r"`ve` must be > 0"),
        (dict(m0=np.array([1.0, np.nan])), r"`m0` must be finite"),
        (dict(dv=-5.0), r"`dv` must be >= 0"),
        (dict(nu_center=np.inf), r"`nu_center` must be finite"),
        (dict(steering="radial"), r"`steering` must be one of 'prograde', 'retrograde', .* not 'radial'"),
        (dict(splits=0), r"`splits` must be a whole number >= 1"),
        (dict(splits=1.5), r"`splits` must be a whole number >= 1"),
    ],
)
def test_bad_input_names_the_parameter(kwargs, match):
    arguments = dict(conic=Conic.circular(7000e3, EARTH.mu), thrust=100.0, ve=3000.0, m0=500.0, dv=100.0)
    arguments.update(kwargs)
    with pytest.raises(DomainError, match=match):
        thrust_arc(**arguments)


def test_a_conic_of_the_wrong_type_is_a_type_error():
    # One Conic type check for every function that takes one: a TypeError naming `conic`.
    with pytest.raises(TypeError, match=r"`conic` must be a deltakit.Conic, not tuple"):
        thrust_arc((7000e3, 0.1), thrust=100.0, ve=3000.0, m0=500.0, dv=100.0)


def test_loss_table():
    leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    table = loss_table(leo, 3200.0, 2000.0, 3300.0, thrust_to_weight=[0.05, 0.2, 1.0], splits=[1, 2, 4])
    assert isinstance(table, pd.DataFrame)
    assert table.index.name == "thrust/weight"
    assert list(table.columns) == [
        "thrust (N)",
        "burn time (s)",
        "loss, 1 burn (m/s)",
        "loss, 2 burns (m/s)",
        "loss, 4 burns (m/s)",
    ]
    np.testing.assert_allclose(table["thrust (N)"], np.array([0.05, 0.2, 1.0]) * 2000.0 * G0)
    # each cell is what thrust_arc says for that case
    direct = thrust_arc(leo, 0.2 * 2000.0 * G0, 3200.0, 2000.0, 3300.0, splits=2)
    assert table.loc[0.2, "loss, 2 burns (m/s)"] == pytest.approx(float(direct.loss), rel=1e-9)
    losses = table[["loss, 1 burn (m/s)", "loss, 2 burns (m/s)", "loss, 4 burns (m/s)"]].to_numpy()
    assert np.all(np.diff(losses, axis=0) < 0)  # more thrust, less loss
    assert np.all(np.diff(losses, axis=1) < 0)  # more passes, less loss
    with pytest.raises(DomainError, match="one orbit"):
        loss_table(Conic(7000e3, np.array([0.0, 0.1]), EARTH.mu), 3200.0, 2000.0, 100.0)


def test_integrator_cases_leaving_at_different_times():
    # The vectorised integrator drops finished cases from its arrays as it goes;
    # Kepler orbits of many eccentricities, each run for its own time, must
    # still land where Kepler's equation (tested in test_kepler.py) puts them.
    from deltakit._rk853 import integrate
    from deltakit.kepler import propagate as kepler_propagate

    e = np.linspace(0.0, 0.9, 25)
    c = Conic(1.0, e, 1.0)
    t_end = np.linspace(0.1, 3.0, 25) * c.period
    r_vec, v_vec = c.state(0.0)
    y0 = np.concatenate([r_vec, v_vec], axis=-1).T

    def kepler(t, y):
        r3 = np.hypot(y[0], y[1]) ** 3
        return np.stack([y[2], y[3], -y[0] / r3, -y[1] / r3])

    y, steps = integrate(kepler, y0, t_end)
    assert len(set(steps.tolist())) > 5  # they really left at different steps
    r_end, v_end = c.state(kepler_propagate(c, 0.0, t_end))
    np.testing.assert_allclose(y[:2].T, r_end, atol=1e-8)
    np.testing.assert_allclose(y[2:].T, v_end, atol=1e-8)


def test_impulsive_limit_matches_the_impulsive_burn():
    # At thrust-to-weight 1000 the arc is a fraction of a second: the orbit after it
    # and the ideal energy change must be those of deltakit's impulsive prograde
    # burn (deltakit.burns, written and tested separately).
    from deltakit import burn_prograde, energy_gain

    gto = Conic.from_apsides(EARTH.radius + 250e3, 42164e3, EARTH.mu, argp=0.3)
    nu, dv = np.array([-0.6, 0.0, 0.4, 2.0]), np.array([300.0, 800.0, 800.0, 150.0])
    arc = thrust_arc(gto, 1000 * 3000.0 * G0, 3100.0, 3000.0, dv, nu)
    impulse = burn_prograde(gto, nu, dv)
    np.testing.assert_allclose(arc.ideal_energy_change, energy_gain(gto.speed(nu), dv), rtol=1e-14)
    np.testing.assert_allclose(arc.energy_change, impulse.energy_change, rtol=1e-6)
    np.testing.assert_allclose(arc.after.rp, impulse.after.rp, rtol=1e-6)
    np.testing.assert_allclose(arc.after.e, impulse.after.e, rtol=1e-6)
    np.testing.assert_allclose(arc.after.argp, impulse.after.argp, atol=1e-5)


def test_arc_centred_on_apoapsis_can_beat_the_impulse_there():
    # Speed is lowest at apoapsis, so an arc around it burns at higher speeds than
    # the impulse at apoapsis: the loss is negative (a fact of the Oberth relation,
    # dE = integral of v . a dt; common practice, no table).
    c = Conic.from_apsides(7000e3, 30000e3, EARTH.mu)
    out = thrust_arc(c, np.array([200.0, 20000.0]), 3000.0, 1000.0, 300.0, np.pi)
    assert out.loss[0] < 0.0 and out.loss[0] < out.loss[1] < 0.0


def test_empty_input_gives_empty_output():
    out = thrust_arc(Conic.circular(7000e3, EARTH.mu), np.array([]), 3000.0, 1000.0, 300.0)
    assert out.loss.shape == (0,) and out.after.shape == (0,)
