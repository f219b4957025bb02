"""Budget files: our own versioned JSON, read back with every field checked.

Layout (version 2)::

    {"format": "deltakit.budget", "version": 2, "name": ...,
     "m0_kg": ... or null, "dry_mass_kg": ... or null, "dry_maturity": ... or null,
     "main_system": ..., "systems": [...], "stages": [...], "policy": {...} or null,
     "lines": [{"kind": "burn", ...}, {"kind": "jettison", ...}, ...]}

Version 1 (one main engine, burns only: ``m0_kg``, ``ve_m_per_s``,
``dry_mass_kg`` and ``lines``) is read and migrated. Reading never writes to
the file it reads; it refuses what is not a budget of a version we know,
naming the file, and stops at nesting, size or numbers beyond any budget's
before they can exhaust the interpreter.
"""

from __future__ import annotations

import copy
import json
import os
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ._files import remove_orphans, resolve, write_atomic
from ._scalars import text
from .errors import DomainError
from .margins import MarginPolicy
from .vehicle import PropulsionSystem, Stage

if TYPE_CHECKING:
    from .budget import Budget, BudgetLine

__all__ = ["FORMAT", "VERSION", "budget_from_dict", "budget_to_dict", "line_to_dict", "load", "save"]

#: Format tag of a saved budget file.
FORMAT = "deltakit.budget"
#: Newest file layout this version writes and reads.
VERSION = 2
#: No budget file is this large; reading stops before a stray file fills the memory.
MAX_BYTES = 64 * 1024 * 1024


def line_to_dict(line: BudgetLine) -> dict[str, Any]:
    if line.kind == "burn":
        return {
            "kind": "burn",
            "label": line.label,
            "dv_m_per_s": line.dv,
            "ve_m_per_s": line.ve,
            "margin": line.margin,
            "margin_from_policy": line.margin_from_policy,
            "system": line.system,
            "category": line.category,
            "source": copy.deepcopy(line.source),  # the caller may edit it freely
        }
    if line.kind == "drop_stage":
        return {"kind": "drop_stage", "label": line.label, "stage": line.stage}
    return {"kind": line.kind, "label": line.label, "mass_kg": line.mass}


def budget_to_dict(budget: Budget) -> dict[str, Any]:
    return {
        "format": FORMAT,
        "version": VERSION,
        "name": budget._name,
        "m0_kg": budget._m0,
        "dry_mass_kg": budget._dry_mass,
        "dry_maturity": budget._dry_maturity,
        "main_system": budget._main,
        "systems": [s.to_dict() for s in budget._systems.values()],
        "stages": [s.to_dict() for s in budget._stages.values()],
        "policy": None if budget._policy is None else budget._policy.to_dict(),
        "lines": [line.to_dict() for line in budget._lines],
    }


def _envelope(data: Any, origin: str) -> int:
    """Check the format tag and version; return the version."""
    if not isinstance(data, dict):
        raise DomainError(
            f"{origin} is not a deltakit budget: expected a JSON object, got {type(data).__name__}"
        )
    if data.get("format") != FORMAT:
        shown = repr(data.get("format"))
        shown = shown if len(shown) <= 60 else shown[:57] + "..."
        raise DomainError(
            f"{origin} is not a deltakit budget: its format tag is {shown}, expected {FORMAT!r}"
        )
    version = data.get("version")
    if isinstance(version, bool) or not isinstance(version, int) or not 1 <= version <= 10_000:
        shown = repr(version) if len(repr(version)) <= 30 else repr(version)[:27] + "..."
        raise DomainError(f"{origin} has no valid version number (got {shown})")
    if version > VERSION:
        raise DomainError(
            f"{origin} was written by a newer deltakit (budget file version {version}); "
            f"this version reads up to {VERSION}. Update deltakit to open it."
        )
    return version


def _object(entry: Any, what: str) -> dict[str, Any]:
    if not isinstance(entry, dict):
        raise DomainError(f"{what} must be an object, got {type(entry).__name__}")
    return entry


def _list(data: dict[str, Any], key: str) -> list[Any]:
    value = data.get(key, [])
    if not isinstance(value, list):
        raise DomainError(f"`{key}` must be a list, got {type(value).__name__}")
    return value


def _source(entry: dict[str, Any], number: int) -> dict[str, Any]:
    source = entry.get("source", {"kind": "number"})
    if not isinstance(source, dict) or source.get("kind") not in ("number", "transfer"):
        raise DomainError(f"line {number} has an unknown source {source!r}")
    return copy.deepcopy(source)


def _add_lines(budget: Budget, entries: list[Any], version: int) -> None:
    from .budget import KINDS, BudgetLine, _mass_event

    for number, raw in enumerate(entries, start=1):
        entry = _object(raw, f"line {number}")
        kind = entry.get("kind", "burn") if version >= 2 else "burn"
        if kind not in KINDS:
            raise DomainError(f"line {number} has an unknown kind {kind!r}")
        try:
            if kind == "burn":
                from_policy = bool(entry.get("margin_from_policy", False))
                line = budget._burn_line(
                    entry["label"],
                    entry["dv_m_per_s"],
                    entry.get("ve_m_per_s"),
                    None if from_policy else entry.get("margin", 0.0),
                    entry.get("system"),
                    entry.get("category"),
                    source=_source(entry, number),
                )
            elif kind == "drop_stage":
                line = BudgetLine(
                    text(entry["label"], "label"),
                    0.0,
                    kind=kind,
                    stage=text(entry["stage"], "stage", empty=False),
                )
            else:
                line = _mass_event(kind, entry["label"], entry["mass_kg"])
        except DomainError as err:
            note = ""
            if version == 1 and "`margin`" in str(err):
                note = " (files of version 1 took margins above 1 as 5 = +500 %; give the fraction)"
            raise DomainError(f"line {number}: {err}{note}") from None
        budget._lines.append(line)


def budget_from_dict(cls: type[Budget], data: Any, origin: str) -> Budget:
    version = _envelope(data, origin)
    try:
        if version == 1:
            budget = cls(
                data["m0_kg"], data["ve_m_per_s"], data.get("name", ""), dry_mass=data.get("dry_mass_kg")
            )
        else:
            policy = data.get("policy")
            budget = cls(
                data.get("m0_kg"),
                None,
                data.get("name", ""),
                dry_mass=data.get("dry_mass_kg"),
                dry_maturity=data.get("dry_maturity"),
                policy=None if policy is None else MarginPolicy.from_dict(policy),
            )
            for raw in _list(data, "stages"):
                entry = _object(raw, "a stage")
                stage = Stage(
                    entry["name"], entry["dry_mass_kg"], entry.get("drop", "line"), entry.get("maturity")
                )
                budget._stages[stage.name] = stage
            for raw in _list(data, "systems"):
                entry = _object(raw, "a system")
                system = PropulsionSystem(
                    entry["name"],
                    entry["ve_m_per_s"],
                    entry.get("propellant_kg"),
                    entry.get("residual", 0.0),
                    entry.get("stage"),
                )
                budget._systems[system.name] = system
            main = data.get("main_system")
            if main is not None and main not in budget._systems:
                raise DomainError(f"`main_system` {main!r} is not among its systems")
            budget._main = main if main is not None else next(iter(budget._systems), None)
            budget._main_chosen = main is not None
        lines = data["lines"]
        if not isinstance(lines, list):
            raise DomainError(f"`lines` must be a list, got {type(lines).__name__}")
        _add_lines(budget, lines, version)
        budget._cache = None
        budget._resolve()
    except KeyError as err:
        raise DomainError(
            f"{origin} is a damaged deltakit budget: field {err.args[0]!r} is missing"
        ) from None
    except (DomainError, TypeError) as err:
        raise DomainError(f"{origin} is a damaged deltakit budget: {err}") from None
    return budget


def read_data(path: Path) -> dict[str, Any]:
    """Read and check a budget file; never writes to it. Orphans of killed saves beside it go."""
    remove_orphans(path)
    target = resolve(path)
    size = target.stat().st_size  # a missing file raises FileNotFoundError naming it
    if size > MAX_BYTES:
        raise DomainError(f"{path} is not a deltakit budget: {size} bytes is far more than any budget holds")
    raw = target.read_bytes()
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise DomainError(f"{path} is not a deltakit budget: it is not UTF-8 text") from None
    try:
        data = json.loads(text)
    except json.JSONDecodeError as err:
        raise DomainError(
            f"{path} is corrupt or truncated: invalid JSON at line {err.lineno}, "
            f"column {err.colno} ({err.msg})"
        ) from None
    except RecursionError:
        raise DomainError(
            f"{path} is not a deltakit budget: its JSON is nested far deeper than a budget's"
        ) from None
    except ValueError as err:  # an integer with thousands of digits
        raise DomainError(
            f"{path} is not a deltakit budget: it holds a number beyond reason ({err})"
        ) from None
    return data


def load(cls: type[Budget], path: str | os.PathLike[str]) -> Budget:
    path = Path(path)
    return cls.from_dict(read_data(path), origin=str(path))


def save(budget: Budget, path: str | os.PathLike[str], *, overwrite: bool = False) -> Path:
    path = Path(path)
    payload = json.dumps(budget.to_dict(), indent=2, allow_nan=False) + "\n"
    target = resolve(path)
    if not overwrite and target.is_file() and target.stat().st_size > 0:
        try:
            budget_from_dict(type(budget), read_data(path), str(path))
        except DomainError as err:
            raise DomainError(f"refusing to overwrite {path}: {err}") from None
    # The whole file was checked above (a budget can be longer than the head the writer reads).
    write_atomic(path, payload, kind="deltakit budget", same_kind=lambda head: True)
    return path
