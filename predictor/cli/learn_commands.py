"""``foretype learned ACTION``: what a model learned from the person's own text, one verb per action (and savings --adapt).

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

from ..errors import ModelFileError, OptionError, OutputError
from ..outputs import check_output, is_stdout
from ..query.model import LanguageModel
from ..text import iter_sentences, plural
from .output import (
    add_force_option,
    add_json_option,
    add_model_option,
    is_learned_export,
    is_learned_file,
    model_name,
    open_model,
    positive_int,
    print_demo_note,
    print_json,
    progress_bar,
    read_words,
)

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


ACTIONS = ("show", "feed", "export", "prune", "forget", "block", "unblock", "set", "on", "off", "wipe")
"""The verbs of ``foretype learned``, in help order."""


def register(commands: argparse._SubParsersAction) -> None:
    """Add the learned command group to the parser."""
    group = commands.add_parser(
        "learned",
        help="show, feed, export, prune or wipe what a model learned from your typing",
        description="What the user model beside a model (MODEL.learned) has learned from the text typed with it, one action each: "
        "show it, feed it a text of your own, export it to JSON, prune old or rare counts, forget words, block words or "
        "patterns from ever being suggested, change its settings, switch learning on or off, or wipe it. "
        "A learned file holds personal text: it stays on this machine and foretype never sends it anywhere. "
        "Example: foretype learned block -m chat.model 'dam*'",
    )
    common = argparse.ArgumentParser(add_help=False)
    add_model_option(common, "the model whose learned file this is")
    common.add_argument("--user", metavar="FILE", help="the learned file (default: MODEL.learned beside the model)")
    add_json_option(common)
    actions = group.add_subparsers(dest="action", metavar="{" + ",".join(ACTIONS) + "}", parser_class=type(group), required=True)

    def action(name: str, summary: str, handler: Callable[[argparse.Namespace], int]) -> argparse.ArgumentParser:
        p = actions.add_parser(name, parents=[common], help=summary, description=summary[0].upper() + summary[1:] + ".")
        p.set_defaults(handler=handler)
        return p

    p = action("show", "list what was learned: settings, counts, most used and new words, the never-suggest list", run_show)
    p.add_argument("--words", dest="top", type=positive_int, default=12, metavar="N", help="list the N most used words and new words (default 12)")
    p = action("feed", "learn from a text file of your own writing (kept whole or not at all)", run_feed)
    p.add_argument("text", metavar="TEXTFILE", help="the text to learn from ('-': standard input)")
    p.add_argument("--replace-bad-bytes", action="store_true", help="replace invalid UTF-8 instead of failing")
    p = action("export", "write everything learned to a plain JSON file", run_export)
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="the JSON file to write ('-': standard output)")
    add_force_option(p, "the output")
    p = action("prune", "drop rare or old counts", run_prune)
    p.add_argument("--below", type=_positive_number, metavar="C", help="drop counts below C (after decay)")
    p.add_argument("--older-than", type=_positive_number, metavar="DAYS", help="drop counts last seen more than DAYS days ago")
    p = action("forget", "remove every count of these words", run_forget)
    p.add_argument("words", nargs="+", metavar="WORD")
    p = action("block", "never suggest these words, or words matching patterns such as 'dam*'", run_block)
    p.add_argument("entries", nargs="+", metavar="ENTRY")
    p = action("unblock", "take words or patterns off the never-suggest list", run_unblock)
    p.add_argument("entries", nargs="+", metavar="ENTRY")
    p = action("set", "change how learning works: uses before a new word is offered, the typo check, the user model's share, decay", run_set)
    p.add_argument("--min-uses", type=positive_int, metavar="N", help="uses before a word new to the model is suggested")
    p.add_argument(
        "--hold-slips",
        action=argparse.BooleanOptionalAction,
        default=None,
        help="hold back, for one more use, a new word that a slip of the finger on a word already used would give (default for new files: on)",
    )
    p.add_argument(
        "--share-rule",
        choices=SHARE_RULE_NAMES,
        default=None,
        help="how the user model's share follows its estimated worth (default for new files: sharpened; online: the rule of older files)",
    )
    p.add_argument("--half-life", type=_half_life, default=argparse.SUPPRESS, metavar="TOKENS", help="let counts halve after TOKENS more learned tokens ('none': never)")
    action("on", "switch learning on (kept in the learned file)", run_switch).set_defaults(learning=True)
    action("off", "switch learning off (kept in the learned file; what was learned stays until wiped)", run_switch).set_defaults(learning=False)
    action("wipe", "delete the learned file: everything learned is gone", run_wipe)


SHARE_RULE_NAMES = ("sharpened", "online")
"""The user-model share rules (``foretype.adapt.share_rule.SHARE_RULES``, written out so the command line starts without the learning code)."""


def _learned_path(args: argparse.Namespace) -> Path:
    from ..adapt.store import default_learned_path

    return Path(args.user) if args.user else default_learned_path(args.model)


def check_learned_store(path: Path) -> None:
    """Refuse, before any lock file is made beside it, a path that cannot hold a learned file or holds something else.

    Raises:
        OptionError: ``-`` (a learned file is an SQLite database, not a stream).
        OutputError: a folder, device or FIFO; a missing or read-only folder.
        ModelFileError: an existing file that is not a learned file (exit 5).
    """
    if is_stdout(path):
        raise OptionError("a learned file is an SQLite database: it cannot be '-' (standard output)")
    if path.exists() and not path.is_file():
        raise OutputError(f"{path}: not a regular file; a learned file is an SQLite database and needs one")
    if path.is_file() and path.stat().st_size and not is_learned_file(path):
        raise ModelFileError(f"{path}: not a foretype learned file")
    check_output(path, force=True)


def check_learned_output(path: str, *, inputs: list[str | None], force: bool) -> None:
    """Check ``savings --save-user FILE`` before any work (see :func:`check_learned_store`; other files need --force)."""
    if is_stdout(path):
        raise OptionError("--save-user writes an SQLite learned file: it cannot be '-' (standard output)")
    if Path(path).exists() and not Path(path).is_file():
        raise OutputError(f"{path}: not a regular file; a learned file is an SQLite database and needs one")
    check_output(path, inputs=inputs, kind=is_learned_file, kind_name="learned file", force=force, option="--save-user")


def _change(args: argparse.Namespace, apply: Callable[[Any, list[str]], None]) -> int:
    """Open the learned file for writing, apply one change, then show the result."""
    from ..adapt.store import LearnedFile

    path = _learned_path(args)
    check_learned_store(path)
    base = open_model(args.model)
    changes: list[str] = []
    with LearnedFile(path, base) as learned:
        if learned.converted_from is not None:
            changes.append(f"converted {path} to the current format; the old file is kept as {learned.converted_from}")
        apply(learned, changes)
        model = learned.model
    return _report(args, model, base, path, changes)


def _report(args: argparse.Namespace, model: Any, base: LanguageModel, path: Path, changes: list[str], stream: TextIO | None = None) -> int:
    from ..adapt.store import PRIVACY_NOTE, learned_file_facts

    summary = _summary(model, base, path, learned_file_facts(path), getattr(args, "top", 12))
    if args.json and stream is None:
        print_json({"model": model_name(args.model), **summary, "changes": changes, "note": PRIVACY_NOTE})
        return 0
    out = stream if stream is not None else sys.stdout
    print_demo_note(args.model, out)
    _print_summary(summary, changes, PRIVACY_NOTE, out)
    return 0


def run_show(args: argparse.Namespace) -> int:
    """foretype learned show."""
    from ..adapt.store import load_learned

    path = _learned_path(args)
    base = open_model(args.model)
    return _report(args, load_learned(path, base), base, path, [])


def run_feed(args: argparse.Namespace) -> int:
    """foretype learned feed TEXTFILE: learn every sentence of a text (learning must be on)."""
    text = read_words(args.text, replace_bad_bytes=args.replace_bad_bytes)

    def feed(learned: Any, changes: list[str]) -> None:
        if not learned.model.settings.learning:
            raise OptionError("learning is off for this model; switch it on with 'foretype learned on' to learn from a file")
        sentences = list(iter_sentences(text))
        with progress_bar(f"learning from {args.text}") as update:
            tokens = learned.learn_sentences(sentences, progress=update)
        changes.append(f"learned {plural(tokens, 'token')} ({plural(len(sentences), 'sentence')}) from {args.text}")

    return _change(args, feed)


def run_export(args: argparse.Namespace) -> int:
    """foretype learned export -o FILE."""
    from ..adapt.store import export_learned, load_learned

    path = _learned_path(args)
    check_output(args.output, inputs=[args.model, path], kind=is_learned_export, kind_name="learned export", force=args.force, option="-o")
    base = open_model(args.model)
    model = load_learned(path, base)
    exported = export_learned(model, args.output)
    changes = [
        f"exported to {'standard output' if is_stdout(args.output) else args.output}: {plural(exported['words'], 'word')}, {plural(exported['bigrams'], 'bigram')}, {plural(exported['trigrams'], 'trigram')}"
    ]
    return _report(args, model, base, path, changes, sys.stderr if is_stdout(args.output) else None)


def run_prune(args: argparse.Namespace) -> int:
    """foretype learned prune --below C --older-than DAYS."""
    if args.below is None and args.older_than is None:
        raise OptionError("prune needs --below C, --older-than DAYS or both")

    def prune(learned: Any, changes: list[str]) -> None:
        before = None if args.older_than is None else int(time.time() - args.older_than * SECONDS_PER_DAY)
        dropped = learned.prune(below=args.below, seen_before=before)
        changes.append(f"pruned {plural(dropped, 'count')}")

    return _change(args, prune)


def run_forget(args: argparse.Namespace) -> int:
    """foretype learned forget WORD..."""

    def forget(learned: Any, changes: list[str]) -> None:
        for word in args.words:
            changes.append(f"forgot {word!r}" if learned.forget(word) else f"nothing learned about {word!r}")

    return _change(args, forget)


def run_block(args: argparse.Namespace) -> int:
    """foretype learned block ENTRY...: never suggest these words or patterns."""

    def block(learned: Any, changes: list[str]) -> None:
        added = learned.add_never(args.entries)
        changes.append(f"never suggest: added {', '.join(added)}" if added else "never suggest: already listed")

    return _change(args, block)


def run_unblock(args: argparse.Namespace) -> int:
    """foretype learned unblock ENTRY...: suggest these again."""

    def unblock(learned: Any, changes: list[str]) -> None:
        removed = learned.remove_never(args.entries)
        changes.append(f"never suggest: removed {', '.join(removed)}" if removed else "never suggest: none of those was listed")

    return _change(args, unblock)


def run_set(args: argparse.Namespace) -> int:
    """foretype learned set --min-uses N --hold-slips --share-rule RULE --half-life TOKENS."""
    updates: dict[str, Any] = {}
    if args.min_uses is not None:
        updates["min_uses"] = args.min_uses
    if args.hold_slips is not None:
        updates["hold_slips"] = args.hold_slips
    if args.share_rule is not None:
        updates["share_rule"] = args.share_rule
    if hasattr(args, "half_life"):
        updates["half_life"] = args.half_life
    if not updates:
        raise OptionError("set needs at least one of --min-uses N, --hold-slips/--no-hold-slips, --share-rule RULE, --half-life TOKENS")
    return _change(args, lambda learned, changes: _apply_settings(learned, updates, changes))


def run_switch(args: argparse.Namespace) -> int:
    """foretype learned on / off."""
    return _change(args, lambda learned, changes: _apply_settings(learned, {"learning": args.learning}, changes))


def _apply_settings(learned: Any, updates: dict[str, Any], changes: list[str]) -> None:
    learned.set_settings(learned.model.settings.changed(**updates))
    changes.append("settings: " + ", ".join(f"{key.replace('_', ' ')} {_setting_text(key, value)}" for key, value in updates.items()))


def run_wipe(args: argparse.Namespace) -> int:
    """foretype learned wipe: delete the learned file (only ever a learned file)."""
    from ..adapt.store import wipe_learned

    path = _learned_path(args)
    check_learned_store(path)
    removed = wipe_learned(path)
    if args.json:
        print_json({"model": model_name(args.model), "learned_file": str(path), "removed": removed})
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


def _setting_text(key: str, value: Any) -> str:
    if key in ("learning", "hold_slips"):
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
        head = f"learned file: {summary['learned_file']} ({plural(summary['file_bytes'], 'byte')})"
    half = settings["half_life"]
    ngrams = summary["ngrams"]
    lines = [
        head,
        f"  base model   {summary['base_model'] or 'the demo model'} ({plural(summary['base_vocab_size'], 'word')})",
        f"  learning     {'on' if settings['learning'] else 'off'}; new words suggested after {plural(settings['min_uses'], 'use')}"
        f"{' (a possible typo after one more)' if settings.get('hold_slips') else ''}; share rule {settings.get('share_rule', 'online')}; "
        f"decay {'none' if half is None else f'half-life {half:g} tokens'}",
        f"  held         {plural(summary['tokens'], 'token')}; {plural(summary['distinct_words'], 'distinct word')}, {summary['new_words']:,} new to the model "
        f"({summary['suggestable_new_words']:,} suggestable); {plural(ngrams['2'], 'bigram')}, {plural(ngrams['3'], 'trigram')}",
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
    parser.add_argument(
        "--adapt",
        action=argparse.BooleanOptionalAction,
        default=False,
        help="the typist's words feed a user model as they go; reports KSR with and without, and a curve (default off)",
    )
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
        check_learned_output(args.save_user, inputs=[args.model, args.test, args.user, args.trace], force=args.force)
    start = load_learned(args.user, model, must_exist=True) if args.user else AdaptedModel(model)
    with progress_bar("typing the test text, learning as it goes") as update:
        result = simulate_adaptive(model, text, settings, update, start=start, block_words=args.block)
    if args.trace:
        write_trace(args.trace, result.adapted.trace)
    if args.save_user:
        save_learned(start, args.save_user)
    with redirect_stdout(sys.stderr) if args.trace and is_stdout(args.trace) else nullcontext():
        if args.json:
            payload = {"model": model_name(args.model), **result.adapted.to_json()}
            payload["adaptation"] = result.to_json()
            print_json(payload)
            return 0
        print_demo_note(args.model)
        print(format_report(result.adapted))
        print()
        print(format_adaptation(result))
        if args.trace:
            print(f"trace: {args.trace} ({plural(len(result.adapted.trace), 'line')})")
        if args.save_user:
            print(f"wrote what the simulated typist learned to {args.save_user}")
    return 0
