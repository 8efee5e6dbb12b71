"""The text-entry measures of a copy task, per phrase and per session.

With P the presented phrase and T the transcribed text (as submitted, less any
trailing spaces: the space a suggestion writes after the last word is not part
of the transcription):

* entry rate, WPM = (|T| − 1) / S × 60 / 5, S the seconds from the first to the
  last keystroke of the phrase (the first character starts the clock, so it is
  not counted); five characters make a word;
* keystrokes per character, KSPC = keystrokes / |T|, and keystroke savings,
  KSR = 1 − keystrokes / |T|; a keystroke is a key, a backspace or a
  suggestion taken (one, whatever its rank);
* minimum string distance error rate = MSD(P, T) / max(|P|, |T|), MSD the
  Levenshtein distance (MacKenzie & Soukoreff 2002);
* total, corrected and uncorrected error rates after Soukoreff & MacKenzie
  (CHI 2003): with INF = MSD(P, T) (incorrect and not fixed), C = max(|P|, |T|)
  − INF (correct) and IF the characters entered and later erased (incorrect but
  fixed), total = (INF + IF) / (C + INF + IF), corrected = IF / (C + INF + IF),
  uncorrected = INF / (C + INF + IF).  As in that paper's basic method, every
  erased character counts as IF, whether or not it was wrong; a typed prefix
  that a taken suggestion rewrites counts only where the word changes it, and
  the automatic space a mark replaces is the page's, not the participant's.

A session pools its submitted phrases: the sums of keystrokes, characters and
error counts give its ratios, and its entry rate is the mean of its phrases'.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from .log import KEYSTROKE_KINDS, PhraseLog


def minimum_string_distance(presented: str, transcribed: str) -> int:
    """The Levenshtein distance: the fewest insertions, deletions and substitutions turning one string into the other.

    Args:
        presented: P.
        transcribed: T.

    Returns:
        MSD(P, T), a whole number from 0 to max(|P|, |T|).
    """
    if len(presented) < len(transcribed):
        presented, transcribed = transcribed, presented
    if not transcribed:
        return len(presented)
    codes = np.array([ord(c) for c in transcribed], dtype=np.int64)
    row = np.arange(len(transcribed) + 1, dtype=np.int64)
    for i, char in enumerate(presented, start=1):
        # Deletions and substitutions vectorised; insertions need a running minimum along the row.
        diagonal = row[:-1] + (codes != ord(char))
        above = row[1:] + 1
        best = np.minimum(diagonal, above)
        new = np.empty_like(row)
        new[0] = i
        new[1:] = best
        # new[j] = min(best[j], new[j-1] + 1): a prefix minimum of (new[j] - j), plus j.
        offsets = np.arange(len(new), dtype=np.int64)
        new = np.minimum.accumulate(new - offsets) + offsets
        row = new
    return int(row[-1])


def words_per_minute(characters: int, seconds: float) -> float | None:
    """Entry rate: (|T| − 1) / S × 60 / 5.

    Args:
        characters: |T|.
        seconds: S, first to last keystroke.

    Returns:
        Words per minute, or None when it is undefined (under two characters or no time).
    """
    if characters < 2 or seconds <= 0:
        return None
    return (characters - 1) / seconds * 60.0 / 5.0


@dataclass(frozen=True)
class ErrorCounts:
    """The character classes of Soukoreff & MacKenzie (2003) for one or more phrases.

    Attributes:
        correct: C.
        incorrect_not_fixed: INF, equal to MSD(P, T).
        incorrect_fixed: IF, characters entered and later erased.
        longer: max(|P|, |T|), the MSD error rate's denominator (C + INF).
    """

    correct: int
    incorrect_not_fixed: int
    incorrect_fixed: int

    @property
    def longer(self) -> int:
        """max(|P|, |T|) summed over the phrases."""
        return self.correct + self.incorrect_not_fixed

    def _share(self, part: int) -> float | None:
        whole = self.correct + self.incorrect_not_fixed + self.incorrect_fixed
        return part / whole if whole else None

    @property
    def total_error_rate(self) -> float | None:
        """(INF + IF) / (C + INF + IF)."""
        return self._share(self.incorrect_not_fixed + self.incorrect_fixed)

    @property
    def corrected_error_rate(self) -> float | None:
        """IF / (C + INF + IF)."""
        return self._share(self.incorrect_fixed)

    @property
    def uncorrected_error_rate(self) -> float | None:
        """INF / (C + INF + IF)."""
        return self._share(self.incorrect_not_fixed)

    @property
    def msd_error_rate(self) -> float | None:
        """MSD(P, T) / max(|P|, |T|)."""
        return self.incorrect_not_fixed / self.longer if self.longer else None

    def __add__(self, other: ErrorCounts) -> ErrorCounts:
        return ErrorCounts(
            self.correct + other.correct,
            self.incorrect_not_fixed + other.incorrect_not_fixed,
            self.incorrect_fixed + other.incorrect_fixed,
        )


def error_counts(presented: str, transcribed: str, fixed: int) -> ErrorCounts:
    """C, INF and IF for one phrase.

    Args:
        presented: P.
        transcribed: T.
        fixed: IF, the characters erased while entering T.
    """
    distance = minimum_string_distance(presented, transcribed)
    return ErrorCounts(max(len(presented), len(transcribed)) - distance, distance, fixed)


def erased_characters(events: Sequence[dict[str, Any]], start_text: str = "") -> int:
    """IF: the characters a participant erased, from the ``text`` each event left.

    A backspace erases what it removed; a taken suggestion erases the part of
    the typed prefix it rewrote (``erase`` characters less those its ``insert``
    keeps as they were); a key erases nothing of the participant's (a mark
    that replaces the automatic space after a taken word removes the page's
    space).

    Args:
        events: a phrase's events in order.
        start_text: the text when the phrase started.
    """
    text = start_text
    erased = 0
    for event in events:
        kind = event["kind"]
        if kind == "backspace":
            erased += max(0, len(text) - len(event["text"]))
        elif kind == "take":
            count = min(int(event["erase"]), len(text))
            removed = text[len(text) - count :]
            kept = 0
            for a, b in zip(removed, event["insert"]):
                if a != b:
                    break
                kept += 1
            erased += count - kept
        if "text" in event:
            text = event["text"]
    return erased


@dataclass(frozen=True)
class PhraseMeasures:
    """What one phrase of a copy task measured.

    Attributes:
        index: the phrase's 0-based place in the session.
        presented: P.
        transcribed: T (trailing spaces removed); for a phrase cut short, the text last logged.
        complete: the phrase was submitted.
        characters: |T|.
        keystrokes: keys, backspaces and suggestions taken.
        backspaces: backspace keystrokes (the fixes).
        taken: suggestions taken.
        lists_shown: suggestion lists shown.
        seconds: first to last keystroke (0 with fewer than two keystrokes).
        wpm: entry rate, or None when undefined.
        kspc: keystrokes per character, or None when T is empty.
        ksr: keystroke savings, or None when T is empty.
        msd: MSD(P, T).
        errors: C, INF, IF.
    """

    index: int
    presented: str
    transcribed: str
    complete: bool
    characters: int
    keystrokes: int
    backspaces: int
    taken: int
    lists_shown: int
    seconds: float
    wpm: float | None
    kspc: float | None
    ksr: float | None
    msd: int
    errors: ErrorCounts

    def to_json(self) -> dict[str, Any]:
        """The measures as one JSON object (error rates as fractions, not percent)."""
        data = asdict(self)
        errors = data.pop("errors")
        data.update(
            correct=errors["correct"],
            incorrect_not_fixed=errors["incorrect_not_fixed"],
            incorrect_fixed=errors["incorrect_fixed"],
            msd_error_rate=self.errors.msd_error_rate,
            total_error_rate=self.errors.total_error_rate,
            corrected_error_rate=self.errors.corrected_error_rate,
            uncorrected_error_rate=self.errors.uncorrected_error_rate,
        )
        return data


def measure_phrase(phrase: PhraseLog) -> PhraseMeasures:
    """Compute a phrase's measures from its logged events."""
    events = phrase.events
    strokes = [e for e in events if e["kind"] in KEYSTROKE_KINDS]
    transcribed = phrase.last_text.rstrip(" ")
    characters = len(transcribed)
    keystrokes = len(strokes)
    seconds = (float(strokes[-1]["t"]) - float(strokes[0]["t"])) / 1000.0 if len(strokes) > 1 else 0.0
    return PhraseMeasures(
        index=phrase.index,
        presented=phrase.target,
        transcribed=transcribed,
        complete=phrase.complete,
        characters=characters,
        keystrokes=keystrokes,
        backspaces=sum(1 for e in strokes if e["kind"] == "backspace"),
        taken=sum(1 for e in strokes if e["kind"] == "take"),
        lists_shown=sum(1 for e in events if e["kind"] == "list"),
        seconds=seconds,
        wpm=words_per_minute(characters, seconds),
        kspc=keystrokes / characters if characters else None,
        ksr=1.0 - keystrokes / characters if characters else None,
        msd=minimum_string_distance(phrase.target, transcribed),
        errors=error_counts(phrase.target, transcribed, erased_characters(events)),
    )


@dataclass(frozen=True)
class SessionMeasures:
    """A session's measures, pooled over its submitted phrases.

    Attributes:
        phrases: submitted phrases.
        characters: sum of |T|.
        keystrokes: sum of keystrokes.
        taken: suggestions taken.
        seconds: sum of the phrases' S.
        wpm: mean of the phrases' entry rates (None when none has one).
        kspc: keystrokes / characters.
        ksr: 1 − keystrokes / characters.
        errors: C, INF and IF summed.
    """

    phrases: int
    characters: int
    keystrokes: int
    taken: int
    seconds: float
    wpm: float | None
    kspc: float | None
    ksr: float | None
    errors: ErrorCounts

    def to_json(self) -> dict[str, Any]:
        """The measures as one JSON object (error rates as fractions)."""
        data = asdict(self)
        data.pop("errors")
        data.update(
            correct=self.errors.correct,
            incorrect_not_fixed=self.errors.incorrect_not_fixed,
            incorrect_fixed=self.errors.incorrect_fixed,
            msd_error_rate=self.errors.msd_error_rate,
            total_error_rate=self.errors.total_error_rate,
            corrected_error_rate=self.errors.corrected_error_rate,
            uncorrected_error_rate=self.errors.uncorrected_error_rate,
        )
        return data


def pool_phrases(measures: Sequence[PhraseMeasures]) -> SessionMeasures:
    """Pool the submitted phrases of a session (phrases cut short are left out)."""
    done = [m for m in measures if m.complete]
    characters = sum(m.characters for m in done)
    keystrokes = sum(m.keystrokes for m in done)
    rates = [m.wpm for m in done if m.wpm is not None]
    errors = ErrorCounts(0, 0, 0)
    for m in done:
        errors = errors + m.errors
    return SessionMeasures(
        phrases=len(done),
        characters=characters,
        keystrokes=keystrokes,
        taken=sum(m.taken for m in done),
        seconds=sum(m.seconds for m in done),
        wpm=sum(rates) / len(rates) if rates else None,
        kspc=keystrokes / characters if characters else None,
        ksr=1.0 - keystrokes / characters if characters else None,
        errors=errors,
    )
