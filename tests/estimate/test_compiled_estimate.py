"""The compiled steps of estimation give bit for bit what the numpy path gives, and what the formulas give.

Reference: interpolated modified Kneser-Ney (Chen & Goodman 1998, TR-10-98,
REFERENCES): each count c loses D(c) (D1, D2 or D3+ by whether c is 1, 2 or
more), the value is (c - D(c)) / total of its context, and the context's
lower-order weight is (D1 N1 + D2 N2 + D3+ N3+) / total; computed here group by
group in plain Python, and with ``FORETYPE_PURE=1`` by the numpy path.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from foretype.counting.compiled import PURE_ENV
from foretype.estimate import kneser_ney

pytestmark = pytest.mark.skipif(kneser_ney.compiled_discounted is None, reason="the compiled discounting pass is not built")

GROUPS = st.lists(st.lists(st.integers(1, 9), max_size=12), min_size=1, max_size=20)
DISCOUNTS = st.tuples(st.floats(0.05, 1.0), st.floats(0.05, 2.0), st.floats(0.05, 3.0))


@settings(max_examples=200, deadline=None)
@given(GROUPS, DISCOUNTS)
def test_compiled_discounting_equals_the_numpy_path_and_the_formula(groups, discounts) -> None:
    counts = np.array([c for group in groups for c in group], dtype=np.int64)
    offsets = np.zeros(len(groups) + 1, dtype=np.int64)
    np.cumsum([len(g) for g in groups], out=offsets[1:])
    with pytest.MonkeyPatch.context() as patch:
        patch.setenv(PURE_ENV, "0")
        values, gamma = kneser_ney._discounted(counts, offsets, discounts)
        patch.setenv(PURE_ENV, "1")
        pure_values, pure_gamma = kneser_ney._discounted(counts, offsets, discounts)
    assert values.tobytes() == pure_values.tobytes()  # identical to the last bit
    assert gamma.tobytes() == pure_gamma.tobytes()
    d1, d2, d3 = discounts
    for g, group in enumerate(groups):
        total = sum(group)
        expected = [(c - (d1 if c == 1 else d2 if c == 2 else d3)) / total for c in group]
        assert values[offsets[g] : offsets[g + 1]].tolist() == pytest.approx(expected, rel=1e-12)
        weight = (d1 * group.count(1) + d2 * group.count(2) + d3 * sum(c >= 3 for c in group)) / total if total else 1.0
        assert gamma[g] == pytest.approx(weight, rel=1e-12)


ROWS = st.lists(st.tuples(st.integers(0, 6), st.integers(0, 6), st.integers(0, 6), st.integers(1, 50)), max_size=60)


@settings(max_examples=150, deadline=None)
@given(ROWS)
def test_the_layout_is_the_same_on_both_paths_and_matches_a_direct_grouping(rows) -> None:
    # Reference: the bigram entries are the distinct (v, w) tails with their summed counts (a dict in plain Python),
    # and the numpy path of Layout.of, field by field.
    from foretype.counting import TrigramTable
    from foretype.estimate.layout import Layout

    table_rows: dict[tuple[int, int, int], int] = {}
    for u, v, w, n in rows:
        table_rows[(u, v, w)] = table_rows.get((u, v, w), 0) + n
    keys = sorted(table_rows)
    columns = [np.array([k[i] for k in keys], dtype=np.int32) for i in range(3)]
    table = TrigramTable(*columns, np.array([table_rows[k] for k in keys], dtype=np.int64))
    layouts = {}
    for pure in ("0", "1"):
        with pytest.MonkeyPatch.context() as patch:
            patch.setenv(PURE_ENV, pure)
            layouts[pure] = Layout.of(table, 4)  # ids 0..6: V = 4 words, UNKNOWN, END, START
    for name in ("bigram_v", "bigram_w", "bigram_n", "bigram_off", "trigram_ctx", "trigram_off", "trigram_bigram"):
        assert np.array_equal(getattr(layouts["0"], name), getattr(layouts["1"], name)), name
    tails: dict[tuple[int, int], int] = {}
    for (u, v, w), n in table_rows.items():
        tails[(v, w)] = tails.get((v, w), 0) + n
    layout = layouts["0"]
    assert list(zip(layout.bigram_v.tolist(), layout.bigram_w.tolist())) == sorted(tails)
    assert layout.bigram_n.tolist() == [tails[t] for t in sorted(tails)]
    entries = sorted(tails)
    assert [entries[i] for i in layout.trigram_bigram.tolist()] == [(v, w) for _, v, w in keys]
