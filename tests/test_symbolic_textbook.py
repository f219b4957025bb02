"""Every derived result equals the closed form printed in the literature.

The textbook forms below are typed in by hand, independently of the
derivations, with symbols declared positive as in the derivations. Book
chapters are given; equation and example numbers are quoted from memory
where marked so.
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy as sp

symbolic = pytest.importorskip("deltakit.symbolic")


def _symbols(name):
    """The derivation and its parameters by name, so the textbook forms use the same symbols."""
    d = symbolic.derive(name)
    return d, {str(s): s for s in d.parameters}


def _assert_same(derived, textbook):
    assert sp.simplify(derived - textbook) == 0, f"{derived}  !=  {textbook}"


def test_vis_viva():
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Sec. 1.4 (energy
    # integral), vis-viva v^2/2 - mu/r = -mu/(2a); Curtis, Orbital Mechanics for
    # Engineering Students, 3rd ed., Ch. 2 (section numbers from memory).
    d, s = _symbols("vis_viva")
    r, a, mu = s["r"], s["a"], s["mu"]
    _assert_same(d.result, sp.sqrt(mu * (2 / r - 1 / a)))


def test_orbital_period():
    # Curtis, 3rd ed., Ch. 2, period of an elliptical orbit T = 2 pi a^(3/2) / sqrt(mu)
    # (Kepler's third law; equation number not quoted, from memory).
    d, s = _symbols("orbital_period")
    a, mu = s["a"], s["mu"]
    _assert_same(d.result, 2 * sp.pi * sp.sqrt(a**3 / mu))


def test_transfer_durations():
    # Curtis, 3rd ed., Ch. 6: a Hohmann transfer takes half the transfer ellipse's period;
    # a bi-elliptic one half of each of its two ellipses (common practice).
    d, s = _symbols("hohmann")
    r1, r2, mu = s["r1"], s["r2"], s["mu"]
    _assert_same(d.outputs["duration"], sp.pi * sp.sqrt(((r1 + r2) / 2) ** 3 / mu))
    d, s = _symbols("bielliptic")
    r1, r2, rb, mu = s["r1"], s["r2"], s["rb"], s["mu"]
    both = sp.pi * sp.sqrt(((r1 + rb) / 2) ** 3 / mu) + sp.pi * sp.sqrt(((r2 + rb) / 2) ** 3 / mu)
    _assert_same(d.outputs["duration"], both)


def test_oberth_relation():
    # Common practice: specific energy v^2/2 - mu/r at fixed r; the gain of a
    # prograde dv is v dv + dv^2/2, growing with the speed at the burn point.
    d, s = _symbols("oberth")
    v, dv = s["v"], s["dv"]
    _assert_same(d.result, v * dv + dv**2 / 2)


def test_inplane_burn_energy():
    # Curtis, 3rd ed., Ch. 2: velocity components on a conic, v_r = (mu/h) e sin(nu),
    # v_perp = (mu/h)(1 + e cos(nu)), h^2 = mu r_p (1 + e) (equation numbers from memory).
    # The energy change is then (|v + dv|^2 - |v|^2)/2 (common practice).
    d, s = _symbols("inplane_burn")
    rp, e, mu, nu, radial, transverse = (s[k] for k in ("rp", "e", "mu", "nu", "radial", "transverse"))
    h = sp.sqrt(mu * rp * (1 + e))
    v_r = mu / h * e * sp.sin(nu)
    v_t = mu / h * (1 + e * sp.cos(nu))
    textbook = v_r * radial + v_t * transverse + (radial**2 + transverse**2) / 2
    _assert_same(d.result, textbook)


def test_apsis_change():
    # Curtis, 3rd ed., Ch. 2: orbit equation r = h^2/(mu (1 + e cos nu)) at both apsides,
    # with h = r_p v_p after the burn: r_a' = r_p^2 w^2 / (2 mu - r_p w^2) (rearranged by hand).
    d, s = _symbols("apsis_change")
    rp, ra, mu, dv = s["rp"], s["ra"], s["mu"], s["dv"]
    vp = sp.sqrt(2 * mu * ra / (rp * (rp + ra)))  # Curtis Ch. 2, periapsis speed from the apsides
    w = vp + dv
    _assert_same(d.result, rp**2 * w**2 / (2 * mu - rp * w**2))
    # With no burn the apoapsis stays where it was.
    _assert_same(d.result.subs(dv, 0), ra)


def test_hohmann():
    # Curtis, 3rd ed., Sec. 6.2 (Hohmann transfer); Vallado, 4th ed., Algorithm 36
    # (section and algorithm numbers from memory):
    # dv_A = sqrt(mu/r1) (sqrt(2 r2/(r1 + r2)) - 1), dv_B = sqrt(mu/r2) (1 - sqrt(2 r1/(r1 + r2))),
    # magnitudes (a lowering transfer is the same legs in reverse).
    d, s = _symbols("hohmann")
    r1, r2, mu = s["r1"], s["r2"], s["mu"]
    first = sp.sqrt(mu / r1) * (sp.sqrt(2 * r2 / (r1 + r2)) - 1)
    second = sp.sqrt(mu / r2) * (1 - sp.sqrt(2 * r1 / (r1 + r2)))
    _assert_same(d.result, sp.Abs(first) + sp.Abs(second))
    _assert_same(d.outputs["burn1"], sp.Abs(first))


def test_hohmann_worked_example():
    # Vallado, 4th ed., Example 6-1 (values from memory): from 191.34411 km to
    # 35 781.34857 km altitude, Earth radius 6378.137 km, mu = 398 600.4418 km^3/s^2:
    # dv_a = 2.457038 km/s, dv_b = 1.478187 km/s, total 3.935224 km/s.
    d = symbolic.derive("hohmann")
    args = {"r1": (6378.137 + 191.34411) * 1e3, "r2": (6378.137 + 35781.34857) * 1e3, "mu": 398600.4418e9}
    assert d.function("burn1")(**args) / 1e3 == pytest.approx(2.457038, abs=2e-6)
    assert d.function("burn2")(**args) / 1e3 == pytest.approx(1.478187, abs=2e-6)
    assert d.function()(**args) / 1e3 == pytest.approx(3.935224, abs=2e-6)


def test_bielliptic():
    # Curtis, 3rd ed., Sec. 6.3 (bi-elliptic Hohmann transfer); Vallado, 4th ed., Algorithm 37:
    # three tangential burns, each a vis-viva speed difference (numbers and forms from memory).
    d, s = _symbols("bielliptic")
    r1, r2, rb, mu = s["r1"], s["r2"], s["rb"], s["mu"]
    a1, a2 = (r1 + rb) / 2, (r2 + rb) / 2

    def speed(r, a):
        return sp.sqrt(2 * mu / r - mu / a)

    textbook = (
        sp.Abs(speed(r1, a1) - sp.sqrt(mu / r1))
        + sp.Abs(speed(rb, a2) - speed(rb, a1))
        + sp.Abs(sp.sqrt(mu / r2) - speed(r2, a2))
    )
    _assert_same(d.result, textbook)


def test_bielliptic_worked_example():
    # Vallado, 4th ed., Example 6-2 (values from memory): 191.34411 km to 376 310 km altitude
    # through 503 873 km: dv = 3.156233, 0.677358, 0.070465 km/s, total 3.904057 km/s.
    d = symbolic.derive("bielliptic")
    args = {
        "r1": (6378.137 + 191.34411) * 1e3,
        "r2": (6378.137 + 376310.0) * 1e3,
        "rb": (6378.137 + 503873.0) * 1e3,
        "mu": 398600.4418e9,
    }
    for output, km_s in (("burn1", 3.156233), ("burn2", 0.677358), ("burn3", 0.070465), ("total", 3.904057)):
        assert d.function(output)(**args) / 1e3 == pytest.approx(km_s, abs=2e-6), output


def test_plane_change():
    # Curtis, 3rd ed., Sec. 6.9 (plane change manoeuvres): dv = 2 v sin(delta/2);
    # Vallado, 4th ed., Sec. 6.4 (section numbers from memory).
    d, s = _symbols("plane_change")
    v, angle = s["v"], s["angle"]
    _assert_same(d.result, 2 * v * sp.sin(angle / 2))


def test_combined_plane_change():
    # Vallado, 4th ed., Sec. 6.4 (combined changes): law of cosines
    # dv = sqrt(v1^2 + v2^2 - 2 v1 v2 cos(delta)) (from memory).
    d, s = _symbols("combined_plane_change")
    v1, v2, angle = s["v1"], s["v2"], s["angle"]
    _assert_same(d.result, sp.sqrt(v1**2 + v2**2 - 2 * v1 * v2 * sp.cos(angle)))
    # With equal speeds it reduces to the pure plane change.
    pure, p = _symbols("plane_change")
    turn = pure.result.subs({p["v"]: v1, p["angle"]: angle}, simultaneous=True)
    assert sp.simplify(d.result.subs(v2, v1) ** 2 - turn**2) == 0


@pytest.mark.parametrize("name", ["escape_burn", "capture_burn"])
def test_escape_and_capture(name):
    # Curtis, 3rd ed., Sec. 8.4-8.6 (planetary departure and arrival):
    # dv = v_c (sqrt(2 + (v_inf/v_c)^2) - 1), v_c = sqrt(mu/r_p) (form from memory).
    d, s = _symbols(name)
    rp, vinf, mu = s["rp"], s["vinf"], s["mu"]
    vc = sp.sqrt(mu / rp)
    _assert_same(d.result, vc * (sp.sqrt(2 + (vinf / vc) ** 2) - 1))


@pytest.mark.parametrize("name", ["escape_burn_elliptic", "capture_burn_elliptic"])
def test_escape_and_capture_elliptic(name):
    # Curtis, 3rd ed., Sec. 8.6 (planetary arrival into an elliptical capture orbit):
    # dv = sqrt(v_inf^2 + 2 mu/r_p) - sqrt(2 mu r_a / (r_p (r_p + r_a))) (form from memory).
    d, s = _symbols(name)
    rp, vinf, mu, ra = s["rp"], s["vinf"], s["mu"], s["ra"]
    _assert_same(d.result, sp.sqrt(vinf**2 + 2 * mu / rp) - sp.sqrt(2 * mu * ra / (rp * (rp + ra))))
    # A parking orbit with r_a = r_p is the circular case.
    circular, c = _symbols(name.replace("_elliptic", ""))
    _assert_same(d.result.subs(ra, rp), circular.result.subs({c["rp"]: rp, c["vinf"]: vinf, c["mu"]: mu}))


def test_escape_worked_example():
    # Curtis, 3rd ed., Example 8.3 (from memory): Mars departure from a 300 km circular
    # Earth parking orbit with v_inf = 2.943 km/s needs dv = 3.590 km/s
    # (Earth radius 6378 km, mu = 398 600 km^3/s^2 in the book).
    f = symbolic.derive("escape_burn").function()
    assert f(rp=6678e3, vinf=2943.0, mu=398600e9) / 1e3 == pytest.approx(3.590, abs=1e-3)


def test_powered_flyby():
    # Common practice: energy conservation on both hyperbolas about the periapsis burn,
    # vinf_out^2 = (v_p + dv)^2 - 2 mu/r_p with v_p^2 = vinf_in^2 + 2 mu/r_p.
    # Turn per leg asin(1/e), e = 1 + r_p vinf^2/mu: Curtis, 3rd ed., Sec. 8.9 (flyby), from memory.
    d, s = _symbols("powered_flyby")
    vinf_in, rp, dv, mu = s["vinf_in"], s["rp"], s["dv"], s["mu"]
    vp = sp.sqrt(vinf_in**2 + 2 * mu / rp)
    vinf_out = sp.sqrt((vp + dv) ** 2 - 2 * mu / rp)
    _assert_same(d.outputs["vinf_out"], vinf_out)
    _assert_same(d.result, vinf_out - vinf_in - dv)
    deflection = sp.asin(1 / (1 + rp * vinf_in**2 / mu)) + sp.asin(1 / (1 + rp * vinf_out**2 / mu))
    _assert_same(d.outputs["deflection"], deflection)
    # Without a burn the flyby returns the arrival speed and turns by 2 asin(1/e).
    _assert_same(d.result.subs(dv, 0), 0)
    _assert_same(d.outputs["deflection"].subs(dv, 0), 2 * sp.asin(1 / (1 + rp * vinf_in**2 / mu)))


def test_rocket_equation():
    # Sutton and Biblarz, Rocket Propulsion Elements, 9th ed., Sec. 4.1 (gravity-free
    # flight): dv = c ln(m0/mf) (section and equation numbers from memory).
    d, s = _symbols("rocket_equation")
    ve, m0, mf = s["ve"], s["m0"], s["mf"]
    _assert_same(d.result, ve * sp.log(m0 / mf))
    # A mass ratio of e gives exactly one exhaust velocity (common practice).
    assert float(d.function()(ve=3000.0, m0=np.e, mf=1.0)) == pytest.approx(3000.0, rel=1e-12)


def test_ejection_energy():
    # Common practice: in the centre-of-mass frame the pair shares the released energy
    # 1/2 m_e u^2 + 1/2 m_r w^2 with m_r w = m_e u; a Galilean change of frame adds a term
    # V (m_r w - m_e u) = 0, so the total does not depend on V.
    d, s = _symbols("ejection_energy")
    m_vehicle, m_ejected, u, v0 = s["m_vehicle"], s["m_ejected"], s["u"], s["v0"]
    m_rest = m_vehicle - m_ejected
    w = m_ejected * u / m_rest
    _assert_same(d.result, m_ejected * u**2 / 2 + m_rest * w**2 / 2)
    assert sp.diff(d.result, v0) == 0
    assert sp.diff(d.outputs["vehicle"], v0) != 0
    _assert_same(d.outputs["vehicle"] + d.outputs["ejecta"], d.result)


def test_burn_energy():
    # Common practice: summed over the propellant, vehicle plus exhaust gain
    # 1/2 (m0 - mf) ve^2, the kinetic energy the exhaust has in the vehicle's frame.
    d, s = _symbols("burn_energy")
    m0, mf, ve, v0 = s["m0"], s["mf"], s["ve"], s["v0"]
    _assert_same(d.result, (m0 - mf) * ve**2 / 2)
    assert sp.diff(d.result, v0) == 0
    _assert_same(d.outputs["vehicle"], mf * ((v0 + ve * sp.log(m0 / mf)) ** 2 - v0**2) / 2)
    _assert_same(sp.expand_log(d.outputs["vehicle"] + d.outputs["ejecta"], force=True), d.result)


def test_propulsive_efficiency():
    # Sutton and Biblarz, Rocket Propulsion Elements, 9th ed., Sec. 2.3 (propulsive
    # efficiency): eta_p = 2 (v/c) / (1 + (v/c)^2) (equation number from memory: 2-22).
    d, s = _symbols("propulsive_efficiency")
    v, ve = s["v"], s["ve"]
    _assert_same(d.result, 2 * (v / ve) / (1 + (v / ve) ** 2))
    # It peaks at 1 when the vehicle moves at the exhaust velocity (common practice).
    assert sp.simplify(d.result.subs(v, ve)) == 1


def test_c3():
    # Curtis, 3rd ed., Ch. 2 (hyperbolic trajectories): v_inf^2 = v^2 - 2 mu / r, and
    # C3 = v_inf^2 (Ch. 8, interplanetary departure; section numbers from memory).
    d, s = _symbols("c3")
    r, v, mu = s["r"], s["v"], s["mu"]
    _assert_same(d.result, v**2 - 2 * mu / r)


def test_lambert_time_of_flight():
    # Izzo 2015 (Celestial Mechanics and Dynamical Astronomy 121), eq. 9 in his
    # variables: T = [acos(x) - x sqrt(1 - x^2) - asin(lam sqrt(1 - x^2)) + lam y sqrt(1 - x^2)]
    # / (1 - x^2)^(3/2) with y = sqrt(1 - lam^2 (1 - x^2)); at x = 0 it is the
    # minimum-energy time acos(lam) + lam sqrt(1 - lam^2) (Izzo's T_00).
    d, s = _symbols("lambert_time_of_flight")
    x, lam = s["x"], s["lam"]
    root = sp.sqrt(1 - x**2)
    y = sp.sqrt(1 - lam**2 * (1 - x**2))
    textbook = (sp.acos(x) - x * root - sp.asin(lam * root) + lam * y * root) / root**3
    for point in (
        {x: sp.Rational(1, 3), lam: sp.Rational(-1, 2)},
        {x: sp.Rational(-7, 10), lam: sp.Rational(9, 10)},
    ):
        assert abs(float(d.result.subs(point)) - float(textbook.subs(point))) < 1e-13
    t00 = sp.simplify(d.result.subs(x, 0))
    assert abs(float(t00.subs(lam, 0.3)) - (np.arccos(0.3) + 0.3 * np.sqrt(1 - 0.09))) < 1e-13


@pytest.mark.parametrize("name", symbolic.catalog())
def test_every_entry_is_checked_here(name):
    # A new catalog entry must come with a textbook check in this file.
    checks = {
        "vis_viva", "orbital_period", "oberth", "inplane_burn", "apsis_change", "hohmann", "bielliptic",
        "plane_change", "combined_plane_change", "escape_burn", "capture_burn",
        "escape_burn_elliptic", "capture_burn_elliptic",
        "powered_flyby", "rocket_equation", "ejection_energy", "burn_energy",
        "propulsive_efficiency", "c3", "lambert_time_of_flight",
        "normal_burn_inclination", "plane_turn", "edelbaum",
    }  # fmt: skip
    assert name in checks


def test_normal_burn_inclination():
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Sec. 6.4 (from
    # memory): turning the plane by delta about the radius at argument of latitude u
    # gives cos i' = cos i cos delta - sin i sin delta cos u; a normal burn N at
    # transverse speed vt turns it by tan(delta) = N / vt (the velocity triangle).
    d, s = _symbols("normal_burn_inclination")
    inc, u, vt, normal = s["inc"], s["u"], s["vt"], s["normal"]
    delta = sp.atan(normal / vt)
    textbook = sp.acos(sp.cos(inc) * sp.cos(delta) - sp.sin(inc) * sp.sin(delta) * sp.cos(u))
    _assert_same(d.result, textbook)
    # at the node (u = 0) the inclination simply grows by delta (common practice)
    at_node = sp.simplify(sp.cos(d.result.subs(u, 0)) - sp.cos(inc + delta))
    assert sp.simplify(sp.expand_trig(at_node)) == 0


def test_plane_turn():
    # Vallado, 4th ed., Sec. 6.4, combined change of inclination and node (from memory):
    # cos(theta) = cos i1 cos i2 + sin i1 sin i2 cos(delta Omega).
    d, s = _symbols("plane_turn")
    i1, o1, i2, o2 = s["inc1"], s["raan1"], s["inc2"], s["raan2"]
    textbook = sp.cos(i1) * sp.cos(i2) + sp.sin(i1) * sp.sin(i2) * sp.cos(o2 - o1)
    # cos(2 asin(sqrt(x))) = 1 - 2 x: compare cosines
    cosine = 1 - 2 * sp.sin(d.result / 2) ** 2
    _assert_same(sp.expand_trig(sp.expand(cosine)), sp.expand_trig(sp.expand(textbook)))
    # same node: the turn is the difference of inclinations (common practice)
    same_node = d.result.subs(o2, o1)
    assert sp.simplify(sp.sin(same_node / 2) ** 2 - sp.sin((i2 - i1) / 2) ** 2) == 0


def test_edelbaum():
    # Edelbaum, ARS Journal 31(8), 1961 (from memory): the low-thrust delta-v between
    # circular orbits with a change of plane di is sqrt(v1^2 + v2^2 - 2 v1 v2 cos(pi di / 2)).
    d, s = _symbols("edelbaum")
    v1, v2, angle = s["v1"], s["v2"], s["angle"]
    _assert_same(d.result**2, v1**2 + v2**2 - 2 * v1 * v2 * sp.cos(sp.pi / 2 * angle))
