"""The learned file on SQLite: durable updates (a process killed at random moments), readers beside the
writer, damage refused in one line, replay, conversion of format-1 files, export, wipe."""

from __future__ import annotations

import json
import os
import random
import shutil
import signal
import sqlite3
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

import foretype
from foretype.adapt import AdaptedModel
from foretype.adapt.learned_db import APPLICATION_ID, SCHEMA_VERSION
from foretype.adapt.store import LearnedFile, export_learned, learned_file_facts, load_learned, save_learned, wipe_learned
from foretype.errors import ModelFileError, OutputError

CORPUS = "the tide is high\nthe ferry sails at dawn\nthe nets are dry\n"
ROOT = Path(__file__).resolve().parents[2]
FORMAT_1 = ROOT / "tests" / "data" / "learned_v1"


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


def written(base: foretype.LanguageModel, path: Path, changes: int, *, compact_every: int = 10**6) -> Path:
    with LearnedFile(path, base, compact_every=compact_every) as learned:
        for i in range(changes):
            words, after, end = update(i)
            learned.learn(words, after=after, end=end)
    return path


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
    script = WRITER.format(root=str(ROOT), tests=str(ROOT / "tests" / "adapt"), corpus=str(corpus), path=str(path))
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
        # The next writer opens what the killed one left (its write-ahead log included) and carries on.
        with LearnedFile(path, base) as learned:
            assert counts(learned.model) == before
        wipe_learned(path)


def test_readers_are_never_blocked_by_the_writer_and_see_its_last_commit(base, tmp_path):
    path = written(base, tmp_path / "x.learned", 3)
    with LearnedFile(path, base, compact_every=2) as learned:
        learned.learn(*update(3)[:1], after=update(3)[1], end=update(3)[2])
        assert counts(load_learned(path, base)) == counts(replayed(base, 4))
        # Another process in the middle of a write transaction (its lock held, rows written, nothing committed).
        other = sqlite3.connect(path, isolation_level=None, timeout=0)
        other.execute("BEGIN IMMEDIATE")
        other.execute("DELETE FROM unigram")
        other.execute("INSERT INTO change (record) VALUES ('{\"kind\": \"forget\", \"word\": \"tide\"}')")
        assert counts(load_learned(path, base)) == counts(replayed(base, 4))
        assert learned_file_facts(path)["exists"]
        other.execute("ROLLBACK")
        other.close()
        learned.learn(*update(4)[:1], after=update(4)[1], end=update(4)[2])  # compacts: rewrites every table
    assert counts(load_learned(path, base)) == counts(replayed(base, 5))


def test_the_file_is_an_sqlite_database_anyone_can_read_with_words_written_out(base, tmp_path):
    path = tmp_path / "x.learned"
    with LearnedFile(path, base, compact_every=3) as learned:
        for i in range(4):
            learned.learn(update(i)[0], after=update(i)[1], end=update(i)[2])
        learned.add_never(["dam*"])
    assert path.read_bytes()[:16] == b"SQLite format 3\x00"  # SQLite file format, section 1.3 (sqlite.org/fileformat.html)
    with sqlite3.connect(path) as conn:
        assert conn.execute("PRAGMA application_id").fetchone()[0] == APPLICATION_ID
        assert conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        kinds = {kind for (kind,) in conn.execute("SELECT type FROM sqlite_schema")}
        tide = conn.execute("SELECT u.uses FROM unigram u JOIN word ON word.id = u.w WHERE word.form = 'tide'").fetchone()[0]
        pending = [json.loads(r) for (r,) in conn.execute("SELECT record FROM change ORDER BY seq")]
        never = [e for (e,) in conn.execute("SELECT entry FROM never_suggest")]
    assert kinds <= {"table", "index"}  # no trigger or view: nothing runs on load
    assert tide == 3  # the first three changes were folded into the counts at the third
    assert [r["kind"] for r in pending] == ["learn", "never"] and pending[1]["add"] == ["dam*"] and never == []
    assert b"pickle" not in path.read_bytes()


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
        written_counts = export_learned(learned.model, export)
    payload = json.loads(export.read_text(encoding="utf-8"))
    assert written_counts["words"] == 2 and {w["word"] for w in payload["words"]} == {"gorbalt", "tide"}
    assert ["gorbalt", "tide"] in [b["words"] for b in payload["bigrams"]]
    assert "stays on this machine" in payload["note"]
    assert wipe_learned(path) and not path.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["export.json"]  # no log, index or lock file left
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


def test_save_replaces_the_whole_state_in_one_step(base, tmp_path):
    path = written(base, tmp_path / "x.learned", 5, compact_every=2)
    assert save_learned(replayed(base, 2), path) > 0
    assert counts(load_learned(path, base)) == counts(replayed(base, 2))
    assert learned_file_facts(path)["changes_since_compaction"] == 0
    fresh = tmp_path / "new.learned"
    save_learned(replayed(base, 7), fresh)
    assert counts(load_learned(fresh, base)) == counts(replayed(base, 7))


# ------------------------------------------------------------------ damage
def refused(path: Path, base: foretype.LanguageModel, pattern: str) -> None:
    """Loading, reading the facts and opening for writing all refuse the file with one line (exit code 5)."""
    for attempt in (lambda: load_learned(path, base), lambda: LearnedFile(path, base).close()):
        with pytest.raises(ModelFileError, match=pattern) as caught:
            attempt()
        assert "\n" not in str(caught.value) and caught.value.exit_code == 5


def test_a_truncated_file_is_refused_at_every_cut(base, tmp_path):
    path = written(base, tmp_path / "x.learned", 12, compact_every=5)
    data = path.read_bytes()
    page = int.from_bytes(data[16:18], "big")  # page size: SQLite file format, section 1.3.2
    cuts = sorted({0, 7, 99, 100, page - 1} | {n * page + d for n in range(1, len(data) // page) for d in (0, 1, page // 2)})
    cut_file = tmp_path / "cut.learned"
    for cut in cuts:
        cut_file.write_bytes(data[:cut])
        refused(cut_file, base, r"(corrupt learned file \(|not a foretype learned file)")
    assert counts(load_learned(path, base)) == counts(replayed(base, 12))


def test_an_overwritten_page_is_refused_or_was_not_in_use(base, tmp_path):
    path = written(base, tmp_path / "x.learned", 12, compact_every=5)
    data = path.read_bytes()
    page = int.from_bytes(data[16:18], "big")
    expected = counts(replayed(base, 12))
    damaged = tmp_path / "damaged.learned"
    outcomes = []
    for n in range(1, len(data) // page):
        scribbled = bytearray(data)
        scribbled[n * page : (n + 1) * page] = random.Random(n).randbytes(page)
        damaged.write_bytes(bytes(scribbled))
        try:
            outcomes.append(counts(load_learned(damaged, base)) == expected)  # a free page: the counts are intact
        except ModelFileError as error:
            assert "\n" not in str(error)
            outcomes.append("refused")
    assert outcomes.count("refused") >= len(outcomes) - 2 and all(o in ("refused", True) for o in outcomes)


def test_files_that_are_not_learned_files_of_this_version_are_refused(base, tmp_path):
    other = tmp_path / "other.db"
    with sqlite3.connect(other) as conn:
        conn.execute("CREATE TABLE t (x)")
    refused(other, base, "not a foretype learned file")
    text = tmp_path / "notes.txt"
    text.write_text("hello\n", encoding="utf-8")
    refused(text, base, "not a foretype learned file")
    newer = written(base, tmp_path / "newer.learned", 2)
    with sqlite3.connect(newer) as conn:
        conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    refused(newer, base, f"schema {SCHEMA_VERSION + 1} is newer than this foretype reads \\({SCHEMA_VERSION}\\); update foretype")
    planted = written(base, tmp_path / "planted.learned", 2)
    with sqlite3.connect(planted) as conn:
        conn.execute("CREATE TRIGGER t AFTER INSERT ON change BEGIN DELETE FROM word; END")
    refused(planted, base, r"corrupt learned file \(unexpected trigger 't' in its schema\)")
    bad_value = written(base, tmp_path / "bad.learned", 2, compact_every=1)
    with sqlite3.connect(bad_value) as conn:
        conn.execute("UPDATE unigram SET count = -1")
    refused(bad_value, base, "corrupt learned file")
    bad_record = written(base, tmp_path / "record.learned", 2)
    with sqlite3.connect(bad_record) as conn:
        conn.execute("INSERT INTO change (record) VALUES ('{\"kind\": \"learn\", \"words\": 3}')")
    refused(bad_record, base, r"corrupt learned file \(change 3: ")


# ------------------------------------------------------------- format 1
def format_1_copy(tmp_path: Path) -> Path:
    path = tmp_path / "chat.model.learned"
    shutil.copyfile(FORMAT_1 / "chat.model.learned", path)
    return path


@pytest.fixture(scope="module")
def format_1_base() -> foretype.LanguageModel:
    return foretype.build([FORMAT_1 / "corpus.txt"])


def as_expected(model: AdaptedModel) -> dict:
    """The figures make_v1.py wrote into expected.json, read from a model."""
    user = model.user
    queries = [((), ""), (("the",), ""), (("the",), "g"), (("the",), "t"), (("at", "dawn"), ""), (("gorbalt",), "s"), ((), "m"), (("the", "ferry"), "")]
    return json.loads(
        json.dumps(
            {
                "words": sorted([form, uses, count, seen] for _, form, count, uses, seen in user.word_rows()),
                "bigrams": sorted([[user.form(i) for i in ids], count, uses, seen] for ids, count, uses, seen in user.ngram_rows(2)),
                "trigrams": sorted([[user.form(i) for i in ids], count, uses, seen] for ids, count, uses, seen in user.ngram_rows(3)),
                "shares": [[user.worth(b), user.evidence(b)] for b in range(3)],
                "tick": user.tick,
                "settings": model.settings.to_json(),
                "never": model.never.entries,
                "displays": user.display_votes(),
                "suggestions": [[list(c), p, [list(s) for s in model.suggest(c, p, k=6)]] for c, p in queries],
            }
        )
    )


def test_a_format_1_file_reads_as_the_code_that_wrote_it_read_it_and_is_converted_once(format_1_base, tmp_path):
    # expected.json: what the journalled store read back from this file (tests/data/learned_v1/make_v1.py).
    expected = json.loads((FORMAT_1 / "expected.json").read_text(encoding="utf-8"))
    path = format_1_copy(tmp_path)
    original = path.read_bytes()
    assert as_expected(load_learned(path, format_1_base)) == expected
    assert path.read_bytes() == original  # a reader converts nothing
    assert learned_file_facts(path)["format"] == "format-1"
    with LearnedFile(path, format_1_base) as learned:
        assert learned.converted_from == path.with_name("chat.model.learned.format-1")
        assert as_expected(learned.model) == expected
    assert path.read_bytes()[:16] == b"SQLite format 3\x00"
    assert learned.converted_from.read_bytes() == original  # the old file is kept, byte for byte
    assert as_expected(load_learned(path, format_1_base)) == expected
    with LearnedFile(path, format_1_base) as learned:
        assert learned.converted_from is None
        learned.learn(["Gorbalt"], after=["the"])
    assert load_learned(path, format_1_base).user.uses(load_learned(path, format_1_base).user.id_of("gorbalt")) == 6
    assert wipe_learned(path) and not learned.converted_from and not path.with_name("chat.model.learned.format-1").exists()


def test_format_1_damage_is_still_refused_and_a_torn_last_line_dropped(format_1_base, tmp_path):
    path = format_1_copy(tmp_path)
    lines = path.read_bytes().split(b"\n")
    torn = tmp_path / "torn.learned"
    torn.write_bytes(b"\n".join(lines[:-2]) + b"\n" + lines[-2][:-7])  # the last complete change torn too
    dropped = load_learned(torn, format_1_base)
    assert dropped.user.uses(dropped.user.id_of("tamsin")) == load_learned(path, format_1_base).user.uses(dropped.user.id_of("tamsin")) - 1
    lines[3] = lines[3].replace(b"w", b"v", 1)
    path.write_bytes(b"\n".join(lines))
    refused(path, format_1_base, r"corrupt learned file \(line 4 fails its checksum\)")
    path.write_bytes(b"foretype-learned 9\nwhatever\n")
    refused(path, format_1_base, "learned file format '9' is not one this engine reads")
