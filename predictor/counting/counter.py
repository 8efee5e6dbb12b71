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
from itertools import compress, repeat

import numpy as np

from ..errors import CapacityError, CorpusError, OutputError
from ..text import are_words, is_sentence_end, model_form, tokens
from . import compiled
from .counts import UNLISTED, CorpusCounts
from .memory import MemoryBudget
from .scratch import SpillFolder
from .spill import KeyCounter, Run, sum_duplicates
from .tables import MAX_RAW_TYPES, RAW_END, RAW_START, SpilledTrigrams, TrigramTable, pack_trigrams
from .tokenisers import TokenisedPart

HELDOUT_EVERY = 20
"""Every HELDOUT_EVERY-th sentence (the last of each run) also goes to the held-out table."""

FORM_ENTRY_BYTES = 150
"""Dictionary bytes per written form besides its string: dict slot, id object, list slot, count arrays."""

TYPE_ENTRY_BYTES = 120
"""Dictionary bytes per model form besides its string."""


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
        fids, tids = self._ids_of(forms, distinct=True)
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

    def _ids_of(self, found: list[str], distinct: bool = False) -> tuple[np.ndarray, np.ndarray]:
        """Form ids (-1 outside the dictionary) and raw type ids of tokens (``distinct``: no token repeats)."""
        lookup = self._form_ids
        if distinct:
            return self._ids_of_distinct(found)
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

    def _ids_of_distinct(self, found: list[str]) -> tuple[np.ndarray, np.ndarray]:
        """:meth:`_ids_of` of tokens none of which repeats, with one dictionary lookup per token."""
        lookup = self._form_ids
        fids = np.array(list(map(lookup.get, found, repeat(-1))), dtype=np.int32)
        missing = np.flatnonzero(fids < 0)
        if len(missing) and not self._full:
            first = len(self._forms)
            self._new_forms(list(map(found.__getitem__, missing.tolist())))
            if not self._full:
                # Added in order, as the next form ids.
                fids[missing] = np.arange(first, first + len(missing), dtype=np.int32)
                return fids, self._form_type[fids]
            fids[missing] = list(map(lookup.get, map(found.__getitem__, missing.tolist()), repeat(-1)))
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
        forms = _model_forms(tokens)
        types = self._type_ids
        new_types = [f for f in dict.fromkeys(compress(forms, are_words(tokens))) if f not in types]
        cost = _string_bytes(tokens) + FORM_ENTRY_BYTES * len(tokens)
        cost += _string_bytes(new_types) + TYPE_ENTRY_BYTES * len(new_types)
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
        if compiled.compiled_trigrams():
            keys, held_keys, words, ended = compiled.count_sentences(
                np.ascontiguousarray(fids, dtype=np.int32),
                np.ascontiguousarray(tids, dtype=np.int32),
                self._initial,
                self._noninitial,
                self._type_counts,
                self.sentences,
                HELDOUT_EVERY,
            )
            self.corpus_tokens += words
            self.sentences += ended
            if len(held_keys):
                self._heldout.add(*sum_duplicates(held_keys))
            if len(keys):
                self._table.add(*sum_duplicates(keys))
            return
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


def _model_forms(tokens: list[str]) -> list[str]:
    """:func:`foretype.text.model_form` of each token, in bulk (lower case, then ’ written as ')."""
    lowered = list(map(str.lower, tokens))
    if "’" not in "".join(lowered):
        return lowered
    return [form.replace("’", "'") for form in lowered]


_EMPTY_STRING_BYTES = sys.getsizeof("")


def _string_bytes(strings: list[str]) -> int:
    """``sum(map(sys.getsizeof, strings))``, without a call per string when all are ASCII (one byte a character)."""
    joined = "".join(strings)
    if joined.isascii():
        return _EMPTY_STRING_BYTES * len(strings) + len(joined)
    return sum(map(sys.getsizeof, strings))


def _grown(array: np.ndarray) -> np.ndarray:
    return np.concatenate((array, np.zeros(len(array), dtype=array.dtype)))
