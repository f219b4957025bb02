"""Speed of prograde burn outcomes: deltakit vs hand-fused NumPy vs a plain-Python loop.

Run ``python benchmarks/bench_burns.py``. It times, in one run and side by side,
1,000,000 prograde burn outcomes (the conic after the burn: rp, e, argp, plus the
true anomaly on it and the energy change) computed

* by :func:`deltakit.burn_prograde` on arrays,
* by a hand-fused NumPy expression of the same maths (in-place operations, no
  validation, no result objects),
* by a plain-Python loop with :mod:`math` (a subset, scaled to the full count),

and, as a yardstick, the floor (see :func:`floor`): the inputs read, the four
transcendental passes the maths cannot do without, and five fresh outputs
written, with none of the other arithmetic. No NumPy code that returns these
five results can beat the floor, so ``loop / floor`` bounds the loop ratio
any NumPy implementation can reach on the machine at hand.

Targets (issue 2): deltakit within 1.5x of the fused expression and at least
100x faster than the loop. The exit code is non-zero if a target fails; when
the loop target lies beyond the floor, the script says so.
Timings are the median of several repeats; the machine is shared, so the
ratios, not the absolute times, are what matter.
"""

from __future__ import annotations

import math
import statistics
import sys

import numpy as np
from _timing import median_time

from deltakit import Conic, burn_prograde
from deltakit.burns import _blockwise  # the same block loop, so the floor pays what deltakit pays
from deltakit.constants import EARTH

N = 1_000_000
LOOP_N = 20_000
REPEATS = 7
FUSED_TARGET = 1.5
LOOP_TARGET = 100.0


def cases(n: int, seed: int = 1) -> tuple[np.ndarray, ...]:
    """Invented spread of Earth orbits and burns (demo data, not a mission)."""
    rng = np.random.default_rng(seed)
    rp = EARTH.radius + rng.uniform(200e3, 2000e3, n)
    e = rng.uniform(0.0, 0.9, n)
    argp = rng.uniform(-np.pi, np.pi, n)
    nu = rng.uniform(-np.pi, np.pi, n)
    dv = rng.uniform(-500.0, 1500.0, n)
    return rp, e, argp, nu, dv


def with_deltakit(conic: Conic, nu: np.ndarray, dv: np.ndarray):
    out = burn_prograde(conic, nu, dv)
    return out.after.rp, out.after.e, out.after.argp, out.nu_after, out.energy_change


def fused(rp, e, mu, argp, nu, dv):
    """The same maths written by hand in one go: in-place where possible, no checks."""
    p = 1.0 + e
    p *= rp
    t = 0.5 * nu
    np.tan(t, out=t)
    t2 = t * t
    inverse = 1.0 + t2
    np.reciprocal(inverse, out=inverse)
    e_cos = 1.0 - t2
    e_cos *= inverse
    e_cos *= e
    e_sin = 2.0 * t
    e_sin *= inverse
    e_sin *= e
    q = 1.0 + e_cos
    v = q + e_cos
    v += e * e
    v *= mu / p
    np.sqrt(v, out=v)
    x = dv / v
    s = 1.0 + x
    bad = (q <= 0.0) | (s <= 0.0)
    if bad.any():
        s[bad] = np.nan
    e_cos_new = x + 2.0
    e_cos_new *= x
    e_cos_new *= q
    e_cos_new += e_cos
    s2 = s * s
    e_sin_new = e_sin * s2
    e_new = e_cos_new * e_cos_new
    e_new += e_sin_new * e_sin_new
    np.sqrt(e_new, out=e_new)
    nu_after = np.arctan2(e_sin_new, e_cos_new)
    rp_new = s2 * p
    rp_new /= e_new + 1.0
    argp_new = nu - nu_after
    argp_new += argp
    energy = 0.5 * dv
    energy = energy + v  # may broadcast up
    energy *= dv
    if bad.any():
        energy[bad] = np.nan
    return rp_new, e_new, argp_new, nu_after, energy


def floor(rp, e, mu, argp, nu, dv):
    """The least NumPy work that can produce these five results: a lower bound, not a result.

    The maths needs four transcendental passes that NumPy cannot fuse with
    anything else: a trigonometric function of the burn point (one ``tan`` of
    the half angle gives both cosine and sine), the square root of the speed,
    the square root of the new eccentricity and the ``arctan2`` of the new
    true anomaly. Here each runs once at the shape its inputs give it (in a
    burn-point x delta-v grid the first two depend on the burn point only),
    in the cache-sized blocks of deltakit's own block loop, and each of the five fresh outputs
    is written by a single operation. The rest of the maths (about twenty-five
    multiplications, additions and divisions) is left out.
    """
    arrays = (np.asarray(a, dtype=float) for a in (rp, e, mu, argp, nu, dv))
    return _blockwise(_floor_kernel, *arrays)


def _floor_kernel(rp, e, mu, argp, nu, dv, out):
    """One block of :func:`floor`, run by deltakit's own block loop."""
    rp_o, e_o, argp_o, nu_o, energy_o = out
    half_angle = np.tan(nu)  # at the shape of nu
    speed = np.sqrt(e + half_angle)  # at the shape of (e, nu)
    np.add(rp, speed, out=rp_o)
    np.add(nu, dv, out=e_o)
    np.sqrt(e_o, out=e_o)
    np.arctan2(nu, dv, out=nu_o)
    np.subtract(argp, dv, out=argp_o)
    np.multiply(speed, dv, out=energy_o)


def plain_loop(rp, e, mu, argp, nu, dv):
    out = []
    for rp_i, e_i, argp_i, nu_i, dv_i in zip(rp, e, argp, nu, dv):
        p = rp_i * (1.0 + e_i)
        cos_nu = math.cos(nu_i)
        q = 1.0 + e_i * cos_nu
        v = math.sqrt(mu / p * (1.0 + 2.0 * e_i * cos_nu + e_i * e_i))
        x = dv_i / v
        s = 1.0 + x
        if q <= 0.0 or s <= 0.0:
            out.append((math.nan,) * 5)
            continue
        e_cos_new = e_i * cos_nu + q * x * (2.0 + x)
        e_sin_new = s * s * e_i * math.sin(nu_i)
        e_new = math.hypot(e_cos_new, e_sin_new)
        nu_after = math.atan2(e_sin_new, e_cos_new)
        rp_new = p * s * s / (1.0 + e_new)
        out.append((rp_new, e_new, argp_i + nu_i - nu_after, nu_after, dv_i * (v + 0.5 * dv_i)))
    return out


def workload_independent():
    """1,000,000 unrelated orbits, one burn each (all inputs of shape (N,))."""
    rp, e, argp, nu, dv = cases(N)
    return "1,000,000 independent orbits x one burn each", (rp, e, EARTH.mu, argp, nu, dv)


def workload_grid():
    """One orbit, a 1000 x 1000 grid of burn point x delta-v (a burn-point sweep)."""
    side = round(math.sqrt(N))
    rp, ra = EARTH.radius + 250e3, 42164e3  # an invented transfer orbit to geostationary radius
    e = (ra - rp) / (ra + rp)
    nu = np.linspace(-np.pi, np.pi, side)[:, np.newaxis]
    dv = np.linspace(-300.0, 1200.0, side)[np.newaxis, :]
    return "one orbit, 1000 burn points x 1000 delta-v", (
        np.float64(rp),
        np.float64(e),
        EARTH.mu,
        0.0,
        nu,
        dv,
    )


def run(title: str, inputs) -> bool:
    rp, e, mu, argp, nu, dv = inputs
    conic = Conic(rp, e, mu, argp)

    # Same numbers first: a benchmark of different maths would mean nothing.
    ours = with_deltakit(conic, nu, dv)
    reference = fused(rp, e, mu, argp, nu, dv)
    for a, b in zip(ours, reference):
        np.testing.assert_allclose(np.asarray(a), b, rtol=1e-12, atol=1e-9, equal_nan=True)
    # The loop gets plain Python floats (lists), as a careful plain-Python author would.
    flat = [np.broadcast_to(x, np.shape(ours[0])).ravel()[:LOOP_N].tolist() for x in (rp, e, argp, nu, dv)]
    loop_rows = np.array(plain_loop(flat[0][:1000], flat[1][:1000], mu, *(f[:1000] for f in flat[2:])))
    expected = np.stack([np.broadcast_to(r, np.shape(ours[0])).ravel()[:1000] for r in reference], axis=-1)
    np.testing.assert_allclose(loop_rows, expected, rtol=1e-12, atol=1e-9, equal_nan=True)

    # Interleave all three so a noisy neighbour on the shared machine hits them alike.
    t_ours, t_fused, t_floor, t_loop = [], [], [], []
    for _ in range(REPEATS):
        t_ours.append(median_time(with_deltakit, conic, nu, dv, repeats=1))
        t_fused.append(median_time(fused, rp, e, mu, argp, nu, dv, repeats=1))
        t_floor.append(median_time(floor, rp, e, mu, argp, nu, dv, repeats=1))
        t_loop.append(
            median_time(plain_loop, flat[0], flat[1], mu, *flat[2:], repeats=1) * (N / len(flat[0]))
        )
    t_ours_med = statistics.median(t_ours)
    t_fused_med = statistics.median(t_fused)
    t_floor_med = statistics.median(t_floor)
    t_loop = statistics.median(t_loop)

    vs_fused = t_ours_med / t_fused_med
    vs_loop = t_loop / t_ours_med
    fused_ok = vs_fused <= FUSED_TARGET
    loop_ok = vs_loop >= LOOP_TARGET
    print(f"{title}: prograde burn outcomes (after conic + energy change), median of {REPEATS} runs")
    print(f"  deltakit.burn_prograde   {t_ours_med * 1e3:9.1f} ms")
    print(f"  hand-fused NumPy         {t_fused_med * 1e3:9.1f} ms")
    print(f"  floor (see docstring)     {t_floor_med * 1e3:9.1f} ms")
    print(f"  plain-Python math loop   {t_loop * 1e3:9.1f} ms  (timed on {len(flat[0]):,}, scaled)")
    print(
        f"  deltakit / fused  = {vs_fused:6.2f}x   target <= {FUSED_TARGET}x   {'OK' if fused_ok else 'FAIL'}"
    )
    print(
        f"  loop / deltakit   = {vs_loop:6.0f}x   target >= "
        f"{LOOP_TARGET:.0f}x   {'OK' if loop_ok else 'FAIL'}"
    )
    ceiling = t_loop / t_floor_med
    print(f"  loop / fused      = {t_loop / t_fused_med:6.0f}x   (the hand-fused expression, for comparison)")
    print(
        f"  loop / floor      = {ceiling:6.0f}x   (the most any NumPy code "
        "returning these arrays can reach here)"
    )
    budget = t_loop / LOOP_TARGET - t_floor_med
    print(f"  at the loop target, the arithmetic beyond the floor may take {budget * 1e3:.1f} ms in all")
    if not loop_ok and ceiling < LOOP_TARGET:
        print("  the loop target lies beyond the floor on this machine: unreachable without compiled code")
    return fused_ok and loop_ok


def main() -> int:
    results = [run(*workload()) for workload in (workload_independent, workload_grid)]
    return 0 if all(results) else 1


if __name__ == "__main__":
    sys.exit(main())
