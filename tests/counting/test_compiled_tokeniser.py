"""The compiled tokeniser finds and numbers exactly the tokens the regular expression finds.

Reference: Python's own regular expression engine running ``TOKEN_RE``
(``re.findall``) over the prepared text, numbered in order of first appearance;
and the build's counts with and without the compiled tokeniser (identical, to
the last trigram).
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_counting import assert_same_counts

import foretype
from foretype import counting
from foretype.counting import tokenisers
from foretype.counting.memory import MemoryBudget
from foretype.text import TOKEN_RE, prepare

pytestmark = pytest.mark.skipif(tokenisers.number_tokens is None, reason="the compiled tokeniser is not built")

# Letters and digits of several scripts (² is a digit but not a decimal digit, ٣ is an Arabic-Indic decimal
# digit), combining marks inside and outside the joined ranges, every joiner, sentence ends, separators.
PIECES = list("aZé東Ωß0795²٣") + ["\u0301", "\u0651", "\u093f", "\u20d7", "\u0332"] + list("'’-.,:!?…。！？\n _\t\"()") + ["🙂", "\u2028", "x"]


def numbered_by_regex(text: str) -> tuple[list[int], list[str]]:
    """Each token's number in order of first appearance, and the forms in that order."""
    numbers: dict[str, int] = {}
    return [numbers.setdefault(t, len(numbers)) for t in TOKEN_RE.findall(text)], list(numbers)


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(PIECES), max_size=60).map("".join))
def test_compiled_scan_equals_the_regular_expression(raw: str) -> None:
    text = prepare(raw)
    expected, forms = numbered_by_regex(text)
    numbers = tokenisers.FormTable()
    found = tokenisers.number_tokens(text, numbers)
    assert found.dtype == np.int32
    assert found.tolist() == expected
    assert numbers.fresh == forms
    assert len(numbers) == len(forms)


def test_worked_examples() -> None:
    # The rules of foretype.text (README "Text conventions"): joined words, numbers with separators, sentence
    # ends; a full stop joins digits only, and a joiner must be followed by a letter or digit.
    text = prepare("Don't stop: half-past 7:40, 3.5 or 1,200!! Naïve café… 12:a a.1 x-’y")
    numbers = tokenisers.FormTable()
    found = tokenisers.number_tokens(text, numbers)
    assert [numbers.fresh[i] for i in found.tolist()] == [
        "Don't", "stop", "half-past", "7:40", "3.5", "or", "1,200", "!!", "Naïve", "café", "…", "12", "a", "a", ".", "1", "x", "y",
    ]  # fmt: skip


def test_numbers_continue_a_table_already_holding_forms() -> None:
    numbers = tokenisers.FormTable()
    assert tokenisers.number_tokens("ferry\n", numbers).tolist() == [0, 1]
    numbers.fresh = []
    found = tokenisers.number_tokens(prepare("the ferry\nthe tide"), numbers)
    assert found.tolist() == [2, 0, 1, 2, 3]
    assert numbers.fresh == ["the", "tide"]


@settings(max_examples=60, deadline=None)
@given(st.lists(st.lists(st.sampled_from(PIECES), max_size=30).map("".join), min_size=1, max_size=8))
def test_one_table_over_many_texts_numbers_as_one_dictionary(raws: list[str]) -> None:
    # Reference: a Python dict numbering forms in order of first appearance, kept across the texts.
    numbers = tokenisers.FormTable()
    reference: dict[str, int] = {}
    for raw in raws:
        text = prepare(raw)
        expected = [reference.setdefault(t, len(reference)) for t in TOKEN_RE.findall(text)]
        assert tokenisers.number_tokens(text, numbers).tolist() == expected
    assert numbers.fresh == list(reference)


def test_a_table_grown_past_its_first_size_keeps_every_number() -> None:
    # Many distinct forms and scripts (1, 2 and 4 bytes a character): the table and its character store grow.
    words = [f"w{i}" for i in range(30_000)] + [f"Ωx{i}" for i in range(3_000)] + [f"\U0001d4b3{i}" for i in range(3_000)]
    numbers = tokenisers.FormTable()
    found = tokenisers.number_tokens(" ".join(words), numbers)
    assert found.tolist() == list(range(len(words)))
    again = tokenisers.number_tokens(" ".join(reversed(words)), numbers)
    assert again.tolist() == list(range(len(words) - 1, -1, -1))
    assert numbers.fresh == words


def test_counts_with_and_without_the_compiled_tokeniser_are_identical(tmp_path, monkeypatch) -> None:
    lines = [f"Crossing {i % 97} leaves at 7:{i % 60:02d}, don’t be late! Wörd{i % 1313} and café-{i % 7}… 東京。ok" for i in range(3000)]
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("\n".join(lines) + "\n", encoding="utf-8")
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BYTES", 0)
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BUDGET", 0)
    monkeypatch.setattr(MemoryBudget, "chunk_bytes", property(lambda self: 1 << 14))
    compiled = counting.count_corpus([corpus])
    monkeypatch.setenv(tokenisers.PURE_ENV, "1")
    assert not tokenisers.compiled_tokeniser()
    pure = counting.count_corpus([corpus])
    assert_same_counts(compiled, pure)


CHILD = """
import sys
sys.modules["foretype.counting._tokenise"] = None  # blocked: as if the install had found no compiler
sys.modules["foretype.query._prefixes"] = None
sys.modules["foretype.counting._trigrams"] = None
sys.modules["foretype.estimate._estimate"] = None
from foretype import counting
from foretype.counting import compiled, tokenisers
from foretype.estimate import kneser_ney, layout
from foretype.query import vocabulary
assert tokenisers.number_tokens is None and not tokenisers.compiled_tokeniser()
assert vocabulary._compiled_prefix_ranges is None
assert compiled.count_sentences is None and not compiled.compiled_trigrams()
assert kneser_ney.compiled_discounted is None and layout.compiled_layout is None
counting.run.PARALLEL_MIN_BYTES = counting.run.PARALLEL_MIN_BUDGET = 0
import foretype
model = foretype.build_from_counts(counting.count_corpus([sys.argv[1]]))
print(repr((model.vocabulary, [tuple(s) for s in model.suggest(["the"], "", 5)], model.ngram_counts())))
"""


def test_build_without_the_compiled_steps_gives_the_same_model(tmp_path, monkeypatch) -> None:
    # Reference: the same build in this process, with the compiled tokeniser, trigram steps, estimation steps and prefix walk.

    lines = [f"Crossing {i % 97} leaves at 7:{i % 60:02d}, don’t be late! Wörd{i % 313} and the café-{i % 7}." for i in range(2000)]
    corpus = tmp_path / "corpus.txt"
    corpus.write_text("\n".join(lines) + "\n", encoding="utf-8")
    done = subprocess.run([sys.executable, "-c", CHILD, str(corpus)], capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BYTES", 0)
    monkeypatch.setattr(counting.run, "PARALLEL_MIN_BUDGET", 0)
    model = foretype.build_from_counts(counting.count_corpus([corpus]))
    assert done.stdout.strip() == repr((model.vocabulary, [tuple(s) for s in model.suggest(["the"], "", 5)], model.ngram_counts()))
