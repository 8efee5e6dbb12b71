"""The bundled demo model: built from ``demo_vocab/`` on first use and cached.

The cache file's name carries a digest of the demo text, the model-file format
version and the engine version, so it is rebuilt whenever any of them changes.
The cache lives in ``$FORETYPE_CACHE``, else ``$XDG_CACHE_HOME/foretype``, else
``~/.cache/foretype``.
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

from . import demo_vocab  # type: ignore[attr-defined]  # installed as foretype.demo_vocab
from .builder import build
from .counting import ProgressCallback
from .errors import CorpusError, ModelFileError
from .modelfile.format import FORMAT_VERSION
from .query.model import LanguageModel, load
from .version import __version__

DEMO_BUILD = {"vocab_size": None, "min_count": 1, "method": "kneser-ney"}
"""How the demo model is built."""


def demo_folder() -> Path:
    """The folder holding the bundled demo text (installed beside the engine)."""
    return Path(demo_vocab.__file__).resolve().parent


def demo_corpus() -> Path:
    """The demo training text."""
    return demo_folder() / "corpus.txt"


def demo_heldout() -> Path:
    """The demo held-out test text."""
    return demo_folder() / "heldout.txt"


def cache_folder() -> Path:
    """Where built demo models are kept."""
    explicit = os.environ.get("FORETYPE_CACHE")
    if explicit:
        return Path(explicit)
    xdg = os.environ.get("XDG_CACHE_HOME")
    return (Path(xdg) if xdg else Path.home() / ".cache") / "foretype"


def demo_model_path() -> Path:
    """The cache path of the demo model for the current demo text and engine."""
    corpus = demo_corpus()
    try:
        digest = hashlib.sha256(corpus.read_bytes())
    except OSError as error:
        raise CorpusError(f"{corpus}: the bundled demo text is missing ({error.strerror or error})") from None
    digest.update(f"{FORMAT_VERSION}/{__version__}/{sorted(DEMO_BUILD.items())}".encode())
    return cache_folder() / f"demo-{digest.hexdigest()[:16]}.model"


def demo_model(progress: ProgressCallback | None = None) -> LanguageModel:
    """Load the cached demo model, building it first if needed.

    Args:
        progress: reading progress, passed to :func:`foretype.builder` when a build happens.
    """
    path = demo_model_path()
    if path.exists():
        try:
            return load(path)
        except ModelFileError:
            pass  # a damaged cache is rebuilt below
    model = build([demo_corpus()], progress=progress, **DEMO_BUILD)  # type: ignore[arg-type]
    path.parent.mkdir(parents=True, exist_ok=True)
    model.save(path)
    for old in path.parent.glob("demo-*.model"):
        if old != path:
            try:
                old.unlink()
            except OSError:
                pass
    return load(path)
