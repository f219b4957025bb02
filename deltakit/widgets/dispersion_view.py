"""DispersionView: how likely a budget is to close once its inputs disperse, and what drives the spread.

The panel flies a :class:`deltakit.Budget` many times through
:func:`deltakit.disperse` with three spreads the analyst slides (each burn's
delta-v, each propulsion system's specific impulse, the dry masses), shows the
histogram and cumulative curve of the propellant left in one tank (the
tightest by default) with its percentiles marked, ranks the causes of the
spread, and reads out the probability that the whole budget closes. One call
(:meth:`DispersionView.write_report`, or the button) writes the HTML report,
and the PDF when pdflatex is installed, through :func:`deltakit.report`.

The spreads are normal deviations from the nominal values, one standard
deviation each: the delta-v spread is a fraction of each burn's delta-v (each
burn its own draw), the specific impulse spread is in seconds (each system its
own draw), the dry-mass spread is a fraction of the vehicle's dry mass and of
each stage's (each its own draw). A spread of zero leaves that input at its
nominal value. :meth:`DispersionView.spreads` gives the keyword arguments of
:func:`deltakit.disperse` the panel uses, so a cell can repeat its run.

The budget is the panel's ``budget`` value: a :class:`deltakit.Budget` (or its
``to_dict()`` data) given to the constructor or to ``set``; ``values["budget"]``
and ``export()`` hold it as data, so an export restores the whole case. A
view made with :meth:`deltakit.widgets.BudgetBuilder.dispersion_view` follows
the builder: each valid edit of the budget there runs the dispersion again.

Default case: the invented Quillwort carrier and lander (:mod:`deltakit.demo`),
2,000 samples (enough to read the probability to about one percentage point;
a report run takes more).
"""

from __future__ import annotations

import math
import shutil
from collections.abc import Mapping
from pathlib import Path
from typing import Any, ClassVar

import ipywidgets as widgets
import numpy as np

from .._text import escape_html, escape_mathtext, one_line
from ..budget import Budget
from ..errors import DomainError
from ..plotting._style import COLOURS, style_axes
from ..plotting.dispersion import ALL_TANKS, plot_propellant_left
from ..units import percent
from ._base import Computed, InputError, Panel, _Plan, choice, follow_limits, number, slider, toggle
from ._stamped import stamped, stamped_text

__all__ = ["DispersionView"]

#: The tank choice that follows the budget: the tank with the lowest percentile of propellant left.
TIGHTEST = "tightest tank"
MARGIN_CHOICES = ["kept on top", "bare delta-v"]
#: Histogram bins across the plot's x range (fixed: a slider step moves bar heights only).
BINS = 48
#: Causes shown in the ranking (the largest).
TOP = 8
#: Percentile levels marked and read out.
LEVELS = (1.0, 10.0, 50.0, 90.0)
MAX_SAMPLES = 1_000_000


def _default_budget() -> Budget:
    from ..demo import QUILLWORT

    return QUILLWORT.budget()


def _as_budget(value: Any) -> Budget:
    """A budget from a Budget or its data (checked), or DomainError naming ``budget``."""
    if isinstance(value, Budget):
        return Budget.from_dict(value.to_dict())
    if isinstance(value, Mapping):
        return Budget.from_dict(dict(value), origin="`budget`")
    raise DomainError(f"`budget` must be a deltakit.Budget or its to_dict() data, not {type(value).__name__}")


def _short(label: str, room: int = 30) -> str:
    """A cause's name cut to ``room`` characters (the ranking's tick labels must stay in its cell)."""
    return label if len(label) <= room else label[: room - 1].rstrip() + "\u2026"


def _whole(value: float, label: str, name: str, low: int, high: int) -> int:
    if not (math.isfinite(value) and value == round(value)):
        raise InputError(f"{label} must be a whole number (got {value:g}).", name)
    if not low <= value <= high:
        raise InputError(f"{label} must be between {low:,} and {high:,} (got {value:g}).", name)
    return int(value)


class DispersionView(Panel):
    """Monte Carlo of a budget: the probability it closes, the propellant left, what drives the spread.

    Parameters (keyword-only, SI)
    -----------------------------
    budget : Budget, dict or None
        The budget to disperse (copied); None gives the Quillwort demo.
    dv_spread : float
        One standard deviation of each burn's delta-v, a fraction of it (0.05 = 5 %).
    isp_spread : float
        One standard deviation of each system's specific impulse, s.
    dry_mass_spread : float
        One standard deviation of the dry mass and of each stage's dry mass, a fraction.
    samples : int
        Monte Carlo samples (100 to 1,000,000).
    seed : int
        Seed of the random streams: the same seed, the same samples.
    margins : {"kept on top", "bare delta-v"}
        Keep each line's margin on top of its dispersed delta-v, or disperse the bare delta-v.
    tank : str
        The tank whose propellant left is drawn: ``"tightest tank"``, a system's name or ``"all tanks"``.
    path : str
        File name of the report, without suffix.

    Examples
    --------
    >>> import deltakit as dk
    >>> from deltakit.widgets import DispersionView
    >>> b = dk.Budget(1500.0, dk.exhaust_velocity(320.0), dry_mass=700.0).add("transfer", 2320.0)
    >>> view = DispersionView(budget=b, dv_spread=0.01, isp_spread=2.0, dry_mass_spread=0.0, seed=1)
    >>> ds = dk.disperse(b, samples=2000, seed=1, **view.spreads())
    >>> view.results["probability_closes"] == float(ds.probability_closes)
    True
    """

    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {
        "probability_closes": ("probability the budget closes (every tank)", percent, "%"),
        "tank_holds": ("probability the tank shown holds", percent, "%"),
        "nominal_left": ("propellant left, as booked (tank shown)", 1.0, "kg"),
        "left_p1": ("  P1 of the samples", 1.0, "kg"),
        "left_p10": ("  P10", 1.0, "kg"),
        "left_p50": ("  P50 (median)", 1.0, "kg"),
        "left_p90": ("  P90", 1.0, "kg"),
    }

    def __init__(
        self,
        *,
        budget: Budget | Mapping[str, Any] | None = None,
        dv_spread: float = 0.01,
        isp_spread: float = 2.0,
        dry_mass_spread: float = 0.03,
        samples: int = 2000,
        seed: int = 2031,
        margins: str = "kept on top",
        tank: str = TIGHTEST,
        path: str = "dispersion-report",
    ) -> None:
        super().__init__()
        #: The budget shown (a copy; the last valid one); its dispersion is :attr:`dispersion`.
        self.budget: Budget | None = None
        self._flown: Any = None
        self._budget_data: dict[str, Any] = {}
        self._control(
            "budget",
            widgets.Text(value="", description="budget", disabled=True, layout=widgets.Layout(width="420px")),
        )
        self._control(
            "dv_spread",
            slider("delta-v spread of each burn (%, 1 sigma)", 1.0, 0.0, 10.0, 0.1),
            percent,
        )
        self._control(
            "isp_spread", slider("specific impulse spread (s, 1 sigma)", 2.0, 0.0, 10.0, 0.1), 1.0, "s"
        )
        self._control("dry_mass_spread", slider("dry mass spread (%, 1 sigma)", 3.0, 0.0, 10.0, 0.1), percent)
        self._control("samples", number("samples", 2000.0, step=1000.0), 1.0)
        self._control("seed", number("seed", 2031.0, step=1.0), 1.0)
        self._control("margins", toggle("line margins", MARGIN_CHOICES, MARGIN_CHOICES[0]))
        self._control("tank", choice("tank shown", [TIGHTEST, ALL_TANKS], TIGHTEST, width="320px"))
        self._control(
            "path", widgets.Text(value="", description="report file", layout=widgets.Layout(width="340px"))
        )
        self.report_button = widgets.Button(description="Write report", icon="file-text")
        self.report_button.add_class("deltakit-dispersion-report")
        self.report_button.on_click(lambda _: self._report_clicked())
        self.report_status = widgets.HTML("")
        report_box = widgets.HBox(
            [self.controls["path"], self.report_button, self.report_status],
            layout=widgets.Layout(flex_flow="row wrap"),
        )
        self._left = None
        self._build_figure()
        self._finish(
            "Dispersions: how likely the budget is to close, and what drives the spread",
            [
                ["budget"],
                ["dv_spread"],
                ["isp_spread"],
                ["dry_mass_spread"],
                ["samples", "seed", "margins"],
                ["tank"],
            ],
            initial={
                "budget": _default_budget() if budget is None else budget,
                "dv_spread": dv_spread,
                "isp_spread": isp_spread,
                "dry_mass_spread": dry_mass_spread,
                "samples": samples,
                "seed": seed,
                "margins": margins,
                "tank": tank,
                "path": path,
            },
            below=[report_box],
        )

    # ------------------------------------------------------------------ values
    def _si(self, name: str) -> Any:
        if name == "budget":
            return self._budget_data
        return super()._si(name)

    def _plan(self, name: str, value: Any) -> _Plan:
        if name == "budget":
            budget = _as_budget(value)
            data = budget.to_dict()

            def apply() -> None:
                self._budget_data = data
                self.controls["budget"].value = budget.name or "(unnamed budget)"

            return _Plan(data, apply)
        if name == "tank":  # the choices follow the budget: checked by compute, against the budget given
            if not isinstance(value, str):
                raise DomainError(f"`tank` must be text, not {type(value).__name__}")

            def pick() -> None:
                widget = self.controls["tank"]
                if value not in widget.options:
                    widget.options = [*widget.options, value]
                widget.value = value

            return _Plan(value, pick)
        if name in ("samples", "seed"):
            plan = super()._plan(name, value)
            whole = float(round(plan.si))
            if whole == plan.si or not math.isfinite(whole):
                return plan
            widget = self.controls[name]
            note = f"{widget.description} {plan.si:g} taken as {whole:.0f} (a whole number)."

            def apply() -> None:
                widget.value = whole

            return _Plan(whole, apply, note)
        return super()._plan(name, value)

    def _on_change(self, change: dict[str, Any]) -> None:
        if change["owner"] in (self.controls["path"], self.controls["budget"]):
            return  # the report's file name is read when the report is written; the budget is set from code
        widget = change["owner"]
        if widget in (self.controls["samples"], self.controls["seed"]) and change["new"] != round(
            change["new"]
        ):
            with self._quietly():  # typed in the browser: the box takes the whole number it will use
                widget.value = float(round(change["new"]))
        super()._on_change(change)

    @staticmethod
    def _spreads(values: Mapping[str, Any], budget: Budget) -> dict[str, Any]:
        from ..dispersions import Normal

        out: dict[str, Any] = {}
        if values["dv_spread"] > 0.0:
            out["dv"] = Normal(values["dv_spread"], relative=True)
        if values["isp_spread"] > 0.0:
            out["isp"] = Normal(values["isp_spread"])
        if values["dry_mass_spread"] > 0.0:
            if budget.dry_mass is not None:
                out["dry_mass"] = Normal(values["dry_mass_spread"], relative=True)
            if budget.stages:
                out["stage_mass"] = Normal(values["dry_mass_spread"], relative=True)
        return out

    @property
    def dispersion(self) -> Any:
        """The dispersion shown (an xarray.Dataset, as :func:`deltakit.disperse` returns), or None.

        Built from the run's arrays when first asked (a slider step needs only
        the arrays), then the same object until the case changes.
        """
        return None if self._flown is None else self._flown.dataset

    def spreads(self) -> dict[str, Any]:
        """The keyword arguments of :func:`deltakit.disperse` the panel uses now (spreads and margins).

        ``disperse(panel.budget, samples=..., seed=..., **panel.spreads())``
        repeats the panel's run.
        """
        out = self._spreads(self.values, self.budget)
        out["margins"] = self.values["margins"] == MARGIN_CHOICES[0]
        return out

    # ------------------------------------------------------------------ the case
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """Disperse the budget of ``values`` (SI, keyed like the controls) and summarise one tank."""
        from ..dispersions import QUANTITIES, _fly

        for name, label, unit, high in (
            ("dv_spread", "delta-v spread", "%", 1.0),
            ("isp_spread", "specific impulse spread", "s", 100.0),
            ("dry_mass_spread", "dry mass spread", "%", 1.0),
        ):
            value = values[name]
            shown = value / percent if unit == "%" else value
            if not 0.0 <= value <= high:
                top = high / percent if unit == "%" else high
                raise InputError(
                    f"{label} must be between 0 and {top:g} {unit} (got {shown:g} {unit}).", name
                )
        samples = _whole(values["samples"], "number of samples", "samples", 100, MAX_SAMPLES)
        seed = _whole(values["seed"], "seed", "seed", 0, 2**63 - 1)
        try:
            budget = _as_budget(values["budget"])
        except DomainError as err:
            raise InputError(f"budget: {err}", "budget") from None
        if not any(line.kind == "burn" for line in budget.lines):
            raise InputError("the budget has no burn to disperse: add a line first.", "budget")
        names = list(budget.systems)
        tank = values["tank"]
        if tank not in (TIGHTEST, ALL_TANKS, *names):
            raise InputError(
                f"tank shown {tank!r} is not a system of this budget (choose {TIGHTEST!r}, "
                f"{ALL_TANKS!r} or one of {names}).",
                "tank",
            )
        margins = values["margins"] == MARGIN_CHOICES[0]
        try:
            flown = _fly(  # disperse() without its Dataset: built only when the view or a report asks
                budget,
                samples=samples,
                seed=seed,
                margins=margins,
                percentiles=LEVELS,
                **cls._spreads(values, budget),
            )
        except InputError:
            raise
        except DomainError as err:
            raise InputError(f"the dispersion of this budget: {err}", "budget") from None
        margin = np.asarray(flown.propellant_margin)  # (system, sample)
        row = {s: k for k, s in enumerate(flown.systems)}
        at = QUANTITIES.index("propellant_margin")
        tracked = [s for s in names if np.isfinite(margin[row[s], 0])]
        if not tracked:
            raise InputError(
                "no tank of this budget is tracked: give the budget a dry mass (or every load) to count "
                "what is left.",
                "budget",
            )
        p1 = list(flown.levels).index(1.0)
        low = {s: float(flown.percentiles[row[s], at, p1]) for s in tracked}
        tightest = min(tracked, key=lambda s: low[s])
        shown = tightest if tank == TIGHTEST else tank
        if shown == ALL_TANKS:
            left = margin[[row[s] for s in tracked]].sum(axis=0)
            nominal = float(sum(flown.nominal[row[s], at] for s in tracked))
        elif shown not in tracked:
            raise InputError(
                f"tank shown {shown!r} holds what the start mass leaves, which this budget does not track.",
                "tank",
            )
        else:
            left = margin[row[shown]]
            nominal = float(flown.nominal[row[shown], at])
        marks = np.percentile(left, LEVELS)
        results: dict[str, Any] = {
            "probability_closes": flown.probability_closes,
            "tank": shown,
            "nominal_left": nominal,
            **{f"left_p{level:g}": float(value) for level, value in zip(LEVELS, marks)},
            "tank_holds": float(np.mean(left >= 0.0)),
            "tightest": tightest,
        }
        target = shown if shown in flown.systems else ALL_TANKS
        column = flown.systems.index(target) if target in flown.systems else len(flown.systems)
        correlation = np.nan_to_num(flown.correlation[:, column], nan=0.0)
        share = correlation**2
        order = np.argsort(-share, kind="stable")
        ranking = [(flown.causes[i], float(share[i]), bool(correlation[i] >= 0.0)) for i in order]
        notes = [
            f"Tank shown: {shown} (the tightest at P1: {tightest})."
            if tank == TIGHTEST
            else f"Tank shown: {shown}."
        ]
        clipped = flown.clipped
        if clipped:
            notes.append(f"{clipped:,} burn draws fell below zero delta-v and were flown as zero.")
        if ranking:
            notes.append(f"Largest cause of the spread: {ranking[0][0]} ({100.0 * ranking[0][1]:.0f} %).")
        drawing = {
            "flown": flown,
            "budget": budget,
            "left": left,
            "marks": marks,
            "ranking": ranking,
            "target": target,
            "systems": names,
        }
        return Computed(results, tuple(notes), drawing)

    # ------------------------------------------------------------------ figure
    def _build_figure(self) -> None:
        fig = self._figure(8.4, 4.3)  # as wide as a notebook's output area with the file browser open
        self.axes = fig.add_axes((0.08, 0.27, 0.33, 0.62))
        self.ranking_axes = fig.add_axes((0.72, 0.27, 0.265, 0.62))

    def _first_draw(self, ds: Any) -> None:
        """Make the artists once (the plotting helper's histogram and style), then only move them."""
        left = plot_propellant_left(self.axes, ds, bins=BINS, marks=LEVELS)
        # the percentile labels follow their marks at every step: stamped from a picture of their glyphs
        left.labels[:] = [stamped(label) for label in left.labels]
        self._left = left
        self.twin = left.twin
        self._title = self.axes.title
        self.axes.set_xlabel("propellant left in the tank shown (kg; < 0: short)")
        self._title.set_fontsize("small")
        # the helper's bars become two step outlines, the samples that close and those short: two
        # artists for a slider step to move and redraw instead of one per bin
        edges = np.linspace(*self.axes.get_xlim(), BINS + 1)
        for patch in left.histogram:
            patch.remove()
        self._close_bins = self.axes.stairs(
            np.zeros(BINS), edges, fill=True, color=COLOURS["vehicle"], alpha=0.85, label="_nolegend_"
        )
        self._short_bins = self.axes.stairs(
            np.zeros(BINS), edges, fill=True, color=COLOURS["burn"], alpha=0.85, label="_nolegend_"
        )
        left.dry.set_label("tank dry (0 kg)")
        from matplotlib.patches import Patch

        handles = [
            Patch(color=COLOURS["vehicle"], alpha=0.85),
            Patch(color=COLOURS["burn"], alpha=0.85),
            left.cumulative,
            left.dry,
        ]
        self.axes.get_legend().remove()
        self.axes.legend(
            handles,
            ["samples that close", "samples short", "cumulative, right axis", "tank dry (0 kg)"],
            loc="upper center",
            bbox_to_anchor=(0.5, -0.17),
            ncol=2,
            fontsize="small",
            frameon=False,
        )
        y = np.arange(TOP)[::-1]
        self._bars = self.ranking_axes.barh(y, np.zeros(TOP), height=0.6, color=COLOURS["hohmann"])
        self.ranking_axes.set_yticks([])
        # the causes' names are texts beside the bars, not tick labels: a new order is then a blit,
        # never a redraw of the plot
        self._names = [
            stamped_text(
                self.ranking_axes,
                -0.035,
                yy,
                "",
                transform=self.ranking_axes.get_yaxis_transform(),
                ha="right",
                va="center",
                fontsize="small",
            )
            for yy in y
        ]
        self._bar_labels = [
            stamped_text(
                self.ranking_axes, 0.0, yy, "", va="center", fontsize="x-small", color=COLOURS["total"]
            )
            for yy in y
        ]
        self.ranking_axes.set_xlim(0.0, 112.0)
        self.ranking_axes.set_ylim(-0.6, TOP - 0.4)
        style_axes(
            self.ranking_axes,
            xlabel="share of the spread (%)",
            title="what drives the spread",
        )
        self.ranking_axes.grid(False, axis="y")
        self.ranking_axes.legend(
            [Patch(color=COLOURS["hohmann"]), Patch(color=COLOURS["burn"])],
            ["more of it leaves more", "more of it leaves less"],
            loc="lower right",
            fontsize="x-small",
            framealpha=0.9,
        )
        self._ticks: list[str] = [""] * TOP
        self._shown_bars: list[tuple[float, str, str] | None] = [None] * TOP
        for bar in self._bars:
            bar.set_clip_on(False)  # within the axes anyway: each bar then redraws only its own place
        self._order: list[str] = []
        self.view.animate(
            self._close_bins,
            self._short_bins,
            left.cumulative,
            *left.percentiles,
            *left.labels,
            self._title,
            *self._bars,
            *self._bar_labels,
            *self._names,
        )
        self._columns([self.axes, self.twin], [self.ranking_axes], room=0.075)

    def draw(self, computed: Computed, changed: set[str]) -> None:
        self._flown = computed.drawing["flown"]
        self.budget = computed.drawing["budget"]
        results = computed.results
        tank = self.controls["tank"]
        options = [TIGHTEST, *computed.drawing["systems"], ALL_TANKS]
        if list(tank.options) != options:
            with self._quietly():
                value = tank.value
                tank.options = options
                tank.value = value if value in options else TIGHTEST
        if self._left is None:
            self._first_draw(self.dispersion)
            self.view.invalidate()
        self._move_histogram(computed.drawing["left"], computed.drawing["marks"], results)
        self._move_ranking(computed.drawing["ranking"])

    def _move_histogram(self, left: np.ndarray, marks: np.ndarray, results: Mapping[str, Any]) -> None:
        ax, art = self.axes, self._left
        lo, hi = float(left.min()), float(left.max())
        size = max(abs(lo), abs(hi), 1.0)
        span = max(hi - lo, 0.02 * size)
        moved = follow_limits(ax, min(lo, 0.0) if lo < 1.5 * span else lo, hi, axis="x", include_zero=False)
        x0, x1 = ax.get_xlim()
        edges = np.linspace(x0, x1, BINS + 1)
        counts, _ = np.histogram(np.clip(left, x0, x1), bins=edges)
        short = edges[1:] <= 0.0  # bins wholly below zero: samples short
        counts = counts.astype(float)
        self._close_bins.set_data(np.where(short, 0.0, counts), edges)
        self._short_bins.set_data(np.where(short, counts, 0.0), edges)
        moved |= follow_limits(ax, 0.0, 1.35 * float(counts.max()))
        levels = np.linspace(0.0, 100.0, 401)  # the cumulative curve at 401 levels: smooth, and cheap to draw
        art.cumulative.set_data(np.percentile(left, levels), levels)
        top = ax.get_ylim()[1]
        for row, (line, label, level, value) in enumerate(zip(art.percentiles, art.labels, LEVELS, marks)):
            line.set_xdata([value, value])
            text = f"P{level:g}"  # its value is in the readouts: a short label is cheap to redraw
            where = (value, top * (0.99 - 0.075 * (row % 4)))
            if label.get_text() != text or label.get_position() != where:
                label.set_position(where)
                label.set_text(text)
        # the probabilities are readouts; the title changes only with the tank, so a slider step
        # redraws no long text
        title = f"propellant left in {escape_mathtext(_short(one_line(results['tank']), 26))}"
        if self._title.get_text() != title:
            self._title.set_text(title)
        if moved:
            self.view.invalidate(ax, self.twin)

    def _steady_order(self, ranking: list[tuple[str, float, bool]]) -> list[tuple[str, float, bool]]:
        """The causes largest first, two of them swapped only when the lower one leads by 3 points.

        Shares estimated from a few thousand samples wobble by a point or two
        between slider steps; without this hysteresis near-equal causes would
        trade places (and the tick labels be drawn again) on every step.
        """
        by_name = {item[0]: item for item in ranking}
        order = [c for c in self._order if c in by_name]
        order += [c for c, *_ in ranking if c not in order]
        share = {c: by_name[c][1] for c in order}
        for _ in range(len(order)):
            swapped = False
            for i in range(len(order) - 1):
                if share[order[i + 1]] > share[order[i]] + 0.03:
                    order[i], order[i + 1] = order[i + 1], order[i]
                    swapped = True
            if not swapped:
                break
        self._order = order
        return [by_name[c] for c in order[:TOP]]

    def _move_ranking(self, ranking: list[tuple[str, float, bool]]) -> None:
        ranking = self._steady_order(ranking)
        ticks = [_short(escape_mathtext(one_line(cause))) for cause, _, _ in ranking] + [""] * (
            TOP - len(ranking)
        )
        for k, (bar, label) in enumerate(zip(self._bars, self._bar_labels)):
            share, more = (
                (float(round(100.0 * ranking[k][1])), ranking[k][2]) if k < len(ranking) else (0.0, True)
            )  # whole percents: what a ranking needs, and a bar and its label move only when one changes
            text = f"{share:.0f} %" if k < len(ranking) else ""
            colour = COLOURS["hohmann"] if more else COLOURS["burn"]
            if self._shown_bars[k] == (share, colour, text):
                continue  # unchanged at the shown precision: not touched, so not drawn again
            self._shown_bars[k] = (share, colour, text)
            bar.set_width(share)
            bar.set_color(colour)
            label.set_position((share + 1.0, bar.get_y() + 0.3))
            label.set_text(text)
        if ticks != self._ticks:
            self._ticks = ticks
            for name, tick in zip(self._names, ticks):
                name.set_text(tick)

    # ------------------------------------------------------------------ the report
    def write_report(
        self,
        path: str | Path | None = None,
        *,
        formats: tuple[str, ...] | None = None,
        notes: str | None = None,
        overwrite: bool = False,
    ) -> dict[str, Path]:
        """Write the report of the budget and its dispersion in one call; the paths written by format.

        Parameters
        ----------
        path : path-like, optional
            File name without suffix; default the panel's ``path``.
        formats : tuple of str, optional
            Default ``("html", "pdf")`` when pdflatex is installed, else ``("html",)``.
        notes : str, optional
            A paragraph of the analyst's own; default a sentence naming the spreads.
        overwrite : bool
            Replace files that are not deltakit reports (refused otherwise, and left as they are).

        The files are written atomically by :func:`deltakit.report`, with the
        budget, the dispersion (its figures) and this panel's figure.
        """
        from ..reports import report

        if self.budget is None or self.dispersion is None:
            raise DomainError("nothing to report: the panel shows no valid case")
        target = Path(self.values["path"] if path is None else path).expanduser()
        if formats is None:
            formats = ("html", "pdf") if shutil.which("pdflatex") else ("html",)
        values = self.values
        if notes is None:
            dv, dry = values["dv_spread"] / percent, values["dry_mass_spread"] / percent
            notes = (
                f"Dispersion of {int(values['samples']):,} samples (seed {int(values['seed'])}), line "
                f"margins {values['margins']}: each burn's delta-v {dv:g} %, each specific impulse "
                f"{values['isp_spread']:g} s, the dry masses {dry:g} % (one standard deviation, normal)."
            )
        return report(
            self.budget,
            dispersion=self.dispersion,
            figures={"The dispersion panel's view": self.figure},
            notes=notes,
            fmt=tuple(formats),
            path=target,
            overwrite=overwrite,
        )

    def _report_clicked(self) -> None:
        self.report_status.value = "writing..."
        try:
            written = self.write_report()
        except (DomainError, ValueError, OSError, RuntimeError) as err:
            self.report_status.value = ""
            self._show_message(f"report not written: {one_line(err)}")
            return
        self.report_status.value = "wrote " + ", ".join(escape_html(str(p)) for p in written.values())
