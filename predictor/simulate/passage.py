"""The test text as the simulated typist sees it: words, what lies between them, sentence starts.

The text is parsed once, with the tokenizer's own regular expressions
(:data:`foretype.text.TOKEN_RE`), so words and sentence boundaries are exactly
the ones the model was trained on: a sentence ends at a run of ``.``, ``!``,
``?`` or ``…`` and at every line break (in *wrapped* mode only at a blank line).

Two text modes (README "Keystroke savings" gives the conventions):

* ``full``: the text as written, NFC-normalised, every character counted; a
  line break (``\\r\\n`` counts as one) is one character, typed with Enter.
* ``words``: the text reduced to its words in model form (lower case, ’ as '),
  each followed by one space; characters = sum of (word length + 1).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import CorpusError, OptionError
from ..text import TOKEN_RE, is_sentence_end, model_form, prepare, tokens

TEXT_MODES = ("full", "words")
"""The text modes a simulation can count characters in."""


@dataclass(frozen=True)
class PassageWord:
    """One word of the test text and what follows it.

    Attributes:
        written: the word as written in the text (NFC).
        target: what the typist must produce: ``written`` in full mode, the
            model form in words mode.
        model: the model form (lower case, ’ as ').
        gap: the characters after the word up to the next word (or the end of
            the text) in full mode; a single space in words mode.
        sentence_start: the word opens a sentence (the engine then offers its
            suggestions with a capital first letter).
        context: up to two preceding words of the same sentence, as written.
    """

    written: str
    target: str
    model: str
    gap: str
    sentence_start: bool
    context: tuple[str, ...]


@dataclass(frozen=True)
class Passage:
    """The whole test text, ready to be typed.

    Attributes:
        mode: ``full`` or ``words``.
        lead: the characters before the first word (full mode only).
        words: the words in order.
        characters: characters of the text in this mode (the KSR denominator).
    """

    mode: str
    lead: str
    words: list[PassageWord]
    characters: int


def read_passage(text: str, mode: str = "full", *, wrapped: bool = False) -> Passage:
    """Parse a test text for the simulated typist.

    Args:
        text: the text.
        mode: ``full`` or ``words`` (see the module docstring).
        wrapped: hard-wrapped prose: single line breaks are spaces, as in training with ``--wrapped``.

    Returns:
        The passage.

    Raises:
        OptionError: unknown mode.
        CorpusError: the text holds no words.
    """
    if mode not in TEXT_MODES:
        raise OptionError(f"unknown text mode {mode!r}; choose one of {', '.join(TEXT_MODES)}")
    text = prepare(text.replace("\r\n", "\n"))
    spans: list[tuple[int, int]] = []
    starts: list[bool] = []
    opens = True
    for match in TOKEN_RE.finditer(text):
        if is_sentence_end(match.group()):
            opens = True
        else:
            spans.append(match.span())
            starts.append(opens)
            opens = False
    if not spans:
        raise CorpusError("the test text holds no words")
    if wrapped:
        starts = _wrapped_sentence_starts(text, len(spans))
    words: list[PassageWord] = []
    context: list[str] = []
    for index, (begin, end) in enumerate(spans):
        written = text[begin:end]
        if starts[index]:
            context = []
        follow = spans[index + 1][0] if index + 1 < len(spans) else len(text)
        model = model_form(written)
        if mode == "full":
            words.append(PassageWord(written, written, model, text[end:follow], starts[index], tuple(context[-2:])))
        else:
            words.append(PassageWord(written, model, model, " ", starts[index], tuple(context[-2:])))
        context.append(written)
    if mode == "full":
        return Passage(mode, text[: spans[0][0]], words, len(text))
    return Passage(mode, "", words, sum(len(w.target) + 1 for w in words))


def _wrapped_sentence_starts(text: str, count: int) -> list[bool]:
    """Sentence starts under the wrapped rule; the words are the same ones in the same order."""
    starts: list[bool] = []
    opens = True
    for token in tokens(text, wrapped=True):
        if is_sentence_end(token):
            opens = True
        else:
            starts.append(opens)
            opens = False
    if len(starts) != count:  # pragma: no cover - the wrapped rule only changes line breaks
        raise AssertionError("wrapped tokenisation changed the words")
    return starts
