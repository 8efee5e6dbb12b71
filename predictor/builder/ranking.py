"""Writing the ranked continuation lists of a model's large contexts (read by :mod:`foretype.query.ranked`)."""

from __future__ import annotations

import numpy as np

from ..arrays import offsets_dtype, word_id_dtype
from ..query.model import LanguageModel
from ..query.ranked import RANKED_MIN
from ..query.scoring import ScoringCore, Slots


def rank_sections(model: LanguageModel, minimum: int = RANKED_MIN) -> dict[str, np.ndarray]:
    """Compute the ranked lists of a model's large contexts.

    Args:
        model: a model without lists (or with them: they are recomputed).
        minimum: contexts with more continuations than this are ranked.

    Returns:
        ``rank2.word`` (the context words with a list, increasing), ``rank2.list_off``
        (where each one's list starts, one end entry), ``rank2.ids``,
        ``rank3.slot`` (sorted slots that have lists), ``rank3.off`` and ``rank3.ids``.
    """
    core = ScoringCore(model.arrays, model.meta, model.vocab_size)
    size = model.vocab_size
    word_dtype = word_id_dtype(size)
    off2 = model.arrays.l2_off.astype(np.int64)
    w2 = model.arrays.bigram_words()
    off3 = model.arrays.level3_offsets()
    w3 = model.arrays.trigram_words()
    contexts = len(off2) - 1
    lists2: list[np.ndarray] = []
    lengths2 = np.zeros(contexts, dtype=np.int64)
    for v in np.flatnonzero(np.diff(off2) > minimum):
        lo2, hi2 = int(off2[v]), int(off2[v + 1])
        ids = w2[lo2:hi2].astype(np.int64)
        ids = ids[ids < size]
        p2, _, _ = core.scores(ids, Slots(int(v), lo2, hi2, -1, 0, 0, False), 1.0)
        lists2.append(ids[np.lexsort((ids, -p2))])
        lengths2[v] = len(ids)
    listed2 = np.flatnonzero(lengths2 > 0)
    rank2_off = np.zeros(len(listed2) + 1, dtype=np.int64)
    np.cumsum(lengths2[listed2], out=rank2_off[1:])
    slots3 = np.flatnonzero(np.diff(off3) > minimum)
    start_id = size + 2
    lists3: list[np.ndarray] = []
    for slot in slots3:
        last = start_id if slot == len(w2) else int(w2[slot])
        lo3, hi3 = int(off3[slot]), int(off3[slot + 1])
        ids = w3[lo3:hi3].astype(np.int64)
        ids = ids[ids < size]
        slots = Slots(last, int(off2[last]), int(off2[last + 1]), int(slot), lo3, hi3, True)
        p3, _, _ = core.scores(ids, slots, core.gamma3(slots))
        lists3.append(ids[np.lexsort((ids, -p3))])
    rank3_off = np.zeros(len(slots3) + 1, dtype=np.int64)
    np.cumsum([len(x) for x in lists3], out=rank3_off[1:])
    empty = np.zeros(0, dtype=word_dtype)
    return {
        "rank2.word": listed2.astype(word_dtype),
        "rank2.list_off": rank2_off.astype(offsets_dtype(int(rank2_off[-1]))),
        "rank2.ids": np.concatenate(lists2).astype(word_dtype) if lists2 else empty,
        "rank3.slot": slots3.astype(offsets_dtype(len(w2) + 1)),
        "rank3.off": rank3_off.astype(offsets_dtype(int(rank3_off[-1]))),
        "rank3.ids": np.concatenate(lists3).astype(word_dtype) if lists3 else empty,
    }
