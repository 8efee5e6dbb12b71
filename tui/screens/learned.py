"""The learned words screen: what the pad learned from the person's typing, to forget or block.

One row per word the learned file counts, most counted first.  Delete forgets
the highlighted word (every count involving it goes; it can be learned again),
n puts it on the never-suggest list (or takes it off again), and the box at
the bottom adds any word or pattern to that list.  Every change is written to
the learned file before the list is redrawn.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.message import Message
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Input, Static

from foretype.adapt import PRIVACY_NOTE, LearnedWord
from foretype.errors import ForetypeError
from foretype.text import model_form

from ..files import shown_path
from ..formatting import count as count_text
from ..learning import LearningSource, why_unavailable

COLUMNS = ("word", "uses", "count", "last typed", "kind", "suggested")
"""The table's columns."""


def status_of(word: LearnedWord, min_uses: int) -> str:
    """Whether a learned word is suggested, and if not, why."""
    if word.never:
        return "never (blocked)"
    if word.suggestable:
        return "yes"
    more = max(1, min_uses - word.uses)
    return f"after {more} more use{'s' if more != 1 else ''}"


def count_value(value: float) -> str:
    """A (possibly decayed) count: whole when it is whole, else to one decimal."""
    return count_text(int(round(value))) if abs(value - round(value)) < 1e-9 else f"{value:,.1f}"


class LearnedWordsScreen(Screen[None]):
    """The learned words; Delete forgets one, n blocks or unblocks one."""

    BINDINGS = [
        Binding("escape", "app.pop_screen", "back to the pad", id="back"),
        Binding("delete", "forget", "forget word", id="forget"),
        Binding("n", "never", "never suggest", id="never"),
        Binding("f6", "app.toggle_learning", "learn", id="toggle-learning"),
        Binding("f1", "app.help", "help", id="help"),
    ]
    """Keys of the learned words screen (Delete and n act on the highlighted row)."""

    class Changed(Message):
        """The learned file changed here (a word forgotten, the never-suggest list): suggestions are to be asked again."""

    def __init__(self, learning: LearningSource | None, *, format_when: Callable[[int], str]) -> None:
        """Args:
        learning: the pad's learning source (None when the pad was started without one).
        format_when: writes the Unix time a word was last typed.
        """
        super().__init__()
        self.learning = learning
        self.format_when = format_when

    def compose(self) -> ComposeResult:
        """Build the screen."""
        yield Header()
        with Vertical(id="learned-about", classes="panel") as about:
            about.border_title = "what the pad learned"
            yield Static(id="learned-state")
            yield Static(PRIVACY_NOTE, id="learned-privacy")
            yield Static(id="learned-never")
        table: DataTable[str] = DataTable(id="learned-table", cursor_type="row", zebra_stripes=True)
        table.border_title = "learned words · del forget · n never suggest"
        yield table
        yield Input(placeholder="never suggest a word or a pattern (* ? [..]), then Enter", id="learned-block")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Fill the table and put the highlight in it."""
        self.sub_title = "learned words"
        table = self.query_one(DataTable)
        table.add_columns(*COLUMNS)
        self.show_words()
        table.focus()

    @property
    def table(self) -> DataTable[str]:
        """The words table."""
        return self.query_one("#learned-table", DataTable)

    def show_words(self, keep: str | None = None) -> None:
        """Redraw the state lines and the table, keeping the highlight on a word (or on its row)."""
        source = self.learning
        table = self.table
        row = table.cursor_row
        if keep is None and table.row_count:
            keep = str(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)
        words = source.learned_words() if source is not None else []
        table.clear()
        for word in words:
            table.add_row(
                word.word,
                count_text(word.uses),
                count_value(word.count),
                self.format_when(word.last_seen),
                "new word" if word.new_word else "in vocabulary",
                status_of(word, source.min_uses if source is not None else 0),
                key=model_form(word.word),
            )
        if words:
            keys = [model_form(w.word) for w in words]
            target = keys.index(model_form(keep)) if keep is not None and model_form(keep) in keys else min(row, len(words) - 1)
            table.move_cursor(row=target)
        self.query_one("#learned-state", Static).update(self._state_line(words))
        never = source.never_entries if source is not None else []
        self.query_one("#learned-never", Static).update(f"never suggested: {', '.join(never)}" if never else "never suggested: nothing yet")

    def _state_line(self, words: list[LearnedWord]) -> str:
        source = self.learning
        if source is None or not source.available:
            return f"Learning is not available: {why_unavailable(source)}."
        state = "on (f6 switches it off)" if source.learning else "off (f6 switches it on)"
        new = sum(1 for w in words if w.new_word)
        return f"Learning {state}. {count_text(len(words))} words counted, {new} new to the model. Kept in {shown_path(source.path)}."

    def _highlighted(self) -> str | None:
        table = self.table
        if not table.row_count:
            return None
        return str(table.get_row_at(table.cursor_row)[0])

    def action_forget(self) -> None:
        """Delete: forget the highlighted word (every count involving it)."""
        source = self.learning
        word = self._highlighted()
        if source is None or word is None:
            self.app.bell()
            return
        try:
            forgotten = source.forget(word)
        except ForetypeError as error:
            self.notify(f"Not forgotten: {error}", severity="error")
            return
        if forgotten:
            self.notify(f"Forgot {word!r}: its counts are gone from the learned file.", title="forgotten")
        self.post_message(self.Changed())

    def action_never(self) -> None:
        """n: put the highlighted word on the never-suggest list, or take it off again."""
        word = self._highlighted()
        if word is None:
            self.app.bell()
            return
        self._block(word, toggle=True)

    def on_input_submitted(self, message: Input.Submitted) -> None:
        """Enter in the box: put the word or pattern on the never-suggest list."""
        entry = message.value.strip()
        if not entry:
            return
        if self._block(entry, toggle=False):
            message.input.value = ""

    def _block(self, entry: str, *, toggle: bool) -> bool:
        source = self.learning
        if source is None or not source.available:
            self.notify("Learning is not available, so there is no never-suggest list to change.", severity="warning")
            return False
        try:
            if toggle and model_form(entry) in source.never_entries:
                source.remove_never(entry)
                self.notify(f"{entry!r} may be suggested again.", title="never-suggest list")
            elif source.add_never(entry):
                self.notify(f"{entry!r} will never be suggested.", title="never-suggest list")
            else:
                self.notify(f"{entry!r} is already on the never-suggest list.", severity="warning")
        except ForetypeError as error:
            self.notify(f"Not changed: {error}", severity="error")
            return False
        self.post_message(self.Changed())
        return True
