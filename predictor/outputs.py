"""Where results go: the one policy every file-writing option follows.

* ``-`` means standard output.
* An output that is one of the command's own inputs is refused before any work.
* A path that is not a regular file (a device such as ``/dev/stdout``, a FIFO)
  is written into, never replaced; a symbolic link is followed and stays a link.
* An existing regular file is replaced only when it is a file of the kind being
  written (a model by a build, a trace by a trace) or when the caller forces it.
* Regular files are replaced atomically: a temporary file beside the target,
  flushed to disk, renamed over it.  Readers see the old file or the new one,
  and a failed or interrupted write leaves the old file in place.
* New files get the permissions the umask allows (0644 under umask 022);
  replacing a file keeps its mode.
"""

from __future__ import annotations

import os
import stat
import sys
import tempfile
from collections.abc import Callable, Iterable
from pathlib import Path
from typing import BinaryIO

from .errors import OutputError

STDOUT = "-"
"""The output path that means standard output."""

KindCheck = Callable[[Path], bool]
"""Tells whether an existing regular file is of the kind a command writes (so it may be replaced)."""


def is_stdout(path: str | os.PathLike[str]) -> bool:
    """Tell whether an output path means standard output."""
    return os.fspath(path) == STDOUT


def _folder_of(target: Path) -> Path:
    return target.parent if str(target.parent) else Path(".")


def resolved_target(path: str | os.PathLike[str]) -> Path:
    """The path a write really lands on: symbolic links followed (the link itself stays)."""
    target = Path(path)
    if target.is_symlink():
        return Path(os.path.realpath(target))
    return target


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return os.path.realpath(a) == os.path.realpath(b)


def check_output(
    path: str | os.PathLike[str],
    *,
    inputs: Iterable[str | os.PathLike[str] | None] = (),
    kind: KindCheck | None = None,
    kind_name: str = "file",
    force: bool = False,
    option: str = "",
) -> None:
    """Check, before any work, that a result may be written to ``path``.

    Args:
        path: the output path (``-`` is standard output and always passes).
        inputs: the command's own input paths (files or folders); the output may not be one of them.
        kind: tells whether an existing regular file is of the kind written (it may then be replaced).
        kind_name: what the command writes, for the message ("model", "trace").
        force: replace any existing regular file.
        option: the option naming the output, for the message (e.g. ``--trace``).

    Raises:
        OutputError: the path is an input, a folder, a file of another kind,
            or its folder is missing or not writable.
    """
    if is_stdout(path):
        return
    target = Path(path)
    _refuse_an_input(target, inputs, f" ({option})" if option else "")
    try:
        info = target.stat()
    except FileNotFoundError:
        _require_writable_folder(target)
        return
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    if stat.S_ISDIR(info.st_mode):
        raise OutputError(f"{target}: is a folder; give a file name for the {kind_name}")
    if not stat.S_ISREG(info.st_mode):
        if not os.access(target, os.W_OK):
            raise OutputError(f"{target}: cannot write (permission denied)")
        return  # a device or FIFO is written into, never replaced
    if not os.access(target, os.W_OK) or not os.access(_folder_of(resolved_target(target)), os.W_OK | os.X_OK):
        raise OutputError(f"{target}: cannot write (permission denied)")
    if force or info.st_size == 0 or (kind is not None and kind(target)):
        return
    raise OutputError(f"{target}: exists and is not a {kind_name}; not replacing it (choose another name, or add --force to replace it)")


def _refuse_an_input(target: Path, inputs: Iterable[str | os.PathLike[str] | None], named: str) -> None:
    """Raise OutputError when the output is the same file as one of the command's inputs."""
    for source in inputs:
        if source is None or is_stdout(source):
            continue
        if _same_file(target, Path(source)):
            raise OutputError(f"{target}: is also an input of this command; choose another output{named}")


def _require_writable_folder(target: Path) -> None:
    """Raise OutputError unless the folder a new file would go in exists and is writable."""
    directory = _folder_of(resolved_target(target))
    if not directory.is_dir():
        raise OutputError(f"{target}: cannot write (folder {directory} does not exist)")
    if not os.access(directory, os.W_OK | os.X_OK):
        raise OutputError(f"{target}: cannot write (folder {directory} is not writable)")


def check_output_folder(
    path: str | os.PathLike[str], *, inputs: Iterable[str | os.PathLike[str] | None] = (), kind: KindCheck | None = None, kind_name: str = "results", force: bool = False
) -> None:
    """Check, before any work, that a results folder may be used: its parent exists, and it is empty or holds earlier results.

    Raises:
        OutputError: the parent is missing, the path is a file, an input, or a folder of other things.
    """
    folder = Path(path)
    for source in inputs:
        if source is None or is_stdout(source):
            continue
        source_path = Path(source)
        if _same_file(folder, source_path) or (
            folder.is_dir() and source_path.exists() and Path(os.path.realpath(source_path)).is_relative_to(os.path.realpath(folder)) and source_path.is_dir()
        ):
            raise OutputError(f"{folder}: is also an input of this command; choose another output folder")
    parent = _folder_of(resolved_target(folder).absolute())
    if not parent.is_dir():
        why = "is not a folder" if parent.exists() else "does not exist"
        raise OutputError(f"{folder}: cannot create the output folder ({parent} {why})")
    if folder.exists() and not folder.is_dir():
        raise OutputError(f"{folder}: is a file, not a folder; give a folder for the {kind_name}")
    if folder.is_dir() and not force and any(folder.iterdir()) and not (kind is not None and kind(folder)):
        raise OutputError(f"{folder}: holds other files, not earlier {kind_name}; not writing into it (choose another folder, or add --force)")


def file_mode(target: Path) -> int:
    """The permissions a written file gets: the old file's, else read-write under the umask (mkstemp's 0600 is too strict)."""
    try:
        return stat.S_IMODE(target.stat().st_mode)
    except OSError:
        pass
    return 0o666 & ~current_umask()


def current_umask() -> int:
    """The process's umask, read without changing it where the system allows."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)  # elsewhere: read by setting, then restore at once
    os.umask(mask)
    return mask


def write_output(path: str | os.PathLike[str], write: Callable[[BinaryIO], object], *, on_temp: Callable[[int], None] | None = None, temp_prefix: str | None = None) -> int:
    """Write a result through ``write`` following the output policy (see the module docstring).

    Args:
        path: the target; ``-`` writes to standard output.
        write: called with an open binary file.
        on_temp: called with the temporary file's descriptor before writing (e.g. to lock it).
        temp_prefix: name prefix of the temporary file (default ``.NAME.``).

    Returns:
        The number of bytes written.

    Raises:
        OutputError: it cannot be written (the old file, if any, stays).
    """
    if is_stdout(path):
        out = sys.stdout.buffer
        sys.stdout.flush()
        counter = _CountingWriter(out)
        write(counter)  # type: ignore[arg-type]
        out.flush()
        return counter.count
    target = resolved_target(path)
    try:
        info = target.stat()
    except OSError:
        info = None
    if info is not None and not stat.S_ISREG(info.st_mode) and not stat.S_ISDIR(info.st_mode):
        try:
            with open(target, "wb") as out:
                counter = _CountingWriter(out)
                write(counter)  # type: ignore[arg-type]
            return counter.count
        except OSError as error:
            raise OutputError(f"{path}: cannot write ({error.strerror or error})") from None
    return replace_atomically(target, write, prefix=temp_prefix, on_temp=on_temp)


def write_text_output(path: str | os.PathLike[str], text: str) -> int:
    """Write UTF-8 text following the output policy (``-`` is standard output)."""
    data = text.encode("utf-8")
    return write_output(path, lambda out: out.write(data))


class _CountingWriter:
    """A binary writer that counts the bytes passed through."""

    def __init__(self, out: BinaryIO) -> None:
        self._out = out
        self.count = 0

    def write(self, data: bytes | memoryview) -> int:
        self._out.write(data)
        size = memoryview(data).nbytes
        self.count += size
        return size

    def tell(self) -> int:
        return self.count

    def flush(self) -> None:
        self._out.flush()


def replace_atomically(
    path: str | os.PathLike[str],
    write: Callable[[BinaryIO], object],
    *,
    prefix: str | None = None,
    on_temp: Callable[[int], None] | None = None,
) -> int:
    """Write a regular file through ``write`` and rename it over ``path`` once complete.

    The new file keeps the old file's mode, or gets the umask's default when new.

    Args:
        path: the target (replaced only when the new content is complete and on disk).
        write: called with the open temporary file (binary).
        prefix: name prefix of the temporary file (default ``.NAME.``).
        on_temp: called with the temporary file's descriptor before writing.

    Returns:
        The size of the file written.

    Raises:
        OutputError: the file cannot be written (the old file, if any, stays).
    """
    target = resolved_target(path)
    directory = _folder_of(target)
    mode = file_mode(target)
    try:
        handle, temp_name = tempfile.mkstemp(prefix=prefix or f".{target.name}.", suffix=".tmp", dir=directory)
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    try:
        if on_temp is not None:
            on_temp(handle)
        os.fchmod(handle, mode)
        with os.fdopen(handle, "wb") as out:
            write(out)
            out.flush()
            os.fsync(out.fileno())
            size = out.tell()
            # renamed before closing, so a lock taken in on_temp covers the whole write
            os.replace(temp_name, target)
    except BaseException as error:
        remove_quietly(temp_name)
        if isinstance(error, OSError):
            raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
        raise
    sync_directory(directory)
    return size


def write_text_atomic(path: str | os.PathLike[str], text: str) -> None:
    """Write a UTF-8 text file so that readers see the old file or the new one, never half of it (the output policy applies)."""
    write_text_output(path, text)


def check_writable_file(path: str | os.PathLike[str]) -> None:
    """Fail early if a result file could not be written later (its folder is missing or read-only).

    Raises:
        OutputError: the folder does not exist, the path is a folder, or it is not writable.
    """
    check_output(path, force=True)


def prepare_folder(path: str | os.PathLike[str]) -> Path:
    """Create an output folder (its parent must exist) and check it can be written to.

    Raises:
        OutputError: it cannot be created or written to.
    """
    folder = Path(path)
    try:
        folder.mkdir(exist_ok=True)
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
