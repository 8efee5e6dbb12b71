"""A hand-written SVG line chart of a vocabulary sweep: savings and p99 latency against vocabulary size.

Keystroke savings (solid lines, left axis, percent), the oracle's savings
(dotted, same axis) and, when the sweep measured it, the savings of a typist
whose user model learns as they go (dash-dot, hollow markers) share the chart
with p99 suggestion latency (dashed, right axis, microseconds), one colour per
method.  The vocabulary axis is
logarithmic when the sizes span a factor of four or more.  Plain SVG 1.1, no
scripts, readable in any browser or on GitHub.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any
from xml.sax.saxutils import escape

WIDTH, HEIGHT = 760, 440
LEFT, RIGHT, TOP, BOTTOM = 70, 90, 56, 64
COLOURS = ("#1f6f8b", "#c2571a", "#4c8c2b", "#8a3ea8", "#b8912f")
"""One colour per method, in sweep order."""


def _nice_step(span: float, ticks: int = 5) -> float:
    raw = span / ticks if span > 0 else 1.0
    power = 10 ** math.floor(math.log10(raw))
    for factor in (1, 2, 2.5, 5, 10):
        if raw <= factor * power:
            return factor * power
    return 10 * power


def vocabulary_label(size: float) -> str:
    """A vocabulary size as every sweep chart labels it: round sizes in k ("1.5k", "50k"), any other in full ("65,265")."""
    if size >= 1000 and size % 100 == 0:
        return f"{size / 1000:g}k"
    return f"{size:,.0f}"


PLOT_WIDTH = WIDTH - LEFT - RIGHT
PLOT_HEIGHT = HEIGHT - TOP - BOTTOM

_SERIES = (
    ("ksr", ""),
    ("oracle_ksr", ' stroke-dasharray="2 3"'),
    ("adapted_ksr", ' stroke-dasharray="8 3 2 3"'),
    ("latency_p99_us", ' stroke-dasharray="7 4"'),
)
"""The lines drawn per method: the row key and its dash pattern, in drawing order."""


def sweep_chart(rows: Sequence[dict[str, Any]], *, k: int | None = None, title: str = "Keystroke savings and p99 latency by vocabulary size") -> str:
    """Draw a sweep's rows as an SVG document.

    Args:
        rows: sweep rows as JSON objects (``method``, ``vocab_size``, ``ksr``,
            ``oracle_ksr``, ``latency_p99_us``, optionally ``adapted_ksr``).
        k: suggestions per list, for the subtitle.
        title: the chart's title.

    Returns:
        The SVG text (an empty chart with a note when there are no rows yet).
    """
    points = [r for r in rows if r.get("vocab_size")]
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{HEIGHT}" viewBox="0 0 {WIDTH} {HEIGHT}" font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{HEIGHT}" fill="#ffffff"/>',
        f'<text x="{LEFT}" y="22" font-size="15" font-weight="bold">{escape(title)}</text>',
        f'<text x="{LEFT}" y="40" fill="#555555">{escape(_subtitle(points, k))}</text>',
    ]
    if not points:
        parts.append(f'<text x="{LEFT + PLOT_WIDTH / 2}" y="{TOP + PLOT_HEIGHT / 2}" text-anchor="middle" fill="#777777">no rows yet</text>')
    else:
        scales = _Scales.fit(points)
        parts.extend(_axes(scales, sorted({float(r["vocab_size"]) for r in points})))
        methods = list(dict.fromkeys(str(r["method"]) for r in points))
        for index, method in enumerate(methods):
            mine = sorted((r for r in points if r["method"] == method), key=lambda r: float(r["vocab_size"]))
            parts.extend(_method_marks(scales, mine, index, method))
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def _subtitle(points: Sequence[dict[str, Any]], k: int | None) -> str:
    """The line under the title: what each line style means, and k when given."""
    if any(r.get("adapted_ksr") is not None for r in points):  # the dash-dot line is drawn only then
        subtitle = "solid: keystroke savings; dash-dot: learning as it goes; dotted: oracle; dashed: p99 latency (right axis)"
    else:
        subtitle = "solid: keystroke savings; dotted: oracle (vocabulary-limited best); dashed: p99 latency (right axis)"
    if any(r.get("ksr_low") is not None for r in points):
        subtitle += "; bars: 95% interval"
    if k is not None:
        subtitle = f"k = {k}. " + subtitle
    return subtitle


@dataclass(frozen=True)
class _Scales:
    """Where values land on the plot: the vocabulary axis, the savings axis (left) and the latency axis (right)."""

    logarithmic: bool
    x_lo: float
    x_hi: float
    y_lo: float
    y_hi: float
    step: float
    lat_hi: float
    lat_step: float

    @staticmethod
    def fit(points: Sequence[dict[str, Any]]) -> _Scales:
        """Scales that hold every plotted row (rows with a vocabulary size)."""
        sizes = [float(r["vocab_size"]) for r in points]
        lo_size, hi_size = min(sizes), max(sizes)
        logarithmic = hi_size / lo_size >= 4
        if logarithmic:
            x_lo, x_hi = math.log10(lo_size) - 0.05, math.log10(hi_size) + 0.05
        else:
            pad = max(1.0, (hi_size - lo_size) * 0.05)
            x_lo, x_hi = lo_size - pad, hi_size + pad
        return _Scales(logarithmic, x_lo, x_hi, *_savings_range(points), *_latency_range(points))

    def x_of(self, size: float) -> float:
        """The x coordinate of a vocabulary size."""
        value = math.log10(size) if self.logarithmic else size
        return LEFT + (value - self.x_lo) / (self.x_hi - self.x_lo) * PLOT_WIDTH

    def y_of(self, percent: float) -> float:
        """The y coordinate of a savings percentage (left axis)."""
        return TOP + PLOT_HEIGHT - (percent - self.y_lo) / (self.y_hi - self.y_lo) * PLOT_HEIGHT

    def y_lat(self, micro: float) -> float:
        """The y coordinate of a latency in microseconds (right axis)."""
        return TOP + PLOT_HEIGHT - micro / self.lat_hi * PLOT_HEIGHT


def _savings_range(points: Sequence[dict[str, Any]]) -> tuple[float, float, float]:
    """The savings axis (lowest and highest percent, tick step): every savings value and interval end, padded by a step."""
    savings = [100 * float(r[key]) for r in points for key in ("ksr", "oracle_ksr", "adapted_ksr", "ksr_low", "ksr_high") if r.get(key) is not None]
    step = _nice_step(max(savings) - min(savings) if len(savings) > 1 else 10.0)
    y_lo = max(0.0, math.floor(min(savings) / step) * step - step)
    y_hi = min(100.0, math.ceil(max(savings) / step) * step + step)
    if y_hi <= y_lo:
        y_lo, y_hi = 0.0, 100.0
    return y_lo, y_hi, step


def _latency_range(points: Sequence[dict[str, Any]]) -> tuple[float, float]:
    """The latency axis (highest microseconds, tick step), from 0 up to a whole step above the slowest row."""
    latencies = [float(r["latency_p99_us"]) for r in points if r.get("latency_p99_us") is not None]
    lat_step = _nice_step(max(latencies) if latencies else 100.0, 4)
    lat_hi = max(lat_step, math.ceil((max(latencies) if latencies else 100.0) / lat_step) * lat_step)
    return lat_hi, lat_step


def _axes(scales: _Scales, sizes: list[float]) -> list[str]:
    """Grid lines, tick labels on all three axes, the plot frame and the axis titles."""
    parts = []
    value = scales.y_lo
    while value <= scales.y_hi + 1e-9:
        y = scales.y_of(value)
        parts.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + PLOT_WIDTH}" y2="{y:.1f}" stroke="#e5e5e5"/>')
        parts.append(f'<text x="{LEFT - 8}" y="{y + 4:.1f}" text-anchor="end">{value:g}%</text>')
        value += scales.step
    value = 0.0
    while value <= scales.lat_hi + 1e-9:
        y = scales.y_lat(value)
        parts.append(f'<text x="{LEFT + PLOT_WIDTH + 8}" y="{y + 4:.1f}" fill="#444444">{value:,.0f}</text>')
        value += scales.lat_step
    parts.append(f'<rect x="{LEFT}" y="{TOP}" width="{PLOT_WIDTH}" height="{PLOT_HEIGHT}" fill="none" stroke="#888888"/>')
    for size in sizes:
        x = scales.x_of(size)
        parts.append(f'<line x1="{x:.1f}" y1="{TOP + PLOT_HEIGHT}" x2="{x:.1f}" y2="{TOP + PLOT_HEIGHT + 5}" stroke="#888888"/>')
        parts.append(f'<text x="{x:.1f}" y="{TOP + PLOT_HEIGHT + 19}" text-anchor="middle">{vocabulary_label(size)}</text>')
    axis_note = " (log scale)" if scales.logarithmic else ""
    middle = TOP + PLOT_HEIGHT / 2
    parts.append(f'<text x="{LEFT + PLOT_WIDTH / 2}" y="{HEIGHT - 18}" text-anchor="middle">vocabulary size, words{axis_note}</text>')
    parts.append(f'<text x="18" y="{middle}" text-anchor="middle" transform="rotate(-90 18 {middle})">keystroke savings</text>')
    parts.append(f'<text x="{WIDTH - 16}" y="{middle}" text-anchor="middle" transform="rotate(90 {WIDTH - 16} {middle})">p99 suggestion latency (µs)</text>')
    return parts


def _method_marks(scales: _Scales, mine: list[dict[str, Any]], index: int, method: str) -> list[str]:
    """One method's lines with their markers, its interval bars and its legend entry."""
    colour = COLOURS[index % len(COLOURS)]
    parts = []
    for key, dash in _SERIES:
        if key == "latency_p99_us":
            line = [(scales.x_of(float(r["vocab_size"])), scales.y_lat(1.0 * float(r[key]))) for r in mine if r.get(key) is not None]
        else:
            line = [(scales.x_of(float(r["vocab_size"])), scales.y_of(100.0 * float(r[key]))) for r in mine if r.get(key) is not None]
        if line:
            parts.extend(_series(key, dash, line, colour))
    parts.extend(_interval_bars(scales, mine, colour))
    legend_y = TOP + 16 + 16 * index
    parts.append(f'<line x1="{LEFT + 12}" y1="{legend_y - 4}" x2="{LEFT + 36}" y2="{legend_y - 4}" stroke="{colour}" stroke-width="2"/>')
    parts.append(f'<text x="{LEFT + 42}" y="{legend_y}">{escape(method)}</text>')
    return parts


def _series(key: str, dash: str, line: list[tuple[float, float]], colour: str) -> list[str]:
    """One line of a method (savings, oracle, learning or latency) and its markers."""
    path = " ".join(f"{x:.1f},{y:.1f}" for x, y in line)
    width = "1.5" if key == "latency_p99_us" else "2"
    parts = [f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="{width}"{dash}/>']
    if key == "ksr":
        parts.extend(f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="{colour}"/>' for x, y in line)
    elif key == "adapted_ksr":
        parts.extend(f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="#ffffff" stroke="{colour}" stroke-width="1.5"/>' for x, y in line)
    elif key == "latency_p99_us":
        parts.extend(f'<rect x="{x - 2.5:.1f}" y="{y - 2.5:.1f}" width="5" height="5" fill="{colour}"/>' for x, y in line)
    return parts


def _interval_bars(scales: _Scales, mine: list[dict[str, Any]], colour: str) -> list[str]:
    """An error bar at each row that carries both ends of a savings interval."""
    parts = []
    for r in mine:
        if r.get("ksr_low") is not None and r.get("ksr_high") is not None:
            x = scales.x_of(float(r["vocab_size"]))
            low, high = scales.y_of(100 * float(r["ksr_low"])), scales.y_of(100 * float(r["ksr_high"]))
            parts.append(
                f'<path d="M{x - 4:.1f},{low:.1f}H{x + 4:.1f}M{x:.1f},{low:.1f}V{high:.1f}M{x - 4:.1f},{high:.1f}H{x + 4:.1f}" stroke="{colour}" stroke-width="1.5" fill="none"/>'
            )
    return parts
