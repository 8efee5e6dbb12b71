"""Shared pieces of the command line: model arguments, JSON output, progress."""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from ..counting.corpus import read_text_file
from ..errors import CorpusError, OptionError
from ..modelfile.format import MAGIC
from ..query.model import LanguageModel, load
from ..text import WORD_RE


def add_json_option(parser: argparse.ArgumentParser) -> None:
    """Add ``--json``: print one JSON object on stdout instead of text."""
    parser.add_argument("--json", action="store_true", help="print one JSON object on stdout")


def print_json(payload: dict[str, Any]) -> None:
    """Print one JSON object on stdout."""
    print(json.dumps(payload, ensure_ascii=False, allow_nan=False, default=_jsonable))


def _jsonable(value: Any) -> Any:
    if hasattr(value, "item"):
        return value.item()
    raise TypeError(f"not JSON serialisable: {type(value).__name__}")


def is_model_file(path: str) -> bool:
    """Tell whether a path names a file that starts like a model file."""
    try:
        with open(path, "rb") as handle:
            return handle.read(len(MAGIC)) == MAGIC
    except OSError:
        return False


def split_model_argument(values: list[str], rest: int, command: str) -> tuple[str | None, list[str]]:
    """Split positional arguments into an optional model path and the ``rest`` that follow it.

    With ``rest + 1`` values the first is the model; with ``rest`` values the
    demo model is meant.

    Raises:
        OptionError: any other number of values.
    """
    if len(values) == rest + 1:
        return values[0], values[1:]
    if len(values) == rest:
        return None, values
    raise OptionError(f"{command} takes {'[MODEL] ' + ' '.join(['ARG'] * rest) if rest else '[MODEL]'}; got {len(values)} arguments")


def open_model(path: str | None, *, quiet: bool = False) -> LanguageModel:
    """Load a model file, or the demo model when no path is given (building it on first use)."""
    if path is not None:
        return load(path)
    from ..demo import demo_model, demo_model_path

    if demo_model_path().exists() or quiet:
        return demo_model()
    with progress_bar("building the demo model (first use only)") as update:
        return demo_model(progress=update)


@contextmanager
def progress_bar(label: str) -> Iterator[Callable[[int, int], None]]:
    """A progress bar on stderr (only when stderr is a terminal); yields an update(done, total)."""
    if not sys.stderr.isatty():
        yield lambda done, total: None
        return
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TaskProgressColumn, TextColumn, TimeRemainingColumn

    with Progress(
        TextColumn("{task.description}"),
        BarColumn(),
        TaskProgressColumn(),
        TimeRemainingColumn(),
        console=Console(stderr=True),
        transient=True,
    ) as progress:
        task = progress.add_task(label, total=None)

        def update(done: int, total: int) -> None:
            progress.update(task, completed=done, total=total or None)

        yield update


def positive_int(text: str) -> int:
    """argparse type: an integer of at least 1."""
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1, got {value}")
    return value


def add_force_option(parser: argparse.ArgumentParser, what: str) -> None:
    """Add ``--force``: replace an existing file at an output path even when it is not of the kind written."""
    parser.add_argument("--force", action="store_true", help=f"replace {what} even when the path holds a file of another kind")


LEARNED_FILE_STARTS = (b"foretype-learned", b"SQLite format 3\x00")
"""How a learned file starts (the line-based store, or an SQLite database)."""


def is_learned_file(path: Path) -> bool:
    """Tell whether a file looks like a learned file (so ``--save-user`` may replace it)."""
    try:
        with open(path, "rb") as handle:
            start = handle.read(32)
    except OSError:
        return False
    return start.startswith(LEARNED_FILE_STARTS)


def is_learned_export(path: Path) -> bool:
    """Tell whether a file is a learned export (JSON with ``"format": "foretype-learned-export"``)."""
    try:
        with open(path, "rb") as handle:
            payload = json.loads(handle.read())
    except (OSError, ValueError):
        return False
    return isinstance(payload, dict) and payload.get("format") == "foretype-learned-export"


def add_text_options(parser: argparse.ArgumentParser) -> None:
    """Add ``--replace-bad-bytes`` and ``--wrapped/--no-wrapped`` to a command that reads text for a model."""
    parser.add_argument("--replace-bad-bytes", action="store_true", help="replace invalid UTF-8 instead of failing")
    parser.add_argument(
        "--wrapped",
        action=argparse.BooleanOptionalAction,
        default=None,
        help="hard-wrapped prose: single line breaks are spaces (default: the rule the model was built with)",
    )


def read_words(path: str, *, replace_bad_bytes: bool = False) -> str:
    """Read a text to score or type (``-``: standard input), failing with its name when it holds no words.

    Raises:
        CorpusError: missing, binary or without words (exit 3); EncodingError: invalid UTF-8.
    """
    text = read_text_file(path, replace_bad_bytes=replace_bad_bytes)
    if not WORD_RE.search(text):
        raise CorpusError(f"{'standard input' if path == '-' else path}: holds no words")
    return text


def sentence_rule(wrapped: bool | None, model: LanguageModel) -> bool:
    """The sentence rule to read text with: the explicit option, else the one the model was built with."""
    return bool(model.meta.get("wrapped", False)) if wrapped is None else wrapped


def describe_rule(wrapped: bool) -> str:
    """The sentence rule in words, for reports."""
    return "wrapped (single line breaks are spaces; blank lines end sentences)" if wrapped else "lines (each line break ends a sentence)"
