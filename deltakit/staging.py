"""Optimal staging: the split of a total delta-v between stages that carries the most payload.

A stack of ``N`` stages, stage ``i`` with exhaust velocity ``c_i`` and
structural ratio ``eps_i`` (structure over structure plus propellant), must
give a total delta-v. Each stage's mass ratio ``n_i`` (mass at its ignition
over mass at its burnout) buys ``c_i ln n_i``; the payload fraction of the
stack is ``prod (1 - n_i eps_i) / (n_i (1 - eps_i))``. Maximising it with a
Lagrange multiplier ``eta`` on the delta-v constraint gives each stage

    n_i = (c_i eta - 1) / (c_i eps_i eta),

with ``eta`` the root of ``sum c_i ln n_i(eta) = total delta-v``: the result
of Curtis, *Orbital Mechanics for Engineering Students*, chapter 11 (section
"Optimal staging"; quoted from memory). Here it is solved with ``y = 1/eta``
in ``[0, min c_i)``, where the sum falls monotonically from its most
``sum c_i ln(1/eps_i)`` (no stage can give more) to minus infinity: a
bracketed Newton iteration, vectorised over any number of cases.

Conventions: SI units (m/s); stages on the last axis, bottom stage first,
cases on the leading axes. Impossible cases give NaN: a total beyond what the
stages can give at all, and totals so small that the optimum would ask a
stage for less than nothing (fewer stages do better there).

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> import numpy as np
>>> from deltakit import optimal_staging
>>> split = optimal_staging(9000.0, [2900.0, 3400.0], [0.08, 0.12])
>>> np.round(split.dv).tolist(), round(float(split.payload_fraction), 4)
([4425.0, 4575.0], 0.0238)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ._checks import broadcast_shape, nonnegative, positive, require, scalar_or_array
from ._results import Result, quantity

__all__ = ["StagingSplit", "optimal_staging"]

_ITERATIONS = 200


@dataclass(frozen=True, repr=False, eq=False)
class StagingSplit(Result):
    """The payload-maximising split of a delta-v between stages.

    Attributes
    ----------
    dv : ndarray, shape (..., N)
        Delta-v each stage gives, m/s (bottom stage first).
    mass_ratio : ndarray, shape (..., N)
        Each stage's mass at ignition over its mass at burnout.
    payload_fraction : ndarray, shape (...)
        Payload mass over lift-off mass of the whole stack.
    multiplier : ndarray, shape (...)
        The Lagrange multiplier ``eta`` of the delta-v constraint, s/m.
    """

    dv: np.ndarray = quantity("m/s")
    mass_ratio: np.ndarray = quantity("")
    payload_fraction: np.ndarray = quantity("")
    multiplier: np.ndarray = quantity("s/m")
    structural_ratio: np.ndarray = quantity("", repr=False)

    def masses(self, payload: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
        """Structure and propellant of each stage for a given payload, kg, each shape (..., N).

        Examples
        --------
        >>> from deltakit import optimal_staging
        >>> split = optimal_staging(9000.0, [2900.0, 3400.0], [0.08, 0.12])
        >>> structure, propellant = split.masses(1000.0)
        >>> round(float(structure.sum() + propellant.sum() + 1000.0) * float(split.payload_fraction))
        1000
        """
        payload = positive(payload, "payload", "kg")
        n, eps = np.asarray(self.mass_ratio), np.asarray(self.structural_ratio)
        # stack mass at each stage's ignition over the stack it carries: n (1 - eps) / (1 - n eps)
        step = n * (1.0 - eps) / (1.0 - n * eps)
        above = payload[..., None] * np.cumprod(step[..., ::-1], axis=-1)[..., ::-1]  # stack at ignition
        carried = above / step
        stage = above - carried
        return stage * eps, stage * (1.0 - eps)


def optimal_staging(total_dv: ArrayLike, ve: ArrayLike, structural_ratio: ArrayLike) -> StagingSplit:
    """Split ``total_dv`` between stages to carry the most payload (Lagrange multiplier result).

    Parameters
    ----------
    total_dv : array_like, shape (...)
        Delta-v the whole stack must give, m/s (>= 0).
    ve : array_like, shape (..., N)
        Exhaust velocity of each stage, m/s (> 0), bottom stage first.
    structural_ratio : array_like, shape (..., N)
        Structure over structure plus propellant of each stage (0 < eps < 1).

    Returns
    -------
    StagingSplit
        Per-stage delta-v and mass ratio, the payload fraction and the
        multiplier; NaN where no split works (see the module notes).

    Examples
    --------
    >>> from deltakit import optimal_staging
    >>> same = optimal_staging(8000.0, [3000.0, 3000.0, 3000.0], [0.1, 0.1, 0.1])
    >>> [round(float(x), 6) for x in same.dv]  # identical stages share the delta-v equally
    [2666.666667, 2666.666667, 2666.666667]
    """
    dv = nonnegative(total_dv, "total_dv", "m/s")
    c = positive(ve, "ve", "m/s")
    eps = positive(structural_ratio, "structural_ratio")
    require(eps, eps >= 1.0, "structural_ratio", "< 1")
    if c.ndim == 0 or eps.ndim == 0:
        c, eps = np.atleast_1d(c), np.atleast_1d(eps)
    stages = broadcast_shape(ve=c, structural_ratio=eps)
    shape = broadcast_shape(total_dv=dv, ve=np.empty(stages[:-1]))
    c = np.broadcast_to(c, shape + stages[-1:])
    eps = np.broadcast_to(eps, shape + stages[-1:])
    dv = np.broadcast_to(dv, shape)
    log_ce = np.log(c * eps)

    def excess(y: np.ndarray) -> np.ndarray:
        return np.sum(c * (np.log(c - y[..., None]) - log_ce), axis=-1) - dv

    with np.errstate(divide="ignore", invalid="ignore"):
        low = np.zeros(shape)  # excess >= 0 here when the total is reachable at all
        high = np.min(c, axis=-1)  # excess -> -inf
        reachable = excess(low) > 0.0
        y = 0.5 * (low + high)
        for _ in range(_ITERATIONS):
            g = excess(y)
            low = np.where(g > 0.0, y, low)
            high = np.where(g > 0.0, high, y)
            slope = -np.sum(c / (c - y[..., None]), axis=-1)
            newton = y - g / slope
            inside = (newton > low) & (newton < high)
            step = np.where(inside, newton, 0.5 * (low + high))
            if np.all((step == y) | ~reachable):
                break
            y = step
        n = (c - y[..., None]) / (c * eps)
        stage_dv = c * np.log(n)
        fraction = np.prod((1.0 - n * eps) / (n * (1.0 - eps)), axis=-1)
        bad = ~reachable | np.any(n < 1.0, axis=-1)
        stage_dv = np.where(bad[..., None], np.nan, stage_dv)
        n = np.where(bad[..., None], np.nan, n)
        fraction = np.where(bad, np.nan, fraction)
        eta = np.where(bad, np.nan, 1.0 / y)
    return StagingSplit(
        dv=stage_dv,
        mass_ratio=n,
        payload_fraction=scalar_or_array(fraction),
        multiplier=scalar_or_array(eta),
        structural_ratio=np.array(eps),
    )
