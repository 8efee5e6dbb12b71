"""One system's KSR interval from a finished simulation (the sweep's optional column)."""

from __future__ import annotations

from collections.abc import Sequence

from ..simulate.passage import read_passage
from ..simulate.sentences import per_sentence, sentence_characters
from ..simulate.typist import TypistSettings, WordTrace
from ..stats import RatioMeasure, bootstrap_interval
from .runner import MEASURES


def ksr_interval(
    text: str,
    settings: TypistSettings,
    traces: Sequence[WordTrace],
    *,
    resamples: int = 1000,
    seed: int | None = 0,
    confidence: float = 0.95,
) -> tuple[float, float] | None:
    """The percentile-bootstrap interval of a simulation's KSR, resampling sentences.

    Args:
        text: the test text the typist entered.
        settings: the settings it used (text mode and wrapping decide the sentences).
        traces: the run's word traces, one per word (``simulate(..., keep_traces=True).trace``).
        resamples: bootstrap resamples.
        seed: the generator's seed.
        confidence: the coverage.

    Returns:
        (low, high), as fractions like ``ksr``.
    """
    passage = read_passage(text, settings.text_mode, wrapped=settings.wrapped)
    keystrokes = per_sentence(passage, [t.keystrokes for t in traces])
    characters = sentence_characters(passage)
    measure = RatioMeasure("ksr", keystrokes[None, :], characters[None, :], MEASURES["ksr"].transform)
    return bootstrap_interval(measure, resamples=resamples, seed=seed, confidence=confidence)[0]
