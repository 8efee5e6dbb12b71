"""The learned file: a user model kept beside its base model, durable at every update.

Layout (UTF-8 text, one record per line)::

    foretype-learned 1
    <crc32> {"kind": "state", ...}      the full state when the file was last compacted
    <crc32> {"kind": "learn", ...}      then one record per change, appended
    ...

``<crc32>`` is the CRC-32 of the JSON text after it, as 8 lower-case hex
digits.  The state record holds the settings, the never-suggest list and the
counts (words by model form; each count column a little-endian array,
zlib-compressed and base64-encoded, with its type and length), so nothing in
the file is executed on load.  Change records:

* ``learn``: ``words``, ``after`` (the preceding words of the sentence), ``end``, ``at`` (Unix
  seconds) and ``credit`` (each token's responsibility, see :mod:`foretype.adapt.user_model`);
* ``sentences``: ``sentences`` (lists of words, each a whole sentence), ``at`` and ``credit``
  (one list per sentence): a text learned at once, kept or lost as a whole;
* ``settings``: ``settings`` (every learning setting);
* ``never``: ``add`` and ``remove`` (lists of entries);
* ``forget``: ``word``;
* ``prune``: ``below`` (a count, or null) and ``seen_before`` (Unix seconds, or null).

Durability.  A change is written as one line, flushed and ``fsync``-ed before
the call returns, so once it returns the change survives a crash.  A process
killed mid-write leaves at most a partial last line; readers drop a last line
that is incomplete or fails its checksum, and the next writer cuts it off
before appending, so a kill loses at most the change being written.  Every
``compact_every`` changes the file is rewritten as a single state record into a
temporary file beside it, flushed, and renamed over it: a kill during that
leaves the old file whole.  A bad line anywhere but at the end means the file
was damaged some other way, and loading refuses it with a clear message.

One process at a time may write (an advisory lock on ``<file>.lock``); any
number may read.
"""

from __future__ import annotations

import base64
import glob
import json
import os
import time
import zlib
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any, BinaryIO

import numpy as np

from ..demo import cache_folder
from ..errors import ModelFileError, OptionError, OutputError
from ..modelfile.atomic import remove_quietly as _remove_quietly
from ..modelfile.atomic import replace_atomically
from ..modelfile.atomic import sync_directory as _sync_directory
from ..query.model import LanguageModel
from ..simulate.writing import write_text_atomic
from ..text import WORD_RE
from .combined import AdaptedModel
from .never_list import normalise_entry
from .settings import AdaptSettings
from .user_model import UserModel

try:  # advisory locks; on systems without fcntl writers are not serialised
    import fcntl
except ImportError:  # pragma: no cover - not on Linux or macOS
    fcntl = None  # type: ignore[assignment]

MAGIC_LINE = b"foretype-learned 1\n"
"""The first line of every learned file: our format name and its version."""
SUFFIX = ".learned"
"""A model's learned file is the model's path with this appended."""
COMPACT_EVERY = 500
"""Changes appended between two rewrites of the whole state."""
PRIVACY_NOTE = (
    "A learned file holds personal text (the words and phrases typed). "
    "It stays on this machine: foretype never sends it anywhere. Inspect it with 'foretype learned', "
    "export it, prune it, or wipe it."
)
"""Said wherever learned data is shown."""


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


# --------------------------------------------------------------- encoding
def _encode_array(array: np.ndarray) -> dict[str, Any]:
    little = np.ascontiguousarray(array, dtype=array.dtype.newbyteorder("<"))
    packed = zlib.compress(little.tobytes(), 6)
    return {"dtype": array.dtype.name, "count": int(array.size), "zlib": base64.b64encode(packed).decode("ascii")}


_ARRAY_DTYPES = {"int32", "int64", "float64"}
_MAX_ARRAY_BYTES = 1 << 34


def _decode_array(data: Any) -> np.ndarray:
    if not isinstance(data, dict) or data.get("dtype") not in _ARRAY_DTYPES or not isinstance(data.get("zlib"), str):
        raise ValueError("bad array")
    dtype = np.dtype(data["dtype"]).newbyteorder("<")
    count = int(data["count"])
    if count < 0 or count * dtype.itemsize > _MAX_ARRAY_BYTES:
        raise ValueError("bad array length")
    raw = zlib.decompress(base64.b64decode(data["zlib"].encode("ascii"), validate=True), bufsize=max(1, count * dtype.itemsize))
    if len(raw) != count * dtype.itemsize:
        raise ValueError("array bytes do not match their count")
    return np.frombuffer(raw, dtype=dtype).astype(dtype.newbyteorder("="))


def _state_record(model: AdaptedModel) -> dict[str, Any]:
    snapshot = model.user.snapshot()
    counts: dict[str, Any] = {key: snapshot[key] for key in ("tick", "words", "votes", "credit", "evidence")}
    for table in ("unigrams", "bigrams", "trigrams"):
        counts[table] = {name: _encode_array(column) for name, column in snapshot[table].items()}
    return {
        "kind": "state",
        "written": int(time.time()),
        "settings": model.settings.to_json(),
        "never": model.never.entries,
        "counts": counts,
    }


def _line(record: dict[str, Any]) -> bytes:
    text = json.dumps(record, ensure_ascii=False, separators=(",", ":"), allow_nan=False).encode("utf-8")
    return b"%08x " % (zlib.crc32(text) & 0xFFFFFFFF) + text + b"\n"


# ---------------------------------------------------------------- reading
@dataclass
class _Parsed:
    records: list[dict[str, Any]]
    good_end: int
    """Byte offset just past the last good record."""
    size: int


def _parse(path: Path, data: bytes) -> _Parsed:
    if not data.startswith(MAGIC_LINE):
        if data.startswith(b"foretype-learned "):
            raise ModelFileError(f"{path}: learned file format {data[17:].split(b' ')[0][:8].decode('ascii', 'replace').strip()!r} is not one this engine reads")
        raise ModelFileError(f"{path}: not a foretype learned file")
    pos = len(MAGIC_LINE)
    records: list[dict[str, Any]] = []
    number = 1
    while pos < len(data):
        number += 1
        newline = data.find(b"\n", pos)
        last = newline < 0 or newline == len(data) - 1
        record = _parse_line(data[pos:newline] if newline >= 0 else b"")
        if newline < 0 or record is None:
            if last:
                break  # a torn final write: at most the last change is lost
            raise ModelFileError(f"{path}: corrupt learned file (line {number} fails its checksum)")
        records.append(record)
        pos = newline + 1
    if not records or records[0].get("kind") != "state":
        raise ModelFileError(f"{path}: corrupt learned file (no state record)")
    return _Parsed(records, pos, len(data))


def _parse_line(line: bytes) -> dict[str, Any] | None:
    if len(line) < 10 or line[8:9] != b" ":
        return None
    try:
        expected = int(line[:8], 16)
    except ValueError:
        return None
    body = line[9:]
    if zlib.crc32(body) & 0xFFFFFFFF != expected:
        return None
    try:
        record = json.loads(body.decode("utf-8"))
    except (ValueError, UnicodeDecodeError):
        return None
    return record if isinstance(record, dict) else None


def _read(path: Path) -> _Parsed | None:
    if path.is_dir():
        raise ModelFileError(f"{path}: is a folder, not a learned file")
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        return None
    except OSError as error:
        raise ModelFileError(f"{path}: cannot read ({error.strerror or error})") from None
    return _parse(path, data)


def _build(path: Path, base: LanguageModel, records: Sequence[dict[str, Any]]) -> AdaptedModel:
    model = AdaptedModel(base)
    for number, record in enumerate(records):
        try:
            apply_record(model, record)
        except (KeyError, TypeError, ValueError, OptionError, zlib.error) as error:
            raise ModelFileError(f"{path}: corrupt learned file (record {number + 1}: {error})") from None
    return model


def apply_record(model: AdaptedModel, record: dict[str, Any]) -> None:
    """Apply one record of a learned file to a combined model (replay).

    Raises:
        KeyError, TypeError, ValueError, OptionError: the record is malformed.
    """
    kind = record["kind"]
    user = model.user
    if kind == "learn":
        credit = record.get("credit")
        user.learn(
            [str(w) for w in record["words"]],
            after=[str(w) for w in record["after"]],
            end=bool(record["end"]),
            when=int(record["at"]),
            credit=None if credit is None else [float(r) for r in credit],
        )
    elif kind == "sentences":
        credits = record.get("credit") or [None] * len(record["sentences"])
        if len(credits) != len(record["sentences"]):
            raise ValueError("one credit list per sentence expected")
        for sentence, credit in zip(record["sentences"], credits):
            user.learn([str(w) for w in sentence], end=True, when=int(record["at"]), credit=None if credit is None else [float(r) for r in credit])
    elif kind == "state":
        user.set_settings(AdaptSettings.from_json(record["settings"]))
        never = record["never"]
        if not isinstance(never, list):
            raise TypeError("the never-suggest list is not a list")
        model.never.replace(str(e) for e in never)
        counts = record["counts"]
        state = {
            "tick": int(counts["tick"]),
            "words": [str(w) for w in counts["words"]],
            "votes": counts.get("votes", {}),
            "credit": counts.get("credit", [0.0, 0.0, 0.0]),
            "evidence": counts.get("evidence", [0.0, 0.0, 0.0]),
        }
        for table in ("unigrams", "bigrams", "trigrams"):
            state[table] = {name: _decode_array(column) for name, column in counts[table].items()}
        user.restore(state)
    elif kind == "settings":
        user.set_settings(AdaptSettings.from_json(record["settings"]))
    elif kind == "never":
        for entry in record.get("add", []):
            model.never.add(str(entry))
        for entry in record.get("remove", []):
            model.never.remove(str(entry))
    elif kind == "forget":
        user.forget(str(record["word"]))
    elif kind == "prune":
        below = record.get("below")
        before = record.get("seen_before")
        user.prune(below=None if below is None else float(below), seen_before=None if before is None else int(before))
    else:
        raise ValueError(f"unknown record kind {kind!r}")


def load_learned(path: str | os.PathLike[str], base: LanguageModel, *, must_exist: bool = False) -> AdaptedModel:
    """Read a learned file into a combined model, without locking or changing the file.

    A missing file gives an empty user model with the default settings, unless
    ``must_exist`` (a file the person named: a typo must not pass for "nothing learned").

    Raises:
        ModelFileError: the file is missing and ``must_exist``, is not a learned file,
            or is damaged (other than a torn last line).
    """
    source = Path(path)
    parsed = _read(source)
    if parsed is None:
        if must_exist:
            raise ModelFileError(f"{source}: no such learned file")
        return AdaptedModel(base)
    return _build(source, base, parsed.records)


def learned_file_facts(path: str | os.PathLike[str]) -> dict[str, Any]:
    """Facts about a learned file itself: size, records since the last compaction, a torn tail.

    Raises:
        ModelFileError: as :func:`load_learned`.
    """
    source = Path(path)
    parsed = _read(source)
    if parsed is None:
        return {"exists": False}
    return {
        "exists": True,
        "file_bytes": parsed.size,
        "changes_since_compaction": len(parsed.records) - 1,
        "torn_tail_bytes": parsed.size - parsed.good_end,
        "written": parsed.records[0].get("written"),
    }


def wipe_learned(path: str | os.PathLike[str]) -> bool:
    """Delete a learned file (and its lock file); returns False if there was none.

    Raises:
        OutputError: another process is writing it, or it cannot be removed.
    """
    target = Path(path)
    with _locked(target):
        try:
            target.unlink()
            removed = True
        except FileNotFoundError:
            removed = False
        except OSError as error:
            raise OutputError(f"{target}: cannot remove ({error.strerror or error})") from None
        _sync_directory(target.parent if str(target.parent) else Path("."))
    _remove_quietly(str(_lock_path(target)))
    return removed


# ---------------------------------------------------------------- writing
def _lock_path(path: Path) -> Path:
    return path.with_name(path.name + ".lock")


@contextmanager
def _locked(path: Path) -> Iterator[None]:
    handle = _acquire(path)
    try:
        yield
    finally:
        _release(handle)


def _acquire(path: Path) -> int | None:
    if fcntl is None:
        return None
    try:
        handle = os.open(_lock_path(path), os.O_RDWR | os.O_CREAT, 0o600)
    except OSError as error:
        raise OutputError(f"{path}: cannot write ({error.strerror or error})") from None
    try:
        fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        os.close(handle)
        raise OutputError(f"{path}: in use by another foretype process (close it first)") from None
    return handle


def _release(handle: int | None) -> None:
    if handle is not None:
        os.close(handle)  # closing releases the lock


class LearnedFile:
    """A learned file open for changes: each change is applied and made durable before returning.

    Use as a context manager, or call :meth:`close`.  ``model`` is the combined
    model to take suggestions from; it always reflects every change made.
    """

    def __init__(self, path: str | os.PathLike[str], base: LanguageModel, *, compact_every: int = COMPACT_EVERY) -> None:
        """Open (or prepare to create) a learned file and take the writer's lock.

        The file itself is created by the first change.

        Args:
            path: the learned file.
            base: the base model the counts combine with.
            compact_every: changes between two rewrites of the whole state.

        Raises:
            ModelFileError: the file exists but is not a learned file or is damaged.
            OutputError: another process holds it, or its folder cannot be written.
        """
        if compact_every < 1:
            raise OptionError(f"compact_every must be at least 1, not {compact_every}")
        self.path = Path(path)
        self.compact_every = compact_every
        self._lock = _acquire(self.path)
        try:
            parsed = _read(self.path)
            self.model = AdaptedModel(base) if parsed is None else _build(self.path, base, parsed.records)
            self._pending = 0 if parsed is None else len(parsed.records) - 1
            self._exists = parsed is not None
            if parsed is not None and parsed.good_end < parsed.size:
                self._cut_torn_tail(parsed.good_end)
            self._remove_stale_temporaries()
        except BaseException:
            _release(self._lock)
            raise
        self._handle: Any = None

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
        """Rewrite the file as one state record (temporary file, flush, rename)."""
        self._close_handle()
        _write_state(self.model, self.path)
        self._pending = 0
        self._exists = True

    def close(self) -> None:
        """Release the file (changes are already on disk)."""
        self._close_handle()
        if self._lock is not None:
            _release(self._lock)
            self._lock = None

    # ------------------------------------------------------------ internals
    def _ensure_file(self) -> None:
        if self._lock is None and fcntl is not None:
            raise OutputError(f"{self.path}: the learned file was closed")
        if not self._exists:
            self.compact()

    def _commit(self, record: dict[str, Any], *, applied: bool = False) -> None:
        """Append a change durably and apply it to the model (``applied``: the model already has it).

        If the line cannot be written, the model is read back from the file,
        so it never holds a change the file lacks.
        """
        self._ensure_file()
        line = _line(record)
        handle = self._append_handle()
        try:
            handle.write(line)
            handle.flush()
            os.fsync(handle.fileno())
        except OSError as error:
            self._close_handle()
            if applied:
                self._reread()
            raise OutputError(f"{self.path}: cannot write ({error.strerror or error})") from None
        if not applied:
            apply_record(self.model, record)
        self._pending += 1
        if self._pending >= self.compact_every:
            self.compact()

    def _reread(self) -> None:
        parsed = _read(self.path)
        base = self.model.base
        fresh = AdaptedModel(base) if parsed is None else _build(self.path, base, parsed.records)
        self.model.reset(fresh.user, fresh.never.entries)

    def _append_handle(self) -> Any:
        if self._handle is None:
            try:
                self._handle = open(self.path, "ab", buffering=0)
            except OSError as error:
                raise OutputError(f"{self.path}: cannot write ({error.strerror or error})") from None
        return self._handle

    def _close_handle(self) -> None:
        if self._handle is not None:
            try:
                self._handle.close()
            finally:
                self._handle = None

    def _remove_stale_temporaries(self) -> None:
        """Delete temporary files a killed compaction left (no other writer exists: we hold the lock)."""
        directory = self.path.parent if str(self.path.parent) else Path(".")
        for stale in directory.glob(f".{glob.escape(self.path.name)}.*.tmp"):
            try:
                stale.unlink()
            except OSError:
                pass

    def _cut_torn_tail(self, good_end: int) -> None:
        try:
            with open(self.path, "r+b") as handle:
                handle.truncate(good_end)
                handle.flush()
                os.fsync(handle.fileno())
        except OSError as error:
            raise OutputError(f"{self.path}: cannot repair the torn last line ({error.strerror or error})") from None


def save_learned(model: AdaptedModel, path: str | os.PathLike[str]) -> int:
    """Write a combined model's learned state as a new learned file (temporary file, then rename).

    Returns:
        The file's size in bytes.

    Raises:
        OutputError: another process is writing it, or it cannot be written (the old file stays).
    """
    target = Path(path)
    with _locked(target):
        return _write_state(model, target)


def _write_state(model: AdaptedModel, target: Path) -> int:
    """Write the magic line and one state record to a temporary file, flush it, and rename it over ``target``."""
    record = _line(_state_record(model))

    def write(out: BinaryIO) -> None:
        out.write(MAGIC_LINE)
        out.write(record)

    return replace_atomically(target, write)


def export_learned(model: AdaptedModel, path: str | os.PathLike[str]) -> dict[str, int]:
    """Write everything a combined model learned to a plain JSON file (atomically).

    The export lists the settings, the never-suggest list, and every word,
    bigram and trigram with its decayed count, raw uses and last-seen time,
    words written out (never ids).

    Returns:
        How many words, bigrams and trigrams were written.

    Raises:
        OutputError: the file cannot be written (an existing file stays as it was).
    """
    user = model.user
    words = [
        {"word": form, "shown_as": user.display(i), "count": count, "uses": uses, "last_seen": seen, "new_word": user.is_learned(i)}
        for i, form, count, uses, seen in user.word_rows()
    ]
    grams = {}
    for order in (2, 3):
        grams[order] = [
            {"words": [user.form(i) for i in ids], "count": count, "uses": uses, "last_seen": seen} for ids, count, uses, seen in user.ngram_rows(order)
        ]
    payload = {
        "format": "foretype-learned-export",
        "version": 1,
        "note": PRIVACY_NOTE,
        "settings": model.settings.to_json(),
        "never_suggest": model.never.entries,
        "tokens": user.raw_tokens,
        "words": words,
        "bigrams": grams[2],
        "trigrams": grams[3],
    }
    write_text_atomic(path, json.dumps(payload, ensure_ascii=False, indent=1) + "\n")
    return {"words": len(words), "bigrams": len(grams[2]), "trigrams": len(grams[3])}
