"""Build throughput end to end, with the compiled tokeniser and without it, side by side in one run.

Builds the synthetic corpus of ``bench/corpus.py`` (5 million tokens and
50,000 words by default, as bench/bench_engine.py) end to end: count (tokenising workers), estimate and index, write.
Rounds alternate between the default path (the compiled tokeniser where it is
built) and ``FORETYPE_PURE=1`` (the regular expression and the dictionary),
so both see the same machine load; the counts of both must be identical.
Prints the median seconds of each phase (and the CPU seconds of the build
process and of its tokenising workers, less sensitive to load), tokens per second and their ratio,
with the load average and the machine yardstick (bench/machine.py), and
writes bench/out/build-<time>.json and bench/out/build-latest.json.

    python bench/bench_build.py [--tokens 5000000] [--rounds 2] [--vocab 50000]
"""

from __future__ import annotations

import argparse
import gc
import json
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

import corpus as bench_corpus  # noqa: E402
from machine import describe, finish_facts, machine_facts  # noqa: E402

import foretype  # noqa: E402
from foretype.counting import tokenisers  # noqa: E402

PATHS = ("compiled", "pure")
TARGET_TOKENS_PER_SECOND = 2_000_000


def build_once(corpus: Path, out: Path, pure: bool, vocab_size: int | None) -> tuple[dict[str, float], Any]:
    """One build end to end; returns the seconds of each phase and the counts."""
    if pure:
        os.environ[tokenisers.PURE_ENV] = "1"
    else:
        os.environ.pop(tokenisers.PURE_ENV, None)
    try:
        gc.collect()
        c0 = os.times()
        t0 = time.perf_counter()
        counts = foretype.count_corpus([corpus])
        t1 = time.perf_counter()
        c1 = os.times()
        model = foretype.build_from_counts(counts, vocab_size=vocab_size)
        t2 = time.perf_counter()
        c2 = os.times()
        model.save(out, force=True)
        t3 = time.perf_counter()
    finally:
        os.environ.pop(tokenisers.PURE_ENV, None)
    seconds = {"count": t1 - t0, "estimate_and_index": t2 - t1, "write": t3 - t2, "total": t3 - t0}
    # CPU seconds, which load on the machine inflates far less than wall-clock seconds: the build
    # process's own, and its tokenising workers' (reaped when the count's pool closes).
    seconds["count_cpu_main"] = (c1.user + c1.system) - (c0.user + c0.system)
    seconds["count_cpu_workers"] = (c1.children_user + c1.children_system) - (c0.children_user + c0.children_system)
    seconds["estimate_and_index_cpu"] = (c2.user + c2.system) - (c1.user + c1.system)
    return seconds, counts


def same_counts(a: Any, b: Any) -> bool:
    """Every type, display form and count equal, to the last trigram."""
    if a.types != b.types or a.display != b.display or a.corpus_tokens != b.corpus_tokens or a.sentences != b.sentences:
        return False
    return all(np.array_equal(getattr(getattr(a, t), c), getattr(getattr(b, t), c)) for t in ("table", "heldout") for c in "uvwn")


def main(argv: list[str] | None = None) -> int:
    """Run the benchmark and print its table."""
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--tokens", type=int, default=5_000_000, help="synthetic corpus tokens")
    parser.add_argument("--rounds", type=int, default=2, help="builds per path (alternating)")
    parser.add_argument("--vocab", type=int, default=50_000, help="vocabulary size (0: every word; default 50,000, as bench_engine.py)")
    args = parser.parse_args(argv)
    bench_corpus.OUT.mkdir(parents=True, exist_ok=True)
    results: dict[str, Any] = {"machine": machine_facts(), "compiled_tokeniser_built": tokenisers.number_tokens is not None}
    corpus, _ = bench_corpus.synthetic_corpus(args.tokens)
    runs: dict[str, list[dict[str, float]]] = {name: [] for name in PATHS}
    identical = True
    tokens = 0
    with tempfile.TemporaryDirectory(dir=bench_corpus.OUT) as folder:
        for round_number in range(args.rounds):
            order = PATHS if round_number % 2 == 0 else PATHS[::-1]
            found = {}
            for name in order:
                seconds, counts = build_once(corpus, Path(folder) / f"{name}.model", name == "pure", args.vocab or None)
                runs[name].append(seconds)
                found[name] = counts
                tokens = counts.corpus_tokens
                print(f"round {round_number + 1} {name:8s} {seconds['total']:6.2f} s", flush=True)
            identical = identical and same_counts(found["compiled"], found["pure"])
            del found
    finish_facts(results["machine"])
    results["corpus_tokens"] = tokens
    results["vocab_size"] = args.vocab or "every word"
    results["counts_identical"] = identical
    for name in PATHS:
        medians = {phase: statistics.median(r[phase] for r in runs[name]) for phase in runs[name][0]}
        results[name] = {"runs": runs[name], "median_seconds": medians, "tokens_per_second": tokens / medians["total"]}
    results["ratio_total_pure_over_compiled"] = results["pure"]["median_seconds"]["total"] / results["compiled"]["median_seconds"]["total"]
    machine = results["machine"]
    print(f"\nload average {machine['load_average_at_start']} -> {machine['load_average_at_end']} on {machine['cpus']} cores")
    print(f"{describe(machine['yardstick_at_start'])} at start; {describe(machine['yardstick_at_end'])} at end")
    print(f"{tokens:,} tokens, vocabulary {results['vocab_size']}, {args.rounds} rounds per path, medians in seconds")
    for name in PATHS:
        m = results[name]["median_seconds"]
        print(
            f"  {name:8s} count {m['count']:6.2f}  estimate+index {m['estimate_and_index']:6.2f}  write {m['write']:5.2f}  "
            f"total {m['total']:6.2f}  -> {results[name]['tokens_per_second'] / 1e6:.2f} M tokens/s"
        )
        print(
            f"  {'':8s} CPU seconds: count {m['count_cpu_main']:.2f} here + {m['count_cpu_workers']:.2f} in workers, "
            f"estimate+index {m['estimate_and_index_cpu']:.2f}"
        )
    print(f"  pure/compiled total: {results['ratio_total_pure_over_compiled']:.2f}; counts identical: {identical}; "
          f"target >= {TARGET_TOKENS_PER_SECOND / 1e6:.0f} M tokens/s")
    stamp = time.strftime("%Y%m%d-%H%M%S")
    text = json.dumps(results, indent=2)
    (bench_corpus.OUT / f"build-{stamp}.json").write_text(text, encoding="utf-8")
    (bench_corpus.OUT / "build-latest.json").write_text(text, encoding="utf-8")
    return 0 if identical else 1


if __name__ == "__main__":
    raise SystemExit(main())
