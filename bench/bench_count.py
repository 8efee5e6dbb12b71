"""Counting throughput into a count store: the single process against 1 and 2 local Dask workers.

Counts the same synthetic corpus (bench/corpus.py) three ways, side by side in
one run: the single-process path, a LocalCluster of one worker process and
one of two (each cluster started before its timer starts, so the figure is
the count, not the cluster's start-up).  Prints tokens per second, the time
of each Dask stage (pass 1: tokenise and count forms; vocabulary; pass 2:
tokenise again and count trigrams; write), the bytes each worker sent to the
other workers (Dask's own transfer counter), and checks the three stores are
byte-identical.  Writes bench/out/bench_count.json.

    python bench/bench_count.py [--tokens 2000000] [--block-size 2M]
"""

from __future__ import annotations

import argparse
import json
import logging
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import corpus as bench_corpus  # noqa: E402
from machine import describe, finish_facts, machine_facts  # noqa: E402

from foretype.counting.memory import parse_size  # noqa: E402
from foretype.counting.store_count import count_to_store  # noqa: E402


def _count(corpus: Path, out: Path, block: int, workers: int | None) -> dict:
    if workers is None:
        started = time.perf_counter()
        summary = count_to_store([corpus], out, spill_dir=out.parent)
        seconds = time.perf_counter() - started
        return {"path": "single process", "seconds": seconds, "tokens": summary.tokens, "stages": summary.seconds, "shuffle_bytes": {}, "tasks": 0}
    from distributed import LocalCluster

    cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, host="127.0.0.1", dashboard_address=None, silence_logs=logging.ERROR)
    try:
        started = time.perf_counter()
        summary = count_to_store([corpus], out, cluster=cluster.scheduler_address, block_bytes=block)
        seconds = time.perf_counter() - started
    finally:
        cluster.close()
    return {
        "path": f"Dask, {workers} local worker{'s' if workers > 1 else ''}",
        "seconds": seconds,
        "tokens": summary.tokens,
        "stages": summary.seconds,
        "shuffle_bytes": summary.shuffle_bytes,
        "tasks": summary.tasks,
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--tokens", type=int, default=2_000_000)
    parser.add_argument("--block-size", default="2M")
    args = parser.parse_args()
    machine = machine_facts()
    corpus, _ = bench_corpus.synthetic_corpus(tokens=args.tokens, heldout_tokens=10_000)
    block = parse_size(args.block_size)
    folder = Path(tempfile.mkdtemp(prefix="bench-count-", dir=bench_corpus.OUT))
    rows = []
    try:
        for workers in (None, 1, 2):
            rows.append(_count(corpus, folder / f"store-{workers}", block, workers))
        same = all(
            subprocess.run(["diff", "-r", str(folder / "store-None"), str(folder / f"store-{w}")], capture_output=True).returncode == 0 for w in (1, 2)
        )
        store_bytes = sum(p.stat().st_size for p in (folder / "store-None").rglob("*") if p.is_file())
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    finish_facts(machine)
    base = rows[0]["seconds"]
    print(f"corpus: {corpus.name}, {corpus.stat().st_size / 1e6:.1f} MB, {rows[0]['tokens']:,} tokens; Dask blocks of {block / 2**20:.1f} MiB; store {store_bytes / 1e6:.1f} MB")
    print(f"{'path':<24}{'seconds':>9}{'M tokens/s':>12}{'vs single':>11}{'pass 1 s':>10}{'vocab s':>9}{'pass 2 s':>10}{'write s':>9}{'tasks':>7}  bytes sent per worker")
    for row in rows:
        stages = row["stages"]
        sent = ", ".join(f"{v / 1e6:.2f} MB" for v in row["shuffle_bytes"].values()) or "-"
        print(
            f"{row['path']:<24}{row['seconds']:>9.2f}{row['tokens'] / row['seconds'] / 1e6:>12.3f}{base / row['seconds']:>11.2f}"
            f"{stages.get('pass1', 0):>10.2f}{stages.get('vocabulary', 0):>9.2f}{stages.get('pass2', 0):>10.2f}{stages.get('write', 0):>9.2f}{row['tasks']:>7}  {sent}"
        )
    print(f"stores identical: {same}")
    print(describe(machine["yardstick_at_start"]), "(start);", describe(machine["yardstick_at_end"]), "(end)")
    bench_corpus.OUT.mkdir(parents=True, exist_ok=True)
    result = {"corpus": str(corpus), "corpus_bytes": corpus.stat().st_size, "block_bytes": block, "store_bytes": store_bytes, "identical": same, "rows": rows, "machine": machine}
    (bench_corpus.OUT / "bench_count.json").write_text(json.dumps(result, indent=2) + "\n")


if __name__ == "__main__":
    main()
