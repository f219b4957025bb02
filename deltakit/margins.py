"""Margin policy: the delta-v margin of each line category and the mass growth allowance by design maturity.

A project books margins by rule, not by feel: every delta-v line belongs to a
category (a deterministic manoeuvre, a statistical correction, attitude
control, ...) whose margin the project's policy fixes, and every dry mass
carries a growth allowance that shrinks as the design matures. A
:class:`MarginPolicy` holds both tables, says where its values come from, and
can be read (:meth:`MarginPolicy.to_frame`), changed
(:meth:`MarginPolicy.replace`) and cited (:attr:`MarginPolicy.source`).

Conventions
-----------
* Every margin and allowance is a **fraction**: 0.05 books 5 % more than the
  nominal value. A value above 1 is refused with a message suggesting the
  fraction (``5`` for 5 % is the classic slip: it would book 500 %).
* A delta-v margin multiplies the line's delta-v: ``dv (1 + margin)``.
  A mass growth allowance multiplies a dry mass: ``mass (1 + allowance)``.
  Propellant loads carry no growth allowance.

:data:`STUDY_POLICY` is deltakit's default table. Its values are **quoted from
memory** of ESA's "Margin philosophy for science assessment studies" (ESA
SRE-PA/2011.097), which sets maturity margins of 5 % for off-the-shelf items,
10 % for items to be modified and 20 % for new designs, a 5 % margin on
deterministic manoeuvres and 100 % on statistical corrections and attitude
control. Check them against the issue of the document your project applies
before you cite them, and replace them with your project's own rules
(:meth:`MarginPolicy.replace`).

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> from deltakit.margins import STUDY_POLICY
>>> STUDY_POLICY.dv_margin("deterministic"), STUDY_POLICY.growth("new design")
(0.05, 0.2)
>>> ours = STUDY_POLICY.replace(name="Project rules", dv={"statistical": 0.5})
>>> ours.dv_margin("statistical"), ours.dv_margin("deterministic")
(0.5, 0.05)
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from ._scalars import real
from .errors import DomainError

__all__ = ["MarginPolicy", "STUDY_POLICY", "fraction"]


def fraction(value: Any, name: str, *, what: str = "a fraction") -> float:
    """One margin or allowance as a fraction in [0, 1], refusing percentages.

    Examples
    --------
    >>> fraction(0.05, "margin")
    0.05
    >>> fraction(5, "margin")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    deltakit.errors.DomainError: `margin` must be a fraction ... got 5.0; did you mean 0.05?
    """
    number = real(value, name)
    if number < 0.0:
        raise DomainError(f"`{name}` must be >= 0 ({what}, 0.05 = +5 %), got {number!r}")
    if number > 1.0:
        hint = f"; did you mean {number / 100.0:g}?" if number <= 100.0 else ""
        raise DomainError(f"`{name}` must be {what} between 0 and 1 (0.05 = +5 %), got {number!r}{hint}")
    return number


def _table(values: Any, name: str) -> Mapping[str, float]:
    if not isinstance(values, Mapping):
        raise DomainError(f"`{name}` must be a mapping of category to fraction, got {type(values).__name__}")
    table: dict[str, float] = {}
    for key, value in values.items():
        if not isinstance(key, str) or not key.strip():
            raise DomainError(f"`{name}` keys must be non-empty text, got {key!r}")
        table[key] = fraction(value, f"{name}[{key!r}]")
    return MappingProxyType(table)


@dataclass(frozen=True)
class MarginPolicy:
    """The project's margin rules: delta-v margin per line category, growth allowance per maturity.

    Parameters
    ----------
    name : str
        What the policy is called in tables and reports.
    dv : mapping of str to float
        Delta-v margin (fraction) of each line category.
    mass_growth : mapping of str to float
        Mass growth allowance (fraction) of each design maturity.
    source : str
        Where the values come from, for a reviewer to check.

    Examples
    --------
    >>> from deltakit import MarginPolicy
    >>> p = MarginPolicy("Tug rules", dv={"deterministic": 0.03}, mass_growth={"flight spare": 0.0},
    ...                  source="our own rules")
    >>> p.dv_margin("deterministic")
    0.03
    >>> p.dv_margin("attitude control")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    deltakit.errors.DomainError: `category` 'attitude control' is not in the margin policy ... deterministic)
    """

    name: str
    dv: Mapping[str, float] = field(default_factory=dict)
    mass_growth: Mapping[str, float] = field(default_factory=dict)
    source: str = ""

    def __post_init__(self) -> None:
        for attribute in ("name", "source"):
            if not isinstance(getattr(self, attribute), str):
                raise DomainError(f"`{attribute}` must be text, got {getattr(self, attribute)!r}")
        object.__setattr__(self, "dv", _table(self.dv, "dv"))
        object.__setattr__(self, "mass_growth", _table(self.mass_growth, "mass_growth"))

    def dv_margin(self, category: str) -> float:
        """The delta-v margin (fraction) of a line category."""
        return self._look_up(self.dv, category, "category")

    def growth(self, maturity: str) -> float:
        """The mass growth allowance (fraction) of a design maturity."""
        return self._look_up(self.mass_growth, maturity, "maturity")

    def _look_up(self, table: Mapping[str, float], key: Any, name: str) -> float:
        if key in table:
            return table[key]
        known = ", ".join(table) or "none"
        plural = "categories" if name == "category" else "maturities"
        raise DomainError(
            f"`{name}` {key!r} is not in the margin policy {self.name!r} (its {plural}: {known})"
        )

    def replace(
        self,
        *,
        name: str | None = None,
        dv: Mapping[str, float] | None = None,
        mass_growth: Mapping[str, float] | None = None,
        source: str | None = None,
    ) -> MarginPolicy:
        """A copy with some entries changed or added (the tables are merged, not replaced).

        Examples
        --------
        >>> from deltakit.margins import STUDY_POLICY
        >>> STUDY_POLICY.replace(mass_growth={"measured": 0.0}).growth("measured")
        0.0
        """
        return MarginPolicy(
            self.name if name is None else name,
            {**self.dv, **(dv or {})},
            {**self.mass_growth, **(mass_growth or {})},
            self.source if source is None else source,
        )

    def rows(self) -> list[dict[str, Any]]:
        """The two tables as rows: ``{"table", "entry", "fraction"}``."""
        rows = [{"table": "delta-v margin", "entry": k, "fraction": v} for k, v in self.dv.items()]
        rows += [
            {"table": "mass growth allowance", "entry": k, "fraction": v} for k, v in self.mass_growth.items()
        ]
        return rows

    def to_frame(self) -> Any:
        """Both tables as a pandas DataFrame: table, entry, fraction and percent.

        Examples
        --------
        >>> from deltakit.margins import STUDY_POLICY
        >>> STUDY_POLICY.to_frame().columns.tolist()
        ['table', 'entry', 'fraction', 'percent (%)']
        """
        import pandas as pd

        frame = pd.DataFrame(self.rows(), columns=["table", "entry", "fraction"])
        frame["percent (%)"] = 100.0 * frame["fraction"]
        frame.attrs.update(name=self.name, source=self.source)
        return frame

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready data (saved with a budget)."""
        return {
            "name": self.name,
            "dv": dict(self.dv),
            "mass_growth": dict(self.mass_growth),
            "source": self.source,
        }

    @classmethod
    def from_dict(cls, data: Any) -> MarginPolicy:
        """Rebuild from :meth:`to_dict` output, checking every field."""
        if not isinstance(data, Mapping):
            raise DomainError(f"`policy` must be an object, got {type(data).__name__}")
        unknown = set(data) - {"name", "dv", "mass_growth", "source"}
        if unknown:
            raise DomainError(f"`policy` has unknown fields {sorted(unknown)}")
        return cls(
            data.get("name", ""), data.get("dv", {}), data.get("mass_growth", {}), data.get("source", "")
        )


#: deltakit's default margin policy (values from memory; see the module notes).
STUDY_POLICY = MarginPolicy(
    name="study margins (ESA SRE-PA/2011.097, from memory)",
    dv={"deterministic": 0.05, "statistical": 1.0, "attitude control": 1.0},
    mass_growth={"off-the-shelf": 0.05, "modified": 0.10, "new design": 0.20},
    source=(
        "ESA, Margin philosophy for science assessment studies, SRE-PA/2011.097: maturity margins "
        "5 % off-the-shelf, 10 % modified, 20 % new design; delta-v margins 5 % deterministic, 100 % "
        "statistical and attitude control. Values quoted from memory: check the issue your project "
        "applies before citing."
    ),
)
