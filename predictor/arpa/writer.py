"""Writing a model as ARPA text: the probability of every stored n-gram and each context's back-off weight.

Every query of a foretype model is a back-off computation over its stored
levels: a word stored after a context takes its stored probability (for an
interpolated method, ``a + gamma * P_lower`` computed in full), and any other
word takes ``gamma * P_lower`` with the context's lower-order weight gamma.
Writing, for every stored n-gram, the probability the model gives it and, for
every context, its gamma as the back-off weight therefore reproduces every
probability of the model, for contexts the file lists and for those it does
not (their back-off weight is 1).

foretype pads a sentence ``<s> <s> w1 ...`` while the format pads it with one
``<s>``: the bigrams after ``<s>`` hold the model's first-word distribution
P(w | <s> <s>), and the back-off weight of ``<s>`` is the product of the two
weights that distribution applies to a word stored at neither level.
"""

from __future__ import annotations

import gzip
import io
import sys
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import BinaryIO

import numpy as np

from ..errors import OptionError
from ..modelfile.atomic import replace_atomically
from ..modelfile.encoding import value_table
from ..modelfile.format import MAGIC
from ..query.model import LanguageModel
from ..query.vocabulary import END, START, UNKNOWN
from .syntax import LOG_ZERO, NOTE_TAG, display_line, format_log10

_REFUSED = {
    "mle": "maximum-likelihood models give probability 0 to every word unseen after a seen context, and the ARPA "
    "format can only write log10 of 0 as -99, which most readers take as 10^-99 rather than 0",
}

_CHUNK = 1 << 18


def refusal_reason(method: str) -> str | None:
    """Why a model of this method has no exact ARPA form (None when it has one)."""
    return _REFUSED.get(method)


@dataclass(frozen=True)
class ExportSummary:
    """What an export wrote.

    Attributes:
        target: the file written, or ``-`` for standard output.
        ngrams: how many n-grams of each order (keys ``"1"`` to ``"3"``).
        approximated: what is not exact, or None when the file is exact.
        compressed: whether the file is gzip-compressed.
    """

    target: str
    ngrams: dict[str, int]
    approximated: str | None
    compressed: bool


@dataclass
class _Tables:
    """The n-grams of a model in ARPA terms: id arrays, probabilities and back-off weights (NaN: none)."""

    uni_prob: np.ndarray
    uni_bow: np.ndarray
    start_bow: float
    bi_ctx: np.ndarray
    bi_word: np.ndarray
    bi_prob: np.ndarray
    bi_bow: np.ndarray
    tri_u: np.ndarray
    tri_v: np.ndarray
    tri_word: np.ndarray
    tri_prob: np.ndarray


def model_tables(model: LanguageModel) -> _Tables:
    """Every probability and back-off weight the ARPA form of a model lists.

    Returns:
        The tables; unigrams cover the V + 2 outcomes (words, UNKNOWN, END) in id order.
    """
    s = model.arrays
    size = model.vocab_size
    start = size + 2
    p1 = s.p1.astype(np.float64)
    off2 = s.l2_off.astype(np.int64)
    w2 = s.bigram_words().astype(np.int64)
    g2 = s.level2_weights(bool(model.meta["interpolated"]))
    off3 = s.level3_offsets()
    w3 = s.trigram_words().astype(np.int64)
    g3 = s.level3_weights(bool(model.meta["interpolated"]))
    n2 = len(w2)
    ctx2 = np.repeat(np.arange(size + 3, dtype=np.int64), np.diff(off2))
    # P2(w | v) with the arithmetic of the query core (query/scoring.py).
    codes = value_table(s.l2_value, s.l2_codebook)
    a2 = codes[s.l2_value] if codes is not None else s.l2_value.astype(np.float64)
    p2 = a2 + g2[ctx2] * p1[w2] if model.meta["interpolated"] else a2
    has2 = np.diff(off2) > 0
    has3 = np.diff(off3) > 0
    uni_bow = np.where(has2[: size + 2], g2[: size + 2], np.nan)
    uni_bow[size + 1] = np.nan  # END is never a context
    # After <s>: the first-word distribution P(w | <s> <s>).
    start_words = np.union1d(w2[off2[start] : off2[start + 1]], w3[off3[n2] : off3[n2 + 1]])
    start_prob = _triples(model, np.full(len(start_words), start), np.full(len(start_words), start), start_words)
    start_bow = (float(g3[n2]) if has3[n2] else 1.0) * (float(g2[start]) if has2[start] else 1.0)
    # A start-context bigram keeps its trigram weight when it is a stored entry.
    start_entry = np.arange(off2[start], off2[start + 1])
    start_entry_bow = np.where(has3[start_entry], g3[start_entry], np.nan)
    start_bow_of_word = np.full(len(start_words), np.nan)
    start_bow_of_word[np.searchsorted(start_words, w2[start_entry])] = start_entry_bow
    other = ctx2 != start
    entry_bow = np.where(has3[:n2], g3[:n2], np.nan)
    bi_ctx = np.concatenate((ctx2[other], np.full(len(start_words), start)))
    bi_word = np.concatenate((w2[other], start_words))
    bi_prob = np.concatenate((p2[other], start_prob))
    bi_bow = np.concatenate((entry_bow[other], start_bow_of_word))
    slot3 = np.repeat(np.arange(n2 + 1, dtype=np.int64), np.diff(off3))
    listed = slot3 < n2  # the <s> <s> slot went into the bigrams after <s>
    slot3 = slot3[listed]
    tri_u = ctx2[slot3]
    tri_v = w2[slot3]
    tri_word = w3[listed]
    tri_prob = _triples(model, tri_u, tri_v, tri_word)
    return _Tables(p1, uni_bow, start_bow, bi_ctx, bi_word, bi_prob, bi_bow, tri_u, tri_v, tri_word, tri_prob)


def _triples(model: LanguageModel, u: np.ndarray, v: np.ndarray, w: np.ndarray) -> np.ndarray:
    """P(w | u v) in bounded pieces, with the model's own arithmetic."""
    if not len(w):
        return np.zeros(0)
    return np.concatenate([model.prob_triples(u[i : i + _CHUNK], v[i : i + _CHUNK], w[i : i + _CHUNK]) for i in range(0, len(w), _CHUNK)])


def arpa_lines(model: LanguageModel, tables: _Tables | None = None) -> Iterator[str]:
    """The ARPA text of a model, line by line (each ends in a newline)."""
    t = tables if tables is not None else model_tables(model)
    size = model.vocab_size
    vocab = model.vocab
    tokens = vocab.words() + [UNKNOWN, END, START]
    yield f"{NOTE_TAG}: n-gram model exported by foretype (method {model.method}, {size:,} words)\n"
    yield f"{NOTE_TAG}: words are foretype's model forms (lower case, \u2019 as '); display forms follow\n"
    for index in range(size):
        shown = vocab.display(index)
        if shown != tokens[index]:
            yield display_line(tokens[index], shown) + "\n"
    yield "\n\\data\\\n"
    yield f"ngram 1={size + 3}\n"
    yield f"ngram 2={len(t.bi_word)}\n"
    yield f"ngram 3={len(t.tri_word)}\n"
    yield "\n\\1-grams:\n"
    for index in range(size + 2):
        yield _line(t.uni_prob[index], tokens[index], t.uni_bow[index])
    yield _line(0.0, START, t.start_bow, log_prob=LOG_ZERO)
    yield "\n\\2-grams:\n"
    for c, w, p, b in zip(t.bi_ctx.tolist(), t.bi_word.tolist(), t.bi_prob.tolist(), t.bi_bow.tolist()):
        yield _line(p, f"{tokens[c]} {tokens[w]}", b)
    yield "\n\\3-grams:\n"
    for u, v, w, p in zip(t.tri_u.tolist(), t.tri_v.tolist(), t.tri_word.tolist(), t.tri_prob.tolist()):
        yield f"{format_log10(p)}\t{tokens[u]} {tokens[v]} {tokens[w]}\n"
    yield "\n\\end\\\n"


def _line(prob: float, words: str, bow: float, log_prob: float | None = None) -> str:
    text = f"{log_prob:g}" if log_prob is not None else format_log10(prob)
    if bow != bow:  # NaN: the n-gram is no context, so it has no back-off weight
        return f"{text}\t{words}\n"
    return f"{text}\t{words}\t{format_log10(bow)}\n"


def _refuse_to_replace_a_model(target: Path) -> None:
    """An ARPA file written over a model file would destroy the model: refuse."""
    try:
        with target.open("rb") as existing:
            if existing.read(len(MAGIC)) == MAGIC:
                raise OptionError(f"{target} is a model file; not replacing it with ARPA text (choose another -o)")
    except OSError:
        return


def export_arpa(model: LanguageModel, target: str, *, approximate: bool = False) -> ExportSummary:
    """Write a model as an ARPA file (gzip when the name ends in ``.gz``; ``-`` for standard output).

    Args:
        model: the model.
        target: a path, or ``-``.
        approximate: write a model that has no exact ARPA form anyway.

    Returns:
        What was written.

    Raises:
        OptionError: the method has no exact ARPA form and ``approximate`` is False,
            or the target is a model file.
        OutputError: the file cannot be written (a previous file stays as it was).
    """
    reason = refusal_reason(model.method)
    if reason is not None and not approximate:
        raise OptionError(f"not exported: {reason}; pass --approximate to write it with -99 for log zero")
    approximated = None
    if reason is not None:
        approximated = "probabilities of 0 (and back-off weights of 0) are written as -99, which readers may take as 10^-99"
    if target != "-":
        _refuse_to_replace_a_model(Path(target))
    tables = model_tables(model)
    compressed = target != "-" and target.endswith(".gz")

    def write(out: BinaryIO) -> None:
        stream: BinaryIO = gzip.GzipFile(fileobj=out, mode="wb", mtime=0) if compressed else out  # type: ignore[assignment]
        buffer = io.StringIO()
        for line in arpa_lines(model, tables):
            buffer.write(line)
            if buffer.tell() > 1 << 20:
                stream.write(buffer.getvalue().encode("utf-8"))
                buffer = io.StringIO()
        stream.write(buffer.getvalue().encode("utf-8"))
        if compressed:
            stream.close()

    if target == "-":
        write(sys.stdout.buffer)
        sys.stdout.buffer.flush()
    else:
        replace_atomically(Path(target), write)
    counts = {"1": model.vocab_size + 3, "2": len(tables.bi_word), "3": len(tables.tri_word)}
    return ExportSummary(target=target, ngrams=counts, approximated=approximated, compressed=compressed)
