"""Pilot tests for the review screen's background work, against the sample project: a refit
runs in a worker, the pair stays on screen, and keys keep working while it runs."""

from __future__ import annotations

import threading

from tests.fixtures_review import (
    SIZE,
    log,
    pilot_test,
    press,
    review,
    rows,
    settle,
)


@pilot_test
async def test_refit_runs_in_the_background_and_keeps_the_pair_on_screen(review_sample,
                                                                         review_app):
    app = review_app(review_sample, refit_every=3)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        for key in "sds":
            await pilot.press(key)
        on_screen = review(app).item
        await settle(pilot)
        assert review(app).item == on_screen
        assert "model refit" in review(app).model_note
    assert rows(review_sample, "SELECT value FROM meta WHERE key = 'refits'") == [("1",)]


@pilot_test
async def test_input_is_not_blocked_while_a_refit_runs(review_sample, review_app):
    app = review_app(review_sample, refit_every=1)
    release = threading.Event()
    bg = app.background()
    real_refit = bg.refit

    def slow_refit():
        assert release.wait(timeout=30)
        return real_refit()

    bg.refit = slow_refit  # type: ignore[method-assign]
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        remaining = review(app).remaining
        seen = []
        for key in "sdd":  # the first starts a refit that waits; the others go through
            seen.append(review(app).item.pair_id)
            await press(pilot, key)
        assert review(app).refitting
        assert len(log(review_sample)) == 3 and len(set(seen)) == 3
        on_screen = review(app).item
        release.set()
        await settle(pilot)
        assert not review(app).refitting and review(app).item == on_screen
        # Each decision counted once. Measured in a terminal: 26 decisions with a refit every
        # 25 read '27 done' (here 5): the refit's count, made after the decisions that came
        # while it ran, had them added again, as made since the refit started.
        assert review(app).decided == 3 and review(app).remaining == remaining - 3
