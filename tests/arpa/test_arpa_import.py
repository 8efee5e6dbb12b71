"""ARPA import: a hand-written model with back-off paths worked out on paper, what real files
contain, malformed files, cased words, bounded memory, and exact suggestions on the result.

The format's back-off rule (the ARPA format as documented with the SRI and CMU
language-modelling toolkits; the ``arpa`` PyPI package implements it and is
the reference reader here): P(w | h) is the listed probability of ``h w`` if
listed, else bow(h) * P(w | h without its first word), with bow(h) = 1 (log 0)
when ``h`` is not listed or gives no weight.
"""

from __future__ import annotations

import gzip
import json
import math

import arpa
import numpy as np
import pytest

from foretype.arpa import model_from_arpa
from foretype.arpa.reader import read_arpa
from foretype.errors import CapacityError, ModelFileError

HAND = """\\data\\
ngram 1=6
ngram 2=5
ngram 3=4

\\1-grams:
-1\t<unk>\t-0.2
-99\t<s>\t-0.30103
-0.69897\t</s>
-0.52288\ta\t-0.17609
-0.69897\tb\t-0.39794
-0.69897\tc

\\2-grams:
-0.30103\t<s> a\t-0.09691
-0.69897\t<s> b\t-0.1
-0.39794\ta b\t-0.22185
-0.52288\ta c
-0.1549\tb </s>

\\3-grams:
-0.17609\t<s> a b
-0.09691\ta b </s>
-0.30103\ta c b
-0.5\tb a c

\\end\\
"""

# (word, foretype context, the format's n-gram, log10 P worked out by hand).
# foretype pads a context of fewer than two words with <s> itself.
HAND_VALUES = [
    ("a", [], ("<s>", "a"), -0.30103),  # listed bigram
    ("c", [], ("<s>", "c"), -0.30103 - 0.69897),  # bow(<s>) + P(c) = -1.0
    ("b", ["a"], ("<s>", "a", "b"), -0.17609),  # listed trigram
    ("c", ["a"], ("<s>", "a", "c"), -0.09691 - 0.52288),  # bow(<s> a) + P(c | a) = -0.61979
    ("</s>", ["a", "b"], ("a", "b", "</s>"), -0.09691),  # listed trigram
    ("a", ["a", "b"], ("a", "b", "a"), -0.22185 - 0.39794 - 0.52288),  # bow(a b) + bow(b) + P(a) = -1.14267
    ("b", ["c", "a"], ("c", "a", "b"), -0.39794),  # "c a" not listed: P(b | a)
    ("b", ["a", "c"], ("a", "c", "b"), -0.30103),  # listed trigram whose suffix "c b" is missing
    ("b", ["b", "c"], ("b", "c", "b"), -0.69897),  # "b c", "c b" not listed, c has no weight: P(b)
    ("c", ["b", "a"], ("b", "a", "c"), -0.5),  # listed trigram whose context "b a" is missing
    ("a", ["c", "b"], ("c", "b", "a"), -0.39794 - 0.52288),  # bow(b) + P(a) = -0.92082
    ("b", ["b", "a"], ("b", "a", "b"), -0.39794),  # "b a" has no weight: P(b | a)
    ("a", ["b"], ("<s>", "b", "a"), -0.1 - 0.39794 - 0.52288),  # bow(<s> b), no trigram after it: -1.02082
    ("a", ["c", "zzz"], ("c", "<unk>", "a"), -0.2 - 0.52288),  # unknown word as context: bow(<unk>) + P(a)
    # An unknown word predicted: "a b <unk>" and "b <unk>" are not listed, so
    # bow(a b) + bow(b) + P(<unk>) = -0.22185 - 0.39794 - 1.0 = -1.61979.
    ("zzz", ["a", "b"], ("a", "b", "<unk>"), -0.22185 - 0.39794 - 1.0),
]

HAND_SENTENCES = [
    (["a", "b"], -0.30103 - 0.17609 - 0.09691),  # -0.57403
    # P(c | <s>) = -1.0; "<s> c" unlisted, c has no weight: P(a | c) = P(a) = -0.52288;
    # "c a" unlisted: P(</s> | a) = bow(a) + P(</s>) = -0.17609 - 0.69897.
    (["c", "a"], -1.0 - 0.52288 - 0.17609 - 0.69897),  # -2.39794
]


def log10_prob(model, word: str, context: list[str]) -> float:
    return math.log10(model.prob(word, context))


@pytest.fixture
def hand_file(tmp_path):
    path = tmp_path / "hand.arpa"
    path.write_text(HAND, encoding="utf-8")
    return path


@pytest.mark.parametrize("encoding", ["float32", "log16"])
def test_hand_written_model_gives_the_values_worked_out_by_hand(hand_file, encoding):
    model, summary = model_from_arpa(hand_file, encoding=encoding)
    reference = arpa.loadf(hand_file)[0]
    # float32 keeps about 7 digits; log16 rounds a stored value down by under 0.034% (1.5e-4 in log10).
    tolerance = 1e-6 if encoding == "float32" else 1.5e-4
    for word, context, ngram, by_hand in HAND_VALUES:
        assert reference.log_p(ngram) == pytest.approx(by_hand, abs=1e-9), ngram
        assert log10_prob(model, word, context) == pytest.approx(by_hand, abs=tolerance), ngram
    for sentence, by_hand in HAND_SENTENCES:
        assert reference.log_s(sentence) == pytest.approx(by_hand, abs=1e-9)
        assert model.logprob(sentence) / math.log2(10) == pytest.approx(by_hand, abs=3 * tolerance)
    # Hand-picked values: after <s> the listed 0.5 + 0.2 and 0.5 x (0.1 + 0.2 + 0.2) backed off make 0.95.
    assert len(summary.warnings) == 1 and "do not sum to 1 (after '<s>': 0.9499" in summary.warnings[0].replace("0.950000", "0.9499")
    # "b a" and "c b" (a trigram's context and suffix) were added; "<s> b" and <unk> got </s> stored after them.
    assert summary.added == {"2": 3, "3": 1}


def test_every_probability_of_the_hand_model_equals_the_reference_reader(hand_file):
    """All 125 words after all 25 context pairs over a, b, c, <unk>, <s>."""
    model, _ = model_from_arpa(hand_file)
    reference = arpa.loadf(hand_file)[0]
    symbols = ["a", "b", "c", "<unk>", "</s>"]
    for u in ["<s>", "a", "b", "c", "<unk>"]:
        for v in ["<s>", "a", "b", "c", "<unk>"]:
            if v == "<s>" and u != "<s>":
                continue  # <s> only ever follows <s> in a padded sentence
            context = [] if v == "<s>" else ([v] if u == "<s>" else [u, v])
            ngram_context = ("<s>",) if v == "<s>" else (u, v)
            for word in symbols:
                expected = reference.log_p(ngram_context + (word,))
                assert math.log10(model.prob(word, context)) == pytest.approx(expected, abs=1e-6), (u, v, word)


def test_suggest_on_an_imported_model_equals_brute_force(hand_file, tmp_path):
    model, _ = model_from_arpa(hand_file)
    for context in ([], ["a"], ["b"], ["a", "b"], ["a", "c"], ["b", "a"], ["c", "zzz"], ["c", "c"]):
        scores = model.distribution(context)[: model.vocab_size]
        for prefix in ("", "a", "b", "c"):
            ids = np.array([i for i, w in enumerate(model.vocabulary) if w.startswith(prefix)])
            order = np.lexsort((ids, -scores[ids]))
            expected = [(int(ids[i]), float(scores[ids[i]])) for i in order][:2]
            assert [(s.id, s.prob) for s in model.suggest(context, prefix, 2)] == expected


MESSY = (
    "some text a toolkit wrote before the data\n\n"
    "\\data\\\r\n"
    "ngram 1 = 6\n"
    "ngram 2=9\n"  # wrong: the section holds 5
    "ngram 3=4\n\n\n"
    "\\1-grams:\n"
    "-1   <unk>  -0.2\n"
    "-99.5 <s> -0.30103\n"  # below -99: log zero
    "-0.69897 </s> 0\n"
    "-0.52288\ta   -0.17609\n\n"
    "  -0.69897 b -0.39794  \n"
    "-0.69897 c\n"
    "\\2-grams:\n"
    "-0.30103 <s> a -0.09691\n"
    "-0.69897 <s>\tb -0.1\n"
    "-0.39794 a b -0.22185\n"
    "-0.52288 a c\n"
    "-0.1549 b </s>\n"
    "\\3-grams:\n"
    "-0.17609 <s> a b\n"
    "-0.09691 a b </s>\n"
    "-0.30103 a c b\n"
    "-0.5 b a c\n"  # and no \end\
)


def test_what_real_files_contain_is_read_with_warnings(tmp_path, hand_file):
    messy = tmp_path / "messy.arpa.gz"
    with gzip.open(messy, "wt", encoding="utf-8", newline="") as out:
        out.write(MESSY)
    model, summary = model_from_arpa(messy)
    clean, _ = model_from_arpa(hand_file)
    for word, context, _, _ in HAND_VALUES:
        assert model.prob(word, context) == clean.prob(word, context)
    assert any("header says 9 2-grams, the section holds 5" in w for w in summary.warnings)
    assert any("\\end\\" in w for w in summary.warnings)


def test_a_file_without_unknown_gives_unknown_words_probability_zero(tmp_path):
    path = tmp_path / "nounk.arpa"
    path.write_text("\\data\\\nngram 1=3\n\n\\1-grams:\n-0.30103 a\n-0.30103 </s>\n-99 <s>\n\\end\\\n", encoding="utf-8")
    model, summary = model_from_arpa(path)
    assert model.prob("a") == pytest.approx(0.5, rel=1e-6)
    assert model.prob("never-seen") == 0.0
    assert any("no <unk>" in w for w in summary.warnings)
    assert model.perplexity("a a a") == pytest.approx(2.0, rel=1e-6)  # 4 tokens at 1/2 each
    assert model.perplexity("a zzz") == math.inf


def test_a_word_missing_from_the_unigrams_gets_probability_zero_there(tmp_path):
    path = tmp_path / "gap.arpa"
    path.write_text("\\data\\\n\\1-grams:\n-0.30103 a\n-0.30103 </s>\n-1 <unk>\n\\2-grams:\n-0.1 a b\n\\end\\\n", encoding="utf-8")
    model, summary = model_from_arpa(path)
    assert model.prob("b", ["x", "a"]) == pytest.approx(10**-0.1, rel=1e-6)
    assert model.prob("b", []) == 0.0
    assert any("not among the 1-grams" in w for w in summary.warnings)


def test_cased_words_match_case_insensitively_and_keep_their_written_form(tmp_path):
    path = tmp_path / "cased.arpa"
    path.write_text("\\data\\\n\\1-grams:\n-0.30103 NASA\n-0.60206 the\n-0.60206 </s>\n-99 <s>\n\\end\\\n", encoding="utf-8")
    model, _ = model_from_arpa(path)
    assert model.vocabulary == ["nasa", "the"]
    assert model.prob("NASA") == model.prob("nasa") == pytest.approx(0.5, rel=1e-6)
    assert [s.word for s in model.suggest([], "n", 3)] == ["NASA"]


def test_two_words_differing_only_in_case_are_refused(tmp_path, run_cli):
    path = tmp_path / "both.arpa"
    path.write_text("\\data\\\n\\1-grams:\n-0.30103 The\n-0.60206 the\n-0.60206 </s>\n\\end\\\n", encoding="utf-8")
    with pytest.raises(CapacityError, match="'The' and 'the' are one word"):
        model_from_arpa(path)
    result = run_cli("import", path, "-o", tmp_path / "both.model")
    assert result.code == 7 and result.err.count("\n") == 1
    assert not (tmp_path / "both.model").exists()


MALFORMED = [
    ("\\data\\\n\\1-grams:\n-0.x\ta\n\\end\\\n", "line 3: log10 probability '-0.x' is not a number"),
    ("\\data\\\n\\1-grams:\n-0.5\ta\n\\2-grams:\n-0.5\ta a a\n", "line 5: a 2-gram line needs a log10 probability, 2 words"),
    ("\\data\\\n\\1-grams:\n-0.5\ta\n\\3-grams:\n-0.5\ta a a\n", "line 4: \\3-grams: where \\2-grams: was expected"),
    ("just some text\nand more\n", "no \\data\\ line in 2 lines"),
    ("\\data\\\n\\1-grams:\n0.5\ta\n", "line 3: log10 probability 0.5 is above 0"),
    ("\\data\\\nngram one=3\n", "line 2: expected 'ngram N=count'"),
    ("\\data\\\n\\1-grams:\n-0.5\ta\n-0.2\ta\n", "line 4: the 1-gram 'a' is listed twice"),
    ("\\data\\\n\\1-grams:\n-0.5\ta\n\\2-grams:\n-0.5\ta a\n-0.1 a   a\n", "the 2-gram 'a a' is listed twice"),
    ("\\data\\\n\\1-grams:\n-0.5\ta\tnan\n", "line 3: log10 back-off weight 'nan' is not a usable number"),
    ("\\data\\\n\\one-grams:\n", "line 2: \\one-grams: is not a section header"),
    ("\\data\\\nngram 1=1\n", "no \\1-grams: section"),
    ("\\data\\\n\\1-grams:\n-0.5\t<s>\n", "lists no words besides"),
]


@pytest.mark.parametrize("content, message", MALFORMED)
def test_a_malformed_file_is_one_line_exit_5_and_nothing_is_written(tmp_path, run_cli, content, message):
    path = tmp_path / "bad.arpa"
    path.write_text(content, encoding="utf-8")
    previous = tmp_path / "kept.model"
    previous.write_bytes(b"not touched")
    with pytest.raises(ModelFileError) as raised:
        model_from_arpa(path)
    assert message in str(raised.value)
    result = run_cli("import", path, "-o", tmp_path / "new.model")
    assert result.code == 5 and result.err.count("\n") == 1 and message in result.err
    assert not (tmp_path / "new.model").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.arpa", "kept.model"]


def test_invalid_utf8_names_the_line(tmp_path, run_cli):
    path = tmp_path / "bytes.arpa"
    path.write_bytes(b"\\data\\\n\\1-grams:\n-0.5\ta\n-0.5\t\xff\xfe\n")
    result = run_cli("import", path, "-o", tmp_path / "x.model")
    assert result.code == 5 and "line 4: not valid UTF-8" in result.err


def test_an_existing_model_survives_a_failed_import(tmp_path, run_cli, hand_file):
    target = tmp_path / "kept.model"
    assert run_cli("import", hand_file, "-o", target).code == 0
    before = target.read_bytes()
    bad = tmp_path / "bad.arpa"
    bad.write_text(HAND.replace("-0.5\tb a c", "-0.5\tb a"), encoding="utf-8")
    result = run_cli("import", bad, "-o", target)
    assert result.code == 5 and "line 25: a 3-gram line needs" in result.err
    assert target.read_bytes() == before


def test_a_higher_order_is_refused(tmp_path, run_cli):
    path = tmp_path / "four.arpa"
    path.write_text("\\data\\\nngram 1=1\nngram 4=1\n", encoding="utf-8")
    result = run_cli("import", path, "-o", tmp_path / "four.model")
    assert result.code == 7 and "order 4" in result.err and "orders 1 to 3" in result.err
    path.write_text(HAND.replace("\\end\\", "\\4-grams:\n-0.1\ta b c a\n\\end\\"), encoding="utf-8")
    result = run_cli("import", path, "-o", tmp_path / "four.model")
    assert result.code == 7 and "4-gram section" in result.err


def test_tables_spilled_to_disk_equal_tables_kept_in_memory(tmp_path):
    lines = ["\\data\\", "\\1-grams:", "-1\t<unk>", "-1\t</s>", "-99\t<s>\t-0.1"]
    words = [f"w{i}" for i in range(40)]
    lines += [f"-1.6\t{w}\t-0.2" for w in words]
    lines.append("\\2-grams:")
    lines += [f"-{1 + (i * 7 + j) % 5 / 10}\t{a} {b}\t-0.0{(i + j) % 9}" for i, a in enumerate(words) for j, b in enumerate(words[::3])]
    lines.append("\\3-grams:")
    lines += [f"-0.{(i + j) % 9 + 1}\t{a} {b} w{(i * j) % 40}" for i, a in enumerate(words[:20]) for j, b in enumerate(words[::3])]
    path = tmp_path / "many.arpa"
    path.write_text("\n".join(lines) + "\n\\end\\\n", encoding="utf-8")
    kept = read_arpa(path)
    spilled = read_arpa(path, table_rows=120, spill_dir=tmp_path)
    assert kept.spilled_rows == 0 and spilled.spilled_rows > 0
    for name in ("bigrams", "bigram_bows", "trigrams"):
        assert np.array_equal(getattr(kept, name)[0], getattr(spilled, name)[0])
        assert np.array_equal(getattr(kept, name)[1], getattr(spilled, name)[1])
    assert [p.name for p in tmp_path.iterdir()] == ["many.arpa"]  # the spill folder is gone
    path.write_text("\n".join(lines + [lines[-1]]) + "\n", encoding="utf-8")  # one trigram twice, far apart
    with pytest.raises(ModelFileError, match="3-gram .* is listed twice"):
        read_arpa(path, table_rows=120, spill_dir=tmp_path)


def test_import_command_writes_a_model_every_command_reads(tmp_path, run_cli, hand_file):
    target = tmp_path / "hand.model"
    result = run_cli("import", hand_file, "-o", target, "--json")
    assert result.code == 0 and '"order": 3' in result.out
    assert run_cli("info", "-m", target).code == 0
    suggested = run_cli("suggest", "-m", target, "a ", "--json")
    assert suggested.code == 0 and '"word": "b"' in suggested.out
    text = tmp_path / "text.txt"
    text.write_text("a b\nc a\n", encoding="utf-8")
    scored = run_cli("score", "-m", target, "-t", text, "--json")
    assert scored.code == 0
    by_hand = -(HAND_SENTENCES[0][1] + HAND_SENTENCES[1][1]) * math.log2(10) / 6
    assert json.loads(scored.out)["cross_entropy_bits"] == pytest.approx(by_hand, abs=1e-5)
    assert run_cli("savings", "-m", target, "-t", text, "--json").code == 0


def test_a_back_off_weight_above_one_is_kept(tmp_path):
    # "<s> a" lists log10 bow +0.2 and no "<s> a b":
    # P(b | <s> a) = 10^0.2 * P(b | a) = 10^0.2 * 10^-0.5 = 10^-0.3 (worked by hand).
    path = tmp_path / "up.arpa"
    path.write_text(
        "\\data\\\nngram 1=4\nngram 2=2\nngram 3=1\n\n\\1-grams:\n-0.30103\ta\t-0.1\n-0.30103\tb\n-99\t<s>\t0\n-1\t</s>\n\n"
        "\\2-grams:\n-0.2\t<s> a\t0.2\n-0.5\ta b\n\n\\3-grams:\n-0.1\t<s> a a\n\n\\end\\\n",
        encoding="utf-8",
    )
    model, _ = model_from_arpa(path)
    assert math.log10(model.prob("b", ["a"])) == pytest.approx(-0.3, abs=1e-6)
    assert arpa.loadf(path)[0].log_p(("<s>", "a", "b")) == pytest.approx(-0.3, abs=1e-9)


def test_check_holds_an_unnormalised_import_to_its_structure_not_to_sums_of_one(hand_file, tmp_path, run_cli, write_file):
    # The hand file sums to 0.95 after <s> by construction; it is used as it is, so check must not call it corrupt.
    target = tmp_path / "hand.model"
    assert run_cli("import", hand_file, "-o", target).code == 0
    result = run_cli("check", "-m", target)
    assert result.code == 0 and "not checked for sums of 1 (imported from an ARPA file" in result.out
    assert json.loads(run_cli("check", "-m", target, "--json").out)["sums_checked"] is False
    # A normalised file (a built Kneser-Ney model, exported and imported again) is held to sums of 1.
    corpus = write_file("the ferry leaves at noon .\nthe tide turns at noon .\nthe ferry waits for the tide .\n")
    built, exported, again = tmp_path / "built.model", tmp_path / "built.arpa", tmp_path / "again.model"
    assert run_cli("build", corpus, "-o", built).code == 0
    assert run_cli("export", "-m", built, "-o", exported).code == 0
    assert run_cli("import", exported, "-o", again).code == 0
    result = run_cli("check", "-m", again)
    assert result.code == 0 and result.out.rstrip().endswith("and sampled distributions sum to 1")
