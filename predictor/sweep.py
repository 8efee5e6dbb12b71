"""The vocabulary sweep: one corpus count, a model per vocabulary size and method, measured side by side.

For each (method, vocabulary size) the sweep builds the model from the shared
counts, saves it in the output folder, loads it back and measures it:

* ``vocab_size``, ``unigrams``, ``bigrams``, ``trigrams``: what the model holds;
* ``file_bytes``: the saved file's size;
* ``rss_bytes``: resident memory the model costs, measured with psutil: the
  growth of the process's resident set size across loading the file (arrays
  copied at load, pages the load checks touch) plus the pages of the mapped
  file that the simulated typist's queries brought in afterwards (from the
  file mapping's own resident size, so the simulation's own allocations are
  not counted).  Where the platform does not report per-mapping sizes, the
  plain RSS growth from before loading to after the simulation is used.
  Measured in one process, it is approximate (about a megabyte of noise);
* ``build_seconds`` (from counts to model), ``load_ms`` (opening the saved file);
* ``perplexity`` and ``oov_rate`` of the test text;
* ``ksr``, ``oracle_ksr``, ``baseline_ksr`` and suggestion latency
  ``latency_p50_us`` / ``latency_p99_us`` from :func:`foretype.simulate.simulate`;
* with adaptation, ``adapted_ksr`` and ``adapted_latency_p50_us`` /
  ``adapted_latency_p99_us``: the same typist again, each word feeding a user
  model that starts empty (:func:`foretype.adapt.simulation.simulate_adaptive`);
  empty otherwise;
* with ``ExtraMeasures.interval_resamples``, ``ksr_low`` / ``ksr_high``: the
  95% interval of ``ksr`` by the bootstrap over test sentences (one bootstrap
  per row, :func:`foretype.compare.ksr_interval`); empty otherwise;
* with a scanning typist (``ExtraMeasures.scanning``), ``scan_steps_per_char``
  and ``scan_wpm`` with prediction and ``scan_steps_per_char_unaided`` /
  ``scan_wpm_unaided`` without (:func:`foretype.simulate.scanning.simulate_scanning`);
  empty otherwise.

Rows are written to ``sweep.csv``, ``sweep.json`` and the chart ``sweep.svg``
as each one finishes (atomically), so an interrupted sweep keeps its rows.
"""

from __future__ import annotations

import csv
import gc
import io
import json
import math
import os
import time
from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

from .adapt.simulation import simulate_adaptive
from .builder import build_from_counts, check_build_options
from .builder.shrink import CRITERIA, VALUE_ENCODINGS, shrink
from .chart import sweep_chart
from .compare import ksr_interval
from .counting import count_corpus
from .counting.store import open_count_store, store_wrapped
from .errors import CapacityError, OptionError
from .outputs import prepare_folder, write_text_atomic
from .query.model import load
from .simulate import TypistSettings, read_passage, simulate
from .simulate.scanning import ScanningSettings, simulate_scanning
from .size_chart import size_chart

DEFAULT_VOCAB_SIZES = (1000, 2000, 5000, 10000, 20000, 50000)
"""The vocabulary sizes swept when none are given."""

COLUMNS = (
    "method",
    "requested_vocab_size",
    "vocab_size",
    "unigrams",
    "bigrams",
    "trigrams",
    "file_bytes",
    "rss_bytes",
    "build_seconds",
    "load_ms",
    "perplexity",
    "oov_rate",
    "ksr",
    "oracle_ksr",
    "baseline_ksr",
    "latency_p50_us",
    "latency_p99_us",
    "adapted_ksr",
    "adapted_latency_p50_us",
    "adapted_latency_p99_us",
    "criterion",
    "value_encoding",
    "keep_bytes",
    "ksr_low",
    "ksr_high",
    "scan_steps_per_char",
    "scan_steps_per_char_unaided",
    "scan_wpm",
    "scan_wpm_unaided",
)
"""The columns of ``sweep.csv`` (and the keys of each row in ``sweep.json``)."""

MEMORY_MEASURE = (
    "psutil: RSS growth across loading the model file, plus the model file's mapped pages that became resident "
    "while the simulated typist ran (plain RSS growth where per-mapping sizes are not available); same process, approximate"
)
"""How ``rss_bytes`` is measured (written into sweep.json)."""

SweepProgress = Callable[[str, int, int], None]
"""Called with (stage label, done, total) while the sweep runs."""


@dataclass(frozen=True)
class SweepRow:
    """The measurements of one model of the sweep (see the module docstring for each field)."""

    method: str
    requested_vocab_size: int
    vocab_size: int
    unigrams: int
    bigrams: int
    trigrams: int
    file_bytes: int
    rss_bytes: int
    build_seconds: float
    load_ms: float
    perplexity: float | None
    oov_rate: float
    ksr: float
    oracle_ksr: float
    baseline_ksr: float
    latency_p50_us: float | None
    latency_p99_us: float | None
    adapted_ksr: float | None = None
    adapted_latency_p50_us: float | None = None
    adapted_latency_p99_us: float | None = None
    criterion: str = "none"
    value_encoding: str = ""
    keep_bytes: float | None = None
    ksr_low: float | None = None
    ksr_high: float | None = None
    scan_steps_per_char: float | None = None
    scan_steps_per_char_unaided: float | None = None
    scan_wpm: float | None = None
    scan_wpm_unaided: float | None = None

    def to_json(self) -> dict[str, Any]:
        """The row as a JSON object with the :data:`COLUMNS` as keys."""
        return asdict(self)


@dataclass
class SweepResult:
    """A sweep's rows and what they were measured on.

    Attributes:
        corpus: the corpus paths.
        test: the test file.
        corpus_tokens: word tokens counted.
        counting_seconds: time to count the corpus once.
        settings: the typist's settings.
        rows: the finished rows, in order.
        complete: every planned row finished.
    """

    corpus: list[str]
    test: str
    corpus_tokens: int = 0
    counting_seconds: float = 0.0
    settings: dict[str, Any] = field(default_factory=dict)
    rows: list[SweepRow] = field(default_factory=list)
    complete: bool = False

    def to_json(self) -> dict[str, Any]:
        """The sweep as the JSON object written to ``sweep.json``."""
        return {
            "corpus": self.corpus,
            "test": self.test,
            "corpus_tokens": self.corpus_tokens,
            "counting_seconds": self.counting_seconds,
            "settings": self.settings,
            "memory_measure": MEMORY_MEASURE,
            "complete": self.complete,
            "rows": [row.to_json() for row in self.rows],
        }


def _rss() -> int:
    import psutil

    return int(psutil.Process(os.getpid()).memory_info().rss)


def _mapped_resident(path: Path) -> int | None:
    """Resident bytes of this process's mappings of one file, or None where the platform cannot tell."""
    import psutil

    target = os.path.realpath(path)
    try:
        maps = psutil.Process(os.getpid()).memory_maps(grouped=True)
    except (AttributeError, NotImplementedError, psutil.Error, OSError):
        return None
    return sum(int(m.rss) for m in maps if os.path.realpath(m.path or "") == target) if maps else None


def _finite(value: float) -> float | None:
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class ExtraMeasures:
    """Optional measurements each row of a sweep can add.

    Attributes:
        interval_resamples: bootstrap resamples for the KSR interval (0: none).
        seed: the bootstrap's seed.
        scanning: also simulate a scanning typist with these settings.
    """

    interval_resamples: int = 0
    seed: int = 0
    scanning: ScanningSettings | None = None

    def __post_init__(self) -> None:
        if self.interval_resamples < 0:
            raise OptionError(f"interval resamples must be 0 or more, not {self.interval_resamples}")

    def to_json(self) -> dict[str, Any]:
        """What sweep.json's settings record of them (nothing when none is asked for)."""
        found: dict[str, Any] = {}
        if self.interval_resamples:
            found.update(interval_resamples=self.interval_resamples, seed=self.seed)
        if self.scanning is not None:
            found["scanning"] = self.scanning.to_json()
        return found

    def columns(self, model: Any, test_text: str, settings: TypistSettings, report: Any) -> dict[str, Any]:
        """The extra columns of one row, from its loaded model and its savings report (kept with traces)."""
        found: dict[str, Any] = {}
        if self.interval_resamples > 0:
            interval = ksr_interval(test_text, settings, report.trace, resamples=self.interval_resamples, seed=self.seed)
            if interval is not None:
                found.update(ksr_low=interval[0], ksr_high=interval[1])
        if self.scanning is not None:
            scanned = simulate_scanning(model, test_text, settings, self.scanning).to_json()
            found.update(
                scan_steps_per_char=scanned["scan_steps_per_char"],
                scan_steps_per_char_unaided=scanned["scan_steps_per_char_unaided"],
                scan_wpm=scanned["wpm"],
                scan_wpm_unaided=scanned["wpm_unaided"],
            )
        return found


NO_EXTRAS = ExtraMeasures()
"""A sweep row with none of the optional measurements."""


def measure_model(
    counts: Any,
    *,
    method: str,
    vocab_size: int,
    test_text: str,
    settings: TypistSettings,
    folder: Path,
    progress: Callable[[int, int], None] | None = None,
    adapt: bool = False,
    extra: ExtraMeasures = NO_EXTRAS,
) -> SweepRow:
    """Build, save, load and measure one model of the sweep.

    Args:
        counts: the corpus counts (:class:`foretype.CorpusCounts`).
        method: the estimator.
        vocab_size: the requested vocabulary size.
        test_text: the test text.
        settings: the simulated typist's settings.
        folder: where the model file is saved.
        progress: simulation progress, (words done, words in all).
        adapt: also simulate the typist with learning, from an empty user model.
        extra: optional measurements (KSR interval, scanning).

    Returns:
        The row.
    """
    gc.collect()
    started = time.perf_counter()
    built = build_from_counts(counts, vocab_size=vocab_size, method=method)
    build_seconds = time.perf_counter() - started
    path = folder / f"{method}-v{vocab_size}.model"
    return measure_saved(
        built, path, method=method, vocab_size=vocab_size, build_seconds=build_seconds, test_text=test_text, settings=settings, progress=progress, adapt=adapt, extra=extra
    )


def measure_saved(
    built: Any,
    path: Path,
    *,
    method: str,
    vocab_size: int,
    build_seconds: float,
    test_text: str,
    settings: TypistSettings,
    progress: Callable[[int, int], None] | None = None,
    adapt: bool = False,
    keep_bytes: float | None = None,
    extra: ExtraMeasures = NO_EXTRAS,
) -> SweepRow:
    """Save a model built in memory, load it back and measure it (see :func:`measure_model`).

    Args:
        built: the model (:class:`predictor.LanguageModel`); released once saved.
        path: where it is saved.
        keep_bytes: for a shrunk model, the share of the full model's bytes it was asked to fit.
        extra: optional measurements (KSR interval, scanning).
    """
    file_bytes = built.save(path)
    ngrams = built.ngram_counts()
    shrunk = built.meta.get("shrink") or {}
    criterion = str(shrunk.get("criterion") or "none")
    encoding = str(built.meta.get("value_encoding", ""))
    del built
    gc.collect()
    before = _rss()
    started = time.perf_counter()
    model = load(path)
    load_ms = (time.perf_counter() - started) * 1000.0
    loaded = _rss()
    mapped_at_load = _mapped_resident(path)
    runs = 2 if adapt else 1

    def first_run(done: int, total: int) -> None:
        if progress is not None:
            progress(done, runs * total)

    def second_run(done: int, total: int) -> None:
        if progress is not None:
            progress(total + done, runs * total)

    report = simulate(model, test_text, settings, first_run, keep_traces=extra.interval_resamples > 0)
    mapped_after = _mapped_resident(path)
    if mapped_at_load is None or mapped_after is None:
        rss_bytes = max(0, _rss() - before)
    else:
        rss_bytes = max(0, loaded - before) + max(0, mapped_after - mapped_at_load)
    score = model.score(test_text, wrapped=settings.wrapped)
    adapted = simulate_adaptive(model, test_text, settings, second_run, compare=False).adapted if adapt else None
    return SweepRow(
        method=method,
        requested_vocab_size=vocab_size,
        vocab_size=model.vocab_size,
        unigrams=ngrams["1"],
        bigrams=ngrams["2"],
        trigrams=ngrams["3"],
        file_bytes=file_bytes,
        rss_bytes=rss_bytes,
        build_seconds=build_seconds,
        load_ms=load_ms,
        perplexity=_finite(score.perplexity),
        oov_rate=score.oov_rate,
        ksr=report.ksr,
        oracle_ksr=report.oracle_ksr,
        baseline_ksr=report.baseline_ksr,
        latency_p50_us=report.latency_us["p50"],
        latency_p99_us=report.latency_us["p99"],
        adapted_ksr=None if adapted is None else adapted.ksr,
        adapted_latency_p50_us=None if adapted is None else adapted.latency_us["p50"],
        adapted_latency_p99_us=None if adapted is None else adapted.latency_us["p99"],
        criterion=criterion,
        value_encoding=encoding,
        keep_bytes=keep_bytes,
        **extra.columns(model, test_text, settings, report),
    )


def shrink_plan(criteria: Sequence[str], keep_bytes: Sequence[float], encodings: Sequence[str]) -> list[tuple[str, float, str]]:
    """The shrunk rows of one full model: (criterion, share of its bytes, value encoding).

    A share of 1 keeps every n-gram (only the encoding changes), once per encoding.
    """
    plan: list[tuple[str, float, str]] = []
    for encoding in encodings or [""]:
        if any(share >= 1 for share in keep_bytes):
            plan.append(("none", 1.0, encoding))
        for criterion in criteria:
            plan.extend((criterion, share, encoding) for share in keep_bytes if share < 1)
    return plan


def measure_shrunk(
    counts: Any,
    full_path: Path,
    full_bytes: int,
    *,
    method: str,
    vocab_size: int,
    criterion: str,
    share: float,
    encoding: str,
    test_text: str,
    settings: TypistSettings,
    folder: Path,
    progress: Callable[[int, int], None] | None = None,
    adapt: bool = False,
    extra: ExtraMeasures = NO_EXTRAS,
) -> SweepRow:
    """Shrink a sweep's full model to a share of its bytes, save it and measure it.

    Count cutoffs need the counts, so that criterion rebuilds the model from
    them; the others shrink the saved full model.
    """
    gc.collect()
    started = time.perf_counter()
    budget = None if share >= 1 else max(1, int(full_bytes * share))
    options: dict[str, Any] = {"encoding": encoding or None}
    if budget is not None:
        options.update(criterion=criterion, max_bytes=budget)
    if criterion == "count":
        built = build_from_counts(counts, vocab_size=vocab_size, method=method, shrink_options=options)
    else:
        built = shrink(load(full_path), **options)
    seconds = time.perf_counter() - started
    tag = f"{criterion}-{share:g}-{encoding or 'same'}"
    path = folder / f"{method}-v{vocab_size}-{tag}.model"
    return measure_saved(
        built,
        path,
        method=method,
        vocab_size=vocab_size,
        build_seconds=seconds,
        test_text=test_text,
        settings=settings,
        progress=progress,
        adapt=adapt,
        keep_bytes=share,
        extra=extra,
    )


def write_results(result: SweepResult, folder: Path) -> None:
    """Write ``sweep.csv``, ``sweep.json`` and ``sweep.svg`` for the rows so far (each atomically).

    Raises:
        OutputError: a file cannot be written.
    """
    table = io.StringIO()
    writer = csv.writer(table, lineterminator="\n")
    writer.writerow(COLUMNS)
    for row in result.rows:
        values = row.to_json()
        writer.writerow(["" if values[c] is None else values[c] for c in COLUMNS])
    write_text_atomic(folder / "sweep.csv", table.getvalue())
    write_text_atomic(folder / "sweep.json", json.dumps(result.to_json(), indent=2, allow_nan=False) + "\n")
    full_rows = [r.to_json() for r in result.rows if r.keep_bytes is None]
    write_text_atomic(folder / "sweep.svg", sweep_chart(full_rows, k=result.settings.get("k")))
    if any(r.keep_bytes is not None for r in result.rows):
        write_text_atomic(folder / "size.svg", size_chart([r.to_json() for r in result.rows], k=result.settings.get("k")))


def run_sweep(
    corpus: Sequence[str | os.PathLike[str]],
    test_text: str,
    *,
    out: str | os.PathLike[str],
    vocab_sizes: Sequence[int] = DEFAULT_VOCAB_SIZES,
    methods: Sequence[str] = ("kneser-ney",),
    settings: TypistSettings | None = None,
    test_name: str = "",
    progress: SweepProgress | None = None,
    on_row: Callable[[SweepRow], None] | None = None,
    adapt: bool = False,
    counts_store: str | os.PathLike[str] | None = None,
    shrink_criteria: Sequence[str] = (),
    keep_bytes: Sequence[float] = (),
    value_encodings: Sequence[str] = (),
    extra: ExtraMeasures = NO_EXTRAS,
) -> SweepResult:
    """Count a corpus once, then build and measure a model per method and vocabulary size.

    Args:
        corpus: corpus files or folders.
        test_text: the held-out text to simulate and score.
        out: the output folder (created if needed).
        vocab_sizes: vocabulary sizes to build.
        methods: estimators to build with.
        settings: the simulated typist's settings (``settings.wrapped`` also
            applies to counting the corpus and scoring the test text); None for the defaults.
        test_name: the test file's name, for the results.
        progress: called with (stage, done, total) throughout.
        on_row: called with each row as it finishes (after the files are written).
        adapt: add the adaptation columns: each model is simulated a second
            time with a user model that starts empty and learns as the typist goes.
        counts_store: estimate from this count store (:mod:`predictor.counting.store`)
            instead of counting ``corpus`` (which must then be empty); its
            ``--wrapped`` setting must match ``settings.wrapped``.
        shrink_criteria: the size axis: pruning criteria (:data:`predictor.shrink.CRITERIA`)
            applied to each full model.
        keep_bytes: shares of the full model's file bytes each shrunk model must
            fit (1 keeps every n-gram and changes only the value encoding).
        value_encodings: value encodings of the shrunk models (default: each model's own).
        extra: optional measurements every row adds (KSR interval, scanning columns).

    Returns:
        The result, with ``complete`` set once every row finished.

    Raises:
        OptionError: empty size or method list, unknown method.
        CorpusError: the corpus or the test text holds no words.
        OutputError: the output folder cannot be written.
    """
    settings = settings if settings is not None else TypistSettings()
    _check_plan(vocab_sizes, methods)
    _check_size_axis(methods, shrink_criteria, keep_bytes, value_encodings)
    read_passage(test_text, settings.text_mode, wrapped=settings.wrapped)  # reject a word-less test text before counting
    folder = prepare_folder(out)
    result = SweepResult([str(p) for p in corpus], test_name, settings={**asdict(settings), "adapt": adapt, **extra.to_json()})
    report = progress or (lambda stage, done, total: None)
    started = time.perf_counter()
    if counts_store is not None:
        counts = _store_counts(counts_store, settings.wrapped)
        result.corpus = [str(counts_store)]
    else:
        counts = count_corpus(corpus, wrapped=settings.wrapped, progress=lambda done, total: report("counting the corpus", done, total))
    result.counting_seconds = time.perf_counter() - started
    result.corpus_tokens = counts.corpus_tokens
    write_results(result, folder)
    shrunk = shrink_plan(shrink_criteria, keep_bytes, value_encodings) if keep_bytes else []
    plan = [(method, size, step) for method in methods for size in vocab_sizes for step in [None, *shrunk]]
    full: dict[tuple[str, int], tuple[Path, int]] = {}
    for number, (method, size, step) in enumerate(plan, 1):
        label = _row_label(number, len(plan), method, size, step)
        report(label, 0, 0)
        moving = lambda done, total, label=label: report(label, done, total)  # noqa: E731
        common = {"method": method, "vocab_size": size, "test_text": test_text, "settings": settings, "folder": folder, "progress": moving, "adapt": adapt, "extra": extra}
        row = _measure_planned(counts, step, full, common)
        if row is None:
            report(f"{label}: skipped (below the smallest model this vocabulary allows)", 0, 0)
            continue
        result.rows.append(row)
        result.complete = number == len(plan)
        write_results(result, folder)
        if on_row is not None:
            on_row(row)
    if not result.complete:
        result.complete = True  # the last planned row was skipped as too small to build
        write_results(result, folder)
    return result


def _check_plan(vocab_sizes: Sequence[int], methods: Sequence[str]) -> None:
    """Refuse an empty plan, an unknown method or a vocabulary size below 1 before any work."""
    if not vocab_sizes:
        raise OptionError("no vocabulary sizes to sweep")
    if not methods:
        raise OptionError("no methods to sweep")
    for method in methods:
        check_build_options(vocab_size=None, min_count=1, method=method, add=0.1, encoding=None)
    for size in vocab_sizes:
        if size < 1:
            raise OptionError(f"vocabulary sizes must be at least 1, not {size}")


def _store_counts(store: str | os.PathLike[str], wrapped: bool) -> Any:
    """The counts of a count store, refusing one counted with another sentence rule."""
    counts, manifest = open_count_store(store)
    if store_wrapped(manifest) != wrapped:
        flag = "with" if store_wrapped(manifest) else "without"
        raise OptionError(f"{store}: the count store was counted {flag} --wrapped; sweep it {flag} --wrapped too")
    return counts


def _measure_planned(counts: Any, step: tuple[str, float, str] | None, full: dict[tuple[str, int], tuple[Path, int]], common: dict[str, Any]) -> SweepRow | None:
    """Measure one planned row: a full model (remembered in ``full``), or a shrunk one (None if its budget is too small)."""
    key = (common["method"], common["vocab_size"])
    if step is None:
        row = measure_model(counts, **common)
        full[key] = (common["folder"] / f"{key[0]}-v{key[1]}.model", row.file_bytes)
        return row
    try:
        return measure_shrunk(counts, *full[key], criterion=step[0], share=step[1], encoding=step[2], **common)
    except CapacityError:
        return None


def _row_label(number: int, planned: int, method: str, size: int, step: tuple[str, float, str] | None) -> str:
    """The progress label of one planned row."""
    label = f"[{number}/{planned}] {method}, {size:,} words"
    if step is not None:
        label += f", {step[0]} to {step[1]:g} of the bytes" + (f", {step[2]} values" if step[2] else "")
    return label


def _check_size_axis(methods: Sequence[str], criteria: Sequence[str], shares: Sequence[float], encodings: Sequence[str]) -> None:
    """Reject a size axis the sweep could not build, before counting."""
    for criterion in criteria:
        if criterion not in CRITERIA:
            raise OptionError(f"unknown pruning criterion {criterion!r}; choose one of {', '.join(CRITERIA)}")
    for encoding in encodings:
        if encoding not in VALUE_ENCODINGS:
            raise OptionError(f"unknown value encoding {encoding!r}; choose one of {', '.join(VALUE_ENCODINGS)}")
    if (criteria or encodings) and not shares:
        raise OptionError("--prune and --values need --keep-bytes (shares of the full model's bytes, 1 for the full model)")
    if shares and any(share < 1 for share in shares) and not criteria:
        raise OptionError("--keep-bytes below 1 needs --prune (the criteria that decide which n-grams go)")
    if criteria and "mle" in methods:
        raise OptionError("mle models cannot be pruned: leave mle out of --methods or drop --prune")
