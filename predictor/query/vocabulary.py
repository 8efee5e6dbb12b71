"""The vocabulary and its prefix index.

Word ids are the ranks of the words' model forms in code-point order, so every
prefix names one contiguous id range.  A marisa-trie holds every prefix of every
word; for each trie key three arrays give the id range and where, in one long
array, the words of that range are listed from most to least probable under the
unigram distribution.  A completion query therefore costs one trie lookup and a
slice, however many words share the prefix.

Special symbols follow the words: ``UNKNOWN`` has id V, ``END`` id V + 1 and
``START`` id V + 2 (context only).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import marisa_trie
import numpy as np

from ..arrays import offsets_dtype, pack_strings, unpack_string, word_id_dtype
from ..modelfile.model_arrays import ModelArrays
from ..modelfile.packed import id_at, unpack_ids
from ..text import model_form
from .compiled import forced_pure

try:
    from ._prefixes import prefix_ranges as _compiled_prefix_ranges
except ImportError:  # not built: the Python walk below answers
    _compiled_prefix_ranges = None

START = "<s>"
"""The sentence-start symbol: pads the context, never predicted."""

END = "</s>"
"""The end-of-sentence symbol: a predicted outcome, never suggested."""

UNKNOWN = "<unk>"
"""The symbol every out-of-vocabulary word maps to: predicted and scored, never suggested."""


SHORT_RANGE = 255
"""Prefixes shared by at most this many words keep no stored list; it is sorted when asked (scored whole by
the compiled core).  255, the largest span a key's byte holds: on the benchmark corpus's full vocabulary lists
of 13 to 255 words took 0.17 bytes per stored n-gram (files of format 3 and before list ranges of more than 12)."""

NO_ORDER_LIST = -1
"""``PrefixRange.order_start`` of a range without a stored list."""


@dataclass(frozen=True)
class PrefixRange:
    """The words sharing a prefix.

    Attributes:
        lo: first word id with the prefix.
        hi: one past the last word id with the prefix.
        order_start: where the range's words, most probable first, start in the
            order list, or :data:`NO_ORDER_LIST`.
    """

    lo: int
    hi: int
    order_start: int


class Vocabulary:
    """The suggestable words of a model, their display forms and the prefix index."""

    def __init__(self, arrays: ModelArrays) -> None:
        """Wrap the vocabulary arrays of a model (built or memory-mapped).

        Args:
            arrays: the model's arrays (the ``vocab_*`` ones described in
                :func:`vocabulary_sections`, and ``p1``).
        """
        self._trie = marisa_trie.Trie()
        self._trie.map(arrays.vocab_trie.data)
        # The prefix index: three integers per key (format versions 1 and 2), or a first id and a
        # span per key with the longer ranges' spans and list starts apart (version 3).
        self._key_lo = arrays.vocab_key_lo
        self._key_hi = arrays.vocab_key_hi
        self._key_order = arrays.vocab_key_order
        self._unlisted = int(np.iinfo(arrays.vocab_key_order.dtype).max) if arrays.vocab_key_order is not None else 0
        self._key_first = arrays.vocab_key_first
        self._key_span = arrays.vocab_key_span
        self._listed_keys = np.flatnonzero(arrays.vocab_key_span == 0) if arrays.vocab_key_span is not None else None
        self._listed_span = arrays.vocab_listed_span
        self._listed_order = arrays.vocab_listed_order
        self._order = arrays.vocab_order
        self._order_full: np.ndarray | None = None
        self._words_blob = arrays.vocab_words_blob
        self._words_off = arrays.vocab_words_off
        self._word_keys = arrays.vocab_word_keys
        self._display_blob = arrays.vocab_display_blob
        self._display_off = arrays.vocab_display_off
        self._display_ids = unpack_ids(arrays.vocab_display_ids) if arrays.vocab_display_ids is not None else None
        self.size = arrays.vocab_size
        """How many suggestable words there are (V)."""
        self._word_cache: dict[int, str] = {}
        self._display_cache: dict[int, str] = {}
        self._unigram = arrays.p1
        self._root = PrefixRange(0, self.size, 0)

    @property
    def order(self) -> np.ndarray:
        """Per prefix, the range's word ids by unigram probability (root first; decoded on first use)."""
        if self._order_full is None:
            self._order_full = unpack_ids(self._order)
        return self._order_full

    @property
    def unknown_id(self) -> int:
        """The id of :data:`UNKNOWN`."""
        return self.size

    @property
    def end_id(self) -> int:
        """The id of :data:`END`."""
        return self.size + 1

    @property
    def start_id(self) -> int:
        """The id of :data:`START`."""
        return self.size + 2

    def word(self, word_id: int) -> str:
        """Return the model form of a word id (special ids give their symbols)."""
        cached = self._word_cache.get(word_id)
        if cached is None:
            if word_id >= self.size:
                cached = (UNKNOWN, END, START)[word_id - self.size]
            else:
                cached = self._model_form(word_id)
            self._word_cache[word_id] = cached
        return cached

    def _model_form(self, word_id: int) -> str:
        """A word's model form: restored from the trie (format 4) or read from the string table."""
        if self._word_keys is not None:
            return str(self._trie.restore_key(id_at(self._word_keys, word_id)))
        assert self._words_blob is not None and self._words_off is not None
        return unpack_string(self._words_blob, self._words_off, word_id)

    def display(self, word_id: int) -> str:
        """Return the display form (most frequent written form) of a word id."""
        cached = self._display_cache.get(word_id)
        if cached is None:
            if word_id >= self.size:
                cached = self.word(word_id)
            elif self._display_ids is None:
                cached = unpack_string(self._display_blob, self._display_off, word_id)
            else:
                at = int(self._display_ids.searchsorted(word_id))
                stored = at < len(self._display_ids) and int(self._display_ids[at]) == word_id
                cached = unpack_string(self._display_blob, self._display_off, at) if stored else self.word(word_id)
            self._display_cache[word_id] = cached
        return cached

    def words(self) -> list[str]:
        """Return every suggestable word's model form, in id order."""
        return [self.word(i) for i in range(self.size)]

    def id(self, word: str) -> int | None:
        """Return the id of a word in model form, or None if it is not in the vocabulary."""
        key = self._trie_key(word)
        if key is None:
            return None
        if self._key_lo is not None:
            lo = int(self._key_lo[key])
            return lo if lo >= 0 else None
        assert self._key_first is not None
        first = id_at(self._key_first, key)
        return first if self.word(first) == word else None

    def id_or_unknown(self, word: str) -> int:
        """Return the id of a written word or symbol; out-of-vocabulary words give UNKNOWN."""
        if word == START or word == END:
            return self.start_id
        if word == UNKNOWN:
            return self.unknown_id
        found = self.id(model_form(word))
        return self.unknown_id if found is None else found

    def _trie_key(self, text: str) -> int | None:
        # No word holds a NUL (marisa-trie would stop reading the key there) or a
        # lone surrogate (which cannot be encoded at all).
        if "\x00" in text:
            return None
        try:
            return self._trie.get(text)
        except UnicodeEncodeError:
            return None

    def prefix_range(self, prefix: str) -> PrefixRange | None:
        """Return the ids of the words starting with a model-form prefix, or None if none do."""
        if not prefix:
            return self._root
        key = self._trie_key(prefix)
        if key is None:
            return None
        if self._key_lo is not None and self._key_hi is not None and self._key_order is not None:
            lo = self._key_lo.item(key)
            start = self._key_order.item(key)
            return PrefixRange(lo if lo >= 0 else -lo - 1, self._key_hi.item(key), NO_ORDER_LIST if start == self._unlisted else start)
        assert self._key_first is not None and self._key_span is not None and self._listed_keys is not None
        assert self._listed_span is not None and self._listed_order is not None
        first = id_at(self._key_first, key)
        span = self._key_span.item(key)
        if span:
            return PrefixRange(first, first + span, NO_ORDER_LIST)
        at = int(self._listed_keys.searchsorted(key))
        return PrefixRange(first, first + self._listed_span.item(at), self._listed_order.item(at))

    def ranked_range(self, found: PrefixRange) -> np.ndarray:
        """The word ids of a prefix range, most probable (unigram) first, ties by id.

        Returns:
            int array of shape (hi - lo,).
        """
        span = found.hi - found.lo
        if found.order_start != NO_ORDER_LIST:
            return self.order[found.order_start : found.order_start + span]
        ids = np.arange(found.lo, found.hi)
        return ids[np.lexsort((ids, -self._unigram[found.lo : found.hi]))]

    def __len__(self) -> int:
        return self.size

    def __contains__(self, word: object) -> bool:
        return isinstance(word, str) and self.id(word) is not None


def _prefix_ranges(words: Sequence[str]) -> tuple[list[str], np.ndarray, np.ndarray, np.ndarray]:
    """Every prefix of the sorted words, in sorted order, with the id range of the words that start with it.

    One pass: word i brings the prefixes longer than what it shares with word
    i - 1 (they start at id i and sort after every earlier prefix); a prefix
    ends at the first word that no longer shares it.

    Returns:
        ``(prefixes, lo, hi, is_word)``: the prefixes, and int64, int64 and
        bool arrays of their first id, one past their last id, and whether the
        prefix is itself the word ``lo``.
    """
    prefixes: list[str] = []
    lo: list[int] = []
    is_word: list[bool] = []
    hi: list[int] = []
    open_at: list[int] = []  # open_at[n - 1]: index of the current word's prefix of length n
    previous = ""
    for i, word in enumerate(words):
        shared = 0
        limit = min(len(word), len(previous))
        while shared < limit and word[shared] == previous[shared]:
            shared += 1
        while len(open_at) > shared:
            hi[open_at.pop()] = i
        for end in range(shared + 1, len(word) + 1):
            open_at.append(len(prefixes))
            prefixes.append(word[:end])
            lo.append(i)
            hi.append(-1)
            is_word.append(end == len(word))
        previous = word
    for index in open_at:
        hi[index] = len(words)
    return prefixes, np.array(lo, dtype=np.int64), np.array(hi, dtype=np.int64), np.array(is_word, dtype=bool)


def vocabulary_sections(words: Sequence[str], display: Sequence[str], unigram: np.ndarray) -> dict[str, np.ndarray]:
    """Build the vocabulary arrays of a model.

    Args:
        words: model forms, sorted in code-point order (their positions are their ids).
        display: display forms, parallel to ``words``.
        unigram: float array of shape (len(words),): the unigram probabilities
            that order each prefix's word list (ties by id ascending).

    Returns:
        The ``vocab.*`` sections: ``trie`` (marisa-trie bytes of every prefix),
        per trie key ``key_first`` (its first id) and ``key_span`` (uint8: how
        many words share it, 0 for a range longer than :data:`SHORT_RANGE`,
        whose span and start in ``order`` are in ``listed_span`` and
        ``listed_order``, in key order), ``order`` (the root list, then the
        longer ranges' lists), ``word_keys`` (each word's trie key: the trie
        restores its model form), and the display forms of the ids in
        ``display_ids`` (those whose display form differs).
    """
    size = len(words)
    walk = _compiled_prefix_ranges if _compiled_prefix_ranges is not None and not forced_pure() else _prefix_ranges
    prefixes, lo, hi, is_word = walk(words)
    trie = marisa_trie.Trie(prefixes)
    keys = len(prefixes)
    # Rank of each word in the global unigram order (probability descending, id ascending).
    global_order = np.lexsort((np.arange(size), -unigram)).astype(np.int32)
    rank = np.empty(size, dtype=np.int64)
    rank[global_order] = np.arange(size)
    sizes = (hi - lo).astype(np.int64)
    listed = sizes > SHORT_RANGE
    listed_sizes = np.where(listed, sizes, 0)
    trie_ids = np.array([trie.key_id(p) for p in prefixes], dtype=np.int64)
    # Lists for the longer ranges, laid out in sorted-prefix order after the root list.
    starts = size + np.concatenate(([0], np.cumsum(listed_sizes)[:-1]))
    owner = np.repeat(np.arange(keys), listed_sizes)
    member = np.arange(len(owner)) - np.repeat(np.cumsum(listed_sizes) - listed_sizes, listed_sizes) + np.repeat(lo, listed_sizes)
    by_owner_rank = np.lexsort((rank[member], owner))
    id_dtype = word_id_dtype(size)
    order = np.concatenate((global_order, member[by_owner_rank])).astype(id_dtype)
    key_first = np.empty(keys, dtype=id_dtype)
    key_span = np.empty(keys, dtype=np.uint8)
    key_first[trie_ids] = lo
    key_span[trie_ids] = np.where(listed, 0, sizes)
    by_key = np.argsort(trie_ids[listed])
    word_keys = np.empty(size, dtype=np.uint32)
    word_keys[lo[is_word]] = trie_ids[is_word]
    differs = [i for i, (shown, word) in enumerate(zip(display, words)) if shown != word]
    display_blob, display_off = pack_strings([display[i] for i in differs])
    return {
        "vocab.trie": np.frombuffer(trie.tobytes(), dtype=np.uint8),
        "vocab.key_first": key_first,
        "vocab.key_span": key_span,
        "vocab.listed_span": sizes[listed][by_key].astype(np.uint32),
        "vocab.listed_order": starts[listed][by_key].astype(offsets_dtype(len(order))),
        "vocab.order": order,
        "vocab.word_keys": word_keys,
        "vocab.display_ids": np.array(differs, dtype=id_dtype),
        "vocab.display_blob": display_blob,
        "vocab.display_off": display_off,
    }
