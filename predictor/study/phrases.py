"""Phrase sets for copy tasks: one target phrase per line."""

from __future__ import annotations

from pathlib import Path

from ..demo import demo_folder
from ..errors import CorpusError

MAX_PHRASE_CHARACTERS = 500
"""The longest phrase a set may hold (a copy task presents short phrases)."""


def demo_phrases_path() -> Path:
    """The bundled demo phrases (``demo_vocab/phrases.txt``, invented like the rest of the demo text)."""
    return demo_folder() / "phrases.txt"


def read_phrases(path: str | Path) -> list[str]:
    """Read a phrase file: UTF-8, one phrase per line; blank lines are skipped, spaces at the ends trimmed.

    Args:
        path: the file.

    Returns:
        The phrases in file order.

    Raises:
        CorpusError: missing or unreadable, not UTF-8, no phrases, or a phrase too long.
    """
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as error:
        raise CorpusError(f"{path}: cannot read the phrase file ({error.strerror or error})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        raise CorpusError(f"{path}: line {line} is not valid UTF-8") from None
    phrases = [line.strip() for line in text.splitlines()]
    phrases = [p for p in phrases if p]
    if not phrases:
        raise CorpusError(f"{path}: holds no phrases (one phrase per line)")
    for number, phrase in enumerate(phrases, start=1):
        if len(phrase) > MAX_PHRASE_CHARACTERS:
            raise CorpusError(f"{path}: phrase {number} is longer than {MAX_PHRASE_CHARACTERS} characters")
    return phrases


def demo_phrases() -> list[str]:
    """The bundled demo phrases."""
    return read_phrases(demo_phrases_path())
