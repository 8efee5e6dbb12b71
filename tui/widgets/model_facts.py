"""One line of facts about the loaded model: file, method, vocabulary, n-grams stored."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from foretype.query.model import LanguageModel

from ..formatting import count, file_size


def model_label(path: Any) -> str:
    """The model's file name, or a note that it was built in memory."""
    return path.name if path is not None else "built in memory"


class ModelFacts(Widget):
    """Facts from ``model.info()``; more of them when the line is long enough."""

    DEFAULT_CSS = """
    ModelFacts { height: 1; text-wrap: nowrap; text-overflow: clip; }
    """

    model: reactive[LanguageModel | None] = reactive(None)
    """The model described (bound to the typing screen's ``model``)."""

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Args:
        id: the widget id.
        """
        super().__init__(id=id)
        self._label = ""
        self._info: dict[str, Any] = {}

    def watch_model(self, model: LanguageModel | None) -> None:
        """Read the facts once per model (``info()`` is not free)."""
        self._label = model_label(model.path) if model is not None else ""
        self._info = model.info() if model is not None else {}

    def render(self) -> Text:
        """The richest wording of the facts that fits on the line."""
        info = self._info
        if not info:
            return Text()
        wordings = [self._line(parts) for parts in self._wordings(info)]
        return next((line for line in wordings if line.cell_len <= self.size.width), wordings[-1])

    @staticmethod
    def _line(parts: list[tuple[str, str]]) -> Text:
        out = Text(no_wrap=True, overflow="ellipsis")
        for index, (label, value) in enumerate(parts):
            if index:
                out.append("  ·  " if label else " · ", style="dim")
            if label:
                out.append(f"{label} ", style="dim")
            out.append(value, style="bold")
        return out

    def _wordings(self, info: dict[str, Any]) -> list[list[tuple[str, str]]]:
        ngrams = info["ngrams"]
        total = count(sum(ngrams.values()))
        by_order = " + ".join(count(v) for _, v in sorted(ngrams.items()))
        words = f"{count(info['vocab_size'])} words"
        full = [
            ("model", self._label),
            ("method", info["method"]),
            ("vocabulary", words),
            ("n-grams", f"{total} ({by_order} by order)"),
            ("file", file_size(int(info["file_bytes"]))),
        ]
        middle = [("model", self._label), ("method", info["method"]), ("vocabulary", words), ("n-grams", total)]
        short = [("", self._label), ("", info["method"]), ("", words), ("", f"{total} n-grams")]
        # Which query path answers (the compiled core or the numpy fallback), where the line has room.
        path = info.get("query_path")
        if path:
            return [[*full, ("queries", str(path))], full, [*middle, ("queries", str(path))], middle, short]
        return [full, middle, short]
