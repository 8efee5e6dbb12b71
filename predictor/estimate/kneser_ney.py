"""Interpolated modified Kneser-Ney smoothing (Chen & Goodman 1998, TR-10-98).

Each level subtracts one of three discounts D1, D2, D3+ from every count (by
whether it is 1, 2, or 3 and more) and gives the freed mass to the next lower
level.  Lower levels count *continuations* (how many distinct words precede an
n-gram) instead of occurrences, except for n-grams that begin with the sentence
start, which have no left neighbours and keep their raw counts (common practice).
The unigram level is interpolated with the uniform distribution over outcomes.
"""

from __future__ import annotations

import numpy as np

from ..counting.compiled import pure_requested
from .layout import ModelCounts, context_count_of_counts, context_totals
from .result import Estimate

try:
    from ._estimate import discounted as compiled_discounted
except ImportError:  # not built: the numpy path of _discounted answers
    compiled_discounted = None


def modified_kn_discounts(counts: np.ndarray) -> tuple[float, float, float]:
    """Estimate D1, D2, D3+ from the counts of counts of one order.

    Chen & Goodman (1998): Y = n1 / (n1 + 2 n2), D1 = 1 - 2Y n2/n1,
    D2 = 2 - 3Y n3/n2, D3+ = 3 - 4Y n4/n3, where n_r is the number of n-grams
    with count r.  Where some n_r is zero the formula is undefined or degenerate
    (D3+ = 3 when n4 = 0 leaves counts of three nothing of their own), and where
    it gives D2 or D3+ at or below 0 it is unusable; then a discount falls back
    to the one below it (D1 to 0.5), and every discount is kept within [0, r]
    so no count turns negative (our guard).  D1 = Y is always positive, so
    every discount is.

    Args:
        counts: integer counts of the distinct n-grams of one order.

    Returns:
        (D1, D2, D3+).
    """
    n1, n2, n3, n4 = (int(np.count_nonzero(counts == r)) for r in (1, 2, 3, 4))
    if n1 == 0 or n2 == 0:
        d1 = 0.5
        return d1, min(2 * d1, 2.0), min(3 * d1, 3.0)
    y = n1 / (n1 + 2 * n2)
    d1 = 1 - 2 * y * n2 / n1
    # With n3 = 0 (or n4 = 0) the formula gives D2 = 2 (or D3+ = 3): counts of two
    # (or three and more) would keep nothing of their own, so the discount below stands in.
    d2 = 2 - 3 * y * n3 / n2 if n3 else d1
    d3 = 3 - 4 * y * n4 / n3 if n3 and n4 else d2
    # On small or odd count tables the formula can put D2 or D3+ at or below 0; a
    # context whose continuations all have that count would then keep no mass for
    # the lower order (probability 0 for every unseen word), so it falls back too.
    if d2 <= 0:
        d2 = d1
    if d3 <= 0:
        d3 = d2
    return float(np.clip(d1, 0, 1)), float(np.clip(d2, 0, 2)), float(np.clip(d3, 0, 3))


def _discounted(counts: np.ndarray, offsets: np.ndarray, discounts: tuple[float, float, float]) -> tuple[np.ndarray, np.ndarray]:
    """Return (discounted values, lower-order weights) for grouped counts."""
    d1, d2, d3 = discounts
    if compiled_discounted is not None and not pure_requested():
        # One pass per group, the same double operations in the same order: identical values.
        return compiled_discounted(np.ascontiguousarray(counts, dtype=np.int64), np.ascontiguousarray(offsets, dtype=np.int64), float(d1), float(d2), float(d3))
    table = np.array([0.0, d1, d2, d3])
    subtract = table[np.minimum(counts, 3)]
    totals = context_totals(counts.astype(np.float64), offsets)
    group = np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))
    values = (counts - subtract) / totals[group]
    ones, twos, more = context_count_of_counts(counts, offsets, group)
    with np.errstate(invalid="ignore", divide="ignore"):
        gamma = np.where(totals > 0, (d1 * ones + d2 * twos + d3 * more) / totals, 1.0)
    return values, gamma


def estimate_kneser_ney(counts: ModelCounts) -> Estimate:
    """Fit interpolated modified Kneser-Ney to a vocabulary's counts."""
    layout = counts.layout
    table = counts.table
    size = counts.vocab_size
    start = size + 2
    outcomes = size + 2
    # Level 3: raw trigram counts.
    d3 = modified_kn_discounts(table.n)
    a3, g3 = _discounted(table.n, layout.trigram_off, d3)
    # Level 2: continuation counts (distinct u before v w), raw counts after START.
    continuation2 = np.bincount(layout.trigram_bigram, minlength=layout.n2).astype(np.int64)
    adjusted2 = np.where(layout.bigram_v == start, layout.bigram_n, continuation2)
    d2 = modified_kn_discounts(adjusted2)
    a2, g2 = _discounted(adjusted2, layout.bigram_off, d2)
    # Level 1: distinct left neighbours of each outcome, interpolated with uniform.
    adjusted1 = np.bincount(layout.bigram_w, minlength=outcomes).astype(np.int64)[:outcomes]
    d1 = modified_kn_discounts(adjusted1[adjusted1 > 0])
    values1, gamma1 = _discounted(adjusted1, np.array([0, outcomes]), d1)
    p1 = np.maximum(values1, 0.0) + gamma1[0] / outcomes
    return Estimate(
        interpolated=True,
        p1=p1,
        a2=a2,
        g2=g2,
        a3=a3,
        g3=g3,
        details={"discounts": {"1": list(d1), "2": list(d2), "3": list(d3)}},
    )
