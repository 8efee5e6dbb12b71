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

TYPE_CHECKING = False  # typing itself is not imported: the package's import stays as light as can be
if TYPE_CHECKING:
    from typing import Any

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

_SOURCES = {
    "build": "builder",
    "build_from_counts": "builder",
    "CorpusCounts": "counting",
    "count_corpus": "counting",
    "CapacityError": "errors",
    "CorpusError": "errors",
    "EncodingError": "errors",
    "ForetypeError": "errors",
    "ModelFileError": "errors",
    "ModelVersionError": "errors",
    "OptionError": "errors",
    "OutputError": "errors",
    "METHODS": "estimate",
    "FORMAT_VERSION": "modelfile.format",
    "LanguageModel": "query.model",
    "Suggestion": "query.model",
    "TextScore": "query.model",
    "load": "query.model",
    "verify": "query.verify",
    "END": "query.vocabulary",
    "START": "query.vocabulary",
    "UNKNOWN": "query.vocabulary",
}
"""Where each public name lives.  They load on first use, so that importing the
package (and the command line's start, which a Ctrl-C may interrupt) stays light."""


def __getattr__(name: str) -> Any:
    source = _SOURCES.get(name)
    if source is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    import importlib

    module = importlib.import_module(f"{__name__}.{source}")
    value = getattr(module, "verify_model" if name == "verify" else name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted({*globals(), *_SOURCES})


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
