"""foretype compare, savings --access scanning and sweep --ksr-interval through the command line.

The figures are checked against the library's own simulation (the
statistics themselves are checked in test_compare_statistics.py and
test_scanning.py); here: outputs agree with each other, files are written
whole, and failures are one line with the documented exit code.
"""

from __future__ import annotations

import csv
import io
import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

import foretype
from foretype.simulate import TypistSettings, simulate
from foretype.sweep import COLUMNS

DEMO = Path(__file__).resolve().parents[2] / "demo_vocab"
SAVINGS = Path(__file__).parents[1] / "data" / "savings"
SCANNING = Path(__file__).parents[1] / "data" / "scanning"


@pytest.fixture(scope="module")
def files(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("compare")
    corpus = folder / "corpus.txt"
    corpus.write_text("".join((DEMO / "corpus.txt").read_text(encoding="utf-8").splitlines(keepends=True)[:3000]), encoding="utf-8")
    test = folder / "test.txt"
    test.write_text("".join((DEMO / "heldout.txt").read_text(encoding="utf-8").splitlines(keepends=True)[:50]), encoding="utf-8")
    foretype.build([corpus], method="kneser-ney").save(folder / "kn.model")
    foretype.build([corpus], method="katz").save(folder / "katz.model")
    return {"corpus": corpus, "test": test, "kn": folder / "kn.model", "katz": folder / "katz.model", "folder": folder}


def test_compare_prints_json_csv_and_a_chart_that_agree(run_cli, files: dict[str, Path], tmp_path: Path) -> None:
    table, chart = tmp_path / "summary.csv", tmp_path / "chart.svg"
    result = run_cli("compare", "-t", files["test"], "-m", files["kn"], "-m", files["katz"], "-k", "3", "--resamples", "300", "--csv", table, "--chart", chart, "--json")
    assert result.code == 0, result.err
    data = json.loads(result.out)
    assert [s["label"] for s in data["systems"]] == ["kn", "katz"]
    expected = simulate(foretype.load(files["kn"]), files["test"].read_text(encoding="utf-8"), TypistSettings(k=3)).ksr
    assert data["systems"][0]["ksr"]["value"] == pytest.approx(expected)
    assert data["systems"][0]["ksr"]["low"] <= expected <= data["systems"][0]["ksr"]["high"]
    (pair,) = [p for p in data["pairs"] if p["measure"] == "ksr"]
    assert pair["difference"] == pytest.approx(data["systems"][0]["ksr"]["value"] - data["systems"][1]["ksr"]["value"])
    assert 0 <= pair["p_value"] <= 1
    rows = list(csv.DictReader(io.StringIO(table.read_text(encoding="utf-8"))))
    assert {(r["kind"], r["system"], r["measure"]) for r in rows} >= {("system", "kn", "ksr"), ("pair", "kn", "perplexity")}
    ksr_row = next(r for r in rows if r["kind"] == "system" and r["system"] == "katz" and r["measure"] == "ksr")
    assert float(ksr_row["value"]) == data["systems"][1]["ksr"]["value"]
    root = ET.fromstring(chart.read_text(encoding="utf-8"))
    assert root.tag.endswith("svg") and "katz" in chart.read_text(encoding="utf-8")


def test_compare_text_table_runs_several_list_sizes_of_one_model(run_cli, files: dict[str, Path], tmp_path: Path) -> None:
    sentences = tmp_path / "sentences.csv"
    result = run_cli("compare", "-t", files["test"], "-m", files["kn"], "-k", "1,4", "--resamples", "200", "--sentences", sentences)
    assert result.code == 0, result.err
    assert "kn k=1" in result.out and "kn k=4" in result.out
    assert "the same for every system: perplexity" in result.out  # one model: perplexity cannot differ
    rows = list(csv.DictReader(io.StringIO(sentences.read_text(encoding="utf-8"))))
    per_system = {label: sum(float(r["characters"]) for r in rows if r["system"] == label) for label in ("kn k=1", "kn k=4")}
    assert per_system["kn k=1"] == per_system["kn k=4"] == len(files["test"].read_text(encoding="utf-8"))


def test_compare_with_the_same_seed_prints_the_same_result(run_cli, files: dict[str, Path]) -> None:
    args = ("compare", "-t", files["test"], "-m", files["kn"], "-m", files["katz"], "--resamples", "200", "--seed", "4", "--significance", "randomisation", "--json")
    first, second = run_cli(*args), run_cli(*args)
    assert first.code == second.code == 0
    assert first.out == second.out
    assert json.loads(first.out)["test"] == "randomisation"


def test_compare_scanning_reports_steps_per_character_with_intervals(run_cli, files: dict[str, Path]) -> None:
    result = run_cli("compare", "-t", files["test"], "-m", files["kn"], "-k", "2,6", "--access", "scanning", "--list-position", "first", "--resamples", "200", "--json")
    assert result.code == 0, result.err
    data = json.loads(result.out)
    assert data["access"] == "scanning"
    for system in data["systems"]:
        spc = system["scan_steps_per_char"]
        assert spc["low"] <= spc["value"] <= spc["high"]
        assert system["scanning"]["list_position"] == "first"


@pytest.mark.parametrize(
    ("extra", "code", "words"),
    [
        (("-m", "missing.model"), 5, "missing.model"),
        (("--resamples", "0"), 2, "resamples"),
        (("--confidence", "1.5"), 2, "confidence"),
        (("--access", "scanning", "--layout", "bad-grid.txt"), 2, "not a cell"),
    ],
)
def test_compare_failures_are_one_line_with_their_exit_code(run_cli, files: dict[str, Path], extra: tuple[str, ...], code: int, words: str, monkeypatch: pytest.MonkeyPatch) -> None:
    (files["folder"] / "bad-grid.txt").write_text("a bb\n", encoding="utf-8")
    monkeypatch.chdir(files["folder"])
    args = ("compare", "-t", files["test"], *extra) if extra[0] == "-m" else ("compare", "-t", files["test"], "-m", files["kn"], *extra)
    result = run_cli(*args)
    assert result.code == code
    assert words in result.err and len(result.err.strip().splitlines()) == 1


def test_savings_with_scanning_prints_both_sides(run_cli, tmp_path: Path) -> None:
    path = tmp_path / "worked.model"
    foretype.build([SAVINGS / "worked-corpus.txt"], method="mle").save(path)
    args = ("savings", "-m", path, "-t", SAVINGS / "worked-text.txt", "-k", "2", "--text-mode", "words", "--access", "scanning", "--layout", SCANNING / "worked-grid.txt")
    data = json.loads(run_cli(*args, "--json").out)
    assert data["scan_steps"] == 90 and data["scan_steps_unaided"] == 191  # the hand count of test_scanning.py
    text = run_cli(*args).out
    assert "scan steps per character" in text and "1.915" in text and "4.064" in text
    refused = run_cli(*args, "--trace", tmp_path / "t.jsonl")
    assert refused.code == 2 and "scanning" in refused.err


def test_sweep_rows_carry_a_ksr_interval_and_scanning_columns(run_cli, files: dict[str, Path], tmp_path: Path) -> None:
    out = tmp_path / "sweep"
    result = run_cli("sweep", files["corpus"], "--test", files["test"], "--vocab-sizes", "300,1000", "-o", out, "--ksr-interval", "200", "--access", "scanning", "--json")
    assert result.code == 0, result.err
    rows = json.loads(result.out)["rows"]
    for row in rows:
        assert row["ksr_low"] <= row["ksr"] <= row["ksr_high"]
        assert row["scan_steps_per_char"] < row["scan_steps_per_char_unaided"]
    with (out / "sweep.csv").open(encoding="utf-8", newline="") as handle:
        assert tuple(next(csv.reader(handle))) == COLUMNS
    svg = (out / "sweep.svg").read_text(encoding="utf-8")
    assert "95% interval" in svg
