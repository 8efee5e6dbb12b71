"""A table of one row per word that draws only the rows on screen.

A replay of a long text has tens of thousands of words; Textual's DataTable
measures every row before its first paint (about 6 s for 40,000 rows on the
development machine), so this table renders each visible line on demand and
its cost does not grow with the text.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.segment import Segment
from textual import events
from textual.binding import Binding
from textual.geometry import Size
from textual.message import Message
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip


class WordTable(ScrollView, can_focus=True):
    """Rows of cells under a fixed heading; one row is the cursor."""

    DEFAULT_CSS = """
    WordTable { height: 1fr; }
    WordTable > .word-table--heading { text-style: bold; }
    WordTable > .word-table--cursor { background: $accent 40%; text-style: bold; }
    WordTable:focus > .word-table--cursor { background: $accent; color: $text; }
    """

    COMPONENT_CLASSES = {"word-table--heading", "word-table--cursor"}
    """Styles of the heading and of the cursor row."""

    BINDINGS = [
        Binding("up", "move(-1)", "previous word", show=False),
        Binding("down", "move(1)", "next word", show=False),
        Binding("pageup", "page(-1)", "page up", show=False),
        Binding("pagedown", "page(1)", "page down", show=False),
        Binding("home", "move(-1000000000)", "first word", show=False),
        Binding("end", "move(1000000000)", "last word", show=False),
    ]
    """Moving the cursor row."""

    cursor = reactive(0)
    """0-based index of the cursor row."""

    class Highlighted(Message):
        """The cursor moved to another row."""

        def __init__(self, index: int) -> None:
            """Args:
            index: the 0-based row now under the cursor.
            """
            super().__init__()
            self.index = index

    def __init__(self, headings: Sequence[str], *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Args:
        headings: one heading per column.
        id: the widget id.
        """
        super().__init__(id=id)
        self.headings = tuple(headings)
        self.rows: list[tuple[str, ...]] = []
        self._widths = [len(h) for h in self.headings]

    def set_rows(self, rows: Sequence[Sequence[str]]) -> None:
        """Replace every row and put the cursor on the first."""
        self.rows = [tuple(r) for r in rows]
        widths = [len(h) for h in self.headings]
        for row in self.rows:
            for column, cell in enumerate(row):
                if len(cell) > widths[column]:
                    widths[column] = len(cell)
        self._widths = widths
        self.virtual_size = Size(sum(widths) + 2 * len(widths), len(self.rows) + 1)
        self.set_reactive(WordTable.cursor, 0)
        self.scroll_to(0, 0, animate=False)
        self.refresh()
        if self.rows:
            self.post_message(self.Highlighted(0))

    def _line(self, cells: Sequence[str]) -> str:
        return "".join(f" {cell:<{width}} " for cell, width in zip(cells, self._widths))

    def render_line(self, y: int) -> Strip:
        """One line of the view: the heading on top, then the rows scrolled into view."""
        width = self.scrollable_content_region.width
        scroll_x, scroll_y = self.scroll_offset
        if y == 0:
            text, style = self._line(self.headings), self.get_component_rich_style("word-table--heading")
        else:
            index = scroll_y + y - 1
            if index >= len(self.rows):
                return Strip.blank(width, self.rich_style)
            text = self._line(self.rows[index])
            style = self.get_component_rich_style("word-table--cursor") if index == self.cursor else self.rich_style
        text = text[scroll_x : scroll_x + width].ljust(width)
        return Strip([Segment(text, style)], width)

    def watch_cursor(self, previous: int, cursor: int) -> None:
        """Keep the cursor row in view and announce it."""
        _, scroll_y = self.scroll_offset
        visible = max(1, self.scrollable_content_region.height - 1)
        if cursor < scroll_y:
            self.scroll_to(y=cursor, animate=False)
        elif cursor >= scroll_y + visible:
            self.scroll_to(y=cursor - visible + 1, animate=False)
        self.refresh()
        self.post_message(self.Highlighted(cursor))

    def action_move(self, step: int) -> None:
        """Move the cursor by ``step`` rows, staying within the table."""
        if self.rows:
            self.cursor = max(0, min(len(self.rows) - 1, self.cursor + step))

    def action_page(self, direction: int) -> None:
        """Move the cursor by one screenful."""
        self.action_move(direction * max(1, self.scrollable_content_region.height - 1))

    def on_click(self, event: events.Click) -> None:
        """Put the cursor on the clicked row."""
        index = self.scroll_offset.y + event.y - 1
        if event.y >= 1 and 0 <= index < len(self.rows):
            self.cursor = index
