"""The count command: count a corpus once into a count store, on this machine or on Dask."""

from __future__ import annotations

import argparse
import sys

from ..counting.memory import parse_size
from ..errors import OptionError
from .output import add_corpus_options, add_json_option, positive_int, print_json, progress_bar


def register(commands: argparse._SubParsersAction) -> None:
    """Add the count command to the parser."""
    p = commands.add_parser(
        "count",
        help="count a corpus once into a count store (Parquet), on this machine or a Dask cluster",
        description="Count a corpus into a count store that 'foretype build --counts' and 'foretype sweep --counts' estimate from. "
        "Without --workers or --cluster the corpus is counted in this process. Inputs may be local paths or fsspec URLs "
        "(with Dask). Example: foretype count corpus/ -o corpus.counts --workers 2",
    )
    p.add_argument("corpus", nargs="+", help="text files or folders of them, or URLs (s3://..., https://...) with --workers or --cluster")
    p.add_argument("-o", "--output", required=True, metavar="COUNTS", help="the count store folder to write (an existing store is replaced only when the count succeeds)")
    where = p.add_mutually_exclusive_group()
    where.add_argument("--cluster", metavar="ADDRESS", default=None, help="count on this Dask scheduler, e.g. tcp://host:8786 (every worker must read the corpus paths)")
    where.add_argument("--workers", type=positive_int, default=None, metavar="N", help="count on a local Dask cluster of N processes")
    add_corpus_options(p)
    p.add_argument("--max-memory", type=_size, default=None, metavar="SIZE", help="ceiling on this process's memory, e.g. 2G (default: half of the memory available)")
    p.add_argument("--spill-dir", default=None, metavar="DIR", help="where counts that outgrow memory go without Dask (default: the output's folder)")
    p.add_argument("--block-size", type=_size, default=None, metavar="SIZE", help="bytes of a file per Dask task (default 32M)")
    add_json_option(p)
    p.set_defaults(handler=run_count)


def _size(text: str) -> int:
    try:
        return parse_size(text)
    except OptionError as error:
        raise argparse.ArgumentTypeError(str(error).split(": ", 1)[-1]) from None


def run_count(args: argparse.Namespace) -> int:
    """foretype count."""
    from pathlib import Path

    from ..counting.blocks import BLOCK_BYTES
    from ..counting.store_count import count_to_store

    dask = args.cluster is not None or args.workers is not None
    spill_dir = args.spill_dir if args.spill_dir is not None else (str(Path(args.output).parent) or ".")

    def dashboard(link: str) -> None:
        print(f"Dask dashboard: {link}", file=sys.stderr)

    with progress_bar("Dask tasks done" if dask else "reading corpus") as update:
        summary = count_to_store(
            args.corpus,
            args.output,
            wrapped=args.wrapped,
            replace_bad_bytes=args.replace_bad_bytes,
            reject_binary=args.reject_binary,
            max_memory=args.max_memory,
            spill_dir=spill_dir,
            cluster=args.cluster,
            workers=args.workers,
            block_bytes=args.block_size or BLOCK_BYTES,
            progress=update,
            on_dashboard=dashboard,
        )
    if args.json:
        print_json(vars(summary))
        return 0
    took = sum(summary.seconds.values())
    where = f", {summary.tasks:,} Dask tasks" if summary.tasks else ""
    print(
        f"wrote {summary.store}: {summary.tokens:,} tokens, {summary.sentences:,} sentences, {summary.types - 2:,} word types, "
        f"{summary.trigram_rows:,} distinct trigrams in {summary.partitions} partitions, from {summary.files} files in {took:.1f} s{where}"
    )
    return 0
