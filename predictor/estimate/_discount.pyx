# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""Discounting grouped counts in one compiled pass: what ``kneser_ney._discounted`` does with numpy.

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
