"""A hand-written SVG chart of a copy task: entry rate per phrase, one line per session.

Drawn in the style of :mod:`predictor.chart` (same canvas, margins, colours
and fonts): words per minute against the phrase number, a dotted line at each
session's mean, and a hollow marker on the axis for a phrase cut short.  When
the report carries the simulated typist's savings, a second panel below shows
the measured keystroke savings (solid) beside the simulated ones (dashed).
Plain SVG 1.1, no scripts.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from xml.sax.saxutils import escape

from ..chart import COLOURS, LEFT, RIGHT, WIDTH, _nice_step
from .report import SessionReport

TOP = 56
PANEL = 250
GAP = 70
BOTTOM = 56


def _ticks(lo: float, hi: float, count: int = 5) -> tuple[float, float, float]:
    step = _nice_step(hi - lo if hi > lo else 10.0, count)
    return math.floor(lo / step) * step, max(step, math.ceil(hi / step) * step), step


def entry_rate_chart(reports: Sequence[SessionReport], title: str = "Entry rate per phrase") -> str:
    """Draw the sessions' entry rates per phrase as an SVG document.

    Args:
        reports: one or more session reports.
        title: the chart's title.

    Returns:
        The SVG text (a note instead of lines when no phrase has a rate).
    """
    simulated = any(r.simulated is not None for r in reports)
    height = TOP + PANEL + BOTTOM + ((GAP + PANEL) if simulated else 0)
    plot_w = WIDTH - LEFT - RIGHT
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}" viewBox="0 0 {WIDTH} {height}" font-family="Helvetica, Arial, sans-serif" font-size="12">',
        f'<rect width="{WIDTH}" height="{height}" fill="#ffffff"/>',
        f'<text x="{LEFT}" y="22" font-size="15" font-weight="bold">{escape(title)}</text>',
        f'<text x="{LEFT}" y="40" fill="#555555">{escape("solid: words per minute, (|T| − 1) / S × 60 / 5; dotted: the session mean; ○ on the axis: cut short")}</text>',
    ]
    count = max((len(r.phrases) for r in reports), default=0)
    rates = [m.wpm for r in reports for m in r.phrases if m.wpm is not None]
    if not rates:
        parts.append(f'<text x="{LEFT + plot_w / 2}" y="{TOP + PANEL / 2}" text-anchor="middle" fill="#777777">no phrase with an entry rate yet</text>')
        parts.append("</svg>")
        return "\n".join(parts) + "\n"
    axis = _Axis(count, plot_w)
    lo, hi, step = _ticks(0.0, max(rates) * 1.1)
    parts += axis.frame(TOP, lo, hi, step, "", "words per minute")
    for number, report in enumerate(reports):
        parts += _rate_lines(report, number, axis, lambda value: TOP + PANEL - (value - lo) / (hi - lo) * PANEL)
    if simulated:
        parts += _savings_panel(reports, axis, TOP + PANEL + GAP)
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


class _Axis:
    """The phrase axis shared by both panels."""

    def __init__(self, count: int, plot_w: float) -> None:
        self.count = count
        self.plot_w = plot_w

    def x(self, index: int) -> float:
        return LEFT + (index + 0.5) / self.count * self.plot_w

    def frame(self, top: float, lo: float, hi: float, step: float, unit: str, label: str) -> list[str]:
        """Grid, value labels, the phrase ticks and the axis titles of one panel."""
        parts = []
        value = lo
        while value <= hi + 1e-9:
            y = top + PANEL - (value - lo) / (hi - lo) * PANEL
            parts.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + self.plot_w}" y2="{y:.1f}" stroke="#e5e5e5"/>')
            parts.append(f'<text x="{LEFT - 8}" y="{y + 4:.1f}" text-anchor="end">{value:g}{unit}</text>')
            value += step
        parts.append(f'<rect x="{LEFT}" y="{top}" width="{self.plot_w}" height="{PANEL}" fill="none" stroke="#888888"/>')
        every = max(1, math.ceil(self.count / 20))
        for index in range(self.count):
            x = self.x(index)
            parts.append(f'<line x1="{x:.1f}" y1="{top + PANEL}" x2="{x:.1f}" y2="{top + PANEL + 5}" stroke="#888888"/>')
            if index % every == 0:
                parts.append(f'<text x="{x:.1f}" y="{top + PANEL + 19}" text-anchor="middle">{index + 1}</text>')
        parts.append(f'<text x="18" y="{top + PANEL / 2}" text-anchor="middle" transform="rotate(-90 18 {top + PANEL / 2})">{escape(label)}</text>')
        parts.append(f'<text x="{LEFT + self.plot_w / 2}" y="{top + PANEL + 38}" text-anchor="middle">phrase</text>')
        return parts


def _points(pairs: list[tuple[float, float]], colour: str, *, dashed: bool = False) -> list[str]:
    if not pairs:
        return []
    path = " ".join(f"{x:.1f},{y:.1f}" for x, y in pairs)
    if dashed:
        marks = [f'<rect x="{x - 2.5:.1f}" y="{y - 2.5:.1f}" width="5" height="5" fill="{colour}"/>' for x, y in pairs]
        return [f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="1.5" stroke-dasharray="7 4"/>', *marks]
    marks = [f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="{colour}"/>' for x, y in pairs]
    return [f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="2"/>', *marks]


def _rate_lines(report: SessionReport, number: int, axis: _Axis, y_rate: Callable[[float], float]) -> list[str]:
    """One session's entry-rate line, its mean, hollow markers for phrases cut short, and its legend entry."""
    colour = COLOURS[number % len(COLOURS)]
    parts = _points([(axis.x(i), y_rate(m.wpm)) for i, m in enumerate(report.phrases) if m.wpm is not None and m.complete], colour)
    parts += [
        f'<circle cx="{axis.x(i):.1f}" cy="{TOP + PANEL:.1f}" r="4" fill="#ffffff" stroke="{colour}" stroke-width="1.5"/>' for i, m in enumerate(report.phrases) if not m.complete
    ]
    if report.session.wpm is not None:
        y = y_rate(report.session.wpm)
        parts.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + axis.plot_w}" y2="{y:.1f}" stroke="{colour}" stroke-width="1" stroke-dasharray="2 3"/>')
    legend_y = TOP + 16 + 16 * number
    name = str(report.log.header.get("session") or report.log.path.name)
    mean = "" if report.session.wpm is None else f" (mean {report.session.wpm:.1f} WPM)"
    parts.append(f'<line x1="{LEFT + 12}" y1="{legend_y - 4}" x2="{LEFT + 36}" y2="{legend_y - 4}" stroke="{colour}" stroke-width="2"/>')
    parts.append(f'<text x="{LEFT + 42}" y="{legend_y}">{escape(name + mean)}</text>')
    return parts


def _savings_panel(reports: Sequence[SessionReport], axis: _Axis, top: float) -> list[str]:
    """The second panel: measured keystroke savings per phrase (solid) beside the simulated typist's (dashed)."""
    savings = [100 * m.ksr for r in reports for m in r.phrases if m.ksr is not None and m.complete]
    savings += [100 * s.ksr for r in reports for s in (r.simulated or [])]
    lo, hi, step = _ticks(min(0.0, min(savings)), max(savings) * 1.1 if max(savings) > 0 else 10.0)
    parts = [f'<text x="{LEFT}" y="{top - 14}" fill="#555555">keystroke savings per phrase: solid, measured; dashed, the simulated typist of foretype savings</text>']
    parts += axis.frame(top, lo, hi, step, "%", "keystroke savings")

    def y_of(value: float) -> float:
        return top + PANEL - (100 * value - lo) / (hi - lo) * PANEL

    for number, report in enumerate(reports):
        colour = COLOURS[number % len(COLOURS)]
        parts += _points([(axis.x(i), y_of(m.ksr)) for i, m in enumerate(report.phrases) if m.ksr is not None and m.complete], colour)
        if report.simulated is not None:
            parts += _points([(axis.x(i), y_of(s.ksr)) for i, s in enumerate(report.simulated)], colour, dashed=True)
    return parts
