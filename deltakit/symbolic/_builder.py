"""Helpers the catalog modules use to record a derivation step by step."""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from typing import Any

import sympy as sp

from .derivation import Derivation, Meaning

__all__ = ["Builder"]


class Builder:
    """Collects symbols and steps, then freezes them into a :class:`Derivation`.

    ``step(sentence, lhs, rhs)`` records ``lhs = rhs`` unevaluated (so SymPy
    does not collapse it to ``True``) and returns ``rhs`` so derivations read
    as a chain of assignments.
    """

    def __init__(self, name: str, title: str | None = None) -> None:
        from ._registry import registered_title

        self.name = name
        self.title = registered_title(name) if title is None else title
        self.symbols: dict[sp.Symbol, Meaning] = {}
        self.steps: list[tuple[str, sp.Basic]] = []
        self.zero_ok: set[sp.Symbol] = set()

    def symbol(
        self,
        name: str,
        meaning: str,
        unit: str,
        latex: str | None = None,
        *,
        zero_ok: bool = False,
        **assumptions: Any,
    ) -> sp.Symbol:
        """A SymPy symbol named ``name`` (a Python identifier), with its meaning.

        Symbols are positive unless other assumptions are given. ``zero_ok``
        marks a positive symbol whose value may be 0 in :meth:`Derivation.function`
        (a speed at rest, no excess speed), as its numeric twin accepts.
        """
        if not assumptions:
            assumptions = {"positive": True}
        symbol = sp.Symbol(name, **assumptions)
        if latex is not None and latex.startswith("\\Delta"):
            latex = "{" + latex + "}"  # so a power reads (Delta v)^2, not Delta (v^2)
        if zero_ok:
            self.zero_ok.add(symbol)
        self.symbols[symbol] = Meaning(meaning, unit, latex if latex is not None else sp.latex(symbol))
        return symbol

    def step(self, sentence: str, lhs: Any, rhs: Any) -> Any:
        """Record ``lhs = rhs`` with its sentence and return ``rhs``."""
        self.steps.append((sentence, sp.Eq(lhs, rhs, evaluate=False)))
        return rhs

    def relation(self, sentence: str, relation: sp.Basic) -> sp.Basic:
        """Record a relation that is not an assignment (e.g. a balance = 0)."""
        self.steps.append((sentence, relation))
        return relation

    def build(
        self,
        *,
        result: sp.Expr,
        target: sp.Symbol,
        parameters: Iterable[sp.Symbol],
        twin: str,
        assumptions: Iterable[str],
        outputs: Mapping[str, sp.Expr] | None = None,
        references: Iterable[str] = (),
        twin_adapter: Callable[..., Any] | None = None,
    ) -> Derivation:
        parameters = tuple(parameters)
        return Derivation(
            name=self.name,
            title=self.title,
            assumptions=tuple(assumptions),
            symbols=dict(self.symbols),
            steps=tuple(self.steps),
            result=result,
            target=target,
            parameters=parameters,
            domain={str(p): self._rule(p) for p in parameters},
            twin=twin,
            outputs=dict(outputs or {}),
            references=tuple(references),
            twin_adapter=twin_adapter,
        )

    def _rule(self, symbol: sp.Symbol) -> str:
        """What :meth:`Derivation.function` accepts for a parameter, from its assumptions."""
        if symbol.is_positive:
            return ">= 0" if symbol in self.zero_ok else "> 0"
        if symbol.is_nonnegative:
            return ">= 0"
        if symbol.is_nonzero:
            return "non-zero"
        return "finite"
