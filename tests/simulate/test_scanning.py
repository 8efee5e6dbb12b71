"""The scanning typist against a worked example counted by hand, closed forms and brute force.

Counting rule (MacKenzie, ICCHP 2012, "Modeling text input for single-switch
scanning"; restated in /work/shared/REFERENCES.md, from memory, not checked
against the paper's own figures): in row-column scanning the cell at row r,
column c (from 1) costs r + c scan steps and two switch presses; a suggestion
row costs its row number plus the rank.  Entry rate with every step one scan
interval: wpm = 60 / (steps per character x interval x 5) (same source; five
characters per word, Soukoreff & MacKenzie 2003).
"""

from __future__ import annotations

import itertools
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import foretype
from foretype.errors import OptionError
from foretype.simulate import TypistSettings, gap_keystrokes
from foretype.simulate.scanning import (
    ScanGrid,
    ScanningSettings,
    default_grid,
    gap_cells,
    letter_frequencies,
    parse_layout,
    simulate_scanning,
)

SAVINGS = Path(__file__).parents[1] / "data" / "savings"
SCANNING = Path(__file__).parents[1] / "data" / "scanning"


@pytest.fixture(scope="module")
def worked_model() -> foretype.LanguageModel:
    return foretype.build([SAVINGS / "worked-corpus.txt"], method="mle")


@pytest.fixture(scope="module")
def worked_text() -> str:
    return (SAVINGS / "worked-text.txt").read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def worked_grid() -> ScanGrid:
    return parse_layout((SCANNING / "worked-grid.txt").read_text(encoding="utf-8"))


# Counted by hand (docs/scanning.md), words mode, k = 2, grid
#   space e t a s  -> steps 2 3 4 5 6
#   h r i o n      -> 3 4 5 6 7
#   l y f u m      -> 4 5 6 7 8
#   p w            -> 5 6
# The lists are those of the keystroke typist's worked example (docs/savings.md), in words mode.
# Suggestion row last = row 5, a pick at rank j costs 5 + j; a pick writes the space.
HAND_LAST = [
    ("the", 7, 2),  # [see, the]: rank 2 -> 5 + 2 (typing t h e + space would cost 4 + 3 + 3 + 2 = 12)
    ("ferry", 6, 2),  # [ferry, tide]: rank 1
    ("is", 6, 2),
    ("late", 6, 2),
    ("maren", 29, 12),  # never offered: m a r e n + space = 8 + 5 + 4 + 3 + 7 + 2, 6 cells x 2 presses
    ("see", 6, 2),
    ("you", 6, 2),
    ("at", 6, 2),
    ("the", 6, 2),
    ("slipway", 12, 4),  # "s" (6), then [slipway, see]: rank 1 (6)
]
# Suggestion row first: every letter costs one step more, a pick at rank j costs 1 + j.
HAND_FIRST_STEPS = [3, 2, 2, 2, 35, 2, 2, 2, 2, 9]  # maren: 27 + 5 + space 3; slipway: s 7 + pick 2


def test_scan_steps_equal_the_hand_count_word_by_word(worked_model: foretype.LanguageModel, worked_text: str, worked_grid: ScanGrid) -> None:
    report = simulate_scanning(worked_model, worked_text, TypistSettings(k=2, text_mode="words"), ScanningSettings(grid=worked_grid))
    assert report.run.steps.tolist() == [steps for _, steps, _ in HAND_LAST]
    assert report.run.presses.tolist() == [presses for _, _, presses in HAND_LAST]
    assert report.characters == 47
    assert report.steps == 90 and report.presses == 32
    first = simulate_scanning(worked_model, worked_text, TypistSettings(k=2, text_mode="words"), ScanningSettings(grid=worked_grid, list_position="first"))
    assert first.run.steps.tolist() == HAND_FIRST_STEPS
    assert first.steps == 61


def test_without_prediction_every_character_costs_its_cell(worked_model: foretype.LanguageModel, worked_text: str, worked_grid: ScanGrid) -> None:
    # By hand: the(10) ferry(22) is(11) late(16) maren(27) see(12) you(18) at(9) the(10) slipway(36) = 171
    # letter steps, plus ten spaces at 2 = 191 steps; 47 characters x 2 presses = 94.
    report = simulate_scanning(worked_model, worked_text, TypistSettings(k=2, text_mode="words"), ScanningSettings(grid=worked_grid))
    assert report.steps_unaided == 191
    assert report.presses_unaided == 94


def test_entry_rate_follows_the_published_formula(worked_model: foretype.LanguageModel, worked_text: str, worked_grid: ScanGrid) -> None:
    # wpm = 60 / (SPC x interval x 5) when every step costs one interval (MacKenzie 2012, from memory):
    # 90 steps / 47 characters at 0.8 s gives 60 / (90/47 x 0.8 x 5) = 7.833 wpm.
    report = simulate_scanning(worked_model, worked_text, TypistSettings(k=2, text_mode="words"), ScanningSettings(grid=worked_grid, scan_interval=0.8))
    data = report.to_json()
    assert data["scan_steps_per_char"] == pytest.approx(90 / 47)
    assert data["wpm"] == pytest.approx(60 / (90 / 47 * 0.8 * 5))
    assert data["wpm_unaided"] == pytest.approx(60 / (191 / 47 * 0.8 * 5))
    # A dwell after each press adds presses x dwell seconds: 90 x 0.8 + 32 x 0.5 = 88 s.
    dwell = simulate_scanning(worked_model, worked_text, TypistSettings(k=2, text_mode="words"), ScanningSettings(grid=worked_grid, scan_interval=0.8, press_dwell=0.5))
    assert dwell.seconds() == pytest.approx(88.0)


def test_a_square_grid_used_evenly_costs_n_plus_one_steps_per_character() -> None:
    # Closed form: on an n x n grid, the mean of r + c over all cells is (n + 1)/2 + (n + 1)/2 = n + 1.
    letters = "abcdefghijklmnop"
    grid = ScanGrid(tuple(tuple(letters[4 * r : 4 * r + 4]) for r in range(4)))
    assert sum(grid.steps(c) for c in letters) / len(letters) == 5


def test_the_frequency_ordered_grid_has_the_fewest_expected_steps_of_any_placement() -> None:
    # Brute force over every placement of 7 characters on the same places (rearrangement inequality).
    weights = {"e": 13.0, "t": 9.0, "a": 8.0, " ": 18.0, "o": 7.5, "n": 7.0, "s": 6.0}
    order = sorted(weights, key=lambda c: -weights[c])
    grid = ScanGrid.frequency_ordered(order)
    ours = sum(weights[c] * grid.steps(c) for c in weights)
    places = [(r, c) for r, row in enumerate(grid.rows, 1) for c, cell in enumerate(row, 1) if cell]
    best = min(sum(weights[ch] * (r + c) for ch, (r, c) in zip(perm, places)) for perm in itertools.permutations(weights))
    assert ours == best
    assert grid.rows[0][0] == " "


def test_the_default_grid_puts_the_models_most_frequent_characters_first(worked_model: foretype.LanguageModel) -> None:
    frequencies = letter_frequencies(worked_model)
    grid = default_grid(frequencies, "Zq")
    assert grid.rows[0][0] == " "  # one space per word outweighs any letter
    top = max((c for c in frequencies if c != " "), key=lambda c: (frequencies[c], c))
    assert grid.steps(top) == 3
    assert grid.place("z") is not None and grid.place("Z") == grid.place("z")
    # Marks the model cannot weigh come before characters it expects less than once a sentence.
    rare = default_grid({**frequencies, "é": frequencies["."] / 10})
    assert rare.steps(",") < rare.steps("é") and rare.steps("\n") < rare.steps("é")


@settings(max_examples=200, deadline=None)
@given(st.text(alphabet=' .,;:!?"()-\n\'ab', max_size=6), st.booleans(), st.booleans())
def test_gap_cells_cost_exactly_the_keystroke_typists_keystrokes(gap: str, picked: bool, autospace: bool) -> None:
    assert len(gap_cells(gap, picked=picked, autospace=autospace)) == gap_keystrokes(gap, picked=picked, autospace=autospace)


def test_layout_files_report_bad_cells_and_missing_characters(worked_model: foretype.LanguageModel, worked_text: str, worked_grid: ScanGrid) -> None:
    with pytest.raises(OptionError, match="line 2"):
        parse_layout("a b\nab c\n", "grid.txt")
    with pytest.raises(OptionError, match="twice"):
        parse_layout("a b a\n")
    with pytest.raises(OptionError, match="no cell for"):
        # Full mode needs the comma, full stop, Enter and delete, which the worked grid lacks.
        simulate_scanning(worked_model, worked_text, TypistSettings(k=2), ScanningSettings(grid=worked_grid))
    assert parse_layout(worked_grid.to_text()) == worked_grid


def test_full_mode_runs_on_the_default_grid_and_prediction_saves_steps(worked_model: foretype.LanguageModel, worked_text: str) -> None:
    report = simulate_scanning(worked_model, worked_text, TypistSettings(k=2), ScanningSettings())
    assert report.characters == 50
    assert report.steps < report.steps_unaided
    assert report.presses_unaided == 2 * 50
