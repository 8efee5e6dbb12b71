"""Counts of one vocabulary, and the layout shared by every estimator.

A model stores three levels.  Level 1 is a dense unigram distribution over the
V + 2 outcomes (words, UNKNOWN, END).  Level 2 lists, for each context word v,
the words seen after it (its *bigram entries*, sorted by id).  Level 3 lists,
for each bigram entry (u, v), the words seen after that pair; the pair
``(START, START)`` that opens every sentence has one extra slot at index n2.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..arrays import group_starts, stable_argsort
from ..counting import RAW_END, RAW_START, CorpusCounts, TrigramTable
from ..counting.compiled import pure_requested

try:
    from . import _estimate as compiled_layout
except ImportError:  # not built: the numpy path of Layout.of answers
    compiled_layout = None


@dataclass
class ModelCounts:
    """The trigram counts of a corpus over one vocabulary.

    Attributes:
        words: model forms of the vocabulary, sorted; position = word id.
        display: display forms, parallel to ``words``.
        table: trigrams over model ids (``V`` UNKNOWN, ``V + 1`` END, ``V + 2`` START).
        heldout: the held-out sentences' trigrams over model ids.
        corpus_tokens: word tokens in the corpus.
        sentences: sentences in the corpus.
    """

    words: list[str]
    display: list[str]
    table: TrigramTable
    heldout: TrigramTable
    corpus_tokens: int
    sentences: int
    layout: Layout = field(init=False)

    def __post_init__(self) -> None:
        self.layout = Layout.of(self.table, len(self.words))

    @property
    def vocab_size(self) -> int:
        """V: the number of suggestable words."""
        return len(self.words)


def model_counts(counts: CorpusCounts, vocabulary: list[int]) -> ModelCounts:
    """Re-express corpus counts over a vocabulary chosen by :meth:`CorpusCounts.select_vocabulary`.

    Args:
        counts: the corpus counts.
        vocabulary: raw type ids of the words to keep.

    Returns:
        The counts over model ids, every other word mapped to UNKNOWN.
    """
    chosen = sorted(vocabulary, key=counts.types.__getitem__)
    size = len(chosen)
    mapping = np.full(len(counts.types), size, dtype=np.int32)
    mapping[np.array(chosen, dtype=np.int64)] = np.arange(size, dtype=np.int32)
    mapping[RAW_START] = size + 2
    mapping[RAW_END] = size + 1
    base = size + 3
    return ModelCounts(
        words=[counts.types[t] for t in chosen],
        display=[counts.display[t] for t in chosen],
        table=counts.table.remap(mapping, base),
        heldout=counts.heldout.remap(mapping, base),
        corpus_tokens=counts.corpus_tokens,
        sentences=counts.sentences,
    )


@dataclass
class Layout:
    """Where every bigram and trigram lives in the model arrays.

    Attributes:
        base: V + 3, one more than the largest id.
        bigram_v, bigram_w: int32 arrays of shape (n2,): bigram entries sorted by (v, w).
        bigram_n: int64 raw bigram counts, parallel.
        bigram_off: int64 array of shape (base + 1,): entries of context v are
            ``bigram_off[v]:bigram_off[v + 1]``.
        trigram_ctx: int64 array of shape (n3,): the level-3 context slot of each
            trigram row (its bigram entry, or n2 for START START).
        trigram_off: int64 array of shape (n2 + 2,): rows of slot j are
            ``trigram_off[j]:trigram_off[j + 1]``.
        trigram_bigram: int64 array of shape (n3,): the bigram entry of each
            trigram row's tail (v, w).
    """

    base: int
    bigram_v: np.ndarray
    bigram_w: np.ndarray
    bigram_n: np.ndarray
    bigram_off: np.ndarray
    trigram_ctx: np.ndarray
    trigram_off: np.ndarray
    trigram_bigram: np.ndarray

    @property
    def n2(self) -> int:
        """Number of bigram entries."""
        return len(self.bigram_w)

    @staticmethod
    def of(table: TrigramTable, vocab_size: int) -> Layout:
        """Derive the layout of a trigram table over ``vocab_size`` words."""
        base = vocab_size + 3
        start = vocab_size + 2
        # Bigram entries are the distinct (v, w) tails of the trigram rows; keep which
        # entry each row's tail is, so estimators need no search for it.
        tail = table.v.astype(np.int64) * base + table.w
        order, sorted_tail = stable_argsort(tail, max(1, (base * base - 1).bit_length()))
        rows = len(tail)
        del tail
        fast = compiled_layout is not None and not pure_requested()
        if fast:
            trigram_bigram, bn, unique_tail = compiled_layout.tail_groups(order, sorted_tail, np.ascontiguousarray(table.n, dtype=np.int64))
        else:
            starts = group_starts(sorted_tail)
            trigram_bigram = np.empty(rows, dtype=np.int64)
            if rows:
                group = np.zeros(rows, dtype=np.int64)
                group[starts[1:]] = 1
                trigram_bigram[order] = np.cumsum(group)
            bn = np.add.reduceat(table.n[order], starts) if len(starts) else np.zeros(0, dtype=np.int64)
            unique_tail = sorted_tail[starts]
        bv = (unique_tail // base).astype(np.int32)
        bw = (unique_tail % base).astype(np.int32)
        bigram_off = _offsets_of_sorted(bv, base)
        # Rows are sorted by (u, v): look each context pair up once.
        pair_key = table.u.astype(np.int64) * base + table.v
        pair_starts = group_starts(pair_key)
        if fast:
            pair_ctx = compiled_layout.sorted_positions(unique_tail, pair_key[pair_starts])
        else:
            pair_ctx = np.searchsorted(unique_tail, pair_key[pair_starts]).astype(np.int64)
        pair_ctx[pair_key[pair_starts] == start * base + start] = len(bw)
        ctx = np.zeros(len(pair_key), dtype=np.int64)
        if len(pair_ctx):
            ctx[pair_starts] = np.diff(pair_ctx, prepend=0)
            np.cumsum(ctx, out=ctx)
        trigram_off = _offsets_of_sorted(ctx, len(bw) + 1)
        return Layout(base, bv, bw, bn, bigram_off, ctx, trigram_off, trigram_bigram)

    def bigram_index(self, v: np.ndarray, w: np.ndarray) -> np.ndarray:
        """Return the bigram entry index of each (v, w) pair (all pairs must be entries)."""
        key = self.bigram_v.astype(np.int64) * self.base + self.bigram_w
        return np.searchsorted(key, v.astype(np.int64) * self.base + w)


def _offsets_of_sorted(ids: np.ndarray, groups: int) -> np.ndarray:
    """``np.searchsorted(ids, np.arange(groups + 1))`` for sorted ids in ``[0, groups)``, by counting (no search)."""
    offsets = np.zeros(groups + 1, dtype=np.int64)
    np.cumsum(np.bincount(ids, minlength=groups)[:groups], out=offsets[1:])
    return offsets


def context_totals(values: np.ndarray, offsets: np.ndarray) -> np.ndarray:
    """Sum ``values`` over each group ``offsets[i]:offsets[i + 1]`` (empty groups give 0)."""
    cumulative = np.concatenate(([0.0], np.cumsum(values, dtype=np.float64)))
    return cumulative[offsets[1:]] - cumulative[offsets[:-1]]


def context_count_of_counts(counts: np.ndarray, offsets: np.ndarray, group: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per group, how many entries have count 1, count 2 and count 3 or more (float64 arrays).

    Args:
        counts: integer counts, grouped.
        offsets: group i is ``offsets[i]:offsets[i + 1]``.
        group: each entry's group (``np.repeat(np.arange(groups), np.diff(offsets))``), if the caller has it.
    """
    groups = len(offsets) - 1
    if group is None:
        group = np.repeat(np.arange(groups), np.diff(offsets))
    # One counting pass over (group, min(count, 3)); the numbers are exact integers, as sums of ones are.
    cells = np.bincount(group * 4 + np.minimum(counts, 3), minlength=4 * groups)[: 4 * groups].reshape(groups, 4).astype(np.float64)
    return cells[:, 1].copy(), cells[:, 2].copy(), cells[:, 3].copy()
