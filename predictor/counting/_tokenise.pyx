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
"""

from cpython.dict cimport PyDict_GetItem, PyDict_SetItem
from cpython.object cimport PyObject
from cpython.unicode cimport PyUnicode_DATA, PyUnicode_GET_LENGTH, PyUnicode_KIND, PyUnicode_READ, PyUnicode_Substring, Py_UNICODE_ISALNUM, Py_UNICODE_ISDECIMAL
from libc.stdint cimport int32_t

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


def number_tokens(str text, numbers, list fresh):
    """The tokens of prepared text, each as its number in ``numbers``.

    Args:
        text: text passed through :func:`foretype.text.prepare`.
        numbers: form -> number (a dict or a subclass); a form not in it gets the next number (``len(numbers)``)
            and is appended to ``fresh`` (its ``__missing__``, if any, is not called).
        fresh: where new forms go, in order of first appearance.

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
    cdef PyObject* found
    cdef int32_t number
    if not isinstance(numbers, dict):
        raise TypeError("numbers must be a dict")
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
        token = PyUnicode_Substring(text, start, i)
        found = PyDict_GetItem(numbers, token)
        if found is NULL:
            number = <int32_t>len(numbers)
            PyDict_SetItem(numbers, token, number)
            fresh.append(token)
        else:
            number = <int32_t><object>found
        if count == out.shape[0]:
            grown = np.empty(2 * count, dtype=np.int32)
            grown[:count] = result
            result = grown
            out = result
        out[count] = number
        count += 1
    return result[:count].copy() if count * 2 < out.shape[0] else result[:count]
