"""Unit scales, and quantities from astropy or pint turned into SI.

deltakit speaks SI in every argument and return value. The names here are the
size of one unit in SI, so a value *in* that unit is written ``value * unit``
and a value in SI is shown in it as ``value / unit``::

    >>> from deltakit.units import km, deg, hour
    >>> 7000 * km          # m
    7000000.0
    >>> round(0.5 / deg, 4)  # rad shown in degrees
    28.6479
    >>> 2 * hour           # s
    7200.0

They are the one place where panels, tables and plots find their display
scales too, so a label that says "km" and the number under it cannot disagree.

Quantities: every public numeric function also takes an
``astropy.units.Quantity`` or a ``pint`` quantity, converted to the SI unit of
that parameter when its dimension fits (``7000 * u.km`` is read as 7e6 m) and
refused with :class:`~deltakit.DomainError` when it does not. A quantity's bare
number is never read in the wrong unit. Neither library is imported unless such
a quantity is passed.
"""

from __future__ import annotations

import math
from typing import Any

from .errors import DomainError

__all__ = [
    "m",
    "km",
    "au",
    "s",
    "minute",
    "hour",
    "day",
    "year",
    "kg",
    "tonne",
    "m_per_s",
    "km_per_s",
    "rad",
    "deg",
    "J_per_kg",
    "MJ_per_kg",
    "km2_per_s2",
    "N",
    "kN",
    "percent",
    "is_quantity",
    "quantity_to_si",
]

# Length
m = 1.0
km = 1.0e3
#: The astronomical unit, exact by definition (IAU 2012 Resolution B2).
au = 149_597_870_700.0
# Time
s = 1.0
minute = 60.0
hour = 3600.0
day = 86_400.0
#: The Julian year of 365.25 days (IAU), the year of rates and ephemerides.
year = 365.25 * day
# Mass
kg = 1.0
tonne = 1.0e3
# Speed
m_per_s = 1.0
km_per_s = 1.0e3
# Angle
rad = 1.0
deg = math.pi / 180.0
# Specific energy (J/kg = m^2/s^2), and C3 as analysts quote it (km^2/s^2)
J_per_kg = 1.0
MJ_per_kg = 1.0e6
km2_per_s2 = 1.0e6
# Force
N = 1.0
kN = 1.0e3
# Fractions: a margin of 5 % is ``5 * percent`` = 0.05
percent = 0.01


def is_quantity(value: Any) -> bool:
    """True for an astropy or pint quantity (decided without importing either)."""
    root = type(value).__module__.partition(".")[0]
    return root in ("astropy", "pint") and (hasattr(value, "unit") or hasattr(value, "units"))


def _unit_text(unit: str) -> str:
    """deltakit's unit strings ("m^3/s^2") in the syntax both libraries parse ("m**3/s**2")."""
    return unit.replace("^", "**")


def quantity_to_si(value: Any, name: str, unit: str) -> Any:
    """The magnitude of an astropy or pint quantity in the SI unit ``unit``.

    ``unit`` is deltakit's unit string for the parameter (``"m"``, ``"m/s"``,
    ``"m^3/s^2"``, ``"rad"``; ``""`` for a pure number). Raises
    :class:`~deltakit.DomainError` naming ``name`` when the quantity's
    dimension does not fit.

    Examples
    --------
    >>> import astropy.units as u
    >>> float(quantity_to_si(7000 * u.km, "r", "m"))
    7000000.0
    >>> quantity_to_si(3 * u.s, "r", "m")
    Traceback (most recent call last):
    ...
    deltakit.errors.DomainError: `r` must be in m (or a unit of the same dimension), got a quantity in s
    """
    wanted = unit or "a pure number"
    root = type(value).__module__.partition(".")[0]
    if root == "astropy":
        import astropy.units as u

        target = u.Unit(_unit_text(unit)) if unit else u.dimensionless_unscaled
        try:
            return value.to_value(target)
        except u.UnitsError:
            shown = value.unit.to_string() or "no unit"
    else:
        import pint

        try:
            return value.m_as(_unit_text(unit) if unit else "dimensionless")
        except pint.DimensionalityError:
            shown = f"{value.units:~}" or "no unit"
    what = f"in {wanted} (or a unit of the same dimension)" if unit else "a pure number (dimensionless)"
    raise DomainError(f"`{name}` must be {what}, got a quantity in {shown}")
