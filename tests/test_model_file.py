"""The model file round trip, and what info reports about a model.

Basic round trip only (corruption and fuzzing are covered elsewhere): a saved
and loaded model answers every query exactly as the built one did.  The size
facts are checked against the common-practice statement that a trigram model
over N words has about N^3 parameters (20,000 words: 8 x 10^12).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from public_text import kjv_split, write_lines

import foretype

PROBES = [(), ("the",), ("of", "the"), ("and", "god"), ("said", "unto"), ("zzz",), ("zzz", "the"), (foretype.UNKNOWN, foretype.UNKNOWN)]


@pytest.fixture(scope="module")
def corpus(tmp_path_factory) -> Path:
    train, _ = kjv_split()
    return write_lines(train[:2000], tmp_path_factory.mktemp("kjv") / "train.txt")


@pytest.mark.parametrize("method,encoding", [("kneser-ney", None), ("linear", None), ("katz", None), ("additive", None), ("mle", None), ("kneser-ney", "float32")])
def test_a_saved_and_loaded_model_answers_exactly_as_the_built_one(corpus, tmp_path, method, encoding):
    built = foretype.build([corpus], method=method, encoding=encoding, vocab_size=1500)
    path = tmp_path / "kjv.model"
    size = built.save(path)
    assert size == path.stat().st_size
    loaded = foretype.load(path)
    assert loaded.vocabulary == built.vocabulary
    assert loaded.method == method
    for context in PROBES:
        assert np.array_equal(loaded.distribution(context), built.distribution(context))
        for prefix in ("", "l", "th"):
            assert loaded.suggest(context, prefix, 7) == built.suggest(context, prefix, 7)
    assert [built.vocab.display(i) for i in range(50)] == [loaded.vocab.display(i) for i in range(50)]
    same = {k: v for k, v in built.info().items() if k not in ("file_bytes", "bytes_per_ngram")}
    assert {k: v for k, v in loaded.info().items() if k not in ("file_bytes", "bytes_per_ngram")} == same
    assert loaded.info()["file_bytes"] == size


def test_a_loaded_models_arrays_are_read_only_views_of_the_file(corpus, tmp_path):
    # docs/models.md, "Model files": memory-mapped on load, nothing executed.
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=500).save(path)
    loaded = foretype.load(path)
    assert all(not array.flags.writeable for array in loaded.sections.values())
    assert foretype.verify(path).file_bytes == path.stat().st_size


def test_saving_over_an_existing_model_replaces_it_whole(corpus, tmp_path):
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=100).save(path)
    foretype.build([corpus], vocab_size=300).save(path)
    assert foretype.load(path).vocab_size == 300
    assert [p.name for p in tmp_path.iterdir()] == ["kjv.model"]  # no temporary file left behind


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(
    sentences=st.lists(st.lists(st.sampled_from(["a", "ab", "b", "ba", "Bab", "c", "d'a", "é"]), min_size=1, max_size=6), min_size=1, max_size=25),
    method=st.sampled_from(["kneser-ney", "linear", "katz", "additive", "mle"]),
)
def test_round_trip_keeps_every_distribution_identical(tmp_path, sentences, method):
    source = tmp_path / "corpus.txt"
    source.write_text("\n".join(" ".join(s) for s in sentences) + "\n", encoding="utf-8")
    built = foretype.build([source], method=method)
    path = tmp_path / "round.model"
    built.save(path)
    loaded = foretype.load(path)
    for context in [(), ("a",), ("a", "b"), ("zzz", "a"), ("ba", "bab")]:
        assert np.array_equal(loaded.distribution(context), built.distribution(context))


def test_info_reports_the_n_cubed_possible_trigrams_and_how_few_are_stored(corpus, tmp_path):
    # Fact of the trade (common practice): a trigram model over N words has about N^3 parameters,
    # 20,000 words giving 8 x 10^12.  info reports (V + 2)^3 over the V words, UNKNOWN and END.
    model = foretype.build([corpus])
    info = model.info()
    size = info["vocab_size"]
    assert info["possible_trigrams"] == (size + 2) ** 3
    assert info["possible_trigrams"] == pytest.approx(size**3, rel=0.01)
    stored = info["ngrams"]["3"]
    # Each counted trigram token adds at most one stored trigram: tokens + one END per sentence.
    assert stored <= info["corpus_tokens"] + model.meta["corpus_sentences"]
    assert stored / info["possible_trigrams"] < 1e-4
    assert info["ngrams"]["1"] == size + 2
    assert info["bytes_per_ngram"] == pytest.approx(info["file_bytes"] / sum(info["ngrams"].values()))


def test_info_json_has_the_documented_keys(corpus, tmp_path, run_cli):
    # docs/models.md, "JSON shapes": info.
    path = tmp_path / "kjv.model"
    foretype.build([corpus], vocab_size=800).save(path)
    result = run_cli("info", "-m", path, "--json")
    assert result.code == 0 and result.err == ""
    info = json.loads(result.out)
    for key in ("format_version", "method", "vocab_size", "ngrams", "file_bytes", "bytes_per_ngram", "corpus_tokens"):
        assert key in info
    assert info["format_version"] == foretype.FORMAT_VERSION
    assert info["vocab_size"] == 800
    assert set(info["ngrams"]) == {"1", "2", "3"}
    assert info["file_bytes"] == path.stat().st_size
    assert info["possible_trigrams"] == 802**3
