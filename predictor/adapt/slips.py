"""Is a new word perhaps a slip of the finger on a word already known?

A word typed once that the base vocabulary lacks is either a real new word (a
name, a term) or a typo.  Most typos are one edit (substitution, deletion,
insertion or transposition of letters: Damerau 1964) away from the intended
word, which the vocabulary or the person's earlier words usually hold; a real
new word seldom is.  So a once-used word that a slip on a known word would
produce waits for a second use before it is offered, and any other new word is
offered after one.

A slip is a slip of the finger, so only edits a finger makes count: a letter
replaced by a key that touches it, a letter left out, a letter added next to a
letter whose key it touches (or doubled), two letters swapped.  Substitution
typos land mostly on adjacent keys (Grudin 1983, "Error patterns in novice and
skilled transcription typing", from memory).  Any one edit would hold back far
more real words: over the first 120 demo messages typed with the King James
model it held back 18 real new words (among them "list", "shop", "baby",
"date") against 6 with finger edits only, and cost 0.1 points of keystroke
savings (docs/learning.md).
"""

from __future__ import annotations

from collections.abc import Callable, Iterator

from ..key_neighbours import NEIGHBOURS

LETTERS = "abcdefghijklmnopqrstuvwxyz'"
"""The letters tried where the typed form may have left one out (model forms are lower case)."""


def intended_forms(typed: str) -> Iterator[str]:
    """Every form a one-edit slip of the finger could have turned into ``typed`` (may repeat).

    The four kinds, undone: a substituted letter back to a key that touches it,
    an added letter removed where it touches (or repeats) a letter beside it, a
    left-out letter put back anywhere, two swapped letters swapped back.
    """
    n = len(typed)
    for i, letter in enumerate(typed):
        beside = typed[i - 1 : i] + typed[i + 1 : i + 2]
        if any(ch == letter or ch in NEIGHBOURS.get(letter, "") for ch in beside):
            yield typed[:i] + typed[i + 1 :]
        if i + 1 < n and letter != typed[i + 1]:
            yield typed[:i] + typed[i + 1] + letter + typed[i + 2 :]
        for ch in NEIGHBOURS.get(letter, ""):
            yield typed[:i] + ch + typed[i + 1 :]
    for i in range(n + 1):
        for ch in LETTERS:
            yield typed[:i] + ch + typed[i:]


def looks_like_slip(form: str, known: Callable[[str], bool], *, shortest: int = 3) -> bool:
    """Tell whether ``form`` is what a slip of the finger on a known word would give (so it may be a typo of it).

    Args:
        form: the new word in model form.
        known: tells whether a model form is a known word.
        shortest: forms shorter than this are never called slips (too many
            short words lie one edit from some known word).
    """
    if len(form) < shortest:
        return False
    return any(candidate and candidate != form and known(candidate) for candidate in intended_forms(form))
