"""The precision-recall plot's axes are zoomed to its points, and say where they start."""

from __future__ import annotations

import re

from docket.tui.figures import share_axis
from tests.fixtures_review import pilot_test
from tests.test_quality_screen import QualityScreen, on_the_plots_tab


def test_a_share_axis_starts_below_its_least_point_when_all_lie_in_the_top_half() -> None:
    assert share_axis([0.1, 0.9]).ticks == [0.0, 0.25, 0.5, 0.75, 1.0]  # whole: not zoomed
    assert not share_axis([0.5]).zoomed and not share_axis([]).zoomed
    assert share_axis([0.76, 0.99]).ticks == [0.75, 0.8, 0.85, 0.9, 0.95, 1.0]
    assert share_axis([0.62, 1.0]).ticks == [0.6, 0.7, 0.8, 0.9, 1.0]
    # a margin below the least point, so that none lies on the axis line itself
    assert share_axis([0.8]).low == 0.75 and share_axis([0.7]).low == 0.6
    # at least 0.2 wide: a few hundredths apart do not fill the plot as if far apart
    assert share_axis([0.97, 0.99]).labels() == ["0.80", "0.85", "0.90", "0.95", "1.00"]


@pilot_test
async def test_the_curve_fills_its_plot_and_the_axes_say_where_they_start(team, team_app):
    # on a 0-to-1 square the curves of a fair matcher sat in the plot's top-right corner,
    # two dozen points in a few cells
    from textual.widgets import Static
    from textual_plotext import PlotextPlot

    def check(screen: QualityScreen, size: tuple) -> None:
        title = screen.query_one("#pr-title", Static).render().plain.strip()
        drawn = screen.query_one("#pr-plot", PlotextPlot).render().plain.splitlines()
        y_low = re.fullmatch(r"precision from (0\.\d\d) against recall", title)
        x_low = re.search(r"recall from (0\.\d\d), within candidates", drawn[-1])
        assert y_low and x_low, (size, title, drawn[-1])  # this fixture's points all lie high
        ticks = [line.split("┤")[0].strip() for line in drawn if "┤" in line]
        assert ticks[-1] == y_low.group(1) and ticks[0] == "1.00"  # the axis starts there
        assert drawn[-2].split()[0] == x_low.group(1)
        body = [re.split("[┤│]", line, maxsplit=1)[1].rsplit("│", 1)[0]
                for line in drawn[1:-3]]  # between the frame's top and its bottom
        marked = {i for line in body for i, c in enumerate(line) if c not in " "}
        rows = [r for r, line in enumerate(body) if line.strip()]
        width = max(len(line) for line in body)
        assert max(marked) - min(marked) > width // 2, size  # across more than half the plot
        # and down more than half of it, unless the points lie within the axis's least span
        # (0.2): then they keep to its top, as far apart as they are
        assert rows[-1] - rows[0] > len(body) // 2 or y_low.group(1) == "0.80", size

    await on_the_plots_tab(team[0], team_app, check)
