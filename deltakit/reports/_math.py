"""Formulas typeset to SVG with matplotlib's mathtext: no TeX, no network, no script at view time.

A derivation's LaTeX uses a few constructs mathtext does not know; they are
rewritten to ones it does (``\\limits`` goes: mathtext sets an integral's
limits as sub- and superscripts anyway). The SVG draws its glyphs as paths, so
it shows the same in any browser, fonts or not.
"""

from __future__ import annotations

import base64
import io
from functools import lru_cache

__all__ = ["formula_svg", "svg_data_uri"]

_REWRITES = ((r"\limits", ""), (r"\left.", ""), (r"\right.", ""))


def _mathtext(latex: str) -> str:
    for old, new in _REWRITES:
        latex = latex.replace(old, new)
    return f"${latex}$"


@lru_cache(maxsize=1024)
def formula_svg(latex: str, size: float = 13.0) -> bytes:
    """One formula (LaTeX math, no dollars) as a self-contained SVG."""
    import matplotlib
    from matplotlib import mathtext
    from matplotlib.font_manager import FontProperties

    buffer = io.BytesIO()
    with matplotlib.rc_context(
        {"svg.fonttype": "path", "svg.hashsalt": "deltakit", "mathtext.fontset": "cm"}
    ):
        mathtext.math_to_image(_mathtext(latex), buffer, prop=FontProperties(size=size), format="svg")
    return buffer.getvalue()


def svg_data_uri(svg: bytes) -> str:
    """An SVG as a data URI for an ``<img>`` (each image its own document: no id clashes)."""
    return "data:image/svg+xml;base64," + base64.b64encode(svg).decode("ascii")
