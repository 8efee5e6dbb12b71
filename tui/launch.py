"""Start the pad from the command line."""

from __future__ import annotations

from foretype.query.model import LanguageModel

from .app import PadApp
from .learning import learning_sources


def run_pad(model: LanguageModel, *, k: int = 5, learning: bool | None = None, skip_passed: bool = True) -> int:
    """Run the typing pad on a loaded model until the person quits.

    The pad learns into the learned file beside the model (``MODEL.learned``).

    Args:
        model: the model to type with.
        k: suggestions shown at each position (1 to 9).
        learning: switch learning on (True) or off (False) in the learned file first;
            None keeps the file's setting (a new file starts with learning on).
        skip_passed: within a word, leave out the words offered and passed over
            (as the simulated typist does by default).

    Returns:
        The exit code: 0 after a normal quit, Textual's code if the interface failed.
    """
    app = PadApp(model, k=k, make_source=learning_sources(learning), skip_passed=skip_passed)
    try:
        app.run()
    finally:
        source = app.learning
        if source is not None:
            source.close()
    return app.return_code or 0
