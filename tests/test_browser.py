"""The panels in a real browser: JupyterLab + headless Chromium via Playwright.

One JupyterLab server and one browser serve the whole module (about a minute in
all). A notebook written to a temporary folder shows a plain ipywidgets slider
(to prove the browser set-up itself: widget and ipympl front-ends loaded) and
then each of the six panels with its defaults. The test runs it through the Run
menu, then per panel moves the first slider one step with the keyboard (or picks
the next entry of the first drop-down when a panel has no slider), waits for the
readouts to show exactly what the same panel shows in this process after
``.set()`` to the same value, and checks that the figure redrew by comparing
canvas screenshots before and after. Screenshots of every panel land in the
artefact folder for a person to look at.

Without /usr/bin/chromium (or the browser named by ``DELTAKIT_CHROMIUM``) or
Playwright the tests skip, unless ``DELTAKIT_REQUIRE_BROWSER=1`` (set by CI), where
they fail. Playwright never downloads a browser here: it drives Debian's Chromium.
"""

from __future__ import annotations

import html
import json
import re
import time
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from _jupyterlab import chromium, get, jupyterlab, require_browser

from deltakit.widgets import PANELS as REGISTERED

pytestmark = [pytest.mark.browser, pytest.mark.slow]


#: The panels the notebook shows, in order (DESIGN.md, "Widgets and plots"): every registered panel.
PANELS = list(REGISTERED)

#: Lab extensions the kernel's widgets need in the browser.
NEEDED_EXTENSIONS = ("@jupyter-widgets/jupyterlab-manager", "jupyter-matplotlib")

# --------------------------------------------------------------------------- the notebook

SMOKE_CELL = """\
# Browser set-up check: a plain slider, a readout and an ipympl figure.
%matplotlib widget
import ipywidgets as widgets
import matplotlib.pyplot as plt

smoke_slider = widgets.FloatSlider(value=1.0, min=0.0, max=5.0, step=0.1, description="dv (km/s)")
smoke_readout = widgets.HTML()
smoke_readout.add_class("deltakit-readout")
with plt.ioff():
    smoke_fig, smoke_ax = plt.subplots(figsize=(4, 2.5))
(smoke_line,) = smoke_ax.plot([0, 1], [0, 1.0])
smoke_ax.set_ylim(0, 5)
smoke_ax.set_xlabel("x (-)")
smoke_ax.set_ylabel("dv (km/s)")

def _smoke_update(change=None):
    smoke_readout.value = f"twice: <b>{2 * smoke_slider.value:.1f}</b> km/s"
    smoke_line.set_ydata([0, smoke_slider.value])
    smoke_fig.canvas.draw_idle()

smoke_slider.observe(_smoke_update, names="value")
_smoke_update()
smoke_box = widgets.VBox([smoke_slider, smoke_readout, smoke_fig.canvas])
smoke_box.add_class("bt-smoke")
smoke_box
"""


#: A propellant trade given an exhaust velocity: the specific-impulse box follows it.
MIRROR_CELL = """\
from deltakit.widgets import PropellantTrade
mirror = PropellantTrade(exhaust_velocity=3200.0)
mirror.add_class("bt-mirror")
mirror
"""


def _panel_cell(name: str) -> str:
    return (
        f"from deltakit.widgets import {name}\n"
        f"panel_{name} = {name}()\n"
        f"panel_{name}.add_class('bt-{name}')\n"
        f"panel_{name}\n"
    )


def _write_notebook(folder: Path) -> Path:
    import nbformat

    cells = [nbformat.v4.new_markdown_cell("# Browser test: every panel with its defaults")]
    cells.append(nbformat.v4.new_code_cell(SMOKE_CELL))
    cells += [nbformat.v4.new_code_cell(_panel_cell(name)) for name in PANELS]
    cells.append(nbformat.v4.new_code_cell(MIRROR_CELL))
    nb = nbformat.v4.new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3 (ipykernel)",
        "language": "python",
    }
    path = folder / "panels.ipynb"
    nbformat.write(nb, path)
    return path


# --------------------------------------------------------------------------- the server


@pytest.fixture(scope="module")
def lab(tmp_path_factory: pytest.TempPathFactory) -> Iterator[dict[str, Any]]:
    require_browser()
    root = tmp_path_factory.mktemp("lab-root")
    _write_notebook(root)
    with jupyterlab(root, tmp_path_factory.mktemp("lab-home")) as server:
        yield server


def test_widget_extensions_are_found(lab: dict[str, Any]) -> None:
    """With temporary config and data folders, the page still loads the .venv's extensions."""
    page = get(f"{lab['base']}/lab?token={lab['token']}").decode()
    match = re.search(
        r'<script id="jupyter-config-data" type="application/json">(.*?)</script>', page, re.DOTALL
    )
    assert match, "JupyterLab page carries no jupyter-config-data"
    config = json.loads(match.group(1))
    names = {ext["name"] for ext in config.get("federated_extensions", [])}
    missing = [name for name in NEEDED_EXTENSIONS if name not in names]
    assert not missing, f"lab extensions not found: {missing}; found {sorted(names)}"


# --------------------------------------------------------------------------- the browser


@pytest.fixture(scope="module")
def notebook_page(
    lab: dict[str, Any], tmp_path_factory: pytest.TempPathFactory, artifacts: Path
) -> Iterator[Any]:
    with chromium(tmp_path_factory.mktemp("chromium-profile")) as page:
        try:
            _open_and_run(page, lab)
        except Exception:  # any failure: keep a picture, then re-raise
            page.screenshot(path=str(artifacts / "browser-failed-start.png"), full_page=True)
            raise
        yield page


def _open_and_run(page: Any, lab: dict[str, Any]) -> None:
    page.goto(f"{lab['base']}/lab/tree/panels.ipynb?token={lab['token']}")
    page.wait_for_selector(".jp-Notebook", state="visible")
    # The execution indicator may read idle before the kernel connects; the
    # status bar names the kernel's state only once it is connected.
    page.locator(".jp-StatusBar-Widget", has_text=re.compile(r"\|\s*Idle")).first.wait_for(timeout=60_000)
    _wait_idle(page)
    _run_all(page)
    page.wait_for_selector(".bt-smoke", state="visible", timeout=60_000)
    _wait_all_executed(page)
    _wait_idle(page)
    page.wait_for_timeout(1000)  # first ipympl frames


def _prompts(page: Any) -> list[str]:
    """The execution prompts of the notebook's code cells: "[ ]:", "[*]:" or "[7]:"."""
    return page.locator(".jp-CodeCell .jp-InputArea-prompt").evaluate_all(
        "els => els.map(e => e.textContent)"
    )


def _run_all(page: Any, attempts: int = 3, wait_s: float = 15.0) -> None:
    """Run every cell from the Run menu, again if the first request was dropped.

    JupyterLab may drop a run-all sent just after the kernel first shows idle
    (the session is still settling): no cell then gets a "[*]" or a number.
    """
    for _attempt in range(1, attempts + 1):
        page.locator(".lm-MenuBar-item", has_text="Run").first.click()
        page.locator("[data-command='runmenu:run-all']").click()
        deadline = time.monotonic() + wait_s
        while time.monotonic() < deadline:
            if any(re.search(r"\[(\*|\d+)\]", p) for p in _prompts(page)):
                return
            page.wait_for_timeout(250)
    raise AssertionError(f"run-all started no cell after {attempts} tries; prompts: {_prompts(page)}")


def _wait_all_executed(page: Any, timeout_s: float = 120.0) -> None:
    """Wait until every code cell shows an execution count (none still queued or running)."""
    deadline = time.monotonic() + timeout_s
    while True:
        prompts = _prompts(page)
        if prompts and all(re.search(r"\[\d+\]", p) for p in prompts):
            return
        if time.monotonic() > deadline:
            raise AssertionError(f"cells still waiting after {timeout_s:.0f} s: {prompts}")
        page.wait_for_timeout(250)


def _wait_idle(page: Any) -> None:
    page.wait_for_selector(".jp-Notebook-ExecutionIndicator[data-status='idle']", timeout=120_000)


def _compact(text: str) -> str:
    return re.sub(r"\s+", "", text)


def _figure_locator(box: Any) -> Any:
    """The element that shows the panel's figure: an ipympl canvas or a static image."""
    canvas = box.locator(".jupyter-matplotlib-canvas-div canvas")
    if canvas.count():
        return canvas.first
    return box.locator(".jupyter-matplotlib-figure, .widget-output img, img").first


def _readout_texts(box: Any) -> list[str]:
    return [
        _compact(t)
        for t in box.locator(".deltakit-readout").evaluate_all("els => els.map(e => e.textContent)")
    ]


def _wait_readouts(page: Any, box: Any, expected: list[str], timeout_s: float = 20.0) -> list[str]:
    """Wait until every expected readout text appears in the readouts, in order."""
    deadline = time.monotonic() + timeout_s
    while True:
        seen = _readout_texts(box)
        if len(seen) == len(expected) and all(e in s for e, s in zip(expected, seen)):
            return seen
        if time.monotonic() > deadline:
            return seen
        page.wait_for_timeout(200)


def _wait_redrawn(page: Any, figure: Any, before: bytes, timeout_s: float = 10.0) -> bytes:
    deadline = time.monotonic() + timeout_s
    while True:
        after = figure.screenshot()
        if after != before or time.monotonic() > deadline:
            return after
        page.wait_for_timeout(250)


def test_plain_slider_moves_and_redraws(notebook_page: Any, artifacts: Path) -> None:
    """The set-up itself works: keyboard moves a slider, the kernel answers, ipympl redraws."""
    page = notebook_page
    box = page.locator(".bt-smoke").first
    box.scroll_into_view_if_needed()
    assert _wait_readouts(page, box, [_compact("twice: 2.0 km/s")]) == [_compact("twice: 2.0 km/s")]
    figure = _figure_locator(box)
    assert figure.count(), "the ipympl canvas did not render (jupyter-matplotlib front-end missing?)"
    before = figure.screenshot()
    box.screenshot(path=str(artifacts / "browser-smoke-before.png"))
    box.locator(".widget-slider .noUi-handle").first.focus()
    page.keyboard.press("ArrowRight")
    seen = _wait_readouts(page, box, [_compact("twice: 2.2 km/s")])
    assert seen == [_compact("twice: 2.2 km/s")], f"readout after one step right: {seen}"
    after = _wait_redrawn(page, figure, before)
    box.screenshot(path=str(artifacts / "browser-smoke-after.png"))
    assert after != before, "the figure did not redraw after the slider moved"


# --------------------------------------------------------------------------- the panels


def _walk(widget: Any) -> Iterator[Any]:
    yield widget
    for child in getattr(widget, "children", ()):
        yield from _walk(child)


def _html_text(value: str) -> str:
    return _compact(html.unescape(re.sub(r"<[^>]*>", "", str(value))))


def _readouts(panel: Any) -> list[str]:
    return [_html_text(w.value) for w in _walk(panel) if "deltakit-readout" in getattr(w, "_dom_classes", ())]


def _check_slider_values(box: Any, panel: Any, name: str) -> None:
    """Each slider shows the value the panel holds: the front-end did not move it on display.

    noUiSlider snaps a value off the grid ``min + k * step`` to the grid and
    sends the snapped value back to the kernel, so a panel whose value is off
    the grid changes its own input as soon as it is shown.
    """
    import ipywidgets as widgets

    sliders = [w for w in _walk(panel) if isinstance(w, (widgets.FloatSlider, widgets.IntSlider))]
    shown = box.locator(".widget-slider .widget-readout").evaluate_all(
        "els => els.map(e => e.textContent || e.value || '')"
    )
    for slider, text in zip(sliders, shown):
        try:  # d3 and Python agree on the plain formats panels use (".1f", "d", ",.0f")
            expected = format(slider.value, getattr(slider, "readout_format", "d") or "d")
        except ValueError:
            continue
        assert text.strip() == expected, (
            f"{name}: slider {slider.description!r} holds {slider.value!r} "
            f"(shown as {expected}) but the browser "
            f"shows {text.strip()}: the value is off the slider's step grid "
            f"(min={slider.min}, step={slider.step}), so the front-end snaps it and changes the panel's input"
        )


def _first_difference(expected: list[str], seen: list[str]) -> str:
    if len(expected) != len(seen):
        return f"{len(seen)} readouts, expected {len(expected)}: {seen}"
    for e, s in zip(expected, seen):
        if e not in s:
            at = next((i for i, (a, b) in enumerate(zip(e, s)) if a != b), min(len(e), len(s)))
            return (
                f"expected ...{e[max(0, at - 40) : at + 60]}... but saw ...{s[max(0, at - 40) : at + 60]}..."
            )
    return "none"


def _plan_move(panel: Any) -> tuple[str, int, Any, Any]:
    """Choose the control the browser will move and the value it will then have.

    Returns (kind, index, widget, new value): kind is "slider" (the index-th
    slider of the panel in page order, moved one step right with the keyboard)
    or "dropdown" (the index-th drop-down, set to its next option) or "number"
    (the index-th number box, typed 10 % larger and entered). The control is the
    first slider among the panel's ``.controls`` that is not at its right end,
    else the first drop-down among them, else the first non-zero number box.
    """
    import ipywidgets as widgets

    controls = {id(w) for w in panel.controls.values()}
    sliders = [w for w in _walk(panel) if isinstance(w, (widgets.FloatSlider, widgets.IntSlider))]
    for index, w in enumerate(sliders):
        if id(w) in controls and not w.disabled and w.value + w.step <= w.max:
            return "slider", index, w, w.value + w.step
    dropdowns = [w for w in _walk(panel) if isinstance(w, widgets.Dropdown)]
    for index, w in enumerate(dropdowns):
        if id(w) in controls and len(w.options) > 1 and not w.disabled:
            labels = list(w._options_labels)
            following = (labels.index(w.label) + 1) % len(labels)
            return "dropdown", index, w, (labels[following], w._options_values[following])
    numbers = [w for w in _walk(panel) if isinstance(w, (widgets.FloatText, widgets.BoundedFloatText))]
    for index, w in enumerate(numbers):
        if id(w) in controls and not w.disabled and w.value:
            return "number", index, w, round(w.value * 1.1, 1)
    raise AssertionError(f"{type(panel).__name__} has no slider, drop-down or number box among its controls")


@pytest.mark.parametrize("name", PANELS)
def test_panel_answers_keyboard_and_redraws(notebook_page: Any, artifacts: Path, name: str) -> None:
    """Move the panel's first control in the browser; readouts and figure follow."""
    import matplotlib

    matplotlib.use("Agg")
    from deltakit import widgets as panels

    reference = getattr(panels, name)()  # the same panel, headless, in this process
    start = _readouts(reference)
    kind, index, control, new = _plan_move(reference)
    assert start, f"{name} shows no element with CSS class deltakit-readout"

    page = notebook_page
    box = page.locator(f".bt-{name}").first
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    try:
        box.wait_for(state="visible", timeout=30_000)
    except PlaywrightTimeout:
        errors = page.locator(".jp-OutputArea-output[data-mime-type='application/vnd.jupyter.stderr']")
        texts = errors.evaluate_all("els => els.map(e => e.textContent)")
        pytest.fail(f"{name} did not appear in the browser; error outputs in the notebook: {texts}")
    box.scroll_into_view_if_needed()
    page.wait_for_timeout(500)  # first ipympl frame of this panel
    seen = _wait_readouts(page, box, start)
    box.screenshot(path=str(artifacts / f"browser-{name}-before.png"))
    _check_slider_values(box, reference, name)
    assert len(seen) == len(start) and all(e in s for e, s in zip(start, seen)), (
        f"{name}: browser readouts differ from the headless panel's: {_first_difference(start, seen)}"
    )
    has_figure = getattr(reference, "figure", None) is not None
    figure = _figure_locator(box) if has_figure else None
    if has_figure:
        assert figure.count(), f"{name}: its figure did not render in the browser"
        before = figure.screenshot()

    # The headless twin gets the same widget value the browser will send.
    if kind == "slider":
        control.value = new
        box.locator(".widget-slider .noUi-handle").nth(index).focus()
        page.keyboard.press("ArrowRight")
    elif kind == "dropdown":
        label, value = new
        control.value = value
        box.locator(".widget-dropdown select").nth(index).select_option(label=str(label))
    else:
        control.value = new
        field = box.locator(".widget-text input[type='number']").nth(index)
        field.fill(repr(new))
        field.press("Enter")
    control = control.description or type(control).__name__
    expected = _readouts(reference)
    assert expected != start, f"{name}: moving {control!r} changes no readout even headless"
    seen = _wait_readouts(page, box, expected)
    assert all(e in s for e, s in zip(expected, seen)) and len(seen) == len(expected), (
        f"{name}: after moving {control!r} to {new!r}: {_first_difference(expected, seen)}"
    )
    if has_figure:
        after = _wait_redrawn(page, figure, before)
        assert after != before, f"{name}: the figure did not redraw after {control!r} moved"
    box.screenshot(path=str(artifacts / f"browser-{name}-after.png"))
    page.screenshot(path=str(artifacts / f"browser-{name}-page.png"))  # the panel in its notebook


_EXTENT_JS = """
e => {
  const area = (e.closest('.jp-OutputArea-output') || e.parentElement).getBoundingClientRect();
  let left = Infinity, right = -Infinity, widest = '';
  for (const el of [e, ...e.querySelectorAll('*')]) {
    const r = el.getBoundingClientRect();
    if (!r.width || !r.height) continue;
    left = Math.min(left, r.left);
    if (r.right > right) {
      right = r.right;
      widest = el.className && el.className.baseVal === undefined ? String(el.className) : el.tagName;
    }
  }
  const cut = [];
  for (const el of e.querySelectorAll('.widget-label, input, .widget-readout')) {
    if (el.offsetParent !== null && el.scrollWidth > el.clientWidth + 1) {
      cut.push((el.value !== undefined && el.tagName === 'INPUT') ? el.value : el.textContent);
    }
  }
  return {areaLeft: area.left, areaRight: area.right, left, right, widest, cut};
}
"""


@pytest.mark.parametrize("name", PANELS)
def test_panel_fits_notebook_width(notebook_page: Any, name: str) -> None:
    """Nothing of the panel sticks out of its output area in a 1280 px window with the file browser open."""
    box = notebook_page.locator(f".bt-{name}").first
    box.wait_for(state="visible", timeout=30_000)
    deadline = time.monotonic() + 5.0  # a live canvas may settle its size after the first frame
    while True:
        extent = box.evaluate(_EXTENT_JS)
        fits = extent["left"] >= extent["areaLeft"] - 4 and extent["right"] <= extent["areaRight"] + 4
        if (fits and not extent["cut"]) or time.monotonic() > deadline:
            break
        notebook_page.wait_for_timeout(250)
    width = extent["areaRight"] - extent["areaLeft"]
    assert fits, (
        f"{name} spans {extent['left']:.0f}..{extent['right']:.0f} px but its output area is "
        f"{extent['areaLeft']:.0f}..{extent['areaRight']:.0f} px "
        f"({width:.0f} px wide); the widest element is "
        f"{extent['widest']!r}: it is clipped at notebook width"
    )
    assert not extent["cut"], (
        f"{name}: text cut off in its box (label, input or slider readout): {extent['cut']}"
    )


_OVERLAP_JS = """
e => {
  const canvas = e.querySelector('.jupyter-matplotlib-canvas-div');
  if (!canvas) return {canvas: false, bars: []};
  const c = canvas.getBoundingClientRect();
  const shown = b => {
    const s = getComputedStyle(b);
    return s.visibility !== 'hidden' && s.display !== 'none' && Number(s.opacity) > 0;
  };
  const bars = [...e.querySelectorAll('.jupyter-matplotlib-toolbar')].filter(shown).map(b => {
    const r = b.getBoundingClientRect();
    const overlap = Math.max(0, Math.min(r.right, c.right) - Math.max(r.left, c.left)) *
                    Math.max(0, Math.min(r.bottom, c.bottom) - Math.max(r.top, c.top));
    return {overlap, left: r.left, top: r.top, canvasLeft: c.left, canvasTop: c.top};
  });
  return {canvas: true, bars};
}
"""


@pytest.mark.parametrize(
    "name",
    [
        "BurnPointExplorer",
        "PropellantTrade",
        "TransferTrade",
        "EscapeFlyby",
        "BudgetBuilder",
        "DispersionView",
    ],
)
def test_figure_toolbar_never_covers_the_figure(notebook_page: Any, artifacts: Path, name: str) -> None:
    """With the pointer over a live figure no toolbar shows over its axis labels, ticks, titles or legends."""
    page = notebook_page
    box = page.locator(f".bt-{name}").first
    box.wait_for(state="visible", timeout=30_000)
    figure = _figure_locator(box)
    figure.scroll_into_view_if_needed()
    area = figure.bounding_box()  # ipympl stacks two canvases: point the mouse rather than hover one of them
    page.mouse.move(area["x"] + area["width"] / 2, area["y"] + area["height"] / 2)
    page.wait_for_timeout(800)  # a fade-in toolbar would be fully shown by now
    found = box.evaluate(_OVERLAP_JS)
    box.screenshot(path=str(artifacts / f"browser-{name}-hover.png"))
    assert found["canvas"], f"{name}: no live ipympl figure found"
    assert all(b["overlap"] == 0 for b in found["bars"]), (
        f"{name}: a figure toolbar lies over the figure: {found}"
    )


def test_a_box_that_follows_shows_sensible_digits(notebook_page: Any) -> None:
    """3200 m/s / 9.80665 m/s^2 = 326.309188... s: the box that follows shows 326.31, not 16 digits."""
    box = notebook_page.locator(".bt-mirror").first
    box.wait_for(state="visible", timeout=30_000)
    isp = box.locator(".deltakit-control-isp input").first
    deadline = time.monotonic() + 10.0
    while isp.input_value() != "326.31" and time.monotonic() < deadline:
        notebook_page.wait_for_timeout(200)
    assert isp.input_value() == "326.31"
    assert isp.is_disabled()  # it follows the exhaust velocity the analyst gave
