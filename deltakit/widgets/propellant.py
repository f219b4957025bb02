"""PropellantTrade: what a propellant load buys, and where its energy goes.

Dry mass and propellant (or the mass ratio), specific impulse (or exhaust
velocity) and the vehicle's speed when the burn starts. The panel gives the
delta-v of the rocket equation and splits the kinetic energy the burn releases,
``0.5 (m0 - mf) ve^2`` whatever the speed, between the vehicle and its
exhaust: the faster the vehicle already moves, the larger the vehicle's share
(the Oberth effect seen from the propellant's side). A second plot shows the
propulsive efficiency against the speed ratio v/ve.

Of each pair (propellant or mass ratio, specific impulse or exhaust velocity)
the analyst gives one; the other box follows, rounded for reading (0.01 kg,
4 decimals of the ratio, 0.1 m/s, 0.01 s). Giving one of a pair from code
(constructor or ``set``) makes it the one the panel uses.

Default case: the invented Halyard cargo tug (:mod:`deltakit.demo`) starting
its burn at the circular speed of a 400 km Earth orbit (cited constants), to
the speed slider's 10 m/s step.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, ClassVar

import numpy as np

from ..constants import EARTH, G0
from ..demo import HALYARD
from ..errors import DomainError
from ..plotting._style import COLOURS, style_axes
from ..propulsion import burn_energy, exhaust_velocity, propulsive_efficiency, rocket_dv
from ..twobody import circular_speed
from ..units import km_per_s, percent
from ._base import Computed, InputError, Panel, follow_limits, number, slider, toggle
from ._limits import COARSE

__all__ = ["PropellantTrade"]

GJ = 1.0e9
#: Slider step of the speed, km/s (10 m/s).
_SPEED_STEP = 0.01
#: The circular speed of a 400 km Earth orbit (7668.6 m/s) on the slider's step: 7.67 km/s.
_DEFAULT_SPEED = (
    round(float(circular_speed(EARTH.radius + 400e3, EARTH.mu)) / km_per_s / _SPEED_STEP)
    * _SPEED_STEP
    * km_per_s
)
_RATIOS = np.linspace(0.0, 5.0, 501)
_MASS_INPUTS = ["propellant mass", "mass ratio"]
_EXHAUST_INPUTS = ["specific impulse", "exhaust velocity"]


def _refuse_two(given: Mapping[str, Any], mode: str, first: str, second: str, convert: Any) -> None:
    """Refuse both of a pair of inputs, given without saying which counts, when they disagree."""
    if mode in given or first not in given or second not in given:
        return
    try:
        agree = math.isclose(float(convert(given[first])), float(given[second]), rel_tol=1e-4)
    except (TypeError, ValueError, ZeroDivisionError, OverflowError):
        agree = False
    if not agree:
        raise DomainError(
            f"give `{first}` or `{second}`, or say which one counts with `{mode}`: "
            f"{first}={given[first]!r} and {second}={given[second]!r} disagree"
        )


def _pick(given: Mapping[str, Any], mode: str, first: str, second: str, options: list[str]) -> None:
    """Choose which of a pair of inputs the panel uses when the caller gave only one of them."""
    if mode in given:
        return
    if first in given and second not in given:
        given[mode] = options[0]
    elif second in given and first not in given:
        given[mode] = options[1]


class PropellantTrade(Panel):
    """Delta-v and the kinetic-energy split of one burn of a whole propellant load.

    Parameters (keyword-only, SI)
    -----------------------------
    dry_mass : float
        Mass left when the propellant is spent, kg.
    propellant_mass : float or None
        Propellant burned, kg (used when ``mass_input == "propellant mass"``);
        None: Halyard's load, or from ``mass_ratio`` when that is given.
    mass_ratio : float or None
        Initial over final mass (used when ``mass_input == "mass ratio"``).
    mass_input : {"propellant mass", "mass ratio"} or None
        Which of the two the analyst types; None: the one given.
    isp : float or None
        Specific impulse, s (used when ``exhaust_input == "specific impulse"``);
        None: Halyard's engine, or from ``exhaust_velocity`` when that is given.
    exhaust_velocity : float or None
        Effective exhaust velocity, m/s.
    exhaust_input : {"specific impulse", "exhaust velocity"} or None
        Which of the two the analyst types; None: the one given.
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
    >>> PropellantTrade(exhaust_velocity=3200.0).controls["isp"].value   # the box that follows: 0.01 s
    326.31
    """

    #: no propellant, no energy released: no share of it
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset({"vehicle_share"})
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "dv": ("delta-v (rocket equation)", 1.0, "m/s"),
        "mass_ratio": ("mass ratio m0/mf", 1.0, ""),
        "exhaust_velocity": ("exhaust velocity", km_per_s, "km/s"),
        "energy_total": ("kinetic energy released", GJ, "GJ"),
        "energy_vehicle": ("  gained by the vehicle", GJ, "GJ"),
        "energy_exhaust": ("  gained by the exhaust", GJ, "GJ"),
        "vehicle_share": ("vehicle's gain / energy released", percent, "%"),
        "efficiency_start": ("propulsive efficiency at the start", percent, "%"),
        "efficiency_end": ("propulsive efficiency at the end", percent, "%"),
    }

    def __init__(
        self,
        *,
        dry_mass: float = HALYARD.vehicle.dry_mass,
        propellant_mass: float | None = None,
        mass_ratio: float | None = None,
        mass_input: str | None = None,
        isp: float | None = None,
        exhaust_velocity: float | None = None,
        exhaust_input: str | None = None,
        speed: float = _DEFAULT_SPEED,
    ) -> None:
        super().__init__()
        given = {
            key: value
            for key, value in {
                "propellant_mass": propellant_mass,
                "mass_ratio": mass_ratio,
                "mass_input": mass_input,
                "isp": isp,
                "exhaust_velocity": exhaust_velocity,
                "exhaust_input": exhaust_input,
            }.items()
            if value is not None
        }
        given = self._translate(given, dry_mass=dry_mass)
        initial: dict[str, Any] = {
            "dry_mass": dry_mass,
            "mass_input": given.get("mass_input", _MASS_INPUTS[0]),
            "propellant_mass": given.get("propellant_mass", HALYARD.vehicle.propellant_mass),
            "exhaust_input": given.get("exhaust_input", _EXHAUST_INPUTS[0]),
            "isp": given.get("isp", HALYARD.vehicle.isp),
            "speed": speed,
        }
        if "mass_ratio" in given:
            initial["mass_ratio"] = given["mass_ratio"]
        if "exhaust_velocity" in given:
            initial["exhaust_velocity"] = given["exhaust_velocity"]
        self._control("dry_mass", number("dry mass (kg)", 0.0), 1.0, "kg")
        self._control("mass_input", toggle("give", _MASS_INPUTS, _MASS_INPUTS[0]))
        self._control("propellant_mass", number("propellant (kg)", 0.0), 1.0, "kg")
        self._control("mass_ratio", number("mass ratio m0/mf", 1.0, step=0.05), 1.0)
        self._control("exhaust_input", toggle("give", _EXHAUST_INPUTS, _EXHAUST_INPUTS[0]))
        self._control("isp", number("specific impulse (s)", 0.0), 1.0, "s")
        self._control("exhaust_velocity", number("exhaust velocity (km/s)", 0.0, step=0.01), km_per_s, "m/s")
        self._control(
            "speed",
            slider("speed at the burn (km/s)", 0.0, 0.0, 20.0, _SPEED_STEP, readout_format=".2f"),
            km_per_s,
            "m/s",
        )
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
            initial=initial,
        )

    def _translate(self, values: dict[str, Any], dry_mass: float | None = None) -> dict[str, Any]:
        if dry_mass is None:
            dry_mass = values.get("dry_mass", self.controls["dry_mass"].value)
        _refuse_two(values, "exhaust_input", "isp", "exhaust_velocity", lambda isp: isp * G0)
        _refuse_two(
            values, "mass_input", "propellant_mass", "mass_ratio", lambda m: (dry_mass + m) / dry_mass
        )
        _pick(values, "mass_input", "propellant_mass", "mass_ratio", _MASS_INPUTS)
        _pick(values, "exhaust_input", "isp", "exhaust_velocity", _EXHAUST_INPUTS)
        return values

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """Delta-v, the energy split and the efficiency curves of ``values`` (SI, keyed like the controls)."""
        dry = values["dry_mass"]
        if not dry > 0.0:
            raise InputError(f"dry mass must be > 0 kg (got {dry:g} kg).", "dry_mass")
        if values["mass_input"] == "propellant mass":
            propellant = values["propellant_mass"]
            if propellant < 0.0:
                raise InputError(f"propellant must be >= 0 kg (got {propellant:g} kg).", "propellant_mass")
            m0 = dry + propellant
        else:
            ratio = values["mass_ratio"]
            if not ratio >= 1.0:
                raise InputError(f"mass ratio m0/mf must be >= 1 (got {ratio:g}).", "mass_ratio")
            m0 = dry * ratio
        if values["exhaust_input"] == "specific impulse":
            if not values["isp"] > 0.0:
                raise InputError(f"specific impulse must be > 0 s (got {values['isp']:g} s).", "isp")
            ve = float(exhaust_velocity(values["isp"]))
        else:
            ve = values["exhaust_velocity"]
            if not ve > 0.0:
                raise InputError(
                    f"exhaust velocity must be > 0 km/s (got {ve / km_per_s:g} km/s).", "exhaust_velocity"
                )
        speed = values["speed"]
        dv = float(rocket_dv(ve, m0, dry))
        split = burn_energy(m0, dry, ve, speed)
        total, vehicle, ejecta = float(split.total), float(split.vehicle), float(split.ejecta)
        share = vehicle / total if total > 0 else math.nan
        # share of the released energy kept by the vehicle, for this mass ratio at every start speed
        curve = burn_energy(m0, dry, ve, _RATIOS * ve)
        with np.errstate(invalid="ignore", divide="ignore"):
            share_curve = np.where(curve.total > 0, curve.vehicle / curve.total, np.nan)
        ratio_now, ratio_end = speed / ve, (speed + dv) / ve
        edge = _RATIOS[-1]  # the efficiency plot ends at v/ve = 5: what lies beyond is not drawn
        results = {
            "wet_mass": m0,
            "mass_ratio": m0 / dry,
            "exhaust_velocity": ve,
            "dv": dv,
            "energy_total": total,
            "energy_vehicle": vehicle,
            "energy_exhaust": ejecta,
            "vehicle_share": share,
            "efficiency_start": float(propulsive_efficiency(speed, ve)),
            "efficiency_end": float(propulsive_efficiency(speed + dv, ve)),
        }
        notes = []
        if ratio_end > edge:
            when = "starts" if ratio_now > edge else "ends"
            notes.append(
                f"The burn {when} beyond v/ve = {edge:g}, off the right edge of the efficiency plot."
            )
        if ejecta < 0.0:
            notes.append(
                "The exhaust ends with less kinetic energy than it had in the tank: the vehicle "
                "gains more than the propellant's chemical energy alone (Oberth effect)."
            )
        during = np.linspace(ratio_now, min(ratio_end, edge), 50) if ratio_now <= edge else np.empty(0)
        drawing = {
            "bars": (vehicle / GJ, ejecta / GJ, total / GJ),
            "share_curve": share_curve,
            "during": (during, propulsive_efficiency(during, 1.0)),
            "now": (ratio_now if ratio_now <= edge else np.nan, results["efficiency_start"], share),
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ the figure
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
        ax.set_xlim(0.0, _RATIOS[-1])  # the whole curve, always: a speed step never moves this axis
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
        self._columns([self.energy_axes], [self.efficiency_axes, self.share_axes])
        self.view.animate(*self._bars.patches, self._share, self._span, self._now, self._share_now)

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d, r = computed.drawing, computed.results
        first = not self._results
        widths = d["bars"]
        for bar, width in zip(self._bars, widths):
            bar.set_width(width)
        # the energies grow with the square of the speed: a coarse ladder of limits, crossed less often
        if follow_limits(self.energy_axes, min(widths), max(widths), axis="x", force=first, rungs=COARSE):
            self.view.invalidate(self.energy_axes)
        if first or changed - {"speed"}:  # a new vehicle or engine: the share curve (animated) and its axis
            share = d["share_curve"]
            self._share.set_ydata(share)
            top = float(np.nanmax(share)) if np.isfinite(share).any() else 1.0
            if follow_limits(self.share_axes, 0.0, max(top, 1.0), force=first):
                self.view.invalidate(self.share_axes)
        self._span.set_data(*d["during"])
        ratio_now, efficiency, share_now = d["now"]
        self._now.set_data([ratio_now], [efficiency])
        self._share_now.set_data([ratio_now], [share_now])
        self._mirror(r["mass_ratio"], r["wet_mass"] - self.values["dry_mass"], r["exhaust_velocity"])

    def _mirror(self, ratio: float, propellant: float, ve: float) -> None:
        """Show the input the analyst did not type, rounded for reading, without another update."""
        mass_mode, exhaust_mode = self.controls["mass_input"].value, self.controls["exhaust_input"].value
        with self._quietly():
            self.controls["mass_ratio"].disabled = mass_mode != "mass ratio"
            self.controls["propellant_mass"].disabled = mass_mode != "propellant mass"
            self.controls["isp"].disabled = exhaust_mode != "specific impulse"
            self.controls["exhaust_velocity"].disabled = exhaust_mode != "exhaust velocity"
            if mass_mode == "propellant mass":
                self.controls["mass_ratio"].value = round(ratio, 4)
            else:
                self.controls["propellant_mass"].value = round(propellant, 2)
            if exhaust_mode == "specific impulse":
                self.controls["exhaust_velocity"].value = round(ve / km_per_s, 4)  # 0.1 m/s
            else:
                self.controls["isp"].value = round(ve / G0, 2)
