"""Time the paired bootstrap of ``foretype compare``: the vectorised resampling beside a loop per resample.

Both compute the same percentile intervals of two systems' KSR and of their
difference from the same index matrix (the loop sums each resample's rows in
Python-level numpy calls, as a straightforward implementation would); the
table gives the median of a few runs of each, side by side in one process,
and their ratio.  Writes bench/out/bench_compare.json.

    python bench/bench_compare.py [--sentences 5000] [--resamples 1000] [--repeat 3]
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from machine import describe, finish_facts, machine_facts  # noqa: E402

from foretype.stats import RatioMeasure, paired_bootstrap  # noqa: E402
from foretype.stats.resampling import resample_indices  # noqa: E402


def _one_minus(ratio: np.ndarray) -> np.ndarray:
    return 1.0 - ratio


def looped(keys: np.ndarray, chars: np.ndarray, indices: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The same resampled KSR values, one resample at a time."""
    values = np.empty((indices.shape[0], keys.shape[0]))
    for b, row in enumerate(indices):
        for s in range(keys.shape[0]):
            values[b, s] = 1.0 - keys[s, row].sum() / chars[s, row].sum()
    return values, np.percentile(values[:, 0] - values[:, 1], [2.5, 97.5])


def _median_seconds(run, repeat: int) -> float:
    samples = []
    for _ in range(repeat):
        started = time.perf_counter()
        run()
        samples.append(time.perf_counter() - started)
    return float(np.median(samples))


def main() -> None:
    """Run the benchmark and print its table."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sentences", type=int, default=5000)
    parser.add_argument("--resamples", type=int, default=1000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    machine = machine_facts()
    rng = np.random.default_rng(0)
    chars = rng.integers(10, 120, size=(2, args.sentences)).astype(float)
    keys = np.floor(chars * rng.uniform(0.2, 0.8, size=(2, args.sentences)))
    measure = RatioMeasure("ksr", keys, chars, _one_minus)
    indices = resample_indices(np.random.default_rng(1), args.sentences, args.resamples)
    vector = paired_bootstrap(measure, indices=indices)
    _, loop_interval = looped(keys, chars, indices)
    assert np.allclose(vector.pairs[(0, 1)].interval, loop_interval)
    vector_s = _median_seconds(lambda: paired_bootstrap(measure, indices=indices), args.repeat)
    loop_s = _median_seconds(lambda: looped(keys, chars, indices), args.repeat)
    print(describe(machine["yardstick_at_start"]))
    print(f"paired bootstrap, 2 systems, {args.sentences:,} sentences, {args.resamples:,} resamples (median of {args.repeat})")
    print(f"  vectorised (index matrix, sums per resample) {vector_s * 1000:9.1f} ms")
    print(f"  loop per resample                            {loop_s * 1000:9.1f} ms")
    print(f"  ratio                                        x{loop_s / vector_s:8.1f}")
    finish_facts(machine)
    out = Path(__file__).resolve().parent / "out"
    out.mkdir(exist_ok=True)
    payload = {"machine": machine, "sentences": args.sentences, "resamples": args.resamples, "vectorised_s": vector_s, "loop_s": loop_s, "ratio": loop_s / vector_s}
    (out / "bench_compare.json").write_text(json.dumps(payload, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
