"""A model's levels in back-off form, in float64: what every pruning criterion reads and edits.

A pruned model is always stored in back-off form (as the ARPA format writes
every model): each stored n-gram carries its full probability, and a word not
stored after a context takes the context's back-off weight times the lower
order's probability.  An interpolated model (Kneser-Ney, linear, add-k) is first
rewritten in this form, which gives every word the same probability it had:
P(w | h) = a + gamma * P(w | h') for a stored word, and the back-off weight is
the mass left for the unstored words over the lower-order mass they hold.

Removing n-grams keeps two properties the query code relies on: the tail
(v, w) of every stored trigram (u, v, w) is a stored bigram, and the context
pair (u, v) of every stored trigram is a stored bigram (it owns the level-3
slot).  Bigrams that some kept trigram needs are kept whatever a criterion
says, as toolkits do for prefixes of kept n-grams.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from ...estimate.layout import context_totals
from ...modelfile.encoding import decode, value_table

if TYPE_CHECKING:
    from ...query.model import LanguageModel


@dataclass
class BackoffTables:
    """The stored levels of a model as full probabilities (float64).

    Attributes:
        size: V, the number of suggestable words.
        p1: float64 array of shape (V + 2,): the unigram distribution as stored.
        off2: int64 array of shape (V + 4,): bigram entries of context word v are ``off2[v]:off2[v + 1]``.
        w2: int64 array of shape (n2,): the word of each bigram entry.
        p2: float64 array of shape (n2,): P(w | v) of each bigram entry.
        off3: int64 array of shape (n2 + 2,): trigram rows of slot j are ``off3[j]:off3[j + 1]``
            (slot j < n2 is bigram entry j as a context pair; slot n2 is START START).
        w3: int64 array of shape (n3,): the word of each trigram row.
        p3: float64 array of shape (n3,): P(w | u v) of each trigram row.
        tail3: int64 array of shape (n3,): the bigram entry (v, w) of each trigram row.
    """

    size: int
    p1: np.ndarray
    off2: np.ndarray
    w2: np.ndarray
    p2: np.ndarray
    off3: np.ndarray
    w3: np.ndarray
    p3: np.ndarray
    tail3: np.ndarray

    @property
    def start(self) -> int:
        """The START id (V + 2)."""
        return self.size + 2

    @property
    def n2(self) -> int:
        """Bigram entries stored."""
        return len(self.w2)

    @property
    def n3(self) -> int:
        """Trigram rows stored."""
        return len(self.w3)

    def context2(self) -> np.ndarray:
        """int64 array of shape (n2,): the context word v of each bigram entry."""
        return np.repeat(np.arange(len(self.off2) - 1, dtype=np.int64), np.diff(self.off2))

    def slot3(self) -> np.ndarray:
        """int64 array of shape (n3,): the level-3 slot of each trigram row."""
        return np.repeat(np.arange(len(self.off3) - 1, dtype=np.int64), np.diff(self.off3))

    def slot_context(self) -> tuple[np.ndarray, np.ndarray]:
        """The context pair (u, v) of every level-3 slot, int64 arrays of shape (n2 + 1,)."""
        u = np.append(self.context2(), self.start)
        v = np.append(self.w2, self.start)
        return u, v

    def history_probabilities(self) -> tuple[np.ndarray, np.ndarray]:
        """P(h) of every level-2 context word and every level-3 slot, under the model itself.

        P(v) is the unigram probability; the sentence start occurs once per
        sentence, as often as the end symbol, so P(START) = P1(END).  A pair is
        P(u) * P(v | u), with P(v | u) the stored bigram probability
        (Stolcke 1998 computes the history probability by the chain rule).

        Returns:
            ``(p_v, p_slot)``: float64 arrays of shape (V + 3,) and (n2 + 1,).
        """
        p_v = np.append(self.p1, self.p1[self.size + 1])
        u = self.context2()
        p_slot = np.append(p_v[u] * self.p2, p_v[self.start])
        return p_v, p_slot

    def lower_of_trigrams(self) -> np.ndarray:
        """P(w | v) of every trigram row's tail (float64, shape (n3,))."""
        return self.p2[self.tail3]

    def context_sums(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Stored mass and the lower-order mass of the stored words, per context.

        Returns:
            ``(s2, l2, s3, l3)``: for each context word, the sum of its stored
            P(w | v) and of P1(w) over the same words; for each slot, the sum of
            its stored P(w | u v) and of P(w | v) over the same words.
        """
        s2 = context_totals(self.p2, self.off2)
        l2 = context_totals(self.p1[self.w2], self.off2)
        s3 = context_totals(self.p3, self.off3)
        l3 = context_totals(self.lower_of_trigrams(), self.off3)
        return s2, l2, s3, l3

    def protected_bigrams(self, keep3: np.ndarray) -> np.ndarray:
        """bool array of shape (n2,): bigram entries a kept trigram needs (as its tail or its context)."""
        needed = np.zeros(self.n2 + 1, dtype=bool)
        needed[self.tail3[keep3]] = True
        needed[self.slot3()[keep3]] = True
        return needed[: self.n2]

    def pruned(self, keep2: np.ndarray, keep3: np.ndarray) -> BackoffTables:
        """The tables without the entries whose mask is False (bigrams a kept trigram needs stay).

        Args:
            keep2: bool array of shape (n2,).
            keep3: bool array of shape (n3,).
        """
        keep2 = keep2 | self.protected_bigrams(keep3)
        new_index = np.cumsum(keep2) - 1
        # Slot n2 (START START) stays the last slot.
        slot_map = np.append(new_index, int(keep2.sum()))
        v = self.context2()[keep2]
        off2 = np.searchsorted(v, np.arange(len(self.off2)), side="left").astype(np.int64)
        slots = slot_map[self.slot3()[keep3]]
        n2 = int(keep2.sum())
        off3 = np.searchsorted(slots, np.arange(n2 + 2), side="left").astype(np.int64)
        return replace(
            self,
            off2=off2,
            w2=self.w2[keep2],
            p2=self.p2[keep2],
            off3=off3,
            w3=self.w3[keep3],
            p3=self.p3[keep3],
            tail3=new_index[self.tail3[keep3]],
        )


def backoff_tables(model: LanguageModel) -> BackoffTables:
    """Rewrite a model's stored levels in back-off form (the same probabilities).

    Args:
        model: any model; an interpolated one is converted, a back-off one read as is.
    """
    s = model.arrays
    size = model.vocab_size
    base = size + 3
    p1 = s.p1.astype(np.float64)
    off2 = s.l2_off.astype(np.int64)
    w2 = s.bigram_words().astype(np.int64)
    a2 = _decode_values(model, "l2")
    g2 = s.level2_weights(bool(model.meta["interpolated"]))
    off3 = s.level3_offsets()
    w3 = s.trigram_words().astype(np.int64)
    a3 = _decode_values(model, "l3")
    g3 = s.level3_weights(bool(model.meta["interpolated"]))
    v2 = np.repeat(np.arange(len(off2) - 1, dtype=np.int64), np.diff(off2))
    interpolated = bool(model.meta["interpolated"])
    p2 = a2 + g2[v2] * p1[w2] if interpolated else a2.copy()
    slot = np.repeat(np.arange(len(off3) - 1, dtype=np.int64), np.diff(off3))
    slot_v = np.append(w2, size + 2)[slot]
    key2 = v2 * base + w2
    tail3 = np.searchsorted(key2, slot_v * base + w3)
    p3 = a3 + g3[slot] * p2[tail3] if interpolated else a3.copy()
    return BackoffTables(size, p1, off2, w2, p2, off3, w3, p3, tail3.astype(np.int64))


def _decode_values(model: LanguageModel, level: str) -> np.ndarray:
    """Decode a level's stored values whatever their encoding (codebooks included)."""
    stored, codebook = (model.arrays.l2_value, model.arrays.l2_codebook) if level == "l2" else (model.arrays.l3_value, model.arrays.l3_codebook)
    table = value_table(stored, codebook)
    return table[stored] if table is not None else decode(stored)
