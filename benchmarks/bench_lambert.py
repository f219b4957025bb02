"""Speed of Lambert's problem on arrays: deltakit against two per-case baselines.

Run ``python benchmarks/bench_lambert.py`` (``--quick``: 100,000 cases and
smaller baseline samples). It times, in one run and side by side, the same
1,000,000 zero-revolution heliocentric cases (invented spread: radii 0.7 to
1.7 au, transfer angles 5 to 355 degrees clear of 180, flights of 40 to 500
days):

* :func:`deltakit.lambert`, one call on the arrays (input checks included);
* a loop of a scalar solver of the same method (Izzo 2015: the same initial
  guess, Householder iteration and three forms of T(x)), written here with
  ``math`` and no NumPy, one Python call per case;
* scipy's ``brentq`` on the universal-variable time-of-flight equation
  (Curtis, Orbital Mechanics for Engineering Students, Algorithm 5.2), one
  bracketed root per case with a ``math`` right-hand side, tolerances tight
  enough that its v1 agrees with deltakit's to 1e-9 relative (checked here).

The per-case loops run on a random sample (the same each round; times are
compared per case, and the output says so): a million Python calls of brentq
would take a minute and measure nothing more. The three run in alternating
rounds; the ratio is of CPU seconds per case (wall-clock printed beside it).
Target (issue 13): deltakit at least 50x faster than the brentq loop; the
accuracy and the count of unsolved cases are verdicts too
(``_timing.Verdicts``). The machine is shared: the ratios, not the absolute
times, are what matter. The exit code is non-zero if a target is missed.
"""

from __future__ import annotations

import math
import statistics
import sys
import time

import numpy as np
from _timing import Verdicts, spread
from scipy.optimize import brentq

from deltakit import lambert
from deltakit.constants import SUN

TARGET = 50.0
AU = 149_597_870_700.0
MU = SUN.mu


def cases(n: int, seed: int = 13):
    """Invented heliocentric geometries (demo data, not a mission)."""
    rng = np.random.default_rng(seed)
    angle = rng.uniform(5.0, 175.0, n) + np.where(rng.random(n) < 0.5, 0.0, 180.0)
    angle = np.radians(np.where(np.abs(angle - 180.0) < 2.0, angle + 4.0, angle))
    r1n = AU * rng.uniform(0.7, 1.7, n)
    r2n = AU * rng.uniform(0.7, 1.7, n)
    tilt = np.radians(rng.uniform(-5.0, 5.0, n))
    r1 = np.stack([r1n, np.zeros(n), np.zeros(n)], axis=-1)
    r2 = np.stack(
        [r2n * np.cos(angle) * np.cos(tilt), r2n * np.sin(angle) * np.cos(tilt), r2n * np.sin(tilt)], axis=-1
    )
    tof = rng.uniform(40.0, 500.0, n) * 86400.0
    return r1, r2, tof


# ---------------------------------------------------------------------- scalar Izzo, plain math
def _tof_scalar(x: float, lam: float) -> float:
    distance = abs(x - 1.0)
    if distance < 0.01:  # Battin's series
        energy = x * x - 1.0
        eta = math.sqrt(1.0 + lam * lam * energy) - lam * x
        z = 0.5 * (1.0 - lam - x * eta)
        total, term, j = 1.0, 1.0, 0
        while abs(term) > 1e-17 * abs(total):
            term *= (3.0 + j) * (1.0 + j) / (2.5 + j) * z / (j + 1.0)
            total += term
            j += 1
        return (eta**3 * 4.0 / 3.0 * total + 4.0 * lam * eta) / 2.0
    if distance < 0.2:  # Lagrange
        a = 1.0 / (1.0 - x * x)
        if a > 0.0:
            alpha = 2.0 * math.acos(x)
            beta = math.copysign(2.0 * math.asin(math.sqrt(lam * lam / a)), lam)
            return a * math.sqrt(a) * ((alpha - math.sin(alpha)) - (beta - math.sin(beta))) / 2.0
        alpha = 2.0 * math.acosh(x)
        beta = math.copysign(2.0 * math.asinh(math.sqrt(-lam * lam / a)), lam)
        return -a * math.sqrt(-a) * ((beta - math.sinh(beta)) - (alpha - math.sinh(alpha))) / 2.0
    energy = x * x - 1.0  # Lancaster
    z = math.sqrt(1.0 + lam * lam * energy)
    y = math.sqrt(abs(energy))
    g = x * z - lam * energy
    d = math.acos(max(-1.0, min(1.0, g))) if energy < 0.0 else math.log(y * (z - lam * x) + g)
    return (x - lam * z - d / y) / energy


def izzo_scalar(r1, r2, tof, mu):
    r1n = math.sqrt(r1[0] ** 2 + r1[1] ** 2 + r1[2] ** 2)
    r2n = math.sqrt(r2[0] ** 2 + r2[1] ** 2 + r2[2] ** 2)
    u1 = [c / r1n for c in r1]
    u2 = [c / r2n for c in r2]
    n = [u1[1] * u2[2] - u1[2] * u2[1], u1[2] * u2[0] - u1[0] * u2[2], u1[0] * u2[1] - u1[1] * u2[0]]
    sin_angle = math.sqrt(n[0] ** 2 + n[1] ** 2 + n[2] ** 2)
    sign = -1.0 if n[2] < 0.0 else 1.0
    h = [sign * c / sin_angle for c in n]
    angle = math.atan2(sign * sin_angle, u1[0] * u2[0] + u1[1] * u2[1] + u1[2] * u2[2]) % (2.0 * math.pi)
    chord = math.sqrt(sum((b - a) ** 2 for a, b in zip(r1, r2)))
    s = 0.5 * (r1n + r2n + chord)
    lam = math.sqrt(r1n * r2n) * math.cos(angle / 2.0) / s
    target = math.sqrt(2.0 * mu / s**3) * tof
    t00 = math.acos(lam) + lam * math.sqrt(1.0 - lam * lam)
    t1 = 2.0 / 3.0 * (1.0 - lam**3)
    if target >= t00:
        x = -(target - t00) / (target - t00 + 4.0)
    elif target <= t1:
        x = t1 * (t1 - target) / (0.4 * (1.0 - lam**5) * target) + 1.0
    else:
        x = (target / t00) ** (math.log(2.0) / math.log(t1 / t00)) - 1.0
    for _ in range(40):
        t = _tof_scalar(x, lam)
        miss = t - target
        if miss == 0.0:
            break
        one_minus = 1.0 - x * x
        y = math.sqrt(1.0 - lam * lam * one_minus)
        d1 = (3.0 * t * x - 2.0 + 2.0 * lam**3 * x / y) / one_minus
        d2 = (3.0 * t + 5.0 * x * d1 + 2.0 * (1.0 - lam * lam) * lam**3 / y**3) / one_minus
        d3 = (7.0 * x * d2 + 8.0 * d1 - 6.0 * (1.0 - lam * lam) * lam**5 * x / y**5) / one_minus
        step = miss * (d1 * d1 - miss * d2 / 2.0) / (d1 * (d1 * d1 - miss * d2) + d3 * miss * miss / 6.0)
        x -= step
        if abs(step) < 1e-12:
            break
    gamma = math.sqrt(mu * s / 2.0)
    rho = (r1n - r2n) / chord
    sigma = math.sqrt(max(1.0 - rho * rho, 0.0))
    y = math.sqrt(1.0 - lam * lam * (1.0 - x * x))
    vr1 = gamma * ((lam * y - x) - rho * (lam * y + x)) / r1n
    vt1 = gamma * sigma * (y + lam * x) / r1n
    t_dir = [h[1] * u1[2] - h[2] * u1[1], h[2] * u1[0] - h[0] * u1[2], h[0] * u1[1] - h[1] * u1[0]]
    return [vr1 * a + vt1 * b for a, b in zip(u1, t_dir)]


# ---------------------------------------------------------------------- universal variable + brentq
def _stumpff(z: float) -> tuple[float, float]:
    if abs(z) < 1e-3:  # series: the closed forms cancel near z = 0
        return 0.5 - z / 24.0 + z * z / 720.0, 1.0 / 6.0 - z / 120.0 + z * z / 5040.0
    if z > 0.0:
        q = math.sqrt(z)
        return (1.0 - math.cos(q)) / z, (q - math.sin(q)) / q**3
    q = math.sqrt(-z)
    return (math.cosh(q) - 1.0) / -z, (math.sinh(q) - q) / q**3


def universal_brentq(r1, r2, tof, mu):
    r1n = math.sqrt(r1[0] ** 2 + r1[1] ** 2 + r1[2] ** 2)
    r2n = math.sqrt(r2[0] ** 2 + r2[1] ** 2 + r2[2] ** 2)
    cross_z = r1[0] * r2[1] - r1[1] * r2[0]
    cos_angle = (r1[0] * r2[0] + r1[1] * r2[1] + r1[2] * r2[2]) / (r1n * r2n)
    angle = math.acos(max(-1.0, min(1.0, cos_angle)))
    if cross_z < 0.0:
        angle = 2.0 * math.pi - angle
    a = math.sin(angle) * math.sqrt(r1n * r2n / (1.0 - math.cos(angle)))
    root_mu_t = math.sqrt(mu) * tof

    def y_of(z):
        c, s = _stumpff(z)
        return r1n + r2n + a * (z * s - 1.0) / math.sqrt(c), c, s

    def f(z):
        y, c, s = y_of(z)
        if y <= 0.0:  # continuous, monotone extension where y < 0
            return -root_mu_t
        return (y / c) ** 1.5 * s + a * math.sqrt(y) - root_mu_t

    full_turn = 4.0 * math.pi**2  # z of one whole revolution: F grows without bound below it
    high = full_turn * (1.0 - 1e-6)
    while f(high) <= 0.0:
        high = full_turn - (full_turn - high) / 10.0
    low = -full_turn
    while f(low) >= 0.0:
        low *= 2.0
    z = brentq(f, low, high, xtol=1e-15, rtol=8.9e-16, maxiter=200)
    y = y_of(z)[0]
    f_lag = 1.0 - y / r1n
    g_lag = a * math.sqrt(y / mu)
    return [(b - f_lag * c) / g_lag for b, c in zip(r2, r1)]


def _timed(function, *args):
    """(result, CPU seconds, wall seconds) of one call."""
    cpu, wall = time.process_time(), time.perf_counter()
    result = function(*args)
    return result, time.process_time() - cpu, time.perf_counter() - wall


def _loop(solver, lists):
    return [solver(a, b, t, MU) for a, b, t in lists]


def main(argv: list[str]) -> int:
    quick = "--quick" in argv
    n = 100_000 if quick else 1_000_000
    sample = 2_000 if quick else 10_000
    rounds = 5 if quick else 3
    r1, r2, tof = cases(n)
    picks = np.random.default_rng(1).choice(n, sample, replace=False)
    lists = [(r1[i].tolist(), r2[i].tolist(), float(tof[i])) for i in picks]

    lambert(r1[:1000], r2[:1000], tof[:1000], MU)  # warm the caches of NumPy's first calls
    # alternating rounds, A B C A B C ...: a noisy neighbour on the shared machine hits all alike
    ours_cpu, ours_wall, brentq_cpu, brentq_wall, scalar_cpu, scalar_wall = ([] for _ in range(6))
    for _ in range(rounds):
        out, cpu, wall = _timed(lambert, r1, r2, tof, MU)
        ours_cpu.append(cpu / n)
        ours_wall.append(wall / n)
        universal, cpu, wall = _timed(_loop, universal_brentq, lists)
        brentq_cpu.append(cpu / sample)
        brentq_wall.append(wall / sample)
        scalar, cpu, wall = _timed(_loop, izzo_scalar, lists)
        scalar_cpu.append(cpu / sample)
        scalar_wall.append(wall / sample)

    v1 = out.v1[picks]
    scale = np.linalg.norm(v1, axis=-1)
    error_scalar = np.max(np.linalg.norm(np.array(scalar) - v1, axis=-1) / scale)
    error_brentq = np.max(np.linalg.norm(np.array(universal) - v1, axis=-1) / scale)
    nan = int(np.count_nonzero(~np.isfinite(out.v1).all(axis=-1)))

    def us(values):
        return f"{statistics.median(values) * 1e6:8.3f} us"

    print(f"Lambert's problem, {n:,} zero-revolution heliocentric cases, {rounds} alternating rounds")
    print(f"  (the loops run on the same {sample:,} random cases each round; times are per case)")
    print(f"  {'':44s} {'CPU':>11s} {'wall':>11s}")
    print(f"  {'deltakit lambert, one call on arrays':44s} {us(ours_cpu)} {us(ours_wall)}")
    print(f"  {'loop of a scalar Izzo solver (math)':44s} {us(scalar_cpu)} {us(scalar_wall)}")
    print(f"  {'loop of scipy brentq, universal variable':44s} {us(brentq_cpu)} {us(brentq_wall)}")
    ratios = [b / a for a, b in zip(ours_cpu, brentq_cpu)]
    print(f"  brentq loop / deltakit, CPU per case: {spread(ratios)}")
    print(
        f"  brentq loop / deltakit, wall per case: {spread([b / a for a, b in zip(ours_wall, brentq_wall)])}"
    )
    scalar_ratios = [b / a for a, b in zip(ours_cpu, scalar_cpu)]
    print(f"  scalar Izzo loop / deltakit, CPU per case: {spread(scalar_ratios)}")
    verdicts = Verdicts()
    verdicts.at_least("brentq loop / deltakit lambert, CPU per case", statistics.median(ratios), TARGET)
    verdicts.at_most("largest relative v1 difference from the brentq loop", error_brentq, 1e-9, unit="")
    verdicts.at_most("largest relative v1 difference from the scalar Izzo loop", error_scalar, 1e-9, unit="")
    verdicts.at_most("cases without a solution", nan, 0, unit="")
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
