"""Sweep at scale: a billion burn cases, reduced on the fly, in bounded memory.

The energy change of a prograde burn is swept over delta-v x periapsis x
apoapsis x burn point and reduced to its maximum over the burn point, the
question "how much can this orbit give" for each (dv, rp, ra). The full run is
10^9 cases; the result (10^9 / n_nu values) fits in memory, the grid itself
(8 GB) never exists.

Measured side by side in one run, alternating, on the same blocks:

* floor: a plain NumPy expression of the same maths, written here
  independently of deltakit (vis-viva on the ellipse in the form without
  cancellation, ``v^2 = (2 mu/rp)((ra - rp)/ra cos^2(nu/2) + rp^2/(ra (rp + ra)))``,
  the Oberth gain, NaN where the burn would stop the vehicle, the NaN-skipping
  maximum over nu), called block by block in one thread;
* trade: the sweep that ``deltakit.trades.best_burn_point`` runs (inputs
  checked once, then its fused kernel in every block), reduced with
  ``.max("nu").compute()``;
* public: ``deltakit.sweep(deltakit.trades.prograde_energy_change, ...)``,
  the same through the public function, which checks each block's slices.

Per core, the floor and both sweeps run one thread each (the sweeps on dask's
synchronous scheduler, so their cost holds the graph, the scheduler, the
kernel and the reduction) on the same first 10^8 cases, in alternating
rounds. Then the whole grid runs on dask's threaded scheduler, one thread per
core, for its wall time and peak memory.

Targets: the trade's CPU seconds per case within 1.3x of the floor's, and the
peak resident memory of this process under 2 GiB. Wall-clock ratios are
printed too (meaningful on an idle machine only: on a shared virtual machine
a thread's wall time includes the time other guests hold the core).

Usage::

    python benchmarks/bench_sweep.py               # 10^9 cases (minutes on 2 cores)
    python benchmarks/bench_sweep.py --quick       # 5 x 10^7 cases
    python benchmarks/bench_sweep.py --cases 1e8
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import dask
import numpy as np
from _timing import Verdicts, peak_rss, spread

import deltakit as dk
import deltakit.sweeps as sweep_module
from deltakit import trades
from deltakit.constants import EARTH

TARGET_RATIO = 1.3
MEMORY_LIMIT = 2 * 1024**3
N_NU, N_DV = 250, 40  # burn points and delta-v values; rp x ra grows with --cases


def axes_for(cases: float) -> dict[str, np.ndarray]:
    scale = np.sqrt(cases / 1e9)
    n_rp, n_ra = max(1, round(200 * scale)), max(1, round(500 * scale))
    return {
        "dv": np.linspace(5.0, 1500.0, N_DV),
        "rp": np.linspace(EARTH.radius + 200e3, EARTH.radius + 2000e3, n_rp),
        "ra": np.linspace(EARTH.radius + 2000e3, 400000e3, n_ra),
        "nu": np.linspace(0.0, 2.0 * np.pi, N_NU, endpoint=False),
    }


# ---------------------------------------------------------------------- the floor, written here
def best_energy_change(dv, rp, ra, nu, mu):
    """Largest prograde energy change over nu, J/kg, plain NumPy on an open grid (dv, rp, ra, nu).

    Vis-viva on the conic, written without cancellation or overflow: with
    e = (ra - rp)/(ra + rp) and p = 2 rp ra/(rp + ra),
    v^2 = mu/p ((1 - e)^2 + 4 e cos^2(nu/2)) = (2 mu/rp) ((ra - rp)/ra cos^2(nu/2) + rp^2/(ra (rp + ra))).
    """
    bracket = np.where(ra >= rp, (ra - rp) / ra * np.cos(nu / 2.0) ** 2 + rp / ra * (rp / (rp + ra)), np.nan)
    v = np.sqrt(2.0 * mu) / np.sqrt(rp) * np.sqrt(bracket)
    gain = np.where(v > -dv, (v + 0.5 * dv) * dv, np.nan)  # v dv + dv^2/2; NaN if the burn stops it
    return np.fmax.reduce(gain, axis=-1)  # skips NaN, as xarray's max does


def floor_rate(axes: dict[str, np.ndarray], rp_rows: int, budget: float) -> tuple[float, float, np.ndarray]:
    """Cases per wall second and per CPU second of the floor over the sweep's blocks, one thread."""
    ra, nu = axes["ra"], axes["nu"]
    per_block = rp_rows * ra.size * nu.size
    blocks = [(k, j) for k in range(axes["dv"].size) for j in range(0, axes["rp"].size, rp_rows)]
    blocks = blocks[: max(1, int(budget // per_block))]
    cases, first = 0, None
    start_cpu, start = time.process_time(), time.perf_counter()
    for k, j in blocks:
        dv, rp = axes["dv"][k : k + 1], axes["rp"][j : j + rp_rows]
        value = best_energy_change(*np.ix_(dv, rp, ra, nu), EARTH.mu)
        first = value if first is None else first
        cases += dv.size * rp.size * ra.size * nu.size
    wall, cpu = time.perf_counter() - start, time.process_time() - start_cpu
    return cases / wall, cases / cpu, first


# ---------------------------------------------------------------------- deltakit
def trade_grid(axes: dict[str, np.ndarray], chunks: dict[str, int]):
    """The grid best_burn_point sweeps: its fused kernel over (dv, rp, ra, nu)."""
    return dk.sweep(trades._energy_change_kernel, mu=EARTH.mu, chunks=chunks, name="energy_change", **axes)


def public_grid(axes: dict[str, np.ndarray], chunks: dict[str, int]):
    return dk.sweep(trades.prograde_energy_change, mu=EARTH.mu, chunks=chunks, name="energy_change", **axes)


def sweep_rate(make, axes, chunks, scheduler: str, cores: int = 1) -> tuple[float, float, object]:
    """Cases per wall second and per CPU second of a whole sweep, reduced over nu."""
    cases = int(np.prod([a.size for a in axes.values()]))
    with dask.config.set(scheduler=scheduler, num_workers=cores):
        start_cpu, start = time.process_time(), time.perf_counter()
        best = make(axes, chunks)["energy_change"].max("nu").compute()
        wall, cpu = time.perf_counter() - start, time.process_time() - start_cpu
    return cases / wall, cases / cpu, best


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--cases", type=float, default=1e9, help="grid size (default 1e9)")
    parser.add_argument("--quick", action="store_true", help="5e7 cases")
    parser.add_argument("--cores", type=int, default=os.cpu_count() or 1, help="dask threads")
    args = parser.parse_args()
    cases_wanted = 5e7 if args.quick else args.cases
    axes = axes_for(cases_wanted)
    cases = int(np.prod([a.size for a in axes.values()]))
    # Whole nu rows and whole ra rows per block, about the sweep's default block
    # size: the max over nu stays in-block, and the floor runs on the same blocks.
    rp_rows = max(1, min(axes["rp"].size, sweep_module._BLOCK_CASES // (N_NU * axes["ra"].size)))
    chunks = {"dv": 1, "rp": rp_rows, "ra": -1, "nu": -1}
    # The per-core comparison runs on the first delta-v values, up to 10^8 cases:
    # long enough to meet the machine's load, short enough to repeat.
    per_dv = cases // axes["dv"].size
    core_axes = {**axes, "dv": axes["dv"][: max(1, min(axes["dv"].size, int(1e8 // per_dv)))]}
    core_cases = int(np.prod([a.size for a in core_axes.values()]))

    # Warm-up: the imports of xarray and dask and the first graph are not per-case
    # costs; they are the first-use costs of bench_symbolic's kind, not this one's.
    for make in (trade_grid, public_grid):
        sweep_rate(make, axes_for(1e4), chunks, "sync")
        sweep_rate(make, axes_for(1e4), chunks, "threads", args.cores)

    # Per core: the floor and the sweeps on dask's synchronous scheduler, one thread
    # each, alternating rounds; each side's best round counts, so a round in which
    # the shared machine was busy favours neither. The sweep's per-core cost holds
    # everything it does: the graph, the scheduler, the kernel, the reduction.
    rates: dict[str, list[tuple[float, float]]] = {"floor": [], "trade": [], "public": []}
    for _ in range(3):
        floor_wall, floor_cpu, floor_value = floor_rate(core_axes, rp_rows, core_cases)
        rates["floor"].append((floor_wall, floor_cpu))
        trade_wall, trade_cpu, best = sweep_rate(trade_grid, core_axes, chunks, "sync")
        rates["trade"].append((trade_wall, trade_cpu))
        public_wall, public_cpu, public_best = sweep_rate(public_grid, core_axes, chunks, "sync")
        rates["public"].append((public_wall, public_cpu))
    # the same numbers (the same maths, rounded in another order); the public path equals the trade's
    np.testing.assert_allclose(best.values[:1, :rp_rows], floor_value, rtol=1e-14)  # the first block
    np.testing.assert_array_equal(public_best.values, best.values)

    def best_ratio(side: str, column: int) -> float:
        return max(r[column] for r in rates["floor"]) / max(r[column] for r in rates[side])

    def per_round(side: str, column: int) -> list[float]:
        return [f[column] / r[column] for f, r in zip(rates["floor"], rates[side])]

    # The whole grid on every core: wall time, how many cores it got, peak memory.
    threaded_wall, threaded_cpu, _ = sweep_rate(trade_grid, axes, chunks, "threads", args.cores)
    rss = peak_rss()
    blocks = int(
        np.prod([np.ceil(axes[k].size / (axes[k].size if c == -1 else c)) for k, c in chunks.items()])
    )
    shape = " x ".join(f"{k} {v.size}" for k, v in axes.items())
    print(f"cases                         {cases:.3e}  ({shape})")
    print(f"blocks                        {blocks} of <= {N_NU * axes['ra'].size * rp_rows:.2e} cases")
    print(f"per-core comparison on        {core_cases:.3e} cases, one thread each, 3 alternating rounds")
    print(f"  floor (plain NumPy)         {max(r[1] for r in rates['floor']):.3e} cases per CPU second")
    print(f"  trade sweep                 {max(r[1] for r in rates['trade']):.3e} cases per CPU second")
    trade_cpu_ratio = best_ratio("trade", 1)
    wall_ratio = best_ratio("trade", 0)
    print(
        f"  trade / floor, CPU          {spread(per_round('trade', 1))}; best of each {trade_cpu_ratio:.2f}x"
    )
    print(f"  trade / floor, wall         {spread(per_round('trade', 0))}; best of each {wall_ratio:.2f}x")
    print(f"  public / floor, CPU         {spread(per_round('public', 1))} (checks each block's slices)")
    print(
        f"whole grid on {args.cores} threads      {cases / threaded_wall:.1f} s wall, "
        f"{threaded_wall:.3e} cases/s (CPU it got: {threaded_wall / threaded_cpu:.2f} cores)"
    )
    print(f"peak RSS                      {rss / 1024**2:.0f} MiB")
    verdicts = Verdicts()
    verdicts.at_most("trade sweep per-core CPU per case / plain NumPy floor", trade_cpu_ratio, TARGET_RATIO)
    verdicts.at_most("peak RSS of the whole sweep", rss / 1024**2, MEMORY_LIMIT / 1024**2, unit=" MiB")
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main())
