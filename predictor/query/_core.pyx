# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""The compiled query core: exact top-k over the ranked lists, the scoring, the k-best insertion.

The numpy path (the scoring module and ``LanguageModel.top_in_range``) is the
reference: this core computes every probability with the same float64
operations in the same order (the extension is compiled without contracting
a multiply and an add into one fused instruction), and returns the same
words, probabilities and orders.

How a query stays exact and cheap: words of a prefix's id range fall in three
classes (stored after the pair, stored after the last word only, neither; see
the model module).  One k-best array, kept sorted by probability descending and
id ascending, collects candidates of all three.  Each class is read from a list
in which its scores never rise: the pair's ranked list (ordered by the score
itself), the last word's ranked list (ordered by P2, the class score being
gamma3 * P2) and the range's unigram list (ordered by P1, the class score being
gamma3 * (gamma2 * P1)).  A walk stops at the first word that scores below the
k-th best; a word that ties the k-th best with a larger id skips the rest of
its run of equal list keys, whose ids are larger still.  Rounding can make two
different keys give one score, so the walk does not stop on a tie.

Memory safety: every index this core computes lies inside its array provided
the load checks (``integrity.check_structure``) passed: offsets start at 0,
never decrease and end at their array's length; stored and listed word ids
are below the vocabulary's outcome count; ranked-list slots are increasing and
below the bigram count; level-3 offsets stored in blocks decode (wide blocks
inside their array) to offsets with those properties; word ids in three bytes
hold a whole number of ids; a level-3 position is below the length of its
pair's last word's bigram list (and the ``START START`` pair's words are ids in
range); stored weights name increasing slots below their level's count, with
finite non-negative values (a derived weight reads only the pair's own entries).  Sortedness is not assumed for safety: a binary search
over an unsorted slice stays inside the slice.  What callers pass (context
ids, id ranges, outcome ids) is checked on entry.
"""

from cpython.object cimport PyObject, PyTypeObject
from libc.stdint cimport int32_t, int64_t, uint8_t, uint16_t, uint32_t, uint64_t
from libc.stdlib cimport free, realloc
from libc.string cimport memmove

import numpy as np

cdef enum:
    K_U16 = 0
    K_I32 = 1
    K_U32 = 2
    K_U64 = 3
    K_I64 = 4
    K_F32 = 5
    K_F64 = 6
    K_U8 = 7
    K_U24 = 8  # word ids in three bytes, least significant first (modelfile/packed.py)

SCORE_ALL_WORDS = SCORE_ALL

cdef enum:
    SCORE_ALL = 96  # a class with at most this many words in range is scored whole (lists start above it)


cdef int64_t WIDE_BLOCK = 2147483648  # modelfile.blocked.WIDE: a block base whose block is stored in full


cdef struct Arr:
    const char* p
    int kind
    int64_t n


cdef inline int64_t iget(const Arr* a, int64_t i) noexcept nogil:
    """An integer element of an id or offset array."""
    cdef const uint8_t* b
    if a.kind == K_U16:
        return (<const uint16_t*>a.p)[i]
    if a.kind == K_U24:
        b = (<const uint8_t*>a.p) + 3 * i
        return b[0] | (<int64_t>b[1] << 8) | (<int64_t>b[2] << 16)
    if a.kind == K_U8:
        return (<const uint8_t*>a.p)[i]
    if a.kind == K_I32:
        return (<const int32_t*>a.p)[i]
    if a.kind == K_U32:
        return (<const uint32_t*>a.p)[i]
    if a.kind == K_U64:
        return <int64_t>(<const uint64_t*>a.p)[i]
    return (<const int64_t*>a.p)[i]


cdef inline double fget(const Arr* a, int64_t i) noexcept nogil:
    """A float element (float32 widened exactly to float64)."""
    if a.kind == K_F32:
        return <double>(<const float*>a.p)[i]
    return (<const double*>a.p)[i]


cdef inline int64_t lower_bound(const Arr* a, int64_t lo, int64_t hi, int64_t x) noexcept nogil:
    """The first position in [lo, hi) whose id is not below x (hi if none); stays in [lo, hi] on any data."""
    cdef int64_t mid
    while lo < hi:
        mid = lo + ((hi - lo) >> 1)
        if iget(a, mid) < x:
            lo = mid + 1
        else:
            hi = mid
    return lo


cdef struct Ctx:
    int64_t u
    int64_t v
    int64_t lo2
    int64_t hi2
    int64_t slot
    int64_t lo3
    int64_t hi3
    bint has2
    bint has3
    double g2v
    double gamma3
    int64_t r2lo
    int64_t r2hi
    int64_t r3lo
    int64_t r3hi


cdef struct Best:
    double* score
    int64_t* ids
    double* a2
    double* a3
    int64_t n
    int64_t k


def _kind(array):
    name = array.dtype.name
    return {"uint8": K_U8, "uint16": K_U16, "int32": K_I32, "uint32": K_U32, "uint64": K_U64, "int64": K_I64, "float32": K_F32, "float64": K_F64}[name]


cdef class QueryCore:
    """Exact top-k, probabilities and orders over one model's arrays (see the module docstring).

    Args:
        arrays: the model's arrays (``ModelArrays``) after the load checks (or as built).
        interpolated: whether stored values add to the lower order (else they replace it).
        table2, table3: float64 value of every code of the level's stored
            values (8- or 16-bit codes), or None where the level stores float32.
        totals2: for a back-off model with derived level-3 weights, P2 summed over every outcome per context word.

    Raises:
        ValueError: a layout this core does not read (a value type without its table).
    """

    cdef Arr p1, off2, w2, a2, g2, off3, w3, a3, g3, r2off, r2ids, r3slot, r3off, r3ids, order, table2, table3
    cdef Arr o3base, o3delta, o3wide, wslot, wvalue, w3start, totals2
    cdef bint interpolated, ranked, blocked3, derived3, tail3
    cdef int64_t size, n2, start, start3
    cdef Ctx ctx
    cdef Best best
    cdef int64_t capacity
    cdef object _keep
    cdef object _made
    cdef tuple _tail
    cdef object _display
    cdef list _forms

    def __cinit__(self):
        self.best.score = NULL
        self.best.ids = NULL
        self.best.a2 = NULL
        self.best.a3 = NULL
        self.capacity = 0

    def __init__(self, arrays, bint interpolated, table2, table3, totals2=None):
        keep = []
        self.interpolated = interpolated
        self.size = arrays.vocab_size
        self.start = self.size + 2
        self.n2 = arrays.n2
        p1 = np.ascontiguousarray(arrays.p1, dtype=np.float64)
        off2 = np.ascontiguousarray(arrays.l2_off, dtype=np.int64)
        g2 = np.ascontiguousarray(arrays.l2_gamma, dtype=np.float64)
        self._set(&self.p1, p1, keep)
        self._set(&self.off2, off2, keep)
        self._set(&self.g2, g2, keep)
        self._set(&self.w2, arrays.l2_word, keep, True)
        self._set(&self.a2, arrays.l2_value, keep)
        self.blocked3 = arrays.l3_off is None
        if self.blocked3:
            self._set(&self.o3base, arrays.l3_off_base, keep)
            self._set(&self.o3delta, arrays.l3_off_delta, keep)
            self._set(&self.o3wide, arrays.l3_off_wide, keep)
        else:
            self._set(&self.off3, arrays.l3_off, keep)
        self.tail3 = arrays.l3_word is None
        if self.tail3:
            self._set(&self.w3, arrays.l3_tail, keep)
            self._set(&self.w3start, arrays.l3_start_word, keep, True)
            self.start3 = self._off3(self.n2)
        else:
            self._set(&self.w3, arrays.l3_word, keep, True)
        self._set(&self.a3, arrays.l3_value, keep)
        self.derived3 = arrays.l3_gamma is None
        if self.derived3:
            self._set(&self.wslot, np.ascontiguousarray(arrays.l3_weight_slot, dtype=np.int64), keep)
            self._set(&self.wvalue, arrays.l3_weight_value, keep)
            if not interpolated:
                if totals2 is None or len(totals2) != len(arrays.l2_off) - 1:
                    raise ValueError("derived back-off weights need the level-2 totals of every context word")
                self._set(&self.totals2, np.ascontiguousarray(totals2, dtype=np.float64), keep)
        else:
            self._set(&self.g3, arrays.l3_gamma, keep)
        self._set(&self.order, arrays.vocab_order, keep, True)
        for level, values, table in (("l2", arrays.l2_value, table2), ("l3", arrays.l3_value, table3)):
            codes = {"uint8": 256, "uint16": 65536}.get(values.dtype.name)
            if codes is None and values.dtype.name != "float32":
                raise ValueError(f"{level} values of type {values.dtype.name} are not read by the compiled core")
            if codes is not None and (table is None or len(table) < codes):
                raise ValueError(f"{level} values need a table of {codes} entries")
        self._set(&self.table2, np.ascontiguousarray(table2 if table2 is not None else np.zeros(1), dtype=np.float64), keep)
        self._set(&self.table3, np.ascontiguousarray(table3 if table3 is not None else np.zeros(1), dtype=np.float64), keep)
        self.ranked = arrays.ranked
        if self.ranked:
            self._set(&self.r2off, np.ascontiguousarray(arrays.ranked2_offsets(), dtype=np.int64), keep)
            self._set(&self.r2ids, arrays.rank2_ids, keep, True)
            self._set(&self.r3slot, np.ascontiguousarray(arrays.rank3_slot, dtype=np.int64), keep)
            self._set(&self.r3off, np.ascontiguousarray(arrays.rank3_off, dtype=np.int64), keep)
            self._set(&self.r3ids, arrays.rank3_ids, keep, True)
        self._keep = keep
        self.ctx.u = -1
        self.ctx.v = -1

    cdef _set(self, Arr* target, array, list keep, bint ids=False):
        """Point ``target`` at an array (``ids``: a word-id section, whose uint8 form holds three bytes per id)."""
        array = np.ascontiguousarray(array)
        if array.ndim != 1:
            raise ValueError("model arrays are one-dimensional")
        keep.append(array)
        if array.dtype.name not in ("uint8", "uint16", "int32", "uint32", "uint64", "int64", "float32", "float64"):
            raise ValueError(f"arrays of type {array.dtype.name} are not read by the compiled core")
        target.p = <const char*><size_t>array.ctypes.data
        target.kind = _kind(array)
        target.n = array.shape[0]
        if ids and target.kind == K_U8:
            target.kind = K_U24
            target.n = array.shape[0] // 3

    def __dealloc__(self):
        free(self.best.score)
        free(self.best.ids)
        free(self.best.a2)
        free(self.best.a3)

    # ------------------------------------------------------------ contexts
    cdef int _context(self, int64_t u, int64_t v) except -1:
        """Point ``self.ctx`` at context (u, v) (kept while queries stay on one context)."""
        cdef Ctx* c = &self.ctx
        cdef int64_t ulo, uhi, pos, lo, hi, mid
        if c.u == u and c.v == v:
            return 0
        if u < 0 or v < 0 or u > self.start or v > self.start:
            raise IndexError(f"context ids ({u}, {v}) are outside the model's {self.start + 1} ids")
        c.u = -1  # invalid until complete
        c.v = v
        c.lo2 = iget(&self.off2, v)
        c.hi2 = iget(&self.off2, v + 1)
        c.has2 = c.hi2 > c.lo2
        c.g2v = fget(&self.g2, v)
        c.slot = -1
        if v == self.start:
            c.slot = self.n2
        else:
            ulo = iget(&self.off2, u)
            uhi = iget(&self.off2, u + 1)
            if uhi > ulo:
                pos = lower_bound(&self.w2, ulo, uhi, v)
                if pos < uhi and iget(&self.w2, pos) == v:
                    c.slot = pos
        c.has3 = False
        c.lo3 = c.hi3 = 0
        if c.slot >= 0:
            c.lo3 = self._off3(c.slot)
            c.hi3 = self._off3(c.slot + 1)
            c.has3 = c.hi3 > c.lo3
        if not c.has3:
            c.slot = -1
            c.lo3 = c.hi3 = 0
        c.gamma3 = self._gamma3() if c.has3 else 1.0
        c.r2lo = c.r2hi = c.r3lo = c.r3hi = 0
        if self.ranked:
            c.r2lo = iget(&self.r2off, v)
            c.r2hi = iget(&self.r2off, v + 1)
            if c.has3 and self.r3slot.n:
                lo = 0
                hi = self.r3slot.n
                while lo < hi:
                    mid = lo + ((hi - lo) >> 1)
                    if iget(&self.r3slot, mid) < c.slot:
                        lo = mid + 1
                    else:
                        hi = mid
                if lo < self.r3slot.n and iget(&self.r3slot, lo) == c.slot:
                    c.r3lo = iget(&self.r3off, lo)
                    c.r3hi = iget(&self.r3off, lo + 1)
        c.u = u
        return 0

    cdef inline int64_t _w3(self, int64_t pos) noexcept nogil:
        """The word of trigram entry ``pos`` of the current pair: an id, or a position in the pair's last word's list."""
        if not self.tail3:
            return iget(&self.w3, pos)
        if pos >= self.start3:
            return iget(&self.w3start, pos - self.start3)
        return iget(&self.w2, self.ctx.lo2 + iget(&self.w3, pos))

    cdef inline int64_t _lb3(self, int64_t lo, int64_t hi, int64_t x) noexcept nogil:
        """The first trigram position of the current pair in [lo, hi) whose word is not below x (hi if none)."""
        cdef int64_t mid
        while lo < hi:
            mid = lo + ((hi - lo) >> 1)
            if self._w3(mid) < x:
                lo = mid + 1
            else:
                hi = mid
        return lo

    cdef double _gamma3(self) noexcept nogil:
        """The level-3 weight of the current pair (which stores words): stored, or derived (modelfile/weights.py).

        Derived: S, the pair's stored values, and for a back-off model L, their P2,
        each summed one float64 addition at a time in stored order from 0.0, as the
        numpy path sums them; ``max(1 - S, 0)``, over ``T - L`` for back-off (T: P2 summed over every
        outcome after v), rounded to float32.
        """
        cdef const Ctx* c = &self.ctx
        cdef int64_t lo, hi, mid, pos
        cdef double stored = 0.0
        cdef double lower = 0.0
        cdef double left, free, unused
        if not self.derived3:
            return fget(&self.g3, c.slot)
        lo = 0
        hi = self.wslot.n
        while lo < hi:
            mid = lo + ((hi - lo) >> 1)
            if iget(&self.wslot, mid) < c.slot:
                lo = mid + 1
            else:
                hi = mid
        if lo < self.wslot.n and iget(&self.wslot, lo) == c.slot:
            return fget(&self.wvalue, lo)
        for pos in range(c.lo3, c.hi3):
            stored = stored + self._value(&self.a3, &self.table3, pos)
            if not self.interpolated:
                lower = lower + self._p2(self._w3(pos), c.lo2, c.hi2, &unused)
        left = 1.0 - stored
        if left < 0.0:
            left = 0.0
        if self.interpolated:
            return <double>(<float>left)  # rounded to nearest, as numpy's float32 conversion
        free = fget(&self.totals2, c.v) - lower
        return <double>(<float>(left / free)) if free > 1e-12 else 0.0

    cdef inline int64_t _off3(self, int64_t i) noexcept nogil:
        """Level 3's offset i, stored in full or in blocks (see modelfile/blocked.py)."""
        cdef int64_t base
        if not self.blocked3:
            return iget(&self.off3, i)
        base = iget(&self.o3base, i >> 5)
        if base >= WIDE_BLOCK:
            return iget(&self.o3wide, base - WIDE_BLOCK + (i & 31))
        return base + iget(&self.o3delta, i)

    # -------------------------------------------------------------- scoring
    cdef inline double _value(self, const Arr* values, const Arr* table, int64_t i) noexcept nogil:
        """A stored value decoded: a code looked up in its level's table, or a float32 widened."""
        if values.kind == K_U16:
            return fget(table, (<const uint16_t*>values.p)[i])
        if values.kind == K_U8:
            return fget(table, (<const uint8_t*>values.p)[i])
        return <double>(<const float*>values.p)[i]

    cdef inline double _p2(self, int64_t w, int64_t lo, int64_t hi, double* a2) noexcept nogil:
        """P2(w | v), its stored value searched for in w2[lo:hi) (a slice of the context's words)."""
        cdef const Ctx* c = &self.ctx
        cdef double p = fget(&self.p1, w)
        cdef int64_t pos
        cdef double value, lower
        if not c.has2:
            a2[0] = 0.0
            return p
        pos = lower_bound(&self.w2, lo, hi, w)
        lower = c.g2v * p
        if pos < hi and iget(&self.w2, pos) == w:
            value = self._value(&self.a2, &self.table2, pos)
            a2[0] = value
            return value + lower if self.interpolated else value
        a2[0] = 0.0
        return 0.0 + lower if self.interpolated else lower

    cdef inline double _p3(self, int64_t w, double p2, int64_t lo, int64_t hi, double* a3) noexcept nogil:
        """P(w | u v) from P2, its stored value searched for in w3[lo:hi)."""
        cdef const Ctx* c = &self.ctx
        cdef int64_t pos
        cdef double value, lower
        if not c.has3:
            a3[0] = 0.0
            return p2
        pos = self._lb3(lo, hi, w)
        lower = c.gamma3 * p2
        if pos < hi and self._w3(pos) == w:
            value = self._value(&self.a3, &self.table3, pos)
            a3[0] = value
            return value + lower if self.interpolated else value
        a3[0] = 0.0
        return 0.0 + lower if self.interpolated else lower

    cdef inline double _unstored(self, double p) noexcept nogil:
        """The score of a word stored at neither level (class C), from its P1."""
        cdef const Ctx* c = &self.ctx
        if c.has2:
            p = c.g2v * p
        if c.has3:
            p = c.gamma3 * p
        return p

    cdef inline int _order(self, double total, double a2, double a3) noexcept nogil:
        """Which order (1, 2 or 3) supplied most of a probability (ties to the higher order)."""
        cdef double from3 = a3
        cdef double from2 = self.ctx.gamma3 * a2 if self.ctx.has3 else a2
        cdef double from1
        if not self.interpolated:
            return 3 if from3 > 0 else (2 if from2 > 0 else 1)
        from1 = total - from3 - from2
        if from3 >= from2 and from3 >= from1:
            return 3
        return 2 if from2 >= from1 else 1

    # ------------------------------------------------------------ k best
    cdef int _reserve(self, int64_t k) except -1:
        cdef void* p
        if k > self.capacity:
            p = realloc(self.best.score, k * sizeof(double))
            if p == NULL:
                raise MemoryError()
            self.best.score = <double*>p
            p = realloc(self.best.ids, k * sizeof(int64_t))
            if p == NULL:
                raise MemoryError()
            self.best.ids = <int64_t*>p
            p = realloc(self.best.a2, k * sizeof(double))
            if p == NULL:
                raise MemoryError()
            self.best.a2 = <double*>p
            p = realloc(self.best.a3, k * sizeof(double))
            if p == NULL:
                raise MemoryError()
            self.best.a3 = <double*>p
            self.capacity = k
        self.best.n = 0
        self.best.k = k
        return 0

    cdef inline bint _enters(self, double s, int64_t w) noexcept nogil:
        """Whether a word with score s would enter the k best."""
        cdef Best* b = &self.best
        cdef double last
        if b.n < b.k:
            return True
        last = b.score[b.k - 1]
        return s > last or (s == last and w < b.ids[b.k - 1])

    cdef inline void _insert(self, double s, int64_t w, double a2, double a3, bint dedupe) noexcept nogil:
        """Insert a candidate into the k best (probability descending, ties by id ascending)."""
        cdef Best* b = &self.best
        cdef int64_t lo, hi, mid, moved, i
        if not self._enters(s, w):
            return
        if dedupe:
            for i in range(b.n):
                if b.ids[i] == w:
                    return
        lo = 0
        hi = b.n
        while lo < hi:
            mid = (lo + hi) >> 1
            if b.score[mid] > s or (b.score[mid] == s and b.ids[mid] < w):
                lo = mid + 1
            else:
                hi = mid
        moved = (b.n if b.n < b.k else b.k - 1) - lo
        if moved > 0:
            memmove(&b.score[lo + 1], &b.score[lo], moved * sizeof(double))
            memmove(&b.ids[lo + 1], &b.ids[lo], moved * sizeof(int64_t))
            memmove(&b.a2[lo + 1], &b.a2[lo], moved * sizeof(double))
            memmove(&b.a3[lo + 1], &b.a3[lo], moved * sizeof(double))
        b.score[lo] = s
        b.ids[lo] = w
        b.a2[lo] = a2
        b.a3[lo] = a3
        if b.n < b.k:
            b.n += 1

    # --------------------------------------------------------------- classes
    cdef void _score_words(self, int64_t start, int64_t stop, int64_t a_lo, int64_t a_hi, bint dedupe) noexcept nogil:
        """Score the context's bigram words at positions [start, stop) exactly (classes A and B)."""
        cdef int64_t pos, w
        cdef double value, p2, p3, a3
        cdef double lower
        cdef double g2v = self.ctx.g2v
        for pos in range(start, stop):
            w = iget(&self.w2, pos)
            value = self._value(&self.a2, &self.table2, pos)
            lower = g2v * fget(&self.p1, w)
            p2 = value + lower if self.interpolated else value
            p3 = self._p3(w, p2, a_lo, a_hi, &a3)
            self._insert(p3, w, value, a3, dedupe)

    cdef void _class_a_whole(self, int64_t a_start, int64_t a_stop, int64_t b_start, int64_t b_stop, bint dedupe) noexcept nogil:
        """Score every class-A word of the range (trigram positions [a_start, a_stop))."""
        cdef int64_t pos, w
        cdef double p2, p3, a2, a3
        for pos in range(a_start, a_stop):
            w = self._w3(pos)
            p2 = self._p2(w, b_start, b_stop, &a2)
            p3 = self._p3(w, p2, a_start, a_stop, &a3)
            self._insert(p3, w, a2, a3, dedupe)

    cdef void _class_a(self, int64_t lo, int64_t hi, int64_t a_start, int64_t a_stop, int64_t b_start, int64_t b_stop) noexcept nogil:
        """Class A from the pair's ranked list (ordered by the score itself, ties by id)."""
        cdef const Ctx* c = &self.ctx
        cdef int64_t n = a_stop - a_start
        cdef int64_t budget = 32 * n + 256
        cdef int64_t j, w
        cdef double p2, p3, a2, a3
        if n <= SCORE_ALL or c.r3hi <= c.r3lo:
            self._class_a_whole(a_start, a_stop, b_start, b_stop, False)
            return
        j = c.r3lo
        while j < c.r3hi:
            if j - c.r3lo > budget:
                self._class_a_whole(a_start, a_stop, b_start, b_stop, True)
                return
            w = iget(&self.r3ids, j)
            j += 1
            if w < lo or w >= hi:
                continue
            p2 = self._p2(w, b_start, b_stop, &a2)
            p3 = self._p3(w, p2, a_start, a_stop, &a3)
            if not self._enters(p3, w):
                return  # the list is in score order: no later word enters
            self._insert(p3, w, a2, a3, False)

    cdef void _class_b_whole(self, int64_t b_start, int64_t b_stop, int64_t a_start, int64_t a_stop, bint dedupe) noexcept nogil:
        """Score every class-B word of the range: bigram words of the range not stored after the pair."""
        cdef int64_t pos, w, at
        cdef double value, p2, lower, s
        cdef const Ctx* c = &self.ctx
        for pos in range(b_start, b_stop):
            w = iget(&self.w2, pos)
            if a_stop > a_start:
                at = self._lb3(a_start, a_stop, w)
                if at < a_stop and self._w3(at) == w:
                    continue
            value = self._value(&self.a2, &self.table2, pos)
            lower = c.g2v * fget(&self.p1, w)
            p2 = value + lower if self.interpolated else value
            # Not stored after the pair: P = 0.0 + gamma3 * P2 (interpolated) or gamma3 * P2.
            if c.has3:
                s = 0.0 + c.gamma3 * p2 if self.interpolated else c.gamma3 * p2
            else:
                s = p2
            self._insert(s, w, value, 0.0, dedupe)

    cdef inline double _b_key(self, int64_t w, double* a2) noexcept nogil:
        """P2 of a word listed after v (the key of v's ranked list)."""
        return self._p2(w, self.ctx.lo2, self.ctx.hi2, a2)

    cdef void _class_b(self, int64_t lo, int64_t hi, int64_t b_start, int64_t b_stop, int64_t a_start, int64_t a_stop) noexcept nogil:
        """Class B from v's ranked list (ordered by P2; the class score is gamma3 * P2)."""
        cdef const Ctx* c = &self.ctx
        cdef int64_t n = (b_stop - b_start) - (a_stop - a_start)
        cdef int64_t budget = 32 * (b_stop - b_start) + 256
        cdef int64_t j, w, at, low, high, mid, x
        cdef double key, s, a2, other, unused
        if n <= 0:
            return
        if c.r2hi <= c.r2lo or (c.has3 and c.gamma3 == 0.0):
            # No list, or every class score is 0 and ties go by id, the order of the words themselves.
            self._class_b_whole(b_start, b_stop, a_start, a_stop, False)
            return
        j = c.r2lo
        while j < c.r2hi:
            if j - c.r2lo > budget:
                self._class_b_whole(b_start, b_stop, a_start, a_stop, True)
                return
            w = iget(&self.r2ids, j)
            j += 1
            if w < lo or w >= hi:
                continue
            key = self._b_key(w, &a2)
            if c.has3:
                s = 0.0 + c.gamma3 * key if self.interpolated else c.gamma3 * key
            else:
                s = key
            if not self._enters(s, w):
                if s < self.best.score[self.best.k - 1]:
                    return  # scores never rise along the list
                # A tie with a larger id: the rest of this key's run has larger ids still.
                low = j
                high = c.r2hi
                while low < high:
                    mid = low + ((high - low) >> 1)
                    x = iget(&self.r2ids, mid)
                    other = self._b_key(x, &unused)
                    if other >= key:
                        low = mid + 1
                    else:
                        high = mid
                j = low
                continue
            if a_stop > a_start:
                at = self._lb3(a_start, a_stop, w)
                if at < a_stop and self._w3(at) == w:
                    continue
            self._insert(s, w, a2, 0.0, False)

    cdef int _class_c(self, int64_t lo, int64_t hi, int64_t order_start, int64_t b_start, int64_t b_stop) except -1:
        """Class C: words of the range stored after neither v nor the pair, by P1 (the class score's key)."""
        cdef const Ctx* c = &self.ctx
        cdef int64_t span = hi - lo
        cdef int64_t j, w, at, low, high, mid, end
        cdef double key, s
        cdef Best* b = &self.best
        if (c.has2 and c.g2v == 0.0) or (c.has3 and c.gamma3 == 0.0):
            # Every class-C score is 0: ties go by id, so walk the range in id order.
            for w in range(lo, hi):
                if b.n >= b.k and (b.score[b.k - 1] > 0.0 or w > b.ids[b.k - 1]):
                    break
                if b_stop > b_start:
                    at = lower_bound(&self.w2, b_start, b_stop, w)
                    if at < b_stop and iget(&self.w2, at) == w:
                        continue
                self._insert(self._unstored(fget(&self.p1, w)), w, 0.0, 0.0, False)
            return 0
        if order_start < 0:
            # A short range keeps no list: score it whole.
            for w in range(lo, hi):
                if b_stop > b_start:
                    at = lower_bound(&self.w2, b_start, b_stop, w)
                    if at < b_stop and iget(&self.w2, at) == w:
                        continue
                self._insert(self._unstored(fget(&self.p1, w)), w, 0.0, 0.0, False)
            return 0
        end = order_start + span
        if end > self.order.n or order_start > self.order.n:
            raise IndexError("the prefix range's list runs past the order list")
        j = order_start
        while j < end:
            w = iget(&self.order, j)
            j += 1
            key = fget(&self.p1, w)
            s = self._unstored(key)
            if not self._enters(s, w):
                if s < b.score[b.k - 1]:
                    return 0
                low = j
                high = end
                while low < high:
                    mid = low + ((high - low) >> 1)
                    if fget(&self.p1, iget(&self.order, mid)) >= key:
                        low = mid + 1
                    else:
                        high = mid
                j = low
                continue
            if b_stop > b_start:
                at = lower_bound(&self.w2, b_start, b_stop, w)
                if at < b_stop and iget(&self.w2, at) == w:
                    continue
            self._insert(s, w, 0.0, 0.0, False)
        return 0

    cdef int _top(self, int64_t u, int64_t v, int64_t lo, int64_t hi, int64_t order_start, int64_t k) except -1:
        """Fill ``self.best`` with the exact k best words of [lo, hi) after (u, v)."""
        cdef const Ctx* c
        cdef int64_t b_start, b_stop, a_start, a_stop, nb
        if k < 1:
            raise ValueError("k must be at least 1")
        if lo < 0 or hi > self.size or lo > hi:
            raise IndexError(f"id range [{lo}, {hi}) is outside the vocabulary")
        self._context(u, v)
        c = &self.ctx
        self._reserve(min(k, hi - lo) if hi > lo else 1)
        if hi <= lo:
            return 0
        b_start = b_stop = a_start = a_stop = 0
        if c.has2:
            b_start = lower_bound(&self.w2, c.lo2, c.hi2, lo)
            b_stop = lower_bound(&self.w2, b_start, c.hi2, hi)
        if c.has3:
            a_start = self._lb3(c.lo3, c.hi3, lo)
            a_stop = self._lb3(a_start, c.hi3, hi)
        nb = b_stop - b_start
        if nb <= SCORE_ALL:
            self._score_words(b_start, b_stop, a_start, a_stop, False)
        else:
            if a_stop > a_start:
                self._class_a(lo, hi, a_start, a_stop, b_start, b_stop)
            self._class_b(lo, hi, b_start, b_stop, a_start, a_stop)
        self._class_c(lo, hi, order_start, b_start, b_stop)
        return 0

    # ------------------------------------------------------------- entries
    def bind_suggestions(self, made, display, tuple tail=()):
        """Let :meth:`suggest` build finished suggestions.

        Args:
            made: the tuple subclass to build, whose fields start (word, prob, order, id).
            display: maps a word id to its display form (asked once per id).
            tail: the values of the fields after those four, the same in every suggestion.
        """
        if not (isinstance(made, type) and issubclass(made, tuple) and made.__basicsize__ == tuple.__basicsize__):
            raise TypeError("suggestions must be a tuple type without fields of its own (a named tuple)")
        self._made = made
        self._tail = tail
        self._display = display
        self._forms = [None] * self.size

    cdef list _suggestions(self):
        cdef Best* b = &self.best
        cdef int64_t i, w
        cdef list out = []
        cdef list forms = self._forms
        cdef type made = self._made
        # tuple's own constructor, called directly: the made type adds no fields to a tuple.
        cdef PyTypeObject* base = <PyTypeObject*>tuple
        for i in range(b.n):
            w = b.ids[i]
            form = forms[w]
            if form is None:
                form = self._display(w)
                forms[w] = form
            fields = ((form, b.score[i], self._order(b.score[i], b.a2[i], b.a3[i]), w) + self._tail,)
            out.append(base.tp_new(made, <PyObject*>fields, NULL))
        return out

    def suggest(self, int64_t u, int64_t v, int64_t lo, int64_t hi, int64_t order_start, int64_t k):
        """:meth:`top` as a list of suggestions (see :meth:`bind_suggestions`), best first."""
        if self._forms is None:
            raise RuntimeError("bind_suggestions() first")
        self._top(u, v, lo, hi, order_start, k)
        return self._suggestions()

    def top(self, int64_t u, int64_t v, int64_t lo, int64_t hi, int64_t order_start, int64_t k):
        """The exact k best words of the id range [lo, hi) after context (u, v).

        Args:
            u, v: context ids (0 .. V + 2).
            lo, hi: the prefix's id range inside [0, V).
            order_start: where the range's unigram list starts in ``vocab.order``, or -1 for none.
            k: how many at most (positive).

        Returns:
            ``(ids, probs, orders)``: three lists, best first, ties by id ascending.
        """
        cdef int64_t i
        cdef Best* b = &self.best
        self._top(u, v, lo, hi, order_start, k)
        ids = [b.ids[i] for i in range(b.n)]
        probs = [b.score[i] for i in range(b.n)]
        orders = [self._order(b.score[i], b.a2[i], b.a3[i]) for i in range(b.n)]
        return ids, probs, orders

    def top_ids(self, int64_t u, int64_t v, int64_t lo, int64_t hi, int64_t order_start, int64_t k):
        """:meth:`top` without the probabilities and orders: the ids, best first."""
        cdef int64_t i
        cdef Best* b = &self.best
        self._top(u, v, lo, hi, order_start, k)
        return [b.ids[i] for i in range(b.n)]

    def steps(self, int64_t u, int64_t v, list ranges, int64_t k, int64_t stop_id):
        """The k best ids for several prefix ranges of one context, in one call.

        Args:
            u, v: context ids.
            ranges: ``(lo, hi, order_start)`` per step, or None where no word has the prefix.
            k: how many per step.
            stop_id: stop after the first step whose list holds this id (-1: never).

        Returns:
            One list of suggestions per step answered (as :meth:`suggest`);
            the answers end after the first empty list or the first list
            holding ``stop_id``.
        """
        cdef int64_t i, lo, hi, start
        cdef Best* b = &self.best
        cdef bint found
        if self._forms is None:
            raise RuntimeError("bind_suggestions() first")
        out = []
        for item in ranges:
            if item is None:
                out.append([])
                break
            lo, hi, start = item
            self._top(u, v, lo, hi, start, k)
            out.append(self._suggestions())
            if b.n == 0:
                break
            found = False
            for i in range(b.n):
                if b.ids[i] == stop_id:
                    found = True
                    break
            if found:
                break
        return out

    def probabilities(self, int64_t u, int64_t v, ids, bint with_orders=False):
        """P(w | u v) of outcome ids (words, UNKNOWN, END), and optionally their orders.

        Args:
            u, v: context ids.
            ids: int64 array of shape (n,).
            with_orders: also return the order of each probability.

        Returns:
            float64 array of shape (n,), or ``(probs, orders)`` with orders a list.
        """
        cdef const int64_t[::1] wanted = np.ascontiguousarray(ids, dtype=np.int64)
        cdef int64_t n = wanted.shape[0]
        cdef int64_t i, w
        cdef double p2, p3, a2, a3
        out = np.empty(n, dtype=np.float64)
        cdef double[::1] result = out
        orders = [] if with_orders else None
        self._context(u, v)
        cdef const Ctx* c = &self.ctx
        for i in range(n):
            w = wanted[i]
            if w < 0 or w >= self.size + 2:
                raise IndexError(f"outcome id {w} is outside the model's outcomes")
            p2 = self._p2(w, c.lo2, c.hi2, &a2)
            p3 = self._p3(w, p2, c.lo3, c.hi3, &a3)
            result[i] = p3
            if with_orders:
                orders.append(self._order(p3, a2, a3))
        if with_orders:
            return out, orders
        return out
