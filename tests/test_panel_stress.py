"""Panels under stress: bad and absurd input, hostile text, closing, many updates.

What a panel promises (README, DEVELOPERS.md): invalid input is a message
naming the control, with the last valid view kept and no control changed;
``set`` is all or nothing; absurd but finite numbers (1e300) never leak
RuntimeWarnings; user text is shown as text, never as HTML or mathtext;
``close()`` frees the figure and every widget; memory levels off however
often the panel updates.
"""

from __future__ import annotations

import gc
import html
import itertools
import math
import re
import tracemalloc
import warnings
import weakref

import ipywidgets as widgets
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import deltakit as dk
from deltakit.widgets._base import _widgets_under, json_ready

#: Every registered panel but the formula sheet (typeset text: no numbers to stress).
PANEL_NAMES = [name for name in dk.widgets.PANELS if name != "FormulaSheet"]
#: Those with sliders.
SLIDER_PANELS = [name for name in PANEL_NAMES if name != "BudgetBuilder"]
_PANELS: dict[str, object] = {}


def shared(name):
    """One panel of each kind for the property tests (made once: construction is the slow part)."""
    if name not in _PANELS:
        _PANELS[name] = getattr(dk.widgets, name)()
    return _PANELS[name]


def numeric_controls(panel):
    return [name for name, scale in panel._scales.items() if scale is not None]


def state(panel):
    """Everything a failed update must leave as it was."""
    return (
        panel.values,
        panel.results,
        {n: (getattr(w, "min", None), getattr(w, "max", None)) for n, w in panel.controls.items()},
    )


# ---------------------------------------------------------------------- all or nothing
@pytest.mark.parametrize("panel_name", PANEL_NAMES)
def test_set_with_a_value_of_the_wrong_kind_changes_nothing(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    first, second = numeric_controls(panel)[:2]
    before = state(panel)
    good = panel.values[first] * 1.01 + 1.0
    with pytest.raises(dk.DomainError, match=f"`{second}`"):
        panel.set(**{first: good, second: "7000"})  # text is not a number
    with pytest.raises(dk.DomainError, match=f"`{second}` must be finite"):
        panel.set(**{first: good, second: math.nan})
    assert state(panel) == before


def test_set_good_and_bad_shows_the_message_and_changes_no_control():
    panel = dk.widgets.BurnPointExplorer()
    before = state(panel)
    panel.set(nu=1.0, dv=-50.0)  # the burn point alone would be fine
    assert "delta-v must be >= 0 m/s" in panel.error
    assert state(panel) == before
    assert panel.controls["nu"].value != pytest.approx(math.degrees(1.0))


def _value_for(panel, name, data):
    """A value for control ``name``: mostly sensible, sometimes nonsense the panel must refuse."""
    widget = panel.controls[name]
    scale = panel._scales[name]
    if scale is None:
        options = [o[1] if isinstance(o, tuple) else o for o in getattr(widget, "options", ())]
        return data.draw(st.sampled_from(options)) if options else widget.value
    current = panel.values[name]
    return data.draw(
        st.one_of(
            st.floats(-3.0, 3.0).map(lambda f: current * (1.0 + f) if current else f * 1e3),
            st.sampled_from([-1e300, 1e300, 1e-300, 0.0, -1.0]),
        )
    )


@pytest.mark.parametrize("panel_name", SLIDER_PANELS)
@given(data=st.data())
def test_set_is_all_or_nothing(panel_name, data):
    panel = shared(panel_name)
    names = data.draw(
        st.lists(
            st.sampled_from(numeric_controls(panel) + ["body"] * ("body" in panel.controls)),
            min_size=1,
            max_size=4,
            unique=True,
        )
    )
    asked = {name: _value_for(panel, name, data) for name in names}
    before = state(panel)
    refused = False
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a RuntimeWarning is a failure here
        try:
            panel.set(**asked)
        except dk.DomainError:  # a pair that disagrees (PropellantTrade): raised, nothing changed
            refused = True
    if refused or panel.error:
        assert state(panel) == before, f"a refused set changed the panel: {asked}"
    else:
        computed = type(panel).compute(panel.values)
        assert json_ready(computed.results) == json_ready(panel.results)
        for name, value in asked.items():
            if isinstance(value, float) and name not in panel.adjusted and not panel.controls[name].disabled:
                # a disabled box follows the other input of its pair; a slider moves a value within a
                # millionth of its step to the step without a note
                step = getattr(panel.controls[name], "step", None) or 0.0
                tolerance = 1e-6 * step * panel._scales[name] + 1e-9
                assert panel.values[name] == pytest.approx(value, rel=1e-9, abs=tolerance)
    panel.set(**before[0])  # back to the shared panel's case for the next example
    assert panel.error == ""


# ---------------------------------------------------------------------- absurd but finite numbers
@pytest.mark.parametrize("panel_name", PANEL_NAMES)
def test_absurd_numbers_give_a_message_or_finite_readouts(panel_name):
    panel = getattr(dk.widgets, panel_name)()
    for name, absurd in itertools.product(numeric_controls(panel), [1e300, -1e300, 1e-300, 1e15]):
        before = state(panel)
        with warnings.catch_warnings():
            warnings.simplefilter("error")  # never a RuntimeWarning
            panel.set(**{name: absurd})
            if panel.error:
                assert state(panel) == before
                label = panel.controls[name].description.split(" (")[0]
                words = re.findall(r"[a-z]+(?:-[a-z]+)?", label.lower())
                message = panel.error.lower()
                assert any(word in message for word in words if len(word) > 3), (
                    f"{panel_name}: {name}={absurd}: the message does not name the control: {panel.error}"
                )
                inner = set(re.findall(r"`([^`]+)`", panel.error)) - {name}
                assert not inner, (
                    f"{panel_name}: the message names internal parameters {inner}: {panel.error}"
                )
            else:
                shown = html.unescape(re.sub(r"<[^>]+>", " ", panel.readouts.value)).lower()
                assert not re.search(r"\b(nan|inf)\b", shown), f"{panel_name}: {name}={absurd}: {shown}"
            panel.set(**before[0])
        assert panel.error == ""


def test_absurd_apoapsis_names_the_control_not_an_internal_parameter():
    panel = dk.widgets.BurnPointExplorer()
    panel.set(apoapsis_altitude=1e300)
    assert "apoapsis altitude" in panel.error
    assert "`radial`" not in panel.error and "`" not in panel.error


# ---------------------------------------------------------------------- hostile text
HOSTILE = '<img src=x onerror="alert(1)"> $\\frac{ </b><script>alert(2)</script> & "quotes" \n\\input{x}'


def _html_of(panel):
    return [w.value for w in _widgets_under(panel) if isinstance(w, (widgets.HTML, widgets.HTMLMath))]


def test_budget_text_is_shown_as_text_everywhere():
    panel = dk.widgets.BudgetBuilder(
        name=HOSTILE,
        lines=[
            {"label": HOSTILE, "formula": "number", "params": {"dv": 300.0}},
            {"label": "$\\frac{", "formula": "number", "params": {"dv": 50.0}, "margin": 0.1},
        ],
        path=HOSTILE,
    )
    assert panel.error == ""
    panel.file_buttons["load"].click()  # fails: the message shows the hostile path as text
    assert "load failed" in panel.error
    for value in _html_of(panel):
        assert "<img" not in value and "<script" not in value, value[:300]
    assert "&lt;img src=x" in panel.message.value  # the path named as text in the message
    assert re.fullmatch(
        r'<a download="[\w-]+\.md" href="data:text/markdown;base64,[\w+/=]+">[^<>]*</a>',
        panel.export_link.value,
    )
    panel.figure.canvas.draw()  # a label `$\frac{` must not make the figure raise
    ticks = [t.get_text() for t in panel.axes.get_xticklabels()]
    assert "\\$\\frac{" in ticks  # shown as typed: the dollar escaped, never parsed as mathtext


def test_panel_messages_escape_what_the_user_typed():
    panel = dk.widgets.BudgetBuilder()
    panel.set(lines=[{"label": "<script>x</script>", "formula": "bielliptic", "params": {"rb": 1.0}}])
    assert "<script>" in panel.error  # the message names the line as typed ...
    assert "<script>" not in panel.message.value  # ... and shows it as text
    assert "&lt;script&gt;" in panel.message.value


# ---------------------------------------------------------------------- closing frees everything
@pytest.mark.parametrize("mode", ["static", "live"])
@pytest.mark.parametrize("panel_name", [*PANEL_NAMES, "FormulaSheet"])
@pytest.mark.filterwarnings("ignore:Passing unrecognized arguments:DeprecationWarning")  # ipympl's toolbar
def test_close_releases_the_figure_and_every_widget(panel_name, mode, monkeypatch):
    if mode == "live":
        pytest.importorskip("ipympl")
    if panel_name == "FormulaSheet":
        pytest.importorskip("sympy")
    monkeypatch.setenv("DELTAKIT_FIGURES", mode)
    panel = getattr(dk.widgets, panel_name)()
    held = [weakref.ref(w) for w in _widgets_under(panel)]
    if panel.figure is not None:
        held.append(weakref.ref(panel.figure))
        panel.set(**{numeric_controls(panel)[0]: panel.values[numeric_controls(panel)[0]]})
    assert len(held) > 20
    panel.close()
    del panel
    gc.collect()
    alive = [ref() for ref in held if ref() is not None]
    # nothing alive also means nothing left in ipywidgets' registry of open widgets, which holds them
    assert alive == [], f"{len(alive)} objects outlive the closed panel, e.g. {type(alive[0]).__name__}"


def test_closed_panel_ignores_a_second_close():
    panel = dk.widgets.EscapeFlyby()
    panel.close()
    panel.close()


# ---------------------------------------------------------------------- many updates
def test_memory_levels_off_over_500_rapid_updates():
    panel = dk.widgets.BurnPointExplorer()
    nu = panel.controls["nu"]
    dv = panel.controls["dv"]

    def hammer(count):
        for i in range(count):
            nu.value = -180.0 + (i * 7) % 360
            if i % 25 == 0:
                dv.value = 100.0 + 5.0 * (i % 50)

    hammer(100)  # caches (text layout, fonts) fill up first
    gc.collect()
    tracemalloc.start()
    try:
        hammer(200)
        gc.collect()
        middle = tracemalloc.get_traced_memory()[0]
        hammer(300)
        gc.collect()
        end = tracemalloc.get_traced_memory()[0]
    finally:
        tracemalloc.stop()
    assert panel.error == ""
    assert end - middle < 512 * 1024, f"memory grew by {(end - middle) / 1024:.0f} KiB over 300 more updates"


def test_every_slider_end_to_end_without_warnings_or_surprises():
    """Each slider swept over its whole range: no RuntimeWarning, no unexpected error."""
    for name in SLIDER_PANELS:
        panel = getattr(dk.widgets, name)()
        if name == "BurnPointExplorer":
            panel.set(direction="any angle from prograde")
        for key, widget in panel.controls.items():
            if not isinstance(widget, widgets.FloatSlider):
                continue
            with warnings.catch_warnings():
                warnings.simplefilter("error")
                for shown in np.linspace(widget.min, widget.max, 41):
                    widget.value = float(shown)
                    assert not panel.error.startswith("unexpected"), f"{name}.{key} = {shown}: {panel.error}"
