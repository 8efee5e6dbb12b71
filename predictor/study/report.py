"""A session log read back into a report: per-phrase and session measures, beside simulated savings."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..errors import CorpusError
from ..simulate import TypistSettings, simulate
from .log import SessionLog, read_session_log
from .measures import ErrorCounts, PhraseMeasures, SessionMeasures, measure_phrase, pool_phrases

if TYPE_CHECKING:
    from ..query.model import LanguageModel


@dataclass(frozen=True)
class SimulatedPhrase:
    """What the simulated typist of ``foretype savings`` spends on one presented phrase.

    Attributes:
        characters: characters of the phrase.
        keystrokes: keystrokes the typist spent.
        ksr: 1 − keystrokes / characters.
    """

    characters: int
    keystrokes: float
    ksr: float


@dataclass
class SessionReport:
    """One session's measures.

    Attributes:
        log: the session log as read.
        phrases: one entry per presented phrase (cut-short phrases included, marked).
        session: the pooled measures of the submitted phrases.
        simulated: per phrase, the simulated typist's result on the same target
            with the same k (None when no comparison was asked for).
    """

    log: SessionLog
    phrases: list[PhraseMeasures]
    session: SessionMeasures
    simulated: list[SimulatedPhrase] | None = None

    @property
    def simulated_ksr(self) -> float | None:
        """The simulated typist's savings pooled over the submitted phrases."""
        if self.simulated is None:
            return None
        pairs = [s for m, s in zip(self.phrases, self.simulated) if m.complete]
        characters = sum(s.characters for s in pairs)
        return 1.0 - sum(s.keystrokes for s in pairs) / characters if characters else None

    def to_json(self) -> dict[str, Any]:
        """The report as one JSON object."""
        header = self.log.header
        phrases = [m.to_json() for m in self.phrases]
        if self.simulated is not None:
            for row, sim in zip(phrases, self.simulated):
                row["simulated_ksr"] = sim.ksr
                row["simulated_keystrokes"] = sim.keystrokes
        return {
            "log": str(self.log.path),
            "session": header.get("session"),
            "started": header.get("started"),
            "model": header.get("model"),
            "k": header.get("k"),
            "layout": header.get("layout"),
            "placement": header.get("placement"),
            "phrases_planned": header.get("phrases"),
            "ended": self.log.ended,
            "torn_last_line": self.log.torn_last_line,
            "cut_short": self.log.cut_short,
            "measures": self.session.to_json(),
            "simulated_ksr": self.simulated_ksr,
            "phrases": phrases,
        }


def session_report(log: SessionLog | str | Path) -> SessionReport:
    """Measure every phrase of a session log.

    Args:
        log: a log read with :func:`~predictor.study.log.read_session_log`, or its path.

    Raises:
        SessionLogError: the log cannot be read.
    """
    if not isinstance(log, SessionLog):
        log = read_session_log(log)
    measures = [measure_phrase(p) for p in log.phrases]
    return SessionReport(log=log, phrases=measures, session=pool_phrases(measures))


def simulate_phrases(model: LanguageModel, targets: Sequence[str], k: int) -> list[SimulatedPhrase]:
    """Type each target with the simulated typist (``foretype savings`` with its defaults and ``k``).

    Args:
        model: the model the session used.
        targets: the presented phrases.
        k: suggestions shown.

    Returns:
        One result per target; a target without words costs one keystroke per character.
    """
    settings = TypistSettings(k=k)
    memo: dict[str, SimulatedPhrase] = {}
    results = []
    for target in targets:
        if target not in memo:
            try:
                report = simulate(model, target, settings, keep_traces=False)
                memo[target] = SimulatedPhrase(report.characters, report.keystrokes, report.ksr)
            except CorpusError:
                memo[target] = SimulatedPhrase(len(target), float(len(target)), 0.0)
        results.append(memo[target])
    return results


def compare_with_simulation(report: SessionReport, model: LanguageModel, k: int | None = None) -> SessionReport:
    """Add the simulated typist's savings on the session's own phrases.

    Args:
        report: the session's report.
        model: the model to simulate with.
        k: suggestions per list; by default the session's own ``k`` (5 if the log does not say).
    """
    chosen = k if k is not None else int(report.log.header.get("k") or 5)
    report.simulated = simulate_phrases(model, [p.presented for p in report.phrases], chosen)
    return report


def _percent(value: float | None) -> str:
    return "—" if value is None else f"{100 * value:.1f}%"


def _number(value: float | None, digits: int = 2) -> str:
    return "—" if value is None else f"{value:.{digits}f}"


COLUMNS = ("phrase", "chars", "keys", "taken", "seconds", "WPM", "KSPC", "KSR", "MSD ER", "total ER", "corrected", "uncorrected")
"""The text report's columns (``simulated KSR`` is added with a comparison)."""


def _row(label: str, m: PhraseMeasures | SessionMeasures, errors: ErrorCounts | None) -> list[str]:
    rates = (
        (None, None, None, None)
        if errors is None
        else (
            errors.msd_error_rate,
            errors.total_error_rate,
            errors.corrected_error_rate,
            errors.uncorrected_error_rate,
        )
    )
    return [label, f"{m.characters}", f"{m.keystrokes}", f"{m.taken}", f"{m.seconds:.1f}", _number(m.wpm, 1), _number(m.kspc), _percent(m.ksr)] + [_percent(rate) for rate in rates]


def _notes(report: SessionReport) -> list[str]:
    notes = [f"{report.session.phrases} of {len(report.phrases)} phrases submitted; session WPM is the mean of the phrases', the other ratios pool them."]
    notes += [f"phrase {m.index + 1} was cut short: the log ends before it was submitted (left out of the session figures)." for m in report.phrases if not m.complete]
    if report.log.torn_last_line:
        notes.append("the log's last line was incomplete (the writer stopped while writing it) and was left out.")
    if not report.log.ended:
        notes.append("the session has no end mark: the page was closed or the server stopped before the last phrase.")
    if report.simulated is not None:
        notes.append("simulated KSR: foretype savings' typist on the same phrases with the same k; it never errs and takes every right word at once.")
    return notes


def format_session(report: SessionReport) -> str:
    """The report as text: a header, one row per phrase, the session's totals and what was cut short."""
    header = report.log.header
    lines = [
        f"session {header.get('session', '?')} ({report.log.path}); started {header.get('started', '?')}",
        f"model {header.get('model', '?')}, k = {header.get('k', '?')}, layout {header.get('layout', '?')}, suggestions {header.get('placement', '?')}",
    ]
    simulated = report.simulated
    rows = [list(COLUMNS) + (["simulated KSR"] if simulated is not None else [])]
    for i, m in enumerate(report.phrases):
        # Against the whole target, a phrase cut short would read as mostly errors: its rates are left blank.
        label = f"{m.index + 1}" + ("" if m.complete else " (cut short)")
        rows.append(_row(label, m, m.errors if m.complete else None) + ([_percent(simulated[i].ksr)] if simulated is not None else []))
    rows.append(_row("session", report.session, report.session.errors) + ([_percent(report.simulated_ksr)] if simulated is not None else []))
    widths = [max(len(r[c]) for r in rows) for c in range(len(rows[0]))]
    for number, row in enumerate(rows):
        cells = [row[0].ljust(widths[0])] + [cell.rjust(width) for cell, width in zip(row[1:], widths[1:])]
        lines.append("  ".join(cells).rstrip())
        if number == 0 or number == len(rows) - 2:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines + _notes(report))


def format_reports(reports: Sequence[SessionReport]) -> str:
    """Several sessions' reports as text, with pooled totals when there is more than one."""
    parts = [format_session(r) for r in reports]
    if len(reports) > 1:
        pooled = pool_phrases([m for r in reports for m in r.phrases])
        parts.append(
            f"all {len(reports)} sessions: {pooled.phrases} phrases, WPM {_number(pooled.wpm, 1)} (mean of phrases), "
            f"KSPC {_number(pooled.kspc)}, KSR {_percent(pooled.ksr)}, MSD ER {_percent(pooled.errors.msd_error_rate)}, "
            f"total ER {_percent(pooled.errors.total_error_rate)}"
        )
    return "\n\n".join(parts)


def reports_json(reports: Sequence[SessionReport]) -> dict[str, Any]:
    """Several sessions' reports as one JSON object: ``sessions`` and the ``pooled`` measures."""
    pooled = pool_phrases([m for r in reports for m in r.phrases])
    return {"sessions": [r.to_json() for r in reports], "pooled": pooled.to_json()}
