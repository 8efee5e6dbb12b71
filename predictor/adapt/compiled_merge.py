"""Which walk answers the combined model: the compiled merge where the install built it, else Python.

The compiled merge (``_merge``, built from ``_merge.pyx`` by ``pip install``
where a C compiler exists) runs the threshold walk of
:func:`foretype.adapt.top_k.exact_top` and builds the suggestions of
``AdaptedModel._results`` over the base model's compiled core.  It answers
only where the base model answers on its compiled core (so ``FORETYPE_PURE=1``
makes both models answer on the numpy and Python paths); the Python walk is
the fallback and the reference the exactness tests compare it against.
"""

from __future__ import annotations

from typing import Any

from ..query.model import LanguageModel, Suggestion
from .combination import base_context
from .suggestable import Suggestable
from .top_k import PreparedContext, prepare

try:
    from ._merge import ContextMerge, pool_user
except ImportError:  # not built: no compiler at install time, or an unusual platform
    ContextMerge = pool_user = None  # type: ignore[assignment,misc]


def merge_available() -> bool:
    """Whether the compiled merge was built and imports."""
    return ContextMerge is not None


def prepare_compiled(view: Suggestable, u: int, v: int) -> PreparedContext:
    """:func:`~foretype.adapt.top_k.prepare` with the pool's user probabilities computed in one compiled pass.

    Where the user model has no share or no counts yet, or a follower lies outside the pool, the Python
    preparation answers.
    """
    user = view.user
    uctx = user.context(u, v)
    mu = user.share(uctx)
    if pool_user is None or mu <= 0.0 or uctx.total1 <= 0:
        return prepare(view, u, v)
    found = pool_user(
        view.unigram_share(uctx.total1),
        uctx.gamma2,
        uctx.gamma3,
        mu,
        view.pool_where,
        uctx.ids2,
        uctx.weights2,
        uctx.total2,
        uctx.ids3,
        uctx.weights3,
        uctx.total3,
        user.unigram_weight_array(),
        uctx.total1,
    )
    if found is None:
        return prepare(view, u, v)
    ub, vb = base_context(u, v, user.first_learned_id, user.unknown_id)
    return PreparedContext(u, v, mu, uctx, ub, vb, view.pool_keys, view.pool_ids, found[0], found[1])


def context_merge(base: LanguageModel, view: Suggestable, prepared: PreparedContext) -> Any:
    """The compiled merge for one context under a snapshot, or None where the Python walk answers.

    It is kept in the snapshot's memo beside the prepared context it was made from.
    """
    found = view.memo.get("merge")
    if found is not None and found[0] is prepared:
        return found[1]
    merge = None
    compiled = base.compiled_core() if ContextMerge is not None else None
    if compiled is not None:
        core, lock = compiled
        user = view.user
        merge = ContextMerge(
            core,
            lock,
            prepared.ub,
            prepared.vb,
            prepared.mu,
            prepared.keys,
            prepared.ids,
            prepared.p_user,
            prepared.floors,
            view.pool_where if prepared.ids is view.pool_ids else None,
            view.blocked,
            user.end_id,
            user.base_size,
            user.first_learned_id,
            user.display,
            user.order_of,
            prepared.user,
            Suggestion,
            view.memo.setdefault("display", {}),
        )
    view.memo["merge"] = (prepared, merge)
    return merge


__all__ = ["context_merge", "merge_available", "prepare_compiled"]
