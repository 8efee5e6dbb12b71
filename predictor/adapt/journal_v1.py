"""Reading learned files of format 1 (the journalled text format), so they can be converted.

Format 1, written by foretype before learned files moved to SQLite, is UTF-8
text, one record per line::

    foretype-learned 1
    <crc32> {"kind": "state", ...}      the full state when the file was last compacted
    <crc32> {"kind": "learn", ...}      then one change record per line
    ...

``<crc32>`` is the CRC-32 of the JSON text after it, as 8 lower-case hex
digits; the records are those of :mod:`foretype.adapt.records`.  A last line
that is incomplete or fails its checksum is a torn final write and is dropped;
a bad line anywhere else means the file was damaged.  Only reading is kept:
a writer converts such a file to the SQLite format on opening it.
"""

from __future__ import annotations

import base64
import json
import zlib
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import ModelFileError
from .records import LearnedState
from .settings import AdaptSettings

MAGIC_LINE = b"foretype-learned 1\n"
"""The first line of a format-1 learned file."""
MAGIC_PREFIX = b"foretype-learned "
"""What every text-format learned file starts with, whatever its version."""


def is_journal(head: bytes) -> bool:
    """Tell whether the first bytes of a file are those of a text-format learned file (any version)."""
    return head.startswith(MAGIC_PREFIX)


def read_journal(path: Path, data: bytes) -> list[dict[str, Any]]:
    """The records of a format-1 learned file: its state record first, then its changes.

    Args:
        path: the file (for messages).
        data: its whole content.

    Returns:
        The records, as parsed JSON objects (a torn last line dropped).

    Raises:
        ModelFileError: another text format version, a damaged line before the last, or no state record.
    """
    if not data.startswith(MAGIC_LINE):
        version = data[len(MAGIC_PREFIX) :].split(b"\n")[0].split(b" ")[0][:8].decode("ascii", "replace").strip()
        raise ModelFileError(f"{path}: learned file format {version!r} is not one this engine reads")
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
    return records


def _parse_line(line: bytes) -> dict[str, Any] | None:
    """One ``<crc32> <json>`` line as a JSON object, or None if it is malformed or fails its checksum."""
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


_ARRAY_DTYPES = {"int32", "int64", "float64"}
_MAX_ARRAY_BYTES = 1 << 34


def state_of(record: dict[str, Any]) -> LearnedState:
    """The learned state in a format-1 state record.

    The counts are columns, each a little-endian array, zlib-compressed and
    base64-encoded, with its type and length (so nothing is executed on load).

    Raises:
        KeyError, TypeError, ValueError, OptionError, zlib.error: the record is malformed.
    """
    never = record["never"]
    if not isinstance(never, list):
        raise TypeError("the never-suggest list is not a list")
    counts = record["counts"]
    state: dict[str, Any] = {
        "tick": int(counts["tick"]),
        "words": [str(w) for w in counts["words"]],
        "votes": counts.get("votes", {}),
        "credit": counts.get("credit", [0.0, 0.0, 0.0]),
        "evidence": counts.get("evidence", [0.0, 0.0, 0.0]),
    }
    for table in ("unigrams", "bigrams", "trigrams"):
        state[table] = {name: _decode_array(column) for name, column in counts[table].items()}
    return LearnedState(AdaptSettings.from_json(record["settings"]), [str(e) for e in never], state)


def _decode_array(data: Any) -> np.ndarray:
    """One count column of a state record (see :func:`state_of`)."""
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


__all__ = ["MAGIC_LINE", "is_journal", "read_journal", "state_of"]
