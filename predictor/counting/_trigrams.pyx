# cython: language_level=3, boundscheck=False, wraparound=False, cdivision=True, initializedcheck=False, nonecheck=False
"""Compiled steps of trigram counting: the keys of complete sentences, and merging sorted tables.

``count_sentences`` does what ``CorpusCounter._count_sentences`` does with numpy.

The reference is the numpy path of
:meth:`foretype.counting.counter.CorpusCounter._count_sentences`: empty
sentences are dropped, each word's written form is counted as sentence-initial
or not, every sentence is padded as ``<s> <s> w1 .. wn </s>`` and each of its
trigrams becomes one key of three 21-bit raw type ids; the trigrams of every
``held_every``-th sentence also go to a held-out list.
"""

from libc.stdint cimport int32_t, int64_t

import numpy as np

cdef enum:
    ID_BITS = 21  # tables.ID_BITS
    RAW_START = 0  # tables.RAW_START
    RAW_END = 1  # tables.RAW_END


def count_sentences(
    const int32_t[::1] fids,
    const int32_t[::1] tids,
    int64_t[::1] initial,
    int64_t[::1] noninitial,
    int64_t[::1] type_counts,
    int64_t first_sentence,
    int64_t held_every,
):
    """Count complete sentences of raw type ids (the arrays end with a sentence end).

    Args:
        fids: each token's written-form id (-1 outside the dictionary).
        tids: each token's raw type id (``RAW_END`` for a sentence end).
        initial, noninitial: per written form, its sentence-initial and other occurrences (added to).
        type_counts: per raw type, the trigrams ending in it (added to).
        first_sentence: the number of the first sentence (for the held-out choice).
        held_every: every ``held_every``-th sentence (the last of each run) is held out as well.

    Returns:
        (keys, held keys, words, sentences): int64 trigram keys in order, those of the
        held-out sentences, the number of words and of (non-empty) sentences.
    """
    cdef Py_ssize_t n = tids.shape[0], i, count = 0, held_count = 0
    cdef int64_t u = RAW_START, v = RAW_START, t, f, key, words = 0, sentence = first_sentence
    cdef bint after_end = True, held = (sentence % held_every) == held_every - 1
    keys_array = np.empty(n, dtype=np.int64)
    held_array = np.empty(n, dtype=np.int64)
    cdef int64_t[::1] keys = keys_array
    cdef int64_t[::1] held_keys = held_array
    for i in range(n):
        t = tids[i]
        if t == RAW_END:
            if after_end:
                continue  # the end of an empty sentence
            key = (u << (2 * ID_BITS)) | (v << ID_BITS) | RAW_END
            sentence += 1
            u = v = RAW_START
            after_end = True
        else:
            f = fids[i]
            if f >= 0:
                if after_end:
                    initial[f] += 1
                else:
                    noninitial[f] += 1
            words += 1
            key = (u << (2 * ID_BITS)) | (v << ID_BITS) | t
            u = v
            v = t
            after_end = False
        type_counts[t] += 1
        keys[count] = key
        count += 1
        if held:
            held_keys[held_count] = key
            held_count += 1
        if after_end:
            held = (sentence % held_every) == held_every - 1
    return keys_array[:count], held_array[:held_count].copy(), words, sentence - first_sentence


def merge_counts(const int64_t[::1] keys_a, const int64_t[::1] counts_a, const int64_t[::1] keys_b, const int64_t[::1] counts_b):
    """Merge two tables of sorted unique keys with counts in one linear pass, summing shared keys.

    Returns:
        (keys, counts): int64 arrays, sorted and unique.
    """
    cdef Py_ssize_t na = keys_a.shape[0], nb = keys_b.shape[0], i = 0, j = 0, k = 0
    keys_array = np.empty(na + nb, dtype=np.int64)
    counts_array = np.empty(na + nb, dtype=np.int64)
    cdef int64_t[::1] keys = keys_array
    cdef int64_t[::1] counts = counts_array
    with nogil:
        while i < na and j < nb:
            if keys_a[i] < keys_b[j]:
                keys[k] = keys_a[i]
                counts[k] = counts_a[i]
                i += 1
            elif keys_b[j] < keys_a[i]:
                keys[k] = keys_b[j]
                counts[k] = counts_b[j]
                j += 1
            else:
                keys[k] = keys_a[i]
                counts[k] = counts_a[i] + counts_b[j]
                i += 1
                j += 1
            k += 1
        while i < na:
            keys[k] = keys_a[i]
            counts[k] = counts_a[i]
            i += 1
            k += 1
        while j < nb:
            keys[k] = keys_b[j]
            counts[k] = counts_b[j]
            j += 1
            k += 1
    if k == na + nb:
        return keys_array, counts_array
    return keys_array[:k].copy(), counts_array[:k].copy()
