"""The Witten-Bell arithmetic of the user model: one context's counts ready for scoring, and the interpolation.

See :mod:`foretype.adapt.user_model` for the model; every user probability,
and every bound of the exact top-k search, goes through :func:`interpolate` or
the same operations in the same order.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .followers import Followers


@dataclass(frozen=True)
class UserContext:
    """What the user model knows about one context (u, v), ready for vectorised scoring.

    Attributes:
        ids3: int64 array of shape (T3,): words seen after (u, v), sorted (empty if none).
        weights3: float64 array of shape (T3,): their inflated counts.
        total3: inflated count of the context (0 if unseen).
        gamma3: the weight passed to the bigram order (1 if the context is unseen).
        ids2, weights2, total2, gamma2: the same after v alone.
        total1: inflated count of every learned token (N).
        bucket: the evidence bucket: 2 if (u, v) was seen, 1 if only v was, else 0.
        three, two: the follower tables themselves (None if unseen), for single lookups.
        base_knows: the base model knows both context words (no word of (u, v) reads as UNKNOWN to it).
    """

    ids3: np.ndarray
    weights3: np.ndarray
    total3: float
    gamma3: float
    ids2: np.ndarray
    weights2: np.ndarray
    total2: float
    gamma2: float
    total1: float
    bucket: int
    three: Followers | None
    two: Followers | None
    base_knows: bool = True


EMPTY_IDS = np.zeros(0, dtype=np.int64)
EMPTY_WEIGHTS = np.zeros(0, dtype=np.float64)


def level(ids: np.ndarray, weights: np.ndarray, total: float, candidates: np.ndarray) -> np.ndarray:
    """c(h w) / c(h .) for each candidate (0 where unseen after h)."""
    if not len(ids):
        return np.zeros(len(candidates), dtype=np.float64)
    pos = np.searchsorted(ids, candidates)
    np.minimum(pos, len(ids) - 1, out=pos)
    freq = weights[pos] / total
    freq[ids[pos] != candidates] = 0.0
    return freq


def interpolate(p1: np.ndarray, f2: np.ndarray | float, f3: np.ndarray | float, context: UserContext) -> np.ndarray:
    """The Witten-Bell chain from the unigram up (the one arithmetic every user probability uses).

    Args:
        p1: float64 array: c(w) / N per candidate.
        f2: c(v w) / c(v .) per candidate (or 0.0).
        f3: c(u v w) / c(u v .) per candidate (or 0.0).
        context: the context's gammas.

    Returns:
        float64 array of P_user per candidate.  For fixed gammas it never
        decreases when p1, f2 or f3 grow, which the exact top-k bound relies on.
    """
    g2 = context.gamma2
    p2 = (1.0 - g2) * f2 + g2 * p1
    g3 = context.gamma3
    return (1.0 - g3) * f3 + g3 * p2


__all__ = ["UserContext", "interpolate", "level", "EMPTY_IDS", "EMPTY_WEIGHTS"]
