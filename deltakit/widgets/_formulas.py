"""Manoeuvre formulas a budget line can come from, with their parameters.

Each formula names the numeric-layer function it calls, its parameters (SI
key, label with display unit, SI per display unit, default in SI) and how to
turn the parameters into a delta-v (or a Transfer, which a budget counts with
its total). Used by :class:`~deltakit.widgets.BudgetBuilder`; kept apart so the
table can be read, tested and extended on its own.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from ..constants import BODIES, EARTH
from ..departure import capture_burn, escape_burn
from ..errors import DomainError
from ..transfers import bielliptic, hohmann, plane_change
from ..units import deg, km

__all__ = ["FORMULAS", "Formula", "Parameter", "evaluate"]


@dataclass(frozen=True)
class Parameter:
    """One input of a formula: SI key, label with display unit, SI per display unit, SI default."""

    key: str
    label: str
    scale: float | None
    default: Any


@dataclass(frozen=True)
class Formula:
    """A way to get a line's delta-v."""

    title: str
    parameters: tuple[Parameter, ...]
    compute: Callable[[dict[str, Any]], Any]


def _body(params: dict[str, Any]):
    name = params.get("body", EARTH.name)
    if name not in BODIES:
        raise DomainError(f"`body` must be one of {list(BODIES)}, not {name!r}")
    return BODIES[name]


def _altitude(params: dict[str, Any], key: str, body) -> float:
    value = float(params[key])
    if value < 0.0:
        raise DomainError(f"{key.replace('_', ' ')} {value / km:g} km is below the surface of {body.name}")
    return body.radius + value


def _departure(function: Callable) -> Callable[[dict[str, Any]], Any]:
    def compute(params: dict[str, Any]) -> Any:
        body = _body(params)
        rp = _altitude(params, "periapsis_altitude", body)
        ra = _altitude(params, "apoapsis_altitude", body)
        if ra < rp:
            raise DomainError("apoapsis altitude is below the periapsis altitude")
        return function(rp, params["vinf"], body.mu, ra)

    return compute


_BODY = Parameter("body", "central body", None, EARTH.name)

FORMULAS: dict[str, Formula] = {
    "number": Formula(
        "delta-v typed in", (Parameter("dv", "delta-v (m/s)", 1.0, 100.0),), lambda p: float(p["dv"])
    ),
    "hohmann": Formula(
        "Hohmann transfer",
        (
            _BODY,
            Parameter("r1", "initial radius (km)", km, EARTH.radius + 400e3),
            Parameter("r2", "final radius (km)", km, 42_164e3),
        ),
        lambda p: hohmann(p["r1"], p["r2"], _body(p).mu),
    ),
    "bielliptic": Formula(
        "bi-elliptic transfer",
        (
            _BODY,
            Parameter("r1", "initial radius (km)", km, EARTH.radius + 400e3),
            Parameter("r2", "final radius (km)", km, 120_000e3),
            Parameter("rb", "intermediate radius (km)", km, 240_000e3),
        ),
        lambda p: bielliptic(p["r1"], p["r2"], p["rb"], _body(p).mu),
    ),
    "plane_change": Formula(
        "plane change",
        (Parameter("v", "speed (km/s)", km, 7_670.0), Parameter("angle", "angle (deg)", deg, 5 * deg)),
        lambda p: plane_change(p["v"], p["angle"]),
    ),
    "escape_burn": Formula(
        "escape from a parking orbit",
        (
            _BODY,
            Parameter("periapsis_altitude", "parking periapsis altitude (km)", km, 400e3),
            Parameter("apoapsis_altitude", "parking apoapsis altitude (km)", km, 400e3),
            Parameter("vinf", "excess speed (km/s)", km, 3_000.0),
        ),
        _departure(escape_burn),
    ),
    "capture_burn": Formula(
        "capture into a parking orbit",
        (
            _BODY,
            Parameter("periapsis_altitude", "parking periapsis altitude (km)", km, 300e3),
            Parameter("apoapsis_altitude", "parking apoapsis altitude (km)", km, 300e3),
            Parameter("vinf", "arrival excess speed (km/s)", km, 2_650.0),
        ),
        _departure(capture_burn),
    ),
}


def evaluate(formula: str, params: dict[str, Any]) -> Any:
    """The delta-v (m/s) or Transfer of ``formula`` for ``params`` (SI).

    Examples
    --------
    >>> round(float(evaluate("plane_change", {"v": 7000.0, "angle": 0.1})), 1)
    699.7
    """
    if formula not in FORMULAS:
        raise DomainError(f"`formula` must be one of {list(FORMULAS)}, not {formula!r}")
    spec = FORMULAS[formula]
    missing = [p.key for p in spec.parameters if p.key not in params]
    if missing:
        raise DomainError(f"{spec.title} needs {missing}")
    result = spec.compute(params)
    total = float(getattr(result, "total", result))
    if not math.isfinite(total):
        raise DomainError(f"{spec.title} has no solution for these parameters")
    return result
