"""Plot helpers: the artists they return carry the right data, to scale.

Checks compare drawn points with the conic equation r = p / (1 + e cos(theta -
argp)) (common practice: the polar equation of a conic about its focus), and
drawn energies with the numeric layer's Oberth relation.
"""

from __future__ import annotations

import math

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from matplotlib.figure import Figure

import deltakit as dk
from deltakit.constants import EARTH, MARS
from deltakit.plotting import (
    burn_at_angle,
    draw_burn,
    draw_conic,
    draw_transfer,
    plot_budget_waterfall,
    plot_energy_gain,
    update_budget_waterfall,
    update_burn,
    update_conic,
    update_energy_gain,
)


def axes():
    return Figure(figsize=(5, 5)).add_subplot()


def assert_on_conic(x_km, y_km, conic, rtol=1e-9):
    x, y = np.asarray(x_km) * 1e3, np.asarray(y_km) * 1e3
    keep = np.isfinite(x)
    theta = np.arctan2(y[keep], x[keep]) - float(conic.argp)
    expected = float(conic.p) / (1.0 + float(conic.e) * np.cos(theta))
    np.testing.assert_allclose(np.hypot(x[keep], y[keep]), expected, rtol=rtol)


@pytest.mark.parametrize(
    "conic",
    [
        dk.Conic.circular(EARTH.radius + 400e3, EARTH.mu),
        dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 33000e3, MARS.mu, argp=0.7),
        dk.Conic(EARTH.radius + 500e3, 1.0, EARTH.mu, argp=-1.0),  # parabola
        dk.Conic.from_vinf(EARTH.radius + 300e3, 3500.0, EARTH.mu, argp=2.0),  # hyperbola
    ],
    ids=["circle", "ellipse", "parabola", "hyperbola"],
)
def test_draw_conic_points_satisfy_conic_equation(conic):
    ax = axes()
    art = draw_conic(ax, conic, body_radius=EARTH.radius)
    x, y = art.orbit.get_data()
    assert_on_conic(x, y, conic)
    assert art.body.get_radius() == pytest.approx(EARTH.radius / 1e3)
    assert ax.get_xlabel() == "x (km)" and ax.get_ylabel() == "y (km)"
    r = np.hypot(x, y)
    if float(conic.e) >= 1.0:  # open orbits are cut at five periapsis radii by default
        assert r.max() == pytest.approx(5.0 * float(conic.rp) / 1e3, rel=1e-6)
    else:  # a closed orbit is drawn whole, out to apoapsis
        assert r.max() == pytest.approx(float(conic.ra) / 1e3, rel=1e-6)
        assert r.min() == pytest.approx(float(conic.rp) / 1e3, rel=1e-6)


def test_draw_conic_refuses_many_orbits_and_draws_nan_orbit_empty():
    many = dk.Conic.circular([7000e3, 8000e3], EARTH.mu)
    with pytest.raises(dk.DomainError, match="`conic`"):
        draw_conic(axes(), many)
    nan_orbit = dk.Conic._trusted(np.nan, np.nan, EARTH.mu)
    art = draw_conic(axes(), nan_orbit)
    assert np.isnan(art.orbit.get_xdata()).all()


def test_update_conic_moves_same_artist():
    ax = axes()
    art = draw_conic(ax, dk.Conic.circular(7000e3, EARTH.mu), body_radius=EARTH.radius)
    line = art.orbit
    new = dk.Conic.from_apsides(7000e3, 20000e3, EARTH.mu, argp=1.0)
    update_conic(art, new, body_radius=MARS.radius)
    assert art.orbit is line and len(ax.lines) == 1
    assert_on_conic(*line.get_data(), new)
    assert art.body.get_radius() == pytest.approx(MARS.radius / 1e3)


@pytest.mark.parametrize(
    "angle, reference, along",
    [
        (0.0, "velocity", "velocity"),
        (math.pi, "velocity", "-velocity"),
        (math.pi / 2, "transverse", "radius"),
    ],
)
def test_draw_burn_marker_arrow_and_orbit_after(angle, reference, along):
    orbit = dk.Conic.from_apsides(EARTH.radius + 300e3, EARTH.radius + 5000e3, EARTH.mu, argp=0.3)
    nu, dv = 1.2, 400.0
    ax = axes()
    art = draw_burn(ax, orbit, nu, dv, angle=angle, reference=reference)
    r_vec, v_vec = orbit.state(nu)
    np.testing.assert_allclose(art.marker.get_xydata()[0], r_vec / 1e3, rtol=1e-12)
    arrow = np.array([float(art.arrow.U[0]), float(art.arrow.V[0])])
    direction = {"velocity": v_vec, "-velocity": -v_vec, "radius": r_vec}[along]
    cosine = arrow @ direction / np.linalg.norm(arrow) / np.linalg.norm(direction)
    assert cosine == pytest.approx(1.0, abs=1e-12)
    outcome = burn_at_angle(orbit, nu, dv, angle, reference=reference)
    assert_on_conic(*art.after.orbit.get_data(), outcome.after)
    # the orbit after the burn passes through the burn point
    assert float(outcome.after.radius(outcome.nu_after)) == pytest.approx(float(orbit.radius(nu)), rel=1e-12)


def test_burn_at_angle_agrees_with_burn_functions():
    orbit = dk.Conic.from_apsides(7000e3, 15000e3, EARTH.mu)
    nu = np.linspace(-3.0, 3.0, 7)
    prograde = burn_at_angle(orbit, nu, 250.0)
    np.testing.assert_allclose(
        prograde.energy_change, dk.burn_prograde(orbit, nu, 250.0).energy_change, rtol=1e-12
    )
    radial = burn_at_angle(orbit, nu, 250.0, math.pi / 2, reference="transverse")
    np.testing.assert_allclose(
        radial.energy_change, dk.burn(orbit, nu, radial=250.0).energy_change, rtol=1e-9, atol=1e-6
    )
    with pytest.raises(dk.DomainError, match="reference"):
        burn_at_angle(orbit, 0.0, 1.0, reference="inertial")


def test_update_burn_in_place():
    orbit = dk.Conic.from_apsides(7000e3, 15000e3, EARTH.mu)
    ax = axes()
    art = draw_burn(ax, orbit, 0.0, 100.0)
    n_lines = len(ax.lines)
    update_burn(art, orbit, 2.0, 300.0)
    assert len(ax.lines) == n_lines
    r_vec, _ = orbit.state(2.0)
    np.testing.assert_allclose(art.marker.get_xydata()[0], r_vec / 1e3)
    assert_on_conic(*art.after.orbit.get_data(), dk.burn_prograde(orbit, 2.0, 300.0).after)


def test_plot_energy_gain_is_oberth_relation():
    orbit = dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 33000e3, MARS.mu)
    ax = axes()
    line = plot_energy_gain(ax, orbit, 150.0)
    x, y = line.get_data()
    assert x[0] == -180.0 and x[-1] == 180.0
    # dE = v dv + dv^2 / 2 for a prograde burn (common practice: Oberth relation)
    np.testing.assert_allclose(y, dk.energy_gain(orbit.speed(np.radians(x)), 150.0) / 1e6, rtol=1e-9)
    assert x[np.argmax(y)] == 0.0  # most at periapsis
    assert "(deg)" in ax.get_xlabel() and "(MJ/kg)" in ax.get_ylabel()
    update_energy_gain(line, orbit, 300.0)
    np.testing.assert_allclose(
        line.get_ydata(), dk.energy_gain(orbit.speed(np.radians(x)), 300.0) / 1e6, rtol=1e-9
    )


def test_plot_energy_gain_on_hyperbola_stays_inside_asymptotes():
    hyperbola = dk.Conic.from_vinf(EARTH.radius + 300e3, 3000.0, EARTH.mu)
    x, y = plot_energy_gain(axes(), hyperbola, 100.0).get_data()
    assert np.isfinite(y).all()
    assert np.abs(np.radians(x)).max() < float(hyperbola.true_anomaly_limit)


def test_draw_transfer_arcs_join_the_orbits():
    r1, r2, rb = 7000e3, 42164e3, 90000e3
    ax = axes()
    art = draw_transfer(ax, r1, r2, rb=rb, body_radius=EARTH.radius)
    hx, hy = art.hohmann.get_data()
    np.testing.assert_allclose([hx[0], hy[0]], [r1 / 1e3, 0.0], atol=1e-6)
    np.testing.assert_allclose([hx[-1], hy[-1]], [-r2 / 1e3, 0.0], atol=1e-6)
    assert_on_conic(hx, hy, dk.Conic.from_apsides(r1, r2, EARTH.mu))
    bx, by = art.bielliptic.get_data()
    r = np.hypot(bx, by) * 1e3
    assert r.max() == pytest.approx(rb, rel=1e-9) and r.min() == pytest.approx(r1, rel=1e-9)
    assert r[-1] == pytest.approx(r2, rel=1e-9)
    np.testing.assert_allclose(np.hypot(*art.initial.get_data()), r1 / 1e3)
    np.testing.assert_allclose(np.hypot(*art.final.get_data()), r2 / 1e3)


def test_budget_waterfall_bars_are_budget_masses():
    budget = (
        dk.Budget(1200.0, 3100.0, name="demo", dry_mass=700.0)
        .add("raise", 600.0)
        .add("trim", 50.0, margin=0.1)
    )
    ax = axes()
    art = plot_budget_waterfall(ax, budget)
    heights = [bar.get_height() for bar in art.remaining]
    np.testing.assert_allclose(heights, [1200.0, *budget.mass_after])
    np.testing.assert_allclose([bar.get_height() for bar in art.spent][1:], budget.propellant_per_line)
    assert art.dry.get_ydata()[0] == pytest.approx(700.0)
    assert ax.get_ylabel() == "vehicle mass (kg)"
    budget.add("more", 100.0)
    art2 = update_budget_waterfall(ax, art, budget)
    assert len(art2.remaining) == 4
    np.testing.assert_allclose([bar.get_height() for bar in art2.remaining][1:], budget.mass_after)


def test_budget_waterfall_mouse_readout_names_the_line():
    """The x axis holds line names, so the readout names the bar under the cursor."""
    budget = dk.Budget(1200.0, 3100.0).add("raise", 600.0).add("trim", 50.0)
    ax = axes()
    art = plot_budget_waterfall(ax, budget)
    text = ax.format_coord(1.2, 800.0)
    assert text.startswith("raise: ")
    assert f"{budget.propellant_per_line[0]:,.1f} kg" in text and f"{budget.mass_after[0]:,.1f} kg" in text
    assert "cursor at 800 kg" in text
    assert ax.format_coord(-0.3, 10.0).startswith("start: 1,200.0 kg")
    assert ax.format_coord(5.0, 10.0) == "cursor at 10 kg"
    budget.replace(1, "trim", 75.0)
    update_budget_waterfall(ax, art, budget)  # heights move in place: the readout follows
    assert f"mass after {budget.mass_after[1]:,.1f} kg" in ax.format_coord(2.0, 0.0)


def test_gallery_figure_saved(artifacts):
    """One figure with every helper, saved for a person to look at."""
    fig = Figure(figsize=(9, 8), dpi=100)
    (a, b), (c, d) = fig.subplots(2, 2)
    orbit = dk.Conic.from_apsides(MARS.radius + 300e3, MARS.radius + 20000e3, MARS.mu)
    draw_conic(a, orbit, body_radius=MARS.radius, label="before")
    draw_burn(a, orbit, 0.6, 250.0)
    plot_energy_gain(b, orbit, 250.0)
    draw_transfer(c, EARTH.radius + 400e3, 42164e3, rb=80000e3, body_radius=EARTH.radius)
    c.legend(fontsize="small")
    budget = dk.Budget(2000.0, 3100.0, dry_mass=900.0).add("departure", 1200.0).add("capture", 800.0)
    plot_budget_waterfall(d, budget)
    fig.tight_layout()
    path = artifacts / "plot_helpers.png"
    fig.savefig(path)
    assert path.stat().st_size > 20_000
