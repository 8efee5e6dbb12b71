"""Model-level checks of a loaded model file: cheap ones on every load, the rest on demand.

Loading (:func:`foretype.modelfile.format.read_model_file`) has already checked the
header and every section's CRC-32, so a file damaged on disk or in transit
never gets this far.  What remains are files whose checksums match but whose
content is wrong: written by a buggy or foreign tool, or crafted.

:func:`check_structure` runs on every load and costs a few passes over the
small arrays and one min/max over the large ones.  It guarantees that no query
can index outside an array, loop, or decode a bad string: required sections
are present with their exact types and lengths, offsets start at 0, never
decrease and end at their array's length, word ids are in range (predicted
words never the start symbol), probabilities and weights are finite and
non-negative, every prefix-index entry names a non-empty id range whose listed
words lie inside the order list, the string blobs are valid UTF-8 cut at
character boundaries, and the trie maps and holds one key per index entry.

:func:`check_thoroughly` (``foretype check``) adds what costs a pass over every
entry or a walk of the trie: each context's word list is strictly increasing
(queries binary-search it), the vocabulary is sorted and unique, every trie key
restores to the prefix whose id range it records, every listed prefix range is
ordered by unigram probability, every ranked list is a permutation of its
context's words in probability order. :func:`foretype.query.verify.verify_model`
adds that sampled distributions sum to 1.
"""

from __future__ import annotations

from typing import Any

import marisa_trie
import numpy as np

from ..counting.compiled import pure_requested
from ..errors import ModelFileError
from .blocked import wide_indices_fit
from .format import ModelFile
from .limits import MAX_VOCABULARY
from .model_arrays import (
    BLOCKED3,
    CODEBOOKS,
    COMPACT_INDEX,
    DENSE_INDEX,
    DENSE_RANKED2,
    DERIVED_WEIGHTS,
    DERIVED_WEIGHTS2,
    PLAIN3,
    RANKED,
    SPARSE_RANKED2,
    SPECS,
    STORED_WEIGHTS,
    STORED_WEIGHTS2,
    TAIL_POSITIONS3,
    WORD_IDS3,
    WORD_KEYS,
    WORD_STRINGS,
    Counts,
    ModelArrays,
)
from .packed import PACKED_LIMIT, id_range, is_packed, largest_id, unpack_ids

try:
    from ._checks import tails_fit
except ImportError:  # not built: no compiler at install time
    tails_fit = None

_VALUE_TYPES = {"log16": {"uint16"}, "float32": {"float32"}, "codebook8": {"uint8"}}
_TRIE_MAGIC = b"We love Marisa."
"""The first bytes of every marisa-trie image."""

SUM_TOLERANCE = 2e-3
"""How far from 1 a sampled distribution may sum (16-bit value codes round each value down by up to 0.034%)."""


def check_structure(model: ModelFile) -> ModelArrays:
    """Raise ModelFileError unless the model's arrays are mutually consistent (cheap; every load).

    Args:
        model: a model file as read by :func:`foretype.modelfile.format.read_model_file`.

    Returns:
        The file's arrays as one typed structure, checked.
    """
    name = model.path
    size = _check_meta(name, model.meta)
    arrays = ModelArrays.from_sections(model.sections, name)
    _check_section_types(name, arrays)
    _check_groups(name, arrays, model.meta["value_encoding"])
    _check_widths(name, arrays, size)
    _check_lengths(name, arrays, size)
    _check_levels(name, arrays, size)
    if arrays.ranked:
        _check_ranked_ranges(name, arrays, size)
    _check_vocabulary(name, arrays, size)
    return arrays


def _check_section_types(name: object, arrays: ModelArrays) -> None:
    """Every section present is one-dimensional with a dtype its field allows."""
    for spec in SPECS:
        array = getattr(arrays, spec.field)
        if array is not None:
            _check_type(name, spec.section, array, spec.dtypes)


def _check_groups(name: object, arrays: ModelArrays, encoding: str) -> None:
    """Ranked lists all or none; values as the header's encoding says, with codebooks exactly where it needs them."""
    if _group_state(arrays, RANKED) == "part":
        raise ModelFileError(f"{name}: corrupt (ranked lists are incomplete)")
    if arrays.ranked:
        _check_one_layout(name, arrays, DENSE_RANKED2, SPARSE_RANKED2, "rank2.off")
    elif _group_state(arrays, DENSE_RANKED2) != "none" or _group_state(arrays, SPARSE_RANKED2) != "none":
        raise ModelFileError(f"{name}: corrupt (ranked lists are incomplete)")
    for older, newer, first in (
        (DENSE_INDEX, COMPACT_INDEX, "vocab.key_lo"),
        (PLAIN3, BLOCKED3, "l3.off"),
        (STORED_WEIGHTS, DERIVED_WEIGHTS, "l3.gamma"),
        (STORED_WEIGHTS2, DERIVED_WEIGHTS2, "l2.gamma"),
        (WORD_STRINGS, WORD_KEYS, "vocab.words_blob"),
        (WORD_IDS3, TAIL_POSITIONS3, "l3.word"),
    ):
        _check_one_layout(name, arrays, older, newer, first)
    for section, values in (("l2.value", arrays.l2_value), ("l3.value", arrays.l3_value)):
        if values.dtype.name not in _VALUE_TYPES[encoding]:
            raise ModelFileError(f"{name}: corrupt (section {section} does not hold {encoding} values)")
    if encoding == "codebook8":
        for spec in SPECS:
            if spec.group == CODEBOOKS and getattr(arrays, spec.field) is None:
                raise ModelFileError(f"{name}: corrupt (missing section {spec.section})")


def _check_one_layout(name: object, arrays: ModelArrays, older: str, newer: str, first: str) -> None:
    """Exactly one of two layouts of the same data is present, whole (``first``: the older layout's first section)."""
    states = (_group_state(arrays, older), _group_state(arrays, newer))
    if states == ("none", "none"):
        raise ModelFileError(f"{name}: corrupt (missing section {first})")
    if "part" in states or states[0] == states[1]:
        raise ModelFileError(f"{name}: corrupt ({older} or {newer}: incomplete, or both present)")


def _group_state(arrays: ModelArrays, group: str) -> str:
    """Whether a group's sections are ``all`` present, ``none`` or only ``part``."""
    present = [getattr(arrays, spec.field) is not None for spec in SPECS if spec.group == group]
    return "all" if all(present) else "none" if not any(present) else "part"


def _check_widths(name: object, arrays: ModelArrays, size: int) -> None:
    """Sections of word ids stored as uint16 (or in three bytes) must fit every id the vocabulary needs (V + 3 symbols)."""
    for spec in SPECS:
        array = getattr(arrays, spec.field)
        if not spec.packable or array is None:
            continue
        if spec.word_ids and ((array.dtype == np.uint16 and size + 3 > 2**16) or (is_packed(array) and size + 3 > PACKED_LIMIT)):
            raise ModelFileError(f"{name}: corrupt (section {spec.section} is too narrow for {size:,} words)")
        if is_packed(array) and len(array) % 3:
            raise ModelFileError(f"{name}: corrupt (section {spec.section} does not hold whole three-byte ids)")


def _check_lengths(name: object, arrays: ModelArrays, size: int) -> None:
    """Each section's length follows from the vocabulary size and the number of stored entries (as its field declares)."""
    ranked3 = len(arrays.rank3_slot) if arrays.rank3_slot is not None else 0
    ranked2 = id_count_of(arrays.rank2_word) if arrays.rank2_word is not None else 0
    listed = int(np.count_nonzero(arrays.vocab_key_span == 0)) if arrays.vocab_key_span is not None else 0
    displayed = id_count_of(arrays.vocab_display_ids) if arrays.vocab_display_ids is not None else size
    weights = len(arrays.l3_weight_slot) if arrays.l3_weight_slot is not None else 0
    weights2 = len(arrays.l2_weight_slot) if arrays.l2_weight_slot is not None else 0
    counts = Counts(size, arrays.n2, arrays.n3, arrays.key_count, ranked3, listed, displayed, weights, weights2, ranked2)
    for spec in SPECS:
        array = getattr(arrays, spec.field)
        if array is None or spec.length is None:
            continue
        length = spec.length(counts)
        entries = id_count_of(array) if spec.packable else len(array)
        if entries != length:
            raise ModelFileError(f"{name}: corrupt (section {spec.section} has {entries:,} entries, expected {length:,})")


def _check_levels(name: object, s: ModelArrays, size: int) -> None:
    """Levels 1 to 3: offsets span their entries, word ids are in range, probabilities and weights are finite."""
    _offsets(name, "l2.off", s.l2_off, s.n2)
    if s.l3_off_base is not None and s.l3_off_wide is not None and not wide_indices_fit(s.l3_off_base, s.n2 + 2, len(s.l3_off_wide)):
        raise ModelFileError(f"{name}: corrupt (section l3.off_base points past section l3.off_wide)")
    off3 = s.level3_offsets()
    _offsets(name, "l3.off", off3, s.n3)
    # Predicted words are 0 .. V + 1 (words, UNKNOWN, END); START is context only.
    _ids(name, "l2.word", s.l2_word, size + 1)
    if s.l3_word is not None:
        _ids(name, "l3.word", s.l3_word, size + 1)
    else:
        _check_tail_positions(name, s, size, off3)
    _probabilities(name, "p1", s.p1, upper=1.0)
    _weights(name, "l2", s.l2_gamma, s.l2_weight_slot, s.l2_weight_value, size + 2)
    _weights(name, "l3", s.l3_gamma, s.l3_weight_slot, s.l3_weight_value, s.n2)
    for section, values in (("l2.value", s.l2_value), ("l3.value", s.l3_value)):
        if values.dtype.kind == "f":
            _probabilities(name, section, values, upper=1.0)
    for section, book in (("l2.codebook", s.l2_codebook), ("l3.codebook", s.l3_codebook)):
        if book is not None:
            _probabilities(name, section, book, upper=1.0)


def _weights(name: object, level: str, plain: np.ndarray | None, slots: np.ndarray | None, values: np.ndarray | None, highest: int) -> None:
    """A level's weights, stored for every context or only for some (slots increasing, up to ``highest``): finite, non-negative."""
    if plain is not None:
        _probabilities(name, f"{level}.gamma", plain)
    if slots is not None and values is not None:
        _ids(name, f"{level}.weight_slot", slots, highest)
        _increasing(name, f"{level}.weight_slot", slots)
        _probabilities(name, f"{level}.weight_value", values)


def _check_tail_positions(name: object, s: ModelArrays, size: int, off3: np.ndarray) -> None:
    """Level 3's words as positions: each inside its pair's last word's bigram list; ``START START``'s words in range."""
    assert s.l3_tail is not None and s.l3_start_word is not None
    n2 = s.n2
    if int(off3[n2]) != len(s.l3_tail):
        raise ModelFileError(f"{name}: corrupt (section l3.tail does not cover the pairs before the sentence start)")
    _ids(name, "l3.start_word", s.l3_start_word, size + 1)
    if not tails_inside(s, off3):
        raise ModelFileError(f"{name}: corrupt (section l3.tail points past a bigram list)")


def tails_inside(s: ModelArrays, off3: np.ndarray) -> bool:
    """Whether each level-3 position lies inside its pair's last word's bigram list (``off3`` already checked).

    One compiled pass where the extension is built (a third of a large model's load
    time otherwise); the numpy check below is the fallback and the reference.
    """
    assert s.l3_tail is not None
    n2 = s.n2
    if tails_fit is not None and not pure_requested() and is_packed(s.l2_word) and s.l3_tail.dtype == np.uint16:
        lengths = np.diff(s.l2_off).astype(np.int64)
        return bool(tails_fit(s.l2_word, lengths, np.ascontiguousarray(off3, dtype=np.int64), s.l3_tail, n2))
    # Each entry against the length of its pair's last word's list (l2.word's ids were checked in range).
    limit = np.diff(s.l2_off).astype(np.int32)[unpack_ids(s.l2_word)]
    return not bool(np.any(s.l3_tail >= np.repeat(limit, np.diff(off3[: n2 + 1]))))


def _check_ranked_ranges(name: object, s: ModelArrays, size: int) -> None:
    """The ranked lists: offsets span their ids, ids are words, slots name level-2 entries in increasing order."""
    assert s.rank2_ids is not None and s.rank3_off is not None and s.rank3_ids is not None and s.rank3_slot is not None
    if s.rank2_off is not None:
        _offsets(name, "rank2.off", s.rank2_off, id_count_of(s.rank2_ids))
    else:
        assert s.rank2_word is not None and s.rank2_list_off is not None
        _ids(name, "rank2.word", s.rank2_word, size + 2)
        _increasing(name, "rank2.word", unpack_ids(s.rank2_word))
        _offsets(name, "rank2.list_off", s.rank2_list_off, id_count_of(s.rank2_ids))
    _offsets(name, "rank3.off", s.rank3_off, id_count_of(s.rank3_ids))
    _ids(name, "rank2.ids", s.rank2_ids, size - 1)
    _ids(name, "rank3.ids", s.rank3_ids, size - 1)
    _ids(name, "rank3.slot", s.rank3_slot, s.n2)
    _increasing(name, "rank3.slot", s.rank3_slot)


def _check_meta(name: object, meta: dict[str, Any]) -> int:
    """Check the header fields queries rely on; returns the vocabulary size."""

    def whole(value: Any) -> bool:
        return isinstance(value, int) and not isinstance(value, bool)

    for key in ("method", "interpolated", "value_encoding", "vocab_size", "corpus_tokens"):
        if key not in meta:
            raise ModelFileError(f"{name}: corrupt header (missing {key})")
    size = meta["vocab_size"]
    if not whole(size) or not 1 <= size <= MAX_VOCABULARY:
        raise ModelFileError(f"{name}: corrupt header (bad vocab_size {size!r})")
    if not whole(meta["corpus_tokens"]) or meta["corpus_tokens"] < 0:
        raise ModelFileError(f"{name}: corrupt header (bad corpus_tokens)")
    if not isinstance(meta["interpolated"], bool) or not isinstance(meta["method"], str):
        raise ModelFileError(f"{name}: corrupt header (bad method)")
    if not isinstance(meta["value_encoding"], str) or meta["value_encoding"] not in _VALUE_TYPES:
        raise ModelFileError(f"{name}: corrupt header (unknown value encoding {meta['value_encoding']!r})")
    return int(size)


def _check_type(name: object, section: str, array: np.ndarray, allowed: frozenset[str]) -> None:
    if array.ndim != 1 or array.dtype.name not in allowed:
        raise ModelFileError(f"{name}: corrupt (section {section} has the wrong type)")


def _offsets(name: object, section: str, offsets: np.ndarray, length: int) -> None:
    if len(offsets) == 0 or int(offsets[0]) != 0 or int(offsets[-1]) != length:
        raise ModelFileError(f"{name}: corrupt (section {section} does not span its entries)")
    if len(offsets) > 1 and bool(np.any(offsets[1:] < offsets[:-1])):
        raise ModelFileError(f"{name}: corrupt (section {section} decreases)")


def _increasing(name: object, section: str, values: np.ndarray) -> None:
    if len(values) > 1 and bool(np.any(values[1:] <= values[:-1])):
        raise ModelFileError(f"{name}: corrupt (section {section} is not strictly increasing)")


def id_count_of(array: np.ndarray) -> int:
    """Entries of a word-id section (three bytes each when packed)."""
    return len(array) // 3 if is_packed(array) else len(array)


def _ids(name: object, section: str, ids: np.ndarray, highest: int) -> None:
    if not len(ids):
        return
    low, high = (0, largest_id(ids)) if is_packed(ids) else (int(ids.min()), int(ids.max()))  # packed ids are unsigned
    if low < 0 or high > highest:
        raise ModelFileError(f"{name}: corrupt (section {section} holds ids out of range)")


def _probabilities(name: object, section: str, values: np.ndarray, upper: float | None = None) -> None:
    if not len(values):
        return
    # min/max propagate NaN, so two reductions catch NaN, infinities and range at once.
    low, high = float(values.min()), float(values.max())
    if not (np.isfinite(low) and np.isfinite(high)) or low < 0 or (upper is not None and high > upper * (1 + 1e-6)):
        raise ModelFileError(f"{name}: corrupt (section {section} holds values out of range)")


def _check_vocabulary(name: object, s: ModelArrays, size: int) -> None:
    """The prefix index and string tables: ranges, listed words, UTF-8, the trie image."""
    _check_strings(name, s)
    order = s.vocab_order
    if id_count_of(order) < size:
        raise ModelFileError(f"{name}: corrupt (section vocab.order is shorter than the vocabulary)")
    _ids(name, "vocab.order", order, size - 1)
    if s.vocab_display_ids is not None:
        _ids(name, "vocab.display_ids", s.vocab_display_ids, size - 1)
        _increasing(name, "vocab.display_ids", unpack_ids(s.vocab_display_ids))
    index = s.prefix_index()
    first, hi = index.first, index.hi
    if len(first) and (int(first.min()) < 0 or int(hi.max()) > size or bool(np.any(hi <= first))):
        raise ModelFileError(f"{name}: corrupt (the prefix index holds bad id ranges)")
    starts = index.order_start[index.listed]
    if len(starts):
        ends = starts + (hi - first)[index.listed]
        if int(starts.min()) < 0 or int(ends.max()) > id_count_of(order):
            raise ModelFileError(f"{name}: corrupt (the prefix index points past the order list)")
    image = s.vocab_trie
    if len(image) < 64 or bytes(image[: len(_TRIE_MAGIC)]) != _TRIE_MAGIC:
        raise ModelFileError(f"{name}: corrupt (section vocab.trie is not a trie image)")
    trie = marisa_trie.Trie()
    try:
        trie.map(image.data)
    except Exception:  # noqa: BLE001 - the library raises several types for bad images
        raise ModelFileError(f"{name}: corrupt (section vocab.trie cannot be read)") from None
    if len(trie) != len(first):
        raise ModelFileError(f"{name}: corrupt (the trie holds {len(trie):,} keys but the prefix index {len(first):,})")
    if s.vocab_word_keys is not None and len(s.vocab_word_keys) and id_range(s.vocab_word_keys)[1] >= len(trie):
        raise ModelFileError(f"{name}: corrupt (section vocab.word_keys names keys the trie does not hold)")


def _check_strings(name: object, s: ModelArrays) -> None:
    """The string tables: model forms (formats 1 to 3) and display forms."""
    if s.vocab_words_blob is not None and s.vocab_words_off is not None:
        _strings(name, "vocab.words", s.vocab_words_blob, s.vocab_words_off)
    _strings(name, "vocab.display", s.vocab_display_blob, s.vocab_display_off)


def _strings(name: object, section: str, blob: np.ndarray, offsets: np.ndarray) -> None:
    """Offsets strictly increase (no empty word), end at the blob's end and cut at character starts."""
    _offsets(name, section + "_off", offsets, len(blob))
    _increasing(name, section + "_off", offsets)
    data = blob.tobytes()
    try:
        data.decode("utf-8")
    except UnicodeDecodeError:
        raise ModelFileError(f"{name}: corrupt (section {section}_blob is not valid UTF-8)") from None
    starts = offsets[:-1].astype(np.int64)
    if len(starts) and bool(np.any((blob[starts] & 0xC0) == 0x80)):
        raise ModelFileError(f"{name}: corrupt (section {section}_off cuts a character)")


# ---------------------------------------------------------------- full check (structure; query.verify adds the sums)
def check_thoroughly(model: ModelFile, arrays: ModelArrays) -> None:
    """The checks too slow for every load (run after :func:`check_structure`).

    Args:
        model: the model file (its path and header).
        arrays: its arrays, as :func:`check_structure` returned them.

    Raises:
        ModelFileError: a sorted list is unsorted, the prefix index disagrees with
            the words, a ranked list is not its context's words in order, or a
            sampled distribution does not sum to 1.
    """
    name = model.path
    s = arrays
    size = int(model.meta["vocab_size"])
    _sorted_within(name, "l2.word", s.bigram_words(), s.l2_off)
    _sorted_within(name, "l3.word", s.trigram_words(), s.level3_offsets())
    words = _model_forms(s)
    if any(words[i] >= words[i + 1] for i in range(len(words) - 1)):
        raise ModelFileError(f"{name}: corrupt (the vocabulary is not sorted and unique)")
    _check_prefix_index(name, s, words)
    _check_unigram_lists(name, s, size)
    if s.ranked:
        _check_ranked_lists(name, s, size)


def _sorted_within(name: object, section: str, words: np.ndarray, offsets: np.ndarray) -> None:
    if len(words) < 2:
        return
    rises = words[1:].astype(np.int64) > words[:-1]
    starts = offsets[1:-1].astype(np.int64)
    starts = starts[(starts > 0) & (starts < len(words))]
    rises[starts - 1] = True  # a new context may start lower
    if not bool(rises.all()):
        raise ModelFileError(f"{name}: corrupt (section {section} is not sorted within a context)")


def _model_forms(s: ModelArrays) -> list[str]:
    """Every word's model form, in id order, from whichever layout stores them."""
    if s.vocab_word_keys is None:
        assert s.vocab_words_blob is not None and s.vocab_words_off is not None
        return _unpack_all(s.vocab_words_blob, s.vocab_words_off)
    trie = marisa_trie.Trie()
    trie.map(s.vocab_trie.data)
    return [trie.restore_key(int(key)) for key in unpack_ids(s.vocab_word_keys)]


def _unpack_all(blob: np.ndarray, offsets: np.ndarray) -> list[str]:
    data = blob.tobytes()
    bounds = offsets.astype(np.int64).tolist()
    return [data[bounds[i] : bounds[i + 1]].decode("utf-8") for i in range(len(bounds) - 1)]


def _check_prefix_index(name: object, s: ModelArrays, words: list[str]) -> None:
    """Every trie key is a prefix of a word, and its entry records that prefix's id range."""
    trie = marisa_trie.Trie()
    trie.map(s.vocab_trie.data)
    items = trie.items()
    prefixes = np.array([key for key, _ in items], dtype=object)
    key_ids = np.array([key_id for _, key_id in items], dtype=np.int64)
    expected = {word[:end] for word in words for end in range(1, len(word) + 1)}
    if len(prefixes) != len(expected) or not all(p in expected for p in prefixes):
        raise ModelFileError(f"{name}: corrupt (the trie does not hold exactly the prefixes of the words)")
    if not len(prefixes):
        return
    sorted_words = np.array(words, dtype=object)
    lo = np.searchsorted(sorted_words, prefixes, side="left")
    hi = np.searchsorted(sorted_words, np.array([p + "\U0010ffff" for p in prefixes], dtype=object), side="left")
    is_word = np.zeros(len(prefixes), dtype=bool)
    inside = lo < len(words)
    is_word[inside] = sorted_words[lo[inside]] == prefixes[inside]
    index = s.prefix_index()
    agrees = np.array_equal(index.first[key_ids], lo) and np.array_equal(index.hi[key_ids], hi)
    if index.is_word is not None:
        agrees = agrees and np.array_equal(index.is_word[key_ids], is_word)
    if not agrees:
        raise ModelFileError(f"{name}: corrupt (the prefix index disagrees with the words)")


def _check_unigram_lists(name: object, s: ModelArrays, size: int) -> None:
    """The root list and every listed prefix range: its ids, by unigram probability, ties by id."""
    order = unpack_ids(s.vocab_order).astype(np.int64)
    p1 = s.p1[:size].astype(np.float64)
    index = s.prefix_index()
    first = index.first[index.listed]
    spans = index.hi[index.listed] - first
    starts = np.concatenate(([0], index.order_start[index.listed]))
    firsts = np.concatenate(([0], first))
    spans = np.concatenate(([size], spans))
    owner = np.repeat(np.arange(len(spans)), spans)
    within = np.arange(len(owner)) - np.repeat(np.cumsum(spans) - spans, spans)
    members = order[np.repeat(starts, spans) + within]
    low = np.repeat(firsts, spans)
    if bool(np.any((members < low) | (members >= low + np.repeat(spans, spans)))):
        raise ModelFileError(f"{name}: corrupt (a prefix's word list holds words outside its range)")
    # In order: probability never rises, and equal probabilities go by id.
    same = owner[1:] == owner[:-1]
    prob = p1[members]
    bad = same & ((prob[1:] > prob[:-1]) | ((prob[1:] == prob[:-1]) & (members[1:] <= members[:-1])))
    if bool(bad.any()):
        raise ModelFileError(f"{name}: corrupt (a prefix's word list is out of order)")


def _check_ranked_lists(name: object, s: ModelArrays, size: int) -> None:
    """Each ranked list holds its context's stored words (below V) exactly once."""
    assert s.rank2_ids is not None and s.rank3_off is not None and s.rank3_ids is not None and s.rank3_slot is not None
    off2 = s.l2_off.astype(np.int64)
    rank2 = s.ranked2_offsets()
    assert rank2 is not None
    w2, ids2 = s.bigram_words(), unpack_ids(s.rank2_ids)
    for v in np.flatnonzero(np.diff(rank2) > 0):
        stored = w2[off2[v] : off2[v + 1]]
        listed = ids2[rank2[v] : rank2[v + 1]]
        if not np.array_equal(np.sort(listed), stored[stored < size]):
            raise ModelFileError(f"{name}: corrupt (the ranked list of context word {v} is not its words)")
    off3 = s.level3_offsets()
    rank3 = s.rank3_off.astype(np.int64)
    w3, ids3 = s.trigram_words(), unpack_ids(s.rank3_ids)
    for index, slot in enumerate(s.rank3_slot.astype(np.int64)):
        stored = w3[off3[slot] : off3[slot + 1]]
        listed = ids3[rank3[index] : rank3[index + 1]]
        if not np.array_equal(np.sort(listed), stored[stored < size]):
            raise ModelFileError(f"{name}: corrupt (the ranked list of context slot {slot} is not its words)")
