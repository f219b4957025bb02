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


def test_retrograde_equatorial_orbit_is_drawn_where_it_flies():
    """inc = pi: seen from +z the orbit runs clockwise, argp and nu measured from +x that way.

    The convention of the Conic module notes (retrograde equatorial), written
    out by hand here: r (cos(argp + nu), -sin(argp + nu)). The drawing shows
    the inertial x, y, not the orbit plane's own axes (whose y is -y there).
    """
    orbit = dk.Conic(EARTH.radius + 700e3, 0.3, EARTH.mu, argp=0.7, inc=np.pi)
    x, y = draw_conic(axes(), orbit, n=9).orbit.get_data()
    nu = np.linspace(-np.pi, np.pi, 9)
    r = float(orbit.p) / (1.0 + 0.3 * np.cos(nu)) / 1e3
    np.testing.assert_allclose(x, r * np.cos(0.7 + nu), rtol=1e-12, atol=1e-9)
    np.testing.assert_allclose(y, -r * np.sin(0.7 + nu), rtol=1e-12, atol=1e-9)
    burn = draw_burn(axes(), orbit, 0.0, 100.0)  # at periapsis: prograde is clockwise, along -y turned
    rp = float(orbit.rp) / 1e3
    np.testing.assert_allclose(burn.marker.get_xydata()[0], [rp * np.cos(0.7), -rp * np.sin(0.7)], rtol=1e-12)
    u, v = float(burn.arrow.U[0]), float(burn.arrow.V[0])
    assert u * np.sin(0.7) + v * np.cos(0.7) < 0.0 < abs(u) + abs(v)  # along the clockwise tangent
    assert_on_conic(
        *burn.after.orbit.get_data(),
        dk.Conic(rp * 1e3, float(burn_at_angle(orbit, 0.0, 100.0, 0.0).after.e), EARTH.mu, argp=-0.7),
    )


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


# ---------------------------------------------------------------------- panels: views hold their curves
def _visible_lines(fig):
    from matplotlib.lines import Line2D

    return [line for line in fig.findobj(Line2D) if line.get_visible() and line.axes is not None]


def _points_outside_view(ax, line):
    """Finite data points of ``line`` that lie outside the axes limits (its own axes)."""
    if line.get_transform() != ax.transData:
        return 0  # drawn in axes coordinates (axhline, axvline): inside by construction
    x, y = (np.asarray(v, float) for v in line.get_data())
    keep = np.isfinite(x) & np.isfinite(y)
    (x0, x1), (y0, y1) = sorted(ax.get_xlim()), sorted(ax.get_ylim())
    tx, ty = 1e-9 * (x1 - x0), 1e-9 * (y1 - y0)  # rounding at the frame (180.00000000000003 deg)
    x, y = x[keep], y[keep]
    return int(np.count_nonzero((x < x0 - tx) | (x > x1 + tx) | (y < y0 - ty) | (y > y1 + ty)))


def _curves_under_legends(fig):
    """(legend, artist) pairs where a legend box covers part of a curve or bar of the figure."""
    from matplotlib.legend import Legend
    from matplotlib.patches import Rectangle

    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    legends = [legend for legend in fig.findobj(Legend) if legend.get_visible()]
    own = {id(a) for legend in legends for a in legend.findobj()}
    found = []
    for legend in legends:
        box = legend.get_window_extent(renderer)
        for line in _visible_lines(fig):
            if id(line) in own or line.get_transform() is None:
                continue
            xy = line.get_transform().transform(np.column_stack(line.get_data()).astype(float))
            xy = xy[np.isfinite(xy).all(axis=1)]
            clip = line.axes.bbox
            inside_axes = (
                (clip.x0 <= xy[:, 0]) & (xy[:, 0] <= clip.x1) & (clip.y0 <= xy[:, 1]) & (xy[:, 1] <= clip.y1)
            )
            xy = xy[inside_axes | (not line.get_clip_on())]
            hit = (box.x0 < xy[:, 0]) & (xy[:, 0] < box.x1) & (box.y0 < xy[:, 1]) & (xy[:, 1] < box.y1)
            if hit.any():
                found.append((line.get_label(), [t.get_text() for t in legend.get_texts()][:2]))
        for patch in fig.findobj(Rectangle):
            if id(patch) in own or patch.axes is None or patch is patch.axes.patch or not patch.get_visible():
                continue
            if patch.get_width() == 0 or patch.get_height() == 0:
                continue
            other = patch.get_window_extent(renderer)
            if not np.isfinite(other.get_points()).all():
                continue  # a bar with no height (an infeasible line's NaN) is not drawn
            if (
                min(box.x1, other.x1) - max(box.x0, other.x0) > 1
                and min(box.y1, other.y1) - max(box.y0, other.y0) > 1
            ):
                found.append(("bar", [t.get_text() for t in legend.get_texts()][:2]))
    return found


def test_legend_check_sees_a_legend_on_a_curve():
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig = Figure(figsize=(4, 3))
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.plot(np.linspace(0, 1, 50), np.full(50, 0.9), label="flat line near the top")
    ax.set_ylim(0.0, 1.0)
    ax.legend(loc="upper left")
    assert _curves_under_legends(fig)


#: Cases of the burn-point panel that once drew orbits off the axes or under the legend.
EXPLORER_CASES = {
    "default": {},
    "raised apoapsis": {"dv": 400.0, "nu": 0.0},
    "escape": {"dv": 1000.0, "nu": 0.0},
    "low orbit, big burn": {
        "body": "Earth",
        "periapsis_altitude": 400e3,
        "apoapsis_altitude": 400e3,
        "dv": 2000.0,
    },
    "retrograde capture-like": {"dv": 600.0, "direction": "retrograde", "nu": 0.0},
    "radial out at 120 deg": {"dv": 800.0, "direction": "radial out", "nu": 2.0944},
    "any angle": {"dv": 300.0, "direction": "any angle from prograde", "angle": 2.5},
}


@pytest.mark.parametrize("case", EXPLORER_CASES, ids=list(EXPLORER_CASES))
def test_burn_point_view_holds_both_orbits_with_legends_off_the_curves(case, artifacts):
    from deltakit.widgets import BurnPointExplorer

    panel = BurnPointExplorer()
    panel.set(**EXPLORER_CASES[case])
    assert panel.error == ""
    art = panel._artists
    for line in (art["before"].orbit, art["burn"].after.orbit, art["burn"].marker):
        assert np.isfinite(line.get_xydata()).any()
        assert _points_outside_view(panel.orbit_axes, line) == 0, (
            f"{case}: {line.get_label()} leaves the view"
        )
    for line in (art["curve"], art["current"], art["apoapsis"]):
        assert _points_outside_view(panel.energy_axes, line) == 0, f"{case}: energy curve leaves the view"
    assert _curves_under_legends(panel.figure) == []
    name = case.replace(" ", "_").replace(",", "")
    panel.figure.savefig(artifacts / f"burn_point_{name}.png", dpi=100)


PANEL_CASES = {
    "BurnPointExplorer": {
        "body": "Earth",
        "periapsis_altitude": 200e3,
        "apoapsis_altitude": 400e3,
        "dv": 1995.0,
    },
    "PropellantTrade": {"speed": 19_990.0, "propellant_mass": 40_000.0},
    "TransferTrade": {"body": "Mars", "initial_altitude": 200e3, "final_altitude": 1e6, "plane_change": 3.0},
    "EscapeFlyby": {
        "body": "Earth",
        "periapsis_altitude": 200e3,
        "apoapsis_altitude": 200e3,
        "vinf": 19_950.0,
        "flyby_dv": 2990.0,
    },
    "BudgetBuilder": {"dry_mass": 3000.0},
}


@pytest.mark.parametrize("panel_name", PANEL_CASES)
@pytest.mark.parametrize("case", ["default", "stressed"])
def test_panel_pictures_keep_legends_off_the_curves(panel_name, case, artifacts):
    """Each panel, as it opens and pushed to the ends of its controls; the pictures land in the artefacts."""
    from deltakit import widgets

    panel = getattr(widgets, panel_name)()
    if case == "stressed":
        panel.set(**PANEL_CASES[panel_name])
    assert panel.error == ""
    for line in _visible_lines(panel.figure):
        if line is getattr(panel, "_artists", {}).get("clip"):
            continue  # the circle an orbit is clipped at: partly outside by design
        if line.get_clip_on() and line.axes.get_xscale() == "linear" and line.axes.get_yscale() == "linear":
            assert _points_outside_view(line.axes, line) == 0 or line.get_label().startswith("_"), (
                line.get_label()
            )
    assert _curves_under_legends(panel.figure) == []
    panel.figure.savefig(artifacts / f"panel_{panel_name}_{case}.png", dpi=100)
