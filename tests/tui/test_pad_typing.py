"""Typing in the pad, driven through Textual's Pilot on the tiny maximum-likelihood model.

Expected probabilities come from the hand counts in conftest.py (maximum
likelihood, REFERENCES.md "Trigram model (standard definition)"); the tally
follows KSR = 1 - keystrokes / characters (Trnka & McCoy 2008, REFERENCES.md
"Keystroke savings").
"""

from __future__ import annotations

import re
from fractions import Fraction

import pytest
from pilot_steps import paste, screen_lines
from textual import events

from foretype.tui.keys import CHORDS_FROM_ESCAPE_DIGITS
from foretype.tui.screens.pad import PadScreen
from foretype.tui.widgets.compose_area import ComposeArea


def pad_of(app) -> PadScreen:  # noqa: ANN001 - a PadApp
    screen = app.screen
    assert isinstance(screen, PadScreen)
    return screen


def listed(app) -> list[tuple[str, Fraction, int]]:  # noqa: ANN001
    """The suggestion list on screen: (word, probability as a fraction, order)."""
    offer = app.session.offer
    return [(s.word, Fraction(s.prob).limit_denominator(100), s.order) for s in offer.suggestions]


async def test_a_new_sentence_offers_capitalised_words_ranked_by_their_start_probability(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)):
        # P(the | <s> <s>) = 4/5, P(tide | <s> <s>) = 1/5; every other word 0 (maximum likelihood).
        assert listed(app)[:2] == [("The", Fraction(4, 5), 3), ("Tide", Fraction(1, 5), 3)]
        assert [p for _, p, _ in listed(app)[2:]] == [0, 0, 0]
        assert app.session.offer.sentence_start


async def test_tab_after_two_letters_writes_the_capitalised_word_and_a_space_for_three_keystrokes(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "h", "tab")
        assert app.composed_text == "The "
        tally = app.session.tally(len(app.composed_text))
        # 2 letters + 1 acceptance = 3 keystrokes for 4 characters: KSR = 1 - 3/4.
        assert (tally.characters, tally.keystrokes, tally.accepted) == (4, 3, 1)
        assert tally.savings == pytest.approx(0.25)


async def test_the_list_after_two_context_words_has_the_hand_counted_probabilities(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry ")
        # c(the ferry leaves) = 2, c(the ferry is) = 1, c(the ferry .) = 3.
        assert listed(app)[:2] == [("leaves", Fraction(2, 3), 3), ("is", Fraction(1, 3), 3)]
        assert [w.text for w in app.session.offer.context] == ["the", "ferry"]
        await pilot.press("l")
        assert app.session.offer.prefix == "l"
        assert listed(app) == [("leaves", Fraction(2, 3), 3), ("late", Fraction(0), 1)]


async def test_tab_takes_the_top_word_and_counts_every_keystroke(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "h", "tab", "f", "e", "tab")
        assert app.composed_text == "The ferry "
        tally = app.session.tally(len(app.composed_text))
        # t h Tab f e Tab: 6 keystrokes for the 10 characters "The ferry ".
        assert (tally.characters, tally.keystrokes, tally.accepted) == (10, 6, 2)
        assert tally.savings == pytest.approx(1 - 6 / 10)


async def test_down_arrow_moves_the_highlight_and_tab_takes_it_while_the_cursor_stays_in_the_message(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry ")
        area = app.query_one(ComposeArea)
        before = area.cursor_location
        await pilot.press("down")
        assert app.session.highlight == 1
        assert area.cursor_location == before
        assert app.focused is area
        await pilot.press("down", "down", "down", "down", "down", "up")
        assert app.session.highlight == 3  # the highlight stops at the last of five rows
        assert app.focused is area
        await pilot.press("up", "up", "tab")
        assert app.composed_text == "the ferry is "
        assert app.session.highlight == 0  # a new list starts at the top


async def test_the_rank_chord_takes_that_rank(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry ")
        await pilot.press("alt+2")
        assert app.composed_text == "the ferry is "
        assert app.session.keystrokes == 11
        assert app.session.accepted == 1


def test_a_terminal_sending_escape_and_a_digit_delivers_the_rank_chord_and_a_typed_pound_sign_stays_a_character() -> None:
    # tmux 3.3a and xterm send alt+2 as ESC 2; Textual's own parser, fed those bytes, must name it alt+2,
    # while "£" typed as itself (shift+3 on a British keyboard) stays the character.
    from textual._xterm_parser import XTermParser

    assert CHORDS_FROM_ESCAPE_DIGITS
    keys = [(event.key, event.character) for event in XTermParser().feed("a\x1b2£\x1b9b") if isinstance(event, events.Key)]
    assert keys == [("a", "a"), ("alt+2", None), ("pound_sign", "£"), ("alt+9", None), ("b", "b")]


async def test_the_option_characters_are_typed_into_the_message(make_app) -> None:
    # Pilot cannot name "£" or "™" (it looks key names up as Unicode names), so the key events a
    # terminal produces for them, as the parser test above shows, are posted as the driver would.
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the fare is ")
        for key, character in [("pound_sign", "£"), ("4", "4"), ("space", " "), ("trade_mark_sign", "™"), ("bullet", "•")]:
            app.post_message(events.Key(key, character))
            await pilot.pause()
        assert app.composed_text == "the fare is £4 ™•"
        assert app.session.accepted == 0


async def test_a_full_stop_right_after_an_accepted_word_replaces_its_space(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry leaves at no")
        await pilot.press("tab")
        assert app.composed_text == "the ferry leaves at noon "
        await pilot.press("full_stop")
        assert app.composed_text == "the ferry leaves at noon."
        # After the sentence end the next list is a sentence start again.
        await pilot.press("space")
        assert app.session.offer.sentence_start
        assert listed(app)[0][0] == "The"


async def test_a_space_typed_right_after_a_taken_word_is_absorbed_and_a_second_one_is_typed(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "tab", "space")
        # The taken word wrote its space: the typed space changes nothing and costs nothing.
        assert app.composed_text == "The "
        assert app.session.keystrokes == 2
        await pilot.press("space")
        assert app.composed_text == "The  "
        assert app.session.keystrokes == 3
        await pilot.press("f", "tab", "space", "full_stop")
        # A mark after the absorbed space still replaces the automatic space.
        assert app.composed_text == "The  ferry."


PASSAGE = "The ferry leaves at noon. The fare is paid on board, the zorblat is late today.\nTide tables are posted at the pier."
"""A text whose gaps a person types as written: spaces after taken words, marks, a line break."""


async def test_the_pad_tally_equals_the_simulated_typists_count_for_the_same_text(make_app, tiny_model) -> None:
    # The simulated typist's rules (predictor/simulate/editing.py) count the space after a pick as free.
    # Here a person makes the same picks at the same prefixes, and types every other character of the
    # text as written, the space after each taken word included: the pad must write the text exactly
    # and count the same keystrokes.
    from foretype.simulate import TypistSettings, read_passage, simulate

    report = simulate(tiny_model, PASSAGE, TypistSettings(k=5))
    words = read_passage(PASSAGE).words
    assert [t.word for t in report.trace] == [w.target for w in words]
    assert any(t.picked_at is not None and w.gap.startswith(" ") for t, w in zip(report.trace, words))
    app = make_app(k=5)
    async with app.run_test(size=(80, 24)) as pilot:
        for trace, word in zip(report.trace, words):
            typed = trace.word if trace.picked_at is None else trace.picked_at
            await type_characters(pilot, typed)
            if trace.rank is not None:
                await pilot.press(f"alt+{trace.rank}")
            await type_characters(pilot, word.gap)
        assert app.composed_text == PASSAGE
        tally = app.session.tally(len(app.composed_text))
        assert (tally.characters, tally.keystrokes) == (report.characters, report.keystrokes)
        assert tally.accepted == sum(t.picked_at is not None for t in report.trace) > 0


KEY_NAMES = {" ": "space", ".": "full_stop", ",": "comma", "\n": "enter"}
"""Pilot's names for the characters the passage has besides letters."""


async def type_characters(pilot, text: str) -> None:  # noqa: ANN001
    """Press one key per character."""
    for character in text:
        await pilot.press(KEY_NAMES.get(character, character))


async def test_an_unknown_context_word_is_marked_and_the_list_backs_off_to_unigrams(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the zorblat ")
        context = app.session.offer.context
        assert [(w.text, w.known) for w in context] == [("the", True), ("zorblat", False)]
        # Unseen context: c(w) / N with N = 32 (27 words and 5 sentence ends).
        assert listed(app)[:2] == [("the", Fraction(5, 32), 1), ("ferry", Fraction(3, 32), 1)]
        assert "unknown" in str(app.screen.query_one("#context").render())


async def test_backspace_costs_a_keystroke_and_characters_follow_the_text(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "x", "backspace", "backspace", "backspace")
        assert app.composed_text == ""
        # Two letters and two erasing Backspaces; the third Backspace erased nothing.
        assert app.session.keystrokes == 4
        assert app.session.tally(0).savings is None


async def test_enter_writes_a_new_line_that_starts_a_new_sentence(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "tab", "enter")
        assert app.composed_text == "The\n"  # Enter replaced the automatic space
        assert app.session.offer.sentence_start
        assert app.session.keystrokes == 3


async def test_a_rank_beyond_the_list_writes_nothing(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the fe")
        await pilot.press("alt+2")
        assert app.composed_text == "the fe"  # only "ferry" starts with "fe"
        assert app.session.accepted == 0


async def test_the_last_query_latency_is_read_from_the_injected_clock(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t")
        assert app.session.last_latency_ns == 1500  # the fake clock steps 1.5 µs per reading
        assert "1.5 µs" in str(app.screen.query_one("#tally").render())


async def test_the_panel_shows_the_chord_beside_each_rank(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)):
        rows = str(app.screen.query_one("#suggestions").render()).splitlines()[1:]
        assert [row.split()[-1] for row in rows] == ["alt+1", "alt+2", "alt+3", "alt+4", "alt+5"]


async def test_k_sets_the_number_of_ranks(make_app) -> None:
    app = make_app(k=2)
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ")
        assert [w for w, _, _ in listed(app)] == ["ferry", "fare"]


async def test_a_narrow_terminal_keeps_every_ranks_probability_and_key(make_app) -> None:
    # At 60 columns the tally gives up its notes before the list gives up a column.
    app = make_app()
    async with app.run_test(size=(60, 24)) as pilot:
        await paste(pilot, "the ferry ")
        rows = [line for line in screen_lines(app) if re.search(r"[▸ ][1-5] ", line) and "│" in line]
        assert len(rows) == 5
        for rank, row in enumerate(rows, start=1):
            assert f"alt+{rank}" in row and "%" in row, row


@pytest.mark.parametrize("size", [(80, 24), (120, 40)])
async def test_a_notification_leaves_the_key_hints_the_model_line_and_the_panels_clear(make_app, size) -> None:
    from textual.widgets import Footer
    from textual.widgets._toast import Toast

    app = make_app()
    async with app.run_test(size=size, notifications=True) as pilot:
        app.notify("Learning on: the words you finish are kept in tiny.model.learned, on this machine only.", title="learning")
        await pilot.pause()
        await pilot.pause()
        screen = app.screen
        toasts = [toast.region for toast in screen.query(Toast)]
        assert toasts
        covered = [screen.query_one(Footer).region, screen.query_one("#facts").region]
        if size[0] >= 110:
            covered.append(screen.query_one("#board").region)  # the panels sit on the right
        for toast in toasts:
            assert all(not toast.overlaps(region) for region in covered), (toast, covered)


async def test_by_default_words_passed_over_are_left_out_within_the_word_and_come_back_after_backspace(make_app, tiny_model) -> None:
    # The simulated typist's default (savings --skip-passed): a word offered before a letter and
    # passed over by typing that letter is not offered again within the same word.
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        before = [s.word for s in app.session.offer.suggestions]
        assert before[:2] == ["The", "Tide"]
        await pilot.press("t")
        # Brute force: every word starting with "t" after <s> <s>, ranked, minus the ones shown before.
        u, v = tiny_model.context_ids([])
        ranking = [s.word.capitalize() for s in tiny_model.suggest_ids(u, v, "t", 10_000)]
        left = [w for w in ranking if w not in before]
        assert "The" not in left and [s.word for s in app.session.offer.suggestions] == left[:5]
        await pilot.press("h")
        assert "The" not in [s.word for s in app.session.offer.suggestions]
        # Backspace starts the word afresh: the exact top k for "t" again, "The" first.
        await pilot.press("backspace")
        assert [s.word for s in app.session.offer.suggestions] == ranking[:5]
        assert ranking[0] == "The"
        await pilot.press("tab")
        assert app.composed_text == "The "
