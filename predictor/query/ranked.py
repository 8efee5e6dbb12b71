"""Ranked continuation lists for contexts with many continuations: what queries read.

For a context word v with many stored continuations, the model keeps them
sorted by P2(w | v) descending (ties by id); for a context pair (u, v) with many,
sorted by P(w | u v).  ``suggest`` then reads the best words of a class from the
front of a list instead of scoring thousands of words.  Lists are computed with
the model's own query arithmetic, so their order is exactly the order of the
probabilities a query computes (:mod:`foretype.builder.ranking` writes
them).  UNKNOWN and END, never suggested, are left out.
"""

from __future__ import annotations

import numpy as np

from ..modelfile.model_arrays import ModelArrays
from ..modelfile.packed import unpack_ids

RANKED_MIN = 96
"""Contexts with more continuations than this get a ranked list."""


class RankLists:
    """Read access to the ranked lists of a model (absent sections mean no lists)."""

    def __init__(self, arrays: ModelArrays) -> None:
        """Wrap a model's ``rank2_*`` and ``rank3_*`` arrays, if it has them."""
        self._off2 = arrays.ranked2_offsets()
        self._ids2 = arrays.rank2_ids
        self._slots3 = arrays.rank3_slot
        self._off3 = arrays.rank3_off
        self._ids3 = arrays.rank3_ids

    def bigram_list(self, v: int) -> np.ndarray | None:
        """Words stored after context word v, best first, or None if v has no list."""
        if self._off2 is None or self._ids2 is None:
            return None
        start, stop = int(self._off2[v]), int(self._off2[v + 1])
        return unpack_ids(self._ids2[3 * start : 3 * stop] if self._ids2.dtype == np.uint8 else self._ids2[start:stop]) if stop > start else None

    def trigram_list(self, slot: int) -> np.ndarray | None:
        """Words stored after the context pair in ``slot``, best first, or None."""
        if self._slots3 is None or self._off3 is None or self._ids3 is None or not len(self._slots3):
            return None
        index = int(np.searchsorted(self._slots3, slot))
        if index >= len(self._slots3) or int(self._slots3[index]) != slot:
            return None
        start, stop = int(self._off3[index]), int(self._off3[index + 1])
        return unpack_ids(self._ids3[3 * start : 3 * stop] if self._ids3.dtype == np.uint8 else self._ids3[start:stop])
