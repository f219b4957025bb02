"""The catalog: entry name -> builder, and the cached :func:`derive`."""

from __future__ import annotations

import functools
from collections.abc import Callable

from .derivation import Derivation

__all__ = ["UnknownEntry", "catalog", "derive", "entry", "titles"]

_BUILDERS: dict[str, Callable[[], Derivation]] = {}
_ALIASES: dict[str, str] = {}
_TITLES: dict[str, str] = {}
#: Catalog order: one orbit, transfers, leaving and reaching a body, propellant.
_FAMILIES = ("orbits", "transfers", "departure", "energetics")


class UnknownEntry(KeyError):
    """``derive`` was asked for a name that is not in the catalog."""

    def __str__(self) -> str:  # KeyError would quote the whole message
        return str(self.args[0])


def entry(
    name: str, *aliases: str, title: str
) -> Callable[[Callable[[], Derivation]], Callable[[], Derivation]]:
    """Register a builder under ``name`` (and optional aliases) with its title.

    The title is known without deriving, so a menu of the catalog is instant.
    """

    def register(builder: Callable[[], Derivation]) -> Callable[[], Derivation]:
        _BUILDERS[name] = builder
        _TITLES[name] = title
        for alias in aliases:
            _ALIASES[alias] = name
        return builder

    return register


def catalog() -> tuple[str, ...]:
    """Names accepted by :func:`derive`, in catalog order.

    Examples
    --------
    >>> from deltakit.symbolic import catalog
    >>> "hohmann" in catalog()
    True
    """
    rank = {family: number for number, family in enumerate(_FAMILIES)}
    order = {name: number for number, name in enumerate(_BUILDERS)}

    def key(name: str) -> tuple[int, int]:
        family = _BUILDERS[name].__module__.rpartition(".")[2]
        return rank.get(family, len(rank)), order[name]

    return tuple(sorted(_BUILDERS, key=key))


def titles() -> dict[str, str]:
    """Entry name -> title, in catalog order, without deriving anything.

    Examples
    --------
    >>> from deltakit.symbolic import titles
    >>> titles()["hohmann"]
    'Hohmann transfer between circular orbits'
    """
    return {name: _TITLES[name] for name in catalog()}


def registered_title(name: str) -> str:
    """The title an entry was registered with."""
    return _TITLES[name]


@functools.cache
def _derive(name: str) -> Derivation:
    derivation = _BUILDERS[name]()
    if derivation.name != name:
        raise RuntimeError(f"builder for {name!r} produced {derivation.name!r}")
    return derivation


def derive(name: str) -> Derivation:
    """Derive a catalog entry (cached: the second call returns the same object).

    Parameters
    ----------
    name : str
        One of :func:`catalog` (or an alias: the numeric twin's function
        name, e.g. ``"energy_gain"`` for ``"oberth"``).

    Raises
    ------
    KeyError
        ``name`` is not in the catalog; the message lists the catalog.

    Examples
    --------
    >>> from deltakit.symbolic import derive
    >>> derive("vis_viva").result
    sqrt(2*mu/r - mu/a)
    """
    if not isinstance(name, str):
        raise TypeError(f"`name` must be a catalog name (str), got {name!r}")
    canonical = _ALIASES.get(name, name)
    if canonical not in _BUILDERS:
        raise UnknownEntry(f"no derivation named {name!r}; the catalog has: {', '.join(_BUILDERS)}")
    return _derive(canonical)
