"""Which walk answers the combined model: the compiled merge where the install built it, else Python.

The compiled merge (``_merge``, built from ``_merge.pyx`` by ``pip install``
where a C compiler exists) runs the threshold walk of
:func:`foretype.adapt.top_k.exact_top` and builds the suggestions of
``AdaptedModel._results`` over the base model's compiled core.  It answers
only where the base model answers on its compiled core (so ``FORETYPE_PURE=1``
makes both models answer on the numpy and Python paths); the Python walk is
the fallback and the reference the exactness tests compare it against.

Per snapshot it keeps one pool (sort keys, ids and the unigram share c(w) / N
of every suggestable counted word); per context only the followers' user
probabilities are computed, so a new context costs its followers, not the pool.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..query.model import LanguageModel, Suggestion
from .combination import base_context
from .suggestable import Suggestable
from .top_k import prepare

try:
    from ._merge import Pool, context_merge, follower_probs
except ImportError:  # not built: no compiler at install time, or an unusual platform
    Pool = context_merge = follower_probs = None  # type: ignore[assignment,misc]


MERGE_GUARD = 1
"""The compiled merge first reads list A to k + this many words (the Python walk's ``GUARD`` is 4).

Any depth gives the same answer (the walk reads deeper until the k-th score
is final); one more word than k already makes the bound strict in the usual
case, and reading fewer words costs the base core less."""


def merge_available() -> bool:
    """Whether the compiled merge was built and imports."""
    return Pool is not None


def _pool_of(view: Suggestable, compiled: tuple[Any, Any], total1: float) -> Any:
    """The snapshot's compiled pool (made once per snapshot and kept in its memo)."""
    found = view.memo.get("pool")
    if found is None:
        values = view.unigram_share(total1) if total1 > 0 else np.zeros(len(view.pool_keys), dtype=np.float64)
        found = view.memo["pool"] = _new_pool(view, compiled, view.pool_keys, view.pool_ids, values, view.pool_where)
    return found


def _new_pool(view: Suggestable, compiled: tuple[Any, Any], keys: Any, ids: Any, values: Any, *where: Any) -> Any:
    """A compiled pool of candidate words (sort keys, ids, user values) with the snapshot's shared parts."""
    user = view.user
    return Pool(
        *compiled,
        keys,
        ids,
        values,
        view.learned_key_array,
        view.blocked,
        bool(user.settings.learning),
        user.end_id,
        user.base_size,
        user.first_learned_id,
        user.display,
        Suggestion,
        view.shared.setdefault("base_forms", {}),
        user.shown_forms(),
        *where,
    )


def merge_for(base: LanguageModel, view: Suggestable, u: int, v: int) -> Any:
    """The compiled merge of a context under a snapshot, or None where the Python walk answers.

    It stands where :func:`~foretype.adapt.top_k.prepare`'s ``PreparedContext`` stands (same ``u``,
    ``v``, ``mu``, ``user``, ``ub``, ``vb``) and answers ``suggest`` for every prefix typed after the context.
    """
    compiled = base.compiled_core() if Pool is not None else None
    if compiled is None:
        return None
    user = view.user
    uctx = user.context(u, v)
    # mu depends on the context only through its bucket and whether the base model knows it.
    shares = view.memo.setdefault("shares", {})
    mu = shares.get((uctx.bucket, uctx.base_knows))
    if mu is None:
        mu = shares[(uctx.bucket, uctx.base_knows)] = user.share(uctx)
    ub, vb = base_context(u, v, user.first_learned_id, user.unknown_id)
    pool = _pool_of(view, compiled, uctx.total1)
    if mu <= 0.0:
        return context_merge(pool, u, v, ub, vb, 0.0, 0.0, 0.0, None, None, None, user.order_of)
    if uctx.total1 <= 0:
        return context_merge(pool, u, v, ub, vb, mu, 0.0, 0.0, None, None, uctx, user.order_of, user.unigram_weight_array())
    g2, g3 = uctx.gamma2, uctx.gamma3
    ids = uctx.ids2
    if not len(ids) and not len(uctx.ids3):  # nothing seen after the context
        return context_merge(pool, u, v, ub, vb, mu, g2, g3, None, None, uctx, user.order_of, user.unigram_weight_array())
    probs = follower_probs(g2, g3, ids, uctx.weights2, uctx.total2, uctx.ids3, uctx.weights3, uctx.total3, user.unigram_weight_array(), uctx.total1)
    if probs is None:
        ids, probs = user.followers(uctx)
    merge = context_merge(pool, u, v, ub, vb, mu, g2, g3, ids, probs, uctx, user.order_of, user.unigram_weight_array())
    if merge is None:
        # A suggestable follower the pool lacks (a hand-edited file can hold one): the Python
        # preparation merges it in, and the merge reads its P_user as they are (1.0 * (1.0 * p) is p).
        prepared = prepare(view, u, v)
        own = _new_pool(view, compiled, prepared.keys, prepared.ids, prepared.p_user)
        merge = context_merge(own, u, v, ub, vb, mu, 1.0, 1.0, None, None, uctx, user.order_of, user.unigram_weight_array())
    return merge


__all__ = ["MERGE_GUARD", "merge_available", "merge_for"]
