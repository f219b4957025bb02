"""The one way deltakit writes a file: whole or not at all, never over a stranger.

Every save and export (budgets, CSV, Markdown, LaTeX, reports, notebooks'
own outputs) goes through :func:`write_atomic`:

* the bytes go to a temporary file in the target's own folder, are flushed to
  disk (``fsync``), and replace the target in one ``os.replace``, so a reader,
  a crash or a ``kill -9`` sees the old file or the new one, never half of one;
* a symbolic link is followed: the file it points to is updated and the link
  is kept;
* the new file gets the permissions the target had, or the usual ones for a
  new file (``0o666`` less the umask, typically ``0o644``);
* an existing file that is not of the kind being written (a saved budget
  where a CSV export is written, a user's own notes) is refused and left
  untouched unless the caller passes ``overwrite=True``; an empty file counts
  as nothing to lose;
* temporary files left by a save that was killed (their process is gone) are
  removed by the next save or load of the same path.

:func:`file_lock` serialises writers of one path across processes, for
saves that take more than one rename (a sweep's folder).
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
from collections.abc import Callable, Iterator
from pathlib import Path

from .errors import DomainError

__all__ = ["file_lock", "read_head", "remove_orphans", "resolve", "write_atomic"]

_TMP_SUFFIX = ".deltakit-tmp"
_HEAD_BYTES = 65536


def resolve(path: str | os.PathLike[str]) -> Path:
    """The file a path names once every symbolic link is followed (it may not exist yet)."""
    return Path(os.path.realpath(os.fspath(path)))


def read_head(path: Path, size: int = _HEAD_BYTES) -> bytes:
    """The first ``size`` bytes of a file (its kind is told by its start)."""
    with open(path, "rb") as handle:
        return handle.read(size)


def _new_file_mode() -> int:
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return 0o666 & ~int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    umask = os.umask(0o022)  # no /proc: read the umask by setting it, then put it back
    os.umask(umask)
    return 0o666 & ~umask


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # it exists, under another user
        return True
    return True


def remove_orphans(path: str | os.PathLike[str]) -> int:
    """Remove temporary files that a killed save of ``path`` left beside it.

    Only files of deltakit's own temporary pattern for this very path whose
    writing process no longer runs are removed (a save in progress in another
    process keeps its file). Returns how many were removed.
    """
    target = resolve(path)
    folder = target.parent
    prefix = f".{target.name}."
    removed = 0
    try:
        names = os.listdir(folder)
    except OSError:
        return 0
    for name in names:
        if not (name.startswith(prefix) and name.endswith(_TMP_SUFFIX)):
            continue
        pid_text = name[len(prefix) : -len(_TMP_SUFFIX)].partition(".")[0]
        if not pid_text.isdigit() or _alive(int(pid_text)):
            continue
        with contextlib.suppress(FileNotFoundError):
            os.unlink(folder / name)
            removed += 1
    return removed


def _fsync_folder(folder: Path) -> None:
    try:
        descriptor = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError:
        pass
    finally:
        os.close(descriptor)


def write_atomic(
    path: str | os.PathLike[str],
    data: str | bytes,
    *,
    kind: str,
    same_kind: Callable[[bytes], bool] | None = None,
    overwrite: bool = False,
) -> Path:
    """Write ``data`` to ``path`` whole or not at all; returns the path as given.

    Parameters
    ----------
    path : str or os.PathLike
        Where to write. A symbolic link is followed and kept.
    data : str or bytes
        The whole content (text is written as UTF-8).
    kind : str
        What is being written, for messages ("budget", "budget CSV export").
    same_kind : callable, optional
        Told the first 64 KiB of an existing file, says whether it is a file
        of this kind that may be replaced. Without it, any existing non-empty
        file is refused unless ``overwrite`` is true.
    overwrite : bool
        Replace an existing file whatever it holds.

    Raises
    ------
    DomainError
        Refusing to replace a file of another kind (the file is untouched),
        or ``path`` is a folder.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> _ = write_atomic(folder / "note.txt", "first", kind="note", same_kind=lambda head: True)
    >>> _ = write_atomic(folder / "note.txt", "second", kind="note", same_kind=lambda head: True)
    >>> (folder / "note.txt").read_text()
    'second'
    """
    shown = Path(path)
    target = resolve(path)
    if target.is_dir():
        raise DomainError(f"cannot write the {kind} to {shown}: it is a folder")
    exists = target.exists()
    if exists and not overwrite and target.stat().st_size > 0:
        if same_kind is None or not same_kind(read_head(target)):
            raise DomainError(
                f"refusing to overwrite {shown}: it is not a {kind} written by deltakit "
                "(pass overwrite=True to replace it)"
            )
    mode = (target.stat().st_mode & 0o7777) if exists else _new_file_mode()
    payload = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    folder = target.parent
    remove_orphans(target)
    temporary = folder / f".{target.name}.{os.getpid()}.{secrets.token_hex(4)}{_TMP_SUFFIX}"
    descriptor = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    try:
        with os.fdopen(descriptor, "wb") as handle:
            handle.write(payload)
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(temporary, mode)
        os.replace(temporary, target)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        raise
    _fsync_folder(folder)
    return shown


@contextlib.contextmanager
def file_lock(path: str | os.PathLike[str], *, wait: bool = True) -> Iterator[None]:
    """Hold an exclusive lock for writing ``path`` (across processes).

    The lock lives in a hidden file ``.NAME.lock`` beside the target. With
    ``wait=False`` a lock held elsewhere raises :class:`~deltakit.DomainError`
    at once instead of waiting.
    """
    import fcntl

    target = resolve(path)
    lock_path = target.parent / f".{target.name}.lock"
    descriptor = os.open(lock_path, os.O_RDWR | os.O_CREAT, 0o644)
    try:
        try:
            fcntl.flock(descriptor, fcntl.LOCK_EX | (0 if wait else fcntl.LOCK_NB))
        except OSError as err:
            if err.errno in (errno.EAGAIN, errno.EACCES):
                raise DomainError(
                    f"{Path(path)} is being written by another process; try again when it has finished"
                ) from None
            raise
        yield
    finally:
        os.close(descriptor)  # closing releases the lock
