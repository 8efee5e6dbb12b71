"""One writer at a time: an advisory lock on ``<file>.lock`` beside a learned file.

The lock is released when its holder closes it or dies (a killed process
leaves no stale lock).  A writer that finishes removes the lock file while it
still holds the lock, so no lock file outlives its writer; one that finds the
file it locked already removed takes the lock again on the file now there.
Readers take no lock: SQLite's WAL mode lets them read while the one writer writes.
"""

from __future__ import annotations

import os
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from ..errors import OutputError

try:  # advisory locks; on systems without fcntl writers are not serialised
    import fcntl
except ImportError:  # pragma: no cover - not on Linux or macOS
    fcntl = None  # type: ignore[assignment]

LOCKS_AVAILABLE = fcntl is not None
"""Whether this system serialises writers."""


def lock_path(path: Path) -> Path:
    """The lock file of a learned file."""
    return path.with_name(path.name + ".lock")


@contextmanager
def locked(path: Path) -> Iterator[None]:
    """Hold the writer's lock for a ``with`` block.

    Raises:
        OutputError: another process holds it.
    """
    handle = acquire(path)
    try:
        yield
    finally:
        release(handle)


_HELD: dict[int, Path] = {}
"""The lock file behind each descriptor this process holds (removed on release)."""


def acquire(path: Path) -> int | None:
    """Take the writer's lock of a learned file (None where locks are unavailable).

    Raises:
        OutputError: another process holds it, or the lock file cannot be made.
    """
    if fcntl is None:
        return None
    target = lock_path(path)
    while True:
        try:
            handle = os.open(target, os.O_RDWR | os.O_CREAT, 0o600)
        except OSError as error:
            raise OutputError(f"{path}: cannot write ({error.strerror or error})") from None
        try:
            fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            os.close(handle)
            raise OutputError(f"{path}: in use by another foretype process (close it first)") from None
        if _still_there(handle, target):
            _HELD[handle] = target
            return handle
        os.close(handle)  # the writer before us removed it after we opened it: lock the one there now


def _still_there(handle: int, target: Path) -> bool:
    try:
        held, there = os.fstat(handle), os.stat(target)
    except OSError:
        return False
    return (held.st_dev, held.st_ino) == (there.st_dev, there.st_ino)


def release(handle: int | None) -> None:
    """Give the lock back, removing the lock file first (while it is still held)."""
    if handle is None:
        return
    target = _HELD.pop(handle, None)
    if target is not None:
        try:
            target.unlink()
        except OSError:
            pass
    os.close(handle)  # closing releases the lock


__all__ = ["acquire", "release", "locked", "lock_path", "LOCKS_AVAILABLE"]
