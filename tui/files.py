"""Files the pad reads and writes: the composed text, text to replay, sweep results."""

from __future__ import annotations

import json
import os
import tempfile
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from foretype.errors import CorpusError, OutputError
from foretype.outputs import current_umask, write_text_output


def save_new_text(path: str | Path, text: str) -> Path:
    """Write text to a file that must not exist yet, atomically.

    The text goes to a temporary file beside the target, which is then linked
    under the target name; the link fails if a file of that name appeared in
    the meantime, so an existing file is never overwritten.

    Args:
        path: the new file.
        text: the content (UTF-8).

    Returns:
        The path written.

    Raises:
        OutputError: the file exists, its folder is missing, or it cannot be written.
    """
    target = Path(path).expanduser()
    if target.exists() and not target.is_file() and not target.is_dir():
        write_text_output(target, text)  # a device or FIFO is written into, never replaced (foretype.outputs)
        return target
    if target.exists() or target.is_symlink():
        raise OutputError(f"{target}: already exists; choose another name")
    directory = target.parent
    if not directory.is_dir():
        raise OutputError(f"{target}: no folder {directory}")
    try:
        handle, temp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    try:
        # mkstemp makes the file private (0600); a saved message gets the usual permissions.
        os.fchmod(handle, 0o666 & ~current_umask())
        with os.fdopen(handle, "w", encoding="utf-8", newline="") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        try:
            os.link(temp_name, target)
        except FileExistsError:
            raise OutputError(f"{target}: already exists; choose another name") from None
        except OSError:
            # Some file systems have no hard links: an exclusive create keeps the no-overwrite promise.
            with open(target, "x", encoding="utf-8", newline="") as out:
                out.write(text)
    except OSError as error:
        raise OutputError(f"{target}: cannot write ({error.strerror or error})") from None
    finally:
        try:
            os.unlink(temp_name)
        except OSError:
            pass
    return target


def free_name(folder: Path, stem: str, suffix: str) -> Path:
    """The first of ``stem.suffix``, ``stem-2.suffix``, ... that does not exist in a folder."""
    candidate = folder / f"{stem}{suffix}"
    number = 2
    while candidate.exists():
        candidate = folder / f"{stem}-{number}{suffix}"
        number += 1
    return candidate


@dataclass(frozen=True)
class SweepFile:
    """A sweep result as read from ``sweep.json``.

    Attributes:
        rows: one object per (method, vocabulary size), by method then vocabulary size.
        complete: every planned row finished (False for an interrupted sweep).
        test: the test text the rows were measured on ("" if not recorded).
        k: suggestions per list in the simulation (None if not recorded).
    """

    rows: list[dict[str, Any]]
    complete: bool
    test: str
    k: int | None

    @property
    def methods(self) -> list[str]:
        """The methods swept, in order of first appearance."""
        return list(dict.fromkeys(str(r.get("method", "")) for r in self.rows))


def read_sweep(path: str | Path) -> SweepFile:
    """Read a sweep result file.

    Accepts the object ``foretype sweep`` writes (``rows`` with ``settings``,
    ``test`` and ``complete`` beside them) or a bare list of row objects.

    Raises:
        CorpusError: missing, not JSON, or without rows holding ``vocab_size``.
    """
    source = Path(path)
    try:
        payload = json.loads(source.read_text(encoding="utf-8"))
    except OSError as error:
        raise CorpusError(f"{source}: cannot read ({error.strerror or error})") from None
    except (UnicodeDecodeError, json.JSONDecodeError) as error:
        raise CorpusError(f"{source}: not a sweep result (not JSON: {error})") from None
    meta = payload if isinstance(payload, dict) else {}
    rows = meta.get("rows") if isinstance(payload, dict) else payload
    if not isinstance(rows, list) or not rows or not all(isinstance(r, dict) and isinstance(r.get("vocab_size"), int) for r in rows):
        raise CorpusError(f"{source}: not a sweep result (no rows with a vocab_size)")
    order = {m: i for i, m in enumerate(dict.fromkeys(str(r.get("method", "")) for r in rows))}
    rows = sorted(rows, key=lambda r: (order[str(r.get("method", ""))], r["vocab_size"]))
    found = meta.get("settings")
    settings = found if isinstance(found, dict) else {}
    k = settings.get("k")
    return SweepFile(rows, bool(meta.get("complete", True)), str(meta.get("test", "")), k if isinstance(k, int) else None)


def shown_path(path: Path | None) -> str:
    """A path as the pad shows it: relative to the working folder when it lies inside, else absolute."""
    if path is None:
        return "no file"
    absolute = path.resolve()
    try:
        return str(absolute.relative_to(Path.cwd().resolve()))
    except ValueError:
        return str(absolute)
