"""Per-sentence totals of a simulation: the unit the paired bootstrap resamples.

A passage's words are grouped into its sentences (a word that opens a sentence
starts a new group, exactly where training and scoring start one).  Each
sentence owns the characters of its words and of what follows each word up to
the next word, so the per-sentence characters sum to the passage's characters;
the characters before the first word belong to the first sentence, as they do
in the typist's first word trace.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..query.model import LanguageModel
from .passage import Passage


def sentence_numbers(passage: Passage) -> np.ndarray:
    """The sentence each word belongs to.

    Returns:
        int64 array of shape (words,): 0 for the first sentence, then counting up.
    """
    starts = np.fromiter((w.sentence_start for w in passage.words), dtype=np.int64, count=len(passage.words))
    starts[0] = 1
    return np.cumsum(starts) - 1


def sentence_count(passage: Passage) -> int:
    """How many sentences the passage holds."""
    return int(sentence_numbers(passage)[-1]) + 1


def per_sentence(passage: Passage, per_word: Sequence[float] | np.ndarray) -> np.ndarray:
    """Sum a per-word quantity by sentence.

    Args:
        passage: the passage.
        per_word: one value per word of the passage.

    Returns:
        float64 array of shape (sentences,).
    """
    numbers = sentence_numbers(passage)
    return np.bincount(numbers, weights=np.asarray(per_word, dtype=np.float64), minlength=int(numbers[-1]) + 1)


def word_characters(passage: Passage) -> np.ndarray:
    """Characters each word accounts for: the word and what follows it (the first word also the lead).

    Returns:
        float64 array of shape (words,) summing to ``passage.characters``.
    """
    if passage.mode == "words":
        counts = [len(w.target) + 1 for w in passage.words]
    else:
        counts = [len(w.target) + len(w.gap) for w in passage.words]
        counts[0] += len(passage.lead)
    return np.asarray(counts, dtype=np.float64)


def sentence_characters(passage: Passage) -> np.ndarray:
    """Characters per sentence (float64 array of shape (sentences,), summing to ``passage.characters``)."""
    return per_sentence(passage, word_characters(passage))


def sentence_words(passage: Passage) -> list[list[str]]:
    """Each sentence's words as written (what the model scores)."""
    groups: list[list[str]] = []
    for word in passage.words:
        if word.sentence_start or not groups:
            groups.append([])
        groups[-1].append(word.written)
    return groups


def sentence_log_probs(model: LanguageModel, passage: Passage) -> tuple[np.ndarray, np.ndarray]:
    """log2 P(sentence) and predicted tokens (words + one end symbol) for each sentence.

    The same convention as :meth:`LanguageModel.score`: summed over the
    sentences they give its ``log2_prob`` and ``tokens``.

    Returns:
        ``(log2_probs, tokens)``: float64 arrays of shape (sentences,); a
        sentence the model gives probability 0 has -inf.
    """
    start = model.vocab.start_id
    end = model.vocab.end_id
    groups = sentence_words(passage)
    pieces = [np.concatenate(([start, start], model.sentence_ids(words), [end])) for words in groups]
    lengths = np.array([len(p) for p in pieces], dtype=np.int64)
    stream = np.concatenate(pieces)
    # Triple t predicts stream[t + 2]; the triples of sentence s start at its offset and number its length - 2.
    offsets = np.concatenate(([0], np.cumsum(lengths)[:-1]))
    predicted = lengths - 2
    rows = np.concatenate([np.arange(o, o + n) for o, n in zip(offsets, predicted)])
    probs = model.prob_triples(stream[rows], stream[rows + 1], stream[rows + 2])
    with np.errstate(divide="ignore"):
        logs = np.log2(probs)
    owner = np.repeat(np.arange(len(groups)), predicted)
    return np.bincount(owner, weights=logs, minlength=len(groups)), predicted.astype(np.float64)
