"""Counting a corpus once, then deriving the counts of any vocabulary from it.

The corpus is read in chunks; every word is mapped to a *raw type* id (its model
form, over the whole unpruned inventory) and every sentence is padded as
``<s> <s> w1 .. wn </s>``.  All trigrams of the padded sentences are counted
with numpy sorts; bigram and unigram counts follow from the trigram table
(every bigram and every token is the tail of exactly one trigram), so one
table serves every estimator and every vocabulary size.

Every 20th sentence is also counted in a separate held-out table, which the
linear-interpolation estimator fits its weights on.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterable
from dataclasses import dataclass

import numpy as np

from .arrays import aggregate_rows
from .corpus import iter_chunks, resolve_corpus
from .errors import CapacityError, CorpusError, OptionError
from .text import is_sentence_end, model_form, tokens

RAW_START = 0
"""Raw type id of the sentence-start padding."""
RAW_END = 1
"""Raw type id of the end-of-sentence symbol."""

HELDOUT_EVERY = 20
"""Every HELDOUT_EVERY-th sentence (the last of each run) also goes to the held-out table."""

MAX_VOCABULARY = 2_000_000
"""The largest vocabulary the model format supports (ids of V + 3 symbols fit 21 bits)."""

ProgressCallback = Callable[[int, int], None]
"""Called with (bytes done, bytes in all) while a corpus is read."""


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


@dataclass
class CorpusCounts:
    """Everything counted from a corpus: raw types, their display forms and trigram tables.

    Attributes:
        types: model forms by raw type id (ids 0 and 1 are the start and end symbols).
        display: display form of each raw type.
        type_counts: int64 occurrences of each raw type as a predicted token.
        table: all trigrams over raw type ids.
        heldout: the trigrams of the held-out sentences (a subset of ``table``).
        corpus_tokens: word tokens read.
        sentences: sentences counted.
        files: files read.
        skipped_files: binary files skipped inside corpus folders.
    """

    types: list[str]
    display: list[str]
    type_counts: np.ndarray
    table: TrigramTable
    heldout: TrigramTable
    corpus_tokens: int
    sentences: int
    files: int
    skipped_files: int

    def select_vocabulary(self, vocab_size: int | None = None, min_count: int = 1) -> list[int]:
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
        if len(candidates) == 0:
            raise CorpusError(f"no word occurs at least {min_count} times")
        string_rank = _string_ranks(self.types)
        order = np.lexsort((string_rank[candidates], -counts[candidates]))
        chosen = candidates[order]
        if vocab_size is not None:
            chosen = chosen[:vocab_size]
        if len(chosen) > MAX_VOCABULARY:
            raise CapacityError(
                f"a vocabulary of {len(chosen):,} words exceeds the format's limit of {MAX_VOCABULARY:,}; "
                "pass --vocab-size or --min-count"
            )
        return [int(t) for t in chosen]


def _string_ranks(strings: list[str]) -> np.ndarray:
    order = sorted(range(len(strings)), key=strings.__getitem__)
    rank = np.empty(len(strings), dtype=np.int64)
    rank[np.array(order, dtype=np.int64)] = np.arange(len(strings))
    return rank


class CorpusCounter:
    """Counts trigrams of raw types over text fed to it chunk by chunk."""

    MERGE_ROWS = 2_000_000

    def __init__(self, *, wrapped: bool = False) -> None:
        """Start an empty count.

        Args:
            wrapped: treat single line breaks as spaces (see :mod:`predictor.text`).
        """
        self.wrapped = wrapped
        self._form_ids: dict[str, int] = {}
        self._forms: list[str] = []
        self._form_type = np.zeros(1024, dtype=np.int32)
        self._type_ids: dict[str, int] = {"<s>": RAW_START, "</s>": RAW_END}
        self._types: list[str] = ["<s>", "</s>"]
        self._noninitial = np.zeros(1024, dtype=np.int64)
        self._initial = np.zeros(1024, dtype=np.int64)
        self._carry = np.zeros(0, dtype=np.int32)
        self._tables: list[TrigramTable] = []
        self._pending: list[TrigramTable] = []
        self._heldout: list[TrigramTable] = []
        self.corpus_tokens = 0
        self.sentences = 0
        self.files = 0
        self.skipped_files = 0

    def add_text(self, text: str) -> None:
        """Count a chunk of whole lines (an unfinished last sentence carries over)."""
        found = tokens(text, wrapped=self.wrapped)
        if not found:
            return
        fids = np.concatenate((self._carry, self._form_ids_of(found)))
        form_type = self._form_type
        tids = form_type[fids]
        ends = np.flatnonzero(tids == RAW_END)
        if len(ends) == 0:
            self._carry = fids
            return
        cut = int(ends[-1]) + 1
        self._carry = fids[cut:]
        self._count_sentences(fids[:cut], tids[:cut])

    def end_document(self) -> None:
        """Close the sentence in progress at the end of a file."""
        self.files += 1
        if len(self._carry):
            fids = np.concatenate((self._carry, np.array([self._boundary_form()], dtype=np.int32)))
            self._carry = np.zeros(0, dtype=np.int32)
            self._count_sentences(fids, self._form_type[fids])

    def _boundary_form(self) -> int:
        return int(self._form_ids_of(["\n"])[0])

    def _form_ids_of(self, found: list[str]) -> np.ndarray:
        lookup = self._form_ids
        # Set arithmetic finds the new forms in C; a per-token Python loop would cost more than the regex.
        for token in set(found).difference(lookup):
            self._new_form(token)
        return np.fromiter(map(lookup.__getitem__, found), dtype=np.int32, count=len(found))

    def _new_form(self, token: str) -> int:
        form_id = len(self._forms)
        self._form_ids[token] = form_id
        self._forms.append(token)
        if form_id >= len(self._form_type):
            grow = len(self._form_type)
            self._form_type = np.concatenate((self._form_type, np.zeros(grow, dtype=np.int32)))
            self._noninitial = np.concatenate((self._noninitial, np.zeros(grow, dtype=np.int64)))
            self._initial = np.concatenate((self._initial, np.zeros(grow, dtype=np.int64)))
        if is_sentence_end(token):
            type_id = RAW_END
        else:
            form = model_form(token)
            type_id = self._type_ids.get(form)
            if type_id is None:
                type_id = len(self._types)
                self._type_ids[form] = type_id
                self._types.append(form)
        self._form_type[form_id] = type_id
        return form_id

    def _count_sentences(self, fids: np.ndarray, tids: np.ndarray) -> None:
        """Count complete sentences: the arrays end with a sentence-end token."""
        is_end = tids == RAW_END
        after_end = np.empty_like(is_end)
        after_end[0] = True
        after_end[1:] = is_end[:-1]
        keep = ~(is_end & after_end)  # ends of empty sentences
        fids, tids, is_end = fids[keep], tids[keep], is_end[keep]
        if len(tids) == 0:
            return
        after_end = np.empty_like(is_end)
        after_end[0] = True
        after_end[1:] = is_end[:-1]
        is_word = ~is_end
        initial = is_word & after_end
        size = len(self._forms)
        self._noninitial[:size] += np.bincount(fids[is_word & ~after_end], minlength=size)
        self._initial[:size] += np.bincount(fids[initial], minlength=size)
        self.corpus_tokens += int(is_word.sum())
        # Pad: "<s> <s>" first, and every end becomes "</s> <s> <s>".
        widths = np.where(is_end, 3, 1)
        slot = 2 + np.cumsum(widths) - widths
        padded = np.full(2 + int(widths.sum()), RAW_START, dtype=np.int32)
        padded[slot] = tids
        u, v, w = padded[:-2], padded[1:-1], padded[2:]
        valid = w != RAW_START
        sentence_of = np.cumsum(padded == RAW_END)[2:] - (w == RAW_END) + self.sentences
        self.sentences += int(is_end.sum())
        u, v, w, sentence_of = u[valid], v[valid], w[valid], sentence_of[valid]
        base = len(self._types)
        (cu, cv, cw), cn = aggregate_rows([u, v, w], None, base)
        self._pending.append(TrigramTable(cu, cv, cw, cn))
        held = sentence_of % HELDOUT_EVERY == HELDOUT_EVERY - 1
        if held.any():
            (hu, hv, hw), hn = aggregate_rows([u[held], v[held], w[held]], None, base)
            self._heldout.append(TrigramTable(hu, hv, hw, hn))
        pending_rows = sum(len(t) for t in self._pending)
        if pending_rows > max(self.MERGE_ROWS, sum(len(t) for t in self._tables)):
            self._tables = [TrigramTable.merge(self._tables + self._pending, base)]
            self._pending = []
            self._heldout = [TrigramTable.merge(self._heldout, base)]

    def finish(self) -> CorpusCounts:
        """Close the count and return it.

        Raises:
            CorpusError: no word was read.
        """
        if len(self._carry):
            self.end_document()
            self.files -= 1
        if self.corpus_tokens == 0:
            raise CorpusError("the corpus holds no words")
        base = len(self._types)
        table = TrigramTable.merge(self._tables + self._pending, base)
        heldout = TrigramTable.merge(self._heldout, base)
        type_counts = np.bincount(table.w, weights=table.n, minlength=base).astype(np.int64)
        return CorpusCounts(
            types=list(self._types),
            display=self._display_forms(),
            type_counts=type_counts,
            table=table,
            heldout=heldout,
            corpus_tokens=self.corpus_tokens,
            sentences=self.sentences,
            files=self.files,
            skipped_files=self.skipped_files,
        )

    def _display_forms(self) -> list[str]:
        """Pick each type's most frequent written form, not counting sentence starts.

        A type written only at sentence starts is shown lower-cased if its
        written form is just its model form with a capital first letter
        ("The" becomes "the"), and as written otherwise ("NASA" stays).
        """
        size = len(self._forms)
        form_type = self._form_type[:size]
        noninitial = self._noninitial[:size]
        initial = self._initial[:size]
        display = list(self._types)
        seen = np.arange(size)
        order = np.lexsort((seen, -initial, -noninitial, form_type))
        ordered_types = form_type[order]
        first = np.ones(size, dtype=bool)
        first[1:] = ordered_types[1:] != ordered_types[:-1]
        for form_id in order[first]:
            type_id = int(form_type[form_id])
            if type_id < 2:
                continue
            written = self._forms[form_id]
            if noninitial[form_id] == 0 and written[:1].lower() + written[1:] == self._types[type_id]:
                written = self._types[type_id]
            display[type_id] = written
        return display


def count_corpus(
    paths: Iterable[str | os.PathLike[str]],
    *,
    wrapped: bool = False,
    replace_bad_bytes: bool = False,
    reject_binary: bool = False,
    progress: ProgressCallback | None = None,
) -> CorpusCounts:
    """Read and count corpus files or folders.

    Args:
        paths: text files, or folders of them.
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8 instead of failing.
        reject_binary: fail on binary files inside folders instead of skipping them.
        progress: called with (bytes done, bytes in all) after each chunk.

    Returns:
        The counts.

    Raises:
        CorpusError: missing, unreadable or non-text input, or no words at all.
        EncodingError: invalid UTF-8 (names the file and line).
    """
    found = resolve_corpus(paths, reject_binary=reject_binary)
    counter = CorpusCounter(wrapped=wrapped)
    counter.skipped_files = len(found.skipped)
    total = sum(_size(path) for path in found.files)
    done = 0
    for path in found.files:
        for chunk in iter_chunks(path, replace_bad_bytes=replace_bad_bytes):
            counter.add_text(chunk)
            done += len(chunk)  # characters, close enough to bytes for a progress bar
            if progress:
                progress(min(done, total), total)
        counter.end_document()
    return counter.finish()


def _size(path: os.PathLike[str]) -> int:
    try:
        return os.path.getsize(path)
    except OSError:
        return 0
