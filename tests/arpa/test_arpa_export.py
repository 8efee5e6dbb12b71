"""ARPA export and round trip, checked against a reader outside the project.

The reference is the ``arpa`` package from PyPI (a pure-Python ARPA reader):
its ``log_s`` scores a sentence with the format's back-off rule (listed
probability, else the context's back-off weight times the shorter context's
probability; one ``<s>`` before the sentence, ``</s>`` after it).
"""

from __future__ import annotations

import gzip
import itertools
from pathlib import Path

import arpa
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import foretype
from foretype.arpa import export_arpa, model_from_arpa
from foretype.builder.shrink import shrink
from foretype.text import iter_sentences

ROOT = Path(__file__).resolve().parents[2]
TRAIN_LINES = 2500
HELD_OUT_SENTENCES = 250


@pytest.fixture(scope="module")
def corpus(tmp_path_factory) -> Path:
    """A slice of the invented demo text (the Saltmarrow Tidal Ferry Cooperative)."""
    lines = (ROOT / "demo_vocab" / "corpus.txt").read_text(encoding="utf-8").splitlines()[:TRAIN_LINES]
    path = tmp_path_factory.mktemp("arpa-corpus") / "corpus.txt"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def held_out() -> list[list[str]]:
    text = (ROOT / "demo_vocab" / "heldout.txt").read_text(encoding="utf-8")
    return list(itertools.islice(iter_sentences(text), HELD_OUT_SENTENCES))


@pytest.fixture(scope="module")
def models(corpus) -> dict[str, foretype.LanguageModel]:
    return {method: foretype.build([corpus], vocab_size=400, method=method) for method in ("kneser-ney", "katz", "linear", "additive", "mle")}


def log10_sentence(model: foretype.LanguageModel, words: list[str]) -> float:
    """foretype's log10 P(sentence), every word and the end symbol."""
    return model.logprob(words) / np.log2(10.0)


@pytest.mark.parametrize("method", ["kneser-ney", "katz", "linear", "additive"])
def test_exported_sentence_probabilities_agree_with_the_reference_reader(models, held_out, tmp_path, method):
    model = models[method]
    target = tmp_path / "model.arpa"
    summary = export_arpa(model, str(target))
    assert summary.approximated is None
    reference = arpa.loadf(target)[0]
    assert reference.order() == 3
    assert reference.counts() == [(1, model.vocab_size + 3), (2, summary.ngrams["2"]), (3, summary.ngrams["3"])]
    worst = 0.0
    unknown_seen = False
    for sentence in held_out:
        ids = model.sentence_ids(sentence)
        tokens = [model.vocab.word(i) for i in ids.tolist()]  # <unk> for out-of-vocabulary words
        unknown_seen |= "<unk>" in tokens
        worst = max(worst, abs(reference.log_s(tokens) - log10_sentence(model, sentence)))
    assert unknown_seen  # the check covers the unknown symbol too
    # The bound asked for is 1e-4; eight decimals of log10 keep the file well inside it.
    assert worst < 1e-6


def test_every_listed_ngram_is_the_models_probability(models, tmp_path):
    """Each listed n-gram, read by the reference, is foretype's probability of that word after that context."""
    model = models["kneser-ney"]
    target = tmp_path / "model.arpa"
    export_arpa(model, str(target))
    reference = arpa.loadf(target)[0]
    checked = 0
    vocab = model.vocab
    p1 = model.sections["p1"].astype(np.float64)
    for entry in itertools.islice(reference._ps, 0, None, 29):
        if entry[-1] == "<s>":
            continue
        w = vocab.end_id if entry[-1] == "</s>" else vocab.id_or_unknown(entry[-1])
        if len(entry) == 1:
            ours = p1[w]
        elif entry[0] == "<s>":
            ours = model.prob(entry[-1], list(entry[1:-1]))  # foretype pads the context with <s> itself
        elif len(entry) == 2:
            # P(w | v) alone: after the pair (</s>, v), which stores nothing since </s> is never a context.
            ours = model.prob_triples([vocab.end_id], [vocab.id_or_unknown(entry[0])], [w])[0]
        else:
            ours = model.prob(entry[-1], list(entry[:-1]))
        assert abs(reference.log_p(entry) - np.log10(ours)) < 1e-6, entry
        checked += 1
    assert checked > 100


def test_the_start_symbol_has_log_zero_and_a_back_off_weight(models, tmp_path):
    target = tmp_path / "model.arpa"
    export_arpa(models["kneser-ney"], str(target))
    line = next(line for line in target.read_text(encoding="utf-8").splitlines() if line.split("\t")[1:2] == ["<s>"])
    fields = line.split("\t")
    assert fields[0] == "-99" and len(fields) == 3  # common practice: <s> is never predicted
    assert float(fields[2]) < 0


@pytest.mark.parametrize("method", ["kneser-ney", "katz", "linear"])
def test_round_trip_keeps_suggestions_and_perplexity(models, held_out, tmp_path, method):
    model = models[method]
    target = tmp_path / "model.arpa.gz"
    export_arpa(model, str(target))
    assert gzip.open(target, "rt", encoding="utf-8").read(2) == "# "
    back, summary = model_from_arpa(target, encoding="float32")
    assert summary.warnings == []
    assert back.vocabulary == model.vocabulary
    assert [back.vocab.display(i) for i in range(back.vocab_size)] == [model.vocab.display(i) for i in range(model.vocab_size)]
    text = "\n".join(" ".join(sentence) for sentence in held_out)
    # float32 values after an 8-decimal log10: relative error of a probability about 1e-7.
    assert back.perplexity(text) == pytest.approx(model.perplexity(text), rel=1e-6)
    for sentence in held_out[:80]:
        for cut in range(min(len(sentence), 3)):
            context = sentence[:cut]
            for prefix in ("", sentence[cut][:1], sentence[cut][:2]):
                ours = [s.word for s in model.suggest(context, prefix, 5)]
                theirs = [s.word for s in back.suggest(context, prefix, 5)]
                assert ours == theirs, (context, prefix)


def test_round_trip_in_log16_is_within_the_encodings_precision(models, held_out, tmp_path):
    model = models["kneser-ney"]
    target = tmp_path / "model.arpa"
    export_arpa(model, str(target))
    back, _ = model_from_arpa(target, encoding="log16")
    for sentence in held_out[:50]:
        ours = model._sentence_probs(model.sentence_ids(sentence))
        theirs = back._sentence_probs(back.sentence_ids(sentence))
        # log16 rounds a value down by less than 2^(1/2048) - 1 (0.034%); weights are float32.
        assert np.all(np.abs(theirs / ours - 1) < 3.5e-4)


def test_maximum_likelihood_is_refused_unless_approximated(models, tmp_path, run_cli):
    model_path = tmp_path / "mle.model"
    models["mle"].save(model_path)
    refused = run_cli("export", "-m", model_path, "-o", tmp_path / "mle.arpa")
    assert refused.code == 2
    assert refused.err.count("\n") == 1 and "maximum-likelihood" in refused.err and "--approximate" in refused.err
    assert not (tmp_path / "mle.arpa").exists()
    allowed = run_cli("export", "-m", model_path, "-o", tmp_path / "mle.arpa", "--approximate")
    assert allowed.code == 0 and "approximated" in allowed.err and "-99" in allowed.err
    back, _ = model_from_arpa(tmp_path / "mle.arpa")
    # foretype's own reader takes -99 as zero, so the round trip keeps the zeros.
    assert back.prob("ferry", ["the", "zzz-never"]) == pytest.approx(models["mle"].prob("ferry", ["the", "zzz-never"]), rel=1e-6)


def test_export_to_standard_output_and_compressed_file(models, tmp_path, run_cli):
    model_path = tmp_path / "kn.model"
    models["kneser-ney"].save(model_path)
    printed = run_cli("export", "-m", model_path, "-o", "-")
    assert printed.code == 0
    written = run_cli("export", "-m", model_path, "-o", tmp_path / "kn.arpa.gz", "--json")
    assert written.code == 0 and '"compressed": true' in written.out
    assert gzip.open(tmp_path / "kn.arpa.gz", "rt", encoding="utf-8").read() == printed.out
    assert run_cli("import", tmp_path / "kn.arpa.gz", "-o", tmp_path / "back.model").code == 0
    assert run_cli("check", "-m", tmp_path / "back.model").code == 0  # every distribution sums to 1 again
    assert "\\end\\" in printed.out
    before = model_path.read_bytes()
    refused = run_cli("export", "-m", model_path, "-o", model_path)
    assert refused.code == 8 and "is also an input" in refused.err and model_path.read_bytes() == before and "\n\\data\\\nngram 1=403\n" in printed.out


WORDS = ["a", "ab", "b", "ba", "c", "Ca", "don't", "7:40"]


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(
    sentences=st.lists(st.lists(st.sampled_from(WORDS), min_size=1, max_size=6), min_size=1, max_size=12),
    probes=st.lists(st.lists(st.sampled_from(WORDS + ["zz"]), min_size=1, max_size=5), min_size=1, max_size=5),
    method=st.sampled_from(["kneser-ney", "katz", "linear", "additive"]),
    vocab_size=st.integers(min_value=1, max_value=8),
)
def test_any_small_model_exports_exactly_and_round_trips(tmp_path, sentences, probes, method, vocab_size):
    """Property: for any corpus, the reference reader scores every sentence as foretype does, and import gives it back."""
    corpus = tmp_path / "tiny.txt"
    corpus.write_text("\n".join(" ".join(s) for s in sentences) + "\n", encoding="utf-8")
    model = foretype.build([corpus], vocab_size=vocab_size, method=method)
    target = tmp_path / "tiny.arpa"
    export_arpa(model, str(target))
    reference = arpa.loadf(target)[0]
    back, _ = model_from_arpa(target)
    for sentence in probes:
        tokens = [model.vocab.word(i) for i in model.sentence_ids(sentence).tolist()]
        assert reference.log_s(tokens) == pytest.approx(log10_sentence(model, sentence), abs=1e-6)
        for cut in range(len(sentence)):
            ours = model.distribution(sentence[:cut])
            theirs = back.distribution(sentence[:cut])
            assert np.allclose(theirs, ours, rtol=1e-6, atol=0)


def test_suggest_on_an_imported_model_equals_brute_force(models, held_out, tmp_path):
    """Exact top k on an imported model whose large contexts carry ranked lists: brute force over every word."""
    target = tmp_path / "model.arpa"
    export_arpa(models["katz"], str(target))
    back, _ = model_from_arpa(target)
    assert "rank2.ids" in back.sections and len(back.sections["rank2.ids"])  # some contexts are ranked
    words = back.vocabulary
    for sentence in held_out[:40]:
        for cut in range(min(len(sentence), 3)):
            context = sentence[:cut]
            scores = back.distribution(context)[: back.vocab_size]
            for prefix in ("", sentence[cut][:1].lower()):
                ids = np.array([i for i, w in enumerate(words) if w.startswith(prefix)], dtype=np.int64)
                if not len(ids):
                    continue
                order = np.lexsort((ids, -scores[ids]))[:5]
                expected = [(int(ids[i]), float(scores[ids[i]])) for i in order]
                assert [(s.id, s.prob) for s in back.suggest(context, prefix, 5)] == expected


@pytest.mark.parametrize("method", ["kneser-ney", "katz"])
def test_kenlm_reads_the_export_with_the_same_sentence_probabilities(models, held_out, tmp_path, method):
    """A second reference where it is installed: the ``kenlm`` module from PyPI (a C++ build, so not in the
    test extra; ``pip install kenlm`` adds it). It stores values as float32, hence the wider bound."""
    kenlm = pytest.importorskip("kenlm")
    model = models[method]
    target = tmp_path / "model.arpa"
    export_arpa(model, str(target))
    reference = kenlm.Model(str(target))
    for sentence in held_out:
        tokens = " ".join(model.vocab.word(i) for i in model.sentence_ids(sentence).tolist())
        assert reference.score(tokens, bos=True, eos=True) == pytest.approx(log10_sentence(model, sentence), abs=1e-5)


def test_a_shrunk_model_with_8_bit_codebook_values_exports_exactly(models, held_out, tmp_path):
    """Pruned (Stolcke's relative entropy) and stored in 8-bit codebooks: still a back-off form the reader agrees with."""
    small = shrink(models["kneser-ney"], criterion="entropy", threshold=1e-5, encoding="codebook8")
    assert small.sections["l3.value"].dtype == np.uint8
    target = tmp_path / "small.arpa"
    export_arpa(small, str(target))
    reference = arpa.loadf(target)[0]
    for sentence in held_out[:100]:
        tokens = [small.vocab.word(i) for i in small.sentence_ids(sentence).tolist()]
        assert reference.log_s(tokens) == pytest.approx(log10_sentence(small, sentence), abs=1e-6)
