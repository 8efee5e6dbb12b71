"""From parsed ARPA tables to a model's level arrays, keeping every probability the file defines.

An ARPA model is a back-off model, so the imported model is one too: a stored
value replaces the lower order, and any other word takes the context's
back-off weight times the lower order.  foretype's arrays hold exactly that,
with three conditions the format does not promise, which the conversion
establishes without changing any probability:

* Every trigram's context ``u v`` and suffix ``v w`` is a stored bigram
  (queries find a trigram context through its bigram entry, and ``suggest``
  relies on a word stored after ``u v`` being stored after ``v``).  A missing
  one is added with the value the file gives it by back-off,
  ``bow(x) * P(y)``.
* A context's weight is applied only where the context stores a word.  A
  context whose back-off weight is not 1 but which lists no longer n-gram
  (``P(w | u v) = bow(u v) * P(w | v)`` for every w) gets one stored word,
  ``</s>``, with its backed-off value; so does ``<s> w`` for the first word w
  in a file without trigrams, since queries expect one stored trigram.
* foretype's first word of a sentence is predicted after ``<s> <s>`` and the
  format's after one ``<s>``; the ``<s> <s>`` slot stays empty, so the first
  word backs off to the bigrams after ``<s>``, as the format defines.

N-grams no query can reach are dropped and counted: ``<s>`` as a predicted
word, ``</s>`` as a context, and ``<s>`` after another word.

Words are matched as every foretype model matches them, case-insensitively:
each word is stored under its model form (NFC, lower case, ’ as ') and shown
as the file writes it, or as foretype's display comments say.  Two words of
the file with one model form would be two distributions foretype cannot keep
apart, and merging them needs counts the file does not hold, so such a file is
refused (:class:`~predictor.errors.CapacityError`).
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass, field

import numpy as np

from ..arrays import offsets_dtype, word_id_dtype
from ..errors import CapacityError, ModelFileError
from ..modelfile.encoding import encode
from ..query.vocabulary import END, START, UNKNOWN
from ..text import model_form
from .reader import ID_BITS, ParsedArpa

_MASK = (1 << ID_BITS) - 1
_VALUE_SLACK = 1e-6


@dataclass
class Levels:
    """A model's words and level sections converted from an ARPA file.

    Attributes:
        words: model forms in id order.
        display: display forms, parallel.
        sections: ``p1``, ``l2.*`` and ``l3.*`` arrays.
        added: n-grams added to hold back-off values (see the module docstring), by order.
        dropped: n-grams no query can reach, left out.
        warnings: lines for the person importing.
    """

    words: list[str]
    display: list[str]
    sections: dict[str, np.ndarray]
    added: dict[str, int]
    dropped: int
    warnings: list[str] = field(default_factory=list)


def word_forms(parsed: ParsedArpa) -> tuple[list[str], list[str], np.ndarray]:
    """The vocabulary: model forms sorted, their display forms, and each provisional id's model id.

    Raises:
        CapacityError: two words of the file share a model form.
        ModelFileError: the file lists no word besides the special symbols.
    """
    specials = {START: 2, END: 1, UNKNOWN: 0}
    forms: dict[str, int] = {}
    for index, token in enumerate(parsed.tokens):
        if token in specials:
            continue
        form = model_form(unicodedata.normalize("NFC", token))
        other = forms.get(form)
        if other is not None or form in specials:
            first = parsed.tokens[other] if other is not None else form
            raise CapacityError(
                f"{parsed.source}: the words {first!r} and {token!r} are one word to foretype, which matches words "
                "case-insensitively; their two distributions cannot be merged exactly from an ARPA file (it holds no counts), "
                "so the file is not imported"
            )
        forms[form] = index
    if not forms:
        raise ModelFileError(f"{parsed.source}: lists no words besides <s>, </s> and <unk>")
    words = sorted(forms)
    size = len(words)
    model_id = np.empty(len(parsed.tokens), dtype=np.int64)
    display = []
    for word_id, form in enumerate(words):
        index = forms[form]
        model_id[index] = word_id
        token = parsed.tokens[index]
        display.append(parsed.display.get(form, token) if token == form else token)
    for token, offset in specials.items():
        found = parsed.token_id(token)
        if found is not None:
            model_id[found] = size + offset
    return words, display, model_id


def convert(parsed: ParsedArpa, encoding: str) -> Levels:
    """Lay a parsed ARPA model out as level arrays (see the module docstring).

    Args:
        parsed: the tables from :func:`~predictor.arpa.reader.read_arpa`.
        encoding: the value encoding of the stored bigram and trigram values.

    Raises:
        CapacityError: two words share a model form.
        ModelFileError: the file defines a probability above 1.
    """
    words, display, model_id = word_forms(parsed)
    size = len(words)
    base = size + 3
    start, end = size + 2, size + 1
    p1, g1, warnings = _unigrams(parsed, model_id, size)
    p1_stored = p1.astype(np.float32).astype(np.float64)
    g1_stored = g1.astype(np.float32).astype(np.float64)
    key2, val2, dropped = _reachable_bigrams(parsed.bigrams, model_id, base)
    bow_key2, bow_val2, _ = _reachable_bigrams(parsed.bigram_bows, model_id, base)
    tu, tv, tw, val3, dropped3 = _reachable_trigrams(parsed.trigrams, model_id, base)
    dropped += dropped3
    if dropped:
        warnings.append(f"left out {dropped:,} n-grams no query reaches (<s> predicted or after a word, </s> as a context)")

    def bigram_value(x: np.ndarray, y: np.ndarray) -> np.ndarray:
        """P(y | x) as the file defines it: the listed value, else bow(x) * P(y)."""
        k = x * base + y
        at = np.minimum(np.searchsorted(key2, k), max(len(key2) - 1, 0))
        hit = (len(key2) > 0) & (key2[at] == k) if len(key2) else np.zeros(len(k), dtype=bool)
        listed_value = val2[at] if len(key2) else np.zeros(len(k))
        return np.where(hit, listed_value, g1_stored[x] * p1_stored[np.minimum(y, size + 1)])

    # A bigram context whose weight is not 1 but which lists no trigram: store </s> after it.
    ctx3 = np.unique(tu * base + tv)
    lonely = bow_key2[(bow_val2.astype(np.float32) != 1.0) & ~np.isin(bow_key2, ctx3) & (bow_key2 % base != end)]
    added3 = len(lonely)
    if added3:
        lu, lv = lonely // base, lonely % base
        lonely_values = bow_val2[np.searchsorted(bow_key2, lonely)].astype(np.float32).astype(np.float64)
        tu = np.concatenate((tu, lu))
        tv = np.concatenate((tv, lv))
        tw = np.concatenate((tw, np.full(added3, end)))
        val3 = np.concatenate((val3, lonely_values * bigram_value(lv, np.full(added3, end))))

    if not len(tw):
        # Queries expect at least one stored bigram and trigram: store </s> after "<s> w0"
        # with the value the file gives it by back-off.
        first = np.array([start * base])
        weight = bow_val2[np.searchsorted(bow_key2, first)] if np.isin(first, bow_key2).all() else np.ones(1)
        tu, tv, tw = np.array([start]), np.array([0]), np.array([end])
        val3 = weight.astype(np.float32).astype(np.float64) * bigram_value(tv, tw)
        added3 += 1

    # Every trigram's context and suffix must be a stored bigram.
    required = np.unique(np.concatenate((tu * base + tv, tv * base + tw)))
    absent = required[~np.isin(required, key2)]
    # A unigram context whose weight is not 1 but which lists no bigram: store </s> after it.
    contexts = np.unique(np.concatenate((key2 // base, absent // base)))
    weighted = np.flatnonzero(g1.astype(np.float32) != 1.0)
    weighted = weighted[(weighted != end) & ~np.isin(weighted, contexts)]
    absent = np.concatenate((absent, weighted * base + end))
    added2 = len(absent)
    if added2:
        ax, ay = absent // base, absent % base
        key2 = np.concatenate((key2, absent))
        val2 = np.concatenate((val2, g1_stored[ax] * p1_stored[ay]))
        order = np.argsort(key2, kind="stable")
        key2, val2 = key2[order], val2[order]

    n2 = len(key2)
    v2, w2 = key2 // base, key2 % base
    slot = np.searchsorted(key2, tu * base + tv)
    order3 = np.lexsort((tw, slot))
    slot, tw, val3 = slot[order3], tw[order3], val3[order3]
    g2 = np.ones(n2 + 1)
    if len(bow_key2):
        at = np.searchsorted(key2, bow_key2)
        g2[at] = bow_val2
    for name, stored in (("2-gram", val2), ("3-gram", val3)):
        if len(stored) and float(stored.max()) > 1 + _VALUE_SLACK:
            raise ModelFileError(f"{parsed.source}: a {name} probability defined through back-off exceeds 1 ({float(stored.max()):.6g}); the back-off weights are inconsistent")
    sections = {
        "p1": p1.astype(np.float32),
        "l2.off": np.searchsorted(v2, np.arange(base + 1)).astype(offsets_dtype(n2)),
        "l2.word": w2.astype(word_id_dtype(size)),
        "l2.value": encode(np.minimum(val2, 1.0), encoding),
        "l2.gamma": g1.astype(np.float32),
        "l3.off": np.searchsorted(slot, np.arange(n2 + 2)).astype(offsets_dtype(len(tw))),
        "l3.word": tw.astype(word_id_dtype(size)),
        "l3.value": encode(np.minimum(val3, 1.0), encoding),
        "l3.gamma": g2.astype(np.float32),
    }
    return Levels(words, display, sections, {"2": added2, "3": added3}, dropped, warnings)


def _unigrams(parsed: ParsedArpa, model_id: np.ndarray, size: int) -> tuple[np.ndarray, np.ndarray, list[str]]:
    """P1 over the V + 2 outcomes, back-off weights over the V + 3 ids (1 where none), and warnings."""
    start = size + 2
    warnings = []
    p1 = np.zeros(size + 3)
    listed = ~np.isnan(parsed.uni_prob)
    p1[model_id[listed]] = parsed.uni_prob[listed]
    missing = int(np.count_nonzero(~listed & (model_id < start)))
    if missing:
        warnings.append(f"{missing:,} words appear in longer n-grams but not among the 1-grams; they get unigram probability 0")
    if parsed.token_id(UNKNOWN) is None:
        warnings.append("no <unk>: an unknown word gets probability 0 (a text with unknown words scores an infinite perplexity)")
    if parsed.token_id(END) is None:
        warnings.append("no </s>: the end of a sentence gets probability 0")
    g1 = np.ones(size + 3)
    given = ~np.isnan(parsed.uni_bow)
    g1[model_id[given]] = parsed.uni_bow[given]
    return p1[: size + 2], g1, warnings


def _reachable_bigrams(table: tuple[np.ndarray, np.ndarray], model_id: np.ndarray, base: int) -> tuple[np.ndarray, np.ndarray, int]:
    """Bigram keys ``v * base + w`` over model ids, sorted, with their values, leaving out what no query reaches."""
    keys, values = table
    start, end = base - 1, base - 2
    v = model_id[keys >> ID_BITS]
    w = model_id[keys & _MASK]
    keep = (w != start) & (v != end)
    key2 = v[keep] * base + w[keep]
    order = np.argsort(key2, kind="stable")
    return key2[order], values[keep][order], int(np.count_nonzero(~keep))


def _reachable_trigrams(table: tuple[np.ndarray, np.ndarray], model_id: np.ndarray, base: int) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, int]:
    """Trigram ids (u, v, w) and values over model ids, leaving out what no query reaches."""
    keys, values = table
    start, end = base - 1, base - 2
    tu = model_id[keys >> (2 * ID_BITS)]
    tv = model_id[keys >> ID_BITS & _MASK]
    tw = model_id[keys & _MASK]
    keep = (tw != start) & (tv != start) & (tv != end) & (tu != end)
    return tu[keep], tv[keep], tw[keep], values[keep], int(np.count_nonzero(~keep))
