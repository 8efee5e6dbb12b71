"""Commands that build, query and describe a model: build, suggest, score, info, check."""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path
from typing import Any

from ..builder import build, build_from_store
from ..counting import CorpusCounts
from ..counting.memory import parse_size, peak_resident_bytes
from ..counting.store import require_corpus_free
from ..errors import OptionError
from ..estimate import METHODS
from ..modelfile.encoding import ENCODINGS
from ..modelfile.format import check_target
from ..outputs import is_stdout
from ..query.verify import held_to_sums, verify_model
from ..text import plural
from .output import (
    add_corpus_options,
    add_json_option,
    add_model_option,
    add_test_option,
    add_text_options,
    describe_rule,
    is_model_file,
    model_name,
    open_model,
    positive_int,
    print_demo_note,
    print_json,
    probability,
    progress_bar,
    read_words,
    sentence_rule,
)
from .shrink_commands import describe_shrink


def register(commands: argparse._SubParsersAction) -> None:
    """Add the model commands to the parser."""
    p = commands.add_parser(
        "build",
        help="build a model from corpus files or folders",
        description="Build a smoothed trigram model from text files (one sentence per line by default). Example: foretype build corpus/*.txt -o chat.model --vocab-size 20000",
    )
    p.add_argument("corpus", nargs="*", help="text files or folders of them (or --counts)")
    p.add_argument("--counts", metavar="COUNTS", default=None, help="estimate from a count store written by 'foretype count' instead of counting a corpus")
    p.add_argument("-o", "--output", required=True, help="the model file to write ('-': standard output; an existing model is replaced only when the build succeeds)")
    p.add_argument("--force", action="store_true", help="replace the output even when it is an existing file that is not a model")
    p.add_argument("--vocab-size", type=positive_int, default=None, metavar="N", help="keep the N most frequent words")
    p.add_argument("--min-count", type=positive_int, default=1, metavar="C", help="drop words seen fewer than C times (default 1)")
    p.add_argument("--method", choices=METHODS, default="kneser-ney", help="estimator (default kneser-ney)")
    p.add_argument("--add", type=float, default=0.1, metavar="K", help="k for --method additive (default 0.1)")
    add_corpus_options(p)
    p.add_argument(
        "--values", choices=(*ENCODINGS, "codebook8"), default=None, help="stored value encoding (default log16; float32 for katz and mle; codebook8: one byte per value)"
    )
    p.add_argument("--cutoffs", type=_cutoffs, default=None, metavar="C2,C3", help="store only bigrams seen at least C2 times and trigrams at least C3 times (back-off form)")
    p.add_argument(
        "--max-memory",
        type=_memory_size,
        default=None,
        metavar="SIZE",
        help="ceiling on the build's memory, e.g. 2G or 512M (default: half of the memory available); counts that outgrow it go to disk",
    )
    p.add_argument("--spill-dir", default=None, metavar="DIR", help="where counts that outgrow memory go (default: the output's folder)")
    add_json_option(p)
    p.set_defaults(handler=run_build)

    p = commands.add_parser(
        "suggest",
        help="top-k next words or completions for the text before the cursor",
        description="Suggest words for the text before the cursor. If it ends inside a word, that word is completed; "
        "if it ends in a space, the next word is predicted. "
        'Example: foretype suggest -m chat.model "see you at the sta"',
    )
    add_model_option(p)
    p.add_argument("text", metavar="TEXT", help="the text before the cursor")
    p.add_argument("-k", type=positive_int, default=5, help="how many suggestions (default 5)")
    p.add_argument(
        "--adapt",
        action=argparse.BooleanOptionalAction,
        default=False,
        help="combine the model with what it learned from your typing (MODEL.learned beside it; read only; default off)",
    )
    p.add_argument("--user", metavar="FILE", help="with --adapt: this learned file instead of MODEL.learned")
    add_json_option(p)
    p.set_defaults(handler=run_suggest)

    p = commands.add_parser(
        "score",
        help="cross-entropy, perplexity and OOV rate of a text",
        description="Score a text file: cross-entropy in bits per token (words plus one end symbol per sentence), "
        "perplexity and out-of-vocabulary rate. Example: foretype score -m chat.model -t heldout.txt",
    )
    add_model_option(p)
    add_test_option(p, "the text to score")
    add_text_options(p)
    add_json_option(p)
    p.set_defaults(handler=run_score)

    p = commands.add_parser("info", help="facts about a model file", description="Describe a model: method, vocabulary, n-grams stored, size. Example: foretype info -m chat.model")
    add_model_option(p)
    add_json_option(p)
    p.set_defaults(handler=run_info)

    p = commands.add_parser(
        "check",
        help="verify every checksum of a model file",
        description="Fully verify a model file: header, structure and every section's checksum. Example: foretype check -m chat.model",
    )
    add_model_option(p, "the model file to verify")
    add_json_option(p)
    p.set_defaults(handler=run_check)


def _cutoffs(text: str) -> tuple[int, int]:
    """argparse type: count cutoffs such as 2,3."""
    from ..builder.shrink import parse_cutoffs

    try:
        return parse_cutoffs(text)
    except OptionError as error:
        raise argparse.ArgumentTypeError(str(error)) from None


def _memory_size(text: str) -> int:
    """argparse type: a memory size such as 512M or 2G."""
    try:
        return parse_size(text)
    except OptionError as error:
        raise argparse.ArgumentTypeError(str(error).removeprefix("--max-memory: ")) from None


def run_build(args: argparse.Namespace) -> int:
    """foretype build."""
    started = time.perf_counter()
    require_corpus_free(args.corpus, args.counts)
    check_target(args.output, inputs=[*args.corpus, args.counts], force=args.force)  # fail before reading a corpus, not after
    to_stdout = is_stdout(args.output)
    if args.counts is not None:
        for flag, given in (("--wrapped", args.wrapped), ("--replace-bad-bytes", args.replace_bad_bytes), ("--reject-binary", args.reject_binary), ("--spill-dir", args.spill_dir)):
            if given:
                raise OptionError(f"{flag} applies to counting a corpus; a count store keeps the settings it was counted with")
    spill_dir = args.spill_dir if args.spill_dir is not None else (("." if to_stdout else str(Path(args.output).parent)) or ".")
    counted: dict[str, int] = {}

    def note_counts(counts: CorpusCounts) -> None:
        counted["spilled_rows"] = counts.spilled_rows

    if args.counts is not None:
        with progress_bar("estimating from the count store") as update:
            update(0, 0)
            model = build_from_store(
                args.counts,
                vocab_size=args.vocab_size,
                min_count=args.min_count,
                method=args.method,
                add=args.add,
                encoding=args.values,
                max_memory=args.max_memory,
                cutoffs=args.cutoffs,
            )
    else:
        with progress_bar("reading corpus") as update:
            model = build(
                args.corpus,
                vocab_size=args.vocab_size,
                min_count=args.min_count,
                method=args.method,
                add=args.add,
                wrapped=args.wrapped,
                replace_bad_bytes=args.replace_bad_bytes,
                reject_binary=args.reject_binary,
                encoding=args.values,
                progress=update,
                max_memory=args.max_memory,
                spill_dir=spill_dir,
                on_counted=note_counts,
                cutoffs=args.cutoffs,
            )
    size = model.save(args.output, force=args.force)
    seconds = time.perf_counter() - started
    info = model.info()
    tokens = info["corpus_tokens"]
    summary = {
        "model": str(Path(args.output)),
        "method": info["method"],
        "vocab_size": info["vocab_size"],
        "ngrams": info["ngrams"],
        "file_bytes": size,
        "corpus_tokens": tokens,
        "corpus_files": model.meta["corpus_files"],
        "skipped_files": model.meta["skipped_files"],
        "unlisted_tokens": model.meta.get("unlisted_tokens", 0),
        "spilled_rows": counted.get("spilled_rows", 0),
        "peak_memory_bytes": peak_resident_bytes(),
        "seconds": round(seconds, 3),
        "tokens_per_second": round(tokens / seconds) if seconds > 0 else None,
    }
    if to_stdout:  # the model went to stdout: the summary goes to stderr
        print(json.dumps(summary) if args.json else f"wrote a model to standard output: {size:,} bytes", file=sys.stderr)
    elif args.json:
        print_json(summary)
    else:
        n = info["ngrams"]
        skipped = f", skipped {plural(summary['skipped_files'], 'binary file')}" if summary["skipped_files"] else ""
        if summary["unlisted_tokens"]:
            skipped += f", {summary['unlisted_tokens']:,} tokens of words first seen after the word table filled counted as unknown"
        print(
            f"wrote {summary['model']}: {info['method']}, {plural(info['vocab_size'], 'word')}, "
            f"{n['1']:,}/{n['2']:,}/{n['3']:,} uni/bi/trigrams, {size / 1e6:.1f} MB; "
            f"{plural(tokens, 'token')} from {plural(summary['corpus_files'], 'file')}{skipped} in {seconds:.1f} s"
        )
    return 0


def run_suggest(args: argparse.Namespace) -> int:
    """foretype suggest (with --adapt: the combined model of the model and its learned file)."""
    if args.user and not args.adapt:
        raise OptionError("--user goes with --adapt")
    text = args.text
    if Path(text).is_file() and is_model_file(text):
        raise OptionError(f'{text!r} is a model file, not the text before the cursor: name the model with -m (foretype suggest -m {text} "TEXT")')
    base = open_model(args.model)
    adapted = learned_file = None
    if args.adapt:
        from ..adapt.store import default_learned_path, load_learned

        learned_file = Path(args.user) if args.user else default_learned_path(args.model)
        adapted = load_learned(learned_file, base, must_exist=bool(args.user))
    model = adapted if adapted is not None else base
    context, prefix = model.parse_cursor_text(text)
    found = model.suggest_text(text, k=args.k)
    # A never-suggest list may hide every candidate the model has here: say so rather than show an empty list.
    blocked = adapted is not None and not found and bool(adapted.never.entries) and bool(base.suggest_text(text, k=1))
    if args.json:
        rows = []
        for s in found:
            row: dict[str, Any] = {"word": s.word, "prob": s.prob, "order": s.order}
            if adapted is not None:
                row.update(learned=s.learned, new_word=s.new_word)
            rows.append(row)
        payload: dict[str, Any] = {"model": model_name(args.model), "context": context, "prefix": prefix, "suggestions": rows}
        if adapted is not None:
            payload.update(learned_file=str(learned_file), user_share=adapted.share(context), all_blocked=blocked)
        print_json(payload)
        return 0
    print_demo_note(args.model)
    shown = " ".join(context) if context else "(sentence start)"
    print(f"context: {shown}   prefix: {prefix!r}")
    if adapted is not None:
        tokens = adapted.user.raw_tokens
        held = f"{plural(tokens, 'token')} learned" if tokens else "nothing learned yet"
        print(f"learned: {learned_file} ({held}; user model's share here {adapted.share(context):.1%}; • learned, + new word)")
        if blocked:
            print(f"every candidate here is on the never-suggest list ({', '.join(adapted.never.entries)}); see 'foretype learned show'")
    _print_suggestions(found, marks=adapted is not None, blocked=blocked)
    return 0


def _print_suggestions(found: list[Any], *, marks: bool, blocked: bool) -> None:
    """The ranked suggestions as text: rank, word, probability (four significant digits), the n-gram order used."""
    if not found and not blocked:
        print("no vocabulary word matches")
    for rank, s in enumerate(found, 1):
        mark = ("+" if s.new_word else "•" if s.learned else " ") if marks else ""
        print(f"{rank:>3}  {s.word:<24} {probability(s.prob):>10}  order {s.order} {mark}".rstrip())


def run_score(args: argparse.Namespace) -> int:
    """foretype score."""
    text = read_words(args.test, replace_bad_bytes=args.replace_bad_bytes)
    model = open_model(args.model)
    wrapped = sentence_rule(args.wrapped, model)
    result = model.score(text, wrapped=wrapped)
    payload = {
        "model": model_name(args.model),
        "wrapped": wrapped,
        "sentences": result.sentences,
        "tokens": result.tokens,
        "oov": result.oov,
        "oov_rate": result.oov_rate,
        "cross_entropy_bits": result.cross_entropy_bits,
        "perplexity": result.perplexity,
    }
    if args.json:
        print_json({k: (None if isinstance(v, float) and v != v or v == float("inf") else v) for k, v in payload.items()})
        return 0
    print_demo_note(args.model)
    print(
        f"{plural(result.sentences, 'sentence')}, {plural(result.tokens, 'token')} (words + one end per sentence), "
        f"OOV {result.oov:,} ({result.oov_rate:.2%})\n"
        f"cross-entropy {result.cross_entropy_bits:.4f} bits/token, perplexity {result.perplexity:.2f}\n"
        f"sentences read as {describe_rule(wrapped)}"
    )
    return 0


def run_info(args: argparse.Namespace) -> int:
    """foretype info."""
    model = open_model(args.model)
    info = model.info()
    info["model"] = model_name(args.model)
    info["path"] = str(model.path) if model.path else None
    info["shrink"] = model.meta.get("shrink")
    if args.json:
        print_json(info)
        return 0
    print_demo_note(args.model)
    n = info["ngrams"]
    print(
        f"{info['path']}\n"
        f"  format version   {info['format_version']}\n"
        f"  method           {info['method']}  (values {info['value_encoding']})\n"
        f"  vocabulary       {plural(info['vocab_size'], 'word')} (+ unknown, end of sentence)\n"
        f"  n-grams stored   {plural(n['1'], 'unigram')}, {plural(n['2'], 'bigram')}, {plural(n['3'], 'trigram')}\n"
        f"  possible         {info['possible_trigrams']:.3g} trigrams over this vocabulary\n"
        f"  file             {plural(info['file_bytes'], 'byte')}, {info['bytes_per_ngram']:.2f} bytes per stored n-gram\n"
        f"  corpus           {plural(info['corpus_tokens'], 'token')}\n"
        f"  queries          answered by {info['query_path_note']}"
    )
    shrunk = describe_shrink(model)
    if shrunk:
        print(f"  shrunk           {shrunk}")
    return 0


def run_check(args: argparse.Namespace) -> int:
    """foretype check."""
    if args.model is None:
        open_model(None, quiet=args.json)  # builds the demo model on first use
        from ..demo import demo_model_path

        path = str(demo_model_path())
    else:
        path = args.model
    loaded = verify_model(path)
    sections = len(loaded.sections)
    summed = held_to_sums(loaded.meta)
    if args.json:
        print_json({"model": model_name(args.model), "path": path, "ok": True, "sections": sections, "file_bytes": loaded.file_bytes, "sums_checked": summed})
    else:
        print_demo_note(args.model)
        sums = (
            "and sampled distributions sum to 1"
            if summed
            else "and the distributions were not checked for sums of 1 (imported from an ARPA file whose own probabilities do not sum to 1)"
        )
        print(
            f"{path}: ok ({plural(sections, 'section')}, {plural(loaded.file_bytes, 'byte')}): every checksum matches, "
            f"the arrays are consistent and sorted, the prefix index agrees with the words, {sums}"
        )
    return 0
