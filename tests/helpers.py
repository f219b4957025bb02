"""What the tests share: the two-body equations of motion integrated by scipy, once, and small tools.

Closed forms in deltakit are checked against an independent numerical route:
the equations of motion of a point mass about one spherical body,
``r'' = -mu r / |r|^3`` (common practice; e.g. Curtis, Orbital Mechanics for
Engineering Students, 3rd ed., Eq. 2.22), integrated with scipy's DOP853. The
right-hand side is written with ``math`` on plain floats (the fastest form for
scipy's one-state-at-a-time calls) and works for planar (2 + 2 components)
and spatial (3 + 3) states alike.

Use::

    from helpers import propagate, two_body_rates, specific_energy

    sol = propagate(r_vec, v_vec, mu, period, events=apsis_event())
"""

from __future__ import annotations

import math
import subprocess
from collections.abc import Callable, Sequence
from typing import Any

import numpy as np
from scipy.integrate import solve_ivp

__all__ = [
    "apsis_event",
    "distance_event",
    "propagate",
    "specific_energy",
    "stop",
    "two_body_rates",
]

#: The tolerance the tests ask of the reference unless they say otherwise.
RTOL = 1e-12


def two_body_rates(t: float, state: Sequence[float], mu: float) -> list[float]:
    """Time derivative of ``state = (*r, *v)`` under the body's gravity alone (2-D or 3-D)."""
    n = len(state) // 2
    position = [float(x) for x in state[:n]]
    scale = -mu / math.hypot(*position) ** 3
    return [*(float(v) for v in state[n:]), *(scale * x for x in position)]


def specific_energy(r_vec: Sequence[float], v_vec: Sequence[float], mu: float) -> float:
    """``v^2/2 - mu/r`` of a state, J/kg (vis-viva; common practice)."""
    return 0.5 * math.fsum(float(v) * float(v) for v in v_vec) - mu / math.hypot(*map(float, r_vec))


def apsis_event(direction: float = 0.0, terminal: bool = False) -> Callable[..., float]:
    """Event at an apsis, where ``r . v`` crosses zero (rising: periapsis passed; falling: apoapsis)."""

    def apsis(t: float, state: Sequence[float], mu: float) -> float:
        n = len(state) // 2
        return math.fsum(float(state[i]) * float(state[n + i]) for i in range(n))

    apsis.direction = direction
    apsis.terminal = terminal
    return apsis


def distance_event(radius: float, terminal: bool = True) -> Callable[..., float]:
    """Event where the distance from the body's centre crosses ``radius`` (m)."""

    def at_distance(t: float, state: Sequence[float], mu: float) -> float:
        n = len(state) // 2
        return math.hypot(*map(float, state[:n])) - radius

    at_distance.terminal = terminal
    return at_distance


def propagate(
    r_vec: Sequence[float],
    v_vec: Sequence[float],
    mu: float,
    duration: float,
    *,
    rtol: float = RTOL,
    atol: float | Sequence[float] | None = None,
    events: Any = None,
    t_eval: Sequence[float] | None = None,
    dense_output: bool = False,
) -> Any:
    """Integrate the two-body equations from ``(r_vec, v_vec)`` for ``duration`` s (negative: backwards).

    ``atol`` defaults to ``rtol`` times the size of the starting position and
    velocity, component by component, so the accuracy is relative whatever the
    body (a lunar orbit and a solar one alike). Returns scipy's solution,
    checked successful; ``sol.y[:n]`` are positions, ``sol.y[n:]`` velocities.
    """
    start = np.concatenate([np.asarray(r_vec, float), np.asarray(v_vec, float)])
    n = start.size // 2
    if atol is None:
        atol = rtol * np.repeat([np.linalg.norm(start[:n]), np.linalg.norm(start[n:])], n)
    sol = solve_ivp(
        two_body_rates, (0.0, duration), start, method="DOP853", rtol=rtol, atol=atol, args=(mu,),
        events=events, t_eval=t_eval, dense_output=dense_output,
    )  # fmt: skip
    assert sol.success, sol.message
    return sol


def stop(process: subprocess.Popen, timeout: float = 20.0) -> None:
    """End a server a test started: politely, then by force after ``timeout`` seconds."""
    process.terminate()
    try:
        process.wait(timeout=timeout)
    except subprocess.TimeoutExpired:
        process.kill()
        process.wait()
