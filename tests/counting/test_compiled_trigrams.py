"""The compiled steps of trigram counting give exactly what the numpy path and a direct count give.

References: a brute-force count in plain Python (collections.Counter over
sentences padded ``<s> <s> w1 .. wn </s>``, the standard trigram definition in
REFERENCES), the numpy path of the same steps (``FORETYPE_PURE=1``), and, for
whole builds, the model file written without any compiled step (byte for byte).
"""

from __future__ import annotations

import hashlib
from collections import Counter

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_counting import assert_same_counts

import foretype
from foretype import counting
from foretype.counting import compiled, spill
from foretype.counting.counter import HELDOUT_EVERY, CorpusCounter
from foretype.counting.memory import MemoryBudget
from foretype.counting.tables import RAW_END, RAW_START, unpack_trigrams

pytestmark = pytest.mark.skipif(compiled.count_sentences is None, reason="the compiled trigram steps are not built")

# A token: a sentence end (form 0 is the line break) or a word (forms 1..8 of types 2..6; -1: no form id).
TOKENS = st.one_of(st.just((0, RAW_END)), st.tuples(st.integers(-1, 8), st.integers(2, 6)))


def brute_force(tokens: list[tuple[int, int]], first_sentence: int) -> dict[str, object]:
    """Count sentences token by token: empty sentences dropped, padded trigrams, form counts by position."""
    table: Counter = Counter()
    held: Counter = Counter()
    initial: Counter = Counter()
    other: Counter = Counter()
    types: Counter = Counter()
    sentence: list[int] = []
    number = first_sentence
    words = 0
    for form, kind in tokens:
        if kind != RAW_END:
            if form >= 0:
                (other if sentence else initial)[form] += 1
            sentence.append(kind)
            words += 1
            continue
        if not sentence:
            continue
        padded = [RAW_START, RAW_START, *sentence, RAW_END]
        grams = Counter(zip(padded, padded[1:], padded[2:]))
        table.update(grams)
        if number % HELDOUT_EVERY == HELDOUT_EVERY - 1:
            held.update(grams)
        types.update(padded[2:])
        number += 1
        sentence = []
    return {"table": table, "held": held, "initial": initial, "other": other, "types": types, "words": words, "sentences": number - first_sentence}


def counted(counter: CorpusCounter, tokens: list[tuple[int, int]]) -> dict[str, object]:
    """Feed the tokens to a counter's sentence step and read back what it counted."""
    before = counter.sentences
    fids = np.array([f for f, _ in tokens], dtype=np.int32)
    tids = np.array([t for _, t in tokens], dtype=np.int32)
    counter._count_sentences(fids, tids)

    def table(keys_counter) -> Counter:
        keys, counts = keys_counter.finish()
        return Counter({tuple(map(int, row)): int(n) for *row, n in zip(*unpack_trigrams(keys), counts)})

    return {
        "table": table(counter._table),
        "held": table(counter._heldout),
        "initial": Counter({i: int(n) for i, n in enumerate(counter._initial) if n}),
        "other": Counter({i: int(n) for i, n in enumerate(counter._noninitial) if n}),
        "types": Counter({i: int(n) for i, n in enumerate(counter._type_counts) if n}),
        "words": counter.corpus_tokens,
        "sentences": counter.sentences - before,
    }


@settings(max_examples=150, deadline=None)
@given(st.lists(TOKENS, max_size=80), st.integers(0, 45))
def test_sentence_keys_equal_a_direct_count_and_the_numpy_path(body, first_sentence) -> None:
    tokens = [*body, (0, RAW_END)]  # the step takes complete sentences
    expected = brute_force(tokens, first_sentence)
    results = {}
    for pure in (False, True):
        with pytest.MonkeyPatch.context() as patch:
            patch.setenv(compiled.PURE_ENV, "1" if pure else "0")
            counter = CorpusCounter()
            counter.sentences = first_sentence
            results[pure] = counted(counter, tokens)
    assert results[False] == expected
    assert results[True] == expected


TABLES = st.dictionaries(st.integers(0, 2**62), st.integers(1, 2**40), max_size=40)


@settings(max_examples=200, deadline=None)
@given(TABLES, TABLES)
def test_merging_sorted_tables_sums_the_counts_of_shared_keys(a, b) -> None:
    # Reference: collections.Counter addition.
    def arrays(table):
        keys = np.array(sorted(table), dtype=np.int64)
        return keys, np.array([table[k] for k in keys.tolist()], dtype=np.int64)

    keys, counts = compiled.merge_counts(*arrays(a), *arrays(b))
    expected = Counter(a) + Counter(b)
    assert keys.tolist() == sorted(expected)
    assert counts.tolist() == [expected[k] for k in sorted(expected)]
    assert keys.dtype == counts.dtype == np.int64


@settings(max_examples=30, deadline=None)
@given(st.lists(TABLES, min_size=1, max_size=7))
def test_a_key_counter_gives_the_same_table_on_both_paths(batches) -> None:
    found = {}
    for pure in (False, True):
        with pytest.MonkeyPatch.context() as patch:
            patch.setenv(compiled.PURE_ENV, "1" if pure else "0")
            keys_counter = spill.KeyCounter(10**6, merge_rows=50)
            for batch in batches:
                keys = np.array(sorted(batch), dtype=np.int64)
                keys_counter.add(keys, np.array([batch[k] for k in keys.tolist()], dtype=np.int64))
            found[pure] = tuple(a.tolist() for a in keys_counter.finish())
    total = sum(map(Counter, batches), Counter())
    assert found[False] == found[True] == (sorted(total), [total[k] for k in sorted(total)])


def model_digest(corpus, folder, name: str, **options) -> str:
    path = folder / f"{name}.model"
    foretype.build_from_counts(counting.count_corpus([corpus], **options), vocab_size=300).save(path)
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.mark.parametrize("spilled", [False, True])
def test_models_built_with_and_without_the_compiled_steps_are_the_same_bytes(tmp_path, monkeypatch, spilled) -> None:
    lines = [f"Ferry {i % 89} sails at 7:{i % 60:02d}, don’t wait! Tide{i % 1301} and Quay-{i % 7}… 東京。ok" for i in range(3000)]
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("\n".join(lines) + "\n", encoding="utf-8")
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BYTES", 0)  # tokenising workers
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BUDGET", 0)
    monkeypatch.setattr(MemoryBudget, "chunk_bytes", property(lambda self: 1 << 14))
    options = {}
    if spilled:  # a table limit of a few hundred rows: counts go to disk as runs and are merged back
        monkeypatch.setattr(MemoryBudget, "table_rows", property(lambda self: 800))
        options["spill_dir"] = tmp_path
    with_compiled = model_digest(corpus, tmp_path, "compiled", **options)
    compiled_counts = counting.count_corpus([corpus], **options)
    assert compiled_counts.spilled_rows > 0 if spilled else compiled_counts.spilled_rows == 0
    monkeypatch.setenv(compiled.PURE_ENV, "1")
    assert not compiled.compiled_trigrams()
    assert model_digest(corpus, tmp_path, "pure", **options) == with_compiled
    if not spilled:
        assert_same_counts(compiled_counts, counting.count_corpus([corpus]))
