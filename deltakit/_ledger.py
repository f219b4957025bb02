"""The mass ledger: a budget's lines flown one after the other, over many cases at once.

One function, :func:`run`, does the bookkeeping for a nominal budget (0-d
arrays) and for a Monte Carlo dispersion (arrays of samples) alike, so the two
can never disagree. Lines are a short sequence, looped in Python; every
quantity is a NumPy array over the cases, so each line costs a few whole-array
operations whatever the number of samples.

Rules
-----
* A burn of delta-v ``dv`` on a system of exhaust velocity ``ve`` from mass
  ``m`` burns ``-m expm1(-dv/ve)`` (the rocket equation in a form that keeps
  the digits of a tiny burn).
* A burn on a system whose stage drops "when spent" burns at most what that
  tank still holds; the stage is then dropped (its dry mass, residuals and the
  propellant of its other tanks leave) and the rest of the delta-v is flown
  by the next system of the line's chain (the stage above, at last the
  vehicle's main system).
* Otherwise a tank may be asked for more than it holds: the demand is booked
  (``used`` grows past ``usable``, ``left`` goes negative), the line where
  that first happens is recorded per system, and from that line on the
  vehicle's masses are reported as NaN by the caller: never a negative mass.
* A jettison removes mass, an added mass adds it; a drop line removes a stage
  with what its tanks still hold. The booked mass never falls below zero (it
  could only after a tank ran short, where the books carry the demand of the
  lines and no longer a real vehicle); a line that leaves nothing breaks the
  case like a dry tank.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

__all__ = ["Inputs", "Ledger", "Op", "Plan", "run"]

#: A tank counts as dry when asked for more than this fraction of the start mass beyond its load.
DRY_TOLERANCE = 1e-12


@dataclass(frozen=True)
class Op:
    """One line as the ledger sees it."""

    kind: str  # "burn", "jettison", "add_mass", "drop_stage"
    chain: tuple[int, ...] = ()  # burn: the systems that may fly it, the named one first
    stage: int = -1  # drop_stage: which stage


@dataclass(frozen=True)
class Plan:
    """The static shape of a budget: systems, stages and lines."""

    system_stage: tuple[int, ...]  # stage index of each system, -1 for the vehicle that stays
    stage_spent: tuple[bool, ...]  # stage dropped when its tanks are spent
    stage_systems: tuple[tuple[int, ...], ...]
    ops: tuple[Op, ...]


@dataclass
class Inputs:
    """The numbers of one run; each entry a float or an array over the cases."""

    m0: Any
    ve: list[Any]  # per system
    usable: list[Any]  # per system, inf when untracked
    residual: list[Any]  # per system, kg
    stage_dry: list[Any]  # per stage, kg
    dv: list[Any]  # per line (0 for events)
    line_ve: list[Any]  # per line: exhaust velocity of the named system for this line, or None
    mass: list[Any]  # per line: jettisoned or added mass (0 for burns)


@dataclass
class Ledger:
    """What the ledger found (raw: the caller puts NaN where the vehicle broke)."""

    before: list[np.ndarray] = field(default_factory=list)
    after: list[np.ndarray] = field(default_factory=list)
    burned: list[np.ndarray] = field(default_factory=list)
    used: list[np.ndarray] = field(default_factory=list)
    left: list[np.ndarray] = field(default_factory=list)
    dry_at: list[np.ndarray] = field(default_factory=list)
    broken_at: np.ndarray | None = None
    final: np.ndarray | None = None
    attached: list[Any] = field(default_factory=list)  # per stage: True, or where still attached


def _first(index: np.ndarray, now: Any, i: int) -> np.ndarray:
    """Record line ``i`` where ``now`` is true and nothing was recorded yet."""
    return np.where((index < 0) & now, i, index)


def run(plan: Plan, inputs: Inputs, *, keep_lines: bool = True, start: Ledger | None = None) -> Ledger:
    """Fly the lines of ``plan`` with the numbers of ``inputs``; see the module notes.

    With ``start`` (the ledger of the same plan without its last lines), the
    flight resumes where ``start`` ended: appending a line costs one line.
    """
    m = np.asarray(inputs.m0, dtype=float)
    shape = m.shape
    tolerance = DRY_TOLERANCE * m
    out = Ledger()
    if start is None:
        first = 0
        left = [np.broadcast_to(np.asarray(u, dtype=float), shape).copy() for u in inputs.usable]
        used = [np.zeros(shape) for _ in plan.system_stage]
        dry_at = [np.full(shape, -1) for _ in plan.system_stage]
        broken_at = np.full(shape, -1)
        alive: list[Any] = [True] * len(plan.stage_spent)
    else:
        first = len(start.before)
        m = start.final
        left, used, dry_at, alive = (
            list(start.left),
            list(start.used),
            list(start.dry_at),
            list(start.attached),
        )
        broken_at = start.broken_at
        out.before, out.after, out.burned = list(start.before), list(start.after), list(start.burned)

    def drop(stage: int, mask: Any) -> None:
        nonlocal m
        leaving = inputs.stage_dry[stage]
        for j in plan.stage_systems[stage]:
            leaving = leaving + inputs.residual[j] + np.maximum(left[j], 0.0)
        attached = np.asarray(mask, dtype=bool) if alive[stage] is True else (mask & alive[stage])
        # never below zero: after a tank ran short the books can hold less than the stage takes
        m = np.where(attached, np.maximum(m - leaving, 0.0), m)
        alive[stage] = np.logical_not(attached) if alive[stage] is True else (alive[stage] & ~attached)

    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for i in range(first, len(plan.ops)):
            op = plan.ops[i]
            before = m
            burned: Any = 0.0
            broke: Any = False
            if op.kind == "burn":
                remaining = np.asarray(inputs.dv[i], dtype=float)
                last = len(op.chain) - 1
                for position, j in enumerate(op.chain):
                    ve = (
                        inputs.line_ve[i] if position == 0 and inputs.line_ve[i] is not None else inputs.ve[j]
                    )
                    stage = plan.system_stage[j]
                    attached = True if stage < 0 else alive[stage]
                    need = -m * np.expm1(-remaining / ve)
                    if stage >= 0 and plan.stage_spent[stage] and position < last:
                        available = np.maximum(left[j], 0.0)
                        over = (need > available) & attached
                        take = np.where(over, available, need)
                        flown = -ve * np.log1p(-available / m)
                        remaining_after = np.where(over, np.maximum(remaining - flown, 0.0), 0.0)
                    else:
                        over = None
                        take = need
                        remaining_after = 0.0
                    if attached is not True:
                        take = np.where(attached, take, 0.0)
                        remaining_after = np.where(attached, remaining_after, remaining)
                    m = m - take
                    left[j] = left[j] - take
                    used[j] = used[j] + take
                    if keep_lines:
                        burned = burned + take
                    remaining = np.asarray(remaining_after, dtype=float)
                    dry = left[j] < -tolerance
                    if dry.any():  # rare: spare the bookkeeping of the lines that do not run dry
                        dry_at[j] = _first(dry_at[j], dry, i)
                        broke = broke | dry
                    if over is not None and np.any(over):
                        drop(stage, over)
                unflown = remaining > 0.0  # no system left to fly the rest
                if unflown.any():
                    broke = broke | unflown
            elif op.kind == "jettison":
                m = np.maximum(m - inputs.mass[i], 0.0)
                broke = m <= tolerance
            elif op.kind == "add_mass":
                m = m + inputs.mass[i]
            elif op.kind == "drop_stage":
                drop(op.stage, True)
                broke = m <= tolerance  # nothing left to fly on
            else:  # pragma: no cover - the budget builds only the kinds above
                raise AssertionError(op.kind)
            if broke is not False:
                broken_at = _first(broken_at, broke, i)
            if keep_lines:
                out.before.append(before)
                out.after.append(m)
                out.burned.append(np.broadcast_to(np.asarray(burned, dtype=float), shape))
    out.used, out.left, out.dry_at = used, left, dry_at
    out.broken_at = broken_at
    out.final = m
    out.attached = alive
    return out
