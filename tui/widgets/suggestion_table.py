"""The ranked suggestions: rank, word, learned mark, probability as a number and a bar, n-gram order, chord."""

from __future__ import annotations

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from foretype.query.model import Suggestion

from ..formatting import bar, clip, percent
from ..session import Offer
from .compose_area import rank_chord

ORDER_NAMES = {1: "unigram", 2: "bigram", 3: "trigram"}
"""Long names of the n-gram orders, used when the panel is wide."""

LEARNED_MARK = "•"
"""Beside a word whose probability came mostly from what the person's typing taught."""
NEW_WORD_MARK = "+"
"""Beside a learned word the model's vocabulary lacks (it exists only because it was typed)."""


def learned_mark(suggestion: object) -> str:
    """The mark for a suggestion: NEW_WORD_MARK, LEARNED_MARK or a space (a plain model's suggestions have none)."""
    if getattr(suggestion, "new_word", False):
        return NEW_WORD_MARK
    if getattr(suggestion, "learned", False):
        return LEARNED_MARK
    return " "


class SuggestionTable(Widget):
    """Draws one offer; the highlighted row is what Tab accepts."""

    DEFAULT_CSS = """
    SuggestionTable { height: auto; text-wrap: nowrap; text-overflow: clip; }
    """

    offer: reactive[Offer | None] = reactive(None)
    """The offer drawn (bound to the typing screen's ``offer``)."""
    highlight: reactive[int] = reactive(0)
    """0-based row highlighted: what Tab takes (bound to the typing screen's ``highlight``)."""

    def __init__(self, *, k: int, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Args:
        k: how many rows to keep room for.
        id: the widget id.
        """
        super().__init__(id=id)
        self.k = k

    def get_content_height(self, container, viewport, width: int) -> int:  # type: ignore[no-untyped-def]
        """One heading row and k rows."""
        return self.k + 1

    def render(self) -> Text:
        """The table as text, laid out for the widget's width.

        Every column keeps its place down to about 30 cells (the word column
        narrows to 8); the probability bar takes what is left and is the first
        thing to go, so the number, the order and the key are never cut.
        """
        width = self.size.width
        suggestions = self.offer.suggestions if self.offer is not None else ()
        wide = width >= 56
        order_width = 7 if wide else 1
        # "▸1 ", then the word, " ", the learned mark, " ", the probability (7), " ", the order, " ", the chord (5)
        others = 3 + 1 + 1 + 1 + 7 + 1 + order_width + 1 + 5
        word_width = max(4, min(18, max([8, *(len(s.word) for s in suggestions)]), width - others - 4))
        room = width - others - word_width - 1
        bar_width = room if room >= 3 else 0
        out = Text(no_wrap=True, overflow="crop")
        bar_head = f" {'':<{bar_width}}" if bar_width else ""
        head = f" # {'word':<{word_width}}   {'prob':>7}{bar_head} {'order' if wide else 'n':<{order_width}} {'key':<5}"
        out.append(head.rstrip() + "\n", style="bold")
        for index in range(self.k):
            if index < len(suggestions):
                self._row(out, suggestions[index], index, word_width, bar_width, order_width, wide)
            elif index == 0:
                out.append("  no word in the vocabulary starts like this", style="dim italic")
            if index < self.k - 1:
                out.append("\n")
        return out

    def _row(self, out: Text, s: Suggestion, index: int, word_width: int, bar_width: int, order_width: int, wide: bool) -> None:
        chosen = index == self.highlight
        order = ORDER_NAMES.get(s.order, str(s.order)) if wide else str(s.order)
        out.append("▸" if chosen else " ", style="bold")
        out.append(f"{index + 1} ", style="bold" if chosen else "")
        out.append(f"{clip(s.word, word_width):<{word_width}} ", style="reverse bold" if chosen else "bold")
        out.append(f"{learned_mark(s)} ", style="bold magenta")
        out.append(f"{percent(s.prob):>7}")
        if bar_width:
            out.append(" ")
            out.append(bar(s.prob, bar_width), style="green")
        out.append(f" {order:<{order_width}} ", style="dim")
        out.append(rank_chord(index + 1), style="bold cyan")
