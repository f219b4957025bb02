"""Catalog entries about propellant: rocket equation and energy accounting.

Conventions: SI units; speeds are signed along the thrust direction; the
exhaust leaves backwards at ``ve`` relative to the vehicle; kinetic-energy
changes are measured in one inertial frame, from the common starting speed.
"""

from __future__ import annotations

import sympy as sp

from ._algebra import equation, solve_for
from ._builder import Builder
from ._registry import derive, entry
from .derivation import Derivation

__all__: list[str] = []

_NO_GRAVITY = (
    "Straight-line motion with no external force during the ejection "
    "(gravity and drag act over longer times and are left out)."
)


@entry("rocket_equation", "rocket_dv", title="Rocket equation (Tsiolkovsky)")
def _rocket_equation() -> Derivation:
    b = Builder("rocket_equation")
    ve = b.symbol("ve", "effective exhaust velocity relative to the vehicle", "m/s", "v_{e}")
    m0 = b.symbol("m0", "mass before the burn", "kg", "m_{0}")
    mf = b.symbol("mf", "mass after the burn", "kg", "m_{f}")
    m = b.symbol("m", "vehicle mass at an instant", "kg")
    v = b.symbol("v", "vehicle speed at that instant", "m/s", real=True)
    dm = b.symbol(
        "dm", "mass change of the vehicle in a short time (negative)", "kg", r"\mathrm{d}m", real=True
    )
    dv_small = b.symbol("dv_step", "speed change in that time", "m/s", r"\mathrm{d}v", real=True)
    dv = b.symbol("dv", "speed change over the burn", "m/s", r"\Delta v")
    p0 = b.symbol("p_before", "momentum before the short time", "kg m/s", "p_{0}", real=True)
    p1 = b.symbol("p_after", "momentum after the short time", "kg m/s", "p_{1}", real=True)

    before = b.step("Momentum before a short time $\\mathrm{d}t$.", p0, m * v)
    after = b.step(
        "After it: the vehicle has mass $m + \\mathrm{d}m$ and speed $v + "
        "\\mathrm{d}v$; the ejected $-\\mathrm{d}m$ moves at $v - v_e$.",
        p1,
        (m + dm) * (v + dv_small) + (-dm) * (v - ve),
    )
    balance = sp.expand(after - before)
    balance = balance.subs(dm * dv_small, 0)  # second-order small
    b.relation(
        "No external force: momentum is conserved; drop the second-order term $\\mathrm{d}m\\,\\mathrm{d}v$.",
        equation(balance, 0),
    )
    slope = solve_for(equation(balance, 0), dv_small)[0]
    b.step("Solve for the speed change.", dv_small, slope)
    integral = sp.Integral(slope / dm, (m, m0, mf))
    # ve is a constant factor: keep it outside the logarithm when combining.
    value = ve * sp.logcombine(sp.expand(integral.doit() / ve), force=True)
    b.step("Integrate from the initial to the final mass.", dv, integral)
    b.step("Evaluate the integral.", dv, value)
    return b.build(
        result=value,
        target=dv,
        parameters=(ve, m0, mf),
        twin="deltakit.rocket_dv",
        assumptions=[_NO_GRAVITY, "Constant effective exhaust velocity."],
        references=["Sutton and Biblarz, Rocket Propulsion Elements, ideal rocket equation (Ch. 4)"],
    )


@entry("ejection_energy", title="Energy accounting of one discrete ejection")
def _ejection_energy() -> Derivation:
    b = Builder("ejection_energy")
    m_vehicle = b.symbol("m_vehicle", "mass of the whole vehicle before the ejection", "kg", r"m_{v}")
    m_ejected = b.symbol("m_ejected", "mass thrown out", "kg", r"m_{e}", zero_ok=True)
    u = b.symbol(
        "u", "speed of the ejecta in the frame that moved with the whole vehicle", "m/s", zero_ok=True
    )
    v0 = b.symbol("v0", "speed of that frame (the vehicle before the ejection)", "m/s", "V", real=True)
    w = b.symbol("w", "speed the remaining mass gains", "m/s")
    m_rest = b.symbol("m_rest", "mass that remains", "kg", r"m_{r}")
    p = b.symbol("p", "momentum in the co-moving frame", "kg m/s", real=True)
    e_vehicle = b.symbol(
        "vehicle", "kinetic-energy change of the remaining mass", "J", r"\Delta K_{r}", real=True
    )
    e_ejecta = b.symbol(
        "ejecta", "kinetic-energy change of the ejected mass", "J", r"\Delta K_{e}", real=True
    )
    e_total = b.symbol("total", "kinetic-energy change of both", "J", r"\Delta K", real=True)
    slope = b.symbol(
        "slope",
        "dependence of the total on the frame speed",
        "kg m/s",
        r"\frac{\partial \Delta K}{\partial V}",
        real=True,
    )

    b.step(
        "In the frame that moved with the whole vehicle the momentum is zero before and after.",
        p,
        m_rest * w - m_ejected * u,
    )
    w_value = solve_for(equation(m_rest * w - m_ejected * u, 0), w)[0]
    b.step("Solve for the speed gained by the remaining mass.", w, w_value)
    vehicle = sp.Rational(1, 2) * m_rest * ((v0 + w) ** 2 - v0**2)
    b.step(
        "In a frame where the pair moved at $V$: the remaining mass goes from $V$ to $V + w$.",
        e_vehicle,
        vehicle,
    )
    ejecta = sp.Rational(1, 2) * m_ejected * ((v0 - u) ** 2 - v0**2)
    b.step("The ejected mass goes from $V$ to $V - u$.", e_ejecta, ejecta)
    vehicle_rest = sp.expand(vehicle.subs(w, w_value))
    ejecta_value = sp.expand(ejecta)
    total_rest = sp.factor(vehicle_rest + ejecta_value)
    b.step("Add the two, with $w$ substituted: the terms in $V$ cancel.", e_total, total_rest)
    b.step(
        "The total does not depend on the frame speed $V$, while each part does.",
        slope,
        sp.diff(total_rest, v0),
    )
    rest = m_vehicle - m_ejected
    b.step("The mass that remains is the vehicle mass less the ejected mass.", m_rest, rest)
    total_value = total_rest.subs(m_rest, rest)
    vehicle_value = vehicle_rest.subs(m_rest, rest)
    b.step("So, in the vehicle mass before the ejection:", e_total, total_value)
    return b.build(
        result=total_value,
        target=e_total,
        parameters=(m_vehicle, m_ejected, u, v0),
        twin="deltakit.ejection_energy:total",
        outputs={"vehicle": vehicle_value, "ejecta": ejecta_value, "total": total_value},
        assumptions=[
            _NO_GRAVITY,
            "One instantaneous ejection backwards along the line of motion; some mass remains ($m_e < m_v$).",
        ],
        references=["Common practice: momentum conservation and a Galilean change of frame"],
    )


@entry("burn_energy", title="Energy accounting of a continuous burn")
def _burn_energy() -> Derivation:
    b = Builder("burn_energy")
    m0 = b.symbol("m0", "mass before the burn", "kg", "m_{0}")
    mf = b.symbol("mf", "mass after the burn", "kg", "m_{f}")
    ve = b.symbol("ve", "effective exhaust velocity relative to the vehicle", "m/s", "v_{e}")
    v0 = b.symbol("v0", "speed at the start of the burn", "m/s", "v_{0}", real=True)
    m = b.symbol("m", "vehicle mass at an instant during the burn", "kg")
    speed = b.symbol("v", "vehicle speed when its mass is m", "m/s", real=True)
    e_vehicle = b.symbol(
        "vehicle", "kinetic-energy change of the mass that remains", "J", r"\Delta K_{v}", real=True
    )
    e_ejecta = b.symbol(
        "ejecta", "kinetic-energy change of all the propellant thrown out", "J", r"\Delta K_{p}", real=True
    )
    e_total = b.symbol("total", "kinetic-energy change of both", "J", r"\Delta K", real=True)

    dv = b.symbol("dv", "speed gained over the burn", "m/s", r"\Delta v")

    rocket = derive("rocket_equation")
    ve_r, m0_r, mf_r = rocket.parameters
    speed_at = v0 + rocket.result.subs({ve_r: ve, m0_r: m0, mf_r: m}, simultaneous=True)
    b.step("Speed when the mass has dropped to $m$ (rocket equation).", speed, speed_at)
    dv_value = b.step("Speed gained over the whole burn.", dv, speed_at.subs(m, mf) - v0)
    vehicle = sp.Rational(1, 2) * mf * ((v0 + dv) ** 2 - v0**2)
    b.step("The mass that remains goes from $v_0$ to $v_0 + \\Delta v$.", e_vehicle, vehicle)
    integrand = sp.Rational(1, 2) * ((speed - ve) ** 2 - v0**2)
    integral = sp.Integral(integrand.subs(speed, speed_at), (m, mf, m0))
    b.step(
        "Each propellant element $\\mathrm{d}m$ leaves at $v - v_e$ when "
        "the mass is $m$; sum over the propellant.",
        e_ejecta,
        integral,
    )
    evaluated = sp.integrate(sp.expand(sp.expand_log(integral.function, force=True)), (m, mf, m0))
    # write ln(m0) = ln(mf) + dv/ve so the result reads in the speed gained
    in_dv = sp.expand(sp.expand_log(evaluated, force=True).subs(sp.log(m0), sp.log(mf) + dv / ve))
    ejecta = sp.collect(in_dv, [m0, mf])
    b.step("Evaluate the integral and write it with the speed gained.", e_ejecta, ejecta)
    total = sp.factor(sp.expand(vehicle + ejecta))
    b.step(
        "Add: $v_0$ and $\\Delta v$ cancel, leaving half the propellant mass times $v_e^2$.", e_total, total
    )
    vehicle_value = vehicle.subs(dv, dv_value)
    ejecta_value = ejecta.subs(dv, dv_value)
    return b.build(
        result=total,
        target=e_total,
        parameters=(m0, mf, ve, v0),
        twin="deltakit.burn_energy:total",
        outputs={"vehicle": vehicle_value, "ejecta": ejecta_value, "total": total},
        assumptions=[_NO_GRAVITY, "Constant effective exhaust velocity, from mass $m_0$ down to $m_f$."],
        references=["Common practice: kinetic energy of vehicle and exhaust summed over the propellant"],
    )


@entry("propulsive_efficiency", title="Propulsive efficiency")
def _propulsive_efficiency() -> Derivation:
    b = Builder("propulsive_efficiency")
    v = b.symbol("v", "vehicle speed, signed along the thrust", "m/s", real=True)
    ve = b.symbol("ve", "effective exhaust velocity relative to the vehicle", "m/s", "v_{e}")
    mdot = b.symbol("mdot", "propellant mass flow", "kg/s", r"\dot{m}")
    thrust = b.symbol("thrust", "thrust", "N", "F")
    power_vehicle = b.symbol("power_vehicle", "power delivered to the vehicle", "W", "P_{v}", real=True)
    power_wake = b.symbol(
        "power_wake", "kinetic power left in the exhaust (inertial frame)", "W", "P_{w}", real=True
    )
    eta = b.symbol("eta", "propulsive efficiency", "1", r"\eta_{p}", real=True)

    f_value = b.step("Thrust of a jet: mass flow times exhaust velocity.", thrust, mdot * ve)
    useful = b.step("Power delivered to the vehicle.", power_vehicle, thrust * v)
    wake = b.step(
        "The exhaust leaves at $v - v_e$ in the inertial frame and keeps that kinetic energy.",
        power_wake,
        sp.Rational(1, 2) * mdot * (v - ve) ** 2,
    )
    ratio = useful / (useful + wake)
    b.step("Efficiency: useful power over useful plus wake power.", eta, ratio)
    value = sp.factor(sp.cancel(ratio.subs(thrust, f_value)))
    b.step("Substitute the thrust: the mass flow cancels.", eta, value)
    return b.build(
        result=value,
        target=eta,
        parameters=(v, ve),
        twin="deltakit.propulsive_efficiency",
        assumptions=[
            "Steady flight at speed $v$ with constant exhaust velocity; no nozzle or combustion losses."
        ],
        references=["Sutton and Biblarz, Rocket Propulsion Elements, propulsive efficiency (Ch. 2)"],
    )
