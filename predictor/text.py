"""Tokenisation: how running text becomes sentences of words.

The rules (README "Text conventions" restates them):

* Text is normalised to Unicode NFC first, so a letter followed by a combining
  accent counts as one letter.
* A word is a run of letters, digits and combining marks; an apostrophe (' or ’)
  or hyphen joins two such runs ("don't", "half-past"), and ``.``, ``,`` or ``:``
  joins two runs of digits ("7:40", "3.5", "1,200").
* Sentences end at ``.``, ``!``, ``?`` and ``…`` (any run of them), and, by
  default, at every line break, since one sentence per line is the usual corpus
  layout.  In *wrapped* mode a single line break is a space and only a blank
  line (or sentence punctuation) ends a sentence, for hard-wrapped prose.
* Everything else (commas, quotes, brackets, symbols, emoji) separates words and
  is never predicted.
* Words are modelled in their *model form*: lower-cased, with the typographic
  apostrophe ’ replaced by '.  Each word keeps its most frequent written form
  for display (see :mod:`foretype.counting`).
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterator
from operator import itemgetter

# Combining marks that NFC cannot fold into a precomposed letter (Latin, Greek,
# Cyrillic, Hebrew, Arabic, Devanagari vowel signs and the generic blocks).
_MARKS = (
    "\u0300-\u036f\u0483-\u0489\u0591-\u05c7\u0610-\u061a\u064b-\u065f\u0670"
    "\u06d6-\u06ed\u0900-\u0903\u093a-\u094f\u0951-\u0957\u0962\u0963"
    "\u1ab0-\u1aff\u1dc0-\u1dff\u20d0-\u20ff\ufe20-\ufe2f"
)
# Underscores are turned into spaces before matching (see prepare), so \w means a
# letter or digit here; one character class is several times faster than an alternation.
_WORD_CHAR = rf"[\w{_MARKS}]"
_JOINER = r"(?:['’\-]|(?<=\d)[.,:](?=\d))"
WORD_PATTERN = rf"\w{_WORD_CHAR}*(?:{_JOINER}{_WORD_CHAR}+)*"
"""Regular expression source for one word."""

SENTENCE_END_PATTERN = r"[.!?\u2026\u3002\uff01\uff1f]+"
"""Regular expression source for the punctuation that ends a sentence."""

LINE_BREAK = "\n"
"""The token that stands for a sentence-ending line break in a token stream."""

WORD_RE = re.compile(WORD_PATTERN)
"""Compiled :data:`WORD_PATTERN`."""

TOKEN_RE = re.compile(rf"{WORD_PATTERN}|{SENTENCE_END_PATTERN}|\n")
"""Words, sentence-end punctuation runs and line breaks, in order of appearance."""

_PARTIAL_WORD_RE = re.compile(rf"\w(?:{_WORD_CHAR}|['’\-])*\Z")
_BLANK_LINE_RE = re.compile(r"(?m)^[ \t\r\f\v]*\n")
_OTHER_LINE_BREAKS = str.maketrans({"\u2028": "\n", "\u2029": "\n", "\x0b": "\n", "\x0c": "\n", "_": " "})


def model_form(word: str) -> str:
    """Return the form a word is modelled in: lower case, ’ written as '.

    Args:
        word: a word as written.

    Returns:
        The case-folded form used for counting, lookup and prefix matching.
    """
    return word.lower().replace("’", "'")


def is_sentence_end(token: str) -> bool:
    """Tell whether a token from :data:`TOKEN_RE` ends a sentence."""
    return not token[:1].isalnum()


def are_words(found: list[str]) -> list[bool]:
    """For each token from :data:`TOKEN_RE`, whether it is a word: :func:`is_sentence_end` negated, in bulk."""
    return list(map(str.isalnum, map(_FIRST_CHARACTER, found)))


_FIRST_CHARACTER = itemgetter(slice(0, 1))


def prepare(text: str, *, wrapped: bool = False) -> str:
    """Normalise a chunk of whole lines before tokenising it.

    Args:
        text: complete lines of text (a chunk must not split a line).
        wrapped: treat single line breaks as spaces; only blank lines end sentences.

    Returns:
        NFC text in which every sentence-ending line break is a single ``\\n``.
    """
    text = unicodedata.normalize("NFC", text).translate(_OTHER_LINE_BREAKS)
    if wrapped:
        text = _BLANK_LINE_RE.sub("\x1e", text).replace("\n", " ").replace("\x1e", "\n")
    return text


def tokens(text: str, *, wrapped: bool = False) -> list[str]:
    """Split text into words, sentence-end punctuation runs and line breaks.

    Args:
        text: complete lines of text.
        wrapped: see :func:`prepare`.

    Returns:
        The tokens in order; a token for which :func:`is_sentence_end` holds
        closes the current sentence.
    """
    return TOKEN_RE.findall(prepare(text, wrapped=wrapped))


def iter_sentences(text: str, *, wrapped: bool = False) -> Iterator[list[str]]:
    """Yield the sentences of a text as lists of written words (empty ones skipped).

    Args:
        text: the text; a final sentence without an ending still counts.
        wrapped: see :func:`prepare`.
    """
    sentence: list[str] = []
    for token in tokens(text, wrapped=wrapped):
        if is_sentence_end(token):
            if sentence:
                yield sentence
                sentence = []
        else:
            sentence.append(token)
    if sentence:
        yield sentence


def split_before_cursor(text: str) -> tuple[list[str], str]:
    """Split the text before a cursor into the current sentence's words and a prefix.

    If the text ends inside a word, that partial word is the prefix to complete;
    if it ends in whitespace or punctuation, the prefix is empty.

    Args:
        text: everything written before the cursor.

    Returns:
        ``(words, prefix)``: the complete written words of the current sentence
        (the sentence the cursor is in, so empty right after a sentence end) and
        the partial word, as written.
    """
    text = unicodedata.normalize("NFC", text).translate(_OTHER_LINE_BREAKS)
    match = _PARTIAL_WORD_RE.search(text)
    prefix = ""
    if match is not None:
        prefix = match.group()
        text = text[: match.start()]
    words: list[str] = []
    for token in TOKEN_RE.findall(text):
        if is_sentence_end(token):
            words = []
        else:
            words.append(token)
    return words, prefix


def capitalise(word: str) -> str:
    """The word with its first letter in upper case (as at a sentence start)."""
    return word[:1].upper() + word[1:]


def plural(count: float, noun: str, nouns: str | None = None) -> str:
    """A count with its noun in the right number for reports: ``1 file``, ``2 files``, ``1.5 keystrokes`` (thousands separated)."""
    shown = f"{count:,}" if isinstance(count, int) else f"{count:,g}"
    return f"{shown} {noun if count == 1 else nouns or noun + 's'}"
