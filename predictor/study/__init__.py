"""Copy-task text-entry studies: the session log, its measures and its report.

Usage::

    from foretype.study import read_session_log, session_report
    report = session_report("session.jsonl")
    report.session.wpm, report.session.ksr, report.session.errors.total_error_rate
    report.log.cut_short          # phrases presented but never submitted

The engine part only: no web code here.  The page and the endpoints that write
logs live with the service; ``foretype study report`` is the command.
"""

from __future__ import annotations

from .chart import entry_rate_chart
from .log import (
    EVENT_FIELDS,
    KEYSTROKE_KINDS,
    LOG_FORMAT,
    LOG_VERSION,
    PhraseLog,
    SessionLog,
    SessionLogError,
    SessionLogWriter,
    check_event,
    read_session_log,
)
from .measures import (
    ErrorCounts,
    PhraseMeasures,
    SessionMeasures,
    erased_characters,
    error_counts,
    measure_phrase,
    minimum_string_distance,
    pool_phrases,
    words_per_minute,
)
from .phrases import demo_phrases, demo_phrases_path, read_phrases
from .report import (
    SessionReport,
    SimulatedPhrase,
    compare_with_simulation,
    format_reports,
    format_session,
    reports_json,
    session_report,
    simulate_phrases,
)

__all__ = [
    "EVENT_FIELDS",
    "KEYSTROKE_KINDS",
    "LOG_FORMAT",
    "LOG_VERSION",
    "PhraseLog",
    "SessionLog",
    "SessionLogError",
    "SessionLogWriter",
    "check_event",
    "read_session_log",
    "ErrorCounts",
    "PhraseMeasures",
    "SessionMeasures",
    "erased_characters",
    "error_counts",
    "measure_phrase",
    "minimum_string_distance",
    "pool_phrases",
    "words_per_minute",
    "demo_phrases",
    "demo_phrases_path",
    "read_phrases",
    "SessionReport",
    "SimulatedPhrase",
    "compare_with_simulation",
    "format_reports",
    "format_session",
    "reports_json",
    "session_report",
    "simulate_phrases",
    "entry_rate_chart",
]
