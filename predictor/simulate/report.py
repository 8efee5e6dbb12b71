"""The savings report: the figures a simulation produces, as JSON and as text."""

from __future__ import annotations

import json
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from ..outputs import write_text_output
from ..text import plural
from .typist import WordTrace

ESTIMATE_NOTE = (
    "Simulated savings are estimates for comparing models, not a clinical assessment of anyone's needs; "
    "the time model is a keystroke-level estimate in the style of Koester & Levine (from memory)."
)
"""Said beside every savings figure we print."""

REPORT_KEYS = (
    "words",
    "characters",
    "keystrokes",
    "ksr",
    "keystrokes_per_char",
    "oov_rate",
    "hit_before_first_letter",
    "hit_at_1",
    "mean_keystrokes_per_word",
    "oracle_ksr",
    "ksr_of_oracle",
    "baseline_ksr",
    "latency_us",
    "entry_rate",
)
"""The keys of ``foretype savings --json`` that scripts can rely on (README explains each)."""


@dataclass(frozen=True)
class SavingsReport:
    """What a simulated typist saved on a text, beside the oracle and the baseline.

    Attributes:
        words: words in the text.
        characters: characters of the text in the chosen text mode.
        keystrokes: keystrokes the typist spent (picks count their select cost).
        ksr: keystroke savings, 1 - keystrokes / characters.
        keystrokes_per_char: keystrokes / characters.
        oov_rate: share of words outside the model's vocabulary.
        hit_before_first_letter: share of words picked before any letter was typed.
        hit_at_1: share of words picked as the first suggestion of the list.
        mean_keystrokes_per_word: keystrokes / words (spaces and punctuation included).
        oracle_ksr: the KSR of the vocabulary-limited oracle (the most this vocabulary allows).
        ksr_of_oracle: ksr / oracle_ksr (None when the oracle saves nothing).
        baseline_ksr: the KSR of frequency-list completion without context.
        latency_us: ``p50``, ``p95``, ``p99``, ``max`` over every suggestion query, in microseconds (None if none was made).
        entry_rate: the time estimate (see :func:`foretype.simulate.entry_rate.entry_rate`).
        trace: one :class:`WordTrace` per word (empty when traces were not kept).
        queries: suggestion queries made.
        picked: words picked from a list.
        oracle_keystrokes: the oracle's keystrokes.
        baseline_keystrokes: the baseline's keystrokes.
        settings: the settings the typist used, as a JSON object.
    """

    words: int
    characters: int
    keystrokes: float
    ksr: float
    keystrokes_per_char: float
    oov_rate: float
    hit_before_first_letter: float
    hit_at_1: float
    mean_keystrokes_per_word: float
    oracle_ksr: float
    ksr_of_oracle: float | None
    baseline_ksr: float
    latency_us: dict[str, float | None]
    entry_rate: dict[str, Any]
    trace: list[WordTrace] = field(default_factory=list)
    queries: int = 0
    picked: int = 0
    oracle_keystrokes: float = 0.0
    baseline_keystrokes: float = 0.0
    settings: dict[str, Any] = field(default_factory=dict)

    def to_json(self, *, include_trace: bool = False) -> dict[str, Any]:
        """The report as a JSON object: the :data:`REPORT_KEYS` and a few more.

        Args:
            include_trace: add ``trace``, a list of per-word objects.
        """
        payload: dict[str, Any] = {key: getattr(self, key) for key in REPORT_KEYS}
        payload.update(
            queries=self.queries,
            picked=self.picked,
            oracle_keystrokes=self.oracle_keystrokes,
            baseline_keystrokes=self.baseline_keystrokes,
            settings=self.settings,
            note=ESTIMATE_NOTE,
        )
        if include_trace:
            payload["trace"] = [t.to_json() for t in self.trace]
        return payload


def latency_summary(latencies_ns: np.ndarray) -> dict[str, float | None]:
    """p50, p95, p99 and max of query times, in microseconds.

    Args:
        latencies_ns: int64 array of shape (queries,): query times in nanoseconds.
    """
    if len(latencies_ns) == 0:
        return {"p50": None, "p95": None, "p99": None, "max": None}
    p50, p95, p99 = np.percentile(latencies_ns, [50, 95, 99]) / 1000.0
    return {"p50": float(p50), "p95": float(p95), "p99": float(p99), "max": float(latencies_ns.max()) / 1000.0}


def write_trace(path: str | Path, traces: Iterable[WordTrace]) -> None:
    """Write one JSON line per word (``--trace``), following the output policy (``-``: standard output).

    Raises:
        OutputError: the file cannot be written.
    """
    lines = (json.dumps(t.to_json(), ensure_ascii=False) + "\n" for t in traces)
    write_text_output(path, "".join(lines))


TRACE_FIELDS = frozenset({"word", "keystrokes", "picked_at", "rank", "shown", "in_vocabulary"})
"""The keys of one trace line (see ``WordTrace.to_json``)."""


def is_trace_file(path: str | Path) -> bool:
    """Tell whether a file's first line is a trace line (so a new trace may replace it)."""
    try:
        with open(path, "rb") as handle:
            first = handle.readline(1 << 20)
        record = json.loads(first)
    except (OSError, ValueError):
        return False
    return isinstance(record, dict) and set(record) == TRACE_FIELDS


def _percent(value: float | None) -> str:
    return "n/a" if value is None else f"{100 * value:.1f}%"


def _micro(value: float | None) -> str:
    return "n/a" if value is None else f"{value:,.0f} µs"


def _duration(seconds: float) -> str:
    if seconds >= 7200:
        return f"{seconds / 3600:,.1f} h"
    return f"{seconds / 60:,.1f} min"


def format_report(report: SavingsReport) -> str:
    """The report as text for a terminal."""
    rate = report.entry_rate
    latency = report.latency_us
    settings = report.settings
    speedup = rate["speedup"]
    wpm_with = rate["wpm_with_prediction"]
    lines = [
        f"text: {report.words:,} words, {report.characters:,} characters ({settings.get('text_mode', 'full')} mode); {_percent(report.oov_rate)} of words outside the vocabulary",
        f"typist: k={settings.get('k')}, pick costs {plural(settings.get('select_cost', 1.0), 'keystroke')}, "
        f"automatic space {'on' if settings.get('autospace') else 'off'}, looks after {plural(settings.get('min_prefix', 0), 'letter')}",
        "",
        f"keystroke savings (KSR)  {_percent(report.ksr)}   {report.keystrokes:,.0f} keystrokes, {report.keystrokes_per_char:.3f} per character, "
        f"{report.mean_keystrokes_per_word:.2f} per word",
        f"oracle (this vocabulary) {_percent(report.oracle_ksr)}   the model reaches {_percent(report.ksr_of_oracle)} of it",
        f"frequency-list baseline  {_percent(report.baseline_ksr)}",
        f"picked before a letter   {_percent(report.hit_before_first_letter)} of words; picked at rank 1: {_percent(report.hit_at_1)}",
        f"suggestion latency       p50 {_micro(latency['p50'])}, p95 {_micro(latency['p95'])}, p99 {_micro(latency['p99'])}, "
        f"max {_micro(latency['max'])} over {report.queries:,} queries",
        "",
        f"estimated time ({rate['key_seconds']:g} s per key, {rate['scan_seconds']:g} s per changed list, {rate['list_reads']:,} lists read):",
        f"  without prediction {_duration(rate['seconds_without_prediction'])} ({rate['wpm_without_prediction']:.1f} wpm); "
        f"with prediction {_duration(rate['seconds_with_prediction'])} ("
        + ("n/a" if wpm_with is None else f"{wpm_with:.1f} wpm")
        + "); "
        + ("speed-up n/a" if speedup is None else f"speed-up x{speedup:.2f}" + (" (slower: reading lists costs more than the keys saved)" if speedup < 1 else "")),
        "",
        ESTIMATE_NOTE,
    ]
    return "\n".join(lines)
