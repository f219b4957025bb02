"""Trade-study sweeps: one numeric function over the outer product of named axes.

:func:`sweep` calls any function of the numeric layer (or an analyst's own
function built from them) on every combination of the 1-D axes it is given and
returns an :class:`xarray.Dataset` labelled by parameter: one dimension and
coordinate per axis, one data variable per result field, units in ``attrs``.

Conventions
-----------
* SI units, as everywhere in deltakit; the ``units`` attribute of every
  coordinate and variable says which.
* The function is called with keyword arguments only. Each axis is reshaped to
  an open-grid shape (``np.ix_`` style: length ``n`` on its own dimension, 1
  elsewhere), so the function broadcasts the grid itself and no meshgrid is
  ever materialised.
* Small grids are evaluated at once with NumPy. Large grids, or any grid when
  ``chunks=`` is given, come back lazy: dask arrays whose blocks are NumPy
  calls of the same function, so a reduction such as ``.max("nu")`` runs block
  by block in bounded memory. With a ``dask.distributed`` ``Client`` active,
  ``.compute()`` runs on its cluster; nothing else changes.
* :func:`save_sweep` writes a sweep to a Zarr store (a folder) atomically and
  refuses to overwrite anything that is not a sweep; :func:`open_sweep` reads
  it back and refuses corrupt, foreign or newer stores.
* xarray, dask and zarr are the ``scale`` extra (``pip install deltakit[scale]``);
  they are imported only when a sweep is made, saved or opened.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import dataclasses
import functools
import inspect
import itertools
import math
import os
import uuid
from collections.abc import Callable, Iterator, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from .errors import DomainError

if TYPE_CHECKING:  # the `scale` extra; imported at run time only inside the functions
    import xarray

__all__ = ["EAGER_LIMIT", "KNOWN_UNITS", "OPTIONS", "open_sweep", "save_sweep", "sweep"]

#: Grids with at most this many cases are evaluated eagerly when ``chunks`` is None.
EAGER_LIMIT: int = 1 << 22

#: Cases per block when the sweep goes lazy without an explicit chunk layout.
#: 8 MB per float64 variable. Measured on our 2-core machines with two dask
#: threads: blocks of 2^18 cases spent so much time in the scheduler and in
#: Python between NumPy calls that the sweep got about 1.1 cores; 2^20 gets
#: about 1.3 and nearly doubles the cases per second, and 2^22 gains little
#: more while a wide result (seven fields of a burn) would need over 1 GB.
_BLOCK_CASES: int = 1 << 20

#: Grids so large that blocks of :data:`_BLOCK_CASES` would make more than this
#: many tasks get larger blocks (fewer tasks for the scheduler to hold) ...
_MAX_BLOCKS: int = 1 << 16
#: ... up to this many cases per block (128 MB per float64 variable).
_LARGEST_BLOCK: int = 1 << 24

#: Keywords of :func:`sweep` itself. A parameter of the swept function with one
#: of these names is given in the ``axes`` mapping or in ``fixed``.
OPTIONS: tuple[str, ...] = ("chunks", "fixed", "units", "name")

#: Units of the parameter and plain-result names of the numeric layer (DESIGN.md vocabulary).
KNOWN_UNITS: dict[str, str] = {
    "nu": "rad",
    "nu_center": "rad",
    "angle": "rad",
    "argp": "rad",
    "dv": "m/s",
    "v": "m/s",
    "v0": "m/s",
    "v1": "m/s",
    "v2": "m/s",
    "ve": "m/s",
    "u": "m/s",
    "vinf": "m/s",
    "vinf_in": "m/s",
    "radial": "m/s",
    "transverse": "m/s",
    "r": "m",
    "rp": "m",
    "ra": "m",
    "r1": "m",
    "r2": "m",
    "rb": "m",
    "a": "m",
    "e": "1",
    "mu": "m^3/s^2",
    "isp": "s",
    "m0": "kg",
    "mf": "kg",
    "m_vehicle": "kg",
    "m_ejected": "kg",
    "thrust": "N",
    "splits": "1",
    "margin": "1",
    # plain-array results, named after their function
    "circular_speed": "m/s",
    "escape_speed": "m/s",
    "vis_viva": "m/s",
    "specific_energy": "J/kg",
    "energy_gain": "J/kg",
    "exhaust_velocity": "m/s",
    "rocket_dv": "m/s",
    "propellant_mass": "kg",
    "plane_change": "m/s",
    "combined_plane_change": "m/s",
    "propulsive_efficiency": "1",
}

#: Attribute that marks a dataset (and a file) as a deltakit sweep, and its format version.
_TAG = "deltakit_sweep"
_FORMAT_VERSION = 1


def _import_scale() -> tuple[Any, Any]:
    try:
        import dask.array as da
        import xarray as xr
    except ImportError as err:  # pragma: no cover - depends on the environment
        raise ImportError(
            "deltakit.sweep needs xarray, dask and zarr, the `scale` extra: "
            "pip install 'deltakit[scale]' (missing: " + str(err.name) + ")"
        ) from err
    return xr, da


# ---------------------------------------------------------------------- result fields
def _flatten(value: Any, name: str, unit: str, out: dict[str, tuple[Any, str]]) -> None:
    """Spread a result into named arrays: dataclass fields, tuple items, dict keys."""
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        for field in dataclasses.fields(value):
            child = field.name if not name else f"{name}_{field.name}"
            _flatten(getattr(value, field.name), child, field.metadata.get("unit", ""), out)
    elif isinstance(value, Mapping):
        for key, item in value.items():
            _flatten(item, str(key) if not name else f"{name}_{key}", unit, out)
    elif isinstance(value, tuple):
        stem = name[:-1] if name.endswith("s") and not name.endswith("ss") else name
        for number, item in enumerate(value, start=1):
            _flatten(item, f"{stem}_{number}", unit, out)
    else:
        out[name or "value"] = (value, unit)


def _fields(result: Any, name: str) -> dict[str, tuple[Any, str]]:
    out: dict[str, tuple[Any, str]] = {}
    top = dataclasses.is_dataclass(result) or isinstance(result, Mapping)
    _flatten(result, "" if top else name, "", out)
    return out


def _arrays(result: Any, name: str, shape: tuple[int, ...]) -> dict[str, np.ndarray]:
    """The result's fields as arrays of the block shape, in a fixed order."""
    arrays = {}
    for key, (value, _) in _fields(result, name).items():
        value = np.asarray(value)
        if value.shape == shape:
            arrays[key] = value
            continue
        try:
            arrays[key] = np.broadcast_to(value, shape)
        except ValueError:
            raise ValueError(
                f"sweep: result field `{key}` has shape {value.shape}, which does not broadcast "
                f"to the grid shape {shape}; sweep handles results with one value per case"
            ) from None
    return arrays


# ---------------------------------------------------------------------- axes
def _function_name(function: Callable[..., Any]) -> str:
    while isinstance(function, functools.partial):
        function = function.func
    name = getattr(function, "__name__", "value")
    return "value" if name == "<lambda>" else name


def _function_path(function: Callable[..., Any]) -> str:
    while isinstance(function, functools.partial):
        function = function.func
    module = getattr(function, "__module__", None) or ""
    return f"{module}.{_function_name(function)}".lstrip(".")


def _check_parameters(function: Callable[..., Any], names: list[str]) -> None:
    try:
        signature = inspect.signature(function)
    except (TypeError, ValueError):  # builtins and ufuncs without a signature
        return
    parameters = signature.parameters
    if any(p.kind is inspect.Parameter.VAR_KEYWORD for p in parameters.values()):
        return
    for name in names:
        parameter = parameters.get(name)
        if parameter is None or parameter.kind is inspect.Parameter.POSITIONAL_ONLY:
            raise TypeError(
                f"sweep: `{name}` is not a keyword parameter of {_function_name(function)}{signature}"
            )


def _check_options(function: Callable[..., Any], options: dict[str, Any], given_names: set[str]) -> None:
    """Refuse an option keyword that ``function`` would also take as its own parameter."""
    try:
        parameters = inspect.signature(function).parameters
    except (TypeError, ValueError):
        return
    for option, value in options.items():
        if value is None or option not in parameters or option in given_names:
            continue
        raise TypeError(
            f"sweep: `{option}=` is sweep's own option, and {_function_name(function)} also has a "
            f"parameter `{option}`; give that parameter in the axes mapping, "
            f"sweep(f, {{{option!r}: ...}}), or in fixed={{{option!r}: ...}}"
        )


def _axis(value: Any, name: str) -> np.ndarray:
    array = np.asarray(value)
    if array.ndim != 1:
        raise DomainError(
            f"sweep axis `{name}` must be 1-D (or a scalar for a fixed value), got shape {array.shape}"
        )
    if array.size == 0:
        raise DomainError(f"sweep axis `{name}` must have at least one value, got none")
    return array


def _open_grid(
    axes: dict[str, np.ndarray], blocks: dict[str, np.ndarray] | None = None
) -> dict[str, np.ndarray]:
    """Each axis (or its block) reshaped to length n on its own dimension, 1 elsewhere."""
    blocks = axes if blocks is None else blocks
    ndim = len(axes)
    grid = {}
    for position, name in enumerate(axes):
        shape = [1] * ndim
        shape[position] = blocks[name].size
        grid[name] = blocks[name].reshape(shape)
    return grid


def _auto_block_cases(cases: int) -> int:
    """Cases per block of the automatic layout: :data:`_BLOCK_CASES`, larger for huge grids."""
    return int(min(max(_BLOCK_CASES, -(-cases // _MAX_BLOCKS)), _LARGEST_BLOCK))


def _block_layout(axes: dict[str, np.ndarray], chunks: Any) -> dict[str, int]:
    """Chunk length per axis from ``chunks``: dict, int (cases per block) or "auto"."""
    sizes = {name: axis.size for name, axis in axes.items()}
    if isinstance(chunks, Mapping):
        unknown = set(chunks) - set(sizes)
        if unknown:
            raise ValueError(f"sweep: `chunks` names {sorted(unknown)}, which are not axes ({list(sizes)})")
        layout = {}
        for name, size in sizes.items():
            length = chunks.get(name, size)
            length = size if length in (None, -1) else int(length)
            if length < 1:
                raise ValueError(f"sweep: `chunks[{name!r}]` must be >= 1 or -1 (whole axis), got {length}")
            layout[name] = min(length, size)
        return layout
    if chunks is None or chunks == "auto":
        target = _auto_block_cases(math.prod(sizes.values()))
    elif isinstance(chunks, (int, np.integer)) and not isinstance(chunks, bool) and chunks >= 1:
        target = int(chunks)
    else:
        raise ValueError(
            "sweep: `chunks` must be None, 'auto', a number of cases per block (int >= 1) "
            f"or a dict axis -> chunk length, got {chunks!r}"
        )
    # Keep the trailing axes whole while they fit, split the one that overflows,
    # and give the leading axes one value per block.
    layout, room = {}, target
    for name in reversed(list(sizes)):
        length = max(1, min(sizes[name], room))
        layout[name] = length
        room = max(1, room // length)
    return {name: layout[name] for name in sizes}


# ---------------------------------------------------------------------- evaluation
def _evaluate(function: Callable[..., Any], fixed: dict[str, Any], grid: dict[str, np.ndarray]) -> Any:
    return function(**grid, **fixed)


def _block(function, fixed, names, name, *blocks):
    """One dask block: the function on the open grid of these axis blocks."""
    block_axes = dict(zip(names, blocks))
    grid = _open_grid(block_axes)
    shape = tuple(b.size for b in blocks)
    return _arrays(_evaluate(function, fixed, grid), name, shape)


def _pick(fields: dict[str, np.ndarray], key: str) -> np.ndarray:
    # Blocks must be ordinary arrays for dask and the writers: a broadcast view
    # (a field that did not depend on every axis) is copied, a full array is not.
    return np.ascontiguousarray(fields[key])


def _evaluate_and_pick(
    evaluate: Callable[..., dict[str, np.ndarray]], key: str, *blocks: np.ndarray
) -> np.ndarray:
    return _pick(evaluate(*blocks), key)


class _BlockTasks(Mapping):
    """The tasks of one graph layer, one per block, made when asked for.

    A sweep of 10^13 cases has some 10^6 blocks; holding a task for each
    would take gigabytes before anything is computed. This mapping makes the
    task of a block from its key on demand, so the graph costs a few numbers
    per axis, and dask's culling asks only for the blocks a computation needs.
    ``make(index, bounds)`` returns the task of the block at ``index``.
    """

    def __init__(self, name: str, bounds: list[list[tuple[int, int]]], make: Callable[..., Any]) -> None:
        self.name, self.bounds, self.make = name, bounds, make
        self.shape = tuple(len(axis) for axis in bounds)

    def _index(self, key: Any) -> tuple[int, ...] | None:
        if not (isinstance(key, tuple) and len(key) == len(self.shape) + 1 and key[0] == self.name):
            return None
        index = key[1:]
        if all(isinstance(i, int) and 0 <= i < n for i, n in zip(index, self.shape)):
            return index
        return None

    def __getitem__(self, key: Any) -> Any:
        index = self._index(key)
        if index is None:
            raise KeyError(key)
        return self.make(index, [self.bounds[d][i] for d, i in enumerate(index)])

    def __contains__(self, key: object) -> bool:
        return self._index(key) is not None

    def __iter__(self) -> Iterator[tuple[Any, ...]]:
        for index in itertools.product(*(range(n) for n in self.shape)):
            yield (self.name, *index)

    def __len__(self) -> int:
        return math.prod(self.shape)


def _lazy_fields(
    da: Any,
    evaluate: Callable[..., dict[str, np.ndarray]],
    swept: dict[str, np.ndarray],
    layout: dict[str, int],
    fields: dict[str, tuple[np.dtype, str]],
) -> dict[str, Any]:
    """One dask array per result field, over a graph of one NumPy call per block.

    Each block task holds its own slices of the axes (a few numbers), so the
    blocks are independent roots: no shared input tasks, nothing for the
    scheduler to fuse or order inside a task. With several fields, one task per
    block calls the function and one small task per field picks its array, so
    a block is evaluated once however many fields are computed together. The
    tasks are made on demand (:class:`_BlockTasks`): building a sweep costs the
    same for 10^3 cases as for 10^13.
    """
    from dask.base import tokenize
    from dask.highlevelgraph import HighLevelGraph, MaterializedLayer

    names = list(swept)
    bounds = []
    for key in names:
        size, step = swept[key].size, layout[key]
        bounds.append([(start, min(start + step, size)) for start in range(0, size, step)])
    chunks = tuple(tuple(stop - start for start, stop in axis) for axis in bounds)
    try:
        token = tokenize(evaluate, *swept.values(), layout)
    except Exception:  # noqa: BLE001 - an object dask cannot hash: a fresh name is as good
        token = uuid.uuid4().hex
    raw_name = f"deltakit-sweep-{token}"
    axes = [swept[key] for key in names]

    def slices(block_bounds: list[tuple[int, int]]) -> list[np.ndarray]:
        return [axis[start:stop] for axis, (start, stop) in zip(axes, block_bounds)]

    def meta(dtype: np.dtype) -> np.ndarray:
        return np.empty((0,) * len(names), dtype=dtype)

    if len(fields) == 1:  # one field: the block task returns its array, nothing to pick
        ((key, (dtype, _)),) = fields.items()
        pick = functools.partial(_evaluate_and_pick, evaluate, key)
        single = _BlockTasks(raw_name, bounds, lambda index, b: (pick, *slices(b)))
        graph = HighLevelGraph({raw_name: MaterializedLayer(single)}, {raw_name: set()})
        return {key: da.Array(graph, raw_name, chunks, meta=meta(dtype))}
    tasks = MaterializedLayer(_BlockTasks(raw_name, bounds, lambda index, b: (evaluate, *slices(b))))
    data = {}
    for key, (dtype, _) in fields.items():
        name = f"{raw_name}-{key}"
        pick = functools.partial(_pick, key=key)
        picks = _BlockTasks(name, bounds, lambda index, b, pick=pick: (pick, (raw_name, *index)))
        graph = HighLevelGraph(
            {raw_name: tasks, name: MaterializedLayer(picks)}, {raw_name: set(), name: {raw_name}}
        )
        data[key] = da.Array(graph, name, chunks, meta=meta(dtype))
    return data


def sweep(
    function: Callable[..., Any],
    axes: Mapping[str, Any] | None = None,
    /,
    *,
    chunks: Any = None,
    fixed: Mapping[str, Any] | None = None,
    units: Mapping[str, str] | None = None,
    name: str | None = None,
    **more_axes: Any,
) -> xarray.Dataset:
    """Evaluate ``function`` over the outer product of named 1-D axes.

    The axes are given as keywords (``sweep(f, nu=..., dv=...)``) or as a
    mapping (``sweep(f, {"nu": ..., "dv": ...})``), or both. Keywords named
    like an option of ``sweep`` itself (``chunks``, ``fixed``, ``units``,
    ``name``) are always the option: a parameter of ``function`` with such
    a name goes in the mapping (an axis) or in ``fixed``.

    Parameters
    ----------
    function : callable
        A numeric-layer function or the analyst's own. It is called with keyword
        arguments only and must broadcast like a ufunc. It may return an array,
        a frozen result dataclass (one variable per field; a tuple field such as
        ``Transfer.burns`` gives ``burn_1``, ``burn_2``...; a nested result such
        as a :class:`~deltakit.Conic` gives ``after_rp``, ``after_e``...), a
        tuple (``<name>_1``, ``<name>_2``...) or a dict (one variable per key).
    chunks : None, "auto", int, dict or False, optional
        ``None``: eager NumPy for grids up to :data:`EAGER_LIMIT` cases, lazy
        dask beyond. ``"auto"`` or an int (cases per block; trailing axes
        are kept whole first) or a dict (axis -> chunk length, ``-1`` for the
        whole axis; axes not named stay whole): always lazy.
        ``False``: always eager.
    fixed : dict, optional
        Parameters held fixed, passed unchanged to every call. Numeric scalars
        given directly as keywords are treated the same way; numeric fixed
        values are kept as scalar coordinates, others as a text attribute.
    units : dict, optional
        Unit per axis or result field, overriding the units found in result
        metadata and :data:`KNOWN_UNITS`.
    name : str, optional
        Variable name for a plain-array result (default: the function's name,
        ``"value"`` for a lambda).
    axes : mapping of str to array_like, optional (positional only)
        Axes by parameter name, any name allowed (``"units"`` too); they come
        first in the output dimensions, then the keyword axes.
    **more_axes : array_like, shape (n,)
        One 1-D axis per swept parameter, in the order of the output dimensions.
        A scalar (0-d) value is a fixed parameter instead, in the mapping too.

    Returns
    -------
    xarray.Dataset
        Dimensions and coordinates named after the axes; ``attrs`` hold the
        function's name and the deltakit sweep tag used by :func:`save_sweep`.

    Raises
    ------
    TypeError
        If an axis or fixed value is not a parameter of ``function``.
    deltakit.DomainError
        If an axis is not 1-D or is empty, and whatever the function raises for
        its first case (checked at once, also for a lazy sweep).

    Notes
    -----
    A lazy sweep is reduced and computed with xarray as usual
    (``ds["energy_change"].max("nu").compute()``); each block is one NumPy call
    of ``function`` and every field of a block comes from that one call. With a
    ``dask.distributed.Client`` active, ``.compute()`` runs on its workers; the
    function and the fixed values then travel by cloudpickle, which handles
    lambdas and closures. The graph is made on demand, so building a sweep
    costs next to nothing however large it is; blocks hold about 2^20 cases
    by default, and more (up to 2^24) when the grid would otherwise need
    more than 2^16 blocks, so that computing a huge sweep keeps the
    scheduler's task list small too.

    Examples
    --------
    >>> import numpy as np
    >>> import deltakit as dk
    >>> from deltakit.constants import EARTH
    >>> ds = dk.sweep(dk.circular_speed, r=[7000e3, 8000e3], mu=EARTH.mu)
    >>> ds["circular_speed"].attrs["units"], ds["r"].attrs["units"]
    ('m/s', 'm')
    >>> np.round(ds["circular_speed"].values, 1)
    array([7546.1, 7058.7])
    """
    xr, da = _import_scale()
    fixed = dict(fixed or {})
    if isinstance(function, functools.partial) and not function.args:
        # unwrap, so the partial's keywords are recorded like any fixed value
        fixed = {**function.keywords, **fixed}
        function = function.func
    units = dict(units or {})
    given = dict(axes or {})
    for key in more_axes:
        if key in given:
            raise TypeError(f"sweep: axis `{key}` given both in the mapping and as a keyword")
    given.update(more_axes)
    swept: dict[str, np.ndarray] = {}
    for key, value in given.items():
        if np.ndim(value) == 0:
            if key in fixed:
                raise TypeError(f"sweep: `{key}` given both as a keyword and in `fixed`")
            fixed[key] = value
        else:
            swept[key] = _axis(value, key)
    if not swept:
        raise TypeError("sweep: give at least one 1-D axis, e.g. sweep(f, dv=np.linspace(0, 1000, 11))")
    overlap = set(swept) & set(fixed)
    if overlap:
        raise TypeError(f"sweep: {sorted(overlap)} given both as an axis and in `fixed`")
    _check_parameters(function, [*swept, *fixed])
    _check_options(
        function,
        {"chunks": chunks, "fixed": fixed or None, "units": units or None, "name": name},
        given_names={*swept, *fixed},
    )
    result_name = name or _function_name(function)

    # Probe the first case: field names, units and dtypes, and an early error.
    first = {key: axis[:1] for key, axis in swept.items()}
    probe = _fields(_evaluate(function, fixed, _open_grid(swept, first)), result_name)
    fields = {key: (np.asarray(value).dtype, unit) for key, (value, unit) in probe.items()}

    shape = tuple(axis.size for axis in swept.values())
    cases = math.prod(shape)
    lazy = chunks is not False and (chunks is not None or cases > EAGER_LIMIT)
    dims = tuple(swept)
    if not lazy:
        arrays = _arrays(_evaluate(function, fixed, _open_grid(swept)), result_name, shape)
        data = {key: np.array(value) for key, value in arrays.items()}
    else:
        layout = _block_layout(swept, None if chunks is False else chunks)
        evaluate = functools.partial(_block, function, fixed, dims, result_name)
        data = _lazy_fields(da, evaluate, swept, layout, fields)

    coords: dict[str, Any] = {}
    for key, axis in swept.items():
        unit = units.get(key, KNOWN_UNITS.get(key, ""))
        coords[key] = xr.Variable(key, axis, attrs={"units": unit} if unit else {})
    others = {}
    for key, value in fixed.items():
        if not isinstance(value, bool) and np.ndim(value) == 0 and np.asarray(value).dtype.kind in "fiu":
            unit = units.get(key, KNOWN_UNITS.get(key, ""))
            coords[key] = xr.Variable((), np.asarray(value), attrs={"units": unit} if unit else {})
        else:
            others[key] = repr(value)

    variables = {}
    for key, values in data.items():
        var_name = f"{key}_out" if key in coords else key
        unit = units.get(key, fields[key][1] or KNOWN_UNITS.get(key, ""))
        variables[var_name] = xr.Variable(dims, values, attrs={"units": unit} if unit else {})

    attrs = {
        _TAG: _FORMAT_VERSION,
        "function": _function_path(function),
        "caution": "Preliminary analysis only, not for flight operations.",
    }
    if others:
        attrs["fixed"] = ", ".join(f"{k}={v}" for k, v in others.items())
    return xr.Dataset(variables, coords=coords, attrs=attrs)


# ---------------------------------------------------------------------- saving
def _read_tag(path: Path, xr: Any) -> Any:
    """The sweep tag of a saved sweep, or None for anything that is not one."""
    try:
        with xr.open_zarr(path, consolidated=False, chunks=None) as ds:
            return ds.attrs.get(_TAG)
    except Exception:  # noqa: BLE001 - anything unreadable is not ours
        return None


def _missing_chunks(path: Path) -> list[str]:
    """Names of the stored arrays with fewer chunks on disk than their shape needs."""
    import zarr

    group = zarr.open_group(path, mode="r")
    return [name for name, array in group.arrays() if array.nchunks_initialized < array.nchunks]


def save_sweep(dataset: xarray.Dataset, path: str | os.PathLike[str]) -> Path:
    """Write a sweep to a Zarr store (a folder), atomically; lazy sweeps stream block by block.

    The path becomes a symbolic link to a versioned folder beside it
    (``.NAME.STAMP.v``). The new store is written and read back in full
    before the link is swapped to it in one step, and the old version is
    removed only after that: at every instant, a complete sweep (old or new)
    opens at ``path``, even if the save is killed. Two saves of one path at
    once run one after the other (a lock file ``.NAME.save.lock``); anything
    at ``path`` that is not a deltakit sweep is refused and left untouched.

    Parameters
    ----------
    dataset : xarray.Dataset
        A result of :func:`sweep` (or a reduction of one that kept its attrs).
    path : str or path-like
        Target, conventionally ``*.zarr``. A symbolic link of your own is
        followed and kept.

    Returns
    -------
    pathlib.Path
        The path written.

    Raises
    ------
    deltakit.DomainError
        If ``path`` exists and is not a deltakit sweep (it is left untouched),
        or if ``dataset`` carries no deltakit sweep tag.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> import deltakit as dk
    >>> from deltakit.sweeps import save_sweep, open_sweep
    >>> ds = dk.sweep(dk.circular_speed, r=[7000e3, 8000e3], mu=3.986e14)
    >>> path = pathlib.Path(tempfile.mkdtemp()) / "speeds.zarr"
    >>> back = open_sweep(save_sweep(ds, path))
    >>> back.identical(ds)
    True
    """
    from ._folders import write_folder

    xr, _ = _import_scale()
    if not isinstance(dataset, xr.Dataset) or _TAG not in dataset.attrs:
        raise DomainError(
            "save_sweep: `dataset` must be a deltakit sweep (an xarray.Dataset made by deltakit.sweep)"
        )

    def fill(folder: Path) -> None:
        # every chunk written, even all-NaN ones, so a missing chunk reveals damage
        dataset.to_zarr(folder, mode="w", consolidated=False, write_empty_chunks=True)
        if _read_tag(folder, xr) != dataset.attrs[_TAG]:  # read back before it replaces anything
            raise OSError(f"save_sweep: the store written to {folder} does not read back")

    try:
        return write_folder(
            path, fill, kind="deltakit sweep", same_kind=lambda p: _read_tag(p, xr) is not None
        )
    except FileExistsError:
        raise DomainError(f"save_sweep: refusing to overwrite {path}: it is not a deltakit sweep") from None


def open_sweep(path: str | os.PathLike[str], *, chunks: Any = None) -> xarray.Dataset:
    """Reopen a sweep saved by :func:`save_sweep`.

    Parameters
    ----------
    path : str or path-like
        A Zarr store written by :func:`save_sweep`.
    chunks : dict or "auto", optional
        ``None`` (default) loads everything into memory; otherwise the
        variables stay lazy dask arrays read block by block, from the
        version that was at ``path`` when it was opened.

    Raises
    ------
    FileNotFoundError
        If there is nothing at ``path``.
    deltakit.DomainError
        If the store is unreadable, corrupt, not a deltakit sweep, or of a
        newer format than this deltakit reads. The store is never modified;
        what a killed save left beside it is removed, and if it left no
        sweep at ``path``, the newest complete version is put back there
        (with a warning).

    Examples
    --------
    See :func:`save_sweep`.
    """
    from ._folders import open_folder

    xr, _ = _import_scale()
    shown = path
    # the version current now: a lazy sweep keeps reading it, never a mix with a later save
    path = os.path.realpath(open_folder(path, kind="deltakit sweep"))
    try:
        dataset = xr.open_zarr(path, consolidated=False, chunks=chunks)
    except Exception as err:
        raise DomainError(
            f"open_sweep: {shown} is not a readable Zarr store ({type(err).__name__}: {err})"
        ) from err
    version = dataset.attrs.get(_TAG)
    if version is None:
        dataset.close()
        raise DomainError(f"open_sweep: {shown} is not a deltakit sweep (no `{_TAG}` attribute)")
    if not isinstance(version, (int, np.integer)) or not 1 <= version <= _FORMAT_VERSION:
        dataset.close()
        raise DomainError(
            f"open_sweep: {shown} has sweep format version {version!r}; this "
            f"deltakit reads 1 to {_FORMAT_VERSION}"
        )
    try:
        missing = _missing_chunks(path)
    except Exception as err:
        dataset.close()
        raise DomainError(f"open_sweep: {shown} is corrupt ({type(err).__name__}: {err})") from err
    if missing:
        dataset.close()
        raise DomainError(f"open_sweep: {shown} is corrupt: chunks missing in {', '.join(missing)}")
    if chunks is None:
        try:
            dataset = dataset.load()
        except Exception as err:
            raise DomainError(f"open_sweep: {shown} is corrupt ({type(err).__name__}: {err})") from err
        finally:
            dataset.close()
    return dataset
