"""Fast SymPy manipulations for the derivations.

``sympy.solve`` simplifies every root and ``sympy.simplify`` tries dozens of
strategies: each costs a fraction of a second. Our expressions are rational
functions and square roots of positive symbols, for which combining fractions,
factoring, and splitting square roots is all that is needed.
"""

from __future__ import annotations

from typing import Any

import sympy as sp

__all__ = ["equation", "solve_for", "tidy"]


def equation(lhs: Any, rhs: Any) -> sp.Equality:
    """``lhs = rhs`` as a SymPy equation, unevaluated.

    ``sympy.Eq`` otherwise tries to prove or refute the equation from the
    symbols' assumptions, which costs a large part of a first derivation and
    decides nothing for the relations a derivation states.
    """
    return sp.Eq(lhs, rhs, evaluate=False)


def solve_for(equation: Any, unknown: sp.Symbol) -> list[sp.Expr]:
    """Roots of ``equation`` for ``unknown`` that respect its assumptions, unsimplified.

    SymPy's own root check substitutes each root back under every symbol's
    assumptions, which is slow; here a root is dropped when SymPy can tell
    from the root alone that it breaks the unknown's sign assumptions, or when
    it makes a denominator of the equation vanish.
    """
    expr = equation.lhs - equation.rhs if isinstance(equation, sp.Equality) else sp.sympify(equation)
    denominator = sp.denom(sp.together(expr))
    numerator = sp.numer(sp.together(expr))
    if numerator.is_polynomial(unknown) and sp.degree(numerator, unknown) <= 2:
        # linear or quadratic: the closed-form roots directly, no general solver
        roots = sp.roots(sp.Poly(sp.expand(numerator), unknown), multiple=True)
    else:
        roots = sp.solve(expr, unknown, simplify=False, rational=False, check=False)
    kept = []
    for root in roots:
        if unknown.is_positive and (root.is_positive is False or root.is_zero):
            continue
        if unknown.is_nonnegative and root.is_negative:
            continue
        if unknown.is_real and root.is_real is False:
            continue
        if denominator.has(unknown) and sp.cancel(denominator.subs(unknown, root)) == 0:
            continue
        kept.append(root)
    return kept


def _root(power: sp.Pow) -> sp.Expr:
    return sp.sqrt(sp.factor(sp.together(power.base)))


def tidy(expr: Any) -> Any:
    """Combine fractions and factor, inside square roots too.

    With positive symbols SymPy then splits ``sqrt(x*y)`` into ``sqrt(x)*sqrt(y)``.
    """
    expr = sp.sympify(expr)
    expr = expr.replace(lambda e: e.is_Pow and e.exp == sp.S.Half, _root)
    return sp.factor(sp.together(expr))
