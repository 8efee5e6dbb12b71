"""Shrinking a model: prune n-grams and store values in fewer bits, to fit a byte budget.

Three criteria decide which bigrams and trigrams go (each n-gram gets a score;
the lowest scores go first):

* ``count``: the n-gram's count in the corpus (count cutoffs; needs the counts,
  so it runs when building: ``build --cutoffs``);
* ``entropy``: Stolcke's relative entropy, as the relative perplexity increase
  e^D - 1 (:mod:`.entropy`);
* ``prediction``: the keystrokes the typist would lose from the top-k lists,
  plus a little of the relative entropy (:mod:`.predictive`).

A threshold removes every n-gram scoring below it; a byte budget finds the
fewest removals whose model fits (:mod:`.budget`).  The result is a back-off
model (:mod:`.tables`) whose weights are recomputed from the stored values, in
any value encoding, 8-bit codebooks included (:mod:`.quantise`).
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ...errors import CapacityError, OptionError
from ...query.model import LanguageModel
from .budget import file_bytes_of, level_bytes, search_removals
from .entropy import perplexity_costs
from .predictive import prediction_costs
from .quantise import CODEBOOK8
from .sections import VALUE_ENCODINGS, shrunk_model
from .tables import BackoffTables, backoff_tables

SHRUNK_RANKED_MIN = 1000
"""A shrunk model keeps ranked lists only for contexts with more stored words than this (a full
model: more than :data:`~foretype.query.ranked.RANKED_MIN`).  Lists of 97 to 1,000 words cost
0.3 bytes per stored n-gram at the benchmark corpus's full vocabulary; without them such a class
is scored whole, a few microseconds per query."""

_RECORD_BYTES = 600
"""Room the search leaves in the header for the shrink record (a few hundred bytes of JSON)."""

CRITERIA = ("entropy", "prediction", "count")
"""Pruning criteria; ``count`` needs the corpus counts (``build --cutoffs``)."""

__all__ = ["CRITERIA", "VALUE_ENCODINGS", "CODEBOOK8", "shrink", "parse_cutoffs", "BackoffTables", "backoff_tables"]


def parse_cutoffs(text: str) -> tuple[int, int]:
    """Parse ``--cutoffs C2,C3`` (or one number for both): keep bigrams seen C2 times or more, trigrams C3.

    Raises:
        OptionError: not one or two whole numbers of at least 1.
    """
    parts = [p.strip() for p in text.split(",") if p.strip()]
    try:
        values = [int(p) for p in parts]
    except ValueError:
        raise OptionError(f"--cutoffs takes one or two whole numbers (bigrams,trigrams), not {text!r}") from None
    if len(values) == 1:
        values = values * 2
    if len(values) != 2 or min(values) < 1:
        raise OptionError(f"--cutoffs takes one or two whole numbers of at least 1 (bigrams,trigrams), not {text!r}")
    return values[0], values[1]


def scores_of(model: LanguageModel, tables: BackoffTables, criterion: str, *, k: int = 5, counts: tuple[np.ndarray, np.ndarray] | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Each stored bigram's and trigram's score under a criterion (lowest goes first).

    Raises:
        OptionError: an unknown criterion, or ``count`` without counts.
    """
    if criterion == "entropy":
        return perplexity_costs(tables)
    if criterion == "prediction":
        return prediction_costs(tables, model.vocabulary, k=k)
    if criterion == "count":
        if counts is None:
            raise OptionError("pruning by count needs the corpus counts: use 'foretype build --cutoffs'")
        return counts[0].astype(np.float64), counts[1].astype(np.float64)
    raise OptionError(f"unknown pruning criterion {criterion!r}; choose one of {', '.join(CRITERIA)}")


def shrink(
    model: LanguageModel,
    *,
    criterion: str = "entropy",
    threshold: float | None = None,
    cutoffs: tuple[int, int] | None = None,
    max_bytes: int | None = None,
    encoding: str | None = None,
    k: int = 5,
    counts: tuple[np.ndarray, np.ndarray] | None = None,
    ranked_min: int = SHRUNK_RANKED_MIN,
) -> LanguageModel:
    """Prune a model and re-encode its values.

    Args:
        model: the model to shrink (left unchanged).
        criterion: one of :data:`CRITERIA`.
        threshold: remove every n-gram scoring below it (for ``entropy``, the
            relative perplexity increase theta of Stolcke 1998).
        cutoffs: for ``count``: remove bigrams seen fewer than ``cutoffs[0]``
            times and trigrams seen fewer than ``cutoffs[1]``.
        max_bytes: remove the fewest n-grams (lowest scores first) whose model
            file fits in this many bytes; combined with a threshold or cutoffs,
            those apply first.
        encoding: value encoding (:data:`VALUE_ENCODINGS`); default: the model's.
        k: suggestions per list, for ``prediction``.
        counts: (bigram counts, trigram counts) aligned with the stored entries, for ``count``.
        ranked_min: contexts with more stored words than this get a ranked list.

    Returns:
        The shrunk model (in memory); its header's ``shrink`` says what was done.

    Raises:
        OptionError: unknown criterion or encoding, a bad threshold, or a
            maximum-likelihood model (a removed n-gram would get probability 0).
        CapacityError: the budget is below the smallest model the vocabulary allows.
    """
    encoding = encoding or str(model.meta["value_encoding"])
    pruning = threshold is not None or cutoffs is not None or max_bytes is not None
    _check_options(model, encoding, pruning, threshold, max_bytes)
    tables = backoff_tables(model)
    source = {"1": tables.size + 2, "2": tables.n2, "3": tables.n3}
    keep2 = np.ones(tables.n2, dtype=bool)
    keep3 = np.ones(tables.n3, dtype=bool)
    record: dict[str, Any] = {"criterion": criterion if pruning else None, "source_ngrams": source, "source_file_bytes": model.file_bytes}
    if cutoffs is not None:
        if counts is None:
            raise OptionError("count cutoffs need the corpus counts: use 'foretype build --cutoffs'")
        keep2 &= counts[0] >= cutoffs[0]
        keep3 &= counts[1] >= cutoffs[1]
        record["cutoffs"] = list(cutoffs)
    if threshold is not None or max_bytes is not None:
        score2, score3 = scores_of(model, tables, criterion, k=k, counts=counts)
        if threshold is not None:
            keep2 &= ~(score2 < threshold)
            keep3 &= ~(score3 < threshold)
            record["threshold"] = threshold
        if max_bytes is not None:
            keep2, keep3 = _fit_budget(model, tables, keep2, keep3, score2, score3, max_bytes, encoding, ranked_min)
            record["max_bytes"] = max_bytes
    if pruning and criterion == "prediction":
        record["k"] = k
    pruned = tables.pruned(keep2, keep3)
    record["kept_ngrams"] = {"1": pruned.size + 2, "2": pruned.n2, "3": pruned.n3}
    record["ranked_min"] = ranked_min
    return shrunk_model(model, pruned, encoding=encoding, shrink_meta=record, ranked_min=ranked_min)


def _check_options(model: LanguageModel, encoding: str, pruning: bool, threshold: float | None, max_bytes: int | None) -> None:
    """Refuse an unknown encoding, a bad threshold or budget, and pruning a maximum-likelihood model."""
    if encoding not in VALUE_ENCODINGS:
        raise OptionError(f"unknown value encoding {encoding!r}; choose one of {', '.join(VALUE_ENCODINGS)}")
    if pruning and model.method == "mle":
        raise OptionError("a maximum-likelihood model cannot be pruned: every removed n-gram would get probability 0")
    if threshold is not None and not (threshold >= 0 and np.isfinite(threshold)):
        raise OptionError(f"the pruning threshold must be a non-negative number, not {threshold}")
    if max_bytes is not None and max_bytes < 1:
        raise OptionError(f"--max-bytes must be positive, not {max_bytes}")


def _vocabulary_bytes(model: LanguageModel) -> dict[str, int]:
    """Bytes of the vocabulary sections as a saved file stores them (pruning does not change them)."""
    return {name: int(a.nbytes) for name, a in model.arrays.compact().vocabulary_sections().items()}


def _fit_budget(
    model: LanguageModel,
    tables: BackoffTables,
    keep2: np.ndarray,
    keep3: np.ndarray,
    score2: np.ndarray,
    score3: np.ndarray,
    budget: int,
    encoding: str,
    ranked_min: int,
) -> tuple[np.ndarray, np.ndarray]:
    """Remove the lowest-scoring of the n-grams still kept, as few as fit the budget."""
    candidates2 = np.flatnonzero(keep2)
    candidates3 = np.flatnonzero(keep3)
    scores = np.concatenate((score2[candidates2], score3[candidates3]))
    order = np.argsort(scores, kind="stable")
    rank = np.empty(len(order), dtype=np.int64)
    rank[order] = np.arange(len(order))
    rank2, rank3 = rank[: len(candidates2)], rank[len(candidates2) :]
    # The header's shrink record is written after the search: leave room for it.
    meta = {**model.meta, "shrink": {"room": "x" * _RECORD_BYTES}}
    fixed = _vocabulary_bytes(model)

    def masks(removed: int) -> tuple[np.ndarray, np.ndarray]:
        two, three = keep2.copy(), keep3.copy()
        two[candidates2[rank2 < removed]] = False
        three[candidates3[rank3 < removed]] = False
        return two, three

    def size_after(removed: int) -> int:
        return file_bytes_of(meta, {**fixed, **level_bytes(tables.pruned(*masks(removed)), encoding, ranked_min)})

    removed = search_removals(len(order), size_after, budget)
    if removed < 0:
        smallest = size_after(len(order))
        raise CapacityError(
            f"--max-bytes {budget:,} is below the smallest model this vocabulary allows ({smallest:,} bytes with every bigram and trigram removed); "
            "build with a smaller --vocab-size"
        )
    return masks(removed)


def parse_encodings(text: str) -> list[str]:
    """Parse a comma-separated list of value encodings.

    Raises:
        OptionError: an unknown encoding or an empty list.
    """
    names = [p.strip() for p in text.split(",") if p.strip()]
    if not names:
        raise OptionError("the list of value encodings is empty")
    for name in names:
        if name not in VALUE_ENCODINGS:
            raise OptionError(f"unknown value encoding {name!r}; choose one of {', '.join(VALUE_ENCODINGS)}")
    return names
