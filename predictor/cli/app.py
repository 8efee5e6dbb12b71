"""The parser with every command, and the run that turns each failure into one line and an exit code."""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence

from ..errors import ForetypeError, OptionError
from ..query.compiled import default_path, describe_path
from ..version import __version__

COMMAND_MODULES = (
    "model_commands",
    "count_commands",
    "measure_commands",
    "sweep_commands",
    "compare_commands",
    "learn_commands",
    "run_commands",
    "shrink_commands",
    "arpa_commands",
    "serve_commands",
    "study_commands",
)
"""The modules whose ``register(subparsers)`` adds commands, in help order."""

INTERNAL_ERROR = 70


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line and exit code 2, naming the sub-command's help."""

    deepest = ""
    """The program name of the innermost sub-command parsed so far (arguments it left over are reported by the top parser)."""

    def parse_known_args(self, args=None, namespace=None):  # type: ignore[no-untyped-def, override]
        _Parser.deepest = self.prog
        return super().parse_known_args(args, namespace)

    def error(self, message: str) -> None:  # type: ignore[override]
        prog = _Parser.deepest if message.startswith("unrecognized arguments") and _Parser.deepest.startswith(self.prog) else self.prog
        print(f"foretype: {message} (see '{prog} --help')", file=sys.stderr)
        raise SystemExit(OptionError.exit_code)


def make_parser() -> argparse.ArgumentParser:
    """Build the argument parser with every subcommand."""
    parser = _Parser(
        prog="foretype",
        description="Train trigram models for predictive text entry and measure what they save. With no command, opens the typing pad on the demo model.",
    )
    parser.add_argument("--version", action="version", version=f"foretype {__version__}; queries answered by {describe_path(default_path())}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in COMMAND_MODULES:
        importlib.import_module(f"{__package__}.{name}").register(commands)
    return parser


def run(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code (a Ctrl-C is left to :func:`foretype.cli.main`)."""
    arguments = list(sys.argv[1:] if argv is None else argv)
    if not arguments:
        arguments = ["pad"]
    parser = make_parser()
    try:
        args = parser.parse_args(arguments)
        if getattr(args, "handler", None) is None:
            parser.print_help()
            return 0
        return int(args.handler(args) or 0)
    except ForetypeError as error:
        print(f"foretype: {error}", file=sys.stderr)
        return error.exit_code
    except BrokenPipeError:
        _silence_stdout()
        return 0
    except Exception as error:  # noqa: BLE001 - the last line of defence: one line, never a traceback
        if os.environ.get("FORETYPE_DEBUG"):
            raise
        print(f"foretype: internal error: {type(error).__name__}: {error} (set FORETYPE_DEBUG=1 for details)", file=sys.stderr)
        return INTERNAL_ERROR


def _silence_stdout() -> None:
    # After a closed pipe, point stdout at /dev/null so interpreter shutdown does not complain.
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except OSError:
        pass
