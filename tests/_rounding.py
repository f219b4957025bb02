"""Comparing two evaluations of the same formula: equal to rounding.

The scalar fast path evaluates with :mod:`math`, the array path with NumPy's
ufuncs; their sin, log, exp, ... may differ in the last bit (sqrt and the four
operations never do). Elements beyond the safe band are redone in extended
precision. So "the same result" means equal to 1e-14 relative, NaN where NaN,
and, below the normal range, a few of the tiniest floats apart.
"""

from __future__ import annotations

import numpy as np

#: Relative agreement promised between the scalar fast path and the array path.
RTOL = 1e-14
#: Absolute slack below the normal range (gradual underflow), about 1e-321.
ATOL = 200 * np.finfo(float).smallest_subnormal


def assert_same_to_rounding(actual, expected, rtol: float = RTOL) -> None:
    """``actual`` equals ``expected`` to rounding (see the module notes); shapes must match."""
    actual, expected = np.asarray(actual, dtype=float), np.asarray(expected, dtype=float)
    assert actual.shape == expected.shape, (actual.shape, expected.shape)
    np.testing.assert_allclose(actual, expected, rtol=rtol, atol=ATOL, equal_nan=True)
