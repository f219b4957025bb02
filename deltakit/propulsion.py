"""Propulsion and energy accounting: the rocket equation and where the energy goes.

Conventions
-----------
* SI units: masses in kg, speeds in m/s, specific impulse in s, energies in J.
* Exhaust velocity ``ve`` is the effective exhaust speed relative to the
  vehicle, ``ve = isp * G0``.
* Speeds along the line of thrust are signed: positive in the thrust
  direction. The vehicle's starting speed ``v0`` may be negative (moving against
  the thrust); the ejecta leave backwards, at ``v - ve`` (or ``v0 - u``).
* All functions broadcast like NumPy ufuncs; scalars in give NumPy scalars out.
  Plain numbers take a scalar fast path with the same checks and results;
  shapes that do not broadcast raise DomainError naming them.
* No result here is ever NaN: every valid input has an answer. Extreme but
  finite inputs (1e300, 1e-300) give the right answer where it fits a double
  and +-inf where it does not, never a warning.
* The rocket equation's ``ln(m0 / mf)`` is evaluated as
  ``log1p((m0 - mf) / mf)``, which keeps its digits for a burn of a
  millimetre per second (``m0 / mf`` within 1e-12 of 1), and the propellant
  as ``expm1``, for the same reason.

Energy accounting
-----------------
A burn adds kinetic energy to the vehicle and to the exhaust. The sum does not
depend on the speed at which the burn happens, but the vehicle's share does:
burning fast (deep in a gravity well) gives the vehicle more of the same total
and the exhaust less. That is the Oberth effect seen from the energy books.
:func:`ejection_energy` does the books for one discrete ejection,
:func:`burn_energy` for a continuous burn at constant exhaust velocity; both
count each part's kinetic-energy change from the common starting speed.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._checks import (
    broadcast_shape,
    finite,
    finite_number,
    is_number,
    nonnegative,
    nonnegative_number,
    positive,
    positive_number,
    require,
    scalar_or_array,
)
from ._evaluate import on_arrays, on_numbers
from ._results import Result, quantity
from .constants import G0
from .errors import DomainError

__all__ = [
    "exhaust_velocity",
    "rocket_dv",
    "propellant_mass",
    "EnergySplit",
    "ejection_energy",
    "burn_energy",
    "propulsive_efficiency",
]

_MF_RULE = "<= m0 (the final mass cannot exceed the initial mass)"
_EJECTED_RULE = "< m_vehicle (some mass must remain after the ejection)"


# ---------------------------------------------------------------------- kernels (one for both paths)
def _exhaust_velocity(m, isp):
    return isp * G0


def _ideal_dv(m, ve, m0, mf):
    """``ve ln(m0 / mf)`` as ``ve log1p((m0 - mf) / mf)``: exact for m0 close to mf."""
    return ve * m.log1p((m0 - mf) / mf)


def _propellant_from_m0(m, dv, ve, m0):
    return -m0 * m.expm1(-dv / ve)


def _propellant_from_mf(m, dv, ve, mf):
    return mf * m.expm1(dv / ve)


def _ejection(m, m_vehicle, m_ejected, u, v0):
    m_rest = m_vehicle - m_ejected
    dv = m_ejected * u / m_rest
    vehicle = m_rest * dv * (v0 + 0.5 * dv)
    ejecta = m_ejected * u * (0.5 * u - v0)
    total = 0.5 * m_ejected * u * u * m_vehicle / m_rest
    return vehicle, ejecta, total


def _burn(m, m0, mf, ve, v0):
    dv = _ideal_dv(m, ve, m0, mf)
    vehicle = mf * dv * (v0 + 0.5 * dv)
    total = 0.5 * (m0 - mf) * ve * ve
    return vehicle, total - vehicle, total


def _efficiency(m, v, ve):
    ratio = v / ve
    return 2.0 * ratio / (1.0 + ratio * ratio)


def _split(parts: tuple[Any, Any, Any]) -> EnergySplit:
    if not isinstance(parts[0], np.ndarray):  # scalar path: NumPy scalars already
        return EnergySplit(*parts)
    vehicle, ejecta, total = np.broadcast_arrays(*parts)
    return EnergySplit(scalar_or_array(vehicle), scalar_or_array(ejecta), scalar_or_array(total))


@dataclass(frozen=True, repr=False, eq=False)
class EnergySplit(Result):
    """Kinetic-energy changes of a burn, split between vehicle and ejecta.

    Attributes
    ----------
    vehicle : ndarray or numpy scalar
        Kinetic-energy change of the mass that remains, J.
    ejecta : ndarray or numpy scalar
        Kinetic-energy change of the mass thrown out, J (often negative: the
        exhaust of a fast vehicle ends up slower than it started).
    total : ndarray or numpy scalar
        ``vehicle + ejecta``, J: the energy the propellant released into motion.
        It does not depend on the starting speed.
    """

    vehicle: Any = quantity("J")
    ejecta: Any = quantity("J")
    total: Any = quantity("J")


def exhaust_velocity(isp: ArrayLike) -> np.floating | np.ndarray:
    """Effective exhaust velocity from specific impulse, ``isp * G0``, m/s.

    Parameters
    ----------
    isp : array_like, shape (...)
        Specific impulse, s (> 0).

    Returns
    -------
    ndarray or numpy scalar
        m/s. Never NaN.

    Examples
    --------
    >>> from deltakit import exhaust_velocity
    >>> round(float(exhaust_velocity(320.0)), 3)
    3138.128
    """
    if is_number(isp):
        return on_numbers(_exhaust_velocity, positive_number(isp, "isp", "s"))
    return scalar_or_array(on_arrays(_exhaust_velocity, positive(isp, "isp", "s")))


def _mass_numbers(m0: Any, mf: Any) -> tuple[float, float]:
    m0 = positive_number(m0, "m0", "kg")
    mf = positive_number(mf, "mf", "kg")
    if mf > m0:
        require(mf, True, "mf", _MF_RULE, "kg")
    return m0, mf


def _masses(m0: ArrayLike, mf: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    m0 = positive(m0, "m0", "kg")
    mf = positive(mf, "mf", "kg")
    broadcast_shape(m0=m0, mf=mf)
    require(mf, mf > m0, "mf", _MF_RULE, "kg")
    return m0, mf


def rocket_dv(ve: ArrayLike, m0: ArrayLike, mf: ArrayLike) -> np.floating | np.ndarray:
    """Ideal delta-v of the rocket equation, ``ve ln(m0 / mf)``, m/s.

    Parameters
    ----------
    ve : array_like, shape (...)
        Effective exhaust velocity, m/s (> 0).
    m0 : array_like, shape (...)
        Mass before the burn, kg (> 0).
    mf : array_like, shape (...)
        Mass after the burn, kg (> 0 and <= m0; a larger ``mf`` raises
        :class:`~deltakit.DomainError` naming ``mf``).

    Returns
    -------
    ndarray or numpy scalar
        m/s, >= 0. Never NaN.

    Examples
    --------
    >>> from deltakit import rocket_dv
    >>> round(float(rocket_dv(3000.0, 1000.0, 500.0)), 3)
    2079.442
    """
    if is_number(ve, m0, mf):
        ve = positive_number(ve, "ve", "m/s")
        return on_numbers(_ideal_dv, ve, *_mass_numbers(m0, mf))
    ve = positive(ve, "ve", "m/s")
    m0, mf = _masses(m0, mf)
    broadcast_shape(ve=ve, m0=m0, mf=mf)
    return scalar_or_array(on_arrays(_ideal_dv, ve, m0, mf))


def propellant_mass(
    dv: ArrayLike, ve: ArrayLike, m0: ArrayLike | None = None, mf: ArrayLike | None = None
) -> np.floating | np.ndarray:
    """Propellant needed for a delta-v, given the mass before or after the burn, kg.

    Give exactly one of ``m0`` (mass before: ``m0 (1 - exp(-dv/ve))``) and
    ``mf`` (mass after: ``mf (exp(dv/ve) - 1)``).

    Parameters
    ----------
    dv : array_like, shape (...)
        Delta-v, m/s (>= 0).
    ve : array_like, shape (...)
        Effective exhaust velocity, m/s (> 0).
    m0, mf : array_like, shape (...), optional
        Mass before or after the burn, kg (> 0).

    Returns
    -------
    ndarray or numpy scalar
        Propellant, kg, >= 0 (below ``m0`` when ``m0`` is given). Never NaN;
        from ``mf`` it is inf where it exceeds the float range (``dv / ve``
        above about 709).

    Examples
    --------
    >>> from deltakit import propellant_mass
    >>> round(float(propellant_mass(2079.442, 3000.0, m0=1000.0)), 3)
    500.0
    >>> round(float(propellant_mass(2079.442, 3000.0, mf=500.0)), 3)
    500.0
    """
    if (m0 is None) == (mf is None):
        raise DomainError("give exactly one of `m0` (mass before the burn) and `mf` (mass after), in kg")
    if m0 is not None:
        name, mass, kernel = "m0", m0, _propellant_from_m0
    else:
        name, mass, kernel = "mf", mf, _propellant_from_mf
    if is_number(dv, ve, mass):
        return on_numbers(
            kernel,
            nonnegative_number(dv, "dv", "m/s"),
            positive_number(ve, "ve", "m/s"),
            positive_number(mass, name, "kg"),
        )
    dv = nonnegative(dv, "dv", "m/s")
    ve = positive(ve, "ve", "m/s")
    mass = positive(mass, name, "kg")
    broadcast_shape(dv=dv, ve=ve, **{name: mass})
    return scalar_or_array(on_arrays(kernel, dv, ve, mass))


def ejection_energy(m_vehicle: ArrayLike, m_ejected: ArrayLike, u: ArrayLike, v0: ArrayLike) -> EnergySplit:
    """Energy books of one discrete ejection of mass.

    Reading of the set-up: before the ejection the whole vehicle, of mass
    ``m_vehicle``, moves at ``v0``. It throws ``m_ejected`` backwards at speed
    ``u`` measured in the frame that moved with the whole vehicle before the
    ejection (its centre-of-mass frame). The remaining mass
    ``m_rest = m_vehicle - m_ejected`` then gains, by momentum conservation in
    that frame, ``dv = m_ejected u / m_rest``. So ``m_ejected`` must be below
    ``m_vehicle``.

    ``vehicle = 0.5 m_rest ((v0 + dv)^2 - v0^2)``,
    ``ejecta = 0.5 m_ejected ((v0 - u)^2 - v0^2)``, and their sum
    ``total = 0.5 m_ejected u^2 m_vehicle / m_rest``, whatever ``v0``. (With
    ``w = u + dv`` the speed of the ejecta relative to the remaining mass, the
    same total reads ``0.5 w^2 m_ejected m_rest / m_vehicle``.)

    Parameters
    ----------
    m_vehicle : array_like, shape (...)
        Mass of the whole vehicle before the ejection, kg (> 0).
    m_ejected : array_like, shape (...)
        Mass thrown out, kg (>= 0 and < ``m_vehicle``).
    u : array_like, shape (...)
        Speed of the ejecta in the pre-ejection frame, m/s (>= 0).
    v0 : array_like, shape (...)
        Speed of the vehicle before the ejection, m/s, signed along the thrust.

    Returns
    -------
    EnergySplit
        ``vehicle``, ``ejecta`` and ``total``, J. Never NaN.

    Examples
    --------
    A 2 kg cart throws 1 kg back at 1 m/s: the remaining 1 kg gains 1 m/s.

    >>> from deltakit import ejection_energy
    >>> slow = ejection_energy(2.0, 1.0, 1.0, 1.0)
    >>> fast = ejection_energy(2.0, 1.0, 1.0, 10.0)
    >>> float(slow.vehicle), float(fast.vehicle)
    (1.5, 10.5)
    >>> float(slow.total), float(fast.total)
    (1.0, 1.0)
    """
    if is_number(m_vehicle, m_ejected, u, v0):
        m_vehicle = positive_number(m_vehicle, "m_vehicle", "kg")
        m_ejected = nonnegative_number(m_ejected, "m_ejected", "kg")
        if m_ejected >= m_vehicle:
            require(m_ejected, True, "m_ejected", _EJECTED_RULE, "kg")
        u = nonnegative_number(u, "u", "m/s")
        v0 = finite_number(v0, "v0", "m/s")
        return _split(on_numbers(_ejection, m_vehicle, m_ejected, u, v0))
    m_vehicle = positive(m_vehicle, "m_vehicle", "kg")
    m_ejected = nonnegative(m_ejected, "m_ejected", "kg")
    broadcast_shape(m_vehicle=m_vehicle, m_ejected=m_ejected)
    require(m_ejected, m_ejected >= m_vehicle, "m_ejected", _EJECTED_RULE, "kg")
    u = nonnegative(u, "u", "m/s")
    v0 = finite(v0, "v0", "m/s")
    broadcast_shape(m_vehicle=m_vehicle, m_ejected=m_ejected, u=u, v0=v0)
    return _split(on_arrays(_ejection, m_vehicle, m_ejected, u, v0))


def burn_energy(m0: ArrayLike, mf: ArrayLike, ve: ArrayLike, v0: ArrayLike) -> EnergySplit:
    """Energy books of a continuous burn at constant exhaust velocity.

    The vehicle burns from mass ``m0`` down to ``mf`` with exhaust velocity
    ``ve`` (relative to the vehicle at each instant), starting at speed ``v0``;
    it ends at ``v0 + dv`` with ``dv = ve ln(m0/mf)``. With ``X = dv / ve``:

    * ``vehicle = 0.5 mf ((v0 + dv)^2 - v0^2)``;
    * ``ejecta`` = integral over the propellant of
      ``0.5 dm ((v - ve)^2 - v0^2)`` with ``v = v0 + ve ln(m0/m)``, in closed form
      ``0.5 ve^2 (m0 - mf) - mf v0 dv - 0.5 mf dv^2``;
    * ``total = 0.5 (m0 - mf) ve^2``, whatever ``v0``.

    Parameters
    ----------
    m0, mf : array_like, shape (...)
        Mass before and after the burn, kg (> 0, ``mf <= m0``).
    ve : array_like, shape (...)
        Effective exhaust velocity, m/s (> 0).
    v0 : array_like, shape (...)
        Speed at the start of the burn, m/s, signed along the thrust.

    Returns
    -------
    EnergySplit
        ``vehicle``, ``ejecta`` and ``total``, J. Never NaN.

    Examples
    --------
    >>> from deltakit import burn_energy
    >>> split = burn_energy(1000.0, 800.0, 3000.0, [0.0, 7500.0])
    >>> (split.total / 1e6).round(3).tolist()
    [900.0, 900.0]
    >>> (split.vehicle / 1e6).round(1).tolist()
    [179.3, 4195.8]
    """
    if is_number(m0, mf, ve, v0):
        m0, mf = _mass_numbers(m0, mf)
        ve = positive_number(ve, "ve", "m/s")
        return _split(on_numbers(_burn, m0, mf, ve, finite_number(v0, "v0", "m/s")))
    m0, mf = _masses(m0, mf)
    ve = positive(ve, "ve", "m/s")
    v0 = finite(v0, "v0", "m/s")
    broadcast_shape(m0=m0, mf=mf, ve=ve, v0=v0)
    return _split(on_arrays(_burn, m0, mf, ve, v0))


def propulsive_efficiency(v: ArrayLike, ve: ArrayLike) -> np.floating | np.ndarray:
    """Share of the jet's energy that ends up as work on the vehicle.

    ``2 (v/ve) / (1 + (v/ve)^2)``: 1 when the vehicle moves at the exhaust
    velocity (the exhaust is left at rest), 0 at rest. A negative ``v``
    (moving against the thrust) gives a negative value.

    Parameters
    ----------
    v : array_like, shape (...)
        Vehicle speed, m/s, signed along the thrust.
    ve : array_like, shape (...)
        Effective exhaust velocity, m/s (> 0).

    Returns
    -------
    ndarray or numpy scalar
        A pure number in [-1, 1]. Never NaN.

    Examples
    --------
    >>> from deltakit import propulsive_efficiency
    >>> float(propulsive_efficiency(3000.0, 3000.0))
    1.0
    >>> round(float(propulsive_efficiency(1500.0, 3000.0)), 3)
    0.8
    """
    if is_number(v, ve):
        return on_numbers(_efficiency, finite_number(v, "v", "m/s"), positive_number(ve, "ve", "m/s"))
    v = finite(v, "v", "m/s")
    ve = positive(ve, "ve", "m/s")
    broadcast_shape(v=v, ve=ve)
    return scalar_or_array(on_arrays(_efficiency, v, ve))
