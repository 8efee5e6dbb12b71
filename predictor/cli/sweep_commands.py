"""foretype sweep: the command over the engine's sweep (:mod:`foretype.sweep`): its options, and the table it prints."""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import OptionError
from ..estimate import METHODS
from ..outputs import check_output_folder
from ..text import plural
from .access_options import add_access_options, scanning_settings
from .output import StageBars, add_force_option, add_json_option, add_test_option, print_json, read_words
from .typist_options import add_typist_options, typist_settings, whole_number

if TYPE_CHECKING:
    from ..sweep import SweepRow


def register(commands: argparse._SubParsersAction) -> None:
    """Add the sweep command to the parser."""
    p = commands.add_parser(
        "sweep",
        help="build and measure a model per vocabulary size: savings, latency, memory",
        description="Count the corpus once, then for each vocabulary size and method build a model and measure its size, "
        "memory, build and load time, perplexity, OOV rate, keystroke savings and suggestion latency on the test text. "
        "Writes DIR/sweep.csv, DIR/sweep.json and the chart DIR/sweep.svg as each row finishes, and the models as "
        "DIR/METHOD-vSIZE.model. Example: foretype sweep corpus/ -t heldout.txt --vocab-sizes 1000,5000,20000 -o sweep/",
    )
    p.add_argument("corpus", nargs="*", help="text files or folders of them (or --counts)")
    p.add_argument("--counts", metavar="COUNTS", default=None, help="estimate from a count store written by 'foretype count' instead of counting a corpus")
    add_test_option(p)
    p.add_argument("--vocab-sizes", default="1000,2000,5000,10000,20000,50000", metavar="N,N,...", help="vocabulary sizes (default 1000,2000,5000,10000,20000,50000)")
    p.add_argument("--methods", default="kneser-ney", metavar="M,M,...", help=f"estimators, comma-separated, from {', '.join(METHODS)} (default kneser-ney)")
    p.add_argument("-o", "--output", required=True, metavar="DIR", help="folder for the results and models (created if needed; its parent must exist)")
    add_force_option(p, "the output folder's contents")
    p.add_argument(
        "--adapt",
        action=argparse.BooleanOptionalAction,
        default=False,
        help="also type the test text with learning: a user model that starts empty learns each word (adds the learning KSR and latency columns)",
    )
    p.add_argument(
        "--ksr-interval",
        type=whole_number,
        default=0,
        metavar="RESAMPLES",
        help="add each row's 95%% KSR interval by the bootstrap over test sentences with this many resamples (default 0: none)",
    )
    p.add_argument("--seed", type=whole_number, default=0, metavar="N", help="seed of the --ksr-interval bootstrap (default 0)")
    p.add_argument("--prune", default="", metavar="C,C,...", help="the size axis: pruning criteria from entropy, prediction, count (with --keep-bytes)")
    p.add_argument(
        "--keep-bytes",
        default="",
        metavar="F,F,...",
        help="shares of each full model's file bytes the shrunk models must fit, e.g. 0.5,0.2,0.05 (1: every n-gram, only --values changes); writes DIR/size.svg",
    )
    p.add_argument("--values", default="", metavar="E,E,...", help="value encodings of the shrunk models, from log16, float32, codebook8 (default: the model's)")
    add_typist_options(p)
    add_access_options(p)
    add_json_option(p)
    p.set_defaults(handler=run_sweep_command)


def is_sweep_folder(folder: Path) -> bool:
    """Tell whether a folder holds an earlier sweep's results (so a new sweep may write into it)."""
    return (folder / "sweep.json").is_file()


def run_sweep_command(args: argparse.Namespace) -> int:
    """foretype sweep."""
    from ..builder.shrink import parse_encodings
    from ..counting.store import require_corpus_free
    from ..sweep import ExtraMeasures, run_sweep

    require_corpus_free(args.corpus, args.counts)
    settings = typist_settings(args)
    sizes = parse_vocab_sizes(args.vocab_sizes)
    methods = parse_methods(args.methods)
    scanning = scanning_settings(args)
    criteria = [c.strip() for c in args.prune.split(",") if c.strip()]
    shares = parse_shares(args.keep_bytes) if args.keep_bytes.strip() else []
    encodings = parse_encodings(args.values) if args.values.strip() else []
    check_output_folder(args.output, inputs=[*args.corpus, getattr(args, "counts", None), args.test], kind=is_sweep_folder, kind_name="sweep results", force=args.force)
    text = read_words(args.test, replace_bad_bytes=args.replace_bad_bytes)
    stages = StageBars()

    def finished(row: SweepRow) -> None:
        stages.close()
        learning = "" if row.adapted_ksr is None else f", learning {100 * row.adapted_ksr:.1f}%"
        if row.keep_bytes is not None:
            learning += f"; {row.criterion} to {row.keep_bytes:g} of the bytes, {row.value_encoding} values"
        print(
            f"{row.method}, {plural(row.vocab_size, 'word')}: KSR {100 * row.ksr:.1f}% (oracle {100 * row.oracle_ksr:.1f}%{learning}), "
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
    print(f"corpus: {plural(result.corpus_tokens, 'token')}, counted once in {result.counting_seconds:.1f} s; test: {args.test}; k={settings.k}, {settings.text_mode} mode")
    print(format_table(result.rows))
    out = Path(args.output)
    size_chart = f", {out / 'size.svg'}" if shares else ""
    print(f"wrote {out / 'sweep.csv'}, {out / 'sweep.json'}, {out / 'sweep.svg'}{size_chart}")
    print("RSS = resident memory the model costs: RSS growth across loading it plus the mapped file pages its queries touched (psutil; approximate).")
    print("Simulated savings are estimates for comparing models, not a clinical assessment of anyone's needs.")
    return 0


def parse_vocab_sizes(text: str) -> list[int]:
    """Parse ``--vocab-sizes``: positive whole numbers separated by commas.

    Raises:
        OptionError: an entry is not a positive whole number, or the list is empty.
    """
    sizes = []
    for part in text.split(","):
        part = part.strip().replace("_", "")
        if not part:
            continue
        try:
            value = int(part)
        except ValueError:
            raise OptionError(f"--vocab-sizes takes whole numbers separated by commas, not {part!r}") from None
        if value < 1:
            raise OptionError(f"--vocab-sizes entries must be at least 1, not {value}")
        sizes.append(value)
    if not sizes:
        raise OptionError("--vocab-sizes is empty")
    return list(dict.fromkeys(sizes))  # a size given twice is built once


def parse_methods(text: str) -> list[str]:
    """Parse ``--methods``: estimator names separated by commas.

    Raises:
        OptionError: an unknown method, or an empty list.
    """
    methods = [part.strip() for part in text.split(",") if part.strip()]
    if not methods:
        raise OptionError("--methods is empty")
    for method in methods:
        if method not in METHODS:
            raise OptionError(f"unknown method {method!r}; choose one of {', '.join(METHODS)}")
    return methods


def parse_shares(text: str) -> list[float]:
    """Parse ``--keep-bytes``: shares of the full model's bytes in (0, 1], comma-separated.

    Raises:
        OptionError: an entry is not a number in (0, 1], or the list is empty.
    """
    shares = []
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        try:
            value = float(part)
        except ValueError:
            raise OptionError(f"--keep-bytes takes shares of the full model's bytes such as 0.5,0.1, not {part!r}") from None
        if not 0 < value <= 1:
            raise OptionError(f"--keep-bytes entries must lie in (0, 1], not {part}")
        shares.append(value)
    if not shares:
        raise OptionError("--keep-bytes is empty")
    return shares


def format_table(rows: Sequence[SweepRow]) -> str:
    """The rows as an aligned text table."""
    adapted = any(row.adapted_ksr is not None for row in rows)
    headers: tuple[str, ...] = (
        "method",
        "asked",
        "vocab",
        "n-grams",
        "file MB",
        "RSS MB",
        "build s",
        "load ms",
        "perplexity",
        "OOV",
        "KSR",
        "oracle",
        "baseline",
        "p50 µs",
        "p99 µs",
    )
    if adapted:
        headers += ("learning KSR", "learning p99 µs")
    sized = any(row.keep_bytes is not None for row in rows)
    if sized:
        headers += ("shrunk", "values")
    headers += _extra_headers(rows)
    lines = []
    for row in rows:
        line: tuple[str, ...] = (
            row.method,
            f"{row.requested_vocab_size:,}",
            f"{row.vocab_size:,}",
            f"{row.unigrams + row.bigrams + row.trigrams:,}",
            f"{row.file_bytes / 1e6:.1f}",
            f"{row.rss_bytes / 1e6:.1f}",
            f"{row.build_seconds:.2f}",
            f"{row.load_ms:.1f}",
            "inf" if row.perplexity is None else f"{row.perplexity:.1f}",
            f"{100 * row.oov_rate:.2f}%",
            f"{100 * row.ksr:.1f}%",
            f"{100 * row.oracle_ksr:.1f}%",
            f"{100 * row.baseline_ksr:.1f}%",
            "n/a" if row.latency_p50_us is None else f"{row.latency_p50_us:,.0f}",
            "n/a" if row.latency_p99_us is None else f"{row.latency_p99_us:,.0f}",
        )
        if adapted:
            line += (
                "" if row.adapted_ksr is None else f"{100 * row.adapted_ksr:.1f}%",
                "n/a" if row.adapted_latency_p99_us is None else f"{row.adapted_latency_p99_us:,.0f}",
            )
        if sized:
            line += ("full" if row.keep_bytes is None else f"{row.criterion} to {row.keep_bytes:g}", row.value_encoding)
        line += _extra_cells(row, rows)
        lines.append(line)
    widths = [max(len(h), *(len(line[i]) for line in lines)) if lines else len(h) for i, h in enumerate(headers)]
    out = ["  ".join(h.ljust(w) if i == 0 else h.rjust(w) for i, (h, w) in enumerate(zip(headers, widths)))]
    for line in lines:
        out.append("  ".join(v.ljust(w) if i == 0 else v.rjust(w) for i, (v, w) in enumerate(zip(line, widths))))
    return "\n".join(out)


def _extra_headers(rows: Sequence[SweepRow]) -> tuple[str, ...]:
    headers: tuple[str, ...] = ()
    if any(row.ksr_low is not None for row in rows):
        headers += ("KSR 95%",)
    if any(row.scan_steps_per_char is not None for row in rows):
        headers += ("scan steps/char", "unaided", "scan wpm", "unaided wpm")
    return headers


def _extra_cells(row: SweepRow, rows: Sequence[SweepRow]) -> tuple[str, ...]:
    cells: tuple[str, ...] = ()
    if any(r.ksr_low is not None for r in rows):
        cells += ("" if row.ksr_low is None or row.ksr_high is None else f"{100 * row.ksr_low:.1f}-{100 * row.ksr_high:.1f}%",)
    if any(r.scan_steps_per_char is not None for r in rows):
        cells += tuple("" if v is None else f"{v:.2f}" for v in (row.scan_steps_per_char, row.scan_steps_per_char_unaided, row.scan_wpm, row.scan_wpm_unaided))
    return cells
