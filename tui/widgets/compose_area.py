"""The composing area: a text area that counts keystrokes and accepts suggestions.

Every key the area knows is handled inside its own key handler, in the order
the keys arrive.  Textual runs an ordinary binding only after the key has
bubbled up to the app, by which time a fast typist's next letter may already
have been inserted; handling Tab, Backspace and the rank chords here keeps
"f", "e", Tab, "." in that order even when a terminal delivers them in one read.
"""

from __future__ import annotations

from collections.abc import Sequence

from textual import events
from textual.binding import Binding
from textual.content import Content
from textual.message import Message
from textual.widgets import TextArea

from foretype.simulate.editing import replaces_automatic_space

from ..keys import CHORDS_FROM_ESCAPE_DIGITS, OPTION_DIGIT_KEYS
from ..learning import Finished, finished_by_taking, finished_by_typing
from ..session import Acceptance, Offer, PadSession

MAX_RANKS = 9
"""Ranks that have a chord: alt+1 to alt+9."""


def rank_chord(rank: int) -> str:
    """The chord shown beside a rank (1-based)."""
    return f"alt+{rank}"


class ComposeArea(TextArea, inherit_bindings=False):
    """Where the person types; Tab and alt+digit accept suggestions from the session."""

    BINDINGS = [
        Binding("tab", "accept_highlighted", "take", id="accept-highlighted"),
        Binding("up", "highlight(-1)", "up", show=False, id="highlight-up"),
        Binding("down", "highlight(1)", "down", show=False, id="highlight-down"),
        *(
            Binding(
                f"alt+{n}" if CHORDS_FROM_ESCAPE_DIGITS else f"alt+{n},{OPTION_DIGIT_KEYS[n - 1]}",
                f"accept_rank({n})",
                "rank n",
                show=False,
                key_display="alt+n",
                id=f"accept-rank-{n}",
            )
            for n in range(1, MAX_RANKS + 1)
        ),
        Binding("backspace", "erase_left", "erase left", show=False),
        Binding("delete", "erase_right", "erase right", show=False),
        Binding("ctrl+w", "erase_word_left", "erase word", show=False),
        Binding("left", "cursor_left", "left", show=False),
        Binding("right", "cursor_right", "right", show=False),
        Binding("ctrl+left", "cursor_word_left", "word left", show=False),
        Binding("ctrl+right", "cursor_word_right", "word right", show=False),
        Binding("home", "cursor_line_start", "line start", show=False),
        Binding("end", "cursor_line_end", "line end", show=False),
        Binding("pageup", "cursor_page_up", "page up", show=False),
        Binding("pagedown", "cursor_page_down", "page down", show=False),
    ]
    """Typing keys; the footer shows Tab (the suggestion table shows each rank's chord beside it)."""

    class HighlightMoved(Message):
        """The highlighted suggestion changed without the text changing."""

    class Accepted(Message):
        """A suggestion was written into the text."""

        def __init__(self, acceptance: Acceptance) -> None:
            """Args:
            acceptance: what was written.
            """
            super().__init__()
            self.acceptance = acceptance

    class WordFinished(Message):
        """A typed key or a taken suggestion finished a word or a sentence (the pad may learn it)."""

        def __init__(self, finished: Finished) -> None:
            """Args:
            finished: what was finished.
            """
            super().__init__()
            self.finished = finished

    def __init__(self, session: PadSession, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Create the area.

        Args:
            session: the typing session that supplies suggestions and keeps the tally.
            id: the widget id.
        """
        super().__init__(id=id, soft_wrap=True, tab_behavior="focus", highlight_cursor_line=False)
        self.session = session
        self._auto_space: tuple[int, int] | None = None
        """Where the space an accepted word wrote ends (None once anything else happened)."""
        self._space_absorbed = False
        """Whether a typed space was already absorbed by that automatic space."""
        self._status_wordings: tuple[str, ...] = ()
        self._key_actions = {key.strip(): b.action for b in self.BINDINGS if isinstance(b, Binding) for key in b.key.split(",")}

    # ----------------------------------------------------------------- reading
    @property
    def line_before_cursor(self) -> str:
        """The current line up to the cursor (a line break ends a sentence)."""
        row, column = self.cursor_location
        return self.document[row][:column]

    def current_offer(self) -> Offer:
        """The session's offer for the text at the cursor (queried if the text changed)."""
        return self.session.offer_for(self.line_before_cursor)

    # ------------------------------------------------------------------ keys
    async def _on_key(self, event: events.Key) -> None:
        action = self._key_actions.get(event.key)
        if action is not None:
            event.stop()
            event.prevent_default()
            await self.run_action(action)
            return
        if event.key == "enter" or event.is_printable:
            event.stop()
            event.prevent_default()
            self.type_text("\n" if event.key == "enter" else event.character or "")

    async def _on_paste(self, event: events.Paste) -> None:
        # A paste is text the person did not type with the pad: count its characters as typed.
        self.session.spend(len(event.text))
        self._auto_space = None

    def type_text(self, text: str) -> None:
        """Write typed characters at the cursor, counting one keystroke per character.

        Right after an accepted word, which wrote its own space, the first
        space typed is absorbed (the text does not change and no keystroke is
        counted; a second space is typed), and a mark that attaches to the word
        before it (``. , ; : ! ? …``, closing brackets and quotes, a line
        break) replaces that space.  The simulated typist's editor counts the
        same (:func:`foretype.simulate.editing.gap_keystrokes`: the space after
        a pick is free).
        """
        if not text or self.read_only:
            return
        row, column = self.cursor_location
        after_taken = self._auto_space == (row, column) and self.selection.is_empty and column > 0 and self.document[row][column - 1] == " "
        if after_taken and text[0] == " " and not self._space_absorbed:
            # The taken word already wrote this space: the key changes nothing and costs nothing.
            self._space_absorbed = True
            text = text[1:]
            if not text:
                return
        self.session.spend(len(text))
        start, end = self.selection
        if after_taken and replaces_automatic_space(text[0]):
            start = (row, column - 1)
        self._auto_space = None
        first = min(start, end)
        finished = finished_by_typing(self.document[first[0]][: first[1]], text, first[0])
        result = self.replace(text, start, end, maintain_selection_offset=False)
        self.move_cursor(result.end_location)
        if finished is not None:
            self.post_message(self.WordFinished(finished))

    # --------------------------------------------------------------- actions
    def action_accept_highlighted(self) -> None:
        """Accept the highlighted suggestion (Tab)."""
        self.current_offer()
        self._accept(self.session.plan())

    def action_accept_rank(self, rank: int) -> None:
        """Accept the suggestion at a rank (alt+digit)."""
        self.current_offer()
        self._accept(self.session.plan(rank))

    def action_highlight(self, step: int) -> None:
        """Move the highlight up (-1) or down (+1); the cursor stays where it is."""
        self.current_offer()
        self.session.move_highlight(step)
        self.post_message(self.HighlightMoved())

    def _accept(self, acceptance: Acceptance | None) -> None:
        if acceptance is None or self.read_only:
            self.app.bell()
            return
        row, column = self.cursor_location
        start = (row, column - acceptance.replace)
        line_before = self.document[row][: start[1]]
        self.session.record_acceptance()
        result = self.replace(acceptance.insert, start, self.cursor_location, maintain_selection_offset=False)
        self.move_cursor(result.end_location)
        self._auto_space = result.end_location
        self._space_absorbed = False
        self.post_message(self.Accepted(acceptance))
        end_row, end_column = result.end_location
        self.post_message(self.WordFinished(finished_by_taking(line_before, acceptance.word, (end_row, end_column - 1))))

    def action_erase_left(self) -> None:
        """Backspace: erase the selection or the character left of the cursor (one keystroke)."""
        self._erase(self.action_delete_left)

    def action_erase_right(self) -> None:
        """Delete: erase the selection or the character right of the cursor (one keystroke)."""
        self._erase(self.action_delete_right)

    def action_erase_word_left(self) -> None:
        """Erase back to the start of the word (one keystroke)."""
        self._erase(self.action_delete_word_left)

    def _erase(self, delete) -> None:  # type: ignore[no-untyped-def]
        before = self.document.line_count, len(self.text)
        delete()
        self._auto_space = None
        if (self.document.line_count, len(self.text)) != before:
            self.session.spend()

    def action_cursor_right(self, select: bool = False) -> None:
        """Move right; the grey completion after the cursor is only a preview, never inserted."""
        self.suggestion = ""
        super().action_cursor_right(select)

    def show_status(self, wordings: Sequence[str]) -> None:
        """Write a status on the bottom border: the first of the wordings (richest first, Textual markup) that fits."""
        self._status_wordings = tuple(wordings)
        self._fit_status()

    def on_resize(self) -> None:
        """Choose the status wording again for the new width."""
        self._fit_status()

    def _fit_status(self) -> None:
        wordings = self._status_wordings
        if not wordings:
            return
        room = self.outer_size.width - 6  # two corners, a line and a blank on each side of the label
        self.border_subtitle = next((w for w in wordings if Content.from_markup(w).cell_length <= room), wordings[-1])

    def show_preview(self, text: str) -> None:
        """Show the rest of the highlighted word in grey after the cursor (at the end of a line)."""
        row, column = self.cursor_location
        at_end = column == len(self.document[row])
        self.suggestion = text if at_end and self.selection.is_empty else ""
