"""BurnPointExplorer: where on an orbit does a burn buy the most energy?

Choose the central body, the orbit (periapsis and apoapsis altitudes), the
size and direction of an impulsive burn, and slide the burn point around the
orbit. The panel shows the orbit before (slate) and after (amber, dashed), the
energy change of the same burn at every point with the current one marked, and
readouts: speed at the burn, energy change, the new apsides, and the gain over
making the same burn at apoapsis (the Oberth effect in numbers).

The orbit view holds both orbits. An orbit after the burn that reaches beyond
:data:`VIEW_RADII` apoapsis radii of the orbit before (an open orbit, or a
very long ellipse) is drawn out to that radius, marked by a dotted circle, and
the readouts say so.

Default case: the invented Rustline orbiter (:mod:`deltakit.demo`) in its
300 x 33 000 km science orbit around Mars (cited constants), trimming with
100 m/s.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, ClassVar

import numpy as np

from ..conic import Conic
from ..constants import BODIES
from ..demo import RUSTLINE
from ..plotting._style import COLOURS
from ..plotting.energy import energy_gain_curve, plot_energy_gain
from ..plotting.orbits import burn_at_angle, draw_burn, draw_conic, update_burn, update_conic
from ..units import MJ_per_kg, deg, km, km_per_s
from ._base import (
    Computed,
    InputError,
    Panel,
    apsides_at,
    choice,
    follow_limits,
    follow_square,
    number,
    slider,
)
from ._limits import COARSE

__all__ = ["DIRECTIONS", "VIEW_RADII", "BurnPointExplorer"]

#: Burn directions offered: name -> (angle in rad or None for the angle control, reference).
DIRECTIONS: dict[str, tuple[float | None, str]] = {
    "prograde": (0.0, "velocity"),
    "retrograde": (math.pi, "velocity"),
    "radial out": (math.pi / 2, "transverse"),
    "radial in": (-math.pi / 2, "transverse"),
    "any angle from prograde": (None, "velocity"),
}

#: The orbit after the burn is drawn out to this many apoapsis radii of the orbit before.
VIEW_RADII = 4.0

_ORBIT_INPUTS = {"body", "periapsis_altitude", "apoapsis_altitude"}
_CURVE_POINTS = 361
#: The energy axis holds at least the energy change of a burn this large at periapsis, m/s.
_ENERGY_FLOOR_DV = 50.0
_CIRCLE = np.linspace(0.0, 2.0 * np.pi, 241)


def _reverses(outcome: Any, conic: Conic) -> bool:
    """True when a burn turns the motion round: no outcome (NaN), or an orbit flown the other way."""
    if math.isnan(float(outcome.energy_change)):
        return True
    return float(getattr(outcome.after, "inc", 0.0)) != float(getattr(conic, "inc", 0.0))


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
    >>> try:
    ...     BurnPointExplorer(dv=-1097.0)
    ... except ValueError as err:
    ...     print(err)
    delta-v must be >= 0 m/s, got -1097 m/s: choose the direction (retrograde, radial in) for its sense.
    """

    #: an open orbit has no apoapsis; a burn that adds nothing at apoapsis has no ratio to it, and one
    #: that would reverse the motion there has no outcome there
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset(
        {"apoapsis_altitude_after", "gain_ratio", "energy_change_at_apoapsis", "gain_over_apoapsis"}
    )
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "speed": ("speed at the burn", km_per_s, "km/s"),
        "energy_change": ("energy change", MJ_per_kg, "MJ/kg"),
        "periapsis_altitude_after": ("periapsis altitude after", km, "km"),
        "apoapsis_altitude_after": ("apoapsis altitude after", km, "km"),
        "eccentricity_after": ("eccentricity after", 1.0, ""),
        "energy_change_at_apoapsis": ("same burn at apoapsis", MJ_per_kg, "MJ/kg"),
        "gain_over_apoapsis": ("gain over burning at apoapsis", MJ_per_kg, "MJ/kg"),
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
        nu: float = 30 * deg,
    ) -> None:
        super().__init__()
        self._control("body", choice("central body", list(BODIES), RUSTLINE.body.name, width="220px"))
        self._control("periapsis_altitude", number("periapsis altitude (km)", 0.0), km, "m")
        self._control("apoapsis_altitude", number("apoapsis altitude (km)", 0.0), km, "m")
        self._control("dv", slider("delta-v (m/s)", 0.0, 0.0, 2000.0, 5.0, readout_format=".0f"), 1.0, "m/s")
        self._control("direction", choice("direction", list(DIRECTIONS), "prograde", width="300px"))
        self._control("angle", slider("angle from prograde (deg)", 0.0, -180.0, 180.0, 1.0), deg, "rad")
        self._control("nu", slider("burn point, true anomaly (deg)", 0.0, -180.0, 180.0, 1.0), deg, "rad")
        self._build_figure()
        self._finish(
            "Burn point explorer: where does the same delta-v add the most energy?",
            [["body", "periapsis_altitude", "apoapsis_altitude"], ["dv", "direction"], ["angle"], ["nu"]],
            initial={
                "body": body,
                "periapsis_altitude": periapsis_altitude,
                "apoapsis_altitude": apoapsis_altitude,
                "dv": dv,
                "direction": direction,
                "angle": angle,
                "nu": nu,
            },
        )

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """The burn at ``values`` (SI, keyed like the controls): readouts, notes, what to draw."""
        body = BODIES[values["body"]]
        rp, ra = apsides_at(values, body)
        dv, nu = values["dv"], values["nu"]
        if dv < 0.0:
            raise InputError(
                f"delta-v must be >= 0 m/s, got {dv:g} m/s: choose the direction (retrograde, radial in) "
                "for its sense.",
                "dv",
            )
        fixed, reference = DIRECTIONS[values["direction"]]
        angle = values["angle"] if fixed is None else fixed
        conic = Conic.from_apsides(rp, ra, body.mu)
        outcome = burn_at_angle(conic, nu, dv, angle, reference=reference)
        energy = float(outcome.energy_change)
        if _reverses(outcome, conic):
            raise InputError(
                f"a {dv:g} m/s burn in this direction reverses the motion here: no orbit after it.",
                "dv",
                "direction",
            )
        at_apoapsis = burn_at_angle(conic, math.pi, dv, angle, reference=reference)
        energy_apo = math.nan if _reverses(at_apoapsis, conic) else float(at_apoapsis.energy_change)
        after = outcome.after
        rp_after, ra_after, e_after = float(after.rp), float(after.ra), float(after.e)
        view_radius = VIEW_RADII * float(conic.ra)
        results = {
            "speed": float(conic.speed(nu)),
            "energy_change": energy,
            "periapsis_altitude_after": rp_after - body.radius,
            "apoapsis_altitude_after": ra_after - body.radius if math.isfinite(ra_after) else math.inf,
            "eccentricity_after": e_after,
            "energy_change_at_apoapsis": energy_apo,
            "gain_over_apoapsis": energy - energy_apo,
            "gain_ratio": energy / energy_apo if energy_apo != 0.0 else math.nan,
        }
        notes = []
        if e_after >= 1.0:
            notes.append(
                f"After the burn the orbit is open: the vehicle escapes {body.name} "
                f"with an excess speed of {float(after.vinf) / km_per_s:.3f} km/s."
            )
        if math.isnan(energy_apo):
            notes.append(
                "The same burn at apoapsis would reverse the motion there: no comparison with burning there."
            )
        clipped = not ra_after <= view_radius
        if clipped:
            notes.append(
                f"The orbit after the burn is drawn out to {view_radius / km:,.0f} km from the centre of "
                f"{body.name} (the dotted circle: {VIEW_RADII:g} apoapsis radii of the orbit before)."
            )
        if rp_after < body.radius:
            notes.append(
                f"After the burn the periapsis lies below the surface of {body.name}: "
                "the orbit intersects the body."
            )
        curve = energy_gain_curve(conic, dv, angle=angle, reference=reference, n=_CURVE_POINTS)
        if fixed is None:
            # any angle: the energy axis holds what every direction can give (dE = v dv cos + dv^2 / 2,
            # largest at periapsis), so turning the burn never moves it
            reach = float(conic.speed(0.0)) * dv / MJ_per_kg
            energy_range = (-reach + 0.5 * dv**2 / MJ_per_kg, reach + 0.5 * dv**2 / MJ_per_kg)
        else:
            # at least what a 50 m/s burn at periapsis gives: small burns show small, not magnified
            floor = float(conic.speed(0.0)) * _ENERGY_FLOOR_DV / MJ_per_kg
            finite = curve[1][np.isfinite(curve[1])]
            low, high = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 0.0)
            energy_range = (min(low, 0.0 if low >= 0.0 else -floor), max(high, floor if high > 0.0 else 0.0))
        drawing = {
            "body": body,
            "conic": conic,
            "after": after,
            "angle": angle,
            "reference": reference,
            "angle_control": fixed is None,
            "nu": nu,
            "dv": dv,
            "view_radius": view_radius,
            "clipped": clipped,
            "curve": curve,
            "energy_range": energy_range,
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ the figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 4.2)
        self.orbit_axes, self.energy_axes = fig.subplots(1, 2, gridspec_kw={"width_ratios": [1.0, 1.15]})
        placeholder = Conic.circular(RUSTLINE.body.radius * 2, RUSTLINE.body.mu)
        before = draw_conic(
            self.orbit_axes, placeholder, body_radius=RUSTLINE.body.radius, label="before the burn"
        )
        burn = draw_burn(self.orbit_axes, placeholder, 0.0, 1.0)
        burn.after.orbit.set_label("after the burn")
        (clip,) = self.orbit_axes.plot(
            [], [], color=COLOURS["reference"], linestyle=":", linewidth=0.9, zorder=2, visible=False
        )
        curve = plot_energy_gain(self.energy_axes, placeholder, 1.0, label="this burn, at each point")
        (current,) = self.energy_axes.plot(
            [0.0], [0.0], "o", color=COLOURS["burn"], markersize=7, label="this burn point", zorder=5
        )
        (apo,) = self.energy_axes.plot(
            [180.0], [0.0], "s", color=COLOURS["before"], markersize=6, label="at apoapsis", zorder=5
        )
        for marker in (current, apo):
            marker.set_clip_on(False)  # whole at the ends of the axis (true anomaly +-180 deg)
        self.orbit_axes.set_aspect("equal", adjustable="box")
        # legends above the axes, where no curve can run under them
        for ax in (self.orbit_axes, self.energy_axes):
            ax.legend(
                loc="lower center",
                bbox_to_anchor=(0.5, 1.0),
                ncol=2,
                fontsize="small",
                frameon=False,
                columnspacing=1.0,
                handlelength=1.6,
            )
        fig.subplots_adjust(left=0.125, right=0.975, bottom=0.12, top=0.86, wspace=0.32)
        self._columns([self.orbit_axes], [self.energy_axes])
        self._artists = {
            "before": before,
            "burn": burn,
            "clip": clip,
            "curve": curve,
            "current": current,
            "apoapsis": apo,
        }
        # what slider steps and a new orbit move: redrawn alone over the rest of the figure
        # (in the order of their zorder, as a full draw stacks them)
        self.view.animate(
            before.body, clip, before.orbit, burn.after.orbit, burn.marker, burn.arrow, curve, apo, current
        )

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d, r = computed.drawing, computed.results
        art = self._artists
        nu, dv = d["nu"], d["dv"]
        self.controls["angle"].disabled = not d["angle_control"]
        new_orbit = bool(changed & _ORBIT_INPUTS)
        if new_orbit:
            update_conic(art["before"], d["conic"], body_radius=d["body"].radius)
        update_burn(
            art["burn"],
            d["conic"],
            nu,
            dv,
            angle=d["angle"],
            reference=d["reference"],
            after=d["after"],
            after_r_max=d["view_radius"],
        )
        radius = d["view_radius"] / km
        art["clip"].set_data(radius * np.cos(_CIRCLE), radius * np.sin(_CIRCLE))
        art["clip"].set_visible(d["clipped"])
        (x0, y0), (x1, y1) = (
            np.nanmin(art["before"].orbit.get_xydata(), axis=0),
            np.nanmax(art["before"].orbit.get_xydata(), axis=0),
        )
        centre, base = (0.5 * (x0 + x1), 0.5 * (y0 + y1)), 0.56 * max(x1 - x0, y1 - y0)
        if follow_square(self.orbit_axes, self._orbit_extent(), centre=centre, base=base, force=new_orbit):
            self.view.invalidate(self.orbit_axes)
        art["curve"].set_data(*d["curve"])
        # the energies scale with the delta-v, swept over a decade: a coarse ladder, crossed less often
        if follow_limits(self.energy_axes, *d["energy_range"], force=new_orbit, rungs=COARSE):
            self.view.invalidate(self.energy_axes)
        art["apoapsis"].set_data([180.0], [r["energy_change_at_apoapsis"] / MJ_per_kg])
        shown_nu = math.degrees(math.remainder(nu, 2 * math.pi))
        art["current"].set_data([shown_nu], [r["energy_change"] / MJ_per_kg])

    def _orbit_extent(self) -> tuple[float, float, float, float]:
        """Box (km) around what the orbit view must hold: both orbits (as drawn) and the arrow."""
        burn = self._artists["burn"]
        parts = [self._artists["before"].orbit.get_xydata(), burn.after.orbit.get_xydata()]
        offset = np.asarray(burn.arrow.get_offsets(), float).reshape(-1, 2)
        tip = offset + np.column_stack([np.ravel(burn.arrow.U), np.ravel(burn.arrow.V)])
        parts += [offset, tip]
        points = np.concatenate(parts)
        points = points[np.isfinite(points).all(axis=1)]
        (x0, y0), (x1, y1) = points.min(axis=0), points.max(axis=0)
        return float(x0), float(x1), float(y0), float(y1)
