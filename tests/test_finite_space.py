"""Finite burns that brake and turn, in 3-D, against scipy's DOP853; tiny burns; stated bounds; the table.

The reference never uses deltakit's Kepler solver or integrator: from the state
at the burn centre (Conic.state, inertial axes) it coasts back half the burn
time (tests/helpers.py's two-body propagation) and burns forward with
solve_ivp on the same two-body rates plus the thrust, in three dimensions,
integrating the energy gained (thrust acceleration times velocity) as one more
state component, so that a tiny burn's energy change is well conditioned.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from helpers import propagate, two_body_rates
from scipy.integrate import solve_ivp

from deltakit import Conic, DomainError, loss_table, thrust_arc
from deltakit.constants import EARTH, G0, MARS, SUN
from deltakit.finite import MAX_REVOLUTIONS, MAX_SPLITS
from deltakit.units import au

RTOL = 1e-12


def _rates(mu, thrust, ve, m_start, steering, direction):
    def rates(t, s):
        r, v = s[:3], s[3:6]
        gravity = np.array(two_body_rates(t, s[:6], mu)[3:])
        if steering in ("prograde", "retrograde"):
            u = v / np.linalg.norm(v) * (1.0 if steering == "prograde" else -1.0)
        elif steering in ("normal", "antinormal"):
            h = np.cross(r, v)
            u = h / np.linalg.norm(h) * (1.0 if steering == "normal" else -1.0)
        else:
            u = direction
        a = thrust / (m_start - thrust / ve * t) if thrust else 0.0
        acc = a * u
        return [*v, *(gravity + acc), acc @ v]

    return rates


def _atol(state, dv):
    # the energy gained is of order v dv: its absolute tolerance is 1e-14 of that
    r, v = np.linalg.norm(state[:3]), np.linalg.norm(state[3:6])
    return np.array([r, r, r, v, v, v, v * dv + dv * dv]) * 1e-14


def _scipy_arc(conic, thrust, ve, m0, dv, nu_center=0.0, steering="prograde"):
    """Reference: energy gained and the final inertial state of one burn."""
    mu = float(conic.mu)
    propellant = m0 * -math.expm1(-dv / ve)
    burn_time = propellant * ve / thrust
    r, v = conic.state(nu_center, "inertial")
    centre = np.concatenate([r, v, [0.0]])
    back = propagate(r, v, mu, -0.5 * burn_time, rtol=RTOL, atol=_atol(centre, dv)[:6])
    start = np.concatenate([back.y[:, -1], [0.0]])  # the energy gained counts from the burn's start
    direction = v / np.linalg.norm(v)
    sol = solve_ivp(
        _rates(mu, thrust, ve, m0, steering, direction), (0.0, burn_time), start,
        method="DOP853", rtol=RTOL, atol=_atol(start, dv),
    )  # fmt: skip
    assert sol.success
    end = sol.y[:, -1]
    return end[6], end[:3], end[3:6]


CASES = [
    # name, conic, thrust N, ve m/s, m0 kg, dv m/s, nu_center rad, steering (invented vehicles)
    (
        "Mars capture from a hyperbola, braking",
        Conic.from_vinf(MARS.radius + 400e3, 2500.0, MARS.mu, argp=0.4, inc=0.9, raan=2.0),
        5000.0,
        3200.0,
        3000.0,
        1100.0,
        0.0,
        "retrograde",
    ),
    (
        "lowering an Earth apoapsis at perigee",
        Conic.from_apsides(EARTH.radius + 300e3, EARTH.radius + 20000e3, EARTH.mu, inc=0.5),
        800.0,
        3100.0,
        2000.0,
        400.0,
        0.0,
        "retrograde",
    ),
    (
        "turning a low Earth orbit's plane at the node",
        Conic.circular(EARTH.radius + 500e3, EARTH.mu, inc=math.radians(51.6), raan=1.0),
        2000.0,
        3100.0,
        1500.0,
        300.0,
        0.0,
        "normal",
    ),
    (
        "turning an ellipse's plane the other way, off the node",
        Conic.from_apsides(7000e3, 15000e3, EARTH.mu, argp=0.7, inc=0.3, raan=4.0),
        500.0,
        3000.0,
        1200.0,
        250.0,
        2.4,
        "antinormal",
    ),
    (
        "turning an equatorial orbit out of the equator",
        Conic.circular(EARTH.radius + 800e3, EARTH.mu),
        1000.0,
        3000.0,
        1000.0,
        200.0,
        1.0,
        "normal",
    ),
    (
        "prograde on an inclined, retrograde ellipse",
        Conic.from_apsides(7000e3, 12000e3, EARTH.mu, argp=-0.5, inc=2.6, raan=0.4),
        1500.0,
        3000.0,
        1500.0,
        500.0,
        0.2,
        "prograde",
    ),
]


@pytest.mark.parametrize("case", CASES, ids=[c[0] for c in CASES])
def test_matches_scipy_in_three_dimensions(case):
    _, conic, thrust, ve, m0, dv, nu_center, steering = case
    out = thrust_arc(conic, thrust, ve, m0, dv, nu_center, steering)
    energy, r, v = _scipy_arc(conic, thrust, ve, m0, dv, nu_center, steering)
    reference = Conic.from_state(r, v, conic.mu)
    # a normal arc's energy change is zero but for rounding: compare on the scale v dv
    scale = abs(float(out.ideal_energy_change)) + float(conic.speed(nu_center)) * dv
    assert float(out.energy_change) == pytest.approx(energy, rel=1e-6, abs=1e-9 * scale)
    assert float(out.after.rp) == pytest.approx(float(reference.rp), rel=1e-7)
    assert float(out.after.e) == pytest.approx(float(reference.e), rel=1e-7, abs=1e-9)
    assert float(out.after.inc) == pytest.approx(float(reference.inc), abs=1e-9)
    assert math.remainder(float(out.after.raan - reference.raan), 2 * math.pi) == pytest.approx(0.0, abs=1e-8)
    if steering in ("prograde", "retrograde"):  # in the plane: inclination and node exactly as they were
        assert out.after.inc == conic.inc and out.after.raan == conic.raan


def test_braking_arc_captures_and_its_loss_is_against_the_retrograde_impulse():
    # Rustline-like capture (invented): 1.1 km/s against the velocity at periapsis of
    # a 2.5 km/s Mars arrival; the arc ends bound, and the loss compares it with the
    # retrograde impulse at periapsis, whose energy change is -v dv + dv^2/2.
    arrival = Conic.from_vinf(MARS.radius + 400e3, 2500.0, MARS.mu)
    out = thrust_arc(arrival, np.array([660.0, 5000.0, 5e6]), 3120.0, 2300.0, 1100.0, steering="retrograde")
    v = float(arrival.speed(0.0))
    np.testing.assert_allclose(out.ideal_energy_change, -v * 1100.0 + 0.5 * 1100.0**2, rtol=1e-14)
    assert (out.after.e < 1.0).all() and (out.energy_change < 0).all()
    assert np.all(np.diff(out.loss) < 0) and out.loss[-1] == pytest.approx(0.0, abs=1e-3)  # impulsive limit
    assert out.loss[0] > 10.0  # a 660 N engine loses much on a long capture burn


def test_normal_arc_turns_the_plane_and_does_no_work():
    # A thrust normal to the velocity does no work (common practice): the speed and
    # the energy stay, and the velocity turns at a / v, so a short arc at the node
    # turns the plane by dv / v. Against the pure plane change at the centre,
    # 2 v sin(turn / 2) for the same turn, it loses dv - 2 v sin(dv / (2 v)), about
    # dv^3 / (24 v^2) (derived here from those two facts).
    leo = Conic.circular(EARTH.radius + 400e3, EARTH.mu, inc=0.9, raan=0.2)
    out = thrust_arc(leo, np.array([200.0, 2e6]), 3000.0, 1000.0, 150.0, steering="normal")
    v = float(leo.speed(0.0))
    np.testing.assert_allclose(out.energy_change, 0.0, atol=1e-9 * v * v)
    np.testing.assert_array_equal(out.ideal_energy_change, 0.0)
    assert out.after.inc[1] - 0.9 == pytest.approx(150.0 / v, rel=1e-5)
    assert out.loss[1] == pytest.approx(150.0 - 2 * v * math.sin(75.0 / v), rel=1e-3)
    assert out.loss[0] > out.loss[1] > 0.0  # the long arc turns less for its propellant
    anti = thrust_arc(leo, 2e6, 3000.0, 1000.0, 150.0, steering="antinormal")
    assert float(anti.after.inc) - 0.9 == pytest.approx(-150.0 / v, rel=1e-5)


def test_inclined_orbit_with_in_plane_steering_is_the_planar_arc_in_its_plane():
    flat = Conic.from_apsides(7000e3, 20000e3, EARTH.mu, argp=0.4)
    tilted = Conic.from_apsides(7000e3, 20000e3, EARTH.mu, argp=0.4, inc=1.1, raan=2.5)
    for steering in ("prograde", "retrograde", "inertial"):
        a = thrust_arc(flat, 900.0, 3100.0, 1500.0, 400.0, 0.3, steering)
        b = thrust_arc(tilted, 900.0, 3100.0, 1500.0, 400.0, 0.3, steering)
        for name in ("rp", "e", "argp"):
            assert getattr(b.after, name) == getattr(a.after, name), (steering, name)
        assert b.energy_change == a.energy_change and b.loss == a.loss
        assert b.after.inc == 1.1 and b.after.raan == 2.5


@pytest.mark.parametrize(
    "conic",
    [Conic.circular(EARTH.radius + 300e3, EARTH.mu), Conic.circular(au, SUN.mu, inc=0.1)],
    ids=["low Earth orbit", "around the Sun at 1 au"],
)
@pytest.mark.parametrize("dv", [1e-6, 1e-3, 1.0])
def test_tiny_burns_keep_their_digits(conic, dv):
    # Issue: the energy change of a 1e-6 m/s burn lost digits (5e-7 in low orbit, 3e-6
    # around the Sun). The reference integrates the energy gained directly, so it is
    # well conditioned however small the burn; deltakit must match it to 1e-9.
    out = thrust_arc(conic, 500.0, 3000.0, 1000.0, dv)
    energy, _, _ = _scipy_arc(conic, 500.0, 3000.0, 1000.0, dv)
    assert float(out.energy_change) == pytest.approx(energy, rel=1e-9)
    assert float(out.energy_change) == pytest.approx(float(out.ideal_energy_change), rel=1e-6)


# ---------------------------------------------------------------- stated bounds: refused, never a hang
@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(splits=10**19), rf"`splits` must be at most {MAX_SPLITS}"),
        (dict(splits=2**62), rf"`splits` must be at most {MAX_SPLITS}"),
        (dict(splits=MAX_SPLITS + 1), rf"`splits` must be at most {MAX_SPLITS}"),
        (dict(thrust=1e-300), rf"`thrust` must be large enough .* {MAX_REVOLUTIONS} revolutions"),
        (dict(thrust=np.array([100.0, 1e-9])), r"`thrust` must be large enough.*1 of 2 elements.*index 1"),
        (dict(ve=1.0), r"`dv` must be at most 20 exhaust velocities"),
        (dict(dv=1e300), r"`dv` must be at most 20 exhaust velocities"),
        (dict(steering="normal", splits=1.5), r"`splits` must be a whole number"),
    ],
)
def test_what_cannot_be_integrated_is_refused_with_a_message(kwargs, match):
    arguments = dict(conic=Conic.circular(7000e3, EARTH.mu), thrust=100.0, ve=3000.0, m0=500.0, dv=100.0)
    arguments.update(kwargs)
    with pytest.raises(DomainError, match=match):
        thrust_arc(**arguments)


def test_extreme_but_integrable_inputs_answer_correctly():
    # A thrust of 1e300 N is the impulsive limit: the arc's energy change is the
    # impulse's; a near-empty final mass (dv = 20 ve) still integrates.
    leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    out = thrust_arc(leo, 1e300, 3000.0, 500.0, 100.0)
    assert float(out.energy_change) == pytest.approx(float(out.ideal_energy_change), rel=1e-12)
    heavy = thrust_arc(leo, 100.0, 5.0, 500.0, 100.0)
    assert np.isfinite(heavy.energy_change) and 0 < float(heavy.loss) < 1.0


# ---------------------------------------------------------------- the loss table reads well
def test_loss_table_shows_rounded_numbers_and_keeps_full_floats():
    leo = Conic.circular(EARTH.radius + 300e3, EARTH.mu)
    table = loss_table(leo, 3200.0, 2000.0, 3300.0, thrust_to_weight=[0.05, 1.0], splits=[1, 2])
    text = str(table)
    assert "thrust/weight" in text and "1,961" not in text  # 0.05 * 2000 kg * G0 = 981 N
    assert f"{0.05 * 2000 * G0:,.0f}" in text
    loss = table["loss, 1 burn (m/s)"]
    assert f"{loss.iloc[0]:.1f}" in text and repr(float(loss.iloc[0])) not in text
    assert loss.dtype == float and loss.iloc[0] != round(loss.iloc[0], 1)  # the cells are full floats
    html = table._repr_html_()
    assert f"{loss.iloc[1]:.3g}" in html or f"{loss.iloc[1]:.1f}" in html
    assert type(table.iloc[:1]).__name__ == "LossTable"  # slices keep the display
