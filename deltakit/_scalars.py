"""One number or one name from the user, checked: the scalar fields of budgets, vehicles and spreads.

Budget lines, propulsion systems, stages, margin tables and distributions each
hold single numbers and names, not arrays. These two helpers check them with
the messages of :mod:`deltakit._checks` (which they call): text, bools,
complex numbers, huge integers and arrays of more than one number are
refused with the parameter's name, quantities are converted to its unit.
"""

from __future__ import annotations

import math
from typing import Any

from ._checks import as_float
from .errors import DomainError

__all__ = ["real", "text"]


def real(value: Any, name: str, unit: str = "", *, low: float | None = None, strict: bool = False) -> float:
    """One finite real number (a size-1 array or quantity is accepted), checked against ``low``.

    Examples
    --------
    >>> real(3.0, "mass", "kg", low=0.0)
    3.0
    >>> real(-1.0, "mass", "kg", low=0.0)
    Traceback (most recent call last):
    ...
    deltakit.errors.DomainError: `mass` must be >= 0 kg, got -1.0 kg
    """
    array = as_float(value, name, unit)
    if array.size != 1:
        raise DomainError(f"`{name}` must be one number, got shape {array.shape}")
    number = float(array.reshape(()))
    unit_text = f" {unit}" if unit else ""
    if not math.isfinite(number):
        raise DomainError(f"`{name}` must be finite, got {number!r}")
    if low is not None and (number <= low if strict else number < low):
        rule = ">" if strict else ">="
        raise DomainError(f"`{name}` must be {rule} {low:g}{unit_text}, got {number!r}{unit_text}")
    return number


def text(value: Any, name: str, *, empty: bool = True) -> str:
    """A user string (a name, a label), refusing other types."""
    if not isinstance(value, str):
        raise DomainError(f"`{name}` must be text, got {value!r}")
    if not empty and not value.strip():
        raise DomainError(f"`{name}` must not be empty")
    return value
