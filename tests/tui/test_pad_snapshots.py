"""Snapshots of every screen at 80x24, 100x30, 120x40 and 160x50 (pytest-textual-snapshot).

Before each snapshot the screen's text is read back and checked for anything
Textual had to cut: a border label ending in "…", the key hints at the bottom,
a suggestion row without its probability or key, a shortened model line.

Kept deterministic: the tiny fixed model, a fake clock (every query reads
1.5 µs), latencies from the simulator replaced by a constant, no cursor blink,
and the fixture folder as the working folder (for the learned words, the
test's tmp folder, holding a copy of the model, and a constant for every time
a word was last typed).  After a deliberate change to the
layout, read the report of a failing run, then refresh with
``pytest tests/tui --snapshot-update``.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from pilot_steps import assert_nothing_cut, assert_typing_screen_whole, finish, learn_beforehand, paste

from foretype.tui.learning import learning_sources

SIZES = [pytest.param(size, id=f"{size[0]}x{size[1]}") for size in [(80, 24), (100, 30), (120, 40), (160, 50)]]
"""The terminal sizes every screen must read well at."""


def constant_latency(micros: float) -> str:
    """Stands in for simulator timings, which differ from run to run."""
    return "(timed) µs"


async def type_a_message(pilot) -> None:  # noqa: ANN001
    """A message with a taken word, a moved highlight and an unknown word in the context."""
    await pilot.pause()
    await paste(pilot, "the ferry leaves at no")
    await pilot.press("tab", "full_stop", "space")
    await paste(pilot, "the zorblat ")
    await pilot.press("down")
    await pilot.pause()
    assert_typing_screen_whole(pilot.app)


@pytest.mark.parametrize("size", SIZES)
def test_the_typing_screen(snap_compare, make_app, size) -> None:
    assert snap_compare(make_app(), terminal_size=size, run_before=type_a_message)


@pytest.mark.parametrize("size", SIZES)
def test_the_help_screen(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        await pilot.press("f1")
        await pilot.pause()
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_save_dialog(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        await type_a_message(pilot)
        await pilot.press("f2")
        await pilot.pause()
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_question_before_quitting_unsaved_text(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        await type_a_message(pilot)
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_replay_screen_after_a_replay(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        pilot.app.push_screen(pilot.app.replay_screen(Path("ferry-notes.txt")))
        await finish(pilot, "replay")
        await pilot.press("down", "down", "down", "down", "down", "down")
        await pilot.pause()
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(format_latency=constant_latency), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_sweep_screen(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        pilot.app.push_screen(pilot.app.sweep_screen(Path("sweep.json")))
        await finish(pilot, "sweep")
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_model_screen_with_a_file_that_is_not_there(snap_compare, make_app, size) -> None:
    async def run_before(pilot) -> None:  # noqa: ANN001
        pilot.app.push_screen(pilot.app.model_screen(Path("missing.model")))
        await finish(pilot, "open-model")
        assert_nothing_cut(pilot.app)

    assert snap_compare(make_app(), terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_learned_words_screen(snap_compare, make_app, model_copy, tmp_path, monkeypatch, size) -> None:
    monkeypatch.chdir(tmp_path)  # the learned file's path is shown relative to the working folder
    learn_beforehand(model_copy, [["the", "Zorblat", "leaves"], ["the", "Zorblat", "is", "late"], ["the", "Quillon"]], never=["dam*", "is"])
    app = make_app(model=model_copy, make_source=learning_sources(), format_when=lambda when: "(when)")

    async def run_before(pilot) -> None:  # noqa: ANN001
        await pilot.press("f7", "down")
        await pilot.pause()
        assert_nothing_cut(pilot.app)

    assert snap_compare(app, terminal_size=size, run_before=run_before)


@pytest.mark.parametrize("size", SIZES)
def test_the_typing_screen_while_learning_marks_learned_and_new_words(snap_compare, make_app, model_copy, size) -> None:
    learn_beforehand(model_copy, [["the", "Zorblat", "leaves"], ["the", "Zorblat", "is", "late"], ["the", "tide"]])
    app = make_app(model=model_copy, make_source=learning_sources())

    async def run_before(pilot) -> None:  # noqa: ANN001
        await pilot.pause()
        await paste(pilot, "the ")
        await pilot.pause()
        assert_typing_screen_whole(pilot.app)

    assert snap_compare(app, terminal_size=size, run_before=run_before)
