"""What every deltakit panel shares.

A panel is a thin shell around two methods its subclass writes:

* ``compute(values) -> Computed``, a class method and a pure function: the
  inputs in SI (keyed like :attr:`Panel.controls`) in, the readouts (SI), the
  notes and what the figure needs out. It raises :class:`InputError` naming
  the control when an input makes no sense. Tests call it without widgets.
* ``draw(computed, changed)``, which moves the figure's artists to a computed
  case (``changed`` names the controls that moved since the last view) and
  calls ``self.view.invalidate(ax)`` when the limits of ``ax`` changed (its
  cell is drawn again), ``self.view.invalidate()`` when anything else not
  animated changed (a full draw).

The base holds the controls (display units, SI values), one update path for
the browser, the constructor and :meth:`Panel.set` (everything checked before
anything changes), the readouts, the message line, the caution line,
:meth:`Panel.export` and :meth:`Panel.close`. DEVELOPERS.md ("Adding a
panel") shows a new panel built on it.
"""

from __future__ import annotations

import contextlib
import inspect
import math
import warnings
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field
from typing import Any, ClassVar, NamedTuple

import ipywidgets as widgets
import numpy as np
from matplotlib.figure import Figure

from .._checks import finite
from .._text import CAUTION, escape_html, one_line
from ..errors import DomainError
from ._controls import choice, is_slider, number, number_width, on_slider_grid, slider, slider_plan, toggle
from ._format import fmt, html_notes, html_table, json_ready
from ._limits import FARTHEST, follow_limits, follow_square
from ._view import FigureView, figure_mode

__all__ = [
    "CAUTION",
    "FARTHEST",
    "Computed",
    "FigureView",
    "InputError",
    "Panel",
    "apsides_at",
    "choice",
    "figure_mode",
    "fmt",
    "follow_limits",
    "follow_square",
    "json_ready",
    "number",
    "number_width",
    "on_slider_grid",
    "radius_at",
    "slider",
    "toggle",
]

#: Significant digits kept when a display value is turned back into SI, so that
#: ``set(**values)`` followed by ``values`` gives the same numbers.
_DIGITS = 12


class InputError(DomainError):
    """An input a panel cannot show, in the words of its controls.

    ``controls`` names the controls (keys of :attr:`Panel.controls`) the
    message is about.
    """

    def __init__(self, message: str, *controls: str) -> None:
        super().__init__(message)
        self.controls = controls


InputError.__module__ = "deltakit.widgets"  # its public home (as NumPy's set_module does for its names)


@dataclass(frozen=True)
class Computed:
    """What a panel's ``compute`` gives: readouts (SI), notes, and what the figure needs.

    ``results`` becomes :attr:`Panel.results` and ``export()["results"]``;
    ``notes`` are sentences shown under the readouts; ``drawing`` holds
    arrays and objects for ``draw`` (display units are fine there).
    """

    results: dict[str, Any]
    notes: tuple[str, ...] = ()
    drawing: dict[str, Any] = field(default_factory=dict)


class _Plan(NamedTuple):
    """How one control will take a value: the SI value it then holds, how to apply it, a note."""

    si: Any
    apply: Any
    note: str = ""


def radius_at(values: Mapping[str, Any], name: str, label: str, body: Any) -> float:
    """The radius (m) of the altitude ``values[name]`` above ``body``; InputError below ground or too far.

    ``label`` names the control in the message ("parking periapsis altitude").

    >>> from deltakit.constants import EARTH
    >>> radius_at({"h": 400e3}, "h", "periapsis altitude", EARTH)
    6778137.0
    >>> radius_at({"h": -50e3}, "h", "periapsis altitude", EARTH)
    Traceback (most recent call last):
    ...
    deltakit.widgets.InputError: periapsis altitude -50 km is below the surface of Earth (must be >= 0 km).
    """
    altitude = values[name]
    if altitude < 0.0:
        raise InputError(
            f"{label} {altitude / 1e3:g} km is below the surface of {body.name} (must be >= 0 km).", name
        )
    if altitude > FARTHEST:
        raise InputError(
            f"{label} {altitude / 1e3:g} km is farther than a panel draws (at most {FARTHEST / 1e3:g} km).",
            name,
        )
    return body.radius + altitude


def apsides_at(values: Mapping[str, Any], body: Any, prefix: str = "") -> tuple[float, float]:
    """Periapsis and apoapsis radii (m) of the controls ``periapsis_altitude`` and ``apoapsis_altitude``.

    Each is checked by :func:`radius_at`, and the apoapsis must not lie below the periapsis;
    ``prefix`` starts their labels ("parking ").
    """
    rp = radius_at(values, "periapsis_altitude", f"{prefix}periapsis altitude", body)
    ra = radius_at(values, "apoapsis_altitude", f"{prefix}apoapsis altitude", body)
    if ra < rp:
        raise InputError(
            f"{prefix}apoapsis altitude {(ra - body.radius) / 1e3:g} km is below the periapsis altitude "
            f"{(rp - body.radius) / 1e3:g} km.",
            "apoapsis_altitude",
        )
    return rp, ra


def _round_si(x: float) -> float:
    return float(f"{x:.{_DIGITS}g}")


def _widgets_under(root: widgets.Widget) -> Iterator[widgets.Widget]:
    """Every widget a widget holds (children, layout, style, toolbars), depth first, each once."""
    seen: set[int] = set()
    stack: list[Any] = [root]
    while stack:
        widget = stack.pop()
        if not isinstance(widget, widgets.Widget) or id(widget) in seen:
            continue
        seen.add(id(widget))
        yield widget
        for name in widget.keys:
            value = getattr(widget, name, None)
            if isinstance(value, widgets.Widget):
                stack.append(value)
            elif isinstance(value, (list, tuple)):
                stack.extend(v for v in value if isinstance(v, widgets.Widget))


class Panel(widgets.VBox):
    """Base of the deltakit panels (an :class:`ipywidgets.VBox`).

    Subclasses register their controls with :meth:`_control`, make a figure
    with :meth:`_figure`, call :meth:`_finish` with the constructor's values,
    and write :meth:`compute` and :meth:`draw`.
    """

    version: ClassVar[int] = 1
    #: Readouts shown beside the figure: key -> (label, SI scale, display unit).
    readout_spec: ClassVar[dict[str, tuple[str, float, str]]] = {}
    #: Results that may be NaN ("n/a": no bi-elliptic transfer) or infinite ("unbounded": an open
    #: orbit's apoapsis) for a valid case. Any other non-finite result means the inputs are beyond
    #: what the panel computes, and the panel says so instead of showing it.
    may_be_nonfinite: ClassVar[frozenset[str]] = frozenset()

    def __init__(self, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.controls: dict[str, widgets.ValueWidget] = {}
        self._scales: dict[str, float | None] = {}
        self._units: dict[str, str] = {}
        self._results: dict[str, Any] = {}
        self._holding = False
        self._pending: set[str] = set()
        self._error = ""
        self._adjusted: dict[str, str] = {}
        self._closed = False
        self.figure: Figure | None = None
        self.view: FigureView | None = None
        self.message = widgets.HTML(value="")
        self.message.add_class("deltakit-message")
        self.readouts = widgets.HTML(value="")
        self.readouts.add_class("deltakit-readout")
        self.caution = widgets.HTML(
            value=f'<div style="font-size:0.8em;color:#555;line-height:1.3">{escape_html(CAUTION)}</div>'
        )
        self.caution.add_class("deltakit-caution")

    # ------------------------------------------------------------------ what subclasses write
    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:  # pragma: no cover - abstract
        """The readouts, notes and drawing of the case ``values`` (SI); :class:`InputError` if invalid."""
        raise NotImplementedError

    def draw(self, computed: Computed, changed: set[str]) -> None:
        """Move the figure's artists (and mirrored controls) to ``computed``; nothing by default."""

    # ------------------------------------------------------------------ building
    def _control(
        self, name: str, widget: widgets.ValueWidget, scale: float | None = None, unit: str = ""
    ) -> widgets.ValueWidget:
        """Register a control.

        ``scale`` is SI units per display unit (1e3 for km), None for a
        control that holds no number; ``unit`` is the SI unit of its value
        (quantities from astropy or pint passed to :meth:`set` are converted to it).
        """
        if hasattr(widget, "style") and hasattr(widget.style, "description_width"):
            widget.style.description_width = "initial"
        widget.add_class(f"deltakit-control-{name.replace('_', '-')}")
        self.controls[name] = widget
        self._scales[name] = scale
        self._units[name] = unit
        return widget

    def _figure(self, width: float = 7.6, height: float = 3.8, **kwargs: Any) -> Figure:
        self.figure = Figure(figsize=(width, height), dpi=100, **kwargs)
        self.view = FigureView(self.figure)
        return self.figure

    def _columns(self, *columns: list[Any], room: float = 0.02) -> None:
        """Give side-by-side axes their cells: figure columns split ``room`` right of each column.

        The gap between two plots holds the right one's tick labels and
        y-axis label, so the split lies just right of the left plot (``room``,
        figure fraction, is for its last tick label); see :meth:`FigureView.cell`.
        """
        rights = [max(ax.get_position().x1 for ax in column) + room for column in columns[:-1]]
        edges = [0.0, *rights, 1.0]
        bottom = self._above_figure_legends([ax for column in columns for ax in column])
        for column, x0, x1 in zip(columns, edges[:-1], edges[1:]):
            for ax in column:
                self.view.cell(ax, (x0, bottom, x1, 1.0))

    def _above_figure_legends(self, axes: list[Any]) -> float:
        """Where cells may start (figure fraction): above a figure legend laid out below every plot.

        A legend of the whole figure under the plots (PropellantTrade's) is
        then left out of a cell's redraw. 0 when there is none, or when some
        plot's furniture (tick labels, axis label) reaches down to it.
        """
        figure = self.figure
        if not figure.legends:
            return 0.0
        renderer = figure.canvas.get_renderer()
        height = figure.bbox.height
        lowest = min(ax.get_tightbbox(renderer).y0 for ax in axes)
        tops = [legend.get_window_extent(renderer).y1 for legend in figure.legends]
        top = max(tops)
        if top + 4.0 > lowest:  # four pixels apart at least: antialiased edges stay on their side
            return 0.0
        return 0.5 * (top + lowest) / height

    def _finish(
        self,
        title: str,
        rows: list[list[str]],
        *,
        initial: Mapping[str, Any],
        extra: list[widgets.Widget] | None = None,
        below: list[widgets.Widget] | None = None,
    ) -> None:
        """Lay out the panel, give the controls the constructor's values, draw the first view.

        ``initial`` holds the constructor's arguments (SI). They go through
        the checks of :meth:`set`; invalid ones raise :class:`DomainError`
        (there is no earlier view to keep). ``extra`` widgets go above the
        message line, ``below`` ones under the figure.
        """
        heading = widgets.HTML(value=f"<b>{escape_html(title)}</b>")
        boxes = [
            widgets.HBox([self.controls[name] for name in row], layout=widgets.Layout(flex_flow="row wrap"))
            for row in rows
        ]
        children: list[widgets.Widget] = [heading, *boxes, *(extra or []), self.message]
        if self.view is not None:
            children.append(self.view.widget)
        children += [*(below or []), self.readouts, self.caution]
        self.children = children
        self.add_class("deltakit-panel")
        for widget in self.controls.values():
            widget.observe(self._on_change, names="value")
        self._pending = set(self.controls)  # the first view draws everything
        self._apply(dict(initial), touched=self._given(initial), strict=True)

    def _given(self, initial: Mapping[str, Any]) -> set[str]:
        """The constructor arguments that differ from their defaults (what the analyst asked for)."""
        defaults = inspect.signature(type(self).__init__).parameters
        given = set()
        for name, value in initial.items():
            parameter = defaults.get(name)
            try:
                same = parameter is not None and bool(parameter.default == value)
            except Exception:  # noqa: BLE001  # arrays and odd objects: count them as given
                same = False
            if not same:
                given.add(name)
        return given

    # ------------------------------------------------------------------ values in SI
    def _si(self, name: str) -> Any:
        value = self.controls[name].value
        scale = self._scales[name]
        if scale is None:
            return value
        return _round_si(float(value) * scale)

    @property
    def values(self) -> dict[str, Any]:
        """The inputs, SI (m, m/s, kg, s, rad), keyed like :attr:`controls`."""
        return {name: self._si(name) for name in self.controls}

    @property
    def results(self) -> dict[str, Any]:
        """The readouts of the last valid view, SI."""
        return dict(self._results)

    @property
    def error(self) -> str:
        """The current message about invalid input, or ``""``."""
        return self._error

    @property
    def adjusted(self) -> dict[str, str]:
        """Slider values set from code that were moved to the slider's step grid: name -> note."""
        return dict(self._adjusted)

    def export(self) -> dict[str, Any]:
        """Inputs and readouts, JSON-ready and SI: ``{"panel", "version", "values", "results"}``.

        ``panel.set(**exported["values"])`` restores a panel of the same kind.
        """
        return {
            "panel": type(self).__name__,
            "version": self.version,
            "values": json_ready(self.values),
            "results": json_ready(self._results),
        }

    # ------------------------------------------------------------------ driving from code
    def set(self, **values: Any) -> Panel:
        """Drive the panel from code with SI values; all of them or none.

        Names are those of :attr:`controls`. Every value is checked first: a
        value of the wrong kind (text, NaN, an unknown choice) raises
        :class:`DomainError` naming it; a case the panel cannot show (a
        negative delta-v, an apoapsis below the periapsis) shows its message
        in the panel and changes no control. A slider holds only values on
        its step grid (the browser would snap any other and send it back): an
        off-step value moves to the nearest step, and the readouts and
        :attr:`adjusted` say so. A value outside a slider's range widens the
        range by whole steps.
        """
        values = self._translate(dict(values))
        unknown = sorted(set(values) - set(self.controls))
        if unknown:
            raise TypeError(
                f"{type(self).__name__}.set() got unknown names {unknown}; "
                f"expected some of {sorted(self.controls)}"
            )
        self._apply(values, touched=set(values), strict=False)
        return self

    def _translate(self, values: dict[str, Any]) -> dict[str, Any]:
        """Hook: turn names and values the panel still accepts (older layouts) into its controls'."""
        return values

    def _follow_up(self, touched: set[str]) -> tuple[dict[str, Any], dict[str, str]]:
        """Hook: values (SI) that follow when ``touched`` controls change, and notes saying so.

        TransferTrade uses it to drop the demo case's plane change once the
        analyst picks another body or orbit.
        """
        return {}, {}

    def _plan(self, name: str, value: Any) -> _Plan:
        """Check one value (SI) for control ``name`` and say how the control will hold it."""
        widget = self.controls[name]
        scale = self._scales[name]
        if scale is None:
            if isinstance(
                widget, (widgets.Dropdown, widgets.ToggleButtons, widgets.RadioButtons, widgets.Select)
            ):
                options = [o[1] if isinstance(o, tuple) else o for o in widget.options]
                if value not in options:
                    raise DomainError(f"`{name}` must be one of {options}, not {value!r}")
            elif isinstance(widget, widgets.Text) and not isinstance(value, str):
                raise DomainError(f"`{name}` must be text, not {type(value).__name__}")
            elif isinstance(widget, widgets.Checkbox) and not isinstance(value, (bool, np.bool_)):
                raise DomainError(f"`{name}` must be True or False, not {value!r}")
            return _Plan(value, lambda: setattr(widget, "value", value))
        array = finite(value, name, self._units[name])
        if array.size != 1:
            raise DomainError(f"`{name}` must be one number, got an array of shape {array.shape}")
        shown = float(array.reshape(())) / scale
        if not math.isfinite(shown):
            raise DomainError(f"`{name}` is too large to show in {widget.description!r}, got {value!r}")
        if is_slider(widget):
            plan = slider_plan(widget, shown)

            def apply() -> None:
                if plan.high > widget.max:
                    widget.max = plan.high
                if plan.low < widget.min:
                    widget.min = plan.low
                widget.value = plan.value

            return _Plan(_round_si(plan.value * scale), apply, plan.note)
        return _Plan(_round_si(shown * scale), lambda: setattr(widget, "value", shown))

    # ------------------------------------------------------------------ one update path
    @contextlib.contextmanager
    def _quietly(self) -> Iterator[None]:
        """Change controls without starting an update (mirrored inputs, applied plans)."""
        holding, self._holding = self._holding, True
        try:
            yield
        finally:
            self._holding = holding

    def _apply(
        self, si_values: dict[str, Any], *, touched: set[str], strict: bool, keep_notes: bool = False
    ) -> bool:
        """Check values, compute the case they make, and only then change controls and view."""
        followed, follow_notes = self._follow_up(touched)
        si_values = {**{k: v for k, v in followed.items() if k not in touched}, **si_values}
        plans = {name: self._plan(name, value) for name, value in si_values.items()}
        candidate = self.values
        candidate.update({name: plan.si for name, plan in plans.items()})
        computed = self._attempt(candidate, touched)
        if isinstance(computed, Exception) and any(plan.note for plan in plans.values()):
            # a value moved to its slider's grid: report the problem of the value as given
            as_given = {**candidate, **{name: si_values[name] for name, plan in plans.items() if plan.note}}
            refused = self._attempt(as_given, touched)
            if isinstance(refused, Exception):
                computed = refused
        if isinstance(computed, Exception):
            self._refuse(computed, strict)
            return False
        with self._quietly():
            for plan in plans.values():
                plan.apply()
        notes = {name: plan.note for name, plan in plans.items() if plan.note}
        notes.update({k: v for k, v in follow_notes.items() if k not in touched})
        self._adjusted = {**self._adjusted, **notes} if keep_notes else notes
        self._pending |= set(plans)
        self._show(computed)
        return True

    def _on_change(self, change: dict[str, Any]) -> None:
        if self._holding:
            return
        widget = change["owner"]
        name = next((k for k, w in self.controls.items() if w is widget), None)
        if name is None:
            return
        if (
            is_slider(widget)
            and isinstance(change.get("old"), (int, float))
            and abs(change["new"] - change["old"]) <= 1e-9 * float(widget.step)
        ):
            return  # the browser echoing our own value in its float arithmetic: nothing moved
        self._adjusted.pop(name, None)
        self._pending.add(name)
        self._apply({}, touched={name}, strict=False, keep_notes=True)

    def _attempt(self, values: dict[str, Any], touched: set[str]) -> Computed | Exception:
        """``compute``, or the reason it failed as an :class:`InputError` naming the touched controls.

        Floating-point trouble (overflow, division by zero, invalid
        operations) raises instead of warning, so absurd but finite inputs
        (1e300) end as a message, never as RuntimeWarnings or a wrong view.
        Other exceptions (bugs) are returned as they are.
        """
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("error", RuntimeWarning)
                with np.errstate(over="raise", divide="raise", invalid="raise"):
                    computed = type(self).compute(values)
            for key, value in computed.results.items():
                if isinstance(value, float) and not math.isfinite(value) and key not in self.may_be_nonfinite:
                    raise ArithmeticError(f"{key} is {value}")
            return computed
        except InputError as err:
            return err
        except (DomainError, ArithmeticError, RuntimeWarning, ValueError) as err:
            refused = InputError(self._beyond_range(values, touched), *sorted(touched))
            refused.__cause__ = err
            return refused
        except Exception as err:  # noqa: BLE001  # reported by _refuse, never raised into a notebook
            return err

    def _refuse(self, err: Exception, strict: bool) -> None:
        """Raise (constructor) or show (browser, ``set``) why a case was not shown."""
        if strict:
            raise err
        if isinstance(err, InputError):
            self._show_message(str(err))
        else:
            self._show_message(f"unexpected {type(err).__name__}: {one_line(err)}")

    def _beyond_range(self, values: Mapping[str, Any], touched: set[str]) -> str:
        numbers = {name for name in touched if self._scales.get(name) is not None}
        shown = []
        for name in self.controls:
            if name in (numbers or touched):
                widget = self.controls[name]
                scale = self._scales[name]
                value = values[name] / scale if scale else values[name]
                text = f"{value:g}" if isinstance(value, float) else str(value)
                shown.append(f"{widget.description or name} = {text}")
        what = ", ".join(shown) or "These inputs"
        return f"{what}: no case this panel can compute (the numbers overflow or give no orbit)."

    def _show(self, computed: Computed) -> None:
        """Move the view to a computed case: artists, readouts, message line, picture."""
        changed = set(self._pending)
        try:
            self.draw(computed, changed)
        except Exception as err:  # noqa: BLE001  # a drawing bug must not raise into the notebook
            self._show_message(f"unexpected {type(err).__name__} while drawing: {one_line(err)}")
            if self.view is not None:
                self.view.invalidate()  # artists may have half moved: the next view is drawn whole
            return
        self._pending.clear()
        self._results = dict(computed.results)
        self._show_message("")
        self._show_readouts(computed)
        if self.view is not None:
            self.view.refresh()

    def _show_message(self, text: str) -> None:
        self._error = text
        if not text:
            self.message.value = ""
            return
        self.message.value = (
            '<div style="color:#8a1c1c;background:#fbeaea;border-left:3px solid #b3245c;padding:3px 8px">'
            f"<b>Not shown:</b> {escape_html(text)} The view keeps the last valid inputs.</div>"
        )

    def _show_readouts(self, computed: Computed) -> None:
        results = computed.results
        rows = [
            (key, label, fmt(results[key], scale, unit))
            for key, (label, scale, unit) in self.readout_spec.items()
            if key in results
        ]
        self.readouts.value = html_table(rows) + html_notes([*self._adjusted.values(), *computed.notes])

    # ------------------------------------------------------------------ closing
    def close(self) -> None:
        """Close the panel: its figure, every widget it holds, and the panel itself.

        Afterwards nothing of the panel stays alive in the kernel (re-running a
        cell that makes a panel should close the old one first). ipywidgets
        also calls this when the panel is garbage-collected, so it stays cheap.
        """
        if getattr(self, "_closed", True):
            return
        self._closed = True
        if self.view is not None:
            self.view.close()
        for widget in list(_widgets_under(self)):
            if widget is not self:
                widget.unobserve_all()
                widget.close()
        self.unobserve_all()
        self.controls = {}
        self.children = ()
        self.figure = None
        self.view = None
        super().close()
