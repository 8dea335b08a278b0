"""The review screen claims each pair it serves, gives it back on decide and on quit, and
goes on when a background refit fails."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from docket.core import Project
from docket.tui.screens import ReviewScreen
from tests.fixtures_review import pilot_test, settle

SIZE = (120, 40)


def claims_of(path: Path) -> list[tuple[int, str]]:
    with sqlite3.connect(path) as conn:
        return conn.execute("SELECT pair_id, reviewer FROM claims ORDER BY 1").fetchall()


@pilot_test
async def test_the_pair_on_screen_is_claimed_until_decided_or_quit(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, ReviewScreen) and screen.item is not None
        first = screen.item.pair_id
        assert claims_of(review_sample) == [(first, "maya")]
        with Project.open(review_sample) as other:  # a second reviewer at the same time
            assert first not in [i.pair_id for i in other.next_pairs("ravi", 3)]
        await pilot.press("d")
        await pilot.pause()
        assert screen.item is not None and screen.item.pair_id != first
        assert claims_of(review_sample) == [(screen.item.pair_id, "maya")]
    assert claims_of(review_sample) == []


@pilot_test
async def test_a_refit_that_fails_is_reported_and_the_review_goes_on(review_sample, review_app):
    app = review_app(review_sample, refit_every=1)

    def locked() -> object:
        raise sqlite3.OperationalError("database is locked")

    app.refit = locked  # type: ignore[method-assign]
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, ReviewScreen)
        await pilot.press("d")  # the decision starts a refit, which fails
        await settle(pilot)
        assert app.is_running and not screen.refitting
        await pilot.press("s")  # and the next decision is saved all the same
        await settle(pilot)
        with sqlite3.connect(review_sample) as conn:
            assert conn.execute("SELECT count(*) FROM decisions").fetchone()[0] == 2
