"""Counting a corpus once, then deriving the counts of any vocabulary from it.

The corpus is read in chunks; every word is mapped to a *raw type* id (its model
form, over the whole unpruned inventory) and every sentence is padded as
``<s> <s> w1 .. wn </s>``.  All trigrams of the padded sentences are counted
with numpy sorts; bigram and unigram counts follow from the trigram table
(every bigram and every token is the tail of exactly one trigram), so one
table serves every estimator and every vocabulary size.

Every 20th sentence is also counted in a separate held-out table, which the
linear-interpolation estimator fits its weights on.

Memory stays within a :class:`~foretype.counting.memory.MemoryBudget`:

* A trigram is one int64 key of three 21-bit raw type ids.  Tables live in
  memory up to the budget's row limit, then go to disk as sorted runs that are
  merged at the end (:mod:`foretype.counting.spill`); the result is a
  :class:`SpilledTrigrams` that streams from disk.
* The word dictionaries (written forms and model forms) grow until they hold
  the budget's share or :data:`MAX_RAW_TYPES` types.  A word first seen after
  that is counted as the single type :data:`UNLISTED`, which never enters a
  vocabulary.  In natural text new words keep appearing but ever more rarely
  (Heaps' law: distinct words grow like N^0.4 to N^0.6 in the token count N),
  so the words first seen after millions of others are almost all rare; the
  number of tokens so counted is reported (``unlisted_tokens``).
"""

from __future__ import annotations

import os
import sys
from collections import deque
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from itertools import compress, repeat
from typing import Any

import numpy as np

from .tables import aggregate_rows
from .corpus import CHUNK_BYTES, iter_chunks, resolve_corpus
from ..errors import CapacityError, CorpusError, OptionError, OutputError
from .memory import MemoryBudget
from .scratch import SpillFolder
from .spill import KeyCounter, Run, merge_tables, sum_duplicates
from ..text import are_words, is_sentence_end, model_form, tokens
from .tokenisers import TokenisedPart, tokenise_part, tokeniser_pool

RAW_START = 0
"""Raw type id of the sentence-start padding."""
RAW_END = 1
"""Raw type id of the end-of-sentence symbol."""

UNLISTED = "<unlisted>"
"""The model form standing for every word first seen after the dictionaries were full."""

HELDOUT_EVERY = 20
"""Every HELDOUT_EVERY-th sentence (the last of each run) also goes to the held-out table."""

ID_BITS = 21
"""Bits per raw type id in a packed trigram key (three ids fill 63 bits)."""

MAX_RAW_TYPES = 1 << ID_BITS
"""The most raw types a count distinguishes (2,097,152, including the symbols)."""

FORM_ENTRY_BYTES = 150
"""Dictionary bytes per written form besides its string: dict slot, id object, list slot, count arrays."""

TYPE_ENTRY_BYTES = 120
"""Dictionary bytes per model form besides its string."""

ProgressCallback = Callable[[int, int], None]
"""Called with (bytes done, bytes in all) while a corpus is read."""

_MASK = (1 << ID_BITS) - 1


def pack_trigrams(u: np.ndarray, v: np.ndarray, w: np.ndarray) -> np.ndarray:
    """Pack id columns (each below :data:`MAX_RAW_TYPES`) into int64 keys ordered as (u, v, w)."""
    key = u.astype(np.int64) << (2 * ID_BITS)
    key |= v.astype(np.int64) << ID_BITS
    key |= w.astype(np.int64)
    return key


def unpack_trigrams(keys: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Split keys made by :func:`pack_trigrams` into int32 columns (u, v, w)."""
    u = (keys >> (2 * ID_BITS)).astype(np.int32)
    v = ((keys >> ID_BITS) & _MASK).astype(np.int32)
    w = (keys & _MASK).astype(np.int32)
    return u, v, w


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
    def of_keys(keys: np.ndarray, counts: np.ndarray) -> TrigramTable:
        """Unpack a table of sorted :func:`pack_trigrams` keys."""
        u, v, w = unpack_trigrams(keys)
        return TrigramTable(u, v, w, counts)

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


class SpilledTrigrams:
    """A trigram table too large for memory: one sorted run on disk (see :mod:`foretype.counting.spill`).

    It offers what estimation needs of a corpus table: its length and
    :meth:`remap`, which streams the run and keeps only the (much smaller)
    table over a chosen vocabulary in memory.
    """

    def __init__(self, run: Run, folder: SpillFolder, budget: MemoryBudget, dictionary_bytes: int) -> None:
        """Wrap a merged run.

        Args:
            run: the run, keys made by :func:`pack_trigrams`.
            folder: the spill folder holding it (kept alive as long as this table).
            budget: the build's memory budget.
            dictionary_bytes: what the counting dictionaries still hold.
        """
        self.run = run
        self._folder = folder
        self._budget = budget
        self._dictionary_bytes = dictionary_bytes

    def __len__(self) -> int:
        return self.run.rows

    def close(self) -> None:
        """Delete the run and its spill folder."""
        self.run.delete()
        self._folder.close()

    def blocks(self) -> Iterator[tuple[np.ndarray, np.ndarray]]:
        """Yield the table as (sorted keys, counts) blocks."""
        return self.run.blocks(max(1 << 12, self._budget.table_rows // 8))

    def remap(self, mapping: np.ndarray, base: int) -> TrigramTable:
        """Map every id through ``mapping`` and merge rows that become equal.

        Raises:
            CapacityError: the table over the new ids would be too large to estimate
                within the memory budget (raised as soon as that is certain).
        """
        keys = counts = np.zeros(0, dtype=np.int64)
        words = max(0, base - 3)
        for block_keys, block_counts in self.blocks():
            u, v, w = unpack_trigrams(block_keys)
            mapped = pack_trigrams(mapping[u], mapping[v], mapping[w])
            del u, v, w
            keys, counts = merge_tables(keys, counts, *sum_duplicates(mapped, block_counts))
            self._budget.require_estimate(len(keys), words, self._dictionary_bytes)
        return TrigramTable.of_keys(keys, counts)


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
            raise CapacityError(
                f"a vocabulary of {len(chosen):,} words exceeds the format's limit of {max_words:,}; "
                "pass --vocab-size or --min-count"
            )
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


def _add_counts(target: np.ndarray, ids: np.ndarray) -> None:
    """``target[i] += (ids == i).sum()`` for every i, in time linear in ``len(ids)``."""
    if not len(ids):
        return
    if len(target) <= 8 * len(ids):
        target += np.bincount(ids, minlength=len(target))[: len(target)]
    else:
        found, times = np.unique(ids, return_counts=True)
        target[found] += times


class _WorkerNumbers:
    """What the numbers of one tokenising worker's forms mean here: form ids and raw type ids."""

    def __init__(self) -> None:
        self.size = 0
        self._fids = np.zeros(1024, dtype=np.int32)
        self._tids = np.zeros(1024, dtype=np.int32)

    def extend(self, fids: np.ndarray, tids: np.ndarray) -> None:
        """Give the worker's next numbers these form ids and raw type ids."""
        stop = self.size + len(fids)
        while stop > len(self._fids):
            self._fids = _grown(self._fids)
            self._tids = _grown(self._tids)
        self._fids[self.size : stop] = fids
        self._tids[self.size : stop] = tids
        self.size = stop

    def ids(self, numbers: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Form ids and raw type ids of the worker's numbers (int32 arrays shaped like ``numbers``)."""
        return self._fids[numbers], self._tids[numbers]


class CorpusCounter:
    """Counts trigrams of raw types over text fed to it chunk by chunk, within a memory budget."""

    MERGE_ROWS = 2_000_000
    """At most this many new rows wait before they are merged into the table."""

    def __init__(
        self,
        *,
        wrapped: bool = False,
        budget: MemoryBudget | None = None,
        spill_dir: str | os.PathLike[str] | None = None,
        max_types: int = MAX_RAW_TYPES,
    ) -> None:
        """Start an empty count.

        Args:
            wrapped: treat single line breaks as spaces (see :mod:`foretype.text`).
            budget: the memory budget (None: the default share of the machine).
            spill_dir: where tables that outgrow memory go (None: the system's
                temporary folder); a ``.foretype-spill-*`` folder is made there.
            max_types: distinguish at most this many raw types (for tests; at
                most :data:`MAX_RAW_TYPES`).
        """
        self.wrapped = wrapped
        self.budget = budget if budget is not None else MemoryBudget.of(None)
        self._spill_dir = spill_dir
        self._folder: SpillFolder | None = None
        self._max_types = min(max_types, MAX_RAW_TYPES)
        self._dictionary_limit = self.budget.dictionary_bytes
        self.dictionary_bytes = 0
        self._full = False
        self._form_ids: dict[str, int] = {}
        self._forms: list[str] = []
        self._form_type = np.zeros(1024, dtype=np.int32)
        self._type_ids: dict[str, int] = {"<s>": RAW_START, "</s>": RAW_END}
        self._types: list[str] = ["<s>", "</s>"]
        self._unlisted = -1
        self._type_counts = np.zeros(1024, dtype=np.int64)
        self._noninitial = np.zeros(1024, dtype=np.int64)
        self._initial = np.zeros(1024, dtype=np.int64)
        self._carry_forms = np.zeros(0, dtype=np.int32)
        self._carry_types = np.zeros(0, dtype=np.int32)
        self._worker_numbers: dict[int, _WorkerNumbers] = {}
        rows = self.budget.table_rows
        merge = min(self.MERGE_ROWS, rows // 4)
        self._table = KeyCounter(rows - rows // 8, self._spill_folder, merge)
        self._heldout = KeyCounter(rows // 8, self._spill_folder, max(1, merge // 8))
        self._new_form("\n")
        self.corpus_tokens = 0
        self.sentences = 0
        self.files = 0
        self.skipped_files = 0
        self.unlisted_tokens = 0

    def _spill_folder(self) -> SpillFolder:
        if self._folder is None:
            try:
                self._folder = SpillFolder(self._spill_dir)
            except OSError as error:
                where = self._spill_dir or "the temporary folder"
                raise OutputError(f"{where}: cannot create a folder for counts that outgrow memory ({error.strerror or error})") from None
        return self._folder

    def add_text(self, text: str) -> None:
        """Count a chunk of text (an unfinished last sentence carries over to the next chunk)."""
        found = tokens(text, wrapped=self.wrapped)
        if not found:
            return
        fids, tids = self._ids_of(found)
        del found
        self._add_ids(fids, tids)

    def add_tokenized(self, part: TokenisedPart) -> None:
        """Count a chunk tokenised by a worker process (see :mod:`foretype.counting.tokenisers`).

        The chunks of each worker must come in the order it tokenised them; the
        result is the same as :meth:`add_text` on the chunk's text.
        """
        numbers = self._worker_numbers.get(part.worker)
        if numbers is None or part.first == 0:
            numbers = self._worker_numbers[part.worker] = _WorkerNumbers()
        assert part.first == numbers.size, "a worker's chunks arrive in the order it tokenised them"
        if part.forms:
            numbers.extend(*self._ids_of_forms(part.forms))
        if not len(part.positions):
            return
        fids, tids = numbers.ids(part.positions)
        if self._unlisted >= 0:
            self.unlisted_tokens += int(np.count_nonzero(tids == self._unlisted))
        self._add_ids(fids, tids)

    def _ids_of_forms(self, forms: list[str]) -> tuple[np.ndarray, np.ndarray]:
        """Form ids and raw type ids of distinct forms, as :meth:`_ids_of` gives them.

        Forms not yet in the dictionaries are added as :meth:`_ids_of` would add
        them; unlisted tokens are not counted (the caller counts occurrences).
        """
        unlisted_before = self.unlisted_tokens
        fids, tids = self._ids_of(forms)
        self.unlisted_tokens = unlisted_before
        return fids, tids

    def _add_ids(self, fids: np.ndarray, tids: np.ndarray) -> None:
        fids = np.concatenate((self._carry_forms, fids))
        tids = np.concatenate((self._carry_types, tids))
        ends = np.flatnonzero(tids == RAW_END)
        if len(ends) == 0:
            self._carry_forms, self._carry_types = fids, tids
            return
        cut = int(ends[-1]) + 1
        self._carry_forms, self._carry_types = fids[cut:], tids[cut:]
        self._count_sentences(fids[:cut], tids[:cut])

    def end_document(self) -> None:
        """Close the sentence in progress at the end of a file."""
        self.files += 1
        if len(self._carry_types):
            fids = np.append(self._carry_forms, np.int32(self._form_ids["\n"]))
            tids = np.append(self._carry_types, np.int32(RAW_END))
            self._carry_forms = self._carry_types = np.zeros(0, dtype=np.int32)
            self._count_sentences(fids, tids)

    def _ids_of(self, found: list[str]) -> tuple[np.ndarray, np.ndarray]:
        """Form ids (-1 outside the dictionary) and raw type ids of tokens."""
        lookup = self._form_ids
        if not self._full:
            # New forms in order of first appearance; dict.fromkeys dedupes in C.
            self._new_forms([t for t in dict.fromkeys(found) if t not in lookup])
            if not self._full:
                # A list first: numpy converts a list of ints far faster than it drains an iterator.
                fids = np.array(list(map(lookup.__getitem__, found)), dtype=np.int32)
                return fids, self._form_type[fids]
        fids = np.array(list(map(lookup.get, found, repeat(-1))), dtype=np.int32)
        missing = np.flatnonzero(fids < 0)
        if len(missing) and not self._full:
            for token in dict.fromkeys([found[i] for i in missing.tolist()]):
                self._new_form(token)
            fids[missing] = list(map(lookup.get, [found[i] for i in missing.tolist()], repeat(-1)))
            missing = missing[fids[missing] < 0]
        tids = self._form_type[np.maximum(fids, 0)]
        if len(missing):
            tids[missing] = [self._type_outside(found[i]) for i in missing.tolist()]
        return fids, tids

    def _type_outside(self, token: str) -> int:
        """The raw type of a token whose written form the full dictionary could not take."""
        if is_sentence_end(token):
            return RAW_END
        found = self._type_ids.get(model_form(token))
        if found is not None:
            return found
        self.unlisted_tokens += 1
        return self._unlisted

    def _new_forms(self, tokens: list[str]) -> None:
        """Add written forms in order, each as :meth:`_new_form` would, in bulk while all fit.

        Near a dictionary limit the forms are added one at a time, so the
        dictionaries fill exactly as far as they would word by word.
        """
        if not tokens:
            return
        forms = list(map(model_form, tokens))
        types = self._type_ids
        new_types = [f for f in dict.fromkeys(compress(forms, are_words(tokens))) if f not in types]
        cost = sum(map(sys.getsizeof, tokens)) + FORM_ENTRY_BYTES * len(tokens)
        cost += sum(map(sys.getsizeof, new_types)) + TYPE_ENTRY_BYTES * len(new_types)
        if self.dictionary_bytes + cost > self._dictionary_limit or len(self._types) + len(new_types) + 1 >= self._max_types:
            for token in tokens:
                self._new_form(token)
            return
        self._new_types(new_types)
        first = len(self._forms)
        stop = first + len(tokens)
        while stop > len(self._form_type):
            self._form_type = _grown(self._form_type)
            self._noninitial = _grown(self._noninitial)
            self._initial = _grown(self._initial)
        # A sentence end's form (punctuation or a line break) is never a type's: it gets RAW_END.
        self._form_type[first:stop] = np.fromiter(map(types.get, forms, repeat(RAW_END)), dtype=np.int32, count=len(forms))
        self._form_ids.update(zip(tokens, range(first, stop)))
        self._forms.extend(tokens)
        self.dictionary_bytes += cost

    def _new_form(self, token: str) -> None:
        """Add a written form (and its model form if new), unless the dictionaries are full."""
        cost = sys.getsizeof(token) + FORM_ENTRY_BYTES
        form = None
        if is_sentence_end(token):
            type_id = RAW_END
        else:
            form = model_form(token)
            type_id = self._type_ids.get(form, -1)
            if type_id < 0:
                cost += sys.getsizeof(form) + TYPE_ENTRY_BYTES
        # One type id stays free for UNLISTED.
        if self.dictionary_bytes + cost > self._dictionary_limit or (type_id < 0 and len(self._types) + 1 >= self._max_types):
            self._become_full()
            return
        if type_id < 0:
            assert form is not None
            type_id = self._new_type(form)
        form_id = len(self._forms)
        self._form_ids[token] = form_id
        self._forms.append(token)
        if form_id >= len(self._form_type):
            self._form_type = _grown(self._form_type)
            self._noninitial = _grown(self._noninitial)
            self._initial = _grown(self._initial)
        self._form_type[form_id] = type_id
        self.dictionary_bytes += cost

    def _new_type(self, form: str) -> int:
        type_id = len(self._types)
        self._type_ids[form] = type_id
        self._types.append(form)
        if type_id >= len(self._type_counts):
            self._type_counts = _grown(self._type_counts)
        return type_id

    def _new_types(self, forms: list[str]) -> None:
        """Add model forms, none of them known yet, as :meth:`_new_type` would one by one."""
        first = len(self._types)
        self._type_ids.update(zip(forms, range(first, first + len(forms))))
        self._types.extend(forms)
        while len(self._types) > len(self._type_counts):
            self._type_counts = _grown(self._type_counts)

    def _become_full(self) -> None:
        if not self._full:
            self._full = True
            self._unlisted = self._new_type(UNLISTED)

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
        listed = fids >= 0
        _add_counts(self._noninitial, fids[is_word & ~after_end & listed])
        _add_counts(self._initial, fids[is_word & after_end & listed])
        self.corpus_tokens += int(is_word.sum())
        # Pad: "<s> <s>" first, and every end becomes "</s> <s> <s>".
        widths = np.where(is_end, 3, 1)
        slot = 2 + np.cumsum(widths) - widths
        padded = np.full(2 + int(widths.sum()), RAW_START, dtype=np.int32)
        padded[slot] = tids
        del slot, widths, fids
        u, v, w = padded[:-2], padded[1:-1], padded[2:]
        valid = w != RAW_START
        sentence_of = np.cumsum(padded == RAW_END)[2:] - (w == RAW_END) + self.sentences
        self.sentences += int(is_end.sum())
        u, v, w, sentence_of = u[valid], v[valid], w[valid], sentence_of[valid]
        _add_counts(self._type_counts, w)
        keys = pack_trigrams(u, v, w)
        del u, v, w, padded
        held = sentence_of % HELDOUT_EVERY == HELDOUT_EVERY - 1
        if held.any():
            self._heldout.add(*sum_duplicates(keys[held]))
        self._table.add(*sum_duplicates(keys))

    def check_vocabulary_limit(self, min_count: int, max_words: int) -> None:
        """Fail early when more words than the format supports already reach ``min_count``.

        Counts only grow, so once too many words have ``min_count`` occurrences no
        choice of ``min_count`` alone can make the vocabulary fit.

        Raises:
            CapacityError: more than ``max_words`` words reach ``min_count``.
        """
        reaching = int(np.count_nonzero(self._type_counts[2 : len(self._types)] >= min_count))
        if self._unlisted >= 0 and self._type_counts[self._unlisted] >= min_count:
            reaching -= 1
        if reaching > max_words:
            raise CapacityError(
                f"more than {max_words:,} distinct words occur at least {min_count} times, "
                f"the format's vocabulary limit; pass --vocab-size (at most {max_words:,}) or a higher --min-count"
            )

    def finish(self) -> CorpusCounts:
        """Close the count and return it.

        Raises:
            CorpusError: no word was read.
        """
        if len(self._carry_types):
            self.end_document()
            self.files -= 1
        if self.corpus_tokens == 0:
            raise CorpusError("the corpus holds no words")
        display = self._display_forms()
        # The written forms are only needed for display forms: free them before estimation.
        self._form_ids = {}
        self._forms = []
        table = self._close_table(self._table)
        heldout = self._close_table(self._heldout)
        return CorpusCounts(
            types=list(self._types),
            display=display,
            type_counts=self._type_counts[: len(self._types)].copy(),
            table=table,
            heldout=heldout,
            corpus_tokens=self.corpus_tokens,
            sentences=self.sentences,
            files=self.files,
            skipped_files=self.skipped_files,
            unlisted_tokens=self.unlisted_tokens,
            spilled_rows=self._table.spilled_rows + self._heldout.spilled_rows,
            dictionary_bytes=self.dictionary_bytes,
            budget=self.budget,
        )

    def _close_table(self, counter: KeyCounter) -> TrigramTable | SpilledTrigrams:
        result = counter.finish()
        if isinstance(result, Run):
            assert self._folder is not None
            return SpilledTrigrams(result, self._folder, self.budget, self.dictionary_bytes)
        return TrigramTable.of_keys(*result)

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
        best = order[first]
        best = best[form_type[best] >= 2]
        type_ids = form_type[best].tolist()
        written = list(map(self._forms.__getitem__, best.tolist()))
        for i in np.flatnonzero(noninitial[best] == 0).tolist():
            model = self._types[type_ids[i]]
            if written[i][:1].lower() + written[i][1:] == model:
                written[i] = model
        for type_id, form in zip(type_ids, written):
            display[type_id] = form
        return display


def _grown(array: np.ndarray) -> np.ndarray:
    return np.concatenate((array, np.zeros(len(array), dtype=array.dtype)))


def count_corpus(
    paths: Iterable[str | os.PathLike[str]],
    *,
    wrapped: bool = False,
    replace_bad_bytes: bool = False,
    reject_binary: bool = False,
    progress: ProgressCallback | None = None,
    budget: MemoryBudget | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
    min_count: int | None = None,
    max_vocabulary: int | None = None,
) -> CorpusCounts:
    """Read and count corpus files or folders.

    Args:
        paths: text files, or folders of them.
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8 instead of failing.
        reject_binary: fail on binary files inside folders instead of skipping them.
        progress: called with (bytes done, bytes in all) after each chunk.
        budget: the memory budget (None: the default share of the machine).
        spill_dir: where counts that outgrow memory go (None: the system's temporary folder).
        min_count: with ``max_vocabulary``: when the whole vocabulary above this count will be
            kept, fail as soon as it exceeds ``max_vocabulary`` instead of after reading everything.
        max_vocabulary: the largest vocabulary the caller can store (the model format's limit).

    Returns:
        The counts.

    Raises:
        CorpusError: missing, unreadable or non-text input, or no words at all.
        EncodingError: invalid UTF-8 (names the file and line).
        CapacityError: with ``min_count``, more than ``max_vocabulary`` words.
        OutputError: counts that outgrow memory cannot be written to ``spill_dir``.
    """
    if spill_dir is not None and not (os.path.isdir(spill_dir) and os.access(spill_dir, os.W_OK | os.X_OK)):
        raise OutputError(f"{spill_dir}: not a writable folder for counts that outgrow memory")
    found = resolve_corpus(paths, reject_binary=reject_binary)
    counter = CorpusCounter(wrapped=wrapped, budget=budget, spill_dir=spill_dir)
    counter.skipped_files = len(found.skipped)
    total = sum(_size(path) for path in found.files)
    piece = counter.budget.chunk_bytes
    # Read chunks of the budget's size, never more than the default.
    reading = {"chunk_bytes": piece} if piece < CHUNK_BYTES else {}
    done = 0
    usable = total >= PARALLEL_MIN_BYTES and counter.budget.limit >= PARALLEL_MIN_BUDGET
    with tokeniser_pool(usable) as pool:
        pending: deque[Any] = deque()

        def drain(keep: int) -> None:
            while len(pending) > keep:
                counter.add_tokenized(pending.popleft().get())

        for path in found.files:
            for chunk in iter_chunks(path, replace_bad_bytes=replace_bad_bytes, **reading):
                for part in split_text(chunk, piece):
                    if pool is None:
                        counter.add_text(part)
                    else:
                        pending.append(pool.apply_async(tokenise_part, (part, wrapped)))
                        drain(TOKENISERS_AHEAD)
                if min_count is not None and max_vocabulary is not None and pool is None:
                    counter.check_vocabulary_limit(min_count, max_vocabulary)
                done += len(chunk)  # characters, close enough to bytes for a progress bar
                if progress:
                    progress(min(done, total), total)
            drain(0)
            if min_count is not None and max_vocabulary is not None:
                counter.check_vocabulary_limit(min_count, max_vocabulary)
            counter.end_document()
    return counter.finish()


PARALLEL_MIN_BYTES = 16 << 20
"""Corpora at least this large are tokenised by worker processes (when the machine has two cores or more)."""

PARALLEL_MIN_BUDGET = 4 << 30
"""Workers hold a chunk of text and its tokens each (about 100 MB), and their dictionaries of
written forms (see :data:`foretype.counting.tokenisers.WORKER_FORM_BYTES`), outside the build's own
memory, so they are used only with a budget this large; below it the build tokenises itself."""

TOKENISERS_AHEAD = 4
"""Chunks handed to the workers before the first result is awaited."""


def split_text(text: str, size: int) -> Iterator[str]:
    """Cut text into pieces of about ``size`` characters, at line breaks where possible.

    A line longer than ``size`` is cut before a word (after a space), or, in a
    run of ``size`` characters without a space, anywhere; counting carries a
    sentence across pieces, so only such a run itself can be split.
    """
    if len(text) <= size + size // 4:
        if text:
            yield text
        return
    start = 0
    while len(text) - start > size:
        stop = start + size
        cut = text.rfind("\n", start, stop) + 1
        if cut <= start:
            cut = text.rfind(" ", start, stop) + 1
            while start < cut < stop and text[cut] == " ":
                cut += 1  # keep runs of spaces together, so the next piece starts with a word
            if cut <= start or cut >= stop:
                cut = stop
        yield text[start:cut]
        start = cut
    if start < len(text):
        yield text[start:]


def _size(path: os.PathLike[str]) -> int:
    try:
        return os.path.getsize(path)
    except OSError:
        return 0
