"""The scoring core: the arithmetic every query shares, over a model's level arrays.

Every probability a model reports, whether for one word, a whole distribution,
a suggestion list or a ranked list written by a build, comes from
:meth:`ScoringCore.scores`, so results agree to the last bit wherever they are
computed.  Level 1 is a dense unigram array; level 2 lists, per context word v,
the words stored after it (sorted by id) with a value each and one lower-order
weight per context; level 3 lists, per bigram entry (u, v) (plus one slot for
``START START``), the words stored after the pair.  Interpolated estimators
store ``P = a + gamma * P_lower``; back-off estimators store the value that
replaces the lower order.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, NamedTuple

import numpy as np

from ..modelfile.encoding import value_table
from ..modelfile.model_arrays import ModelArrays
from ..modelfile.weights import FREE_FLOOR, level2_totals


class Slots(NamedTuple):
    """Where the entries of one context (u, v) live: v's bigram entries lo2:hi2, the pair's slot and trigram entries lo3:hi3."""

    v: int
    lo2: int
    hi2: int
    slot: int
    lo3: int
    hi3: int
    has3: bool


class ScoringCore:
    """The level arrays of one model and the arithmetic over them."""

    def __init__(self, arrays: ModelArrays, meta: Mapping[str, Any], vocab_size: int) -> None:
        """Take a model's arrays and header fields.

        Args:
            arrays: the model's arrays (``p1``, ``l2_*`` and ``l3_*`` are read).
            meta: the header fields (``interpolated`` is read).
            vocab_size: V, the number of suggestable words; START is V + 2.
        """
        self.size = vocab_size
        self.start_id = vocab_size + 2
        self._p1 = arrays.p1.astype(np.float64)
        self._off2 = arrays.l2_off.astype(np.int64)
        # Plain arrays to the arithmetic below: ids of either width, values of any encoding.
        # Word ids in three bytes are decoded on first use (the compiled core reads them in place).
        self._w2_full: np.ndarray | None = None
        self._w3_full: np.ndarray | None = None
        self._a2: np.ndarray = arrays.l2_value
        self._g2 = arrays.level2_weights(bool(meta["interpolated"]))
        self._off3 = arrays.level3_offset_reader()
        self._arrays = arrays
        self._off3_full: np.ndarray | None = None
        self._a3: np.ndarray = arrays.l3_value
        self._g3_full: np.ndarray | None = None
        self._weight_slots = arrays.l3_weight_slot
        self._weight_values = arrays.l3_weight_value
        self._interpolated = bool(meta["interpolated"])
        self._n2 = arrays.n2
        self._table = value_table(arrays.l2_value, arrays.l2_codebook)
        self._table3 = value_table(arrays.l3_value, arrays.l3_codebook)
        self.totals2: np.ndarray | None = None
        """For a back-off model whose level-3 weights are derived: per context word, P2 summed over every outcome."""
        if arrays.l3_gamma is None and not self._interpolated:
            decoded2 = self._table[arrays.l2_value] if self._table is not None else arrays.l2_value.astype(np.float64)
            self.totals2 = level2_totals(self._p1, self._off2, arrays.l2_word, decoded2, self._g2)

    @property
    def _w2(self) -> np.ndarray:
        """Level 2's word ids as integers."""
        if self._w2_full is None:
            self._w2_full = self._arrays.bigram_words()
        return self._w2_full

    @property
    def _w3(self) -> np.ndarray:
        """Level 3's word ids as integers."""
        if self._w3_full is None:
            self._w3_full = self._arrays.trigram_words()
        return self._w3_full

    @property
    def _g3(self) -> np.ndarray:
        """Every pair's level-3 weight (float64; derived ones computed once, for vectorised scoring)."""
        if self._g3_full is None:
            self._g3_full = self._arrays.level3_weights(self._interpolated)
        return self._g3_full

    def level3_offsets(self) -> np.ndarray:
        """Level 3's offsets in full (int64; expanded once, for vectorised scoring)."""
        if self._off3_full is None:
            self._off3_full = self._arrays.level3_offsets()
        return self._off3_full

    def slots(self, u: int, v: int) -> Slots:
        """Where the entries of context (u, v) live (v = START means the sentence start)."""
        item2 = self._off2.item
        lo2, hi2 = item2(v), item2(v + 1)
        slot = -1
        if v == self.start_id:
            slot = self._n2
        else:
            ulo, uhi = item2(u), item2(u + 1)
            if uhi > ulo:
                words = self._w2
                pos = ulo + int(words[ulo:uhi].searchsorted(words.dtype.type(v)))
                if pos < uhi and words.item(pos) == v:
                    slot = pos
        if slot >= 0:
            lo3, hi3 = self._off3.item(slot), self._off3.item(slot + 1)
            if hi3 > lo3:
                return Slots(v, lo2, hi2, slot, lo3, hi3, True)
        return Slots(v, lo2, hi2, -1, 0, 0, False)

    def gamma3(self, slots: Slots) -> float:
        """The level-3 weight of a context (1.0 where the pair stores nothing): stored, or derived.

        A derived weight sums the pair's stored values (and, for a back-off
        model, their P2) one float64 addition at a time in stored order, then
        rounds to float32, as :func:`foretype.modelfile.weights.derived_weights`
        and the compiled core do.
        """
        if not slots.has3:
            return 1.0
        if self._weight_slots is None:
            return float(self._g3[slots.slot])
        listed, values = self._weight_slots, self._weight_values
        assert values is not None
        at = int(listed.searchsorted(slots.slot))
        if at < len(listed) and int(listed[at]) == slots.slot:
            return float(values[at])
        table3, codes, words = self._table3, self._a3, self._w3
        stored = 0.0
        lower = 0.0
        for position in range(slots.lo3, slots.hi3):
            code = codes.item(position)
            stored += table3.item(code) if table3 is not None else float(code)
            if not self._interpolated:
                lower += self._p2_of(words.item(position), slots)
        left = 1.0 - stored
        if left < 0.0:
            left = 0.0
        if self._interpolated:
            return float(np.float32(left))  # rounded as a stored weight is
        assert self.totals2 is not None
        free = self.totals2.item(slots.v) - lower
        return float(np.float32(left / free)) if free > FREE_FLOOR else 0.0

    def _p2_of(self, word: int, slots: Slots) -> float:
        """P2(word | v) of a back-off model, with the float64 operations of :meth:`scores`."""
        p = self._p1.item(word)
        if slots.hi2 <= slots.lo2:
            return p
        words = self._w2
        at = slots.lo2 + int(words[slots.lo2 : slots.hi2].searchsorted(word))
        if at < slots.hi2 and words.item(at) == word:
            code = self._a2.item(at)
            return self._table.item(code) if self._table is not None else float(code)
        return self._g2.item(slots.v) * p

    def scores(self, ids: np.ndarray, slots: Slots, gamma3: float, bigram_run: int = -1) -> tuple[np.ndarray, np.ndarray | None, np.ndarray | None]:
        """Probabilities of outcome ids after one context (the arithmetic every query shares).

        Args:
            ids: outcome ids.
            slots: the context.
            gamma3: the context's level-3 weight.
            bigram_run: when ``ids`` are exactly the context's bigram words from
                this position on (a contiguous run), their values are read
                directly instead of searched for; the result is the same.

        Returns:
            ``(p3, a2, a3)``: float64 probabilities, and the stored bigram and
            trigram values that went into them (None where the level is absent).
        """
        p = self._p1[ids]
        # Searching with the stored dtype keeps numpy from converting the stored slice.
        ids = ids.astype(self._w2.dtype, copy=False)
        a2 = a3 = None
        if slots.hi2 > slots.lo2:
            if bigram_run >= 0:
                start = slots.lo2 + bigram_run
                codes = self._a2[start : start + len(ids)]
                a2 = self._table.take(codes) if self._table is not None else codes.astype(np.float64)
                hit2 = None
            else:
                hit2, a2 = self.stored(self._w2[slots.lo2 : slots.hi2], self._a2[slots.lo2 : slots.hi2], ids)
            lower = self._g2[slots.v] * p
            if self._interpolated:
                p2 = a2 + lower
            else:
                p2 = a2 if hit2 is None else np.where(hit2, a2, lower)  # a run is all stored words
        else:
            p2 = p
        if slots.has3:
            hit3, a3 = self.stored(self._w3[slots.lo3 : slots.hi3], self._a3[slots.lo3 : slots.hi3], ids, level=3)
            lower = gamma3 * p2
            p3 = a3 + lower if self._interpolated else np.where(hit3, a3, lower)
        else:
            p3 = p2
        return p3, a2, a3

    def unstored_scores(self, ids: np.ndarray, slots: Slots, gamma3: float) -> np.ndarray:
        """:meth:`scores` of ids stored at neither level of the context (class C).

        The same operations :meth:`scores` performs for such ids, without the
        lookups: adding a stored value of 0.0 leaves a float unchanged.
        """
        p = self._p1[ids]
        if slots.hi2 > slots.lo2:
            p = self._g2[slots.v] * p
        return gamma3 * p if slots.has3 else p

    def stored(self, words: np.ndarray, codes: np.ndarray, ids: np.ndarray, level: int = 2) -> tuple[np.ndarray, np.ndarray]:
        """Which ids one context stores, and their decoded values (0 where not stored; ``level`` 2 or 3 picks the codes' table)."""
        at = words.searchsorted(ids)
        hit = words.take(at, mode="clip") == ids
        raw = codes.take(at, mode="clip")
        table = self._table3 if level == 3 else self._table
        values = table.take(raw) if table is not None else raw.astype(np.float64)
        values *= hit  # stored values are finite and non-negative: times 0 is 0.0, times 1 unchanged
        return hit, values

    def orders(self, probs: list[float], a2: list[float] | None, a3: list[float] | None, gamma3: float) -> list[int]:
        """Which order (1, 2 or 3) supplied most of each probability (ties go to the higher order)."""
        orders = []
        for index, total in enumerate(probs):
            from3 = a3[index] if a3 is not None else 0.0
            from2 = 0.0 if a2 is None else (gamma3 * a2[index] if a3 is not None else a2[index])
            if not self._interpolated:
                orders.append(3 if from3 > 0 else 2 if from2 > 0 else 1)
                continue
            from1 = total - from3 - from2
            orders.append(3 if from3 >= from2 and from3 >= from1 else 2 if from2 >= from1 else 1)
        return orders

    def class_b_score(self, word: int, slots: Slots, gamma3: float) -> float:
        """gamma3 * P2(word | v) for a word stored after v: the score it has if not stored after (u, v).

        The same float64 operations :meth:`scores` performs, on Python floats.
        """
        words = self._w2[slots.lo2 : slots.hi2]
        code = self._a2.item(slots.lo2 + int(words.searchsorted(words.dtype.type(word))))
        value = self._table.item(code) if self._table is not None else float(np.float64(np.float32(code)))
        p2 = value + self._g2.item(slots.v) * self._p1.item(word) if self._interpolated else value
        return (gamma3 * p2) if slots.has3 else p2
