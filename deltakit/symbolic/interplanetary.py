"""Catalog entries between the planets: C3, and the time of flight Lambert's solver inverts.

Conventions: SI units; two-body motion about one central body (the Sun on a
transfer, the planet near it). ``C3`` is twice the specific orbital energy,
the square of the hyperbolic excess speed. The time-of-flight entry is in
Izzo's non-dimensional variables (``x``, ``lam``, ``T``), those of
:func:`deltakit.lambert`.
"""

from __future__ import annotations

from typing import Any

import sympy as sp

from ._algebra import solve_for, tidy
from ._builder import Builder
from ._registry import entry
from .derivation import Derivation

__all__: list[str] = []

_TWO_BODY = "Two-body motion: a point mass in the field of one spherical central body, no other forces."


@entry("c3", "characteristic_energy", title="C3: the square of the hyperbolic excess speed, from vis-viva")
def _c3() -> Derivation:
    b = Builder("c3")
    r = b.symbol("r", "distance from the centre of the body being left", "m")
    v = b.symbol("v", "speed at radius r", "m/s", zero_ok=True)
    mu = b.symbol("mu", "gravitational parameter of that body", "m^3/s^2", r"\mu")
    vinf = b.symbol("vinf", "hyperbolic excess speed: the speed left far away", "m/s", r"v_{\infty}")
    energy = b.symbol("energy", "specific orbital energy", "J/kg", r"\varepsilon", real=True)
    c3 = b.symbol("C3", "characteristic energy", "m^2/s^2", "C_{3}", real=True)

    b.step("Specific energy: kinetic plus potential, per unit mass, is conserved.", energy, v**2 / 2 - mu / r)
    far = b.relation(
        "Far from the body the potential vanishes and the speed is the excess speed.",
        sp.Eq(v**2 / 2 - mu / r, vinf**2 / 2),
    )
    vinf_value = b.step(
        "Solve for the excess speed (real when the energy is positive).", vinf, solve_for(far, vinf)[0]
    )
    b.step("C3 is defined as the square of the excess speed.", c3, vinf**2)
    value = tidy(sp.expand(vinf_value**2))
    b.step(
        "Substitute: C3 is twice the specific energy, positive for an escape, negative when bound.", c3, value
    )
    return b.build(
        result=value,
        target=c3,
        parameters=(r, v, mu),
        twin="deltakit.specific_energy",
        assumptions=[_TWO_BODY, "C3 < 0 is a bound orbit (no excess speed); C3 = 0 just escapes."],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, "
            "hyperbolic excess speed and C3 (Ch. 2 and 8)",
            "Vallado, Fundamentals of Astrodynamics and Applications, vis-viva and C3 (Ch. 1)",
        ],
        twin_adapter=_c3_twin,
    )


def _c3_twin(r: Any, v: Any, mu: Any) -> Any:
    import deltakit as dk

    return 2.0 * dk.specific_energy(r, v, mu)


@entry(
    "lambert_time_of_flight",
    "lagrange_time_of_flight",
    title="Lambert's problem: time of flight on the ellipse",
)
def _lambert_time_of_flight() -> Derivation:
    b = Builder("lambert_time_of_flight")
    x = b.symbol("x", "Izzo's variable: x^2 = 1 - a_min/a (here -1 < x < 1, an ellipse)", "1", "x", real=True)
    lam = b.symbol(
        "lam", "geometry: lam^2 = 1 - c/s, negative the long way round", "1", r"\lambda", real=True
    )
    t = b.symbol("t", "time of flight", "s", "t")
    a = b.symbol("a", "semi-major axis of the transfer ellipse", "m", "a")
    s = b.symbol("s", "semi-perimeter of the triangle focus, r1, r2", "m", "s")
    b.symbol("c", "chord between r1 and r2", "m", "c")  # named in the sentences
    mu = b.symbol("mu", "gravitational parameter of the central body", "m^3/s^2", r"\mu")
    alpha = b.symbol("alpha", "Lagrange's angle alpha", "rad", r"\alpha")
    beta = b.symbol("beta", "Lagrange's angle beta", "rad", r"\beta", real=True)
    big_t = b.symbol("T", "non-dimensional time of flight sqrt(2 mu / s^3) t", "1", "T")

    lagrange = b.relation(
        "Lagrange's equation: Kepler's equation written with the chord and the radii "
        "(Battin 1999, section 6.3): $\\sin^2(\\alpha/2) = s/(2a)$, $\\sin^2(\\beta/2) = (s - c)/(2a)$.",
        sp.Eq(sp.sqrt(mu) * t, a ** sp.Rational(3, 2) * ((alpha - sp.sin(alpha)) - (beta - sp.sin(beta)))),
    )
    t_value = solve_for(lagrange, t)[0]
    a_value = b.step(
        "The minimum-energy ellipse has $a_{min} = s/2$; Izzo's variable sets $a = a_{min}/(1 - x^2)$.",
        a,
        s / (2 * (1 - x**2)),
    )
    b.step("Then $\\sin^2(\\alpha/2) = 1 - x^2$, so $\\cos(\\alpha/2) = x$.", alpha, 2 * sp.acos(x))
    b.step(
        "And $\\sin^2(\\beta/2) = \\lambda^2 (1 - x^2)$ with $\\lambda^2 = 1 - c/s$, the sign of $\\lambda$ "
        "giving the short or the long way round.",
        beta,
        2 * sp.asin(lam * sp.sqrt(1 - x**2)),
    )
    angles = {alpha: 2 * sp.acos(x), beta: 2 * sp.asin(lam * sp.sqrt(1 - x**2))}
    scaled = sp.sqrt(2 * mu / s**3) * t_value.subs(a, a_value)
    value = sp.powsimp(sp.simplify(scaled), force=True).subs(angles)
    value = sp.simplify(value)
    b.step("Scale the time: $T = \\sqrt{2\\mu/s^3}\\, t$. Both $\\mu$ and $s$ cancel.", big_t, value)
    return b.build(
        result=value,
        target=big_t,
        parameters=(x, lam),
        twin="deltakit.lambert_time_of_flight",
        assumptions=[
            _TWO_BODY,
            "An elliptic transfer (-1 < x < 1), zero revolutions; "
            "the solver also covers x >= 1 (hyperbolas).",
            "With N full turns the bracket gains 2 pi N, so T gains N pi over the 3/2 power "
            "of (1 - x squared); the solver finds the x whose T(x) is the T asked.",
        ],
        references=[
            "Izzo, Revisiting Lambert's problem, "
            "Celestial Mechanics and Dynamical Astronomy 121 (2015), eq. 9",
            "Battin, An Introduction to the Mathematics and Methods of Astrodynamics, "
            "rev. ed. 1999, section 6.3",
        ],
    )
