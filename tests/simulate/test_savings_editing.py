"""The editing rules the simulated typist counts by (docs/savings.md states them).

Each expected count below was worked out by hand from the rules: one keystroke
per typed character (Enter for a line break), a pick writes the word and one
space, a mark that attaches to the word before it replaces that space, and
any other character right after a picked word costs one Backspace first.
"""

from __future__ import annotations

import pytest

from foretype.simulate import gap_keystrokes, replaces_automatic_space
from foretype.simulate.editing import latest_useful_pick


@pytest.mark.parametrize(
    ("gap", "after_pick"),
    [
        ("", 0),  # end of the text: the automatic space costs nothing
        (" ", 0),  # the automatic space is the space
        ("  ", 1),  # the second space is typed
        (",", 1),  # the comma replaces the automatic space
        (", ", 2),
        (".\n", 2),  # full stop replaces the space, then Enter
        ("\n", 1),  # Enter replaces the automatic space: no line ends in a space
        ("!\n", 2),
        ("’ ", 2),  # closing quote (category Pf) replaces the space
        (") ", 2),  # closing bracket (category Pe)
        (" (", 1),  # space kept, opening bracket typed
        ("(", 2),  # Backspace, then the bracket
        (' "', 3),  # the straight quote would replace the space: Backspace, space, quote
        (" \n", 3),  # a space before the line break: Backspace, space, Enter
        (" - ", 2),  # a dash does not replace the space: dash and space typed
        ("—", 2),  # Backspace, then the dash
    ],
)
def test_gap_after_a_pick_with_automatic_space_costs_what_the_rules_say(gap: str, after_pick: int) -> None:
    assert gap_keystrokes(gap, picked=True, autospace=True) == after_pick


@pytest.mark.parametrize("gap", ["", " ", ", ", ".\n", ' "', " - ", "(", "\n\n"])
def test_every_gap_character_is_typed_after_a_typed_word_or_without_automatic_space(gap: str) -> None:
    assert gap_keystrokes(gap, picked=False, autospace=True) == len(gap)
    assert gap_keystrokes(gap, picked=True, autospace=False) == len(gap)
    assert gap_keystrokes(gap, picked=False, autospace=False) == len(gap)


def test_attaching_marks_replace_the_space_and_opening_marks_do_not() -> None:
    assert all(replaces_automatic_space(c) for c in ".,;:!?…\"'\n)]}’”»")
    assert not any(replaces_automatic_space(c) for c in "([{‘“«-—–@#$ \t")


@pytest.mark.parametrize(
    ("length", "gap", "select_cost", "autospace", "latest"),
    [
        (5, " ", 1.0, True, 4),  # picking after 4 letters: 4 + 1 + 0 = 5 < 5 + 1
        (1, " ", 1.0, True, 0),  # a one-letter word: pick 1 + 0 vs type 1 + 1
        (5, ",", 1.0, True, 4),  # 4 + 1 + 1 = 6 = 5 + 1: a tie goes to the pick
        (5, "(", 1.0, True, 3),  # 4 + 1 + 2 = 7 > 6: pick only up to 3 letters
        (5, " ", 1.0, False, 4),  # 4 + 1 + 1 = 6 = 5 + 1
        (3, " ", 5.0, True, -1),  # a pick at 5 keystrokes never pays for a 3-letter word
        (3, " ", 2.5, True, 1),  # 1 + 2.5 + 0 = 3.5 <= 4; 2 + 2.5 = 4.5 > 4
    ],
)
def test_the_typist_picks_only_while_a_pick_costs_no_more_than_typing(length: int, gap: str, select_cost: float, autospace: bool, latest: int) -> None:
    assert latest_useful_pick(length, gap, select_cost=select_cost, autospace=autospace) == latest
