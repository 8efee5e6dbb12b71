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

Memory safety: every pool index read lies in the slice found by binary search
inside the pool's arrays, and a word id is used as an index into the pool's
positions table only after a bounds check.
"""

from cpython.object cimport PyObject, PyTypeObject
from libc.math cimport INFINITY, nextafter
from libc.stdint cimport int64_t
from libc.stdlib cimport free, malloc, qsort, realloc

import numpy as np

cdef enum:
    KEY_SHIFT = 21
    FEW_REACHING = 32

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


cdef class ContextMerge:
    """One context's pool with the base core: answers ``suggest`` for any prefix typed after the context.

    Args:
        core: the base model's compiled query core (``top`` and ``probabilities``).
        lock: the lock that keeps the core to one query at a time.
        ub, vb: the context as the base model sees it.
        mu: the user model's share after the context.
        keys, ids, p_user, floors: the pool after the context (as ``PreparedContext`` holds it).
        where: the pool position of each id (int64), or None when the pool is not the snapshot's shared one.
        blocked: the base ids the never-suggest list blocks (a set).
        end_id: the END id; larger ids have no base probability.
        base_size: V; first_new: the first learned id.
        display: maps an id to its display form.
        order_of: ``UserModel.order_of``, and user_context its context (None: order 1).
        made: the suggestion type (a named tuple of word, prob, order, id, learned, new_word).
        forms: display forms already asked for, by id (shared by the contexts of one snapshot).
    """

    cdef object core, lock, blocked, display, order_of, user_context, made
    cdef dict forms, user_orders
    cdef const int64_t[::1] keys
    cdef const int64_t[::1] ids
    cdef const int64_t[::1] where
    cdef const double[::1] p_user
    cdef const double[::1] floors
    cdef bint use_where
    cdef double mu, m
    cdef int64_t ub, vb, end_id, base_size, first_new, n_where

    def __init__(self, core, lock, int64_t ub, int64_t vb, double mu, const int64_t[::1] keys, const int64_t[::1] ids,
                 const double[::1] p_user, const double[::1] floors, where, blocked,
                 int64_t end_id, int64_t base_size, int64_t first_new, display, order_of, user_context, made, dict forms):
        self.core = core
        self.lock = lock
        self.ub = ub
        self.vb = vb
        self.mu = mu
        self.m = 1.0 - mu
        n = keys.shape[0]
        if ids.shape[0] != n or p_user.shape[0] != n or floors.shape[0] != n:
            raise ValueError("the pool's arrays differ in length")
        self.keys, self.ids, self.p_user, self.floors = keys, ids, p_user, floors
        self.use_where = where is not None
        if where is not None:
            self.where = where
            self.n_where = self.where.shape[0]
        else:
            self.n_where = 0
        self.blocked = blocked
        self.end_id = end_id
        self.base_size = base_size
        self.first_new = first_new
        self.display = display
        self.order_of = order_of
        self.user_context = user_context
        self.made = made
        self.forms = forms
        self.user_orders = {}

    cdef double _a_user(self, int64_t w, int64_t lo, int64_t hi) noexcept:
        """P_user of a base word of list A (0 for a word the pool lacks)."""
        cdef int64_t at, key
        if self.use_where:
            if w < 0 or w >= self.n_where:
                return 0.0
            at = self.where[w]
            if at < 0 or at >= self.p_user.shape[0]:
                return 0.0
            return self.p_user[at]
        key = (w << KEY_SHIFT) | BASE_KEY_LOW
        at = lower_bound(self.keys, lo, hi, key)
        if at < hi and self.keys[at] == key:
            return self.p_user[at]
        return 0.0

    def suggest(self, bint has_span, int64_t span_lo, int64_t span_hi, int64_t order_start, int64_t key_lo, int64_t key_hi,
                int64_t k, int64_t guard):
        """The k best suggestable words of a prefix (base id span, sort-key range), as suggestions, best first."""
        cdef double mu = self.mu, m = self.m, a_last, threshold, edge, pb, pu, kth_score, z_bound
        cdef int64_t lo, hi, a_depth, n_a, n_rows, n_reach, i, j, w, at, n_listed, n_pb, first_reach
        cdef bint a_done
        cdef Buffers buf = Buffers()
        cdef Cand* c
        cdef list a_ids = [], a_probs = [], a_orders = []
        if k < 1:
            raise ValueError("k must be positive")
        lo = lower_bound(self.keys, 0, self.keys.shape[0], key_lo)
        hi = lower_bound(self.keys, lo, self.keys.shape[0], key_hi + 1)
        a_depth = k + guard
        while True:
            if has_span:
                self.lock.acquire()
                try:
                    a_ids, a_probs, a_orders = self.core.top(self.ub, self.vb, span_lo, span_hi, order_start, a_depth)
                finally:
                    self.lock.release()
            n_a = len(a_ids)
            a_done = n_a < a_depth
            a_last = <double>a_probs[n_a - 1] if n_a > 0 and not a_done else 0.0
            buf.reserve(n_a + (hi - lo), n_a, hi - lo)
            # List A's unblocked words, each scored exactly.
            n_rows = 0
            for i in range(n_a):
                w = <int64_t>a_ids[i]
                buf.listed[i] = w
                if w in self.blocked:
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
            for i in range(lo, hi):
                if self.floors[i] + edge >= threshold and not sorted_has(buf.listed, n_listed, self.ids[i]):
                    c = &buf.rows[n_rows]
                    c.id = self.ids[i]
                    c.key = self.keys[i]
                    c.pu = self.p_user[i]
                    c.a_at = -1
                    buf.floors[n_rows - first_reach] = self.floors[i]
                    n_rows += 1
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
        for i in range(n):
            if rows[i].id <= self.end_id:
                n_in += 1
        if n_in:
            wanted = np.empty(n_in, dtype=np.int64)
            self._fill_ids(wanted, rows, n)
            self.lock.acquire()
            try:
                found, orders = self.core.probabilities(self.ub, self.vb, wanted, True)
            finally:
                self.lock.release()
        n_in = 0
        for i in range(n):
            if rows[i].id <= self.end_id:
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
            if rows[i].id <= self.end_id:
                out[j] = rows[i].id
                j += 1

    cdef list _results(self, const Cand* rows, int64_t n, list a_orders):
        """Suggestions from the chosen candidates, with their orders and marks (as ``AdaptedModel._results``)."""
        cdef int64_t i, w
        cdef list out = []
        cdef double mu = self.mu, m = self.m
        cdef PyTypeObject* base = <PyTypeObject*>tuple
        cdef type made = self.made
        cdef dict forms = self.forms
        cdef dict user_orders = self.user_orders
        cdef bint own
        cdef object order, form
        cdef tuple fields
        for i in range(n):
            w = rows[i].id
            own = mu * rows[i].pu > m * rows[i].pb
            if not own and rows[i].a_at >= 0:
                order = a_orders[rows[i].a_at]
            elif not own and w < self.base_size:
                order = rows[i].order
            elif self.user_context is not None:
                order = user_orders.get(w)
                if order is None:
                    order = user_orders[w] = int(self.order_of(w, self.user_context))
            else:
                order = 1
            form = forms.get(w)
            if form is None:
                form = forms[w] = self.display(w)
            fields = ((form, rows[i].score, order, w, own, w >= self.first_new),)
            out.append(base.tp_new(made, <PyObject*>fields, NULL))
        return out


def pool_user(const double[::1] share, double g2, double g3, double mu, const int64_t[::1] where,
              const int64_t[::1] ids2, const double[::1] weights2, double total2,
              const int64_t[::1] ids3, const double[::1] weights3, double total3,
              const double[::1] w1, double total1):
    """P_user and floors of the pool after a context, as ``top_k.prepare`` computes them (mu > 0, N > 0).

    Outside the words seen after (u, v) or v, P_user is ``g3 * (g2 * share)``;
    a follower's is the Witten-Bell chain of ``UserModel.followers``, with
    the same operations in the same order.

    Returns:
        ``(p_user, floors)``, float64 arrays shaped like ``share``; or None where
        the general path must answer (a follower the pool lacks, or words seen
        after (u, v) that are not among those seen after v).
    """
    cdef Py_ssize_t n = share.shape[0], n2 = ids2.shape[0], n3 = ids3.shape[0], i, j, t, at
    cdef int64_t w, n_where = where.shape[0], n_w1 = w1.shape[0]
    cdef double p2, p3
    if weights2.shape[0] != n2 or weights3.shape[0] != n3:
        raise ValueError("follower ids and weights differ in length")
    if n2 == 0 and n3 > 0:
        return None
    # Every follower must have a place in the pool, and every word after (u, v) must follow v too.
    j = 0
    for i in range(n2):
        w = ids2[i]
        if w < 0 or w >= n_where or w >= n_w1 or where[w] < 0 or where[w] >= n:
            return None
    for t in range(n3):
        while j < n2 and ids2[j] < ids3[t]:
            j += 1
        if j >= n2 or ids2[j] != ids3[t]:
            return None
    p_user_array = np.empty(n, dtype=np.float64)
    floors_array = np.empty(n, dtype=np.float64)
    cdef double[::1] p_user = p_user_array, floors = floors_array
    for i in range(n):
        p_user[i] = g3 * (g2 * share[i])
    j = 0
    for i in range(n2):
        w = ids2[i]
        p2 = (1.0 - g2) * (weights2[i] / total2) + g2 * (w1[w] / total1)
        p3 = g3 * p2
        while j < n3 and ids3[j] < w:
            j += 1
        if j < n3 and ids3[j] == w:
            p3 = (1.0 - g3) * (weights3[j] / total3) + p3
        p_user[where[w]] = p3
    for i in range(n):
        floors[i] = mu * p_user[i]
    return p_user_array, floors_array
