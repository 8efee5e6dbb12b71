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

from ..errors import ModelFileError
from .format import ModelFile
from .limits import MAX_VOCABULARY

_WORD_TYPES = {"uint16", "int32"}
_OFFSET_TYPES = {"uint32", "uint64"}
_FLOAT_TYPES = {"float32", "float64"}
_VALUE_TYPES = {"log16": {"uint16"}, "float32": {"float32"}, "codebook8": {"uint8"}}
_CODEBOOK_LEVELS = 256
_SECTION_TYPES = {
    "p1": _FLOAT_TYPES,
    "l2.off": _OFFSET_TYPES,
    "l2.word": _WORD_TYPES,
    "l2.value": {"uint8", "uint16", "float32"},
    "l2.gamma": _FLOAT_TYPES,
    "l3.off": _OFFSET_TYPES,
    "l3.word": _WORD_TYPES,
    "l3.value": {"uint8", "uint16", "float32"},
    "l3.gamma": _FLOAT_TYPES,
    "vocab.trie": {"uint8"},
    "vocab.key_lo": {"int32"},
    "vocab.key_hi": {"int32"},
    "vocab.key_order": _OFFSET_TYPES,
    "vocab.order": _WORD_TYPES,
    "vocab.words_blob": {"uint8"},
    "vocab.words_off": _OFFSET_TYPES,
    "vocab.display_blob": {"uint8"},
    "vocab.display_off": _OFFSET_TYPES,
}
_RANK_TYPES = {
    "rank2.off": _OFFSET_TYPES,
    "rank2.ids": _WORD_TYPES,
    "rank3.slot": _OFFSET_TYPES,
    "rank3.off": _OFFSET_TYPES,
    "rank3.ids": _WORD_TYPES,
}
_TRIE_MAGIC = b"We love Marisa."
"""The first bytes of every marisa-trie image."""

SUM_TOLERANCE = 2e-3
"""How far from 1 a sampled distribution may sum (16-bit value codes round each value down by up to 0.034%)."""


def check_structure(model: ModelFile) -> None:
    """Raise ModelFileError unless the model's arrays are mutually consistent (cheap; every load).

    Args:
        model: a model file as read by :func:`foretype.modelfile.format.read_model_file`.
    """
    name = model.path
    size = _check_meta(name, model.meta)
    s = model.sections
    ranked = _check_section_types(name, s)
    _check_value_types(name, s, model.meta["value_encoding"])
    _check_widths(name, s, size)
    _check_lengths(name, s, size, ranked=ranked)
    _check_levels(name, s, size)
    if ranked:
        _check_ranked_ranges(name, s, size)
    _check_vocabulary(name, s, size)


def _check_section_types(name: object, s: dict[str, np.ndarray]) -> bool:
    """Every required section is present with an allowed type; ranked lists all or none.

    Returns:
        Whether the model carries ranked lists.
    """
    for section, allowed in _SECTION_TYPES.items():
        if section not in s:
            raise ModelFileError(f"{name}: corrupt (missing section {section})")
        _check_type(name, section, s[section], allowed)
    present_ranks = [section for section in _RANK_TYPES if section in s]
    if present_ranks and len(present_ranks) != len(_RANK_TYPES):
        raise ModelFileError(f"{name}: corrupt (ranked lists are incomplete)")
    for section in present_ranks:
        _check_type(name, section, s[section], _RANK_TYPES[section])
    return bool(present_ranks)


def _check_value_types(name: object, s: dict[str, np.ndarray], encoding: str) -> None:
    """The value sections hold what the header's value encoding says, with codebooks where it needs them."""
    for section in ("l2.value", "l3.value"):
        if s[section].dtype.name not in _VALUE_TYPES[encoding]:
            raise ModelFileError(f"{name}: corrupt (section {section} does not hold {encoding} values)")
    _check_codebooks(name, s, encoding)


def _check_widths(name: object, s: dict[str, np.ndarray], size: int) -> None:
    """Sections of word ids stored as uint16 must fit every id the vocabulary needs (V + 3 symbols)."""
    for section in ("l2.word", "l3.word", "vocab.order", "rank2.ids", "rank3.ids"):
        if section in s and s[section].dtype == np.uint16 and size + 3 > 2**16:
            raise ModelFileError(f"{name}: corrupt (section {section} is too narrow for {size:,} words)")


def _check_lengths(name: object, s: dict[str, np.ndarray], size: int, *, ranked: bool) -> None:
    """Each section's length follows from the vocabulary size and the number of stored entries."""
    n2 = len(s["l2.word"])
    n3 = len(s["l3.word"])
    keys = len(s["vocab.key_lo"])
    expect = {
        "p1": size + 2,
        "l2.off": size + 4,
        "l2.value": n2,
        "l2.gamma": size + 3,
        "l3.off": n2 + 2,
        "l3.value": n3,
        "l3.gamma": n2 + 1,
        "vocab.words_off": size + 1,
        "vocab.display_off": size + 1,
        "vocab.key_hi": keys,
        "vocab.key_order": keys,
    }
    if ranked:
        expect["rank2.off"] = size + 4
        expect["rank3.off"] = len(s["rank3.slot"]) + 1
    for section, length in expect.items():
        if len(s[section]) != length:
            raise ModelFileError(f"{name}: corrupt (section {section} has {len(s[section]):,} entries, expected {length:,})")


def _check_levels(name: object, s: dict[str, np.ndarray], size: int) -> None:
    """Levels 1 to 3: offsets span their entries, word ids are in range, probabilities and weights are finite."""
    n2 = len(s["l2.word"])
    n3 = len(s["l3.word"])
    _offsets(name, "l2.off", s["l2.off"], n2)
    _offsets(name, "l3.off", s["l3.off"], n3)
    # Predicted words are 0 .. V + 1 (words, UNKNOWN, END); START is context only.
    _ids(name, "l2.word", s["l2.word"], size + 1)
    _ids(name, "l3.word", s["l3.word"], size + 1)
    _probabilities(name, "p1", s["p1"], upper=1.0)
    _probabilities(name, "l2.gamma", s["l2.gamma"])
    _probabilities(name, "l3.gamma", s["l3.gamma"])
    for section in ("l2.value", "l3.value"):
        if s[section].dtype.kind == "f":
            _probabilities(name, section, s[section], upper=1.0)


def _check_ranked_ranges(name: object, s: dict[str, np.ndarray], size: int) -> None:
    """The ranked lists: offsets span their ids, ids are words, slots name level-2 entries in increasing order."""
    n2 = len(s["l2.word"])
    _offsets(name, "rank2.off", s["rank2.off"], len(s["rank2.ids"]))
    _offsets(name, "rank3.off", s["rank3.off"], len(s["rank3.ids"]))
    _ids(name, "rank2.ids", s["rank2.ids"], size - 1)
    _ids(name, "rank3.ids", s["rank3.ids"], size - 1)
    _ids(name, "rank3.slot", s["rank3.slot"], n2)
    _increasing(name, "rank3.slot", s["rank3.slot"])


def _check_codebooks(name: object, s: dict[str, np.ndarray], encoding: str) -> None:
    """8-bit values need both codebooks: 256 float64 levels in [0, 1] each."""
    if encoding != "codebook8":
        return
    for section in ("l2.codebook", "l3.codebook"):
        if section not in s:
            raise ModelFileError(f"{name}: corrupt (missing section {section})")
        _check_type(name, section, s[section], {"float64"})
        if len(s[section]) != _CODEBOOK_LEVELS:
            raise ModelFileError(f"{name}: corrupt (section {section} has {len(s[section]):,} entries, expected {_CODEBOOK_LEVELS})")
        _probabilities(name, section, s[section], upper=1.0)


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


def _check_type(name: object, section: str, array: np.ndarray, allowed: set[str]) -> None:
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


def _ids(name: object, section: str, ids: np.ndarray, highest: int) -> None:
    if len(ids) and (int(ids.min()) < 0 or int(ids.max()) > highest):
        raise ModelFileError(f"{name}: corrupt (section {section} holds ids out of range)")


def _probabilities(name: object, section: str, values: np.ndarray, upper: float | None = None) -> None:
    if not len(values):
        return
    # min/max propagate NaN, so two reductions catch NaN, infinities and range at once.
    low, high = float(values.min()), float(values.max())
    if not (np.isfinite(low) and np.isfinite(high)) or low < 0 or (upper is not None and high > upper * (1 + 1e-6)):
        raise ModelFileError(f"{name}: corrupt (section {section} holds values out of range)")


def _check_vocabulary(name: object, s: dict[str, np.ndarray], size: int) -> None:
    """The prefix index and string tables: ranges, listed words, UTF-8, the trie image."""
    _strings(name, "vocab.words", s["vocab.words_blob"], s["vocab.words_off"])
    _strings(name, "vocab.display", s["vocab.display_blob"], s["vocab.display_off"])
    order = s["vocab.order"]
    if len(order) < size:
        raise ModelFileError(f"{name}: corrupt (section vocab.order is shorter than the vocabulary)")
    _ids(name, "vocab.order", order, size - 1)
    key_lo = s["vocab.key_lo"].astype(np.int64)
    key_hi = s["vocab.key_hi"].astype(np.int64)
    first = np.where(key_lo >= 0, key_lo, -key_lo - 1)
    if len(first) and (int(first.min()) < 0 or int(key_hi.max()) > size or bool(np.any(key_hi <= first))):
        raise ModelFileError(f"{name}: corrupt (the prefix index holds bad id ranges)")
    key_order = s["vocab.key_order"]
    if len(key_order):
        listed = key_order != np.iinfo(key_order.dtype).max
        ends = key_order[listed].astype(np.uint64) + (key_hi - first)[listed].astype(np.uint64)
        if len(ends) and int(ends.max()) > len(order):
            raise ModelFileError(f"{name}: corrupt (section vocab.key_order points past the order list)")
    image = s["vocab.trie"]
    if len(image) < 64 or bytes(image[: len(_TRIE_MAGIC)]) != _TRIE_MAGIC:
        raise ModelFileError(f"{name}: corrupt (section vocab.trie is not a trie image)")
    trie = marisa_trie.Trie()
    try:
        trie.map(image.data)
    except Exception:  # noqa: BLE001 - the library raises several types for bad images
        raise ModelFileError(f"{name}: corrupt (section vocab.trie cannot be read)") from None
    if len(trie) != len(key_lo):
        raise ModelFileError(f"{name}: corrupt (the trie holds {len(trie):,} keys but the prefix index {len(key_lo):,})")


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
def check_thoroughly(model: ModelFile) -> None:
    """The checks too slow for every load (run after :func:`check_structure`).

    Raises:
        ModelFileError: a sorted list is unsorted, the prefix index disagrees with
            the words, a ranked list is not its context's words in order, or a
            sampled distribution does not sum to 1.
    """
    name = model.path
    s = model.sections
    size = int(model.meta["vocab_size"])
    _sorted_within(name, "l2.word", s["l2.word"], s["l2.off"])
    _sorted_within(name, "l3.word", s["l3.word"], s["l3.off"])
    words = _unpack_all(s["vocab.words_blob"], s["vocab.words_off"])
    if any(words[i] >= words[i + 1] for i in range(len(words) - 1)):
        raise ModelFileError(f"{name}: corrupt (the vocabulary is not sorted and unique)")
    _check_prefix_index(name, s, words)
    _check_unigram_lists(name, s, size)
    if "rank2.off" in s:
        _check_ranked_lists(name, model)


def _sorted_within(name: object, section: str, words: np.ndarray, offsets: np.ndarray) -> None:
    if len(words) < 2:
        return
    rises = words[1:].astype(np.int64) > words[:-1]
    starts = offsets[1:-1].astype(np.int64)
    starts = starts[(starts > 0) & (starts < len(words))]
    rises[starts - 1] = True  # a new context may start lower
    if not bool(rises.all()):
        raise ModelFileError(f"{name}: corrupt (section {section} is not sorted within a context)")


def _unpack_all(blob: np.ndarray, offsets: np.ndarray) -> list[str]:
    data = blob.tobytes()
    bounds = offsets.astype(np.int64).tolist()
    return [data[bounds[i] : bounds[i + 1]].decode("utf-8") for i in range(len(bounds) - 1)]


def _check_prefix_index(name: object, s: dict[str, np.ndarray], words: list[str]) -> None:
    """Every trie key is a prefix of a word, and its entry records that prefix's id range."""
    trie = marisa_trie.Trie()
    trie.map(s["vocab.trie"].data)
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
    stored_lo = s["vocab.key_lo"][key_ids].astype(np.int64)
    stored_hi = s["vocab.key_hi"][key_ids].astype(np.int64)
    if not (np.array_equal(stored_lo, np.where(is_word, lo, -lo - 1)) and np.array_equal(stored_hi, hi)):
        raise ModelFileError(f"{name}: corrupt (the prefix index disagrees with the words)")


def _check_unigram_lists(name: object, s: dict[str, np.ndarray], size: int) -> None:
    """The root list and every listed prefix range: its ids, by unigram probability, ties by id."""
    order = s["vocab.order"].astype(np.int64)
    p1 = s["p1"][:size].astype(np.float64)
    key_order = s["vocab.key_order"]
    listed = np.flatnonzero(key_order != np.iinfo(key_order.dtype).max)
    key_lo = s["vocab.key_lo"].astype(np.int64)[listed]
    first = np.where(key_lo >= 0, key_lo, -key_lo - 1)
    spans = s["vocab.key_hi"].astype(np.int64)[listed] - first
    starts = np.concatenate(([0], key_order[listed].astype(np.int64)))
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


def _check_ranked_lists(name: object, model: ModelFile) -> None:
    """Each ranked list holds its context's stored words (below V) exactly once."""
    s = model.sections
    size = int(model.meta["vocab_size"])
    off2 = s["l2.off"].astype(np.int64)
    rank2 = s["rank2.off"].astype(np.int64)
    for v in np.flatnonzero(np.diff(rank2) > 0):
        stored = s["l2.word"][off2[v] : off2[v + 1]]
        listed = s["rank2.ids"][rank2[v] : rank2[v + 1]]
        if not np.array_equal(np.sort(listed), stored[stored < size]):
            raise ModelFileError(f"{name}: corrupt (the ranked list of context word {v} is not its words)")
    off3 = s["l3.off"].astype(np.int64)
    rank3 = s["rank3.off"].astype(np.int64)
    for index, slot in enumerate(s["rank3.slot"].astype(np.int64)):
        stored = s["l3.word"][off3[slot] : off3[slot + 1]]
        listed = s["rank3.ids"][rank3[index] : rank3[index + 1]]
        if not np.array_equal(np.sort(listed), stored[stored < size]):
            raise ModelFileError(f"{name}: corrupt (the ranked list of context slot {slot} is not its words)")
