"""The learned file: durable updates (a process killed at random moments), torn tails, replay, errors."""

from __future__ import annotations

import json
import os
import random
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

import foretype
from foretype.adapt import AdaptedModel
from foretype.adapt.store import MAGIC_LINE, LearnedFile, export_learned, learned_file_facts, load_learned, wipe_learned
from foretype.errors import ModelFileError, OutputError

CORPUS = "the tide is high\nthe ferry sails at dawn\nthe nets are dry\n"
ROOT = Path(__file__).resolve().parent.parent


def update(i: int) -> tuple[list[str], list[str], bool]:
    """The i-th change the writer makes: (words, preceding words, sentence ends)."""
    return [f"w{i % 37}", "tide"], ([f"w{(i - 1) % 37}"] if i % 4 else []), i % 3 == 0


def replayed(base: foretype.LanguageModel, changes: int) -> AdaptedModel:
    model = AdaptedModel(base)
    for i in range(changes):
        words, after, end = update(i)
        model.learn(words, after=after, end=end)
    return model


def counts(model: AdaptedModel) -> tuple:
    user = model.user
    words = sorted((form, uses, round(count, 9)) for _, form, count, uses, _ in user.word_rows())
    grams = {order: sorted((tuple(user.form(i) for i in ids), uses) for ids, _, uses, _ in user.ngram_rows(order)) for order in (2, 3)}
    share_statistics = tuple(round(x, 9) for b in range(3) for x in (user.worth(b), user.evidence(b)))
    return words, grams[2], grams[3], share_statistics


@pytest.fixture(scope="module")
def base(tmp_path_factory: pytest.TempPathFactory) -> foretype.LanguageModel:
    path = tmp_path_factory.mktemp("store") / "corpus.txt"
    path.write_text(CORPUS, encoding="utf-8")
    return foretype.build([path])


WRITER = textwrap.dedent(
    """
    import sys
    sys.path.insert(0, {root!r})
    sys.path.insert(0, {tests!r})
    import foretype
    from foretype.adapt.store import LearnedFile
    from test_adapt_store import update
    base = foretype.build([{corpus!r}])
    with LearnedFile({path!r}, base, compact_every=4) as learned:
        print("ready", flush=True)
        i = 0
        while True:
            words, after, end = update(i)
            learned.learn(words, after=after, end=end)
            print(i, flush=True)  # acknowledged: learn() returned, so the change is on disk
            i += 1
    """
)


def test_a_writer_killed_at_random_moments_loses_at_most_the_change_being_written(base, tmp_path):
    corpus = tmp_path / "corpus.txt"
    corpus.write_text(CORPUS, encoding="utf-8")
    path = tmp_path / "chat.model.learned"
    script = WRITER.format(root=str(ROOT), tests=str(ROOT / "tests"), corpus=str(corpus), path=str(path))
    rng = random.Random(20261201)
    for _ in range(6):
        child = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True)
        assert child.stdout is not None
        assert child.stdout.readline().strip() == "ready"
        time.sleep(rng.uniform(0.02, 0.4))
        child.send_signal(signal.SIGKILL)
        output, _ = child.communicate()
        acknowledged = [int(line) for line in output.split()]
        loaded = load_learned(path, base)
        # Every acknowledged change is there; at most the one being written is not (or is, whole).
        before = counts(loaded)
        done = (acknowledged[-1] + 1) if acknowledged else None
        if done is None:
            continue
        assert before in (counts(replayed(base, done)), counts(replayed(base, done + 1)))
        # The next writer repairs a torn tail and carries on from the same state.
        with LearnedFile(path, base) as learned:
            assert counts(learned.model) == before
        path.unlink()


def test_every_torn_last_line_loads_the_changes_before_it(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=10**6) as learned:
        for i in range(12):
            words, after, end = update(i)
            learned.learn(words, after=after, end=end)
    data = path.read_bytes()
    line_ends = [i + 1 for i, byte in enumerate(data) if byte == ord("\n")]
    state_end = line_ends[1]  # magic line, then the state record
    journal_ends = line_ends[2:]
    cuts = sorted(set(journal_ends + [e - 1 for e in journal_ends] + [e - 5 for e in journal_ends] + random.Random(3).sample(range(state_end, len(data)), 25)))
    for cut in cuts:
        torn = tmp_path / "torn.learned"
        torn.write_bytes(data[:cut])
        complete = sum(1 for e in journal_ends if e <= cut)
        assert counts(load_learned(torn, base)) == counts(replayed(base, complete)), cut
    # A writer cuts the torn part off before appending, so the file stays readable.
    torn.write_bytes(data[: journal_ends[5] - 3])
    with LearnedFile(torn, base) as learned:
        words, after, end = update(5)
        learned.learn(words, after=after, end=end)
    assert counts(load_learned(torn, base)) == counts(replayed(base, 6))


def test_a_damaged_line_before_the_end_is_refused_with_one_clear_message(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=10**6) as learned:
        for i in range(4):
            learned.learn(*update(i)[:1], after=update(i)[1])
    lines = path.read_bytes().split(b"\n")
    lines[3] = lines[3].replace(b"w", b"v", 1)
    path.write_bytes(b"\n".join(lines))
    with pytest.raises(ModelFileError, match=r"corrupt learned file \(line 4 fails its checksum\)"):
        load_learned(path, base)
    path.write_bytes(b"FTMODEL\x00 not this")
    with pytest.raises(ModelFileError, match="not a foretype learned file"):
        load_learned(path, base)


def test_the_file_is_plain_checksummed_json_lines_never_pickle(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=3) as learned:
        for i in range(5):
            learned.learn(update(i)[0], after=update(i)[1], end=update(i)[2])
        learned.add_never(["dam*"])
    data = path.read_bytes()
    assert data.startswith(MAGIC_LINE)
    for line in data.decode("utf-8").splitlines()[1:]:
        crc, body = line.split(" ", 1)
        assert len(crc) == 8 and isinstance(json.loads(body), dict)
    assert b"pickle" not in data and b"\x80\x04" not in data


def test_compaction_keeps_everything_and_survives_reloading(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=2) as learned:
        for i in range(9):
            learned.learn(update(i)[0], after=update(i)[1], end=update(i)[2])
        learned.add_never(["W3", "x?"])
        learned.set_learning(False)
        assert learned.learn(["ignored"]) == 0
        expected = counts(learned.model)
    loaded = load_learned(path, base)
    assert counts(loaded) == expected == counts(replayed(base, 9))
    assert loaded.never.entries == ["w3", "x?"] and not loaded.settings.learning
    assert learned_file_facts(path)["changes_since_compaction"] in (0, 1)


def test_one_writer_at_a_time(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base):
        with pytest.raises(OutputError, match="in use by another foretype process"):
            LearnedFile(path, base)
        with pytest.raises(OutputError, match="in use"):
            wipe_learned(path)
    with LearnedFile(path, base) as learned:
        learned.learn(["tide"])


def test_wipe_removes_the_file_and_export_writes_words_not_ids(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base) as learned:
        learned.learn(["Gorbalt", "tide"], end=True)
        learned.learn(["Gorbalt"], end=True)
        export = tmp_path / "export.json"
        written = export_learned(learned.model, export)
    payload = json.loads(export.read_text(encoding="utf-8"))
    assert written["words"] == 2 and {w["word"] for w in payload["words"]} == {"gorbalt", "tide"}
    assert ["gorbalt", "tide"] in [b["words"] for b in payload["bigrams"]]
    assert "stays on this machine" in payload["note"]
    assert wipe_learned(path) and not path.exists()
    assert not wipe_learned(path)
    assert load_learned(path, base).user.raw_tokens == 0


def test_forget_and_prune_are_recorded_and_replayed(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=10**6) as learned:
        for _ in range(3):
            learned.learn(["Gorbalt", "tide"], end=True)
        learned.learn(["rare"], end=True)
        assert learned.forget("gorbalt") and not learned.forget("gorbalt")
        assert learned.prune(below=2) > 0
        expected = counts(learned.model)
    loaded = load_learned(path, base)
    assert counts(loaded) == expected
    assert {form for _, form, _, _, _ in loaded.user.word_rows()} == {"tide"}
    assert os.path.getsize(path) > 0
