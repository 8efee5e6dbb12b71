"""What the ARPA writer and reader share: symbols, log zero, numbers, display-form comments.

An ARPA file lists, per order, ``log10 P <TAB> words [<TAB> log10 back-off]``.
Text before the ``\\data\\`` line is ignored by readers; foretype writes its
notes there as lines starting with ``#`` (the convention readers that check
this part accept), among them one line per word whose display form differs
from its model form, so an import restores display forms exactly.
"""

from __future__ import annotations

import math

LOG_ZERO = -99.0
"""log10 of zero by the format's convention; any value at or below it reads as probability 0."""

MAX_ORDER = 3
"""The highest order foretype models (and so reads and writes)."""

DISPLAY_TAG = "# foretype-display"
"""Start of a comment line ``# foretype-display<TAB>model form<TAB>display form``."""

NOTE_TAG = "# foretype"
"""Start of foretype's other comment lines."""


def format_log10(probability: float) -> str:
    """log10 of a probability as ARPA text: 8 decimals, or ``-99`` for zero."""
    if probability <= 0.0:
        return "-99"
    value = math.log10(probability)
    return "0" if value == 0.0 else f"{value:.8f}"


def probability_of(log10_value: float) -> float:
    """The probability an ARPA log10 value stands for (0 at or below :data:`LOG_ZERO`)."""
    if log10_value <= LOG_ZERO:
        return 0.0
    return 10.0**log10_value


def display_line(model_form: str, display: str) -> str:
    """The comment line that records one word's display form."""
    return f"{DISPLAY_TAG}\t{model_form}\t{display}"


def parse_display_line(line: str) -> tuple[str, str] | None:
    """(model form, display form) of a display comment line, or None if it is not one."""
    if not line.startswith(DISPLAY_TAG + "\t"):
        return None
    parts = line.rstrip("\r\n").split("\t")
    if len(parts) != 3 or not parts[1] or not parts[2]:
        return None
    return parts[1], parts[2]
