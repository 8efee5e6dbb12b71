"""The session log of a copy-task study: one JSON object per line, written whole and flushed.

A log starts with a ``session_start`` line that says what was run, then holds
one line per event in the order it happened.  Every line has ``t``, the
milliseconds since the session started on the page's clock (monotonic), and
``kind``:

============== ==================================================================
kind           other fields
============== ==================================================================
session_start  ``format`` ("foretype-study-log"), ``version``, ``session``,
               ``started`` (UTC, ISO 8601), ``model``, ``k``, ``placement``,
               ``layout``, ``phrases`` (how many the session presents)
phrase_start   ``phrase`` (0-based index), ``target`` (the text to copy)
key            ``char`` (the character typed; ``"\\n"`` for Enter), ``text``
               (the whole entered text afterwards)
backspace      ``text`` (afterwards)
list           ``words`` (the suggestions shown, best first)
take           ``word``, ``rank`` (1-based), ``erase`` (characters before the
               cursor the word replaced), ``insert`` (what it wrote), ``text``
phrase_end     ``phrase``, ``text`` (the transcribed text as submitted)
session_end    (nothing else)
============== ==================================================================

Keystrokes are the ``key``, ``backspace`` and ``take`` events (one each,
whatever the suggestion's rank), the same convention as the typing pad and the
simulated typist.  A writer appends whole lines and flushes (and fsyncs) each
one, so a browser that closes or a server that stops mid-session leaves every
line written so far whole; :func:`read_session_log` drops a torn last line and
reports the phrases that never ended.
"""

from __future__ import annotations

import json
import os
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, TextIO

from ..errors import CorpusError

LOG_FORMAT = "foretype-study-log"
"""The ``format`` field of a session log's first line."""

LOG_VERSION = 1
"""The version of the session log format this engine writes and reads."""

KEYSTROKE_KINDS = frozenset({"key", "backspace", "take"})
"""Event kinds that cost one keystroke each."""

EVENT_FIELDS: dict[str, dict[str, type | tuple[type, ...]]] = {
    "phrase_start": {"phrase": int, "target": str},
    "key": {"char": str, "text": str},
    "backspace": {"text": str},
    "list": {"words": list},
    "take": {"word": str, "rank": int, "erase": int, "insert": str, "text": str},
    "phrase_end": {"phrase": int, "text": str},
    "session_end": {},
}
"""The events a page may send, with the type of each required field (besides ``t`` and ``kind``)."""


class SessionLogError(CorpusError):
    """A session log cannot be read: missing, not a session log, or damaged before its last line."""


def check_event(event: Mapping[str, Any]) -> dict[str, Any]:
    """Validate one event as a page sends it and return it as a plain dict in field order.

    Args:
        event: a JSON object with ``t`` (milliseconds, 0 or more), ``kind`` and
            the kind's fields (see :data:`EVENT_FIELDS`); no other fields.

    Returns:
        The event, ``t`` and ``kind`` first.

    Raises:
        ValueError: an unknown kind, a missing, extra or mistyped field.
    """
    kind = event.get("kind")
    if kind not in EVENT_FIELDS:
        raise ValueError(f"unknown event kind {kind!r}")
    moment = event.get("t")
    if isinstance(moment, bool) or not isinstance(moment, (int, float)) or not moment >= 0 or moment == float("inf"):
        raise ValueError(f"{kind}: t must be milliseconds, 0 or more")
    wanted = EVENT_FIELDS[kind]
    extra = set(event) - set(wanted) - {"t", "kind"}
    if extra:
        raise ValueError(f"{kind}: unknown field {sorted(extra)[0]!r}")
    checked: dict[str, Any] = {"t": moment, "kind": kind}
    for name, kind_of in wanted.items():
        value = event.get(name)
        if value is None or isinstance(value, bool) or not isinstance(value, kind_of):
            raise ValueError(f"{kind}: field {name!r} is missing or not a {getattr(kind_of, '__name__', kind_of)}")
        checked[name] = value
    if kind == "list" and not all(isinstance(w, str) for w in checked["words"]):
        raise ValueError("list: words must be strings")
    if kind == "key" and len(checked["char"]) != 1:
        raise ValueError("key: char must be one character")
    for name in ("phrase", "rank", "erase"):
        if name in checked and checked[name] < 0:
            raise ValueError(f"{kind}: {name} must be 0 or more")
    return checked


class SessionLogWriter:
    """Appends events to a session log, one whole line each, flushed and fsynced before returning."""

    def __init__(self, path: str | Path, header: Mapping[str, Any] | None = None) -> None:
        """Open (or create) a log for appending.

        Args:
            path: the log file; its folder must exist.
            header: the ``session_start`` fields to write first when the file is
                new or empty (``t``, ``kind``, ``format`` and ``version`` are added).
        """
        self.path = Path(path)
        self._handle: TextIO = open(self.path, "a", encoding="utf-8", newline="\n")
        if header is not None and self._handle.tell() == 0:
            self.write({"t": 0, "kind": "session_start", "format": LOG_FORMAT, "version": LOG_VERSION, **header})

    def write(self, event: Mapping[str, Any]) -> None:
        """Append one event as one line (already validated)."""
        self.write_many([event])

    def write_many(self, events: Iterable[Mapping[str, Any]]) -> None:
        """Append events, each as one whole line, then flush and fsync once."""
        text = "".join(json.dumps(dict(e), ensure_ascii=False, allow_nan=False, separators=(",", ":")) + "\n" for e in events)
        if not text:
            return
        self._handle.write(text)
        self._handle.flush()
        os.fsync(self._handle.fileno())

    def close(self) -> None:
        """Close the file (later writes raise)."""
        self._handle.close()

    def __enter__(self) -> SessionLogWriter:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()


@dataclass
class PhraseLog:
    """The events of one presented phrase.

    Attributes:
        index: the phrase's 0-based place in the session.
        target: the presented text P.
        events: the events between its start and its end (the end excluded).
        transcribed: the submitted text, or None when the phrase never ended.
        start_ms: when it was presented.
        end_ms: when it was submitted, or None.
    """

    index: int
    target: str
    events: list[dict[str, Any]] = field(default_factory=list)
    transcribed: str | None = None
    start_ms: float = 0.0
    end_ms: float | None = None

    @property
    def complete(self) -> bool:
        """Whether the phrase was submitted (False: cut short by a closed page or a stopped server)."""
        return self.transcribed is not None

    @property
    def last_text(self) -> str:
        """The text as last logged: the submitted text, or what was entered when the log stops."""
        if self.transcribed is not None:
            return self.transcribed
        for event in reversed(self.events):
            if "text" in event:
                return str(event["text"])
        return ""


@dataclass
class SessionLog:
    """A session log read back.

    Attributes:
        path: the file.
        header: the ``session_start`` object.
        phrases: every phrase presented, in order (the last may be cut short).
        torn_last_line: the file ended in a partial line, which was dropped.
        ended: the log has a ``session_end`` event.
    """

    path: Path
    header: dict[str, Any]
    phrases: list[PhraseLog]
    torn_last_line: bool = False
    ended: bool = False

    @property
    def cut_short(self) -> list[int]:
        """Indices of the phrases presented but never submitted."""
        return [p.index for p in self.phrases if not p.complete]


def read_session_log(path: str | Path) -> SessionLog:
    """Read a session log, tolerating a torn last line.

    Args:
        path: the log file.

    Returns:
        The session, phrase by phrase.  Events outside any phrase (a list
        shown before the first phrase, say) are ignored.

    Raises:
        SessionLogError: the file is missing or unreadable, does not start with
            a session header of a known version, or a line other than the last
            is not a valid event.
    """
    path = Path(path)
    events, torn = _read_events(path)
    header = events[0]
    if header.get("kind") != "session_start" or header.get("format") != LOG_FORMAT:
        raise SessionLogError(f"{path}: not a session log (its first line is not a session header)")
    if header.get("version") != LOG_VERSION:
        raise SessionLogError(f"{path}: session log version {header.get('version')!r}; this foretype reads version {LOG_VERSION}")
    phrases, ended = _group_phrases(events[1:])
    return SessionLog(path=path, header=header, phrases=phrases, torn_last_line=torn, ended=ended)


def _read_events(path: Path) -> tuple[list[dict[str, Any]], bool]:
    """Every complete line as an object (events after the first validated), and whether a torn last line was dropped."""
    try:
        data = path.read_bytes()
    except OSError as error:
        raise SessionLogError(f"{path}: cannot read the session log ({error.strerror or error})") from None
    lines = data.split(b"\n")
    # The last piece is empty after a final newline; anything else was being written when the writer stopped.
    torn = lines.pop() != b""
    if not lines:
        raise SessionLogError(f"{path}: not a session log (no complete first line)")
    events: list[dict[str, Any]] = []
    for number, raw in enumerate(lines, start=1):
        try:
            event = json.loads(raw.decode("utf-8"))
            if not isinstance(event, dict):
                raise ValueError("not an object")
            events.append(check_event(event) if number > 1 else event)
        except (ValueError, UnicodeDecodeError) as error:
            raise SessionLogError(f"{path}: line {number} is not a valid event ({error})") from None
    return events, torn


def _group_phrases(events: list[dict[str, Any]]) -> tuple[list[PhraseLog], bool]:
    """Split a session's events into phrases; also tell whether the session was ended."""
    phrases: list[PhraseLog] = []
    current: PhraseLog | None = None
    ended = False
    for event in events:
        kind = event["kind"]
        if kind == "phrase_start":
            current = PhraseLog(index=event["phrase"], target=event["target"], start_ms=float(event["t"]))
            phrases.append(current)
            continue
        if kind == "phrase_end" and current is not None and current.index == event["phrase"]:
            current.transcribed = event["text"]
            current.end_ms = float(event["t"])
        elif kind not in ("phrase_end", "session_end"):
            if current is not None:
                current.events.append(event)
            continue
        ended = ended or kind == "session_end"
        current = None
    return phrases, ended
