"""BudgetBuilder: a delta-v budget built line by line, with its mass waterfall.

Lines come from a typed delta-v or from a manoeuvre formula with its
parameters (Hohmann, bi-elliptic, plane change, escape, capture); each can
carry a margin and its own specific impulse. Select a line to edit it, move it
up or down, or remove it. The waterfall shows the mass after each line; the
readouts give the totals. Save and load go through :class:`deltakit.Budget`
files (atomic, versioned JSON; a foreign or damaged file is refused and left
as it is); Markdown, LaTeX and CSV exports are shown and offered as downloads.

The panel's model of the lines is its :attr:`BudgetBuilder.budget`, a
:class:`deltakit.Budget` edited with the budget's own methods (add, replace,
move, remove). A line made from a formula keeps the formula and its
parameters in its ``source``, so a saved budget opens again with its lines
editable. ``values["lines"]`` reads the lines back as recipes ``{"label",
"formula", "params", "margin", "isp"}``; margins are fractions there, as in
:meth:`deltakit.Budget.add` (0.05 = +5 %), and the editor shows them in percent.

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
from ..constants import BODIES, EARTH, G0, MOON
from ..demo import HALYARD, LUNAR_ORBIT_ALTITUDE, MOON_DISTANCE
from ..errors import DomainError
from ..plotting.waterfall import update_budget_waterfall
from ..transfers import hohmann
from ..twobody import circular_speed
from ..units import deg, percent
from ._base import Computed, InputError, Panel, _Plan, _round_si, json_ready, number, number_width
from ._formulas import FORMULAS, evaluate

__all__ = ["BudgetBuilder", "default_lines"]


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


def _recipe(line: Any, number: int) -> dict[str, Any]:
    """A line recipe checked and completed (SI; margin a fraction), or DomainError naming the line."""
    if not isinstance(line, Mapping):
        raise DomainError(f"line {number + 1} must be a dict, not {type(line).__name__}")
    formula = line.get("formula", "number")
    if formula not in FORMULAS:
        raise DomainError(f"line {number + 1}: `formula` must be one of {list(FORMULAS)}, not {formula!r}")
    params = dict(line.get("params", {}))
    label = line.get("label", f"line {number + 1}")
    if not isinstance(label, str):
        raise DomainError(f"line {number + 1}: `label` must be text, not {type(label).__name__}")
    isp = line.get("isp")
    return {
        "label": label,
        "formula": formula,
        "params": {p.key: params.get(p.key, p.default) for p in FORMULAS[formula].parameters},
        "margin": float(line.get("margin", 0.0)),
        "isp": None if isp in (None, 0, 0.0) else float(isp),
    }


def recipes(budget: Budget) -> list[dict[str, Any]]:
    """A budget's lines as recipes: a formula and its parameters where the line came from one."""
    out = []
    for line in budget.lines:
        source = line.source
        formula = source.get("formula") if source.get("formula") in FORMULAS else "number"
        params = dict(source.get("params", {})) if formula != "number" else {"dv": line.dv}
        out.append(
            {
                "label": line.label,
                "formula": formula,
                "params": params,
                "margin": line.margin,
                "isp": None if line.ve is None else _round_si(line.ve / G0),
            }
        )
    return out


def _with_recipes(budget: Budget, lines: list[dict[str, Any]], indices: range | list[int]) -> Budget:
    """The budget with the formula and parameters of ``lines`` kept in the sources of those lines."""
    data = budget.to_dict()
    for index in indices:
        line = lines[index]
        if line["formula"] != "number":
            entry = data["lines"][index]
            params = json_ready(line["params"])
            entry["source"] = dict(entry["source"], formula=line["formula"], params=params)
    return Budget.from_dict(data)


def _line_dv(line: dict[str, Any], index: int) -> Any:
    try:
        return evaluate(line["formula"], line["params"])
    except (DomainError, TypeError, ValueError) as err:
        raise InputError(f"line {index + 1} ({one_line(line['label'])}): {err}", "lines") from None


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
    """Build, edit, save and export a delta-v budget.

    Parameters (keyword-only, SI)
    -----------------------------
    name : str
        Title of the budget.
    m0 : float
        Vehicle mass at the start, kg.
    isp : float
        Specific impulse of the main engine, s (lines may override).
    dry_mass : float
        Mass without usable propellant, kg; 0 for "not given" (then every
        budget closes; with it, a line that burns below it is infeasible).
    lines : list of dict or None
        Line recipes ``{"label", "formula", "params", "margin", "isp"}`` with
        ``formula`` a key of ``FORMULAS``, ``params`` in SI and ``margin`` a
        fraction (0.05 = +5 %); None gives the Halyard example.
    path : str
        File for save and load.

    Examples
    --------
    >>> from deltakit.widgets import BudgetBuilder
    >>> panel = BudgetBuilder(m0=1000.0, isp=300.0, dry_mass=0.0,
    ...                       lines=[{"label": "burn", "formula": "number", "params": {"dv": 500.0}}])
    >>> round(panel.results["final_mass"], 1)
    843.7
    >>> round(float(panel.budget.propellant), 1)
    156.3
    """

    #: a budget that does not close has no final mass; without a dry mass, no propellant left
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset({"propellant", "final_mass", "propellant_left"})
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "total_dv": ("total delta-v (with margins)", 1.0, "m/s"),
        "propellant": ("propellant used", 1.0, "kg"),
        "final_mass": ("mass at the end", 1.0, "kg"),
        "propellant_left": ("usable propellant left", 1.0, "kg"),
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
    ) -> None:
        super().__init__()
        #: The budget the panel shows (the last valid one), lines and all.
        self.budget: Budget | None = None
        self._control(
            "name", widgets.Text(value="", description="budget name", layout=widgets.Layout(width="420px"))
        )
        self._control("m0", number("starting mass (kg)", 0.0), 1.0, "kg")
        self._control("isp", number("specific impulse (s)", 0.0), 1.0, "s")
        self._control("dry_mass", number("dry mass (kg, 0: not given)", 0.0), 1.0, "kg")
        self._control(
            "lines",
            widgets.Select(options=[], rows=6, description="lines", layout=widgets.Layout(width="640px")),
        )
        self._control(
            "path", widgets.Text(value="", description="file", layout=widgets.Layout(width="340px"))
        )
        self._waterfall = None
        self._build_editor()
        self._build_exports()
        self._build_figure()
        self._finish(
            "Budget builder: lines, propellant, mass after each line",
            [["name"], ["m0", "isp", "dry_mass"], ["lines"]],
            initial={
                "name": name,
                "m0": m0,
                "isp": isp,
                "dry_mass": dry_mass,
                "lines": default_lines() if lines is None else lines,
                "path": path,
            },
            extra=[self._editor_box, self._file_box],
            below=[self._export_box],
        )
        self._select(0 if self.budget.lines else None)

    # ------------------------------------------------------------------ values
    def _si(self, name: str) -> Any:
        if name == "lines":
            return json_ready(recipes(self.budget)) if self.budget is not None else []
        return super()._si(name)

    def _plan(self, name: str, value: Any) -> _Plan:
        if name != "lines":
            return super()._plan(name, value)
        if not isinstance(value, (list, tuple)):
            raise DomainError(f"`lines` must be a list of line dicts, not {type(value).__name__}")
        return _Plan([_recipe(line, i) for i, line in enumerate(value)], lambda: None)

    def _on_change(self, change: dict[str, Any]) -> None:
        if change["owner"] is self.controls["lines"]:
            self._select(change["new"])  # choosing a line only fills the editor
            return
        if change["owner"] is self.controls["path"]:
            return
        super()._on_change(change)

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """The budget of ``values`` (SI, keyed like the controls; lines as recipes) and its totals."""
        m0, isp, dry = values["m0"], values["isp"], values["dry_mass"]
        if not m0 > 0.0:
            raise InputError(f"starting mass must be > 0 kg (got {m0:g} kg).", "m0")
        if not isp > 0.0:
            raise InputError(f"specific impulse must be > 0 s (got {isp:g} s).", "isp")
        if dry < 0.0 or (dry and dry >= m0):
            raise InputError(
                f"dry mass must be between 0 and the starting mass {m0:g} kg (got {dry:g} kg).", "dry_mass"
            )
        lines = [_recipe(line, i) for i, line in enumerate(values["lines"])]
        budget = Budget(m0, isp * G0, values["name"], dry_mass=dry or None)
        for index, line in enumerate(lines):
            margin = line["margin"]
            if not 0.0 <= margin <= 1.0:
                raise InputError(
                    f"line {index + 1} ({one_line(line['label'])}): margin {margin / percent:g} % must be "
                    "between 0 and 100 % of the line's delta-v (+5 % is 5 in the editor, 0.05 in code).",
                    "lines",
                )
            if line["isp"] is not None and not line["isp"] > 0.0:
                raise InputError(
                    f"line {index + 1} ({one_line(line['label'])}): its own specific impulse must be > 0 s.",
                    "lines",
                )
            ve = None if line["isp"] is None else line["isp"] * G0
            budget.add(line["label"], _line_dv(line, index), ve=ve, margin=margin)
        budget = _with_recipes(budget, lines, range(len(lines)))
        left = budget.propellant_left
        results = {
            "total_dv": float(budget.total_dv),
            "propellant": float(budget.propellant),
            "final_mass": float(budget.final_mass),
            "propellant_left": float(left) if left is not None else math.nan,
            "mass_after": [float(m) for m in budget.mass_after],
            "propellant_per_line": [float(m) for m in budget.propellant_per_line],
        }
        notes = []
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
        self._show_export()

    @staticmethod
    def _describe(index: int, line: Any, budget: Budget) -> str:
        after = float(budget.mass_after[index])
        margin = f" +{line.margin / percent:g} %" if line.margin else ""
        return f"{index + 1}. {one_line(line.label)}: {line.dv:,.1f} m/s{margin} -> {after:,.1f} kg"

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
        self._editor_box = widgets.VBox(
            [
                widgets.HTML("<b>Line editor</b> (select a line above to edit it)"),
                widgets.HBox([self.form["label"], self.form["formula"]], layout=wrap),
                *boxes,
                widgets.HBox([self.form["margin"], self.form["isp"]], layout=wrap),
                widgets.HBox(list(self.buttons.values()), layout=wrap),
            ],
            layout=widgets.Layout(border="1px solid #d0d7de", padding="4px", margin="4px 0"),
        )
        self._show_params("number")

    def _show_params(self, formula: str) -> None:
        for key, box in self._param_boxes.items():
            box.layout.display = None if key == formula else "none"

    def _form_line(self) -> dict[str, Any]:
        """The editor's line as a recipe (SI), or DomainError saying what is wrong with it."""
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
        line = _recipe(
            {
                "label": self.form["label"].value,
                "formula": formula,
                "params": params,
                "margin": margin * percent,
                "isp": isp or None,
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
        self.form["formula"].value = line["formula"]
        for p in FORMULAS[line["formula"]].parameters:
            value = line["params"][p.key]
            self._param_widgets[line["formula"]][p.key].value = (
                value if p.scale is None else round(value / p.scale, 9)
            )
        self.form["margin"].value = round(line["margin"] / percent, 9)
        self.form["isp"].value = line["isp"] or 0.0

    def _edit(self, action: str) -> None:
        """Apply an editor button to a copy of the budget; problems go to the message line, never raise."""
        selected = self.controls["lines"].value
        try:
            budget = Budget.from_dict(self.budget.to_dict())
            if action == "add":
                line = self._form_line()
                budget.add(line["label"], _line_dv(line, len(budget.lines)), **self._burn(line))
                selected = len(budget.lines) - 1
                budget = _with_recipes(budget, [*recipes(budget)[:-1], line], [selected])
            elif selected is None or not 0 <= selected < len(budget.lines):
                raise DomainError("select a line first")
            elif action == "update":
                line = self._form_line()
                budget.replace(selected, line["label"], _line_dv(line, selected), **self._burn(line))
                lines = recipes(budget)
                lines[selected] = line
                budget = _with_recipes(budget, lines, [selected])
            elif action == "remove":
                budget.remove(selected)
                selected = min(selected, len(budget.lines) - 1) if budget.lines else None
            elif action in ("up", "down"):
                target = selected - 1 if action == "up" else selected + 1
                if 0 <= target < len(budget.lines):
                    budget.move(selected, target)
                    selected = target
        except (DomainError, ValueError) as err:
            self._show_message(str(err))
            return
        self.set(lines=recipes(budget))
        select = self.controls["lines"]
        if selected is not None and 0 <= selected < len(select.options):
            select.value = selected

    @staticmethod
    def _burn(line: dict[str, Any]) -> dict[str, Any]:
        """A recipe's exhaust velocity and margin as :meth:`Budget.add` takes them."""
        return {"ve": None if line["isp"] is None else line["isp"] * G0, "margin": line["margin"]}

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
                self.set(
                    name=budget.name,
                    m0=budget.m0,
                    isp=_round_si(budget.ve / G0),
                    dry_mass=budget.dry_mass or 0.0,
                    lines=recipes(budget),
                )
                self.file_status.value = f"loaded {escape_html(path)}" if not self.error else ""
        except (DomainError, ValueError, OSError) as err:
            self.file_status.value = ""
            self._show_message(f"{action} failed: {err}")

    # ------------------------------------------------------------------ figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 3.6)
        self.axes = fig.add_subplot()
        self.axes.set_title("vehicle mass, line by line", fontsize="medium", pad=22)  # above the legend
        fig.subplots_adjust(left=0.09, right=0.985, bottom=0.3, top=0.84)
