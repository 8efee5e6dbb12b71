"""The typing screen: composing area, context, ranked suggestions, tally and model facts.

Layout: below 110 columns the composing area spans the top and the panels sit
in a band underneath (suggestions beside the tally); from 110 columns the
composing area takes the left and the panels stack in a column on the right,
where the list of accepted words fills whatever height is left.  The message
area's bottom border says whether the pad is learning from what is typed.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Container, Vertical
from textual.screen import Screen
from textual.widgets import Footer, Header, TextArea

from ..widgets.accept_log import AcceptedWord, AcceptLog
from ..widgets.compose_area import ComposeArea
from ..widgets.context_strip import ContextStrip
from ..widgets.model_facts import ModelFacts, model_label
from ..widgets.suggestion_table import SuggestionTable
from ..widgets.tally_panel import TallyPanel

if TYPE_CHECKING:
    from ..app import PadApp
    from ..learning import LearningSource

WIDE_FROM = 110
"""Terminal width (columns) from which the panels move to a column on the right."""


class PadScreen(Screen[None]):
    """Type with the model and watch what it offers."""

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

    app: PadApp

    def compose(self) -> ComposeResult:
        """Build the widgets."""
        session = self.app.session
        yield Header()
        with Container(id="body"):
            compose = ComposeArea(session, id="compose")
            compose.border_title = "message"
            compose.cursor_blink = self.app.cursor_blink
            yield compose
            with Container(id="board"):
                with Vertical(id="offers") as offers:
                    offers.border_title = "next word"
                    offers.border_subtitle = "tab take · ↑↓ move"
                    yield ContextStrip(id="context")
                    yield SuggestionTable(k=session.k, id="suggestions")
                with Vertical(id="figures") as figures:
                    figures.border_title = "tally"
                    yield TallyPanel(format_latency=self.app.format_latency, id="tally")
                    yield AcceptLog(id="log")
        yield ModelFacts(id="facts")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Focus the composing area and draw the first offer."""
        self.query_one(ComposeArea).focus()
        self.show_model()
        self.show_learning()
        self.refresh_panels()

    @property
    def compose_area(self) -> ComposeArea:
        """The composing area."""
        return self.query_one(ComposeArea)

    def show_model(self) -> None:
        """Redraw the model facts (after a model was opened)."""
        model = self.app.model
        self.query_one(ModelFacts).show(model_label(model.path), model.info())
        self.sub_title = f"typing pad · {model_label(model.path)}"

    def show_learning(self) -> None:
        """Redraw the learning indicator on the message area's bottom border."""
        self.compose_area.border_subtitle = learning_indicator(self.app.learning)

    def refresh_panels(self) -> None:
        """Redraw the context, suggestions, tally and preview for the text at the cursor."""
        area = self.compose_area
        session = self.app.session
        offer = area.current_offer()
        self.query_one(ContextStrip).show(offer)
        self.query_one(SuggestionTable).show(offer, session.highlight)
        self.query_one(TallyPanel).show(session.tally(len(area.text)))
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

    @on(ComposeArea.WordFinished)
    def _word_finished(self, message: ComposeArea.WordFinished) -> None:
        self.app.learn(message.finished)

    @on(ComposeArea.Accepted)
    def _accepted(self, message: ComposeArea.Accepted) -> None:
        acceptance = message.acceptance
        self.query_one(AcceptLog).add(AcceptedWord(acceptance.word, acceptance.rank, acceptance.typed, acceptance.saved))
        self.refresh_panels()


def learning_indicator(source: LearningSource | None) -> str:
    """The learning state as the message area's border shows it (Textual markup)."""
    if source is None or not source.available:
        return "[dim]○ learning unavailable · f6 says why[/]"
    if source.learning:
        return "[b $success]● learning on[/] · kept on this machine only · f6 stop · f7 learned words"
    return "[b $warning]○ learning off[/] · f6 start · f7 learned words"
