"""The compiled discounting pass gives bit for bit what the numpy path gives, and what the formula gives.

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
