"""Which keys touch which on a QWERTY keyboard: where a slip of the finger lands.

Shared by the typo injector (simulate/typos.py), which makes slips, and the
learning's slip check (adapt/slips.py), which recognises them.
"""

from __future__ import annotations

_ROWS = ("qwertyuiop", "asdfghjkl", "zxcvbnm")
# A key's neighbours: the keys left and right of it, and the keys of each
# adjacent row that touch it (each row is drawn half a key right of the one above).


def _neighbours() -> dict[str, str]:
    where = {ch: (r, c) for r, row in enumerate(_ROWS) for c, ch in enumerate(row)}
    found: dict[str, str] = {}
    for ch, (r, c) in where.items():
        near = []
        for other, (r2, c2) in where.items():
            if other == ch:
                continue
            if r2 == r and abs(c2 - c) == 1:
                near.append(other)
            elif abs(r2 - r) == 1:
                if abs((c2 + 0.5 * r2) - (c + 0.5 * r)) <= 0.5:
                    near.append(other)
        found[ch] = "".join(sorted(near))
    return found


NEIGHBOURS: dict[str, str] = _neighbours()
"""Each lower-case letter's neighbouring keys on a QWERTY keyboard."""
