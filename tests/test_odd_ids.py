"""Record ids of 200 characters that differ only at their end stay told apart on screen."""

from __future__ import annotations

from textual.containers import VerticalScroll

from docket.tui import literal
from tests.fixtures_review import pilot_test, press, screen_text, settle
from tests.odd_data import long_id


def test_a_long_id_keeps_its_end() -> None:
    shown = literal.record_id(long_id("L", 49), 18).plain
    assert shown.startswith("L-xxx") and shown.endswith("0000049") and len(shown) == 18
    assert literal.record_id("L-17", 18).plain == "L-17"
    assert literal.record_id("a\x1bb" * 100, 12).cell_len <= 12  # escapes count their cells


@pilot_test
async def test_the_card_title_and_the_candidates_show_where_long_ids_differ(odd_project,
                                                                           review_app):
    # both ids were cut at their end: at 80 columns the title read 'L-xxxxxxxxxxxxxxxxxxxxx…
    # ↔ R-xxxxxxxxxx…' (the right one cut again by the border), and every other candidate
    # was 'R-xxxxxxxxxxx…'
    app = review_app(odd_project)
    for size in ((80, 24), (120, 40)):
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            card = app.screen.card
            box = app.screen.query_one("#card-box", VerticalScroll)
            title = box.title_text  # the title as text (border_title reads as markup)
            assert card.left_id[-7:] in title and card.right_id[-7:] in title, title
            assert len(title) + 6 <= box.size.width  # within the border, corners included
            await press(pilot, "c")
            text = screen_text(app)
            others = [i for i in range(6) if f"{i:06d}" in text]
            assert len(others) >= 3, text  # the record's own, and its candidates', told apart
            await press(pilot, "escape")
        app = review_app(odd_project)


def test_docket_next_cuts_a_long_id_in_its_middle(odd_project, capsys) -> None:
    # each id wider than 70 cells was cut at its end: 'L-xxxx…' on every line of the list
    from docket.tui.cli import main

    assert main(["next", str(odd_project), "--reviewer", "ann", "-n", "12"]) == 0
    lines = capsys.readouterr().out.splitlines()
    ids = [line.strip() for line in lines if line.strip().startswith(("L-", "R-"))]
    assert len(ids) == 24 and all(len(line) <= 80 for line in lines)
    assert {i[-7:] for i in ids} == {f"{n:07d}" for n in range(6)}  # every end in sight
    assert all("…" in i and i.startswith(("L-xxx", "R-xxx")) for i in ids)
    assert lines[-1].startswith("(an id with … in it is cut to fit")


@pilot_test
async def test_the_title_follows_the_card_box_when_the_terminal_narrows(odd_project,
                                                                        review_app):
    # resized from 200 columns to 80 under the candidates list, the title kept its wide ids
    # and the border cut the right one at its end: 'R-xxxxxxxxxx……'
    app = review_app(odd_project)
    async with app.run_test(size=(200, 50)) as pilot:
        await settle(pilot)
        await press(pilot, "c")  # a modal screen over the card
        await pilot.resize_terminal(80, 24)
        await settle(pilot)
        await press(pilot, "escape")
        box = app.screen.query_one("#card-box", VerticalScroll)
        title = box.title_text
        assert len(title) + 6 <= box.size.width, (title, box.size.width)
        assert title.endswith(app.screen.card.right_id[-7:])
