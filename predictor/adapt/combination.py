"""The combination arithmetic: how base and user probabilities make the combined one.

Every query of :class:`~foretype.adapt.combined.AdaptedModel` goes through
these few functions, so the distribution, the exact top k and the bounds of
its search use the same IEEE double operations in the same order.
"""

from __future__ import annotations

import math

import numpy as np

from ..query.model import LanguageModel


def combine(mu: float, base: np.ndarray, user: np.ndarray) -> np.ndarray:
    """(1 - mu) * P_base + mu * P_user, elementwise (float64 arrays of one shape)."""
    return (1.0 - mu) * base + mu * user


def responsibility(worth: float, p_user: float, p_base: float) -> float:
    """The share of a token's probability the user model supplies at a worth: the EM responsibility.

    ``worth * P_user / (worth * P_user + (1 - worth) * P_base)`` (Jelinek & Mercer 1980); 0 when both are 0.
    """
    mine = worth * p_user
    total = mine + (1.0 - worth) * p_base
    return mine / total if total > 0 else 0.0


def base_context(u: int, v: int, first_learned: int, unknown: int) -> tuple[int, int]:
    """The context as the base model sees it: a word only the user model knows reads as UNKNOWN."""
    return (unknown if u >= first_learned else u), (unknown if v >= first_learned else v)


def base_probabilities(base: LanguageModel, ids: np.ndarray, ub: int, vb: int, end_id: int) -> np.ndarray:
    """P_base of ids after the base context (0 for ids past END: START and new words).

    Args:
        base: the base model.
        ids: int64 outcome ids, shape (n,).
        ub, vb: the base context (:func:`base_context`).
        end_id: the END id (V + 1).

    Returns:
        float64 array of shape (n,).
    """
    inside = ids <= end_id
    if inside.all():
        return base.probabilities_of(ub, vb, ids)
    out = np.zeros(len(ids), dtype=np.float64)
    if inside.any():
        out[inside] = base.probabilities_of(ub, vb, ids[inside])
    return out


def no_merge(m: float, value: float) -> bool:
    """Tell whether no smaller non-negative number times m rounds to m * value."""
    if value <= 0.0:
        return True
    return m * value > m * math.nextafter(value, 0.0)


__all__ = ["combine", "responsibility", "base_context", "base_probabilities", "no_merge"]
