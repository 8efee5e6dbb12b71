"""Everything a combined model learned, written out as plain JSON (words, never ids)."""

from __future__ import annotations

import json
import os
from typing import BinaryIO

from ..outputs import write_output
from .combined import AdaptedModel

PRIVACY_NOTE = (
    "A learned file holds personal text (the words and phrases typed). "
    "It stays on this machine: foretype never sends it anywhere. Inspect it with 'foretype learned', "
    "export it, prune it, or wipe it."
)
"""Said wherever learned data is shown."""


def export_learned(model: AdaptedModel, path: str | os.PathLike[str]) -> dict[str, int]:
    """Write everything a combined model learned to a plain JSON file (atomically; "-": standard output).

    The export lists the settings, the never-suggest list, and every word,
    bigram and trigram with its decayed count, raw uses and last-seen time,
    words written out (never ids).

    Returns:
        How many words, bigrams and trigrams were written.

    Raises:
        OutputError: the file cannot be written (an existing file stays as it was).
    """
    user = model.user
    words = [
        {"word": form, "shown_as": user.display(i), "count": count, "uses": uses, "last_seen": seen, "new_word": user.is_learned(i)}
        for i, form, count, uses, seen in user.word_rows()
    ]
    grams = {}
    for order in (2, 3):
        grams[order] = [{"words": [user.form(i) for i in ids], "count": count, "uses": uses, "last_seen": seen} for ids, count, uses, seen in user.ngram_rows(order)]
    payload = {
        "format": "foretype-learned-export",
        "version": 1,
        "note": PRIVACY_NOTE,
        "settings": model.settings.to_json(),
        "never_suggest": model.never.entries,
        "tokens": user.raw_tokens,
        "words": words,
        "bigrams": grams[2],
        "trigrams": grams[3],
    }
    data = (json.dumps(payload, ensure_ascii=False, indent=1) + "\n").encode("utf-8")

    def write(out: BinaryIO) -> None:
        out.write(data)

    write_output(path, write)  # the output policy: "-" is standard output; links followed, devices written into
    return {"words": len(words), "bigrams": len(grams[2]), "trigrams": len(grams[3])}


__all__ = ["export_learned", "PRIVACY_NOTE"]
