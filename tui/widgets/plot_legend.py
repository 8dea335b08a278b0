"""A plot's legend on a line of its own, under the plot.

The plotting library draws its legend inside the plot's top-left corner, over the data: on the
quality screen it hid the top of the tallest bar and, at 80 columns, the precision-recall
curves where precision is high. Each series is drawn here in its plot colour with the mark the
plot draws it with, so the legend reads without colour too; the series wrap whole.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.cells import cell_len
from rich.color import Color
from rich.style import Style
from rich.text import Text
from textual.widgets import Static

GAP = "   "


@dataclass(frozen=True)
class Series:
    label: str
    color: tuple[int, int, int]  # as given to the plot
    mark: str  # the cells the plot draws it with, as the legend shows them


def legend_lines(series: list[Series], width: int) -> Text:
    """The series, as many to a line as ``width`` cells hold (a series is never split)."""
    text = Text()
    used = 0
    for s in series:
        cells = cell_len(s.mark) + 1 + cell_len(s.label)
        if used and used + len(GAP) + cells > width:
            text.append("\n")
            used = 0
        elif used:
            text.append(GAP)
            used += len(GAP)
        text.append(s.mark, Style(color=Color.from_rgb(*s.color)))
        text.append(" " + s.label)
        used += cells
    return text


class PlotLegend(Static):
    """Shows :func:`legend_lines` at the widget's width, again when that changes."""

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self._series: list[Series] = []

    def show(self, series: list[Series]) -> None:
        self._series = list(series)
        self.update(legend_lines(self._series, self.content_size.width or 80))

    def on_resize(self) -> None:
        self.show(self._series)
