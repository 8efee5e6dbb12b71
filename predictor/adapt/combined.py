"""The base model combined with a user model: the suggestion source that learns.

The combined probability of an outcome w after the context (u, v) is::

    P(w | u v) = (1 - mu) * P_base(w | u' v') + mu * P_user(w | u v)
    mu = worth_b * n_b / (n_b + beta),   worth_b = (R_b + prior_worth * beta) / (n_b + beta)

P_user is the Witten-Bell trigram of :mod:`foretype.adapt.user_model`; u' v'
is the context as the base model sees it (a word only the user model knows
reads as UNKNOWN there).  The share mu depends on the context only through
its evidence bucket b (has the user written (u, v) before, only v, or
neither): n_b is how many tokens were learned in that bucket and R_b how much
of their probability the user model would have supplied (each token's EM
responsibility, Jelinek & Mercer 1980, computed just before it is counted).
So the share grows with the evidence and settles where the person's own text
says the user model deserves: high when they write unlike the training text,
low when the base model already predicts them well.  Words the base
vocabulary lacks have ``P_base = 0`` (the base keeps its UNKNOWN mass), so the
distribution over base words, learned words, UNKNOWN and END sums to 1.
Learned words take ids V + 3 + j after the base ids and its three symbols.

How ``suggest`` stays exact.  Write m = 1 - mu; it is the same for every word
after one context.  R is the prefix's suggestable words: base words with the
prefix, and, while learning is on, new words used ``min_uses`` times; minus
the never-suggest list.

1. List A is the base model's own exact top-a of R's base words (its
   ``top_in_range``: by P_base descending, ties by id, that is by word); a
   starts at k + 4 (a few words past the k-th keep the bound below tight).
   Each word of A is scored exactly.
2. The pool is every suggestable word the user model has counted, kept in
   sort-key order; per context it carries each word's P_user: the exact value
   for the words seen after (u, v) or after v, and g3 * (g2 * c(w) / N), the
   Witten-Bell chain with nothing above the unigram, for the others.  R's part
   of the pool is one slice.  A word never counted has P_user = 0.
3. Every word of R outside A has P_base <= p_a, the P_base of A's last word
   (0 once A holds all of R's base words: only new words are left, with
   P_base = 0), so its probability is at most m * p_a + mu * P_user(w) and at
   least mu * P_user(w).  L is the k-th best of A's exact scores (raised, when
   many pool words reach it, to the k-th best floor mu * P_user of the slice's
   words outside A).  Each value belongs to a different word and is at most
   that word's score, so L never exceeds the final k-th score.  Every pool
   word outside A whose bound reaches L gets its P_base in one call and is
   scored exactly; any other pool word is bounded below L, so strictly below
   the k-th score.
4. The words left, never counted and outside A, score m * P_base <= m * p_a.
   If the k-th best score exceeds that bound, the top k is final.  If it
   equals it, it is final when the k-th word sorts no later than A's last word
   and no smaller base value rounds to m * p_a: an unread base word can then
   only tie, and it sorts after A's last word.  Otherwise A is read four times
   deeper and the walk repeats (the threshold algorithm of Fagin, Lotem & Naor
   2003, with list A doing the sorted access of the base).
5. Where mu is 0 (no evidence yet in the context's bucket) new words score
   exactly 0; they are pool words whose bound is m * p_a, so they are read
   when the k-th score is 0 or fewer than k words score at all (ties go by
   word).

The code is split along these seams: :mod:`foretype.adapt.combination` (the
arithmetic), :mod:`foretype.adapt.suggestable` (what may be suggested under
one version of the user model and the never-suggest list: an immutable
snapshot), :mod:`foretype.adapt.top_k` (the walk above) and
:mod:`foretype.adapt.listings`.

The arithmetic is the one :meth:`AdaptedModel.distribution` uses, every
bound is computed with the same operations in the same order (each one
monotone), and ties go by word (model form) ascending, so the result equals
sorting every word of R by probability.  The never-suggest list removes words
before the top k is taken.  When mu is 0, the never list is empty and no new
word is suggestable, the base model answers directly, so with learning off
every suggestion is the base model's own.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.model import LanguageModel, Suggestion
from ..query.vocabulary import END, START, Vocabulary
from ..text import capitalise, split_before_cursor
from .combination import base_context, base_probabilities, combine, responsibility
from .compiled_merge import MERGE_GUARD, merge_available, merge_for
from .listings import LearnedWord, learned_words
from .never_list import NeverList
from .settings import AdaptSettings
from .suggestable import Suggestable, derive
from .top_k import ContextFacts, PreparedContext, Row, exact_top, prepare
from .user_model import UserModel

_RECENT_CONTEXTS = 16
"""How many contexts' compiled merges a snapshot keeps (each holds a bit and a float per pool word)."""

AdaptedSuggestion = Suggestion
"""The combined model's suggestions are the engine's one :class:`~foretype.query.model.Suggestion` type,
with ``learned`` (the user model supplied more of the probability than the base model; its order is then
the user model's) and ``new_word`` (the base vocabulary lacks the word) set; the old name is kept."""


class AdaptedModel:
    """Suggestions and probabilities from a base model combined with what a person's text taught."""

    def __init__(self, base: LanguageModel, user: UserModel | None = None, never: NeverList | None = None, *, compiled: bool | None = None) -> None:
        """Combine a base model with a user model and a never-suggest list.

        Args:
            base: the trained model.
            user: the learned counts (default: empty, bound to ``base``'s vocabulary).
            never: words and patterns never suggested (default: none).
            compiled: walk to the top k with the compiled merge (True), the
                Python walk (False), or the default (None: the compiled merge
                where it is built and the base model answers on its compiled core).

        Raises:
            OptionError: ``user`` is bound to a different vocabulary size.
            RuntimeError: ``compiled=True`` but the compiled merge or the base model's compiled core is missing.
        """
        if compiled and (not merge_available() or base.compiled_core() is None):
            raise RuntimeError("the compiled merge needs the compiled merge and the base model's compiled core built")
        self._merge_on = compiled is not False
        self.base = base
        self.user = user if user is not None else UserModel(base.vocab)
        if self.user.base_size != base.vocab_size:
            raise OptionError("the user model was made for a different base vocabulary")
        self.never = never if never is not None else NeverList()
        self._view: Suggestable | None = None
        """What may be suggested, as of the versions of the user model and the list it was derived at."""
        self._fast: Any = None
        """The compiled merge of the last context asked about, which answers a repeated query in one call."""

    def reset(self, user: UserModel, never_entries: Sequence[str]) -> None:
        """Replace the learned counts and the never-suggest entries (everything derived is rebuilt).

        Raises:
            OptionError: ``user`` is bound to a different vocabulary size, or an entry is bad.
        """
        if user.base_size != self.base.vocab_size:
            raise OptionError("the user model was made for a different base vocabulary")
        self.never.replace(never_entries)
        self.user = user
        self._view = None
        self._fast = None

    # ----------------------------------------------------------------- facts
    @property
    def settings(self) -> AdaptSettings:
        """The learning settings (stored with the user model)."""
        return self.user.settings

    @property
    def vocab(self) -> Vocabulary:
        """The base model's vocabulary (learned words are not in it)."""
        return self.base.vocab

    def share(self, context: Sequence[str] = ()) -> float:
        """The user model's share mu after a context (0 when learning is off or nothing is learned)."""
        u, v = self.context_ids(context)
        return self._prepared(u, v).mu

    def is_learned_word(self, word_id: int) -> bool:
        """Tell whether an id belongs to a word only the user model knows."""
        return self.user.is_learned(word_id)

    def learned_words(self) -> list[LearnedWord]:
        """Every word the user model has counted, most counted first (ties by word)."""
        return learned_words(self.user, self.never)

    def word_of(self, word_id: int) -> str:
        """The display form of any id this model suggests."""
        return self.user.display(word_id)

    # -------------------------------------------------------------- learning
    def learn(self, words: Sequence[str], *, after: Sequence[str] = (), end: bool = False, when: int | None = None) -> list[float]:
        """Learn accepted or typed words (nothing happens while learning is off).

        Each token's responsibility (the share of its probability the user
        model would have supplied, at the current worth estimate) is computed
        from both models just before the token is counted.

        Args:
            words: written words continuing the sentence.
            after: the preceding words of the sentence, as written.
            end: the sentence ends after ``words``.
            when: Unix time in seconds (default now).

        Returns:
            The responsibilities, one per token counted (empty when learning is off).

        Raises:
            OptionError: an entry of ``words`` is not a single word.
        """
        if not self.user.settings.learning:
            return []
        return self.user.learn(words, after=after, end=end, when=when, credit=self._responsibility)

    def _responsibility(self, u: int, v: int, w: int) -> float:
        user = self.user
        uctx = user.context(u, v)
        p_user = float(user.probabilities(np.array([w], dtype=np.int64), uctx)[0])
        target = user.unknown_id if user.is_learned(w) else w
        ub, vb = base_context(u, v, user.first_learned_id, user.unknown_id)
        p_base = float(self.base.probabilities_of(ub, vb, np.array([target], dtype=np.int64))[0])
        return responsibility(user.worth(uctx.bucket), p_user, p_base)

    # -------------------------------------------------------------- contexts
    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Map up to two context words to ids: base ids, learned ids, START padding, else UNKNOWN."""
        words = list(context)[-2:]
        user = self.user
        ids = []
        for word in words:
            found = user.id_of(word)
            ids.append(user.unknown_id if found is None else found)
        while len(ids) < 2:
            ids.insert(0, user.start_id)
        u, v = ids
        if v == user.start_id:
            u = user.start_id
        return u, v

    def _current(self, u: int, v: int) -> tuple[Suggestable, ContextFacts]:
        """The snapshot for the current versions of the user model and the never-suggest list, and the
        per-context data for (u, v) under it (the last context asked about is kept in the snapshot's memo):
        the compiled merge of the context where it answers, else a :class:`~foretype.adapt.top_k.PreparedContext`.

        The compiled merges of the last few contexts are kept too (a context such as a sentence start
        comes back often, and its many followers cost the same each time)."""
        view = self._view
        user = self.user
        if view is None or view.user is not user or view.version != (user.version, self.never.version):
            view = self._view = derive(view, user, self.never, self.base.vocab)
        prepared = view.memo.get("context")
        if prepared is None or prepared.u != u or prepared.v != v:
            recent = view.memo.setdefault("recent", {})
            prepared = recent.pop((u, v), None)
            if prepared is None and self._merge_on:
                prepared = merge_for(self.base, view, u, v)
            if prepared is None:
                prepared = prepare(view, u, v)
            elif not isinstance(prepared, PreparedContext):
                recent[(u, v)] = prepared  # the most recent last
                if len(recent) > _RECENT_CONTEXTS:
                    del recent[next(iter(recent))]
            view.memo["context"] = prepared
        return view, prepared

    def _prepared(self, u: int, v: int) -> ContextFacts:
        """The per-context data for (u, v) (see :meth:`_current`)."""
        return self._current(u, v)[1]

    # ------------------------------------------------------------ scoring
    def distribution(self, context: Sequence[str] = (), ids: np.ndarray | None = None) -> np.ndarray:
        """Combined probabilities of outcome ids after a context.

        Args:
            context: the preceding words, most recent last.
            ids: outcome ids (default: every id, 0 .. V + 3 + learned words - 1).

        Returns:
            float64 array: ``result[i]`` is the probability of ``ids[i]``; with the
            default ids, base words, UNKNOWN (V), END (V + 1), START (V + 2, always
            0), then learned words.  The default result sums to 1.
        """
        u, v = self.context_ids(context)
        user = self.user
        if ids is None:
            ids = np.arange(user.first_learned_id + user.learned_count, dtype=np.int64)
        ids = np.asarray(ids, dtype=np.int64)
        prepared = self._prepared(u, v)
        base = base_probabilities(self.base, ids, prepared.ub, prepared.vb, user.end_id)
        if prepared.user is None:
            return combine(0.0, base, np.zeros(len(ids)))
        return combine(prepared.mu, base, user.probabilities(ids, prepared.user))

    def prob(self, word: str, context: Sequence[str] = ()) -> float:
        """P(word | context) under the combined model.

        Args:
            word: a written word, END or UNKNOWN; a word neither model knows gets UNKNOWN's probability.
            context: the preceding words, most recent last.

        Raises:
            OptionError: ``word`` is START.
        """
        user = self.user
        if word == START:
            raise OptionError("the start symbol is never predicted")
        target = user.end_id if word == END else user.id_of(word)
        if target is None:
            target = user.unknown_id
        return float(self.distribution(context, np.array([target]))[0])

    # ------------------------------------------------------------ suggestions
    def suggest(self, context: Sequence[str] = (), prefix: str = "", k: int = 5) -> list[Suggestion]:
        """The exact k most probable suggestable words after a context that start with a prefix.

        Args:
            context: the preceding words of the sentence (the last two are used).
            prefix: the partial word typed so far (matched case-insensitively).
            k: how many suggestions at most.

        Returns:
            Suggestions by combined probability descending, ties by word ascending.

        Raises:
            OptionError: k is not positive.
        """
        u, v = self.context_ids(context)
        return self.suggest_ids(u, v, prefix, k)

    def suggest_text(self, text: str, k: int = 5) -> list[Suggestion]:
        """Suggestions for the text before a cursor (as :meth:`LanguageModel.suggest_text`)."""
        words, prefix = split_before_cursor(text)
        found = self.suggest(words[-2:], prefix, k)
        if words:
            return found
        return [s._replace(word=capitalise(s.word)) for s in found]

    def parse_cursor_text(self, text: str) -> tuple[list[str], str]:
        """Return (context words, prefix) as :meth:`suggest_text` would use them."""
        words, prefix = split_before_cursor(text)
        return words[-2:], prefix

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        """:meth:`suggest` with a context already mapped by :meth:`context_ids` (see the module docstring)."""
        fast = self._fast
        if fast is not None:
            user = self.user
            found = fast.answer(user, user.version, self.never.version, u, v, prefix, k)
            if found is not None:
                return found  # type: ignore[no-any-return]
        if k < 1:
            raise OptionError(f"k must be at least 1, not {k}")
        view, prepared = self._current(u, v)
        if prepared.user is None and not self.never and not (view.ready_forms and self.user.settings.learning):
            return self.base.suggest_ids(prepared.ub, prepared.vb, prefix, k)
        span, key_range = view.ranges_of(prefix, self.base.vocab)
        if key_range is None:
            return []
        if not isinstance(prepared, PreparedContext):  # the compiled merge of the context
            if prepared is not self._fast:
                prepared.stamp(self.user, view.version[0], view.version[1], *view.prefix_memo, view.ranges_of, self.base.vocab, MERGE_GUARD)  # type: ignore[attr-defined]
                self._fast = prepared
            if span is None:
                return prepared.suggest(False, 0, 0, -1, key_range[0], key_range[1], k, MERGE_GUARD)  # type: ignore[attr-defined,no-any-return]
            return prepared.suggest(True, span.lo, span.hi, span.order_start, key_range[0], key_range[1], k, MERGE_GUARD)  # type: ignore[attr-defined,no-any-return]
        chosen, base_orders = exact_top(self.base, view, prepared, span, key_range, k)
        return self._results(prepared, chosen, base_orders)

    def _results(self, prepared: PreparedContext, chosen: list[Row], base_orders: dict[int, int]) -> list[Suggestion]:
        """Suggestions from the chosen candidates (rows with :class:`~foretype.adapt.top_k.Candidate`'s fields), with their orders and marks."""
        user = self.user
        mu = prepared.mu
        m = 1.0 - mu
        uctx = prepared.user
        # Each row unpacked once into its fields, by name: (neg_score, key, id, p_base, p_user).
        rows = [(neg_score, word_id, mu * p_user > m * p_base) for neg_score, _, word_id, p_base, p_user in chosen]
        missing = [word_id for _, word_id, own in rows if not own and word_id not in base_orders and word_id < user.base_size]
        if missing:
            base_orders = {**base_orders, **dict(zip(missing, self.base.orders_of(prepared.ub, prepared.vb, np.array(missing, dtype=np.int64))))}
        first_new = user.first_learned_id
        display = user.display
        results = []
        for neg_score, word_id, own in rows:
            if not own and word_id in base_orders:
                order_of = base_orders[word_id]
            else:
                order_of = user.order_of(word_id, uctx) if uctx is not None else 1
            results.append(Suggestion(display(word_id), float(-neg_score), int(order_of), int(word_id), own, word_id >= first_new))
        return results


__all__ = ["AdaptedModel", "AdaptedSuggestion", "LearnedWord"]
