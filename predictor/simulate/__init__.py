"""Keystroke-savings simulation: a typist that types a text exactly with a model's suggestions.

Usage::

    from predictor.simulate import TypistSettings, simulate
    report = simulate(model, text, TypistSettings(k=5, text_mode="words"))
    report.ksr, report.oracle_ksr, report.baseline_ksr, report.latency_us["p99"]

Simulated savings are estimates for comparing models, not a clinical
assessment of anyone's needs.
"""

from __future__ import annotations

from .editing import gap_keystrokes, replaces_automatic_space
from .entry_rate import entry_rate
from .oracle import VocabularyView, baseline_keystrokes, oracle_keystrokes
from .passage import TEXT_MODES, Passage, PassageWord, read_passage
from .report import ESTIMATE_NOTE, REPORT_KEYS, SavingsReport, format_report, write_trace
from .savings import simulate
from .typist import SuggestionSource, TypingRun, Typist, TypistSettings, WordTrace

__all__ = [
    "simulate",
    "TypistSettings",
    "WordTrace",
    "SavingsReport",
    "SuggestionSource",
    "Typist",
    "TypingRun",
    "Passage",
    "PassageWord",
    "read_passage",
    "TEXT_MODES",
    "VocabularyView",
    "oracle_keystrokes",
    "baseline_keystrokes",
    "entry_rate",
    "gap_keystrokes",
    "replaces_automatic_space",
    "format_report",
    "write_trace",
    "REPORT_KEYS",
    "ESTIMATE_NOTE",
]
