"""Model bytes before writing, and the search for the pruning strength that fits a byte budget."""

from __future__ import annotations

import json
from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from ...arrays import offsets_dtype, word_id_dtype
from ...modelfile.blocked import to_blocks
from ...modelfile.packed import PACKED_LIMIT
from ...modelfile.weights import DERIVED_MAX
from .quantise import CODEBOOK8, LEVELS
from .tables import BackoffTables

_ALIGN = 64
_PREAMBLE = 24
_ENTRY_BYTES = 150
"""An upper bound on one section's entry in the JSON header (name, dtype, shape, offset, size, checksum)."""


def _aligned(n: int) -> int:
    return (n + _ALIGN - 1) // _ALIGN * _ALIGN


def file_bytes_of(meta: Mapping[str, Any], section_bytes: Mapping[str, int]) -> int:
    """An upper bound, within a few hundred bytes, on the size of the model file these sections make.

    Args:
        meta: the header fields.
        section_bytes: name -> bytes of each section.
    """
    header = len(json.dumps(dict(meta), sort_keys=True, separators=(",", ":")).encode("utf-8")) + _ENTRY_BYTES * len(section_bytes) + 64
    return _aligned(_PREAMBLE + header) + sum(_aligned(n) for n in section_bytes.values())


def level_bytes(tables: BackoffTables, encoding: str, ranked_min: int) -> dict[str, int]:
    """Bytes of the sections that depend on which n-grams are stored (levels, codebooks, ranked lists)."""
    size = tables.size
    # As a saved file stores them: ids of more than 16 bits in three bytes.
    word = word_id_dtype(size).itemsize if size + 3 <= 2**16 or size + 3 > PACKED_LIMIT else 3
    value = {"float32": 4, "log16": 2, CODEBOOK8: 1}[encoding]
    n2, n3 = tables.n2, tables.n3
    counts2 = np.diff(tables.off2)
    counts3 = np.diff(tables.off3)
    big2 = np.flatnonzero(counts2 > ranked_min)
    big3 = np.flatnonzero(counts3 > ranked_min)
    listed2 = _suggestable(tables.w2, tables.off2, big2, size)
    listed3 = _suggestable(tables.w3, tables.off3, big3, size)
    out = {
        "p1": 4 * (size + 2),
        "l2.off": offsets_dtype(n2).itemsize * (size + 4),
        "l2.word": word * n2,
        "l2.value": value * n2,
        **_level2_weight_bytes(counts2, size),
        **_level3_offset_bytes(tables.off3),
        "l3.word": word * n3,
        "l3.value": value * n3,
        **_level3_weight_bytes(counts3, n2),
        "rank2.word": word * len(big2),
        "rank2.list_off": offsets_dtype(listed2).itemsize * (len(big2) + 1),
        "rank2.ids": word * listed2,
        "rank3.slot": offsets_dtype(n2 + 1).itemsize * len(big3),
        "rank3.off": offsets_dtype(listed3).itemsize * (len(big3) + 1),
        "rank3.ids": word * listed3,
    }
    if encoding == CODEBOOK8:
        out["l2.codebook"] = out["l3.codebook"] = 8 * LEVELS
    return out


def _level2_weight_bytes(counts2: np.ndarray, size: int) -> dict[str, int]:
    """Bytes of level 2's weights as a saved file stores them (as :func:`_level3_weight_bytes`)."""
    listed = int(np.count_nonzero(counts2 > DERIVED_MAX))
    if 8 * listed >= 4 * (size + 3):
        return {"l2.gamma": 4 * (size + 3)}
    return {"l2.weight_slot": 4 * listed, "l2.weight_value": 4 * listed}


def _level3_weight_bytes(counts3: np.ndarray, n2: int) -> dict[str, int]:
    """Bytes of level 3's weights as a saved file stores them: a slot and a float32 for each pair
    with more than :data:`~foretype.modelfile.weights.DERIVED_MAX` entries (the others are derived;
    the few whose derived weight would not do are left out of the estimate), or every weight when
    that is smaller."""
    listed = int(np.count_nonzero(counts3 > DERIVED_MAX))
    if 8 * listed >= 4 * (n2 + 1):
        return {"l3.gamma": 4 * (n2 + 1)}
    return {"l3.weight_slot": 4 * listed, "l3.weight_value": 4 * listed}


def _level3_offset_bytes(offsets: np.ndarray) -> dict[str, int]:
    """Bytes of level 3's offsets as the file stores them (in blocks where they fit)."""
    blocks = to_blocks(offsets)
    if blocks is None:
        return {"l3.off": offsets_dtype(int(offsets[-1])).itemsize * len(offsets)}
    return {"l3.off_base": blocks[0].nbytes, "l3.off_delta": blocks[1].nbytes, "l3.off_wide": blocks[2].nbytes}


def _suggestable(words: np.ndarray, offsets: np.ndarray, contexts: np.ndarray, size: int) -> int:
    """How many ids below V the given contexts store (what their ranked lists hold)."""
    if not len(contexts):
        return 0
    below = np.concatenate(([0], np.cumsum(words < size)))
    return int((below[offsets[contexts + 1]] - below[offsets[contexts]]).sum())


def search_removals(total: int, size_after: Callable[[int], int], budget: int) -> int:
    """The fewest removals m in [0, total] with ``size_after(m) <= budget`` (binary search; size falls as m grows).

    Returns:
        m, or -1 when even ``size_after(total)`` exceeds the budget.
    """
    if size_after(total) > budget:
        return -1
    low, high = 0, total
    while low < high:
        middle = (low + high) // 2
        if size_after(middle) <= budget:
            high = middle
        else:
            low = middle + 1
    return low
