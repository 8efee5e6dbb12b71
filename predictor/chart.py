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


def _size_label(size: float) -> str:
    """Round sizes in k ("1.5k", "50k"); any other size in full ("12,404")."""
    if size >= 1000 and size % 100 == 0:
        return f"{size / 1000:g}k"
    return f"{size:,.0f}"


def has_learning(rows: Sequence[dict[str, Any]]) -> bool:
    """Tell whether sweep rows (as JSON objects) measured savings with learning (``foretype sweep --adapt``)."""
    return any(r.get("adapted_ksr") is not None for r in rows)


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
    plot_w = WIDTH - LEFT - RIGHT
    plot_h = HEIGHT - TOP - BOTTOM
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{HEIGHT}" viewBox="0 0 {WIDTH} {HEIGHT}" font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{HEIGHT}" fill="#ffffff"/>',
        f'<text x="{LEFT}" y="22" font-size="15" font-weight="bold">{escape(title)}</text>',
    ]
    points = [r for r in rows if r.get("vocab_size")]
    if has_learning(points):
        subtitle = "solid: keystroke savings; dash-dot: learning as it goes; dotted: oracle; dashed: p99 latency (right axis)"
    else:
        subtitle = "solid: keystroke savings; dotted: oracle (vocabulary-limited best); dashed: p99 latency (right axis)"
    if any(r.get("ksr_low") is not None for r in points):
        subtitle += "; bars: 95% interval"
    if k is not None:
        subtitle = f"k = {k}. " + subtitle
    parts.append(f'<text x="{LEFT}" y="40" fill="#555555">{escape(subtitle)}</text>')
    if not points:
        parts.append(f'<text x="{LEFT + plot_w / 2}" y="{TOP + plot_h / 2}" text-anchor="middle" fill="#777777">no rows yet</text>')
        parts.append("</svg>")
        return "\n".join(parts) + "\n"

    sizes = [float(r["vocab_size"]) for r in points]
    lo_size, hi_size = min(sizes), max(sizes)
    logarithmic = hi_size / lo_size >= 4
    if logarithmic:
        x_lo, x_hi = math.log10(lo_size) - 0.05, math.log10(hi_size) + 0.05
    else:
        pad = max(1.0, (hi_size - lo_size) * 0.05)
        x_lo, x_hi = lo_size - pad, hi_size + pad

    def x_of(size: float) -> float:
        value = math.log10(size) if logarithmic else size
        return LEFT + (value - x_lo) / (x_hi - x_lo) * plot_w

    savings = [100 * float(r[key]) for r in points for key in ("ksr", "oracle_ksr", "adapted_ksr", "ksr_low", "ksr_high") if r.get(key) is not None]
    step = _nice_step(max(savings) - min(savings) if len(savings) > 1 else 10.0)
    y_lo = max(0.0, math.floor(min(savings) / step) * step - step)
    y_hi = min(100.0, math.ceil(max(savings) / step) * step + step)
    if y_hi <= y_lo:
        y_lo, y_hi = 0.0, 100.0
    latencies = [float(r["latency_p99_us"]) for r in points if r.get("latency_p99_us") is not None]
    lat_step = _nice_step(max(latencies) if latencies else 100.0, 4)
    lat_hi = max(lat_step, math.ceil((max(latencies) if latencies else 100.0) / lat_step) * lat_step)

    def y_of(percent: float) -> float:
        return TOP + plot_h - (percent - y_lo) / (y_hi - y_lo) * plot_h

    def y_lat(micro: float) -> float:
        return TOP + plot_h - micro / lat_hi * plot_h

    # Grid and axes.
    value = y_lo
    while value <= y_hi + 1e-9:
        y = y_of(value)
        parts.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + plot_w}" y2="{y:.1f}" stroke="#e5e5e5"/>')
        parts.append(f'<text x="{LEFT - 8}" y="{y + 4:.1f}" text-anchor="end">{value:g}%</text>')
        value += step
    value = 0.0
    while value <= lat_hi + 1e-9:
        y = y_lat(value)
        parts.append(f'<text x="{LEFT + plot_w + 8}" y="{y + 4:.1f}" fill="#444444">{value:,.0f}</text>')
        value += lat_step
    parts.append(f'<rect x="{LEFT}" y="{TOP}" width="{plot_w}" height="{plot_h}" fill="none" stroke="#888888"/>')
    for size in sorted(set(sizes)):
        x = x_of(size)
        parts.append(f'<line x1="{x:.1f}" y1="{TOP + plot_h}" x2="{x:.1f}" y2="{TOP + plot_h + 5}" stroke="#888888"/>')
        parts.append(f'<text x="{x:.1f}" y="{TOP + plot_h + 19}" text-anchor="middle">{_size_label(size)}</text>')
    axis_note = " (log scale)" if logarithmic else ""
    parts.append(f'<text x="{LEFT + plot_w / 2}" y="{HEIGHT - 18}" text-anchor="middle">vocabulary size, words{axis_note}</text>')
    parts.append(f'<text x="18" y="{TOP + plot_h / 2}" text-anchor="middle" transform="rotate(-90 18 {TOP + plot_h / 2})">keystroke savings</text>')
    parts.append(f'<text x="{WIDTH - 16}" y="{TOP + plot_h / 2}" text-anchor="middle" transform="rotate(90 {WIDTH - 16} {TOP + plot_h / 2})">p99 suggestion latency (µs)</text>')

    methods = list(dict.fromkeys(str(r["method"]) for r in points))
    for index, method in enumerate(methods):
        colour = COLOURS[index % len(COLOURS)]
        mine = sorted((r for r in points if r["method"] == method), key=lambda r: float(r["vocab_size"]))
        for key, dash, to_y, scale in (
            ("ksr", "", y_of, 100.0),
            ("oracle_ksr", ' stroke-dasharray="2 3"', y_of, 100.0),
            ("adapted_ksr", ' stroke-dasharray="8 3 2 3"', y_of, 100.0),
            ("latency_p99_us", ' stroke-dasharray="7 4"', y_lat, 1.0),
        ):
            line = [(x_of(float(r["vocab_size"])), to_y(scale * float(r[key]))) for r in mine if r.get(key) is not None]
            if not line:
                continue
            path = " ".join(f"{x:.1f},{y:.1f}" for x, y in line)
            width = "1.5" if key == "latency_p99_us" else "2"
            parts.append(f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="{width}"{dash}/>')
            for x, y in line:
                marker = f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="{colour}"/>' if key == "ksr" else ""
                if key == "adapted_ksr":
                    marker = f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="#ffffff" stroke="{colour}" stroke-width="1.5"/>'
                if key == "latency_p99_us":
                    marker = f'<rect x="{x - 2.5:.1f}" y="{y - 2.5:.1f}" width="5" height="5" fill="{colour}"/>'
                if marker:
                    parts.append(marker)
        for r in mine:
            if r.get("ksr_low") is not None and r.get("ksr_high") is not None:
                x = x_of(float(r["vocab_size"]))
                low, high = y_of(100 * float(r["ksr_low"])), y_of(100 * float(r["ksr_high"]))
                parts.append(
                    f'<path d="M{x - 4:.1f},{low:.1f}H{x + 4:.1f}M{x:.1f},{low:.1f}V{high:.1f}M{x - 4:.1f},{high:.1f}H{x + 4:.1f}" stroke="{colour}" stroke-width="1.5" fill="none"/>'
                )
        legend_y = TOP + 16 + 16 * index
        parts.append(f'<line x1="{LEFT + 12}" y1="{legend_y - 4}" x2="{LEFT + 36}" y2="{legend_y - 4}" stroke="{colour}" stroke-width="2"/>')
        parts.append(f'<text x="{LEFT + 42}" y="{legend_y}">{escape(method)}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"
