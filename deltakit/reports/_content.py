"""What a report says, before it is typeset: a list of neutral blocks.

The budget's tables come from the budget's own table code, the dispersion's
from its dataset, the figures are rendered to PNG once; each output format
(HTML, LaTeX, Markdown) then typesets the same blocks, escaping every string
for its own language. Nothing here is escaped yet.
"""

from __future__ import annotations

import io
import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

from .. import __version__
from .._budget_tables import CONVENTION, line_cells, mass_cells, policy_note, system_cells, verdict
from .._text import CAUTION, escape_mathtext
from ..constants import G0

__all__ = ["Bullets", "DerivationBlock", "Document", "FigureBlock", "Heading", "Paragraph", "Table", "build"]

G0_SOURCE = (
    f"Standard gravity g0 = {G0} m/s^2 (turns specific impulse into exhaust velocity): exact by "
    "definition, 3rd CGPM (1901); ISO 80000-3."
)


@dataclass
class Heading:
    text: str
    level: int = 2


@dataclass
class Paragraph:
    text: str
    style: str = ""  # "", "caution", "note", "verdict"


@dataclass
class Bullets:
    items: list[str]


@dataclass
class Table:
    caption: str
    headers: list[str]
    rows: list[list[str]]
    total: list[str] | None = None
    text_columns: int = 1  # left-aligned columns, the rest are numbers


@dataclass
class FigureBlock:
    png: bytes
    caption: str


@dataclass
class DerivationBlock:
    derivation: Any


@dataclass
class Document:
    title: str
    blocks: list[Any] = field(default_factory=list)

    @property
    def figures(self) -> list[FigureBlock]:
        return [b for b in self.blocks if isinstance(b, FigureBlock)]


def figure_png(figure: Any, dpi: int = 110) -> bytes:
    """A matplotlib figure as PNG bytes (the figure is not changed)."""
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=dpi)
    return buffer.getvalue()


def _new_figure(width: float, height: float) -> Any:
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height), layout="constrained")


def _budget_blocks(budget: Any) -> list[Any]:
    from ..plotting import plot_budget_waterfall

    def titled(text: str) -> str:
        return f"{budget.name}: {text}" if budget.name else text[0].upper() + text[1:]

    headers, body, total = line_cells(budget)
    blocks: list[Any] = [Heading("Delta-v budget"), Paragraph(CONVENTION, "note")]
    # two tables of the same lines, so that each fits a page: the delta-v, then the masses
    first = headers.index("ve (m/s)")
    text = headers.index("source") + 1
    keep = list(range(first)), [0, 1] + list(range(first, len(headers)))

    def columns(cells: list[str], which: list[int]) -> list[str]:
        return [cells[i] for i in which]

    for caption, which, text_columns in (
        (titled("delta-v by line (nominal, margin, total)"), keep[0], text),
        (titled("mass by line"), keep[1], 2),
    ):
        blocks.append(
            Table(
                caption,
                columns(headers, which),
                [columns(r, which) for r in body],
                columns(total, which),
                text_columns,
            )
        )
    headers, body = system_cells(budget)
    blocks.append(Table(titled("propulsion systems"), headers, body, None, 2))
    headers, body = mass_cells(budget)
    blocks.append(Table(titled("start mass (growth allowance by design maturity)"), headers, body, None, 2))
    blocks.append(Paragraph(verdict(budget), "verdict"))
    note = policy_note(budget)
    if note:
        blocks.append(Paragraph(note, "note"))
    figure = _new_figure(8.0, 3.8)
    plot_budget_waterfall(figure.add_subplot(), budget)
    figure.axes[0].set_title(escape_mathtext(titled("vehicle mass line by line (kg)")), fontsize="medium")
    blocks.append(FigureBlock(figure_png(figure), titled("vehicle mass after each line")))
    return blocks


def _dispersion_blocks(ds: Any) -> list[Any]:
    import numpy as np

    from ..plotting import plot_propellant_left, plot_sensitivity

    blocks: list[Any] = [Heading("Dispersion")]
    closes = 100.0 * float(ds["probability_closes"])
    blocks.append(
        Paragraph(
            f"{int(ds.attrs.get('samples', ds.sizes['sample'])):,} samples, seed {ds.attrs.get('seed')}, "
            f"line margins {ds.attrs.get('margins', 'kept')}. "
            f"Probability that every tank closes: {closes:.2f} %.",
            "verdict",
        )
    )
    spreads = [s for s in str(ds.attrs.get("spreads", "")).split("; ") if s]
    if spreads:
        blocks.append(Paragraph("Uncertain inputs (the spread of each deviation from nominal):"))
        blocks.append(Bullets(spreads))
    levels = [float(p) for p in ds.percentile.values]
    headers = ["system", "quantity (kg)", "nominal"] + [f"P{p:g}" for p in levels]
    rows = []
    for system in ds.system.values:
        for quantity in ("propellant_used", "propellant_left", "shortfall"):
            values = ds["percentiles"].sel(system=system, quantity=quantity).values
            nominal = float(ds["nominal"].sel(system=system, quantity=quantity))
            if math.isnan(nominal) and np.all(np.isnan(values)):
                continue
            rows.append(
                [str(system), quantity.replace("_", " "), f"{nominal:.2f}"] + [f"{v:.2f}" for v in values]
            )
    blocks.append(
        Table("Percentiles over the samples (P90: 90 % of samples at or below)", headers, rows, None, 2)
    )
    share = 100.0 * ds["sensitivity"].values
    direction = ds["correlation"].sel(target="all tanks").values
    rows = [
        [str(c), f"{s:.1f}", "more left" if d >= 0 else "less left"]
        for c, s, d in zip(ds.cause.values, share, direction)
    ]
    if rows:
        blocks.append(
            Table(
                "What drives the spread of propellant left, all tanks (share of variance, first order)",
                ["cause", "share (%)", "more of it leaves"],
                rows,
                None,
                1,
            )
        )
    figure = _new_figure(7.5, 4.2)
    plot_propellant_left(figure.add_subplot(), ds)
    blocks.append(
        FigureBlock(figure_png(figure), "Propellant left in the tightest tank, with its percentiles")
    )
    if rows:
        figure = _new_figure(7.5, 0.6 + 0.45 * min(len(rows), 10))
        plot_sensitivity(figure.add_subplot(), ds)
        blocks.append(FigureBlock(figure_png(figure), "Sensitivity ranking"))
    return blocks


def _figures(figures: Any) -> list[tuple[str, Any]]:
    if figures is None:
        return []
    if isinstance(figures, Mapping):
        return [(str(k), v) for k, v in figures.items()]
    items = []
    for number, item in enumerate(figures, start=1):
        if isinstance(item, tuple) and len(item) == 2:
            items.append((str(item[0]), item[1]))
        else:
            suptitle = getattr(getattr(item, "_suptitle", None), "get_text", lambda: "")()
            items.append((suptitle or f"Figure {number}", item))
    return items


def _figure_bytes(item: Any, caption: str) -> bytes:
    if isinstance(item, (bytes, bytearray)):
        if not bytes(item).startswith(b"\x89PNG\r\n\x1a\n"):
            raise ValueError(f"`figures`: {caption!r} is bytes but not a PNG image")
        return bytes(item)
    if hasattr(item, "savefig"):
        return figure_png(item)
    raise TypeError(
        f"`figures`: {caption!r} must be a matplotlib Figure or PNG bytes, not {type(item).__name__}"
    )


def _derivations(derivations: Iterable[Any]) -> list[Any]:
    if not derivations:
        return []
    from ..symbolic import Derivation, derive

    if isinstance(derivations, str):
        derivations = [derivations]
    out = []
    for item in derivations:
        if isinstance(item, Derivation):
            out.append(item)
        elif isinstance(item, str):
            out.append(derive(item))
        else:
            raise TypeError(
                f"`derivations` must hold catalog names or Derivations, not {type(item).__name__}"
            )
    return out


def build(
    budget: Any,
    dispersion: Any,
    derivations: Iterable[Any],
    figures: Any,
    title: str | None,
    notes: str | None,
    constants: Iterable[Any],
) -> Document:
    """Gather everything a report says, in order."""
    derived = _derivations(derivations)
    extra = [(caption, _figure_bytes(item, caption)) for caption, item in _figures(figures)]
    if budget is None and dispersion is None and not derived and not extra:
        raise ValueError("a report needs a `budget`, a `dispersion`, `derivations` or `figures`")
    if title is None:
        title = (
            f"{budget.name}: delta-v budget"
            if budget is not None and budget.name
            else "Delta-v budget report"
        )
    doc = Document(title)
    doc.blocks.append(Paragraph(CAUTION, "caution"))
    if notes:
        doc.blocks.append(Paragraph(str(notes)))
    if budget is not None:
        doc.blocks.extend(_budget_blocks(budget))
    if dispersion is not None:
        doc.blocks.extend(_dispersion_blocks(dispersion))
    if derived:
        doc.blocks.append(Heading("Derivations"))
        doc.blocks.extend(DerivationBlock(d) for d in derived)
    if extra:
        doc.blocks.append(Heading("Figures"))
        doc.blocks.extend(FigureBlock(png, caption) for caption, png in extra)
    sources = [G0_SOURCE]
    for body in constants or ():
        name, source = getattr(body, "name", None), getattr(body, "source", None)
        if name is None or source is None:
            raise TypeError(
                f"`constants` must hold objects with a name and a source, not {type(body).__name__}"
            )
        values = ", ".join(
            f"{attr} = {getattr(body, attr):.10g} {unit}"
            for attr, unit in (("mu", "m^3/s^2"), ("radius", "m"))
            if hasattr(body, attr)
        )
        sources.append(f"{name}: {values}. Source: {source}.")
    if budget is not None and budget.policy is not None and budget.policy.source:
        sources.append(f"Margin policy {budget.policy.name}: {budget.policy.source}")
    doc.blocks.append(Heading("Sources of the constants used"))
    doc.blocks.append(Bullets(sources))
    doc.blocks.append(Paragraph(f"Made with deltakit {__version__}. {CAUTION}", "note"))
    return doc
