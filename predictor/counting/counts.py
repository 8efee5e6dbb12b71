"""What a count of a corpus holds: raw types, display forms, trigram tables; choosing a vocabulary from it."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import CapacityError, CorpusError, OptionError
from .memory import MemoryBudget
from .tables import SpilledTrigrams, TrigramTable

UNLISTED = "<unlisted>"
"""The model form standing for every word first seen after the dictionaries were full."""


@dataclass
class CorpusCounts:
    """Everything counted from a corpus: raw types, their display forms and trigram tables.

    Attributes:
        types: model forms by raw type id (ids 0 and 1 are the start and end
            symbols; :data:`UNLISTED`, if present, stands for words first seen
            after the dictionaries were full).
        display: display form of each raw type.
        type_counts: int64 occurrences of each raw type as a predicted token.
        table: all trigrams over raw type ids (in memory, or on disk for large corpora).
        heldout: the trigrams of the held-out sentences (a subset of ``table``).
        corpus_tokens: word tokens read.
        sentences: sentences counted.
        files: files read.
        skipped_files: binary files skipped inside corpus folders.
        unlisted_tokens: tokens counted as :data:`UNLISTED`.
        spilled_rows: table rows written to disk while counting (0: all in memory).
        dictionary_bytes: what the word dictionaries held at the end.
        budget: the memory budget the count kept to.
    """

    types: list[str]
    display: list[str]
    type_counts: np.ndarray
    table: TrigramTable | SpilledTrigrams
    heldout: TrigramTable | SpilledTrigrams
    corpus_tokens: int
    sentences: int
    files: int
    skipped_files: int
    unlisted_tokens: int = 0
    spilled_rows: int = 0
    dictionary_bytes: int = 0
    budget: MemoryBudget | None = field(default=None, repr=False)

    def select_vocabulary(self, vocab_size: int | None = None, min_count: int = 1, *, max_words: int | None = None) -> list[int]:
        """Choose the vocabulary: the most frequent raw types, ties by model form.

        Args:
            vocab_size: keep at most this many words (None: no limit).
            min_count: drop words seen fewer times.

        Returns:
            Raw type ids of the chosen words, most frequent first.

        Raises:
            OptionError: the limits are not positive.
            CapacityError: more words than the format supports.
        """
        if vocab_size is not None and vocab_size < 1:
            raise OptionError(f"vocabulary size must be at least 1, not {vocab_size}")
        if min_count < 1:
            raise OptionError(f"minimum count must be at least 1, not {min_count}")
        counts = self.type_counts
        candidates = np.flatnonzero(counts >= min_count)
        candidates = candidates[candidates >= 2]
        if UNLISTED in self.types:
            candidates = candidates[candidates != self.types.index(UNLISTED)]
        if len(candidates) == 0:
            raise CorpusError(f"no word occurs at least {min_count} times")
        if vocab_size is not None and vocab_size < len(candidates):
            # Only words as frequent as the vocab_size-th can be chosen: rank just their strings.
            candidate_counts = counts[candidates]
            cutoff = np.partition(candidate_counts, len(candidates) - vocab_size)[len(candidates) - vocab_size]
            candidates = candidates[candidate_counts >= cutoff]
        string_rank = _string_ranks([self.types[t] for t in candidates.tolist()])
        order = np.lexsort((string_rank, -counts[candidates]))
        chosen = candidates[order]
        if vocab_size is not None:
            chosen = chosen[:vocab_size]
        if max_words is not None and len(chosen) > max_words:
            raise CapacityError(f"a vocabulary of {len(chosen):,} words exceeds the format's limit of {max_words:,}; pass --vocab-size or --min-count")
        return [int(t) for t in chosen]

    def require_estimate(self, trigrams: int, words: int) -> None:
        """Refuse to estimate a model that would not fit in the count's memory budget.

        Raises:
            CapacityError: see :meth:`foretype.counting.memory.MemoryBudget.require_estimate`.
        """
        if self.budget is not None:
            self.budget.require_estimate(trigrams, words, self.dictionary_bytes)

    def close(self) -> None:
        """Delete any counts spilled to disk (the tables must not be used afterwards)."""
        for table in (self.table, self.heldout):
            if isinstance(table, SpilledTrigrams):
                table.close()


def _string_ranks(strings: list[str]) -> np.ndarray:
    order = sorted(range(len(strings)), key=strings.__getitem__)
    rank = np.empty(len(strings), dtype=np.int64)
    rank[np.array(order, dtype=np.int64)] = np.arange(len(strings))
    return rank
