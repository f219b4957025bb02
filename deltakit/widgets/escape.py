"""EscapeFlyby: burn deep in the well, or far from it?

Departure: from a parking orbit, the delta-v that leaves with a chosen
hyperbolic excess speed when burned at periapsis, against escaping first and
adding the excess speed far from the body. Flyby: the excess speed a prograde
burn at the periapsis of a flyby buys beyond its own delta-v, against the
periapsis radius, for the chosen burn and for half and twice that burn.

Default case: the invented Cinderwren probe (:mod:`deltakit.demo`) at Jupiter
(cited constants): a 5.6 km/s excess speed, a 300 m/s burn, periapsis at
0.6 Jupiter radii altitude.
"""

from __future__ import annotations

import math
from typing import ClassVar

import numpy as np

from ..constants import BODIES
from ..demo import CINDERWREN
from ..departure import escape_burn, powered_flyby
from ..errors import DomainError
from ..plotting._style import COLOURS, KM, style_axes
from ._base import Panel, choice, number, slider, sticky_limits

__all__ = ["EscapeFlyby"]

DEG = math.pi / 180.0
_RADII = np.geomspace(1.0, 50.0, 300)  # flyby periapsis radius in body radii
_SPEED_FRACTIONS = np.linspace(0.0, 1.0, 201)


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
        "dv_periapsis": ("departure burn at periapsis", 1e3, "km/s"),
        "dv_far": ("escape, then burn far away", 1e3, "km/s"),
        "saving": ("saved by burning at periapsis", 1.0, "m/s"),
        "vinf_out": ("flyby: excess speed leaving", 1e3, "km/s"),
        "gain": ("flyby: gain beyond v∞ + dv", 1.0, "m/s"),
        "deflection": ("flyby: turn of the excess velocity", DEG, "deg"),
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
        self._control("body", choice("central body", list(BODIES), body, width="220px"))
        self._control(
            "periapsis_altitude", number("parking periapsis altitude (km)", periapsis_altitude / KM), KM
        )
        self._control(
            "apoapsis_altitude", number("parking apoapsis altitude (km)", apoapsis_altitude / KM), KM
        )
        self._control(
            "vinf", slider("excess speed v∞ (km/s)", vinf / 1e3, 0.0, 20.0, 0.05, readout_format=".2f"), 1e3
        )
        self._control("flyby_altitude", number("flyby periapsis altitude (km)", flyby_altitude / KM), KM)
        self._control(
            "flyby_dv", slider("flyby burn (m/s)", flyby_dv, 0.0, 3000.0, 10.0, readout_format=".0f"), 1.0
        )
        self._gains_key: tuple | None = None
        self._departure_key: tuple | None = None
        self._speed_top = 1000.0
        self._build_figure()
        self._finish(
            "Escape and flyby: what burning deep in the well buys",
            [["body"], ["periapsis_altitude", "apoapsis_altitude"], ["vinf"], ["flyby_altitude", "flyby_dv"]],
        )

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
        style_axes(ax, xlabel="excess speed v∞ (km/s)", ylabel="delta-v needed (km/s)", title="departure")
        ax.legend(loc="upper left", fontsize="small", framealpha=0.85)
        ax = self.flyby_axes
        self._gain_curves = []
        for factor, style, width in ((0.5, ":", 1.3), (1.0, "-", 1.9), (2.0, "--", 1.3)):
            (line,) = ax.plot(
                _RADII, np.zeros_like(_RADII), color=COLOURS["burn"], linestyle=style, linewidth=width
            )
            self._gain_curves.append((factor, line))
        (self._flyby_now,) = ax.plot(
            [1.0], [0.0], "o", color=COLOURS["before"], markersize=7, label="this flyby", zorder=5
        )
        ax.set_xscale("log")
        ax.set_xlim(1.0, 50.0)
        style_axes(
            ax,
            xlabel="flyby periapsis radius (body radii)",
            ylabel="gain beyond v∞ + dv (m/s)",
            title="powered flyby",
        )
        fig.subplots_adjust(left=0.08, right=0.985, bottom=0.14, top=0.91, wspace=0.28)
        self.view.animate(
            self._at_periapsis,
            self._far,
            self._now,
            *(line for _, line in self._gain_curves),
            self._flyby_now,
        )

    def _update(self, changed: set[str]) -> None:
        v = self.values
        body = BODIES[v["body"]]
        hp, ha, hf = v["periapsis_altitude"], v["apoapsis_altitude"], v["flyby_altitude"]
        if hp < 0.0:
            raise DomainError(
                f"parking periapsis altitude {hp / KM:g} km is below the surface of {body.name}."
            )
        if ha < hp:
            raise DomainError(
                f"parking apoapsis altitude {ha / KM:g} km is below the periapsis altitude {hp / KM:g} km."
            )
        if hf < 0.0:
            raise DomainError(f"flyby periapsis altitude {hf / KM:g} km is below the surface of {body.name}.")
        if v["vinf"] < 0.0 or v["flyby_dv"] < 0.0:
            raise DomainError("excess speed and flyby burn must be >= 0.")
        rp, ra, rf = body.radius + hp, body.radius + ha, body.radius + hf
        vinf, dv = v["vinf"], v["flyby_dv"]
        dv_periapsis = float(escape_burn(rp, vinf, body.mu, ra))
        just_escape = float(escape_burn(rp, 0.0, body.mu, ra))
        dv_far = just_escape + vinf
        flyby = powered_flyby(vinf, rf, dv, body.mu)
        first = not self._results
        top = self._speed_top
        if first or not 0.25 * top <= vinf <= 0.8 * top:  # the speed axis moves only when needed
            top = max(2.0 * vinf, 1000.0)
        speeds = _SPEED_FRACTIONS * top
        departure_key = (body.name, rp, ra, top)
        departure_curve = None
        if departure_key != self._departure_key:
            departure_curve = np.asarray(escape_burn(rp, speeds, body.mu, ra))
        gains = None
        gains_key = (body.name, vinf, dv)
        if gains_key != self._gains_key:
            gains = [
                np.asarray(powered_flyby(vinf, _RADII * body.radius, f * dv, body.mu).gain)
                for f, _ in self._gain_curves
            ]
        # computed: move the artists
        full = first or bool(changed & {"body", "flyby_dv"})
        if departure_curve is not None:
            self._at_periapsis.set_data(speeds / 1e3, departure_curve / 1e3)
            self._far.set_data(speeds / 1e3, (just_escape + speeds) / 1e3)
            self.departure_axes.set_xlim(0.0, top / 1e3)
            self.departure_axes.set_ylim(0.0, 1.05 * (just_escape + top) / 1e3)
            self._speed_top, self._departure_key = top, departure_key
            full = True
        self._now.set_data([vinf / 1e3, vinf / 1e3], [dv_periapsis / 1e3, dv_far / 1e3])
        if gains is not None:
            for (factor, line), gain in zip(self._gain_curves, gains):
                line.set_ydata(gain)
                line.set_label(f"burn {factor * dv:.0f} m/s")
            if first or "flyby_dv" in changed:
                self.flyby_axes.legend(loc="upper right", fontsize="small", framealpha=0.85)
            finite = np.concatenate([g[np.isfinite(g)] for g in gains]) if gains else np.array([])
            high = float(finite.max()) if finite.size else 1.0
            full |= sticky_limits(self.flyby_axes, 0.0, max(high, 1.0), force=first)
            self._gains_key = gains_key
        self._flyby_now.set_data([rf / body.radius], [float(flyby.gain)])
        self._fast = not full
        self._results = {
            "dv_periapsis": dv_periapsis,
            "dv_far": dv_far,
            "saving": dv_far - dv_periapsis,
            "vinf_out": float(flyby.vinf_out),
            "gain": float(flyby.gain),
            "deflection": float(flyby.deflection),
        }
        notes = []
        if rf / body.radius > _RADII[-1]:
            notes.append("The flyby periapsis lies beyond the right edge of the flyby plot.")
        self._show_readouts(self._results, notes)
