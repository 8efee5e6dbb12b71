"""`foretype savings` and `foretype sweep` as a user runs them: reports, files, and one-line errors."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

import foretype
from foretype.simulate import REPORT_KEYS

DATA = Path(__file__).parents[1] / "data" / "savings"


def run_main(capsys: pytest.CaptureFixture[str], *args: object) -> tuple[int, str]:
    """Run the command line in-process, counting argparse's exit as an exit code; returns (code, stderr)."""
    from foretype.cli import main

    capsys.readouterr()
    try:
        code = main([str(a) for a in args])
    except SystemExit as stop:
        code = int(stop.code or 0)
    return code, capsys.readouterr().err


@pytest.fixture(scope="module")
def worked_model_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("model") / "worked.model"
    foretype.build([DATA / "worked-corpus.txt"], method="mle").save(path)
    return path


def test_savings_prints_the_hand_counted_figures_and_the_estimate_note(run_cli, worked_model_file: Path) -> None:
    result = run_cli("savings", "-m", worked_model_file, "-t", DATA / "worked-text.txt", "-k", "2")
    assert result.code == 0, result.err
    assert "58.0%" in result.out  # KSR counted by hand (docs/savings.md worked example)
    assert "60.0%" in result.out  # oracle
    assert "48.0%" in result.out  # frequency-list baseline
    assert "not a clinical assessment" in result.out


def test_savings_json_has_every_documented_key(run_cli, worked_model_file: Path) -> None:
    result = run_cli("savings", "-m", worked_model_file, "-t", DATA / "worked-text.txt", "-k", "2", "--json")
    assert result.code == 0, result.err
    payload = json.loads(result.out)
    assert set(REPORT_KEYS) <= set(payload)
    assert payload["keystrokes"] == 21 and payload["characters"] == 50
    assert set(payload["latency_us"]) == {"p50", "p95", "p99", "max"}
    assert payload["latency_us"]["p50"] <= payload["latency_us"]["p99"] <= payload["latency_us"]["max"]
    assert payload["entry_rate"]["speedup"] == pytest.approx(50 / 26.5)


def test_savings_trace_writes_one_json_line_per_word(run_cli, worked_model_file: Path, tmp_path: Path) -> None:
    trace = tmp_path / "words.jsonl"
    result = run_cli("savings", "-m", worked_model_file, "-t", DATA / "worked-text.txt", "-k", "2", "--trace", trace)
    assert result.code == 0, result.err
    lines = [json.loads(line) for line in trace.read_text(encoding="utf-8").splitlines()]
    assert [line["word"] for line in lines] == ["The", "ferry", "is", "late", "Maren", "See", "you", "at", "the", "slipway"]
    assert lines[-1] == {"word": "slipway", "keystrokes": 4.0, "picked_at": "s", "rank": 1, "shown": [["ferry", "harbour"], ["slipway", "see"]], "in_vocabulary": True}
    assert lines[4]["picked_at"] is None and lines[4]["in_vocabulary"] is False


@pytest.mark.parametrize(
    ("arguments", "code", "message"),
    [
        (["-k", "0"], 2, "must be at least 1"),
        (["-k", "-3"], 2, "must be at least 1"),
        (["--select-cost", "-1"], 2, "select cost"),
        (["--min-prefix", "-1"], 2, "minimum prefix"),
        (["--key-seconds", "0"], 2, "seconds per key"),
        (["--text-mode", "letters"], 2, "invalid choice"),
    ],
)
def test_savings_rejects_bad_options_in_one_line(capsys, worked_model_file: Path, arguments: list[str], code: int, message: str) -> None:
    status, err = run_main(capsys, "savings", "-m", worked_model_file, "-t", DATA / "worked-text.txt", *arguments)
    assert status == code
    assert message in err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err


@pytest.mark.parametrize("content", ["", "\n\n", "... !!! ,,, ?\n— « »\n"])
def test_savings_rejects_a_test_file_without_words(run_cli, worked_model_file: Path, write_file, content: str) -> None:
    empty = write_file(content, "empty.txt")
    result = run_cli("savings", "-m", worked_model_file, "-t", empty)
    assert result.code == foretype.CorpusError.exit_code
    assert result.err.strip() == f"foretype: {empty}: holds no words"


def test_savings_rejects_an_unwritable_trace_before_simulating(run_cli, worked_model_file: Path, tmp_path: Path) -> None:
    result = run_cli("savings", "-m", worked_model_file, "-t", DATA / "worked-text.txt", "--trace", tmp_path / "missing" / "t.jsonl")
    assert result.code == foretype.OutputError.exit_code
    assert "cannot write" in result.err and len(result.err.strip().splitlines()) == 1


def test_savings_names_a_missing_test_file(run_cli, worked_model_file: Path, tmp_path: Path) -> None:
    result = run_cli("savings", "-m", worked_model_file, "-t", tmp_path / "nope.txt")
    assert result.code == foretype.CorpusError.exit_code
    assert "nope.txt" in result.err and len(result.err.strip().splitlines()) == 1


def test_sweep_rejects_an_unknown_method(run_cli, tmp_path: Path) -> None:
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", DATA / "worked-text.txt", "--methods", "kneser-ney,guesswork", "-o", tmp_path / "out")
    assert result.code == foretype.OptionError.exit_code
    assert "unknown method 'guesswork'" in result.err and len(result.err.strip().splitlines()) == 1
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("sizes", ["0,100", "100,ten", ","])
def test_sweep_rejects_bad_vocabulary_sizes(run_cli, tmp_path: Path, sizes: str) -> None:
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", DATA / "worked-text.txt", "--vocab-sizes", sizes, "-o", tmp_path / "out")
    assert result.code == foretype.OptionError.exit_code
    assert "--vocab-sizes" in result.err and len(result.err.strip().splitlines()) == 1


def test_sweep_rejects_an_unwritable_output_folder(run_cli, tmp_path: Path) -> None:
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder\n", encoding="utf-8")
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", DATA / "worked-text.txt", "--vocab-sizes", "5", "-o", blocker / "out")
    assert result.code == foretype.OutputError.exit_code
    assert "cannot create the output folder" in result.err and len(result.err.strip().splitlines()) == 1


def test_sweep_rejects_a_test_file_without_words(run_cli, write_file, tmp_path: Path) -> None:
    empty = write_file("?!\n", "empty.txt")
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", empty, "-o", tmp_path / "out")
    assert result.code == foretype.CorpusError.exit_code
    assert result.err.strip() == f"foretype: {empty}: holds no words"


def test_sweep_prints_the_table_and_writes_its_files(run_cli, tmp_path: Path) -> None:
    out = tmp_path / "sweep"
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", DATA / "worked-text.txt", "--vocab-sizes", "4,13", "-k", "2", "-o", out)
    assert result.code == 0, result.err
    assert "KSR" in result.out and "oracle" in result.out
    rows = json.loads((out / "sweep.json").read_text(encoding="utf-8"))["rows"]
    assert [r["vocab_size"] for r in rows] == [4, 13]
    # The full-vocabulary row is the worked example's model family (KN here): its oracle is the hand-counted 60%.
    assert rows[1]["oracle_ksr"] == pytest.approx(1 - 20 / 50)
    assert (out / "kneser-ney-v13.model").exists()


def test_sweep_with_adapt_adds_the_learning_columns_to_the_table(run_cli, tmp_path: Path) -> None:
    out = tmp_path / "sweep"
    result = run_cli("sweep", DATA / "worked-corpus.txt", "--test", DATA / "worked-text.txt", "--vocab-sizes", "4,13", "-k", "2", "-o", out, "--adapt")
    assert result.code == 0, result.err
    header = result.out.splitlines()[1]
    assert "learning KSR" in header and "learning p99 µs" in header
    rows = json.loads((out / "sweep.json").read_text(encoding="utf-8"))["rows"]
    assert all(0.0 <= r["adapted_ksr"] <= 1.0 for r in rows)
    # The worked text repeats words the 4-word vocabulary lacks; once learned they are suggested, so savings rise.
    assert rows[0]["adapted_ksr"] >= rows[0]["ksr"]
