"""Writing result files atomically: a temporary file beside the target, then a rename."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ..errors import OutputError
from ..modelfile.atomic import replace_atomically


def write_text_atomic(path: str | Path, text: str) -> None:
    """Write a UTF-8 text file so that readers see the old file or the new one, never half of it.

    Args:
        path: the target (replaced only when the new text is complete).
        text: the content.

    Raises:
        OutputError: the file cannot be written.
    """
    data = text.encode("utf-8")
    replace_atomically(path, lambda out: out.write(data))


def check_writable_file(path: str | Path) -> None:
    """Fail early if a result file could not be written later (its folder is missing or read-only).

    Raises:
        OutputError: the folder does not exist, the path is a folder, or it is not writable.
    """
    target = Path(path)
    directory = target.parent if str(target.parent) else Path(".")
    if target.is_dir():
        raise OutputError(f"{target}: is a folder, not a file")
    if not directory.is_dir():
        raise OutputError(f"{target}: cannot write (no folder {directory})")
    if not os.access(directory, os.W_OK | os.X_OK) or (target.exists() and not os.access(target, os.W_OK)):
        raise OutputError(f"{target}: cannot write (permission denied)")


def prepare_folder(path: str | Path) -> Path:
    """Create an output folder if needed and check it can be written to.

    Raises:
        OutputError: it cannot be created or written to.
    """
    folder = Path(path)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as error:
        raise OutputError(f"{folder}: cannot create the output folder ({error.strerror or error})") from None
    if not folder.is_dir():
        raise OutputError(f"{folder}: not a folder")
    try:
        handle, probe = tempfile.mkstemp(prefix=".write-check.", dir=folder)
        os.close(handle)
        os.unlink(probe)
    except OSError as error:
        raise OutputError(f"{folder}: cannot write to the output folder ({error.strerror or error})") from None
    return folder
