"""Relative-entropy pruning (Stolcke 1998, "Entropy-based Pruning of Backoff Language Models").

Removing the n-gram (h, w) from a back-off model changes only the distribution
after h: w then backs off, p'(w | h) = alpha'(h) p(w | h'), and every word that
already backed off is rescaled by alpha'(h) / alpha(h).  With
S = sum of p(x | h) over the words stored after h and L = sum of p(x | h') over
the same words, alpha(h) = (1 - S) / (1 - L) and
alpha'(h) = (1 - S + p(w | h)) / (1 - L + p(w | h')).  The relative entropy of
the model after the removal to the model before, weighted by how often h occurs:

    D = -P(h) { p(w|h) [log p(w|h') + log alpha'(h) - log p(w|h)]
                + [log alpha'(h) - log alpha(h)] (1 - S) }

(the paper's closed form; 1 - S is the mass of the words that back off from h).
The paper prunes the n-gram when the perplexity it costs, e^D - 1, is below a
threshold theta, each n-gram judged against the unpruned model, and then
recomputes the back-off weights.  Natural logarithms throughout.
"""

from __future__ import annotations

import numpy as np

from .tables import BackoffTables

_TINY = 1e-300


def removal_cost(p: np.ndarray, q: np.ndarray, stored: np.ndarray, lower: np.ndarray, history: np.ndarray) -> np.ndarray:
    """D for removing each of a set of n-grams, each from its own context (nats).

    Args:
        p: p(w | h) of each n-gram.
        q: p(w | h'), the lower order's probability of the same word.
        stored: S of each n-gram's context (sum of its stored probabilities).
        lower: L of each n-gram's context (sum of the lower-order probabilities of its stored words).
        history: P(h) of each n-gram's context.

    Returns:
        float64 array: the relative entropy each removal costs, >= 0 up to rounding.
    """
    left = np.maximum(1.0 - stored, 0.0)
    free = np.maximum(1.0 - lower, 0.0)
    alpha_new = (left + p) / np.maximum(free + q, _TINY)
    log_new = np.log(np.maximum(alpha_new, _TINY))
    own = p * (np.log(np.maximum(q, _TINY)) + log_new - np.log(np.maximum(p, _TINY)))
    with np.errstate(divide="ignore", invalid="ignore"):
        alpha = np.where(free > 0, left / np.where(free > 0, free, 1.0), 0.0)
        # Words that back off carry mass 1 - S; none means no rescaling term.
        rescaled = np.where(left > 0, (log_new - np.log(np.where(alpha > 0, alpha, 1.0))) * left, 0.0)
    return -history * (own + rescaled)


def entropy_costs(tables: BackoffTables) -> tuple[np.ndarray, np.ndarray]:
    """Stolcke's D of every stored bigram and trigram, against the tables as they are.

    Returns:
        ``(d2, d3)``: float64 arrays of shape (n2,) and (n3,), in nats.
    """
    p_v, p_slot = tables.history_probabilities()
    s2, l2, s3, l3 = tables.context_sums()
    v = tables.context2()
    d2 = removal_cost(tables.p2, tables.p1[tables.w2], s2[v], l2[v], p_v[v])
    slot = tables.slot3()
    d3 = removal_cost(tables.p3, tables.lower_of_trigrams(), s3[slot], l3[slot], p_slot[slot])
    return d2, d3


def perplexity_costs(tables: BackoffTables) -> tuple[np.ndarray, np.ndarray]:
    """The paper's pruning score of every stored bigram and trigram: e^D - 1, the relative perplexity increase."""
    d2, d3 = entropy_costs(tables)
    return np.expm1(d2), np.expm1(d3)
