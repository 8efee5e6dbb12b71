"""N-gram tables of an ARPA file in bounded memory, on the spill machinery counting uses.

Each row is a packed key of provisional word ids and a "count" holding the
float32 bits of its value plus a marker bit: :class:`~predictor.counting.spill.KeyCounter`
sums the counts of equal keys, so an n-gram listed twice shows as a doubled
marker once the sorted runs are merged, wherever in the file the two lines were.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..counting.scratch import SpillFolder
from ..counting.spill import KeyCounter, Run, sum_duplicates
from .syntax import LOG_ZERO

_MARK = 1 << 32
_BATCH = 1 << 16


def linear(log10_values: np.ndarray, *, weights: bool) -> np.ndarray:
    """Probabilities or back-off weights of log10 values: 0 at or below log zero.

    A probability's log10 slightly above 0 (a writer's rounding) reads as 0;
    a back-off weight may exceed 1.
    """
    capped = log10_values if weights else np.minimum(log10_values, 0.0)
    return np.where(log10_values <= LOG_ZERO, 0.0, np.power(10.0, capped))


class NgramTable:
    """One order's n-grams (with log10 values), streamed into a spilling key table."""

    def __init__(self, rows: int, folder: Callable[[], SpillFolder], *, weights: bool = False) -> None:
        """Start an empty table.

        Args:
            rows: rows the table may hold in memory before a sorted run goes to disk.
            folder: gives the spill folder (created on first use).
            weights: the values are back-off weights (which may exceed 1), not probabilities.
        """
        self.counter = KeyCounter(rows, folder)
        self.weights = weights
        self.batch = min(_BATCH, self.counter.max_rows)
        self.keys: list[int] = []
        self.values: list[float] = []
        self.rows = 0

    def add(self, key: int, value: float) -> None:
        """Add one n-gram: its packed key and its log10 value."""
        self.keys.append(key)
        self.values.append(value)
        if len(self.keys) >= self.batch:
            self.flush()

    def flush(self) -> None:
        """Move the lines read so far into the key table (converted to float32 values in bulk)."""
        if not self.keys:
            return
        keys = np.array(self.keys, dtype=np.int64)
        bits = linear(np.array(self.values, dtype=np.float64), weights=self.weights).astype(np.float32).view(np.uint32).astype(np.int64)
        self.rows += len(keys)
        self.counter.add(*sum_duplicates(keys, bits + _MARK))
        # Emptied in place: the fast line reader holds these very lists.
        self.keys.clear()
        self.values.clear()

    def finish(self) -> tuple[np.ndarray, np.ndarray]:
        """The sorted keys and their values; raises on a key listed twice."""
        self.flush()
        table = self.counter.finish()
        if isinstance(table, Run):
            keys, counts = table.read()
            table.delete()
        else:
            keys, counts = table
        if len(counts) and int(counts.max()) >= 2 * _MARK:
            raise DuplicateNgram(int(keys[int(np.argmax(counts >= 2 * _MARK))]))
        values = (counts - _MARK).astype(np.uint32).view(np.float32).astype(np.float64)
        return keys, values


class DuplicateNgram(Exception):
    """An n-gram key listed twice."""

    def __init__(self, key: int) -> None:
        self.key = key
