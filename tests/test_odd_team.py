"""The team screens on untuned data: 200-character ids, names that look like markup or are
written right to left."""

from __future__ import annotations

from docket.core import Project
from tests.fixtures_review import pilot_test, press, screen_text, settle
from tests.test_agreement_screen import to_cell

NAMES = ("[bold]bob[/]", "محمد")  # 12 cells, the widest a name column gets beside 'non-match'


def _two_reviewers_disagree(path) -> None:
    with Project.open(path) as p:
        for name in NAMES:
            p.add_reviewer(name)
        p.add_reviewer("lead", role="adjudicator")
        pairs = [i.pair_id for i in p.next_pairs(NAMES[0], 12)]
        for k, pid in enumerate(pairs):
            p.decide(pid, NAMES[0], "match", note="[red]surname[/] changed")
            p.decide(pid, NAMES[1], "non-match" if k % 2 else "match", note="שרה\tכהן moved")


@pilot_test
async def test_both_notes_of_a_disagreement_are_in_sight_beside_long_ids(odd_project,
                                                                       team_app):
    # two 200-character ids took 16 cells each, and with a 12-cell name the notes were given
    # 8 cells each where 3 were left: the second note was out of sight at 80 columns
    _two_reviewers_disagree(odd_project)
    for size in ((80, 24), (120, 40)):
        app = team_app(odd_project, start="agreement")
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await to_cell(pilot, *NAMES)
            await press(pilot, "enter")
            table = app.screen.query_one("#disagree-table")
            width = sum(col.get_render_width(table) for col in table.columns.values())
            assert width <= table.scrollable_content_region.width, size
            text = screen_text(app)
            assert "[red]su" in text and "שרה\\t" in text  # literal, both in sight
            assert "…0000" in text  # the ids' ends, where they differ


@pilot_test
async def test_a_conflict_lists_its_records_by_the_ends_of_their_ids(odd_project, team_app):
    # the members were joined and cut at 40 cells: 'L-xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx…',
    # the start of the first id alone
    with Project.open(odd_project) as p:
        p.add_reviewer("lead", role="adjudicator")
        rows = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs").fetchall()
        for pid, left, right in rows:  # the pairs form one ring: one non-match in it
            wrong = (left[-1], right[-1]) == ("2", "3")
            p.decide(pid, "ann", "non-match" if wrong else "match")
    app = team_app(odd_project, start="quality")
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await press(pilot, "3")
        row = next(line for line in screen_text(app).splitlines() if "12: " in line)
        assert "…-0000000, " in row and "…-0000001" in row, row


def test_reviewers_list_keeps_80_columns_with_a_long_name(odd_project, capsys) -> None:
    # a 12-cell name made each row 85 columns: the terminal wrapped it mid-date
    from rich.cells import cell_len

    from docket.tui.cli import main

    _two_reviewers_disagree(odd_project)
    assert main(["reviewers", str(odd_project), "list"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert max(cell_len(x) for x in lines) <= 80, lines
    at = lines.index(NAMES[0])  # on a line of its own, its figures under it
    assert lines[at + 1].split()[:2] == ["reviewer", "12"]
    assert any(x.startswith("محمد ") and "reviewer" in x for x in lines)  # short: one line


@pilot_test
async def test_the_reviews_panel_scrolls_when_its_reviews_run_past_its_foot(odd_project,
                                                                           team_app):
    # five reviewers with notes of a few lines: at 80x24 the adjudicator saw two of the five
    # labels and not the gold line, and the panel could not be scrolled
    from docket.tui.widgets.reviews import ReviewsPanel

    note = ("the surname changed after marriage and the street is new but the pet is the "
            "same old dog and the phone matches an earlier record")
    with Project.open(odd_project) as p:
        p.add_reviewer("lead", role="adjudicator")
        pid = p.next_pairs("r0", 1)[0].pair_id
        for k in range(5):
            p.decide(pid, f"r{k}", ("match", "non-match")[k % 2], note=f"{k}: {note}")
    app = team_app(odd_project)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        panel = app.screen.query_one(ReviewsPanel)
        assert all(f"r{k} " in panel.content.plain for k in range(5))
        assert panel.max_scroll_y > 0  # taller than the panel: it scrolls
        await press(pilot, "tab", "end")  # as the help says: Tab moves to it
        assert panel.scroll_y == panel.max_scroll_y
        assert "gold" in screen_text(app)


@pilot_test
async def test_reviewer_names_keep_their_ends_in_the_reviews_panel(odd_project, team_app):
    # cut at the end, 'annotator_north_01' and '..._02' both read 'annotator…' at 80x24
    from docket.tui.widgets.reviews import ReviewsPanel

    names = ("annotator_north_01", "annotator_north_02")
    with Project.open(odd_project) as p:
        p.add_reviewer("lead", role="adjudicator")
        pid = p.next_pairs(names[0], 1)[0].pair_id
        for name, label in zip(names, ("match", "non-match"), strict=True):
            p.decide(pid, name, label)
    app = team_app(odd_project)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        text = app.screen.query_one(ReviewsPanel).content.plain
        assert "…h_01 " in text and "…h_02 " in text, text  # told apart
