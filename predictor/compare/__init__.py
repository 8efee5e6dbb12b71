"""Paired comparisons of models and typist settings on the same test text, with confidence intervals.

Usage::

    from foretype.compare import ComparedSystem, run_comparison
    systems = [ComparedSystem("kn", kn_model, TypistSettings(k=5)), ComparedSystem("katz", katz_model, TypistSettings(k=5))]
    result = run_comparison(systems, text, resamples=1000, seed=0)
    result.measures["ksr"].values, result.measures["ksr"].pairs[(0, 1)].p_value

Simulated figures compare designs; they are no clinical assessment of anyone's needs.
"""

from __future__ import annotations

from .chart import compare_chart
from .intervals import ksr_interval
from .output import comparison_csv, comparison_json, format_comparison, sentences_csv
from .runner import MEASURES, ComparedSystem, ComparisonResult, SystemRun, label_systems, run_comparison

__all__ = [
    "ComparedSystem",
    "ComparisonResult",
    "SystemRun",
    "MEASURES",
    "run_comparison",
    "label_systems",
    "format_comparison",
    "comparison_json",
    "comparison_csv",
    "sentences_csv",
    "compare_chart",
    "ksr_interval",
]
