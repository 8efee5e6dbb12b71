"""The seeded typo model: documented rate, one single edit per hit word, keyboard-neighbour letters."""

from __future__ import annotations

import re

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from foretype.errors import OptionError
from foretype.simulate.typos import KINDS, NEIGHBOURS, inject_typos, misspell


def damerau_distance(a: str, b: str) -> int:
    """Optimal string alignment distance (Damerau 1964; the restricted edit distance of
    Wagner and Lowrance's textbook dynamic programme, from memory)."""
    d = [[0] * (len(b) + 1) for _ in range(len(a) + 1)]
    for i in range(len(a) + 1):
        d[i][0] = i
    for j in range(len(b) + 1):
        d[0][j] = j
    for i in range(1, len(a) + 1):
        for j in range(1, len(b) + 1):
            cost = a[i - 1] != b[j - 1]
            d[i][j] = min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                d[i][j] = min(d[i][j], d[i - 2][j - 2] + 1)
    return d[len(a)][len(b)]


def test_keyboard_neighbours_match_the_qwerty_layout():
    # Layout facts (common practice, any QWERTY keyboard): s touches a, d, w, e, z, x;
    # q touches w, a; m touches n, j, k.
    assert set(NEIGHBOURS["s"]) == set("adwezx")
    assert set(NEIGHBOURS["q"]) == set("wa")
    assert set(NEIGHBOURS["m"]) == set("njk")
    assert all(ch in NEIGHBOURS[n] for ch, near in NEIGHBOURS.items() for n in near)  # symmetric
    assert len(NEIGHBOURS) == 26


@settings(max_examples=60, deadline=None)
@given(st.text(alphabet="abcdefghijklmnopqrstuvwxyzABCXYZ", min_size=2, max_size=12), st.integers(0, 2**32 - 1))
def test_a_misspelling_is_one_single_edit_away(word, seed):
    typed, kind = misspell(word, np.random.default_rng(seed))
    assert kind in KINDS
    assert typed != word
    assert damerau_distance(typed.lower(), word.lower()) <= 1
    assert len(typed) - len(word) == {"deletion": -1, "insertion": 1}.get(kind, 0)


@settings(max_examples=30, deadline=None)
@given(st.lists(st.sampled_from(["tide", "Gorbalt", "nets", "a", "ferry", "high"]), min_size=1, max_size=30), st.integers(0, 1000))
def test_only_letters_of_hit_words_change_and_the_seed_fixes_the_copy(words, seed):
    text = " ".join(words) + ", at dawn (early).\n"
    typed, typos = inject_typos(text, rate=0.3, seed=seed)
    assert inject_typos(text, rate=0.3, seed=seed) == (typed, typos)
    assert re.sub(r"[A-Za-z]+", "", typed) == re.sub(r"[A-Za-z]+", "", text)
    before, after = re.findall(r"[A-Za-z]+", text), re.findall(r"[A-Za-z]+", typed)
    assert len(before) == len(after)
    hit = {t.index for t in typos}
    assert all(before[i] == after[i] for i in range(len(before)) if i not in hit)
    for t in typos:
        assert before[t.index] == t.original and after[t.index] == t.typed and len(t.original) >= 2


def test_the_rate_is_one_word_in_forty_and_the_kinds_are_even():
    text = " ".join(["harbour"] * 20000)
    _, typos = inject_typos(text, seed=7)
    # Binomial(20000, 1/40): mean 500, sd about 22; 4 sd either side.
    assert 500 - 90 < len(typos) < 500 + 90
    kinds = [t.kind for t in typos]
    assert all(abs(kinds.count(k) - len(typos) / 4) < 60 for k in KINDS)
    assert inject_typos("tide", rate=0.0) == ("tide", [])
    with pytest.raises(OptionError):
        inject_typos("tide", rate=1.5)
