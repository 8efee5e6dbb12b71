"""What each byte buys: keystroke savings and perplexity against model bytes, per pruning criterion.

On the synthetic language of ``bench/corpus.py`` (1 million training tokens by
default; ``--tokens 5000000`` for the issue's 5-million-token corpus, several
times slower), for Kneser-Ney and Katz:

1. the size sweep: each full model shrunk to shares of its bytes by count
   cutoffs, relative-entropy pruning (Stolcke 1998) and the prediction-aware
   criterion, every model measured like a sweep row (file bytes, perplexity,
   KSR, oracle, latency) on held-out text of the same language;
2. value encodings: the full Kneser-Ney model with 16-bit and 8-bit values, at
   ``--vocab-size`` words and at the full vocabulary: bytes per stored n-gram,
   perplexity and KSR side by side, and where the file's bytes go.

Prints tables; writes ``bench/out/shrink.json`` and the chart ``bench/out/shrink.svg``
(copy it to ``docs/shrink.svg`` to publish).
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from corpus import OUT, synthetic_corpus  # noqa: E402
from machine import machine_facts  # noqa: E402

import foretype  # noqa: E402
from foretype.builder.shrink import shrink  # noqa: E402
from foretype.cli.sweep_commands import format_table  # noqa: E402
from foretype.simulate import TypistSettings, simulate  # noqa: E402
from foretype.size_chart import size_chart  # noqa: E402
from foretype.sweep import run_sweep  # noqa: E402


def held_out_words(path: Path, words: int) -> str:
    """The first lines of the held-out text holding about ``words`` words."""
    lines, count = [], 0
    for line in path.read_text(encoding="utf-8").splitlines(keepends=True):
        lines.append(line)
        count += len(line.split())
        if count >= words:
            break
    return "".join(lines)


def encodings_side_by_side(model: foretype.LanguageModel, text: str, settings: TypistSettings, folder: Path, label: str) -> list[dict]:
    """The model with 16-bit and 8-bit values: bytes per n-gram, perplexity, KSR, and the bytes of each section."""
    rows = []
    ngrams = sum(model.ngram_counts().values())
    for encoding in ("log16", "codebook8"):
        started = time.perf_counter()
        shrunk = model if encoding == model.meta["value_encoding"] else shrink(model, encoding=encoding)
        seconds = time.perf_counter() - started
        path = folder / f"{label}-{encoding}.model"
        size = shrunk.save(path)
        loaded = foretype.load(path)
        report = simulate(loaded, text, settings, keep_traces=False)
        sections = {name: int(a.nbytes) for name, a in loaded.sections.items()}
        rows.append(
            {
                "model": label,
                "values": encoding,
                "vocab_size": loaded.vocab_size,
                "ngrams": ngrams,
                "file_bytes": size,
                "bytes_per_ngram": size / ngrams,
                "perplexity": loaded.perplexity(text),
                "ksr": report.ksr,
                "latency_p50_us": report.latency_us["p50"],
                "latency_p99_us": report.latency_us["p99"],
                "seconds": seconds,
                "bytes_per_ngram_by_section": {k: v / ngrams for k, v in sorted(sections.items(), key=lambda kv: -kv[1])},
            }
        )
    return rows


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--tokens", type=int, default=1_000_000, help="training tokens of the synthetic corpus (the issue: 5000000)")
    parser.add_argument("--vocab-size", type=int, default=20_000)
    parser.add_argument("--test-words", type=int, default=8_000, help="held-out words typed and scored per model")
    parser.add_argument("--keep-bytes", default="0.6,0.35,0.2,0.12", help="shares of the full model's bytes")
    parser.add_argument("--methods", default="kneser-ney,katz")
    parser.add_argument("--skip-encodings", action="store_true", help="only the size sweep")
    args = parser.parse_args()
    machine_start = machine_facts()
    train, heldout = synthetic_corpus(args.tokens, 100_000)
    text = held_out_words(heldout, args.test_words)
    settings = TypistSettings(k=5)
    folder = OUT / f"shrink-{args.tokens}"
    folder.mkdir(parents=True, exist_ok=True)
    test_file = folder / "test.txt"
    test_file.write_text(text, encoding="utf-8")
    started = time.perf_counter()
    result = run_sweep(
        [train],
        text,
        out=folder / "sweep",
        vocab_sizes=[args.vocab_size],
        methods=args.methods.split(","),
        settings=settings,
        test_name=str(test_file),
        progress=lambda stage, done, total: None,
        on_row=lambda row: print(f"  {row.method} {row.criterion} {row.keep_bytes}: {row.file_bytes:,} bytes, KSR {100 * row.ksr:.2f}%", flush=True),
        shrink_criteria=["count", "entropy", "prediction"],
        keep_bytes=[float(x) for x in args.keep_bytes.split(",")],
    )
    sweep_seconds = time.perf_counter() - started
    print(format_table(result.rows))
    rows = [r.to_json() for r in result.rows]
    chart = size_chart(rows, k=settings.k, title=f"Keystroke savings by model size ({args.tokens:,}-token synthetic corpus, {args.vocab_size:,} words)")
    (OUT / "shrink.svg").write_text(chart, encoding="utf-8")
    encodings: list[dict] = []
    if not args.skip_encodings:
        counts = foretype.count_corpus([train])
        for label, size in ((f"kn-v{args.vocab_size}", args.vocab_size), ("kn-full", None)):
            model = foretype.build_from_counts(counts, vocab_size=size, method="kneser-ney")
            encodings.extend(encodings_side_by_side(model, text, settings, folder, label))
        counts.close()
        print("\nvalue encodings (full Kneser-Ney models):")
        print(f"{'model':<12} {'values':<10} {'vocab':>8} {'n-grams':>10} {'bytes':>12} {'B/n-gram':>9} {'perplexity':>11} {'KSR':>7} {'p50 µs':>7} {'p99 µs':>7}")
        for r in encodings:
            print(
                f"{r['model']:<12} {r['values']:<10} {r['vocab_size']:>8,} {r['ngrams']:>10,} {r['file_bytes']:>12,} {r['bytes_per_ngram']:>9.2f} "
                f"{r['perplexity']:>11.2f} {100 * r['ksr']:>6.2f}% {r['latency_p50_us']:>7.0f} {r['latency_p99_us']:>7.0f}"
            )
        for r in encodings:
            top = ", ".join(f"{k} {v:.2f}" for k, v in list(r["bytes_per_ngram_by_section"].items())[:8])
            print(f"  {r['model']} {r['values']}: bytes per n-gram by section: {top}")
    out = {
        "tokens": args.tokens,
        "vocab_size": args.vocab_size,
        "test_words": args.test_words,
        "sweep_seconds": sweep_seconds,
        "machine_start": machine_start,
        "machine_end": machine_facts(),
        "sweep": result.to_json(),
        "encodings": encodings,
    }
    (OUT / "shrink.json").write_text(json.dumps(out, indent=2) + "\n", encoding="utf-8")
    print(f"\nwrote {OUT / 'shrink.json'} and {OUT / 'shrink.svg'}")


if __name__ == "__main__":
    main()
