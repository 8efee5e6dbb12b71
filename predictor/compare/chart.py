"""A hand-written SVG chart of a comparison: each system's value with its interval, and differences from the first.

Left panel: one row per system, a dot at its value (KSR, or scan steps per
character for scanning) and a bar over its confidence interval.  Right panel:
for every other system, its difference from the first system with the
difference's interval and p-value, beside a line at zero.  Plain SVG 1.1, no
scripts.
"""

from __future__ import annotations

import math
from xml.sax.saxutils import escape

from .output import p_text
from .runner import MEASURES, ComparisonResult

WIDTH = 860
ROW = 26
TOP, BOTTOM = 70, 50
LABEL_W = 190
PANEL_W = 270
GAP = 50
COLOUR = "#1f6f8b"
OTHER = "#c2571a"


def _ticks(lo: float, hi: float, count: int = 4) -> list[float]:
    span = hi - lo if hi > lo else 1.0
    raw = span / count
    power = 10 ** math.floor(math.log10(raw))
    step = next((f * power for f in (1, 2, 2.5, 5, 10) if raw <= f * power), 10 * power)
    first = math.ceil(lo / step) * step
    out = []
    value = first
    while value <= hi + 1e-12:
        out.append(round(value, 12))
        value += step
    return out


def _fmt(value: float, percent: bool, signed: bool = False) -> str:
    if abs(value) < 1e-12:
        value = 0.0
    if percent:
        return f"{100 * value:+g}" if signed and value else f"{100 * value:g}" + ("" if signed else "%")
    return f"{value:+g}" if signed and value else f"{value:g}"


def compare_chart(result: ComparisonResult, *, title: str | None = None) -> str:
    """Draw a comparison as an SVG document.

    Args:
        result: the comparison.
        title: the chart's title (default: the measure and the test file).

    Returns:
        The SVG text.
    """
    name = result.primary
    spec = MEASURES[name]
    found = result.measures[name]
    count = len(result.systems)
    height = TOP + BOTTOM + ROW * count
    level = f"{100 * result.confidence:g}%"
    heading = title or f"{spec.title} by system, with {level} intervals; differences from {result.systems[0].label}"
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" viewBox="0 0 {WIDTH} {height}" '
        'font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{height}" fill="#ffffff"/>',
        f'<text x="12" y="22" font-size="15" font-weight="bold">{escape(heading)}</text>',
        f'<text x="12" y="40" fill="#555555">{escape(result.test_name or "test text")}: {result.sentences:,} sentences; '
        f'{escape(result.test)}, {result.resamples:,} resamples, seed {result.seed}. Simulated figures compare designs.</text>',
    ]
    spans = [v for iv in found.intervals if iv is not None for v in iv] + [v for v in found.values if v is not None]
    if not spans:
        parts.append(f'<text x="{LABEL_W}" y="{TOP + 20}" fill="#777777">no finite values</text></svg>')
        return "\n".join(parts) + "\n"
    lo, hi = min(spans), max(spans)
    pad = (hi - lo) * 0.1 or abs(hi) * 0.05 or 0.01
    lo, hi = lo - pad, hi + pad
    left_x0 = LABEL_W

    def x_left(value: float) -> float:
        return left_x0 + (value - lo) / (hi - lo) * PANEL_W

    diffs = [(j, found.pairs.get((0, j))) for j in range(1, count)]
    dvals = [v for _, p in diffs if p is not None for v in ([p.difference] if p.difference is not None else []) + (list(p.interval) if p.interval else [])]
    dmax = max([abs(v) for v in dvals] + [1e-9])
    dmax *= 1.15
    right_x0 = LABEL_W + PANEL_W + GAP

    def x_right(value: float) -> float:
        return right_x0 + (value + dmax) / (2 * dmax) * PANEL_W

    bottom = TOP + ROW * count
    for value in _ticks(lo, hi):
        x = x_left(value)
        parts.append(f'<line x1="{x:.1f}" y1="{TOP - 6}" x2="{x:.1f}" y2="{bottom}" stroke="#e5e5e5"/>')
        parts.append(f'<text x="{x:.1f}" y="{bottom + 16}" text-anchor="middle">{_fmt(value, spec.percent)}</text>')
    parts.append(f'<text x="{left_x0 + PANEL_W / 2}" y="{bottom + 34}" text-anchor="middle">{escape(spec.title)}</text>')
    if count > 1:
        for value in _ticks(-dmax, dmax):
            x = x_right(value)
            parts.append(f'<line x1="{x:.1f}" y1="{TOP - 6}" x2="{x:.1f}" y2="{bottom}" stroke="#e5e5e5"/>')
            parts.append(f'<text x="{x:.1f}" y="{bottom + 16}" text-anchor="middle">{_fmt(value, spec.percent, signed=True)}</text>')
        zero = x_right(0.0)
        parts.append(f'<line x1="{zero:.1f}" y1="{TOP - 6}" x2="{zero:.1f}" y2="{bottom}" stroke="#888888"/>')
        unit = " (points)" if spec.percent else ""
        parts.append(f'<text x="{right_x0 + PANEL_W / 2}" y="{bottom + 34}" text-anchor="middle">difference from {escape(result.systems[0].label)}{unit}</text>')
    for index, run in enumerate(result.systems):
        y = TOP + ROW * index + ROW / 2
        parts.append(f'<text x="{LABEL_W - 10}" y="{y + 4:.1f}" text-anchor="end">{escape(run.label)}</text>')
        interval = found.intervals[index]
        value = found.values[index]
        colour = COLOUR if index == 0 else OTHER
        if interval is not None:
            parts.append(f'<line x1="{x_left(interval[0]):.1f}" y1="{y:.1f}" x2="{x_left(interval[1]):.1f}" y2="{y:.1f}" stroke="{colour}" stroke-width="2"/>')
            for end in interval:
                parts.append(f'<line x1="{x_left(end):.1f}" y1="{y - 5:.1f}" x2="{x_left(end):.1f}" y2="{y + 5:.1f}" stroke="{colour}" stroke-width="2"/>')
        if value is not None:
            parts.append(f'<circle cx="{x_left(value):.1f}" cy="{y:.1f}" r="4" fill="{colour}"/>')
        if index == 0 or count == 1:
            continue
        pair = found.pairs.get((0, index))
        if pair is None or pair.difference is None:
            continue
        # The pair holds first minus this system; the chart shows this system minus the first.
        diff = -pair.difference
        if pair.interval is not None:
            a, b = -pair.interval[1], -pair.interval[0]
            parts.append(f'<line x1="{x_right(a):.1f}" y1="{y:.1f}" x2="{x_right(b):.1f}" y2="{y:.1f}" stroke="{OTHER}" stroke-width="2"/>')
            for end in (a, b):
                parts.append(f'<line x1="{x_right(end):.1f}" y1="{y - 5:.1f}" x2="{x_right(end):.1f}" y2="{y + 5:.1f}" stroke="{OTHER}" stroke-width="2"/>')
        parts.append(f'<rect x="{x_right(diff) - 3.5:.1f}" y="{y - 3.5:.1f}" width="7" height="7" fill="{OTHER}"/>')
        parts.append(f'<text x="{right_x0 + PANEL_W + 8}" y="{y + 4:.1f}" fill="#444444">p {escape(p_text(pair.p_value, result.resamples))}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
