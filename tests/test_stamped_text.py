"""Stamped labels: drawn from a cached picture of their glyphs, they look like the text they replace.

The check is against matplotlib's own text drawing of the same label: the
ink lands within a pixel of where a plain Text puts it (the stamp's anchor
sits on a whole pixel), with the same colour, and a vector renderer gets
the real text. Blitted frames equal full redraws with stamped labels in
them (tests/test_panel_redraw.py, DispersionView).
"""

from __future__ import annotations

import io

import matplotlib
import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from deltakit.widgets._stamped import StampedText, stamped, stamped_text

#: Labels as the panels draw them: a percentile mark, a bar's share, a cause's name (right-aligned).
LABELS = [
    ("P10", {"fontsize": "small", "va": "top"}),
    ("83 %", {"fontsize": "x-small", "va": "center", "color": "#1f3b6f"}),
    ("dv: line 3 (capture)", {"fontsize": "small", "ha": "right", "va": "center"}),
]


def _picture(x: float, text: str, stamp: bool, **style) -> np.ndarray:
    fig = Figure(figsize=(3.0, 1.5), dpi=100)
    FigureCanvasAgg(fig)
    ax = fig.add_axes((0.1, 0.1, 0.8, 0.8))
    label = ax.text(x, 0.5, text, **style)
    if stamp:
        label = stamped(label)
    fig.canvas.draw()
    return np.asarray(fig.canvas.buffer_rgba()).astype(int)


def _ink(picture: np.ndarray) -> np.ndarray:
    return (picture[..., :3] < 200).any(axis=2)  # dark pixels: the glyphs (the frame excluded below)


@pytest.mark.parametrize("x", [0.3, 0.3137, 0.5521, 0.71])
@pytest.mark.parametrize("text, style", LABELS)
def test_a_stamped_label_draws_where_and_as_the_text_does(x, text, style):
    plain, stamp = _picture(x, text, False, **style), _picture(x, text, True, **style)
    inside = np.s_[20:-20, 35:-35]  # within the axes frame: only the label has ink there
    a, b = _ink(plain[inside]), _ink(stamp[inside])
    assert a.any() and b.any()
    rows_a, cols_a = np.flatnonzero(a.any(axis=1)), np.flatnonzero(a.any(axis=0))
    rows_b, cols_b = np.flatnonzero(b.any(axis=1)), np.flatnonzero(b.any(axis=0))
    for first, second in ((rows_a, rows_b), (cols_a, cols_b)):
        assert abs(first[0] - second[0]) <= 1 and abs(first[-1] - second[-1]) <= 1
    # the same ink in each colour channel: coverage moved by under a pixel keeps its sum (the
    # antialiased glyph integrates the same outline), to within hinting at the new offset
    ink_a = (255 - plain[inside][..., :3]).sum(axis=(0, 1))
    ink_b = (255 - stamp[inside][..., :3]).sum(axis=(0, 1))
    np.testing.assert_allclose(ink_b, ink_a, rtol=0.06)


@pytest.mark.parametrize("x", [0.25, 0.3, 0.625])  # anchors on whole pixels: 90, 102, 180 px from the left
@pytest.mark.parametrize("text, style", LABELS)
def test_a_label_anchored_on_a_whole_pixel_is_the_text_exactly(x, text, style):
    # the axes span 30-270 px across and 15-135 px up: these anchors land on whole pixels, where
    # the stamp must be matplotlib's own rendering of the text, pixel for pixel
    np.testing.assert_array_equal(_picture(x, text, True, **style), _picture(x, text, False, **style))


def test_a_moving_label_renders_its_glyphs_once():
    fig = Figure(figsize=(3.0, 1.5), dpi=100)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    label = stamped_text(ax, 0.2, 0.5, "P50")
    fig.canvas.draw()
    for k in range(20):
        label.set_x(0.2 + 0.013 * k)
        ax.draw_artist(label)
    assert len(label._stamps) == 1
    label.set_text("P90")
    ax.draw_artist(label)
    assert len(label._stamps) == 2


def test_vector_files_get_the_real_text():
    fig = Figure(figsize=(3.0, 1.5))
    ax = fig.add_subplot()
    label = stamped_text(ax, 0.2, 0.5, "P10 marker")
    assert isinstance(label, StampedText) and label in ax.texts
    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.fonttype": "none"}):
        fig.savefig(buffer, format="svg")
    assert "P10 marker" in buffer.getvalue()


def test_a_stamp_keeps_the_place_and_look_of_the_text_it_replaces():
    fig = Figure()
    ax = fig.add_subplot()
    text = ax.text(3.0, 4.0, "P1", ha="center", va="bottom", color="red", fontsize=13, transform=ax.transAxes)
    label = stamped(text)
    assert text not in ax.texts and label in ax.texts
    assert label.get_position() == (3.0, 4.0) and label.get_transform() is ax.transAxes
    assert (label.get_ha(), label.get_va(), label.get_color(), label.get_fontsize()) == (
        "center",
        "bottom",
        "red",
        13.0,
    )


# ---------------------------------------------------------------------- legends and tick labels
def _figure(stamp_the_legend: bool, stamp_the_ticks: bool, xlim=None, framealpha=0.8):
    from deltakit.widgets._stamped import stamp_legend, stamp_tick_labels

    fig = Figure(figsize=(4.0, 3.0), dpi=100)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.plot([0, 1], [0, 1], label="burn at periapsis")
    ax.plot([0, 1], [1, 0], "--", label="escape, then burn far away")
    ax.fill_between([0, 1], [0, 0], [1, 1], alpha=0.3, color="C2", label="the tank affords")
    legend = ax.legend(framealpha=framealpha, loc="center")
    if stamp_the_legend:
        stamp_legend(legend)
    if stamp_the_ticks:
        stamp_tick_labels(ax.xaxis)
        stamp_tick_labels(ax.yaxis)
    if xlim is not None:
        ax.set_xlim(*xlim)
    fig.canvas.draw()
    return fig, ax, legend, np.asarray(fig.canvas.buffer_rgba()).astype(int)


@pytest.mark.parametrize("framealpha", [0.8, 1.0, 0.3])
def test_a_stamped_legend_is_the_legend_to_a_level_of_rounding(framealpha):
    # the legend is drawn alone on a transparent canvas and laid over the figure: the blend of its
    # semi-transparent frame may round one level differently, nothing more
    *_, plain = _figure(False, False, framealpha=framealpha)
    *_, stamp = _figure(True, False, framealpha=framealpha)
    assert np.abs(plain - stamp).max() <= 2


def test_a_stamped_legend_is_drawn_again_only_when_it_changes():
    fig, ax, legend, _ = _figure(True, False)
    ax.set_xlim(0.0, 2.0)  # new limits: the same legend at the same place
    fig.canvas.draw()
    assert len(legend._stamps) == 1
    legend.get_texts()[0].set_text("burn at apoapsis")
    fig.canvas.draw()
    assert len(legend._stamps) == 2
    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.fonttype": "none"}):
        fig.savefig(buffer, format="svg")  # a vector file: the legend as itself, its text as text
    assert "burn at apoapsis" in buffer.getvalue()


def test_stamped_tick_labels_return_to_the_same_picture():
    # limits moved away and back: the labels come back from the shared pictures, pixel for pixel,
    # and the labels are the ones matplotlib chose (texts and places)
    from deltakit.widgets import _stamped

    fig, ax, _, first = _figure(False, True, xlim=(0.0, 1.0))
    plain_fig, plain_ax, _, plain = _figure(False, False, xlim=(0.0, 1.0))
    labels = [t.get_text() for t in ax.get_xticklabels()]
    assert labels == [t.get_text() for t in plain_ax.get_xticklabels()]
    assert all(type(t).__name__ == "_StampedTickLabel" for t in ax.get_xticklabels())
    ax.set_xlim(0.0, 37.0)
    fig.canvas.draw()
    kept = len(_stamped._SHARED)
    ax.set_xlim(0.0, 1.0)
    fig.canvas.draw()
    np.testing.assert_array_equal(np.asarray(fig.canvas.buffer_rgba()).astype(int), first)
    assert len(_stamped._SHARED) == kept  # no label laid out again
    # the pictures differ from matplotlib's only inside the tick labels' boxes (anchors rounded)
    renderer = fig.canvas.get_renderer()
    where = np.zeros(first.shape[:2], bool)
    height = first.shape[0]
    for text in [*ax.get_xticklabels(), *ax.get_yticklabels()]:
        box = text.get_window_extent(renderer)
        where[
            max(height - int(np.ceil(box.y1)) - 2, 0) : height - int(np.floor(box.y0)) + 2,
            max(int(np.floor(box.x0)) - 2, 0) : int(np.ceil(box.x1)) + 2,
        ] = True
    differs = np.abs(first - plain).max(axis=2) > 0
    assert differs.any() and not differs[~where].any()
