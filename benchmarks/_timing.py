"""Timing helper shared by the benchmark scripts (run as ``python benchmarks/bench_*.py``)."""

from __future__ import annotations

import statistics
import time
from collections.abc import Callable
from typing import Any


def median_time(function: Callable[..., Any], *args: Any, repeats: int = 7) -> float:
    """Median wall-clock seconds of ``function(*args)`` over ``repeats`` calls."""
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function(*args)
        times.append(time.perf_counter() - start)
    return statistics.median(times)
