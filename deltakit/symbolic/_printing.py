"""Printing in the analyst's order: a sum starts with a term that is not negative.

SymPy sorts the terms of a sum by their symbols, so ``vp - vc`` prints as
``-v_c + v_p`` and ``v**2/2 - mu/r`` as ``-mu/r + v**2/2``. An analyst writes
the difference the other way round. The printers below only choose the order
in which the terms of each sum are written: the first term that carries no
minus sign goes first, the others keep SymPy's order. The expression printed
is the same expression (``tests/test_symbolic.py`` parses the text back and
compares).

Examples
--------
>>> import sympy as sp
>>> vp, vc = sp.symbols("v_p v_c", positive=True)
>>> sp.latex(vp - vc)
'- v_{c} + v_{p}'
>>> latex(vp - vc)
'v_{p} - v_{c}'
>>> text(vp - vc)
'v_p - v_c'
"""

from __future__ import annotations

from typing import Any

import sympy as sp
from sympy.printing.latex import LatexPrinter
from sympy.printing.str import StrPrinter

__all__ = ["latex", "text"]


def _leading_positive(terms: list[Any]) -> list[Any]:
    """``terms`` with the first one that has no minus sign moved to the front."""
    for index, term in enumerate(terms):
        if not term.could_extract_minus_sign():
            if index == 0:
                return terms
            return [term, *terms[:index], *terms[index + 1 :]]
    return terms  # every term is negative: nothing better to lead with


class _AnalystOrder:
    def _as_ordered_terms(self, expr: Any, order: Any = None) -> list[Any]:
        terms = super()._as_ordered_terms(expr, order=order)  # type: ignore[misc]
        return _leading_positive(list(terms)) if isinstance(expr, sp.Add) else terms


class _Latex(_AnalystOrder, LatexPrinter):
    pass


class _Text(_AnalystOrder, StrPrinter):
    pass


def latex(expr: Any, **settings: Any) -> str:
    """``sympy.latex`` in the analyst's order (same settings)."""
    return _Latex(settings).doprint(expr)


def text(expr: Any) -> str:
    """``str(expr)`` in the analyst's order; ``sympy.sympify`` reads it back."""
    return _Text().doprint(expr)
