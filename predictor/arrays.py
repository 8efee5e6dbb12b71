"""Small numpy helpers shared by counting, estimation and the model file."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np


def offsets_dtype(largest: int) -> np.dtype:
    """Return the narrowest unsigned dtype (uint32 or uint64) that holds offsets up to ``largest``."""
    return np.dtype(np.uint32) if largest < 2**32 else np.dtype(np.uint64)


def word_id_dtype(vocab_size: int) -> np.dtype:
    """Return the dtype that stores word ids of a vocabulary: uint16 when V + 3 ids fit, else int32."""
    return np.dtype(np.uint16) if vocab_size + 3 <= 2**16 else np.dtype(np.int32)


def pack_strings(strings: Sequence[str]) -> tuple[np.ndarray, np.ndarray]:
    """Pack strings into one UTF-8 blob and an offsets array.

    Returns:
        ``(blob, offsets)``: uint8 array of the concatenated UTF-8 bytes, and an
        offsets array of shape (len(strings) + 1,) with string i at
        ``blob[offsets[i]:offsets[i + 1]]``.
    """
    encoded = [s.encode("utf-8") for s in strings]
    lengths = np.fromiter((len(e) for e in encoded), dtype=np.int64, count=len(encoded))
    offsets = np.zeros(len(encoded) + 1, dtype=np.int64)
    np.cumsum(lengths, out=offsets[1:])
    blob = np.frombuffer(b"".join(encoded), dtype=np.uint8).copy()
    return blob, offsets.astype(offsets_dtype(int(offsets[-1])))


def unpack_string(blob: np.ndarray, offsets: np.ndarray, index: int) -> str:
    """Return string ``index`` of a blob made by :func:`pack_strings`."""
    return blob[int(offsets[index]) : int(offsets[index + 1])].tobytes().decode("utf-8")


def group_starts(*columns: np.ndarray) -> np.ndarray:
    """Return the row indices where a new group of equal rows begins.

    Args:
        columns: equal-length arrays, already sorted lexicographically by them.

    Returns:
        int64 array of the first row of each run of identical rows.
    """
    length = len(columns[0])
    if length == 0:
        return np.zeros(0, dtype=np.int64)
    change = np.zeros(length, dtype=bool)
    change[0] = True
    for column in columns:
        change[1:] |= column[1:] != column[:-1]
    return np.flatnonzero(change)


def stable_argsort(keys: np.ndarray, key_bits: int) -> tuple[np.ndarray, np.ndarray]:
    """Stable argsort of non-negative int64 keys below ``2 ** key_bits``, with the sorted keys.

    Where a key and its row index fit in 63 bits together they are packed
    into one value and sorted by value, several times faster than an argsort.

    Returns:
        ``(order, sorted_keys)``: int64 arrays of shape (n,), ``keys[order] == sorted_keys``.
    """
    index_bits = max(1, int(len(keys) - 1).bit_length())
    if key_bits + index_bits > 63:
        order = np.argsort(keys, kind="stable")
        return order, keys[order]
    packed = keys << index_bits
    packed |= np.arange(len(keys), dtype=np.int64)
    packed.sort()
    order = packed & ((1 << index_bits) - 1)
    packed >>= index_bits
    return order, packed
