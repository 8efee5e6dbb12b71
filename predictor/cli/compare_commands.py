"""foretype compare: models and typist settings side by side on one text, with intervals and paired tests."""

from __future__ import annotations

import argparse
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path
from typing import Any

from ..compare import ComparedSystem, compare_chart, comparison_csv, comparison_json, format_comparison, label_systems, run_comparison, sentences_csv
from ..compare.runner import TESTS
from ..errors import OptionError
from ..outputs import KindCheck, check_output, is_stdout, write_text_output
from ..simulate import TypistSettings
from .access_options import add_access_options, scanning_settings
from .measure_commands import report_stream
from .output import (
    SVG_CHART,
    StageBars,
    add_force_option,
    add_json_option,
    add_test_option,
    model_name,
    open_model,
    print_demo_note,
    print_json,
    read_words,
    sentence_rule,
    starts_with,
)
from .typist_options import add_typist_options, whole_number


def _fraction(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None


SUMMARY_CSV = starts_with(b"kind,system,other,measure")
"""An earlier ``compare --csv`` file."""
SENTENCES_CSV = starts_with(b"system,sentence,")
"""An earlier ``compare --sentences`` file."""


def register(commands: argparse._SubParsersAction) -> None:
    """Add ``compare`` to the parser."""
    p = commands.add_parser(
        "compare",
        help="compare models or typist settings on one text: intervals and paired significance tests",
        description="Simulate the same typist with each model (and each -k or --select-cost value) on the test text, keep "
        "per-sentence totals, and report each system's keystroke savings and perplexity with confidence intervals, and "
        "for each pair the difference with its interval and p-value, by the paired bootstrap over sentences (Koehn 2004) "
        "or approximate randomisation (Riezler & Maxwell 2005). Simulated figures compare designs; they are no clinical "
        "assessment. Example: foretype compare -t heldout.txt -m kn.model -m katz.model --chart compare.svg",
    )
    add_test_option(p, "the text to type")
    p.add_argument("-m", "--model", action="append", default=[], metavar="MODEL", help="a model file; repeat for each model (default: the bundled demo model)")
    add_typist_options(p, several=True)
    add_access_options(p)
    p.add_argument("--resamples", type=whole_number, default=1000, metavar="N", help="bootstrap resamples, and shuffles for --significance randomisation (default 1000)")
    p.add_argument("--seed", type=whole_number, default=0, metavar="N", help="seed of the resampling (default 0; the same seed gives the same results)")
    p.add_argument("--significance", choices=TESTS, default="bootstrap", help="how pair p-values are found (default bootstrap)")
    p.add_argument("--confidence", type=_fraction, default=0.95, metavar="C", help="coverage of the intervals (default 0.95)")
    p.add_argument("--csv", metavar="FILE", help="write the summary as CSV: one row per system and measure, one per pair and measure")
    p.add_argument("--sentences", metavar="FILE", help="write the per-sentence totals as CSV (for other statistics tools)")
    p.add_argument("--chart", metavar="FILE", help="write an SVG chart: each system with its interval, differences from the first")
    add_force_option(p, "the --csv, --sentences and --chart files")
    add_json_option(p)
    p.set_defaults(handler=run_compare)


def run_compare(args: argparse.Namespace) -> int:
    """foretype compare."""
    paths: list[str | None] = list(args.model) or [None]
    outputs = [(path, render, kind, name) for path, render, kind, name in _outputs(args) if path]
    if sum(is_stdout(path) for path, *_ in outputs) > 1:
        raise OptionError("only one of --csv, --sentences and --chart can go to standard output ('-')")
    for path, _, kind, name in outputs:
        option = name.split(" ")[0]
        check_output(path, inputs=[args.test, *[p for p in paths if p is not None]], kind=kind, kind_name=name.split(" ", 1)[1], force=args.force, option=option)
    if args.resamples < 1:
        raise OptionError(f"--resamples must be at least 1, not {args.resamples}")
    if not 0 < args.confidence < 1:
        raise OptionError(f"--confidence must lie between 0 and 1, not {args.confidence}")
    scanning = scanning_settings(args)
    plans = label_systems(paths, args.k, args.select_cost)
    # Check every setting before any model loads or any typing starts.
    settings = {
        (k, cost): TypistSettings(k=k, text_mode=args.text_mode, select_cost=cost, autospace=args.autospace, min_prefix=args.min_prefix, skip_passed=args.skip_passed)
        for _, _, k, cost in plans
    }
    text = read_words(args.test, replace_bad_bytes=args.replace_bad_bytes)
    models = [open_model(path) for path in paths]
    systems = [
        ComparedSystem(label, models[index], replace(settings[(k, cost)], wrapped=sentence_rule(args.wrapped, models[index])), scanning, model_name(paths[index]))
        for label, index, k, cost in plans
    ]
    stages = StageBars()
    try:
        result = run_comparison(
            systems,
            text,
            test_name=Path(args.test).name,
            resamples=args.resamples,
            seed=args.seed,
            confidence=args.confidence,
            test=args.significance,
            progress=stages,
        )
    finally:
        stages.close()
    for path, render, _, _ in outputs:
        write_text_output(path, render(result))
    written = [path for path, *_ in outputs if not is_stdout(path)]
    with report_stream(next((path for path, *_ in outputs if is_stdout(path)), None)):
        if args.json:
            print_json(comparison_json(result))
            return 0
        if None in paths:
            print_demo_note(None)
        print(format_comparison(result))
        if written:
            print("wrote " + ", ".join(written))
    return 0


def _outputs(args: argparse.Namespace) -> list[tuple[str | None, Callable[[Any], str], KindCheck, str]]:
    """Each file compare may write: (path, how it is rendered, what it may replace, its option and what it is called)."""
    return [
        (args.csv, comparison_csv, SUMMARY_CSV, "--csv comparison CSV"),
        (args.sentences, sentences_csv, SENTENCES_CSV, "--sentences per-sentence CSV"),
        (args.chart, compare_chart, SVG_CHART, "--chart SVG chart"),
    ]
