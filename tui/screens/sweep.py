"""The sweep screen: a ``sweep.json`` as a chart and a table.

The chart draws keystroke savings (left axis, percent) and p99 suggestion
latency (right axis, microseconds) against vocabulary size, one pair of lines
per method; the vocabulary axis is logarithmic when the sizes span a factor of
four or more.  A sweep with a size axis (``--keep-bytes``) is drawn as savings
against model bytes instead (log scale), one line per method, pruning
criterion and value encoding.  The table lists every row.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Static
from textual_plotext.plot import Plot

from foretype.chart import vocabulary_label
from foretype.errors import ForetypeError
from foretype.size_chart import size_lines
from foretype.sweep import has_learning

from ..files import SweepFile, read_sweep
from ..formatting import count, file_size, signed_percent
from ..widgets.file_picker import FilePicker
from ..widgets.fresh_plot import FreshPlot

COLUMNS = ("method", "vocabulary", "KSR", "oracle", "baseline", "p50 µs", "p99 µs", "perplexity", "OOV", "file", "memory")
"""The table's columns."""
LEARNING_COLUMNS = COLUMNS[:4] + ("learning",) + COLUMNS[4:]
SIZE_COLUMNS = ("shrunk",)
"""Added for a sweep with a size axis: how the model was shrunk (criterion, share of the full model's bytes, values)."""
"""The columns of a sweep run with ``--adapt``: the KSR of a typist whose user model learns as they go comes after the oracle."""


def _number(value: Any, digits: int = 0) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "n/a"
    return f"{value:,.{digits}f}"


def _share(value: Any) -> str:
    return "n/a" if value is None else signed_percent(float(value))


def _bytes(value: Any) -> str:
    return "n/a" if value is None else file_size(int(value))


def shrunk_cell(row: dict[str, Any]) -> str:
    """How a size-sweep row's model was shrunk ("full" for the full model)."""
    if row.get("keep_bytes") is None:
        return "full"
    how = "values only" if row.get("criterion") in (None, "none") else f"{row['criterion']} to {float(row['keep_bytes']):g}"
    return f"{how}, {row.get('value_encoding', '')}"


def table_row(row: dict[str, Any], learning: bool = False, sized: bool = False) -> tuple[str, ...]:
    """One sweep row as table cells (missing values read "n/a"), with the learning and shrunk cells when asked."""
    return (
        str(row.get("method", "")),
        count(int(row["vocab_size"])),
        _share(row.get("ksr")),
        _share(row.get("oracle_ksr")),
        *((_share(row.get("adapted_ksr")),) if learning else ()),
        _share(row.get("baseline_ksr")),
        _number(row.get("latency_p50_us")),
        _number(row.get("latency_p99_us")),
        _number(row.get("perplexity"), 1),
        _share(row.get("oov_rate")),
        _bytes(row.get("file_bytes")),
        _bytes(row.get("rss_bytes")),
        *((shrunk_cell(row),) if sized else ()),
    )


LINE_COLOURS = ("cyan", "magenta", "green", "yellow", "red", "blue")
"""One colour per line, in drawing order (names both plotext and rich know)."""

LegendEntry = tuple[str, str, str]
"""A line of the chart as the legend under it names it: (symbol, label, colour)."""


class _Lines:
    """Draws lines on a plotext figure without its own legend, keeping one for the line under the chart.

    plotext's own legend fails (IndexError) when one line is drawn entirely over by another at the
    chart's size, so the legend is written by the screen instead.
    """

    def __init__(self, plt: Plot) -> None:
        self.plt = plt
        self.legend: list[LegendEntry] = []

    def add(self, points: list[tuple[float, float]], label: str, *, marker: str = "braille", yside: str = "left") -> None:
        if not points:
            return
        colour = LINE_COLOURS[len(self.legend) % len(LINE_COLOURS)]
        self.plt.plot([a for a, _ in points], [b for _, b in points], marker=marker, color=colour, yside=yside)
        self.legend.append(("•" if marker == "dot" else "━", label, colour))


def draw_size_chart(plt: Plot, sweep: SweepFile) -> list[LegendEntry]:
    """Draw savings against model bytes (log scale), one line per method, criterion and value encoding; return the legend."""
    lines = _Lines(plt)
    sizes: list[float] = []
    for key, members in size_lines(sweep.rows).items():
        sizes.extend(float(r["file_bytes"]) for r in members)
        lines.add([(float(r["file_bytes"]), 100 * float(r["ksr"])) for r in members], ", ".join(key))
    if sizes:
        plt.xscale("log")
        ticks = sorted(set(sizes))
        plt.xticks(ticks, [file_size(int(t)) for t in ticks])
    plt.xlabel("model file bytes (log scale)")
    plt.title("keystroke savings (%) by model size")
    return lines.legend


def draw_chart(plt: Plot, sweep: SweepFile) -> list[LegendEntry]:
    """Draw savings and p99 latency against vocabulary size.

    Args:
        plt: the cleared figure to draw on.
        sweep: the rows to draw.

    Returns:
        The legend: one entry per line drawn.
    """
    lines = _Lines(plt)
    sizes = [int(r["vocab_size"]) for r in sweep.rows]
    logarithmic = min(sizes) > 0 and max(sizes) / min(sizes) >= 4
    for method in sweep.methods:
        rows = [r for r in sweep.rows if str(r.get("method", "")) == method]
        x = [int(r["vocab_size"]) for r in rows]
        lines.add([(i, 100 * float(r["ksr"])) for i, r in zip(x, rows) if r.get("ksr") is not None], f"{method} KSR %")
        lines.add([(i, 100 * float(r["adapted_ksr"])) for i, r in zip(x, rows) if r.get("adapted_ksr") is not None], f"{method} learning KSR %")
        lines.add([(i, float(r["latency_p99_us"])) for i, r in zip(x, rows) if r.get("latency_p99_us") is not None], f"{method} p99 µs", marker="dot", yside="right")
    if logarithmic:
        plt.xscale("log")
    ticks = [float(t) for t in sorted(set(sizes))]
    plt.xticks(ticks, [vocabulary_label(t) for t in ticks])  # labelled as the SVG chart labels them
    plt.xlabel("vocabulary size (words)")
    plt.title("keystroke savings (left, %) and p99 latency (right, µs)")
    return lines.legend


def legend_text(legend: list[LegendEntry]) -> Text:
    """The legend as one line of text (wrapped between entries when narrow)."""
    out = Text()
    for index, (symbol, label, colour) in enumerate(legend):
        if index:
            out.append("   ")
        out.append(f"{symbol} ", style=f"bold {colour}")
        out.append(label)
    return out


class SweepScreen(Screen[None]):
    """Choose a ``sweep.json``; see its chart and rows."""

    BINDINGS = [
        Binding("escape", "app.pop_screen", "back to the pad", id="back"),
        Binding("ctrl+o", "choose", "other sweep", id="choose-sweep"),
        Binding("f1", "app.help", "help", id="help"),
    ]
    """Keys of the sweep screen."""

    def __init__(self, folder: Path, *, path: Path | None = None, cursor_blink: bool = True) -> None:
        """Args:
        folder: where the file tree starts.
        path: a sweep result to open at once (otherwise the person chooses one).
        cursor_blink: let the cursor blink in the path box.
        """
        super().__init__()
        self.folder = folder
        self.start_path = path
        self.cursor_blink = cursor_blink
        self.sweep: SweepFile | None = None

    def compose(self) -> ComposeResult:
        """Build the screen."""
        yield Header()
        with Vertical(id="sweep-choose", classes="panel") as chooser:
            chooser.border_title = "choose a sweep result"
            yield Static("Open a sweep.json written by `foretype sweep`: type its path and press Enter, or pick it below.", classes="status-line")
            yield Static("", id="sweep-status", classes="status-line")
            yield FilePicker(self.folder, placeholder="path to sweep.json, then Enter", cursor_blink=self.cursor_blink, id="sweep-picker")
        with Vertical(id="sweep-results"):
            yield FreshPlot(id="sweep-chart")
            yield Static("", id="sweep-legend", classes="status-line")
            table: DataTable[str] = DataTable(id="sweep-table", cursor_type="row", zebra_stripes=True)
            table.border_title = "rows"
            yield table
            yield Static("", id="sweep-note", classes="status-line")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        """Open the given sweep, or ask for one."""
        self.sub_title = "sweep"
        self.query_one(DataTable).add_columns(*COLUMNS)
        if self.start_path is not None:
            self.open_sweep(self.start_path)
        else:
            self.action_choose()

    def action_choose(self) -> None:
        """Ctrl+O: choose another sweep file."""
        self.query_one("#sweep-choose").display = True
        self.query_one("#sweep-results").display = False
        self.query_one(FilePicker).focus_path()

    def on_file_picker_picked(self, message: FilePicker.Picked) -> None:
        """A file was chosen."""
        self.open_sweep(message.path)

    def open_sweep(self, path: Path) -> None:
        """Read a sweep file (a few kilobytes: read at once) and show it, or say why not."""
        status = self.query_one("#sweep-status", Static)
        try:
            sweep = read_sweep(path)
        except ForetypeError as error:
            status.update(f"Not opened: {error}")
            status.set_class(True, "-error")
            self.action_choose()
            return
        status.update("")
        self.sweep = sweep
        table = self.query_one(DataTable)
        learning = has_learning(sweep.rows)
        sized = any(r.get("keep_bytes") is not None for r in sweep.rows)
        table.clear(columns=True)
        table.add_columns(*(LEARNING_COLUMNS if learning else COLUMNS), *(SIZE_COLUMNS if sized else ()))
        table.add_rows(table_row(r, learning, sized) for r in sweep.rows)
        notes = [f"{path.name}: {len(sweep.rows)} rows"]
        if sweep.test:
            notes.append(f"test {Path(sweep.test).name}")
        if sweep.k is not None:
            notes.append(f"k={sweep.k}")
        if not sweep.complete:
            notes.append("interrupted: not every planned row finished")
        notes.append("simulated estimates")
        self.query_one("#sweep-note", Static).update(" · ".join(notes))
        self.query_one("#sweep-choose").display = False
        self.query_one("#sweep-results").display = True
        draw = draw_size_chart if sized else draw_chart
        chart = self.query_one(FreshPlot)
        self.query_one("#sweep-legend", Static).update(legend_text(draw(chart.plt, sweep)))
        chart.draw(lambda plt: draw(plt, sweep))
        table.focus()
