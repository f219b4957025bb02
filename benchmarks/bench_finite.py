"""Speed of finite-burn integration: one vectorised thrust_arc call vs a scipy loop.

Run ``python benchmarks/bench_finite.py`` (``--quick`` times a smaller scipy
subset). It times, in one run and side by side,

* :func:`deltakit.thrust_arc` on 1,000 cases in one call (Kepler back-propagation,
  checks and result objects included);
* a plain-Python loop calling ``scipy.integrate.solve_ivp`` (DOP853) once per
  case on the same equations at the same tolerance (rtol 1e-12 on a state
  scaled like deltakit's, the energy gained integrated as deltakit does), its
  right-hand side written with :mod:`math` on Python floats. Only the burn
  integration is timed for scipy: the start states come from deltakit, which
  favours scipy. The loop runs over all 1,000 cases (with ``--quick`` over a
  random 100, its time scaled to 1,000; the output says so).

The two answers are compared case by case (energy change within 1e-6
relative) so the speed-up is at equal accuracy. Target (issue 4): the
vectorised call at least 20x faster. One VERDICT line each for the speed-up
and the accuracy (``_timing.Verdicts``); the exit code is non-zero if either
fails. The machine is shared: the ratio, not the absolute
times, is what matters.
"""

from __future__ import annotations

import math
import statistics
import sys
import time

import numpy as np
from _timing import Verdicts
from scipy.integrate import solve_ivp

from deltakit import Conic, propagate, thrust_arc
from deltakit.constants import EARTH, G0

N = 1_000
TARGET = 20.0
RTOL = 1e-12


def cases(n: int, seed: int = 4):
    """Invented spread of Earth orbits, engines and burns (demo data, not a mission)."""
    rng = np.random.default_rng(seed)
    rp = EARTH.radius + rng.uniform(250e3, 2000e3, n)
    e = rng.uniform(0.0, 0.8, n)
    argp = rng.uniform(-np.pi, np.pi, n)
    m0 = rng.uniform(500.0, 20000.0, n)
    # thrust-to-weight log-uniform from 0.01 (arcs of a good part of an orbit) to 1
    thrust = 10.0 ** rng.uniform(-2.0, 0.0, n) * m0 * G0
    ve = rng.uniform(2800.0, 4500.0, n)
    dv = rng.uniform(100.0, 2000.0, n)
    nu_center = rng.uniform(-0.5, 0.5, n)
    return Conic(rp, e, EARTH.mu, argp), thrust, ve, m0, dv, nu_center


def scipy_loop(conic, thrust, ve, m0, dv, nu_center, subset):
    """Energy change per case by solve_ivp, prograde thrust, one call per case.

    The right-hand side is written with :mod:`math` on Python floats (not NumPy
    scalars, which are several times slower per operation), and it integrates
    the energy gained as a fifth component, as deltakit does, so both do the
    same work at the same accuracy.
    """
    mu = float(EARTH.mu)
    propellant = m0 * -np.expm1(-dv / ve)
    duration = propellant * ve / thrust
    nu_start = propagate(conic, nu_center, -0.5 * duration)
    r_vec, v_vec = conic.state(nu_start)
    out = np.empty(subset.size)
    start = time.perf_counter()
    for j, i in enumerate(subset):
        force, mass, flow = float(thrust[i]), float(m0[i]), float(thrust[i] / ve[i])

        def rates(t, s, force=force, mass=mass, flow=flow):
            x, y, vx, vy, _ = s.tolist()
            r2 = x * x + y * y
            r3 = r2 * math.sqrt(r2)
            speed = math.sqrt(vx * vx + vy * vy)
            a = force / (mass - flow * t)
            along = a / speed
            return [vx, vy, -mu * x / r3 + along * vx, -mu * y / r3 + along * vy, a * speed]

        s0 = [*r_vec[i].tolist(), *v_vec[i].tolist(), 0.0]
        r0 = math.hypot(s0[0], s0[1])
        speed0 = math.sqrt(mu / r0)
        # deltakit's 1e-12 on the state scaled to radius 1 and circular speed 1, and on
        # the energy gained scaled by the burn's own delta-v
        atol = 1e-12 * np.array([r0, r0, speed0, speed0, speed0 * float(dv[i])])
        sol = solve_ivp(rates, (0.0, float(duration[i])), s0, method="DOP853", rtol=RTOL, atol=atol)
        out[j] = sol.y[4, -1]
    return out, time.perf_counter() - start


def main(argv: list[str]) -> int:
    quick = "--quick" in argv
    subset_size = 100 if quick else N
    repeats = 3 if quick else 5
    conic, thrust, ve, m0, dv, nu_center = cases(N)

    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        outcome = thrust_arc(conic, thrust, ve, m0, dv, nu_center)
        times.append(time.perf_counter() - start)
    vectorised = statistics.median(times)

    subset = np.random.default_rng(7).choice(N, subset_size, replace=False)
    reference, loop_time = scipy_loop(conic, thrust, ve, m0, dv, nu_center, subset)
    loop_scaled = loop_time * N / subset_size

    error = np.max(np.abs(outcome.energy_change[subset] / reference - 1.0))
    ratio = loop_scaled / vectorised
    print(f"finite burns, {N} cases (prograde, thrust-to-weight 0.01-1, dv 0.1-2 km/s)")
    print(f"  {'deltakit thrust_arc, one call':44s} {vectorised:9.3f} s   (median of {repeats})")
    note = (
        "all cases"
        if subset_size == N
        else (f"timed on {subset_size} cases: {loop_time:.2f} s, scaled x{N / subset_size:.1f}")
    )
    print(f"  {'scipy solve_ivp DOP853 loop':44s} {loop_scaled:9.3f} s   ({note})")
    verdicts = Verdicts()
    verdicts.at_least("scipy DOP853 loop / thrust_arc, 1,000 finite burns", ratio, TARGET)
    verdicts.at_most("largest relative energy-change difference, thrust_arc vs scipy", error, 1e-6, unit="")
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
