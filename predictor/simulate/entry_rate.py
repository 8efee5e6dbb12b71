"""A keystroke-level estimate of entry time with and without prediction.

In the style of Koester & Levine's keystroke-level models of word-prediction
interfaces (1990s; from memory): every keystroke (a pick counts as its select
cost in keystrokes) takes ``key_seconds``, and every time the typist reads a
suggestion list that has changed costs ``scan_seconds``.  Without prediction
every character is a keystroke and there is no list to read.  Words per minute
use the common five characters per word.

Savings in keystrokes are not savings in time: reading lists costs time, so a
model can save keystrokes and still slow a typist down.  These are estimates
for comparing models, not a clinical assessment of anyone's needs.
"""

from __future__ import annotations

from typing import Any

CHARACTERS_PER_WORD = 5
"""Characters per word in words-per-minute figures (common practice)."""


def words_per_minute(characters: int, seconds: float) -> float | None:
    """Entry rate in words of five characters per minute (None when no time passes)."""
    if seconds <= 0:
        return None
    return characters / CHARACTERS_PER_WORD / (seconds / 60.0)


def entry_rate(characters: int, keystrokes: float, list_reads: int, *, key_seconds: float, scan_seconds: float) -> dict[str, Any]:
    """Estimate the time to enter a text with and without prediction.

    Args:
        characters: characters of the text.
        keystrokes: keystrokes spent with prediction.
        list_reads: changed suggestion lists the typist read.
        key_seconds: seconds per keystroke.
        scan_seconds: seconds per list read.

    Returns:
        ``key_seconds``, ``scan_seconds``, ``list_reads``,
        ``seconds_with_prediction``, ``seconds_without_prediction``,
        ``wpm_with_prediction``, ``wpm_without_prediction``, and ``speedup``
        (time without / time with: above 1 means prediction is faster; None
        when the time with prediction is 0).
    """
    with_prediction = keystrokes * key_seconds + list_reads * scan_seconds
    without_prediction = characters * key_seconds
    return {
        "key_seconds": key_seconds,
        "scan_seconds": scan_seconds,
        "list_reads": list_reads,
        "seconds_with_prediction": with_prediction,
        "seconds_without_prediction": without_prediction,
        "wpm_with_prediction": words_per_minute(characters, with_prediction),
        "wpm_without_prediction": words_per_minute(characters, without_prediction),
        "speedup": without_prediction / with_prediction if with_prediction > 0 else None,
    }
