"""Katz back-off (Katz 1987) with Good-Turing discounting (Good 1953).

Counts up to K = 5 are discounted by d_r = (r*/r - (K+1) n_{K+1}/n_1) /
(1 - (K+1) n_{K+1}/n_1), with the Good-Turing count r* = (r + 1) n_{r+1} / n_r;
larger counts are kept.  A word unseen after a context takes the lower order's
probability times alpha, the freed mass over the lower-order mass of the unseen
words, so each distribution sums to 1.
"""

from __future__ import annotations

import numpy as np

from .layout import ModelCounts, context_totals
from .result import Estimate

KATZ_K = 5
"""Counts above this are not discounted (Katz's usual choice)."""


def good_turing_ratios(counts: np.ndarray, k: int = KATZ_K) -> np.ndarray:
    """Return the Katz discount ratio d_r for r = 0..k (d_0 unused) from one order's counts.

    When the Good-Turing estimates are unusable (some n_r is zero, or a ratio
    falls outside (0, 1]), absolute discounting with D = n1 / (n1 + 2 n2)
    stands in (Ney's estimate; our guard): d_r = 1 - D / r, with D = 0.5 when
    n1 or n2 is zero.
    """
    n = np.array([np.count_nonzero(counts == r) for r in range(k + 2)], dtype=np.float64)
    ratios = np.ones(k + 1)
    usable = n[1] > 0 and all(n[r] > 0 for r in range(1, k + 2))
    if usable:
        common = (k + 1) * n[k + 1] / n[1]
        for r in range(1, k + 1):
            r_star = (r + 1) * n[r + 1] / n[r]
            ratios[r] = (r_star / r - common) / (1 - common) if common < 1 else 0.0
        usable = bool(np.all((ratios[1:] > 0) & (ratios[1:] <= 1)))
    if not usable:
        # With no n-gram seen twice, Ney's D would be 1 and remove every singleton
        # (at the unigram level, nothing would be left for them); 0.5 as in the KN guard.
        d = n[1] / (n[1] + 2 * n[2]) if n[1] > 0 and n[2] > 0 else 0.5
        ratios = np.array([1.0] + [1 - d / r for r in range(1, k + 1)])
    return ratios


def _discount(counts: np.ndarray, offsets: np.ndarray, ratios: np.ndarray) -> np.ndarray:
    """Discounted relative frequencies of grouped counts."""
    totals = context_totals(counts.astype(np.float64), offsets)
    group = np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))
    factor = np.where(counts <= KATZ_K, ratios[np.minimum(counts, KATZ_K)], 1.0)
    return factor * counts / totals[group]


def backoff_weights(seen: np.ndarray, lower_of_seen: np.ndarray, offsets: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Return (possibly rescaled seen values, alpha) so each context's distribution sums to 1.

    alpha = (1 - sum of seen values) / (1 - sum of the lower-order values of the
    seen words).  Guards (ours): where no mass is left, seen values are scaled by
    c/(c + 1) with c the number of seen words, so unseen words keep some
    probability; where the seen words cover all lower-order mass, the seen
    values are renormalised and alpha is 0.
    """
    group = np.repeat(np.arange(len(offsets) - 1), np.diff(offsets))
    seen_mass = context_totals(seen, offsets)
    lower_mass = context_totals(lower_of_seen, offsets)
    types = np.diff(offsets).astype(np.float64)
    exhausted = (seen_mass >= 1 - 1e-9) & (types > 0)
    scale = np.where(exhausted, types / (types + 1) / np.maximum(seen_mass, 1e-300), 1.0)
    seen = seen * scale[group]
    seen_mass = seen_mass * scale
    free = 1 - lower_mass
    covered = free <= 1e-12
    with np.errstate(invalid="ignore", divide="ignore"):
        alpha = np.where(covered, 0.0, (1 - seen_mass) / np.where(covered, 1.0, free))
        renorm = np.where(covered & (seen_mass > 0), 1 / seen_mass, 1.0)
    seen = seen * renorm[group]
    alpha = np.where(types > 0, alpha, 1.0)
    return seen, alpha


def katz_unigram(counts: np.ndarray, ratios: np.ndarray) -> np.ndarray:
    """Good-Turing discounted unigram; outcomes never seen share the freed mass equally.

    If no mass was freed (no count of K or less), the seen outcomes give up the
    share c / (c + 1) keeps (our guard), so an outcome never seen, such as
    UNKNOWN in a corpus without rare words, still gets a positive probability.
    """
    total = counts.sum()
    factor = np.where(counts <= KATZ_K, ratios[np.minimum(counts, KATZ_K)], 1.0)
    p = factor * counts / total
    unseen = counts == 0
    if unseen.any():
        seen_mass = p.sum()
        if seen_mass >= 1 - 1e-9:
            # Nothing was discounted (every count above K): scale the seen words by
            # c / (c + 1), c the number of seen outcomes, as backoff_weights does.
            seen_types = np.count_nonzero(~unseen)
            p = p * (seen_types / (seen_types + 1) / seen_mass)
        p[unseen] = (1 - p.sum()) / unseen.sum()
    else:
        p = counts / total
    return p


def estimate_katz(counts: ModelCounts) -> Estimate:
    """Fit Katz back-off with Good-Turing discounting to a vocabulary's counts."""
    layout = counts.layout
    table = counts.table
    outcomes = counts.vocab_size + 2
    unigram_counts = np.bincount(table.w, weights=table.n, minlength=outcomes)[:outcomes].astype(np.int64)
    r1 = good_turing_ratios(unigram_counts[unigram_counts > 0])
    p1 = katz_unigram(unigram_counts, r1)
    r2 = good_turing_ratios(layout.bigram_n)
    seen2 = _discount(layout.bigram_n, layout.bigram_off, r2)
    a2, g2 = backoff_weights(seen2, p1[layout.bigram_w], layout.bigram_off)
    r3 = good_turing_ratios(table.n)
    seen3 = _discount(table.n, layout.trigram_off, r3)
    lower = a2[layout.trigram_bigram]
    a3, g3 = backoff_weights(seen3, lower, layout.trigram_off)
    return Estimate(
        interpolated=False,
        p1=p1,
        a2=a2,
        g2=g2,
        a3=a3,
        g3=g3,
        details={"good_turing_ratios": {"1": r1[1:].tolist(), "2": r2[1:].tolist(), "3": r3[1:].tolist()}},
    )
