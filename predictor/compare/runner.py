"""Run each compared system on the same text, keep per-sentence totals, and resample them.

Every system types the same passage (same sentences, same characters); for
each sentence it keeps the characters, the keystrokes (or, for the scanning
typist, the scan steps, presses and seconds with and without prediction), and
the model's log2 probability and predicted tokens.  The measures are ratios
of totals over sentences, resampled together with one index matrix
(:mod:`foretype.stats.resampling`), so every interval and difference is
paired.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import OptionError
from ..query.model import LanguageModel
from ..simulate.passage import Passage, read_passage
from ..simulate.scanning import ScanningSettings, ScanningTypist, grid_for
from ..simulate.sentences import per_sentence, sentence_characters, sentence_log_probs
from ..simulate.typist import Typist, TypistSettings
from ..stats import BootstrapResult, PairResult, RatioMeasure, approximate_randomisation, paired_bootstrap

TESTS = ("bootstrap", "randomisation")
"""How pair p-values are found: the paired bootstrap (Koehn 2004) or approximate randomisation (Riezler & Maxwell 2005)."""

ACCESS_KINDS = ("keys", "scanning")
"""The typists a comparison can simulate: keystrokes, or single-switch row-column scanning."""


def _one_minus(ratio: np.ndarray) -> np.ndarray:
    return 1.0 - ratio


def _power_of_two(ratio: np.ndarray) -> np.ndarray:
    return np.exp2(ratio)


def _identity(ratio: np.ndarray) -> np.ndarray:
    return ratio


def _per_minute(ratio: np.ndarray) -> np.ndarray:
    # seconds per character -> words of five characters per minute.
    return 12.0 / ratio


@dataclass(frozen=True)
class MeasureSpec:
    """One compared measure: transform(sum of a column / sum of another) over sentences.

    Attributes:
        name: key in JSON and CSV.
        title: heading in the text table.
        numerator: the per-sentence column summed on top.
        denominator: the per-sentence column summed below.
        transform: from the ratio of totals to the measure.
        percent: shown as a percentage (differences in points).
        higher_is_better: which way is better, for reading differences.
    """

    name: str
    title: str
    numerator: str
    denominator: str
    transform: Callable[[np.ndarray], np.ndarray]
    percent: bool
    higher_is_better: bool


MEASURES = {
    "ksr": MeasureSpec("ksr", "KSR", "keystrokes", "characters", _one_minus, True, True),
    "perplexity": MeasureSpec("perplexity", "perplexity", "neg_log2_prob", "tokens", _power_of_two, False, False),
    "scan_steps_per_char": MeasureSpec("scan_steps_per_char", "steps/char", "scan_steps", "characters", _identity, False, False),
    "wpm": MeasureSpec("wpm", "wpm", "seconds", "characters", _per_minute, False, True),
    "scan_steps_per_char_unaided": MeasureSpec("scan_steps_per_char_unaided", "steps/char unaided", "scan_steps_unaided", "characters", _identity, False, False),
    "wpm_unaided": MeasureSpec("wpm_unaided", "wpm unaided", "seconds_unaided", "characters", _per_minute, False, True),
}
"""Every measure a comparison can report, by name."""

ACCESS_MEASURES = {
    "keys": ("ksr", "perplexity"),
    "scanning": ("scan_steps_per_char", "wpm", "scan_steps_per_char_unaided", "wpm_unaided", "perplexity"),
}
"""The measures of each access kind; the first is the one the chart draws."""


@dataclass(frozen=True)
class ComparedSystem:
    """One model with one set of typist settings.

    Attributes:
        label: the name shown in reports.
        model: the model.
        settings: the typist's settings.
        scanning: scanning settings (None for the keystroke typist).
        model_path: where the model came from, for the record.
    """

    label: str
    model: LanguageModel
    settings: TypistSettings
    scanning: ScanningSettings | None = None
    model_path: str = ""


@dataclass
class SystemRun:
    """One system's per-sentence totals.

    Attributes:
        label: the system's label.
        model_path: the model file.
        method: the model's estimator.
        settings: the typist's settings as JSON.
        scanning: the scanning settings as JSON (None for keystrokes).
        columns: per-sentence float64 arrays of shape (sentences,), by name:
            ``characters``, ``neg_log2_prob``, ``tokens``, and ``keystrokes`` or
            ``scan_steps``, ``presses``, ``seconds``, ``scan_steps_unaided``,
            ``presses_unaided``, ``seconds_unaided``.
    """

    label: str
    model_path: str
    method: str
    settings: dict[str, Any]
    scanning: dict[str, Any] | None
    columns: dict[str, np.ndarray] = field(default_factory=dict)


@dataclass
class ComparisonResult:
    """Everything a comparison found.

    Attributes:
        test_name: the test file's name.
        access: ``keys`` or ``scanning``.
        sentences, words, characters: the test text.
        systems: one run per system, in the order given.
        measures: one result per measure name (see :data:`ACCESS_MEASURES`).
        test: ``bootstrap`` or ``randomisation``.
        resamples: resamples (and shuffles) drawn.
        seed: the seed.
        confidence: the intervals' coverage.
    """

    test_name: str
    access: str
    sentences: int
    words: int
    characters: int
    systems: list[SystemRun]
    measures: dict[str, BootstrapResult]
    test: str
    resamples: int
    seed: int | None
    confidence: float

    @property
    def primary(self) -> str:
        """The measure the chart draws (KSR, or scan steps per character)."""
        return ACCESS_MEASURES[self.access][0]


def label_systems(paths: Sequence[str | None], ks: Sequence[int], select_costs: Sequence[float]) -> list[tuple[str, int, int, float]]:
    """Labels for every (model, k, select cost) combination, in that nesting order.

    A model is named by its file stem (``demo`` for the demo model; a number is
    added where two stems are the same); ``k=`` and ``select=`` are added only
    when several values are compared.

    Returns:
        (label, model index, k, select cost) tuples.
    """
    stems = ["demo" if p is None else Path(p).stem for p in paths]
    names = [s if stems.count(s) == 1 else f"{s}#{i + 1}" for i, s in enumerate(stems)]
    out = []
    for index, name in enumerate(names):
        for k in ks:
            for cost in select_costs:
                parts = [name]
                if len(ks) > 1:
                    parts.append(f"k={k}")
                if len(select_costs) > 1:
                    parts.append(f"select={cost:g}")
                out.append((" ".join(parts), index, k, cost))
    return out


def _check_systems(systems: Sequence[ComparedSystem]) -> None:
    if not systems:
        raise OptionError("nothing to compare: give at least one model")
    labels = [s.label for s in systems]
    if len(set(labels)) != len(labels):
        raise OptionError("two compared systems have the same label")
    modes = {(s.settings.text_mode, s.settings.wrapped) for s in systems}
    if len(modes) != 1:
        raise OptionError("compared systems must read the text the same way (one text mode, wrapped or not)")
    kinds = {s.scanning is None for s in systems}
    if len(kinds) != 1:
        raise OptionError("compared systems must all use keystrokes or all use scanning")


def _type_keys(system: ComparedSystem, passage: Passage, progress: Callable[[int, int], None] | None) -> dict[str, np.ndarray]:
    run = Typist(system.model, system.settings).type_passage(passage, progress=progress)
    return {"keystrokes": per_sentence(passage, [t.keystrokes for t in run.traces])}


def _type_scanning(system: ComparedSystem, passage: Passage, progress: Callable[[int, int], None] | None) -> dict[str, np.ndarray]:
    scanning = system.scanning
    assert scanning is not None
    grid = grid_for(system.model, scanning, passage)
    run = ScanningTypist(system.model, system.settings, scanning, grid).type_passage(passage, progress=progress)
    interval, dwell = scanning.scan_interval, scanning.press_dwell
    steps = per_sentence(passage, run.steps)
    presses = per_sentence(passage, run.presses)
    plain_steps = per_sentence(passage, run.steps_unaided)
    plain_presses = per_sentence(passage, run.presses_unaided)
    return {
        "scan_steps": steps,
        "presses": presses,
        "seconds": steps * interval + presses * dwell,
        "scan_steps_unaided": plain_steps,
        "presses_unaided": plain_presses,
        "seconds_unaided": plain_steps * interval + plain_presses * dwell,
    }


def run_comparison(
    systems: Sequence[ComparedSystem],
    text: str,
    *,
    test_name: str = "",
    resamples: int = 1000,
    seed: int | None = 0,
    confidence: float = 0.95,
    test: str = "bootstrap",
    progress: Callable[[str, int, int], None] | None = None,
) -> ComparisonResult:
    """Simulate every system on the same text and compare them with paired resampling.

    Args:
        systems: the systems, the first being the reference the chart compares against.
        text: the test text.
        test_name: the test file's name, for the results.
        resamples: bootstrap resamples (and shuffles for approximate randomisation).
        seed: the seed of the random generator (None: fresh entropy).
        confidence: the intervals' coverage.
        test: ``bootstrap`` or ``randomisation``: how pair p-values are found
            (intervals always come from the paired bootstrap).
        progress: called with (stage label, done, total).

    Returns:
        The result.

    Raises:
        OptionError: no systems, mixed text modes or access kinds, duplicate
            labels, an unknown test, resamples below 1, or a grid without a cell the text needs.
        CorpusError: the text holds no words.
    """
    _check_systems(systems)
    if test not in TESTS:
        raise OptionError(f"unknown test {test!r}; choose one of {', '.join(TESTS)}")
    first = systems[0].settings
    passage = read_passage(text, first.text_mode, wrapped=first.wrapped)
    characters = sentence_characters(passage)
    access = "keys" if systems[0].scanning is None else "scanning"
    report = progress or (lambda stage, done, total: None)
    scores: dict[int, tuple[np.ndarray, np.ndarray]] = {}
    runs: list[SystemRun] = []
    for number, system in enumerate(systems, 1):
        label = f"[{number}/{len(systems)}] {system.label}"
        report(label, 0, 0)

        def update(done: int, total: int, label: str = label) -> None:
            report(label, done, total)

        typed = _type_keys(system, passage, update) if access == "keys" else _type_scanning(system, passage, update)
        key = id(system.model)
        if key not in scores:
            scores[key] = sentence_log_probs(system.model, passage)
        log2_probs, tokens = scores[key]
        columns = {"characters": characters, **typed, "neg_log2_prob": -log2_probs, "tokens": tokens}
        runs.append(
            SystemRun(
                label=system.label,
                model_path=system.model_path,
                method=system.model.method,
                settings=asdict(system.settings),
                scanning=None if system.scanning is None else system.scanning.to_json(),
                columns=columns,
            )
        )
    measures = {}
    for name in ACCESS_MEASURES[access]:
        spec = MEASURES[name]
        measure = RatioMeasure(
            name,
            np.stack([r.columns[spec.numerator] for r in runs]),
            np.stack([r.columns[spec.denominator] for r in runs]),
            spec.transform,
        )
        found = paired_bootstrap(measure, resamples=resamples, seed=seed, confidence=confidence)
        if test == "randomisation":
            pairs = {
                pair: PairResult(result.difference, result.interval, approximate_randomisation(measure, pair[0], pair[1], shuffles=resamples, seed=seed))
                for pair, result in found.pairs.items()
            }
            found = BootstrapResult(found.name, found.values, found.intervals, pairs, found.resamples, found.confidence, "randomisation")
        measures[name] = found
    return ComparisonResult(
        test_name=test_name,
        access=access,
        sentences=len(characters),
        words=len(passage.words),
        characters=passage.characters,
        systems=runs,
        measures=measures,
        test=test,
        resamples=resamples,
        seed=seed,
        confidence=confidence,
    )
