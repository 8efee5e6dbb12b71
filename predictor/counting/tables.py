"""Sorting rows of ids and summing the counts of identical rows."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..arrays import group_starts
from .spill import sum_duplicates


def aggregate_rows(columns: Sequence[np.ndarray], counts: np.ndarray | None, base: int) -> tuple[list[np.ndarray], np.ndarray]:
    """Sort rows of small integer ids and sum the counts of identical rows.

    Rows are packed into one int64 key when ``base ** len(columns)`` fits in 63
    bits, otherwise sorted with a lexicographic sort.

    Args:
        columns: int32 arrays of ids, each id in ``[0, base)``.
        counts: int64 array of the rows' counts, or None when every row counts once.
        base: one more than the largest id.

    Returns:
        The unique rows (sorted lexicographically) as int32 columns, and their summed counts.
    """
    counts_are_ones = counts is None
    if counts is None:
        counts = np.ones(len(columns[0]), dtype=np.int64)
    if len(counts) == 0:
        return [np.zeros(0, dtype=np.int32) for _ in columns], np.zeros(0, dtype=np.int64)
    bits = max(1, int(base - 1).bit_length())
    if bits * len(columns) <= 63:
        key = np.zeros(len(counts), dtype=np.int64)
        for column in columns:
            key <<= bits
            key |= column.astype(np.int64)
        if counts_are_ones:
            key.sort()
            starts = group_starts(key)
            summed = np.diff(np.append(starts, len(key)))
            unique = key[starts]
        else:
            unique, summed = sum_duplicates(key, counts, bits * len(columns))
        mask = (1 << bits) - 1
        result = []
        for shift in range(len(columns) - 1, -1, -1):
            result.append(((unique >> (shift * bits)) & mask).astype(np.int32))
        return result, summed.astype(np.int64)
    order = np.lexsort(tuple(reversed(columns)))
    sorted_columns = [column[order] for column in columns]
    starts = group_starts(*sorted_columns)
    summed = np.add.reduceat(counts[order], starts)
    return [column[starts] for column in sorted_columns], summed.astype(np.int64)
