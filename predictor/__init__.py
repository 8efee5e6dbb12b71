"""foretype's engine: smoothed trigram models for predictive text entry.

Build a model from a corpus, ask it for exact top-k next-word predictions and
completions, and score held-out text::

    import predictor
    model = predictor.build(["corpus.txt"], vocab_size=20000)
    model.save("chat.model")
    model = predictor.load("chat.model")
    model.suggest(("at", "the"), prefix="sta", k=5)
    model.suggest_text("see you at the sta", k=5)
    model.prob("station", ("at", "the"))
    model.perplexity(open("heldout.txt", encoding="utf-8"))
"""

from __future__ import annotations

from .builder import build, build_from_counts
from .counting import CorpusCounts, count_corpus
from .errors import (
    CapacityError,
    CorpusError,
    EncodingError,
    ForetypeError,
    ModelFileError,
    ModelVersionError,
    OptionError,
    OutputError,
)
from .estimate import METHODS
from .modelfile.format import FORMAT_VERSION
from .query.model import LanguageModel, Suggestion, TextScore, load
from .query.verify import verify_model as verify
from .query.vocabulary import END, START, UNKNOWN

__all__ = [
    "build",
    "build_from_counts",
    "count_corpus",
    "CorpusCounts",
    "load",
    "verify",
    "LanguageModel",
    "Suggestion",
    "TextScore",
    "METHODS",
    "FORMAT_VERSION",
    "START",
    "END",
    "UNKNOWN",
    "ForetypeError",
    "OptionError",
    "CorpusError",
    "EncodingError",
    "ModelFileError",
    "ModelVersionError",
    "CapacityError",
    "OutputError",
]
