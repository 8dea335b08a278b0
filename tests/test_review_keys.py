"""Pilot tests for the review screen's keys, against the sample project: deciding, notes,
help and layout. Keymap files are in test_keymap.py, the background refit in
test_review_background.py, moving around (history, find, other candidates) in
test_review_moves.py."""

from __future__ import annotations

import io

from docket.core import Project
from docket.tui.screens import HelpScreen, NoteScreen, ReviewScreen
from tests.fixtures_review import (
    SIZE,
    FrozenClock,
    log,
    pilot_test,
    press,
    review,
    rows,
    screen_text,
    settle,
)


@pilot_test
async def test_match_non_match_hold_store_label_reviewer_and_time(review_sample, review_app,
                                                                  frozen_clock: FrozenClock):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        shown = []
        for key, seconds in (("s", 3.5), ("d", 1.25), ("h", 7.0)):
            shown.append(review(app).item.pair_id)
            frozen_clock.advance(seconds)
            await press(pilot, key)
        assert review(app).item.pair_id not in shown
        assert review(app).decided == 3
    assert log(review_sample) == [
        (shown[0], "maya", "match", "", 3.5, None),
        (shown[1], "maya", "non-match", "", 1.25, None),
        (shown[2], "maya", "hold", "", 7.0, None)]


@pilot_test
async def test_each_decision_is_committed_before_the_next_pair_is_painted(review_sample,
                                                                         review_app):
    app = review_app(review_sample)
    seen: list[int] = []
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.on_painted = lambda: seen.append(rows(review_sample,
                                                  "SELECT count(*) FROM decisions")[0][0])
        for key in "sdsh":
            await press(pilot, key)
    assert seen[:4] == [1, 2, 3, 4]


@pilot_test
async def test_undo_appends_a_retraction_and_brings_the_pair_back(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = review(app).item.pair_id
        await press(pilot, "s")
        await press(pilot, "z")
        screen = review(app)
        assert screen.item.pair_id == first and screen.mode == "aside"
        assert screen.decided == 0
        assert "undone" in screen_text(app)
        await pilot.press("z")  # nothing left to undo: no new row
        await pilot.pause()
    entries = log(review_sample)
    assert len(entries) == 2
    (pair, _, label, _, _, sup), (pair2, _, label2, _, _, sup2) = entries
    assert (pair, label, sup) == (first, "match", None)
    decision_id = rows(review_sample, "SELECT decision_id FROM decisions WHERE label IS NOT NULL")
    assert (pair2, label2, sup2) == (first, None, decision_id[0][0])


@pilot_test
async def test_note_is_saved_with_the_decision(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "e")
        assert isinstance(app.screen, NoteScreen)
        await press(pilot, *"twins?", "enter")
        assert review(app).pending_note == "twins?"
        await press(pilot, "d")
    assert log(review_sample)[0][2:4] == ("non-match", "twins?")


@pilot_test
async def test_a_note_on_an_undecided_pair_survives_quit_and_reopen(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = review(app).item.pair_id
        await press(pilot, "e", *"ask the vet", "enter")
        await pilot.press("q")  # quit before any decision
    assert log(review_sample) == []  # a note alone is not a decision
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert review(app).item.pair_id == first
        assert review(app).pending_note == "ask the vet"
        assert "ask the vet" in screen_text(app)
        await press(pilot, "s")
    assert log(review_sample)[0][:4] == (first, "maya", "match", "ask the vet")
    assert rows(review_sample, "SELECT count(*) FROM drafts") == [(0,)]  # taken by the decision


@pilot_test
async def test_undo_keeps_the_note_for_the_next_decision_on_the_pair(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = review(app).item.pair_id
        await press(pilot, "e", *"same owner, new pet", "enter", "s", "z")
        assert review(app).item.pair_id == first
        assert review(app).pending_note == "same owner, new pet"
        await press(pilot, "d")
    assert [r[2:4] for r in log(review_sample)] == [
        ("match", "same owner, new pet"), (None, ""), ("non-match", "same owner, new pet")]
    assert rows(review_sample, "SELECT count(*) FROM drafts") == [(0,)]


@pilot_test
async def test_note_on_a_decided_pair_appends_a_decision_with_the_same_label(review_sample,
                                                                            review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("s")
        await press(pilot, "left_square_bracket")
        await press(pilot, "e", *"later: same vet", "enter")
        assert review(app).mine.note == "later: same vet"
        await pilot.press("e", "escape")  # cancelling changes nothing
        await pilot.pause()
    (a, *_), (b, _, label, note, _, sup) = log(review_sample)
    assert a == b and (label, note) == ("match", "later: same vet") and sup is not None


@pilot_test
async def test_extra_columns_toggle(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert "not compared" not in screen_text(app)
        await press(pilot, "x")
        assert "not compared" in screen_text(app)
        await press(pilot, "x")
        assert "not compared" not in screen_text(app)


@pilot_test
async def test_help_lists_every_binding_and_the_caution(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "question_mark")
        assert isinstance(app.screen, HelpScreen)
        text = screen_text(app)
        for binding in ReviewScreen.BINDINGS:
            assert binding.id in text, binding.id
            assert binding.description in text
        assert "personal data" in text and "private" in text
        assert "only what they need (--mask)" in text  # the one caution of 'new' it lacked
        # every name two spaces or more from its explanation: 'full values show in full the
        # values...' read as one sentence
        from rich.console import Console
        console = Console(width=110, record=True, file=io.StringIO())
        console.print(app.screen._keys())
        grid = console.export_text()
        for binding in ReviewScreen.BINDINGS:
            if binding.description and binding.tooltip:
                assert f"{binding.description}  " in grid, binding.description
        # the keymap's example cannot be wrapped in two: 'match =' ended one line and '"m"'
        # began the next at 120 columns
        assert ' match="m"\n' in app.screen._keymap().plain
        await press(pilot, "escape")
        assert isinstance(app.screen, ReviewScreen)


@pilot_test
async def test_footer_shows_the_decision_keys(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        text = screen_text(app)
        for words in ("match", "non-match", "hold", "undo", "note", "find", "help", "quit"):
            assert words in text


@pilot_test
async def test_quit_and_reopen_resumes_where_the_reviewer_stopped(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        done = []
        for key in "sd":
            done.append(review(app).item.pair_id)
            await press(pilot, key)
        waiting = review(app).item.pair_id
        await press(pilot, "q")
    assert not app.is_running
    again = review_app(review_sample)
    async with again.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert review(again).item.pair_id == waiting
        assert review(again).decided == 2


@pilot_test
async def test_redraw_paints_without_writing(review_sample, review_app):
    app = review_app(review_sample)
    painted: list[int] = []
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.on_painted = lambda: painted.append(1)
        before = review(app).item
        await press(pilot, "ctrl+l")
        assert painted and review(app).item == before
    assert log(review_sample) == []


@pilot_test
async def test_blind_another_reviewers_label_and_note_never_show(review_sample, review_app):
    with Project.open(review_sample) as project:
        shared = project.connection.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 1 ORDER BY pair_id LIMIT 1").fetchone()[0]
        project.decide(shared, "olek", "non-match", "SECRETNOTE", 2.0)
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "slash", *str(shared), "enter")
        await press(pilot, "enter")
        assert review(app).item.pair_id == shared and review(app).mine is None
        text = screen_text(app)
        assert "SECRETNOTE" not in text and "olek" not in text
        assert "you: " not in text and "non-match" not in text.split("s match")[0]
        await pilot.press("left_square_bracket")  # maya has no history: olek's is not hers
        await pilot.pause()
        assert review(app).mode == "aside"


@pilot_test
async def test_layout_stacks_when_narrow_and_follows_resizes(review_sample, review_app):
    from docket.tui.widgets import PairCardView

    app = review_app(review_sample)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        assert app.screen.query_one(PairCardView).stacked
        await pilot.resize_terminal(140, 40)
        # a resize reaches the card through several layout passes: give it as many as it takes
        # (bounded), rather than one pause that a loaded machine may outrun
        for _ in range(50):
            if not app.screen.query_one(PairCardView).stacked:
                break
            await pilot.pause()
        assert not app.screen.query_one(PairCardView).stacked
        assert " R " not in screen_text(app).split("field")[1][:200]


@pilot_test
async def test_theme_change_repaints_with_the_new_theme(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = review(app).palette
        app.theme = "textual-light"
        await settle(pilot)
        assert review(app).palette != before


@pilot_test
async def test_help_names_the_masked_columns(review_sample, review_app):
    # nothing on screen named them, and '01•• ••• ••69' could pass for a damaged value
    for mask, said in (((), None), (("email", "phone"), "Masked here: email, phone")):
        app = review_app(review_sample, mask=list(mask))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot)
            await press(pilot, "question_mark")
            text = screen_text(app)
            assert ("Masked here" in text) is bool(said) and (said is None or said in text)
