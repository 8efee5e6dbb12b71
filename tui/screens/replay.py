"""The replay screen: the simulated typist types a text file with the current model.

The file is read and typed in a thread worker with a progress bar; then the
summary (keystroke savings beside the oracle and the baseline, query latency,
estimated entry time), one table row per word, and, for the highlighted row,
the suggestion lists the typist was shown while typing that word.
"""

from __future__ import annotations

from pathlib import Path

from rich.table import Table
from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Header, ProgressBar, Static
from textual.worker import get_current_worker

from foretype.counting.corpus import read_text_file
from foretype.errors import ForetypeError
from foretype.query.model import LanguageModel
from foretype.simulate import SavingsReport, TypistSettings, WordTrace, simulate

from ..formatting import LatencyFormatter, count, format_micros, signed_percent
from ..learning import LearningSource
from ..session import PadSession
from ..widgets.file_picker import FilePicker
from ..widgets.word_table import WordTable


class ReplayCancelled(Exception):
    """The screen was closed while the typist was still typing."""


def summary_table(report: SavingsReport, name: str, format_latency: LatencyFormatter) -> Table:
    """The replay's headline figures as a two-column table.

    Args:
        report: the simulation's report.
        name: the text file's name.
        format_latency: writes a duration in microseconds.
    """
    rate = report.entry_rate
    latency = report.latency_us

    def micros(key: str) -> str:
        value = latency.get(key)
        return "n/a" if value is None else format_latency(value)

    reached = "" if report.ksr_of_oracle is None else f" ({signed_percent(report.ksr_of_oracle)} reached)"
    speedup = rate.get("speedup")
    with_minutes = rate["seconds_with_prediction"] / 60
    without_minutes = rate["seconds_without_prediction"] / 60
    table = Table.grid(padding=(0, 2))
    table.add_column(style="dim", no_wrap=True)
    table.add_column()
    table.add_row("text", f"{name} · {count(report.words)} words · {count(report.characters)} characters · OOV {signed_percent(report.oov_rate)}")
    table.add_row(
        "savings",
        Text.assemble(
            "KSR ",
            (signed_percent(report.ksr), "bold green"),
            f" · oracle {signed_percent(report.oracle_ksr)}{reached} · baseline {signed_percent(report.baseline_ksr)} · {count(round(report.keystrokes))} keys",
        ),
    )
    table.add_row("picked", f"at rank 1: {signed_percent(report.hit_at_1)} of words · before any letter: {signed_percent(report.hit_before_first_letter)}")
    table.add_row("latency", f"p50 {micros('p50')} · p95 {micros('p95')} · p99 {micros('p99')} · max {micros('max')}")
    table.add_row(
        "est. time",
        f"{without_minutes:,.1f} min unaided → {with_minutes:,.1f} min with prediction" + ("" if speedup is None else f" (×{speedup:.2f})"),
    )
    return table


def picked_label(picked_at: str | None) -> str:
    """Where a word was picked: "typed" (never), "at once" (before a letter) or "after 'fe'"."""
    if picked_at is None:
        return "typed"
    return "at once" if not picked_at else f"after {picked_at!r}"


def shown_text(trace: WordTrace, number: int, min_prefix: int = 0) -> Text:
    """What the typist saw while typing one word: each step's list, the pick marked.

    Args:
        trace: the word's trace.
        number: its 1-based place in the text.
        min_prefix: letters the typist typed before its first look (step j follows min_prefix + j letters).
    """
    out = Text()
    out.append(f"word {number}: ", style="dim")
    out.append(trace.word, style="bold")
    out.append("" if trace.in_vocabulary else "  (not in the vocabulary)", style="red")
    out.append("\n")
    keys = f"{trace.keystrokes:g} keystroke{'' if trace.keystrokes == 1 else 's'}"
    if trace.picked_at is None:
        out.append(f"typed in full · {keys}\n", style="dim")
    else:
        out.append(f"picked {picked_label(trace.picked_at)} at rank {trace.rank} · {keys}\n", style="dim")
    if not trace.shown:
        out.append("\nno list was worth reading for this word", style="dim italic")
    for step, forms in enumerate(trace.shown):
        typed = trace.word[: min_prefix + step]
        out.append(f"\ntyped {typed!r}\n", style="cyan")
        if not forms:
            out.append("  (empty list)\n", style="dim")
        for rank, form in enumerate(forms, start=1):
            picked = trace.picked_at is not None and step == len(trace.shown) - 1 and rank == trace.rank
            out.append(f"  {rank} ")
            out.append(form, style="reverse bold" if picked else "")
            out.append("  ✓ picked\n" if picked else "\n", style="green")
    return out


class ReplayScreen(Screen[None]):
    """Choose a text, watch the typist's progress, then read the results."""

    BINDINGS = [
        Binding("escape", "app.pop_screen", "back to the pad", id="back"),
        Binding("ctrl+o", "choose", "other text", id="choose-text"),
        Binding("f1", "app.help", "help", id="help"),
    ]
    """Keys of the replay screen (the word table moves with the arrow keys)."""

    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (110, "-wide")]
    """From 110 columns the lists panel gets wider."""

    def __init__(
        self,
        model: LanguageModel,
        session: PadSession,
        folder: Path,
        *,
        path: Path | None = None,
        format_latency: LatencyFormatter = format_micros,
        cursor_blink: bool = True,
    ) -> None:
        """Set up the screen.

        Args:
            model: the model typed with (its vocabulary gives the oracle and the baseline).
            session: the pad's session: the typist uses its suggestion source and its k.
            folder: where the file tree starts.
            path: a text to replay at once (otherwise the person chooses one).
            format_latency: writes a duration in microseconds (tests make it constant).
            cursor_blink: let the cursor blink in the path box.
        """
        super().__init__()
        self.model = model
        self.session = session
        self.folder = folder
        self.start_path = path
        self.format_latency = format_latency
        self.cursor_blink = cursor_blink
        self.report: SavingsReport | None = None

    def compose(self) -> ComposeResult:
        """Build the screen."""
        yield Header()
        with Vertical(id="replay-progress", classes="panel") as progress:
            progress.border_title = "typing"
            yield Static("", id="replay-status", classes="status-line")
            yield ProgressBar(id="replay-bar", show_eta=False)
        with Vertical(id="replay-choose", classes="panel") as chooser:
            chooser.border_title = "choose a text for the typist"
            yield Static(
                "The simulated typist types the text exactly with the current model and picks each word as soon as it is offered. Type a path and press Enter, or pick a file.",
                classes="status-line",
            )
            yield FilePicker(self.folder, placeholder="path to a UTF-8 text file, then Enter", cursor_blink=self.cursor_blink, id="replay-picker")
        with Vertical(id="replay-results"):
            with Vertical(id="replay-summary-box", classes="panel") as box:
                box.border_title = "summary"
                yield Static(id="replay-summary")
            with Horizontal(id="replay-detail"):
                table = WordTable(("#", "word", "keys", "picked", "rank"), id="replay-words")
                table.border_title = "words · ↑↓ step"
                yield table
                with VerticalScroll(id="replay-shown-box", classes="panel") as shown:
                    shown.border_title = "lists shown"
                    yield Static(id="replay-shown")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Start the replay, or ask for a text."""
        self.sub_title = "replay"
        if self.start_path is not None:
            self.start(self.start_path)
        else:
            self.action_choose()

    def show_part(self, *parts: str) -> None:
        """Show some of the screen's three parts: ``choose``, ``progress`` or ``results``."""
        for name in ("choose", "progress", "results"):
            self.query_one(f"#replay-{name}").display = name in parts

    def action_choose(self) -> None:
        """Ctrl+O: choose another text."""
        self.show_part("choose")
        self.query_one(FilePicker).focus_path()

    def on_file_picker_picked(self, message: FilePicker.Picked) -> None:
        """A text was chosen."""
        self.start(message.path)

    def start(self, path: Path) -> None:
        """Replay a text file with the current model."""
        self.query_one("#replay-status", Static).update(f"reading {path.name} …")
        self.query_one("#replay-status", Static).set_class(False, "-error")
        self.query_one("#replay-progress").border_title = "typing"
        bar = self.query_one(ProgressBar)
        bar.display = True
        bar.update(total=None, progress=0)
        self.show_part("progress")
        self.replay(path)

    @work(thread=True, exclusive=True, exit_on_error=False, group="replay")
    def replay(self, path: Path) -> None:
        """Read and type the text off the event loop, reporting progress."""
        worker = get_current_worker()
        app = self.app
        model = self.model
        source = self.session.source
        if isinstance(source, LearningSource):
            source = source.for_other_thread()  # the learned file's objects stay with the interface's thread
        settings = TypistSettings(k=self.session.k, skip_passed=self.session.skip_passed)

        def progress(done: int, total: int) -> None:
            if worker.is_cancelled:
                raise ReplayCancelled
            app.call_from_thread(self._progressed, done, total)

        try:
            text = read_text_file(str(path))
            app.call_from_thread(self._progressed, 0, 0)
            report = simulate(model, text, settings, progress, source=None if source is model else source)
        except ReplayCancelled:
            return
        except ForetypeError as error:
            app.call_from_thread(self._failed, str(error))
            return
        except Exception as error:  # noqa: BLE001 - a failed replay must not take the pad down
            app.call_from_thread(self._failed, f"{path}: replay failed ({type(error).__name__}: {error})")
            return
        if not worker.is_cancelled:
            app.call_from_thread(self._finished, path, report)

    def _progressed(self, done: int, total: int) -> None:
        if total:
            self.query_one(ProgressBar).update(total=total, progress=done)
            then = " · now the oracle and the baseline …" if done == total else ""
            self.query_one("#replay-status", Static).update(f"typing: {count(done)} of {count(total)} words{then}")
        else:
            self.query_one("#replay-status", Static).update("typing …")

    def _failed(self, reason: str) -> None:
        """Say why over the file chooser, with the progress bar stopped and the path box ready for another text."""
        status = self.query_one("#replay-status", Static)
        status.update(f"Not replayed: {reason}\nChoose another text below.")
        status.set_class(True, "-error")
        self.query_one("#replay-progress").border_title = "not replayed"
        bar = self.query_one(ProgressBar)
        bar.update(total=1, progress=0)  # a bar without a total animates for ever
        bar.display = False
        self.show_part("progress", "choose")
        self.query_one(FilePicker).focus_path()

    def _finished(self, path: Path, report: SavingsReport) -> None:
        self.report = report
        self.query_one("#replay-summary", Static).update(summary_table(report, path.name, self.format_latency))
        self.query_one("#replay-summary-box").border_subtitle = "simulated estimates, not a clinical assessment"
        table = self.query_one(WordTable)
        table.set_rows([(str(n), t.word, f"{t.keystrokes:g}", picked_label(t.picked_at), "" if t.rank is None else str(t.rank)) for n, t in enumerate(report.trace, start=1)])
        self.show_part("results")
        table.focus()

    def show_word(self, index: int) -> None:
        """Show the lists the typist saw for the word at a 0-based place."""
        if self.report is None or not 0 <= index < len(self.report.trace):
            return
        min_prefix = int(self.report.settings.get("min_prefix", 0))
        self.query_one("#replay-shown", Static).update(shown_text(self.report.trace[index], index + 1, min_prefix))

    @on(WordTable.Highlighted)
    def _word_highlighted(self, event: WordTable.Highlighted) -> None:
        self.show_word(event.index)
