"""A budget's tables as the BudgetBuilder shows them: lines (nominal, margin, total apart) and tanks.

The numbers come from the budget's own frames (:meth:`deltakit.Budget.to_frame`
and :meth:`~deltakit.Budget.systems_frame`); every name is escaped (pandas'
``to_html`` escapes by default), so a label is shown as typed.
"""

from __future__ import annotations

from typing import Any

from .._text import escape_html

__all__ = ["tables_html"]

LINE_COLUMNS = [
    "label",
    "kind",
    "system",
    "dv (m/s)",
    "margin (% of dv)",
    "margin (m/s)",
    "dv with margin (m/s)",
    "mass event (kg)",
    "propellant (kg)",
    "mass after (kg)",
]
SYSTEM_COLUMNS = [
    "system",
    "stage",
    "usable (kg)",
    "used (kg)",
    "left (kg)",
    "shortfall (kg)",
    "runs dry at line",
]
_STYLE = "border-collapse:collapse;font-size:0.85em;margin:4px 0"


def _html(frame: Any) -> str:
    return frame.to_html(
        index=False, escape=True, na_rep="\u2013", float_format=lambda x: f"{x:,.1f}", border=0
    ).replace('<table border="0" class="dataframe">', f'<table class="dataframe" style="{_STYLE}">', 1)


def tables_html(budget: Any) -> str:
    """The lines and the tanks of ``budget`` as two HTML tables, with the first dry line named."""
    lines = budget.to_frame()
    lines.insert(0, "line", range(1, len(lines) + 1))
    systems = budget.systems_frame()
    dry = budget.first_infeasible
    verdict = (
        "Every tank holds what its lines ask: the budget closes."
        if dry is None
        else f"First dry line: line {dry + 1}. The tanks are short by {float(budget.shortfall):,.1f} kg "
        "in all."
    )
    return (
        "<details open><summary><b>Lines</b> (nominal delta-v, margin and total apart)</summary>"
        f"{_html(lines[['line', *[c for c in LINE_COLUMNS if c in lines.columns]]])}</details>"
        "<details open><summary><b>Propellant by system</b></summary>"
        f"{_html(systems[[c for c in SYSTEM_COLUMNS if c in systems.columns]])}</details>"
        f'<div class="deltakit-budget-verdict">{escape_html(verdict)}</div>'
    )
