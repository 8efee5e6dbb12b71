"""The learned file: a user model kept beside its base model, durable at every change.

The file is an SQLite database (schema in :mod:`foretype.adapt.learned_db`) in
WAL mode: the learned state as of its last compaction (settings,
never-suggest list, counts), then one row per change made since.

Durability.  Each change is one transaction: a row added to the ``change``
table, committed with ``synchronous = FULL`` before the call returns, so once
it returns the change survives a crash, and a process killed mid-change loses
at most that change.  Every ``compact_every`` changes the counts tables are
rewritten and the changes cleared, again in one transaction.  A new file is
written complete beside its final name and renamed into place.

One process at a time may write (an advisory lock on ``<file>.lock``); any
number may read at once, and WAL mode lets them read while the writer writes:
a reader sees the file as of its last commit.  A file damaged in any way
SQLite or our schema check can see is refused with one clear line.

Files of format 1 (journalled text, :mod:`foretype.adapt.journal_v1`) are
read as they are; the first writer to open one converts it and keeps the old
file beside it as ``<file>.format-1``.
"""

from __future__ import annotations

import glob
import os
import sqlite3
import tempfile
import time
import zlib
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any, BinaryIO

from ..demo import cache_folder
from ..errors import ModelFileError, OptionError, OutputError
from ..modelfile.atomic import remove_quietly as _remove_quietly
from ..modelfile.atomic import replace_atomically
from ..modelfile.atomic import sync_directory as _sync_directory
from ..query.model import LanguageModel
from ..text import WORD_RE
from . import learned_db
from .combined import AdaptedModel
from .export import PRIVACY_NOTE, export_learned
from .journal_v1 import is_journal, read_journal, state_of
from .never_list import normalise_entry
from .records import RECORD_ERRORS, LearnedState, apply_record, rebuild
from .settings import AdaptSettings
from .user_model import UserModel
from .writer_lock import LOCKS_AVAILABLE, acquire, lock_path, locked, release

SUFFIX = ".learned"
"""A model's learned file is the model's path with this appended."""
FORMAT_1_SUFFIX = ".format-1"
"""A converted format-1 file is kept beside the new one with this appended."""
COMPACT_EVERY = 500
"""Changes recorded between two rewrites of the counts tables."""


def default_learned_path(model_path: str | os.PathLike[str] | None) -> Path:
    """Where a model's learned file lives: ``MODEL.learned`` beside it.

    The demo model's file is ``demo.learned`` in the demo cache folder, so it
    survives rebuilds of the cached demo model.
    """
    if model_path is None:
        return cache_folder() / f"demo{SUFFIX}"
    path = Path(model_path)
    try:
        if path.resolve().parent == cache_folder().resolve() and path.name.startswith("demo-"):
            return cache_folder() / f"demo{SUFFIX}"
    except OSError:
        pass
    return path.with_name(path.name + SUFFIX)


# ---------------------------------------------------------------- reading
def _head(path: Path) -> bytes | None:
    """The first bytes of a file (None if there is none).

    Raises:
        ModelFileError: it is a folder or cannot be read.
    """
    if path.is_dir():
        raise ModelFileError(f"{path}: is a folder, not a learned file")
    try:
        with open(path, "rb") as handle:
            return handle.read(100)
    except FileNotFoundError:
        return None
    except OSError as error:
        raise ModelFileError(f"{path}: cannot read ({error.strerror or error})") from None


def _damaged(path: Path, error: BaseException) -> ModelFileError:
    """The one-line error for a file SQLite or our checks find damaged."""
    text = " ".join(str(error).split()) or type(error).__name__
    if "not a database" in text:
        return ModelFileError(f"{path}: not a foretype learned file")
    return ModelFileError(f"{path}: corrupt learned file ({text})")


def _read_database(conn: sqlite3.Connection, path: Path, *, check: bool = True) -> tuple[LearnedState, list[dict[str, Any]]]:
    """The state and changes of an open learned file, checked first.

    Raises:
        ModelFileError: not a learned file, a newer schema, or damaged.
    """
    try:
        learned_db.check_schema(conn, path)
        if check:
            learned_db.check_pages(conn, path)
        return learned_db.read_state(conn)
    except sqlite3.Error as error:
        raise _damaged(path, error) from None
    except (*RECORD_ERRORS, AttributeError) as error:
        raise ModelFileError(f"{path}: corrupt learned file ({error})") from None


def _build(path: Path, base: LanguageModel, state: LearnedState | None, changes: Sequence[dict[str, Any]]) -> AdaptedModel:
    try:
        return rebuild(base, state, changes)
    except RECORD_ERRORS as error:
        raise ModelFileError(f"{path}: corrupt learned file ({error})") from None


def _journal_model(path: Path, base: LanguageModel) -> tuple[AdaptedModel, bytes, LearnedState, list[dict[str, Any]]]:
    """A format-1 file read into a combined model, with its bytes, its state and its changes.

    Raises:
        ModelFileError: the file is damaged (other than a torn last line).
    """
    try:
        data = path.read_bytes()
    except OSError as error:
        raise ModelFileError(f"{path}: cannot read ({error.strerror or error})") from None
    records = read_journal(path, data)
    try:
        state = state_of(records[0])
    except (*RECORD_ERRORS, zlib.error) as error:
        raise ModelFileError(f"{path}: corrupt learned file (record 1: {error})") from None
    return _build(path, base, state, records[1:]), data, state, records[1:]


def load_learned(path: str | os.PathLike[str], base: LanguageModel, *, must_exist: bool = False) -> AdaptedModel:
    """Read a learned file into a combined model, without locking or changing the file.

    A missing file gives an empty user model with the default settings, unless
    ``must_exist`` (a file the person named: a typo must not pass for "nothing learned").
    A reader sees the file as of the writer's last commit and never waits for the writer.

    Raises:
        ModelFileError: the file is missing and ``must_exist``, is not a learned file,
            has a schema newer than this code reads, or is damaged.
    """
    source = Path(path)
    head = _head(source)
    if head is None:
        if must_exist:
            raise ModelFileError(f"{source}: no such learned file")
        return AdaptedModel(base)
    if is_journal(head):
        return _journal_model(source, base)[0]
    if not learned_db.is_database(head):
        raise ModelFileError(f"{source}: not a foretype learned file")
    try:
        conn = learned_db.connect(source, write=False)
    except sqlite3.Error as error:
        raise _damaged(source, error) from None
    try:
        state, changes = _read_database(conn, source)
    finally:
        conn.close()
    return _build(source, base, state, changes)


def learned_file_facts(path: str | os.PathLike[str]) -> dict[str, Any]:
    """Facts about a learned file itself: its format, size, changes since the last compaction.

    Returns:
        ``{"exists": False}``, or ``exists``, ``format`` ("sqlite" or "format-1"),
        ``schema`` (the SQLite schema version, None for format 1), ``file_bytes``
        (with the write-ahead log), ``changes_since_compaction`` and ``written``
        (Unix time of the last compaction).

    Raises:
        ModelFileError: as :func:`load_learned`.
    """
    source = Path(path)
    head = _head(source)
    if head is None:
        return {"exists": False}
    if is_journal(head):
        records = read_journal(source, source.read_bytes())
        return {
            "exists": True,
            "format": "format-1",
            "schema": None,
            "file_bytes": learned_db.file_bytes(source),
            "changes_since_compaction": len(records) - 1,
            "written": records[0].get("written"),
        }
    if not learned_db.is_database(head):
        raise ModelFileError(f"{source}: not a foretype learned file")
    try:
        conn = learned_db.connect(source, write=False)
        try:
            learned_db.check_schema(conn, source)
            with learned_db.transaction(conn, write=False):
                changes = learned_db.change_count(conn)
                written = learned_db.written_at(conn)
        finally:
            conn.close()
    except sqlite3.Error as error:
        raise _damaged(source, error) from None
    return {
        "exists": True,
        "format": "sqlite",
        "schema": learned_db.SCHEMA_VERSION,
        "file_bytes": learned_db.file_bytes(source),
        "changes_since_compaction": changes,
        "written": written,
    }


def wipe_learned(path: str | os.PathLike[str]) -> bool:
    """Delete a learned file (with SQLite's files beside it, its lock file and a kept format-1 file).

    Returns:
        False if there was no learned file.

    Raises:
        OutputError: another process is writing it, or it cannot be removed.
    """
    target = Path(path)
    with locked(target):
        removed = False
        for part in (target, *learned_db.companions(target), target.with_name(target.name + FORMAT_1_SUFFIX)):
            try:
                part.unlink()
                removed = removed or part == target
            except FileNotFoundError:
                pass
            except OSError as error:
                raise OutputError(f"{part}: cannot remove ({error.strerror or error})") from None
        _sync_directory(target.parent if str(target.parent) else Path("."))
    _remove_quietly(str(lock_path(target)))
    return removed


# ---------------------------------------------------------------- writing
def _writer(data: bytes) -> Callable[[BinaryIO], None]:
    """A writer for :func:`replace_atomically` that writes ``data``."""

    def write(out: BinaryIO) -> None:
        out.write(data)

    return write


def _create(path: Path, state: LearnedState, changes: Sequence[dict[str, Any]] = ()) -> None:
    """Write a complete learned file beside ``path`` and rename it into place (the caller holds the lock).

    A write-ahead log left beside ``path`` by an earlier file is removed first:
    SQLite would otherwise apply it to the new file.

    Raises:
        OutputError: the file cannot be written (an existing file stays as it was).
    """
    directory = path.parent if str(path.parent) else Path(".")
    try:
        handle, temp_name = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=directory)
        os.close(handle)
    except OSError as error:
        raise OutputError(f"{path}: cannot write ({error.strerror or error})") from None
    temp = Path(temp_name)
    try:
        conn = learned_db.connect(temp, write=True)
        try:
            learned_db.create_schema(conn)
            with learned_db.transaction(conn, write=True):
                learned_db.write_state(conn, state)
                for record in changes:
                    learned_db.append_change(conn, record)
        finally:
            conn.close()  # the last connection checkpoints the log into the file and removes it
        with open(temp, "rb") as written:
            os.fsync(written.fileno())
        for stale in learned_db.companions(path):
            stale.unlink(missing_ok=True)
        os.replace(temp, path)
    except (OSError, sqlite3.Error) as error:
        raise OutputError(f"{path}: cannot write ({getattr(error, 'strerror', None) or error})") from None
    finally:
        for part in (temp, *learned_db.companions(temp)):
            _remove_quietly(part)
    _sync_directory(directory)


class LearnedFile:
    """A learned file open for changes: each change is applied and made durable before returning.

    Use as a context manager, or call :meth:`close`.  ``model`` is the combined
    model to take suggestions from; it always reflects every change made.
    ``converted_from`` names the kept format-1 file when opening converted one.
    """

    def __init__(self, path: str | os.PathLike[str], base: LanguageModel, *, compact_every: int = COMPACT_EVERY) -> None:
        """Open (or prepare to create) a learned file and take the writer's lock.

        The file itself is created by the first change; a format-1 file is converted now.

        Args:
            path: the learned file.
            base: the base model the counts combine with.
            compact_every: changes between two rewrites of the counts tables.

        Raises:
            ModelFileError: the file exists but is not a learned file, has a newer schema, or is damaged.
            OutputError: another process holds it, or its folder cannot be written.
        """
        if compact_every < 1:
            raise OptionError(f"compact_every must be at least 1, not {compact_every}")
        self.path = Path(path)
        self.compact_every = compact_every
        self.converted_from: Path | None = None
        self._conn: sqlite3.Connection | None = None
        self._pending = 0
        self._lock = acquire(self.path)
        try:
            self._remove_stale_temporaries()
            self.model = self._open(base)
        except BaseException:
            self._close_connection()
            release(self._lock)
            raise

    def _open(self, base: LanguageModel) -> AdaptedModel:
        head = _head(self.path)
        if head is None:
            return AdaptedModel(base)
        if is_journal(head):
            # The same state and changes move to the new file, so it replays exactly as the old one read.
            model, data, state, changes = _journal_model(self.path, base)
            kept = self.path.with_name(self.path.name + FORMAT_1_SUFFIX)
            replace_atomically(kept, _writer(data))
            _create(self.path, state, changes)
            self.converted_from = kept
            self._conn = self._connect()
            self._pending = len(changes)
            return model
        if not learned_db.is_database(head):
            raise ModelFileError(f"{self.path}: not a foretype learned file")
        self._conn = self._connect()
        state, changes = _read_database(self._conn, self.path)
        self._pending = len(changes)
        return _build(self.path, base, state, changes)

    def _connect(self) -> sqlite3.Connection:
        try:
            return learned_db.connect(self.path, write=True)
        except sqlite3.OperationalError as error:
            raise OutputError(f"{self.path}: cannot open for writing ({error})") from None
        except sqlite3.Error as error:
            raise _damaged(self.path, error) from None

    @classmethod
    def for_model(cls, base: LanguageModel, *, compact_every: int = COMPACT_EVERY) -> LearnedFile:
        """Open the learned file that belongs beside a loaded model (see :func:`default_learned_path`)."""
        return cls(default_learned_path(base.path), base, compact_every=compact_every)

    def __enter__(self) -> LearnedFile:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # ------------------------------------------------------------ changes
    def learn(self, words: Sequence[str], *, after: Sequence[str] = (), end: bool = False) -> int:
        """Learn accepted or typed words and record them (nothing happens while learning is off).

        Args:
            words: written words continuing the sentence.
            after: the preceding words of the sentence, as written.
            end: the sentence ends after ``words``.

        Returns:
            Tokens counted.

        Raises:
            OptionError: an entry of ``words`` is not a single word.
            OutputError: the change could not be written (nothing was learned).
        """
        if not self.model.settings.learning or (not words and not end):
            return 0
        for word in words:
            if not isinstance(word, str) or WORD_RE.fullmatch(word) is None:
                raise OptionError(f"cannot learn {word!r}: not a single word")
        at = int(time.time())
        context = [str(w) for w in after][-2:]
        self._ensure_file()
        credit = self.model.learn(words, after=context, end=end, when=at)
        self._commit({"kind": "learn", "words": list(words), "after": context, "end": bool(end), "at": at, "credit": credit}, applied=True)
        return len(words) + (1 if end else 0)

    def learn_sentences(self, sentences: Sequence[Sequence[str]], progress: Callable[[int, int], None] | None = None) -> int:
        """Learn whole sentences (a text of one's own) as one change: all of it is kept, or none.

        Args:
            sentences: each a list of written words, ending a sentence.
            progress: called with (sentences done, sentences in all).

        Returns:
            Tokens counted (0 while learning is off).

        Raises:
            OptionError: an entry is not a single word.
            OutputError: the change could not be written (nothing was learned).
        """
        if not self.model.settings.learning:
            return 0
        sentences = [list(s) for s in sentences if len(s)]
        for sentence in sentences:
            for word in sentence:
                if not isinstance(word, str) or WORD_RE.fullmatch(word) is None:
                    raise OptionError(f"cannot learn {word!r}: not a single word")
        if not sentences:
            return 0
        at = int(time.time())
        self._ensure_file()
        credits = []
        for done, sentence in enumerate(sentences):
            credits.append(self.model.learn(sentence, end=True, when=at))
            if progress is not None and (done % 256 == 255 or done + 1 == len(sentences)):
                progress(done + 1, len(sentences))
        self._commit({"kind": "sentences", "sentences": sentences, "at": at, "credit": credits}, applied=True)
        return sum(len(s) + 1 for s in sentences)

    def end_sentence(self, after: Sequence[str]) -> int:
        """Record that a sentence ended after ``after`` (its last words)."""
        return self.learn([], after=after, end=True)

    def set_settings(self, settings: AdaptSettings) -> None:
        """Change the learning settings (for example learning off)."""
        self._commit({"kind": "settings", "settings": settings.to_json()})

    def set_learning(self, on: bool) -> None:
        """Switch learning on or off."""
        self.set_settings(self.model.settings.changed(learning=bool(on)))

    def add_never(self, entries: Sequence[str]) -> list[str]:
        """Add words or patterns to the never-suggest list; returns those that were new."""
        fresh = sorted({normalise_entry(e) for e in entries} - set(self.model.never.entries))
        if fresh:
            self._commit({"kind": "never", "add": fresh, "remove": []})
        return fresh

    def remove_never(self, entries: Sequence[str]) -> list[str]:
        """Remove words or patterns from the never-suggest list; returns those that were there."""
        present = sorted({normalise_entry(e) for e in entries} & set(self.model.never.entries))
        if present:
            self._commit({"kind": "never", "add": [], "remove": present})
        return present

    def forget(self, word: str) -> bool:
        """Remove every count involving a word; returns False if none was held."""
        if not self.model.user.holds(word):
            return False
        self._commit({"kind": "forget", "word": word})
        return True

    def prune(self, *, below: float | None = None, seen_before: int | None = None) -> int:
        """Drop counts below a decayed count or last seen before a Unix time; returns how many went."""
        if below is None and seen_before is None:
            return 0
        probe = UserModel(self.model.user.vocab, self.model.settings)
        probe.restore(self.model.user.snapshot())
        dropped = probe.prune(below=below, seen_before=seen_before)
        if dropped:
            self._commit({"kind": "prune", "below": below, "seen_before": seen_before})
        return dropped

    def compact(self) -> None:
        """Rewrite the counts tables from the model and clear the changes (one transaction).

        Raises:
            OutputError: the file could not be written (it stays as it was).
        """
        if self._conn is None:
            _create(self.path, LearnedState.of(self.model))
            self._conn = self._connect()
        else:
            try:
                with learned_db.transaction(self._conn, write=True):
                    learned_db.write_state(self._conn, LearnedState.of(self.model))
            except sqlite3.Error as error:
                raise OutputError(f"{self.path}: cannot write ({error})") from None
        self._pending = 0

    def close(self) -> None:
        """Release the file (changes are already on disk)."""
        self._close_connection()
        if self._lock is not None:
            release(self._lock)
            self._lock = None

    # ------------------------------------------------------------ internals
    def _ensure_file(self) -> None:
        if self._lock is None and LOCKS_AVAILABLE:
            raise OutputError(f"{self.path}: the learned file was closed")
        if self._conn is None:
            self.compact()

    def _commit(self, record: dict[str, Any], *, applied: bool = False) -> None:
        """Record a change durably and apply it to the model (``applied``: the model already has it).

        If the change cannot be written, the model is read back from the file,
        so it never holds a change the file lacks.
        """
        self._ensure_file()
        assert self._conn is not None
        try:
            with learned_db.transaction(self._conn, write=True):
                learned_db.append_change(self._conn, record)
        except sqlite3.Error as error:
            if applied:
                self._reread()
            raise OutputError(f"{self.path}: cannot write ({error})") from None
        if not applied:
            apply_record(self.model, record)
        self._pending += 1
        if self._pending >= self.compact_every:
            self.compact()

    def _reread(self) -> None:
        base = self.model.base
        fresh = AdaptedModel(base)
        if self._conn is not None:
            state, changes = _read_database(self._conn, self.path, check=False)
            fresh = _build(self.path, base, state, changes)
        self.model.reset(fresh.user, fresh.never.entries)

    def _close_connection(self) -> None:
        if self._conn is not None:
            try:
                self._conn.close()
            finally:
                self._conn = None

    def _remove_stale_temporaries(self) -> None:
        """Delete temporary files a killed creation left (no other writer exists: we hold the lock)."""
        directory = self.path.parent if str(self.path.parent) else Path(".")
        for stale in directory.glob(f".{glob.escape(self.path.name)}.*.tmp*"):
            try:
                stale.unlink()
            except OSError:
                pass


def save_learned(model: AdaptedModel, path: str | os.PathLike[str]) -> int:
    """Write a combined model's learned state as the whole of a learned file (its old content is replaced at once).

    Returns:
        The file's size in bytes.

    Raises:
        OutputError: another process is writing it, or it cannot be written (the old file stays).
    """
    target = Path(path)
    state = LearnedState.of(model)
    with locked(target):
        conn = None
        head = None if target.is_dir() else _head(target)
        if head is not None and learned_db.is_database(head):
            try:
                conn = learned_db.connect(target, write=True)
                learned_db.check_schema(conn, target)
            except (sqlite3.Error, ModelFileError):
                if conn is not None:
                    conn.close()
                conn = None
        if conn is None:
            _create(target, state)
        else:
            try:
                with learned_db.transaction(conn, write=True):
                    learned_db.write_state(conn, state)
            except sqlite3.Error as error:
                raise OutputError(f"{target}: cannot write ({error})") from None
            finally:
                conn.close()
    return learned_db.file_bytes(target)


__all__ = [
    "PRIVACY_NOTE",
    "SUFFIX",
    "COMPACT_EVERY",
    "LearnedFile",
    "default_learned_path",
    "load_learned",
    "learned_file_facts",
    "save_learned",
    "export_learned",
    "wipe_learned",
    "apply_record",
]
