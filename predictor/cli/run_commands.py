"""Commands that run the typist and the interface: pad (savings and sweep join here)."""

from __future__ import annotations

import argparse
import sys

from ..errors import OptionError
from .output import add_model_option, open_model, positive_int
from .typist_options import add_skip_passed_option


def register(commands: argparse._SubParsersAction) -> None:
    """Add the run commands to the parser."""
    p = commands.add_parser(
        "pad",
        help="type with a model in the terminal (the default command)",
        description="Open the typing pad: type with a model, see its ranked suggestions for the "
        "context and the letters typed, take them with Tab or alt+1..9, and watch the keystrokes saved. "
        "F1 inside lists every key. The pad learns the words you finish into MODEL.learned beside the model "
        "(on this machine only; F6 switches learning on and off, F7 lists what was learned). "
        "Example: foretype pad -m chat.model -k 7",
    )
    add_model_option(p)
    p.add_argument("-k", type=positive_int, default=5, help="suggestions shown at each position, 1 to 9 (default 5)")
    learn = p.add_mutually_exclusive_group()
    learn.add_argument("--learn", dest="learning", action="store_const", const=True, help="switch learning on before the pad opens (kept in MODEL.learned, like F6)")
    learn.add_argument("--no-learn", dest="learning", action="store_const", const=False, help="switch learning off before the pad opens (kept in MODEL.learned, like F6)")
    add_skip_passed_option(p)
    p.set_defaults(handler=run_pad, learning=None)


def run_pad(args: argparse.Namespace) -> int:
    """foretype pad."""
    if args.k > 9:
        raise OptionError(f"-k must be 1 to 9 (one chord per rank, alt+1 to alt+9), not {args.k}")
    model = open_model(args.model)
    if not stdout_is_terminal():
        raise OptionError("the pad needs a terminal: standard output is not one (in a pipe, use suggest, score or savings)")
    # The interface is imported only here, so every other command runs without Textual.
    from ..tui.launch import run_pad as launch  # type: ignore[import-not-found]  # installed as foretype.tui

    return launch(model, k=args.k, learning=getattr(args, "learning", None), skip_passed=args.skip_passed)


def stdout_is_terminal() -> bool:
    """Tell whether standard output is a terminal (the pad draws there)."""
    try:
        return sys.stdout.isatty()
    except (AttributeError, ValueError):
        return False
