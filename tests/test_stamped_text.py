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
