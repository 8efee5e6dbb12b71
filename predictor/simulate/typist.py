"""The simulated typist: types a passage exactly, picking suggestions when they are right.

Before each word and after every letter, while a pick could still save
keystrokes, the typist asks the suggestion source for the top k words for the
sentence's last two words and the letters typed so far.  If the word it means
to write is offered (in full mode its written form must equal the offered form,
so case matters; at a sentence start the offers carry a capital first letter,
as the engine shows them), it picks it at ``select_cost`` keystrokes; otherwise
it types the next letter.  A word never offered is typed in full.  What follows
each word costs what :mod:`foretype.simulate.editing` says.

The source is anything with ``context_ids`` and ``suggest_ids`` (a
:class:`~foretype.query.model.LanguageModel`, or a model combined with a user model).
A source that also has ``suggest_steps`` (LanguageModel does) answers all the
steps of a word in one call.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.model import Suggestion
from ..query.passed_over import suggest_without
from ..query.source import SuggestionSource
from ..text import capitalise, model_form
from .editing import gap_keystrokes, latest_useful_pick
from .passage import TEXT_MODES, Passage, PassageWord


@dataclass(frozen=True)
class TypistSettings:
    """How the simulated typist works and what its time costs.

    Attributes:
        k: suggestions shown at each step.
        text_mode: ``full`` (the text as written) or ``words`` (lower-cased words, single spaces).
        select_cost: keystrokes one pick costs.
        autospace: a pick also writes the space after the word.
        min_prefix: letters typed before the typist looks at suggestions.
        key_seconds: seconds per keystroke (entry-rate estimate).
        scan_seconds: seconds to read a changed suggestion list (entry-rate estimate).
        wrapped: the text is hard-wrapped prose (single line breaks are spaces),
            as for a model built with ``--wrapped``.
        skip_passed: within one word, leave out the words already shown and
            passed over (:mod:`foretype.query.passed_over`); on by default,
            since it saved keystrokes on every text measured (docs/learning.md).

    Raises:
        OptionError: a value is out of range.
    """

    k: int = 5
    text_mode: str = "full"
    select_cost: float = 1.0
    autospace: bool = True
    min_prefix: int = 0
    key_seconds: float = 1.0
    scan_seconds: float = 0.5
    wrapped: bool = False
    skip_passed: bool = True

    def __post_init__(self) -> None:
        if not isinstance(self.k, int) or self.k < 1:
            raise OptionError(f"k must be at least 1, not {self.k}")
        if self.text_mode not in TEXT_MODES:
            raise OptionError(f"unknown text mode {self.text_mode!r}; choose one of {', '.join(TEXT_MODES)}")
        if not (math.isfinite(self.select_cost) and self.select_cost >= 0):
            raise OptionError(f"the select cost must be a number of keystrokes, 0 or more, not {self.select_cost}")
        if not isinstance(self.min_prefix, int) or self.min_prefix < 0:
            raise OptionError(f"the minimum prefix must be 0 or more letters, not {self.min_prefix}")
        if not (math.isfinite(self.key_seconds) and self.key_seconds > 0):
            raise OptionError(f"seconds per key must be a positive number, not {self.key_seconds}")
        if not (math.isfinite(self.scan_seconds) and self.scan_seconds >= 0):
            raise OptionError(f"seconds per list scan must be 0 or more, not {self.scan_seconds}")


@dataclass(frozen=True)
class WordTrace:
    """What typing one word cost.

    Attributes:
        word: the word as the typist produced it (its written form in full mode,
            its model form in words mode).
        keystrokes: keystrokes spent on the word and the characters after it up
            to the next word (the first word also carries any characters before it).
        picked_at: the prefix typed when the word was picked, or None if typed in full.
        rank: the pick's 1-based place in the list, or None.
        shown: the suggestion lists shown, one per step (step j after
            ``min_prefix + j`` letters; display forms as offered, capitalised at
            a sentence start in full mode); the steps end at the pick, at the
            first empty list, or where a pick could no longer pay.
        in_vocabulary: the word's model form is in the model's vocabulary.
    """

    word: str
    keystrokes: float
    picked_at: str | None
    rank: int | None
    shown: list[list[str]] = field(default_factory=list)
    in_vocabulary: bool = False

    def to_json(self) -> dict[str, Any]:
        """The trace as one JSON object (a line of ``--trace``)."""
        return {
            "word": self.word,
            "keystrokes": self.keystrokes,
            "picked_at": self.picked_at,
            "rank": self.rank,
            "shown": self.shown,
            "in_vocabulary": self.in_vocabulary,
        }


@dataclass
class TypingRun:
    """The raw outcome of typing a passage.

    Attributes:
        traces: one per word (empty if traces were not kept).
        keystrokes: total keystrokes.
        picked: words picked from a list.
        picked_before_letter: words picked before any letter was typed.
        picked_first: words picked at rank 1.
        list_reads: times the typist read a suggestion list that had changed.
        latencies_ns: int64 array of shape (queries,): each suggestion query's time in nanoseconds.
    """

    traces: list[WordTrace]
    keystrokes: float
    picked: int
    picked_before_letter: int
    picked_first: int
    list_reads: int
    latencies_ns: np.ndarray


@dataclass
class _ListReading:
    """How many times the typist read a changed suggestion list (the entry-rate estimate charges each read)."""

    reads: int = 0
    last: list[str] | None = None

    def see(self, forms: list[str]) -> None:
        """Count a read when the list differs from the one read last."""
        if forms != self.last:
            self.reads += 1
            self.last = forms


def _find_pick(
    word: PassageWord,
    asked: Iterator[list[Suggestion]],
    steps: range,
    *,
    capital: bool,
    full: bool,
    shown: list[list[str]] | None,
    reading: _ListReading,
    passed: set[str] | None,
) -> tuple[str | None, int | None]:
    """Walk a word's lists, step by step, until the word is offered.

    Returns:
        ``(prefix typed when picked, rank)``, or ``(None, None)`` when the word is typed in full.
    """
    target = word.target
    for step, found in zip(steps, asked):
        forms = [capitalise(s.word) for s in found] if capital else [s.word for s in found]
        if shown is not None:
            shown.append(forms)
        if not forms:
            break
        reading.see(forms)
        if full:
            place = forms.index(target) if target in forms else -1
        else:
            place = next((i for i, form in enumerate(forms) if model_form(form) == target), -1)
        if place >= 0:
            return target[:step], place + 1
        if passed is not None:
            passed.update(model_form(form) for form in forms)
    return None, None


def _lists_asked(source: SuggestionSource, u: int, v: int, target: str, first: int, last: int, k: int, model_form: str, latencies: list[int]) -> Iterator[list[Suggestion]]:
    """The suggestion lists of one word's steps, ``first`` to ``last`` letters, as the typist reads them.

    A source with ``suggest_steps`` answers the steps in one call that ends at
    the first list offering the word (where the typist picks it) or the first
    empty list (where it stops asking); each step then counts its share of the
    call's time as its latency.  If the typist reads on past that list (the
    offered form differs from the written one), the remaining steps are asked
    for in another call.  Other sources are asked step by step.
    """
    clock = time.perf_counter_ns
    batch = getattr(source, "suggest_steps", None)
    step = first
    until: str | None = model_form
    while step <= last:
        if batch is None:
            started = clock()
            found = source.suggest_ids(u, v, target[:step], k)
            latencies.append(clock() - started)
            step += 1
            yield found
            continue
        started = clock()
        lists = batch(u, v, [target[:s] for s in range(step, last + 1)], k, until)
        share = (clock() - started) // max(1, len(lists))
        until = None
        for found in lists:
            latencies.append(share)
            step += 1
            yield found


def _lists_without(source: SuggestionSource, u: int, v: int, target: str, first: int, last: int, k: int, passed: set[str], latencies: list[int]) -> Iterator[list[Suggestion]]:
    """The lists of one word's steps with the words passed over left out, asked step by step.

    ``passed`` is read at each step, so words the typist adds to it between
    steps are left out of the later lists.
    """
    clock = time.perf_counter_ns
    for step in range(first, last + 1):
        started = clock()
        found = suggest_without(source, u, v, target[:step], k, passed)
        latencies.append(clock() - started)
        yield found


WordObserver = Callable[[PassageWord, bool], None]
"""Called after each word with the word and whether it was picked (an adaptive source learns here)."""


class Typist:
    """Types passages with one suggestion source and one set of settings."""

    def __init__(self, source: SuggestionSource, settings: TypistSettings, *, known: Callable[[str], bool] | None = None) -> None:
        """Prepare a typist.

        Args:
            source: where suggestions come from.
            settings: the typist's settings.
            known: tells whether a model form is in the vocabulary (for
                ``WordTrace.in_vocabulary``); None marks every word unknown.
        """
        self.source = source
        self.settings = settings
        self.known = known

    def type_passage(
        self,
        passage: Passage,
        *,
        progress: Callable[[int, int], None] | None = None,
        keep_traces: bool = True,
        after_word: WordObserver | None = None,
    ) -> TypingRun:
        """Type a whole passage.

        Args:
            passage: the text, parsed by :func:`~foretype.simulate.passage.read_passage`.
            progress: called with (words done, words in all) now and then.
            keep_traces: keep a :class:`WordTrace` per word.
            after_word: called after each word (see :data:`WordObserver`).

        Returns:
            The run's totals, traces and query latencies.
        """
        settings = self.settings
        source = self.source
        k = settings.k
        select = settings.select_cost
        autospace = settings.autospace
        first_step = settings.min_prefix
        skip_passed = settings.skip_passed
        full = passage.mode == "full"
        known = self.known
        latencies: list[int] = []
        traces: list[WordTrace] = []
        total = float(len(passage.lead))
        picked = picked_before = picked_first = 0
        reading = _ListReading()
        count = len(passage.words)
        lead = float(len(passage.lead))
        for index, word in enumerate(passage.words):
            target = word.target
            length = len(target)
            u, v = source.context_ids(word.context)
            last_step = latest_useful_pick(length, word.gap, select_cost=select, autospace=autospace)
            shown: list[list[str]] = []
            passed: set[str] | None = set() if skip_passed else None
            if passed is not None:
                asked = _lists_without(source, u, v, target, first_step, last_step, k, passed, latencies)
            else:
                asked = _lists_asked(source, u, v, target, first_step, last_step, k, word.model, latencies)
            picked_at, rank = _find_pick(
                word, asked, range(first_step, last_step + 1), capital=full and word.sentence_start, full=full, shown=shown if keep_traces else None, reading=reading, passed=passed
            )
            cost: float
            if picked_at is None:
                cost = length + gap_keystrokes(word.gap, picked=False, autospace=autospace)
            else:
                cost = len(picked_at) + select + gap_keystrokes(word.gap, picked=True, autospace=autospace)
                picked += 1
                picked_before += not picked_at
                picked_first += rank == 1
            total += cost
            if keep_traces:
                in_vocabulary = known(word.model) if known is not None else False
                traces.append(WordTrace(target, cost + (lead if index == 0 else 0.0), picked_at, rank, shown, in_vocabulary))
            if after_word is not None:
                after_word(word, picked_at is not None)
            if progress is not None and (index % 512 == 511 or index + 1 == count):
                progress(index + 1, count)
        return TypingRun(traces, total, picked, picked_before, picked_first, reading.reads, np.array(latencies, dtype=np.int64))
