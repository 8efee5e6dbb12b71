"""What the simulated editor does after a pick, and what each stretch of text costs.

Picking a suggestion writes the rest of the word and, with automatic spacing,
one space after it.  The keystrokes the typist then spends on the characters
up to the next word (the *gap*) follow these rules:

* Without automatic spacing, or after a word typed to its end, every
  character of the gap is typed: one keystroke each (Enter for a line break).
* After a pick with automatic spacing:

  - a gap that starts with a space: the automatic space is that space, and
    the rest of the gap is typed; but if the next character would replace the
    automatic space (below), the typist first deletes it with one Backspace
    and types the whole gap;
  - a gap that starts with a character that replaces the automatic space: it
    is typed and the space goes (no extra keystroke);
  - a gap that starts with any other character (an opening bracket, a dash):
    one Backspace removes the space, then the gap is typed;
  - at the very end of the text the automatic space costs nothing.

A character *replaces* the automatic space when it attaches to the word before
it: ``. , ; : ! ? …`` and the other sentence-ending marks, the straight quotes
``"`` and ``'``, closing brackets and closing quotes (Unicode categories Pe and
Pf), and a line break (Enter), so no line ends in a stray space.
"""

from __future__ import annotations

import math
import unicodedata

ATTACHING_MARKS = frozenset(".,;:!?…\"'\n\u3002\uff01\uff1f\uff0c\uff1b\uff1a")
"""Characters that replace an automatic space besides categories Pe and Pf."""


def replaces_automatic_space(char: str) -> bool:
    """Tell whether typing a character right after an automatic space replaces that space.

    Args:
        char: one character.
    """
    return char in ATTACHING_MARKS or unicodedata.category(char) in ("Pe", "Pf")


def gap_keystrokes(gap: str, *, picked: bool, autospace: bool) -> int:
    """Keystrokes spent on the characters between a word and the next one.

    Args:
        gap: the characters after the word, up to the next word or the end of the text.
        picked: the word was written by picking a suggestion.
        autospace: picking also writes a space after the word.

    Returns:
        The keystrokes (see the module docstring for the rules).
    """
    if not (picked and autospace):
        return len(gap)
    if not gap:
        return 0
    first = gap[0]
    if first == " ":
        if len(gap) > 1 and replaces_automatic_space(gap[1]):
            return 1 + len(gap)
        return len(gap) - 1
    if replaces_automatic_space(first):
        return len(gap)
    return 1 + len(gap)


def latest_useful_pick(length: int, gap: str, *, select_cost: float, autospace: bool) -> int:
    """The longest typed prefix after which picking the word still costs no more than typing it.

    Picking after p letters costs ``p + select_cost + gap_keystrokes(picked)``;
    typing the word costs ``length + gap_keystrokes(typed)``.  A pick is made
    when it costs no more (ties go to the pick), and only while letters remain.

    Args:
        length: characters in the word.
        gap: what follows the word.
        select_cost: keystrokes one pick costs.
        autospace: picking writes a space after the word.

    Returns:
        The largest useful prefix length, at most ``length - 1``; negative when
        no pick can pay.
    """
    typed = length + gap_keystrokes(gap, picked=False, autospace=autospace)
    picked_rest = select_cost + gap_keystrokes(gap, picked=True, autospace=autospace)
    slack = typed - picked_rest
    return min(length - 1, math.floor(slack)) if slack >= 0 else -1
