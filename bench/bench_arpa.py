"""ARPA import of a large generated file: seconds per line and peak memory under --max-memory.

Writes a synthetic ARPA file (invented words, random but valid log10 values,
every trigram's context and suffix listed), then imports it twice in child
processes, side by side: with a ceiling the tables fit in, and with one small
enough that the n-gram tables spill to disk.  Prints a table and writes
bench/out/arpa.json with the machine yardstick (bench/machine.py).
"""

from __future__ import annotations

import argparse
import json
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from machine import describe, finish_facts, machine_facts  # noqa: E402


def generate(path: Path, words: int, bigrams: int, trigrams: int, seed: int = 7) -> int:
    """Write the file; returns its number of n-gram lines."""
    rng = np.random.default_rng(seed)
    base = words + 3
    v = rng.integers(0, words, size=bigrams * 2)
    w = rng.zipf(1.3, size=bigrams * 2) % words
    key2 = np.unique(v.astype(np.int64) * base + w)[:bigrams]
    pick = rng.integers(0, len(key2), size=trigrams * 2)
    u = key2[pick] // base
    mid = key2[pick] % base
    # The trigram's suffix (mid, last) is a listed bigram: take a bigram whose context is mid.
    starts = np.searchsorted(key2 // base, mid)
    ends = np.searchsorted(key2 // base, mid, side="right")
    has = ends > starts
    offset = (rng.random(len(pick)) * (ends - starts)).astype(np.int64)
    last = key2[np.minimum(starts + offset, len(key2) - 1)] % base
    key3 = np.unique(((u * base + mid) * base + last)[has])[:trigrams]
    tokens = np.array([f"w{i}" for i in range(words)] + ["<unk>", "</s>", "<s>"], dtype=object)
    with path.open("w", encoding="utf-8") as out:
        out.write(f"\\data\\\nngram 1={words + 3}\nngram 2={len(key2)}\nngram 3={len(key3)}\n\n\\1-grams:\n")
        logs = -rng.random(words + 3) * 3 - 2
        for token, value in zip(tokens.tolist(), logs.tolist()):
            out.write(f"{-99 if token == '<s>' else value:.6f}\t{token}\t{-rng.random() * 0.5:.6f}\n")
        out.write("\n\\2-grams:\n")
        for start in range(0, len(key2), 1 << 20):
            part = key2[start : start + (1 << 20)]
            values = -rng.random(len(part)) * 3
            weights = -rng.random(len(part)) * 0.5
            out.writelines(f"{p:.6f}\t{tokens[a]} {tokens[b]}\t{g:.6f}\n" for p, a, b, g in zip(values.tolist(), (part // base).tolist(), (part % base).tolist(), weights.tolist()))
        out.write("\n\\3-grams:\n")
        for start in range(0, len(key3), 1 << 20):
            part = key3[start : start + (1 << 20)]
            values = -rng.random(len(part)) * 2
            out.writelines(
                f"{p:.6f}\t{tokens[a]} {tokens[b]} {tokens[c]}\n"
                for p, a, b, c in zip(values.tolist(), (part // base // base).tolist(), (part // base % base).tolist(), (part % base).tolist())
            )
        out.write("\n\\end\\\n")
    return words + 3 + len(key2) + len(key3)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--words", type=int, default=50_000)
    parser.add_argument("--bigrams", type=int, default=400_000)
    parser.add_argument("--trigrams", type=int, default=1_000_000)
    parser.add_argument("--ceilings", default="2G,300M", help="--max-memory values to import under, side by side")
    args = parser.parse_args()
    machine = machine_facts()
    print(describe(machine["yardstick_at_start"]), flush=True)
    folder = Path(tempfile.mkdtemp(prefix="foretype-bench-arpa-"))
    rows = []
    try:
        source = folder / "big.arpa"
        started = time.perf_counter()
        lines = generate(source, args.words, args.bigrams, args.trigrams)
        print(f"generated {lines:,} n-gram lines ({source.stat().st_size / 1e6:.0f} MB) in {time.perf_counter() - started:.0f} s", flush=True)
        for ceiling in args.ceilings.split(","):
            target = folder / f"big-{ceiling}.model"
            command = [sys.executable, "-m", "foretype", "import", str(source), "-o", str(target), "--max-memory", ceiling, "--json"]
            done = subprocess.run(command, capture_output=True, text=True)
            if done.returncode:
                print(f"import under {ceiling} failed ({done.returncode}): {done.stderr.strip()}")
                continue
            summary = json.loads(done.stdout)
            rows.append(
                {
                    "max_memory": ceiling,
                    "lines": lines,
                    "seconds": summary["seconds"],
                    "us_per_line": 1e6 * summary["seconds"] / lines,
                    "peak_mib": summary["peak_memory_bytes"] / 2**20,
                    "spilled_rows": summary["spilled_rows"],
                    "model_mb": target.stat().st_size / 1e6,
                }
            )
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    finish_facts(machine)
    print(f"{'--max-memory':>12} {'lines':>11} {'seconds':>8} {'us/line':>8} {'peak MiB':>9} {'spilled rows':>13} {'model MB':>9}")
    for row in rows:
        print(f"{row['max_memory']:>12} {row['lines']:>11,} {row['seconds']:>8.1f} {row['us_per_line']:>8.1f} {row['peak_mib']:>9.0f} {row['spilled_rows']:>13,} {row['model_mb']:>9.1f}")
    print(describe(machine["yardstick_at_end"]))
    out = Path(__file__).resolve().parent / "out"
    out.mkdir(exist_ok=True)
    (out / "arpa.json").write_text(json.dumps({"machine": machine, "rows": rows}, indent=2), encoding="utf-8")


if __name__ == "__main__":
    main()
