"""Every derived closed form agrees with its numeric twin in deltakit.

Each catalog entry's ``function()`` (SymPy lambdify of the derived result)
is called with the same keywords as the numeric layer's function, at a few
hundred random valid points as arrays, and at some of them as scalars. The
random cases are invented; bodies come from deltakit.constants.
"""

from __future__ import annotations

import inspect

import numpy as np
import pytest

import deltakit as dk
from deltakit.constants import EARTH, JUPITER, MARS, MOON, SUN

symbolic = pytest.importorskip("deltakit.symbolic")

N = 400
RTOL = 1e-9
MUS = np.array([EARTH.mu, JUPITER.mu, MARS.mu, MOON.mu, SUN.mu])
RADII = np.array([EARTH.radius, JUPITER.radius, MARS.radius, MOON.radius, SUN.radius])


def _body(rng: np.random.Generator, n: int) -> tuple[np.ndarray, np.ndarray]:
    pick = rng.integers(0, len(MUS), n)
    return MUS[pick], RADII[pick]


def _u(rng: np.random.Generator, low: float, high: float, n: int = N) -> np.ndarray:
    return rng.uniform(low, high, n)


# Each case: entry name -> (points(rng) -> keyword arrays, scale(kw) -> size of the
# largest term, for outputs that may pass through zero by cancellation, or None).
def _vis_viva(rng):
    mu, radius = _body(rng, N)
    r = radius * _u(rng, 1.0, 10.0)
    bound = rng.random(N) < 0.6
    a = np.where(bound, r * _u(rng, 0.51, 20.0), -r * _u(rng, 0.05, 20.0))
    return {"r": r, "a": a, "mu": mu}


def _period(rng):
    mu, radius = _body(rng, N)
    return {"a": radius * _u(rng, 1.0, 100.0), "mu": mu}


def _oberth(rng):
    v = _u(rng, 1000.0, 20000.0)
    return {"v": v, "dv": v * _u(rng, -1.5, 1.5)}


def _inplane(rng):
    mu, radius = _body(rng, N)
    e = _u(rng, 0.0, 3.0)
    with np.errstate(divide="ignore"):
        limit = np.where(e > 1.0, np.arccos(-1.0 / np.maximum(e, 1.0)), np.pi)
    rp = radius * _u(rng, 1.02, 5.0)
    nu = limit * _u(rng, -0.95, 0.95)
    v_transverse = np.sqrt(mu / (rp * (1.0 + e))) * (1.0 + e * np.cos(nu))
    # the numeric layer gives NaN where the burn reverses the motion (documented)
    transverse = np.maximum(_u(rng, -2000.0, 2000.0), -0.9 * v_transverse)
    return {
        "rp": rp,
        "e": e,
        "mu": mu,
        "nu": nu,
        "radial": _u(rng, -2000.0, 2000.0),
        "transverse": transverse,
    }


def _apsis(rng):
    mu, radius = _body(rng, N)
    rp = radius * _u(rng, 1.02, 3.0)
    ra = rp * _u(rng, 1.0, 6.0)
    vp = np.sqrt(2.0 * mu * ra / (rp * (rp + ra)))
    escape, circle = np.sqrt(2.0 * mu / rp), np.sqrt(mu / rp)
    # prograde up to below escape, or retrograde while the burn point stays the periapsis
    dv = np.where(rng.random(N) < 0.7, (escape - vp) * _u(rng, 0.0, 0.9), (circle - vp) * _u(rng, 0.0, 0.9))
    return {"rp": rp, "ra": ra, "mu": mu, "dv": dv}


def _two_radii(rng):
    mu, radius = _body(rng, N)
    r1 = radius * _u(rng, 1.02, 10.0)
    ratio = _u(rng, 1.05, 60.0)
    r2 = np.where(rng.random(N) < 0.5, r1 * ratio, r1 / ratio)  # raising and lowering
    return mu, r1, r2


def _hohmann(rng):
    mu, r1, r2 = _two_radii(rng)
    return {"r1": r1, "r2": r2, "mu": mu}


def _bielliptic(rng):
    mu, r1, r2 = _two_radii(rng)
    return {"r1": r1, "r2": r2, "rb": np.maximum(r1, r2) * _u(rng, 1.01, 20.0), "mu": mu}


def _plane(rng):
    return {"v": _u(rng, 0.0, 20000.0), "angle": _u(rng, 0.0, np.pi)}


def _combined(rng):
    return {"v1": _u(rng, 100.0, 20000.0), "v2": _u(rng, 100.0, 20000.0), "angle": _u(rng, 0.05, np.pi)}


def _periapsis(rng):
    mu, radius = _body(rng, N)
    return {"rp": radius * _u(rng, 1.02, 10.0), "vinf": _u(rng, 0.0, 12000.0), "mu": mu}


def _periapsis_elliptic(rng):
    kw = _periapsis(rng)
    return {**kw, "ra": kw["rp"] * _u(rng, 1.0, 20.0)}


def _flyby(rng):
    mu, radius = _body(rng, N)
    vinf_in = _u(rng, 300.0, 15000.0)
    rp = radius * _u(rng, 1.02, 5.0)
    vp = np.sqrt(vinf_in**2 + 2.0 * mu / rp)
    # braking is allowed as long as the vehicle stays unbound
    brake_limit = np.sqrt(2.0 * mu / rp) - vp
    dv = np.where(rng.random(N) < 0.7, _u(rng, 0.0, 3000.0), 0.9 * brake_limit * _u(rng, 0.0, 1.0))
    return {"vinf_in": vinf_in, "rp": rp, "dv": dv, "mu": mu}


def _rocket(rng):
    m0 = _u(rng, 10.0, 5e5)
    return {"ve": _u(rng, 300.0, 45000.0), "m0": m0, "mf": m0 * _u(rng, 0.05, 0.999)}


def _ejection(rng):
    m_vehicle = _u(rng, 1.0, 1e4)
    return {
        "m_vehicle": m_vehicle,
        "m_ejected": m_vehicle * _u(rng, 0.0, 0.95),
        "u": _u(rng, 0.0, 5000.0),
        "v0": _u(rng, -12000.0, 12000.0),
    }


def _burn_energy(rng):
    m0 = _u(rng, 10.0, 5e5)
    return {
        "m0": m0,
        "mf": m0 * _u(rng, 0.05, 0.999),
        "ve": _u(rng, 300.0, 45000.0),
        "v0": _u(rng, -12000.0, 12000.0),
    }


def _efficiency(rng):
    return {"v": _u(rng, -20000.0, 20000.0), "ve": _u(rng, 300.0, 45000.0)}


def _normal_burn(rng):
    # inclinations away from 0 and pi, where the arc cosine of the derived form
    # (not the numeric twin) would lose digits
    vt = _u(rng, 1000.0, 12000.0)
    return {
        "inc": _u(rng, 0.2, np.pi - 0.2),
        "u": _u(rng, -np.pi, np.pi),
        "vt": vt,
        "normal": vt * _u(rng, -0.3, 0.3),
    }


def _plane_turn(rng):
    inc1 = _u(rng, 0.0, np.pi)
    return {
        "inc1": inc1,
        "raan1": _u(rng, 0.0, 2 * np.pi),
        "inc2": np.clip(inc1 + _u(rng, -1.5, 1.5), 0.0, np.pi),
        "raan2": _u(rng, 0.0, 2 * np.pi),
    }


def _edelbaum(rng):
    # up to 2 rad, the reach of the optimal yaw law (deltakit.lowthrust)
    return {"v1": _u(rng, 1000.0, 20000.0), "v2": _u(rng, 1000.0, 20000.0), "angle": _u(rng, 0.05, 2.0)}


def _energy_scale(kw):
    # kinetic-energy terms, J: the parts may cancel to near zero, their size does not
    m = kw.get("m_vehicle", kw.get("m0"))
    speed = np.abs(kw["v0"]) + kw.get("u", kw.get("ve"))
    if "mf" in kw:
        speed = speed + kw["ve"] * np.log(kw["m0"] / kw["mf"])
    return m * speed**2


def _c3(rng):
    mu, radius = _body(rng, N)
    r = radius * _u(rng, 1.0, 50.0)
    return {"r": r, "v": np.sqrt(2.0 * mu / r) * _u(rng, 0.0, 2.0), "mu": mu}


def _lambert_tof(rng):
    # elliptic transfers away from the parabola, where the ellipse form is well conditioned
    return {"x": _u(rng, -0.95, 0.8), "lam": _u(rng, -0.99, 0.99)}


CASES = {
    "vis_viva": (_vis_viva, None),
    "orbital_period": (_period, None),
    "oberth": (_oberth, None),
    "inplane_burn": (_inplane, lambda kw: (np.sqrt(kw["mu"] / kw["rp"] * (1 + kw["e"])) + 2000.0) * 4000.0),
    "apsis_change": (_apsis, None),
    "hohmann": (_hohmann, None),
    "bielliptic": (_bielliptic, None),
    "plane_change": (_plane, None),
    "combined_plane_change": (_combined, None),
    "escape_burn": (_periapsis, None),
    "capture_burn": (_periapsis, None),
    "escape_burn_elliptic": (_periapsis_elliptic, None),
    "capture_burn_elliptic": (_periapsis_elliptic, None),
    "powered_flyby": (_flyby, lambda kw: kw["vinf_in"] + np.abs(kw["dv"])),
    "rocket_equation": (_rocket, None),
    "ejection_energy": (_ejection, None),  # the total is a sum of squares: no cancellation
    "burn_energy": (_burn_energy, None),
    "propulsive_efficiency": (_efficiency, None),
    # C3 = v^2 - 2 mu/r cancels to near zero just at escape: scale by its larger term
    "c3": (_c3, lambda kw: kw["v"] ** 2 + 2.0 * kw["mu"] / kw["r"]),
    "lambert_time_of_flight": (_lambert_tof, None),
    "normal_burn_inclination": (_normal_burn, None),
    "plane_turn": (_plane_turn, None),
    "edelbaum": (_edelbaum, None),
}

# (entry, output, how to read the same number from the twin, scale of the largest term or None)
EXTRA_OUTPUTS = [
    ("hohmann", "burn1", lambda kw: dk.hohmann(**kw).burns[0], None),
    ("hohmann", "burn2", lambda kw: dk.hohmann(**kw).burns[1], None),
    ("hohmann", "duration", lambda kw: dk.hohmann(**kw).duration, None),
    ("bielliptic", "duration", lambda kw: dk.bielliptic(**kw).duration, None),
    ("bielliptic", "burn1", lambda kw: dk.bielliptic(**kw).burns[0], None),
    ("bielliptic", "burn2", lambda kw: dk.bielliptic(**kw).burns[1], None),
    ("bielliptic", "burn3", lambda kw: dk.bielliptic(**kw).burns[2], None),
    ("powered_flyby", "vinf_out", lambda kw: dk.powered_flyby(**kw).vinf_out, None),
    ("powered_flyby", "deflection", lambda kw: dk.powered_flyby(**kw).deflection, None),
    # each part changes sign with v0, so it can cancel to near zero
    ("ejection_energy", "vehicle", lambda kw: dk.ejection_energy(**kw).vehicle, _energy_scale),
    ("ejection_energy", "ejecta", lambda kw: dk.ejection_energy(**kw).ejecta, _energy_scale),
    ("burn_energy", "vehicle", lambda kw: dk.burn_energy(**kw).vehicle, _energy_scale),
    ("burn_energy", "ejecta", lambda kw: dk.burn_energy(**kw).ejecta, _energy_scale),
]


def _assert_close(derived, numeric, scale=None, *, nan_ok=False):
    derived = np.asarray(derived, dtype=float)
    numeric = np.asarray(numeric, dtype=float)
    assert derived.shape == numeric.shape
    if nan_ok:  # an impossible outcome: both must say so
        assert (np.isnan(derived) == np.isnan(numeric)).all()
        derived, numeric = derived[~np.isnan(numeric)], numeric[~np.isnan(numeric)]
        if numeric.size == 0:
            return
    assert np.isfinite(numeric).all(), "the random points should all be valid for the numeric twin"
    bound = RTOL * np.abs(numeric)
    if scale is not None:
        bound = np.maximum(bound, RTOL * np.asarray(scale))
    error = np.abs(derived - numeric)
    worst = int(np.argmax(error - bound))
    assert (error <= bound).all(), (
        f"{int(np.count_nonzero(error > bound))} of {error.size} points disagree; worst: "
        f"derived {derived.flat[worst]!r} vs numeric {numeric.flat[worst]!r}"
    )


def test_every_catalog_entry_has_a_twin_case():
    assert set(CASES) == set(symbolic.catalog())


@pytest.mark.parametrize("name", sorted(CASES))
def test_function_agrees_with_numeric_twin_on_arrays(name):
    points, scale = CASES[name]
    kw = points(np.random.default_rng(sum(map(ord, name))))
    d = symbolic.derive(name)
    derived = d.function()(**kw)
    numeric = d.twin_function()(**kw)
    assert np.shape(derived) == (N,)
    _assert_close(derived, numeric, scale(kw) if scale else None)


@pytest.mark.parametrize("name", sorted(CASES))
def test_function_agrees_with_numeric_twin_on_scalars(name):
    points, scale = CASES[name]
    kw = points(np.random.default_rng(1 + sum(map(ord, name))))
    d = symbolic.derive(name)
    f, twin = d.function(), d.twin_function()
    for i in range(25):
        one = {k: float(v[i]) for k, v in kw.items()}
        derived = f(**one)
        assert isinstance(derived, np.floating), f"scalar in should give a NumPy scalar, got {type(derived)}"
        _assert_close(derived, twin(**one), scale(one) if scale else None)


def test_function_broadcasts_like_a_ufunc():
    f = symbolic.derive("hohmann").function()
    r1 = np.array([[7.0e6], [8.0e6]])
    r2 = np.array([2.0e7, 3.0e7, 4.2e7])
    out = f(r1, r2, EARTH.mu)  # positional, in the twin's order
    assert out.shape == (2, 3)
    _assert_close(out, dk.hohmann(r1, r2, EARTH.mu).total)
    # a result that does not depend on an argument still takes its shape
    total = symbolic.derive("ejection_energy").function()(m_vehicle=2.0, m_ejected=1.0, u=1.0, v0=np.zeros(4))
    assert total.shape == (4,)


@pytest.mark.parametrize(
    "name,output,read,scale", EXTRA_OUTPUTS, ids=[f"{e[0]}-{e[1]}" for e in EXTRA_OUTPUTS]
)
def test_named_outputs_agree_with_numeric_fields(name, output, read, scale):
    points = CASES[name][0]
    kw = points(np.random.default_rng(2 + sum(map(ord, name + output))))
    derived = symbolic.derive(name).function(output)(**kw)
    _assert_close(derived, read(kw), scale(kw) if scale else None)


@pytest.mark.parametrize("name", sorted(CASES))
def test_function_keywords_match_the_twin_signature(name):
    d = symbolic.derive(name)
    if d.twin_adapter is not None:
        # the twin takes a Conic (burn, burn_prograde): the adapter builds it from the same keywords
        target = d.twin_adapter
    else:
        target = getattr(dk, d.twin.partition(":")[0].rpartition(".")[2])
    # the derivation's parameters are the twin's leading ones; any others have defaults
    parameters = list(inspect.signature(target).parameters.values())
    assert [p.name for p in parameters[: len(d.parameters)]] == [str(p) for p in d.parameters]
    assert all(p.default is not inspect.Parameter.empty for p in parameters[len(d.parameters) :])


@pytest.mark.parametrize("name", sorted(CASES))
def test_function_refuses_what_the_twin_refuses(name):
    # Each parameter's rule comes from its SymPy assumptions; a value breaking it
    # raises DomainError naming the parameter, as the numeric layer does.
    d = symbolic.derive(name)
    kw = {k: float(v[0]) for k, v in CASES[name][0](np.random.default_rng(5)).items()}
    for parameter, rule in d.domain.items():
        bad = {"> 0": 0.0, ">= 0": -1.0, "non-zero": 0.0, "finite": np.inf}[rule]
        with pytest.raises(dk.DomainError, match=f"`{parameter}`"):
            d.function()(**{**kw, parameter: bad})
        with pytest.raises(dk.DomainError, match=f"`{parameter}`"):
            d.twin_function()(**{**kw, parameter: bad})


@pytest.mark.parametrize("name", sorted(CASES))
def test_zero_where_allowed_agrees_with_twin(name):
    d = symbolic.derive(name)
    kw = {k: float(v[0]) for k, v in CASES[name][0](np.random.default_rng(6)).items()}
    if "dv" in kw:  # a prograde burn, so the flyby stays unbound with no arrival speed
        kw["dv"] = abs(kw["dv"])
    for parameter in [p for p, rule in d.domain.items() if rule == ">= 0"]:
        one = {**kw, parameter: 0.0}
        _assert_close(d.function()(**one), d.twin_function()(**one), nan_ok=True)


def test_vis_viva_on_a_parabola():
    # a = inf is a parabola: the speed is the escape speed (common practice).
    f = symbolic.derive("vis_viva").function()
    _assert_close(f(r=7e6, a=np.inf, mu=EARTH.mu), dk.escape_speed(7e6, EARTH.mu))
