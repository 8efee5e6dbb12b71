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
from ..query.model import LanguageModel
from ..query.vocabulary import END, START, PrefixRange, Vocabulary
from ..text import capitalise, model_form, split_before_cursor
from .never_list import NeverList
from .settings import AdaptSettings
from .user_model import UserContext, UserModel

_GUARD = 4
"""List A is first read to k + this many words: its k-th word already bounds every unread one,
and one more makes the bound strict in the usual case."""
_FEW_REACHING = 32
"""When more words than this reach the first threshold, it is raised by the pool's own floors first."""
_KEY_SHIFT = 21
"""Sort keys: a base id i is (i << 21) | (2**21 - 1); the j-th new word sorting just before base word i is (i << 21) | j."""
_BASE_KEY_LOW = (1 << _KEY_SHIFT) - 1
_SMALL_SLICE = 24
"""A prefix's part of the pool with at most this many words is bounded in plain Python."""
_PREFIX_MEMO = 4096
"""At most this many typed prefixes keep their id and key ranges between queries."""
_NO_IDS = np.zeros(0, dtype=np.int64)
_NO_PROBS = np.zeros(0, dtype=np.float64)


class AdaptedSuggestion(NamedTuple):
    """A suggestion from the combined model: the fields of :class:`~foretype.query.model.Suggestion`, then two marks.

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

    The pool is every suggestable word the user model has counted, in sort-key
    order so that a prefix's part of it is one slice, with its user
    probability after this context; base probabilities are fetched per query,
    only for the words that could make the top k.
    """

    mu: float
    user: UserContext | None
    ub: int
    vb: int
    keys: np.ndarray
    """int64 sort keys of the pool, ascending."""
    ids: np.ndarray
    """int64 ids of the pool, in the order of keys."""
    p_user: np.ndarray
    """float64 P_user of the pool's words after this context."""
    floors: np.ndarray
    """float64 mu * P_user of the pool's words: the least combined score each can have."""


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
        self._prefixes: dict[str, tuple[PrefixRange | None, tuple[int, int] | None]] = {}
        self._context_key: tuple[int, ...] | None = None
        self._context: _Context | None = None
        self._pool_state: tuple = ()
        self._pool_keys = self._pool_ids = self._pool_where = _NO_IDS
        self._pool_share_key: tuple[int, int] = (-1, -1)
        self._pool_share = _NO_PROBS

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
        self._prefixes = {}
        self._context_key = None
        self._context = None
        self._pool_state = ()

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
        p_base = float(self.base.probabilities_of(*self._base_ids(u, v), np.array([target], dtype=np.int64))[0])
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

    def _prepared(self, u: int, v: int) -> _Context:
        """The cached per-context data for (u, v), rebuilt when anything it depends on changed."""
        user = self.user
        key = (u, v, user.version, self.never.version)
        if key == self._context_key and self._context is not None:
            return self._context
        self._refresh_filters()
        ub, vb = self._base_ids(u, v)
        uctx = user.context(u, v)
        mu = user.share(uctx)
        keys, ids = self._pool_keys, self._pool_ids
        if mu > 0.0 and uctx.total1 > 0:
            # Outside the words seen after (u, v) or v, P_user is the Witten-Bell chain over the
            # unigram alone: (1 - g3) * 0.0 + g3 * ((1 - g2) * 0.0 + g2 * p1) is g3 * (g2 * p1) exactly.
            p_user = uctx.gamma3 * (uctx.gamma2 * self._pool_unigram(uctx.total1))
            merged = self._with_followers(uctx, keys, ids, p_user)
            if merged is not None:
                keys, ids, p_user = merged
        else:
            p_user = np.zeros(len(ids), dtype=np.float64)
            if mu <= 0.0:
                mu, uctx = 0.0, None
        self._context = _Context(mu, uctx, ub, vb, keys, ids, p_user, mu * p_user)
        self._context_key = key
        return self._context

    def _with_followers(self, uctx: UserContext, keys: np.ndarray, ids: np.ndarray, p_user: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
        """Write the exact P_user of the words seen after (u, v) or after v into ``p_user``.

        Those words are counted, so they are normally in the pool already and
        None is returned: the pool keeps its layout.  A follower the pool lacks
        (a hand-edited file can hold one) is merged in, and the merged
        ``(keys, ids, p_user)`` are returned.
        """
        members, members_user = self.user.followers(uctx)
        if not len(members):
            return None
        where = self._pool_where
        at = where[np.minimum(members, len(where) - 1)]  # the last slot is -1: ids past it are not pooled
        if at.min() >= 0:
            p_user[at] = members_user
            return None
        hit = at >= 0
        p_user[at[hit]] = members_user[hit]
        strays, strays_user = members[~hit], members_user[~hit]
        keep = np.array([self._could_suggest(i) for i in strays.tolist()], dtype=bool)
        if not keep.any():
            return None  # END, UNKNOWN, blocked words and new words not used enough yet
        stray_keys = self._keys_any(strays)
        keys = np.concatenate((keys, stray_keys[keep]))
        ids = np.concatenate((ids, strays[keep]))
        p_user = np.concatenate((p_user, strays_user[keep]))
        order = np.argsort(keys, kind="stable")
        return keys[order], ids[order], p_user[order]

    def _could_suggest(self, word_id: int) -> bool:
        """Tell whether an id is a suggestable word: an unblocked base word, or a new word ready to be suggested."""
        user = self.user
        if word_id < user.base_size:
            return word_id not in self._blocked_set
        return word_id >= user.first_learned_id and user.settings.learning and word_id in self._learned_keys

    # ------------------------------------------------------------ scoring
    def _base_probs(self, ids: np.ndarray, ub: int, vb: int) -> np.ndarray:
        """P_base of ids after the base context (0 for new words and START)."""
        inside = ids <= self.user.end_id
        if inside.all():
            return self.base.probabilities_of(ub, vb, ids)
        out = np.zeros(len(ids), dtype=np.float64)
        if inside.any():
            out[inside] = self.base.probabilities_of(ub, vb, ids[inside])
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
        base = self._base_probs(ids, prepared.ub, prepared.vb)
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

        Scores use the arithmetic of :meth:`distribution`, one IEEE double
        operation at a time in the same order (numpy's elementwise operations
        round as Python's do); candidates are (-probability, sort key, id,
        P_base, P_user) rows, sorted.
        """
        span, key_range = self._ranges_of(prefix)
        if key_range is None:
            return []
        mu = prepared.mu
        m = 1.0 - mu
        lo, hi = prepared.keys.searchsorted(np.array((key_range[0], key_range[1] + 1), dtype=np.int64)).tolist()
        pool = _Slice(prepared.keys[lo:hi], prepared.ids[lo:hi], prepared.p_user[lo:hi], prepared.floors[lo:hi])
        # While the context's pool is the shared one, its positions table finds list A's words without a search.
        where_item = self._pool_where.item if prepared.ids is self._pool_ids else None
        p_user_item = prepared.p_user.item
        blocked = self._blocked_set
        a_depth = k + _GUARD
        while True:
            # List A: the base model's own exact ranking of the range's base words.
            if span is not None:
                found, found_base, found_orders = self.base.top_in_range(prepared.ub, prepared.vb, span, a_depth)
            else:
                found, found_base, found_orders = _NO_IDS, _NO_PROBS, []
            a_done = len(found) < a_depth
            a_ids, a_base = found.tolist(), found_base.tolist()
            a_last = a_base[-1] if a_ids and not a_done else 0.0
            if where_item is not None:
                a_user = [p_user_item(at) if at >= 0 else 0.0 for at in map(where_item, a_ids)]
            else:
                a_user = pool.p_user_of(found).tolist()
            rows = [(-(m * pb + mu * pu), (i << _KEY_SHIFT) | _BASE_KEY_LOW, i, pb, pu) for i, pb, pu in zip(a_ids, a_base, a_user) if i not in blocked]
            rows.sort()
            # Every unread word of the range scores at most m * a_last + mu * P_user (its own P_user).
            c_ids, c_user, c_keys = pool.reaching(m * a_last, mu, -rows[k - 1][0] if len(rows) >= k else -math.inf, set(a_ids), k)
            if c_ids:
                c_base = self._base_probs(np.array(c_ids, dtype=np.int64), prepared.ub, prepared.vb).tolist()
                rows.extend((-(m * pb + mu * pu), key, i, pb, pu) for i, pb, pu, key in zip(c_ids, c_base, c_user, c_keys))
                rows.sort()
            if a_done:
                break
            if len(rows) >= k:
                kth_score = -rows[k - 1][0]
                z_bound = m * a_last + mu * 0.0
                if kth_score > z_bound:
                    break
                # Unread words outside the pool score at most the bound and, when equal, sort after A's last word.
                if kth_score == z_bound and _no_merge(m, a_last) and rows[k - 1][1] <= (a_ids[-1] << _KEY_SHIFT) | _BASE_KEY_LOW:
                    break
            a_depth *= 4
        return self._results(prepared, rows[:k], dict(zip(a_ids, found_orders)))

    def _results(self, prepared: _Context, chosen: list[tuple], base_orders: dict[int, int]) -> list[AdaptedSuggestion]:
        """Suggestions from the chosen (-probability, key, id, P_base, P_user) rows."""
        user = self.user
        mu = prepared.mu
        m = 1.0 - mu
        uctx = prepared.user
        mine = [mu * pu > m * pb for _, _, _, pb, pu in chosen]
        missing = [row[2] for row, own in zip(chosen, mine) if not own and row[2] not in base_orders and row[2] < user.base_size]
        if missing:
            base_orders = {**base_orders, **dict(zip(missing, self.base.orders_of(prepared.ub, prepared.vb, np.array(missing, dtype=np.int64))))}
        first_new = user.first_learned_id
        display = user.display
        results = []
        for (score, _, i, _, _), own in zip(chosen, mine):
            if not own and i in base_orders:
                order_of = base_orders[i]
            else:
                order_of = user.order_of(i, uctx) if uctx is not None else 1
            results.append(AdaptedSuggestion(display(i), float(-score), int(order_of), int(i), own, i >= first_new))
        return results

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
        pool_state = (seen_state, ready_state, self._ready_seen, user.settings.learning)
        if pool_state != self._pool_state:
            self._rebuild_pool()
            self._pool_state = pool_state

    def _rebuild_pool(self) -> None:
        """Every suggestable counted word (new words only while learning is on), in sort-key order."""
        seen = self._seen_ok
        keys = (seen << _KEY_SHIFT) | _BASE_KEY_LOW
        ids = seen
        if self.user.settings.learning and self._ready_ids:
            new_ids = np.array(self._ready_ids, dtype=np.int64)
            # Both parts are sorted (new words by form, and so by key): a stable sort merges the two runs.
            keys = np.concatenate((keys, self._learned_key_array[new_ids - self.user.first_learned_id]))
            ids = np.concatenate((ids, new_ids))
            order = np.argsort(keys, kind="stable")
            keys, ids = keys[order], ids[order]
        size = self.user.first_learned_id + self.user.learned_count + 1
        where = self._pool_where
        if len(where) < size:
            where = np.full(max(size, 2 * len(where)), -1, dtype=np.int64)
        else:
            where[self._pool_ids] = -1
        where[ids] = np.arange(len(ids))
        self._pool_keys, self._pool_ids, self._pool_where = keys, ids, where
        self._pool_share_key = (-1, -1)

    def _pool_unigram(self, total1: float) -> np.ndarray:
        """c(w) / N of the pool's words (kept while the counts stay the same)."""
        key = (self.user.version, id(self._pool_ids))
        if key != self._pool_share_key:
            self._pool_share = self.user.unigram_weights(self._pool_ids) / total1
            self._pool_share_key = key
        return self._pool_share

    def _rebuild_ready(self) -> None:
        """The suggestable new words (sorted by form, never-list applied) and their sort keys."""
        user = self.user
        self._prefixes.clear()
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
        self._prefixes.clear()
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

    def _ranges_of(self, prefix: str) -> tuple[PrefixRange | None, tuple[int, int] | None]:
        """The base id range and the sort-key range of a typed prefix (kept until the suggestable new words change)."""
        found = self._prefixes.get(prefix)
        if found is None:
            form = model_form(prefix)
            span = self.base.vocab.prefix_range(form)
            found = (span, self._key_range(form, span))
            if len(self._prefixes) >= _PREFIX_MEMO:
                self._prefixes.clear()
            self._prefixes[prefix] = found
        return found

    def _key_range(self, form: str, span: PrefixRange | None) -> tuple[int, int] | None:
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

    def _unblocked(self, ids: np.ndarray) -> np.ndarray:
        """``ids`` without the base words the never-suggest list blocks."""
        blocked = self._blocked_base
        if not len(blocked) or not len(ids):
            return ids
        return ids[~_member(blocked, ids)]


class _Slice:
    """A prefix's part of a context's pool: sort keys, ids and user probabilities of the counted words."""

    __slots__ = ("keys", "ids", "p_user", "floors")

    def __init__(self, keys: np.ndarray, ids: np.ndarray, p_user: np.ndarray, floors: np.ndarray) -> None:
        self.keys, self.ids, self.p_user, self.floors = keys, ids, p_user, floors

    def p_user_of(self, ids: np.ndarray) -> np.ndarray:
        """P_user of base word ids (0 for a word outside the slice: never counted)."""
        if not len(self.keys) or not len(ids):
            return np.zeros(len(ids), dtype=np.float64)
        keys = (ids << _KEY_SHIFT) | _BASE_KEY_LOW
        at = self.keys.searchsorted(keys)
        np.minimum(at, len(self.keys) - 1, out=at)
        return np.where(self.keys[at] == keys, self.p_user[at], 0.0)

    def reaching(self, edge: float, mu: float, threshold: float, listed: set[int], k: int) -> tuple[list[int], list[float], list[int]]:
        """The slice's words outside list A that could be among the k best.

        Such a word scores ``m * P_base + mu * P_user`` with ``m * P_base`` at
        most ``edge``, so its score is at most ``edge + mu * P_user`` and at
        least ``mu * P_user``.  The threshold L starts as the k-th best of A's
        exact scores and, when many words reach it, is raised to the k-th best
        floor ``mu * P_user`` of the slice's words outside A: each is a lower
        bound of a different word's score, so L never exceeds the final k-th
        score, and a word whose bound is below L cannot enter the top k.

        Args:
            edge: ``m * P_base`` of A's last word (0 when A holds every base word of the range).
            mu: the user model's share.
            threshold: the k-th best score of A (minus infinity with fewer than k).
            listed: the ids of A.
            k: how many suggestions.

        Returns:
            ``(ids, p_user, keys)`` of the words whose bound reaches L, as lists.
        """
        if not len(self.keys):
            return [], [], []
        if len(self.keys) <= _SMALL_SLICE:
            # The same bound, one Python float at a time: cheaper than numpy calls on a few words.
            reach = [
                (i, pu, key)
                for i, pu, floor, key in zip(self.ids.tolist(), self.p_user.tolist(), self.floors.tolist(), self.keys.tolist())
                if floor + edge >= threshold and i not in listed
            ]
            return [r[0] for r in reach], [r[1] for r in reach], [r[2] for r in reach]
        bound = self.floors + edge  # edge + mu * P_user: addition commutes exactly
        at = (bound >= threshold).nonzero()[0]
        if len(at) > _FEW_REACHING + len(listed):
            floors = self.floors
            best = np.argpartition(floors, len(floors) - k - len(listed))[len(floors) - k - len(listed) :] if len(floors) > k + len(listed) else np.arange(len(floors))
            outside = sorted((-f for f, i in zip(floors[best].tolist(), self.ids[best].tolist()) if i not in listed))
            if len(outside) >= k:
                threshold = max(threshold, -outside[k - 1])
                at = (bound >= threshold).nonzero()[0]
        ids = self.ids[at].tolist()
        if not listed.isdisjoint(ids):
            keep = [j for j, i in enumerate(ids) if i not in listed]
            at = at[keep]
            ids = self.ids[at].tolist()
        return ids, self.p_user[at].tolist(), self.keys[at].tolist()


def _member(sorted_ids: np.ndarray, ids: np.ndarray) -> np.ndarray:
    """Mask of ``ids`` found in the sorted array ``sorted_ids``."""
    if not len(sorted_ids):
        return np.zeros(len(ids), dtype=bool)
    pos = sorted_ids.searchsorted(ids)
    np.minimum(pos, len(sorted_ids) - 1, out=pos)
    return sorted_ids[pos] == ids


def _no_merge(m: float, value: float) -> bool:
    """Tell whether no smaller non-negative number times m rounds to m * value."""
    if value <= 0.0:
        return True
    return m * value > m * math.nextafter(value, 0.0)


__all__ = ["AdaptedModel", "AdaptedSuggestion", "LearnedWord"]
