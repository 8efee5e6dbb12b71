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

import dataclasses
import math
import threading
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, NamedTuple, cast

import numpy as np

from ..errors import OptionError
from ..modelfile.encoding import decode
from ..modelfile.format import FORMAT_VERSION, read_model_file, write_model_file
from ..modelfile.integrity import check_structure
from ..modelfile.model_arrays import ModelArrays
from ..text import capitalise, iter_sentences, model_form, split_before_cursor
from .compiled import COMPILED, NUMPY, default_path, describe_path, make_core
from .ranked import RANKED_MIN, RankLists
from .scoring import ScoringCore, Slots
from .vocabulary import END, START, UNKNOWN, PrefixRange, Vocabulary

_SCORE_ALL = RANKED_MIN
"""A class with at most this many words in range is scored whole instead of walking its ranked list."""
_TIE_GUARD = 8
"""Extra words taken from a list ranked by P2, whose scaled scores may round to equal."""
_NO_IDS = np.zeros(0, dtype=np.int64)
_CACHE_ENTRIES = 1 << 16
"""Prefix ranges and context ids kept per model (a cache is emptied when it reaches this size)."""
_UNSEEN = object()


def _without(ids: np.ndarray, exclude: np.ndarray) -> np.ndarray:
    """``ids`` without the members of the sorted array ``exclude``."""
    if not len(exclude) or not len(ids):
        return ids
    at = exclude.searchsorted(ids.astype(exclude.dtype, copy=False))  # same dtype: no copy of exclude
    np.minimum(at, len(exclude) - 1, out=at)
    return ids[exclude[at] != ids]


class Suggestion(NamedTuple):
    """One suggested word, from a model alone or from a model combined with what a person typed.

    Attributes:
        word: the word in display form.
        prob: its probability after the context.
        order: the n-gram order (1, 2 or 3) that supplied most of the probability.
        id: the word's id in the model's vocabulary (a combined model numbers the
            words only the person's model knows from V + 3 on).
        learned: the person's model supplied more of the probability than the base
            model (always False for a model alone).
        new_word: the word is not in the base vocabulary; it exists only because it
            was learned (always False for a model alone).
    """

    word: str
    prob: float
    order: int
    id: int
    learned: bool = False
    new_word: bool = False


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


class LanguageModel:
    """A smoothed trigram model over a fixed vocabulary (built in memory or loaded from a file)."""

    def __init__(
        self,
        arrays: ModelArrays | Mapping[str, np.ndarray],
        meta: dict[str, Any],
        *,
        path: Path | None = None,
        file_bytes: int | None = None,
        compiled: bool | None = None,
    ) -> None:
        """Wrap model arrays; use :func:`foretype.builder` or :func:`foretype.load` to get one.

        Args:
            arrays: the model's arrays, or its sections by name (see
                :mod:`foretype.modelfile.model_arrays`).
            meta: the header fields.
            path: the file the arrays are mapped from, if any.
            file_bytes: that file's size.
            compiled: answer on the compiled core (True), the numpy path
                (False), or the default (None: the core where it is built,
                unless ``FORETYPE_PURE`` is set).

        Raises:
            RuntimeError: ``compiled=True`` but the compiled core is not built.
        """
        if not isinstance(arrays, ModelArrays):
            arrays = ModelArrays.from_sections(arrays)
        self.arrays = arrays
        self.meta = meta
        self.path = path
        self.file_bytes = file_bytes
        self.vocab = Vocabulary(arrays)
        self._size = self.vocab.size
        core = ScoringCore(arrays, meta, self._size)
        self._core = core
        # The core's arrays and arithmetic, bound once: queries call them many times each.
        self._p1, self._off2, self._a2, self._g2 = core._p1, core._off2, core._a2, core._g2
        self._a3 = core._a3
        self._interpolated, self._n2, self._table = core._interpolated, core._n2, core._table
        self._slots, self._gamma3, self._scores = core.slots, core.gamma3, core.scores
        self._unstored_scores, self._stored, self._orders = core.unstored_scores, core.stored, core.orders
        self._class_b_score = core.class_b_score
        self._keys: tuple[np.ndarray, np.ndarray] | None = None
        self._ranks = RankLists(arrays)
        self._root_values: np.ndarray | None = None
        self._last_context: tuple[int, int, Slots, float] = (-1, -1, Slots(-1, 0, 0, -1, 0, 0, False), 1.0)
        self._prefixes: dict[str, PrefixRange | None] = {}
        self._bounds: dict[str, tuple[int, int, int] | None] = {}
        self._contexts: dict[tuple[str, ...], tuple[int, int]] = {}
        self._compiled = None
        # The core keeps its current context and k-best buffers in itself, and building the answer's
        # Python objects may let another thread run: one query at a time per model.
        self._core_lock = threading.Lock()
        if compiled if compiled is not None else default_path() == COMPILED:
            # The core reads these three widened, as the numpy path does: convert them once.
            # (int64 offsets are no file dtype, hence the cast: this structure never reaches a file.)
            widened = dataclasses.replace(arrays, p1=self._p1, l2_off=cast(Any, self._off2), l2_gamma=self._g2)
            try:
                self._compiled = make_core(widened, self._interpolated, core.totals2)
            except ValueError:
                if compiled:
                    raise
                self._compiled = None  # a layout the core does not read: the numpy path answers
            if self._compiled is not None:
                tail = tuple(Suggestion._field_defaults[name] for name in Suggestion._fields[4:])
                self._compiled.bind_suggestions(Suggestion, self.vocab.display, tail)

    @property
    def _w2(self) -> np.ndarray:
        return self._core._w2

    @property
    def _w3(self) -> np.ndarray:
        return self._core._w3

    @property
    def _g3(self) -> np.ndarray:
        return self._core._g3

    @property
    def sections(self) -> dict[str, np.ndarray]:
        """The model's arrays by section name, as a model file stores them."""
        return self.arrays.sections()

    @property
    def query_path(self) -> str:
        """Which path answers queries: ``compiled`` (the compiled core) or ``numpy``."""
        return COMPILED if self._compiled is not None else NUMPY

    def compiled_core(self) -> tuple[Any, threading.Lock] | None:
        """The compiled core and the lock that keeps it to one query at a time (None on the numpy path)."""
        return None if self._compiled is None else (self._compiled, self._core_lock)

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
        return {"1": self._size + 2, "2": self._n2, "3": self.arrays.n3}

    def info(self) -> dict[str, Any]:
        """The facts ``foretype info`` reports (see README for each key)."""
        ngrams = self.ngram_counts()
        size = self.file_bytes if self.file_bytes is not None else self.arrays.nbytes()
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
            "query_path": self.query_path,
            "query_path_note": describe_path(self.query_path),
        }

    # -------------------------------------------------------------- contexts
    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Map up to two context words to ids: padded with START, unknown words to UNKNOWN."""
        key = context if type(context) is tuple and len(context) <= 2 else tuple(context)[-2:]
        known = self._contexts.get(key)
        if known is not None:
            return known
        words = list(key)
        ids = [self.vocab.id_or_unknown(w) for w in words]
        start = self.vocab.start_id
        while len(ids) < 2:
            ids.insert(0, start)
        u, v = ids
        if v == start:
            u = start
        if len(self._contexts) >= _CACHE_ENTRIES:
            self._contexts = {}
        self._contexts[key] = (u, v)
        return u, v

    def _context(self, u: int, v: int) -> tuple[Slots, float]:
        """The slots and level-3 weight of a context; the last one is kept, since queries come in runs per context."""
        last = self._last_context  # one read: other threads may replace it meanwhile
        if last[0] == u and last[1] == v:
            return last[2], last[3]
        slots = self._slots(u, v)
        gamma3 = self._gamma3(slots)
        self._last_context = (u, v, slots, gamma3)
        return slots, gamma3

    def _root_unigram(self) -> np.ndarray:
        """Negated unigram probabilities of the whole vocabulary in its ranked order (ascending)."""
        if self._root_values is None:
            self._root_values = -self._p1[self.vocab.ranked_range(PrefixRange(0, self._size, 0))]
        return self._root_values

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
        slots, gamma3 = self._context(u, v)
        if ids is None:
            ids = np.arange(self._size + 2)
        scores, _, _ = self._scores(np.asarray(ids, dtype=np.int64), slots, gamma3)
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
        found = self._prefix_range(prefix)
        if found is None:
            return []
        if self._compiled is not None:
            with self._core_lock:
                return self._compiled.suggest(u, v, found.lo, found.hi, found.order_start, k)
        display = self.vocab.display
        ids, probs, orders = self.top_in_range(u, v, found, k)
        return [Suggestion(display(i), p, o, i) for i, p, o in zip(ids.tolist(), probs.tolist(), orders)]

    def suggest_steps(self, u: int, v: int, prefixes: Sequence[str], k: int, until: str | None = None) -> list[list[Suggestion]]:
        """:meth:`suggest_ids` for several prefixes after one context, in one call (the simulated typist's steps).

        Args:
            u, v: the context ids (from :meth:`context_ids`).
            prefixes: the prefixes to ask about, in order.
            k: how many suggestions per prefix.
            until: a word in model form: the answers end after the first list
                that offers it (None: they never end early).

        Returns:
            One list per prefix answered, as :meth:`suggest_ids` gives it; the
            answers end after the first empty list or the first list offering ``until``.
        """
        if k < 1:
            raise OptionError(f"k must be at least 1, not {k}")
        stop = self.vocab.id(until) if until else None
        stop = -1 if stop is None else stop
        if self._compiled is not None:
            known = self._bounds
            ranges = []
            for prefix in prefixes:
                bounds = known.get(prefix, _UNSEEN)
                if bounds is _UNSEEN:
                    found = self._prefix_range(prefix)
                    bounds = known[prefix] = None if found is None else (found.lo, found.hi, found.order_start)
                ranges.append(bounds)
                if bounds is None:
                    break
            with self._core_lock:
                return self._compiled.steps(u, v, ranges, k, stop)
        lists: list[list[Suggestion]] = []
        for prefix in prefixes:
            answer = self.suggest_ids(u, v, prefix, k)
            lists.append(answer)
            if not answer or any(s.id == stop for s in answer):
                break
        return lists

    def _prefix_range(self, prefix: str) -> PrefixRange | None:
        """The id range of a prefix as typed (case-folded to model form), kept for the next query."""
        found = self._prefixes.get(prefix, _UNSEEN)
        if found is _UNSEEN:
            found = self.vocab.prefix_range(model_form(prefix) if prefix else "")
            if len(self._prefixes) >= _CACHE_ENTRIES:
                self._prefixes = {}
                self._bounds = {}
            self._prefixes[prefix] = found
        return found  # type: ignore[return-value]

    def top_in_range(self, u: int, v: int, found: PrefixRange, k: int) -> tuple[np.ndarray, np.ndarray, list[int]]:
        """The exact k most probable words of an id range after a context, without their display forms.

        This is :meth:`suggest_ids` for callers that combine the answer with
        another source (:mod:`foretype.adapt.combined`) and need ids and
        probabilities, not strings.

        Args:
            u, v: the context ids (from :meth:`context_ids`).
            found: the id range of a prefix (:meth:`Vocabulary.prefix_range`).
            k: how many words at most (positive).

        Returns:
            ``(ids, probs, orders)``: int64 ids and float64 probabilities of shape
            (n,), n <= k, by probability descending, ties by id ascending; and the
            order (1, 2 or 3) that supplied most of each probability.
        """
        if self._compiled is not None:
            with self._core_lock:
                ids, probs, orders = self._compiled.top(u, v, found.lo, found.hi, found.order_start, k)
            return np.array(ids, dtype=np.int64), np.array(probs, dtype=np.float64), orders
        slots, gamma3 = self._context(u, v)
        explicit, stored, run = self._explicit_candidates(slots, gamma3, found, k)
        scores, a2, a3 = self._scores(explicit, slots, gamma3, run)
        factor = (gamma3 if slots.has3 else 1.0) * (float(self._g2[slots.v]) if slots.hi2 > slots.lo2 else 1.0)
        rest = self._unigram_candidates(found, stored, k, factor, scores)
        if len(rest):
            more = self._unstored_scores(rest, slots, gamma3)
            explicit = np.concatenate((explicit, rest))
            scores = np.concatenate((scores, more))
            nothing = np.zeros(len(rest))
            a2 = None if a2 is None else np.concatenate((a2, nothing))
            a3 = None if a3 is None else np.concatenate((a3, nothing))
        top = np.lexsort((explicit, -scores))[:k]
        probs = scores[top]
        orders = self._orders(probs.tolist(), None if a2 is None else a2[top].tolist(), None if a3 is None else a3[top].tolist(), gamma3)
        return explicit[top], probs, orders

    def probabilities_of(self, u: int, v: int, ids: np.ndarray) -> np.ndarray:
        """P(w | u v) of outcome ids after a context given by ids (what :meth:`distribution` gives).

        Args:
            u, v: the context ids (from :meth:`context_ids`).
            ids: int64 outcome ids of shape (n,): words, UNKNOWN or END.

        Returns:
            float64 array of shape (n,).
        """
        if self._compiled is not None:
            with self._core_lock:
                return self._compiled.probabilities(u, v, ids)
        slots, gamma3 = self._context(u, v)
        return self._scores(ids, slots, gamma3)[0]

    def orders_of(self, u: int, v: int, ids: np.ndarray) -> list[int]:
        """Which n-gram order (1, 2 or 3) supplied most of each id's probability after a context.

        The same order :meth:`suggest_ids` reports for a suggested word.
        """
        if self._compiled is not None:
            with self._core_lock:
                return self._compiled.probabilities(u, v, ids, True)[1]
        slots, gamma3 = self._context(u, v)
        probs, a2, a3 = self._scores(ids, slots, gamma3)
        return self._orders(probs.tolist(), None if a2 is None else a2.tolist(), None if a3 is None else a3.tolist(), gamma3)

    def _explicit_candidates(self, slots: Slots, gamma3: float, found: PrefixRange, k: int) -> tuple[np.ndarray, np.ndarray, int]:
        """Classes A and B: distinct candidate ids among the words stored after the context.

        Every word stored after (u, v) is also stored after v (each trigram's
        tail is a stored bigram), so class A lies inside the range's bigram words.

        Returns:
            ``(candidates, in_range, run)``: int64 candidate ids; every word of
            the range stored after v (sorted; class C excludes them); and, when
            the candidates are exactly those words, where they start among the
            context's bigram words (else -1).
        """
        lo, hi = found.lo, found.hi
        if slots.hi2 <= slots.lo2:
            return _NO_IDS, _NO_IDS, -1
        words = self._w2[slots.lo2 : slots.hi2]
        bounds = np.array((lo, hi), dtype=words.dtype)
        start, stop = words.searchsorted(bounds)
        in_b = words[start:stop]
        if len(in_b) <= _SCORE_ALL:
            return in_b.astype(np.int64), in_b, int(start)
        parts = []
        in_a = _NO_IDS
        if slots.has3:
            words = self._w3[slots.lo3 : slots.hi3]
            start, stop = words.searchsorted(bounds)
            in_a = words[start:stop]
            if len(in_a):
                parts.append(self._best_of(in_a, self._ranks.trigram_list(slots.slot), lo, hi, k, _NO_IDS))
        # A class-B word can only enter the top k if it scores at least the k-th best of A.
        rivals = parts[0] if parts and len(parts[0]) >= k else None
        left = len(in_b) - len(in_a)  # the size of class B, since A lies inside B
        if 0 < left <= 4 * (k + _TIE_GUARD):
            # Few words of B are not in A: take them all rather than walk past A in the list.
            keep = np.ones(len(in_b), dtype=bool)
            keep[in_b.searchsorted(in_a)] = False
            parts.append(in_b[keep])
        elif left > 0:
            # Ranked by P2 while the class score is gamma3 * P2: a few extra words
            # guard against two scores rounding to equal.  With gamma3 = 0 every
            # score is 0 and ties go by id, the order of in_b itself.
            ranked = in_b if slots.has3 and gamma3 == 0 else self._ranks.bigram_list(slots.v)
            parts.append(self._best_of(in_b, ranked, lo, hi, k + _TIE_GUARD, in_a, rivals=rivals, top_k=k, slots=slots, gamma3=gamma3))
        joined = np.concatenate(parts) if len(parts) > 1 else parts[0]
        return joined.astype(np.int64, copy=False), in_b, -1

    def _best_of(
        self,
        in_range: np.ndarray,
        ranked: np.ndarray | None,
        lo: int,
        hi: int,
        k: int,
        exclude: np.ndarray,
        *,
        rivals: np.ndarray | None = None,
        top_k: int = 0,
        slots: Slots | None = None,
        gamma3: float = 1.0,
    ) -> np.ndarray:
        """The words of ``in_range`` a class contributes: all of them, or the best of a ranked list.

        A ranked list holds the context's words in the class's own order, so its
        first k words inside [lo, hi) and outside ``exclude`` are the class's top
        k.  When the range is narrow the walk would be long: the range is then
        returned whole.  With ``rivals`` (at least ``top_k`` candidates of another
        class) and the context's ``slots``, a walk that goes past its first chunk
        also stops once the next listed word scores below the ``top_k``-th best
        rival: scores only fall along the list, so no later word could enter the
        top ``top_k``.
        """
        if ranked is None:
            return _without(in_range, exclude)
        full = lo == 0 and hi == self._size
        budget = 4 * len(in_range)
        taken: list[np.ndarray] = []
        have = 0
        chunk = k + 8
        position = 0
        floor = None
        while position < len(ranked) and position < budget:
            if position and slots is not None and rivals is not None:
                if floor is None:  # computed only when the walk goes on, which is rare
                    scores = self._scores(rivals.astype(np.int64, copy=False), slots, gamma3)[0]
                    floor = float(np.partition(scores, len(scores) - top_k)[len(scores) - top_k]) if 0 < top_k <= len(scores) else -1.0
                if self._class_b_score(ranked.item(position), slots, gamma3) < floor:
                    return np.concatenate(taken) if taken else _NO_IDS
            piece = ranked[position : position + chunk]
            position += len(piece)
            if not full:
                piece = piece[(piece >= lo) & (piece < hi)]
            piece = _without(piece, exclude)
            if len(piece):
                taken.append(piece)
                have += len(piece)
                if have >= k:
                    return np.concatenate(taken) if len(taken) > 1 else taken[0]
            chunk *= 4
        if position >= len(ranked):
            return np.concatenate(taken) if taken else _NO_IDS
        return _without(in_range, exclude)

    def _unigram_candidates(self, found: PrefixRange, exclude: np.ndarray, k: int, factor: float, explicit_scores: np.ndarray) -> np.ndarray:
        """Class C: the first k words of the range not in ``exclude``, in unigram order.

        Every class-C word scores ``factor * P1(w)``.  Once k explicit candidates
        are scored, a class-C word can only enter the top k if its score reaches
        the k-th best of them, so the unigram list is cut by binary search where
        P1 falls below that score / factor (with a margin for rounding), and only
        the words above the cut are walked.  When the factor is 0 (maximum
        likelihood) every class-C word has probability 0 and ties go by id, so the
        range is walked in id order.
        """
        lo, hi = found.lo, found.hi
        span = hi - lo
        listing = None
        if factor > 0:
            listing = self.vocab.ranked_range(found)
            if len(explicit_scores) >= k:
                kth = float(np.partition(explicit_scores, len(explicit_scores) - k)[len(explicit_scores) - k])
                cut = kth / factor * (1 - 1e-9)
                if span == self._size:
                    # The whole vocabulary: its unigram values, negated, are sorted ascending.
                    span = int(self._root_unigram().searchsorted(-cut, side="right"))
                else:
                    probability = self._p1.item
                    position = listing.item
                    low, high = 0, span
                    while low < high:  # first position whose unigram probability is below the cut
                        middle = (low + high) // 2
                        if probability(position(middle)) >= cut:
                            low = middle + 1
                        else:
                            high = middle
                    span = low
        taken: list[np.ndarray] = []
        have = 0
        done = 0
        step = k + 8
        while done < span and have < k:
            stop = min(done + step, span)
            chunk = listing[done:stop] if listing is not None else np.arange(lo + done, lo + stop)
            chunk = _without(chunk, exclude)
            if len(chunk):
                taken.append(chunk)
                have += len(chunk)
            done = stop
            step *= 4
        if not taken:
            return _NO_IDS
        joined = np.concatenate(taken) if len(taken) > 1 else taken[0]
        return joined[:k].astype(np.int64, copy=False)

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
            off3 = self._core.level3_offsets()
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
        if not len(key2):  # a pruned model may store no bigram at all
            return p
        pos2 = np.minimum(np.searchsorted(key2, v * base + w), len(key2) - 1)
        hit2 = key2[pos2] == v * base + w
        a2 = np.where(hit2, _decoded(self._a2[pos2], self._core._table), 0.0)
        lower = self._g2[v] * p
        p2 = a2 + lower if self._interpolated else np.where(hit2, a2, lower)
        p2 = np.where(has2, p2, p)
        pos_ctx = np.minimum(np.searchsorted(key2, u * base + v), len(key2) - 1)
        slot = np.where(v == start, self._n2, np.where(key2[pos_ctx] == u * base + v, pos_ctx, -1))
        off3 = self._core.level3_offsets()
        safe = np.maximum(slot, 0)
        has3 = (slot >= 0) & (off3[safe + 1] > off3[safe])
        if not len(key3):
            return p2
        pos3 = np.minimum(np.searchsorted(key3, safe * base + w), len(key3) - 1)
        hit3 = has3 & (key3[pos3] == safe * base + w)
        a3 = np.where(hit3, _decoded(self._a3[pos3], self._core._table3), 0.0)
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
    def save(self, path: str | Path, *, force: bool = False) -> int:
        """Write the model to a file atomically (``-``: standard output); returns the file size in bytes.

        ``force`` replaces an existing file that is not a model file.
        """
        size = write_model_file(path, self.meta, self.arrays.compact(bool(self.meta["interpolated"])).sections(), force=force)
        return size


def _decoded(codes: np.ndarray, table: np.ndarray | None) -> np.ndarray:
    """Decode stored values with a level's code table (float32 values have none)."""
    return table[codes] if table is not None else decode(codes)


def load(path: str | Path) -> LanguageModel:
    """Load a model file (memory-mapped; nothing in it is executed).

    Raises:
        ModelFileError: missing, corrupt or not a model file.
        ModelVersionError: a format version this engine cannot read.
    """
    loaded = read_model_file(path)
    arrays = check_structure(loaded)
    return LanguageModel(arrays, loaded.meta, path=loaded.path, file_bytes=loaded.file_bytes)


__all__ = ["LanguageModel", "Suggestion", "TextScore", "load", "START", "END", "UNKNOWN"]
