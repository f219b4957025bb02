"""Panel pictures: the fast paths show exactly what a full redraw shows.

Slider steps redraw only the artists that move (blitting) and axis limits
keep headroom, so most steps skip the full figure draw; pictures are sent as
PNG from a fast encoder, and the live canvas sends only the pixels that
changed. Each shortcut is checked here against the long way round: decoded
pictures equal the canvas, blitted pictures equal a full redraw, composed diff
frames equal the figure. Speed itself is measured in benchmarks/bench_widgets.py.

Panels also leave the notebook's matplotlib alone: its backend and rcParams,
in this process and in a real kernel (nbclient).
"""

from __future__ import annotations

import io
import json
import subprocess
import sys
import textwrap
import zlib

import ipywidgets as widgets
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from PIL import Image

import deltakit as dk
from deltakit.widgets._png import FrameEncoder, encode_png

SLIDER_PANELS = [name for name in dk.widgets.PANELS if name not in ("BudgetBuilder", "FormulaSheet")]


def decode(data: bytes) -> np.ndarray:
    return np.asarray(Image.open(io.BytesIO(data)).convert("RGBA"))


def sliders(panel):
    return {name: w for name, w in panel.controls.items() if isinstance(w, widgets.FloatSlider)}


def every_slider():
    """(panel name, slider name, set-up) for every slider of every panel, the angle slider enabled."""
    cases = []
    for name in SLIDER_PANELS:
        panel = getattr(dk.widgets, name)()
        for slider in sliders(panel):
            setup = {"direction": "any angle from prograde"} if slider == "angle" else {}
            cases.append((name, slider, setup))
        panel.close()
    return cases


SLIDERS = every_slider()


# ---------------------------------------------------------------------- the encoder
@given(arrays(np.uint8, st.tuples(st.integers(1, 40), st.integers(1, 40), st.sampled_from([3, 4]))))
def test_png_decodes_to_the_same_pixels(pixels):
    back = np.asarray(Image.open(io.BytesIO(encode_png(pixels))))
    if pixels.shape[2] == 4 and (pixels[..., 3] == 255).all():
        pixels = pixels[..., :3]  # an opaque picture is sent as RGB
    np.testing.assert_array_equal(back, pixels)


@given(
    st.integers(1, 50),
    st.integers(1, 30),
    st.sampled_from([3, 4]),
    st.integers(1, 9),
    st.lists(st.tuples(st.integers(0, 49), st.integers(0, 29), st.integers(0, 255)), max_size=6),
    st.integers(0, 2**32 - 1),
)
def test_frames_reusing_unchanged_bands_decode_to_each_frame(height, width, channels, band, edits, seed):
    # a sequence of frames through one FrameEncoder: each PNG must decode to its own frame, and
    # only the bands holding an edited pixel are deflated again (the zlib stream is checked by
    # Pillow's decoder, its Adler-32 included)
    rng = np.random.default_rng(seed)
    pixels = rng.integers(0, 4, (height, width, channels), dtype=np.uint8)
    if channels == 4:
        pixels[..., 3] = 255 if seed % 2 else rng.integers(0, 256, (height, width), dtype=np.uint8)
    frames = FrameEncoder(band=band)
    touched: set[int] | None = None  # rows edited since the last frame; None: a first frame
    for _ in range(3):
        expected = pixels[..., :3] if channels == 4 and (pixels[..., 3] == 255).all() else pixels
        np.testing.assert_array_equal(np.asarray(Image.open(io.BytesIO(frames.encode(pixels)))), expected)
        bands = -(-height // band) if touched is None else len({r // band for r in touched})
        assert frames.deflated_bands == bands
        before = pixels.copy()
        for r, c, value in edits:
            if r < height and c < width:
                pixels[r, c, 0] = value
        touched = set(np.flatnonzero((pixels != before).any(axis=(1, 2))).tolist())  # rows that differ


@given(st.binary(max_size=300), st.binary(max_size=300), st.integers(0, 300))
def test_checksums_of_bands_join_as_the_checksum_of_the_rows(first, second, repeat):
    # zlib's own Adler-32 of the joined bytes is the reference (RFC 1950); long strings (over
    # 65521 bytes, the modulus) come from repeating the second part
    from deltakit.widgets._png import _adler32_combine

    second = second * repeat
    joined = _adler32_combine(zlib.adler32(first), zlib.adler32(second), len(second))
    assert joined == zlib.adler32(first + second)


def test_frames_that_turn_transparent_and_back_keep_their_alpha_right():
    frames = FrameEncoder(band=3)
    pixels = np.full((7, 5, 4), 255, np.uint8)
    for alpha in (255, 40, 255):
        pixels[2, 1, 3] = alpha
        back = np.asarray(Image.open(io.BytesIO(frames.encode(pixels))))
        expected = pixels[..., :3] if alpha == 255 else pixels  # opaque frames are sent as RGB
        np.testing.assert_array_equal(back, expected)
        assert frames.deflated_bands == 3  # the channels changed: every band again


def test_frames_of_a_new_size_start_again():
    frames = FrameEncoder(band=4)
    frames.encode(np.zeros((8, 5, 3), np.uint8))
    bigger = np.full((12, 5, 3), 7, np.uint8)
    assert decode(frames.encode(bigger))[..., :3].tolist() == bigger.tolist()
    assert frames.deflated_bands == 3


def test_png_of_a_panel_is_its_canvas(explorer_static):
    canvas = explorer_static.figure.canvas
    np.testing.assert_array_equal(decode(explorer_static.view.widget.value), np.asarray(canvas.buffer_rgba()))
    with pytest.raises(ValueError, match="`pixels`"):
        encode_png(np.zeros((4, 4), np.uint8))


@pytest.fixture
def explorer_static(monkeypatch):
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    return dk.widgets.BurnPointExplorer()


# ---------------------------------------------------------------------- blitting
@pytest.mark.parametrize("panel_name, slider, setup", SLIDERS, ids=[f"{p}-{s}" for p, s, _ in SLIDERS])
def test_blitted_picture_equals_a_full_redraw(panel_name, slider, setup, monkeypatch):
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    panel = getattr(dk.widgets, panel_name)(**setup)
    widget = panel.controls[slider]
    draws = panel.view.full_draws
    blitted = 0
    for k in range(1, 6):
        widget.value = (
            min(widget.value + widget.step, widget.max)
            if k % 2
            else max(widget.value - 2 * widget.step, widget.min)
        )
        assert panel.error == ""
        if panel.view.full_draws == draws:
            blitted += 1
            picture = decode(panel.view.widget.value)
            panel.view.invalidate()
            panel.view.refresh()  # the long way round: everything drawn again
            np.testing.assert_array_equal(picture, decode(panel.view.widget.value))
        draws = panel.view.full_draws
    assert blitted >= 3, f"{panel_name}.{slider}: most small steps should blit, {blitted} of 5 did"


def test_a_new_orbit_moves_the_axes_and_a_step_does_not(explorer_static):
    view = explorer_static.view
    draws = view.full_draws, view.cell_draws
    explorer_static.set(nu=0.5)  # a burn-point step: blit only
    explorer_static.set(nu=0.6)
    assert (view.full_draws, view.cell_draws) == draws
    limits = explorer_static.orbit_axes.get_xlim()
    explorer_static.set(body="Earth", periapsis_altitude=600e3, apoapsis_altitude=900e3)  # a new orbit
    assert explorer_static.orbit_axes.get_xlim() != limits
    assert view.full_draws + view.cell_draws > sum(draws)  # its axes drawn again (cells or all)
    picture = decode(view.widget.value)
    view.invalidate()
    view.refresh()
    np.testing.assert_array_equal(picture, decode(view.widget.value))


@pytest.mark.parametrize("panel_name, slider, setup", SLIDERS, ids=[f"{p}-{s}" for p, s, _ in SLIDERS])
def test_slider_sweeps_seldom_redraw_the_whole_figure(panel_name, slider, setup, monkeypatch):
    """Axis limits keep headroom: sweeping a slider end to end redraws the axes a few times, not per step."""
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    panel = getattr(dk.widgets, panel_name)(**setup)
    widget = panel.controls[slider]
    count = round((widget.max - widget.min) / widget.step)
    stride = max(1, count // 120)
    start = round((widget.value - widget.min) / widget.step)
    # from the default to the right end, to the left end, and back: as a hand on the keyboard would
    path = [*range(start, count + 1, stride), *range(count, -1, -stride), *range(0, start + 1, stride)]
    draws = panel.view.full_draws + panel.view.cell_draws
    for k in path:
        widget.value = widget.min + k * widget.step
    redrawn = panel.view.full_draws + panel.view.cell_draws - draws
    assert redrawn <= 0.08 * len(path), (
        f"{panel_name}.{slider}: axes redrawn {redrawn} times in {len(path)} steps"
    )


# ---------------------------------------------------------------------- the live canvas
@pytest.mark.filterwarnings("ignore:Passing unrecognized arguments:DeprecationWarning")  # ipympl's toolbar
def test_live_canvas_frames_compose_to_the_figure(monkeypatch):
    pytest.importorskip("ipympl")
    monkeypatch.setenv("DELTAKIT_FIGURES", "live")
    panel = dk.widgets.BurnPointExplorer()
    canvas = panel.view.widget
    assert type(canvas).__name__ == "LiveCanvas" and canvas in panel.children
    assert canvas.toolbar_visible is False  # ipympl lays a visible toolbar over the figure
    frames = []
    monkeypatch.setattr(
        canvas,
        "send",
        lambda content, buffers=None: frames.append((canvas._image_mode, buffers[0])) if buffers else None,
    )
    canvas._handle_message(canvas, {"type": "initialized"}, [])  # a browser shows the canvas
    canvas._handle_message(canvas, {"type": "draw"}, [])  # and asks for its first frame
    assert canvas.shown and frames and frames[0][0] == "full"
    panel.set(nu=0.7)
    panel.set(nu=0.8)
    panel.set(periapsis_altitude=500e3)  # a full redraw, sent at once (no round trip)
    panel.set(dv=120.0)
    picture = None
    for mode, data in frames:
        frame = decode(data)
        picture = (
            frame if mode == "full" or picture is None else np.where(frame[..., 3:] == 255, frame, picture)
        )
    assert [mode for mode, _ in frames].count("diff") >= 3  # slider steps send only what changed
    np.testing.assert_array_equal(picture, np.asarray(canvas.get_renderer().buffer_rgba()))
    static = dk.widgets.BurnPointExplorer(periapsis_altitude=500e3, dv=120.0, nu=0.8)
    assert json.dumps(panel.export()) == json.dumps(static.export())


# ---------------------------------------------------------------------- the notebook's matplotlib
_IN_PROCESS = textwrap.dedent(
    """
    import os
    os.environ["DELTAKIT_FIGURES"] = "live"
    import matplotlib
    matplotlib.use("agg")
    import matplotlib.pyplot as plt
    matplotlib.rcParams["lines.linewidth"] = 3.25  # the analyst's own style
    before = (matplotlib.get_backend(), matplotlib.rcParams.copy())
    from deltakit.widgets import BurnPointExplorer, TransferTrade
    panels = [BurnPointExplorer(), TransferTrade()]
    panels[0].set(nu=1.0)
    assert type(panels[0].view.widget).__name__ == "LiveCanvas"
    after = (matplotlib.get_backend(), matplotlib.rcParams.copy())
    assert before[0] == after[0] == "agg", (before[0], after[0])
    assert dict(before[1]) == dict(after[1]), {k for k in before[1] if before[1][k] != after[1][k]}
    fig, ax = plt.subplots()
    assert type(fig.canvas).__module__.startswith("matplotlib.backends.backend_agg"), type(fig.canvas)
    print("kept")
    """
)


def test_panels_leave_the_backend_and_rcparams_alone():
    pytest.importorskip("ipympl")
    done = subprocess.run([sys.executable, "-c", _IN_PROCESS], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0 and done.stdout.strip() == "kept", done.stderr[-2000:]


@pytest.mark.slow
def test_panels_leave_a_kernels_inline_figures_alone(tmp_path):
    """In a real kernel a panel is live, and the analyst's next plt figure is still an inline picture."""
    nbformat = pytest.importorskip("nbformat")
    nbclient = pytest.importorskip("nbclient")
    pytest.importorskip("ipympl")
    cells = [
        "%matplotlib inline\nimport matplotlib\nimport matplotlib.pyplot as plt\n"
        "before = (matplotlib.get_backend(), matplotlib.rcParams.copy())",
        "from deltakit.widgets import BurnPointExplorer\npanel = BurnPointExplorer()\npanel",
        "after = (matplotlib.get_backend(), matplotlib.rcParams.copy())\n"
        "assert type(panel.view.widget).__name__ == 'LiveCanvas'\n"
        "assert before[0] == after[0], (before[0], after[0])\n"
        "assert dict(before[1]) == dict(after[1])\n"
        "print(after[0])",
        "fig, ax = plt.subplots()\nax.plot([0, 1], [0, 1])\nplt.show()",
    ]
    nb = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(c) for c in cells])
    client = nbclient.NotebookClient(
        nb, timeout=180, kernel_name="python3", resources={"metadata": {"path": str(tmp_path)}}
    )
    client.execute()
    errors = [o for c in nb.cells for o in c.outputs if o.output_type == "error"]
    assert not errors, errors
    assert "inline" in nb.cells[2].outputs[0].text
    shown = [o for o in nb.cells[3].outputs if o.output_type == "display_data"]
    assert shown and "image/png" in shown[0].data
    assert "application/vnd.jupyter.widget-view+json" not in shown[0].data  # a picture, not an ipympl widget


# ---------------------------------------------------------------------- cells
def _cell_cases():
    cases = []
    for name in SLIDER_PANELS:
        panel = getattr(dk.widgets, name)()
        cases += [(name, i) for i, ax in enumerate(panel.figure.axes) if id(ax) in panel.view._blitter.cells]
        panel.close()
    return cases


CELLS = _cell_cases()


@pytest.mark.parametrize("panel_name, index", CELLS, ids=[f"{p}-axes{i}" for p, i in CELLS])
def test_a_cell_redraw_equals_a_full_redraw(panel_name, index, monkeypatch):
    """New limits of one plot redraw only its cell: the same pixels as drawing the whole figure."""
    monkeypatch.setenv("DELTAKIT_FIGURES", "static")
    panel = getattr(dk.widgets, panel_name)()
    ax = panel.figure.axes[index]
    for get, put in ((ax.get_xlim, ax.set_xlim), (ax.get_ylim, ax.set_ylim)):
        if ax.get_xscale() == "linear" or get is ax.get_ylim:
            low, high = get()
            put(low, high + 0.37 * (high - low))  # new ticks and tick labels (both axes: equal aspect stays)
    full, cells = panel.view.full_draws, panel.view.cell_draws
    panel.view.invalidate(ax)
    panel.view.refresh()
    assert (panel.view.full_draws, panel.view.cell_draws) == (full, cells + 1)
    picture = decode(panel.view.widget.value)
    panel.view.invalidate()
    panel.view.refresh()
    np.testing.assert_array_equal(picture, decode(panel.view.widget.value))
