"""Seeded typing errors: a copy of a text in which some words carry one slip of the finger.

Used to measure what learning from a person's typing does when the person
makes typos: a word learned from a typo may be offered later, and a word typed
once may be a name worth offering again.

The error model (our own design, with a documented rate):

* each word of two letters or more is hit independently with probability
  ``rate`` (default 1 in 40);
* a hit word gets exactly one error, of one of the four single-edit kinds that
  Damerau (1964, "A technique for computer detection and correction of
  spelling errors", CACM 7(3)) found behind most misspellings, each kind
  equally likely:

  - **substitution**: a letter becomes one of its neighbours on a QWERTY
    keyboard (same row or the rows above and below, touching keys);
  - **deletion**: a letter is left out;
  - **insertion**: a neighbour of a letter is typed before or after it;
  - **transposition**: two adjacent, different letters swap places.

  The kind and the place are drawn uniformly; letter case is kept.

Everything that is not a letter stays as it was, so the words, their count and
the punctuation of the text are unchanged apart from the hit words.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..errors import OptionError
from ..key_neighbours import NEIGHBOURS

KINDS = ("substitution", "deletion", "insertion", "transposition")
"""The four kinds of single error, drawn with equal probability."""

DEFAULT_RATE = 1 / 40
"""Words hit, by default: one in forty."""

_WORD = re.compile(r"[A-Za-z]+")


@dataclass(frozen=True)
class Typo:
    """One injected error.

    Attributes:
        index: the hit word's position among the text's letter runs (0-based).
        original: the word as it was.
        typed: the word with the error.
        kind: one of :data:`KINDS`.
    """

    index: int
    original: str
    typed: str
    kind: str


def _same_case(letter: str, like: str) -> str:
    return letter.upper() if like.isupper() else letter


def misspell(word: str, rng: np.random.Generator) -> tuple[str, str]:
    """One error in ``word`` (two letters or more): returns (typed word, kind).

    Raises:
        OptionError: the word has fewer than two letters.
    """
    if len(word) < 2 or not word.isalpha():
        raise OptionError(f"only words of two letters or more can be misspelt, not {word!r}")
    while True:
        kind = KINDS[int(rng.integers(len(KINDS)))]
        at = int(rng.integers(len(word)))
        letter = word[at]
        if kind == "substitution":
            near = NEIGHBOURS.get(letter.lower(), "")
            if not near:
                continue
            new = _same_case(near[int(rng.integers(len(near)))], letter)
            return word[:at] + new + word[at + 1 :], kind
        if kind == "deletion":
            return word[:at] + word[at + 1 :], kind
        if kind == "insertion":
            near = NEIGHBOURS.get(letter.lower(), "")
            if not near:
                continue
            new = _same_case(near[int(rng.integers(len(near)))], letter)
            after = int(rng.integers(2))
            return word[: at + after] + new + word[at + after :], kind
        # transposition: the letter and the next one, if they differ
        if at + 1 < len(word) and word[at].lower() != word[at + 1].lower():
            return word[:at] + word[at + 1] + word[at] + word[at + 2 :], kind
        if len(set(word.lower())) == 1:
            continue  # "aa": no transposition changes it; draw again


def inject_typos(text: str, *, rate: float = DEFAULT_RATE, seed: int = 0) -> tuple[str, list[Typo]]:
    """A copy of ``text`` with seeded typing errors (see the module's error model).

    Args:
        text: the text.
        rate: the probability that a word of two letters or more gets one error.
        seed: the random seed; the same text, rate and seed give the same copy.

    Returns:
        The text with errors, and the errors in text order.

    Raises:
        OptionError: the rate is not between 0 and 1.
    """
    if not (0.0 <= rate <= 1.0):
        raise OptionError(f"the typo rate must lie between 0 and 1, not {rate!r}")
    rng = np.random.default_rng(seed)
    typos: list[Typo] = []
    pieces: list[str] = []
    last = 0
    for index, match in enumerate(_WORD.finditer(text)):
        word = match.group()
        pieces.append(text[last : match.start()])
        last = match.end()
        if len(word) >= 2 and rng.random() < rate:
            typed, kind = misspell(word, rng)
            typos.append(Typo(index, word, typed, kind))
            word = typed
        pieces.append(word)
    pieces.append(text[last:])
    return "".join(pieces), typos
