"""The scanning typist's options, shared by savings, sweep and compare."""

from __future__ import annotations

import argparse

from ..counting.corpus import read_text_file
from ..query.model import LanguageModel
from ..simulate.scanning import LIST_POSITIONS, ScanningSettings, format_scanning_report, parse_layout, simulate_scanning
from ..simulate.typist import TypistSettings
from .output import model_name, print_demo_note, print_json, progress_bar
from .typist_options import parse_finite

ACCESS_CHOICES = ("keys", "scanning")
"""``--access`` values: keystrokes (default) or single-switch row-column scanning."""


def _seconds(text: str) -> float:
    return parse_finite(text, "a number of seconds")


def add_access_options(p: argparse.ArgumentParser) -> None:
    """Add ``--access`` and the scanning options."""
    p.add_argument("--access", choices=ACCESS_CHOICES, default="keys", help="keys: a typist pressing keys (default); scanning: single-switch row-column scanning")
    p.add_argument("--layout", metavar="FILE", help="scanning: the letter grid, one row per line (default: a grid ordered by the model's letter frequencies)")
    p.add_argument("--list-position", choices=LIST_POSITIONS, default="last", help="scanning: the suggestion row is scanned first or after the letters (default last)")
    p.add_argument("--scan-interval", type=_seconds, default=1.0, metavar="S", help="scanning: seconds each highlight lasts (default 1.0)")
    p.add_argument("--press-dwell", type=_seconds, default=0.0, metavar="S", help="scanning: extra seconds after each switch press (default 0)")


def scanning_settings(args: argparse.Namespace) -> ScanningSettings | None:
    """The scanning settings the options ask for, or None for the keystroke typist.

    Raises:
        OptionError: a bad layout file or value.
        CorpusError: the layout file is missing or unreadable.
    """
    if getattr(args, "access", "keys") != "scanning":
        return None
    grid = parse_layout(read_text_file(args.layout), args.layout) if args.layout else None
    return ScanningSettings(grid=grid, list_position=args.list_position, scan_interval=args.scan_interval, press_dwell=args.press_dwell)


def run_scanning_savings(args: argparse.Namespace, model: LanguageModel, text: str, settings: TypistSettings, scanning: ScanningSettings) -> int:
    """foretype savings --access scanning: the scanning report with and without prediction."""
    with progress_bar("scanning the test text") as update:
        report = simulate_scanning(model, text, settings, scanning, update)
    if args.json:
        print_json({"model": model_name(args.model), **report.to_json()})
    else:
        print_demo_note(args.model)
        print(format_scanning_report(report))
    return 0
