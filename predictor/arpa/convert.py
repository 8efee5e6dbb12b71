"""Importing an ARPA file: parse, convert to levels, index, write the model file atomically."""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from ..builder.ranking import rank_sections
from ..counting.memory import ESTIMATE_BYTES_PER_TRIGRAM, ESTIMATE_BYTES_PER_WORD, MemoryBudget, format_size
from ..errors import CapacityError, OptionError
from ..modelfile.encoding import ENCODINGS, FLOAT32
from ..modelfile.format import check_target
from ..query.model import LanguageModel
from ..query.vocabulary import vocabulary_sections
from .levels import convert
from .reader import read_arpa

METHOD = "arpa"
"""The ``method`` an imported model records: a back-off model read from an ARPA file."""


@dataclass(frozen=True)
class ImportSummary:
    """What an import read and stored.

    Attributes:
        source: the ARPA file.
        order: its highest order.
        vocab_size: suggestable words (V).
        listed: n-grams the file lists, by order (keys ``"1"`` to ``"3"``).
        added: n-grams added to hold back-off values, by order.
        dropped: n-grams no query reaches, left out.
        warnings: tolerated irregularities, one line each.
        spilled_rows: n-gram rows written to disk while reading (0 when all fitted in memory).
    """

    source: str
    order: int
    vocab_size: int
    listed: dict[str, int]
    added: dict[str, int]
    dropped: int
    warnings: list[str]
    spilled_rows: int = 0


def model_from_arpa(
    path: str | os.PathLike[str],
    *,
    encoding: str = FLOAT32,
    max_memory: int | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
) -> tuple[LanguageModel, ImportSummary]:
    """Read an ARPA file of order 1 to 3 into a model in memory.

    Args:
        path: plain or gzip ARPA text.
        encoding: value encoding of the stored values (``float32`` default, or ``log16``).
        max_memory: ceiling on peak resident memory in bytes (None: half of what is available).
        spill_dir: where n-gram tables that outgrow memory go.

    Raises:
        ModelFileError: missing, unreadable or malformed file (with the line).
        CapacityError: an order above 3, words that collide when case-folded, or a
            model too large for the memory ceiling.
        OptionError: an unknown encoding.
    """
    if encoding not in ENCODINGS:
        raise OptionError(f"unknown value encoding {encoding!r}; choose one of {', '.join(ENCODINGS)}")
    budget = MemoryBudget.of(max_memory)

    def check_room(listed: dict[int, int], words: int) -> None:
        ngrams = listed.get(2, 0) + listed.get(3, 0)
        need = ngrams * ESTIMATE_BYTES_PER_TRIGRAM + words * ESTIMATE_BYTES_PER_WORD
        if need > budget.working:
            raise CapacityError(
                f"{path}: a model of {ngrams:,} bigrams and trigrams over {words:,} words needs about {format_size(need)} "
                f"to convert, more than the {format_size(budget.working)} that --max-memory {format_size(budget.limit)} leaves "
                "beside what the process already holds"
            )

    parsed = read_arpa(path, table_rows=budget.table_rows, spill_dir=spill_dir, check_room=check_room)
    levels = convert(parsed, encoding)
    size = len(levels.words)
    sections = dict(levels.sections)
    sections.update(vocabulary_sections(levels.words, levels.display, sections["p1"][:size]))
    meta: dict[str, Any] = {
        "method": METHOD,
        "interpolated": False,
        "value_encoding": encoding,
        "estimator": {"source": Path(path).name, "order": parsed.order, "added": levels.added, "dropped": levels.dropped},
        "vocab_size": size,
        "corpus_tokens": 0,
        "corpus_sentences": 0,
        "corpus_files": 0,
        "skipped_files": 0,
        "unlisted_tokens": 0,
        "requested_vocab_size": None,
        "min_count": 1,
        "add": None,
        "wrapped": False,
    }
    sections.update(rank_sections(LanguageModel(sections, meta)))
    model = LanguageModel(sections, meta)
    unnormalised = normalisation_warning(model)
    meta["estimator"]["normalised"] = unnormalised is None  # foretype check holds only normalised files to sums of 1
    listed = {"1": len(parsed.uni_prob), "2": len(parsed.bigrams[0]), "3": len(parsed.trigrams[0])}
    summary = ImportSummary(
        source=str(path),
        order=parsed.order,
        vocab_size=size,
        listed=listed,
        added=levels.added,
        dropped=levels.dropped,
        warnings=parsed.warnings + levels.warnings + ([unnormalised] if unnormalised else []),
        spilled_rows=parsed.spilled_rows,
    )
    return model, summary


SUM_TOLERANCE = 1e-3
"""A sampled distribution further than this from 1 is reported."""


def normalisation_warning(model: LanguageModel, samples: int = 32) -> str | None:
    """Say so when the file's distributions do not sum to 1 (after <s> and sampled contexts).

    Pruned or hand-written files need not be normalised; foretype uses their
    probabilities as they are, but perplexities are then not comparable, and
    ``foretype check`` reports such a model.
    """
    size = model.vocab_size
    outcomes = np.arange(size + 2)
    start = size + 2
    w2 = model.arrays.l2_word
    off2 = model.arrays.l2_off.astype(np.int64)
    contexts = [(start, start)]
    if len(w2):
        for position in np.linspace(0, len(w2) - 1, num=min(samples, len(w2))).astype(np.int64):
            v = int(np.searchsorted(off2, position, side="right") - 1)
            if int(w2[position]) != size + 1 and v != size + 1:
                contexts.append((v, int(w2[position])))
    for u, v in contexts:
        total = float(model.prob_triples(np.full(len(outcomes), u), np.full(len(outcomes), v), outcomes).sum())
        if abs(total - 1.0) > SUM_TOLERANCE:
            named = " ".join(model.vocab.word(i) for i in ((u,) if u == start else (u, v)))
            return f"the file's distributions do not sum to 1 (after '{named}': {total:.6f}); they are used as they are"
    return None


def import_arpa(
    path: str | os.PathLike[str],
    output: str | os.PathLike[str],
    *,
    encoding: str = FLOAT32,
    max_memory: int | None = None,
    spill_dir: str | os.PathLike[str] | None = None,
) -> ImportSummary:
    """Read an ARPA file and write it as a model file (atomically: a failure leaves any previous file).

    Raises:
        The errors of :func:`model_from_arpa`, and OutputError when the model cannot be written.
    """
    check_target(output)
    model, summary = model_from_arpa(path, encoding=encoding, max_memory=max_memory, spill_dir=spill_dir)
    model.save(Path(output))
    return summary
