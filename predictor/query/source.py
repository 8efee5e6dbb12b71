"""What every consumer of suggestions asks of their source: the simulator, the pad, the command line.

A :class:`~foretype.query.model.LanguageModel` is a source; so is a model
combined with a person's typing (:class:`foretype.adapt.AdaptedModel`).  Both
return :class:`~foretype.query.model.Suggestion` lists.  A
:class:`~foretype.query.vocabulary.Vocabulary` is a :class:`WordIndex`.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Protocol

from .model import Suggestion


class WordIndex(Protocol):
    """The part of a vocabulary a consumer needs to mark unknown words (a :class:`Vocabulary` is one)."""

    def id(self, word: str) -> int | None:
        """Return the id of a word in model form, or None if it is unknown."""
        ...


class SuggestionSource(Protocol):
    """Exact top-k suggestions for a context, by ids or by the text before a cursor."""

    @property
    def vocab(self) -> WordIndex:
        """The words the source knows (the pad marks the others in the context)."""
        ...

    def parse_cursor_text(self, text: str) -> tuple[list[str], str]:
        """Return (up to two context words, partial word) for the text before a cursor."""
        ...

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Map up to two context words (as written) to the ids :meth:`suggest_ids` takes."""
        ...

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        """The top k words after context ids (u, v) that start with ``prefix``, best first."""
        ...

    def suggest_text(self, text: str, k: int = 5) -> list[Suggestion]:
        """The top k words for the text before a cursor."""
        ...
