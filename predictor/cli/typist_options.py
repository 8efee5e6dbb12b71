"""The simulated typist's options, shared by savings, sweep and compare, and the number types they parse."""

from __future__ import annotations

import argparse

from ..simulate import TEXT_MODES, TypistSettings
from .output import add_text_options, positive_int


def parse_finite(text: str, noun: str = "a number") -> float:
    """A finite number from an option's text, or argparse's error naming what was expected."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected {noun}, got {text!r}") from None
    if value != value or value in (float("inf"), float("-inf")):
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return value


def finite_number(text: str) -> float:
    """argparse type: a finite number (range checks happen in TypistSettings, with one clear line)."""
    return parse_finite(text)


def whole_number(text: str) -> int:
    """argparse type: a whole number (range checks happen where it is used)."""
    try:
        return int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None


def add_typist_options(p: argparse.ArgumentParser, *, several: bool = False) -> None:
    """Add the typist's options: ``-k``, ``--text-mode``, ``--select-cost``, ``--autospace/--no-autospace``, ``--min-prefix`` and how text is read.

    Args:
        several: ``-k`` and ``--select-cost`` take comma-separated lists (compare).
    """
    if several:
        p.add_argument("-k", type=_whole_list, default=[5], metavar="K[,K...]", help="suggestions per list; several values compare list sizes (default 5)")
        p.add_argument("--select-cost", type=_number_list, default=[1.0], metavar="KEYS[,KEYS...]", help="keystrokes one pick costs; several values are compared (default 1)")
    else:
        p.add_argument("-k", type=positive_int, default=5, help="suggestions shown at each step (default 5)")
        p.add_argument("--select-cost", type=finite_number, default=1.0, metavar="KEYS", help="keystrokes one pick costs (default 1)")
    p.add_argument("--text-mode", choices=TEXT_MODES, default="full", help="full: the text as written (default); words: lower-cased words and single spaces")
    p.add_argument(
        "--autospace", action=argparse.BooleanOptionalAction, default=True, help="a pick writes the space after the word (default: on; --no-autospace: the typist types it)"
    )
    p.add_argument("--min-prefix", type=whole_number, default=0, metavar="N", help="letters typed before the typist looks at suggestions (default 0)")
    add_skip_passed_option(p)
    add_text_options(p)


def add_skip_passed_option(p: argparse.ArgumentParser) -> None:
    """Add ``--skip-passed/--no-skip-passed`` (default on), shared by the typist's commands and the pad."""
    p.add_argument(
        "--skip-passed",
        action=argparse.BooleanOptionalAction,
        default=True,
        help="within a word, leave out words already shown and passed over (default: on; --no-skip-passed shows them again)",
    )


def typist_settings(args: argparse.Namespace) -> TypistSettings:
    """The typist's settings the options ask for (the sentence rule as given; None counts as lines here)."""
    return TypistSettings(
        k=args.k,
        text_mode=args.text_mode,
        select_cost=args.select_cost,
        autospace=args.autospace,
        min_prefix=args.min_prefix,
        skip_passed=args.skip_passed,
        key_seconds=getattr(args, "key_seconds", 1.0),
        scan_seconds=getattr(args, "scan_seconds", 0.5),
        wrapped=bool(args.wrapped),
    )


def _whole_list(text: str) -> list[int]:
    """argparse type: whole numbers separated by commas."""
    try:
        values = [int(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected whole numbers separated by commas, got {text!r}") from None
    if not values:
        raise argparse.ArgumentTypeError("the list is empty")
    return values


def _number_list(text: str) -> list[float]:
    """argparse type: numbers separated by commas."""
    try:
        values = [float(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected numbers separated by commas, got {text!r}") from None
    if not values:
        raise argparse.ArgumentTypeError("the list is empty")
    return values
