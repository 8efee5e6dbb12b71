"""The model file round trip, and what info reports about a model.

Basic round trip only (corruption and fuzzing are covered elsewhere): a saved
and loaded model answers every query exactly as the built one did.  The size
facts are checked against the common-practice statement that a trigram model
over N words has about N^3 parameters (20,000 words: 8 x 10^12).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from public_text import kjv_split, write_lines

import foretype

PROBES = [(), ("the",), ("of", "the"), ("and", "god"), ("said", "unto"), ("zzz",), ("zzz", "the"), (foretype.UNKNOWN, foretype.UNKNOWN)]


@pytest.fixture(scope="module")
def corpus(tmp_path_factory) -> Path:
    train, _ = kjv_split()
    return write_lines(train[:2000], tmp_path_factory.mktemp("kjv") / "train.txt")


@pytest.mark.parametrize("method,encoding", [("kneser-ney", None), ("linear", None), ("katz", None), ("additive", None), ("mle", None), ("kneser-ney", "float32")])
def test_a_saved_and_loaded_model_answers_exactly_as_the_built_one(corpus, tmp_path, method, encoding):
    built = foretype.build([corpus], method=method, encoding=encoding, vocab_size=1500)
    path = tmp_path / "kjv.model"
    size = built.save(path)
    assert size == path.stat().st_size
    loaded = foretype.load(path)
    assert loaded.vocabulary == built.vocabulary
    assert loaded.method == method
    for context in PROBES:
        assert np.array_equal(loaded.distribution(context), built.distribution(context))
        for prefix in ("", "l", "th"):
            assert loaded.suggest(context, prefix, 7) == built.suggest(context, prefix, 7)
    assert [built.vocab.display(i) for i in range(50)] == [loaded.vocab.display(i) for i in range(50)]
    same = {k: v for k, v in built.info().items() if k not in ("file_bytes", "bytes_per_ngram")}
    assert {k: v for k, v in loaded.info().items() if k not in ("file_bytes", "bytes_per_ngram")} == same
    assert loaded.info()["file_bytes"] == size


def test_a_loaded_models_arrays_are_read_only_views_of_the_file(corpus, tmp_path):
    # docs/models.md, "Model files": memory-mapped on load, nothing executed.
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=500).save(path)
    loaded = foretype.load(path)
    assert all(not array.flags.writeable for array in loaded.sections.values())
    assert foretype.verify(path).file_bytes == path.stat().st_size


def test_saving_over_an_existing_model_replaces_it_whole(corpus, tmp_path):
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=100).save(path)
    foretype.build([corpus], vocab_size=300).save(path)
    assert foretype.load(path).vocab_size == 300
    assert [p.name for p in tmp_path.iterdir()] == ["kjv.model"]  # no temporary file left behind


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(
    sentences=st.lists(st.lists(st.sampled_from(["a", "ab", "b", "ba", "Bab", "c", "d'a", "é"]), min_size=1, max_size=6), min_size=1, max_size=25),
    method=st.sampled_from(["kneser-ney", "linear", "katz", "additive", "mle"]),
)
def test_round_trip_keeps_every_distribution_identical(tmp_path, sentences, method):
    source = tmp_path / "corpus.txt"
    source.write_text("\n".join(" ".join(s) for s in sentences) + "\n", encoding="utf-8")
    built = foretype.build([source], method=method)
    path = tmp_path / "round.model"
    built.save(path)
    loaded = foretype.load(path)
    for context in [(), ("a",), ("a", "b"), ("zzz", "a"), ("ba", "bab")]:
        assert np.array_equal(loaded.distribution(context), built.distribution(context))


def test_info_reports_the_n_cubed_possible_trigrams_and_how_few_are_stored(corpus, tmp_path):
    # Fact of the trade (common practice): a trigram model over N words has about N^3 parameters,
    # 20,000 words giving 8 x 10^12.  info reports (V + 2)^3 over the V words, UNKNOWN and END.
    model = foretype.build([corpus])
    info = model.info()
    size = info["vocab_size"]
    assert info["possible_trigrams"] == (size + 2) ** 3
    assert info["possible_trigrams"] == pytest.approx(size**3, rel=0.01)
    stored = info["ngrams"]["3"]
    # Each counted trigram token adds at most one stored trigram: tokens + one END per sentence.
    assert stored <= info["corpus_tokens"] + model.meta["corpus_sentences"]
    assert stored / info["possible_trigrams"] < 1e-4
    assert info["ngrams"]["1"] == size + 2
    assert info["bytes_per_ngram"] == pytest.approx(info["file_bytes"] / sum(info["ngrams"].values()))


def test_info_json_has_the_documented_keys(corpus, tmp_path, run_cli):
    # docs/models.md, "JSON shapes": info.
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=800).save(path)
    result = run_cli("info", "-m", path, "--json")
    assert result.code == 0 and result.err == ""
    info = json.loads(result.out)
    for key in ("format_version", "method", "vocab_size", "ngrams", "file_bytes", "bytes_per_ngram", "corpus_tokens"):
        assert key in info
    assert info["format_version"] == foretype.FORMAT_VERSION
    assert info["vocab_size"] == 800
    assert set(info["ngrams"]) == {"1", "2", "3"}
    assert info["file_bytes"] == path.stat().st_size
    assert info["possible_trigrams"] == 802**3


def test_every_section_a_model_file_holds_is_a_declared_field_of_its_arrays(corpus, tmp_path):
    # The typed arrays are the one list of sections: each section written is a field whose declared
    # dtypes allow what the build produced, and the arrays read back are read-only views of those bytes.
    from foretype.modelfile.format import read_model_file
    from foretype.modelfile.model_arrays import SPECS

    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=500).save(path)
    raw = read_model_file(path).sections
    declared = {spec.section: spec for spec in SPECS}
    assert set(raw) <= set(declared)
    for name, array in raw.items():
        assert array.dtype.name in declared[name].dtypes
    loaded = foretype.load(path)
    for name, array in raw.items():
        field = getattr(loaded.arrays, declared[name].field)
        assert np.array_equal(field, array) and field.dtype == array.dtype and not field.flags.writeable
    assert loaded.sections.keys() == raw.keys()


@settings(max_examples=60, deadline=None)
@given(st.lists(st.integers(0, 70_000), min_size=0, max_size=400), st.sampled_from([255, 40, 0]))
def test_offsets_stored_in_blocks_give_back_every_offset(steps, limit):
    # Exactness against the plain array itself: every entry, one at a time and all at once,
    # including blocks stored in full (a low limit makes many of them).
    from foretype.modelfile.blocked import BlockedOffsets, from_blocks, to_blocks

    offsets = np.concatenate(([0], np.cumsum(steps))).astype(np.uint32)
    base, delta, wide = to_blocks(offsets, limit=limit)
    assert np.array_equal(from_blocks(base, delta, wide), offsets.astype(np.int64))
    reader = BlockedOffsets(base, delta, wide)
    assert [reader.item(i) for i in range(len(offsets))] == offsets.tolist()
    assert delta.dtype == np.uint8 and base.dtype == np.uint32 and len(base) == (len(offsets) + 31) // 32


def test_a_version_2_file_still_loads_and_answers_the_same(corpus, tmp_path):
    # Format versions 1 and 2 store level 3's offsets whole, three integers per prefix key and every
    # display form; version 3 offsets in blocks, a first id and a span per key, differing display forms.
    import struct

    from foretype.modelfile.format import write_model_file
    from foretype.query.verify import verify_model

    built = foretype.build([corpus], vocab_size=800)
    path = tmp_path / "new.model"
    built.save(path)
    new = foretype.load(path)
    assert new.arrays.l3_off is None and new.arrays.l3_off_delta is not None
    old_path = tmp_path / "old.model"
    write_model_file(old_path, built.meta, _format_2_sections(built))
    data = bytearray(old_path.read_bytes())
    struct.pack_into("<I", data, 8, 2)  # the preamble's version (outside the header's checksum)
    old_path.write_bytes(bytes(data))
    old = foretype.load(old_path)
    assert old.arrays.l3_off is not None
    for context in PROBES:
        assert np.array_equal(old.distribution(context), new.distribution(context))
        assert np.array_equal(old.distribution(context), built.distribution(context))
        for prefix in ("", "th"):
            assert old.suggest(context, prefix, 6) == new.suggest(context, prefix, 6) == built.suggest(context, prefix, 6)
    assert new.file_bytes < old.file_bytes
    assert [old.vocab.display(i) for i in range(old.vocab_size)] == [new.vocab.display(i) for i in range(new.vocab_size)]
    for path_checked in (path, old_path):
        verify_model(path_checked)  # the thorough checks (`foretype check`) accept both layouts


def _format_2_sections(model):
    """The sections a format-2 engine wrote: plain level-3 offsets, three integers per prefix key, every display form."""
    import marisa_trie

    from foretype.arrays import pack_strings

    arrays = model.arrays
    index = arrays.prefix_index()
    trie = marisa_trie.Trie()
    trie.map(arrays.vocab_trie.data)
    words = model.vocabulary
    is_word = np.zeros(len(index.first), dtype=bool)
    for key, key_id in trie.items():
        is_word[key_id] = words[index.first[key_id]] == key
    sections = {name: a for name, a in arrays.sections().items() if name not in ("vocab.key_first", "vocab.key_span", "vocab.listed_span", "vocab.listed_order", "vocab.display_ids")}
    sections["vocab.key_lo"] = np.where(is_word, index.first, -index.first - 1).astype(np.int32)
    sections["vocab.key_hi"] = index.hi.astype(np.int32)
    sections["vocab.key_order"] = np.where(index.listed, index.order_start, 2**32 - 1).astype(np.uint32)
    sections["vocab.display_blob"], sections["vocab.display_off"] = pack_strings([model.vocab.display(i) for i in range(model.vocab_size)])
    return sections


def test_blocked_offsets_that_point_outside_their_arrays_are_refused(corpus, tmp_path):
    import dataclasses

    from foretype.errors import ModelFileError
    from foretype.modelfile.blocked import WIDE, to_blocks
    from foretype.modelfile.format import write_model_file

    built = foretype.build([corpus], vocab_size=800)
    base, delta, wide = to_blocks(built.arrays.l3_off)
    cases = {
        "points past": (np.where(np.arange(len(base)) == len(base) - 1, WIDE + len(wide), base).astype(np.uint32), delta),
        "decreases": (base, np.where(np.arange(len(delta)) == 5, 255, delta).astype(np.uint8)),
    }
    for phrase, (bad_base, bad_delta) in cases.items():
        arrays = dataclasses.replace(built.arrays, l3_off=None, l3_off_base=bad_base, l3_off_delta=bad_delta, l3_off_wide=wide)
        path = tmp_path / "bad.model"
        write_model_file(path, built.meta, arrays.sections())
        with pytest.raises(ModelFileError, match=phrase):
            foretype.load(path)


def test_the_compact_prefix_index_and_sparse_display_forms_answer_as_a_scan_of_the_words(corpus, tmp_path):
    # Reference: brute force over the sorted word list (ranges of ids sharing a prefix, unigram order
    # with ties by id) and the corpus's own display forms (KJV capitalises names: "God", "Moses").
    path = tmp_path / "kjv.model"
    built = foretype.build([corpus], vocab_size=1200)
    built.save(path)
    model = foretype.load(path)
    assert model.arrays.vocab_key_first is not None and model.arrays.vocab_key_lo is None
    words = model.vocabulary
    assert words == sorted(words)
    shown = [model.vocab.display(i) for i in range(len(words))]
    assert "God" in shown and all(s.casefold() == w.casefold() for s, w in zip(shown, words))
    assert model.arrays.vocab_display_ids is not None and 0 < len(model.arrays.vocab_display_ids) < len(words)
    p1 = np.asarray(model.arrays.p1[: len(words)], dtype=np.float64)
    prefixes = sorted({w[:n] for w in words for n in range(1, len(w) + 1)})
    for prefix in prefixes + ["qqz", "zzzz"]:
        inside = [i for i, w in enumerate(words) if w.startswith(prefix)]
        found = model.vocab.prefix_range(prefix)
        if not inside:
            assert found is None
            continue
        assert (found.lo, found.hi) == (inside[0], inside[-1] + 1), prefix
        expected = sorted(inside, key=lambda i: (-p1[i], i))
        assert model.vocab.ranked_range(found).tolist() == expected, prefix
        assert model.vocab.id(prefix) == (words.index(prefix) if prefix in words else None)
