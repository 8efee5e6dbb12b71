"""The slip check for new words: one edit (Damerau 1964's four kinds) from a known word."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from test_typos import damerau_distance

from foretype.adapt.slips import looks_like_slip, one_edit_away
from foretype.simulate.typos import misspell

KNOWN = {"harbour", "ferry", "tide", "gorbalt"}


def test_the_four_kinds_of_slip_are_caught_and_real_new_words_are_not():
    known = KNOWN.__contains__
    assert looks_like_slip("harbor", known)  # deletion
    assert looks_like_slip("ferrry", known)  # insertion
    assert looks_like_slip("tdie", known)  # transposition
    assert looks_like_slip("gorbelt", known)  # substitution
    assert not looks_like_slip("saltmarrow", known)
    assert not looks_like_slip("harbour", known)  # a known word is no slip of itself
    assert not looks_like_slip("ti", {"to"}.__contains__)  # too short to tell


@settings(max_examples=40, deadline=None)
@given(st.text(alphabet="abcdefghijklmnopqrstuvwxyz'", min_size=1, max_size=8))
def test_the_candidates_are_exactly_the_strings_one_edit_away(form):
    # Brute force over all strings of length n-1..n+1 would be too large; check both directions instead:
    # every candidate is one edit away, and every misspelling made by the typo model is among them.
    for candidate in set(one_edit_away(form)):
        assert damerau_distance(candidate, form) == 1
    if len(form) >= 2 and "'" not in form:
        for seed in range(5):
            typed, _ = misspell(form, np.random.default_rng(seed))
            assert typed in set(one_edit_away(form))
