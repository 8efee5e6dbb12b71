"""Keystroke savings with adaptation: the simulated typist teaches the user model as it types.

After each word the typist produced (picked or typed in full) the word is
learned with its sentence context, and the end of each sentence is learned
when the next sentence starts, so every suggestion is made with what the
person had written before it and nothing after.  The user model starts empty,
or from a learned file (which is read, never changed).

Besides the KSR over the whole text, the text is cut into successive blocks of
``block_words`` words and each block's KSR, 1 - keystrokes / characters within
the block, is reported for the adapting typist and, side by side, for the same
typist without adaptation: the curve shows how fast learning pays off.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

from ..errors import OptionError
from ..query.model import LanguageModel
from ..simulate import SavingsReport, TypistSettings, WordTrace, read_passage, simulate
from ..simulate.passage import Passage, PassageWord
from .combined import AdaptedModel

BLOCK_WORDS = 500
"""Words per block of the savings curve, by default."""


class LearningObserver:
    """Feeds each word the simulated typist produced into a combined model."""

    def __init__(self, model: AdaptedModel) -> None:
        """Learn into ``model`` (nothing is learned while its learning is off)."""
        self.model = model
        self._last: tuple[str, ...] = ()

    def __call__(self, word: PassageWord, picked: bool) -> None:
        """Learn one word (the simulator calls this after each word)."""
        if word.sentence_start:
            self.finish()
        self.model.learn([word.written], after=word.context)
        self._last = (*word.context, word.written)[-2:]

    def finish(self) -> None:
        """Learn the end of the sentence in progress, if any."""
        if self._last:
            self.model.learn([], after=self._last, end=True)
            self._last = ()


@dataclass(frozen=True)
class CurvePoint:
    """Savings over one block of words.

    Attributes:
        first_word: 1-based index of the block's first word.
        last_word: index of its last word.
        characters: characters in the block.
        ksr_adapted: the block's KSR with adaptation.
        ksr_base: the block's KSR without (None if not simulated).
    """

    first_word: int
    last_word: int
    characters: int
    ksr_adapted: float
    ksr_base: float | None

    def to_json(self) -> dict[str, Any]:
        """The point as a JSON object."""
        return {
            "first_word": self.first_word,
            "last_word": self.last_word,
            "characters": self.characters,
            "ksr_adapted": self.ksr_adapted,
            "ksr_base": self.ksr_base,
        }


@dataclass(frozen=True)
class AdaptiveSavings:
    """The outcome of a simulation with adaptation.

    Attributes:
        adapted: the report of the adapting typist.
        base: the report of the same typist without adaptation (None if skipped).
        curve: block-by-block KSR.
        block_words: words per block.
        learned: what the user model held at the end: ``tokens``, ``new_words``
            (words the base vocabulary lacks, now suggestable), ``share`` (mu per evidence bucket).
    """

    adapted: SavingsReport
    base: SavingsReport | None
    curve: list[CurvePoint]
    block_words: int
    learned: dict[str, Any]

    def to_json(self) -> dict[str, Any]:
        """The adaptation figures as one JSON object (the reports themselves are separate)."""
        return {
            "ksr_adapted": self.adapted.ksr,
            "ksr_base": None if self.base is None else self.base.ksr,
            "gain": None if self.base is None else self.adapted.ksr - self.base.ksr,
            "block_words": self.block_words,
            "curve": [point.to_json() for point in self.curve],
            "learned": self.learned,
        }


def block_savings(passage: Passage, traces: Sequence[WordTrace], block_words: int) -> list[tuple[int, int, int, float]]:
    """KSR per successive block of words.

    Args:
        passage: the text as typed.
        traces: one trace per word (keystrokes of the word and what follows it).
        block_words: words per block (a remainder shorter than half a block joins the last block).

    Returns:
        ``(first word, last word, characters, ksr)`` per block, 1-based word indices.

    Raises:
        OptionError: block_words is not positive, or the traces do not match the passage.
    """
    if block_words < 1:
        raise OptionError(f"the block size must be at least 1 word, not {block_words}")
    if len(traces) != len(passage.words):
        raise OptionError("the simulation kept no per-word traces to cut into blocks")
    blocks = []
    starts = list(range(0, len(traces), block_words))
    if len(starts) > 1 and len(traces) - starts[-1] < block_words // 2:
        starts.pop()  # a short remainder joins the block before it
    for index, start in enumerate(starts):
        stop = starts[index + 1] if index + 1 < len(starts) else len(traces)
        characters = sum(_characters(passage, i) for i in range(start, stop))
        keystrokes = sum(t.keystrokes for t in traces[start:stop])
        blocks.append((start + 1, stop, characters, 1.0 - keystrokes / characters if characters else 0.0))
    return blocks


def _characters(passage: Passage, index: int) -> int:
    word = passage.words[index]
    lead = len(passage.lead) if index == 0 else 0
    return lead + len(word.target) + len(word.gap)


def simulate_adaptive(
    model: LanguageModel,
    text: str,
    settings: TypistSettings,
    progress: Callable[[int, int], None] | None = None,
    *,
    start: AdaptedModel | None = None,
    block_words: int = BLOCK_WORDS,
    compare: bool = True,
) -> AdaptiveSavings:
    """Simulate a typist whose words feed a user model as they go.

    Args:
        model: the base model.
        text: the text to enter.
        settings: the typist's settings.
        progress: called with (words done, words in all); with ``compare`` the
            two runs report one after the other, as (done, 2 * words).
        start: the combined model to start from (default: an empty user model);
            it is changed by the run, so pass a copy of anything to keep.
        block_words: words per block of the curve.
        compare: also simulate without adaptation, for the curve's second line.

    Returns:
        The reports, the curve and what was learned.

    Raises:
        CorpusError: the text holds no words.
        OptionError: a setting is out of range.
    """
    if block_words < 1:
        raise OptionError(f"the block size must be at least 1 word, not {block_words}")
    adapted = start if start is not None else AdaptedModel(model)
    passage = read_passage(text, settings.text_mode, wrapped=settings.wrapped)
    total = len(passage.words) * (2 if compare else 1)

    def first(done: int, _: int) -> None:
        if progress is not None:
            progress(done, total)

    def second(done: int, _: int) -> None:
        if progress is not None:
            progress(len(passage.words) + done, total)

    observer = LearningObserver(adapted)
    with_learning = simulate(model, text, settings, first, source=adapted, after_word=observer)
    observer.finish()
    without = simulate(model, text, settings, second) if compare else None
    ours = block_savings(passage, with_learning.trace, block_words)
    theirs = block_savings(passage, without.trace, block_words) if without is not None else None
    curve = [CurvePoint(first_word, last_word, chars, ksr, None if theirs is None else theirs[i][3]) for i, (first_word, last_word, chars, ksr) in enumerate(ours)]
    user = adapted.user
    learned = {"tokens": user.raw_tokens, "new_words": len(user.ready_forms()), "share": user.shares()}
    return AdaptiveSavings(with_learning, without, curve, block_words, learned)


_BAR_WIDTH = 40


def _bar(ksr: float, glyph: str) -> str:
    return glyph * max(0, round(max(0.0, ksr) * _BAR_WIDTH))


def format_adaptation(result: AdaptiveSavings) -> str:
    """The adaptation figures as text: KSR with and without learning, and the curve as a bar chart.

    Each block has two bars on a 0-100% scale: ``█`` with learning, ``░`` without.
    """
    lines = []
    base = result.base
    if base is not None:
        gain = result.adapted.ksr - base.ksr
        lines.append(
            f"adaptation: KSR {100 * base.ksr:.1f}% without learning, {100 * result.adapted.ksr:.1f}% with "
            f"({100 * gain:+.1f} points); the user model started as given and learned every word typed"
        )
    else:
        lines.append(f"adaptation: KSR {100 * result.adapted.ksr:.1f}% with learning")
    learned = result.learned
    shares = ", ".join(f"{name.replace('_', ' ')} {100 * share:.0f}%" for name, share in learned["share"].items())
    lines.append(f"learned {learned['tokens']:,} tokens, {learned['new_words']:,} new words suggestable; user share by context seen: {shares}")
    lines.append("")
    lines.append(f"KSR per block of {result.block_words:,} words (█ with learning, ░ without; full bar = 100%):")
    width = len(f"{result.curve[-1].first_word:,}-{result.curve[-1].last_word:,}") if result.curve else 9
    for point in result.curve:
        label = f"{point.first_word:,}-{point.last_word:,}".rjust(width)
        lines.append(f"  {label}  {100 * point.ksr_adapted:5.1f}%  {_bar(point.ksr_adapted, '█')}")
        if point.ksr_base is not None:
            lines.append(f"  {'':>{width}}  {100 * point.ksr_base:5.1f}%  {_bar(point.ksr_base, '░')}")
    lines.append("")
    lines.append("A learned user model holds personal text: it stays on this machine, can be inspected and wiped (foretype learned).")
    return "\n".join(lines)
