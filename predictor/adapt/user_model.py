"""The user model: unigram, bigram and trigram counts learned from a person's own text.

Every learned token updates one count at each order (the word after its two
predecessors, after its predecessor, and alone), with sentences padded as in
the base model: two START symbols before the first word and an END after the
last.  The counts give an interpolated Witten-Bell trigram model (Witten & Bell
1991; as restated by Chen & Goodman 1998, TR-10-98)::

    P_user(w | u v) = (1 - g(uv)) * c(uvw) / c(uv.) + g(uv) * P_user(w | v)
    P_user(w | v)   = (1 - g(v))  * c(vw)  / c(v.)  + g(v)  * P_user(w)
    P_user(w)       = c(w) / N
    g(h) = T(h) / (T(h) + c(h.))      T(h) = distinct words seen after h

A context never seen passes its whole weight to the order below (g = 1).

**Decay.** With a half-life H (in learned tokens) every count is multiplied by
2^(-1/H) per learned token, so old habits fade as in an exponentially decaying
cache (Kuhn & De Mori 1990 use a window of recent words; exponential decay is
the common smooth variant).  Counts are stored inflated by the running factor
s = 2^(t/H): adding s instead of 1 at tick t and reading c / s later gives the
decayed count, so an update stays O(1); when s grows past 2^200 every stored
count is divided by s once.  Ratios such as c(uvw) / c(uv.) need no correction;
only the evidence counts in g(h) and the share mu are divided by s.

**Share.** How much the combined model trusts these counts is learned from
the person's text too (see :class:`~foretype.adapt.settings.AdaptSettings`):
before each token is counted, the share of its probability the user model
would have supplied at the current worth estimate (the EM responsibility of
Jelinek & Mercer's interpolation-weight estimation) is added to R_b, and the
token to n_b, for the context's evidence bucket b (2: the user has written the
two-word context before, 1: only the last word, 0: neither).  The
responsibilities are passed in by the caller (the combined model computes them
from both models) and stored with each change, so replaying a learned file
needs no base model.

**Ids.** A user model is bound to a base vocabulary of V words: a word the
base knows keeps its base id, END is V + 1, START V + 2, and every word the
base lacks gets V + 3 + j in the order it was first typed.  The counts are
stored by word (never by id), so a learned file survives a rebuilt base model.
"""

from __future__ import annotations

import math
import time
from bisect import bisect_left
from collections.abc import Callable, Iterator, Sequence
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.vocabulary import END, START, UNKNOWN, Vocabulary
from ..text import WORD_RE, model_form
from . import user_snapshot
from .followers import Followers
from .listings import NgramRow, WordRow
from .settings import AdaptSettings
from .share_rule import user_share
from .slips import looks_like_slip
from .witten_bell import EMPTY_IDS, EMPTY_WEIGHTS, UserContext, interpolate, level

_RESCALE_AT = 2.0**200
"""When the inflation factor passes this, every stored count is divided by it."""


def _credit_reader(
    words: Sequence[str], end: bool, credit: Sequence[float] | Callable[[int, int, int], float] | None
) -> tuple[Callable[[int, int, int], float | None], list[float]]:
    """Check the words and credits of a :meth:`UserModel.learn` call; returns the per-token reader and its log.

    Raises:
        OptionError: an entry of ``words`` is not a single word, or the credits do not match the tokens.
    """
    for word in words:
        if not isinstance(word, str) or WORD_RE.fullmatch(word) is None:
            raise OptionError(f"cannot learn {word!r}: not a single word")
    tokens = len(words) + (1 if end else 0)
    given = None if credit is None or callable(credit) else [float(r) for r in credit]
    if given is not None and (len(given) != tokens or not all(0.0 <= r <= 1.0 for r in given)):
        raise OptionError(f"expected {tokens} responsibilities between 0 and 1, got {given}")
    used: list[float] = []

    def credit_for(u: int, v: int, w: int) -> float | None:
        if credit is None:
            return None
        r = given[len(used)] if given is not None else float(credit(u, v, w))  # type: ignore[operator]
        used.append(r)
        return r

    return credit_for, used


class UserModel:
    """Counts learned from a person's text, bound to a base vocabulary (or none)."""

    def __init__(self, vocab: Vocabulary | None = None, settings: AdaptSettings | None = None) -> None:
        """Start an empty user model.

        Args:
            vocab: the base model's vocabulary (None: every word counts as new).
            settings: learning settings (default :class:`AdaptSettings`).
        """
        self.vocab = vocab
        self.settings = settings or AdaptSettings()
        size = vocab.size if vocab is not None else 0
        self.base_size = size
        """V: how many words the base vocabulary has."""
        self.unknown_id = size
        self.end_id = size + 1
        self.start_id = size + 2
        self.first_learned_id = size + 3
        """The id of the first word the base vocabulary lacks."""
        self._forms: list[str] = []
        self._learned: dict[str, int] = {}
        self._votes: dict[int, dict[str, int]] = {}
        self._shown: dict[int, str] = {}
        """Display forms of learned words already worked out from their votes (dropped when the votes change)."""
        capacity = size + 3 + 64
        self._w1 = np.zeros(capacity, dtype=np.float64)
        self._n1 = np.zeros(capacity, dtype=np.int64)
        self._seen1 = np.zeros(capacity, dtype=np.int64)
        self._total = 0.0
        self._credit = np.zeros(3, dtype=np.float64)
        self._evidence = np.zeros(3, dtype=np.float64)
        self._ctx2: dict[int, Followers] = {}
        self._ctx3: dict[tuple[int, int], Followers] = {}
        self.tick = 0
        """Tokens learned so far (the decay clock)."""
        self._scale = 1.0
        self._seen_base = np.zeros(0, dtype=np.int64)
        self._ready_forms: list[str] = []
        self._ready_ids: list[int] = []
        self.version = 0
        """Grows with every change (learning, pruning, forgetting, settings)."""
        self.seen_version = 0
        """Grows when a base word is counted for the first time (or counts are dropped)."""
        self.ready_version = 0
        """Grows when the set of suggestable new words changes."""
        self.ready_epoch = 0
        """Grows when that set is rebuilt as a whole (not just added to)."""
        self._ready_log: list[int] = []
        self._held: set[int] = set()
        """New words that looked like a slip on a known word at their first use (see :meth:`uses_needed`)."""

    # ------------------------------------------------------------------ ids
    @property
    def learned_count(self) -> int:
        """How many words the base vocabulary lacks have been typed (with counts or not)."""
        return len(self._forms)

    def id_of(self, word: str) -> int | None:
        """The id of a written word: its base id, its learned id, or None if neither knows it."""
        if word in (START, END):
            return self.start_id
        if word == UNKNOWN:
            return self.unknown_id
        form = model_form(word)
        if self.vocab is not None:
            found = self.vocab.id(form)
            if found is not None:
                return found
        return self._learned.get(form)

    def _id_for(self, form: str) -> int:
        if self.vocab is not None:
            found = self.vocab.id(form)
            if found is not None:
                return found
        found = self._learned.get(form)
        if found is None:
            found = self.first_learned_id + len(self._forms)
            self._forms.append(form)
            self._learned[form] = found
            self._grow(found + 1)
        return found

    def _grow(self, needed: int) -> None:
        if needed <= len(self._w1):
            return
        capacity = max(needed, 2 * len(self._w1))
        for name in ("_w1", "_n1", "_seen1"):
            old = getattr(self, name)
            new = np.zeros(capacity, dtype=old.dtype)
            new[: len(old)] = old
            setattr(self, name, new)

    def is_learned(self, word_id: int) -> bool:
        """Tell whether an id belongs to a word the base vocabulary lacks."""
        return word_id >= self.first_learned_id

    def form(self, word_id: int) -> str:
        """The model form of an id (base or learned; special ids give their symbols)."""
        if word_id >= self.first_learned_id:
            return self._forms[word_id - self.first_learned_id]
        if word_id >= self.base_size:
            return (UNKNOWN, END, START)[word_id - self.base_size]
        assert self.vocab is not None
        return self.vocab.word(word_id)

    def display(self, word_id: int) -> str:
        """How an id is shown: the base display form, or the learned word's most used written form."""
        if word_id < self.first_learned_id:
            return self.vocab.display(word_id) if self.vocab is not None and word_id < self.base_size else self.form(word_id)
        shown = self._shown.get(word_id)
        if shown is not None:
            return shown
        votes = self._votes.get(word_id)
        if not votes:
            return self.form(word_id)
        shown = self._shown[word_id] = max(votes.items(), key=lambda item: item[1])[0]
        return shown

    def shown_forms(self) -> dict[int, str]:
        """The display forms of learned words :meth:`display` has worked out and that still hold, by id; do not modify."""
        return self._shown

    # ------------------------------------------------------------- learning
    def learn(
        self,
        words: Sequence[str],
        *,
        after: Sequence[str] = (),
        end: bool = False,
        when: int | None = None,
        credit: Sequence[float] | Callable[[int, int, int], float] | None = None,
    ) -> list[float]:
        """Count words the person accepted or typed.

        Args:
            words: written words, in order (each one word as the tokenizer
                defines it); they continue the sentence after ``after``.
            after: the preceding words of the same sentence, as written (only
                the last two matter; empty at a sentence start).  Words the
                model does not know yet count as UNKNOWN there.
            end: the sentence ends after ``words`` (counts END).
            when: Unix time in seconds to record as last seen (default now).
            credit: the responsibility of the user model for each token (words,
                then END), either as numbers in [0, 1] or as a function of
                (u, v, w) ids called just before that token is counted; None
                leaves the share estimate untouched.

        Returns:
            The responsibilities used, one per token counted (empty when ``credit`` is None).

        Raises:
            OptionError: an entry of ``words`` is not a single word, or the
                credits do not match the tokens.
        """
        credit_for, used = _credit_reader(words, end, credit)
        stamp = int(time.time()) if when is None else int(when)
        u, v = self._start_context(after)
        sentence_start = v == self.start_id
        for word in words:
            form = model_form(word)
            word_id = self._id_for(form)
            if word_id >= self.first_learned_id:
                votes = self._votes.setdefault(word_id, {})
                self._shown.pop(word_id, None)
                # A capital at a sentence start says little about how the word is written elsewhere.
                votes[word] = votes.get(word, 0) + (1 if sentence_start else 2)
            self._count(u, v, word_id, stamp, credit_for(u, v, word_id))
            u, v = v, word_id
            sentence_start = False
        if end:
            self._count(u, v, self.end_id, stamp, credit_for(u, v, self.end_id))
        return used

    def _start_context(self, after: Sequence[str]) -> tuple[int, int]:
        """The ids of the last two words of ``after`` (START padding; only START before a sentence start)."""
        context = [self._context_id(w) for w in list(after)[-2:]]
        while len(context) < 2:
            context.insert(0, self.start_id)
        u, v = context
        if v == self.start_id:
            u = self.start_id
        return u, v

    def _context_id(self, word: str) -> int:
        found = self.id_of(word)
        return self.unknown_id if found is None else found

    def _count(self, u: int, v: int, w: int, when: int, credit: float | None) -> None:
        if credit is not None:
            # The bucket before this token is counted: the one its prediction used.
            bucket = self.bucket(u, v)
        self.tick += 1
        if self.settings.half_life is not None:
            self._scale *= 2.0 ** (1.0 / self.settings.half_life)
        amount = self._scale
        if credit is not None:
            self._evidence[bucket] += amount
            self._credit[bucket] += amount * credit
        first_use = self._n1[w] == 0
        self._w1[w] += amount
        self._n1[w] += 1
        self._seen1[w] = when
        self._total += amount
        self._follow(u, v, w, amount, when)
        self.version += 1
        self._note_use(w, first_use)
        if self._scale > _RESCALE_AT:
            self._rescale()

    def _follow(self, u: int, v: int, w: int, amount: float, when: int) -> None:
        """Count w after v and after (u, v)."""
        followers = self._ctx2.get(v)
        if followers is None:
            followers = self._ctx2[v] = Followers()
        followers.add(w, amount, when)
        followers = self._ctx3.get((u, v))
        if followers is None:
            followers = self._ctx3[(u, v)] = Followers()
        followers.add(w, amount, when)

    def _note_use(self, w: int, first_use: bool) -> None:
        """A base word's first use joins the seen list; a new word may be held as a slip or become suggestable."""
        if w < self.base_size and first_use:
            self._seen_base = np.insert(self._seen_base, np.searchsorted(self._seen_base, w), w)
            self.seen_version += 1
        elif w >= self.first_learned_id:
            if first_use and self.settings.hold_slips and looks_like_slip(self._forms[w - self.first_learned_id], self._is_known):
                self._held.add(w)
            if self._n1[w] == self.uses_needed(w):
                self._mark_ready(w)

    def _mark_ready(self, word_id: int) -> None:
        form = self._forms[word_id - self.first_learned_id]
        at = bisect_left(self._ready_forms, form)
        if at < len(self._ready_forms) and self._ready_forms[at] == form:
            return
        self._ready_forms.insert(at, form)
        self._ready_ids.insert(at, word_id)
        self._ready_log.append(word_id)
        self.ready_version += 1

    def _rescale(self) -> None:
        factor = 1.0 / self._scale
        self._w1 *= factor
        self._total *= factor
        self._credit *= factor
        self._evidence *= factor
        for followers in self._ctx2.values():
            followers.scale(factor)
        for followers in self._ctx3.values():
            followers.scale(factor)
        self._scale = 1.0

    # -------------------------------------------------------------- queries
    @property
    def tokens(self) -> float:
        """The user's decayed token count n (the raw count when there is no decay)."""
        return self._total / self._scale

    @property
    def raw_tokens(self) -> int:
        """Every token counted and still held (words and sentence ends), without decay."""
        return int(self._n1.sum())

    def bucket(self, u: int, v: int) -> int:
        """The evidence bucket of a context: 2 if (u, v) was seen, 1 if only v was, else 0."""
        if v != self.unknown_id:
            three = self._ctx3.get((u, v))
            if three is not None and three.total > 0:
                return 2
        two = self._ctx2.get(v)
        return 1 if two is not None and two.total > 0 else 0

    def worth(self, bucket: int) -> float:
        """The estimated worth of the user model in a bucket: (R_b + prior_worth * beta) / (n_b + beta)."""
        beta = self.settings.prior_tokens
        return (self._credit[bucket] / self._scale + self.settings.prior_worth * beta) / (self._evidence[bucket] / self._scale + beta)

    def evidence(self, bucket: int) -> float:
        """n_b: the (decayed) tokens learned in a bucket."""
        return float(self._evidence[bucket] / self._scale)

    def share(self, context: UserContext) -> float:
        """mu for a context (:func:`foretype.adapt.share_rule.user_share`); 0 while learning is off or nothing is counted."""
        if not self.settings.learning or self._total <= 0:
            return 0.0
        bucket = context.bucket
        n = self._evidence[bucket] / self._scale
        settings = self.settings
        return float(user_share(settings.share_rule, float(self.worth(bucket)), float(n), settings.prior_tokens, context.base_knows))

    def shares(self) -> dict[str, float]:
        """mu per evidence bucket, where the base model knows the context (for reports)."""
        out: dict[str, float] = {}
        settings = self.settings
        for bucket, name in enumerate(("neither", "last_word", "both_words")):
            n = self.evidence(bucket)
            out[name] = user_share(settings.share_rule, float(self.worth(bucket)), n, settings.prior_tokens, True) if settings.learning and n > 0 else 0.0
        return out

    def _followers_of(self, table: Followers | None) -> tuple[Followers | None, np.ndarray, np.ndarray, float, float]:
        """(table or None, ids, weights, total, lower-order weight) of one context's followers."""
        if table is None or table.total <= 0:
            return None, EMPTY_IDS, EMPTY_WEIGHTS, 0.0, 1.0
        ids, weights = table.view()
        total = table.total
        return table, ids, weights, total, len(table) / (len(table) + total / self._scale)

    def context(self, u: int, v: int) -> UserContext:
        """Gather the counts after (u, v) for scoring."""
        three, ids3, weights3, total3, gamma3 = self._followers_of(self._ctx3.get((u, v)) if v != self.unknown_id else None)
        two, ids2, weights2, total2, gamma2 = self._followers_of(self._ctx2.get(v))
        bucket = 2 if total3 > 0 else 1 if total2 > 0 else 0
        base_knows = not (u == self.unknown_id or v == self.unknown_id or u >= self.first_learned_id or v >= self.first_learned_id)
        return UserContext(ids3, weights3, total3, gamma3, ids2, weights2, total2, gamma2, self._total, bucket, three, two, base_knows)

    def components(self, ids: np.ndarray, context: UserContext) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The three relative frequencies of outcome ids after a context.

        Args:
            ids: int64 array of shape (n,).
            context: from :meth:`context`.

        Returns:
            float64 arrays of shape (n,): c(w) / N, c(v w) / c(v .), c(u v w) / c(u v .)
            (0 where unseen).
        """
        ids = np.asarray(ids, dtype=np.int64)
        p1 = np.zeros(len(ids), dtype=np.float64)
        if context.total1 > 0:
            inside = ids < len(self._w1)
            p1[inside] = self._w1[ids[inside]] / context.total1
        f2 = level(context.ids2, context.weights2, context.total2, ids)
        f3 = level(context.ids3, context.weights3, context.total3, ids)
        return p1, f2, f3

    def probabilities(self, ids: np.ndarray, context: UserContext) -> np.ndarray:
        """P_user(w | u v) for outcome ids (words, END; 0 for UNKNOWN, START and unseen words).

        Args:
            ids: int64 array of shape (n,).
            context: from :meth:`context`.

        Returns:
            float64 array of shape (n,).
        """
        p1, f2, f3 = self.components(ids, context)
        return interpolate(p1, f2, f3, context)

    def followers(self, context: UserContext) -> tuple[np.ndarray, np.ndarray]:
        """Every outcome seen after (u, v) or after v, with its P_user (what :meth:`probabilities` gives).

        Each counted trigram also counts its bigram, so the words after (u, v)
        are normally among those after v, and their probabilities are computed
        over that one sorted list; a table where they are not (a damaged or
        merged file) takes the general path.

        Args:
            context: from :meth:`context`.

        Returns:
            ``(ids, probs)``: int64 ids sorted ascending and their float64 P_user, both of shape (n,).
        """
        ids2, ids3 = context.ids2, context.ids3
        if not len(ids2) or context.total1 <= 0:
            ids = np.union1d(ids2, ids3)
            return ids, (self.probabilities(ids, context) if len(ids) else EMPTY_WEIGHTS)
        pos = None
        if len(ids3):
            pos = ids2.searchsorted(ids3)
            if not (ids2.take(pos, mode="clip") == ids3).all():
                ids = np.union1d(ids2, ids3)
                return ids, self.probabilities(ids, context)
        # The operations of interpolate(): where f3 = 0, (1 - g3) * 0.0 + g3 * p2 is g3 * p2 exactly.
        g2, g3 = context.gamma2, context.gamma3
        p2 = (1.0 - g2) * (context.weights2 / context.total2) + g2 * (self._w1[ids2] / context.total1)
        p3 = g3 * p2
        if pos is not None:
            p3[pos] = (1.0 - g3) * (context.weights3 / context.total3) + p3[pos]
        return ids2, p3

    def order_of(self, word_id: int, context: UserContext) -> int:
        """Which order of the user model supplied most of a word's user probability (3, 2 or 1)."""
        f = [0.0, 0.0]
        for i, table in enumerate((context.three, context.two)):
            if table is not None:
                at = table.slot.get(word_id)
                if at is not None:
                    f[i] = table.weights[at] / table.total
        p1 = float(self._w1[word_id]) / context.total1 if context.total1 > 0 and word_id < len(self._w1) else 0.0
        share3 = (1.0 - context.gamma3) * f[0]
        share2 = context.gamma3 * (1.0 - context.gamma2) * f[1]
        share1 = context.gamma3 * context.gamma2 * p1
        return 3 if share3 >= share2 and share3 >= share1 else 2 if share2 >= share1 else 1

    def unigram_weight_array(self) -> np.ndarray:
        """The inflated unigram count of every id, indexed by id (its length may exceed the ids in use); do not modify."""
        return self._w1

    def unigram_weights(self, ids: np.ndarray) -> np.ndarray:
        """The inflated unigram counts of ids (float64 array of the same shape)."""
        return self._w1[np.asarray(ids, dtype=np.int64)]

    def uses(self, word_id: int) -> int:
        """How many times a word was counted (raw, without decay)."""
        return int(self._n1[word_id]) if word_id < len(self._n1) else 0

    def holds(self, word: str) -> bool:
        """Tell whether any count involves a written word (as a word or as context)."""
        word_id = self.id_of(word)
        if word_id is None or word_id in (self.start_id, self.unknown_id):
            return False
        if self.uses(word_id) > 0 or word_id in self._ctx2:
            return True
        return any(word_id in followers.slot for followers in self._ctx2.values())

    def seen_base_ids(self) -> np.ndarray:
        """Base word ids counted at least once (int64, sorted); do not modify."""
        return self._seen_base

    def ready_learned(self, prefix: str = "") -> list[int]:
        """Ids of new words used at least ``min_uses`` times whose model form starts with ``prefix``, by form."""
        forms = self._ready_forms
        lo = bisect_left(forms, prefix)
        hi = bisect_left(forms, prefix + "\U0010ffff") if prefix else len(forms)
        return self._ready_ids[lo:hi]

    def ready_since(self, count: int) -> list[int]:
        """New words that became suggestable after the first ``count`` of this epoch, in order."""
        return self._ready_log[count:]

    def ready_forms(self) -> list[str]:
        """Model forms of every suggestable new word, sorted."""
        return list(self._ready_forms)

    def is_ready(self, word_id: int) -> bool:
        """Tell whether a new word has been used often enough to be suggested."""
        return word_id >= self.first_learned_id and self.uses(word_id) >= self.uses_needed(word_id)

    def uses_needed(self, word_id: int) -> int:
        """Uses before a new word is suggested: ``min_uses``, and at least 2 for a word held as a possible slip.

        With ``hold_slips`` on, a new word that at its first use lay one edit
        from a word the person has used (a base word typed before, or a new
        word typed twice) may be a typo
        of it (:mod:`foretype.adapt.slips`), so it waits for a second use.
        """
        if word_id in self._held:
            return max(2, self.settings.min_uses)
        return self.settings.min_uses

    def _is_known(self, form: str) -> bool:
        """A word the person has shown they use: a base word typed before, or a new word typed twice."""
        if self.vocab is not None:
            base_id = self.vocab.id(form)
            if base_id is not None:
                return bool(self._n1[base_id] > 0)
        word_id = self._learned.get(form)
        return word_id is not None and self._n1[word_id] >= 2

    # ----------------------------------------------------------- management
    def set_settings(self, settings: AdaptSettings) -> None:
        """Change the settings (a new min_uses re-decides which new words are suggestable)."""
        old = self.settings
        self.settings = settings
        if settings.half_life != old.half_life:
            self._rescale()
        if settings.min_uses != old.min_uses or settings.hold_slips != old.hold_slips:
            self._rebuild_ready()
        self.version += 1

    def _rebuild_ready(self) -> None:
        self._held = set()
        if self.settings.hold_slips:
            # Which once-used words were held is not stored: judge them again
            # against what the person has used by now.
            first = self.first_learned_id
            self._held = {first + j for j, form in enumerate(self._forms) if self._n1[first + j] == 1 and looks_like_slip(form, self._is_known)}
        pairs = sorted(
            (form, self.first_learned_id + j) for j, form in enumerate(self._forms) if self._n1[self.first_learned_id + j] >= self.uses_needed(self.first_learned_id + j)
        )
        self._ready_forms = [form for form, _ in pairs]
        self._ready_ids = [word_id for _, word_id in pairs]
        used = np.flatnonzero(self._n1[: self.base_size] > 0)
        self._seen_base = used.astype(np.int64)
        self._ready_log = []
        self.seen_version += 1
        self.ready_version += 1
        self.ready_epoch += 1

    def forget(self, word: str) -> bool:
        """Remove every count that involves a word; returns False if nothing was counted.

        The word can be learned again later (unless it is on the never-suggest list).
        """
        word_id = self.id_of(word)
        if word_id is None or word_id in (self.start_id, self.unknown_id):
            return False
        touched = self._n1[word_id] > 0 if word_id < len(self._n1) else False
        for pair in [pair for pair in self._ctx3 if word_id in pair]:
            del self._ctx3[pair]
            touched = True
        self._ctx2.pop(word_id, None)
        for table in self._follower_tables():
            for key, followers in list(table.items()):
                if word_id in followers.slot:
                    followers.keep([i != word_id for i in followers.ids])
                    touched = True
                    if not len(followers):
                        del table[key]
        if word_id < len(self._w1):
            self._total -= self._w1[word_id]
            self._w1[word_id] = 0.0
            self._n1[word_id] = 0
            self._seen1[word_id] = 0
        self._votes.pop(word_id, None)
        self._shown.pop(word_id, None)
        self._total = max(self._total, 0.0)
        self._rebuild_ready()
        self.version += 1
        return bool(touched)

    def _follower_tables(self) -> tuple[dict[Any, Followers], ...]:
        """The bigram and trigram follower tables (keyed by v and by (u, v))."""
        return (self._ctx2, self._ctx3)

    def prune(self, *, below: float | None = None, seen_before: int | None = None) -> int:
        """Drop counts smaller than ``below`` (after decay) or last seen before a Unix time.

        Returns:
            How many counts (of every order) were dropped.
        """
        if below is None and seen_before is None:
            return 0
        threshold = -1.0 if below is None else below * self._scale
        cutoff = -1 if seen_before is None else seen_before
        dropped = 0
        for table in self._follower_tables():
            for key, followers in list(table.items()):
                mask = [w >= threshold and s >= cutoff for w, s in zip(followers.weights, followers.seen)]
                if not all(mask):
                    dropped += len(mask) - sum(mask)
                    followers.keep(mask)
                    if not len(followers):
                        del table[key]
        used = self._n1 > 0
        gone = used & ((self._w1 < threshold) | (self._seen1 < cutoff))
        dropped += int(gone.sum())
        self._w1[gone] = 0.0
        self._n1[gone] = 0
        self._seen1[gone] = 0
        for word_id in np.flatnonzero(gone):
            self._votes.pop(int(word_id), None)
            self._shown.pop(int(word_id), None)
        self._total = math.fsum(self._w1)
        if dropped:
            self._rebuild_ready()
            self.version += 1
        return dropped

    # ------------------------------------------------------------- listings
    def word_rows(self) -> Iterator[WordRow]:
        """Every counted word (symbols excluded), in id order."""
        for word_id in np.flatnonzero(self._n1 > 0):
            i = int(word_id)
            if self.base_size <= i < self.first_learned_id:
                continue
            yield WordRow(i, self.form(i), float(self._w1[i] / self._scale), int(self._n1[i]), int(self._seen1[i]))

    def ngram_rows(self, order: int) -> Iterator[NgramRow]:
        """Every bigram (order 2) or trigram (order 3) counted."""
        if order not in (2, 3):
            raise OptionError(f"order must be 2 or 3, not {order}")
        table: dict[Any, Followers] = self._ctx2 if order == 2 else self._ctx3  # type: ignore[assignment]
        scale = self._scale
        for key, followers in table.items():
            head = (key,) if order == 2 else key
            for word_id, weight, uses, seen in zip(followers.ids, followers.weights, followers.uses, followers.seen):
                yield NgramRow((*head, word_id), weight / scale, uses, seen)

    def counts_summary(self) -> dict[str, int]:
        """How many distinct unigrams, bigrams and trigrams are held."""
        return {
            "1": int(np.count_nonzero(self._n1)),
            "2": sum(len(f) for f in self._ctx2.values()),
            "3": sum(len(f) for f in self._ctx3.values()),
        }

    def display_votes(self) -> dict[str, dict[str, int]]:
        """Written forms of new words and their votes, by model form."""
        return {self.form(word_id): dict(votes) for word_id, votes in self._votes.items()}

    # ------------------------------------------------------------- snapshot
    def snapshot(self) -> dict[str, Any]:
        """The whole state as plain data (see :func:`foretype.adapt.user_snapshot.snapshot`)."""
        return user_snapshot.snapshot(self)

    def restore(self, state: dict[str, Any]) -> None:
        """Replace the counts with a :meth:`snapshot` (see :func:`foretype.adapt.user_snapshot.restore`).

        Raises:
            ValueError: the state is inconsistent (index out of range, columns of unequal length).
        """
        user_snapshot.restore(self, state)


__all__ = ["UserModel", "UserContext", "Followers", "interpolate"]
