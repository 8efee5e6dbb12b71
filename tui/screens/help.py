"""The help screen: help.md and the keys of the screen underneath, read from its bindings."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Markdown

HELP_FILE = Path(__file__).resolve().parent.parent / "help.md"
"""The help text, shipped beside the interface."""


def help_text() -> str:
    """The help text as Markdown."""
    return HELP_FILE.read_text(encoding="utf-8")


class HelpScreen(ModalScreen[None]):
    """Scrollable help; Esc, F1 or q closes it."""

    BINDINGS = [Binding("escape,f1,q", "close", "close", id="close-help")]
    """Keys that close the help."""

    def compose(self) -> ComposeResult:
        """Build the screen."""
        with VerticalScroll(classes="dialog help-dialog") as box:
            box.border_title = "help · Esc closes"
            yield Markdown(help_text())

    def action_close(self) -> None:
        """Close the help."""
        self.dismiss(None)
