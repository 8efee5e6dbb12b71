"""The user model's counts and probabilities, against nltk, a worked example and the decay law."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from nltk.lm import WittenBellInterpolated

from foretype.adapt import AdaptSettings, UserModel
from foretype.errors import OptionError
from foretype.query.vocabulary import END, START

# The three-sentence corpus of Jurafsky & Martin, Speech and Language Processing, 3rd ed., ch. 3 (from memory).
SENTENCES = [["I", "am", "Sam"], ["Sam", "I", "am"], ["I", "do", "not", "like", "green", "eggs", "and", "ham"]]

words = st.sampled_from(["tide", "ferry", "Gorbalt", "nets", "harbour", "the", "a", "Wrenna", "gulls", "rope"])
texts = st.lists(st.lists(words, min_size=1, max_size=7), min_size=1, max_size=12)


def learned(sentences, **options) -> UserModel:
    model = UserModel(settings=AdaptSettings(**options))
    for sentence in sentences:
        model.learn(sentence, end=True)
    return model


def ours(model: UserModel, word: str, context: tuple[str, str]) -> float:
    u, v = (model.id_of(w) if w != START else model.start_id for w in context)
    target = model.end_id if word == END else model.id_of(word)
    return float(model.probabilities(np.array([target]), model.context(u, v))[0])


def nltk_reference(sentences) -> WittenBellInterpolated:
    """nltk's interpolated Witten-Bell trigram fed exactly our n-grams (START START w1 .. wn END)."""
    text = []
    for sentence in sentences:
        padded = [START, START, *sentence, END]
        grams = []
        for i in range(2, len(padded)):
            grams += [(padded[i],), (padded[i - 1], padded[i]), (padded[i - 2], padded[i - 1], padded[i])]
        text.append(grams)
    reference = WittenBellInterpolated(3)
    reference.fit(text, vocabulary_text=[w for s in sentences for w in s] + [START, END])
    return reference


def test_the_worked_example_matches_witten_bell_by_hand():
    # Witten & Bell 1991 as restated by Chen & Goodman 1998 (TR-10-98), computed by hand:
    # P(am) = 2/17; after "I": c = 3, T = 2, g = 2/5, P = 3/5 * 2/3 + 2/5 * 2/17;
    # after "<s> I": c = 2, T = 2, g = 1/2, P = 1/2 * 1/2 + 1/2 * P(am | I).
    model = learned(SENTENCES)
    p_bigram = 3 / 5 * 2 / 3 + 2 / 5 * 2 / 17
    assert ours(model, "am", (START, "I")) == pytest.approx(1 / 2 * 1 / 2 + 1 / 2 * p_bigram, rel=1e-12)
    assert ours(model, "am", (START, "I")) == pytest.approx(0.47352941176470587, rel=1e-12)


@settings(max_examples=40, deadline=None)
@given(texts)
def test_every_probability_equals_nltks_interpolated_witten_bell(sentences):
    # External reference: nltk.lm.WittenBellInterpolated (PyPI nltk), unmasked scores.
    model = learned(sentences)
    reference = nltk_reference(sentences)
    vocabulary = sorted({w for s in sentences for w in s}) + [END]
    contexts = {(START, START)} | {tuple(([START, START] + s)[i : i + 2]) for s in sentences for i in range(len(s) + 1)}
    for context in contexts:
        for word in vocabulary:
            assert ours(model, word, context) == pytest.approx(reference.unmasked_score(word, context), rel=1e-12, abs=1e-15)


@settings(max_examples=30, deadline=None)
@given(texts)
def test_each_context_distribution_sums_to_one(sentences):
    model = learned(sentences)
    outcomes = np.array([model.id_of(w) for w in {w for s in sentences for w in s}] + [model.end_id])
    for s in sentences:
        for i in range(len(s)):
            u = model.start_id if i < 2 else model.id_of(s[i - 2])
            v = model.start_id if i < 1 else model.id_of(s[i - 1])
            assert model.probabilities(outcomes, model.context(u, v)).sum() == pytest.approx(1.0, abs=1e-12)


def test_a_count_halves_after_one_half_life_of_further_tokens():
    # Exponential decay (the smooth variant of Kuhn & De Mori's 1990 cache window):
    # with half-life H, a count seen H tokens ago weighs 1/2.
    model = UserModel(settings=AdaptSettings(half_life=10.0))
    model.learn(["ferry"])
    model.learn(["tide"] * 10)
    rows = {form: count for _, form, count, _, _ in model.word_rows()}
    assert rows["ferry"] == pytest.approx(0.5, rel=1e-12)
    assert rows["tide"] == pytest.approx(sum(0.5 ** (j / 10) for j in range(10)), rel=1e-12)


def test_decay_survives_rescaling_of_the_stored_counts():
    # The stored counts are inflated by 2^(t/H) and divided back when that factor passes 2^200.
    model = UserModel(settings=AdaptSettings(half_life=1.0))
    model.learn(["ferry"] * 250)
    rows = {form: count for _, form, count, _, _ in model.word_rows()}
    assert rows["ferry"] == pytest.approx(sum(0.5**j for j in range(250)), rel=1e-12)  # geometric series: 2 - 2^-249
    assert model.tokens == pytest.approx(2.0, rel=1e-12)


def test_a_new_word_is_suggestable_only_after_min_uses():
    model = UserModel(settings=AdaptSettings(min_uses=2))
    model.learn(["Gorbalt"])
    word_id = model.id_of("gorbalt")
    assert word_id is not None and model.is_learned(word_id)
    assert model.ready_learned("gor") == []
    model.learn(["Gorbalt"])
    assert model.ready_learned("gor") == [word_id]
    assert model.display(word_id) == "Gorbalt"


def test_a_written_form_seen_mid_sentence_wins_over_a_sentence_start_capital():
    model = UserModel()
    model.learn(["Wrenna", "said"], end=True)
    model.learn(["ask", "wrenna"], end=True)
    assert model.display(model.id_of("wrenna")) == "wrenna"


def test_forget_removes_every_count_of_a_word():
    model = learned(SENTENCES)
    assert model.forget("Sam")
    sam = model.id_of("Sam")
    assert model.uses(sam) == 0
    assert all(sam not in ids for ids, _, _, _ in model.ngram_rows(2))
    assert all(sam not in ids for ids, _, _, _ in model.ngram_rows(3))
    assert not model.holds("Sam")


def test_prune_drops_counts_below_a_threshold_at_every_order():
    model = learned(SENTENCES)
    dropped = model.prune(below=2)
    # Counts of 2 or more in the corpus (counted by hand): I (3), am (2), Sam (2), END (3);
    # bigrams "I am" (2) and "<s> I" (2); trigram "<s> <s> I" (2).  Everything else occurs once.
    assert {form for _, form, _, _, _ in model.word_rows()} == {"i", "am", "sam"}
    assert {tuple(model.form(i) for i in ids) for ids, _, _, _ in model.ngram_rows(2)} == {("i", "am"), ("<s>", "i")}
    assert {tuple(model.form(i) for i in ids) for ids, _, _, _ in model.ngram_rows(3)} == {("<s>", "<s>", "i")}
    assert dropped > 0


@settings(max_examples=25, deadline=None)
@given(texts, st.sampled_from([None, 3.0]))
def test_a_snapshot_restores_the_same_probabilities(sentences, half_life):
    model = learned(sentences, half_life=half_life)
    copy = UserModel(settings=model.settings)
    copy.restore(model.snapshot())
    ids = np.array([model.id_of(w) for w in {w for s in sentences for w in s}] + [model.end_id])
    copy_ids = np.array([copy.id_of(model.form(int(i))) if i != model.end_id else copy.end_id for i in ids])
    for context in [(model.start_id, model.start_id), (model.start_id, int(ids[0]))]:
        mapped = tuple(copy.id_of(model.form(c)) if c != model.start_id else copy.start_id for c in context)
        assert copy.probabilities(copy_ids, copy.context(*mapped)) == pytest.approx(model.probabilities(ids, model.context(*context)), rel=1e-12)
    assert copy.raw_tokens == model.raw_tokens


def test_learning_rejects_anything_that_is_not_one_word():
    model = UserModel()
    with pytest.raises(OptionError, match="not a single word"):
        model.learn(["two words"])
    with pytest.raises(OptionError, match="not a single word"):
        model.learn(["!"])

