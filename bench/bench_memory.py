"""Peak memory of a build from a corpus several times larger than --max-memory.

Generates a multi-gigabyte corpus in a temporary folder (deleted afterwards),
builds a model from it with ``foretype build --max-memory LIMIT`` in a child
process, and prints the child's peak resident memory (sampled with psutil and
read back from the kernel's ru_maxrss) beside the limit.  Also prints zlib's
CRC-32 speed and the load time of the model built, the figures behind the
choice to check every section's checksum on every load.

The corpus is an invented language built to stress counting, not estimation:

* 20,000 frequent words walk a first-order Markov chain (each word has six
  likely successors), so the model over those words stays small;
* one token in ten is replaced by one of 1,000,000 rarer words drawn
  uniformly, so the trigram table over *all* words grows with the corpus
  (tens of millions of distinct trigrams) and must be spilled to disk, while
  a 20,000-word vocabulary maps the rare words to ``<unk>`` and collapses it.

Run::

    python bench/bench_memory.py                       # 3 GB corpus, --max-memory 1G
    python bench/bench_memory.py --gigabytes 0.3 --max-memory 400M   # a quick look
"""

from __future__ import annotations

import argparse
import json
import shutil
import subprocess
import sys
import tempfile
import threading
import time
import zlib
from pathlib import Path

import numpy as np
import psutil

sys.path.insert(0, str(Path(__file__).resolve().parent))
from corpus import invented_forms  # noqa: E402

HEAD_WORDS = 20_000
RARE_WORDS = 1_000_000
SUCCESSORS = 6
RARE_SHARE = 0.10
MEAN_SENTENCE = 12
BATCH_SENTENCES = 100_000


def generate(path: Path, gigabytes: float, seed: int = 7) -> int:
    """Write the corpus (one sentence per line) and return its size in bytes."""
    rng = np.random.default_rng(seed)
    forms = invented_forms(HEAD_WORDS + RARE_WORDS, rng)
    # Rare words get a mark so they never collide with a frequent word's form.
    words = [f.encode() for f in forms[:HEAD_WORDS]] + [b"q" + f.encode() for f in forms[HEAD_WORDS:]]
    # Entry 2w is word w and a space, entry 2w + 1 word w ending a sentence.
    entries = [e for w in words for e in (w + b" ", w + b" .\n")]
    blob = np.frombuffer(b"".join(entries), dtype=np.uint8)
    entry_length = np.array([len(e) for e in entries], dtype=np.int64)
    entry_start = np.cumsum(entry_length) - entry_length
    zipf = 1.0 / np.arange(1, HEAD_WORDS + 1)
    cumulative = np.cumsum(zipf / zipf.sum())
    successors = np.searchsorted(cumulative, rng.random((HEAD_WORDS, SUCCESSORS)), side="right").clip(0, HEAD_WORDS - 1)
    target = int(gigabytes * 1e9)
    written = 0
    longest = 4 * MEAN_SENTENCE
    with path.open("wb") as out:
        while written < target:
            lengths = np.minimum(rng.geometric(1 / MEAN_SENTENCE, BATCH_SENTENCES), longest)
            ids = np.empty((BATCH_SENTENCES, longest), dtype=np.int64)
            state = np.searchsorted(cumulative, rng.random(BATCH_SENTENCES), side="right").clip(0, HEAD_WORDS - 1)
            ids[:, 0] = state
            for step in range(1, longest):
                pick = np.minimum(rng.geometric(0.5, BATCH_SENTENCES) - 1, SUCCESSORS - 1)
                state = successors[state, pick]
                ids[:, step] = state
            swap = rng.random(ids.shape) < RARE_SHARE
            ids[swap] = HEAD_WORDS + rng.integers(0, RARE_WORDS, int(swap.sum()))
            valid = np.arange(longest) < lengths[:, None]
            last = np.arange(longest) == (lengths - 1)[:, None]
            chosen = 2 * ids[valid] + last[valid]
            # Gather every entry's bytes at once: output byte i comes from blob[source[i]].
            length = entry_length[chosen]
            placed = np.cumsum(length) - length
            source = np.repeat(entry_start[chosen] - placed, length) + np.arange(int(length.sum()))
            data = blob[source].tobytes()
            out.write(data)
            written += len(data)
    return written


class PeakSampler:
    """Samples a process tree's resident memory every 20 ms and keeps the peak."""

    def __init__(self, pid: int) -> None:
        self.process = psutil.Process(pid)
        self.peak = 0
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)
        self._thread.start()

    def _run(self) -> None:
        while not self._stop.is_set():
            try:
                rss = self.process.memory_info().rss + sum(c.memory_info().rss for c in self.process.children(recursive=True))
                self.peak = max(self.peak, rss)
            except psutil.Error:
                pass
            time.sleep(0.02)

    def stop(self) -> int:
        self._stop.set()
        self._thread.join()
        return self.peak


def crc_speed() -> float:
    """zlib.crc32 throughput in GB/s (median of 5 runs over 64 MB)."""
    data = np.random.default_rng(0).integers(0, 256, 64_000_000, dtype=np.uint8)
    times = []
    for _ in range(5):
        started = time.perf_counter()
        zlib.crc32(memoryview(data))
        times.append(time.perf_counter() - started)
    return len(data) / float(np.median(times)) / 1e9


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--gigabytes", type=float, default=3.0, help="corpus size (default 3)")
    parser.add_argument("--max-memory", default="1G", help="the build's --max-memory (default 1G)")
    parser.add_argument("--vocab-size", default="20000")
    parser.add_argument("--keep", action="store_true", help="keep the temporary folder")
    parser.add_argument("--generate", metavar="PATH", help="only write the corpus to PATH")
    args = parser.parse_args()
    if args.generate:
        generate(Path(args.generate), args.gigabytes)
        return
    folder = Path(tempfile.mkdtemp(prefix="foretype-bench-memory-"))
    try:
        corpus = folder / "corpus.txt"
        started = time.perf_counter()
        # In a child process: the generator's memory must not inflate this process,
        # whose size a forked build would otherwise start from.
        subprocess.run([sys.executable, __file__, "--generate", str(corpus), "--gigabytes", str(args.gigabytes)], check=True)
        size = corpus.stat().st_size
        print(f"corpus: {size / 1e9:.2f} GB generated in {time.perf_counter() - started:.0f} s ({corpus})", flush=True)
        model = folder / "bench.model"
        command = [sys.executable, "-m", "foretype", "build", str(corpus), "-o", str(model), "--vocab-size", args.vocab_size, "--max-memory", args.max_memory, "--json"]
        started = time.perf_counter()
        child = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        sampler = PeakSampler(child.pid)
        out, err = child.communicate()
        sampled = sampler.stop()
        seconds = time.perf_counter() - started
        if child.returncode:
            print(f"build failed ({child.returncode}): {err.strip()}")
            sys.exit(1)
        summary = json.loads(out)
        from foretype.counting.memory import parse_size

        limit = parse_size(args.max_memory)
        print(f"build: {seconds:.0f} s, {summary['corpus_tokens']:,} tokens, {summary['ngrams']['3']:,} trigrams stored, model {summary['file_bytes'] / 1e6:.1f} MB")
        print(f"--max-memory {limit / 2**20:,.0f} MiB; corpus / limit = {size / limit:.1f}")
        print(f"peak resident memory: {summary['peak_memory_bytes'] / 2**20:,.0f} MiB (the kernel's high-water mark), {sampled / 2**20:,.0f} MiB (sampled every 20 ms)")
        print(f"peak / limit = {summary['peak_memory_bytes'] / limit:.2f}; unlisted tokens {summary.get('unlisted_tokens', 0):,}")
        import foretype

        loads = []
        for _ in range(5):
            begun = time.perf_counter()
            foretype.load(model)
            loads.append(time.perf_counter() - begun)
        print(f"zlib.crc32: {crc_speed():.1f} GB/s; load with every checksum: median {1000 * float(np.median(loads)):.1f} ms for {summary['file_bytes'] / 1e6:.1f} MB")
    finally:
        if args.keep:
            print(f"kept {folder}")
        else:
            shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
