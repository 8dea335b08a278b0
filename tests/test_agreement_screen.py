"""Pilot tests of the agreement screen: the kappa matrix, holds, disagreements, blind names."""

from __future__ import annotations

from docket.core import Project
from docket.core.reviewing.team import agreement_report
from docket.tui.screens.agreement import AgreementScreen, DisagreementsScreen, cell_text
from docket.tui.screens.pair_detail import PairDetailScreen
from docket.tui.widgets.reviews import ReviewsPanel
from tests.fixtures_review import pilot_test, screen_text
from tests.screens_support import FLIPPED, HELD, press, settle

SIZE = (120, 40)


def maya_ines(path, include_hold: bool = False) -> dict:
    with Project.open(path, readonly=True) as project:
        report = agreement_report(project, include_hold=include_hold)
    return next(r for r in report["reviewer_pairs"]
                if {r["reviewer_a"], r["reviewer_b"]} == {"maya", "ines"})


def agreement(app) -> AgreementScreen:
    assert isinstance(app.screen, AgreementScreen)
    return app.screen


async def to_cell(pilot, a: str, b: str) -> None:
    """Put the matrix cursor on row ``a``, column ``b``."""
    from textual.widgets import DataTable
    table = pilot.app.screen.query_one(DataTable)
    rows = [k.value for k in table.rows]
    cols = [k.value for k in table.columns]
    table.move_cursor(row=rows.index(a), column=cols.index(b))
    await settle(pilot)


@pilot_test
async def test_matrix_shows_kappa_with_ci_n_and_band_and_the_overall_figures(team, team_app):
    path, _ = team
    entry = maya_ines(path)
    app = team_app(path, start="agreement")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        text = screen_text(app)
        expected = cell_text(entry).plain.split("\n")
        assert expected[0].startswith(f"{entry['kappa']:.2f} [{entry['ci_low']:.2f}, ")
        for line in expected:
            assert line in text
        assert entry["band"] in text and f"n {entry['n']}" in text
        assert "Fleiss' kappa" in text and "Krippendorff's alpha" in text
        assert "holds count as no rating" in text
        await to_cell(pilot, "ines", "maya")  # the matrix is symmetric
        assert f"Cohen's kappa {entry['kappa']:.3f}" in screen_text(app)
        await press(pilot, "escape")  # opened on its own: nothing to go back to
        assert isinstance(app.screen, AgreementScreen)
        await press(pilot, "q")
    assert not app.is_running


@pilot_test
async def test_holds_key_counts_hold_as_a_third_category(team, team_app):
    path, _ = team
    without, with_hold = maya_ines(path), maya_ines(path, include_hold=True)
    assert with_hold["n"] == without["n"] + len(HELD)
    app = team_app(path, start="agreement")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "h")
        assert agreement(app).report.include_hold is True
        text = screen_text(app)
        assert "third category" in text and f"n {with_hold['n']}" in text
        await press(pilot, "h")
        assert agreement(app).report.include_hold is False


@pilot_test
async def test_a_cell_opens_that_pairs_disagreements_and_one_disagreement_the_pair(team,
                                                                                team_app):
    path, layout = team
    app = team_app(path)  # from the adjudication screen, with the a key
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "a")
        await to_cell(pilot, "maya", "ines")
        await press(pilot, "enter")
        assert isinstance(app.screen, DisagreementsScreen)
        listed = [int(k.value) for k in app.screen.query_one("#disagree-table").rows]
        assert listed == sorted((*layout.flipped, *layout.held))
        assert len(listed) == len(FLIPPED) + len(HELD)
        await press(pilot, "down", "enter")
        assert isinstance(app.screen, PairDetailScreen) and app.screen.pair_id == listed[1]
        text = app.screen.query_one(ReviewsPanel).content.plain
        assert "maya" in text and "ines" in text and "same vet, I think" in text
        # ? opened nothing here: the pair's own help names its keys, w among them
        await press(pilot, "question_mark")
        assert type(app.screen).__name__ == "TeamHelp"
        helped = screen_text(app)
        assert "full values" in helped and "Nothing is decided here" in helped
        await press(pilot, "escape")
        assert isinstance(app.screen, PairDetailScreen)
        await press(pilot, "escape", "escape", "escape")
        assert type(app.screen).__name__ == "AdjudicateScreen"


@pilot_test
async def test_the_disagreements_list_fits_80_columns(team, team_app):
    # each note had 28 cells: at 80 columns the second note was out of sight, its heading 'no'
    # and at 120 columns notes were cut at 28 cells with room to spare
    path, _ = team
    for size, least in (((80, 24), 8), ((120, 40), 29)):
        app = team_app(path)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "a")
            await to_cell(pilot, "maya", "ines")
            await press(pilot, "enter")
            table = app.screen.query_one("#disagree-table")
            width = sum(col.get_render_width(table) for col in table.columns.values())
            assert width <= table.scrollable_content_region.width
            assert [c.label.plain for c in table.columns.values()].count("note") == 2
            assert app.screen._cells()[0] >= least


@pilot_test
async def test_blind_shows_no_reviewer_names(team, team_app):
    path, _ = team
    app = team_app(path, blind=True)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "a")
        table = app.screen.query_one("#agree-matrix")
        shown = [c.label.plain for c in table.columns.values()]
        assert sorted(shown) == ["reviewer A", "reviewer B", "reviewer C"]
        body = "".join(str(w.content) for w in app.screen.query("Static"))
        for name in ("maya", "ines", "lead"):
            assert name not in body and name not in shown


def test_agreement_120x40(snap_compare, team, team_app):
    path, _ = team
    assert snap_compare(team_app(path, start="agreement"), terminal_size=SIZE,
                        run_before=settle)


@pilot_test
async def test_with_one_reviewer_the_hint_names_no_cell_to_move_to(sample_project, team_app):
    # 'Move to a cell of two reviewers' was shown with no such cell in the matrix
    with Project.open(sample_project) as p:
        p.decide(p.next_pairs("ines", 1)[0].pair_id, "ines", "match")
    app = team_app(sample_project, start="agreement")
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        text = " ".join(screen_text(app).split())
        assert "No two reviewers have pairs in common yet" in text
        assert "Move to a cell" not in text
        assert "Once two reviewers have decided the same pairs" in text
