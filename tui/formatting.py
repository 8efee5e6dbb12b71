"""How the pad writes numbers: percentages, bars, latencies, sizes."""

from __future__ import annotations

from collections.abc import Callable

BAR_EIGHTHS = " ▏▎▍▌▋▊▉█"
"""Block characters for 0/8 .. 8/8 of a cell."""

LatencyFormatter = Callable[[float], str]
"""Turns a duration in microseconds into the text shown (tests replace it to keep snapshots still)."""


def format_micros(micros: float) -> str:
    """A duration in microseconds, e.g. ``84 µs`` or ``1,204 µs``."""
    if micros < 10:
        return f"{micros:.1f} µs"
    return f"{micros:,.0f} µs"


def percent(fraction: float) -> str:
    """A probability as a percentage in at most seven characters ("26.4%", "0.877%", "0.0042%")."""
    value = fraction * 100
    if value >= 99.95 or value == 0:
        return f"{value:.0f}%"
    if value >= 10:
        return f"{value:.1f}%"
    if value >= 1:
        return f"{value:.2f}%"
    if value >= 0.1:
        return f"{value:.3f}%"
    if value >= 0.001:
        return f"{value:.2g}%" if value >= 0.01 else f"{value:.4f}%"
    return "<0.001%"


def signed_percent(fraction: float | None) -> str:
    """A keystroke saving as a percentage with one decimal ("—" when undefined)."""
    if fraction is None:
        return "—"
    return f"{fraction * 100:.1f}%"


def bar(fraction: float, width: int) -> str:
    """A horizontal bar of ``width`` cells filled to ``fraction`` (0 to 1), in eighths of a cell.

    Any positive fraction draws at least one eighth, so a small value never looks like zero.
    """
    if width <= 0:
        return ""
    fraction = min(max(fraction, 0.0), 1.0)
    eighths = round(fraction * width * 8)
    if fraction > 0 and eighths == 0:
        eighths = 1
    full, part = divmod(eighths, 8)
    text = "█" * full + (BAR_EIGHTHS[part] if part else "")
    return text.ljust(width)


def count(value: int) -> str:
    """A whole number with thousands separators."""
    return f"{value:,}"


def file_size(size: int) -> str:
    """A byte count in B, kB, MB or GB (powers of 1000)."""
    amount = float(size)
    for unit in ("B", "kB", "MB", "GB"):
        if amount < 1000 or unit == "GB":
            return f"{amount:.0f} {unit}" if unit == "B" else f"{amount:.1f} {unit}"
        amount /= 1000
    return f"{amount:.1f} GB"  # pragma: no cover - the loop returns


def clip(text: str, width: int) -> str:
    """Shorten text to ``width`` characters, marking a cut with an ellipsis."""
    if len(text) <= width:
        return text
    if width <= 1:
        return text[:width]
    return text[: width - 1] + "…"
