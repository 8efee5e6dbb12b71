"""From an estimate to the stored levels: encode the values, then recompute every weight.

Each context's lower-order weight is recomputed from the values as the file
stores them, so every distribution still sums to 1 under the chosen encoding.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..arrays import offsets_dtype, word_id_dtype
from ..errors import OptionError
from ..estimate import Estimate, Layout, ModelCounts, context_totals, estimate
from .encoding import ENCODINGS, FLOAT32, LOG16, decode, encode

__all__ = ["fit_levels", "lay_out_levels"]


def fit_levels(counts: ModelCounts, method: str, *, add: float = 0.1, encoding: str | None = None) -> tuple[dict[str, np.ndarray], dict[str, Any]]:
    """Estimate a model and lay its levels out as model-file sections.

    Args:
        counts: the vocabulary's counts.
        method: one of :data:`foretype.estimate.METHODS`.
        add: k for ``additive``.
        encoding: value encoding (:data:`ENCODINGS`); default log16, float32 for ``mle`` and ``katz``.

    Returns:
        ``(sections, meta)``: the ``p1``, ``l2.*`` and ``l3.*`` arrays, and what
        the header records about the estimate.
    """
    return lay_out_levels(estimate(counts, method, add), counts, method, encoding)


def lay_out_levels(result: Estimate, counts: ModelCounts, method: str, encoding: str | None = None) -> tuple[dict[str, np.ndarray], dict[str, Any]]:
    """Encode an estimate's values and recompute its weights as the file stores them.

    Args:
        result: the estimator's levels.
        counts: the counts the estimate was made from (for the layout).
        method: the estimator's name, recorded in the header.
        encoding: value encoding; None for the method's default.

    Returns:
        ``(sections, meta)`` as :func:`fit_levels` returns them.
    """
    if encoding is None:
        # Back-off weights cannot absorb rounding where a context's seen words cover every
        # outcome, so the back-off estimators keep exact float32 values by default.
        encoding = FLOAT32 if method in ("mle", "katz") else LOG16
    if encoding not in ENCODINGS:
        raise OptionError(f"unknown value encoding {encoding!r}; choose one of {', '.join(ENCODINGS)}")
    layout = counts.layout
    p1 = (result.p1 / result.p1.sum()).astype(np.float32)
    a2 = encode(result.a2, encoding)
    a3 = encode(result.a3, encoding)
    p1_stored = p1.astype(np.float64)
    g2 = _lower_weights(result, decode(a2), p1_stored[layout.bigram_w], layout.bigram_off, result.g2, p1_stored.sum())
    # Level 3 is fitted to the level-2 weights as the file stores them (float32).
    g2 = g2.astype(np.float32).astype(np.float64)
    lower3 = _level2_of_rows(result.interpolated, decode(a2), g2, p1, layout, counts)
    slot_v = np.concatenate((layout.bigram_w, [counts.vocab_size + 2]))
    totals2 = _level2_totals(result.interpolated, decode(a2), g2, p1_stored, layout)
    g3 = _lower_weights(result, decode(a3), lower3, layout.trigram_off, result.g3, totals2[slot_v])
    sections = {
        "p1": p1,
        "l2.off": layout.bigram_off.astype(offsets_dtype(layout.n2)),
        "l2.word": layout.bigram_w.astype(word_id_dtype(counts.vocab_size)),
        "l2.value": a2,
        "l2.gamma": g2.astype(np.float32),
        "l3.off": layout.trigram_off.astype(offsets_dtype(len(counts.table))),
        "l3.word": counts.table.w.astype(word_id_dtype(counts.vocab_size)),
        "l3.value": a3,
        "l3.gamma": g3.astype(np.float32),
    }
    meta = {
        "method": method,
        "interpolated": result.interpolated,
        "value_encoding": encoding,
        "estimator": result.details,
    }
    return sections, meta


def _level2_of_rows(interpolated: bool, a2: np.ndarray, g2: np.ndarray, p1: np.ndarray, layout: Layout, counts: ModelCounts) -> np.ndarray:
    """P2(w | v) of every trigram row from the decoded level-2 values."""
    table = counts.table
    index = layout.trigram_bigram
    if interpolated:
        return a2[index] + g2[table.v].astype(np.float64) * p1.astype(np.float64)[table.w]
    return a2[index]


def _level2_totals(interpolated: bool, a2: np.ndarray, g2: np.ndarray, p1: np.ndarray, layout: Layout) -> np.ndarray:
    """Sum over all outcomes of P2(w | v) for each context word v, with the stored arithmetic.

    Nearly 1; a back-off weight above it divides by the lower-order mass left
    free, so the exact sum keeps that weight from magnifying rounding errors.
    """
    seen = context_totals(a2, layout.bigram_off)
    total1 = p1.sum()
    if interpolated:
        totals = seen + g2 * total1
    else:
        totals = seen + g2 * (total1 - context_totals(p1[layout.bigram_w], layout.bigram_off))
    return np.where(np.diff(layout.bigram_off) > 0, totals, total1)


def _lower_weights(
    result: Estimate, decoded: np.ndarray, lower_of_stored: np.ndarray, offsets: np.ndarray, planned: np.ndarray, lower_total: float | np.ndarray = 1.0
) -> np.ndarray:
    """Recompute each context's lower-order weight so its distribution sums to 1 after encoding.

    Args:
        lower_total: the lower-order distribution's actual sum (per context, or one
            number), so a back-off weight is (1 - stored mass) / (mass the stored words leave).
    """
    if result.exact_zeros:
        return np.zeros(len(offsets) - 1)
    stored_mass = context_totals(decoded, offsets)
    has_entries = np.diff(offsets) > 0
    if result.interpolated:
        weights = np.maximum(1.0 - stored_mass, 0.0)
    else:
        free = lower_total - context_totals(lower_of_stored, offsets)
        with np.errstate(invalid="ignore", divide="ignore"):
            weights = np.where(free > 1e-12, np.maximum(1.0 - stored_mass, 0.0) / np.where(free > 1e-12, free, 1.0), 0.0)
    return np.where(has_entries, weights, planned)
