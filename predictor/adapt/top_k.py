"""The exact top-k search of the combined model: the threshold walk over list A and the pool.

See :mod:`foretype.adapt.combined` for why it is exact.  :func:`prepare`
gathers what one context needs for every prefix typed after it (the share mu,
the pool's user probabilities after the context, their floors);
:func:`exact_top` walks list A (the base model's own ranking, read deeper
until the k-th score is final) and the pool's slice of the typed prefix.

Candidates are rows with the fields of :class:`Candidate`, sorted as tuples: by
score descending (``neg_score`` ascending), then sort key, that is by word.  In
the walk they are plain tuples (building and sorting them is most of its
Python work, and naming each one cost 2% of a query), and every row read is
unpacked into the field names; ``Candidate._make(row)`` names one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple, Protocol

import numpy as np

from ..query.model import LanguageModel
from ..query.vocabulary import PrefixRange
from .combination import base_context, base_probabilities, no_merge
from .suggestable import BASE_KEY_LOW, KEY_SHIFT, Suggestable
from .user_model import UserContext, UserModel

GUARD = 4
"""List A is first read to k + this many words: its k-th word already bounds every unread one,
and one more makes the bound strict in the usual case."""
_FEW_REACHING = 32
"""When more words than this reach the first threshold, it is raised by the pool's own floors first."""
_SMALL_SLICE = 24
"""A prefix's part of the pool with at most this many words is bounded in plain Python."""
_NO_IDS = np.zeros(0, dtype=np.int64)
_NO_PROBS = np.zeros(0, dtype=np.float64)


Row = tuple[float, int, int, float, float]
"""A candidate as the walk keeps it: the fields of :class:`Candidate`, in order."""


class Candidate(NamedTuple):
    """A word scored exactly during the search.

    Attributes:
        neg_score: minus its combined probability (rows sort best first).
        key: its sort key (ties go by word).
        id: its id.
        p_base: P_base after the context.
        p_user: P_user after the context.
    """

    neg_score: float
    key: int
    id: int
    p_base: float
    p_user: float


class ContextFacts(Protocol):
    """What every query after a context reads first, whichever walk answers it (read-only).

    Attributes:
        u, v: the context ids.
        mu: the user model's share after it.
        user: the user model's data about it (None when mu is 0).
        ub, vb: the context as the base model sees it.
    """

    @property
    def u(self) -> int: ...
    @property
    def v(self) -> int: ...
    @property
    def mu(self) -> float: ...
    @property
    def user(self) -> UserContext | None: ...
    @property
    def ub(self) -> int: ...
    @property
    def vb(self) -> int: ...


@dataclass(frozen=True)
class PreparedContext:
    """What one context needs for every prefix typed after it (kept in the snapshot's memo between queries).

    The pool is every suggestable word the user model has counted, in sort-key
    order so that a prefix's part of it is one slice, with its user
    probability after this context; base probabilities are fetched per query,
    only for the words that could make the top k.

    Attributes:
        u, v: the context ids it was prepared for.
        mu: the user model's share after it.
        user: the user model's data about it (None when mu is 0).
        ub, vb: the context as the base model sees it.
        keys: int64 sort keys of the pool, ascending.
        ids: int64 ids of the pool, in the order of keys.
        p_user: float64 P_user of the pool's words after this context.
        floors: float64 mu * P_user of the pool's words: the least combined score each can have.
    """

    u: int
    v: int
    mu: float
    user: UserContext | None
    ub: int
    vb: int
    keys: np.ndarray
    ids: np.ndarray
    p_user: np.ndarray
    floors: np.ndarray


def prepare(view: Suggestable, u: int, v: int) -> PreparedContext:
    """The per-context data for (u, v) under a snapshot."""
    user = view.user
    ub, vb = base_context(u, v, user.first_learned_id, user.unknown_id)
    uctx = user.context(u, v)
    mu = user.share(uctx)
    keys, ids = view.pool_keys, view.pool_ids
    if mu <= 0.0:
        p_user = np.zeros(len(ids), dtype=np.float64)
        return PreparedContext(u, v, 0.0, None, ub, vb, keys, ids, p_user, 0.0 * p_user)
    if uctx.total1 > 0:
        # Outside the words seen after (u, v) or v, P_user is the Witten-Bell chain over the
        # unigram alone: (1 - g3) * 0.0 + g3 * ((1 - g2) * 0.0 + g2 * p1) is g3 * (g2 * p1) exactly.
        p_user = uctx.gamma3 * (uctx.gamma2 * view.unigram_share(uctx.total1))
        merged = _with_followers(view, user, uctx, keys, ids, p_user)
        if merged is not None:
            keys, ids, p_user = merged
    else:
        p_user = np.zeros(len(ids), dtype=np.float64)
    return PreparedContext(u, v, mu, uctx, ub, vb, keys, ids, p_user, mu * p_user)


def _with_followers(
    view: Suggestable, user: UserModel, uctx: UserContext, keys: np.ndarray, ids: np.ndarray, p_user: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """Write the exact P_user of the words seen after (u, v) or after v into ``p_user``.

    Those words are counted, so they are normally in the pool already and
    None is returned: the pool keeps its layout.  A follower the pool lacks
    (a hand-edited file can hold one) is merged in, and the merged
    ``(keys, ids, p_user)`` are returned.
    """
    members, members_user = user.followers(uctx)
    if not len(members):
        return None
    where = view.pool_where
    at = where[np.minimum(members, len(where) - 1)]  # the last slot is -1: ids past it are not pooled
    if at.min() >= 0:
        p_user[at] = members_user
        return None
    hit = at >= 0
    p_user[at[hit]] = members_user[hit]
    strays, strays_user = members[~hit], members_user[~hit]
    keep = np.array([view.could_suggest(i) for i in strays.tolist()], dtype=bool)
    if not keep.any():
        return None  # END, UNKNOWN, blocked words and new words not used enough yet
    stray_keys = view.keys_of(strays)
    keys = np.concatenate((keys, stray_keys[keep]))
    ids = np.concatenate((ids, strays[keep]))
    p_user = np.concatenate((p_user, strays_user[keep]))
    order = np.argsort(keys, kind="stable")
    return keys[order], ids[order], p_user[order]


def exact_top(base: LanguageModel, view: Suggestable, prepared: PreparedContext, span: PrefixRange | None, key_range: tuple[int, int], k: int) -> tuple[list[Row], dict[int, int]]:
    """The threshold walk: the k best suggestable words of a prefix's range, exactly.

    Scores use the arithmetic of :func:`~foretype.adapt.combination.combine`,
    one IEEE double operation at a time in the same order (numpy's elementwise
    operations round as Python's do).

    Args:
        base: the base model (list A is its ``top_in_range``).
        view: the snapshot of what may be suggested.
        prepared: the context's data.
        span: the prefix's base id range (None: no base word has it).
        key_range: the prefix's first and last sort key.
        k: how many.

    Returns:
        The chosen candidates (rows with :class:`Candidate`'s fields), best first, and the base orders
        list A reported (by id).
    """
    mu = prepared.mu
    m = 1.0 - mu
    lo, hi = prepared.keys.searchsorted(np.array((key_range[0], key_range[1] + 1), dtype=np.int64)).tolist()
    pool = _Slice(prepared.keys[lo:hi], prepared.ids[lo:hi], prepared.p_user[lo:hi], prepared.floors[lo:hi])
    # While the context's pool is the shared one, its positions table finds list A's words without a search.
    where_item = view.pool_where.item if prepared.ids is view.pool_ids else None
    p_user_item = prepared.p_user.item
    blocked = view.blocked
    a_depth = k + GUARD
    while True:
        # List A: the base model's own exact ranking of the range's base words.
        if span is not None:
            found, found_base, found_orders = base.top_in_range(prepared.ub, prepared.vb, span, a_depth)
        else:
            found, found_base, found_orders = _NO_IDS, _NO_PROBS, []
        a_done = len(found) < a_depth
        a_ids, a_base = found.tolist(), found_base.tolist()
        a_last = a_base[-1] if a_ids and not a_done else 0.0
        if where_item is not None:
            a_user = [p_user_item(at) if at >= 0 else 0.0 for at in map(where_item, a_ids)]
        else:
            a_user = pool.p_user_of(found).tolist()
        rows: list[Row] = [(-(m * pb + mu * pu), (i << KEY_SHIFT) | BASE_KEY_LOW, i, pb, pu) for i, pb, pu in zip(a_ids, a_base, a_user) if i not in blocked]
        rows.sort()
        # Every unread word of the range scores at most m * a_last + mu * P_user (its own P_user).
        threshold = -math.inf
        if len(rows) >= k:
            kth_neg_score, _, _, _, _ = rows[k - 1]
            threshold = -kth_neg_score
        c_ids, c_user, c_keys = pool.reaching(m * a_last, mu, threshold, set(a_ids), k)
        if c_ids:
            c_base = base_probabilities(base, np.array(c_ids, dtype=np.int64), prepared.ub, prepared.vb, view.user.end_id).tolist()
            rows.extend((-(m * pb + mu * pu), key, i, pb, pu) for i, pb, pu, key in zip(c_ids, c_base, c_user, c_keys))
            rows.sort()
        if a_done:
            break
        if len(rows) >= k:
            kth_neg_score, kth_key, _, _, _ = rows[k - 1]
            kth_score = -kth_neg_score
            z_bound = m * a_last + mu * 0.0
            if kth_score > z_bound:
                break
            # Unread words outside the pool score at most the bound and, when equal, sort after A's last word.
            if kth_score == z_bound and no_merge(m, a_last) and kth_key <= (a_ids[-1] << KEY_SHIFT) | BASE_KEY_LOW:
                break
        a_depth *= 4
    return rows[:k], dict(zip(a_ids, found_orders))


class _Slice:
    """A prefix's part of a context's pool: sort keys, ids and user probabilities of the counted words."""

    __slots__ = ("keys", "ids", "p_user", "floors")

    def __init__(self, keys: np.ndarray, ids: np.ndarray, p_user: np.ndarray, floors: np.ndarray) -> None:
        self.keys, self.ids, self.p_user, self.floors = keys, ids, p_user, floors

    def p_user_of(self, ids: np.ndarray) -> np.ndarray:
        """P_user of base word ids (0 for a word outside the slice: never counted)."""
        if not len(self.keys) or not len(ids):
            return np.zeros(len(ids), dtype=np.float64)
        keys = (ids << KEY_SHIFT) | BASE_KEY_LOW
        at = self.keys.searchsorted(keys)
        np.minimum(at, len(self.keys) - 1, out=at)
        return np.where(self.keys[at] == keys, self.p_user[at], 0.0)

    def reaching(self, edge: float, mu: float, threshold: float, listed: set[int], k: int) -> tuple[list[int], list[float], list[int]]:
        """The slice's words outside list A that could be among the k best.

        Such a word scores ``m * P_base + mu * P_user`` with ``m * P_base`` at
        most ``edge``, so its score is at most ``edge + mu * P_user`` and at
        least ``mu * P_user``.  The threshold L starts as the k-th best of A's
        exact scores and, when many words reach it, is raised to the k-th best
        floor ``mu * P_user`` of the slice's words outside A: each is a lower
        bound of a different word's score, so L never exceeds the final k-th
        score, and a word whose bound is below L cannot enter the top k.

        Args:
            edge: ``m * P_base`` of A's last word (0 when A holds every base word of the range).
            mu: the user model's share.
            threshold: the k-th best score of A (minus infinity with fewer than k).
            listed: the ids of A.
            k: how many suggestions.

        Returns:
            ``(ids, p_user, keys)`` of the words whose bound reaches L, as lists.
        """
        if not len(self.keys):
            return [], [], []
        if len(self.keys) <= _SMALL_SLICE:
            # The same bound, one Python float at a time: cheaper than numpy calls on a few words.
            reach = [
                (i, pu, key)
                for i, pu, floor, key in zip(self.ids.tolist(), self.p_user.tolist(), self.floors.tolist(), self.keys.tolist())
                if floor + edge >= threshold and i not in listed
            ]
            return [r[0] for r in reach], [r[1] for r in reach], [r[2] for r in reach]
        bound = self.floors + edge  # edge + mu * P_user: addition commutes exactly
        at = (bound >= threshold).nonzero()[0]
        if len(at) > _FEW_REACHING + len(listed):
            floors = self.floors
            best = np.argpartition(floors, len(floors) - k - len(listed))[len(floors) - k - len(listed) :] if len(floors) > k + len(listed) else np.arange(len(floors))
            outside = sorted((-f for f, i in zip(floors[best].tolist(), self.ids[best].tolist()) if i not in listed))
            if len(outside) >= k:
                threshold = max(threshold, -outside[k - 1])
                at = (bound >= threshold).nonzero()[0]
        ids = self.ids[at].tolist()
        if not listed.isdisjoint(ids):
            keep = [j for j, i in enumerate(ids) if i not in listed]
            at = at[keep]
            ids = self.ids[at].tolist()
        return ids, self.p_user[at].tolist(), self.keys[at].tolist()


__all__ = ["Candidate", "ContextFacts", "Row", "PreparedContext", "prepare", "exact_top", "GUARD"]
