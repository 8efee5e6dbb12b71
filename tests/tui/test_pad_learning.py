"""Learning in the pad: the toggle, what is learned as the person types, the marks, the learned words screen.

Every test types with a copy of the tiny maximum-likelihood model (conftest.py)
in its own tmp folder, so the learned file beside it is the test's own; what
the pad wrote is then read back from that file with the engine's reader
(foretype.adapt.load_learned), independently of the pad's open file.
Expected counts are the words typed, counted by hand.  Under maximum
likelihood a word never seen after a context has base probability 0 there
(REFERENCES.md, "Trigram model (standard definition)"), so whatever the
learned counts give it is more than the base model does.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from pilot_steps import finish, learn_beforehand, paste
from textual.widgets import DataTable, Input

from foretype.adapt import LearnedFile, load_learned
from foretype.query.model import LanguageModel
from foretype.tui.learning import Finished, finished_by_typing, learning_sources, open_learning
from foretype.tui.screens.learned import LearnedWordsScreen
from foretype.tui.screens.pad import PadScreen
from foretype.tui.screens.replay import ReplayScreen
from foretype.tui.widgets.compose_area import ComposeArea
from foretype.tui.widgets.suggestion_table import LEARNED_MARK, NEW_WORD_MARK, SuggestionTable
from foretype.tui.widgets.word_table import WordTable


@pytest.fixture
def learning_app(make_app, model_copy):  # noqa: ANN001, ANN201
    """Return ``make()``: a pad that learns into the learned file beside the model copy (it opens the file)."""
    return lambda **options: make_app(model=model_copy, make_source=learning_sources(), format_when=lambda when: "(when)", **options)


def on_disk(model: LanguageModel):  # noqa: ANN201 - an AdaptedModel
    """What the learned file beside a model holds, read afresh."""
    return load_learned(Path(f"{model.path}.learned"), model)


def uses_on_disk(model: LanguageModel) -> dict[str, int]:
    return {w.word.lower(): w.uses for w in on_disk(model).learned_words()}


def shown_words(app) -> list[str]:  # noqa: ANN001
    return [s.word for s in app.session.offer.suggestions]


def table_rows(app) -> list[str]:  # noqa: ANN001
    """The suggestion table's rows as plain text."""
    return app.pad.query_one(SuggestionTable).render().plain.splitlines()[1:]


async def type_words(pilot, text: str) -> None:  # noqa: ANN001
    """Type text key by key (pasted text is not learned; typed keys are)."""
    names = {" ": "space", ".": "full_stop", ",": "comma", "\n": "enter"}
    await pilot.press(*(names.get(c, c) for c in text))


# ------------------------------------------------------------------ which keys finish a word
@pytest.mark.parametrize(
    ("line", "typed", "expected"),
    [
        ("the ferry", " ", Finished("ferry", ("the",), False, (0, 9))),
        ("at noon", ".", Finished("noon", ("at",), True, (0, 7))),
        ("the ferry leaves", "\n", Finished("leaves", ("the", "ferry"), True, (0, 16))),
        ("at noon ", ".", Finished("", ("at", "noon"), True, (0, 8))),
        ("the don'", " ", Finished("don", ("the",), False, (0, 8))),
        ("the ferr", "y", None),
        ("the don", "'", None),
        ("at noon.", ".", None),
        ("", " ", None),
    ],
)
def test_a_space_a_mark_or_enter_finishes_the_word_before_it(line: str, typed: str, expected: Finished | None) -> None:
    assert finished_by_typing(line, typed, 0) == expected


# ------------------------------------------------------------------ the toggle
async def test_f6_switches_learning_off_and_on_and_the_learned_file_keeps_the_choice(learning_app, model_copy) -> None:
    app = learning_app()
    async with app.run_test(size=(80, 24)) as pilot:
        area = app.pad.query_one(ComposeArea)
        assert app.learning.learning and "learning on" in str(area.border_subtitle)
        await pilot.press("f6")
        assert not app.learning.learning and "learning off" in str(area.border_subtitle)
        assert on_disk(model_copy).settings.learning is False
        await type_words(pilot, "the zorblat ")
        assert uses_on_disk(model_copy) == {}
        await pilot.press("f6")
        assert app.learning.learning and on_disk(model_copy).settings.learning is True


async def test_a_pad_without_a_learned_file_says_why_and_learns_nothing(make_app, model_copy) -> None:
    with LearnedFile.for_model(model_copy):  # another foretype holds the file
        app = make_app(model=model_copy, make_source=learning_sources())
        async with app.run_test(size=(80, 24)) as pilot:
            assert not app.learning.available
            assert "in use by another foretype process" in app.learning.problem
            assert "learning unavailable" in str(app.pad.query_one(ComposeArea).border_subtitle)
            await pilot.press("f6")
            await type_words(pilot, "the zorblat ")
    assert uses_on_disk(model_copy) == {}


def test_pad_no_learn_switches_learning_off_in_the_file_before_the_pad_opens(model_copy) -> None:
    source = open_learning(model_copy, learning=False)
    source.close()
    assert on_disk(model_copy).settings.learning is False


# ------------------------------------------------------------------ what is learned
async def test_each_finished_word_is_learned_once_with_its_sentence(learning_app, model_copy) -> None:
    app = learning_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        # "ferry" finished by a space, the space erased and typed again: one use.
        await type_words(pilot, "the ferry ")
        await pilot.press("backspace", "space")
        # "leaves" taken from the list, then a full stop replaces the space written after it: one use, then the end.
        await pilot.press("l", "tab", "full_stop")
        assert app.composed_text == "the ferry leaves."
        # Pasted text is not learned, though it is context; a word a paste left unfinished is learned
        # when a typed space finishes it; an unfinished word is not learned.
        await paste(pilot, " tide tables")
        await type_words(pilot, " zorb")
    with LearnedFile.for_model(model_copy):  # the pad released the file when it closed
        pass
    learned = on_disk(model_copy)
    assert uses_on_disk(model_copy) == {"the": 1, "ferry": 1, "leaves": 1, "tables": 1}
    user = learned.user
    bigrams = {tuple(user.form(i) for i in ids): uses for ids, _, uses, _ in user.ngram_rows(2)}
    assert bigrams == {("<s>", "the"): 1, ("the", "ferry"): 1, ("ferry", "leaves"): 1, ("leaves", "</s>"): 1, ("tide", "tables"): 1}


async def test_a_new_word_typed_min_uses_times_becomes_suggestable_and_is_marked_new(learning_app, model_copy) -> None:
    app = learning_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        needed = app.learning.min_uses
        for _ in range(needed - 1):
            await type_words(pilot, "zorblat ")
        await type_words(pilot, "zo")
        assert shown_words(app) == []
        await pilot.press("backspace", "backspace")
        await type_words(pilot, "zorblat zo")
        assert uses_on_disk(model_copy)["zorblat"] == needed
        (offered,) = app.session.offer.suggestions
        assert (offered.word, offered.new_word) == ("zorblat", True)
        assert table_rows(app)[0].split()[:3] == ["▸1", "zorblat", NEW_WORD_MARK]


async def test_a_vocabulary_word_the_person_uses_in_a_new_place_is_marked_learned(learning_app, model_copy) -> None:
    # P_base(tide | <s> the) = 0: the tiny corpus never has "the tide" at a sentence start.
    learn_beforehand(model_copy, [["the", "tide"], ["the", "tide"]])
    app = learning_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ")
        marks = {s.word: s.learned for s in app.session.offer.suggestions}
        assert marks["tide"] is True and marks["ferry"] is False
        rows = {row.split()[1]: row for row in table_rows(app)}
        assert rows["tide"].split()[2] == LEARNED_MARK
        assert rows["ferry"].split()[2] != LEARNED_MARK


async def test_learning_off_leaves_every_suggestion_identical_to_the_base_model(learning_app, model_copy) -> None:
    texts = ["", "the ", "the ferry ", "the fe", "zorblat ", "the zorblat ", "tide t", "at the p"]
    learn_beforehand(model_copy, [["the", "zorblat", "is", "at", "the", "tide"]] * 3)
    app = learning_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f6")
        for text in texts:
            area = app.pad.query_one(ComposeArea)
            area.clear()
            await pilot.pause()
            await paste(pilot, text)
            shown = [(s.word, s.prob, s.order, s.id) for s in app.session.offer.suggestions]
            base = [(s.word, s.prob, s.order, s.id) for s in model_copy.suggest_text(text, k=5)]
            assert shown == base, text
            assert not any(getattr(s, "learned", False) or getattr(s, "new_word", False) for s in app.session.offer.suggestions)
            assert not any(row.split()[2:3] in ([LEARNED_MARK], [NEW_WORD_MARK]) for row in table_rows(app) if row.strip())


# ------------------------------------------------------------------ the learned words screen
async def open_learned_words(pilot, app) -> DataTable:  # noqa: ANN001
    await pilot.press("f7")
    assert isinstance(app.screen, LearnedWordsScreen)
    return app.screen.query_one(DataTable)


def listed_rows(table: DataTable) -> list[tuple[str, str, str]]:
    """(word, uses, suggested) of each row."""
    return [(str(r[0]), str(r[1]), str(r[5])) for r in (table.get_row_at(i) for i in range(table.row_count))]


async def test_the_learned_words_screen_lists_the_counts_and_delete_forgets_the_highlighted_word(learning_app, model_copy) -> None:
    learn_beforehand(model_copy, [["the", "zorblat"], ["the", "zorblat"], ["the"]])
    app = learning_app()
    async with app.run_test(size=(80, 24)) as pilot:
        table = await open_learned_words(pilot, app)
        # Most used first.
        assert listed_rows(table) == [("the", "3", "yes"), ("zorblat", "2", "yes")]
        await pilot.press("down", "delete")
        assert listed_rows(table) == [("the", "3", "yes")]
        assert "zorblat" not in uses_on_disk(model_copy)
        await pilot.press("escape")
        assert isinstance(app.screen, PadScreen)
        await paste(pilot, "zo")
        assert shown_words(app) == []


async def test_n_and_the_block_box_put_words_on_the_never_suggest_list_and_they_are_no_longer_offered(learning_app, model_copy) -> None:
    learn_beforehand(model_copy, [["the", "zorblat"], ["the", "zorblat"]])
    app = learning_app()
    async with app.run_test(size=(80, 24)) as pilot:
        table = await open_learned_words(pilot, app)
        await pilot.press("down", "n")
        assert ("zorblat", "2", "never (blocked)") in listed_rows(table)
        # Any word of the vocabulary, typed or not, through the box at the bottom.
        await pilot.press("tab")
        await type_words(pilot, "ferry")
        await pilot.press("enter")
        assert on_disk(model_copy).never.entries == ["ferry", "zorblat"]
        await pilot.press("escape")
        await paste(pilot, "zo")
        assert shown_words(app) == []
        await paste(pilot, " the f")
        assert "ferry" not in shown_words(app) and "fare" in shown_words(app)
        # n again takes the word off the list.
        table = await open_learned_words(pilot, app)
        table.move_cursor(row=[r[0] for r in listed_rows(table)].index("zorblat"))
        await pilot.press("n")
        assert on_disk(model_copy).never.entries == ["ferry"]


# ------------------------------------------------------------------ the replay
async def test_the_replay_types_with_what_was_learned_and_leaves_the_learned_file_as_it_was(learning_app, model_copy) -> None:
    learn_beforehand(model_copy, [["the", "ferry"]], never=["ferry"])
    learned_file = Path(f"{model_copy.path}.learned")
    before = learned_file.read_bytes()
    app = learning_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.press("f3")
        screen = app.screen
        assert isinstance(screen, ReplayScreen)
        screen.query_one(Input).value = "ferry-notes.txt"
        await pilot.press("enter")
        await finish(pilot, "replay")
        rows = screen.query_one(WordTable).rows
        # "ferry" is on the learned never-suggest list, so the typist types its 5 letters and the
        # space after it (simulator rules: predictor/simulate/editing.py); "fare", second behind
        # "ferry" in the plain replay (test_pad_screens.py), is now first.
        assert rows[1] == ("2", "ferry", "6", "typed", "")
        assert rows[6] == ("7", "fare", "1", "at once", "1")
    assert learned_file.read_bytes() == before
