"""Catalog entries for leaving and reaching a body: escape, capture, powered flyby.

Conventions: SI units; burns are impulsive and tangential at periapsis;
escape and capture burns are magnitudes, the flyby ``dv`` is signed
(negative: braking). ``vinf`` is the hyperbolic excess speed (C3 = vinf^2).
The parking orbit is circular of radius ``rp``, or (the ``_elliptic`` entries)
an ellipse from ``rp`` to ``ra`` whose periapsis is the burn point.
"""

from __future__ import annotations

import sympy as sp

from ._algebra import equation, solve_for, tidy
from ._builder import Builder
from ._registry import derive, entry
from .derivation import Derivation

__all__: list[str] = []

_TWO_BODY = (
    "Two-body motion about the departure or arrival body only "
    "(patched conic: its sphere of influence is far)."
)
_IMPULSIVE = "Impulsive burn along the velocity at periapsis."


def _hyperbola_periapsis_speed(
    b: Builder, vp: sp.Symbol, vinf: sp.Symbol, rp: sp.Symbol, mu: sp.Symbol
) -> sp.Expr:
    energy = equation(vp**2 / 2 - mu / rp, vinf**2 / 2)
    b.relation("Energy conservation between periapsis and far away, where the potential vanishes.", energy)
    return b.step("Solve for the periapsis speed on the hyperbola.", vp, solve_for(energy, vp)[0])


def _parking_speed(rp: sp.Symbol, mu: sp.Symbol, ra: sp.Symbol | None) -> sp.Expr:
    """Periapsis speed of the parking orbit from the vis-viva entry (circular when ``ra`` is None)."""
    d = derive("vis_viva")
    r_s, a_s, mu_s = d.parameters
    a = rp if ra is None else (rp + ra) / 2
    return tidy(d.result.subs({r_s: rp, a_s: a, mu_s: mu}, simultaneous=True))


def _periapsis_entry(name: str, leaving: bool, elliptic: bool) -> Derivation:
    b = Builder(name)
    if elliptic:
        rp = b.symbol("rp", "periapsis radius of the parking orbit (where the burn happens)", "m", "r_{p}")
    else:
        rp = b.symbol("rp", "radius of the circular parking orbit", "m", "r_{p}")
    vinf = b.symbol("vinf", "hyperbolic excess speed", "m/s", r"v_{\infty}", zero_ok=True)
    mu = b.symbol("mu", "gravitational parameter of the body", "m^3/s^2", r"\mu")
    ra = b.symbol("ra", "apoapsis radius of the parking orbit", "m", "r_{a}") if elliptic else None
    vp = b.symbol("vp", "hyperbola speed at periapsis", "m/s", "v_{p}")
    vc = b.symbol("v_park", "parking-orbit speed at periapsis", "m/s", r"v_{c}")
    dv = b.symbol("dv", "burn magnitude", "m/s", r"\Delta v")

    hyperbola = _hyperbola_periapsis_speed(b, vp, vinf, rp, mu)
    if elliptic:
        sentence = "Elliptic parking orbit: vis-viva at periapsis with $a = (r_p + r_a)/2$."
    else:
        sentence = "Circular parking orbit: vis-viva with $a = r_p$."
    park = b.step(sentence, vc, _parking_speed(rp, mu, ra))
    if leaving:
        sentence = "A prograde burn raises the parking speed to the hyperbola speed."
    else:
        sentence = "A retrograde burn lowers the hyperbola speed to the parking speed."
    b.step(sentence, dv, vp - vc)
    value = hyperbola - park
    b.step("Substitute both speeds.", dv, value)
    twin = "deltakit.escape_burn" if leaving else "deltakit.capture_burn"
    orbit = (
        "Elliptic parking orbit with periapsis $r_p$ and apoapsis $r_a$, its periapsis at the hyperbola's."
        if elliptic
        else "Circular parking orbit, coplanar with the hyperbola."
    )
    return b.build(
        result=value,
        target=dv,
        parameters=(rp, vinf, mu, ra) if elliptic else (rp, vinf, mu),
        twin=twin,
        assumptions=[_TWO_BODY, _IMPULSIVE, orbit],
        references=[
            "Curtis, Orbital Mechanics for Engineering Students, planetary departure and arrival (Ch. 8)",
        ],
    )


@entry("escape_burn", title="Escape burn from a circular parking orbit")
def _escape_burn() -> Derivation:
    return _periapsis_entry("escape_burn", leaving=True, elliptic=False)


@entry("capture_burn", title="Capture burn into a circular orbit")
def _capture_burn() -> Derivation:
    return _periapsis_entry("capture_burn", leaving=False, elliptic=False)


@entry("escape_burn_elliptic", title="Escape burn from the periapsis of an elliptic parking orbit")
def _escape_burn_elliptic() -> Derivation:
    return _periapsis_entry("escape_burn_elliptic", leaving=True, elliptic=True)


@entry("capture_burn_elliptic", title="Capture burn into an elliptic orbit at its periapsis")
def _capture_burn_elliptic() -> Derivation:
    return _periapsis_entry("capture_burn_elliptic", leaving=False, elliptic=True)


@entry("powered_flyby", title="Powered flyby: what a periapsis burn buys")
def _powered_flyby() -> Derivation:
    b = Builder("powered_flyby")
    vinf_in = b.symbol(
        "vinf_in", "hyperbolic excess speed on arrival", "m/s", r"v_{\infty,\mathrm{in}}", zero_ok=True
    )
    rp = b.symbol("rp", "periapsis radius of the flyby", "m", "r_{p}")
    dv = b.symbol(
        "dv", "delta-v along the velocity at periapsis (negative: braking)", "m/s", r"\Delta v", real=True
    )
    mu = b.symbol("mu", "gravitational parameter of the flyby body", "m^3/s^2", r"\mu")
    vp = b.symbol("vp", "periapsis speed before the burn", "m/s", "v_{p}")
    vinf_out = b.symbol("vinf_out", "hyperbolic excess speed on leaving", "m/s", r"v_{\infty,\mathrm{out}}")
    gain = b.symbol(
        "gain", "excess speed gained beyond the burn itself", "m/s", r"\delta v_{\infty}", real=True
    )
    e = b.symbol("e", "eccentricity of a flyby hyperbola", "1")
    vinf = b.symbol("vinf", "hyperbolic excess speed of one leg", "m/s", r"v_{\infty}")
    nu_inf = b.symbol("nu_inf", "true anomaly of the asymptote", "rad", r"\nu_{\infty}")
    turn = b.symbol("turn", "turn of the excess velocity on one leg", "rad", r"\delta_{\mathrm{leg}}")
    deflection = b.symbol("deflection", "total turn of the excess velocity", "rad", r"\delta")
    h = b.symbol("h", "specific angular momentum of a leg", "m^2/s")

    before = _hyperbola_periapsis_speed(b, vp, vinf_in, rp, mu)
    after = vp + dv
    out_energy = equation(after**2 / 2 - mu / rp, vinf_out**2 / 2)
    b.relation("After the burn at the same radius, energy conservation out to far away.", out_energy)
    out_value = solve_for(out_energy, vinf_out)[0]
    b.step("Solve for the excess speed on leaving.", vinf_out, out_value)
    vinf_out_value = out_value.subs(vp, before)
    b.step("Substitute the periapsis speed.", vinf_out, vinf_out_value)
    gain_value = b.step(
        "Gain: what the flyby returns beyond the plain sum of arrival speed and burn.",
        gain,
        vinf_out_value - (vinf_in + dv),
    )

    # turn angle of a leg from the conic equation, with e from the periapsis state
    conic = equation(rp, h**2 / (mu * (1 + e)))
    b.relation("Conic equation at periapsis for a leg with excess speed $v_\\infty$.", conic)
    vp_leg = sp.sqrt(vinf**2 + 2 * mu / rp)
    e_value = sp.expand(solve_for(conic.subs(h, rp * vp_leg), e)[0])
    b.step(
        "With $h = r_p v_p$ and $v_p^2 = v_\\infty^2 + 2\\mu/r_p$, solve for the eccentricity.", e, e_value
    )
    nu_value = solve_for(equation(1 + e * sp.cos(nu_inf), 0), nu_inf)
    # two roots, +-nu_inf; the outgoing asymptote is the one in (pi/2, pi)
    nu_value = min(nu_value, key=lambda root: float(root.subs(e, 2)))
    b.step("The radius becomes infinite where $1 + e\\cos\\nu = 0$: the asymptote.", nu_inf, nu_value)
    turn_value = nu_value.rewrite(sp.asin) - sp.pi / 2
    b.step("Each leg turns the excess velocity by the asymptote angle less a right angle.", turn, turn_value)
    deflection_value = turn_value.subs(e, e_value.subs(vinf, vinf_in)) + turn_value.subs(
        e, e_value.subs(vinf, vinf_out)
    )
    b.step("Add the turn of the arriving and the leaving leg.", deflection, deflection_value)
    deflection_value = deflection_value.subs(vinf_out, vinf_out_value)
    return b.build(
        result=gain_value,
        target=gain,
        parameters=(vinf_in, rp, dv, mu),
        twin="deltakit.powered_flyby:gain",
        outputs={"vinf_out": vinf_out_value, "gain": gain_value, "deflection": deflection_value},
        assumptions=[
            _TWO_BODY,
            _IMPULSIVE,
            "The burn leaves the vehicle unbound "
            "($v_{\\infty,\\mathrm{out}}$ real) and keeps it moving forward.",
        ],
        references=["Common practice: energy conservation on the arriving and leaving hyperbolas"],
    )
