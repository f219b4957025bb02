"""Input conversion and domain checks shared by the numeric layer.

Every public numeric function converts its arguments with these helpers first,
then computes. Two paths, one set of rules and messages:

* the array path (:func:`finite`, :func:`positive`, :func:`nonnegative`,
  :func:`as_float`) turns any array-like into a float array and checks it with
  a few whole-array reductions, never a Python loop over elements;
* the scalar fast path (:func:`is_number`, :func:`finite_number`,
  :func:`positive_number`, :func:`nonnegative_number`,
  :func:`nonzero_number`) checks one plain number
  (``float``, ``int``, ``numpy.float64``) in a few hundred nanoseconds, and
  raises exactly the array path's error when the number breaks a rule.

What is refused, always with the parameter's name: text and bytes (``"7000"``),
``bool``, dates and times, complex numbers, ``None`` and other objects, masked
arrays (their mask would be lost), integers too large for a float, and
non-finite values. Quantities from astropy or pint are converted to the
parameter's SI unit (:mod:`deltakit.units`) or refused when their dimension
does not fit. Inputs are never modified.
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from collections.abc import Callable
from typing import Any

import numpy as np

from .errors import DomainError
from .units import is_quantity, quantity_to_si

__all__ = [
    "as_float",
    "broadcast_shape",
    "finite",
    "finite_number",
    "instance_of",
    "is_number",
    "nonnegative",
    "nonnegative_number",
    "nonzero",
    "nonzero_number",
    "positive",
    "positive_number",
    "require",
    "scalar_or_array",
]

#: Types the scalar fast path takes as they are (``bool`` is not among them).
NUMBER_TYPES = frozenset({float, int, np.float64})
#: The band of magnitudes the scalar fast path takes: ``BAND[0] <= |x| <= BAND[1]``, or 0.
#: Products and quotients of up to six such numbers stay inside the normal float
#: range, so a formula on plain floats can neither over- nor underflow there.
BAND = (1e-50, 1e50)

_INF = math.inf
_LOW, _HIGH = BAND
_ENDS_IN_NUMBER = re.compile(r"[0-9.]$")


def is_number(*values: Any) -> bool:
    """True when every value is a plain real number the scalar fast path takes.

    Plain: ``float``, ``int`` or ``numpy.float64`` (not ``bool``), and of a
    magnitude in :data:`BAND` or zero. Anything else (an array, a quantity, NaN,
    1e300, text) takes the array path, which checks and handles every value.
    """
    for x in values:
        if type(x) not in NUMBER_TYPES or not (_LOW <= x <= _HIGH or -_HIGH <= x <= -_LOW or x == 0.0):
            return False
    return True


# ---------------------------------------------------------------------- messages
def _shown(value: Any, unit: str) -> str:
    text = repr(value)
    if unit and isinstance(value, float) and math.isfinite(value):
        return f"{text} {unit}"
    return text


def _describe(name: str, rule: str, unit: str, values: np.ndarray, bad: np.ndarray) -> str:
    # The unit goes with a number: after a bound that is a number ("> 0 m"),
    # and after the value that was given, never after a rule in words.
    rule_text = f"{rule} {unit}" if unit and _ENDS_IN_NUMBER.search(rule) else rule
    if values.ndim == 0:
        return f"`{name}` must be {rule_text}, got {_shown(values.item(), unit)}"
    count = int(np.count_nonzero(bad))
    first = tuple(int(i) for i in np.unravel_index(int(np.argmax(bad)), bad.shape))
    index = first[0] if len(first) == 1 else first  # plain ints: no np.int64(...) under NumPy 2
    return (
        f"`{name}` must be {rule_text}: {count} of {values.size} elements "
        f"break this rule (first at index {index}: {_shown(values[first].item(), unit)})"
    )


def require(values: np.ndarray, bad: Any, name: str, rule: str, unit: str = "") -> None:
    """Raise :class:`DomainError` if any element of ``bad`` is true."""
    bad = np.asarray(bad)
    if bad.any():
        values = np.asarray(values)
        bad = np.broadcast_to(bad, np.broadcast_shapes(bad.shape, values.shape))
        values = np.broadcast_to(values, bad.shape)
        raise DomainError(_describe(name, rule, unit, values, bad))


# ---------------------------------------------------------------------- conversion
_REFUSED_SCALARS = (str, bytes, bytearray, bool, np.bool_, complex, np.complexfloating)
_TIME_TYPES = (_dt.datetime, _dt.date, _dt.time, _dt.timedelta, np.datetime64, np.timedelta64)


def _kind_of(value: Any) -> str | None:
    """What a refused scalar is, in words, or None when it may be a number."""
    if isinstance(value, (str, bytes, bytearray)):
        return "text"
    if isinstance(value, (bool, np.bool_)):
        return "a bool"
    if isinstance(value, (complex, np.complexfloating)):
        return "complex"
    if isinstance(value, _TIME_TYPES):
        return "a date or time"
    if value is None:
        return "None"
    return None


def _scan_sequence(value: Any, name: str, unit: str) -> Any:
    """Refuse refused scalars inside lists and tuples; convert quantities inside them."""
    has_quantity = False
    for item in value:
        if type(item) in NUMBER_TYPES:
            continue
        if isinstance(item, (list, tuple)):
            _scan_sequence(item, name, unit)
            continue
        if is_quantity(item):
            has_quantity = True
            continue
        kind = _kind_of(item)
        if kind is not None:
            raise DomainError(f"`{name}` must hold real numbers, got {kind} ({item!r}) among them")
    if has_quantity:
        return [quantity_to_si(item, name, unit) if is_quantity(item) else item for item in value]
    return value


def _refuse(name: str, value: Any, kind: str) -> DomainError:
    if value is None:
        return DomainError(f"`{name}` must be a real number or an array of them, got None")
    shown = repr(value)
    if len(shown) > 60:
        shown = shown[:57] + "..."
    return DomainError(f"`{name}` must be a real number or an array of them, got {kind} {shown}")


def as_float(value: Any, name: str, unit: str = "") -> np.ndarray:
    """Convert ``value`` to a float array (never modifying it), refusing what is not a real number.

    ``unit`` is the parameter's SI unit (``""`` for a pure number): an astropy
    or pint quantity is converted to it.
    """
    if type(value) in NUMBER_TYPES:
        try:
            return np.asarray(float(value))
        except OverflowError:
            raise DomainError(f"`{name}` is too large for a float (more than about 1.8e308)") from None
    if is_quantity(value):
        value = quantity_to_si(value, name, unit)
    elif isinstance(value, np.ma.MaskedArray):
        raise DomainError(
            f"`{name}` is a masked array: deltakit does not carry masks through its arithmetic; "
            f"pass the unmasked elements ({name}.compressed()) or fill the masked ones yourself"
        )
    elif isinstance(value, (list, tuple)):
        value = _scan_sequence(value, name, unit)
    else:
        kind = _kind_of(value)
        if kind is not None:
            raise _refuse(name, value, kind)
    try:
        array = np.asarray(value)
    except (TypeError, ValueError) as err:
        raise _refuse(name, value, "something else:") from err
    dtype_kind = array.dtype.kind
    if dtype_kind == "f":
        return array if array.dtype == np.float64 else array.astype(np.float64)
    if dtype_kind in "iu":
        return array.astype(np.float64)
    kinds = {"b": "bools", "c": "complex numbers", "U": "text", "S": "bytes", "M": "dates", "m": "durations"}
    if dtype_kind in kinds:
        raise DomainError(f"`{name}` must be real numbers, got an array of {kinds[dtype_kind]}")
    try:
        return np.asarray(array, dtype=np.float64)
    except OverflowError:
        what = "is" if array.ndim == 0 else "holds an integer"  # one number: the scalar path's words
        raise DomainError(f"`{name}` {what} too large for a float (more than about 1.8e308)") from None
    except (TypeError, ValueError) as err:
        raise _refuse(name, value, "something else:") from err


def finite(value: Any, name: str, unit: str = "") -> np.ndarray:
    """Convert and check that every element is finite."""
    array = as_float(value, name, unit)
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


def nonzero(value: Any, name: str, unit: str = "") -> np.ndarray:
    """Convert and check that no element is zero or NaN (``inf`` is allowed: a parabola's ``a``)."""
    array = as_float(value, name, unit)
    bad = np.isnan(array) | (array == 0.0)
    if bad.any():
        require(array, bad, name, "non-zero and not NaN", unit)
    return array


# ---------------------------------------------------------------------- scalar fast path
def _as_python_float(value: Any, name: str) -> float:
    # (the helpers below skip this call for a float, the common case: it is the hot path)
    try:
        return float(value)
    except OverflowError:
        raise DomainError(f"`{name}` is too large for a float (more than about 1.8e308)") from None


def finite_number(value: Any, name: str, unit: str = "") -> float:
    """One plain number (see :func:`is_number`) as a float, checked finite."""
    x = value if type(value) is float else _as_python_float(value, name)
    if -_INF < x < _INF:
        return x
    finite(x, name, unit)  # raises the array path's message
    raise AssertionError("unreachable")


def positive_number(value: Any, name: str, unit: str = "") -> float:
    """One plain number as a float, checked finite and > 0."""
    x = value if type(value) is float else _as_python_float(value, name)
    if 0.0 < x < _INF:
        return x
    positive(x, name, unit)
    raise AssertionError("unreachable")


def nonnegative_number(value: Any, name: str, unit: str = "") -> float:
    """One plain number as a float, checked finite and >= 0."""
    x = value if type(value) is float else _as_python_float(value, name)
    if 0.0 <= x < _INF:
        return x
    nonnegative(x, name, unit)
    raise AssertionError("unreachable")


def nonzero_number(value: Any, name: str, unit: str = "") -> float:
    """One plain number as a float, checked non-zero and not NaN (``inf`` allowed, as :func:`nonzero`)."""
    x = value if type(value) is float else _as_python_float(value, name)
    if x != 0.0 and x == x:
        return x
    nonzero(x, name, unit)
    raise AssertionError("unreachable")


# ---------------------------------------------------------------------- shapes and types
def broadcast_shape(**arrays: Any) -> tuple[int, ...]:
    """The broadcast shape of named arrays, or a DomainError naming them and their shapes.

    Examples
    --------
    >>> broadcast_shape(r1=np.zeros(3), r2=np.zeros((2, 1)))
    (2, 3)
    >>> broadcast_shape(r1=np.zeros(3), r2=np.zeros(4))
    Traceback (most recent call last):
    ...
    deltakit.errors.DomainError: `r1` (shape (3,)) and `r2` (shape (4,)) do not broadcast together
    """
    shapes = {name: np.shape(array) for name, array in arrays.items()}
    try:
        return np.broadcast_shapes(*shapes.values())
    except ValueError:
        parts = [f"`{name}` (shape {shape})" for name, shape in shapes.items() if shape]
        listed = ", ".join(parts[:-1]) + f" and {parts[-1]}" if len(parts) > 1 else parts[0]
        raise DomainError(f"{listed} do not broadcast together") from None


def instance_of(value: Any, cls: type, name: str) -> Any:
    """``value`` if it is a ``cls``; otherwise a TypeError naming the parameter."""
    if not isinstance(value, cls):
        raise TypeError(f"`{name}` must be a deltakit.{cls.__name__}, not {type(value).__name__}")
    return value


def scalar_or_array(x: Any) -> Any:
    """Return a NumPy scalar for 0-d input, the array otherwise (ufunc style)."""
    x = np.asarray(x)
    return x[()] if x.ndim == 0 else x
