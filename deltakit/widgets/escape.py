"""EscapeFlyby: burn deep in the well, or far from it?

Departure: from a parking orbit, the delta-v that leaves with a chosen
hyperbolic excess speed when burned at periapsis, against escaping first and
adding the excess speed far from the body. Flyby: the excess speed a prograde
burn at the periapsis of a flyby buys beyond its own delta-v, against the
periapsis radius, for the chosen burn and for half and twice that burn (the
legend names them so, and stays put while the burn slider moves).

Default case: the invented Cinderwren probe (:mod:`deltakit.demo`) at Jupiter
(cited constants): a 5.6 km/s excess speed, a 300 m/s burn, periapsis at
0.6 Jupiter radii altitude.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, ClassVar

import numpy as np

from ..constants import BODIES
from ..demo import CINDERWREN
from ..departure import escape_burn, powered_flyby
from ..plotting._style import COLOURS, plain_log_ticks, style_axes
from ..units import deg, km, km_per_s
from ._base import Computed, InputError, Panel, apsides_at, choice, follow_limits, number, radius_at, slider

__all__ = ["EscapeFlyby"]

_RADII = np.geomspace(1.0, 50.0, 300)  # flyby periapsis radius in body radii
_SPEED_FRACTIONS = np.linspace(0.0, 1.0, 201)
#: The flyby burns drawn, as multiples of the chosen one, with their line styles and legend names
#: (names that do not change with the burn slider: the legend stays in the background).
_BURN_FACTORS = (
    (0.5, ":", 1.3, "half this burn"),
    (1.0, "-", 1.9, "this burn"),
    (2.0, "--", 1.3, "twice this burn"),
)
_DEPARTURE_INPUTS = {"body", "periapsis_altitude", "apoapsis_altitude"}
#: Legends sit above their axes, where no curve runs under them.
_LEGEND_ABOVE = {
    "loc": "lower center",
    "bbox_to_anchor": (0.5, 1.0),
    "ncol": 2,
    "fontsize": "small",
    "frameon": False,
    "columnspacing": 1.0,
    "handlelength": 1.8,
}


def speed_axis_top(vinf: float) -> float:
    """Right end of the departure plot's speed axis, m/s: 1000 m/s times a power of two.

    The excess speed stays below 80 % of it; the axis (a full redraw) moves
    only when the speed crosses one of these steps.

    >>> speed_axis_top(0.0), speed_axis_top(5600.0), speed_axis_top(6400.0), speed_axis_top(6401.0)
    (1000.0, 8000.0, 8000.0, 16000.0)
    """
    steps = max(0, math.ceil(math.log2(max(vinf / 0.8, 1000.0) / 1000.0)))
    return 1000.0 * 2.0**steps


class EscapeFlyby(Panel):
    """Departure delta-v at periapsis against far away, and the powered-flyby gain.

    Parameters (keyword-only, SI)
    -----------------------------
    body : str
        Central body (a key of :data:`deltakit.constants.BODIES`).
    periapsis_altitude, apoapsis_altitude : float
        Parking orbit above the body's radius, m (equal for a circle).
    vinf : float
        Hyperbolic excess speed to leave with, and of the flyby's arrival, m/s.
    flyby_altitude : float
        Periapsis altitude of the flyby, m.
    flyby_dv : float
        Prograde burn at the flyby periapsis, m/s.

    Examples
    --------
    >>> from deltakit.widgets import EscapeFlyby
    >>> panel = EscapeFlyby()
    >>> panel.results["dv_periapsis"] < panel.results["dv_far"]
    True
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "dv_periapsis": ("departure burn at periapsis", km_per_s, "km/s"),
        "dv_far": ("escape, then burn far away", km_per_s, "km/s"),
        "saving": ("saved by burning at periapsis", 1.0, "m/s"),
        "vinf_out": ("flyby: excess speed leaving", km_per_s, "km/s"),
        "gain": ("flyby: gain beyond v∞ + dv", 1.0, "m/s"),
        "deflection": ("flyby: turn of the excess velocity", deg, "deg"),
    }

    def __init__(
        self,
        *,
        body: str = CINDERWREN.body.name,
        periapsis_altitude: float = CINDERWREN.periapsis_altitude,
        apoapsis_altitude: float = CINDERWREN.apoapsis_altitude,
        vinf: float = CINDERWREN.vinf,
        flyby_altitude: float = CINDERWREN.periapsis_altitude,
        flyby_dv: float = 300.0,
    ) -> None:
        super().__init__()
        self._control("body", choice("central body", list(BODIES), CINDERWREN.body.name, width="220px"))
        self._control("periapsis_altitude", number("parking periapsis altitude (km)", 0.0), km, "m")
        self._control("apoapsis_altitude", number("parking apoapsis altitude (km)", 0.0), km, "m")
        self._control(
            "vinf",
            slider("excess speed v∞ (km/s)", 0.0, 0.0, 20.0, 0.05, readout_format=".2f"),
            km_per_s,
            "m/s",
        )
        self._control("flyby_altitude", number("flyby periapsis altitude (km)", 0.0), km, "m")
        self._control(
            "flyby_dv", slider("flyby burn (m/s)", 0.0, 0.0, 3000.0, 10.0, readout_format=".0f"), 1.0, "m/s"
        )
        self._build_figure()
        self._finish(
            "Escape and flyby: what burning deep in the well buys",
            [["body"], ["periapsis_altitude", "apoapsis_altitude"], ["vinf"], ["flyby_altitude", "flyby_dv"]],
            initial={
                "body": body,
                "periapsis_altitude": periapsis_altitude,
                "apoapsis_altitude": apoapsis_altitude,
                "vinf": vinf,
                "flyby_altitude": flyby_altitude,
                "flyby_dv": flyby_dv,
            },
        )

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """Departure burns and flyby gains for ``values`` (SI, keyed like the controls)."""
        body = BODIES[values["body"]]
        rp, ra = apsides_at(values, body, prefix="parking ")
        rf = radius_at(values, "flyby_altitude", "flyby periapsis altitude", body)
        vinf, dv = values["vinf"], values["flyby_dv"]
        if vinf < 0.0:
            raise InputError(f"excess speed must be >= 0 km/s (got {vinf / km_per_s:g} km/s).", "vinf")
        if dv < 0.0:
            raise InputError(f"flyby burn must be >= 0 m/s (got {dv:g} m/s).", "flyby_dv")
        dv_periapsis = float(escape_burn(rp, vinf, body.mu, ra))
        just_escape = float(escape_burn(rp, 0.0, body.mu, ra))
        speeds = _SPEED_FRACTIONS * speed_axis_top(vinf)
        flyby = powered_flyby(vinf, rf, dv, body.mu)
        gains = [
            np.asarray(powered_flyby(vinf, _RADII * body.radius, factor * dv, body.mu).gain)
            for factor, _, _, _ in _BURN_FACTORS
        ]
        results = {
            "dv_periapsis": dv_periapsis,
            "dv_far": just_escape + vinf,
            "saving": just_escape + vinf - dv_periapsis,
            "vinf_out": float(flyby.vinf_out),
            "gain": float(flyby.gain),
            "deflection": float(flyby.deflection),
        }
        notes = []
        if rf / body.radius > _RADII[-1]:
            notes.append("The flyby periapsis lies beyond the right edge of the flyby plot.")
        drawing = {
            "body": body,
            "speeds": speeds,
            "at_periapsis": np.asarray(escape_burn(rp, speeds, body.mu, ra)),
            "far": just_escape + speeds,
            "gains": gains,
            "flyby_radius": rf / body.radius,
            "vinf": vinf,
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ the figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 3.8)
        self.departure_axes, self.flyby_axes = fig.subplots(1, 2)
        ax = self.departure_axes
        (self._at_periapsis,) = ax.plot(
            [], [], color=COLOURS["hohmann"], linewidth=1.8, label="burn at periapsis"
        )
        (self._far,) = ax.plot(
            [],
            [],
            color=COLOURS["reference"],
            linestyle="--",
            linewidth=1.6,
            label="escape, then burn far away",
        )
        (self._now,) = ax.plot(
            [0.0, 0.0], [0.0, 0.0], "o", color=COLOURS["burn"], markersize=6, label="this v∞"
        )
        style_axes(ax, xlabel="excess speed v∞ (km/s)", ylabel="delta-v needed (km/s)")
        ax.set_title("departure", fontsize="medium", pad=38)  # above its legend
        ax.legend(**_LEGEND_ABOVE)
        ax = self.flyby_axes
        self._gain_curves = []
        for factor, style, width, label in _BURN_FACTORS:
            (line,) = ax.plot(
                _RADII,
                np.zeros_like(_RADII),
                color=COLOURS["burn"],
                linestyle=style,
                linewidth=width,
                label=label,
            )
            self._gain_curves.append((factor, line))
        (self._flyby_now,) = ax.plot(
            [1.0], [0.0], "o", color=COLOURS["before"], markersize=7, label="this flyby", zorder=5
        )
        ax.set_xscale("log")
        plain_log_ticks(ax.xaxis)
        ax.set_xlim(1.0, 50.0)
        style_axes(ax, xlabel="flyby periapsis radius (body radii)", ylabel="gain beyond v∞ + dv (m/s)")
        ax.set_title("powered flyby", fontsize="medium", pad=38)
        self._flyby_legend = ax.legend(handles=[line for _, line in self._gain_curves], **_LEGEND_ABOVE)
        fig.subplots_adjust(left=0.08, right=0.985, bottom=0.14, top=0.8, wspace=0.28)
        self._columns([self.departure_axes], [self.flyby_axes])
        self.view.animate(
            self._at_periapsis,
            self._far,
            self._now,
            *(line for _, line in self._gain_curves),
            self._flyby_now,
        )

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d, r = computed.drawing, computed.results
        speeds = d["speeds"] / km_per_s
        self._at_periapsis.set_data(speeds, d["at_periapsis"] / km_per_s)
        self._far.set_data(speeds, d["far"] / km_per_s)
        if self.departure_axes.get_xlim()[1] != speeds[-1]:  # the speed axis: powers of two (speed_axis_top)
            self.departure_axes.set_xlim(0.0, speeds[-1])
            self.view.invalidate(self.departure_axes)
        if follow_limits(
            self.departure_axes, 0.0, d["far"][-1] / km_per_s, force=bool(changed & _DEPARTURE_INPUTS)
        ):
            self.view.invalidate(self.departure_axes)
        vinf = d["vinf"]
        self._now.set_data([vinf / km_per_s] * 2, [r["dv_periapsis"] / km_per_s, r["dv_far"] / km_per_s])
        for (_, line), gain in zip(self._gain_curves, d["gains"]):
            line.set_ydata(gain)
        finite = np.concatenate([g[np.isfinite(g)] for g in d["gains"]])
        high = float(finite.max()) if finite.size else 1.0
        if follow_limits(self.flyby_axes, 0.0, max(high, 1.0), force="body" in changed):
            self.view.invalidate(self.flyby_axes)
        self._flyby_now.set_data([d["flyby_radius"]], [r["gain"]])
