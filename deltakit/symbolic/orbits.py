"""Catalog entries about one orbit: vis-viva, burn energy gains, apsis change.

Conventions: SI units, two-body motion about a point mass of gravitational
parameter ``mu``; burns are impulsive (the position does not change during
the burn). A prograde delta-v is positive, a retrograde one negative.
"""

from __future__ import annotations

from typing import Any

import sympy as sp

from ._algebra import equation, solve_for, tidy
from ._builder import Builder
from ._registry import derive, entry
from .derivation import Derivation

__all__: list[str] = []

_TWO_BODY = "Two-body motion: a point mass in the field of one spherical central body, no other forces."
_IMPULSIVE = "Impulsive burn: the velocity changes instantly, the position does not."


@entry("vis_viva", title="Vis-viva: speed at a radius")
def _vis_viva() -> Derivation:
    b = Builder("vis_viva")
    r = b.symbol("r", "distance from the centre of the central body", "m")
    a = b.symbol("a", "semi-major axis (negative for a hyperbola)", "m", real=True, nonzero=True)
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    v = b.symbol("v", "speed at radius r", "m/s")
    rp = b.symbol("rp", "periapsis radius", "m", "r_{p}")
    ra = b.symbol("ra", "apoapsis radius", "m", "r_{a}")
    vp = b.symbol("vp", "speed at periapsis", "m/s", "v_{p}")
    va = b.symbol("va", "speed at apoapsis", "m/s", "v_{a}")
    energy = b.symbol("energy", "specific orbital energy", "J/kg", r"\varepsilon", real=True)

    b.step("Specific energy: kinetic plus potential, per unit mass, is conserved.", energy, v**2 / 2 - mu / r)
    conserve_energy = b.relation(
        "Energy conservation between periapsis and apoapsis.",
        equation(vp**2 / 2 - mu / rp, va**2 / 2 - mu / ra),
    )
    momentum = equation(rp * vp, ra * va)
    b.relation(
        "Angular momentum conservation: at the apsides the velocity is perpendicular to the radius.", momentum
    )
    va_of_vp = solve_for(momentum, va)[0]
    vp_value = solve_for(conserve_energy.subs(va, va_of_vp), vp)[0]
    b.step("Eliminate the apoapsis speed and solve for the periapsis speed.", vp, vp_value)
    energy_apsides = tidy((vp**2 / 2 - mu / rp).subs(vp, vp_value))
    b.step("Energy evaluated at periapsis.", energy, energy_apsides)
    energy_a = tidy(energy_apsides.subs(ra, 2 * a - rp))
    b.step("The apsides are $2a$ apart along the major axis: $r_p + r_a = 2a$.", energy, energy_a)
    speed = solve_for(equation(v**2 / 2 - mu / r, energy_a), v)[0]
    speed = sp.sqrt(sp.expand(speed**2))  # v > 0, so v = sqrt(v^2) in expanded form
    b.step("Solve the energy relation at radius $r$ for the speed.", v, speed)
    return b.build(
        result=speed,
        target=v,
        parameters=(r, a, mu),
        twin="deltakit.vis_viva",
        assumptions=[_TWO_BODY, "Holds on every conic: a > 0 for an ellipse, a < 0 for a hyperbola."],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, energy law and vis-viva (Ch. 2)",
            "Vallado, Fundamentals of Astrodynamics and Applications, vis-viva equation (Ch. 1)",
        ],
    )


@entry("orbital_period", "period", title="Period of an elliptic orbit (Kepler's third law)")
def _orbital_period() -> Derivation:
    b = Builder("orbital_period")
    a = b.symbol("a", "semi-major axis", "m")
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    e = b.symbol("e", "eccentricity (below 1)", "1", "e", nonnegative=True, real=True)
    h = b.symbol("h", "specific angular momentum", "m^2/s")
    r = b.symbol("r", "distance from the centre of the central body", "m")
    nu_rate = b.symbol("nu_rate", "rate of change of the true anomaly", "rad/s", r"\dot{\nu}")
    area_rate = b.symbol("area_rate", "area swept per unit time by the radius", "m^2/s", r"\dot{A}")
    area = b.symbol("area", "area of the ellipse", "m^2", "A")
    minor = b.symbol("b", "semi-minor axis", "m", "b")
    period = b.symbol("period", "orbital period", "s", "T")

    rate = b.step(
        "The radius sweeps a thin triangle: the area rate is $r^2\\dot\\nu/2$.", area_rate, r**2 * nu_rate / 2
    )
    rate = b.step(
        "Angular momentum is $h = r^2 \\dot\\nu$, so the area rate is constant (Kepler's second law).",
        area_rate,
        rate.subs(nu_rate, h / r**2),
    )
    b.step("Area of the ellipse, with $b = a\\sqrt{1 - e^2}$.", area, sp.pi * a * minor)
    ellipse_area = sp.pi * a * a * sp.sqrt(1 - e**2)
    conic = b.relation(
        "Periapsis from the conic equation ($\\nu = 0$) and from the geometry ($a(1 - e)$).",
        equation(h**2 / (mu * (1 + e)), a * (1 - e)),
    )
    h_value = b.step("Solve for the angular momentum.", h, solve_for(conic, h)[0])
    value = sp.powsimp(tidy(ellipse_area / rate.subs(h, h_value)), force=True)
    b.step("The period is the whole area divided by the constant area rate: e cancels.", period, value)
    return b.build(
        result=value,
        target=period,
        parameters=(a, mu),
        twin="deltakit.Conic:period",
        assumptions=[_TWO_BODY, "A closed orbit: an ellipse or a circle (e < 1)."],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, period of an elliptical orbit (Ch. 2)",
            "Vallado, Fundamentals of Astrodynamics and Applications, Kepler's third law (Ch. 1)",
        ],
        twin_adapter=_period_twin,
    )


def _period_twin(a: Any, mu: Any) -> Any:
    import deltakit as dk

    from .._checks import positive

    return dk.Conic.circular(positive(a, "a", "m"), mu).period


@entry("oberth", "energy_gain", title="Energy gain of a prograde burn (Oberth relation)")
def _oberth() -> Derivation:
    b = Builder("oberth")
    v = b.symbol("v", "speed just before the burn", "m/s", zero_ok=True)
    dv = b.symbol("dv", "delta-v along the velocity (negative: retrograde)", "m/s", r"\Delta v", real=True)
    r = b.symbol("r", "radius where the burn happens", "m")
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    e_before = b.symbol(
        "energy_before", "specific orbital energy before the burn", "J/kg", r"\varepsilon_{0}", real=True
    )
    e_after = b.symbol(
        "energy_after", "specific orbital energy after the burn", "J/kg", r"\varepsilon_{1}", real=True
    )
    gain = b.symbol(
        "energy_change", "change of specific orbital energy", "J/kg", r"\Delta\varepsilon", real=True
    )
    slope = b.symbol(
        "slope",
        "extra gain per unit of speed at the burn point",
        "m/s",
        r"\frac{\partial \Delta\varepsilon}{\partial v}",
        real=True,
    )

    before = b.step("Specific energy before the burn.", e_before, v**2 / 2 - mu / r)
    after = b.step(
        "The burn adds $\\Delta v$ along the velocity at the same radius: the potential term is unchanged.",
        e_after,
        (v + dv) ** 2 / 2 - mu / r,
    )
    change = sp.expand(after - before)
    b.step("Subtract: the potential energy cancels.", gain, change)
    b.step(
        "The same $\\Delta v$ gives more energy the faster the vehicle "
        "moves: deep in the well, at periapsis.",
        slope,
        sp.diff(change, v),
    )
    return b.build(
        result=change,
        target=gain,
        parameters=(v, dv),
        twin="deltakit.energy_gain",
        assumptions=[_TWO_BODY, _IMPULSIVE, "The delta-v is along the velocity (prograde or retrograde)."],
        references=["Common practice: direct consequence of the specific-energy definition"],
    )


@entry("inplane_burn", title="Energy gain of a general in-plane burn")
def _inplane_burn() -> Derivation:
    b = Builder("inplane_burn")
    rp = b.symbol("rp", "periapsis radius of the orbit before the burn", "m", "r_{p}")
    e = b.symbol("e", "eccentricity before the burn", "1", "e", nonnegative=True, real=True)
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    nu = b.symbol("nu", "true anomaly of the burn point", "rad", r"\nu", real=True)
    radial = b.symbol(
        "radial", "delta-v component along the outward radius", "m/s", r"\Delta v_{r}", real=True
    )
    transverse = b.symbol(
        "transverse",
        "delta-v component along the motion, perpendicular to the radius",
        "m/s",
        r"\Delta v_{t}",
        real=True,
    )
    h = b.symbol("h", "specific angular momentum", "m^2/s")
    r = b.symbol("r", "radius at the burn point", "m")
    v_r = b.symbol("v_radial", "radial velocity before the burn", "m/s", "v_{r}", real=True)
    v_t = b.symbol("v_transverse", "transverse velocity before the burn", "m/s", "v_{t}", real=True)
    gain = b.symbol(
        "energy_change", "change of specific orbital energy", "J/kg", r"\Delta\varepsilon", real=True
    )
    t = sp.Symbol("t", real=True)

    change_components = sp.expand(((v_r + radial) ** 2 + (v_t + transverse) ** 2 - v_r**2 - v_t**2) / 2)
    b.step(
        "Specific energy is $v^2/2 - \\mu/r$; the radius does not change, so only the kinetic term changes.",
        gain,
        change_components,
    )
    radius = b.step(
        "The conic equation, with h the specific angular momentum.", r, h**2 / (mu * (1 + e * sp.cos(nu)))
    )
    h_value = solve_for(equation(radius.subs(nu, 0), rp), h)[0]
    b.step("At periapsis ($\\nu = 0$) the radius is $r_p$.", h, h_value)
    b.step("Angular momentum is r times the transverse velocity.", v_t, tidy(h / radius))
    nu_t = sp.Function("nu")(t)
    radial_rate = sp.diff(radius.subs(nu, nu_t), t).subs(sp.Derivative(nu_t, t), h / radius**2).subs(nu_t, nu)
    b.step(
        "Radial velocity: differentiate the conic equation in time, with $\\dot\\nu = h/r^2$.",
        v_r,
        tidy(radial_rate),
    )
    velocities = {v_r: tidy(radial_rate), v_t: tidy(h / radius)}
    change = sp.expand(change_components.subs(velocities).subs(h, h_value))
    b.step("Substitute the velocity components before the burn.", gain, change)
    return b.build(
        result=change,
        target=gain,
        parameters=(rp, e, mu, nu, radial, transverse),
        twin="deltakit.burn:energy_change",
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            "The delta-v lies in the orbit plane (radial and transverse parts).",
            "The transverse speed after the burn stays positive (the motion is not reversed).",
        ],
        references=[
            "Common practice: specific energy of the velocity after the burn, conic velocity components"
        ],
        twin_adapter=_burn_twin,
    )


def _burn_twin(rp: Any, e: Any, mu: Any, nu: Any, radial: Any, transverse: Any) -> Any:
    import deltakit as dk

    return dk.burn(dk.Conic(rp, e, mu), nu, radial=radial, transverse=transverse).energy_change


@entry("apsis_change", title="Tangential apsis change: apoapsis after a prograde periapsis burn")
def _apsis_change() -> Derivation:
    b = Builder("apsis_change")
    rp = b.symbol("rp", "periapsis radius (where the burn happens)", "m", "r_{p}")
    ra = b.symbol("ra", "apoapsis radius before the burn", "m", "r_{a}")
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    dv = b.symbol(
        "dv", "delta-v along the velocity at periapsis (negative: retrograde)", "m/s", r"\Delta v", real=True
    )
    vp = b.symbol("vp", "periapsis speed before the burn", "m/s", "v_{p}")
    w = b.symbol("w", "periapsis speed after the burn", "m/s", "w_{p}")
    r_new = b.symbol("ra_new", "apoapsis radius after the burn", "m", r"r_{a}'")
    v_new = b.symbol("va_new", "apoapsis speed after the burn", "m/s", r"v_{a}'")

    vis_viva = derive("vis_viva")
    r_s, a_s, mu_s = vis_viva.parameters
    vp_value = vis_viva.result.subs({r_s: rp, a_s: (rp + ra) / 2, mu_s: mu}, simultaneous=True)
    vp_value = tidy(vp_value)
    b.step("Periapsis speed from vis-viva with $a = (r_p + r_a)/2$.", vp, vp_value)
    b.step("A tangential burn at periapsis keeps the burn point an apsis and adds $\\Delta v$.", w, vp + dv)
    momentum = b.relation("Angular momentum at the new apsides.", equation(rp * w, r_new * v_new))
    energy = b.relation(
        "Energy conservation between the new apsides.",
        equation(w**2 / 2 - mu / rp, v_new**2 / 2 - mu / r_new),
    )
    v_new_value = solve_for(momentum, v_new)[0]
    roots = solve_for(energy.subs(v_new, v_new_value), r_new)
    other = [root for root in roots if tidy(root - rp) != 0]
    (apoapsis_w,) = other
    apoapsis_w = sp.factor(apoapsis_w)
    b.step(
        "Solve for the radius: one root is $r_p$ itself, the other is the new apoapsis.", r_new, apoapsis_w
    )
    apoapsis = apoapsis_w.subs(w, vp_value + dv)
    b.step("Substitute the speed after the burn.", r_new, apoapsis)
    return b.build(
        result=apoapsis,
        target=r_new,
        parameters=(rp, ra, mu, dv),
        twin="deltakit.burn_prograde:after.ra",
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            (
                "The burn is along the velocity at periapsis; the burn point stays the periapsis "
                "(speed after the burn above the circular speed) and the orbit stays bound."
            ),
        ],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, orbit equation at apoapsis (Ch. 2)",
        ],
        twin_adapter=_apsis_twin,
    )


def _apsis_twin(rp: Any, ra: Any, mu: Any, dv: Any) -> Any:
    import deltakit as dk

    return dk.burn_prograde(dk.Conic.from_apsides(rp, ra, mu), 0.0, dv).after.ra
