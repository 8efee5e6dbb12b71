"""The memory budget of a build (``--max-memory``) and how counting shares it out.

The budget is a ceiling on the build process's peak resident memory.  What the
interpreter and libraries hold when the build starts (the *baseline*) is
measured and subtracted; the rest, less a margin for allocator overhead, is the
*working* memory, shared out as follows:

* reading: each chunk of text costs about :data:`CHUNK_COST` times its size
  while it is tokenised, so chunks get 8% of working memory (at most 4 MiB);
* word dictionaries: 30%; once full, words never seen before are counted as
  one "unlisted" word type (they cannot enter the vocabulary);
* trigram counts: 45%; a full table is written to disk as a sorted run and
  the runs are merged at the end (see :mod:`foretype.counting.spill`);
* estimation: the model's own arrays cost about :data:`ESTIMATE_BYTES_PER_TRIGRAM`
  per stored trigram and :data:`ESTIMATE_BYTES_PER_WORD` per vocabulary word;
  a vocabulary whose model would not fit is refused with a CapacityError.

The default budget is half of the memory available when the build starts.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import CapacityError, OptionError

DEFAULT_SHARE = 0.5
"""The default budget: this share of the memory available when a build starts."""

MINIMUM_WORKING = 32 * 2**20
"""A budget must leave at least this much (32 MiB) above the baseline."""

MARGIN = 0.12
"""Share of working memory kept back for allocator overhead and fragmentation."""

CHUNK_COST = 25
"""Resident bytes per byte of text while a chunk is tokenised (text, token list, id arrays)."""

MAX_CHUNK_BYTES = 1 << 22
MIN_CHUNK_BYTES = 1 << 16

DICTIONARY_SHARE = 0.30
TABLE_SHARE = 0.45
CHUNK_SHARE = 0.08

TABLE_BYTES_PER_ROW = 56
"""Peak bytes per accumulated trigram row while tables are merged (16 stored, the rest temporary)."""

ESTIMATE_BYTES_PER_TRIGRAM = 135
"""Peak bytes per stored trigram while a model is estimated and indexed (measured: about 100, plus allocator overhead)."""

ESTIMATE_BYTES_PER_WORD = 300
"""Peak bytes per vocabulary word while the prefix index is built (measured: about 180)."""

_UNITS = {
    "": 1,
    "b": 1,
    "k": 2**10,
    "kb": 10**3,
    "kib": 2**10,
    "m": 2**20,
    "mb": 10**6,
    "mib": 2**20,
    "g": 2**30,
    "gb": 10**9,
    "gib": 2**30,
    "t": 2**40,
    "tb": 10**12,
    "tib": 2**40,
}


def parse_size(text: str) -> int:
    """Parse a memory size such as ``512M``, ``2G``, ``1.5GiB`` or ``800MB`` into bytes.

    Single letters and the ``iB`` forms are powers of 1024, ``kB``/``MB``/``GB``
    powers of 1000; a bare number is bytes.

    Raises:
        OptionError: not a size.
    """
    match = re.fullmatch(r"\s*(\d+(?:\.\d+)?)\s*([a-zA-Z]*)\s*", text)
    unit = match.group(2).lower() if match else ""
    if match is None or unit not in _UNITS:
        raise OptionError(f"--max-memory: expected a size such as 512M or 2G, not {text!r}")
    return int(float(match.group(1)) * _UNITS[unit])


def resident_bytes() -> int:
    """The current process's resident memory in bytes."""
    import psutil

    return int(psutil.Process().memory_info().rss)


def peak_resident_bytes() -> int:
    """The peak resident memory of this process so far, in bytes.

    On Linux this is ``VmHWM`` from ``/proc/self/status``, which starts afresh
    when a program is executed; ``ru_maxrss`` (the fallback) keeps the peak of
    the process that forked it, so a small child of a large parent would
    report the parent's size.
    """
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) * 1024
    except (OSError, ValueError, IndexError):
        pass
    import resource
    import sys

    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return int(peak if sys.platform == "darwin" else peak * 1024)


def available_bytes() -> int:
    """Memory the machine can give without swapping, in bytes."""
    import psutil

    return int(psutil.virtual_memory().available)


def format_size(size: float) -> str:
    """A byte count for people: ``1.5 GiB``, ``300 MiB``."""
    for unit, scale in (("GiB", 2**30), ("MiB", 2**20), ("KiB", 2**10)):
        if size >= scale:
            return f"{size / scale:.1f} {unit}"
    return f"{int(size)} B"


@dataclass(frozen=True)
class MemoryBudget:
    """A ceiling on a build's peak resident memory and its shares.

    Attributes:
        limit: the ceiling in bytes.
        baseline: resident memory when the build started, in bytes.
    """

    limit: int
    baseline: int

    @staticmethod
    def of(limit: int | None = None) -> MemoryBudget:
        """Make the budget of a build starting now.

        Args:
            limit: the ceiling in bytes (None: :data:`DEFAULT_SHARE` of available memory).

        Raises:
            OptionError: the ceiling leaves less than :data:`MINIMUM_WORKING` above
                what the process already uses.
        """
        baseline = resident_bytes()
        if limit is None:
            limit = max(int(available_bytes() * DEFAULT_SHARE), baseline + 4 * MINIMUM_WORKING)
        if limit < baseline + MINIMUM_WORKING:
            raise OptionError(
                f"--max-memory {format_size(limit)} is too small: the process already uses {format_size(baseline)} and needs at least {format_size(MINIMUM_WORKING)} more"
            )
        return MemoryBudget(limit=int(limit), baseline=baseline)

    @property
    def working(self) -> int:
        """Bytes the build may allocate above the baseline, after the margin."""
        return int((self.limit - self.baseline) * (1 - MARGIN))

    @property
    def chunk_bytes(self) -> int:
        """How many bytes of text to tokenise at a time."""
        return int(min(MAX_CHUNK_BYTES, max(MIN_CHUNK_BYTES, self.working * CHUNK_SHARE / CHUNK_COST)))

    @property
    def dictionary_bytes(self) -> int:
        """How much the word dictionaries may hold."""
        return int(self.working * DICTIONARY_SHARE)

    @property
    def table_rows(self) -> int:
        """How many trigram rows the in-memory tables may hold before they go to disk."""
        return max(1 << 14, int(self.working * TABLE_SHARE / TABLE_BYTES_PER_ROW))

    def estimate_room(self, dictionary_bytes: int) -> int:
        """Bytes left for estimating a model once the dictionaries hold ``dictionary_bytes``."""
        return max(0, self.working - dictionary_bytes)

    def require_estimate(self, trigrams: int, words: int, dictionary_bytes: int) -> None:
        """Refuse a model whose estimation would not fit in the budget.

        Args:
            trigrams: the trigrams the model would store.
            words: its vocabulary size.
            dictionary_bytes: what the counting dictionaries still hold.

        Raises:
            CapacityError: the estimate would need more than the room left.
        """
        need = trigrams * ESTIMATE_BYTES_PER_TRIGRAM + words * ESTIMATE_BYTES_PER_WORD
        room = self.estimate_room(dictionary_bytes)
        if need > room:
            raise CapacityError(
                f"a model of {trigrams:,} trigrams over {words:,} words needs about {format_size(need)} to estimate, "
                f"more than the {format_size(room)} --max-memory {format_size(self.limit)} leaves; "
                "pass a smaller --vocab-size or a larger --max-memory"
            )
