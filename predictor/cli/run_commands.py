"""Commands that run the typist and the interface: pad (savings and sweep join here)."""

from __future__ import annotations

import argparse

from .output import open_model


def register(commands: argparse._SubParsersAction) -> None:
    """Add the run commands to the parser."""
    p = commands.add_parser("pad", help="type with a model in the terminal (the default command)", description="Open the typing pad.")
    p.add_argument("model", nargs="?", help="model file (default: the demo model)")
    p.set_defaults(handler=run_pad)


def run_pad(args: argparse.Namespace) -> int:
    """foretype pad."""
    model = open_model(args.model)
    # The interface is imported only here, so every other command runs without Textual.
    from tui.launch import run_pad as launch

    return launch(model)
