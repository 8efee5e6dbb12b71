"""foretype savings: the simulated typist on a held-out text (sweep and compare have their own modules)."""

from __future__ import annotations

import argparse
import sys
from contextlib import AbstractContextManager, nullcontext, redirect_stdout
from dataclasses import replace

from ..errors import OptionError
from ..outputs import check_output, is_stdout
from ..simulate import format_report, simulate, write_trace
from ..simulate.report import is_trace_file
from ..text import plural
from .access_options import add_access_options, run_scanning_savings, scanning_settings
from .learn_commands import add_adapt_options, check_adapt_options, check_learned_output, run_adaptive_savings
from .output import (
    add_json_option,
    add_model_option,
    add_test_option,
    describe_rule,
    model_name,
    open_model,
    print_demo_note,
    print_json,
    progress_bar,
    read_words,
    sentence_rule,
)
from .typist_options import add_typist_options, finite_number, typist_settings


def register(commands: argparse._SubParsersAction) -> None:
    """Add the measuring commands to the parser."""
    p = commands.add_parser(
        "savings",
        help="simulate a typist on a text and report the keystrokes saved",
        description="Simulate a typist who enters the test text exactly, picking the model's suggestions whenever the intended "
        "word is offered, and report keystroke savings beside the vocabulary's oracle and a frequency-list baseline, "
        "suggestion latency and an estimated entry time. Simulated savings are estimates, not a clinical assessment "
        "of anyone's needs. Example: foretype savings -m chat.model -t heldout.txt -k 5 --trace words.jsonl",
    )
    add_model_option(p)
    add_test_option(p, "the text to type")
    add_typist_options(p)
    p.add_argument("--key-seconds", type=finite_number, default=1.0, metavar="S", help="seconds per keystroke in the time estimate (default 1.0)")
    p.add_argument("--scan-seconds", type=finite_number, default=0.5, metavar="S", help="seconds to read a changed suggestion list (default 0.5)")
    p.add_argument("--trace", metavar="FILE", help="write one JSON line per word: keystrokes, where it was picked, the lists shown")
    add_access_options(p)
    add_adapt_options(p)
    add_json_option(p)
    p.set_defaults(handler=run_savings)


def run_savings(args: argparse.Namespace) -> int:
    """foretype savings."""
    settings = typist_settings(args)
    check_adapt_options(args)
    scanning = scanning_settings(args)
    if scanning is not None and (args.adapt or args.trace):
        raise OptionError("--access scanning takes neither --adapt nor --trace")
    if args.trace:
        check_output(args.trace, inputs=[args.model, args.test, args.user, args.save_user], kind=is_trace_file, kind_name="trace", force=args.force, option="--trace")
    if args.save_user:
        check_learned_output(args.save_user, inputs=[args.model, args.test, args.user, args.trace], force=args.force)
    text = read_words(args.test, replace_bad_bytes=args.replace_bad_bytes)
    model = open_model(args.model)
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
            print_json({"model": model_name(args.model), **report.to_json()})
        else:
            print_demo_note(args.model)
            print(format_report(report))
            print(f"sentences read as {describe_rule(settings.wrapped)}")
            if args.trace:
                print(f"trace: {args.trace} ({plural(len(report.trace), 'line')})")
    return 0


def report_stream(trace: str | None) -> AbstractContextManager[object]:
    """Where the report goes: stdout, or stderr when the trace is written to stdout."""
    if trace and is_stdout(trace):
        return redirect_stdout(sys.stderr)
    return nullcontext()
