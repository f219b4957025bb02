"""The BudgetBuilder's vehicle editor (propulsion systems and stages) and the fields of each line kind.

:class:`VehicleEditor` lists the budget's propulsion systems and stages
(the two lists are controls of the panel, their values the recipes of
:mod:`._budget_recipes`) with a small form for each: select one to fill the
form, then add, update or remove. Every button builds the new list and hands
it to the panel's ``set``, so an edit goes through the panel's one checked
update path (a system on a stage that does not exist, a negative load: a
message, nothing changed). :class:`LineKindFields` holds the line editor's
fields that depend on the kind of line (the system and margin category of a
burn, the mass of a jettison or an added mass, the stage a drop lets go).
"""

from __future__ import annotations

from typing import Any

import ipywidgets as widgets

from .._text import one_line
from ..constants import G0
from ..errors import DomainError
from ..units import percent
from ._budget_recipes import KINDS, stage_recipes, system_recipes
from ._controls import number_width

__all__ = ["LineKindFields", "VehicleEditor"]

_STYLE = {"description_width": "initial"}
_WRAP = {"flex_flow": "row wrap"}
#: The drop-down entry of "no stage" (a system on the vehicle that stays) and of "the main engine".
#: (A drop-down whose value is None shows blank in the browser: "" stands for none.)
ON_VEHICLE = ("on the vehicle that stays", "")
MAIN_ENGINE = ("main system", "")
NOT_GIVEN = ("not given", "")


def _box(description: str, value: float = 0.0) -> widgets.FloatText:
    return widgets.FloatText(
        value=value,
        description=description,
        style=_STYLE,
        layout=widgets.Layout(width=number_width(description)),
    )


def _pick(description: str, options: list[Any], width: str = "260px") -> widgets.Dropdown:
    return widgets.Dropdown(
        options=options,
        value=options[0][1] if options else None,
        description=description,
        style=_STYLE,
        layout=widgets.Layout(width=width),
    )


class VehicleEditor:
    """Lists and forms for a budget's propulsion systems and stages (part of a BudgetBuilder)."""

    def __init__(self, panel: Any) -> None:
        self.panel = panel
        layout = widgets.Layout(width="640px")
        self.systems = widgets.Select(options=[], rows=4, description="propulsion systems", layout=layout)
        self.stages = widgets.Select(options=[], rows=2, description="stages", layout=layout)
        self.system_form = {
            "name": widgets.Text(value="thrusters", description="system", style=_STYLE),
            "isp": _box("Isp (s)", 220.0),
            "propellant": _box("usable load (kg)", 0.0),
            "residual": _box("residual (% of the load)", 0.0),
            "fills": widgets.Checkbox(
                value=False, description="holds what the start mass leaves", indent=False
            ),
            "stage": _pick("sits on", [ON_VEHICLE]),
        }
        self.stage_form = {
            "name": widgets.Text(value="stage", description="stage", style=_STYLE),
            "dry_mass": _box("stage dry mass (kg)", 0.0),
            "drop": _pick(
                "dropped", [("at a stage-drop line", "line"), ("when its tanks are spent", "spent")]
            ),
            "maturity": _pick("maturity", [NOT_GIVEN]),
        }
        self.buttons = {
            "add_system": widgets.Button(description="Add system", icon="plus"),
            "update_system": widgets.Button(description="Update system", icon="pencil"),
            "remove_system": widgets.Button(description="Remove system", icon="trash"),
            "add_stage": widgets.Button(description="Add stage", icon="plus"),
            "update_stage": widgets.Button(description="Update stage", icon="pencil"),
            "remove_stage": widgets.Button(description="Remove stage", icon="trash"),
        }
        for key, button in self.buttons.items():
            button.add_class(f"deltakit-budget-{key.replace('_', '-')}")
            button.on_click(lambda _, key=key: self._edit(key))
        wrap = widgets.Layout(**_WRAP)
        self.box = widgets.VBox(
            [
                widgets.HTML("<b>Vehicle</b> (propulsion systems and stages; select one to edit it)"),
                self.systems,
                widgets.HBox(
                    [self.system_form[k] for k in ("name", "isp", "propellant", "residual")], layout=wrap
                ),
                widgets.HBox([self.system_form["fills"], self.system_form["stage"]], layout=wrap),
                widgets.HBox(
                    [self.buttons[k] for k in ("add_system", "update_system", "remove_system")], layout=wrap
                ),
                self.stages,
                widgets.HBox(
                    [self.stage_form[k] for k in ("name", "dry_mass", "drop", "maturity")], layout=wrap
                ),
                widgets.HBox(
                    [self.buttons[k] for k in ("add_stage", "update_stage", "remove_stage")], layout=wrap
                ),
            ],
            layout=widgets.Layout(border="1px solid #d0d7de", padding="4px", margin="4px 0"),
        )

    # ------------------------------------------------------------------ shown
    def show(self, budget: Any) -> None:
        """Show a budget's systems and stages (called quietly by the panel's draw)."""
        usage = budget.usage
        rows = []
        for i, s in enumerate(system_recipes(budget)):
            use = usage[s["name"]]
            load = "fills the rest" if s["propellant"] is None else f"{s['propellant']:,.1f} kg"
            where = f", on {one_line(s['stage'])}" if s["stage"] else ""
            rows.append(
                (
                    f"{one_line(s['name'])}: Isp {s['ve'] / G0:.1f} s, {load}{where}; "
                    f"used {use.used:,.1f} kg, left {use.left:,.1f} kg",
                    i,
                )
            )
        self._keep(self.systems, rows)
        stages = [
            (
                f"{one_line(s['name'])}: {s['dry_mass']:,.1f} kg dry, dropped "
                + ("when spent" if s["drop"] == "spent" else "at its line"),
                i,
            )
            for i, s in enumerate(stage_recipes(budget))
        ]
        self._keep(self.stages, stages)
        self.system_form["stage"].options = [ON_VEHICLE, *((name, name) for name in budget.stages)]
        maturity = self.stage_form["maturity"]
        known = [NOT_GIVEN, *((m, m) for m in self.panel.controls["dry_maturity"].options[1:])]
        if list(maturity.options) != known:
            maturity.options = known

    @staticmethod
    def _keep(select: widgets.Select, options: list[tuple[str, int]]) -> None:
        value = select.value
        select.options = options
        select.value = value if value is not None and value < len(options) else None

    def select_system(self, index: int | None) -> None:
        budget = self.panel.budget
        if budget is None or index is None:
            return
        s = system_recipes(budget)[index]
        self.system_form["name"].value = s["name"]
        self.system_form["isp"].value = round(s["ve"] / G0, 6)
        self.system_form["fills"].value = s["propellant"] is None
        self.system_form["propellant"].value = 0.0 if s["propellant"] is None else s["propellant"]
        self.system_form["residual"].value = round(s["residual"] / percent, 9)
        self.system_form["stage"].value = s["stage"] or ""

    def select_stage(self, index: int | None) -> None:
        budget = self.panel.budget
        if budget is None or index is None:
            return
        s = stage_recipes(budget)[index]
        self.stage_form["name"].value = s["name"]
        self.stage_form["dry_mass"].value = s["dry_mass"]
        self.stage_form["drop"].value = s["drop"]
        self.stage_form["maturity"].value = s["maturity"] or ""

    # ------------------------------------------------------------------ edits
    def _system(self) -> dict[str, Any]:
        form = self.system_form
        isp = float(form["isp"].value)
        if not isp > 0.0:
            raise DomainError(f"a system's specific impulse must be > 0 s (got {isp:g} s)")
        residual = float(form["residual"].value)
        if not 0.0 <= residual < 100.0:
            raise DomainError(
                f"a system's residual must be between 0 and 100 % of its load (got {residual:g} %)"
            )
        return {
            "name": form["name"].value,
            "ve": isp * G0,
            "propellant": None if form["fills"].value else float(form["propellant"].value),
            "residual": residual * percent,
            "stage": form["stage"].value or None,
        }

    def _stage(self) -> dict[str, Any]:
        form = self.stage_form
        return {
            "name": form["name"].value,
            "dry_mass": float(form["dry_mass"].value),
            "drop": form["drop"].value,
            "maturity": form["maturity"].value or None,
        }

    def _edit(self, action: str) -> None:
        panel = self.panel
        what = "system" if action.endswith("system") else "stage"
        select = self.systems if what == "system" else self.stages
        items = system_recipes(panel.budget) if what == "system" else stage_recipes(panel.budget)
        index = select.value
        try:
            if action.startswith("add"):
                items.append(self._system() if what == "system" else self._stage())
                index = len(items) - 1
            elif index is None or not 0 <= index < len(items):
                raise DomainError(f"select a {what} first")
            elif action.startswith("update"):
                new = self._system() if what == "system" else self._stage()
                if what == "system" and items[index].get("main"):
                    new["main"] = True
                items[index] = new
            else:
                items.pop(index)
                index = min(index, len(items) - 1) if items else None
        except (DomainError, ValueError) as err:
            panel._show_message(str(err))
            return
        panel.set(**{f"{what}s": items})
        if not panel.error and index is not None and index < len(select.options):
            select.value = index


class LineKindFields:
    """The line editor's fields that depend on the kind of line."""

    def __init__(self) -> None:
        self.kind = _pick("kind", [(words, key) for key, words in KINDS.items()], width="200px")
        self.system = _pick("flown by", [MAIN_ENGINE])
        self.category = _pick("margin category", [("none", "")], width="300px")
        self.from_policy = widgets.Checkbox(value=False, description="margin from the policy", indent=False)
        self.mass = _box("mass (kg)", 0.0)
        self.stage = _pick("stage dropped", [("(no stage)", "")])
        self.burn_box = widgets.HBox([self.system, self.category], layout=widgets.Layout(**_WRAP))
        self.event_box = widgets.HBox([self.mass, self.stage], layout=widgets.Layout(**_WRAP))

    def show(self, budget: Any) -> None:
        """Offer the budget's systems, stages and margin categories (called quietly by the panel's draw)."""
        systems = [MAIN_ENGINE, *((name, name) for name in budget.systems)]
        if list(self.system.options) != systems:
            value = self.system.value
            self.system.options = systems
            self.system.value = value if value in budget.systems else ""
        categories = [("none", ""), *((c, c) for c in (budget.policy.dv if budget.policy else {}))]
        if list(self.category.options) != categories:
            value = self.category.value
            self.category.options = categories
            self.category.value = value if value in [v for _, v in categories] else ""
        stages = [(name, name) for name in budget.stages] or [("(no stage)", "")]
        if list(self.stage.options) != stages:
            self.stage.options = stages

    def show_kind(self, kind: str) -> None:
        self.event_box.layout.display = None if kind != "burn" else "none"
        self.mass.layout.display = None if kind in ("jettison", "add_mass") else "none"
        self.stage.layout.display = None if kind == "drop_stage" else "none"

    def burn(self) -> dict[str, Any]:
        """A burn's system and category (None: the main system, no category)."""
        return {"system": self.system.value or None, "category": self.category.value or None}

    def event(self) -> dict[str, Any]:
        """A mass event or a stage drop as a recipe (without its label)."""
        kind = self.kind.value
        if kind == "drop_stage":
            if not self.stage.value:
                raise DomainError("a stage drop needs a stage: declare one in the vehicle editor first")
            return {"kind": kind, "stage": self.stage.value}
        mass = float(self.mass.value)
        if not mass >= 0.0:
            raise DomainError(f"the mass of a {KINDS[kind]} must be >= 0 kg (got {mass:g} kg)")
        return {"kind": kind, "mass": mass}

    def fill(self, line: dict[str, Any]) -> None:
        """Fill the fields from a line recipe."""
        kind = line.get("kind", "burn")
        self.kind.value = kind
        if kind == "burn":
            if (line.get("system") or "") in [v for _, v in self.system.options]:
                self.system.value = line.get("system") or ""
            if (line.get("category") or "") in [v for _, v in self.category.options]:
                self.category.value = line.get("category") or ""
            self.from_policy.value = line.get("margin") is None
        elif kind == "drop_stage":
            if line["stage"] in [v for _, v in self.stage.options]:
                self.stage.value = line["stage"]
        else:
            self.mass.value = line["mass"]
