"""BurnPointExplorer: where on an orbit does a burn buy the most energy?

Choose the central body, the orbit (periapsis and apoapsis altitudes), the
size and direction of an impulsive burn, and slide the burn point around the
orbit. The panel shows the orbit before (slate) and after (amber, dashed), the
energy change of the same burn at every point with the current one marked, and
readouts: speed at the burn, energy change, the new apsides, and the gain over
making the same burn at apoapsis (the Oberth effect in numbers).

Default case: the invented Rustline orbiter (:mod:`deltakit.demo`) in its
300 x 33 000 km science orbit around Mars (cited constants), trimming with
100 m/s.
"""

from __future__ import annotations

import math
from typing import Any, ClassVar

import numpy as np

from ..conic import Conic
from ..constants import BODIES
from ..demo import RUSTLINE
from ..errors import DomainError
from ..plotting._style import COLOURS, KM, MJ_PER_KG
from ..plotting.energy import energy_gain_curve, plot_energy_gain
from ..plotting.orbits import burn_at_angle, conic_points, draw_burn, draw_conic, update_burn, update_conic
from ._base import Panel, choice, number, slider, sticky_limits

__all__ = ["DIRECTIONS", "BurnPointExplorer"]

DEG = math.pi / 180.0

#: Burn directions offered: name -> (angle in rad or None for the angle control, reference).
DIRECTIONS: dict[str, tuple[float | None, str]] = {
    "prograde": (0.0, "velocity"),
    "retrograde": (math.pi, "velocity"),
    "radial out": (math.pi / 2, "transverse"),
    "radial in": (-math.pi / 2, "transverse"),
    "any angle from prograde": (None, "velocity"),
}

_ORBIT_INPUTS = {"body", "periapsis_altitude", "apoapsis_altitude"}
_BURN_INPUTS = {"dv", "direction", "angle"}


class BurnPointExplorer(Panel):
    """Slide a burn around an orbit and watch the energy it adds.

    Parameters (keyword-only, SI)
    -----------------------------
    body : str
        Name of the central body (a key of :data:`deltakit.constants.BODIES`).
    periapsis_altitude, apoapsis_altitude : float
        Orbit above the body's radius, m.
    dv : float
        Size of the burn, m/s (>= 0; use ``direction`` for its sense).
    direction : str
        One of :data:`DIRECTIONS`.
    angle : float
        Burn direction from prograde, rad, used when ``direction`` is
        ``"any angle from prograde"`` (positive towards the outward side).
    nu : float
        True anomaly of the burn point, rad.

    Examples
    --------
    >>> from deltakit.widgets import BurnPointExplorer
    >>> panel = BurnPointExplorer(nu=0.0)
    >>> round(panel.results["speed"])
    4587
    >>> _ = panel.set(nu=3.141592653589793)
    >>> round(panel.results["gain_ratio"], 2)
    1.0
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "speed": ("speed at the burn", 1e3, "km/s"),
        "energy_change": ("energy change", MJ_PER_KG, "MJ/kg"),
        "periapsis_altitude_after": ("periapsis altitude after", KM, "km"),
        "apoapsis_altitude_after": ("apoapsis altitude after", KM, "km"),
        "eccentricity_after": ("eccentricity after", 1.0, ""),
        "energy_change_at_apoapsis": ("same burn at apoapsis", MJ_PER_KG, "MJ/kg"),
        "gain_over_apoapsis": ("gain over burning at apoapsis", MJ_PER_KG, "MJ/kg"),
        "gain_ratio": ("energy change / that at apoapsis", 1.0, ""),
    }

    def __init__(
        self,
        *,
        body: str = RUSTLINE.body.name,
        periapsis_altitude: float = RUSTLINE.periapsis_altitude,
        apoapsis_altitude: float = RUSTLINE.apoapsis_altitude,
        dv: float = 100.0,
        direction: str = "prograde",
        angle: float = 0.0,
        nu: float = 30 * DEG,
    ) -> None:
        super().__init__()
        self._control("body", choice("central body", list(BODIES), body, width="220px"))
        self._control("periapsis_altitude", number("periapsis altitude (km)", periapsis_altitude / KM), KM)
        self._control("apoapsis_altitude", number("apoapsis altitude (km)", apoapsis_altitude / KM), KM)
        self._control("dv", slider("delta-v (m/s)", dv, 0.0, max(2000.0, dv), 5.0, readout_format=".0f"), 1.0)
        self._control("direction", choice("direction", list(DIRECTIONS), direction, width="300px"))
        self._control("angle", slider("angle from prograde (deg)", angle / DEG, -180.0, 180.0, 1.0), DEG)
        self._control("nu", slider("burn point, true anomaly (deg)", nu / DEG, -180.0, 180.0, 1.0), DEG)
        self._conic: Conic | None = None
        self._artists: dict[str, Any] = {}
        self._build_figure()
        self._finish(
            "Burn point explorer: where does the same delta-v add the most energy?",
            [["body", "periapsis_altitude", "apoapsis_altitude"], ["dv", "direction"], ["angle"], ["nu"]],
        )

    # ------------------------------------------------------------------ figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 4.0)
        self.orbit_axes, self.energy_axes = fig.subplots(1, 2, gridspec_kw={"width_ratios": [1.0, 1.15]})
        placeholder = Conic.circular(RUSTLINE.body.radius * 2, RUSTLINE.body.mu)
        before = draw_conic(
            self.orbit_axes, placeholder, body_radius=RUSTLINE.body.radius, label="before the burn"
        )
        burn = draw_burn(self.orbit_axes, placeholder, 0.0, 1.0)
        burn.after.orbit.set_label("after the burn")
        curve = plot_energy_gain(self.energy_axes, placeholder, 1.0, label="this burn, at each point")
        (current,) = self.energy_axes.plot(
            [0.0],
            [0.0],
            "o",
            color=COLOURS["burn"],
            markersize=7,
            label="this burn point",
            zorder=5,
            clip_on=False,
        )
        (apo,) = self.energy_axes.plot(
            [180.0],
            [0.0],
            "s",
            color=COLOURS["before"],
            markersize=6,
            label="at apoapsis",
            zorder=5,
            clip_on=False,
        )
        self.orbit_axes.set_aspect("equal", adjustable="box")
        self.orbit_axes.set_title("orbit in its plane", fontsize="medium")
        self.orbit_axes.legend(loc="upper left", fontsize="small", framealpha=0.85)
        # above the axes, where no curve can run under it
        self.energy_axes.legend(
            loc="lower center",
            bbox_to_anchor=(0.5, 1.0),
            ncol=2,
            fontsize="small",
            frameon=False,
            columnspacing=1.0,
            handlelength=1.6,
        )
        fig.subplots_adjust(left=0.125, right=0.975, bottom=0.13, top=0.86, wspace=0.32)
        self._artists = {"before": before, "burn": burn, "curve": curve, "current": current, "apoapsis": apo}
        # what a new burn point moves: redrawn alone over the rest of the figure
        self.view.animate(burn.after.orbit, burn.arrow, burn.marker, curve, apo, current)

    # ------------------------------------------------------------------ model
    def _orbit(self, v: dict[str, Any]) -> tuple[Conic, Any]:
        body = BODIES[v["body"]]
        hp, ha = v["periapsis_altitude"], v["apoapsis_altitude"]
        if hp < 0.0:
            raise DomainError(
                f"periapsis altitude {hp / KM:g} km is below the surface of {body.name} (must be >= 0 km)."
            )
        if ha < hp:
            raise DomainError(
                f"apoapsis altitude {ha / KM:g} km is below the periapsis altitude {hp / KM:g} km."
            )
        return Conic.from_apsides(body.radius + hp, body.radius + ha, body.mu), body

    @staticmethod
    def _direction(v: dict[str, Any]) -> tuple[float, str]:
        angle, reference = DIRECTIONS[v["direction"]]
        return (v["angle"] if angle is None else angle), reference

    def _update(self, changed: set[str]) -> None:
        v = self.values
        if v["dv"] < 0.0:
            raise DomainError(
                f"delta-v must be >= 0 m/s (got {v['dv']:g}); choose the direction for its sense."
            )
        self.controls["angle"].disabled = DIRECTIONS[v["direction"]][0] is not None
        conic, body = self._orbit(v)
        angle, reference = self._direction(v)
        nu, dv = v["nu"], v["dv"]
        outcome = burn_at_angle(conic, nu, dv, angle, reference=reference)
        if np.isnan(float(outcome.energy_change)) or float(outcome.after.inc) != float(conic.inc):
            raise DomainError(
                f"a {dv:g} m/s burn in this direction reverses the motion here: no orbit after it."
            )
        at_apoapsis = burn_at_angle(conic, math.pi, dv, angle, reference=reference)
        curve = None
        if changed & (_ORBIT_INPUTS | _BURN_INPUTS) or self._conic is None:
            curve = energy_gain_curve(
                conic, dv, angle=angle, reference=reference, n=len(self._artists["curve"].get_xdata())
            )
        # everything computed: now move the artists
        after = outcome.after
        art = self._artists
        if changed & _ORBIT_INPUTS or self._conic is None:
            update_conic(art["before"], conic, body_radius=body.radius)
        update_burn(art["burn"], conic, nu, dv, angle=angle, reference=reference, after=after)
        first = self._conic is None
        orbit_changed = bool(changed & _ORBIT_INPUTS) or first
        if orbit_changed:  # the frame follows the orbit only, so it stays put while the burn changes
            self._fit_orbit_axes(conic)
        limits_changed = False
        if curve is not None:
            art["curve"].set_data(*curve)
            finite_y = curve[1][np.isfinite(curve[1])]
            low, high = (float(finite_y.min()), float(finite_y.max())) if finite_y.size else (0.0, 1.0)
            limits_changed = sticky_limits(self.energy_axes, low, high, force=first)
            art["apoapsis"].set_data([180.0], [float(at_apoapsis.energy_change) / MJ_PER_KG])
        art["current"].set_data(
            [math.degrees(math.remainder(nu, 2 * math.pi))], [float(outcome.energy_change) / MJ_PER_KG]
        )
        self._conic = conic
        self._fast = not (orbit_changed or limits_changed)
        # readouts
        energy = float(outcome.energy_change)
        energy_apo = float(at_apoapsis.energy_change)
        rp_after, ra_after = float(after.rp), float(after.ra)
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = energy / energy_apo if energy_apo != 0.0 else math.nan
        self._results = {
            "speed": float(conic.speed(nu)),
            "energy_change": energy,
            "periapsis_altitude_after": rp_after - body.radius,
            "apoapsis_altitude_after": ra_after - body.radius if math.isfinite(ra_after) else math.inf,
            "eccentricity_after": float(after.e),
            "energy_change_at_apoapsis": energy_apo,
            "gain_over_apoapsis": energy - energy_apo,
            "gain_ratio": ratio,
        }
        notes = []
        if float(after.e) >= 1.0:
            notes.append(
                f"After the burn the orbit is open: the vehicle escapes {body.name} "
                f"with an excess speed of {float(after.vinf) / 1e3:.3f} km/s."
            )
        if rp_after < body.radius:
            notes.append(
                "After the burn the periapsis lies below the surface of "
                f"{body.name}: the orbit intersects the body."
            )
        self._show_readouts(self._results, notes)

    def _fit_orbit_axes(self, conic: Conic) -> None:
        """Frame the orbit before the burn, with room around it for the arrow and the orbit after."""
        x, y = conic_points(conic, n=181)
        cx, cy = 0.5 * (x.min() + x.max()), 0.5 * (y.min() + y.max())
        half = 0.62 * max(x.max() - x.min(), y.max() - y.min())
        ax = self.orbit_axes
        ax.set_xlim(cx - half, cx + half)
        ax.set_ylim(cy - half, cy + half)
