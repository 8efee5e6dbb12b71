"""The model screen: the loaded model's facts, and opening another model file.

The file is opened in a thread worker.  If it cannot be used (missing, damaged,
not a model file, or another format version) the reason is shown here and the
model already loaded stays in use.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from rich.table import Table
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Footer, Header, Static

from foretype.errors import ForetypeError
from foretype.query.model import LanguageModel, load

from ..formatting import count, file_size
from ..widgets.file_picker import FilePicker
from ..widgets.model_facts import model_label


def facts_table(model: LanguageModel) -> Table:
    """The model's ``info()`` as a two-column table."""
    info = model.info()
    table = Table.grid(padding=(0, 2))
    table.add_column(style="dim", no_wrap=True)
    table.add_column(style="bold")
    rows: list[tuple[str, Any]] = [
        ("file", str(model.path) if model.path is not None else "built in memory"),
        ("method", info["method"]),
        ("vocabulary", f"{count(info['vocab_size'])} words"),
        ("n-grams stored", " + ".join(f"{count(n)} {order}-grams" for order, n in sorted(info["ngrams"].items()))),
        ("file size", f"{file_size(int(info['file_bytes']))} ({info['bytes_per_ngram']:.1f} bytes per n-gram)"),
        ("corpus tokens", count(info["corpus_tokens"])),
        ("values stored as", str(info["value_encoding"])),
        ("format version", str(info["format_version"])),
        ("queries answered by", str(info.get("query_path_note", ""))),
    ]
    for label, value in rows:
        table.add_row(label, str(value))
    return table


class ModelScreen(Screen[None]):
    """Shows what is loaded; Enter on a path (or a file in the tree) opens another model."""

    BINDINGS = [
        Binding("escape", "app.pop_screen", "back to the pad", id="back"),
        Binding("f1", "app.help", "help", id="help"),
    ]
    """Keys of the model screen."""

    class Opened(Message):
        """Another model was loaded: the pad is to type with it from now on."""

        def __init__(self, model: LanguageModel) -> None:
            """Args:
            model: the model loaded.
            """
            super().__init__()
            self.model = model

    def __init__(self, model: LanguageModel, folder: Path, *, path: Path | None = None, cursor_blink: bool = True) -> None:
        """Args:
        model: the model in use.
        folder: where the file tree starts.
        path: a model file to open at once (otherwise the person chooses one).
        cursor_blink: let the cursor blink in the path box.
        """
        super().__init__()
        self.model = model
        self.folder = folder
        self.start_path = path
        self.cursor_blink = cursor_blink

    def compose(self) -> ComposeResult:
        """Build the screen."""
        yield Header()
        with Vertical(id="model-body"):
            with Vertical(id="model-facts", classes="panel") as facts:
                facts.border_title = "loaded model"
                yield Static(id="model-table")
                yield Static("", id="model-status", classes="status-line")
            with Vertical(id="model-open", classes="panel") as chooser:
                chooser.border_title = "open another model"
                yield FilePicker(self.folder, placeholder="path to a .model file, then Enter", cursor_blink=self.cursor_blink, id="model-picker")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Show the loaded model and put the cursor in the path box."""
        self.sub_title = "model"
        self.show_loaded()
        self.query_one(FilePicker).focus_path()
        if self.start_path is not None:
            self.set_status(f"opening {self.start_path} …")
            self.open_model(self.start_path)

    def show_loaded(self) -> None:
        """Draw the facts of the model in use."""
        self.query_one("#model-table", Static).update(facts_table(self.model))

    def set_status(self, text: str, *, error: bool = False) -> None:
        """Write the status line (red for an error)."""
        status = self.query_one("#model-status", Static)
        status.update(text)
        status.set_class(error, "-error")

    def on_file_picker_picked(self, message: FilePicker.Picked) -> None:
        """Open the chosen file."""
        self.set_status(f"opening {message.path} …")
        self.open_model(message.path)

    @work(thread=True, exclusive=True, exit_on_error=False, group="open-model")
    def open_model(self, path: Path) -> None:
        """Load a model file off the event loop and report back."""
        try:
            model = load(path)
        except ForetypeError as error:  # missing, corrupt, not a model, other format version
            self.app.call_from_thread(self._failed, str(error))
        except Exception as error:  # noqa: BLE001 - whatever goes wrong, the pad keeps its model
            self.app.call_from_thread(self._failed, f"{path}: cannot be used ({type(error).__name__}: {error})")
        else:
            self.app.call_from_thread(self._loaded, model)

    def _failed(self, reason: str) -> None:
        self.set_status(f"Not opened: {reason}\nThe model in use stays loaded: {model_label(self.model.path)}.", error=True)

    def _loaded(self, model: LanguageModel) -> None:
        self.model = model
        self.post_message(self.Opened(model))
        self.show_loaded()
        self.set_status(f"Now typing with {model_label(model.path)}. Esc goes back to the pad.")
