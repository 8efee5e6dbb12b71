"""How stored probability values are encoded in a model file.

``log16`` keeps each value as a 16-bit code of its base-2 logarithm in steps of
1/2048, from 1 down to 2^-32; smaller values are stored as 2^-32 and the code
65535 means exactly 0.  Values are rounded *down* to the next step (relative
error below 2^(1/2048) - 1, about 0.034%), never up: the decoded values of a
context then never hold more mass than the exact ones, so the lower-order
weight recomputed from them (``1 - stored mass``) is never smaller than the
estimator's.  Rounding to the nearest step would halve the error but can
round a value such as 0.99985 up to 1 and leave no mass at all for unseen
words (probability 0, infinite perplexity).
``float32`` keeps each value as a 32-bit float.  After encoding, every
lower-order weight is recomputed from the decoded values, so each stored
distribution still sums to 1.
"""

from __future__ import annotations

import numpy as np

LOG16 = "log16"
FLOAT32 = "float32"
CODEBOOK8 = "codebook8"
"""One byte per value: the code of one of 256 levels fitted per order (sections ``l2.codebook``,
``l3.codebook``); written by shrinking a model (:mod:`foretype.shrink.quantise`)."""
ENCODINGS = (LOG16, FLOAT32)
_STEPS_PER_OCTAVE = 2048
_ZERO_CODE = 65535


def encode(values: np.ndarray, encoding: str) -> np.ndarray:
    """Encode float64 values in [0, 1] (uint16 codes for log16, float32 otherwise)."""
    if encoding == FLOAT32:
        return values.astype(np.float32)
    with np.errstate(divide="ignore"):
        scaled = -np.log2(np.maximum(values, 0.0)) * _STEPS_PER_OCTAVE
    codes = np.clip(np.ceil(scaled), 0, _ZERO_CODE - 1)
    codes = np.where(values > 0, codes, _ZERO_CODE)
    return codes.astype(np.uint16)


DECODE_TABLE = np.exp2(-np.arange(65536, dtype=np.float64) / _STEPS_PER_OCTAVE)
"""float64 value of every log16 code."""
DECODE_TABLE[_ZERO_CODE] = 0.0
DECODE_TABLE.flags.writeable = False
_TABLE = DECODE_TABLE


def decode(stored: np.ndarray) -> np.ndarray:
    """Decode stored values to float64 (the encoding follows from the dtype)."""
    if stored.dtype == np.uint16:
        return _TABLE[stored]
    return stored.astype(np.float64)


def decode_one(stored: np.ndarray, index: int) -> float:
    """Decode one stored value to a Python float."""
    value = stored[index]
    if stored.dtype == np.uint16:
        return float(_TABLE[value])
    return float(value)


def value_table(stored: np.ndarray, codebook: np.ndarray | None) -> np.ndarray | None:
    """The float64 value of every code of a level's stored values, or None for float32 values.

    Args:
        stored: the level's stored values (``l2_value`` or ``l3_value``).
        codebook: the level's codebook (``l2_codebook`` or ``l3_codebook``), if any.

    16-bit codes use the fixed logarithmic table; 8-bit codes the level's own
    codebook (:data:`CODEBOOK8`).
    """
    if stored.dtype == np.uint8:
        if codebook is None:
            raise ValueError("8-bit values need their codebook")
        return np.asarray(codebook, dtype=np.float64)
    return DECODE_TABLE if stored.dtype == np.uint16 else None
