"""The words seen after one context of the user model, with their counts (one table per context)."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np


class Followers:
    """The words seen after one context, with their (inflated) counts."""

    __slots__ = ("slot", "ids", "weights", "uses", "seen", "total", "_view")

    def __init__(self) -> None:
        """Start empty."""
        self.slot: dict[int, int] = {}
        self.ids: list[int] = []
        self.weights: list[float] = []
        self.uses: list[int] = []
        self.seen: list[int] = []
        self.total = 0.0
        self._view: tuple[np.ndarray, np.ndarray] | None = None

    def __len__(self) -> int:
        return len(self.ids)

    def add(self, word_id: int, amount: float, when: int, uses: int = 1) -> None:
        """Count one more occurrence of a word after this context."""
        at = self.slot.get(word_id)
        if at is None:
            self.slot[word_id] = len(self.ids)
            self.ids.append(word_id)
            self.weights.append(amount)
            self.uses.append(uses)
            self.seen.append(when)
        else:
            self.weights[at] += amount
            self.uses[at] += uses
            self.seen[at] = max(self.seen[at], when)
        self.total += amount
        if self._view is not None:
            # Keep the sorted view (a context is usually queried again right after it is learned);
            # new arrays, since a prepared context may still hold the old ones.
            ids, weights = self._view
            pos = int(ids.searchsorted(word_id))
            if at is None:
                self._view = (np.insert(ids, pos, word_id), np.insert(weights, pos, amount))
            else:
                weights = weights.copy()
                weights[pos] += amount
                self._view = (ids, weights)

    def view(self) -> tuple[np.ndarray, np.ndarray]:
        """The followers sorted by id, as (int64 ids, float64 inflated counts), both of shape (T,)."""
        if self._view is None:
            ids = np.array(self.ids, dtype=np.int64)
            weights = np.array(self.weights, dtype=np.float64)
            order = np.argsort(ids)
            self._view = (ids[order], weights[order])
        return self._view

    def keep(self, mask: Sequence[bool]) -> None:
        """Keep only the followers whose entry in ``mask`` is true."""
        kept = [i for i, flag in enumerate(mask) if flag]
        self.ids = [self.ids[i] for i in kept]
        self.weights = [self.weights[i] for i in kept]
        self.uses = [self.uses[i] for i in kept]
        self.seen = [self.seen[i] for i in kept]
        self.slot = {word_id: i for i, word_id in enumerate(self.ids)}
        self.total = math.fsum(self.weights)
        self._view = None

    def scale(self, factor: float) -> None:
        """Multiply every count by ``factor`` (used when the inflation factor is reset)."""
        self.weights = [w * factor for w in self.weights]
        self.total *= factor
        self._view = None


__all__ = ["Followers"]
