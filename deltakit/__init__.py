"""deltakit: where and how to spend a fixed propellant load.

The numeric layer (SI units, NumPy broadcasting) is importable from here; the
symbolic layer (:mod:`deltakit.symbolic`), the panels (:mod:`deltakit.widgets`),
the plot helpers (:mod:`deltakit.plotting`) and :func:`sweep` load on first use,
so ``import deltakit`` stays fast and never imports sympy, ipywidgets or
matplotlib.

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> import deltakit as dk
>>> from deltakit.constants import EARTH
>>> leo, geo = EARTH.radius + 300e3, 42164e3
>>> round(float(dk.hohmann(leo, geo, EARTH.mu).total))
3893
"""

from __future__ import annotations

import importlib
from typing import Any

from . import constants
from .errors import DomainError

__version__ = "0.1.0"

# Public name -> module that defines it. Loaded on first attribute access
# (PEP 562), so the package import costs only what a user touches.
_NAMES: dict[str, str] = {
    # two-body relations
    "circular_speed": "twobody",
    "escape_speed": "twobody",
    "vis_viva": "twobody",
    "specific_energy": "twobody",
    # conics
    "Conic": "conic",
    # impulsive burns
    "burn": "burns",
    "burn_prograde": "burns",
    "burn_at_angle": "burns",
    "energy_gain": "burns",
    "BurnOutcome": "burns",
    # orbits in space: targeting, turning the plane, low thrust
    "burn_to": "targeting",
    "plane_change_burns": "planes",
    "PlaneChangeBurns": "planes",
    "inclination_change_cost": "planes",
    "InclinationChange": "planes",
    "edelbaum": "lowthrust",
    # transfers and plane changes
    "hohmann": "transfers",
    "bielliptic": "transfers",
    "Transfer": "transfers",
    "plane_change": "transfers",
    "combined_plane_change": "transfers",
    "hohmann_plane_change": "transfers",
    "best_plane_change_split": "transfers",
    # departure, arrival, flyby
    "escape_burn": "departure",
    "capture_burn": "departure",
    "powered_flyby": "departure",
    "Flyby": "departure",
    # propulsion and energy accounting
    "exhaust_velocity": "propulsion",
    "rocket_dv": "propulsion",
    "propellant_mass": "propulsion",
    "ejection_energy": "propulsion",
    "burn_energy": "propulsion",
    "EnergySplit": "propulsion",
    "propulsive_efficiency": "propulsion",
    # budgets, vehicles, margins, staging and dispersions
    "Budget": "budget",
    "BudgetLine": "budget",
    "SystemUsage": "budget",
    "PropulsionSystem": "vehicle",
    "Stage": "vehicle",
    "MarginPolicy": "margins",
    "optimal_staging": "staging",
    "StagingSplit": "staging",
    "disperse": "dispersions",
    "Normal": "dispersions",
    "Uniform": "dispersions",
    "Triangular": "dispersions",
    "report": "reports",
    # finite burns and Kepler's equation
    "thrust_arc": "finite",
    "ArcOutcome": "finite",
    "loss_table": "finite",
    "mean_to_eccentric": "kepler",
    "eccentric_to_mean": "kepler",
    "mean_to_hyperbolic": "kepler",
    "hyperbolic_to_mean": "kepler",
    "mean_anomaly": "kepler",
    "mean_motion": "kepler",
    "true_anomaly_from_mean": "kepler",
    "time_of_flight": "kepler",
    "propagate": "kepler",
    # between the planets (needs the `planets` extra; maps also the `scale` extra)
    "epoch": "timescales",
    "planet_state": "ephemeris",
    "lambert": "lambert_solver",
    "LambertSolution": "lambert_solver",
    "lambert_time_of_flight": "lambert_solver",
    "transfer_map": "windows",
    "transfer_pair": "windows",
    "TransferPair": "windows",
    "add_transfer": "windows",
    # trade-study sweeps (needs the `scale` extra)
    "sweep": "sweeps",
    "save_sweep": "sweeps",
    "open_sweep": "sweeps",
    "best_burn_point": "trades",
    "bielliptic_break_even": "trades",
    "propellant_grid": "trades",
}

_SUBMODULES = ("symbolic", "widgets", "plotting")

__all__ = ["DomainError", "constants", *_NAMES, *_SUBMODULES]


def __getattr__(name: str) -> Any:
    module = _NAMES.get(name)
    if module is not None:
        value = getattr(importlib.import_module(f".{module}", __name__), name)
        globals()[name] = value
        return value
    if name in _SUBMODULES:
        return importlib.import_module(f".{name}", __name__)
    raise AttributeError(f"module 'deltakit' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
