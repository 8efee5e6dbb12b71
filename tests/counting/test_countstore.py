"""Count stores on the single-process path: block reading, checksums, the stored counts, and models built from a store.

Dask paths are in test_countstore_dask.py; both check against the same references.
"""

from __future__ import annotations

import json
import zlib
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

pytest.importorskip("pyarrow")
import pyarrow.parquet as pq  # noqa: E402
from countstore_corpus import write_corpus  # noqa: E402

from foretype.builder import build, build_from_store  # noqa: E402
from foretype.counting.blocks import crc32_combine, plan_blocks, read_block  # noqa: E402
from foretype.counting.store import ROW_GROUP_ROWS, open_count_store  # noqa: E402
from foretype.counting.store_count import count_to_store  # noqa: E402
from foretype.errors import OptionError, OutputError  # noqa: E402
from foretype.text import iter_sentences, model_form  # noqa: E402


@settings(max_examples=60, deadline=None)
@given(st.binary(max_size=300), st.binary(max_size=300))
def test_combined_crc_equals_zlib_crc_of_the_concatenation(first: bytes, second: bytes) -> None:
    # Reference: zlib.crc32 over the whole byte string (the CRC-32 every zip tool reports).
    assert crc32_combine(zlib.crc32(first), zlib.crc32(second), len(second)) == zlib.crc32(first + second)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.text(alphabet="ab é\r", max_size=30), max_size=12), st.booleans(), st.integers(1, 40))
def test_blocks_tile_a_file_in_whole_lines(tmp_path_factory: pytest.TempPathFactory, lines: list[str], final_newline: bool, block: int) -> None:
    text = "\n".join(lines) + ("\n" if final_newline else "")
    path = tmp_path_factory.mktemp("blocks") / "f.txt"
    data = text.encode("utf-8")
    path.write_bytes(data)
    pieces = [read_block(b) for b in plan_blocks([(str(path), len(data))], block)]
    # Brute force: the blocks' texts, in order, are the file; each one is whole lines.
    assert b"".join(p.data for p in pieces) == data
    offset = 0
    for piece in pieces:
        offset += len(piece.data)
        assert piece.data == b"" or piece.data.endswith(b"\n") or offset == len(data)
    crc = 0
    for piece in pieces:
        crc = crc32_combine(crc, piece.crc, piece.length)
    assert crc == zlib.crc32(data)


@pytest.fixture(scope="module")
def corpus(tmp_path_factory: pytest.TempPathFactory) -> list[Path]:
    return write_corpus(tmp_path_factory.mktemp("corpus"))


@pytest.fixture(scope="module")
def line_store(corpus: list[Path], tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("stores") / "lines.counts"
    count_to_store(corpus, out, partition_bytes=4096)
    return out


def _stored_trigrams(store: Path, kind: str) -> Counter:
    words = pq.read_table(store / "vocabulary.parquet").column("word").to_pylist()
    found: Counter = Counter()
    for path in sorted((store / kind).glob("*.parquet")):
        table = pq.read_table(path)
        keys = list(zip(*(table.column(c).to_pylist() for c in ("u", "v", "w"))))
        assert keys == sorted(keys), "a partition is sorted by (u, v, w)"
        for (u, v, w), n in zip(keys, table.column("count").to_pylist()):
            found[(words[u], words[v], words[w])] += n
    return found


def _brute_force(paths: list[Path], wrapped: bool = False) -> tuple[Counter, Counter]:
    """Every trigram of every padded sentence, counted one by one (common practice: <s> <s> w1 .. wn </s>)."""
    table: Counter = Counter()
    heldout: Counter = Counter()
    number = 0
    for path in paths:
        text = path.read_text(encoding="utf-8-sig")
        for sentence in iter_sentences(text, wrapped=wrapped):
            padded = ["<s>", "<s>", *map(model_form, sentence), "</s>"]
            grams = [tuple(padded[i : i + 3]) for i in range(len(padded) - 2)]
            table.update(grams)
            if number % 20 == 19:
                heldout.update(grams)
            number += 1
    return table, heldout


def test_the_store_holds_every_trigram_count_of_the_corpus(line_store: Path, corpus: list[Path]) -> None:
    table, heldout = _brute_force(corpus)
    assert _stored_trigrams(line_store, "trigrams") == table
    assert _stored_trigrams(line_store, "heldout") == heldout
    manifest = json.loads((line_store / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["partitions"] > 1
    assert manifest["trigram_rows"] == len(table)


def test_the_vocabulary_is_numbered_by_count_then_code_point_with_counts_and_display_forms(line_store: Path, corpus: list[Path]) -> None:
    vocabulary = pq.read_table(line_store / "vocabulary.parquet").to_pydict()
    words, counts = vocabulary["word"], vocabulary["count"]
    assert words[:2] == ["<s>", "</s>"]
    assert vocabulary["id"] == list(range(len(words)))
    expected: Counter = Counter()
    sentences = 0
    for path in corpus:
        for sentence in iter_sentences(path.read_text(encoding="utf-8-sig")):
            expected.update(map(model_form, sentence))
            sentences += 1
    assert dict(zip(words[2:], counts[2:])) == dict(expected)
    assert counts[1] == sentences
    assert [(-c, w) for c, w in zip(counts[2:], words[2:])] == sorted((-c, w) for c, w in zip(counts[2:], words[2:]))
    display = dict(zip(words, vocabulary["display"]))
    assert display["nasa"] == "NASA"  # only ever written so, at a sentence start: shown as written
    assert display["the"] == "the"  # "The" at sentence starts, "the" inside sentences
    assert display["saltmarrow"] == "Saltmarrow"


def test_the_manifest_lists_files_with_sizes_and_crcs(line_store: Path, corpus: list[Path]) -> None:
    manifest = json.loads((line_store / "manifest.json").read_text(encoding="utf-8"))
    assert [f["path"] for f in manifest["files"]] == [str(p) for p in corpus]
    for entry, path in zip(manifest["files"], corpus):
        data = path.read_bytes()
        assert entry["bytes"] == len(data)
        assert entry["crc32"] == f"{zlib.crc32(data):08x}"  # reference: zlib
    assert manifest["tokeniser"]["wrapped"] is False
    assert manifest["tokens"] == sum(sum(len(s) for s in iter_sentences(p.read_text(encoding="utf-8-sig"))) for p in corpus)


@pytest.mark.parametrize("method, vocab_size", [("kneser-ney", None), ("linear", 25), ("katz", 40)])
def test_a_model_built_from_the_store_is_the_same_file_as_one_built_from_the_corpus(
    line_store: Path, corpus: list[Path], tmp_path: Path, method: str, vocab_size: int | None
) -> None:
    direct = build(corpus, method=method, vocab_size=vocab_size)
    stored = build_from_store(line_store, method=method, vocab_size=vocab_size)
    direct.save(tmp_path / "direct.model")
    stored.save(tmp_path / "stored.model")
    assert (tmp_path / "direct.model").read_bytes() == (tmp_path / "stored.model").read_bytes()


def test_row_groups_are_fixed_so_a_reader_holds_one_at_a_time(line_store: Path) -> None:
    for path in (line_store / "trigrams").glob("*.parquet"):
        meta = pq.ParquetFile(path).metadata
        assert all(meta.row_group(i).num_rows <= ROW_GROUP_ROWS for i in range(meta.num_row_groups))


def test_the_cli_counts_builds_and_refuses_what_it_must(corpus: list[Path], tmp_path: Path, run_cli) -> None:
    store = tmp_path / "c.counts"
    done = run_cli("count", *corpus, "-o", store, "--wrapped", "--json")
    assert done.code == 0, done.err
    assert json.loads(done.out)["tokens"] > 0
    built = run_cli("build", "--counts", store, "-o", tmp_path / "s.model")
    assert built.code == 0, built.err
    direct = run_cli("build", *corpus, "--wrapped", "-o", tmp_path / "d.model")
    assert direct.code == 0
    assert (tmp_path / "s.model").read_bytes() == (tmp_path / "d.model").read_bytes()
    both = run_cli("build", corpus[0], "--counts", store, "-o", tmp_path / "x.model")
    assert both.code == OptionError.exit_code and both.err.count("\n") == 1
    again = run_cli("build", "--counts", store, "--wrapped", "-o", tmp_path / "x.model")
    assert again.code == OptionError.exit_code
    corpus_file = corpus[0]
    before = corpus_file.read_bytes()
    clobber = run_cli("count", corpus_file, "-o", corpus_file)
    assert clobber.code == OutputError.exit_code and corpus_file.read_bytes() == before
    not_a_store = run_cli("build", "--counts", tmp_path, "-o", tmp_path / "y.model")
    assert not_a_store.code == 5 and "not a count store" in not_a_store.err


def test_a_sweep_from_a_store_measures_what_a_sweep_from_the_corpus_measures(corpus: list[Path], line_store: Path, tmp_path: Path) -> None:
    from foretype.simulate import TypistSettings
    from foretype.sweep import run_sweep

    text = corpus[0].read_text(encoding="utf-8-sig")[:400]
    direct = run_sweep(corpus, text, out=tmp_path / "a", vocab_sizes=[20], settings=TypistSettings())
    stored = run_sweep([], text, out=tmp_path / "b", vocab_sizes=[20], settings=TypistSettings(), counts_store=line_store)
    assert (direct.rows[0].ksr, direct.rows[0].trigrams, direct.rows[0].perplexity) == (stored.rows[0].ksr, stored.rows[0].trigrams, stored.rows[0].perplexity)
    with pytest.raises(OptionError):
        run_sweep([], text, out=tmp_path / "c", vocab_sizes=[20], settings=TypistSettings(wrapped=True), counts_store=line_store)


def test_without_the_cluster_extra_the_store_says_how_to_install_it(monkeypatch: pytest.MonkeyPatch, corpus: list[Path], tmp_path: Path, run_cli) -> None:
    import importlib.util

    real = importlib.util.find_spec
    monkeypatch.setattr(importlib.util, "find_spec", lambda name, *a: None if name in ("dask", "pyarrow") else real(name, *a))
    for args in (("count", corpus[0], "-o", tmp_path / "s"), ("count", corpus[0], "-o", tmp_path / "s", "--workers", "2"), ("build", "--counts", tmp_path, "-o", tmp_path / "m")):
        result = run_cli(*args)
        assert result.code == OptionError.exit_code
        assert result.err.count("\n") == 1 and "pip install 'foretype[cluster]'" in result.err
    assert run_cli("build", corpus[0], "-o", tmp_path / "m.model").code == 0  # everything else works


def test_reading_a_store_streams_within_the_budget(line_store: Path) -> None:
    counts, _ = open_count_store(line_store, max_memory=None)
    chosen = counts.select_vocabulary(10)
    assert len(chosen) == 10
    assert len(counts.table) == sum(1 for _ in _stored_trigrams(line_store, "trigrams"))
    keys = [k for k, _ in counts.table.blocks()]
    assert all(np.all(np.diff(k) > 0) for k in keys)
