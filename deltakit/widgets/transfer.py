"""TransferTrade: Hohmann or bi-elliptic, and where to turn the plane.

Initial, final and intermediate radii of coplanar circular orbits around a
body, and a plane change to make on the way. The panel draws both transfers to
scale, plots the total delta-v of each (in units of the initial circular
speed) against the radius ratio with the published break-even ratios marked,
and plots the total of a Hohmann transfer that also turns the plane against
the share of the turn made at the first burn, with the best split marked.

Default case (invented): raising the Halyard tug (:mod:`deltakit.demo`) from
its 400 km Earth parking orbit to a 120 000 km circular orbit and removing a
28.5 deg inclination (the inclination of an orbit launched due east from a
site at 28.5 deg latitude: common practice), with a 240 000 km intermediate
radius for the bi-elliptic option.
"""

from __future__ import annotations

import math
from typing import ClassVar

import numpy as np

from ..constants import BODIES, EARTH
from ..errors import DomainError
from ..plotting._style import COLOURS, KM, style_axes
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
from ._base import Panel, choice, number, slider, sticky_limits

__all__ = ["TransferTrade"]

DEG = math.pi / 180.0
HOUR = 3600.0
_RATIOS = np.geomspace(1.0, 100.0, 400)
_FRACTIONS = np.linspace(0.0, 1.0, 201)
#: Intermediate radius standing in for "infinitely far" in the limit curve, in initial radii.
_FAR = 1.0e9


class TransferTrade(Panel):
    """Hohmann against bi-elliptic, and the best split of a plane change.

    Parameters (keyword-only, SI)
    -----------------------------
    body : str
        Central body (a key of :data:`deltakit.constants.BODIES`).
    r1, r2 : float
        Radii of the initial and final circular orbits, m.
    rb : float
        Intermediate (apoapsis) radius of the bi-elliptic transfer, m.
    plane_change : float
        Plane change made during the Hohmann transfer, rad (0 to pi).

    Examples
    --------
    >>> from deltakit.widgets import TransferTrade
    >>> panel = TransferTrade(r1=6678e3, r2=42164e3, rb=100000e3, plane_change=0.0)
    >>> round(panel.results["hohmann_total"])
    3893
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "radius_ratio": ("radius ratio r2/r1", 1.0, ""),
        "hohmann_total": ("Hohmann total", 1e3, "km/s"),
        "hohmann_duration": ("Hohmann time of flight", HOUR, "h"),
        "bielliptic_total": ("bi-elliptic total", 1e3, "km/s"),
        "bielliptic_duration": ("bi-elliptic time of flight", HOUR, "h"),
        "bielliptic_saving": ("bi-elliptic saves", 1.0, "m/s"),
        "best_split": ("best share of the plane change at burn 1", 0.01, "%"),
        "plane_change_total": ("Hohmann + plane change, best split", 1e3, "km/s"),
        "plane_change_all_second": ("... all of the turn at burn 2", 1e3, "km/s"),
    }

    def __init__(
        self,
        *,
        body: str = EARTH.name,
        r1: float = EARTH.radius + 400e3,
        r2: float = 120_000e3,
        rb: float = 240_000e3,
        plane_change: float = 28.5 * DEG,
    ) -> None:
        super().__init__()
        self._control("body", choice("central body", list(BODIES), body, width="220px"))
        self._control("r1", number("initial radius (km)", r1 / KM), KM)
        self._control("r2", number("final radius (km)", r2 / KM), KM)
        self._control("rb", number("intermediate radius (km)", rb / KM), KM)
        self._control("plane_change", slider("plane change (deg)", plane_change / DEG, 0.0, 180.0, 0.5), DEG)
        self._curve_key: tuple | None = None
        self._build_figure()
        self._finish(
            "Transfer trade: Hohmann or bi-elliptic, and where to turn the plane",
            [["body", "r1", "r2"], ["rb", "plane_change"]],
        )

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
        (self._hohmann_curve,) = ax.plot(
            _RATIOS, np.zeros_like(_RATIOS), color=COLOURS["hohmann"], linewidth=1.8, label="Hohmann"
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
            np.zeros_like(_RATIOS),
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
        ax.set_xlim(1.0, 100.0)
        style_axes(
            ax,
            xlabel="radius ratio r2/r1",
            ylabel="total delta-v / initial speed",
            title="total delta-v against radius ratio",
        )
        ax.set_title(ax.get_title(), fontsize="medium", pad=12)  # room for the break-even values
        self._ratio_legend()

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
        ax.legend(loc="upper left", fontsize="x-small", framealpha=0.85)
        self.view.animate(self._split_curve, self._split_best)
        fig.subplots_adjust(left=0.14, right=0.97, bottom=0.08, top=0.92, wspace=0.34, hspace=0.5)

    def _ratio_legend(self) -> None:
        """The radius-ratio plot's legend, under the orbit drawing.

        Inside its own axes it would cover curves.
        """
        self.ratio_axes.legend(
            loc="upper center",
            bbox_to_anchor=(0.42, -0.37),
            bbox_transform=self.orbit_axes.transAxes,
            ncol=2,
            fontsize="x-small",
            frameon=False,
            title="total delta-v plot",
            title_fontsize="x-small",
        )

    def _update(self, changed: set[str]) -> None:
        v = self.values
        body = BODIES[v["body"]]
        r1, r2, rb, angle = v["r1"], v["r2"], v["rb"], v["plane_change"]
        for label, r in (("initial", r1), ("final", r2)):
            if r <= body.radius:
                raise DomainError(
                    f"{label} radius {r / KM:g} km is inside {body.name} (radius {body.radius / KM:g} km)."
                )
        if rb <= body.radius:
            raise DomainError(f"intermediate radius {rb / KM:g} km is inside {body.name}.")
        if not 0.0 <= angle <= math.pi:
            raise DomainError(f"plane change must be between 0 and 180 deg (got {angle / DEG:g} deg).")
        h = hohmann(r1, r2, body.mu)
        b = bielliptic(r1, r2, rb, body.mu)
        v1 = float(circular_speed(r1, body.mu))
        curves = None
        key = (round(rb / r1, 12),)
        if key != self._curve_key:
            with np.errstate(invalid="ignore"):
                curves = (
                    hohmann(1.0, _RATIOS, 1.0).total,
                    bielliptic(1.0, _RATIOS, rb / r1, 1.0).total,
                    bielliptic(1.0, _RATIOS, _FAR, 1.0).total,
                )
        split_totals = hohmann_plane_change(r1, r2, body.mu, angle, _FRACTIONS).total
        best = float(best_plane_change_split(r1, r2, body.mu, angle))
        best_total = float(hohmann_plane_change(r1, r2, body.mu, angle, best).total)
        # computed: move the artists
        update_transfer(self._transfer, r1, r2, rb=rb if rb >= max(r1, r2) else None, body_radius=body.radius)
        if rb < max(r1, r2):
            self._transfer.bielliptic.set_data([], [])
        extent = 1.08 * max(r1, r2, rb if rb >= max(r1, r2) else 0.0) / KM
        self.orbit_axes.set_xlim(-extent, extent)
        self.orbit_axes.set_ylim(-extent, extent)
        if curves is not None:
            self._hohmann_curve.set_ydata(curves[0])
            self._bielliptic_curve.set_ydata(curves[1])
            self._limit_curve.set_ydata(curves[2])
            self._bielliptic_curve.set_label(f"bi-elliptic, rb = {rb / r1:.3g} r1")
            self._ratio_legend()
            top = float(np.nanmax(np.concatenate([curves[0], curves[2]])))
            self.ratio_axes.set_ylim(0.0, 1.1 * top)
            self._curve_key = key
        ratio = max(r1, r2) / min(r1, r2)
        self._ratio_now.set_xdata([ratio, ratio])
        self._split_curve.set_ydata(np.asarray(split_totals) / 1e3)
        self._split_best.set_data([best * 100], [best_total / 1e3])
        low, high = float(np.min(split_totals)) / 1e3, float(np.max(split_totals)) / 1e3
        first = not self._results
        limits_changed = sticky_limits(self.split_axes, low, high, include_zero=False, force=first)
        self._fast = not limits_changed and not changed - {"plane_change"}
        bielliptic_total = float(b.total)
        self._results = {
            "radius_ratio": ratio,
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
            "initial_speed": v1,
        }
        notes = []
        if rb < max(r1, r2):
            notes.append(
                "No bi-elliptic transfer: the intermediate radius must be at least the larger of "
                "the two orbit radii."
            )
        if r2 < r1:
            notes.append(
                "The final orbit is below the initial one: the ratio plot uses the larger over the "
                "smaller radius (the totals are the same both ways)."
            )
        self._show_readouts(self._results, notes)
