"""PlaneChangeExplorer: where to turn an orbit into a new plane, and how to split the turn.

Choose the central body, the orbit (periapsis and apoapsis altitudes,
argument of periapsis, inclination and node), the plane to reach (its
inclination and node) and, if the same burn should also move an apsis, the
new periapsis or apoapsis altitude. One impulsive burn keeps the position,
so it reaches the new plane only where the old orbit crosses it: at two
points half a turn apart, on the line where the planes meet
(:func:`deltakit.plane_change_burns`). The panel shows

* a 3-D view: the orbit now (slate), the orbit after the cheaper single burn
  (amber, dashed), the line where the planes meet (dotted) with both
  crossings on it (the cheaper one a star), the reference plane and the
  orbit's line of nodes;
* the cost along the orbit: the delta-v of a turn of this size (and the apsis
  change, if any) made at each true anomaly, with the two crossings on it,
  the only points where it reaches the new plane; and, dashed, the cost of
  reaching the target inclination alone with the node left free
  (:func:`deltakit.inclination_change_cost`), what fixing the node costs;
* the split: two burns, one at each crossing, turning the plane about the
  same line. The first burn makes the apsis change (if any) and a share of
  the turn, the second, half an orbit later, the rest. Total delta-v against
  the share of the turn in the first burn, for either crossing first, with
  the best split marked. When the line where the planes meet is the line of
  apsides (the argument of periapsis puts periapsis at a crossing) this is
  the split between a periapsis and an apoapsis burn. Without an apsis change
  splitting never pays (the whole turn at the slower crossing is cheapest);
  with one, a small share of the turn rides on the apsis burn almost free.

Readouts: the angle between the planes; true anomaly, altitude and delta-v of
each crossing; the cheaper crossing (named in the notes) and the delta-v it
saves against the other; the best two-burn split and what it saves against
the best single burn; the inclination alone at the cheaper node. Sign and
frame conventions are those of :mod:`deltakit.planes` (RTN, SI).

Default case: the invented Larkspan relay (:mod:`deltakit.demo`) in its
500 x 26,000 km Earth orbit at 28.5 deg, node 40 deg, turning into a 32 deg
plane with its node at 45 deg (cited constants); the apsis box holds the
800 km perigee its mission also wants, for the analyst to switch on.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, ClassVar

import numpy as np

from ..burns import burn, burn_prograde
from ..conic import Conic
from ..constants import BODIES
from ..demo import LARKSPAN, LARKSPAN_ORIENTATION, LARKSPAN_TARGET_PLANE
from ..planes import inclination_change_cost, plane_change_burns
from ..plotting._style import COLOURS, style_axes
from ..plotting.space import PLANE_MARGIN, VIEW_MARGIN, conic_points_3d, draw_conic_3d, update_conic_3d
from ..targeting import burn_to
from ..transfers import _combined
from ..units import deg, km, percent
from ._base import (
    Computed,
    InputError,
    Panel,
    apsides_at,
    choice,
    number,
    radius_at,
    slider,
)

__all__ = ["APSIS_CHANGES", "PlaneChangeExplorer"]

#: What the same burn may also change: choice -> keyword of :func:`deltakit.plane_change_burns`.
APSIS_CHANGES: dict[str, str | None] = {"none": None, "periapsis": "rp", "apoapsis": "ra"}

_ORBIT_INPUTS = {"body", "periapsis_altitude", "apoapsis_altitude", "apsis_change", "apsis_altitude"}
_NU = np.linspace(-np.pi, np.pi, 361)
#: Points along each orbit of the 3-D view (2 deg apart: smooth at this size, and half the drawing time).
_ORBIT_POINTS = 181
_SHARES = np.linspace(0.0, 1.0, 201)
#: The two crossings hold their roles in every view: (marker, size, filled, legend name).
_CROSSING_STYLE = {"cheaper": ("*", 13, True, "cheaper crossing"), "other": ("o", 7, False, "other crossing")}
#: A split must save at least this much (m/s) against one burn to be worth a second burn.
_PAYS = 0.05
#: An inclination this close (rad) outside [0, pi] is pi or 0 (180 deg in a control is pi to 12 digits).
_ANGLE_SLACK = 1e-9
#: A turn below this (rad) counts as none: the planes agree.
_NO_TURN = 1e-9
#: The 3-D view keeps its size while the orbits' extent stays within this band of the one it was made for.
_SCALE_BAND = (0.5, PLANE_MARGIN)
#: Where the plots sit (figure fractions: left, bottom, width, height) and the splits between their cells.
_SPACE_BOX = (0.02, 0.18, 0.44, 0.76)
_COST_BOX = (0.575, 0.62, 0.405, 0.26)
_SPLIT_BOX = (0.575, 0.12, 0.405, 0.26)
_COLUMN_SPLIT = 0.475
_ROW_SPLIT = 0.5
_ELEVATION, _AZIMUTH = 26.0, -60.0
#: The 3-D box is drawn this much larger than matplotlib's default, so the orbit fills its part.
_ZOOM = 1.3
#: Room above the data in a plot's view, and the factor the data must fall by before the view shrinks.
_ROOM, _FALL = 0.05, 4.0
_LEGEND_ABOVE = {
    "loc": "lower center",
    "bbox_to_anchor": (0.5, 1.0),
    "ncol": 2,
    "fontsize": "small",
    "frameon": False,
    "columnspacing": 1.0,
    "handlelength": 1.8,
}


def _radians_between(values: Mapping[str, Any], name: str, label: str) -> float:
    angle = values[name]
    if not -_ANGLE_SLACK <= angle <= math.pi + _ANGLE_SLACK:
        raise InputError(f"{label} must be between 0 and 180 deg (got {angle / deg:g} deg).", name)
    return min(max(angle, 0.0), math.pi)


def _apsis_target(values: Mapping[str, Any], body: Any) -> tuple[dict[str, float], str]:
    """The shape target of the burn ({} for none, {"rp": ...} or {"ra": ...}) and its words."""
    keyword = APSIS_CHANGES[values["apsis_change"]]
    if keyword is None:
        return {}, ""
    which = values["apsis_change"]
    radius = radius_at(values, "apsis_altitude", f"new {which} altitude", body)
    return {keyword: radius}, f"new {which} altitude {(radius - body.radius) / km:,.0f} km"


def _turn_costs(conic: Conic, nu: Any, turn: Any, target: Mapping[str, float]) -> np.ndarray:
    """Delta-v of turning the plane by ``turn`` about the radius at ``nu``, with the apsis target if any.

    ``2 vt sin(turn / 2)`` for a pure turn; with a target the speed also
    changes from ``v`` to ``w`` (:func:`deltakit.burn_to`) and the velocity
    turns by ``alpha``, ``sin(alpha / 2) = (vt / v) sin(turn / 2)`` (as in
    :mod:`deltakit.planes`). NaN where no burn along the velocity reaches the target.
    """
    radial, transverse = (np.asarray(x) for x in conic.velocity(nu))
    half = np.abs(np.sin(0.5 * np.asarray(turn)))
    if not target:
        return 2.0 * transverse * half
    v = np.sqrt(radial * radial + transverse * transverse)
    with np.errstate(invalid="ignore"):
        w = v + np.asarray(burn_to(conic, nu, **target))
        alpha = 2.0 * np.arcsin(np.minimum(transverse / v * half, 1.0))
        return _combined(np, v, w, alpha)


def _split(
    conic: Conic, nu: float, turn: float, target: Mapping[str, float], shares: np.ndarray
) -> np.ndarray:
    """Two burns: at ``nu`` the apsis change and ``shares`` of the turn, the rest at the other crossing.

    Both turn the plane about the line where the planes meet, so their turns
    add up. The rest of the turn is a pure turn at the opposite point, made on
    the pass before or after the main burn, whichever is slower there (a turn
    about the radius keeps the shape; the main burn's speed change sets the
    shape after it). NaN where the main burn cannot be made.
    """
    main = _turn_costs(conic, nu, shares * turn, target)
    r_vec, _ = conic.state(nu, "inertial")
    slowest = float(conic.velocity(conic.true_anomaly_at(-r_vec))[1])
    if target:
        dv = float(burn_to(conic, nu, **target))
        if not math.isfinite(dv):
            return np.full_like(shares, np.nan)
        between = burn_prograde(conic, nu, dv).after
        slowest = min(slowest, float(between.velocity(between.true_anomaly_at(-r_vec))[1]))
    return main + 2.0 * slowest * np.abs(np.sin(0.5 * (1.0 - shares) * turn))


def _best_share(conic: Conic, nu: float, turn: float, target: Mapping[str, float]) -> tuple[float, float]:
    """Share of the turn in the first burn with the least total, and that total (grid, then refined)."""
    totals = _split(conic, nu, turn, target, _SHARES)
    if not np.isfinite(totals).any():
        return math.nan, math.nan
    i = int(np.nanargmin(totals))
    low, high = _SHARES[max(i - 1, 0)], _SHARES[min(i + 1, len(_SHARES) - 1)]
    fine = np.linspace(low, high, 201)
    near = _split(conic, nu, turn, target, fine)
    j = int(np.nanargmin(near))
    return float(fine[j]), float(near[j])


class PlaneChangeExplorer(Panel):
    """Turn an orbit into a new plane: the two crossings, the cost along the orbit, and the best split.

    Parameters (keyword-only, SI)
    -----------------------------
    body : str
        Central body (a key of :data:`deltakit.constants.BODIES`).
    periapsis_altitude, apoapsis_altitude : float
        The orbit above the body's radius, m.
    argp : float
        Argument of periapsis, rad (from the ascending node, along the motion).
    inc, raan : float
        Inclination (0 to pi) and right ascension of the ascending node of the orbit, rad.
    target_inc, target_raan : float
        Inclination (0 to pi) and node of the plane to reach, rad.
    apsis_change : str
        One of :data:`APSIS_CHANGES`: what the same burn also changes ("none",
        "periapsis", "apoapsis").
    apsis_altitude : float
        The new altitude of that apsis, m (unused for "none").

    Examples
    --------
    >>> from deltakit.widgets import PlaneChangeExplorer
    >>> panel = PlaneChangeExplorer()
    >>> round(panel.results["turn"] * 180 / 3.141592653589793, 2)   # deg between the planes
    4.31
    >>> panel.results["cheaper"], round(panel.results["best_dv"]), round(panel.results["saving"])
    (1, 170, 551)
    >>> _ = panel.set(apsis_change="periapsis")   # and raise the perigee to 800 km in the same burn
    >>> round(panel.results["best_dv"]), panel.results["dv_second"]   # the near crossing lies below 800 km
    (178, nan)
    """

    #: a crossing the apsis change cannot be made at, and the split through it
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset({"dv_first", "dv_second", "saving"})
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "turn": ("angle between the planes", deg, "deg"),
        "nu_first": ("crossing 1: true anomaly", deg, "deg"),
        "altitude_first": ("crossing 1: altitude", km, "km"),
        "dv_first": ("crossing 1: delta-v", 1.0, "m/s"),
        "nu_second": ("crossing 2: true anomaly", deg, "deg"),
        "altitude_second": ("crossing 2: altitude", km, "km"),
        "dv_second": ("crossing 2: delta-v", 1.0, "m/s"),
        "best_dv": ("one burn, at the cheaper crossing", 1.0, "m/s"),
        "saving": ("saved against the other crossing", 1.0, "m/s"),
        "split_total": ("two burns, best split: total", 1.0, "m/s"),
        "split_share": ("share of the turn in the main burn", percent, "%"),
        "split_saving": ("two burns save against one", 1.0, "m/s"),
        "inclination_only": ("inclination only, node free", 1.0, "m/s"),
    }

    def __init__(
        self,
        *,
        body: str = LARKSPAN.body.name,
        periapsis_altitude: float = LARKSPAN.periapsis_altitude,
        apoapsis_altitude: float = LARKSPAN.apoapsis_altitude,
        argp: float = LARKSPAN_ORIENTATION["argp"],
        inc: float = LARKSPAN_ORIENTATION["inc"],
        raan: float = LARKSPAN_ORIENTATION["raan"],
        target_inc: float = LARKSPAN_TARGET_PLANE[0],
        target_raan: float = LARKSPAN_TARGET_PLANE[1],
        apsis_change: str = "none",
        apsis_altitude: float = LARKSPAN.periapsis_altitude + 300e3,
    ) -> None:
        super().__init__()
        self._control("body", choice("central body", list(BODIES), LARKSPAN.body.name, width="220px"))
        self._control("periapsis_altitude", number("periapsis altitude (km)", 0.0), km, "m")
        self._control("apoapsis_altitude", number("apoapsis altitude (km)", 0.0), km, "m")
        self._control("argp", slider("argument of periapsis (deg)", 0.0, 0.0, 360.0, 1.0), deg, "rad")
        self._control("inc", slider("inclination (deg)", 0.0, 0.0, 180.0, 0.5), deg, "rad")
        self._control("raan", slider("node (deg)", 0.0, 0.0, 360.0, 0.5), deg, "rad")
        self._control("target_inc", slider("target inclination (deg)", 0.0, 0.0, 180.0, 0.5), deg, "rad")
        self._control("target_raan", slider("target node (deg)", 0.0, 0.0, 360.0, 0.5), deg, "rad")
        self._control("apsis_change", choice("same burn also sets the", list(APSIS_CHANGES), "none"))
        self._control("apsis_altitude", number("to altitude (km)", 0.0), km, "m")
        self._build_figure()
        self._finish(
            "Plane change explorer: where the planes meet, and how to split the turn",
            [
                ["body", "periapsis_altitude", "apoapsis_altitude"],
                ["argp"],
                ["inc", "raan"],
                ["target_inc", "target_raan"],
                ["apsis_change", "apsis_altitude"],
            ],
            initial={
                "body": body,
                "periapsis_altitude": periapsis_altitude,
                "apoapsis_altitude": apoapsis_altitude,
                "argp": argp,
                "inc": inc,
                "raan": raan,
                "target_inc": target_inc,
                "target_raan": target_raan,
                "apsis_change": apsis_change,
                "apsis_altitude": apsis_altitude,
            },
        )

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """Both crossings, the cost along the orbit and the split for ``values`` (SI, keyed like controls)."""
        body = BODIES[values["body"]]
        rp, ra = apsides_at(values, body)
        inc = _radians_between(values, "inc", "inclination")
        target_inc = _radians_between(values, "target_inc", "target inclination")
        target, words = _apsis_target(values, body)
        conic = Conic.from_apsides(rp, ra, body.mu, argp=values["argp"], inc=inc, raan=values["raan"])
        plan = plane_change_burns(conic, target_inc, values["target_raan"], **target)
        dv = [float(x) for x in plan.dv]
        if not any(math.isfinite(x) for x in dv):
            raise InputError(
                f"no burn along the velocity at either crossing reaches the {words}: choose an apsis "
                "altitude the orbit can reach from there.",
                "apsis_altitude",
                "apsis_change",
            )
        turn = float(plan.turn)
        nu = [float(x) for x in plan.nu]
        k = int(plan.cheaper)
        best = plan.radial[k], plan.transverse[k], plan.normal[k]
        after = burn(conic, nu[k], *best).after
        splits = [_best_share(conic, nu[j], turn, target) for j in (0, 1)]
        first = min((0, 1), key=lambda j: splits[j][1] if math.isfinite(splits[j][1]) else math.inf)
        share, split_total = splits[first]
        if not split_total < dv[k] - _PAYS:  # splitting does not pay: the whole turn in the one burn
            first, share, split_total = k, 1.0, dv[k]
        nodes = [float(x) for x in conic.nodes]
        inclination_only = float(np.min(np.asarray(inclination_change_cost(conic, nodes, target_inc).dv)))
        radii = [float(conic.radius(x)) for x in nu]
        results = {
            "turn": turn,
            "nu_first": nu[0],
            "altitude_first": radii[0] - body.radius,
            "dv_first": dv[0],
            "nu_second": nu[1],
            "altitude_second": radii[1] - body.radius,
            "dv_second": dv[1],
            "cheaper": k + 1,
            "best_nu": nu[k],
            "best_dv": dv[k],
            "saving": float(plan.saving),
            "split_first": first + 1,
            "split_share": share,
            "split_total": split_total,
            "split_saving": max(dv[k] - split_total, 0.0),
            "inclination_only": inclination_only,
        }
        notes = [_cheaper_note(k, dv, radii, body, words, turn)]
        notes.append(_split_note(first, share, split_total, dv[k], words))
        if not all(map(math.isfinite, dv)):
            notes.append(f"No burn along the velocity at crossing {2 - k} reaches the {words}.")
        if math.isfinite(inclination_only) and inclination_only < dv[k] - 0.5:
            notes.append(
                f"With the node left free the target inclination alone costs {inclination_only:,.0f} m/s "
                "at the cheaper node of the orbit now (no apsis change): the rest pays for the node."
            )
        curves = {
            "turn": _turn_costs(conic, _NU, turn, target),
            "pure": _turn_costs(conic, _NU, turn, {}),
            "inclination": np.asarray(inclination_change_cost(conic, _NU, target_inc).dv),
        }
        shares = {j: _split(conic, nu[j], turn, target, _SHARES) for j in (0, 1)}
        drawing = {
            "body": body,
            "conic": conic,
            "after": after,
            "nu": nu,
            "cheaper": k,
            "curves": curves,
            "shares": shares,
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ the figure
    def _build_figure(self) -> None:
        fig = self._figure(7.6, 5.8)
        self.space_axes = fig.add_axes(_SPACE_BOX, projection="3d")
        self.cost_axes = fig.add_axes(_COST_BOX)
        self.split_axes = fig.add_axes(_SPLIT_BOX)
        placeholder = Conic.circular(2.0 * LARKSPAN.body.radius, LARKSPAN.body.mu, inc=0.5)
        ax = self.space_axes
        now = draw_conic_3d(
            ax, placeholder, body_radius=LARKSPAN.body.radius, n=_ORBIT_POINTS, label="orbit now"
        )
        later = draw_conic_3d(
            ax, placeholder, n=_ORBIT_POINTS, color=COLOURS["after"], linestyle="--", linewidth=1.6,
            label="after the cheaper burn",
        )  # fmt: skip
        for artist in (later.plane, later.nodes, later.ascending, later.periapsis):
            artist.set_visible(False)
        now.ascending.set_color(COLOURS["reference"])
        (meet,) = ax.plot(
            [], [], [], color=COLOURS["burn"], linestyle=":", linewidth=1.2, label="where the planes meet"
        )
        crossings = {role: self._crossing(ax, role, [], [], []) for role in _CROSSING_STYLE}
        ax.set_axis_off()
        for axis in (ax.xaxis, ax.yaxis, ax.zaxis):
            axis.set_visible(False)  # no ticks: the scale is written under the view
            axis.label.set_visible(False)
        ax.view_init(elev=_ELEVATION, azim=_AZIMUTH)
        self._scale_text = ax.text2D(
            0.5, 0.0, "", transform=ax.transAxes, ha="center", va="top", fontsize="x-small",
            color=COLOURS["reference"],
        )  # fmt: skip
        fig.legend(
            handles=[now.orbit, later.orbit, meet, now.ascending, now.periapsis],
            loc="upper center",
            bbox_to_anchor=(_SPACE_BOX[0] + 0.5 * _SPACE_BOX[2], _SPACE_BOX[1] - 0.035),
            ncol=2,
            fontsize="small",
            frameon=False,
            columnspacing=1.0,
            handlelength=1.8,
        )
        fig.text(
            _SPACE_BOX[0] + 0.5 * _SPACE_BOX[2], 0.965, "the orbit in space", ha="center", va="top",
            fontsize="medium",
        )  # fmt: skip

        ax = self.cost_axes
        (turn_line,) = ax.plot(
            _NU / deg,
            np.zeros_like(_NU),
            color=COLOURS["before"],
            linewidth=1.8,
            label="this turn, made here",
        )
        (free_line,) = ax.plot(
            _NU / deg, np.zeros_like(_NU), color=COLOURS["reference"], linestyle="--", linewidth=1.3,
            label="inclination only, node free",
        )  # fmt: skip
        points = {role: self._crossing(ax, role, [0.0], [0.0]) for role in _CROSSING_STYLE}
        ax.set_xlim(-185.0, 185.0)  # room for a whole marker at +-180 deg; one off the top is clipped
        ax.set_xticks(np.arange(-180.0, 181.0, 90.0))
        style_axes(ax, xlabel="true anomaly of the burn point (deg)", ylabel="delta-v (m/s)")
        ax.legend(handles=[turn_line, free_line, points["cheaper"], points["other"]], **_LEGEND_ABOVE)

        ax = self.split_axes
        split_lines = []
        for j, style in ((0, "-"), (1, "--")):
            (line,) = ax.plot(
                _SHARES / percent, np.zeros_like(_SHARES), color=COLOURS["hohmann"], linestyle=style,
                linewidth=1.6, label=f"main burn at crossing {j + 1}",
            )  # fmt: skip
            split_lines.append(line)
        (best_split,) = ax.plot(
            [0.0], [0.0], "D", color=COLOURS["burn"], markersize=6, zorder=5, label="best split"
        )
        ax.set_xlim(-2.5, 102.5)
        style_axes(ax, xlabel="share of the turn in the main burn (%)", ylabel="two burns (m/s)")
        ax.legend(**_LEGEND_ABOVE)
        # cells: the 3-D view with its legend on the left, each plot with its legend on the right
        self.view.cell(self.space_axes, (0.0, 0.0, _COLUMN_SPLIT, 1.0))
        self.view.cell(self.cost_axes, (_COLUMN_SPLIT, _ROW_SPLIT, 1.0, 1.0))
        self.view.cell(self.split_axes, (_COLUMN_SPLIT, 0.0, 1.0, _ROW_SPLIT))
        self._artists = {
            "now": now,
            "later": later,
            "meet": meet,
            "crossings": crossings,
            "turn": turn_line,
            "free": free_line,
            "points": points,
            "split": split_lines,
            "best_split": best_split,
        }
        self._extent = 0.0
        # what slider steps move: redrawn alone over the rest (the reference plane and the body's equator
        # change only with the orbit's size, which redraws the 3-D view's cell)
        self.view.animate(
            now.nodes, now.orbit, later.orbit, meet, now.ascending, now.periapsis,
            crossings["other"], crossings["cheaper"],
            turn_line, free_line, points["other"], points["cheaper"], *split_lines, best_split,
        )  # fmt: skip

    @staticmethod
    def _crossing(ax: Any, role: str, *data: list[float]) -> Any:
        marker, size, filled, name = _CROSSING_STYLE[role]
        (line,) = ax.plot(
            *data, marker=marker, markersize=size, linestyle="none", color=COLOURS["burn"],
            markerfacecolor=COLOURS["burn"] if filled else "white", zorder=5, label=name,
        )  # fmt: skip
        return line

    def draw(self, computed: Computed, changed: set[str]) -> None:
        d, r = computed.drawing, computed.results
        art = self._artists
        self.controls["apsis_altitude"].disabled = APSIS_CHANGES[self.controls["apsis_change"].value] is None
        conic, after, k = d["conic"], d["after"], d["cheaper"]
        ax = self.space_axes
        limits = ax.get_xlim()
        update_conic_3d(art["now"], conic)
        update_conic_3d(art["later"], after)
        self._hold_cube(conic, after, force=bool(changed & _ORBIT_INPUTS))
        positions = [conic.state(nu, "inertial")[0] / km for nu in d["nu"]]
        art["meet"].set_data_3d(*np.transpose(positions))
        for role, position in (("cheaper", positions[k]), ("other", positions[1 - k])):
            art["crossings"][role].set_data_3d(*([float(x)] for x in position))
        if ax.get_xlim() != limits or changed & {"body"}:
            half = PLANE_MARGIN * self._extent
            self._scale_text.set_text(f"grey square: the reference plane, {2 * half:,.0f} km across")
            self.view.invalidate(ax)
        art["turn"].set_ydata(d["curves"]["turn"])
        art["free"].set_ydata(d["curves"]["inclination"])
        dv = (r["dv_first"], r["dv_second"])
        shown = [math.degrees(math.remainder(nu, 2 * math.pi)) for nu in d["nu"]]
        art["points"]["cheaper"].set_data([shown[k]], [dv[k]])
        art["points"]["other"].set_data([shown[1 - k]], [dv[1 - k]])
        for j, line in enumerate(art["split"]):
            line.set_ydata(d["shares"][j])
        art["best_split"].set_data([r["split_share"] / percent], [r["split_total"]])
        # both plots share one delta-v scale (and move together: one redraw). It holds a pure turn
        # everywhere, the cheaper crossing and the better order of the split; the other crossing and an
        # apsis change far from the crossings may cost far more and run off the top (the readouts hold them)
        better = d["shares"][r["split_first"] - 1]
        finite = [x for x in (*d["curves"]["pure"], dv[k], *better) if math.isfinite(x)]
        if _follow_top(self.cost_axes, max(finite, default=1.0), force=bool(changed & _ORBIT_INPUTS)):
            self.split_axes.set_ylim(self.cost_axes.get_ylim())
            self.view.invalidate(self.cost_axes, self.split_axes)

    def _hold_cube(self, conic: Conic, after: Conic, *, force: bool) -> None:
        """Keep the 3-D view's size unless both orbits leave it or fill too little of it."""
        extent = max(_drawn_extent(conic), _drawn_extent(after))
        low, high = _SCALE_BAND
        if force or not (low * self._extent <= extent <= high * self._extent):
            self._extent = extent
        art, ax = self._artists, self.space_axes
        half = VIEW_MARGIN * self._extent
        if ax.get_xlim() != (-half, half):
            ax.set_xlim(-half, half)
            ax.set_ylim(-half, half)
            ax.set_zlim(-half, half)
        ax.set_box_aspect((1.0, 1.0, 1.0), zoom=_ZOOM)  # update_conic_3d may have reset the zoom
        square = PLANE_MARGIN * self._extent
        art["now"].plane.set_verts(
            [
                np.array(
                    [
                        [-square, -square, 0.0],
                        [square, -square, 0.0],
                        [square, square, 0.0],
                        [-square, square, 0.0],
                    ]
                )
            ]
        )
        line = np.array([-square, square])
        raan = float(conic.raan)
        art["now"].nodes.set_data_3d(line * math.cos(raan), line * math.sin(raan), np.zeros(2))


def _follow_top(ax: Any, high: float, *, force: bool) -> bool:
    """Keep [0, high] in a zero-based view whose top is 1, 2 or 5 times a power of ten; True if it moved.

    Coarser than :func:`follow_limits`: the turn sliders sweep a delta-v over
    two decades (a few degrees to half a turn), and each move of the axis is
    a redraw. The top rises when the data leave the view and falls only when
    a top two rungs lower would hold them.
    """
    high = high if math.isfinite(high) and high > 0.0 else 1.0
    current = ax.get_ylim()[1]
    if not force and current >= high and high > current / _FALL:
        return False
    power = 10.0 ** math.floor(math.log10(high * (1.0 + _ROOM)))
    top = next(rung * power for rung in (1.0, 2.0, 5.0, 10.0) if rung * power >= high * (1.0 + _ROOM))
    if top == current:
        return False
    ax.set_ylim(0.0, top)
    return True


def _drawn_extent(conic: Conic) -> float:
    x, y, z = conic_points_3d(conic, n=73)
    radius = np.sqrt(x * x + y * y + z * z)
    radius = radius[np.isfinite(radius)]
    return float(radius.max()) if radius.size else 1.0


def _cheaper_note(k: int, dv: list[float], radii: list[float], body: Any, words: str, turn: float) -> str:
    also = f" Both include the {words}." if words else ""
    if turn < _NO_TURN:
        return (
            "The planes agree: no turn is needed (the crossings shown are the nodes of the orbit now)." + also
        )
    other = 1 - k
    here = f"{dv[k]:,.0f} m/s, {(radii[k] - body.radius) / km:,.0f} km up"
    if not math.isfinite(dv[other]):
        return f"Only crossing {k + 1} can make this change in one burn: {here}.{also}"
    if abs(dv[other] - dv[k]) < 0.5:
        return f"Both crossings cost the same: {here} (the vehicle is as fast at both).{also}"
    return (
        f"Crossing {k + 1} is cheaper: {here}, against {dv[other]:,.0f} m/s at crossing {other + 1}, "
        f"{(radii[other] - body.radius) / km:,.0f} km up (the slower point is the cheaper).{also}"
    )


def _split_note(first: int, share: float, total: float, single: float, words: str) -> str:
    if not math.isfinite(total):
        return "No two-burn split: the second crossing is not reached after the first burn."
    if share == 1.0:
        return "Splitting the turn between the crossings does not pay: make it in one burn."
    rest = 2 - first
    what = f"the {words} and " if words else ""
    return (
        f"Best split: {what}{share / percent:.1f} % of the turn at crossing {first + 1}, the other "
        f"{(1.0 - share) / percent:.1f} % at crossing {rest} half an orbit later: {total:,.0f} m/s in all, "
        f"{single - total:,.0f} m/s less than one burn."
    )
