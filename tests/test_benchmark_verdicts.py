"""The benchmarks' verdicts: a reachable target missed fails; one beyond a measured floor is reported."""

from __future__ import annotations

import importlib.util
from pathlib import Path

_spec = importlib.util.spec_from_file_location(
    "benchmark_timing", Path(__file__).resolve().parent.parent / "benchmarks" / "_timing.py"
)
timing = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(timing)


def test_met_targets_exit_zero(capsys):
    verdicts = timing.Verdicts()
    assert verdicts.at_most("sweep / floor", 1.1, 1.3)
    assert verdicts.at_least("speed-up", 150.0, 100.0)
    assert verdicts.finish() == 0
    out = capsys.readouterr().out
    assert out.count("VERDICT  met") == 2 and "2 targets: 2 met, 0 missed, 0 beyond" in out


def test_a_reachable_target_missed_exits_non_zero(capsys):
    verdicts = timing.Verdicts()
    verdicts.at_most("sweep / floor", 1.1, 1.3)
    assert not verdicts.at_most("first formula", 2.0, 1.5, floor=0.8, unit=" s")
    assert verdicts.finish() == 1
    assert "VERDICT  MISSED   first formula: 2 s (target <= 1.5 s)" in capsys.readouterr().out


def test_a_target_beyond_the_floor_is_reported_not_failed(capsys):
    verdicts = timing.Verdicts()
    assert not verdicts.at_least("loop / deltakit", 31.0, 100.0, floor=25.0)
    assert not verdicts.at_most("step", 40.0, 16.0, unit=" ms", floor=30.0)
    assert verdicts.finish() == 0
    out = capsys.readouterr().out
    assert "VERDICT  beyond   loop / deltakit: 31x (target >= 100x; the measured floor allows 25x" in out
    assert "2 targets: 0 met, 0 missed, 2 beyond a measured floor" in out


def test_spread_shows_median_and_range():
    assert timing.spread([1.2, 1.0, 1.5]) == "1.2x (range 1-1.5x over 3 runs)"
