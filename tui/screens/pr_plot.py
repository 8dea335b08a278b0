"""The quality screen's precision-recall plot: the design-based and naive curves and the
decision threshold's point, on axes zoomed to them.

On a 0-to-1 square the demo's points all lay above 0.75 on both axes, crowded into the
top-right corner of the plot; each axis now starts at a round value below its least point
(``figures.share_axis``) when they all lie in its top half, and the title and the x axis's
label say where it starts, so that no one reads the corner as the origin.
"""

from __future__ import annotations

from typing import Any

from docket.core.results import Evaluation

from ..figures import share_axis
from ..widgets.plot_legend import Series

# each series: its colour, the plot's marker for it, and that marker as the legend shows it;
# the marks differ as well as the colours, so that the legend reads without colour
CURVES = {"design-based": ((0, 130, 200), "braille", "⠒⠒"),
          "naive (biased)": ((245, 130, 48), "dot", "••"),
          "threshold": ((230, 25, 75), "x", "x")}
# Titles fit the 38 cells a plot's line has at 80 columns (see quality.py)
PR_TITLE = "precision against recall"
PR_NONE = "precision against recall (none yet)"
X_LABEL = "recall (within the candidate pairs)"


def _points(rows: list[dict[str, Any]]) -> list[tuple[float, float]]:
    return [(r["recall"]["value"], r["precision"]["value"]) for r in rows
            if r["recall"]["value"] is not None and r["precision"]["value"] is not None]


def draw_pr(plt: Any, curve: Evaluation | None, report: Evaluation | None
            ) -> tuple[str, list[Series]]:
    """Draw on ``plt`` (the plotting library's figure, cleared); the title and the legend."""
    series: list[tuple[str, list[tuple[float, float]]]] = []
    if curve is not None:
        series = [(name, _points(rows)) for rows, name in (
            (curve.estimates, "design-based"), (curve.naive, "naive (biased)"))]
        at = report.at_threshold if report else None
        if at is not None:
            series.append((f"threshold {at['threshold']:g}", _points([at])))
    every = [p for _, points in series for p in points]
    x, y = share_axis([p[0] for p in every]), share_axis([p[1] for p in every])
    plt.xlabel(f"recall from {x.low:.2f}, within candidates" if x.zoomed else X_LABEL)
    plt.xlim(x.low, 1)
    plt.ylim(y.low, 1)
    plt.xticks(x.ticks, x.labels())
    plt.yticks(y.ticks, y.labels())
    shown = []
    for name, points in series:
        if not points:
            continue
        color, marker, mark = CURVES["threshold" if name.startswith("threshold") else name]
        draw = plt.scatter if name.startswith("threshold") else plt.plot
        draw([p[0] for p in points], [p[1] for p in points], marker=marker, color=color)
        shown.append(Series(name, color, mark))
    if curve is None:
        return PR_NONE, shown
    return (f"precision from {y.low:.2f} against recall" if y.zoomed else PR_TITLE), shown
