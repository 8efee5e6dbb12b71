"""The typing pad application: one loaded model, one typing session, four screens.

The caller loads the model and passes it in (tests pass a tiny in-memory one).
Suggestions come from a *source* made from the model by ``make_source``; by
default the model itself.  The learning source of :mod:`tui.learning` (the
model combined with its learned file; ``foretype pad`` uses it) plugs in
there: with it the pad learns each word the person finishes, F6 switches
learning on and off, and F7 opens the learned words.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from pathlib import Path

from textual import on
from textual.app import App
from textual.binding import Binding

from foretype.errors import ForetypeError
from foretype.query.model import LanguageModel

from .dialogs.confirm_quit import ConfirmQuitDialog, QuitChoice
from .dialogs.save_message import SaveDialog
from .files import free_name, shown_path
from .formatting import LatencyFormatter, format_micros
from .learning import Finished, LearningSource, why_unavailable
from .screens.help import HelpScreen
from .screens.learned import LearnedWordsScreen
from .screens.model import ModelScreen
from .screens.pad import PadScreen
from .screens.replay import ReplayScreen
from .screens.sweep import SweepScreen
from .session import PadSession, SuggestionSource
from .widgets.compose_area import ComposeArea

SourceFactory = Callable[[LanguageModel], SuggestionSource]
"""Makes the suggestion source for a model (the default returns the model)."""


def model_as_source(model: LanguageModel) -> SuggestionSource:
    """The default source: the model's own suggestions."""
    return model


class PadApp(App[None]):
    """Type with a model, replay texts, read sweeps, open other models."""

    CSS_PATH = "app.tcss"
    TITLE = "foretype"
    SUB_TITLE = "typing pad"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS = [Binding("ctrl+q", "quit", "quit", priority=True, id="quit")]
    """Ctrl+Q asks first when the message is unsaved (see :meth:`action_quit`)."""

    def __init__(
        self,
        model: LanguageModel,
        *,
        k: int = 5,
        make_source: SourceFactory = model_as_source,
        clock: Callable[[], int] = time.perf_counter_ns,
        format_latency: LatencyFormatter = format_micros,
        cursor_blink: bool = True,
        folder: Path | None = None,
        format_when: Callable[[int], str] | None = None,
        skip_passed: bool = True,
    ) -> None:
        """Set up the pad.

        Args:
            model: the loaded model to type with.
            k: suggestions shown at each position (1 to 9, one chord each).
            make_source: builds the suggestion source for a model.
            clock: nanosecond clock timing each suggestion query.
            format_latency: writes a duration in microseconds (tests make it constant).
            cursor_blink: let the cursor blink (snapshots turn it off).
            folder: where file dialogs start and the message is saved (default: the working folder).
            format_when: writes a Unix time for the learned-words screen (default: local date and time;
                tests make it constant).
            skip_passed: within a word, leave out the words offered and passed over, as the
                simulated typist does by default (so the tallies agree).
        """
        super().__init__()
        self.model = model
        self.make_source = make_source
        self.session = PadSession(make_source(model), k=k, clock=clock, skip_passed=skip_passed)
        self.format_latency = format_latency
        self.cursor_blink = cursor_blink
        self.folder = folder if folder is not None else Path.cwd()
        self.format_when = format_when if format_when is not None else local_time
        self.saved_text = ""
        """The composed text as last saved ("" before any save)."""

    def get_default_screen(self) -> PadScreen:
        """The typing screen is the one at the bottom of the stack."""
        return PadScreen(self.session, self.model, self.learning, cursor_blink=self.cursor_blink, format_latency=self.format_latency)

    def replay_screen(self, path: Path | None = None) -> ReplayScreen:
        """The replay screen for the model and session in use (``path``: a text to replay at once)."""
        return ReplayScreen(self.model, self.session, self.folder, path=path, format_latency=self.format_latency, cursor_blink=self.cursor_blink)

    def sweep_screen(self, path: Path | None = None) -> SweepScreen:
        """The sweep screen (``path``: a sweep result to open at once)."""
        return SweepScreen(self.folder, path=path, cursor_blink=self.cursor_blink)

    def model_screen(self, path: Path | None = None) -> ModelScreen:
        """The model screen for the model in use (``path``: a model file to open at once)."""
        return ModelScreen(self.model, self.folder, path=path, cursor_blink=self.cursor_blink)

    def learned_words_screen(self) -> LearnedWordsScreen:
        """The learned words screen for the learning source in use."""
        return LearnedWordsScreen(self.learning, format_when=self.format_when)

    @property
    def pad(self) -> PadScreen:
        """The typing screen."""
        screen = self.screen_stack[0]
        assert isinstance(screen, PadScreen)
        return screen

    @property
    def composed_text(self) -> str:
        """The text in the composing area."""
        return self.pad.compose_area.text

    @property
    def unsaved(self) -> bool:
        """Whether the composing area holds text that has not been saved."""
        text = self.composed_text
        return bool(text.strip()) and text != self.saved_text

    @property
    def learning(self) -> LearningSource | None:
        """The learning source in use (None when the suggestions come from a plain model)."""
        source = self.session.source
        return source if isinstance(source, LearningSource) else None

    def use_model(self, model: LanguageModel) -> None:
        """Switch to another loaded model; the text and tally stay (the old learned file is released first)."""
        old = self.learning
        if old is not None:
            old.close()
        self.model = model
        self.session.source = self.make_source(model)
        self.pad.use(model, self.learning)

    def learn(self, finished: Finished) -> None:
        """Learn a finished word or sentence end (while learning is on), then refresh the suggestions."""
        source = self.learning
        if source is None:
            return
        try:
            learned = source.take(finished)
        except ForetypeError as error:
            self.notify(f"Not learned: {error}", severity="error")
            return
        if learned:
            self.learning_changed()

    @on(ComposeArea.WordFinished)
    def _word_finished(self, message: ComposeArea.WordFinished) -> None:
        self.learn(message.finished)

    @on(ModelScreen.Opened)
    def _model_opened(self, message: ModelScreen.Opened) -> None:
        self.use_model(message.model)

    @on(LearnedWordsScreen.Changed)
    def learning_changed(self) -> None:
        """Redraw what depends on the learned words: the pad's suggestions and indicator, an open learned-words screen."""
        self.session.forget_offer()
        self.pad.show_learning()
        self.pad.refresh_panels()
        if isinstance(self.screen, LearnedWordsScreen):
            self.screen.show_words()

    def on_unmount(self) -> None:
        """Release the learned file when the pad closes."""
        source = self.learning
        if source is not None:
            source.close()

    # --------------------------------------------------------------- actions
    def action_help(self) -> None:
        """F1: the help screen."""
        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_save(self) -> None:
        """F2: save the composed text to a new file."""
        text = self.composed_text
        if not text.strip():
            self.notify("Nothing to save yet.", severity="warning")
            return

        def saved(path: Path | None) -> None:
            if path is not None:
                self.saved_text = text
                self.notify(f"Saved {len(text):,} characters to {path}", title="saved")

        self.push_screen(SaveDialog(text, free_name(self.folder, "message", ".txt"), cursor_blink=self.cursor_blink), saved)

    def action_replay(self) -> None:
        """F3: the replay screen."""
        self.push_screen(self.replay_screen())

    def action_sweep(self) -> None:
        """F4: the sweep screen."""
        self.push_screen(self.sweep_screen())

    def action_open_model(self) -> None:
        """F5: the model screen."""
        self.push_screen(self.model_screen())

    def action_toggle_learning(self) -> None:
        """F6: switch learning from what is typed on or off (kept in the learned file)."""
        source = self.learning
        if source is None or not source.available:
            self.notify(f"Learning is not available: {why_unavailable(source)}.", severity="warning")
            return
        try:
            source.set_learning(not source.learning)
        except ForetypeError as error:
            self.notify(f"Learning not switched: {error}", severity="error")
            return
        if source.learning:
            self.notify(f"Learning on: the words you finish are kept in {shown_path(source.path)}, on this machine only.", title="learning")
        else:
            self.notify("Learning off: nothing you type is learned; suggestions are the model's own.", title="learning")
        self.learning_changed()

    def action_learned_words(self) -> None:
        """F7: the learned words screen."""
        if not isinstance(self.screen, LearnedWordsScreen):
            self.push_screen(self.learned_words_screen())

    async def action_quit(self) -> None:
        """Ctrl+Q: quit, asking first if the message is unsaved."""
        if not self.unsaved:
            self.exit()
            return
        if isinstance(self.screen, ConfirmQuitDialog):
            self.screen.dismiss("quit")  # a second Ctrl+Q confirms
            return

        def chosen(choice: QuitChoice | None) -> None:
            if choice == "quit":
                self.exit()
            elif choice == "save":
                self.action_save()

        self.push_screen(ConfirmQuitDialog(len(self.composed_text)), chosen)


def local_time(when: int) -> str:
    """A Unix time as local date and time, to the minute."""
    return time.strftime("%Y-%m-%d %H:%M", time.localtime(when))
