"""BudgetBuilder: a delta-v budget line by line, with its mass waterfall: one engine or a staged vehicle.

Lines come from a typed delta-v or from a manoeuvre formula with its
parameters (Hohmann, bi-elliptic, plane change, escape, capture); each burn
can carry a margin (or take its category's margin from the margin policy),
its own specific impulse and the propulsion system that flies it. Lines may
also be mass events (a jettison, an added mass) or the drop of a stage. The
vehicle editor declares the propulsion systems (specific impulse, usable
load, residual, the stage they sit on) and the stages (dry mass, how they are
dropped, design maturity). Select a line, system or stage to edit it, move a
line up or down, or remove it. The waterfall shows the mass after each line;
the tables show each line's nominal delta-v, margin and total apart and what
each tank used and kept, with the first line where a tank runs dry; the
readouts give the totals. Save and load go through :class:`deltakit.Budget`
files (atomic, versioned JSON; a foreign or damaged file is refused and left
as it is); Markdown, LaTeX and CSV exports are shown and offered as downloads.

The panel's model is its :attr:`BudgetBuilder.budget`, a :class:`deltakit.Budget`;
``BudgetBuilder(budget=b)`` opens one as it is, and :meth:`BudgetBuilder.dispersion_view`
gives a :class:`~deltakit.widgets.DispersionView` that follows each valid edit.
A line made from a formula keeps the formula and its parameters in its
``source``, so a saved budget opens again with its lines editable.
``values["lines"]``, ``values["systems"]`` and ``values["stages"]`` read the
budget back as recipes (:mod:`deltakit.widgets._budget_recipes`); margins are
fractions there, as in :meth:`deltakit.Budget.add` (0.05 = +5 %), and the
editor shows them in percent.

Default case: the invented Halyard tug (:mod:`deltakit.demo`) taking cargo
from a 400 km Earth orbit to a 100 km lunar orbit.
"""

from __future__ import annotations

import base64
import math
import re
import tempfile
from collections.abc import Mapping
from pathlib import Path
from typing import Any, ClassVar

import ipywidgets as widgets

from .._text import escape_html, one_line
from ..budget import Budget
from ..constants import BODIES, EARTH, MOON
from ..demo import HALYARD, LUNAR_ORBIT_ALTITUDE, MOON_DISTANCE
from ..errors import DomainError
from ..margins import STUDY_POLICY, MarginPolicy
from ..plotting.waterfall import update_budget_waterfall
from ..transfers import hohmann
from ..twobody import circular_speed
from ..units import deg, percent
from ._base import Computed, Panel, _Plan, json_ready, number, number_width, toggle
from ._budget_html import tables_html
from ._budget_recipes import (
    build,
    line_recipe,
    recipes,
    stage_recipes,
    stages_checked,
    system_recipes,
    systems_checked,
    values_of,
)
from ._formulas import FORMULAS, evaluate
from ._vehicle_editor import LineKindFields, VehicleEditor

__all__ = ["BudgetBuilder", "default_lines", "recipes"]

_recipe = line_recipe  # the name earlier code imported
#: The dry-mass maturity choice that stands for none given.
NOT_GIVEN = "not given"
#: Margin policies offered by name (a budget given to the panel adds its own).
POLICIES: dict[str, MarginPolicy | None] = {"none": None, STUDY_POLICY.name: STUDY_POLICY}


def default_lines() -> list[dict[str, Any]]:
    """Halyard's lines (invented): injection towards the Moon, corrections, capture, plane trim."""
    leo = EARTH.radius + HALYARD.periapsis_altitude
    injection = float(hohmann(leo, MOON_DISTANCE, EARTH.mu).burns[0])
    low_lunar = MOON.radius + LUNAR_ORBIT_ALTITUDE
    return [
        {
            "label": "trans-lunar injection",
            "formula": "number",
            "params": {"dv": round(injection, 1)},
            "margin": 0.02,
        },
        {"label": "course corrections", "formula": "number", "params": {"dv": 40.0}},
        {
            "label": "lunar orbit insertion",
            "formula": "capture_burn",
            "params": {
                "body": MOON.name,
                "periapsis_altitude": LUNAR_ORBIT_ALTITUDE,
                "apoapsis_altitude": LUNAR_ORBIT_ALTITUDE,
                "vinf": 800.0,
            },
            "margin": 0.05,
        },
        {
            "label": "plane trim at the Moon",
            "formula": "plane_change",
            "params": {"v": round(float(circular_speed(low_lunar, MOON.mu)), 1), "angle": 3 * deg},
        },
    ]


def _file_stem(name: str) -> str:
    """A download name from the budget's name: letters, digits, ``_`` and single dashes.

    >>> _file_stem("Halyard: Earth orbit to low lunar orbit"), _file_stem("  "), _file_stem("a--b__c")
    ('Halyard-Earth-orbit-to-low-lunar-orbit', 'budget', 'a-b__c')
    """
    return re.sub(r"[^0-9A-Za-z_]+", "-", name).strip("-") or "budget"


def _csv_text(budget: Budget) -> str:
    """The budget's CSV export as text."""
    with tempfile.TemporaryDirectory() as folder:
        return Path(budget.to_csv(Path(folder) / "budget.csv")).read_text()


class BudgetBuilder(Panel):
    """Build, edit, save and export a delta-v budget: one engine, or a staged vehicle with several.

    Parameters (keyword-only, SI)
    -----------------------------
    name : str
        Title of the budget.
    m0 : float
        Vehicle mass at the start, kg. With systems or stages, 0 means "the
        sum of the dry mass, the stages and the loads".
    isp : float
        Specific impulse of the main engine, s (lines may override). With
        systems or stages, 0 means "no engine of the starting mass": the
        systems listed fly the lines.
    dry_mass : float
        Mass without usable propellant, kg; 0 for "not given" (then every
        budget closes; with it, a line that burns below it is infeasible).
    lines : list of dict or None
        Line recipes: burns ``{"label", "formula", "params", "margin", "isp"}``
        (and ``"system"``, ``"category"``; ``"margin": None`` takes the
        policy's margin of the category) with ``formula`` a key of
        ``FORMULAS``, ``params`` in SI and ``margin`` a fraction (0.05 = +5 %);
        mass events ``{"label", "kind": "jettison" | "add_mass", "mass"}``
        and stage drops ``{"label", "kind": "drop_stage", "stage"}``. None
        gives the Halyard example.
    path : str
        File for save and load.
    systems : list of dict or None
        Propulsion systems ``{"name", "ve" (m/s) or "isp" (s), "propellant"
        (kg; None: what the start mass leaves), "residual" (fraction),
        "stage"}``.
    stages : list of dict or None
        Stages, bottom first: ``{"name", "dry_mass", "drop" ("line" or
        "spent"), "maturity"}``.
    policy : MarginPolicy, dict, str or None
        The margin policy (a policy, its ``to_dict()`` data, or the name of
        one the panel offers); None for none.
    dry_maturity : str or None
        Design maturity of the dry mass (the policy's growth allowance is added).
    budget : Budget or None
        Open this budget: every setting above comes from it.

    Examples
    --------
    >>> from deltakit.widgets import BudgetBuilder
    >>> panel = BudgetBuilder(m0=1000.0, isp=300.0, dry_mass=0.0,
    ...                       lines=[{"label": "burn", "formula": "number", "params": {"dv": 500.0}}])
    >>> round(panel.results["final_mass"], 1)
    843.7
    >>> round(float(panel.budget.propellant), 1)
    156.3

    A staged budget opens as it is:

    >>> from deltakit.demo import QUILLWORT
    >>> staged = BudgetBuilder(budget=QUILLWORT.budget())
    >>> staged.budget == QUILLWORT.budget(), len(staged.values["systems"])
    (True, 4)
    """

    #: a budget that does not close has no final mass; without a dry mass, no propellant left
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset({"propellant", "final_mass", "propellant_left"})
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "total_dv": ("total delta-v (with margins)", 1.0, "m/s"),
        "propellant": ("propellant used", 1.0, "kg"),
        "final_mass": ("mass at the end", 1.0, "kg"),
        "propellant_left": ("usable propellant left", 1.0, "kg"),
        "shortfall": ("propellant missing (all tanks)", 1.0, "kg"),
    }

    def __init__(
        self,
        *,
        name: str = "Halyard: Earth orbit to low lunar orbit",
        m0: float = float(HALYARD.vehicle.wet_mass),
        isp: float = HALYARD.vehicle.isp,
        dry_mass: float = HALYARD.vehicle.dry_mass,
        lines: list[dict[str, Any]] | None = None,
        path: str = "budget.json",
        systems: list[dict[str, Any]] | None = None,
        stages: list[dict[str, Any]] | None = None,
        policy: Any = None,
        dry_maturity: str | None = None,
        budget: Budget | None = None,
    ) -> None:
        super().__init__()
        #: The budget the panel shows (the last valid one), lines and all.
        self.budget: Budget | None = None
        self._followers: list[Any] = []
        self._policies: dict[str, MarginPolicy | None] = dict(POLICIES)
        self._control(
            "name", widgets.Text(value="", description="budget name", layout=widgets.Layout(width="420px"))
        )
        self._control("m0", number("starting mass (kg)", 0.0), 1.0, "kg")
        self._control("isp", number("specific impulse (s)", 0.0), 1.0, "s")
        self._control("dry_mass", number("dry mass (kg, 0: not given)", 0.0), 1.0, "kg")
        self._control(
            "dry_maturity",
            toggle(
                "dry mass maturity", [NOT_GIVEN, *self._maturities(None)], NOT_GIVEN, button_width="110px"
            ),
        )
        # a few named policies, shown whole: radio buttons (a custom policy from a budget joins them)
        self._control(
            "policy",
            widgets.RadioButtons(
                options=list(self._policies),
                value="none",
                description="margin policy",
                layout=widgets.Layout(width="auto", min_width="420px"),
            ),
        )
        self._control(
            "lines",
            widgets.Select(options=[], rows=6, description="lines", layout=widgets.Layout(width="640px")),
        )
        self._control(
            "path", widgets.Text(value="", description="file", layout=widgets.Layout(width="340px"))
        )
        self.vehicle = VehicleEditor(self)
        self._control("systems", self.vehicle.systems)
        self._control("stages", self.vehicle.stages)
        self._waterfall = None
        self.tables = widgets.HTML("")
        self.tables.add_class("deltakit-budget-tables")
        self._build_editor()
        self._build_exports()
        self._build_figure()
        if budget is not None:
            if not isinstance(budget, Budget):
                raise DomainError(f"`budget` must be a deltakit.Budget, not {type(budget).__name__}")
            initial = {**values_of(budget), "path": path}
        else:
            initial = {
                "name": name,
                "m0": m0,
                "isp": isp,
                "dry_mass": dry_mass,
                "dry_maturity": dry_maturity,
                "policy": policy,
                "systems": systems or [],
                "stages": stages or [],
                "lines": default_lines() if lines is None else lines,
                "path": path,
            }
        self._finish(
            "Budget builder: lines, propellant, mass after each line",
            [["name"], ["m0", "isp", "dry_mass"], ["policy", "dry_maturity"], ["lines"]],
            initial=initial,
            extra=[self.vehicle.box, self._editor_box, self._file_box],
            below=[self.tables, self._export_box],
        )
        self._select(0 if self.budget.lines else None)

    # ------------------------------------------------------------------ values
    @staticmethod
    def _maturities(policy: MarginPolicy | None) -> list[str]:
        """Design maturities offered: the study policy's and those of the policy in use."""
        known = dict(STUDY_POLICY.mass_growth)
        if policy is not None:
            known.update(policy.mass_growth)
        return list(known)

    def _si(self, name: str) -> Any:
        if name == "lines":
            return json_ready(recipes(self.budget)) if self.budget is not None else []
        if name == "systems":
            return json_ready(system_recipes(self.budget)) if self.budget is not None else []
        if name == "stages":
            return json_ready(stage_recipes(self.budget)) if self.budget is not None else []
        if name == "policy":
            policy = self._policies[self.controls["policy"].value]
            return None if policy is None else json_ready(policy.to_dict())
        if name == "dry_maturity":
            value = self.controls["dry_maturity"].value
            return None if value == NOT_GIVEN else value
        return super()._si(name)

    def _policy_named(self, value: Any) -> tuple[str, MarginPolicy | None]:
        """The drop-down entry of a policy given as None, a name, a MarginPolicy or its data."""
        if value is None:
            return "none", None
        if isinstance(value, str):
            if value not in self._policies:
                raise DomainError(
                    f"`policy` must be one of {list(self._policies)} or a MarginPolicy, not {value!r}"
                )
            return value, self._policies[value]
        if isinstance(value, Mapping):
            value = MarginPolicy.from_dict(dict(value))
        if not isinstance(value, MarginPolicy):
            raise DomainError(
                f"`policy` must be a MarginPolicy, its data or a name, not {type(value).__name__}"
            )
        for key, known in self._policies.items():
            if known == value:
                return key, known
        key = value.name if value.name not in self._policies else f"{value.name} ({len(self._policies)})"
        return key, value

    def _plan(self, name: str, value: Any) -> _Plan:
        if name == "lines":
            if not isinstance(value, (list, tuple)):
                raise DomainError(f"`lines` must be a list of line dicts, not {type(value).__name__}")
            return _Plan([line_recipe(line, i) for i, line in enumerate(value)], lambda: None)
        if name == "systems":
            return _Plan(systems_checked(value), lambda: None)
        if name == "stages":
            return _Plan(stages_checked(value), lambda: None)
        if name == "policy":
            key, policy = self._policy_named(value)

            def choose() -> None:
                self._policies.setdefault(key, policy)
                widget = self.controls["policy"]
                if key not in widget.options:
                    widget.options = list(self._policies)
                widget.value = key
                maturity = self.controls["dry_maturity"]
                options = [NOT_GIVEN, *self._maturities(policy)]
                for extra in maturity.options:
                    if extra not in options:
                        options.append(extra)
                if list(maturity.options) != options:
                    current = maturity.value
                    maturity.options = options
                    maturity.value = current

            return _Plan(None if policy is None else json_ready(policy.to_dict()), choose)
        if name == "dry_maturity":
            if value is not None and not isinstance(value, str):
                raise DomainError(f"`dry_maturity` must be text or None, not {type(value).__name__}")

            shown = NOT_GIVEN if value is None else value

            def pick() -> None:
                widget = self.controls["dry_maturity"]
                if shown not in widget.options:
                    widget.options = [*widget.options, shown]
                widget.value = shown

            return _Plan(value, pick)
        return super()._plan(name, value)

    def _on_change(self, change: dict[str, Any]) -> None:
        if change["owner"] is self.controls["lines"]:
            self._select(change["new"])  # choosing a line only fills the editor
            return
        if change["owner"] is self.controls["systems"]:
            self.vehicle.select_system(change["new"])
            return
        if change["owner"] is self.controls["stages"]:
            self.vehicle.select_stage(change["new"])
            return
        if change["owner"] is self.controls["path"]:
            return
        super()._on_change(change)

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """The budget of ``values`` (SI, keyed like the controls; lines as recipes) and its totals."""
        budget = build(values)
        left = budget.propellant_left
        usage = budget.usage
        results = {
            "total_dv": float(budget.total_dv),
            "propellant": float(budget.propellant),
            "final_mass": float(budget.final_mass),
            "propellant_left": float(left) if left is not None else math.nan,
            "shortfall": float(budget.shortfall),
            "mass_after": [float(m) for m in budget.mass_after],
            "propellant_per_line": [float(m) for m in budget.propellant_per_line],
            "first_dry_line": None if budget.first_infeasible is None else budget.first_infeasible + 1,
            "systems": {
                name: {
                    "used": use.used,
                    "left": use.left,
                    "shortfall": use.shortfall,
                    "runs_dry_at_line": None if use.runs_dry_at is None else use.runs_dry_at + 1,
                }
                for name, use in usage.items()
            },
        }
        notes = []
        if budget.policy is not None:
            notes.append(
                f"Margin policy: {budget.policy.name} (lines with a category and no margin of their own "
                "take its margin; maturities add its growth allowance)."
            )
        if budget.first_infeasible is not None:
            notes.append(
                f"Line {budget.first_infeasible + 1} ({budget.lines[budget.first_infeasible].label}) "
                "needs more propellant than is left above the dry mass: the budget does not close."
            )
        return Computed(results, tuple(notes), {"budget": budget})

    def draw(self, computed: Computed, changed: set[str]) -> None:
        budget = computed.drawing["budget"]
        self.budget = budget
        self._waterfall = update_budget_waterfall(self.axes, self._waterfall, budget)
        self.view.invalidate()
        select = self.controls["lines"]
        selected = select.value
        with self._quietly():
            select.options = [(self._describe(i, line, budget), i) for i, line in enumerate(budget.lines)]
            select.value = selected if selected is not None and selected < len(budget.lines) else None
            self.vehicle.show(budget)
            # a maturity adds the policy's growth allowance: without a policy there is none to choose
            self.controls["dry_maturity"].disabled = budget.policy is None and budget.dry_maturity is None
            self.line_fields.show(budget)
        self.tables.value = tables_html(budget)
        self._show_export()
        for follower in list(self._followers):
            follower(budget)

    @staticmethod
    def _describe(index: int, line: Any, budget: Budget) -> str:
        after = float(budget.mass_after[index])
        if line.kind == "burn":
            margin = f" +{line.margin / percent:g} %" if line.margin else ""
            what = f"{line.dv:,.1f} m/s{margin}"
            if line.system:
                what += f" ({one_line(line.system)})"
        elif line.kind == "drop_stage":
            what = f"drop stage {one_line(line.stage)}"
        else:
            sign = "-" if line.kind == "jettison" else "+"
            what = f"{sign}{line.mass:,.1f} kg"
        return f"{index + 1}. {one_line(line.label)}: {what} -> {after:,.1f} kg"

    def dispersion_view(self, **kwargs: Any) -> Any:
        """A :class:`~deltakit.widgets.DispersionView` of this budget that follows each valid edit here.

        Keywords go to the view's constructor (spreads, samples, seed, ...).
        """
        from .dispersion_view import DispersionView

        view = DispersionView(budget=self.budget, **kwargs)

        def follow(budget: Budget) -> None:
            if view.controls:  # not closed
                view.set(budget=budget)
            elif follow in self._followers:
                self._followers.remove(follow)

        self._followers.append(follow)
        return view

    # ------------------------------------------------------------------ editor
    def _build_editor(self) -> None:
        style = {"description_width": "initial"}
        margin_label = "margin (% of the line's delta-v)"
        self.form: dict[str, widgets.Widget] = {
            "label": widgets.Text(value="new line", description="label", style=style),
            "formula": widgets.Dropdown(
                options=[(f.title, key) for key, f in FORMULAS.items()],
                value="number",
                description="from",
                style=style,
            ),
            "margin": widgets.FloatText(
                value=0.0,
                description=margin_label,
                style=style,
                layout=widgets.Layout(width=number_width(margin_label)),
            ),
            "isp": widgets.FloatText(
                value=0.0,
                description="own Isp (s, 0: budget's)",
                style=style,
                layout=widgets.Layout(width=number_width("own Isp (s, 0: budget's)")),
            ),
        }
        self._param_widgets: dict[str, dict[str, widgets.Widget]] = {}
        boxes = []
        for key, formula in FORMULAS.items():
            fields = {}
            for p in formula.parameters:
                if p.scale is None:
                    fields[p.key] = widgets.Dropdown(
                        options=list(BODIES),
                        value=p.default,
                        description=p.label,
                        style=style,
                        layout=widgets.Layout(width="220px"),
                    )
                else:
                    fields[p.key] = widgets.FloatText(
                        value=round(p.default / p.scale, 6),
                        description=p.label,
                        style=style,
                        layout=widgets.Layout(width=number_width(p.label)),
                    )
            self._param_widgets[key] = fields
            boxes.append(widgets.HBox(list(fields.values()), layout=widgets.Layout(flex_flow="row wrap")))
        self._param_boxes = dict(zip(FORMULAS, boxes))
        self._formula_box = widgets.VBox(boxes)
        self.line_fields = LineKindFields()
        self.line_fields.kind.observe(lambda change: self._show_kind(change["new"]), names="value")
        self.form["formula"].observe(lambda change: self._show_params(change["new"]), names="value")
        self.buttons = {
            "add": widgets.Button(description="Add line", button_style="primary", icon="plus"),
            "update": widgets.Button(description="Update selected", icon="pencil"),
            "up": widgets.Button(description="Move up", icon="arrow-up"),
            "down": widgets.Button(description="Move down", icon="arrow-down"),
            "remove": widgets.Button(description="Remove", button_style="warning", icon="trash"),
        }
        for key, button in self.buttons.items():
            button.add_class(f"deltakit-budget-{key}")
            button.on_click(lambda _, key=key: self._edit(key))
        wrap = widgets.Layout(flex_flow="row wrap")
        self._burn_box = widgets.VBox(
            [
                widgets.HBox(
                    [self.form["margin"], self.line_fields.from_policy, self.form["isp"]], layout=wrap
                ),
                self.line_fields.burn_box,
            ]
        )
        self._editor_box = widgets.VBox(
            [
                widgets.HTML("<b>Line editor</b> (select a line above to edit it)"),
                widgets.HBox([self.form["label"], self.line_fields.kind, self.form["formula"]], layout=wrap),
                self._formula_box,
                self._burn_box,
                self.line_fields.event_box,
                widgets.HBox(list(self.buttons.values()), layout=wrap),
            ],
            layout=widgets.Layout(border="1px solid #d0d7de", padding="4px", margin="4px 0"),
        )
        self._show_params("number")
        self._show_kind("burn")

    def _show_kind(self, kind: str) -> None:
        burn = kind == "burn"
        for box in (self._formula_box, self._burn_box, self.form["formula"]):
            box.layout.display = None if burn else "none"
        self.line_fields.show_kind(kind)

    def _show_params(self, formula: str) -> None:
        for key, box in self._param_boxes.items():
            box.layout.display = None if key == formula else "none"

    def _form_line(self) -> dict[str, Any]:
        """The editor's line as a recipe (SI), or DomainError saying what is wrong with it."""
        kind = self.line_fields.kind.value
        label = self.form["label"].value
        if kind != "burn":
            return line_recipe({"label": label, **self.line_fields.event()}, len(self.budget.lines))
        formula = self.form["formula"].value
        params = {}
        for p in FORMULAS[formula].parameters:
            value = self._param_widgets[formula][p.key].value
            params[p.key] = value if p.scale is None else float(value) * p.scale
        margin = float(self.form["margin"].value)
        if not 0.0 <= margin <= 100.0:
            raise DomainError(f"margin must be between 0 and 100 % of the line's delta-v (got {margin:g} %)")
        isp = float(self.form["isp"].value)
        if isp < 0.0:
            raise DomainError(
                f"a line's own specific impulse must be > 0 s, or 0 for the budget's (got {isp:g} s)"
            )
        burn = self.line_fields.burn()
        if self.line_fields.from_policy.value:
            if burn.get("category") is None:
                raise DomainError("a margin from the policy needs a margin category: choose one")
            margin_fraction = None
        else:
            margin_fraction = margin * percent
        line = line_recipe(
            {
                "label": label,
                "formula": formula,
                "params": params,
                "margin": margin_fraction,
                "isp": isp or None,
                **burn,
            },
            len(self.budget.lines),
        )
        evaluate(formula, line["params"])  # refuse a line with no solution before it enters the budget
        return line

    def _select(self, index: int | None) -> None:
        if self.budget is None or index is None or not 0 <= index < len(self.budget.lines):
            return
        line = recipes(self.budget)[index]
        self.form["label"].value = line["label"]
        kind = line.get("kind", "burn")
        self.line_fields.fill(line)
        if kind != "burn":
            return
        self.form["formula"].value = line["formula"]
        for p in FORMULAS[line["formula"]].parameters:
            value = line["params"][p.key]
            self._param_widgets[line["formula"]][p.key].value = (
                value if p.scale is None else round(value / p.scale, 9)
            )
        margin = self.budget.lines[index].margin
        self.form["margin"].value = round(margin / percent, 9)
        self.form["isp"].value = line["isp"] or 0.0

    def _edit(self, action: str) -> None:
        """Apply an editor button to the budget's lines; problems go to the message line, never raise."""
        selected = self.controls["lines"].value
        lines = recipes(self.budget)
        try:
            if action == "add":
                lines.append(self._form_line())
                selected = len(lines) - 1
            elif selected is None or not 0 <= selected < len(lines):
                raise DomainError("select a line first")
            elif action == "update":
                lines[selected] = self._form_line()
            elif action == "remove":
                lines.pop(selected)
                selected = min(selected, len(lines) - 1) if lines else None
            elif action in ("up", "down"):
                target = selected - 1 if action == "up" else selected + 1
                if 0 <= target < len(lines):
                    lines.insert(target, lines.pop(selected))
                    selected = target
        except (DomainError, ValueError) as err:
            self._show_message(str(err))
            return
        self.set(lines=lines)
        if self.error:
            return
        select = self.controls["lines"]
        if selected is not None and 0 <= selected < len(select.options):
            select.value = selected

    # ------------------------------------------------------------------ files and exports
    def _build_exports(self) -> None:
        self.file_buttons = {
            "save": widgets.Button(description="Save", icon="save"),
            "load": widgets.Button(description="Load", icon="folder-open"),
        }
        for key, button in self.file_buttons.items():
            button.add_class(f"deltakit-budget-{key}")
            button.on_click(lambda _, key=key: self._file(key))
        self.file_status = widgets.HTML("")
        self._file_box = widgets.HBox(
            [self.controls["path"], *self.file_buttons.values(), self.file_status],
            layout=widgets.Layout(flex_flow="row wrap"),
        )
        self.export_format = widgets.ToggleButtons(
            options=["Markdown", "LaTeX", "CSV"], value="Markdown", description="export"
        )
        # the box is as wide as the panel, never wider (a width of 100 % plus the widget's own margins
        # would stick out of the notebook's output area)
        self.export_text = widgets.Textarea(
            value="", layout=widgets.Layout(width="auto", max_width="100%", height="150px")
        )
        self.export_text.add_class("deltakit-export-text")
        self.export_link = widgets.HTML("")
        self.export_link.add_class("deltakit-download")
        self.export_format.observe(lambda _: self._show_export(), names="value")
        self._export_box = widgets.VBox(
            [self.export_format, self.export_text, self.export_link], layout=widgets.Layout(width="100%")
        )

    def exports(self) -> dict[str, str]:
        """The budget as Markdown, LaTeX and CSV text."""
        if self.budget is None:
            return {"Markdown": "", "LaTeX": "", "CSV": ""}
        return {
            "Markdown": self.budget.to_markdown(),
            "LaTeX": self.budget.to_latex(),
            "CSV": _csv_text(self.budget),
        }

    def _show_export(self) -> None:
        kind = self.export_format.value
        text = self.exports()[kind]
        self.export_text.value = text
        suffix, mime = {
            "Markdown": ("md", "text/markdown"),
            "LaTeX": ("tex", "application/x-tex"),
            "CSV": ("csv", "text/csv"),
        }[kind]
        filename = f"{_file_stem(self.controls['name'].value)}.{suffix}"
        data = base64.b64encode(text.encode("utf-8")).decode("ascii")
        self.export_link.value = (
            f'<a download="{escape_html(filename)}" href="data:{mime};base64,{data}">'
            f"Download {escape_html(kind)} ({escape_html(filename)})</a>"
        )

    def _file(self, action: str) -> None:
        path = Path(self.controls["path"].value).expanduser()
        try:
            if action == "save":
                if self.budget is None:
                    raise DomainError("nothing to save: the budget is not valid")
                self.budget.save(path)
                self.file_status.value = f"saved {escape_html(path)}"
            else:
                budget = Budget.load(path)
                self.set(**values_of(budget))
                self.file_status.value = f"loaded {escape_html(path)}" if not self.error else ""
        except (DomainError, ValueError, OSError) as err:
            self.file_status.value = ""
            self._show_message(f"{action} failed: {err}")

    # ------------------------------------------------------------------ figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 3.6)
        self.axes = fig.add_subplot()
        self.axes.set_title("vehicle mass, line by line", fontsize="medium", pad=22)  # above the legend
        fig.subplots_adjust(left=0.105, right=0.985, bottom=0.3, top=0.84)
