"""The :class:`Derivation` record and its exports (LaTeX, Markdown, NumPy).

A derivation is an ordered list of steps, each a plain-words sentence and a
SymPy relation, ending in a result expression. Symbols carry their meaning, SI
unit and typeset name; their SymPy names are Python identifiers equal to the
keyword arguments of the numeric twin, so ``derive(name).function()`` can be
called with the same keywords as the numeric layer.
"""

from __future__ import annotations

import dataclasses
import importlib
from collections.abc import Callable, Mapping
from typing import Any, NamedTuple

import sympy as sp

from .._text import escape_latex
from . import _printing
from ._callable import Argument, numpy_function

__all__ = ["Derivation", "Meaning"]


class Meaning(NamedTuple):
    """What a symbol stands for: a description, its SI unit and its LaTeX."""

    meaning: str
    unit: str
    latex: str


#: Text-mode commands of :func:`~deltakit._text.escape_latex` that MathJax's ``\\text{}``
#: does not know, as the inline math that LaTeX and MathJax both typeset.
_MATHJAX_SAFE = {r"\textless{}": "$<$", r"\textgreater{}": "$>$", r"\textbar{}": "$|$"}


def escape_text(text: str) -> str:
    """Plain words for LaTeX text mode, also inside ``\\text{}`` (:func:`deltakit._text.escape_latex`)."""
    escaped = escape_latex(text)
    for command, math in _MATHJAX_SAFE.items():
        escaped = escaped.replace(command, math)
    return escaped


def _pieces(text: str) -> list[str]:
    """Split on ``$``: even pieces are words, odd pieces inline math."""
    pieces = text.split("$")
    return pieces if len(pieces) % 2 == 1 else [text.replace("$", "")]


def text_tex(text: str) -> str:
    """Sentence for LaTeX text mode: words escaped, ``$...$`` math kept."""
    return "".join(escape_text(p) if i % 2 == 0 else f"${p}$" for i, p in enumerate(_pieces(text)))


def text_in_math(text: str) -> str:
    """Sentence for math mode: words in ``\\text{}``, ``$...$`` math inline."""
    return "".join(
        (rf"\text{{{escape_text(p)}}}" if p else "") if i % 2 == 0 else p for i, p in enumerate(_pieces(text))
    )


def unit_tex(unit: str) -> str:
    """An SI unit such as ``m^3/s^2`` typeset upright (math mode)."""
    if not unit or unit == "1":
        return r"\mathrm{1}"
    return r"\mathrm{" + unit.replace(" ", r"\,") + "}"


_REL_LATEX = {"==": "=", "<": "<", ">": ">", "<=": r"\leq", ">=": r"\geq", "!=": r"\neq"}


@dataclasses.dataclass(frozen=True, eq=False)
class Derivation:
    """One closed form derived from first principles, with its steps.

    Attributes
    ----------
    name : str
        Catalog key, e.g. ``"hohmann"``.
    title : str
        Heading for reports.
    assumptions : tuple of str
        Plain-words assumptions (two-body, impulsive burn, ...).
    symbols : mapping of sympy.Symbol to Meaning
        Every symbol used in the steps: meaning, SI unit, LaTeX name.
    steps : tuple of (str, sympy.Relational)
        Ordered steps: a sentence and the relation it establishes.
    result : sympy.Expr
        The derived closed form for :attr:`target`.
    target : sympy.Symbol
        The quantity the result gives (left-hand side of the boxed line).
    parameters : tuple of sympy.Symbol
        Arguments of :meth:`function`, in the numeric twin's order.
    domain : mapping of str to str
        What :meth:`function` accepts for each parameter: ``"> 0"``,
        ``">= 0"``, ``"non-zero"`` (``inf`` allowed) or ``"finite"``.
        Anything else raises :class:`deltakit.DomainError` naming the
        parameter. Rules between parameters (``mf <= m0``, ``rb >= max(r1,
        r2)``, an angle up to pi) are stated in :attr:`assumptions`, not checked.
    twin : str
        The numeric function that evaluates the same quantity, written
        ``"deltakit.hohmann:total"`` (function, then the result field).
    outputs : mapping of str to sympy.Expr
        Named results (for entries with several, e.g. each burn of a
        transfer); ``outputs[twin field]`` is :attr:`result`.
    references : tuple of str
        Where the closed form is found in the literature.

    Examples
    --------
    >>> from deltakit.symbolic import derive
    >>> d = derive("plane_change")
    >>> d.title
    'Pure plane change'
    >>> round(float(d.function()(v=7500.0, angle=0.5)), 1)
    3711.1
    """

    name: str
    title: str
    assumptions: tuple[str, ...]
    symbols: Mapping[sp.Symbol, Meaning]
    steps: tuple[tuple[str, sp.Basic], ...]
    result: sp.Expr
    target: sp.Symbol
    parameters: tuple[sp.Symbol, ...]
    twin: str
    domain: Mapping[str, str] = dataclasses.field(default_factory=dict)
    outputs: Mapping[str, sp.Expr] = dataclasses.field(default_factory=dict)
    references: tuple[str, ...] = ()
    twin_adapter: Callable[..., Any] | None = dataclasses.field(default=None, repr=False)
    _functions: dict = dataclasses.field(default_factory=dict, repr=False, init=False)

    def __post_init__(self) -> None:
        if len(self.steps) < 2:
            raise ValueError(f"derivation {self.name!r} needs at least two steps")
        missing = [s for s in self.parameters if s not in self.symbols]
        if missing:
            raise ValueError(f"derivation {self.name!r}: parameters without meaning: {missing}")
        free = self.result.free_symbols - set(self.parameters)
        if free:
            raise ValueError(f"derivation {self.name!r}: result depends on non-parameters {free}")

    # -- typesetting -------------------------------------------------------
    def _names(self) -> dict[sp.Symbol, str]:
        return {symbol: info.latex for symbol, info in self.symbols.items()}

    def _latex(self, expr: Any) -> str:
        # a thin space between factors keeps products of multi-letter symbols
        # readable (Delta v times v, not "Delta vv")
        return _printing.latex(expr, symbol_names=self._names(), mul_symbol=r"\,")

    def tex(self, expr: Any) -> str:
        """LaTeX of an expression or relation with this derivation's symbol names."""
        if isinstance(expr, sp.Rel):
            op = _REL_LATEX.get(expr.rel_op, expr.rel_op)
            return f"{self._latex(expr.lhs)} {op} {self._latex(expr.rhs)}"
        return self._latex(expr)

    def _aligned_rows(self, relation: Any) -> str:
        if isinstance(relation, sp.Rel):
            op = _REL_LATEX.get(relation.rel_op, relation.rel_op)
            return f"{self._latex(relation.lhs)} &{op} {self._latex(relation.rhs)}"
        return f"&{self._latex(relation)}"

    def result_tex(self) -> str:
        """``target = result`` as one LaTeX line (no environment)."""
        return f"{self.tex(self.target)} = {self.tex(self.result)}"

    def latex(self, steps: bool = True) -> str:
        """An ``align*`` block (amsmath) for a LaTeX report.

        Each step is introduced by its sentence (``\\intertext``); the last
        line is the result. With ``steps=False`` only the result line.

        Examples
        --------
        >>> from deltakit.symbolic import derive
        >>> print(derive("rocket_equation").latex(steps=False))
        \\begin{align*}
          {\\Delta v} &= v_{e}\\,\\log{\\left(\\frac{m_{0}}{m_{f}} \\right)}
        \\end{align*}
        """
        lines = [r"\begin{align*}"]
        if steps:
            for number, (sentence, relation) in enumerate(self.steps, start=1):
                lines.append(rf"  \intertext{{{number}. {text_tex(sentence)}}}")
                lines.append(f"  {self._aligned_rows(relation)} \\\\")
            lines.append(r"  \intertext{Result:}")
        target = self.tex(self.target)
        lines.append(f"  {target} &= {self.tex(self.result)}")
        lines.append(r"\end{align*}")
        return "\n".join(lines)

    def markdown(self, level: int = 3) -> str:
        """A Markdown section: heading, assumptions, symbols, steps, result.

        Math is in ``$$`` blocks (Jupyter, GitHub and pandoc render them).

        Examples
        --------
        >>> from deltakit.symbolic import derive
        >>> print(derive("oberth").markdown().splitlines()[0])
        ### Energy gain of a prograde burn (Oberth relation)
        """
        hashes = "#" * level
        out = [f"{hashes} {self.title}", ""]
        out.append(f"Catalog entry `{self.name}`; numeric twin `{self.twin}`.")
        out.append("")
        out.append("**Assumptions**")
        out.append("")
        out.extend(f"- {text}" for text in self.assumptions)
        out.append("")
        out.append("**Symbols**")
        out.append("")
        out.append("| symbol | meaning | unit |")
        out.append("|---|---|---|")
        for info in self.symbols.values():
            out.append(f"| ${info.latex}$ | {info.meaning} | ${unit_tex(info.unit)}$ |")
        out.append("")
        out.append("**Steps**")
        out.append("")
        for number, (sentence, relation) in enumerate(self.steps, start=1):
            out.append(f"{number}. {sentence}")
            out.append("")
            out.append("$$")
            out.append(self.tex(relation))
            out.append("$$")
            out.append("")
        out.append("**Result**")
        out.append("")
        out.append("$$")
        out.append(self.result_tex())
        out.append("$$")
        if self.references:
            out.append("")
            out.append("**Literature:** " + "; ".join(self.references) + ".")
        return "\n".join(out) + "\n"

    def _repr_latex_(self) -> str:
        rows = [rf"\textbf{{{escape_text(self.title)}}}"]
        rows.append(r"\text{Assumptions:}")
        rows.extend(rf"\quad\bullet\ {text_in_math(text)}" for text in self.assumptions)
        rows.append(r"\text{Steps:}")
        body = [r"\begin{array}{l}", " \\\\\n".join(rows), r"\end{array}"]
        steps = []
        for number, (sentence, relation) in enumerate(self.steps, start=1):
            steps.append(rf"&\text{{{number}. }}{text_in_math(sentence)}")
            steps.append(rf"&\qquad {self.tex(relation)}")
        steps.append(r"&\text{Result:}")
        steps.append(rf"&\qquad \boxed{{{self.result_tex()}}}")
        aligned = [r"\begin{aligned}", " \\\\\n".join(steps), r"\end{aligned}"]
        return "$$\n" + "\n".join(body) + "\n$$\n$$\n" + "\n".join(aligned) + "\n$$"

    def __repr__(self) -> str:
        params = ", ".join(str(p) for p in self.parameters)
        result = _printing.text(self.result)
        return f"Derivation({self.name!r}: {self.target} = {result}; f({params}); twin {self.twin})"

    # -- numbers -----------------------------------------------------------
    def function(self, output: str | None = None) -> Callable[..., Any]:
        """A NumPy function of :attr:`parameters` (positional or keyword).

        Made by ``sympy.lambdify``. It carries a real signature (``help()``,
        tab completion and :func:`deltakit.sweep` see the parameter names)
        and a docstring with each parameter's meaning, unit and rule.
        Arguments broadcast like a ufunc; scalars in give NumPy scalars out.
        ``output`` picks one of :attr:`outputs` (default: :attr:`result`).

        Examples
        --------
        >>> import inspect
        >>> from deltakit.symbolic import derive
        >>> f = derive("hohmann").function()
        >>> inspect.signature(f)
        <Signature (r1, r2, mu)>
        >>> round(float(f(r1=6678137.0, r2=42164e3, mu=3.986004418e14)))
        3893
        """
        key = output
        if key not in self._functions:
            if output is None:
                expr, target = self.result, self.target
            elif output in self.outputs:
                expr = self.outputs[output]
                target = next((s for s in self.symbols if str(s) == output), self.target)
            else:
                raise KeyError(
                    f"derivation {self.name!r} has no output {output!r}; choose from {sorted(self.outputs)}"
                )
            label = self.name + (f"_{output}" if output else "")
            arguments = [
                Argument(
                    str(p), self.symbols[p].meaning, self.symbols[p].unit, self.domain.get(str(p), "finite")
                )
                for p in self.parameters
            ]
            about = self.symbols.get(target)
            returns = f"{about.meaning}, {about.unit}." if about else f"{output or self.target}."
            summary = f"{self.title}: {_printing.text(target)} = {_printing.text(expr)}"
            self._functions[key] = numpy_function(
                label, expr, self.parameters, arguments, summary=summary, returns=returns
            )
        return self._functions[key]

    def twin_function(self) -> Callable[..., Any]:
        """The numeric layer's twin, callable with the same keywords as :meth:`function`."""
        if self.twin_adapter is not None:
            return self.twin_adapter
        path, _, field = self.twin.partition(":")
        module, _, attr = path.rpartition(".")
        target = getattr(importlib.import_module(module), attr)
        if not field:
            return target

        def twin(*args: Any, **kwargs: Any) -> Any:
            value = target(*args, **kwargs)
            for part in field.split("."):
                value = getattr(value, part)
            return value

        return twin
