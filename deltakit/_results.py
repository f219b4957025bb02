"""Frozen result records whose repr carries units.

A result type is a frozen dataclass whose fields declare their unit with
``quantity("m/s")``. The repr then reads like an analyst's note::

    Transfer(burns=(2425.7 m/s, 1466.9 m/s), total=3892.6 m/s, duration=18929 s)
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

__all__ = ["quantity", "Result", "format_quantity"]


def quantity(unit: str, **kwargs: Any) -> Any:
    """A dataclass field that carries its SI unit in metadata."""
    return dataclasses.field(metadata={"unit": unit}, **kwargs)


def format_quantity(value: Any, unit: str) -> str:
    """Format a number, an array or a tuple of them with its unit."""
    if isinstance(value, tuple):
        return "(" + ", ".join(format_quantity(v, unit) for v in value) + ")"
    if isinstance(value, Result) or hasattr(value, "_repr_fields"):
        return repr(value)
    array = np.asarray(value)
    suffix = f" {unit}" if unit else ""
    if array.ndim == 0 and array.dtype.kind in "fiu":
        return f"{array.item():.6g}{suffix}"
    if array.dtype.kind in "fiu":
        body = np.array2string(array, precision=6, threshold=6, edgeitems=2, separator=", ")
        return f"{body}{suffix}"
    return repr(value)


class Result:
    """Mixin for frozen dataclasses of arrays: a repr with units, nothing else."""

    def _repr_fields(self) -> list[str]:
        parts = []
        for field in dataclasses.fields(self):  # type: ignore[arg-type]
            if not field.repr:
                continue
            unit = field.metadata.get("unit", "")
            parts.append(f"{field.name}={format_quantity(getattr(self, field.name), unit)}")
        return parts

    def __repr__(self) -> str:
        return f"{type(self).__name__}({', '.join(self._repr_fields())})"
