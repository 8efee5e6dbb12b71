"""Suggestions without the words a person already passed over while typing the same word.

A word shown in the list and not taken (the person typed the next letter
instead) is rarely the word wanted at the next letter.  Leaving such words
out frees their slots.  The source's own answer stays exact: the top k of the
remaining words is the first k of the source's top ``k + len(passed)`` that
were not passed over, because at most ``len(passed)`` of those are left out.
"""

from __future__ import annotations

from collections.abc import Collection

from ..text import model_form
from .model import Suggestion
from .source import SuggestionSource


def suggest_without(source: SuggestionSource, u: int, v: int, prefix: str, k: int, passed: Collection[str]) -> list[Suggestion]:
    """The top k words after context ids (u, v) starting with ``prefix``, minus the model forms in ``passed``.

    Args:
        source: where suggestions come from.
        u, v: context ids from ``source.context_ids``.
        prefix: the letters typed so far.
        k: how many suggestions at most.
        passed: model forms to leave out (empty: the source's plain top k).
    """
    if not passed:
        return source.suggest_ids(u, v, prefix, k)
    found = source.suggest_ids(u, v, prefix, k + len(passed))
    return [s for s in found if model_form(s.word) not in passed][:k]
