"""The compiled steps of counting, and the switch back to the Python and numpy path they are checked against.

Each step is an optional extension (built where a C compiler exists at install
time); where it is missing, or ``FORETYPE_PURE=1`` is set, the Python and
numpy code answers, with identical counts.
"""

from __future__ import annotations

import os

try:
    from ._trigrams import count_sentences, merge_counts
except ImportError:  # not built: no compiler at install time
    count_sentences = None
    merge_counts = None

PURE_ENV = "FORETYPE_PURE"
"""Set to 1 to count with the Python and numpy path alone, as without the compiled steps."""


def pure_requested() -> bool:
    """Whether ``FORETYPE_PURE`` asks for the Python and numpy path instead of the compiled steps."""
    return os.environ.get(PURE_ENV, "").strip() not in ("", "0")


def compiled_trigrams() -> bool:
    """Whether the compiled sentence keys and table merge are built and not turned off."""
    return count_sentences is not None and not pure_requested()
