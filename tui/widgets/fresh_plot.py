"""A plotext chart that is drawn afresh for every frame.

plotext rescales a figure's data in place when it builds a log-scaled figure,
so a second build (after a resize, or any redraw) shows an empty or broken
chart.  This widget keeps the drawing steps instead of the drawn figure and
runs them on a cleared figure before each build.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.app import RenderResult
from textual_plotext import PlotextPlot
from textual_plotext.plot import Plot

Drawing = Callable[[Plot], object]
"""Draws on a cleared figure (what it returns is ignored here)."""


class FreshPlot(PlotextPlot):
    """A plotext chart redrawn from its drawing steps at every render."""

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        """Args:
        id: the widget id.
        """
        super().__init__(id=id)
        self._drawing: Drawing | None = None

    def draw(self, drawing: Drawing) -> None:
        """Use these drawing steps from now on, and redraw."""
        self._drawing = drawing
        self.refresh()

    def render(self) -> RenderResult:
        """Clear the figure, draw it again, then let plotext build it at the widget's size."""
        self.plt.clear_figure()
        if self._drawing is not None:
            self._drawing(self.plt)
        return super().render()
