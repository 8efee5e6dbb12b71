"""The ``pad`` command's wiring, without starting the interface."""

from __future__ import annotations

import pytest


@pytest.fixture
def launched(monkeypatch: pytest.MonkeyPatch) -> list[tuple[object, int]]:
    """Replace the interface's entry point; record the model and k it was given (and the learning choice)."""
    calls: list[tuple[object, int]] = []

    def fake_run_pad(model: object, *, k: int = 5, learning: bool | None = None, skip_passed: bool = True) -> int:
        calls.append((model, k))
        learning_choices.append(learning)
        skip_choices.append(skip_passed)
        return 0

    learning_choices.clear()
    skip_choices.clear()

    monkeypatch.setattr("foretype.tui.launch.run_pad", fake_run_pad)
    monkeypatch.setattr("foretype.cli.run_commands.stdout_is_terminal", lambda: True)
    return calls


def test_the_pad_without_a_terminal_says_so_in_one_line(run_cli, tiny_model_file, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr("tui.launch.run_pad", lambda *a, **k: pytest.fail("the pad must not start without a terminal"))
    result = run_cli("pad", "-m", tiny_model_file)  # captured stdout is no terminal
    assert result.code == 2 and result.out == ""
    assert result.err.strip().splitlines() == ["foretype: the pad needs a terminal: standard output is not one (in a pipe, use suggest, score or savings)"]


def test_pad_opens_the_named_model_with_the_chosen_number_of_suggestions(run_cli, launched, tiny_model_file) -> None:
    result = run_cli("pad", "-m", tiny_model_file, "-k", "7")
    assert result.code == 0
    (model, k), = launched
    assert model.path == tiny_model_file and k == 7


learning_choices: list[bool | None] = []
"""The learning choice of each launch recorded by ``launched``."""

skip_choices: list[bool] = []
"""The passed-over choice of each launch recorded by ``launched``."""


@pytest.mark.parametrize(("options", "choice"), [((), True), (("--skip-passed",), True), (("--no-skip-passed",), False)])
def test_the_pad_leaves_out_passed_over_words_unless_told_not_to_like_the_simulator(run_cli, launched, tiny_model_file, options, choice) -> None:
    # The same default as savings' --skip-passed, so the pad's tally and the simulator's agree.
    assert run_cli("pad", "-m", tiny_model_file, *options).code == 0
    assert skip_choices == [choice]


@pytest.mark.parametrize(("options", "choice"), [((), None), (("--learn",), True), (("--no-learn",), False)])
def test_learn_and_no_learn_reach_the_pad_and_neither_keeps_the_learned_files_setting(run_cli, launched, tiny_model_file, options, choice) -> None:
    assert run_cli("pad", "-m", tiny_model_file, *options).code == 0
    assert learning_choices == [choice]


def test_learn_and_no_learn_together_are_refused(run_cli, launched, tiny_model_file) -> None:
    result = run_cli("pad", "-m", tiny_model_file, "--learn", "--no-learn")
    assert result.code == 2 and "not allowed with argument" in result.err
    assert launched == []


def test_no_command_at_all_opens_the_pad_on_the_demo_model(run_cli, launched, monkeypatch: pytest.MonkeyPatch, tiny_model) -> None:
    opened: list[object] = []
    monkeypatch.setattr("foretype.cli.run_commands.open_model", lambda path: opened.append(path) or tiny_model)
    assert run_cli().code == 0
    assert opened == [None] and launched == [(tiny_model, 5)]


def test_more_ranks_than_chords_is_one_clear_error(run_cli, launched) -> None:
    result = run_cli("pad", "-k", "10")
    assert result.code == 2
    assert result.err.strip() == "foretype: -k must be 1 to 9 (one chord per rank, alt+1 to alt+9), not 10"
    assert launched == []


def test_a_missing_model_file_is_one_line_and_its_exit_code(run_cli, launched, tmp_path) -> None:
    result = run_cli("pad", "-m", tmp_path / "absent.model")
    assert result.code == 5
    assert result.err.strip() == f"foretype: {tmp_path / 'absent.model'}: no such model file"
    assert launched == []
