"""The finite-burn loss table: a pandas DataFrame of SI floats that shows them rounded."""

from __future__ import annotations

import math
from typing import Any

import pandas as pd

__all__ = ["LossTable"]


def _whole(value: float) -> str:
    return "" if not math.isfinite(value) else f"{value:,.0f}"


def _loss(value: float) -> str:
    """A loss to 0.1 m/s, or to three significant digits when below 1 m/s."""
    if not math.isfinite(value):
        return "NaN"
    return f"{value:.1f}" if abs(value) >= 1.0 else f"{value:.3g}"


def _formatter(column: Any):
    text = str(column)
    if text.startswith(("thrust", "burn time")):
        return _whole
    if text.startswith("loss"):
        return _loss
    return None


class LossTable(pd.DataFrame):
    """A DataFrame whose cells stay SI floats and which displays them rounded.

    Thrust and burn time show to the unit with thousands separators; losses
    to 0.1 m/s, or three significant digits below 1 m/s; the index as
    written (``0.1``, ``1``). ``to_string``, ``print`` and the notebook view
    (``_repr_html_``, a pandas ``Styler``) use these formats; the numbers in
    the frame are untouched, so arithmetic and plots see full precision.
    """

    @property
    def _constructor(self) -> type:
        return LossTable

    def _formatters(self) -> dict[Any, Any]:
        return {c: f for c in self.columns if (f := _formatter(c)) is not None}

    def to_string(self, *args: Any, **kwargs: Any) -> str:  # type: ignore[override]
        kwargs.setdefault("formatters", self._formatters())
        kwargs.setdefault("index_names", True)
        return super().to_string(*args, **kwargs)

    def __repr__(self) -> str:
        return self.to_string()

    def _repr_html_(self) -> str:  # type: ignore[override]
        return self.style.format(self._formatters()).format_index("{:g}").to_html()
