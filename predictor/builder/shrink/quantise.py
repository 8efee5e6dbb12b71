"""8-bit value codebooks: 256 probabilities per order, each stored value one byte.

The codebook of an order is fitted to that order's values in the log domain:
it starts from 256 bins holding equal numbers of values (the usual binning of
compact n-gram stores) and is refined by Lloyd's algorithm (k-means in one
dimension) on log2 p, so a dense stretch of values gets many levels and the
sparse top of the range is not lumped into one bin.  A value is stored as the
code of the nearest level (in log2 p).  After encoding, every back-off weight
is recomputed from the decoded values (:mod:`predictor.shrink.sections`), so
each distribution still sums to 1; a context whose rounded values would hold a
mass of 1 or more has its values moved one level down until they do not.
"""

from __future__ import annotations

import numpy as np

from ...modelfile.encoding import CODEBOOK8

__all__ = ["CODEBOOK8", "fit_codebook", "encode_codebook", "keep_mass_below_one"]

LEVELS = 256
LLOYD_ROUNDS = 12
_FLOOR = 2.0**-60
"""The smallest level; values at or below it (and zeros) take it."""


def fit_codebook(values: np.ndarray, weights: np.ndarray | None = None, levels: int = LEVELS, sample: int = 2_000_000, seed: int = 0) -> np.ndarray:
    """Fit the levels of one order's values.

    Args:
        values: float64 probabilities in (0, 1].
        weights: how much each value's rounding error counts (None: equally).
        levels: codebook size.
        sample: fit on at most this many values (drawn with a fixed seed).

    Returns:
        float64 array of shape (levels,): the levels, ascending, in (0, 1].
    """
    logs = np.log2(np.maximum(values, _FLOOR)) if len(values) else np.zeros(1)
    weights = np.ones(len(logs)) if weights is None or not len(values) else np.asarray(weights, dtype=np.float64)
    if len(logs) > sample:
        chosen = np.random.default_rng(seed).choice(len(logs), size=sample, replace=False)
        logs, weights = logs[chosen], weights[chosen]
    order = np.argsort(logs)
    logs, weights = logs[order], weights[order]
    centres = np.quantile(logs, (np.arange(levels) + 0.5) / levels)
    for _ in range(LLOYD_ROUNDS):
        centres = np.unique(centres)
        edges = (centres[1:] + centres[:-1]) / 2
        bins = np.searchsorted(edges, logs)
        sums = np.bincount(bins, weights=logs * weights, minlength=len(centres))
        counts = np.bincount(bins, weights=weights, minlength=len(centres))
        moved = np.where(counts > 0, sums / np.maximum(counts, 1), centres)
        if np.allclose(moved, centres, rtol=0, atol=1e-9):
            break
        centres = moved
    centres = np.unique(np.minimum(centres, 0.0))
    book = np.exp2(centres)
    if len(book) < levels:
        # Fewer distinct values than levels: pad below with smaller levels, keeping the order.
        pad = book[0] * np.exp2(-np.arange(levels - len(book), 0, -1, dtype=np.float64))
        book = np.concatenate((np.maximum(pad, _FLOOR), book))
    return book


def encode_codebook(values: np.ndarray, book: np.ndarray) -> np.ndarray:
    """Code of the level nearest each value in log2 (uint8 array, same shape)."""
    logs = np.log2(np.maximum(values, _FLOOR))
    centres = np.log2(book)
    edges = (centres[1:] + centres[:-1]) / 2
    return np.searchsorted(edges, logs).astype(np.uint8)


def keep_mass_below_one(codes: np.ndarray, book: np.ndarray, offsets: np.ndarray, limit: float = 1.0 - 1e-6) -> np.ndarray:
    """Move the codes of every context whose decoded mass reaches ``limit`` down one level at a time.

    Args:
        codes: uint8 codes of one order, grouped by ``offsets``.
        book: that order's levels (ascending).
        offsets: int64 group offsets.

    Returns:
        The codes, with every group's decoded sum below ``limit``.
    """
    codes = codes.copy()
    group = np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))
    for _ in range(LEVELS):
        totals = np.bincount(group, weights=book[codes], minlength=len(offsets) - 1)
        over = totals >= limit
        if not over.any():
            break
        lower = over[group] & (codes > 0)
        codes[lower] -= 1
    return codes
