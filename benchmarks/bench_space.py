"""Speed of out-of-plane burn outcomes: deltakit.burn with a normal component vs hand-written NumPy.

Run ``python benchmarks/bench_space.py`` (``--quick`` for fewer repeats). It
times, in one run and interleaved (a noisy neighbour on the shared machine hits
them alike), 1,000,000 burns with radial, transverse and normal components on
1,000,000 inclined orbits (invented Earth orbits), and their full outcome: the
new conic (rp, e, argp, inc, raan), the burn point's true anomaly on it, the
energy change and the size of the burn. Computed

* by :func:`deltakit.burn` (checks, the singular cases and result objects
  included);
* by a hand-written NumPy expression of the same maths, written here
  independently of deltakit, in cache-sized blocks of the cases, with the
  same cheap half-angle trigonometry (one ``tan`` for a cosine and a sine) a
  careful engineer would use on this machine, and no checks or singular
  branches (the data has none).

Target (issue 12): deltakit within 1.3x of the hand-written expression. The
answers are compared first (to 1e-12; angles modulo a turn). The exit code is
non-zero if the target is missed. The machine is shared: the ratios, not the
absolute times, are what matter.
"""

from __future__ import annotations

import math
import statistics
import sys

import numpy as np
from _timing import Verdicts, median_time, spread

from deltakit import Conic, burn
from deltakit.constants import EARTH

N = 1_000_000
BLOCK = 16384
TARGET = 1.3
TWO_PI = 2.0 * math.pi


def cases(n: int, seed: int = 12) -> tuple[np.ndarray, ...]:
    """Invented spread of inclined Earth orbits and burns (demo data, not a mission)."""
    rng = np.random.default_rng(seed)
    rp = EARTH.radius + rng.uniform(200e3, 2000e3, n)
    e = rng.uniform(0.0, 0.9, n)
    argp = rng.uniform(-np.pi, np.pi, n)
    inc = rng.uniform(0.05, 3.0, n)
    raan = rng.uniform(0.0, TWO_PI, n)
    nu = rng.uniform(-np.pi, np.pi, n)
    radial, transverse, normal = (rng.uniform(-800.0, 800.0, n) for _ in range(3))
    return rp, e, argp, inc, raan, nu, radial, transverse, normal


def with_deltakit(conic, nu, radial, transverse, normal):
    out = burn(conic, nu, radial, transverse, normal)
    a = out.after
    return a.rp, a.e, a.argp, a.inc, a.raan, out.nu_after, out.energy_change, out.dv


def _half(angle):
    t = np.tan(0.5 * angle)
    t2 = t * t
    c2 = 1.0 / (1.0 + t2)
    return (1.0 - t2) * c2, 2.0 * t * c2, c2


def _block(rp, e, mu, argp, inc, raan, nu, radial, transverse, normal, out):
    """One block of the maths of a burn in RTN, by hand."""
    rp_o, e_o, argp_o, inc_o, raan_o, nu_o, energy_o, dv_o = out
    p = rp * (1.0 + e)
    cos_nu, sin_nu, c2 = _half(nu)
    q = (1.0 - e) + 2.0 * e * c2  # 1 + e cos nu
    root = np.sqrt(p / mu)
    vr = e * sin_nu / root
    vt = q / root
    x = transverse / vt
    y = normal / vt
    dv2 = radial * radial + transverse * transverse + normal * normal
    np.sqrt(dv2, out=dv_o)
    np.multiply(0.5, dv2, out=energy_o)
    energy_o += vr * radial
    energy_o += vt * transverse
    along = 1.0 + x
    s = np.sqrt(along * along + y * y)  # new transverse speed / old
    # the new orbit in its own plane
    e_cos = e * cos_nu + q * (x * (2.0 + x) + y * y)
    e_sin = s * (e * sin_nu + radial * root)
    np.sqrt(e_cos * e_cos + e_sin * e_sin, out=e_o)
    np.arctan2(e_sin, e_cos, out=nu_o)
    np.multiply(s * s, p, out=rp_o)
    rp_o /= 1.0 + e_o
    # the plane turned about the radius by d: cos d = along / s, sin d = y / s
    cos_d, sin_d = along / s, y / s
    cos_a, sin_a, _ = _half(argp)
    cos_u = cos_a * cos_nu - sin_a * sin_nu
    sin_u = sin_a * cos_nu + cos_a * sin_nu
    cos_i, sin_i, _ = _half(inc)
    tilt = sin_d * cos_u
    c = tilt * cos_i + cos_d * sin_i
    side = sin_d * sin_u
    w_z = cos_d * cos_i - tilt * sin_i
    np.arctan2(np.sqrt(c * c + side * side), w_z, out=inc_o)
    node = raan + np.arctan2(side, c)
    np.subtract(node, TWO_PI * np.floor(node / TWO_PI), out=raan_o)
    u_new = np.arctan2(
        cos_d * sin_u * c - (cos_d * cos_u * cos_i - sin_d * sin_i) * side, cos_u * c + sin_u * cos_i * side
    )
    np.subtract(u_new, nu_o, out=argp_o)


def by_hand(rp, e, mu, argp, inc, raan, nu, radial, transverse, normal):
    """The same maths by hand, in cache-sized blocks of the cases."""
    out = [np.empty(nu.shape) for _ in range(8)]
    with np.errstate(invalid="ignore", divide="ignore"):
        for start in range(0, nu.size, BLOCK):
            cut = slice(start, start + BLOCK)
            parts = (
                [a[cut] for a in (rp, e)]
                + [mu]
                + [a[cut] for a in (argp, inc, raan, nu, radial, transverse, normal)]
            )
            _block(*parts, [o[cut] for o in out])
    return out


def main(argv: list[str]) -> int:
    repeats = 5 if "--quick" in argv else 9
    rp, e, argp, inc, raan, nu, radial, transverse, normal = cases(N)
    conic = Conic(rp, e, EARTH.mu, argp, inc, raan)
    ours = with_deltakit(conic, nu, radial, transverse, normal)
    theirs = by_hand(rp, e, EARTH.mu, argp, inc, raan, nu, radial, transverse, normal)
    for k, (a, b) in enumerate(zip(ours, theirs)):
        a, b = np.asarray(a), np.asarray(b)
        if k in (2, 4, 5):  # angles: modulo a turn
            difference = np.abs(np.remainder(a - b + np.pi, TWO_PI) - np.pi)
            assert np.nanmax(difference) < 1e-9, (k, np.nanmax(difference))
        else:
            np.testing.assert_allclose(a, b, rtol=1e-12, atol=1e-9)

    t_ours, t_hand = [], []
    for _ in range(repeats):
        t_ours.append(median_time(with_deltakit, conic, nu, radial, transverse, normal, repeats=1))
        t_hand.append(
            median_time(by_hand, rp, e, EARTH.mu, argp, inc, raan, nu, radial, transverse, normal, repeats=1)
        )
    ours_t, hand_t = statistics.median(t_ours), statistics.median(t_hand)
    ratios = [a / b for a, b in zip(t_ours, t_hand)]
    print(f"1,000,000 out-of-plane burns on inclined orbits, full outcome, median of {repeats} runs")
    print(f"  deltakit.burn (radial, transverse, normal)   {ours_t * 1e3:8.1f} ms")
    print(f"  hand-written NumPy, blocked                  {hand_t * 1e3:8.1f} ms")
    print(f"  deltakit / hand-written, run by run: {spread(ratios)}")
    verdicts = Verdicts()
    verdicts.at_most("out-of-plane burns: deltakit.burn / blocked NumPy by hand", ours_t / hand_t, TARGET)
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
