"""The never-suggest list: words and patterns that no suggestion source may show.

An entry is an exact word, or a shell-style pattern when it holds ``*``, ``?``
or ``[`` (``*`` any run of characters, ``?`` one character, ``[abc]`` one of
them; Python's :mod:`fnmatch` syntax).  Matching is case-insensitive: entries
and words are compared in model form (lower case, ’ as ').  A word on the list
is never shown, however often it is typed; the list filters candidates before
the top k is taken, so the k best remaining words are shown.
"""

from __future__ import annotations

import fnmatch
import re
from collections.abc import Iterable

import numpy as np

from ..errors import OptionError
from ..query.vocabulary import Vocabulary
from ..text import model_form

_WILDCARDS = re.compile(r"[*?\[]")


def is_pattern(entry: str) -> bool:
    """Tell whether a never-list entry is a pattern rather than an exact word."""
    return _WILDCARDS.search(entry) is not None


def normalise_entry(entry: str) -> str:
    """The stored form of an entry: its model form, stripped.

    Raises:
        OptionError: the entry is empty or holds whitespace.
    """
    text = model_form(entry.strip())
    if not text:
        raise OptionError("a never-suggest entry must not be empty")
    if any(c.isspace() for c in text):
        raise OptionError(f"a never-suggest entry is one word or pattern, without spaces: {entry!r}")
    return text


class NeverList:
    """A set of exact words and patterns that are never suggested."""

    def __init__(self, entries: Iterable[str] = ()) -> None:
        """Start with some entries (each normalised by :func:`normalise_entry`).

        Raises:
            OptionError: an entry is empty or holds whitespace.
        """
        self._words: set[str] = set()
        self._patterns: set[str] = set()
        self._regex: re.Pattern[str] | None = None
        self.version = 0
        """Grows with every change, so holders of derived data know when to refresh it."""
        for entry in entries:
            self.add(entry)

    @property
    def entries(self) -> list[str]:
        """Every entry, sorted (exact words and patterns together)."""
        return sorted(self._words | self._patterns)

    def __len__(self) -> int:
        return len(self._words) + len(self._patterns)

    def __bool__(self) -> bool:
        return bool(self._words or self._patterns)

    def add(self, entry: str) -> bool:
        """Add a word or pattern; returns False if it was already there."""
        text = normalise_entry(entry)
        target = self._patterns if is_pattern(text) else self._words
        if text in target:
            return False
        target.add(text)
        self._changed()
        return True

    def remove(self, entry: str) -> bool:
        """Remove a word or pattern; returns False if it was not there."""
        text = normalise_entry(entry)
        target = self._patterns if is_pattern(text) else self._words
        if text not in target:
            return False
        target.discard(text)
        self._changed()
        return True

    def _changed(self) -> None:
        self.version += 1
        patterns = sorted(self._patterns)
        self._regex = re.compile("|".join(f"(?:{fnmatch.translate(p)})" for p in patterns)) if patterns else None

    def replace(self, entries: Iterable[str]) -> None:
        """Make the list hold exactly ``entries`` (validated first; nothing changes if one is bad).

        Raises:
            OptionError: an entry is empty or holds whitespace.
        """
        fresh = [normalise_entry(e) for e in entries]
        self._words = {e for e in fresh if not is_pattern(e)}
        self._patterns = {e for e in fresh if is_pattern(e)}
        self._changed()

    def blocks(self, word: str) -> bool:
        """Tell whether a word (as written or in model form) may never be suggested."""
        form = model_form(word)
        if form in self._words:
            return True
        return self._regex is not None and self._regex.match(form) is not None

    def blocked_ids(self, vocab: Vocabulary) -> np.ndarray:
        """The ids of a vocabulary's words that the list blocks.

        A pattern that starts with literal letters is only tried on the words
        with that prefix (one trie lookup); one that starts with a wildcard is
        tried on every word.

        Returns:
            int64 array of shape (n,), sorted ascending, no repeats.
        """
        found: set[int] = set()
        for word in self._words:
            word_id = vocab.id(word)
            if word_id is not None:
                found.add(word_id)
        for pattern in self._patterns:
            literal = _WILDCARDS.split(pattern, maxsplit=1)[0]
            span = vocab.prefix_range(literal)
            if span is None:
                continue
            compiled = re.compile(fnmatch.translate(pattern))
            word_of = vocab.word
            found.update(i for i in range(span.lo, span.hi) if compiled.match(word_of(i)))
        return np.array(sorted(found), dtype=np.int64)
