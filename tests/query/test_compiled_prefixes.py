"""The compiled prefix walk gives the Python walk's prefix index, and both match the definition by brute force.

Reference: the definition itself (every distinct prefix of the sorted words,
in sorted order, with the first and one-past-last id of the words starting
with it), computed by brute force over all words.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from foretype.query import vocabulary

pytestmark = pytest.mark.skipif(vocabulary._compiled_prefix_ranges is None, reason="the compiled prefix walk is not built")

WORDS = st.lists(st.text(alphabet="abé東'-", min_size=1, max_size=6), max_size=40, unique=True).map(sorted)


def brute_force(words: list[str]) -> tuple[list[str], list[int], list[int], list[bool]]:
    prefixes = sorted({w[:n] for w in words for n in range(1, len(w) + 1)})
    lo = [next(i for i, w in enumerate(words) if w.startswith(p)) for p in prefixes]
    hi = [max(i for i, w in enumerate(words) if w.startswith(p)) + 1 for p in prefixes]
    return prefixes, lo, hi, [words[i] == p for p, i in zip(prefixes, lo)]


@settings(max_examples=200, deadline=None)
@given(WORDS)
def test_compiled_walk_equals_python_walk_and_definition(words: list[str]) -> None:
    ours = vocabulary._compiled_prefix_ranges(words)
    python = vocabulary._prefix_ranges(words)
    assert ours[0] == python[0]
    for mine, theirs in zip(ours[1:], python[1:]):
        assert mine.dtype == theirs.dtype and np.array_equal(mine, theirs)
    prefixes, lo, hi, is_word = brute_force(words)
    assert ours[0] == prefixes
    assert ours[1].tolist() == lo and ours[2].tolist() == hi and ours[3].tolist() == is_word
