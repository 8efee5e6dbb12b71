"""The pad's session rules without a terminal: offers, acceptances and the tally.

Probabilities: maximum likelihood on the fixture corpus (conftest.py, hand counts);
savings: KSR = 1 - keystrokes / characters (Trnka & McCoy 2008, REFERENCES.md).
"""

from __future__ import annotations

import subprocess
import sys
from fractions import Fraction

import pytest

from foretype.tui.session import PadSession, Tally, plan_acceptance, written_form


def test_the_written_form_keeps_the_display_form_and_the_capitals_the_person_typed() -> None:
    assert written_form("ferry", "fe") == "ferry"
    assert written_form("ferry", "Fe") == "Ferry"
    assert written_form("Tolly", "to") == "Tolly"  # a name keeps its capital
    assert written_form("The", "th") == "The"  # sentence start, offered capitalised


def test_a_word_accepted_after_a_comma_gets_a_space_in_front(tiny_model) -> None:
    session = PadSession(tiny_model)
    offer = session.offer_for("the ferry,")
    acceptance = plan_acceptance(offer, 0)
    assert (acceptance.typed, acceptance.insert) == ("", " leaves ")


def test_an_offer_is_queried_once_per_text_and_a_new_text_resets_the_highlight(tiny_model) -> None:
    readings = []

    def clock() -> int:
        readings.append(None)
        return 1000 * len(readings)

    session = PadSession(tiny_model, clock=clock)
    first = session.offer_for("the ")
    session.move_highlight(1)
    assert session.offer_for("the ") is first and session.highlight == 1
    assert len(readings) == 2  # one query: two clock readings
    session.offer_for("the f")
    assert session.highlight == 0 and len(readings) == 4
    assert session.last_latency_ns == 1000


def test_offers_match_the_hand_counted_probabilities(tiny_model) -> None:
    session = PadSession(tiny_model, k=2)
    offer = session.offer_for("the ferry leaves ")
    # c(ferry leaves at) = c(ferry leaves early) = 1 of 2; a tie is listed by word.
    assert [(s.word, Fraction(s.prob).limit_denominator(10)) for s in offer.suggestions] == [("at", Fraction(1, 2)), ("early", Fraction(1, 2))]


@pytest.mark.parametrize(("characters", "keystrokes", "expected"), [(10, 6, 0.4), (4, 3, 0.25), (5, 7, -0.4), (0, 2, None)])
def test_savings_is_one_minus_keystrokes_over_characters(characters: int, keystrokes: int, expected: float | None) -> None:
    savings = Tally(characters, keystrokes, 0, None).savings
    assert savings == (None if expected is None else pytest.approx(expected))


def test_the_engine_and_the_session_rules_load_without_textual() -> None:
    # The engine never imports the interface (RULES.md); the pad's session rules need no terminal either.
    code = "import sys, foretype, foretype.simulate, foretype.tui.session; print('textual' in sys.modules)"
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert result.stdout.strip() == "False"
