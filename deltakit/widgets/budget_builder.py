"""BudgetBuilder: a delta-v budget built line by line, with its mass waterfall.

Lines come from a typed delta-v or from a manoeuvre formula with its
parameters (Hohmann, bi-elliptic, plane change, escape, capture); each can
carry a margin and its own specific impulse. Select a line to edit it, move it
up or down, or remove it. The waterfall shows the mass after each line; the
readouts give the totals. Save and load go through :class:`deltakit.Budget`
files (atomic, versioned JSON; a foreign or damaged file is refused and left
as it is); Markdown, LaTeX and CSV exports are shown and offered as downloads.

Default case: the invented Halyard tug (:mod:`deltakit.demo`) taking cargo
from a 400 km Earth orbit to a 100 km lunar orbit.
"""

from __future__ import annotations

import base64
import html
import math
import tempfile
from pathlib import Path
from typing import Any, ClassVar

import ipywidgets as widgets

from ..budget import Budget
from ..constants import BODIES, EARTH, G0, MOON
from ..demo import HALYARD, LUNAR_ORBIT_ALTITUDE, MOON_DISTANCE
from ..errors import DomainError
from ..plotting.waterfall import update_budget_waterfall
from ..transfers import hohmann
from ..twobody import circular_speed
from ._base import Panel, json_ready, number, number_width
from ._formulas import FORMULAS, evaluate

__all__ = ["BudgetBuilder", "default_lines"]

DEG = math.pi / 180.0


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
            "isp": None,
        },
        {
            "label": "course corrections",
            "formula": "number",
            "params": {"dv": 40.0},
            "margin": 0.0,
            "isp": None,
        },
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
            "isp": None,
        },
        {
            "label": "plane trim at the Moon",
            "formula": "plane_change",
            "params": {"v": round(float(circular_speed(low_lunar, MOON.mu)), 1), "angle": 3 * DEG},
            "margin": 0.0,
            "isp": None,
        },
    ]


def _clean_line(line: Any, number: int) -> dict[str, Any]:
    """A line recipe checked and normalised (SI), or DomainError naming the line."""
    if not isinstance(line, dict):
        raise DomainError(f"line {number} must be a dict, not {type(line).__name__}")
    formula = line.get("formula", "number")
    if formula not in FORMULAS:
        raise DomainError(f"line {number}: `formula` must be one of {list(FORMULAS)}, not {formula!r}")
    params = dict(line.get("params", {}))
    isp = line.get("isp")
    return {
        "label": str(line.get("label", f"line {number + 1}")),
        "formula": formula,
        "params": {p.key: params.get(p.key, p.default) for p in FORMULAS[formula].parameters},
        "margin": float(line.get("margin", 0.0)),
        "isp": None if isp in (None, 0, 0.0) else float(isp),
    }


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
        ``formula`` a key of ``FORMULAS`` and ``params`` in SI; None gives the
        Halyard example.
    path : str
        File for save and load.

    Examples
    --------
    >>> from deltakit.widgets import BudgetBuilder
    >>> panel = BudgetBuilder(m0=1000.0, isp=300.0, dry_mass=0.0,
    ...                       lines=[{"label": "burn", "formula": "number", "params": {"dv": 500.0}}])
    >>> round(panel.results["final_mass"], 1)
    843.7
    """

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
        self._lines: list[dict[str, Any]] = [
            _clean_line(line, i) for i, line in enumerate(default_lines() if lines is None else lines)
        ]
        self._control(
            "name", widgets.Text(value=name, description="budget name", layout=widgets.Layout(width="420px"))
        )
        self._control("m0", number("starting mass (kg)", m0), 1.0)
        self._control("isp", number("specific impulse (s)", isp), 1.0)
        self._control("dry_mass", number("dry mass (kg, 0: not given)", dry_mass), 1.0)
        self._control(
            "lines",
            widgets.Select(options=[], rows=6, description="lines", layout=widgets.Layout(width="640px")),
        )
        self._control(
            "path", widgets.Text(value=path, description="file", layout=widgets.Layout(width="420px"))
        )
        self.budget: Budget | None = None
        self._waterfall = None
        self._build_editor()
        self._build_exports()
        self._build_figure()
        self._finish(
            "Budget builder: lines, propellant, mass after each line",
            [["name"], ["m0", "isp", "dry_mass"], ["lines"]],
            extra=[self._editor_box, self._file_box],
        )
        self.children = (*self.children[:-2], self._export_box, *self.children[-2:])
        self._select(0 if self._lines else None)

    # ------------------------------------------------------------------ values
    def _si(self, name: str) -> Any:
        if name == "lines":
            return json_ready([dict(line, params=dict(line["params"])) for line in self._lines])
        return super()._si(name)

    def _assign(self, name: str, value: Any) -> None:
        if name == "lines":
            if not isinstance(value, (list, tuple)):
                raise DomainError(f"`lines` must be a list of line dicts, not {type(value).__name__}")
            self._lines = [_clean_line(line, i) for i, line in enumerate(value)]
            return
        super()._assign(name, value)

    def _on_change(self, change: dict[str, Any]) -> None:
        if change["owner"] is self.controls["lines"]:
            self._select(change["new"])  # choosing a line only fills the editor
            return
        if change["owner"] is self.controls["path"]:
            return
        super()._on_change(change)

    # ------------------------------------------------------------------ editor
    def _build_editor(self) -> None:
        style = {"description_width": "initial"}
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
                description="margin (%)",
                style=style,
                layout=widgets.Layout(width=number_width("margin (%)")),
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
        self._editor_box = widgets.VBox(
            [
                widgets.HTML("<b>Line editor</b> (select a line above to edit it)"),
                widgets.HBox([self.form["label"], self.form["formula"]]),
                *boxes,
                widgets.HBox([self.form["margin"], self.form["isp"]]),
                widgets.HBox(list(self.buttons.values()), layout=widgets.Layout(flex_flow="row wrap")),
            ],
            layout=widgets.Layout(border="1px solid #d0d7de", padding="4px", margin="4px 0"),
        )
        self._show_params("number")

    def _show_params(self, formula: str) -> None:
        for key, box in self._param_boxes.items():
            box.layout.display = None if key == formula else "none"

    def _form_line(self) -> dict[str, Any]:
        formula = self.form["formula"].value
        params = {}
        for p in FORMULAS[formula].parameters:
            value = self._param_widgets[formula][p.key].value
            params[p.key] = value if p.scale is None else float(value) * p.scale
        margin = float(self.form["margin"].value) / 100.0
        if margin < 0.0:
            raise DomainError(f"margin must be >= 0 % (got {margin * 100:g} %)")
        isp = float(self.form["isp"].value)
        if isp < 0.0:
            raise DomainError(
                f"a line's own specific impulse must be > 0 s, or 0 for the budget's (got {isp:g} s)"
            )
        line = _clean_line(
            {
                "label": self.form["label"].value,
                "formula": formula,
                "params": params,
                "margin": margin,
                "isp": isp or None,
            },
            len(self._lines),
        )
        evaluate(formula, line["params"])  # refuse a line with no solution before it enters the budget
        return line

    def _select(self, index: int | None) -> None:
        if index is None or not 0 <= index < len(self._lines):
            return
        line = self._lines[index]
        self.form["label"].value = line["label"]
        self.form["formula"].value = line["formula"]
        for p in FORMULAS[line["formula"]].parameters:
            value = line["params"][p.key]
            self._param_widgets[line["formula"]][p.key].value = (
                value if p.scale is None else round(value / p.scale, 9)
            )
        self.form["margin"].value = round(line["margin"] * 100.0, 9)
        self.form["isp"].value = line["isp"] or 0.0

    def _edit(self, action: str) -> None:
        """Apply an editor button; problems go to the message line, never raise."""
        selected = self.controls["lines"].value
        try:
            lines = list(self._lines)
            if action == "add":
                lines.append(self._form_line())
                selected = len(lines) - 1
            elif selected is None or not 0 <= selected < len(lines):
                raise DomainError("select a line first")
            elif action == "update":
                lines[selected] = self._form_line()
            elif action == "remove":
                del lines[selected]
                selected = min(selected, len(lines) - 1) if lines else None
            elif action in ("up", "down"):
                target = selected - 1 if action == "up" else selected + 1
                if 0 <= target < len(lines):
                    lines[selected], lines[target] = lines[target], lines[selected]
                    selected = target
        except (DomainError, ValueError) as err:
            self._show_message(str(err))
            return
        self.set(lines=lines)
        self._select_quietly(selected)

    def _select_quietly(self, index: int | None) -> None:
        select = self.controls["lines"]
        if index is not None and 0 <= index < len(select.options):
            select.value = index

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
        self._file_box = widgets.HBox([self.controls["path"], *self.file_buttons.values(), self.file_status])
        self.export_format = widgets.ToggleButtons(
            options=["Markdown", "LaTeX", "CSV"], value="Markdown", description="export"
        )
        self.export_text = widgets.Textarea(value="", layout=widgets.Layout(width="100%", height="150px"))
        self.export_text.add_class("deltakit-export-text")
        self.export_link = widgets.HTML("")
        self.export_link.add_class("deltakit-download")
        self.export_format.observe(lambda _: self._show_export(), names="value")
        self._export_box = widgets.VBox([self.export_format, self.export_text, self.export_link])

    def exports(self) -> dict[str, str]:
        """The budget as Markdown, LaTeX and CSV text."""
        if self.budget is None:
            return {"Markdown": "", "LaTeX": "", "CSV": ""}
        with tempfile.TemporaryDirectory() as folder:
            csv = self.budget.to_csv(Path(folder) / "budget.csv").read_text()
        return {"Markdown": self.budget.to_markdown(), "LaTeX": self.budget.to_latex(), "CSV": csv}

    def _show_export(self) -> None:
        kind = self.export_format.value
        text = self.exports()[kind]
        self.export_text.value = text
        suffix, mime = {
            "Markdown": ("md", "text/markdown"),
            "LaTeX": ("tex", "application/x-tex"),
            "CSV": ("csv", "text/csv"),
        }[kind]
        stem = (
            "".join(c if c.isalnum() or c in "-_" else "-" for c in self.controls["name"].value).strip("-")
            or "budget"
        )
        data = base64.b64encode(text.encode("utf-8")).decode("ascii")
        self.export_link.value = (
            f'<a download="{html.escape(stem)}.{suffix}" href="data:{mime};base64,{data}">'
            f"Download {kind} ({stem}.{suffix})</a>"
        )

    def _file(self, action: str) -> None:
        path = Path(self.controls["path"].value).expanduser()
        try:
            if action == "save":
                if self.budget is None:
                    raise DomainError("nothing to save: the budget is not valid")
                data = self.budget.to_dict()
                for entry, line in zip(data["lines"], self._lines):
                    # keep the formula and its parameters with the line, so a load can edit them again
                    entry["source"] = dict(
                        entry["source"],
                        formula=line["formula"],
                        params=json_ready(line["params"]),
                        isp=line["isp"],
                    )
                Budget.from_dict(data).save(path)
                self.file_status.value = f"saved {html.escape(str(path))}"
            else:
                budget = Budget.load(path)
                lines = []
                for line in budget.lines:
                    source = line.source
                    if "formula" in source and source["formula"] in FORMULAS:
                        recipe = {
                            "formula": source["formula"],
                            "params": source.get("params", {}),
                            "isp": source.get("isp"),
                        }
                    else:
                        recipe = {
                            "formula": "number",
                            "params": {"dv": line.dv},
                            "isp": None if line.ve is None else line.ve / G0,
                        }
                    lines.append({"label": line.label, "margin": line.margin, **recipe})
                self.set(
                    name=budget.name,
                    m0=budget.m0,
                    isp=budget.ve / G0,
                    dry_mass=budget.dry_mass or 0.0,
                    lines=lines,
                )
                self.file_status.value = f"loaded {html.escape(str(path))}"
        except (DomainError, ValueError, OSError) as err:
            self.file_status.value = ""
            self._show_message(f"{action} failed: {err}")

    # ------------------------------------------------------------------ figure and update
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 3.6)
        self.axes = fig.add_subplot()
        self.axes.set_title("vehicle mass, line by line", fontsize="medium")
        fig.subplots_adjust(left=0.09, right=0.985, bottom=0.3, top=0.9)

    def _build_budget(self, v: dict[str, Any]) -> Budget:
        if not v["m0"] > 0.0:
            raise DomainError(f"starting mass must be > 0 kg (got {v['m0']:g} kg).")
        if not v["isp"] > 0.0:
            raise DomainError(f"specific impulse must be > 0 s (got {v['isp']:g} s).")
        dry = v["dry_mass"]
        if dry < 0.0 or (dry and dry >= v["m0"]):
            raise DomainError(
                f"dry mass must be between 0 and the starting mass {v['m0']:g} kg (got {dry:g} kg)."
            )
        budget = Budget(v["m0"], v["isp"] * G0, v["name"], dry_mass=dry or None)
        for index, line in enumerate(self._lines):
            try:
                result = evaluate(line["formula"], line["params"])
            except DomainError as err:
                raise DomainError(f"line {index + 1} ({line['label']}): {err}") from None
            ve = None if line["isp"] is None else line["isp"] * G0
            budget.add(line["label"], result, ve=ve, margin=line["margin"])
        return budget

    def _update(self, changed: set[str]) -> None:
        budget = self._build_budget(self.values)
        self._waterfall = update_budget_waterfall(self.axes, self._waterfall, budget)
        self.budget = budget
        select = self.controls["lines"]
        selected = select.value
        self._holding = True
        try:
            select.options = [(self._describe(i, line, budget), i) for i, line in enumerate(budget.lines)]
            select.value = selected if selected is not None and selected < len(budget.lines) else None
        finally:
            self._holding = False
        left = budget.propellant_left
        self._results = {
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
        self._show_readouts(self._results, notes)
        self._show_export()

    @staticmethod
    def _describe(index: int, line: Any, budget: Budget) -> str:
        after = float(budget.mass_after[index])
        margin = f" +{line.margin * 100:g} %" if line.margin else ""
        return f"{index + 1}. {line.label}: {line.dv:,.1f} m/s{margin} -> {after:,.1f} kg"
