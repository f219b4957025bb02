"""Energy gained by one burn, against where on the orbit it is made.

The curve is the Oberth effect made visible: the same delta-v adds the most
orbital energy where the vehicle is fastest (periapsis) and the least where it
is slowest (apoapsis). True anomaly is plotted in degrees, energy in MJ/kg;
the numbers come from :func:`deltakit.burn` through
:func:`~deltakit.plotting.orbits.burn_at_angle`.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from matplotlib.axes import Axes
from matplotlib.lines import Line2D

from ..conic import Conic
from ..units import MJ_per_kg
from ._style import COLOURS, style_axes
from .orbits import _one, burn_at_angle

__all__ = ["energy_gain_curve", "plot_energy_gain", "update_energy_gain"]

#: Open orbits are sampled up to this fraction of their asymptote angle.
_OPEN_FRACTION = 0.97


def energy_gain_curve(
    conic: Conic, dv: float, *, angle: float = 0.0, reference: str = "velocity", n: int = 361
) -> tuple[np.ndarray, np.ndarray]:
    """True anomaly (deg) and energy change (MJ/kg) of the burn at each point.

    Examples
    --------
    >>> from deltakit import Conic
    >>> nu_deg, gain = energy_gain_curve(Conic.from_apsides(7000e3, 14000e3, 3.986e14), 100.0, n=3)
    >>> nu_deg.tolist(), bool(gain[1] > gain[0])
    ([-180.0, 0.0, 180.0], True)
    """
    conic = _one(conic)
    limit = float(conic.true_anomaly_limit)
    if float(conic.e) >= 1.0:
        limit *= _OPEN_FRACTION
    nu = np.linspace(-limit, limit, n)
    outcome = burn_at_angle(conic, nu, dv, angle, reference=reference)
    return np.degrees(nu), np.asarray(outcome.energy_change) / MJ_per_kg


def plot_energy_gain(
    ax: Axes,
    conic: Conic,
    dv: float,
    *,
    angle: float = 0.0,
    reference: str = "velocity",
    n: int = 361,
    **kwargs: Any,
) -> Line2D:
    """Plot the energy change of a burn of ``dv`` (m/s) against its true anomaly.

    Parameters
    ----------
    ax : matplotlib Axes
    conic : Conic
        The orbit before the burn (single orbit).
    dv : float
        Size of the burn, m/s.
    angle : float
        Direction of the burn, rad, from the velocity towards the outward side
        (``reference="velocity"``) or from the transverse direction towards the
        radial one (``reference="transverse"``).
    reference : {"velocity", "transverse"}
    n : int
        Number of burn points sampled.
    **kwargs
        Passed to :meth:`Axes.plot`.

    Returns
    -------
    Line2D
        x: true anomaly, deg; y: specific energy change, MJ/kg.

    Examples
    --------
    >>> from matplotlib.figure import Figure
    >>> from deltakit import Conic
    >>> ax = Figure().add_subplot()
    >>> line = plot_energy_gain(ax, Conic.from_apsides(7000e3, 14000e3, 3.986e14), 100.0)
    >>> float(line.get_xdata()[line.get_ydata().argmax()])
    0.0
    """
    x, y = energy_gain_curve(conic, dv, angle=angle, reference=reference, n=n)
    kwargs.setdefault("color", COLOURS["burn"])
    kwargs.setdefault("linewidth", 1.8)
    (line,) = ax.plot(x, y, **kwargs)
    ax.set_xlim(-180.0, 180.0)
    ax.set_xticks(np.arange(-180, 181, 90))
    style_axes(ax, xlabel="true anomaly at the burn (deg)", ylabel="energy change (MJ/kg)")
    return line


def update_energy_gain(
    line: Line2D, conic: Conic, dv: float, *, angle: float = 0.0, reference: str = "velocity"
) -> Line2D:
    """Recompute the curve of :func:`plot_energy_gain` in place."""
    line.set_data(*energy_gain_curve(conic, dv, angle=angle, reference=reference, n=len(line.get_xdata())))
    return line
