"""Choosing a file: type a path and press Enter, or pick one in the folder tree."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import DirectoryTree, Input


class FilePicker(Vertical):
    """A path box over a folder tree; posts :class:`FilePicker.Picked` with the chosen path.

    A typed relative path is relative to the working folder, as on the command line.
    """

    DEFAULT_CSS = """
    FilePicker { height: 1fr; }
    FilePicker > DirectoryTree { height: 1fr; }
    """

    class Picked(Message):
        """A path was chosen (it may not exist: the screen that opens it reports errors)."""

        def __init__(self, path: Path) -> None:
            """Args:
            path: the chosen path.
            """
            super().__init__()
            self.path = path

    def __init__(self, folder: Path, *, placeholder: str = "path to a file", cursor_blink: bool = True, id: str | None = None) -> None:  # noqa: A002
        """Args:
        folder: where the tree starts.
        placeholder: grey text in the empty path box.
        cursor_blink: let the cursor blink in the path box (snapshots turn it off).
        id: the widget id.
        """
        super().__init__(id=id)
        self.folder = folder
        self.placeholder = placeholder
        self.cursor_blink = cursor_blink

    def compose(self) -> ComposeResult:
        """A path box and a tree."""
        path_box = Input(placeholder=self.placeholder, classes="picker-path")
        path_box.cursor_blink = self.cursor_blink
        yield path_box
        yield DirectoryTree(self.folder, classes="picker-tree")

    def focus_path(self) -> None:
        """Put the cursor in the path box."""
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        """Enter in the path box."""
        event.stop()
        value = event.value.strip()
        if value:
            self.post_message(self.Picked(Path(value).expanduser()))

    def on_directory_tree_file_selected(self, event: DirectoryTree.FileSelected) -> None:
        """A file chosen in the tree."""
        event.stop()
        self.query_one(Input).value = str(event.path)
        self.post_message(self.Picked(event.path))
