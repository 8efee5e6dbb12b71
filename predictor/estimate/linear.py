"""Linear interpolation (Jelinek & Mercer 1980) with weights fitted by EM on held-out data.

P(w | u v) = l3 q3(w | u v) + (1 - l3) P2(w | v),
P2(w | v)  = l2 q2(w | v)   + (1 - l2) P1(w),
P1(w)      = l1 q1(w)       + (1 - l1) / |O|,
where the q are maximum-likelihood estimates.  This nested form is the usual
three-weight interpolation with a uniform floor; l3 and l2 depend on a bucket of
the context's count (common practice), and a context never seen has no
trigram (or bigram) term, so the remaining weights renormalise.

The weights are fitted by EM on every 20th sentence of the corpus with the q
estimated from the other sentences; the final q use the whole corpus.
"""

from __future__ import annotations

import numpy as np

from ..counting import TrigramTable
from .layout import Layout, ModelCounts, context_totals
from .result import Estimate

BUCKETS = 12
"""Context-count buckets: 0 (unseen), then by floor(log2(count)) + 1, capped."""

EM_ITERATIONS = 50
DEFAULT_WEIGHTS = (0.95, 0.7, 0.5)
"""(l1, l2, l3) when there is no held-out sentence to fit on (tiny corpora)."""
MAX_WEIGHT = 1 - 1e-6
"""EM drives a weight to exactly 1 when the held-out text holds nothing the higher
order misses (a repetitive corpus); capping it keeps every outcome's probability
positive (our guard)."""


def count_bucket(counts: np.ndarray) -> np.ndarray:
    """Bucket of each context count: 0 for 0, else min(floor(log2 c) + 1, BUCKETS - 1)."""
    counts = np.asarray(counts, dtype=np.float64)
    with np.errstate(divide="ignore"):
        logs = np.where(counts > 0, np.floor(np.log2(np.maximum(counts, 1))) + 1, 0)
    return np.minimum(logs, BUCKETS - 1).astype(np.int64)


class _Components:
    """Maximum-likelihood estimates and context counts from one trigram table."""

    def __init__(self, table: TrigramTable, vocab_size: int) -> None:
        self.layout = Layout.of(table, vocab_size)
        self.outcomes = vocab_size + 2
        lay = self.layout
        self.ctx3_total = context_totals(table.n.astype(np.float64), lay.trigram_off)
        self.ctx2_total = context_totals(lay.bigram_n.astype(np.float64), lay.bigram_off)
        unigram = np.bincount(table.w, weights=table.n, minlength=self.outcomes)[: self.outcomes]
        self.q1 = unigram / unigram.sum()
        self.table = table

    def lookup(self, u: np.ndarray, v: np.ndarray, w: np.ndarray) -> tuple[np.ndarray, ...]:
        """Return q3, q2, q1 and the context counts c(u v .), c(v .) for arbitrary triples."""
        lay = self.layout
        base = lay.base
        bigram_key = lay.bigram_v.astype(np.int64) * base + lay.bigram_w
        start = base - 1
        # Context (u, v) -> slot.
        pos = np.searchsorted(bigram_key, u.astype(np.int64) * base + v)
        pos_c = np.minimum(pos, len(bigram_key) - 1)
        hit = (len(bigram_key) > 0) & (bigram_key[pos_c] == u.astype(np.int64) * base + v)
        slot = np.where((u == start) & (v == start), lay.n2, np.where(hit, pos_c, -1))
        c3 = np.where(slot >= 0, self.ctx3_total[np.maximum(slot, 0)], 0.0)
        tri_key = lay.trigram_ctx * base + self.table.w
        tpos = np.searchsorted(tri_key, np.maximum(slot, 0) * base + w)
        tpos_c = np.minimum(tpos, len(tri_key) - 1)
        thit = (slot >= 0) & (tri_key[tpos_c] == np.maximum(slot, 0) * base + w)
        q3 = np.where(thit, self.table.n[tpos_c] / np.maximum(c3, 1), 0.0)
        bpos = np.searchsorted(bigram_key, v.astype(np.int64) * base + w)
        bpos_c = np.minimum(bpos, len(bigram_key) - 1)
        bhit = bigram_key[bpos_c] == v.astype(np.int64) * base + w
        c2 = self.ctx2_total[v]
        q2 = np.where(bhit, lay.bigram_n[bpos_c] / np.maximum(c2, 1), 0.0)
        return q3, q2, self.q1[w], c3, c2


def fit_weights(train: TrigramTable, heldout: TrigramTable, vocab_size: int) -> tuple[float, np.ndarray, np.ndarray, float]:
    """Fit (l1, l2 by bucket, l3 by bucket) by EM to maximise held-out likelihood.

    Returns:
        ``(l1, l2, l3, log_likelihood)`` with l2 and l3 arrays of shape (BUCKETS,).
    """
    l1 = DEFAULT_WEIGHTS[0]
    l2 = np.full(BUCKETS, DEFAULT_WEIGHTS[1])
    l3 = np.full(BUCKETS, DEFAULT_WEIGHTS[2])
    l2[0] = l3[0] = 0.0
    if not len(heldout) or not len(train):
        return l1, l2, l3, float("nan")
    comp = _Components(train, vocab_size)
    q3, q2, q1, c3, c2 = comp.lookup(heldout.u, heldout.v, heldout.w)
    weight = heldout.n.astype(np.float64)
    b3 = count_bucket(c3)
    b2 = count_bucket(c2)
    uniform = 1.0 / comp.outcomes
    previous = -np.inf
    log_likelihood = previous
    for _ in range(EM_ITERATIONS):
        w3 = l3[b3]
        w2 = l2[b2]
        r3 = w3 * q3
        r2 = (1 - w3) * w2 * q2
        r1 = (1 - w3) * (1 - w2) * l1 * q1
        r0 = (1 - w3) * (1 - w2) * (1 - l1) * uniform
        total = r3 + r2 + r1 + r0
        log_likelihood = float(np.sum(weight * np.log(total)))
        share3, share2, share1, share0 = (weight * r / total for r in (r3, r2, r1, r0))
        below2 = share2 + share1 + share0
        l3 = _ratio(np.bincount(b3, share3, BUCKETS), np.bincount(b3, share3 + below2, BUCKETS), l3)
        l2 = _ratio(np.bincount(b2, share2, BUCKETS), np.bincount(b2, below2, BUCKETS), l2)
        below1 = share1 + share0
        l1 = float(share1.sum() / below1.sum()) if below1.sum() > 0 else l1
        l3[0] = l2[0] = 0.0
        if log_likelihood - previous < 1e-7 * abs(log_likelihood):
            break
        previous = log_likelihood
    return min(l1, MAX_WEIGHT), np.minimum(l2, MAX_WEIGHT), np.minimum(l3, MAX_WEIGHT), log_likelihood


def _ratio(numerator: np.ndarray, denominator: np.ndarray, fallback: np.ndarray) -> np.ndarray:
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(denominator > 0, numerator / np.where(denominator > 0, denominator, 1), fallback)


def estimate_linear(counts: ModelCounts) -> Estimate:
    """Fit linear interpolation: EM weights on held-out sentences, estimates from all."""
    train = counts.table.subtract(counts.heldout, counts.layout.base)
    l1, l2, l3, log_likelihood = fit_weights(train, counts.heldout, counts.vocab_size)
    layout = counts.layout
    table = counts.table
    outcomes = counts.vocab_size + 2
    ctx3 = context_totals(table.n.astype(np.float64), layout.trigram_off)
    ctx2 = context_totals(layout.bigram_n.astype(np.float64), layout.bigram_off)
    lam3 = l3[count_bucket(ctx3)]
    lam2 = l2[count_bucket(ctx2)]
    group3 = np.repeat(np.arange(len(ctx3)), np.diff(layout.trigram_off))
    group2 = np.repeat(np.arange(len(ctx2)), np.diff(layout.bigram_off))
    unigram = np.bincount(table.w, weights=table.n, minlength=outcomes)[:outcomes]
    return Estimate(
        interpolated=True,
        p1=l1 * unigram / unigram.sum() + (1 - l1) / outcomes,
        a2=lam2[group2] * layout.bigram_n / ctx2[group2],
        g2=1 - lam2,
        a3=lam3[group3] * table.n / ctx3[group3],
        g3=1 - lam3,
        details={
            "weights": {"1": l1, "2": l2.tolist(), "3": l3.tolist()},
            "heldout_log_likelihood": log_likelihood,
            "heldout_tokens": int(counts.heldout.n.sum()),
        },
    )
