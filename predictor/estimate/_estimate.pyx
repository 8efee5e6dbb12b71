# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""Compiled steps of estimation: discounting grouped counts, and grouping trigram rows by their tails.

``discounted`` does in one pass what ``kneser_ney._discounted`` does with numpy.

Every step is the same IEEE double operation in the same order as the numpy
path (the extension is compiled without fused multiply-add), and the group
totals are exact integers (below 2 ** 53) either way, so the results are
identical to the last bit.
"""

from libc.stdint cimport int64_t

import numpy as np


def discounted(const int64_t[::1] counts, const int64_t[::1] offsets, double d1, double d2, double d3):
    """Return (discounted values, lower-order weights) for counts grouped by ``offsets``.

    ``value = (count - D(count)) / total`` of its group, with ``D`` 0, d1, d2 or d3
    for counts 0, 1, 2 and 3 or more; a group's weight is
    ``(d1 * ones + d2 * twos + d3 * more) / total``, or 1 for an empty group.
    """
    cdef Py_ssize_t groups = offsets.shape[0] - 1, g, i, lo, hi
    cdef int64_t c, total, ones, twos, more
    cdef double t, subtract
    values_array = np.empty(counts.shape[0], dtype=np.float64)
    gamma_array = np.empty(max(groups, 0), dtype=np.float64)
    cdef double[::1] values = values_array
    cdef double[::1] gamma = gamma_array
    cdef double table[4]
    table[0] = 0.0
    table[1] = d1
    table[2] = d2
    table[3] = d3
    with nogil:
        for g in range(groups):
            lo = offsets[g]
            hi = offsets[g + 1]
            total = 0
            ones = twos = more = 0
            for i in range(lo, hi):
                c = counts[i]
                total += c
                if c == 1:
                    ones += 1
                elif c == 2:
                    twos += 1
                elif c >= 3:
                    more += 1
            t = <double>total
            for i in range(lo, hi):
                c = counts[i]
                subtract = table[c if c < 3 else 3]
                values[i] = (<double>c - subtract) / t
            if total > 0:
                gamma[g] = (d1 * <double>ones + d2 * <double>twos + d3 * <double>more) / t
            else:
                gamma[g] = 1.0
    return values_array, gamma_array


def tail_groups(const int64_t[::1] order, const int64_t[::1] sorted_tail, const int64_t[::1] n):
    """Number the distinct tails of rows sorted by tail, and sum their counts (what ``Layout.of`` does with numpy).

    Args:
        order: the rows in tail order (``sorted_tail[i]`` is the tail of row ``order[i]``).
        sorted_tail: the tails, sorted.
        n: each row's count.

    Returns:
        (each row's tail number, each tail's summed count, the distinct tails), int64 arrays.
    """
    cdef Py_ssize_t rows = order.shape[0], i, r
    cdef int64_t g = -1, previous = 0
    row_group_array = np.empty(rows, dtype=np.int64)
    sums_array = np.zeros(rows, dtype=np.int64)
    tails_array = np.empty(rows, dtype=np.int64)
    cdef int64_t[::1] row_group = row_group_array
    cdef int64_t[::1] sums = sums_array
    cdef int64_t[::1] tails = tails_array
    for i in range(rows):
        if not 0 <= order[i] < rows:
            raise ValueError("order must be a permutation of the rows")
    with nogil:
        for i in range(rows):
            if g < 0 or sorted_tail[i] != previous:
                g += 1
                previous = sorted_tail[i]
                tails[g] = previous
            r = order[i]
            row_group[r] = g
            sums[g] += n[r]
    return row_group_array, sums_array[: g + 1].copy(), tails_array[: g + 1].copy()


def sorted_positions(const int64_t[::1] haystack, const int64_t[::1] needles):
    """``np.searchsorted(haystack, needles)`` (left side) for sorted needles, in one merging pass."""
    cdef Py_ssize_t size = haystack.shape[0], count = needles.shape[0], k, j = 0
    result_array = np.empty(count, dtype=np.int64)
    cdef int64_t[::1] result = result_array
    for k in range(1, count):
        if needles[k] < needles[k - 1]:
            raise ValueError("needles must be sorted")
    with nogil:
        for k in range(count):
            while j < size and haystack[j] < needles[k]:
                j += 1
            result[k] = j
    return result_array
