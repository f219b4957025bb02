"""Readouts as the analyst reads them: numbers in display units, HTML rows, JSON-ready exports.

Every piece of text shown in a panel's HTML passes through
:func:`deltakit._text.escape_html` here or in the panel: labels, budget names,
file names and messages are text, never markup.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from typing import Any

import numpy as np

from .._text import escape_html

__all__ = ["fmt", "html_notes", "html_table", "json_ready"]


def json_ready(value: Any) -> Any:
    """Plain Python numbers, lists and dicts; NaN and infinities become None.

    >>> json_ready({"a": np.float64(1.5), "b": [np.nan, 2]})
    {'a': 1.5, 'b': [None, 2]}
    """
    if isinstance(value, dict):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, (np.ndarray, np.generic)):
        return json_ready(value.tolist())
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return value
    if isinstance(value, (int, float)):
        value = float(value) if isinstance(value, float) else value
        return None if isinstance(value, float) and not math.isfinite(value) else value
    return str(value)


def fmt(value: Any, scale: float, unit: str, digits: int = 4) -> str:
    """A readout number in display units, with ``digits`` significant digits (all digits of large ones).

    >>> fmt(4612.3, 1e3, "km/s"), fmt(61970183.9, 1e3, "km"), fmt(51579.9, 1e6, "MJ/kg")
    ('4.612 km/s', '61,970 km', '0.05158 MJ/kg')
    >>> fmt(float("inf"), 1e3, "km"), fmt(float("nan"), 1.0, "m/s"), fmt(3.2e21, 1e3, "km")
    ('unbounded', 'n/a', '3.2e+18 km')
    """
    value = float(value)
    if math.isinf(value):
        return ("" if value > 0 else "-") + "unbounded"
    if not math.isfinite(value):
        return "n/a"
    shown = value / scale
    size = abs(shown)
    if size >= 1e15:  # beyond a readable count of digits: scientific notation
        text = f"{shown:.{digits - 1}g}"
    elif size >= 10 ** (digits - 1):
        text = f"{shown:,.0f}"
    elif size >= 1.0:
        text = f"{shown:.{digits - 1 - math.floor(math.log10(size))}f}"
    elif size == 0.0:
        text = "0"
    else:
        text = f"{shown:.{digits}g}"
    return f"{text} {unit}".strip()


def html_table(rows: Iterable[tuple[str, str, str]]) -> str:
    """Readout rows ``(key, label, text)`` as a small HTML table; keys become data attributes."""
    cells = "".join(
        f'<tr data-readout="{escape_html(key)}"><td style="padding:1px 12px 1px 0">{escape_html(label)}</td>'
        f'<td style="padding:1px 0;font-variant-numeric:tabular-nums"><b>{escape_html(text)}</b></td></tr>'
        for key, label, text in rows
    )
    return f"<table>{cells}</table>"


def html_notes(notes: Iterable[str]) -> str:
    """Sentences under the readouts (adjusted inputs, open orbits, infeasible lines), escaped."""
    return "".join(f'<div style="color:#5a4a00">{escape_html(note)}</div>' for note in notes)
