"""Pilot tests of the quality screen: threshold table, plots, clusters and a conflict."""

from __future__ import annotations

from docket.core import Project
from docket.core.exports.gold_export import conflicts
from docket.core.quality.evaluate import DEFAULT_THRESHOLDS, evaluate
from docket.tui.screens.conflict import ConflictScreen
from docket.tui.screens.pair_detail import PairDetailScreen
from docket.tui.screens.quality import QualityScreen
from tests.fixtures_review import pilot_test, screen_text
from tests.screens_support import press, settle

SIZE = (120, 40)


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
        assert "score of gold-labelled pairs" in text and "design-based" in text
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
        assert "held together by gold matches" in screen_text(app)
        await press(pilot, "enter")
        assert isinstance(app.screen, ConflictScreen)
        text = screen_text(app)
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


@pilot_test
async def test_plot_legends_sit_under_the_plots_not_over_the_data(team, team_app):
    # the plotting library drew each legend in the plot's top-left corner: over the tallest
    # bar, and at 80 columns over the precision-recall curves where precision is high
    from rich.cells import cell_len
    from textual_plotext import PlotextPlot

    from docket.tui.widgets.plot_legend import PlotLegend

    path, _ = team
    for size in ((80, 24), SIZE):
        app = team_app(path, start="quality")
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "1")
            for name, labels in (("score", ("gold non-match (", "gold match (")),
                                 ("pr", ("design-based", "naive (biased)", "threshold "))):
                plot = quality(app).query_one(f"#{name}-plot", PlotextPlot)
                legend = quality(app).query_one(f"#{name}-legend", PlotLegend)
                drawn = plot.render().plain
                shown = legend.render().plain
                assert all(label not in drawn and label in shown for label in labels), size
                assert legend.region.y >= plot.region.bottom and legend.region.height >= 1
                assert all(cell_len(line) <= legend.content_size.width
                           for line in shown.splitlines()), (size, shown)


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
