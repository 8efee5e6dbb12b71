"""Properties of the simulated typist that hold for every model and text.

* A source that always offers the intended word reaches the oracle exactly
  (the vocabulary-limited gold standard of Trnka & McCoy, "Evaluating Word
  Prediction: Framing Keystroke Savings", ACL 2008).
* With k = 1 and a model that offers nothing useful, nothing is saved
  (KSR = 1 - keystrokes / characters = 0).
* KSR never falls as k grows: the exact top-k lists nest (common practice for
  exact top-k; property test).
* No model beats the oracle, and the typist never spends more than typing the text.
* A context-free frequency-list source typed through the typist equals the
  baseline computed from the vocabulary arrays by bisection (two independent paths).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import foretype
from foretype.query.model import Suggestion
from foretype.simulate import TypistSettings, simulate
from foretype.text import iter_sentences, model_form

CORPUS = """the ferry to fennick isle leaves at eight.
the gannet's wake is late again, sorry!
can you check the bilge pumps on the dunnock?
see you at the slipway at low water.
the café is shut for the deep clean today.
is the shuttle to wrenna sands running?
thanks, see you at the café.
the swell is picking up off puffin ledge.
the quell star is running about five minutes behind.
can anyone cover the early crossing on friday?
"""

WORDS = ["the", "ferry", "is", "late", "see", "you", "at", "slipway", "café", "Maren", "swell", "Fennick", "quell", "cross", "zz"]
MARKS = [" ", " ", " ", ", ", ". ", "! ", "\n", "? ", " (", '" ', " - ", "\n\n", "…"]


@pytest.fixture(scope="module")
def small_model() -> foretype.LanguageModel:
    return foretype.build_from_counts(_counts(CORPUS), method="kneser-ney")


def _counts(text: str) -> foretype.CorpusCounts:
    from foretype.counting import CorpusCounter

    counter = CorpusCounter()
    counter.add_text(text)
    counter.end_document()
    return counter.finish()


class EveryWordSource:
    """Offers every vocabulary word that matches the prefix, ignoring k: the intended word is always offered."""

    def __init__(self, model: foretype.LanguageModel) -> None:
        self.words = model.vocab.words()
        self.display = [model.vocab.display(i) for i in range(len(self.words))]

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        return (0, 0)

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        wanted = model_form(prefix)
        return [Suggestion(self.display[i], 1.0, 1, i) for i, w in enumerate(self.words) if w.startswith(wanted)]


class NothingSource:
    """Offers nothing, whatever is typed."""

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        return (0, 0)

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        return []


class FrequencyListSource:
    """The k most probable words under the unigram array that match the prefix, by brute force over all words."""

    def __init__(self, model: foretype.LanguageModel) -> None:
        size = model.vocab_size
        p1 = np.asarray(model.sections["p1"][:size], dtype=np.float64)
        self.ranked = [int(i) for i in sorted(range(size), key=lambda i: (-p1[i], i))]
        self.words = model.vocab.words()
        self.display = [model.vocab.display(i) for i in range(size)]

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        return (0, 0)

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        wanted = model_form(prefix)
        found = [i for i in self.ranked if self.words[i].startswith(wanted)][:k]
        return [Suggestion(self.display[i], 1.0, 1, i) for i in found]


texts = st.lists(st.tuples(st.sampled_from(WORDS), st.sampled_from(MARKS)), min_size=1, max_size=14).map(
    lambda pairs: "".join(word + mark for word, mark in pairs)
)
typists = st.builds(
    TypistSettings,
    k=st.integers(1, 4),
    text_mode=st.sampled_from(["full", "words"]),
    select_cost=st.sampled_from([0.0, 0.5, 1.0, 2.0]),
    autospace=st.booleans(),
    min_prefix=st.integers(0, 2),
    # The baseline is the plain exact list at every letter, so the typist shows it as it is.
    skip_passed=st.just(False),
)


@settings(max_examples=60, deadline=None)
@given(text=texts, typist=typists)
def test_a_source_that_always_offers_the_word_reaches_the_oracle_exactly(small_model: foretype.LanguageModel, text: str, typist: TypistSettings) -> None:
    report = simulate(small_model, text, typist, source=EveryWordSource(small_model))
    assert report.keystrokes == report.oracle_keystrokes
    assert report.ksr == report.oracle_ksr


@settings(max_examples=60, deadline=None)
@given(text=texts, typist=typists)
def test_a_context_free_frequency_list_through_the_typist_equals_the_baseline(small_model: foretype.LanguageModel, text: str, typist: TypistSettings) -> None:
    report = simulate(small_model, text, typist, source=FrequencyListSource(small_model))
    assert report.keystrokes == report.baseline_keystrokes


@settings(max_examples=40, deadline=None)
@given(text=texts, typist=typists)
def test_ksr_never_falls_as_k_grows(small_model: foretype.LanguageModel, text: str, typist: TypistSettings) -> None:
    from dataclasses import replace

    ksrs = [simulate(small_model, text, replace(typist, k=k), keep_traces=False).ksr for k in (1, 2, 3, 5, 8)]
    assert ksrs == sorted(ksrs)


@settings(max_examples=40, deadline=None)
@given(text=texts, typist=typists)
def test_no_model_beats_the_oracle_and_none_costs_more_than_typing(small_model: foretype.LanguageModel, text: str, typist: TypistSettings) -> None:
    report = simulate(small_model, text, typist)
    assert 0.0 <= report.ksr <= report.oracle_ksr
    assert 0.0 <= report.baseline_ksr <= report.oracle_ksr
    assert sum(t.keystrokes for t in report.trace) == pytest.approx(report.keystrokes)
    assert report.words == len(report.trace)


@settings(max_examples=60, deadline=None)
@given(text=texts, wrapped=st.booleans())
def test_sentence_starts_and_contexts_follow_the_tokenizer(text: str, wrapped: bool) -> None:
    from foretype.simulate import read_passage

    passage = read_passage(text, wrapped=wrapped)
    sentences: list[list[str]] = []
    for word in passage.words:
        if word.sentence_start:
            sentences.append([])
        assert word.context == tuple(sentences[-1][-2:])
        sentences[-1].append(word.written)
    assert sentences == list(iter_sentences(text, wrapped=wrapped))
    assert len(passage.lead) + sum(len(w.written) + len(w.gap) for w in passage.words) == passage.characters == len(text)


def test_k_of_one_with_a_model_that_knows_none_of_the_words_saves_nothing() -> None:
    model = foretype.build_from_counts(_counts("zzyzx.\n"))
    report = simulate(model, "The ferry is late, Maren.\nSee you at the slipway!\n", TypistSettings(k=1))
    assert report.ksr == 0.0
    assert report.keystrokes == report.characters
    assert report.oov_rate == 1.0
    assert report.oracle_ksr == 0.0 and report.ksr_of_oracle is None


def test_k_of_one_with_a_source_that_offers_nothing_saves_nothing(small_model: foretype.LanguageModel) -> None:
    text = "the ferry is late.\nsee you at the slipway!\n"
    for mode in ("full", "words"):
        report = simulate(small_model, text, TypistSettings(k=1, text_mode=mode), source=NothingSource())
        assert report.ksr == 0.0
        assert report.keystrokes == report.characters
        assert report.hit_before_first_letter == 0.0


def test_a_word_written_differently_from_every_offer_is_typed_in_full(small_model: foretype.LanguageModel) -> None:
    # "FERRY" matches "ferry" case-insensitively, but picking would write "ferry": the typist types it.
    report = simulate(small_model, "the FERRY\n", TypistSettings(k=5))
    ferry = report.trace[1]
    assert ferry.picked_at is None and ferry.in_vocabulary
    assert ferry.keystrokes == len("FERRY") + 1
    assert any("ferry" in shown for shown in ferry.shown)


def test_a_sentence_start_is_offered_with_a_capital(small_model: foretype.LanguageModel) -> None:
    report = simulate(small_model, "The ferry.\n", TypistSettings(k=5))
    assert all(form[:1].isupper() for form in report.trace[0].shown[0])
    assert report.trace[0].picked_at == ""
