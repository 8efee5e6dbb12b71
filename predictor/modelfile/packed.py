"""Word ids in three bytes: the id sections of vocabularies too large for 16 bits.

A vocabulary of more than 65,533 words needs more than 16 bits per id; int32
spends a fourth byte that no vocabulary this format stores (at most
:data:`~foretype.modelfile.limits.MAX_VOCABULARY` words, 21 bits) uses.  A
section of word ids stored as ``uint8`` holds each id in three bytes, least
significant first: id i is ``b[3i] | b[3i + 1] << 8 | b[3i + 2] << 16``.  The
compiled core reads the bytes in place; the numpy path decodes a section once.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

try:
    from ._checks import packed_largest
except ImportError:  # not built: no compiler at install time
    packed_largest = None

PACKED = np.dtype(np.uint8)
"""The dtype of a word-id section stored in three bytes per id."""
PACKED_LIMIT = 1 << 24
"""Ids below this fit three bytes."""


def is_packed(ids: np.ndarray) -> bool:
    """Whether a word-id section holds three bytes per id."""
    return ids.dtype == PACKED


def id_count(ids: np.ndarray) -> int:
    """How many ids a word-id section holds (a packed section's length is three times that)."""
    return len(ids) // 3 if is_packed(ids) else len(ids)


def pack_ids(ids: np.ndarray) -> NDArray[np.uint8]:
    """Ids in [0, 2^24) as three bytes each, least significant first."""
    wide = np.asarray(ids, dtype=np.int64)
    if len(wide) and (int(wide.min()) < 0 or int(wide.max()) >= PACKED_LIMIT):
        raise ValueError("packed word ids lie in [0, 2^24)")
    return np.ascontiguousarray(wide.astype("<u4").view(np.uint8).reshape(-1, 4)[:, :3]).reshape(-1)


def unpack_ids(ids: np.ndarray) -> np.ndarray:
    """A word-id section as an integer array (packed sections decoded to int32; the others returned as they are)."""
    if not is_packed(ids):
        return ids
    rows = ids[: len(ids) // 3 * 3].reshape(-1, 3).astype(np.int32)
    return rows[:, 0] | (rows[:, 1] << 8) | (rows[:, 2] << 16)


def id_at(ids: np.ndarray, index: int) -> int:
    """Id ``index`` of a word-id section, as a Python int."""
    if not is_packed(ids):
        return int(ids.item(index))
    at = 3 * index
    return int(ids.item(at)) | int(ids.item(at + 1)) << 8 | int(ids.item(at + 2)) << 16


def ids_at(ids: np.ndarray, positions: np.ndarray) -> np.ndarray:
    """Ids at some positions of a word-id section (int64; a packed section decoded only there)."""
    positions = np.asarray(positions, dtype=np.int64)
    if not is_packed(ids):
        return ids[positions].astype(np.int64)
    at = 3 * positions
    return ids[at].astype(np.int64) | (ids[at + 1].astype(np.int64) << 8) | (ids[at + 2].astype(np.int64) << 16)


def largest_id(ids: np.ndarray) -> int:
    """The largest id of a non-empty packed section (one compiled pass, or numpy reading the high bytes first)."""
    if packed_largest is not None and ids.flags.c_contiguous:
        return int(packed_largest(ids))
    return largest_by_high_bytes(ids)


def largest_by_high_bytes(ids: np.ndarray) -> int:
    """:func:`largest_id` in numpy, the reference of the compiled pass: high bytes first, most ids never decoded."""
    return _extreme_by_high_bytes(ids, largest=True)


def id_range(ids: np.ndarray) -> tuple[int, int]:
    """The smallest and largest id of a non-empty word-id section (a packed one without decoding it whole)."""
    if not is_packed(ids):
        return int(ids.min()), int(ids.max())
    return _smallest(ids), largest_id(ids)


def _smallest(ids: np.ndarray) -> int:
    """The smallest id of a non-empty packed section, reading the high bytes first."""
    return _extreme_by_high_bytes(ids, largest=False)


def _extreme_by_high_bytes(ids: np.ndarray, *, largest: bool) -> int:
    """The largest or smallest id of a non-empty packed section: the extreme high byte, then among those ids the next byte."""
    count = len(ids) // 3
    candidates = np.arange(count, dtype=np.int64)
    value = 0
    for shift, byte in ((16, 2), (8, 1), (0, 0)):
        column = ids[3 * candidates + byte] if len(candidates) < count else ids[byte : 3 * count : 3]
        best = int(column.max() if largest else column.min())
        value |= best << shift
        candidates = candidates[column == best]
    return value
