"""Commands about what a model learned from the person's own text: learned (and savings --adapt).

A learned file holds personal text, so every view of it says that it stays on
this machine and can be inspected, exported, pruned and wiped.
"""

from __future__ import annotations

import argparse
import math
import sys
import time
from collections.abc import Callable
from contextlib import nullcontext, redirect_stdout
from pathlib import Path
from typing import Any, TextIO

from ..errors import OptionError
from ..outputs import check_output, is_stdout
from ..query.model import LanguageModel
from ..text import iter_sentences
from .output import add_force_option, add_json_option, is_learned_export, is_learned_file, open_model, positive_int, print_json, progress_bar, read_words

SECONDS_PER_DAY = 86_400


def _positive_number(text: str) -> float:
    """argparse type: a finite number above 0."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not math.isfinite(value) or value <= 0:
        raise argparse.ArgumentTypeError(f"expected a positive number, got {text!r}")
    return value


def _half_life(text: str) -> float | None:
    """argparse type: a positive number of tokens, or 'none'."""
    if text.strip().lower() in ("none", "off"):
        return None
    return _positive_number(text)


def register(commands: argparse._SubParsersAction) -> None:
    """Add the learned command to the parser."""
    p = commands.add_parser(
        "learned",
        help="show, export, prune or wipe what a model learned from your typing",
        description="Show what the user model beside MODEL (MODEL.learned) has learned from the text typed with it, "
        "and change it: learn from a text file, keep words or patterns from ever being suggested, forget words, "
        "prune old or rare counts, switch learning off, export everything to JSON, or wipe it. "
        "A learned file holds personal text: it stays on this machine and foretype never sends it anywhere. "
        "Example: foretype learned chat.model --never-suggest 'dam*' --forget Gorbalt",
    )
    p.add_argument("model", nargs="?", help="model file (default: the demo model)")
    p.add_argument("--user", metavar="FILE", help="the learned file (default: MODEL.learned beside the model)")
    p.add_argument("--words", type=positive_int, default=12, metavar="N", help="list the N most used words and new words (default 12)")
    p.add_argument("--learn", metavar="TEXTFILE", help="learn from a text file of your own writing (kept whole or not at all; '-': standard input)")
    p.add_argument("--replace-bad-bytes", action="store_true", help="with --learn: replace invalid UTF-8 instead of failing")
    p.add_argument("--never-suggest", action="append", default=[], metavar="ENTRY", help="never suggest this word, or any word matching a pattern such as 'dam*' (repeatable)")
    p.add_argument("--allow", action="append", default=[], metavar="ENTRY", help="take a word or pattern off the never-suggest list (repeatable)")
    p.add_argument("--forget", action="append", default=[], metavar="WORD", help="remove every count of a word (repeatable)")
    p.add_argument("--prune-below", type=_positive_number, metavar="C", help="drop counts below C (after decay)")
    p.add_argument("--prune-older-than", type=_positive_number, metavar="DAYS", help="drop counts last seen more than DAYS days ago")
    p.add_argument("--learning", choices=("on", "off"), help="switch learning on or off (kept in the learned file)")
    p.add_argument("--min-uses", type=positive_int, metavar="N", help="uses before a word new to the model is suggested")
    p.add_argument("--half-life", type=_half_life, default=argparse.SUPPRESS, metavar="TOKENS", help="let counts halve after TOKENS more learned tokens ('none': never)")
    p.add_argument("--export", metavar="FILE", help="write everything learned to a plain JSON file ('-': standard output)")
    add_force_option(p, "the --export file")
    p.add_argument("--wipe", action="store_true", help="delete the learned file")
    add_json_option(p)
    p.set_defaults(handler=run_learned)


def _changes_asked(args: argparse.Namespace) -> bool:
    return bool(
        args.learn
        or args.never_suggest
        or args.allow
        or args.forget
        or args.prune_below is not None
        or args.prune_older_than is not None
        or args.learning
        or args.min_uses is not None
        or hasattr(args, "half_life")
    )


def run_learned(args: argparse.Namespace) -> int:
    """foretype learned."""
    from ..adapt.store import PRIVACY_NOTE, LearnedFile, default_learned_path, export_learned, learned_file_facts, load_learned, wipe_learned

    path = Path(args.user) if args.user else default_learned_path(args.model)
    if args.wipe:
        return _wipe(args, path, wipe_learned)
    if args.export:
        check_output(args.export, inputs=[args.model, path, args.learn], kind=is_learned_export, kind_name="learned export", force=args.force, option="--export")
    base = open_model(args.model)
    changes: list[str] = []
    if _changes_asked(args):
        with LearnedFile(path, base) as learned:
            if learned.converted_from is not None:
                changes.append(f"converted {path} to the current format; the old file is kept as {learned.converted_from}")
            _apply_changes(args, learned, changes)
            model = learned.model
    else:
        model = load_learned(path, base)
    exported = None
    if args.export:
        exported = export_learned(model, args.export)
        changes.append(f"exported to {args.export}: {exported['words']:,} words, {exported['bigrams']:,} bigrams, {exported['trigrams']:,} trigrams")
    facts = learned_file_facts(path)
    summary = _summary(model, base, path, facts, args.words)
    if args.json and not (args.export and is_stdout(args.export)):
        summary["changes"] = changes
        summary["note"] = PRIVACY_NOTE
        print_json(summary)
        return 0
    _print_summary(summary, changes, PRIVACY_NOTE, sys.stderr if args.export and is_stdout(args.export) else sys.stdout)
    return 0


def _wipe(args: argparse.Namespace, path: Path, wipe_learned: Callable[[Path], bool]) -> int:
    """--wipe: delete the learned file, alone."""
    if _changes_asked(args) or args.export:
        raise OptionError("--wipe deletes the learned file; give it alone")
    removed = wipe_learned(path)
    if args.json:
        print_json({"learned_file": str(path), "removed": removed})
    else:
        print(f"removed {path}: everything learned is gone" if removed else f"no learned file at {path}: nothing to remove")
    return 0


def _print_summary(summary: dict[str, Any], changes: list[str], note: str, stream: TextIO) -> None:
    """The changes made, the summary and the privacy note as text."""
    for line in changes:
        print(line, file=stream)
    if changes:
        print(file=stream)
    print(_format_summary(summary), file=stream)
    print(file=stream)
    print(note, file=stream)


def _apply_changes(args: argparse.Namespace, learned: Any, changes: list[str]) -> None:
    """Apply the asked changes in a fixed order: settings, learn, never list, forget, prune."""
    _apply_settings(args, learned, changes)
    if args.learn:
        _learn_from_file(args, learned, changes)
    _apply_never_list(args, learned, changes)
    for word in args.forget:
        changes.append(f"forgot {word!r}" if learned.forget(word) else f"nothing learned about {word!r}")
    if args.prune_below is not None or args.prune_older_than is not None:
        before = None if args.prune_older_than is None else int(time.time() - args.prune_older_than * SECONDS_PER_DAY)
        dropped = learned.prune(below=args.prune_below, seen_before=before)
        changes.append(f"pruned {dropped:,} counts")


def _apply_settings(args: argparse.Namespace, learned: Any, changes: list[str]) -> None:
    """Learning on or off, min uses and half-life, as asked."""
    updates: dict[str, Any] = {}
    if args.learning:
        updates["learning"] = args.learning == "on"
    if args.min_uses is not None:
        updates["min_uses"] = args.min_uses
    if hasattr(args, "half_life"):
        updates["half_life"] = args.half_life
    if updates:
        learned.set_settings(learned.model.settings.changed(**updates))
        changes.append("settings: " + ", ".join(f"{key.replace('_', ' ')} {_setting_text(key, value)}" for key, value in updates.items()))


def _learn_from_file(args: argparse.Namespace, learned: Any, changes: list[str]) -> None:
    """Learn every sentence of a text file (learning must be on)."""
    if not learned.model.settings.learning:
        raise OptionError("learning is off for this model; switch it on with --learning on to learn from a file")
    sentences = list(iter_sentences(read_words(args.learn, replace_bad_bytes=args.replace_bad_bytes)))
    with progress_bar(f"learning from {args.learn}") as update:
        tokens = learned.learn_sentences(sentences, progress=update)
    changes.append(f"learned {tokens:,} tokens ({len(sentences):,} sentences) from {args.learn}")


def _apply_never_list(args: argparse.Namespace, learned: Any, changes: list[str]) -> None:
    """Add words or patterns to the never-suggest list, or allow them again."""
    if args.never_suggest:
        added = learned.add_never(args.never_suggest)
        changes.append(f"never suggest: added {', '.join(added)}" if added else "never suggest: already listed")
    if args.allow:
        removed = learned.remove_never(args.allow)
        changes.append(f"never suggest: removed {', '.join(removed)}" if removed else "never suggest: none of those was listed")


def _setting_text(key: str, value: Any) -> str:
    if key == "learning":
        return "on" if value else "off"
    if key == "half_life":
        return "none" if value is None else f"{value:g} tokens"
    return str(value)


def _summary(model: Any, base: LanguageModel, path: Path, facts: dict[str, Any], top: int) -> dict[str, Any]:
    """What ``foretype learned`` shows, as a JSON object."""
    user = model.user
    rows = sorted(user.word_rows(), key=lambda row: (-row[2], row[1]))
    new_rows = [row for row in rows if user.is_learned(row[0])]
    return {
        "learned_file": str(path),
        "exists": facts.get("exists", False),
        "file_bytes": facts.get("file_bytes"),
        "base_model": str(base.path) if base.path else None,
        "base_vocab_size": base.vocab_size,
        "settings": model.settings.to_json(),
        "tokens": user.raw_tokens,
        "distinct_words": len(rows),
        "new_words": len(new_rows),
        "suggestable_new_words": len(user.ready_forms()),
        "ngrams": user.counts_summary(),
        "share": user.shares(),
        "top_words": [{"word": user.display(i), "uses": uses, "count": count} for i, _, count, uses, _ in rows[:top]],
        "top_new_words": [{"word": user.display(i), "uses": uses, "count": count, "suggestable": user.is_ready(i)} for i, _, count, uses, _ in new_rows[:top]],
        "never_suggest": model.never.entries,
    }


def _format_summary(summary: dict[str, Any]) -> str:
    settings = summary["settings"]
    if not summary["exists"]:
        head = f"learned file: {summary['learned_file']} (none yet: nothing learned)"
    else:
        head = f"learned file: {summary['learned_file']} ({summary['file_bytes']:,} bytes)"
    half = settings["half_life"]
    ngrams = summary["ngrams"]
    lines = [
        head,
        f"  base model   {summary['base_model'] or 'the demo model'} ({summary['base_vocab_size']:,} words)",
        f"  learning     {'on' if settings['learning'] else 'off'}; new words suggested after {settings['min_uses']} use(s); "
        f"decay {'none' if half is None else f'half-life {half:g} tokens'}",
        f"  held         {summary['tokens']:,} tokens; {summary['distinct_words']:,} distinct words, {summary['new_words']:,} new to the model "
        f"({summary['suggestable_new_words']:,} suggestable); {ngrams['2']:,} bigrams, {ngrams['3']:,} trigrams",
        "  user share   " + ", ".join(f"{100 * v:.0f}% where {k.replace('_', ' ')} seen" for k, v in summary["share"].items()),
    ]
    if summary["top_words"]:
        lines.append("  most used    " + ", ".join(f"{w['word']} ({w['uses']})" for w in summary["top_words"]))
    if summary["top_new_words"]:
        lines.append("  new words    " + ", ".join(f"{w['word']} ({w['uses']}{'' if w['suggestable'] else ', not yet suggested'})" for w in summary["top_new_words"]))
    lines.append("  never suggest " + (", ".join(summary["never_suggest"]) if summary["never_suggest"] else "(nothing listed)"))
    return "\n".join(lines)


# ------------------------------------------------------------ savings --adapt
def add_adapt_options(parser: argparse.ArgumentParser) -> None:
    """Add ``--adapt``, ``--user``, ``--save-user`` and ``--block`` to the savings command."""
    parser.add_argument("--adapt", action="store_true", help="the typist's words feed a user model as they go; reports KSR with and without, and a curve")
    parser.add_argument("--user", metavar="FILE", help="with --adapt: start from this learned file (read only; never changed)")
    parser.add_argument("--save-user", metavar="FILE", help="with --adapt: write what the simulated typist's user model learned to FILE")
    add_force_option(parser, "the --trace and --save-user files")
    parser.add_argument("--block", type=positive_int, default=500, metavar="N", help="with --adapt: words per block of the savings curve (default 500)")


def check_adapt_options(args: argparse.Namespace) -> None:
    """Refuse the adaptation options without --adapt.

    Raises:
        OptionError: --user, --save-user or --block given without --adapt.
    """
    if not getattr(args, "adapt", False) and (args.user or args.save_user or args.block != 500):
        raise OptionError("--user, --save-user and --block go with --adapt")


def run_adaptive_savings(args: argparse.Namespace, model: LanguageModel, text: str, settings: Any) -> int:
    """foretype savings --adapt: simulate with learning, print both reports' figures and the curve."""
    from ..adapt import AdaptedModel
    from ..adapt.simulation import format_adaptation, simulate_adaptive
    from ..adapt.store import load_learned, save_learned
    from ..simulate import format_report, write_trace

    if args.save_user:
        model_path = getattr(args, "model_path", None)
        check_output(
            args.save_user,
            inputs=[model_path, getattr(args, "text_path", None), args.user, args.trace],
            kind=is_learned_file,
            kind_name="learned file",
            force=args.force,
            option="--save-user",
        )
    start = load_learned(args.user, model, must_exist=True) if args.user else AdaptedModel(model)
    with progress_bar("typing the test text, learning as it goes") as update:
        result = simulate_adaptive(model, text, settings, update, start=start, block_words=args.block)
    if args.trace:
        write_trace(args.trace, result.adapted.trace)
    if args.save_user:
        save_learned(start, args.save_user)
    with redirect_stdout(sys.stderr) if args.trace and is_stdout(args.trace) else nullcontext():
        if args.json:
            payload = result.adapted.to_json()
            payload["adaptation"] = result.to_json()
            print_json(payload)
            return 0
        print(format_report(result.adapted))
        print()
        print(format_adaptation(result))
        if args.trace:
            print(f"trace: {args.trace} ({len(result.adapted.trace):,} lines)")
        if args.save_user:
            print(f"wrote what the simulated typist learned to {args.save_user}")
    return 0
