"""Steps the pad's Pilot tests share."""

from __future__ import annotations

import html
import re

from textual import events
from textual.app import App
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


_SVG_TEXT = re.compile(r'<text [^>]*?x="([0-9.]+)"[^>]*?clip-path="url\(#[\w-]*?-line-(\d+)\)">([^<]*)</text>')
"""One run of text in Rich's SVG export: its x position, its line and its characters."""


def screen_lines(app: App[object]) -> list[str]:
    """The screen as plain text, one string per terminal row, read back from Textual's SVG screenshot.

    Each run of text in the SVG sits at x = column × the cell width (the width of one cell is the
    first run's textLength divided by its characters).
    """
    svg = app.export_screenshot()
    width, height = app.size
    cell = _cell_width(svg)
    rows = [[" "] * width for _ in range(height)]
    for x, line, content in _SVG_TEXT.findall(svg):
        row = int(line)
        column = round(float(x) / cell)
        for offset, character in enumerate(html.unescape(content).replace("\xa0", " ")):
            if row < height and column + offset < width:
                rows[row][column + offset] = character
    return ["".join(row).rstrip() for row in rows]


def _cell_width(svg: str) -> float:
    found = re.search(r'<text [^>]*?textLength="([0-9.]+)"[^>]*>([^<]*)</text>', svg)
    assert found is not None
    return float(found.group(1)) / len(html.unescape(found.group(2)))


def assert_nothing_cut(app: App[object]) -> None:
    """Fail if Textual had to shorten a border label (it ends it with "…") or the key hints at the bottom."""
    lines = screen_lines(app)
    shortened = [line for line in lines if re.search(r"…\s?─", line)]
    assert not shortened, f"a border label was shortened: {shortened}"
    assert lines[-1].rstrip().endswith("^q quit"), f"the key hints were cut: {lines[-1]!r}"


def assert_typing_screen_whole(app: App[object], k: int = 5) -> None:
    """The typing screen's checks besides :func:`assert_nothing_cut`: every rank keeps its number and key, the model line is whole."""
    assert_nothing_cut(app)
    lines = screen_lines(app)
    rows = [line for line in lines if re.search(r"alt\+[1-9] +│", line)]
    assert len(rows) == k and all("%" in row for row in rows), rows
    assert "…" not in lines[-2], lines[-2]
