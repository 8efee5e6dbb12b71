"""The arrays of a model: one typed, frozen structure with a field per file section.

Each field's declaration says everything the load checks need to know about
its section: the section's name in the file, the dtypes it may have (from the
field's ``NDArray[...]`` annotation), whether it is required (a field typed
``... | None`` is optional), which group an optional section belongs to
(ranked lists come all or none; codebooks come with 8-bit values) and how long
it must be, given the vocabulary size and the number of stored entries.
:mod:`foretype.modelfile.integrity` reads its per-section tables from here, so
a new section is declared once.

Level 1 is a dense unigram array over the V + 2 outcomes; level 2 lists, per
context word v, the words stored after it (sorted by id) with a value each and
one lower-order weight per context; level 3 lists, per bigram entry (plus one
slot for ``START START``), the words stored after the pair.  The ``vocab_*``
fields are the prefix index and the string tables
(:func:`foretype.query.vocabulary.vocabulary_sections`); the ``rank*`` fields
the ranked continuation lists (:mod:`foretype.query.ranked`).
"""

from __future__ import annotations

import dataclasses
import types
import typing
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any, NamedTuple

import numpy as np
from numpy.typing import NDArray

from ..errors import ModelFileError
from .blocked import BlockedOffsets, blocks_for, from_blocks, to_blocks
from .encoding import value_table
from .packed import PACKED_LIMIT, id_count, pack_ids, unpack_ids
from .weights import DERIVED_MAX, derived_weights, derived_weights2, level2_totals

WordIds = NDArray[np.uint16 | np.int32 | np.uint8]
"""Word ids: uint16 while the V + 3 ids fit, else int32, or three bytes per id (uint8; :mod:`foretype.modelfile.packed`, format 4 on)."""
Offsets = NDArray[np.uint32 | np.uint64]
"""Where each context's (or string's, or list's) entries start, with one end entry."""
Floats = NDArray[np.float32 | np.float64]
Values = NDArray[np.uint8 | np.uint16 | np.float32]
"""Stored values: 8-bit codebook codes, 16-bit log codes or float32 (the header's ``value_encoding``)."""
Bytes = NDArray[np.uint8]
Bounds = NDArray[np.int32]

REQUIRED = "required"
RANKED = "ranked"
"""The group of the ranked-list sections: a model has all of them or none."""
DENSE_RANKED2 = "level-2 ranked-list offsets per context word"
SPARSE_RANKED2 = "level-2 ranked-list offsets per listed context word"
"""The two layouts of where level 2's ranked lists start (a ranked model has exactly one, from format 4 on the sparse one)."""
CODEBOOKS = "codebooks"
"""The group of the codebooks: present exactly where the values are 8-bit codes."""
DENSE_INDEX = "prefix index with three integers per key"
COMPACT_INDEX = "prefix index with a first id and a span per key"
"""The two layouts of the prefix index (a model has exactly one; the compact one from format version 3 on)."""
SPARSE_DISPLAY = "display forms where they differ"
"""With ``vocab.display_ids``, display forms are stored only for those ids (the others show their model form)."""
PLAIN3 = "plain level-3 offsets"
BLOCKED3 = "blocked level-3 offsets"
"""The two layouts of level 3's offsets (a model has exactly one): ``l3.off`` in full, or in blocks
(:mod:`foretype.modelfile.blocked`, format version 3 on)."""
WORD_STRINGS = "model forms as strings"
WORD_KEYS = "model forms as trie keys"
"""The two layouts of the model forms (a model has exactly one): a UTF-8 blob with offsets, or each word's
trie key id (format version 4 on)."""
WORD_IDS3 = "level-3 word ids"
TAIL_POSITIONS3 = "level-3 words as positions in level 2"
"""The two layouts of level 3's words (a model has exactly one): word ids, or (format version 4 on, for
vocabularies whose ids pass 16 bits) each word's position among the words stored after the pair's last word,
16 bits wherever that list is no longer than 65,536 words; the ``START START`` pair keeps word ids."""
STORED_WEIGHTS2 = "stored level-2 weights"
DERIVED_WEIGHTS2 = "derived level-2 weights"
"""The two layouts of level 2's weights, as those of level 3 (derived on load, format version 4 on)."""
STORED_WEIGHTS = "stored level-3 weights"
DERIVED_WEIGHTS = "derived level-3 weights"
"""The two layouts of level 3's weights (a model has exactly one): ``l3.gamma`` for every pair, or only where
they are not derived from the stored values (:mod:`foretype.modelfile.weights`, format version 4 on)."""


class Counts(NamedTuple):
    """The numbers the sections' lengths follow from.

    Attributes:
        words: V, the number of suggestable words.
        n2: stored bigram entries (length of ``l2.word``).
        n3: stored trigram entries (length of ``l3.word``).
        keys: prefix-index keys (length of ``vocab.key_lo`` or ``vocab.key_first``).
        ranked3: context pairs with a ranked list (length of ``rank3.slot``).
        listed: keys of the compact prefix index whose range has a stored list (span 0).
        displayed: words with a stored display form (V unless ``vocab.display_ids`` says fewer).
        weights: pairs with a stored level-3 weight (length of ``l3.weight_slot``).
        weights2: context words with a stored level-2 weight (length of ``l2.weight_slot``).
        ranked2: context words with a ranked list (length of ``rank2.word``).
    """

    words: int
    n2: int
    n3: int
    keys: int
    ranked3: int
    listed: int = 0
    displayed: int = 0
    weights: int = 0
    weights2: int = 0
    ranked2: int = 0


Length = Callable[[Counts], int]


def _section(name: str, length: Length | None = None, group: str = REQUIRED) -> Any:
    """Declare a field as the file section ``name`` (``length``: its length given the counts, None: free)."""
    return dataclasses.field(metadata={"section": name, "length": length, "group": group})


def _optional(name: str, group: str, length: Length | None = None, *, packable: bool = False) -> Any:
    """Declare an optional field (``packable``: a section other than word ids whose uint8 form holds three bytes per entry)."""
    return dataclasses.field(default=None, metadata={"section": name, "length": length, "group": group, "packable": packable})


@dataclass(frozen=True, eq=False)
class ModelArrays:
    """A model's arrays (read-only views of the mapped file, or arrays just built).

    Every array is one-dimensional.  Lengths (V words, n2 bigram entries, n3
    trigram entries) are those the load checks enforce.
    """

    p1: Floats = _section("p1", lambda n: n.words + 2)
    """Unigram probability of each outcome: words, UNKNOWN, END (V + 2)."""
    l2_off: Offsets = _section("l2.off", lambda n: n.words + 4)
    """Per context word (V + 3 contexts), where its bigram entries start; one end entry."""
    l2_word: WordIds = _section("l2.word", lambda n: n.n2)
    """The word of each bigram entry, sorted within a context."""
    l2_value: Values = _section("l2.value", lambda n: n.n2)
    """The stored value of each bigram entry."""
    l3_value: Values = _section("l3.value", lambda n: n.n3)
    """The stored value of each trigram entry."""
    vocab_trie: Bytes = _section("vocab.trie")
    """The marisa-trie image holding every prefix of every word."""
    vocab_order: WordIds = _section("vocab.order")
    """The whole vocabulary by unigram probability, then the lists of the longer prefix ranges."""
    vocab_display_blob: Bytes = _section("vocab.display_blob")
    """The words' display forms, UTF-8, concatenated."""
    vocab_display_off: Offsets = _section("vocab.display_off", lambda n: n.displayed + 1)
    vocab_words_blob: Bytes | None = _optional("vocab.words_blob", WORD_STRINGS)
    """The words' model forms, UTF-8, concatenated (or, from format 4, each word's trie key in ``vocab.word_keys``)."""
    vocab_words_off: Offsets | None = _optional("vocab.words_off", WORD_STRINGS, lambda n: n.words + 1)
    vocab_word_keys: NDArray[np.uint32 | np.uint8] | None = _optional("vocab.word_keys", WORD_KEYS, lambda n: n.words, packable=True)
    """Per word id, the id of its trie key: the model form is restored from the trie (the trie holds every word);
    uint8: three bytes per key id, as packed word ids."""
    vocab_key_lo: Bounds | None = _optional("vocab.key_lo", DENSE_INDEX)
    """Per trie key: the first id with the prefix, or ``-(first id) - 1`` when the key is not itself a word."""
    vocab_key_hi: Bounds | None = _optional("vocab.key_hi", DENSE_INDEX, lambda n: n.keys)
    """Per trie key: one past the last id with the prefix."""
    vocab_key_order: Offsets | None = _optional("vocab.key_order", DENSE_INDEX, lambda n: n.keys)
    """Per trie key: where its range's unigram list starts in ``vocab_order`` (the dtype's maximum: no list)."""
    vocab_key_first: WordIds | None = _optional("vocab.key_first", COMPACT_INDEX)
    """Per trie key: the first id with the prefix (the key is a word when that word is the key itself)."""
    vocab_key_span: NDArray[np.uint8] | None = _optional("vocab.key_span", COMPACT_INDEX, lambda n: n.keys)
    """Per trie key: how many words have the prefix, or 0 for a range with a stored list (more than 12 words before format 4, more than 255 from it)."""
    vocab_listed_span: Offsets | None = _optional("vocab.listed_span", COMPACT_INDEX, lambda n: n.listed)
    """Per key of span 0, in key order: how many words have the prefix."""
    vocab_listed_order: Offsets | None = _optional("vocab.listed_order", COMPACT_INDEX, lambda n: n.listed)
    """Per key of span 0, in key order: where its range's list starts in ``vocab_order``."""
    vocab_display_ids: WordIds | None = _optional("vocab.display_ids", SPARSE_DISPLAY)
    """The ids whose display form differs from the model form, increasing (their forms are the display strings)."""
    l3_off: Offsets | None = _optional("l3.off", PLAIN3, lambda n: n.n2 + 2)
    """Per bigram entry (plus the ``START START`` slot), where its trigram entries start; one end entry
    (or, in blocks, the next three fields; :meth:`level3_offsets` reads either)."""
    l3_off_base: NDArray[np.uint32] | None = _optional("l3.off_base", BLOCKED3, lambda n: blocks_for(n.n2 + 2))
    """Level-3 offsets in blocks: one base per 32 entries (flagged :data:`~foretype.modelfile.blocked.WIDE`: stored in full)."""
    l3_off_delta: NDArray[np.uint8] | None = _optional("l3.off_delta", BLOCKED3, lambda n: n.n2 + 2)
    """Level-3 offsets in blocks: each entry's step from its block's base."""
    l3_off_wide: NDArray[np.uint32] | None = _optional("l3.off_wide", BLOCKED3)
    """Level-3 offsets in blocks: the full offsets of the blocks that span more than 8 bits."""
    l2_gamma: Floats | None = _optional("l2.gamma", STORED_WEIGHTS2, lambda n: n.words + 3)
    """The lower-order weight of each context word (or the next two fields; :meth:`level2_weights` reads either)."""
    l2_weight_slot: NDArray[np.uint32] | None = _optional("l2.weight_slot", DERIVED_WEIGHTS2)
    """The context words whose level-2 weight is stored, increasing; the others are derived on load."""
    l2_weight_value: Floats | None = _optional("l2.weight_value", DERIVED_WEIGHTS2, lambda n: n.weights2)
    l3_word: WordIds | None = _optional("l3.word", WORD_IDS3, lambda n: n.n3)
    """The word of each trigram entry, sorted within a context pair (or the next two fields; :meth:`trigram_words` reads either)."""
    l3_tail: NDArray[np.uint16] | None = _optional("l3.tail", TAIL_POSITIONS3)
    """Per trigram entry of the pairs before ``START START``: where its word stands in the pair's last word's bigram list."""
    l3_start_word: WordIds | None = _optional("l3.start_word", TAIL_POSITIONS3)
    """The words of the ``START START`` pair's trigram entries (the last pair; its last word's list may pass 16 bits)."""
    l3_gamma: Floats | None = _optional("l3.gamma", STORED_WEIGHTS, lambda n: n.n2 + 1)
    """The lower-order weight of each context pair (or the next two fields; :meth:`level3_weights` reads either)."""
    l3_weight_slot: NDArray[np.uint32] | None = _optional("l3.weight_slot", DERIVED_WEIGHTS)
    """The pairs (bigram entries, n2 for ``START START``) whose weight is stored, increasing; the others are derived."""
    l3_weight_value: Floats | None = _optional("l3.weight_value", DERIVED_WEIGHTS, lambda n: n.weights)
    """The stored weights of those pairs."""
    l2_codebook: NDArray[np.float64] | None = _optional("l2.codebook", CODEBOOKS, lambda n: 256)
    """The 256 levels of 8-bit bigram values."""
    l3_codebook: NDArray[np.float64] | None = _optional("l3.codebook", CODEBOOKS, lambda n: 256)
    """The 256 levels of 8-bit trigram values."""
    rank2_off: Offsets | None = _optional("rank2.off", DENSE_RANKED2, lambda n: n.words + 4)
    """Per context word, where its ranked list starts in ``rank2_ids`` (formats 1 to 3; or the next two fields)."""
    rank2_word: WordIds | None = _optional("rank2.word", SPARSE_RANKED2)
    """The context words that have a ranked list, increasing (format 4 on)."""
    rank2_list_off: Offsets | None = _optional("rank2.list_off", SPARSE_RANKED2, lambda n: n.ranked2 + 1)
    """Per context word of ``rank2_word``, where its ranked list starts in ``rank2_ids``; one end entry."""
    rank2_ids: WordIds | None = _optional("rank2.ids", RANKED)
    rank3_slot: Offsets | None = _optional("rank3.slot", RANKED)
    """The bigram entries (context pairs) that have a ranked list, increasing."""
    rank3_off: Offsets | None = _optional("rank3.off", RANKED, lambda n: n.ranked3 + 1)
    rank3_ids: WordIds | None = _optional("rank3.ids", RANKED)

    @property
    def key_count(self) -> int:
        """How many keys the prefix index has."""
        if self.vocab_key_lo is not None:
            return len(self.vocab_key_lo)
        return id_count(self.vocab_key_first) if self.vocab_key_first is not None else 0

    def prefix_index(self) -> PrefixIndex:
        """The prefix index in full, per trie key, whichever layout stores it (for checks and tools)."""
        if self.vocab_key_lo is not None:
            assert self.vocab_key_hi is not None and self.vocab_key_order is not None
            lo = self.vocab_key_lo.astype(np.int64)
            order = self.vocab_key_order
            listed = order != np.iinfo(order.dtype).max
            return PrefixIndex(np.where(lo >= 0, lo, -lo - 1), self.vocab_key_hi.astype(np.int64), np.where(listed, order, 0).astype(np.int64), listed, lo >= 0)
        assert self.vocab_key_first is not None and self.vocab_key_span is not None
        assert self.vocab_listed_span is not None and self.vocab_listed_order is not None
        first = unpack_ids(self.vocab_key_first).astype(np.int64)
        span = self.vocab_key_span.astype(np.int64)
        listed = span == 0
        starts = np.zeros(len(span), dtype=np.int64)
        span[listed] = self.vocab_listed_span
        starts[listed] = self.vocab_listed_order
        return PrefixIndex(first, first + span, starts, listed, None)

    def level3_offsets(self) -> NDArray[np.int64]:
        """Level 3's offsets in full, as int64, whichever layout stores them."""
        if self.l3_off is not None:
            return self.l3_off.astype(np.int64)
        assert self.l3_off_base is not None and self.l3_off_delta is not None and self.l3_off_wide is not None
        return from_blocks(self.l3_off_base, self.l3_off_delta, self.l3_off_wide)

    def ranked2_offsets(self) -> NDArray[np.int64] | None:
        """Where each context word's ranked list starts, per context word (V + 4, int64), whichever layout stores it."""
        if self.rank2_off is not None:
            return self.rank2_off.astype(np.int64)
        if self.rank2_word is None or self.rank2_list_off is None:
            return None
        words = unpack_ids(self.rank2_word).astype(np.int64)
        starts = self.rank2_list_off.astype(np.int64)
        lengths = np.zeros(len(self.l2_off) - 1, dtype=np.int64)
        lengths[words] = np.diff(starts)
        out = np.zeros(len(lengths) + 1, dtype=np.int64)
        np.cumsum(lengths, out=out[1:])
        return out

    def level3_offset_reader(self) -> np.ndarray | BlockedOffsets:
        """Level 3's offsets for reading one entry at a time (``.item(i)``), without expanding them."""
        if self.l3_off is not None:
            return self.l3_off
        assert self.l3_off_base is not None and self.l3_off_delta is not None and self.l3_off_wide is not None
        return BlockedOffsets(self.l3_off_base, self.l3_off_delta, self.l3_off_wide)

    @property
    def vocab_size(self) -> int:
        """V, the number of suggestable words."""
        if self.vocab_word_keys is not None:
            return id_count(self.vocab_word_keys)
        assert self.vocab_words_off is not None
        return len(self.vocab_words_off) - 1

    @property
    def n2(self) -> int:
        """How many bigram entries the model stores."""
        return id_count(self.l2_word)

    @property
    def n3(self) -> int:
        """How many trigram entries the model stores."""
        if self.l3_word is not None:
            return id_count(self.l3_word)
        assert self.l3_tail is not None and self.l3_start_word is not None
        return len(self.l3_tail) + id_count(self.l3_start_word)

    def bigram_words(self) -> np.ndarray:
        """``l2_word`` as an integer array, whatever its width (packed ids decoded)."""
        return unpack_ids(self.l2_word)

    def trigram_words(self) -> np.ndarray:
        """Level 3's word ids as an integer array, whatever the layout (packed ids decoded, positions looked up)."""
        if self.l3_word is not None:
            return unpack_ids(self.l3_word)
        assert self.l3_tail is not None and self.l3_start_word is not None
        off3 = self.level3_offsets()
        n2 = self.n2
        w2 = self.bigram_words().astype(np.int64)
        last = np.repeat(w2, np.diff(off3[: n2 + 1]))
        found = self.l2_off.astype(np.int64)[last] + self.l3_tail
        return np.concatenate((w2[found], unpack_ids(self.l3_start_word).astype(np.int64)))

    def level2_weights(self, interpolated: bool) -> NDArray[np.float64]:
        """Every context word's level-2 weight (stored, or derived), float64 of shape (V + 3,)."""
        if self.l2_gamma is not None:
            return self.l2_gamma.astype(np.float64)
        assert self.l2_weight_slot is not None and self.l2_weight_value is not None
        off2 = self.l2_off.astype(np.int64)
        weights = np.ones(len(off2) - 1)
        listed = self.l2_weight_slot.astype(np.int64)
        derived = np.diff(off2) > 0
        derived[listed] = False
        contexts = np.flatnonzero(derived)
        table2 = value_table(self.l2_value, self.l2_codebook)
        found = derived_weights2(contexts, interpolated=interpolated, p1=self.p1.astype(np.float64), off2=off2, w2=self.l2_word, a2=self.l2_value, table2=table2)
        weights[contexts] = found[0]
        weights[listed] = self.l2_weight_value.astype(np.float64)
        return weights

    def weight_levels(self, interpolated: bool) -> dict[str, np.ndarray]:
        """The arrays a level-3 weight is derived from, decoded (keyword arguments of
        :func:`~foretype.modelfile.weights.derived_weights`)."""
        table2 = value_table(self.l2_value, self.l2_codebook)
        table3 = value_table(self.l3_value, self.l3_codebook)
        levels = {
            "p1": self.p1.astype(np.float64),
            "off2": self.l2_off.astype(np.int64),
            "w2": self.bigram_words(),
            "a2": table2[self.l2_value] if table2 is not None else self.l2_value.astype(np.float64),
            "g2": self.level2_weights(interpolated),
            "off3": self.level3_offsets(),
            "w3": self.trigram_words(),
            "a3": table3[self.l3_value] if table3 is not None else self.l3_value.astype(np.float64),
        }
        if not interpolated:
            levels["totals2"] = level2_totals(levels["p1"], levels["off2"], levels["w2"], levels["a2"], levels["g2"])
        return levels

    def level3_weights(self, interpolated: bool) -> NDArray[np.float64]:
        """Every pair's level-3 weight as the query reads it (stored, or derived), float64 of shape (n2 + 1,)."""
        if self.l3_gamma is not None:
            return self.l3_gamma.astype(np.float64)
        assert self.l3_weight_slot is not None and self.l3_weight_value is not None
        levels = self.weight_levels(interpolated)
        off3 = levels["off3"]
        weights = np.ones(len(off3) - 1)
        listed = self.l3_weight_slot.astype(np.int64)
        derived = np.diff(off3) > 0
        derived[listed] = False
        slots = np.flatnonzero(derived)
        weights[slots] = derived_weights(slots, interpolated=interpolated, **levels)[0]
        weights[listed] = self.l3_weight_value.astype(np.float64)
        return weights

    def compact(self, interpolated: bool | None = None) -> ModelArrays:
        """The same model in the current file layout, every probability unchanged.

        Level-3 offsets in blocks where they fit; word ids of more than 16 bits
        in three bytes; with ``interpolated`` (the model's form), level-3 weights
        stored only where deriving them would not give the same float64 value
        (or would be slow), when that is smaller.
        """
        out = self
        if self.l3_off is not None:
            blocks = to_blocks(self.l3_off)
            if blocks is not None:
                base, delta, wide = blocks
                out = dataclasses.replace(out, l3_off=None, l3_off_base=base, l3_off_delta=delta, l3_off_wide=wide)
        if interpolated is not None and out.l3_gamma is not None:
            out = out._sparse_weights(interpolated)
        if interpolated is not None and out.l2_gamma is not None:
            out = out._sparse_weights2(interpolated)
        if out.l3_word is not None and self.vocab_size + 3 > 2**16:
            out = out._tail_positions()
        packed: dict[str, Any] = {}
        if self.vocab_size + 3 <= PACKED_LIMIT:
            for spec in SPECS:
                array = getattr(out, spec.field)
                if spec.word_ids and array is not None and array.dtype == np.int32:
                    packed[spec.field] = pack_ids(array)
        keys = out.vocab_word_keys
        if keys is not None and keys.dtype == np.uint32 and (not len(keys) or int(keys.max()) < PACKED_LIMIT):
            packed["vocab_word_keys"] = pack_ids(keys)
        return dataclasses.replace(out, **packed) if packed else out

    def _tail_positions(self) -> ModelArrays:
        """Level 3's words as positions in their last word's bigram list, where every such position fits 16 bits."""
        assert self.l3_word is not None
        off3 = self.level3_offsets()
        off2 = self.l2_off.astype(np.int64)
        n2 = self.n2
        w2 = self.bigram_words().astype(np.int64)
        w3 = unpack_ids(self.l3_word).astype(np.int64)
        cut = int(off3[n2])
        last = np.repeat(w2, np.diff(off3[: n2 + 1]))
        base = len(off2) - 1
        key2 = np.repeat(np.arange(base, dtype=np.int64), np.diff(off2)) * base + w2
        wanted = last * base + w3[:cut]
        at = np.minimum(np.searchsorted(key2, wanted), max(len(key2) - 1, 0))
        if cut and (not len(key2) or not bool(np.all(key2[at] == wanted))):
            return self  # a trigram whose tail is not a stored bigram (a foreign file): keep the ids
        tail = at - off2[last]
        if cut and int(tail.max()) > 0xFFFF:
            return self
        return dataclasses.replace(
            self, l3_word=None, l3_tail=tail.astype(np.uint16), l3_start_word=self.l3_word[cut:] if self.l3_word.dtype != np.uint8 else self.l3_word[3 * cut :]
        )

    def _sparse_weights2(self, interpolated: bool) -> ModelArrays:
        """Level-2 weights stored only where the derived weight differs or is slow to derive (when that is smaller)."""
        assert self.l2_gamma is not None
        weights = self.l2_gamma.astype(np.float64)
        off2 = self.l2_off.astype(np.int64)
        lengths = np.diff(off2)
        candidates = np.flatnonzero((lengths > 0) & (lengths <= DERIVED_MAX))
        table2 = value_table(self.l2_value, self.l2_codebook)
        a2 = table2[self.l2_value] if table2 is not None else self.l2_value.astype(np.float64)
        derived = derived_weights2(candidates, interpolated=interpolated, p1=self.p1.astype(np.float64), off2=off2, w2=self.bigram_words(), a2=a2)[0]
        kept = _weights_to_store(weights, lengths, candidates, derived, self.l2_gamma.nbytes)
        if kept is None:
            return self
        return dataclasses.replace(self, l2_gamma=None, l2_weight_slot=kept[0], l2_weight_value=kept[1])

    def _sparse_weights(self, interpolated: bool) -> ModelArrays:
        """Level-3 weights stored only where the derived weight differs or is slow to derive (when that is smaller)."""
        assert self.l3_gamma is not None
        weights = self.l3_gamma.astype(np.float64)
        levels = self.weight_levels(interpolated)
        lengths = np.diff(levels["off3"])
        candidates = np.flatnonzero((lengths > 0) & (lengths <= DERIVED_MAX))
        derived = derived_weights(candidates, interpolated=interpolated, **levels)[0]
        kept = _weights_to_store(weights, lengths, candidates, derived, self.l3_gamma.nbytes)
        if kept is None:
            return self
        return dataclasses.replace(self, l3_gamma=None, l3_weight_slot=kept[0], l3_weight_value=kept[1])

    @property
    def ranked(self) -> bool:
        """Whether the model carries ranked lists."""
        return self.rank2_ids is not None

    @classmethod
    def from_sections(cls, sections: Mapping[str, np.ndarray], name: object = "model") -> ModelArrays:
        """The arrays of a model from its sections by name (sections no field names are left out).

        Raises:
            ModelFileError: a required section is missing (``name`` names the file in the message).
        """
        values: dict[str, np.ndarray] = {}
        for spec in SPECS:
            array = sections.get(spec.section)
            if array is None:
                if spec.group == REQUIRED:
                    raise ModelFileError(f"{name}: corrupt (missing section {spec.section})")
                continue
            values[spec.field] = array
        return cls(**values)

    def sections(self) -> dict[str, np.ndarray]:
        """The arrays by section name, in declaration order (absent optional sections left out), as a file stores them."""
        out: dict[str, np.ndarray] = {}
        for spec in SPECS:
            array = getattr(self, spec.field)
            if array is not None:
                out[spec.section] = array
        return out

    def vocabulary_sections(self) -> dict[str, np.ndarray]:
        """The ``vocab.*`` sections alone (what does not change when n-grams are pruned)."""
        return {name: array for name, array in self.sections().items() if name.startswith("vocab.")}

    def nbytes(self) -> int:
        """The bytes of every array."""
        return sum(int(array.nbytes) for array in self.sections().values())


class PrefixIndex(NamedTuple):
    """The prefix index per trie key, expanded (int64 arrays of one entry per key).

    Attributes:
        first: the first id with the prefix.
        hi: one past the last.
        order_start: where the range's list starts in ``vocab_order`` (where ``listed``).
        listed: whether the range has a stored list.
        is_word: whether the key is itself a word (None where the layout does not store it).
    """

    first: NDArray[np.int64]
    hi: NDArray[np.int64]
    order_start: NDArray[np.int64]
    listed: NDArray[np.bool_]
    is_word: NDArray[np.bool_] | None


class SectionSpec(NamedTuple):
    """What a field's declaration says about its section (read by the load checks).

    Attributes:
        field: the attribute of :class:`ModelArrays`.
        section: the section's name in the file.
        dtypes: the dtype names it may have.
        group: :data:`REQUIRED`, :data:`RANKED` or :data:`CODEBOOKS`.
        length: its length given the counts, or None where no count fixes it.
        word_ids: it holds word ids (so its width must fit the vocabulary).
        packable: its uint8 form holds three bytes per entry (:mod:`foretype.modelfile.packed`).
    """

    field: str
    section: str
    dtypes: frozenset[str]
    group: str
    length: Length | None
    word_ids: bool
    packable: bool


def _dtype_names(hint: Any) -> tuple[frozenset[str], bool]:
    """The dtype names an ``NDArray[...]`` annotation allows, and whether it is optional."""
    optional = False
    if isinstance(hint, types.UnionType) or typing.get_origin(hint) is typing.Union:
        arms = [arm for arm in typing.get_args(hint) if arm is not type(None)]
        optional = len(arms) < len(typing.get_args(hint))
        (hint,) = arms
    (scalar,) = typing.get_args(typing.get_args(hint)[1])
    scalars = typing.get_args(scalar) or (scalar,)
    return frozenset(np.dtype(s).name for s in scalars), optional


def _specs() -> tuple[SectionSpec, ...]:
    hints = typing.get_type_hints(ModelArrays)
    word_ids, _ = _dtype_names(WordIds)
    specs = []
    for item in dataclasses.fields(ModelArrays):
        dtypes, optional = _dtype_names(hints[item.name])
        group = item.metadata["group"]
        if optional == (group == REQUIRED):
            raise TypeError(f"field {item.name}: optional fields need a group, required ones none")
        specs.append(
            SectionSpec(item.name, item.metadata["section"], dtypes, group, item.metadata["length"], dtypes == word_ids, dtypes == word_ids or item.metadata.get("packable", False))
        )
    return tuple(specs)


SPECS = _specs()
"""One entry per field of :class:`ModelArrays`, in declaration order."""


def _weights_to_store(weights: np.ndarray, lengths: np.ndarray, candidates: np.ndarray, derived: np.ndarray, plain_bytes: int) -> tuple[np.ndarray, np.ndarray] | None:
    """(slots, values) of the weights a file must store: every listed context whose weight is not derived
    exactly (or not derived at all); None when storing them would not be smaller than ``plain_bytes``."""
    listed_mask = lengths > 0
    listed_mask[candidates[derived == weights[candidates]]] = False
    listed = np.flatnonzero(listed_mask)
    values = weights[listed]
    narrow = values.astype(np.float32)
    stored: np.ndarray = narrow if np.array_equal(narrow.astype(np.float64), values) else values
    if len(listed) * (4 + stored.itemsize) >= plain_bytes:
        return None
    return listed.astype(np.uint32), stored
