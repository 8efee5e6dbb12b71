"""Ranked continuation lists for contexts with many continuations.

For a context word v with many stored continuations, the model keeps them
sorted by P2(w | v) descending (ties by id); for a context pair (u, v) with many,
sorted by P(w | u v).  ``suggest`` then reads the best words of a class from the
front of a list instead of scoring thousands of words.  Lists are computed with
the model's own query arithmetic, so their order is exactly the order of the
probabilities a query computes.  UNKNOWN and END, never suggested, are left out.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .arrays import offsets_dtype

if TYPE_CHECKING:
    from .model import LanguageModel

RANKED_MIN = 96
"""Contexts with more continuations than this get a ranked list."""


class RankLists:
    """Read access to the ranked lists of a model (absent sections mean no lists)."""

    def __init__(self, sections: dict[str, np.ndarray]) -> None:
        """Wrap the ``rank2.*`` and ``rank3.*`` sections, if the model has them."""
        self._off2 = sections.get("rank2.off")
        self._ids2 = sections.get("rank2.ids")
        self._slots3 = sections.get("rank3.slot")
        self._off3 = sections.get("rank3.off")
        self._ids3 = sections.get("rank3.ids")

    def bigram_list(self, v: int) -> np.ndarray | None:
        """Words stored after context word v, best first, or None if v has no list."""
        if self._off2 is None or self._ids2 is None:
            return None
        start, stop = int(self._off2[v]), int(self._off2[v + 1])
        return self._ids2[start:stop] if stop > start else None

    def trigram_list(self, slot: int) -> np.ndarray | None:
        """Words stored after the context pair in ``slot``, best first, or None."""
        if self._slots3 is None or self._off3 is None or self._ids3 is None or not len(self._slots3):
            return None
        index = int(np.searchsorted(self._slots3, slot))
        if index >= len(self._slots3) or int(self._slots3[index]) != slot:
            return None
        return self._ids3[int(self._off3[index]) : int(self._off3[index + 1])]


def rank_sections(model: LanguageModel, minimum: int = RANKED_MIN) -> dict[str, np.ndarray]:
    """Compute the ranked lists of a model's large contexts.

    Args:
        model: a model without lists (or with them: they are recomputed).
        minimum: contexts with more continuations than this are ranked.

    Returns:
        ``rank2.off`` (offsets per context word, shape (V + 4,)), ``rank2.ids``,
        ``rank3.slot`` (sorted slots that have lists), ``rank3.off`` and ``rank3.ids``.
    """
    from .model import _Slots

    size = model.vocab_size
    word_dtype = model.sections["l2.word"].dtype
    off2 = model.sections["l2.off"].astype(np.int64)
    w2 = model.sections["l2.word"]
    off3 = model.sections["l3.off"].astype(np.int64)
    w3 = model.sections["l3.word"]
    g3 = model.sections["l3.gamma"]
    contexts = len(off2) - 1
    lists2: list[np.ndarray] = []
    lengths2 = np.zeros(contexts, dtype=np.int64)
    for v in np.flatnonzero(np.diff(off2) > minimum):
        lo2, hi2 = int(off2[v]), int(off2[v + 1])
        ids = w2[lo2:hi2].astype(np.int64)
        ids = ids[ids < size]
        p2, _, _ = model._scores(ids, _Slots(int(v), lo2, hi2, -1, 0, 0, False), 1.0)
        lists2.append(ids[np.lexsort((ids, -p2))])
        lengths2[v] = len(ids)
    rank2_off = np.zeros(contexts + 1, dtype=np.int64)
    np.cumsum(lengths2, out=rank2_off[1:])
    slots3 = np.flatnonzero(np.diff(off3) > minimum)
    start_id = size + 2
    lists3: list[np.ndarray] = []
    for slot in slots3:
        v = start_id if slot == len(w2) else int(w2[slot])
        lo3, hi3 = int(off3[slot]), int(off3[slot + 1])
        ids = w3[lo3:hi3].astype(np.int64)
        ids = ids[ids < size]
        slots = _Slots(v, int(off2[v]), int(off2[v + 1]), int(slot), lo3, hi3, True)
        p3, _, _ = model._scores(ids, slots, float(g3[slot]))
        lists3.append(ids[np.lexsort((ids, -p3))])
    rank3_off = np.zeros(len(slots3) + 1, dtype=np.int64)
    np.cumsum([len(x) for x in lists3], out=rank3_off[1:])
    empty = np.zeros(0, dtype=word_dtype)
    return {
        "rank2.off": rank2_off.astype(offsets_dtype(int(rank2_off[-1]))),
        "rank2.ids": np.concatenate(lists2).astype(word_dtype) if lists2 else empty,
        "rank3.slot": slots3.astype(offsets_dtype(len(w2) + 1)),
        "rank3.off": rank3_off.astype(offsets_dtype(int(rank3_off[-1]))),
        "rank3.ids": np.concatenate(lists3).astype(word_dtype) if lists3 else empty,
    }
