"""Shared pieces of the command line: model arguments, JSON output, progress."""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Callable, Iterator
from contextlib import AbstractContextManager, contextmanager
from pathlib import Path
from typing import Any, TextIO

from ..counting.corpus import read_text_file
from ..errors import CorpusError
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


DEMO_MODEL = "demo"
"""How JSON output names the bundled demo model when it answered (no ``-m`` given)."""


def add_model_option(parser: argparse.ArgumentParser, what: str = "the model file") -> None:
    """Add ``-m/--model MODEL``: the one way every command names the model it reads (none: the demo model)."""
    parser.add_argument("-m", "--model", metavar="MODEL", default=None, help=f"{what} (default: the bundled demo model)")


def model_name(path: str | None) -> str:
    """The model that answered, as JSON output names it: its path, or ``"demo"``."""
    return DEMO_MODEL if path is None else str(path)


def demo_note(path: str | None) -> str | None:
    """The line text output adds when the bundled demo model answered (None for a model of one's own)."""
    return None if path is not None else "model: the bundled demo model (give -m MODEL to use your own)"


def print_demo_note(path: str | None, stream: TextIO | None = None) -> None:
    """Print :func:`demo_note`'s line when the demo model answered."""
    note = demo_note(path)
    if note is not None:
        print(note, file=stream if stream is not None else sys.stdout)


def probability(value: float) -> str:
    """A probability for text output with four significant digits (``0.0003125``, never ``0.000000``)."""
    return f"{value:.4g}"


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


class StageBars:
    """A progress bar per stage of a long job, reusing :func:`progress_bar` (a new bar when the label changes).

    Call it with (label, done, total); :meth:`close` ends the last bar.
    """

    def __init__(self) -> None:
        self._label: str | None = None
        self._bar: AbstractContextManager[Callable[[int, int], None]] | None = None
        self._update: Callable[[int, int], None] | None = None

    def __call__(self, label: str, done: int, total: int) -> None:
        if label != self._label:
            self.close()
            self._bar = progress_bar(label)
            self._update = self._bar.__enter__()
            self._label = label
        assert self._update is not None
        self._update(done, total)

    def close(self) -> None:
        """End the current bar, if any."""
        if self._bar is not None:
            self._bar.__exit__(None, None, None)
        self._bar = self._update = self._label = None


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


def starts_with(*starts: bytes) -> Callable[[Path], bool]:
    """A kind check for the output policy: an existing file may be replaced when it begins with one of ``starts``."""

    def check(path: Path) -> bool:
        try:
            with open(path, "rb") as handle:
                head = handle.read(256).lstrip()
        except OSError:
            return False
        return head.startswith(starts)

    return check


SVG_CHART = starts_with(b"<svg", b"<?xml")
"""An SVG file: the kind a ``--chart`` option writes (and may replace)."""


def add_test_option(parser: argparse.ArgumentParser, what: str = "the held-out text to type and score") -> None:
    """Add ``-t/--test TEXTFILE``: the held-out text, given the same way to every command that measures a model on one."""
    parser.add_argument("-t", "--test", required=True, metavar="TEXTFILE", help=f"{what} ('-': standard input)")


def add_corpus_options(parser: argparse.ArgumentParser) -> None:
    """Add how a corpus is read: ``--wrapped/--no-wrapped``, ``--replace-bad-bytes``, ``--reject-binary/--no-reject-binary``."""
    parser.add_argument(
        "--wrapped",
        action=argparse.BooleanOptionalAction,
        default=False,
        help="hard-wrapped prose: single line breaks are spaces, blank lines end sentences (default: each line break ends a sentence)",
    )
    parser.add_argument("--replace-bad-bytes", action="store_true", help="replace invalid UTF-8 instead of failing")
    parser.add_argument(
        "--reject-binary", action=argparse.BooleanOptionalAction, default=False, help="fail on binary files inside folders instead of skipping them (default: skip them)"
    )


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
