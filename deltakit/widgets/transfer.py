"""TransferTrade: Hohmann or bi-elliptic, and where to turn the plane.

Initial, final and intermediate altitudes of coplanar circular orbits around a
body (above its surface, as in every panel), and a plane change to make on
the way. The panel draws both transfers to scale, plots the total delta-v of
each (in units of the initial circular speed) against the radius ratio with
the published break-even ratios marked, and plots the total of a Hohmann
transfer that also turns the plane against the share of the turn made at the
first burn, with the best split marked.

Default case (invented): raising the Halyard tug (:mod:`deltakit.demo`) from
its 400 km Earth parking orbit to a circular orbit 115 000 km up and removing a
28.5 deg inclination (the inclination of an orbit launched due east from a
site at 28.5 deg latitude: common practice), with a 235 000 km intermediate
altitude for the bi-elliptic option. The 28.5 deg belong to that case: when
the analyst picks another body or orbit before touching the plane change,
the plane change goes to 0 and the readouts say so.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, ClassVar

import numpy as np

from ..constants import BODIES, EARTH
from ..demo import HALYARD
from ..errors import DomainError
from ..plotting._style import COLOURS, plain_log_ticks, style_axes
from ..plotting.orbits import draw_transfer, update_transfer
from ..transfers import (
    BIELLIPTIC_ALWAYS_BETTER_RATIO,
    BIELLIPTIC_BREAK_EVEN_RATIO,
    best_plane_change_split,
    bielliptic,
    hohmann,
    hohmann_plane_change,
)
from ..twobody import circular_speed
from ..units import deg, hour, km, km_per_s, percent
from ._base import (
    Computed,
    InputError,
    Panel,
    choice,
    follow_limits,
    follow_square,
    number,
    radius_at,
    slider,
)

__all__ = ["TransferTrade"]

_RATIOS = np.geomspace(1.0, 100.0, 400)
_FRACTIONS = np.linspace(0.0, 1.0, 201)
#: Intermediate radius standing in for "infinitely far" in the limit curve, in initial radii.
_FAR = 1.0e9
#: The demo case: Halyard's parking orbit, the target and the bi-elliptic apoapsis, altitudes in m.
_DEMO = {
    "body": EARTH.name,
    "initial_altitude": HALYARD.periapsis_altitude,
    "final_altitude": 115_000e3,
    "intermediate_altitude": 235_000e3,
}
#: Inclination removed in the demo case: launched due east from 28.5 deg latitude (common practice).
_DEMO_PLANE_CHANGE = 28.5 * deg
_CASE_INPUTS = {"body", "initial_altitude", "final_altitude", "intermediate_altitude"}
#: Older names (radii from the centre, m) -> the altitude controls that replaced them.
_RADII = {"r1": "initial_altitude", "r2": "final_altitude", "rb": "intermediate_altitude"}


class TransferTrade(Panel):
    """Hohmann against bi-elliptic, and the best split of a plane change.

    Parameters (keyword-only, SI)
    -----------------------------
    body : str
        Central body (a key of :data:`deltakit.constants.BODIES`).
    initial_altitude, final_altitude : float
        Altitudes of the initial and final circular orbits above the body's surface, m.
    intermediate_altitude : float
        Altitude of the bi-elliptic transfer's apoapsis, m.
    plane_change : float or None
        Plane change made during the Hohmann transfer, rad (0 to pi). None:
        the demo's 28.5 deg for the demo case, 0 for any other.
    r1, r2, rb : float, optional
        Radii from the body's centre (m) instead of the altitudes, as the
        panel took them before (version 1); ``set`` takes them too.

    Examples
    --------
    >>> from deltakit.units import km
    >>> from deltakit.widgets import TransferTrade
    >>> panel = TransferTrade(initial_altitude=300 * km, final_altitude=35_786 * km, plane_change=0.0)
    >>> round(panel.results["hohmann_total"])
    3893
    >>> round(TransferTrade(body="Mars").values["plane_change"], 6)   # not the Earth demo's 28.5 deg
    0.0
    """

    version: ClassVar[int] = 2
    #: no bi-elliptic transfer when its apoapsis lies below the higher orbit
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset(
        {"bielliptic_total", "bielliptic_duration", "bielliptic_saving"}
    )
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "radius_ratio": ("radius ratio r2/r1", 1.0, ""),
        "apoapsis_ratio": ("bi-elliptic apoapsis radius / r1", 1.0, ""),
        "hohmann_total": ("Hohmann total", km_per_s, "km/s"),
        "hohmann_duration": ("Hohmann time of flight", hour, "h"),
        "bielliptic_total": ("bi-elliptic total", km_per_s, "km/s"),
        "bielliptic_duration": ("bi-elliptic time of flight", hour, "h"),
        "bielliptic_saving": ("bi-elliptic saves", 1.0, "m/s"),
        "best_split": ("best share of the plane change at burn 1", percent, "%"),
        "plane_change_total": ("Hohmann + plane change, best split", km_per_s, "km/s"),
        "plane_change_all_second": ("... all of the turn at burn 2", km_per_s, "km/s"),
    }

    def __init__(
        self,
        *,
        body: str = _DEMO["body"],
        initial_altitude: float = _DEMO["initial_altitude"],
        final_altitude: float = _DEMO["final_altitude"],
        intermediate_altitude: float = _DEMO["intermediate_altitude"],
        plane_change: float | None = None,
        r1: float | None = None,
        r2: float | None = None,
        rb: float | None = None,
    ) -> None:
        super().__init__()
        initial = {
            "body": body,
            "initial_altitude": initial_altitude,
            "final_altitude": final_altitude,
            "intermediate_altitude": intermediate_altitude,
        }
        radii = {name: value for name, value in (("r1", r1), ("r2", r2), ("rb", rb)) if value is not None}
        initial.update(self._altitudes(radii, body))
        demo = all(initial[name] == value for name, value in _DEMO.items())
        initial["plane_change"] = (
            plane_change if plane_change is not None else (_DEMO_PLANE_CHANGE if demo else 0.0)
        )
        self._demo_turn = False
        self._control("body", choice("central body", list(BODIES), EARTH.name, width="220px"))
        self._control("initial_altitude", number("initial orbit altitude (km)", 0.0), km, "m")
        self._control("final_altitude", number("final orbit altitude (km)", 0.0), km, "m")
        self._control("intermediate_altitude", number("bi-elliptic apoapsis altitude (km)", 0.0), km, "m")
        self._control("plane_change", slider("plane change (deg)", 0.0, 0.0, 180.0, 0.5), deg, "rad")
        self._build_figure()
        self._finish(
            "Transfer trade: Hohmann or bi-elliptic, and where to turn the plane",
            [["body", "initial_altitude", "final_altitude"], ["intermediate_altitude", "plane_change"]],
            initial=initial,
        )
        self._demo_turn = demo and plane_change is None

    # ------------------------------------------------------------------ older names, and the demo's turn
    @staticmethod
    def _altitudes(radii: Mapping[str, Any], body: str) -> dict[str, float]:
        """Radii from the centre (the panel's first layout) as altitudes above ``body``."""
        if body not in BODIES:
            raise DomainError(f"`body` must be one of {list(BODIES)}, not {body!r}")
        out = {}
        for name, value in radii.items():
            try:
                out[_RADII[name]] = float(value) - BODIES[body].radius
            except (TypeError, ValueError) as err:
                raise DomainError(f"`{name}` must be a number (a radius in m), not {value!r}") from err
        return out

    def _translate(self, values: dict[str, Any]) -> dict[str, Any]:
        radii = {name: values.pop(name) for name in list(values) if name in _RADII}
        if radii:
            values.update(self._altitudes(radii, values.get("body", self.controls["body"].value)))
        return values

    def _follow_up(self, touched: set[str]) -> tuple[dict[str, Any], dict[str, str]]:
        if not self._demo_turn or "plane_change" in touched or not touched & _CASE_INPUTS:
            return {}, {}
        note = (
            f"Plane change set to 0 deg: the demo's {_DEMO_PLANE_CHANGE / deg:g} deg belonged to its "
            "Earth case (a launch due east from 28.5 deg latitude); set the plane change of this case."
        )
        return {"plane_change": 0.0}, {"plane_change": note}

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """Both transfers and the plane-change split for ``values`` (SI, keyed like the controls)."""
        body = BODIES[values["body"]]
        r1 = radius_at(values, "initial_altitude", "initial orbit altitude", body)
        r2 = radius_at(values, "final_altitude", "final orbit altitude", body)
        rb = radius_at(values, "intermediate_altitude", "bi-elliptic apoapsis altitude", body)
        angle = values["plane_change"]
        if not 0.0 <= angle <= math.pi:
            raise InputError(
                f"plane change must be between 0 and 180 deg (got {angle / deg:g} deg).", "plane_change"
            )
        h = hohmann(r1, r2, body.mu)
        b = bielliptic(r1, r2, rb, body.mu)
        with np.errstate(invalid="ignore"):
            bielliptic_curve = np.asarray(bielliptic(1.0, _RATIOS, rb / r1, 1.0).total)
        split_totals = np.asarray(hohmann_plane_change(r1, r2, body.mu, angle, _FRACTIONS).total)
        best = float(best_plane_change_split(r1, r2, body.mu, angle))
        best_total = float(hohmann_plane_change(r1, r2, body.mu, angle, best).total)
        bielliptic_total = float(b.total)
        ratio = max(r1, r2) / min(r1, r2)
        results = {
            "initial_radius": r1,
            "final_radius": r2,
            "intermediate_radius": rb,
            "radius_ratio": ratio,
            "apoapsis_ratio": rb / r1,
            "hohmann_total": float(h.total),
            "hohmann_burn1": float(h.burns[0]),
            "hohmann_burn2": float(h.burns[1]),
            "hohmann_duration": float(h.duration),
            "bielliptic_total": bielliptic_total,
            "bielliptic_duration": float(b.duration),
            "bielliptic_saving": float(h.total) - bielliptic_total,
            "best_split": best,
            "plane_change_total": best_total,
            "plane_change_all_first": float(split_totals[-1]),
            "plane_change_all_second": float(split_totals[0]),
            "initial_speed": float(circular_speed(r1, body.mu)),
        }
        notes = []
        if rb < max(r1, r2):
            notes.append(
                "No bi-elliptic transfer: its apoapsis must be at least as high as the higher of the "
                "two orbits."
            )
        if r2 < r1:
            notes.append(
                "The final orbit is below the initial one: the ratio plot uses the larger over the "
                "smaller radius (the totals are the same both ways)."
            )
        drawing = {
            "body": body,
            "radii": (r1, r2, rb),
            "bielliptic_curve": bielliptic_curve,
            "split": split_totals / km_per_s,
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ the figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 6.2)
        grid = fig.add_gridspec(2, 2, width_ratios=[1.0, 1.15])
        self.orbit_axes = fig.add_subplot(grid[:, 0])
        self.ratio_axes = fig.add_subplot(grid[0, 1])
        self.split_axes = fig.add_subplot(grid[1, 1])
        self._transfer = draw_transfer(self.orbit_axes, 7000e3, 20000e3, rb=30000e3, body_radius=EARTH.radius)
        self.orbit_axes.set_aspect("equal", adjustable="box")
        self.orbit_axes.set_title("transfers to scale", fontsize="medium")
        self.orbit_axes.legend(
            loc="upper center", bbox_to_anchor=(0.5, -0.17), ncol=2, fontsize="small", frameon=False
        )

        ax = self.ratio_axes
        # in units of the initial speed the Hohmann total and the far-apoapsis limit depend on the ratio
        # alone: drawn once; the bi-elliptic curve of this apoapsis and the ratio line move (animated)
        hohmann_curve = np.asarray(hohmann(1.0, _RATIOS, 1.0).total)
        with np.errstate(invalid="ignore"):
            limit_curve = np.asarray(bielliptic(1.0, _RATIOS, _FAR, 1.0).total)
        (self._hohmann_curve,) = ax.plot(
            _RATIOS, hohmann_curve, color=COLOURS["hohmann"], linewidth=1.8, label="Hohmann"
        )
        (self._bielliptic_curve,) = ax.plot(
            _RATIOS,
            np.zeros_like(_RATIOS),
            color=COLOURS["bielliptic"],
            linestyle="--",
            linewidth=1.6,
            label="bi-elliptic, this rb/r1",
        )
        (self._limit_curve,) = ax.plot(
            _RATIOS,
            limit_curve,
            color=COLOURS["bielliptic"],
            linestyle=":",
            linewidth=1.4,
            label="bi-elliptic, rb far away",
        )
        for ratio, style, label in (
            (BIELLIPTIC_BREAK_EVEN_RATIO, "-.", "break-even, rb far away"),
            (BIELLIPTIC_ALWAYS_BETTER_RATIO, ":", "bi-elliptic wins for any rb > r2"),
        ):
            ax.axvline(ratio, color=COLOURS["reference"], linewidth=0.9, linestyle=style, label=label)
        # the values sit just above the frame, where the moving "this r2/r1" line (clipped to the axes)
        # can never cross them, one left and one right of its line so they never overlap each other
        for ratio, align in (
            (BIELLIPTIC_BREAK_EVEN_RATIO, "right"),
            (BIELLIPTIC_ALWAYS_BETTER_RATIO, "left"),
        ):
            ax.text(
                ratio,
                1.01,
                f"{ratio:.4g}",
                transform=ax.get_xaxis_transform(),
                ha=align,
                va="bottom",
                fontsize="x-small",
                color=COLOURS["reference"],
            )
        self._ratio_now = ax.axvline(1.0, color=COLOURS["burn"], linewidth=1.4, label="this r2/r1")
        ax.set_xscale("log")
        plain_log_ticks(ax.xaxis)
        ax.set_xlim(1.0, 100.0)
        ax.set_ylim(0.0, 1.1 * float(np.nanmax(np.concatenate([hohmann_curve, limit_curve]))))
        style_axes(
            ax,
            xlabel="radius ratio r2/r1",
            ylabel="total delta-v / initial speed",
            title="total delta-v against radius ratio",
        )
        ax.set_title(ax.get_title(), fontsize="medium", pad=12)  # room for the break-even values
        # the legend goes under the orbit drawing: inside its own axes it would cover curves
        ax.legend(
            loc="upper center",
            bbox_to_anchor=(0.42, -0.37),
            bbox_transform=self.orbit_axes.transAxes,
            ncol=2,
            fontsize="x-small",
            frameon=False,
            title="total delta-v plot",
            title_fontsize="x-small",
        )

        ax = self.split_axes
        (self._split_curve,) = ax.plot(
            _FRACTIONS * 100,
            np.zeros_like(_FRACTIONS),
            color=COLOURS["hohmann"],
            linewidth=1.8,
            label="Hohmann + plane change",
        )
        (self._split_best,) = ax.plot(
            [0.0], [0.0], "o", color=COLOURS["burn"], markersize=7, label="best split", clip_on=False
        )
        ax.set_xlim(0.0, 100.0)
        style_axes(
            ax,
            xlabel="share of the plane change made at burn 1 (%)",
            ylabel="total delta-v (km/s)",
            title="splitting the plane change",
        )
        # above the curve's highest point: the total is largest with all of the turn at one burn
        ax.legend(loc="lower center", bbox_to_anchor=(0.5, 1.0), ncol=2, fontsize="x-small", frameon=False)
        ax.set_title(ax.get_title(), fontsize="medium", pad=22)
        # what a case typed anew or a plane-change step moves: redrawn alone over the rest
        transfer = self._transfer
        self.view.animate(
            transfer.body,
            transfer.initial,
            transfer.final,
            transfer.hohmann,
            transfer.bielliptic,
            self._bielliptic_curve,
            self._ratio_now,
            self._split_curve,
            self._split_best,
        )
        fig.subplots_adjust(left=0.14, right=0.97, bottom=0.08, top=0.92, wspace=0.34, hspace=0.6)
        # cells (figure fractions) holding each plot's furniture: the right column splits at mid-height;
        # the ratio plot's legend sits under the orbit drawing, below the orbit legend
        self.view.cell(self.orbit_axes, (0.0, 0.147, 0.51, 1.0))
        self.view.cell(self.ratio_axes, (0.51, 0.5, 1.0, 1.0), (0.0, 0.0, 0.51, 0.147))
        self.view.cell(self.split_axes, (0.51, 0.0, 1.0, 0.5))

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d, r = computed.drawing, computed.results
        if "plane_change" in changed:
            self._demo_turn = False
        new_case = bool(changed & _CASE_INPUTS)
        if new_case:
            r1, r2, rb = d["radii"]
            bielliptic_drawn = rb >= max(r1, r2)
            update_transfer(
                self._transfer, r1, r2, rb=rb if bielliptic_drawn else None, body_radius=d["body"].radius
            )
            if not bielliptic_drawn:
                self._transfer.bielliptic.set_data([], [])
            extent = max(r1, r2, rb if bielliptic_drawn else 0.0) / km
            if follow_square(
                self.orbit_axes,
                (-extent, extent, -extent, extent),
                centre=(0.0, 0.0),
                base=1000.0,
                force=True,
            ):
                self.view.invalidate(self.orbit_axes)
            self._bielliptic_curve.set_ydata(d["bielliptic_curve"])
            self._ratio_now.set_xdata([r["radius_ratio"]] * 2)
        split = d["split"]
        self._split_curve.set_ydata(split)
        self._split_best.set_data([r["best_split"] * 100], [r["plane_change_total"] / km_per_s])
        if follow_limits(self.split_axes, float(split.min()), float(split.max()), force=new_case):
            self.view.invalidate(self.split_axes)
