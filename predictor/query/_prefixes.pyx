# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""Every prefix of the sorted vocabulary with its id range, in one compiled pass.

The reference is ``vocabulary._prefix_ranges`` (the same walk in Python):
word i brings the prefixes longer than what it shares with word i - 1, in
order of length; a prefix ends at the first word that no longer shares it.
"""

from libc.stdint cimport int64_t

import numpy as np


def prefix_ranges(words):
    """``(prefixes, lo, hi, is_word)`` of sorted words, as ``vocabulary._prefix_ranges`` returns them."""
    cdef list items = list(words)
    cdef Py_ssize_t n = len(items), i, shared, limit, end, wl, depth = 0, count = 0, total = 0, longest = 0
    cdef str word, previous = ""
    for item in items:
        if not isinstance(item, str):
            raise TypeError("words must be strings")
        wl = len(<str>item)
        total += wl
        longest = max(longest, wl)
    lo_array = np.empty(total, dtype=np.int64)
    hi_array = np.empty(total, dtype=np.int64)
    word_array = np.zeros(total, dtype=np.bool_)
    stack_array = np.empty(longest + 1, dtype=np.int64)
    cdef int64_t[::1] lo = lo_array, hi = hi_array, open_at = stack_array
    cdef unsigned char[::1] is_word = word_array.view(np.uint8)
    cdef list prefixes = []
    for i in range(n):
        word = <str>items[i]
        wl = len(word)
        limit = min(wl, len(previous))
        shared = 0
        while shared < limit and word[shared] == previous[shared]:
            shared += 1
        while depth > shared:
            depth -= 1
            hi[open_at[depth]] = i
        for end in range(shared + 1, wl + 1):
            open_at[depth] = count
            depth += 1
            prefixes.append(word[:end])
            lo[count] = i
            hi[count] = -1
            is_word[count] = end == wl
            count += 1
        previous = word
    while depth > 0:
        depth -= 1
        hi[open_at[depth]] = n
    return prefixes, lo_array[:count].copy(), hi_array[:count].copy(), word_array[:count].copy()
