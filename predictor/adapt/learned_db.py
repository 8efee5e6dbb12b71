"""The learned file's SQLite layer: schema, opening and checking a file, reading and writing the state.

A learned file is an SQLite database (``PRAGMA application_id`` = :data:`APPLICATION_ID`,
``PRAGMA user_version`` = the schema version) in WAL mode, so one writer and
any number of readers work at once and readers are never blocked by the
writer.  Its tables, readable with any SQLite tool:

``setting``
    the learning settings, one row each (name, JSON value).
``info``
    ``tick`` (tokens learned, the decay clock) and ``written`` (Unix time of the last compaction).
``share``
    R_b and n_b per evidence bucket (``credit``, ``evidence``), decayed to the last compaction.
``never_suggest``
    the never-suggest list, one entry per row.
``word``
    every word the counts name, by model form (ids 0, 1 and 2 are ``<s>``, ``</s>`` and ``<unk>``).
``spelling``
    how each word new to the base vocabulary was written, with its votes.
``unigram``, ``bigram``, ``trigram``
    the counts (decayed to the last compaction), raw uses and last-seen time (Unix seconds), by word id.
``change``
    the changes made since the last compaction, one JSON record per row (see
    :mod:`foretype.adapt.records`), replayed in order on load.

Counts are kept by word, never by base-model id, so a learned file survives a
rebuilt base model.  Nothing in the file is executed on load: a file whose
schema holds anything but these tables (a trigger, a view, another table) is refused.
"""

from __future__ import annotations

import json
import os
import sqlite3
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import ModelFileError
from .records import LearnedState
from .settings import AdaptSettings

APPLICATION_ID = 0x46544C44
"""``PRAGMA application_id`` of every learned file ("FTLD")."""
SCHEMA_VERSION = 1
"""``PRAGMA user_version`` of the files this code writes; files of a newer version are refused."""
SQLITE_HEADER = b"SQLite format 3\x00"
"""The first 16 bytes of every SQLite database file."""
BUSY_TIMEOUT = 10.0
"""Seconds a connection waits for a lock SQLite holds only for a moment (a checkpoint, a commit)."""

TABLES = {
    "setting": "CREATE TABLE setting (name TEXT PRIMARY KEY NOT NULL, value TEXT NOT NULL)",
    "info": "CREATE TABLE info (name TEXT PRIMARY KEY NOT NULL, value INTEGER NOT NULL)",
    "share": "CREATE TABLE share (bucket INTEGER PRIMARY KEY, credit REAL NOT NULL, evidence REAL NOT NULL)",
    "never_suggest": "CREATE TABLE never_suggest (entry TEXT PRIMARY KEY NOT NULL)",
    "word": "CREATE TABLE word (id INTEGER PRIMARY KEY, form TEXT NOT NULL UNIQUE)",
    "spelling": "CREATE TABLE spelling (word INTEGER NOT NULL, written TEXT NOT NULL, votes INTEGER NOT NULL, PRIMARY KEY (word, written))",
    "unigram": "CREATE TABLE unigram (w INTEGER PRIMARY KEY, count REAL NOT NULL, uses INTEGER NOT NULL, last_seen INTEGER NOT NULL)",
    "bigram": "CREATE TABLE bigram (v INTEGER NOT NULL, w INTEGER NOT NULL, count REAL NOT NULL, uses INTEGER NOT NULL, "
    "last_seen INTEGER NOT NULL, PRIMARY KEY (v, w)) WITHOUT ROWID",
    "trigram": "CREATE TABLE trigram (u INTEGER NOT NULL, v INTEGER NOT NULL, w INTEGER NOT NULL, count REAL NOT NULL, "
    "uses INTEGER NOT NULL, last_seen INTEGER NOT NULL, PRIMARY KEY (u, v, w)) WITHOUT ROWID",
    "change": "CREATE TABLE change (seq INTEGER PRIMARY KEY, record TEXT NOT NULL)",
}
"""The schema of version :data:`SCHEMA_VERSION`, exactly as SQLite keeps it in ``sqlite_schema``."""
_NGRAM_COLUMNS = {"unigrams": ("unigram", ("w",)), "bigrams": ("bigram", ("v", "w")), "trigrams": ("trigram", ("u", "v", "w"))}
_STATE_TABLES = ("setting", "info", "share", "never_suggest", "word", "spelling", "unigram", "bigram", "trigram")


def is_database(head: bytes) -> bool:
    """Tell whether the first bytes of a file are an SQLite database's."""
    return head.startswith(SQLITE_HEADER)


def connect(path: Path, *, write: bool) -> sqlite3.Connection:
    """Open an existing learned file (``write``: for the one writer) in autocommit mode.

    A reader's connection refuses every statement that would change the file
    (``query_only``); it is still opened for writing where the file allows, so
    that SQLite can tidy its write-ahead log away when the last connection closes.

    Raises:
        sqlite3.Error: SQLite cannot open it.
    """
    conn = sqlite3.connect(f"{path.absolute().as_uri()}?mode=rw", uri=True, timeout=BUSY_TIMEOUT, isolation_level=None, check_same_thread=False)
    try:
        conn.execute("PRAGMA trusted_schema = OFF")
        if write:
            conn.execute("PRAGMA synchronous = FULL")  # every commit is on disk when it returns
        else:
            conn.execute("PRAGMA query_only = ON")
    except BaseException:
        conn.close()
        raise
    return conn


def check_schema(conn: sqlite3.Connection, path: Path) -> None:
    """Refuse a database that is not a learned file of a version this code reads.

    Raises:
        ModelFileError: another application's database, a newer schema, or a schema
            that differs from ours (a trigger, a view, a changed table).
    """
    application = conn.execute("PRAGMA application_id").fetchone()[0]
    version = conn.execute("PRAGMA user_version").fetchone()[0]
    if application != APPLICATION_ID:
        raise ModelFileError(f"{path}: not a foretype learned file")
    if version > SCHEMA_VERSION:
        raise ModelFileError(f"{path}: learned file schema {version} is newer than this foretype reads ({SCHEMA_VERSION}); update foretype")
    if version != SCHEMA_VERSION:
        raise ModelFileError(f"{path}: learned file schema {version} is not one this foretype reads")
    found = {}
    for kind, name, sql in conn.execute("SELECT type, name, sql FROM sqlite_schema"):
        if kind == "index" and sql is None and str(name).startswith("sqlite_autoindex_"):
            continue  # made by a PRIMARY KEY or UNIQUE constraint: no SQL of its own
        if kind != "table" or TABLES.get(name) != sql:
            raise ModelFileError(f"{path}: corrupt learned file (unexpected {kind} {name!r} in its schema)")
        found[name] = sql
    if set(found) != set(TABLES):
        raise ModelFileError(f"{path}: corrupt learned file (tables missing: {', '.join(sorted(set(TABLES) - set(found)))})")


def check_pages(conn: sqlite3.Connection, path: Path) -> None:
    """Run SQLite's own structural check (every page reachable and well formed).

    Raises:
        ModelFileError: the file is damaged (truncated, or pages overwritten).
    """
    problems = [row[0] for row in conn.execute("PRAGMA quick_check(3)")]
    if problems != ["ok"]:
        first = " ".join(str(problems[0]).replace("*** in database main ***", "").split())
        raise ModelFileError(f"{path}: corrupt learned file ({first})")


@contextmanager
def transaction(conn: sqlite3.Connection, *, write: bool) -> Iterator[None]:
    """One transaction: all of its statements take effect, or none (a write one takes the write lock at once)."""
    conn.execute("BEGIN IMMEDIATE" if write else "BEGIN")
    try:
        yield
    except BaseException:
        try:
            conn.execute("ROLLBACK")
        except sqlite3.Error:
            pass
        raise
    conn.execute("COMMIT")


def create_schema(conn: sqlite3.Connection) -> None:
    """Make an empty database a learned file (tables, identity, WAL mode)."""
    conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
    conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
    conn.execute("PRAGMA journal_mode = WAL")
    with transaction(conn, write=True):
        for sql in TABLES.values():
            conn.execute(sql)


def write_state(conn: sqlite3.Connection, state: LearnedState) -> None:
    """Replace the file's state with ``state`` and clear its changes (inside the caller's write transaction)."""
    for table in (*_STATE_TABLES, "change"):
        conn.execute(f"DELETE FROM {table}")
    conn.executemany("INSERT INTO setting VALUES (?, ?)", [(name, json.dumps(value)) for name, value in state.settings.to_json().items()])
    counts = state.counts
    conn.executemany("INSERT INTO info VALUES (?, ?)", [("tick", int(counts["tick"])), ("written", int(time.time()))])
    conn.executemany("INSERT INTO share VALUES (?, ?, ?)", [(b, float(r), float(n)) for b, (r, n) in enumerate(zip(counts["credit"], counts["evidence"]))])
    conn.executemany("INSERT INTO never_suggest VALUES (?)", [(entry,) for entry in state.never])
    words = counts["words"]
    conn.executemany("INSERT INTO word VALUES (?, ?)", enumerate(words))
    index = {form: i for i, form in enumerate(words)}
    conn.executemany(
        "INSERT INTO spelling VALUES (?, ?, ?)",
        [(index[form], written, int(n)) for form, votes in counts["votes"].items() if form in index for written, n in votes.items()],
    )
    for key, (table, heads) in _NGRAM_COLUMNS.items():
        columns = counts[key]
        rows = zip(*(columns[h].tolist() for h in heads), columns["count"].tolist(), columns["uses"].tolist(), columns["seen"].tolist())
        conn.executemany(f"INSERT INTO {table} VALUES ({', '.join('?' * (len(heads) + 3))})", rows)


def read_state(conn: sqlite3.Connection) -> tuple[LearnedState, list[dict[str, Any]]]:
    """The file's state and its changes since, read in one transaction (a consistent snapshot).

    Raises:
        ValueError, TypeError, KeyError, OptionError: a value is malformed.
        sqlite3.Error: SQLite cannot read the file (it is damaged).
    """
    with transaction(conn, write=False):
        settings = {str(name): json.loads(value) for name, value in conn.execute("SELECT name, value FROM setting")}
        info = dict(conn.execute("SELECT name, value FROM info"))
        shares = conn.execute("SELECT bucket, credit, evidence FROM share ORDER BY bucket").fetchall()
        never = [str(row[0]) for row in conn.execute("SELECT entry FROM never_suggest ORDER BY entry")]
        ids_forms = conn.execute("SELECT id, form FROM word ORDER BY id").fetchall()
        spellings = conn.execute("SELECT word, written, votes FROM spelling").fetchall()
        tables = {key: conn.execute(f"SELECT {', '.join(heads)}, count, uses, last_seen FROM {table}").fetchall() for key, (table, heads) in _NGRAM_COLUMNS.items()}
        changes = [json.loads(row[0]) for row in conn.execute("SELECT record FROM change ORDER BY seq")]
    if [i for i, _ in ids_forms] != list(range(len(ids_forms))):
        raise ValueError("word ids are not 0, 1, 2, ...")
    if [b for b, _, _ in shares] != [0, 1, 2]:
        raise ValueError("the share table needs buckets 0, 1 and 2")
    words = [str(form) for _, form in ids_forms]
    votes: dict[str, dict[str, int]] = {}
    for word, written, n in spellings:
        votes.setdefault(words[int(word)], {})[str(written)] = int(n)
    counts: dict[str, Any] = {
        "tick": int(info["tick"]),
        "words": words,
        "votes": votes,
        "credit": [float(r) for _, r, _ in shares],
        "evidence": [float(n) for _, _, n in shares],
    }
    for key, (_, heads) in _NGRAM_COLUMNS.items():
        rows = tables[key]
        columns = list(zip(*rows)) if rows else [()] * (len(heads) + 3)
        table: dict[str, np.ndarray] = {h: np.array(col, dtype=np.int64) for h, col in zip(heads, columns)}
        table["count"] = np.array(columns[len(heads)], dtype=np.float64)
        table["uses"] = np.array(columns[len(heads) + 1], dtype=np.int64)
        table["seen"] = np.array(columns[len(heads) + 2], dtype=np.int64)
        counts[key] = table
    if not all(isinstance(change, dict) for change in changes):
        raise ValueError("a change record is not a JSON object")
    return LearnedState(AdaptSettings.from_json(settings), never, counts), changes


def change_count(conn: sqlite3.Connection) -> int:
    """How many changes were made since the last compaction."""
    return int(conn.execute("SELECT count(*) FROM change").fetchone()[0])


def written_at(conn: sqlite3.Connection) -> int | None:
    """Unix time of the last compaction (None if the file does not say)."""
    row = conn.execute("SELECT value FROM info WHERE name = 'written'").fetchone()
    return None if row is None else int(row[0])


def append_change(conn: sqlite3.Connection, record: dict[str, Any]) -> None:
    """Add one change record (inside the caller's write transaction)."""
    conn.execute("INSERT INTO change (record) VALUES (?)", (json.dumps(record, ensure_ascii=False, separators=(",", ":"), allow_nan=False),))


def companions(path: Path) -> list[Path]:
    """The files SQLite keeps beside a WAL-mode database (its write-ahead log and shared index)."""
    return [path.with_name(path.name + "-wal"), path.with_name(path.name + "-shm")]


def file_bytes(path: Path) -> int:
    """The size of a learned file with its write-ahead log."""
    total = 0
    for part in (path, companions(path)[0]):
        try:
            total += os.path.getsize(part)
        except OSError:
            pass
    return total


__all__ = [
    "APPLICATION_ID",
    "SCHEMA_VERSION",
    "TABLES",
    "is_database",
    "connect",
    "check_schema",
    "check_pages",
    "transaction",
    "create_schema",
    "write_state",
    "read_state",
    "append_change",
    "change_count",
    "written_at",
    "companions",
    "file_bytes",
]
