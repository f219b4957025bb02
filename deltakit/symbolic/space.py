"""Catalog entries for orbits in space: a normal burn's inclination, the turn between planes, Edelbaum.

Conventions: SI units; angles in rad; inclinations in [0, pi], nodes measured
from +x in the reference plane. A burn's RTN frame is radial, transverse
(along the motion in the orbit plane) and normal (along the angular
momentum). Unit vectors are written in the RTN axes of the burn point.
"""

from __future__ import annotations

from typing import Any

import sympy as sp

from ._algebra import solve_for
from ._builder import Builder
from ._registry import entry
from .derivation import Derivation, Meaning

__all__: list[str] = []

_TWO_BODY = "Two-body motion about one spherical central body."
_IMPULSIVE = "Impulsive burn: the velocity changes instantly, the position does not."


@entry("normal_burn_inclination", title="Inclination after a normal burn")
def _normal_burn_inclination() -> Derivation:
    b = Builder("normal_burn_inclination")
    inc = b.symbol("inc", "inclination before the burn, in [0, pi]", "rad", "i", zero_ok=True)
    u = b.symbol(
        "u", "argument of latitude of the burn point (from the ascending node)", "rad", "u", real=True
    )
    vt = b.symbol("vt", "transverse speed at the burn point", "m/s", "v_{t}")
    normal = b.symbol("normal", "normal component of the delta-v", "m/s", r"\Delta v_{n}", real=True)
    r = b.symbol("r", "radius of the burn point", "m")
    h = b.symbol("h_after", "angular momentum after the burn (vector)", "m^2/s", r"\vec h'")
    pole = b.symbol("pole", "unit vector along the reference pole +z", "1", r"\hat z")
    cos_new = b.symbol(
        "cos_inc_after", "cosine of the inclination after the burn", "1", r"\cos i'", real=True
    )
    inc_new = b.symbol("inc_after", "inclination after the burn", "rad", "i'")

    # RTN axes of the burn point: radial, transverse, normal
    position = sp.Matrix([r, 0, 0])
    velocity = sp.Matrix([0, vt, normal])  # the radial speed does not enter h
    momentum = position.cross(velocity)
    b.step(
        "The burn changes the velocity, not the position: $\\vec h' = \\vec r \\times (\\vec v + "
        "\\Delta v_n \\hat n)$, in the radial, transverse and normal axes of the burn point "
        "(the radial velocity is along $\\vec r$ and drops out).",
        h,
        momentum,
    )
    # the pole: rotate the node frame by inc about the node line, then by u in the plane
    z_axis = sp.Matrix([sp.sin(inc) * sp.sin(u), sp.sin(inc) * sp.cos(u), sp.cos(inc)])
    b.step(
        "The reference pole in those axes, for a plane of inclination $i$ and a burn point at "
        "argument of latitude $u$ (it is perpendicular to the node line, tilted by $i$ from the normal).",
        pole,
        z_axis,
    )
    cosine = sp.simplify(momentum.dot(z_axis) / sp.sqrt(momentum.dot(momentum)))
    b.step("The new inclination is the angle between $\\vec h'$ and the pole.", cos_new, cosine)
    value = sp.acos(cosine)
    b.step("Take the arc cosine (the inclination lies in [0, pi]).", inc_new, value)
    return b.build(
        result=value,
        target=inc_new,
        parameters=(inc, u, vt, normal),
        twin="deltakit.burn:after.inc",
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            "The burn has a normal part only (a radial or transverse part changes the shape, not the plane).",
        ],
        references=[
            "Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Sec. 6.4, inclination change "
            "away from the node (from memory)",
            "Curtis, Orbital Mechanics for Engineering Students, plane change manoeuvres (Ch. 6)",
        ],
        twin_adapter=_normal_burn_twin,
    )


def _normal_burn_twin(inc: Any, u: Any, vt: Any, normal: Any) -> Any:
    """deltakit.burn on a circular orbit of transverse speed ``vt`` (mu = 1), at ``nu = u``."""
    import deltakit as dk

    from .._checks import finite, positive

    u = finite(u, "u", "rad")
    vt = positive(vt, "vt", "m/s")
    orbit = dk.Conic.circular(1.0 / (vt * vt), 1.0, inc=inc)  # argp = 0: nu is the argument of latitude
    return dk.burn(orbit, u, normal=normal).after.inc


@entry("plane_turn", title="Turn between two orbit planes (inclination and node)")
def _plane_turn() -> Derivation:
    b = Builder("plane_turn")
    inc1 = b.symbol("inc1", "inclination of the first plane, in [0, pi]", "rad", "i_{1}", zero_ok=True)
    raan1 = b.symbol("raan1", "ascending node of the first plane", "rad", r"\Omega_{1}", real=True)
    inc2 = b.symbol("inc2", "inclination of the second plane, in [0, pi]", "rad", "i_{2}", zero_ok=True)
    raan2 = b.symbol("raan2", "ascending node of the second plane", "rad", r"\Omega_{2}", real=True)
    w1 = b.symbol("w1", "unit normal of the first plane", "1", r"\hat w_{1}")
    cos_turn = b.symbol("cos_turn", "cosine of the turn angle", "1", r"\cos\theta", real=True)
    half = b.symbol("sin2_half_turn", "square of the sine of half the turn", "1", r"\sin^{2}(\theta/2)")
    turn = b.symbol("turn", "angle between the two planes", "rad", r"\theta")

    def pole(i: sp.Symbol, node: sp.Symbol) -> sp.Matrix:
        return sp.Matrix([sp.sin(i) * sp.sin(node), -sp.sin(i) * sp.cos(node), sp.cos(i)])

    b.step(
        "The unit normal of a plane: the pole +z tilted by $i$ about the line of nodes at $\\Omega$.",
        w1,
        pole(inc1, raan1),
    )
    product = sp.expand(pole(inc1, raan1).dot(pole(inc2, raan2)))
    product = sp.simplify(sp.trigsimp(product))
    b.step("The turn is the angle between the normals: their dot product.", cos_turn, product)
    textbook = sp.cos(inc1) * sp.cos(inc2) + sp.sin(inc1) * sp.sin(inc2) * sp.cos(raan2 - raan1)
    if sp.simplify(product - textbook) != 0:  # pragma: no cover
        raise RuntimeError("plane_turn: the dot product does not match the law of cosines")
    b.step(
        "That is spherical trigonometry on the two poles (the law of cosines for sides).", cos_turn, textbook
    )
    haversine = (
        sp.sin((inc2 - inc1) / 2) ** 2 + sp.sin(inc1) * sp.sin(inc2) * sp.sin((raan2 - raan1) / 2) ** 2
    )
    # SymPy proves the half-angle form equal to (1 - cos(turn)) / 2 before it is used
    if sp.simplify(sp.expand_trig(sp.expand(haversine - (1 - product) / 2))) != 0:  # pragma: no cover
        raise RuntimeError("plane_turn: the half-angle form does not match the dot product")
    b.step(
        "Half-angle form $(1 - \\cos\\theta)/2$, which keeps its digits for a small turn.",
        half,
        haversine,
    )
    value = 2 * sp.asin(sp.sqrt(haversine))
    b.step("Solve for the turn angle.", turn, value)
    return b.build(
        result=value,
        target=turn,
        parameters=(inc1, raan1, inc2, raan2),
        twin="deltakit.plane_change_burns:turn",
        assumptions=[
            "Both planes pass through the centre of the central body.",
            "A single burn turns the orbit by this angle about the line where the planes meet.",
        ],
        references=[
            "Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Sec. 6.4, combined change "
            "of inclination and node (from memory)",
        ],
        twin_adapter=_plane_turn_twin,
    )


def _plane_turn_twin(inc1: Any, raan1: Any, inc2: Any, raan2: Any) -> Any:
    """deltakit.plane_change_burns on a circular orbit in the first plane, to the second."""
    import deltakit as dk
    from deltakit.conic import _inclination

    from .._checks import finite

    inc1, raan1 = _inclination_named(inc1, "inc1", _inclination), finite(raan1, "raan1", "rad")
    inc2, raan2 = _inclination_named(inc2, "inc2", _inclination), finite(raan2, "raan2", "rad")
    return dk.plane_change_burns(dk.Conic.circular(7e6, 4e14, inc=inc1, raan=raan1), inc2, raan2).turn


def _inclination_named(value: Any, name: str, check: Any) -> Any:
    """The Conic inclination check, with the message naming this adapter's parameter."""
    from deltakit import DomainError

    try:
        return check(value)
    except DomainError as err:
        raise DomainError(str(err).replace("`inc`", f"`{name}`")) from None


@entry("edelbaum", title="Low-thrust transfer between circular orbits with a plane change (Edelbaum)")
def _edelbaum() -> Derivation:
    b = Builder("edelbaum")
    v1 = b.symbol("v1", "circular speed of the first orbit", "m/s", "v_{1}")
    v2 = b.symbol("v2", "circular speed of the last orbit", "m/s", "v_{2}")
    angle = b.symbol("angle", "change of plane, up to 2 rad", "rad", r"\Delta i", zero_ok=True)
    s = b.symbol("s", "delta-v spent so far", "m/s", "s")
    v = sp.Function("V", positive=True)(s)
    beta = sp.Function("beta", real=True)(s)
    k = b.symbol("k", "the constant V sin(beta) of the optimal yaw", "m/s", "k")
    b1, b2 = sp.symbols("beta_1 beta_2", positive=True)
    b.symbol("beta", "yaw of the thrust out of the plane (a function of s)", "rad", r"\beta")
    v_rate = b.symbol("V_rate", "rate of the speed per unit delta-v", "1", r"\frac{dV}{ds}", real=True)
    i_rate = b.symbol(
        "i_rate", "rate of the inclination per unit delta-v", "1/(m/s)", r"\frac{di}{ds}", real=True
    )
    beta_rate = b.symbol(
        "beta_rate", "rate of the yaw per unit delta-v", "1/(m/s)", r"\frac{d\beta}{ds}", real=True
    )
    dv = b.symbol("dv", "delta-v of the transfer", "m/s", r"\Delta v")
    dv2 = b.symbol("dv_squared", "its square", "m^2/s^2", r"\Delta v^{2}")
    b.symbols[b1] = Meaning("yaw at the start", "rad", r"\beta_{1}")
    b.symbols[b2] = Meaning("yaw at the end", "rad", r"\beta_{2}")

    dV = -sp.cos(beta)
    di = 2 / sp.pi * sp.sin(beta) / v
    b.step(
        "Averaged over a revolution of a near-circular orbit, with the thrust yawed by $\\pm\\beta$ out "
        "of the plane (the sign flipped at the antinodes), per unit of delta-v: the speed falls as",
        v_rate,
        dV,
    )
    b.step("... and the inclination changes as", i_rate, di)
    b.relation(
        "Edelbaum's optimal yaw keeps $V \\sin\\beta$ constant along the transfer.",
        sp.Eq(v * sp.sin(beta), k),
    )
    constant = sp.diff(v * sp.sin(beta), s).subs(sp.Derivative(v, s), dV)
    beta_slope = solve_for(sp.Eq(constant, 0), sp.Derivative(beta, s))[0]
    beta_slope = sp.simplify(beta_slope)
    b.step("Differentiate the constant with the speed rate above: the yaw turns as", beta_rate, beta_slope)
    b.relation(
        "So $di/d\\beta = 2/\\pi$: the plane turns by $2/\\pi$ times the change of yaw.",
        sp.Eq(angle, 2 / sp.pi * (b2 - b1)),
    )
    ds_dbeta = sp.simplify((1 / beta_slope).subs(v, k / sp.sin(beta)))  # V = k / sin(beta)
    x = sp.Symbol("x", positive=True)
    spent = sp.integrate(ds_dbeta.subs(beta, x), (x, b1, b2))
    spent = sp.simplify(spent)
    b.step("The delta-v is the integral of $ds/d\\beta = V / \\sin\\beta = k / \\sin^2\\beta$.", dv, spent)
    # k = v1 sin(beta_1) in the term of the start, k = v2 sin(beta_2) in that of the end
    speeds = sum(
        (term.subs(k, v1 * sp.sin(b1)) if term.has(b1) else term.subs(k, v2 * sp.sin(b2)))
        for term in sp.Add.make_args(sp.expand(spent))
    )
    speeds = sp.simplify(speeds)
    b.step("With $k = v_1 \\sin\\beta_1 = v_2 \\sin\\beta_2$:", dv, speeds)
    # add the square of v1 sin(beta_1) - v2 sin(beta_2), which is zero
    squared = sp.trigsimp(sp.expand(speeds**2 + (v1 * sp.sin(b1) - v2 * sp.sin(b2)) ** 2))
    b.step(
        "Add the square of $v_1 \\sin\\beta_1 - v_2 \\sin\\beta_2 = 0$: the law of cosines in the yaw.",
        dv2,
        squared,
    )
    law = sp.simplify(squared.subs(b2, b1 + sp.pi / 2 * angle))
    b.step("The yaw turned by $\\pi/2$ times the change of plane.", dv2, law)
    value = sp.sqrt(law)
    b.step("Take the square root.", dv, value)
    return b.build(
        result=value,
        target=dv,
        parameters=(v1, v2, angle),
        twin="deltakit.edelbaum",
        assumptions=[
            _TWO_BODY,
            "Low, constant thrust: the orbit stays nearly circular and changes slowly over each revolution.",
            "The yaw is constant over each half revolution and optimal (Edelbaum); the change of plane is at "
            "most 2 rad (114.6 deg).",
        ],
        references=[
            "Edelbaum, T. N., Propulsion requirements for controllable satellites, ARS Journal 31(8), 1961, "
            "pp. 1079-1089 (from memory)",
        ],
    )
