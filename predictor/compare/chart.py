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


class _Scale:
    """Maps values in [lo, hi] to x positions across one panel."""

    def __init__(self, lo: float, hi: float, x0: float) -> None:
        self.lo, self.hi, self.x0 = lo, hi, x0

    def x(self, value: float) -> float:
        return self.x0 + (value - self.lo) / (self.hi - self.lo) * PANEL_W


def _axis(parts: list[str], scale: _Scale, bottom: float, label: str, *, percent: bool, signed: bool) -> None:
    for value in _ticks(scale.lo, scale.hi):
        x = scale.x(value)
        parts.append(f'<line x1="{x:.1f}" y1="{TOP - 6}" x2="{x:.1f}" y2="{bottom}" stroke="#e5e5e5"/>')
        parts.append(f'<text x="{x:.1f}" y="{bottom + 16}" text-anchor="middle">{_fmt(value, percent, signed=signed)}</text>')
    parts.append(f'<text x="{scale.x0 + PANEL_W / 2}" y="{bottom + 34}" text-anchor="middle">{escape(label)}</text>')


def _whisker(parts: list[str], scale: _Scale, y: float, interval: tuple[float, float] | None, colour: str) -> None:
    if interval is None:
        return
    low, high = scale.x(interval[0]), scale.x(interval[1])
    parts.append(f'<path d="M{low:.1f},{y:.1f}H{high:.1f}M{low:.1f},{y - 5:.1f}V{y + 5:.1f}M{high:.1f},{y - 5:.1f}V{y + 5:.1f}" stroke="{colour}" stroke-width="2" fill="none"/>')


def _padded(values: list[float], symmetric: bool) -> tuple[float, float]:
    if symmetric:
        reach = max([abs(v) for v in values] + [1e-9]) * 1.15
        return -reach, reach
    lo, hi = min(values), max(values)
    pad = (hi - lo) * 0.1 or abs(hi) * 0.05 or 0.01
    return lo - pad, hi + pad


def _header(result: ComparisonResult, heading: str, height: int) -> list[str]:
    return [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" viewBox="0 0 {WIDTH} {height}" font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{height}" fill="#ffffff"/>',
        f'<text x="12" y="22" font-size="15" font-weight="bold">{escape(heading)}</text>',
        f'<text x="12" y="40" fill="#555555">{escape(result.test_name or "test text")}: {result.sentences:,} sentences; '
        f"{escape(result.test)}, {result.resamples:,} resamples, seed {result.seed}. Simulated figures compare designs.</text>",
    ]


def compare_chart(result: ComparisonResult, *, title: str | None = None) -> str:
    """Draw a comparison as an SVG document.

    Args:
        result: the comparison.
        title: the chart's title (default: the measure and the test file).

    Returns:
        The SVG text.
    """
    spec = MEASURES[result.primary]
    found = result.measures[result.primary]
    count = len(result.systems)
    height = TOP + BOTTOM + ROW * count
    level = f"{100 * result.confidence:g}%"
    parts = _header(result, title or f"{spec.title} by system, with {level} intervals; differences from {result.systems[0].label}", height)
    spans = [v for iv in found.intervals if iv is not None for v in iv] + [v for v in found.values if v is not None]
    if not spans:
        parts.append(f'<text x="{LABEL_W}" y="{TOP + 20}" fill="#777777">no finite values</text></svg>')
        return "\n".join(parts) + "\n"
    left = _Scale(*_padded(spans, False), LABEL_W)
    # Each other system minus the first (the pairs hold first minus other, so the signs turn).
    shifts = {j: found.pairs[(0, j)] for j in range(1, count) if found.pairs[(0, j)].difference is not None}
    reach = [-v for pair in shifts.values() for v in (pair.difference or 0.0, *(pair.interval or ()))]
    right = _Scale(*_padded(reach, True), LABEL_W + PANEL_W + GAP)
    bottom = TOP + ROW * count
    _axis(parts, left, bottom, spec.title, percent=spec.percent, signed=False)
    if count > 1:
        _axis(parts, right, bottom, f"difference from {result.systems[0].label}" + (" (points)" if spec.percent else ""), percent=spec.percent, signed=True)
        zero = right.x(0.0)
        parts.append(f'<line x1="{zero:.1f}" y1="{TOP - 6}" x2="{zero:.1f}" y2="{bottom}" stroke="#888888"/>')
    for index, run in enumerate(result.systems):
        y = TOP + ROW * index + ROW / 2
        colour = COLOUR if index == 0 else OTHER
        parts.append(f'<text x="{LABEL_W - 10}" y="{y + 4:.1f}" text-anchor="end">{escape(run.label)}</text>')
        _whisker(parts, left, y, found.intervals[index], colour)
        value = found.values[index]
        if value is not None:
            parts.append(f'<circle cx="{left.x(value):.1f}" cy="{y:.1f}" r="4" fill="{colour}"/>')
        pair = shifts.get(index)
        if pair is None or pair.difference is None:
            continue
        turned = None if pair.interval is None else (-pair.interval[1], -pair.interval[0])
        _whisker(parts, right, y, turned, OTHER)
        parts.append(f'<rect x="{right.x(-pair.difference) - 3.5:.1f}" y="{y - 3.5:.1f}" width="7" height="7" fill="{OTHER}"/>')
        parts.append(f'<text x="{right.x0 + PANEL_W + 8}" y="{y + 4:.1f}" fill="#444444">p {escape(p_text(pair.p_value, result.resamples))}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
