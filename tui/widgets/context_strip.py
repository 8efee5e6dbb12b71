"""The context the model conditions on (two words, unknown ones marked) and the typed prefix."""

from __future__ import annotations

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from ..formatting import clip
from ..session import ContextWord, Offer

START_MARK = "⟨start⟩"
"""Stands for the sentence-start padding when the sentence has fewer than two words."""


class ContextStrip(Widget):
    """Two lines: the two conditioning words, and the partial word typed so far."""

    DEFAULT_CSS = """
    ContextStrip { height: 2; text-wrap: nowrap; text-overflow: clip; }
    """

    offer: reactive[Offer | None] = reactive(None)
    """The offer drawn (the typing screen binds its own ``offer`` here)."""

    def render(self) -> Text:
        """Both lines as text; unknown words say so in full when the line has room."""
        offer = self.offer
        words = list(offer.context) if offer is not None else []
        width = self.size.width
        spelled = self._context_line(words, " unknown", 1000)
        out = spelled if spelled.cell_len <= width else self._context_line(words, "?", max(6, (width - 7) // 2 - 3))
        out.append("\n")
        out.append("typed  ", style="dim")
        prefix = offer.prefix if offer is not None else ""
        if prefix:
            out.append(prefix, style="bold underline")
            out.append("…", style="dim")
        else:
            out.append("— (new sentence)" if offer is not None and offer.sentence_start else "— (next word)", style="dim italic")
        return out

    @staticmethod
    def _context_line(words: list[ContextWord], marker: str, room: int) -> Text:
        out = Text(no_wrap=True, overflow="ellipsis")
        out.append("after  ", style="dim")
        for _ in range(2 - len(words)):
            out.append(START_MARK, style="italic magenta")
            out.append("  ")
        for word in words:
            if word.known:
                out.append(clip(word.text, room), style="bold")
            else:
                out.append(clip(word.text, room), style="bold red strike")
                out.append(marker, style="red")
            out.append("  ")
        out.rstrip()
        return out
