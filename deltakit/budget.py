"""Delta-v budgets: ordered manoeuvres, the propellant each costs, the mass left.

Conventions
-----------
* SI units: masses in kg, delta-v and exhaust velocity in m/s. Tables show the
  unit in each column header.
* A line's delta-v is a magnitude (>= 0). Its ``margin`` is a fraction added to
  that line's delta-v: 0.05 books 5 % more than the manoeuvre needs.
* Each line burns with its own exhaust velocity, or the budget's when the line
  gives none. Propellant follows the rocket equation line after line, so the
  mass after line k is ``m0 exp(-sum_{i<=k} dv_i / ve_i)`` (a cumulative sum,
  no loop).
* Infeasible budgets: with only ``m0`` known, any delta-v costs a finite part of
  what is left, so every budget closes. Give ``dry_mass`` (the keyword the
  fixed propellant load defines) and a line that would burn the vehicle below
  it is infeasible: its propellant, its mass after, and those of every later
  line are NaN, and so are ``propellant`` and ``final_mass``;
  :attr:`Budget.first_infeasible` names the line.

Files
-----
:meth:`Budget.save` writes versioned JSON of our own layout (``"format":
"deltakit.budget"``, ``"version": 1``), atomically: a temporary file in the
same folder, flushed to disk, then renamed over the target, so a reader never
sees a half-written file. ``save`` refuses to overwrite a file that is not a
deltakit budget. :meth:`Budget.load` refuses corrupt, truncated, foreign or
newer files with a :class:`~deltakit.DomainError` naming the file, and never
writes to the file it reads.

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> from deltakit import Budget
>>> b = Budget(1200.0, 3100.0, name="Demo tug").add("departure", 900.0, margin=0.05)
>>> b = b.add("trim", 40.0, ve=2200.0)
>>> round(float(b.total_dv), 1), round(float(b.propellant), 1)
(985.0, 331.2)
"""

from __future__ import annotations

import copy
import json
import math
import os
import tempfile
from collections.abc import Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np

from ._checks import scalar_or_array
from .errors import DomainError

__all__ = ["Budget", "BudgetLine", "FORMAT", "VERSION"]

#: Format tag of a saved budget file.
FORMAT = "deltakit.budget"
#: Newest file layout this version writes and reads.
VERSION = 1

# Column headers of the tables, unit in the header.
_COLUMNS = (
    ("label", "label"),
    ("source", "source"),
    ("dv", "dv (m/s)"),
    ("margin", "margin (%)"),
    ("dv_with_margin", "dv with margin (m/s)"),
    ("ve", "ve (m/s)"),
    ("mass_before", "mass before (kg)"),
    ("propellant", "propellant (kg)"),
    ("mass_after", "mass after (kg)"),
)


def _number(value: Any, name: str, unit: str, *, minimum: float | None = None, strict: bool = False) -> float:
    """One finite real number (a 0-d or size-1 array is accepted)."""
    if isinstance(value, (str, bytes, bool, np.bool_)):  # "1000" or True must not pass as a number
        raise DomainError(f"`{name}` must be a real number, got {value!r}")
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as err:
        raise DomainError(f"`{name}` must be a real number, got {value!r}") from err
    if array.size != 1:
        raise DomainError(f"`{name}` must be one number (a budget line is one case), got shape {array.shape}")
    number = float(array.reshape(()))
    unit_text = f" {unit}" if unit else ""
    if not math.isfinite(number):
        raise DomainError(f"`{name}` must be finite, got {number!r}")
    if minimum is not None and (number <= minimum if strict else number < minimum):
        rule = ">" if strict else ">="
        raise DomainError(f"`{name}` must be {rule} {minimum:g}{unit_text}, got {number!r}")
    return number


@dataclass(frozen=True)
class BudgetLine:
    """One manoeuvre of a budget.

    Attributes
    ----------
    label : str
        What the manoeuvre is, in the analyst's words.
    dv : float
        Delta-v the manoeuvre needs, m/s, before margin.
    ve : float or None
        Exhaust velocity of this line, m/s; None uses the budget's.
    margin : float
        Fraction added to ``dv`` (0.05 = +5 %).
    source : dict
        Where ``dv`` came from: ``{"kind": "number"}`` for a typed value, or
        ``{"kind": "transfer", "type": ..., "burns": [...], "total": ...,
        "duration": ...}`` (SI) for a transfer, so a panel can show or rebuild it.
    """

    label: str
    dv: float
    ve: float | None = None
    margin: float = 0.0
    source: dict = field(default_factory=lambda: {"kind": "number"})

    @property
    def dv_with_margin(self) -> float:
        """``dv (1 + margin)``, m/s."""
        return self.dv * (1.0 + self.margin)

    def to_dict(self) -> dict[str, Any]:
        """The line as JSON-ready data in SI units."""
        return {
            "label": self.label,
            "dv_m_per_s": self.dv,
            "ve_m_per_s": self.ve,
            "margin": self.margin,
            "source": copy.deepcopy(self.source),  # the caller may edit it freely
        }


def _make_line(label: Any, dv_or_transfer: Any, ve: Any, margin: Any) -> BudgetLine:
    if not isinstance(label, str):
        raise DomainError(f"`label` must be a string, got {label!r}")
    if hasattr(dv_or_transfer, "total") and hasattr(dv_or_transfer, "burns"):
        transfer = dv_or_transfer
        dv = _number(transfer.total, "dv_or_transfer", "m/s", minimum=0.0)
        burns = [_number(b, "dv_or_transfer.burns", "m/s") for b in transfer.burns]
        duration = getattr(transfer, "duration", None)
        source: dict[str, Any] = {
            "kind": "transfer",
            "type": type(transfer).__name__,
            "burns": burns,
            "total": dv,
            "duration": None if duration is None else _number(duration, "dv_or_transfer.duration", "s"),
        }
    else:
        dv = _number(dv_or_transfer, "dv_or_transfer", "m/s", minimum=0.0)
        source = {"kind": "number"}
    ve = None if ve is None else _number(ve, "ve", "m/s", minimum=0.0, strict=True)
    margin = _number(margin, "margin", "", minimum=0.0)
    return BudgetLine(label, dv, ve, margin, source)


class Budget:
    """An ordered delta-v budget for one vehicle.

    Parameters
    ----------
    m0 : float
        Vehicle mass at the start of the first line, kg (> 0).
    ve : float
        Default exhaust velocity, m/s (> 0), for lines that give none.
    name : str, optional
        Title shown in tables and saved with the file.
    dry_mass : float, optional
        Mass without usable propellant, kg (> 0, < m0). When given, a line
        that would burn below it is infeasible (NaN from there on).

    Examples
    --------
    >>> from deltakit import Budget
    >>> b = Budget(1000.0, 3000.0).add("raise", 1000.0).add("circularise", 500.0, margin=0.1)
    >>> [round(float(m), 1) for m in b.mass_after]
    [716.5, 596.5]
    >>> round(float(b.final_mass), 1), round(float(b.propellant), 1)
    (596.5, 403.5)
    """

    def __init__(self, m0: float, ve: float, name: str = "", *, dry_mass: float | None = None) -> None:
        self._lines: list[BudgetLine] = []
        self.m0 = m0
        self.ve = ve
        self.name = name
        self.dry_mass = dry_mass

    # ------------------------------------------------------------------ settings
    @property
    def m0(self) -> float:
        """Mass at the start, kg."""
        return self._m0

    @m0.setter
    def m0(self, value: float) -> None:
        m0 = _number(value, "m0", "kg", minimum=0.0, strict=True)
        dry = getattr(self, "_dry_mass", None)
        if dry is not None and dry >= m0:
            raise DomainError(f"`m0` must be > dry_mass ({dry!r} kg), got {m0!r}")
        self._m0 = m0

    @property
    def ve(self) -> float:
        """Default exhaust velocity, m/s."""
        return self._ve

    @ve.setter
    def ve(self, value: float) -> None:
        self._ve = _number(value, "ve", "m/s", minimum=0.0, strict=True)

    @property
    def name(self) -> str:
        """Title of the budget."""
        return self._name

    @name.setter
    def name(self, value: str) -> None:
        if not isinstance(value, str):
            raise DomainError(f"`name` must be a string, got {value!r}")
        self._name = value

    @property
    def dry_mass(self) -> float | None:
        """Mass without usable propellant, kg, or None when not given."""
        return self._dry_mass

    @dry_mass.setter
    def dry_mass(self, value: float | None) -> None:
        if value is not None:
            value = _number(value, "dry_mass", "kg", minimum=0.0, strict=True)
            if value >= self._m0:
                raise DomainError(f"`dry_mass` must be < m0 ({self._m0!r} kg), got {value!r}")
        self._dry_mass = value

    # ------------------------------------------------------------------ editing
    def add(self, label: str, dv_or_transfer: Any, ve: float | None = None, margin: float = 0.0) -> Budget:
        """Append a manoeuvre and return the budget (for chaining).

        Parameters
        ----------
        label : str
            Name of the manoeuvre.
        dv_or_transfer : float or Transfer
            Delta-v in m/s (>= 0), or any object with ``.total`` and ``.burns``
            (a :class:`~deltakit.Transfer`), which counts with its total.
        ve : float, optional
            Exhaust velocity of this line, m/s; default the budget's.
        margin : float, optional
            Fraction added to this line's delta-v (>= 0).

        Examples
        --------
        >>> from deltakit import Budget
        >>> len(Budget(500.0, 2500.0).add("a", 10.0).add("b", 20.0).lines)
        2
        """
        self._lines.append(_make_line(label, dv_or_transfer, ve, margin))
        return self

    def insert(
        self, index: int, label: str, dv_or_transfer: Any, ve: float | None = None, margin: float = 0.0
    ) -> Budget:
        """Insert a manoeuvre before line ``index`` (as :meth:`add`); returns the budget."""
        line = _make_line(label, dv_or_transfer, ve, margin)
        self._lines.insert(self._position(index, "index", allow_end=True), line)
        return self

    def remove(self, index: int) -> Budget:
        """Remove line ``index``; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> Budget(500.0, 2500.0).add("a", 10.0).add("b", 20.0).remove(0).lines[0].label
        'b'
        """
        del self._lines[self._position(index, "index")]
        return self

    def move(self, index: int, new_index: int) -> Budget:
        """Move line ``index`` so that it becomes line ``new_index``; returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(500.0, 2500.0).add("a", 1.0).add("b", 2.0).add("c", 3.0).move(2, 0)
        >>> [line.label for line in b.lines]
        ['c', 'a', 'b']
        """
        line = self._lines[self._position(index, "index")]
        new_index = self._position(new_index, "new_index")
        del self._lines[self._position(index, "index")]
        self._lines.insert(new_index, line)
        return self

    def replace(
        self, index: int, label: str, dv_or_transfer: Any, ve: float | None = None, margin: float = 0.0
    ) -> Budget:
        """Replace line ``index`` by a new one (arguments as :meth:`add`); returns the budget."""
        position = self._position(index, "index")
        self._lines[position] = _make_line(label, dv_or_transfer, ve, margin)
        return self

    def update(self, index: int, **changes: Any) -> Budget:
        """Change some fields of line ``index``: ``label``, ``dv``, ``ve``, ``margin``.

        Setting ``dv`` makes the line a typed number (its transfer source is
        dropped). Returns the budget.

        Examples
        --------
        >>> from deltakit import Budget
        >>> b = Budget(500.0, 2500.0).add("a", 10.0).update(0, margin=0.2, label="trim")
        >>> b.lines[0].label, b.lines[0].margin
        ('trim', 0.2)
        """
        position = self._position(index, "index")
        unknown = set(changes) - {"label", "dv", "ve", "margin"}
        if unknown:
            raise DomainError(f"`update` takes label, dv, ve, margin; got {sorted(unknown)}")
        old = self._lines[position]
        dv_source: Any = old.dv if "dv" not in changes else changes["dv"]
        line = _make_line(
            changes.get("label", old.label),
            dv_source,
            changes.get("ve", old.ve),
            changes.get("margin", old.margin),
        )
        if "dv" not in changes:
            line = replace(line, source=old.source)
        self._lines[position] = line
        return self

    def clear(self) -> Budget:
        """Remove every line; returns the budget."""
        self._lines.clear()
        return self

    def _position(self, index: Any, name: str, allow_end: bool = False) -> int:
        count = len(self._lines) + (1 if allow_end else 0)
        if isinstance(index, bool) or not isinstance(index, (int, np.integer)):
            raise DomainError(f"`{name}` must be an integer line number, got {index!r}")
        position = int(index) + count if index < 0 else int(index)
        if not 0 <= position < count:
            raise DomainError(f"`{name}` must be a line number from 0 to {count - 1}, got {index!r}")
        return position

    # ------------------------------------------------------------------ reading
    @property
    def lines(self) -> tuple[BudgetLine, ...]:
        """The lines in order (a read-only tuple; edit with add/remove/move/replace/update)."""
        return tuple(self._lines)

    def __len__(self) -> int:
        return len(self._lines)

    def __iter__(self) -> Iterator[BudgetLine]:
        return iter(tuple(self._lines))

    @property
    def dv(self) -> np.ndarray:
        """Delta-v of each line before margin, m/s, shape (n,)."""
        return np.array([line.dv for line in self._lines], dtype=float)

    @property
    def dv_with_margin(self) -> np.ndarray:
        """Delta-v of each line with its margin, m/s, shape (n,)."""
        return np.array([line.dv_with_margin for line in self._lines], dtype=float)

    @property
    def line_ve(self) -> np.ndarray:
        """Exhaust velocity each line burns with, m/s, shape (n,)."""
        return np.array([self._ve if line.ve is None else line.ve for line in self._lines], dtype=float)

    def _masses(self) -> tuple[np.ndarray, np.ndarray]:
        """Mass before and after each line, NaN from the first infeasible line on."""
        exponents = np.cumsum(self.dv_with_margin / self.line_ve)
        after = self._m0 * np.exp(-exponents)
        before = np.concatenate(([self._m0], after))[:-1]
        if self._dry_mass is not None:
            # Tolerate rounding when a budget spends exactly the whole load.
            broke = np.logical_or.accumulate(after < self._dry_mass * (1.0 - 1e-12))
            after = np.where(broke, np.nan, after)
            before = np.where(np.concatenate(([False], broke))[:-1], np.nan, before)
        return before, after

    @property
    def mass_before(self) -> np.ndarray:
        """Mass at the start of each line, kg, shape (n,)."""
        return self._masses()[0]

    @property
    def mass_after(self) -> np.ndarray:
        """Mass at the end of each line, kg, shape (n,) (NaN once infeasible)."""
        return self._masses()[1]

    @property
    def propellant_per_line(self) -> np.ndarray:
        """Propellant each line burns, kg, shape (n,) (NaN once infeasible)."""
        before, after = self._masses()
        return before - after

    @property
    def total_dv(self) -> np.floating:
        """Sum of the lines' delta-v with margins, m/s."""
        return scalar_or_array(np.sum(self.dv_with_margin))

    @property
    def propellant(self) -> np.floating:
        """Propellant of the whole budget, kg (NaN when infeasible)."""
        return scalar_or_array(self._m0 - self.final_mass)

    @property
    def final_mass(self) -> np.floating:
        """Mass after the last line, kg (``m0`` for an empty budget; NaN when infeasible)."""
        after = self.mass_after
        return scalar_or_array(after[-1] if after.size else np.float64(self._m0))

    @property
    def propellant_left(self) -> np.floating:
        """Usable propellant left after the last line, kg.

        Needs ``dry_mass``; NaN otherwise or when infeasible.
        """
        if self._dry_mass is None:
            return np.float64(np.nan)
        return scalar_or_array(self.final_mass - self._dry_mass)

    @property
    def first_infeasible(self) -> int | None:
        """Index of the first line that burns below ``dry_mass``, or None."""
        bad = np.flatnonzero(np.isnan(self.mass_after))
        return int(bad[0]) if bad.size else None

    # ------------------------------------------------------------------ tables
    def _rows(self) -> list[dict[str, Any]]:
        before, after = self._masses()
        rows = []
        for i, line in enumerate(self._lines):
            rows.append(
                {
                    "label": line.label,
                    "source": line.source.get("type", "number")
                    if line.source.get("kind") == "transfer"
                    else "number",
                    "dv": line.dv,
                    "margin": 100.0 * line.margin,
                    "dv_with_margin": line.dv_with_margin,
                    "ve": self._ve if line.ve is None else line.ve,
                    "mass_before": float(before[i]),
                    "propellant": float(before[i] - after[i]),
                    "mass_after": float(after[i]),
                }
            )
        return rows

    def to_frame(self) -> Any:
        """The lines as a pandas DataFrame, one row per line, units in the headers.

        Examples
        --------
        >>> from deltakit import Budget
        >>> frame = Budget(1000.0, 3000.0).add("raise", 1000.0).to_frame()
        >>> list(frame.columns)[:3]
        ['label', 'source', 'dv (m/s)']
        >>> round(float(frame["propellant (kg)"].iloc[0]), 1)
        283.5
        """
        import pandas as pd

        rows = self._rows()
        frame = pd.DataFrame(
            {header: [row[key] for row in rows] for key, header in _COLUMNS},
            index=pd.RangeIndex(1, len(rows) + 1, name="line"),
        )
        frame.attrs["name"] = self._name
        return frame

    def _table_cells(self) -> tuple[list[str], list[list[str]], list[str]]:
        headers = ["line"] + [header for _, header in _COLUMNS]
        body = []
        for i, row in enumerate(self._rows(), start=1):
            body.append(
                [
                    str(i),
                    row["label"],
                    row["source"],
                    f"{row['dv']:.1f}",
                    f"{row['margin']:.1f}",
                    f"{row['dv_with_margin']:.1f}",
                    f"{row['ve']:.1f}",
                    _mass(row["mass_before"]),
                    _mass(row["propellant"]),
                    _mass(row["mass_after"]),
                ]
            )
        total = [
            "",
            "total",
            "",
            f"{float(np.sum(self.dv)):.1f}",
            "",
            f"{float(self.total_dv):.1f}",
            "",
            _mass(self._m0),
            _mass(float(self.propellant)),
            _mass(float(self.final_mass)),
        ]
        return headers, body, total

    def to_markdown(self) -> str:
        """The budget as a Markdown (pipe) table with a total row.

        Examples
        --------
        >>> from deltakit import Budget
        >>> table = Budget(1000.0, 3000.0, name="Tug").add("raise", 1000.0).to_markdown()
        >>> print(table.splitlines()[0])
        **Tug**
        >>> print(table.splitlines()[4][:46])
        | 1 | raise | number | 1000.0 | 0.0 | 1000.0 |
        """
        headers, body, total = self._table_cells()
        total = [f"**{cell}**" if cell == "total" else cell for cell in total]
        align = ["---:", ":---", ":---"] + ["---:"] * (len(headers) - 3)

        def row(cells: list[str]) -> str:
            return "| " + " | ".join(_markdown_escape(c) for c in cells) + " |"

        lines = [f"**{_markdown_escape(self._name)}**", ""] if self._name else []
        lines += [row(headers), "|" + "|".join(align) + "|"]
        lines += [row(cells) for cells in body] + [row(total)]
        return "\n".join(lines)

    def _repr_markdown_(self) -> str:
        return self.to_markdown()

    def to_latex(self) -> str:
        """The budget as a LaTeX ``tabular`` (no extra packages), with a total row.

        Special characters of labels are escaped; a few symbols analysts type
        (Δ, δ, μ, °, ±, ×, →, ≈, ≤, ≥) become math so that pdflatex sets them.
        Line breaks in labels become spaces (also in :meth:`to_markdown`).

        Examples
        --------
        >>> from deltakit import Budget
        >>> text = Budget(1000.0, 3000.0).add("raise_1", 1000.0).to_latex()
        >>> text.splitlines()[0]
        '\\\\begin{tabular}{rllrrrrrrr}'
        >>> "raise\\\\_1" in text
        True
        """
        headers, body, total = self._table_cells()
        lines = []
        if self._name:
            lines.append(f"% {self._name}")
        lines.append(r"\begin{tabular}{rll" + "r" * (len(headers) - 3) + "}")
        lines.append(r"\hline")
        lines.append(" & ".join(_latex_escape(h) for h in headers) + r" \\")
        lines.append(r"\hline")
        lines += [" & ".join(_latex_escape(c) for c in cells) + r" \\" for cells in body]
        lines.append(r"\hline")
        lines.append(" & ".join(_latex_escape(c) for c in total) + r" \\")
        lines.append(r"\hline")
        lines.append(r"\end{tabular}")
        return "\n".join(lines)

    def to_csv(self, path: str | os.PathLike) -> Path:
        """Write the lines as CSV (``to_frame`` with the line number first), atomically.

        Returns the path written. An existing file at ``path`` is replaced
        in one step (never left half-written).
        """
        text = self.to_frame().to_csv(lineterminator="\n")
        path = Path(path)
        _write_atomically(path, lambda handle: handle.write(text))
        return path

    # ------------------------------------------------------------------ files
    def to_dict(self) -> dict[str, Any]:
        """The budget as JSON-ready data in our own versioned layout (SI units)."""
        return {
            "format": FORMAT,
            "version": VERSION,
            "name": self._name,
            "m0_kg": self._m0,
            "ve_m_per_s": self._ve,
            "dry_mass_kg": self._dry_mass,
            "lines": [line.to_dict() for line in self._lines],
        }

    @classmethod
    def from_dict(cls, data: Any, *, origin: str = "the data") -> Budget:
        """Rebuild a budget from :meth:`to_dict` output, checking every field.

        Raises :class:`~deltakit.DomainError` naming ``origin`` and the field
        when the data is not a deltakit budget of a version this code reads.
        """
        if not isinstance(data, dict):
            raise DomainError(
                f"{origin} is not a deltakit budget: expected a JSON object, got {type(data).__name__}"
            )
        if data.get("format") != FORMAT:
            raise DomainError(
                f"{origin} is not a deltakit budget: its format tag is "
                f"{data.get('format')!r}, expected {FORMAT!r}"
            )
        version = data.get("version")
        if isinstance(version, bool) or not isinstance(version, int) or version < 1:
            raise DomainError(f"{origin} has no valid version number (got {version!r})")
        if version > VERSION:
            raise DomainError(
                f"{origin} was written by a newer deltakit (budget file version {version}); "
                f"this version reads up to {VERSION}. Update deltakit to open it."
            )
        try:
            budget = cls(
                data["m0_kg"], data["ve_m_per_s"], data.get("name", ""), dry_mass=data.get("dry_mass_kg")
            )
            lines = data["lines"]
            if not isinstance(lines, list):
                raise DomainError(f"`lines` must be a list, got {type(lines).__name__}")
            for number, entry in enumerate(lines):
                if not isinstance(entry, dict):
                    raise DomainError(f"line {number} must be an object, got {type(entry).__name__}")
                line = _make_line(
                    entry["label"], entry["dv_m_per_s"], entry.get("ve_m_per_s"), entry.get("margin", 0.0)
                )
                source = entry.get("source", {"kind": "number"})
                if not isinstance(source, dict) or source.get("kind") not in ("number", "transfer"):
                    raise DomainError(f"line {number} has an unknown source {source!r}")
                budget._lines.append(replace(line, source=copy.deepcopy(source)))
        except KeyError as err:
            raise DomainError(
                f"{origin} is a damaged deltakit budget: field {err.args[0]!r} is missing"
            ) from None
        except DomainError as err:
            raise DomainError(f"{origin} is a damaged deltakit budget: {err}") from None
        return budget

    def save(self, path: str | os.PathLike) -> Path:
        """Save as versioned JSON, atomically; returns the path.

        Refuses (with :class:`~deltakit.DomainError`, touching nothing) to
        overwrite an existing file that is not a deltakit budget this version
        can read, so no other file is ever lost.

        Examples
        --------
        >>> import tempfile, pathlib
        >>> from deltakit import Budget
        >>> folder = pathlib.Path(tempfile.mkdtemp())
        >>> path = Budget(800.0, 3000.0, name="Tug").add("burn", 300.0).save(folder / "tug.json")
        >>> Budget.load(path).lines[0].dv
        300.0
        """
        path = Path(path)
        data = self.to_dict()
        if path.exists():
            try:
                _read_budget_data(path)
            except DomainError as err:
                raise DomainError(f"refusing to overwrite {path}: {err}") from None
        _write_atomically(path, lambda handle: json.dump(data, handle, indent=2, allow_nan=False))
        return path

    @classmethod
    def load(cls, path: str | os.PathLike) -> Budget:
        """Read a budget saved by :meth:`save`; the file is only read.

        Raises :class:`~deltakit.DomainError` (a ``ValueError``) naming the
        file and what is wrong: unreadable or truncated JSON, another format,
        a newer version, or a damaged field. A missing file raises
        ``FileNotFoundError``.
        """
        path = Path(path)
        return cls.from_dict(_read_budget_data(path), origin=str(path))

    # ------------------------------------------------------------------ comparing and printing
    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Budget):
            return NotImplemented
        return self.to_dict() == other.to_dict()

    __hash__ = None  # type: ignore[assignment]  # mutable

    def __repr__(self) -> str:
        title = f" {self._name!r}" if self._name else ""
        return (
            f"<Budget{title}: {len(self._lines)} lines, total_dv={float(self.total_dv):.6g} m/s, "
            f"propellant={float(self.propellant):.6g} kg, final_mass={float(self.final_mass):.6g} kg>"
        )


# ---------------------------------------------------------------------- helpers
def _mass(value: float) -> str:
    return "infeasible" if math.isnan(value) else f"{value:.2f}"


def _markdown_escape(text: str) -> str:
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


_LATEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
    # Symbols analysts type in labels that pdflatex cannot set from UTF-8 text;
    # other non-ASCII text needs a Unicode engine (lualatex, xelatex).
    "\u0394": r"$\Delta$",
    "\u03b4": r"$\delta$",
    "\u03bc": r"$\mu$",
    "\u00b5": r"$\mu$",
    "\u00b0": r"$^\circ$",
    "\u00b1": r"$\pm$",
    "\u00d7": r"$\times$",
    "\u2192": r"$\rightarrow$",
    "\u2248": r"$\approx$",
    "\u2264": r"$\leq$",
    "\u2265": r"$\geq$",
}


def _latex_escape(text: str) -> str:
    return "".join(_LATEX_SPECIAL.get(ch, ch) for ch in text.replace("\n", " "))


def _read_budget_data(path: Path) -> dict[str, Any]:
    """Read and check the envelope of a budget file; never writes."""
    raw = path.read_bytes()  # a missing or unreadable file raises OSError naming it
    try:
        data = json.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise DomainError(f"{path} is not a deltakit budget: it is not UTF-8 text") from None
    except json.JSONDecodeError as err:
        raise DomainError(
            f"{path} is corrupt or truncated: invalid JSON at line "
            f"{err.lineno}, column {err.colno} ({err.msg})"
        ) from None
    Budget.from_dict(data, origin=str(path))  # checks the format, version and fields
    return data


def _file_mode(path: Path) -> int:
    try:
        return path.stat().st_mode & 0o777
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def _write_atomically(path: Path, write: Any) -> None:
    """Write through a temporary file in the same folder, then rename over ``path``."""
    folder = path.parent if str(path.parent) else Path(".")
    handle = tempfile.NamedTemporaryFile(
        "w", encoding="utf-8", dir=folder, prefix=f".{path.name}.", suffix=".tmp", delete=False
    )
    try:
        with handle:
            write(handle)
            handle.flush()
            os.fsync(handle.fileno())
        # A temporary file is private (0600); give the result the usual permissions.
        os.chmod(handle.name, _file_mode(path))
        os.replace(handle.name, path)
    except BaseException:
        try:
            os.unlink(handle.name)
        except FileNotFoundError:
            pass
        raise
