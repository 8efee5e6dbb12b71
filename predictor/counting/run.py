"""Counting a corpus end to end: reading files in chunks, feeding tokenising workers or the counter in order."""

from __future__ import annotations

import os
from collections import deque
from collections.abc import Callable, Iterable, Iterator
from typing import Any

from ..errors import OutputError
from .corpus import CHUNK_BYTES, iter_chunks, resolve_corpus
from .counter import CorpusCounter
from .counts import CorpusCounts
from .memory import MemoryBudget
from .tokenisers import tokenise_part, tokeniser_pool

ProgressCallback = Callable[[int, int], None]
"""Called with (bytes done, bytes in all) while a corpus is read."""


def count_corpus(
    paths: Iterable[str | os.PathLike[str]],
    *,
    wrapped: bool = False,
    replace_bad_bytes: bool = False,
    reject_binary: bool = False,
    progress: ProgressCallback | None = None,
    budget: MemoryBudget | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
    min_count: int | None = None,
    max_vocabulary: int | None = None,
) -> CorpusCounts:
    """Read and count corpus files or folders.

    Args:
        paths: text files, or folders of them.
        wrapped: treat single line breaks as spaces.
        replace_bad_bytes: replace invalid UTF-8 instead of failing.
        reject_binary: fail on binary files inside folders instead of skipping them.
        progress: called with (bytes done, bytes in all) after each chunk.
        budget: the memory budget (None: the default share of the machine).
        spill_dir: where counts that outgrow memory go (None: the system's temporary folder).
        min_count: with ``max_vocabulary``: when the whole vocabulary above this count will be
            kept, fail as soon as it exceeds ``max_vocabulary`` instead of after reading everything.
        max_vocabulary: the largest vocabulary the caller can store (the model format's limit).

    Returns:
        The counts.

    Raises:
        CorpusError: missing, unreadable or non-text input, or no words at all.
        EncodingError: invalid UTF-8 (names the file and line).
        CapacityError: with ``min_count``, more than ``max_vocabulary`` words.
        OutputError: counts that outgrow memory cannot be written to ``spill_dir``.
    """
    _check_spill_dir(spill_dir)
    found = resolve_corpus(paths, reject_binary=reject_binary)
    counter = CorpusCounter(wrapped=wrapped, budget=budget, spill_dir=spill_dir)
    counter.skipped_files = len(found.skipped)
    total = sum(_size(path) for path in found.files)
    piece = counter.budget.chunk_bytes
    # Read chunks of the budget's size, never more than the default.
    reading = {"chunk_bytes": piece} if piece < CHUNK_BYTES else {}
    limit = (min_count, max_vocabulary) if min_count is not None and max_vocabulary is not None else None
    usable = total >= PARALLEL_MIN_BYTES and counter.budget.limit >= PARALLEL_MIN_BUDGET
    with tokeniser_pool(usable) as pool:
        feeder = _Feeder(counter, pool, wrapped=wrapped, piece=piece, limit=limit, progress=progress, total=total)
        for path in found.files:
            for chunk in iter_chunks(path, replace_bad_bytes=replace_bad_bytes, **reading):
                feeder.add_chunk(chunk)
            feeder.end_file()
    return counter.finish()


def _check_spill_dir(spill_dir: str | os.PathLike[str] | None) -> None:
    """Fail before reading anything when counts that outgrow memory would have nowhere to go."""
    if spill_dir is not None and not (os.path.isdir(spill_dir) and os.access(spill_dir, os.W_OK | os.X_OK)):
        raise OutputError(f"{spill_dir}: not a writable folder for counts that outgrow memory")


class _Feeder:
    """Hands a corpus's chunks to the counter, directly or through tokenising workers kept in order.

    Args:
        counter: the counter every token ends in.
        pool: tokenising worker processes, or None to tokenise here.
        wrapped: treat single line breaks as spaces (what the workers are told).
        piece: the size, in characters, of the pieces a chunk is cut into.
        limit: (min_count, max_vocabulary) to check the vocabulary against as it grows, or None.
        progress: called with (bytes done, bytes in all) after each chunk.
        total: the corpus's size in bytes.
    """

    def __init__(self, counter: CorpusCounter, pool: Any, *, wrapped: bool, piece: int, limit: tuple[int, int] | None, progress: ProgressCallback | None, total: int) -> None:
        self.counter = counter
        self.pool = pool
        self.wrapped = wrapped
        self.piece = piece
        self.limit = limit
        self.progress = progress
        self.total = total
        self.done = 0
        self.pending: deque[Any] = deque()

    def add_chunk(self, chunk: str) -> None:
        """Count one chunk of a file (or queue it for the workers) and report progress."""
        for part in split_text(chunk, self.piece):
            if self.pool is None:
                self.counter.add_text(part)
            else:
                self.pending.append(self.pool.apply_async(tokenise_part, (part, self.wrapped)))
                self.drain(TOKENISERS_AHEAD)
        if self.limit is not None and self.pool is None:
            self.counter.check_vocabulary_limit(*self.limit)
        self.done += len(chunk)  # characters, close enough to bytes for a progress bar
        if self.progress:
            self.progress(min(self.done, self.total), self.total)

    def drain(self, keep: int) -> None:
        """Count the workers' results, oldest first, until at most ``keep`` are outstanding."""
        while len(self.pending) > keep:
            self.counter.add_tokenized(self.pending.popleft().get())

    def end_file(self) -> None:
        """Finish a file: count every outstanding result, check the vocabulary, close the document."""
        self.drain(0)
        if self.limit is not None:
            self.counter.check_vocabulary_limit(*self.limit)
        self.counter.end_document()


PARALLEL_MIN_BYTES = int(os.environ.get("FORETYPE_PARALLEL_MIN_BYTES", 16 << 20))
"""Corpora at least this large are tokenised by worker processes (when the machine has two cores or more).
The environment variable ``FORETYPE_PARALLEL_MIN_BYTES`` lowers it (tests use it to reach the workers cheaply)."""

PARALLEL_MIN_BUDGET = 4 << 30
"""Workers hold a chunk of text and its tokens each (about 100 MB), and their dictionaries of
written forms (see :data:`foretype.counting.tokenisers.WORKER_FORM_BYTES`), outside the build's own
memory, so they are used only with a budget this large; below it the build tokenises itself."""

TOKENISERS_AHEAD = 4
"""Chunks handed to the workers before the first result is awaited."""


def split_text(text: str, size: int) -> Iterator[str]:
    """Cut text into pieces of about ``size`` characters, at line breaks where possible.

    A line longer than ``size`` is cut before a word (after a space), or, in a
    run of ``size`` characters without a space, anywhere; counting carries a
    sentence across pieces, so only such a run itself can be split.
    """
    if len(text) <= size + size // 4:
        if text:
            yield text
        return
    start = 0
    while len(text) - start > size:
        stop = start + size
        cut = text.rfind("\n", start, stop) + 1
        if cut <= start:
            cut = text.rfind(" ", start, stop) + 1
            while start < cut < stop and text[cut] == " ":
                cut += 1  # keep runs of spaces together, so the next piece starts with a word
            if cut <= start or cut >= stop:
                cut = stop
        yield text[start:cut]
        start = cut
    if start < len(text):
        yield text[start:]


def _size(path: os.PathLike[str]) -> int:
    """A file's size in bytes (0 when it cannot be read: the read itself reports that)."""
    try:
        return os.path.getsize(path)
    except OSError:
        return 0
