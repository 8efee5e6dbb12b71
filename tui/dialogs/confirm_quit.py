"""Asked before quitting while the composed text is unsaved."""

from __future__ import annotations

from typing import Literal

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static

QuitChoice = Literal["quit", "save", "stay"]
"""What the person chose: leave without saving, save first, or keep typing."""


class ConfirmQuitDialog(ModalScreen[QuitChoice]):
    """Quit, save first, or go back to typing."""

    BINDINGS = [
        Binding("escape", "choose('stay')", "keep typing", id="keep-typing"),
        Binding("f2", "choose('save')", "save first", id="save-first"),
    ]
    """Each choice has a key as well as a button; a second Ctrl+Q (the app's key) quits."""

    def __init__(self, characters: int) -> None:
        """Args:
        characters: how many characters would be lost.
        """
        super().__init__()
        self.characters = characters

    def compose(self) -> ComposeResult:
        """Build the dialog."""
        with Vertical(classes="dialog") as box:
            box.border_title = "unsaved text"
            yield Static(f"The message ({self.characters:,} characters) has not been saved.\nQuit anyway?", classes="dialog-text")
            with Horizontal(classes="dialog-buttons"):
                yield Button("Save first (F2)", id="save", variant="primary")
                yield Button("Keep typing (Esc)", id="stay")
                yield Button("Quit (Ctrl+Q)", id="quit", variant="error")

    def on_mount(self) -> None:
        """Put the focus on the safe choice."""
        self.query_one("#stay", Button).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        """A button was clicked or pressed with Enter."""
        self.action_choose(event.button.id or "stay")

    def action_choose(self, choice: str) -> None:
        """Close the dialog with a choice."""
        self.dismiss(choice if choice in ("quit", "save") else "stay")  # type: ignore[arg-type]
