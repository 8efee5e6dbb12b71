"""Start the pad from the command line."""

from __future__ import annotations

from predictor.model import LanguageModel

from .app import PadApp


def run_pad(model: LanguageModel, *, k: int = 5) -> int:
    """Run the typing pad on a loaded model until the person quits.

    Args:
        model: the model to type with.
        k: suggestions shown at each position (1 to 9).

    Returns:
        The exit code: 0 after a normal quit, Textual's code if the interface failed.
    """
    app = PadApp(model, k=k)
    app.run()
    return app.return_code or 0
