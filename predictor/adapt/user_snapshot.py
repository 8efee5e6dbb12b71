"""A user model's whole state as plain data, and back: what a learned file stores.

The state names words by model form (never by id), so it survives a rebuilt
base model; counts are decayed to the moment of the snapshot.  These functions
reach into the user model's tables: they are its serialisation, kept apart
from its learning and querying.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import numpy as np

from ..query.vocabulary import END, START, UNKNOWN
from ..text import model_form
from .followers import Followers

if TYPE_CHECKING:
    from .user_model import UserModel


def _restore_table(table: dict[Any, Followers], order: int, heads: list[np.ndarray], tail: np.ndarray, counts: np.ndarray, uses: np.ndarray, seen: np.ndarray) -> None:
    """Fill a follower table from columns, one context group at a time (cells of a group as list slices)."""
    if not len(tail):
        return
    if order == 2:
        group_key = heads[0]
    else:
        group_key = heads[0] * (int(max(heads[0].max(), heads[1].max())) + 1) + heads[1]
    by_group = np.lexsort((tail, group_key))
    group_key, tail, counts, uses, seen = group_key[by_group], tail[by_group], counts[by_group], uses[by_group], seen[by_group]
    heads = [h[by_group] for h in heads]
    repeated = bool(((group_key[1:] == group_key[:-1]) & (tail[1:] == tail[:-1])).any())
    starts = np.flatnonzero(np.concatenate(([True], group_key[1:] != group_key[:-1])))
    ends = np.append(starts[1:], len(tail))
    tails, weights, use_list, seen_list = tail.tolist(), counts.tolist(), uses.tolist(), seen.tolist()
    first = [h[starts].tolist() for h in heads]
    for index, (start, end) in enumerate(zip(starts.tolist(), ends.tolist())):
        key = first[0][index] if order == 2 else (first[0][index], first[1][index])
        followers = Followers()
        if repeated:  # a damaged or merged table: add cell by cell, summing repeats
            for w, c, n, t in zip(tails[start:end], weights[start:end], use_list[start:end], seen_list[start:end]):
                followers.add(w, c, t, uses=n)
        else:
            followers.ids = tails[start:end]
            followers.weights = weights[start:end]
            followers.uses = use_list[start:end]
            followers.seen = seen_list[start:end]
            followers.slot = {w: i for i, w in enumerate(followers.ids)}
            followers.total = math.fsum(followers.weights)
        table[key] = followers


def snapshot(user: UserModel) -> dict[str, Any]:
    """The whole state as plain data (words by model form, counts decayed to now).

    Returns:
        ``{"tick", "words", "votes", "credit", "evidence", "unigrams", "bigrams", "trigrams"}``:
        ``credit`` and ``evidence`` are R_b and n_b per bucket; ``words``
        lists model forms (index 0 START, 1 END, 2 UNKNOWN); each n-gram table
        maps column names to numpy arrays of equal length: word indices
        (int32), ``count`` (float64, decayed), ``uses`` (int64) and ``seen`` (int64).
    """
    index: dict[int, int] = {user.start_id: 0, user.end_id: 1, user.unknown_id: 2}
    words = [START, END, UNKNOWN]

    def idx(word_id: int) -> int:
        at = index.get(word_id)
        if at is None:
            at = index[word_id] = len(words)
            words.append(user.form(word_id))
        return at

    scale = user._scale
    used = np.flatnonzero(user._n1 > 0)
    unigrams = {
        "w": np.array([idx(int(i)) for i in used], dtype=np.int32),
        "count": user._w1[used] / scale,
        "uses": user._n1[used].astype(np.int64),
        "seen": user._seen1[used].astype(np.int64),
    }
    tables = []
    ordered: tuple[tuple[int, dict[Any, Followers]], ...] = ((2, user._ctx2), (3, user._ctx3))
    for order, table in ordered:
        heads: list[list[int]] = [[] for _ in range(order - 1)]
        tail: list[int] = []
        counts: list[float] = []
        uses: list[int] = []
        seen: list[int] = []
        for key, followers in table.items():
            context: tuple[int, ...] = (key,) if order == 2 else key
            context_idx = [idx(c) for c in context]
            for word_id, weight, n, s in zip(followers.ids, followers.weights, followers.uses, followers.seen):
                for column, value in zip(heads, context_idx):
                    column.append(value)
                tail.append(idx(word_id))
                counts.append(weight / scale)
                uses.append(n)
                seen.append(s)
        names = ["v", "w"] if order == 2 else ["u", "v", "w"]
        columns = {name: np.array(col, dtype=np.int32) for name, col in zip(names, heads + [tail])}
        columns.update(count=np.array(counts, dtype=np.float64), uses=np.array(uses, dtype=np.int64), seen=np.array(seen, dtype=np.int64))
        tables.append(columns)
    votes = {user.form(word_id): dict(v) for word_id, v in user._votes.items()}
    return {
        "tick": user.tick,
        "words": words,
        "votes": votes,
        "credit": (user._credit / scale).tolist(),
        "evidence": (user._evidence / scale).tolist(),
        "unigrams": unigrams,
        "bigrams": tables[0],
        "trigrams": tables[1],
    }


def restore(user: UserModel, state: dict[str, Any]) -> None:
    """Replace the counts with a :meth:`snapshot` (words mapped through this model's vocabulary).

    Raises:
        ValueError: the state is inconsistent (index out of range, columns of unequal length).
    """
    words = list(state["words"])
    if words[:3] != [START, END, UNKNOWN]:
        raise ValueError("the word table does not start with the special symbols")
    ids = [user.start_id, user.end_id, user.unknown_id] + [user._id_for(str(form)) for form in words[3:]]
    lookup = np.array(ids, dtype=np.int64)
    user._w1[:] = 0.0
    user._n1[:] = 0
    user._seen1[:] = 0
    user._ctx2 = {}
    user._ctx3 = {}
    user._scale = 1.0
    user.tick = int(state["tick"])
    credit = [float(x) for x in state.get("credit", [0.0, 0.0, 0.0])]
    evidence = [float(x) for x in state.get("evidence", [0.0, 0.0, 0.0])]
    if len(credit) != 3 or len(evidence) != 3 or not all(0.0 <= r <= n + 1e-9 for r, n in zip(credit, evidence)):
        raise ValueError("bad share statistics")
    user._credit = np.array(credit, dtype=np.float64)
    user._evidence = np.array(evidence, dtype=np.float64)
    uni = state["unigrams"]
    target = lookup[np.asarray(uni["w"], dtype=np.int64)]
    if len({len(uni[c]) for c in ("w", "count", "uses", "seen")}) != 1:
        raise ValueError("unigram columns differ in length")
    np.add.at(user._w1, target, np.asarray(uni["count"], dtype=np.float64))
    np.add.at(user._n1, target, np.asarray(uni["uses"], dtype=np.int64))
    np.maximum.at(user._seen1, target, np.asarray(uni["seen"], dtype=np.int64))
    user._total = math.fsum(user._w1)
    for order, name, table in ((2, "bigrams", user._ctx2), (3, "trigrams", user._ctx3)):
        columns = state[name]
        heads = [lookup[np.asarray(columns[c], dtype=np.int64)] for c in (["v"] if order == 2 else ["u", "v"])]
        tail = lookup[np.asarray(columns["w"], dtype=np.int64)]
        counts = np.asarray(columns["count"], dtype=np.float64)
        uses = np.asarray(columns["uses"], dtype=np.int64)
        seen = np.asarray(columns["seen"], dtype=np.int64)
        if not (len(tail) == len(counts) == len(uses) == len(seen) and all(len(h) == len(tail) for h in heads)):
            raise ValueError(f"{name} columns differ in length")
        _restore_table(table, order, heads, tail, counts, uses, seen)
    user._votes = {}
    user._shown.clear()
    for form, votes in dict(state.get("votes", {})).items():
        word_id = user._learned.get(model_form(str(form)))
        if word_id is not None and isinstance(votes, dict):
            user._votes[word_id] = {str(k): int(n) for k, n in votes.items()}
    user._rebuild_ready()
    user.version += 1


__all__ = ["snapshot", "restore"]
