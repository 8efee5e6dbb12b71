"""The resampling behind ``foretype compare`` against hand counts, brute force and scipy.

Sources: the paired bootstrap over sentences on a corpus-level measure (Koehn
2004, "Statistical Significance Tests for Machine Translation Evaluation",
EMNLP) with percentile intervals; approximate randomisation (Riezler & Maxwell
2005); both restated in /work/shared/REFERENCES.md.  scipy.stats.bootstrap (a
general-purpose statistics library from PyPI) computes the same percentile
interval on the same per-sentence data.
"""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats as scipy_stats

import foretype
from foretype.compare import ComparedSystem, run_comparison
from foretype.simulate import TypistSettings, read_passage, simulate
from foretype.simulate.sentences import sentence_characters, sentence_log_probs
from foretype.stats import RatioMeasure, approximate_randomisation, paired_bootstrap

DEMO = Path(__file__).resolve().parents[2] / "demo_vocab"


def _one_minus(ratio: np.ndarray) -> np.ndarray:
    return 1.0 - ratio


@pytest.fixture(scope="module")
def demo_lines() -> tuple[list[str], list[str]]:
    corpus = (DEMO / "corpus.txt").read_text(encoding="utf-8").splitlines(keepends=True)
    heldout = (DEMO / "heldout.txt").read_text(encoding="utf-8").splitlines(keepends=True)
    return corpus[:4000], heldout[:120]


@pytest.fixture(scope="module")
def small_model(demo_lines: tuple[list[str], list[str]], tmp_path_factory: pytest.TempPathFactory) -> foretype.LanguageModel:
    path = tmp_path_factory.mktemp("corpus") / "corpus.txt"
    path.write_text("".join(demo_lines[0]), encoding="utf-8")
    return foretype.build([path], method="kneser-ney")


def test_every_resample_of_three_sentences_gives_the_hand_computed_interval() -> None:
    # Ratio = mean of [1, 2, 3] (denominators 1). The 27 resamples' sums 3..9 occur 1, 3, 6, 7, 6, 3, 1 times
    # (counted by hand). numpy's linear percentile of 27 sorted values: the 2.5th lies at rank 0.65,
    # between mean 1 (sum 3) and mean 4/3 (sum 4): 1 + 0.65/3; the 97.5th mirrors it: 3 - 0.65/3.
    every = np.array(list(itertools.product(range(3), repeat=3)))
    measure = RatioMeasure("mean", np.array([[1.0, 2.0, 3.0]]), np.ones((1, 3)))
    result = paired_bootstrap(measure, indices=every, pairs=False)
    assert result.values == [2.0]
    assert result.intervals[0] == pytest.approx((1 + 0.65 / 3, 3 - 0.65 / 3))


def test_the_pair_p_value_of_three_sentences_equals_the_hand_count() -> None:
    # A = [1, 1, 1], B = [0, 1, 1]: the difference of means is at most 0 only in resamples that never draw
    # sentence 0: 2^3 = 8 of 27; at least 0 in all 27. Two-sided p = 2 * 8/27 (Koehn 2004's share, doubled).
    every = np.array(list(itertools.product(range(3), repeat=3)))
    measure = RatioMeasure("mean", np.array([[1.0, 1.0, 1.0], [0.0, 1.0, 1.0]]), np.ones((2, 3)))
    pair = paired_bootstrap(measure, indices=every).pairs[(0, 1)]
    assert pair.difference == pytest.approx(1 / 3)
    assert pair.p_value == pytest.approx(16 / 27)
    # Sentence 0 drawn m times gives m/3: m = 0, 1, 2, 3 in 8, 12, 6, 1 resamples. Sorted, ranks 0-7 are 0,
    # 20-25 are 2/3 and 26 is 1, so the 2.5th percentile (rank 0.65) is 0 and the 97.5th (rank 25.35) 2/3 + 0.35/3.
    assert pair.interval == pytest.approx((0.0, 2 / 3 + 0.35 / 3))


def test_the_ksr_interval_matches_scipy_bootstrap_on_the_same_sentences(small_model: foretype.LanguageModel, demo_lines: tuple[list[str], list[str]]) -> None:
    text = "".join(demo_lines[1])
    settings = TypistSettings(k=5)
    report = simulate(small_model, text, settings)
    passage = read_passage(text)
    keys = np.bincount(np.cumsum([w.sentence_start for w in passage.words]) - 1, weights=[t.keystrokes for t in report.trace])
    chars = sentence_characters(passage)
    ours = paired_bootstrap(RatioMeasure("ksr", keys[None], chars[None], _one_minus), resamples=20000, seed=1, pairs=False)
    assert ours.values[0] == pytest.approx(report.ksr)

    def ksr(k: np.ndarray, c: np.ndarray, axis: int = -1) -> np.ndarray:
        return 1.0 - k.sum(axis=axis) / c.sum(axis=axis)

    theirs = scipy_stats.bootstrap(
        (keys, chars), ksr, paired=True, vectorized=True, n_resamples=20000, method="percentile", random_state=np.random.default_rng(2)
    ).confidence_interval
    low, high = ours.intervals[0]
    width = high - low
    assert width > 0
    # Two Monte Carlo runs of 20,000 resamples: their percentiles agree to a few percent of the width.
    assert low == pytest.approx(theirs.low, abs=0.06 * width)
    assert high == pytest.approx(theirs.high, abs=0.06 * width)


def test_two_identical_models_differ_by_exactly_zero_with_p_one(small_model: foretype.LanguageModel, demo_lines: tuple[list[str], list[str]]) -> None:
    text = "".join(demo_lines[1][:40])
    systems = [ComparedSystem("a", small_model, TypistSettings(k=3)), ComparedSystem("b", small_model, TypistSettings(k=3))]
    for test in ("bootstrap", "randomisation"):
        result = run_comparison(systems, text, resamples=200, seed=5, test=test)
        for found in result.measures.values():
            pair = found.pairs[(0, 1)]
            assert pair.difference == 0.0
            assert pair.interval == (0.0, 0.0)
            assert pair.p_value == 1.0


def test_a_seed_reproduces_every_figure_and_another_seed_moves_the_intervals() -> None:
    rng = np.random.default_rng(0)
    chars = rng.integers(10, 80, size=(2, 50)).astype(float)
    keys = np.floor(chars * rng.uniform(0.2, 0.9, size=(2, 50)))
    measure = RatioMeasure("ksr", keys, chars, _one_minus)
    first = paired_bootstrap(measure, resamples=500, seed=7)
    again = paired_bootstrap(measure, resamples=500, seed=7)
    other = paired_bootstrap(measure, resamples=500, seed=8)
    assert first == again
    assert first.intervals != other.intervals
    assert approximate_randomisation(measure, 0, 1, shuffles=300, seed=3) == approximate_randomisation(measure, 0, 1, shuffles=300, seed=3)


def test_approximate_randomisation_agrees_with_the_exact_permutation_test() -> None:
    # Brute force: with 7 sentences there are 2^7 ways to swap the two systems' results; the exact
    # p-value is the share of them whose |difference| reaches the observed one (Riezler & Maxwell 2005
    # approximate this share by random swaps; their p adds one to both counts).
    keys = np.array([[3.0, 5, 2, 8, 4, 6, 1], [4.0, 5, 3, 9, 4, 8, 2]])
    chars = np.array([[10.0, 12, 7, 15, 9, 14, 6]] * 2)
    measure = RatioMeasure("ksr", keys, chars, _one_minus)
    observed = abs(measure.value(0) - measure.value(1))
    reached = 0
    for swap in itertools.product((0, 1), repeat=7):
        s = np.array(swap, dtype=bool)
        a = np.where(s, keys[1], keys[0]).sum() / chars[0].sum()
        b = np.where(s, keys[0], keys[1]).sum() / chars[0].sum()
        reached += abs(a - b) >= observed - 1e-12
    exact = reached / 2**7
    approximate = approximate_randomisation(measure, 0, 1, shuffles=20000, seed=11)
    assert approximate == pytest.approx(exact, abs=0.015)


@settings(max_examples=25, deadline=None)
@given(
    st.lists(st.tuples(st.integers(5, 60), st.floats(0.05, 0.95)), min_size=6, max_size=30).filter(
        lambda rows: len({round(share, 3) for _, share in rows}) > 2
    )
)
def test_intervals_narrow_as_the_text_grows(rows: list[tuple[int, float]]) -> None:
    # The same sentences four times over: the spread of a ratio of totals shrinks like 1/sqrt(n), so
    # the interval should be about half as wide (the central limit theorem; a textbook fact).
    chars = np.array([c for c, _ in rows], dtype=float)
    keys = np.floor(chars * np.array([s for _, s in rows]))
    small = paired_bootstrap(RatioMeasure("ksr", keys[None], chars[None], _one_minus), resamples=2000, seed=0, pairs=False).intervals[0]
    large = paired_bootstrap(RatioMeasure("ksr", np.tile(keys, 4)[None], np.tile(chars, 4)[None], _one_minus), resamples=2000, seed=0, pairs=False).intervals[0]
    assert large[1] - large[0] < 0.8 * (small[1] - small[0])


def test_per_sentence_totals_add_up_to_the_whole_text(small_model: foretype.LanguageModel, demo_lines: tuple[list[str], list[str]]) -> None:
    # The sentence is only the resampling unit: summed over sentences, the columns must give the
    # savings report's keystrokes and characters and LanguageModel.score's log2 probability and tokens.
    text = "".join(demo_lines[1][:60]) + "A last line, no ending"
    system = ComparedSystem("kn", small_model, TypistSettings(k=4))
    result = run_comparison([system], text, resamples=50)
    columns = result.systems[0].columns
    report = simulate(small_model, text, TypistSettings(k=4))
    score = small_model.score(text)
    assert columns["characters"].sum() == report.characters
    assert columns["keystrokes"].sum() == report.keystrokes
    assert columns["tokens"].sum() == score.tokens
    assert -columns["neg_log2_prob"].sum() == pytest.approx(score.log2_prob, rel=1e-9)
    assert result.measures["ksr"].values[0] == pytest.approx(report.ksr)
    assert result.measures["perplexity"].values[0] == pytest.approx(score.perplexity, rel=1e-9)
    log2, tokens = sentence_log_probs(small_model, read_passage(text))
    assert len(log2) == len(tokens) == score.sentences == result.sentences
