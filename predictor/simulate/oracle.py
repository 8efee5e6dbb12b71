"""Two yardsticks computed straight from the vocabulary arrays, never through ``suggest``.

* The **oracle** (the vocabulary-limited gold standard of Trnka & McCoy,
  "Evaluating Word Prediction: Framing Keystroke Savings", ACL 2008): every word
  the vocabulary can offer is picked as soon as the typist looks (after
  ``min_prefix`` letters), every other word is typed in full.  No model with
  this vocabulary and these settings can save more.
* The **baseline**: plain frequency-list completion, the older word-completion
  practice: the k vocabulary words with the typed prefix that rank highest in
  the model's unigram distribution, whatever the context.

Both use the typist's editing rules (:mod:`foretype.simulate.editing`) and its
rule for when a pick pays, so they differ from the typist only in which words
are offered.  They read the vocabulary's word list, display forms and the
unigram array, and find prefix ranges by bisection over the sorted word list,
so an error in the trie index or in ``suggest`` shows up as a disagreement.
"""

from __future__ import annotations

from bisect import bisect_left
from dataclasses import dataclass

import numpy as np

from ..query.model import LanguageModel
from ..text import capitalise, model_form
from .editing import gap_keystrokes, latest_useful_pick
from .passage import Passage, PassageWord
from .typist import TypistSettings


@dataclass(frozen=True)
class VocabularyView:
    """The vocabulary as plain lists: model forms in id order and their display forms.

    Attributes:
        words: model forms, sorted in code-point order (position = word id).
        display: display forms, parallel to ``words``.
        ids: model form to id.
    """

    words: list[str]
    display: list[str]
    ids: dict[str, int]

    @staticmethod
    def of(model: LanguageModel) -> VocabularyView:
        """Read a model's vocabulary into plain lists."""
        vocab = model.vocab
        words = vocab.words()
        display = [vocab.display(i) for i in range(len(words))]
        return VocabularyView(words, display, {w: i for i, w in enumerate(words)})

    def offered_form(self, word_id: int, word: PassageWord, mode: str) -> str:
        """How the engine would write a word id in this word's place."""
        if mode == "words":
            return self.words[word_id]
        shown = self.display[word_id]
        return capitalise(shown) if word.sentence_start else shown

    def offerable(self, word: PassageWord, mode: str) -> int | None:
        """The id of the vocabulary word that produces this word exactly, or None."""
        found = self.ids.get(word.model)
        if found is None or self.offered_form(found, word, mode) != word.target:
            return None
        return found


def _typed_cost(word: PassageWord, settings: TypistSettings) -> float:
    return len(word.target) + gap_keystrokes(word.gap, picked=False, autospace=settings.autospace)


def _picked_cost(word: PassageWord, letters: int, settings: TypistSettings) -> float:
    return letters + settings.select_cost + gap_keystrokes(word.gap, picked=True, autospace=settings.autospace)


def _last_step(word: PassageWord, settings: TypistSettings) -> int:
    return latest_useful_pick(len(word.target), word.gap, select_cost=settings.select_cost, autospace=settings.autospace)


def oracle_keystrokes(passage: Passage, view: VocabularyView, settings: TypistSettings) -> float:
    """Keystrokes of the vocabulary-limited oracle on a passage.

    Args:
        passage: the text.
        view: the vocabulary.
        settings: the typist's settings (k is irrelevant: the oracle always offers the word).

    Returns:
        The total keystrokes.
    """
    total = float(len(passage.lead))
    first = settings.min_prefix
    for word in passage.words:
        if first <= _last_step(word, settings) and view.offerable(word, passage.mode) is not None:
            total += _picked_cost(word, first, settings)
        else:
            total += _typed_cost(word, settings)
    return total


def baseline_keystrokes(passage: Passage, view: VocabularyView, unigram: np.ndarray, settings: TypistSettings) -> float:
    """Keystrokes of frequency-list completion on a passage.

    Args:
        passage: the text.
        view: the vocabulary.
        unigram: float array of shape (V,): the unigram probability of each word id.
        settings: the typist's settings.

    Returns:
        The total keystrokes.
    """
    size = len(view.words)
    # Rank of each id in the frequency list: probability descending, ties by id (word) ascending.
    order = np.lexsort((np.arange(size), -np.asarray(unigram[:size], dtype=np.float64)))
    rank = np.empty(size, dtype=np.int64)
    rank[order] = np.arange(size)
    words = view.words
    k = settings.k
    total = float(len(passage.lead))
    for word in passage.words:
        cost = _typed_cost(word, settings)
        found = view.offerable(word, passage.mode)
        if found is not None:
            mine = rank[found]
            for step in range(settings.min_prefix, _last_step(word, settings) + 1):
                prefix = model_form(word.target[:step])
                lo = bisect_left(words, prefix)
                hi = bisect_left(words, prefix + "\U0010ffff", lo=lo)  # past every word that starts with the prefix
                ahead = int(np.count_nonzero(rank[lo:hi] < mine)) if step else int(mine)
                if ahead < k:
                    cost = _picked_cost(word, step, settings)
                    break
        total += cost
    return total
