"""Notebook panels: ipywidgets boxes that answer as the analyst slides.

Each panel is an :class:`ipywidgets.VBox` made with keyword-only arguments
(all with defaults: a panel made with no arguments shows a meaningful case
around a real body and an invented vehicle), with ``.controls``, ``.values``
(SI), ``.figure``, ``.set(**values)`` and ``.export()``. Controls show km,
km/s, deg and s in their labels; values and exports are SI. Each panel's
maths is a pure class method, ``compute(values)``, callable without widgets;
``close()`` releases its figure and widgets.

Results are for preliminary analysis, not for flight operations; defer to the
mission's verified tools, local rules and licensed practice.
"""

from __future__ import annotations

import importlib
from typing import Any

from ._base import CAUTION, Computed, InputError, Panel

# Panel -> module; each loads on first use. A new panel is registered here (DEVELOPERS.md, "Adding a panel").
_PANELS = {
    "BurnPointExplorer": "burn_point",
    "PropellantTrade": "propellant",
    "TransferTrade": "transfer",
    "EscapeFlyby": "escape",
    "PlaneChangeExplorer": "plane_change",
    "LaunchDatePicker": "launch_dates",
    "BudgetBuilder": "budget_builder",
    "DispersionView": "dispersion_view",
    "FormulaSheet": "formula_sheet",
}

#: The names of the panels, in the order the notebooks meet them.
PANELS: tuple[str, ...] = tuple(_PANELS)

__all__ = [
    "CAUTION",
    "PANELS",
    "BudgetBuilder",
    "BurnPointExplorer",
    "Computed",
    "DispersionView",
    "EscapeFlyby",
    "FormulaSheet",
    "InputError",
    "LaunchDatePicker",
    "Panel",
    "PlaneChangeExplorer",
    "PropellantTrade",
    "TransferTrade",
]


def __getattr__(name: str) -> Any:
    module = _PANELS.get(name)
    if module is None:
        raise AttributeError(f"module 'deltakit.widgets' has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
