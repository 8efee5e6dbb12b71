"""Words passed over: left out within the same word, in the simulator and the pad alike; suggest stays exact."""

from __future__ import annotations

import pytest

from foretype.demo import demo_heldout, demo_model
from foretype.query.passed_over import suggest_without
from foretype.simulate import TypistSettings, read_passage, simulate
from foretype.simulate.editing import latest_useful_pick
from foretype.text import model_form
from foretype.tui.session import PadSession


@pytest.fixture(scope="module")
def base():
    return demo_model()


@pytest.fixture(scope="module")
def text():
    return "\n".join(demo_heldout().read_text(encoding="utf-8").splitlines()[:12]) + "\n"


def test_leaving_words_out_equals_the_brute_force_ranking_without_them(base):
    # Brute force: the full ranking of every word matching the prefix, then the passed-over ones removed.
    u, v = base.context_ids(["the"])
    everything = base.suggest_ids(u, v, "s", 10_000)
    passed = {model_form(s.word) for s in everything[:3]} | {"zzz"}
    expected = [s.word for s in everything if model_form(s.word) not in passed][:5]
    assert [s.word for s in suggest_without(base, u, v, "s", 5, passed)] == expected
    assert suggest_without(base, u, v, "s", 5, set()) == base.suggest_ids(u, v, "s", 5)


def pad_picks(base, passage, skip_passed: bool) -> list[tuple[str | None, int | None]]:
    """Type each word in the pad the way the simulated typist does; the pick (prefix, rank) per word."""
    session = PadSession(base, k=5, skip_passed=skip_passed)
    picks = []
    for word in passage.words:
        before = " ".join(word.context) + " " if word.context else ""
        session.forget_offer()  # a new word: the previous word's offers do not carry over
        pick: tuple[str | None, int | None] = (None, None)
        # The typist stops looking once a pick can no longer save a keystroke.
        for step in range(latest_useful_pick(len(word.target), word.gap, select_cost=1.0, autospace=True) + 1):
            offer = session.offer_for(before + word.target[:step])
            forms = [model_form(s.word) for s in offer.suggestions]
            if word.target in forms:
                pick = (word.target[:step], forms.index(word.target) + 1)
                break
        picks.append(pick)
    return picks


@pytest.mark.parametrize("skip_passed", [False, True])
def test_the_pad_offers_what_the_simulator_offers(base, text, skip_passed):
    settings = TypistSettings(text_mode="words", skip_passed=skip_passed)
    report = simulate(base, text, settings)
    passage = read_passage(text, "words")
    simulated = [(t.picked_at, t.rank) for t in report.trace]
    # Words of letters only: the pad reads "9:2" before a cursor as more than one token.
    plain = [i for i, w in enumerate(passage.words) if w.target.replace("'", "").isalpha()]
    assert len(plain) > 100
    pad = pad_picks(base, passage, skip_passed)
    assert [pad[i] for i in plain] == [simulated[i] for i in plain]
    assert sum(pad[i][0] is not None for i in plain) > 50


def test_no_word_is_offered_twice_within_a_word_when_passed_over_words_are_left_out(base, text):
    report = simulate(base, text, TypistSettings(text_mode="words", skip_passed=True))
    shown_twice = 0
    for trace in report.trace:
        seen: set[str] = set()
        for forms in trace.shown:
            shown_twice += len(seen & {model_form(f) for f in forms})
            seen |= {model_form(f) for f in forms}
    assert shown_twice == 0
    plain = simulate(base, text, TypistSettings(text_mode="words", skip_passed=False))
    again = sum(len(set(a) & set(b)) for t in plain.trace for a, b in zip(t.shown, t.shown[1:]))
    assert again > 0  # without the option the exact top k does repeat words


def test_the_simulated_typist_leaves_passed_over_words_out_by_default():
    assert TypistSettings().skip_passed


def test_the_pad_and_the_simulator_have_the_same_default(base):
    # Their tallies agree only when both leave out (or both keep) the words passed over.
    from foretype.tui.app import PadApp

    assert PadSession(base).skip_passed == TypistSettings().skip_passed is True
    assert PadApp(base).session.skip_passed is True
