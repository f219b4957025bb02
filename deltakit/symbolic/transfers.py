"""Catalog entries for transfers between circular orbits and plane changes.

Conventions: SI units; every delta-v is a magnitude (>= 0), so a raising and a
lowering transfer between the same radii cost the same; angles in rad, in
[0, pi]. Orbits are circular and coplanar unless a plane change is asked for.
"""

from __future__ import annotations

import sympy as sp

from ._algebra import equation, solve_for, tidy
from ._builder import Builder
from ._registry import derive, entry
from .derivation import Derivation

__all__: list[str] = []

_TWO_BODY = "Two-body motion about one spherical central body."
_IMPULSIVE = "Impulsive burns, each along the local velocity (tangential)."
_COPLANAR = "Initial and final orbits are circular and coplanar."


def _vis_viva(r: sp.Expr, a: sp.Expr, mu: sp.Expr) -> sp.Expr:
    """Speed at ``r`` on a conic of semi-major axis ``a``, from the vis-viva entry."""
    d = derive("vis_viva")
    r_s, a_s, mu_s = d.parameters
    return tidy(d.result.subs({r_s: r, a_s: a, mu_s: mu}, simultaneous=True))


def _half_period(a: sp.Expr, mu: sp.Expr) -> sp.Expr:
    """Half the period of an ellipse of semi-major axis ``a``, from the period entry."""
    d = derive("orbital_period")
    a_s, mu_s = d.parameters
    return d.result.subs({a_s: a, mu_s: mu}, simultaneous=True) / 2


def _circular_speed(b: Builder, r: sp.Symbol, mu: sp.Symbol) -> sp.Expr:
    """Record gravity = centripetal acceleration, solve it, return the speed."""
    v = b.symbol("v_circle", "speed on a circular orbit of radius r", "m/s", r"v_{c}")
    balance = b.relation(
        "On a circular orbit gravity supplies the centripetal acceleration.", equation(mu / r**2, v**2 / r)
    )
    return b.step("Solve for the circular speed.", v, solve_for(balance, v)[0])


@entry("hohmann", title="Hohmann transfer between circular orbits")
def _hohmann() -> Derivation:
    b = Builder("hohmann")
    r1 = b.symbol("r1", "radius of the initial circular orbit", "m", "r_{1}")
    r2 = b.symbol("r2", "radius of the final circular orbit", "m", "r_{2}")
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    r = b.symbol("r", "radius of a circular orbit", "m")
    v1 = b.symbol("v1", "speed on the initial orbit", "m/s", "v_{1}")
    v2 = b.symbol("v2", "speed on the final orbit", "m/s", "v_{2}")
    a_t = b.symbol("a_t", "semi-major axis of the transfer ellipse", "m", "a_{t}")
    v_depart = b.symbol("v_depart", "transfer-ellipse speed at r1", "m/s", r"v_{t1}")
    v_arrive = b.symbol("v_arrive", "transfer-ellipse speed at r2", "m/s", r"v_{t2}")
    burn1 = b.symbol("burn1", "first burn (at r1)", "m/s", r"\Delta v_{1}")
    burn2 = b.symbol("burn2", "second burn (at r2)", "m/s", r"\Delta v_{2}")
    total = b.symbol("total", "total delta-v", "m/s", r"\Delta v")

    circle = _circular_speed(b, r, mu)
    speed1 = b.step("Initial orbit.", v1, circle.subs(r, r1))
    speed2 = b.step("Final orbit.", v2, circle.subs(r, r2))
    a_value = b.step(
        "The transfer ellipse touches both orbits: its apsides are $r_1$ and $r_2$.", a_t, (r1 + r2) / 2
    )
    depart = b.step("Vis-viva on the transfer ellipse at $r_1$.", v_depart, _vis_viva(r1, a_value, mu))
    arrive = b.step("Vis-viva on the transfer ellipse at $r_2$.", v_arrive, _vis_viva(r2, a_value, mu))
    first = b.step(
        "First burn: from the circular speed to the ellipse speed at $r_1$.", burn1, sp.Abs(depart - speed1)
    )
    second = b.step(
        "Second burn: from the ellipse speed to the circular speed at $r_2$.", burn2, sp.Abs(speed2 - arrive)
    )
    b.step("The total is the sum of the two burn magnitudes.", total, burn1 + burn2)
    whole = first + second
    duration = b.symbol("duration", "time from the first burn to the second", "s", "t_{t}")
    coast = b.step(
        "The coast is half the period of the transfer ellipse (Kepler's third law).",
        duration,
        _half_period(a_t, mu),
    )
    coast = coast.subs(a_t, a_value)
    return b.build(
        result=whole,
        target=total,
        parameters=(r1, r2, mu),
        twin="deltakit.hohmann:total",
        outputs={"burn1": first, "burn2": second, "total": whole, "duration": coast},
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            _COPLANAR,
            "The transfer is half an ellipse tangent to both orbits.",
        ],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, Hohmann transfer (Ch. 6)",
            "Vallado, Fundamentals of Astrodynamics and Applications, Hohmann transfer (Ch. 6)",
        ],
    )


@entry("bielliptic", title="Bi-elliptic transfer between circular orbits")
def _bielliptic() -> Derivation:
    b = Builder("bielliptic")
    r1 = b.symbol("r1", "radius of the initial circular orbit", "m", "r_{1}")
    r2 = b.symbol("r2", "radius of the final circular orbit", "m", "r_{2}")
    rb = b.symbol("rb", "intermediate apoapsis radius (>= max(r1, r2))", "m", "r_{b}")
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    r = b.symbol("r", "radius of a circular orbit", "m")
    a1 = b.symbol("a1", "semi-major axis of the first ellipse (r1 to rb)", "m", "a_{1}")
    a2 = b.symbol("a2", "semi-major axis of the second ellipse (rb to r2)", "m", "a_{2}")
    burn1 = b.symbol("burn1", "first burn (at r1)", "m/s", r"\Delta v_{1}")
    burn2 = b.symbol("burn2", "second burn (at rb)", "m/s", r"\Delta v_{2}")
    burn3 = b.symbol("burn3", "third burn (at r2)", "m/s", r"\Delta v_{3}")
    total = b.symbol("total", "total delta-v", "m/s", r"\Delta v")

    circle = _circular_speed(b, r, mu)
    first_a = b.step("First ellipse: apsides $r_1$ and $r_b$.", a1, (r1 + rb) / 2)
    second_a = b.step("Second ellipse: apsides $r_b$ and $r_2$.", a2, (r2 + rb) / 2)
    first = b.step(
        "First burn at $r_1$: circular speed to first-ellipse speed (vis-viva).",
        burn1,
        sp.Abs(_vis_viva(r1, first_a, mu) - circle.subs(r, r1)),
    )
    second = b.step(
        "Second burn at $r_b$: from the first ellipse to the second.",
        burn2,
        sp.Abs(_vis_viva(rb, second_a, mu) - _vis_viva(rb, first_a, mu)),
    )
    third = b.step(
        "Third burn at $r_2$: second-ellipse speed to circular speed.",
        burn3,
        sp.Abs(circle.subs(r, r2) - _vis_viva(r2, second_a, mu)),
    )
    b.step("The total is the sum of the three burn magnitudes.", total, burn1 + burn2 + burn3)
    whole = first + second + third
    duration = b.symbol("duration", "time from the first burn to the third", "s", "t_{t}")
    coast = b.step(
        "Two coasts, each half the period of its ellipse (Kepler's third law).",
        duration,
        _half_period(a1, mu) + _half_period(a2, mu),
    )
    coast = coast.subs({a1: first_a, a2: second_a})
    return b.build(
        result=whole,
        target=total,
        parameters=(r1, r2, rb, mu),
        twin="deltakit.bielliptic:total",
        outputs={"burn1": first, "burn2": second, "burn3": third, "total": whole, "duration": coast},
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            _COPLANAR,
            "Two half ellipses meeting at the intermediate radius $r_b \\geq \\max(r_1, r_2)$.",
        ],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, bi-elliptic Hohmann transfer (Ch. 6)",
            "Vallado, Fundamentals of Astrodynamics and Applications, bi-elliptic transfer (Ch. 6)",
        ],
    )


@entry("plane_change", title="Pure plane change")
def _plane_change() -> Derivation:
    b = Builder("plane_change")
    v = b.symbol("v", "speed, the same before and after", "m/s", zero_ok=True)
    angle = b.symbol(
        "angle", "angle between the old and the new velocity, in [0, pi]", "rad", r"\theta", zero_ok=True
    )
    dv = b.symbol("dv", "delta-v of the turn", "m/s", r"\Delta v")
    dv2 = b.symbol("dv_squared", "square of the delta-v", "m^2/s^2", r"\Delta v^{2}")

    before = sp.Matrix([v, 0])
    after = sp.Matrix([v * sp.cos(angle), v * sp.sin(angle)])
    difference = after - before
    b.step(
        "Velocity change, in the plane of the two velocities (old one along the first axis).",
        dv2,
        difference.dot(difference),
    )
    squared = sp.factor(sp.trigsimp(sp.expand(difference.dot(difference))))
    b.step("Expand with $\\sin^2 + \\cos^2 = 1$.", dv2, squared)
    phi = sp.Symbol("phi", positive=True)  # half the turn angle
    half = sp.factor(sp.fu(squared.subs(angle, 2 * phi))).subs(phi, angle / 2)
    b.step("Half-angle identity: $1 - \\cos\\theta = 2 \\sin^2(\\theta/2)$.", dv2, half)
    magnitude = sp.sqrt(half)
    b.step("Take the square root.", dv, magnitude)
    value = magnitude.replace(sp.Abs, lambda x: x)  # sin(theta/2) >= 0 for theta in [0, pi]
    b.step("For $\\theta$ in $[0, \\pi]$ the sine of $\\theta/2$ is not negative.", dv, value)
    return b.build(
        result=value,
        target=dv,
        parameters=(v, angle),
        twin="deltakit.plane_change",
        assumptions=["Impulsive burn that turns the velocity without changing the speed."],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, plane change manoeuvres (Ch. 6)",
            "Vallado, Fundamentals of Astrodynamics and Applications, inclination-only change (Ch. 6)",
        ],
    )


@entry("combined_plane_change", title="Combined plane and speed change")
def _combined_plane_change() -> Derivation:
    b = Builder("combined_plane_change")
    v1 = b.symbol("v1", "speed before the burn", "m/s", "v_{1}", zero_ok=True)
    v2 = b.symbol("v2", "speed after the burn", "m/s", "v_{2}", zero_ok=True)
    angle = b.symbol("angle", "angle between the two velocities, in [0, pi]", "rad", r"\theta", zero_ok=True)
    dv = b.symbol("dv", "delta-v of the burn", "m/s", r"\Delta v")
    dv2 = b.symbol("dv_squared", "square of the delta-v", "m^2/s^2", r"\Delta v^{2}")

    before = sp.Matrix([v1, 0])
    after = sp.Matrix([v2 * sp.cos(angle), v2 * sp.sin(angle)])
    difference = after - before
    b.step(
        "Velocity change, in the plane of the two velocities (old one along the first axis).",
        dv2,
        difference.dot(difference),
    )
    squared = sp.expand(sp.trigsimp(sp.expand(difference.dot(difference))))
    b.step("Expand with $\\sin^2 + \\cos^2 = 1$: the law of cosines.", dv2, squared)
    value = sp.sqrt(squared)
    b.step("Take the square root.", dv, value)
    return b.build(
        result=value,
        target=dv,
        parameters=(v1, v2, angle),
        twin="deltakit.combined_plane_change",
        assumptions=["One impulsive burn that changes both the speed and the direction of the velocity."],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, combined plane change (Ch. 6)",
            "Vallado, Fundamentals of Astrodynamics and Applications, combined changes (Ch. 6)",
        ],
    )
