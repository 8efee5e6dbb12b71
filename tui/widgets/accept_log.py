"""The words accepted so far, newest first, with the rank and what was typed before."""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text
from textual.widget import Widget


@dataclass(frozen=True)
class AcceptedWord:
    """One acceptance.

    Attributes:
        word: the word written.
        rank: its 1-based rank.
        typed: the letters typed before accepting it.
        saved: keystrokes it saved: its letters and space, less the typed letters and the acceptance.
    """

    word: str
    rank: int
    typed: str
    saved: int


class AcceptLog(Widget):
    """A list that fills the room it is given; older entries drop off the bottom."""

    DEFAULT_CSS = """
    AcceptLog { text-wrap: nowrap; text-overflow: clip; }
    """

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Args:
        id: the widget id.
        """
        super().__init__(id=id)
        self.entries: list[AcceptedWord] = []

    def add(self, entry: AcceptedWord) -> None:
        """Record an acceptance."""
        self.entries.insert(0, entry)
        del self.entries[200:]
        self.refresh()

    def render(self) -> Text:
        """As many entries as fit."""
        out = Text(no_wrap=True, overflow="ellipsis")
        if not self.entries:
            out.append("accepted words appear here", style="dim italic")
            return out
        for index, entry in enumerate(self.entries[: max(self.size.height, 1)]):
            if index:
                out.append("\n")
            out.append(f"{entry.word:<16}", style="bold")
            out.append(f" rank {entry.rank}", style="cyan")
            out.append(f"  after {entry.typed!r:<8}" if entry.typed else "  before typing", style="dim")
            out.append(f"  saved {entry.saved}", style="green" if entry.saved > 0 else "red")
        return out
