"""Shrinking models: Stolcke's pruning against the paper's formula, sums, exact suggest, budgets, damage.

References: Stolcke 1998, "Entropy-based Pruning of Backoff Language Models"
(the closed form of D and the recomputed back-off weight, /work/shared/REFERENCES.md);
brute force (scoring every word, as tests/query/test_suggest_exact.py does); the
definition of relative entropy, sum of P(h) p ln(p / p'), computed over every outcome.
"""

from __future__ import annotations

import math
import struct
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from query.test_suggest_exact import WORDS, brute_force, build_text, suggested

import foretype as predictor
from foretype.builder.shrink import backoff_tables, shrink
from foretype.builder.shrink.entropy import entropy_costs
from foretype.builder.shrink.predictive import list_losses
from foretype.builder.shrink.sections import shrunk_model
from foretype.errors import CapacityError, ModelFileError, OptionError
from foretype.modelfile.format import read_model_file, write_model_file

CORPUS = """the ferry leaves at noon
the ferry is late
see you at the harbour
see you at the ferry
see you at the slipway
the tide is high
the ferry is at the slipway
the tide is late at the harbour
see the ferry at noon
"""


@pytest.fixture(scope="module")
def katz_model() -> predictor.LanguageModel:
    return build_text(CORPUS * 3, method="katz", encoding="float32")


def _p2(model: predictor.LanguageModel, v: int, w: int) -> float:
    """P(w | v) by the back-off rule, from the stored arrays (the lower order h' of a pair (u, v))."""
    s = model.sections
    lo, hi = int(s["l2.off"][v]), int(s["l2.off"][v + 1])
    words = [int(x) for x in s["l2.word"][lo:hi]]
    if w in words:
        return float(s["l2.value"][lo + words.index(w)])
    return float(s["l2.gamma"][v]) * float(s["p1"][w])


def test_stolcke_cost_of_one_trigram_matches_the_papers_formula_worked_by_hand(katz_model):
    # Stolcke 1998, eq. for D with alpha'(h) = (1 - sum p(.|h) + p(w|h)) / (1 - sum p(.|h') + p(w|h')),
    # worked here in plain floats over the stored words of one context.
    model = katz_model
    ids = model.vocab.id_or_unknown
    u, v = ids("at"), ids("the")
    tables = backoff_tables(model)
    slot = int(np.flatnonzero((tables.context2() == u) & (tables.w2 == v))[0])
    lo, hi = int(tables.off3[slot]), int(tables.off3[slot + 1])
    stored = [int(w) for w in tables.w3[lo:hi]]
    assert len(stored) >= 2
    row = lo + stored.index(ids("harbour"))
    w = ids("harbour")
    dist = model.distribution(["at", "the"])  # p(. | h) over every outcome
    p_h = {x: float(dist[x]) for x in stored}
    p_lower = {x: _p2(model, v, x) for x in stored}
    p_u = float(model.sections["p1"][u])
    history = p_u * _p2(model, u, v)  # P(h) = P(u) P(v | u), chain rule
    s_h, s_lower = sum(p_h.values()), sum(p_lower.values())
    alpha = (1 - s_h) / (1 - s_lower)
    alpha_new = (1 - s_h + p_h[w]) / (1 - s_lower + p_lower[w])
    by_hand = -history * (
        p_h[w] * (math.log(p_lower[w]) + math.log(alpha_new) - math.log(p_h[w])) + (math.log(alpha_new) - math.log(alpha)) * (1 - s_h)
    )
    assert by_hand > 0
    _, d3 = entropy_costs(tables)
    assert d3[row] == pytest.approx(by_hand, rel=1e-9)

    # The removal itself: the new back-off weight is alpha'(h), and the relative entropy of the
    # distribution after h, by its definition over every outcome, is the same D.
    keep3 = np.ones(tables.n3, dtype=bool)
    keep3[row] = False
    pruned = shrunk_model(model, tables.pruned(np.ones(tables.n2, dtype=bool), keep3), encoding="float32", shrink_meta={})
    new_slot = int(np.flatnonzero((pruned.sections["l2.word"] == v) & (np.repeat(np.arange(len(pruned.sections["l2.off"]) - 1), np.diff(pruned.sections["l2.off"].astype(np.int64))) == u))[0])
    assert float(pruned.sections["l3.gamma"][new_slot]) == pytest.approx(alpha_new, rel=1e-6)
    after = pruned.distribution(["at", "the"])
    assert after[w] == pytest.approx(alpha_new * p_lower[w], rel=1e-6)
    definition = history * float(np.sum(dist * np.log(dist / after)))
    assert definition == pytest.approx(by_hand, rel=1e-4)


def test_stolcke_cost_of_one_bigram_matches_the_definition(katz_model):
    # Relative entropy by definition over every outcome of p(. | v), against the closed form.
    model = katz_model
    tables = backoff_tables(model)
    d2, _ = entropy_costs(tables)
    v = model.vocab.id_or_unknown("tide")
    lo, hi = int(tables.off2[v]), int(tables.off2[v + 1])
    for entry in range(lo, hi):
        keep2 = np.ones(tables.n2, dtype=bool)
        keep2[entry] = False
        keep3 = tables.tail3 != entry
        keep3 &= tables.slot3() != entry
        reduced = tables.pruned(keep2, np.ones(tables.n3, dtype=bool) & keep3)
        if reduced.n2 == tables.n2:
            continue  # needed by a trigram: kept
        pruned = shrunk_model(model, reduced, encoding="float32", shrink_meta={})
        outcomes = np.arange(model.vocab_size + 2)
        before = model.prob_triples(np.full(len(outcomes), model.vocab.unknown_id), np.full(len(outcomes), v), outcomes)
        after = pruned.prob_triples(np.full(len(outcomes), model.vocab.unknown_id), np.full(len(outcomes), v), outcomes)
        definition = float(model.sections["p1"][v]) * float(np.sum(before * np.log(before / after)))
        assert d2[entry] == pytest.approx(definition, rel=1e-4, abs=1e-12)


def _sums(model: predictor.LanguageModel) -> float:
    """The largest |sum - 1| over the distributions after every stored context pair and word."""
    s = model.sections
    size = model.vocab_size
    off2 = s["l2.off"].astype(np.int64)
    v2 = np.repeat(np.arange(len(off2) - 1), np.diff(off2))
    contexts = {(size + 2, size + 2), (size, size)} | {(int(u), int(w)) for u, w in zip(v2, s["l2.word"]) if int(w) != size + 1}
    outcomes = np.arange(size + 2)
    worst = 0.0
    for u, v in contexts:
        total = float(model.prob_triples(np.full(len(outcomes), u), np.full(len(outcomes), v), outcomes).sum())
        worst = max(worst, abs(total - 1))
    return worst


corpora = st.lists(st.lists(st.sampled_from(WORDS), min_size=1, max_size=8), min_size=2, max_size=30)


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    sentences=corpora,
    method=st.sampled_from(["kneser-ney", "katz", "linear", "additive"]),
    criterion=st.sampled_from(["entropy", "prediction"]),
    threshold=st.sampled_from([0.0, 1e-4, 1e-3, 1e-2, 1.0]),
    encoding=st.sampled_from(["log16", "float32", "codebook8"]),
    queries=st.lists(st.tuples(st.lists(st.sampled_from(WORDS + ["zzz"]), max_size=2).map(tuple), st.text(alphabet="abcdABD'-", max_size=2), st.integers(1, 8)), min_size=1, max_size=6),
)
def test_every_pruned_or_quantised_model_sums_to_one_and_suggests_exactly(sentences, method, criterion, threshold, encoding, queries):
    # Properties: each distribution sums to 1 (weights recomputed from the stored values);
    # suggest equals brute force (tests/query/test_suggest_exact.py's reference); pruning only removes.
    text = "\n".join(" ".join(s) for s in sentences) + "\n"
    model = build_text(text, method=method)
    small = shrink(model, criterion=criterion, threshold=threshold, encoding=encoding)
    assert _sums(small) < 1e-6
    counts = small.ngram_counts()
    assert counts["2"] <= model.ngram_counts()["2"] and counts["3"] <= model.ngram_counts()["3"]
    for context, prefix, k in queries + [((), "", 3)]:
        assert suggested(small, context, prefix, k) == brute_force(small, context, prefix, k), (context, prefix, k)


def test_pruned_models_keep_the_tails_and_contexts_of_their_trigrams(katz_model):
    # The layout's rule (DEVELOPERS.md): every stored trigram's tail (v, w) and pair (u, v) are stored bigrams.
    small = shrink(katz_model, criterion="entropy", threshold=1e-3)
    s = small.sections
    off2 = s["l2.off"].astype(np.int64)
    v2 = np.repeat(np.arange(len(off2) - 1), np.diff(off2))
    bigrams = set(zip(v2.tolist(), s["l2.word"].tolist()))
    off3 = s["l3.off"].astype(np.int64)
    size = small.vocab_size
    for slot in range(len(off3) - 1):
        words = s["l3.word"][off3[slot] : off3[slot + 1]].tolist()
        if not words:
            continue
        v = size + 2 if slot == len(v2) else int(s["l2.word"][slot])
        for w in words:
            assert (v, w) in bigrams


def test_count_cutoffs_keep_exactly_the_ngrams_seen_often_enough(tmp_path):
    # Reference: trigram counts taken here with collections.Counter over the padded sentences.
    corpus = tmp_path / "corpus.txt"
    corpus.write_text(CORPUS * 2 + "the ferry is late\n", encoding="utf-8")
    model = predictor.build([corpus], method="kneser-ney", cutoffs=(1, 3))
    counts: Counter[tuple[str, str, str]] = Counter()
    for line in (CORPUS * 2 + "the ferry is late\n").splitlines():
        padded = ["<s>", "<s>", *line.split(), "</s>"]
        counts.update(zip(padded, padded[1:], padded[2:]))
    expected = {gram for gram, n in counts.items() if n >= 3}
    s = model.sections
    words = model.vocabulary + ["<unk>", "</s>", "<s>"]
    off2 = s["l2.off"].astype(np.int64)
    v2 = np.repeat(np.arange(len(off2) - 1), np.diff(off2))
    off3 = s["l3.off"].astype(np.int64)
    stored = set()
    for slot in range(len(off3) - 1):
        u, v = ("<s>", "<s>") if slot == len(v2) else (words[v2[slot]], words[s["l2.word"][slot]])
        for w in s["l3.word"][off3[slot] : off3[slot + 1]]:
            stored.add((u, v, words[w]))
    assert stored == expected
    assert model.meta["shrink"]["cutoffs"] == [1, 3]
    assert _sums(model) < 1e-6


@pytest.fixture(scope="module")
def demo_sized_model() -> predictor.LanguageModel:
    from foretype.demo import demo_corpus

    return predictor.build([demo_corpus()], vocab_size=2000)


def test_a_byte_budget_is_met_and_an_impossible_one_refused(demo_sized_model, katz_model, tmp_path):
    model = demo_sized_model
    full = model.save(tmp_path / "full.model")
    for criterion in ("entropy", "prediction"):
        budget = int(full * 0.7)
        small = shrink(model, criterion=criterion, max_bytes=budget)
        written = small.save(tmp_path / "small.model")
        # Fits, and removes no more than it must: within 2% of the budget.
        assert budget * 0.98 <= written <= budget
        assert small.meta["shrink"]["max_bytes"] == budget
    with pytest.raises(CapacityError, match="below the smallest model"):
        shrink(katz_model, max_bytes=1000)
    with pytest.raises(OptionError):
        shrink(build_text(CORPUS, method="mle"), threshold=1e-3)


def _list_losses_by_brute_force(context, word, p, p_after, size, lengths, groups, k):
    """The same losses with Python sorting, one list at a time (ties by id)."""
    loss = [0.0] * len(word)
    for i in range(len(word)):
        if word[i] >= size:
            continue
        for j, group in enumerate(groups):
            mates = [x for x in range(len(word)) if context[x] == context[i] and word[x] < size and group[word[x]] == group[word[i]]]
            ranked = sorted(mates, key=lambda x: (-p[x], word[x]))
            shown = ranked.index(i) < k
            above = sum(1 for x in mates if x != i and p[x] > p_after[i])
            if shown and above >= k and lengths[word[i]] > j:
                loss[i] += lengths[word[i]] - j
    return loss


@settings(max_examples=60, deadline=None)
@given(
    rows=st.lists(st.tuples(st.integers(0, 2), st.integers(0, 9), st.floats(0.001, 1.0), st.floats(0.0, 1.0)), min_size=1, max_size=25, unique_by=lambda r: (r[0], r[1])),
    k=st.integers(1, 4),
)
def test_the_prediction_criterion_counts_lists_as_brute_force_does(rows, k):
    # Reference: brute-force ranking of every list (sorted by probability, ties by id).
    words = ["a", "ab", "abc", "b", "ba", "bab", "c", "ca", "cab"]
    size = len(words)
    from predictor.builder.shrink.predictive import prefix_groups

    lengths, groups = prefix_groups(words)
    rows.sort()
    context = np.array([r[0] for r in rows], dtype=np.int64)
    word = np.array([r[1] for r in rows], dtype=np.int64)
    p = np.array([r[2] for r in rows])
    p_after = p * np.array([r[3] for r in rows])
    got = list_losses(context, word, p, p_after, size, lengths, groups, k)
    assert got.tolist() == _list_losses_by_brute_force(context.tolist(), word.tolist(), p.tolist(), p_after.tolist(), size, lengths.tolist(), [g.tolist() for g in groups], k)


def test_quantised_values_keep_perplexity_close_to_the_16_bit_model():
    # The target: 8-bit values within 1% of the 16-bit model's perplexity (demo text, common practice
    # that 8 bits lose little: Federico & Bertoldi 2006, from memory).
    from foretype.demo import demo_corpus, demo_heldout

    corpus, heldout = demo_corpus(), demo_heldout()
    model = predictor.build([corpus], vocab_size=3000)
    text = Path(heldout).read_text(encoding="utf-8")
    small = shrink(model, encoding="codebook8")
    assert small.sections["l3.value"].dtype == np.uint8
    assert abs(small.perplexity(text) / model.perplexity(text) - 1) < 0.01


def test_a_quantised_file_round_trips_and_damage_is_refused(katz_model, tmp_path):
    small = shrink(katz_model, criterion="entropy", threshold=1e-4, encoding="codebook8")
    path = tmp_path / "small.model"
    small.save(path)
    loaded = predictor.load(path)
    assert loaded.meta["shrink"]["criterion"] == "entropy"
    for context in [(), ("the",), ("at", "the")]:
        assert np.array_equal(loaded.distribution(context), small.distribution(context))
    data = bytearray(path.read_bytes())
    entry = read_model_file(path)
    # Flip one bit inside the codebook: its checksum no longer matches.
    book_offset = _section_offset(path, "l3.codebook")
    data[book_offset + 3] ^= 0x10
    bad = tmp_path / "flipped.model"
    bad.write_bytes(bytes(data))
    with pytest.raises(ModelFileError, match="checksum"):
        predictor.load(bad)
    # A codebook that holds a value above 1, with every checksum right: refused by the structural checks.
    sections = dict(entry.sections)
    sections["l3.codebook"] = np.where(np.arange(256) == 255, 2.0, sections["l3.codebook"])
    crafted = tmp_path / "crafted.model"
    write_model_file(crafted, entry.meta, sections)
    with pytest.raises(ModelFileError, match="out of range"):
        predictor.load(crafted)
    # A codebook model without its codebook.
    del sections["l3.codebook"]
    write_model_file(crafted, entry.meta, sections)
    with pytest.raises(ModelFileError, match="missing section l3.codebook"):
        predictor.load(crafted)


def _section_offset(path: Path, name: str) -> int:
    import json

    data = path.read_bytes()
    length = struct.unpack_from("<I", data, 12)[0]
    header = json.loads(data[24 : 24 + length])
    return next(e["offset"] for e in header["sections"] if e["name"] == name)


def test_shrink_and_info_on_the_command_line(katz_model, tmp_path, run_cli):
    full = tmp_path / "full.model"
    katz_model.save(full)
    small = tmp_path / "small.model"
    result = run_cli("shrink", "-m", full, "-o", small, "--threshold", "1e-4", "--values", "codebook8")
    assert result.code == 0, result.err
    assert "entropy pruning" in result.out
    info = run_cli("info", "-m", small, "--json")
    assert '"criterion": "entropy"' in info.out
    text = run_cli("info", "-m", small)
    assert "shrunk" in text.out and "codebook8" in text.out
    assert run_cli("shrink", "-m", full, "-o", small, "--max-bytes", "1K").code == CapacityError.exit_code
    assert run_cli("shrink", "-m", full, "-o", small, "--max-bytes", "lots").code == OptionError.exit_code
    assert run_cli("check", "-m", small).code == 0


def test_the_size_sweep_writes_rows_per_criterion_and_a_chart(tmp_path):
    # The sweep's size axis: a shrunk row per criterion that fits its share of the full model's bytes.
    from foretype.demo import demo_corpus, demo_heldout
    from foretype.simulate import TypistSettings
    from foretype.sweep import run_sweep

    corpus = tmp_path / "corpus.txt"
    corpus.write_text("".join(demo_corpus().read_text(encoding="utf-8").splitlines(keepends=True)[:3000]), encoding="utf-8")
    text = "".join(demo_heldout().read_text(encoding="utf-8").splitlines(keepends=True)[:60])
    result = run_sweep([corpus], text, out=tmp_path / "out", vocab_sizes=[800], settings=TypistSettings(k=3), shrink_criteria=["count", "entropy", "prediction"], keep_bytes=[0.85])
    full = result.rows[0]
    assert full.keep_bytes is None and full.criterion == "none"
    shrunk = result.rows[1:]
    assert [row.criterion for row in shrunk] == ["count", "entropy", "prediction"]
    for row in shrunk:
        assert row.file_bytes <= 0.85 * full.file_bytes
        assert row.bigrams + row.trigrams < full.bigrams + full.trigrams
    chart = (tmp_path / "out" / "size.svg").read_text(encoding="utf-8")
    assert chart.count("<polyline") == 3


def test_a_version_1_file_still_loads(katz_model, tmp_path):
    # Format version 2 only adds codebooks: a version-1 file (no codebooks) reads as before.
    path = tmp_path / "old.model"
    katz_model.save(path)
    data = bytearray(path.read_bytes())
    struct.pack_into("<I", data, 8, 1)
    path.write_bytes(bytes(data))
    assert np.array_equal(predictor.load(path).distribution(["the"]), katz_model.distribution(["the"]))
