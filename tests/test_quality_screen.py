"""Pilot tests of the quality screen: threshold table, plots, clusters and a conflict."""

from __future__ import annotations

import re
from collections.abc import Callable

from docket.core import Project
from docket.core.exports.gold_export import conflicts
from docket.core.quality.evaluate import DEFAULT_THRESHOLDS, evaluate
from docket.tui.screens.conflict import ConflictScreen
from docket.tui.screens.pair_detail import PairDetailScreen
from docket.tui.screens.quality import QualityScreen
from tests.fixtures_review import pilot_test, screen_text
from tests.screens_support import press, settle

SIZE = (120, 40)
PR_TITLE = r"precision( from 0\.\d\d)? against recall"
PR_X = r"recall (\(within the candidate pairs\)|from 0\.\d\d, within candidates)"


def quality(app) -> QualityScreen:
    assert isinstance(app.screen, QualityScreen)
    return app.screen


@pilot_test
async def test_threshold_table_is_design_based_with_the_naive_figures_marked(team, team_app):
    path, _ = team
    with Project.open(path, readonly=True) as project:
        report = evaluate(project)
    at = report["at_threshold"]
    app = team_app(path, start="quality")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        table = quality(app).query_one("#threshold-table")
        assert table.row_count == len(set(DEFAULT_THRESHOLDS) | {report["threshold"]})
        row = [c.plain for c in table.get_row(str(at["threshold"]))]
        p = at["precision"]
        assert row[0] == "*" and row[2] == f"{p['value']:.3f} [{p['low']:.3f}, {p['high']:.3f}]"
        text = screen_text(app)
        assert "naive P / R (biased)" in text and "chosen by the queue" in text
        assert "within the candidate pairs" in text
        assert f"{report['audit']['labelled']} of {report['audit']['drawn']:,} drawn" in text
        await press(pilot, "1")
        text = screen_text(app)
        assert "gold-labelled pairs at each score" in text and "design-based" in text
        assert "naive (biased)" in text


@pilot_test
async def test_clusters_tab_lists_the_conflict_and_enter_shows_its_members(team, team_app):
    path, layout = team
    with Project.open(path, readonly=True) as project:
        (conflict,) = conflicts(project)
    app = team_app(path, start="quality")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "3")
        assert "1 conflict" in screen_text(app)
        assert "held together by gold matches (pairs)" in screen_text(app)
        assert "gold non-match (pair)" in screen_text(app)  # '4' read as a count
        await press(pilot, "enter")
        assert isinstance(app.screen, ConflictScreen)
        text = screen_text(app)
        head = app.screen.query_one("#conflict-head").render().plain
        assert f"the gold non-match of pair {layout.conflict_non_match} says" in head
        for _, record_id in conflict.members:
            assert record_id in text
        members = app.screen.query_one("#conflict-members")
        assert members.row_count == len(conflict.members)
        await press(pilot, "enter")  # the first pair listed is the contradicted non-match
        assert isinstance(app.screen, PairDetailScreen)
        assert app.screen.pair_id == layout.conflict_non_match
        assert "different owner" in screen_text(app)
        await press(pilot, "escape", "escape")
        assert isinstance(app.screen, QualityScreen)


@pilot_test
async def test_without_audit_labels_the_screen_says_what_is_missing(sample_project,
                                                                    team_app):
    app = team_app(sample_project, start="quality")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        text = screen_text(app)
        assert "no estimates yet" in text and "audit slice has no gold labels" in text
        await press(pilot, "3")
        text = screen_text(app)
        assert "No clusters yet" in text and "No conflicts" in text
        assert "held together by gold matches" not in text  # no headings over no rows


@pilot_test
async def test_clusters_without_a_conflict_show_no_conflict_table(sample_project, team_app):
    with Project.open(sample_project) as project:
        first = project.next_pairs("maya", 1)[0].pair_id
        project.decide(first, "maya", "match")
    app = team_app(sample_project, start="quality")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "3")
        text = screen_text(app)
        assert "1 cluster of two or more records holds 2 records" in text
        assert "No conflicts: no gold non-match" in text
        assert "held together by gold matches" not in text
        await press(pilot, "enter")
        assert isinstance(app.screen, QualityScreen)  # nothing to open, and nothing opened


def test_narrow_intervals_leave_out_what_only_takes_room() -> None:
    from docket.tui.screens.quality_table import interval
    # the widest an interval gets at 80 columns is 14 cells, "0.97 [.82–.99]": six columns
    # of figures and their padding then fit beside the scroll bar
    assert interval({"value": 1.0, "low": 1.0, "high": 1.0}, True).plain == "1.00 [1–1]"
    assert interval({"value": 0.97, "low": 0.82, "high": 1.0}, True).plain == "0.97 [.82–1]"
    assert interval({"value": 0.97, "low": 0.82, "high": 0.99}, True).plain == "0.97 [.82–.99]"
    # ends round outwards, so that a low of 0.995 does not read as a certain 1
    assert interval({"value": 1.0, "low": 0.995, "high": 1.0}, True).plain == "1.00 [.99–1]"
    assert interval({"value": 0.82, "low": 0.472, "high": 0.9991}, True).plain == "0.82 [.47–1]"
    assert interval({"value": 0.97, "low": 0.82, "high": 1.0}).plain == "0.970 [0.820, 1.000]"


def test_blocking_reach_reads_as_docket_evaluate_says_it(team) -> None:
    # The screen headed the reduction ratio 'Blocking reach:', which says nothing of the matches
    # blocking left out; it now gives the reach as evaluate does, or says it is unmeasured.
    from docket.tui.evaluation_text import evaluation_lines
    from docket.tui.screens.quality_table import notes_text
    from tests.test_missed import not_a_candidate

    path, _ = team
    for measured in (False, True):
        with Project.open(path) as project:
            if measured:
                project.record_missed(*not_a_candidate(project), "maya")
            report = project.evaluate()
        cli = next(x for x in evaluation_lines(report, str(path))
                   if x.startswith("blocking reach"))
        screen = " ".join(notes_text(report).plain.split())
        assert f"Blocking reach{cli[len('blocking reach'):]}." in screen
        assert ("Blocking: " in screen and "(reduction ratio " in screen
                and "Blocking reach: " + f"{report.scope['blocking']['candidate_pairs']:,}"
                not in screen)
        assert ("is not measured" in screen) != measured
        assert ("1 recorded with docket missed" in screen) == measured


async def on_the_plots_tab(path, team_app, check: Callable[[QualityScreen, tuple], None]) -> None:
    """``check`` the quality screen's plots tab at 80x24 and at 120x40."""
    for size in ((80, 24), SIZE):
        app = team_app(path, start="quality")
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "1")
            check(quality(app), size)


@pilot_test
async def test_plot_legends_sit_under_the_plots_not_over_the_data(team, team_app):
    # the plotting library drew each legend in the plot's top-left corner: over the tallest
    # bar, and at 80 columns over the precision-recall curves where precision is high
    from rich.cells import cell_len
    from textual_plotext import PlotextPlot

    from docket.tui.widgets.plot_legend import PlotLegend

    def check(screen: QualityScreen, size: tuple) -> None:
        for name, labels in (("score", ("gold non-match (", "gold match (")),
                             ("pr", ("design-based", "naive (biased)", "threshold "))):
            plot = screen.query_one(f"#{name}-plot", PlotextPlot)
            legend = screen.query_one(f"#{name}-legend", PlotLegend)
            drawn = plot.render().plain
            shown = legend.render().plain
            assert all(label not in drawn and label in shown for label in labels), size
            assert legend.region.y >= plot.region.bottom and legend.region.height >= 1
            assert all(cell_len(line) <= legend.content_size.width
                       for line in shown.splitlines()), (size, shown)

    await on_the_plots_tab(team[0], team_app, check)

def test_a_legend_wraps_between_series_never_inside_one() -> None:
    from docket.tui.widgets.plot_legend import Series, legend_lines

    series = [Series("design-based", (0, 0, 0), "⠒⠒"), Series("naive (biased)", (0, 0, 0), "••"),
              Series("threshold 0.5", (0, 0, 0), "x")]
    assert legend_lines(series, 80).plain == \
        "⠒⠒ design-based   •• naive (biased)   x threshold 0.5"
    assert legend_lines(series, 36).plain.splitlines() == \
        ["⠒⠒ design-based   •• naive (biased)", "x threshold 0.5"]
    assert legend_lines(series, 10).plain.splitlines() == \
        ["⠒⠒ design-based", "•• naive (biased)", "x threshold 0.5"]


@pilot_test
async def test_each_plot_says_what_it_shows_at_80_and_at_120_columns(team, team_app):
    # the plotting library leaves out a title that does not fit beside the canvas's centre
    # (about 37 cells of a 40-cell plot): at 80 columns neither plot said what it showed
    from textual.widgets import Static
    from textual_plotext import PlotextPlot

    def check(screen: QualityScreen, size: tuple) -> None:
        text = screen_text(screen.app)
        for name, title in (("score", "gold-labelled pairs at each score"),
                            ("pr", PR_TITLE)):  # 'precision from 0.70 against recall'
            heading = screen.query_one(f"#{name}-title", Static)
            plot = screen.query_one(f"#{name}-plot", PlotextPlot)
            assert re.fullmatch(title, heading.render().plain.strip()), size
            assert heading.render().plain.strip() in text
            assert heading.region.height == 1 and heading.region.bottom == plot.region.y

    await on_the_plots_tab(team[0], team_app, check)


@pilot_test
async def test_each_plot_names_its_x_axis_at_80_and_at_120_columns(team, team_app):
    # the library writes the y label on the x label's row and leaves out an x label that would
    # touch it: 'model score (match probability)' was missing even at 120 columns, and both x
    # labels at 80
    from textual_plotext import PlotextPlot

    def check(screen: QualityScreen, size: tuple) -> None:
        for name, x in (("score", r"model score \(match probability\)"),
                        ("pr", PR_X)):  # zoomed: 'recall from 0.70, within candidates'
            drawn = screen.query_one(f"#{name}-plot", PlotextPlot).render().plain
            assert re.search(x, drawn.splitlines()[-1]), (size, name)

    await on_the_plots_tab(team[0], team_app, check)


@pilot_test
async def test_the_score_plot_counts_pairs_in_whole_numbers(team, team_app):
    # the library's own ticks put counts of pairs at '248.0, 206.7, 165.3'
    from textual_plotext import PlotextPlot

    def check(screen: QualityScreen, size: tuple) -> None:
        drawn = screen.query_one("#score-plot", PlotextPlot).render().plain
        ticks = [line.split("┤")[0].strip() for line in drawn.splitlines() if "┤" in line]
        assert len(ticks) >= 2 and all(t.replace(",", "").isdigit() for t in ticks), ticks
        assert ticks[-1] == "0"

    await on_the_plots_tab(team[0], team_app, check)


def test_count_ticks_are_whole_steps_of_one_two_or_five() -> None:
    from docket.tui.figures import count_ticks, tallest_bin

    assert count_ticks(248) == [0, 50, 100, 150, 200]
    assert count_ticks(4) == [0, 1, 2, 3, 4]
    assert count_ticks(9) == [0, 2, 4, 6, 8]
    assert count_ticks(0) == [0]
    # the library's binning: equal bins from the least value to the largest, which goes last
    assert tallest_bin([0.0, 0.1, 0.5, 1.0, 1.0], 20) == 2
    assert tallest_bin([0.3], 20) == 1


@pilot_test
async def test_help_lists_no_way_back_on_a_screen_opened_alone(team, team_app):
    # 'evaluate --screen' listed 'esc  back  back to the screen you came from' in its help,
    # where there is no screen to go back to and esc did nothing; from adjudication it stays
    from docket.tui.screens.team_help import TeamHelp

    for start, back in (("quality", False), ("adjudicate", True)):
        app = team_app(team[0], start=start)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot)
            if start == "adjudicate":
                await press(pilot, "g")
            await press(pilot, "question_mark")
            assert isinstance(app.screen, TeamHelp)
            assert ("quality-back" in {r.binding_id for r in app.screen.rows}) is back
            # the keymap's example is one of this screen's ids: it was 'match' here
            assert ' quality-plots="m"\n' in app.screen._keymap().plain
