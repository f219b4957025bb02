"""Timing and verdicts shared by the benchmark scripts (run as ``python benchmarks/bench_*.py``).

Every benchmark measures deltakit and its baseline side by side in one run,
prints what it measured, and ends with one verdict line per target, written
by :class:`Verdicts`::

    verdicts = Verdicts()
    verdicts.at_most("sweep CPU per case / NumPy floor", 1.12, 1.3)
    verdicts.at_least("loop time / deltakit time", 31.0, 100.0, floor=25.0)
    sys.exit(verdicts.finish())

prints::

    VERDICT  met      sweep CPU per case / NumPy floor: 1.12x (target <= 1.3x)
    VERDICT  beyond   loop time / deltakit time: 31x (target >= 100x; the measured
                      floor allows 25x: reported, not failed)        [one line when printed]
    2 targets: 1 met, 0 missed, 1 beyond a measured floor

and the script exits non-zero only when a target it can meet was missed. A
*floor* is the best any implementation measured in the same run reaches (the
least work NumPy can do for the same answer): a target that even the floor
does not meet is beyond this machine and is reported, not failed.
"""

from __future__ import annotations

import resource
import statistics
import time
from collections.abc import Callable, Sequence
from typing import Any

__all__ = ["Verdicts", "median_time", "peak_rss", "spread"]


def peak_rss() -> int:
    """This process's peak resident size in bytes (``VmHWM`` on Linux).

    ``ru_maxrss`` is not used where ``/proc`` is there: Linux carries the
    parent's peak across the fork and exec that start an interpreter, so a
    script started from a large process would report the parent's memory.
    """
    try:
        with open("/proc/self/status") as status:
            return next(int(line.split()[1]) for line in status if line.startswith("VmHWM")) * 1024
    except (OSError, StopIteration):
        return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024  # KiB on Linux, bytes on macOS


def median_time(function: Callable[..., Any], *args: Any, repeats: int = 7) -> float:
    """Median wall-clock seconds of ``function(*args)`` over ``repeats`` calls."""
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function(*args)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def spread(values: Sequence[float], unit: str = "x") -> str:
    """``median (min-max)`` of repeated measurements, for the printed ranges."""
    low, mid, high = min(values), statistics.median(values), max(values)
    return f"{_number(mid)}{unit} (range {_number(low)}-{_number(high)}{unit} over {len(values)} runs)"


def _number(value: float) -> str:
    return f"{value:.3g}" if abs(value) < 1000 else f"{value:,.0f}"


class Verdicts:
    """One verdict per target; :meth:`finish` prints the summary and gives the exit code."""

    def __init__(self) -> None:
        self.outcomes: list[str] = []

    def _verdict(self, name: str, value: float, target: float, sense: str, floor: float | None, unit: str):
        met = value <= target if sense == "<=" else value >= target
        reachable = floor is None or (floor <= target if sense == "<=" else floor >= target)
        shown = f"{name}: {_number(value)}{unit} (target {sense} {_number(target)}{unit}"
        if met:
            outcome, line = "met", shown + ")"
        elif reachable:
            outcome, line = "missed", shown + ")"
        else:
            outcome = "beyond"
            line = f"{shown}; the measured floor allows {_number(floor)}{unit}: reported, not failed)"
        self.outcomes.append(outcome)
        print(f"VERDICT  {outcome.upper() if outcome == 'missed' else outcome:8s} {line}", flush=True)
        return met

    def at_most(
        self, name: str, value: float, target: float, *, floor: float | None = None, unit: str = "x"
    ) -> bool:
        """Target ``value <= target`` (a ratio of times, a time, a memory peak); True when met.

        ``floor``: the smallest value any implementation reached in this run.
        """
        return self._verdict(name, value, target, "<=", floor, unit)

    def at_least(
        self, name: str, value: float, target: float, *, floor: float | None = None, unit: str = "x"
    ) -> bool:
        """Target ``value >= target`` (a speed-up); True when met.

        ``floor``: the largest value any implementation reached in this run.
        """
        return self._verdict(name, value, target, ">=", floor, unit)

    def finish(self) -> int:
        """Print the summary line; 1 if a reachable target was missed, else 0."""
        counts = {kind: self.outcomes.count(kind) for kind in ("met", "missed", "beyond")}
        print(
            f"{len(self.outcomes)} targets: {counts['met']} met, {counts['missed']} missed, "
            f"{counts['beyond']} beyond a measured floor",
            flush=True,
        )
        return 1 if counts["missed"] else 0
