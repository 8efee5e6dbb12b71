"""Steps the pad's Pilot tests share."""

from __future__ import annotations

from textual import events
from textual.pilot import Pilot

from foretype.adapt import LearnedFile
from foretype.query.model import LanguageModel


async def paste(pilot: Pilot, text: str) -> None:
    """Paste text into what has the focus (a terminal's bracketed paste: one keystroke per character)."""
    pilot.app.post_message(events.Paste(text))
    await pilot.pause()


async def finish(pilot: Pilot, group: str) -> None:
    """Wait for the running workers of one group, then for the screen to redraw.

    Only that group: the folder tree's loader worker never finishes, and an
    empty list would mean every worker.
    """
    await pilot.pause()
    app = pilot.app
    running = [w for w in app.workers if w.group == group]
    if running:
        await app.workers.wait_for_complete(running)
    await pilot.pause()
    await pilot.pause()


def learn_beforehand(model: LanguageModel, sentences: list[list[str]], never: list[str] | None = None) -> None:
    """Fill the learned file beside a model through the engine, before a pad opens it."""
    with LearnedFile.for_model(model) as learned:
        learned.learn_sentences(sentences)
        if never:
            learned.add_never(never)
