"""The running tally: characters, keystrokes, savings, acceptances, last query latency."""

from __future__ import annotations

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from ..formatting import LatencyFormatter, bar, count, format_micros, signed_percent
from ..session import Tally


class TallyPanel(Widget):
    """Five figures, one a line; the savings line carries a bar when there is room."""

    DEFAULT_CSS = """
    TallyPanel { height: 5; text-wrap: nowrap; text-overflow: clip; }
    """

    tally: reactive[Tally] = reactive(Tally(0, 0, 0, None))
    """The figures drawn (bound to the typing screen's ``tally``)."""

    def __init__(self, *, format_latency: LatencyFormatter = format_micros, id: str | None = None) -> None:  # noqa: A002
        """Args:
        format_latency: writes a duration in microseconds.
        id: the widget id.
        """
        super().__init__(id=id)
        self.format_latency = format_latency

    def render(self) -> Text:
        """The figures as text."""
        t = self.tally
        saving = t.savings
        latency = "—" if t.latency_ns is None else self.format_latency(t.latency_ns / 1000)
        rows = [
            ("characters", count(t.characters), ""),
            ("keystrokes", count(t.keystrokes), ""),
            ("saved", signed_percent(saving), "keystroke savings"),
            ("accepted", count(t.accepted), "word" if t.accepted == 1 else "words"),
            ("last query", latency, ""),
        ]
        out = Text(no_wrap=True, overflow="crop")
        room = self.size.width - 12 - 9
        for index, (label, value, note) in enumerate(rows):
            out.append(f"{label:<11} ", style="dim")
            out.append(f"{value:>8}", style="bold")
            if label == "saved" and room >= 6 and saving is not None:
                out.append(" " + bar(max(saving, 0.0), room - 1).rstrip(), style="green")
            elif note and room >= len(note) + 1:
                out.append(f" {note}", style="dim")
            if index < len(rows) - 1:
                out.append("\n")
        return out
