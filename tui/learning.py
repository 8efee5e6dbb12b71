"""Learning in the pad: which words a keystroke finished, and the learned file they go to.

A word is learned when the person finishes it: by typing a space, a mark or
Enter after it, or by taking it from the list.  A sentence end (``. ! ?``, a
line break) is learned after the sentence's last words.  Pasted text is not
learned (the person did not type it), though a word a paste left unfinished
is learned when a typed key finishes it.

The learned file holds personal text: it stays on this machine, beside the
model (see :mod:`foretype.adapt.store`), and the pad's learned-words screen
shows, forgets and blocks what is in it.  Nothing here imports Textual, and
the engine's objects are used from one thread (the interface's).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

from foretype.adapt import AdaptedModel, LearnedFile, LearnedWord, load_learned
from foretype.errors import ForetypeError
from foretype.query.model import LanguageModel, Suggestion
from foretype.text import model_form, split_before_cursor


@dataclass(frozen=True)
class Finished:
    """What one keystroke or acceptance finished, ready to be learned.

    Attributes:
        word: the word finished, as written ("" when only a sentence ended).
        after: up to two words of the sentence before it (before the end, when ``word`` is "").
        end: the sentence ended right after.
        at: (row, column) where ``word`` ends in the message: the same word
            finished twice at one place (a space erased and typed again) is learned once.
    """

    word: str
    after: tuple[str, ...]
    end: bool
    at: tuple[int, int]


def finished_by_typing(line_before: str, typed: str, row: int) -> Finished | None:
    """What typing some text at a position finishes.

    Args:
        line_before: the line up to where the text goes in, before it is typed.
        typed: the typed text ("\\n" for Enter).
        row: the line's row in the message.

    Returns:
        The word the text finished and whether it ended the sentence, or None if it finished nothing.
    """
    words, prefix = split_before_cursor(line_before)
    later_words, later_prefix = split_before_cursor(line_before + typed)
    closed = bool(prefix) and not later_prefix
    sentence = split_before_cursor(line_before + " ")[0] if closed else words
    word = sentence[-1] if closed and len(sentence) > len(words) else ""
    ended = bool(sentence) and not later_words and not later_prefix
    if not word and not ended:
        return None
    before = sentence[:-1] if word else sentence
    return Finished(word, tuple(before[-2:]), ended, (row, len(line_before)))


def finished_by_taking(line_before: str, word: str, at: tuple[int, int]) -> Finished:
    """What taking a suggestion finishes: the word, after the sentence's words before it.

    Args:
        line_before: the line up to where the taken word starts (its typed prefix excluded).
        word: the word as written.
        at: (row, column) where the word ends in the message (before the space written after it).
    """
    words, _ = split_before_cursor(line_before)
    return Finished(word, tuple(words[-2:]), False, at)


class KnownWords:
    """The pad's "is this context word known?": the base vocabulary, plus learned words while learning is on."""

    def __init__(self, source: LearningSource) -> None:
        self._source = source

    def id(self, word: str) -> int | None:
        """The id of a word in model form, or None if the suggestions read it as unknown."""
        source = self._source
        found = source.base.vocab.id(word)
        if found is None and source.learning and source.adapted is not None:
            found = source.adapted.user.id_of(word)
        return found


class LearningSource:
    """A suggestion source that learns: the base model combined with its learned file.

    Without a learned file (the model was built in memory, or the file could
    not be opened: ``problem`` says why) it answers with the base model alone
    and learns nothing.
    """

    def __init__(self, base: LanguageModel, learned: LearnedFile | None, problem: str | None = None) -> None:
        """Args:
        base: the loaded model.
        learned: its open learned file, or None.
        problem: why there is no learned file (shown to the person).
        """
        self.base = base
        self.learned = learned
        self.problem = problem
        self.vocab = KnownWords(self)
        self._last: tuple[tuple[int, int], str] | None = None

    # ----------------------------------------------------------- facts
    @property
    def adapted(self) -> AdaptedModel | None:
        """The combined model (None without a learned file)."""
        return self.learned.model if self.learned is not None else None

    @property
    def available(self) -> bool:
        """Whether there is a learned file to learn into."""
        return self.learned is not None

    @property
    def learning(self) -> bool:
        """Whether words are being learned now."""
        adapted = self.adapted
        return adapted is not None and adapted.settings.learning

    @property
    def path(self) -> Path | None:
        """The learned file (None without one)."""
        return self.learned.path if self.learned is not None else None

    @property
    def min_uses(self) -> int:
        """Uses after which a new word is suggested."""
        adapted = self.adapted
        return adapted.settings.min_uses if adapted is not None else 0

    @property
    def never_entries(self) -> list[str]:
        """The never-suggest list (words and patterns)."""
        adapted = self.adapted
        return list(adapted.never.entries) if adapted is not None else []

    def learned_words(self) -> list[LearnedWord]:
        """Every word counted so far, most counted first."""
        adapted = self.adapted
        return adapted.learned_words() if adapted is not None else []

    # ----------------------------------------------------- suggestions
    def parse_cursor_text(self, text: str) -> tuple[list[str], str]:
        """Return (context words, prefix) for the text before a cursor."""
        return self.base.parse_cursor_text(text)

    def context_ids(self, context: Sequence[str]) -> tuple[int, int]:
        """Map up to two context words to ids (learned words get their own ids)."""
        adapted = self.adapted
        return adapted.context_ids(context) if adapted is not None else self.base.context_ids(context)

    def suggest_ids(self, u: int, v: int, prefix: str, k: int) -> list[Suggestion]:
        """The k best words; from the combined model they carry the ``learned`` and ``new_word`` marks."""
        adapted = self.adapted
        if adapted is not None:
            return adapted.suggest_ids(u, v, prefix, k)  # type: ignore[return-value]
        return self.base.suggest_ids(u, v, prefix, k)

    def for_other_thread(self) -> AdaptedModel | LanguageModel:
        """An independent copy of the suggestions as they stand, for a worker thread (the replay).

        The copy is read from the learned file (no lock needed), so the open
        file and its model stay with the interface's thread; it learns nothing.
        """
        if self.learned is None:
            return self.base
        return load_learned(self.learned.path, self.base)

    # -------------------------------------------------------- changes
    def take(self, finished: Finished) -> int:
        """Learn what a keystroke finished (nothing while learning is off).

        Returns:
            Tokens learned.

        Raises:
            OutputError: the learned file could not be written (nothing was learned).
        """
        if not self.learning or self.learned is None:
            return 0
        key = (finished.at, model_form(finished.word))
        if finished.word and key != self._last:
            learned = self.learned.learn([finished.word], after=finished.after, end=finished.end)
            self._last = key
            return learned
        if finished.end:
            return self.learned.end_sentence([*finished.after, finished.word][-2:] if finished.word else finished.after)
        return 0

    def set_learning(self, on: bool) -> None:
        """Switch learning on or off (kept in the learned file)."""
        if self.learned is not None:
            self.learned.set_learning(on)

    def forget(self, word: str) -> bool:
        """Remove every count of a word; False if none was held."""
        return self.learned.forget(word) if self.learned is not None else False

    def add_never(self, entry: str) -> bool:
        """Put a word or pattern on the never-suggest list; False if it was there already."""
        return bool(self.learned.add_never([entry])) if self.learned is not None else False

    def remove_never(self, entry: str) -> bool:
        """Take a word or pattern off the never-suggest list; False if it was not there."""
        return bool(self.learned.remove_never([entry])) if self.learned is not None else False

    def close(self) -> None:
        """Release the learned file (every change is already on disk)."""
        if self.learned is not None:
            self.learned.close()


def why_unavailable(source: LearningSource | None) -> str:
    """Why a pad cannot learn, as a phrase ("" when it can)."""
    if source is None:
        return "this pad was started without a learned file"
    return "" if source.available else source.problem or "there is no learned file"


def open_learning(model: LanguageModel, learning: bool | None = None) -> LearningSource:
    """Open the learned file beside a model as the pad's suggestion source.

    Args:
        model: the loaded model (one built in memory has no place for a learned file).
        learning: switch learning on (True) or off (False) in the file first; None keeps its setting
            (a new file starts with learning on).

    Returns:
        The source; without a learned file when the model has no file or the
        learned file cannot be opened (damaged, or in use by another foretype).
    """
    if model.path is None:
        return LearningSource(model, None, "the model was built in memory, so there is no file to keep learned words beside")
    try:
        learned = LearnedFile.for_model(model)
    except ForetypeError as error:
        return LearningSource(model, None, str(error))
    source = LearningSource(model, learned)
    if learning is not None and learning != source.learning:
        try:
            source.set_learning(learning)
        except ForetypeError as error:
            source.close()
            return LearningSource(model, None, str(error))
    return source


def learning_sources(first_choice: bool | None = None) -> Callable[[LanguageModel], LearningSource]:
    """The pad's source factory: each model opened gets its learned file.

    Args:
        first_choice: learning on or off for the first model opened (the command line's
            ``--learn`` / ``--no-learn``); later models keep their files' settings.
    """
    pending = [first_choice]

    def make(model: LanguageModel) -> LearningSource:
        choice, pending[0] = pending[0], None
        return open_learning(model, choice)

    return make
