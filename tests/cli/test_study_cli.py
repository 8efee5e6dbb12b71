"""foretype study report: text, --json, the chart, and the simulated savings beside the measured."""

from __future__ import annotations

import json
import shutil
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

HAND_LOG = Path(__file__).parents[1] / "data" / "study-session.jsonl"

CORPUS = "See you at the slipway.\nSee you at the harbour.\nThe ferry is late.\nThe ferry leaves at noon.\nSee you at the slipway!\n"


@pytest.fixture
def tiny_model(tmp_path: Path, run_cli) -> Path:
    corpus = tmp_path / "corpus.txt"
    corpus.write_text(CORPUS, encoding="utf-8")
    model = tmp_path / "tiny.model"
    assert run_cli("build", corpus, "-o", model, "--min-count", "1").code == 0
    return model


def test_report_text_names_the_phrase_cut_short(run_cli) -> None:
    result = run_cli("study", "report", HAND_LOG)
    assert result.code == 0, result.err
    assert "phrase 3 was cut short" in result.out
    assert "last line was incomplete" in result.out
    assert "personal data" in result.out
    # The session row (measures worked by hand in test_study_measures.py): 37 characters, 26 keystrokes, 40.0 WPM.
    session_row = next(line for line in result.out.splitlines() if line.startswith("session ") and "(" not in line)
    assert session_row.split()[1:6] == ["37", "26", "4", "11.5", "40.0"]


def test_report_json_and_chart(run_cli, tmp_path: Path) -> None:
    chart = tmp_path / "rates.svg"
    result = run_cli("study", "report", HAND_LOG, "--json", "--chart", chart)
    assert result.code == 0, result.err
    payload = json.loads(result.out)
    (session,) = payload["sessions"]
    assert session["cut_short"] == [2] and session["torn_last_line"] is True and session["ended"] is False
    assert session["measures"]["wpm"] == pytest.approx(40.0)
    assert session["phrases"][0]["wpm"] == pytest.approx(56.0)
    assert payload["pooled"]["keystrokes"] == 26
    svg = ET.parse(chart).getroot()
    assert svg.tag.endswith("svg")
    # Two submitted phrases with a rate: two filled markers on the entry-rate line, one hollow one for the cut phrase.
    circles = [c for c in svg.iter() if c.tag.endswith("circle")]
    assert sum(1 for c in circles if c.get("fill") != "#ffffff") == 2
    assert sum(1 for c in circles if c.get("fill") == "#ffffff") == 1


def test_compare_equals_foretype_savings_on_the_same_phrase(run_cli, tiny_model: Path, tmp_path: Path) -> None:
    # The report's simulated savings for a phrase must be what `foretype savings` reports for that phrase alone.
    result = run_cli("study", "report", HAND_LOG, "--json", "--compare", "--model", tiny_model)
    assert result.code == 0, result.err
    rows = json.loads(result.out)["sessions"][0]["phrases"]
    phrase = tmp_path / "phrase.txt"
    phrase.write_text(rows[0]["presented"], encoding="utf-8")
    savings = run_cli("savings", "-m", tiny_model, "-t", phrase, "-k", "3", "--json")
    assert savings.code == 0, savings.err
    expected = json.loads(savings.out)
    assert rows[0]["simulated_ksr"] == pytest.approx(expected["ksr"])
    assert rows[0]["simulated_keystrokes"] == pytest.approx(expected["keystrokes"])


def test_report_failures_are_one_line(run_cli, tmp_path: Path) -> None:
    missing = run_cli("study", "report", tmp_path / "nope.jsonl")
    assert missing.code == 3 and missing.err.count("\n") == 1 and "cannot read" in missing.err
    damaged = tmp_path / "damaged.jsonl"
    lines = HAND_LOG.read_text(encoding="utf-8").splitlines()
    damaged.write_text("\n".join(lines[:4] + ["{not json"] + lines[5:20]) + "\n", encoding="utf-8")
    bad = run_cli("study", "report", damaged)
    assert bad.code == 3 and "line 5" in bad.err
    assert run_cli("study", "report", HAND_LOG, "--model", "x.model").code == 2
    shutil.copy(HAND_LOG, tmp_path / "copy.jsonl")
    assert run_cli("study", "report", tmp_path / "copy.jsonl", "--chart", tmp_path / "no" / "such" / "chart.svg").code == 8
