"""Counting keys with bounded memory: sorted tables, sorted runs on disk, k-way merge.

A *table* is a pair of int64 arrays: keys, sorted and unique, and their counts.
:class:`KeyCounter` sums the counts of keys fed to it in batches; while its
table stays below a row limit it lives in memory, and each time it reaches the
limit it is written to disk as a *run* (two raw ``.bin`` files in a
:class:`~foretype.counting.scratch.SpillFolder`).  At the end the runs are merged in
one pass, k at a time: each round takes from every run's buffered block the
keys up to the smallest last-buffered key of the runs still being read, so no
key can appear again in a later block, sums equal keys and appends them to the
output run.  Blocks are read with ``numpy.fromfile`` (not memory-mapped), so
the resident memory of a merge is its blocks, whatever the size of the runs.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import OutputError
from . import compiled
from .scratch import SpillFolder

ROW_BYTES = 16
"""Bytes per table row: an int64 key and an int64 count."""

FAN_IN = 32
"""At most this many runs are merged at once; more are merged in rounds."""

MIN_BLOCK_ROWS = 1 << 12

_EMPTY = np.zeros(0, dtype=np.int64)


PACKED_COUNT_BITS = 8
"""Keys leaving at least this many of 63 bits free are sorted with their counts packed beside them."""


def sum_duplicates(keys: np.ndarray, counts: np.ndarray | None = None, key_bits: int = 63) -> tuple[np.ndarray, np.ndarray]:
    """Sort keys and sum the counts of equal ones.

    Args:
        keys: int64 array of shape (n,), any order.
        counts: int64 array of shape (n,), or None for a count of 1 each.
        key_bits: every key is below ``2 ** key_bits``.

    Returns:
        The sorted unique keys and their summed counts (int64 arrays).
    """
    if len(keys) == 0:
        return _EMPTY, _EMPTY
    if counts is not None and 63 - key_bits >= PACKED_COUNT_BITS:
        return _sum_packed(keys, counts, 63 - key_bits)
    if counts is None:
        keys = np.sort(keys)
        starts = _group_starts(keys)
        ends = np.append(starts[1:], len(keys))
        return keys[starts], (ends - starts).astype(np.int64)
    # Stable sort: inputs are often concatenated sorted runs, which timsort merges in linear time.
    order = np.argsort(keys, kind="stable")
    keys = keys[order]
    counts = counts[order]
    del order
    starts = _group_starts(keys)
    return keys[starts], np.add.reduceat(counts, starts).astype(np.int64, copy=False)


def _sum_packed(keys: np.ndarray, counts: np.ndarray, spare: int) -> tuple[np.ndarray, np.ndarray]:
    """:func:`sum_duplicates` by sorting values: each count below ``2 ** spare`` is packed
    below its key (a value sort is several times faster than an argsort); larger counts
    are summed apart and merged in."""
    small = (counts >= 0) & (counts < (1 << spare))
    every = bool(small.all())
    packed = (keys if every else keys[small]) << spare
    packed |= counts if every else counts[small]
    packed.sort()
    sorted_keys = packed >> spare
    starts = _group_starts(sorted_keys) if len(packed) else _EMPTY
    summed = np.add.reduceat(packed & ((1 << spare) - 1), starts) if len(packed) else _EMPTY
    table = sorted_keys[starts], summed
    if every:
        return table
    return merge_tables(*table, *sum_duplicates(keys[~small], counts[~small]))


def _group_starts(sorted_keys: np.ndarray) -> np.ndarray:
    change = np.empty(len(sorted_keys), dtype=bool)
    change[0] = True
    np.not_equal(sorted_keys[1:], sorted_keys[:-1], out=change[1:])
    return np.flatnonzero(change)


def merge_tables(keys_a: np.ndarray, counts_a: np.ndarray, keys_b: np.ndarray, counts_b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Merge two tables (sorted unique keys with counts), summing shared keys.

    ``counts_a`` may be updated in place.

    Returns:
        The merged table.
    """
    if len(keys_a) == 0:
        return keys_b, counts_b
    if len(keys_b) == 0:
        return keys_a, counts_a
    if compiled.compiled_trigrams():
        return compiled.merge_counts(keys_a, counts_a, keys_b, counts_b)
    position = np.searchsorted(keys_a, keys_b)
    found = np.zeros(len(keys_b), dtype=bool)
    inside = position < len(keys_a)
    found[inside] = keys_a[position[inside]] == keys_b[inside]
    counts_a[position[found]] += counts_b[found]
    fresh = ~found
    if not fresh.any():
        return keys_a, counts_a
    new_keys = keys_b[fresh]
    new_counts = counts_b[fresh]
    at = position[fresh] + np.arange(len(new_keys))
    total = len(keys_a) + len(new_keys)
    keys = np.empty(total, dtype=np.int64)
    counts = np.empty(total, dtype=np.int64)
    old = np.ones(total, dtype=bool)
    old[at] = False
    keys[at] = new_keys
    counts[at] = new_counts
    keys[old] = keys_a
    counts[old] = counts_a
    return keys, counts


@dataclass
class Run:
    """A table on disk: sorted unique int64 keys and their int64 counts, in two raw files.

    Attributes:
        keys_path: the keys file.
        counts_path: the counts file.
        rows: how many rows it holds.
    """

    keys_path: Path
    counts_path: Path
    rows: int

    def blocks(self, rows: int) -> Iterator[tuple[np.ndarray, np.ndarray]]:
        """Yield the run as consecutive (keys, counts) blocks of at most ``rows`` rows."""
        rows = max(1, rows)
        with self.keys_path.open("rb") as keys, self.counts_path.open("rb") as counts:
            remaining = self.rows
            while remaining:
                take = min(rows, remaining)
                block_keys = np.fromfile(keys, dtype=np.int64, count=take)
                block_counts = np.fromfile(counts, dtype=np.int64, count=take)
                if len(block_keys) != take or len(block_counts) != take:
                    raise OutputError(f"{self.keys_path}: a spilled run is shorter than written")
                remaining -= take
                yield block_keys, block_counts

    def read(self) -> tuple[np.ndarray, np.ndarray]:
        """Load the whole run into memory."""
        keys = np.fromfile(self.keys_path, dtype=np.int64, count=self.rows)
        counts = np.fromfile(self.counts_path, dtype=np.int64, count=self.rows)
        return keys, counts

    def delete(self) -> None:
        """Remove the run's files."""
        for path in (self.keys_path, self.counts_path):
            try:
                path.unlink()
            except OSError:
                pass


class RunWriter:
    """Appends sorted blocks to a new run."""

    def __init__(self, folder: SpillFolder) -> None:
        """Open a new run in ``folder``."""
        self.run = Run(folder.new_file("keys"), folder.new_file("counts"), 0)
        try:
            self._keys = self.run.keys_path.open("wb")
            self._counts = self.run.counts_path.open("wb")
        except OSError as error:
            raise OutputError(f"{folder.path}: cannot write counts to disk ({error.strerror or error})") from None

    def write(self, keys: np.ndarray, counts: np.ndarray) -> None:
        """Append a block (its keys must all exceed those written before)."""
        try:
            np.ascontiguousarray(keys, dtype=np.int64).tofile(self._keys)
            np.ascontiguousarray(counts, dtype=np.int64).tofile(self._counts)
        except OSError as error:
            raise OutputError(f"{self.run.keys_path.parent}: cannot write counts to disk ({error.strerror or error})") from None
        self.run.rows += len(keys)

    def close(self) -> Run:
        """Finish the run and return it."""
        self._keys.close()
        self._counts.close()
        return self.run


def write_run(folder: SpillFolder, keys: np.ndarray, counts: np.ndarray) -> Run:
    """Write one table to disk as a run."""
    writer = RunWriter(folder)
    writer.write(keys, counts)
    return writer.close()


def merge_runs(runs: list[Run], folder: SpillFolder, memory_rows: int) -> Run:
    """Merge runs into one, summing the counts of equal keys; the inputs are deleted.

    Args:
        runs: the runs (at least one).
        folder: where the merged run goes.
        memory_rows: how many rows the merge may buffer in all.

    Returns:
        The merged run.
    """
    while len(runs) > FAN_IN:
        runs = [_merge_group(runs[i : i + FAN_IN], folder, memory_rows) for i in range(0, len(runs), FAN_IN)]
    if len(runs) == 1:
        return runs[0]
    return _merge_group(runs, folder, memory_rows)


def _merge_group(runs: list[Run], folder: SpillFolder, memory_rows: int) -> Run:
    if len(runs) == 1:
        return runs[0]
    # Buffers, their concatenation and its sort: about four copies of the blocks.
    block = max(MIN_BLOCK_ROWS, memory_rows // (4 * len(runs)))
    readers = [run.blocks(block) for run in runs]
    left = [run.rows for run in runs]
    buffers: list[tuple[np.ndarray, np.ndarray]] = []
    for index, reader in enumerate(readers):
        buffers.append(_next_block(reader, left, index))
    writer = RunWriter(folder)
    top = np.iinfo(np.int64).max
    while any(len(keys) for keys, _ in buffers):
        # Keys up to the frontier cannot appear in any block not yet read.
        frontier = min((int(keys[-1]) for (keys, _), rest in zip(buffers, left) if rest and len(keys)), default=top)
        taken_keys = []
        taken_counts = []
        for index, (keys, counts) in enumerate(buffers):
            cut = int(np.searchsorted(keys, frontier, side="right"))
            if cut:
                taken_keys.append(keys[:cut])
                taken_counts.append(counts[:cut])
                buffers[index] = (keys[cut:], counts[cut:])
            if not len(buffers[index][0]) and left[index]:
                buffers[index] = _next_block(readers[index], left, index)
        if taken_keys:
            writer.write(*sum_duplicates(np.concatenate(taken_keys), np.concatenate(taken_counts)))
    for run in runs:
        run.delete()
    return writer.close()


def _next_block(reader: Iterator[tuple[np.ndarray, np.ndarray]], left: list[int], index: int) -> tuple[np.ndarray, np.ndarray]:
    block = next(reader, (_EMPTY, _EMPTY))
    left[index] -= len(block[0])
    return block


def _merge_in_pairs(tables: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    """Merge tables two at a time, in rounds (each row is copied about log2(len(tables)) times)."""
    while len(tables) > 1:
        tables = [merge_tables(*tables[i], *tables[i + 1]) if i + 1 < len(tables) else tables[i] for i in range(0, len(tables), 2)]
    return tables[0]


class KeyCounter:
    """Sums counts of int64 keys in bounded memory, spilling sorted runs to disk when full."""

    def __init__(self, max_rows: int, folder: Callable[[], SpillFolder] | None = None, merge_rows: int | None = None) -> None:
        """Start an empty count.

        Args:
            max_rows: rows the in-memory table may reach before it is written out.
            folder: gives the spill folder (created on first use); None never spills.
            merge_rows: batches wait until they hold this many rows, then are merged
                into the table (default: a quarter of ``max_rows``).
        """
        self.max_rows = max(1, max_rows)
        self.merge_rows = max(1, merge_rows if merge_rows is not None else self.max_rows // 4)
        self._folder = folder
        self._keys = _EMPTY
        self._counts = _EMPTY
        self._pending: list[tuple[np.ndarray, np.ndarray]] = []
        self._pending_rows = 0
        self.runs: list[Run] = []
        self.spilled_rows = 0

    @property
    def rows_in_memory(self) -> int:
        """Rows held in memory now (the table plus batches not yet merged)."""
        return len(self._keys) + self._pending_rows

    def add(self, keys: np.ndarray, counts: np.ndarray) -> None:
        """Add a batch: sorted unique keys with their counts (as :func:`sum_duplicates` gives)."""
        if not len(keys):
            return
        self._pending.append((keys, counts))
        self._pending_rows += len(keys)
        if self._pending_rows >= self.merge_rows:
            self._merge_pending()

    def _merge_pending(self) -> None:
        if not self._pending:
            return
        if len(self._pending) == 1:
            batch = self._pending[0]
        elif compiled.compiled_trigrams():
            batch = _merge_in_pairs(self._pending)
        else:
            batch = sum_duplicates(np.concatenate([k for k, _ in self._pending]), np.concatenate([c for _, c in self._pending]))
        self._pending = []
        self._pending_rows = 0
        self._keys, self._counts = merge_tables(self._keys, self._counts, *batch)
        if self._folder is not None and len(self._keys) >= self.max_rows * 3 // 4:
            self._spill()

    def _spill(self) -> None:
        assert self._folder is not None
        self.runs.append(write_run(self._folder(), self._keys, self._counts))
        self.spilled_rows += len(self._keys)
        self._keys = self._counts = _EMPTY

    def finish(self) -> tuple[np.ndarray, np.ndarray] | Run:
        """Close the count: the whole table in memory if it fits, else one merged run on disk."""
        self._merge_pending()
        if not self.runs:
            return self._keys, self._counts
        if len(self._keys):
            self._spill()
        assert self._folder is not None
        merged = merge_runs(self.runs, self._folder(), self.max_rows)
        self.runs = []
        if merged.rows <= self.max_rows:
            table = merged.read()
            merged.delete()
            return table
        return merged
