"""A folder replaced whole: at every instant a complete one, old or new, opens at its path.

A store that is a folder (a sweep's Zarr store) cannot be replaced by one
``os.replace``, as a file can (:mod:`deltakit._files`). Here the path is a
symbolic link to a versioned folder beside it::

    speeds.zarr -> .speeds.zarr.18c3f2a9d0e4b7c1.4711.9f3e.v
    .speeds.zarr.18c3f2a9d0e4b7c1.4711.9f3e.v/     the complete store

A save writes the new version into ``.NAME.STAMP.partial``, renames it to
``.NAME.STAMP.v`` once it is complete (so a ``.v`` folder is always whole),
and swaps the link in one ``os.replace``; only then is the old version
removed. Killed at any moment, the save leaves the old link or the new one,
each pointing at a complete folder, plus leftovers that the next save or
open of the same path removes. Saves of one path are serialised by a lock
file (:func:`deltakit._files.file_lock`), so two at once both complete, one
after the other.

A folder saved at the path itself (by an older deltakit) is swapped for the
link atomically with Linux's ``renameat2(RENAME_EXCHANGE)``. Where that call
is missing, the old folder is first renamed to a version; a save killed in
that instant leaves no link, and the next open or save restores one to the
newest complete version.

The stamp starts with the time in nanoseconds (hex), so versions sort by age.
POSIX only (symbolic links).
"""

from __future__ import annotations

import contextlib
import ctypes
import errno
import os
import secrets
import shutil
import time
import warnings
from collections.abc import Callable
from pathlib import Path

from ._files import _fsync_folder, file_lock
from .errors import DomainError

__all__ = ["open_folder", "write_folder"]

_VERSION, _PARTIAL, _LINK = ".v", ".partial", ".link"
_MAX_LINKS = 40


def _stamp() -> str:
    return f"{time.time_ns():016x}.{os.getpid()}.{secrets.token_hex(2)}"


def _siblings(path: Path, suffix: str) -> list[Path]:
    """Hidden entries beside ``path`` made for it, with the given suffix, oldest first."""
    prefix = f".{path.name}."
    try:
        names = os.listdir(path.parent)
    except OSError:
        return []
    return [path.parent / n for n in sorted(names) if n.startswith(prefix) and n.endswith(suffix)]


def _is_version_link(path: Path) -> bool:
    """True when ``path`` is a link of ours: to a version of itself in its own folder."""
    if not path.is_symlink():
        return False
    target = os.readlink(path)
    return "/" not in target and target.startswith(f".{path.name}.") and target.endswith(_VERSION)


def store_path(path: str | os.PathLike[str]) -> Path:
    """The path whose link is swapped: links of the user's own are followed, ours are not."""
    current = Path(path)
    for _ in range(_MAX_LINKS):
        if not current.is_symlink() or _is_version_link(current):
            return current
        current = Path(os.path.normpath(current.parent / os.readlink(current)))
    raise OSError(errno.ELOOP, "too many levels of symbolic links", str(path))


def _lock_key(path: Path) -> Path:
    # file_lock follows links to name its lock file; the link itself moves at
    # every save, so the lock is named after a key beside it that is never a link.
    return path.parent / f"{path.name}.save"


def _remove(entry: Path) -> None:
    if entry.is_symlink() or entry.is_file():
        with contextlib.suppress(FileNotFoundError):
            entry.unlink()
    else:
        shutil.rmtree(entry, ignore_errors=True)


_RENAME_EXCHANGE = 2
_AT_FDCWD = -100


def _exchange(first: Path, second: Path) -> bool:
    """Swap two paths atomically (Linux ``renameat2``); False where the system cannot."""
    try:
        renameat2 = ctypes.CDLL(None, use_errno=True).renameat2
    except (AttributeError, OSError):
        return False
    done = renameat2(_AT_FDCWD, os.fsencode(first), _AT_FDCWD, os.fsencode(second), _RENAME_EXCHANGE)
    if done == 0:
        return True
    code = ctypes.get_errno()
    if code in (errno.EINVAL, errno.ENOSYS, errno.EOPNOTSUPP, errno.ENOTSUP):
        return False
    raise OSError(code, os.strerror(code), str(second))


def _swap_link(link: Path, path: Path) -> None:
    """Put the new link at ``path`` in one step."""
    if path.is_dir() and not path.is_symlink():  # a folder saved at the path itself
        if _exchange(link, path):
            _remove(link)  # after the exchange, the old folder sits at the link's name
            return
        os.replace(path, path.parent / f".{path.name}.{_stamp()}{_VERSION}")
    os.replace(link, path)


def _recover(path: Path) -> Path | None:
    """Restore the link to the newest complete version when a killed save left none."""
    versions = _siblings(path, _VERSION)
    if not versions:
        return None
    newest = versions[-1]
    link = path.parent / f".{path.name}.{_stamp()}{_LINK}"
    os.symlink(newest.name, link)
    os.replace(link, path)
    _fsync_folder(path.parent)
    return newest


def _tidy(path: Path) -> None:
    """Remove what killed saves left beside ``path`` (the caller holds its lock)."""
    current = os.readlink(path) if path.is_symlink() else None
    for entry in _siblings(path, _VERSION):
        if entry.name != current:
            _remove(entry)
    for suffix in (_PARTIAL, _LINK, ".tmp"):  # ".tmp": an older deltakit's unfinished save
        for entry in _siblings(path, suffix):
            _remove(entry)
    if path.exists():
        for entry in _siblings(path, ".old"):  # an older deltakit's set-aside copy
            _remove(entry)


def _recover_or_tidy(path: Path, kind: str, *, wait: bool) -> None:
    """Under the path's lock: bring back a lost link, then remove leftovers."""
    restored = None
    with file_lock(_lock_key(path), wait=wait):
        if not path.exists():
            restored = _recover(path)
            if restored is None:
                for aside in _siblings(path, ".old"):  # an older deltakit's copy, set aside when killed
                    if (aside / "sweep").is_dir():
                        os.replace(aside / "sweep", path)
                        restored = aside
                        break
        _tidy(path)
    if restored is not None:
        warnings.warn(
            f"{path}: a save of this {kind} was interrupted; the newest complete version "
            f"({restored.name}) is at the path again",
            UserWarning,
            stacklevel=3,
        )


def _leftovers(path: Path) -> bool:
    current = os.readlink(path) if path.is_symlink() else None
    if any(entry.name != current for entry in _siblings(path, _VERSION)):
        return True
    return any(_siblings(path, suffix) for suffix in (_PARTIAL, _LINK, ".tmp", ".old"))


def write_folder(
    path: str | os.PathLike[str],
    fill: Callable[[Path], None],
    *,
    kind: str,
    same_kind: Callable[[Path], bool],
) -> Path:
    """Write a folder at ``path`` whole: ``fill(folder)`` writes its content.

    ``fill`` gets an empty folder and must raise if what it wrote does not read
    back. An existing entry at ``path`` for which ``same_kind`` is false is
    refused and left untouched. Waits for another save of the same path.

    Raises
    ------
    FileExistsError
        ``path`` holds something that is not a ``kind`` (the caller says it in
        its own words).
    """
    target = store_path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    with file_lock(_lock_key(target)):
        if not target.exists() and _siblings(target, _VERSION):
            _recover(target)  # a killed save left no link: the newest complete version is the old one
        if target.exists() and not same_kind(target):
            raise FileExistsError(f"{target} is not a {kind}")
        stamp = _stamp()
        partial = target.parent / f".{target.name}.{stamp}{_PARTIAL}"
        version = target.parent / f".{target.name}.{stamp}{_VERSION}"
        link = target.parent / f".{target.name}.{stamp}{_LINK}"
        partial.mkdir()
        try:
            fill(partial)
            _fsync_folder(partial)
            os.replace(partial, version)  # from here on the version is complete
            os.symlink(version.name, link)
            _swap_link(link, target)
        except BaseException:
            for entry in (partial, link):
                _remove(entry)
            if not (target.is_symlink() and os.readlink(target) == version.name):
                _remove(version)
            raise
        _fsync_folder(target.parent)
        _tidy(target)  # the old version, and anything killed saves left
    return Path(path)


def open_folder(path: str | os.PathLike[str], *, kind: str) -> Path:
    """The path to read, after recovering from a save that was killed.

    Leftovers of killed saves are removed when no save of the path is running;
    a lost link is restored to the newest complete version, with a warning.

    Raises
    ------
    FileNotFoundError
        Nothing at ``path`` and nothing to recover.
    """
    target = store_path(path)
    if target.exists() and not _leftovers(target):
        return target
    if _leftovers(target) or not target.exists():
        # a save in progress (the lock is taken), or a folder we may not write: read it as it is
        with contextlib.suppress(OSError, DomainError):
            _recover_or_tidy(target, kind, wait=not target.exists())
    if not target.exists():
        raise FileNotFoundError(f"no such {kind}: {Path(path)}")
    return target
