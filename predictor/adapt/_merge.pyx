# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""The combined model's exact top-k walk, compiled: list A from the base core, the pool's slice, the k best.

:func:`foretype.adapt.top_k.exact_top` and ``AdaptedModel._results`` are the
reference: this module walks the same list A (the base core's own exact
ranking, read k + GUARD deep and four times deeper while the k-th score is not
final), bounds the pool's words with the same operations, scores every
candidate as ``(1 - mu) * P_base + mu * P_user`` one IEEE double operation at a
time in the same order (the extension is compiled without fused multiply-add),
and orders candidates by score descending, then sort key: the answer is the
same list of suggestions, field for field.

The pool's user probabilities are not stored per context: a word the context
has not seen has ``P_user = g3 * (g2 * c(w) / N)`` (the unigram share is kept
once per snapshot), computed as the word is read, and the context's followers
(the words seen after it, tens to hundreds) are kept by pool position.  So
preparing a context costs its followers, not the pool.

Memory safety: every pool index read lies in the slice found by binary search
inside the pool's arrays, and a learned id indexes the table of learned sort
keys only after a bounds check.
"""

from cpython.object cimport PyObject, PyTypeObject
from libc.math cimport INFINITY, nextafter
from libc.stdint cimport int64_t, uint64_t
from libc.stdlib cimport calloc, free, malloc, qsort, realloc

import numpy as np

_MISSING = object()

cdef enum:
    KEY_SHIFT = 21
    FEW_REACHING = 32
    BLOCK_SHIFT = 5  # the pool's values are bounded per block of 32 words

cdef int64_t BASE_KEY_LOW = (1 << KEY_SHIFT) - 1


cdef struct Cand:
    double score
    int64_t key
    int64_t id
    double pb
    double pu
    int64_t a_at  # position in list A (its order is A's), -1 for a pool word outside A
    int64_t order  # the base order of a pool word outside A (0 past END)


cdef int by_score(const void* x, const void* y) noexcept nogil:
    """Score descending, then sort key ascending (keys are unique: one word each)."""
    cdef const Cand* a = <const Cand*>x
    cdef const Cand* b = <const Cand*>y
    if a.score > b.score:
        return -1
    if a.score < b.score:
        return 1
    if a.key < b.key:
        return -1
    if a.key > b.key:
        return 1
    return 0


cdef int by_id(const void* x, const void* y) noexcept nogil:
    cdef int64_t a = (<const int64_t*>x)[0]
    cdef int64_t b = (<const int64_t*>y)[0]
    return -1 if a < b else (1 if a > b else 0)


cdef inline int64_t lower_bound(const int64_t[::1] a, int64_t lo, int64_t hi, int64_t x) noexcept nogil:
    """First position in [lo, hi) whose value is not below x (hi if none)."""
    cdef int64_t mid
    while lo < hi:
        mid = lo + (hi - lo) // 2
        if a[mid] < x:
            lo = mid + 1
        else:
            hi = mid
    return lo


cdef inline bint sorted_has(const int64_t* a, int64_t n, int64_t x) noexcept nogil:
    cdef int64_t lo = 0, hi = n, mid
    while lo < hi:
        mid = lo + (hi - lo) // 2
        if a[mid] < x:
            lo = mid + 1
        else:
            hi = mid
    return lo < n and a[lo] == x


cdef inline bint no_merge(double m, double value) noexcept nogil:
    """No smaller non-negative number times m rounds to m * value (as ``combination.no_merge``)."""
    if value <= 0.0:
        return True
    return m * value > m * nextafter(value, 0.0)


cdef double kth_largest(const double* values, int64_t n, int64_t k, double* heap) noexcept nogil:
    """The k-th largest of n values (n >= k >= 1), with a min-heap of k slots."""
    cdef int64_t i, size = 0, at, child
    cdef double x, tmp
    for i in range(n):
        x = values[i]
        if size < k:
            at = size
            size += 1
            heap[at] = x
            while at > 0 and heap[(at - 1) // 2] > heap[at]:
                tmp = heap[at]
                heap[at] = heap[(at - 1) // 2]
                heap[(at - 1) // 2] = tmp
                at = (at - 1) // 2
        elif x > heap[0]:
            heap[0] = x
            at = 0
            while True:
                child = 2 * at + 1
                if child >= k:
                    break
                if child + 1 < k and heap[child + 1] < heap[child]:
                    child += 1
                if heap[child] >= heap[at]:
                    break
                tmp = heap[at]
                heap[at] = heap[child]
                heap[child] = tmp
                at = child
    return heap[0]


cdef class Buffers:
    """Scratch space of one walk (freed when the walk ends)."""

    cdef Cand* rows
    cdef int64_t cap
    cdef int64_t* listed
    cdef int64_t listed_cap
    cdef double* floors
    cdef double* heap
    cdef int64_t floors_cap

    def __cinit__(self):
        self.rows = NULL
        self.listed = NULL
        self.floors = NULL
        self.heap = NULL
        self.cap = self.listed_cap = self.floors_cap = 0

    def __dealloc__(self):
        free(self.rows)
        free(self.listed)
        free(self.floors)
        free(self.heap)

    cdef int reserve(self, int64_t rows, int64_t listed, int64_t floors) except -1:
        cdef void* p
        if rows > self.cap:
            p = realloc(self.rows, rows * sizeof(Cand))
            if p == NULL:
                raise MemoryError()
            self.rows = <Cand*>p
            self.cap = rows
        if listed > self.listed_cap:
            p = realloc(self.listed, listed * sizeof(int64_t))
            if p == NULL:
                raise MemoryError()
            self.listed = <int64_t*>p
            self.listed_cap = listed
        if floors > self.floors_cap:
            p = realloc(self.floors, floors * sizeof(double))
            if p == NULL:
                raise MemoryError()
            self.floors = <double*>p
            p = realloc(self.heap, floors * sizeof(double))
            if p == NULL:
                raise MemoryError()
            self.heap = <double*>p
            self.floors_cap = floors
        return 0


cdef inline int64_t _reach(Buffers buf, int64_t n_rows, int64_t first_reach, int64_t w, int64_t key, double pu, double floor) except -1:
    """Add a pool word whose bound reaches the threshold to the rows (its floor beside it); returns the new row count."""
    cdef Cand* c
    if n_rows >= buf.cap or n_rows - first_reach >= buf.floors_cap:
        buf.reserve(2 * n_rows + 16, 0, 2 * (n_rows - first_reach) + 16)
    c = &buf.rows[n_rows]
    c.id = w
    c.key = key
    c.pu = pu
    c.a_at = -1
    buf.floors[n_rows - first_reach] = floor
    return n_rows + 1


cdef class Pool:
    """One snapshot's pool (every suggestable counted word in sort-key order) and what its contexts share.

    Args:
        core: the base model's compiled query core (``top`` and ``probabilities``).
        lock: the lock that keeps the core to one query at a time.
        keys, ids: the pool's sort keys (ascending) and ids.
        values: per word c(w) / N, the unigram share (a context's P_user of a word it has not
            seen is ``g3 * (g2 * value)``); or, for a context's own pool, its P_user (g2 = g3 = 1).
        key_array: the sort key of each learned id offset (-1: not suggestable).
        blocked: the base ids the never-suggest list blocks (a set).
        learning: whether new words may be suggested.
        end_id: the END id; larger ids have no base probability.
        base_size: V; first_new: the first learned id.
        display: maps an id to its display form.
        made: the suggestion type (a named tuple of word, prob, order, id, learned, new_word).
        base_forms: display forms of base words already asked for (shared by every snapshot).
        forms: display forms of learned words the user model has worked out (``UserModel.shown_forms``; only read).
        where: the pool position of each id (int64, -1: not pooled), or None to find ids by sort key.
    """

    cdef object core, lock, blocked, display, made
    cdef dict base_forms, forms
    cdef const int64_t[::1] keys
    cdef const int64_t[::1] ids
    cdef const double[::1] values
    cdef const int64_t[::1] key_array
    cdef const int64_t[::1] where
    cdef bint use_where
    cdef bint learning
    cdef int64_t end_id, base_size, first_new, n
    cdef double* block_max  # the largest value of each block of 32 pool words

    def __cinit__(self):
        self.block_max = NULL

    def __dealloc__(self):
        free(self.block_max)

    def __init__(self, core, lock, const int64_t[::1] keys, const int64_t[::1] ids, const double[::1] values,
                 const int64_t[::1] key_array, blocked, bint learning, int64_t end_id, int64_t base_size,
                 int64_t first_new, display, made, dict base_forms, dict forms, where=None):
        self.n = keys.shape[0]
        self.use_where = where is not None
        if where is not None:
            self.where = where
        if ids.shape[0] != self.n or values.shape[0] != self.n:
            raise ValueError("the pool's arrays differ in length")
        self.core, self.lock = core, lock
        self.keys, self.ids, self.values, self.key_array = keys, ids, values, key_array
        self.blocked = blocked
        self.learning = learning
        self.end_id, self.base_size, self.first_new = end_id, base_size, first_new
        self.display, self.made = display, made
        self.base_forms, self.forms = base_forms, forms
        cdef int64_t i, blocks = (self.n >> BLOCK_SHIFT) + 1
        self.block_max = <double*>malloc(blocks * sizeof(double))
        if self.block_max == NULL:
            raise MemoryError()
        for i in range(blocks):
            self.block_max[i] = 0.0
        for i in range(self.n):
            if not values[i] >= 0.0:  # also refuses NaN
                raise ValueError("the pool's values must be non-negative numbers")
            if values[i] > self.block_max[i >> BLOCK_SHIFT]:
                self.block_max[i >> BLOCK_SHIFT] = values[i]

    cdef int64_t position(self, int64_t w) noexcept:
        """The pool position of an id (-1: not in the pool)."""
        cdef int64_t key, at
        if w < 0:
            return -1
        if self.use_where:
            if w >= self.where.shape[0]:
                return -1
            at = self.where[w]
            return at if 0 <= at < self.n and self.ids[at] == w else -1
        if w < self.base_size:
            key = (w << KEY_SHIFT) | BASE_KEY_LOW
        elif w >= self.first_new and w - self.first_new < self.key_array.shape[0]:
            key = self.key_array[w - self.first_new]
            if key < 0:
                return -1
        else:
            return -1
        at = lower_bound(self.keys, 0, self.n, key)
        if at < self.n and self.keys[at] == key and self.ids[at] == w:
            return at
        return -1

    cdef bint could_suggest(self, int64_t w) except -1:
        """As ``Suggestable.could_suggest``: an unblocked base word, or a new word ready while learning is on."""
        if w < 0:
            return False
        if w < self.base_size:
            return w not in self.blocked
        if w < self.first_new:
            return False
        return self.learning and w - self.first_new < self.key_array.shape[0] and self.key_array[w - self.first_new] >= 0


def context_merge(Pool pool, int64_t u, int64_t v, int64_t ub, int64_t vb, double mu, double g2, double g3,
                  follower_ids, follower_probs, user_context, order_of, const double[::1] w1=None):
    """The merge of one context over a pool, or None where a suggestable follower lies outside the pool.

    Args:
        pool: the snapshot's pool.
        u, v: the context ids; ub, vb: the context as the base model sees it.
        mu: the user model's share after the context.
        g2, g3: the Witten-Bell weights passed down by v and by (u, v).
        follower_ids, follower_probs: the words seen after (u, v) or v and their P_user
            (``UserModel.followers``), or None for none.
        user_context: the user model's data about the context (None when mu is 0); order_of: ``UserModel.order_of``.
        w1: the user model's inflated unigram counts by id (``UserModel.unigram_weight_array``): with
            them the orders of learned suggestions are computed here, as ``order_of`` computes them.
    """
    cdef const int64_t[::1] fids
    cdef const double[::1] fprobs
    cdef int64_t i, at, n = 0, w
    cdef ContextMerge merge = ContextMerge.__new__(ContextMerge)
    merge.pool = pool
    merge.u, merge.v, merge.ub, merge.vb = u, v, ub, vb
    merge.mu, merge.m, merge.g2, merge.g3 = mu, 1.0 - mu, g2, g3
    merge.user, merge.order_of = user_context, order_of
    merge.user_orders = {}
    if user_context is not None:
        merge.ids2, merge.weights2, merge.total2 = user_context.ids2, user_context.weights2, user_context.total2
        merge.ids3, merge.weights3, merge.total3 = user_context.ids3, user_context.weights3, user_context.total3
        merge.w1, merge.total1 = w1, user_context.total1
        merge.c_g2, merge.c_g3 = user_context.gamma2, user_context.gamma3
        if merge.weights2.shape[0] != merge.ids2.shape[0] or merge.weights3.shape[0] != merge.ids3.shape[0]:
            raise ValueError("follower ids and weights differ in length")
    # Per pool position: whether the context has a follower there, its P_user, and per block of 32 the largest.
    merge.f_bits = <uint64_t*>calloc((pool.n >> 6) + 1, sizeof(uint64_t))
    merge.f_pu = <double*>malloc((pool.n + 1) * sizeof(double))
    merge.f_max = <double*>calloc((pool.n >> BLOCK_SHIFT) + 1, sizeof(double))
    if merge.f_bits == NULL or merge.f_pu == NULL or merge.f_max == NULL:
        raise MemoryError()
    if follower_ids is not None and len(follower_ids):
        fids = follower_ids
        fprobs = follower_probs
        if fprobs.shape[0] != fids.shape[0]:
            raise ValueError("follower ids and probabilities differ in length")
        for i in range(fids.shape[0]):
            w = fids[i]
            at = pool.position(w)
            if at < 0:
                if pool.could_suggest(w):
                    return None
                continue
            if not fprobs[i] >= 0.0:  # also refuses NaN
                raise ValueError("user probabilities must be non-negative numbers")
            merge.f_bits[at >> 6] |= (<uint64_t>1) << (at & 63)
            merge.f_pu[at] = fprobs[i]
            if fprobs[i] > merge.f_max[at >> BLOCK_SHIFT]:
                merge.f_max[at >> BLOCK_SHIFT] = fprobs[i]
            n += 1
    merge.nf = n
    return merge


cdef class ContextMerge:
    """One context over a snapshot's pool: answers ``suggest`` for any prefix typed after the context.

    A pool word's P_user is its follower value where the context has one, else
    ``g3 * (g2 * value)``: the operations of ``top_k.prepare``, done as the word is read.
    Made by :func:`context_merge`.

    Attributes:
        u, v, ub, vb, mu, user: as ``top_k.PreparedContext`` has them.
    """

    cdef Pool pool
    cdef readonly int64_t u, v, ub, vb
    cdef readonly double mu
    cdef readonly object user
    cdef object order_of
    cdef dict user_orders
    cdef const int64_t[::1] ids2
    cdef const int64_t[::1] ids3
    cdef const double[::1] weights2
    cdef const double[::1] weights3
    cdef const double[::1] w1
    cdef double total1, total2, total3, c_g2, c_g3
    cdef double m, g2, g3
    cdef uint64_t* f_bits  # one bit per pool position: the context has a follower there
    cdef double* f_pu  # the follower's P_user at those positions (unset elsewhere)
    cdef double* f_max  # the largest follower P_user per block of 32 positions (0 if none)
    cdef int64_t nf
    cdef Buffers scratch
    cdef bint scratch_busy
    cdef object owner, ranges_of, vocab
    cdef dict spans, prefixes
    cdef int64_t user_version, never_version, guard

    def __cinit__(self):
        self.f_bits = NULL
        self.f_pu = NULL
        self.f_max = NULL
        self.nf = 0
        self.w1 = None
        self.scratch = Buffers()
        self.scratch_busy = False
        self.owner = None
        self.prefixes = None

    def __dealloc__(self):
        free(self.f_bits)
        free(self.f_pu)
        free(self.f_max)

    cdef inline double _pu(self, int64_t at) noexcept:
        """P_user of the pool word at a position."""
        if self.f_bits[at >> 6] & ((<uint64_t>1) << (at & 63)):
            return self.f_pu[at]
        return self.g3 * (self.g2 * self.pool.values[at])

    cdef int _order(self, int64_t w) noexcept:
        """Which order of the user model supplied most of a word's P_user (as ``UserModel.order_of``)."""
        cdef double f3 = 0.0, f2 = 0.0, p1 = 0.0, share3, share2, share1
        cdef int64_t at
        at = lower_bound(self.ids3, 0, self.ids3.shape[0], w)
        if at < self.ids3.shape[0] and self.ids3[at] == w:
            f3 = self.weights3[at] / self.total3
        at = lower_bound(self.ids2, 0, self.ids2.shape[0], w)
        if at < self.ids2.shape[0] and self.ids2[at] == w:
            f2 = self.weights2[at] / self.total2
        if self.total1 > 0 and 0 <= w < self.w1.shape[0]:
            p1 = self.w1[w] / self.total1
        share3 = (1.0 - self.c_g3) * f3
        share2 = self.c_g3 * (1.0 - self.c_g2) * f2
        share1 = self.c_g3 * self.c_g2 * p1
        return 3 if share3 >= share2 and share3 >= share1 else 2 if share2 >= share1 else 1

    cdef double _a_user(self, int64_t w, int64_t lo, int64_t hi) noexcept:
        """P_user of a base word of list A (0 for a word the pool lacks)."""
        cdef int64_t key = (w << KEY_SHIFT) | BASE_KEY_LOW
        cdef int64_t at = lower_bound(self.pool.keys, lo, hi, key)
        if at < hi and self.pool.keys[at] == key:
            return self._pu(at)
        return 0.0

    def stamp(self, owner, int64_t user_version, int64_t never_version, dict spans, dict prefixes, ranges_of, vocab, int64_t guard):
        """Let :meth:`answer` serve queries while the user model and the never-suggest list keep these versions.

        Args:
            owner: the user model the merge was made from.
            user_version, never_version: the versions of the snapshot it was made under.
            spans, prefixes: the snapshot's memos of typed prefixes, ``prefix -> (model form, base id range)``
                and ``model form -> sort-key range`` (``Suggestable.prefix_memo``).
            ranges_of, vocab: the snapshot's ``ranges_of`` and the base vocabulary, for a prefix the memo lacks.
            guard: how deep past k list A is first read.
        """
        self.owner = owner
        self.user_version, self.never_version = user_version, never_version
        self.spans, self.prefixes = spans, prefixes
        self.ranges_of, self.vocab = ranges_of, vocab
        self.guard = guard

    def answer(self, owner, int64_t user_version, int64_t never_version, int64_t u, int64_t v, prefix, int64_t k):
        """The suggestions for a query in one call, or None where the caller must take the general path.

        It answers only when the user model is the same object at the same
        version, the never-suggest list is at the same version, the context is
        this one and k is positive.
        """
        if (owner is not self.owner or user_version != self.user_version or never_version != self.never_version
                or u != self.u or v != self.v or k < 1 or self.prefixes is None):
            return None
        known = self.spans.get(prefix)
        if known is not None:
            form, span = <tuple>known
            key_range = self.prefixes.get(form, _MISSING)
        if known is None or key_range is _MISSING:
            span, key_range = self.ranges_of(prefix, self.vocab)
        if key_range is None:
            return []
        if span is None:
            return self._suggest(False, 0, 0, -1, key_range[0], key_range[1], k, self.guard)
        return self._suggest(True, span.lo, span.hi, span.order_start, key_range[0], key_range[1], k, self.guard)

    def suggest(self, bint has_span, int64_t span_lo, int64_t span_hi, int64_t order_start, int64_t key_lo, int64_t key_hi,
                int64_t k, int64_t guard):
        """The k best suggestable words of a prefix (base id span, sort-key range), as suggestions, best first."""
        return self._suggest(has_span, span_lo, span_hi, order_start, key_lo, key_hi, k, guard)

    cdef list _suggest(self, bint has_span, int64_t span_lo, int64_t span_hi, int64_t order_start, int64_t key_lo, int64_t key_hi,
                       int64_t k, int64_t guard):
        cdef Buffers buf
        if k < 1:
            raise ValueError("k must be positive")
        # The merge's own scratch space, unless another thread's query holds it (the core's lock can
        # let one in while this one waits).
        if self.scratch is not None and not self.scratch_busy:
            buf = self.scratch
            self.scratch_busy = True
        else:
            buf = Buffers()
        try:
            return self._walk(buf, has_span, span_lo, span_hi, order_start, key_lo, key_hi, k, guard)
        finally:
            if buf is self.scratch:
                self.scratch_busy = False

    cdef list _walk(self, Buffers buf, bint has_span, int64_t span_lo, int64_t span_hi, int64_t order_start, int64_t key_lo,
                    int64_t key_hi, int64_t k, int64_t guard):
        """The threshold walk of :meth:`suggest` with the given scratch space."""
        cdef double mu = self.mu, m = self.m, g2 = self.g2, g3 = self.g3, a_last, threshold, edge, pb, pu, floor, kth_score, z_bound
        cdef int64_t lo, hi, a_depth, n_a, n_rows, n_reach, i, j, w, n_listed, first_reach, end
        cdef bint a_done
        cdef Cand* c
        cdef Pool pool = self.pool
        cdef const int64_t[::1] keys = pool.keys
        cdef const int64_t[::1] ids = pool.ids
        cdef const double[::1] values = pool.values
        cdef list a_ids = [], a_probs = [], a_orders = []
        lo = lower_bound(keys, 0, pool.n, key_lo)
        hi = lower_bound(keys, lo, pool.n, key_hi + 1)
        a_depth = k + guard
        while True:
            if has_span:
                pool.lock.acquire()
                try:
                    a_ids, a_probs, a_orders = pool.core.top(self.ub, self.vb, span_lo, span_hi, order_start, a_depth)
                finally:
                    pool.lock.release()
            n_a = len(a_ids)
            a_done = n_a < a_depth
            a_last = <double>a_probs[n_a - 1] if n_a > 0 and not a_done else 0.0
            buf.reserve(n_a + 32, n_a, 32)  # grown as pool words reach (few do)
            # List A's unblocked words, each scored exactly.
            n_rows = 0
            for i in range(n_a):
                w = <int64_t>a_ids[i]
                buf.listed[i] = w
                if w in pool.blocked:
                    continue
                pb = <double>a_probs[i]
                pu = self._a_user(w, lo, hi)
                c = &buf.rows[n_rows]
                c.score = m * pb + mu * pu
                c.key = (w << KEY_SHIFT) | BASE_KEY_LOW
                c.id = w
                c.pb = pb
                c.pu = pu
                c.a_at = i
                n_rows += 1
            n_listed = n_a
            qsort(buf.listed, n_listed, sizeof(int64_t), by_id)
            qsort(buf.rows, n_rows, sizeof(Cand), by_score)
            threshold = -INFINITY
            if n_rows >= k:
                threshold = buf.rows[k - 1].score
            # The slice's words outside A whose bound m * a_last + mu * P_user reaches the threshold.
            edge = m * a_last
            first_reach = n_rows
            # A pool word's P_user is its follower value, else g3 * (g2 * value).  A block whose largest
            # value and largest follower value cannot reach is skipped (each operation is monotone, so no
            # word of it can).
            i = lo
            while i < hi:
                end = min(((i >> BLOCK_SHIFT) + 1) << BLOCK_SHIFT, hi)
                if (mu * (g3 * (g2 * pool.block_max[i >> BLOCK_SHIFT])) + edge < threshold
                        and mu * self.f_max[i >> BLOCK_SHIFT] + edge < threshold):
                    i = end
                    continue
                while i < end:
                    if self.f_bits[i >> 6] & ((<uint64_t>1) << (i & 63)):
                        pu = self.f_pu[i]
                    else:
                        pu = g3 * (g2 * values[i])
                    floor = mu * pu
                    if floor + edge >= threshold and not sorted_has(buf.listed, n_listed, ids[i]):
                        n_rows = _reach(buf, n_rows, first_reach, ids[i], keys[i], pu, floor)
                    i += 1
            n_reach = n_rows - first_reach
            if n_reach > FEW_REACHING and n_reach >= k:
                # Raise the threshold to the k-th best floor mu * P_user: each bounds a different word's score from below.
                threshold = max(threshold, kth_largest(buf.floors, n_reach, k, buf.heap))
                j = first_reach
                for i in range(first_reach, n_rows):
                    if buf.floors[i - first_reach] + edge >= threshold:
                        buf.rows[j] = buf.rows[i]
                        j += 1
                n_rows = j
            if n_rows > first_reach:
                self._base_of(buf.rows + first_reach, n_rows - first_reach)
                qsort(buf.rows, n_rows, sizeof(Cand), by_score)
            if a_done:
                break
            if n_rows >= k:
                kth_score = buf.rows[k - 1].score
                z_bound = m * a_last + mu * 0.0
                if kth_score > z_bound:
                    break
                # Unread words outside the pool score at most the bound and, when equal, sort after A's last word.
                if kth_score == z_bound and no_merge(m, a_last) and buf.rows[k - 1].key <= ((<int64_t>a_ids[n_a - 1]) << KEY_SHIFT) | BASE_KEY_LOW:
                    break
            a_depth *= 4
        return self._results(buf.rows, min(n_rows, k), a_orders)

    cdef int _base_of(self, Cand* rows, int64_t n) except -1:
        """P_base and base orders of pool candidates, and their scores (0 past END: new words)."""
        cdef int64_t i, n_in = 0
        cdef double mu = self.mu, m = self.m
        cdef const double[::1] found
        cdef object wanted
        cdef list orders = None
        cdef Pool pool = self.pool
        for i in range(n):
            if rows[i].id <= pool.end_id:
                n_in += 1
        if n_in:
            wanted = np.empty(n_in, dtype=np.int64)
            self._fill_ids(wanted, rows, n)
            pool.lock.acquire()
            try:
                found, orders = pool.core.probabilities(self.ub, self.vb, wanted, True)
            finally:
                pool.lock.release()
        n_in = 0
        for i in range(n):
            if rows[i].id <= pool.end_id:
                rows[i].pb = found[n_in]
                rows[i].order = orders[n_in]
                n_in += 1
            else:
                rows[i].pb = 0.0
                rows[i].order = 0
            rows[i].score = m * rows[i].pb + mu * rows[i].pu
        return 0

    cdef void _fill_ids(self, int64_t[::1] out, const Cand* rows, int64_t n) noexcept:
        cdef int64_t i, j = 0
        for i in range(n):
            if rows[i].id <= self.pool.end_id:
                out[j] = rows[i].id
                j += 1

    cdef list _results(self, const Cand* rows, int64_t n, list a_orders):
        """Suggestions from the chosen candidates, with their orders and marks (as ``AdaptedModel._results``)."""
        cdef int64_t i, w
        cdef list out = []
        cdef double mu = self.mu, m = self.m
        cdef PyTypeObject* base = <PyTypeObject*>tuple
        cdef Pool pool = self.pool
        cdef type made = pool.made
        cdef dict forms
        cdef dict user_orders = self.user_orders
        cdef bint own
        cdef object order, form
        cdef tuple fields
        for i in range(n):
            w = rows[i].id
            own = mu * rows[i].pu > m * rows[i].pb
            if not own and rows[i].a_at >= 0:
                order = a_orders[rows[i].a_at]
            elif not own and w < pool.base_size:
                order = rows[i].order
            elif self.user is not None:
                if self.w1 is not None:
                    order = self._order(w)
                else:
                    order = user_orders.get(w)
                    if order is None:
                        order = user_orders[w] = int(self.order_of(w, self.user))
            else:
                order = 1
            if w < pool.first_new:
                form = pool.base_forms.get(w)
                if form is None:
                    form = pool.base_forms[w] = pool.display(w)
            else:
                form = pool.forms.get(w)  # the user model's own memo: read here, filled by display
                if form is None:
                    form = pool.display(w)
            fields = ((form, rows[i].score, order, w, own, w >= pool.first_new),)
            out.append(base.tp_new(made, <PyObject*>fields, NULL))
        return out


def follower_probs(double g2, double g3, const int64_t[::1] ids2, const double[::1] weights2, double total2,
                   const int64_t[::1] ids3, const double[::1] weights3, double total3, const double[::1] w1, double total1):
    """The words seen after (u, v) or v and their P_user, as ``UserModel.followers`` computes them (N > 0).

    The Witten-Bell chain of each word seen after v, with the same operations
    in the same order; a word also seen after (u, v) adds its trigram term.

    Returns:
        float64 P_user of each id after v (``ids2``, sorted); or None where the
        general path must answer (no word seen after v, words seen after (u, v)
        that are not among those seen after v, or an id past the unigram table).
    """
    cdef Py_ssize_t n2 = ids2.shape[0], n3 = ids3.shape[0], i, j, t
    cdef int64_t w, n_w1 = w1.shape[0]
    cdef double p2, p3
    if weights2.shape[0] != n2 or weights3.shape[0] != n3:
        raise ValueError("follower ids and weights differ in length")
    if n2 == 0:
        return None
    j = 0
    for i in range(n2):
        w = ids2[i]
        if w < 0 or w >= n_w1:
            return None
    for t in range(n3):
        while j < n2 and ids2[j] < ids3[t]:
            j += 1
        if j >= n2 or ids2[j] != ids3[t]:
            return None
    out = np.empty(n2, dtype=np.float64)
    cdef double[::1] p_user = out
    j = 0
    for i in range(n2):
        w = ids2[i]
        p2 = (1.0 - g2) * (weights2[i] / total2) + g2 * (w1[w] / total1)
        p3 = g3 * p2
        while j < n3 and ids3[j] < w:
            j += 1
        if j < n3 and ids3[j] == w:
            p3 = (1.0 - g3) * (weights3[j] / total3) + p3
        p_user[i] = p3
    return out
