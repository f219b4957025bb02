"""Delta-v budgets: a vehicle, its propulsion systems and stages, and the lines it flies.

A budget is an ordered list of lines. Most are burns (a delta-v flown by one
of the vehicle's propulsion systems); the others are mass events: a jettison
(a spent tank, a released probe), an added mass (docking, a sample picked up)
or the drop of a stage. The budget flies them one after the other and says
what each costs, what every tank has left, where a tank runs dry and by how
much it falls short.

Conventions
-----------
* SI units: masses in kg, delta-v and exhaust velocity in m/s. Tables show the
  unit in each column header.
* A line's delta-v is a magnitude (>= 0). Its ``margin`` is a **fraction**
  added to that line's delta-v: 0.05 books 5 % more than the manoeuvre needs;
  a value above 1 is refused (``margin=5`` would be 500 %). A line with a
  ``category`` and no margin of its own takes the margin of the budget's
  :class:`~deltakit.MarginPolicy` for that category.
* Each burn names its system (default: the main one). A burn of ``dv`` from
  mass ``m`` burns ``-m expm1(-dv/ve)`` of that system's propellant (the
  rocket equation in a form that keeps the digits of a tiny line).
* The vehicle: ``Budget(m0, ve)`` is a vehicle of start mass ``m0`` whose main
  system has exhaust velocity ``ve``; with ``dry_mass`` its main tank holds
  what the start mass leaves after the dry mass (and after the other tanks and
  stages). Declare more systems with :meth:`Budget.system` and stages with
  :meth:`Budget.stage`. Give ``dry_mass`` and every load instead of ``m0``,
  and the start mass is their sum.
* Tanks that run dry: a line that asks a tank for more than it holds is where
  that tank runs dry (:attr:`Budget.first_infeasible`, and per system in
  :attr:`Budget.usage`); the masses of that line and every later line are NaN
  (never a negative mass), and the shortfall says how many kg are missing.
* Every edit is checked before it is applied: a bad edit raises
  :class:`~deltakit.DomainError` naming the parameter and leaves the budget
  as it was.

Files
-----
:meth:`Budget.save` writes versioned JSON of our own layout (``"format":
"deltakit.budget"``, ``"version": 2``) through deltakit's one atomic writer:
a reader never sees a half-written file, a symbolic link is kept, and a file
that is not a deltakit budget is never overwritten. :meth:`Budget.load` reads
version 1 files (written before vehicles had systems and stages) too, and
refuses corrupt, truncated, foreign or newer files with a
:class:`~deltakit.DomainError` naming the file, never writing to it.

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> from deltakit import Budget
>>> b = Budget(1200.0, 3100.0, name="Demo tug").add("departure", 900.0, margin=0.05)
>>> b = b.add("trim", 40.0, ve=2200.0)
>>> round(float(b.total_dv), 1), round(float(b.propellant), 1)
(985.0, 331.2)

A vehicle with two systems, a probe to release and a tank that runs short:

>>> v = Budget(name="Skiff", dry_mass=800.0)
>>> v = v.system("main", 3150.0, 900.0).system("thrusters", 2200.0, 30.0)
>>> v = v.add("transfer", 1500.0).jettison("release probe", 120.0)
>>> v = v.add("attitude upkeep", 80.0, system="thrusters")
>>> round(float(v.m0)), v.closes, v.usage["thrusters"].runs_dry_at
(1730, False, 2)
>>> round(float(v.usage["thrusters"].shortfall), 1)
4.1
"""

from __future__ import annotations

import copy
import math
import os
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field, replace
from pathlib import Path
from types import MappingProxyType
from typing import Any

import numpy as np

from . import _budget_files, _budget_tables, _ledger
from ._checks import scalar_or_array
from ._results import Result, quantity
from ._scalars import real, text
from .errors import DomainError
from .margins import MarginPolicy, fraction
from .vehicle import PropulsionSystem, Stage

__all__ = ["Budget", "BudgetLine", "FORMAT", "SystemUsage", "VERSION"]

#: Format tag of a saved budget file.
FORMAT = _budget_files.FORMAT
#: Newest file layout this version writes and reads.
VERSION = _budget_files.VERSION

#: Line kinds: a burn, and the three mass events.
KINDS = ("burn", "jettison", "add_mass", "drop_stage")
_MAIN = "main"


@dataclass(frozen=True)
class BudgetLine:
    """One line of a budget: a burn or a mass event.

    Attributes
    ----------
    label : str
        What the line is, in the analyst's words.
    dv : float
        Delta-v the burn needs, m/s, before margin (0 for a mass event).
    ve : float or None
        Exhaust velocity of this line only, m/s; None uses its system's.
    margin : float
        Fraction added to ``dv`` (0.05 = +5 %).
    source : dict
        Where ``dv`` came from: ``{"kind": "number"}`` for a value typed in,
        or ``{"kind": "transfer", "type": ..., "burns": [...], "total": ...,
        "duration": ...}`` (SI) for a transfer, so a panel can show or rebuild it.
    system : str or None
        The propulsion system that flies the burn; None for the main one.
    category : str or None
        Margin category of the line (a key of the margin policy's ``dv`` table).
    kind : str
        ``"burn"``, ``"jettison"``, ``"add_mass"`` or ``"drop_stage"``.
    mass : float
        Jettisoned or added mass, kg (0 for a burn or a stage drop).
    stage : str or None
        The stage a ``"drop_stage"`` line drops.
    margin_from_policy : bool
        True when ``margin`` is the policy's margin for ``category``.
    """

    label: str
    dv: float
    ve: float | None = None
    margin: float = 0.0
    source: dict = field(default_factory=lambda: {"kind": "number"})
    system: str | None = None
    category: str | None = None
    kind: str = "burn"
    mass: float = 0.0
    stage: str | None = None
    margin_from_policy: bool = False

    @property
    def dv_with_margin(self) -> float:
        """``dv (1 + margin)``, m/s."""
        return self.dv * (1.0 + self.margin)

    @property
    def margin_dv(self) -> float:
        """The margin in m/s: ``dv margin``."""
        return self.dv * self.margin

    def to_dict(self) -> dict[str, Any]:
        """The line as JSON-ready data in SI units."""
        return _budget_files.line_to_dict(self)


@dataclass(frozen=True, repr=False, eq=False)
class SystemUsage(Result):
    """What one propulsion system's tank did over the budget.

    ``used`` is what the lines asked of the tank; when that is more than it
    holds, ``left`` is 0, ``shortfall`` the kg missing and ``runs_dry_at``
    the index of the first line that asked too much. ``left`` of a dropped
    stage's system is what left with the stage. Loads the budget does not
    track (a main tank without a dry mass) give NaN for ``load``, ``usable``
    and ``left``.
    """

    name: str = quantity("")
    ve: float = quantity("m/s")
    load: float = quantity("kg")
    usable: float = quantity("kg")
    used: float = quantity("kg")
    left: float = quantity("kg")
    shortfall: float = quantity("kg")
    runs_dry_at: int | None = quantity("")
    dropped: bool = quantity("")


@dataclass
class _Context:
    """What a line is checked against: the systems and stages, and what earlier lines did."""

    system_index: dict[str, int]
    system_stage: tuple[int, ...]
    stage_index: dict[str, int]
    stage_names: tuple[str, ...]
    stage_systems: tuple[tuple[int, ...], ...]
    spent: tuple[bool, ...]
    fallback: int | None
    dropped: set[int]
    aboard: float | None

    @classmethod
    def of(
        cls, budget: Budget, systems: list[PropulsionSystem], stages: list[Stage], dry: float | None
    ) -> _Context:
        stage_index = {s.name: k for k, s in enumerate(stages)}
        system_index = {s.name: j for j, s in enumerate(systems)}
        system_stage = tuple(-1 if s.stage is None else stage_index[s.stage] for s in systems)
        core = [j for j, k in enumerate(system_stage) if k < 0]
        main = None if budget._main is None else system_index[budget._main]
        return cls(
            system_index=system_index,
            system_stage=system_stage,
            stage_index=stage_index,
            stage_names=tuple(stage_index),
            stage_systems=tuple(
                tuple(j for j, k in enumerate(system_stage) if k == n) for n in range(len(stages))
            ),
            spent=tuple(s.drop == "spent" for s in stages),
            fallback=main if main is not None and system_stage[main] < 0 else (core[0] if core else None),
            dropped=set(),
            aboard=dry,
        )


@dataclass
class Resolved:
    """A checked budget, flown at its nominal numbers (cached by the budget until the next edit)."""

    m0: float
    dry_nominal: float | None
    dry_with_growth: float | None
    stage_dry: list[float]
    implicit_load: float | None
    plan: _ledger.Plan
    inputs: _ledger.Inputs
    ledger: _ledger.Ledger
    context: _Context

    def per_line(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Mass before, mass after and propellant of each line; NaN from where a tank ran dry."""
        n = len(self.plan.ops)
        if n == 0:
            return np.zeros(0), np.zeros(0), np.zeros(0)
        before = np.array([float(x) for x in self.ledger.before])
        after = np.array([float(x) for x in self.ledger.after])
        burned = np.array([float(x) for x in self.ledger.burned])
        broken = int(self.ledger.broken_at)
        if broken >= 0:
            index = np.arange(n)
            after[index >= broken] = np.nan
            burned[index >= broken] = np.nan
            before[index > broken] = np.nan
        return before, after, burned

    def attached(self, j: int) -> bool:
        """Whether system ``j`` is still aboard after the last line."""
        stage = self.plan.system_stage[j]
        return stage < 0 or bool(np.all(self.ledger.attached[stage]))

    def propellant_left(self) -> float:
        if int(self.ledger.broken_at) >= 0:
            return math.nan
        total = sum(float(left) for j, left in enumerate(self.ledger.left) if self.attached(j))
        return total if math.isfinite(total) else math.nan

    def usage(self, systems: list[PropulsionSystem]) -> dict[str, SystemUsage]:
        out = {}
        for j, s in enumerate(systems):
            tracked = math.isfinite(self.inputs.usable[j])
            signed = float(self.ledger.left[j])
            dry_at = int(self.ledger.dry_at[j])
            load = s.propellant if s.propellant is not None else self.implicit_load
            out[s.name] = SystemUsage(
                name=s.name,
                ve=s.ve,
                load=math.nan if load is None else float(load),
                usable=float(self.inputs.usable[j]) if tracked else math.nan,
                used=float(self.ledger.used[j]),
                left=max(signed, 0.0) if tracked else math.nan,
                shortfall=-signed if dry_at >= 0 else 0.0,
                runs_dry_at=None if dry_at < 0 else dry_at,
                dropped=not self.attached(j),
            )
        return out


def _dv_value(value: Any) -> tuple[float, dict[str, Any]]:
    """A line's delta-v and its source, from a number or a transfer."""
    if hasattr(value, "total") and hasattr(value, "burns"):
        dv = real(value.total, "dv_or_transfer", "m/s", low=0.0)
        burns = [real(b, "dv_or_transfer.burns", "m/s") for b in value.burns]
        duration = getattr(value, "duration", None)
        return dv, {
            "kind": "transfer",
            "type": type(value).__name__,
            "burns": burns,
            "total": dv,
            "duration": None if duration is None else real(duration, "dv_or_transfer.duration", "s"),
        }
    return real(value, "dv_or_transfer", "m/s", low=0.0), {"kind": "number"}


def _mass_event(kind: str, label: Any, mass: Any) -> BudgetLine:
    """A jettison or an added mass: a line with a mass and no delta-v."""
    return BudgetLine(text(label, "label"), 0.0, kind=kind, mass=real(mass, "mass", "kg", low=0.0))


def _optional_name(value: Any, name: str) -> str | None:
    return None if value is None else text(value, name, empty=False)


class Budget:
    """An ordered delta-v budget for one vehicle.

    Parameters
    ----------
    m0 : float, optional
        Vehicle mass at the start of the first line, kg (> 0). Leave it out
        when the dry mass and every propellant load are given: it is their sum.
    ve : float, optional
        Exhaust velocity of the main system (named ``"main"``), m/s (> 0).
        Leave it out to declare the systems with :meth:`system`.
    name : str, optional
        Title shown in tables and saved with the file.
    dry_mass : float, optional
        Mass of the vehicle that stays, without usable propellant, kg (> 0).
        With ``m0`` and ``ve``, the main tank holds the rest; a line that
        would burn below it makes the budget not close.
    dry_maturity : str, optional
        Design maturity of the dry mass: the policy's mass growth allowance
        for it is added to ``dry_mass``.
    policy : MarginPolicy, optional
        The margin rules for lines with a ``category`` and for maturities.

    Examples
    --------
    >>> from deltakit import Budget
    >>> b = Budget(1000.0, 3000.0).add("raise", 1000.0).add("circularise", 500.0, margin=0.1)
    >>> [round(float(m), 1) for m in b.mass_after]
    [716.5, 596.5]
    >>> round(float(b.final_mass), 1), round(float(b.propellant), 1)
    (596.5, 403.5)

    Margins from a policy, by line category:

    >>> from deltakit.margins import STUDY_POLICY
    >>> p = Budget(1000.0, 3000.0, policy=STUDY_POLICY).add("capture", 800.0, category="deterministic")
    >>> p.lines[0].margin, round(float(p.total_dv), 1)
    (0.05, 840.0)
    """

    def __init__(
        self,
        m0: float | None = None,
        ve: float | None = None,
        name: str = "",
        *,
        dry_mass: float | None = None,
        dry_maturity: str | None = None,
        policy: MarginPolicy | None = None,
    ) -> None:
        self._lines: list[BudgetLine] = []
        self._systems: dict[str, PropulsionSystem] = {}
        self._stages: dict[str, Stage] = {}
        self._main: str | None = None
        self._main_chosen = False  # named by the user (main=True, main_system), not by the default rule
        self._m0: float | None = None
        self._dry_mass: float | None = None
        self._dry_maturity: str | None = None
        self._policy: MarginPolicy | None = None
        self._name = text(name, "name")
        self._cache: Resolved | None = None
        m0 = None if m0 is None else real(m0, "m0", "kg", low=0.0, strict=True)
        if ve is not None:
            self._systems[_MAIN] = PropulsionSystem(_MAIN, ve)
            self._main = _MAIN
        if m0 is None and dry_mass is None:
            raise DomainError(
                "give `m0` (the start mass, kg) or `dry_mass` (with a propellant load per system)"
            )
        self._m0 = m0
        if dry_mass is not None:
            dry = real(dry_mass, "dry_mass", "kg", low=0.0, strict=True)
            if m0 is not None and ve is not None and dry >= m0:
                raise DomainError(f"`dry_mass` must be < m0 ({m0!r} kg), got {dry!r} kg")
            self._dry_mass = dry
        self._dry_maturity = _optional_name(dry_maturity, "dry_maturity")
        if policy is not None and not isinstance(policy, MarginPolicy):
            raise TypeError(f"`policy` must be a deltakit.MarginPolicy, not {type(policy).__name__}")
        self._policy = policy
        self._resolve()

    # ------------------------------------------------------------------ edits, all or nothing
    _STATE = (
        "_lines",
        "_systems",
        "_stages",
        "_main",
        "_main_chosen",
        "_m0",
        "_dry_mass",
        "_dry_maturity",
        "_policy",
        "_name",
    )

    def _edit(self, change: Any, culprit: str) -> Budget:
        """Apply ``change(self)``, check the whole budget, and undo everything on an error."""
        saved = {key: copy.copy(getattr(self, key)) for key in self._STATE}
        try:
            change(self)
            self._cache = None
            self._resolve(culprit)
        except BaseException:
            for key, value in saved.items():
                setattr(self, key, value)
            self._cache = None
            raise
        return self

    # ------------------------------------------------------------------ settings
    @property
    def m0(self) -> float:
        """Mass at the start, kg (given, or the sum of the dry mass, stages and loads)."""
        return self._resolve().m0

    @m0.setter
    def m0(self, value: float | None) -> None:
        m0 = None if value is None else real(value, "m0", "kg", low=0.0, strict=True)
        dry = self._dry_mass
        if m0 is not None and dry is not None and self._implicit() is not None and dry >= m0:
            raise DomainError(f"`m0` must be > dry_mass ({dry!r} kg), got {m0!r} kg")
        self._edit(lambda b: setattr(b, "_m0", m0), "m0")

    @property
    def ve(self) -> float | None:
        """Exhaust velocity of the main system, m/s (None before a system is declared)."""
        return None if self._main is None else self._systems[self._main].ve

    @ve.setter
    def ve(self, value: float) -> None:
        if self._main is None:
            self.system(_MAIN, value, None)
            return
        system = replace(self._systems[self._main], ve=value)
        self._edit(lambda b: b._systems.__setitem__(b._main, system), "ve")

    @property
    def name(self) -> str:
        """Title of the budget."""
        return self._name

    @name.setter
    def name(self, value: str) -> None:
        self._name = text(value, "name")

    @property
    def dry_mass(self) -> float | None:
        """Mass of the vehicle that stays, without usable propellant, kg (before growth).

        Given, or what the start mass leaves after every load and stage;
        None when neither is known (an untracked main tank).
        """
        return self._resolve().dry_nominal

    @dry_mass.setter
    def dry_mass(self, value: float | None) -> None:
        if value is not None:
            value = real(value, "dry_mass", "kg", low=0.0, strict=True)
            if self._m0 is not None and self._implicit() is not None and value >= self._m0:
                raise DomainError(f"`dry_mass` must be < m0 ({self._m0!r} kg), got {value!r} kg")
        self._edit(lambda b: setattr(b, "_dry_mass", value), "dry_mass")

    @property
    def dry_maturity(self) -> str | None:
        """Design maturity of the dry mass (for the policy's mass growth allowance)."""
        return self._dry_maturity

    @dry_maturity.setter
    def dry_maturity(self, value: str | None) -> None:
        value = _optional_name(value, "dry_maturity")
        self._edit(lambda b: setattr(b, "_dry_maturity", value), "dry_maturity")

    @property
    def policy(self) -> MarginPolicy | None:
        """The margin policy; setting it re-books every line whose margin comes from it."""
        return self._policy

    @policy.setter
    def policy(self, value: MarginPolicy | None) -> None:
        if value is not None and not isinstance(value, MarginPolicy):
            raise TypeError(f"`policy` must be a deltakit.MarginPolicy, not {type(value).__name__}")

        def change(b: Budget) -> None:
            b._policy = value
            lines = []
            for number, line in enumerate(b._lines, start=1):
                if line.margin_from_policy:
                    if value is None:
                        raise DomainError(
                            f"`policy` cannot be removed: line {number} ({line.label!r}) takes its margin "
                            f"from the policy's category {line.category!r}; give it a margin of its own first"
                        )
                    if line.category not in value.dv:
                        raise DomainError(
                            f"`policy` {value.name!r} has no delta-v margin for category {line.category!r}, "
                            f"which line {number} ({line.label!r}) uses"
                        )
                    line = replace(line, margin=value.dv[line.category])
                lines.append(line)
            b._lines = lines

        self._edit(change, "policy")

    @property
    def main_system(self) -> str | None:
        """Name of the system that flies lines naming none."""
        return self._main

    @main_system.setter
    def main_system(self, value: str) -> None:
        name = text(value, "main_system", empty=False)
        if name not in self._systems:
            raise DomainError(
                f"`main_system` {name!r} is not a system of this budget ({self._known_systems()})"
            )

        def change(b: Budget) -> None:
            b._main, b._main_chosen = name, True

        self._edit(change, "main_system")

    @property
    def systems(self) -> Mapping[str, PropulsionSystem]:
        """The propulsion systems by name, in the order declared (read-only)."""
        return MappingProxyType(dict(self._systems))

    @property
    def stages(self) -> Mapping[str, Stage]:
        """The stages by name, bottom first (read-only)."""
        return MappingProxyType(dict(self._stages))

    # ------------------------------------------------------------------ the vehicle
    def system(
        self,
        name: str,
        ve: float,
        propellant: float | None,
        residual: float = 0.0,
        *,
        stage: str | None = None,
        main: bool = False,
    ) -> Budget:
        """Declare (or redefine) a propulsion system; returns the budget.

        Parameters
        ----------
        name : str
            How lines name it.
        ve : float
            Effective exhaust velocity, m/s (> 0).
        propellant : float or None
            Propellant loaded, kg (>= 0). None: the tank holds what the start
            mass leaves (at most one system may say so).
        residual : float, optional
            Fraction of the load that cannot be burnt (0 to 1).
        stage : str, optional
            The stage it sits on (declare the stage first).
        main : bool, optional
            Make it the main system, which flies the lines that name none.
            Otherwise the main system is the first one declared on the
            vehicle that stays (not on a stage), or the first one of all
            while none is.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(name="Tug", dry_mass=500.0).system("main", 3100.0, 700.0, residual=0.02)
        >>> round(float(b.m0)), b.main_system
        (1200, 'main')
        """
        new = PropulsionSystem(name, ve, propellant, residual, stage)

        def change(b: Budget) -> None:
            b._systems = dict(b._systems)
            b._systems[new.name] = new
            on_a_stage = b._main is not None and b._systems[b._main].stage is not None
            if main or b._main is None or (not b._main_chosen and on_a_stage and new.stage is None):
                b._main = new.name
            b._main_chosen = b._main_chosen or main

        return self._edit(change, "propellant" if propellant is not None else "ve")

    def remove_system(self, name: str) -> Budget:
        """Remove a system no line names; returns the budget."""
        if name not in self._systems:
            raise DomainError(f"`name` {name!r} is not a system of this budget ({self._known_systems()})")

        def change(b: Budget) -> None:
            b._systems = {k: v for k, v in b._systems.items() if k != name}
            if b._main == name:
                b._main = next(iter(b._systems), None)

        return self._edit(change, "name")

    def stage(self, name: str, dry_mass: float, *, drop: str = "line", maturity: str | None = None) -> Budget:
        """Declare (or redefine) a stage, bottom stage first; returns the budget.

        Parameters
        ----------
        name : str
            How systems and drop lines name it.
        dry_mass : float
            Its mass without propellant, kg.
        drop : {"line", "spent"}
            Dropped at a :meth:`drop_stage` line, or as soon as its tanks are
            spent (the rest of that burn is flown by the stage above).
        maturity : str, optional
            Design maturity, for the policy's mass growth allowance.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(name="Stack", dry_mass=300.0).stage("kick", 120.0, drop="spent")
        >>> b = b.system("kick motor", 2900.0, 600.0, stage="kick").system("probe", 3000.0, 200.0)
        >>> b = b.add("departure", 2500.0, system="kick motor")
        >>> b.usage["kick motor"].dropped, round(float(b.usage["probe"].used), 1)
        (True, 82.0)
        """
        new = Stage(name, dry_mass, drop, maturity)

        def change(b: Budget) -> None:
            b._stages = dict(b._stages)
            b._stages[new.name] = new

        return self._edit(change, "dry_mass")

    def remove_stage(self, name: str) -> Budget:
        """Remove a stage that no system sits on and no line drops; returns the budget."""
        if name not in self._stages:
            raise DomainError(f"`name` {name!r} is not a stage of this budget")
        return self._edit(
            lambda b: setattr(b, "_stages", {k: v for k, v in b._stages.items() if k != name}), "name"
        )

    # ------------------------------------------------------------------ lines
    def _burn_line(
        self,
        label: Any,
        dv_or_transfer: Any,
        ve: Any,
        margin: Any,
        system: Any,
        category: Any,
        source: dict | None = None,
    ) -> BudgetLine:
        label = text(label, "label")
        dv, found = _dv_value(dv_or_transfer)
        ve = None if ve is None else real(ve, "ve", "m/s", low=0.0, strict=True)
        system = _optional_name(system, "system")
        category = _optional_name(category, "category")
        from_policy = margin is None and category is not None
        if from_policy:
            if self._policy is None:
                raise DomainError(
                    f"`category` {category!r} takes its margin from the budget's policy, but the budget has "
                    "none: set `budget.policy` or give `margin`"
                )
            margin = self._policy.dv_margin(category)
        margin = 0.0 if margin is None else fraction(margin, "margin")
        return BudgetLine(
            label, dv, ve, margin, source or found, system, category, "burn", 0.0, None, from_policy
        )

    def add(
        self,
        label: str,
        dv_or_transfer: Any,
        ve: float | None = None,
        margin: float | None = None,
        *,
        system: str | None = None,
        category: str | None = None,
    ) -> Budget:
        """Append a burn and return the budget (for chaining).

        Parameters
        ----------
        label : str
            Name of the manoeuvre.
        dv_or_transfer : float or Transfer
            Delta-v in m/s (>= 0), or any object with ``.total`` and ``.burns``
            (a :class:`~deltakit.Transfer`), which counts with its total.
        ve : float, optional
            Exhaust velocity of this line only, m/s; default its system's.
        margin : float, optional
            Fraction added to this line's delta-v, 0 to 1 (0.05 = +5 %).
            Default: the policy's margin for ``category``, else 0.
        system : str, optional
            The propulsion system that flies it; default the main one.
        category : str, optional
            Margin category (a key of the policy's ``dv`` table).

        Examples
        --------
        >>> from deltakit import Budget
        >>> len(Budget(500.0, 2500.0).add("a", 10.0).add("b", 20.0).lines)
        2
        >>> Budget(500.0, 2500.0).add("a", 10.0, margin=5)  # doctest: +ELLIPSIS
        Traceback (most recent call last):
        ...
        deltakit.errors.DomainError: `margin` must be a fraction ... got 5.0; did you mean 0.05?
        """
        line = self._burn_line(label, dv_or_transfer, ve, margin, system, category)
        return self._append(line, "system")

    def insert(
        self,
        index: int,
        label: str,
        dv_or_transfer: Any,
        ve: float | None = None,
        margin: float | None = None,
        *,
        system: str | None = None,
        category: str | None = None,
    ) -> Budget:
        """Insert a burn before line ``index`` (as :meth:`add`); returns the budget."""
        line = self._burn_line(label, dv_or_transfer, ve, margin, system, category)
        position = self._position(index, "index", allow_end=True)
        return self._edit(lambda b: b._lines.insert(position, line), "system")

    def replace(
        self,
        index: int,
        label: str,
        dv_or_transfer: Any,
        ve: float | None = None,
        margin: float | None = None,
        *,
        system: str | None = None,
        category: str | None = None,
    ) -> Budget:
        """Replace line ``index`` by a burn (arguments as :meth:`add`); returns the budget."""
        position = self._position(index, "index")
        line = self._burn_line(label, dv_or_transfer, ve, margin, system, category)
        return self._edit(lambda b: b._lines.__setitem__(position, line), "system")

    def jettison(self, label: str, mass: float) -> Budget:
        """Append a jettison: ``mass`` kg leave the vehicle, no delta-v; returns the budget.

        The mass comes off the dry mass of the vehicle that stays (a spent
        tank, a released probe); drop a whole stage with :meth:`drop_stage`.
        Mass events are appended; put one elsewhere with :meth:`move`.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(1000.0, 3000.0, dry_mass=400.0).add("a", 500.0).jettison("probe", 150.0)
        >>> round(float(b.mass_after[1]), 1)
        696.5
        """
        return self._append(_mass_event("jettison", label, mass), "mass")

    def add_mass(self, label: str, mass: float) -> Budget:
        """Append an added mass (docking, a sample picked up): ``mass`` kg come aboard; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(1000.0, 3000.0).add_mass("dock with cargo pod", 250.0)
        >>> float(b.final_mass)
        1250.0
        """
        return self._append(_mass_event("add_mass", label, mass), "mass")

    def drop_stage(self, label: str, stage: str) -> Budget:
        """Append the drop of a stage: its dry mass and what its tanks hold leave; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(name="Stack", dry_mass=300.0).stage("carrier", 200.0)
        >>> b = b.system("carrier main", 3000.0, 500.0, stage="carrier").system("lander", 3000.0, 100.0)
        >>> b = b.add("transfer", 1000.0, system="carrier main").drop_stage("release lander", "carrier")
        >>> round(float(b.final_mass), 1), round(float(b.usage["carrier main"].left), 1)
        (400.0, 188.2)
        """
        line = BudgetLine(
            text(label, "label"), 0.0, kind="drop_stage", stage=text(stage, "stage", empty=False)
        )
        return self._append(line, "stage")

    def remove(self, index: int) -> Budget:
        """Remove line ``index``; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> Budget(500.0, 2500.0).add("a", 10.0).add("b", 20.0).remove(0).lines[0].label
        'b'
        """
        position = self._position(index, "index")
        return self._edit(lambda b: b._lines.pop(position), "index")

    def move(self, index: int, new_index: int) -> Budget:
        """Move line ``index`` so that it becomes line ``new_index``; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(500.0, 2500.0).add("a", 1.0).add("b", 2.0).add("c", 3.0).move(2, 0)
        >>> [line.label for line in b.lines]
        ['c', 'a', 'b']
        """
        old = self._position(index, "index")
        new = self._position(new_index, "new_index")
        return self._edit(lambda b: b._lines.insert(new, b._lines.pop(old)), "new_index")

    def update(self, index: int, **changes: Any) -> Budget:
        """Change some fields of line ``index``; returns the budget.

        A burn takes ``label``, ``dv``, ``ve``, ``margin`` (None: back to the
        policy's), ``system`` and ``category``; a jettison or an added mass
        takes ``label`` and ``mass``; a stage drop ``label`` and ``stage``.
        Setting ``dv`` makes the line a typed number (its transfer source is
        dropped).

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(500.0, 2500.0).add("a", 10.0).update(0, margin=0.2, label="trim")
        >>> b.lines[0].label, b.lines[0].margin
        ('trim', 0.2)
        """
        position = self._position(index, "index")
        old = self._lines[position]
        allowed = {
            "burn": {"label", "dv", "ve", "margin", "system", "category"},
            "jettison": {"label", "mass"},
            "add_mass": {"label", "mass"},
            "drop_stage": {"label", "stage"},
        }[old.kind]
        unknown = set(changes) - allowed
        if unknown:
            raise DomainError(
                f"`update` of a {old.kind} line takes {', '.join(sorted(allowed))}; got {sorted(unknown)}"
            )
        if old.kind == "burn":
            margin = (
                changes["margin"] if "margin" in changes else (None if old.margin_from_policy else old.margin)
            )
            line = self._burn_line(
                changes.get("label", old.label),
                changes.get("dv", old.dv),
                changes.get("ve", old.ve),
                margin,
                changes.get("system", old.system),
                changes.get("category", old.category),
                source=None if "dv" in changes else old.source,
            )
        else:
            line = replace(
                old,
                label=text(changes.get("label", old.label), "label"),
                mass=real(changes.get("mass", old.mass), "mass", "kg", low=0.0),
                stage=None
                if old.stage is None
                else text(changes.get("stage", old.stage), "stage", empty=False),
            )
        culprit = next(iter(changes), "index")
        return self._edit(lambda b: b._lines.__setitem__(position, line), culprit)

    def clear(self) -> Budget:
        """Remove every line; returns the budget."""
        return self._edit(lambda b: b._lines.clear(), "index")

    def _position(self, index: Any, name: str, allow_end: bool = False) -> int:
        count = len(self._lines) + (1 if allow_end else 0)
        if isinstance(index, bool) or not isinstance(index, (int, np.integer)):
            raise DomainError(f"`{name}` must be an integer line number, got {index!r}")
        position = int(index) + count if index < 0 else int(index)
        if not 0 <= position < count:
            raise DomainError(f"`{name}` must be a line number from 0 to {count - 1}, got {index!r}")
        return position

    def _known_systems(self) -> str:
        return "its systems: " + (", ".join(repr(s) for s in self._systems) or "none")

    def _implicit(self) -> str | None:
        """The system whose load is what the start mass leaves, if any."""
        return next((s.name for s in self._systems.values() if s.propellant is None), None)

    # ------------------------------------------------------------------ checking and flying
    def _growth(self, maturity: str | None, name: str) -> float:
        if maturity is None:
            return 0.0
        if self._policy is None:
            raise DomainError(f"`{name}` {maturity!r} needs a margin policy with mass growth allowances")
        return self._policy.growth(maturity)

    def _resolve(self, culprit: str = "m0") -> Resolved:
        """Check the whole budget and fly it (cached until the next edit)."""
        if self._cache is not None:
            return self._cache
        systems = list(self._systems.values())
        stages = list(self._stages.values())
        for s in systems:
            if s.stage is not None and s.stage not in self._stages:
                raise DomainError(f"`stage` {s.stage!r} of system {s.name!r} is not a stage of this budget")
        implicit = [s for s in systems if s.propellant is None]
        if len(implicit) > 1:
            names = ", ".join(repr(s.name) for s in implicit)
            raise DomainError(f"`propellant` must be given for all systems but one (none given for {names})")
        if implicit and implicit[0].stage is not None:
            raise DomainError(
                f"`propellant` of system {implicit[0].name!r} must be given: it sits on a stage"
            )
        stage_dry = [s.dry_mass * (1.0 + self._growth(s.maturity, "maturity")) for s in stages]
        loads = sum(s.propellant for s in systems if s.propellant is not None)
        rest = sum(stage_dry) + loads
        dry, m0 = self._dry_mass, self._m0
        if dry is None and self._dry_maturity is not None:
            raise DomainError("`dry_maturity` needs a given `dry_mass`")
        dry_eff = None if dry is None else dry * (1.0 + self._growth(self._dry_maturity, "dry_maturity"))
        implicit_load: float | None = None
        if implicit:
            if m0 is None:
                raise DomainError(
                    f"`propellant` of system {implicit[0].name!r} must be given: "
                    "no start mass `m0` to take its load from"
                )
            if dry_eff is not None:
                implicit_load = m0 - dry_eff - rest
                if implicit_load < 0.0:
                    raise DomainError(
                        f"`{culprit}`: the start mass {m0!r} kg is less than the dry mass with growth, "
                        f"stages and other loads ({dry_eff + rest!r} kg)"
                    )
        elif m0 is None:
            if dry_eff is None:
                raise DomainError("give `m0` (the start mass, kg) or `dry_mass`")
            m0 = dry_eff + rest
        elif dry_eff is None:
            dry_eff = m0 - rest
            if dry_eff <= 0.0:
                raise DomainError(
                    f"`{culprit}`: the loads and stages ({rest!r} kg) leave no dry mass "
                    f"in the start mass {m0!r} kg"
                )
            dry = dry_eff
        elif systems and abs(m0 - (dry_eff + rest)) > 1e-9 * m0:  # with no system yet, nothing to compare
            raise DomainError(
                f"`{culprit}`: the start mass {m0!r} kg must equal the dry mass with growth, stages "
                "and loads "
                f"({dry_eff + rest!r} kg); set `m0 = None` to let it follow them"
            )
        context = _Context.of(self, systems, stages, dry_eff)
        ops = [self._op(line, number, context) for number, line in enumerate(self._lines, start=1)]
        usable = [
            (s.usable if s.propellant is not None else (math.inf if implicit_load is None else implicit_load))
            for s in systems
        ]
        plan = _ledger.Plan(
            context.system_stage, tuple(s.drop == "spent" for s in stages), context.stage_systems, tuple(ops)
        )
        inputs = _ledger.Inputs(
            m0=m0,
            ve=[s.ve for s in systems],
            usable=usable,
            residual=[s.residual_mass for s in systems],
            stage_dry=stage_dry,
            dv=[self._line_dv(line) for line in self._lines],
            line_ve=[line.ve if line.kind == "burn" else None for line in self._lines],
            mass=[line.mass for line in self._lines],
        )
        ledger = _ledger.run(plan, inputs)
        aboard = dry_eff
        for number, line in enumerate(self._lines, start=1):
            aboard = self._check_event(line, number, ledger.before[number - 1], aboard)
        context.aboard = aboard
        self._cache = Resolved(
            m0=m0,
            dry_nominal=dry,
            dry_with_growth=dry_eff,
            stage_dry=stage_dry,
            implicit_load=implicit_load,
            plan=plan,
            inputs=inputs,
            ledger=ledger,
            context=context,
        )
        return self._cache

    @staticmethod
    def _line_dv(line: BudgetLine) -> float:
        return line.dv_with_margin if line.kind == "burn" else 0.0

    def _op(self, line: BudgetLine, number: int, context: _Context) -> _ledger.Op:
        """The ledger's view of one line, checked against the vehicle as it is at that line."""
        where = f"line {number} ({line.label!r})"
        if line.kind == "burn":
            name = line.system if line.system is not None else self._main
            if name is None:
                raise DomainError(f"`system`: {where} names no system and the budget has no main system")
            if name not in context.system_index:
                raise DomainError(
                    f"`system` {name!r} of {where} is not a system of this budget ({self._known_systems()})"
                )
            j = context.system_index[name]
            k = context.system_stage[j]
            if k in context.dropped:
                raise DomainError(
                    f"`system` {name!r} of {where} sits on stage {context.stage_names[k]!r}, "
                    "dropped by an earlier line"
                )
            chain = [j]
            if k >= 0 and context.spent[k]:
                for above in range(k + 1, len(context.spent)):
                    if context.stage_systems[above] and above not in context.dropped:
                        chain.append(context.stage_systems[above][0])
                if context.fallback is not None and context.fallback not in chain:
                    chain.append(context.fallback)
            return _ledger.Op("burn", tuple(chain))
        if line.kind == "drop_stage":
            if line.stage not in context.stage_index:
                raise DomainError(f"`stage` {line.stage!r} of {where} is not a stage of this budget")
            k = context.stage_index[line.stage]
            if k in context.dropped:
                raise DomainError(f"`stage` {line.stage!r} of {where} was dropped by an earlier line")
            context.dropped.add(k)
            return _ledger.Op("drop_stage", stage=k)
        return _ledger.Op(line.kind)

    @staticmethod
    def _check_event(line: BudgetLine, number: int, before: Any, aboard: float | None) -> float | None:
        """A jettison may not take more than the vehicle that stays has; returns the dry mass aboard after."""
        if line.kind == "add_mass" and aboard is not None:
            return aboard + line.mass
        if line.kind != "jettison":
            return aboard
        limit = aboard if aboard is not None else float(before)
        what = "dry mass aboard" if aboard is not None else "vehicle mass"
        if line.mass > limit * (1.0 + 1e-12) or (aboard is None and line.mass >= limit):
            raise DomainError(
                f"`mass` of jettison {number} ({line.label!r}): {line.mass!r} kg is more than the "
                f"{what} at that line ({limit!r} kg)"
            )
        return None if aboard is None else aboard - line.mass

    def _append(self, line: BudgetLine, culprit: str) -> Budget:
        """Append a line, checking and flying only that line when the rest is already flown."""
        cache = self._cache
        if cache is None:
            return self._edit(lambda b: b._lines.append(line), culprit)
        context = copy.copy(cache.context)
        context.dropped = set(context.dropped)
        number = len(self._lines) + 1
        op = self._op(line, number, context)
        inputs = replace(
            cache.inputs,
            dv=[*cache.inputs.dv, self._line_dv(line)],
            line_ve=[*cache.inputs.line_ve, line.ve if line.kind == "burn" else None],
            mass=[*cache.inputs.mass, line.mass],
        )
        plan = replace(cache.plan, ops=(*cache.plan.ops, op))
        ledger = _ledger.run(plan, inputs, start=cache.ledger)
        context.aboard = self._check_event(line, number, ledger.before[-1], context.aboard)
        self._lines.append(line)
        self._cache = replace(cache, plan=plan, inputs=inputs, ledger=ledger, context=context)
        return self

    # ------------------------------------------------------------------ reading
    @property
    def lines(self) -> tuple[BudgetLine, ...]:
        """The lines in order (a read-only tuple; edit with add/remove/move/replace/update)."""
        return tuple(self._lines)

    def __len__(self) -> int:
        return len(self._lines)

    def __iter__(self) -> Iterator[BudgetLine]:
        return iter(tuple(self._lines))

    @property
    def dv(self) -> np.ndarray:
        """Delta-v of each line before margin, m/s, shape (n,) (0 for mass events)."""
        return np.array([line.dv for line in self._lines], dtype=float)

    @property
    def dv_with_margin(self) -> np.ndarray:
        """Delta-v of each line with its margin, m/s, shape (n,)."""
        return np.array([line.dv_with_margin for line in self._lines], dtype=float)

    @property
    def margin_dv(self) -> np.ndarray:
        """The margin of each line in m/s, shape (n,)."""
        return np.array([line.margin_dv for line in self._lines], dtype=float)

    @property
    def line_ve(self) -> np.ndarray:
        """Exhaust velocity each line burns with, m/s, shape (n,) (NaN for mass events)."""
        out = []
        for line in self._lines:
            if line.kind != "burn":
                out.append(math.nan)
            elif line.ve is not None:
                out.append(line.ve)
            else:
                out.append(self._systems[line.system or self._main].ve)
        return np.array(out, dtype=float)

    def _per_line(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        return self._resolve().per_line()

    @property
    def mass_before(self) -> np.ndarray:
        """Mass at the start of each line, kg, shape (n,) (NaN after a tank ran dry)."""
        return self._per_line()[0]

    @property
    def mass_after(self) -> np.ndarray:
        """Mass at the end of each line, kg, shape (n,) (NaN from the line where a tank ran dry)."""
        return self._per_line()[1]

    @property
    def propellant_per_line(self) -> np.ndarray:
        """Propellant each line burns, kg, shape (n,) (NaN from the line where a tank ran dry)."""
        return self._per_line()[2]

    @property
    def total_dv(self) -> np.floating:
        """Sum of the lines' delta-v with margins, m/s."""
        return scalar_or_array(np.sum(self.dv_with_margin))

    @property
    def propellant(self) -> np.floating:
        """Propellant of the whole budget, kg (NaN when a tank runs dry)."""
        burned = self.propellant_per_line
        return scalar_or_array(np.sum(burned) if burned.size else np.float64(0.0))

    @property
    def final_mass(self) -> np.floating:
        """Mass after the last line, kg (``m0`` for an empty budget; NaN when a tank runs dry)."""
        after = self.mass_after
        return scalar_or_array(after[-1] if after.size else np.float64(self.m0))

    @property
    def propellant_left(self) -> np.floating:
        """Usable propellant left aboard after the last line, kg, all tanks together.

        NaN when a tank runs dry or a tank aboard is untracked (no dry mass given).
        """
        return np.float64(self._resolve().propellant_left())

    @property
    def first_infeasible(self) -> int | None:
        """Index of the first line where a tank runs dry (or the vehicle cannot fly it), or None."""
        broken = int(self._resolve().ledger.broken_at)
        return None if broken < 0 else broken

    @property
    def closes(self) -> bool:
        """True when every tank holds what its lines ask."""
        return self.first_infeasible is None

    @property
    def usage(self) -> Mapping[str, SystemUsage]:
        """Per system: load, usable, used, left, shortfall and the line where it runs dry."""
        return MappingProxyType(self._resolve().usage(list(self._systems.values())))

    @property
    def shortfall(self) -> np.floating:
        """Propellant the lines ask for beyond what the tanks hold, kg, all tanks together."""
        return np.float64(sum(u.shortfall for u in self.usage.values()))

    # ------------------------------------------------------------------ tables
    def to_frame(self) -> Any:
        """The lines as a pandas DataFrame, one row per line, units in the headers.

        Nominal delta-v, margin (as % of the line's delta-v, and in m/s) and
        the delta-v with margin are separate columns.

        Examples
        --------
        >>> from deltakit import Budget
        >>> frame = Budget(1000.0, 3000.0).add("raise", 1000.0).to_frame()
        >>> list(frame.columns)[:3]
        ['label', 'kind', 'system']
        >>> round(float(frame["propellant (kg)"].iloc[0]), 1)
        283.5
        """
        return _budget_tables.lines_frame(self)

    def systems_frame(self) -> Any:
        """The propulsion systems as a pandas DataFrame: load, used, left, shortfall, where dry."""
        return _budget_tables.systems_frame(self)

    def mass_frame(self) -> Any:
        """The start mass item by item: nominal, growth allowance and total, kg."""
        return _budget_tables.mass_frame(self)

    def to_markdown(self, path: str | os.PathLike[str] | None = None, *, overwrite: bool = False) -> str:
        """The budget as Markdown: the lines table with a total row, then the systems.

        With ``path``, the text is also written there (atomically; an existing
        file that is not a budget Markdown export is refused unless
        ``overwrite=True``). Every label is escaped: it shows as typed.

        Examples
        --------
        >>> from deltakit import Budget
        >>> table = Budget(1000.0, 3000.0, name="Tug").add("raise", 1000.0).to_markdown()
        >>> print(table.splitlines()[0])
        **Tug**
        """
        return _budget_tables.write_text(self, "markdown", _budget_tables.markdown(self), path, overwrite)

    def _repr_markdown_(self) -> str:
        return _budget_tables.markdown(self)

    def to_latex(
        self, path: str | os.PathLike[str] | None = None, *, float: bool = True, overwrite: bool = False
    ) -> str:
        """The budget as LaTeX tables (no packages beyond LaTeX itself), with a total row.

        With ``float=True`` each table sits in a ``table`` float with a
        caption carrying the budget's name; ``float=False`` gives the bare
        ``tabular`` blocks to place yourself. Every label is escaped
        (``\\input``, ``\\write18`` and ``\\end{document}`` in a label are
        shown, never run); a few symbols analysts type (Δ, δ, μ, °, ±, ×, →,
        ≈, ≤, ≥) become math so that pdflatex sets them.

        Examples
        --------
        >>> from deltakit import Budget
        >>> text = Budget(1000.0, 3000.0, name="Tug").add("raise_1", 1000.0).to_latex()
        >>> print(text.splitlines()[3])
        \\caption{Tug: delta-v budget (margins in \\% of each line's delta-v)}
        >>> "raise\\\\_1" in text
        True
        """
        return _budget_tables.write_text(self, "latex", _budget_tables.latex(self, float), path, overwrite)

    def to_csv(self, path: str | os.PathLike[str] | None = None, *, overwrite: bool = False) -> str | Path:
        """The lines as CSV (:meth:`to_frame` with the line number first).

        Without ``path`` the text is returned (as pandas does). With ``path``
        it is written atomically and the path is returned; an existing file
        that is not a budget CSV export is refused unless ``overwrite=True``.

        Examples
        --------
        >>> from deltakit import Budget
        >>> print(Budget(1000.0, 3000.0).add("raise", 1000.0).to_csv().splitlines()[0][:30])
        line,label,kind,system,categor
        """
        content = self.to_frame().to_csv(lineterminator="\n")
        if path is None:
            return content
        _budget_tables.write_text(self, "csv", content, path, overwrite)
        return Path(path)

    # ------------------------------------------------------------------ files
    def to_dict(self) -> dict[str, Any]:
        """The budget as JSON-ready data in our own versioned layout (SI units)."""
        return _budget_files.budget_to_dict(self)

    @classmethod
    def from_dict(cls, data: Any, *, origin: str = "the data") -> Budget:
        """Rebuild a budget from :meth:`to_dict` output (version 1 or 2), checking every field.

        Raises :class:`~deltakit.DomainError` naming ``origin`` and the field
        when the data is not a deltakit budget of a version this code reads.
        """
        return _budget_files.budget_from_dict(cls, data, origin)

    def save(self, path: str | os.PathLike[str], *, overwrite: bool = False) -> Path:
        """Save as versioned JSON, atomically; returns the path.

        Refuses (with :class:`~deltakit.DomainError`, touching nothing) to
        overwrite an existing file that is not a deltakit budget this version
        can read, so no other file is ever lost (``overwrite=True`` replaces
        it all the same). A symbolic link is followed and kept; temporary
        files of a killed save are cleaned up.

        Examples
        --------
        >>> import tempfile, pathlib
        >>> from deltakit import Budget
        >>> folder = pathlib.Path(tempfile.mkdtemp())
        >>> path = Budget(800.0, 3000.0, name="Tug").add("burn", 300.0).save(folder / "tug.json")
        >>> Budget.load(path).lines[0].dv
        300.0
        """
        return _budget_files.save(self, path, overwrite=overwrite)

    @classmethod
    def load(cls, path: str | os.PathLike[str]) -> Budget:
        """Read a budget saved by :meth:`save`; the file is only read.

        Raises :class:`~deltakit.DomainError` (a ``ValueError``) naming the
        file and what is wrong: unreadable or truncated JSON, nesting or
        numbers beyond reason, another format, a newer version, or a damaged
        field. A missing file raises ``FileNotFoundError``.
        """
        return _budget_files.load(cls, path)

    # ------------------------------------------------------------------ comparing and printing
    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Budget):
            return NotImplemented
        return self.to_dict() == other.to_dict()

    __hash__ = None  # type: ignore[assignment]  # mutable

    def __repr__(self) -> str:
        title = f" {self._name!r}" if self._name else ""
        return (
            f"<Budget{title}: {len(self._lines)} lines, total_dv={float(self.total_dv):.6g} m/s, "
            f"propellant={float(self.propellant):.6g} kg, final_mass={float(self.final_mass):.6g} kg>"
        )
