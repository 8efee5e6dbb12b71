"""What may be suggested under one version of the user model and the never-suggest list: an immutable snapshot.

:class:`Suggestable` gathers everything the exact top-k search derives from
the learned counts and the never-suggest list but not from the context: the
base words the list blocks, the new words used often enough to be suggested
(by form, with their sort keys), and the pool of every suggestable counted
word in sort-key order.  It is never changed: when the user model or the list
changes version, :func:`derive` makes a new one, reusing the parts of the
previous one whose inputs did not change (a learned token usually changes
none of them), so a reader holding a snapshot always sees a consistent whole.

Sort keys order base and new words together by model form: a base id i is
``(i << 21) | (2**21 - 1)``; the j-th new word (by form) sorting just before
base word i is ``(i << 21) | j``, so a typed prefix's words are one key range.
"""

from __future__ import annotations

from bisect import bisect_left
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..query.vocabulary import PrefixRange, Vocabulary
from ..text import model_form
from .never_list import NeverList
from .user_model import UserModel

KEY_SHIFT = 21
"""Sort keys: a base id i is (i << 21) | (2**21 - 1); the j-th new word sorting just before base word i is (i << 21) | j."""
BASE_KEY_LOW = (1 << KEY_SHIFT) - 1
_PREFIX_MEMO = 4096
"""At most this many typed prefixes keep their id and key ranges between queries."""
_NO_IDS = np.zeros(0, dtype=np.int64)


class _BaseWords:
    """The base vocabulary's model forms as a sequence, for bisection."""

    def __init__(self, vocab: Vocabulary) -> None:
        self._vocab = vocab

    def __len__(self) -> int:
        return self._vocab.size

    def __getitem__(self, index: int) -> str:
        return self._vocab.word(index)


@dataclass(frozen=True, eq=False)
class Suggestable:
    """The suggestable words as of one version of a user model and a never-suggest list (never changed).

    Attributes:
        user: the user model it was derived from.
        version: (user model version, never-suggest list version).
        blocked_base: int64 sorted base ids the never-suggest list blocks.
        blocked: the same as a set.
        seen_ok: int64 sorted base ids counted at least once and not blocked.
        ready_forms: model forms of the suggestable new words, sorted.
        ready_ids: their ids, in the same order.
        learned_keys: sort key of each suggestable new word, by id.
        learned_key_array: int64 sort key per learned id offset (-1: not suggestable).
        pool_keys: int64 sort keys of every suggestable counted word, ascending
            (new words only while learning is on).
        pool_ids: int64 their ids.
        pool_where: int64 position in the pool of each id (-1: not pooled); one
            slot past the last learned id, always -1.
        memo: values computed from this snapshot on demand (the last context, unigram shares).
    """

    user: UserModel
    version: tuple[int, int]
    blocked_base: np.ndarray
    blocked: frozenset[int]
    seen_ok: np.ndarray
    ready_forms: tuple[str, ...]
    ready_ids: tuple[int, ...]
    learned_keys: dict[int, int]
    learned_key_array: np.ndarray
    pool_keys: np.ndarray
    pool_ids: np.ndarray
    pool_where: np.ndarray
    _states: tuple[Any, ...] = field(repr=False)
    """(never version, seen state, ready state, ready words taken from the log, learning) it was derived at."""
    _insertion: dict[int, int] = field(repr=False)
    """How many base words sort before each new word (shared by every snapshot of one user model)."""
    _prefixes: dict[str, tuple[int, int] | None] = field(repr=False)
    """Sort-key ranges by prefix model form (shared while the suggestable new words stay the same; when
    some are added, copied without the forms whose range they change)."""
    _spans: dict[str, tuple[str, PrefixRange | None]] = field(repr=False)
    """Typed prefixes' model forms and base id ranges (shared by every snapshot of one user model)."""
    shared: dict[str, Any] = field(repr=False)
    """Values that hold for every snapshot of one user model (such as base words' display forms)."""
    memo: dict[str, Any] = field(default_factory=dict, repr=False)

    # ------------------------------------------------------------ queries
    @property
    def prefix_memo(self) -> tuple[dict[str, tuple[str, PrefixRange | None]], dict[str, tuple[int, int] | None]]:
        """What :meth:`ranges_of` keeps: typed prefix -> (model form, base id range), and model form ->
        sort-key range; read-only to callers (a form missing from the second is not yet worked out)."""
        return self._spans, self._prefixes

    def unigram_share(self, total1: float) -> np.ndarray:
        """c(w) / N of the pool's words, float64 of the pool's shape (computed once per snapshot)."""
        found = self.memo.get("unigram_share")
        if found is None:
            found = self.memo["unigram_share"] = self.user.unigram_weights(self.pool_ids) / total1
        return found

    def ranges_of(self, prefix: str, vocab: Vocabulary) -> tuple[PrefixRange | None, tuple[int, int] | None]:
        """The base id range and the sort-key range of a typed prefix (None where it has none)."""
        known = self._spans.get(prefix)
        if known is None:
            if len(self._spans) >= _PREFIX_MEMO:
                self._spans.clear()
            form = model_form(prefix)
            known = self._spans[prefix] = (form, vocab.prefix_range(form))
        form, span = known
        memo = self._prefixes
        if form in memo:
            return span, memo[form]
        if len(memo) >= _PREFIX_MEMO:
            memo.clear()
        key_range = memo[form] = self._key_range(form, span)
        return span, key_range

    def _key_range(self, form: str, span: PrefixRange | None) -> tuple[int, int] | None:
        """The sort keys of the first and last suggestable word starting with ``form`` (None if none)."""
        firsts, lasts = [], []
        if span is not None:
            firsts.append((span.lo << KEY_SHIFT) | BASE_KEY_LOW)
            lasts.append(((span.hi - 1) << KEY_SHIFT) | BASE_KEY_LOW)
        forms = self.ready_forms
        if forms:
            lo = bisect_left(forms, form)
            hi = bisect_left(forms, form + "\U0010ffff") if form else len(forms)
            if hi > lo:
                firsts.append(self.learned_keys[self.ready_ids[lo]])
                lasts.append(self.learned_keys[self.ready_ids[hi - 1]])
        if not firsts:
            return None
        return min(firsts), max(lasts)

    def could_suggest(self, word_id: int) -> bool:
        """Tell whether an id is a suggestable word: an unblocked base word, or a new word ready to be suggested."""
        user = self.user
        if word_id < user.base_size:
            return word_id not in self.blocked
        return word_id >= user.first_learned_id and user.settings.learning and word_id in self.learned_keys

    def keys_of(self, ids: np.ndarray) -> np.ndarray:
        """Sort keys of counted ids; -1 for words that may not be suggested (blocked, not yet used enough)."""
        keys = (ids << KEY_SHIFT) | BASE_KEY_LOW
        learned = ids >= self.user.first_learned_id
        if learned.any():
            array = self.learned_key_array
            offsets = ids[learned] - self.user.first_learned_id
            known = offsets < len(array)
            found = np.full(len(offsets), -1, dtype=np.int64)
            found[known] = array[offsets[known]]
            keys[learned] = found
        if len(self.blocked_base):
            keys[member(self.blocked_base, ids)] = -1
        return keys

    @property
    def any_new_word(self) -> bool:
        """Whether a new word may be suggested now (learning on and one used often enough)."""
        return bool(self.user.settings.learning and self.ready_forms)


def derive(previous: Suggestable | None, user: UserModel, never: NeverList, vocab: Vocabulary) -> Suggestable:
    """The snapshot for the current versions of a user model and a never-suggest list.

    Parts whose inputs did not change since ``previous`` are shared with it; a
    new word that became suggestable is put in place without sorting the rest.

    Args:
        previous: the last snapshot (None, or one of another user model: derive from scratch).
        user: the user model.
        never: the never-suggest list.
        vocab: the base vocabulary.
    """
    same_user = previous is not None and previous.user is user
    old = previous if same_user else None
    never_version = never.version
    if old is not None and old._states[0] == never_version:
        blocked_base, blocked = old.blocked_base, old.blocked
    else:
        blocked_base = never.blocked_ids(vocab)
        blocked = frozenset(blocked_base.tolist())
    seen_state = (user.seen_version, never_version)
    if old is not None and old._states[1] == seen_state:
        seen_ok = old.seen_ok
    else:
        seen_ok = _unblocked(user.seen_base_ids(), blocked_base)
    insertion = old._insertion if old is not None else {}
    spans = old._spans if old is not None else {}
    shared = old.shared if old is not None else {}
    ready_state = (user.ready_epoch, never_version)
    ready_forms: tuple[str, ...]
    ready_ids: tuple[int, ...]
    if old is not None and old._states[2] == ready_state and not user.ready_since(old._states[3]):
        # Nothing new became suggestable: share the previous snapshot's words, keys and prefix memo.
        taken = old._states[3]
        ready_forms, ready_ids, learned_keys, learned_key_array = old.ready_forms, old.ready_ids, old.learned_keys, old.learned_key_array
        prefixes = old._prefixes
    else:
        if old is not None and old._states[2] == ready_state:
            taken = old._states[3]
            fresh = user.ready_since(taken)
            ready = _Ready(list(old.ready_forms), list(old.ready_ids), dict(old.learned_keys), old.learned_key_array.copy())
            for word_id in fresh:
                ready.add(word_id, user, never, vocab, insertion)
            taken += len(fresh)
            # Only the prefixes of a word whose key was given or changed have a new key range.
            prefixes = dict(old._prefixes)
            for form in ready.changed:
                for end in range(len(form) + 1):
                    prefixes.pop(form[:end], None)
        else:
            ready = _Ready.build(user, never, vocab, insertion)
            taken = len(user.ready_since(0))
            prefixes = {}
        ready_forms, ready_ids, learned_keys, learned_key_array = tuple(ready.forms), tuple(ready.ids), ready.keys, ready.key_array
    states = (never_version, seen_state, ready_state, taken, user.settings.learning)
    if old is not None and old._states[1:] == states[1:]:
        pool_keys, pool_ids, pool_where = old.pool_keys, old.pool_ids, old.pool_where
    else:
        pool_keys, pool_ids, pool_where = _pool(user, seen_ok, ready_ids, learned_key_array)
    return Suggestable(
        user=user,
        version=(user.version, never_version),
        blocked_base=blocked_base,
        blocked=blocked,
        seen_ok=seen_ok,
        ready_forms=ready_forms,
        ready_ids=ready_ids,
        learned_keys=learned_keys,
        learned_key_array=learned_key_array,
        pool_keys=pool_keys,
        pool_ids=pool_ids,
        pool_where=pool_where,
        _states=states,
        _insertion=insertion,
        _prefixes=prefixes,
        _spans=spans,
        shared=shared,
    )


@dataclass
class _Ready:
    """The suggestable new words while a snapshot is being derived (sorted by form) and their sort keys."""

    forms: list[str]
    ids: list[int]
    keys: dict[int, int]
    key_array: np.ndarray
    changed: list[str] = field(default_factory=list)
    """Forms of the words whose sort key was given or changed since it was made."""

    @staticmethod
    def build(user: UserModel, never: NeverList, vocab: Vocabulary, insertion: dict[int, int]) -> _Ready:
        """Every suggestable new word (never-suggest list applied), numbered from scratch."""
        allowed = [(form, word_id) for form, word_id in zip(user.ready_forms(), user.ready_learned("")) if not never.blocks(form)]
        ready = _Ready([form for form, _ in allowed], [word_id for _, word_id in allowed], {}, np.full(user.learned_count, -1, dtype=np.int64))
        ready.renumber(0, len(allowed), user, vocab, insertion)
        return ready

    def add(self, word_id: int, user: UserModel, never: NeverList, vocab: Vocabulary, insertion: dict[int, int]) -> None:
        """One more new word became suggestable: put it in place and renumber its group."""
        form = user.form(word_id)
        if never.blocks(form):
            return
        at = bisect_left(self.forms, form)
        if at < len(self.forms) and self.forms[at] == form:
            return
        self.forms.insert(at, form)
        self.ids.insert(at, word_id)
        self.renumber(at, at + 1, user, vocab, insertion)

    def renumber(self, lo: int, hi: int, user: UserModel, vocab: Vocabulary, insertion: dict[int, int]) -> None:
        """Give sort keys to the new words at ``lo:hi`` of the sorted list and to the rest of their groups.

        New words sorting between the same two base words form a group; the
        j-th of a group, in form order, gets (place << 21) | j.
        """
        forms, ids = self.forms, self.ids
        if len(self.key_array) < user.learned_count:
            grown = np.full(max(user.learned_count, 2 * len(self.key_array)), -1, dtype=np.int64)
            grown[: len(self.key_array)] = self.key_array
            self.key_array = grown

        def place(word_id: int, form: str) -> int:
            found = insertion.get(word_id)
            if found is None:
                found = insertion[word_id] = bisect_left(_BaseWords(vocab), form)
            return found

        places = [place(ids[i], forms[i]) for i in range(lo, hi)]
        if not places:
            return
        while lo > 0 and place(ids[lo - 1], forms[lo - 1]) == places[0]:
            lo -= 1
            places.insert(0, places[0])
        while hi < len(ids) and place(ids[hi], forms[hi]) == places[-1]:
            hi += 1
            places.append(places[-1])
        group, slot = -1, 0
        first = user.first_learned_id
        for i, at in zip(range(lo, hi), places):
            slot = slot + 1 if at == group else 0
            group = at
            key = (at << KEY_SHIFT) | slot
            if self.keys.get(ids[i]) != key:
                self.changed.append(forms[i])
            self.keys[ids[i]] = key
            self.key_array[ids[i] - first] = key


def _pool(user: UserModel, seen_ok: np.ndarray, ready_ids: tuple[int, ...], key_array: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Every suggestable counted word (new words only while learning is on), in sort-key order, and positions."""
    keys = (seen_ok << KEY_SHIFT) | BASE_KEY_LOW
    ids = seen_ok
    if user.settings.learning and ready_ids:
        new_ids = np.array(ready_ids, dtype=np.int64)
        # Both parts are sorted (new words by form, and so by key): a stable sort merges the two runs.
        keys = np.concatenate((keys, key_array[new_ids - user.first_learned_id]))
        ids = np.concatenate((ids, new_ids))
        order = np.argsort(keys, kind="stable")
        keys, ids = keys[order], ids[order]
    where = np.full(user.first_learned_id + user.learned_count + 1, -1, dtype=np.int64)
    where[ids] = np.arange(len(ids))
    return keys, ids, where


def _unblocked(ids: np.ndarray, blocked: np.ndarray) -> np.ndarray:
    """``ids`` without the base words the never-suggest list blocks."""
    if not len(blocked) or not len(ids):
        return ids
    return ids[~member(blocked, ids)]


def member(sorted_ids: np.ndarray, ids: np.ndarray) -> np.ndarray:
    """Mask of ``ids`` found in the sorted array ``sorted_ids``."""
    if not len(sorted_ids):
        return np.zeros(len(ids), dtype=bool)
    pos = sorted_ids.searchsorted(ids)
    np.minimum(pos, len(sorted_ids) - 1, out=pos)
    return sorted_ids[pos] == ids


__all__ = ["Suggestable", "derive", "member", "KEY_SHIFT", "BASE_KEY_LOW"]
