"""The pad's other screens and dialogs, driven through Pilot: save, quit, model, replay, sweep, help."""

from __future__ import annotations

import io
import json
import re
from pathlib import Path

import pytest
from pilot_steps import finish, paste, screen_lines
from rich.console import Console
from textual.binding import Binding
from textual.widgets import DataTable, Input, ProgressBar, Static

from foretype.chart import vocabulary_label
from foretype.tui.app import PadApp
from foretype.tui.dialogs.confirm_quit import ConfirmQuitDialog
from foretype.tui.dialogs.save_message import SaveDialog
from foretype.tui.screens.help import HelpScreen, help_text
from foretype.tui.screens.model import ModelScreen
from foretype.tui.screens.pad import PadScreen
from foretype.tui.screens.replay import ReplayScreen
from foretype.tui.screens.sweep import SweepScreen
from foretype.tui.widgets.compose_area import ComposeArea
from foretype.tui.widgets.word_table import WordTable


def status_of(screen, selector: str) -> str:  # noqa: ANN001
    """The plain text a Static shows (rich tables included)."""
    content = screen.query_one(selector, Static).content
    if isinstance(content, str):
        return content
    console = Console(width=200, record=True, file=io.StringIO())
    console.print(content)
    return console.export_text()


# ------------------------------------------------------------------ save and quit
async def test_f2_saves_the_message_to_a_new_file_and_never_overwrites_one(make_app, tmp_path: Path) -> None:
    app = make_app(folder=tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry leaves")
        await pilot.press("f2")
        assert isinstance(app.screen, SaveDialog)
        assert app.screen.query_one(Input).value == str(tmp_path / "message.txt")
        await pilot.press("enter")
        assert (tmp_path / "message.txt").read_text(encoding="utf-8") == "the ferry leaves"
        assert not app.unsaved
        # A second save offers the next free name; typing an existing name is refused in the dialog.
        await pilot.press("space", "f2")
        path_box = app.screen.query_one(Input)
        assert path_box.value == str(tmp_path / "message-2.txt")
        path_box.value = str(tmp_path / "message.txt")
        await pilot.press("enter")
        assert isinstance(app.screen, SaveDialog)
        assert "already exists" in status_of(app.screen, "#save-error")
        assert (tmp_path / "message.txt").read_text(encoding="utf-8") == "the ferry leaves"
        await pilot.press("escape")
        assert isinstance(app.screen, PadScreen)
        assert app.unsaved  # the space typed after saving is not saved yet
        assert sorted(p.name for p in tmp_path.iterdir()) == ["message.txt"]  # no temporary file left


async def test_quitting_with_unsaved_text_asks_first_and_escape_keeps_typing(make_app) -> None:
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "tab")
        await pilot.press("ctrl+q")
        assert isinstance(app.screen, ConfirmQuitDialog)
        assert app.return_code is None
        await pilot.press("escape")
        assert isinstance(app.screen, PadScreen)
        assert app.composed_text == "The "
        await pilot.press("ctrl+q", "ctrl+q")  # a second Ctrl+Q confirms
        assert app.return_code == 0


async def test_quitting_an_empty_message_does_not_ask(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("ctrl+q")
        assert app.return_code == 0


# ------------------------------------------------------------------------- model
def damaged_copies(source: Path, folder: Path) -> dict[str, Path]:
    """A missing path, a file with one flipped byte in a section, and a file claiming format version 9.

    Layout from predictor/modelfile.py: magic (8 bytes), u32 version, u32 header length,
    u32 header CRC, u32 reserved, then the JSON header listing each section's offset.
    """
    data = source.read_bytes()
    header_length = int.from_bytes(data[12:16], "little")
    sections = json.loads(data[24 : 24 + header_length])["sections"]
    first = next(entry for entry in sections if entry["nbytes"] > 0)
    corrupt = bytearray(data)
    corrupt[first["offset"]] ^= 0xFF
    newer = bytearray(data)
    newer[8] = 9  # the u32 format version after the 8-byte magic (predictor/modelfile.py layout)
    paths = {"missing": folder / "missing.model", "corrupt": folder / "corrupt.model", "version": folder / "newer.model"}
    paths["corrupt"].write_bytes(bytes(corrupt))
    paths["version"].write_bytes(bytes(newer))
    return paths


async def test_models_that_cannot_be_used_are_reported_and_the_loaded_one_stays(make_app, tiny_model, tiny_model_file, tmp_path) -> None:
    paths = damaged_copies(tiny_model_file, tmp_path)
    reasons = {"missing": "no such model file", "corrupt": "checksum mismatch", "version": "format version 9"}
    app = make_app(skip_passed=False)  # words passed over stay on offer: the list is the exact top k
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f5")
        screen = app.screen
        assert isinstance(screen, ModelScreen)
        for case, reason in reasons.items():
            screen.query_one(Input).value = str(paths[case])
            await pilot.press("enter")
            await finish(pilot, "open-model")
            status = status_of(screen, "#model-status")
            assert reason in status, case
            assert "stays loaded" in status
            assert app.model is tiny_model
        await pilot.press("escape")
        await pilot.press("t", "tab")
        assert app.composed_text == "The "  # still typing with the tiny model


async def test_opening_a_good_model_switches_the_pad_to_it(make_app, tiny_model, tiny_model_file) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("t", "f5")
        app.screen.query_one(Input).value = str(tiny_model_file)
        await pilot.press("enter")
        await finish(pilot, "open-model")
        assert app.model is not tiny_model
        assert app.model.path == tiny_model_file
        assert "Now typing with tiny.model" in status_of(app.screen, "#model-status")
        await pilot.press("escape")
        assert "tiny.model" in str(app.screen.query_one("#facts").render())
        assert app.composed_text == "t"  # the text stays


# ------------------------------------------------------------------------ replay
async def test_replay_types_the_text_in_a_worker_and_reports_the_hand_counted_savings(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.press("f3")
        screen = app.screen
        assert isinstance(screen, ReplayScreen)
        screen.query_one(Input).value = "ferry-notes.txt"
        await pilot.press("enter")
        await finish(pilot, "replay")
        report = screen.report
        assert report is not None
        # Every word of the text is offered before its first letter (the text repeats the corpus):
        # 11 picks at 1 keystroke, plus ".\n" typed after "noon" and "board": 15 keystrokes for
        # 53 characters, so KSR = 1 - 15/53 (simulator rules: predictor/simulate/editing.py).
        assert (report.characters, report.keystrokes) == (53, 15)
        assert report.ksr == pytest.approx(1 - 15 / 53)
        assert "71.7%" in status_of(screen, "#replay-summary")
        table = screen.query_one(WordTable)
        assert len(table.rows) == 11
        assert table.rows[6] == ("7", "fare", "1", "at once", "2")
        for _ in range(6):
            await pilot.press("down")
        shown = status_of(screen, "#replay-shown")
        assert "word 7: fare" in shown
        assert re.search(r"1 ferry\s+2 fare\s+✓ picked", shown)


async def test_replay_of_a_missing_file_says_so_and_offers_another(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        app.push_screen(app.replay_screen(Path("no-such-text.txt")))
        await finish(pilot, "replay")
        status = status_of(app.screen, "#replay-status")
        assert "no-such-text.txt" in status and "Not replayed" in status
        assert app.screen.report is None


async def test_after_a_failed_replay_the_bar_stops_and_another_text_can_be_chosen(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        app.push_screen(app.replay_screen(Path("no-such-text.txt")))
        await finish(pilot, "replay")
        screen = app.screen
        bar = screen.query_one(ProgressBar)
        assert bar.total is not None and not bar.display  # no bar left animating without an end
        assert screen.query_one("#replay-choose").display
        path_box = screen.query_one("#replay-picker Input", Input)
        assert app.focused is path_box
        await pilot.press(*"ferry-notes.txt", "enter")
        await finish(pilot, "replay")
        assert screen.report is not None and screen.report.words == 11
        assert screen.query_one("#replay-results").display
        assert not screen.query_one("#replay-choose").display and not screen.query_one("#replay-progress").display


# ------------------------------------------------------------------------- sweep
async def test_the_sweep_screen_lists_every_row_and_charts_them(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("f4")
        screen = app.screen
        assert isinstance(screen, SweepScreen)
        screen.query_one(Input).value = "sweep.json"
        await pilot.press("enter")
        assert screen.sweep is not None
        assert screen.sweep.methods == ["kneser-ney", "katz"]
        table = screen.query_one(DataTable)
        assert table.row_count == 6
        assert table.get_row_at(0)[:3] == ["kneser-ney", "500", "45.8%"]
        assert screen.query_one("#sweep-results").display


async def test_a_sweep_with_learning_shows_its_learning_column(make_app, tmp_path: Path) -> None:
    from foretype.simulate import TypistSettings
    from foretype.sweep import run_sweep

    worked = Path(__file__).parents[1] / "data" / "savings"
    text = (worked / "worked-text.txt").read_text(encoding="utf-8")
    result = run_sweep([worked / "worked-corpus.txt"], text, out=tmp_path, vocab_sizes=[4, 13], settings=TypistSettings(k=2), adapt=True)
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        app.push_screen(app.sweep_screen(tmp_path / "sweep.json"))
        await pilot.pause()
        table = app.screen.query_one(DataTable)
        headers = [str(column.label) for column in table.columns.values()]
        assert headers[:5] == ["method", "vocabulary", "KSR", "oracle", "learning"]
        for index, row in enumerate(result.rows):
            cells = table.get_row_at(index)
            assert cells[2] == f"{100 * row.ksr:.1f}%" and cells[4] == f"{100 * row.adapted_ksr:.1f}%"


def chart_rows(app) -> list[str]:  # noqa: ANN001
    """The screen rows that show a drawn line of the chart (braille dots or markers between the axes)."""
    return [line for line in screen_lines(app) if "┤" in line and any(c in line.split("┤", 1)[1] for c in "⠁⠂⠄⠈⠐⠠⡀⢀⣀⠤⠒⠉•")]


async def test_the_sweep_chart_is_still_drawn_after_the_terminal_changes_size(make_app) -> None:
    # plotext rescales a log-scaled figure in place when it builds it: without a fresh drawing per
    # frame, the second frame of the chart was empty and a third raised an error.
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        app.push_screen(app.sweep_screen(Path("sweep.json")))
        await pilot.pause()
        assert chart_rows(app)
        for size in [(120, 40), (80, 24), (160, 50), (100, 30)]:
            await pilot.resize_terminal(*size)
            await pilot.pause()
            assert len(chart_rows(app)) >= 4, size


@pytest.mark.parametrize("sizes", [(5_000, 65_265), (60_000, 65_265)], ids=["log-scale", "linear-scale"])
async def test_the_sweep_charts_vocabulary_axis_writes_sizes_as_the_svg_chart_does(make_app, tmp_path: Path, sizes) -> None:
    from foretype.chart import sweep_chart

    rows = [{"method": "katz", "vocab_size": size, "ksr": 0.4 + size / 1e6, "oracle_ksr": 0.6, "latency_p99_us": 90.0} for size in sizes]
    (tmp_path / "sweep.json").write_text(json.dumps({"rows": rows}), encoding="utf-8")
    svg_labels = set(re.findall(r">([0-9.,]+k?)</text>", sweep_chart(rows)))
    assert {"5k", "60k", "65,265"} & svg_labels >= {"65,265"}
    app = make_app()
    async with app.run_test(size=(120, 40)) as pilot:
        app.push_screen(app.sweep_screen(tmp_path / "sweep.json"))
        await pilot.pause()
        chart = [line for line in screen_lines(app) if "vocabulary size" in line or "65" in line]
        assert not any("65.265k" in line or "65265" in line for line in chart)
        axis = next(line for line in screen_lines(app) if "65,265" in line and "katz" not in line)
        for size in sizes:
            assert vocabulary_label(size) in svg_labels and vocabulary_label(size) in axis


async def test_a_file_that_is_not_a_sweep_result_is_refused(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        app.push_screen(app.sweep_screen(Path("not-a-sweep.json")))
        await pilot.pause()
        assert app.screen.sweep is None
        assert "not a sweep result" in status_of(app.screen, "#sweep-status")


# -------------------------------------------------------------------------- help
async def test_f1_opens_the_help_and_escape_closes_it(make_app) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f1")
        assert isinstance(app.screen, HelpScreen)
        await pilot.press("escape")
        assert isinstance(app.screen, PadScreen)
        assert app.focused is app.screen.query_one(ComposeArea)


@pytest.mark.parametrize("owner", [PadApp, ComposeArea, PadScreen, ReplayScreen, SweepScreen, ModelScreen])
def test_every_key_the_footer_shows_is_explained_in_the_help(owner: type) -> None:
    text = help_text()
    shown = [b for b in owner.BINDINGS if isinstance(b, Binding) and b.show]
    assert shown
    for binding in shown:
        key = binding.key.split(",")[0]
        assert f"`{key}`" in text, f"{key} ({binding.description}) is not in help.md"


async def test_a_size_sweep_shows_how_each_model_was_shrunk(make_app, tmp_path: Path) -> None:
    # A size axis of value encodings only (the worked corpus is too small for byte budgets).
    from foretype.simulate import TypistSettings
    from foretype.sweep import run_sweep

    worked = Path(__file__).parents[1] / "data" / "savings"
    text = (worked / "worked-text.txt").read_text(encoding="utf-8")
    result = run_sweep(
        [worked / "worked-corpus.txt"], text, out=tmp_path, vocab_sizes=[13], settings=TypistSettings(k=2), keep_bytes=[1.0], value_encodings=["codebook8"], methods=["katz"]
    )
    assert [row.keep_bytes for row in result.rows] == [None, 1.0]
    app = make_app()
    async with app.run_test(size=(140, 40)) as pilot:
        app.push_screen(app.sweep_screen(tmp_path / "sweep.json"))
        await pilot.pause()
        table = app.screen.query_one(DataTable)
        headers = [str(column.label) for column in table.columns.values()]
        assert headers[-1] == "shrunk"
        assert table.get_row_at(0)[-1] == "full"
        assert table.get_row_at(1)[-1] == "values only, codebook8"
