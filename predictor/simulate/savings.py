"""simulate(): type a text with a model and report the keystrokes saved."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import asdict

from ..query.model import LanguageModel
from .entry_rate import entry_rate
from .oracle import VocabularyView, baseline_keystrokes, oracle_keystrokes
from .passage import read_passage
from .report import SavingsReport, latency_summary
from .typist import SuggestionSource, Typist, TypistSettings, WordObserver

DEFAULT_SETTINGS = TypistSettings()
"""The settings ``simulate`` uses when none are given."""


def simulate(
    model: LanguageModel,
    text: str,
    settings: TypistSettings = DEFAULT_SETTINGS,
    progress: Callable[[int, int], None] | None = None,
    *,
    source: SuggestionSource | None = None,
    keep_traces: bool = True,
    after_word: WordObserver | None = None,
) -> SavingsReport:
    """Simulate a typist entering a text with a model's suggestions.

    Args:
        model: the model; its vocabulary defines the oracle, the baseline and
            the out-of-vocabulary rate.
        text: the text to enter exactly.
        settings: how the typist works.
        progress: called with (words done, words in all) now and then.
        source: where suggestions come from instead of ``model`` (for example
            the model combined with a user model); the oracle and baseline still
            use ``model``'s vocabulary.
        keep_traces: keep a per-word trace in the report.
        after_word: called after each word (an adaptive source learns here).

    Returns:
        The report.

    Raises:
        CorpusError: the text holds no words.
        OptionError: a setting is out of range.
    """
    passage = read_passage(text, settings.text_mode, wrapped=settings.wrapped)
    vocab = model.vocab
    typist = Typist(source if source is not None else model, settings, known=vocab.__contains__)
    run = typist.type_passage(passage, progress=progress, keep_traces=keep_traces, after_word=after_word)
    view = VocabularyView.of(model)
    oracle = oracle_keystrokes(passage, view, settings)
    baseline = baseline_keystrokes(passage, view, model.arrays.p1[: vocab.size], settings)
    words = len(passage.words)
    characters = passage.characters
    ksr = 1.0 - run.keystrokes / characters
    oracle_ksr = 1.0 - oracle / characters
    outside = sum(1 for w in passage.words if w.model not in view.ids)
    return SavingsReport(
        words=words,
        characters=characters,
        keystrokes=run.keystrokes,
        ksr=ksr,
        keystrokes_per_char=run.keystrokes / characters,
        oov_rate=outside / words,
        hit_before_first_letter=run.picked_before_letter / words,
        hit_at_1=run.picked_first / words,
        mean_keystrokes_per_word=run.keystrokes / words,
        oracle_ksr=oracle_ksr,
        ksr_of_oracle=ksr / oracle_ksr if oracle_ksr > 0 else None,
        baseline_ksr=1.0 - baseline / characters,
        latency_us=latency_summary(run.latencies_ns),
        entry_rate=entry_rate(characters, run.keystrokes, run.list_reads, key_seconds=settings.key_seconds, scan_seconds=settings.scan_seconds),
        trace=run.traces,
        queries=len(run.latencies_ns),
        picked=run.picked,
        oracle_keystrokes=oracle,
        baseline_keystrokes=baseline,
        settings=asdict(settings),
    )
