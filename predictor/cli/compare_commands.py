"""foretype compare: models and typist settings side by side on one text, with intervals and paired tests."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..compare import ComparedSystem, compare_chart, comparison_csv, comparison_json, format_comparison, label_systems, run_comparison, sentences_csv
from ..compare.runner import TESTS
from ..errors import OptionError
from ..simulate import TEXT_MODES, TypistSettings
from ..simulate.writing import check_writable_file, write_text_atomic
from .access_options import add_access_options, scanning_settings
from .measure_commands import _Stages
from .output import add_json_option, open_model, print_json, read_words


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


def _whole(text: str) -> int:
    try:
        return int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None


def _fraction(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None


def register(commands: argparse._SubParsersAction) -> None:
    """Add ``compare`` to the parser."""
    p = commands.add_parser(
        "compare",
        help="compare models or typist settings on one text: intervals and paired significance tests",
        description="Simulate the same typist with each model (and each -k or --select-cost value) on TESTFILE, keep "
        "per-sentence totals, and report each system's keystroke savings and perplexity with confidence intervals, and "
        "for each pair the difference with its interval and p-value, by the paired bootstrap over sentences (Koehn 2004) "
        "or approximate randomisation (Riezler & Maxwell 2005). Simulated figures compare designs; they are no clinical "
        "assessment. Example: foretype compare heldout.txt -m kn.model -m katz.model --chart compare.svg",
    )
    p.add_argument("test", metavar="TESTFILE", help="the text to type")
    p.add_argument("-m", "--model", action="append", default=[], metavar="MODEL", help="a model file; repeat for each model (default: the demo model)")
    p.add_argument("-k", type=_whole_list, default=[5], metavar="K[,K...]", help="suggestions per list; several values compare list sizes (default 5)")
    p.add_argument("--select-cost", type=_number_list, default=[1.0], metavar="KEYS[,KEYS...]", help="keystrokes one pick costs; several values are compared (default 1)")
    p.add_argument("--text-mode", choices=TEXT_MODES, default="full", help="full: the text as written (default); words: lower-cased words and single spaces")
    p.add_argument("--no-autospace", dest="autospace", action="store_false", help="a pick does not write the space after the word")
    p.add_argument("--min-prefix", type=_whole, default=0, metavar="N", help="letters typed before the typist looks at suggestions (default 0)")
    p.add_argument("--wrapped", action="store_true", help="hard-wrapped prose: single line breaks are spaces")
    p.add_argument("--replace-bad-bytes", action="store_true", help="replace invalid UTF-8 in the test text instead of failing")
    add_access_options(p)
    p.add_argument("--resamples", type=_whole, default=1000, metavar="N", help="bootstrap resamples, and shuffles for --test randomisation (default 1000)")
    p.add_argument("--seed", type=_whole, default=0, metavar="N", help="seed of the resampling (default 0; the same seed gives the same results)")
    p.add_argument("--test", dest="test_kind", choices=TESTS, default="bootstrap", help="how pair p-values are found (default bootstrap)")
    p.add_argument("--confidence", type=_fraction, default=0.95, metavar="C", help="coverage of the intervals (default 0.95)")
    p.add_argument("--csv", metavar="FILE", help="write the summary as CSV: one row per system and measure, one per pair and measure")
    p.add_argument("--sentences", metavar="FILE", help="write the per-sentence totals as CSV (for other statistics tools)")
    p.add_argument("--chart", metavar="FILE", help="write an SVG chart: each system with its interval, differences from the first")
    add_json_option(p)
    p.set_defaults(handler=run_compare)


def run_compare(args: argparse.Namespace) -> int:
    """foretype compare."""
    for path in (args.csv, args.sentences, args.chart):
        if path:
            check_writable_file(path)
    if args.resamples < 1:
        raise OptionError(f"--resamples must be at least 1, not {args.resamples}")
    if not 0 < args.confidence < 1:
        raise OptionError(f"--confidence must lie between 0 and 1, not {args.confidence}")
    scanning = scanning_settings(args)
    paths: list[str | None] = list(args.model) or [None]
    plans = label_systems(paths, args.k, args.select_cost)
    # Check every setting before any model loads or any typing starts.
    settings = {
        (k, cost): TypistSettings(k=k, text_mode=args.text_mode, select_cost=cost, autospace=args.autospace, min_prefix=args.min_prefix, wrapped=args.wrapped)
        for _, _, k, cost in plans
    }
    text = read_words(args.test, replace_bad_bytes=getattr(args, "replace_bad_bytes", False))
    models = [open_model(path) for path in paths]
    systems = [ComparedSystem(label, models[index], settings[(k, cost)], scanning, "" if paths[index] is None else str(paths[index])) for label, index, k, cost in plans]
    stages = _Stages()
    try:
        result = run_comparison(
            systems,
            text,
            test_name=Path(args.test).name,
            resamples=args.resamples,
            seed=args.seed,
            confidence=args.confidence,
            test=args.test_kind,
            progress=stages,
        )
    finally:
        stages.close()
    outputs = [(path, render) for path, render in ((args.csv, comparison_csv), (args.sentences, sentences_csv), (args.chart, compare_chart)) if path]
    for path, render in outputs:
        write_text_atomic(path, render(result))
    written = [path for path, _ in outputs]
    if args.json:
        print_json(comparison_json(result))
        return 0
    print(format_comparison(result))
    if written:
        print("wrote " + ", ".join(written))
    return 0
