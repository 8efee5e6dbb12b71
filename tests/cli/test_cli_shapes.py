"""One shape for every command: -m/--model names the model, -t/--test the held-out text, -o/--output the result.

Expectations are common practice for command-line tools (POSIX utility conventions:
options name their operands, one diagnostic line, distinct exit statuses); the
numbers checked against come from the engine's own JSON output beside the text.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

import foretype
from foretype.simulate import TypistSettings, simulate

DATA = Path(__file__).resolve().parents[1] / "data" / "savings"
CORPUS = DATA / "worked-corpus.txt"
TEXT = DATA / "worked-text.txt"
DEMO_LINE = "model: the bundled demo model (give -m MODEL to use your own)"


@pytest.fixture
def model(tmp_path: Path) -> Path:
    path = tmp_path / "good.model"
    foretype.build([CORPUS]).save(path)
    return path


def test_a_model_given_where_the_text_belongs_is_refused_not_guessed(run_cli, model: Path) -> None:
    result = run_cli("suggest", model)  # the text before the cursor forgotten
    assert result.code == foretype.OptionError.exit_code and result.out == ""
    assert result.err.count("\n") == 1 and "is a model file" in result.err and "-m" in result.err


def test_two_positionals_are_a_usage_error_not_a_model_and_a_text(run_cli, model: Path) -> None:
    result = run_cli("suggest", model, "the f")
    assert result.code == 2 and "unrecognized arguments" in result.err and "(see 'foretype suggest --help')" in result.err


@pytest.mark.parametrize(
    "command",
    [
        ["suggest", "the f"],
        ["score", "-t", TEXT],
        ["savings", "-t", TEXT, "-k", "2"],
        ["info"],
        ["check"],
        ["learned", "show"],
        ["compare", "-t", TEXT, "--resamples", "20"],
    ],
    ids=lambda c: c[0] if c[0] != "learned" else "learned-show",
)
def test_every_model_command_takes_dash_m_and_says_which_model_answered(run_cli, model: Path, command: list) -> None:
    mine = run_cli(*command, "-m", model, "--json")
    assert mine.code == 0, mine.err
    payload = json.loads(mine.out)
    named = payload["systems"][0]["model"] if command[0] == "compare" else payload["model"]
    assert named == str(model)
    demo = run_cli(*command, "--json")
    assert demo.code == 0, demo.err
    payload = json.loads(demo.out)
    assert (payload["systems"][0]["model"] if command[0] == "compare" else payload["model"]) == "demo"
    shown = run_cli(*command)
    assert shown.out.splitlines()[0] == DEMO_LINE
    assert DEMO_LINE not in run_cli(*command, "-m", model).out


def test_suggestions_show_probabilities_with_significant_digits_and_the_order_as_in_json(run_cli, model: Path) -> None:
    rows = json.loads(run_cli("suggest", "-m", model, "the ", "-k", "9", "--json").out)["suggestions"]
    lines = run_cli("suggest", "-m", model, "the ", "-k", "9").out.splitlines()[1:]
    assert len(lines) == len(rows) > 1
    for line, row in zip(lines, rows):
        rank, word, prob, name, order = line.split()
        assert (word, prob, name, int(order)) == (row["word"], f"{row['prob']:.4g}", "order", row["order"])
        assert float(prob) == pytest.approx(row["prob"], rel=1e-3) and prob != "0.000000"


def test_counts_in_text_output_take_the_right_number(run_cli, tmp_path: Path) -> None:
    built = run_cli("build", CORPUS, "-o", tmp_path / "m.model")
    assert "from 1 file in" in built.out and "1 files" not in built.out
    one = tmp_path / "one.txt"
    one.write_text("the ferry sails\n", encoding="utf-8")
    scored = run_cli("score", "-m", tmp_path / "m.model", "-t", one)
    assert scored.out.startswith("1 sentence, 4 tokens ")


def test_savings_and_sweep_take_the_held_out_text_the_same_way(run_cli, model: Path, tmp_path: Path) -> None:
    savings = json.loads(run_cli("savings", "-m", model, "-t", TEXT, "-k", "2", "--json").out)
    sweep = run_cli("sweep", CORPUS, "-t", TEXT, "--vocab-sizes", "50", "-k", "2", "-o", tmp_path / "out", "--json")
    assert sweep.code == 0, sweep.err
    row = json.loads(sweep.out)["rows"][0]
    assert row["ksr"] == savings["ksr"]  # the same model (every word kept) typed on the same text


def test_boolean_switches_come_in_pairs(run_cli, model: Path) -> None:
    on = json.loads(run_cli("savings", "-m", model, "-t", TEXT, "-k", "2", "--autospace", "--json").out)
    default = json.loads(run_cli("savings", "-m", model, "-t", TEXT, "-k", "2", "--json").out)
    off = json.loads(run_cli("savings", "-m", model, "-t", TEXT, "-k", "2", "--no-autospace", "--json").out)
    assert on["ksr"] == default["ksr"] and on["keystrokes"] == default["keystrokes"] and off["keystrokes"] != on["keystrokes"]
    plain = json.loads(run_cli("suggest", "-m", model, "the ", "--no-adapt", "--json").out)
    assert "learned_file" not in plain


def test_a_never_suggest_list_that_blocks_every_candidate_says_so(run_cli, model: Path) -> None:
    assert run_cli("suggest", "-m", model, "the f", "--adapt", "--json").out.count('"word"') > 0
    assert run_cli("learned", "block", "-m", model, "f*").code == 0
    shown = run_cli("suggest", "-m", model, "the f", "--adapt")
    assert shown.code == 0
    assert "every candidate here is on the never-suggest list (f*)" in shown.out and "no vocabulary word matches" not in shown.out
    assert json.loads(run_cli("suggest", "-m", model, "the f", "--adapt", "--json").out)["all_blocked"] is True


def test_learned_is_a_group_of_verbs(run_cli, model: Path) -> None:
    bare = run_cli("learned", "-m", model)
    assert bare.code == 2 and "{show,feed,export,prune,forget,block,unblock,set,on,off,wipe}" in bare.err
    assert "(see 'foretype learned --help')" in bare.err


def test_compare_outputs_follow_the_output_policy(run_cli, model: Path, tmp_path: Path) -> None:
    notes = tmp_path / "notes.csv"
    notes.write_text("my own numbers\n", encoding="utf-8")
    refused = run_cli("compare", "-t", TEXT, "-m", model, "--resamples", "20", "--csv", notes)
    assert refused.code == foretype.OutputError.exit_code and "not replacing it" in refused.err
    assert notes.read_text(encoding="utf-8") == "my own numbers\n"
    as_input = run_cli("compare", "-t", TEXT, "-m", model, "--resamples", "20", "--chart", TEXT)
    assert as_input.code == foretype.OutputError.exit_code and "is also an input" in as_input.err
    table = tmp_path / "table.csv"
    assert run_cli("compare", "-t", TEXT, "-m", model, "--resamples", "20", "--csv", table).code == 0
    assert run_cli("compare", "-t", TEXT, "-m", model, "--resamples", "20", "--csv", table).code == 0  # a comparison replaces a comparison
    to_stdout = run_cli("compare", "-t", TEXT, "-m", model, "--resamples", "20", "--csv", "-")
    assert to_stdout.code == 0 and to_stdout.out == table.read_text(encoding="utf-8")  # the report goes to stderr
    assert "KSR [95%]" in to_stdout.err


def test_the_engine_sweep_keeps_only_the_measurement() -> None:
    import foretype.sweep as engine
    from foretype.cli import sweep_commands

    for name in ("format_table", "parse_vocab_sizes", "parse_methods", "parse_shares"):
        assert not hasattr(engine, name) and callable(getattr(sweep_commands, name))


def test_words_passed_over_are_left_out_unless_asked_to_show_them(run_cli, tmp_path: Path) -> None:
    # The demo corpus and a held-out slice of it: long enough that some list re-offers a passed-over word.
    demo = Path(__file__).resolve().parents[2] / "demo_vocab" / "corpus.txt"
    lines = demo.read_text(encoding="utf-8").splitlines()
    corpus, text = tmp_path / "corpus.txt", tmp_path / "text.txt"
    corpus.write_text("\n".join(lines[:400]) + "\n", encoding="utf-8")
    text.write_text("\n".join(lines[400:440]) + "\n", encoding="utf-8")
    model = tmp_path / "demo.model"
    built = foretype.build([corpus])
    built.save(model)
    settings = {flag: json.loads(run_cli("savings", "-m", model, "-t", text, "-k", "2", flag, "--json").out) for flag in ("--skip-passed", "--no-skip-passed")}
    passage = text.read_text(encoding="utf-8")
    for flag, skip in (("--skip-passed", True), ("--no-skip-passed", False)):
        reference = simulate(built, passage, TypistSettings(k=2, skip_passed=skip))
        assert settings[flag]["keystrokes"] == reference.keystrokes
    default = json.loads(run_cli("savings", "-m", model, "-t", text, "-k", "2", "--json").out)
    assert default["keystrokes"] == settings["--skip-passed"]["keystrokes"] != settings["--no-skip-passed"]["keystrokes"]
