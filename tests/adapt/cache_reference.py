"""A plain textbook cache model: the reference the learning settings are measured against.

The person's words so far feed a Witten-Bell interpolated trigram (Witten and
Bell 1991; the interpolated form as in Chen and Goodman 1998, "An empirical
study of smoothing techniques for language modeling", section 2.5), mixed with
the base model at a fixed weight from the first word (the cache model of Kuhn
and De Mori 1990, here with a trigram cache)::

    P(w | u v) = (1 - lam) * P_base(w | u v) + lam * P_cache(w | u v)
    P_cache(w | u v) = (c(u v w) + T(u v) * P_cache(w | v)) / (c(u v) + T(u v))
    P_cache(w | v)   = (c(v w)   + T(v)   * P_cache(w))     / (c(v)   + T(v))
    P_cache(w)       = c(w) / N

where c(h) counts h as a history, T(h) the distinct words seen after h; a
history never seen passes its weight down a level.  Before the first word the
cache is empty and the base model answers alone.  A word is suggestable after
one use.  The mixture's top k is exact: a word the cache never saw scores
(1 - lam) * P_base, so the top k lies among the base model's top k and the
cache's words that match the prefix, which are all scored.

The source answers what the simulated typist asks (``context_ids``,
``suggest_ids``) and learns through ``learn`` as the combined model does, so
:class:`foretype.adapt.simulation.LearningObserver` can feed it.
"""

from __future__ import annotations

import bisect
from collections import Counter, defaultdict
from collections.abc import Sequence

import numpy as np

from foretype.query.model import LanguageModel, Suggestion
from foretype.text import model_form

START = "<s>"
END = "</s>"


class CacheSource:
    """The base model mixed at a fixed weight with a Witten-Bell trigram of the words typed so far."""

    def __init__(self, base: LanguageModel, weight: float) -> None:
        """Mix ``base`` with an empty cache at weight ``weight`` (0 < weight < 1)."""
        if not 0.0 < weight < 1.0:
            raise ValueError(f"the cache weight must lie strictly between 0 and 1, not {weight}")
        self.base = base
        self.weight = weight
        self.uni: Counter[str] = Counter()
        self.big: dict[str, Counter[str]] = defaultdict(Counter)
        self.tri: dict[tuple[str, str], Counter[str]] = defaultdict(Counter)
        self.total = 0
        self.display: dict[str, str] = {}
        self.forms: list[str] = []  # sorted, for prefix lookups
        self._contexts: list[tuple[tuple[str, str], int, int]] = []

    @property
    def vocab(self):
        """The base vocabulary."""
        return self.base.vocab

    def learn(self, words: Sequence[str], *, after: Sequence[str] = (), end: bool = False) -> None:
        """Count ``words`` after the context ``after`` (and the sentence end if ``end``)."""
        history = [START, START, *[model_form(w) for w in after]][-2:]
        sequence = [(model_form(w), w) for w in words]
        if end:
            sequence.append((END, END))
        for form, shown in sequence:
            u, v = history
            self.tri[(u, v)][form] += 1
            self.big[v][form] += 1
            if form != END:
                self.uni[form] += 1
                self.total += 1
                if form not in self.display:
                    bisect.insort(self.forms, form)
                self.display[form] = shown
            history = [v, form]

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Remember the context; the first id indexes it, the second is unused."""
        forms = [START, START, *[model_form(w) for w in context]][-2:]
        bu, bv = self.base.context_ids(context)
        self._contexts.append(((forms[0], forms[1]), bu, bv))
        return len(self._contexts) - 1, 0

    def p_cache(self, form: str, u: str, v: str) -> float:
        """P_cache(form | u v) by the Witten-Bell recursion of the module docstring."""
        if self.total == 0:
            return 0.0
        p = self.uni[form] / self.total
        for followers in (self.big.get(v), self.tri.get((u, v))):
            if followers:
                seen = sum(followers.values())
                distinct = len(followers)
                p = (followers[form] + distinct * p) / (seen + distinct)
        return p

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        """The exact top k of the mixture after a remembered context, for a prefix."""
        (cu, cv), bu, bv = self._contexts[u]
        lam = self.weight if self.total else 0.0
        start = model_form(prefix)
        scores: dict[str, tuple[float, str, int]] = {}
        for s in self.base.suggest_ids(bu, bv, prefix, k):
            form = model_form(s.word)
            scores[form] = ((1.0 - lam) * s.prob + lam * self.p_cache(form, cu, cv), s.word, s.id)
        low = bisect.bisect_left(self.forms, start)
        cached = []
        for form in self.forms[low:]:
            if not form.startswith(start):
                break
            if form not in scores:
                cached.append(form)
        if cached:
            ids = [self.base.vocab.id(f) for f in cached]
            known = np.array([i if i is not None else 0 for i in ids], dtype=np.int64)
            p_base = self.base.probabilities_of(bu, bv, known)
            for form, word_id, pb in zip(cached, ids, p_base.tolist()):
                pb = pb if word_id is not None else 0.0
                shown = self.base.vocab.display(word_id) if word_id is not None else self.display[form]
                scores[form] = ((1.0 - lam) * pb + lam * self.p_cache(form, cu, cv), shown, -1 if word_id is None else word_id)
        best = sorted(scores.items(), key=lambda item: (-item[1][0], item[0]))[:k]
        return [Suggestion(shown, p, 3, word_id) for _, (p, shown, word_id) in best]
