"""The worked example of docs/savings.md: a two-sentence text whose keystrokes were counted by hand.

The model is maximum likelihood (q = c(u v w) / c(u v), the standard trigram
definition in /work/shared/REFERENCES.md) over a six-line corpus, so every list
the typist sees can be worked out from the counts by hand; ties (probability 0
or equal counts) go to the word that sorts first, as the engine documents.
KSR = 1 - keystrokes / characters (Trnka & McCoy, ACL 2008).
"""

from __future__ import annotations

from pathlib import Path

import pytest

import foretype
from foretype.simulate import TypistSettings, simulate

DATA = Path(__file__).parents[1] / "data" / "savings"
GUIDE = Path(__file__).resolve().parents[2] / "docs" / "savings.md"

# Counted by hand (docs/savings.md "Worked example"): word, keystrokes, prefix when picked, rank, lists shown (k = 2).
HAND_COUNT_FULL = [
    ("The", 1, "", 2, [["See", "The"]]),
    ("ferry", 1, "", 1, [["ferry", "tide"]]),
    ("is", 1, "", 1, [["is", "leaves"]]),
    ("late", 3, "", 1, [["late", "at"]]),  # pick 1, "," replaces the automatic space 1, space 1
    ("Maren", 7, None, None, [["at", "ferry"], []]),  # 5 letters, "." 1, Enter 1
    ("See", 1, "", 1, [["See", "The"]]),
    ("you", 1, "", 1, [["you", "at"]]),
    ("at", 1, "", 1, [["at", "ferry"]]),
    ("the", 1, "", 1, [["the", "at"]]),
    ("slipway", 4, "s", 1, [["ferry", "harbour"], ["slipway", "see"]]),  # "s" 1, pick 1, "!" 1, Enter 1
]


@pytest.fixture(scope="module")
def worked_model() -> foretype.LanguageModel:
    return foretype.build([DATA / "worked-corpus.txt"], method="mle")


@pytest.fixture(scope="module")
def worked_text() -> str:
    return (DATA / "worked-text.txt").read_text(encoding="utf-8")


def test_full_mode_keystrokes_equal_the_hand_count_word_by_word(worked_model: foretype.LanguageModel, worked_text: str) -> None:
    report = simulate(worked_model, worked_text, TypistSettings(k=2))
    got = [(t.word, t.keystrokes, t.picked_at, t.rank, t.shown) for t in report.trace]
    assert got == HAND_COUNT_FULL
    assert report.characters == 26 + 24  # "The ferry is late, Maren." + Enter, "See you at the slipway!" + Enter
    assert report.keystrokes == 21
    assert report.ksr == pytest.approx(1 - 21 / 50)


def test_full_mode_oracle_baseline_and_time_equal_the_hand_count(worked_model: foretype.LanguageModel, worked_text: str) -> None:
    report = simulate(worked_model, worked_text, TypistSettings(k=2))
    # Oracle: every vocabulary word picked at once; only "Maren" typed (Trnka & McCoy 2008's vocabulary-limited bound).
    assert report.oracle_keystrokes == 20
    assert report.oracle_ksr == pytest.approx(1 - 20 / 50)
    # Baseline: frequency list the 6, at 4, ferry/see/you 3, is 2, the rest 1 (counted by hand).
    assert report.baseline_keystrokes == 26
    assert report.baseline_ksr == pytest.approx(1 - 26 / 50)
    assert report.oov_rate == pytest.approx(1 / 10)
    assert report.hit_before_first_letter == pytest.approx(8 / 10)
    assert report.hit_at_1 == pytest.approx(8 / 10)
    # Keystroke-level time (Koester & Levine style, from memory): 21 keys x 1 s + 11 changed lists x 0.5 s.
    rate = report.entry_rate
    assert rate["list_reads"] == 11
    assert rate["seconds_with_prediction"] == pytest.approx(21 + 11 * 0.5)
    assert rate["seconds_without_prediction"] == pytest.approx(50)
    assert rate["speedup"] == pytest.approx(50 / 26.5)
    assert report.queries == 12


def test_words_mode_keystrokes_equal_the_hand_count(worked_model: foretype.LanguageModel, worked_text: str) -> None:
    report = simulate(worked_model, worked_text, TypistSettings(k=2, text_mode="words"))
    # "the ferry is late maren see you at the slipway ": sum of (length + 1) = 47 characters.
    assert report.characters == 47
    assert [t.keystrokes for t in report.trace] == [1, 1, 1, 1, 6, 1, 1, 1, 1, 2]
    assert report.keystrokes == 16
    assert report.ksr == pytest.approx(1 - 16 / 47)


def test_without_automatic_space_every_space_is_typed(worked_model: foretype.LanguageModel, worked_text: str) -> None:
    report = simulate(worked_model, worked_text, TypistSettings(k=2, autospace=False))
    # Hand count: each of the 8 words picked before a space now also pays 1 for that space.
    assert [t.keystrokes for t in report.trace] == [2, 2, 2, 3, 7, 2, 2, 2, 2, 4]
    assert report.keystrokes == 28


def test_the_guide_shows_the_same_worked_example() -> None:
    section = GUIDE.read_text(encoding="utf-8")
    for line in (DATA / "worked-corpus.txt").read_text(encoding="utf-8").splitlines():
        assert line in section
    for line in (DATA / "worked-text.txt").read_text(encoding="utf-8").splitlines():
        assert line in section
    assert "21 keystrokes" in section and "58.0%" in section
