"""A budget as tables: pandas frames, Markdown, LaTeX and CSV, and the files they are saved to.

Every table shows nominal delta-v, margin and delta-v with margin as separate
columns and says that margins are fractions of each line's delta-v, shown in
percent. Every user string (budget name, labels, system and stage names)
reaches Markdown and LaTeX through :mod:`deltakit._text`, so it shows as typed
and never becomes markup or a command. Exports written to a file go through
:func:`deltakit._files.write_atomic`, which replaces only an export of the same
kind (recognised by its first lines) unless told ``overwrite=True``.
"""

from __future__ import annotations

import math
import os
from typing import TYPE_CHECKING, Any

import numpy as np

from ._files import write_atomic
from ._text import CAUTION, escape_latex, escape_markdown

if TYPE_CHECKING:
    from .budget import Budget

__all__ = ["latex", "lines_frame", "markdown", "mass_frame", "systems_frame", "write_text"]

#: Said under every table: which convention the margin columns show.
CONVENTION = "Margins are fractions of each line's delta-v, shown in % and in m/s."
#: First line of a LaTeX export, which tells our own exports from other files.
LATEX_MARK = "% deltakit budget table"

KIND_WORDS = {"burn": "burn", "jettison": "jettison", "add_mass": "added mass", "drop_stage": "stage drop"}

# (key, header) of the frame and CSV columns, unit in the header.
LINE_COLUMNS = (
    ("label", "label"),
    ("kind", "kind"),
    ("system", "system"),
    ("category", "category"),
    ("source", "source"),
    ("dv", "dv (m/s)"),
    ("margin_percent", "margin (% of dv)"),
    ("margin_dv", "margin (m/s)"),
    ("dv_with_margin", "dv with margin (m/s)"),
    ("margin_from_policy", "margin from policy"),
    ("ve", "ve (m/s)"),
    ("mass_event", "mass event (kg)"),
    ("mass_before", "mass before (kg)"),
    ("propellant", "propellant (kg)"),
    ("mass_after", "mass after (kg)"),
)
SYSTEM_COLUMNS = (
    ("system", "system"),
    ("stage", "stage"),
    ("ve", "ve (m/s)"),
    ("load", "load (kg)"),
    ("usable", "usable (kg)"),
    ("used", "used (kg)"),
    ("left", "left (kg)"),
    ("shortfall", "shortfall (kg)"),
    ("runs_dry_at", "runs dry at line"),
)
MASS_COLUMNS = (
    ("item", "item"),
    ("maturity", "maturity"),
    ("nominal", "nominal (kg)"),
    ("growth_percent", "growth (%)"),
    ("growth", "growth (kg)"),
    ("total", "total (kg)"),
)
_CSV_HEADS = ("line," + ",".join(h for _, h in LINE_COLUMNS), "line,label,source,dv (m/s),margin (%)")


def describe_source(line: Any) -> str:
    """Where a line's numbers come from, in words."""
    if line.kind == "drop_stage":
        return f"stage {line.stage}"
    if line.kind != "burn":
        return "mass event"
    source = line.source
    if "formula" in source:
        return f"formula {source['formula']}"
    if source.get("kind") == "transfer":
        count = len(source.get("burns", []))
        return f"{source.get('type', 'transfer')} ({count} burn{'s' if count != 1 else ''})"
    return "entered"


def line_rows(budget: Budget) -> list[dict[str, Any]]:
    before, after, burned = budget._per_line()
    ve = budget.line_ve
    rows = []
    for i, line in enumerate(budget.lines):
        if line.kind == "burn":
            event = 0.0
        elif line.kind == "add_mass":
            event = line.mass
        elif line.kind == "jettison":
            event = -line.mass
        else:
            event = float(after[i] - before[i])
        rows.append(
            {
                "label": line.label,
                "kind": KIND_WORDS[line.kind],
                "system": (line.system or budget.main_system or "") if line.kind == "burn" else "",
                "category": line.category or "",
                "source": describe_source(line),
                "dv": line.dv,
                "margin_percent": 100.0 * line.margin,
                "margin_dv": line.margin_dv,
                "dv_with_margin": line.dv_with_margin,
                "margin_from_policy": line.margin_from_policy,
                "ve": float(ve[i]),
                "mass_event": event,
                "mass_before": float(before[i]),
                "propellant": float(burned[i]),
                "mass_after": float(after[i]),
            }
        )
    return rows


def system_rows(budget: Budget) -> list[dict[str, Any]]:
    rows = []
    for name, use in budget.usage.items():
        rows.append(
            {
                "system": name,
                "stage": budget.systems[name].stage or "",
                "ve": use.ve,
                "load": use.load,
                "usable": use.usable,
                "used": use.used,
                "left": use.left,
                "shortfall": use.shortfall,
                "runs_dry_at": None if use.runs_dry_at is None else use.runs_dry_at + 1,
            }
        )
    return rows


def mass_rows(budget: Budget) -> list[dict[str, Any]]:
    resolved = budget._resolve()
    rows = []

    def item(name: str, maturity: str | None, nominal: float | None, total: float | None) -> None:
        if nominal is None or total is None:
            rows.append(
                dict(
                    item=name,
                    maturity="",
                    nominal=math.nan,
                    growth_percent=math.nan,
                    growth=math.nan,
                    total=math.nan,
                )
            )
            return
        growth = total - nominal
        rows.append(
            dict(
                item=name,
                maturity=maturity or "",
                nominal=nominal,
                growth_percent=100.0 * growth / nominal if nominal else 0.0,
                growth=growth,
                total=total,
            )
        )

    item("dry mass", budget.dry_maturity, resolved.dry_nominal, resolved.dry_with_growth)
    for stage, total in zip(budget.stages.values(), resolved.stage_dry):
        item(f"stage {stage.name} (dry)", stage.maturity, stage.dry_mass, total)
    for system in budget.systems.values():
        load = system.propellant if system.propellant is not None else resolved.implicit_load
        item(f"propellant: {system.name}", None, load, load)
    item("start mass", None, float(resolved.m0), float(resolved.m0))
    rows[-1]["nominal"] = sum(r["nominal"] for r in rows[:-1])
    rows[-1]["growth"] = float(resolved.m0) - rows[-1]["nominal"]
    rows[-1]["growth_percent"] = math.nan
    return rows


def _frame(rows: list[dict[str, Any]], columns: tuple[tuple[str, str], ...], name: str, index: str) -> Any:
    import pandas as pd

    frame = pd.DataFrame(
        {header: [row[key] for row in rows] for key, header in columns},
        index=pd.RangeIndex(1, len(rows) + 1, name=index),
    )
    frame.attrs["name"] = name
    return frame


def lines_frame(budget: Budget) -> Any:
    frame = _frame(line_rows(budget), LINE_COLUMNS, budget.name, "line")
    frame.attrs["convention"] = CONVENTION
    return frame


def systems_frame(budget: Budget) -> Any:
    return _frame(system_rows(budget), SYSTEM_COLUMNS, budget.name, "system number")


def mass_frame(budget: Budget) -> Any:
    return _frame(mass_rows(budget), MASS_COLUMNS, budget.name, "item number")


# ---------------------------------------------------------------------- text tables
def _number(value: float, digits: int, missing: str = "") -> str:
    return (
        missing
        if value is None or (isinstance(value, float) and math.isnan(value))
        else f"{value:.{digits}f}"
    )


def _shows(budget: Budget) -> dict[str, bool]:
    lines = budget.lines
    systems = budget.systems
    return {
        "kind": any(line.kind != "burn" for line in lines),
        "system": len(systems) > 1,
        "category": any(line.category for line in lines),
        "mass_event": any(line.kind != "burn" for line in lines),
        "systems": any(s.propellant is not None for s in systems.values()) or budget.dry_mass is not None,
        "masses": bool(budget.stages) or len(systems) > 1 or budget.dry_maturity is not None,
    }


def line_cells(budget: Budget) -> tuple[list[str], list[list[str]], list[str]]:
    """Headers, body rows and the total row of the lines table, as text."""
    shows = _shows(budget)
    keys = ["label"] + [k for k in ("kind", "system", "category") if shows[k]] + ["source"]
    keys += ["dv", "margin_percent", "margin_dv", "dv_with_margin", "ve"]
    keys += (["mass_event"] if shows["mass_event"] else []) + ["mass_before", "propellant", "mass_after"]
    headers = ["line"] + [dict(LINE_COLUMNS)[k] for k in keys]
    formats = {"dv": 1, "margin_percent": 1, "margin_dv": 1, "dv_with_margin": 1, "ve": 1, "mass_event": 2}
    body = []
    for number, row in enumerate(line_rows(budget), start=1):
        cells = [str(number)]
        for key in keys:
            value = row[key]
            if key in formats:
                is_event = row["kind"] != "burn"
                cells.append(
                    ""
                    if (is_event and key != "mass_event") or (not is_event and key == "mass_event")
                    else _number(value, formats[key])
                )
            elif key in ("mass_before", "propellant", "mass_after"):
                cells.append(_number(value, 2, missing="tank dry"))
            else:
                cells.append(str(value))
        body.append(cells)
    totals = {
        "label": "total",
        "dv": _number(float(np.sum(budget.dv)), 1),
        "margin_dv": _number(float(np.sum(budget.margin_dv)), 1),
        "dv_with_margin": _number(float(budget.total_dv), 1),
        "mass_before": _number(float(budget.m0), 2),
        "propellant": _number(float(budget.propellant), 2, missing="tank dry"),
        "mass_after": _number(float(budget.final_mass), 2, missing="tank dry"),
    }
    total = [""] + [totals.get(key, "") for key in keys]
    return headers, body, total


def system_cells(budget: Budget) -> tuple[list[str], list[list[str]]]:
    headers = [h for _, h in SYSTEM_COLUMNS]
    body = []
    for row in system_rows(budget):
        body.append(
            [
                row["system"],
                row["stage"],
                _number(row["ve"], 1),
                _number(row["load"], 2, missing="untracked"),
                _number(row["usable"], 2, missing="untracked"),
                _number(row["used"], 2),
                _number(row["left"], 2, missing="untracked"),
                _number(row["shortfall"], 2),
                "" if row["runs_dry_at"] is None else str(row["runs_dry_at"]),
            ]
        )
    return headers, body


def mass_cells(budget: Budget) -> tuple[list[str], list[list[str]]]:
    headers = [h for _, h in MASS_COLUMNS]
    body = [
        [
            row["item"],
            row["maturity"],
            _number(row["nominal"], 2, missing="unknown"),
            _number(row["growth_percent"], 1),
            _number(row["growth"], 2),
            _number(row["total"], 2, missing="unknown"),
        ]
        for row in mass_rows(budget)
    ]
    return headers, body


def verdict(budget: Budget) -> str:
    """One sentence: does the budget close, and if not, where and by how much."""
    if budget.closes:
        left = float(budget.propellant_left)
        return "The budget closes" + (
            "." if math.isnan(left) else f" with {left:.2f} kg of usable propellant left aboard."
        )
    parts = []
    for name, use in sorted(budget.usage.items(), key=lambda item: item[1].runs_dry_at or 0):
        if use.runs_dry_at is not None:
            line = budget.lines[use.runs_dry_at]
            parts.append(
                f"tank {name} runs dry at line {use.runs_dry_at + 1} ({line.label}), "
                f"{use.shortfall:.2f} kg short"
            )
    if not parts:
        index = budget.first_infeasible
        parts.append(
            f"line {index + 1} ({budget.lines[index].label}) cannot be flown: no system is left to fly it"
        )
    return "The budget does not close: " + "; ".join(parts) + "."


def policy_note(budget: Budget) -> str | None:
    policy = budget.policy
    if policy is None:
        return None
    return (
        f"Margin policy: {policy.name}. Source: {policy.source}"
        if policy.source
        else f"Margin policy: {policy.name}."
    )


def markdown(budget: Budget) -> str:
    def row(cells: list[str]) -> str:
        return "| " + " | ".join(escape_markdown(c) for c in cells) + " |"

    def table(headers: list[str], body: list[list[str]], total: list[str] | None, left: int) -> list[str]:
        align = [":---" if i < left else "---:" for i in range(len(headers))]
        align[0] = "---:" if headers[0] == "line" else ":---"
        out = [row(headers), "|" + "|".join(align) + "|"] + [row(cells) for cells in body]
        if total is not None:
            out.append(row(total).replace("| total |", "| **total** |", 1))
        return out

    shows = _shows(budget)
    headers, body, total = line_cells(budget)
    out = [f"**{escape_markdown(budget.name)}**", ""] if budget.name else []
    out += [f"*Delta-v budget. {CONVENTION}*", ""]
    out += table(headers, body, total, headers.index("source") + 1)
    if shows["systems"]:
        s_headers, s_body = system_cells(budget)
        out += ["", "**Propulsion systems**", ""] + table(s_headers, s_body, None, 2)
    if shows["masses"]:
        m_headers, m_body = mass_cells(budget)
        out += ["", "**Start mass**", ""] + table(m_headers, m_body, None, 2)
    out += ["", escape_markdown(verdict(budget))]
    note = policy_note(budget)
    if note:
        out += ["", escape_markdown(note)]
    out += ["", f"*{escape_markdown(CAUTION)}*"]
    return "\n".join(out)


def latex(budget: Budget, float_: bool = True, width: str | None = None) -> str:
    name = escape_latex(budget.name)
    title = f"{name}: " if budget.name else ""

    def block(
        headers: list[str], body: list[list[str]], total: list[str] | None, text_columns: int, caption: str
    ):
        spec = "".join(
            "r" if i == 0 and headers[0] == "line" else ("l" if i < text_columns else "r")
            for i in range(len(headers))
        )
        rows = [r"\begin{tabular}{" + spec + "}", r"\hline"]
        rows.append(" & ".join(escape_latex(h) for h in headers) + r" \\")
        rows.append(r"\hline")
        rows += [" & ".join(escape_latex(c) for c in cells) + r" \\" for cells in body]
        if total is not None:
            rows.append(r"\hline")
            rows.append(" & ".join(escape_latex(c) for c in total) + r" \\")
        rows += [r"\hline", r"\end{tabular}"]
        if width is not None:
            rows = [rf"\resizebox{{{width}}}{{!}}{{%"] + rows + ["}"]
        if not float_:
            return rows
        return [r"\begin{table}[htbp]", r"\centering", rf"\caption{{{caption}}}"] + rows + [r"\end{table}"]

    shows = _shows(budget)
    headers, body, total = line_cells(budget)
    out = [LATEX_MARK]
    out += block(
        headers,
        body,
        total,
        headers.index("source") + 1,
        f"{title}delta-v budget (margins in \\% of each line's delta-v)",
    )
    if shows["systems"]:
        s_headers, s_body = system_cells(budget)
        out += [""] + block(s_headers, s_body, None, 2, f"{title}propulsion systems")
    if shows["masses"]:
        m_headers, m_body = mass_cells(budget)
        out += [""] + block(m_headers, m_body, None, 2, f"{title}start mass (growth allowance by maturity)")
    return "\n".join(out) + "\n"


# ---------------------------------------------------------------------- files
def _is_markdown_export(head: bytes) -> bool:
    return b"| line | label |" in head and b"*Delta-v budget. " in head


def _is_latex_export(head: bytes) -> bool:
    return head.startswith(LATEX_MARK.encode())


def _is_csv_export(head: bytes) -> bool:
    first = head.split(b"\n", 1)[0].decode("utf-8", "replace")
    return any(first.startswith(h) for h in _CSV_HEADS)


_KINDS = {
    "markdown": ("budget Markdown export", _is_markdown_export),
    "latex": ("budget LaTeX export", _is_latex_export),
    "csv": ("budget CSV export", _is_csv_export),
}


def write_text(
    budget: Budget, fmt: str, content: str, path: str | os.PathLike[str] | None, overwrite: bool
) -> str:
    """Write ``content`` to ``path`` if given (refusing a file of another kind); return the content."""
    if path is not None:
        kind, same = _KINDS[fmt]
        write_atomic(path, content, kind=kind, same_kind=same, overwrite=overwrite)
    return content
