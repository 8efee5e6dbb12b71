"""The learned state and the change records a learned file keeps, and how they rebuild a combined model.

A learned file holds a :class:`LearnedState` (settings, never-suggest list,
counts) as of its last compaction, then the changes made since, each a JSON
object replayed in order on load.  Change records:

* ``learn``: ``words``, ``after`` (the preceding words of the sentence), ``end``,
  ``at`` (Unix seconds) and ``credit`` (each token's responsibility, see
  :mod:`foretype.adapt.user_model`);
* ``sentences``: ``sentences`` (lists of words, each a whole sentence), ``at`` and
  ``credit`` (one list per sentence): a text learned at once, kept or lost as a whole;
* ``settings``: ``settings`` (every learning setting);
* ``never``: ``add`` and ``remove`` (lists of entries);
* ``forget``: ``word``;
* ``prune``: ``below`` (a count, or null) and ``seen_before`` (Unix seconds, or null).

Records are plain data: replaying one calls the user model's own learning,
forgetting and pruning, and nothing in a record is executed.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.model import LanguageModel
from .combined import AdaptedModel
from .settings import AdaptSettings

CHANGE_KINDS = ("learn", "sentences", "settings", "never", "forget", "prune")
"""Every kind of change record."""
RECORD_ERRORS = (KeyError, TypeError, ValueError, IndexError, OptionError)
"""What replaying a malformed state or record raises."""


@dataclass(frozen=True)
class LearnedState:
    """A learned file's state as of its last compaction.

    Attributes:
        settings: the learning settings.
        never: the never-suggest entries.
        counts: the counts in the layout of :meth:`UserModel.snapshot`.
    """

    settings: AdaptSettings
    never: list[str]
    counts: dict[str, Any] = field(repr=False)

    @staticmethod
    def of(model: AdaptedModel) -> LearnedState:
        """The state of a combined model (counts decayed to now, words by model form)."""
        return LearnedState(model.settings, list(model.never.entries), model.user.snapshot())


def rebuild(base: LanguageModel, state: LearnedState | None, changes: Sequence[dict[str, Any]]) -> AdaptedModel:
    """A combined model from a state (None: nothing learned yet) and the changes after it.

    Raises:
        KeyError, TypeError, ValueError, IndexError, OptionError: the state or a record is malformed
            (``RECORD_ERRORS``; the message says which record).
    """
    model = AdaptedModel(base)
    if state is not None:
        apply_state(model, state)
    for number, record in enumerate(changes):
        try:
            apply_record(model, record)
        except RECORD_ERRORS as error:
            raise ValueError(f"change {number + 1}: {error}") from None
    return model


def apply_state(model: AdaptedModel, state: LearnedState) -> None:
    """Replace a combined model's settings, never-suggest list and counts with a state.

    Raises:
        ValueError, TypeError, KeyError, IndexError, OptionError: the state is inconsistent.
    """
    counts = state.counts
    for table in ("unigrams", "bigrams", "trigrams"):
        columns = counts[table]
        for name in ("count", "uses", "seen"):
            values = np.asarray(columns[name])
            if values.size and not (np.isfinite(values).all() and (values >= 0).all()):
                raise ValueError(f"{table}: a {name} that is negative or not a number")
    model.user.set_settings(state.settings)
    model.never.replace(str(entry) for entry in state.never)
    model.user.restore(counts)


def apply_record(model: AdaptedModel, record: dict[str, Any]) -> None:
    """Apply one change record to a combined model (replay).

    Raises:
        KeyError, TypeError, ValueError, OptionError: the record is malformed.
    """
    kind = record["kind"]
    replay = _REPLAY.get(kind) if isinstance(kind, str) else None
    if replay is None:
        raise ValueError(f"unknown record kind {kind!r}")
    replay(model, record)


def _credit(values: Any) -> list[float] | None:
    return None if values is None else [float(r) for r in values]


def _learn(model: AdaptedModel, record: dict[str, Any]) -> None:
    model.user.learn(
        [str(w) for w in record["words"]],
        after=[str(w) for w in record["after"]],
        end=bool(record["end"]),
        when=int(record["at"]),
        credit=_credit(record.get("credit")),
    )


def _sentences(model: AdaptedModel, record: dict[str, Any]) -> None:
    credits = record.get("credit") or [None] * len(record["sentences"])
    if len(credits) != len(record["sentences"]):
        raise ValueError("one credit list per sentence expected")
    for sentence, credit in zip(record["sentences"], credits):
        model.user.learn([str(w) for w in sentence], end=True, when=int(record["at"]), credit=_credit(credit))


def _settings(model: AdaptedModel, record: dict[str, Any]) -> None:
    model.user.set_settings(AdaptSettings.from_json(record["settings"]))


def _never(model: AdaptedModel, record: dict[str, Any]) -> None:
    for entry in record.get("add", []):
        model.never.add(str(entry))
    for entry in record.get("remove", []):
        model.never.remove(str(entry))


def _forget(model: AdaptedModel, record: dict[str, Any]) -> None:
    model.user.forget(str(record["word"]))


def _prune(model: AdaptedModel, record: dict[str, Any]) -> None:
    below = record.get("below")
    before = record.get("seen_before")
    model.user.prune(below=None if below is None else float(below), seen_before=None if before is None else int(before))


_REPLAY: dict[str, Callable[[AdaptedModel, dict[str, Any]], None]] = {
    "learn": _learn,
    "sentences": _sentences,
    "settings": _settings,
    "never": _never,
    "forget": _forget,
    "prune": _prune,
}
"""How each kind of change record is replayed (the kinds are :data:`CHANGE_KINDS`)."""


__all__ = ["LearnedState", "rebuild", "apply_state", "apply_record", "CHANGE_KINDS", "RECORD_ERRORS"]
