"""Estimators: from the counts of one vocabulary to the level arrays of a model."""

from __future__ import annotations

from ..errors import OptionError
from .katz import estimate_katz
from .kneser_ney import estimate_kneser_ney
from .layout import Layout, ModelCounts, context_totals, model_counts
from .linear import estimate_linear
from .result import Estimate
from .simple import estimate_additive, estimate_mle

METHODS = ("kneser-ney", "linear", "katz", "additive", "mle")
"""The estimator names ``--method`` accepts; the first is the default."""

__all__ = ["METHODS", "ModelCounts", "Layout", "context_totals", "model_counts", "estimate", "Estimate"]


def estimate(counts: ModelCounts, method: str, add: float = 0.1) -> Estimate:
    """Run one estimator on a vocabulary's counts.

    Raises:
        OptionError: unknown method or a non-positive ``add``.
    """
    if method == "kneser-ney":
        return estimate_kneser_ney(counts)
    if method == "linear":
        return estimate_linear(counts)
    if method == "katz":
        return estimate_katz(counts)
    if method == "additive":
        if not add > 0:
            raise OptionError(f"--add must be a positive number, not {add}")
        return estimate_additive(counts, add)
    if method == "mle":
        return estimate_mle(counts)
    raise OptionError(f"unknown method {method!r}; choose one of {', '.join(METHODS)}")
