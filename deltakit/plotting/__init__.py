"""Plot helpers: orbits, burns, transfers, energy gain, budgets and dispersions in matplotlib.

Every helper takes the Axes first, keyword-only options after the data, passes
``**kwargs`` to one named Axes method, returns the artists it drew, and never
calls ``plt.show()``. Axes show km, km/s, deg and MJ/kg and say so in their
labels; arguments are SI like the numeric layer. ``update_*`` twins move the
artists in place so panels redraw without rebuilding the figure.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

from ._style import COLOURS
from .dispersion import LeftArtists, SensitivityArtists, plot_propellant_left, plot_sensitivity
from .energy import energy_gain_curve, plot_energy_gain, update_energy_gain
from .orbits import (
    BurnArtists,
    ConicArtists,
    TransferArtists,
    burn_at_angle,
    conic_points,
    draw_burn,
    draw_conic,
    draw_transfer,
    update_burn,
    update_conic,
    update_transfer,
)
from .space import Conic3DArtists, conic_points_3d, draw_conic_3d, update_conic_3d
from .waterfall import WaterfallArtists, plot_budget_waterfall, update_budget_waterfall
from .windows import TransferMapArtists, map_minimum, plot_transfer_map

__all__ = [
    "COLOURS",
    "BurnArtists",
    "Conic3DArtists",
    "ConicArtists",
    "LeftArtists",
    "SensitivityArtists",
    "TransferArtists",
    "TransferMapArtists",
    "WaterfallArtists",
    "burn_at_angle",
    "conic_points",
    "conic_points_3d",
    "draw_burn",
    "draw_conic",
    "draw_conic_3d",
    "draw_transfer",
    "energy_gain_curve",
    "map_minimum",
    "plot_budget_waterfall",
    "plot_energy_gain",
    "plot_propellant_left",
    "plot_sensitivity",
    "plot_transfer_map",
    "update_budget_waterfall",
    "update_burn",
    "update_conic",
    "update_conic_3d",
    "update_energy_gain",
    "update_transfer",
]
