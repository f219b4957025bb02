"""A budget as the BudgetBuilder's values, and back: recipes of lines, propulsion systems and stages.

A recipe is plain data (SI, JSON-ready). A line recipe is ``{"label",
"formula", "params", "margin", "isp"}`` for a burn (the formula and its
parameters, a margin fraction, its own specific impulse or None), with
``"system"`` and ``"category"`` when the burn names them and ``"margin":
None`` when its margin comes from the policy's category; a mass event is
``{"label", "kind", "mass"}`` (``kind`` ``"jettison"`` or ``"add_mass"``) and
a stage drop ``{"label", "kind": "drop_stage", "stage"}``. A system recipe is
``{"name", "ve", "propellant", "residual", "stage"}`` (``ve`` in m/s, or
``"isp"`` in s instead; ``propellant`` None: what the start mass leaves); a
stage recipe ``{"name", "dry_mass", "drop", "maturity"}``.

:func:`values_of` reads a :class:`~deltakit.Budget` into the panel's values,
:func:`build` makes the budget of the values; ``build(values_of(b)) == b``.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from .._text import one_line
from ..budget import Budget
from ..constants import G0
from ..errors import DomainError
from ..margins import MarginPolicy
from ..units import percent
from ._base import InputError, _round_si, json_ready
from ._formulas import FORMULAS, evaluate

__all__ = ["KINDS", "build", "line_recipe", "recipes", "stage_recipes", "system_recipes", "values_of"]

#: Line kinds and how the editor names them.
KINDS = {"burn": "burn", "jettison": "jettison", "add_mass": "added mass", "drop_stage": "stage drop"}
#: The system the budget's start mass and specific impulse make (``Budget(m0, ve)``).
MAIN = "main"


def line_recipe(line: Any, number: int) -> dict[str, Any]:
    """A line recipe checked and completed (SI; margin a fraction), or DomainError naming the line."""
    if not isinstance(line, Mapping):
        raise DomainError(f"line {number + 1} must be a dict, not {type(line).__name__}")
    label = line.get("label", f"line {number + 1}")
    if not isinstance(label, str):
        raise DomainError(f"line {number + 1}: `label` must be text, not {type(label).__name__}")
    kind = line.get("kind", "burn")
    if kind not in KINDS:
        raise DomainError(f"line {number + 1}: `kind` must be one of {list(KINDS)}, not {kind!r}")
    if kind in ("jettison", "add_mass"):
        return {"label": label, "kind": kind, "mass": float(line.get("mass", 0.0))}
    if kind == "drop_stage":
        stage = line.get("stage")
        if not isinstance(stage, str):
            raise DomainError(f"line {number + 1}: a stage drop needs the `stage` it drops, got {stage!r}")
        return {"label": label, "kind": kind, "stage": stage}
    formula = line.get("formula", "number")
    if formula not in FORMULAS:
        raise DomainError(f"line {number + 1}: `formula` must be one of {list(FORMULAS)}, not {formula!r}")
    params = dict(line.get("params", {}))
    isp = line.get("isp")
    category = line.get("category")
    margin = line.get("margin", None if category else 0.0)
    out = {
        "label": label,
        "formula": formula,
        "params": {p.key: params.get(p.key, p.default) for p in FORMULAS[formula].parameters},
        "margin": None if margin is None else float(margin),
        "isp": None if isp in (None, 0, 0.0) else float(isp),
    }
    for key in ("system", "category"):
        value = line.get(key)
        if value is not None:
            if not isinstance(value, str):
                raise DomainError(f"line {number + 1}: `{key}` must be text, not {type(value).__name__}")
            out[key] = value
    return out


def _system_recipe(system: Any, number: int) -> dict[str, Any]:
    if not isinstance(system, Mapping):
        raise DomainError(f"system {number + 1} must be a dict, not {type(system).__name__}")
    name = system.get("name")
    if not isinstance(name, str) or not name.strip():
        raise DomainError(f"system {number + 1}: `name` must be non-empty text, got {name!r}")
    if "ve" in system and system["ve"] is not None:
        ve = float(system["ve"])
    elif "isp" in system and system["isp"] is not None:
        ve = float(system["isp"]) * G0
    else:
        raise DomainError(f"system {number + 1} ({name}): give its `ve` (m/s) or `isp` (s)")
    propellant = system.get("propellant")
    out = {
        "name": name,
        "ve": ve,
        "propellant": None if propellant is None else float(propellant),
        "residual": float(system.get("residual", 0.0)),
        "stage": system.get("stage"),
    }
    if system.get("main"):
        out["main"] = True
    return out


def _stage_recipe(stage: Any, number: int) -> dict[str, Any]:
    if not isinstance(stage, Mapping):
        raise DomainError(f"stage {number + 1} must be a dict, not {type(stage).__name__}")
    name = stage.get("name")
    if not isinstance(name, str) or not name.strip():
        raise DomainError(f"stage {number + 1}: `name` must be non-empty text, got {name!r}")
    return {
        "name": name,
        "dry_mass": float(stage.get("dry_mass", 0.0)),
        "drop": stage.get("drop", "line"),
        "maturity": stage.get("maturity"),
    }


def checked_list(value: Any, name: str, recipe: Any) -> list[dict[str, Any]]:
    """A list of recipes checked one by one, or DomainError naming ``name``."""
    if not isinstance(value, (list, tuple)):
        raise DomainError(f"`{name}` must be a list of dicts, not {type(value).__name__}")
    return [recipe(item, i) for i, item in enumerate(value)]


def systems_checked(value: Any) -> list[dict[str, Any]]:
    return checked_list(value, "systems", _system_recipe)


def stages_checked(value: Any) -> list[dict[str, Any]]:
    return checked_list(value, "stages", _stage_recipe)


# ---------------------------------------------------------------------- budget -> values
def recipes(budget: Budget) -> list[dict[str, Any]]:
    """A budget's lines as recipes: a formula and its parameters where the line came from one."""
    out = []
    for line in budget.lines:
        if line.kind in ("jettison", "add_mass"):
            out.append({"label": line.label, "kind": line.kind, "mass": line.mass})
            continue
        if line.kind == "drop_stage":
            out.append({"label": line.label, "kind": line.kind, "stage": line.stage})
            continue
        source = line.source
        formula = source.get("formula") if source.get("formula") in FORMULAS else "number"
        params = dict(source.get("params", {})) if formula != "number" else {"dv": line.dv}
        recipe = {
            "label": line.label,
            "formula": formula,
            "params": params,
            "margin": None if line.margin_from_policy else line.margin,
            "isp": None if line.ve is None else _round_si(line.ve / G0),
        }
        if line.system is not None:
            recipe["system"] = line.system
        if line.category is not None:
            recipe["category"] = line.category
        out.append(recipe)
    return out


def _main_is_budget_made(budget: Budget) -> bool:
    """True when the budget's ``"main"`` system is the one ``Budget(m0, ve)`` makes (the panel's isp)."""
    main = budget.systems.get(MAIN)
    first = next(iter(budget.systems), None)
    return main is not None and first == MAIN and main.propellant is None and main.stage is None


def system_recipes(budget: Budget) -> list[dict[str, Any]]:
    """The propulsion systems the panel lists (all but the main engine of ``Budget(m0, ve)``)."""
    skip = MAIN if _main_is_budget_made(budget) else None
    out = []
    for system in budget.systems.values():
        if system.name == skip:
            continue
        recipe = {
            "name": system.name,
            "ve": system.ve,
            "propellant": system.propellant,
            "residual": system.residual,
            "stage": system.stage,
        }
        if system.name == budget.main_system and skip is None:
            recipe["main"] = True
        out.append(recipe)
    return out


def stage_recipes(budget: Budget) -> list[dict[str, Any]]:
    return [
        {"name": s.name, "dry_mass": s.dry_mass, "drop": s.drop, "maturity": s.maturity}
        for s in budget.stages.values()
    ]


def values_of(budget: Budget) -> dict[str, Any]:
    """The BudgetBuilder values (SI) that make ``budget`` (lines, systems, stages, policy, masses)."""
    made = _main_is_budget_made(budget)
    given_m0 = budget.to_dict()["m0_kg"]
    return {
        "name": budget.name,
        "m0": float(given_m0) if given_m0 is not None else 0.0,
        "isp": _round_si(budget.systems[MAIN].ve / G0) if made else 0.0,
        "dry_mass": budget.dry_mass or 0.0,
        "dry_maturity": budget.dry_maturity,
        "policy": None if budget.policy is None else json_ready(budget.policy.to_dict()),
        "systems": system_recipes(budget),
        "stages": stage_recipes(budget),
        "lines": recipes(budget),
    }


# ---------------------------------------------------------------------- values -> budget
def _with_recipes(budget: Budget, lines: list[dict[str, Any]]) -> Budget:
    """The budget with the formula and parameters of ``lines`` kept in the sources of its burns."""
    data = budget.to_dict()
    for entry, line in zip(data["lines"], lines):
        if line.get("formula", "number") != "number":
            entry["source"] = dict(
                entry["source"], formula=line["formula"], params=json_ready(line["params"])
            )
    return Budget.from_dict(data)


def line_dv(line: dict[str, Any], index: int) -> Any:
    try:
        return evaluate(line["formula"], line["params"])
    except (DomainError, TypeError, ValueError) as err:
        raise InputError(f"line {index + 1} ({one_line(line['label'])}): {err}", "lines") from None


def _policy(value: Any) -> MarginPolicy | None:
    if value is None:
        return None
    try:
        return MarginPolicy.from_dict(value)
    except (DomainError, TypeError, ValueError) as err:
        raise InputError(f"margin policy: {err}", "policy") from None


def build(values: Mapping[str, Any]) -> Budget:
    """The budget of the panel's values (SI), or InputError naming the control at fault."""
    m0, isp, dry = values["m0"], values["isp"], values["dry_mass"]
    systems = systems_checked(values.get("systems", []))
    stages = stages_checked(values.get("stages", []))
    staged = bool(systems or stages)
    first = "declare the propulsion systems and their loads first (vehicle editor)"
    if m0 == 0.0 and not staged:
        raise InputError(f"starting mass 0 kg stands for the sum of the masses: {first}.", "m0")
    if not (m0 > 0.0 or (staged and m0 == 0.0)):
        rule = ">= 0 kg (0: the sum of the masses)" if staged else "> 0 kg"
        raise InputError(f"starting mass must be {rule} (got {m0:g} kg).", "m0")
    if isp == 0.0 and not staged:
        raise InputError(f"specific impulse 0 s stands for no engine of the starting mass: {first}.", "isp")
    if not (isp > 0.0 or (staged and isp == 0.0)):
        rule = ">= 0 s (0: no engine of the starting mass)" if staged else "> 0 s"
        raise InputError(f"specific impulse must be {rule} (got {isp:g} s).", "isp")
    if dry < 0.0 or (dry and m0 and dry >= m0):
        raise InputError(
            f"dry mass must be between 0 and the starting mass {m0:g} kg (got {dry:g} kg).", "dry_mass"
        )
    policy = _policy(values.get("policy"))
    try:
        budget = Budget(
            m0 or None,
            isp * G0 if isp else None,
            values["name"],
            dry_mass=dry or None,
            dry_maturity=values.get("dry_maturity"),
            policy=policy,
        )
    except DomainError as err:
        control = "dry_maturity" if "maturity" in str(err) else "m0"
        raise InputError(f"the vehicle: {err}", control) from None
    for number, stage in enumerate(stages):
        try:
            budget.stage(stage["name"], stage["dry_mass"], drop=stage["drop"], maturity=stage["maturity"])
        except DomainError as err:
            raise InputError(f"stage {number + 1} ({one_line(stage['name'])}): {err}", "stages") from None
    for number, system in enumerate(systems):
        try:
            budget.system(
                system["name"],
                system["ve"],
                system["propellant"],
                system["residual"],
                stage=system["stage"],
                main=system.get("main", False),
            )
        except DomainError as err:
            raise InputError(f"system {number + 1} ({one_line(system['name'])}): {err}", "systems") from None
    lines = [line_recipe(line, i) for i, line in enumerate(values["lines"])]
    for index, line in enumerate(lines):
        where = f"line {index + 1} ({one_line(line['label'])})"
        try:
            if line.get("kind", "burn") == "burn":
                margin = line["margin"]
                if margin is not None and not 0.0 <= margin <= 1.0:
                    raise InputError(
                        f"{where}: margin {margin / percent:g} % must be between 0 and 100 % of the line's "
                        "delta-v (+5 % is 5 in the editor, 0.05 in code).",
                        "lines",
                    )
                if line["isp"] is not None and not line["isp"] > 0.0:
                    raise InputError(f"{where}: its own specific impulse must be > 0 s.", "lines")
                ve = None if line["isp"] is None else line["isp"] * G0
                budget.add(
                    line["label"],
                    line_dv(line, index),
                    ve=ve,
                    margin=margin,
                    system=line.get("system"),
                    category=line.get("category"),
                )
            elif line["kind"] == "jettison":
                budget.jettison(line["label"], line["mass"])
            elif line["kind"] == "add_mass":
                budget.add_mass(line["label"], line["mass"])
            else:
                budget.drop_stage(line["label"], line["stage"])
        except InputError:
            raise
        except DomainError as err:
            raise InputError(f"{where}: {err}", "lines") from None
    if not math.isfinite(float(budget.m0)):
        raise InputError("starting mass: the masses add up to no finite number.", "m0")
    return _with_recipes(budget, lines)
