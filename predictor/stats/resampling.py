"""The paired bootstrap and approximate randomisation for corpus-level ratio measures.

A corpus-level measure such as keystroke savings is a ratio of totals over the
test sentences (1 - sum of keystrokes / sum of characters), not a mean of
per-sentence ratios, so the resampling works on the totals:

* **Paired bootstrap** (Koehn 2004, "Statistical Significance Tests for Machine
  Translation Evaluation", EMNLP): draw the test sentences with replacement B
  times (one index matrix of shape (B, sentences), shared by every system so
  the comparison is paired), sum each system's numerators and denominators per
  resample, and apply the measure.  The 95% interval is the 2.5th and 97.5th
  percentile of the resampled values (the percentile bootstrap).  For a pair,
  the same is done for the difference of the two systems' values; the p-value
  is two-sided: twice the smaller of the shares of resamples whose difference
  is at most 0 and at least 0, capped at 1 (Koehn's one-sided share of
  resamples where the better system does not win is the smaller share).
* **Approximate randomisation** (Riezler & Maxwell 2005, ACL workshop on
  evaluation measures): under the null hypothesis the two systems' results on
  each sentence are exchangeable, so swap them at random, sentence by sentence,
  R times; p = (1 + shuffles whose |difference| reaches the observed one) /
  (R + 1).  One swap matrix of shape (R, sentences); the shuffled totals are
  the original totals plus a matrix-vector product with the per-sentence
  differences.

Everything is vectorised with numpy: one loop over chunks of resamples (to
bound memory) and over systems, never over single resamples.  The generator is
``numpy.random.default_rng(seed)``, so a seed makes every result reproducible.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from ..errors import OptionError

Transform = Callable[[np.ndarray], np.ndarray]
"""Maps ratios of totals (any shape, float64) to the measure, elementwise."""

CHUNK_CELLS = 4_000_000
"""Index-matrix cells handled at once (about 32 MB of int64), so long texts resample in bounded memory."""


def _identity(ratio: np.ndarray) -> np.ndarray:
    return ratio


@dataclass(frozen=True)
class RatioMeasure:
    """A corpus-level measure of several systems on the same sentences: transform(sum(num) / sum(den)).

    Attributes:
        name: what the measure is called in reports (``ksr``, ``perplexity`` ...).
        numerators: float64 array of shape (systems, sentences).
        denominators: float64 array of shape (systems, sentences), same shape.
        transform: elementwise map from the ratio of totals to the measure.
    """

    name: str
    numerators: np.ndarray
    denominators: np.ndarray
    transform: Transform = field(default=_identity)

    def __post_init__(self) -> None:
        num = np.asarray(self.numerators, dtype=np.float64)
        den = np.asarray(self.denominators, dtype=np.float64)
        if num.ndim != 2 or num.shape != den.shape:
            raise OptionError(f"{self.name}: numerators and denominators must both be (systems, sentences) arrays")
        if num.shape[1] == 0:
            raise OptionError(f"{self.name}: no sentences to resample")
        object.__setattr__(self, "numerators", num)
        object.__setattr__(self, "denominators", den)

    @property
    def systems(self) -> int:
        """How many systems the measure holds."""
        return int(self.numerators.shape[0])

    @property
    def sentences(self) -> int:
        """How many sentences each system has."""
        return int(self.numerators.shape[1])

    def finite(self, system: int) -> bool:
        """Tell whether a system's per-sentence values are all finite (a zero-probability sentence is not)."""
        return bool(np.all(np.isfinite(self.numerators[system])) and np.all(np.isfinite(self.denominators[system])))

    def value(self, system: int) -> float:
        """The measure on the whole text for one system."""
        ratio = np.array([self.numerators[system].sum() / self.denominators[system].sum()])
        return float(self.transform(ratio)[0])


@dataclass(frozen=True)
class PairResult:
    """How two systems differ on one measure.

    Attributes:
        difference: value of the first system minus value of the second.
        interval: (low, high) of the difference, or None when not finite.
        p_value: two-sided p-value of "no difference" by the chosen test.
    """

    difference: float | None
    interval: tuple[float, float] | None
    p_value: float | None


@dataclass(frozen=True)
class BootstrapResult:
    """Values, intervals and pairwise differences of one measure.

    Attributes:
        name: the measure's name.
        values: one value per system (None where not finite).
        intervals: one (low, high) per system (None where not finite).
        pairs: for each pair (i, j) with i < j, how system i differs from system j.
        resamples: bootstrap resamples drawn.
        confidence: the intervals' coverage (0.95 for 95%).
        test: ``bootstrap`` or ``randomisation`` (how the p-values were found).
    """

    name: str
    values: list[float | None]
    intervals: list[tuple[float, float] | None]
    pairs: dict[tuple[int, int], PairResult]
    resamples: int
    confidence: float
    test: str


def _check(resamples: int, confidence: float) -> None:
    if not isinstance(resamples, int) or resamples < 1:
        raise OptionError(f"resamples must be a whole number of at least 1, not {resamples}")
    if not (0.0 < confidence < 1.0):
        raise OptionError(f"the confidence level must lie between 0 and 1, not {confidence}")


def resample_indices(rng: np.random.Generator, sentences: int, resamples: int) -> np.ndarray:
    """Draw a bootstrap index matrix: each row one resample of the sentences, with replacement.

    Args:
        rng: the random generator.
        sentences: sentences in the text (n).
        resamples: rows to draw (B).

    Returns:
        int64 array of shape (B, n) with values in [0, n).
    """
    return rng.integers(0, sentences, size=(resamples, sentences), dtype=np.int64)


def _chunks(total: int, sentences: int) -> list[int]:
    per = max(1, CHUNK_CELLS // max(1, sentences))
    sizes = [per] * (total // per)
    if total % per:
        sizes.append(total % per)
    return sizes


def resampled_values(measure: RatioMeasure, indices: np.ndarray) -> np.ndarray:
    """The measure of every system on given resamples.

    Args:
        measure: the measure.
        indices: int array of shape (B, n): sentence indices of each resample.

    Returns:
        float64 array of shape (B, systems).
    """
    out = np.empty((indices.shape[0], measure.systems), dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        for system in range(measure.systems):
            num = measure.numerators[system][indices].sum(axis=1)
            den = measure.denominators[system][indices].sum(axis=1)
            out[:, system] = measure.transform(num / den)
    return out


def _interval(samples: np.ndarray, confidence: float) -> tuple[float, float] | None:
    if not np.all(np.isfinite(samples)):
        return None
    tail = 100.0 * (1.0 - confidence) / 2.0
    low, high = np.percentile(samples, [tail, 100.0 - tail])
    return float(low), float(high)


def _two_sided(differences: np.ndarray) -> float:
    at_most = float(np.mean(differences <= 0))
    at_least = float(np.mean(differences >= 0))
    return min(1.0, 2.0 * min(at_most, at_least))


def bootstrap_interval(measure: RatioMeasure, *, resamples: int = 1000, seed: int | None = 0, confidence: float = 0.95) -> list[tuple[float, float] | None]:
    """Percentile-bootstrap intervals of each system's measure (no pairs).

    Args:
        measure: the measure.
        resamples: resamples to draw.
        seed: the generator's seed (None: fresh entropy).
        confidence: the coverage.

    Returns:
        One (low, high) per system, None where a value is not finite.
    """
    return paired_bootstrap(measure, resamples=resamples, seed=seed, confidence=confidence, pairs=False).intervals


def paired_bootstrap(
    measure: RatioMeasure,
    *,
    resamples: int = 1000,
    seed: int | None = 0,
    confidence: float = 0.95,
    pairs: bool = True,
    indices: np.ndarray | None = None,
) -> BootstrapResult:
    """Intervals for each system and, for each pair, the difference's interval and p-value (Koehn 2004).

    Args:
        measure: the measure of every system on the same sentences.
        resamples: bootstrap resamples (B).
        seed: the generator's seed (None: fresh entropy).
        confidence: the intervals' coverage.
        pairs: also compare every pair of systems.
        indices: an explicit (B, n) index matrix instead of random draws (for
            exact checks: every possible resample of a tiny text).

    Returns:
        The result; ``test`` is ``bootstrap``.

    Raises:
        OptionError: resamples below 1 or a confidence outside (0, 1).
    """
    if indices is None:
        _check(resamples, confidence)
        rng = np.random.default_rng(seed)
        parts = [resampled_values(measure, resample_indices(rng, measure.sentences, size)) for size in _chunks(resamples, measure.sentences)]
        samples = np.concatenate(parts, axis=0)
    else:
        _check(int(indices.shape[0]), confidence)
        samples = resampled_values(measure, np.asarray(indices, dtype=np.int64))
    count = measure.systems
    values: list[float | None] = []
    intervals: list[tuple[float, float] | None] = []
    for system in range(count):
        finite = measure.finite(system)
        values.append(measure.value(system) if finite else None)
        intervals.append(_interval(samples[:, system], confidence) if finite else None)
    found: dict[tuple[int, int], PairResult] = {}
    if pairs:
        for i in range(count):
            for j in range(i + 1, count):
                first, second = values[i], values[j]
                if first is None or second is None or not (math.isfinite(first) and math.isfinite(second)):
                    found[(i, j)] = PairResult(None, None, None)
                    continue
                differences = samples[:, i] - samples[:, j]
                found[(i, j)] = PairResult(first - second, _interval(differences, confidence), _two_sided(differences))
    return BootstrapResult(measure.name, values, intervals, found, int(samples.shape[0]), confidence, "bootstrap")


def approximate_randomisation(measure: RatioMeasure, first: int, second: int, *, shuffles: int = 1000, seed: int | None = 0) -> float | None:
    """The two-sided p-value of "no difference" between two systems by approximate randomisation.

    Riezler & Maxwell (2005): swap the two systems' per-sentence results at
    random; p = (1 + shuffles with |difference| >= the observed |difference|) / (shuffles + 1).

    Args:
        measure: the measure.
        first: index of one system.
        second: index of the other.
        shuffles: random swaps to draw (R).
        seed: the generator's seed (None: fresh entropy).

    Returns:
        The p-value, or None when either system's measure is not finite.

    Raises:
        OptionError: shuffles below 1.
    """
    _check(shuffles, 0.95)
    if not (measure.finite(first) and measure.finite(second)):
        return None
    num_a, num_b = measure.numerators[first], measure.numerators[second]
    den_a, den_b = measure.denominators[first], measure.denominators[second]
    observed = abs(measure.value(first) - measure.value(second))
    if not math.isfinite(observed):
        return None
    rng = np.random.default_rng(seed)
    delta_num = num_b - num_a
    delta_den = den_b - den_a
    sums = (num_a.sum(), den_a.sum(), num_b.sum(), den_b.sum())
    reached = 0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        for size in _chunks(shuffles, measure.sentences):
            swap = (rng.random((size, measure.sentences)) < 0.5).astype(np.float64)
            moved_num = swap @ delta_num
            moved_den = swap @ delta_den
            value_a = measure.transform((sums[0] + moved_num) / (sums[1] + moved_den))
            value_b = measure.transform((sums[2] - moved_num) / (sums[3] - moved_den))
            reached += int(np.count_nonzero(np.abs(value_a - value_b) >= observed))
    return (reached + 1) / (shuffles + 1)
