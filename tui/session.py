"""What the pad knows about one typing session, with no Textual in it.

The session asks a suggestion source for the ranked words at the cursor, keeps
the highlighted rank, plans what accepting a suggestion writes, and keeps the
tally: characters produced, keystrokes spent, words accepted and the latency
of the last query.  The widgets only render it and forward keys to it, so the
rules here are testable without a terminal.

Counting convention (README "The typing pad" restates it; the simulated typist
of :mod:`foretype.simulate` counts the same way): every key press
that changes the text costs one keystroke (a typed character, Enter,
Backspace, Delete), a pasted text costs one keystroke per character, and
accepting a suggestion costs one keystroke whatever its rank.  Cursor moves,
moves of the highlight and keys that change nothing cost nothing; so does the
space typed right after an accepted word, which the word's own space absorbs
(the simulator's editor counts that space as free too).  Characters produced are the characters of
the composed text, so keystroke savings = 1 - keystrokes / characters.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass

from foretype.query.model import Suggestion
from foretype.query.passed_over import suggest_without
from foretype.query.source import SuggestionSource
from foretype.text import capitalise, model_form

MARKS_BEFORE_SPACE = ".,;:!?…"
"""Marks after which an accepted word gets a space in front (when none was typed)."""


@dataclass(frozen=True)
class ContextWord:
    """One word of the context the model conditions on.

    Attributes:
        text: the word as written.
        known: whether the model's vocabulary has it (unknown words are read as UNKNOWN).
    """

    text: str
    known: bool


@dataclass(frozen=True)
class Offer:
    """The ranked suggestions for one cursor position.

    Attributes:
        text_before: the text of the current line before the cursor.
        context: the context words (at most two, most recent last; empty at a sentence start).
        prefix: the partial word typed so far ("" between words).
        sentence_start: whether the cursor is in the first word of a sentence.
        suggestions: best first; at a sentence start each word is capitalised.
        latency_ns: how long the suggestion query took, in nanoseconds.
    """

    text_before: str
    context: tuple[ContextWord, ...]
    prefix: str
    sentence_start: bool
    suggestions: tuple[Suggestion, ...]
    latency_ns: int


@dataclass(frozen=True)
class Acceptance:
    """What accepting a suggestion writes.

    Attributes:
        typed: the prefix typed before accepting (replaced by the word).
        insert: the text written in its place: the whole word and a space.
        word: the word accepted, as written.
        rank: its 1-based rank in the list.
    """

    typed: str
    insert: str
    word: str
    rank: int

    @property
    def replace(self) -> int:
        """How many characters before the cursor the acceptance replaces."""
        return len(self.typed)

    @property
    def saved(self) -> int:
        """Keystrokes saved against typing the same characters: those written, less the acceptance."""
        return len(self.insert) - len(self.typed) - 1


@dataclass(frozen=True)
class Tally:
    """The running figures of a typing session.

    Attributes:
        characters: characters of the composed text.
        keystrokes: keystrokes spent (see the module's counting convention).
        accepted: words accepted from suggestions.
        latency_ns: duration of the last suggestion query, or None before the first.
    """

    characters: int
    keystrokes: int
    accepted: int
    latency_ns: int | None

    @property
    def savings(self) -> float | None:
        """Keystroke savings, 1 - keystrokes / characters; None while nothing is written."""
        if self.characters == 0:
            return None
        return 1.0 - self.keystrokes / self.characters


def written_form(word: str, typed: str) -> str:
    """The suggestion as it is written over a typed prefix.

    The word keeps its display form (capitalised at a sentence start by the
    caller) and every letter the person typed in upper case stays upper case.

    Args:
        word: the suggested word, as displayed.
        typed: the prefix the person typed (matches the word case-insensitively).

    Returns:
        The word to write in place of the prefix.
    """
    head = "".join(t if t.isupper() else w for t, w in zip(typed, word))
    return head + word[len(head) :]


def plan_acceptance(offer: Offer, index: int) -> Acceptance:
    """Work out what accepting the suggestion at ``index`` of an offer writes.

    Args:
        offer: the offer on screen.
        index: 0-based position in ``offer.suggestions``.

    Returns:
        The edit: the typed prefix is replaced by the word and a space; between
        words, a space is put first when the text ends in a punctuation mark.
    """
    word = offer.suggestions[index].word
    typed = offer.prefix
    written = written_form(word, typed)
    before = offer.text_before[: len(offer.text_before) - len(typed)]
    lead = " " if not typed and before[-1:] != "" and before[-1] in MARKS_BEFORE_SPACE else ""
    return Acceptance(typed=typed, insert=f"{lead}{written} ", word=written, rank=index + 1)


class PadSession:
    """Suggestions, highlight and tally of one typing session."""

    def __init__(self, source: SuggestionSource, *, k: int = 5, clock: Callable[[], int] = time.perf_counter_ns, skip_passed: bool = True) -> None:
        """Start a session.

        Args:
            source: where suggestions come from (a loaded model, or a wrapper around one).
            k: how many suggestions to offer at each position.
            clock: a nanosecond clock for timing queries (tests pass a fake one).
            skip_passed: while a word is being typed letter by letter, leave out
                the words already offered for it and passed over (as the
                simulated typist does with the same setting; on by default, as in
                the simulator).
        """
        self._source = source
        self.k = k
        self.skip_passed = skip_passed
        self._passed: set[str] = set()
        self._clock = clock
        self._offer: Offer | None = None
        self.highlight = 0
        """0-based index of the highlighted suggestion (what Tab accepts)."""
        self.keystrokes = 0
        """Keystrokes spent so far."""
        self.accepted = 0
        """Words accepted so far."""
        self.last_latency_ns: int | None = None
        """Duration of the last suggestion query."""

    @property
    def source(self) -> SuggestionSource:
        """The suggestion source in use."""
        return self._source

    @source.setter
    def source(self, source: SuggestionSource) -> None:
        self._source = source
        self._offer = None

    @property
    def offer(self) -> Offer | None:
        """The offer for the last text asked about (None before the first)."""
        return self._offer

    def offer_for(self, text_before: str) -> Offer:
        """The ranked suggestions for the text of the current line before the cursor.

        The query runs only when the text differs from the last one asked about;
        a new offer moves the highlight back to the top suggestion.

        Args:
            text_before: the current line up to the cursor (a line break ends a sentence).
        """
        if self._offer is not None and self._offer.text_before == text_before:
            return self._offer
        source = self._source
        words, prefix = source.parse_cursor_text(text_before)
        self._note_passed(text_before, prefix)
        started = self._clock()
        u, v = source.context_ids(words)
        found = suggest_without(source, u, v, prefix, self.k, self._passed)
        elapsed = self._clock() - started
        sentence_start = not words
        if sentence_start:
            found = [s._replace(word=capitalise(s.word)) for s in found]  # keeps a learning source's marks
        vocab = source.vocab
        context = tuple(ContextWord(w, vocab.id(model_form(w)) is not None) for w in words)
        self._offer = Offer(text_before, context, prefix, sentence_start, tuple(found), elapsed)
        self.last_latency_ns = elapsed
        self.highlight = 0
        return self._offer

    def _note_passed(self, text_before: str, prefix: str) -> None:
        """Keep the words passed over while the same word grows by letters; start afresh otherwise."""
        last = self._offer
        if not self.skip_passed:
            return
        same_word = (
            last is not None
            and len(prefix) > len(last.prefix)
            and prefix.startswith(last.prefix)
            and text_before[: len(text_before) - len(prefix)] == last.text_before[: len(last.text_before) - len(last.prefix)]
        )
        if same_word and last is not None:
            self._passed.update(model_form(s.word) for s in last.suggestions)
        else:
            self._passed = set()

    def forget_offer(self) -> None:
        """Drop the cached offer: the source learned something, so the next query asks again."""
        self._offer = None

    def move_highlight(self, step: int) -> None:
        """Move the highlight by ``step`` ranks, staying within the list."""
        count = len(self._offer.suggestions) if self._offer is not None else 0
        if count:
            self.highlight = max(0, min(count - 1, self.highlight + step))

    def plan(self, rank: int | None = None) -> Acceptance | None:
        """What accepting a rank of the current offer writes (None if there is no such rank).

        Args:
            rank: 1-based rank; None for the highlighted suggestion.
        """
        offer = self._offer
        index = self.highlight if rank is None else rank - 1
        if offer is None or not 0 <= index < len(offer.suggestions):
            return None
        return plan_acceptance(offer, index)

    def spend(self, keystrokes: int = 1) -> None:
        """Count keystrokes spent on typing or deleting."""
        self.keystrokes += keystrokes

    def record_acceptance(self) -> None:
        """Count an accepted suggestion: one keystroke and one word."""
        self.keystrokes += 1
        self.accepted += 1

    def reset_tally(self) -> None:
        """Start counting afresh (the composed text was replaced)."""
        self.keystrokes = 0
        self.accepted = 0

    def tally(self, characters: int) -> Tally:
        """The session's figures for a composed text of ``characters`` characters."""
        return Tally(characters, self.keystrokes, self.accepted, self.last_latency_ns)
