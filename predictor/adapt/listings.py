"""Listings of what a user model holds: named rows for words and n-grams, and the words as the interface lists them."""

from __future__ import annotations

from typing import TYPE_CHECKING, NamedTuple

if TYPE_CHECKING:
    from .never_list import NeverList
    from .user_model import UserModel


class WordRow(NamedTuple):
    """One counted word of a user model.

    Attributes:
        id: its id (base id, or V + 3 + j for a word the base vocabulary lacks).
        form: its model form.
        weight: its count after decay.
        uses: how many times it was learned (raw).
        last_seen: Unix time it was last learned.
    """

    id: int
    form: str
    weight: float
    uses: int
    last_seen: int


class NgramRow(NamedTuple):
    """One counted bigram or trigram of a user model.

    Attributes:
        ids: the word ids, oldest first.
        weight: its count after decay.
        uses: how many times it was learned (raw).
        last_seen: Unix time it was last learned.
    """

    ids: tuple[int, ...]
    weight: float
    uses: int
    last_seen: int


class LearnedWord(NamedTuple):
    """One word the user model has counted, as the interface lists it.

    Attributes:
        word: its display form.
        uses: how many times it was learned (raw).
        count: its count after decay.
        last_seen: Unix time it was last learned.
        new_word: the base vocabulary lacks it.
        suggestable: it can be suggested (a new word needs ``min_uses``; none on the never-suggest list).
        never: the never-suggest list blocks it.
    """

    word: str
    uses: int
    count: float  # type: ignore[assignment]  # the listed name; it hides tuple.count, which nothing here uses
    last_seen: int
    new_word: bool
    suggestable: bool
    never: bool


def most_used(user: UserModel) -> list[WordRow]:
    """Every counted word, most counted first (ties by model form)."""
    return sorted(user.word_rows(), key=lambda row: (-row.weight, row.form))


def learned_words(user: UserModel, never: NeverList) -> list[LearnedWord]:
    """Every word the user model has counted, most counted first (ties by word), with its marks."""
    listed = []
    for row in most_used(user):
        blocked = never.blocks(row.form)
        new = user.is_learned(row.id)
        suggestable = not blocked and (not new or user.is_ready(row.id))
        listed.append(LearnedWord(user.display(row.id), row.uses, row.weight, row.last_seen, new, suggestable, blocked))
    return listed


__all__ = ["WordRow", "NgramRow", "LearnedWord", "most_used", "learned_words"]
