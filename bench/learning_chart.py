"""SVG charts of the learning benchmark: KSR per block for the base model and the old and new defaults.

Run from the repository root after bench/bench_learning.py::

    .venv/bin/python bench/learning_chart.py bench/out/learning-out.json docs

writes docs/learning-<model>-<text>.svg for each pairing in the JSON: two
panels (typo-free text, typo-injected text), one line per design.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import Any
from xml.sax.saxutils import escape

SERIES = (
    ("base", "no learning", "#888888", "4 3"),
    ("old", "first default (2 uses)", "#d62728", ""),
    ("previous", "previous default (online share)", "#ff7f0e", "6 2"),
    ("new", "new default (sharpened share)", "#1f77b4", ""),
)
PANEL_W, PANEL_H, LEFT, TOP, GAP = 340, 220, 50, 40, 40


def _panel(x0: float, title: str, curves: dict[str, list[float]], lo: float, hi: float) -> list[str]:
    parts = [f'<text x="{x0 + PANEL_W / 2}" y="{TOP - 10}" text-anchor="middle" font-size="13">{escape(title)}</text>']
    parts.append(f'<rect x="{x0}" y="{TOP}" width="{PANEL_W}" height="{PANEL_H}" fill="none" stroke="#333"/>')
    blocks = max(len(c) for c in curves.values())

    def x_of(i: int) -> float:
        return x0 + (PANEL_W * (i + 0.5) / blocks)

    def y_of(v: float) -> float:
        return TOP + PANEL_H * (1 - (v - lo) / (hi - lo))

    tick = lo
    while tick <= hi + 1e-9:
        y = y_of(tick)
        parts.append(f'<line x1="{x0}" y1="{y:.1f}" x2="{x0 + PANEL_W}" y2="{y:.1f}" stroke="#ddd"/>')
        parts.append(f'<text x="{x0 - 4}" y="{y + 4:.1f}" text-anchor="end" font-size="10">{100 * tick:.0f}%</text>')
        tick += 0.05
    for i in range(blocks):
        parts.append(f'<text x="{x_of(i):.1f}" y="{TOP + PANEL_H + 14}" text-anchor="middle" font-size="10">{i + 1}</text>')
    for key, _, colour, dash in SERIES:
        values = curves.get(key)
        if not values:
            continue
        points = " ".join(f"{x_of(i):.1f},{y_of(v):.1f}" for i, v in enumerate(values))
        parts.append(f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>')
    return parts


def learning_chart(pair: str, row: dict[str, Any], new: str = "default", block_words: int = 500) -> str:
    """The SVG of one pairing: KSR per block on typo-free and typo-injected text."""
    panels = {}
    for variant in ("clean", "typos"):
        figures = row[variant]
        panels[variant] = {key: figures[name]["curve"] for key, name in (("base", "base"), ("old", "old"), ("previous", "previous"), ("new", new)) if name in figures}
    values = [v for p in panels.values() for c in p.values() for v in c]
    lo = max(0.0, (int(min(values) * 20) / 20))
    hi = (int(max(values) * 20) + 1) / 20
    width = LEFT + 2 * PANEL_W + GAP + 20
    height = TOP + PANEL_H + 90
    model, text = pair.split(">")
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" font-family="sans-serif">',
        f'<rect width="{width}" height="{height}" fill="white"/>',
        f'<text x="{width / 2}" y="14" text-anchor="middle" font-size="14">KSR per block of {block_words} words: {escape(model)} model typing {escape(text)} text (words mode, k = 5)</text>',
    ]
    parts += _panel(LEFT, "typo-free text", panels["clean"], lo, hi)
    parts += _panel(LEFT + PANEL_W + GAP, "1 word in 40 with a typo", panels["typos"], lo, hi)
    parts.append(f'<text x="{LEFT + PANEL_W + GAP / 2}" y="{TOP + PANEL_H + 30}" text-anchor="middle" font-size="11">block</text>')
    for i, (_, label, colour, dash) in enumerate(SERIES):
        x = LEFT + (i % 2) * 300
        y = height - 34 + (i // 2) * 20
        parts.append(f'<line x1="{x}" y1="{y}" x2="{x + 24}" y2="{y}" stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>')
        parts.append(f'<text x="{x + 30}" y="{y + 4}" font-size="11">{escape(label)}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def main() -> int:
    source, folder = Path(sys.argv[1]), Path(sys.argv[2])
    results = json.loads(source.read_text(encoding="utf-8"))
    for pair, row in results["pairs"].items():
        target = folder / f"learning-{pair.replace('>', '-')}.svg"
        target.write_text(learning_chart(pair, row), encoding="utf-8")
        print(target)
    return 0


if __name__ == "__main__":
    sys.exit(main())
