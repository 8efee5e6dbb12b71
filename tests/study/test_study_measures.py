"""Text-entry measures against worked examples from their published definitions and a log written by hand."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from nltk.metrics.distance import edit_distance

from foretype.study import (
    ErrorCounts,
    SessionLogError,
    SessionLogWriter,
    error_counts,
    minimum_string_distance,
    read_session_log,
    session_report,
    words_per_minute,
)
from foretype.study.log import PhraseLog
from foretype.study.measures import measure_phrase

HAND_LOG = Path(__file__).parents[1] / "data" / "study-session.jsonl"


# --- minimum string distance ------------------------------------------------


def test_msd_worked_examples() -> None:
    # MacKenzie & Soukoreff 2002 (NordiCHI, "A character-level error analysis technique"): P = "quickly",
    # T = "qucehkly", MSD = 3 (from memory; recomputed by hand: delete i, substitute e for c... three edits).
    assert minimum_string_distance("quickly", "qucehkly") == 3
    # The textbook Levenshtein example (Levenshtein 1966 as usually taught; from memory): kitten -> sitting = 3.
    assert minimum_string_distance("kitten", "sitting") == 3
    # Definition edge cases (MacKenzie & Soukoreff 2002): identical strings 0, against empty the other's length.
    assert minimum_string_distance("the quick brown fox", "the quick brown fox") == 0
    assert minimum_string_distance("", "ferry") == 5
    assert minimum_string_distance("ferry", "") == 5


@settings(max_examples=150, deadline=None)
@given(st.text(alphabet="abcé ", max_size=12), st.text(alphabet="abcé ", max_size=12))
def test_msd_equals_a_reference_library(a: str, b: str) -> None:
    # Reference: nltk.metrics.distance.edit_distance (Levenshtein with unit costs).
    assert minimum_string_distance(a, b) == edit_distance(a, b)


# --- entry rate and error rates ----------------------------------------------


def test_entry_rate_worked_example() -> None:
    # Soukoreff & MacKenzie 2003 / MacKenzie's notes on text-entry speed: WPM = (|T| - 1) / S * 60 / 5.
    # Worked by hand: the 43-character "the quick brown fox jumps over the lazy dog" in 10 s: 42 / 10 * 12 = 50.4.
    text = "the quick brown fox jumps over the lazy dog"
    assert len(text) == 43
    assert words_per_minute(len(text), 10.0) == pytest.approx(50.4)
    # Undefined with one character or no time (the first keystroke starts the clock).
    assert words_per_minute(1, 3.0) is None
    assert words_per_minute(10, 0.0) is None


def test_error_rates_worked_example() -> None:
    # Definitions of Soukoreff & MacKenzie (CHI 2003, "Metrics for text entry research"): INF = MSD(P, T),
    # C = max(|P|, |T|) - INF, IF = characters erased; total = (INF + IF) / (C + INF + IF), and so on.
    # Worked by hand on a case like the paper's own (from memory): P = "the quick brown fox", input stream
    # "the quix<ck brpown fox" (x erased, a stray p left in), so T = "the quick brpown fox".
    counts = error_counts("the quick brown fox", "the quick brpown fox", fixed=1)
    assert (counts.correct, counts.incorrect_not_fixed, counts.incorrect_fixed) == (19, 1, 1)
    assert counts.total_error_rate == pytest.approx(2 / 21)  # 9.52%
    assert counts.corrected_error_rate == pytest.approx(1 / 21)
    assert counts.uncorrected_error_rate == pytest.approx(1 / 21)
    assert counts.msd_error_rate == pytest.approx(1 / 20)  # MSD / max(|P|, |T|) = 5%
    # The three rates add up: total = corrected + uncorrected (same paper).
    assert counts.total_error_rate == pytest.approx(counts.corrected_error_rate + counts.uncorrected_error_rate)


def test_error_rates_from_an_input_stream() -> None:
    # The same example typed key by key: 20 characters, the x and one backspace: |IS| = 22 keystrokes, so
    # KSPC = 22 / 20 = 1.1 (KSPC = |IS| / |T|, Soukoreff & MacKenzie 2003).
    presented = "the quick brown fox"
    stream = "the quix<ck brpown fox"
    events, text, t = [], "", 0
    for char in stream:
        t += 300
        if char == "<":
            text = text[:-1]
            events.append({"t": t, "kind": "backspace", "text": text})
        else:
            text += char
            events.append({"t": t, "kind": "key", "char": char, "text": text})
    m = measure_phrase(PhraseLog(index=0, target=presented, events=events, transcribed=text))
    assert m.transcribed == "the quick brpown fox"
    assert (m.keystrokes, m.characters, m.backspaces) == (22, 20, 1)
    assert m.kspc == pytest.approx(1.1)
    assert m.errors == ErrorCounts(19, 1, 1)
    # 21 intervals of 0.3 s: S = 6.3 s, WPM = 19 / 6.3 * 12.
    assert m.seconds == pytest.approx(6.3)
    assert m.wpm == pytest.approx(19 / 6.3 * 12)


# --- the log written by hand -------------------------------------------------


def test_hand_written_log_reads_with_its_torn_line_and_cut_phrase() -> None:
    log = read_session_log(HAND_LOG)
    assert log.torn_last_line
    assert not log.ended
    assert [p.index for p in log.phrases] == [0, 1, 2]
    assert log.cut_short == [2]
    assert log.phrases[2].last_text == "Tw"
    assert log.header["k"] == 3


def test_hand_written_log_measures_worked_by_hand() -> None:
    report = session_report(HAND_LOG)
    first, second, third = report.phrases
    # Phrase 1: "See you at the slipway" (22 characters) with 4 words taken, 6 keys and 1 backspace = 11 keystrokes;
    # first keystroke at 2.0 s, last at 6.5 s: S = 4.5 s, WPM = 21 / 4.5 * 12 = 56.0; KSPC = 0.5, KSR = 50%.
    # The backspace erased the stray "r" (IF = 1); the taken words kept the typed prefixes y and s (no IF).
    assert first.transcribed == "See you at the slipway"
    assert (first.characters, first.keystrokes, first.taken, first.backspaces, first.lists_shown) == (22, 11, 4, 1, 5)
    assert first.seconds == pytest.approx(4.5)
    assert first.wpm == pytest.approx(56.0)
    assert first.kspc == pytest.approx(0.5)
    assert first.ksr == pytest.approx(0.5)
    assert first.errors == ErrorCounts(22, 0, 1)
    assert first.errors.total_error_rate == pytest.approx(1 / 23)
    assert first.errors.uncorrected_error_rate == 0.0
    # Phrase 2: "The tide us low" for "The tide is low": 15 keys from 10.0 s to 17.0 s, WPM = 14 / 7 * 12 = 24.0;
    # one substitution left in: MSD = 1, C = 14, INF = 1, IF = 0; KSPC 1, KSR 0.
    assert second.wpm == pytest.approx(24.0)
    assert second.msd == 1
    assert second.errors == ErrorCounts(14, 1, 0)
    assert second.errors.msd_error_rate == pytest.approx(1 / 15)
    assert second.ksr == pytest.approx(0.0)
    # Phrase 3 was cut short and is left out of the session.
    assert not third.complete
    s = report.session
    assert (s.phrases, s.characters, s.keystrokes, s.taken) == (2, 37, 26, 4)
    assert s.wpm == pytest.approx(40.0)  # mean of 56.0 and 24.0
    assert s.ksr == pytest.approx(11 / 37)
    assert s.errors == ErrorCounts(36, 1, 1)
    assert s.errors.total_error_rate == pytest.approx(2 / 38)
    assert s.errors.msd_error_rate == pytest.approx(1 / 37)


def test_a_take_that_rewrites_the_typed_prefix_counts_what_it_changed() -> None:
    # "fe" typed at a sentence start and "Ferry " taken: the lower-case f is rewritten (IF = 1), e is kept.
    events = [
        {"t": 0, "kind": "key", "char": "f", "text": "f"},
        {"t": 100, "kind": "key", "char": "e", "text": "fe"},
        {"t": 200, "kind": "take", "word": "Ferry", "rank": 1, "erase": 2, "insert": "Ferry ", "text": "Ferry "},
    ]
    m = measure_phrase(PhraseLog(index=0, target="Ferry", events=events, transcribed="Ferry "))
    assert m.errors == ErrorCounts(5, 0, 2)  # "fe" vs "Fe": f differs, so both characters after it count
    assert m.keystrokes == 3 and m.characters == 5


def test_writer_appends_whole_lines_and_reader_refuses_damage_before_the_end(tmp_path: Path) -> None:
    path = tmp_path / "s.jsonl"
    with SessionLogWriter(path, {"session": "x", "k": 5}) as writer:
        writer.write({"t": 5, "kind": "phrase_start", "phrase": 0, "target": "Hi"})
    with SessionLogWriter(path, {"session": "x", "k": 5}) as writer:  # reopened: no second header
        writer.write_many([{"t": 9, "kind": "key", "char": "H", "text": "H"}, {"t": 12, "kind": "phrase_end", "phrase": 0, "text": "H"}])
    lines = path.read_text(encoding="utf-8").splitlines()
    assert len(lines) == 4 and all(json.loads(line) for line in lines)
    log = read_session_log(path)
    assert not log.torn_last_line and log.cut_short == []
    assert log.phrases[0].transcribed == "H"
    # A damaged line that is not the last is refused with its number.
    lines[2] = lines[2][:-3]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    with pytest.raises(SessionLogError, match="line 3"):
        read_session_log(path)
    (tmp_path / "other.jsonl").write_text('{"hello": 1}\n', encoding="utf-8")
    with pytest.raises(SessionLogError, match="not a session log"):
        read_session_log(tmp_path / "other.jsonl")
