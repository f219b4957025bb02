"""What a budget's vehicle is made of: propulsion systems and stages.

A vehicle carries one or more **propulsion systems** (a main engine, a set of
thrusters), each with its own exhaust velocity and its own propellant load,
of which a fraction may be unusable residual. Systems may sit on **stages**:
stacked parts with their own dry mass that the vehicle drops, either when a
budget line says so or as soon as the stage's tanks are spent (the rest of
that burn is then flown by the stage above, as a launcher does).

Conventions: SI units (kg, m/s); a residual is a fraction of the load (0.02 =
2 % of the propellant cannot be burnt and stays in the tank). Stages are listed
bottom first: the first stage declared is the first one dropped in a stack.

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> from deltakit.vehicle import PropulsionSystem
>>> main = PropulsionSystem("main", ve=3150.0, propellant=1200.0, residual=0.02)
>>> round(float(main.usable), 1), round(float(main.residual_mass), 1)
(1176.0, 24.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ._scalars import real, text
from .errors import DomainError
from .margins import fraction

__all__ = ["DROP_MODES", "PropulsionSystem", "Stage"]

#: How a stage leaves the vehicle: at a ``drop_stage`` line, or as soon as its tanks are spent.
DROP_MODES = ("line", "spent")


@dataclass(frozen=True)
class PropulsionSystem:
    """One engine or thruster set with its tank.

    Parameters
    ----------
    name : str
        How lines name the system ("main", "thrusters").
    ve : float
        Effective exhaust velocity, m/s (> 0).
    propellant : float or None
        Propellant loaded, kg (>= 0). None for a budget's implicit main
        system, whose load is what the start mass leaves after the dry mass
        and the other tanks (or untracked when the dry mass is unknown).
    residual : float
        Fraction of the load that cannot be burnt (0 to 1).
    stage : str or None
        The stage it sits on, or None for the vehicle that stays.

    Examples
    --------
    >>> PropulsionSystem("thrusters", ve=2200.0, propellant=40.0).usable
    40.0
    """

    name: str
    ve: float
    propellant: float | None = None
    residual: float = 0.0
    stage: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", text(self.name, "name", empty=False))
        object.__setattr__(self, "ve", real(self.ve, "ve", "m/s", low=0.0, strict=True))
        if self.propellant is not None:
            object.__setattr__(self, "propellant", real(self.propellant, "propellant", "kg", low=0.0))
        object.__setattr__(
            self, "residual", fraction(self.residual, "residual", what="a fraction of the load")
        )
        if self.stage is not None:
            object.__setattr__(self, "stage", text(self.stage, "stage", empty=False))

    @property
    def usable(self) -> float:
        """Propellant that can be burnt, kg (inf when the load is untracked)."""
        return math.inf if self.propellant is None else self.propellant * (1.0 - self.residual)

    @property
    def residual_mass(self) -> float:
        """Propellant that stays in the tank, kg."""
        return 0.0 if self.propellant is None else self.propellant * self.residual

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready data in SI units."""
        return {
            "name": self.name,
            "ve_m_per_s": self.ve,
            "propellant_kg": self.propellant,
            "residual": self.residual,
            "stage": self.stage,
        }


@dataclass(frozen=True)
class Stage:
    """A part of a stacked vehicle that is dropped during the mission.

    Parameters
    ----------
    name : str
        How lines and systems name the stage.
    dry_mass : float
        Its mass without propellant, kg (>= 0).
    drop : {"line", "spent"}
        ``"line"``: it stays until a ``drop_stage`` line; ``"spent"``: it is
        dropped as soon as its tanks are empty, and the rest of that burn is
        flown by the first system of the stage above (or the vehicle's main
        system).
    maturity : str or None
        Design maturity, for the mass growth allowance of the margin policy.

    Examples
    --------
    >>> Stage("carrier", dry_mass=620.0, drop="spent").drop
    'spent'
    """

    name: str
    dry_mass: float
    drop: str = "line"
    maturity: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", text(self.name, "name", empty=False))
        object.__setattr__(self, "dry_mass", real(self.dry_mass, "dry_mass", "kg", low=0.0))
        if self.drop not in DROP_MODES:
            raise DomainError(f"`drop` must be 'line' (at a drop_stage line) or 'spent', not {self.drop!r}")
        if self.maturity is not None:
            object.__setattr__(self, "maturity", text(self.maturity, "maturity", empty=False))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready data in SI units."""
        return {"name": self.name, "dry_mass_kg": self.dry_mass, "drop": self.drop, "maturity": self.maturity}
