"""foretype learned and foretype savings --adapt, driven as a user would."""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

import pytest

import foretype
from foretype.adapt.store import load_learned

TEXT = "Gorbalt checked the Quillmere nets.\nGorbalt mended the Quillmere nets at dawn.\nThe tide was high at Vessock.\n"


@pytest.fixture
def model_path(tmp_path: Path) -> Path:
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("the tide is high\nthe ferry sails at dawn\nthe nets are dry\ncheck the nets at dawn\n", encoding="utf-8")
    path = tmp_path / "chat.model"
    foretype.build([corpus]).save(path)
    return path


def test_showing_an_empty_learned_file_says_nothing_is_learned_and_that_it_stays_local(run_cli, model_path):
    result = run_cli("learned", "show", "-m", model_path)
    assert result.code == 0
    assert f"learned file: {model_path}.learned (none yet: nothing learned)" in result.out
    assert "stays on this machine" in result.out and "never sends it anywhere" in result.out


def test_learning_a_file_then_listing_never_suggesting_forgetting_and_exporting(run_cli, model_path, write_file, tmp_path):
    notes = write_file(TEXT, "notes.txt")
    # Two uses before a new word is offered, so only the names typed twice count as suggestable.
    assert run_cli("learned", "set", "-m", model_path, "--min-uses", "2").code == 0
    result = run_cli("learned", "feed", "-m", model_path, notes)
    assert result.code == 0, result.err
    assert "learned 21 tokens (3 sentences)" in result.out  # 5 + 7 + 6 words and 3 sentence ends
    assert "never suggest: added q*, vessock" in run_cli("learned", "block", "-m", model_path, "vessock", "q*").out
    result = run_cli("learned", "forget", "-m", model_path, "dawn")
    assert "forgot 'dawn'" in result.out
    assert "new words    Gorbalt (2), Quillmere (2)" in result.out
    export = tmp_path / "all.json"
    result = run_cli("learned", "export", "-m", model_path, "-o", export, "--json")
    payload = json.loads(result.out)
    assert payload["never_suggest"] == ["q*", "vessock"] and payload["suggestable_new_words"] == 2
    exported = json.loads(export.read_text(encoding="utf-8"))
    assert "dawn" not in {w["word"] for w in exported["words"]} and "gorbalt" in {w["word"] for w in exported["words"]}
    model = load_learned(Path(f"{model_path}.learned"), foretype.load(model_path))
    assert [s.word for s in model.suggest((), "q", 5)] == []  # Quillmere is learned but never shown


def test_learning_off_is_kept_in_the_file_and_wipe_removes_it(run_cli, model_path, write_file):
    notes = write_file(TEXT, "notes.txt")
    assert run_cli("learned", "feed", "-m", model_path, notes).code == 0
    assert "settings: learning off" in run_cli("learned", "off", "-m", model_path).out
    result = run_cli("learned", "set", "-m", model_path, "--min-uses", "3", "--half-life", "2000")
    assert "settings: min uses 3, half life 2000 tokens" in result.out
    assert "learning     off; new words suggested after 3 uses (a possible typo after one more); share rule sharpened; decay half-life 2000 tokens" in result.out
    result = run_cli("learned", "set", "-m", model_path, "--no-hold-slips", "--share-rule", "online")
    assert "settings: hold slips off, share rule online" in result.out
    assert "new words suggested after 3 uses; share rule online;" in result.out
    settings = load_learned(learned_file := Path(f"{model_path}.learned"), foretype.load(model_path)).settings
    assert (settings.hold_slips, settings.share_rule) == (False, "online")
    refused = run_cli("learned", "feed", "-m", model_path, notes)
    assert refused.code == 2 and refused.err.strip() == "foretype: learning is off for this model; switch it on with 'foretype learned on' to learn from a file"
    assert "settings: learning on" in run_cli("learned", "on", "-m", model_path).out
    result = run_cli("learned", "wipe", "-m", model_path)
    assert result.code == 0 and f"removed {learned_file}" in result.out and not learned_file.exists()


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        (["wipe", "--forget", "x"], 2, "foretype: unrecognized arguments: --forget x (see 'foretype learned wipe --help')"),
        (["block", "two words"], 2, "foretype: a never-suggest entry is one word or pattern, without spaces: 'two words'"),
        (["prune", "--below", "0"], 2, "foretype: argument --below: expected a positive number, got '0' (see 'foretype learned prune --help')"),
        (["prune"], 2, "foretype: prune needs --below C, --older-than DAYS or both"),
        (["set"], 2, "foretype: set needs at least one of --min-uses N, --hold-slips/--no-hold-slips, --share-rule RULE, --half-life TOKENS"),
    ],
)
def test_bad_requests_fail_with_one_line_and_a_distinct_code(run_cli, model_path, args, code, message):
    result = run_cli("learned", args[0], "-m", model_path, *args[1:])
    assert result.code == code and result.err.strip() == message and result.out == ""


def test_a_file_that_is_not_a_learned_file_is_refused(run_cli, model_path, write_file):
    other = write_file("hello\n", "other.txt")
    result = run_cli("learned", "show", "-m", model_path, "--user", other)
    assert result.code == 5 and result.err.strip() == f"foretype: {other}: not a foretype learned file"


def test_a_damaged_or_newer_learned_file_is_one_line_and_exit_code_5_for_every_command(run_cli, model_path, write_file):
    notes = write_file(TEXT, "notes.txt")
    assert run_cli("learned", "feed", "-m", model_path, notes).code == 0
    learned_file = Path(f"{model_path}.learned")
    data = learned_file.read_bytes()
    learned_file.write_bytes(data[: len(data) // 2])
    for args in (["learned", "show", "-m", model_path], ["learned", "forget", "-m", model_path, "dawn"], ["suggest", "-m", model_path, "the ", "--adapt"]):
        result = run_cli(*args)
        assert result.code == 5 and result.out == "" and result.err.count("\n") == 1
        assert result.err.startswith(f"foretype: {learned_file}: corrupt learned file (")
    learned_file.write_bytes(data)
    with sqlite3.connect(learned_file) as conn:
        conn.execute("PRAGMA user_version = 7")
    newer = learned_file.read_bytes()
    result = run_cli("learned", "forget", "-m", model_path, "dawn")
    assert result.code == 5 and result.err.strip() == f"foretype: {learned_file}: learned file schema 7 is newer than this foretype reads (1); update foretype"
    assert learned_file.read_bytes() == newer  # refused, not rewritten


def test_a_learned_file_of_the_earlier_format_is_converted_by_the_first_change_and_kept(run_cli, tmp_path):
    # tests/data/learned_v1: a file the journalled store wrote, beside the corpus of its base model.
    source = Path(__file__).resolve().parents[1] / "data" / "learned_v1"
    corpus = tmp_path / "corpus.txt"
    corpus.write_bytes((source / "corpus.txt").read_bytes())
    model = tmp_path / "chat.model"
    foretype.build([corpus]).save(model)
    old = tmp_path / "chat.model.learned"
    old.write_bytes((source / "chat.model.learned").read_bytes())
    shown = run_cli("learned", "show", "-m", model, "--json")
    assert shown.code == 0 and old.read_bytes() == (source / "chat.model.learned").read_bytes()
    result = run_cli("learned", "forget", "-m", model, "quillon")
    assert result.code == 0, result.err
    assert f"converted {old} to the current format; the old file is kept as {old}.format-1" in result.out
    assert Path(f"{old}.format-1").read_bytes() == (source / "chat.model.learned").read_bytes()
    after = json.loads(run_cli("learned", "show", "-m", model, "--json").out)
    before = json.loads(shown.out)
    assert after["tokens"] == before["tokens"] - 4 and after["never_suggest"] == before["never_suggest"] == ["dam*"]


def test_savings_with_adaptation_reports_both_figures_and_leaves_a_given_user_file_alone(run_cli, model_path, write_file, tmp_path):
    text = write_file(TEXT * 6, "test.txt")
    start = tmp_path / "start.learned"
    assert run_cli("learned", "feed", "-m", model_path, "--user", start, write_file(TEXT, "seed.txt")).code == 0
    before = start.read_bytes()
    after = tmp_path / "after.learned"
    result = run_cli("savings", "-m", model_path, "-t", text, "--adapt", "--user", start, "--save-user", after, "--block", "20", "--json")
    assert result.code == 0, result.err
    payload = json.loads(result.out)
    adaptation = payload["adaptation"]
    assert adaptation["ksr_adapted"] == payload["ksr"] > adaptation["ksr_base"]
    assert adaptation["gain"] == pytest.approx(payload["ksr"] - adaptation["ksr_base"])
    assert sum(p["last_word"] - p["first_word"] + 1 for p in adaptation["curve"]) == payload["words"]
    assert start.read_bytes() == before
    assert load_learned(after, foretype.load(model_path)).user.raw_tokens > load_learned(start, foretype.load(model_path)).user.raw_tokens
    text_result = run_cli("savings", "-m", model_path, "-t", text, "--adapt", "--block", "40")
    assert "KSR per block of 40 words (█ with learning, ░ without; full bar = 100%):" in text_result.out
    assert "stays on this machine" in text_result.out


def test_user_files_need_adapt(run_cli, model_path, write_file):
    text = write_file(TEXT, "test.txt")
    result = run_cli("savings", "-m", model_path, "-t", text, "--user", "x.learned")
    assert result.code == 2 and result.err.strip() == "foretype: --user, --save-user and --block go with --adapt"


def test_suggest_with_adapt_answers_as_the_combined_model_and_leaves_the_learned_file_alone(run_cli, model_path, write_file):
    notes = write_file(TEXT * 3, "notes.txt")
    assert run_cli("learned", "feed", "-m", model_path, notes).code == 0
    learned_file = Path(f"{model_path}.learned")
    before = learned_file.read_bytes()
    result = run_cli("suggest", "-m", model_path, "Gorbalt mended the ", "--adapt", "--json")
    assert result.code == 0, result.err
    payload = json.loads(result.out)
    combined = load_learned(learned_file, foretype.load(model_path))
    expected = combined.suggest_text("Gorbalt mended the ", k=5)
    assert [(s["word"], s["prob"], s["order"], s["learned"], s["new_word"]) for s in payload["suggestions"]] == [
        (s.word, s.prob, s.order, s.learned, s.new_word) for s in expected
    ]
    assert ("Quillmere", True) in {(s["word"], s["new_word"]) for s in payload["suggestions"]}
    assert payload["user_share"] == combined.share(["mended", "the"]) > 0
    assert learned_file.read_bytes() == before
    text = run_cli("suggest", "-m", model_path, "Gorbalt mended the Qu", "--adapt")
    assert "Quillmere" in text.out and text.out.splitlines()[2].rstrip().endswith("+")
    assert "63 tokens learned" in text.out  # 3 x (5 + 7 + 6 words and 3 sentence ends)


def test_suggest_with_adapt_and_nothing_learned_is_the_model_alone(run_cli, model_path):
    adapted = json.loads(run_cli("suggest", "-m", model_path, "check the ", "--adapt", "--json").out)
    plain = json.loads(run_cli("suggest", "-m", model_path, "check the ", "--json").out)
    assert [(s["word"], s["prob"], s["order"]) for s in adapted["suggestions"]] == [(s["word"], s["prob"], s["order"]) for s in plain["suggestions"]]
    assert adapted["user_share"] == 0.0 and not Path(f"{model_path}.learned").exists()


def test_a_named_learned_file_that_does_not_exist_is_an_error_not_an_empty_model(run_cli, model_path, write_file, tmp_path):
    missing = tmp_path / "typo.learned"
    for args in (["suggest", "-m", model_path, "the ", "--adapt", "--user", missing], ["savings", "-m", model_path, "-t", write_file(TEXT, "t.txt"), "--adapt", "--user", missing]):
        result = run_cli(*args)
        assert result.code == 5 and result.err.strip() == f"foretype: {missing}: no such learned file" and result.out == ""
        assert not missing.exists()
    refused = run_cli("suggest", "-m", model_path, "the ", "--user", missing)
    assert refused.code == 2 and refused.err.strip() == "foretype: --user goes with --adapt"


def test_the_share_rules_the_command_line_offers_are_the_engines():
    from foretype.adapt.share_rule import SHARE_RULES
    from foretype.cli.learn_commands import SHARE_RULE_NAMES

    assert SHARE_RULE_NAMES == SHARE_RULES
