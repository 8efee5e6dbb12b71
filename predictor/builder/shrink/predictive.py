"""Prediction-aware pruning: remove first the n-grams whose loss the typist would least notice.

The typist sees only the top k words of a list: before a word, after its first
letter, after its second.  Removing a stored n-gram (h, w) matters to them only
when w drops out of one of those lists for context h, and then it costs the
letters a pick there would have saved, in the share of positions where h is
the context and w the word being typed.  The criterion of an n-gram is

    cost(h, w) = P(h) p(w | h) * sum over j in 0..J of shown_j * (1 - kept_j) * (len(w) - j)
                 + LAMBDA * D(h, w)

* ``shown_j``: w is among the k most probable stored words of h that share its
  first j letters (j = 0: all of them), ties by id, and has letters left after j;
* ``kept_j``: it still would be after the removal, with its backed-off
  probability alpha'(h) p(w | h') (alpha' as in :mod:`predictor.shrink.entropy`)
  against the other stored words of the same list;
* ``len(w) - j``: the letters a pick after j letters saves (the pick's own key
  and the automatic space cancel);
* ``D``: Stolcke's relative entropy of the removal, so that among the many
  n-grams that change no list, the ones that cost the least probability mass
  go first.  LAMBDA = 0.1 keystrokes per nat.

Lists are ranked over the words stored after the context, not over the words
that reach a list through back-off: the stored words are the ones a pruning
step can move, and ranking the rest would need the whole distribution of every
context.  UNKNOWN and END are never shown, so they cost only their D.
"""

from __future__ import annotations

import numpy as np

from .entropy import removal_cost
from .tables import BackoffTables

LAMBDA = 0.1
"""Weight of the relative entropy (nats) against keystrokes in the criterion."""
LETTERS = 2
"""Lists after 0 .. LETTERS typed letters are considered."""


def prefix_groups(words: list[str], letters: int = LETTERS) -> tuple[np.ndarray, list[np.ndarray]]:
    """Word lengths and, for j = 0..letters, a group id per word shared by the words with the same first j letters.

    Returns:
        ``(lengths, groups)``: int64 arrays of shape (V,).
    """
    lengths = np.fromiter((len(w) for w in words), dtype=np.int64, count=len(words))
    groups = [np.zeros(len(words), dtype=np.int64)]
    for j in range(1, letters + 1):
        _, inverse = np.unique(np.array([w[:j] for w in words], dtype=object), return_inverse=True)
        groups.append(inverse.astype(np.int64))
    return lengths, groups


def list_losses(context: np.ndarray, word: np.ndarray, p: np.ndarray, p_after: np.ndarray, size: int, lengths: np.ndarray, groups: list[np.ndarray], k: int) -> np.ndarray:
    """Letters lost per occurrence of (h, w) when w drops out of the lists of its context.

    Args:
        context: int64 context index of each entry (entries of one context are compared).
        word: int64 word id of each entry.
        p: probability of each entry before the removal.
        p_after: its probability after its own removal.
        size: V (ids at or above it are never shown).
        lengths, groups: from :func:`prefix_groups`.
        k: suggestions per list.

    Returns:
        float64 array: sum over the lists of (len(w) - j) where w is shown now and would not be.
    """
    loss = np.zeros(len(word))
    shown = np.flatnonzero(word < size)
    if not len(shown):
        return loss
    c, w, before_p, after_p = context[shown], word[shown], p[shown], p_after[shown]
    for j, group in enumerate(groups):
        _, pair = np.unique(c * (int(group.max()) + 1) + group[w], return_inverse=True)
        order = np.lexsort((w, -before_p, pair))
        sorted_pair = pair[order]
        sorted_neg = -before_p[order]
        starts = np.searchsorted(sorted_pair, sorted_pair, side="left")
        rank = np.empty(len(order), dtype=np.int64)
        rank[order] = np.arange(len(order)) - starts
        # Count the entries of the same list above the new probability: rank every value
        # (old and new) on one scale, then search (list, value rank) keys.
        values = np.concatenate((sorted_neg, -after_p))
        _, value_rank = np.unique(values, return_inverse=True)
        scale = len(values) + 1
        keys = sorted_pair * scale + value_rank[: len(order)]
        queries = pair * scale + value_rank[len(order) :]
        above = np.searchsorted(keys, queries, side="left") - np.searchsorted(sorted_pair, pair, side="left")
        above -= (before_p > after_p).astype(np.int64)  # the entry itself, if it was above
        dropped = (rank < k) & (above >= k) & (lengths[w] > j)
        loss[shown[dropped]] += (lengths[w] - j)[dropped]
    return loss


def prediction_costs(tables: BackoffTables, words: list[str], k: int = 5, letters: int = LETTERS) -> tuple[np.ndarray, np.ndarray]:
    """The criterion of every stored bigram and trigram (see the module docstring).

    Args:
        tables: the model's levels.
        words: the vocabulary's model forms, in id order.
        k: suggestions per list.
        letters: lists after up to this many letters count.

    Returns:
        ``(c2, c3)``: float64 arrays of shape (n2,) and (n3,).
    """
    lengths, groups = prefix_groups(words, letters)
    p_v, p_slot = tables.history_probabilities()
    s2, l2, s3, l3 = tables.context_sums()
    results = []
    for context, word, p, q, stored, lower, history in (
        (tables.context2(), tables.w2, tables.p2, tables.p1[tables.w2], s2, l2, p_v),
        (tables.slot3(), tables.w3, tables.p3, tables.lower_of_trigrams(), s3, l3, p_slot),
    ):
        left = np.maximum(1.0 - stored[context], 0.0)
        free = np.maximum(1.0 - lower[context], 0.0)
        p_after = (left + p) / np.maximum(free + q, 1e-300) * q
        letters_lost = list_losses(context, word, p, p_after, tables.size, lengths, groups, k)
        entropy = removal_cost(p, q, stored[context], lower[context], history[context])
        results.append(history[context] * p * letters_lost + LAMBDA * entropy)
    return results[0], results[1]
