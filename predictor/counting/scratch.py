"""Temporary files and folders the engine writes, and cleaning up after crashed runs.

Everything temporary the engine creates starts with :data:`TEMP_PREFIX`: model
files being written (``.foretype-*.tmp`` beside their target) and folders of
counts spilled to disk (``.foretype-spill-*``).  While in use each holds an
exclusive ``flock`` lock; the kernel drops the lock when its process ends, even
on SIGKILL.  :func:`remove_stale` deletes an entry only when all three hold: its
name has our prefix, it is older than the current process, and nobody holds
its lock, so it never touches another tool's files or a live run's.
"""

from __future__ import annotations

import os
import shutil
import tempfile
import time
from pathlib import Path

try:
    import fcntl
except ImportError:  # pragma: no cover - not on POSIX: no locks, stale files stay
    fcntl = None  # type: ignore[assignment]

TEMP_PREFIX = ".foretype-"
"""Every temporary file or folder the engine creates starts with this name."""

SPILL_PREFIX = TEMP_PREFIX + "spill-"
"""Folders of counts spilled to disk start with this name."""

LOCK_NAME = "lock"
"""The file inside a spill folder whose lock marks the folder as in use."""


def lock_exclusively(fd: int) -> None:
    """Take an exclusive lock on an open file, held until it is closed (no-op without flock)."""
    if fcntl is not None:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)


def _is_locked(path: Path) -> bool:
    """Tell whether some process holds the lock on ``path`` (True if it cannot be checked)."""
    if fcntl is None:
        return True
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
    except FileNotFoundError:
        return False
    except OSError:
        return True
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return True
    finally:
        os.close(fd)
    return False


def process_start_time() -> float:
    """When the current process started (seconds since the epoch, to about 10 ms).

    On Linux it is computed from /proc (start ticks after boot, and the uptime),
    because the boot time behind psutil's ``create_time`` is whole seconds.
    """
    try:
        with open("/proc/self/stat", encoding="ascii") as stat_file:
            fields = stat_file.read().rsplit(")", 1)[1].split()
        with open("/proc/uptime", encoding="ascii") as uptime_file:
            uptime = float(uptime_file.read().split()[0])
        started_after_boot = int(fields[19]) / os.sysconf("SC_CLK_TCK")
        return time.time() - (uptime - started_after_boot)
    except (OSError, ValueError, IndexError):
        pass
    try:
        import psutil

        return float(psutil.Process().create_time()) - 1.0
    except Exception:  # noqa: BLE001 - psutil missing or failing: remove nothing
        return 0.0


def remove_stale(directory: str | os.PathLike[str]) -> int:
    """Delete the temporary files and spill folders crashed runs left in a folder.

    Only entries named with :data:`TEMP_PREFIX`, last modified before this
    process started and not locked by a live process are removed; errors
    (permissions, races with another cleaner) are ignored.

    Args:
        directory: the folder to clean.

    Returns:
        How many entries were removed.
    """
    started = process_start_time()
    removed = 0
    try:
        entries = list(os.scandir(directory))
    except OSError:
        return 0
    for entry in entries:
        if not entry.name.startswith(TEMP_PREFIX):
            continue
        try:
            if entry.is_symlink() or entry.stat(follow_symlinks=False).st_mtime >= started:
                continue
            if entry.is_dir(follow_symlinks=False) and entry.name.startswith(SPILL_PREFIX):
                lock = Path(entry.path) / LOCK_NAME
                if _is_locked(lock):
                    continue
                shutil.rmtree(entry.path, ignore_errors=True)
                removed += 1
            elif entry.is_file(follow_symlinks=False) and entry.name.endswith(".tmp"):
                if _is_locked(Path(entry.path)):
                    continue
                os.unlink(entry.path)
                removed += 1
        except OSError:
            continue
    return removed


class SpillFolder:
    """A locked temporary folder for counts that outgrow memory; removed by :meth:`close`.

    Attributes:
        path: the folder.
    """

    def __init__(self, root: str | os.PathLike[str] | None = None) -> None:
        """Create the folder under ``root`` (default: the system's temporary folder).

        Stale spill folders of crashed runs under the same root are removed first.

        Raises:
            OSError: the folder cannot be created.
        """
        base = Path(root) if root is not None else Path(tempfile.gettempdir())
        remove_stale(base)
        self.path = Path(tempfile.mkdtemp(prefix=SPILL_PREFIX, dir=base))
        self._lock = os.open(self.path / LOCK_NAME, os.O_RDWR | os.O_CREAT, 0o600)
        lock_exclusively(self._lock)
        self._files = 0

    def new_file(self, stem: str) -> Path:
        """Return a fresh path inside the folder."""
        self._files += 1
        return self.path / f"{stem}-{self._files:06d}.bin"

    def close(self) -> None:
        """Delete the folder and everything in it (safe to call twice)."""
        if self._lock >= 0:
            shutil.rmtree(self.path, ignore_errors=True)
            os.close(self._lock)
            self._lock = -1

    def __del__(self) -> None:
        try:
            self.close()
        except Exception:  # noqa: BLE001 - interpreter shutdown: nothing sensible to do
            pass
