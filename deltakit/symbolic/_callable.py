"""A derived expression as a NumPy function with a real signature.

``sympy.lambdify`` makes the arithmetic; the function built here adds what a
numeric-layer function has: its parameters by name (``inspect.signature``,
so ``help()``, tab completion and :func:`deltakit.sweep` see them), the
domain check of each argument with the numeric layer's messages, ufunc
broadcasting, and NumPy scalars for scalar input.
"""

from __future__ import annotations

import inspect
from collections.abc import Callable, Sequence
from typing import Any, NamedTuple

import numpy as np
import sympy as sp

from .._checks import broadcast_shape, finite, nonnegative, nonzero, positive, scalar_or_array

__all__ = ["Argument", "numpy_function"]

_CHECKS: dict[str, Callable[..., np.ndarray]] = {
    "> 0": positive,
    ">= 0": nonnegative,
    "finite": finite,
    "non-zero": nonzero,
}
_RULE_WORDS = {"> 0": "> 0", ">= 0": ">= 0", "finite": "finite", "non-zero": "non-zero, inf allowed"}


class Argument(NamedTuple):
    """One parameter of the function: its name, meaning, SI unit and domain rule."""

    name: str
    meaning: str
    unit: str
    rule: str


def _docstring(name: str, summary: str, arguments: Sequence[Argument], returns: str) -> str:
    lines = [summary, "", "Parameters", "----------"]
    for argument in arguments:
        unit = "" if argument.unit in ("", "1") else f", {argument.unit}"
        lines.append(f"{argument.name} : array_like")
        meaning = argument.meaning[:1].upper() + argument.meaning[1:]
        lines.append(f"    {meaning}{unit} ({_RULE_WORDS[argument.rule]}).")
    returns = returns[:1].upper() + returns[1:]
    lines += ["", "Returns", "-------", "ndarray or numpy scalar", f"    {returns}"]
    return "\n".join(lines)


def numpy_function(
    name: str,
    expr: sp.Expr,
    parameters: Sequence[sp.Symbol],
    arguments: Sequence[Argument],
    *,
    summary: str,
    returns: str,
) -> Callable[..., Any]:
    """The NumPy function of ``expr`` over ``parameters`` (positional or keyword).

    ``arguments`` describe the parameters in the same order. Each argument is
    converted and checked by its rule (:data:`deltakit.DomainError` naming
    it); NaN/inf arithmetic inside the expression is silent, so an outcome
    that is impossible for valid input is NaN.
    """
    raw = sp.lambdify(list(parameters), expr, modules="numpy")
    names = tuple(argument.name for argument in arguments)
    checks = tuple((_CHECKS[argument.rule], argument.unit) for argument in arguments)
    signature = inspect.Signature(
        [inspect.Parameter(n, inspect.Parameter.POSITIONAL_OR_KEYWORD) for n in names]
    )
    count, known = len(names), frozenset(names)

    def evaluate(*args: Any, **kwargs: Any) -> Any:
        if kwargs or len(args) != count:
            unknown = [key for key in kwargs if key not in known]
            if unknown:  # named first: a misspelt keyword also leaves its parameter missing
                raise TypeError(f"{name}{signature}: got an unexpected keyword argument {unknown[0]!r}")
            try:
                args = tuple(signature.bind(*args, **kwargs).arguments.values())
            except TypeError as err:
                raise TypeError(f"{name}{signature}: {err}") from None
        arrays = [check(value, n, unit) for value, n, (check, unit) in zip(args, names, checks)]
        shape = broadcast_shape(**dict(zip(names, arrays)))
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            out = np.asarray(raw(*arrays), dtype=float)
        return scalar_or_array(np.broadcast_to(out, shape).copy())

    evaluate.__name__ = evaluate.__qualname__ = name
    evaluate.__module__ = "deltakit.symbolic"
    evaluate.__signature__ = signature  # type: ignore[attr-defined]
    evaluate.__doc__ = _docstring(name, summary, arguments, returns)
    return evaluate
