"""Add-k smoothing and plain maximum likelihood, the reference estimators.

Add-k (Lidstone; Laplace for k = 1): P(w | u v) = (c(u v w) + k) / (c(u v .) + k |O|)
over the |O| = V + 2 outcomes (words, UNKNOWN, END).  An unseen context gives
the uniform distribution, which is what the formula gives with zero counts.

Maximum likelihood: P(w | u v) = c(u v w) / c(u v .).  It gives zero to every
trigram not seen after a seen context, and is undefined for an unseen context;
the engine then uses the bigram estimate c(v w) / c(v .), and for an unseen
context word the unigram estimate c(w) / N.  Words with zero probability are
never suggested ahead of others but can still appear at the end of a list when
nothing else matches; scoring a text with a zero-probability token gives an
infinite perplexity.
"""

from __future__ import annotations

import numpy as np

from .layout import ModelCounts, context_totals
from .result import Estimate


def estimate_additive(counts: ModelCounts, add: float) -> Estimate:
    """Fit add-k smoothing with ``add`` = k > 0."""
    layout = counts.layout
    table = counts.table
    outcomes = counts.vocab_size + 2
    totals = context_totals(table.n.astype(np.float64), layout.trigram_off)
    denominator = totals + add * outcomes
    group = np.repeat(np.arange(len(totals)), np.diff(layout.trigram_off))
    a3 = table.n / denominator[group]
    g3 = add * outcomes / denominator
    return Estimate(
        interpolated=True,
        p1=np.full(outcomes, 1.0 / outcomes),
        a2=np.zeros(layout.n2),
        g2=np.ones(layout.base),
        a3=a3,
        g3=g3,
        details={"add": add},
    )


def estimate_mle(counts: ModelCounts) -> Estimate:
    """Fit plain maximum-likelihood estimates (for reference only)."""
    layout = counts.layout
    table = counts.table
    outcomes = counts.vocab_size + 2
    unigram = np.bincount(table.w, weights=table.n, minlength=outcomes)[:outcomes]
    return Estimate(
        interpolated=False,
        p1=unigram / unigram.sum(),
        a2=_relative(layout.bigram_n, layout.bigram_off),
        g2=np.zeros(layout.base),
        a3=_relative(table.n, layout.trigram_off),
        g3=np.zeros(layout.n2 + 1),
        exact_zeros=True,
    )


def _relative(values: np.ndarray, offsets: np.ndarray) -> np.ndarray:
    totals = context_totals(values.astype(np.float64), offsets)
    group = np.repeat(np.arange(len(totals)), np.diff(offsets))
    return values / totals[group]
