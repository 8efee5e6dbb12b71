"""Tokenising worker processes, each numbering the written forms it meets.

Large corpora are tokenised in worker processes while the build process
counts (:func:`foretype.counting.count_corpus`).  Each worker keeps its own
dictionary of the written forms it has met and sends, with each chunk, only
the forms new to it and every token's number in its dictionary
(:class:`TokenisedPart`).  The build process keeps, per worker, what each
number means in its own dictionaries, so its dictionary work is once per form
a worker meets, not once per distinct form of every chunk.

A worker's dictionary starts afresh with the next chunk once it holds
:data:`WORKER_FORM_BYTES`, which bounds the memory a worker holds outside the
build's budget; the counts do not depend on it (the forms are sent again).
"""

from __future__ import annotations

import multiprocessing
import os
import signal
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any, NamedTuple

import numpy as np

from ..text import prepare, tokens
from .compiled import PURE_ENV, pure_requested

try:
    from ._tokenise import FormTable, number_tokens
except ImportError:  # not built: no compiler at install time; the regular expression and the dictionary answer
    FormTable = None
    number_tokens = None

__all__ = ["FormTable", "PURE_ENV", "TokenisedPart", "compiled_tokeniser", "number_tokens", "tokenise_part", "tokeniser_pool"]

WORKER_FORM_BYTES = 64 << 20
"""A worker's dictionary of written forms starts afresh once it holds more than this (64 MiB)."""

FORM_BYTES = 100
"""Bytes a worker's dictionary entry costs besides its string (dict slot, int object)."""

WORKERS = 2
"""Tokenising worker processes, at most (and at most one per core)."""


class TokenisedPart(NamedTuple):
    """A chunk tokenised in a worker, as :meth:`foretype.counting.CorpusCounter.add_tokenized` takes it.

    Attributes:
        worker: the worker's id (its process id).
        first: the number of the first new form; 0 when the worker's dictionary
            (re)started with this chunk.
        forms: the written forms new to the worker, in order of first appearance;
            they are numbered ``first``, ``first + 1``, ...
        positions: int32 array of shape (tokens,): each token's number in the
            worker's dictionary.
    """

    worker: int
    first: int
    forms: list[str]
    positions: np.ndarray


class _FormNumbers(dict[str, int]):
    """A worker's dictionary: each written form's number, given in order of first appearance."""

    def __init__(self) -> None:
        super().__init__()
        self.bytes = 0
        self.fresh: list[str] = []
        """Forms numbered since the last chunk was sent (so sending them never walks the whole dictionary)."""

    def __missing__(self, form: str) -> int:
        number = self[form] = len(self)
        self.fresh.append(form)
        return number


_numbers: Any = _FormNumbers()
"""The worker's forms: a compiled :class:`FormTable` or, on the Python path, a :class:`_FormNumbers`."""


def _start_worker() -> None:
    """Pool initializer: a fresh dictionary (a forked worker must not inherit one), and Ctrl-C left to the parent.

    The terminal sends SIGINT to the whole process group; the parent stops the
    pool, so a worker that took it too would only print a traceback or leave
    the pool waiting for a result that never comes.
    """
    global _numbers
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    _numbers = _FormNumbers()


def tokenise_part(text: str, wrapped: bool) -> TokenisedPart:
    """Tokenise a chunk in a worker process, numbering its forms in the worker's dictionary.

    Args:
        text: the chunk (whole lines, see :func:`foretype.text.tokens`).
        wrapped: treat single line breaks as spaces.

    Returns:
        The forms new to this worker and every token's number.
    """
    global _numbers
    compiled = compiled_tokeniser()
    if _numbers.bytes > WORKER_FORM_BYTES or compiled != (FormTable is not None and isinstance(_numbers, FormTable)):
        _numbers = FormTable() if compiled else _FormNumbers()
    numbers = _numbers
    first = len(numbers)
    if compiled:
        # One compiled pass finds the tokens and numbers them in the worker's hash table (new forms go to numbers.fresh).
        positions = number_tokens(prepare(text, wrapped=wrapped), numbers)
    else:
        found = tokens(text, wrapped=wrapped)
        # One pass numbers every token, new forms included (__missing__ numbers them).
        positions = np.fromiter(map(numbers.__getitem__, found), dtype=np.int32, count=len(found))
    new, numbers.fresh = numbers.fresh, []
    numbers.bytes += sum(map(sys.getsizeof, new)) + FORM_BYTES * len(new)
    return TokenisedPart(os.getpid(), first, new, positions)


def compiled_tokeniser() -> bool:
    """Whether the compiled tokeniser is built and ``FORETYPE_PURE`` does not turn it off."""
    return number_tokens is not None and not pure_requested()


@contextmanager
def tokeniser_pool(usable: bool) -> Iterator[Any]:
    """A pool of tokenising worker processes, or None where one would not pay.

    Args:
        usable: whether the corpus and the budget call for workers at all; they
            are also left out on a single core and where processes cannot fork.
    """
    cores = os.cpu_count() or 1
    if not usable or cores < 2 or "fork" not in multiprocessing.get_all_start_methods():
        yield None
        return
    # Regular expressions and dictionary lookups cost about 0.4 us a token in
    # Python; the workers tokenise while this process counts.
    pool = multiprocessing.get_context("fork").Pool(min(cores, WORKERS), initializer=_start_worker)
    try:
        yield pool
    finally:
        pool.terminate()
        pool.join()
