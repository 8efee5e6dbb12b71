"""The shrink command: prune a model and store its values in fewer bits, to fit a byte budget."""

from __future__ import annotations

import argparse
import time
from pathlib import Path
from typing import Any

from ..builder.shrink import VALUE_ENCODINGS, shrink
from ..counting.memory import parse_size
from ..errors import OptionError
from ..modelfile.format import check_target
from ..query.model import LanguageModel, load
from ..text import plural
from .output import add_json_option, add_model_option, model_name, open_model, positive_int, print_demo_note, print_json

SHRINK_CRITERIA = ("entropy", "prediction")
"""Criteria ``shrink`` offers on a built model (count cutoffs need the counts: ``build --cutoffs``)."""


def register(commands: argparse._SubParsersAction) -> None:
    """Add the shrink command to the parser."""
    p = commands.add_parser(
        "shrink",
        help="prune a model and store its values in fewer bits, to fit a byte budget",
        description="Write a smaller copy of a model: remove the bigrams and trigrams that matter least "
        "(relative entropy, or the keystrokes lost from the top-k lists) and store values in fewer bits. "
        "Example: foretype shrink -m chat.model -o small.model --max-bytes 500K --values codebook8",
    )
    add_model_option(p, "the model to shrink (left unchanged)")
    p.add_argument("-o", "--output", required=True, help="the smaller model to write")
    p.add_argument("--criterion", choices=SHRINK_CRITERIA, default="entropy", help="what decides which n-grams go first (default entropy)")
    p.add_argument("--threshold", type=float, default=None, metavar="THETA", help="remove every n-gram scoring below THETA (entropy: relative perplexity increase, e.g. 1e-7)")
    p.add_argument("--max-bytes", type=_byte_size, default=None, metavar="SIZE", help="remove the fewest n-grams whose model fits in SIZE bytes (e.g. 8M, 500K)")
    p.add_argument("--values", choices=VALUE_ENCODINGS, default=None, help="stored value encoding (default: the model's)")
    p.add_argument("-k", type=positive_int, default=5, help="suggestions per list, for --criterion prediction (default 5)")
    add_json_option(p)
    p.set_defaults(handler=run_shrink)


def _byte_size(text: str) -> int:
    """argparse type: a size in bytes such as 8M or 500K."""
    try:
        return parse_size(text)
    except OptionError:
        raise argparse.ArgumentTypeError(f"expected a size such as 8M or 500K, not {text!r}") from None


def describe_shrink(model: LanguageModel) -> str | None:
    """One line on how a model was shrunk, or None if it was not (for ``info`` and ``shrink``)."""
    record = model.meta.get("shrink")
    if not isinstance(record, dict):
        return None
    source = record.get("source_ngrams", {})
    kept = record.get("kept_ngrams", {})
    how = record.get("criterion")
    parts = []
    if how:
        detail = [f"{how} pruning"]
        if record.get("cutoffs"):
            detail.append("cutoffs {}/{}".format(*record["cutoffs"]))
        if record.get("threshold") is not None:
            detail.append(f"threshold {record['threshold']:g}")
        if record.get("max_bytes") is not None:
            detail.append(f"budget {record['max_bytes']:,} bytes")
        parts.append(", ".join(detail))
        parts.append(f"kept {kept.get('2', 0):,} of {source.get('2', 0):,} bigrams and {kept.get('3', 0):,} of {source.get('3', 0):,} trigrams")
    else:
        parts.append("not pruned")
    parts.append(f"values {model.meta.get('value_encoding')}, back-off form")
    return "; ".join(parts)


def run_shrink(args: argparse.Namespace) -> int:
    """foretype shrink."""
    started = time.perf_counter()
    check_target(args.output, inputs=[args.model])
    source = open_model(args.model)
    smaller = shrink(source, criterion=args.criterion, threshold=args.threshold, max_bytes=args.max_bytes, encoding=args.values, k=args.k)
    size = smaller.save(args.output)
    info = load(args.output).info()
    payload: dict[str, Any] = {
        "model": str(Path(args.output)),
        "source": model_name(args.model),
        "source_file_bytes": source.file_bytes,
        "file_bytes": size,
        "ngrams": info["ngrams"],
        "bytes_per_ngram": info["bytes_per_ngram"],
        "value_encoding": info["value_encoding"],
        "shrink": smaller.meta["shrink"],
        "seconds": round(time.perf_counter() - started, 3),
    }
    if args.json:
        print_json(payload)
        return 0
    was = f" (was {source.file_bytes:,})" if source.file_bytes else ""
    print_demo_note(args.model)
    print(f"wrote {payload['model']}: {plural(size, 'byte')}{was}, {info['bytes_per_ngram']:.2f} bytes per stored n-gram; {describe_shrink(smaller)}")
    return 0
