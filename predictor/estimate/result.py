"""What an estimator produces: the probabilities of every stored level."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np


@dataclass
class Estimate:
    """Smoothed values for the three levels of a :class:`~foretype.estimate.layout.Layout`.

    For an *interpolated* estimate the probability of w after (u, v) is
    ``a3 + g3 * P2(w | v)`` where ``a3`` is the stored value (0 if (u, v, w) is
    not stored) and ``P2(w | v) = a2 + g2 * P1(w)`` likewise.  For a *back-off*
    estimate a stored value is used alone and only unstored words take
    ``g * lower``.  A context with no stored entries uses the lower level as is.

    Attributes:
        interpolated: whether stored values add to the lower level (else they replace it).
        p1: float64 array of shape (V + 2,): the unigram distribution over outcomes.
        a2: float64 array of shape (n2,): values of the bigram entries.
        g2: float64 array of shape (V + 3,): lower-order weight of each context word.
        a3: float64 array of shape (n3,): values of the trigram rows.
        g3: float64 array of shape (n2 + 1,): lower-order weight of each trigram context slot.
        details: estimator parameters worth reporting (discounts, weights).
        exact_zeros: the estimator means its zero weights (maximum likelihood): keep them at 0.
    """

    interpolated: bool
    p1: np.ndarray
    a2: np.ndarray
    g2: np.ndarray
    a3: np.ndarray
    g3: np.ndarray
    details: dict[str, Any] = field(default_factory=dict)
    exact_zeros: bool = False
