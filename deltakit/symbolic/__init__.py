"""Symbolic layer: manoeuvre closed forms derived with SymPy, with their steps.

Importing this package imports SymPy (``import deltakit`` alone does not).
Each catalog entry is derived from first principles (energy and angular
momentum conservation, momentum conservation for ejection) by SymPy
manipulation, and exports to LaTeX (``align*``), Markdown and a NumPy
callable whose keywords match the numeric layer's twin.

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> from deltakit.symbolic import derive
>>> d = derive("hohmann")
>>> d.twin
'deltakit.hohmann:total'
>>> "hohmann" in catalog()
True
"""

from __future__ import annotations

from . import departure, energetics, interplanetary, orbits, space, transfers  # noqa: F401  (importing registers the entries)
from ._registry import UnknownEntry, catalog, derive, titles
from .derivation import Derivation, Meaning
from .report import report

__all__ = ["Derivation", "Meaning", "UnknownEntry", "catalog", "derive", "report", "titles"]
