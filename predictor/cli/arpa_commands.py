"""Commands that move models in and out of the ARPA back-off text format: export, import."""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

from ..arpa import export_arpa, import_arpa
from ..counting.memory import parse_size, peak_resident_bytes
from ..errors import OptionError
from ..modelfile.encoding import ENCODINGS, FLOAT32
from ..modelfile.format import check_target
from ..outputs import check_output
from ..text import plural
from .output import add_force_option, add_json_option, add_model_option, model_name, open_model, print_demo_note, print_json


def register(commands: argparse._SubParsersAction) -> None:
    """Add the ARPA commands to the parser."""
    p = commands.add_parser(
        "export",
        help="write a model as an ARPA back-off file",
        description="Write a model in the ARPA back-off text format that language-modelling toolkits read: the probability "
        "of every stored n-gram and each context's back-off weight, so every probability is the model's own. "
        "Words are written in their model (lower-case) form; display forms go in comment lines before \\data\\. "
        "Example: foretype export -m chat.model -o chat.arpa.gz",
    )
    add_model_option(p, "the model to write out")
    p.add_argument("-o", "--output", required=True, help="the ARPA file to write (.gz: compressed; -: standard output)")
    add_force_option(p, "the output")
    p.add_argument("--approximate", action=argparse.BooleanOptionalAction, default=False, help="write a model with no exact ARPA form (mle) anyway, saying what is approximated")
    add_json_option(p)
    p.set_defaults(handler=run_export)

    p = commands.add_parser(
        "import",
        help="turn an ARPA back-off file (order 1 to 3) into a model file",
        description="Read a plain or gzip ARPA file of order 1 to 3 into a model file that every command uses. "
        "Every probability, listed or reached by back-off, is the file's own. Words match case-insensitively, "
        "as in every model; a file holding two words that differ only in case is refused. "
        "Example: foretype import big.arpa.gz -o big.model",
    )
    p.add_argument("arpa", help="the ARPA file (plain or gzip)")
    p.add_argument("-o", "--output", required=True, help="the model file to write (replaced only when the import succeeds)")
    p.add_argument("--values", choices=ENCODINGS, default=FLOAT32, help="stored value encoding (default float32; log16 is smaller)")
    p.add_argument("--max-memory", type=_memory_size, default=None, metavar="SIZE", help="ceiling on the import's memory, e.g. 2G (default: half of the memory available)")
    p.add_argument("--spill-dir", default=None, metavar="DIR", help="where n-gram tables that outgrow memory go (default: the output's folder)")
    add_json_option(p)
    p.set_defaults(handler=run_import)


def _memory_size(text: str) -> int:
    try:
        return parse_size(text)
    except OptionError as error:
        raise argparse.ArgumentTypeError(str(error).removeprefix("--max-memory: ")) from None


def _is_arpa_file(path: Path) -> bool:
    """Tell whether a file is an ARPA file (plain or gzip), so an export may replace it."""
    try:
        with open(path, "rb") as handle:
            start = handle.read(1 << 16)
    except OSError:
        return False
    return start.startswith(b"\x1f\x8b") or b"\\data\\" in start


def run_export(args: argparse.Namespace) -> int:
    """foretype export."""
    check_output(args.output, inputs=[args.model], kind=_is_arpa_file, kind_name="ARPA file", force=args.force, option="-o")
    model = open_model(args.model)
    summary = export_arpa(model, args.output, approximate=args.approximate)
    if summary.approximated:
        print(f"foretype: warning: approximated: {summary.approximated}", file=sys.stderr)
    to_stdout = args.output == "-"
    if args.json and not to_stdout:
        print_json({"model": model_name(args.model), "output": summary.target, "ngrams": summary.ngrams, "compressed": summary.compressed, "approximated": summary.approximated})
    elif not to_stdout:
        n = summary.ngrams
        print_demo_note(args.model)
        print(f"wrote {summary.target}: {plural(n['1'], 'unigram')}, {plural(n['2'], 'bigram')}, {plural(n['3'], 'trigram')}" + (" (exact)" if not summary.approximated else ""))
    return 0


def run_import(args: argparse.Namespace) -> int:
    """foretype import."""
    started = time.perf_counter()
    check_target(args.output, inputs=[args.arpa])
    spill_dir = args.spill_dir if args.spill_dir is not None else (str(Path(args.output).parent) or ".")
    summary = import_arpa(args.arpa, args.output, encoding=args.values, max_memory=args.max_memory, spill_dir=spill_dir)
    for warning in summary.warnings:
        print(f"foretype: warning: {warning}", file=sys.stderr)
    if args.json:
        print_json(
            {
                "output": args.output,
                "source": summary.source,
                "order": summary.order,
                "vocab_size": summary.vocab_size,
                "listed": summary.listed,
                "added": summary.added,
                "dropped": summary.dropped,
                "warnings": summary.warnings,
                "spilled_rows": summary.spilled_rows,
                "seconds": time.perf_counter() - started,
                "peak_memory_bytes": peak_resident_bytes(),
            }
        )
        return 0
    n = summary.listed
    added = summary.added["2"] + summary.added["3"]
    print(
        f"wrote {args.output}: order {summary.order}, {summary.vocab_size:,} words; "
        f"{n['2']:,} bigrams, {n['3']:,} trigrams read" + (f", {added:,} n-grams added to hold back-off values" if added else "")
    )
    return 0
