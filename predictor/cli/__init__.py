"""The ``foretype`` command line: thin commands over the engine.

Each command module registers its subcommands with ``register``; a handler
takes the parsed arguments and returns an exit code.  Every
:class:`~foretype.errors.ForetypeError` becomes one line on stderr and the
error class's exit code (README lists them).

This module stays light: the parser and the engine load inside :func:`main`,
so a Ctrl-C while they load is caught like one at any later moment.
"""

from __future__ import annotations

import sys

TYPE_CHECKING = False  # kept light: see the module docstring
if TYPE_CHECKING:
    import argparse
    from collections.abc import Sequence

INTERRUPTED = 130
"""Exit code after Ctrl-C (128 + SIGINT), at any moment of any command."""


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    try:
        from .app import run  # the engine and every command load here

        return run(argv)
    except KeyboardInterrupt:
        return interrupted()


def interrupted() -> int:
    """Say that the command was interrupted (one line) and return the exit code."""
    try:
        print("foretype: interrupted", file=sys.stderr)
    except (KeyboardInterrupt, OSError, ValueError):
        pass
    return INTERRUPTED


def make_parser() -> argparse.ArgumentParser:
    """Build the argument parser with every subcommand (see :func:`foretype.cli.app.make_parser`)."""
    from .app import make_parser as make

    return make()
