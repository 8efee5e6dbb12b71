"""A hand-written SVG chart of a size sweep: keystroke savings against model bytes.

One line per method, pruning criterion and value encoding (and vocabulary
size, when the sweep has several), each ending at its full model; the bytes
axis is logarithmic.  A dotted line marks 95% of the best full model's savings,
so the smallest model that keeps it can be read off.  Plain SVG 1.1, no scripts.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from typing import Any
from xml.sax.saxutils import escape

from .chart import COLOURS

WIDTH, HEIGHT = 760, 460
LEFT, RIGHT, TOP, BOTTOM = 70, 230, 56, 64
_DASHES = ("", ' stroke-dasharray="7 4"', ' stroke-dasharray="2 3"', ' stroke-dasharray="8 3 2 3"')
"""One dash pattern per value encoding."""
KEEP_SHARE = 0.95
"""The reference line: this share of the best full model's savings."""


def _bytes_label(value: float) -> str:
    for unit, size in (("GB", 1e9), ("MB", 1e6), ("kB", 1e3)):
        if value >= size:
            return f"{value / size:g}{unit}"
    return f"{value:g}B"


def size_lines(rows: Sequence[dict[str, Any]]) -> dict[tuple[str, ...], list[dict[str, Any]]]:
    """Group size-sweep rows into lines: (method, criterion, encoding[, vocabulary]) -> rows by bytes, full model included."""
    vocabularies = {r["vocab_size"] for r in rows}
    lines: dict[tuple[str, ...], list[dict[str, Any]]] = {}
    for row in rows:
        if row.get("keep_bytes") is None:
            continue
        criterion = "values only" if row.get("criterion") in (None, "none") else str(row["criterion"])
        key: tuple[str, ...] = (str(row["method"]), criterion, str(row.get("value_encoding", "")))
        if len(vocabularies) > 1:
            key += (f"{int(row['vocab_size']):,} words",)
        lines.setdefault(key, []).append(row)
    for key, members in lines.items():
        if key[1] == "values only":
            continue  # a point of its own: the full model re-encoded
        ends = [
            r
            for r in rows
            if r.get("criterion") in (None, "none")
            and str(r["method"]) == key[0]
            and r["vocab_size"] == members[0]["vocab_size"]
            and (r.get("keep_bytes") is None or str(r.get("value_encoding", "")) == key[2])
        ]
        # The line ends at the full model stored with the same encoding when the sweep has one.
        same = [r for r in ends if r.get("keep_bytes") is not None]
        members.extend(same[:1] or ends[:1])
        members.sort(key=lambda r: float(r["file_bytes"]))
    return lines


def _grid(x_lo: float, x_hi: float, y_lo: float, y_hi: float, x_of: Callable[[float], float], y_of: Callable[[float], float]) -> list[str]:
    """Horizontal grid lines with percent labels, and byte ticks at 1, 2 and 5 times powers of ten."""
    plot_w = WIDTH - LEFT - RIGHT
    plot_h = HEIGHT - TOP - BOTTOM
    parts = []
    step = 5.0 if y_hi - y_lo <= 40 else 10.0
    value = y_lo
    while value <= y_hi + 1e-9:
        parts.append(f'<line x1="{LEFT}" y1="{y_of(value):.1f}" x2="{LEFT + plot_w}" y2="{y_of(value):.1f}" stroke="#e5e5e5"/>')
        parts.append(f'<text x="{LEFT - 8}" y="{y_of(value) + 4:.1f}" text-anchor="end">{value:g}%</text>')
        value += step
    for exponent in range(math.floor(x_lo), math.ceil(x_hi) + 1):
        for mantissa in (1, 2, 5):
            tick = mantissa * 10.0**exponent
            if x_lo <= math.log10(tick) <= x_hi:
                x = x_of(tick)
                parts.append(f'<line x1="{x:.1f}" y1="{TOP + plot_h}" x2="{x:.1f}" y2="{TOP + plot_h + 5}" stroke="#888888"/>')
                parts.append(f'<text x="{x:.1f}" y="{TOP + plot_h + 19}" text-anchor="middle">{_bytes_label(tick)}</text>')
    return parts


def size_chart(rows: Sequence[dict[str, Any]], *, k: int | None = None, title: str = "Keystroke savings by model size") -> str:
    """Draw the rows of a size sweep (sweep rows as JSON objects) as an SVG document."""
    plot_w = WIDTH - LEFT - RIGHT
    plot_h = HEIGHT - TOP - BOTTOM
    subtitle = "one line per method, pruning criterion and value encoding; dotted: 95% of the best full model's savings"
    if k is not None:
        subtitle = f"k = {k}. " + subtitle
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{HEIGHT}" viewBox="0 0 {WIDTH} {HEIGHT}" font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{HEIGHT}" fill="#ffffff"/>',
        f'<text x="{LEFT}" y="22" font-size="15" font-weight="bold">{escape(title)}</text>',
        f'<text x="{LEFT}" y="40" fill="#555555">{escape(subtitle)}</text>',
    ]
    lines = size_lines(rows)
    points = [r for members in lines.values() for r in members]
    if not points:
        parts.append(f'<text x="{LEFT + plot_w / 2}" y="{TOP + plot_h / 2}" text-anchor="middle" fill="#777777">no shrunk models yet</text>')
        parts.append("</svg>")
        return "\n".join(parts) + "\n"
    sizes = [float(r["file_bytes"]) for r in points]
    x_lo, x_hi = math.log10(min(sizes)) - 0.05, math.log10(max(sizes)) + 0.05
    savings = [100 * float(r["ksr"]) for r in points]
    y_lo = float(math.floor(min(savings) / 5) * 5 - 5)
    y_hi = float(math.ceil(max(savings) / 5) * 5 + 5)
    y_lo, y_hi = max(0.0, y_lo), min(100.0, y_hi)

    def x_of(size: float) -> float:
        return LEFT + (math.log10(size) - x_lo) / (x_hi - x_lo) * plot_w

    def y_of(percent: float) -> float:
        return TOP + plot_h - (percent - y_lo) / (y_hi - y_lo) * plot_h

    parts.extend(_grid(x_lo, x_hi, y_lo, y_hi, x_of, y_of))
    parts.append(f'<rect x="{LEFT}" y="{TOP}" width="{plot_w}" height="{plot_h}" fill="none" stroke="#888888"/>')
    parts.append(f'<text x="{LEFT + plot_w / 2}" y="{HEIGHT - 18}" text-anchor="middle">model file bytes (log scale)</text>')
    parts.append(f'<text x="18" y="{TOP + plot_h / 2}" text-anchor="middle" transform="rotate(-90 18 {TOP + plot_h / 2})">keystroke savings</text>')
    full = [100 * float(r["ksr"]) for r in rows if r.get("keep_bytes") is None]
    if full:
        reference = KEEP_SHARE * max(full)
        if y_lo <= reference <= y_hi:
            y = y_of(reference)
            parts.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + plot_w}" y2="{y:.1f}" stroke="#555555" stroke-dasharray="2 3"/>')
    colour_keys = list(dict.fromkeys(key[:2] + key[3:] for key in lines))
    encodings = list(dict.fromkeys(key[2] for key in lines))
    for index, (key, members) in enumerate(lines.items()):
        colour = COLOURS[colour_keys.index(key[:2] + key[3:]) % len(COLOURS)]
        dash = _DASHES[encodings.index(key[2]) % len(_DASHES)]
        path = " ".join(f"{x_of(float(r['file_bytes'])):.1f},{y_of(100 * float(r['ksr'])):.1f}" for r in members)
        parts.append(f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="2"{dash}/>')
        for r in members:
            parts.append(f'<circle cx="{x_of(float(r["file_bytes"])):.1f}" cy="{y_of(100 * float(r["ksr"])):.1f}" r="3" fill="{colour}"/>')
        legend_y = TOP + 10 + 18 * index
        legend_x = LEFT + plot_w + 14
        parts.append(f'<line x1="{legend_x}" y1="{legend_y - 4}" x2="{legend_x + 24}" y2="{legend_y - 4}" stroke="{colour}" stroke-width="2"{dash}/>')
        parts.append(f'<text x="{legend_x + 30}" y="{legend_y}">{escape(", ".join(key))}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
