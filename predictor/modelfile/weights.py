"""Level-3 weights derived from the stored values instead of stored (format version 4).

A context pair's lower-order weight follows from its stored values: for an
interpolated model ``gamma = max(1 - S, 0)``, for a back-off model
``alpha = max(1 - S, 0) / (T - L)`` (0 when ``T - L`` is at most 1e-12), where S
is the sum of the pair's stored values, L the sum of P2(w | v) over its stored
words w, as the query computes P2, and T the sum of P2(. | v) over every outcome
(computed once per model, :func:`level2_totals`), rounded to float32 as a stored weight
is.  Both sums run over the pair's entries in stored order, one float64
addition at a time from 0.0, so the compiled core, the numpy path and the
vectorised code below get the same bits.  A saved file stores a weight
(``l3.weight_slot``, ``l3.weight_value``) only for the pairs where deriving it
would be slow (more than :data:`DERIVED_MAX` entries) or would not give exactly
the float32 weight the model was built with: every probability is the one the
stored weights gave (format 3's), so every distribution sums to 1 as before.

Most bigram entries have one to three trigrams, so most weights cost nothing:
on the 4-million-token benchmark corpus this takes level 3's weights from 1.42
bytes per stored n-gram (float32 per bigram entry) to a few hundredths.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from .packed import ids_at, unpack_ids

DERIVED_MAX = 8
"""Pairs with more trigram entries than this keep their weight stored (deriving it costs a pass over them)."""
FREE_FLOOR = 1e-12
"""A back-off pair whose stored words leave at most this much level-2 mass gets weight 0."""


def derived_weights(
    slots: np.ndarray,
    *,
    interpolated: bool,
    p1: np.ndarray,
    off2: np.ndarray,
    w2: np.ndarray,
    a2: np.ndarray,
    g2: np.ndarray,
    off3: np.ndarray,
    w3: np.ndarray,
    a3: np.ndarray,
    totals2: np.ndarray | None = None,
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """The derived weights of some slots, summed in the order both query paths use.

    Args:
        slots: int64 slots (bigram entries, or n2 for ``START START``) with at least one trigram entry.
        interpolated: the model's form.
        p1: float64 unigram probabilities (V + 2).
        off2, w2: level-2 offsets (int64, V + 4) and word ids (of any width, packed included).
        a2: float64 decoded level-2 values.
        g2: float64 level-2 weights (V + 3).
        off3, w3: level-3 offsets (int64) and word ids.
        a3: float64 decoded level-3 values.
        totals2: for a back-off model, per context word the sum of P2 over every outcome (:func:`level2_totals`).

    Returns:
        ``(weights, stored, lower)``: float64 weights, S (each pair's stored mass), and L (the level-2 mass of
        each pair's stored words; 0 for interpolated models).
    """
    slots = np.asarray(slots, dtype=np.int64)
    starts = off3[slots]
    lengths = off3[slots + 1] - starts
    stored = np.zeros(len(slots))
    lower = np.zeros(len(slots))
    if not interpolated:
        start_id = len(off2) - 2
        n2 = len(w2)
        v = np.where(slots == n2, start_id, np.asarray(w2, dtype=np.int64)[np.minimum(slots, n2 - 1)] if n2 else start_id)
        base = len(off2) - 1
        key2 = np.repeat(np.arange(len(off2) - 1, dtype=np.int64), np.diff(off2)) * base + np.asarray(w2, dtype=np.int64)
        g2v = g2[v]
        has2 = off2[v + 1] > off2[v]
    for j in range(int(lengths.max()) if len(lengths) else 0):
        active = np.flatnonzero(lengths > j)
        at = starts[active] + j
        stored[active] += a3[at]
        if not interpolated:
            w = np.asarray(w3[at], dtype=np.int64)
            key = v[active] * base + w
            pos = np.minimum(np.searchsorted(key2, key), max(len(key2) - 1, 0))
            hit = key2[pos] == key if len(key2) else np.zeros(len(key), dtype=bool)
            p = p1[w]
            p2 = np.where(hit, a2[pos] if len(a2) else 0.0, g2v[active] * p)
            lower[active] += np.where(has2[active], p2, p)
    if not interpolated:
        assert totals2 is not None
        return _finish(stored, lower, interpolated, totals2[v]), stored, lower
    return _finish(stored, lower, interpolated), stored, lower


def level2_totals(p1: np.ndarray, off2: np.ndarray, w2: np.ndarray, a2: np.ndarray, g2: np.ndarray) -> NDArray[np.float64]:
    """Per context word of a back-off model, the sum over every outcome of P2(w | v) as the query computes it.

    Nearly 1; a level-3 weight divides by what of it its pair's stored words
    leave, as the back-off recomputation that built it did (cumulative sums, the
    same on load and on save).

    Args:
        p1: float64 unigram probabilities; off2: int64 level-2 offsets; w2: word ids (any width);
        a2: float64 decoded level-2 values; g2: float64 level-2 weights.
    """
    total1 = unigram_total(p1)
    stored = _group_sums(a2, off2)
    free = total1 - _group_sums(p1[unpack_ids(w2).astype(np.int64)], off2)
    return np.where(np.diff(off2) > 0, stored + g2 * free, total1)


def unigram_total(p1: np.ndarray) -> float:
    """The sum of the unigram probabilities (one cumulative pass, so save and load agree to the bit)."""
    return float(np.cumsum(p1, dtype=np.float64)[-1]) if len(p1) else 0.0


def _group_sums(values: np.ndarray, offsets: np.ndarray) -> NDArray[np.float64]:
    cumulative = np.concatenate(([0.0], np.cumsum(values, dtype=np.float64)))
    return cumulative[offsets[1:]] - cumulative[offsets[:-1]]


def derived_weights2(
    contexts: np.ndarray, *, interpolated: bool, p1: np.ndarray, off2: np.ndarray, w2: np.ndarray, a2: np.ndarray, table2: np.ndarray | None = None
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """The derived level-2 weights of some context words (each with at least one bigram entry).

    As :func:`derived_weights` one level down: S sums the context's stored
    values, L the unigram probabilities of its stored words, one float64
    addition at a time in stored order.  Computed once per model on load
    (vectorised), so both query paths read the same array.

    Args:
        a2: float64 decoded level-2 values, or with ``table2`` the stored codes (decoded only where read).

    Returns:
        ``(weights, stored, lower)`` as :func:`derived_weights` returns them.
    """
    contexts = np.asarray(contexts, dtype=np.int64)
    starts = off2[contexts]
    lengths = off2[contexts + 1] - starts
    stored = np.zeros(len(contexts))
    lower = np.zeros(len(contexts))
    for j in range(int(lengths.max()) if len(lengths) else 0):
        active = np.flatnonzero(lengths > j)
        at = starts[active] + j
        stored[active] += table2[a2[at]] if table2 is not None else a2[at].astype(np.float64)
        if not interpolated:
            lower[active] += p1[ids_at(w2, at)]
    return _finish(stored, lower, interpolated, unigram_total(p1)), stored, lower


def _finish(stored: np.ndarray, lower: np.ndarray, interpolated: bool, total: float | np.ndarray = 1.0) -> NDArray[np.float64]:
    """``max(1 - S, 0)``, over ``total - L`` for a back-off model (0 where that is at most :data:`FREE_FLOOR`),
    rounded to float32 as a stored weight is."""
    left = 1.0 - stored
    left[left < 0] = 0.0
    if interpolated:
        return left.astype(np.float32).astype(np.float64)
    free = total - lower
    with np.errstate(divide="ignore", invalid="ignore"):
        weights = np.where(free > FREE_FLOOR, left / np.where(free > FREE_FLOOR, free, 1.0), 0.0)
    return weights.astype(np.float32).astype(np.float64)
