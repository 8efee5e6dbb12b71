"""Full verification of a model file, down to the distributions its queries compute (``foretype check``)."""

from __future__ import annotations

import os

import numpy as np

from ..errors import ModelFileError
from ..modelfile.format import ModelFile, read_model_file
from ..modelfile.integrity import SUM_TOLERANCE, check_structure, check_thoroughly
from .model import LanguageModel


def verify_model(path: str | os.PathLike[str]) -> ModelFile:
    """Fully verify a model file: checksums, structure, every thorough check and sampled sums.

    Args:
        path: the model file.

    Returns:
        The verified model file.

    Raises:
        ModelFileError: the first problem found (the message names file and problem).
        ModelVersionError: a format version this engine cannot read.
    """
    loaded = read_model_file(path, checksums=True)
    arrays = check_structure(loaded)
    check_thoroughly(loaded, arrays)
    if held_to_sums(loaded.meta):
        check_sums(LanguageModel(arrays, loaded.meta, path=loaded.path, file_bytes=loaded.file_bytes))
    return loaded


def held_to_sums(meta: dict[str, object]) -> bool:
    """Whether the model's distributions must sum to 1: all but an ARPA file imported as it was, unnormalised."""
    estimator = meta.get("estimator")
    return not (isinstance(estimator, dict) and estimator.get("normalised") is False)


def check_sums(lm: LanguageModel, samples: int = 48) -> None:
    """The distribution after the sentence start and after sampled contexts sums to 1 (within SUM_TOLERANCE).

    Raises:
        ModelFileError: a sampled distribution does not sum to 1.
    """
    name = lm.path
    size = lm.vocab_size
    start = size + 2
    w2 = lm.arrays.bigram_words()
    off2 = lm.arrays.l2_off.astype(np.int64)
    rng = np.random.default_rng(0)
    contexts = [(start, start)]
    if len(w2):
        for position in rng.integers(0, len(w2), size=samples):
            v = int(np.searchsorted(off2, position, side="right") - 1)
            contexts.append((v, int(w2[position])))
    outcomes = np.arange(size + 2, dtype=np.int64)
    for u, v in contexts:
        if v == size + 1:
            continue  # END is never a context
        total = float(lm.prob_triples(np.full(len(outcomes), u), np.full(len(outcomes), v), outcomes).sum())
        if not abs(total - 1.0) <= SUM_TOLERANCE:
            raise ModelFileError(f"{name}: corrupt (the distribution after context ids ({u}, {v}) sums to {total:.6f}, not 1)")
