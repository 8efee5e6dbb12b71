"""Structural checks of a loaded model: cheap enough to run on every load.

They make sure no query can read outside an array or loop forever: every
required section is present with the expected type and length, offsets start
at 0, never decrease and end at their array's length, and word ids lie in
range.  Checksums (:func:`predictor.modelfile.verify`) catch the rest.
"""

from __future__ import annotations

import numpy as np

from .errors import ModelFileError
from .modelfile import ModelFile

_REQUIRED_META = ("method", "interpolated", "value_encoding", "vocab_size", "corpus_tokens")
_SECTION_KINDS = {
    "p1": "f",
    "l2.off": "u",
    "l2.word": "iu",
    "l2.value": "uf",
    "l2.gamma": "f",
    "l3.off": "u",
    "l3.word": "iu",
    "l3.value": "uf",
    "l3.gamma": "f",
    "vocab.trie": "u",
    "vocab.key_lo": "i",
    "vocab.key_hi": "i",
    "vocab.key_order": "u",
    "vocab.order": "iu",
    "vocab.words_blob": "u",
    "vocab.words_off": "u",
    "vocab.display_blob": "u",
    "vocab.display_off": "u",
}


def check_structure(model: ModelFile) -> None:
    """Raise ModelFileError unless the model's arrays are mutually consistent."""
    name = model.path
    meta = model.meta
    s = model.sections
    for key in _REQUIRED_META:
        if key not in meta:
            raise ModelFileError(f"{name}: corrupt header (missing {key})")
    for section, kinds in _SECTION_KINDS.items():
        if section not in s:
            raise ModelFileError(f"{name}: corrupt (missing section {section})")
        if s[section].dtype.kind not in kinds or s[section].ndim != 1:
            raise ModelFileError(f"{name}: corrupt (section {section} has the wrong type)")
    try:
        size = int(meta["vocab_size"])
    except (TypeError, ValueError):
        raise ModelFileError(f"{name}: corrupt header (bad vocab_size)") from None
    base = size + 3
    n2 = len(s["l2.word"])
    n3 = len(s["l3.word"])
    expect = {
        "p1": size + 2,
        "l2.off": base + 1,
        "l2.value": n2,
        "l2.gamma": base,
        "l3.off": n2 + 2,
        "l3.value": n3,
        "l3.gamma": n2 + 1,
        "vocab.words_off": size + 1,
        "vocab.display_off": size + 1,
        "vocab.key_hi": len(s["vocab.key_lo"]),
        "vocab.key_order": len(s["vocab.key_lo"]),
    }
    for section, length in expect.items():
        if len(s[section]) != length:
            raise ModelFileError(f"{name}: corrupt (section {section} has {len(s[section])} entries, expected {length})")
    _offsets(name, "l2.off", s["l2.off"], n2)
    _offsets(name, "l3.off", s["l3.off"], n3)
    _offsets(name, "vocab.words_off", s["vocab.words_off"], len(s["vocab.words_blob"]))
    _offsets(name, "vocab.display_off", s["vocab.display_off"], len(s["vocab.display_blob"]))
    _ids(name, "l2.word", s["l2.word"], 0, size + 2)
    _ids(name, "l3.word", s["l3.word"], 0, size + 2)
    _ids(name, "vocab.order", s["vocab.order"], 0, size)
    _ids(name, "vocab.key_hi", s["vocab.key_hi"], 0, size + 1)
    _ids(name, "vocab.key_lo", s["vocab.key_lo"], -size - 1, size)
    key_order = s["vocab.key_order"]
    listed = key_order[key_order != np.iinfo(key_order.dtype).max] if len(key_order) else key_order
    if len(listed) and int(listed.max()) > len(s["vocab.order"]):
        raise ModelFileError(f"{name}: corrupt (section vocab.key_order points past the order list)")
    p1 = s["p1"]
    if not np.all(np.isfinite(p1)) or p1.min(initial=0) < 0:
        raise ModelFileError(f"{name}: corrupt (unigram probabilities out of range)")


def _offsets(name: object, section: str, offsets: np.ndarray, length: int) -> None:
    if len(offsets) == 0 or int(offsets[0]) != 0 or int(offsets[-1]) != length:
        raise ModelFileError(f"{name}: corrupt (section {section} does not span its entries)")
    if len(offsets) > 1 and np.any(offsets[1:] < offsets[:-1]):
        raise ModelFileError(f"{name}: corrupt (section {section} decreases)")


def _ids(name: object, section: str, ids: np.ndarray, low: int, high: int) -> None:
    if len(ids) and (int(ids.min()) < low or int(ids.max()) > high):
        raise ModelFileError(f"{name}: corrupt (section {section} holds ids out of range)")
