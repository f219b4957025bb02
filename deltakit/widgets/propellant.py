"""PropellantTrade: what a propellant load buys, and where its energy goes.

Dry mass and propellant (or the mass ratio), specific impulse (or exhaust
velocity) and the vehicle's speed when the burn starts. The panel gives the
delta-v of the rocket equation and splits the kinetic energy the burn releases,
``0.5 (m0 - mf) ve^2`` whatever the speed, between the vehicle and its
exhaust: the faster the vehicle already moves, the larger the vehicle's share
(the Oberth effect seen from the propellant's side). A second plot shows the
propulsive efficiency against the speed ratio v/ve.

Default case: the invented Halyard cargo tug (:mod:`deltakit.demo`) starting
its burn at the circular speed of a 400 km Earth orbit (cited constants), to
the speed slider's 10 m/s step.
"""

from __future__ import annotations

import math
from typing import ClassVar

import ipywidgets as widgets
import numpy as np

from ..constants import EARTH, G0
from ..demo import HALYARD
from ..errors import DomainError
from ..plotting._style import COLOURS, style_axes
from ..propulsion import burn_energy, exhaust_velocity, propulsive_efficiency, rocket_dv
from ..twobody import circular_speed
from ._base import Panel, number, slider, sticky_limits

__all__ = ["PropellantTrade"]

GJ = 1.0e9
#: Slider step of the speed, km/s (10 m/s).
_SPEED_STEP = 0.01
#: The circular speed of a 400 km Earth orbit (7668.6 m/s) on the slider's step: 7.67 km/s.
_DEFAULT_SPEED = (
    round(float(circular_speed(EARTH.radius + 400e3, EARTH.mu)) / 1e3 / _SPEED_STEP) * _SPEED_STEP * 1e3
)
_RATIOS = np.linspace(0.0, 5.0, 501)


class PropellantTrade(Panel):
    """Delta-v and the kinetic-energy split of one burn of a whole propellant load.

    Parameters (keyword-only, SI)
    -----------------------------
    dry_mass : float
        Mass left when the propellant is spent, kg.
    propellant_mass : float
        Propellant burned, kg (used when ``mass_input == "propellant mass"``).
    mass_ratio : float or None
        Initial over final mass (used when ``mass_input == "mass ratio"``);
        None: from the two masses.
    mass_input : {"propellant mass", "mass ratio"}
        Which of the two the analyst types; the other follows.
    isp : float
        Specific impulse, s (used when ``exhaust_input == "specific impulse"``).
    exhaust_velocity : float or None
        Effective exhaust velocity, m/s; None: ``isp * G0``.
    exhaust_input : {"specific impulse", "exhaust velocity"}
    speed : float
        Vehicle speed when the burn starts, m/s, along the thrust; the slider
        holds it to 10 m/s (an off-step value is moved to the nearest step
        and the readouts say so). Default: 7670 m/s, the circular speed of a
        400 km Earth orbit to that step.

    Examples
    --------
    >>> from deltakit.widgets import PropellantTrade
    >>> panel = PropellantTrade(dry_mass=1000.0, propellant_mass=1000.0, isp=300.0, speed=0.0)
    >>> round(panel.results["dv"], 1)
    2039.2
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "dv": ("delta-v (rocket equation)", 1.0, "m/s"),
        "mass_ratio": ("mass ratio m0/mf", 1.0, ""),
        "exhaust_velocity": ("exhaust velocity", 1e3, "km/s"),
        "energy_total": ("kinetic energy released", GJ, "GJ"),
        "energy_vehicle": ("  gained by the vehicle", GJ, "GJ"),
        "energy_exhaust": ("  gained by the exhaust", GJ, "GJ"),
        "vehicle_share": ("vehicle's gain / energy released", 0.01, "%"),
        "efficiency_start": ("propulsive efficiency at the start", 0.01, "%"),
        "efficiency_end": ("propulsive efficiency at the end", 0.01, "%"),
    }

    def __init__(
        self,
        *,
        dry_mass: float = HALYARD.vehicle.dry_mass,
        propellant_mass: float = HALYARD.vehicle.propellant_mass,
        mass_ratio: float | None = None,
        mass_input: str = "propellant mass",
        isp: float = HALYARD.vehicle.isp,
        exhaust_velocity: float | None = None,
        exhaust_input: str = "specific impulse",
        speed: float = _DEFAULT_SPEED,
    ) -> None:
        super().__init__()
        if mass_ratio is None:
            mass_ratio = (dry_mass + propellant_mass) / dry_mass if dry_mass > 0 else 1.0
        if exhaust_velocity is None:
            exhaust_velocity = isp * G0
        self._control("dry_mass", number("dry mass (kg)", dry_mass), 1.0)
        self._control(
            "mass_input",
            widgets.ToggleButtons(
                options=["propellant mass", "mass ratio"], value=mass_input, description="give"
            ),
        )
        self._control("propellant_mass", number("propellant (kg)", propellant_mass), 1.0)
        self._control("mass_ratio", number("mass ratio m0/mf", mass_ratio, step=0.05), 1.0)
        self._control(
            "exhaust_input",
            widgets.ToggleButtons(
                options=["specific impulse", "exhaust velocity"], value=exhaust_input, description="give"
            ),
        )
        self._control("isp", number("specific impulse (s)", isp), 1.0)
        self._control(
            "exhaust_velocity", number("exhaust velocity (km/s)", exhaust_velocity / 1e3, step=0.01), 1e3
        )
        self._control(
            "speed",
            slider("speed at the burn (km/s)", speed / 1e3, 0.0, 20.0, _SPEED_STEP, readout_format=".2f"),
            1e3,
        )
        for toggle in ("mass_input", "exhaust_input"):
            self.controls[toggle].style = {"button_width": "130px", "description_width": "initial"}
        self._build_figure()
        self._finish(
            "Propellant trade: delta-v of a propellant load, and who gets its energy",
            [
                ["dry_mass"],
                ["mass_input"],
                ["propellant_mass", "mass_ratio"],
                ["exhaust_input"],
                ["isp", "exhaust_velocity"],
                ["speed"],
            ],
        )

    def _build_figure(self) -> None:
        fig = self._figure(7.6, 4.2)
        self.energy_axes, self.efficiency_axes = fig.subplots(1, 2, gridspec_kw={"width_ratios": [1.0, 1.2]})
        names = ["vehicle", "exhaust", "total"]
        self._bars = self.energy_axes.barh(
            names, [0.0, 0.0, 0.0], color=[COLOURS[n] for n in names], height=0.6
        )
        self.energy_axes.axvline(0.0, color="#333333", linewidth=0.8)
        self.energy_axes.invert_yaxis()
        style_axes(self.energy_axes, xlabel="kinetic energy gained (GJ)", title="energy of the burn")
        self.energy_axes.grid(False, axis="y")
        ax = self.efficiency_axes
        (self._efficiency,) = ax.plot(
            _RATIOS,
            propulsive_efficiency(_RATIOS, 1.0),
            color=COLOURS["before"],
            linewidth=1.8,
            label="propulsive efficiency",
        )
        self.share_axes = ax.twinx()
        (self._share,) = self.share_axes.plot(
            _RATIOS,
            np.zeros_like(_RATIOS),
            color=COLOURS["after"],
            linewidth=1.8,
            linestyle="--",
            label="vehicle's gain / energy released (right)",
        )
        self.share_axes.set_ylabel(
            "vehicle's gain / energy released\n(ratio)", color=COLOURS["after"], fontsize="small"
        )
        self.share_axes.tick_params(axis="y", colors=COLOURS["after"])
        (self._span,) = ax.plot(
            [0.0, 0.0],
            [0.0, 0.0],
            color=COLOURS["burn"],
            linewidth=5,
            alpha=0.35,
            solid_capstyle="butt",
            label="during this burn",
        )
        (self._now,) = ax.plot(
            [0.0], [0.0], "o", color=COLOURS["burn"], markersize=7, label="this burn (start)"
        )
        (self._share_now,) = self.share_axes.plot([0.0], [0.0], "s", color=COLOURS["after"], markersize=6)
        style_axes(
            ax,
            xlabel="speed at the start / exhaust velocity, v/ve",
            ylabel="propulsive efficiency",
            title="efficiency against speed",
        )
        ax.set_ylim(0.0, 1.05)
        handles = [self._efficiency, self._share, self._span, self._now]
        # below both plots, where it covers no curve whatever the speed
        fig.legend(
            handles,
            [h.get_label() for h in handles],
            loc="lower center",
            bbox_to_anchor=(0.5, 0.0),
            ncol=2,
            fontsize="small",
            frameon=False,
        )
        fig.subplots_adjust(left=0.12, right=0.86, bottom=0.26, top=0.92, wspace=0.36)
        self.view.animate(*self._bars.patches, self._span, self._now, self._share_now)

    def _update(self, changed: set[str]) -> None:
        v = self.values
        dry = v["dry_mass"]
        if not dry > 0.0:
            raise DomainError(f"dry mass must be > 0 kg (got {dry:g} kg).")
        if v["mass_input"] == "propellant mass":
            propellant = v["propellant_mass"]
            if propellant < 0.0:
                raise DomainError(f"propellant must be >= 0 kg (got {propellant:g} kg).")
            m0 = dry + propellant
        else:
            ratio = v["mass_ratio"]
            if not ratio >= 1.0:
                raise DomainError(f"mass ratio m0/mf must be >= 1 (got {ratio:g}).")
            m0 = dry * ratio
        if v["exhaust_input"] == "specific impulse":
            if not v["isp"] > 0.0:
                raise DomainError(f"specific impulse must be > 0 s (got {v['isp']:g} s).")
            ve = float(exhaust_velocity(v["isp"]))
        else:
            ve = v["exhaust_velocity"]
            if not ve > 0.0:
                raise DomainError(f"exhaust velocity must be > 0 km/s (got {ve / 1e3:g} km/s).")
        speed = v["speed"]
        dv = float(rocket_dv(ve, m0, dry))
        split = burn_energy(m0, dry, ve, speed)
        ratio_now, ratio_end = speed / ve, (speed + dv) / ve
        # share of the released energy kept by the vehicle, for this mass ratio at every start speed
        share_curve = None
        if changed - {"speed"}:
            curve = burn_energy(m0, dry, ve, _RATIOS * ve)
            with np.errstate(invalid="ignore", divide="ignore"):
                share_curve = np.where(curve.total > 0, curve.vehicle / curve.total, np.nan)
        total = float(split.total)
        share = float(split.vehicle) / total if total > 0 else math.nan
        # computed: move the artists and mirror the derived inputs
        first = not self._results
        for bar, value in zip(self._bars, (split.vehicle, split.ejecta, split.total)):
            bar.set_width(float(value) / GJ)
        widths = [float(split.vehicle) / GJ, float(split.ejecta) / GJ, total / GJ]
        limits_changed = sticky_limits(self.energy_axes, min(widths), max(widths), axis="x", force=first)
        if share_curve is not None:
            self._share.set_ydata(share_curve)
            top = float(np.nanmax(share_curve[_RATIOS <= 3.0])) if np.isfinite(share_curve).any() else 1.0
            self.share_axes.set_ylim(0.0, 1.05 * max(top, 1.0))
            limits_changed = True
        during = np.linspace(ratio_now, ratio_end, 50)
        self._span.set_data(during, propulsive_efficiency(during, 1.0))
        self._now.set_data([ratio_now], [float(propulsive_efficiency(speed, ve))])
        self._share_now.set_data([ratio_now], [share])
        right = self.efficiency_axes.get_xlim()[1]
        wanted = float(np.clip(1.1 * ratio_end, 3.0, _RATIOS[-1]))
        if first or not (ratio_end <= right and wanted >= 0.7 * right):  # move the edge only when needed
            self.efficiency_axes.set_xlim(0.0, wanted)
            limits_changed = True
        self._fast = not limits_changed and not changed - {"speed"}
        self._mirror(m0 / dry, m0 - dry, ve)
        self._results = {
            "wet_mass": m0,
            "mass_ratio": m0 / dry,
            "exhaust_velocity": ve,
            "dv": dv,
            "energy_total": total,
            "energy_vehicle": float(split.vehicle),
            "energy_exhaust": float(split.ejecta),
            "vehicle_share": share,
            "efficiency_start": float(propulsive_efficiency(speed, ve)),
            "efficiency_end": float(propulsive_efficiency(speed + dv, ve)),
        }
        notes = []
        if ratio_end > _RATIOS[-1]:
            notes.append(
                f"The burn ends beyond v/ve = {_RATIOS[-1]:g}, off the right edge of the efficiency plot."
            )
        if float(split.ejecta) < 0.0:
            notes.append(
                "The exhaust ends with less kinetic energy than it had in the tank: the vehicle "
                "gains more than the propellant's chemical energy alone (Oberth effect)."
            )
        self._show_readouts(self._results, notes)

    def _mirror(self, ratio: float, propellant: float, ve: float) -> None:
        """Show the input the analyst did not type, without triggering another update."""
        v_mass, v_exhaust = self.controls["mass_input"].value, self.controls["exhaust_input"].value
        self._holding = True
        try:
            self.controls["mass_ratio"].disabled = v_mass != "mass ratio"
            self.controls["propellant_mass"].disabled = v_mass != "propellant mass"
            self.controls["isp"].disabled = v_exhaust != "specific impulse"
            self.controls["exhaust_velocity"].disabled = v_exhaust != "exhaust velocity"
            if v_mass == "propellant mass":
                self.controls["mass_ratio"].value = round(ratio, 4)
            else:
                self.controls["propellant_mass"].value = round(propellant, 2)
            if v_exhaust == "specific impulse":
                self.controls["exhaust_velocity"].value = round(ve / 1e3, 4)  # 0.1 m/s
            else:
                self.controls["isp"].value = round(ve / G0, 2)
        finally:
            self._holding = False
