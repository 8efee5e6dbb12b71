"""The typing screen: composing area, context, ranked suggestions, tally and model facts.

Layout: below 110 columns the composing area spans the top and the panels sit
in a band underneath (suggestions beside the tally); from 110 columns the
composing area takes the left and the panels stack in a column on the right,
where the list of accepted words fills whatever height is left.  The message
area's bottom border says whether the pad is learning from what is typed.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Container, Vertical
from textual.reactive import reactive
from textual.screen import Screen
from textual.widgets import Footer, Header, TextArea

from foretype.query.model import LanguageModel

from ..formatting import LatencyFormatter, format_micros
from ..learning import LearningSource
from ..session import Offer, PadSession, Tally
from ..widgets.accept_log import AcceptedWord, AcceptLog
from ..widgets.compose_area import ComposeArea
from ..widgets.context_strip import ContextStrip
from ..widgets.model_facts import ModelFacts, model_label
from ..widgets.suggestion_table import SuggestionTable
from ..widgets.tally_panel import TallyPanel

WIDE_FROM = 110
"""Terminal width (columns) from which the panels move to a column on the right."""


class PadScreen(Screen[None]):
    """Type with the model and watch what it offers.

    The offer, the highlighted rank, the tally and the model are reactive
    attributes of the screen, bound to the widgets that draw them; the screen
    sets them after every change of the text, the highlight or the model.
    """

    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (WIDE_FROM, "-wide")]
    """Below WIDE_FROM columns the panels go under the composing area."""

    BINDINGS = [
        Binding("f1", "app.help", "help", id="help"),
        Binding("f2", "app.save", "save", id="save"),
        Binding("f3", "app.replay", "replay", id="replay"),
        Binding("f4", "app.sweep", "sweep", id="sweep"),
        Binding("f5", "app.open_model", "model", id="open-model"),
        Binding("f6", "app.toggle_learning", "learn", id="toggle-learning"),
        Binding("f7", "app.learned_words", "words", id="learned-words"),
    ]
    """Screen keys (the composing area adds Tab and the rank chords; the app adds Ctrl+Q)."""

    offer: reactive[Offer | None] = reactive(None)
    """The ranked suggestions for the text at the cursor."""
    highlight: reactive[int] = reactive(0)
    """0-based rank highlighted in the offer (what Tab takes)."""
    tally: reactive[Tally] = reactive(Tally(0, 0, 0, None))
    """The session's running figures."""
    model: reactive[LanguageModel | None] = reactive(None)
    """The model typed with (its facts line under the panels)."""

    def __init__(
        self,
        session: PadSession,
        model: LanguageModel,
        learning: LearningSource | None = None,
        *,
        cursor_blink: bool = True,
        format_latency: LatencyFormatter = format_micros,
    ) -> None:
        """Set up the screen.

        Args:
            session: the typing session (suggestions, highlight, tally).
            model: the model typed with.
            learning: the learning source in use, or None (for the learning indicator).
            cursor_blink: let the cursor blink (snapshots turn it off).
            format_latency: writes a duration in microseconds.
        """
        super().__init__()
        self.session = session
        self.learning = learning
        self.cursor_blink = cursor_blink
        self.format_latency = format_latency
        self.set_reactive(PadScreen.model, model)

    def compose(self) -> ComposeResult:
        """Build the widgets."""
        yield Header()
        with Container(id="body"):
            compose = ComposeArea(self.session, id="compose")
            compose.border_title = "message"
            compose.cursor_blink = self.cursor_blink
            yield compose
            with Container(id="board"):
                with Vertical(id="offers") as offers:
                    offers.border_title = "next word"
                    offers.border_subtitle = "tab take · ↑↓ move"
                    yield ContextStrip(id="context").data_bind(PadScreen.offer)
                    yield SuggestionTable(k=self.session.k, id="suggestions").data_bind(PadScreen.offer, PadScreen.highlight)
                with Vertical(id="figures") as figures:
                    figures.border_title = "tally"
                    yield TallyPanel(format_latency=self.format_latency, id="tally").data_bind(PadScreen.tally)
                    yield AcceptLog(id="log")
        yield ModelFacts(id="facts").data_bind(PadScreen.model)
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Focus the composing area and draw the first offer."""
        self.query_one(ComposeArea).focus()
        self.watch_model(self.model)
        self.show_learning()
        self.refresh_panels()

    @property
    def compose_area(self) -> ComposeArea:
        """The composing area."""
        return self.query_one(ComposeArea)

    def watch_model(self, model: LanguageModel | None) -> None:
        """Name the model in the title bar."""
        self.sub_title = f"typing pad · {model_label(model.path if model is not None else None)}"

    def use(self, model: LanguageModel, learning: LearningSource | None) -> None:
        """Type with another model and its learning source (the session's source is already switched)."""
        self.model = model
        self.learning = learning
        self.show_learning()
        self.refresh_panels()

    def show_learning(self) -> None:
        """Redraw the learning indicator on the message area's bottom border."""
        self.compose_area.show_status(learning_indicator(self.learning))

    def refresh_panels(self) -> None:
        """Set the offer, highlight and tally for the text at the cursor, and the grey preview."""
        area = self.compose_area
        session = self.session
        offer = area.current_offer()
        self.offer = offer
        self.highlight = session.highlight
        self.tally = session.tally(len(area.text))
        plan = session.plan()
        preview = ""
        if plan is not None and offer.prefix and plan.insert.startswith(plan.word):
            preview = plan.word[plan.replace :]
        area.show_preview(preview)

    @on(TextArea.Changed)
    @on(TextArea.SelectionChanged)
    @on(ComposeArea.HighlightMoved)
    def _text_or_highlight_changed(self) -> None:
        self.refresh_panels()

    @on(ComposeArea.Accepted)
    def _accepted(self, message: ComposeArea.Accepted) -> None:
        acceptance = message.acceptance
        self.query_one(AcceptLog).add(AcceptedWord(acceptance.word, acceptance.rank, acceptance.typed, acceptance.saved))
        self.refresh_panels()


def learning_indicator(source: LearningSource | None) -> list[str]:
    """The learning state as the message area's border shows it, richest wording first (Textual markup)."""
    if source is None or not source.available:
        return ["[dim]○ learning unavailable · f6 says why[/]", "[dim]○ learning unavailable[/]"]
    if source.learning:
        on = "[b $success]● learning on[/]"
        return [f"{on} · kept on this machine only · f6 stop · f7 learned words", f"{on} · on this machine only · f6 stop · f7 words", f"{on} · f6 stop · f7 words", on]
    off = "[b $warning]○ learning off[/]"
    return [f"{off} · f6 start · f7 learned words", f"{off} · f6 start · f7 words", off]
