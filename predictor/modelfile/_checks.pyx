# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True
"""Compiled load checks: one pass where numpy needs several temporary arrays.

The reference is the numpy check in :func:`foretype.modelfile.integrity._check_tail_positions`;
both accept and refuse the same files (tests/modelfile/test_compiled_checks.py).
Indexing is unchecked: the caller has already checked what the loop relies on (``packed_words`` holds
``n2`` ids, ``off3`` is non-decreasing and ends within ``tails``); each id is checked here before use.
"""

from libc.stdint cimport int64_t, uint8_t, uint16_t


def tails_fit(const uint8_t[::1] packed_words, const int64_t[::1] lengths, const int64_t[::1] off3, const uint16_t[::1] tails, Py_ssize_t n2):
    """Whether every level-3 position lies inside its pair's last word's bigram list.

    Args:
        packed_words: ``l2.word`` as three bytes per id, least significant first.
        lengths: each word's bigram-list length (``np.diff(l2.off)``).
        off3: level-3 offsets (at least ``n2 + 1``, non-decreasing, within ``tails``).
        tails: ``l3.tail``.
        n2: the level-2 entries before the sentence start.
    """
    cdef Py_ssize_t i, w, known = lengths.shape[0]
    cdef int64_t j, limit
    for i in range(n2):
        if off3[i] == off3[i + 1]:
            continue
        w = packed_words[3 * i] | (packed_words[3 * i + 1] << 8) | (packed_words[3 * i + 2] << 16)
        if w >= known:
            return False
        limit = lengths[w]
        for j in range(off3[i], off3[i + 1]):
            if tails[j] >= limit:
                return False
    return True


def packed_largest(const uint8_t[::1] packed_ids):
    """The largest id of a section of three-byte ids, least significant byte first (0 when empty)."""
    cdef Py_ssize_t i, count = packed_ids.shape[0] // 3
    cdef int64_t best = 0, value
    for i in range(count):
        value = packed_ids[3 * i] | (packed_ids[3 * i + 1] << 8) | (packed_ids[3 * i + 2] << 16)
        if value > best:
            best = value
    return best
