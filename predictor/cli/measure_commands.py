"""Commands that measure a model: savings (the simulated typist) and sweep (vocabulary size)."""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable
from contextlib import AbstractContextManager, nullcontext, redirect_stdout
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import OptionError
from ..estimate import METHODS
from ..outputs import check_output, check_output_folder, is_stdout
from ..simulate import TEXT_MODES, TypistSettings, format_report, simulate, write_trace
from ..simulate.report import is_trace_file
from .access_options import add_access_options, run_scanning_savings, scanning_settings
from .learn_commands import add_adapt_options, check_adapt_options, run_adaptive_savings
from .output import (
    add_force_option,
    add_json_option,
    add_text_options,
    describe_rule,
    is_learned_file,
    open_model,
    positive_int,
    print_json,
    progress_bar,
    read_words,
    sentence_rule,
    split_model_argument,
)

if TYPE_CHECKING:
    from ..sweep import SweepRow


def _number(text: str) -> float:
    """argparse type: a finite number (range checks happen in TypistSettings, with one clear line)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if value != value or value in (float("inf"), float("-inf")):
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return value


def _whole(text: str) -> int:
    """argparse type: a whole number (range checks happen in TypistSettings)."""
    try:
        return int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None


def _add_typist_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("-k", type=positive_int, default=5, help="suggestions shown at each step (default 5)")
    p.add_argument("--text-mode", choices=TEXT_MODES, default="full", help="full: the text as written (default); words: lower-cased words and single spaces")
    p.add_argument("--select-cost", type=_number, default=1.0, metavar="KEYS", help="keystrokes one pick costs (default 1)")
    p.add_argument("--no-autospace", dest="autospace", action="store_false", help="a pick does not write the space after the word")
    p.add_argument("--min-prefix", type=_whole, default=0, metavar="N", help="letters typed before the typist looks at suggestions (default 0)")
    add_text_options(p)


def _settings(args: argparse.Namespace) -> TypistSettings:
    return TypistSettings(
        k=args.k,
        text_mode=args.text_mode,
        select_cost=args.select_cost,
        autospace=args.autospace,
        min_prefix=args.min_prefix,
        key_seconds=getattr(args, "key_seconds", 1.0),
        scan_seconds=getattr(args, "scan_seconds", 0.5),
        wrapped=bool(args.wrapped),
    )


def register(commands: argparse._SubParsersAction) -> None:
    """Add the measuring commands to the parser."""
    p = commands.add_parser(
        "savings",
        help="simulate a typist on a text and report the keystrokes saved",
        description="Simulate a typist who enters TESTFILE exactly, picking the model's suggestions whenever the intended "
        "word is offered, and report keystroke savings beside the vocabulary's oracle and a frequency-list baseline, "
        "suggestion latency and an estimated entry time. Simulated savings are estimates, not a clinical assessment "
        "of anyone's needs. Example: foretype savings chat.model heldout.txt -k 5 --trace words.jsonl",
    )
    p.add_argument("args", nargs="+", metavar="[MODEL] TESTFILE", help="model file (default: the demo model) and the text to type")
    _add_typist_options(p)
    p.add_argument("--key-seconds", type=_number, default=1.0, metavar="S", help="seconds per keystroke in the time estimate (default 1.0)")
    p.add_argument("--scan-seconds", type=_number, default=0.5, metavar="S", help="seconds to read a changed suggestion list (default 0.5)")
    p.add_argument("--trace", metavar="FILE", help="write one JSON line per word: keystrokes, where it was picked, the lists shown")
    add_access_options(p)
    add_adapt_options(p)
    add_json_option(p)
    p.set_defaults(handler=run_savings)

    p = commands.add_parser(
        "sweep",
        help="build and measure a model per vocabulary size: savings, latency, memory",
        description="Count the corpus once, then for each vocabulary size and method build a model and measure its size, "
        "memory, build and load time, perplexity, OOV rate, keystroke savings and suggestion latency on TESTFILE. "
        "Writes DIR/sweep.csv, DIR/sweep.json and the chart DIR/sweep.svg as each row finishes, and the models as "
        "DIR/METHOD-vSIZE.model. Example: foretype sweep corpus/ --test heldout.txt --vocab-sizes 1000,5000,20000 -o sweep/",
    )
    p.add_argument("corpus", nargs="*", help="text files or folders of them (or --counts)")
    p.add_argument("--counts", metavar="COUNTS", default=None, help="estimate from a count store written by 'foretype count' instead of counting a corpus")
    p.add_argument("--test", required=True, metavar="TESTFILE", help="the held-out text to type and score")
    p.add_argument("--vocab-sizes", default="1000,2000,5000,10000,20000,50000", metavar="N,N,...", help="vocabulary sizes (default 1000,2000,5000,10000,20000,50000)")
    p.add_argument("--methods", default="kneser-ney", metavar="M,M,...", help=f"estimators, comma-separated, from {', '.join(METHODS)} (default kneser-ney)")
    p.add_argument("-o", "--output", required=True, metavar="DIR", help="folder for the results and models (created if needed; its parent must exist)")
    add_force_option(p, "the output folder's contents")
    p.add_argument(
        "--adapt",
        action="store_true",
        help="also type the test text with learning: a user model that starts empty learns each word (adds the learning KSR and latency columns)",
    )
    p.add_argument(
        "--ksr-interval",
        type=_whole,
        default=0,
        metavar="RESAMPLES",
        help="add each row's 95%% KSR interval by the bootstrap over test sentences with this many resamples (default 0: none)",
    )
    p.add_argument("--seed", type=_whole, default=0, metavar="N", help="seed of the --ksr-interval bootstrap (default 0)")
    p.add_argument("--prune", default="", metavar="C,C,...", help="the size axis: pruning criteria from entropy, prediction, count (with --keep-bytes)")
    p.add_argument(
        "--keep-bytes",
        default="",
        metavar="F,F,...",
        help="shares of each full model's file bytes the shrunk models must fit, e.g. 0.5,0.2,0.05 (1: every n-gram, only --values changes); writes DIR/size.svg",
    )
    p.add_argument("--values", default="", metavar="E,E,...", help="value encodings of the shrunk models, from log16, float32, codebook8 (default: the model's)")
    _add_typist_options(p)
    add_access_options(p)
    add_json_option(p)
    p.set_defaults(handler=run_sweep_command)


def is_sweep_folder(folder: Path) -> bool:
    """Tell whether a folder holds an earlier sweep's results (so a new sweep may write into it)."""
    return (folder / "sweep.json").is_file()


def run_savings(args: argparse.Namespace) -> int:
    """foretype savings."""
    settings = _settings(args)
    check_adapt_options(args)
    model_path, (text_path,) = split_model_argument(args.args, 1, "savings")
    args.model_path, args.text_path = model_path, text_path
    scanning = scanning_settings(args)
    if scanning is not None and (args.adapt or args.trace):
        raise OptionError("--access scanning takes neither --adapt nor --trace")
    if args.trace:
        check_output(args.trace, inputs=[model_path, text_path, args.user, args.save_user], kind=is_trace_file, kind_name="trace", force=args.force, option="--trace")
    if args.save_user:
        check_output(args.save_user, inputs=[model_path, text_path, args.user], kind=is_learned_file, kind_name="learned file", force=args.force, option="--save-user")
    text = read_words(text_path, replace_bad_bytes=args.replace_bad_bytes)
    model = open_model(model_path)
    settings = replace(settings, wrapped=sentence_rule(args.wrapped, model))
    if scanning is not None:
        return run_scanning_savings(args, model, text, settings, scanning)
    if args.adapt:
        return run_adaptive_savings(args, model, text, settings)
    with progress_bar("typing the test text") as update:
        report = simulate(model, text, settings, update)
    if args.trace:
        write_trace(args.trace, report.trace)
    with report_stream(args.trace):
        if args.json:
            print_json(report.to_json())
        else:
            print(format_report(report))
            print(f"sentences read as {describe_rule(settings.wrapped)}")
            if args.trace:
                print(f"trace: {args.trace} ({len(report.trace):,} lines)")
    return 0


def report_stream(trace: str | None) -> AbstractContextManager[object]:
    """Where the report goes: stdout, or stderr when the trace is written to stdout."""
    if trace and is_stdout(trace):
        return redirect_stdout(sys.stderr)
    return nullcontext()


class _Stages:
    """A progress bar per stage of a long job, reusing :func:`progress_bar` (a new bar when the label changes)."""

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
        if self._bar is not None:
            self._bar.__exit__(None, None, None)
        self._bar = self._update = self._label = None


def run_sweep_command(args: argparse.Namespace) -> int:
    """foretype sweep."""
    from ..builder.shrink import parse_encodings
    from ..counting.store import require_corpus_free
    from ..sweep import ExtraMeasures, format_table, parse_methods, parse_shares, parse_vocab_sizes, run_sweep

    require_corpus_free(args.corpus, args.counts)
    settings = _settings(args)
    sizes = parse_vocab_sizes(args.vocab_sizes)
    methods = parse_methods(args.methods)
    scanning = scanning_settings(args)
    criteria = [c.strip() for c in args.prune.split(",") if c.strip()]
    shares = parse_shares(args.keep_bytes) if args.keep_bytes.strip() else []
    encodings = parse_encodings(args.values) if args.values.strip() else []
    check_output_folder(args.output, inputs=[*args.corpus, getattr(args, "counts", None), args.test], kind=is_sweep_folder, kind_name="sweep results", force=args.force)
    text = read_words(args.test, replace_bad_bytes=args.replace_bad_bytes)
    stages = _Stages()

    def finished(row: SweepRow) -> None:
        stages.close()
        learning = "" if row.adapted_ksr is None else f", learning {100 * row.adapted_ksr:.1f}%"
        if row.keep_bytes is not None:
            learning += f"; {row.criterion} to {row.keep_bytes:g} of the bytes, {row.value_encoding} values"
        print(
            f"{row.method}, {row.vocab_size:,} words: KSR {100 * row.ksr:.1f}% (oracle {100 * row.oracle_ksr:.1f}%{learning}), "
            f"p99 {row.latency_p99_us or 0:,.0f} µs, {row.file_bytes / 1e6:.1f} MB",
            file=sys.stderr,
        )

    try:
        result = run_sweep(
            args.corpus,
            text,
            out=args.output,
            vocab_sizes=sizes,
            methods=methods,
            settings=settings,
            test_name=str(args.test),
            progress=stages,
            on_row=finished,
            adapt=args.adapt,
            counts_store=args.counts,
            shrink_criteria=criteria,
            keep_bytes=shares,
            value_encodings=encodings,
            extra=ExtraMeasures(args.ksr_interval, args.seed, scanning),
        )
    finally:
        stages.close()
    if args.json:
        print_json(result.to_json())
        return 0
    print(f"corpus: {result.corpus_tokens:,} tokens, counted once in {result.counting_seconds:.1f} s; test: {args.test}; k={settings.k}, {settings.text_mode} mode")
    print(format_table(result.rows))
    out = Path(args.output)
    size_chart = f", {out / 'size.svg'}" if shares else ""
    print(f"wrote {out / 'sweep.csv'}, {out / 'sweep.json'}, {out / 'sweep.svg'}{size_chart}")
    print("RSS = resident memory the model costs: RSS growth across loading it plus the mapped file pages its queries touched (psutil; approximate).")
    print("Simulated savings are estimates for comparing models, not a clinical assessment of anyone's needs.")
    return 0
