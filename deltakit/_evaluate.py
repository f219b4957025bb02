"""One formula for plain numbers and for arrays, evaluated exactly and quietly.

A formula of the numeric layer is written once, as a function
``kernel(m, *args)`` whose first argument is a namespace of elementary
functions: :data:`SCALAR` (the :mod:`math` module, for plain Python floats)
or :data:`ARRAY` (NumPy ufuncs). Arithmetic operators and ``abs`` mean the
same for both, so the one expression serves the scalar fast path (a few
hundred nanoseconds, no array is made) and the array path.

Two evaluators run a kernel on checked inputs:

* :func:`on_numbers` takes plain floats that passed
  :func:`~deltakit._checks.is_number`, so each lies in the band
  ``1e-50 <= |x| <= 1e50`` (or is 0) where no intermediate of a formula of
  degree six or less can leave the float range, and evaluates with
  :data:`SCALAR`. If plain-float arithmetic raises (a division by an exact
  zero, a math domain error), the same numbers go through :func:`on_arrays`.
  Results are NumPy scalars, as on the array path.
* :func:`on_arrays` evaluates with :data:`ARRAY`, trapping overflow and
  underflow. If either happens (an input such as 1e300 or 1e-300 squared on
  the way), the elements with an input outside the band are evaluated again
  in extended precision (:class:`numpy.longdouble`, exponent range about
  1e+-4932 on x86-64 and aarch64) and rounded back to float64: a result that
  fits a double is then right to rounding, a result beyond the range is +-inf
  (or 0 below it), and no RuntimeWarning escapes. On a platform whose long
  double is a double, the second run gives the same inf or 0, still without a
  warning.

NaN and inf that a kernel makes on purpose (an infeasible element, the
``inf`` period of a parabola) pass through both evaluators unchanged.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from types import SimpleNamespace
from typing import Any

import numpy as np

from ._checks import BAND

__all__ = ["ARRAY", "SCALAR", "on_arrays", "on_numbers"]

_NAN = math.nan


def _where(condition: Any, if_true: Any, if_false: Any) -> Any:
    return if_true if condition else if_false


def _maximum(a: float, b: float) -> float:
    if a != a or b != b:  # NaN propagates, as np.maximum does
        return _NAN
    return a if a >= b else b


def _minimum(a: float, b: float) -> float:
    if a != a or b != b:
        return _NAN
    return a if a <= b else b


def _clip(x: float, low: float, high: float) -> float:
    return _minimum(_maximum(x, low), high)


def _rint(x: float) -> float:  # round half to even, as np.rint
    return float(round(x))


def _cbrt(x: float) -> float:  # math.cbrt is Python 3.11+
    return math.copysign(abs(x) ** (1.0 / 3.0), x)


#: Elementary functions on plain Python floats (the scalar fast path).
SCALAR = SimpleNamespace(
    sqrt=math.sqrt,
    sin=math.sin,
    cos=math.cos,
    tan=math.tan,
    asin=math.asin,
    atan=math.atan,
    atan2=math.atan2,
    sinh=math.sinh,
    cosh=math.cosh,
    tanh=math.tanh,
    asinh=math.asinh,
    atanh=math.atanh,
    exp=math.exp,
    expm1=math.expm1,
    log=math.log,
    log1p=math.log1p,
    hypot=math.hypot,
    cbrt=getattr(math, "cbrt", _cbrt),
    isfinite=math.isfinite,
    rint=_rint,
    all=bool,
    where=_where,
    maximum=_maximum,
    minimum=_minimum,
    clip=_clip,
)

#: The same functions as NumPy ufuncs (the array path).
ARRAY = SimpleNamespace(
    sqrt=np.sqrt,
    sin=np.sin,
    cos=np.cos,
    tan=np.tan,
    asin=np.arcsin,
    atan=np.arctan,
    atan2=np.arctan2,
    sinh=np.sinh,
    cosh=np.cosh,
    tanh=np.tanh,
    asinh=np.arcsinh,
    atanh=np.arctanh,
    exp=np.exp,
    expm1=np.expm1,
    log=np.log,
    log1p=np.log1p,
    hypot=np.hypot,
    cbrt=np.cbrt,
    isfinite=np.isfinite,
    rint=np.rint,
    all=np.all,
    where=np.where,
    maximum=np.maximum,
    minimum=np.minimum,
    clip=np.clip,
)

_LOW, _HIGH = BAND


def _outside_band(arrays: tuple[np.ndarray, ...]) -> np.ndarray:
    """Elements where some input lies outside :data:`~deltakit._checks.BAND` (NaN counts as outside)."""
    outside = np.zeros((), dtype=bool)
    for a in arrays:
        size = np.abs(a)
        outside = outside | ~(((size >= _LOW) & (size <= _HIGH)) | (size == 0.0))
    return outside


def _select(outside: np.ndarray, wide: Any, plain: Any) -> Any:
    if isinstance(plain, tuple):
        return tuple(_select(outside, w, p) for w, p in zip(wide, plain))
    return np.where(outside, np.asarray(wide, dtype=np.float64), plain)


def on_arrays(kernel: Callable[..., Any], *arrays: Any) -> Any:
    """``kernel(ARRAY, *arrays)``, with elements beyond the band redone in extended precision.

    ``arrays`` are checked float arrays; the result has the kernel's structure
    (an array or a tuple of them), float64 throughout. Only when the float64
    run over- or underflows somewhere are the elements with an input outside
    :data:`~deltakit._checks.BAND` taken from a run in :class:`numpy.longdouble`;
    the others keep their float64 values, so an element's result never
    depends on its neighbours (an array call equals the loop of scalar calls).
    """
    try:
        with np.errstate(over="raise", under="raise", divide="ignore", invalid="ignore"):
            return kernel(ARRAY, *arrays)
    except FloatingPointError:
        pass
    with np.errstate(all="ignore"):
        plain = kernel(ARRAY, *arrays)
        wide = kernel(ARRAY, *(np.asarray(a, dtype=np.longdouble) for a in arrays))
        return _select(_outside_band(arrays), wide, plain)


def _scalars_of(result: Any) -> Any:
    if isinstance(result, tuple):
        return tuple(_scalars_of(part) for part in result)
    return _FLOAT64(np.asarray(result)[()])


_FLOAT64 = np.float64


def on_numbers(kernel: Callable[..., Any], *values: float) -> Any:
    """``kernel`` on plain floats in the band (they passed ``is_number``), as NumPy scalars.

    A tuple result gives a flat tuple of NumPy scalars. Both paths give the
    same numbers (to rounding of the elementary functions; bit for bit where
    the kernel uses only arithmetic and sqrt).
    """
    try:
        result = kernel(SCALAR, *values)
    except (ArithmeticError, ValueError):  # x / 0.0, a math domain error: let NumPy decide
        return _scalars_of(on_arrays(kernel, *(np.asarray(v) for v in values)))
    if type(result) is tuple:
        return tuple(map(_FLOAT64, result))
    return _FLOAT64(result)
