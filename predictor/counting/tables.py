"""Trigram tables over raw type ids: packing three ids in one key, tables in memory and on disk, row sums."""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass

import numpy as np

from ..arrays import group_starts
from ..errors import CapacityError
from .memory import MemoryBudget
from .scratch import SpillFolder
from .spill import Run, merge_tables, sum_duplicates

RAW_START = 0
"""Raw type id of the sentence-start padding."""

RAW_END = 1
"""Raw type id of the end-of-sentence symbol."""

ID_BITS = 21
"""Bits per raw type id in a packed trigram key (three ids fill 63 bits)."""

MAX_RAW_TYPES = 1 << ID_BITS
"""The most raw types a count distinguishes (2,097,152, including the symbols)."""

_MASK = (1 << ID_BITS) - 1


def pack_trigrams(u: np.ndarray, v: np.ndarray, w: np.ndarray) -> np.ndarray:
    """Pack id columns (each below :data:`MAX_RAW_TYPES`) into int64 keys ordered as (u, v, w)."""
    key = u.astype(np.int64) << (2 * ID_BITS)
    key |= v.astype(np.int64) << ID_BITS
    key |= w.astype(np.int64)
    return key


def unpack_trigrams(keys: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Split keys made by :func:`pack_trigrams` into int32 columns (u, v, w)."""
    u = (keys >> (2 * ID_BITS)).astype(np.int32)
    v = ((keys >> ID_BITS) & _MASK).astype(np.int32)
    w = (keys & _MASK).astype(np.int32)
    return u, v, w


@dataclass
class TrigramTable:
    """Counted trigrams, sorted lexicographically, one row per distinct trigram.

    Attributes:
        u, v, w: int32 arrays of shape (n,): the two context ids and the word id.
        n: int64 array of shape (n,): the counts.
    """

    u: np.ndarray
    v: np.ndarray
    w: np.ndarray
    n: np.ndarray

    def __len__(self) -> int:
        return len(self.n)

    @staticmethod
    def empty() -> TrigramTable:
        """Return a table with no rows."""
        z = np.zeros(0, dtype=np.int32)
        return TrigramTable(z, z, z, np.zeros(0, dtype=np.int64))

    @staticmethod
    def of_keys(keys: np.ndarray, counts: np.ndarray) -> TrigramTable:
        """Unpack a table of sorted :func:`pack_trigrams` keys."""
        u, v, w = unpack_trigrams(keys)
        return TrigramTable(u, v, w, counts)

    @staticmethod
    def merge(tables: Iterable[TrigramTable], base: int) -> TrigramTable:
        """Merge tables over ids below ``base``, summing the counts of shared rows."""
        tables = [t for t in tables if len(t)]
        if not tables:
            return TrigramTable.empty()
        if len(tables) == 1:
            return tables[0]
        columns = [np.concatenate([getattr(t, name) for t in tables]) for name in "uvw"]
        counts = np.concatenate([t.n for t in tables])
        (u, v, w), n = aggregate_rows(columns, counts, base)
        return TrigramTable(u, v, w, n)

    def remap(self, mapping: np.ndarray, base: int) -> TrigramTable:
        """Map every id through ``mapping`` and merge rows that become equal."""
        (u, v, w), n = aggregate_rows([mapping[self.u], mapping[self.v], mapping[self.w]], self.n, base)
        return TrigramTable(u, v, w, n)

    def subtract(self, other: TrigramTable, base: int) -> TrigramTable:
        """Return this table minus the counts of ``other`` (whose rows must all be here)."""
        if not len(other):
            return self
        bits = max(1, int(base - 1).bit_length())
        mine = _pack(self, bits)
        theirs = _pack(other, bits)
        where = np.searchsorted(mine, theirs)
        n = self.n.copy()
        np.subtract.at(n, where, other.n)
        keep = n > 0
        return TrigramTable(self.u[keep], self.v[keep], self.w[keep], n[keep])


def _pack(table: TrigramTable, bits: int) -> np.ndarray:
    if 3 * bits > 63:
        raise CapacityError("too many distinct words to separate held-out counts")
    return (table.u.astype(np.int64) << (2 * bits)) | (table.v.astype(np.int64) << bits) | table.w.astype(np.int64)


class SpilledTrigrams:
    """A trigram table too large for memory: one sorted run on disk (see :mod:`foretype.counting.spill`).

    It offers what estimation needs of a corpus table: its length and
    :meth:`remap`, which streams the run and keeps only the (much smaller)
    table over a chosen vocabulary in memory.
    """

    def __init__(self, run: Run, folder: SpillFolder, budget: MemoryBudget, dictionary_bytes: int) -> None:
        """Wrap a merged run.

        Args:
            run: the run, keys made by :func:`pack_trigrams`.
            folder: the spill folder holding it (kept alive as long as this table).
            budget: the build's memory budget.
            dictionary_bytes: what the counting dictionaries still hold.
        """
        self.run = run
        self._folder = folder
        self._budget = budget
        self._dictionary_bytes = dictionary_bytes

    def __len__(self) -> int:
        return self.run.rows

    def close(self) -> None:
        """Delete the run and its spill folder."""
        self.run.delete()
        self._folder.close()

    def blocks(self) -> Iterator[tuple[np.ndarray, np.ndarray]]:
        """Yield the table as (sorted keys, counts) blocks."""
        return self.run.blocks(max(1 << 12, self._budget.table_rows // 8))

    def remap(self, mapping: np.ndarray, base: int) -> TrigramTable:
        """Map every id through ``mapping`` and merge rows that become equal.

        Raises:
            CapacityError: the table over the new ids would be too large to estimate
                within the memory budget (raised as soon as that is certain).
        """
        return remap_blocks(self.blocks(), mapping, base, self._budget, self._dictionary_bytes)


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


def remap_blocks(blocks: Iterable[tuple[np.ndarray, np.ndarray]], mapping: np.ndarray, base: int, budget: MemoryBudget, dictionary_bytes: int) -> TrigramTable:
    """Re-key sorted blocks of packed trigram counts through ``mapping`` and merge them into one table.

    Args:
        blocks: (packed keys, counts) blocks, as a spilled table or a count store streams them.
        mapping: int array from old ids to new ids.
        base: one more than the largest new id.
        budget: the memory budget the merged table is checked against as it grows.
        dictionary_bytes: memory the word dictionaries already hold.

    Raises:
        CapacityError: the merged table would not fit the budget.
    """
    keys = counts = np.zeros(0, dtype=np.int64)
    words = max(0, base - 3)
    for block_keys, block_counts in blocks:
        u, v, w = unpack_trigrams(block_keys)
        mapped = pack_trigrams(mapping[u], mapping[v], mapping[w])
        del u, v, w
        keys, counts = merge_tables(keys, counts, *sum_duplicates(mapped, block_counts))
        budget.require_estimate(len(keys), words, dictionary_bytes)
    return TrigramTable.of_keys(keys, counts)
