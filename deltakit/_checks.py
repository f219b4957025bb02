"""Input conversion and domain checks shared by the numeric layer.

Every public numeric function converts its arguments with these helpers first,
then computes. The checks are cheap whole-array reductions, so they cost a few
passes over the data and never a Python loop over elements.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

from .errors import DomainError

__all__ = [
    "as_float",
    "finite",
    "positive",
    "nonnegative",
    "require",
    "scalar_or_array",
]


def _describe(name: str, rule: str, unit: str, values: np.ndarray, bad: np.ndarray) -> str:
    unit_text = f" {unit}" if unit and rule not in ("finite",) else ""
    if values.ndim == 0:
        return f"`{name}` must be {rule}{unit_text}, got {values.item()!r}"
    count = int(np.count_nonzero(bad))
    first = tuple(int(i) for i in np.unravel_index(int(np.argmax(bad)), bad.shape))
    index = first[0] if len(first) == 1 else first  # plain ints: no np.int64(...) under NumPy 2
    return (
        f"`{name}` must be {rule}{unit_text}: {count} of {values.size} elements "
        f"break this rule (first at index {index}: {values[first].item()!r})"
    )


def require(values: np.ndarray, bad: Any, name: str, rule: str, unit: str = "") -> None:
    """Raise :class:`DomainError` if any element of ``bad`` is true."""
    bad = np.asarray(bad)
    if bad.any():
        values = np.asarray(values)
        bad = np.broadcast_to(bad, np.broadcast_shapes(bad.shape, values.shape))
        values = np.broadcast_to(values, bad.shape)
        raise DomainError(_describe(name, rule, unit, values, bad))


def as_float(value: Any, name: str) -> np.ndarray:
    """Convert ``value`` to a float array, refusing what is not a real number."""
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as err:
        raise DomainError(f"`{name}` must be a real number or an array of them, got {value!r}") from err
    return array


def finite(value: Any, name: str, unit: str = "") -> np.ndarray:
    """Convert and check that every element is finite."""
    array = as_float(value, name)
    if not np.isfinite(array).all():
        require(array, ~np.isfinite(array), name, "finite", unit)
    return array


def _checked(test: Callable[[np.ndarray], np.ndarray], rule: str):
    def check(value: Any, name: str, unit: str = "") -> np.ndarray:
        array = finite(value, name, unit)
        ok = test(array)
        if not ok.all():
            require(array, ~ok, name, rule, unit)
        return array

    return check


positive = _checked(lambda x: x > 0.0, "> 0")
positive.__doc__ = "Convert and check that every element is finite and > 0."
nonnegative = _checked(lambda x: x >= 0.0, ">= 0")
nonnegative.__doc__ = "Convert and check that every element is finite and >= 0."


def scalar_or_array(x: Any) -> Any:
    """Return a NumPy scalar for 0-d input, the array otherwise (ufunc style)."""
    x = np.asarray(x)
    return x[()] if x.ndim == 0 else x
