"""Resampling statistics over test sentences: confidence intervals and paired significance tests.

Usage::

    from foretype.stats import RatioMeasure, paired_bootstrap
    ksr = RatioMeasure("ksr", keystrokes, characters, transform=lambda r: 1.0 - r)
    result = paired_bootstrap(ksr, resamples=1000, seed=0)
    result.values, result.intervals, result.pairs[(0, 1)].p_value
"""

from __future__ import annotations

from .resampling import (
    BootstrapResult,
    PairResult,
    RatioMeasure,
    approximate_randomisation,
    bootstrap_interval,
    paired_bootstrap,
    resample_indices,
)

__all__ = [
    "RatioMeasure",
    "BootstrapResult",
    "PairResult",
    "paired_bootstrap",
    "approximate_randomisation",
    "bootstrap_interval",
    "resample_indices",
]
