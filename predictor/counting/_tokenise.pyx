# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""Tokenising and numbering in one compiled pass: what ``TOKEN_RE.findall`` and a dictionary walk do, per code point.

The reference is :data:`foretype.text.TOKEN_RE` over text already passed
through :func:`foretype.text.prepare`: a word is a letter or digit (``\\w``:
``str.isalnum``, the test the regular expression engine applies) followed by
letters, digits and the combining marks of ``text._MARKS``, runs of which may
be joined by an apostrophe (' or ’), a hyphen, or, between two decimal digits,
by ``.``, ``,`` or ``:``; a run of ``. ! ? … 。 ！ ？`` is one sentence-end
token; a line break is one token; everything else separates tokens.  The
greedy regular expression takes the longest such word at the leftmost place,
and so does this scan.

The forms are numbered in a :class:`FormTable`, an open-addressing hash table
over the forms' code points, so a token already met costs a hash and a compare
of its code points, and no string object; only a new form becomes a ``str``.
"""

from cpython.mem cimport PyMem_Free, PyMem_Malloc, PyMem_Realloc
from cpython.unicode cimport PyUnicode_DATA, PyUnicode_GET_LENGTH, PyUnicode_KIND, PyUnicode_READ, PyUnicode_Substring, Py_UNICODE_ISALNUM, Py_UNICODE_ISDECIMAL
from libc.stdint cimport int32_t, int64_t, uint64_t
from libc.string cimport memset

import numpy as np


cdef inline bint is_mark(Py_UCS4 c) noexcept nogil:
    """The combining marks of ``text._MARKS`` (the ranges NFC cannot fold into a letter)."""
    if c < 0x0300:
        return False
    return (
        (0x0300 <= c <= 0x036F) or (0x0483 <= c <= 0x0489) or (0x0591 <= c <= 0x05C7) or (0x0610 <= c <= 0x061A)
        or (0x064B <= c <= 0x065F) or c == 0x0670 or (0x06D6 <= c <= 0x06ED) or (0x0900 <= c <= 0x0903)
        or (0x093A <= c <= 0x094F) or (0x0951 <= c <= 0x0957) or c == 0x0962 or c == 0x0963
        or (0x1AB0 <= c <= 0x1AFF) or (0x1DC0 <= c <= 0x1DFF) or (0x20D0 <= c <= 0x20FF) or (0xFE20 <= c <= 0xFE2F)
    )


cdef inline bint is_word(Py_UCS4 c) noexcept:
    # \w of a str pattern: alphanumeric or the underscore (prepare() turned underscores into spaces).
    if c < 0x80:
        return (0x61 <= c <= 0x7A) or (0x41 <= c <= 0x5A) or (0x30 <= c <= 0x39) or c == 0x5F
    return Py_UNICODE_ISALNUM(c)


cdef inline bint is_word_char(Py_UCS4 c) noexcept:
    return is_word(c) or is_mark(c)


cdef inline bint is_decimal(Py_UCS4 c) noexcept:
    if c < 0x80:
        return 0x30 <= c <= 0x39
    return Py_UNICODE_ISDECIMAL(c)


cdef inline bint is_end(Py_UCS4 c) noexcept nogil:
    return c == 0x2E or c == 0x21 or c == 0x3F or c == 0x2026 or c == 0x3002 or c == 0xFF01 or c == 0xFF1F


cdef inline uint64_t mix(uint64_t h) noexcept nogil:
    h ^= h >> 33
    h *= 0xFF51AFD7ED558CCDULL
    h ^= h >> 33
    return h


cdef class FormTable:
    """Written forms numbered 0, 1, 2, ... in order of first appearance (what a worker's dictionary holds).

    Attributes:
        fresh: forms numbered since it was last emptied, in order (the caller empties it).
        bytes: what the caller counts this table as holding (the table does not update it).
    """

    cdef int32_t* slots
    cdef uint64_t mask
    cdef uint64_t* hashes
    cdef int64_t* starts
    cdef int32_t* lengths
    cdef Py_ssize_t size
    cdef Py_ssize_t room
    cdef Py_UCS4* chars
    cdef int64_t chars_used
    cdef int64_t chars_room
    cdef public list fresh
    cdef public long long bytes

    def __cinit__(self):
        self.fresh = []
        self.bytes = 0
        self.size = 0
        self.room = 1 << 12
        self.mask = (1 << 13) - 1
        self.chars_used = 0
        self.chars_room = 1 << 16
        self.slots = <int32_t*>PyMem_Malloc((self.mask + 1) * sizeof(int32_t))
        self.hashes = <uint64_t*>PyMem_Malloc(self.room * sizeof(uint64_t))
        self.starts = <int64_t*>PyMem_Malloc(self.room * sizeof(int64_t))
        self.lengths = <int32_t*>PyMem_Malloc(self.room * sizeof(int32_t))
        self.chars = <Py_UCS4*>PyMem_Malloc(self.chars_room * sizeof(Py_UCS4))
        if not (self.slots and self.hashes and self.starts and self.lengths and self.chars):
            raise MemoryError()
        memset(self.slots, 0xFF, (self.mask + 1) * sizeof(int32_t))

    def __dealloc__(self):
        PyMem_Free(self.slots)
        PyMem_Free(self.hashes)
        PyMem_Free(self.starts)
        PyMem_Free(self.lengths)
        PyMem_Free(self.chars)

    def __len__(self):
        return self.size

    cdef int grow_forms(self) except -1:
        cdef Py_ssize_t room = 2 * self.room
        cdef void* p
        p = PyMem_Realloc(self.hashes, room * sizeof(uint64_t))
        if not p:
            raise MemoryError()
        self.hashes = <uint64_t*>p
        p = PyMem_Realloc(self.starts, room * sizeof(int64_t))
        if not p:
            raise MemoryError()
        self.starts = <int64_t*>p
        p = PyMem_Realloc(self.lengths, room * sizeof(int32_t))
        if not p:
            raise MemoryError()
        self.lengths = <int32_t*>p
        self.room = room
        return 0

    cdef int grow_slots(self) except -1:
        cdef uint64_t mask = 2 * self.mask + 1, at
        cdef Py_ssize_t k
        cdef int32_t* slots = <int32_t*>PyMem_Malloc((mask + 1) * sizeof(int32_t))
        if not slots:
            raise MemoryError()
        memset(slots, 0xFF, (mask + 1) * sizeof(int32_t))
        for k in range(self.size):
            at = self.hashes[k] & mask
            while slots[at] >= 0:
                at = (at + 1) & mask
            slots[at] = <int32_t>k
        PyMem_Free(self.slots)
        self.slots = slots
        self.mask = mask
        return 0

    cdef int grow_chars(self, int64_t need) except -1:
        cdef int64_t room = self.chars_room
        while room < need:
            room *= 2
        cdef void* p = PyMem_Realloc(self.chars, room * sizeof(Py_UCS4))
        if not p:
            raise MemoryError()
        self.chars = <Py_UCS4*>p
        self.chars_room = room
        return 0

    cdef int32_t number(self, str text, int kind, void* data, Py_ssize_t start, Py_ssize_t stop) except -1:
        """The number of ``text[start:stop]``, numbering it (and keeping it in ``fresh``) if new."""
        cdef uint64_t h = 0x9E3779B97F4A7C15ULL
        cdef Py_ssize_t k, length = stop - start
        cdef int32_t found
        cdef Py_UCS4* known
        for k in range(start, stop):
            h = (h ^ <uint64_t>PyUnicode_READ(kind, data, k)) * 0x100000001B3ULL
        h = mix(h ^ <uint64_t>length)
        cdef uint64_t at = h & self.mask
        while True:
            found = self.slots[at]
            if found < 0:
                break
            if self.hashes[found] == h and self.lengths[found] == length:
                known = self.chars + self.starts[found]
                for k in range(length):
                    if known[k] != PyUnicode_READ(kind, data, start + k):
                        break
                else:
                    return found
            at = (at + 1) & self.mask
        # A new form.
        if self.size >= 0x7FFFFFFF:
            raise OverflowError("too many forms for one table")
        if self.size == self.room:
            self.grow_forms()
        if self.chars_used + length > self.chars_room:
            self.grow_chars(self.chars_used + length)
        found = <int32_t>self.size
        for k in range(length):
            self.chars[self.chars_used + k] = PyUnicode_READ(kind, data, start + k)
        self.hashes[found] = h
        self.starts[found] = self.chars_used
        self.lengths[found] = <int32_t>length
        self.chars_used += length
        self.slots[at] = found
        self.size += 1
        self.fresh.append(PyUnicode_Substring(text, start, stop))
        if 2 * self.size > <Py_ssize_t>self.mask:
            self.grow_slots()
        return found


def number_tokens(str text, FormTable numbers):
    """The tokens of prepared text, each as its number in ``numbers``.

    Args:
        text: text passed through :func:`foretype.text.prepare`.
        numbers: the forms met so far; a form not in it gets the next number
            (``len(numbers)``) and is appended to ``numbers.fresh``.

    Returns:
        int32 array: each token's number, in order.
    """
    cdef Py_ssize_t n = PyUnicode_GET_LENGTH(text)
    cdef int kind = PyUnicode_KIND(text)
    cdef void* data = PyUnicode_DATA(text)
    cdef Py_ssize_t i = 0, start, j, count = 0
    cdef Py_UCS4 c, d
    cdef int32_t[::1] out
    cdef object grown
    result = np.empty(max(16, n // 4), dtype=np.int32)
    out = result
    while i < n:
        c = PyUnicode_READ(kind, data, i)
        start = i
        if is_word(c):
            i += 1
            while i < n and is_word_char(PyUnicode_READ(kind, data, i)):
                i += 1
            # Joined runs: a joiner followed by at least one word character.
            while i + 1 < n:
                c = PyUnicode_READ(kind, data, i)
                if c == 0x27 or c == 0x2019 or c == 0x2D:
                    pass
                elif (c == 0x2E or c == 0x2C or c == 0x3A) and is_decimal(PyUnicode_READ(kind, data, i - 1)) and is_decimal(PyUnicode_READ(kind, data, i + 1)):
                    pass
                else:
                    break
                if not is_word_char(PyUnicode_READ(kind, data, i + 1)):
                    break
                i += 2
                while i < n and is_word_char(PyUnicode_READ(kind, data, i)):
                    i += 1
        elif is_end(c):
            i += 1
            while i < n and is_end(PyUnicode_READ(kind, data, i)):
                i += 1
        elif c == 0x0A:
            i += 1
        else:
            i += 1
            continue
        if count == out.shape[0]:
            grown = np.empty(2 * count, dtype=np.int32)
            grown[:count] = result
            result = grown
            out = result
        out[count] = numbers.number(text, kind, data, start, i)
        count += 1
    return result[:count].copy() if count * 2 < out.shape[0] else result[:count]
