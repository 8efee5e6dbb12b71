"""Command-line conventions: --version, usage hints, text inputs, sentence rules, sizes given twice.

Expectations are common practice for command-line tools (POSIX utility conventions:
``-`` for standard input, one diagnostic line, distinct exit statuses).
"""

from __future__ import annotations

import io
import json
import sys
from pathlib import Path

import pytest

import foretype
from foretype.version import __version__

DATA = Path(__file__).resolve().parents[1] / "data" / "savings"
CORPUS = DATA / "worked-corpus.txt"
TEXT = DATA / "worked-text.txt"


def test_version_prints_the_engine_version(run_cli) -> None:
    result = run_cli("--version")
    assert result.code == 0 and result.out.startswith(f"foretype {__version__}")


def test_a_usage_error_names_the_commands_help_without_a_double_space(run_cli) -> None:
    top = run_cli("--bogus")
    assert top.code == 2 and top.err.strip().endswith("(see 'foretype --help')")
    sub = run_cli("score", "--bogus")
    assert sub.code == 2 and sub.err.strip().endswith("(see 'foretype score --help')") and "  " not in sub.err


def test_score_of_a_text_without_words_is_exit_3_with_its_name(run_cli, tmp_path: Path) -> None:
    empty = tmp_path / "empty.txt"
    empty.write_text("... !!!\n", encoding="utf-8")
    result = run_cli("score", "-t", empty)
    assert result.code == foretype.CorpusError.exit_code
    assert result.err.strip() == f"foretype: {empty}: holds no words"


@pytest.mark.parametrize("command", [("score",), ("savings", "-k", "2")])
def test_replace_bad_bytes_is_accepted_where_text_is_read(run_cli, tmp_path: Path, command: tuple[str, ...]) -> None:
    bad = tmp_path / "bad.txt"
    bad.write_bytes(TEXT.read_bytes() + b"caf\xe9 ferry\n")
    refused = run_cli(command[0], "-t", bad, *command[1:])
    assert refused.code == foretype.EncodingError.exit_code and "--replace-bad-bytes" in refused.err
    assert run_cli(command[0], "-t", bad, *command[1:], "--replace-bad-bytes").code == 0


def test_dash_reads_the_text_from_standard_input(run_cli, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(sys, "stdin", io.TextIOWrapper(io.BytesIO(TEXT.read_bytes()), encoding="utf-8"))
    from_stdin = json.loads(run_cli("score", "-t", "-", "--json").out)
    from_file = json.loads(run_cli("score", "-t", TEXT, "--json").out)
    assert from_stdin == from_file


def test_a_wrapped_model_reads_text_with_its_own_rule_unless_told(run_cli, tmp_path: Path) -> None:
    model = tmp_path / "w.model"
    assert run_cli("build", CORPUS, "-o", model, "--wrapped").code == 0
    wrapped_text = tmp_path / "wrapped.txt"
    wrapped_text.write_text("the ferry leaves\nat noon today\n\nthe tide is high\n", encoding="utf-8")
    default = json.loads(run_cli("score", "-m", model, "-t", wrapped_text, "--json").out)
    assert default["wrapped"] is True and default["sentences"] == 2  # blank lines end sentences
    lines = json.loads(run_cli("score", "-m", model, "-t", wrapped_text, "--json", "--no-wrapped").out)
    assert lines["wrapped"] is False and lines["sentences"] == 3  # every line is a sentence
    assert "sentences read as wrapped" in run_cli("score", "-m", model, "-t", wrapped_text).out


def test_a_vocabulary_size_given_twice_is_built_once(run_cli, tmp_path: Path) -> None:
    out = tmp_path / "out"
    result = run_cli("sweep", CORPUS, "--test", TEXT, "--vocab-sizes", "5,5", "-o", out, "--json")
    assert result.code == 0, result.err
    assert [row["vocab_size"] for row in json.loads(result.out)["rows"]] == [5]
