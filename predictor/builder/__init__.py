"""Building a model: count a corpus, choose a vocabulary, estimate, index."""

from __future__ import annotations

import os
from collections.abc import Callable, Iterable, Mapping
from typing import Any

from ..counting import CorpusCounts, ProgressCallback, count_corpus
from ..counting.memory import MemoryBudget
from ..counting.store import open_count_store, store_wrapped
from ..errors import CapacityError, OptionError
from ..estimate import METHODS, model_counts
from ..modelfile.encoding import CODEBOOK8, ENCODINGS
from ..modelfile.levels import fit_levels
from ..modelfile.limits import MAX_VOCABULARY
from ..query.model import LanguageModel
from ..query.vocabulary import vocabulary_sections
from .ranking import rank_sections
from .shrink import shrink


def check_build_options(*, vocab_size: int | None, min_count: int, method: str, add: float, encoding: str | None, cutoffs: tuple[int, int] | None = None) -> None:
    """Reject build options before any corpus is read.

    Raises:
        OptionError: an option is out of range or unknown.
        CapacityError: the vocabulary asked for exceeds what the format supports.
    """
    if method not in METHODS:
        raise OptionError(f"unknown method {method!r}; choose one of {', '.join(METHODS)}")
    if vocab_size is not None and vocab_size < 1:
        raise OptionError(f"--vocab-size must be at least 1, not {vocab_size}")
    if vocab_size is not None and vocab_size > MAX_VOCABULARY:
        raise CapacityError(f"--vocab-size {vocab_size:,} exceeds the model format's limit of {MAX_VOCABULARY:,} words")
    if min_count < 1:
        raise OptionError(f"--min-count must be at least 1, not {min_count}")
    if method == "additive" and not add > 0:
        raise OptionError(f"--add must be a positive number, not {add}")
    if encoding is not None and encoding not in (*ENCODINGS, CODEBOOK8):
        raise OptionError(f"unknown value encoding {encoding!r}; choose one of {', '.join((*ENCODINGS, CODEBOOK8))}")
    if cutoffs is not None and method == "mle":
        raise OptionError("--cutoffs cannot apply to --method mle: every removed n-gram would get probability 0")
    if cutoffs is not None and min(cutoffs) < 1:
        raise OptionError(f"--cutoffs must be at least 1, not {cutoffs}")


def build(
    paths: Iterable[str | os.PathLike[str]],
    *,
    vocab_size: int | None = None,
    min_count: int = 1,
    method: str = "kneser-ney",
    add: float = 0.1,
    wrapped: bool = False,
    replace_bad_bytes: bool = False,
    reject_binary: bool = False,
    encoding: str | None = None,
    progress: ProgressCallback | None = None,
    max_memory: int | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
    on_counted: Callable[[CorpusCounts], None] | None = None,
    cutoffs: tuple[int, int] | None = None,
) -> LanguageModel:
    """Build a model from corpus files or folders.

    Args:
        paths: the corpus.
        vocab_size: keep the N most frequent words (None: all).
        min_count: drop words seen fewer times.
        method: one of :data:`foretype.METHODS`.
        add: k for the ``additive`` method.
        wrapped: treat single line breaks as spaces (hard-wrapped prose).
        replace_bad_bytes: replace invalid UTF-8 instead of failing.
        reject_binary: fail on binary files inside folders instead of skipping them.
        encoding: stored value encoding, ``log16`` (default) or ``float32``.
        progress: called with (bytes done, bytes in all) while reading.
        max_memory: ceiling on the build's peak resident memory in bytes (None: half
            of the memory available; see :mod:`foretype.counting.memory`).
        spill_dir: where counts that outgrow memory go (None: the system's temporary folder).
        on_counted: called with the counts once the corpus is read (for build summaries).
        cutoffs: (C2, C3): store only bigrams seen at least C2 times and trigrams
            seen at least C3 times (estimated from all counts; back-off form).

    Raises:
        OptionError, CorpusError, EncodingError, CapacityError, OutputError.
    """
    check_build_options(vocab_size=vocab_size, min_count=min_count, method=method, add=add, encoding=encoding, cutoffs=cutoffs)
    budget = MemoryBudget.of(max_memory)
    counts = count_corpus(
        paths,
        wrapped=wrapped,
        replace_bad_bytes=replace_bad_bytes,
        reject_binary=reject_binary,
        progress=progress,
        budget=budget,
        spill_dir=spill_dir,
        min_count=min_count if vocab_size is None else None,
        max_vocabulary=MAX_VOCABULARY,
    )
    if on_counted is not None:
        on_counted(counts)
    try:
        pruning = None if cutoffs is None else {"criterion": "count", "cutoffs": cutoffs}
        model = build_from_counts(counts, vocab_size=vocab_size, min_count=min_count, method=method, add=add, encoding=encoding, shrink_options=pruning)
    finally:
        counts.close()
    model.meta["wrapped"] = wrapped
    return model


def build_from_counts(
    counts: CorpusCounts,
    *,
    vocab_size: int | None = None,
    min_count: int = 1,
    method: str = "kneser-ney",
    add: float = 0.1,
    encoding: str | None = None,
    shrink_options: Mapping[str, Any] | None = None,
) -> LanguageModel:
    """Build a model from counts already taken (several vocabularies from one count).

    With ``shrink_options`` (keyword arguments of :func:`predictor.shrink.shrink`,
    which then has the n-grams' counts for the ``count`` criterion) or the
    ``codebook8`` encoding, the model is estimated from every count with float32
    values, then shrunk.

    Raises:
        OptionError, CorpusError, CapacityError.
    """
    cutoffs = None if shrink_options is None else shrink_options.get("cutoffs")
    check_build_options(vocab_size=vocab_size, min_count=min_count, method=method, add=add, encoding=encoding, cutoffs=cutoffs)
    shrinking = shrink_options is not None or encoding == CODEBOOK8
    chosen = counts.select_vocabulary(vocab_size, min_count, max_words=MAX_VOCABULARY)
    vocabulary_counts = model_counts(counts, chosen)
    counts.require_estimate(len(vocabulary_counts.table), vocabulary_counts.vocab_size)
    sections, meta = fit_levels(vocabulary_counts, method, add=add, encoding="float32" if shrinking else encoding)
    size = vocabulary_counts.vocab_size
    sections.update(vocabulary_sections(vocabulary_counts.words, vocabulary_counts.display, sections["p1"][:size]))
    meta.update(
        {
            "vocab_size": size,
            "corpus_tokens": counts.corpus_tokens,
            "corpus_sentences": counts.sentences,
            "corpus_files": counts.files,
            "skipped_files": counts.skipped_files,
            "unlisted_tokens": counts.unlisted_tokens,
            "requested_vocab_size": vocab_size,
            "min_count": min_count,
            "add": add if method == "additive" else None,
            "wrapped": False,
        }
    )
    if shrinking:
        target = encoding or ("float32" if method in ("mle", "katz") else "log16")
        counts_of_entries = (vocabulary_counts.layout.bigram_n, vocabulary_counts.table.n)
        options = dict(shrink_options or {})
        options["encoding"] = options.get("encoding") or target
        return shrink(LanguageModel(sections, meta), counts=counts_of_entries, **options)
    sections.update(rank_sections(LanguageModel(sections, meta)))
    return LanguageModel(sections, meta)


def build_from_store(
    store: str | os.PathLike[str],
    *,
    vocab_size: int | None = None,
    min_count: int = 1,
    method: str = "kneser-ney",
    add: float = 0.1,
    encoding: str | None = None,
    max_memory: int | None = None,
    cutoffs: tuple[int, int] | None = None,
) -> LanguageModel:
    """Build a model from a count store (see :mod:`predictor.counting.store`).

    The model equals the one :func:`build` makes from the corpus the store counted
    with the same settings; the trigram tables stream from the store while the
    chosen vocabulary's table is gathered within ``max_memory``.

    Raises:
        OptionError, ModelFileError (not a readable store), CorpusError, CapacityError.
    """
    check_build_options(vocab_size=vocab_size, min_count=min_count, method=method, add=add, encoding=encoding, cutoffs=cutoffs)
    counts, manifest = open_count_store(store, max_memory=max_memory)
    pruning = None if cutoffs is None else {"criterion": "count", "cutoffs": cutoffs}
    model = build_from_counts(counts, vocab_size=vocab_size, min_count=min_count, method=method, add=add, encoding=encoding, shrink_options=pruning)
    model.meta["wrapped"] = store_wrapped(manifest)
    return model
