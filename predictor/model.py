"""The trigram language model: probabilities, exact top-k suggestions, scoring.

How ``suggest`` stays exact without scoring the whole vocabulary: for a context
(u, v) and a prefix's id range R, every word of R falls in one of three classes.

* A: words stored after (u, v): scored exactly.
* B: words stored after v but not after (u, v): scored exactly.
* C: every other word of R: its probability is the unigram probability times a
  factor that is the same for the whole class, so the class ranks exactly as
  the unigram order does; the first k words of R's unigram list that are not
  in A or B are the class's top k.

The top k of A, B and the first k of C together contain the top k of R, and the
final ranking scores them all with the same arithmetic ``prob`` uses, so the
result equals sorting every word by probability (ties by word ascending).  The
cost depends on how many words follow the context, never on how many words
share the prefix.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from .errors import OptionError
from .estimate.encoding import decode
from .modelfile import FORMAT_VERSION, read_model_file, write_model_file
from .text import iter_sentences, model_form, split_before_cursor
from .vocabulary import END, START, UNKNOWN, Vocabulary


@dataclass(frozen=True)
class Suggestion:
    """One suggested word.

    Attributes:
        word: the word in display form.
        prob: its probability after the context.
        order: the n-gram order (1, 2 or 3) that supplied most of the probability.
        id: the word's id in the model's vocabulary.
    """

    word: str
    prob: float
    order: int
    id: int


@dataclass(frozen=True)
class TextScore:
    """How well a model predicts a text.

    Attributes:
        sentences: sentences scored.
        tokens: predicted tokens: words plus one end symbol per sentence.
        oov: words outside the vocabulary (scored as the unknown symbol).
        oov_rate: oov / words.
        log2_prob: the total log2 probability.
        cross_entropy_bits: -log2_prob / tokens.
        perplexity: 2 ** cross_entropy_bits.
    """

    sentences: int
    tokens: int
    oov: int
    oov_rate: float
    log2_prob: float
    cross_entropy_bits: float
    perplexity: float


@dataclass(frozen=True)
class _Slots:
    """Where the entries of one context live."""

    v: int
    lo2: int
    hi2: int
    slot: int
    lo3: int
    hi3: int
    has3: bool


class LanguageModel:
    """A smoothed trigram model over a fixed vocabulary (built in memory or loaded from a file)."""

    def __init__(self, sections: dict[str, np.ndarray], meta: dict[str, Any], *, path: Path | None = None, file_bytes: int | None = None) -> None:
        """Wrap model arrays; use :func:`predictor.build` or :func:`predictor.load` to get one.

        Args:
            sections: the model's named arrays (see :mod:`predictor.modelfile`).
            meta: the header fields.
            path: the file the arrays are mapped from, if any.
            file_bytes: that file's size.
        """
        self.meta = meta
        self.sections = sections
        self.path = path
        self.file_bytes = file_bytes
        self.vocab = Vocabulary(sections)
        self._p1 = sections["p1"].astype(np.float64)
        self._off2 = sections["l2.off"].astype(np.int64)
        self._w2 = sections["l2.word"]
        self._a2 = sections["l2.value"]
        self._g2 = sections["l2.gamma"].astype(np.float64)
        self._off3 = sections["l3.off"]
        self._w3 = sections["l3.word"]
        self._a3 = sections["l3.value"]
        self._g3 = sections["l3.gamma"]
        self._interpolated = bool(meta["interpolated"])
        self._n2 = len(self._w2)
        self._size = self.vocab.size
        self._keys: tuple[np.ndarray, np.ndarray] | None = None

    # ----------------------------------------------------------------- facts
    @property
    def vocabulary(self) -> list[str]:
        """The suggestable words in model (case-folded) form, in id order."""
        return self.vocab.words()

    @property
    def method(self) -> str:
        """The estimator that built the model."""
        return str(self.meta["method"])

    @property
    def vocab_size(self) -> int:
        """How many suggestable words the model has (special symbols excluded)."""
        return self._size

    def ngram_counts(self) -> dict[str, int]:
        """How many n-grams of each order the model stores."""
        return {"1": self._size + 2, "2": self._n2, "3": len(self._w3)}

    def info(self) -> dict[str, Any]:
        """The facts ``foretype info`` reports (see README for each key)."""
        ngrams = self.ngram_counts()
        size = self.file_bytes if self.file_bytes is not None else sum(int(a.nbytes) for a in self.sections.values())
        total = sum(ngrams.values())
        return {
            "format_version": FORMAT_VERSION,
            "method": self.method,
            "vocab_size": self._size,
            "ngrams": ngrams,
            "file_bytes": size,
            "bytes_per_ngram": size / total,
            "corpus_tokens": int(self.meta["corpus_tokens"]),
            "possible_trigrams": (self._size + 2) ** 3,
            "value_encoding": self.meta["value_encoding"],
        }

    # -------------------------------------------------------------- contexts
    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Map up to two context words to ids: padded with START, unknown words to UNKNOWN."""
        words = list(context)[-2:]
        ids = [self.vocab.id_or_unknown(w) for w in words]
        start = self.vocab.start_id
        while len(ids) < 2:
            ids.insert(0, start)
        u, v = ids
        if v == start:
            u = start
        return u, v

    def _slots(self, u: int, v: int) -> _Slots:
        off2 = self._off2
        lo2, hi2 = int(off2[v]), int(off2[v + 1])
        slot = -1
        if v == self.vocab.start_id:
            slot = self._n2
        else:
            ulo, uhi = int(off2[u]), int(off2[u + 1])
            if uhi > ulo:
                pos = ulo + int(np.searchsorted(self._w2[ulo:uhi], v))
                if pos < uhi and self._w2[pos] == v:
                    slot = pos
        if slot >= 0:
            lo3, hi3 = int(self._off3[slot]), int(self._off3[slot + 1])
            if hi3 > lo3:
                return _Slots(v, lo2, hi2, slot, lo3, hi3, True)
        return _Slots(v, lo2, hi2, -1, 0, 0, False)

    def _gamma3(self, slots: _Slots) -> float:
        return float(self._g3[slots.slot]) if slots.has3 else 1.0

    def _scores(self, ids: np.ndarray, slots: _Slots, gamma3: float, with_order: bool = False) -> tuple[np.ndarray, np.ndarray | None]:
        """Probabilities of outcome ids after one context (the arithmetic every query shares)."""
        p = self._p1[ids]
        a2 = a3 = None
        if slots.hi2 > slots.lo2:
            words = self._w2[slots.lo2 : slots.hi2]
            pos = np.minimum(np.searchsorted(words, ids), len(words) - 1)
            hit2 = words[pos] == ids
            a2 = np.where(hit2, decode(self._a2[slots.lo2 + pos]), 0.0)
            gamma2 = self._g2[slots.v]
            lower = gamma2 * p
            p2 = a2 + lower if self._interpolated else np.where(hit2, a2, lower)
        else:
            p2 = p
        if slots.has3:
            words = self._w3[slots.lo3 : slots.hi3]
            pos = np.minimum(np.searchsorted(words, ids), len(words) - 1)
            hit3 = words[pos] == ids
            a3 = np.where(hit3, decode(self._a3[slots.lo3 + pos]), 0.0)
            lower = gamma3 * p2
            p3 = a3 + lower if self._interpolated else np.where(hit3, a3, lower)
        else:
            p3 = p2
        if not with_order:
            return p3, None
        return p3, self._orders(p3, a2, a3, gamma3)

    def _orders(self, p3: np.ndarray, a2: np.ndarray | None, a3: np.ndarray | None, gamma3: float) -> np.ndarray:
        """Which order supplied most of each probability."""
        from3 = a3 if a3 is not None else np.zeros_like(p3)
        if a2 is None:
            from2 = np.zeros_like(p3)
        else:
            from2 = gamma3 * a2 if a3 is not None else a2
        if not self._interpolated:
            return np.where(from3 > 0, 3, np.where(from2 > 0, 2, 1)).astype(np.int8)
        from1 = p3 - from3 - from2
        highest_first = np.stack((from3, from2, from1))
        return (3 - np.argmax(highest_first, axis=0)).astype(np.int8)

    # ---------------------------------------------------------------- queries
    def prob(self, word: str, context: Sequence[str] = ()) -> float:
        """P(word | context): the probability of a word (or END / UNKNOWN) after up to two words.

        Args:
            word: a written word, or :data:`END` or :data:`UNKNOWN`; out-of-vocabulary
                words get the probability of UNKNOWN.
            context: the preceding words, most recent last.
        """
        target = self.vocab.end_id if word == END else self.vocab.id_or_unknown(word)
        if target == self.vocab.start_id:
            raise OptionError("the start symbol is never predicted")
        return float(self.distribution(context, np.array([target]))[0])

    def distribution(self, context: Sequence[str] = (), ids: np.ndarray | None = None) -> np.ndarray:
        """Probabilities of outcome ids (default: all V + 2 outcomes) after a context.

        Returns:
            float64 array: ``result[i]`` is the probability of ``ids[i]``; with
            the default ids, word ids then UNKNOWN (V) then END (V + 1).
        """
        u, v = self.context_ids(context)
        slots = self._slots(u, v)
        if ids is None:
            ids = np.arange(self._size + 2)
        scores, _ = self._scores(np.asarray(ids, dtype=np.int64), slots, self._gamma3(slots))
        return scores

    def suggest(self, context: Sequence[str] = (), prefix: str = "", k: int = 5) -> list[Suggestion]:
        """The exact k most probable vocabulary words after a context that start with a prefix.

        Args:
            context: the preceding words of the sentence (the last two are used).
            prefix: the partial word typed so far (matched case-insensitively).
            k: how many suggestions at most.

        Returns:
            Suggestions by probability descending, ties by word ascending; fewer
            than k when fewer words match.  UNKNOWN and END are never suggested.

        Raises:
            OptionError: k is not positive.
        """
        u, v = self.context_ids(context)
        return self.suggest_ids(u, v, prefix, k)

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        """:meth:`suggest` with a context already mapped by :meth:`context_ids`."""
        if k < 1:
            raise OptionError(f"k must be at least 1, not {k}")
        found = self.vocab.prefix_range(model_form(prefix))
        if found is None:
            return []
        lo, hi = found.lo, found.hi
        slots = self._slots(u, v)
        gamma3 = self._gamma3(slots)
        explicit = self._explicit_candidates(slots, lo, hi)
        factor = (gamma3 if slots.has3 else 1.0) * (float(self._g2[v]) if slots.hi2 > slots.lo2 else 1.0)
        rest = self._unigram_candidates(found.order_start, lo, hi, explicit, k, ordered=factor > 0)
        candidates = np.concatenate((explicit, rest)) if len(explicit) else rest
        scores, _ = self._scores(candidates, slots, gamma3)
        top = np.lexsort((candidates, -scores))[:k]
        chosen = candidates[top]
        chosen_scores, orders = self._scores(chosen, slots, gamma3, with_order=True)
        assert orders is not None
        display = self.vocab.display
        return [Suggestion(display(int(i)), float(s), int(o), int(i)) for i, s, o in zip(chosen, chosen_scores, orders)]

    def _explicit_candidates(self, slots: _Slots, lo: int, hi: int) -> np.ndarray:
        """Classes A and B: stored continuations of the context within [lo, hi), sorted."""
        parts = []
        for words in (self._w3[slots.lo3 : slots.hi3] if slots.has3 else None, self._w2[slots.lo2 : slots.hi2]):
            if words is None or not len(words):
                continue
            start, stop = np.searchsorted(words, (lo, hi))
            if stop > start:
                parts.append(words[start:stop])
        if not parts:
            return np.zeros(0, dtype=np.int64)
        if len(parts) == 1:
            return parts[0].astype(np.int64)
        return np.union1d(parts[0], parts[1]).astype(np.int64)

    def _unigram_candidates(self, order_start: int, lo: int, hi: int, explicit: np.ndarray, k: int, *, ordered: bool) -> np.ndarray:
        """Class C: the first k words of [lo, hi) not in ``explicit``, in unigram order.

        When the class factor is 0 (maximum likelihood), every class-C word has
        probability 0 and ties are broken by id, so the range is walked in id order.
        """
        span = hi - lo
        listing = self.vocab.order[order_start : order_start + span] if ordered else None
        taken = 0
        want = 2 * k + 8
        while True:
            want = min(want, span)
            chunk = (listing[:want] if listing is not None else np.arange(lo, lo + want)).astype(np.int64)
            if len(explicit):
                pos = np.minimum(np.searchsorted(explicit, chunk), len(explicit) - 1)
                chunk = chunk[explicit[pos] != chunk]
            taken = len(chunk)
            if taken >= k or want == span:
                return chunk[:k]
            want *= 4

    def suggest_text(self, text: str, k: int = 5) -> list[Suggestion]:
        """Suggestions for the text before a cursor.

        If the text ends inside a word, that partial word is the prefix and the
        two words before it are the context; otherwise the prefix is empty.  At a
        sentence start the suggested words are shown with a capital first letter.
        """
        words, prefix = split_before_cursor(text)
        found = self.suggest(words[-2:], prefix, k)
        if words:
            return found
        return [Suggestion(capitalise(s.word), s.prob, s.order, s.id) for s in found]

    def parse_cursor_text(self, text: str) -> tuple[list[str], str]:
        """Return (context words, prefix) as :meth:`suggest_text` would use them."""
        words, prefix = split_before_cursor(text)
        return words[-2:], prefix

    # ---------------------------------------------------------------- scoring
    def _global_keys(self) -> tuple[np.ndarray, np.ndarray]:
        if self._keys is None:
            base = self._size + 3
            key2 = np.repeat(np.arange(base, dtype=np.int64), np.diff(self._off2)) * base + self._w2
            off3 = self._off3.astype(np.int64)
            key3 = np.repeat(np.arange(self._n2 + 1, dtype=np.int64), np.diff(off3)) * base + self._w3
            self._keys = (key2, key3)
        return self._keys

    def prob_triples(self, u: np.ndarray, v: np.ndarray, w: np.ndarray) -> np.ndarray:
        """Vectorised P(w | u v) for arrays of ids (the same arithmetic as :meth:`prob`)."""
        u = np.asarray(u, dtype=np.int64)
        v = np.asarray(v, dtype=np.int64)
        w = np.asarray(w, dtype=np.int64)
        base = self._size + 3
        start = self._size + 2
        key2, key3 = self._global_keys()
        p = self._p1[w]
        has2 = self._off2[v + 1] > self._off2[v]
        pos2 = np.minimum(np.searchsorted(key2, v * base + w), len(key2) - 1)
        hit2 = key2[pos2] == v * base + w
        a2 = np.where(hit2, decode(self._a2[pos2]), 0.0)
        lower = self._g2[v] * p
        p2 = a2 + lower if self._interpolated else np.where(hit2, a2, lower)
        p2 = np.where(has2, p2, p)
        pos_ctx = np.minimum(np.searchsorted(key2, u * base + v), len(key2) - 1)
        slot = np.where(v == start, self._n2, np.where(key2[pos_ctx] == u * base + v, pos_ctx, -1))
        off3 = self._off3
        safe = np.maximum(slot, 0)
        has3 = (slot >= 0) & (off3[safe + 1] > off3[safe])
        pos3 = np.minimum(np.searchsorted(key3, safe * base + w), len(key3) - 1)
        hit3 = has3 & (key3[pos3] == safe * base + w)
        a3 = np.where(hit3, decode(self._a3[pos3]), 0.0)
        gamma3 = self._g3[safe].astype(np.float64)
        lower3 = gamma3 * p2
        p3 = a3 + lower3 if self._interpolated else np.where(hit3, a3, lower3)
        return np.where(has3, p3, p2)

    def sentence_ids(self, words: Sequence[str]) -> np.ndarray:
        """Map a sentence's written words to ids (UNKNOWN for out-of-vocabulary)."""
        return np.fromiter((self.vocab.id_or_unknown(w) for w in words), dtype=np.int64, count=len(words))

    def logprob(self, words: Sequence[str]) -> float:
        """log2 P(sentence): every word and the end symbol, after the start padding."""
        ids = self.sentence_ids(words)
        return float(np.sum(np.log2(self._sentence_probs(ids))))

    def _sentence_probs(self, ids: np.ndarray) -> np.ndarray:
        start = self.vocab.start_id
        padded = np.concatenate(([start, start], ids, [self.vocab.end_id]))
        return self.prob_triples(padded[:-2], padded[1:-1], padded[2:])

    def score(self, lines: Iterable[str], *, wrapped: bool = False) -> TextScore:
        """Cross-entropy, perplexity and OOV rate of a text (README states the convention).

        Args:
            lines: the text, as lines or chunks of whole lines.
            wrapped: treat single line breaks as spaces.

        Raises:
            OptionError: the text holds no words.
        """
        sentences = 0
        words = 0
        oov = 0
        total = 0.0
        tokens = 0
        batch: list[np.ndarray] = []
        unknown = self.vocab.unknown_id
        text = "".join(lines) if not isinstance(lines, str) else lines
        for sentence in iter_sentences(text, wrapped=wrapped):
            ids = self.sentence_ids(sentence)
            sentences += 1
            words += len(ids)
            oov += int(np.count_nonzero(ids == unknown))
            batch.append(ids)
            if len(batch) >= 4096:
                total_part, count = self._score_batch(batch)
                total += total_part
                tokens += count
                batch = []
        if batch:
            total_part, count = self._score_batch(batch)
            total += total_part
            tokens += count
        if sentences == 0:
            raise OptionError("the text holds no words to score")
        entropy = -total / tokens
        return TextScore(
            sentences=sentences,
            tokens=tokens,
            oov=oov,
            oov_rate=oov / words,
            log2_prob=total,
            cross_entropy_bits=entropy,
            perplexity=math.inf if math.isinf(entropy) else 2.0**entropy,
        )

    def perplexity(self, lines: Iterable[str], *, wrapped: bool = False) -> float:
        """The perplexity of a text (see :meth:`score`)."""
        return self.score(lines, wrapped=wrapped).perplexity

    def _score_batch(self, batch: list[np.ndarray]) -> tuple[float, int]:
        start = self.vocab.start_id
        end = self.vocab.end_id
        pieces = []
        for ids in batch:
            pieces.append(np.concatenate(([start, start], ids, [end])))
        lengths = np.array([len(p) for p in pieces])
        stream = np.concatenate(pieces)
        u, v, w = stream[:-2], stream[1:-1], stream[2:]
        valid = np.ones(len(w), dtype=bool)
        # Drop the triples that straddle two sentences.
        boundaries = np.cumsum(lengths)[:-1]
        for shift in (1, 2):
            valid[boundaries - shift] = False
        probs = self.prob_triples(u[valid], v[valid], w[valid])
        with np.errstate(divide="ignore"):
            return float(np.sum(np.log2(probs))), int(valid.sum())

    # ------------------------------------------------------------ persistence
    def save(self, path: str | Path) -> int:
        """Write the model to a file atomically; returns the file size in bytes."""
        size = write_model_file(path, self.meta, self.sections)
        return size


def capitalise(word: str) -> str:
    """The word with its first letter in upper case (as at a sentence start)."""
    return word[:1].upper() + word[1:]


def load(path: str | Path) -> LanguageModel:
    """Load a model file (memory-mapped; nothing in it is executed).

    Raises:
        ModelFileError: missing, corrupt or not a model file.
        ModelVersionError: a format version this engine cannot read.
    """
    from .integrity import check_structure

    loaded = read_model_file(path)
    check_structure(loaded)
    return LanguageModel(loaded.sections, loaded.meta, path=loaded.path, file_bytes=loaded.file_bytes)


__all__ = ["LanguageModel", "Suggestion", "TextScore", "load", "capitalise", "START", "END", "UNKNOWN"]
