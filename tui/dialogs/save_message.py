"""Saving the composed text to a new file (an existing file is never overwritten)."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from foretype.errors import OutputError

from ..files import save_new_text


class SaveDialog(ModalScreen[Path | None]):
    """Ask for a file name and write the text there; errors stay in the dialog."""

    BINDINGS = [Binding("escape", "cancel", "cancel", id="cancel-save")]
    """Escape closes the dialog without saving."""

    def __init__(self, text: str, suggested: Path, *, cursor_blink: bool = True) -> None:
        """Args:
        text: the text to save.
        suggested: the file name offered first (one that does not exist yet).
        cursor_blink: let the cursor blink in the name box (snapshots turn it off).
        """
        super().__init__()
        self.text = text
        self.suggested = suggested
        self.cursor_blink = cursor_blink

    def compose(self) -> ComposeResult:
        """Build the dialog."""
        with Vertical(classes="dialog") as box:
            box.border_title = "save the message"
            yield Static("Save to a new file (Enter saves, Esc cancels):", classes="dialog-text")
            path_box = Input(str(self.suggested), id="save-path")
            path_box.cursor_blink = self.cursor_blink
            yield path_box
            yield Static("", id="save-error", classes="error-line")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        """Enter: write the file, or say why not."""
        name = event.value.strip()
        if not name:
            self.query_one("#save-error", Static).update("Type a file name.")
            return
        try:
            written = save_new_text(name, self.text)
        except OutputError as error:
            self.query_one("#save-error", Static).update(str(error))
            return
        self.dismiss(written)

    def action_cancel(self) -> None:
        """Close without saving."""
        self.dismiss(None)
