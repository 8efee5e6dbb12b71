"""Is a new word perhaps a slip of the finger on a word already known?

A word typed once that the base vocabulary lacks is either a real new word (a
name, a term) or a typo.  Most typos are one edit (substitution, deletion,
insertion or transposition of letters: Damerau 1964) away from the intended
word, which the vocabulary or the person's earlier words usually hold; a real
new word seldom is.  So a once-used word one edit from a known word waits for a
second use before it is offered, and any other new word is offered after one.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator

LETTERS = "abcdefghijklmnopqrstuvwxyz'"
"""The letters tried for substitutions and insertions (model forms are lower case)."""


def one_edit_away(form: str) -> Iterator[str]:
    """Every string one deletion, transposition, substitution or insertion away from ``form`` (may repeat)."""
    for i in range(len(form)):
        yield form[:i] + form[i + 1 :]
        if i + 1 < len(form) and form[i] != form[i + 1]:
            yield form[:i] + form[i + 1] + form[i] + form[i + 2 :]
        for ch in LETTERS:
            if ch != form[i]:
                yield form[:i] + ch + form[i + 1 :]
    for i in range(len(form) + 1):
        for ch in LETTERS:
            yield form[:i] + ch + form[i:]


def looks_like_slip(form: str, known: Callable[[str], bool], *, shortest: int = 3) -> bool:
    """Tell whether ``form`` is one edit from a known word (so it may be a typo of it).

    Args:
        form: the new word in model form.
        known: tells whether a model form is a known word.
        shortest: forms shorter than this are never called slips (too many
            short words lie one edit from some known word).
    """
    if len(form) < shortest:
        return False
    return any(candidate and candidate != form and known(candidate) for candidate in one_edit_away(form))
