"""Scalar calls against a hand calculation: deltakit on plain floats vs the same maths with ``math``.

Run ``python benchmarks/bench_scalar.py`` (``--quick`` for fewer repeats). An
analyst types one case into a notebook cell far more often than an array, so a
scalar call should cost about what the hand calculation costs. For each target
(issue 15: burn_prograde, hohmann, circular_speed, rocket_dv,
Conic.from_apsides) it times, interleaved in one run,

* deltakit's public call on plain floats (its scalar fast path), result object
  and NumPy scalars included: every cost the user pays;
* an independent hand calculation with :mod:`math` doing the same work: the
  same refusals (not a plain real number, a bool, non-finite, out of range, a
  broken relation such as ``mf > m0``), the same cancellation-free formulas at
  the same accuracy (checked equal to 1e-14 before timing), and the same
  results, returned as a plain tuple of floats. Its checks are written inline,
  the fastest way a careful author would. deltakit does a little more, which
  the baseline does not: it guards against over- and underflow for inputs
  beyond 1e+-50 (:mod:`deltakit._evaluate`). So the ratio is, if anything,
  unfavourable to deltakit.

Target: each deltakit call within 5x of its hand calculation. The script prints
the per-call times, the ratio with its range and one VERDICT line per target
(``_timing.Verdicts``), and exits non-zero when a target is missed. The machine
is shared: read the ratios, and run it more than once.
"""

from __future__ import annotations

import math
import statistics
import sys
import timeit
from collections.abc import Callable
from typing import Any

import numpy as np
from _timing import Verdicts, spread

import deltakit as dk
from deltakit.constants import EARTH

TARGET = 5.0
_NUMBER = (float, int, np.float64)  # what a hand calculation takes as a number (bool is not)
_INF = math.inf


# ---------------------------------------------------------------------- hand calculations with math
def circular_speed_math(r: float, mu: float) -> float:
    if type(r) not in _NUMBER or type(mu) not in _NUMBER:
        raise TypeError("`r` and `mu` must be real numbers")
    r, mu = float(r), float(mu)
    if not 0.0 < r < _INF:
        raise ValueError(f"`r` must be > 0 m, got {r!r} m")
    if not 0.0 < mu < _INF:
        raise ValueError(f"`mu` must be > 0 m^3/s^2, got {mu!r} m^3/s^2")
    return math.sqrt(mu / r)


def _tangent_burn(r: float, a_from: float, a_to: float, mu: float) -> float:
    s_from = a_from / (r + a_from)
    s_to = a_to / (r + a_to)
    difference = r * (a_to - a_from) / ((r + a_to) * (r + a_from))
    return math.sqrt(2.0 * mu / r) * abs(difference) / (math.sqrt(s_to) + math.sqrt(s_from))


def hohmann_math(r1: float, r2: float, mu: float) -> tuple[float, float, float, float]:
    if type(r1) not in _NUMBER or type(r2) not in _NUMBER or type(mu) not in _NUMBER:
        raise TypeError("`r1`, `r2` and `mu` must be real numbers")
    r1, r2, mu = float(r1), float(r2), float(mu)
    if not 0.0 < r1 < _INF:
        raise ValueError(f"`r1` must be > 0 m, got {r1!r} m")
    if not 0.0 < r2 < _INF:
        raise ValueError(f"`r2` must be > 0 m, got {r2!r} m")
    if not 0.0 < mu < _INF:
        raise ValueError(f"`mu` must be > 0 m^3/s^2, got {mu!r} m^3/s^2")
    first = _tangent_burn(r1, r1, r2, mu)
    second = _tangent_burn(r2, r1, r2, mu)
    a = 0.5 * (r1 + r2)
    return first, second, first + second, math.pi * math.sqrt(a * a * a / mu)


def rocket_dv_math(ve: float, m0: float, mf: float) -> float:
    if type(ve) not in _NUMBER or type(m0) not in _NUMBER or type(mf) not in _NUMBER:
        raise TypeError("`ve`, `m0` and `mf` must be real numbers")
    ve, m0, mf = float(ve), float(m0), float(mf)
    if not 0.0 < ve < _INF:
        raise ValueError(f"`ve` must be > 0 m/s, got {ve!r} m/s")
    if not 0.0 < m0 < _INF:
        raise ValueError(f"`m0` must be > 0 kg, got {m0!r} kg")
    if not 0.0 < mf < _INF:
        raise ValueError(f"`mf` must be > 0 kg, got {mf!r} kg")
    if mf > m0:
        raise ValueError(f"`mf` must be <= m0 (the final mass cannot exceed the initial mass), got {mf!r} kg")
    return ve * math.log1p((m0 - mf) / mf)


def from_apsides_math(rp: float, ra: float, mu: float, argp: float = 0.0) -> tuple[float, ...]:
    if (
        type(rp) not in _NUMBER
        or type(ra) not in _NUMBER
        or type(mu) not in _NUMBER
        or type(argp) not in _NUMBER
    ):
        raise TypeError("`rp`, `ra`, `mu` and `argp` must be real numbers")
    rp, ra, mu, argp = float(rp), float(ra), float(mu), float(argp)
    if not 0.0 < rp < _INF:
        raise ValueError(f"`rp` must be > 0 m, got {rp!r} m")
    if not 0.0 < ra < _INF:
        raise ValueError(f"`ra` must be > 0 m, got {ra!r} m")
    if ra < rp:
        raise ValueError(f"`ra` must be >= rp (apoapsis at or beyond periapsis), got {ra!r} m")
    if not 0.0 < mu < _INF:
        raise ValueError(f"`mu` must be > 0 m^3/s^2, got {mu!r} m^3/s^2")
    if not -_INF < argp < _INF:
        raise ValueError(f"`argp` must be finite, got {argp!r} rad")
    return rp, (ra - rp) / (ra + rp), mu, argp


def burn_prograde_math(orbit: tuple[float, ...], nu: float, dv: float) -> tuple[float, ...]:
    """The conic after a prograde burn (rp, e, argp, nu_after) and the energy change.

    ``orbit`` is (rp, e, mu, argp) checked when it was made, as a Conic is; the
    burn inputs are checked here, as deltakit checks them.
    """
    if type(nu) not in _NUMBER or type(dv) not in _NUMBER:
        raise TypeError("`nu` and `dv` must be real numbers")
    nu, dv = float(nu), float(dv)
    if not -_INF < nu < _INF:
        raise ValueError(f"`nu` must be finite, got {nu!r} rad")
    if not -_INF < dv < _INF:
        raise ValueError(f"`dv` must be finite, got {dv!r} m/s")
    rp, e, mu, argp = orbit
    p = rp * (1.0 + e)
    cos_nu, sin_nu = math.cos(nu), math.sin(nu)
    q = 1.0 + e * cos_nu
    v = math.sqrt(mu / p * (q + e * cos_nu + e * e))
    x = dv / v
    if q <= 0.0 or x <= -1.0:  # unreachable point, or the burn stops the motion
        return (math.nan,) * 5
    scale2 = (1.0 + x) * (1.0 + x)
    e_cos_new = e * cos_nu + q * x * (2.0 + x)
    e_sin_new = scale2 * e * sin_nu
    e_new = math.hypot(e_cos_new, e_sin_new)
    nu_after = math.atan2(e_sin_new, e_cos_new)
    return scale2 * p / (1.0 + e_new), e_new, argp + nu - nu_after, nu_after, dv * (v + 0.5 * dv)


# ---------------------------------------------------------------------- the same numbers first
R_LEO = EARTH.radius + 400e3
ORBIT = (R_LEO, 0.2, EARTH.mu, 0.3)  # an invented 400 km x 4,300 km orbit
CONIC = dk.Conic(*ORBIT)


def _burn(nu: float, dv: float) -> tuple[Any, ...]:
    out = dk.burn_prograde(CONIC, nu, dv)
    return out.after.rp, out.after.e, out.after.argp, out.nu_after, out.energy_change


def _transfer(r1: float, r2: float, mu: float) -> tuple[Any, ...]:
    t = dk.hohmann(r1, r2, mu)
    return (*t.burns, t.total, t.duration)


def _conic(rp: float, ra: float, mu: float) -> tuple[Any, ...]:
    c = dk.Conic.from_apsides(rp, ra, mu)
    return c.rp, c.e, c.mu, c.argp


#: name -> (deltakit call, hand calculation, arguments, comparison of the results)
TARGETS: dict[str, tuple[Callable[..., Any], Callable[..., Any], tuple[Any, ...], Callable[..., Any]]] = {
    "burn_prograde": (
        lambda nu, dv: dk.burn_prograde(CONIC, nu, dv),
        lambda nu, dv: burn_prograde_math(ORBIT, nu, dv),
        (1.1, 250.0),
        lambda nu, dv: (_burn(nu, dv), burn_prograde_math(ORBIT, nu, dv)),
    ),
    "hohmann": (
        dk.hohmann,
        hohmann_math,
        (R_LEO, 42164e3, EARTH.mu),
        lambda *a: (_transfer(*a), hohmann_math(*a)),
    ),
    "circular_speed": (
        dk.circular_speed,
        circular_speed_math,
        (R_LEO, EARTH.mu),
        lambda *a: ((dk.circular_speed(*a),), (circular_speed_math(*a),)),
    ),
    "rocket_dv": (
        dk.rocket_dv,
        rocket_dv_math,
        (3200.0, 5650.0, 4100.0),
        lambda *a: ((dk.rocket_dv(*a),), (rocket_dv_math(*a),)),
    ),
    "Conic.from_apsides": (
        dk.Conic.from_apsides,
        from_apsides_math,
        (R_LEO, EARTH.radius + 20000e3, EARTH.mu),
        lambda *a: (_conic(*a), from_apsides_math(*a)),
    ),
}


def check_same_numbers() -> None:
    for name, (_, _, args, compare) in TARGETS.items():
        ours, theirs = compare(*args)
        np.testing.assert_allclose(
            np.asarray(ours, float), np.asarray(theirs, float), rtol=1e-14, err_msg=name
        )


def per_call(function: Callable[..., Any], args: tuple[Any, ...], number: int) -> float:
    """Seconds per call: the best of three batches of ``number`` calls (the least disturbed)."""
    return min(timeit.repeat(lambda: function(*args), number=number, repeat=3)) / number


def main(argv: list[str]) -> int:
    quick = "--quick" in argv
    runs, number = (3, 2000) if quick else (7, 10000)
    check_same_numbers()
    print(f"scalar calls: deltakit on plain floats vs the same work with math, {runs} interleaved runs")
    results = []
    for name, (ours, theirs, args, _) in TARGETS.items():
        t_ours, t_math = [], []
        for _ in range(runs):  # interleaved, so a noisy neighbour hits both alike
            t_ours.append(per_call(ours, args, number))
            t_math.append(per_call(theirs, args, number))
        ratios = [a / b for a, b in zip(t_ours, t_math)]
        print(f"{name}:")
        print(f"  deltakit               {statistics.median(t_ours) * 1e6:8.2f} us per call")
        print(f"  math, same checks      {statistics.median(t_math) * 1e6:8.2f} us per call")
        print(f"  deltakit / math        {spread(ratios)}")
        results.append((name, statistics.median(ratios)))
    verdicts = Verdicts()  # one line per target, together at the end
    for name, ratio in results:
        verdicts.at_most(f"{name}: deltakit / math per scalar call", ratio, TARGET)
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
