"""The base model combined with a user model: the suggestion source that learns.

The combined probability of an outcome w after the context (u, v) is::

    P(w | u v) = (1 - mu) * P_base(w | u' v') + mu * P_user(w | u v)
    mu = worth_b * n_b / (n_b + beta),   worth_b = (R_b + prior_worth * beta) / (n_b + beta)

P_user is the Witten-Bell trigram of :mod:`predictor.adapt.user_model`; u' v'
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
   ``suggest_ids``: by P_base descending, ties by id, that is by word); a starts
   at k + 4 (a few words past the k-th keep the bound below tight).  Each word
   of A is scored exactly.
2. Every other word of R has P_base <= p_a, the P_base of A's last word (0 once
   A holds all of R's base words: only new words are left, with P_base = 0),
   so its probability is at most m * p_a + mu * P_user(w) and at least
   mu * P_user(w), and P_user(w) is known without the base model: for class X,
   the words the user model saw after (u, v) or after v, it is computed once
   per context; for every other counted word it is g3 * (g2 * c(w) / N), the
   Witten-Bell chain with nothing above the unigram, which grows with c(w).
3. L is the k-th largest of A's exact scores, the floors mu * P_user of class
   X's words in R and the floors of the k most counted other words of R (the
   k largest floors of that class, since its floor grows with the count).
   Each value belongs to a different word and is at most that word's score,
   so L never exceeds the final k-th score.  Every word outside A whose bound
   reaches L (X's part of R is one slice of the prepared context; the other
   counted words are read by count, down to the count where the bound falls
   below L) gets its P_base in one call and is scored exactly; any other word
   is bounded below L, so strictly below the k-th score.
4. The words left never counted by the user model and outside A score
   m * P_base <= m * p_a.  If the k-th best score exceeds that bound, the top k
   is final.  If it equals it, it is final when the k-th word sorts no later
   than A's last word and no smaller base value rounds to m * p_a: an unread
   base word can then only tie, and it sorts after A's last word.  Otherwise A
   is read four times deeper and the walk repeats (the threshold algorithm of
   Fagin, Lotem & Naor 2003, with list A doing the sorted access of the base).
5. Where mu is 0 (no evidence yet in the context's bucket) new words score
   exactly 0; they are added when the k-th score is 0 or fewer than k words
   score at all, since ties go by word.

The arithmetic is the one :meth:`AdaptedModel.distribution` uses, every
bound is computed with the same operations in the same order (each one
monotone), and ties go by word (model form) ascending, so the result equals
sorting every word of R by probability.  The never-suggest list removes words
before the top k is taken.  When mu is 0, the never list is empty and no new
word is suggestable, the base model answers directly, so with learning off
every suggestion is the base model's own.
"""

from __future__ import annotations

import math
from bisect import bisect_left
from collections.abc import Sequence
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from ..errors import OptionError
from ..model import LanguageModel, capitalise
from ..text import model_form, split_before_cursor
from ..vocabulary import END, START, Vocabulary
from .never_list import NeverList
from .settings import AdaptSettings
from .user_model import UserContext, UserModel

_SCORE_ALL = 96
"""A prefix with at most this many counted words has them listed directly; with more, the global by-count list is read."""
_GUARD = 4
"""List A is first read to k + this many words: its k-th word already bounds every unread one,
and one more makes the bound strict in the usual case."""
_KEY_SHIFT = 21
"""Sort keys: a base id i is (i << 21) | (2**21 - 1); the j-th new word sorting just before base word i is (i << 21) | j."""
_BASE_KEY_LOW = (1 << _KEY_SHIFT) - 1
_NO_IDS = np.zeros(0, dtype=np.int64)
_NO_PROBS = np.zeros(0, dtype=np.float64)


class AdaptedSuggestion(NamedTuple):
    """A suggestion from the combined model: the fields of :class:`~predictor.model.Suggestion`, then two marks.

    Attributes:
        word: the word in display form.
        prob: its combined probability after the context.
        order: the n-gram order (1, 2 or 3) that supplied most of the probability
            (the user model's order when ``learned``, else the base model's).
        id: the word's id (base id, or V + 3 + j for a word only the user model knows).
        learned: the user model supplied more of the probability than the base model
            (the interface marks these).
        new_word: the word is not in the base vocabulary; it exists only because it was learned.
    """

    word: str
    prob: float
    order: int
    id: int
    learned: bool = False
    new_word: bool = False


@dataclass
class _Context:
    """What one context needs for every prefix typed after it (cached between queries).

    Class X, the suggestable words seen after (u, v) or after v, has its user
    probabilities computed once per context, in sort-key order so that a
    prefix's part of it is one slice; their base probabilities are fetched per
    query, only for the words that could make the top k.
    """

    mu: float
    user: UserContext | None
    base_words: list[str]
    ub: int
    vb: int
    x_keys: np.ndarray
    """int64 sort keys of class X, ascending."""
    x_ids: np.ndarray
    """int64 ids of class X, in the order of x_keys."""
    x_user: np.ndarray
    """float64 user probabilities of x_ids."""
    x_members: np.ndarray
    """int64 ids of class X sorted by id, for membership tests."""
    x_where: dict[int, int]
    """Position of each class-X id in x_ids."""
    x_user_list: list[float]
    """x_user as Python floats."""


class LearnedWord(NamedTuple):
    """One word the user model has counted, as the interface lists it.

    Attributes:
        word: its display form.
        uses: how many times it was learned (raw).
        count: its count after decay.
        last_seen: Unix time it was last learned.
        new_word: the base vocabulary lacks it.
        suggestable: it can be suggested (a new word needs ``min_uses``; none on the never-suggest list).
        never: the never-suggest list blocks it.
    """

    word: str
    uses: int
    count: float
    last_seen: int
    new_word: bool
    suggestable: bool
    never: bool


class _BaseWords:
    """The base vocabulary's model forms as a sequence, for bisection."""

    def __init__(self, vocab: Vocabulary) -> None:
        self._vocab = vocab

    def __len__(self) -> int:
        return self._vocab.size

    def __getitem__(self, index: int) -> str:
        return self._vocab.word(index)


class AdaptedModel:
    """Suggestions and probabilities from a base model combined with what a person's text taught."""

    def __init__(self, base: LanguageModel, user: UserModel | None = None, never: NeverList | None = None) -> None:
        """Combine a base model with a user model and a never-suggest list.

        Args:
            base: the trained model.
            user: the learned counts (default: empty, bound to ``base``'s vocabulary).
            never: words and patterns never suggested (default: none).

        Raises:
            OptionError: ``user`` is bound to a different vocabulary size.
        """
        self.base = base
        self.user = user if user is not None else UserModel(base.vocab)
        if self.user.base_size != base.vocab_size:
            raise OptionError("the user model was made for a different base vocabulary")
        self.never = never if never is not None else NeverList()
        self._blocked_state = -1
        self._blocked_base = _NO_IDS
        self._blocked_set: set[int] = set()
        self._seen_state: tuple[int, int] = (-1, -1)
        self._seen_ok = _NO_IDS
        self._ready_state: tuple[int, int] = (-1, -1)
        self._ready_seen = 0
        self._ready_forms: list[str] = []
        self._ready_ids: list[int] = []
        self._learned_keys: dict[int, int] = {}
        self._learned_key_array = np.zeros(0, dtype=np.int64)
        self._insertion: dict[int, int] = {}
        self._context_key: tuple[int, ...] | None = None
        self._context: _Context | None = None

    def reset(self, user: UserModel, never_entries: Sequence[str]) -> None:
        """Replace the learned counts and the never-suggest entries (everything derived is rebuilt).

        Raises:
            OptionError: ``user`` is bound to a different vocabulary size, or an entry is bad.
        """
        if user.base_size != self.base.vocab_size:
            raise OptionError("the user model was made for a different base vocabulary")
        self.never.replace(never_entries)
        self.user = user
        self._seen_state = (-1, -1)
        self._ready_state = (-1, -1)
        self._insertion = {}
        self._context_key = None
        self._context = None

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
        user = self.user
        rows = sorted(user.word_rows(), key=lambda row: (-row[2], row[1]))
        listed = []
        for word_id, form, count, uses, seen in rows:
            never = self.never.blocks(form)
            new = user.is_learned(word_id)
            listed.append(LearnedWord(user.display(word_id), uses, count, seen, new, not never and (not new or user.is_ready(word_id)), never))
        return listed

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
        worth = user.worth(uctx.bucket)
        p_user = float(user.probabilities(np.array([w], dtype=np.int64), uctx)[0])
        target = user.unknown_id if user.is_learned(w) else w
        p_base = float(self.base.distribution(self._base_context(u, v), np.array([target], dtype=np.int64))[0])
        mine = worth * p_user
        total = mine + (1.0 - worth) * p_base
        return mine / total if total > 0 else 0.0

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

    def _base_ids(self, u: int, v: int) -> tuple[int, int]:
        first = self.user.first_learned_id
        unknown = self.user.unknown_id
        return (unknown if u >= first else u), (unknown if v >= first else v)

    def _base_context(self, u: int, v: int) -> list[str]:
        """The context as words the base model maps back to (u', v')."""
        vocab = self.base.vocab
        return [vocab.word(i) for i in self._base_ids(u, v)]

    def _prepared(self, u: int, v: int) -> _Context:
        """The cached per-context data for (u, v), rebuilt when anything it depends on changed."""
        user = self.user
        key = (u, v, user.version, self.never.version)
        if key == self._context_key and self._context is not None:
            return self._context
        self._refresh_filters()
        ub, vb = self._base_ids(u, v)
        vocab = self.base.vocab
        base_words = [vocab.word(ub), vocab.word(vb)]
        uctx = user.context(u, v)
        mu = user.share(uctx)
        members = keys = x_ids = _NO_IDS
        x_user = _NO_PROBS
        if mu > 0.0:
            members, members_user = user.followers(uctx)
            # Sort keys of -1 mark blocked words and new words not used often enough; symbols are dropped too.
            keys = self._keys_any(members)
            keep = (keys >= 0) & ((members < user.base_size) | (members >= user.first_learned_id))
            if not keep.all():
                members, members_user, keys = members[keep], members_user[keep], keys[keep]
            if len(members) and members[-1] >= user.first_learned_id:
                by_key = np.argsort(keys)
                keys, x_ids, x_user = keys[by_key], members[by_key], members_user[by_key]
            else:
                x_ids, x_user = members, members_user  # base ids alone: id order is key order
        else:
            uctx = None
        x_list = x_ids.tolist()
        self._context = _Context(mu, uctx, base_words, ub, vb, keys, x_ids, x_user, members, dict(zip(x_list, range(len(x_list)))), x_user.tolist())
        self._context_key = key
        return self._context

    # ------------------------------------------------------------ scoring
    def _base_probs(self, ids: np.ndarray, context_words: list[str]) -> np.ndarray:
        """P_base of ids (0 for new words and START)."""
        inside = ids <= self.user.end_id
        if inside.all():
            return self.base.distribution(context_words, ids)
        out = np.zeros(len(ids), dtype=np.float64)
        if inside.any():
            out[inside] = self.base.distribution(context_words, ids[inside])
        return out

    @staticmethod
    def _combine(mu: float, base: np.ndarray, user: np.ndarray) -> np.ndarray:
        """(1 - mu) * P_base + mu * P_user: the one combination every query uses."""
        return (1.0 - mu) * base + mu * user

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
        base = self._base_probs(ids, prepared.base_words)
        if prepared.user is None:
            return self._combine(0.0, base, np.zeros(len(ids)))
        return self._combine(prepared.mu, base, user.probabilities(ids, prepared.user))

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
    def suggest(self, context: Sequence[str] = (), prefix: str = "", k: int = 5) -> list[AdaptedSuggestion]:
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

    def suggest_text(self, text: str, k: int = 5) -> list[AdaptedSuggestion]:
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

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[AdaptedSuggestion]:
        """:meth:`suggest` with a context already mapped by :meth:`context_ids` (see the module docstring)."""
        if k < 1:
            raise OptionError(f"k must be at least 1, not {k}")
        prepared = self._prepared(u, v)
        if prepared.user is None and not self.never and not (self.user.settings.learning and self._ready_forms):
            return [AdaptedSuggestion(s[0], s[1], s[2], s[3]) for s in self.base.suggest_ids(prepared.ub, prepared.vb, prefix, k)]
        return self._exact_top(prepared, prefix, k)

    def _exact_top(self, prepared: _Context, prefix: str, k: int) -> list[AdaptedSuggestion]:
        """The threshold walk of the module docstring.

        Candidates are (-probability, sort key, id, P_base, P_user) tuples; the
        arithmetic on them is the arithmetic of :meth:`distribution`, one
        IEEE double operation at a time in the same order (numpy's elementwise
        operations round as Python's do).
        """
        user = self.user
        form = model_form(prefix)
        span = self.base.vocab.prefix_range(form)
        key_range = self._key_range(form, span)
        if key_range is None:
            return []
        klo, khi = key_range
        mu = prepared.mu
        m = 1.0 - mu
        uctx = prepared.user
        blocked = self._blocked_set
        if uctx is not None and uctx.total1 > 0:
            g3, g2, total1 = uctx.gamma3, uctx.gamma2, uctx.total1
        else:
            g3 = g2 = total1 = 0.0
        weights = user.unigram_table()
        x_where, x_user = prepared.x_where, prepared.x_user_list
        a_depth = k + _GUARD
        while True:
            # List A: the base model's own exact ranking of the range's base words.
            listed = self.base.suggest_ids(prepared.ub, prepared.vb, prefix, a_depth) if span is not None else []
            a_done = len(listed) < a_depth
            a_last = listed[-1][1] if listed and not a_done else 0.0
            a_set = {s[3] for s in listed}
            rows = []
            for s in listed:
                i = s[3]
                if i in blocked:
                    continue
                pb = s[1]
                at = x_where.get(i)
                if at is not None:
                    pu = x_user[at]
                else:
                    pu = g3 * (g2 * (weights[i] / total1)) if total1 and weights[i] else 0.0
                rows.append((-(m * pb + mu * pu), (i << _KEY_SHIFT) | _BASE_KEY_LOW, i, pb, pu))
            if uctx is not None:
                # Classes X and counted: every word whose bound reaches the k-th lower bound gets
                # its base probability, all in one call.
                ids, user_p = self._reaching(rows, prepared, span, form, klo, khi, a_set, a_last, k)
                if len(ids):
                    base_p = self._base_probs(ids, prepared.base_words)
                    scores = (-(m * base_p + mu * user_p)).tolist()
                    rows.extend(zip(scores, self._keys(ids).tolist(), ids.tolist(), base_p.tolist(), user_p.tolist()))
            elif user.settings.learning and self._needs_zero_words(rows, k):
                # mu is 0 here (no evidence yet in this bucket): new words score exactly 0 and
                # matter only when the k-th score is 0 too (ties go by word) or words are few.
                rows.extend((-0.0, key, i, 0.0, 0.0) for i, key in self._new_words_in_range(form))
            rows.sort()
            if a_done:
                break
            if len(rows) >= k:
                kth_score = -rows[k - 1][0]
                z_bound = m * a_last + mu * 0.0
                if kth_score > z_bound:
                    break
                # Unread base words score at most the bound and, when equal, sort after A's last word.
                if kth_score == z_bound and _no_merge(m, a_last) and rows[k - 1][1] <= (listed[-1][3] << _KEY_SHIFT) | _BASE_KEY_LOW:
                    break
            a_depth *= 4
        chosen = rows[:k]
        a_orders = {s[3]: s[2] for s in listed}
        missing = {i for _, _, i, pb, pu in chosen if not mu * pu > m * pb and i not in a_orders and i < user.base_size}
        if missing:
            a_orders.update(self._base_orders(prepared, prefix, missing, a_depth))
        first_new = user.first_learned_id
        display = user.display
        results = []
        for score, _, i, pb, pu in chosen:
            mine = mu * pu > m * pb
            if not mine and i in a_orders:
                order_of = a_orders[i]
            else:
                order_of = user.order_of(i, uctx) if uctx is not None else 1
            results.append(AdaptedSuggestion(display(i), float(-score), int(order_of), int(i), bool(mine), i >= first_new))
        return results

    @staticmethod
    def _needs_zero_words(rows: list[tuple], k: int) -> bool:
        """Tell whether words scoring exactly 0 could be among the k best."""
        if len(rows) < k:
            return True
        return sorted(rows)[k - 1][0] == 0.0

    def _new_words_in_range(self, form: str) -> list[tuple[int, int]]:
        """(id, sort key) of the suggestable new words starting with ``form``."""
        forms = self._ready_forms
        lo = bisect_left(forms, form)
        hi = bisect_left(forms, form + "\U0010ffff") if form else len(forms)
        return [(i, self._learned_keys[i]) for i in self._ready_ids[lo:hi]]

    def _reaching(
        self,
        rows: list[tuple],
        prepared: _Context,
        span,  # noqa: ANN001 - PrefixRange | None
        form: str,
        klo: int,
        khi: int,
        a_set: set[int],
        a_last: float,
        k: int,
    ) -> tuple[np.ndarray, np.ndarray]:
        """The words of the range outside A that could be among the k best, and their user probabilities.

        Such a word scores (1 - mu) * P_base + mu * P_user with P_base at most
        ``a_last``, so it is bounded by ``(1 - mu) * a_last + mu * P_user`` and
        floored by ``mu * P_user``.  The threshold L is the k-th largest of A's
        exact scores, the floors of class X in the range and the floors of the
        k most counted other words of the range: each belongs to a different
        word, so L never exceeds the final k-th score, and a word bounded below
        L cannot enter the top k.  Class X is one slice of the prepared context;
        the counted words are read by count, where the bound only falls.

        Returns:
            ``(ids, user_probabilities)``: int64 and float64 arrays of the words whose bound reaches L.
        """
        mu = prepared.mu
        edge = (1.0 - mu) * a_last
        lower = [-r[0] for r in rows]
        x_lo, x_hi = prepared.x_keys.searchsorted(np.array((klo, khi + 1), dtype=np.int64)).tolist()
        x_ids, x_pu = prepared.x_ids[x_lo:x_hi], prepared.x_user[x_lo:x_hi]
        if x_hi > x_lo:
            x_where = prepared.x_where
            inside = [at - x_lo for at in map(x_where.get, a_set) if at is not None and x_lo <= at < x_hi]
            if inside:
                keep = np.ones(x_hi - x_lo, dtype=bool)
                keep[inside] = False
                x_ids, x_pu = x_ids[keep], x_pu[keep]
            floors = mu * x_pu
            lower.extend((np.partition(floors, len(floors) - k)[len(floors) - k :] if len(floors) > k else floors).tolist())
        threshold = _kth(lower, k)
        c_ids, c_pu = self._counted_reaching(prepared, span, form, klo, khi, a_set, edge, lower, threshold, k)
        if len(x_ids):
            threshold = _kth(lower, k)
            reach = edge + mu * x_pu >= threshold
            if not reach.all():
                x_ids, x_pu = x_ids[reach], x_pu[reach]
        if not len(c_ids):
            return x_ids, x_pu
        if not len(x_ids):
            return c_ids, c_pu
        return np.concatenate((x_ids, c_ids)), np.concatenate((x_pu, c_pu))

    def _counted_reaching(
        self,
        prepared: _Context,
        span,  # noqa: ANN001 - PrefixRange | None
        form: str,
        klo: int,
        khi: int,
        a_set: set[int],
        edge: float,
        lower: list[float],
        threshold: float,
        k: int,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Counted words of the range outside X and A whose bound reaches L (their floors join ``lower``).

        Outside X a counted word's user probability is g3 * (g2 * c(w) / N),
        which falls with the count, so the k most counted eligible words carry
        the class's k largest floors, and reading by count stops at the first
        word whose bound is below L.
        """
        uctx = prepared.user
        assert uctx is not None
        mu = prepared.mu
        g3, g2, total1 = uctx.gamma3, uctx.gamma2, uctx.total1
        weights = self.user.unigram_table()
        ranked, minus = self.user.ranked()
        if not len(ranked):
            return _NO_IDS, _NO_PROBS
        if len(lower) >= k and edge + mu * (g3 * (g2 * (-float(minus[0]) / total1))) < threshold:
            return _NO_IDS, _NO_PROBS  # the most counted word of all bounds every other
        a_ids = np.array(sorted(a_set), dtype=np.int64) if a_set else _NO_IDS
        members = prepared.x_members
        if len(lower) >= k:
            # L is already known: the words whose bound reaches it are the most counted ones, found by
            # bisecting the count list at a slightly lower count, then checked exactly.  The margins cover
            # the rounding of the bound's sum (absolute, a few ulps of L) and of the inverted product.
            scale = mu * g3 * g2
            gap = threshold - edge - 4.0 * math.ulp(threshold)
            if gap > 0.0 and scale > 0.0:
                least = gap / scale * total1 * (1.0 - 1e-9)
                stop = int(minus.searchsorted(-least, side="right"))
                if stop <= _SCORE_ALL:
                    ids = ranked[:stop]
                    pu = g3 * (g2 * (weights[ids] / total1))
                    keys = self._keys_any(ids)
                    eligible = (keys >= klo) & (keys <= khi) & (edge + mu * pu >= threshold)
                    if len(members):
                        eligible &= ~_member(members, ids)
                    if len(a_ids):
                        eligible &= ~_member(a_ids, ids)
                    return ids[eligible], pu[eligible]
        counted = self._counted_in_range(span, form)
        found_ids: list[np.ndarray] = []
        found_pu: list[np.ndarray] = []
        have = 0
        position = 0
        chunk = 4 * k + 16
        source = ranked if counted is None else counted
        while position < len(source):
            ids = source[position : position + chunk]
            position += len(ids)
            chunk *= 4
            pu = g3 * (g2 * (weights[ids] / total1))
            last_bound = edge + mu * float(pu[-1])
            if counted is None:
                keys = self._keys_any(ids)
                eligible = (keys >= klo) & (keys <= khi)
            else:
                eligible = np.ones(len(ids), dtype=bool)
            if len(members):
                eligible &= ~_member(members, ids)
            if len(a_ids):
                eligible &= ~_member(a_ids, ids)
            ids, pu = ids[eligible], pu[eligible]
            if have < k and len(ids):
                # The first k eligible words carry the k largest floors of the class.
                lower.extend((mu * pu[: k - have]).tolist())
                threshold = _kth(lower, k)
            have += len(ids)
            reach = edge + mu * pu >= threshold
            if len(ids):
                found_ids.append(ids[reach])
                found_pu.append(pu[reach])
            if last_bound < threshold:
                break
        if not found_ids:
            return _NO_IDS, _NO_PROBS
        if len(found_ids) == 1:
            return found_ids[0], found_pu[0]
        return np.concatenate(found_ids), np.concatenate(found_pu)

    def _counted_in_range(self, span, form: str) -> np.ndarray | None:  # noqa: ANN001 - PrefixRange | None
        """The range's counted, suggestable words, most counted first, or None when there are many.

        With many, the walk reads the global by-count list instead.
        """
        seen = self._seen_ok
        if span is not None:
            start, stop = seen.searchsorted((span.lo, span.hi))
        else:
            start = stop = 0
        forms = self._ready_forms
        lo = bisect_left(forms, form) if forms else 0
        hi = (bisect_left(forms, form + "\U0010ffff") if form else len(forms)) if forms else 0
        if (stop - start) + (hi - lo) > _SCORE_ALL:
            return None
        ids = seen[start:stop]
        if hi > lo:
            ids = np.concatenate((ids, np.array(self._ready_ids[lo:hi], dtype=np.int64)))
        return ids[np.argsort(-self.user.unigram_weights(ids), kind="stable")]

    def _base_orders(self, prepared: _Context, prefix: str, wanted: set[int], depth: int) -> dict[int, int]:
        """The base model's order for some words of the prefix range, reading its ranking deeper."""
        found: dict[int, int] = {}
        while wanted - set(found):
            depth *= 4
            listed = self.base.suggest_ids(prepared.ub, prepared.vb, prefix, depth)
            found = {s[3]: s[2] for s in listed if s[3] in wanted}
            if len(listed) < depth:
                break
        return found

    # -------------------------------------------------------------- filters
    def _refresh_filters(self) -> None:
        """Rebuild what depends on the never-suggest list and on which words are counted."""
        never = self.never.version
        if self._blocked_state != never:
            self._blocked_base = self.never.blocked_ids(self.base.vocab)
            self._blocked_set = set(self._blocked_base.tolist())
            self._blocked_state = never
        user = self.user
        seen_state = (user.seen_version, never)
        if seen_state != self._seen_state:
            self._seen_ok = self._unblocked(user.seen_base_ids())
            self._seen_state = seen_state
        ready_state = (user.ready_epoch, never)
        if ready_state != self._ready_state:
            self._rebuild_ready()
            self._ready_state = ready_state
            self._ready_seen = len(user.ready_since(0))
        else:
            fresh = user.ready_since(self._ready_seen)
            if fresh:
                for word_id in fresh:
                    self._add_ready(word_id)
                self._ready_seen += len(fresh)

    def _rebuild_ready(self) -> None:
        """The suggestable new words (sorted by form, never-list applied) and their sort keys."""
        user = self.user
        self._ready_forms, self._ready_ids, self._learned_keys = [], [], {}
        self._learned_key_array = np.full(user.learned_count, -1, dtype=np.int64)
        allowed = [(form, word_id) for form, word_id in zip(user.ready_forms(), user.ready_learned("")) if not self.never.blocks(form)]
        self._ready_forms = [form for form, _ in allowed]
        self._ready_ids = [word_id for _, word_id in allowed]
        self._renumber(0, len(allowed))

    def _add_ready(self, word_id: int) -> None:
        """One more new word became suggestable: put it in place and renumber its group."""
        form = self.user.form(word_id)
        if self.never.blocks(form):
            return
        at = bisect_left(self._ready_forms, form)
        if at < len(self._ready_forms) and self._ready_forms[at] == form:
            return
        self._ready_forms.insert(at, form)
        self._ready_ids.insert(at, word_id)
        self._renumber(at, at + 1)

    def _renumber(self, lo: int, hi: int) -> None:
        """Give sort keys to the new words at ``lo:hi`` of the sorted list and to the rest of their groups.

        New words sorting between the same two base words form a group; the
        j-th of a group, in form order, gets (place << 21) | j.
        """
        user = self.user
        forms, ids = self._ready_forms, self._ready_ids
        if len(self._learned_key_array) < user.learned_count:
            grown = np.full(max(user.learned_count, 2 * len(self._learned_key_array)), -1, dtype=np.int64)
            grown[: len(self._learned_key_array)] = self._learned_key_array
            self._learned_key_array = grown
        places = [self._place(ids[i], forms[i]) for i in range(lo, hi)]
        if not places:
            return
        while lo > 0 and self._place(ids[lo - 1], forms[lo - 1]) == places[0]:
            lo -= 1
            places.insert(0, places[0])
        while hi < len(ids) and self._place(ids[hi], forms[hi]) == places[-1]:
            hi += 1
            places.append(places[-1])
        group, slot = -1, 0
        first = user.first_learned_id
        for i, place in zip(range(lo, hi), places):
            slot = slot + 1 if place == group else 0
            group = place
            key = (place << _KEY_SHIFT) | slot
            self._learned_keys[ids[i]] = key
            self._learned_key_array[ids[i] - first] = key

    def _place(self, word_id: int, form: str) -> int:
        """How many base words sort before a new word (cached: the base vocabulary never changes)."""
        place = self._insertion.get(word_id)
        if place is None:
            place = self._insertion[word_id] = bisect_left(_BaseWords(self.base.vocab), form)
        return place

    def _key_range(self, form: str, span) -> tuple[int, int] | None:  # noqa: ANN001 - PrefixRange | None
        """The sort keys of the first and last suggestable word starting with ``form`` (None if none)."""
        firsts, lasts = [], []
        if span is not None:
            firsts.append((span.lo << _KEY_SHIFT) | _BASE_KEY_LOW)
            lasts.append(((span.hi - 1) << _KEY_SHIFT) | _BASE_KEY_LOW)
        forms = self._ready_forms
        if forms:
            lo = bisect_left(forms, form)
            hi = bisect_left(forms, form + "\U0010ffff") if form else len(forms)
            if hi > lo:
                firsts.append(self._learned_keys[self._ready_ids[lo]])
                lasts.append(self._learned_keys[self._ready_ids[hi - 1]])
        if not firsts:
            return None
        return min(firsts), max(lasts)

    def _key(self, word_id: int) -> int:
        if word_id < self.user.first_learned_id:
            return (word_id << _KEY_SHIFT) | _BASE_KEY_LOW
        return self._learned_keys[word_id]

    def _keys(self, ids: np.ndarray) -> np.ndarray:
        """Sort keys of suggestable ids, in model-form order (base and learned ids interleaved correctly)."""
        keys = (ids << _KEY_SHIFT) | _BASE_KEY_LOW
        learned = ids >= self.user.first_learned_id
        if learned.any():
            keys[learned] = self._learned_key_array[ids[learned] - self.user.first_learned_id]
        return keys

    def _keys_any(self, ids: np.ndarray) -> np.ndarray:
        """Sort keys of counted ids; -1 for words that may not be suggested (blocked, not yet used enough)."""
        keys = (ids << _KEY_SHIFT) | _BASE_KEY_LOW
        learned = ids >= self.user.first_learned_id
        if learned.any():
            keys[learned] = self._learned_key_lookup(ids[learned])
        if len(self._blocked_base):
            keys[_member(self._blocked_base, ids)] = -1
        return keys

    def _learned_key_lookup(self, ids: np.ndarray) -> np.ndarray:
        """Sort keys of learned ids; -1 for one that may not be suggested (blocked, or not used enough yet)."""
        array = self._learned_key_array
        offsets = ids - self.user.first_learned_id
        known = offsets < len(array)
        if known.all():
            return array[offsets]
        found = np.full(len(offsets), -1, dtype=np.int64)
        found[known] = array[offsets[known]]
        return found

    def _suggestable(self, ids: np.ndarray) -> np.ndarray:
        """The ids that are suggestable words: unblocked base words and allowed new words."""
        base = ids[ids < self.user.base_size]
        base = self._unblocked(base)
        new = ids[ids >= self.user.first_learned_id]
        if len(new):
            new = new[self._learned_key_lookup(new) >= 0]
        return np.concatenate((base, new)) if len(new) else base

    def _unblocked(self, ids: np.ndarray) -> np.ndarray:
        """``ids`` without the base words the never-suggest list blocks."""
        blocked = self._blocked_base
        if not len(blocked) or not len(ids):
            return ids
        return ids[~_member(blocked, ids)]


def _sorted_union(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """The sorted distinct values of two int64 arrays (cheaper than numpy's set routines on short arrays)."""
    if not len(a):
        return b
    if not len(b):
        return a
    merged = np.concatenate((a, b))
    merged.sort()
    keep = np.empty(len(merged), dtype=bool)
    keep[0] = True
    np.not_equal(merged[1:], merged[:-1], out=keep[1:])
    return merged[keep]


def _member(sorted_ids: np.ndarray, ids: np.ndarray) -> np.ndarray:
    """Mask of ``ids`` found in the sorted array ``sorted_ids``."""
    if not len(sorted_ids):
        return np.zeros(len(ids), dtype=bool)
    pos = sorted_ids.searchsorted(ids)
    np.minimum(pos, len(sorted_ids) - 1, out=pos)
    return sorted_ids[pos] == ids


def _kth(values: list[float], k: int) -> float:
    """The k-th largest value (minus infinity when there are fewer than k)."""
    if len(values) < k:
        return -math.inf
    return sorted(values, reverse=True)[k - 1]


def _no_merge(m: float, value: float) -> bool:
    """Tell whether no smaller non-negative number times m rounds to m * value."""
    if value <= 0.0:
        return True
    return m * value > m * float(np.nextafter(value, 0.0))


__all__ = ["AdaptedModel", "AdaptedSuggestion", "LearnedWord"]
