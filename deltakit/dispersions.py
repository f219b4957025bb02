"""Dispersions: how likely a budget is to close, and with how much left, by Monte Carlo.

:func:`disperse` flies a budget many times with uncertain inputs drawn at
random: each system's specific impulse, the dry masses, each line's
delta-v and the losses a finite thrust adds. Each uncertainty is a named
distribution of the **deviation from the nominal value**:

* :class:`Normal` ``(sigma, mean=0)``,
* :class:`Uniform` ``(low, high)``,
* :class:`Triangular` ``(low, mode, high)``,

in the input's own unit (s for a specific impulse, kg for a mass, m/s for a
delta-v), or as a fraction of the nominal value with ``relative=True``.
Uncertainties that share a cause (one navigation error behind every
correction, one thrust calibration behind both engines) name the same
``cause``: they then move together, each through its own distribution (one
standard normal draw per sample, mapped through each member's quantile
function), and count as one cause in the sensitivity ranking.

The propellant loads stay at their nominal values: a heavier dry mass makes a
heavier vehicle, as it does when a fixed load is tanked. A line's delta-v
never falls below zero. With ``margins=True`` (the default) each line keeps
its margin, so that with zero spread every sample is the budget as booked;
``margins=False`` disperses the bare delta-v.

The result is an :class:`xarray.Dataset`: the samples (propellant used, left,
shortfall and signed margin per system, final mass, whether every tank closed,
the inputs drawn and each cause's draw) and the summaries, computed when the
dataset is made: ``percentiles`` (exact order statistics with the linear
interpolation of :func:`numpy.percentile`), ``probability_closes``, and
``sensitivity``: the share of the variance of the propellant left (all tanks
together) that each cause explains to first order (its squared correlation),
the dataset's ``cause`` dimension sorted from the largest.

Samples come from fixed blocks of 65,536, block ``k`` from the random stream
``SeedSequence(seed, spawn_key=(k,))``: the same seed gives the same numbers
in memory or through dask, whatever the chunks. Runs above
:data:`EAGER_LIMIT` samples (or with ``chunks=``) go through dask like
:func:`deltakit.sweep`: the samples stay lazy, and the summaries are made in
three passes of bounded memory (the percentiles by an exact selection).

Results are for preliminary analysis, not for flight operations.

Examples
--------
>>> import deltakit as dk
>>> from deltakit import Normal
>>> b = dk.Budget(1500.0, dk.exhaust_velocity(320.0), dry_mass=700.0).add("transfer", 2320.0)
>>> ds = dk.disperse(b, samples=20_000, seed=1, isp={"main": Normal(2.0)}, dv=Normal(0.01, relative=True))
>>> round(float(ds.probability_closes), 3)
0.995
>>> [str(c) for c in ds.cause.values]
['dv: line 1 (transfer)', 'isp: main']
"""

from __future__ import annotations

import inspect
import math
import numbers
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from . import _ledger
from ._scalars import real
from ._text import CAUTION
from .constants import G0
from .errors import DomainError

__all__ = ["EAGER_LIMIT", "Normal", "Triangular", "Uniform", "disperse"]

#: Samples per random block (the unit of reproducibility).
BLOCK = 1 << 16
#: Runs with more samples than this go through dask (samples stay lazy).
EAGER_LIMIT = 1 << 21
#: Samples per dask task when ``chunks`` is not given (a multiple of BLOCK).
DASK_CHUNK = 1 << 20
#: Bins of the histogram pass of the exact selection (dask path).
_BINS = 1 << 14
QUANTITIES = ("propellant_used", "propellant_left", "shortfall", "propellant_margin")
ALL_TANKS = "all tanks"


# ---------------------------------------------------------------------- distributions
def _check_spread(self: Any) -> None:
    if not isinstance(self.relative, bool):
        raise DomainError(f"`relative` must be True or False, got {self.relative!r}")
    if self.cause is not None and (not isinstance(self.cause, str) or not self.cause.strip()):
        raise DomainError(f"`cause` must be non-empty text, got {self.cause!r}")


def _normal_cdf(z: np.ndarray) -> np.ndarray:
    try:
        from scipy.special import ndtr
    except ImportError as err:  # pragma: no cover - scipy is in the test and all extras
        raise ImportError("a cause shared by a uniform or triangular spread needs scipy") from err
    return ndtr(z)


@dataclass(frozen=True)
class Normal:
    """A normal deviation from the nominal value: ``mean + sigma * N(0, 1)``.

    Parameters
    ----------
    sigma : float
        Standard deviation (>= 0), in the input's unit (or a fraction of the
        nominal value with ``relative=True``).
    mean : float, optional
        A known bias.
    relative : bool, optional
        Read ``sigma`` and ``mean`` as fractions of the nominal value.
    cause : str, optional
        Inputs naming the same cause move together.

    Examples
    --------
    >>> from deltakit import Normal
    >>> Normal(2.0).describe("s")
    'normal, sigma 2 s'
    """

    sigma: float
    mean: float = 0.0
    relative: bool = False
    cause: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "sigma", real(self.sigma, "sigma", low=0.0))
        object.__setattr__(self, "mean", real(self.mean, "mean"))
        _check_spread(self)

    def draw(self, rng: np.random.Generator, out: np.ndarray) -> np.ndarray:
        """Fill ``out`` with independent deviations (and return it)."""
        rng.standard_normal(out=out)
        out *= self.sigma
        out += self.mean
        return out

    def from_normal(self, z: np.ndarray) -> np.ndarray:
        """The deviation at the same quantile as the standard normal draws ``z``."""
        return self.mean + self.sigma * z

    def describe(self, unit: str) -> str:
        """The spread in words, for tables and reports."""
        unit = "of nominal" if self.relative else unit
        scale = 100.0 if self.relative else 1.0
        unit = "% " + unit if self.relative else unit
        bias = f", mean {self.mean * scale:g} {unit}" if self.mean else ""
        return f"normal, sigma {self.sigma * scale:g} {unit}{bias}".rstrip()


@dataclass(frozen=True)
class Uniform:
    """A deviation equally likely anywhere between ``low`` and ``high``.

    Examples
    --------
    >>> from deltakit import Uniform
    >>> Uniform(-5.0, 5.0).describe("kg")
    'uniform, -5 to 5 kg'
    """

    low: float
    high: float
    relative: bool = False
    cause: str | None = None

    def __post_init__(self) -> None:
        low, high = real(self.low, "low"), real(self.high, "high")
        if high < low:
            raise DomainError(f"`high` must be >= low ({low!r}), got {high!r}")
        object.__setattr__(self, "low", low)
        object.__setattr__(self, "high", high)
        _check_spread(self)

    def draw(self, rng: np.random.Generator, out: np.ndarray) -> np.ndarray:
        rng.random(out=out)
        out *= self.high - self.low
        out += self.low
        return out

    def from_normal(self, z: np.ndarray) -> np.ndarray:
        return self.low + (self.high - self.low) * _normal_cdf(z)

    def describe(self, unit: str) -> str:
        scale, unit = (100.0, "% of nominal") if self.relative else (1.0, unit)
        return f"uniform, {self.low * scale:g} to {self.high * scale:g} {unit}".rstrip()


@dataclass(frozen=True)
class Triangular:
    """A deviation between ``low`` and ``high``, most likely at ``mode``.

    Examples
    --------
    >>> from deltakit import Triangular
    >>> Triangular(0.0, 0.005, 0.02, relative=True).describe("m/s")
    'triangular, 0 / 0.5 / 2 % of nominal'
    """

    low: float
    mode: float
    high: float
    relative: bool = False
    cause: str | None = None

    def __post_init__(self) -> None:
        low, mode, high = real(self.low, "low"), real(self.mode, "mode"), real(self.high, "high")
        if not low <= mode <= high:
            raise DomainError(
                f"`mode` must lie between low and high ({low!r} <= mode <= {high!r}), got {mode!r}"
            )
        object.__setattr__(self, "low", low)
        object.__setattr__(self, "mode", mode)
        object.__setattr__(self, "high", high)
        _check_spread(self)

    def draw(self, rng: np.random.Generator, out: np.ndarray) -> np.ndarray:
        out[...] = (
            self.low if self.high == self.low else rng.triangular(self.low, self.mode, self.high, out.shape)
        )
        return out

    def from_normal(self, z: np.ndarray) -> np.ndarray:
        u = _normal_cdf(z)
        a, c, b = self.low, self.mode, self.high
        if b == a:
            return np.full(np.shape(z), a)
        split = (c - a) / (b - a)
        with np.errstate(invalid="ignore"):
            left = a + np.sqrt(u * (b - a) * (c - a))
            right = b - np.sqrt((1.0 - u) * (b - a) * (b - c))
        return np.where(u < split, left, right)

    def describe(self, unit: str) -> str:
        scale, unit = (100.0, "% of nominal") if self.relative else (1.0, unit)
        points = " / ".join(f"{x * scale:g}" for x in (self.low, self.mode, self.high))
        return f"triangular, {points} {unit}".rstrip()


SPREADS = (Normal, Uniform, Triangular)


# ---------------------------------------------------------------------- what is uncertain
@dataclass(frozen=True)
class _Input:
    """One uncertain input: what it moves, its nominal value and its spread."""

    what: str  # "isp", "dry", "stage", "dv", "loss"
    index: int | tuple[int, ...]  # system, -, stage, line, or the lines of a loss
    nominal: float | tuple[float, ...]
    spread: Any
    name: str  # for the sensitivity ranking when the spread has no cause
    unit: str


@dataclass
class _Spec:
    """Everything a block needs: the plan, the nominal numbers, the inputs and the causes."""

    seed: int
    plan: _ledger.Plan
    inputs: _ledger.Inputs
    base_dv: list[float]
    margin: list[float]
    uncertain: list[_Input]
    causes: list[tuple[str, list[int]]]  # name, indices into uncertain (one, or a group)
    grouped: list[bool]
    tracked: list[bool]
    system_names: list[str]
    dry: float | None
    clip_dv: bool = True
    meta: dict = field(default_factory=dict)


def _spread(value: Any, name: str) -> Any:
    if not isinstance(value, SPREADS):
        raise TypeError(
            f"`{name}` must be a Normal, Uniform or Triangular spread, not {type(value).__name__}"
        )
    return value


def _keyed(value: Any, name: str, every: list[Any]) -> dict[Any, Any]:
    """A spread for every key, or a mapping of key to spread."""
    if value is None:
        return {}
    if isinstance(value, SPREADS):
        return dict.fromkeys(every, value)
    if not isinstance(value, Mapping):
        raise TypeError(
            f"`{name}` must be a spread or a mapping of names to spreads, not {type(value).__name__}"
        )
    return {key: _spread(spread, f"{name}[{key!r}]") for key, spread in value.items()}


def _line_index(budget: Any, key: Any, name: str) -> int:
    lines = budget.lines
    if isinstance(key, bool) or not isinstance(key, (int, str)):
        raise DomainError(f"`{name}` keys must be line labels or line numbers (from 0), got {key!r}")
    if isinstance(key, int):
        if not -len(lines) <= key < len(lines):
            raise DomainError(f"`{name}` names line {key}, but the budget has {len(lines)} lines")
        return key % len(lines)
    found = [i for i, line in enumerate(lines) if line.label == key]
    if not found:
        raise DomainError(f"`{name}` names no line of the budget: {key!r}")
    if len(found) > 1:
        raise DomainError(f"`{name}` key {key!r} names lines {found}: use the line number instead")
    return found[0]


def _specify(
    budget: Any, seed: int, isp: Any, dry_mass: Any, stage_mass: Any, dv: Any, loss: Any, margins: bool
):
    resolved = budget._resolve()
    names = list(budget.systems)
    stages = list(budget.stages)
    lines = budget.lines
    burns = [i for i, line in enumerate(lines) if line.kind == "burn"]
    uncertain: list[_Input] = []
    for system, spread in _keyed(isp, "isp", names).items():
        if system not in names:
            raise DomainError(
                f"`isp` names no system of the budget: {system!r} (its systems: {', '.join(names)})"
            )
        j = names.index(system)
        uncertain.append(_Input("isp", j, budget.systems[system].ve / G0, spread, f"isp: {system}", "s"))
    if dry_mass is not None:
        if resolved.dry_with_growth is None:
            raise DomainError("`dry_mass`: the budget has no dry mass to disperse (give it one)")
        uncertain.append(
            _Input("dry", 0, resolved.dry_with_growth, _spread(dry_mass, "dry_mass"), "dry mass", "kg")
        )
    for stage, spread in _keyed(stage_mass, "stage_mass", stages).items():
        if stage not in stages:
            raise DomainError(f"`stage_mass` names no stage of the budget: {stage!r}")
        k = stages.index(stage)
        uncertain.append(_Input("stage", k, resolved.stage_dry[k], spread, f"stage dry mass: {stage}", "kg"))
    for key, spread in _keyed(dv, "dv", burns).items():
        i = _line_index(budget, key, "dv")
        if lines[i].kind != "burn":
            raise DomainError(f"`dv` names line {i} ({lines[i].label!r}), a {lines[i].kind} with no delta-v")
        uncertain.append(_Input("dv", i, lines[i].dv, spread, f"dv: line {i + 1} ({lines[i].label})", "m/s"))
    for key, spread in _keyed(loss, "loss", names).items():
        if isinstance(key, str) and key in names:
            if any(line.label == key for line in lines):
                raise DomainError(f"`loss` key {key!r} names a system and a line: use the line number")
            members = tuple(i for i in burns if (lines[i].system or budget.main_system) == key)
            title = f"loss: {key}"
        else:
            i = _line_index(budget, key, "loss")
            members, title = (i,), f"loss: line {i + 1} ({lines[i].label})"
        nominal = tuple(lines[i].dv for i in members)
        uncertain.append(_Input("loss", members, nominal, spread, title, "m/s"))
    causes: dict[str, list[int]] = {}
    grouped: dict[str, bool] = {}
    for n, item in enumerate(uncertain):
        cause = item.spread.cause
        key = cause if cause is not None else item.name
        if key in causes and cause is None:
            raise DomainError(f"the input {item.name!r} is given twice")
        causes.setdefault(key, []).append(n)
        grouped[key] = cause is not None
    inputs = resolved.inputs
    margin = [line.margin if (margins and line.kind == "burn") else 0.0 for line in lines]
    return _Spec(
        seed=seed,
        plan=resolved.plan,
        inputs=inputs,
        base_dv=[line.dv if line.kind == "burn" else 0.0 for line in lines],
        margin=margin,
        uncertain=uncertain,
        causes=list(causes.items()),
        grouped=[grouped[key] for key in causes],
        tracked=[math.isfinite(u) for u in inputs.usable],
        system_names=names,
        dry=resolved.dry_with_growth,
    )


# ---------------------------------------------------------------------- one block of samples
def _deviation(item: _Input, raw: np.ndarray) -> Any:
    """The deviation in the input's unit (a relative spread scales the nominal value)."""
    if not item.spread.relative:
        return raw
    if isinstance(item.nominal, tuple):
        return [raw * value for value in item.nominal]
    return raw * item.nominal


def _flown_dv(spec: _Spec, n: int, moves: dict[int, Any]) -> tuple[list[Any], int]:
    """Each line's delta-v as flown: nominal plus its deviations, never below zero, then its margin."""
    dv, clipped = [], 0
    for i, base in enumerate(spec.base_dv):
        if i not in moves:
            dv.append(base * (1.0 + spec.margin[i]))
            continue
        value = base + moves[i]
        if value.min() < 0.0:
            clipped += int(np.count_nonzero(value < 0.0))
            np.maximum(value, 0.0, out=value)
        if spec.margin[i]:
            value *= 1.0 + spec.margin[i]
        dv.append(value)
    return dv, clipped


def _empty(spec: _Spec, n: int) -> dict[str, np.ndarray]:
    """Room for ``n`` samples of every output."""
    systems, lines, causes = len(spec.system_names), len(spec.base_dv), len(spec.causes)
    shapes = {
        "propellant_used": (systems, float),
        "propellant_left": (systems, float),
        "shortfall": (systems, float),
        "propellant_margin": (systems, float),
        "first_dry_line": ((), np.int64),
        "closes": ((), bool),
        "final_mass": ((), float),
        "isp": (systems, float),
        "dry_mass": ((), float),
        "dv": (lines, float),
        "cause_draw": (causes, float),
    }
    # one row per column of samples (system, line, cause): each is written and read whole
    return {
        key: np.empty(((tail,) if tail != () else ()) + (n,), dtype) for key, (tail, dtype) in shapes.items()
    }


def _block(
    spec: _Spec, index: int, n: int, into: dict[str, np.ndarray] | None = None, start: int = 0
) -> tuple[dict[str, np.ndarray], int]:
    """Fly ``n`` samples of random block ``index``, written to ``into`` from sample ``start``.

    Returns the samples written (views of ``into``, samples on the last axis) and how many
    delta-v draws were clipped at zero.
    """
    if into is None:
        into, start = _empty(spec, n), 0
    out = {key: value[..., start : start + n] for key, value in into.items()}
    rng = np.random.default_rng(np.random.SeedSequence(spec.seed, spawn_key=(index,)))
    raw: list[Any] = [None] * len(spec.uncertain)
    drivers = out["cause_draw"]
    for c, ((_, members), grouped) in enumerate(zip(spec.causes, spec.grouped)):
        if grouped:
            z = rng.standard_normal(out=drivers[c])
            for m in members:
                raw[m] = spec.uncertain[m].spread.from_normal(z)
        else:
            (m,) = members
            raw[m] = spec.uncertain[m].spread.draw(rng, drivers[c])
    nominal = spec.inputs
    ve = list(nominal.ve)
    m0 = np.full(n, float(nominal.m0))
    stage_dry = list(nominal.stage_dry)
    dry = None if spec.dry is None else np.full(n, spec.dry)
    moves: dict[int, Any] = {}
    for item, value in zip(spec.uncertain, raw):
        deviation = _deviation(item, value)
        if item.what == "isp":
            j = item.index
            ve[j] = nominal.ve[j] * (1.0 + value) if item.spread.relative else nominal.ve[j] + G0 * value
            if ve[j].min() <= 0.0:
                bad = int(np.count_nonzero(ve[j] <= 0.0))
                raise DomainError(
                    f"`isp` spread of system {spec.system_names[j]!r} draws a specific impulse <= 0 s "
                    f"in {bad} of {n} samples of block {index}: narrow it"
                )
        elif item.what in ("dry", "stage"):
            if item.what == "dry":
                dry = dry + deviation
                low = dry
            else:
                stage_dry[item.index] = stage_dry[item.index] + deviation
                low = stage_dry[item.index]
            if np.any(low <= 0.0):
                name = "dry_mass" if item.what == "dry" else "stage_mass"
                raise DomainError(f"`{name}` spread draws a dry mass <= 0 kg in some samples: narrow it")
            m0 = m0 + deviation
        elif item.what == "dv":
            moves[item.index] = moves.get(item.index, 0.0) + deviation
        else:  # a loss, on each of its lines
            parts = deviation if isinstance(deviation, list) else [deviation] * len(item.index)
            for i, part in zip(item.index, parts):
                moves[i] = moves.get(i, 0.0) + part
    dv, clipped = _flown_dv(spec, n, moves)
    inputs = _ledger.Inputs(
        m0=m0,
        ve=ve,
        usable=nominal.usable,
        residual=nominal.residual,
        stage_dry=stage_dry,
        dv=dv,
        line_ve=nominal.line_ve,
        mass=nominal.mass,
    )
    ledger = _ledger.run(spec.plan, inputs, keep_lines=False)
    for j, tracked in enumerate(spec.tracked):
        signed = ledger.left[j]
        out["propellant_used"][j] = ledger.used[j]
        out["propellant_margin"][j] = signed if tracked else np.nan
        if tracked:
            np.maximum(signed, 0.0, out=out["propellant_left"][j])
        else:
            out["propellant_left"][j] = np.nan
        if np.all(ledger.dry_at[j] < 0):
            out["shortfall"][j] = 0.0
        else:
            out["shortfall"][j] = np.where(ledger.dry_at[j] >= 0, -signed, 0.0)
        np.divide(ve[j], G0, out=out["isp"][j])
    out["first_dry_line"][:] = ledger.broken_at
    closes = out["closes"]
    closes[:] = ledger.broken_at < 0
    out["final_mass"][:] = np.where(closes, ledger.final, np.nan)
    out["dry_mass"][:] = np.nan if dry is None else dry
    for i, value in enumerate(dv):
        out["dv"][i] = value
    return out, clipped


def _blocks(samples: int) -> list[tuple[int, int]]:
    """(index, size) of each random block."""
    return [(k, min(BLOCK, samples - k * BLOCK)) for k in range(-(-samples // BLOCK))]


# ---------------------------------------------------------------------- summaries that merge across blocks
def _targets(out: dict[str, np.ndarray], tracked: list[bool]) -> np.ndarray:
    """The spreads the sensitivity explains: each tank's signed margin (0 untracked), then all of them."""
    margin = np.nan_to_num(out["propellant_margin"])
    return np.concatenate([margin, margin[np.array(tracked, dtype=bool)].sum(axis=0, keepdims=True)])


def _moments(out: dict[str, np.ndarray], tracked: list[bool]) -> tuple:
    """Count, closes, means, squared deviations and co-deviations of causes and targets in one block."""
    x, y = out["cause_draw"], _targets(out, tracked)
    n = x.shape[-1]
    mx, my = x.mean(axis=-1), y.mean(axis=-1)
    dx, dy = x - mx[:, None], y - my[:, None]
    return (
        n,
        int(np.count_nonzero(out["closes"])),
        mx,
        my,
        np.einsum("ij,ij->i", dx, dx),
        np.einsum("ij,ij->i", dy, dy),
        dx @ dy.T,
    )


def _merge(a: tuple, b: tuple) -> tuple:
    """Chan's pairwise update: the moments of two blocks as one (order fixed: same numbers every run)."""
    na, ca, mxa, mya, sxa, sya, cxya = a
    nb, cb, mxb, myb, sxb, syb, cxyb = b
    n = na + nb
    ddx, ddy = mxb - mxa, myb - mya
    w = na * nb / n
    return (
        n,
        ca + cb,
        mxa + ddx * nb / n,
        mya + ddy * nb / n,
        sxa + sxb + ddx * ddx * w,
        sya + syb + ddy * ddy * w,
        cxya + cxyb + np.outer(ddx, ddy) * w,
    )


def _correlation(moments: tuple) -> np.ndarray:
    _, _, _, _, sx, sy, cxy = moments
    with np.errstate(invalid="ignore", divide="ignore"):
        r = cxy / np.sqrt(np.outer(sx, sy))
    return np.where(np.isfinite(r), r, 0.0)


def _columns(out: dict[str, np.ndarray]) -> np.ndarray:
    """The values whose percentiles are wanted, one row each: (quantity x system, n), quantity first."""
    return np.concatenate([out[q] for q in QUANTITIES])


def _ranks(n: int, levels: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    position = (n - 1) * levels / 100.0
    low = np.floor(position).astype(np.int64)
    return low, np.minimum(low + 1, n - 1), position - low


def _lerp(a: np.ndarray, b: np.ndarray, t: np.ndarray) -> np.ndarray:
    """numpy's linear interpolation between order statistics (exact at both ends)."""
    diff = b - a
    return np.where(t >= 0.5, b - diff * (1.0 - t), a + diff * t)


def _percentiles_in_memory(outputs: dict[str, np.ndarray], levels: np.ndarray) -> np.ndarray:
    """Shape (system, quantity, level): exact order statistics, interpolated like numpy."""
    columns = _columns(outputs)  # one row per quantity and system
    n = columns.shape[-1]
    low, high, t = _ranks(n, levels)
    ordered = np.partition(columns, np.unique(np.concatenate([low, high])), axis=-1)
    out = _lerp(ordered[:, low], ordered[:, high], t)
    out[np.isnan(columns[:, 0])] = np.nan  # an untracked tank: no percentile
    return out.reshape(len(QUANTITIES), -1, len(levels)).transpose(1, 0, 2)


# ---------------------------------------------------------------------- exact selection for dask runs
def _extremes(columns: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return columns.min(axis=-1), columns.max(axis=-1)


def _bin_of(values: np.ndarray, low: float, high: float) -> np.ndarray:
    scaled = (values - low) / (high - low) * _BINS
    return np.clip(np.floor(scaled), 0, _BINS - 1).astype(np.int64)


def _histogram(columns: np.ndarray, low: np.ndarray, high: np.ndarray) -> np.ndarray:
    """Per column: counts at the low end, in each bin strictly inside, at the high end."""
    counts = np.zeros((columns.shape[0], _BINS + 2), dtype=np.int64)
    for c in range(columns.shape[0]):
        v, lo, hi = columns[c], low[c], high[c]
        if not np.isfinite(lo):
            continue
        counts[c, 0] = np.count_nonzero(v == lo)
        counts[c, -1] = np.count_nonzero(v == hi) if hi != lo else 0
        inside = v[(v > lo) & (v < hi)]
        if inside.size:
            counts[c, 1:-1] = np.bincount(_bin_of(inside, lo, hi), minlength=_BINS)
    return counts


def _wanted(counts: np.ndarray, ranks: np.ndarray) -> list[list[tuple[int, int]]]:
    """Per column, for each rank: (-1, 0) low end, (-2, 0) high end, or (bin, rank inside the bin)."""
    out = []
    for row in counts:
        n = int(row.sum())
        found = []
        cumulative = np.cumsum(row[1:-1])
        for r in ranks:
            if r < row[0]:
                found.append((-1, 0))
            elif r >= n - row[-1]:
                found.append((-2, 0))
            else:
                inner = r - row[0]
                b = int(np.searchsorted(cumulative, inner, side="right"))
                found.append((b, int(inner - (cumulative[b - 1] if b else 0))))
        out.append(found)
    return out


def _collect(columns: np.ndarray, low: np.ndarray, high: np.ndarray, bins: list[set[int]]) -> list[dict]:
    out = []
    for c in range(columns.shape[0]):
        picked: dict[int, np.ndarray] = {}
        if bins[c]:
            v = columns[c]
            inside = v[(v > low[c]) & (v < high[c])]
            which = _bin_of(inside, low[c], high[c])
            for b in bins[c]:
                picked[b] = inside[which == b]
        out.append(picked)
    return out


# ---------------------------------------------------------------------- the dataset
def _dataset(spec: _Spec, budget: Any, levels: np.ndarray, samples: dict[str, Any], summary: dict[str, Any]):
    import xarray as xr

    lines = budget.lines
    names = spec.system_names
    order = summary["order"]
    causes = [spec.causes[c][0] for c in order]
    dims = {
        "propellant_used": ("sample", "system"),
        "propellant_left": ("sample", "system"),
        "shortfall": ("sample", "system"),
        "propellant_margin": ("sample", "system"),
        "first_dry_line": ("sample",),
        "closes": ("sample",),
        "final_mass": ("sample",),
        "isp": ("sample", "system"),
        "dry_mass": ("sample",),
        "dv": ("sample", "line"),
        "cause_draw": ("sample", "cause"),
    }
    units = {
        "propellant_used": "kg",
        "propellant_left": "kg",
        "shortfall": "kg",
        "propellant_margin": "kg",
        "final_mass": "kg",
        "isp": "s",
        "dry_mass": "kg",
        "dv": "m/s",
        "percentiles": "kg",
        "nominal": "kg",
        "probability_closes": "1",
        "sensitivity": "1",
        "correlation": "1",
    }
    data = {}
    for key, value in samples.items():
        if key == "cause_draw":
            value = value[order]
        data[key] = (dims[key], value.T)  # kept one row per column of samples; shown samples first
    data["percentiles"] = (("system", "quantity", "percentile"), summary["percentiles"])
    data["nominal"] = (("system", "quantity"), summary["nominal"])
    data["probability_closes"] = ((), summary["probability"])
    data["sensitivity"] = (("cause",), summary["sensitivity"][order])
    data["correlation"] = (("cause", "target"), summary["correlation"][order])
    coords = {
        "sample": np.arange(summary["n"]),
        "system": names,
        "line": np.arange(1, len(lines) + 1),
        "label": ("line", [line.label for line in lines]),
        "cause": causes,
        "target": [*names, ALL_TANKS],
        "quantity": list(QUANTITIES),
        "percentile": levels,
    }
    ds = xr.Dataset(data, coords=coords)
    for key in ds.data_vars:
        ds[key].attrs["units"] = units.get(key, "")
    descriptions = []
    for c in order:
        name, members = spec.causes[c]
        parts = [
            f"{spec.uncertain[m].name}: {spec.uncertain[m].spread.describe(spec.uncertain[m].unit)}"
            for m in members
        ]
        descriptions.append(f"{name} (shared cause) <- {', '.join(parts)}" if spec.grouped[c] else parts[0])
    ds.attrs.update(
        title=f"Dispersion of {budget.name}" if budget.name else "Dispersion of a delta-v budget",
        samples=summary["n"],
        seed=spec.seed,
        margins="kept" if spec.meta["margins"] else "left out",
        spreads="; ".join(descriptions),
        percentiles="exact order statistics, linear interpolation as numpy.percentile",
        sensitivity="squared correlation of each cause with the propellant left, all tanks together",
        clipped_dv_samples=int(summary["clipped"]),
        caution=CAUTION,
    )
    return ds


def _nominal(spec: _Spec) -> np.ndarray:
    """The budget with no spread, as the dispersion flies it (margins as asked)."""
    quiet = _Spec(**{**spec.__dict__, "uncertain": [], "causes": [], "grouped": []})
    out, _ = _block(quiet, 0, 1)
    return _columns(out)[:, 0].reshape(len(QUANTITIES), -1).T  # (system, quantity)


def disperse(
    budget: Any,
    *,
    samples: int,
    seed: int,
    isp: Any = None,
    dry_mass: Any = None,
    stage_mass: Any = None,
    dv: Any = None,
    loss: Any = None,
    margins: bool = True,
    percentiles: Any = (1, 10, 50, 90, 99),
    chunks: int | None = None,
) -> Any:
    """Fly ``budget`` ``samples`` times with uncertain inputs; the samples and their summaries.

    Parameters
    ----------
    budget : Budget
        The budget to disperse (left untouched).
    samples : int
        Number of Monte Carlo samples (>= 2).
    seed : int
        Seed of the random streams (>= 0): the same seed, the same numbers.
    isp : spread or mapping of system name to spread, optional
        Specific impulse deviation (s, or a fraction with ``relative=True``);
        one spread alone applies to every system, each with its own draw.
    dry_mass : spread, optional
        Deviation of the vehicle's dry mass (kg, or a fraction).
    stage_mass : spread or mapping of stage name to spread, optional
        Deviation of each stage's dry mass.
    dv : spread or mapping of line label or number to spread, optional
        Deviation of each burn's delta-v (m/s, or a fraction of it); one
        spread alone applies to every burn, each with its own draw.
    loss : mapping of system name, line label or number to spread, optional
        Delta-v a finite thrust adds (m/s, or a fraction of the line's
        delta-v). Keyed by a system, one draw is shared by all its burns (the
        same engine loses on every burn).
    margins : bool, optional
        Keep each line's margin on top of its dispersed delta-v.
    percentiles : sequence of float, optional
        Levels in percent (0 to 100).
    chunks : int, optional
        Samples per dask task: forces the dask path (rounded up to whole
        blocks of 65,536).

    Returns
    -------
    xarray.Dataset
        Samples (``propellant_used``, ``propellant_left``, ``shortfall``,
        ``propellant_margin``, ``closes``, ``final_mass``, ``first_dry_line``,
        ``isp``, ``dry_mass``, ``dv``, ``cause_draw``) and summaries
        (``percentiles``, ``nominal``, ``probability_closes``,
        ``sensitivity``, ``correlation``); units in each variable's attrs.

    Examples
    --------
    >>> import deltakit as dk
    >>> from deltakit import Normal
    >>> b = dk.Budget(1500.0, 3150.0, dry_mass=700.0).add("transfer", 2000.0)
    >>> ds = dk.disperse(b, samples=10_000, seed=7, isp={"main": Normal(0.005, relative=True)})
    >>> p = ds.percentiles.sel(system="main", quantity="propellant_used")
    >>> nominal = ds.nominal.sel(system="main", quantity="propellant_used")
    >>> bool(p.sel(percentile=10) < nominal < p.sel(percentile=90))
    True
    """
    return _flown(locals()).dataset  # the arguments as given, by name


class _Flown:
    """A dispersion's arrays before they become a Dataset: what a panel reads at every step.

    :func:`disperse` returns ``_fly(...).dataset``; a panel keeps the arrays
    and builds the Dataset (a few milliseconds of xarray for a small run)
    only when asked, once.
    """

    def __init__(self, spec: _Spec, budget: Any, levels: np.ndarray, outputs: dict, summary: dict) -> None:
        self._parts = (spec, budget, levels, outputs, summary)
        self._dataset: Any = None
        order = summary["order"]
        self.systems: list[str] = list(spec.system_names)
        #: causes largest share first, as the Dataset's ``cause`` coordinate
        self.causes: list[str] = [spec.causes[c][0] for c in order]
        #: (cause, target) as the Dataset's ``correlation``: targets are the systems, then all tanks
        self.correlation: np.ndarray = summary["correlation"][order]
        #: (system, quantity, percentile) and (system, quantity), quantities as ``QUANTITIES``
        self.percentiles: np.ndarray = summary["percentiles"]
        self.nominal: np.ndarray = summary["nominal"]
        self.levels = levels
        self.probability_closes = float(summary["probability"])
        self.clipped = int(summary["clipped"])
        #: (system, sample): the propellant left above what the lines need (< 0: short)
        self.propellant_margin: np.ndarray = outputs["propellant_margin"]

    @property
    def dataset(self) -> Any:
        """The xarray.Dataset :func:`disperse` returns (built on first use, then the same object)."""
        if self._dataset is None:
            self._dataset = _dataset(*self._parts)
        return self._dataset


def _fly(budget: Any, **options: Any) -> _Flown:
    """:func:`disperse` with its keywords and defaults, its arrays kept as they are (see :class:`_Flown`)."""
    bound = _DISPERSE.bind(budget, **options)
    bound.apply_defaults()
    return _flown(bound.arguments)


_DISPERSE = inspect.signature(disperse)  # read once: _fly binds a panel's keywords to it


def _flown(arguments: Mapping[str, Any]) -> _Flown:
    """:func:`disperse`'s checks and run for its arguments by name."""
    budget, samples, seed = arguments["budget"], arguments["samples"], arguments["seed"]
    margins, percentiles, chunks = arguments["margins"], arguments["percentiles"], arguments["chunks"]
    from .budget import Budget

    if not isinstance(budget, Budget):
        raise TypeError(f"`budget` must be a deltakit.Budget, not {type(budget).__name__}")
    if isinstance(samples, bool) or not isinstance(samples, numbers.Integral) or samples < 2:
        raise DomainError(f"`samples` must be a whole number >= 2, got {samples!r}")
    if isinstance(seed, bool) or not isinstance(seed, numbers.Integral) or seed < 0:
        raise DomainError(f"`seed` must be a whole number >= 0, got {seed!r}")
    if not isinstance(margins, bool):
        raise DomainError(f"`margins` must be True or False, got {margins!r}")
    levels = np.asarray(percentiles, dtype=float).reshape(-1)
    if levels.size == 0 or not np.all((levels >= 0.0) & (levels <= 100.0)):
        raise DomainError(f"`percentiles` must be levels between 0 and 100 %, got {percentiles!r}")
    if chunks is not None and (
        isinstance(chunks, bool) or not isinstance(chunks, numbers.Integral) or chunks < 1
    ):
        raise DomainError(f"`chunks` must be a whole number of samples >= 1, got {chunks!r}")
    samples, seed = int(samples), int(seed)
    spreads = (arguments[name] for name in ("isp", "dry_mass", "stage_mass", "dv", "loss"))
    spec = _specify(budget, seed, *spreads, margins)
    spec.meta["margins"] = margins
    lazy = chunks is not None or samples > EAGER_LIMIT
    if lazy:
        blocks_per_task = max(1, -(-(chunks or DASK_CHUNK) // BLOCK))
        outputs, summary = _run_dask(spec, samples, levels, blocks_per_task)
    else:
        outputs, summary = _run_in_memory(spec, samples, levels)
    summary["nominal"] = _nominal(spec)
    return _Flown(spec, budget, levels, outputs, summary)


def _finish(spec: _Spec, moments: tuple, clipped: int, percentiles: np.ndarray) -> dict[str, Any]:
    correlation = _correlation(moments)
    sensitivity = correlation[:, -1] ** 2
    order = np.argsort(-sensitivity, kind="stable")
    return {
        "n": moments[0],
        "probability": moments[1] / moments[0],
        "correlation": correlation,
        "sensitivity": sensitivity,
        "order": order,
        "percentiles": percentiles,
        "clipped": clipped,
    }


def _run_in_memory(spec: _Spec, samples: int, levels: np.ndarray) -> tuple[dict, dict]:
    outputs = _empty(spec, samples)
    moments, clipped = None, 0
    for index, size in _blocks(samples):
        out, count = _block(spec, index, size, outputs, index * BLOCK)
        clipped += count
        step = _moments(out, spec.tracked)
        moments = step if moments is None else _merge(moments, step)
    percentiles = _percentiles_in_memory(outputs, levels)
    return outputs, _finish(spec, moments, clipped, percentiles)


def _run_dask(spec: _Spec, samples: int, levels: np.ndarray, blocks_per_task: int) -> tuple[dict, dict]:
    import dask
    import dask.array as da

    blocks = _blocks(samples)
    tasks = [blocks[i : i + blocks_per_task] for i in range(0, len(blocks), blocks_per_task)]

    def fly(task: list[tuple[int, int]]) -> dict[str, np.ndarray]:
        into = _empty(spec, sum(size for _, size in task))
        offset = 0
        for index, size in task:
            _block(spec, index, size, into, offset)
            offset += size
        return into

    def first_pass(task):
        flown = [_block(spec, index, size) for index, size in task]
        low, high = zip(*(_extremes(_columns(out)) for out, _ in flown))
        moments = [_moments(out, spec.tracked) for out, _ in flown]
        return moments, sum(count for _, count in flown), np.min(low, axis=0), np.max(high, axis=0)

    first = dask.compute(*[dask.delayed(first_pass)(task) for task in tasks])
    moments = None
    for block_moments, _, _, _ in first:
        for step in block_moments:
            moments = step if moments is None else _merge(moments, step)
    clipped = sum(f[1] for f in first)
    low = np.min([f[2] for f in first], axis=0)
    high = np.max([f[3] for f in first], axis=0)

    def second_pass(task):
        return sum(_histogram(_columns(_block(spec, index, size)[0]), low, high) for index, size in task)

    counts = sum(dask.compute(*[dask.delayed(second_pass)(task) for task in tasks]))
    rank_low, rank_high, t = _ranks(samples, levels)
    ranks = np.concatenate([rank_low, rank_high])
    wanted = _wanted(counts, ranks)
    bins = [{b for b, _ in column if b >= 0} for column in wanted]

    def third_pass(task):
        return [_collect(_columns(_block(spec, index, size)[0]), low, high, bins) for index, size in task]

    picked_blocks = [
        block for task in dask.compute(*[dask.delayed(third_pass)(t) for t in tasks]) for block in task
    ]
    columns = len(wanted)
    values = np.full((columns, len(ranks)), np.nan)
    for c in range(columns):
        if not np.isfinite(low[c]):
            continue
        gathered = {b: np.sort(np.concatenate([p[c][b] for p in picked_blocks])) for b in bins[c]}
        for r, (b, inner) in enumerate(wanted[c]):
            values[c, r] = low[c] if b == -1 else high[c] if b == -2 else gathered[b][inner]
    n_levels = len(levels)
    result = _lerp(values[:, :n_levels], values[:, n_levels:], t)
    shape = (len(QUANTITIES), len(spec.system_names))
    percentiles = result.reshape(shape + (n_levels,)).transpose(1, 0, 2)

    # the samples themselves stay lazy, one dask chunk per task
    delayed = [dask.delayed(fly)(task) for task in tasks]
    sizes = [sum(size for _, size in task) for task in tasks]
    example = _empty(spec, 1)
    outputs = {}
    for key, value in example.items():
        pieces = [
            da.from_delayed(d[key], shape=value.shape[:-1] + (size,), dtype=value.dtype)
            for d, size in zip(delayed, sizes)
        ]
        outputs[key] = da.concatenate(pieces, axis=-1)
    return outputs, _finish(spec, moments, clipped, percentiles)
