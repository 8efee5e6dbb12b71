"""Replacing a file atomically: write beside it, flush to disk, rename over it.

Readers then see the old file or the new one, never half of one, and a failed
or interrupted write leaves the old file in place.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import BinaryIO

from ..errors import OutputError


def replace_atomically(path: str | os.PathLike[str], write: Callable[[BinaryIO], None], *, prefix: str | None = None) -> int:
    """Write a file through ``write`` and rename it over ``path`` once complete.

    Args:
        path: the target (replaced only when the new content is complete and on disk).
        write: called with the open temporary file (binary).
        prefix: name prefix of the temporary file (default ``.NAME.``).

    Returns:
        The size of the file written.

    Raises:
        OutputError: the file cannot be written (the old file, if any, stays).
    """
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    try:
        handle, temp_name = tempfile.mkstemp(prefix=prefix or f".{target.name}.", suffix=".tmp", dir=directory)
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    try:
        with os.fdopen(handle, "wb") as out:
            write(out)
            out.flush()
            os.fsync(out.fileno())
            size = out.tell()
        os.replace(temp_name, target)
    except BaseException as error:
        remove_quietly(temp_name)
        if isinstance(error, OSError):
            raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
        raise
    sync_directory(directory)
    return size


def remove_quietly(name: str | os.PathLike[str]) -> None:
    """Delete a file if it is there; a file already gone is no error."""
    try:
        os.unlink(name)
    except OSError:
        pass


def sync_directory(directory: str | os.PathLike[str]) -> None:
    """Flush a folder's entries to disk, so a rename inside it survives a crash (best effort)."""
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
