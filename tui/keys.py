"""Reading alt+digit as a chord, so that £, ™ and the other Option characters can be typed.

tmux, xterm and most Linux terminals send alt+digit as ESC followed by the
digit.  Textual 8 reads ESC 1 .. ESC 9 as the characters a macOS keyboard
types with Option and a digit (¡ ™ £ ¢ ∞ § ¶ • ª), so a chord and a typed
character arrive as the same key: binding the chord to those names would make
the characters untypeable (a British keyboard types £ with shift+3).

:func:`read_escape_digits_as_chords` changes Textual's table of escape
sequences so that ESC and a digit arrive as ``alt+1`` .. ``alt+9``, the name
kitty-protocol terminals already deliver.  The table is Textual's own and not
a public API, so the change is made only when the table holds exactly what
is expected; otherwise the pad falls back to binding the characters' names
too (:data:`CHORDS_FROM_ESCAPE_DIGITS` says which).
"""

from __future__ import annotations

from typing import NamedTuple, cast

OPTION_DIGIT_CHARACTERS = "¡™£¢∞§¶•ª"
"""What Textual 8 makes of ESC 1 .. ESC 9 unless told otherwise."""

OPTION_DIGIT_KEYS = ("inverted_exclamation_mark", "trade_mark_sign", "pound_sign", "cent_sign", "infinity", "section_sign", "pilcrow_sign", "bullet", "ª")
"""Textual's key names for those characters (used only when the table cannot be changed)."""


class _Chord(NamedTuple):
    """A key name in the shape Textual's sequence table gives its named keys (an object with ``value``)."""

    value: str


def read_escape_digits_as_chords() -> bool:
    """Make ESC 1 .. ESC 9 arrive as alt+1 .. alt+9; tell whether the change is in place."""
    try:
        from textual._ansi_sequences import ANSI_SEQUENCES_KEYS
    except ImportError:
        return False
    sequences = [f"\x1b{n}" for n in range(1, 10)]
    current = [ANSI_SEQUENCES_KEYS.get(sequence) for sequence in sequences]
    chords = [(_Chord(f"alt+{n}"),) for n in range(1, 10)]
    if current == chords:
        return True
    if current != list(OPTION_DIGIT_CHARACTERS):
        return False
    for sequence, chord in zip(sequences, chords):
        cast("dict[str, object]", ANSI_SEQUENCES_KEYS)[sequence] = chord
    return True


CHORDS_FROM_ESCAPE_DIGITS = read_escape_digits_as_chords()
"""True when ESC and a digit arrive as alt+digit, so the Option characters type as text."""
